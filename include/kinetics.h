/*
 * kinetics.h - consecutive halogenation A0 -> A1 -> ... -> An (degree distribution).
 *
 * Every step abstracts one H with the same halogen radical, so the radical
 * concentration can be folded into a pseudo-time tau (design section 4):
 *   batch / plug flow: dA0/dtau = -k0 A0,  dAn/dtau = k(n-1) A(n-1) - kn An
 *   CSTR:              An = A(n-1) k(n-1) tau / (1 + kn tau)
 * The extent is found so that sum n An equals the halogen reacted per mole of
 * substrate.  The batch solution is computed by uniformization (a Poisson-
 * weighted sum of non-negative terms), which stays exact when rate constants
 * coincide; see kinetics.c for the error bound.
 */
#ifndef KINETICS_H
#define KINETICS_H

#include "hlerr.h"

#define KIN_MAX_STEPS 64 /* highest degree modelled (abstractable H on one molecule) */

enum kin_mode { KIN_BATCH, KIN_CSTR };

/* Mole fractions x[0..nsteps] of A0..A_nsteps at pseudo-time tau >= 0, starting
 * from pure A0. k[0..nsteps-1] > 0 are the step rate constants (any consistent
 * unit, tau in its inverse); A_nsteps is terminal. 1 <= nsteps <= KIN_MAX_STEPS,
 * each k in 1e-200..1e200, tau finite; otherwise HL_ERR_INPUT. Batch fractions
 * carry an absolute error below 1e-14 (see kinetics.c); they sum to 1 within 1e-14. */
enum hl_status kin_distribution(enum kin_mode mode, const double *k, int nsteps,
                                double tau, double *x, struct hl_err *e);

/* Find tau so that sum n x[n] = mean_degree (0 <= mean_degree < nsteps; values within
 * 1e-12 of nsteps give the all-terminal limit) and fill x[0..nsteps]. Relative error
 * of the achieved mean degree <= 1e-12. *tau_out may be NULL; it is 0 for mean_degree
 * 0 and INFINITY for the all-terminal limit (do not write it unchecked). "Within 1e-12"
 * is relative to nsteps; above that HL_ERR_INPUT. HL_ERR_INTERNAL if no root is found. */
enum hl_status kin_solve_extent(enum kin_mode mode, const double *k, int nsteps,
                                double mean_degree, double *x, double *tau_out,
                                struct hl_err *e);

/* Step constants from the design's rule: k[n] = (h0 - n) * mean_r * phi^n for
 * n < nsteps = h0 (h0 abstractable H on the substrate), or, where ratios (count
 * nratios > 0) are given, k[n] = ratios[n] for n < nratios and beyond that
 * k[n] = ratios[last] * (h0 - n) / (h0 - last). Returns nsteps (capped at
 * KIN_MAX_STEPS) or -1 on bad input (h0 < 1, non-positive ratio). */
int kin_step_constants(int h0, double mean_r, double phi, const double *ratios,
                       int nratios, double *k);

/* Step constants from the substrate's sites when no ratios are given: c_j starts at the
 * n_h[j] abstractable H of class j (per-H reactivity r[j] > 0); k[n] = phi^n sum_j c_j r_j,
 * then one H is removed, split over the classes in proportion to c_j r_j (the expected
 * share each class loses to the next abstraction; a class never goes below 0). With all
 * r alike this is exactly the design's H-count rule. nsteps = round(sum n_h), capped at
 * KIN_MAX_STEPS; returns it, or -1 on bad input. nclass <= 16. */
int kin_step_constants_sites(const double *n_h, const double *r, int nclass, double phi,
                             double *k);

#endif

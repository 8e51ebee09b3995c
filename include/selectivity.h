/*
 * selectivity.h - from a substrate SMILES to the first-step products and
 * their shares, plus what the degree model needs for the later steps.
 *
 * Built on smiles.h (graph) and sites.h (C-H classes, symmetry classes,
 * product structures).  Per-H relative reactivities r per reagent are held
 * at a reference temperature and scaled as r(T) = r(Tref)^(Tref/T) (kelvin,
 * equal pre-exponential factors).  Monohalide isomer shares are
 * f_j = n_j r_j / sum_i n_i r_i (design section 4).
 */
#ifndef SELECTIVITY_H
#define SELECTIVITY_H

#include "formula.h"
#include "hlerr.h"
#include "kinetics.h"
#include "sites.h" /* enum site_class */


/* Per-H relative reactivities (primary = 1 by convention) at ref_temp_c. */
struct sel_reactivity {
    double r[SITE_CLASS_COUNT];
    double ref_temp_c;
    unsigned set_mask; /* user override: bit c set when r[c] given; bit SITE_CLASS_COUNT for ref_temp_c */
};
/* set_mask bit: the campaign gives its own rate_ratios, so published per-step ratios
 * (methane + Cl2) are neither looked up nor listed as used. */
#define SEL_OWN_RATIOS (1u << (SITE_CLASS_COUNT + 1))

struct sel_isomer {
    char *smiles;            /* product structure, owned; never NULL */
    struct formula formula;
    double fraction;         /* share of the first step; all shares sum to 1 */
    int site_class;          /* enum site_class of the carbon attacked */
    int n_h;                 /* H in the symmetry class (C=C count for HBr adducts) */
    double r_per_h;          /* per-H reactivity at the run temperature */
};

/* One reactivity value the prediction used, for the Assumptions sheet. */
struct sel_used {
    char what[96];           /* "Cl2 per-H reactivity, tertiary, at 25 C" */
    double value;
    char unit[32];           /* "relative, per H", "fraction", "ratio of rate constants" */
    char origin[160];        /* "Morrison & Boyd, Organic Chemistry, 6th ed." or "campaign model" */
};

struct sel_result {
    struct formula substrate;      /* from the graph, hydrogens included */
    double molar_mass_g_mol;
    struct sel_isomer *iso; int niso;
    int wanted;                    /* index into iso: product_smiles match, else largest share */
    int h0;                        /* steps the chain can take: abstractable H (HBr: C=C count) */
    double mean_r;                 /* sum n r / sum n over abstractable H at temp */
    double class_h[SITE_CLASS_COUNT]; /* abstractable H per site class (HBr: C=C count in [0]) */
    double class_r[SITE_CLASS_COUNT]; /* per-H reactivity of each class at temp (HBr: 1) */
    double rate_ratios[KIN_MAX_STEPS]; int nratios; /* published per-step ratios (methane+Cl2), 0 = none */
    char *over_smiles[KIN_MAX_STEPS + 1]; /* degree-d structure where unambiguous, else NULL; owned */
    struct sel_used *used; int nused;
    char warning[256];             /* e.g. temperature outside a rate expression's range; "" = none */
};

/* Default per-H reactivities of a reagent (enum reagent_id) with their origin text. */
void sel_defaults(int reagent, struct sel_reactivity *r, const char **origin);

/* Origin text of the default per-H reactivity of one site class for a reagent
 * (static string; "" for a class the reagent does not attack). */
const char *sel_default_origin(int reagent, int site_class);

/* r at temp_c from r_ref at ref_temp_c: r_ref^((ref+273.15)/(temp+273.15)). */
double sel_scale_to_temp(double r_ref, double ref_temp_c, double temp_c);

/* Predict the first-step products of reagent (enum reagent_id) on smiles at temp_c.
 * user (may be NULL) overrides defaults field by field. product_smiles (may be NULL)
 * names the wanted isomer, compared as a structure. On error returns HL_ERR_INPUT
 * with e->field "smiles" or "product_smiles" and e->col the 1-based column inside
 * that string. out is owned by the caller: release with sel_free. */
enum hl_status sel_predict(const char *smiles, const char *product_smiles, int reagent,
                           double temp_c, const struct sel_reactivity *user,
                           struct sel_result *out, struct hl_err *e);

/* Notes on the fields filled by sel_predict: rate_ratios/nratios are set for
 * methane + Cl2 (Bryukov, Slagle & Knyazev 2002 expressions at temp_c) whatever
 * the campaign says; the caller prefers the campaign's own rate_ratios.
 * over_smiles[d] is set for 2 <= d <= h0 where the structure is unambiguous (all
 * abstractable H on one carbon; HBr: every C=C added, d = h0); [0] and [1] stay NULL. */

/* Free what sel_predict allocated; safe on a zeroed result. */
void sel_free(struct sel_result *r);

#endif

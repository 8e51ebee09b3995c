/*
 * thermal.h - reaction heat, adiabatic rise, criticality class, gas withdrawal.
 *
 * A screening estimate for a process-safety review, fed by the balance results and
 * calling nothing above it.  Heat of one halogenation step from bond dissociation
 * enthalpies (298 K, gas phase):
 *   substitution by X2:   dH = D(R-H) + D(X-X) - D(R-X) - D(H-X)
 *   by SO2Cl2:            dH = D(R-H) + dH(SO2Cl2 -> SO2 + 2 Cl) - D(R-Cl) - D(H-Cl)
 *   by NBS:               dH = D(R-H) + D(N-Br, NBS) - D(R-Br) - D(N-H, succinimide)
 *   radical HBr addition: dH = D(H-Br) + E(pi, C=C) - D(C-H formed) - D(C-Br formed)
 * Adiabatic rise = heat / (reaction mass x cp); MTSR = Tp + accumulation x rise; the
 * criticality class 1-5 follows Stoessel, Thermal Safety of Chemical Processes
 * (Wiley-VCH, 2008), from the order of Tp, MTSR, MTT and TD24.  Gas withdrawal: how many
 * containers one gas feed needs on line, each giving its continuous rate without icing.
 * Calorimetry and a process-safety study by qualified people decide; this does not.
 */
#ifndef THERMAL_H
#define THERMAL_H

#include <stddef.h>

/* Carbon sites of the bond table: methyl (a one-carbon substrate), then the site
 * classes of sites.h for sp3 C-H. */
enum therm_site {
    THERM_METHYL, THERM_PRIMARY, THERM_SECONDARY, THERM_TERTIARY, THERM_BENZYLIC,
    THERM_ALLYLIC, THERM_NSITE
};

/* Where the bond enthalpies come from (one compilation), for the ledger's Assumptions. */
extern const char therm_bde_origin[];
/* Most containers one manifold takes for gas withdrawal before liquid withdrawal through
 * an evaporator is needed (common practice), and the origin of that figure. */
#define THERM_MAX_ON_MANIFOLD 3
extern const char therm_manifold_origin[];

/* Name of a site ("methyl", "primary", ...); "?" out of range. Static string. */
const char *therm_site_name(int site);

/* Name of a step row of reagent at site: the site name, "C=C" for HBr (one row). Static. */
const char *therm_step_name(int reagent, int site);

/* Heat of one step [kJ/mol, negative = exothermic] of reagent (enum reagent_id: Cl2, Br2,
 * SO2Cl2, NBS at a site; HBr adds across a C=C, site ignored) into *dh, with the sum of the
 * compilation's stated uncertainties of the terms into *unc (may be NULL). Returns 0, or -1
 * for a reagent or site without values (NBS at a non-allylic, non-benzylic site). */
int therm_step_dh(int reagent, int site, double *dh_kj_mol, double *unc_kj_mol);

/* Bond enthalpy at 298 K [kJ/mol] of a reagent bond (enum reagent_bond) into *d, its stated
 * uncertainty into *unc (may be NULL). Returns 0, or -1 out of range. */
int therm_bond_kj_mol(int bond, double *d, double *unc);

/* Stoessel criticality class (1..5) from the process temperature, MTSR, MTT and TD24 [C];
 * a tie counts as reached (the higher class). The reasoning in words goes into why (n bytes). */
int therm_class(double temp_c, double mtsr_c, double mtt_c, double td24_c, char *why, size_t n);

struct therm_in {
    int reagent;                 /* enum reagent_id */
    double share[THERM_NSITE];   /* share of the C-X bonds formed at each site (sum 1);
                                  * all 0: sites unknown (formula input), see therm_compute */
    double bonds_mol;            /* C-X bonds formed in the run (halogen reacted) [mol] */
    double mass_kg;              /* reaction mass: substrate + reagent + solvent [kg] */
    double cp_kj_kg_k;           /* heat capacity of that mass, > 0 */
    double accumulation;         /* fraction of the halogen present unreacted, 0..1 */
    double temp_c, feed_h, peak_factor;
    int has_mtt, has_td24;
    double mtt_c, td24_c;
};

struct therm_out {
    double step_dh_kj_mol[THERM_NSITE]; /* per site used (share > 0), else 0 */
    double share[THERM_NSITE];   /* the shares used */
    double dh_kj_mol;            /* share-weighted mean per C-X bond [kJ/mol, < 0 exothermic] */
    double dh_unc_kj_mol;        /* share-weighted sum of stated uncertainties */
    int site_assumed;            /* 1: no site classes given, a default site was taken */
    double heat_kj;              /* released by the run (-dh x bonds) [kJ] */
    double mean_kw, peak_kw;     /* over the feed time; times peak_factor */
    double delta_t_ad_k, mtsr_c; /* adiabatic rise of the mass; Tp + accumulation x rise (>= Tp) */
    int crit_class;              /* 1..5; 0 when mtt_c or td24_c is missing */
    int mtsr_over_mtt, mtsr_over_td24; /* MTSR reaches MTT / TD24 (when given) */
    int reason;                  /* enum therm_reason: what therm_reason_text says; kept as a
                                  * code so that a ledger of 10^5 runs holds no text per run */
};

/* What the class reasoning of a therm_out says: nothing (a zeroed result), the class with
 * its reasoning (MTT and TD24 given), or which of them is missing. */
enum therm_reason { THERM_REASON_NONE = 0, THERM_REASON_CLASSED, THERM_REASON_NO_BOTH,
                    THERM_REASON_NO_MTT, THERM_REASON_NO_TD24 };

/* The class reasoning of t in words into why (n bytes; "" for THERM_REASON_NONE), from the
 * process temperature, MTT and TD24 [C] that therm_compute was given. */
void therm_reason_text(const struct therm_out *t, double temp_c, double mtt_c, double td24_c,
                       char *why, size_t n);

/* Reaction heat, rise, MTSR and class of one run. Without site shares a substitution is
 * taken at a secondary C-H and NBS at a benzylic C-H (site_assumed = 1). Plain data out. */
void therm_compute(const struct therm_in *in, struct therm_out *out);

struct therm_withdrawal {
    double kg_h;                 /* gas demand at the peak: charged / feed_h x peak_factor */
    double container_kg_h;       /* continuous rate of one container without icing */
    int containers_on_line;      /* ceil(kg_h / container_kg_h), at least 1; 0 when nothing is drawn */
    int evaporator_needed;       /* containers_on_line > THERM_MAX_ON_MANIFOLD */
};

/* Containers on line for a gas feed of charged_kg over feed_h hours with peak_factor, each
 * container giving container_kg_h (> 0). Plain data out. */
void therm_withdrawal(double charged_kg, double feed_h, double peak_factor,
                      double container_kg_h, struct therm_withdrawal *out);

#endif

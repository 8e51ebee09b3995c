/*
 * liquor.h - the scrubber data tables, one row per fact: formation enthalpies, salts formed
 * in a liquor, and the liquors themselves (what each does with every vent gas, the base it
 * uses, its strength limits and property tables).  Data only: scrubber.c computes with the
 * rows, the writers name the salts from them.  Sources beside each value in liquor.c.
 */
#ifndef LIQUOR_H
#define LIQUOR_H

#include "reagents.h" /* VS_COUNT */

/* Standard enthalpies of formation at 298.15 K, 1 bar (rows of liquor_dfh_get). */
enum liquor_dfh_id {
    DFH_H2O, DFH_HCL_G, DFH_HCL_AQ, DFH_HBR_G, DFH_CL2_G, DFH_BR2_G, DFH_SO2_G, DFH_NAOH_AQ,
    DFH_NACL_AQ, DFH_NABR_AQ, DFH_NAOCL_AQ, DFH_NAOBR_AQ, DFH_NA2SO3_AQ, DFH_NA2SO4_AQ,
    DFH_HBR_G_NBS, DFH_HBR_AQ, DFH_CO2_G, DFH_NA2CO3_AQ, DFH_COUNT
};
struct liquor_dfh { const char *species; double dfh_kj_mol; const char *source; };
/* Row i of the formation-enthalpy table, NULL out of range. Static data. */
const struct liquor_dfh *liquor_dfh_get(int i);

/* Salts / products in the liquor. */
enum scrub_salt { SALT_NACL, SALT_NABR, SALT_NAOCL, SALT_NAOBR, SALT_NA2SO3, SALT_NA2SO4, SALT_COUNT };

struct liquor_salt {
    const char *name;          /* formula as shown and as the JSON key ("NaOCl") */
    double molar_mass_g_mol;   /* CIAAW 2021 conventional weights (elements.h) */
    int dfh;                   /* enum liquor_dfh_id of the dissolved salt */
    /* Redox in the liquor, one to one (Na2SO3 + NaOX -> Na2SO4 + NaX): an oxidant names
     * the salt it is reduced to, a reductant the salt it is oxidised to (-1: neither).
     * Oxidants react in table order, the stronger first. */
    int reduced_to, oxidised_to;
};
/* Row of a salt; NULL out of range. Static data. */
const struct liquor_salt *liquor_salt_get(int salt);

/* Liquors; the order is that of enum camp_liquor (the campaign's "liquor" spellings). */
enum liquor_id { LQ_NAOH, LQ_WATER, LQ_SODA_ASH, LQ_COUNT };

/* What a liquor does with a vent gas. */
enum liquor_uptake {
    LQ_PASSES,    /* not absorbed: leaves with the stack gas (removal 0) */
    LQ_REACTS,    /* neutralised by the base: salts and water formed, base used */
    LQ_DISSOLVES  /* absorbed as an acid solution, up to a changeout strength */
};

#define LQ_MAX_SALTS 3 /* products a reacting gas may form in the liquor, besides water */

struct liquor_gas {
    int uptake;                /* enum liquor_uptake */
    double base_mol;           /* LQ_REACTS: base used per mol of gas */
    int salt[LQ_MAX_SALTS];    /* LQ_REACTS: salts formed (-1: none) */
    double salt_mol[LQ_MAX_SALTS]; /* per mol of gas */
    double water_mol;          /* LQ_REACTS: water formed per mol of gas */
    double co2_mol;            /* LQ_REACTS: CO2 given off per mol of gas (a carbonate base); it
                                * leaves the liquor as gas, up the stack with the vent gas */
    int dfh_gas, dfh_taken;    /* formation enthalpies: the gas, and (LQ_DISSOLVES) its
                                * solution; the heats follow from these rows (the changeout
                                * strength of a dissolved gas is the unit's, from the campaign) */
    double removal;            /* removal credited without column data or a given value */
    const char *removal_origin;
};

/* Composition of a liquor, mass percent of the whole: its base and each dissolved gas. */
struct liquor_comp { double base_wt_pct; double gas_wt_pct[VS_COUNT]; };

/* Which campaign keys give a liquor's base strengths (fresh, minimum, make-up; the reader
 * takes these and refuses the other spellings, campaign.h). */
enum liquor_keys {
    LQ_KEYS_NONE,  /* no base: none of them */
    LQ_KEYS_NAOH,  /* naoh_wt_pct, min_naoh_wt_pct, makeup_naoh_wt_pct (they name NaOH) */
    LQ_KEYS_BASE   /* base_wt_pct, min_base_wt_pct, makeup_base_wt_pct (any other base) */
};

struct liquor_info {
    const char *name;          /* campaign spelling ("naoh") */
    int base;                  /* enum reagent_id of the base (bought as make-up), -1: none */
    int dfh_base;              /* enum liquor_dfh_id of the dissolved base, -1: none */
    int keys;                  /* enum liquor_keys */
    double max_base_wt_pct;    /* strongest fresh liquor the reader takes [wt% base]: the end of
                                * the property tables, or under the base's solubility */
    const char *max_base_why;  /* why (the reader's message), NULL: the tables end there */
    const char *unit_noun;     /* "caustic scrubber" (messages: "a liquor under 0.1 wt% NaOH
                                * is no caustic scrubber") */
    const char *makeup_noun;   /* what is bought ("caustic", "soda ash") */
    struct liquor_gas gas[VS_COUNT];
    /* Property tables at a composition (sources in liquor.c): heat capacity [kJ/(kg K)],
     * boiling point at 1 atm [C], density [kg/m3] and viscosity [mPa s] of the fresh liquor
     * (the column check). */
    double (*cp_kj_kg_k)(const struct liquor_comp *c);
    double (*boiling_point_c)(const struct liquor_comp *c);
    double (*density_kg_m3)(const struct liquor_comp *c);
    double (*viscosity_mpa_s)(const struct liquor_comp *c);
    const char *bp_basis;      /* what the boiling point is judged on (warning text) */
};

/* Row of a liquor; NULL out of range. Static data. */
const struct liquor_info *liquor_get(int liquor);
/* Does the liquor take some gas by uptake u (enum liquor_uptake)? 0 for a bad liquor id. */
int liquor_has(int liquor, int uptake);

/* Water at 20 C [kg/m3] (the density ratio of the flooding correlation). */
#define LIQUOR_RHO_WATER_KG_M3 998.20

/* ---- property tables (linear interpolation, clamped at the ends) ---- */
/* Density [kg/m3] of hydrochloric acid at 20 C and a HCl mass percent 0..40 (clamped). */
double liquor_hcl_acid_density_kg_m3(double hcl_wt_pct);
/* Density [kg/m3] of caustic soda solution at 20 C and a NaOH mass percent 0..50 (clamped). */
double liquor_naoh_density_kg_m3(double naoh_wt_pct);
/* Heat capacity [kJ/(kg K)] of caustic soda solution at a NaOH mass percent 0..50. */
double liquor_naoh_cp_kj_kg_k(double naoh_wt_pct);
/* Heat capacity [kJ/(kg K)] of hydrochloric acid at a HCl mass percent 0..40 (clamped). */
double liquor_hcl_acid_cp_kj_kg_k(double hcl_wt_pct);
/* Density [kg/m3] of hydrobromic acid at 20 C and a HBr mass percent 0..60 (clamped). */
double liquor_hbr_acid_density_kg_m3(double hbr_wt_pct);
/* Density [kg/m3] of a water liquor holding both acids (additive increments over water). */
double liquor_acid_density_kg_m3(double hcl_wt_pct, double hbr_wt_pct);
/* Heat capacity [kJ/(kg K)] of a water liquor holding HCl and HBr (mass percents; see .c). */
double liquor_acid_cp_kj_kg_k(double hcl_wt_pct, double hbr_wt_pct);
/* Boiling point at 1 atm [C] of caustic soda solution at a NaOH mass percent 0..50. */
double liquor_naoh_boiling_point_c(double naoh_wt_pct);

#endif

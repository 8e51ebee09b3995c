/*
 * reagents.h - the reagent table and the vent/by-product species.
 *
 * One row per reagent holds everything the models need (molar mass,
 * stoichiometry per mole of halogen transferred, what the unreacted part
 * does, phase) so that adding a reagent is one table entry in reagents.c.
 * The caution table (exposure limits with source and year, hazards,
 * incompatibilities, PPE) sits beside it, one row per substance.
 */
#ifndef REAGENTS_H
#define REAGENTS_H

#include <stddef.h>

enum reagent_id {
    RG_CL2, RG_BR2, RG_SO2CL2, RG_NBS, RG_HBR,
    /* from here on the bases of the scrubber liquors (RK_BASE): their make-up is ordered and
     * stocked, never charged to a reactor */
    RG_NAOH,   /* caustic soda */
    RG_NA2CO3, /* soda ash */
    RG_COUNT
};
#define RG_CHARGEABLE RG_NAOH /* ids below this can be a run's reagent; the rest are bases */

enum reagent_kind {
    RK_SUBSTITUTION, /* RH + X-Y -> RX + HY (Cl2, Br2, SO2Cl2) */
    RK_NBS,          /* allylic/benzylic RH + NBS -> RBr + succinimide */
    RK_ADDITION,     /* radical anti-Markovnikov C=C + HBr -> RBr */
    RK_BASE          /* a scrubber liquor's base: bought as make-up, never charged */
};

/* Vent species (gas sent to the scrubber). */
enum vent_species { VS_HCL, VS_HBR, VS_CL2, VS_BR2, VS_SO2, VS_COUNT };

/* Bonds whose enthalpies the reaction-heat screen uses for a reagent (values and sources in
 * thermal.c, one row each): the bond broken to free the halogen atom (or the H-X added)
 * and the bond the abstracted H forms. */
enum reagent_bond {
    RB_NONE = -1, RB_CLCL, RB_BRBR, RB_HCL, RB_HBR, RB_SO2CL2, RB_NBR, RB_NH, RB_COUNT
};

/* Site classes a reagent attacks: bit c is enum site_class c of sites.h (primary,
 * secondary, tertiary, benzylic, allylic), checked there by a static assertion. */
#define RG_SITE(c) (1u << (c))
#define RG_SITES_SP3 0x1fu        /* primary .. allylic: every sp3 C-H class */
#define RG_SITES_ALLYL_BENZYL 0x18u /* benzylic and allylic only */

/* Caution rows. */
enum caution_id {
    CA_CL2, CA_BR2, CA_HCL, CA_HBR, CA_SO2, CA_SO2CL2, CA_NBS, CA_NAOCL, CA_NAOH, CA_NA2CO3,
    CA_COUNT
};

struct reagent_info {
    const char *name;        /* campaign spelling: "Cl2" */
    const char *formula;     /* Hill formula text, parsed by formula.h */
    const char *long_name;   /* "chlorine" */
    double molar_mass_g_mol; /* from CIAAW 2021 weights (checked by a test) */
    enum reagent_kind kind;
    int halogen_el;          /* EL_Cl or EL_Br: the atom put on carbon; -1 for a base */
    /* per mole of reagent reacted: */
    double hx_mol;           /* HCl or HBr formed (1 for X2/SO2Cl2, 0 for NBS/HBr) */
    int hx_species;          /* VS_HCL / VS_HBR, or -1 */
    double so2_mol;          /* 1 for SO2Cl2 */
    double succinimide_mol;  /* 1 for NBS */
    /* unreacted reagent: */
    int unreacted_vent;      /* vent species it leaves as, -1 = stays in the reaction mass */
    const char *phase;       /* "gas (liquefied)", "liquid", "solid" */
    int caution;             /* enum caution_id of the reagent itself */
    /* site selectivity (selectivity.c): */
    unsigned sites;          /* RG_SITES_*: classes it substitutes (0 for an addition) */
    int carrier_el;          /* EL_Cl / EL_Br: the atom abstracting H, whose per-H
                              * reactivities apply (selectivity.c); -1 for an addition */
    const char *sel_origin;  /* NULL: the carrier's published values as they are; else why
                              * the carrier's values stand for this reagent (Assumptions) */
    int methane_ratios;      /* 1: the published Cl + CH4 .. CHCl3 rate ratios apply */
    /* reaction heat (thermal.c): */
    int bond_x, bond_h;      /* enum reagent_bond; bond_h RB_NONE for an addition */
    /* hazards the ledger warns of: */
    int toxic_gas;           /* a stock shortfall may be a leak (and reportable) */
    double hot_vent_c;       /* unreacted reagent kept in the mass boils about here and may
                              * vent (0: no such warning) */
    const char *hot_vent_note; /* what it then does in the liquor (the warning's text) */
};

/* Row of a reagent; NULL when id is out of range. Static data. */
const struct reagent_info *reagent_get(int id);
/* Reagent id from its campaign spelling (case-sensitive), -1 if unknown. */
int reagent_lookup(const char *name);

/* One row per vent species (gas sent to the scrubber).  name is also the public JSON key
 * of the species (design section 5: extend, never rename; its amount key "HCl_mol" is the
 * column list's, ltable.c). */
struct vent_info {
    const char *name;        /* "HCl" */
    const char *formula;     /* Hill formula text ("ClH"), parsed by formula.h */
    double molar_mass_g_mol; /* CIAAW 2021 conventional weights (elements.h) */
    int caution;             /* enum caution_id */
    int acid_gas;            /* an acid gas in the glossary's sense (HCl, HBr) */
    int retained;            /* dissolves in the reaction mass: vent_retained_fraction applies */
};
/* Row of a vent species; NULL out of range. Static data. */
const struct vent_info *vent_get(int vs);

/* Vent species: name ("HCl"), formula text, molar mass [g/mol], caution id.
 * Out of range: NULL, 0.0 and -1. */
const char *vent_name(int vs);
const char *vent_formula(int vs); /* Hill formula text ("ClH"), parsed by formula.h */
double vent_molar_mass_g_mol(int vs);
int vent_caution(int vs);

struct exposure_limit {
    const char *kind;   /* "NIOSH REL", "OSHA PEL", "IDLH", "ACGIH TLV" */
    const char *value;  /* "C 0.5 ppm (1.45 mg/m3)" */
    const char *source; /* "NIOSH Pocket Guide to Chemical Hazards, 2007" */
};

struct caution_info {
    const char *substance;  /* "Chlorine (Cl2)" */
    const char *cas;        /* "7782-50-5" */
    struct exposure_limit limits[4];
    int nlimits;
    const char *hazards;
    const char *incompatible;
    const char *ppe;
    const char *short_form; /* one line for `check` output */
};

/* Caution row of a substance; NULL when out of range. Static data. */
const struct caution_info *caution_get(int ca);
/* The deferral printed under every caution list (SDS, local regulations, licensed review). */
const char *caution_deferral(void);
/* Cautions on the ledger's own estimates (stack emissions, reaction heat), shown with every
 * ledger: topic and text of row i in [0, caution_estimate_count()); NULL out of range. Static. */
int caution_estimate_count(void);
const char *caution_estimate_topic(int i);
const char *caution_estimate_text(int i);

#endif

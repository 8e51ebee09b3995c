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
    RG_NAOH, /* caustic make-up: ordered and stocked, never charged to a reactor */
    RG_COUNT
};
#define RG_CHARGEABLE RG_NAOH /* ids below this can be a run's reagent */

enum reagent_kind {
    RK_SUBSTITUTION, /* RH + X-Y -> RX + HY (Cl2, Br2, SO2Cl2) */
    RK_NBS,          /* allylic/benzylic RH + NBS -> RBr + succinimide */
    RK_ADDITION,     /* radical anti-Markovnikov C=C + HBr -> RBr */
    RK_CAUSTIC
};

/* Vent species (gas sent to the scrubber). */
enum vent_species { VS_HCL, VS_HBR, VS_CL2, VS_BR2, VS_SO2, VS_COUNT };

/* Caution rows. */
enum caution_id {
    CA_CL2, CA_BR2, CA_HCL, CA_HBR, CA_SO2, CA_SO2CL2, CA_NBS, CA_NAOCL, CA_NAOH,
    CA_COUNT
};

struct reagent_info {
    const char *name;        /* campaign spelling: "Cl2" */
    const char *formula;     /* Hill formula text, parsed by formula.h */
    const char *long_name;   /* "chlorine" */
    double molar_mass_g_mol; /* from CIAAW 2021 weights (checked by a test) */
    enum reagent_kind kind;
    int halogen_el;          /* EL_Cl or EL_Br: the atom put on carbon; -1 for NaOH */
    /* per mole of reagent reacted: */
    double hx_mol;           /* HCl or HBr formed (1 for X2/SO2Cl2, 0 for NBS/HBr) */
    int hx_species;          /* VS_HCL / VS_HBR, or -1 */
    double so2_mol;          /* 1 for SO2Cl2 */
    double succinimide_mol;  /* 1 for NBS */
    /* unreacted reagent: */
    int unreacted_vent;      /* vent species it leaves as, -1 = stays in the reaction mass */
    const char *phase;       /* "gas (liquefied)", "liquid", "solid" */
    int caution;             /* enum caution_id of the reagent itself */
};

/* Row of a reagent; NULL when id is out of range. Static data. */
const struct reagent_info *reagent_get(int id);
/* Reagent id from its campaign spelling (case-sensitive), -1 if unknown. */
int reagent_lookup(const char *name);

/* One row per vent species (gas sent to the scrubber).  name is also the public JSON key
 * of the species (design section 5: extend, never rename) and mol_key its amount key. */
struct vent_info {
    const char *name;        /* "HCl" */
    const char *formula;     /* Hill formula text ("ClH"), parsed by formula.h */
    double molar_mass_g_mol; /* CIAAW 2021 conventional weights (elements.h) */
    int caution;             /* enum caution_id */
    const char *mol_key;     /* "HCl_mol" (runs[].vent) */
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

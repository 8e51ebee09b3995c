/*
 * scrubber.h - vent scrubber liquor, heat, hourly load and column check.
 *
 * What each liquor does with each vent gas (reacts with its base, dissolves, passes), the
 * salts, heats and property tables are rows of liquor.c (liquor.h); this model only reads
 * them.  Caustic liquor (design section 4):
 *   HCl + NaOH -> NaCl + H2O          HBr + NaOH -> NaBr + H2O
 *   Cl2 + 2 NaOH -> NaCl + NaOCl + H2O Br2 + 2 NaOH -> NaBr + NaOBr + H2O
 *   SO2 + 2 NaOH -> Na2SO3 + H2O
 * and in the liquor, sulfite never coexists with hypohalite (stronger oxidant first):
 *   Na2SO3 + NaOCl -> Na2SO4 + NaCl    Na2SO3 + NaOBr -> Na2SO4 + NaBr
 * Heats from standard enthalpies of formation (NBS tables, liquor.c).
 * Runs are processed in start order; each scrubber's liquor is tracked run by
 * run with changeouts, and its acid-gas load is binned hour by hour with a sparse
 * difference array (one sort of four entries per run), so the cost is n log n in runs
 * plus the hours with load, and the memory follows the loaded hours, not the span.  The instantaneous
 * peak comes from one sweep over sorted start/end events (n log n).
 */
#ifndef SCRUBBER_H
#define SCRUBBER_H

#include <stdint.h>
#include "hlerr.h"
#include "liquor.h"
#include "reagents.h"

struct scrub_unit_in {
    const char *id;
    int liquor;                 /* enum liquor_id: its row says what it does with each gas */
    /* the base of a liquor that has one (its row's base, NaOH for caustic) [wt% of the liquor]:
     * fresh strength and the least before a changeout */
    double base_wt_pct, liquor_kg, min_base_wt_pct;
    double max_gas_wt_pct[VS_COUNT]; /* changeout strength [wt%, > 0] of each gas the liquor
                                 * dissolves (water: HCl, HBr); with several acids, changeout
                                 * before the sum of strength / limit passes 1 */
    double rated_acid_kmol_h, makeup_base_wt_pct; /* strength of the base bought, >= base_wt_pct */
    double liquor_cp_kj_kg_k;   /* used where liquor_cp_given, else the built-in tables */
    int liquor_cp_given;
    int has_column;
    double packing_factor_1_m, htu_m, removal_fraction, flood_fraction;
    double carrier_kmol_h, liquor_kg_h, gas_temp_c;
    /* every value as given (the campaign reader fills the defaults; none is taken here): */
    double fresh_liquor_temp_c; /* liquor at the first fill and every fresh charge */
    double max_liquor_temp_c;   /* hottest liquor allowed (caustic: hypochlorite turns to
                                 * chlorate and absorbs Cl2 worse above it) */
    /* What the unit removes of each vent species (emissions): removal[v] where bit
     * (1u << v) of removal_given is set, else from the column's transfer units (has_column),
     * else scrub_removal_default.  Fractions 0..1. */
    double removal[VS_COUNT];
    unsigned removal_given;
};

struct scrub_run_in {
    int unit;                   /* index into units, -1 = not scrubbed */
    int64_t start_min;
    double feed_h, peak_factor; /* vent leaves at peak_factor x mean rate over feed_h */
    double vent_mol[VS_COUNT];  /* gas sent to the scrubber [mol] */
};

struct scrub_run_out {
    double acid_kmol_h;         /* (HCl+HBr+Cl2+Br2+SO2) vented / feed_h x peak_factor [kmol/h] */
    double base_kg;             /* the liquor's base consumed, as 100 % */
    double co2_kg;              /* CO2 given off by the liquor (a carbonate base): up the stack */
    double naoh_kg;             /* NaOH consumed, as 100 %: base_kg where the base is NaOH, else 0
                                 * (the public NaOH figures, design section 5) */
    double heat_kj;             /* heat released in the liquor (positive = released) */
    double temp_rise_k;         /* adiabatic rise of the liquor */
    int changeout_before;       /* fresh liquor charged before this run */
    int exhausted;              /* liquor would run out during the run (warning) */
    double base_left_kg, liquor_kg_after, base_wt_pct_after; /* the base, as 100 % */
    double naoh_left_kg, naoh_wt_pct_after; /* the same where the base is NaOH, else 0 */
    double salt_kg[SALT_COUNT];
    double water_formed_kg;
    double acid_wt_pct_after;   /* water liquor: HCl + HBr wt% after the run */
    double hbr_wt_pct_after;    /* water liquor: HBr wt% after the run */
    int unabsorbed;             /* water liquor: Cl2, Br2, SO2 passed through (warning) */
    double unabsorbed_mol;      /* that gas [mol] */
    double breakthrough_mol;    /* caustic ran out: gas left unneutralised [mol] */
    /* salt_kg is the net change of each salt in the liquor during the run: with the
     * sulfite/hypohalite reaction a salt already in the liquor can be used up (< 0). */
    double liquor_temp_c_after; /* adiabatic liquor temperature after the run: heat piles up
                                 * within a group of overlapping runs, the idle unit is back
                                 * at fresh_liquor_temp_c before the next group; no cooler is
                                 * modelled, so past about 100 C it only says the heat
                                 * would boil the liquor [C] */
    double heat_kw;             /* heat_kj / vent window (feed_h / peak_factor) [kW] */
    int too_hot;                /* liquor_temp_c_after > max_liquor_temp_c: cooling needed */
    double boiling_point_c;     /* of the liquor after the run at 1 atm: caustic, that of NaOH
                                 * solution at naoh_wt_pct_after; water liquor 100 C [C] */
    int boils;                  /* liquor_temp_c_after >= boiling_point_c (alarm) */
    double sulfite_oxidised_mol; /* Na2SO3 turned to Na2SO4 by hypohalite in this run [mol] */
    /* What leaves the stack [kg]: of the part of vent_mol the liquor can still take
     * (caustic: until its NaOH is used up; water: HCl and HBr up to its changeout
     * strength), 1 - removal; all of the rest (breakthrough). */
    double emis_kg[VS_COUNT];
    double emis_breakthrough_kg;  /* of emis_kg, what the liquor could no longer take [kg] */
};

/* Origin of a removal fraction in force. */
enum scrub_removal_origin { SCRUB_REM_GIVEN, SCRUB_REM_COLUMN, SCRUB_REM_DEFAULT, SCRUB_REM_NONE };

/* One species' emissions from one unit: hour by hour on the load profile's hours
 * (same hour0_min and nhours), only the hours with emission kept (hourly_hour ascending). */
struct scrub_emis {
    double kg;                  /* over the campaign */
    double peak_kg_h;           /* highest clock-hour mean [kg/h]; 0 when nothing leaves */
    int64_t peak_at_min;        /* start of that hour (earliest on a tie) */
    double *hourly_kg_h; int *hourly_hour; int nhourly; /* owned */
};

/* One liquor batch sent to waste (at a changeout, and the last one at campaign end). */
struct scrub_spent {
    int64_t at_min;             /* when it was drained (start of the next run, or last run end) */
    double mass_kg, base_kg, water_kg, hcl_kg, hbr_kg, salt_kg[SALT_COUNT];
    double naoh_kg;             /* base_kg where the base is NaOH, else 0 */
    int final;                  /* 1 = still in the unit at the end of the campaign */
};

struct scrub_column_check {
    int present;
    double gas_kmol_h, y_in, y_out, ntu, height_m, diameter_m, flood_velocity_m_s;
    double flow_parameter;      /* (L/G) sqrt(rho_g/rho_l) */
    double gas_density_kg_m3, liquid_density_kg_m3, design_velocity_m_s;
    int outside_fit;            /* flow parameter outside the fit range 0.01..10 (clamped) */
};

struct scrub_unit_out {
    double peak_acid_kmol_h;    /* highest clock-hour mean load [kmol/h] */
    int64_t peak_at_min;        /* start of the peak hour */
    int *peak_runs; int npeak_runs; /* run indices active in the peak hour, owned */
    int overloaded;             /* peak_instant_kmol_h > rated_acid_kmol_h (a rating is an
                                 * instantaneous limit); 0 when no rating is given */
    double peak_instant_kmol_h; /* highest sum of the rates of runs venting at once [kmol/h] */
    int64_t peak_instant_at_min; /* when it begins (earliest on a tie) */
    int *peak_instant_runs; int npeak_instant_runs; /* run indices venting then, owned */
    double peak_heat_kw;        /* highest sum of the heat-release rates (heat_kw) of runs
                                 * venting at once: the duty a cooler would need [kW] */
    int64_t peak_heat_at_min;   /* when it begins (earliest on a tie) */
    int *peak_heat_runs; int npeak_heat_runs; /* run indices venting then, owned */
    double max_liquor_temp_c;   /* hottest adiabatic liquor temperature of the campaign [C] */
    int too_hot_runs;           /* runs with too_hot set */
    int boiling_runs;           /* runs with boils set */
    int changeouts;
    double base_kg;             /* the base consumed over the campaign, as 100 % */
    double co2_kg;              /* CO2 given off over the campaign */
    double naoh_kg;             /* base_kg where the base is NaOH, else 0 */
    double makeup_kg;           /* base bought for the changeouts [kg as bought, at makeup_base_wt_pct] */
    double heat_kj;
    /* Load profile over hours 0 .. nhours-1 from hour0_min, read with scrub_hourly_kmol_h.
     * scrub_campaign keeps only the hours with load: hourly_kmol_h[k] is hour
     * hourly_hour[k] (ascending, nhourly entries); every other hour is 0.  With
     * hourly_hour NULL, hourly_kmol_h holds all nhours hours (dense).  Both owned. */
    int64_t hour0_min; int nhours;
    double *hourly_kmol_h; int *hourly_hour; int nhourly;
    struct scrub_spent *spent; int nspent;                /* owned */
    struct scrub_column_check column;
    double removal[VS_COUNT];   /* the removal fractions in force */
    int removal_origin[VS_COUNT]; /* enum scrub_removal_origin */
    struct scrub_emis emis[VS_COUNT]; /* what leaves the stack, per vent species */
};

/* Heat released per mole of gas absorbed [kJ/mol] (positive) in a liquor (enum liquor_id),
 * from the formation enthalpies of its row; 0 for a gas it passes. */
double scrub_heat_kj_per_mol(int vent_species, int liquor);
/* NaOH consumed per mole of gas in the caustic liquor [mol/mol] (the public NaOH plan figure). */
double scrub_naoh_per_mol(int vent_species);

/* Run the whole campaign. order[0..nruns-1] lists run indices by start time.
 * A vent window is [start, start + feed_h / peak_factor); a window ending at the very
 * minute another starts does not overlap it.  Runs on a unit whose windows chain into
 * each other form a group: the changeout decision is taken at the group's first run
 * with the group's total NaOH need (the unit is never idle inside a group); a run that
 * even then takes the liquor past its limit is flagged exhausted.  The packed-column
 * check uses the instantaneous peak (flooding is an instantaneous limit).
 * run_out[nruns] and unit_out[nunits] are filled; free unit_out with
 * scrub_unit_out_free. Errors only for allocation or bad arguments.
 * Every input is used as given (no defaults here: the campaign reader sets them); a
 * peak_factor, makeup or water-liquor limit that is not > 0 is HL_ERR_INPUT. A changeout needs the unit idle (no run still venting
 * into it); the first fill is in place already (makeup_kg counts changeouts only).
 * A unit with no runs gets no profile and no spent batch (its liquor is unused). */
enum hl_status scrub_campaign(const struct scrub_unit_in *units, int nunits,
                              const struct scrub_run_in *runs, int nruns, const int *order,
                              struct scrub_run_out *run_out, struct scrub_unit_out *unit_out,
                              struct hl_err *e);

/* One fresh charge of liquor_kg made up from the base bought (issue 15.4): make-up bought =
 * liquor_kg x base_wt_pct / makeup_base_wt_pct [kg as bought], dilution water = liquor_kg -
 * make-up [kg]. A liquor without a base (water): all liquor_kg is water.
 * makeup_base_wt_pct must be > 0 for a liquor with a base (no default is taken). */
void scrub_fresh_charge(double liquor_kg, double base_wt_pct, double makeup_base_wt_pct,
                        int liquor, double *makeup_kg, double *water_kg);

/* Heat released [kJ] per mol Na2SO3 oxidised in the liquor by SALT_NAOCL or
 * SALT_NAOBR (Na2SO3 + NaOX -> Na2SO4 + NaX); 0 for any other salt. */
double scrub_sulfite_redox_kj_per_mol(int hypohalite_salt);

/* NTU for a fast irreversible reaction under gas-film control: ln(y_in/y_out). */
double scrub_ntu(double y_in, double y_out);

/* Mean load [kmol/h] of hour h (0 .. nhours-1) of a unit's profile, sparse or dense;
 * 0 outside it.  O(log nhourly). */
double scrub_hourly_kmol_h(const struct scrub_unit_out *u, int h);

/* Mean emission [kg/h] of species vs in hour h of a unit's profile; 0 where none. O(log n). */
double scrub_hourly_emis_kg_h(const struct scrub_unit_out *u, int vs, int h);

/* Default removal fraction of a vent species for a liquor (enum liquor_id) without column
 * data or a given value, and its origin text (static, from the liquor row). 0 for what the
 * liquor passes (Cl2, Br2, SO2 on water). */
double scrub_removal_default(int vs, int liquor, const char **origin);

/* Fraction removed by a column of ntu gas-phase transfer units, fast irreversible reaction
 * under gas-film control (no back-pressure): 1 - exp(-ntu). */
double scrub_removal_from_ntu(double ntu);

/* End of a run's vent window [min since 1970], start + feed_h / peak_factor, whole minutes
 * snapped (the rule the scrubber's peaks use). */
double scrub_vent_end_min(const struct scrub_run_in *r);

/* Free what scrub_campaign allocated in unit_out[0..nunits-1] and zero it. */
void scrub_unit_out_free(struct scrub_unit_out *u, int nunits);

/* ---- correlations (the liquor property tables are in liquor.h) ---- */

/* Generalized pressure-drop correlation flooding ordinate Y at flow parameter X (see .c). */
double scrub_gpdc_flood_y(double flow_parameter);

#endif

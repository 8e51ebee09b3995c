/*
 * ledger.h - the whole campaign's numbers, ready for the writers.
 *
 * ledger_build() runs every model in order (balance per run, then scrubbers
 * in start order, then orders) and gathers per-run rows, monthly totals,
 * orders, scrubber summaries, warnings, assumptions and the cautions that
 * apply.  The ledger owns copies of every string it shows, so writers need
 * nothing but this header; they only format.
 */
#ifndef LEDGER_H
#define LEDGER_H

#include <stdint.h>
#include "balance.h"
#include "emissions.h"
struct campaign; /* campaign.h: only ledger_build reads it; writers never see it */
#include "orders.h"
#include "reagents.h"
#include "scrubber.h"
#include "thermal.h"

/* What happened to a run (the campaign's runs[].actual): status and the figures given. */
enum ledger_status { LEDGER_PLANNED = 0, LEDGER_DONE, LEDGER_CANCELLED };
enum ledger_actual_bit { LEDGER_ACT_REAGENT = 1u, LEDGER_ACT_PRODUCT = 2u, LEDGER_ACT_NAOH = 4u,
                         LEDGER_ACT_END = 8u };
struct ledger_actual {
    int status;                          /* enum ledger_status */
    unsigned given;                      /* enum ledger_actual_bit */
    double reagent_kg, product_kg, naoh_kg; /* drawn, isolated (as 100 %), consumed (as 100 %) */
    int64_t end_min;
};

/* Plan against actual of a done run (runs[].variance). The plan side comes from the balance
 * of the run as planned; each difference is actual - plan, in kg and in per cent of the plan,
 * present only where the actual gives the figure (has_*). */
struct ledger_variance {
    double reagent_kg_plan, product_kg_plan, naoh_kg_plan, yield_pct_plan;
    int has_reagent, has_product, has_naoh;
    double reagent_kg, reagent_pct, product_kg, product_pct, naoh_kg, naoh_pct;
    int naoh_pct_defined;                /* 0: nothing planned to the caustic */
    double yield_pct_actual;             /* has_product: mol wanted isolated per mol substrate x 100 */
    int flagged;                         /* reagent or product outside its tolerance */
};

/* A run's balance as the ledger keeps it: struct bal_out (balance.h, same names and
 * meanings) less what only the build needs (the warning text, which goes to warnings[], and
 * the selectivity detail), so that 10^5 runs stay small. products (sized to the rows
 * listed) and products[].smiles are the ledger's (ledger.strings), not the run's. */
/* A product row as the ledger keeps it: struct bal_product (balance.h, same names and
 * meanings) with its texts as the ledger's shared strings (56 bytes instead of 120). */
struct ledger_product {
    char *smiles;                /* NULL when no unambiguous structure */
    char *formula;               /* never NULL */
    int degree;
    enum bal_role role;
    double molar_mass_g_mol, mol, kg, mol_fraction;
};

struct ledger_bal {
    char *substrate_formula;             /* a shared string, never NULL */
    double substrate_molar_mass_g_mol, substrate_mol;
    double reagent_mol, reagent_kg;
    double reagent_reacted_mol, reagent_unreacted_mol;
    double halogen_reacted_mol;
    int capped;
    int isomers_resolved;
    double mean_degree;
    struct ledger_product *products; int nproducts;
    double hx_kg[2];
    double so2_kg, succinimide_kg;
    double vent_mol[VS_COUNT];
    double retained_mol[VS_COUNT];
    double reagent_left_kg;
    double wanted_kg, isomer_kg, overhal_kg, unreacted_substrate_kg;
    double wanted_mol, converted_mol;
    double halogen_charged_mol, halogen_in_wanted_mol;
    double yield_pct, conversion_pct, selectivity_pct;
    int selectivity_defined;
    double halogen_efficiency_pct;
    double el_in_mol[BAL_NEL], el_out_mol[BAL_NEL];
    double max_rel_error;
    char *warning;                       /* bal_out.warning (also in warnings[]): a shared
                                          * string, NULL when there is none */
};

struct ledger_run {
    char *id, *reactor, *scrubber, *substrate_name, *smiles; /* the ledger's shared strings
                                          * (ledger.strings); reactor/scrubber/name/smiles may be NULL */
    int scrubber_index;                  /* into ledger.scrubbers, -1 = none */
    int64_t start_min;
    double feed_h, temp_c, substrate_kg, peak_factor;
    int reagent;
    enum kin_mode mode;
    struct ledger_bal bal;               /* also yield, conversion, selectivity, halogen efficiency;
                                          * products: see ledger_build (reporting threshold) */
    struct scrub_run_out scrub;
    /* the fresh charge before this run (0 without changeout_before): the base bought at its
     * unit's makeup_base_wt_pct [kg as bought], of it what is caustic solution (a NaOH base;
     * else 0) [kg of solution], and dilution water [kg] */
    double changeout_makeup_kg, changeout_caustic_solution_kg, changeout_water_kg;
    int other_rows;                      /* products summed into the ROLE_OTHER row, 0 = none */
    double other_mean_degree;            /* mol-weighted mean degree of that row */
    /* reaction heat, adiabatic rise, MTSR, criticality class (thermal.h); the inputs used */
    struct therm_out therm;
    double therm_mass_kg, therm_cp_kj_kg_k, therm_accumulation;
    int has_mtt, has_td24; double mtt_c, td24_c;
    /* gas fed from containers (Cl2, HBr with a container rate known); withdrawal_container
     * a shared string, NULL when has_withdrawal is 0 */
    int has_withdrawal;
    struct therm_withdrawal withdrawal;
    char *withdrawal_container;
    /* The balance (bal) is that of the actual draw where a done run gives reagent_kg, all zero
     * for a cancelled run (nothing charged, drawn or vented), else the plan. */
    struct ledger_actual actual;
    struct ledger_variance *var;         /* status LEDGER_DONE only (also set, with the plan side
                                          * only, for a cancelled run); in the ledger's arena,
                                          * NULL while the run is planned (most runs) */
};

/* A stock count held against the book (stock_checks[]). The book starts from the previous
 * count of the reagent (else stock[].on_hand_kg, else 0) at since_min, adds the deliveries
 * received after it up to the count (on the count's time included) and takes off what the
 * runs starting from since_min to before the count drew (actual draw where known, else the
 * plan; a cancelled run nothing). */
struct ledger_stock_check {
    int reagent;
    int64_t date_min, since_min;         /* since_min: of the previous count (has_since) */
    int has_since;                       /* 0: the book starts at the start of the campaign */
    double start_kg, received_kg, drawn_kg, book_kg, counted_kg;
    double unexplained_kg;               /* book - counted: positive = missing */
    double unexplained_pct;              /* of drawn_kg; pct_defined 0 when nothing was drawn */
    int pct_defined;
    int flagged;                         /* outside the stock tolerance */
};

/* A month's close: runs by status, and plan against actual over the runs with an actual
 * (done or cancelled). Actual figures of a done run: the measured value where given, else the
 * model's (its draw at plan, the wanted product and NaOH of its balance); a cancelled run's 0. */
struct ledger_month_close {
    int done, cancelled, planned;
    int closed;                          /* every run of the month has an actual */
    double reagent_plan_kg[RG_COUNT], reagent_actual_kg[RG_COUNT];
    double product_plan_kg, product_actual_kg, naoh_plan_kg, naoh_actual_kg;
    double unexplained_kg[RG_COUNT];     /* of the stock checks dated in the month */
};

/* One month's figures for one route: runs with the same substrate, reagent and wanted
 * product (compared as text: SMILES, else formula). Sums are in moles, so the yields
 * are mole-weighted over the runs: 100 x sum wanted / sum substrate charged. */
struct ledger_month_product {
    char *substrate_name;                /* of the first run, owned, may be NULL */
    char *substrate;                     /* SMILES, else formula, owned */
    char *wanted;                        /* wanted product SMILES, else formula, owned */
    char wanted_formula[64];
    int reagent;
    int runs;
    double substrate_kg, substrate_mol, converted_mol, wanted_mol, wanted_kg;
    double halogen_charged_mol, halogen_in_wanted_mol;
    double yield_pct, conversion_pct, selectivity_pct, halogen_efficiency_pct;
    int selectivity_defined;             /* 0: nothing converted */
};

struct ledger_month {
    int month_index;                     /* isodate_month_index */
    int runs;
    double product_kg, isomer_kg, overhal_kg, unreacted_substrate_kg;
    double reagents_kg[RG_COUNT];        /* charged (a scrubber base: its make-up bought) */
    double vent_kg[VS_COUNT];
    double naoh_kg;                      /* consumed in scrubbers, as 100 % NaOH */
    double base_kg[RG_COUNT];            /* each scrubber base consumed, as 100 % (RK_BASE rows) */
    double co2_kg;                       /* CO2 the liquors gave off (up the stacks) */
    int changeouts;
    double spent_liquor_kg, succinimide_kg, reagent_left_kg, retained_acid_kg;
    /* Caustic for this month's changeouts: solution bought at each unit's makeup strength
     * [kg of solution], the NaOH in it [kg as 100 %], dilution water for the fresh charges [kg] */
    double caustic_solution_kg, caustic_solution_naoh_kg, dilution_water_kg;
    struct ledger_month_product *products; int nproducts; /* owned, in order of first run */
    struct ledger_month_close close;
};

struct ledger_scrubber {
    char *id;
    double rated_acid_kmol_h;
    int base;                            /* enum reagent_id of the liquor's base, -1: none */
    double makeup_base_wt_pct;           /* strength of the base bought [wt%]; 0 without a base */
    double changeout_makeup_kg;          /* base bought per fresh charge [kg as bought] */
    /* the same where the base is NaOH (the public caustic figures), else 0: */
    double makeup_naoh_wt_pct;           /* strength of the caustic bought [wt% NaOH] */
    double changeout_caustic_solution_kg; /* per fresh charge [kg of solution at makeup strength] */
    double caustic_solution_kg;          /* over all changeouts [kg of solution] */
    double changeout_water_kg;           /* dilution water per fresh charge [kg] */
    double dilution_water_kg;            /* over all changeouts [kg] (out.makeup_kg is the solution) */
    struct scrub_unit_out out;
};

struct ledger_warning { char *run; char *message; };            /* shared strings; run may be NULL */
struct ledger_assumption { char *what; int has_value; double value; char *unit; char *origin; }; /* has_value 0: text only */

struct ledger_strings; /* ledger.c: one arena for the texts of runs and warnings */

struct ledger {
    struct ledger_strings *strings;      /* owns the run, product and warning texts; repeated
                                          * ones (reactor, substrate, structures) are stored once */
    char *title, *site, *file;
    char **overrides; int noverrides;    /* --set KEY=VALUE the campaign was read with: a what-if */
    int64_t created_min;                 /* document time: issued date, SOURCE_DATE_EPOCH, or 0 */
    int64_t today_min;                   /* --today, -1 if not given */
    int paper_letter;                    /* campaign report.paper: 1 = US Letter, 0 = ISO A4 */
    double report_min_mol_fraction;      /* reporting threshold in force, 0 = every product listed */
    struct ledger_run *runs; int nruns;  /* sorted by start, then file order */
    struct ledger_month *months; int nmonths;
    struct ord_line *orders; int norders;
    struct ledger_scrubber *scrubbers; int nscrubbers;
    struct ledger_stock_check *stock_checks; int nstock_checks; /* by date, then reagent */
    double tol_reagent_pct, tol_product_pct, tol_stock_pct; /* the campaign's tolerances */
    struct ledger_warning *warnings; int nwarnings;
    struct ledger_assumption *assumptions; int nassumptions;
    unsigned cautions_mask;              /* bit enum caution_id set for every substance in play */
    /* what leaves the stacks (emissions.h): emis[nscrubbers], one check per permit limit */
    struct emis_unit *emis;
    struct emis_check *permit_checks; int npermit_checks;
    double caustic_order_wt_pct;         /* NaOH order lines are solution of this strength
                                          * [wt% NaOH]; 0 when no caustic is bought or the
                                          * units buy different strengths (warned) */
};

struct ledger_opts {
    int64_t today_min;                   /* -1 = none */
    int all_products;                    /* 1: list every product (--all-products) */
    int64_t created_min;                 /* -1 = derive (campaign issued date or SOURCE_DATE_EPOCH) */
};

/* Build the ledger of a validated campaign. Each run's over-halogenated products below
 * the reporting threshold are replaced by one ROLE_OTHER row (their mol, kg and
 * mol_fraction summed; degree = the lowest degree summed) at the end of bal.products;
 * every total and the element balance are taken before, over all products. An actual of a
 * done run starting after the day of o->today_min is HL_ERR_INPUT at its status. Model input
 * errors (a bad SMILES, NBS on a substrate without allylic H) come back as HL_ERR_INPUT
 * with e->line/col/field pointing into the campaign file. *out owned by the caller (ledger_free). */
enum hl_status ledger_build(const struct campaign *c, const struct ledger_opts *o,
                            struct ledger **out, struct hl_err *e);

/* As ledger_build, but frees the campaign's runs (camp_free_runs) as soon as the balances
 * are computed, so that runs and ledger do not both stand in memory through the scrubber,
 * order and month steps. c stays the caller's to free (camp_free), also on failure. */
enum hl_status ledger_build_consuming(struct campaign *c, const struct ledger_opts *o,
                                      struct ledger **out, struct hl_err *e);

/* Free a ledger and every string and table it owns; NULL is fine. */
void ledger_free(struct ledger *l);

/* Row label of a ROLE_OTHER product, "other over-halogenated (degree >= N)", into buf. */
void ledger_other_label(const struct ledger_product *p, char *buf, size_t n);

/* Text of a role ("wanted", "isomer", "overhalogenated", "unreacted", "other"). */
const char *ledger_role_name(enum bal_role r);

#endif

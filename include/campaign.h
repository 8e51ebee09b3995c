/*
 * campaign.h - the campaign file (design section 3) read into plain structs.
 *
 * The reader is strict: unknown keys (with the nearest known key suggested),
 * duplicate keys, wrong types, non-finite or out-of-range numbers, bad dates,
 * invalid UTF-8, duplicate ids, unknown scrubber or reagent references and an
 * amount given twice or not at all are refused with the JSON path of the value
 * and its line:column.  `repeat` entries are expanded here, so models see one
 * struct camp_run per batch.  Every position the models may still need to
 * blame (SMILES, formula, reagent) is kept in the run; a string's position is
 * that of its opening quote; camp_string_col() gives the column of character k
 * (1-based) of a SMILES, formula or product_smiles, escapes counted at their raw
 * length (without escapes it is pos_smiles.col + k).
 *
 * Required (R) keys, defaults (=) and accepted ranges.  The defaults are set in one place,
 * campaign.c (its "Defaults" section), before the keys are read: a campaign reaches the
 * models with every value filled in, and no model substitutes a default of its own.  The top level and each
 * scrubbers/stock/containers/runs entry may also carry a free-text "note".  Text is UTF-8 without control characters, at most
 * 32767 bytes (ids: 1..100 bytes).  Every quantity the models divide by or scale with has a
 * physical floor rather than 0 (the message says why), so no result overflows to inf.
 *  top:       format R = "haloledger-campaign/1"; title, site; issued (ISO date);
 *             model; scrubbers[], stock[], containers[] (may be empty); runs[] R, non-empty;
 *             report {paper "A4"|"Letter" = A4; min_mol_fraction [0,1) = 1e-4: over-halogenated
 *             products below it are summed into one "other" row per run} (layout of the
 *             ledgers only: every total is computed from all products).
 *  scrubbers: id R (unique); liquor: a liquor row's spelling (liquor.h: "naoh", "water",
 *             "soda_ash") = naoh; liquor_kg [1, 1e9) R; the base strengths, spelled as the
 *             liquor's row says (enum liquor_keys; the other spelling is refused):
 *             naoh_wt_pct | base_wt_pct [0.1, the row's max_base_wt_pct] R with a base;
 *             min_naoh_wt_pct | min_base_wt_pct [0, fresh strength) = 2;
 *             makeup_naoh_wt_pct (0,100] = 50 | makeup_base_wt_pct (0,100] = 100, each >=
 *             the fresh strength; max_acid_wt_pct [0.1,60] = 20 (a liquor that dissolves HCl:
 *             water); rated_acid_kmol_h [1e-3,1e6] R; liquor_cp_kj_kg_k [0.5,10]
 *             (absent: the built-in tables, liquor_cp_given 0); fresh_liquor_temp_c [-20,80] = 25;
 *             max_liquor_temp_c (0,150] = 40; column {packing_factor_1_m [1,1e4] R, htu_m [0.01,20] R,
 *             removal_fraction [0.01,1) R, flood_fraction [0.1,1) = 0.7, carrier_kmol_h [1e-3,1e6] R,
 *             liquor_kg_h [1, 1e9) R, gas_temp_c [-40,200] = 25};
 *             stack_nm3_h [0.1, 1e9] (absent: no concentrations); removal {HCl, HBr, Cl2,
 *             Br2, SO2: each [0,1], each optional; absent: from the column, else default}.
 *  permits:   scrubber R (an id of scrubbers[]); species R (HCl HBr Cl2 Br2 SO2);
 *             max_kg_h [1e-6,1e9], max_mg_nm3 [1e-3,1e9], max_t_yr [1e-6,1e9], at least one;
 *             averaging "hour"|"day" = hour.
 *  stock:     reagent R (incl. "NaOH"; one entry per reagent); on_hand_kg [0,1e9) R;
 *             safety_kg [0,1e9) = 0; lead_days [0,3650] = 0.
 *  containers: reagent R; name R; net_kg [0.1,1e6] R; heel_kg [0, net_kg - 0.1] = 0;
 *             gas_withdrawal_kg_h [0.01,1e6] (optional);
 *             units "metric"|"us" (absent: both); source (text: where the size comes from).
 *  units:     top level, "metric"|"us" = us: catalog containers tagged with the other
 *             system are left out (the campaign's own containers are always used).
 *  schedule:  a CSV file name (relative to the campaign's folder) or an array of them: the
 *             rows are runs (sched.h), after runs[]; with a schedule runs[] may be absent or [].
 *  runs:      id R (unique after repeat expansion); start R (ISO date); reactor; scrubber
 *             (an id of scrubbers[]; absent = -1); substrate R {name; smiles | formula, one R};
 *             product_smiles (smiles and product_smiles: at most CAMP_MAX_SMILES_ATOMS = 1000
 *             atoms); substrate_kg [1e-3, 1e9) R; reagent R (Cl2 Br2 SO2Cl2 NBS HBr);
 *             reagent_eq [1e-6,1000] | reagent_kg [1e-3, 1e9), exactly one R;
 *             halogen_conversion [1e-6,1] = 1; temp_c [-80,400] = 25; feed_h [1/60,8760] = 1;
 *             peak_factor [1,1000] = 1; vent_retained_fraction [0,1) = 0;
 *             reactor_mode "batch"|"cstr" = batch; solvent_kg [0, 1e9) = 0;
 *             mass_cp_kj_kg_k [0.5,10] = 1.8 (camp_origin_mass_cp); accumulation [0,1] = 1;
 *             mtt_c, td24_c [-80,1000], each >= temp_c (optional);
 *             repeat {count 1..10000 R, every_days [1/1440,3650] R}; model;
 *             actual (struct camp_actual; not on an entry with repeat: an actual is one batch's).
 *  actual:    status "done"|"cancelled" (absent = still planned; then only note may be given);
 *             reagent_kg [1e-3,1e9) (done only); product_kg, naoh_kg [0,1e9) (done only);
 *             end (ISO date, not before start); note.
 *  deliveries: reagent R (incl. "NaOH"); kg [1e-3,1e9) R (usable); date R; status
 *             "ordered"|"received" R; ref (1..100 bytes); note.
 *  counts:    reagent R (a chargeable reagent, not NaOH); date R, not before the day of the
 *             earliest run start; kg [0,1e9) R; note; one count per reagent and date.
 *  tolerances: reagent_pct = 5, product_pct = 10, stock_pct = 2, each [0,1000]; note.
 *  model:     relative_reactivity {primary, secondary, tertiary, allylic, benzylic [1e-6,1e6];
 *             ref_temp_c [-80,400]}; overhalogenation_factor [1e-3,1000]; rate_ratios: 1..64
 *             numbers in [1e-6,1e6], the first = 1 (step 0 is the reference).  All optional.
 *  dates:     years 0001-9999.  Every date the ledger shows stays in 0001-01-01..9999-12-31:
 *             run starts (repeats included), ends of feeds (start + feed_h) and order-by dates
 *             (first use - lead_days); a date outside is refused at the start, repeat,
 *             feed_h or lead_days that moves it there.  All runs, from the hour of the earliest
 *             start to the hour after the latest feed end, lie within 7320 days (20 years of
 *             366 days: the scrubber's hourly profile), refused at the first run in file order
 *             (its start, or its repeat's every_days) that breaks it.
 * At most 1e6 runs after expansion; nesting depth at most 64; numbers of at most 63
 * characters.  Field paths: "runs[3].reagent_eq" ("$" = the whole document);
 * catalog errors: "catalog.containers[2].net_kg" with line:column in the catalog text.
 */
#ifndef CAMPAIGN_H
#define CAMPAIGN_H

#include <stddef.h>
#include <stdint.h>
#include "hlerr.h"

/* Most atoms in a smiles or product_smiles.  The SMILES reader and the symmetry classes are
 * near-linear (32,000 atoms in about 0.1 s), but every symmetry class gives a product
 * structure of the whole molecule: a 1,000-atom chain takes 0.17 s and 46 MB for `check`,
 * 2,000 atoms 0.55 s and 165 MB (measured on the 2-core build machine). */
#define CAMP_MAX_SMILES_ATOMS 1000

struct camp_pos { int line, col; }; /* 1-based position of a value; col points at its first byte */

/* Where a string value's escapes sit, so a column inside the decoded text maps back
 * to the file: an escape starting at decoded byte `at` (0-based) gives dec_len
 * decoded bytes from raw_len file bytes (an escaped backslash 1 from 2, \u0043 1 from 6,
 * a surrogate pair 4 from 12). */
struct camp_esc { int at; unsigned char dec_len, raw_len; };
struct camp_strpos {
    struct camp_pos pos;        /* the opening quote */
    int nesc;                   /* escapes in the string, in order */
    struct camp_esc *esc;       /* nesc entries (NULL when none); owned by the campaign */
};

/* The liquor of a scrubber is an enum liquor_id (liquor.h, the campaign's spellings); these
 * two names stay for the first two rows. */
enum camp_liquor { CAMP_LIQUOR_NAOH, CAMP_LIQUOR_WATER };
enum camp_mode { CAMP_BATCH, CAMP_CSTR };

/* Optional model block; a bit in set_mask tells which fields were given. */
enum camp_model_bit {
    CM_PRIMARY = 1u << 0, CM_SECONDARY = 1u << 1, CM_TERTIARY = 1u << 2,
    CM_BENZYLIC = 1u << 3, CM_ALLYLIC = 1u << 4, CM_REF_TEMP = 1u << 5,
    CM_OVERHAL = 1u << 6, CM_RATIOS = 1u << 7
};
#define CAMP_MAX_RATIOS 64
struct camp_model {
    unsigned set_mask;
    double primary, secondary, tertiary, benzylic, allylic, ref_temp_c;
    double overhalogenation_factor;
    double rate_ratios[CAMP_MAX_RATIOS]; int nratios;
};

/* Optional packed-column data of a scrubber, for the column check. */
struct camp_column {
    int present;
    double packing_factor_1_m;  /* Fp, 1/m */
    double htu_m;               /* height of a gas-phase transfer unit */
    double removal_fraction;    /* design removal, e.g. 0.999 */
    double flood_fraction;      /* design fraction of flooding velocity, e.g. 0.7 */
    double carrier_kmol_h;      /* inert sweep gas (N2/air) with the acid gas */
    double liquor_kg_h;         /* circulated liquor */
    double gas_temp_c;
    struct camp_pos pos;
};

struct camp_scrubber {
    char *id;
    int liquor;                 /* enum liquor_id */
    /* the base strengths [wt% of the liquor's base], a liquor with a base (given as
     * naoh_wt_pct ... for caustic, base_wt_pct ... for another base) */
    double base_wt_pct;         /* fresh liquor strength */
    double liquor_kg;           /* charge of fresh liquor */
    double min_base_wt_pct;     /* changeout before a run would go below it */
    double max_acid_wt_pct;     /* water liquor: changeout before HCl passes it */
    double max_hbr_wt_pct;      /* water liquor: the same for HBr (no key: built in, 47) */
    double rated_acid_kmol_h;
    double makeup_base_wt_pct;  /* strength of the base bought (caustic default 50) */
    double liquor_cp_kj_kg_k;   /* given heat capacity of the liquor, where liquor_cp_given */
    int liquor_cp_given;        /* 0: the built-in tables of the liquor (scrubber.h) */
    double fresh_liquor_temp_c; /* fresh liquor and idle-unit temperature, default 25 */
    double max_liquor_temp_c;   /* warn above it (no cooling modelled), default 40 */
    struct camp_column column;
    struct camp_pos pos;
    /* emissions (issue 12): stack gas flow at 0 C and 101.325 kPa [Nm3/h], 0 = not given;
     * removal[vent species] given where bit (1u << species) of removal_given is set */
    double stack_nm3_h;
    double removal[5];
    unsigned removal_given;
};

/* A permit limit on what leaves one scrubber's stack (any of the three limits given;
 * 0 = that limit not given). averaging_day: kg/h and mg/Nm3 as the worst calendar-day
 * mean instead of the worst clock hour. */
struct camp_permit {
    int scrubber;               /* index into campaign.scrubbers */
    int species;                /* enum vent_species */
    double max_kg_h, max_mg_nm3, max_t_yr;
    int averaging_day;
    struct camp_pos pos;
};

struct camp_stock {
    int reagent;                /* enum reagent_id (RG_NAOH for caustic) */
    double on_hand_kg, safety_kg, lead_days;
    struct camp_pos pos;
    struct camp_pos pos_lead_days; /* of the lead_days value (= pos when not given) */
};

/* Container sizes a campaign buys (top-level "units"); a catalog entry tagged with the
 * other system is not used.  Untagged entries (CAMP_UNITS_ANY) serve both. */
enum camp_units { CAMP_UNITS_US, CAMP_UNITS_METRIC, CAMP_UNITS_ANY };

struct camp_container {
    int reagent;
    char *name;
    double net_kg, heel_kg;
    double gas_withdrawal_kg_h;   /* continuous gas rate of one container without icing, 0 = not given */
    enum camp_units units;      /* "units" of the entry; CAMP_UNITS_ANY when not given */
    char *source;               /* "source" text (publication, "common practice", "from memory"); may be NULL */
    int from_catalog;           /* 1 if it came from the default catalog */
    struct camp_pos pos;
};

/* What happened to a run (runs[].actual, and the actual_* columns of a schedule): filled
 * only through camp_actual_* in campaign.c, so every reader validates it the same way. */
enum camp_status { CAMP_PLANNED = 0, CAMP_DONE, CAMP_CANCELLED };
enum camp_actual_bit {
    CAMP_ACT_REAGENT_KG = 1u << 0, CAMP_ACT_PRODUCT_KG = 1u << 1, CAMP_ACT_NAOH_KG = 1u << 2,
    CAMP_ACT_END = 1u << 3
};
struct camp_actual {
    enum camp_status status;    /* CAMP_PLANNED when no actual is given */
    unsigned given;             /* enum camp_actual_bit: which figures were given */
    double reagent_kg;          /* drawn from the container (weighed before and after) */
    double product_kg;          /* wanted product isolated, as 100 % */
    double naoh_kg;             /* caustic consumed in the scrubber (titration), as 100 % NaOH */
    int64_t end_min;            /* isodate minutes */
    struct camp_pos pos;        /* of the actual block (0:0 when none) */
    struct camp_pos pos_status; /* of its status value (= pos when absent) */
};

#define CAMP_DEFAULT_FEED_H 1u /* feed_h not given: 1 h (sets the vent rate and peak) */
#define CAMP_DEFAULT_TEMP 2u   /* temp_c not given: 25 C (sets isomer shares) */
#define CAMP_DEFAULT_CP 4u     /* mass_cp_kj_kg_k not given: 1.8 (sets the adiabatic rise) */

struct camp_run {
    char *id;                   /* with -1, -2 ... suffix when expanded from repeat */
    int src_index;              /* index in the file's runs[] */
    int repeat_no;              /* 1..count, 0 when not repeated */
    int64_t start_min;          /* isodate minutes */
    char *reactor;              /* may be NULL */
    int scrubber;               /* index into campaign.scrubbers, -1 = none given */
    char *substrate_name;       /* may be NULL */
    char *smiles, *formula, *product_smiles; /* smiles xor formula; product_smiles optional */
    double substrate_kg;
    int reagent;                /* enum reagent_id */
    int amount_is_kg;           /* 1: reagent_kg given; 0: reagent_eq given */
    double reagent_eq, reagent_kg;
    double halogen_conversion;  /* default 1 */
    double temp_c;              /* default 25 */
    double feed_h;              /* default 1 */
    double peak_factor;         /* default 1 */
    double vent_retained_fraction; /* default 0 */
    enum camp_mode mode;
    /* thermal screening (thermal.h): solvent in the reaction mass (default 0), its heat
     * capacity (default 1.8), accumulation (default 1), MTT and TD24 when given */
    double solvent_kg, mass_cp_kj_kg_k, accumulation, mtt_c, td24_c;
    int has_mtt, has_td24;
    unsigned defaulted;         /* CAMP_DEFAULT_* bits: safety-relevant values not given */
    /* campaign-level block merged under the run's own: the run's own copy when own_model,
     * else the campaign's block (campaign.model), shared by every such run; never NULL */
    struct camp_model *model;
    struct camp_pos pos, pos_smiles, pos_formula, pos_product_smiles, pos_reagent, pos_amount;
    struct camp_pos pos_id, pos_start; /* of the id and start values (shared by repeat copies) */
    struct camp_pos pos_feed;   /* of the feed_h value (= pos when not given) */
    struct camp_pos pos_repeat; /* of repeat.count and repeat.every_days (0:0 when no repeat) */
    struct camp_pos pos_every;
    /* escape maps of smiles, formula and product_smiles (pos as the pos_* above) */
    struct camp_strpos sp_smiles, sp_formula, sp_product_smiles;
    int own_model;              /* 1 if the run has a model block of its own */
    struct camp_actual actual;  /* status CAMP_PLANNED when none */
    const char *sched_file;     /* the CSV schedule the run came from (a row there: pos.line),
                                 * owned by the campaign; NULL for a runs[] entry */
};

struct camp_delivery {
    int reagent;                /* enum reagent_id (RG_NAOH allowed: caustic make-up) */
    double kg;                  /* usable content */
    int64_t date_min;           /* due (ordered) or received */
    int received;               /* 1 received, 0 ordered (placed, not yet arrived) */
    char *ref;                  /* may be NULL */
    struct camp_pos pos;
};

struct camp_count {
    int reagent;                /* a chargeable enum reagent_id */
    int64_t date_min;
    double kg;                  /* weighed containers less heel */
    struct camp_pos pos, pos_date;
};

/* Flag limits of the month close, in per cent (defaults: common practice, see campaign.c). */
struct camp_tolerances { double reagent_pct, product_pct, stock_pct; };

enum camp_paper { CAMP_PAPER_A4, CAMP_PAPER_LETTER };

struct campaign {
    char *file;                 /* path as given */
    char *title, *site;         /* may be NULL */
    int64_t issued_min;         /* optional "issued" date, -1 if absent */
    enum camp_paper paper;      /* report.paper: the workbook's print paper */
    enum camp_units units;      /* "units": which catalog containers are used (default US) */
    double report_min_mol_fraction; /* report.min_mol_fraction (default 1e-4) */
    int report_min_mol_fraction_given; /* 0: the default (camp_origin_min_mol_fraction) */
    struct camp_scrubber *scrubbers; int nscrubbers;
    struct camp_permit *permits; int npermits;   /* in file order */
    struct camp_stock *stock; int nstock;
    struct camp_container *containers; int ncontainers; /* campaign entries, then catalog ones not overridden */
    struct camp_run *runs; int nruns;                   /* expanded, file order */
    struct camp_delivery *deliveries; int ndeliveries; /* file order */
    struct camp_count *counts; int ncounts;            /* file order */
    struct camp_tolerances tolerances;                 /* defaults where not given */
    int has_model;              /* 1 if a campaign-level model block is given */
    struct camp_model *model;   /* that block (all zero when absent), owned */
    struct camp_pos pos_model;  /* of that block's opening brace */
    char **schedules; int nschedules; /* CSV schedules read, as opened (owned) */
    char **sets; int nsets;     /* the --set KEY=VALUE applied (override.h), as given (owned) */
};

/* How to read: CSV schedules named on the command line (besides the campaign's
 * "schedule" key; their runs come after), the CSV separator (0 = detect) and the --set
 * overrides, put into the tree before it is validated (their errors name the --set). */
struct ovr_list;
struct camp_opts {
    const char *const *schedules; int nschedules;
    char csv_sep;
    struct ovr_list *sets;      /* --set overrides (override.h; NULL = none); hits recorded */
};

/* Where the defaults of mass_cp_kj_kg_k and report.min_mol_fraction come from, as the
 * Assumptions sheet names them (static text). */
extern const char camp_origin_mass_cp[];
extern const char camp_origin_min_mol_fraction[];

/* Read and validate the campaign at path. catalog_text (may be NULL) is the default
 * container catalog JSON (templates/containers.json) merged under the campaign's
 * own containers. On success *out is owned by the caller (camp_free). On failure
 * returns HL_ERR_INPUT (or _IO/_NOMEM) with e->line/col/field set and *out NULL. */
enum hl_status camp_load(const char *path, const char *catalog_text,
                         struct campaign **out, struct hl_err *e);

/* Same from text already in memory (len bytes; need not be NUL-terminated). */
enum hl_status camp_parse(const char *text, size_t len, const char *path,
                          const char *catalog_text, struct campaign **out,
                          struct hl_err *e);

/* camp_load with options (o may be NULL): the schedules' rows become runs after the
 * campaign's own runs[], validated as runs[] entries; errors in a schedule carry
 * e->file (the schedule) and the field "column NAME" (sched.h). */
enum hl_status camp_load_opts(const char *path, const char *catalog_text, const struct camp_opts *o,
                              struct campaign **out, struct hl_err *e);
enum hl_status camp_parse_opts(const char *text, size_t len, const char *path, const char *catalog_text,
                               const struct camp_opts *o, struct campaign **out, struct hl_err *e);

/* Field name of path inside run r for messages: "runs[3].substrate.smiles", or for a
 * schedule row "column substrate_smiles". */
void camp_run_field(const struct camp_run *r, const char *path, char *buf, size_t n);

/* Set key of run i (0-based in c->runs) to value, given as text ("1.2", "cstr"), checked
 * with the ranges and messages of the file (e->field = key, no position): reagent_eq (the
 * amount is then in equivalents), temp_c, halogen_conversion, feed_h, reactor_mode,
 * overhalogenation_factor (the run's model).  For what-if sweeps. */
enum hl_status camp_run_set(struct campaign *c, int i, const char *key, const char *value,
                            struct hl_err *e);

/* File column (1-based) of decoded byte k (1-based) of a string read by the campaign
 * reader: escapes before it count with their raw length; a byte inside an escape maps
 * to its backslash. k <= 0 gives the opening quote. The line is always p->pos.line. */
int camp_string_col(const struct camp_strpos *p, int k);

/* Free the runs of a campaign (runs NULL, nruns 0) once nothing reads them; the scrubbers,
 * stock, containers, model and the top-level fields stay. NULL is fine. */
void camp_free_runs(struct campaign *c);

/* Free a campaign; NULL is fine. */
void camp_free(struct campaign *c);

#endif

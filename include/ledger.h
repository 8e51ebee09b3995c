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
struct campaign; /* campaign.h: only ledger_build reads it; writers never see it */
#include "orders.h"
#include "reagents.h"
#include "scrubber.h"

struct ledger_run {
    char *id, *reactor, *scrubber, *substrate_name, *smiles; /* owned; reactor/scrubber/name/smiles may be NULL */
    int scrubber_index;                  /* into ledger.scrubbers, -1 = none */
    int64_t start_min;
    double feed_h, temp_c, substrate_kg, peak_factor;
    int reagent;
    enum kin_mode mode;
    struct bal_out bal;
    struct scrub_run_out scrub;
};

struct ledger_month {
    int month_index;                     /* isodate_month_index */
    int runs;
    double product_kg, isomer_kg, overhal_kg, unreacted_substrate_kg;
    double reagents_kg[RG_COUNT];        /* charged (NaOH: caustic make-up bought) */
    double vent_kg[VS_COUNT];
    double naoh_kg;                      /* consumed in scrubbers */
    int changeouts;
    double spent_liquor_kg, succinimide_kg, reagent_left_kg, retained_acid_kg;
};

struct ledger_scrubber {
    char *id;
    double rated_acid_kmol_h;
    struct scrub_unit_out out;
};

struct ledger_warning { char *run; char *message; };            /* run may be NULL */
struct ledger_assumption { char *what; int has_value; double value; char *unit; char *origin; }; /* has_value 0: text only */

struct ledger {
    char *title, *site, *file;
    int64_t created_min;                 /* document time: issued date, SOURCE_DATE_EPOCH, or 0 */
    int64_t today_min;                   /* --today, -1 if not given */
    struct ledger_run *runs; int nruns;  /* sorted by start, then file order */
    struct ledger_month *months; int nmonths;
    struct ord_line *orders; int norders;
    struct ledger_scrubber *scrubbers; int nscrubbers;
    struct ledger_warning *warnings; int nwarnings;
    struct ledger_assumption *assumptions; int nassumptions;
    unsigned cautions_mask;              /* bit enum caution_id set for every substance in play */
};

struct ledger_opts {
    int64_t today_min;                   /* -1 = none */
    int64_t created_min;                 /* -1 = derive (campaign issued date or SOURCE_DATE_EPOCH) */
};

/* Build the ledger of a validated campaign. Model input errors (a bad SMILES, NBS on a
 * substrate without allylic H) come back as HL_ERR_INPUT with e->line/col/field
 * pointing into the campaign file. *out owned by the caller (ledger_free). */
enum hl_status ledger_build(const struct campaign *c, const struct ledger_opts *o,
                            struct ledger **out, struct hl_err *e);

/* Free a ledger and every string and table it owns; NULL is fine. */
void ledger_free(struct ledger *l);

/* Text of a role ("wanted", "isomer", "overhalogenated", "unreacted"). */
const char *ledger_role_name(enum bal_role r);

#endif

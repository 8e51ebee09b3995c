/*
 * sweep.h - what-if sweeps: one run of a campaign recomputed for a range of one value.
 *
 * Each point sets the value in the run (camp_run_set: the ranges of the campaign file)
 * and builds the whole ledger again, so a point is exactly what a campaign with that
 * value gives, overlaps with the other runs included (the scrubber peak, the month's
 * containers).  The cost is one ledger per point.
 */
#ifndef SWEEP_H
#define SWEEP_H

#include <stdio.h>
#include "campaign.h"
#include "hlerr.h"
#include "ledger.h"

#define SWEEP_MAX_POINTS 1000

/* One point.  Masses in kg for the swept run; containers: those ordered in the run's month
 * for its reagent; peak: the run's scrubber (0 without one). ratio fields < 0 = undefined. */
struct sweep_point {
    char value[32];                      /* as set: "1.2", "cstr" */
    double x;                            /* numeric value (reactor_mode: 0 batch, 1 cstr) */
    double wanted_kg, isomer_kg, overhalogenated_kg, unreacted_substrate_kg;
    double selectivity_pct;              /* < 0 when nothing converted */
    double conversion_pct;
    double reagent_kg;                   /* charged */
    double acid_gas_kg;                  /* HCl + HBr formed */
    double acid_gas_kg_per_kg_wanted;    /* < 0 when no wanted product */
    double wanted_kg_per_kg_reagent;     /* the default objective */
    double naoh_kg;                      /* consumed by this run's vent gas */
    int containers;
    double peak_acid_kmol_h;
    int has_scrubber;
};

struct sweep {
    char *run, *key, *reagent;           /* owned */
    struct sweep_point *points; int npoints;
    char objective[48];                  /* point key maximised or minimised */
    int minimise;
    int best;                            /* index of the best point, -1 if none is defined */
    char *tradeoff;                      /* the trade-off in words (owned) */
    char **overrides; int noverrides;    /* the campaign's --set KEY=VALUE, as given (owned) */
};

/* Parse "FROM:TO:STEP" (STEP > 0, at most SWEEP_MAX_POINTS values; each value rounded to
 * 12 significant digits, as typed) or "V1,V2,..." into *values (hl_free each and the
 * array) and *n.  HL_ERR_INPUT with a message on a bad spec. */
enum hl_status sweep_values(const char *spec, char ***values, int *n, struct hl_err *e);

/* Run the sweep on campaign c (modified in place: the run keeps the last value).
 * objective: "max:KEY" or "min:KEY" over the point keys, NULL = max:wanted_kg_per_kg_reagent.
 * *out owned by the caller (sweep_free). */
enum hl_status sweep_run(struct campaign *c, const struct ledger_opts *lo, const char *run_id,
                         const char *key, char *const *values, int nvalues, const char *objective,
                         struct sweep **out, struct hl_err *e);

/* The table as text on f (one line a point, then the best value and the trade-off). */
void sweep_print(const struct sweep *s, FILE *f);

/* Write the sweep as JSON ("format": "haloledger-sweep/1"; an "overrides" list when the
 * campaign was read with --set) or as a workbook with a table and a line chart (a what-if
 * line and page header under --set), atomically (afile).  Nothing is written on failure. */
enum hl_status sweep_write_json(const struct sweep *s, const char *path, struct hl_err *e);
enum hl_status sweep_write_xlsx(const struct sweep *s, const char *path, struct hl_err *e);

/* Free a sweep and all it owns; NULL is fine. */
void sweep_free(struct sweep *s);

#endif

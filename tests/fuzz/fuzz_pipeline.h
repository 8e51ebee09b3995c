/*
 * fuzz_pipeline.h - the first half of the pipeline targets (fuzz_pipeline, fuzz_workbook):
 * campaign text -> campaign reader -> every model (ledger_build), with the contracts the
 * writers and main.c rely on checked on the way.  Any violation aborts (a libFuzzer crash).
 *
 *  - the reader: as in fuzz_campaign (a result, or a refusal with a message, never both);
 *  - the models: a refusal is HL_ERR_INPUT with a line and column inside the text it names
 *    (the campaign, or the built-in catalog) and a field, or HL_ERR_NOMEM; never an
 *    internal error or a message without a position (issue 16.2);
 *  - the ledger: one row per campaign run, scrubber references in range, and a safety check
 *    that never fails open: a unit's instantaneous peak is at least the rate of every run
 *    venting to it, and a run whose own rate passes the unit's rating marks the unit
 *    overloaded and leaves a warning (issue 16.1: --strict reads the warnings).
 */
#ifndef FUZZ_PIPELINE_H
#define FUZZ_PIPELINE_H

#include "campaign.h"
#include "hlmem.h"
#include "ledger.h"

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

extern const char catalog_default_json[];

/* Lines in text[0..len) (a position may point one past the last byte, on the last line). */
static inline int fuzz_lines(const char *text, size_t len)
{
    int n = 1;
    for (size_t i = 0; i < len; i++)
        n += text[i] == '\n';
    return n;
}

static inline void fuzz_check_refusal(enum hl_status st, const struct hl_err *e,
                                      const uint8_t *data, size_t size)
{
    if (st != HL_ERR_INPUT && st != HL_ERR_NOMEM)
        abort(); /* text in memory, no files: I/O and internal errors cannot happen */
    if (!e->msg[0] || e->status != st)
        abort();
    if (st == HL_ERR_NOMEM)
        return;
    const char *text = e->doc == HL_DOC_CATALOG ? catalog_default_json : (const char *)data;
    size_t len = e->doc == HL_DOC_CATALOG ? strlen(catalog_default_json) : size;
    if (e->line < 1 || e->col < 1 || e->line > fuzz_lines(text, len) || !e->field[0])
        abort(); /* FILE:LINE:COL: FIELD: message needs all four */
}

/* Run entries of the file (repeat copies share their entry's balance; distinct entries do not). */
static inline int fuzz_entries(const struct campaign *c)
{
    int n = 0;
    for (int i = 0; i < c->nruns; i++)
        n = c->runs[i].src_index + 1 > n ? c->runs[i].src_index + 1 : n;
    return n;
}

/* Most run entries a pipeline input may have.  One balance of 64 halogenation steps with
 * extreme rate constants takes up to about 0.3 s (-O2) and 20 times that under the fuzz
 * build's sanitizers: the cap keeps one input within the targets' timeout, and is a bound
 * on time, not a finding. */
#define FUZZ_MAX_ENTRIES 8

/* The ledger of the campaign in data (NULL when refused, or when it has more than max_runs
 * runs or FUZZ_MAX_ENTRIES entries: bounds on the time of one input, not findings).
 * opt_bits picks the options: bit 0 --today (the first run's start), bit 1 --all-products. */
static inline struct ledger *fuzz_ledger(const uint8_t *data, size_t size, int max_runs,
                                         unsigned opt_bits)
{
    struct hl_err e;
    struct campaign *c = NULL;
    hl_err_clear(&e);
    enum hl_status st = camp_parse((const char *)data, size, "fuzz.json", catalog_default_json,
                                   &c, &e);
    if (st != HL_OK) {
        if (c)
            abort();
        fuzz_check_refusal(st, &e, data, size);
        return NULL;
    }
    if (!c || c->nruns < 1 || !c->runs)
        abort();
    if (c->nruns > max_runs || fuzz_entries(c) > FUZZ_MAX_ENTRIES) {
        camp_free(c);
        return NULL;
    }
    struct ledger_opts o = {.today_min = (opt_bits & 1) ? c->runs[0].start_min : -1,
                            .all_products = (opt_bits >> 1) & 1, .created_min = -1};
    struct ledger *l = NULL;
    hl_err_clear(&e);
    st = ledger_build(c, &o, &l, &e);
    int nruns = c->nruns;
    camp_free(c); /* the ledger owns copies of everything it shows */
    if (st != HL_OK) {
        if (l)
            abort();
        fuzz_check_refusal(st, &e, data, size);
        return NULL;
    }
    if (!l || l->nruns != nruns || l->nscrubbers < 0)
        abort();
    for (int i = 0; i < l->nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        if (!r->id || r->scrubber_index < -1 || r->scrubber_index >= l->nscrubbers)
            abort();
        if (r->scrubber_index < 0 || !(r->scrub.acid_kmol_h > 0))
            continue;
        const struct ledger_scrubber *s = &l->scrubbers[r->scrubber_index];
        /* the sweep adds and removes rates: allow a rounding of 1e-9 relative */
        if (!(s->out.peak_instant_kmol_h >= r->scrub.acid_kmol_h * (1 - 1e-9)))
            abort();
        if (s->rated_acid_kmol_h > 0 && r->scrub.acid_kmol_h > s->rated_acid_kmol_h * (1 + 1e-9) &&
            !s->out.overloaded)
            abort();
    }
    for (int k = 0; k < l->nscrubbers; k++)
        if (l->scrubbers[k].out.overloaded && l->nwarnings < 1)
            abort();
    return l;
}

#endif

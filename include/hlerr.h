/*
 * hlerr.h - error values shared by every haloledger module.
 *
 * Library code never exits: it returns an enum hl_status and fills a
 * struct hl_err with where (line:column and field path) and why.  Only
 * main() turns a status into an exit code (design section 6).
 */
#ifndef HLERR_H
#define HLERR_H

#include <stddef.h>

enum hl_status {
    HL_OK = 0,
    HL_ERR_INPUT,   /* bad campaign, SMILES, formula or option: exit 2 */
    HL_ERR_NOMEM,   /* allocation failed: exit 1 */
    HL_ERR_IO,      /* read/write/rename failed: exit 1 */
    HL_ERR_INTERNAL /* a model did not converge or an invariant broke: exit 1 */
};

/* Which input a position refers to: the campaign file, or the container catalog read
 * alongside it (--catalog FILE or the built-in one), so main names the right file. */
enum hl_doc { HL_DOC_CAMPAIGN = 0, HL_DOC_CATALOG };

struct hl_err {
    enum hl_status status;
    enum hl_doc doc;    /* HL_DOC_CAMPAIGN unless the fault lies in the catalog */
    int line, col;      /* 1-based position in the input file; 0 = unknown */
    char field[160];    /* JSON path of the offending value, "" if none */
    char msg[480];      /* human message, no trailing newline */
    char file[512];     /* the input the position lies in when it is neither the campaign nor
                         * the catalog (a CSV schedule); "" = as doc says */
};

/* Short English name of a status ("bad input", "out of memory", ...). Static string. */
const char *hl_strerror(enum hl_status st);

/* Reset *e to HL_OK with empty texts. */
void hl_err_clear(struct hl_err *e);

/* Set status and printf-style message; keeps line/col/field. Returns st so callers can
 * write `return hl_err_set(e, HL_ERR_INPUT, "...")`. e may be NULL. */
enum hl_status hl_err_set(struct hl_err *e, enum hl_status st, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));

/* Like hl_err_set, also recording position and field path. */
enum hl_status hl_err_at(struct hl_err *e, enum hl_status st, int line, int col,
                         const char *field, const char *fmt, ...)
    __attribute__((format(printf, 6, 7)));

/* Levenshtein distance of two byte strings of at most 64 bytes (1000 when longer),
 * ASCII letters case-folded if fold.  For "did you mean" suggestions. */
int hl_edit_distance(const char *a, const char *b, int fold);

/* The candidate nearest to word within a distance that still looks like a typo (1 for
 * words of up to 4 bytes, 2 up to 8, else 3; a cut-off prefix of 4+ bytes counts 1), else
 * NULL.  Returns one of cands (not copied).  Shared by every reader's suggestions. */
const char *hl_nearest(const char *word, const char *const *cands, int n, int fold);

#endif

/* hlerr.c - error values (see hlerr.h). */
#include "hlerr.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

const char *hl_strerror(enum hl_status st)
{
    switch (st) {
    case HL_OK: return "no error";
    case HL_ERR_INPUT: return "bad input";
    case HL_ERR_NOMEM: return "out of memory";
    case HL_ERR_IO: return "input/output error";
    case HL_ERR_INTERNAL: return "internal error";
    }
    return "unknown error";
}

void hl_err_clear(struct hl_err *e)
{
    if (e)
        memset(e, 0, sizeof *e);
}

static void set_msg(struct hl_err *e, const char *fmt, va_list ap)
{
    vsnprintf(e->msg, sizeof e->msg, fmt, ap);
}

enum hl_status hl_err_set(struct hl_err *e, enum hl_status st, const char *fmt, ...)
{
    if (!e)
        return st;
    va_list ap;
    va_start(ap, fmt);
    set_msg(e, fmt, ap);
    va_end(ap);
    e->status = st;
    return st;
}

enum hl_status hl_err_at(struct hl_err *e, enum hl_status st, int line, int col,
                         const char *field, const char *fmt, ...)
{
    if (!e)
        return st;
    va_list ap;
    va_start(ap, fmt);
    set_msg(e, fmt, ap);
    va_end(ap);
    e->status = st;
    e->line = line;
    e->col = col;
    snprintf(e->field, sizeof e->field, "%s", field ? field : "");
    return st;
}

/* Levenshtein distance of two short byte strings (keys, ids), case-folded if fold. */
int hl_edit_distance(const char *a, const char *b, int fold)
{
    int la = (int)strlen(a), lb = (int)strlen(b);
    if (la > 64 || lb > 64)
        return 1000;
    int row[65];
    for (int j = 0; j <= lb; j++)
        row[j] = j;
    for (int i = 1; i <= la; i++) {
        int diag = row[0];
        row[0] = i;
        for (int j = 1; j <= lb; j++) {
            char x = a[i - 1], y = b[j - 1];
            if (fold) {
                if (x >= 'A' && x <= 'Z') x = (char)(x - 'A' + 'a');
                if (y >= 'A' && y <= 'Z') y = (char)(y - 'A' + 'a');
            }
            int best = diag + (x != y);
            if (row[j] + 1 < best) best = row[j] + 1;
            if (row[j - 1] + 1 < best) best = row[j - 1] + 1;
            diag = row[j];
            row[j] = best;
        }
    }
    return row[lb];
}

/* Nearest candidate within a distance that still looks like a typo, else NULL. */
const char *hl_nearest(const char *word, const char *const *cands, int n, int fold)
{
    const char *best = NULL;
    int bd = 1000;
    for (int k = 0; k < n; k++) {
        int d = hl_edit_distance(word, cands[k], fold);
        size_t lw = strlen(word);
        if (lw >= 4 && strncmp(word, cands[k], lw) == 0)
            d = 1; /* a cut-off key ("overhalogenation") still points at its full name */
        if (d < bd) {
            bd = d;
            best = cands[k];
        }
    }
    int len = (int)strlen(word);
    int limit = len <= 4 ? 1 : len <= 8 ? 2 : 3;
    return bd <= limit ? best : NULL;
}

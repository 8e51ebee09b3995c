/*
 * xlsx_out.c - the spreadsheet ledger (see xlsx_out.h).
 *
 * Layout.  Every sheet starts with one header row (frozen, filtered), units in
 * square brackets in each numeric header.  A sheet is made of "blocks": tables
 * that sit side by side and share that header row, each with an optional
 * totals row of =SUM() formulas whose value computed here is cached in the
 * cell.  The driver writes the blocks row by row, strictly in row order, so
 * the same code works in libxlsxwriter's constant_memory mode, which a very
 * large ledger needs (a cell costs ~100 bytes in the default mode).
 *
 * Robustness (libxlsxwriter 1.1.4 pitfalls, docs/library-notes.md): user text only through
 * worksheet_write_string (never a formula), checked as UTF-8, control
 * characters replaced, held to 32767 bytes; numbers checked finite before
 * they reach %.16G; chart series point at plain number cells; the creation
 * time comes from the ledger, never the clock; the workbook is closed under a
 * temporary name in the target folder and renamed into place.
 */
#include "xlsx_out.h"

#include "afile.h"
#include "hlmem.h"
#include "isodate.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <xlsxwriter.h>

#if LXW_VERSION_ID < 114
#error "libxlsxwriter 1.1.4 or later is needed"
#endif

/* Fixed creation time when the ledger has none: 1980-01-01T00:00:00Z, the zip epoch. */
#define XO_FIXED_EPOCH 315532800
#define XO_MAXCOL 64
#define XO_STR_MAX 32767
/* Above this many cells the workbook is streamed (constant_memory). */
#define XO_STREAM_CELLS 1000000.0

enum xk {
    XK_TEXT, XK_DATE, XK_DAY, XK_INT, XK_KG, XK_MOL, XK_FRAC, XK_MOLFRAC, XK_PCT, XK_RATE,
    XK_TEMP, XK_HEAT, XK_SCI, XK_GMOL, XK_LEN, XK_GEN, XK_COUNT
};
static const char *const xo_numfmt[XK_COUNT] = {
    NULL, "yyyy-mm-dd hh:mm", "yyyy-mm-dd", "#,##0", "#,##0.0", "#,##0.00", "0.0%", "0.00%",
    "0.00", "0.000", "0.0", "#,##0", "0.0E+00", "0.00", "0.00", NULL};
static const int xo_decimals[XK_COUNT] = {0, 0, 0, 0, 1, 2, 1, 2, 2, 3, 1, 0, 0, 2, 2, 4};

static const char *const xo_salt[SALT_COUNT] = {"NaCl", "NaBr", "NaOCl", "NaOBr", "Na2SO3", "Na2SO4"};

struct xcol { char head[96]; enum xk kind; int total; };

struct xw;
struct xblock;
typedef void (*xrow_fn)(struct xw *, struct xblock *, lxw_row_t row, int i);

struct xblock {
    struct xcol cols[40]; int ncols;
    lxw_col_t col0;
    int nrows;                 /* data rows (after capping at the sheet limit) */
    int omitted;               /* data rows dropped at the sheet limit */
    xrow_fn fn;
    int cur, sub;              /* cursor for row functions that walk nested lists */
    const char *empty_note;    /* shown when there are no data rows */
    const char *notes[3]; int nnotes;
    double sum[40];
};

struct xw {
    const struct ledger *l;
    lxw_workbook *wb;
    lxw_worksheet *ws;
    const char *sheet;
    enum hl_status st;
    struct hl_err *e;
    lxw_format *fmt[XK_COUNT][2], *head, *title, *wrap, *bold, *note, *top, *bold_top;
    double width[XO_MAXCOL];
    int maxcol;
    struct xblock *blk;        /* block whose row is being written (for sums) */
    int dry;                   /* 1: only count rows (the filter range must be set before
                                * the rows in constant_memory mode) */
    char clean[XO_STR_MAX + 4];
};

/* --- failures ------------------------------------------------------------ */

static void xo_fail(struct xw *w, enum hl_status st, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
static void xo_fail(struct xw *w, enum hl_status st, const char *fmt, ...)
{
    if (w->st != HL_OK)
        return;
    char msg[400];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    w->st = hl_err_set(w->e, st, "workbook: %s", msg);
}

static void xo_check(struct xw *w, lxw_error err, lxw_row_t row, lxw_col_t col)
{
    if (err == LXW_NO_ERROR || w->st != HL_OK)
        return;
    char cell[16];
    lxw_rowcol_to_cell(cell, row, col);
    xo_fail(w, err == LXW_ERROR_MEMORY_MALLOC_FAILED ? HL_ERR_NOMEM : HL_ERR_INTERNAL,
            "sheet %s cell %s: %s", w->sheet, cell, lxw_strerror(err));
}

/* --- text ---------------------------------------------------------------- */

/* Length of a valid UTF-8 sequence at s (RFC 3629), 0 if invalid. */
static int xo_utf8_len(const unsigned char *s)
{
    unsigned c = s[0], cp, min;
    int n;
    if (c < 0x80) return 1;
    if ((c & 0xE0) == 0xC0) { n = 2; min = 0x80; cp = c & 0x1F; }
    else if ((c & 0xF0) == 0xE0) { n = 3; min = 0x800; cp = c & 0x0F; }
    else if ((c & 0xF8) == 0xF0) { n = 4; min = 0x10000; cp = c & 0x07; }
    else return 0;
    for (int k = 1; k < n; k++) {
        if ((s[k] & 0xC0) != 0x80)
            return 0;
        cp = (cp << 6) | (s[k] & 0x3F);
    }
    if (cp < min || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF))
        return 0;
    return n;
}

/* The text as the workbook may hold it: invalid bytes become '?', control characters
 * other than tab and newline a space (XML 1.0 cannot carry them), cut at 32767 bytes
 * on a character boundary.  Returns s itself when nothing needs changing. *chars gets
 * the longest line in characters, for the column width. */
static const char *xo_clean(struct xw *w, const char *s, int *chars)
{
    const unsigned char *p = (const unsigned char *)s;
    size_t i = 0, o = 0;
    int changed = 0, line = 0, longest = 0;
    while (p[i]) {
        int n = xo_utf8_len(p + i);
        if (o + (n ? n : 1) > XO_STR_MAX) {
            changed = 1;
            break;
        }
        if (n == 0 || (p[i] < 0x20 && p[i] != '\t' && p[i] != '\n') || p[i] == 0x7F) {
            w->clean[o++] = n == 0 ? '?' : ' ';
            changed = 1;
            i += n ? (size_t)n : 1;
            line++;
            continue;
        }
        if (p[i] == '\n') {
            longest = line > longest ? line : longest;
            line = -1;
        }
        memcpy(w->clean + o, p + i, (size_t)n);
        o += (size_t)n;
        i += (size_t)n;
        line++;
    }
    *chars = line > longest ? line : longest;
    if (!changed)
        return s;
    w->clean[o] = '\0';
    return w->clean;
}

static void xo_widen(struct xw *w, lxw_col_t col, double chars)
{
    if (col < XO_MAXCOL && chars > w->width[col])
        w->width[col] = chars;
    if ((int)col > w->maxcol)
        w->maxcol = (int)col;
}

/* --- cells --------------------------------------------------------------- */

static void xo_text(struct xw *w, lxw_row_t row, lxw_col_t col, const char *s, lxw_format *f)
{
    if (w->st != HL_OK || w->dry || !s || !*s)
        return;
    int chars;
    const char *t = xo_clean(w, s, &chars);
    /* a long unformatted text (a warning, a note) wraps in its capped column instead of
     * running across the neighbours, on screen and on paper */
    if (!f && chars > 60)
        f = w->wrap;
    /* worksheet_write_string never makes a formula, whatever the first character */
    xo_check(w, worksheet_write_string(w->ws, row, col, t, f), row, col);
    if (f != w->wrap && f != w->head)
        xo_widen(w, col, chars > 60 ? 60 : chars);
}

static double xo_num_chars(enum xk k, double v)
{
    switch (k) {
    case XK_DATE: return 16;
    case XK_DAY: return 10;
    case XK_SCI: return 8;
    case XK_FRAC: case XK_MOLFRAC: return 8;
    default: break;
    }
    double a = fabs(v);
    int digits = a < 1 ? 1 : (int)floor(log10(a)) + 1;
    int commas = (k == XK_INT || k == XK_KG || k == XK_MOL || k == XK_HEAT) ? (digits - 1) / 3 : 0;
    int dec = xo_decimals[k];
    if (k == XK_GEN && (a >= 1e10 || (a > 0 && a < 1e-4)))
        return 10;
    return digits + commas + dec + (dec ? 1 : 0) + (v < 0);
}

static void xo_num(struct xw *w, lxw_row_t row, lxw_col_t col, enum xk k, double v, int bold,
                   const char *what)
{
    if (w->st != HL_OK || w->dry)
        return;
    if (!isfinite(v)) {
        char cell[16];
        lxw_rowcol_to_cell(cell, row, col);
        xo_fail(w, HL_ERR_INTERNAL, "non-finite value for '%s' (sheet %s cell %s)", what,
                w->sheet, cell);
        return;
    }
    xo_check(w, worksheet_write_number(w->ws, row, col, v + 0.0, w->fmt[k][bold]), row, col);
    xo_widen(w, col, xo_num_chars(k, v));
}

/* Dates as Excel serial days (1900 system; 1970-01-01 = 25569) with a date format, so
 * they sort and filter as dates; outside 1901..9998 as ISO text. */
static void xo_date(struct xw *w, lxw_row_t row, lxw_col_t col, int64_t min, int date_only)
{
    int y;
    isodate_to_civil(min, &y, NULL, NULL, NULL, NULL);
    if (y < 1901 || y > 9998) {
        char buf[32];
        isodate_format(min, date_only, buf, sizeof buf);
        xo_text(w, row, col, buf, NULL);
        return;
    }
    int64_t days = min >= 0 ? min / 1440 : -((-min + 1439) / 1440);
    /* date only: the day itself (truncated, as in the JSON ledger) */
    double serial = (double)(days + 25569) + (date_only ? 0.0 : (double)(min - days * 1440) / 1440.0);
    xo_num(w, row, col, date_only ? XK_DAY : XK_DATE, serial, 0, "date");
}

static void xo_sum(struct xw *w, lxw_row_t row, lxw_col_t col, lxw_row_t r0, lxw_row_t r1,
                   enum xk k, double cached)
{
    if (w->st != HL_OK)
        return;
    if (!isfinite(cached)) {
        xo_num(w, row, col, k, cached, 1, "total");
        return;
    }
    char range[40], formula[64];
    lxw_rowcol_to_range(range, r0, col, r1, col);
    snprintf(formula, sizeof formula, "=SUM(%s)", range);
    xo_check(w, worksheet_write_formula_num(w->ws, row, col, formula, w->fmt[k][1], cached + 0.0),
             row, col);
    xo_widen(w, col, xo_num_chars(k, cached));
}

/* --- blocks -------------------------------------------------------------- */

static void xb_col(struct xblock *b, enum xk kind, int total, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
static void xb_col(struct xblock *b, enum xk kind, int total, const char *fmt, ...)
{
    if (b->ncols >= (int)(sizeof b->cols / sizeof b->cols[0]))
        return;
    struct xcol *c = &b->cols[b->ncols++];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(c->head, sizeof c->head, fmt, ap);
    va_end(ap);
    c->kind = kind;
    c->total = total;
}

/* Cell k of the current row of block b. */
static void xb_num(struct xw *w, struct xblock *b, lxw_row_t row, int k, double v)
{
    if (k >= b->ncols)
        return;
    xo_num(w, row, b->col0 + (lxw_col_t)k, b->cols[k].kind, v, 0, b->cols[k].head);
    if (b->cols[k].total)
        b->sum[k] += v;
}

static void xb_text(struct xw *w, struct xblock *b, lxw_row_t row, int k, const char *s)
{
    if (k < b->ncols)
        xo_text(w, row, b->col0 + (lxw_col_t)k, s, NULL);
}

static void xb_date(struct xw *w, struct xblock *b, lxw_row_t row, int k, int64_t min)
{
    if (k < b->ncols)
        xo_date(w, row, b->col0 + (lxw_col_t)k, min, b->cols[k].kind == XK_DAY);
}

static void xb_flag(struct xw *w, struct xblock *b, lxw_row_t row, int k, int v)
{
    xb_text(w, b, row, k, v ? "yes" : "no");
}

static int xb_has_totals(const struct xblock *b)
{
    for (int k = 0; k < b->ncols; k++)
        if (b->cols[k].total)
            return b->nrows > 0;
    return 0;
}

/* Lay blocks side by side from column 0 with one blank column between them. */
static void xb_place(struct xblock *b, int nb)
{
    lxw_col_t c = 0;
    for (int i = 0; i < nb; i++) {
        b[i].col0 = c;
        c = (lxw_col_t)(c + b[i].ncols + 1);
    }
}

static void xb_cap(struct xblock *b)
{
    int max = (int)LXW_ROW_MAX - 8;
    if (b->nrows > max) {
        b->omitted = b->nrows - max;
        b->nrows = max;
    }
}

/* Start a sheet; a bad or empty name is never passed to the library. */
static int xo_sheet(struct xw *w, const char *name)
{
    if (w->st != HL_OK)
        return 0;
    w->sheet = name;
    w->ws = workbook_add_worksheet(w->wb, name);
    if (!w->ws) {
        xo_fail(w, HL_ERR_NOMEM, "cannot add sheet %s", name);
        return 0;
    }
    memset(w->width, 0, sizeof w->width);
    w->maxcol = 0;
    /* header row: three wrapped lines; set before any cell (constant_memory order) */
    xo_check(w, worksheet_set_row(w->ws, 0, 46, NULL), 0, 0);
    /* printed: landscape A4, all columns on one page width, the header row on every page */
    worksheet_set_landscape(w->ws);
    worksheet_set_paper(w->ws, 9);
    worksheet_fit_to_pages(w->ws, 1, 0);
    xo_check(w, worksheet_repeat_rows(w->ws, 0, 0), 0, 0);
    return w->st == HL_OK;
}

/* Column widths from content, header words and a 3-line wrapped header. */
static void xo_widths(struct xw *w, const struct xblock *b, int nb)
{
    for (int i = 0; i < nb; i++)
        for (int k = 0; k < b[i].ncols; k++) {
            const char *h = b[i].cols[k].head;
            int len = (int)strlen(h), word = 0, longest = 0;
            for (const char *p = h;; p++) {
                if (*p == ' ' || *p == '\0') {
                    longest = word > longest ? word : longest;
                    word = 0;
                    if (!*p)
                        break;
                } else {
                    word++;
                }
            }
            double need = longest > len / 3.0 ? longest : len / 3.0;
            xo_widen(w, b[i].col0 + (lxw_col_t)k, need);
        }
    for (int c = 0; c <= w->maxcol && c < XO_MAXCOL && w->st == HL_OK; c++) {
        double wd = w->width[c] > 0 ? w->width[c] + 2 : 3;
        if (wd > 62)
            wd = 62;
        xo_check(w, worksheet_set_column(w->ws, (lxw_col_t)c, (lxw_col_t)c, wd, NULL), 0,
                 (lxw_col_t)c);
    }
}

/* Write nb blocks side by side, strictly in row order. The first block gets the filter. */
static void xo_blocks(struct xw *w, struct xblock *b, int nb)
{
    int rows = 0;
    for (int i = 0; i < nb; i++) {
        xb_cap(&b[i]);
        int n = 1 + b[i].nrows + xb_has_totals(&b[i]) + b[i].nnotes + (b[i].nrows == 0) +
                (b[i].omitted > 0);
        rows = n > rows ? n : rows;
    }
    worksheet_freeze_panes(w->ws, 1, 0);
    xo_check(w, worksheet_autofilter(w->ws, 0, b[0].col0, (lxw_row_t)b[0].nrows,
                                     (lxw_col_t)(b[0].col0 + b[0].ncols - 1)), 0, 0);
    for (int r = 0; r < rows && w->st == HL_OK; r++) {
        for (int i = 0; i < nb && w->st == HL_OK; i++) {
            struct xblock *x = &b[i];
            lxw_row_t row = (lxw_row_t)r;
            if (r == 0) {
                for (int k = 0; k < x->ncols; k++)
                    xo_text(w, 0, x->col0 + (lxw_col_t)k, x->cols[k].head, w->head);
                continue;
            }
            if (r - 1 < x->nrows) {
                w->blk = x;
                x->fn(w, x, row, r - 1);
                continue;
            }
            int at = r - 1 - x->nrows;
            if (xb_has_totals(x)) {
                if (at == 0) {
                    if (x->cols[0].kind == XK_TEXT)
                        xo_text(w, row, x->col0, "Total", w->bold);
                    for (int k = 0; k < x->ncols; k++)
                        if (x->cols[k].total)
                            xo_sum(w, row, x->col0 + (lxw_col_t)k, 1, (lxw_row_t)x->nrows,
                                   x->cols[k].kind, x->sum[k]);
                    continue;
                }
                at--;
            }
            if (x->nrows == 0) {
                if (at == 0) {
                    xo_text(w, row, x->col0, x->empty_note ? x->empty_note : "(none)", w->note);
                    continue;
                }
                at--;
            }
            if (x->omitted > 0) {
                if (at == 0) {
                    char msg[160];
                    snprintf(msg, sizeof msg, "%d further rows omitted at the sheet row limit; "
                             "the JSON ledger carries them all.", x->omitted);
                    xo_text(w, row, x->col0, msg, w->note);
                    continue;
                }
                at--;
            }
            if (at < x->nnotes)
                xo_text(w, row, x->col0, x->notes[at], w->note);
        }
    }
    if (w->st != HL_OK)
        return;
    xo_widths(w, b, nb);
}

/* --- shared names -------------------------------------------------------- */

static const char *xo_item(int item)
{
    const struct reagent_info *ri = reagent_get(item);
    return ri ? ri->name : "unknown";
}

static const char *xo_vent(int vs)
{
    const char *n = vent_name(vs);
    return n ? n : "gas";
}

static double xo_vent_kg(const double *mol, int vs)
{
    return mol[vs] * vent_molar_mass_g_mol(vs) / 1000.0;
}

static void xo_month_text(int month_index, char *buf, size_t n)
{
    int y = month_index >= 0 ? month_index / 12 : -((-month_index + 11) / 12);
    snprintf(buf, n, "%04d-%02d", y, month_index - y * 12 + 1);
}

/* --- Summary ------------------------------------------------------------- */

struct xkv { struct xw *w; lxw_row_t row; };

static void kv_text(struct xkv *k, const char *item, const char *value, const char *note)
{
    xo_text(k->w, k->row, 0, item, NULL);
    xo_text(k->w, k->row, 1, value, NULL);
    xo_text(k->w, k->row, 2, note, NULL);
    k->row++;
}

static void kv_num(struct xkv *k, const char *item, enum xk kind, double v, const char *note)
{
    xo_text(k->w, k->row, 0, item, NULL);
    xo_num(k->w, k->row, 1, kind, v, 0, item);
    xo_text(k->w, k->row, 2, note, NULL);
    k->row++;
}

static const char xo_safety[] =
    "Safety notice: the figures in this workbook are planning estimates from simplified "
    "models. They do not replace the safety data sheet (SDS) of each substance, the local "
    "codes, permits and regulations of the site, or a review of vent, scrubber and "
    "handling arrangements by a licensed engineer. Confirm exposure limits and "
    "incompatibilities against the current SDS before any work.";

/* Rows of the Summary; returns the last row used (a dry pass only counts). */
static lxw_row_t xo_summary_rows(struct xw *w)
{
    const struct ledger *l = w->l;
    struct xkv k = {w, 0};
    xo_text(w, 0, 0, "Item", w->head);
    xo_text(w, 0, 1, "Value", w->head);
    xo_text(w, 0, 2, "Note", w->head);
    k.row = 1;
    xo_text(w, k.row, 0, "Campaign", w->bold);
    xo_text(w, k.row, 1, l->title ? l->title : "(untitled)", w->title);
    k.row++;
    kv_text(&k, "Site", l->site, NULL);
    kv_text(&k, "Source file", l->file, NULL);
    if (l->nruns > 0) {
        int64_t first = l->runs[0].start_min, last = first;
        for (int i = 0; i < l->nruns; i++) {
            const struct ledger_run *r = &l->runs[i];
            int64_t end = r->start_min + (isfinite(r->feed_h) && fabs(r->feed_h) < 1e9
                                              ? (int64_t)llround(r->feed_h * 60.0) : 0);
            if (r->start_min < first) first = r->start_min;
            if (end > last) last = end;
        }
        char a[24], b[24], p[64];
        isodate_format(first, 0, a, sizeof a);
        isodate_format(last, 0, b, sizeof b);
        snprintf(p, sizeof p, "%s to %s", a, b);
        kv_text(&k, "Period (plant time)", p, "first run start to last feed end");
    } else {
        kv_text(&k, "Period (plant time)", "no runs", NULL);
    }
    if (l->created_min != 0) {
        char d[24];
        isodate_format(l->created_min, 0, d, sizeof d);
        kv_text(&k, "Ledger dated", d, NULL);
    }
    kv_num(&k, "Runs [count]", XK_INT, l->nruns, NULL);

    double charged[RG_COUNT] = {0}, vent[VS_COUNT] = {0};
    double wanted = 0, iso = 0, over = 0, unr = 0;
    for (int i = 0; i < l->nruns; i++) {
        const struct bal_out *b = &l->runs[i].bal;
        if (l->runs[i].reagent >= 0 && l->runs[i].reagent < RG_COUNT)
            charged[l->runs[i].reagent] += b->reagent_kg;
        for (int s = 0; s < VS_COUNT; s++)
            vent[s] += xo_vent_kg(b->vent_mol, s);
        wanted += b->wanted_kg;
        iso += b->isomer_kg;
        over += b->overhal_kg;
        unr += b->unreacted_substrate_kg;
    }
    char item[128];
    for (int g = 0; g < RG_CHARGEABLE; g++)
        if (charged[g] != 0) {
            snprintf(item, sizeof item, "%s charged [kg]", xo_item(g));
            kv_num(&k, item, XK_KG, charged[g], "sum over the Runs sheet");
        }
    kv_num(&k, "Wanted product [kg]", XK_KG, wanted, NULL);
    kv_num(&k, "Isomer losses [kg]", XK_KG, iso, "other monohalide isomers");
    kv_num(&k, "Over-halogenated losses [kg]", XK_KG, over, NULL);
    kv_num(&k, "Unreacted substrate [kg]", XK_KG, unr, NULL);
    for (int s = 0; s < VS_COUNT; s++) {
        snprintf(item, sizeof item, "%s to scrubbers [kg]", xo_vent(s));
        kv_num(&k, item, XK_KG, vent[s], NULL);
    }
    double naoh = 0, makeup = 0;
    int changeouts = 0, overloads = 0, late = 0;
    for (int u = 0; u < l->nscrubbers; u++) {
        naoh += l->scrubbers[u].out.naoh_kg;
        makeup += l->scrubbers[u].out.makeup_kg;
        changeouts += l->scrubbers[u].out.changeouts;
        overloads += l->scrubbers[u].out.overloaded != 0;
    }
    for (int i = 0; i < l->norders; i++)
        late += l->orders[i].late != 0;
    kv_num(&k, "NaOH consumed in scrubbers [kg]", XK_KG, naoh, NULL);
    kv_num(&k, "Caustic make-up solution bought [kg]", XK_KG, makeup, "for the changeouts");
    kv_num(&k, "Liquor changeouts [count]", XK_INT, changeouts, NULL);
    for (int u = 0; u < l->nscrubbers; u++) {
        const struct ledger_scrubber *s = &l->scrubbers[u];
        char note[200], at[24] = "-";
        if (s->out.nhours > 0)
            isodate_format(s->out.peak_at_min, 0, at, sizeof at);
        snprintf(note, sizeof note, "mean over the hour from %s", at);
        snprintf(item, sizeof item, "Peak hourly load at %.60s [kmol/h]", s->id ? s->id : "?");
        kv_num(&k, item, XK_RATE, s->out.peak_acid_kmol_h, note);
        if (s->out.npeak_instant_runs > 0)
            isodate_format(s->out.peak_instant_at_min, 0, at, sizeof at);
        snprintf(note, sizeof note, "from %s; rated %.3g kmol/h%s", at, s->rated_acid_kmol_h,
                 s->out.overloaded ? "; OVER THE RATED CAPACITY" : "");
        snprintf(item, sizeof item, "Peak instantaneous load at %.60s [kmol/h]", s->id ? s->id : "?");
        kv_num(&k, item, XK_RATE, s->out.peak_instant_kmol_h, note);
        snprintf(item, sizeof item, "Hottest liquor at %.60s [°C]", s->id ? s->id : "?");
        kv_num(&k, item, XK_TEMP, s->out.max_liquor_temp_c, s->out.too_hot_runs ? "cooling needed (no cooler modelled)" : "adiabatic, no cooler modelled");
    }
    kv_num(&k, "Scrubber overloads [count]", XK_INT, overloads, NULL);
    kv_num(&k, "Late orders [count]", XK_INT, late, late ? "order-by date already passed" : NULL);
    kv_num(&k, "Warnings [count]", XK_INT, l->nwarnings, NULL);
    k.row++;
    xo_text(w, k.row++, 0, "Warnings", w->bold);
    if (l->nwarnings == 0)
        xo_text(w, k.row++, 0, "(none)", w->note);
    for (int i = 0; i < l->nwarnings && w->st == HL_OK; i++) {
        /* the message wraps in its 62-wide column: give the row one line per ~50 chars */
        size_t len = strlen(l->warnings[i].message);
        if (!w->dry && len > 60)
            xo_check(w, worksheet_set_row(w->ws, k.row, 13.0 * (double)((len + 49) / 50), NULL),
                     k.row, 0);
        xo_text(w, k.row, 0, "Warning", w->top);
        xo_text(w, k.row, 1, l->warnings[i].run ? l->warnings[i].run : "campaign", w->top);
        xo_text(w, k.row, 2, l->warnings[i].message, w->wrap);
        k.row++;
    }
    k.row++;
    xo_text(w, k.row, 0, "Safety notice", w->bold_top);
    if (!w->dry)
        xo_check(w, worksheet_set_row(w->ws, k.row, 105, NULL), k.row, 0);
    xo_text(w, k.row, 1, xo_safety, w->wrap);
    return k.row;
}

static void xo_summary(struct xw *w)
{
    if (!xo_sheet(w, "Summary"))
        return;
    w->dry = 1;
    lxw_row_t last = xo_summary_rows(w);
    w->dry = 0;
    worksheet_freeze_panes(w->ws, 1, 0);
    xo_check(w, worksheet_autofilter(w->ws, 0, 0, last, 2), 0, 0);
    xo_summary_rows(w);
    if (w->st != HL_OK)
        return;
    xo_check(w, worksheet_set_column(w->ws, 0, 0, w->width[0] + 2, NULL), 0, 0);
    xo_check(w, worksheet_set_column(w->ws, 1, 1, 62, NULL), 0, 1); /* wrapped notice */
    xo_check(w, worksheet_set_column(w->ws, 2, 2, w->width[2] + 2 > 62 ? 62 : w->width[2] + 2,
                                     NULL), 0, 2);
}

/* --- Runs ---------------------------------------------------------------- */

static void row_run(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    const struct ledger_run *r = &w->l->runs[i];
    const struct bal_out *o = &r->bal;
    int k = 0;
    xb_text(w, b, row, k++, r->id);
    xb_date(w, b, row, k++, r->start_min);
    if (isfinite(r->feed_h) && fabs(r->feed_h) < 1e9)
        xb_date(w, b, row, k, r->start_min + (int64_t)llround(r->feed_h * 60.0));
    k++;
    xb_text(w, b, row, k++, r->reactor);
    xb_text(w, b, row, k++, r->scrubber);
    xb_text(w, b, row, k++, r->mode == KIN_CSTR ? "cstr" : "batch");
    xb_text(w, b, row, k++, xo_item(r->reagent));
    xb_text(w, b, row, k++, r->substrate_name);
    xb_text(w, b, row, k++, r->smiles);
    xb_text(w, b, row, k++, o->substrate_formula);
    xb_num(w, b, row, k++, r->temp_c);
    xb_num(w, b, row, k++, r->feed_h);
    xb_num(w, b, row, k++, r->substrate_kg);
    xb_num(w, b, row, k++, o->substrate_mol);
    xb_num(w, b, row, k++, o->reagent_kg);
    xb_num(w, b, row, k++, o->reagent_mol);
    xb_num(w, b, row, k++, o->reagent_reacted_mol);
    xb_num(w, b, row, k++, o->halogen_reacted_mol);
    xb_flag(w, b, row, k++, o->capped);
    xb_num(w, b, row, k++, o->mean_degree);
    xb_num(w, b, row, k++, o->hx_kg[0]);
    xb_num(w, b, row, k++, o->hx_kg[1]);
    xb_num(w, b, row, k++, o->so2_kg);
    xb_num(w, b, row, k++, o->succinimide_kg);
    for (int s = 0; s < VS_COUNT; s++)
        xb_num(w, b, row, k++, xo_vent_kg(o->vent_mol, s));
    xb_num(w, b, row, k++, r->scrub.acid_kmol_h);
    xb_num(w, b, row, k++, r->scrub.naoh_kg);
    xb_num(w, b, row, k++, r->scrub.heat_kj);
    xb_num(w, b, row, k++, r->scrub.temp_rise_k);
    xb_flag(w, b, row, k++, r->scrub.changeout_before);
    xb_num(w, b, row, k++, o->max_rel_error);
    xb_text(w, b, row, k++,
            o->warning[0] ? o->warning
            : o->isomers_resolved ? NULL
                                  : "formula substrate: isomers not resolved, every monohalide "
                                    "counted as the wanted product");
}

static void xo_runs(struct xw *w)
{
    if (!xo_sheet(w, "Runs"))
        return;
    struct xblock b = {.fn = row_run, .nrows = w->l->nruns, .empty_note = "No runs in the campaign."};
    xb_col(&b, XK_TEXT, 0, "Run");
    xb_col(&b, XK_DATE, 0, "Start (plant time)");
    xb_col(&b, XK_DATE, 0, "Feed end (plant time)");
    xb_col(&b, XK_TEXT, 0, "Reactor");
    xb_col(&b, XK_TEXT, 0, "Scrubber");
    xb_col(&b, XK_TEXT, 0, "Reactor mode");
    xb_col(&b, XK_TEXT, 0, "Reagent");
    xb_col(&b, XK_TEXT, 0, "Substrate");
    xb_col(&b, XK_TEXT, 0, "Substrate SMILES");
    xb_col(&b, XK_TEXT, 0, "Substrate formula");
    xb_col(&b, XK_TEMP, 0, "Temperature [°C]");
    xb_col(&b, XK_TEMP, 0, "Feed time [h]");
    xb_col(&b, XK_KG, 1, "Substrate [kg]");
    xb_col(&b, XK_MOL, 1, "Substrate [mol]");
    xb_col(&b, XK_KG, 1, "Reagent charged [kg]");
    xb_col(&b, XK_MOL, 1, "Reagent charged [mol]");
    xb_col(&b, XK_MOL, 1, "Reagent reacted [mol]");
    xb_col(&b, XK_MOL, 1, "Halogen put on carbon [mol]");
    xb_col(&b, XK_TEXT, 0, "Capped by substrate");
    xb_col(&b, XK_MOL, 0, "Mean halogens added [mol/mol substrate]");
    xb_col(&b, XK_KG, 1, "HCl formed [kg]");
    xb_col(&b, XK_KG, 1, "HBr formed [kg]");
    xb_col(&b, XK_KG, 1, "SO2 formed [kg]");
    xb_col(&b, XK_KG, 1, "Succinimide formed [kg]");
    for (int s = 0; s < VS_COUNT; s++)
        xb_col(&b, XK_KG, 1, "%s to scrubber [kg]", xo_vent(s));
    xb_col(&b, XK_RATE, 0, "Vent gas to scrubber [kmol/h]");
    xb_col(&b, XK_KG, 1, "NaOH used [kg]");
    xb_col(&b, XK_HEAT, 1, "Heat to liquor [kJ]");
    xb_col(&b, XK_TEMP, 0, "Liquor temperature rise [K]");
    xb_col(&b, XK_TEXT, 0, "Liquor changed before run");
    xb_col(&b, XK_SCI, 0, "Element balance error [relative]");
    xb_col(&b, XK_TEXT, 0, "Note");
    xb_place(&b, 1);
    xo_blocks(w, &b, 1);
}

/* --- Products ------------------------------------------------------------ */

static void row_product(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    (void)i;
    const struct ledger *l = w->l;
    /* cursor (cur = run, sub = product) walks the nested lists in order */
    while (b->cur < l->nruns && b->sub >= l->runs[b->cur].bal.nproducts) {
        b->cur++;
        b->sub = 0;
    }
    if (b->cur >= l->nruns)
        return;
    const struct ledger_run *r = &l->runs[b->cur];
    const struct bal_product *p = &r->bal.products[b->sub++];
    int k = 0;
    xb_text(w, b, row, k++, r->id);
    xb_text(w, b, row, k++, xo_item(r->reagent));
    xb_text(w, b, row, k++, p->smiles); /* blank: no unambiguous structure */
    xb_text(w, b, row, k++, p->formula);
    xb_num(w, b, row, k++, p->degree);
    xb_text(w, b, row, k++, ledger_role_name(p->role));
    xb_num(w, b, row, k++, p->molar_mass_g_mol);
    xb_num(w, b, row, k++, p->mol);
    xb_num(w, b, row, k++, p->kg);
    xb_num(w, b, row, k++, p->mol_fraction);
}

static void xo_products(struct xw *w)
{
    if (!xo_sheet(w, "Products"))
        return;
    int n = 0;
    for (int i = 0; i < w->l->nruns; i++)
        n += w->l->runs[i].bal.nproducts;
    struct xblock b = {.fn = row_product, .nrows = n, .empty_note = "No products."};
    xb_col(&b, XK_TEXT, 0, "Run");
    xb_col(&b, XK_TEXT, 0, "Reagent");
    xb_col(&b, XK_TEXT, 0, "Structure (SMILES)");
    xb_col(&b, XK_TEXT, 0, "Formula");
    xb_col(&b, XK_INT, 0, "Halogens added [atoms/molecule]");
    xb_col(&b, XK_TEXT, 0, "Role");
    xb_col(&b, XK_GMOL, 0, "Molar mass [g/mol]");
    xb_col(&b, XK_MOL, 1, "Amount [mol]");
    xb_col(&b, XK_KG, 1, "Mass [kg]");
    xb_col(&b, XK_MOLFRAC, 0, "Share of substrate charged [mol %%]");
    xb_place(&b, 1);
    xo_blocks(w, &b, 1);
}

/* --- Scrubber ------------------------------------------------------------ */

static void row_liquor(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    (void)i;
    const struct ledger *l = w->l;
    while (b->cur < l->nruns && !l->runs[b->cur].scrubber)
        b->cur++;
    if (b->cur >= l->nruns)
        return;
    const struct ledger_run *r = &l->runs[b->cur++];
    const struct scrub_run_out *s = &r->scrub;
    int k = 0;
    xb_text(w, b, row, k++, r->scrubber);
    xb_text(w, b, row, k++, r->id);
    xb_date(w, b, row, k++, r->start_min);
    xb_flag(w, b, row, k++, s->changeout_before);
    xb_num(w, b, row, k++, s->acid_kmol_h);
    xb_num(w, b, row, k++, s->naoh_kg);
    xb_num(w, b, row, k++, s->naoh_left_kg);
    xb_num(w, b, row, k++, s->liquor_kg_after);
    xb_num(w, b, row, k++, s->naoh_wt_pct_after);
    for (int q = 0; q < SALT_COUNT; q++)
        xb_num(w, b, row, k++, s->salt_kg[q]);
    xb_num(w, b, row, k++, s->water_formed_kg);
    xb_num(w, b, row, k++, s->acid_wt_pct_after);
    xb_num(w, b, row, k++, s->heat_kj);
    xb_num(w, b, row, k++, s->temp_rise_k);
    xb_num(w, b, row, k++, s->liquor_temp_c_after);
    xb_num(w, b, row, k++, s->heat_kw);
    xb_flag(w, b, row, k++, s->too_hot);
    xb_num(w, b, row, k++, s->sulfite_oxidised_mol);
    xb_num(w, b, row, k++, s->breakthrough_mol);
    xb_flag(w, b, row, k++, s->exhausted);
}

/* Run ids joined with ", " into buf; a long list is cut with an ellipsis. */
static void xo_join_ids(const struct ledger *l, const int *runs, int n, char *buf, size_t cap)
{
    size_t used = 0;
    buf[0] = '\0';
    for (int j = 0; j < n; j++) {
        int ri = runs[j];
        const char *id = ri >= 0 && ri < l->nruns && l->runs[ri].id ? l->runs[ri].id : "?";
        size_t len = strlen(id);
        if (used + len + 6 >= cap) {
            memcpy(buf + used, "...", 4);
            return;
        }
        if (used) {
            memcpy(buf + used, ", ", 2);
            used += 2;
        }
        memcpy(buf + used, id, len + 1);
        used += len;
    }
}

static void row_unit(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    const struct ledger *l = w->l;
    const struct ledger_scrubber *u = &l->scrubbers[i];
    const struct scrub_unit_out *s = &u->out;
    int k = 0;
    xb_text(w, b, row, k++, u->id);
    xb_num(w, b, row, k++, u->rated_acid_kmol_h);
    xb_num(w, b, row, k++, s->peak_acid_kmol_h);
    if (s->nhours > 0)
        xb_date(w, b, row, k, s->peak_at_min);
    k++;
    char ids[400];
    xo_join_ids(l, s->peak_runs, s->npeak_runs, ids, sizeof ids);
    xb_text(w, b, row, k++, ids);
    xb_num(w, b, row, k++, s->peak_instant_kmol_h);
    if (s->npeak_instant_runs > 0)
        xb_date(w, b, row, k, s->peak_instant_at_min);
    k++;
    xo_join_ids(l, s->peak_instant_runs, s->npeak_instant_runs, ids, sizeof ids);
    xb_text(w, b, row, k++, ids);
    xb_flag(w, b, row, k++, s->overloaded);
    xb_num(w, b, row, k++, s->changeouts);
    xb_num(w, b, row, k++, s->naoh_kg);
    xb_num(w, b, row, k++, s->makeup_kg);
    xb_num(w, b, row, k++, s->heat_kj);
    xb_num(w, b, row, k++, s->max_liquor_temp_c);
}

static void row_column(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    (void)i;
    const struct ledger *l = w->l;
    while (b->cur < l->nscrubbers && !l->scrubbers[b->cur].out.column.present)
        b->cur++;
    if (b->cur >= l->nscrubbers)
        return;
    const struct ledger_scrubber *u = &l->scrubbers[b->cur++];
    const struct scrub_column_check *c = &u->out.column;
    int k = 0;
    xb_text(w, b, row, k++, u->id);
    xb_num(w, b, row, k++, c->gas_kmol_h);
    xb_num(w, b, row, k++, c->y_in);
    xb_num(w, b, row, k++, c->y_out);
    xb_num(w, b, row, k++, c->ntu);
    xb_num(w, b, row, k++, c->height_m);
    xb_num(w, b, row, k++, c->diameter_m);
    xb_num(w, b, row, k++, c->flood_velocity_m_s);
    xb_num(w, b, row, k++, c->flow_parameter);
}

static void row_hour(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    (void)i;
    const struct ledger *l = w->l;
    while (b->cur < l->nscrubbers && b->sub >= l->scrubbers[b->cur].out.nhours) {
        b->cur++;
        b->sub = 0;
    }
    if (b->cur >= l->nscrubbers)
        return;
    const struct ledger_scrubber *u = &l->scrubbers[b->cur];
    int h = b->sub++;
    xb_text(w, b, row, 0, u->id);
    xb_date(w, b, row, 1, u->out.hour0_min + 60 * (int64_t)h);
    xb_num(w, b, row, 2, scrub_hourly_kmol_h(&u->out, h));
    xb_num(w, b, row, 3, u->rated_acid_kmol_h);
}

static void xo_scrubber(struct xw *w)
{
    const struct ledger *l = w->l;
    if (!xo_sheet(w, "Scrubber"))
        return;
    int nliq = 0, ncol = 0, nh = 0;
    for (int i = 0; i < l->nruns; i++)
        nliq += l->runs[i].scrubber != NULL;
    for (int u = 0; u < l->nscrubbers; u++) {
        ncol += l->scrubbers[u].out.column.present != 0;
        nh += l->scrubbers[u].out.nhours;
    }
    struct xblock b[4] = {
        {.fn = row_liquor, .nrows = nliq, .empty_note = "No run is routed to a scrubber."},
        {.fn = row_unit, .nrows = l->nscrubbers, .empty_note = "No scrubber defined."},
        {.fn = row_column, .nrows = ncol, .empty_note = "No scrubber gives packing data.",
         .notes = {"Screening check only (NTU for gas-film control, flooding from a generalized",
                   "pressure-drop correlation): a final column design needs review and sign-off",
                   "by a licensed engineer, with the vendor's packing data."},
         .nnotes = 3},
        {.fn = row_hour, .nrows = nh, .empty_note = "No acid-gas load."}};
    struct xblock *a = &b[0];
    xb_col(a, XK_TEXT, 0, "Scrubber");
    xb_col(a, XK_TEXT, 0, "Run");
    xb_col(a, XK_DATE, 0, "Start (plant time)");
    xb_col(a, XK_TEXT, 0, "Fresh liquor before run");
    xb_col(a, XK_RATE, 0, "Vent gas to scrubber [kmol/h]");
    xb_col(a, XK_KG, 1, "NaOH used [kg]");
    xb_col(a, XK_KG, 0, "NaOH left [kg]");
    xb_col(a, XK_KG, 0, "Liquor after run [kg]");
    xb_col(a, XK_PCT, 0, "NaOH after run [wt%%]");
    for (int q = 0; q < SALT_COUNT; q++)
        xb_col(a, XK_KG, 0, "%s net change [kg]", xo_salt[q]);
    xb_col(a, XK_KG, 0, "Water formed [kg]");
    xb_col(a, XK_PCT, 0, "HCl in water liquor [wt%%]");
    xb_col(a, XK_HEAT, 1, "Heat released [kJ]");
    xb_col(a, XK_TEMP, 0, "Liquor temperature rise [K]");
    xb_col(a, XK_TEMP, 0, "Liquor temperature after run, no cooling [°C]");
    xb_col(a, XK_RATE, 0, "Heat duty over the vent window [kW]");
    xb_col(a, XK_TEXT, 0, "Cooling needed");
    xb_col(a, XK_MOL, 0, "Sulfite oxidised by hypohalite [mol]");
    xb_col(a, XK_MOL, 0, "Gas left unneutralised [mol]");
    xb_col(a, XK_TEXT, 0, "Below minimum NaOH");
    struct xblock *u = &b[1];
    xb_col(u, XK_TEXT, 0, "Scrubber");
    xb_col(u, XK_RATE, 0, "Rated capacity [kmol/h]");
    xb_col(u, XK_RATE, 0, "Peak hourly mean load [kmol/h]");
    xb_col(u, XK_DATE, 0, "Peak hour start (plant time)");
    xb_col(u, XK_TEXT, 0, "Runs in the peak hour");
    xb_col(u, XK_RATE, 0, "Peak instantaneous load [kmol/h]");
    xb_col(u, XK_DATE, 0, "Instantaneous peak from (plant time)");
    xb_col(u, XK_TEXT, 0, "Runs venting at the instantaneous peak");
    xb_col(u, XK_TEXT, 0, "Overloaded (instantaneous peak over rating)");
    xb_col(u, XK_INT, 1, "Changeouts [count]");
    xb_col(u, XK_KG, 1, "NaOH consumed [kg]");
    xb_col(u, XK_KG, 1, "Caustic make-up [kg]");
    xb_col(u, XK_HEAT, 1, "Heat released [kJ]");
    xb_col(u, XK_TEMP, 0, "Hottest liquor, no cooling [°C]");
    struct xblock *c = &b[2];
    xb_col(c, XK_TEXT, 0, "Column check");
    xb_col(c, XK_RATE, 0, "Gas flow [kmol/h]");
    xb_col(c, XK_SCI, 0, "Acid gas in [mol/mol]");
    xb_col(c, XK_SCI, 0, "Acid gas out [mol/mol]");
    xb_col(c, XK_PCT, 0, "Transfer units NTU [1]");
    xb_col(c, XK_LEN, 0, "Packed height [m]");
    xb_col(c, XK_LEN, 0, "Diameter [m]");
    xb_col(c, XK_LEN, 0, "Flooding velocity [m/s]");
    xb_col(c, XK_RATE, 0, "Flow parameter [1]");
    struct xblock *h = &b[3];
    xb_col(h, XK_TEXT, 0, "Scrubber (hourly)");
    xb_col(h, XK_DATE, 0, "Hour start (plant time)");
    xb_col(h, XK_RATE, 0, "Acid gas load [kmol/h]");
    xb_col(h, XK_RATE, 0, "Rated capacity [kmol/h]");
    xb_place(b, 4);
    xo_blocks(w, b, 4);
}

/* --- Orders -------------------------------------------------------------- */

static void row_order(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    const struct ord_line *d = &w->l->orders[i];
    char mt[32];
    xo_month_text(d->month_index, mt, sizeof mt);
    int k = 0;
    xb_text(w, b, row, k++, mt);
    xb_text(w, b, row, k++, xo_item(d->item));
    xb_num(w, b, row, k++, d->demand_kg);
    xb_num(w, b, row, k++, d->stock_start_kg);
    xb_num(w, b, row, k++, d->safety_kg);
    xb_num(w, b, row, k++, d->to_order_kg);
    xb_text(w, b, row, k++, d->container ? d->container : "(none defined)");
    xb_num(w, b, row, k++, d->net_kg);
    xb_num(w, b, row, k++, d->heel_kg);
    xb_num(w, b, row, k++, d->containers);
    xb_num(w, b, row, k++, d->ordered_usable_kg);
    xb_num(w, b, row, k++, d->stock_end_kg);
    xb_date(w, b, row, k++, d->first_use_min);
    xb_date(w, b, row, k++, d->order_by_min);
    xb_flag(w, b, row, k++, d->late);
    xb_text(w, b, row, k++, d->no_container ? "no container defined for this item" : NULL);
}

static void xo_orders(struct xw *w)
{
    if (!xo_sheet(w, "Orders"))
        return;
    struct xblock b = {.fn = row_order, .nrows = w->l->norders, .empty_note = "Nothing to order."};
    xb_col(&b, XK_TEXT, 0, "Month");
    xb_col(&b, XK_TEXT, 0, "Item");
    /* no totals row: the lines mix reagents and caustic, whose sum means nothing */
    xb_col(&b, XK_KG, 0, "Demand [kg]");
    xb_col(&b, XK_KG, 0, "Stock at month start [kg]");
    xb_col(&b, XK_KG, 0, "Safety stock [kg]");
    xb_col(&b, XK_KG, 0, "To order [kg]");
    xb_col(&b, XK_TEXT, 0, "Container");
    xb_col(&b, XK_KG, 0, "Container net [kg]");
    xb_col(&b, XK_KG, 0, "Heel left in container [kg]");
    xb_col(&b, XK_INT, 0, "Containers [count]");
    xb_col(&b, XK_KG, 0, "Usable content ordered [kg]");
    xb_col(&b, XK_KG, 0, "Stock at month end [kg]");
    xb_col(&b, XK_DATE, 0, "First use (plant time)");
    xb_col(&b, XK_DAY, 0, "Order by (date)");
    xb_col(&b, XK_TEXT, 0, "Late");
    xb_col(&b, XK_TEXT, 0, "Note");
    xb_place(&b, 1);
    xo_blocks(w, &b, 1);
}

/* --- Waste --------------------------------------------------------------- */

static void row_waste_run(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    const struct ledger_run *r = &w->l->runs[i];
    const struct bal_out *o = &r->bal;
    double retained = 0;
    for (int s = 0; s < VS_COUNT; s++)
        retained += xo_vent_kg(o->retained_mol, s);
    int k = 0;
    xb_text(w, b, row, k++, r->id);
    xb_date(w, b, row, k++, r->start_min);
    xb_text(w, b, row, k++, xo_item(r->reagent));
    xb_num(w, b, row, k++, o->succinimide_kg);
    xb_num(w, b, row, k++, o->reagent_left_kg);
    xb_num(w, b, row, k++, o->overhal_kg);
    xb_num(w, b, row, k++, o->isomer_kg);
    xb_num(w, b, row, k++, o->unreacted_substrate_kg);
    xb_num(w, b, row, k++, retained);
}

static void row_spent(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    (void)i;
    const struct ledger *l = w->l;
    while (b->cur < l->nscrubbers && b->sub >= l->scrubbers[b->cur].out.nspent) {
        b->cur++;
        b->sub = 0;
    }
    if (b->cur >= l->nscrubbers)
        return;
    const struct ledger_scrubber *u = &l->scrubbers[b->cur];
    const struct scrub_spent *s = &u->out.spent[b->sub++];
    int k = 0;
    xb_text(w, b, row, k++, u->id);
    xb_date(w, b, row, k++, s->at_min);
    xb_text(w, b, row, k++, s->final ? "yes (campaign end)" : "no");
    xb_num(w, b, row, k++, s->mass_kg);
    xb_num(w, b, row, k++, s->naoh_kg);
    xb_num(w, b, row, k++, s->water_kg);
    xb_num(w, b, row, k++, s->hcl_kg);
    for (int q = 0; q < SALT_COUNT; q++)
        xb_num(w, b, row, k++, s->salt_kg[q]);
}

static void xo_waste(struct xw *w)
{
    const struct ledger *l = w->l;
    if (!xo_sheet(w, "Waste"))
        return;
    int ns = 0;
    for (int u = 0; u < l->nscrubbers; u++)
        ns += l->scrubbers[u].out.nspent;
    struct xblock b[2] = {
        {.fn = row_waste_run, .nrows = l->nruns, .empty_note = "No runs."},
        {.fn = row_spent, .nrows = ns, .empty_note = "No spent liquor."}};
    struct xblock *a = &b[0];
    xb_col(a, XK_TEXT, 0, "Run");
    xb_col(a, XK_DATE, 0, "Start (plant time)");
    xb_col(a, XK_TEXT, 0, "Reagent");
    xb_col(a, XK_KG, 1, "Succinimide (solid) [kg]");
    xb_col(a, XK_KG, 1, "Unreacted reagent left in mass [kg]");
    xb_col(a, XK_KG, 1, "Over-halogenated products [kg]");
    xb_col(a, XK_KG, 1, "Isomer products [kg]");
    xb_col(a, XK_KG, 1, "Unreacted substrate [kg]");
    xb_col(a, XK_KG, 1, "Acid retained in mass [kg]");
    struct xblock *s = &b[1];
    xb_col(s, XK_TEXT, 0, "Spent liquor from");
    xb_col(s, XK_DATE, 0, "Drained (plant time)");
    xb_col(s, XK_TEXT, 0, "Still in unit");
    xb_col(s, XK_KG, 1, "Liquor [kg]");
    xb_col(s, XK_KG, 1, "NaOH left [kg]");
    xb_col(s, XK_KG, 1, "Water [kg]");
    xb_col(s, XK_KG, 1, "HCl [kg]");
    for (int q = 0; q < SALT_COUNT; q++)
        xb_col(s, XK_KG, 1, "%s [kg]", xo_salt[q]);
    s->notes[0] = "Hypochlorite/hypobromite liquor releases halogen with acid: never mix with acid waste.";
    s->nnotes = 1;
    xb_place(b, 2);
    xo_blocks(w, b, 2);
}

/* --- Monthly ------------------------------------------------------------- */

enum { MC_RUNS = 1, MC_PRODUCT, MC_ISO, MC_OVER, MC_UNR, MC_REAGENT, /* RG_COUNT columns */
       MC_VENT = MC_REAGENT + RG_COUNT, MC_NAOH = MC_VENT + VS_COUNT, MC_CHANGE, MC_SPENT,
       MC_SUCC, MC_LEFT, MC_RET, MC_NCOL };

static void row_month(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    const struct ledger_month *m = &w->l->months[i];
    char mt[32];
    xo_month_text(m->month_index, mt, sizeof mt);
    xb_text(w, b, row, 0, mt);
    xb_num(w, b, row, MC_RUNS, m->runs);
    xb_num(w, b, row, MC_PRODUCT, m->product_kg);
    xb_num(w, b, row, MC_ISO, m->isomer_kg);
    xb_num(w, b, row, MC_OVER, m->overhal_kg);
    xb_num(w, b, row, MC_UNR, m->unreacted_substrate_kg);
    for (int g = 0; g < RG_COUNT; g++)
        xb_num(w, b, row, MC_REAGENT + g, m->reagents_kg[g]);
    for (int s = 0; s < VS_COUNT; s++)
        xb_num(w, b, row, MC_VENT + s, m->vent_kg[s]);
    xb_num(w, b, row, MC_NAOH, m->naoh_kg);
    xb_num(w, b, row, MC_CHANGE, m->changeouts);
    xb_num(w, b, row, MC_SPENT, m->spent_liquor_kg);
    xb_num(w, b, row, MC_SUCC, m->succinimide_kg);
    xb_num(w, b, row, MC_LEFT, m->reagent_left_kg);
    xb_num(w, b, row, MC_RET, m->retained_acid_kg);
}

/* A chart over columns cols[] of the month rows (plain numbers, never the totals row). */
static void xo_chart(struct xw *w, const struct xblock *b, uint8_t type, const char *title,
                     const int *cols, int ncols, lxw_row_t at_row, lxw_col_t at_col)
{
    if (w->st != HL_OK)
        return;
    lxw_chart *ch = workbook_add_chart(w->wb, type);
    if (!ch) {
        xo_fail(w, HL_ERR_NOMEM, "cannot add the chart '%s'", title);
        return;
    }
    lxw_row_t last = (lxw_row_t)b->nrows;
    for (int i = 0; i < ncols; i++) {
        lxw_chart_series *s = chart_add_series(ch, NULL, NULL);
        if (!s) {
            xo_fail(w, HL_ERR_NOMEM, "cannot add a chart series");
            return;
        }
        chart_series_set_categories(s, "Monthly", 1, 0, last, 0);
        chart_series_set_values(s, "Monthly", 1, (lxw_col_t)cols[i], last, (lxw_col_t)cols[i]);
        chart_series_set_name_range(s, "Monthly", 0, (lxw_col_t)cols[i]);
        if (type == LXW_CHART_LINE)
            chart_series_set_marker_type(s, LXW_CHART_MARKER_CIRCLE);
    }
    chart_title_set_name(ch, title);
    chart_axis_set_name(ch->y_axis, "kg per month");
    chart_axis_set_name(ch->x_axis, "Month");
    chart_legend_set_position(ch, LXW_CHART_LEGEND_BOTTOM);
    lxw_chart_options opt = {.x_scale = 1.2, .y_scale = 1.2, .description = (char *)title};
    xo_check(w, worksheet_insert_chart_opt(w->ws, at_row, at_col, ch, &opt), at_row, at_col);
}

static void xo_monthly(struct xw *w)
{
    const struct ledger *l = w->l;
    if (!xo_sheet(w, "Monthly"))
        return;
    struct xblock b = {.fn = row_month, .nrows = l->nmonths, .empty_note = "No months."};
    xb_col(&b, XK_TEXT, 0, "Month");
    xb_col(&b, XK_INT, 1, "Runs [count]");
    xb_col(&b, XK_KG, 1, "Wanted product [kg]");
    xb_col(&b, XK_KG, 1, "Isomer losses [kg]");
    xb_col(&b, XK_KG, 1, "Over-halogenated [kg]");
    xb_col(&b, XK_KG, 1, "Unreacted substrate [kg]");
    for (int g = 0; g < RG_COUNT; g++)
        xb_col(&b, XK_KG, 1, g == RG_NAOH ? "Caustic make-up bought [kg]" : "%s charged [kg]",
               xo_item(g));
    for (int s = 0; s < VS_COUNT; s++)
        xb_col(&b, XK_KG, 1, "%s to scrubber [kg]", xo_vent(s));
    xb_col(&b, XK_KG, 1, "NaOH consumed [kg]");
    xb_col(&b, XK_INT, 1, "Changeouts [count]");
    xb_col(&b, XK_KG, 1, "Spent liquor [kg]");
    xb_col(&b, XK_KG, 1, "Succinimide [kg]");
    xb_col(&b, XK_KG, 1, "Reagent left in mass [kg]");
    xb_col(&b, XK_KG, 1, "Acid retained in mass [kg]");
    xb_place(&b, 1);
    xo_blocks(w, &b, 1);
    if (w->st != HL_OK || l->nmonths == 0)
        return;
    /* series only for what the campaign has; at least one so no chart is empty */
    int acid[VS_COUNT], na = 0, rg[RG_CHARGEABLE], nr = 0;
    for (int s = 0; s < VS_COUNT; s++)
        if (b.sum[MC_VENT + s] != 0)
            acid[na++] = MC_VENT + s;
    for (int g = 0; g < RG_CHARGEABLE; g++)
        if (b.sum[MC_REAGENT + g] != 0)
            rg[nr++] = MC_REAGENT + g;
    if (na == 0)
        acid[na++] = MC_VENT + VS_HCL;
    if (nr == 0)
        rg[nr++] = MC_REAGENT;
    int caustic[2] = {MC_NAOH, MC_REAGENT + RG_NAOH};
    lxw_row_t at = (lxw_row_t)(b.nrows + 3);
    /* stacked, not side by side: the month columns are narrow, so charts placed a few
     * columns apart would cover each other (each is about 18 rows tall at this scale) */
    xo_chart(w, &b, LXW_CHART_COLUMN, "Acid gas to the scrubbers", acid, na, at, 0);
    xo_chart(w, &b, LXW_CHART_COLUMN, "Halogen reagents charged", rg, nr, at + 19, 0);
    xo_chart(w, &b, LXW_CHART_LINE, "Caustic: consumed and bought", caustic, 2, at + 38, 0);
}

/* --- Cautions ------------------------------------------------------------ */

static lxw_row_t xo_caution_rows(struct xw *w)
{
    const struct ledger *l = w->l;
    static const char *const head[5] = {"Substance", "CAS number", "Topic", "Detail", "Source"};
    for (int c = 0; c < 5; c++)
        xo_text(w, 0, (lxw_col_t)c, head[c], w->head);
    lxw_row_t row = 1;
    int any = 0;
    for (int ca = 0; ca < CA_COUNT && w->st == HL_OK; ca++) {
        const struct caution_info *c = caution_get(ca);
        if (!(l->cautions_mask >> ca & 1u) || !c)
            continue;
        any = 1;
        const char *topics[3] = {"Main hazards", "Incompatible with", "Protective equipment"};
        const char *texts[3] = {c->hazards, c->incompatible, c->ppe};
        for (int k = 0; k < c->nlimits && k < 4; k++, row++) {
            char topic[80];
            snprintf(topic, sizeof topic, "Exposure limit: %s", c->limits[k].kind ? c->limits[k].kind : "");
            xo_text(w, row, 0, c->substance, w->bold);
            xo_text(w, row, 1, c->cas, NULL);
            xo_text(w, row, 2, topic, NULL);
            xo_text(w, row, 3, c->limits[k].value, w->wrap);
            xo_text(w, row, 4, c->limits[k].source, NULL);
        }
        for (int k = 0; k < 3; k++, row++) {
            xo_text(w, row, 0, c->substance, w->bold);
            xo_text(w, row, 1, c->cas, NULL);
            xo_text(w, row, 2, topics[k], NULL);
            xo_text(w, row, 3, texts[k], w->wrap);
        }
        xo_text(w, row, 0, c->substance, w->bold);
        xo_text(w, row, 2, "Before use", NULL);
        xo_text(w, row, 3, caution_deferral(), w->wrap);
        row += 2;
    }
    if (!any) {
        xo_text(w, row++, 0, "No substance of the caution table is in play.", w->note);
        xo_text(w, row, 2, "Before use", NULL);
        xo_text(w, row, 3, caution_deferral(), w->wrap);
        row++;
    }
    return row;
}

static void xo_cautions(struct xw *w)
{
    if (!xo_sheet(w, "Cautions"))
        return;
    w->dry = 1;
    lxw_row_t last = xo_caution_rows(w);
    w->dry = 0;
    worksheet_freeze_panes(w->ws, 1, 0);
    xo_check(w, worksheet_autofilter(w->ws, 0, 0, last, 4), 0, 0);
    xo_caution_rows(w);
    if (w->st != HL_OK)
        return;
    const double wd[5] = {w->width[0] + 2, w->width[1] + 2, w->width[2] + 2, 70, w->width[4] + 2};
    for (int c = 0; c < 5 && w->st == HL_OK; c++)
        xo_check(w, worksheet_set_column(w->ws, (lxw_col_t)c, (lxw_col_t)c,
                                         wd[c] > 62 && c != 3 ? 62 : wd[c], NULL), 0, (lxw_col_t)c);
}

/* --- Assumptions --------------------------------------------------------- */

static void row_assumption(struct xw *w, struct xblock *b, lxw_row_t row, int i)
{
    const struct ledger_assumption *a = &w->l->assumptions[i];
    xb_text(w, b, row, 0, a->what);
    if (a->has_value) {
        xb_num(w, b, row, 1, a->value);
        xb_text(w, b, row, 2, a->unit && *a->unit ? a->unit : "dimensionless");
    } else {
        xb_text(w, b, row, 2, a->unit); /* a text-only assumption: no number to show */
    }
    xb_text(w, b, row, 3, a->origin);
}

static void xo_assumptions(struct xw *w)
{
    if (!xo_sheet(w, "Assumptions"))
        return;
    struct xblock b = {.fn = row_assumption, .nrows = w->l->nassumptions,
                       .empty_note = "No assumptions recorded."};
    xb_col(&b, XK_TEXT, 0, "What");
    xb_col(&b, XK_GEN, 0, "Value");
    xb_col(&b, XK_TEXT, 0, "Unit");
    xb_col(&b, XK_TEXT, 0, "Origin");
    xb_place(&b, 1);
    xo_blocks(w, &b, 1);
}

/* --- workbook ------------------------------------------------------------ */

static int xo_formats(struct xw *w)
{
    for (int k = 0; k < XK_COUNT; k++)
        for (int t = 0; t < 2; t++) {
            lxw_format *f = workbook_add_format(w->wb);
            if (!f)
                return 0;
            if (xo_numfmt[k])
                format_set_num_format(f, xo_numfmt[k]);
            if (t) {
                format_set_bold(f);
                format_set_top(f, LXW_BORDER_THIN);
            }
            w->fmt[k][t] = f;
        }
    if (!(w->head = workbook_add_format(w->wb)) || !(w->title = workbook_add_format(w->wb)) ||
        !(w->wrap = workbook_add_format(w->wb)) || !(w->bold = workbook_add_format(w->wb)) ||
        !(w->top = workbook_add_format(w->wb)) || !(w->bold_top = workbook_add_format(w->wb)) ||
        !(w->note = workbook_add_format(w->wb)))
        return 0;
    format_set_bold(w->head);
    format_set_text_wrap(w->head);
    format_set_align(w->head, LXW_ALIGN_VERTICAL_TOP);
    format_set_bottom(w->head, LXW_BORDER_MEDIUM);
    format_set_bold(w->title);
    format_set_font_size(w->title, 13);
    format_set_text_wrap(w->wrap);
    format_set_align(w->wrap, LXW_ALIGN_VERTICAL_TOP);
    format_set_align(w->top, LXW_ALIGN_VERTICAL_TOP);
    format_set_bold(w->bold_top);
    format_set_align(w->bold_top, LXW_ALIGN_VERTICAL_TOP);
    format_set_bold(w->bold);
    format_set_italic(w->note);
    return 1;
}

static double xo_cells(const struct ledger *l)
{
    double n = 80.0 * l->nruns;
    for (int i = 0; i < l->nruns; i++)
        n += 10.0 * l->runs[i].bal.nproducts;
    for (int u = 0; u < l->nscrubbers; u++)
        n += 4.0 * l->scrubbers[u].out.nhours;
    return n;
}

enum hl_status xlsx_out_write_opt(const struct ledger *l, const char *path, int stream,
                                  struct hl_err *e)
{
    enum hl_status st = afile_check_target(path, e);
    if (st)
        return st;
    char *tmp = NULL, *dir = NULL;
    st = afile_tmpname(path, &tmp, e); /* creates the file: an unwritable folder fails here */
    if (st == HL_OK)
        st = afile_dirname(path, &dir, e);
    if (st != HL_OK) {
        if (tmp)
            unlink(tmp);
        hl_free(tmp);
        return st;
    }
    int fd;
    struct xw *w = hl_calloc(1, sizeof *w);
    if (!w) {
        unlink(tmp);
        hl_free(tmp);
        hl_free(dir);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    w->l = l;
    w->e = e;
    lxw_workbook_options opt = {
        .constant_memory = (uint8_t)(stream > 0 || (stream < 0 && xo_cells(l) > XO_STREAM_CELLS)),
        .tmpdir = dir, .use_zip64 = LXW_FALSE};
    w->wb = workbook_new_opt(tmp, &opt);
    if (!w->wb) {
        st = hl_err_set(e, HL_ERR_NOMEM, "cannot start the workbook %s", path);
        goto fail_nowb;
    }
    char title[256];
    int chars;
    snprintf(title, sizeof title, "%s", l->title ? xo_clean(w, l->title, &chars) : "haloledger ledger");
    lxw_doc_properties props = {.title = title, .subject = "Halogenation campaign mass-balance ledger",
                                .comments = "Written by haloledger",
                                .created = l->created_min > 0 ? (time_t)(l->created_min * 60)
                                                              : (time_t)XO_FIXED_EPOCH};
    if (!xo_formats(w))
        xo_fail(w, HL_ERR_NOMEM, "cannot add cell formats");
    if (w->st == HL_OK)
        xo_check(w, workbook_set_properties(w->wb, &props), 0, 0);
    xo_summary(w);
    xo_runs(w);
    xo_products(w);
    xo_scrubber(w);
    xo_orders(w);
    xo_waste(w);
    xo_monthly(w);
    xo_cautions(w);
    xo_assumptions(w);
    if (w->st != HL_OK) {
        st = w->st;
        lxw_workbook_free(w->wb); /* frees without writing the file */
        goto fail_nowb;
    }
    errno = 0;
    lxw_error err = workbook_close(w->wb); /* also frees the workbook */
    if (err != LXW_NO_ERROR) {
        int en = errno;
        st = hl_err_set(e, HL_ERR_IO, "cannot write %s: %s%s%s", path, lxw_strerror(err),
                        en ? ": " : "", en ? strerror(en) : "");
        goto fail_nowb;
    }
    hl_free(w);
    hl_free(dir);
    /* the library does not fsync: do it so a crash after rename cannot leave an empty file */
    fd = open(tmp, O_RDONLY | O_CLOEXEC);
    if (fd < 0 || (fsync(fd) != 0 && errno != EINVAL)) {
        st = hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(errno));
        if (fd >= 0)
            close(fd);
        unlink(tmp);
        hl_free(tmp);
        return st;
    }
    close(fd);
    st = afile_commit(tmp, path, e);
    hl_free(tmp);
    return st;

fail_nowb:
    unlink(tmp);
    hl_free(w);
    hl_free(tmp);
    hl_free(dir);
    return st;
}

enum hl_status xlsx_out_write(const struct ledger *l, const char *path, struct hl_err *e)
{
    return xlsx_out_write_opt(l, path, -1, e);
}

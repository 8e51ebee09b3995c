/*
 * xlsx_out.c - the spreadsheet ledger (see xlsx_out.h).
 *
 * Layout.  One table per sheet: one header row (frozen with the id column,
 * filtered, repeated on every printed page), units in square brackets in each
 * numeric header, an optional totals row of =SUM() formulas whose value
 * computed here is cached in the cell, and only over like things (one
 * substance, one gas, energy): never a sum over different products or
 * reagents.  Every sheet is written strictly in row order, so the same code
 * works in libxlsxwriter's constant_memory mode, which a very large ledger
 * needs (a cell costs ~100 bytes in the default mode); a row's height is set
 * while the row is still the current one (the library keeps the current row
 * open until a cell of a later row arrives).
 *
 * Paper.  Landscape on the campaign's paper (report.paper); a sheet whose
 * columns fit about one page width is fitted to one page wide, a wider one
 * runs across as many pages as it needs, across then down, with the header
 * row and the id column repeated.  Header and footer on every page carry the
 * site, the campaign title, the sheet, "page N of M" and the ledger's issue
 * date.  Alarm cells carry a text marker ("!!" alarm, "!" notice) and a
 * conditional format of the palette in DEVELOPERS.md, so they stand out on
 * screen and survive black-and-white printing.
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
#include "ltable.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <limits.h>
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
/* Width of a column holding long wrapped text, in character widths. */
#define XO_WRAP_W 62.0
/* Height of one line of the default 11 pt font, in points (common practice: Excel's 15). */
#define XO_LINE_PT 15.0

/* Formats of the number kinds (enum lt_kind, ltable.h).  Digits shown follow what a value
 * means: kg to 0.1 kg, mol to 0.01 mol, rates to 0.001 kmol/h, temperatures to 0.1 K, heat
 * to 1 kJ, heat rates to 0.1 kW, yields and other mole percentages to 0.1 % (LT_PCT1: the
 * value is the percentage itself, so the cell reads as the JSON ledger's *_pct); LT_GEN (the
 * Assumptions values) shows four significant figures, picked per value from xo_sigfmt. */
static const char *const xo_numfmt[LT_NKIND] = {
    NULL, "yyyy-mm-dd hh:mm", "yyyy-mm-dd", "#,##0", "#,##0.0", "#,##0.00", "0.0%", "0.00%",
    "0.00", "0.000", "0.0", "#,##0", "0.0E+00", "0.00", "0.00", NULL, "0.0", "#,##0.0"};
static const int xo_decimals[LT_NKIND] = {0, 0, 0, 0, 1, 2, 1, 2, 2, 3, 1, 0, 0, 2, 2, 4, 1, 1};
#define XO_NSIG 8 /* 0..6 decimals, then scientific */
static const char *const xo_sigfmt[XO_NSIG] = {"#,##0", "0.0", "0.00", "0.000", "0.0000",
                                               "0.00000", "0.000000", "0.000E+00"};

#define xo_salt(k) (liquor_salt_get(k)->name) /* the salt table (liquor.c) */

/* Alarm levels of a column: its cells begin with the marker when raised. */
enum xa { XA_NONE, XA_ALARM, XA_NOTICE };
static const char *const xo_marker[3] = {"", "!!", "!"};

struct xcol { char head[96]; enum lt_kind kind; int total; enum xa alarm; };

struct xw;
struct xtable;
typedef void (*xrow_fn)(struct xw *, struct xtable *, lxw_row_t row, int i);

struct xtable {
    struct xcol cols[48]; int ncols;
    int nrows;                 /* data rows (after capping at the sheet limit) */
    int omitted;               /* data rows dropped at the sheet limit */
    xrow_fn fn;
    int cur, sub;              /* cursor for row functions that walk nested lists */
    const char *empty_note;    /* shown when there are no data rows */
    const char *notes[3]; int nnotes;
    double sum[48];
    double fixw[48];           /* fixed column widths (0 = from content), for wrapped text */
    const struct lt_table *lt; /* the column list the sheet shows (xo_lt_table), or NULL */
    int at[48], item[48];      /* its entry of each column, and the entry's member */
};

#define XO_NSAME (2 * LT_NKIND + XO_NSIG + 1)
#define XO_NCANON 256                  /* power of two, above every format made */
struct xw {
    const struct ledger *l;
    lxw_workbook *wb;
    lxw_worksheet *ws;
    const char *sheet;
    enum hl_status st;
    struct hl_err *e;
    lxw_format *fmt[LT_NKIND][2], *sig[XO_NSIG], *head, *title, *wrap, *bold, *note, *top,
        *bold_top, *section, *sign, *dxf[3], *noted;
    double width[XO_MAXCOL];
    double fixw[XO_MAXCOL];    /* fixed widths of this sheet (0 = from content) */
    int maxcol;
    int row_lines;             /* wrapped lines the current row needs */
    struct xtable *tab;        /* table whose row is being written (for sums) */
    char caustic[48];          /* basis of the caustic bought: "50 wt% NaOH" (xo_caustic_basis) */
    /* Formats made by the same calls (xo_formats: like numbers in like columns) are one style
     * to the library, which finds a copy's index through a hash of the whole format, with a
     * malloc and a free, at every cell: a copy is written as the one of its group that holds
     * the index (xo_canon), which gives the same index and the same bytes. */
    lxw_format *same[XO_NSAME]; int same_group[XO_NSAME]; int nsame;
    struct { lxw_format *f, *c; } canon[XO_NCANON];
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

/* --- formats ------------------------------------------------------------- */

/* The format to hand to the library for f: f itself once it holds its style's index, the
 * member of its group (xo_formats) that holds it, else f (no index yet: the library gives
 * one when the row is flushed; nothing here asks for an index, so none is given earlier or
 * to another format than before). Resolved pairs are remembered in w->canon. */
static lxw_format *xo_canon(struct xw *w, lxw_format *f)
{
    if (!f)
        return f;
    size_t h = ((uintptr_t)f >> 4) & (XO_NCANON - 1);
    for (size_t n = 0; n < XO_NCANON && w->canon[h].f; n++, h = (h + 1) & (XO_NCANON - 1))
        if (w->canon[h].f == f)
            return w->canon[h].c;
    lxw_format *c = f->xf_index != LXW_PROPERTY_UNSET ? f : NULL;
    for (int i = 0; !c && i < w->nsame; i++) {
        if (w->same[i] != f)
            continue;
        for (int j = 0; j < w->nsame && !c; j++)
            if (w->same_group[j] == w->same_group[i] && w->same[j]->xf_index != LXW_PROPERTY_UNSET)
                c = w->same[j];
        break;
    }
    if (!c)
        return f;
    if (!w->canon[h].f) { /* the table has room for every format; a full one only misses */
        w->canon[h].f = f;
        w->canon[h].c = c;
    }
    return c;
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
        int bad = n == 0 || (p[i] < 0x20 && p[i] != '\t' && p[i] != '\n') || p[i] == 0x7F;
        int cut = o + (n ? n : 1) > XO_STR_MAX;
        if ((bad || cut) && !changed) { /* the first change: the text so far is s itself */
            memcpy(w->clean, s, i);
            changed = 1;
        }
        if (cut)
            break;
        if (bad) {
            w->clean[o++] = n == 0 ? '?' : ' ';
            i += n ? (size_t)n : 1;
            line++;
            continue;
        }
        if (p[i] == '\n') {
            longest = line > longest ? line : longest;
            line = -1;
        }
        if (changed) /* a clean text is only copied once it differs */
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

/* Lines a text needs when wrapped at word boundaries in a column `width` characters
 * wide (greedy, as spreadsheet programs wrap; two characters kept free for the cell
 * padding and the proportional font's widest letters).  UTF-8 continuation bytes do
 * not count. */
static int xo_lines(const char *s, double width)
{
    int cap = (int)width - 1, lines = 1, used = 0, word = 0;
    if (cap < 4)
        cap = 4;
    for (const unsigned char *p = (const unsigned char *)s;; p++) {
        if (*p == ' ' || *p == '\n' || *p == '\0') {
            if (word > 0) {
                if (used > 0 && used + 1 + word > cap) {
                    lines++;
                    used = 0;
                }
                used += (used > 0) + word;
                while (used > cap) { /* a word longer than the line breaks inside */
                    lines++;
                    used -= cap;
                }
            }
            word = 0;
            if (*p == '\0')
                break;
            if (*p == '\n') {
                lines++;
                used = 0;
            }
        } else if ((*p & 0xC0) != 0x80) {
            word++;
        }
    }
    return lines;
}

static double xo_colw(const struct xw *w, lxw_col_t col)
{
    return col < XO_MAXCOL && w->fixw[col] > 0 ? w->fixw[col] : XO_WRAP_W;
}

static void xo_text(struct xw *w, lxw_row_t row, lxw_col_t col, const char *s, lxw_format *f)
{
    if (w->st != HL_OK || !s || !*s)
        return;
    int chars;
    const char *t = xo_clean(w, s, &chars);
    /* a long unformatted text (a warning, a note) wraps in its capped column instead of
     * running across the neighbours, on screen and on paper */
    if (!f && (chars > 60 || (col < XO_MAXCOL && w->fixw[col] > 0 && chars > w->fixw[col])))
        f = w->wrap;
    if (!f)
        f = w->top; /* top-aligned, so a row made tall by a wrapped neighbour reads level */
    if (f == w->wrap || f == w->noted) {
        int n = xo_lines(t, xo_colw(w, col));
        if (n > w->row_lines)
            w->row_lines = n;
    }
    /* worksheet_write_string never makes a formula, whatever the first character */
    xo_check(w, worksheet_write_string(w->ws, row, col, t, xo_canon(w, f)), row, col);
    if (f != w->wrap && f != w->head && f != w->noted)
        xo_widen(w, col, chars > 60 ? 60 : chars);
}

/* Close the current row: give it the height its wrapped cells need.  The library keeps
 * the current row open in constant_memory mode, so this may follow the row's cells. */
static void xo_end_row(struct xw *w, lxw_row_t row)
{
    if (w->st == HL_OK && w->row_lines > 1)
        xo_check(w, worksheet_set_row(w->ws, row, XO_LINE_PT * w->row_lines + 3, NULL), row, 0);
    w->row_lines = 0;
}

static double xo_num_chars(enum lt_kind k, double v)
{
    switch (k) {
    case LT_DATE: return 16;
    case LT_DAY: return 10;
    case LT_SCI: return 8;
    case LT_FRAC: case LT_MOLFRAC: return 8;
    default: break;
    }
    double a = fabs(v);
    int digits = a < 1 ? 1 : (int)floor(log10(a)) + 1;
    int commas = (k == LT_INT || k == LT_KG || k == LT_MOL || k == LT_HEAT || k == LT_KW)
                     ? (digits - 1) / 3 : 0;
    int dec = xo_decimals[k];
    if (k == LT_GEN && (a >= 1e10 || (a > 0 && a < 1e-4)))
        return 10;
    return digits + commas + dec + (dec ? 1 : 0) + (v < 0);
}

static void xo_num(struct xw *w, lxw_row_t row, lxw_col_t col, enum lt_kind k, double v, int bold,
                   const char *what)
{
    if (w->st != HL_OK)
        return;
    if (!isfinite(v)) {
        char cell[16];
        lxw_rowcol_to_cell(cell, row, col);
        xo_fail(w, HL_ERR_INTERNAL, "non-finite value for '%s' (sheet %s cell %s)", what,
                w->sheet, cell);
        return;
    }
    lxw_format *f = w->fmt[k][bold];
    if (k == LT_GEN) { /* four significant figures: decimals from the magnitude */
        double a = fabs(v);
        int d = a == 0 ? 0 : 3 - (int)floor(log10(a));
        f = (a != 0 && (a < 1e-4 || a >= 1e9)) ? w->sig[XO_NSIG - 1]
                                                : w->sig[d < 0 ? 0 : d > 6 ? 6 : d];
    }
    xo_check(w, worksheet_write_number(w->ws, row, col, v + 0.0, xo_canon(w, f)), row, col);
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
    xo_num(w, row, col, date_only ? LT_DAY : LT_DATE, serial, 0, "date");
}

static void xo_sum(struct xw *w, lxw_row_t row, lxw_col_t col, lxw_row_t r0, lxw_row_t r1,
                   enum lt_kind k, double cached)
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
    xo_check(w, worksheet_write_formula_num(w->ws, row, col, formula, xo_canon(w, w->fmt[k][1]),
                                            cached + 0.0),
             row, col);
    xo_widen(w, col, xo_num_chars(k, cached));
}

/* --- tables ---------------------------------------------------------------- */

static void xt_col(struct xtable *b, enum lt_kind kind, int total, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
static void xt_col(struct xtable *b, enum lt_kind kind, int total, const char *fmt, ...)
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
    c->alarm = XA_NONE;
}

/* Cell k of the current row of table b. */
static void xt_num(struct xw *w, struct xtable *b, lxw_row_t row, int k, double v)
{
    if (k >= b->ncols)
        return;
    xo_num(w, row, (lxw_col_t)k, b->cols[k].kind, v, 0, b->cols[k].head);
    if (b->cols[k].total)
        b->sum[k] += v;
}

static void xt_text(struct xw *w, struct xtable *b, lxw_row_t row, int k, const char *s)
{
    if (k < b->ncols)
        xo_text(w, row, (lxw_col_t)k, s, NULL);
}

static void xt_date(struct xw *w, struct xtable *b, lxw_row_t row, int k, int64_t min)
{
    if (k < b->ncols)
        xo_date(w, row, (lxw_col_t)k, min, b->cols[k].kind == LT_DAY);
}

static void xt_flag(struct xw *w, struct xtable *b, lxw_row_t row, int k, int v)
{
    xt_text(w, b, row, k, v ? "yes" : "no");
}

/* An alarm cell: the column's marker and the raised text, or "no". */
static void xt_raise(struct xw *w, struct xtable *b, lxw_row_t row, int k, int v, const char *raised)
{
    if (k >= b->ncols)
        return;
    char buf[96];
    snprintf(buf, sizeof buf, "%s %s", xo_marker[b->cols[k].alarm], raised);
    xt_text(w, b, row, k, v ? buf : "no");
}

static int xt_has_totals(const struct xtable *b)
{
    for (int k = 0; k < b->ncols; k++)
        if (b->cols[k].total)
            return b->nrows > 0;
    return 0;
}

static void xt_cap(struct xtable *b)
{
    int max = (int)LXW_ROW_MAX - 8;
    if (b->nrows > max) {
        b->omitted = b->nrows - max;
        b->nrows = max;
    }
}

/* Header/footer text may carry user text: '&' is the codes' escape, so it is doubled;
 * a doubled '&' before 'G' would still read as the picture code "&G" to the library, and
 * one before "[Picture]" as the long form it rewrites to "&G" (libxlsxwriter 1.1.4 then
 * refuses the header for want of an image and frees the string twice: a crash found by
 * tests/fuzz/fuzz_workbook), so a zero-width space separates '&&' from 'G' and from '['.
 * Cut to `room` bytes on a character boundary. */
static void xo_hf_text(char *out, size_t room, const char *s)
{
    size_t o = 0;
    for (const unsigned char *p = (const unsigned char *)(s ? s : ""); *p; p++) {
        int n = xo_utf8_len(p);
        const char *piece = (const char *)p;
        size_t len = n ? (size_t)n : 1;
        if (*p == '&')
            piece = p[1] == 'G' || p[1] == '[' ? "&&\xE2\x80\x8B" : "&&", len = strlen(piece);
        else if (n == 0 || *p < 0x20)
            piece = " ", len = 1;
        if (o + len + 1 > room)
            break;
        memcpy(out + o, piece, len);
        o += len;
        if (n > 1)
            p += n - 1;
    }
    out[o] = '\0';
}

/* Landscape on the campaign's paper, header and footer on every page. */
static void xo_page(struct xw *w)
{
    const struct ledger *l = w->l;
    worksheet_set_landscape(w->ws);
    worksheet_set_paper(w->ws, l->paper_letter ? 1 : 9); /* 1 = US Letter, 9 = A4 */
    worksheet_set_margins(w->ws, 0.5, 0.5, 0.75, 0.75);
    char site[100], title[100], date[24] = "", hf[LXW_HEADER_FOOTER_MAX + 1];
    xo_hf_text(site, sizeof site, l->site ? l->site : "");
    static const char what_if[] = " - WHAT-IF (--set: see Assumptions)";
    /* a what-if says so on every printed page (its --set values are on Assumptions) */
    xo_hf_text(title, sizeof title - (l->noverrides ? sizeof what_if : 0),
               l->title ? l->title : "haloledger ledger");
    if (l->noverrides)
        strcat(title, what_if);
    /* &L &C &R: left, centre, right sections; &A the sheet, &P the page, &N the pages */
    /* &B toggles bold: a font code &"..." would be misread when the title holds a quote */
    snprintf(hf, sizeof hf, "&L%s&C&B%s&B&R&A", site, title);
    xo_check(w, worksheet_set_header(w->ws, hf), 0, 0);
    if (l->created_min != 0)
        isodate_format(l->created_min, 1, date, sizeof date);
    snprintf(hf, sizeof hf, "&LLedger issued %s&CPlanning estimates: see Cautions&RPage &P of &N",
             *date ? date : "(no issue date: campaign key \"issued\")");
    xo_check(w, worksheet_set_footer(w->ws, hf), 0, 0);
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
    memset(w->fixw, 0, sizeof w->fixw);
    w->maxcol = 0;
    w->row_lines = 0;
    xo_page(w);
    return w->st == HL_OK;
}

/* Printed width of the sheet's columns against the page: a sheet up to a third wider
 * than the page is fitted to one page wide (at >= 75 %, still readable); a wider one
 * prints at full size across as many pages as it needs. */
static void xo_fit(struct xw *w, double total_chars)
{
    /* printable width in column-width characters: paper 297 mm (A4) / 279.4 mm (Letter)
     * less 2 x 0.5 in margins; one character of the default font is 7 px at 96 px/in
     * plus 5 px cell padding (the OOXML column-width definition, ECMA-376 part 1,
     * 18.3.1.13) */
    double mm = (w->l->paper_letter ? 279.4 : 297.0) - 25.4;
    double page = (mm / 25.4 * 96.0 - 5.0) / 7.0;
    if (total_chars <= page * 1.33) {
        worksheet_fit_to_pages(w->ws, 1, 0);
    } else {
        worksheet_print_across(w->ws);
        xo_check(w, worksheet_repeat_columns(w->ws, 0, 0), 0, 0);
    }
}

/* Column widths from content, header words and a 3-line wrapped header; then the fit. */
static void xo_widths(struct xw *w, const struct xtable *b)
{
    for (int k = 0; b && k < b->ncols; k++) {
        const char *h = b->cols[k].head;
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
        double need = longest > len / 2.6 ? longest : len / 2.6;
        xo_widen(w, (lxw_col_t)k, need);
    }
    double total = 0;
    for (int c = 0; c <= w->maxcol && c < XO_MAXCOL && w->st == HL_OK; c++) {
        double wd = w->fixw[c] > 0 ? w->fixw[c] : w->width[c] > 0 ? w->width[c] + 2 : 3;
        if (wd > XO_WRAP_W && w->fixw[c] <= 0)
            wd = XO_WRAP_W;
        total += wd;
        xo_check(w, worksheet_set_column(w->ws, (lxw_col_t)c, (lxw_col_t)c, wd, NULL), 0,
                 (lxw_col_t)c);
    }
    xo_fit(w, total);
}

/* Conditional formats of the alarm columns over the data rows. */
static void xo_alarm_formats(struct xw *w, const struct xtable *b)
{
    for (int k = 0; k < b->ncols && w->st == HL_OK && b->nrows > 0; k++) {
        enum xa a = b->cols[k].alarm;
        if (a == XA_NONE)
            continue;
        lxw_conditional_format cf = {.type = LXW_CONDITIONAL_TYPE_TEXT,
                                     .criteria = LXW_CONDITIONAL_CRITERIA_TEXT_BEGINS_WITH,
                                     .value_string = (char *)xo_marker[a], .format = w->dxf[a]};
        xo_check(w, worksheet_conditional_format_range(w->ws, 1, (lxw_col_t)k, (lxw_row_t)b->nrows,
                                                       (lxw_col_t)k, &cf), 1, (lxw_col_t)k);
    }
}

/* The rows after the data: totals, empty note, omitted rows, notes. */
static void xo_table_tail(struct xw *w, struct xtable *x, lxw_row_t row)
{
    if (xt_has_totals(x)) {
        if (x->cols[0].kind == LT_TEXT)
            xo_text(w, row, 0, "Total", w->bold);
        for (int k = 0; k < x->ncols; k++)
            if (x->cols[k].total)
                xo_sum(w, row, (lxw_col_t)k, 1, (lxw_row_t)x->nrows, x->cols[k].kind, x->sum[k]);
        row++;
    }
    if (x->nrows == 0)
        xo_text(w, row++, 0, x->empty_note ? x->empty_note : "(none)", w->note);
    if (x->omitted > 0) {
        char msg[160];
        snprintf(msg, sizeof msg, "%d further row%s omitted at the sheet row limit; "
                 "the JSON ledger carries them all.", x->omitted, x->omitted == 1 ? "" : "s");
        xo_text(w, row++, 0, msg, w->note);
    }
    for (int at = 0; at < x->nnotes; at++)
        xo_text(w, row++, 0, x->notes[at], w->note);
}

/* A sheet holding one table, strictly in row order: header, data, tail. */
static void xo_table(struct xw *w, const char *name, struct xtable *x)
{
    if (!xo_sheet(w, name))
        return;
    for (int k = 0; k < x->ncols && k < XO_MAXCOL; k++)
        w->fixw[k] = x->fixw[k];
    xt_cap(x);
    /* header row: three wrapped lines; set before any cell (constant_memory order) */
    xo_check(w, worksheet_set_row(w->ws, 0, 3 * XO_LINE_PT + 1, NULL), 0, 0);
    worksheet_freeze_panes(w->ws, 1, 1);
    worksheet_gridlines(w->ws, LXW_SHOW_ALL_GRIDLINES);
    xo_check(w, worksheet_repeat_rows(w->ws, 0, 0), 0, 0);
    xo_check(w, worksheet_autofilter(w->ws, 0, 0, (lxw_row_t)x->nrows, (lxw_col_t)(x->ncols - 1)), 0, 0);
    for (int k = 0; k < x->ncols; k++)
        xo_text(w, 0, (lxw_col_t)k, x->cols[k].head, w->head);
    w->row_lines = 0;
    w->tab = x;
    for (int r = 0; r < x->nrows && w->st == HL_OK; r++) {
        x->fn(w, x, (lxw_row_t)(r + 1), r);
        xo_end_row(w, (lxw_row_t)(r + 1));
    }
    xo_table_tail(w, x, (lxw_row_t)(x->nrows + 1));
    xo_alarm_formats(w, x);
    if (w->st == HL_OK)
        xo_widths(w, x);
}

/* --- shared names -------------------------------------------------------- */

static const char *xo_vent(int vs)
{
    const char *n = vent_name(vs);
    return n ? n : "gas";
}

/* Run ids of a list of run indices, ", "-separated, cut with "..." to fit cap. */
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

/* --- sheets of a column list (ltable.h) ------------------------------------ */

/* The format of a text cell of column c holding v (ltable.h lt_style). */
static lxw_format *xo_style(struct xw *w, const struct lt_col *c, const struct lt_val *v)
{
    switch (v->style != LT_S_COL ? v->style : c->style) {
    case LT_S_WRAP: return w->wrap;
    case LT_S_TOP: return w->top;
    case LT_S_BOLD_TOP: return w->bold_top;
    case LT_S_COL: break;
    }
    return NULL;
}

/* Cell k of the current row: value v of column c, as ltable.h describes. */
static void xt_value(struct xw *w, struct xtable *b, lxw_row_t row, int k, const struct lt_col *c,
                     const struct lt_val *v)
{
    const char *s;
    char ids[1000];
    switch (v->t) {
    case LT_V_ABSENT: case LT_V_BAD: break; /* LT_V_BAD: the JSON writer refuses it; blank here */
    case LT_V_NULL: /* JSON null: the value's own text, the column's, or a blank */
        s = v->text ? v->text : c->none;
        if (s && k < b->ncols)
            xo_text(w, row, (lxw_col_t)k, s, xo_style(w, c, v));
        break;
    case LT_V_NUM: xt_num(w, b, row, k, v->num); break;
    case LT_V_TEXT:
        s = !*v->text && v->shown ? v->shown : v->text;
        if (k < b->ncols)
            xo_text(w, row, (lxw_col_t)k, s, xo_style(w, c, v));
        break;
    case LT_V_DATE: xt_date(w, b, row, k, v->min); break;
    case LT_V_BOOL:
        if (b->cols[k].alarm == XA_NONE)
            xt_flag(w, b, row, k, v->on);
        else
            xt_raise(w, b, row, k, v->on, v->text ? v->text : c->raised ? c->raised : "yes");
        break;
    case LT_V_RUNS:
        xo_join_ids(w->l, v->runs, v->nruns, ids, c->cap > 0 && c->cap <= 1000 ? (size_t)c->cap : 400);
        xt_text(w, b, row, k, ids);
        break;
    }
}

/* Sheet row `row` from record i, row j of list t, whose column k shows member item[k] of
 * entry at[k]. */
static void xo_lt_row(struct xw *w, struct xtable *b, const struct lt_table *t, const int *at,
                      const int *item, lxw_row_t row, int i, int j)
{
    struct lt_val v;
    for (int k = 0; k < b->ncols && w->st == HL_OK; k++) {
        lt_get(t, at[k], item[k], w->l, i, j, &v);
        xt_value(w, b, row, k, &t->cols[at[k]], &v);
    }
}

/* Row `row` of a column-list sheet: record i, or with nested rows the next (record, row)
 * of the cursor (cur, sub). */
static void row_lt(struct xw *w, struct xtable *b, lxw_row_t row, int i)
{
    const struct ledger *l = w->l;
    const struct lt_table *t = b->lt;
    int j = 0;
    if (t->nsub) {
        int n = t->count(l);
        while (b->cur < n && b->sub >= t->nsub(l, b->cur)) {
            b->cur++;
            b->sub = 0;
        }
        if (b->cur >= n)
            return;
        i = b->cur;
        j = b->sub++;
    }
    xo_lt_row(w, b, t, b->at, b->item, row, i, j);
}

/* The columns of list t's sheet into b (headers, kinds, totals, alarms, widths), its rows
 * row_lt's; 0 when the list gives no column order. */
static int xo_lt_cols(struct xw *w, const struct lt_table *t, struct xtable *b)
{
    int n = lt_sheet_order(t, b->at, b->item, (int)(sizeof b->at / sizeof b->at[0]));
    if (n < 0) {
        xo_fail(w, HL_ERR_INTERNAL, "the column list of sheet %s gives no column order", t->sheet);
        return 0;
    }
    b->lt = t;
    b->fn = row_lt;
    b->nrows = lt_nrows(t, w->l);
    for (int k = 0; k < n; k++) {
        const struct lt_col *c = &t->cols[b->at[k]];
        char head[96];
        lt_head(c, b->item[k], w->l, head, sizeof head);
        xt_col(b, c->kind, (c->flags & LT_TOTAL) != 0, "%s", head);
        b->cols[k].alarm = c->flags & LT_ALARM ? XA_ALARM : c->flags & LT_NOTICE ? XA_NOTICE : XA_NONE;
        b->fixw[k] = c->width;
    }
    return 1;
}

/* The sheet of column list t: its columns, rows and widths from the list; empty note and
 * notes from b. */
static void xo_lt_table(struct xw *w, const struct lt_table *t, struct xtable *b)
{
    if (xo_lt_cols(w, t, b))
        xo_table(w, t->sheet, b);
}

/* --- Summary ------------------------------------------------------------- */
/* A one-page form, not a table: the campaign, its key figures month by month, the
 * scrubber peaks, the alarms, the orders to place, a sign-off block and the safety
 * notice.  Months after the sixth are left to the Monthly sheet so the page stays one. */

#define XS_MONTHS 6

struct xsum { struct xw *w; lxw_row_t row; int nm; lxw_col_t note; };

static void xs_text(struct xsum *s, const char *item, const char *value, const char *note)
{
    xo_text(s->w, s->row, 0, item, s->w->wrap);
    xo_text(s->w, s->row, 1, value, NULL);
    xo_text(s->w, s->row, s->note, note, s->w->noted);
    xo_end_row(s->w, s->row++);
}

static void xs_num(struct xsum *s, const char *item, enum lt_kind kind, double v, const char *note)
{
    xo_text(s->w, s->row, 0, item, s->w->wrap);
    xo_num(s->w, s->row, 1, kind, v, 0, item);
    xo_text(s->w, s->row, s->note, note, s->w->noted);
    xo_end_row(s->w, s->row++);
}

/* A section title row; `cols` (may be NULL) labels the value columns. */
static void xs_section(struct xsum *s, const char *title, const char *const *cols, int ncols,
                       const char *note)
{
    s->row++; /* one blank row before */
    for (lxw_col_t c = 0; c <= s->note && s->w->st == HL_OK; c++) /* the rule runs across */
        xo_check(s->w, worksheet_write_blank(s->w->ws, s->row, c, s->w->section), s->row, c);
    xo_text(s->w, s->row, 0, title, s->w->section);
    for (int c = 0; c < ncols; c++)
        xo_text(s->w, s->row, (lxw_col_t)(1 + c), cols[c], s->w->section);
    xo_text(s->w, s->row, s->note, note, s->w->section);
    s->row++;
}

/* An alarm row: a count and a status cell with the marker when raised. */
static void xs_alarm(struct xsum *s, enum xa level, const char *item, int n, const char *raised)
{
    char status[160];
    snprintf(status, sizeof status, "%s %s", xo_marker[level], raised);
    xo_text(s->w, s->row, 0, item, s->w->wrap);
    xo_num(s->w, s->row, 1, LT_INT, n, 0, item);
    xo_text(s->w, s->row, s->note, n ? status : "none", s->w->noted);
    xo_end_row(s->w, s->row++);
}

static void xs_identity(struct xsum *s)
{
    struct xw *w = s->w;
    const struct ledger *l = w->l;
    xo_check(w, worksheet_set_row(w->ws, 0, 24, NULL), 0, 0);
    xo_text(w, 0, 0, l->title ? l->title : "(untitled campaign)", w->title);
    s->row = 1;
    xs_text(s, "Site", l->site ? l->site : "(not given)", NULL);
    char p[64] = "no runs";
    if (l->nruns > 0) {
        int64_t first = l->runs[0].start_min, last = first;
        for (int i = 0; i < l->nruns; i++) {
            const struct ledger_run *r = &l->runs[i];
            int64_t end = r->start_min + (isfinite(r->feed_h) && fabs(r->feed_h) < 1e9
                                              ? (int64_t)llround(r->feed_h * 60.0) : 0);
            if (r->start_min < first) first = r->start_min;
            if (end > last) last = end;
        }
        char a[24], b[24];
        isodate_format(first, 0, a, sizeof a);
        isodate_format(last, 0, b, sizeof b);
        snprintf(p, sizeof p, "%s to %s", a, b);
    }
    xs_text(s, "Period (plant time)", p, "first run start to last feed end");
    char d[24] = "(not dated)";
    if (l->created_min != 0)
        isodate_format(l->created_min, 1, d, sizeof d);
    xs_text(s, "Ledger issued", d, l->created_min ? NULL : "campaign key \"issued\" fixes the date");
    xs_text(s, "Campaign file", l->file, NULL);
}

/* One row of month figures: v(m) for the first nm months. */
typedef double (*xs_month_fn)(const struct ledger_month *m, int arg);
static double xs_m_runs(const struct ledger_month *m, int a) { (void)a; return m->runs; }
static double xs_m_reagent(const struct ledger_month *m, int a) { return m->reagents_kg[a]; }
static double xs_m_vent(const struct ledger_month *m, int a) { return m->vent_kg[a]; }
static double xs_m_naoh(const struct ledger_month *m, int a) { (void)a; return m->naoh_kg; }
static double xs_m_change(const struct ledger_month *m, int a) { (void)a; return m->changeouts; }
static double xs_m_spent(const struct ledger_month *m, int a) { (void)a; return m->spent_liquor_kg; }
static double xs_m_succ(const struct ledger_month *m, int a) { (void)a; return m->succinimide_kg; }
static double xs_m_water(const struct ledger_month *m, int a) { (void)a; return m->dilution_water_kg; }

static void xs_month_row(struct xsum *s, const char *item, enum lt_kind kind, xs_month_fn fn, int arg,
                         int skip_zero)
{
    const struct ledger *l = s->w->l;
    int any = 0;
    for (int m = 0; m < l->nmonths; m++)
        any |= fn(&l->months[m], arg) != 0;
    if (skip_zero && !any)
        return;
    xo_text(s->w, s->row, 0, item, s->w->wrap);
    for (int m = 0; m < s->nm; m++)
        xo_num(s->w, s->row, (lxw_col_t)(1 + m), kind, fn(&l->months[m], arg), 0, item);
    xo_end_row(s->w, s->row++);
}

static void xs_months(struct xsum *s)
{
    const struct ledger *l = s->w->l;
    char names[XS_MONTHS][32];
    const char *cols[XS_MONTHS];
    for (int m = 0; m < s->nm; m++) {
        isodate_month_text(l->months[m].month_index, names[m], sizeof names[m]);
        cols[m] = names[m];
    }
    xs_section(s, "Key figures by month", cols, s->nm,
               l->nmonths > s->nm ? "later months: Monthly sheet" : NULL);
    char item[96];
    xs_month_row(s, "Runs [count]", LT_INT, xs_m_runs, 0, 0);
    for (int g = 0; g < RG_CHARGEABLE; g++) {
        snprintf(item, sizeof item, "%s charged [kg]", lt_item_name(g));
        xs_month_row(s, item, LT_KG, xs_m_reagent, g, 1);
    }
    for (int v = 0; v < VS_COUNT; v++) {
        snprintf(item, sizeof item, "%s to scrubbers [kg]", xo_vent(v));
        xs_month_row(s, item, LT_KG, xs_m_vent, v, 1);
    }
    xs_month_row(s, "NaOH consumed, as 100 % [kg]", LT_KG, xs_m_naoh, 0, 0);
    snprintf(item, sizeof item, "Caustic solution bought, %s [kg]", s->w->caustic);
    xs_month_row(s, item, LT_KG, xs_m_reagent, RG_NAOH, 1);
    xs_month_row(s, "Dilution water for fresh charges [kg]", LT_KG, xs_m_water, 0, 1);
    xs_month_row(s, "Liquor changeouts [count]", LT_INT, xs_m_change, 0, 0);
    xs_month_row(s, "Spent liquor [kg]", LT_KG, xs_m_spent, 0, 1);
    xs_month_row(s, "Succinimide [kg]", LT_KG, xs_m_succ, 0, 1);
}

/* Month close: only when a month shown has a run with an actual. */
static double xs_m_done(const struct ledger_month *m, int a) { (void)a; return m->close.done; }
static double xs_m_cancel(const struct ledger_month *m, int a) { (void)a; return m->close.cancelled; }
static double xs_m_planned(const struct ledger_month *m, int a) { (void)a; return m->close.planned; }
static double xs_m_rplan(const struct ledger_month *m, int a) { return m->close.reagent_plan_kg[a]; }
static double xs_m_ract(const struct ledger_month *m, int a) { return m->close.reagent_actual_kg[a]; }
static double xs_m_unexp(const struct ledger_month *m, int a) { return m->close.unexplained_kg[a]; }
static double xs_m_pplan(const struct ledger_month *m, int a) { (void)a; return m->close.product_plan_kg; }
static double xs_m_pact(const struct ledger_month *m, int a) { (void)a; return m->close.product_actual_kg; }
static double xs_m_nplan(const struct ledger_month *m, int a) { (void)a; return m->close.naoh_plan_kg; }
static double xs_m_nact(const struct ledger_month *m, int a) { (void)a; return m->close.naoh_actual_kg; }

static void xs_close(struct xsum *s)
{
    const struct ledger *l = s->w->l;
    int any = 0;
    for (int m = 0; m < s->nm; m++)
        any |= l->months[m].close.done + l->months[m].close.cancelled > 0;
    if (!any)
        return;
    char names[XS_MONTHS][32];
    const char *cols[XS_MONTHS];
    for (int m = 0; m < s->nm; m++) {
        isodate_month_text(l->months[m].month_index, names[m], sizeof names[m]);
        cols[m] = names[m];
    }
    xs_section(s, "Month close (plan against actual of the runs with an actual)", cols, s->nm,
               "Plan vs actual, Stock checks sheets");
    xo_text(s->w, s->row, 0, "Month closed (no run still planned)", s->w->wrap);
    for (int m = 0; m < s->nm; m++)
        xo_text(s->w, s->row, (lxw_col_t)(1 + m), l->months[m].close.closed ? "yes" : "no", NULL);
    xo_end_row(s->w, s->row++);
    xs_month_row(s, "Runs done [count]", LT_INT, xs_m_done, 0, 0);
    xs_month_row(s, "Runs cancelled [count]", LT_INT, xs_m_cancel, 0, 0);
    xs_month_row(s, "Runs still planned [count]", LT_INT, xs_m_planned, 0, 0);
    char item[96];
    for (int g = 0; g < RG_CHARGEABLE; g++) {
        snprintf(item, sizeof item, "%s drawn, plan [kg]", lt_item_name(g));
        xs_month_row(s, item, LT_KG, xs_m_rplan, g, 1);
        snprintf(item, sizeof item, "%s drawn, actual [kg]", lt_item_name(g));
        xs_month_row(s, item, LT_KG, xs_m_ract, g, 1);
    }
    xs_month_row(s, "Wanted product, plan [kg]", LT_KG, xs_m_pplan, 0, 0);
    xs_month_row(s, "Wanted product, actual [kg]", LT_KG, xs_m_pact, 0, 0);
    xs_month_row(s, "NaOH consumed, as 100 %, plan [kg]", LT_KG, xs_m_nplan, 0, 0);
    xs_month_row(s, "NaOH consumed, as 100 %, actual [kg]", LT_KG, xs_m_nact, 0, 0);
    int flagged = 0;
    for (int i = 0; i < l->nstock_checks; i++)
        flagged += l->stock_checks[i].flagged;
    for (int g = 0; g < RG_CHARGEABLE; g++) {
        snprintf(item, sizeof item, "%s unexplained at stock counts [kg]", lt_item_name(g));
        xs_month_row(s, item, LT_KG, xs_m_unexp, g, 1);
    }
    if (flagged)
        xs_alarm(s, XA_ALARM, "Stock checks outside tolerance [count]", flagged,
                 "CHECK: see Stock checks and Warnings");
}

/* Routes shown on the Summary; more are left to the Monthly yields sheet. */
#define XS_ROUTES 5

static int xs_same_route(const struct ledger_month_product *a, const struct ledger_month_product *b)
{
    return a->reagent == b->reagent && strcmp(a->substrate ? a->substrate : "", b->substrate ? b->substrate : "") == 0 &&
           strcmp(a->wanted ? a->wanted : "", b->wanted ? b->wanted : "") == 0;
}

/* Yield per route and month: one row a route (substrate, reagent, wanted product) over the
 * months shown, blank in a month without that route. */
static void xs_yields(struct xsum *s)
{
    const struct ledger *l = s->w->l;
    const struct ledger_month_product *route[XS_ROUTES];
    int nr = 0, more = 0;
    for (int m = 0; m < s->nm; m++)
        for (int j = 0; j < l->months[m].nproducts; j++) {
            const struct ledger_month_product *p = &l->months[m].products[j];
            int k = 0;
            while (k < nr && !xs_same_route(route[k], p))
                k++;
            if (k < nr)
                continue;
            if (nr < XS_ROUTES)
                route[nr++] = p;
            else
                more = 1;
        }
    if (nr == 0)
        return;
    xs_section(s, "Yield of the wanted product by month", NULL, 0,
               more ? "conversion, selectivity, halogen efficiency and further routes: Monthly yields sheet"
                    : "conversion, selectivity, halogen efficiency: Monthly yields sheet");
    for (int k = 0; k < nr; k++) {
        const struct ledger_month_product *p = route[k];
        char item[200];
        snprintf(item, sizeof item, "Yield, %.60s + %s to %.40s [%%]",
                 p->substrate_name && *p->substrate_name ? p->substrate_name : p->substrate,
                 lt_item_name(p->reagent), p->wanted_formula);
        xo_text(s->w, s->row, 0, item, s->w->wrap);
        for (int m = 0; m < s->nm; m++)
            for (int j = 0; j < l->months[m].nproducts; j++)
                if (xs_same_route(&l->months[m].products[j], p))
                    xo_num(s->w, s->row, (lxw_col_t)(1 + m), LT_PCT1, l->months[m].products[j].yield_pct,
                           0, item);
        xo_end_row(s->w, s->row++);
    }
}

static void xs_scrubbers(struct xsum *s)
{
    const struct ledger *l = s->w->l;
    static const char *const value[1] = {"Value"};
    xs_section(s, "Scrubbers", value, 1, "Note");
    char item[128], note[200], at[24];
    for (int u = 0; u < l->nscrubbers; u++) {
        const struct ledger_scrubber *x = &l->scrubbers[u];
        const char *id = x->id ? x->id : "?";
        snprintf(at, sizeof at, "-");
        if (x->out.npeak_instant_runs > 0)
            isodate_format(x->out.peak_instant_at_min, 0, at, sizeof at);
        snprintf(note, sizeof note, "from %s; rated %.4g kmol/h%s", at, x->rated_acid_kmol_h,
                 x->out.overloaded ? "; !! OVER RATING" : "");
        snprintf(item, sizeof item, "Peak instantaneous load at %.60s [kmol/h]", id);
        xs_num(s, item, LT_RATE, x->out.peak_instant_kmol_h, note);
        snprintf(at, sizeof at, "-");
        if (x->out.nhours > 0)
            isodate_format(x->out.peak_at_min, 0, at, sizeof at);
        snprintf(note, sizeof note, "mean over the hour from %s", at);
        snprintf(item, sizeof item, "Peak hourly mean load at %.60s [kmol/h]", id);
        xs_num(s, item, LT_RATE, x->out.peak_acid_kmol_h, note);
        snprintf(at, sizeof at, "-");
        if (x->out.npeak_heat_runs > 0)
            isodate_format(x->out.peak_heat_at_min, 0, at, sizeof at);
        char ids[120];
        xo_join_ids(l, x->out.peak_heat_runs, x->out.npeak_heat_runs, ids, sizeof ids);
        snprintf(note, sizeof note, "from %s; run%s %s venting", at,
                 x->out.npeak_heat_runs == 1 ? "" : "s", x->out.npeak_heat_runs ? ids : "none");
        snprintf(item, sizeof item, "Peak heat release at %.60s [kW]", id);
        xs_num(s, item, LT_KW, x->out.peak_heat_kw, note);
        snprintf(item, sizeof item, "Hottest liquor at %.60s [°C]", id);
        xs_num(s, item, LT_TEMP, x->out.max_liquor_temp_c,
               x->out.too_hot_runs ? "!! cooling needed (no cooler modelled)"
                                   : "adiabatic, no cooler modelled");
    }
    if (l->nscrubbers == 0)
        xs_text(s, "No scrubber defined", NULL, NULL);
}

static void xs_alarms(struct xsum *s)
{
    const struct ledger *l = s->w->l;
    static const char *const count[1] = {"Count"};
    int over = 0, hot = 0, low = 0, late = 0, capped = 0;
    for (int u = 0; u < l->nscrubbers; u++) {
        over += l->scrubbers[u].out.overloaded != 0;
        hot += l->scrubbers[u].out.too_hot_runs;
    }
    for (int i = 0; i < l->nruns; i++) {
        low += l->runs[i].scrub.exhausted != 0;
        capped += l->runs[i].bal.capped != 0;
    }
    for (int i = 0; i < l->norders; i++)
        late += l->orders[i].late != 0;
    xs_section(s, "Alarms", count, 1, "Status");
    xs_alarm(s, XA_ALARM, "Scrubbers over their rating [count]", over, "OVER RATING: Scrubber units sheet");
    xs_alarm(s, XA_ALARM, "Runs needing liquor cooling [count]", hot, "TOO HOT: Liquor by run sheet");
    xs_alarm(s, XA_ALARM, "Runs taking liquor below its minimum NaOH [count]", low,
             "BELOW MINIMUM: Liquor by run sheet");
    xs_alarm(s, XA_ALARM, "Late orders [count]", late, "LATE: Orders sheet");
    xs_alarm(s, XA_NOTICE, "Runs capped by the substrate [count]", capped, "capped: Runs sheet");
    xs_num(s, "Warnings [count]", LT_INT, l->nwarnings, l->nwarnings ? "listed on the Warnings sheet" : "none");
}

static void xs_orders(struct xsum *s)
{
    const struct ledger *l = s->w->l;
    static const char *const count[1] = {"Containers"};
    xs_section(s, "Orders to place", count, 1, "Container, order by");
    int shown = 0, n = 0;
    for (int i = 0; i < l->norders; i++) {
        const struct ord_line *o = &l->orders[i];
        if (o->containers <= 0)
            continue;
        if (++n > XS_MONTHS)
            continue;
        char item[96], mt[32], by[24], note[200];
        isodate_month_text(o->month_index, mt, sizeof mt);
        isodate_format(o->order_by_min, 1, by, sizeof by);
        snprintf(item, sizeof item, "%s for %s [count]", lt_item_name(o->item), mt);
        snprintf(note, sizeof note, "%.60s, by %s%s", o->container ? o->container : "container", by,
                 o->late ? "; !! LATE" : "");
        xs_num(s, item, LT_INT, o->containers, note);
        shown++;
    }
    if (n == 0)
        xs_text(s, "Nothing to order", NULL, NULL);
    else if (n > shown)
        xs_text(s, "Further orders", NULL, "Orders sheet");
}

static void xs_signoff(struct xsum *s)
{
    struct xw *w = s->w;
    xs_section(s, "Sign-off", NULL, 0, NULL);
    static const char *const who[2] = {"Prepared by (name, signature)", "Checked by (name, signature)"};
    for (int k = 0; k < 2 && w->st == HL_OK; k++, s->row++) {
        xo_check(w, worksheet_set_row(w->ws, s->row, 30, NULL), s->row, 0);
        xo_text(w, s->row, 0, who[k], w->bold);
        for (lxw_col_t c = 1; c < s->note; c++)
            xo_check(w, worksheet_write_blank(w->ws, s->row, c, w->sign), s->row, c);
        xo_text(w, s->row, s->note, "Date:", w->sign);
    }
}

static const char xo_safety[] =
    "Safety notice: the figures in this workbook are planning estimates from simplified "
    "models. They do not replace the safety data sheet (SDS) of each substance, the local "
    "codes, permits and regulations of the site, or a review of vent, scrubber and "
    "handling arrangements by a licensed engineer. Confirm exposure limits and "
    "incompatibilities against the current SDS before any work.";

static void xo_summary(struct xw *w)
{
    if (!xo_sheet(w, "Summary"))
        return;
    const struct ledger *l = w->l;
    struct xsum s = {w, 0, l->nmonths < XS_MONTHS ? l->nmonths : XS_MONTHS, 0};
    s.note = (lxw_col_t)(1 + (s.nm > 1 ? s.nm : 1));
    w->fixw[0] = 44;
    for (int m = 1; m < s.note; m++)
        w->fixw[m] = s.nm > 1 ? 13 : 36;
    w->fixw[s.note] = 52;
    xs_identity(&s);
    xs_months(&s);
    xs_close(&s);
    xs_yields(&s);
    xs_scrubbers(&s);
    xs_alarms(&s);
    xs_orders(&s);
    xs_signoff(&s);
    s.row++;
    if (w->st != HL_OK)
        return;
    double wide = 0;
    for (lxw_col_t c = 1; c <= s.note; c++)
        wide += w->fixw[c];
    xo_text(w, s.row, 0, "Safety notice", w->bold_top);
    xo_check(w, worksheet_merge_range(w->ws, s.row, 1, s.row, s.note, xo_safety, w->wrap), s.row, 1);
    xo_check(w, worksheet_set_row(w->ws, s.row, XO_LINE_PT * xo_lines(xo_safety, wide) + 3, NULL),
             s.row, 0);
    for (lxw_col_t c = 0; c <= s.note && w->st == HL_OK; c++)
        xo_check(w, worksheet_set_column(w->ws, c, c, w->fixw[c], NULL), 0, c);
    /* the markers in the note column: "!!" alarm, "! " notice (rule 1 wins where both match) */
    lxw_conditional_format cf[2] = {
        {.type = LXW_CONDITIONAL_TYPE_TEXT, .criteria = LXW_CONDITIONAL_CRITERIA_TEXT_CONTAINING,
         .value_string = (char *)xo_marker[XA_ALARM], .format = w->dxf[XA_ALARM]},
        {.type = LXW_CONDITIONAL_TYPE_TEXT, .criteria = LXW_CONDITIONAL_CRITERIA_TEXT_BEGINS_WITH,
         .value_string = "! ", .format = w->dxf[XA_NOTICE]}};
    for (int k = 0; k < 2; k++)
        xo_check(w, worksheet_conditional_format_range(w->ws, 1, s.note, s.row, s.note, &cf[k]), 1,
                 s.note);
    worksheet_fit_to_pages(w->ws, 1, 1);
    worksheet_center_horizontally(w->ws);
}

/* --- Runs ---------------------------------------------------------------- */

static void xo_runs(struct xw *w)
{
    struct xtable b = {.empty_note = "No runs in the campaign."};
    xo_lt_table(w, &lt_runs, &b);
}

/* --- Products ------------------------------------------------------------ */

static void xo_products(struct xw *w)
{
    struct xtable b = {.empty_note = "No products."};
    xo_lt_table(w, &lt_run_products, &b);
}

/* --- Liquor by run ------------------------------------------------------- */

static void xo_liquor(struct xw *w)
{
    struct xtable a = {.empty_note = "No run is routed to a scrubber."};
    xo_lt_table(w, &lt_run_liquor, &a);
}

/* --- Scrubber units, hourly load, column check ---------------------------- */



static void xo_units(struct xw *w)
{
    struct xtable u = {.empty_note = "No scrubber defined."};
    xo_lt_table(w, &lt_scrubbers, &u);
}

static void xo_hours(struct xw *w)
{
    struct xtable h = {.empty_note = "No vent gas load."};
    xo_lt_table(w, &lt_scrubber_hourly, &h);
}

static void xo_column(struct xw *w)
{
    struct xtable c = {.empty_note = "No scrubber gives packing data.",
                       .notes = {"Screening check only (NTU for gas-film control, flooding from a generalized",
                                 "pressure-drop correlation): a final column design needs review and sign-off",
                                 "by a licensed engineer, with the vendor's packing data."},
                       .nnotes = 3};
    xo_lt_table(w, &lt_scrubber_column, &c);
}

/* --- Emissions (what leaves the stacks) ------------------------------------ */

static const char xo_emis_note[] =
    "Planning estimates of what leaves the stack: a permit is judged on measured emissions by the "
    "method the authority prescribes; the site's permit and local rules decide.";

static void xo_emis_runs(struct xw *w)
{
    struct xtable b = {.empty_note = "No runs.",
                       .notes = {xo_emis_note,
                                 "A run with no scrubber is not counted here (see Warnings)."},
                       .nnotes = 2};
    xo_lt_table(w, &lt_run_emissions, &b);
}

/* First hour after `after` with any emission from unit u (INT_MAX: none). */
static int xo_emis_next_hour(const struct scrub_unit_out *o, int after)
{
    int best = INT_MAX;
    for (int v = 0; v < VS_COUNT; v++) {
        const struct scrub_emis *m = &o->emis[v];
        int lo = 0, hi = m->nhourly;
        while (lo < hi) {
            int mid = lo + (hi - lo) / 2;
            if (m->hourly_hour[mid] <= after)
                lo = mid + 1;
            else
                hi = mid;
        }
        if (lo < m->nhourly && m->hourly_hour[lo] < best)
            best = m->hourly_hour[lo];
    }
    return best;
}

static int xo_emis_hours(const struct scrub_unit_out *o)
{
    int n = 0;
    for (int h = xo_emis_next_hour(o, -1); h != INT_MAX; h = xo_emis_next_hour(o, h))
        n++;
    return n;
}

/* Lowest hour-averaged kg/h permit limit of unit u and species v (0: none). */
static double xo_hour_limit(const struct ledger *l, int u, int v)
{
    double lim = 0;
    for (int k = 0; k < l->npermit_checks; k++) {
        const struct emis_check *x = &l->permit_checks[k];
        if (x->unit == u && x->species == v && x->kind == EMIS_KG_H && !x->averaging_day &&
            (lim == 0 || x->limit < lim))
            lim = x->limit;
    }
    return lim;
}

struct xo_emis_cols { int conc, nlim, lim_sp[VS_COUNT]; };

static struct xo_emis_cols xo_emis_layout(const struct ledger *l)
{
    struct xo_emis_cols c = {0, 0, {0}};
    for (int u = 0; u < l->nscrubbers; u++)
        c.conc |= l->emis && l->emis[u].stack_nm3_h > 0;
    for (int v = 0; v < VS_COUNT; v++) {
        int any = 0;
        for (int u = 0; u < l->nscrubbers; u++)
            any |= xo_hour_limit(l, u, v) > 0;
        if (any)
            c.lim_sp[c.nlim++] = v;
    }
    return c;
}

static void row_emis_hour(struct xw *w, struct xtable *b, lxw_row_t row, int i)
{
    (void)i;
    const struct ledger *l = w->l;
    int h = INT_MAX;
    while (b->cur < l->nscrubbers &&
           (h = xo_emis_next_hour(&l->scrubbers[b->cur].out, b->sub - 1)) == INT_MAX) {
        b->cur++;
        b->sub = 0;
    }
    if (b->cur >= l->nscrubbers)
        return;
    const struct ledger_scrubber *u = &l->scrubbers[b->cur];
    double stack = l->emis ? l->emis[b->cur].stack_nm3_h : 0;
    struct xo_emis_cols c = xo_emis_layout(l);
    b->sub = h + 1;
    int k = 0;
    xt_text(w, b, row, k++, u->id);
    xt_date(w, b, row, k++, u->out.hour0_min + 60 * (int64_t)h);
    for (int v = 0; v < VS_COUNT; v++)
        xt_num(w, b, row, k++, scrub_hourly_emis_kg_h(&u->out, v, h));
    for (int v = 0; v < VS_COUNT && c.conc; v++, k++)
        if (stack > 0)
            xt_num(w, b, row, k, emis_mg_nm3(scrub_hourly_emis_kg_h(&u->out, v, h), stack));
        else
            xt_text(w, b, row, k, "no stack flow");
    for (int j = 0; j < c.nlim; j++, k++) {
        double lim = xo_hour_limit(l, b->cur, c.lim_sp[j]);
        if (lim > 0)
            xt_num(w, b, row, k, lim);
    }
}

static void xo_emis_by_hour(struct xw *w)
{
    const struct ledger *l = w->l;
    int n = 0;
    for (int u = 0; u < l->nscrubbers; u++)
        n += xo_emis_hours(&l->scrubbers[u].out);
    struct xo_emis_cols c = xo_emis_layout(l);
    struct xtable b = {.fn = row_emis_hour, .nrows = n, .empty_note = "Nothing leaves the stacks.",
                       .notes = {xo_emis_note,
                                 "Hours with any emission only; each run's emission spread evenly over its "
                                 "vent window. mg/Nm3 = kg/h x 1e6 / stack gas flow (0 C, 101.325 kPa)."},
                       .nnotes = 2};
    xt_col(&b, LT_TEXT, 0, "Scrubber");
    xt_col(&b, LT_DATE, 0, "Hour start (plant time)");
    for (int v = 0; v < VS_COUNT; v++)
        xt_col(&b, LT_RATE, 0, "%s leaving the stack, mean over the hour [kg/h]", xo_vent(v));
    for (int v = 0; v < VS_COUNT && c.conc; v++)
        xt_col(&b, LT_TEMP, 0, "%s in the stack gas [mg/Nm3]", xo_vent(v));
    for (int j = 0; j < c.nlim; j++)
        xt_col(&b, LT_RATE, 0, "%s hourly permit limit [kg/h]", xo_vent(c.lim_sp[j]));
    xo_table(w, "Emissions by hour", &b);
}

static void xo_permits(struct xw *w)
{
    struct xtable b = {.empty_note = "The campaign gives no permits (campaign key permits[]).",
                       .notes = {xo_emis_note,
                                 "Worst clock hour or calendar-day mean against kg/h and mg/Nm3, worst "
                                 "calendar year against t/yr; the runs are those emitting the species then."},
                       .nnotes = 2};
    xo_lt_table(w, &lt_permit_checks, &b);
}

/* One line chart over rows r0..r1 of a sheet: categories in column 1, series in cols[]. */
static void xo_emis_chart(struct xw *w, const char *sheet, lxw_row_t r0, lxw_row_t r1,
                          const int *cols, int ncols, const char *title, const char *yname,
                          lxw_row_t at_row)
{
    if (w->st != HL_OK)
        return;
    lxw_chart *ch = workbook_add_chart(w->wb, LXW_CHART_LINE);
    if (!ch) {
        xo_fail(w, HL_ERR_NOMEM, "cannot add the chart '%s'", title);
        return;
    }
    for (int i = 0; i < ncols; i++) {
        lxw_chart_series *s = chart_add_series(ch, NULL, NULL);
        if (!s) {
            xo_fail(w, HL_ERR_NOMEM, "cannot add a chart series");
            return;
        }
        chart_series_set_categories(s, sheet, r0, 1, r1, 1);
        chart_series_set_values(s, sheet, r0, (lxw_col_t)cols[i], r1, (lxw_col_t)cols[i]);
        chart_series_set_name_range(s, sheet, 0, (lxw_col_t)cols[i]);
    }
    chart_title_set_name(ch, title);
    chart_axis_set_name(ch->y_axis, yname);
    chart_axis_set_name(ch->x_axis, "Hour start (plant time)");
    chart_legend_set_position(ch, LXW_CHART_LEGEND_BOTTOM);
    lxw_chart_options opt = {.x_scale = 1.6, .y_scale = 1.5, .description = (char *)title};
    xo_check(w, worksheet_insert_chart_opt(w->ws, at_row, 0, ch, &opt), at_row, 0);
}

/* Per scrubber: its hourly load against its rating (Hourly load rows) and what leaves its
 * stack against its hourly permit limits (Emissions by hour rows).  Two charts a unit: the
 * library has no secondary axis for kmol/h and kg/h on one chart. */
static void xo_emis_charts(struct xw *w)
{
    const struct ledger *l = w->l;
    if (!xo_sheet(w, "Emission charts"))
        return;
    xo_text(w, 0, 0, "Per scrubber: hourly load against its rating, and what leaves the stack "
            "against its hourly permit limits (planning estimates)", w->bold);
    enum { XO_CHART_ROWS = 30 };
    lxw_row_t breaks[64] = {0};
    int nc = 0, nb = 0;
    long load_row = 1, emis_row = 1, max_row = (long)LXW_ROW_MAX - 8;
    struct xo_emis_cols c = xo_emis_layout(l);
    for (int u = 0; u < l->nscrubbers && w->st == HL_OK; u++) {
        const struct ledger_scrubber *s = &l->scrubbers[u];
        int nh = s->out.nhours, ne = xo_emis_hours(&s->out);
        char title[160];
        if (nh > 0 && load_row + nh - 1 <= max_row) {
            const int cols[2] = {2, 3};
            snprintf(title, sizeof title, "%s: vent gas load by hour against the rating", s->id);
            if (nc > 0 && nb < 63)
                breaks[nb++] = (lxw_row_t)(nc * XO_CHART_ROWS);
            xo_emis_chart(w, "Hourly load", (lxw_row_t)load_row, (lxw_row_t)(load_row + nh - 1), cols,
                          2, title, "kmol/h", (lxw_row_t)(nc++ * XO_CHART_ROWS + 1));
        }
        if (ne > 0 && emis_row + ne - 1 <= max_row) {
            int cols[2 * VS_COUNT], n = 0;
            for (int v = 0; v < VS_COUNT; v++)
                if (s->out.emis[v].kg > 0)
                    cols[n++] = 2 + v;
            for (int j = 0; j < c.nlim; j++)
                if (xo_hour_limit(l, u, c.lim_sp[j]) > 0)
                    cols[n++] = 2 + VS_COUNT + (c.conc ? VS_COUNT : 0) + j;
            snprintf(title, sizeof title, "%s: leaving the stack by hour against the permit", s->id);
            if (nc > 0 && nb < 63)
                breaks[nb++] = (lxw_row_t)(nc * XO_CHART_ROWS);
            xo_emis_chart(w, "Emissions by hour", (lxw_row_t)emis_row, (lxw_row_t)(emis_row + ne - 1),
                          cols, n, title, "kg/h", (lxw_row_t)(nc++ * XO_CHART_ROWS + 1));
        }
        load_row += nh;
        emis_row += ne;
    }
    if (nc == 0)
        xo_text(w, 1, 0, "No load and no emissions, so no charts.", w->note);
    if (w->st == HL_OK && nb > 0)
        xo_check(w, worksheet_set_h_pagebreaks(w->ws, breaks), 0, 0);
}

/* --- Orders -------------------------------------------------------------- */

static void xo_orders(struct xw *w)
{
    struct xtable b = {.empty_note = "Nothing to order."};
    xo_lt_table(w, &lt_orders, &b);
}

/* --- Plan vs actual, Stock checks (month close) ------------------------------ */

static const char xo_close_note[] =
    "Runs with an actual only; variance = actual - plan, blank where the actual gives no figure.";
static const char xo_close_note2[] =
    "A weighed draw drives the balance, the scrubber and the stock; a cancelled run draws nothing.";

static void xo_actuals(struct xw *w)
{
    const struct ledger *l = w->l;
    struct xtable b = {.empty_note = "No run has an actual yet (campaign key runs[].actual)."};
    static char tol[200];
    snprintf(tol, sizeof tol, "Tolerances: reagent drawn %.4g %%, wanted product %.4g %% of the plan.",
             l->tol_reagent_pct, l->tol_product_pct);
    b.notes[b.nnotes++] = xo_close_note;
    b.notes[b.nnotes++] = xo_close_note2;
    b.notes[b.nnotes++] = tol;
    xo_lt_table(w, &lt_run_actuals, &b);
}

static void xo_checks(struct xw *w)
{
    const struct ledger *l = w->l;
    struct xtable b = {.empty_note = "No stock count given (campaign key counts[])."};
    static char tol[160];
    snprintf(tol, sizeof tol, "Unexplained = book - counted (positive: missing); tolerance %.4g %% "
             "of the draws since the last count.", l->tol_stock_pct);
    b.notes[b.nnotes++] = "Book = previous count (first: stock on hand) + received - drawn by the runs since.";
    b.notes[b.nnotes++] = tol;
    b.notes[b.nnotes++] = "Toxic gas missing may have been released: check for leaks; see the SDS and local rules.";
    xo_lt_table(w, &lt_stock_checks, &b);
}

/* --- Reaction heat (thermal screening, one row per run) ------------------- */

static void xo_heat(struct xw *w)
{
    struct xtable b = {.empty_note = "No runs."};
    xo_lt_table(w, &lt_run_reaction, &b);
}

/* --- Waste by run, spent liquor ------------------------------------------- */

static void xo_waste(struct xw *w)
{
    struct xtable a = {.empty_note = "No runs."};
    xo_lt_table(w, &lt_run_waste, &a);
}

static void xo_spent(struct xw *w)
{
    struct xtable s = {.empty_note = "No spent liquor.",
                       .notes = {"Hypochlorite/hypobromite liquor releases halogen with acid: never mix "
                                 "with acid waste."},
                       .nnotes = 1};
    xo_lt_table(w, &lt_scrubber_spent, &s);
}

/* --- Monthly ------------------------------------------------------------- */

/* The sheet column (0-based) of the first member of the entry with JSON key `key` and family
 * `each` in sheet b (filled by xo_lt_table), -1 when none. */
static int xo_lt_column(const struct xtable *b, const char *key, enum lt_each each)
{
    for (int p = 0; p < b->ncols; p++) {
        const struct lt_col *c = &b->lt->cols[b->at[p]];
        if (c->each == each && c->key && strcmp(c->key, key) == 0)
            return p;
    }
    return -1;
}

/* --- Monthly yields: one row per month and route ------------------------- */

/* Yields per month and route (substrate, reagent, wanted product): the month's figures
 * over like things only, mole-weighted over the route's runs (design section 5). */
static void xo_month_yields(struct xw *w)
{
    struct xtable b = {.empty_note = "No runs.",
                       .notes = {"Per cent of moles: yield = wanted / substrate charged; conversion = "
                                 "substrate converted / charged; selectivity = wanted / converted;",
                                 "halogen efficiency = halogen atoms in the wanted product / halogen "
                                 "atoms charged (2 per Cl2, Br2, SO2Cl2; 1 per NBS, HBr)."},
                       .nnotes = 2};
    xo_lt_table(w, &lt_month_products, &b);
}

/* A chart over columns cols[] of the month rows (plain numbers, never the totals row). */
static void xo_chart(struct xw *w, const struct xtable *b, uint8_t type, const char *title,
                     const int *cols, int ncols, lxw_row_t at_row)
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
    /* 768 x 432 px: one landscape page of either paper holds it with its margins */
    lxw_chart_options opt = {.x_scale = 1.6, .y_scale = 1.5, .description = (char *)title};
    xo_check(w, worksheet_insert_chart_opt(w->ws, at_row, 0, ch, &opt), at_row, 0);
}

static void xo_monthly(struct xw *w)
{
    const struct ledger *l = w->l;
    struct xtable b = {.empty_note = "No months."};
    xo_lt_table(w, &lt_months, &b);
    xo_month_yields(w); /* its sheet sits between Monthly and Charts */
    if (w->st != HL_OK)
        return;
    if (l->nmonths == 0) {
        if (xo_sheet(w, "Charts"))
            xo_text(w, 0, 0, "No months, so no charts.", w->note);
        return;
    }
    /* series only for what the campaign has; at least one so no chart is empty.  Acid
     * gas means HCl and HBr; the halogens and SO2 get a chart of their own. */
    int acid[VS_COUNT], na = 0, hal[VS_COUNT], nh = 0, rg[RG_CHARGEABLE], nr = 0;
    const int vent0 = xo_lt_column(&b, "%s", LT_EACH_VENT),
              reagent0 = xo_lt_column(&b, "%s", LT_EACH_CHARGED),
              naoh0 = xo_lt_column(&b, "naoh_kg", LT_ONE);
    if (vent0 < 0 || reagent0 < 0 || naoh0 < 0) {
        xo_fail(w, HL_ERR_INTERNAL, "the Monthly sheet lacks a charted column");
        return;
    }
    for (int v = 0; v < VS_COUNT; v++)
        if (b.sum[vent0 + v] != 0) {
            if (vent_get(v)->acid_gas)
                acid[na++] = vent0 + v;
            else
                hal[nh++] = vent0 + v;
        }
    for (int g = 0; g < RG_CHARGEABLE; g++)
        if (b.sum[reagent0 + g] != 0)
            rg[nr++] = reagent0 + g;
    for (int v = 0; na == 0 && v < VS_COUNT; v++) /* none vented: the first acid gas */
        if (vent_get(v)->acid_gas)
            acid[na++] = vent0 + v;
    if (nr == 0)
        rg[nr++] = reagent0;
    int naoh[1] = {naoh0};
    /* The charts get a sheet of their own, one a page: on the Monthly sheet they would
     * print over the repeated header row and across page breaks. */
    if (!xo_sheet(w, "Charts"))
        return;
    xo_text(w, 0, 0, "Charts of the Monthly sheet (its month rows, not its totals)", w->bold);
    /* rows of 20 px: one landscape page below the margins; each chart starts a row below its
     * page break (the library's break sits below the row it names) */
    enum { XO_CHART_ROWS = 30 };
    lxw_row_t breaks[4] = {0};
    int nc = 0;
    xo_chart(w, &b, LXW_CHART_COLUMN, "Acid gas (HCl, HBr) to the scrubbers", acid, na, 1);
    xo_chart(w, &b, LXW_CHART_COLUMN, "Halogen reagents charged", rg, nr, (lxw_row_t)(++nc * XO_CHART_ROWS + 1));
    breaks[nc - 1] = (lxw_row_t)(nc * XO_CHART_ROWS);
    xo_chart(w, &b, LXW_CHART_LINE, "NaOH consumed in the scrubbers, as 100 % NaOH", naoh, 1,
             (lxw_row_t)(++nc * XO_CHART_ROWS + 1));
    breaks[nc - 1] = (lxw_row_t)(nc * XO_CHART_ROWS);
    if (nh > 0) {
        xo_chart(w, &b, LXW_CHART_COLUMN, "Unreacted halogen and SO2 to the scrubbers", hal, nh,
                 (lxw_row_t)(++nc * XO_CHART_ROWS + 1));
        breaks[nc - 1] = (lxw_row_t)(nc * XO_CHART_ROWS);
    }
    if (w->st == HL_OK)
        xo_check(w, worksheet_set_h_pagebreaks(w->ws, breaks), 0, 0);
    /* no fit-to-page here: a fitted sheet ignores manual page breaks */
}

/* --- Warnings ------------------------------------------------------------ */

static void xo_warnings(struct xw *w)
{
    struct xtable b = {.empty_note = "No warnings."};
    xo_lt_table(w, &lt_warnings, &b);
}

/* --- Cautions ------------------------------------------------------------ */

/* The Cautions sheet: a block of rows per substance in play (lt_cautions), or one row saying
 * none is, then a row per caution on the estimates (lt_estimate_cautions, same columns). */
static void row_caution(struct xw *w, struct xtable *b, lxw_row_t row, int i)
{
    const struct ledger *l = w->l;
    int nsub = lt_nrows(&lt_cautions, l);
    if (i < nsub) {
        row_lt(w, b, row, i);
    } else if (nsub == 0 && i == 0) { /* nothing in play: the one row says so, with the deferral */
        xt_text(w, b, row, 0, "No substance of the caution table is in play.");
        xt_text(w, b, row, 2, "Before use");
        xo_text(w, row, 3, caution_deferral(), w->wrap);
    } else {
        int at[8], item[8];
        lt_sheet_order(&lt_estimate_cautions, at, item, 8); /* checked by xo_cautions */
        xo_lt_row(w, b, &lt_estimate_cautions, at, item, row, i - (nsub ? nsub : 1), 0);
    }
}

static void xo_cautions(struct xw *w)
{
    struct xtable b = {0};
    int at[8], item[8];
    if (!xo_lt_cols(w, &lt_cautions, &b))
        return;
    if (lt_sheet_order(&lt_estimate_cautions, at, item, 8) != b.ncols) {
        xo_fail(w, HL_ERR_INTERNAL, "the estimate cautions do not fill the Cautions columns");
        return;
    }
    int n = b.nrows;
    b.fn = row_caution;
    b.nrows = (n ? n : 1) + lt_estimate_cautions.count(w->l);
    xo_table(w, "Cautions", &b);
}

/* --- Assumptions --------------------------------------------------------- */

/* A what-if's --set values first, so a printed page is not taken for the plan; then the
 * assumptions (lt_assumptions). */
static void row_assumption(struct xw *w, struct xtable *b, lxw_row_t row, int i)
{
    if (i >= w->l->noverrides) {
        row_lt(w, b, row, i - w->l->noverrides);
        return;
    }
    char what[600];
    snprintf(what, sizeof what, "!! WHAT-IF: --set %s", w->l->overrides[i]);
    xo_text(w, row, 0, what, w->wrap);
    xo_text(w, row, 3, "given on the command line: this ledger is not the campaign file as "
            "written", w->wrap);
}

static void xo_assumptions(struct xw *w)
{
    struct xtable b = {.empty_note = "No assumptions recorded."};
    if (!xo_lt_cols(w, &lt_assumptions, &b))
        return;
    b.fn = row_assumption;
    b.nrows += w->l->noverrides;
    xo_table(w, "Assumptions", &b);
}

/* --- workbook ------------------------------------------------------------ */

/* The palette (DEVELOPERS.md): alarm = rust text on a pale terracotta fill with a rust
 * frame, notice = indigo text on a pale lavender fill; header cells on a pale sage fill. */
#define XO_ALARM_FILL 0xF6D5C3
#define XO_ALARM_INK 0x7A2608
#define XO_NOTICE_FILL 0xE4E0F2
#define XO_NOTICE_INK 0x34296E
#define XO_HEAD_FILL 0xDDE8E1

static int xo_formats(struct xw *w)
{
    for (int k = 0; k < LT_NKIND; k++)
        for (int t = 0; t < 2; t++) {
            lxw_format *f = workbook_add_format(w->wb);
            if (!f)
                return 0;
            if (xo_numfmt[k])
                format_set_num_format(f, xo_numfmt[k]);
            format_set_align(f, LXW_ALIGN_VERTICAL_TOP);
            if (t) {
                format_set_bold(f);
                format_set_top(f, LXW_BORDER_THIN);
            }
            w->fmt[k][t] = f;
        }
    if (!(w->head = workbook_add_format(w->wb)) || !(w->title = workbook_add_format(w->wb)) ||
        !(w->wrap = workbook_add_format(w->wb)) || !(w->bold = workbook_add_format(w->wb)) ||
        !(w->top = workbook_add_format(w->wb)) || !(w->bold_top = workbook_add_format(w->wb)) ||
        !(w->note = workbook_add_format(w->wb)) || !(w->section = workbook_add_format(w->wb)) ||
        !(w->sign = workbook_add_format(w->wb)) || !(w->dxf[XA_ALARM] = workbook_add_format(w->wb)) ||
        !(w->dxf[XA_NOTICE] = workbook_add_format(w->wb)) || !(w->noted = workbook_add_format(w->wb)))
        return 0;
    format_set_text_wrap(w->noted);
    format_set_align(w->noted, LXW_ALIGN_VERTICAL_TOP);
    format_set_indent(w->noted, 1); /* clear of the number to its left */
    for (int d = 0; d < XO_NSIG; d++) {
        if (!(w->sig[d] = workbook_add_format(w->wb)))
            return 0;
        format_set_num_format(w->sig[d], xo_sigfmt[d]);
        format_set_align(w->sig[d], LXW_ALIGN_VERTICAL_TOP);
    }
    const lxw_color_t ink[3] = {0, XO_ALARM_INK, XO_NOTICE_INK};
    const lxw_color_t fill[3] = {0, XO_ALARM_FILL, XO_NOTICE_FILL};
    for (int a = XA_ALARM; a <= XA_NOTICE; a++) {
        format_set_bold(w->dxf[a]);
        format_set_font_color(w->dxf[a], ink[a]);
        format_set_bg_color(w->dxf[a], fill[a]);
        format_set_border(w->dxf[a], a == XA_ALARM ? LXW_BORDER_MEDIUM : LXW_BORDER_THIN);
        format_set_border_color(w->dxf[a], ink[a]);
    }
    format_set_bold(w->section);
    format_set_bottom(w->section, LXW_BORDER_THIN);
    format_set_bg_color(w->section, XO_HEAD_FILL);
    format_set_bottom(w->sign, LXW_BORDER_THIN);
    format_set_align(w->sign, LXW_ALIGN_VERTICAL_BOTTOM);
    format_set_bold(w->head);
    format_set_text_wrap(w->head);
    format_set_align(w->head, LXW_ALIGN_VERTICAL_TOP);
    format_set_bottom(w->head, LXW_BORDER_MEDIUM);
    format_set_bg_color(w->head, XO_HEAD_FILL);
    format_set_bold(w->title);
    format_set_font_size(w->title, 13);
    format_set_text_wrap(w->wrap);
    format_set_align(w->wrap, LXW_ALIGN_VERTICAL_TOP);
    format_set_align(w->top, LXW_ALIGN_VERTICAL_TOP);
    format_set_bold(w->bold_top);
    format_set_align(w->bold_top, LXW_ALIGN_VERTICAL_TOP);
    format_set_bold(w->bold);
    format_set_italic(w->note);
    /* the groups of formats made by the same calls: a number format (or none) and vertical
     * top alignment, bold with a thin top rule for totals (xo_canon) */
    struct xo_made { lxw_format *f; const char *num; int bold; } made[XO_NSAME];
    int n = 0;
    for (int k = 0; k < LT_NKIND; k++)
        for (int t = 0; t < 2; t++)
            made[n++] = (struct xo_made){w->fmt[k][t], xo_numfmt[k] ? xo_numfmt[k] : "", t};
    for (int d = 0; d < XO_NSIG; d++)
        made[n++] = (struct xo_made){w->sig[d], xo_sigfmt[d], 0};
    made[n++] = (struct xo_made){w->top, "", 0};
    for (int i = 0; i < n; i++) {
        w->same[i] = made[i].f;
        w->same_group[i] = i;
        for (int j = 0; j < i; j++)
            if (made[j].bold == made[i].bold && !strcmp(made[j].num, made[i].num)) {
                w->same_group[i] = w->same_group[j];
                break;
            }
    }
    w->nsame = n;
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

/* Every sheet, in the order of the workbook's tabs (each stops at the first error in w->st). */
static void xo_sheets(struct xw *w)
{
    xo_summary(w);
    xo_runs(w);
    xo_products(w);
    xo_liquor(w);
    xo_units(w);
    xo_hours(w);
    xo_column(w);
    xo_emis_runs(w);
    xo_emis_by_hour(w);
    xo_permits(w);
    xo_emis_charts(w);
    xo_orders(w);
    xo_actuals(w);
    xo_checks(w);
    xo_waste(w);
    xo_spent(w);
    xo_heat(w);
    xo_monthly(w); /* and the Charts sheet */
    xo_warnings(w);
    xo_cautions(w);
    xo_assumptions(w);
}

/* fsync the written temporary tmp (the library does not: a crash after the rename must not
 * leave an empty file), then rename it onto path.  Frees tmp; removes it on failure. */
static enum hl_status sync_commit(char *tmp, const char *path, struct hl_err *e)
{
    enum hl_status st;
    int fd = open(tmp, O_RDONLY | O_CLOEXEC);
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
    struct xw *w = hl_calloc(1, sizeof *w);
    if (!w) {
        unlink(tmp);
        hl_free(tmp);
        hl_free(dir);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    w->l = l;
    w->e = e;
    lt_caustic_basis(l, w->caustic, sizeof w->caustic);
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
    xo_sheets(w);
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
    return sync_commit(tmp, path, e);

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

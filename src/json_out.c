/*
 * json_out.c - the JSON ledger (see json_out.h and design section 5).
 *
 * Streamed: every key and value goes straight into a 64 KiB buffer that is
 * flushed to the file (or, for json_out_render, appended to a string) when
 * full, so no document tree of the output exists and memory does not grow
 * with the ledger.  The layout is one record (run, month, order ...) per
 * line, records compact inside, as the cJSON-tree writer before it printed
 * them; line-oriented tools (diff, grep) see one record per line.
 *
 * Bytes are those cJSON 1.7.15 (Debian's libcjson) prints for the same
 * values, so the ledger did not change when the tree went: strings escaped as
 * its print_string_ptr does, numbers as its print_number does (an integral
 * value that fits an int as "%d", else "%1.15g" when that reads back within
 * DBL_EPSILON relative, else "%1.17g").  That rule is kept rather than the
 * shortest round-trip digits because pipelines and the reference ledgers in
 * tests/data already hold its text; test_json_out compares jo_number with
 * cJSON itself.  Keys come in a fixed order, nothing depends on the locale
 * (LC_NUMERIC is never set), so the same ledger gives the same bytes.
 */
#include "json_out.h"

#include "afile.h"
#include "hlmem.h"
#include "isodate.h"
#include "ltable.h"

#include <errno.h>
#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

enum { JO_BUF = 1 << 16, JO_DEPTH = 16 };

struct jo {
    FILE *f;                          /* file sink; NULL: memory sink (mem) */
    const char *fname;                /* the file, for messages */
    char *mem; size_t mlen, mcap;     /* memory sink: the whole text */
    char *buf; size_t n;              /* staging buffer of JO_BUF bytes */
    enum hl_status st;                /* first failure; every helper is a no-op after it */
    struct hl_err *e;
    int depth;                        /* containers open inside the current record */
    int count[JO_DEPTH];              /* members written so far in each */
    size_t mark[JO_DEPTH];            /* path length where each was opened */
    char path[200]; size_t plen;      /* JSON path of the container being written */
};

/* --- sink ---------------------------------------------------------------- */

static void jo_nomem(struct jo *w)
{
    if (w->st == HL_OK)
        w->st = hl_err_set(w->e, HL_ERR_NOMEM, "out of memory while writing the JSON ledger");
}

static void jo_flush(struct jo *w)
{
    if (w->st != HL_OK || w->n == 0)
        return;
    if (w->f) {
        if (fwrite(w->buf, 1, w->n, w->f) != w->n) {
            int err = errno ? errno : EIO;
            w->st = hl_err_set(w->e, HL_ERR_IO, "cannot write %s: %s", w->fname, strerror(err));
        }
    } else {
        if (w->mlen + w->n + 1 > w->mcap) {
            size_t cap = w->mcap ? w->mcap : JO_BUF;
            while (cap < w->mlen + w->n + 1)
                cap *= 2;
            char *p = hl_realloc(w->mem, cap);
            if (!p) {
                jo_nomem(w);
                return;
            }
            w->mem = p;
            w->mcap = cap;
        }
        memcpy(w->mem + w->mlen, w->buf, w->n);
        w->mlen += w->n;
        w->mem[w->mlen] = '\0';
    }
    w->n = 0;
}

/* Room for n more bytes in the buffer (n <= JO_BUF); 0 after a failure. */
static int jo_room(struct jo *w, size_t n)
{
    if (w->n + n > JO_BUF)
        jo_flush(w);
    return w->st == HL_OK;
}

static void jo_put(struct jo *w, const char *s, size_t n)
{
    while (n > 0 && w->st == HL_OK) {
        if (w->n == JO_BUF)
            jo_flush(w);
        size_t k = JO_BUF - w->n < n ? JO_BUF - w->n : n;
        memcpy(w->buf + w->n, s, k);
        w->n += k;
        s += k;
        n -= k;
    }
}

static void jo_puts(struct jo *w, const char *s) { jo_put(w, s, strlen(s)); }

static void jo_putc(struct jo *w, char c)
{
    if (jo_room(w, 1))
        w->buf[w->n++] = c;
}

/* --- failures ------------------------------------------------------------ */

/* Report a bad value of key (or, key NULL, the element being added to an array). */
static void jo_bad(struct jo *w, const char *key, const char *what)
{
    if (w->st != HL_OK)
        return;
    char field[240];
    if (key)
        snprintf(field, sizeof field, "%s.%s", w->path, key);
    else
        snprintf(field, sizeof field, "%s[%d]", w->path, w->count[w->depth]);
    if (field[0] == '.') /* a top-level member */
        memmove(field, field + 1, strlen(field));
    w->st = hl_err_at(w->e, HL_ERR_INTERNAL, 0, 0, field, "JSON ledger: %s at %s", what, field);
}

/* --- numbers and strings, as cJSON 1.7.15 prints them -------------------- */

/* Decimal digits of u into out (no terminator); returns the count. */
static size_t jo_utoa(uint64_t u, char *out)
{
    char t[24];
    size_t n = 0;
    do {
        t[n++] = (char)('0' + u % 10);
        u /= 10;
    } while (u);
    for (size_t k = 0; k < n; k++)
        out[k] = t[n - 1 - k];
    return n;
}

/* 64 x 64 -> 128-bit products: GCC and Clang's unsigned __int128 (C11 has no such type;
 * __extension__ keeps -pedantic quiet). Every target we build for has it. */
__extension__ typedef unsigned __int128 jo_u128;

static const uint64_t pow10_u64[] = {
    1, 10, 100, 1000, 10000, 100000, 1000000, 10000000, 100000000, 1000000000,
    10000000000, 100000000000, 1000000000000, 10000000000000, 100000000000000,
    1000000000000000, 10000000000000000, 100000000000000000, 1000000000000000000u};

/* The P significant digits of m x 2^e (m < 2^53, e < 0), rounded to nearest with ties
 * to even as glibc's printf rounds an exact binary value, with *x the decimal exponent.
 * For the verdict of jo_number: *near = 1 when the digits read back (correctly rounded)
 * within one unit in the last place of the double, 0 when not, -1 when it cannot say
 * (an exact tie). Returns 0 when q = P - 1 - x would leave the 0..27 range this
 * 128-bit arithmetic covers (5^27 < 2^63). */
static int digits_of(uint64_t m, int e, int P, int *x, uint64_t *digits, int *near)
{
    static uint64_t pow5[28];
    if (!pow5[0]) {
        pow5[0] = 1;
        for (int k = 1; k < 28; k++)
            pow5[k] = pow5[k - 1] * 5;
    }
    /* floor((e + 52) log10 2), the decimal exponent or one below it: 78913 / 2^18 is
     * log10 2 close enough for every |e + 52| < 1650 (an offset keeps the shift on a
     * non-negative number) */
    int x10 = (((e + 52) * 78913 + (1024 << 18)) >> 18) - 1024;
    for (int tries = 0; tries < 3; tries++) {
        *near = 0;
        int q = P - 1 - x10;
        if (q < 0 || q > 27)
            return 0;
        int t = -(e + q); /* value x 10^q = m 5^q / 2^t */
        if (t <= 0 || t >= 120)
            return 0;
        jo_u128 num = (jo_u128)m * pow5[q], one = (jo_u128)1 << t;
        uint64_t d = (uint64_t)(num >> t);
        jo_u128 rem = num & (one - 1), half = one >> 1;
        int c = rem > half ? 1 : rem < half ? -1 : 0;
        int up = c > 0 || (c == 0 && (d & 1));
        if (c == 0)
            *near = -1;
        d += (uint64_t)up;
        if (d >= pow10_u64[P]) {
            x10++;
            continue;
        }
        if (d < pow10_u64[P - 1]) {
            x10--;
            continue;
        }
        /* |digits - value| x 2^t, against 1.5 units of the double (1.5 x 5^q x 2^0 after
         * scaling): inside reads back to a neighbour at most, outside to 2 away or more */
        jo_u128 twice = (up ? one - rem : rem) << 1, lim = (jo_u128)3 * pow5[q];
        int v = twice < lim ? -1 : twice > lim;
        if (*near != -1)
            *near = v < 0 ? 1 : v > 0 ? 0 : -1;
        *x = x10;
        *digits = d;
        return 1;
    }
    return 0;
}

/* %1.Pg of the value digits x 10^(x - P + 1) (P significant digits, exact). */
static size_t fmt_g(int neg, uint64_t digits, int P, int x, char *out)
{
    static const char pairs[] = /* "00" .. "99" */
        "00010203040506070809101112131415161718192021222324"
        "25262728293031323334353637383940414243444546474849"
        "50515253545556575859606162636465666768697071727374"
        "75767778798081828384858687888990919293949596979899";
    char dg[20];
    int k = P;
    for (; k >= 2; k -= 2, digits /= 100) /* two digits a division */
        memcpy(dg + k - 2, pairs + 2 * (digits % 100), 2);
    if (k)
        dg[0] = (char)('0' + digits % 10);
    int nd = P;
    while (nd > 1 && dg[nd - 1] == '0') /* %g drops trailing zeros */
        nd--;
    char *o = out;
    if (neg)
        *o++ = '-';
    if (x < -4 || x >= P) {
        *o++ = dg[0];
        if (nd > 1) {
            *o++ = '.';
            memcpy(o, dg + 1, (size_t)nd - 1);
            o += nd - 1;
        }
        *o++ = 'e';
        *o++ = x < 0 ? '-' : '+';
        int ax = x < 0 ? -x : x;
        if (ax < 10)
            *o++ = '0'; /* at least two exponent digits */
        o += jo_utoa((uint64_t)ax, o);
    } else if (x >= 0) {
        for (int k = 0; k <= x; k++)
            *o++ = k < nd ? dg[k] : '0';
        if (nd > x + 1) {
            *o++ = '.';
            memcpy(o, dg + x + 1, (size_t)(nd - x - 1));
            o += nd - x - 1;
        }
    } else {
        *o++ = '0';
        *o++ = '.';
        for (int k = 0; k < -x - 1; k++)
            *o++ = '0';
        memcpy(o, dg, (size_t)nd);
        o += nd;
    }
    *o = '\0';
    return (size_t)(o - out);
}

/* cJSON's rule with the C library, for what digits_of does not cover. */
static size_t jo_number_libc(double v, char *out)
{
    int n = snprintf(out, 32, "%1.15g", v);
    double back = strtod(out, NULL);
    double big = fabs(back) > fabs(v) ? fabs(back) : fabs(v);
    if (!(fabs(back - v) <= big * DBL_EPSILON))
        n = snprintf(out, 32, "%1.17g", v);
    return (size_t)n;
}

size_t json_out_number(double v, char *out)
{
    /* cJSON_CreateNumber's valueint: saturated at the int range */
    int vi = v >= INT_MAX ? INT_MAX : v <= (double)INT_MIN ? INT_MIN : (int)v;
    if (v == (double)vi) { /* "%d" */
        size_t n = 0;
        if (vi < 0)
            out[n++] = '-';
        n += jo_utoa(vi < 0 ? (uint64_t)(-(int64_t)vi) : (uint64_t)vi, out + n);
        out[n] = '\0';
        return n;
    }
    uint64_t bits;
    memcpy(&bits, &v, sizeof bits);
    int be = (int)(bits >> 52 & 0x7ff);
    uint64_t m = (bits & ((UINT64_C(1) << 52) - 1)) | (UINT64_C(1) << 52);
    int e = be - 1075;
    /* Away from the ends of a binade, so that the doubles 1 and 2 units away on either
     * side are evenly spaced (the acceptance test below counts units). */
    if (be == 0 || be == 0x7ff || m < (UINT64_C(1) << 52) + 2 || m > (UINT64_C(1) << 53) - 3)
        return jo_number_libc(v, out);
    int x15, x17, near15 = 0, near17 = 0;
    uint64_t d15, d17;
    if (!digits_of(m, e, 15, &x15, &d15, &near15) || near15 < 0)
        return jo_number_libc(v, out);
    /* cJSON keeps 15 digits when they read back within DBL_EPSILON x the larger value: for
     * a double inside its binade that is the double itself or a neighbour, 1 unit away */
    if (near15)
        return fmt_g(v < 0, d15, 15, x15, out);
    if (!digits_of(m, e, 17, &x17, &d17, &near17) || near17 < 0)
        return jo_number_libc(v, out); /* a tie: leave it to the C library's rounding */
    return fmt_g(v < 0, d17, 17, x17, out);
}

/* RFC 3629 UTF-8: no overlong forms, no surrogates, nothing above U+10FFFF. */
static int jo_utf8_ok(const unsigned char *s)
{
    while (*s) {
        unsigned c = *s++;
        int n;
        unsigned min, cp;
        if (c < 0x80) continue;
        else if ((c & 0xE0) == 0xC0) { n = 1; min = 0x80; cp = c & 0x1F; }
        else if ((c & 0xF0) == 0xE0) { n = 2; min = 0x800; cp = c & 0x0F; }
        else if ((c & 0xF8) == 0xF0) { n = 3; min = 0x10000; cp = c & 0x07; }
        else return 0;
        for (int k = 0; k < n; k++) {
            if ((*s & 0xC0) != 0x80)
                return 0;
            cp = (cp << 6) | (*s++ & 0x3F);
        }
        if (cp < min || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF))
            return 0;
    }
    return 1;
}

/* A JSON string (RFC 8259 section 7) escaped as cJSON's print_string_ptr does: quote,
 * backslash and the five short escapes, other bytes below 0x20 as \u00xx (lower-case
 * hex), everything else (UTF-8 included) as is. */
static void jo_quoted(struct jo *w, const char *s)
{
    jo_putc(w, '"');
    const char *run = s;
    for (; *s; s++) {
        unsigned char c = (unsigned char)*s;
        if (c >= 0x20 && c != '"' && c != '\\')
            continue;
        jo_put(w, run, (size_t)(s - run));
        run = s + 1;
        char esc[8];
        switch (c) {
        case '"': jo_put(w, "\\\"", 2); break;
        case '\\': jo_put(w, "\\\\", 2); break;
        case '\b': jo_put(w, "\\b", 2); break;
        case '\f': jo_put(w, "\\f", 2); break;
        case '\n': jo_put(w, "\\n", 2); break;
        case '\r': jo_put(w, "\\r", 2); break;
        case '\t': jo_put(w, "\\t", 2); break;
        default:
            snprintf(esc, sizeof esc, "\\u%04x", c);
            jo_put(w, esc, 6);
        }
    }
    jo_put(w, run, (size_t)(s - run));
    jo_putc(w, '"');
}

/* --- containers and values ----------------------------------------------- */

/* Comma before every member but the first, then "key": (key NULL inside an array).
 * Keys are this file's constants and table names (symbols, reagent names), none with
 * a byte cJSON would escape, so they are copied as they are. */
static void jo_key(struct jo *w, const char *key)
{
    size_t n = key ? strlen(key) : 0;
    if (!jo_room(w, n + 4))
        return;
    char *o = w->buf + w->n;
    if (w->count[w->depth]++ > 0)
        *o++ = ',';
    if (key) {
        *o++ = '"';
        memcpy(o, key, n);
        o += n;
        *o++ = '"';
        *o++ = ':';
    }
    w->n = (size_t)(o - w->buf);
}

/* Open an object ('{') or array ('[') as member key (NULL: an array element). */
static void jo_open(struct jo *w, const char *key, char bracket)
{
    if (w->st != HL_OK)
        return;
    if (w->depth + 1 >= JO_DEPTH) {
        w->st = hl_err_set(w->e, HL_ERR_INTERNAL, "JSON ledger nested too deep");
        return;
    }
    int index = w->count[w->depth];
    jo_key(w, key);
    jo_putc(w, bracket);
    w->depth++;
    w->count[w->depth] = 0;
    w->mark[w->depth] = w->plen;
    /* the path only names a bad value; one cut short still names the place */
    char seg[48];
    size_t n = 0;
    if (key) {
        seg[n++] = '.';
        size_t k = strlen(key);
        k = k < sizeof seg - 2 ? k : sizeof seg - 2;
        memcpy(seg + 1, key, k);
        n += k;
    } else {
        seg[n++] = '[';
        n += jo_utoa((uint64_t)index, seg + n);
        seg[n++] = ']';
    }
    if (w->plen + n < sizeof w->path) {
        memcpy(w->path + w->plen, seg, n);
        w->plen += n;
        w->path[w->plen] = '\0';
    }
}

static void jo_close(struct jo *w, char bracket)
{
    if (w->st != HL_OK)
        return;
    jo_putc(w, bracket);
    w->plen = w->mark[w->depth];
    w->path[w->plen] = '\0';
    w->depth--;
}

/* Begin a top-level record "{" whose path is name[i] (i < 0: name). */
static void jo_begin(struct jo *w, const char *name, int i)
{
    w->depth = 0;
    w->count[0] = 0;
    if (i >= 0)
        snprintf(w->path, sizeof w->path, "%s[%d]", name, i);
    else
        snprintf(w->path, sizeof w->path, "%s", name);
    w->plen = strlen(w->path);
    jo_putc(w, '{');
}

static void jo_end(struct jo *w) { jo_putc(w, '}'); }

static void jo_num(struct jo *w, const char *key, double v)
{
    if (w->st != HL_OK)
        return;
    if (!isfinite(v)) {
        jo_bad(w, key, isnan(v) ? "non-finite number (NaN)" : "non-finite number (infinity)");
        return;
    }
    jo_key(w, key);
    if (jo_room(w, 32))
        w->n += json_out_number(v + 0.0, w->buf + w->n); /* + 0.0 turns -0 into 0 */
}

static void jo_bool(struct jo *w, const char *key, int v)
{
    if (w->st != HL_OK)
        return;
    jo_key(w, key);
    jo_puts(w, v ? "true" : "false");
}

static void jo_null(struct jo *w, const char *key)
{
    if (w->st != HL_OK)
        return;
    jo_key(w, key);
    jo_puts(w, "null");
}

/* Text, or null for NULL. */
static void jo_str(struct jo *w, const char *key, const char *s)
{
    if (w->st != HL_OK)
        return;
    if (!s) {
        jo_null(w, key);
        return;
    }
    if (!jo_utf8_ok((const unsigned char *)s)) {
        jo_bad(w, key, "text that is not valid UTF-8");
        return;
    }
    jo_key(w, key);
    jo_quoted(w, s);
}

static void jo_date(struct jo *w, const char *key, int64_t min, int date_only)
{
    char buf[32];
    isodate_format(min, date_only, buf, sizeof buf);
    jo_str(w, key, buf);
}

/* An array key of the ids of runs (indices into l->runs). */
static void jo_run_ids(struct jo *w, const struct ledger *l, const char *key, const int *runs, int n)
{
    jo_open(w, key, '[');
    for (int k = 0; k < n && w->st == HL_OK; k++) {
        int ri = runs[k];
        if (ri < 0 || ri >= l->nruns) {
            jo_close(w, ']');
            jo_bad(w, key, "run index out of range");
            return;
        }
        jo_str(w, NULL, l->runs[ri].id);
    }
    jo_close(w, ']');
}

/* One value of a list entry (ltable.h) as member key of the open object. */
static void jo_value(struct jo *w, const struct ledger *l, const char *key, enum lt_kind kind,
                     const struct lt_val *v)
{
    switch (v->t) {
    case LT_V_ABSENT: break;
    case LT_V_NULL: jo_null(w, key); break;
    case LT_V_NUM: jo_num(w, key, v->num); break;
    case LT_V_TEXT: jo_str(w, key, v->text); break;
    case LT_V_DATE: jo_date(w, key, v->min, kind == LT_DAY); break;
    case LT_V_BOOL: jo_bool(w, key, v->on); break;
    case LT_V_RUNS: jo_run_ids(w, l, key, v->runs, v->nruns); break;
    case LT_V_BAD: jo_bad(w, key, v->text); break;
    }
}

static void jo_rows(struct jo *w, const struct lt_table *t, const struct ledger *l, int i,
                    const char *key, int item);

/* Index of the LT_CLOSE that closes the object entry c of t opens. */
static int jo_close_of(const struct lt_table *t, int c)
{
    int depth = 0;
    for (; c < t->ncols; c++) {
        depth += (t->cols[c].flags & LT_OPEN) ? 1 : (t->cols[c].flags & LT_CLOSE) ? -1 : 0;
        if (depth == 0)
            return c;
    }
    return t->ncols;
}

/* The keyed entries from..to-1 of table t (ltable.h) for record i, row j, as members of the
 * open object, in the list's order (the JSON key order): objects opened and closed where the
 * list says (a null one's members left out; a family's an object per member, whose entries
 * take the member as their item), a family one member per key, a sub-table an array of its
 * rows, a key-less sub-table its entries here. */
static void jo_span(struct jo *w, const struct lt_table *t, const struct ledger *l, int i, int j,
                    int from, int to, int item)
{
    struct lt_val v;
    int skip = 0; /* depth inside an object written as null */
    for (int c = from; c < to && w->st == HL_OK; c++) {
        const struct lt_col *e = &t->cols[c];
        char key[64];
        if (skip) {
            skip += (e->flags & LT_OPEN) ? 1 : (e->flags & LT_CLOSE) ? -1 : 0;
            continue;
        }
        if (e->flags & LT_CLOSE) {
            jo_close(w, '}');
        } else if (!e->key) {
            if (e->sub) /* a list that is a part of this record */
                jo_span(w, e->sub, l, i, j, 0, e->sub->ncols, 0);
        } else if ((e->flags & LT_OPEN) && e->each != LT_ONE) {
            int end = jo_close_of(t, c);
            for (int k = 0, n = lt_items(e); k < n && w->st == HL_OK; k++) {
                v.t = LT_V_BOOL;
                if (e->get) /* LT_V_ABSENT: no object for this member */
                    lt_get(t, c, k, l, i, j, &v);
                if (v.t == LT_V_ABSENT)
                    continue;
                lt_key(e, k, key, sizeof key);
                jo_open(w, key, '{');
                jo_span(w, t, l, i, j, c + 1, end, k);
                jo_close(w, '}');
            }
            c = end;
        } else if (e->flags & LT_OPEN) {
            v.t = LT_V_BOOL;
            if (e->get)
                lt_get(t, c, 0, l, i, j, &v);
            if (v.t == LT_V_NULL) {
                jo_null(w, e->key);
                skip = 1;
            } else {
                jo_open(w, e->key, '{');
            }
        } else if (e->sub) {
            jo_rows(w, e->sub, l, i, e->key, item);
        } else {
            for (int k = 0, n = lt_items(e); k < n; k++) {
                /* a family's key is made per member; a single entry's is the list's text
                 * (no copy: this runs for every value of every record) */
                const char *name = e->key;
                if (e->each != LT_ONE) {
                    lt_key(e, k, key, sizeof key);
                    name = key;
                }
                lt_get(t, c, e->each == LT_ONE ? item : k, l, i, j, &v);
                jo_value(w, l, name, e->kind, &v);
            }
        }
    }
}

/* All the keyed entries of table t for record i, row j (jo_span). */
static void jo_cols(struct jo *w, const struct lt_table *t, const struct ledger *l, int i, int j)
{
    jo_span(w, t, l, i, j, 0, t->ncols, 0);
}

/* "key": [ an object per row of table t under record i (member item of a family object), or
 * with t->bare the value of its one keyed entry ]. */
static void jo_rows(struct jo *w, const struct lt_table *t, const struct ledger *l, int i,
                    const char *key, int item)
{
    jo_open(w, key, '[');
    int n = t->nsub_item ? t->nsub_item(l, i, item) : t->nsub ? t->nsub(l, i) : 1, c = 0;
    while (t->bare && c < t->ncols - 1 && !t->cols[c].key)
        c++;
    for (int j = 0; j < n && w->st == HL_OK; j++) {
        if (t->bare) {
            struct lt_val v;
            lt_get(t, c, item, l, i, j, &v);
            jo_value(w, l, NULL, t->cols[c].kind, &v);
            continue;
        }
        jo_open(w, NULL, '{');
        jo_span(w, t, l, i, j, 0, t->ncols, item);
        jo_close(w, '}');
    }
    jo_close(w, ']');
}

/* A top-level record of table t: {columns}. */
static void jo_record(struct jo *w, const struct lt_table *t, const struct ledger *l, int i)
{
    jo_begin(w, t->key, i);
    jo_cols(w, t, l, i, 0);
    jo_end(w);
}

/* --- records ------------------------------------------------------------- */

/* A runs[] record: the Runs list (ltable.h lt_runs), with the lists that are parts of it. */
static void jo_run(struct jo *w, const struct ledger *l, int i) { jo_record(w, &lt_runs, l, i); }

static void jo_month(struct jo *w, const struct ledger *l, int i) { jo_record(w, &lt_months, l, i); }

static void jo_order(struct jo *w, const struct ledger *l, int i) { jo_record(w, &lt_orders, l, i); }

/* A scrubber: its figures, load profile, spent charges, column check and stack (the Scrubber
 * units list, ltable.h lt_scrubbers, with its parts). */
static void jo_scrubber(struct jo *w, const struct ledger *l, int i)
{
    jo_record(w, &lt_scrubbers, l, i);
}

/* One limit of one permit against the worst hour, day mean or calendar year. */
static void jo_permit_check(struct jo *w, const struct ledger *l, int i)
{
    jo_record(w, &lt_permit_checks, l, i);
}

/* A substance in play: its exposure limits, hazards, incompatibles and protective
 * equipment. */
static void jo_caution(struct jo *w, const struct ledger *l, int i) { jo_record(w, &lt_cautions, l, i); }

/* A caution on the ledger's own estimates (stack emissions, reaction heat). */
static void jo_estimate_caution(struct jo *w, const struct ledger *l, int i)
{
    jo_record(w, &lt_estimate_cautions, l, i);
}

static void jo_stock_check(struct jo *w, const struct ledger *l, int i)
{
    jo_record(w, &lt_stock_checks, l, i);
}

static void jo_warning(struct jo *w, const struct ledger *l, int i) { jo_record(w, &lt_warnings, l, i); }

static void jo_assumption(struct jo *w, const struct ledger *l, int i)
{
    jo_record(w, &lt_assumptions, l, i);
}

/* "key": [ records ] with one record per line; ids[] picks the records (NULL: 0..n-1). */
typedef void (*jo_record_fn)(struct jo *, const struct ledger *, int);

static void jo_list(struct jo *w, const struct ledger *l, const char *key, int n, const int *ids,
                    jo_record_fn fn)
{
    jo_putc(w, '"');
    jo_puts(w, key);
    jo_puts(w, n ? "\": [\n" : "\": [");
    for (int i = 0; i < n && w->st == HL_OK; i++) {
        jo_puts(w, "  ");
        fn(w, l, ids ? ids[i] : i);
        jo_puts(w, i + 1 < n ? ",\n" : "\n");
    }
    jo_puts(w, "],\n");
}

/* A top-level scalar member "key": text or null, on its own line. */
static void jo_top_str(struct jo *w, const char *key, const char *text)
{
    w->depth = 0;
    w->count[0] = 0;
    w->path[0] = '\0';
    w->plen = 0;
    jo_putc(w, '"');
    jo_puts(w, key);
    jo_puts(w, "\": ");
    if (!text)
        jo_puts(w, "null");
    else if (!jo_utf8_ok((const unsigned char *)text))
        jo_bad(w, key, "text that is not valid UTF-8");
    else
        jo_quoted(w, text);
}

static void jo_document(struct jo *w, const struct ledger *l)
{
    jo_puts(w, "{\n\"format\": \"haloledger-ledger/1\",\n\"generator\": \"haloledger\",\n");
    char when[32];
    isodate_format(l->created_min, 0, when, sizeof when);
    jo_top_str(w, "created", l->created_min != 0 ? when : NULL);
    jo_puts(w, ",\n");
    isodate_format(l->today_min, 1, when, sizeof when);
    jo_top_str(w, "today", l->today_min >= 0 ? when : NULL);
    jo_puts(w, ",\n\"tolerances\": ");
    jo_begin(w, "tolerances", -1);
    jo_num(w, "reagent_pct", l->tol_reagent_pct);
    jo_num(w, "product_pct", l->tol_product_pct);
    jo_num(w, "stock_pct", l->tol_stock_pct);
    jo_end(w);
    jo_puts(w, ",\n\"campaign\": ");
    jo_begin(w, "campaign", -1);
    jo_str(w, "title", l->title);
    jo_str(w, "site", l->site);
    jo_str(w, "file", l->file);
    jo_end(w);
    jo_puts(w, ",\n");
    if (l->noverrides) {
        /* a what-if: the --set values it was computed with (only then, so a plan's ledger
         * stays as it was) */
        jo_puts(w, "\"overrides\": [");
        for (int i = 0; i < l->noverrides; i++) {
            jo_puts(w, i ? ", " : "");
            if (!jo_utf8_ok((const unsigned char *)l->overrides[i]))
                jo_bad(w, "overrides", "text that is not valid UTF-8");
            else
                jo_quoted(w, l->overrides[i]);
        }
        jo_puts(w, "],\n");
    }

    jo_list(w, l, "runs", l->nruns, NULL, jo_run);
    jo_list(w, l, "months", l->nmonths, NULL, jo_month);
    jo_list(w, l, "orders", l->norders, NULL, jo_order);
    jo_list(w, l, "stock_checks", l->nstock_checks, NULL, jo_stock_check);
    jo_list(w, l, "scrubbers", l->nscrubbers, NULL, jo_scrubber);
    jo_list(w, l, "permit_checks", l->npermit_checks, NULL, jo_permit_check);
    jo_list(w, l, "warnings", l->nwarnings, NULL, jo_warning);
    jo_list(w, l, "assumptions", l->nassumptions, NULL, jo_assumption);
    jo_list(w, l, "cautions", lt_cautions.count(l), NULL, jo_caution);
    jo_list(w, l, "estimate_cautions", lt_estimate_cautions.count(l), NULL, jo_estimate_caution);
    jo_top_str(w, "caution_deferral", caution_deferral());
    jo_puts(w, "\n}\n");
}

enum hl_status json_out_render(const struct ledger *l, char **text, struct hl_err *e)
{
    struct jo w = {.e = e};
    *text = NULL;
    if (!(w.buf = hl_malloc(JO_BUF)))
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory while writing the JSON ledger");
    jo_document(&w, l);
    jo_flush(&w);
    hl_free(w.buf);
    if (w.st != HL_OK) {
        hl_free(w.mem);
        return w.st;
    }
    *text = w.mem;
    return HL_OK;
}

enum hl_status json_out_write(const struct ledger *l, const char *path, struct hl_err *e)
{
    enum hl_status st = afile_check_target(path, e);
    char *tmp = NULL;
    if (st || (st = afile_tmpname(path, &tmp, e)))
        return st;
    struct jo w = {.e = e, .fname = path};
    w.f = fopen(tmp, "wb");
    if (!w.f) {
        st = hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(errno));
        unlink(tmp);
        hl_free(tmp);
        return st;
    }
    if (!(w.buf = hl_malloc(JO_BUF)))
        jo_nomem(&w);
    else
        jo_document(&w, l);
    jo_flush(&w);
    hl_free(w.buf);
    /* as afile_write: fsync before the rename, so a crash never leaves an empty ledger */
    int err = 0;
    if (w.st == HL_OK && (fflush(w.f) != 0 || ferror(w.f)))
        err = errno ? errno : EIO;
    if (w.st == HL_OK && !err && fsync(fileno(w.f)) != 0 && errno != EINVAL)
        err = errno;
    if (fclose(w.f) != 0 && w.st == HL_OK && !err)
        err = errno ? errno : EIO;
    if (w.st == HL_OK && err)
        w.st = hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(err));
    if (w.st != HL_OK) {
        unlink(tmp);
        hl_free(tmp);
        return w.st;
    }
    st = afile_commit(tmp, path, e);
    hl_free(tmp);
    return st;
}

/*
 * formula.c - molecular formula text <-> element counts (see formula.h).
 *
 * Grammar (recursive descent, one byte of look-ahead):
 *   formula := group+
 *   group   := (element | '(' formula ')') count?
 *   element := 'A'..'Z' 'a'..'z'?
 *   count   := '1'..'9' digit*   (a count starting with 0 is refused)
 * Limits keep every sum far inside a long: a written count is at most
 * FORMULA_MAX_COUNT, nesting at most FORMULA_MAX_DEPTH, and no element may
 * total more than FORMULA_MAX_ATOMS atoms after multipliers.
 */
#include "formula.h"

#include <stdio.h>
#include <string.h>

#define FORMULA_MAX_COUNT 1000000L
#define FORMULA_MAX_DEPTH 16
#define FORMULA_MAX_ATOMS 1000000000L

struct parser {
    const char *s;
    size_t pos;
    struct hl_err *e;
};

/* Sets p->e (when given) to an input error at column pos + 1 naming the formula, msg and arg
 * (NULL: none); returns HL_ERR_INPUT. */
static enum hl_status fail(struct parser *p, size_t pos, const char *msg, const char *arg)
{
    if (p->e) {
        hl_err_clear(p->e);
        p->e->status = HL_ERR_INPUT;
        p->e->col = (int)pos + 1;
        if (arg)
            snprintf(p->e->msg, sizeof p->e->msg, "formula '%.60s': %s '%s' at column %d", p->s,
                     msg, arg, (int)pos + 1);
        else
            snprintf(p->e->msg, sizeof p->e->msg, "formula '%.60s': %s at column %d", p->s, msg,
                     (int)pos + 1);
    }
    return HL_ERR_INPUT;
}

/* ASCII letter and digit tests, locale-free. */
static int is_upper(char c) { return c >= 'A' && c <= 'Z'; }
static int is_lower(char c) { return c >= 'a' && c <= 'z'; }
static int is_digit(char c) { return c >= '0' && c <= '9'; }

/* Optional count after a group; *out = 1 when absent. */
static enum hl_status read_count(struct parser *p, long *out)
{
    *out = 1;
    if (!is_digit(p->s[p->pos]))
        return HL_OK;
    size_t start = p->pos;
    if (p->s[p->pos] == '0') {
        /* "C0" is a zero count, "C01" a malformed one: both are typing errors */
        if (is_digit(p->s[p->pos + 1]))
            return fail(p, start, "count with a leading zero", NULL);
        return fail(p, start, "count must be at least 1, got", "0");
    }
    long v = 0;
    while (is_digit(p->s[p->pos])) {
        v = v * 10 + (p->s[p->pos] - '0');
        p->pos++;
        if (v > FORMULA_MAX_COUNT)
            return fail(p, start, "count over 1000000", NULL);
    }
    *out = v;
    return HL_OK;
}

/* Add times * g to acc, refusing totals over FORMULA_MAX_ATOMS. */
static enum hl_status add_checked(struct parser *p, size_t at, struct formula *acc,
                                  const struct formula *g, long times)
{
    for (int i = 0; i < EL_COUNT; i++) {
        if (!g->n[i])
            continue;
        /* both factors <= 1e9 and 1e6: the product fits in 64 bits; long may be 32 */
        long long t = (long long)g->n[i] * times + acc->n[i];
        if (t > FORMULA_MAX_ATOMS)
            return fail(p, at, "more than 1e9 atoms of one element", NULL);
        acc->n[i] = (long)t;
    }
    return HL_OK;
}

static enum hl_status parse_seq(struct parser *p, struct formula *f, int depth);

/* One group at p->pos: an element or a parenthesised formula (at nesting depth, at most
 * FORMULA_MAX_DEPTH), and its count; moves p->pos past it and adds its atoms to *f, refusing
 * totals over FORMULA_MAX_ATOMS. An error names the group's column. */
static enum hl_status parse_group(struct parser *p, struct formula *f, int depth)
{
    size_t start = p->pos;
    char c = p->s[p->pos];
    struct formula g;
    memset(&g, 0, sizeof g);
    if (c == '(') {
        if (depth >= FORMULA_MAX_DEPTH)
            return fail(p, start, "parentheses nested deeper than 16", NULL);
        p->pos++;
        if (p->s[p->pos] == ')')
            return fail(p, start, "empty parentheses", NULL);
        if (!p->s[p->pos])
            return fail(p, start, "unclosed parenthesis", NULL);
        enum hl_status st = parse_seq(p, &g, depth + 1);
        if (st)
            return st;
        if (p->s[p->pos] != ')')
            return fail(p, start, "unclosed parenthesis", NULL);
        p->pos++;
    } else if (is_upper(c)) {
        size_t len = is_lower(p->s[p->pos + 1]) ? 2 : 1;
        int el = elem_lookup(p->s + p->pos, len);
        if (el < 0) {
            char sym[3] = {c, len == 2 ? p->s[p->pos + 1] : '\0', '\0'};
            return fail(p, start, "unknown element symbol", sym);
        }
        g.n[el] = 1;
        p->pos += len;
    } else if (c == ')') {
        return fail(p, start, "unmatched closing parenthesis", NULL);
    } else if (is_digit(c)) {
        return fail(p, start, "count without an element before it", NULL);
    } else if (is_lower(c)) {
        char sym[2] = {c, '\0'};
        return fail(p, start, "element symbols start with a capital letter, got", sym);
    } else {
        char ch[5];
        if ((unsigned char)c >= 0x20 && (unsigned char)c < 0x7f)
            snprintf(ch, sizeof ch, "%c", c);
        else
            snprintf(ch, sizeof ch, "\\x%02x", (unsigned char)c);
        return fail(p, start, "unexpected character", ch);
    }
    long times;
    enum hl_status st = read_count(p, &times);
    if (st)
        return st;
    return add_checked(p, start, f, &g, times);
}

/* One or more groups, up to ')' or the end of text. */
static enum hl_status parse_seq(struct parser *p, struct formula *f, int depth)
{
    do {
        enum hl_status st = parse_group(p, f, depth);
        if (st)
            return st;
    } while (p->s[p->pos] && p->s[p->pos] != ')');
    return HL_OK;
}

enum hl_status formula_parse(const char *text, struct formula *f, struct hl_err *e)
{
    struct formula acc;
    memset(&acc, 0, sizeof acc);
    struct parser p = {text ? text : "", 0, e};
    if (!text || !*text)
        return fail(&p, 0, "empty formula", NULL);
    enum hl_status st = parse_seq(&p, &acc, 0);
    if (!st && p.s[p.pos] == ')')
        st = fail(&p, p.pos, "unmatched closing parenthesis", NULL);
    if (st)
        return st;
    if (f)
        *f = acc;
    return HL_OK;
}

double formula_molar_mass_g_mol(const struct formula *f)
{
    double m = 0.0;
    for (int i = 0; i < EL_COUNT; i++)
        m += (double)f->n[i] * elem_weight_g_mol(i);
    return m;
}

/* Append one element term to buf at *len, never overrunning n. */
static void put_term(char *buf, size_t n, size_t *len, int el, long count)
{
    if (*len >= n)
        return;
    int w = count == 1 ? snprintf(buf + *len, n - *len, "%s", elem_symbol(el))
                       : snprintf(buf + *len, n - *len, "%s%ld", elem_symbol(el), count);
    if (w < 0)
        return;
    *len += (size_t)w < n - *len ? (size_t)w : n - *len - 1;
}

char *formula_hill(const struct formula *f, char *buf, size_t n)
{
    if (!buf || n == 0)
        return buf;
    buf[0] = '\0';
    size_t len = 0;
    int with_c = f->n[EL_C] != 0;
    if (with_c) {
        put_term(buf, n, &len, EL_C, f->n[EL_C]);
        if (f->n[EL_H])
            put_term(buf, n, &len, EL_H, f->n[EL_H]);
    }
    /* the rest alphabetically by symbol: a selection over the small table */
    const char *last = "";
    for (;;) {
        int best = -1;
        for (int i = 0; i < EL_COUNT; i++) {
            if (!f->n[i] || (with_c && (i == EL_C || i == EL_H)))
                continue;
            const char *s = elem_symbol(i);
            if (strcmp(s, last) > 0 && (best < 0 || strcmp(s, elem_symbol(best)) < 0))
                best = i;
        }
        if (best < 0)
            break;
        put_term(buf, n, &len, best, f->n[best]);
        last = elem_symbol(best);
    }
    return buf;
}

void formula_add(struct formula *acc, const struct formula *f, long times)
{
    for (int i = 0; i < EL_COUNT; i++)
        acc->n[i] += f->n[i] * times;
}

int formula_equal(const struct formula *a, const struct formula *b)
{
    for (int i = 0; i < EL_COUNT; i++)
        if (a->n[i] != b->n[i])
            return 0;
    return 1;
}

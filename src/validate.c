/*
 * validate.c - the validation kit of the campaign reader (see validate.h): typed getters
 * with ranges, enums, dates, reagents, members with nearest-key suggestions, the field
 * path of messages and a set of ids.  Every message the campaign and catalog readers
 * give about a value is worded here.
 */
#include "validate.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hlmem.h"
#include "isodate.h"
#include "reagents.h"

size_t val_push_key(struct val_ctx *c, const char *k)
{
    size_t old = c->plen;
    size_t n = c->plen;
    if (n + 1 < sizeof c->path)
        c->path[n++] = '.';
    if (k[0])
        jpos_put_clean(c->path, sizeof c->path, &n, k, strlen(k));
    else
        jpos_put_clean(c->path, sizeof c->path, &n, "\"\"", 2);
    c->plen = n;
    return old;
}

size_t val_push_index(struct val_ctx *c, long i)
{
    size_t old = c->plen;
    int w = snprintf(c->path + c->plen, sizeof c->path - c->plen, "[%ld]", i);
    if (w > 0)
        c->plen = c->plen + (size_t)w < sizeof c->path ? c->plen + (size_t)w : sizeof c->path - 1;
    return old;
}

void val_pop(struct val_ctx *c, size_t old)
{
    c->plen = old;
    c->path[old] = '\0';
}

const struct jpos_val *val_vp(const struct val_ctx *c, const cJSON *n)
{
    if (!n || n->valueint < 0 || (size_t)n->valueint >= c->d->nv)
        return NULL;
    return &c->d->v[n->valueint];
}

/* A value put in by --set k has no place in the file: line -(k+1) (override.h). */
static int set_line(const cJSON *n) { return n && n->valueint < 0 ? n->valueint : 0; }

struct camp_pos val_pos(const struct val_ctx *c, const cJSON *n)
{
    const struct jpos_val *p = val_vp(c, n);
    struct camp_pos r = {p ? p->line : set_line(n), p ? p->col : 0};
    return r;
}

/* Escape map of the string value n (see struct camp_strpos).  The scanner has
 * checked the string, so the raw text can be walked without bounds doubts up to its
 * closing quote; only the three strings the models blame are mapped, once each. */
enum hl_status val_esc_map(struct val_ctx *c, const cJSON *n, struct camp_strpos *sp)
{
    const struct jpos_val *p = val_vp(c, n);
    sp->pos = val_pos(c, n);
    sp->nesc = 0;
    sp->esc = NULL;
    if (!p)
        return HL_OK;
    if (c->csv) {
        /* a CSV cell: unquoted, its text starts at the cell (so the "quote" is the byte
         * before); quoted, a doubled quote inside is one character from two bytes */
        const char *t = c->text + p->off;
        if (*t != '"') {
            sp->pos.col -= 1;
            return HL_OK;
        }
        for (int pass = 0; pass < 2; pass++) {
            int k = 0, dec = 0;
            for (t = c->text + p->off + 1; !(t[0] == '"' && t[1] != '"'); t++, dec++)
                if (t[0] == '"') {
                    if (pass)
                        sp->esc[k] = (struct camp_esc){dec, 1, 2};
                    k++;
                    t++;
                }
            if (pass || !k)
                break;
            if (!(sp->esc = hl_malloc((size_t)k * sizeof *sp->esc)))
                return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
            sp->nesc = k;
        }
        return HL_OK;
    }
    for (int pass = 0; pass < 2; pass++) {
        /* pass 0 counts, pass 1 fills an array of exactly that size */
        int k = 0, dec = 0;
        const char *t = c->text + p->off + 1;
        while (*t != '"') {
            if (*t != '\\') {
                t++;
                dec++;
                continue;
            }
            int raw = 2, d = 1;
            if (t[1] == 'u') {
                unsigned cp = 0;
                jpos_hex4(t + 2, 4, &cp);
                raw = 6;
                d = cp < 0x80 ? 1 : cp < 0x800 ? 2 : 3;
                if (cp >= 0xD800 && cp <= 0xDBFF) { /* a pair: one 4-byte character */
                    raw = 12;
                    d = 4;
                }
            }
            if (pass)
                sp->esc[k] = (struct camp_esc){dec, (unsigned char)d, (unsigned char)raw};
            k++;
            dec += d;
            t += raw;
        }
        if (pass || !k)
            break;
        sp->esc = hl_malloc((size_t)k * sizeof *sp->esc);
        if (!sp->esc)
            return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
        sp->nesc = k;
    }
    return HL_OK;
}

enum hl_status val_err(struct val_ctx *c, const cJSON *n, int at_key, const char *fmt, ...)
{
    char msg[480], field[160];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    jpos_field(field, sizeof field, c->prefix, c->path);
    const struct jpos_val *p = val_vp(c, n);
    int line = set_line(n), col = 0;
    if (p) {
        line = at_key && p->kline ? p->kline : p->line;
        col = at_key && p->kline ? p->kcol : p->col;
    }
    return hl_err_at(c->e, HL_ERR_INPUT, line, col, field, "%s", msg);
}

const char *val_tname(const cJSON *n)
{
    if (cJSON_IsObject(n)) return "an object";
    if (cJSON_IsArray(n)) return "an array";
    if (cJSON_IsString(n)) return "a string";
    if (cJSON_IsNumber(n)) return "a number";
    if (cJSON_IsBool(n)) return "a boolean";
    if (cJSON_IsNull(n)) return "null";
    return "an unknown value";
}

/* Collect the members of obj into slot[] by key; unknown and duplicate keys are errors. */
enum hl_status val_members(struct val_ctx *c, const cJSON *obj, const char *const *names, int n,
                              const cJSON **slot)
{
    if (!cJSON_IsObject(obj))
        return val_err(c, obj, 0, "must be an object (got %s)", val_tname(obj));
    for (int k = 0; k < n; k++)
        slot[k] = NULL;
    for (const cJSON *m = obj->child; m; m = m->next) {
        int k = 0;
        while (k < n && strcmp(names[k], m->string) != 0)
            k++;
        if (k == n) {
            val_push_key(c, m->string);
            const char *near = hl_nearest(m->string, names, n, 0);
            if (near)
                return val_err(c, m, 1, "unknown key (did you mean '%s'?)", near);
            char list[400];
            size_t L = 0;
            list[0] = '\0';
            for (int j = 0; j < n && L + 1 < sizeof list; j++) {
                int w = snprintf(list + L, sizeof list - L, "%s%s", j ? ", " : "", names[j]);
                if (w > 0)
                    L = L + (size_t)w < sizeof list ? L + (size_t)w : sizeof list - 1;
            }
            return val_err(c, m, 1, "unknown key (known keys here: %s)", list);
        }
        if (slot[k]) {
            const struct jpos_val *p = val_vp(c, slot[k]);
            val_push_key(c, m->string);
            return val_err(c, m, 1, "duplicate key (first given at %d:%d)", p ? p->kline : 0,
                        p ? p->kcol : 0);
        }
        slot[k] = m;
    }
    return HL_OK;
}

enum hl_status val_missing(struct val_ctx *c, const cJSON *obj, const char *key, const char *what)
{
    val_push_key(c, key);
    return val_err(c, obj, 0, "missing%s%s", what ? ": " : " (required)", what ? what : "");
}

/* Raw text of a number value, for messages (1e400 is shown as written, not as inf). */
void val_raw_number(const struct val_ctx *c, const cJSON *n, char *buf, size_t cap)
{
    const struct jpos_val *p = val_vp(c, n);
    size_t k = 0;
    if (p)
        for (const char *s = c->text + p->off + (c->csv && c->text[p->off] == '"'); k + 1 < cap && *s && strchr("+-.0123456789eE", *s); s++)
            buf[k++] = *s;
    buf[k] = '\0';
}

enum hl_status val_num(struct val_ctx *c, const cJSON *m, struct val_rng r, double *out)
{
    size_t old = val_push_key(c, m->string);
    if (!cJSON_IsNumber(m))
        return val_err(c, m, 0, "must be a number (got %s)", val_tname(m));
    double x = m->valuedouble;
    if (!isfinite(x)) {
        char raw[72];
        val_raw_number(c, m, raw, sizeof raw);
        return val_err(c, m, 0, "must be a finite number (got %s)", raw);
    }
    if (r.lo_open ? !(x > r.lo) : !(x >= r.lo)) {
        char lo[40];
        if (r.lo_text)
            snprintf(lo, sizeof lo, "%s", r.lo_text);
        else
            snprintf(lo, sizeof lo, "%.15g", r.lo);
        return val_err(c, m, 0, "must be %s %s (got %.15g)%s%s", r.lo_open ? ">" : ">=", lo, x,
                    r.why ? ": " : "", r.why ? r.why : "");
    }
    if (r.hi_open ? !(x < r.hi) : !(x <= r.hi))
        return val_err(c, m, 0, "must be %s %.15g (got %.15g)", r.hi_open ? "<" : "<=", r.hi, x);
    *out = x;
    val_pop(c, old);
    return HL_OK;
}

enum hl_status val_int(struct val_ctx *c, const cJSON *m, long lo, long hi, long *out)
{
    double x;
    struct val_rng r = {(double)lo, (double)hi, 0, 0, NULL, NULL};
    enum hl_status st = val_num(c, m, r, &x);
    if (st)
        return st;
    if (x != floor(x)) {
        val_push_key(c, m->string);
        return val_err(c, m, 0, "must be a whole number (got %.15g)", x);
    }
    *out = (long)x;
    return HL_OK;
}

/* A string; VAL_TEXT refuses control characters (it reaches a workbook cell). */
enum hl_status val_str(struct val_ctx *c, const cJSON *m, int flags, size_t maxlen, const char **out)
{
    size_t old = val_push_key(c, m->string);
    if (!cJSON_IsString(m) || !m->valuestring)
        return val_err(c, m, 0, "must be a string (got %s)", val_tname(m));
    const unsigned char *s = (const unsigned char *)m->valuestring;
    size_t len = strlen(m->valuestring);
    if (len > maxlen)
        return val_err(c, m, 0, "too long (%zu bytes; at most %zu)", len, maxlen);
    if ((flags & VAL_NONEMPTY) && len == 0)
        return val_err(c, m, 0, "must not be empty");
    if (flags & VAL_TEXT)
        for (size_t j = 0; j < len; j++) {
            unsigned cp = 0;
            if (s[j] < 0x20 || s[j] == 0x7f)
                cp = s[j];
            else if (s[j] == 0xC2 && j + 1 < len && s[j + 1] >= 0x80 && s[j + 1] <= 0x9F)
                cp = s[j + 1];
            else if (s[j] == 0xEF && j + 2 < len && s[j + 1] == 0xBF && s[j + 2] >= 0xBE)
                /* U+FFFE, U+FFFF: outside XML 1.0's Char production (section 2.2), so a workbook
                 * holding them is not well-formed; the scanner already refuses surrogates */
                return val_err(c, m, 0, "contains the noncharacter U+%04X at byte %zu (XML 1.0 forbids "
                            "it, so no workbook can hold it)", 0xFFFEu + (s[j + 2] - 0xBEu), j + 1);
            else
                continue;
            return val_err(c, m, 0, "contains the control character U+%04X at byte %zu "
                        "(not allowed in text that reaches the workbook)", cp, j + 1);
        }
    *out = m->valuestring;
    val_pop(c, old);
    return HL_OK;
}

enum hl_status val_dup_str(struct val_ctx *c, const cJSON *m, int flags, size_t maxlen, char **out)
{
    const char *s;
    enum hl_status st = val_str(c, m, flags, maxlen, &s);
    if (st)
        return st;
    char *d = hl_strdup(s);
    if (!d)
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    hl_free(*out);
    *out = d;
    return HL_OK;
}

/* Short printable quote of a user string for messages. */
void val_quote(const char *s, char *buf, size_t cap)
{
    size_t k = 0, n = strlen(s);
    size_t show = n > 40 ? 40 : n;
    jpos_put_clean(buf, cap, &k, s, show);
    if (n > show && k + 4 < cap) {
        memcpy(buf + k, "...", 4);
    }
}

enum hl_status val_enum(struct val_ctx *c, const cJSON *m, const char *const *names, int n, int *out)
{
    const char *s;
    enum hl_status st = val_str(c, m, 0, VAL_MAX_TEXT, &s);
    if (st)
        return st;
    for (int k = 0; k < n; k++)
        if (strcmp(s, names[k]) == 0) {
            *out = k;
            return HL_OK;
        }
    char q[64];
    val_quote(s, q, sizeof q);
    val_push_key(c, m->string);
    if (n == 2)
        return val_err(c, m, 0, "must be \"%s\" or \"%s\" (got \"%s\")", names[0], names[1], q);
    char list[320];
    size_t len = 0;
    list[0] = '\0';
    for (int k = 0; k < n && len < sizeof list; k++)
        len += (size_t)snprintf(list + len, sizeof list - len, "%s\"%s\"",
                                k == 0 ? "" : k == n - 1 ? " or " : ", ", names[k]);
    return val_err(c, m, 0, "must be %s (got \"%s\")", list, q);
}

enum hl_status val_date(struct val_ctx *c, const cJSON *m, int64_t *out)
{
    const char *s;
    enum hl_status st = val_str(c, m, VAL_TEXT, 64, &s);
    if (st)
        return st;
    int bad = 0;
    if (isodate_parse(s, out, &bad) == 0)
        return HL_OK;
    char q[64];
    val_quote(s, q, sizeof q);
    val_push_key(c, m->string);
    return val_err(c, m, 0, "\"%s\" is not a valid ISO 8601 date (YYYY-MM-DD or YYYY-MM-DDTHH:MM); "
                "wrong at character %d", q, bad + 1);
}

/* Reagent by its campaign spelling; unknown names get the nearest known one. */
enum hl_status val_reagent(struct val_ctx *c, const cJSON *m, int allow_naoh, int *out)
{
    const char *s;
    enum hl_status st = val_str(c, m, VAL_TEXT, VAL_MAX_TEXT, &s);
    if (st)
        return st;
    int id = reagent_lookup(s);
    char q[64];
    val_quote(s, q, sizeof q);
    if (id >= 0 && id < RG_COUNT && (allow_naoh || id < RG_CHARGEABLE)) {
        *out = id;
        return HL_OK;
    }
    val_push_key(c, m->string);
    if (id >= 0)
        return val_err(c, m, 0, "\"%s\" cannot be charged to a reactor (it is the scrubber make-up)", q);
    const char *names[RG_COUNT];
    int nn = 0;
    char list[200];
    size_t L = 0;
    list[0] = '\0';
    for (int k = 0; k < RG_COUNT; k++) {
        const struct reagent_info *ri = reagent_get(k);
        if (!ri || (!allow_naoh && k >= RG_CHARGEABLE))
            continue;
        names[nn++] = ri->name;
        int w = snprintf(list + L, sizeof list - L, "%s%s", L ? ", " : "", ri->name);
        if (w > 0)
            L = L + (size_t)w < sizeof list ? L + (size_t)w : sizeof list - 1;
    }
    const char *near = hl_nearest(s, names, nn, 1);
    if (near)
        return val_err(c, m, 0, "unknown reagent \"%s\" (did you mean \"%s\"?)", q, near);
    return val_err(c, m, 0, "unknown reagent \"%s\" (known: %s)", q, list);
}

enum hl_status val_array(struct val_ctx *c, const cJSON *m, int nonempty)
{
    size_t old = val_push_key(c, m->string);
    if (!cJSON_IsArray(m))
        return val_err(c, m, 0, "must be an array (got %s)", val_tname(m));
    if (nonempty && !m->child && !((size_t)m->valueint == c->d->run_vi && c->d->nel > 0))
        return val_err(c, m, 0, "must not be empty");
    val_pop(c, old);
    return HL_OK;
}

/* ---- string hash set (ids), open addressing, FNV-1a ---- */
static uint64_t fnv1a(const char *s)
{
    uint64_t h = 1469598103934665603ull;
    for (; *s; s++)
        h = (h ^ (unsigned char)*s) * 1099511628211ull;
    return h;
}

void val_idset_free(struct val_idset *h)
{
    hl_free(h->key);
    hl_free(h->val);
    memset(h, 0, sizeof *h);
}

int val_idset_init(struct val_idset *h, size_t expect)
{
    size_t cap = 16;
    while (cap < 2 * expect + 2)
        cap *= 2;
    h->key = hl_calloc(cap, sizeof *h->key);
    h->val = hl_calloc(cap, sizeof *h->val);
    h->cap = cap;
    h->n = 0;
    if (!h->key || !h->val) {
        val_idset_free(h);
        return -1;
    }
    return 0;
}

/* Value stored under key, or -1. */
int val_idset_find(const struct val_idset *h, const char *key)
{
    if (!h->cap)
        return -1;
    for (size_t i = (size_t)fnv1a(key) & (h->cap - 1);; i = (i + 1) & (h->cap - 1)) {
        if (!h->key[i])
            return -1;
        if (strcmp(h->key[i], key) == 0)
            return h->val[i];
    }
}

/* Insert (the table was sized for all keys); returns the existing value or -1 if new. */
int val_idset_add(struct val_idset *h, const char *key, int val)
{
    for (size_t i = (size_t)fnv1a(key) & (h->cap - 1);; i = (i + 1) & (h->cap - 1)) {
        if (!h->key[i]) {
            h->key[i] = key;
            h->val[i] = val;
            h->n++;
            return -1;
        }
        if (strcmp(h->key[i], key) == 0)
            return h->val[i];
    }
}

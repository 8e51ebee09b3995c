/*
 * jsonpos.c - the positioned JSON reader (see jsonpos.h).
 *
 * Two linear passes over the text.  A small scanner of our own checks the
 * JSON syntax (RFC 8259), UTF-8 (RFC 3629), escapes and nesting depth, and
 * records for every value, in document order, its byte offset and line:column
 * and those of its key: cJSON keeps no positions and gives no messages.
 * cJSON then builds the tree.  Its nodes are created in the same document
 * (pre-)order, so the i-th node of a pre-order walk is the i-th value the
 * scanner saw; the index is stored in the node's valueint, which the readers
 * never read otherwise (numbers come from valuedouble: valueint saturates).
 * Line and column are counted while scanning (newlines can only occur in
 * whitespace), so no position ever costs a rescan.
 *
 * Why not jsmn (libjsmn-dev), which also gives every token's byte offsets: in its
 * strict mode it accepts 28 of the 47 syntax-malformed files of tests/bad and the
 * fuzz regressions that this scanner refuses (numbers such as 01 or 1., bad UTF-8,
 * unpaired surrogates, \u0000, control characters in strings, trailing commas,
 * nesting past 64), and it names no cause; the messages must stay, so its tokens
 * would come on top of this scan, not instead of it.  It also wants one token (20
 * bytes with parent links) per value of the whole document: 2.9 million, 58 MB for
 * the 10^5-run bench campaign, where this scanner keeps 70 values and one span per
 * run (measured: jsmn 0.14 s with line:column, this scan 0.05-0.07 s).
 */
#include "jsonpos.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "hlmem.h"

#define MAX_DEPTH 64          /* far below cJSON's compiled-in 1000 */
#define MAX_NUMBER_CHARS 63   /* cJSON copies at most 63 characters of a number */

struct frame { int is_obj; size_t key_off, key_len; long index; int has; };

struct scan {
    const char *t; size_t n, i;
    int line; size_t lstart;
    struct jpos_val *v; size_t nv, cap;
    struct frame fr[MAX_DEPTH + 1]; int depth;
    const char *prefix, *doc;
    struct hl_err *e;
    /* The campaign's runs are read one at a time (each its own small tree), so the whole
     * file never stands as one tree: the first top-level "runs" array, when streams is
     * set, records its elements' spans in el[] and none of the values inside them. */
    int streams, norec;
    size_t run_vi;              /* value index of that array, SIZE_MAX when none */
    size_t run_open, run_close; /* offsets of its [ and ] */
    struct jpos_span *el; size_t nel, elcap;
};

/* Append printable bytes of s[0..n) to buf (controls shown as '?'). */
void jpos_put_clean(char *buf, size_t cap, size_t *k, const char *s, size_t n)
{
    for (size_t j = 0; j < n && *k + 1 < cap; j++) {
        unsigned char ch = (unsigned char)s[j];
        buf[(*k)++] = (ch < 0x20 || ch == 0x7f) ? '?' : (char)ch;
    }
    buf[*k] = '\0';
}

/* Field path: prefix ("" or "catalog") + components; "$" for the top of a campaign. */
void jpos_field(char *out, size_t cap, const char *prefix, const char *path)
{
    size_t k = 0;
    /* top-level arrays (never valid, but reported) read "$[0]" */
    const char *parts[3] = {prefix, (!prefix[0] && path[0] != '.') ? "$" : "",
                            path + (!prefix[0] && path[0] == '.')};
    for (int j = 0; j < 3; j++)
        for (const char *p = parts[j]; *p && k + 1 < cap; p++)
            out[k++] = *p;
    out[k] = '\0';
}

static void scan_path(const struct scan *s, char *out, size_t cap)
{
    char p[512];
    size_t k = 0;
    p[0] = '\0';
    for (int d = 0; d < s->depth; d++) {
        const struct frame *f = &s->fr[d];
        if (!f->has)
            continue;
        if (f->is_obj) {
            if (k + 1 < sizeof p)
                p[k++] = '.';
            if (f->key_len)
                jpos_put_clean(p, sizeof p, &k, s->t + f->key_off, f->key_len);
            else
                jpos_put_clean(p, sizeof p, &k, "\"\"", 2); /* an empty key shows as "" */
        } else {
            int w = snprintf(p + k, sizeof p - k, "[%ld]", f->index);
            if (w > 0)
                k = k + (size_t)w < sizeof p ? k + (size_t)w : sizeof p - 1;
        }
    }
    p[k] = '\0';
    jpos_field(out, cap, s->prefix, p);
}

static enum hl_status serr(struct scan *s, size_t at, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
static enum hl_status serr(struct scan *s, size_t at, const char *fmt, ...)
{
    char msg[480], field[160];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    scan_path(s, field, sizeof field);
    int col = at >= s->lstart ? (int)(at - s->lstart + 1) : 1;
    return hl_err_at(s->e, HL_ERR_INPUT, s->line, col, field, "%s", msg);
}

static void skip_ws(struct scan *s)
{
    while (s->i < s->n) {
        char c = s->t[s->i];
        if (c == ' ' || c == '\t' || c == '\r') {
            s->i++;
        } else if (c == '\n') {
            s->i++;
            s->line++;
            s->lstart = s->i;
        } else {
            break;
        }
    }
}

static const char *describe_byte(unsigned char c, char *buf, size_t n)
{
    if (c == '\'')
        snprintf(buf, n, "a single quote");
    else if (c >= 0x21 && c < 0x7f)
        snprintf(buf, n, "'%c'", c);
    else
        snprintf(buf, n, "byte 0x%02X", c);
    return buf;
}

/* Length of a valid UTF-8 sequence at p (RFC 3629 table 4), 0 if invalid. */
static int utf8_len(const unsigned char *p, size_t avail)
{
    unsigned char c = p[0];
    int n;
    unsigned char lo = 0x80, hi = 0xBF;
    if (c < 0x80)
        return 1;
    if (c >= 0xC2 && c <= 0xDF) n = 2;
    else if (c == 0xE0) { n = 3; lo = 0xA0; }
    else if (c >= 0xE1 && c <= 0xEC) n = 3;
    else if (c == 0xED) { n = 3; hi = 0x9F; }
    else if (c >= 0xEE && c <= 0xEF) n = 3;
    else if (c == 0xF0) { n = 4; lo = 0x90; }
    else if (c >= 0xF1 && c <= 0xF3) n = 4;
    else if (c == 0xF4) { n = 4; hi = 0x8F; }
    else return 0;
    if ((size_t)n > avail)
        return 0;
    if (p[1] < lo || p[1] > hi)
        return 0;
    for (int k = 2; k < n; k++)
        if (p[k] < 0x80 || p[k] > 0xBF)
            return 0;
    return n;
}

int jpos_hex4(const char *p, size_t avail, unsigned *cp)
{
    unsigned v = 0;
    if (avail < 4)
        return -1;
    for (int k = 0; k < 4; k++) {
        char c = p[k];
        v <<= 4;
        if (c >= '0' && c <= '9') v |= (unsigned)(c - '0');
        else if (c >= 'a' && c <= 'f') v |= (unsigned)(c - 'a' + 10);
        else if (c >= 'A' && c <= 'F') v |= (unsigned)(c - 'A' + 10);
        else return -1;
    }
    *cp = v;
    return 0;
}

/* Scan a string starting at the opening quote; is_key only changes the wording. */
static enum hl_status scan_string(struct scan *s, int is_key)
{
    size_t start = s->i;
    const char *what = is_key ? "key" : "string";
    s->i++;
    for (;;) {
        if (s->i >= s->n)
            return serr(s, s->n, "unexpected end of file inside a %s (opened at %d:%zu)", what,
                        s->line, start - s->lstart + 1);
        unsigned char c = (unsigned char)s->t[s->i];
        if (c == '"') {
            s->i++;
            return HL_OK;
        }
        if (c == '\\') {
            if (s->i + 1 >= s->n)
                return serr(s, s->n, "unexpected end of file inside a %s (opened at %d:%zu)", what,
                            s->line, start - s->lstart + 1);
            char x = s->t[s->i + 1];
            if (strchr("\"\\/bfnrt", x) && x) {
                s->i += 2;
                continue;
            }
            if (x != 'u')
                return serr(s, s->i, "invalid escape '\\%c' in a %s", (x >= 0x21 && x < 0x7f) ? x : '?',
                            what);
            unsigned cp, lo;
            if (jpos_hex4(s->t + s->i + 2, s->n - s->i - 2, &cp))
                return serr(s, s->i, "invalid \\u escape in a %s (four hex digits expected)", what);
            if (cp == 0)
                return serr(s, s->i, "\\u0000 (NUL) is not allowed in a %s", what);
            if (cp >= 0xDC00 && cp <= 0xDFFF)
                return serr(s, s->i, "unpaired surrogate \\u%04X in a %s", cp, what);
            if (cp >= 0xD800 && cp <= 0xDBFF) {
                size_t j = s->i + 6;
                if (j + 1 >= s->n || s->t[j] != '\\' || s->t[j + 1] != 'u' ||
                    jpos_hex4(s->t + j + 2, s->n - j - 2, &lo) || lo < 0xDC00 || lo > 0xDFFF)
                    return serr(s, s->i, "unpaired surrogate \\u%04X in a %s", cp, what);
                s->i += 12;
            } else {
                s->i += 6;
            }
            continue;
        }
        if (c < 0x20) {
            if (c == '\n' || c == '\r')
                return serr(s, s->i, "%s not closed before the end of the line", what);
            return serr(s, s->i, "unescaped control character 0x%02X in a %s", c, what);
        }
        int k = utf8_len((const unsigned char *)s->t + s->i, s->n - s->i);
        if (!k)
            return serr(s, start, "invalid UTF-8 in a %s (byte 0x%02X at byte %zu of it)", what, c,
                        s->i - start);
        s->i += (size_t)k;
    }
}

static int is_digit(char c) { return c >= '0' && c <= '9'; }

/* RFC 8259 number grammar; cJSON is laxer (it takes 01, 1., .5), so we check first. */
static enum hl_status scan_number(struct scan *s)
{
    size_t st = s->i, j = s->i;
    const char *t = s->t;
    size_t n = s->n;
    if (j < n && t[j] == '-')
        j++;
    if (j >= n || !is_digit(t[j]))
        goto bad;
    if (t[j] == '0') {
        j++;
    } else {
        while (j < n && is_digit(t[j]))
            j++;
    }
    if (j < n && t[j] == '.') {
        j++;
        if (j >= n || !is_digit(t[j]))
            goto bad;
        while (j < n && is_digit(t[j]))
            j++;
    }
    if (j < n && (t[j] == 'e' || t[j] == 'E')) {
        j++;
        if (j < n && (t[j] == '+' || t[j] == '-'))
            j++;
        if (j >= n || !is_digit(t[j]))
            goto bad;
        while (j < n && is_digit(t[j]))
            j++;
    }
    if (j < n && (is_digit(t[j]) || t[j] == '.' || t[j] == 'e' || t[j] == 'E' || t[j] == '+' ||
                  t[j] == '-' || (t[j] >= 'a' && t[j] <= 'z') || (t[j] >= 'A' && t[j] <= 'Z')))
        goto bad;
    if (j - st > MAX_NUMBER_CHARS)
        return serr(s, st, "number too long (more than %d characters)", MAX_NUMBER_CHARS);
    s->i = j;
    return HL_OK;
bad:
    return serr(s, st, "invalid number (JSON numbers look like 12, -0.5 or 1.5e3)");
}

static enum hl_status record(struct scan *s, int kline, int kcol)
{
    if (s->norec)
        return HL_OK;
    if (s->nv == s->cap) {
        size_t nc = s->cap ? s->cap * 2 : 64;
        struct jpos_val *nvp = hl_realloc(s->v, nc * sizeof *nvp);
        if (!nvp)
            return hl_err_set(s->e, HL_ERR_NOMEM, "out of memory reading the %s", s->doc);
        s->v = nvp;
        s->cap = nc;
    }
    struct jpos_val *p = &s->v[s->nv++];
    p->off = s->i;
    p->line = s->line;
    p->col = (int)(s->i - s->lstart + 1);
    p->kline = kline;
    p->kcol = kcol;
    return HL_OK;
}

static enum hl_status scan_value(struct scan *s, int kline, int kcol);

/* Append the span of the runs element starting at s->i. */
static enum hl_status add_span(struct scan *s)
{
    if (s->nel == s->elcap) {
        size_t nc = s->elcap ? s->elcap * 2 : 64;
        struct jpos_span *ne = hl_realloc(s->el, nc * sizeof *ne);
        if (!ne)
            return hl_err_set(s->e, HL_ERR_NOMEM, "out of memory reading the %s", s->doc);
        s->el = ne;
        s->elcap = nc;
    }
    s->el[s->nel++] = (struct jpos_span){s->i, s->i, s->line, (int)(s->i - s->lstart + 1)};
    return HL_OK;
}

static enum hl_status scan_container(struct scan *s, int is_obj)
{
    /* the runs array: the top-level object's first "runs" member, when it is an array */
    int runs = s->streams && !is_obj && s->depth == 1 && s->fr[0].is_obj && s->fr[0].key_len == 4 &&
               !memcmp(s->t + s->fr[0].key_off, "runs", 4) && s->run_vi == (size_t)-1 && !s->norec;
    if (runs) {
        s->run_vi = s->nv - 1;
        s->run_open = s->i;
    }
    int open_line = s->line, open_col = (int)(s->i - s->lstart + 1);
    char close = is_obj ? '}' : ']';
    if (s->depth >= MAX_DEPTH)
        return serr(s, s->i, "nesting deeper than %d levels", MAX_DEPTH);
    struct frame *f = &s->fr[s->depth++];
    memset(f, 0, sizeof *f);
    f->is_obj = is_obj;
    s->i++;
    skip_ws(s);
    if (s->i < s->n && s->t[s->i] == close) {
        if (runs)
            s->run_close = s->i;
        s->i++;
        s->depth--;
        return HL_OK;
    }
    for (long idx = 0;; idx++) {
        enum hl_status st;
        int kl = 0, kc = 0;
        if (s->i >= s->n)
            goto eof;
        if (is_obj) {
            if (s->t[s->i] != '"') {
                char b[24];
                if (s->t[s->i] == '}' && idx > 0)
                    return serr(s, s->i, "trailing comma before '}'");
                return serr(s, s->i, "expected a key in double quotes, found %s",
                            describe_byte((unsigned char)s->t[s->i], b, sizeof b));
            }
            size_t ks = s->i;
            kl = s->line;
            kc = (int)(s->i - s->lstart + 1);
            f->has = 0;
            if ((st = scan_string(s, 1)))
                return st;
            f->key_off = ks + 1;
            f->key_len = s->i - ks - 2;
            f->has = 1;
            skip_ws(s);
            if (s->i >= s->n)
                goto eof;
            if (s->t[s->i] != ':') {
                char b[24];
                return serr(s, s->i, "expected ':' after the key, found %s",
                            describe_byte((unsigned char)s->t[s->i], b, sizeof b));
            }
            s->i++;
            skip_ws(s);
        } else {
            f->index = idx;
            f->has = 1;
            if (s->t[s->i] == ']')
                return serr(s, s->i, "trailing comma before ']'");
        }
        if (runs && (st = add_span(s)))
            return st;
        s->norec += runs;
        st = scan_value(s, kl, kc);
        s->norec -= runs;
        if (st)
            return st;
        if (runs)
            s->el[s->nel - 1].end = s->i;
        skip_ws(s);
        if (s->i >= s->n)
            goto eof;
        if (s->t[s->i] == ',') {
            s->i++;
            skip_ws(s);
            continue;
        }
        if (s->t[s->i] == close) {
            if (runs)
                s->run_close = s->i;
            s->i++;
            s->depth--;
            return HL_OK;
        }
        char b[24];
        return serr(s, s->i, "expected ',' or '%c', found %s", close,
                    describe_byte((unsigned char)s->t[s->i], b, sizeof b));
    }
eof:
    return serr(s, s->n, "unexpected end of file (the %s opened at %d:%d is not closed)",
                is_obj ? "object" : "array", open_line, open_col);
}

static enum hl_status scan_value(struct scan *s, int kline, int kcol)
{
    enum hl_status st;
    if (s->i >= s->n)
        return serr(s, s->n, "unexpected end of file (a value is missing)");
    if ((st = record(s, kline, kcol)))
        return st;
    char c = s->t[s->i];
    switch (c) {
    case '{': return scan_container(s, 1);
    case '[': return scan_container(s, 0);
    case '"': return scan_string(s, 0);
    case 't': case 'f': case 'n': {
        const char *w = c == 't' ? "true" : c == 'f' ? "false" : "null";
        size_t L = strlen(w);
        if (s->n - s->i >= L && memcmp(s->t + s->i, w, L) == 0) {
            s->i += L;
            return HL_OK;
        }
        return serr(s, s->i, "unexpected word (strings need double quotes)");
    }
    default:
        if (c == '-' || is_digit(c))
            return scan_number(s);
        if ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z'))
            return serr(s, s->i, "unexpected word (strings need double quotes)");
        {
            char b[24];
            return serr(s, s->i, "expected a value, found %s%s",
                        describe_byte((unsigned char)c, b, sizeof b),
                        c == '\'' ? " (strings need double quotes)" : "");
        }
    }
}

/* Scan the whole text; on success *skip is the byte-order-mark length. */
static enum hl_status scan_all(struct scan *s, size_t *skip)
{
    s->line = 1;
    s->lstart = 0;
    *skip = 0;
    if (s->n >= 3 && memcmp(s->t, "\xEF\xBB\xBF", 3) == 0)
        *skip = s->i = 3; /* RFC 8259 section 8.1 lets a parser ignore a byte order mark */
    skip_ws(s);
    if (s->i >= s->n)
        return serr(s, s->n, "unexpected end of file (the %s is empty)", s->doc);
    enum hl_status st = scan_value(s, 0, 0);
    if (st)
        return st;
    skip_ws(s);
    if (s->i < s->n)
        return serr(s, s->i, "trailing characters after the %s", s->doc);
    return HL_OK;
}

/* ------------------------------------------------------------------ */
/* Pass 2: cJSON tree with positions, then validation                   */
/* ------------------------------------------------------------------ */

static int assign_index(cJSON *node, size_t *k, size_t nv)
{
    for (; node; node = node->next) {
        if (*k >= nv)
            return -1;
        node->valueint = (int)(*k)++;
        if (node->child && assign_index(node->child, k, nv))
            return -1;
    }
    return 0;
}

void jpos_free(struct jpos_doc *d)
{
    hl_free(d->v);
    hl_free(d->el);
    cJSON_Delete(d->root);
    memset(d, 0, sizeof *d);
    d->run_vi = (size_t)-1;
}

/* Tree and position table of the text (streams: the top-level runs array's elements
 * kept as spans only, see struct scan). */
enum hl_status jpos_parse(const char *text, size_t len, const char *prefix, const char *docname,
                                int streams, struct jpos_doc *d, struct hl_err *e)
{
    memset(d, 0, sizeof *d);
    d->run_vi = (size_t)-1;
    if (len > JPOS_MAX_FILE)
        return hl_err_at(e, HL_ERR_INPUT, 1, 1, prefix[0] ? prefix : "$",
                         "the %s is larger than %u bytes", docname, JPOS_MAX_FILE);
    struct scan s;
    memset(&s, 0, sizeof s);
    s.t = text;
    s.n = len;
    s.prefix = prefix;
    s.doc = docname;
    s.e = e;
    s.streams = streams;
    s.run_vi = (size_t)-1;
    size_t skip;
    enum hl_status st = scan_all(&s, &skip);
    if (st) {
        hl_free(s.v);
        hl_free(s.el);
        return st;
    }
    char *copy = hl_malloc(len + 1);
    if (!copy) {
        hl_free(s.v);
        hl_free(s.el);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the %s", docname);
    }
    memcpy(copy, text, len);
    copy[len] = '\0';
    /* the runs become an empty array in the tree: blank between its brackets */
    if (s.run_vi != (size_t)-1 && s.run_close > s.run_open)
        memset(copy + s.run_open + 1, ' ', s.run_close - s.run_open - 1);
    const char *end = NULL;
    d->root = cJSON_ParseWithOpts(copy + skip, &end, 1);
    hl_free(copy);
    d->v = s.v;
    d->nv = s.nv;
    d->run_vi = s.run_vi;
    d->el = s.el;
    d->nel = s.nel;
    if (!d->root) {
        /* The scanner accepted the text and is stricter than cJSON, so a refusal here
         * is an allocation failure inside cJSON. */
        jpos_free(d);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the %s", docname);
    }
    size_t k = 0;
    if (assign_index(d->root, &k, d->nv) || k != d->nv) {
        jpos_free(d);
        return hl_err_set(e, HL_ERR_INTERNAL, "position table out of step with the JSON tree");
    }
    return HL_OK;
}

/* Tree and positions of one runs element sp of text (already checked by doc_parse's
 * scan): the same scanner from the element's own line and column, cJSON on its bytes.
 * The tables of d are reused from element to element (d->v grows to the largest). */
enum hl_status jpos_parse_span(const char *text, const struct jpos_span *sp, size_t *cap,
                                     struct jpos_doc *d, struct hl_err *e)
{
    cJSON_Delete(d->root);
    d->root = NULL;
    struct scan s;
    memset(&s, 0, sizeof s);
    s.t = text;
    s.n = sp->end;
    s.i = sp->off;
    s.line = sp->line;
    s.lstart = sp->off - (size_t)(sp->col - 1);
    s.v = d->v;
    s.cap = *cap;
    s.prefix = "";
    s.doc = "campaign";
    s.e = e;
    s.run_vi = (size_t)-1;
    enum hl_status st = scan_value(&s, 0, 0);
    d->v = s.v;
    *cap = s.cap;
    d->nv = s.nv;
    if (st)
        return st;
    d->root = cJSON_ParseWithLengthOpts(text + sp->off, sp->end - sp->off, NULL, 0);
    if (!d->root)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the campaign");
    size_t k = 0;
    if (assign_index(d->root, &k, d->nv) || k != d->nv)
        return hl_err_set(e, HL_ERR_INTERNAL, "position table out of step with the JSON tree");
    return HL_OK;
}

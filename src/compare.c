/*
 * compare.c - differences between two JSON ledgers (see compare.h).  Entries are matched
 * by their keys (month + reagent, scrubber id, run id, warning text); a quadratic match is
 * fine for the months, orders, scrubbers and warnings of a ledger, and runs are matched
 * through a sort of their ids, so a 1e5-run ledger costs n log n.
 */
#include "compare.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <xlsxwriter.h>

#include "hlmem.h"
#include "jtree.h"

/* Length of the UTF-8 character at p (RFC 3629; 0 = not one, or a control character). */
static int char_len(const unsigned char *p)
{
    if (*p < 0x80)
        return *p >= 0x20 && *p != 0x7f;
    int n = *p >= 0xC2 && *p <= 0xDF ? 2 : (*p & 0xF0) == 0xE0 ? 3 : *p >= 0xF0 && *p <= 0xF4 ? 4 : 0;
    for (int k = 1; k < n; k++)
        if ((p[k] & 0xC0) != 0x80)
            return 0;
    if ((n == 3 && ((*p == 0xE0 && p[1] < 0xA0) || (*p == 0xED && p[1] >= 0xA0))) ||
        (n == 4 && ((*p == 0xF0 && p[1] < 0x90) || (*p == 0xF4 && p[1] >= 0x90))))
        return 0;
    if (n == 3 && *p == 0xEF && p[1] == 0xBF && p[2] >= 0xBE)
        return 0; /* U+FFFE, U+FFFF: not XML 1.0 characters */
    return n;
}

/* s into buf (cap bytes) cut at a character, never inside one; a byte that is not UTF-8
 * text (a ledger file given by hand may hold any) becomes '?', so the JSON and the
 * workbook written from it stay valid. */
static void put_text(char *buf, size_t cap, const char *s)
{
    size_t k = 0;
    for (const unsigned char *p = (const unsigned char *)s; *p;) {
        int n = char_len(p);
        size_t w = n ? (size_t)n : 1;
        if (k + w >= cap)
            break;
        if (n)
            memcpy(buf + k, p, w);
        else
            buf[k] = '?';
        k += w;
        p += w;
    }
    buf[k] = '\0';
}

/* Text for a page header: as put_text, '&' doubled (a lone one starts a header code). */
static void put_hf(char *buf, size_t cap, const char *s)
{
    char t[256];
    put_text(t, sizeof t, s);
    size_t k = 0;
    for (const unsigned char *p = (const unsigned char *)t; *p;) {
        size_t n = (size_t)char_len(p), w = n + (*p == '&');
        if (k + w >= cap)
            break;
        if (*p == '&')
            buf[k++] = '&';
        memcpy(buf + k, p, n);
        k += n;
        p += n;
    }
    buf[k] = '\0';
}

static int add(struct cmp_result *r, const char *where, const char *what, const char *a, const char *b)
{
    if (r->n == r->cap) {
        int cap = r->cap ? 2 * r->cap : 32;
        struct cmp_diff *nd = hl_realloc(r->d, (size_t)cap * sizeof *nd);
        if (!nd)
            return -1;
        r->d = nd;
        r->cap = cap;
    }
    struct cmp_diff *d = &r->d[r->n++];
    put_text(d->where, sizeof d->where, where);
    put_text(d->what, sizeof d->what, what);
    put_text(d->a, sizeof d->a, a);
    put_text(d->b, sizeof d->b, b);
    return 0;
}

static void text_of(const cJSON *v, char *buf, size_t n)
{
    if (!v)
        snprintf(buf, n, "-");
    else if (cJSON_IsNumber(v))
        snprintf(buf, n, "%.6g", v->valuedouble);
    else if (cJSON_IsString(v))
        snprintf(buf, n, "%.60s", v->valuestring);
    else if (cJSON_IsBool(v))
        snprintf(buf, n, "%s", cJSON_IsTrue(v) ? "yes" : "no");
    else
        snprintf(buf, n, "null");
}

static int same(const cJSON *a, const cJSON *b)
{
    if (!a || !b)
        return !a && !b;
    if (cJSON_IsNumber(a) && cJSON_IsNumber(b)) {
        double x = a->valuedouble, y = b->valuedouble;
        return fabs(x - y) <= 1e-9 * fmax(1.0, fmax(fabs(x), fabs(y)));
    }
    return cJSON_Compare(a, b, 1);
}

/* Compare the listed keys of two objects (either may be NULL = absent). */
static int fields(struct cmp_result *r, const char *where, const cJSON *a, const cJSON *b,
                  const char *const *keys, int nk)
{
    for (int k = 0; k < nk; k++) {
        const cJSON *x = a ? cJSON_GetObjectItemCaseSensitive(a, keys[k]) : NULL;
        const cJSON *y = b ? cJSON_GetObjectItemCaseSensitive(b, keys[k]) : NULL;
        if (same(x, y))
            continue;
        char ta[64], tb[64];
        text_of(x, ta, sizeof ta);
        text_of(y, tb, sizeof tb);
        if (add(r, where, keys[k], ta, tb))
            return -1;
    }
    return 0;
}

static const char *str(const cJSON *o, const char *k)
{
    const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, k);
    return cJSON_IsString(v) ? v->valuestring : "";
}

/* The entry of array arr whose keys k1 (and k2) equal those of x. */
static const cJSON *find(const cJSON *arr, const cJSON *x, const char *k1, const char *k2)
{
    const cJSON *o;
    cJSON_ArrayForEach(o, arr)
        if (!strcmp(str(o, k1), str(x, k1)) && (!k2 || !strcmp(str(o, k2), str(x, k2))))
            return o;
    return NULL;
}

/* Entries of a keyed array: those in a (matched in b, or absent there), then those only in b. */
static int keyed(struct cmp_result *r, const cJSON *aa, const cJSON *ba, const char *k1, const char *k2,
                 const char *label, const char *const *keys, int nk)
{
    const cJSON *x;
    char where[96];
    cJSON_ArrayForEach(x, aa) {
        snprintf(where, sizeof where, "%s %s%s%s", label, str(x, k1), k2 ? " " : "", k2 ? str(x, k2) : "");
        if (fields(r, where, x, find(ba, x, k1, k2), keys, nk))
            return -1;
    }
    cJSON_ArrayForEach(x, ba) {
        if (find(aa, x, k1, k2))
            continue;
        snprintf(where, sizeof where, "%s %s%s%s", label, str(x, k1), k2 ? " " : "", k2 ? str(x, k2) : "");
        if (fields(r, where, NULL, x, keys, nk))
            return -1;
    }
    return 0;
}

/* Month x reagent charged: months[].reagents_kg as rows "month M reagent". */
static int reagents(struct cmp_result *r, const cJSON *am, const cJSON *bm)
{
    for (int side = 0; side < 2; side++) {
        const cJSON *m;
        cJSON_ArrayForEach(m, (side ? bm : am)) {
            const cJSON *other = find(side ? am : bm, m, "month", NULL);
            const cJSON *rk = cJSON_GetObjectItemCaseSensitive(m, "reagents_kg");
            const cJSON *ok = other ? cJSON_GetObjectItemCaseSensitive(other, "reagents_kg") : NULL;
            const cJSON *v;
            cJSON_ArrayForEach(v, rk) {
                const cJSON *w = ok ? cJSON_GetObjectItemCaseSensitive(ok, v->string) : NULL;
                if (side && w)
                    continue; /* seen from a */
                if (same(v, w))
                    continue;
                char where[96], ta[64], tb[64];
                snprintf(where, sizeof where, "month %s %s", str(m, "month"), v->string);
                text_of(side ? w : v, ta, sizeof ta);
                text_of(side ? v : w, tb, sizeof tb);
                if (add(r, where, "charged_kg", ta, tb))
                    return -1;
            }
        }
    }
    return 0;
}

/* Hottest liquor of each scrubber, from runs[].scrubber.liquor_temp_c_after. */
static double hottest(const cJSON *runs, const char *id)
{
    double t = -INFINITY;
    const cJSON *x;
    cJSON_ArrayForEach(x, runs) {
        const cJSON *s = cJSON_GetObjectItemCaseSensitive(x, "scrubber");
        const cJSON *v = s ? cJSON_GetObjectItemCaseSensitive(s, "liquor_temp_c_after") : NULL;
        if (cJSON_IsNumber(v) && !strcmp(str(x, "scrubber_id"), id) && v->valuedouble > t)
            t = v->valuedouble;
    }
    return t;
}

static int scrubbers(struct cmp_result *r, const cJSON *a, const cJSON *b)
{
    static const char *const keys[] = {"peak_acid_kmol_h", "changeouts", "naoh_kg", "overloaded",
                                       "peak_heat_kw"};
    const cJSON *as = cJSON_GetObjectItemCaseSensitive(a, "scrubbers"),
                *bs = cJSON_GetObjectItemCaseSensitive(b, "scrubbers");
    if (keyed(r, as, bs, "id", NULL, "scrubber", keys, 5))
        return -1;
    const cJSON *x;
    cJSON_ArrayForEach(x, as) {
        if (!find(bs, x, "id", NULL))
            continue;
        double ta = hottest(cJSON_GetObjectItemCaseSensitive(a, "runs"), str(x, "id")),
               tb = hottest(cJSON_GetObjectItemCaseSensitive(b, "runs"), str(x, "id"));
        if (fabs(ta - tb) > 1e-9 * fmax(1.0, fabs(ta)) && isfinite(ta) && isfinite(tb)) {
            char where[96], sa[64], sb[64];
            snprintf(where, sizeof where, "scrubber %s", str(x, "id"));
            snprintf(sa, sizeof sa, "%.6g", ta);
            snprintf(sb, sizeof sb, "%.6g", tb);
            if (add(r, where, "hottest_liquor_c", sa, sb))
                return -1;
        }
    }
    return 0;
}

/* Runs by id through sorted pointer arrays. */
static int by_id(const void *x, const void *y)
{
    return strcmp(str(*(const cJSON *const *)x, "id"), str(*(const cJSON *const *)y, "id"));
}

static const cJSON **sorted(const cJSON *arr, int *n)
{
    *n = cJSON_GetArraySize(arr);
    const cJSON **v = hl_malloc((size_t)(*n ? *n : 1) * sizeof *v);
    if (!v)
        return NULL;
    int k = 0;
    const cJSON *x;
    cJSON_ArrayForEach(x, arr)
        v[k++] = x;
    qsort(v, (size_t)k, sizeof *v, by_id);
    return v;
}

static int run_figures(struct cmp_result *r, const char *where, const cJSON *x, const cJSON *y)
{
    static const char *const keys[] = {"start", "reagent", "temp_c", "reactor_mode", "conversion_pct",
                                       "selectivity_pct", "yield_pct", "wanted_mol"};
    if (fields(r, where, x, y, keys, 8))
        return -1;
    static const char *const sub[][2] = {{"reagent_charged", "kg"}, {"byproducts", "HCl_kg"},
                                         {"byproducts", "HBr_kg"}, {"scrubber", "naoh_kg"},
                                         {"vent", "acid_kmol_h"}};
    for (size_t k = 0; k < sizeof sub / sizeof sub[0]; k++) {
        const cJSON *ox = cJSON_GetObjectItemCaseSensitive(x, sub[k][0]),
                    *oy = cJSON_GetObjectItemCaseSensitive(y, sub[k][0]);
        const cJSON *vx = ox ? cJSON_GetObjectItemCaseSensitive(ox, sub[k][1]) : NULL,
                    *vy = oy ? cJSON_GetObjectItemCaseSensitive(oy, sub[k][1]) : NULL;
        if (same(vx, vy))
            continue;
        char what[48], ta[64], tb[64];
        snprintf(what, sizeof what, "%s.%s", sub[k][0], sub[k][1]);
        text_of(vx, ta, sizeof ta);
        text_of(vy, tb, sizeof tb);
        if (add(r, where, what, ta, tb))
            return -1;
    }
    return 0;
}

static int runs(struct cmp_result *r, const cJSON *a, const cJSON *b)
{
    int na, nb;
    const cJSON **va = sorted(cJSON_GetObjectItemCaseSensitive(a, "runs"), &na);
    const cJSON **vb = sorted(cJSON_GetObjectItemCaseSensitive(b, "runs"), &nb);
    int rc = (!va || !vb) ? -1 : 0;
    for (int i = 0, j = 0; !rc && (i < na || j < nb);) {
        int c = i == na ? 1 : j == nb ? -1 : by_id(&va[i], &vb[j]);
        char where[96];
        snprintf(where, sizeof where, "run %s", str(c <= 0 ? va[i] : vb[j], "id"));
        if (c == 0)
            rc = run_figures(r, where, va[i++], vb[j++]);
        else
            rc = add(r, where, "present", c < 0 ? "yes" : "-", c < 0 ? "-" : "yes"), c < 0 ? i++ : j++;
    }
    hl_free(va);
    hl_free(vb);
    return rc;
}

static int warnings(struct cmp_result *r, const cJSON *a, const cJSON *b)
{
    const cJSON *wa = cJSON_GetObjectItemCaseSensitive(a, "warnings"),
                *wb = cJSON_GetObjectItemCaseSensitive(b, "warnings");
    for (int side = 0; side < 2; side++) {
        const cJSON *x;
        cJSON_ArrayForEach(x, (side ? wb : wa)) {
            if (find(side ? wa : wb, x, "message", "run"))
                continue;
            char where[96];
            snprintf(where, sizeof where, "warning%s%.80s", str(x, "run")[0] ? " run " : "", str(x, "run"));
            char msg[64];
            snprintf(msg, sizeof msg, "%.60s", str(x, "message"));
            if (add(r, where, side ? "appears" : "vanishes", side ? "-" : msg, side ? msg : "-"))
                return -1;
        }
    }
    return 0;
}

enum hl_status cmp_ledgers(const cJSON *a, const cJSON *b, struct cmp_result *out, struct hl_err *e)
{
    memset(out, 0, sizeof *out);
    for (int k = 0; k < 2; k++) {
        const cJSON *f = cJSON_GetObjectItemCaseSensitive(k ? b : a, "format");
        if (!cJSON_IsString(f) || strcmp(f->valuestring, "haloledger-ledger/1"))
            return hl_err_set(e, HL_ERR_INPUT, "%s is not a haloledger ledger (\"format\": "
                              "\"haloledger-ledger/1\") nor a campaign", k ? "the second file" : "the first file");
    }
    static const char *const order_keys[] = {"demand_kg", "to_order_kg", "containers", "order_by"};
    if (reagents(out, cJSON_GetObjectItemCaseSensitive(a, "months"), cJSON_GetObjectItemCaseSensitive(b, "months")) ||
        keyed(out, cJSON_GetObjectItemCaseSensitive(a, "orders"), cJSON_GetObjectItemCaseSensitive(b, "orders"),
              "month", "reagent", "orders", order_keys, 4) ||
        scrubbers(out, a, b) || runs(out, a, b) || warnings(out, a, b)) {
        cmp_free(out);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    return HL_OK;
}

cJSON *cmp_to_json(const struct cmp_result *r, const char *a_name, const char *b_name)
{
    int ok = 1;
    cJSON *root = cJSON_CreateObject(), *arr = cJSON_CreateArray();
    jt_add(root, "format", cJSON_CreateString("haloledger-compare/1"), &ok);
    jt_add(root, "a", cJSON_CreateString(a_name), &ok);
    jt_add(root, "b", cJSON_CreateString(b_name), &ok);
    jt_add(root, "differences", arr, &ok);
    for (int i = 0; i < r->n && ok; i++) {
        cJSON *o = cJSON_CreateObject();
        jt_add(arr, NULL, o, &ok);
        jt_add(o, "where", cJSON_CreateString(r->d[i].where), &ok);
        jt_add(o, "what", cJSON_CreateString(r->d[i].what), &ok);
        jt_add(o, "a", cJSON_CreateString(r->d[i].a), &ok);
        jt_add(o, "b", cJSON_CreateString(r->d[i].b), &ok);
    }
    if (!ok) { /* a document with a row left out would read as "no such difference" */
        cJSON_Delete(root);
        return NULL;
    }
    return root;
}

/* A value cell: a number when the text is one (so the sheet sorts and sums), else text. */
static void value_cell(lxw_worksheet *ws, lxw_row_t r, lxw_col_t c, const char *t, lxw_format *f)
{
    char *end;
    double x = strtod(t, &end);
    if (t[0] && strchr("+-.0123456789", t[0]) && !*end && isfinite(x) && !strpbrk(t, "xX"))
        worksheet_write_number(ws, r, c, x, f);
    else
        worksheet_write_string(ws, r, c, t, f);
}

/* Page set-up of both sheets: landscape A4, one page wide, the header row repeated, a
 * header and footer on every page (the workbook conventions of the ledger). */
static void page(lxw_worksheet *ws, const char *a_name, const char *b_name)
{
    char hf[LXW_HEADER_FOOTER_MAX + 1], an[72], bn[72];
    put_hf(an, sizeof an, a_name);
    put_hf(bn, sizeof bn, b_name);
    worksheet_set_landscape(ws);
    worksheet_set_paper(ws, 9); /* 9 = A4 */
    worksheet_set_margins(ws, 0.5, 0.5, 0.75, 0.75);
    worksheet_fit_to_pages(ws, 1, 0);
    worksheet_repeat_rows(ws, 0, 0);
    worksheet_freeze_panes(ws, 1, 0);
    snprintf(hf, sizeof hf, "&LCompared: A %s, B %s&R&A", an, bn);
    worksheet_set_header(ws, hf);
    worksheet_set_footer(ws, "&LPlanning estimates: see Compared&RPage &P of &N");
}

static void sheet_compared(lxw_workbook *wb, const struct cmp_result *r, const char *a_name,
                           const char *b_name, lxw_format *head, lxw_format *wrap)
{
    lxw_worksheet *ws = workbook_add_worksheet(wb, "Compared");
    page(ws, a_name, b_name);
    worksheet_set_column(ws, 0, 0, 24, wrap);
    worksheet_set_column(ws, 1, 1, 90, wrap);
    worksheet_write_string(ws, 0, 0, "Item", head);
    worksheet_write_string(ws, 0, 1, "Value", head);
    char a[600], b[600];
    put_text(a, sizeof a, a_name);
    put_text(b, sizeof b, b_name);
    worksheet_write_string(ws, 1, 0, "A", NULL);
    worksheet_write_string(ws, 1, 1, a, NULL);
    worksheet_write_string(ws, 2, 0, "B", NULL);
    worksheet_write_string(ws, 2, 1, b, NULL);
    worksheet_write_string(ws, 3, 0, "Differences [count]", NULL);
    worksheet_write_number(ws, 3, 1, r->n, NULL);
    worksheet_write_string(ws, 4, 0, "Matched by", NULL);
    worksheet_write_string(ws, 4, 1, "month and reagent, order line (month and reagent), scrubber id, "
                           "run id, warning text; numbers differing by more than 1e-9 relative", NULL);
    worksheet_write_string(ws, 5, 0, "Caution", NULL);
    worksheet_write_string(ws, 5, 1, "Planning estimates: check them against the SDS, local "
                           "regulations and a licensed engineer's review before acting on them.", NULL);
}

static void sheet_differences(lxw_workbook *wb, const struct cmp_result *r, const char *a_name,
                              const char *b_name, lxw_format *head, lxw_format *wrap)
{
    lxw_worksheet *ws = workbook_add_worksheet(wb, "Differences");
    page(ws, a_name, b_name);
    static const char *const cols[] = {"Where", "What", "A", "B"};
    static const double width[] = {30, 30, 24, 24};
    for (lxw_col_t c = 0; c < 4; c++) {
        worksheet_set_column(ws, c, c, width[c], wrap);
        worksheet_write_string(ws, 0, c, cols[c], head);
    }
    if (!r->n) {
        worksheet_write_string(ws, 1, 0, "No differences.", NULL);
        return;
    }
    for (int i = 0; i < r->n; i++) {
        lxw_row_t row = (lxw_row_t)(i + 1);
        worksheet_write_string(ws, row, 0, r->d[i].where, NULL);
        worksheet_write_string(ws, row, 1, r->d[i].what, NULL);
        value_cell(ws, row, 2, r->d[i].a, NULL);
        value_cell(ws, row, 3, r->d[i].b, NULL);
    }
    worksheet_autofilter(ws, 0, 0, (lxw_row_t)r->n, 3);
}

enum hl_status cmp_write_xlsx(const struct cmp_result *r, const char *a_name, const char *b_name,
                              const char *path, const char *tmpdir, struct hl_err *e)
{
    lxw_workbook_options wo = {.constant_memory = LXW_FALSE, .tmpdir = (char *)tmpdir};
    lxw_workbook *wb = workbook_new_opt(path, &wo);
    if (!wb)
        return hl_err_set(e, HL_ERR_IO, "cannot write %s", path);
    /* reproducible bytes (docs/library-notes.md): a fixed creation time, SOURCE_DATE_EPOCH if set */
    const char *sde = getenv("SOURCE_DATE_EPOCH");
    lxw_doc_properties props = {.title = "haloledger compare",
                                .created = sde && *sde ? (time_t)strtoll(sde, NULL, 10) : (time_t)946684800};
    workbook_set_properties(wb, &props);
    lxw_format *head = workbook_add_format(wb), *wrap = workbook_add_format(wb);
    format_set_bold(head);
    format_set_bg_color(head, 0xDDE8E1); /* the header fill of the palette (DEVELOPERS.md) */
    format_set_bottom(head, LXW_BORDER_MEDIUM);
    format_set_text_wrap(head);
    format_set_text_wrap(wrap);
    format_set_align(wrap, LXW_ALIGN_VERTICAL_TOP);
    sheet_compared(wb, r, a_name, b_name, head, wrap);
    sheet_differences(wb, r, a_name, b_name, head, wrap);
    lxw_error le = workbook_close(wb);
    if (le != LXW_NO_ERROR)
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, lxw_strerror(le));
    return HL_OK;
}

void cmp_free(struct cmp_result *r)
{
    hl_free(r->d);
    memset(r, 0, sizeof *r);
}

/* test_ltable.c - the column lists of include/ltable.h hold together: every table's sheet
 * columns come out 1..n each once (lt_sheet_order), no JSON key or header twice in a table,
 * nor a key twice in a record made of several lists (runs[]), every entry has a key or a
 * header (or is a part: a key-less sub-table) and a way to get its value, a caustic header has
 * its one "%s"; the caustic basis against hand-worked values.
 * That both writers render every entry alike is tests/e2e/writers_agree.py. */
#include "cu_helpers.h"
#include "ltable.h"

#include <stdio.h>
#include <string.h>

static void test_sheet_order(void)
{
    for (int t = 0; t < LT_NTABLES; t++) {
        const struct lt_table *tb = lt_tables[t];
        int at[64], item[64], heads = 0;
        for (int c = 0; c < tb->ncols; c++) /* a form's LT_ROW entries are rows, not columns */
            heads += tb->cols[c].head && !(tb->cols[c].flags & LT_ROW) ? lt_items(&tb->cols[c]) : 0;
        int n = lt_sheet_order(tb, at, item, 64);
        if (n != heads)
            printf("\n  %s: lt_sheet_order %d, %d headers", tb->path, n, heads);
        CU_ASSERT_EQUAL(n, heads);
        CU_ASSERT(n > 0);
        for (int p = 0; p < n && n == heads; p++) {
            CU_ASSERT(at[p] >= 0 && at[p] < tb->ncols);
            CU_ASSERT(at[p] >= 0 && tb->cols[at[p]].head != NULL);
            CU_ASSERT(at[p] >= 0 && item[p] >= 0 && item[p] < lt_items(&tb->cols[at[p]]));
        }
    }
}

/* Two entries claiming one column, or a column past the end, are refused. */
static void test_sheet_order_refuses(void)
{
    static const struct lt_col twice[] = {{.key = "a", .head = "A", .col = 1},
                                          {.key = "b", .head = "B", .col = 1}};
    static const struct lt_col past[] = {{.key = "a", .head = "A"}, {.key = "b", .head = "B", .col = 3}};
    static const struct lt_col swapped[] = {{.key = "a", .head = "A", .col = 2},
                                            {.key = "b", .head = "B", .col = 1}, {.key = "c"}};
    struct lt_table t = {.cols = twice, .ncols = 2};
    int at[8], item[8];
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, item, 8), -1);
    t.cols = past;
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, item, 8), -1);
    t.cols = swapped;
    t.ncols = 3;
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, item, 8), 2);
    CU_ASSERT_EQUAL(at[0], 1);
    CU_ASSERT_EQUAL(at[1], 0);
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, item, 1), -1); /* more columns than room */
    /* a family takes one column per member, after the entry before it */
    static const struct lt_col family[] = {{.key = "a", .head = "A"},
                                           {.key = "%s_kg", .head = "%s [kg]", .each = LT_EACH_VENT},
                                           {.key = "z", .head = "Z"}};
    t.cols = family;
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, item, 8), VS_COUNT + 2);
    CU_ASSERT(at[1] == 1 && item[1] == 0 && at[VS_COUNT] == 1 && item[VS_COUNT] == VS_COUNT - 1);
    CU_ASSERT(at[VS_COUNT + 1] == 2);
    char buf[32];
    lt_key(&family[1], 0, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "HCl_kg"); /* design section 5: the vent species' spelling */
    lt_head(&family[1], VS_COUNT - 1, NULL, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "SO2 [kg]");
    /* the retained family: one member per vent species flagged retained, in species order */
    static const struct lt_col kept = {.head = "%s retained [kg]", .each = LT_EACH_RETAINED};
    int nkept = 0, last = -1;
    for (int v = 0; v < VS_COUNT; v++)
        nkept += vent_get(v)->retained != 0;
    CU_ASSERT(nkept > 0);
    CU_ASSERT_EQUAL(lt_items(&kept), nkept);
    for (int k = 0; k < nkept; k++) {
        int s = lt_retained(k);
        CU_ASSERT(s > last && s < VS_COUNT && vent_get(s)->retained);
        last = s;
        char want[32];
        snprintf(want, sizeof want, "%s retained [kg]", vent_get(s)->name);
        lt_head(&kept, k, NULL, buf, sizeof buf);
        CU_ASSERT_STRING_EQUAL(buf, want);
    }
    CU_ASSERT_EQUAL(lt_retained(nkept), -1);
}

/* The object an entry's key sits in: the entry index of the LT_OPEN still open before it
 * (-1: the record itself). */
static int group_of(const struct lt_table *tb, int c)
{
    int open[8], n = 0;
    for (int d = 0; d < c; d++)
        if ((tb->cols[d].flags & LT_OPEN) && n < 8)
            open[n++] = d;
        else if ((tb->cols[d].flags & LT_CLOSE) && n > 0)
            n--;
    return n ? open[n - 1] : -1;
}

/* Entries e and f give a member the same key (two families in one object may share the
 * format "%s" as long as their members differ). */
static int same_member_key(const struct lt_col *e, const struct lt_col *f)
{
    for (int m = 0; m < lt_items(e); m++)
        for (int k = 0; k < lt_items(f); k++) {
            char a[64], b[64];
            lt_key(e, m, a, sizeof a);
            lt_key(f, k, b, sizeof b);
            if (strcmp(a, b) == 0)
                return 1;
        }
    return 0;
}

static void test_entries(void)
{
    for (int t = 0; t < LT_NTABLES; t++) {
        const struct lt_table *tb = lt_tables[t];
        CU_ASSERT(tb->key && tb->path && tb->sheet && tb->count);
        int open = 0;
        for (int c = 0; c < tb->ncols; c++) {
            const struct lt_col *e = &tb->cols[c];
            CU_ASSERT(e->key || e->head || (e->flags & LT_CLOSE) || e->sub);
            CU_ASSERT(e->get || tb->rec || (e->flags & (LT_OPEN | LT_CLOSE | LT_FORM)) || e->sub);
            /* a form column is sheet only and filled from the row; a form row has a name */
            if (e->flags & (LT_FORM | LT_NAME | LT_VALUE))
                CU_ASSERT((e->flags & LT_FORM) && !e->key && e->head && !e->get);
            if (e->flags & LT_ROW)
                CU_ASSERT(e->head && !e->sub && !(e->flags & (LT_OPEN | LT_CLOSE | LT_FORM)));
            CU_ASSERT(e->kind >= LT_TEXT && e->kind < LT_NKIND);
            /* an object's open and close and a sub-table are JSON only; three levels at most */
            if (e->flags & (LT_OPEN | LT_CLOSE) || e->sub)
                CU_ASSERT(e->head == NULL);
            open += (e->flags & LT_OPEN) ? 1 : (e->flags & LT_CLOSE) ? -1 : 0;
            CU_ASSERT(open >= 0 && open <= 3);
            if (e->flags & LT_CAUSTIC) {
                const char *s = e->head ? strstr(e->head, "%s") : NULL;
                CU_ASSERT(s != NULL && strstr(s + 2, "%") == NULL);
            }
            if (e->each != LT_ONE) /* one %s in the key and the header: the member's name */
                CU_ASSERT((!e->key || strstr(e->key, "%s")) && (!e->head || strstr(e->head, "%s")));
            for (int d = 0; d < c; d++) {
                const struct lt_col *f = &tb->cols[d];
                int same_key = e->key && f->key && !((e->flags | f->flags) & LT_CLOSE) &&
                               same_member_key(e, f) && group_of(tb, c) == group_of(tb, d);
                int same_head = e->head && f->head && strcmp(e->head, f->head) == 0;
                if (same_key || same_head)
                    printf("\n  %s: entries %d and %d share %s", tb->path, d, c,
                           same_key ? e->key : e->head);
                CU_ASSERT(!same_key && !same_head);
            }
        }
        CU_ASSERT_EQUAL(open, 0);
        int keyed = 0; /* a bare row is the value of its one keyed entry (hourly.kmol_h) */
        for (int c = 0; c < tb->ncols; c++)
            keyed += tb->cols[c].key != NULL;
        if (tb->bare)
            CU_ASSERT(keyed == 1 && tb->nsub);
    }
}

/* The record-level keys of tb (outside its objects), with those of its parts, into keys. */
static int record_keys(const struct lt_table *tb, const char **keys, int n, int max)
{
    int depth = 0;
    for (int c = 0; c < tb->ncols; c++) {
        const struct lt_col *e = &tb->cols[c];
        if (depth == 0 && !e->key && e->sub)
            n = record_keys(e->sub, keys, n, max);
        else if (depth == 0 && e->key && n < max)
            keys[n++] = e->key;
        depth += (e->flags & LT_OPEN) ? 1 : (e->flags & LT_CLOSE) ? -1 : 0;
    }
    return n;
}

/* A record written from several lists (runs[]: lt_runs and its parts) has each key once, and
 * every list that is a part of runs[] is placed in it exactly once. */
static void test_record_parts(void)
{
    const char *keys[200];
    int n = record_keys(&lt_runs, keys, 0, 200);
    CU_ASSERT(n > 30 && n < 200); /* 28 keys of its own and those of five parts */
    for (int a = 0; a < n; a++)
        for (int b = 0; b < a; b++) {
            if (strcmp(keys[a], keys[b]) == 0)
                printf("\n  runs[]: key %s twice", keys[a]);
            CU_ASSERT(strcmp(keys[a], keys[b]) != 0);
        }
    const struct lt_table *parts[] = {&lt_run_waste, &lt_run_liquor, &lt_run_reaction,
                                      &lt_run_actuals, &lt_run_emissions};
    for (int p = 0; p < 5; p++) {
        int placed = 0;
        for (int c = 0; c < lt_runs.ncols; c++)
            placed += !lt_runs.cols[c].key && lt_runs.cols[c].sub == parts[p];
        CU_ASSERT_EQUAL(placed, 1);
    }
    /* the elements family: one member per element balanced, keyed by its symbol (IUPAC) */
    static const struct lt_col el = {.key = "%s", .flags = LT_OPEN, .each = LT_EACH_ELEMENT};
    CU_ASSERT_EQUAL(lt_items(&el), 7);
    static const char *const sym[7] = {"C", "H", "N", "O", "S", "Cl", "Br"};
    for (int k = 0; k < 7; k++) {
        char buf[8];
        lt_key(&el, k, buf, sizeof buf);
        CU_ASSERT_STRING_EQUAL(buf, sym[k]);
    }
}

/* Found: the vent family of t (its key "%s_mol") in t or a part of it, NULL if none. */
static const struct lt_col *vent_mol_entry(const struct lt_table *t)
{
    for (int c = 0; c < t->ncols; c++) {
        const struct lt_col *e = &t->cols[c];
        if (e->key && e->each == LT_EACH_VENT && strcmp(e->key, "%s_mol") == 0)
            return e;
        if (e->sub) {
            const struct lt_col *f = vent_mol_entry(e->sub);
            if (f)
                return f;
        }
    }
    return NULL;
}

/* The amount keys of runs[].vent as design section 5 spells them, as the writers make them. */
static void test_vent_keys(void)
{
    static const char *const vk[VS_COUNT] = {"HCl_mol", "HBr_mol", "Cl2_mol", "Br2_mol", "SO2_mol"};
    const struct lt_col *e = vent_mol_entry(&lt_runs);
    CU_ASSERT_PTR_NOT_NULL_FATAL(e);
    CU_ASSERT_EQUAL(lt_items(e), VS_COUNT);
    for (int v = 0; v < VS_COUNT; v++) {
        char key[32];
        lt_key(e, v, key, sizeof key);
        CU_ASSERT_STRING_EQUAL(key, vk[v]);
    }
}

/* The header of sheet column p (0-based) of t into buf; 0 when t has no such column. */
static int sheet_head(const struct lt_table *t, int p, char *buf, size_t n)
{
    int at[64], item[64], nc = lt_sheet_order(t, at, item, 64);
    if (p < 0 || p >= nc)
        return 0;
    snprintf(buf, n, "%s", t->cols[at[p]].head);
    return 1;
}

/* The Cautions sheet: the substances' blocks (a form) and the estimate cautions after them
 * in the same columns; a block's rows are its exposure limits, then one per LT_ROW entry,
 * and each member of a limit fills the form column of its header. */
static void test_cautions_form(void)
{
    CU_ASSERT_STRING_EQUAL(lt_cautions.sheet, lt_estimate_cautions.sheet);
    int at[64], item[64];
    int n = lt_sheet_order(&lt_cautions, at, item, 64);
    CU_ASSERT_EQUAL(n, 5); /* Substance, CAS number, Topic, Detail, Source */
    CU_ASSERT_EQUAL(lt_sheet_order(&lt_estimate_cautions, at, item, 64), n);
    for (int p = 0; p < n; p++) {
        char a[96] = "", b[96] = "";
        CU_ASSERT(sheet_head(&lt_cautions, p, a, sizeof a));
        CU_ASSERT(sheet_head(&lt_estimate_cautions, p, b, sizeof b));
        if (strcmp(a, b) != 0)
            printf("\n  Cautions column %d: %s, estimate cautions %s", p + 1, a, b);
        CU_ASSERT_STRING_EQUAL(a, b);
    }
    int names = 0, values = 0, rows = 0, subs = 0;
    for (int c = 0; c < lt_cautions.ncols; c++) {
        const struct lt_col *e = &lt_cautions.cols[c];
        names += (e->flags & LT_NAME) != 0;
        values += (e->flags & LT_VALUE) != 0;
        rows += (e->flags & LT_ROW) != 0;
        if (!e->sub)
            continue;
        subs++;
        CU_ASSERT_STRING_EQUAL(e->key, "limits"); /* design section 5 */
        for (int k = 0; k < e->sub->ncols; k++) { /* each header a form column's */
            const char *h = e->sub->cols[k].head;
            int found = 0;
            for (int d = 0; d < lt_cautions.ncols && h; d++)
                found += (lt_cautions.cols[d].flags & LT_FORM) && !strcmp(lt_cautions.cols[d].head, h);
            CU_ASSERT(!h || found == 1);
        }
    }
    CU_ASSERT(names == 1 && values == 1 && subs == 1);
    CU_ASSERT_EQUAL(rows, 4); /* hazards, incompatible, ppe, the deferral */
    /* a form's rows: 2 limits, 4 LT_ROW entries */
    struct ledger l;
    memset(&l, 0, sizeof l);
    l.cautions_mask = 1u; /* the first substance of the caution table */
    CU_ASSERT_EQUAL(lt_cautions.count(&l), 1);
    const struct caution_info *ci = caution_get(0);
    CU_ASSERT_PTR_NOT_NULL_FATAL(ci);
    CU_ASSERT_EQUAL(lt_form_rows(&lt_cautions, &l, 0), (ci->nlimits < 4 ? ci->nlimits : 4) + 4);
}

static void test_caustic_basis(void)
{
    struct ledger_scrubber u[3];
    memset(u, 0, sizeof u);
    struct ledger l;
    memset(&l, 0, sizeof l);
    l.scrubbers = u;
    l.nscrubbers = 3;
    u[0].makeup_naoh_wt_pct = 50;
    u[1].makeup_naoh_wt_pct = 0; /* a water liquor buys none */
    u[2].makeup_naoh_wt_pct = 50;
    char buf[64];
    lt_caustic_basis(&l, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "50 wt% NaOH");
    struct lt_col c = {.key = "caustic_solution_kg", .head = "Caustic solution bought, %s [kg]",
                       .kind = LT_KG, .flags = LT_CAUSTIC};
    lt_head(&c, 0, &l, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "Caustic solution bought, 50 wt% NaOH [kg]");
    u[2].makeup_naoh_wt_pct = 25;
    lt_caustic_basis(&l, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "at each unit's make-up strength");
    l.nscrubbers = 0;
    lt_caustic_basis(&l, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "at each unit's make-up strength");
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"every sheet order 1..n once", test_sheet_order},
        {"clashing columns refused", test_sheet_order_refuses},
        {"entries named, gettable, unique", test_entries},
        {"a record's parts share no key", test_record_parts},
        {"caustic basis and header", test_caustic_basis},
        {"vent amount keys", test_vent_keys},
        {"the Cautions form", test_cautions_form},
    };
    return CU_RUN_ALL("ltable", cases);
}

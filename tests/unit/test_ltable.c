/* test_ltable.c - the column lists of include/ltable.h hold together: every table's sheet
 * columns come out 1..n each once (lt_sheet_order), no JSON key or header twice in a table,
 * every entry has a key or a header and a way to get its value, a caustic header has its one
 * "%s"; the caustic basis against hand-worked values.
 * That both writers render every entry alike is tests/e2e/writers_agree.py. */
#include "cu_helpers.h"
#include "ltable.h"

#include <string.h>

static void test_sheet_order(void)
{
    for (int t = 0; t < LT_NTABLES; t++) {
        const struct lt_table *tb = lt_tables[t];
        int at[64], heads = 0;
        for (int c = 0; c < tb->ncols; c++)
            heads += tb->cols[c].head != NULL;
        int n = lt_sheet_order(tb, at, 64);
        if (n != heads)
            printf("\n  %s: lt_sheet_order %d, %d headers", tb->path, n, heads);
        CU_ASSERT_EQUAL(n, heads);
        CU_ASSERT(n > 0);
        for (int p = 0; p < n && n == heads; p++) {
            CU_ASSERT(at[p] >= 0 && at[p] < tb->ncols);
            CU_ASSERT(at[p] >= 0 && tb->cols[at[p]].head != NULL);
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
    int at[4];
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, 4), -1);
    t.cols = past;
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, 4), -1);
    t.cols = swapped;
    t.ncols = 3;
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, 4), 2);
    CU_ASSERT_EQUAL(at[0], 1);
    CU_ASSERT_EQUAL(at[1], 0);
    CU_ASSERT_EQUAL(lt_sheet_order(&t, at, 1), -1); /* more columns than room */
}

static void test_entries(void)
{
    for (int t = 0; t < LT_NTABLES; t++) {
        const struct lt_table *tb = lt_tables[t];
        CU_ASSERT(tb->key && tb->path && tb->sheet && tb->count);
        for (int c = 0; c < tb->ncols; c++) {
            const struct lt_col *e = &tb->cols[c];
            CU_ASSERT(e->key || e->head);
            CU_ASSERT(e->get || tb->rec);
            CU_ASSERT(e->kind >= LT_TEXT && e->kind < LT_NKIND);
            if (e->flags & LT_CAUSTIC) {
                const char *s = e->head ? strstr(e->head, "%s") : NULL;
                CU_ASSERT(s != NULL && strstr(s + 2, "%") == NULL);
            }
            for (int d = 0; d < c; d++) {
                const struct lt_col *f = &tb->cols[d];
                int same_key = e->key && f->key && strcmp(e->key, f->key) == 0;
                int same_head = e->head && f->head && strcmp(e->head, f->head) == 0;
                if (same_key || same_head)
                    printf("\n  %s: entries %d and %d share %s", tb->path, d, c,
                           same_key ? e->key : e->head);
                CU_ASSERT(!same_key && !same_head);
            }
        }
    }
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
    lt_head(&c, &l, buf, sizeof buf);
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
        {"caustic basis and header", test_caustic_basis},
    };
    return CU_RUN_ALL("ltable", cases);
}

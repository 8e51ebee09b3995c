/*
 * tool_ltable.c - test probe: the column lists of include/ltable.h as text, one line each:
 *   table<TAB>PATH<TAB>SHEET                     (PATH as "orders" or "runs[].products")
 *   col<TAB>KEY<TAB>HEAD<TAB>COLUMN<TAB>FLAGS    (KEY/HEAD "-" when the entry has none;
 *                                                 COLUMN its sheet column, 1-based, 0 none;
 *                                                 HEAD "%s" where the caustic basis goes)
 * tests/e2e/writers_agree.py pairs the two outputs' cells through it; the values it
 * compares come from the JSON file and the workbook, never from here.
 */
#include "ltable.h"

#include <stdio.h>

int main(void)
{
    for (int t = 0; t < LT_NTABLES; t++) {
        const struct lt_table *tb = lt_tables[t];
        int at[64], col[64] = {0};
        int n = lt_sheet_order(tb, at, 64);
        if (n < 0) {
            fprintf(stderr, "tool_ltable: table %s has no sheet order\n", tb->path);
            return 1;
        }
        for (int p = 0; p < n; p++)
            col[at[p]] = p + 1;
        printf("table\t%s\t%s\n", tb->path, tb->sheet);
        for (int c = 0; c < tb->ncols; c++) {
            const struct lt_col *e = &tb->cols[c];
            printf("col\t%s\t%s\t%d\t%u\n", e->key ? e->key : "-", e->head ? e->head : "-",
                   c < 64 ? col[c] : 0, e->flags);
        }
    }
    return 0;
}

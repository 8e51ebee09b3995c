/*
 * tool_ltable.c - test probe: the column lists of include/ltable.h as text, one line each:
 *   table<TAB>PATH<TAB>SHEET                     (PATH as "orders" or "runs[].products")
 *   col<TAB>KEY<TAB>HEAD<TAB>COLUMN<TAB>FLAGS    (one line per member of a family; KEY the
 *                                                 path in the record, "reaction.heat_kj";
 *                                                 KEY/HEAD "-" when the entry has none;
 *                                                 COLUMN its sheet column, 1-based, 0 none;
 *                                                 HEAD "%s" where the caustic basis goes;
 *                                                 FLAGS LT_ROW: a row of a form's block)
 *   sub<TAB>KEY<TAB>HEAD<TAB>FLAGS               (an entry of an array of another list's
 *                                                 rows: KEY the array's key, then one line
 *                                                 per entry of that list, HEAD the form
 *                                                 column it fills)
 * tests/e2e/writers_agree.py pairs the two outputs' cells through it; the values it
 * compares come from the JSON file and the workbook, never from here.
 */
#include "ltable.h"

#include <stdio.h>
#include <string.h>

int main(void)
{
    for (int t = 0; t < LT_NTABLES; t++) {
        const struct lt_table *tb = lt_tables[t];
        int at[64], item[64];
        int n = lt_sheet_order(tb, at, item, 64);
        if (n < 0) {
            fprintf(stderr, "tool_ltable: table %s has no sheet order\n", tb->path);
            return 1;
        }
        printf("table\t%s\t%s\n", tb->path, tb->sheet);
        char group[128] = ""; /* "scrubber.salts_kg." inside nested objects */
        int form = 0;
        for (int c = 0; c < tb->ncols; c++)
            form |= (tb->cols[c].flags & LT_ROW) != 0;
        for (int c = 0; c < tb->ncols; c++) {
            const struct lt_col *e = &tb->cols[c];
            size_t g = strlen(group);
            if (e->flags & LT_OPEN) {
                snprintf(group + g, sizeof group - g, "%s.", e->key);
                continue;
            }
            if (e->flags & LT_CLOSE) {
                while (g > 0 && group[g - 1] == '.')
                    group[--g] = '\0';
                while (g > 0 && group[g - 1] != '.')
                    group[--g] = '\0';
                continue;
            }
            if (e->sub && e->key && form) { /* rows of a form's block (cautions[].limits) */
                for (int k = 0; k < e->sub->ncols; k++) {
                    const struct lt_col *f = &e->sub->cols[k];
                    printf("sub\t%s%s.%s\t%s\t%u\n", group, e->key, f->key ? f->key : "-",
                           f->head ? f->head : "-", f->flags);
                }
            }
            if (e->sub)
                continue; /* JSON only, a table of its own */
            for (int m = 0; m < lt_items(e); m++) {
                char key[64] = "-", head[128] = "-";
                int col = 0;
                if (e->key)
                    lt_key(e, m, key, sizeof key);
                if (e->head) { /* the caustic basis stays "%s": it needs a ledger */
                    if (e->each != LT_ONE)
                        lt_head(e, m, NULL, head, sizeof head);
                    else
                        snprintf(head, sizeof head, "%s", e->head);
                }
                for (int p = 0; p < n; p++)
                    if (at[p] == c && item[p] == m)
                        col = p + 1;
                printf("col\t%s%s\t%s\t%d\t%u\n", e->key ? group : "", key, head, col, e->flags);
            }
        }
    }
    return 0;
}

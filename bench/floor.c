/*
 * floor.c - the floor for `make bench`: a bare libxlsxwriter program that writes N
 * numeric cells and nothing else (no formats, no strings, no formulas), in the
 * constant_memory mode the workbook writer uses (each row streamed to a temporary
 * file in the order written).  No workbook writer on this library can write the
 * same number of cells faster; the bench prints the workbook report's time as a
 * ratio to this one.
 *
 *   bench_floor OUT.xlsx NCELLS [COLUMNS]   (COLUMNS per row, default 24)
 *
 * The values are small integers (0..999), the cheapest numbers for the library's
 * "%.16G" to print, so that the floor is the library's own cost per cell (row and
 * cell XML, the zip stream) and no number or text a ledger holds can come in
 * under it.  Sheets are filled up to the format's 1,048,576 rows, then a new one
 * is started.
 */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <xlsxwriter.h>

int main(int argc, char **argv)
{
    if (argc < 3) {
        fprintf(stderr, "usage: bench_floor OUT.xlsx NCELLS [COLUMNS]\n");
        return 2;
    }
    long long ncells = atoll(argv[2]);
    int cols = argc > 3 ? atoi(argv[3]) : 24;
    if (ncells < 0 || cols < 1 || cols > 16384) {
        fprintf(stderr, "bench_floor: bad NCELLS or COLUMNS\n");
        return 2;
    }
    /* temporary row files next to the output, as the ledger's writer keeps them */
    char dir[4096];
    snprintf(dir, sizeof dir, "%s", argv[1]);
    char *slash = strrchr(dir, '/');
    if (slash)
        *slash = '\0';
    else
        strcpy(dir, ".");
    lxw_workbook_options opt = {.constant_memory = LXW_TRUE, .tmpdir = dir};
    lxw_workbook *wb = workbook_new_opt(argv[1], &opt);
    if (!wb) {
        fprintf(stderr, "bench_floor: cannot create %s\n", argv[1]);
        return 1;
    }
    lxw_worksheet *ws = NULL;
    lxw_row_t row = 0;
    for (long long k = 0; k < ncells; k++) {
        int col = (int)(k % cols);
        if (col == 0 && k > 0)
            row++;
        if (!ws || row == LXW_ROW_MAX) {
            ws = workbook_add_worksheet(wb, NULL);
            row = 0;
        }
        double v = (double)(k % 1000);
        if (worksheet_write_number(ws, row, (lxw_col_t)col, v, NULL) != LXW_NO_ERROR) {
            fprintf(stderr, "bench_floor: write failed at cell %lld\n", k);
            return 1;
        }
    }
    if (!ws)
        workbook_add_worksheet(wb, NULL);
    lxw_error err = workbook_close(wb);
    if (err != LXW_NO_ERROR) {
        fprintf(stderr, "bench_floor: %s\n", lxw_strerror(err));
        return 1;
    }
    return 0;
}

/*
 * floor.c - the floors for `make bench`: bare libxlsxwriter programs, in the
 * constant_memory mode the workbook writer uses (each row streamed to a temporary
 * file in the order written), against which the workbook report is timed.
 *
 *   bench_floor OUT.xlsx NCELLS [COLUMNS]   the numeric floor (COLUMNS per row, default 24)
 *   bench_floor --replay CELLS OUT.xlsx     the content floor
 *
 * The numeric floor writes NCELLS small integers (0..999) without formats: the
 * cheapest numbers for the library's "%.16G" to print, so that it is the library's
 * own cost per cell (row and cell XML, the zip stream) and no workbook of as many
 * cells comes in under it.  Sheets are filled up to the format's 1,048,576 rows,
 * then a new one is started.
 *
 * The content floor writes the very cells of a ledger's workbook, read back from it
 * by bench/bench.py into CELLS: the same sheets, numbers, texts, formulas and
 * blanks at the same places, each cell with a format of its own style number, and
 * nothing else (no column widths, merges, charts, print set-up).  What the workbook
 * report costs above it is this program's reading, computing and writing; what the
 * content floor costs above the numeric floor is the library's price of the
 * ledger's bytes (16-digit numbers, inline texts, style attributes).  CELLS is read
 * into memory before the workbook is opened, and the CPU seconds that took are
 * printed on stdout as "load_cpu_s X" for the bench to subtract.
 *
 * CELLS (little-endian): the 8 bytes "HLCELLS1", then records, each a tag byte:
 *   'S' u32 n, name[n], 0                         a new worksheet
 *   'N' u32 row, u32 col, u32 style, f64 value    a number
 *   'T' u32 row, u32 col, u32 style, u32 n, text[n], 0
 *   'F' u32 row, u32 col, u32 style, f64 value, u32 n, formula[n], 0
 *   'B' u32 row, u32 col, u32 style               a formatted blank
 * style 0 is a cell without a format.
 */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <xlsxwriter.h>

static double cpu_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
    return (double)t.tv_sec + (double)t.tv_nsec * 1e-9;
}

/* temporary row files next to the output, as the ledger's writer keeps them */
static lxw_workbook *open_workbook(const char *path)
{
    static char dir[4096];
    snprintf(dir, sizeof dir, "%s", path);
    char *slash = strrchr(dir, '/');
    if (slash)
        *slash = '\0';
    else
        strcpy(dir, ".");
    lxw_workbook_options opt = {.constant_memory = LXW_TRUE, .tmpdir = dir};
    lxw_workbook *wb = workbook_new_opt(path, &opt);
    if (!wb)
        fprintf(stderr, "bench_floor: cannot create %s\n", path);
    return wb;
}

static int close_workbook(lxw_workbook *wb)
{
    lxw_error err = workbook_close(wb);
    if (err != LXW_NO_ERROR) {
        fprintf(stderr, "bench_floor: %s\n", lxw_strerror(err));
        return 1;
    }
    return 0;
}

static int numeric_floor(const char *out, long long ncells, int cols)
{
    lxw_workbook *wb = open_workbook(out);
    if (!wb)
        return 1;
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
            workbook_close(wb);
            return 1;
        }
    }
    if (!ws)
        workbook_add_worksheet(wb, NULL);
    return close_workbook(wb);
}

/* A cursor over the loaded CELLS; take() fails once a record runs past the end. */
struct cur {
    const unsigned char *p, *end;
};

static const unsigned char *take(struct cur *c, size_t n)
{
    if ((size_t)(c->end - c->p) < n)
        return NULL;
    const unsigned char *q = c->p;
    c->p += n;
    return q;
}

static int u32_at(struct cur *c, uint32_t *v)
{
    const unsigned char *q = take(c, 4);
    if (!q)
        return 0;
    *v = (uint32_t)q[0] | (uint32_t)q[1] << 8 | (uint32_t)q[2] << 16 | (uint32_t)q[3] << 24;
    return 1;
}

static int f64_at(struct cur *c, double *v)
{
    const unsigned char *q = take(c, 8);
    if (!q)
        return 0;
    uint64_t b = 0;
    for (int i = 7; i >= 0; i--)
        b = b << 8 | q[i];
    memcpy(v, &b, sizeof *v);
    return 1;
}

/* a NUL-terminated text of n bytes, in place */
static const char *text_at(struct cur *c)
{
    uint32_t n;
    if (!u32_at(c, &n))
        return NULL;
    const unsigned char *q = take(c, (size_t)n + 1);
    return q && q[n] == 0 ? (const char *)q : NULL;
}

/* One format per style number, made at its first use: distinct formats (a number
 * format and a font size of their own), so the style attributes count like the
 * ledger's; which number format a style has does not change the cells' XML. */
#define FLOOR_STYLES 1024
static lxw_format *style_format(lxw_workbook *wb, lxw_format **fmt, uint32_t style)
{
    if (style == 0)
        return NULL;
    uint32_t s = style % FLOOR_STYLES;
    if (!fmt[s]) {
        fmt[s] = workbook_add_format(wb);
        format_set_num_format_index(fmt[s], (uint8_t)(s % 50));
        format_set_font_size(fmt[s], 6.0 + (double)(s / 50));
    }
    return fmt[s];
}

static int replay_floor(const char *cells, const char *out)
{
    double t0 = cpu_s();
    FILE *f = fopen(cells, "rb");
    if (!f) {
        fprintf(stderr, "bench_floor: cannot read %s\n", cells);
        return 1;
    }
    size_t cap = 1 << 20, len = 0;
    unsigned char *buf = malloc(cap);
    size_t got;
    while (buf && (got = fread(buf + len, 1, cap - len, f)) > 0) {
        len += got;
        if (len == cap) {
            unsigned char *nb = realloc(buf, cap * 2);
            if (!nb) {
                free(buf);
                buf = NULL;
                break;
            }
            buf = nb;
            cap *= 2;
        }
    }
    fclose(f);
    if (!buf || len < 8 || memcmp(buf, "HLCELLS1", 8) != 0) {
        fprintf(stderr, "bench_floor: %s is not a cell file\n", cells);
        free(buf);
        return 1;
    }
    printf("load_cpu_s %.3f\n", cpu_s() - t0);
    fflush(stdout);

    lxw_workbook *wb = open_workbook(out);
    if (!wb) {
        free(buf);
        return 1;
    }
    lxw_format *fmt[FLOOR_STYLES] = {0};
    lxw_worksheet *ws = NULL;
    struct cur c = {buf + 8, buf + len};
    int bad = 0;
    long long n = 0;
    while (!bad && c.p < c.end) {
        unsigned char tag = *c.p++;
        uint32_t row = 0, col = 0, style = 0;
        double v = 0;
        const char *s = NULL;
        if (tag == 'S') {
            s = text_at(&c);
            if (!s || !(ws = workbook_add_worksheet(wb, s)))
                bad = 1;
            continue;
        }
        if (!ws || !u32_at(&c, &row) || !u32_at(&c, &col) || !u32_at(&c, &style)) {
            bad = 1;
            break;
        }
        lxw_format *fm = style_format(wb, fmt, style);
        lxw_error e = LXW_ERROR_PARAMETER_VALIDATION;
        if (tag == 'N' && f64_at(&c, &v))
            e = worksheet_write_number(ws, row, (lxw_col_t)col, v, fm);
        else if (tag == 'T' && (s = text_at(&c)))
            e = worksheet_write_string(ws, row, (lxw_col_t)col, s, fm);
        else if (tag == 'F' && f64_at(&c, &v) && (s = text_at(&c)))
            e = worksheet_write_formula_num(ws, row, (lxw_col_t)col, s, fm, v);
        else if (tag == 'B')
            e = worksheet_write_blank(ws, row, (lxw_col_t)col, fm);
        bad = e != LXW_NO_ERROR;
        n++;
    }
    if (bad)
        fprintf(stderr, "bench_floor: %s: bad record after %lld cells\n", cells, n);
    if (!ws)
        workbook_add_worksheet(wb, NULL);
    int rc = close_workbook(wb);
    free(buf);
    return bad || rc;
}

int main(int argc, char **argv)
{
    if (argc == 4 && strcmp(argv[1], "--replay") == 0)
        return replay_floor(argv[2], argv[3]);
    if (argc < 3 || argv[1][0] == '-') {
        fprintf(stderr, "usage: bench_floor OUT.xlsx NCELLS [COLUMNS]\n"
                        "       bench_floor --replay CELLS OUT.xlsx\n");
        return 2;
    }
    long long ncells = atoll(argv[2]);
    int cols = argc > 3 ? atoi(argv[3]) : 24;
    if (ncells < 0 || cols < 1 || cols > 16384) {
        fprintf(stderr, "bench_floor: bad NCELLS or COLUMNS\n");
        return 2;
    }
    return numeric_floor(argv[1], ncells, cols);
}

/*
 * sched.c - CSV schedule reader (see sched.h).
 *
 * libcsv 3.0.3 splits the text; it reports no positions (docs/library-notes.md), so the
 * bytes are handed to it one at a time and the reader keeps, beside it, the line and
 * column of the byte that opens each field (the first byte that is not a space or a line
 * end once the previous field has been passed on).  A field ends inside csv_parse() on
 * the separator or line end that follows it, so the callbacks always see the current
 * offset.  Quoted cells may hold separators and line ends; their position is that of the
 * opening quote.  Each finished record becomes one run object, which is handed to the
 * caller and freed: memory stays bounded by one row whatever the length of the file.
 */
#include "sched.h"

#include <csv.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "afile.h"
#include "hlmem.h"

#define MAX_FILE (1u << 30) /* as the campaign reader */
#define MAX_COLS 64         /* more than every column named below, with room for mistakes */
#define MAX_CELL 32767      /* longest text a workbook cell holds */

enum kind { K_TEXT, K_NUM, K_DATE };
/* Every column: its name (the run key path with '.' as '_') and the path in the run. */
static const struct col { const char *name, *path; enum kind kind; } cols[] = {
    {"id", "id", K_TEXT},
    {"start", "start", K_DATE},
    {"reactor", "reactor", K_TEXT},
    {"scrubber", "scrubber", K_TEXT},
    {"substrate_name", "substrate.name", K_TEXT},
    {"substrate_smiles", "substrate.smiles", K_TEXT},
    {"substrate_formula", "substrate.formula", K_TEXT},
    {"product_smiles", "product_smiles", K_TEXT},
    {"substrate_kg", "substrate_kg", K_NUM},
    {"reagent", "reagent", K_TEXT},
    {"reagent_eq", "reagent_eq", K_NUM},
    {"reagent_kg", "reagent_kg", K_NUM},
    {"halogen_conversion", "halogen_conversion", K_NUM},
    {"temp_c", "temp_c", K_NUM},
    {"feed_h", "feed_h", K_NUM},
    {"peak_factor", "peak_factor", K_NUM},
    {"vent_retained_fraction", "vent_retained_fraction", K_NUM},
    {"reactor_mode", "reactor_mode", K_TEXT},
    {"repeat_count", "repeat.count", K_NUM},
    {"repeat_every_days", "repeat.every_days", K_NUM},
    {"model_overhalogenation_factor", "model.overhalogenation_factor", K_NUM},
    {"model_relative_reactivity_primary", "model.relative_reactivity.primary", K_NUM},
    {"model_relative_reactivity_secondary", "model.relative_reactivity.secondary", K_NUM},
    {"model_relative_reactivity_tertiary", "model.relative_reactivity.tertiary", K_NUM},
    {"model_relative_reactivity_allylic", "model.relative_reactivity.allylic", K_NUM},
    {"model_relative_reactivity_benzylic", "model.relative_reactivity.benzylic", K_NUM},
    {"model_relative_reactivity_ref_temp_c", "model.relative_reactivity.ref_temp_c", K_NUM},
    {"note", "note", K_TEXT},
    /* the thermal check of the run (thermal.h) */
    {"solvent_kg", "solvent_kg", K_NUM},
    {"mass_cp_kj_kg_k", "mass_cp_kj_kg_k", K_NUM},
    {"accumulation", "accumulation", K_NUM},
    {"mtt_c", "mtt_c", K_NUM},
    {"td24_c", "td24_c", K_NUM},
    /* what happened (runs[].actual, closing the month) */
    {"actual_status", "actual.status", K_TEXT},
    {"actual_reagent_kg", "actual.reagent_kg", K_NUM},
    {"actual_product_kg", "actual.product_kg", K_NUM},
    {"actual_naoh_kg", "actual.naoh_kg", K_NUM},
    {"actual_end", "actual.end", K_DATE},
    {"actual_note", "actual.note", K_TEXT},
};
#define NCOLS ((int)(sizeof cols / sizeof cols[0]))

const char *sched_column(const char *run_path)
{
    if (!run_path)
        return NULL;
    /* a whole object that is missing is blamed on the column that gives it */
    if (!strcmp(run_path, "substrate"))
        return "substrate_smiles";
    if (!strcmp(run_path, "repeat"))
        return "repeat_count";
    for (int k = 0; k < NCOLS; k++)
        if (!strcmp(cols[k].path, run_path))
            return cols[k].name;
    return NULL;
}

/* ---- reader state ---- */

struct field { size_t at, n; struct sched_pos pos; int given; };

struct rdr {
    const char *t;
    size_t n, i;                /* text, length, offset of the byte being fed */
    int line;
    size_t line_start;
    long fstart;                /* offset of the current field's first byte, -1 before it */
    struct sched_pos fpos;
    char sep;
    int record;                 /* 0 = header */
    int nf;                     /* fields of the current record so far */
    struct field f[MAX_COLS + 1];
    char *buf; size_t blen, bcap;  /* the current record's field texts, NUL-separated */
    /* header */
    int ncols;
    int key[MAX_COLS];          /* index into cols[] per header column */
    const char *names[MAX_COLS];
    char *name_store;
    /* row output */
    struct sched_pos *pos; size_t npos, pcap;
    sched_row_fn fn;
    void *data;
    struct hl_err *e;
    enum hl_status st;          /* first error; the callbacks then do nothing */
};

/* Sets r's error (r->st, e): an input error at position p, named by column colno of the
 * header in the field path (-1: the schedule); returns it. Once r->st is set the callbacks
 * do nothing, so the first error is the one reported. */
static enum hl_status rerr(struct rdr *r, struct sched_pos p, int colno, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
static enum hl_status rerr(struct rdr *r, struct sched_pos p, int colno, const char *fmt, ...)
{
    char msg[480], field[160];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    if (colno < 0)
        snprintf(field, sizeof field, "schedule");
    else if (r->record > 0 && colno < r->ncols && r->names[colno] && r->names[colno][0])
        snprintf(field, sizeof field, "column %s", r->names[colno]);
    else if (r->record == 0 && colno < r->nf && r->f[colno].given)
        snprintf(field, sizeof field, "column %.100s", r->buf + r->f[colno].at);
    else
        snprintf(field, sizeof field, "column #%d", colno + 1);
    r->st = hl_err_at(r->e, HL_ERR_INPUT, p.line, p.col, field, "%s", msg);
    return r->st;
}

/* Records out of memory as r's error and returns it. */
static enum hl_status nomem(struct rdr *r)
{
    r->st = hl_err_set(r->e, HL_ERR_NOMEM, "out of memory reading the schedule");
    return r->st;
}

/* Line, column and offset of byte off of the text, from r's line count. */
static struct sched_pos here(const struct rdr *r, size_t off)
{
    struct sched_pos p = {r->line, (int)(off - r->line_start) + 1, off};
    return p;
}

/* libcsv allocates through these, so allocation-failure tests reach it */
static void *csv_realloc(void *p, size_t n) { return hl_realloc(p, n); }
/* libcsv's free, through hl_free. */
static void csv_free_fn(void *p) { hl_free(p); }
/* libcsv's blank test: space and tab. */
static int is_space_tab(unsigned char c) { return c == ' ' || c == '\t'; }
/* libcsv's blank test when tab separates: space only. */
static int is_space_only(unsigned char c) { return c == ' '; }

/* 1-based byte of the first invalid UTF-8 sequence (RFC 3629), 0 if valid */
static size_t bad_utf8(const unsigned char *s, size_t n)
{
    for (size_t i = 0; i < n;) {
        unsigned c = s[i];
        size_t len = c < 0x80 ? 1 : (c >> 5) == 6 ? 2 : (c >> 4) == 14 ? 3 : (c >> 3) == 30 ? 4 : 0;
        if (!len || i + len > n || (len == 2 && c < 0xC2))
            return i + 1;
        unsigned cp = len == 1 ? c : len == 2 ? c & 0x1F : len == 3 ? c & 0x0F : c & 0x07;
        for (size_t k = 1; k < len; k++) {
            if ((s[i + k] & 0xC0) != 0x80)
                return i + 1;
            cp = (cp << 6) | (s[i + k] & 0x3F);
        }
        if ((len == 3 && cp < 0x800) || (len == 4 && (cp < 0x10000 || cp > 0x10FFFF)) ||
            (cp >= 0xD800 && cp <= 0xDFFF))
            return i + 1;
        i += len;
    }
    return 0;
}

/* libcsv field callback: appends the cell (s, len; s NULL for an empty unquoted one) to r's
 * record buffer with its position; too many cells, an overlong cell or invalid UTF-8 is r's
 * error. Does nothing after an error. */
static void on_field(void *s, size_t len, void *data)
{
    struct rdr *r = data;
    if (r->st)
        return;
    struct sched_pos p = r->fstart >= 0 ? r->fpos : here(r, r->i);
    r->fstart = -1;
    if (r->nf >= MAX_COLS || (r->record > 0 && r->nf >= r->ncols)) {
        rerr(r, p, r->record > 0 ? r->nf : -1, "more cells than the header names (%d)%s", r->record > 0 ? r->ncols : MAX_COLS,
             r->record > 0 ? ": a separator inside a cell needs the cell quoted" : "");
        return;
    }
    if (len > MAX_CELL) {
        rerr(r, p, r->nf, "too long (%zu bytes; at most %d)", len, MAX_CELL);
        return;
    }
    if (r->blen + len + 1 > r->bcap) {
        size_t cap = r->bcap ? r->bcap : 256;
        while (cap < r->blen + len + 1)
            cap *= 2;
        char *nb = hl_realloc(r->buf, cap);
        if (!nb) {
            nomem(r);
            return;
        }
        r->buf = nb;
        r->bcap = cap;
    }
    struct field *f = &r->f[r->nf++];
    f->at = r->blen;
    f->n = len;
    f->pos = p;
    f->given = s != NULL && len > 0;
    if (len)
        memcpy(r->buf + r->blen, s, len);
    r->buf[r->blen + len] = '\0';
    r->blen += len + 1;
    size_t bad = f->given ? bad_utf8((const unsigned char *)r->buf + f->at, len) : 0;
    if (bad)
        rerr(r, p, r->nf - 1, "invalid UTF-8 at byte %zu of the cell (save the file as UTF-8)", bad);
}

/* The first record as the header: keeps the names (r owns name_store) and maps each to its
 * run key, refusing unknown, repeated and missing required columns. */
static enum hl_status header(struct rdr *r)
{
    r->ncols = r->nf;
    r->name_store = hl_malloc(r->blen ? r->blen : 1);
    if (!r->name_store)
        return nomem(r);
    memcpy(r->name_store, r->buf, r->blen);
    const char *names[NCOLS];
    for (int k = 0; k < NCOLS; k++)
        names[k] = cols[k].name;
    for (int j = 0; j < r->ncols; j++) {
        const struct field *f = &r->f[j];
        const char *nm = r->name_store + f->at;
        r->names[j] = nm;
        if (!f->given)
            return rerr(r, f->pos, j, "empty column name in the header");
        int k = 0;
        while (k < NCOLS && strcmp(cols[k].name, nm))
            k++;
        if (k == NCOLS) {
            const char *near = hl_nearest(nm, names, NCOLS, 1);
            if (near)
                return rerr(r, f->pos, j, "unknown column (did you mean '%s'?)", near);
            return rerr(r, f->pos, j, "unknown column (the columns are the run keys: id, start, "
                        "reactor, scrubber, substrate_name, substrate_smiles, substrate_formula, "
                        "substrate_kg, reagent, reagent_eq, reagent_kg, temp_c, feed_h, ...; "
                        "`haloledger schedule-template` lists them all)");
        }
        for (int i = 0; i < j; i++)
            if (r->key[i] == k)
                return rerr(r, f->pos, j, "duplicate column (first at %d:%d)", r->f[i].pos.line,
                            r->f[i].pos.col);
        r->key[j] = k;
    }
    /* columns every row needs: refused here once rather than on every row */
    static const char *const need[][2] = {{"id", NULL}, {"start", NULL}, {"substrate_kg", NULL},
        {"reagent", NULL}, {"substrate_smiles", "substrate_formula"}, {"reagent_eq", "reagent_kg"}};
    for (size_t q = 0; q < sizeof need / sizeof need[0]; q++) {
        int have = 0;
        for (int j = 0; j < r->ncols; j++)
            for (int a = 0; a < 2; a++)
                have |= need[q][a] && !strcmp(r->names[j], need[q][a]);
        if (!have) {
            struct sched_pos p = r->f[0].pos;
            r->st = hl_err_at(r->e, HL_ERR_INPUT, p.line, p.col, "schedule",
                              "the header has no column %s%s%s (required)", need[q][0],
                              need[q][1] ? " or " : "", need[q][1] ? need[q][1] : "");
            return r->st;
        }
    }
    return HL_OK;
}

/* Appends p to r->pos (grown as needed, owned by r); -1 on NOMEM. */
static int add_pos(struct rdr *r, struct sched_pos p)
{
    if (r->npos == r->pcap) {
        size_t cap = r->pcap ? 2 * r->pcap : 64;
        struct sched_pos *np = hl_realloc(r->pos, cap * sizeof *np);
        if (!np)
            return -1;
        r->pos = np;
        r->pcap = cap;
    }
    r->pos[r->npos] = p;
    return (int)r->npos++;
}

/* The object at the dotted path's parent inside run, created (with position p) if absent. */
static cJSON *parent_of(struct rdr *r, cJSON *run, const char *path, char *last, size_t cap,
                        struct sched_pos p)
{
    cJSON *o = run;
    const char *s = path;
    for (;;) {
        const char *dot = strchr(s, '.');
        if (!dot) {
            snprintf(last, cap, "%s", s);
            return o;
        }
        char part[64];
        snprintf(part, sizeof part, "%.*s", (int)(dot - s), s);
        cJSON *sub = cJSON_GetObjectItemCaseSensitive(o, part);
        if (!sub) {
            int at = add_pos(r, p);
            if (at < 0 || !(sub = cJSON_AddObjectToObject(o, part)))
                return NULL;
            sub->valueint = at;
        }
        o = sub;
        s = dot + 1;
    }
}

/* A number cell as a spreadsheet writes it: optional sign, digits, one decimal point
 * (a decimal comma too when the separator is not ','), optional exponent.  0 = ok. */
static int cell_number(const char *s, char sep, double *out)
{
    char tmp[80];
    size_t n = strlen(s);
    if (n == 0 || n >= sizeof tmp)
        return -1;
    int points = 0;
    for (size_t k = 0; k < n; k++) {
        char ch = s[k];
        if (ch == ',' && sep != ',')
            ch = '.';
        if (!strchr("+-.0123456789eE", ch))
            return -1;
        points += ch == '.';
        tmp[k] = ch;
    }
    tmp[n] = '\0';
    if (points > 1) /* "1.234,5": a thousands separator, which no format here writes */
        return -2;
    char *end;
    *out = strtod(tmp, &end);
    return *end ? -1 : 0;
}

/* One record after the header, unless every cell is empty: built into a run object and
 * handed to r->fn with the positions of its cells; r->fn's error becomes r's. */
static enum hl_status row(struct rdr *r)
{
    int any = 0;
    for (int j = 0; j < r->nf; j++)
        any |= r->f[j].given;
    if (!any)
        return HL_OK; /* a spreadsheet's empty row (";;;;"), or a line of spaces */
    r->npos = 0;
    cJSON *run = cJSON_CreateObject();
    int at = add_pos(r, r->f[0].pos);
    if (!run || at < 0) {
        cJSON_Delete(run);
        return nomem(r);
    }
    run->valueint = at;
    struct sched_pos cell[MAX_COLS];
    unsigned char given[MAX_COLS];
    /* the substrate object always exists, so a row without smiles or formula is told which */
    cJSON *sub = cJSON_AddObjectToObject(run, "substrate");
    if (!sub || (at = add_pos(r, r->f[0].pos)) < 0) {
        cJSON_Delete(run);
        return nomem(r);
    }
    sub->valueint = at;
    for (int j = 0; j < r->ncols; j++) {
        given[j] = j < r->nf && r->f[j].given;
        /* a cell missing at the end of a short row sits where the row ends */
        cell[j] = j < r->nf ? r->f[j].pos : r->f[r->nf - 1].pos;
        if (!given[j])
            continue;
        const struct col *c = &cols[r->key[j]];
        const struct field *f = &r->f[j];
        char *txt = r->buf + f->at;
        char last[64];
        cJSON *parent = parent_of(r, run, c->path, last, sizeof last, f->pos);
        if (!parent) {
            cJSON_Delete(run);
            return nomem(r);
        }
        cJSON *v;
        if (c->kind == K_NUM) {
            double x;
            int bad = cell_number(txt, r->sep, &x);
            if (bad) {
                char q[48];
                snprintf(q, sizeof q, "%.40s", txt);
                cJSON_Delete(run);
                if (bad == -2)
                    return rerr(r, f->pos, j, "\"%s\" has more than one decimal mark (write numbers "
                                "without thousands separators)", q);
                return rerr(r, f->pos, j, "must be a number (got \"%s\")", q);
            }
            v = cJSON_CreateNumber(x);
        } else {
            /* "2027-03-02 06:00", as spreadsheets write a date and time, is ISO 8601's
             * "2027-03-02T06:00" (ISO 8601-1:2019 allows the space by mutual agreement) */
            if (c->kind == K_DATE && f->n >= 16 && txt[10] == ' ' && txt[4] == '-' && txt[13] == ':')
                txt[10] = 'T';
            v = cJSON_CreateString(txt);
        }
        if (!v || (at = add_pos(r, f->pos)) < 0) {
            cJSON_Delete(v);
            cJSON_Delete(run);
            return nomem(r);
        }
        v->valueint = at;
        cJSON_AddItemToObject(parent, last, v);
    }
    struct sched_row sr = {run, r->pos, r->npos, r->f[0].pos.line, r->ncols, r->names, cell, given, r->t};
    enum hl_status st = r->fn(r->data, &sr, r->e);
    cJSON_Delete(run);
    if (st)
        r->st = st;
    return st;
}

/* libcsv record callback: the header first, then each row; resets the record buffer. */
static void on_record(int term, void *data)
{
    (void)term;
    struct rdr *r = data;
    if (r->st)
        return;
    r->fstart = -1;
    if (r->record++ == 0)
        header(r);
    else
        row(r);
    r->nf = 0;
    r->blen = 0;
}

/* ',' ';' or tab: the most frequent outside quotes on the header line; ',' on a tie. */
static char detect_sep(const char *t, size_t n)
{
    int count[3] = {0, 0, 0}, q = 0;
    for (size_t i = 0; i < n && (q || (t[i] != '\n' && t[i] != '\r')); i++) {
        if (t[i] == '"')
            q = !q;
        else if (!q)
            count[0] += t[i] == ',', count[1] += t[i] == ';', count[2] += t[i] == '\t';
    }
    if (count[1] > count[0] && count[1] >= count[2])
        return ';';
    if (count[2] > count[0] && count[2] > count[1])
        return '\t';
    return ',';
}

/* sched_parse on text with a NUL at text[len] (the positions are read back through it). */
static enum hl_status parse_nul(const char *text, size_t len, char sep, sched_row_fn fn, void *data,
                                struct hl_err *e);

enum hl_status sched_parse(const char *text, size_t len, char sep, sched_row_fn fn, void *data,
                           struct hl_err *e)
{
    hl_err_clear(e);
    if (len > MAX_FILE)
        return hl_err_at(e, HL_ERR_INPUT, 1, 1, "schedule", "the schedule is larger than %u bytes", MAX_FILE);
    /* the rows' positions are read back through text (sched_row.text) up to a NUL after it */
    char *copy = hl_malloc(len + 1);
    if (!copy)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the schedule");
    memcpy(copy, text, len);
    copy[len] = '\0';
    enum hl_status st = parse_nul(copy, len, sep, fn, data, e);
    hl_free(copy);
    return st;
}

static enum hl_status parse_nul(const char *text, size_t len, char sep, sched_row_fn fn, void *data,
                                struct hl_err *e)
{
    struct rdr r;
    memset(&r, 0, sizeof r);
    r.t = text;
    r.n = len;
    r.line = 1;
    r.fstart = -1;
    r.fn = fn;
    r.data = data;
    r.e = e;
    size_t i = 0;
    if (len >= 3 && !memcmp(text, "\xEF\xBB\xBF", 3))
        i = r.line_start = 3; /* UTF-8 byte-order mark (spreadsheets write one); columns after it */
    /* "sep=;" on the first line names the separator (as some spreadsheets write it) */
    if (len - i >= 5 && !memcmp(text + i, "sep=", 4) && strchr(",;\t", text[i + 4]) &&
        (len - i == 5 || text[i + 5] == '\n' || text[i + 5] == '\r')) {
        if (!sep)
            sep = text[i + 4];
        i += 5;
        if (i < len && text[i] == '\r')
            i++;
        if (i < len && text[i] == '\n')
            i++;
        r.line = 2;
        r.line_start = i;
    }
    if (!sep)
        sep = detect_sep(text + i, len - i);
    r.sep = sep;
    const char *nul = memchr(text + i, '\0', len - i);
    if (nul) {
        /* a NUL ends a C string: refuse it where it is rather than read a shorter cell */
        int line = 1;
        size_t ls = 0;
        for (size_t k = 0; k < (size_t)(nul - text); k++)
            if (text[k] == '\n')
                line++, ls = k + 1;
        return hl_err_at(e, HL_ERR_INPUT, line, (int)((size_t)(nul - text) - ls) + 1, "schedule",
                         "a NUL byte: this is not a text file (save the sheet as CSV, UTF-8)");
    }
    struct csv_parser p;
    if (csv_init(&p, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL | CSV_EMPTY_IS_NULL))
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the schedule");
    csv_set_realloc_func(&p, csv_realloc);
    csv_set_free_func(&p, csv_free_fn);
    csv_set_delim(&p, (unsigned char)sep);
    csv_set_space_func(&p, sep == '\t' ? is_space_only : is_space_tab);
    for (; i < len && !r.st; i++) {
        unsigned char ch = (unsigned char)text[i];
        r.i = i;
        if (r.fstart < 0 && ch != ' ' && ch != '\r' && ch != '\n' && ch != (unsigned char)sep &&
            !(ch == '\t' && sep != '\t')) {
            r.fstart = (long)i;
            r.fpos = here(&r, i);
        }
        if (csv_parse(&p, text + i, 1, on_field, on_record, &r) != 1 && !r.st) {
            int err = csv_error(&p);
            struct sched_pos at = here(&r, i);
            if (err == CSV_EPARSE)
                rerr(&r, at, r.record == 0 && r.nf >= MAX_COLS ? -1 : r.nf,
                     "misplaced quote: a quote inside an unquoted cell, or text after a closing "
                     "quote (quote the whole cell and double the quotes inside it)");
            else
                nomem(&r);
        }
        if (ch == '\n' || (ch == '\r' && (i + 1 == len || text[i + 1] != '\n'))) {
            r.line++;
            r.line_start = i + 1;
        }
    }
    if (!r.st) {
        r.i = len;
        if (csv_fini(&p, on_field, on_record, &r) != 0 && !r.st) {
            if (csv_error(&p) == CSV_EPARSE)
                rerr(&r, r.fstart >= 0 ? r.fpos : here(&r, len), r.nf,
                     "quoted cell not closed before the end of the file");
            else
                nomem(&r);
        }
    }
    if (!r.st && r.record == 0)
        rerr(&r, here(&r, len), -1, "empty schedule: the first line must name the columns");
    else if (!r.st && r.record == 1)
        rerr(&r, here(&r, len), -1, "no runs: the schedule has a header and no rows");
    csv_free(&p);
    hl_free(r.buf);
    hl_free(r.pos);
    hl_free(r.name_store);
    return r.st;
}

enum hl_status sched_load(const char *path, char sep, sched_row_fn fn, void *data, struct hl_err *e)
{
    hl_err_clear(e);
    char *buf;
    size_t n;
    enum hl_status st = afile_read(path, &buf, &n, e);
    if (st) {
        char msg[sizeof e->msg];
        snprintf(msg, sizeof msg, "%s", e->msg);
        return hl_err_set(e, st, "%.200s: %s", path, msg);
    }
    hl_err_clear(e);
    st = parse_nul(buf, n, sep, fn, data, e);
    hl_free(buf);
    return st;
}

/* Invented example rows (no real plant): one chlorination by SMILES with a time, one
 * bromination by formula on a date only, one repeated NBS run. */
static const char example_rows[] =
    "EX-1,2027-03-02 06:00,R-3,VS-1,2-methylpropane,CC(C)C,,,800,Cl2,0.6,,0.97,40,5,,,batch,,,,,,,,,,"
    "\"first run, after the column wash\",,,,,,done,590,,,2027-03-02 12:30,\r\n"
    "EX-2,2027-03-04,R-4,VS-1,toluene,,C7H8,,500,Br2,,700,,80,6,,,,,,,,,,,,,,,,,,,,,,,,\r\n"
    "EX-3,2027-03-05T08:00,R-3,VS-1,cyclohexene,C1CCCC=C1,,,300,NBS,1.05,,,77,3,,,,3,2,,,,,,,,,,,,,,,,,,,\r\n";

enum hl_status sched_template(int example, char **out, struct hl_err *e)
{
    size_t cap = 64;
    for (int k = 0; k < NCOLS; k++)
        cap += strlen(cols[k].name) + 1;
    if (example)
        cap += sizeof example_rows;
    char *s = hl_malloc(cap);
    if (!s)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    size_t n = 0;
    for (int k = 0; k < NCOLS; k++)
        n += (size_t)snprintf(s + n, cap - n, "%s%s", k ? "," : "", cols[k].name);
    n += (size_t)snprintf(s + n, cap - n, "\r\n%s", example ? example_rows : "");
    *out = s;
    return HL_OK;
}

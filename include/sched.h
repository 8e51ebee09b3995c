/*
 * sched.h - CSV schedules: the runs of a campaign as spreadsheet rows (design section 3).
 *
 * The reader turns each row of a CSV file into a run object shaped exactly like a
 * runs[] entry of the campaign JSON (substrate_smiles -> substrate.smiles,
 * repeat_count -> repeat.count, model_overhalogenation_factor ->
 * model.overhalogenation_factor ...) and hands it, row by row, to a callback: the
 * campaign reader validates it with the same code as a JSON run (ranges, defaults,
 * suggestions), so the two formats cannot drift apart.  The CSV itself is split by
 * libcsv (strict quotes); this module adds what libcsv does not do: positions, the
 * separator (',' ';' or tab, detected from the header or given; a first line "sep=;"
 * as some spreadsheets write it is honoured), a UTF-8 byte-order mark, a decimal comma
 * (with ';' or tab separators), dates written "2027-03-02 06:00", UTF-8 checks and the
 * header (known column names, nearest name suggested, no duplicates).  Empty cells mean
 * "not given"; rows whose cells are all empty are skipped.  Errors are
 * FILE:LINE:COL with the field "column NAME" (the header's spelling).
 */
#ifndef SCHED_H
#define SCHED_H

#include <stddef.h>
#include <cjson/cJSON.h>
#include "hlerr.h"

/* Position of a cell: 1-based line and byte column of its first byte (the opening quote
 * of a quoted cell), and that byte's offset in the text. */
struct sched_pos { int line, col; size_t off; };

/* One row, as the callback sees it; everything is owned by the reader and valid only
 * during the call.  run: the run object; each node's valueint indexes pos[] (the row
 * object's own entry is the row's first cell).  cell[k] is where column k of the
 * header sits on this row (an empty cell too: the separator or line end after it). */
struct sched_row {
    cJSON *run;
    const struct sched_pos *pos; size_t npos;
    int line;                       /* line of the row's first cell */
    int ncols;
    const char *const *names;       /* the header's column names */
    const struct sched_pos *cell;   /* ncols entries */
    const unsigned char *given;     /* ncols flags: 1 = the cell holds a value */
    const char *text;               /* the file's bytes: pos[].off and cell[].off index it */
};

typedef enum hl_status (*sched_row_fn)(void *data, const struct sched_row *row, struct hl_err *e);

/* Separator: 0 = detect from the header line (the most frequent of ',' ';' tab outside
 * quotes; ',' on a tie or when there is none), else ',' ';' or '\t'. */

/* Read a schedule held in memory (len bytes, need not be NUL-terminated) and call fn once
 * per non-empty data row, in file order; a non-zero status from fn stops the reading and
 * is returned.  Errors: HL_ERR_INPUT with line:col and field "column NAME" (or
 * "schedule" for the file as a whole), HL_ERR_NOMEM. */
enum hl_status sched_parse(const char *text, size_t len, char sep, sched_row_fn fn, void *data,
                           struct hl_err *e);

/* Same from a file (at most 1 GiB). */
enum hl_status sched_load(const char *path, char sep, sched_row_fn fn, void *data, struct hl_err *e);

/* CSV column name of a path inside a run ("substrate.smiles" -> "substrate_smiles",
 * "substrate" -> "substrate_smiles", "repeat" -> "repeat_count"); NULL if none.  Static. */
const char *sched_column(const char *run_path);

/* The schedule template: the header line of every column (example 0), or the header
 * and three filled rows of an invented plant (example 1), as CSV text with ',' and
 * CRLF line ends (RFC 4180).  *out is NUL-terminated, owned by the caller (hl_free). */
enum hl_status sched_template(int example, char **out, struct hl_err *e);

#endif

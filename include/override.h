/*
 * override.h - `--set KEY=VALUE`: what-if changes to a campaign without editing its file.
 *
 * KEY is a path into the campaign file: a top-level key (`title`, `units`), a key inside a
 * top-level object (`model.overhalogenation_factor`, `report.paper`, `tolerances.stock_pct`),
 * or a key of one entry of an array whose entries have ids: `runs.ID.KEY` (a runs[] entry or
 * a schedule row, by its id), `scrubbers.ID.KEY`, `stock.REAGENT.KEY`; deeper keys follow with
 * dots (`runs.PR-1.model.overhalogenation_factor`).  An id holding a dot is written in
 * brackets (`runs[PR.1].temp_c`).  VALUE is read as JSON (`1.2`, `"R-3"`, `{"count": 2, ...}`);
 * a value that is not JSON is taken as a string (`cstr`, `2027-03-02T06:00`); `null` removes
 * the key (its default applies).  Setting one of reagent_eq / reagent_kg, or of
 * substrate.smiles / substrate.formula, removes the other, as the file allows only one.
 *
 * The changes are made to the JSON tree before the campaign reader validates it, so a value
 * is checked exactly as in the file.  `runs.ID` names an entry as written: an entry with
 * `repeat` is changed in every copy; an id that only its repeat makes (`C-101-2`) is refused.
 * Nodes put in by an override carry valueint -(k+1) (k its index), so the reader's positions
 * for them have line -(k+1); ovr_blame turns such an error into one that names the --set.
 */
#ifndef OVERRIDE_H
#define OVERRIDE_H

#include <cjson/cJSON.h>
#include "hlerr.h"

#define OVR_MAX 64

struct campaign;

struct ovr {
    char *arg;          /* KEY=VALUE as given (owned) */
    char *block;        /* "runs", "scrubbers", "stock" or NULL (a path from the top) */
    char *id;           /* the entry's id (reagent for stock); NULL without block */
    char **path; int npath; /* keys below the entry (or from the top), at least one */
    cJSON *value;       /* the parsed value; NULL = remove the key */
    int hit;            /* entries changed in the last campaign read */
};

struct ovr_list { struct ovr v[OVR_MAX]; int n; };

/* Parse n arguments "KEY=VALUE" into *out (ovr_free it, also on failure).  Bad syntax, the
 * same key twice and keys that overlap are HL_ERR_INPUT with e->file "--set ARG". */
enum hl_status ovr_parse(const char *const *args, int n, struct ovr_list *out, struct hl_err *e);

/* Apply every override not on runs to the campaign tree root (the hits are reset first).
 * An unknown scrubber id or stock reagent, or a path through a non-object, is HL_ERR_INPUT. */
enum hl_status ovr_apply_top(struct ovr_list *l, cJSON *root, struct hl_err *e);

/* Apply the runs overrides whose id is that of entry (a runs[] entry or a schedule row). */
enum hl_status ovr_apply_run(struct ovr_list *l, cJSON *entry, struct hl_err *e);

/* After every run is read: a runs override that changed no entry is HL_ERR_INPUT (unknown
 * id, the nearest one suggested; an id made by a repeat named as such). */
enum hl_status ovr_check_runs(const struct ovr_list *l, const struct campaign *c, struct hl_err *e);

/* If e lies in an override's value (line < 0), make it name the --set: e->file "--set ARG",
 * no line or column, the field written with the override's ids.  Otherwise unchanged. */
void ovr_blame(const struct ovr_list *l, struct hl_err *e);

/* Free what ovr_parse allocated; the list is empty afterwards.  NULL is fine. */
void ovr_free(struct ovr_list *l);

#endif

/*
 * sweep.c - what-if sweeps (see sweep.h): one ledger per value, the swept run's figures
 * picked out of it, the best value by an objective, and the trade-off in words.
 */
#include "sweep.h"

#include <cjson/cJSON.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <xlsxwriter.h>

#include "afile.h"
#include "hlmem.h"
#include "jtree.h"
#include "isodate.h"
#include "reagents.h"

static enum hl_status nomem(struct hl_err *e)
{
    return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
}

static void free_values(char **v, int n)
{
    for (int i = 0; i < n; i++)
        hl_free(v[i]);
    hl_free(v);
}

enum hl_status sweep_values(const char *spec, char ***values, int *n, struct hl_err *e)
{
    *values = NULL;
    *n = 0;
    char **v = hl_calloc(SWEEP_MAX_POINTS, sizeof *v);
    if (!v)
        return nomem(e);
    int k = 0;
    if (strchr(spec, ':')) {
        char *end;
        double from = strtod(spec, &end), to, step;
        if (end == spec || *end != ':')
            goto bad;
        const char *p = end + 1;
        to = strtod(p, &end);
        if (end == p || *end != ':')
            goto bad;
        p = end + 1;
        step = strtod(p, &end);
        if (end == p || *end || !isfinite(from) || !isfinite(to) || !isfinite(step))
            goto bad;
        if (!(step > 0) || to < from) {
            free_values(v, 0);
            return hl_err_set(e, HL_ERR_INPUT, "--vary: '%s': STEP must be > 0 and TO >= FROM", spec);
        }
        double count = floor((to - from) / step + 1e-9) + 1;
        if (count > SWEEP_MAX_POINTS) {
            free_values(v, 0);
            return hl_err_set(e, HL_ERR_INPUT, "--vary: '%s' gives %.0f values (at most %d)", spec, count,
                              SWEEP_MAX_POINTS);
        }
        for (k = 0; k < (int)count; k++) {
            char buf[32];
            /* 12 significant digits: 0.1 + 2 x 0.1 is the 0.3 a planner types */
            snprintf(buf, sizeof buf, "%.12g", from + k * step);
            if (!(v[k] = hl_strdup(buf))) {
                free_values(v, k);
                return nomem(e);
            }
        }
    } else {
        const char *p = spec;
        while (*p) {
            const char *c = strchr(p, ',');
            size_t len = c ? (size_t)(c - p) : strlen(p);
            if (!len || len > 30 || k == SWEEP_MAX_POINTS)
                goto bad;
            if (!(v[k] = hl_malloc(len + 1))) {
                free_values(v, k);
                return nomem(e);
            }
            memcpy(v[k], p, len);
            v[k++][len] = '\0';
            p += len + (c != NULL);
            if (c && !*p)
                goto bad;
        }
        if (!k)
            goto bad;
    }
    *values = v;
    *n = k;
    return HL_OK;
bad:
    free_values(v, k);
    return hl_err_set(e, HL_ERR_INPUT, "--vary: '%s' is not FROM:TO:STEP or a list V1,V2,...", spec);
}

/* The point keys an objective may name, with where each sits in struct sweep_point. */
static const struct { const char *name; size_t off; } keys[] = {
#define K(f) {#f, offsetof(struct sweep_point, f)}
    K(wanted_kg), K(isomer_kg), K(overhalogenated_kg), K(unreacted_substrate_kg),
    K(selectivity_pct), K(conversion_pct), K(acid_gas_kg), K(acid_gas_kg_per_kg_wanted),
    K(wanted_kg_per_kg_reagent), K(naoh_kg), K(peak_acid_kmol_h)
#undef K
};
#define NKEYS ((int)(sizeof keys / sizeof keys[0]))

static double key_value(const struct sweep_point *p, int k)
{
    return *(const double *)((const char *)p + keys[k].off);
}

static void pick(const struct ledger *l, const char *id, struct sweep_point *p)
{
    const struct ledger_run *lr = NULL;
    for (int i = 0; i < l->nruns && !lr; i++)
        if (!strcmp(l->runs[i].id, id))
            lr = &l->runs[i];
    if (!lr)
        return;
    const struct ledger_bal *b = &lr->bal;
    p->wanted_kg = b->wanted_kg;
    p->isomer_kg = b->isomer_kg;
    p->overhalogenated_kg = b->overhal_kg;
    p->unreacted_substrate_kg = b->unreacted_substrate_kg;
    p->selectivity_pct = b->selectivity_defined ? b->selectivity_pct : -1;
    p->conversion_pct = b->conversion_pct;
    p->reagent_kg = b->reagent_kg;
    p->acid_gas_kg = b->hx_kg[0] + b->hx_kg[1];
    p->acid_gas_kg_per_kg_wanted = b->wanted_kg > 0 ? p->acid_gas_kg / b->wanted_kg : -1;
    p->wanted_kg_per_kg_reagent = b->reagent_kg > 0 ? b->wanted_kg / b->reagent_kg : -1;
    p->naoh_kg = lr->scrub.naoh_kg;
    int month = isodate_month_index(lr->start_min);
    for (int i = 0; i < l->norders; i++)
        if (l->orders[i].item == lr->reagent && l->orders[i].month_index == month)
            p->containers += l->orders[i].containers;
    p->has_scrubber = lr->scrubber_index >= 0;
    if (p->has_scrubber)
        p->peak_acid_kmol_h = l->scrubbers[lr->scrubber_index].out.peak_acid_kmol_h;
}

static void say_change(char *buf, size_t cap, size_t *n, const char *what, double a, double b,
                       const char *unit)
{
    if (*n >= cap || a < 0 || b < 0)
        return;
    int w = snprintf(buf + *n, cap - *n, "%s %s %.3g -> %.3g%s", *n ? "," : "", what, a, b, unit);
    if (w > 0)
        *n = *n + (size_t)w < cap ? *n + (size_t)w : cap;
}

/* "Going from A to B: conversion x -> y %, ..." for the best point against an end point. */
static void tradeoff_towards(const struct sweep *s, const struct sweep_point *a,
                             const struct sweep_point *b, char *out, size_t cap)
{
    char list[600];
    size_t n = 0;
    list[0] = '\0';
    say_change(list, sizeof list, &n, "conversion", a->conversion_pct, b->conversion_pct, " %");
    say_change(list, sizeof list, &n, "selectivity", a->selectivity_pct, b->selectivity_pct, " %");
    say_change(list, sizeof list, &n, "over-halogenated", a->overhalogenated_kg, b->overhalogenated_kg, " kg");
    say_change(list, sizeof list, &n, "acid gas", a->acid_gas_kg_per_kg_wanted, b->acid_gas_kg_per_kg_wanted,
               " kg per kg of wanted product");
    say_change(list, sizeof list, &n, "wanted", a->wanted_kg_per_kg_reagent, b->wanted_kg_per_kg_reagent,
               s->reagent ? " kg per kg of reagent" : "");
    snprintf(out, cap, "%s = %s -> %s:%s.", s->key, a->value, b->value, list);
}

static void tradeoff(struct sweep *s)
{
    char text[2000];
    size_t n = 0;
    text[0] = '\0';
    if (s->best < 0) {
        snprintf(text, sizeof text, "No value gives a defined %s.", s->objective);
    } else {
        const struct sweep_point *b = &s->points[s->best];
        int k = 0;
        while (k < NKEYS && strcmp(keys[k].name, s->objective))
            k++;
        n = (size_t)snprintf(text, sizeof text, "Best %s = %s: %s %s is %.4g%s.", s->key, b->value,
                             s->minimise ? "lowest" : "highest", s->objective, key_value(b, k),
                             !strcmp(s->objective, "wanted_kg_per_kg_reagent") && s->reagent ? " kg per kg of "
                             "reagent charged" : "");
        char part[800];
        if (s->best > 0) {
            tradeoff_towards(s, b, &s->points[0], part, sizeof part);
            n += (size_t)snprintf(text + n, sizeof text - n, " Lower: %s", part);
        }
        if (s->best < s->npoints - 1 && n < sizeof text) {
            tradeoff_towards(s, b, &s->points[s->npoints - 1], part, sizeof part);
            snprintf(text + n, sizeof text - n, " Higher: %s", part);
        }
    }
    s->tradeoff = hl_strdup(text);
}

enum hl_status sweep_run(struct campaign *c, const struct ledger_opts *lo, const char *run_id,
                         const char *key, char *const *values, int nvalues, const char *objective,
                         struct sweep **out, struct hl_err *e)
{
    hl_err_clear(e);
    *out = NULL;
    int ri = -1, nsrc = 0;
    for (int i = 0; i < c->nruns; i++) {
        if (!strcmp(c->runs[i].id, run_id))
            ri = i;
        if (c->runs[i].src_index >= nsrc)
            nsrc = c->runs[i].src_index + 1;
    }
    if (ri < 0)
        return hl_err_set(e, HL_ERR_INPUT, "--run: the campaign has no run \"%.100s\"", run_id);
    const char *obj = objective ? objective : "max:wanted_kg_per_kg_reagent";
    int minimise = !strncmp(obj, "min:", 4);
    if (!minimise && strncmp(obj, "max:", 4))
        return hl_err_set(e, HL_ERR_INPUT, "--objective: '%.60s' is not max:KEY or min:KEY", obj);
    int ok = -1;
    for (int k = 0; k < NKEYS; k++)
        if (!strcmp(keys[k].name, obj + 4))
            ok = k;
    if (ok < 0)
        return hl_err_set(e, HL_ERR_INPUT, "--objective: unknown key '%.60s' (wanted_kg, isomer_kg, "
                          "overhalogenated_kg, unreacted_substrate_kg, selectivity_pct, conversion_pct, "
                          "acid_gas_kg, acid_gas_kg_per_kg_wanted, wanted_kg_per_kg_reagent, naoh_kg, "
                          "peak_acid_kmol_h)", obj + 4);
    /* a repeat shares its entry's balance in the ledger; the swept copy gets its own */
    c->runs[ri].src_index = nsrc;
    struct sweep *s = hl_calloc(1, sizeof *s);
    if (!s)
        return nomem(e);
    const struct reagent_info *rg = reagent_get(c->runs[ri].reagent);
    s->run = hl_strdup(run_id);
    s->key = hl_strdup(key);
    s->reagent = rg ? hl_strdup(rg->name) : NULL;
    s->points = hl_calloc((size_t)nvalues, sizeof *s->points);
    snprintf(s->objective, sizeof s->objective, "%s", obj + 4);
    s->minimise = minimise;
    s->best = -1;
    if (c->nsets && (s->overrides = hl_calloc((size_t)c->nsets, sizeof *s->overrides)))
        for (; s->noverrides < c->nsets; s->noverrides++)
            if (!(s->overrides[s->noverrides] = hl_strdup(c->sets[s->noverrides])))
                break;
    if (!s->run || !s->key || (rg && !s->reagent) || !s->points || s->noverrides < c->nsets) {
        sweep_free(s);
        return nomem(e);
    }
    enum hl_status st = HL_OK;
    for (int i = 0; i < nvalues && !st; i++) {
        struct sweep_point *p = &s->points[i];
        if ((st = camp_run_set(c, ri, key, values[i], e)))
            break;
        snprintf(p->value, sizeof p->value, "%s", values[i]);
        p->x = !strcmp(key, "reactor_mode") ? c->runs[ri].mode == CAMP_CSTR : strtod(values[i], NULL);
        struct ledger *l = NULL;
        if ((st = ledger_build(c, lo, &l, e)))
            break;
        pick(l, run_id, p);
        ledger_free(l);
        s->npoints = i + 1;
        double v = key_value(p, ok);
        if (v >= 0 && (s->best < 0 || (minimise ? v < key_value(&s->points[s->best], ok)
                                                : v > key_value(&s->points[s->best], ok))))
            s->best = i;
    }
    if (st) {
        sweep_free(s);
        return st;
    }
    tradeoff(s);
    if (!s->tradeoff) {
        sweep_free(s);
        return nomem(e);
    }
    *out = s;
    return HL_OK;
}

void sweep_print(const struct sweep *s, FILE *f)
{
    fprintf(f, "sweep of run %s, %s (%s):\n", s->run, s->key, s->reagent ? s->reagent : "?");
    fprintf(f, "  %-10s %10s %10s %10s %10s %8s %8s %10s %10s %10s %5s %9s\n", s->key, "wanted kg",
            "isomer kg", "overhal kg", "unreact kg", "sel %", "conv %", "acid kg", "acid/want",
            "NaOH kg", "cont", "peak kmol/h");
    for (int i = 0; i < s->npoints; i++) {
        const struct sweep_point *p = &s->points[i];
        fprintf(f, "  %-10s %10.1f %10.1f %10.1f %10.1f %8.1f %8.1f %10.1f %10.3f %10.1f %5d %9.3f%s\n",
                p->value, p->wanted_kg, p->isomer_kg, p->overhalogenated_kg, p->unreacted_substrate_kg,
                p->selectivity_pct, p->conversion_pct, p->acid_gas_kg, p->acid_gas_kg_per_kg_wanted,
                p->naoh_kg, p->containers, p->peak_acid_kmol_h, i == s->best ? "  <- best" : "");
    }
    fprintf(f, "%s\n", s->tradeoff);
    fprintf(f, "Planning estimates: check them against the SDS, local regulations and a licensed "
               "engineer's review before acting on them.\n");
}

static cJSON *num_or_null(double v, int defined)
{
    return defined && isfinite(v) ? cJSON_CreateNumber(v) : cJSON_CreateNull();
}

/* A point's value as JSON: a number, or the text of a word value (reactor_mode). */
static cJSON *value_node(const struct sweep_point *p)
{
    char *end;
    strtod(p->value, &end);
    return *end || !p->value[0] ? cJSON_CreateString(p->value) : cJSON_CreateNumber(p->x);
}

static cJSON *sweep_json(const struct sweep *s, int *ok)
{
    cJSON *root = cJSON_CreateObject(), *pts = cJSON_CreateArray();
    if (!root || !pts) {
        cJSON_Delete(root);
        cJSON_Delete(pts);
        *ok = 0;
        return NULL;
    }
    jt_add(root, "format", cJSON_CreateString("haloledger-sweep/1"), ok);
    if (s->noverrides) { /* a what-if of a what-if: say so, as the ledger does */
        cJSON *ov = cJSON_CreateArray();
        for (int i = 0; ov && i < s->noverrides; i++)
            jt_add(ov, NULL, cJSON_CreateString(s->overrides[i]), ok);
        jt_add(root, "overrides", ov, ok);
    }
    jt_add(root, "run", cJSON_CreateString(s->run), ok);
    jt_add(root, "key", cJSON_CreateString(s->key), ok);
    jt_add(root, "reagent", s->reagent ? cJSON_CreateString(s->reagent) : cJSON_CreateNull(), ok);
    jt_add(root, "objective", cJSON_CreateString(s->objective), ok);
    jt_add(root, "minimise", cJSON_CreateBool(s->minimise), ok);
    jt_add(root, "points", pts, ok);
    for (int i = 0; i < s->npoints && *ok; i++) {
        const struct sweep_point *p = &s->points[i];
        cJSON *o = cJSON_CreateObject();
        jt_add(pts, NULL, o, ok);
        if (!o)
            break;
        jt_add(o, "value", value_node(p), ok);
        for (int k = 0; k < NKEYS; k++) {
            double v = key_value(p, k);
            int defined = v >= 0 && (k != NKEYS - 1 || p->has_scrubber);
            jt_add(o, keys[k].name, num_or_null(v, defined), ok);
        }
        jt_add(o, "reagent_kg", cJSON_CreateNumber(p->reagent_kg), ok);
        jt_add(o, "containers", cJSON_CreateNumber(p->containers), ok);
    }
    jt_add(root, "best", s->best >= 0 ? value_node(&s->points[s->best]) : cJSON_CreateNull(), ok);
    jt_add(root, "tradeoff", cJSON_CreateString(s->tradeoff), ok);
    return root;
}

enum hl_status sweep_write_json(const struct sweep *s, const char *path, struct hl_err *e)
{
    int ok = 1;
    cJSON *root = sweep_json(s, &ok);
    char *text = ok ? cJSON_Print(root) : NULL;
    cJSON_Delete(root);
    if (!text)
        return nomem(e);
    enum hl_status st = afile_check_target(path, e);
    if (!st)
        st = afile_write(path, text, strlen(text), e);
    cJSON_free(text);
    return st;
}

enum hl_status sweep_write_xlsx(const struct sweep *s, const char *path, struct hl_err *e)
{
    char *tmp = NULL, *dir = NULL;
    enum hl_status st = afile_check_target(path, e);
    if (st || (st = afile_tmpname(path, &tmp, e)))
        return st;
    if ((st = afile_dirname(path, &dir, e))) {
        afile_discard(tmp);
        hl_free(tmp);
        return st;
    }
    lxw_workbook_options wo = {.constant_memory = LXW_FALSE, .tmpdir = dir};
    lxw_workbook *wb = workbook_new_opt(tmp, &wo);
    if (!wb) {
        afile_discard(tmp);
        hl_free(tmp);
        hl_free(dir);
        return hl_err_set(e, HL_ERR_IO, "cannot write %s", path);
    }
    /* reproducible bytes (docs/library-notes.md): a fixed creation time, SOURCE_DATE_EPOCH if set */
    const char *sde = getenv("SOURCE_DATE_EPOCH");
    lxw_doc_properties props = {.title = "haloledger sweep",
                                .created = sde && *sde ? (time_t)strtoll(sde, NULL, 10) : (time_t)946684800};
    workbook_set_properties(wb, &props);
    lxw_worksheet *ws = workbook_add_worksheet(wb, "Sweep");
    lxw_format *head = workbook_add_format(wb);
    format_set_bold(head);
    format_set_bg_color(head, 0xDDE8E1);
    format_set_text_wrap(head);
    static const char *const cols[] = {NULL, "Wanted product [kg]", "Isomers [kg]",
        "Over-halogenated [kg]", "Unreacted substrate [kg]", "Selectivity [%]", "Conversion [%]",
        "Acid gas formed [kg]", "Acid gas per wanted product (dimensionless)",
        "Wanted product per reagent (dimensionless)", "NaOH consumed, as 100 % [kg]",
        "Peak hourly mean load of its scrubber [kmol/h]", "Reagent charged [kg]", "Containers in its month [count]"};
    char first[64];
    snprintf(first, sizeof first, "%s", s->key);
    worksheet_write_string(ws, 0, 0, first, head);
    for (int k = 1; k < 14; k++)
        worksheet_write_string(ws, 0, (lxw_col_t)k, cols[k], head);
    worksheet_set_column(ws, 0, 13, 14, NULL);
    worksheet_set_row(ws, 0, 45, NULL);
    worksheet_freeze_panes(ws, 1, 1);
    for (int i = 0; i < s->npoints; i++) {
        const struct sweep_point *p = &s->points[i];
        lxw_row_t r = (lxw_row_t)(i + 1);
        char *end;
        strtod(p->value, &end);
        if (*end || !p->value[0])
            worksheet_write_string(ws, r, 0, p->value, NULL);
        else
            worksheet_write_number(ws, r, 0, p->x, NULL);
        for (int k = 0; k < NKEYS; k++) {
            double v = key_value(p, k);
            if (v >= 0 && isfinite(v) && (k != NKEYS - 1 || p->has_scrubber))
                worksheet_write_number(ws, r, (lxw_col_t)(k + 1), v, NULL);
            else
                worksheet_write_string(ws, r, (lxw_col_t)(k + 1), "-", NULL);
        }
        worksheet_write_number(ws, r, 12, p->reagent_kg, NULL);
        worksheet_write_number(ws, r, 13, p->containers, NULL);
    }
    lxw_row_t last = (lxw_row_t)s->npoints;
    worksheet_write_string(ws, last + 2, 0, s->tradeoff, NULL);
    worksheet_write_string(ws, last + 3, 0, "Planning estimates: check them against the SDS, local "
                           "regulations and a licensed engineer's review before acting on them.", NULL);
    /* under --set the sweep is not of the campaign as written: say so on the sheet and on
     * every printed page (a fixed header text: no user text reaches the header codes) */
    for (int i = 0; i < s->noverrides; i++) {
        char what[600];
        snprintf(what, sizeof what, "!! WHAT-IF: --set %s (not the campaign file as written)", s->overrides[i]);
        worksheet_write_string(ws, last + 4 + (lxw_row_t)i, 0, what, head);
    }
    if (s->noverrides)
        worksheet_set_header(ws, "&LWHAT-IF: computed with --set (see the rows under the table)");
    if (s->npoints > 0) {
        lxw_chart *ch = workbook_add_chart(wb, LXW_CHART_LINE);
        for (int k = 1; k <= 4; k++) {
            lxw_chart_series *se = chart_add_series(ch, NULL, NULL);
            chart_series_set_categories(se, "Sweep", 1, 0, last, 0);
            chart_series_set_values(se, "Sweep", 1, (lxw_col_t)k, last, (lxw_col_t)k);
            chart_series_set_name_range(se, "Sweep", 0, (lxw_col_t)k);
        }
        chart_title_set_name(ch, "Products of the run");
        chart_axis_set_name(ch->x_axis, s->key);
        chart_axis_set_name(ch->y_axis, "kg");
        worksheet_insert_chart(ws, last + 5 + (lxw_row_t)s->noverrides, 1, ch);
    }
    lxw_error le = workbook_close(wb);
    hl_free(dir);
    if (le != LXW_NO_ERROR) {
        afile_discard(tmp);
        hl_free(tmp);
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, lxw_strerror(le));
    }
    st = afile_commit(tmp, path, e);
    hl_free(tmp);
    return st;
}

void sweep_free(struct sweep *s)
{
    if (!s)
        return;
    hl_free(s->run);
    hl_free(s->key);
    hl_free(s->reagent);
    hl_free(s->points);
    hl_free(s->tradeoff);
    for (int i = 0; i < s->noverrides; i++)
        hl_free(s->overrides[i]);
    hl_free(s->overrides);
    hl_free(s);
}

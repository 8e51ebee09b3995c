/*
 * ltable.c - the column lists of the ledger's output tables (see ltable.h).
 *
 * Each list is in JSON key order; `.col` names a sheet column only where the sheet's order
 * departs from it.  A getter says what a value is; the writers decide how it looks.
 */
#include "ltable.h"

#include "elements.h"
#include "isodate.h"
#include "liquor.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#define NCOLS(a) ((int)(sizeof(a) / sizeof((a)[0])))
#define OFF(type, field) offsetof(type, field)

/* --- shared helpers ------------------------------------------------------ */

const char *lt_item_name(int item)
{
    const struct reagent_info *ri = reagent_get(item);
    return ri ? ri->name : "unknown";
}

void lt_caustic_basis(const struct ledger *l, char *buf, size_t n)
{
    double wt = 0;
    int mixed = 0;
    for (int u = 0; u < l->nscrubbers; u++) {
        double m = l->scrubbers[u].makeup_naoh_wt_pct;
        if (!(m > 0))
            continue; /* a water liquor buys no caustic */
        if (wt == 0)
            wt = m;
        else if (m != wt)
            mixed = 1;
    }
    if (wt > 0 && !mixed)
        snprintf(buf, n, "%.4g wt%% NaOH", wt);
    else
        snprintf(buf, n, "at each unit's make-up strength");
}

int lt_retained(int k)
{
    for (int v = 0; v < VS_COUNT; v++)
        if (vent_get(v)->retained && k-- == 0)
            return v;
    return -1;
}

int lt_items(const struct lt_col *c)
{
    int n = 0;
    switch (c->each) {
    case LT_ONE: return 1;
    case LT_EACH_VENT: return VS_COUNT;
    case LT_EACH_SALT: return SALT_COUNT;
    case LT_EACH_CHARGED: return RG_CHARGEABLE;
    case LT_EACH_OTHER_BASE: return RG_COUNT - RG_CHARGEABLE - 1;
    case LT_EACH_RETAINED:
        while (lt_retained(n) >= 0)
            n++;
        return n;
    case LT_EACH_ELEMENT: return BAL_NEL;
    }
    return 1;
}

/* Name of member k of a family. */
static const char *member(enum lt_each each, int k)
{
    if (each == LT_EACH_ELEMENT) {
        const char *sym = elem_symbol(bal_elements[k]);
        return sym ? sym : "?";
    }
    if (each == LT_EACH_CHARGED || each == LT_EACH_OTHER_BASE)
        return lt_item_name(each == LT_EACH_CHARGED ? k : RG_CHARGEABLE + 1 + k);
    const char *n = each == LT_EACH_SALT ? liquor_salt_get(k)->name
                    : vent_name(each == LT_EACH_RETAINED ? lt_retained(k) : k);
    return n ? n : "gas";
}

/* fmt with its one %s replaced by s, into buf. */
static void put_in(const char *fmt, const char *s, char *buf, size_t n)
{
    /* by hand, not snprintf: the JSON writer makes a family's key for every value it writes */
    const char *at = strstr(fmt, "%s");
    size_t a = at ? (size_t)(at - fmt) : strlen(fmt), b = at ? strlen(s) : 0;
    const char *rest = at ? at + 2 : "";
    size_t c = strlen(rest), o = 0;
    if (n == 0)
        return;
    for (size_t k = 0; k < a && o + 1 < n; k++)
        buf[o++] = fmt[k];
    for (size_t k = 0; k < b && o + 1 < n; k++)
        buf[o++] = s[k];
    for (size_t k = 0; k < c && o + 1 < n; k++)
        buf[o++] = rest[k];
    buf[o] = '\0';
}

void lt_head(const struct lt_col *c, int item, const struct ledger *l, char *buf, size_t n)
{
    char basis[48];
    if (c->each != LT_ONE) {
        put_in(c->head ? c->head : "", member(c->each, item), buf, n);
    } else if (c->flags & LT_CAUSTIC) {
        lt_caustic_basis(l, basis, sizeof basis);
        put_in(c->head, basis, buf, n);
    } else {
        snprintf(buf, n, "%s", c->head ? c->head : "");
    }
}

void lt_key(const struct lt_col *c, int item, char *buf, size_t n)
{
    if (c->each != LT_ONE)
        put_in(c->key ? c->key : "", member(c->each, item), buf, n);
    else
        snprintf(buf, n, "%s", c->key ? c->key : "");
}

/* The entry whose row row j of record i of form t is (its LT_ROW entries one row each, a
 * sub-table entry a row per row of it, in list order), with *sj the sub-table's row; -1
 * past the last. */
static int form_row(const struct lt_table *t, const struct ledger *l, int i, int j, int *sj)
{
    for (int c = 0; c < t->ncols; c++) {
        const struct lt_col *e = &t->cols[c];
        int n = e->sub && e->key ? (e->sub->nsub ? e->sub->nsub(l, i) : 1)
                                 : (e->flags & LT_ROW) != 0;
        if (j < n) {
            *sj = j;
            return c;
        }
        j -= n;
    }
    return -1;
}

int lt_form_rows(const struct lt_table *t, const struct ledger *l, int i)
{
    int sj, n = 0;
    while (form_row(t, l, i, n, &sj) >= 0)
        n++;
    return n;
}

/* Form column c of t on row j of record i: see LT_FORM. */
static void form_cell(const struct lt_table *t, int c, const struct ledger *l, int i, int j,
                      struct lt_val *v)
{
    int sj = 0, r = form_row(t, l, i, j, &sj);
    const struct lt_col *col = &t->cols[c], *e = r >= 0 ? &t->cols[r] : NULL;
    v->t = LT_V_ABSENT;
    if (e && e->sub) {
        for (int k = 0; k < e->sub->ncols; k++)
            if (e->sub->cols[k].head && col->head && !strcmp(e->sub->cols[k].head, col->head)) {
                lt_get(e->sub, k, 0, l, i, sj, v);
                return;
            }
    } else if (e && (col->flags & LT_NAME)) {
        v->t = LT_V_TEXT;
        v->text = e->head;
    } else if (e && (col->flags & LT_VALUE)) {
        lt_get(t, r, 0, l, i, j, v);
    }
}

void lt_get(const struct lt_table *t, int c, int item, const struct ledger *l, int i, int j,
            struct lt_val *v)
{
    const struct lt_col *col = &t->cols[c];
    v->t = LT_V_NULL;
    v->text = NULL;
    v->style = LT_S_COL;
    v->shown = NULL;
    v->runs = NULL;
    v->nruns = 0;
    v->item = item;
    if (col->get) {
        col->get(l, i, j, v);
        return;
    }
    if (col->flags & LT_FORM) {
        form_cell(t, c, l, i, j, v);
        return;
    }
    const char *base = (const char *)t->rec(l, i, j) + col->off;
    v->t = LT_V_NUM;
    if (col->flags & LT_IFIELD) {
        int x;
        memcpy(&x, base + (size_t)item * sizeof x, sizeof x);
        v->num = x;
    } else {
        memcpy(&v->num, base + (size_t)item * sizeof v->num, sizeof v->num);
    }
}

int lt_sheet_order(const struct lt_table *t, int *at, int *item, int max)
{
    int n = 0, p = 0;
    for (int c = 0; c < t->ncols; c++)
        n += t->cols[c].head && !(t->cols[c].flags & LT_ROW) ? lt_items(&t->cols[c]) : 0;
    if (n > max)
        return -1;
    for (int k = 0; k < n; k++)
        at[k] = -1;
    for (int c = 0; c < t->ncols; c++) {
        if (!t->cols[c].head || (t->cols[c].flags & LT_ROW))
            continue;
        p = t->cols[c].col > 0 ? t->cols[c].col - 1 : p;
        for (int m = 0; m < lt_items(&t->cols[c]); m++, p++) {
            if (p >= n || at[p] >= 0)
                return -1;
            at[p] = c;
            item[p] = m;
        }
    }
    return n;
}

int lt_nrows(const struct lt_table *t, const struct ledger *l)
{
    int n = t->count(l);
    if (!t->nsub)
        return n;
    int rows = 0;
    for (int i = 0; i < n; i++)
        rows += t->nsub(l, i);
    return rows;
}

/* A getter: value of record i, row j of its table (ltable.h lt_get_fn). */
#define GET(name) static void name(const struct ledger *l, int i, int j, struct lt_val *v)
/* One of record i alone (the row j does not matter): one statement. */
#define GET1(name, stmt) GET(name) { (void)j; stmt; }

static void text(struct lt_val *v, const char *s)
{
    v->t = s ? LT_V_TEXT : LT_V_NULL;
    v->text = s;
}

static void num(struct lt_val *v, double x)
{
    v->t = LT_V_NUM;
    v->num = x;
}

static void date(struct lt_val *v, int64_t min)
{
    v->t = LT_V_DATE;
    v->min = min;
}

static void flag(struct lt_val *v, int on)
{
    v->t = LT_V_BOOL;
    v->on = on;
}

static void runs(struct lt_val *v, const int *r, int n)
{
    v->t = LT_V_RUNS;
    v->runs = r;
    v->nruns = n;
}

/* --- orders[] / Orders --------------------------------------------------- */

static int ord_count(const struct ledger *l) { return l->norders; }
static const void *ord_rec(const struct ledger *l, int i, int j)
{
    (void)j;
    return &l->orders[i];
}
#define ORD(i) (&l->orders[i])

GET(ord_month)
{
    (void)j;
    isodate_month_text(ORD(i)->month_index, v->buf, sizeof v->buf);
    text(v, v->buf);
}
GET1(ord_item, text(v, lt_item_name(ORD(i)->item)))
GET1(ord_container, text(v, ORD(i)->container))
GET1(ord_first_use, date(v, ORD(i)->first_use_min))
/* date only, truncated: ordering on that day is never later than required */
GET1(ord_order_by, date(v, ORD(i)->order_by_min))
GET1(ord_late, flag(v, ORD(i)->late))
GET1(ord_no_container, flag(v, ORD(i)->no_container))

/* gas fed from containers: the most on line at once, which can exceed those consumed */
GET(ord_peak)
{
    (void)j;
    if (ORD(i)->peak_on_line > 0)
        num(v, ORD(i)->peak_on_line);
    else
        v->t = LT_V_ABSENT; /* not a gas fed from containers */
}

GET(ord_peak_at)
{
    (void)j;
    if (ORD(i)->peak_on_line > 0)
        date(v, ORD(i)->peak_on_line_min);
    else
        v->t = LT_V_ABSENT;
}

/* caustic is bought as solution: its strength (null when the units buy unlike ones, warned) */
GET(ord_naoh_wt)
{
    (void)j;
    if (ORD(i)->item != RG_NAOH)
        v->t = LT_V_ABSENT;
    else if (l->caustic_order_wt_pct > 0)
        num(v, l->caustic_order_wt_pct);
}

/* the kg of a caustic line are solution as bought, not NaOH as 100 % */
GET(ord_note)
{
    (void)j;
    const struct ord_line *d = ORD(i);
    enum { NOTE = 160 };
    v->buf[0] = '\0';
    if (d->item == RG_NAOH) {
        char basis[48];
        lt_caustic_basis(l, basis, sizeof basis);
        snprintf(v->buf, NOTE, "kg of caustic solution bought, %s%s", basis,
                 d->no_container ? "; " : "");
    }
    if (d->no_container)
        snprintf(v->buf + strlen(v->buf), NOTE - strlen(v->buf),
                 "no container defined for this item");
    text(v, v->buf);
}

#define OL(f) OFF(struct ord_line, f)
/* no totals row: the lines mix reagents and caustic, whose sum means nothing */
static const struct lt_col ord_cols[] = {
    {"month", "Month", LT_TEXT, .get = ord_month},
    {"reagent", "Item", LT_TEXT, .get = ord_item},
    {"demand_kg", "Demand [kg]", LT_KG, .off = OL(demand_kg)},
    {"stock_start_kg", "Stock at month start [kg]", LT_KG, .off = OL(stock_start_kg)},
    {"safety_kg", "Safety stock [kg]", LT_KG, .col = 7, .off = OL(safety_kg)},
    {"to_order_kg", "To order [kg]", LT_KG, .off = OL(to_order_kg)},
    {"container", "Container", LT_TEXT, .get = ord_container, .none = "(none defined)"},
    {"net_kg", "Container net [kg]", LT_KG, .off = OL(net_kg)},
    {"heel_kg", "Heel left in container [kg]", LT_KG, .off = OL(heel_kg)},
    {"containers", "Containers [count]", LT_INT, .flags = LT_IFIELD, .off = OL(containers)},
    {"ordered_usable_kg", "Usable content ordered [kg]", LT_KG, .col = 15,
     .off = OL(ordered_usable_kg)},
    {"stock_end_kg", "Stock at month end [kg]", LT_KG, .off = OL(stock_end_kg)},
    {"first_use", "First use (plant time)", LT_DATE, .get = ord_first_use},
    {"order_by", "Order by (date)", LT_DAY, .get = ord_order_by},
    {"late", "Late", LT_TEXT, .flags = LT_ALARM, .get = ord_late, .raised = "LATE"},
    {"no_container", NULL, LT_TEXT, .get = ord_no_container},
    {"on_order_kg", "Placed orders due this month [kg]", LT_KG, .col = 6, .off = OL(on_order_kg)},
    {"received_kg", "Received this month [kg]", LT_KG, .col = 5, .off = OL(received_kg)},
    {"containers_on_line_peak", "Containers on line, busiest moment [count]", LT_INT, .col = 13,
     .get = ord_peak},
    {"containers_on_line_peak_at", "Busiest moment (plant time)", LT_DATE, .get = ord_peak_at},
    {"naoh_wt_pct", NULL, LT_PCT, .get = ord_naoh_wt},
    {NULL, "Note", LT_TEXT, .col = 20, .get = ord_note},
};

const struct lt_table lt_orders = {.key = "orders", .path = "orders",
    .sheet = "Orders", .cols = ord_cols, .ncols = NCOLS(ord_cols),
    .count = ord_count, .rec = ord_rec};

/* --- stock_checks[] / Stock checks --------------------------------------- */

static int chk_count(const struct ledger *l) { return l->nstock_checks; }
static const void *chk_rec(const struct ledger *l, int i, int j)
{
    (void)j;
    return &l->stock_checks[i];
}
#define CHK(i) (&l->stock_checks[i])

GET1(chk_reagent, text(v, lt_item_name(CHK(i)->reagent)))
GET1(chk_date, date(v, CHK(i)->date_min))
/* null: the book starts at the start of the campaign */
GET(chk_since)
{
    (void)j;
    if (CHK(i)->has_since)
        date(v, CHK(i)->since_min);
}
GET(chk_pct)
{
    (void)j;
    if (CHK(i)->pct_defined)
        num(v, CHK(i)->unexplained_pct);
}
/* a toxic gas missing may have leaked */
GET(chk_flagged)
{
    (void)j;
    const struct ledger_stock_check *c = CHK(i);
    flag(v, c->flagged);
    int leak = c->flagged && c->unexplained_kg > 0 && reagent_get(c->reagent)->toxic_gas;
    v->text = leak ? "CHECK FOR LEAK" : "OUTSIDE TOLERANCE";
}

#define SC(f) OFF(struct ledger_stock_check, f)
static const struct lt_col chk_cols[] = {
    {"reagent", "Reagent", LT_TEXT, .get = chk_reagent},
    {"date", "Count (plant time)", LT_DATE, .get = chk_date},
    {"since", "Book since (plant time)", LT_DATE, .get = chk_since, .none = "campaign start"},
    {"start_kg", "Stock at book start [kg]", LT_KG, .off = SC(start_kg)},
    {"received_kg", "Received [kg]", LT_KG, .off = SC(received_kg)},
    {"drawn_kg", "Drawn by runs [kg]", LT_KG, .off = SC(drawn_kg)},
    {"book_kg", "Book stock [kg]", LT_KG, .off = SC(book_kg)},
    {"counted_kg", "Counted [kg]", LT_KG, .off = SC(counted_kg)},
    {"unexplained_kg", "Unexplained [kg]", LT_KG, .off = SC(unexplained_kg)},
    {"unexplained_pct", "Unexplained [% of drawn]", LT_PCT1, .get = chk_pct},
    {"flagged", "Outside tolerance", LT_TEXT, .flags = LT_ALARM, .get = chk_flagged},
};

const struct lt_table lt_stock_checks = {.key = "stock_checks", .path = "stock_checks",
    .sheet = "Stock checks", .cols = chk_cols, .ncols = NCOLS(chk_cols),
    .count = chk_count, .rec = chk_rec};

/* --- permit_checks[] / Permit checks ------------------------------------- */

static int pc_count(const struct ledger *l) { return l->npermit_checks; }
static const void *pc_rec(const struct ledger *l, int i, int j)
{
    (void)j;
    return &l->permit_checks[i];
}
#define PC(i) (&l->permit_checks[i])

GET1(pc_scrubber, text(v, l->scrubbers[PC(i)->unit].id))
GET1(pc_species, text(v, vent_get(PC(i)->species)->name))
GET1(pc_unit, text(v, emis_limit_unit(PC(i)->kind)))
GET1(pc_averaging,
     text(v, PC(i)->kind == EMIS_T_YR ? "year" : PC(i)->averaging_day ? "day" : "hour"))
GET(pc_averaging_words)
{
    (void)j;
    text(v, PC(i)->kind == EMIS_T_YR ? "calendar year" : PC(i)->averaging_day ? "calendar-day mean"
                                                                            : "clock hour");
}
/* null: a mg/Nm3 limit without a stack flow */
GET(pc_value)
{
    (void)j;
    if (PC(i)->has_value)
        num(v, PC(i)->value);
}

/* The sheet's limit and worst value of one kind, in that kind's pair of columns. */
static void pc_kind(const struct emis_check *x, int kind, int worst, struct lt_val *v)
{
    if (x->kind != kind)
        v->t = LT_V_ABSENT;
    else if (!worst)
        num(v, x->limit);
    else if (x->has_value)
        num(v, x->value);
    else
        v->text = "no stack flow";
}
GET1(pc_lim_kg, pc_kind(PC(i), EMIS_KG_H, 0, v))
GET1(pc_val_kg, pc_kind(PC(i), EMIS_KG_H, 1, v))
GET1(pc_lim_mg, pc_kind(PC(i), EMIS_MG_NM3, 0, v))
GET1(pc_val_mg, pc_kind(PC(i), EMIS_MG_NM3, 1, v))
GET1(pc_lim_t, pc_kind(PC(i), EMIS_T_YR, 0, v))
GET1(pc_val_t, pc_kind(PC(i), EMIS_T_YR, 1, v))

/* "2027-03-02T07:00", "2027-03-02" or "2027"; null when nothing leaves */
GET(pc_at)
{
    (void)j;
    const struct emis_check *x = PC(i);
    if (!x->has_at)
        return;
    if (x->kind == EMIS_T_YR)
        snprintf(v->buf, sizeof v->buf, "%04d", x->at_year);
    else
        isodate_format(x->at_min, x->averaging_day, v->buf, sizeof v->buf);
    text(v, v->buf);
}
GET(pc_share)
{
    (void)j;
    if (PC(i)->has_value)
        num(v, PC(i)->value / PC(i)->limit);
    else
        v->t = LT_V_ABSENT;
}
GET(pc_margin)
{
    (void)j;
    if (PC(i)->has_value)
        num(v, (PC(i)->limit - PC(i)->value) / PC(i)->limit);
    else
        v->t = LT_V_ABSENT;
}
/* null: not checkable (mg/Nm3 without a stack flow) */
GET(pc_exceeded)
{
    (void)j;
    if (PC(i)->has_value)
        flag(v, PC(i)->exceeded);
}
GET1(pc_runs, runs(v, PC(i)->runs, PC(i)->nruns))

static const struct lt_col pc_cols[] = {
    {"scrubber", "Scrubber", LT_TEXT, .get = pc_scrubber},
    {"species", "Species", LT_TEXT, .get = pc_species},
    {"limit", NULL, LT_GEN, .off = OFF(struct emis_check, limit)},
    {"unit", NULL, LT_TEXT, .get = pc_unit},
    {"averaging", NULL, LT_TEXT, .get = pc_averaging},
    {"value", NULL, LT_GEN, .get = pc_value},
    {NULL, "Averaging", LT_TEXT, .get = pc_averaging_words},
    {NULL, "Permit limit [kg/h]", LT_GEN, .get = pc_lim_kg},
    {NULL, "Worst estimate [kg/h]", LT_GEN, .get = pc_val_kg},
    {NULL, "Permit limit [mg/Nm3]", LT_GEN, .get = pc_lim_mg},
    {NULL, "Worst estimate [mg/Nm3]", LT_GEN, .get = pc_val_mg},
    {NULL, "Permit limit [t/yr]", LT_GEN, .get = pc_lim_t},
    {NULL, "Worst estimate [t/yr]", LT_GEN, .get = pc_val_t},
    {"at", "When (hour, day or year)", LT_TEXT, .get = pc_at, .none = "nothing leaves"},
    {NULL, "Worst as share of the limit [%]", LT_FRAC, .get = pc_share},
    {NULL, "Margin left [% of the limit]", LT_FRAC, .get = pc_margin},
    {"exceeded", "Limit exceeded", LT_TEXT, .flags = LT_ALARM, .get = pc_exceeded,
     .raised = "EXCEEDED", .none = "! not checkable"},
    {"runs", "Runs emitting then", LT_TEXT, .get = pc_runs, .width = 62, .cap = 1000},
};

const struct lt_table lt_permit_checks = {.key = "permit_checks", .path = "permit_checks",
    .sheet = "Permit checks", .cols = pc_cols, .ncols = NCOLS(pc_cols),
    .count = pc_count, .rec = pc_rec};

/* --- scrubbers[] / Scrubber units ---------------------------------------- */

static int su_count(const struct ledger *l) { return l->nscrubbers; }
static const void *su_rec(const struct ledger *l, int i, int j)
{
    (void)j;
    return &l->scrubbers[i];
}
#define SU(i) (&l->scrubbers[i])
#define SUO(i) (&l->scrubbers[i].out)

GET1(su_id, text(v, SU(i)->id))
GET(su_peak_at)
{
    (void)j;
    if (SUO(i)->nhours > 0)
        date(v, SUO(i)->peak_at_min);
}
GET1(su_overloaded, flag(v, SUO(i)->overloaded))
GET(su_strength)
{
    (void)j;
    if (SU(i)->makeup_naoh_wt_pct > 0)
        num(v, SU(i)->makeup_naoh_wt_pct);
    else
        text(v, SU(i)->base < 0 ? "none (water liquor)" : "none (no NaOH in the liquor)");
}
/* the liquor's own base, whatever it is (the NaOH columns are NaOH's only); null: water */
GET1(su_base, text(v, SU(i)->base >= 0 ? lt_item_name(SU(i)->base) : NULL))
GET(su_base_strength)
{
    (void)j;
    if (SU(i)->base >= 0)
        num(v, SU(i)->makeup_base_wt_pct);
    else
        text(v, "none (water liquor)");
}
GET1(su_peak_runs, runs(v, SUO(i)->peak_runs, SUO(i)->npeak_runs))
GET(su_instant_at)
{
    (void)j;
    if (SUO(i)->npeak_instant_runs > 0)
        date(v, SUO(i)->peak_instant_at_min);
}
GET1(su_instant_runs, runs(v, SUO(i)->peak_instant_runs, SUO(i)->npeak_instant_runs))
GET(su_heat_at)
{
    (void)j;
    if (SUO(i)->npeak_heat_runs > 0)
        date(v, SUO(i)->peak_heat_at_min);
}
GET1(su_heat_runs, runs(v, SUO(i)->peak_heat_runs, SUO(i)->npeak_heat_runs))

/* --- scrubbers[].hourly.kmol_h / Hourly load (one row per unit and hour) ---- */

static int hr_nsub(const struct ledger *l, int i) { return SUO(i)->nhours; }
GET(hr_start) { date(v, SUO(i)->hour0_min + 60 * (int64_t)j); }
GET(hr_load) { num(v, scrub_hourly_kmol_h(SUO(i), j)); }

static const struct lt_col hr_cols[] = {
    {NULL, "Scrubber", LT_TEXT, .get = su_id},
    {NULL, "Hour start (plant time)", LT_DATE, .get = hr_start},
    {"kmol_h", "Vent gas load, mean over the hour [kmol/h]", LT_RATE, .get = hr_load},
    {NULL, "Rated capacity [kmol/h]", LT_RATE, .off = OFF(struct ledger_scrubber, rated_acid_kmol_h)},
};

const struct lt_table lt_scrubber_hourly = {.key = "kmol_h", .path = "scrubbers[].hourly.kmol_h",
    .sheet = "Hourly load", .cols = hr_cols, .ncols = NCOLS(hr_cols), .count = su_count,
    .nsub = hr_nsub, .rec = su_rec, .bare = 1};

/* --- scrubbers[]: the stack (what leaves it, emissions.h) ------------------ */

#define EU(i) (&l->emis[i])
#define ES(i) (&l->emis[i].sp[v->item])
GET(su_hour0)
{
    (void)j;
    if (SUO(i)->nhours > 0)
        date(v, SUO(i)->hour0_min);
}
GET(su_stack)
{
    (void)j;
    if (l->emis && EU(i)->stack_nm3_h > 0) /* null: no concentrations */
        num(v, EU(i)->stack_nm3_h);
}
GET(se_open) /* a species' object; none without the emission checks */
{
    (void)j;
    (void)i;
    if (l->emis)
        flag(v, 1);
    else
        v->t = LT_V_ABSENT;
}
GET1(se_kg, num(v, ES(i)->kg))
GET1(se_peak, num(v, ES(i)->peak_kg_h))
GET(se_peak_at)
{
    (void)j;
    if (ES(i)->peak_kg_h > 0) /* null: nothing leaves */
        date(v, ES(i)->peak_at_min);
}
GET(se_mg)
{
    (void)j;
    if (EU(i)->stack_nm3_h > 0) /* null: no stack flow */
        num(v, ES(i)->peak_mg_nm3);
}
GET1(se_runs, runs(v, ES(i)->peak_runs, ES(i)->npeak_runs))
static int yr_nsub(const struct ledger *l, int i, int item) { return l->emis[i].sp[item].nyears; }
GET(yr_year) { num(v, ES(i)->years[j].year); }
GET(yr_t) { num(v, ES(i)->years[j].t); }

static const struct lt_col yr_cols[] = {
    {"year", NULL, LT_INT, .get = yr_year},
    {"t", NULL, LT_GEN, .get = yr_t},
};

/* JSON only: the calendar years with emission of a species */
static const struct lt_table lt_emis_years = {.key = "years",
    .path = "scrubbers[].emissions.SPECIES.years", .sheet = NULL, .cols = yr_cols,
    .ncols = NCOLS(yr_cols), .count = su_count, .nsub_item = yr_nsub};

#define SUF(f) OFF(struct ledger_scrubber, f)
/* The sheet's make-up strengths are text for a water liquor, so each is its own column. */
static const struct lt_col su_cols[] = {
    {"id", "Scrubber", LT_TEXT, .get = su_id},
    {"peak_acid_kmol_h", "Peak hourly mean load [kmol/h]", LT_RATE, .col = 3,
     .off = SUF(out.peak_acid_kmol_h)},
    {"peak_at", "Peak hour start (plant time)", LT_DATE, .get = su_peak_at},
    {"rated_acid_kmol_h", "Rated capacity [kmol/h]", LT_RATE, .col = 2,
     .off = SUF(rated_acid_kmol_h)},
    {"overloaded", "Overloaded (instantaneous peak over rating)", LT_TEXT, .flags = LT_ALARM,
     .col = 9, .get = su_overloaded, .raised = "OVER RATING"},
    {"changeouts", "Liquor changeouts [count]", LT_INT, .flags = LT_TOTAL | LT_IFIELD, .col = 13,
     .off = SUF(out.changeouts)},
    {"naoh_kg", "NaOH consumed, as 100 % [kg]", LT_KG, .flags = LT_TOTAL, .off = SUF(out.naoh_kg)},
    {"makeup_kg", "Base bought, all changeouts, as bought [kg]", LT_KG, .col = 27,
     .off = SUF(out.makeup_kg)},
    {"makeup_naoh_wt_pct", NULL, LT_PCT, .off = SUF(makeup_naoh_wt_pct)},
    {NULL, "Caustic make-up strength [wt% NaOH]", LT_PCT, .col = 15, .get = su_strength},
    {"caustic_solution_kg", "Caustic solution bought, %s [kg]", LT_KG,
     .flags = LT_TOTAL | LT_CAUSTIC, .col = 18, .off = SUF(caustic_solution_kg)},
    {"changeout_caustic_solution_kg",
     "Caustic solution bought per changeout, at make-up strength [kg]", LT_KG,
     .col = 16, .off = SUF(changeout_caustic_solution_kg)},
    {"changeout_water_kg", "Dilution water per changeout [kg]", LT_KG,
     .off = SUF(changeout_water_kg)},
    {"dilution_water_kg", "Dilution water, all changeouts [kg]", LT_KG, .flags = LT_TOTAL,
     .col = 19,
     .off = SUF(dilution_water_kg)},
    {"heat_kj", "Heat to liquor [kJ]", LT_HEAT, .flags = LT_TOTAL, .off = SUF(out.heat_kj)},
    {"peak_runs", "Runs in the peak hour", LT_TEXT, .col = 5, .get = su_peak_runs},
    {"peak_instant_kmol_h", "Peak instantaneous load [kmol/h]", LT_RATE,
     .off = SUF(out.peak_instant_kmol_h)},
    {"peak_instant_at", "Instantaneous peak from (plant time)", LT_DATE, .get = su_instant_at},
    {"peak_instant_runs", "Runs venting at the instantaneous peak", LT_TEXT,
     .get = su_instant_runs},
    /* the duty a liquor cooler would need: heat-release rates of the runs venting at once */
    {"peak_heat_kw", "Peak heat release [kW]", LT_KW, .col = 10, .off = SUF(out.peak_heat_kw)},
    {"peak_heat_at", "Heat release peak from (plant time)", LT_DATE, .get = su_heat_at},
    {"peak_heat_runs", "Runs venting at the heat release peak", LT_TEXT, .get = su_heat_runs},
    {"max_liquor_temp_c", "Hottest liquor, no cooling [°C]", LT_TEMP, .col = 21,
     .off = SUF(out.max_liquor_temp_c)},
    {"too_hot_runs", "Runs needing cooling [count]", LT_INT, .flags = LT_TOTAL | LT_IFIELD,
     .off = SUF(out.too_hot_runs)},
    {"boiling_runs", NULL, LT_INT, .flags = LT_IFIELD, .off = SUF(out.boiling_runs)},
    {"base", "Liquor base", LT_TEXT, .col = 23, .get = su_base, .none = "none (water liquor)"},
    {"base_kg", "Base consumed, as 100 % [kg]", LT_KG, .off = SUF(out.base_kg)},
    {"co2_kg", "CO2 given off by the liquor [kg]", LT_KG, .flags = LT_TOTAL, .col = 28,
     .off = SUF(out.co2_kg)},
    {"makeup_base_wt_pct", NULL, LT_PCT, .off = SUF(makeup_base_wt_pct)},
    {NULL, "Base make-up strength [wt%]", LT_PCT, .col = 25, .get = su_base_strength},
    {"changeout_makeup_kg", "Base bought per changeout, as bought [kg]", LT_KG,
     .off = SUF(changeout_makeup_kg)},
    {"hourly", NULL, LT_TEXT, .flags = LT_OPEN}, /* the load profile (Hourly load) */
    {"start", NULL, LT_DATE, .get = su_hour0},
    {"kmol_h", NULL, LT_TEXT, .sub = &lt_scrubber_hourly},
    {.flags = LT_CLOSE},
    {"spent", NULL, LT_TEXT, .sub = &lt_scrubber_spent},
    {.sub = &lt_scrubber_column}, /* column{} or null */
    {"stack_nm3_h", NULL, LT_GEN, .get = su_stack},
    {"removal", NULL, LT_TEXT, .flags = LT_OPEN}, /* the fractions in force */
    {"%s", NULL, LT_FRAC, .each = LT_EACH_VENT, .off = SUF(out.removal)},
    {.flags = LT_CLOSE},
    {"emissions", NULL, LT_TEXT, .flags = LT_OPEN}, /* what leaves the stack, per species */
    {"%s", NULL, LT_TEXT, .flags = LT_OPEN, .each = LT_EACH_VENT, .get = se_open},
    {"kg", NULL, LT_KG, .get = se_kg},
    {"peak_kg_h", NULL, LT_RATE, .get = se_peak},
    {"peak_at", NULL, LT_DATE, .get = se_peak_at},
    {"peak_mg_nm3", NULL, LT_GEN, .get = se_mg},
    {"years", NULL, LT_TEXT, .sub = &lt_emis_years},
    {"peak_runs", NULL, LT_TEXT, .get = se_runs},
    {.flags = LT_CLOSE},
    {.flags = LT_CLOSE},
};

const struct lt_table lt_scrubbers = {.key = "scrubbers", .path = "scrubbers",
    .sheet = "Scrubber units", .cols = su_cols, .ncols = NCOLS(su_cols),
    .count = su_count, .rec = su_rec};

/* --- scrubbers[].spent[] / Spent liquor (one row per spent charge) -------- */

static int sp_nsub(const struct ledger *l, int i) { return SUO(i)->nspent; }
static const void *sp_rec(const struct ledger *l, int i, int j)
{
    return &l->scrubbers[i].out.spent[j];
}
#define SP(i, j) (&l->scrubbers[i].out.spent[j])

GET(sp_at) { date(v, SP(i, j)->at_min); }
GET(sp_final) { flag(v, SP(i, j)->final); }
GET(sp_still) { text(v, SP(i, j)->final ? "yes (campaign end)" : "no"); }

#define SPF(f) OFF(struct scrub_spent, f)
/* each charge drained, and the one still in the unit at the campaign's end */
static const struct lt_col sp_cols[] = {
    {NULL, "Spent liquor from", LT_TEXT, .get = su_id},
    {"at", "Drained (plant time)", LT_DATE, .get = sp_at},
    {"final", NULL, LT_TEXT, .get = sp_final},
    {NULL, "Still in unit", LT_TEXT, .get = sp_still},
    {"mass_kg", "Liquor [kg]", LT_KG, .flags = LT_TOTAL, .off = SPF(mass_kg)},
    {"naoh_kg", "NaOH left, as 100 % [kg]", LT_KG, .flags = LT_TOTAL, .off = SPF(naoh_kg)},
    {"water_kg", "Water [kg]", LT_KG, .flags = LT_TOTAL, .off = SPF(water_kg)},
    {"hcl_kg", "HCl [kg]", LT_KG, .flags = LT_TOTAL, .off = SPF(hcl_kg)},
    {"hbr_kg", NULL, LT_KG, .off = SPF(hbr_kg)},
    {"salts_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", "%s [kg]", LT_KG, .flags = LT_TOTAL, .each = LT_EACH_SALT, .off = SPF(salt_kg)},
    {.flags = LT_CLOSE},
    {"base_kg", NULL, LT_KG, .off = SPF(base_kg)},
};

const struct lt_table lt_scrubber_spent = {.key = "spent", .path = "scrubbers[].spent",
    .sheet = "Spent liquor", .cols = sp_cols, .ncols = NCOLS(sp_cols), .count = su_count,
    .nsub = sp_nsub, .rec = sp_rec};

/* --- scrubbers[].column / Column check (the units with packing data) ----- */

static int cc_nsub(const struct ledger *l, int i) { return SUO(i)->column.present != 0; }
GET(cc_open) /* null: no packing data */
{
    (void)j;
    if (SUO(i)->column.present)
        flag(v, 1);
}
GET(cc_note)
{
    (void)l, (void)i, (void)j;
    text(v, "Screening check only; a final column design needs review by a licensed engineer.");
}

static const struct lt_col cc_cols[] = {
    {NULL, "Scrubber", LT_TEXT, .get = su_id},
    {"column", NULL, LT_TEXT, .flags = LT_OPEN, .get = cc_open},
    {"gas_kmol_h", "Gas flow at the instantaneous peak [kmol/h]", LT_RATE,
     .off = SUF(out.column.gas_kmol_h)},
    {"y_in", "Acid gas in [mol/mol]", LT_SCI, .off = SUF(out.column.y_in)},
    {"y_out", "Acid gas out [mol/mol]", LT_SCI, .off = SUF(out.column.y_out)},
    {"ntu", "Transfer units, NTU (dimensionless)", LT_PCT, .off = SUF(out.column.ntu)},
    {"height_m", "Packed height [m]", LT_LEN, .off = SUF(out.column.height_m)},
    {"diameter_m", "Diameter [m]", LT_LEN, .off = SUF(out.column.diameter_m)},
    {"flood_velocity_m_s", "Flooding velocity [m/s]", LT_LEN,
     .off = SUF(out.column.flood_velocity_m_s)},
    {"flow_parameter", "Flow parameter (dimensionless)", LT_RATE,
     .off = SUF(out.column.flow_parameter)},
    {"note", NULL, LT_TEXT, .get = cc_note},
    {.flags = LT_CLOSE},
};

const struct lt_table lt_scrubber_column = {.key = "scrubbers", .path = "scrubbers[column]",
    .sheet = "Column check", .cols = cc_cols, .ncols = NCOLS(cc_cols), .count = su_count,
    .nsub = cc_nsub, .rec = su_rec};

/* --- runs[].products[] / Products ---------------------------------------- */

static int pr_count(const struct ledger *l) { return l->nruns; }
static int pr_nsub(const struct ledger *l, int i) { return l->runs[i].bal.nproducts; }
static const void *pr_rec(const struct ledger *l, int i, int j)
{
    return &l->runs[i].bal.products[j];
}
#define PR(i, j) (&l->runs[i].bal.products[j])

GET1(pr_run, text(v, l->runs[i].id))
GET1(pr_reagent, text(v, lt_item_name(l->runs[i].reagent)))
/* the lumped row (ROLE_OTHER) has no structure; the sheet says what it sums, so that it does
 * not read as one substance (wrapped: it must not print over the next column) */
GET(pr_smiles)
{
    const struct ledger_product *p = PR(i, j);
    const struct ledger_run *r = &l->runs[i];
    if (p->role != ROLE_OTHER) {
        text(v, p->smiles); /* null: no unambiguous structure */
        return;
    }
    char label[96];
    ledger_other_label(p, label, sizeof label);
    snprintf(v->buf, sizeof v->buf, "%s: %d product%s summed, mean %.2f halogens added; "
             "molar mass is the mean", label, r->other_rows, r->other_rows == 1 ? "" : "s",
             r->other_mean_degree);
    v->t = LT_V_NULL;
    v->text = v->buf;
    v->style = LT_S_WRAP;
}
GET(pr_formula)
{
    text(v, PR(i, j)->role == ROLE_OTHER ? NULL : PR(i, j)->formula); /* a mixture */
}
GET(pr_role) { text(v, ledger_role_name(PR(i, j)->role)); }
/* the row summed below the reporting threshold: its mean degree, rows and label */
GET(pr_mean_degree)
{
    if (PR(i, j)->role == ROLE_OTHER)
        num(v, l->runs[i].other_mean_degree);
    else
        v->t = LT_V_ABSENT;
}
GET(pr_rows_summed)
{
    if (PR(i, j)->role == ROLE_OTHER)
        num(v, l->runs[i].other_rows);
    else
        v->t = LT_V_ABSENT;
}
GET(pr_label)
{
    if (PR(i, j)->role != ROLE_OTHER) {
        v->t = LT_V_ABSENT;
        return;
    }
    ledger_other_label(PR(i, j), v->buf, 64);
    text(v, v->buf);
}

#define PF(f) OFF(struct ledger_product, f)
/* no totals: the rows are different substances */
static const struct lt_col pr_cols[] = {
    {NULL, "Run", LT_TEXT, .get = pr_run},
    {NULL, "Reagent", LT_TEXT, .get = pr_reagent},
    /* a known width, so the lumped row's wrapped label gets the height it needs */
    {"smiles", "Structure (SMILES)", LT_TEXT, .get = pr_smiles, .width = 34},
    {"formula", "Formula", LT_TEXT, .get = pr_formula, .none = "(mixture)"},
    {"degree", "Halogens added [atoms/molecule]", LT_INT, .flags = LT_IFIELD, .off = PF(degree)},
    {"molar_mass_g_mol", "Molar mass [g/mol]", LT_GMOL, .col = 7, .off = PF(molar_mass_g_mol)},
    {"mol", "Amount [mol]", LT_MOL, .off = PF(mol)},
    {"kg", "Mass [kg]", LT_KG, .off = PF(kg)},
    {"mol_fraction", "Share of substrate charged [mol %]", LT_MOLFRAC, .off = PF(mol_fraction)},
    {"role", "Role", LT_TEXT, .col = 6, .get = pr_role},
    {"mean_degree", NULL, LT_MOL, .get = pr_mean_degree},
    {"rows_summed", NULL, LT_INT, .get = pr_rows_summed},
    {"label", NULL, LT_TEXT, .get = pr_label},
};

const struct lt_table lt_run_products = {.key = "products", .path = "runs[].products",
    .sheet = "Products", .cols = pr_cols, .ncols = NCOLS(pr_cols), .count = pr_count,
    .nsub = pr_nsub, .rec = pr_rec};

/* --- months[].products[] / Monthly yields (one row per month and route) --- */

static int mp_count(const struct ledger *l) { return l->nmonths; }
static int mp_nsub(const struct ledger *l, int i) { return l->months[i].nproducts; }
static const void *mp_rec(const struct ledger *l, int i, int j)
{
    return &l->months[i].products[j];
}
#define MP(i, j) (&l->months[i].products[j])

GET(mp_month)
{
    (void)j;
    isodate_month_text(l->months[i].month_index, v->buf, sizeof v->buf);
    text(v, v->buf);
}
GET(mp_substrate_name) { text(v, MP(i, j)->substrate_name); }
GET(mp_substrate) { text(v, MP(i, j)->substrate); }
GET(mp_reagent) { text(v, lt_item_name(MP(i, j)->reagent)); }
GET(mp_wanted) { text(v, MP(i, j)->wanted); }
GET(mp_wanted_formula) { text(v, MP(i, j)->wanted_formula); }
GET(mp_selectivity)
{
    if (MP(i, j)->selectivity_defined) /* null: nothing converted */
        num(v, MP(i, j)->selectivity_pct);
}

#define MPF(f) OFF(struct ledger_month_product, f)
/* no totals: every row is another route */
static const struct lt_col mp_cols[] = {
    {NULL, "Month", LT_TEXT, .get = mp_month},
    {"substrate_name", "Substrate", LT_TEXT, .get = mp_substrate_name},
    {"substrate", "Substrate (SMILES or formula)", LT_TEXT, .get = mp_substrate, .width = 24},
    {"reagent", "Reagent", LT_TEXT, .get = mp_reagent},
    {"wanted", "Wanted product (SMILES or formula)", LT_TEXT, .get = mp_wanted, .width = 24},
    {"wanted_formula", "Wanted product (formula)", LT_TEXT, .get = mp_wanted_formula},
    {"runs", "Runs [count]", LT_INT, .flags = LT_IFIELD, .off = MPF(runs)},
    {"substrate_kg", "Substrate charged [kg]", LT_KG, .off = MPF(substrate_kg)},
    {"substrate_mol", "Substrate charged [mol]", LT_MOL, .off = MPF(substrate_mol)},
    {"converted_mol", "Substrate converted [mol]", LT_MOL, .off = MPF(converted_mol)},
    {"wanted_mol", "Wanted product [mol]", LT_MOL, .off = MPF(wanted_mol)},
    {"wanted_kg", "Wanted product [kg]", LT_KG, .off = MPF(wanted_kg)},
    {"halogen_charged_mol", "Halogen atoms charged [mol]", LT_MOL, .off = MPF(halogen_charged_mol)},
    {"halogen_in_wanted_mol", "Halogen atoms in wanted product [mol]", LT_MOL,
     .off = MPF(halogen_in_wanted_mol)},
    {"yield_pct", "Yield [%]", LT_PCT1, .off = MPF(yield_pct)},
    {"conversion_pct", "Substrate conversion [%]", LT_PCT1, .off = MPF(conversion_pct)},
    {"selectivity_pct", "Selectivity to wanted product [%]", LT_PCT1, .get = mp_selectivity},
    {"halogen_efficiency_pct", "Halogen efficiency [%]", LT_PCT1,
     .off = MPF(halogen_efficiency_pct)},
};

const struct lt_table lt_month_products = {.key = "products", .path = "months[].products",
    .sheet = "Monthly yields", .cols = mp_cols, .ncols = NCOLS(mp_cols), .count = mp_count,
    .nsub = mp_nsub, .rec = mp_rec};

/* --- months[] / Monthly (one row per month) ------------------------------ */

GET1(mo_closed, flag(v, l->months[i].close.closed))

#define MOF(f) OFF(struct ledger_month, f)
/* Sheet columns: Month, Runs, the reagents, the vent gases, then the NaOH and waste. */
#define MO_VENT_END (2 + RG_COUNT + VS_COUNT)
static const struct lt_col mo_cols[] = {
    {"month", "Month", LT_TEXT, .get = mp_month},
    {"runs", "Runs [count]", LT_INT, .flags = LT_TOTAL | LT_IFIELD, .off = MOF(runs)},
    {"product_kg", NULL, LT_KG, .off = MOF(product_kg)},
    {"isomer_kg", NULL, LT_KG, .off = MOF(isomer_kg)},
    {"overhalogenated_kg", NULL, LT_KG, .off = MOF(overhal_kg)},
    {"unreacted_substrate_kg", NULL, LT_KG, .off = MOF(unreacted_substrate_kg)},
    /* charged; a scrubber base: its make-up bought */
    {"reagents_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", "%s charged [kg]", LT_KG, .flags = LT_TOTAL, .each = LT_EACH_CHARGED,
     .off = MOF(reagents_kg)},
    {"NaOH", "Caustic solution bought, %s [kg]", LT_KG, .flags = LT_TOTAL | LT_CAUSTIC,
     .off = MOF(reagents_kg[RG_NAOH])},
    {"%s", "%s make-up bought, as bought [kg]", LT_KG, .flags = LT_TOTAL,
     .each = LT_EACH_OTHER_BASE, .off = MOF(reagents_kg[RG_NAOH + 1])},
    {.flags = LT_CLOSE},
    {"vent_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", "%s to scrubber [kg]", LT_KG, .flags = LT_TOTAL, .each = LT_EACH_VENT,
     .off = MOF(vent_kg)},
    {.flags = LT_CLOSE},
    {"naoh_kg", "NaOH consumed, as 100 % [kg]", LT_KG, .flags = LT_TOTAL, .off = MOF(naoh_kg)},
    {"changeouts", "Liquor changeouts [count]", LT_INT, .flags = LT_TOTAL | LT_IFIELD,
     .col = MO_VENT_END + 4, .off = MOF(changeouts)},
    {"waste_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"spent_liquor", "Spent liquor [kg]", LT_KG, .flags = LT_TOTAL, .off = MOF(spent_liquor_kg)},
    {"succinimide", "Succinimide [kg]", LT_KG, .flags = LT_TOTAL, .off = MOF(succinimide_kg)},
    {"reagent_left", NULL, LT_KG, .off = MOF(reagent_left_kg)},
    {"retained_acid", NULL, LT_KG, .off = MOF(retained_acid_kg)},
    {.flags = LT_CLOSE},
    {"caustic_solution_kg", NULL, LT_KG, .off = MOF(caustic_solution_kg)},
    /* both bases where both matter: NaOH the gas consumed and NaOH in the solution bought */
    {"caustic_solution_naoh_kg", "NaOH in the caustic bought, as 100 % [kg]", LT_KG,
     .flags = LT_TOTAL, .col = MO_VENT_END + 2, .off = MOF(caustic_solution_naoh_kg)},
    {"dilution_water_kg", "Dilution water for fresh charges [kg]", LT_KG, .flags = LT_TOTAL,
     .off = MOF(dilution_water_kg)},
    {"base_kg", NULL, LT_TEXT, .flags = LT_OPEN}, /* each scrubber base consumed, as 100 % */
    {"NaOH", NULL, LT_KG, .off = MOF(base_kg[RG_NAOH])},
    {"%s", "%s consumed, as 100 % [kg]", LT_KG, .flags = LT_TOTAL, .col = MO_VENT_END + 7,
     .each = LT_EACH_OTHER_BASE, .off = MOF(base_kg[RG_NAOH + 1])},
    {.flags = LT_CLOSE},
    {"co2_kg", "CO2 given off by the liquors [kg]", LT_KG, .flags = LT_TOTAL, .off = MOF(co2_kg)},
    {"products", NULL, LT_TEXT, .sub = &lt_month_products},
    {"close", NULL, LT_TEXT, .flags = LT_OPEN},
    {"runs_done", NULL, LT_INT, .flags = LT_IFIELD, .off = MOF(close.done)},
    {"runs_cancelled", NULL, LT_INT, .flags = LT_IFIELD, .off = MOF(close.cancelled)},
    {"runs_planned", NULL, LT_INT, .flags = LT_IFIELD, .off = MOF(close.planned)},
    {"closed", NULL, LT_TEXT, .get = mo_closed},
    {"reagent_plan_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", NULL, LT_KG, .each = LT_EACH_CHARGED, .off = MOF(close.reagent_plan_kg)},
    {.flags = LT_CLOSE},
    {"reagent_actual_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", NULL, LT_KG, .each = LT_EACH_CHARGED, .off = MOF(close.reagent_actual_kg)},
    {.flags = LT_CLOSE},
    {"product_plan_kg", NULL, LT_KG, .off = MOF(close.product_plan_kg)},
    {"product_actual_kg", NULL, LT_KG, .off = MOF(close.product_actual_kg)},
    {"naoh_plan_kg", NULL, LT_KG, .off = MOF(close.naoh_plan_kg)},
    {"naoh_actual_kg", NULL, LT_KG, .off = MOF(close.naoh_actual_kg)},
    {"unexplained_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", NULL, LT_KG, .each = LT_EACH_CHARGED, .off = MOF(close.unexplained_kg)},
    {.flags = LT_CLOSE},
    {.flags = LT_CLOSE},
};

static const void *mo_rec(const struct ledger *l, int i, int j)
{
    (void)j;
    return &l->months[i];
}

const struct lt_table lt_months = {.key = "months", .path = "months", .sheet = "Monthly",
    .cols = mo_cols, .ncols = NCOLS(mo_cols), .count = mp_count, .rec = mo_rec};

/* --- the columns of a run on several sheets ------------------------------ */

static int run_count(const struct ledger *l) { return l->nruns; }
static const void *run_rec(const struct ledger *l, int i, int j)
{
    (void)j;
    return &l->runs[i];
}
#define RUN(i) (&l->runs[i])
#define RF(f) OFF(struct ledger_run, f)

GET1(run_id, text(v, RUN(i)->id))
GET1(run_start, date(v, RUN(i)->start_min))
GET1(run_reagent, text(v, lt_item_name(RUN(i)->reagent)))
GET1(run_substrate, text(v, RUN(i)->substrate_name))

/* --- runs[].actual, runs[].variance / Plan vs actual ---------------------- */

static int pa_nsub(const struct ledger *l, int i)
{
    return RUN(i)->actual.status != LEDGER_PLANNED;
}
#define ACT(i) (&l->runs[i].actual)
#define VAR(i) (l->runs[i].var)

GET(pa_actual) /* null while planned */
{
    (void)j;
    if (ACT(i)->status != LEDGER_PLANNED)
        flag(v, 1);
}
GET1(pa_status, text(v, ACT(i)->status == LEDGER_DONE ? "done" : "cancelled"))
static void given(const struct ledger_actual *a, unsigned bit, double x, struct lt_val *v)
{
    if (a->given & bit)
        num(v, x);
}
GET1(pa_reagent_kg, given(ACT(i), LEDGER_ACT_REAGENT, ACT(i)->reagent_kg, v))
GET1(pa_product_kg, given(ACT(i), LEDGER_ACT_PRODUCT, ACT(i)->product_kg, v))
GET1(pa_naoh_kg, given(ACT(i), LEDGER_ACT_NAOH, ACT(i)->naoh_kg, v))
GET(pa_end)
{
    (void)j;
    if (ACT(i)->given & LEDGER_ACT_END)
        date(v, ACT(i)->end_min);
}
GET(pa_variance) /* done runs only (a cancelled run keeps the plan side for the sheet) */
{
    (void)j;
    if (ACT(i)->status == LEDGER_DONE)
        flag(v, 1);
}
/* the book's draw: weighed, else the plan; cancelled 0 */
GET1(pa_drawn, num(v, RUN(i)->bal.reagent_kg))
static void known(int has, double x, struct lt_val *v)
{
    if (has)
        num(v, x);
}
GET1(pa_reagent_plan, num(v, VAR(i)->reagent_kg_plan))
GET1(pa_reagent_var, known(VAR(i)->has_reagent, VAR(i)->reagent_kg, v))
GET1(pa_reagent_pct, known(VAR(i)->has_reagent, VAR(i)->reagent_pct, v))
GET1(pa_product_plan, num(v, VAR(i)->product_kg_plan))
GET1(pa_product_var, known(VAR(i)->has_product, VAR(i)->product_kg, v))
GET1(pa_product_pct,
     known(VAR(i)->has_product && VAR(i)->product_kg_plan > 0, VAR(i)->product_pct, v))
GET1(pa_yield_plan, num(v, VAR(i)->yield_pct_plan))
GET1(pa_yield_actual, known(VAR(i)->has_product, VAR(i)->yield_pct_actual, v))
GET1(pa_naoh_plan, num(v, VAR(i)->naoh_kg_plan))
GET1(pa_naoh_var, known(VAR(i)->has_naoh, VAR(i)->naoh_kg, v))
GET1(pa_naoh_pct, known(VAR(i)->has_naoh && VAR(i)->naoh_pct_defined, VAR(i)->naoh_pct, v))
GET1(pa_flagged, flag(v, ACT(i)->status == LEDGER_DONE && VAR(i)->flagged))

/* JSON: the two objects of a run; sheet: the runs with an actual. No totals: the rows mix
 * reagents. */
static const struct lt_col pa_cols[] = {
    {NULL, "Run", LT_TEXT, .get = run_id},
    {NULL, "Start (plant time)", LT_DATE, .get = run_start},
    {"actual", NULL, LT_TEXT, .flags = LT_OPEN, .get = pa_actual},
    {"status", "Status", LT_TEXT, .col = 4, .get = pa_status},
    {"reagent_kg", NULL, LT_KG, .get = pa_reagent_kg},
    {"product_kg", "Wanted product isolated, as 100 % [kg]", LT_KG, .col = 11,
     .get = pa_product_kg},
    {"naoh_kg", "NaOH consumed, as 100 %, titrated [kg]", LT_KG, .col = 17, .get = pa_naoh_kg},
    {"end", "End, actual (plant time)", LT_DATE, .col = 3, .get = pa_end},
    {.flags = LT_CLOSE},
    {NULL, "Reagent", LT_TEXT, .col = 5, .get = run_reagent},
    {"variance", NULL, LT_TEXT, .flags = LT_OPEN, .get = pa_variance},
    {"reagent_kg_plan", "Reagent plan [kg]", LT_KG, .get = pa_reagent_plan},
    {NULL, "Reagent drawn, booked [kg]", LT_KG, .get = pa_drawn},
    {"reagent_kg", "Reagent variance [kg]", LT_KG, .get = pa_reagent_var},
    {"reagent_pct", "Reagent variance [% of plan]", LT_PCT1, .get = pa_reagent_pct},
    {"product_kg_plan", "Wanted product plan [kg]", LT_KG, .get = pa_product_plan},
    {"product_kg", "Wanted product variance [kg]", LT_KG, .col = 12, .get = pa_product_var},
    {"product_pct", "Wanted product variance [% of plan]", LT_PCT1, .get = pa_product_pct},
    {"yield_pct_plan", "Yield plan [mol %]", LT_PCT1, .get = pa_yield_plan},
    {"yield_pct_actual", "Yield actual [mol %]", LT_PCT1, .get = pa_yield_actual},
    {"naoh_kg_plan", "NaOH consumed, as 100 %, plan [kg]", LT_KG, .get = pa_naoh_plan},
    {"naoh_kg", "NaOH variance [kg]", LT_KG, .col = 18, .get = pa_naoh_var},
    {"naoh_pct", NULL, LT_PCT1, .get = pa_naoh_pct},
    {"flagged", "Outside tolerance", LT_TEXT, .flags = LT_ALARM, .get = pa_flagged,
     .raised = "OUTSIDE TOLERANCE"},
    {.flags = LT_CLOSE},
};

const struct lt_table lt_run_actuals = {.key = "runs", .path = "runs[actual]",
    .sheet = "Plan vs actual", .cols = pa_cols, .ncols = NCOLS(pa_cols), .count = run_count,
    .nsub = pa_nsub, .rec = run_rec};

/* --- runs[].reaction, runs[].withdrawal / Reaction heat ------------------- */

#define TH(i) (&l->runs[i].therm)

/* runs[].reaction.steps[]: the sites with a share, j-th of them */
static int st_site(const struct ledger *l, int i, int j)
{
    for (int s = 0; s < THERM_NSITE; s++)
        if (TH(i)->share[s] > 0 && j-- == 0)
            return s;
    return 0;
}
static int st_nsub(const struct ledger *l, int i)
{
    int n = 0;
    for (int s = 0; s < THERM_NSITE; s++)
        n += TH(i)->share[s] > 0;
    return n;
}
GET(st_name) { text(v, therm_step_name(RUN(i)->reagent, st_site(l, i, j))); }
GET(st_share) { num(v, TH(i)->share[st_site(l, i, j)]); }
GET(st_dh) { num(v, TH(i)->step_dh_kj_mol[st_site(l, i, j)]); }

static const struct lt_col st_cols[] = {
    {"site", NULL, LT_TEXT, .get = st_name},
    {"share", NULL, LT_FRAC, .get = st_share},
    {"dh_kj_mol", NULL, LT_KG, .get = st_dh},
};

/* JSON only: a table inside runs[].reaction */
static const struct lt_table lt_reaction_steps = {.key = "steps", .path = "runs[].reaction.steps",
    .sheet = NULL, .cols = st_cols, .ncols = NCOLS(st_cols), .count = run_count, .nsub = st_nsub};

GET(rh_class)
{
    (void)j;
    if (TH(i)->crit_class > 0) /* null without mtt_c and td24_c */
        num(v, TH(i)->crit_class);
}
GET(rh_reason)
{
    (void)j;
    therm_reason_text(TH(i), RUN(i)->temp_c, RUN(i)->mtt_c, RUN(i)->td24_c, v->buf, 480);
    text(v, v->buf);
}
GET1(rh_site_assumed, flag(v, TH(i)->site_assumed))
GET(rh_mtt)
{
    (void)j;
    if (RUN(i)->has_mtt)
        num(v, RUN(i)->mtt_c);
}
GET(rh_td24)
{
    (void)j;
    if (RUN(i)->has_td24)
        num(v, RUN(i)->td24_c);
}
GET1(rh_over_mtt, flag(v, TH(i)->mtsr_over_mtt))
GET1(rh_over_td24, flag(v, TH(i)->mtsr_over_td24))
GET(rh_reaches)
{
    (void)j;
    flag(v, TH(i)->mtsr_over_mtt || TH(i)->mtsr_over_td24);
    v->text = TH(i)->mtsr_over_td24 ? "REACHES TD24" : "REACHES MTT";
}
GET(rh_source)
{
    (void)j;
    (void)l;
    (void)i;
    text(v, therm_bde_origin);
}
/* null for a reagent not drawn as gas from a container */
GET(wd_open)
{
    (void)j;
    if (RUN(i)->has_withdrawal)
        flag(v, 1);
}
#define WD(i) (&l->runs[i].withdrawal)
GET(wd_container)
{
    (void)j;
    if (RUN(i)->has_withdrawal)
        text(v, RUN(i)->withdrawal_container);
    else
        v->text = "not drawn as gas";
}
GET(wd_kg_h)
{
    (void)j;
    if (RUN(i)->has_withdrawal)
        num(v, WD(i)->kg_h);
    else
        v->t = LT_V_ABSENT;
}
GET1(wd_container_kg_h, num(v, WD(i)->container_kg_h))
GET(wd_on_line)
{
    (void)j;
    if (RUN(i)->has_withdrawal)
        num(v, WD(i)->containers_on_line);
    else
        v->t = LT_V_ABSENT;
}
GET(wd_evaporator)
{
    (void)j;
    if (RUN(i)->has_withdrawal)
        flag(v, WD(i)->evaporator_needed);
    else
        v->t = LT_V_ABSENT;
}

/* Thermal screening, one row per run.  Runs do not share a mass: no totals. */
static const struct lt_col rh_cols[] = {
    {NULL, "Run", LT_TEXT, .get = run_id},
    {NULL, "Start (plant time)", LT_DATE, .get = run_start},
    {NULL, "Reagent", LT_TEXT, .get = run_reagent},
    {NULL, "Substrate", LT_TEXT, .get = run_substrate},
    {"reaction", NULL, LT_TEXT, .flags = LT_OPEN},
    {"heat_kj", "Reaction heat released [kJ]", LT_HEAT, .col = 6, .off = RF(therm.heat_kj)},
    {"mean_kw", "Mean heat release over feed [kW]", LT_KW, .off = RF(therm.mean_kw)},
    {"peak_kw", "Peak heat release [kW]", LT_KW, .off = RF(therm.peak_kw)},
    {"delta_t_ad_k", "Adiabatic temperature rise [K]", LT_TEMP, .col = 12,
     .off = RF(therm.delta_t_ad_k)},
    {NULL, "Process temperature [°C]", LT_TEMP, .off = RF(temp_c)},
    {"mtsr_c", "MTSR [°C]", LT_TEMP, .off = RF(therm.mtsr_c)},
    {"criticality_class", "Criticality class (Stoessel 1-5)", LT_INT, .col = 17, .get = rh_class},
    {NULL, "MTSR reaches MTT or TD24", LT_TEXT, .flags = LT_ALARM, .get = rh_reaches},
    {"class_reason", "Class reasoning (screening estimate: calorimetry and a process-safety study "
     "decide)", LT_TEXT, .get = rh_reason},
    {"dh_kj_mol", "Heat of one step, mean [kJ/mol] (negative: released)", LT_KG, .col = 5,
     .off = RF(therm.dh_kj_mol)},
    {"dh_uncertainty_kj_mol", NULL, LT_KG, .off = RF(therm.dh_unc_kj_mol)},
    {"site_assumed", NULL, LT_TEXT, .get = rh_site_assumed},
    {"steps", NULL, LT_TEXT, .sub = &lt_reaction_steps},
    {"mass_kg", "Reaction mass [kg]", LT_KG, .col = 9, .off = RF(therm_mass_kg)},
    {"cp_kj_kg_k", "Heat capacity [kJ/(kg K)]", LT_MOL, .off = RF(therm_cp_kj_kg_k)},
    {"accumulation", "Accumulation (dimensionless)", LT_FRAC, .off = RF(therm_accumulation)},
    {"mtt_c", "MTT [°C]", LT_TEMP, .col = 15, .get = rh_mtt},
    {"td24_c", "TD24 [°C]", LT_TEMP, .get = rh_td24},
    {"mtsr_reaches_mtt", NULL, LT_TEXT, .get = rh_over_mtt},
    {"mtsr_reaches_td24", NULL, LT_TEXT, .get = rh_over_td24},
    {"source", NULL, LT_TEXT, .get = rh_source},
    {.flags = LT_CLOSE},
    {"withdrawal", NULL, LT_TEXT, .flags = LT_OPEN, .get = wd_open},
    {"container", "Gas container", LT_TEXT, .col = 20, .get = wd_container},
    {"kg_h", "Gas demand at peak [kg/h]", LT_KG, .get = wd_kg_h},
    {"container_kg_h", NULL, LT_KG, .get = wd_container_kg_h},
    {"containers_on_line", "Containers on line [count]", LT_INT, .get = wd_on_line},
    {"evaporator_needed", "Evaporator needed", LT_TEXT, .flags = LT_ALARM, .get = wd_evaporator,
     .raised = "EVAPORATOR"},
    {.flags = LT_CLOSE},
};

const struct lt_table lt_run_reaction = {.key = "runs", .path = "runs", .sheet = "Reaction heat",
    .cols = rh_cols, .ncols = NCOLS(rh_cols), .count = run_count, .rec = run_rec};

/* --- runs[].emissions_kg / Emissions by run ------------------------------- */

GET1(em_scrubber, text(v, RUN(i)->scrubber ? RUN(i)->scrubber : "(none)"))

/* what leaves the stack after the scrubber */
static const struct lt_col em_cols[] = {
    {NULL, "Run", LT_TEXT, .get = run_id},
    {NULL, "Start (plant time)", LT_DATE, .get = run_start},
    {NULL, "Scrubber", LT_TEXT, .get = em_scrubber},
    {"emissions_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", "%s leaving the stack [kg]", LT_RATE, .flags = LT_TOTAL, .each = LT_EACH_VENT,
     .off = RF(scrub.emis_kg)},
    {.flags = LT_CLOSE},
    /* no total: the gases are unlike things */
    {"emissions_breakthrough_kg", "Of it, breakthrough of a spent liquor, all gases [kg]", LT_RATE,
     .off = RF(scrub.emis_breakthrough_kg)},
};

const struct lt_table lt_run_emissions = {.key = "runs", .path = "runs",
    .sheet = "Emissions by run",
    .cols = em_cols, .ncols = NCOLS(em_cols), .count = run_count, .rec = run_rec};

/* --- runs[].scrubber / Liquor by run (the runs routed to a scrubber) ------ */

static int lq_nsub(const struct ledger *l, int i) { return RUN(i)->scrubber != NULL; }
#define SCR(i) (&l->runs[i].scrub)

GET1(lq_id, text(v, RUN(i)->scrubber))
GET1(lq_changeout, flag(v, SCR(i)->changeout_before))
GET1(lq_exhausted, flag(v, SCR(i)->exhausted))
GET1(lq_too_hot, flag(v, SCR(i)->too_hot))
GET1(lq_boils, flag(v, SCR(i)->boils))
/* the liquor's own base, whatever it is (the NaOH columns are NaOH's only); null: water */
GET(lq_base)
{
    (void)j;
    int u = RUN(i)->scrubber_index, base = u >= 0 ? l->scrubbers[u].base : -1;
    text(v, base >= 0 ? lt_item_name(base) : NULL);
}

/* Sheet columns: 11 before the salts, the salts, then the rest. */
#define LQ_SALTS_END (11 + SALT_COUNT)
/* the liquor after each run; the fresh charge before it made up from the caustic bought and
 * site water */
static const struct lt_col lq_cols[] = {
    {NULL, "Run", LT_TEXT, .get = run_id},
    {"scrubber", NULL, LT_TEXT, .flags = LT_OPEN},
    {"id", "Scrubber", LT_TEXT, .get = lq_id},
    {"naoh_kg", "NaOH consumed, as 100 % [kg]", LT_KG, .flags = LT_TOTAL, .col = 8,
     .off = RF(scrub.naoh_kg)},
    {"heat_kj", "Heat to liquor [kJ]", LT_HEAT, .flags = LT_TOTAL, .col = LQ_SALTS_END + 3,
     .off = RF(scrub.heat_kj)},
    {"temp_rise_k", "Liquor temperature rise [K]", LT_TEMP, .off = RF(scrub.temp_rise_k)},
    {"changeout_before", "Liquor changed before run", LT_TEXT, .col = 4, .get = lq_changeout},
    {"exhausted", "Below minimum NaOH", LT_TEXT, .flags = LT_ALARM, .col = LQ_SALTS_END + 10,
     .get = lq_exhausted, .raised = "BELOW MINIMUM"},
    {"naoh_left_kg", "NaOH left, as 100 % [kg]", LT_KG, .col = 9, .off = RF(scrub.naoh_left_kg)},
    {"liquor_kg_after", "Liquor after run [kg]", LT_KG, .off = RF(scrub.liquor_kg_after)},
    {"naoh_wt_pct_after", "NaOH after run [wt%]", LT_PCT, .off = RF(scrub.naoh_wt_pct_after)},
    {"salts_kg", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", "%s net change [kg]", LT_KG, .each = LT_EACH_SALT, .off = RF(scrub.salt_kg)},
    {.flags = LT_CLOSE},
    {"water_formed_kg", "Water formed [kg]", LT_KG, .off = RF(scrub.water_formed_kg)},
    {"acid_wt_pct_after", "HCl in water liquor [wt%]", LT_PCT, .off = RF(scrub.acid_wt_pct_after)},
    {"liquor_temp_c_after", "Liquor temperature after run, no cooling [°C]", LT_TEMP,
     .col = LQ_SALTS_END + 5, .off = RF(scrub.liquor_temp_c_after)},
    {"heat_kw", "Heat release, mean over the vent window [kW]", LT_KW, .off = RF(scrub.heat_kw)},
    {"too_hot", "Cooling needed", LT_TEXT, .flags = LT_ALARM, .get = lq_too_hot,
     .raised = "TOO HOT"},
    {"sulfite_oxidised_mol", "Sulfite oxidised by hypohalite [mol]", LT_MOL,
     .off = RF(scrub.sulfite_oxidised_mol)},
    {"breakthrough_mol", "Gas left unneutralised [mol]", LT_MOL, .off = RF(scrub.breakthrough_mol)},
    {"unabsorbed_mol", NULL, LT_MOL, .off = RF(scrub.unabsorbed_mol)},
    {"caustic_solution_kg", "Caustic solution bought, %s, for the fresh charge [kg]", LT_KG,
     .flags = LT_TOTAL | LT_CAUSTIC, .col = 5, .off = RF(changeout_caustic_solution_kg)},
    {"dilution_water_kg", "Dilution water for the fresh charge [kg]", LT_KG, .flags = LT_TOTAL,
     .off = RF(changeout_water_kg)},
    {NULL, "Vent gas to scrubber, peak rate [kmol/h]", LT_RATE, .off = RF(scrub.acid_kmol_h)},
    {"hbr_wt_pct_after", NULL, LT_PCT, .off = RF(scrub.hbr_wt_pct_after)},
    {"boiling_point_c", NULL, LT_TEMP, .off = RF(scrub.boiling_point_c)},
    {"boils", NULL, LT_TEXT, .get = lq_boils},
    {"base", "Liquor base", LT_TEXT, .col = LQ_SALTS_END + 11, .get = lq_base,
     .none = "none (water liquor)"},
    {"base_kg", "Base consumed, as 100 % [kg]", LT_KG, .col = LQ_SALTS_END + 13,
     .off = RF(scrub.base_kg)},
    {"base_left_kg", "Base left, as 100 % [kg]", LT_KG, .off = RF(scrub.base_left_kg)},
    {"base_wt_pct_after", "Base after run [wt%]", LT_PCT, .off = RF(scrub.base_wt_pct_after)},
    {"makeup_kg", "Base bought for the fresh charge, as bought [kg]", LT_KG,
     .col = LQ_SALTS_END + 12, .off = RF(changeout_makeup_kg)},
    {"co2_kg", "CO2 given off by the liquor [kg]", LT_KG, .flags = LT_TOTAL,
     .col = LQ_SALTS_END + 16, .off = RF(scrub.co2_kg)},
    {.flags = LT_CLOSE},
    {NULL, "Start (plant time)", LT_DATE, .col = 3, .get = run_start},
};

const struct lt_table lt_run_liquor = {.key = "runs", .path = "runs[scrubber_id]",
    .sheet = "Liquor by run", .cols = lq_cols, .ncols = NCOLS(lq_cols), .count = run_count,
    .nsub = lq_nsub, .rec = run_rec};

/* --- byproducts{} .. losses{} of runs[] / Waste by run --------------------- */

/* what stays in the reaction mass, in kg (the JSON gives it in mol, retained{}) */
GET(ws_retained)
{
    (void)j;
    int s = lt_retained(v->item);
    num(v, RUN(i)->bal.retained_mol[s] * vent_molar_mass_g_mol(s) / 1000.0);
}

/* the run's by-products, vent gas and losses; the sheet shows the waste among them */
static const struct lt_col ws_cols[] = {
    {NULL, "Run", LT_TEXT, .get = run_id},
    {NULL, "Start (plant time)", LT_DATE, .get = run_start},
    {NULL, "Reagent", LT_TEXT, .get = run_reagent},
    {NULL, "Substrate", LT_TEXT, .get = run_substrate},
    {"byproducts", NULL, LT_TEXT, .flags = LT_OPEN},
    {"HCl_kg", NULL, LT_KG, .off = RF(bal.hx_kg[0])},
    {"HBr_kg", NULL, LT_KG, .off = RF(bal.hx_kg[1])},
    {"SO2_kg", NULL, LT_KG, .off = RF(bal.so2_kg)},
    {"succinimide_kg", "Succinimide (solid) [kg]", LT_KG, .flags = LT_TOTAL,
     .off = RF(bal.succinimide_kg)},
    {.flags = LT_CLOSE},
    {"vent", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s_mol", NULL, LT_MOL, .each = LT_EACH_VENT, .off = RF(bal.vent_mol)},
    {"acid_kmol_h", NULL, LT_RATE, .off = RF(scrub.acid_kmol_h)},
    {.flags = LT_CLOSE},
    {"retained", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s_mol", NULL, LT_MOL, .each = LT_EACH_VENT, .off = RF(bal.retained_mol)},
    {.flags = LT_CLOSE},
    /* this and the next three mix reagents or products from run to run: no totals */
    {"reagent_left_kg", "Unreacted reagent left in mass [kg]", LT_KG,
     .off = RF(bal.reagent_left_kg)},
    {"losses", NULL, LT_TEXT, .flags = LT_OPEN},
    {"wanted_kg", NULL, LT_KG, .off = RF(bal.wanted_kg)},
    {"isomer_kg", "Isomer products [kg]", LT_KG, .col = 8, .off = RF(bal.isomer_kg)},
    {"overhalogenated_kg", "Over-halogenated products [kg]", LT_KG, .col = 7,
     .off = RF(bal.overhal_kg)},
    {"unreacted_substrate_kg", "Unreacted substrate [kg]", LT_KG, .col = 9,
     .off = RF(bal.unreacted_substrate_kg)},
    {.flags = LT_CLOSE},
    {NULL, "%s retained in mass [kg]", LT_KG, .flags = LT_TOTAL, .each = LT_EACH_RETAINED,
     .get = ws_retained},
};

const struct lt_table lt_run_waste = {.key = "runs", .path = "runs", .sheet = "Waste by run",
    .cols = ws_cols, .ncols = NCOLS(ws_cols), .count = run_count, .rec = run_rec};

/* --- runs[] / Runs ---------------------------------------------------------- */

/* the feed end; a feed time no date can hold refuses the record (the sheet leaves it blank) */
GET(run_end)
{
    (void)j;
    const struct ledger_run *r = RUN(i);
    if (!isfinite(r->feed_h) || fabs(r->feed_h) > 1e9) {
        v->t = LT_V_BAD;
        v->text = "feed time out of range";
    } else {
        date(v, r->start_min + (int64_t)llround(r->feed_h * 60.0));
    }
}
GET1(run_reactor, text(v, RUN(i)->reactor))
GET1(run_scrubber, text(v, RUN(i)->scrubber))
GET1(run_mode, text(v, RUN(i)->mode == KIN_CSTR ? "cstr" : "batch"))
GET1(run_smiles, text(v, RUN(i)->smiles))
GET1(run_formula, text(v, RUN(i)->bal.substrate_formula))
GET1(run_capped, flag(v, RUN(i)->bal.capped))
GET1(run_resolved, flag(v, RUN(i)->bal.isomers_resolved))
GET(run_selectivity)
{
    (void)j;
    if (RUN(i)->bal.selectivity_defined) /* null: nothing converted */
        num(v, RUN(i)->bal.selectivity_pct);
}
GET(run_warning)
{
    (void)j;
    if (RUN(i)->bal.warning)
        text(v, RUN(i)->bal.warning);
    else
        v->t = LT_V_ABSENT;
}
/* the wanted product of a run (NULL when it has none, as with nothing converted) */
static const struct ledger_product *run_wanted(const struct ledger_bal *b)
{
    for (int k = 0; k < b->nproducts; k++)
        if (b->products[k].role == ROLE_WANTED)
            return &b->products[k];
    return NULL;
}
GET(run_wanted_formula)
{
    (void)j;
    const struct ledger_product *p = run_wanted(&RUN(i)->bal);
    text(v, p ? p->formula : NULL);
}
GET(run_wanted_kg)
{
    (void)j;
    const struct ledger_product *p = run_wanted(&RUN(i)->bal);
    num(v, p ? p->kg : 0.0);
}
/* the vent gas in kg (the JSON gives it in mol, vent{}) */
GET(run_vent_kg)
{
    (void)j;
    num(v, RUN(i)->bal.vent_mol[v->item] * vent_molar_mass_g_mol(v->item) / 1000.0);
}
GET(run_note)
{
    (void)j;
    const struct ledger_bal *b = &RUN(i)->bal;
    text(v, b->warning ? b->warning : b->isomers_resolved ? NULL
         : "formula substrate: isomers not resolved, every monohalide counted as the wanted "
           "product");
}

/* Sheet columns: the vent family from 31, then the scrubber's figures. */
#define RN_VENT_END (30 + VS_COUNT)
/* The runs[] record: its own keys, and where the lists of its parts go (a sub entry without
 * a key).  No totals over substrates, reagents or halogen atoms: the runs mix them; figures in
 * mole per cent (design section 5). */
static const struct lt_col rn_cols[] = {
    {"id", "Run", LT_TEXT, .get = run_id},
    {"start", "Start (plant time)", LT_DATE, .get = run_start},
    {"end", "Feed end (plant time)", LT_DATE, .get = run_end},
    {"reactor", "Reactor", LT_TEXT, .get = run_reactor},
    {"scrubber_id", "Scrubber", LT_TEXT, .get = run_scrubber},
    {"reagent", "Reagent", LT_TEXT, .col = 7, .get = run_reagent},
    {"temp_c", "Temperature [°C]", LT_TEMP, .col = 11, .off = RF(temp_c)},
    {"reactor_mode", "Reactor mode", LT_TEXT, .col = 6, .get = run_mode},
    {"feed_h", "Feed time [h]", LT_TEMP, .col = 12, .off = RF(feed_h)},
    {"substrate", NULL, LT_TEXT, .flags = LT_OPEN},
    {"name", "Substrate", LT_TEXT, .col = 8, .get = run_substrate},
    {"smiles", "Substrate SMILES", LT_TEXT, .get = run_smiles},
    {"formula", "Substrate formula", LT_TEXT, .get = run_formula},
    {"molar_mass_g_mol", NULL, LT_GMOL, .off = RF(bal.substrate_molar_mass_g_mol)},
    {"kg", "Substrate [kg]", LT_KG, .col = 13, .off = RF(substrate_kg)},
    {"mol", "Substrate [mol]", LT_MOL, .off = RF(bal.substrate_mol)},
    {.flags = LT_CLOSE},
    {"reagent_charged", NULL, LT_TEXT, .flags = LT_OPEN},
    {"kg", "Reagent charged [kg]", LT_KG, .off = RF(bal.reagent_kg)},
    {"mol", "Reagent charged [mol]", LT_MOL, .off = RF(bal.reagent_mol)},
    {.flags = LT_CLOSE},
    {"reagent_reacted_mol", "Reagent reacted [mol]", LT_MOL, .off = RF(bal.reagent_reacted_mol)},
    {"reagent_unreacted_mol", NULL, LT_MOL, .off = RF(bal.reagent_unreacted_mol)},
    {"halogen_reacted_mol", "Halogen put on carbon [mol]", LT_MOL,
     .off = RF(bal.halogen_reacted_mol)},
    {"capped", "Capped by substrate", LT_TEXT, .flags = LT_NOTICE, .get = run_capped,
     .raised = "capped"},
    {"mean_degree", "Mean halogens added [mol/mol substrate]", LT_MOL, .off = RF(bal.mean_degree)},
    {"products", NULL, LT_TEXT, .sub = &lt_run_products}, /* the rows listed, the lumped one */
    {.sub = &lt_run_waste},  /* byproducts{}, vent{}, retained{}, reagent_left_kg, losses{} */
    {.sub = &lt_run_liquor}, /* scrubber{}: its liquor after the run */
    {"element_balance", NULL, LT_TEXT, .flags = LT_OPEN},
    {"max_rel_error", "Element balance error [relative]", LT_SCI, .col = RN_VENT_END + 6,
     .off = RF(bal.max_rel_error)},
    {"elements", NULL, LT_TEXT, .flags = LT_OPEN},
    {"%s", NULL, LT_TEXT, .flags = LT_OPEN, .each = LT_EACH_ELEMENT}, /* one object each */
    {"in_mol", NULL, LT_MOL, .off = RF(bal.el_in_mol)},
    {"out_mol", NULL, LT_MOL, .off = RF(bal.el_out_mol)},
    {.flags = LT_CLOSE},
    {.flags = LT_CLOSE},
    {.flags = LT_CLOSE},
    {"isomers_resolved", NULL, LT_TEXT, .get = run_resolved},
    {"wanted_mol", NULL, LT_MOL, .off = RF(bal.wanted_mol)},
    {"converted_mol", NULL, LT_MOL, .off = RF(bal.converted_mol)},
    {"halogen_charged_mol", NULL, LT_MOL, .off = RF(bal.halogen_charged_mol)},
    {"halogen_in_wanted_mol", NULL, LT_MOL, .off = RF(bal.halogen_in_wanted_mol)},
    {"yield_pct", "Yield [%]", LT_PCT1, .col = 23, .off = RF(bal.yield_pct)},
    {"conversion_pct", "Substrate conversion [%]", LT_PCT1, .off = RF(bal.conversion_pct)},
    {"selectivity_pct", "Selectivity to wanted product [%]", LT_PCT1, .get = run_selectivity},
    {"halogen_efficiency_pct", "Halogen efficiency [%]", LT_PCT1,
     .off = RF(bal.halogen_efficiency_pct)},
    {.sub = &lt_run_reaction}, /* reaction{} (thermal.h), withdrawal{} or null */
    {"warning", NULL, LT_TEXT, .get = run_warning},
    {.sub = &lt_run_actuals},   /* actual{} (null while planned), variance{} (done) */
    {.sub = &lt_run_emissions}, /* what leaves the stack after the scrubber */
    {NULL, "Wanted product (formula)", LT_TEXT, .col = 21, .get = run_wanted_formula},
    {NULL, "Wanted product [kg]", LT_KG, .get = run_wanted_kg},
    {NULL, "HCl formed [kg]", LT_KG, .flags = LT_TOTAL, .col = 27, .off = RF(bal.hx_kg[0])},
    {NULL, "HBr formed [kg]", LT_KG, .flags = LT_TOTAL, .off = RF(bal.hx_kg[1])},
    {NULL, "SO2 formed [kg]", LT_KG, .flags = LT_TOTAL, .off = RF(bal.so2_kg)},
    {NULL, "Succinimide formed [kg]", LT_KG, .flags = LT_TOTAL, .off = RF(bal.succinimide_kg)},
    {NULL, "%s to scrubber [kg]", LT_KG, .flags = LT_TOTAL, .each = LT_EACH_VENT,
     .get = run_vent_kg},
    {NULL, "Vent gas to scrubber, peak rate [kmol/h]", LT_RATE, .col = RN_VENT_END + 1,
     .off = RF(scrub.acid_kmol_h)},
    {NULL, "NaOH consumed, as 100 % [kg]", LT_KG, .flags = LT_TOTAL, .off = RF(scrub.naoh_kg)},
    {NULL, "Heat to liquor [kJ]", LT_HEAT, .flags = LT_TOTAL, .off = RF(scrub.heat_kj)},
    {NULL, "Liquor temperature rise [K]", LT_TEMP, .off = RF(scrub.temp_rise_k)},
    {NULL, "Liquor changed before run", LT_TEXT, .get = lq_changeout},
    {NULL, "Note", LT_TEXT, .col = RN_VENT_END + 7, .get = run_note},
};

const struct lt_table lt_runs = {.key = "runs", .path = "runs", .sheet = "Runs",
    .cols = rn_cols, .ncols = NCOLS(rn_cols), .count = run_count, .rec = run_rec};

/* --- warnings[] / Warnings ------------------------------------------------ */

static int wn_count(const struct ledger *l) { return l->nwarnings; }
GET(wn_run)
{
    (void)j;
    text(v, l->warnings[i].run); /* null: a warning of the campaign, not of one run */
}
GET1(wn_message, text(v, l->warnings[i].message))

static const struct lt_col wn_cols[] = {
    {"run", "Run", LT_TEXT, .get = wn_run, .none = "(campaign)"},
    {"message", "Warning", LT_TEXT, .get = wn_message, .width = 110},
};

const struct lt_table lt_warnings = {.key = "warnings", .path = "warnings",
    .sheet = "Warnings", .cols = wn_cols, .ncols = NCOLS(wn_cols), .count = wn_count};

/* --- assumptions[] / Assumptions ------------------------------------------ */

static int as_count(const struct ledger *l) { return l->nassumptions; }
#define AS(i) (&l->assumptions[i])

GET1(as_what, text(v, AS(i)->what))
GET(as_value)
{
    (void)j;
    if (AS(i)->has_value) /* null: a text-only assumption */
        num(v, AS(i)->value);
}
GET(as_unit)
{
    (void)j;
    text(v, AS(i)->unit);
    v->shown = AS(i)->has_value ? "dimensionless" : NULL; /* a number without a unit */
}
GET1(as_origin, text(v, AS(i)->origin))

/* Each figure the models took without the campaign giving it, and where it comes from (the
 * sheet puts the --set values of a what-if above them). */
static const struct lt_col as_cols[] = {
    {"what", "What", LT_TEXT, .get = as_what, .style = LT_S_WRAP, .width = 44},
    {"value", "Value", LT_GEN, .get = as_value},
    {"unit", "Unit", LT_TEXT, .get = as_unit, .style = LT_S_TOP},
    {"origin", "Origin", LT_TEXT, .get = as_origin, .style = LT_S_WRAP, .width = 66},
};

const struct lt_table lt_assumptions = {.key = "assumptions", .path = "assumptions",
    .sheet = "Assumptions", .cols = as_cols, .ncols = NCOLS(as_cols), .count = as_count};

/* --- cautions[] / Cautions (a block of rows per substance in play) -------- */

/* The caution row (reagents.h) of record i: the i-th substance in play. */
static const struct caution_info *ca_of(const struct ledger *l, int i)
{
    for (int ca = 0; ca < CA_COUNT; ca++)
        if ((l->cautions_mask >> ca & 1u) && caution_get(ca) && i-- == 0)
            return caution_get(ca);
    return NULL;
}
static int ca_count(const struct ledger *l)
{
    int n = 0;
    while (ca_of(l, n))
        n++;
    return n;
}
#define CA(i) ca_of(l, i)
/* at most four limits a substance */
static int cl_nsub(const struct ledger *l, int i) { return CA(i)->nlimits < 4 ? CA(i)->nlimits : 4; }
GET(cl_topic)
{
    snprintf(v->buf, sizeof v->buf, "Exposure limit: %s",
             CA(i)->limits[j].kind ? CA(i)->limits[j].kind : "");
    text(v, v->buf);
}
GET(cl_kind) { text(v, CA(i)->limits[j].kind); }
GET(cl_value) { text(v, CA(i)->limits[j].value); }
GET(cl_source) { text(v, CA(i)->limits[j].source); }

/* cautions[].limits[]: its rows are rows of the substance's block on the sheet */
static const struct lt_col cl_cols[] = {
    {NULL, "Topic", LT_TEXT, .get = cl_topic},
    {"kind", NULL, LT_TEXT, .get = cl_kind},
    {"value", "Detail", LT_TEXT, .get = cl_value},
    {"source", "Source", LT_TEXT, .get = cl_source},
};

static const struct lt_table lt_caution_limits = {.key = "limits", .path = "cautions[].limits",
    .sheet = NULL, .cols = cl_cols, .ncols = NCOLS(cl_cols), .count = ca_count, .nsub = cl_nsub};

GET1(ca_substance, text(v, CA(i)->substance))
GET1(ca_cas, text(v, CA(i)->cas))
GET1(ca_hazards, text(v, CA(i)->hazards))
GET1(ca_incompatible, text(v, CA(i)->incompatible))
GET1(ca_ppe, text(v, CA(i)->ppe))
GET(ca_deferral)
{
    (void)l, (void)i, (void)j;
    text(v, caution_deferral());
}

static int ca_nsub(const struct ledger *l, int i);
/* A substance's block: a row per exposure limit, per LT_ROW entry, then the deferral. */
static const struct lt_col ca_cols[] = {
    {"substance", "Substance", LT_TEXT, .get = ca_substance, .style = LT_S_BOLD_TOP},
    {"cas", "CAS number", LT_TEXT, .get = ca_cas, .style = LT_S_TOP},
    {"limits", NULL, LT_TEXT, .sub = &lt_caution_limits},
    {"hazards", "Main hazards", LT_TEXT, .flags = LT_ROW, .get = ca_hazards},
    {"incompatible", "Incompatible with", LT_TEXT, .flags = LT_ROW, .get = ca_incompatible},
    {"ppe", "Protective equipment", LT_TEXT, .flags = LT_ROW, .get = ca_ppe},
    {NULL, "Before use", LT_TEXT, .flags = LT_ROW, .get = ca_deferral},
    {NULL, "Topic", LT_TEXT, .flags = LT_FORM | LT_NAME, .style = LT_S_TOP},
    /* one page wide on A4 and Letter with the other three columns */
    {NULL, "Detail", LT_TEXT, .flags = LT_FORM | LT_VALUE, .style = LT_S_WRAP, .width = 64},
    {NULL, "Source", LT_TEXT, .flags = LT_FORM, .style = LT_S_WRAP, .width = 30},
};

const struct lt_table lt_cautions = {.key = "cautions", .path = "cautions", .sheet = "Cautions",
    .cols = ca_cols, .ncols = NCOLS(ca_cols), .count = ca_count, .nsub = ca_nsub};
static int ca_nsub(const struct ledger *l, int i) { return lt_form_rows(&lt_cautions, l, i); }

/* --- estimate_cautions[] / Cautions (the rows after the substances) ------- */

static int ec_count(const struct ledger *l)
{
    (void)l;
    return caution_estimate_count();
}
GET(ec_label)
{
    (void)l, (void)i, (void)j;
    text(v, "Estimates of this ledger");
}
GET1(ec_topic, ((void)l, text(v, caution_estimate_topic(i))))
GET1(ec_text, ((void)l, text(v, caution_estimate_text(i))))
GET(ec_none)
{
    (void)l, (void)i, (void)j;
    v->t = LT_V_ABSENT;
}

/* What the emission and reaction-heat figures are and who decides; the Cautions sheet's
 * columns (test_ltable holds the two lists to the same headers). */
static const struct lt_col ec_cols[] = {
    {NULL, "Substance", LT_TEXT, .get = ec_label, .style = LT_S_BOLD_TOP},
    {NULL, "CAS number", LT_TEXT, .get = ec_none},
    {"topic", "Topic", LT_TEXT, .get = ec_topic, .style = LT_S_TOP},
    {"text", "Detail", LT_TEXT, .get = ec_text, .style = LT_S_WRAP, .width = 64},
    {NULL, "Source", LT_TEXT, .get = ec_none, .width = 30},
};

const struct lt_table lt_estimate_cautions = {.key = "estimate_cautions",
    .path = "estimate_cautions", .sheet = "Cautions", .cols = ec_cols, .ncols = NCOLS(ec_cols),
    .count = ec_count};

const struct lt_table *const lt_tables[LT_NTABLES] = {
    &lt_run_products, &lt_scrubbers, &lt_permit_checks, &lt_orders, &lt_stock_checks, &lt_warnings,
    &lt_month_products, &lt_run_actuals, &lt_run_reaction, &lt_run_emissions, &lt_run_liquor,
    &lt_run_waste, &lt_runs, &lt_months, &lt_scrubber_spent, &lt_scrubber_column, &lt_assumptions,
    &lt_cautions, &lt_estimate_cautions, &lt_scrubber_hourly};

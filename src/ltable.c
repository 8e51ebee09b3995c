/*
 * ltable.c - the column lists of the ledger's output tables (see ltable.h).
 *
 * Each list is in JSON key order; `.col` names a sheet column only where the sheet's order
 * departs from it.  A getter says what a value is; the writers decide how it looks.
 */
#include "ltable.h"

#include "isodate.h"

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

void lt_head(const struct lt_col *c, const struct ledger *l, char *buf, size_t n)
{
    if (!(c->flags & LT_CAUSTIC)) {
        snprintf(buf, n, "%s", c->head ? c->head : "");
        return;
    }
    char basis[48];
    lt_caustic_basis(l, basis, sizeof basis);
    char *at = strstr(c->head, "%s");
    if (!at) {
        snprintf(buf, n, "%s", c->head);
        return;
    }
    snprintf(buf, n, "%.*s%s%s", (int)(at - c->head), c->head, basis, at + 2);
}

void lt_get(const struct lt_table *t, int c, const struct ledger *l, int i, int j, struct lt_val *v)
{
    const struct lt_col *col = &t->cols[c];
    v->t = LT_V_NULL;
    v->text = NULL;
    v->wrap = 0;
    v->runs = NULL;
    v->nruns = 0;
    if (col->get) {
        col->get(l, i, j, v);
        return;
    }
    const char *base = t->rec(l, i, j);
    v->t = LT_V_NUM;
    if (col->flags & LT_IFIELD) {
        int x;
        memcpy(&x, base + col->off, sizeof x);
        v->num = x;
    } else {
        memcpy(&v->num, base + col->off, sizeof v->num);
    }
}

int lt_sheet_order(const struct lt_table *t, int *at, int max)
{
    int n = 0, p = 0;
    for (int c = 0; c < t->ncols; c++)
        n += t->cols[c].head != NULL;
    if (n > max)
        return -1;
    for (int k = 0; k < n; k++)
        at[k] = -1;
    for (int c = 0; c < t->ncols; c++) {
        if (!t->cols[c].head)
            continue;
        p = t->cols[c].col > 0 ? t->cols[c].col - 1 : p;
        if (p >= n || at[p] >= 0)
            return -1;
        at[p++] = c;
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
GET(ord_item) { (void)j; text(v, lt_item_name(ORD(i)->item)); }
GET(ord_container) { (void)j; text(v, ORD(i)->container); }
GET(ord_first_use) { (void)j; date(v, ORD(i)->first_use_min); }
/* date only, truncated: ordering on that day is never later than required */
GET(ord_order_by) { (void)j; date(v, ORD(i)->order_by_min); }
GET(ord_late) { (void)j; flag(v, ORD(i)->late); }
GET(ord_no_container) { (void)j; flag(v, ORD(i)->no_container); }

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

GET(chk_reagent) { (void)j; text(v, lt_item_name(CHK(i)->reagent)); }
GET(chk_date) { (void)j; date(v, CHK(i)->date_min); }
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

GET(pc_scrubber) { (void)j; text(v, l->scrubbers[PC(i)->unit].id); }
GET(pc_species) { (void)j; text(v, vent_get(PC(i)->species)->name); }
GET(pc_unit) { (void)j; text(v, emis_limit_unit(PC(i)->kind)); }
GET(pc_averaging)
{
    (void)j;
    text(v, PC(i)->kind == EMIS_T_YR ? "year" : PC(i)->averaging_day ? "day" : "hour");
}
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
GET(pc_lim_kg) { (void)j; pc_kind(PC(i), EMIS_KG_H, 0, v); }
GET(pc_val_kg) { (void)j; pc_kind(PC(i), EMIS_KG_H, 1, v); }
GET(pc_lim_mg) { (void)j; pc_kind(PC(i), EMIS_MG_NM3, 0, v); }
GET(pc_val_mg) { (void)j; pc_kind(PC(i), EMIS_MG_NM3, 1, v); }
GET(pc_lim_t) { (void)j; pc_kind(PC(i), EMIS_T_YR, 0, v); }
GET(pc_val_t) { (void)j; pc_kind(PC(i), EMIS_T_YR, 1, v); }

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
GET(pc_runs) { (void)j; runs(v, PC(i)->runs, PC(i)->nruns); }

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

GET(su_id) { (void)j; text(v, SU(i)->id); }
GET(su_peak_at)
{
    (void)j;
    if (SUO(i)->nhours > 0)
        date(v, SUO(i)->peak_at_min);
}
GET(su_overloaded) { (void)j; flag(v, SUO(i)->overloaded); }
GET(su_strength)
{
    (void)j;
    if (SU(i)->makeup_naoh_wt_pct > 0)
        num(v, SU(i)->makeup_naoh_wt_pct);
    else
        text(v, SU(i)->base < 0 ? "none (water liquor)" : "none (no NaOH in the liquor)");
}
/* the liquor's own base, whatever it is (the NaOH columns are NaOH's only); null: water */
GET(su_base)
{
    (void)j;
    text(v, SU(i)->base >= 0 ? lt_item_name(SU(i)->base) : NULL);
}
GET(su_base_strength)
{
    (void)j;
    if (SU(i)->base >= 0)
        num(v, SU(i)->makeup_base_wt_pct);
    else
        text(v, "none (water liquor)");
}
GET(su_peak_runs) { (void)j; runs(v, SUO(i)->peak_runs, SUO(i)->npeak_runs); }
GET(su_instant_at)
{
    (void)j;
    if (SUO(i)->npeak_instant_runs > 0)
        date(v, SUO(i)->peak_instant_at_min);
}
GET(su_instant_runs)
{
    (void)j;
    runs(v, SUO(i)->peak_instant_runs, SUO(i)->npeak_instant_runs);
}
GET(su_heat_at)
{
    (void)j;
    if (SUO(i)->npeak_heat_runs > 0)
        date(v, SUO(i)->peak_heat_at_min);
}
GET(su_heat_runs)
{
    (void)j;
    runs(v, SUO(i)->peak_heat_runs, SUO(i)->npeak_heat_runs);
}

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
};

const struct lt_table lt_scrubbers = {.key = "scrubbers", .path = "scrubbers",
    .sheet = "Scrubber units", .cols = su_cols, .ncols = NCOLS(su_cols),
    .count = su_count, .rec = su_rec};

/* --- runs[].products[] / Products ---------------------------------------- */

static int pr_count(const struct ledger *l) { return l->nruns; }
static int pr_nsub(const struct ledger *l, int i) { return l->runs[i].bal.nproducts; }
static const void *pr_rec(const struct ledger *l, int i, int j)
{
    return &l->runs[i].bal.products[j];
}
#define PR(i, j) (&l->runs[i].bal.products[j])

GET(pr_run) { (void)j; text(v, l->runs[i].id); }
GET(pr_reagent) { (void)j; text(v, lt_item_name(l->runs[i].reagent)); }
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
    v->wrap = 1;
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

/* --- warnings[] / Warnings ------------------------------------------------ */

static int wn_count(const struct ledger *l) { return l->nwarnings; }
GET(wn_run)
{
    (void)j;
    text(v, l->warnings[i].run); /* null: a warning of the campaign, not of one run */
}
GET(wn_message)
{
    (void)j;
    text(v, l->warnings[i].message);
}

static const struct lt_col wn_cols[] = {
    {"run", "Run", LT_TEXT, .get = wn_run, .none = "(campaign)"},
    {"message", "Warning", LT_TEXT, .get = wn_message, .width = 110},
};

const struct lt_table lt_warnings = {.key = "warnings", .path = "warnings",
    .sheet = "Warnings", .cols = wn_cols, .ncols = NCOLS(wn_cols), .count = wn_count};

const struct lt_table *const lt_tables[LT_NTABLES] = {
    &lt_run_products, &lt_scrubbers, &lt_permit_checks, &lt_orders, &lt_stock_checks, &lt_warnings};

/*
 * orders.c - monthly demand, stock carried over, whole containers, order-by dates.
 *
 * Choices where design section 4 is silent (also in orders.h):
 * - Several containers for one item: the one needing the fewest containers, since
 *   every container change-over is a hazardous connect/disconnect (common practice
 *   to keep them few); on a tie the least usable excess (containers x (net - heel)
 *   - to order), then the first listed. So 4 685 kg of Cl2 is 6 ton containers, not
 *   71 cylinders, while 50 kg is one cylinder, not one ton container.
 * - No container defined for an item with demand: the amount to order is taken as
 *   bought in bulk (ordered usable = to order), containers = 0 and the line is flagged.
 * - Lead time: order-by = midnight of the first-use day minus lead_days rounded up
 *   to whole days, i.e. fractional days round toward the earlier date.
 * - Months where an item has no demand get no line and leave its stock unchanged.
 */
#include "orders.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "hlmem.h"
#include "isodate.h"
#include "reagents.h"

#define DAY_MIN 1440
#define REL_EPS 1e-9 /* round-off guard for whole-container counts and tiny shortfalls */

struct dm { int month, item; int64_t when; double kg; int idx; };

/* qsort order of demand rows: month, item, time, then input order (so the sort is stable). */
static int cmp_dm(const void *pa, const void *pb)
{
    const struct dm *a = pa, *b = pb;
    if (a->month != b->month)
        return a->month < b->month ? -1 : 1;
    if (a->item != b->item)
        return a->item < b->item ? -1 : 1;
    if (a->when != b->when)
        return a->when < b->when ? -1 : 1;
    return (a->idx > b->idx) - (a->idx < b->idx);
}

/* The minute count of 00:00 of the day minute m falls on (floor, also before 1970). */
static int64_t day_start(int64_t m) { return (m / DAY_MIN - (m % DAY_MIN < 0)) * DAY_MIN; }

/* Whole containers of `usable` kg for `kg`, without an extra one from round-off. */
static int count_containers(double kg, double usable)
{
    if (!(kg > 0))
        return 0;
    double n = kg / usable;
    return (int)ceil(n - REL_EPS * (n > 1 ? n : 1));
}

/* HL_ERR_INPUT naming the row when a demand, stock or container row is out of range (item,
 * finite non-negative kg, lead <= 3650 d, one stock row per item, net_kg > heel_kg >= 0). */
static enum hl_status check(const struct ord_demand *d, int nd, const struct ord_stock *s, int ns,
                            const struct ord_container *c, int nc, struct hl_err *e)
{
    for (int i = 0; i < nd; i++)
        if (d[i].item < 0 || d[i].item >= RG_COUNT || !(d[i].kg >= 0) || !isfinite(d[i].kg))
            return hl_err_set(e, HL_ERR_INPUT, "order demand %d: item %d, kg %g not valid", i,
                              d[i].item, d[i].kg);
    for (int i = 0; i < ns; i++) {
        if (s[i].item < 0 || s[i].item >= RG_COUNT || !(s[i].on_hand_kg >= 0) ||
            !(s[i].safety_kg >= 0) || !(s[i].lead_days >= 0) || !isfinite(s[i].on_hand_kg) ||
            !isfinite(s[i].safety_kg) || !isfinite(s[i].lead_days) || s[i].lead_days > 3650)
            return hl_err_set(e, HL_ERR_INPUT, "stock row %d: values must be >= 0 (lead <= 3650 d)", i);
        for (int j = 0; j < i; j++)
            if (s[j].item == s[i].item)
                return hl_err_set(e, HL_ERR_INPUT, "stock rows %d and %d name the same item", j, i);
    }
    for (int i = 0; i < nc; i++)
        if (c[i].item < 0 || c[i].item >= RG_COUNT || !isfinite(c[i].net_kg) ||
            !(c[i].heel_kg >= 0) || !(c[i].net_kg - c[i].heel_kg > 0))
            return hl_err_set(e, HL_ERR_INPUT, "container %s: need net_kg > heel_kg >= 0",
                              c[i].name ? c[i].name : "?");
    return HL_OK;
}

enum hl_status ord_plan(const struct ord_demand *d, int nd,
                        const struct ord_stock *s, int ns,
                        const struct ord_container *c, int nc,
                        int64_t today_min, struct ord_line **out, int *nout,
                        struct hl_err *e)
{
    return ord_plan_supply(d, nd, s, ns, c, nc, NULL, 0, today_min, out, nout, e);
}

/* qsort order of deliveries: item, then time. */
static int cmp_supply(const void *pa, const void *pb)
{
    const struct ord_supply *a = pa, *b = pb;
    if (a->item != b->item)
        return a->item < b->item ? -1 : 1;
    return (a->when_min > b->when_min) - (a->when_min < b->when_min);
}

/* Per-item books of the plan: the stock carried from month to month, safety stock and lead
 * time, and the deliveries sorted by item, then time (sv[first[k]..first[k+1]-1] are item k's,
 * next[k] the first not yet counted; sv NULL without deliveries). */
struct books {
    double stock[RG_COUNT], safety[RG_COUNT], lead[RG_COUNT];
    struct ord_supply *sv;
    int first[RG_COUNT + 1], next[RG_COUNT];
};

/* The demand rows grouped by month and item, in that order. Takes d[nd] (nd >= 1); gives
 * *lines (*ng rows, owned by the caller, hl_free) with month, item, first use and demand set. */
static enum hl_status group_demand(const struct ord_demand *d, int nd, struct ord_line **lines,
                                   int *ng_out, struct hl_err *e)
{
    struct dm *v = hl_malloc((size_t)nd * sizeof *v);
    if (!v)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory planning orders");
    for (int i = 0; i < nd; i++)
        v[i] = (struct dm){isodate_month_index(d[i].when_min), d[i].item, d[i].when_min, d[i].kg, i};
    qsort(v, (size_t)nd, sizeof *v, cmp_dm);

    int ng = 0;
    for (int i = 0; i < nd; i++)
        if (i == 0 || v[i].month != v[i - 1].month || v[i].item != v[i - 1].item)
            ng++;
    struct ord_line *L = hl_calloc((size_t)ng, sizeof *L);
    if (!L) {
        hl_free(v);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory planning orders");
    }
    int g = -1;
    for (int i = 0; i < nd; i++) {
        if (i == 0 || v[i].month != v[i - 1].month || v[i].item != v[i - 1].item) {
            L[++g].month_index = v[i].month;
            L[g].item = v[i].item;
            L[g].first_use_min = v[i].when; /* sorted by time within the group */
        }
        L[g].demand_kg += v[i].kg;
    }
    hl_free(v);
    *lines = L;
    *ng_out = ng;
    return HL_OK;
}

/* The books at the start of the plan from the stock rows s[ns] and the deliveries sup[nsup];
 * b->sv is a sorted copy of sup owned by the caller (hl_free; NULL when nsup is 0). */
static enum hl_status open_books(const struct ord_stock *s, int ns, const struct ord_supply *sup,
                                 int nsup, struct books *b, struct hl_err *e)
{
    for (int k = 0; k < RG_COUNT; k++)
        b->stock[k] = b->safety[k] = b->lead[k] = 0;
    for (int i = 0; i < ns; i++) {
        b->stock[s[i].item] = s[i].on_hand_kg;
        b->safety[s[i].item] = s[i].safety_kg;
        b->lead[s[i].item] = s[i].lead_days;
    }
    /* supplies by item, then time; next[item] walks them alongside the month groups */
    b->sv = NULL;
    if (nsup) {
        b->sv = hl_malloc((size_t)nsup * sizeof *b->sv);
        if (!b->sv)
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory planning orders");
        memcpy(b->sv, sup, (size_t)nsup * sizeof *b->sv);
        qsort(b->sv, (size_t)nsup, sizeof *b->sv, cmp_supply);
    }
    for (int k = 0, j = 0; k <= RG_COUNT; k++) {
        while (j < nsup && b->sv[j].item < k)
            j++;
        b->first[k] = j;
    }
    for (int k = 0; k < RG_COUNT; k++)
        b->next[k] = b->first[k];
    return HL_OK;
}

/* The container of o's item that covers o->to_order_kg in the fewest containers, with the
 * least left unused on a tie; sets o's container figures (o->container borrows c's name), or
 * buys in bulk when c[nc] has none for the item. */
static void pick_container(const struct ord_container *c, int nc, struct ord_line *o)
{
    int it = o->item;
    int best = -1, best_n = 0;
    double best_waste = 0;
    for (int j = 0; j < nc; j++) {
        if (c[j].item != it)
            continue;
        double usable = c[j].net_kg - c[j].heel_kg;
        int n = count_containers(o->to_order_kg, usable);
        double waste = n * usable - o->to_order_kg;
        if (waste < 0)
            waste = 0; /* within the round-off guard */
        double tol = REL_EPS * (usable > 1 ? usable : 1);
        if (best < 0 || n < best_n || (n == best_n && waste < best_waste - tol)) {
            best = j;
            best_n = n;
            best_waste = waste;
        }
    }
    if (best >= 0) {
        o->container = c[best].name;
        o->net_kg = c[best].net_kg;
        o->heel_kg = c[best].heel_kg;
        o->containers = best_n;
        o->ordered_usable_kg = best_n * (c[best].net_kg - c[best].heel_kg);
    } else {
        o->no_container = o->demand_kg > 0;
        o->ordered_usable_kg = o->to_order_kg; /* bought in bulk */
    }
}

/* One month line of one item: takes the line (month, item, first use, demand set) and the
 * books, which it moves on to the end of that month; fills the line's supply, order and
 * order-by figures (late when ordered after today_min; today_min < 0: no today). */
static void plan_line(const struct ord_container *c, int nc, int64_t today_min, struct books *b,
                      struct ord_line *o)
{
    double *stock = b->stock;
    const double *lead = b->lead;
    const struct ord_supply *sv = b->sv;
    int *next = b->next;
    const int *first_sup = b->first;
    int it = o->item;
    /* deliveries of earlier months (without a line of this item) are stock by now */
    while (next[it] < first_sup[it + 1] && isodate_month_index(sv[next[it]].when_min) < o->month_index)
        stock[it] += sv[next[it]++].kg;
    while (next[it] < first_sup[it + 1] && isodate_month_index(sv[next[it]].when_min) == o->month_index) {
        const struct ord_supply *p = &sv[next[it]++];
        if (p->received)
            o->received_kg += p->kg;
        else
            o->on_order_kg += p->kg;
    }
    o->stock_start_kg = stock[it];
    o->safety_kg = b->safety[it];
    double have = o->stock_start_kg + o->received_kg + o->on_order_kg;
    double need = o->demand_kg + o->safety_kg - have;
    double scale = o->demand_kg + o->safety_kg + fabs(have);
    o->to_order_kg = need > REL_EPS * scale ? need : 0;

    pick_container(c, nc, o);
    o->stock_end_kg = have + o->ordered_usable_kg - o->demand_kg;
    stock[it] = o->stock_end_kg;

    /* whole lead days, rounded up: a fractional day moves the date earlier */
    int64_t lead_d = (int64_t)ceil(lead[it] - REL_EPS);
    if (lead_d < 0)
        lead_d = 0;
    o->order_by_min = day_start(o->first_use_min) - lead_d * DAY_MIN;
    o->late = today_min >= 0 && o->to_order_kg > 0 && o->order_by_min < today_min;
}

enum hl_status ord_plan_supply(const struct ord_demand *d, int nd,
                               const struct ord_stock *s, int ns,
                               const struct ord_container *c, int nc,
                               const struct ord_supply *sup, int nsup,
                               int64_t today_min, struct ord_line **out, int *nout,
                               struct hl_err *e)
{
    if (!out || !nout || nd < 0 || ns < 0 || nc < 0 || nsup < 0 || (nd && !d) || (ns && !s) ||
        (nc && !c) || (nsup && !sup))
        return hl_err_set(e, HL_ERR_INPUT, "ord_plan: bad arguments");
    for (int i = 0; i < nsup; i++)
        if (sup[i].item < 0 || sup[i].item >= RG_COUNT || !(sup[i].kg >= 0) || !isfinite(sup[i].kg))
            return hl_err_set(e, HL_ERR_INPUT, "delivery %d: item %d, kg %g not valid", i,
                              sup[i].item, sup[i].kg);
    *out = NULL;
    *nout = 0;
    enum hl_status st = check(d, nd, s, ns, c, nc, e);
    if (st)
        return st;
    if (nd == 0)
        return HL_OK;

    struct ord_line *L = NULL;
    int ng = 0;
    if ((st = group_demand(d, nd, &L, &ng, e)))
        return st;
    struct books b;
    if ((st = open_books(s, ns, sup, nsup, &b, e))) {
        hl_free(L);
        return st;
    }
    /* Groups are in month order, so the stock of each item carries forward. */
    for (int g = 0; g < ng; g++)
        plan_line(c, nc, today_min, &b, &L[g]);
    hl_free(b.sv);
    *out = L;
    *nout = ng;
    return HL_OK;
}

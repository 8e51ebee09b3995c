/* test_orders.c - monthly demand, stock carried over, whole containers and order-by
 * dates against hand calculations and calendar facts. */
#include "cu_helpers.h"
#include "hlerr.h"
#include "hlmem.h"
#include "isodate.h"
#include "orders.h"
#include "reagents.h"

static int64_t t(const char *s)
{
    int64_t m = 0;
    CU_ASSERT_EQUAL(isodate_parse(s, &m, NULL), 0);
    return m;
}

/* ton container 907 kg net with a 9 kg heel: 898 kg usable (design section 3 example) */
static const struct ord_container ton = {RG_CL2, "ton container", 907, 9};

static enum hl_status plan(const struct ord_demand *d, int nd, const struct ord_stock *s, int ns,
                           const struct ord_container *c, int nc, int64_t today,
                           struct ord_line **out, int *n)
{
    struct hl_err e;
    hl_err_clear(&e);
    return ord_plan(d, nd, s, ns, c, nc, today, out, n, &e);
}

static void rounding(void)
{
    /* exact multiple: 2694 kg = 3 x 898, built from ten 269.4 kg charges whose floating
     * sum is 2694.0000000000005 - still 3 containers; 1 kg more needs a fourth */
    struct ord_demand d[11];
    for (int i = 0; i < 10; i++)
        d[i] = (struct ord_demand){RG_CL2, t("2027-03-02T06:00") + 1440LL * i, 269.4};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(d, 10, NULL, 0, &ton, 1, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(n, 1);
    CU_ASSERT(o[0].demand_kg > 2694); /* the round-off this case is about */
    ASSERT_REL(o[0].demand_kg, 2694, 1e-12);
    CU_ASSERT_EQUAL(o[0].containers, 3);
    ASSERT_REL(o[0].ordered_usable_kg, 2694, 1e-12); /* heel excluded: 3 x (907 - 9) */
    ASSERT_ABS(o[0].stock_end_kg, 0, 1e-9);
    CU_ASSERT_STRING_EQUAL(o[0].container, "ton container");
    ASSERT_ABS(o[0].net_kg, 907, 0);
    ASSERT_ABS(o[0].heel_kg, 9, 0);
    hl_free(o);
    d[10] = (struct ord_demand){RG_CL2, t("2027-03-20"), 1};
    CU_ASSERT_EQUAL(plan(d, 11, NULL, 0, &ton, 1, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(o[0].containers, 4);
    ASSERT_REL(o[0].stock_end_kg, 4 * 898 - 2695, 1e-12);
    hl_free(o);
}

static void safety_and_carry(void)
{
    /* design section 3 stock: 450 kg on hand, 300 kg safety, 10 days lead.
     * March 500 kg: to order 500 + 300 - 450 = 350 -> 1 ton, end 450 + 898 - 500 = 848.
     * April 1000 kg: 1000 + 300 - 848 = 452 -> 1 ton, end 848 + 898 - 1000 = 746.
     * May 200 kg: 200 + 300 - 746 < 0 -> nothing, end 546. */
    struct ord_demand d[] = {{RG_CL2, t("2027-04-05T06:00"), 600}, {RG_CL2, t("2027-03-02T06:00"), 500},
                             {RG_CL2, t("2027-05-10"), 200}, {RG_CL2, t("2027-04-20"), 400}};
    struct ord_stock s = {RG_CL2, 450, 300, 10};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(d, 4, &s, 1, &ton, 1, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(n, 3);
    if (n == 3) {
        ASSERT_REL(o[0].to_order_kg, 350, 1e-12);
        CU_ASSERT_EQUAL(o[0].containers, 1);
        ASSERT_REL(o[0].stock_end_kg, 848, 1e-12);
        ASSERT_REL(o[1].stock_start_kg, 848, 1e-12);
        ASSERT_REL(o[1].demand_kg, 1000, 1e-12);
        ASSERT_REL(o[1].to_order_kg, 452, 1e-12);
        CU_ASSERT_EQUAL(o[1].containers, 1);
        ASSERT_REL(o[1].stock_end_kg, 746, 1e-12);
        ASSERT_ABS(o[2].to_order_kg, 0, 0);
        CU_ASSERT_EQUAL(o[2].containers, 0);
        ASSERT_REL(o[2].stock_end_kg, 546, 1e-12);
        ASSERT_ABS(o[0].safety_kg, 300, 0);
        CU_ASSERT_EQUAL(o[0].month_index, 2027 * 12 + 2);
        CU_ASSERT_EQUAL(o[1].first_use_min, t("2027-04-05T06:00"));
        /* 2027-03-02 minus 10 days = 2027-02-20 (February 2027 has 28 days) */
        CU_ASSERT_EQUAL(o[0].order_by_min, t("2027-02-20"));
        CU_ASSERT_EQUAL(o[1].order_by_min, t("2027-03-26"));
    }
    hl_free(o);
}

static void dates(void)
{
    struct ord_demand d[] = {{RG_CL2, t("2027-01-03T06:00"), 100}, {RG_BR2, t("2028-03-05T22:00"), 100},
                             {RG_SO2CL2, t("2027-03-02T06:00"), 100}};
    struct ord_stock s[] = {{RG_CL2, 0, 0, 10}, {RG_BR2, 0, 0, 5}, {RG_SO2CL2, 0, 0, 1.5}};
    struct ord_container c[] = {ton, {RG_BR2, "drum", 300, 2}, {RG_SO2CL2, "drum", 250, 5}};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(d, 3, s, 3, c, 3, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(n, 3);
    if (n == 3) {
        /* year boundary: 2027-01-03 - 10 d = 2026-12-24 */
        CU_ASSERT_EQUAL(o[0].order_by_min, t("2026-12-24"));
        /* fractional lead 1.5 d rounds up to 2 d (earlier): 2027-03-02 -> 2027-02-28 */
        CU_ASSERT_EQUAL(o[1].item, RG_SO2CL2);
        CU_ASSERT_EQUAL(o[1].order_by_min, t("2027-02-28"));
        /* leap year (Gregorian: 2028 divisible by 4): 2028-03-05 - 5 d = 2028-02-29 */
        CU_ASSERT_EQUAL(o[2].order_by_min, t("2028-02-29"));
    }
    hl_free(o);
}

static void late_flag(void)
{
    struct ord_demand d = {RG_CL2, t("2027-03-02T06:00"), 500};
    struct ord_stock s = {RG_CL2, 0, 0, 10}; /* order by 2027-02-20 */
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(&d, 1, &s, 1, &ton, 1, t("2027-02-21"), &o, &n), HL_OK);
    CU_ASSERT_EQUAL(o[0].late, 1);
    hl_free(o);
    CU_ASSERT_EQUAL(plan(&d, 1, &s, 1, &ton, 1, t("2027-02-20"), &o, &n), HL_OK);
    CU_ASSERT_EQUAL(o[0].late, 0); /* on the day is still in time */
    hl_free(o);
    CU_ASSERT_EQUAL(plan(&d, 1, &s, 1, &ton, 1, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(o[0].late, 0); /* no today: no check */
    hl_free(o);
    s.on_hand_kg = 1000; /* nothing to order: never late */
    CU_ASSERT_EQUAL(plan(&d, 1, &s, 1, &ton, 1, t("2027-03-01"), &o, &n), HL_OK);
    CU_ASSERT_EQUAL(o[0].late, 0);
    hl_free(o);
}

static void no_container(void)
{
    /* NBS has no container: the shortfall is taken as a bulk buy, flagged */
    struct ord_demand d[] = {{RG_NBS, t("2027-03-02"), 120}, {RG_NBS, t("2027-04-02"), 80}};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(d, 2, NULL, 0, &ton, 1, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(n, 2);
    CU_ASSERT_EQUAL(o[0].no_container, 1);
    CU_ASSERT_EQUAL(o[0].containers, 0);
    CU_ASSERT_PTR_NULL(o[0].container);
    ASSERT_REL(o[0].ordered_usable_kg, 120, 1e-12);
    ASSERT_ABS(o[0].stock_end_kg, 0, 1e-12);
    ASSERT_REL(o[1].to_order_kg, 80, 1e-12);
    ASSERT_ABS(o[1].order_by_min, t("2027-04-02"), 0); /* no stock row: lead 0 */
    hl_free(o);
}

static void container_choice(void)
{
    /* 350 kg: one ton container (898 usable) against six 68 kg cylinders with a 0.5 kg
     * heel (67.5 usable): fewer container change-overs win -> one ton container */
    struct ord_container c[] = {ton, {RG_CL2, "cylinder", 68, 0.5}, {RG_CL2, "half", 449, 0},
                                {RG_CL2, "quarter", 224.5, 0}};
    struct ord_demand d = {RG_CL2, t("2027-03-02"), 350};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, c, 2, -1, &o, &n), HL_OK);
    CU_ASSERT_STRING_EQUAL(o[0].container, "ton container");
    CU_ASSERT_EQUAL(o[0].containers, 1);
    ASSERT_REL(o[0].ordered_usable_kg, 898, 1e-12);
    hl_free(o);
    /* 50 kg: one ton container or one cylinder: same count, the cylinder wastes less */
    d.kg = 50;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, c, 2, -1, &o, &n), HL_OK);
    CU_ASSERT_STRING_EQUAL(o[0].container, "cylinder");
    CU_ASSERT_EQUAL(o[0].containers, 1);
    ASSERT_REL(o[0].ordered_usable_kg, 67.5, 1e-12);
    hl_free(o);
    /* 898 kg: half 449 (2) or quarter 224.5 (4): fewer containers; with the ton (1) in
     * the list, the ton */
    d.kg = 898;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, c + 2, 2, -1, &o, &n), HL_OK);
    CU_ASSERT_STRING_EQUAL(o[0].container, "half");
    CU_ASSERT_EQUAL(o[0].containers, 2);
    hl_free(o);
    struct ord_container c2[] = {c[3], c[2], c[0]};
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, c2, 3, -1, &o, &n), HL_OK);
    CU_ASSERT_STRING_EQUAL(o[0].container, "ton container");
    CU_ASSERT_EQUAL(o[0].containers, 1);
    hl_free(o);
    /* equal count and equal excess: the first listed */
    struct ord_container c3[] = {{RG_CL2, "drum A", 100, 0}, {RG_CL2, "drum B", 100, 0}};
    d.kg = 150;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, c3, 2, -1, &o, &n), HL_OK);
    CU_ASSERT_STRING_EQUAL(o[0].container, "drum A");
    hl_free(o);
}

static void sorting_and_months(void)
{
    /* lines in month then item order; demands in December 2026 and January 2027 */
    struct ord_demand d[] = {{RG_NAOH, t("2027-01-10"), 2000}, {RG_BR2, t("2026-12-30"), 10},
                             {RG_CL2, t("2027-01-02"), 5},     {RG_CL2, t("2026-12-01"), 5},
                             {RG_BR2, t("2027-01-31T23:59"), 7}, {RG_BR2, t("2026-12-02"), 3}};
    struct ord_container c[] = {ton, {RG_BR2, "drum", 300, 2}, {RG_NAOH, "IBC", 1500, 10}};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(d, 6, NULL, 0, c, 3, -1, &o, &n), HL_OK);
    CU_ASSERT_EQUAL(n, 5);
    if (n == 5) {
        CU_ASSERT(o[0].month_index == 2026 * 12 + 11 && o[0].item == RG_CL2);
        CU_ASSERT(o[1].month_index == 2026 * 12 + 11 && o[1].item == RG_BR2);
        ASSERT_REL(o[1].demand_kg, 13, 1e-12);
        CU_ASSERT_EQUAL(o[1].first_use_min, t("2026-12-02"));
        CU_ASSERT(o[2].month_index == 2027 * 12 && o[2].item == RG_CL2);
        CU_ASSERT(o[3].month_index == 2027 * 12 && o[3].item == RG_BR2);
        /* December's drum (298 usable) still covers January's 7 kg */
        ASSERT_REL(o[3].stock_start_kg, 298 - 13, 1e-12);
        CU_ASSERT_EQUAL(o[3].containers, 0);
        /* caustic make-up: 2000 kg in 1490 kg IBCs -> 2 */
        CU_ASSERT(o[4].item == RG_NAOH && o[4].containers == 2);
    }
    hl_free(o);
    /* no demand: no lines, nothing allocated */
    o = (struct ord_line *)&n;
    CU_ASSERT_EQUAL(plan(NULL, 0, NULL, 0, NULL, 0, -1, &o, &n), HL_OK);
    CU_ASSERT(o == NULL && n == 0);
}

static void bad_inputs(void)
{
    struct ord_demand d = {RG_CL2, t("2027-03-02"), 100};
    struct ord_container bad = {RG_CL2, "x", 10, 10}; /* heel = net: nothing usable */
    struct ord_stock s2[] = {{RG_CL2, 0, 0, 1}, {RG_CL2, 5, 0, 1}};
    struct ord_line *o;
    int n;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, &bad, 1, -1, &o, &n), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(plan(&d, 1, s2, 2, &ton, 1, -1, &o, &n), HL_ERR_INPUT);
    d.kg = -1;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, &ton, 1, -1, &o, &n), HL_ERR_INPUT);
    d.kg = 1;
    d.item = RG_COUNT;
    CU_ASSERT_EQUAL(plan(&d, 1, NULL, 0, &ton, 1, -1, &o, &n), HL_ERR_INPUT);
}

static void alloc_failures(void)
{
    struct ord_demand d[] = {{RG_CL2, t("2027-03-02"), 100}, {RG_BR2, t("2027-04-02"), 100}};
    struct ord_line *o = NULL;
    int n = 0, ok = 0, fails = 0;
    for (long k = 1; k < 20 && !ok; k++) {
        hl_mem_fail_at(k);
        enum hl_status st = plan(d, 2, NULL, 0, &ton, 1, -1, &o, &n);
        hl_mem_fail_at(0);
        if (st == HL_OK) {
            ok = 1;
            CU_ASSERT_EQUAL(n, 2);
            hl_free(o);
        } else {
            fails++;
            CU_ASSERT_EQUAL(st, HL_ERR_NOMEM);
            CU_ASSERT(o == NULL && n == 0);
        }
    }
    CU_ASSERT(ok);
    CU_ASSERT_EQUAL(fails, 2); /* the sort buffer and the lines */
}

static void supplies(void)
{
    /* 450 kg on hand, 300 kg safety, 10 days lead; demand 500 kg in March, 1500 kg in April.
     * A delivery received 2027-02-15 (no February line) is carried into March's stock:
     * 450 + 100 = 550.  A placed order of 400 kg due 2027-03-20 counts in March:
     * 500 + 300 - 550 - 400 = -150, nothing to order, so not late on 2027-03-01 although the
     * order-by date 2027-02-28 has passed; March ends at 550 + 400 - 500 = 450.  April:
     * 1500 + 300 - 450 - 898 (received 2027-04-05) = 452 -> 1 ton container of 898 usable;
     * end 450 + 898 + 898 - 1500 = 746. */
    struct ord_demand d[2] = {{RG_CL2, t("2027-03-10T06:00"), 500}, {RG_CL2, t("2027-04-08T06:00"), 1500}};
    struct ord_stock s = {RG_CL2, 450, 300, 10};
    struct ord_supply sup[3] = {{RG_CL2, t("2027-04-05"), 898, 1}, {RG_CL2, t("2027-03-20"), 400, 0},
                                {RG_CL2, t("2027-02-15"), 100, 1}};
    struct ord_line *o;
    int n;
    struct hl_err e;
    hl_err_clear(&e);
    CU_ASSERT_EQUAL(ord_plan_supply(d, 2, &s, 1, &ton, 1, sup, 3, t("2027-03-01"), &o, &n, &e), HL_OK);
    CU_ASSERT_EQUAL(n, 2);
    if (n != 2)
        return;
    ASSERT_ABS(o[0].stock_start_kg, 550, 1e-9);
    ASSERT_ABS(o[0].on_order_kg, 400, 0);
    ASSERT_ABS(o[0].received_kg, 0, 0);
    ASSERT_ABS(o[0].to_order_kg, 0, 0);
    CU_ASSERT_EQUAL(o[0].late, 0);
    ASSERT_ABS(o[0].stock_end_kg, 450, 1e-9);
    ASSERT_ABS(o[1].stock_start_kg, 450, 1e-9);
    ASSERT_ABS(o[1].received_kg, 898, 0);
    ASSERT_ABS(o[1].to_order_kg, 452, 1e-9);
    CU_ASSERT_EQUAL(o[1].containers, 1);
    ASSERT_ABS(o[1].stock_end_kg, 746, 1e-9);
    hl_free(o);
    /* without the placed order March is short (500 + 300 - 550 = 250) and late */
    CU_ASSERT_EQUAL(ord_plan_supply(d, 2, &s, 1, &ton, 1, sup, 1, t("2027-03-01"), &o, &n, &e), HL_OK);
    ASSERT_ABS(o[0].to_order_kg, 350, 1e-9); /* the February delivery is left out too: 500 + 300 - 450 */
    CU_ASSERT_EQUAL(o[0].late, 1);
    hl_free(o);
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"container rounding", rounding},
        {"safety stock and carry-over", safety_and_carry},
        {"order-by dates", dates},
        {"late flag", late_flag},
        {"no container", no_container},
        {"container choice", container_choice},
        {"sorting and months", sorting_and_months},
        {"bad inputs", bad_inputs},
        {"allocation failures", alloc_failures},
        {"placed and received deliveries", supplies}};
    return CU_RUN_ALL("orders", cases);
}

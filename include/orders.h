/*
 * orders.h - monthly demand, stock carried over, whole containers, order-by dates.
 *
 * Per month and item (design section 4): to order = demand + safety - stock
 * carried in; containers = ceil(to order / (net - heel)); order-by = first use
 * in the month - lead days.  Stock carried into the next month = stock at the
 * start + usable content ordered - demand.  Items are enum reagent_id values;
 * RG_NAOH is the caustic make-up for scrubber changeouts.
 *
 * Choices (see orders.c): of several containers for an item the one needing the
 * fewest containers wins, a tie goes to the least usable excess, then list order;
 * without a container the amount is taken as bought in bulk (flag no_container);
 * fractional lead days round up (earlier order-by); `late` needs something to order, so an
 * order already placed that covers the month is never late.
 */
#ifndef ORDERS_H
#define ORDERS_H

#include <stdint.h>
#include "hlerr.h"

struct ord_demand { int item; int64_t when_min; double kg; };
struct ord_stock { int item; double on_hand_kg, safety_kg, lead_days; };
struct ord_container { int item; const char *name; double net_kg, heel_kg; };
/* A delivery already placed (ordered: due on when_min) or received on when_min [kg usable]. */
struct ord_supply { int item; int64_t when_min; double kg; int received; };

struct ord_line {
    int month_index;            /* isodate_month_index */
    int item;
    double demand_kg, stock_start_kg, safety_kg, to_order_kg;
    const char *container;      /* borrowed from the ord_container given; NULL when none defined */
    double net_kg, heel_kg;
    int containers;
    double ordered_usable_kg, stock_end_kg;
    double on_order_kg;         /* orders already placed, due this month */
    double received_kg;         /* deliveries received this month */
    int64_t first_use_min, order_by_min;
    int late;                   /* order_by before today (when today given) */
    int no_container;           /* demand but no container defined: containers = 0, warning */
    /* Filled by the ledger from the runs' gas withdrawal (thermal.h), 0 from ord_plan: the most
     * containers of this item on line at once in this month (overlapping runs add up) and the
     * first minute it is reached. A count of containers connected, which can exceed those used. */
    int peak_on_line;
    int64_t peak_on_line_min;
};

/* Plan orders. demands in any order (sorted inside, O(n log n)). Items without a
 * stock row start at 0 kg with 0 safety and 0 lead days. today_min < 0 = no lateness
 * check. *out (owned, hl_free) gets one line per month and item with demand, in
 * month then item order. */
enum hl_status ord_plan(const struct ord_demand *d, int nd,
                        const struct ord_stock *s, int ns,
                        const struct ord_container *c, int nc,
                        int64_t today_min, struct ord_line **out, int *nout,
                        struct hl_err *e);

/* ord_plan with deliveries already placed or received (any order, O(n log n)): a supply in
 * a month with a line counts there (on_order_kg or received_kg) toward to order; one in a
 * month without a line of its item is carried into the stock of the item's next line.
 * to order = demand + safety - stock carried in - received - on order (>= 0); stock carried
 * out = stock in + received + on order + ordered usable - demand. */
enum hl_status ord_plan_supply(const struct ord_demand *d, int nd,
                               const struct ord_stock *s, int ns,
                               const struct ord_container *c, int nc,
                               const struct ord_supply *sup, int nsup,
                               int64_t today_min, struct ord_line **out, int *nout,
                               struct hl_err *e);

#endif

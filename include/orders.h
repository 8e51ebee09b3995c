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
 * fractional lead days round up (earlier order-by); `late` needs something to order.
 */
#ifndef ORDERS_H
#define ORDERS_H

#include <stdint.h>
#include "hlerr.h"

struct ord_demand { int item; int64_t when_min; double kg; };
struct ord_stock { int item; double on_hand_kg, safety_kg, lead_days; };
struct ord_container { int item; const char *name; double net_kg, heel_kg; };

struct ord_line {
    int month_index;            /* isodate_month_index */
    int item;
    double demand_kg, stock_start_kg, safety_kg, to_order_kg;
    const char *container;      /* borrowed from the ord_container given; NULL when none defined */
    double net_kg, heel_kg;
    int containers;
    double ordered_usable_kg, stock_end_kg;
    int64_t first_use_min, order_by_min;
    int late;                   /* order_by before today (when today given) */
    int no_container;           /* demand but no container defined: containers = 0, warning */
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

#endif

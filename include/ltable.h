/*
 * ltable.h - the ledger's output tables as column lists, one per table, read by both
 * writers (json_out.c, xlsx_out.c), so that a field is one entry and the JSON ledger and
 * the workbook cannot drift apart.
 *
 * A table (struct lt_table) is a list of columns (struct lt_col).  Each entry names:
 *   key    its JSON key (NULL: a sheet-only column);
 *   head   its sheet header with the unit in brackets (NULL: JSON only);
 *   kind   what the value is and the number format the sheet shows it in;
 *   a getter: `get`, or, without one, the double (LT_IFIELD: int) at byte offset `off` of the
 *          table's record (`rec`).
 * The list is in JSON key order, which is public (design section 5: extend, never rename
 * or reorder), so the JSON writer writes the keyed entries as listed.  The sheet takes the
 * entries with a header in list order too, unless an entry gives its sheet column: `col`
 * (1 = the first column) places it there and the entries after it follow it.  Where the
 * two orders agree no entry gives a column; lt_sheet_order checks that the columns of a
 * table come out 1..n, each once (tests/unit/test_ltable.c holds every table to it).
 *
 * One value (struct lt_val), two renderings:
 *   LT_V_NUM   a number (JSON number; sheet cell in `kind`'s format, summed when LT_TOTAL)
 *   LT_V_TEXT  text (JSON string; sheet text cell)
 *   LT_V_DATE  plant minutes (JSON "2027-03-02T06:00", date only for LT_DAY; sheet date)
 *   LT_V_BOOL  true/false (sheet "yes"/"no"; an alarm column LT_ALARM/LT_NOTICE shows the
 *              marker and the raised word, `raised` or the value's own text, or "no")
 *   LT_V_RUNS  run indices (JSON array of run ids; sheet the ids joined, cut at `cap` bytes)
 *   LT_V_NULL  JSON null; the sheet shows the value's text, else the column's `none`, else
 *              leaves the cell blank
 *   LT_V_ABSENT the key is left out of the JSON object; blank cell
 *   LT_V_BAD   the JSON writer refuses the record (the value's text says why); blank cell
 *
 * Beyond single values a list says, for the JSON side, where a record's objects begin and end
 * (an LT_OPEN entry, whose getter may make the object null, and an LT_CLOSE entry), where an
 * array of rows of another list sits (`sub`: runs[].reaction.steps), and a family: one entry
 * for a key and a column per vent species or salt (`each`, the member's name in the %s of key
 * and head).  A list can be a part of another's records: the lists of Waste by run, Liquor by
 * run, Reaction heat, Plan vs actual and Emissions by run are parts of each runs[] record,
 * placed in its key order by the Runs list (lt_runs) with a key-less `sub` entry.
 *
 * Each list and its sheet are the same rows: a sheet row per record (count), or per row j of
 * a record when the list has nsub (products of a run, routes of a month; 0 or 1 to take only
 * some records, as the runs with an actual).  Nothing here writes: the writers render the
 * values, and each keeps what is not a list (the Emissions by hour sheet and the records behind
 * it, notes, charts, the Summary, the rows a sheet adds that no record has).
 *
 * A form (Cautions) is a block of sheet rows per record: an LT_ROW entry is a row (its head
 * the row's name), each row of a `sub` array a row, and LT_FORM columns show what the row
 * gives (lt_form_rows counts them; see enum lt_flag).
 */
#ifndef LTABLE_H
#define LTABLE_H

#include <stddef.h>
#include <stdint.h>
#include "ledger.h"

/* Number kinds: the sheet format of each is in xlsx_out.c (xo_numfmt). */
enum lt_kind {
    LT_TEXT, LT_DATE, LT_DAY, LT_INT, LT_KG, LT_MOL, LT_FRAC, LT_MOLFRAC, LT_PCT, LT_RATE,
    LT_TEMP, LT_HEAT, LT_SCI, LT_GMOL, LT_LEN, LT_GEN, LT_PCT1, LT_KW, LT_NKIND
};

enum lt_vt { LT_V_NULL, LT_V_ABSENT, LT_V_NUM, LT_V_TEXT, LT_V_DATE, LT_V_BOOL, LT_V_RUNS,
             LT_V_BAD };

/* How the sheet sets a text cell: LT_S_COL the column's style (as a column: top-aligned,
 * wrapped when long), LT_S_WRAP wrapped, LT_S_TOP top-aligned, LT_S_BOLD_TOP bold and
 * top-aligned (the label of a block of rows). */
enum lt_style { LT_S_COL, LT_S_WRAP, LT_S_TOP, LT_S_BOLD_TOP };

struct lt_val {
    enum lt_vt t;
    double num;                 /* LT_V_NUM */
    int64_t min;                /* LT_V_DATE */
    int on;                     /* LT_V_BOOL */
    const char *text;           /* LT_V_TEXT: the text (never NULL); LT_V_NULL: the sheet's
                                 * text for it (NULL: the column's none); LT_V_BOOL: the
                                 * raised word (NULL: the column's raised) */
    enum lt_style style;        /* the sheet's text cell (LT_S_COL: the column's style) */
    const char *shown;          /* LT_V_TEXT: the sheet's words for an empty text (a value
                                 * without a unit: "dimensionless"); NULL: a blank */
    const int *runs; int nruns; /* LT_V_RUNS: indices into ledger.runs */
    int item;                   /* in: the member of a family entry (lt_each) */
    char buf[512];              /* text the getter formats (text may point here) */
};

enum lt_flag {
    LT_TOTAL = 1u,              /* the sheet sums the column (like things only) */
    LT_ALARM = 2u,              /* yes/no alarm column: "!! WORD" when raised */
    LT_NOTICE = 4u,             /* yes/no notice column: "! word" when raised */
    LT_CAUSTIC = 8u,            /* head is a format with one %s: the caustic basis */
    LT_IFIELD = 16u,            /* the field at off is an int, not a double */
    LT_OPEN = 32u,              /* JSON: opens the object `key`; a getter that gives LT_V_NULL
                                 * writes "key": null and leaves out its members */
    LT_CLOSE = 64u,             /* JSON: closes the object opened last */
    /* A form: a sheet of a block of rows per record (Cautions), not a row per record. */
    LT_ROW = 128u,              /* sheet: a row of the record's block, not a column */
    LT_FORM = 256u,             /* sheet-only column filled from the block's row: on a row
                                 * of a sub-table, its entry of the same header */
    LT_NAME = 512u,             /* LT_FORM column: on an LT_ROW entry's row, its header */
    LT_VALUE = 1024u            /* LT_FORM column: on an LT_ROW entry's row, its value */
};

/* A family entry stands for one column and one key per member: key and head are formats
 * with one %s for the member's name, the getter reads lt_val.item (and off the item-th
 * double of an array).  LT_EACH_RETAINED: the vent species that dissolve in the reaction
 * mass (reagents.h `retained`), item k the k-th of them (lt_retained gives its species).
 * LT_EACH_ELEMENT: the elements balanced (balance.h bal_elements), keyed by symbol.  A family
 * LT_OPEN entry (JSON only) opens an object per member, and the entries up to its LT_CLOSE
 * are written in each with the member as their item (runs[].element_balance.elements).
 * LT_EACH_CHARGED: the reagents a run can charge (RG_CL2 .. below RG_CHARGEABLE);
 * LT_EACH_OTHER_BASE: the scrubber bases after NaOH (RG_CHARGEABLE + 1 .. below RG_COUNT),
 * item k reagent RG_CHARGEABLE + 1 + k. */
enum lt_each { LT_ONE, LT_EACH_VENT, LT_EACH_SALT, LT_EACH_RETAINED, LT_EACH_ELEMENT,
               LT_EACH_CHARGED, LT_EACH_OTHER_BASE };

struct lt_table;

typedef void (*lt_get_fn)(const struct ledger *l, int i, int j, struct lt_val *v);

struct lt_col {
    const char *key;            /* JSON key; NULL: sheet only */
    const char *head;           /* sheet header; NULL: JSON only */
    enum lt_kind kind;
    unsigned flags;             /* enum lt_flag */
    int col;                    /* sheet column (1-based); 0: after the previous one */
    size_t off;                 /* without get: offset of the field in the record */
    lt_get_fn get;
    const char *raised, *none;  /* see lt_val */
    double width;               /* fixed sheet width in characters, 0 = from content */
    int cap;                    /* LT_V_RUNS: sheet text cut at cap bytes (0: 400) */
    enum lt_each each;
    enum lt_style style;        /* its sheet cells' style (text) */
    const struct lt_table *sub; /* JSON only: "key": [ a row object per sub->nsub(l, i) ];
                                 * without a key: sub's keyed entries written here, in this
                                 * record (a list that is a part of it) */
};

struct lt_table {
    const char *key;            /* the JSON member that holds the records */
    const char *path;           /* where they are in the ledger ("runs[].products") */
    const char *sheet;          /* the sheet the rows fill */
    const struct lt_col *cols; int ncols;
    int (*count)(const struct ledger *l);          /* records i = 0..count-1 */
    int (*nsub)(const struct ledger *l, int i);    /* rows j of record i; NULL: one */
    const void *(*rec)(const struct ledger *l, int i, int j); /* base of the off fields */
    /* rows j of record i under member item of a family object (scrubbers[].emissions.SPECIES
     * .years); NULL: nsub */
    int (*nsub_item)(const struct ledger *l, int i, int item);
    int bare;                   /* JSON: a row is the value of its one keyed entry, not an
                                 * object (scrubbers[].hourly.kmol_h) */
};

/* The tables: orders[] / Orders, scrubbers[] / Scrubber units (the record's scalars, then
 * JSON only hourly{}, spent[], column{}, stack_nm3_h, removal{}, emissions{}), permit_checks[] /
 * Permit checks, stock_checks[] / Stock checks, runs[].products[] / Products (i run,
 * j product), warnings[] / Warnings. */
extern const struct lt_table lt_orders, lt_scrubbers, lt_permit_checks, lt_stock_checks,
    lt_run_products, lt_warnings;
/* months[].products[] / Monthly yields (i month, j route); lists written inside each runs[]
 * record (i run): actual{} and variance{} / Plan vs actual (the runs with an actual),
 * reaction{} (with its steps[]) and withdrawal{} / Reaction heat, emissions_kg{} and
 * emissions_breakthrough_kg / Emissions by run. */
extern const struct lt_table lt_month_products, lt_run_actuals, lt_run_reaction, lt_run_emissions;
/* runs[].scrubber{} / Liquor by run (the runs routed to a scrubber): the liquor after each run. */
extern const struct lt_table lt_run_liquor;
/* byproducts{}, vent{}, retained{}, reagent_left_kg and losses{} / Waste by run. */
extern const struct lt_table lt_run_waste;
/* runs[] / Runs: the record's own keys, and where the lists above that are parts of it go. */
extern const struct lt_table lt_runs;
/* months[] / Monthly (the record's scalars, its objects and close{}; products[] is
 * lt_month_products). */
extern const struct lt_table lt_months;
/* scrubbers[].spent[] / Spent liquor (i unit, j charge drained). */
extern const struct lt_table lt_scrubber_spent;
/* scrubbers[].column{} (null without packing data) / Column check (the units with it). */
extern const struct lt_table lt_scrubber_column;
/* assumptions[] / Assumptions (the sheet puts a what-if's --set values above them). */
extern const struct lt_table lt_assumptions;
/* cautions[] / Cautions: a form (LT_ROW), a block of rows per substance in play; its limits[]
 * are rows of another list.  estimate_cautions[]: the rows after them, in the same columns. */
extern const struct lt_table lt_cautions, lt_estimate_cautions;
/* scrubbers[].hourly.kmol_h / Hourly load (i unit, j hour): the unit's load, hour by hour. */
extern const struct lt_table lt_scrubber_hourly;
/* All of them, for tests and tools that walk every table (LT_NTABLES entries). */
#define LT_NTABLES 20
extern const struct lt_table *const lt_tables[LT_NTABLES];

/* Value of member `item` (0 for a single entry) of column c of t for record i, row j (j = 0
 * without nsub) into *v. */
void lt_get(const struct lt_table *t, int c, int item, const struct ledger *l, int i, int j,
            struct lt_val *v);

/* Members of entry c: 1, or the family's (VS_COUNT vent species, SALT_COUNT salts, the
 * retained species). */
int lt_items(const struct lt_col *c);

/* The vent species of member k of LT_EACH_RETAINED, -1 past the last. */
int lt_retained(int k);

/* Sheet columns of t: column p (0-based) shows member item[p] of entry at[p]; a family's
 * members take consecutive columns.  Returns the number of columns, or -1 when the entries'
 * columns are not 1..n each once or more than max. */
int lt_sheet_order(const struct lt_table *t, int *at, int *item, int max);

/* Rows of record i's block in form t (ltable.h LT_ROW): a row per LT_ROW entry and per row
 * of each sub-table, in list order. */
int lt_form_rows(const struct lt_table *t, const struct ledger *l, int i);

/* Rows of t in its sheet: count, or the sum of nsub over the records. */
int lt_nrows(const struct lt_table *t, const struct ledger *l);

/* Header of member item of c into buf (the member's name, or the caustic basis for
 * LT_CAUSTIC, put in for its %s). */
void lt_head(const struct lt_col *c, int item, const struct ledger *l, char *buf, size_t n);

/* JSON key of member item of c into buf (the member's name put in for a family's %s). */
void lt_key(const struct lt_col *c, int item, char *buf, size_t n);

/* The basis of every "caustic solution bought" figure: "50 wt% NaOH" when the caustic units
 * buy one make-up strength, else "at each unit's make-up strength"; into buf. */
void lt_caustic_basis(const struct ledger *l, char *buf, size_t n);

/* Campaign spelling of a reagent or item (NaOH), "unknown" for a bad id (static text). */
const char *lt_item_name(int item);

#endif

/*
 * compare.h - what differs between two JSON ledgers (design section 5 keys): per month and
 * reagent (charged, to order, containers), per scrubber (peak, changeouts, NaOH, hottest
 * liquor, overload), per run present in both (charge, products, vent gas, NaOH), runs in
 * only one, and the warnings that appear or vanish.  The ledgers are read as cJSON trees;
 * a campaign is compared through the ledger it gives (main.c writes it first).
 */
#ifndef COMPARE_H
#define COMPARE_H

#include <cjson/cJSON.h>
#include "hlerr.h"

/* One difference: where ("month 2027-03 Cl2", "scrubber SC-A", "run IB-2", "warning"),
 * what ("charged_kg"), the two values as text ("-" when absent). */
struct cmp_diff { char where[96], what[48], a[64], b[64]; };

struct cmp_result { struct cmp_diff *d; int n, cap; };

/* Compare ledger a with ledger b; numbers differing by more than 1e-9 relative count.
 * *out filled (cmp_free). HL_ERR_INPUT when a tree is not a haloledger ledger. */
enum hl_status cmp_ledgers(const cJSON *a, const cJSON *b, struct cmp_result *out, struct hl_err *e);

/* The differences as a JSON document ("format": "haloledger-compare/1"); cJSON owned by
 * the caller. */
cJSON *cmp_to_json(const struct cmp_result *r, const char *a_name, const char *b_name);

/* The differences as a workbook at path (written there directly: the caller stages it with
 * afile_tmpname and commits it; tmpdir for the library's scratch files, NULL = default):
 * sheet Compared (the two inputs, the count, what is matched, the caution) and sheet
 * Differences (Where, What, A, B: the rows of cmp_to_json, numbers as numbers), printable. */
enum hl_status cmp_write_xlsx(const struct cmp_result *r, const char *a_name, const char *b_name,
                              const char *path, const char *tmpdir, struct hl_err *e);

/* Free the differences; the result is empty afterwards. */
void cmp_free(struct cmp_result *r);

#endif

/*
 * xlsx_out.h - the spreadsheet ledger (libxlsxwriter).
 *
 * Sheets, one table each: Summary (one-page form), Runs, Products, Liquor by
 * run, Scrubber units, Hourly load, Column check, Orders, Waste by run, Spent
 * liquor, Monthly, Monthly yields (per month and route: yield, conversion,
 * selectivity, halogen efficiency), Charts (series on plain number cells of Monthly), Warnings,
 * Cautions, Assumptions.  Every numeric column carries its unit in the header;
 * totals are formulas with their values cached, over like things only.  Each
 * sheet prints landscape on the ledger's paper with headers, footers and print
 * titles.  Written to a temporary file in the target folder and renamed into
 * place, so an existing file is never left half-written.
 */
#ifndef XLSX_OUT_H
#define XLSX_OUT_H

#include "hlerr.h"
#include "ledger.h"

/* Write the workbook to path atomically. HL_ERR_IO with a message on failure. */
enum hl_status xlsx_out_write(const struct ledger *l, const char *path, struct hl_err *e);
/* Same, choosing libxlsxwriter's streaming (constant_memory) mode: stream 1 = on,
 * 0 = off, -1 = automatic (on above about 1e6 cells, some 6000 runs).  Same content either way. */
enum hl_status xlsx_out_write_opt(const struct ledger *l, const char *path, int stream,
                                  struct hl_err *e);

#endif

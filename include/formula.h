/*
 * formula.h - molecular formulas as element-count vectors.
 *
 * Reads the plain notation chemists type into a campaign (C4H10, C6H5Cl,
 * C4H4BrNO2, CH3(CH2)2Cl, Ca(OCl)2), writes Hill order, and sums masses with
 * the standard atomic weights of elements.h.
 */
#ifndef FORMULA_H
#define FORMULA_H

#include <stddef.h>
#include "elements.h"
#include "hlerr.h"

struct formula {
    long n[EL_COUNT]; /* atoms of each element */
};

/* Parse text into *f. Element symbols, counts, parentheses (nested, with
 * multipliers). Rejects empty text, unknown symbols, zero counts, counts over
 * 1e6, unbalanced parentheses. On error returns HL_ERR_INPUT and sets e->col to
 * the 1-based column within text and e->msg. Also rejected: counts with a leading
 * zero, nesting deeper than 16, more than 1e9 atoms of one element, any other
 * character (spaces, charges, hydrate dots). *f is written only on success. */
enum hl_status formula_parse(const char *text, struct formula *f, struct hl_err *e);

/* Molar mass [g/mol]. */
double formula_molar_mass_g_mol(const struct formula *f);

/* Hill-order text (C, H, then alphabetical; alphabetical throughout without C)
 * into buf; truncated safely (always NUL-terminated when n > 0). Count 1 is not
 * written; a negative count (after formula_add) is written as is. Returns buf. */
char *formula_hill(const struct formula *f, char *buf, size_t n);

/* acc += times * f (times may be negative). */
void formula_add(struct formula *acc, const struct formula *f, long times);

/* 1 if the two formulas are equal. */
int formula_equal(const struct formula *a, const struct formula *b);

#endif

/*
 * fuzz_formula.c - libFuzzer target for the molecular-formula reader (formula.h).
 *
 * The input (up to its first NUL) is parsed with formula_parse.  A refused
 * string must carry a column inside the text and a reason.  An accepted one
 * must have a finite positive molar mass and at most 1e9 atoms of an
 * element, and (where every total is <= 1e6, what a written count may be)
 * its Hill-order text (formula_hill) must parse back to the same counts -
 * the round trip the writers and the balance rely on.  Any violation aborts (libFuzzer reports a crash).
 */
#include "formula.h"
#include "hlmem.h"

#include <math.h>
#include "fuzz_input.h"
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    char *text = fuzz_cstring(data, size);
    if (!text)
        return 0;
    size_t len = strlen(text);

    struct hl_err e;
    struct formula f;
    hl_err_clear(&e);
    enum hl_status st = formula_parse(text, &f, &e);
    if (st != HL_OK) {
        if (st != HL_ERR_INPUT || e.col < 1 || (size_t)e.col > len + 1 || !e.msg[0])
            abort();
        hl_free(text);
        return 0;
    }
    long atoms = 0, most = 0;
    for (int i = 0; i < EL_COUNT; i++) {
        if (f.n[i] < 0 || f.n[i] > 1000000000L) /* formula.c: at most 1e9 atoms of one element */
            abort();
        atoms += f.n[i];
        most = f.n[i] > most ? f.n[i] : most;
    }
    double mm = formula_molar_mass_g_mol(&f);
    if (atoms < 1 || !isfinite(mm) || mm <= 0)
        abort();

    /* Hill text round trip; a buffer large enough for every element with a long count.
     * Only where every total is a count the reader accepts as written (<= 1e6):
     * "(C1000)2000" is valid but its Hill text C2000000 is not. */
    if (most > 1000000L) {
        hl_free(text);
        return 0;
    }
    char hill[EL_COUNT * 24 + 1];
    formula_hill(&f, hill, sizeof hill);
    struct formula g;
    hl_err_clear(&e);
    if (formula_parse(hill, &g, &e) != HL_OK || !formula_equal(&f, &g))
        abort();
    hl_free(text);
    return 0;
}

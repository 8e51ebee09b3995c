/*
 * fuzz_smiles.c - libFuzzer target for the SMILES reader (smiles.h).
 *
 * The input (up to its first NUL) is parsed with smiles_parse.  A refused
 * string must carry a column inside the text (or 1 for an empty one) and a
 * reason.  An accepted molecule must survive the round trip the models rely
 * on: smiles_write gives a string that parses back to the same element counts
 * (hydrogens included), the same atom and bond counts, and - checked with
 * sites_same - the same constitution.  Symmetry classes are computed too (the
 * refinement loop sees every accepted graph).  Any violation aborts, which
 * libFuzzer reports as a crash; everything is freed (LeakSanitizer).
 */
#include "formula.h"
#include "hlmem.h"
#include "sites.h"
#include "smiles.h"

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
    struct smi_mol m, back;
    memset(&back, 0, sizeof back);
    hl_err_clear(&e);
    enum hl_status st = smiles_parse(text, &m, &e);
    if (st != HL_OK) {
        if (st != HL_ERR_INPUT && st != HL_ERR_NOMEM)
            abort();
        if (st == HL_ERR_INPUT && (e.col < 1 || (size_t)e.col > len + 1 || !e.msg[0]))
            abort();
        smiles_free(&m);
        hl_free(text);
        return 0;
    }
    if (m.natoms < 1)
        abort();

    int *cls = hl_malloc(sizeof *cls * (size_t)m.natoms);
    int ncls = 0;
    if (cls && sites_symmetry(&m, cls, &ncls, &e) == HL_OK) {
        if (ncls < 1 || ncls > m.natoms)
            abort();
        for (int i = 0; i < m.natoms; i++)
            if (cls[i] < 0 || cls[i] >= ncls)
                abort();
    }
    hl_free(cls);
    for (int i = 0; i < m.natoms; i++)
        (void)sites_class(&m, i);

    char *out = NULL;
    hl_err_clear(&e);
    st = smiles_write(&m, &out, &e);
    if (st == HL_OK) {
        hl_err_clear(&e);
        if (smiles_parse(out, &back, &e) != HL_OK)
            abort(); /* the writer produced a string the reader refuses */
        struct formula f1, f2;
        smiles_formula(&m, &f1);
        smiles_formula(&back, &f2);
        if (!formula_equal(&f1, &f2) || back.natoms != m.natoms || back.nbonds != m.nbonds)
            abort();
        hl_err_clear(&e);
        if (sites_same(&m, &back, &e) == 0)
            abort();
    } else if (st != HL_ERR_INPUT && st != HL_ERR_NOMEM) {
        abort();
    }
    hl_free(out);
    smiles_free(&back);
    smiles_free(&m);
    hl_free(text);
    return 0;
}

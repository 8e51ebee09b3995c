/* test_sites.c - site classes, symmetry classes, structure equality and product
 * structures.  Expected symmetry class counts are the orbits of each molecule's
 * constitutional symmetry (counted by hand; the same partitions are checked against
 * RDKit's CanonicalRankAtoms(breakTies=False) in tests/e2e/rdkit_chem.py). */
#include "cu_helpers.h"
#include "elements.h"
#include "hlmem.h"
#include "sites.h"
#include "smiles.h"

#include <string.h>

static int load(const char *s, struct smi_mol *m)
{
    struct hl_err e;
    int ok = smiles_parse(s, m, &e) == HL_OK;
    if (!ok)
        printf("\n  '%s': %s", s, e.msg);
    CU_ASSERT(ok); /* so every "if (load(...))" below has a failing branch */
    return ok;
}

static void classes(void)
{
    static const struct { const char *smi; int atom, cls; } t[] = {
        {"C", 0, SITE_PRIMARY},        {"CCC", 0, SITE_PRIMARY},     {"CCC", 1, SITE_SECONDARY},
        {"CC(C)C", 1, SITE_TERTIARY},  {"CC(C)(C)C", 0, SITE_PRIMARY}, {"CC(C)(C)C", 1, -1},
        {"Cc1ccccc1", 0, SITE_BENZYLIC}, {"Cc1ccccc1", 2, SITE_VINYL_ARYL},
        {"C=CC", 2, SITE_ALLYLIC},     {"C=CC", 0, SITE_VINYL_ARYL}, {"C=CC", 1, SITE_VINYL_ARYL},
        {"C1CCC=CC1", 2, SITE_ALLYLIC}, {"C1CCC=CC1", 0, SITE_SECONDARY},
        {"C=CCc1ccccc1", 2, SITE_BENZYLIC}, /* benzylic wins over allylic */
        {"CC=O", 1, SITE_VINYL_ARYL},  {"C#C", 0, SITE_VINYL_ARYL},  {"CCO", 1, SITE_PRIMARY},
        {"ClCCl", 1, SITE_PRIMARY},    {"CCc1ccncc1", 1, SITE_BENZYLIC}, {"OC(=O)C", 3, SITE_PRIMARY},
        {"C1=CC=CC=C1C", 6, SITE_BENZYLIC}, /* Kekule ring read as aromatic */
    };
    for (size_t i = 0; i < sizeof t / sizeof t[0]; i++) {
        struct smi_mol m;
        if (load(t[i].smi, &m)) {
            int c = sites_class(&m, t[i].atom);
            if (c != t[i].cls)
                printf("\n  %s atom %d: class %d, expected %d", t[i].smi, t[i].atom, c, t[i].cls);
            CU_ASSERT_EQUAL(c, t[i].cls);
        }
        smiles_free(&m);
    }
}

static void symmetry(void)
{
    static const struct { const char *smi; int ncls; } t[] = {
        {"CC(C)(C)C", 2}, {"C1CCCCC1", 1}, {"Cc1ccccc1", 5}, {"Cc1ccc(C)cc1", 3},
        {"CCc1ccccc1", 6}, {"CC(C)c1ccccc1", 6}, {"CC(C)C(C)C", 2}, {"C=CC", 3},
        {"C=CCC", 4}, {"C1CCC=CC1", 3}, {"CC(C)C", 2}, {"c1ccccc1", 1}, {"c1ccc2ccccc2c1", 3},
        {"CCCC", 2}, {"CCC(C)C", 4}, {"[13CH3]CC", 3}, {"C[N+](C)(C)C", 2}, {"OCC(O)CO", 4},
    };
    for (size_t i = 0; i < sizeof t / sizeof t[0]; i++) {
        struct smi_mol m;
        struct hl_err e;
        if (load(t[i].smi, &m)) {
            int cls[64], n = -1;
            CU_ASSERT_EQUAL(sites_symmetry(&m, cls, &n, &e), HL_OK);
            if (n != t[i].ncls)
                printf("\n  %s: %d classes, expected %d", t[i].smi, n, t[i].ncls);
            CU_ASSERT_EQUAL(n, t[i].ncls);
        }
        smiles_free(&m);
    }
    /* neopentane: the four methyls share a class, the centre differs */
    struct smi_mol m;
    struct hl_err e;
    int cls[8], n;
    if (load("CC(C)(C)C", &m)) {
        enum hl_status st = sites_symmetry(&m, cls, &n, &e);
        CU_ASSERT_EQUAL(st, HL_OK);
        CU_ASSERT(st == HL_OK && cls[0] == cls[2] && cls[0] == cls[3] && cls[0] == cls[4] && cls[0] != cls[1]);
    }
    smiles_free(&m);
}

static int same_of(const char *a, const char *b)
{
    struct smi_mol x, y;
    struct hl_err e;
    int r = -2;
    if (load(a, &x) && load(b, &y))
        r = sites_same(&x, &y, &e);
    smiles_free(&x);
    smiles_free(&y);
    return r;
}

static void equality(void)
{
    CU_ASSERT_EQUAL(same_of("CCCCl", "ClCCC"), 1);
    CU_ASSERT_EQUAL(same_of("CCCCl", "CC(Cl)C"), 0);
    CU_ASSERT_EQUAL(same_of("Cc1ccccc1", "C1=CC=CC=C1C"), 1);
    CU_ASSERT_EQUAL(same_of("Cc1ccccc1", "c1cccc(C)c1"), 1);
    CU_ASSERT_EQUAL(same_of("CC1CC1", "CC=CC"), 0);
    CU_ASSERT_EQUAL(same_of("CC1CC1", "C1CCC1"), 0);
    CU_ASSERT_EQUAL(same_of("Clc1ccc(C)cc1", "Cc1ccc(Cl)cc1"), 1);
    CU_ASSERT_EQUAL(same_of("Clc1ccc(C)cc1", "Cc1cccc(Cl)c1"), 0);
    CU_ASSERT_EQUAL(same_of("[13CH3]CC", "CC[13CH3]"), 1);
    CU_ASSERT_EQUAL(same_of("[13CH3]CC", "CCC"), 0);
    CU_ASSERT_EQUAL(same_of("C[C@H](Cl)CC", "CC(Cl)CC"), 1); /* stereo not represented */
    CU_ASSERT_EQUAL(same_of("C1CCC2CCCCC2C1", "C1CCC2C(C1)CCCC2"), 1);
    CU_ASSERT_EQUAL(same_of("C12C3C4C1C5C2C3C45", "C12C3C4C5C1C6C2C3C456"), 0);
}

static int product_is(const struct smi_mol *p, const char *expect)
{
    struct smi_mol x;
    struct hl_err e;
    int r = 0;
    if (load(expect, &x))
        r = sites_same(p, &x, &e) == 1;
    smiles_free(&x);
    if (!r) {
        char *w = NULL;
        smiles_write(p, &w, &e);
        printf("\n  product %s, expected %s", w ? w : "?", expect);
        hl_free(w);
    }
    return r;
}

static void products(void)
{
    struct smi_mol m, p;
    struct hl_err e;
    /* 1-butene C=CCC: allylic C3 gives 3-bromo-1-butene and, shifted, 1-bromo-2-butene */
    if (load("C=CCC", &m)) {
        int b[4], c[4];
        CU_ASSERT_EQUAL(sites_allyl_partners(&m, 2, b, c, 4), 1);
        CU_ASSERT(b[0] == 1 && c[0] == 0);
        if (sites_substitute(&m, 2, 1, EL_Br, &p, &e) == HL_OK)
            CU_ASSERT(product_is(&p, "C=CC(Br)C"));
        smiles_free(&p);
        if (sites_allyl_shift(&m, 2, 1, 0, EL_Br, &p, &e) == HL_OK)
            CU_ASSERT(product_is(&p, "BrCC=CC"));
        smiles_free(&p);
        /* HBr: Br on C1 (fewer heavy neighbours) */
        int ends[2], bd = smiles_find_bond(&m, 0, 1);
        CU_ASSERT_EQUAL(sites_hbr_br_ends(&m, bd, ends), 1);
        CU_ASSERT_EQUAL(ends[0], 0);
        if (sites_hbr_adduct(&m, &bd, ends, 1, &p, &e) == HL_OK)
            CU_ASSERT(product_is(&p, "BrCCCC"));
        smiles_free(&p);
    }
    smiles_free(&m);
    if (load("CC=CC", &m)) { /* symmetric: a tie, both ends */
        int ends[2];
        CU_ASSERT_EQUAL(sites_hbr_br_ends(&m, smiles_find_bond(&m, 1, 2), ends), 2);
    }
    smiles_free(&m);
    if (load("C", &m)) { /* methane -> CHCl3 */
        if (sites_substitute(&m, 0, 3, EL_Cl, &p, &e) == HL_OK)
            CU_ASSERT(product_is(&p, "ClC(Cl)Cl"));
        smiles_free(&p);
        CU_ASSERT_EQUAL(sites_substitute(&m, 0, 5, EL_Cl, &p, &e), HL_ERR_INTERNAL);
    }
    smiles_free(&m);
    if (load("Cc1ccccc1", &m)) {
        if (sites_substitute(&m, 0, 2, EL_Cl, &p, &e) == HL_OK)
            CU_ASSERT(product_is(&p, "ClC(Cl)c1ccccc1"));
        smiles_free(&p);
    }
    smiles_free(&m);
}

int main(void)
{
    static const struct cu_case cases[] = {{"site classes", classes}, {"symmetry classes", symmetry},
                                           {"structure equality", equality},
                                           {"product structures", products}};
    return CU_RUN_ALL("sites", cases);
}

/* test_smiles.c - the SMILES reader and writer against OpenSMILES v1.0 rules and
 * hand-computed formulas/masses from the CIAAW 2021 conventional atomic weights. */
#include "cu_helpers.h"
#include "elements.h"
#include "hlmem.h"
#include "sites.h"
#include "smiles.h"

#include <stdlib.h>
#include <string.h>

static int parse_ok(const char *s, struct smi_mol *m)
{
    struct hl_err e;
    hl_err_clear(&e);
    int st = smiles_parse(s, m, &e);
    if (st)
        printf("\n  parse '%s' failed at col %d: %s", s, e.col, e.msg);
    CU_ASSERT_EQUAL(st, HL_OK); /* so every "if (parse_ok(...))" below has a failing branch */
    return st == HL_OK;
}

/* Formula (Hill) and molar mass from the graph. Masses by hand from CIAAW 2021
 * conventional weights C 12.011, H 1.008, N 14.007, O 15.999, S 32.06, Cl 35.45, Br 79.904. */
static void formulas(void)
{
    static const struct { const char *smi, *hill; double mass; } t[] = {
        {"C", "CH4", 12.011 + 4 * 1.008},
        {"CCC", "C3H8", 3 * 12.011 + 8 * 1.008},
        {"c1ccccc1", "C6H6", 6 * 12.011 + 6 * 1.008},
        {"Cc1ccccc1", "C7H8", 7 * 12.011 + 8 * 1.008},
        {"c1ccncc1", "C5H5N", 5 * 12.011 + 5 * 1.008 + 14.007},
        {"c1cc[nH]c1", "C4H5N", 4 * 12.011 + 5 * 1.008 + 14.007},
        {"c1ccoc1", "C4H4O", 4 * 12.011 + 4 * 1.008 + 15.999},
        {"c1ccsc1", "C4H4S", 4 * 12.011 + 4 * 1.008 + 32.06},
        {"ClC(Cl)(Cl)Cl", "CCl4", 12.011 + 4 * 35.45},
        {"BrCC=C", "C3H5Br", 3 * 12.011 + 5 * 1.008 + 79.904},
        {"CS(=O)(=O)C", "C2H6O2S", 2 * 12.011 + 6 * 1.008 + 2 * 15.999 + 32.06},
        {"C[N+](C)(C)C", "C4H12N", 4 * 12.011 + 12 * 1.008 + 14.007},
        {"[NH4+]", "H4N", 14.007 + 4 * 1.008},
        {"[H]C([H])([H])[H]", "CH4", 12.011 + 4 * 1.008},
        {"N#N", "N2", 2 * 14.007},
        {"O=C=O", "CO2", 12.011 + 2 * 15.999},
        {"C1=CC=CC=C1", "C6H6", 6 * 12.011 + 6 * 1.008},
        {"[13CH4]", "CH4", 12.011 + 4 * 1.008},
        {"CC(=O)[O-]", "C2H3O2", 2 * 12.011 + 3 * 1.008 + 2 * 15.999},
        {"OP(O)(O)=O", "H3O4P", 3 * 1.008 + 4 * 15.999 + 30.974},
    };
    for (size_t i = 0; i < sizeof t / sizeof t[0]; i++) {
        struct smi_mol m;
        if (parse_ok(t[i].smi, &m)) {
            struct formula f;
            char buf[64];
            smiles_formula(&m, &f);
            formula_hill(&f, buf, sizeof buf);
            if (strcmp(buf, t[i].hill))
                printf("\n  %s: formula %s, expected %s", t[i].smi, buf, t[i].hill);
            CU_ASSERT_STRING_EQUAL(buf, t[i].hill);
            ASSERT_REL(smiles_molar_mass_g_mol(&m), t[i].mass, 1e-12);
        } else {
            CU_FAIL("parse");
        }
        smiles_free(&m);
    }
}

/* Implicit H (OpenSMILES normal valences; aromatic atoms give one unit to the pi system). */
static void hydrogens(void)
{
    static const struct { const char *smi; int atom, h; } t[] = {
        {"c1ccccc1", 0, 1}, {"c1ccncc1", 3, 0}, {"c1cc[nH]c1", 3, 1}, {"Cc1ccccc1", 1, 0},
        {"c1ccoc1", 3, 0},  {"c1ccsc1", 3, 0},  {"CN(C)C", 1, 0},      {"CN", 1, 2},
        {"CS(C)(=O)=O", 1, 0}, {"CP", 1, 2},    {"B", 0, 3},           {"C=C", 0, 2},
        {"C#C", 0, 1},      {"[CH2]C", 0, 2},   {"[C]", 0, 0},         {"CCl", 1, 0},
        {"c1ccc2ccccc2c1", 3, 0}, {"O", 0, 2},  {"S", 0, 2},           {"N(=O)(=O)C", 0, 0},
    };
    for (size_t i = 0; i < sizeof t / sizeof t[0]; i++) {
        struct smi_mol m;
        if (parse_ok(t[i].smi, &m)) {
            if (m.atoms[t[i].atom].hcount != t[i].h)
                printf("\n  %s atom %d: %d H, expected %d", t[i].smi, t[i].atom,
                       m.atoms[t[i].atom].hcount, t[i].h);
            CU_ASSERT_EQUAL(m.atoms[t[i].atom].hcount, t[i].h);
        } else {
            CU_FAIL("parse");
        }
        smiles_free(&m);
    }
}

static void brackets_rings_bonds(void)
{
    struct smi_mol m;
    if (parse_ok("[13CH3:7][C@@H](F)[O-]", &m)) {
        CU_ASSERT_EQUAL(m.atoms[0].isotope, 13);
        CU_ASSERT_EQUAL(m.atoms[0].hcount, 3);
        CU_ASSERT_EQUAL(m.atoms[0].aclass, 7);
        CU_ASSERT_EQUAL(m.atoms[1].hcount, 1);
        CU_ASSERT_EQUAL(m.atoms[3].charge, -1);
    }
    smiles_free(&m);
    struct hl_err e;
    CU_ASSERT_EQUAL(smiles_parse("[Fe+2].[Cl-]", &m, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(e.col, 7);
    smiles_free(&m);
    if (parse_ok("[Cu++]", &m))
        CU_ASSERT_EQUAL(m.atoms[0].charge, 2);
    smiles_free(&m);
    /* bond symbol on either side of a ring closure, same meaning */
    const char *same[] = {"C=1CCCCC1", "C1CCCCC=1", "C=1CCCCC=1"};
    for (int i = 0; i < 3; i++) {
        if (parse_ok(same[i], &m)) {
            int b = smiles_find_bond(&m, 0, 5);
            CU_ASSERT(b >= 0 && m.bonds[b].order == 2);
            CU_ASSERT_EQUAL(m.atoms[0].hcount, 1);
            CU_ASSERT_EQUAL(m.nbonds, 6);
        }
        smiles_free(&m);
    }
    /* %nn closures and digit reuse */
    if (parse_ok("C%12CC%12C1CC1", &m)) {
        CU_ASSERT_EQUAL(m.natoms, 6);
        CU_ASSERT_EQUAL(m.nbonds, 7);
        CU_ASSERT(m.atoms[0].in_ring && m.atoms[3].in_ring);
    }
    smiles_free(&m);
    /* / and \ are single bonds; biphenyl link is single, ring bonds aromatic */
    if (parse_ok("F/C=C\\F", &m))
        CU_ASSERT(m.bonds[0].order == 1 && m.bonds[1].order == 2 && m.bonds[2].order == 1);
    smiles_free(&m);
    if (parse_ok("c1ccccc1c1ccccc1", &m)) {
        int b = smiles_find_bond(&m, 5, 6);
        CU_ASSERT(b >= 0 && m.bonds[b].order == 1 && !m.bonds[b].in_ring);
        CU_ASSERT_EQUAL(m.bonds[0].order, SMI_AROMATIC);
    }
    smiles_free(&m);
    /* Kekule benzene ring becomes aromatic */
    if (parse_ok("C1=CC=CC=C1C", &m)) {
        CU_ASSERT(m.atoms[0].aromatic && !m.atoms[6].aromatic);
        CU_ASSERT_EQUAL(m.bonds[0].order, SMI_AROMATIC);
    }
    smiles_free(&m);
}

/* At least 100 nesting levels: 400 nested branches and a 400-deep ring chain. */
static void deep_nesting(void)
{
    enum { N = 400 };
    char *s = hl_malloc(4 * N + 8);
    CU_ASSERT_PTR_NOT_NULL_FATAL(s);
    size_t k = 0;
    for (int i = 0; i < N; i++) {
        s[k++] = 'C';
        s[k++] = '(';
    }
    s[k++] = 'C';
    for (int i = 0; i < N; i++)
        s[k++] = ')';
    s[k] = '\0';
    struct smi_mol m;
    if (parse_ok(s, &m)) {
        CU_ASSERT_EQUAL(m.natoms, N + 1);
        CU_ASSERT_EQUAL(m.nbonds, N);
        CU_ASSERT_EQUAL(m.atoms[0].hcount, 3);
        char *w = NULL;
        struct hl_err e;
        CU_ASSERT_EQUAL(smiles_write(&m, &w, &e), HL_OK);
        struct smi_mol m2;
        if (w && parse_ok(w, &m2))
            CU_ASSERT_EQUAL(sites_same(&m, &m2, &e), 1);
        smiles_free(&m2);
        hl_free(w);
    }
    smiles_free(&m);
    s[N] = '\0'; /* "C(C(...C(" unclosed: refused at the innermost '(' */
    struct hl_err e;
    CU_ASSERT_EQUAL(smiles_parse(s, &m, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(e.col, N);
    smiles_free(&m);
    hl_free(s);
}

/* Malformed strings, each refused with the 1-based column of the fault. */
static void malformed(void)
{
    static const struct { const char *smi; int col; } t[] = {
        {"", 1},              {"CC(", 3},           {"C1CCC", 2},        {"C11", 3},
        {"C(C", 2},           {")C", 1},            {"C==C", 3},         {"[Xx]", 2},
        {"Xy", 1},            {"[C+++++++++]", 3},  {"[999C]", 2},       {"[1234C]", 5},
        {"[3C]", 2},          {"C(C)(C)(C)(C)C", 1}, {"C.C", 2},         {"cc", 1},
        {"[C@@H", 1},         {"C$C", 2},           {"C12CC12", 7},      {"C=1CCCCC#1", 9},
        {"C(=)C", 3},         {"C()C", 3},          {"(C)C", 1},         {"=CC", 1},
        {"CC=", 3},           {"C=(C)C", 2},        {"C1CC1C1", 7},      {"C%1CC", 2},
        {"C%", 2},            {"CC C", 3},          {"C?C", 2},          {"[C", 1},
        {"[]", 2},            {"[C+16]", 3},        {"[CH4+-]", 5},      {"[C:]", 3},
        {"Q", 1},             {"ClC(Cl)(Cl)(Cl)Cl", 3}, {"FF(F)", 2},    {"C1CCCCC1:C", 9},
        {"[C@TH3]", 3},       {"[13]", 4},          {"C/C=C/", 6},       {"C(C)(", 5},
        {"C1C1", 4},          {"[CH5]", 1},         {"1CC", 1},          {"C(1)C", 3},
        /* found by fuzzing: explicit [H] atoms counted as bonds before they are folded */
        {"c1ccccc1([H])[H]", 7}, {"C1Cc1(C)[H]", 4},
        /* its carbon's double bond takes the pi unit, so the n is left without one (RDKit
         * reads it, with a radical n: this reader does not) */
        {"c1nc=1[H]", 3},
        /* no Kekule structure (RDKit: "Can't kekulize mol"): odd rings, a pyrrole N without
         * its H; the column is that of the system's first atom */
        {"Cc1cccc1", 2}, {"Cc1cc1", 2}, {"Cc1cccccc1", 2}, {"c1ccnc1", 1}, {"c1ccc2ccccc2cc1", 1},
        /* valences RDKit refuses: a neutral aromatic n with four bonds, [nH] with three */
        {"c1cn(C)(C)cc1", 4}, {"[nH](C)1cc1", 1},
    };
    int n = (int)(sizeof t / sizeof t[0]);
    CU_ASSERT(n >= 30);
    for (int i = 0; i < n; i++) {
        struct smi_mol m;
        struct hl_err e;
        hl_err_clear(&e);
        enum hl_status st = smiles_parse(t[i].smi, &m, &e);
        if (st != HL_ERR_INPUT || e.col != t[i].col)
            printf("\n  '%s': status %d col %d (%s), expected col %d", t[i].smi, st, e.col, e.msg,
                   t[i].col);
        CU_ASSERT_EQUAL(st, HL_ERR_INPUT);
        CU_ASSERT_EQUAL(e.col, t[i].col);
        CU_ASSERT(e.msg[0] != '\0');
        smiles_free(&m);
    }
}

/* Writer: what it writes reads back as the same structure (graph isomorphism). */
static void round_trip(void)
{
    const char *t[] = {"CCC(C)C", "C1CCC2CCCCC2C1", "c1ccc2ccccc2c1", "c1cc[nH]c1", "C=CC#N",
                       "C[N+](C)(C)C", "[13CH3]CC", "OC(=O)CCl", "C12C3C4C1C5C2C3C45",
                       "c1ccccc1-c1ccccc1", "CC(=O)[O-]", "C1CC2CCC1C2", "[2H]C", "S(=O)(=O)(O)O"};
    for (size_t i = 0; i < sizeof t / sizeof t[0]; i++) {
        struct smi_mol a, b;
        struct hl_err e;
        char *w = NULL;
        if (parse_ok(t[i], &a) && smiles_write(&a, &w, &e) == HL_OK && parse_ok(w, &b)) {
            int same = sites_same(&a, &b, &e);
            if (same != 1)
                printf("\n  %s -> %s not the same", t[i], w);
            CU_ASSERT_EQUAL(same, 1);
            smiles_free(&b);
        } else {
            CU_FAIL("round trip");
        }
        hl_free(w);
        smiles_free(&a);
    }
}

/* Every allocation failure inside parse + write returns NOMEM (valgrind: no leak). */
static void alloc_failures(void)
{
    const char *s = "CC(C)(C)c1ccc(cc1)C%10CC=CC%10";
    int ok_seen = 0;
    for (long n = 1; n < 400 && !ok_seen; n++) {
        struct smi_mol m;
        struct hl_err e;
        char *w = NULL;
        hl_mem_fail_at(n);
        long before = hl_mem_calls();
        enum hl_status st = smiles_parse(s, &m, &e);
        if (!st)
            st = smiles_write(&m, &w, &e);
        long used = hl_mem_calls() - before;
        hl_mem_fail_at(0);
        CU_ASSERT(st == HL_OK || st == HL_ERR_NOMEM);
        if (used < n) {
            CU_ASSERT_EQUAL(st, HL_OK);
            ok_seen = 1;
        }
        hl_free(w);
        smiles_free(&m);
    }
    CU_ASSERT(ok_seen);
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"formulas and masses", formulas}, {"implicit hydrogens", hydrogens},
        {"brackets, rings, bonds", brackets_rings_bonds}, {"deep nesting", deep_nesting},
        {"malformed strings", malformed}, {"writer round trip", round_trip},
        {"allocation failures", alloc_failures}};
    return CU_RUN_ALL("smiles", cases);
}

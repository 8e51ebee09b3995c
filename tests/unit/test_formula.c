/* test_formula.c - formula parsing, Hill order and molar masses.
 *
 * Every expected mass is written out by hand from the CIAAW 2021 abridged /
 * conventional standard atomic weights (Prohaska et al., Pure Appl. Chem. 94
 * (2022) 573): H 1.008, C 12.011, N 14.007, O 15.999, Na 22.990, Mg 24.305,
 * S 32.06, Cl 35.45, Ca 40.078, Br 79.904, I 126.90; the hand-rounded sum is
 * checked as well, so a wrong table entry and a wrong sum both show.
 */
#include "cu_helpers.h"
#include "formula.h"

#include <string.h>

static void weights_table(void)
{
    /* CIAAW 2021 abridged/conventional values */
    ASSERT_ABS(elem_weight_g_mol(EL_H), 1.008, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_C), 12.011, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_N), 14.007, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_O), 15.999, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_S), 32.06, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_Cl), 35.45, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_Br), 79.904, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_Na), 22.990, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_I), 126.90, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_Pb), 207.2, 0.0);
    ASSERT_ABS(elem_weight_g_mol(EL_COUNT), 0.0, 0.0);
    CU_ASSERT_EQUAL(elem_z(EL_Br), 35);
    CU_ASSERT_EQUAL(elem_z(EL_Bi), 83);
    CU_ASSERT_PTR_NULL(elem_symbol(-1));
    CU_ASSERT_PTR_NULL(elem_symbol(EL_COUNT));
    /* every row: symbol round-trips, weights rise with Z except the known
     * inversions Ar/K, Co/Ni, Te/I (a property of the published table) */
    for (int i = 0; i < EL_COUNT; i++) {
        const char *s = elem_symbol(i);
        CU_ASSERT_PTR_NOT_NULL_FATAL(s);
        CU_ASSERT_EQUAL(elem_lookup(s, strlen(s)), i);
        CU_ASSERT(elem_weight_g_mol(i) > 0.0);
        if (i > 0) {
            CU_ASSERT(elem_z(i) > elem_z(i - 1));
            int inverted = i == EL_K || i == EL_Ni || i == EL_I;
            CU_ASSERT((elem_weight_g_mol(i) > elem_weight_g_mol(i - 1)) != inverted);
        }
    }
    CU_ASSERT_EQUAL(elem_lookup("Cl2", 2), EL_Cl);
    CU_ASSERT_EQUAL(elem_lookup("cl", 2), -1);
    CU_ASSERT_EQUAL(elem_lookup("Xx", 2), -1);
    CU_ASSERT_EQUAL(elem_lookup("C", 0), -1);
    CU_ASSERT_EQUAL(elem_lookup(NULL, 1), -1);
}

struct mass_case {
    const char *text, *hill;
    double by_hand;  /* the sum written out with the CIAAW weights */
    double rounded;  /* the same sum done by hand, to 3 decimals */
};

static void masses(void)
{
    static const struct mass_case cases[] = {
        {"C4H10", "C4H10", 4 * 12.011 + 10 * 1.008, 58.124},
        {"C4H4BrNO2", "C4H4BrNO2", 4 * 12.011 + 4 * 1.008 + 79.904 + 14.007 + 2 * 15.999, 177.985},
        {"Cl2", "Cl2", 2 * 35.45, 70.900},
        {"Br2", "Br2", 2 * 79.904, 159.808},
        {"SO2Cl2", "Cl2O2S", 32.06 + 2 * 15.999 + 2 * 35.45, 134.958},
        {"HCl", "ClH", 1.008 + 35.45, 36.458},
        {"HBr", "BrH", 1.008 + 79.904, 80.912},
        {"SO2", "O2S", 32.06 + 2 * 15.999, 64.058},
        {"NaOH", "HNaO", 22.990 + 15.999 + 1.008, 39.997},
        {"NaCl", "ClNa", 22.990 + 35.45, 58.440},
        {"NaBr", "BrNa", 22.990 + 79.904, 102.894},
        {"NaOCl", "ClNaO", 22.990 + 15.999 + 35.45, 74.439},
        {"NaOBr", "BrNaO", 22.990 + 15.999 + 79.904, 118.893},
        {"Na2SO3", "Na2O3S", 2 * 22.990 + 32.06 + 3 * 15.999, 126.037},
        {"H2O", "H2O", 2 * 1.008 + 15.999, 18.015},
        {"C7H8", "C7H8", 7 * 12.011 + 8 * 1.008, 92.141},
        {"C6H5Cl", "C6H5Cl", 6 * 12.011 + 5 * 1.008 + 35.45, 112.556},
        {"C4H9Cl", "C4H9Cl", 4 * 12.011 + 9 * 1.008 + 35.45, 92.566},
        {"CH3(CH2)2Cl", "C3H7Cl", 3 * 12.011 + 7 * 1.008 + 35.45, 78.539},
        {"Ca(OCl)2", "CaCl2O2", 40.078 + 2 * (15.999 + 35.45), 142.976},
        {"C4H5NO2", "C4H5NO2", 4 * 12.011 + 5 * 1.008 + 14.007 + 2 * 15.999, 99.089},
        {"CH4", "CH4", 12.011 + 4 * 1.008, 16.043},
        {"CCl4", "CCl4", 12.011 + 4 * 35.45, 153.811},
        {"C6H5CH2Br", "C7H7Br", 7 * 12.011 + 7 * 1.008 + 79.904, 171.037},
        {"C6H12", "C6H12", 6 * 12.011 + 12 * 1.008, 84.162},
        {"Mg(OH)2", "H2MgO2", 24.305 + 2 * (15.999 + 1.008), 58.319},
        {"CH3I", "CH3I", 12.011 + 3 * 1.008 + 126.90, 141.935},
        {"(CH3)3CCl", "C4H9Cl", 4 * 12.011 + 9 * 1.008 + 35.45, 92.566},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        struct formula f;
        struct hl_err e;
        char hill[64];
        CU_ASSERT_EQUAL(formula_parse(cases[i].text, &f, &e), HL_OK);
        double m = formula_molar_mass_g_mol(&f);
        ASSERT_REL(m, cases[i].by_hand, 1e-13);
        ASSERT_ABS(m, cases[i].rounded, 5e-4);
        formula_hill(&f, hill, sizeof hill);
        if (strcmp(hill, cases[i].hill) != 0)
            printf("\n  %s: Hill %s, expected %s", cases[i].text, hill, cases[i].hill);
        CU_ASSERT_STRING_EQUAL(hill, cases[i].hill);
    }
}

/* Hill system (Hill, J. Am. Chem. Soc. 22 (1900) 478): C first, H second, then
 * alphabetical; without carbon all alphabetical, H included. */
static void hill_order(void)
{
    static const char *pairs[][2] = {
        {"BrC4H4NO2", "C4H4BrNO2"}, {"NO2C4H4Br", "C4H4BrNO2"}, {"HC", "CH"},
        {"ClCH2Cl", "CH2Cl2"},      {"CaBr2", "Br2Ca"},         {"OH2", "H2O"},
        {"IC2H5", "C2H5I"},         {"BaB2", "B2Ba"},           {"ClC", "CCl"},
        {"C", "C"},                 {"H", "H"},                 {"ZnCl2H2O", "Cl2H2OZn"},
    };
    for (size_t i = 0; i < sizeof pairs / sizeof pairs[0]; i++) {
        struct formula f;
        char hill[32];
        CU_ASSERT_EQUAL(formula_parse(pairs[i][0], &f, NULL), HL_OK);
        CU_ASSERT_STRING_EQUAL(formula_hill(&f, hill, sizeof hill), pairs[i][1]);
    }
    /* truncation: never past the buffer, always terminated */
    struct formula f;
    char small[4] = {'x', 'x', 'x', 'x'};
    CU_ASSERT_EQUAL(formula_parse("C4H4BrNO2", &f, NULL), HL_OK);
    formula_hill(&f, small, sizeof small);
    CU_ASSERT_STRING_EQUAL(small, "C4H");
    char one[1] = {'x'};
    formula_hill(&f, one, sizeof one);
    CU_ASSERT_EQUAL(one[0], '\0');
    /* empty formula gives empty text */
    struct formula z;
    memset(&z, 0, sizeof z);
    char buf[8];
    CU_ASSERT_STRING_EQUAL(formula_hill(&z, buf, sizeof buf), "");
}

static void parentheses(void)
{
    struct formula f, g;
    CU_ASSERT_EQUAL(formula_parse("CH3(CH2)10CH3", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(f.n[EL_C], 12);
    CU_ASSERT_EQUAL(f.n[EL_H], 26);
    CU_ASSERT_EQUAL(formula_parse("Ca3(PO4)2", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(f.n[EL_Ca], 3);
    CU_ASSERT_EQUAL(f.n[EL_P], 2);
    CU_ASSERT_EQUAL(f.n[EL_O], 8);
    /* nested: ((CH3)2CH)3N = C9H21N */
    CU_ASSERT_EQUAL(formula_parse("((CH3)2CH)3N", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(formula_parse("C9H21N", &g, NULL), HL_OK);
    CU_ASSERT(formula_equal(&f, &g));
    /* sixteen levels are allowed */
    CU_ASSERT_EQUAL(formula_parse("((((((((((((((((H))))))))))))))))2", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(f.n[EL_H], 2);
    /* the largest count, and an element total at the 1e9 limit */
    CU_ASSERT_EQUAL(formula_parse("C1000000", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(f.n[EL_C], 1000000);
    CU_ASSERT_EQUAL(formula_parse("(C1000000)1000", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(f.n[EL_C], 1000000000L);
    /* add and equal */
    CU_ASSERT_EQUAL(formula_parse("C4H10", &f, NULL), HL_OK);
    CU_ASSERT_EQUAL(formula_parse("Cl2", &g, NULL), HL_OK);
    formula_add(&f, &g, 1); /* C4H10 + Cl2 */
    struct formula hcl, want;
    CU_ASSERT_EQUAL(formula_parse("HCl", &hcl, NULL), HL_OK);
    formula_add(&f, &hcl, -1); /* - HCl = C4H9Cl */
    CU_ASSERT_EQUAL(formula_parse("C4H9Cl", &want, NULL), HL_OK);
    CU_ASSERT(formula_equal(&f, &want));
    CU_ASSERT(!formula_equal(&f, &g));
}

struct bad_case {
    const char *text;
    int col;
    const char *words; /* part of the message */
};

static void errors_with_column(void)
{
    static const struct bad_case bad[] = {
        {"", 1, "empty"},
        {"C4Q", 3, "unknown element symbol 'Q'"},
        {"Xy2", 1, "unknown element symbol 'Xy'"},
        {"CL2", 2, "unknown element symbol 'L'"},
        {"cl2", 1, "capital"},
        {"C4H1x", 5, "capital"},
        {"C0", 2, "at least 1"},
        {"CH3(CH2)0Cl", 9, "at least 1"},
        {"C01", 2, "leading zero"},
        {"C1000001", 2, "over 1000000"},
        {"C99999999999999999999", 2, "over 1000000"},
        {"(CH3", 1, "unclosed"},
        {"CH3(CH2", 4, "unclosed"},
        {"C(", 2, "unclosed"},
        {"CH3)2", 4, "unmatched"},
        {"C)", 2, "unmatched"},
        {"()", 1, "empty parentheses"},
        {"2C", 1, "without an element"},
        {"C H4", 2, "unexpected character ' '"},
        {"C4H10\xc2\xb7H2O", 6, "\\xc2"},
        {"C4H10\n", 6, "\\x0a"},
        {"NaCl+", 5, "unexpected character '+'"},
        {"(((((((((((((((((H)))))))))))))))))", 17, "deeper than 16"},
        {"(C1000000)1001", 1, "1e9 atoms"},
        {"C((H1000000)1000)2", 2, "1e9 atoms"},
    };
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        struct formula f;
        memset(&f, 0, sizeof f);
        f.n[EL_C] = 77; /* must stay untouched on error */
        struct hl_err e;
        hl_err_clear(&e);
        CU_ASSERT_EQUAL(formula_parse(bad[i].text, &f, &e), HL_ERR_INPUT);
        CU_ASSERT_EQUAL(e.status, HL_ERR_INPUT);
        if (e.col != bad[i].col || !strstr(e.msg, bad[i].words))
            printf("\n  '%s': col %d msg \"%s\" (want col %d, \"%s\")", bad[i].text, e.col, e.msg,
                   bad[i].col, bad[i].words);
        CU_ASSERT_EQUAL(e.col, bad[i].col);
        CU_ASSERT_PTR_NOT_NULL(strstr(e.msg, bad[i].words));
        CU_ASSERT_EQUAL(f.n[EL_C], 77);
    }
    struct formula f;
    CU_ASSERT_EQUAL(formula_parse(NULL, &f, NULL), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(formula_parse("C?", &f, NULL), HL_ERR_INPUT); /* e optional */
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"CIAAW weight table", weights_table},
        {"molar masses by hand", masses},
        {"Hill order", hill_order},
        {"parentheses, add, equal", parentheses},
        {"errors with column", errors_with_column}};
    return CU_RUN_ALL("formula", cases);
}

/*
 * elements.c - standard atomic weights (see elements.h).
 *
 * Source: CIAAW, "Standard atomic weights of the elements 2021", Prohaska et
 * al., Pure Appl. Chem. 94 (2022) 573-600, abridged to five significant
 * figures; for the elements whose standard weight is an interval (H, Li, B,
 * C, N, O, Mg, Si, S, Cl, Br, Pb ...) the conventional value CIAAW lists for
 * trade and commerce is used (H 1.008, C 12.011, S 32.06, Cl 35.45 ...).
 * Why these and not more digits: natural isotopic variation makes further
 * digits meaningless for plant materials, and every mass in the ledger must
 * be reproducible by hand from one published table.
 */
#include "elements.h"

#include <string.h>

struct elem_row {
    char sym[3];
    int z;
    double w_g_mol;
};

/* Order must follow enum elem_id. */
static const struct elem_row table[EL_COUNT] = {
    [EL_H] = {"H", 1, ELEM_W_H},      [EL_He] = {"He", 2, 4.0026},   [EL_Li] = {"Li", 3, 6.94},
    [EL_Be] = {"Be", 4, 9.0122},   [EL_B] = {"B", 5, 10.81},      [EL_C] = {"C", 6, ELEM_W_C},
    [EL_N] = {"N", 7, ELEM_W_N},     [EL_O] = {"O", 8, ELEM_W_O},     [EL_F] = {"F", 9, 18.998},
    [EL_Ne] = {"Ne", 10, 20.180},  [EL_Na] = {"Na", 11, ELEM_W_NA},  [EL_Mg] = {"Mg", 12, 24.305},
    [EL_Al] = {"Al", 13, 26.982},  [EL_Si] = {"Si", 14, 28.085},  [EL_P] = {"P", 15, 30.974},
    [EL_S] = {"S", 16, ELEM_W_S},     [EL_Cl] = {"Cl", 17, ELEM_W_CL},   [EL_Ar] = {"Ar", 18, 39.95},
    [EL_K] = {"K", 19, 39.098},    [EL_Ca] = {"Ca", 20, 40.078},  [EL_Ti] = {"Ti", 22, 47.867},
    [EL_Cr] = {"Cr", 24, 51.996},  [EL_Mn] = {"Mn", 25, 54.938},  [EL_Fe] = {"Fe", 26, 55.845},
    [EL_Co] = {"Co", 27, 58.933},  [EL_Ni] = {"Ni", 28, 58.693},  [EL_Cu] = {"Cu", 29, 63.546},
    [EL_Zn] = {"Zn", 30, 65.38},   [EL_Ga] = {"Ga", 31, 69.723},  [EL_Ge] = {"Ge", 32, 72.630},
    [EL_As] = {"As", 33, 74.922},  [EL_Se] = {"Se", 34, 78.971},  [EL_Br] = {"Br", 35, ELEM_W_BR},
    [EL_Kr] = {"Kr", 36, 83.798},  [EL_Rb] = {"Rb", 37, 85.468},  [EL_Sr] = {"Sr", 38, 87.62},
    [EL_Ag] = {"Ag", 47, 107.87},  [EL_Sn] = {"Sn", 50, 118.71},  [EL_Sb] = {"Sb", 51, 121.76},
    [EL_Te] = {"Te", 52, 127.60},  [EL_I] = {"I", 53, 126.90},    [EL_Xe] = {"Xe", 54, 131.29},
    [EL_Cs] = {"Cs", 55, 132.91},  [EL_Ba] = {"Ba", 56, 137.33},  [EL_Pt] = {"Pt", 78, 195.08},
    [EL_Au] = {"Au", 79, 196.97},  [EL_Hg] = {"Hg", 80, 200.59},  [EL_Pb] = {"Pb", 82, 207.2},
    [EL_Bi] = {"Bi", 83, 208.98},
};

const char *elem_symbol(int el)
{
    return (el >= 0 && el < EL_COUNT) ? table[el].sym : NULL;
}

double elem_weight_g_mol(int el)
{
    return (el >= 0 && el < EL_COUNT) ? table[el].w_g_mol : 0.0;
}

int elem_z(int el)
{
    return (el >= 0 && el < EL_COUNT) ? table[el].z : 0;
}

int elem_lookup(const char *sym, size_t len)
{
    if (!sym || len == 0 || len > 2)
        return -1;
    for (int i = 0; i < EL_COUNT; i++)
        if (strlen(table[i].sym) == len && memcmp(table[i].sym, sym, len) == 0)
            return i;
    return -1;
}

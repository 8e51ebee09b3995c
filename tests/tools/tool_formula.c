/*
 * tool_formula.c - test probe: one formula per stdin line, prints "HILL MASS"
 * (mass in g/mol, %.6f) or "ERROR COL message" per line.  Exit 0 when every
 * line parsed, 1 otherwise.  Used by tests/e2e/rdkit_formula.py.
 */
#include "formula.h"

#include <stdio.h>
#include <string.h>

int main(void)
{
    char line[4096];
    int bad = 0;
    while (fgets(line, sizeof line, stdin)) {
        line[strcspn(line, "\r\n")] = '\0';
        struct formula f;
        struct hl_err e;
        hl_err_clear(&e);
        if (formula_parse(line, &f, &e) != HL_OK) {
            printf("ERROR %d %s\n", e.col, e.msg);
            bad = 1;
            continue;
        }
        char hill[256];
        printf("%s %.6f\n", formula_hill(&f, hill, sizeof hill), formula_molar_mass_g_mol(&f));
    }
    return bad;
}

/* test_reagents.c - the reagent, vent and caution tables.
 *
 * Masses: the table must equal the formula mass from the CIAAW 2021 weights
 * (formula.c) and the sums written out here by hand.  Stoichiometry: design
 * section 4 (RH + X2 -> RX + HX; RH + SO2Cl2 -> RCl + SO2 + HCl; RH + NBS ->
 * RBr + succinimide; C=C + HBr -> RBr) checked as element balances.  CAS
 * numbers: the check digit rule of the CAS Registry (last digit = sum of the
 * other digits times their position from the right, mod 10).
 */
#include "cu_helpers.h"
#include "formula.h"
#include "liquor.h"
#include "reagents.h"

#include <ctype.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

static void masses_match_formulas(void)
{
    for (int i = 0; i < RG_COUNT; i++) {
        const struct reagent_info *r = reagent_get(i);
        CU_ASSERT_PTR_NOT_NULL_FATAL(r);
        struct formula f;
        CU_ASSERT_EQUAL(formula_parse(r->formula, &f, NULL), HL_OK);
        ASSERT_REL(r->molar_mass_g_mol, formula_molar_mass_g_mol(&f), 1e-9);
        /* the formula text is already in Hill order */
        char hill[64];
        CU_ASSERT_STRING_EQUAL(formula_hill(&f, hill, sizeof hill), r->formula);
    }
    /* by hand, CIAAW 2021: Cl 35.45, Br 79.904, S 32.06, O 15.999, C 12.011, H 1.008,
     * N 14.007, Na 22.990 */
    ASSERT_ABS(reagent_get(RG_CL2)->molar_mass_g_mol, 70.900, 5e-4);
    ASSERT_ABS(reagent_get(RG_BR2)->molar_mass_g_mol, 159.808, 5e-4);
    ASSERT_ABS(reagent_get(RG_SO2CL2)->molar_mass_g_mol, 134.958, 5e-4);
    ASSERT_ABS(reagent_get(RG_NBS)->molar_mass_g_mol, 177.985, 5e-4);
    ASSERT_ABS(reagent_get(RG_HBR)->molar_mass_g_mol, 80.912, 5e-4);
    ASSERT_ABS(reagent_get(RG_NAOH)->molar_mass_g_mol, 39.997, 5e-4);
    for (int v = 0; v < VS_COUNT; v++) {
        struct formula f;
        CU_ASSERT_EQUAL(formula_parse(vent_formula(v), &f, NULL), HL_OK);
        ASSERT_REL(vent_molar_mass_g_mol(v), formula_molar_mass_g_mol(&f), 1e-9);
        CU_ASSERT_EQUAL(formula_parse(vent_name(v), &f, NULL), HL_OK); /* names are formulas */
        ASSERT_REL(vent_molar_mass_g_mol(v), formula_molar_mass_g_mol(&f), 1e-9);
    }
    ASSERT_ABS(vent_molar_mass_g_mol(VS_HCL), 36.458, 5e-4);
    ASSERT_ABS(vent_molar_mass_g_mol(VS_SO2), 64.058, 5e-4);
}

/* Element balance of one reaction per reagent on a model substrate. */
static void stoichiometry_balances(void)
{
    struct formula rh, rx, lhs, rhs, g;
    const char *gas_of[VS_COUNT];
    for (int v = 0; v < VS_COUNT; v++)
        gas_of[v] = vent_formula(v);
    for (int i = 0; i < RG_CHARGEABLE; i++) {
        const struct reagent_info *r = reagent_get(i);
        CU_ASSERT(r->halogen_el == EL_Cl || r->halogen_el == EL_Br);
        /* substrate: propene for HBr addition, toluene otherwise */
        CU_ASSERT_EQUAL(formula_parse(r->kind == RK_ADDITION ? "C3H6" : "C7H8", &rh, NULL), HL_OK);
        rx = rh;
        rx.n[r->halogen_el] += 1;
        if (r->kind != RK_ADDITION)
            rx.n[EL_H] -= 1; /* substitution: one H replaced */
        else
            rx.n[EL_H] += 1; /* addition: H and Br across C=C */
        CU_ASSERT_EQUAL(formula_parse(r->formula, &g, NULL), HL_OK);
        lhs = rh;
        formula_add(&lhs, &g, 1);
        rhs = rx;
        if (r->hx_mol > 0) {
            CU_ASSERT_EQUAL(formula_parse(gas_of[r->hx_species], &g, NULL), HL_OK);
            formula_add(&rhs, &g, (long)r->hx_mol);
        }
        if (r->so2_mol > 0) {
            CU_ASSERT_EQUAL(formula_parse(gas_of[VS_SO2], &g, NULL), HL_OK);
            formula_add(&rhs, &g, (long)r->so2_mol);
        }
        if (r->succinimide_mol > 0) {
            CU_ASSERT_EQUAL(formula_parse("C4H5NO2", &g, NULL), HL_OK);
            formula_add(&rhs, &g, (long)r->succinimide_mol);
        }
        if (!formula_equal(&lhs, &rhs))
            printf("\n  %s: reaction does not balance", r->name);
        CU_ASSERT(formula_equal(&lhs, &rhs));
    }
    /* the expected by-products themselves (design section 4) */
    CU_ASSERT_EQUAL(reagent_get(RG_CL2)->hx_species, VS_HCL);
    CU_ASSERT_EQUAL(reagent_get(RG_BR2)->hx_species, VS_HBR);
    CU_ASSERT_EQUAL(reagent_get(RG_SO2CL2)->hx_species, VS_HCL);
    ASSERT_ABS(reagent_get(RG_SO2CL2)->so2_mol, 1.0, 0.0);
    ASSERT_ABS(reagent_get(RG_NBS)->succinimide_mol, 1.0, 0.0);
    ASSERT_ABS(reagent_get(RG_NBS)->hx_mol, 0.0, 0.0);
    ASSERT_ABS(reagent_get(RG_HBR)->hx_mol, 0.0, 0.0);
    CU_ASSERT_EQUAL(reagent_get(RG_NAOH)->kind, RK_BASE);
    CU_ASSERT_EQUAL(reagent_get(RG_NAOH)->halogen_el, -1);
}

static void unreacted_and_phase(void)
{
    /* gases (and the volatile Br2) vent as themselves; the liquid SO2Cl2 and solid NBS stay */
    CU_ASSERT_EQUAL(reagent_get(RG_CL2)->unreacted_vent, VS_CL2);
    CU_ASSERT_EQUAL(reagent_get(RG_BR2)->unreacted_vent, VS_BR2);
    CU_ASSERT_EQUAL(reagent_get(RG_HBR)->unreacted_vent, VS_HBR);
    CU_ASSERT_EQUAL(reagent_get(RG_SO2CL2)->unreacted_vent, -1);
    CU_ASSERT_EQUAL(reagent_get(RG_NBS)->unreacted_vent, -1);
    for (int i = 0; i < RG_COUNT; i++) {
        const struct reagent_info *r = reagent_get(i);
        CU_ASSERT(r->phase && *r->phase);
        CU_ASSERT(r->long_name && *r->long_name);
        if (r->unreacted_vent >= 0) /* what vents is the reagent itself */
            CU_ASSERT_STRING_EQUAL(vent_formula(r->unreacted_vent), r->formula);
    }
    CU_ASSERT_PTR_NOT_NULL(strstr(reagent_get(RG_CL2)->phase, "gas"));
    CU_ASSERT_PTR_NOT_NULL(strstr(reagent_get(RG_HBR)->phase, "gas"));
    CU_ASSERT_PTR_NOT_NULL(strstr(reagent_get(RG_SO2CL2)->phase, "liquid"));
    CU_ASSERT_PTR_NOT_NULL(strstr(reagent_get(RG_NBS)->phase, "solid"));
}

static void lookups(void)
{
    /* the campaign spellings of design section 3 (a new reagent adds its own) */
    static const struct { const char *name; int id; } spelled[] = {
        {"Cl2", RG_CL2}, {"Br2", RG_BR2}, {"SO2Cl2", RG_SO2CL2}, {"NBS", RG_NBS}, {"HBr", RG_HBR},
        {"NaOH", RG_NAOH}, {"Na2CO3", RG_NA2CO3}};
    for (size_t i = 0; i < sizeof spelled / sizeof spelled[0]; i++) {
        CU_ASSERT_EQUAL(reagent_lookup(spelled[i].name), spelled[i].id);
        CU_ASSERT_STRING_EQUAL(reagent_get(spelled[i].id)->name, spelled[i].name);
    }
    /* every row, a new one too: its name finds it */
    for (int i = 0; i < RG_COUNT; i++)
        CU_ASSERT_EQUAL(reagent_lookup(reagent_get(i)->name), i);
    CU_ASSERT_EQUAL(reagent_lookup("cl2"), -1);
    CU_ASSERT_EQUAL(reagent_lookup("Cl"), -1);
    CU_ASSERT_EQUAL(reagent_lookup(""), -1);
    CU_ASSERT_EQUAL(reagent_lookup(NULL), -1);
    CU_ASSERT_PTR_NULL(reagent_get(-1));
    CU_ASSERT_PTR_NULL(reagent_get(RG_COUNT));
    CU_ASSERT_PTR_NULL(vent_name(VS_COUNT));
    CU_ASSERT_PTR_NULL(vent_formula(-1));
    ASSERT_ABS(vent_molar_mass_g_mol(VS_COUNT), 0.0, 0.0);
    CU_ASSERT_EQUAL(vent_caution(-1), -1);
    CU_ASSERT_PTR_NULL(caution_get(CA_COUNT));
    CU_ASSERT_PTR_NULL(caution_get(-1));
    static const int vc[VS_COUNT] = {CA_HCL, CA_HBR, CA_CL2, CA_BR2, CA_SO2};
    static const char *vn[VS_COUNT] = {"HCl", "HBr", "Cl2", "Br2", "SO2"};
    for (int v = 0; v < VS_COUNT; v++) {
        CU_ASSERT_EQUAL(vent_caution(v), vc[v]);
        CU_ASSERT_STRING_EQUAL(vent_name(v), vn[v]);
    }
    /* (the amount keys of runs[].vent are the column list's: test_ltable) */
    for (int v = 0; v < VS_COUNT; v++) {
        CU_ASSERT_PTR_NOT_NULL_FATAL(vent_get(v));
        CU_ASSERT_STRING_EQUAL(vent_get(v)->name, vn[v]);
    }
    /* acid gas: HCl and HBr only (DEVELOPERS.md glossary) */
    for (int v = 0; v < VS_COUNT; v++)
        CU_ASSERT_EQUAL(vent_get(v)->acid_gas, v == VS_HCL || v == VS_HBR);
    CU_ASSERT_PTR_NULL(vent_get(VS_COUNT));
    CU_ASSERT_PTR_NULL(vent_get(-1));
}

/* Every liquor row, automatically for a new one: each reacting gas balances element by element
 * (gas + n base -> salts + water, counted from the formulas of the rows), a dissolving gas has
 * a changeout strength and a solution enthalpy, a gas it passes is credited no removal, and
 * the property tables give finite positive values for the fresh liquor. */
static void liquor_rows(void)
{
    for (int q = 0; q < LQ_COUNT; q++) {
        const struct liquor_info *l = liquor_get(q);
        CU_ASSERT_PTR_NOT_NULL_FATAL(l);
        CU_ASSERT(l->name && l->name[0]);
        CU_ASSERT_PTR_NOT_NULL(l->bp_basis);
        for (int v = 0; v < VS_COUNT; v++) {
            const struct liquor_gas *g = &l->gas[v];
            CU_ASSERT(g->removal >= 0 && g->removal <= 1);
            CU_ASSERT_PTR_NOT_NULL(g->removal_origin);
            CU_ASSERT_PTR_NOT_NULL(liquor_dfh_get(g->dfh_gas));
            if (g->uptake == LQ_PASSES)
                CU_ASSERT_EQUAL(g->removal, 0);
            if (g->uptake == LQ_DISSOLVES)
                CU_ASSERT_PTR_NOT_NULL(liquor_dfh_get(g->dfh_taken));
            if (g->uptake != LQ_REACTS)
                continue;
            CU_ASSERT_FATAL(l->base >= 0 && l->base < RG_COUNT && g->base_mol > 0);
            CU_ASSERT_PTR_NOT_NULL(liquor_dfh_get(l->dfh_base));
            double bal[EL_COUNT] = {0};
            struct formula f;
            CU_ASSERT_EQUAL_FATAL(formula_parse(vent_formula(v), &f, NULL), HL_OK);
            for (int el = 0; el < EL_COUNT; el++)
                bal[el] += f.n[el];
            CU_ASSERT_EQUAL_FATAL(formula_parse(reagent_get(l->base)->formula, &f, NULL), HL_OK);
            for (int el = 0; el < EL_COUNT; el++)
                bal[el] += g->base_mol * f.n[el];
            CU_ASSERT_EQUAL_FATAL(formula_parse("H2O", &f, NULL), HL_OK);
            for (int el = 0; el < EL_COUNT; el++)
                bal[el] -= g->water_mol * f.n[el];
            CU_ASSERT_EQUAL_FATAL(formula_parse("CO2", &f, NULL), HL_OK); /* given off */
            for (int el = 0; el < EL_COUNT; el++)
                bal[el] -= g->co2_mol * f.n[el];
            CU_ASSERT(g->co2_mol >= 0);
            for (int k = 0; k < LQ_MAX_SALTS; k++) {
                if (g->salt[k] < 0)
                    continue;
                CU_ASSERT_PTR_NOT_NULL_FATAL(liquor_salt_get(g->salt[k]));
                CU_ASSERT_EQUAL_FATAL(formula_parse(liquor_salt_get(g->salt[k])->name, &f, NULL), HL_OK);
                for (int el = 0; el < EL_COUNT; el++)
                    bal[el] -= g->salt_mol[k] * f.n[el];
            }
            for (int el = 0; el < EL_COUNT; el++)
                if (bal[el] != 0)
                    printf("liquor %s, gas %s: element %s off by %g\n", l->name, vent_name(v),
                           elem_symbol(el), bal[el]);
            for (int el = 0; el < EL_COUNT; el++)
                CU_ASSERT_EQUAL(bal[el], 0);
        }
        /* a base is a make-up row of its own, read through one spelling of the strength keys,
         * up to a strongest fresh liquor the property tables reach */
        CU_ASSERT_EQUAL(l->base >= 0, l->keys != LQ_KEYS_NONE);
        CU_ASSERT_PTR_NOT_NULL(l->unit_noun);
        if (l->base >= 0) {
            CU_ASSERT_FATAL(l->base >= RG_CHARGEABLE && l->base < RG_COUNT);
            CU_ASSERT_EQUAL(reagent_get(l->base)->kind, RK_BASE);
            CU_ASSERT(l->keys == LQ_KEYS_NAOH || l->keys == LQ_KEYS_BASE);
            CU_ASSERT_EQUAL(l->keys == LQ_KEYS_NAOH, l->base == RG_NAOH); /* the naoh_* keys name NaOH */
            CU_ASSERT(l->max_base_wt_pct > 0.1 && l->max_base_wt_pct <= 100);
            CU_ASSERT_PTR_NOT_NULL(l->makeup_noun);
        }
        for (int w = 0; w <= 1; w++) {
            struct liquor_comp fresh = {.base_wt_pct = l->base >= 0 ? (w ? l->max_base_wt_pct : 0.1) : 0};
            double x[4] = {l->cp_kj_kg_k(&fresh), l->boiling_point_c(&fresh), l->density_kg_m3(&fresh),
                           l->viscosity_mpa_s(&fresh)};
            for (int k = 0; k < 4; k++)
                CU_ASSERT(isfinite(x[k]) && x[k] > 0);
        }
    }
    CU_ASSERT_PTR_NULL(liquor_get(LQ_COUNT));
    CU_ASSERT_PTR_NULL(liquor_get(-1));
    CU_ASSERT_EQUAL(liquor_has(-1, LQ_REACTS), 0);
    /* the campaign spellings (design section 3) */
    CU_ASSERT_STRING_EQUAL(liquor_get(LQ_NAOH)->name, "naoh");
    CU_ASSERT_STRING_EQUAL(liquor_get(LQ_WATER)->name, "water");
    CU_ASSERT_STRING_EQUAL(liquor_get(LQ_SODA_ASH)->name, "soda_ash");
}

/* The soda-ash row against its chemistry, written out here (design section 4, carbonate
 * spent to CO2): per mol of gas, Na2CO3 used, salts, water and CO2; every product is one of
 * 2 HCl + Na2CO3 -> 2 NaCl + H2O + CO2, Cl2 + Na2CO3 -> NaCl + NaOCl + CO2, SO2 + Na2CO3
 * -> Na2SO3 + CO2 (and the HBr, Br2 alike).  Its property functions against their sources:
 * CRC Handbook densities at 20 C (from memory: 4 wt% 1.0398, 10 wt% 1.1029, 14 wt% 1.1463
 * g/cm3), the water-only heat capacity rule 4.18 x (1 - w), water's boiling point, and the
 * end of the tables at 14 wt% (solubility near 20 C about 17.7 wt%, from memory). */
static void soda_ash_row(void)
{
    const struct liquor_info *l = liquor_get(LQ_SODA_ASH);
    CU_ASSERT_PTR_NOT_NULL_FATAL(l);
    CU_ASSERT_EQUAL(l->base, RG_NA2CO3);
    CU_ASSERT_EQUAL(l->keys, LQ_KEYS_BASE);
    static const struct { int v; double na2co3, water, co2; int s0; double n0; int s1; double n1; } want[] = {
        {VS_HCL, 0.5, 0.5, 0.5, SALT_NACL, 1, -1, 0}, {VS_HBR, 0.5, 0.5, 0.5, SALT_NABR, 1, -1, 0},
        {VS_CL2, 1, 0, 1, SALT_NACL, 1, SALT_NAOCL, 1}, {VS_BR2, 1, 0, 1, SALT_NABR, 1, SALT_NAOBR, 1},
        {VS_SO2, 1, 0, 1, SALT_NA2SO3, 1, -1, 0}};
    for (size_t i = 0; i < sizeof want / sizeof want[0]; i++) {
        const struct liquor_gas *g = &l->gas[want[i].v];
        CU_ASSERT_EQUAL(g->uptake, LQ_REACTS);
        ASSERT_ABS(g->base_mol, want[i].na2co3, 0);
        ASSERT_ABS(g->water_mol, want[i].water, 0);
        ASSERT_ABS(g->co2_mol, want[i].co2, 0);
        CU_ASSERT_EQUAL(g->salt[0], want[i].s0);
        ASSERT_ABS(g->salt_mol[0], want[i].n0, 0);
        CU_ASSERT_EQUAL(g->salt[1], want[i].s1);
        if (want[i].s1 >= 0)
            ASSERT_ABS(g->salt_mol[1], want[i].n1, 0);
        CU_ASSERT_EQUAL(g->salt[2], -1);
        CU_ASSERT(g->removal > 0.9 && g->removal < 1);
    }
    ASSERT_ABS(l->max_base_wt_pct, 14, 0);
    static const double rho[][2] = {{0, 0.99820}, {4, 1.0398}, {10, 1.1029}, {14, 1.1463}};
    for (size_t i = 0; i < sizeof rho / sizeof rho[0]; i++) {
        struct liquor_comp c = {.base_wt_pct = rho[i][0]};
        ASSERT_ABS(l->density_kg_m3(&c), 1000 * rho[i][1], 0.05);
        ASSERT_ABS(l->cp_kj_kg_k(&c), 4.18 * (1 - rho[i][0] / 100), 1e-12);
        ASSERT_ABS(l->boiling_point_c(&c), 100, 0);
    }
    struct liquor_comp c = {.base_wt_pct = 11}; /* between table rows: linear */
    ASSERT_ABS(l->density_kg_m3(&c), 1000 * (1.1029 + (1.1244 - 1.1029) / 2), 0.05);
    c.base_wt_pct = 30; /* clamped at the table end, as the other tables */
    ASSERT_ABS(l->density_kg_m3(&c), 1146.3, 0.05);
    ASSERT_ABS(l->cp_kj_kg_k(&c), 4.18 * 0.86, 1e-12);
    c.base_wt_pct = 10; /* viscosity about 1.6 mPa s at 10 wt% (from memory), water 1.00 */
    ASSERT_ABS(l->viscosity_mpa_s(&c), 1.6, 0.05);
    /* the make-up row: Na2CO3 by the CIAAW 2021 weights 2 x 22.990 + 12.011 + 3 x 15.999 */
    ASSERT_ABS(reagent_get(RG_NA2CO3)->molar_mass_g_mol, 105.988, 5e-4);
    CU_ASSERT_EQUAL(reagent_get(RG_NA2CO3)->caution, CA_NA2CO3);
    CU_ASSERT_STRING_EQUAL(caution_get(CA_NA2CO3)->cas, "497-19-8");
}

/* Every salt row: its name is its formula, and the molar mass is that formula's. */
static void salt_rows(void)
{
    for (int k = 0; k < SALT_COUNT; k++) {
        const struct liquor_salt *s = liquor_salt_get(k);
        CU_ASSERT_PTR_NOT_NULL_FATAL(s);
        struct formula f;
        CU_ASSERT_EQUAL_FATAL(formula_parse(s->name, &f, NULL), HL_OK);
        ASSERT_REL(s->molar_mass_g_mol, formula_molar_mass_g_mol(&f), 1e-9);
    }
    CU_ASSERT_PTR_NULL(liquor_salt_get(SALT_COUNT));
    CU_ASSERT_PTR_NULL(liquor_salt_get(-1));
}

/* CAS Registry check digit. */
static int cas_valid(const char *cas)
{
    int digits[16], n = 0, dashes = 0;
    size_t len = strlen(cas);
    for (size_t i = 0; i < len; i++) {
        if (cas[i] == '-') {
            dashes++;
            continue;
        }
        if (!isdigit((unsigned char)cas[i]) || n >= 16)
            return 0;
        digits[n++] = cas[i] - '0';
    }
    if (dashes != 2 || n < 5 || cas[len - 2] != '-' || cas[len - 5] != '-')
        return 0;
    int sum = 0;
    for (int i = n - 2, w = 1; i >= 0; i--, w++)
        sum += digits[i] * w;
    return sum % 10 == digits[n - 1];
}

static void cautions(void)
{
    CU_ASSERT(cas_valid("7732-18-5"));  /* water: a known-good number */
    CU_ASSERT(!cas_valid("7732-18-4")); /* and the rule rejects a typo */
    int used[CA_COUNT] = {0};
    for (int i = 0; i < RG_COUNT; i++)
        used[reagent_get(i)->caution] = 1;
    for (int v = 0; v < VS_COUNT; v++)
        used[vent_caution(v)] = 1;
    used[CA_NAOCL] = 1; /* the scrubber's product */
    for (int c = 0; c < CA_COUNT; c++) {
        const struct caution_info *ci = caution_get(c);
        CU_ASSERT_PTR_NOT_NULL_FATAL(ci);
        CU_ASSERT(used[c]);
        if (!cas_valid(ci->cas))
            printf("\n  %s: CAS %s fails its check digit", ci->substance, ci->cas);
        CU_ASSERT(cas_valid(ci->cas));
        CU_ASSERT(ci->nlimits >= 1 && ci->nlimits <= 4);
        int sourced = 0, niosh = 0, acgih = 0;
        for (int k = 0; k < ci->nlimits; k++) {
            const struct exposure_limit *l = &ci->limits[k];
            CU_ASSERT(l->kind && l->value && *l->value && l->source);
            if (l->source && strlen(l->source) > 10)
                sourced++;
            if (l->source && strstr(l->source, "NIOSH") && strstr(l->source, "2005-149"))
                niosh++;
            /* ACGIH values could not be checked against the book: must say so */
            if (strcmp(l->kind, "ACGIH TLV") == 0) {
                acgih++;
                CU_ASSERT_PTR_NOT_NULL(strstr(l->source, "from memory"));
            }
            /* "none established" rows carry a source too */
            if (strstr(l->value, "none"))
                CU_ASSERT_STRING_EQUAL(l->value, "none established");
        }
        CU_ASSERT(sourced >= 1);
        CU_ASSERT(niosh >= 1);
        CU_ASSERT(acgih == 1);
        CU_ASSERT(ci->hazards && strlen(ci->hazards) > 40);
        CU_ASSERT(ci->incompatible && strlen(ci->incompatible) > 20);
        CU_ASSERT(ci->ppe && strlen(ci->ppe) > 20);
        /* one line for `check` output */
        CU_ASSERT(ci->short_form && strlen(ci->short_form) > 10 && strlen(ci->short_form) <= 120);
        CU_ASSERT_PTR_NULL(strchr(ci->short_form, '\n'));
    }
    /* every chargeable reagent and NaOH has its own row */
    CU_ASSERT_EQUAL(reagent_get(RG_CL2)->caution, CA_CL2);
    CU_ASSERT_EQUAL(reagent_get(RG_BR2)->caution, CA_BR2);
    CU_ASSERT_EQUAL(reagent_get(RG_SO2CL2)->caution, CA_SO2CL2);
    CU_ASSERT_EQUAL(reagent_get(RG_NBS)->caution, CA_NBS);
    CU_ASSERT_EQUAL(reagent_get(RG_HBR)->caution, CA_HBR);
    CU_ASSERT_EQUAL(reagent_get(RG_NAOH)->caution, CA_NAOH);
    /* the incompatibility the scrubber depends on (design section 8) */
    CU_ASSERT_PTR_NOT_NULL(strstr(caution_get(CA_NAOCL)->incompatible, "chlorine"));
    CU_ASSERT_PTR_NOT_NULL(strstr(caution_get(CA_NAOCL)->incompatible, "Acid"));
    CU_ASSERT_PTR_NOT_NULL(strstr(caution_get(CA_CL2)->incompatible, "mmonia"));
    CU_ASSERT_PTR_NOT_NULL(strstr(caution_get(CA_CL2)->incompatible, "hydrocarbons"));
    /* NIOSH Pocket Guide (2007) values that the ledger quotes most */
    CU_ASSERT_PTR_NOT_NULL(strstr(caution_get(CA_CL2)->limits[0].value, "C 0.5 ppm"));
    CU_ASSERT_STRING_EQUAL(caution_get(CA_CL2)->limits[2].value, "10 ppm");
    CU_ASSERT_PTR_NOT_NULL(strstr(caution_get(CA_HCL)->limits[0].value, "C 5 ppm"));
    CU_ASSERT_STRING_EQUAL(caution_get(CA_SO2CL2)->limits[0].value, "none established");
    CU_ASSERT_STRING_EQUAL(caution_get(CA_NBS)->limits[0].value, "none established");
}

/* IDLH of the acid gases against the NIOSH IDLH Value Profiles of 2025 (Hydrogen Chloride:
 * 45 ppm, replacing 50 ppm; Hydrogen Bromide: 35 ppm, replacing 30 ppm): the table row, its
 * source and the one-line caution `check` prints must all show the new figure. */
static void idlh_2025(void)
{
    const struct { int ca; const char *value, *profile, *short_text; } want[] = {
        {CA_HCL, "45 ppm", "Hydrogen Chloride", "IDLH 45 ppm"},
        {CA_HBR, "35 ppm", "Hydrogen Bromide", "IDLH 35 ppm"}};
    for (int i = 0; i < 2; i++) {
        const struct caution_info *ci = caution_get(want[i].ca);
        CU_ASSERT_PTR_NOT_NULL_FATAL(ci);
        int found = 0;
        for (int k = 0; k < ci->nlimits; k++) {
            const struct exposure_limit *l = &ci->limits[k];
            if (strcmp(l->kind, "IDLH"))
                continue;
            found++;
            CU_ASSERT_STRING_EQUAL(l->value, want[i].value);
            CU_ASSERT_PTR_NOT_NULL(strstr(l->source, "NIOSH IDLH Value Profile"));
            CU_ASSERT_PTR_NOT_NULL(strstr(l->source, want[i].profile));
            CU_ASSERT_PTR_NOT_NULL(strstr(l->source, "2025"));
        }
        CU_ASSERT_EQUAL(found, 1);
        CU_ASSERT_PTR_NOT_NULL(strstr(ci->short_form, want[i].short_text));
    }
}

static void deferral(void)
{
    const char *d = caution_deferral();
    CU_ASSERT_PTR_NOT_NULL_FATAL(d);
    CU_ASSERT_PTR_NOT_NULL(strstr(d, "SDS"));
    CU_ASSERT_PTR_NOT_NULL(strstr(d, "Safety Data Sheet"));
    CU_ASSERT_PTR_NOT_NULL(strstr(d, "regulations"));
    CU_ASSERT_PTR_NOT_NULL(strstr(d, "licensed engineer"));
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"masses match formulas", masses_match_formulas},
        {"stoichiometry balances", stoichiometry_balances},
        {"unreacted and phase", unreacted_and_phase},
        {"lookups", lookups}, {"salt rows", salt_rows}, {"liquor rows", liquor_rows}, {"soda-ash row", soda_ash_row},
        {"cautions", cautions}, {"IDLH 2025 profiles", idlh_2025},
        {"deferral", deferral}};
    return CU_RUN_ALL("reagents", cases);
}

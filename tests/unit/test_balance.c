/* test_balance.c - one run's mass balance against hand calculations: moles charged and
 * reacted, by-products, the vent and what stays dissolved, unreacted reagent left in the mass,
 * product masses by degree, and the SO2Cl2 boiling-point warning.
 *
 * Hand figures use CIAAW 2021 standard atomic weights, abridged values (H 1.008, C 12.011,
 * N 14.007, O 15.999, S 32.06, Cl 35.45, Br 79.904), written out below, never taken from the
 * program. A formula substrate has all H alike; with the over-halogenation factor 1 the batch
 * degree distribution is then binomial, x_n = C(N, n) p^n (1 - p)^(N - n), p = mean degree / N
 * (design section 4, analytic limit). */
#include "balance.h"
#include "cu_helpers.h"
#include "hlerr.h"
#include "reagents.h"
#include <string.h>

#define A_H 1.008
#define A_C 12.011
#define A_N 14.007
#define A_O 15.999
#define A_S 32.06
#define A_CL 35.45
#define A_BR 79.904

static double binom(int n, int k, double p)
{
    double c = 1;
    for (int i = 0; i < k; i++)
        c = c * (n - i) / (i + 1);
    return c * pow(p, k) * pow(1 - p, n - k);
}

static struct bal_in formula_run(const char *formula, double kg, int reagent, double eq,
                                 double conversion, double retained)
{
    return (struct bal_in){.formula = formula, .substrate_kg = kg, .reagent = reagent,
                           .reagent_eq = eq, .halogen_conversion = conversion, .temp_c = 25,
                           .mode = KIN_BATCH, .vent_retained_fraction = retained};
}

static enum hl_status go(const struct bal_in *in, struct bal_out *o)
{
    struct hl_err e;
    hl_err_clear(&e);
    enum hl_status st = bal_compute(in, o, &e);
    if (st)
        printf("\n  bal_compute: %s", e.msg);
    return st;
}

/* Methane as a formula, 2 Cl2 per mol, 80 % conversion, a quarter of the acid retained. */
static void methane_chlorination(void)
{
    const double m_ch4 = A_C + 4 * A_H;          /* 16.043 g/mol */
    struct bal_in in = formula_run("CH4", m_ch4, RG_CL2, 2.0, 0.8, 0.25); /* 1000 mol */
    struct bal_out o;
    CU_ASSERT_FATAL(go(&in, &o) == HL_OK);
    ASSERT_REL(o.substrate_mol, 1000, 1e-12);
    ASSERT_REL(o.reagent_mol, 2000, 1e-12);
    ASSERT_REL(o.reagent_kg, 2000 * 2 * A_CL / 1000, 1e-12);
    /* 80 % of the 2000 mol Cl2 reacts: 1600 mol C-Cl, 1600 mol HCl (RH + Cl2 -> RCl + HCl) */
    ASSERT_REL(o.reagent_reacted_mol, 1600, 1e-12);
    ASSERT_REL(o.reagent_unreacted_mol, 400, 1e-12);
    ASSERT_REL(o.hx_kg[0], 1600 * (A_H + A_CL) / 1000, 1e-12);
    ASSERT_ABS(o.hx_kg[1], 0, 0);
    /* a quarter of the HCl stays dissolved, the rest vents; unreacted Cl2 all vents */
    ASSERT_REL(o.retained_mol[VS_HCL], 400, 1e-12);
    ASSERT_REL(o.vent_mol[VS_HCL], 1200, 1e-12);
    ASSERT_REL(o.vent_mol[VS_CL2], 400, 1e-12);
    ASSERT_ABS(o.retained_mol[VS_CL2], 0, 0);
    ASSERT_ABS(o.reagent_left_kg, 0, 0); /* a gas: nothing left in the mass */
    /* degrees: binomial, N = 4, p = 1.6 / 4; each product weighed by hand */
    CU_ASSERT_EQUAL(o.nproducts, 5);
    double over_kg = 0, seen = 0;
    for (int i = 0; i < o.nproducts; i++) {
        const struct bal_product *p = &o.products[i];
        int d = p->degree;
        double mm = A_C + (4 - d) * A_H + d * A_CL;
        ASSERT_REL(p->molar_mass_g_mol, mm, 1e-12);
        ASSERT_REL(p->mol_fraction, binom(4, d, 0.4), 1e-9);
        ASSERT_REL(p->kg, 1000 * binom(4, d, 0.4) * mm / 1000, 1e-9);
        if (d >= 2)
            over_kg += 1000 * binom(4, d, 0.4) * mm / 1000;
        seen += 1 << d;
    }
    ASSERT_ABS(seen, 31, 0); /* degrees 0, 1, 2, 3 and 4 each once */
    ASSERT_REL(o.overhal_kg, over_kg, 1e-9);
    ASSERT_ABS(o.max_rel_error, 0, 1e-9);
    bal_free(&o);
}

/* Ethane and Br2: the HBr by-product, retained and vented. */
static void ethane_bromination(void)
{
    const double m = 2 * A_C + 6 * A_H; /* 30.070 */
    struct bal_in in = formula_run("C2H6", 2 * m, RG_BR2, 0.5, 1.0, 0.1); /* 2000 mol, 1000 Br2 */
    struct bal_out o;
    CU_ASSERT_FATAL(go(&in, &o) == HL_OK);
    ASSERT_REL(o.reagent_reacted_mol, 1000, 1e-12);
    ASSERT_REL(o.hx_kg[1], 1000 * (A_H + A_BR) / 1000, 1e-12); /* 80.912 kg HBr */
    ASSERT_ABS(o.hx_kg[0], 0, 0);
    ASSERT_REL(o.retained_mol[VS_HBR], 100, 1e-12);
    ASSERT_REL(o.vent_mol[VS_HBR], 900, 1e-12);
    ASSERT_ABS(o.vent_mol[VS_BR2], 0, 1e-9);
    bal_free(&o);
}

/* SO2Cl2 on propane at 90 % conversion: SO2 and HCl from the reacted part, the rest stays in
 * the mass (a liquid), and a warning when the run is hotter than its boiling point. */
static void sulfuryl_chloride(void)
{
    const double m = 3 * A_C + 8 * A_H;                       /* 44.097 */
    const double m_so2cl2 = A_S + 2 * A_O + 2 * A_CL;         /* 134.958 */
    struct bal_in in = formula_run("C3H8", m, RG_SO2CL2, 1.0, 0.9, 0.2); /* 1000 mol */
    in.temp_c = 70;
    struct bal_out o;
    CU_ASSERT_FATAL(go(&in, &o) == HL_OK);
    ASSERT_REL(o.reagent_reacted_mol, 900, 1e-12);
    /* RH + SO2Cl2 -> RCl + SO2 + HCl: 900 mol each, a fifth of each acid gas retained */
    ASSERT_REL(o.so2_kg, 900 * (A_S + 2 * A_O) / 1000, 1e-12);
    ASSERT_REL(o.retained_mol[VS_SO2], 180, 1e-12);
    ASSERT_REL(o.vent_mol[VS_SO2], 720, 1e-12);
    ASSERT_REL(o.vent_mol[VS_HCL], 720, 1e-12);
    ASSERT_ABS(o.vent_mol[VS_CL2], 0, 0);
    /* 100 mol unreacted SO2Cl2 stay in the mass: 13.4958 kg */
    ASSERT_REL(o.reagent_left_kg, 100 * m_so2cl2 / 1000, 1e-12);
    ASSERT_ABS(o.max_rel_error, 0, 1e-9);
    /* SO2Cl2 boils at 69.1 C (CRC Handbook of Chemistry and Physics, physical constants of
     * inorganic compounds; from memory): at 70 C the unreacted reagent may leave with the vent */
    CU_ASSERT_PTR_NOT_NULL(strstr(o.warning, "boiling point"));
    bal_free(&o);
    in.temp_c = 68;
    CU_ASSERT_FATAL(go(&in, &o) == HL_OK);
    CU_ASSERT_PTR_NULL(strstr(o.warning, "boiling point"));
    bal_free(&o);
    /* and all of it reacted: nothing left to boil off, no warning */
    in.temp_c = 70;
    in.halogen_conversion = 1.0;
    CU_ASSERT_FATAL(go(&in, &o) == HL_OK);
    ASSERT_ABS(o.reagent_left_kg, 0, 0);
    CU_ASSERT_PTR_NULL(strstr(o.warning, "boiling point"));
    bal_free(&o);
}

/* NBS on toluene: succinimide from the NBS reacted, unreacted NBS left as a solid. */
static void nbs_toluene(void)
{
    const double m_tol = 7 * A_C + 8 * A_H;                           /* 92.141 */
    const double m_nbs = 4 * A_C + 4 * A_H + A_BR + A_N + 2 * A_O;    /* 177.985 */
    const double m_succ = 4 * A_C + 5 * A_H + A_N + 2 * A_O;          /* 99.089 */
    struct bal_in in = {.smiles = "Cc1ccccc1", .substrate_kg = m_tol, .reagent = RG_NBS,
                        .reagent_eq = 1.0, .halogen_conversion = 0.9, .temp_c = 80,
                        .mode = KIN_BATCH};
    struct bal_out o;
    CU_ASSERT_FATAL(go(&in, &o) == HL_OK);
    ASSERT_REL(o.substrate_mol, 1000, 1e-12);
    ASSERT_REL(o.reagent_kg, m_nbs, 1e-12);
    ASSERT_REL(o.succinimide_kg, 900 * m_succ / 1000, 1e-12);
    ASSERT_REL(o.reagent_left_kg, 100 * m_nbs / 1000, 1e-12);
    for (int v = 0; v < VS_COUNT; v++)
        ASSERT_ABS(o.vent_mol[v], 0, 0); /* RH + NBS -> RBr + succinimide: nothing vents */
    ASSERT_ABS(o.max_rel_error, 0, 1e-9);
    bal_free(&o);
}

/* Runs through one cache, as the ledger computes a campaign: batch sizes and reagent
 * amounts change from run to run and come back, so the cache's stored distributions are
 * met again and each must still be the binomial of its own run (ethane as a formula, six
 * H alike, over-halogenation factor 1; N = 6, p = eq / 6 at full conversion). */
static void cached_runs_binomial(void)
{
    const double m = 2 * A_C + 6 * A_H; /* 30.070 g/mol */
    static const double mol[] = {1000, 3000, 250};
    static const double eq[] = {0.6, 1.2};
    struct bal_cache *c = bal_cache_new();
    CU_ASSERT_FATAL(c != NULL);
    for (int pass = 0; pass < 2; pass++)
        for (int i = 0; i < 3; i++)
            for (int j = 0; j < 2; j++) {
                struct bal_in in = formula_run("C2H6", mol[i] * m / 1000, RG_CL2, eq[j], 1.0, 0);
                struct bal_out o;
                struct hl_err e;
                hl_err_clear(&e);
                CU_ASSERT_FATAL(bal_compute_cached(&in, c, &o, &e) == HL_OK);
                ASSERT_REL(o.substrate_mol, mol[i], 1e-12);
                CU_ASSERT_EQUAL(o.nproducts, 7);
                for (int k = 0; k < o.nproducts; k++) {
                    const struct bal_product *p = &o.products[k];
                    ASSERT_REL(p->mol_fraction, binom(6, p->degree, eq[j] / 6), 1e-9);
                    ASSERT_REL(p->mol, mol[i] * binom(6, p->degree, eq[j] / 6), 1e-9);
                }
                bal_free(&o);
            }
    bal_cache_free(c);
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"methane chlorination by hand", methane_chlorination},
        {"ethane bromination by hand", ethane_bromination},
        {"SO2Cl2: SO2, reagent left, boiling-point warning", sulfuryl_chloride},
        {"NBS: succinimide and NBS left", nbs_toluene},
        {"runs through one cache stay binomial", cached_runs_binomial},
    };
    return CU_RUN_ALL("balance", cases);
}

/* test_emissions.c - what leaves the stack: removal from transfer units against the
 * analytic limits of 1 - e^-NTU, mg/Nm3 against the ideal-gas molar volume, breakthrough of
 * an exhausted liquor, hourly bins, calendar-year totals and permit checks, by hand. */
#include "cu_helpers.h"
#include "emissions.h"
#include "hlerr.h"
#include "hlmem.h"
#include "isodate.h"
#include "scrubber.h"
#include <string.h>

/* CIAAW 2021 standard atomic weights, abridged values */
#define A_H 1.008
#define A_O 15.999
#define A_NA 22.990
#define A_CL 35.45
#define MM_HCL (A_H + A_CL)
#define MM_NAOH (A_NA + A_O + A_H)

static int64_t t(const char *s)
{
    int64_t m = 0;
    CU_ASSERT_EQUAL(isodate_parse(s, &m, NULL), 0);
    return m;
}

static enum hl_status go(const struct scrub_unit_in *u, const struct scrub_run_in *r, int n,
                         struct scrub_run_out *ro, struct scrub_unit_out *uo)
{
    int order[16];
    for (int i = 0; i < n; i++)
        order[i] = i;
    struct hl_err e;
    hl_err_clear(&e);
    return scrub_campaign(u, 1, r, n, order, ro, uo, &e);
}

/* Gas-film control with the interface kept free of gas: y_out / y_in = exp(-NTU).  Limits:
 * removal -> NTU - NTU^2 / 2 for small NTU (Taylor series), -> 1 for large; and at
 * NTU = ln 100 exactly 0.99 (two decades of concentration). */
static void test_removal_from_ntu(void)
{
    ASSERT_REL(scrub_removal_from_ntu(1e-6), 1e-6 - 0.5e-12, 1e-12);
    ASSERT_REL(scrub_removal_from_ntu(1e-3), 1e-3 - 0.5e-6 + 1e-9 / 6, 1e-9);
    ASSERT_REL(scrub_removal_from_ntu(log(100.0)), 0.99, 1e-14);
    ASSERT_REL(scrub_removal_from_ntu(log(1000.0)), 0.999, 1e-14);
    ASSERT_REL(scrub_removal_from_ntu(50.0), 1.0, 1e-15);
    ASSERT_ABS(scrub_removal_from_ntu(0.0), 0.0, 0.0);
    /* a column credited with its design removal: 0.995 of every gas a caustic absorbs */
    struct scrub_unit_in u = {.id = "K", .base_wt_pct = 18, .liquor_kg = 6000, .min_base_wt_pct = 2,
                              .makeup_base_wt_pct = 50, .fresh_liquor_temp_c = 25, .max_liquor_temp_c = 40,
                              .has_column = 1, .packing_factor_1_m = 200, .htu_m = 0.5,
                              .removal_fraction = 0.995, .flood_fraction = 0.7,
                              .carrier_kmol_h = 5, .liquor_kg_h = 20000, .gas_temp_c = 25};
    struct scrub_run_in r = {.unit = 0, .start_min = t("2027-03-02T06:00"), .feed_h = 1, .peak_factor = 1};
    r.vent_mol[VS_HCL] = 1000;
    r.vent_mol[VS_CL2] = 100;
    struct scrub_run_out ro;
    struct scrub_unit_out uo;
    CU_ASSERT_EQUAL_FATAL(go(&u, &r, 1, &ro, &uo), HL_OK);
    ASSERT_REL(uo.removal[VS_HCL], 0.995, 1e-12);
    ASSERT_REL(uo.removal[VS_SO2], 0.995, 1e-12);
    CU_ASSERT_EQUAL(uo.removal_origin[VS_HCL], SCRUB_REM_COLUMN);
    ASSERT_REL(ro.emis_kg[VS_HCL], 1000 * MM_HCL / 1000 * 0.005, 1e-9);
    ASSERT_REL(ro.emis_kg[VS_CL2], 100 * 2 * A_CL / 1000 * 0.005, 1e-9);
    scrub_unit_out_free(&uo, 1);
}

/* A normal cubic metre holds 1/22.414 kmol of ideal gas at 0 C, 101.325 kPa (CODATA:
 * R T / p = 22.41397 L/mol), so pure HCl has 36.458 / 22.414 kg/Nm3; 0.5 kmol/h of HCl in a
 * stack of 100 kmol/h is 5000 ppm by volume, 5000 x 36.458 / 22.414 mg/Nm3. */
static void test_mg_nm3(void)
{
    double vm = 22.41397;
    ASSERT_REL(emis_mg_nm3(MM_HCL, vm), MM_HCL / vm * 1e6, 1e-12);
    ASSERT_REL(emis_mg_nm3(0.5 * MM_HCL, 100 * vm), 5000 * MM_HCL / vm, 1e-12);
    ASSERT_ABS(emis_mg_nm3(1.0, 0.0), 0.0, 0.0); /* no stack flow: no concentration */
}

/* Caustic: 10 kg NaOH = 250.02 mol.  Run 1 (200 mol HCl) takes 200 mol; run 2 overlaps it
 * (no changeout possible) and finds 50.02 mol for 200: the share f = left / need it can
 * neutralise, of which 1 - removal leaves; the rest (1 - f) leaves whole. */
static void test_caustic_breakthrough(void)
{
    struct scrub_unit_in u = {.id = "W", .base_wt_pct = 10, .liquor_kg = 100, .min_base_wt_pct = 1,
                              .makeup_base_wt_pct = 50, .fresh_liquor_temp_c = 25, .max_liquor_temp_c = 40,
                              .removal_given = 1u << VS_HCL};
    u.removal[VS_HCL] = 0.9;
    struct scrub_run_in r[2] = {{.unit = 0, .start_min = t("2027-04-01T00:00"), .feed_h = 1, .peak_factor = 1},
                                {.unit = 0, .start_min = t("2027-04-01T00:30"), .feed_h = 1, .peak_factor = 1}};
    r[0].vent_mol[VS_HCL] = r[1].vent_mol[VS_HCL] = 200;
    struct scrub_run_out ro[2];
    struct scrub_unit_out uo;
    CU_ASSERT_EQUAL_FATAL(go(&u, r, 2, ro, &uo), HL_OK);
    double kg = 200 * MM_HCL / 1000, need = 200 * MM_NAOH / 1000, f = (10 - need) / need;
    ASSERT_REL(ro[0].emis_kg[VS_HCL], kg * 0.1, 1e-12);
    ASSERT_ABS(ro[0].emis_breakthrough_kg, 0, 0);
    ASSERT_REL(ro[1].emis_kg[VS_HCL], kg * (1 - f) + kg * f * 0.1, 1e-12);
    ASSERT_REL(ro[1].emis_breakthrough_kg, kg * (1 - f), 1e-12);
    /* hours: run 1 00:00-01:00, run 2 00:30-01:30; hour 00 holds all of run 1 and half of
     * run 2, hour 01 the other half */
    const struct scrub_emis *m = &uo.emis[VS_HCL];
    ASSERT_REL(m->kg, ro[0].emis_kg[VS_HCL] + ro[1].emis_kg[VS_HCL], 1e-12);
    ASSERT_REL(m->peak_kg_h, ro[0].emis_kg[VS_HCL] + ro[1].emis_kg[VS_HCL] / 2, 1e-12);
    CU_ASSERT_EQUAL(m->peak_at_min, t("2027-04-01T00:00"));
    ASSERT_REL(scrub_hourly_emis_kg_h(&uo, VS_HCL, 1), ro[1].emis_kg[VS_HCL] / 2, 1e-12);
    scrub_unit_out_free(&uo, 1);
}

/* Water: 100 kg of water, HCl changeout at 20 wt%, 30 kg of HCl vented.  It takes x kg with
 * x / (100 + x) = 0.20, x = 25 kg; of those 1 - 0.95 leaves, and the other 5 kg whole. */
static void test_water_breakthrough(void)
{
    struct scrub_unit_in u = {.id = "Q", .liquor = LQ_WATER, .liquor_kg = 100, .max_gas_wt_pct = {[VS_HCL] = 20, [VS_HBR] = 47},
                              .fresh_liquor_temp_c = 25, .max_liquor_temp_c = 40};
    struct scrub_run_in r = {.unit = 0, .start_min = t("2027-05-01T00:00"), .feed_h = 1, .peak_factor = 1};
    r.vent_mol[VS_HCL] = 30.0 * 1000 / MM_HCL;
    r.vent_mol[VS_CL2] = 10;
    struct scrub_run_out ro;
    struct scrub_unit_out uo;
    CU_ASSERT_EQUAL_FATAL(go(&u, &r, 1, &ro, &uo), HL_OK);
    ASSERT_REL(uo.removal[VS_HCL], 0.95, 1e-12); /* the water default (from memory) */
    ASSERT_REL(ro.emis_kg[VS_HCL], 5.0 + 25.0 * 0.05, 1e-9);
    ASSERT_REL(ro.emis_breakthrough_kg, 5.0, 1e-9);
    ASSERT_REL(ro.emis_kg[VS_CL2], 10 * 2 * A_CL / 1000, 1e-12); /* Cl2 passes water */
    scrub_unit_out_free(&uo, 1);
}

/* A run straddling New Year: 2027-12-31T23:30 for 1 h at 2 kg/h out: 1 kg in 2027, 1 kg in
 * 2028 (the hours 23:00 and 00:00 each hold half); a second run on 2028-01-01 10:00 adds 4 kg
 * over 2 h.  Day means: 2027-12-31 1 kg / 24 h, 2028-01-01 5 kg / 24 h. */
static void test_years_days_permits(void)
{
    struct scrub_unit_in u = {.id = "Y", .base_wt_pct = 18, .liquor_kg = 6000, .min_base_wt_pct = 2,
                              .makeup_base_wt_pct = 50, .fresh_liquor_temp_c = 25, .max_liquor_temp_c = 40,
                              .removal_given = 1u << VS_HCL};
    u.removal[VS_HCL] = 0.5;
    struct scrub_run_in r[2] = {{.unit = 0, .start_min = t("2027-12-31T23:30"), .feed_h = 1, .peak_factor = 1},
                                {.unit = 0, .start_min = t("2028-01-01T10:00"), .feed_h = 2, .peak_factor = 1}};
    r[0].vent_mol[VS_HCL] = 4.0 * 1000 / MM_HCL; /* 4 kg in, 2 kg out */
    r[1].vent_mol[VS_HCL] = 8.0 * 1000 / MM_HCL; /* 8 kg in, 4 kg out */
    struct scrub_run_out ro[2];
    struct scrub_unit_out uo;
    CU_ASSERT_EQUAL_FATAL(go(&u, r, 2, ro, &uo), HL_OK);
    struct emis_run er[2];
    for (int i = 0; i < 2; i++) {
        er[i] = (struct emis_run){0, r[i].start_min, scrub_vent_end_min(&r[i]), {0}};
        memcpy(er[i].kg, ro[i].emis_kg, sizeof er[i].kg);
    }
    struct emis_permit p[2] = {{0, VS_HCL, 1.5, 0, 0.0012, 1}, {0, VS_HCL, 1.9, 5000, 0, 0}};
    double stack = 400;
    struct emis_unit *eu = NULL;
    struct emis_check *c = NULL;
    int nc = 0;
    struct hl_err e;
    hl_err_clear(&e);
    CU_ASSERT_EQUAL_FATAL(emis_build(&uo, &stack, 1, er, 2, p, 2, &eu, &c, &nc, &e), HL_OK);
    const struct emis_species *sp = &eu[0].sp[VS_HCL];
    CU_ASSERT_EQUAL_FATAL(sp->nyears, 2);
    CU_ASSERT_EQUAL(sp->years[0].year, 2027);
    CU_ASSERT_EQUAL(sp->years[1].year, 2028);
    ASSERT_REL(sp->years[0].t, 0.001, 1e-9);
    ASSERT_REL(sp->years[1].t, 0.005, 1e-9);
    ASSERT_REL(sp->peak_kg_h, 2.0, 1e-12); /* hours 10:00 and 11:00, earliest wins */
    CU_ASSERT_EQUAL(sp->peak_at_min, t("2028-01-01T10:00"));
    ASSERT_REL(sp->peak_mg_nm3, 2.0e6 / 400, 1e-12);
    CU_ASSERT_EQUAL_FATAL(nc, 4);
    /* day mean against 1.5 kg/h: 5/24 kg/h, not exceeded */
    CU_ASSERT_EQUAL(c[0].kind, EMIS_KG_H);
    ASSERT_REL(c[0].value, 5.0 / 24, 1e-12);
    CU_ASSERT_EQUAL(c[0].at_min, t("2028-01-01"));
    CU_ASSERT_FALSE(c[0].exceeded);
    CU_ASSERT_EQUAL_FATAL(c[0].nruns, 2);
    /* the worst year 2028 (5 kg) against 1.2 kg: exceeded, both runs emit in it */
    CU_ASSERT_EQUAL(c[1].kind, EMIS_T_YR);
    ASSERT_REL(c[1].value, 0.005, 1e-9);
    CU_ASSERT_EQUAL(c[1].at_year, 2028);
    CU_ASSERT_TRUE(c[1].exceeded);
    /* hour: 2 kg/h against 1.9 exceeded, only the second run; 5000 mg/Nm3 just held */
    CU_ASSERT_EQUAL(c[2].kind, EMIS_KG_H);
    ASSERT_REL(c[2].value, 2.0, 1e-12);
    CU_ASSERT_TRUE(c[2].exceeded);
    CU_ASSERT_EQUAL_FATAL(c[2].nruns, 1);
    CU_ASSERT_EQUAL(c[2].runs[0], 1);
    CU_ASSERT_EQUAL(c[3].kind, EMIS_MG_NM3);
    ASSERT_REL(c[3].value, 5000.0, 1e-12);
    CU_ASSERT_FALSE(c[3].exceeded);
    emis_free(eu, 1, c, nc);
    scrub_unit_out_free(&uo, 1);
}

/* A removal fraction outside [0, 1] is a bad input for the model too. */
static void test_bad_removal(void)
{
    struct scrub_unit_in u = {.id = "B", .base_wt_pct = 18, .liquor_kg = 6000, .min_base_wt_pct = 2,
                              .makeup_base_wt_pct = 50, .fresh_liquor_temp_c = 25, .max_liquor_temp_c = 40,
                              .removal_given = 1u << VS_SO2};
    u.removal[VS_SO2] = 1.01;
    struct scrub_run_in r = {.unit = 0, .start_min = t("2027-03-02T06:00"), .feed_h = 1, .peak_factor = 1};
    struct scrub_run_out ro;
    struct scrub_unit_out uo;
    CU_ASSERT_EQUAL(go(&u, &r, 1, &ro, &uo), HL_ERR_INPUT);
}

int main(void)
{
    static const struct cu_case cases[] = {
        {"removal from transfer units", test_removal_from_ntu},
        {"mg/Nm3 at 0 C, 101.325 kPa", test_mg_nm3},
        {"caustic breakthrough", test_caustic_breakthrough},
        {"water breakthrough", test_water_breakthrough},
        {"years, days, permits", test_years_days_permits},
        {"bad removal", test_bad_removal},
    };
    return CU_RUN_ALL("emissions", cases);
}

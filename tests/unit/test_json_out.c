/* test_json_out.c - the JSON ledger rendered from a tiny hand-made ledger and read back
 * with cJSON's parser (an independent reader of the text): keys of design section 5,
 * values, ISO dates, determinism, refusal of NaN/Inf and bad UTF-8 with the JSON path,
 * and every allocation failure point walked (no crash; ASan/valgrind check leaks).
 * The streamed writer's numbers and strings are held against cJSON 1.7.15's own printer
 * (Debian's libcjson, the library the tree writer before it used) value by value. */
#include "cu_helpers.h"
#include "hlmem.h"
#include "isodate.h"
#include "json_out.h"

#include <cjson/cJSON.h>
#include <stdint.h>
#include <stdlib.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

static struct ledger_product prods[2];
static struct ledger_run run;
static struct ledger_month month;
static struct ord_line order;
static struct ledger_scrubber unit;
static double hourly[3];
static int peak_runs[1];
static struct ledger_warning warn;
static struct ledger_assumption assume;
static struct ledger led;

static int64_t at(const char *s)
{
    int64_t m = 0;
    isodate_parse(s, &m, NULL);
    return m;
}

/* One Cl2 run on 2-methylpropane: 100 mol substrate, 50 mol Cl2 charged, 48 reacted. */
static void make(void)
{
    memset(&run, 0, sizeof run);
    memset(prods, 0, sizeof prods);
    prods[0] = (struct ledger_product){.smiles = "CC(C)C", .formula = "C4H10", .degree = 0,
                                    .molar_mass_g_mol = 58.124, .mol = 52, .kg = 3.022448,
                                    .mol_fraction = 0.52, .role = ROLE_UNREACTED};
    prods[1] = (struct ledger_product){.smiles = NULL, .formula = "C4H9Cl", .degree = 1,
                                    .molar_mass_g_mol = 92.566, .mol = 48, .kg = 4.443168,
                                    .mol_fraction = 0.48, .role = ROLE_WANTED};
    run.id = "=1+1";
    run.reactor = "R-3";
    run.scrubber = "VS-1";
    run.substrate_name = "2-methylpropane";
    run.smiles = "CC(C)C";
    run.start_min = at("2027-03-02T06:00");
    run.feed_h = 2.5;
    run.temp_c = 40;
    run.substrate_kg = 5.8124;
    run.reagent = RG_CL2;
    run.mode = KIN_CSTR;
    struct ledger_bal *b = &run.bal;
    b->substrate_formula = "C4H10";
    b->substrate_molar_mass_g_mol = 58.124;
    b->substrate_mol = 100;
    b->reagent_mol = 50;
    b->reagent_kg = 3.5453;
    b->reagent_reacted_mol = 48;
    b->reagent_unreacted_mol = 2;
    b->halogen_reacted_mol = 48;
    b->mean_degree = 0.48;
    b->products = prods;
    b->nproducts = 2;
    b->hx_kg[0] = 1.750;
    b->vent_mol[VS_HCL] = 48;
    b->vent_mol[VS_CL2] = 2;
    b->vent_mol[VS_SO2] = -0.0; /* must print as 0 */
    b->max_rel_error = 1.5e-16;
    b->el_in_mol[0] = 400;
    b->el_out_mol[0] = 400;
    run.scrub.acid_kmol_h = 0.02;
    run.scrub.naoh_kg = 2.07985;
    run.scrub.changeout_before = 1;
    run.scrub.salt_kg[SALT_NAOCL] = 0.14888;

    memset(&month, 0, sizeof month);
    month.month_index = isodate_month_index(run.start_min);
    month.runs = 1;
    month.product_kg = 4.443168;
    month.reagents_kg[RG_CL2] = 3.5453;
    month.vent_kg[VS_HCL] = 1.750;
    month.spent_liquor_kg = 6100;

    memset(&order, 0, sizeof order);
    order.month_index = month.month_index;
    order.item = RG_CL2;
    order.demand_kg = 3.5453;
    order.to_order_kg = 303.5453;
    order.container = "ton container";
    order.containers = 1;
    order.first_use_min = run.start_min;
    order.order_by_min = run.start_min - 10 * 1440;
    order.late = 1;

    hourly[0] = 0.02;
    hourly[1] = 0.02;
    hourly[2] = 0.01;
    peak_runs[0] = 0;
    memset(&unit, 0, sizeof unit);
    unit.id = "VS-1";
    unit.rated_acid_kmol_h = 2;
    unit.out.peak_acid_kmol_h = 0.02;
    unit.out.peak_at_min = run.start_min;
    unit.out.peak_runs = peak_runs;
    unit.out.npeak_runs = 1;
    unit.out.hour0_min = run.start_min;
    unit.out.nhours = 3;
    unit.out.hourly_kmol_h = hourly;

    warn = (struct ledger_warning){NULL, "an order-by date has already passed"};
    assume = (struct ledger_assumption){.what = "Liquor heat capacity", .has_value = 1, .value = 3.7,
                                        .unit = "kJ/(kg K)", .origin = "test"};

    memset(&led, 0, sizeof led);
    led.title = "Tiny";
    led.site = NULL;
    led.file = "tiny.json";
    led.created_min = at("2027-02-15");
    led.today_min = -1;
    led.runs = &run;
    led.nruns = 1;
    led.months = &month;
    led.nmonths = 1;
    led.orders = &order;
    led.norders = 1;
    led.scrubbers = &unit;
    led.nscrubbers = 1;
    led.warnings = &warn;
    led.nwarnings = 1;
    led.assumptions = &assume;
    led.nassumptions = 1;
    led.cautions_mask = 1u << CA_CL2;
}

static const cJSON *get(const cJSON *o, const char *k)
{
    const cJSON *v = cJSON_GetObjectItemCaseSensitive(o, k);
    if (!v)
        printf("\n  missing key %s", k);
    return v;
}

static double num(const cJSON *o, const char *k)
{
    const cJSON *v = get(o, k);
    return cJSON_IsNumber(v) ? v->valuedouble : NAN;
}

static const char *str(const cJSON *o, const char *k)
{
    const cJSON *v = get(o, k);
    return cJSON_IsString(v) ? v->valuestring : "";
}

static void keys_and_values(void)
{
    make();
    char *text = NULL;
    struct hl_err e;
    hl_err_clear(&e);
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_OK);
    if (!text)
        return;
    const char *end = NULL;
    cJSON *j = cJSON_ParseWithOpts(text, &end, 1);
    CU_ASSERT_PTR_NOT_NULL(j);
    if (!j) {
        hl_free(text);
        return;
    }
    CU_ASSERT_STRING_EQUAL(str(j, "format"), "haloledger-ledger/1");
    CU_ASSERT_STRING_EQUAL(str(j, "created"), "2027-02-15T00:00");
    CU_ASSERT(cJSON_IsNull(get(j, "today")));
    const cJSON *c = get(j, "campaign");
    CU_ASSERT_STRING_EQUAL(str(c, "title"), "Tiny");
    CU_ASSERT(cJSON_IsNull(get(c, "site")));
    CU_ASSERT_STRING_EQUAL(str(c, "file"), "tiny.json");

    const cJSON *r = cJSON_GetArrayItem(get(j, "runs"), 0);
    CU_ASSERT_EQUAL(cJSON_GetArraySize(get(j, "runs")), 1);
    CU_ASSERT_STRING_EQUAL(str(r, "id"), "=1+1");
    CU_ASSERT_STRING_EQUAL(str(r, "start"), "2027-03-02T06:00");
    CU_ASSERT_STRING_EQUAL(str(r, "end"), "2027-03-02T08:30");
    CU_ASSERT_STRING_EQUAL(str(r, "reactor"), "R-3");
    CU_ASSERT_STRING_EQUAL(str(r, "reagent"), reagent_get(RG_CL2)->name);
    CU_ASSERT_STRING_EQUAL(str(r, "reactor_mode"), "cstr");
    ASSERT_REL(num(r, "temp_c"), 40, 0);
    const cJSON *s = get(r, "substrate");
    CU_ASSERT_STRING_EQUAL(str(s, "name"), "2-methylpropane");
    CU_ASSERT_STRING_EQUAL(str(s, "smiles"), "CC(C)C");
    CU_ASSERT_STRING_EQUAL(str(s, "formula"), "C4H10");
    ASSERT_REL(num(s, "molar_mass_g_mol"), 58.124, 0);
    ASSERT_REL(num(s, "kg"), 5.8124, 0); /* exact round trip of the double */
    ASSERT_REL(num(s, "mol"), 100, 0);
    ASSERT_REL(num(get(r, "reagent_charged"), "kg"), 3.5453, 0);
    ASSERT_REL(num(get(r, "reagent_charged"), "mol"), 50, 0);
    ASSERT_REL(num(r, "halogen_reacted_mol"), 48, 0);
    const cJSON *pa = get(r, "products");
    CU_ASSERT_EQUAL(cJSON_GetArraySize(pa), 2);
    const cJSON *p0 = cJSON_GetArrayItem(pa, 0), *p1 = cJSON_GetArrayItem(pa, 1);
    CU_ASSERT_STRING_EQUAL(str(p0, "role"), "unreacted");
    CU_ASSERT_STRING_EQUAL(str(p1, "role"), "wanted");
    CU_ASSERT(cJSON_IsNull(get(p1, "smiles")));
    CU_ASSERT_STRING_EQUAL(str(p1, "formula"), "C4H9Cl");
    ASSERT_REL(num(p1, "degree"), 1, 0);
    ASSERT_REL(num(p1, "mol"), 48, 0);
    ASSERT_REL(num(p1, "kg"), 4.443168, 0);
    ASSERT_REL(num(p1, "mol_fraction"), 0.48, 0);
    const cJSON *by = get(r, "byproducts");
    ASSERT_REL(num(by, "HCl_kg"), 1.75, 0);
    ASSERT_ABS(num(by, "HBr_kg"), 0, 0);
    ASSERT_ABS(num(by, "SO2_kg"), 0, 0);
    ASSERT_ABS(num(by, "succinimide_kg"), 0, 0);
    const cJSON *v = get(r, "vent");
    ASSERT_REL(num(v, "HCl_mol"), 48, 0);
    ASSERT_REL(num(v, "Cl2_mol"), 2, 0);
    ASSERT_ABS(num(v, "HBr_mol"), 0, 0);
    ASSERT_ABS(num(v, "Br2_mol"), 0, 0);
    ASSERT_ABS(num(v, "SO2_mol"), 0, 0);
    ASSERT_REL(num(v, "acid_kmol_h"), 0.02, 0);
    CU_ASSERT_PTR_NULL(strstr(text, ":-0,")); /* -0.0 printed as 0 */
    CU_ASSERT_PTR_NOT_NULL(strstr(text, "\"SO2_mol\":0,"));
    const cJSON *sc = get(r, "scrubber");
    CU_ASSERT_STRING_EQUAL(str(sc, "id"), "VS-1");
    ASSERT_REL(num(sc, "naoh_kg"), 2.07985, 0);
    CU_ASSERT(cJSON_IsTrue(get(sc, "changeout_before")));
    CU_ASSERT(cJSON_IsNumber(get(sc, "heat_kj")) && cJSON_IsNumber(get(sc, "temp_rise_k")));
    ASSERT_REL(num(get(sc, "salts_kg"), "NaOCl"), 0.14888, 0);
    const cJSON *eb = get(r, "element_balance");
    ASSERT_REL(num(eb, "max_rel_error"), 1.5e-16, 0);
    ASSERT_REL(num(get(get(eb, "elements"), "C"), "in_mol"), 400, 0);

    const cJSON *m = cJSON_GetArrayItem(get(j, "months"), 0);
    CU_ASSERT_STRING_EQUAL(str(m, "month"), "2027-03");
    ASSERT_REL(num(m, "runs"), 1, 0);
    ASSERT_REL(num(m, "product_kg"), 4.443168, 0);
    ASSERT_REL(num(get(m, "reagents_kg"), "Cl2"), 3.5453, 0);
    ASSERT_REL(num(get(m, "vent_kg"), "HCl"), 1.75, 0);
    CU_ASSERT(cJSON_IsNumber(get(m, "naoh_kg")) && cJSON_IsNumber(get(m, "changeouts")));
    ASSERT_REL(num(get(m, "waste_kg"), "spent_liquor"), 6100, 0);

    const cJSON *o = cJSON_GetArrayItem(get(j, "orders"), 0);
    CU_ASSERT_STRING_EQUAL(str(o, "month"), "2027-03");
    CU_ASSERT_STRING_EQUAL(str(o, "reagent"), "Cl2");
    ASSERT_REL(num(o, "demand_kg"), 3.5453, 0);
    CU_ASSERT(cJSON_IsNumber(get(o, "stock_start_kg")));
    ASSERT_REL(num(o, "to_order_kg"), 303.5453, 0);
    CU_ASSERT_STRING_EQUAL(str(o, "container"), "ton container");
    ASSERT_REL(num(o, "containers"), 1, 0);
    CU_ASSERT_STRING_EQUAL(str(o, "order_by"), "2027-02-20");
    CU_ASSERT(cJSON_IsTrue(get(o, "late")));

    const cJSON *u = cJSON_GetArrayItem(get(j, "scrubbers"), 0);
    CU_ASSERT_STRING_EQUAL(str(u, "id"), "VS-1");
    ASSERT_REL(num(u, "peak_acid_kmol_h"), 0.02, 0);
    CU_ASSERT_STRING_EQUAL(str(u, "peak_at"), "2027-03-02T06:00");
    ASSERT_REL(num(u, "rated_acid_kmol_h"), 2, 0);
    CU_ASSERT(cJSON_IsFalse(get(u, "overloaded")));
    CU_ASSERT(cJSON_IsNumber(get(u, "changeouts")) && cJSON_IsNumber(get(u, "naoh_kg")));
    CU_ASSERT_STRING_EQUAL(cJSON_GetArrayItem(get(u, "peak_runs"), 0)->valuestring, "=1+1");
    const cJSON *hk = get(get(u, "hourly"), "kmol_h");
    CU_ASSERT_EQUAL(cJSON_GetArraySize(hk), 3);
    ASSERT_REL(cJSON_GetArrayItem(hk, 2)->valuedouble, 0.01, 0);
    CU_ASSERT(cJSON_IsNull(get(u, "column")));

    const cJSON *w = cJSON_GetArrayItem(get(j, "warnings"), 0);
    CU_ASSERT(cJSON_IsNull(get(w, "run")));
    CU_ASSERT_STRING_EQUAL(str(w, "message"), "an order-by date has already passed");
    const cJSON *a = cJSON_GetArrayItem(get(j, "assumptions"), 0);
    ASSERT_REL(num(a, "value"), 3.7, 0);
    CU_ASSERT_STRING_EQUAL(str(a, "unit"), "kJ/(kg K)");
    const cJSON *ca = get(j, "cautions");
    CU_ASSERT_EQUAL(cJSON_GetArraySize(ca), 1);
    CU_ASSERT_STRING_EQUAL(str(cJSON_GetArrayItem(ca, 0), "substance"), caution_get(CA_CL2)->substance);
    CU_ASSERT_STRING_EQUAL(str(j, "caution_deferral"), caution_deferral());

    /* same ledger, same bytes */
    char *again = NULL;
    CU_ASSERT_EQUAL(json_out_render(&led, &again, &e), HL_OK);
    CU_ASSERT(again && strcmp(text, again) == 0);
    hl_free(again);
    cJSON_Delete(j);
    hl_free(text);

    /* a text-only assumption carries null, not a made-up number */
    assume.has_value = 0;
    text = NULL;
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_OK);
    j = text ? cJSON_Parse(text) : NULL;
    CU_ASSERT(cJSON_IsNull(get(cJSON_GetArrayItem(get(j, "assumptions"), 0), "value")));
    cJSON_Delete(j);
    hl_free(text);
    make();
}

static void refuses_bad_values(void)
{
    struct {
        double *slot;
        double bad;
        const char *field;
    } cases[] = {
        {&run.bal.hx_kg[0], NAN, "runs[0].byproducts.HCl_kg"},
        {&run.bal.products[1].kg, INFINITY, "runs[0].products[1].kg"},
        {&hourly[1], -INFINITY, "scrubbers[0].hourly.kmol_h[1]"},
        {&month.vent_kg[VS_HCL], NAN, "months[0].vent_kg.HCl"},
        {&assume.value, NAN, "assumptions[0].value"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        make();
        *cases[i].slot = cases[i].bad;
        char *text = (char *)1;
        struct hl_err e;
        hl_err_clear(&e);
        CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_ERR_INTERNAL);
        CU_ASSERT_PTR_NULL(text);
        CU_ASSERT_STRING_EQUAL(e.field, cases[i].field);
        if (strcmp(e.field, cases[i].field))
            printf("\n  got field '%s' (%s)", e.field, e.msg);
        CU_ASSERT_PTR_NOT_NULL(strstr(e.msg, "non-finite"));
    }
    make();
    run.reactor = "R\xC3\x28"; /* invalid UTF-8 continuation */
    char *text = NULL;
    struct hl_err e;
    hl_err_clear(&e);
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_ERR_INTERNAL);
    CU_ASSERT_STRING_EQUAL(e.field, "runs[0].reactor");
    make();
}

static void write_file(void)
{
    make();
    char dir[] = "/tmp/hl-json-XXXXXX";
    CU_ASSERT_PTR_NOT_NULL(mkdtemp(dir));
    char path[64];
    snprintf(path, sizeof path, "%s/l.json", dir);
    struct hl_err e;
    hl_err_clear(&e);
    CU_ASSERT_EQUAL(json_out_write(&led, path, &e), HL_OK);
    char *text = NULL;
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_OK);
    FILE *f = fopen(path, "rb");
    char buf[16384];
    size_t n = f ? fread(buf, 1, sizeof buf - 1, f) : 0;
    if (f)
        fclose(f);
    buf[n] = '\0';
    CU_ASSERT(text && strcmp(buf, text) == 0);
    hl_free(text);
    /* a device is never replaced */
    CU_ASSERT_EQUAL(json_out_write(&led, "/dev/null", &e), HL_ERR_IO);
    CU_ASSERT_PTR_NOT_NULL(strstr(e.msg, "not a regular file"));
    unlink(path);
    rmdir(dir);
}

/* xorshift64 (Marsaglia 2003, J. Stat. Softw. 8(14)): reproducible test values */
static uint64_t rng_state = 88172645463325252u;
static uint64_t rng(void)
{
    rng_state ^= rng_state << 13;
    rng_state ^= rng_state >> 7;
    rng_state ^= rng_state << 17;
    return rng_state;
}

static int same_as_cjson(double v, long *fails)
{
    char mine[32];
    json_out_number(v, mine);
    cJSON *n = cJSON_CreateNumber(v);
    char *ref = n ? cJSON_PrintUnformatted(n) : NULL;
    int ok = ref && !strcmp(mine, ref);
    if (!ok && (*fails)++ < 5)
        printf("\n  %a: ours %s, cJSON %s", v, mine, ref ? ref : "(null)");
    cJSON_free(ref);
    cJSON_Delete(n);
    return ok;
}

/* Every family of doubles a ledger holds, and random bit patterns, print as cJSON
 * prints them: the 15-digit / 17-digit choice, %g's switch to exponents, trailing
 * zeros, ints and the int range's ends, binade ends (powers of two), ties. */
static void numbers_as_cjson(void)
{
    long fails = 0, n = 0;
    static const double fixed[] = {0.5, 0.1, 0.25, 1.5, 2.5, 0.055297431000000015, 58.1222,
        1e-4, 1.5e-16, 123456.789, 1e15, 1e16, 1e17, 1e21, 1e22, 1e-5, 1e-7, 9.999999999999999e-5,
        0.30000000000000004, 2147483647.0, 2147483648.0, -2147483648.0, -2147483649.0, 3e9,
        4503599627370496.5, 9007199254740993.0, 1234567890123455.0, 0.000123456789012345,
        5e-324, 2.2250738585072014e-308, 1.7976931348623157e308, 999999999999999.9,
        99999.999999999999, 0.00001, 1e-11, 1e-12, 12345678901234567890.0};
    for (size_t i = 0; i < sizeof fixed / sizeof fixed[0]; i++) {
        n += 2;
        same_as_cjson(fixed[i], &fails);
        same_as_cjson(-fixed[i], &fails);
    }
    for (int i = 0; i < 200000; i++) {
        uint64_t r = rng();
        double v;
        switch (i % 6) {
        case 0: /* any finite bit pattern */
            memcpy(&v, &r, sizeof v);
            if (!isfinite(v))
                continue;
            break;
        case 1: /* uniform mantissa over 1e-14 .. 1e17, where ledger values live */
            v = (double)(r >> 11) / 9007199254740992.0 * pow(10, (int)(r % 31) - 14);
            break;
        case 2: /* short decimals: k / 10^j */
            v = (double)(r % 10000000) / pow(10, (int)(r >> 40) % 12);
            break;
        case 3: /* neighbours of short decimals */
            v = nextafter((double)(r % 100000) / 1000.0, (r >> 63) ? INFINITY : 0);
            break;
        case 4: /* powers of two and their neighbours (binade ends) */
            v = ldexp(1.0, (int)(r % 120) - 60);
            v = (r >> 62) == 0 ? v : (r >> 62) == 1 ? nextafter(v, 0) : nextafter(v, INFINITY);
            break;
        default: /* halves and ties at the 15th and 17th digit */
            v = (double)(r % 10000000000000000u) / ((r >> 60) & 1 ? 2.0 : 1.0) + 0.5;
            break;
        }
        n++;
        same_as_cjson(v, &fails);
    }
    if (fails)
        printf("\n  %ld of %ld numbers print differently from cJSON", fails, n);
    CU_ASSERT_EQUAL(fails, 0);
}

/* Text through the writer equals cJSON's print of the same strings: every byte 0x01..0x7f
 * (controls and quotes escaped), multi-byte UTF-8 as is. */
static void strings_as_cjson(void)
{
    make();
    char title[256];
    int k = 0;
    for (int c = 1; c < 0x80; c++)
        title[k++] = (char)c;
    const char *utf8 = "caf\xC3\xA9 \xE2\x82\xAC \xF0\x9D\x84\x9E \xC2\xB5";
    strcpy(title + k, utf8);
    led.title = title;
    led.site = "\"quoted\" \\ back\\slash / \t\n";
    char *text = NULL;
    struct hl_err e;
    hl_err_clear(&e);
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_OK);
    cJSON *o = cJSON_CreateObject();
    cJSON_AddStringToObject(o, "title", led.title);
    cJSON_AddStringToObject(o, "site", led.site);
    cJSON_AddStringToObject(o, "file", led.file);
    char *ref = cJSON_PrintUnformatted(o);
    char want[1024];
    snprintf(want, sizeof want, "\n\"campaign\": %s,\n", ref ? ref : "?");
    CU_ASSERT_PTR_NOT_NULL(text && strstr(text, want));
    if (!(text && strstr(text, want)))
        printf("\n  cJSON prints %s", want);
    cJSON_free(ref);
    cJSON_Delete(o);
    hl_free(text);
    make();
}

static void allocation_failures(void)
{
    make();
    char *text = NULL;
    struct hl_err e;
    long before = hl_mem_calls();
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_OK);
    long total = hl_mem_calls() - before;
    hl_free(text);
    CU_ASSERT(total >= 2); /* streamed: the staging buffer and the text, grown by doubling */
    int wrong = 0;
    for (long n = 1; n <= total; n++) {
        hl_mem_fail_at(n);
        text = (char *)1;
        hl_err_clear(&e);
        enum hl_status st = json_out_render(&led, &text, &e);
        hl_mem_fail_at(0);
        if (st != HL_ERR_NOMEM || text != NULL) {
            if (!wrong++)
                printf("\n  failure at allocation %ld: status %d", n, (int)st);
            if (st == HL_OK)
                hl_free(text);
        }
    }
    CU_ASSERT_EQUAL(wrong, 0);
    printf("(%ld failure points) ", total);
    CU_ASSERT_EQUAL(json_out_render(&led, &text, &e), HL_OK);
    hl_free(text);
}

int main(void)
{
    hl_mem_hook_cjson();
    static const struct cu_case cases[] = {
        {"keys and values", keys_and_values}, {"refuses non-finite and bad text", refuses_bad_values},
        {"numbers as cJSON prints them", numbers_as_cjson}, {"strings as cJSON prints them", strings_as_cjson},
        {"atomic file", write_file}, {"allocation failures", allocation_failures}};
    return CU_RUN_ALL("json_out", cases);
}

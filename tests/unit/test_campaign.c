/* test_campaign.c - the campaign reader: fields as written, defaults, repeat, merges,
 * positions (line:column counted by hand in the texts below), errors, allocation failure. */
#include "cu_helpers.h"
#include "campaign.h"
#include "hlmem.h"
#include "isodate.h"
#include "liquor.h"
#include "reagents.h"
#include <stdlib.h>
#include <string.h>

static const char DEMO[] =
    "{\n"
    "  \"format\": \"haloledger-campaign/1\",\n"
    "  \"title\": \"Line 2, March chlorinations\",\n"
    "  \"site\": \"Eastfield works\",\n"
    "  \"issued\": \"2027-02-20\",\n"
    "  \"model\": {\"overhalogenation_factor\": 1.2, \"relative_reactivity\": {\"secondary\": 3.9, \"primary\": 1},\n"
    "            \"rate_ratios\": [1, 4.7, 3.2, 0.86]},\n"
    "  \"scrubbers\": [\n"
    "    {\"id\": \"VS-1\", \"liquor\": \"naoh\", \"naoh_wt_pct\": 18, \"liquor_kg\": 6000,\n"
    "     \"min_naoh_wt_pct\": 2.5, \"rated_acid_kmol_h\": 2.0, \"makeup_naoh_wt_pct\": 32,\n"
    "     \"liquor_cp_kj_kg_k\": 3.6,\n"
    "     \"column\": {\"packing_factor_1_m\": 300, \"htu_m\": 0.6, \"removal_fraction\": 0.999,\n"
    "                \"carrier_kmol_h\": 5, \"liquor_kg_h\": 20000, \"gas_temp_c\": 35}},\n"
    "    {\"id\": \"WS-2\", \"liquor\": \"water\", \"liquor_kg\": 3000, \"rated_acid_kmol_h\": 1.5}\n"
    "  ],\n"
    "  \"stock\": [\n"
    "    {\"reagent\": \"Cl2\", \"on_hand_kg\": 450, \"safety_kg\": 300, \"lead_days\": 10},\n"
    "    {\"reagent\": \"NaOH\", \"on_hand_kg\": 1000}\n"
    "  ],\n"
    "  \"containers\": [\n"
    "    {\"reagent\": \"Cl2\", \"name\": \"ton container\", \"net_kg\": 907, \"heel_kg\": 9}\n"
    "  ],\n"
    "  \"runs\": [\n"
    "    {\"id\": \"C-101\", \"start\": \"2027-03-02T06:00\", \"reactor\": \"R-3\", \"scrubber\": \"WS-2\",\n"
    "     \"substrate\": {\"name\": \"2-methylpropane\", \"smiles\": \"CC(C)C\"},\n"
    "     \"substrate_kg\": 800, \"reagent\": \"Cl2\", \"reagent_eq\": 0.6,\n"
    "     \"halogen_conversion\": 0.97, \"temp_c\": 40, \"feed_h\": 5, \"reactor_mode\": \"batch\",\n"
    "     \"repeat\": {\"count\": 4, \"every_days\": 2.5}},\n"
    "    {\"id\": \"B-7\", \"start\": \"2027-03-05\", \"substrate\": {\"formula\": \"C7H8\"},\n"
    "     \"substrate_kg\": 200, \"reagent\": \"Br2\", \"reagent_kg\": 300, \"reactor_mode\": \"cstr\",\n"
    "     \"product_smiles\": \"BrCc1ccccc1\", \"peak_factor\": 1.5, \"vent_retained_fraction\": 0.1,\n"
    "     \"model\": {\"rate_ratios\": [1, 0.5], \"relative_reactivity\": {\"secondary\": 80, \"ref_temp_c\": 30}}}\n"
    "  ]\n"
    "}\n";

static const char CATALOG[] =
    "{\"format\": \"haloledger-catalog/1\", \"note\": \"test\\ncatalog\",\n"
    " \"containers\": [\n"
    "  {\"reagent\": \"Cl2\", \"name\": \"cylinder\", \"net_kg\": 68, \"heel_kg\": 1.5},\n"
    "  {\"reagent\": \"Br2\", \"name\": \"drum\", \"net_kg\": 300, \"heel_kg\": 3},\n"
    "  {\"reagent\": \"NaOH\", \"name\": \"IBC\", \"net_kg\": 1500}]}\n";

static struct campaign *parse_ok(const char *text, const char *catalog)
{
    struct campaign *c = NULL;
    struct hl_err e;
    enum hl_status st = camp_parse(text, strlen(text), "demo.json", catalog, &c, &e);
    if (st)
        printf("\n  unexpected error %d:%d: %s: %s", e.line, e.col, e.field, e.msg);
    CU_ASSERT_EQUAL(st, HL_OK);
    return c;
}

static int64_t date(const char *s)
{
    int64_t m = -1;
    CU_ASSERT_EQUAL(isodate_parse(s, &m, NULL), 0);
    return m;
}

static void demo_fields(void)
{
    struct campaign *c = parse_ok(DEMO, NULL);
    if (!c)
        return;
    CU_ASSERT_STRING_EQUAL(c->file, "demo.json");
    CU_ASSERT_STRING_EQUAL(c->title, "Line 2, March chlorinations");
    CU_ASSERT_STRING_EQUAL(c->site, "Eastfield works");
    CU_ASSERT_EQUAL(c->issued_min, date("2027-02-20"));
    CU_ASSERT_EQUAL(c->nscrubbers, 2);
    const struct camp_scrubber *s = &c->scrubbers[0];
    CU_ASSERT_STRING_EQUAL(s->id, "VS-1");
    CU_ASSERT_EQUAL(s->liquor, CAMP_LIQUOR_NAOH);
    ASSERT_REL(s->base_wt_pct, 18, 1e-15);
    ASSERT_REL(s->liquor_kg, 6000, 1e-15);
    ASSERT_REL(s->min_base_wt_pct, 2.5, 1e-15);
    ASSERT_REL(s->rated_acid_kmol_h, 2.0, 1e-15);
    ASSERT_REL(s->makeup_base_wt_pct, 32, 1e-15);
    ASSERT_REL(s->liquor_cp_kj_kg_k, 3.6, 1e-15);
    CU_ASSERT_EQUAL(s->liquor_cp_given, 1);
    CU_ASSERT_EQUAL(s->column.present, 1);
    ASSERT_REL(s->column.packing_factor_1_m, 300, 1e-15);
    ASSERT_REL(s->column.htu_m, 0.6, 1e-15);
    ASSERT_REL(s->column.removal_fraction, 0.999, 1e-15);
    ASSERT_REL(s->column.flood_fraction, 0.7, 1e-15); /* default */
    ASSERT_REL(s->column.carrier_kmol_h, 5, 1e-15);
    ASSERT_REL(s->column.liquor_kg_h, 20000, 1e-15);
    ASSERT_REL(s->column.gas_temp_c, 35, 1e-15);
    CU_ASSERT_EQUAL(s->pos.line, 9);
    CU_ASSERT_EQUAL(s->pos.col, 5);
    CU_ASSERT_EQUAL(s->column.pos.line, 12);
    CU_ASSERT_EQUAL(s->column.pos.col, 16);
    CU_ASSERT_EQUAL(c->nstock, 2);
    CU_ASSERT_EQUAL(c->stock[0].reagent, RG_CL2);
    ASSERT_REL(c->stock[0].on_hand_kg, 450, 1e-15);
    ASSERT_REL(c->stock[0].safety_kg, 300, 1e-15);
    ASSERT_REL(c->stock[0].lead_days, 10, 1e-15);
    CU_ASSERT_EQUAL(c->stock[1].reagent, RG_NAOH);
    CU_ASSERT_EQUAL(c->ncontainers, 1);
    CU_ASSERT_STRING_EQUAL(c->containers[0].name, "ton container");
    ASSERT_REL(c->containers[0].net_kg, 907, 1e-15);
    ASSERT_REL(c->containers[0].heel_kg, 9, 1e-15);
    CU_ASSERT_EQUAL(c->containers[0].from_catalog, 0);

    CU_ASSERT_EQUAL(c->nruns, 5);
    const struct camp_run *r = &c->runs[0];
    CU_ASSERT_STRING_EQUAL(r->id, "C-101-1");
    CU_ASSERT_EQUAL(r->src_index, 0);
    CU_ASSERT_EQUAL(r->repeat_no, 1);
    CU_ASSERT_EQUAL(r->start_min, date("2027-03-02T06:00"));
    CU_ASSERT_STRING_EQUAL(r->reactor, "R-3");
    CU_ASSERT_EQUAL(r->scrubber, 1);
    CU_ASSERT_STRING_EQUAL(r->substrate_name, "2-methylpropane");
    CU_ASSERT_STRING_EQUAL(r->smiles, "CC(C)C");
    CU_ASSERT_PTR_NULL(r->formula);
    CU_ASSERT_PTR_NULL(r->product_smiles);
    ASSERT_REL(r->substrate_kg, 800, 1e-15);
    CU_ASSERT_EQUAL(r->reagent, RG_CL2);
    CU_ASSERT_EQUAL(r->amount_is_kg, 0);
    ASSERT_REL(r->reagent_eq, 0.6, 1e-15);
    ASSERT_REL(r->halogen_conversion, 0.97, 1e-15);
    ASSERT_REL(r->temp_c, 40, 1e-15);
    ASSERT_REL(r->feed_h, 5, 1e-15);
    CU_ASSERT_EQUAL(r->mode, CAMP_BATCH);
    /* positions (checked with Python bytes.find on the same text): line 24 is the run, "smiles" value on line 25 */
    CU_ASSERT_EQUAL(r->pos.line, 24);
    CU_ASSERT_EQUAL(r->pos.col, 5);
    CU_ASSERT_EQUAL(r->pos_id.line, 24);
    CU_ASSERT_EQUAL(r->pos_id.col, 12);
    CU_ASSERT_EQUAL(r->pos_smiles.line, 25);
    CU_ASSERT_EQUAL(r->pos_smiles.col, 57);
    CU_ASSERT_EQUAL(r->pos_reagent.line, 26);
    CU_ASSERT_EQUAL(r->pos_reagent.col, 38);
    CU_ASSERT_EQUAL(r->pos_amount.line, 26);
    CU_ASSERT_EQUAL(r->pos_amount.col, 59);

    const struct camp_run *b = &c->runs[4];
    CU_ASSERT_STRING_EQUAL(b->id, "B-7");
    CU_ASSERT_EQUAL(b->repeat_no, 0);
    CU_ASSERT_EQUAL(b->src_index, 1);
    CU_ASSERT_EQUAL(b->scrubber, -1);
    CU_ASSERT_PTR_NULL(b->reactor);
    CU_ASSERT_PTR_NULL(b->smiles);
    CU_ASSERT_STRING_EQUAL(b->formula, "C7H8");
    CU_ASSERT_STRING_EQUAL(b->product_smiles, "BrCc1ccccc1");
    CU_ASSERT_EQUAL(b->amount_is_kg, 1);
    ASSERT_REL(b->reagent_kg, 300, 1e-15);
    CU_ASSERT_EQUAL(b->reagent, RG_BR2);
    CU_ASSERT_EQUAL(b->mode, CAMP_CSTR);
    ASSERT_REL(b->peak_factor, 1.5, 1e-15);
    ASSERT_REL(b->vent_retained_fraction, 0.1, 1e-15);
    CU_ASSERT_EQUAL(b->pos_formula.line, 29);
    CU_ASSERT_EQUAL(b->pos_formula.col, 67);
    CU_ASSERT_EQUAL(b->pos_product_smiles.line, 31);
    CU_ASSERT_EQUAL(b->pos_product_smiles.col, 24);
    camp_free(c);
}

/* A soda-ash scrubber (design section 3): the base strengths under their base-neutral keys, as
 * written, and their defaults (min_base_wt_pct 2, makeup_base_wt_pct 100: dry ash). */
static void soda_ash_scrubber(void)
{
    static const char T[] =
        "{\"format\": \"haloledger-campaign/1\",\n"
        " \"scrubbers\": [{\"id\": \"S\", \"liquor\": \"soda_ash\", \"base_wt_pct\": 12, \"liquor_kg\": 100,\n"
        "   \"rated_acid_kmol_h\": 1},\n"
        "  {\"id\": \"T\", \"liquor\": \"soda_ash\", \"base_wt_pct\": 8, \"min_base_wt_pct\": 1.5,\n"
        "   \"makeup_base_wt_pct\": 30, \"liquor_kg\": 100, \"rated_acid_kmol_h\": 1}],\n"
        " \"runs\": [{\"id\": \"A\", \"start\": \"2027-01-01\", \"substrate\": {\"smiles\": \"C=CC\"},\n"
        "   \"substrate_kg\": 1, \"reagent\": \"HBr\", \"reagent_eq\": 1.1}]}";
    struct campaign *c = parse_ok(T, NULL);
    CU_ASSERT_PTR_NOT_NULL_FATAL(c);
    CU_ASSERT_EQUAL(c->scrubbers[0].liquor, LQ_SODA_ASH);
    ASSERT_REL(c->scrubbers[0].base_wt_pct, 12, 1e-15);
    ASSERT_REL(c->scrubbers[0].min_base_wt_pct, 2, 1e-15);
    ASSERT_REL(c->scrubbers[0].makeup_base_wt_pct, 100, 1e-15);
    ASSERT_REL(c->scrubbers[1].base_wt_pct, 8, 1e-15);
    ASSERT_REL(c->scrubbers[1].min_base_wt_pct, 1.5, 1e-15);
    ASSERT_REL(c->scrubbers[1].makeup_base_wt_pct, 30, 1e-15);
    camp_free(c);
}

static void defaults(void)
{
    static const char T[] =
        "{\"format\": \"haloledger-campaign/1\",\n"
        " \"scrubbers\": [{\"id\": \"S\", \"naoh_wt_pct\": 10, \"liquor_kg\": 100, \"rated_acid_kmol_h\": 1},\n"
        "   {\"id\": \"W\", \"liquor\": \"water\", \"liquor_kg\": 100, \"rated_acid_kmol_h\": 1}],\n"
        " \"stock\": [{\"reagent\": \"HBr\", \"on_hand_kg\": 0}],\n"
        " \"containers\": [{\"reagent\": \"NBS\", \"name\": \"bag\", \"net_kg\": 25}],\n"
        " \"runs\": [{\"id\": \"A\", \"start\": \"2027-01-01\", \"substrate\": {\"smiles\": \"C=CC\"},\n"
        "   \"substrate_kg\": 1, \"reagent\": \"HBr\", \"reagent_eq\": 1.1}]}";
    struct campaign *c = parse_ok(T, NULL);
    if (!c)
        return;
    CU_ASSERT_PTR_NULL(c->title);
    CU_ASSERT_PTR_NULL(c->site);
    CU_ASSERT_EQUAL(c->issued_min, -1);
    CU_ASSERT_EQUAL(c->paper, CAMP_PAPER_A4);
    const struct camp_scrubber *s = &c->scrubbers[0];
    CU_ASSERT_EQUAL(s->liquor, CAMP_LIQUOR_NAOH);
    ASSERT_REL(s->min_base_wt_pct, 2, 1e-15);
    ASSERT_REL(s->makeup_base_wt_pct, 50, 1e-15);
    CU_ASSERT_EQUAL(s->liquor_cp_given, 0);
    CU_ASSERT_EQUAL(s->column.present, 0);
    /* the liquor temperatures of design section 3 / campaign.h: fresh 25 C, limit 40 C */
    ASSERT_REL(s->fresh_liquor_temp_c, 25, 1e-15);
    ASSERT_REL(s->max_liquor_temp_c, 40, 1e-15);
    CU_ASSERT_EQUAL(c->scrubbers[1].liquor, CAMP_LIQUOR_WATER);
    ASSERT_REL(c->scrubbers[1].max_acid_wt_pct, 20, 1e-15);
    ASSERT_REL(c->scrubbers[1].max_hbr_wt_pct, 47, 1e-15); /* design section 5: 47 wt% built in */
    ASSERT_REL(c->scrubbers[1].fresh_liquor_temp_c, 25, 1e-15);
    ASSERT_REL(c->scrubbers[1].max_liquor_temp_c, 40, 1e-15);
    /* top level: US container sizes, the 1e-4 reporting threshold and the month-close
     * tolerances 5 / 10 / 2 % of design section 3 */
    CU_ASSERT_EQUAL(c->units, CAMP_UNITS_US);
    ASSERT_REL(c->report_min_mol_fraction, 1e-4, 1e-15);
    CU_ASSERT_EQUAL(c->report_min_mol_fraction_given, 0);
    ASSERT_REL(c->tolerances.reagent_pct, 5, 1e-15);
    ASSERT_REL(c->tolerances.product_pct, 10, 1e-15);
    ASSERT_REL(c->tolerances.stock_pct, 2, 1e-15);
    ASSERT_ABS(c->stock[0].safety_kg, 0, 0);
    ASSERT_ABS(c->stock[0].lead_days, 0, 0);
    ASSERT_ABS(c->containers[0].heel_kg, 0, 0);
    const struct camp_run *r = &c->runs[0];
    CU_ASSERT_STRING_EQUAL(r->id, "A");
    CU_ASSERT_EQUAL(r->scrubber, -1);
    ASSERT_REL(r->halogen_conversion, 1, 1e-15);
    ASSERT_REL(r->temp_c, 25, 1e-15);
    ASSERT_REL(r->feed_h, 1, 1e-15);
    ASSERT_REL(r->peak_factor, 1, 1e-15);
    ASSERT_ABS(r->vent_retained_fraction, 0, 0);
    CU_ASSERT_EQUAL(r->mode, CAMP_BATCH);
    CU_ASSERT_EQUAL(r->model->set_mask, 0u);
    CU_ASSERT_PTR_NULL(r->substrate_name);
    /* thermal screening defaults of design section 3: no solvent, cp 1.8, accumulation 1 */
    ASSERT_ABS(r->solvent_kg, 0, 0);
    ASSERT_REL(r->mass_cp_kj_kg_k, 1.8, 1e-15);
    ASSERT_REL(r->accumulation, 1, 1e-15);
    CU_ASSERT_EQUAL(r->defaulted, CAMP_DEFAULT_FEED_H | CAMP_DEFAULT_TEMP | CAMP_DEFAULT_CP);
    camp_free(c);
}

/* report.paper picks the print paper; any other spelling is refused at its position */
static void report_paper(void)
{
    static const char T[] =
        "{\"format\": \"haloledger-campaign/1\", \"report\": {\"paper\": \"Letter\", \"note\": \"US site\"},\n"
        " \"runs\": [{\"id\": \"A\", \"start\": \"2027-01-01\", \"substrate\": {\"smiles\": \"CC\"},\n"
        "   \"substrate_kg\": 1, \"reagent\": \"Cl2\", \"reagent_eq\": 1}]}";
    struct campaign *c = parse_ok(T, NULL);
    if (c)
        CU_ASSERT_EQUAL(c->paper, CAMP_PAPER_LETTER);
    camp_free(c);
    static const char B[] = "{\"format\": \"haloledger-campaign/1\", \"report\": {\"paper\": \"a4\"}}";
    struct hl_err e;
    c = NULL;
    CU_ASSERT_EQUAL(camp_parse(B, strlen(B), "p.json", NULL, &c, &e), HL_ERR_INPUT);
    CU_ASSERT_PTR_NULL(c);
    CU_ASSERT_EQUAL(e.col, 57); /* the opening quote of "a4", counted by hand */
    CU_ASSERT_PTR_NOT_NULL(strstr(e.field, "report.paper"));
}

static void repeat_expansion(void)
{
    struct campaign *c = parse_ok(DEMO, NULL);
    if (!c)
        return;
    int64_t t0 = date("2027-03-02T06:00");
    for (int k = 0; k < 4; k++) {
        char want[16];
        snprintf(want, sizeof want, "C-101-%d", k + 1);
        CU_ASSERT_STRING_EQUAL(c->runs[k].id, want);
        CU_ASSERT_EQUAL(c->runs[k].repeat_no, k + 1);
        /* every 2.5 days = 3600 minutes */
        CU_ASSERT_EQUAL(c->runs[k].start_min, t0 + (int64_t)k * 3600);
        CU_ASSERT_STRING_EQUAL(c->runs[k].smiles, "CC(C)C");
        CU_ASSERT(k == 0 || c->runs[k].smiles != c->runs[0].smiles); /* each run owns its copy */
    }
    char buf[20];
    isodate_format(c->runs[3].start_min, 0, buf, sizeof buf);
    CU_ASSERT_STRING_EQUAL(buf, "2027-03-09T18:00");
    camp_free(c);
}

static void model_merge(void)
{
    struct campaign *c = parse_ok(DEMO, NULL);
    if (!c)
        return;
    const struct camp_model *a = c->runs[0].model, *b = c->runs[4].model;
    /* run 0: the campaign block alone */
    CU_ASSERT_EQUAL(a->set_mask, CM_OVERHAL | CM_SECONDARY | CM_PRIMARY | CM_RATIOS);
    ASSERT_REL(a->overhalogenation_factor, 1.2, 1e-15);
    ASSERT_REL(a->secondary, 3.9, 1e-15);
    CU_ASSERT_EQUAL(a->nratios, 4);
    ASSERT_REL(a->rate_ratios[3], 0.86, 1e-15);
    /* B-7: its own secondary, ref_temp_c and rate_ratios over the campaign's */
    CU_ASSERT_EQUAL(b->set_mask, CM_OVERHAL | CM_SECONDARY | CM_PRIMARY | CM_RATIOS | CM_REF_TEMP);
    ASSERT_REL(b->overhalogenation_factor, 1.2, 1e-15);
    ASSERT_REL(b->secondary, 80, 1e-15);
    ASSERT_REL(b->primary, 1, 1e-15);
    ASSERT_REL(b->ref_temp_c, 30, 1e-15);
    CU_ASSERT_EQUAL(b->nratios, 2);
    ASSERT_REL(b->rate_ratios[1], 0.5, 1e-15);
    camp_free(c);
}

static void catalog_merge(void)
{
    struct campaign *c = parse_ok(DEMO, CATALOG);
    if (!c)
        return;
    /* campaign Cl2 entry replaces the catalog's Cl2 cylinder; Br2 and NaOH come from the catalog */
    CU_ASSERT_EQUAL(c->ncontainers, 3);
    CU_ASSERT_STRING_EQUAL(c->containers[0].name, "ton container");
    CU_ASSERT_EQUAL(c->containers[0].from_catalog, 0);
    CU_ASSERT_EQUAL(c->containers[1].reagent, RG_BR2);
    CU_ASSERT_EQUAL(c->containers[1].from_catalog, 1);
    CU_ASSERT_EQUAL(c->containers[1].pos.line, 4);
    CU_ASSERT_EQUAL(c->containers[2].reagent, RG_NAOH);
    ASSERT_ABS(c->containers[2].heel_kg, 0, 0);
    camp_free(c);
    /* a bad catalog is reported with its own path prefix and position */
    static const char BADCAT[] = "{\"format\": \"haloledger-catalog/1\",\n \"containers\": [\n"
                                 "  {\"reagent\": \"Br2\", \"name\": \"drum\", \"net_kg\": -3}]}";
    struct hl_err e;
    struct campaign *o = NULL;
    CU_ASSERT_EQUAL(camp_parse(DEMO, strlen(DEMO), "d.json", BADCAT, &o, &e), HL_ERR_INPUT);
    CU_ASSERT_PTR_NULL(o);
    CU_ASSERT_STRING_EQUAL(e.field, "catalog.containers[0].net_kg");
    CU_ASSERT_EQUAL(e.line, 3);
    CU_ASSERT_EQUAL(e.col, 48);
}

/* Positions after escapes and multi-byte UTF-8: columns count bytes. */
static void positions(void)
{
    static const char T[] =
        "{\"format\": \"haloledger-campaign/1\", \"title\": \"a\\\"b\\\\c\\u00e9 \xc3\xa9\xe2\x82\xac\",\n"
        "\t\"runs\": [ {\"id\": \"\xe2\x82\xac-1\", \"start\": \"2027-01-01\",\n"
        "  \"substrate\": {\"name\": \"{[\\\"]}\", \"smiles\": \"CC\"}, \"substrate_kg\": 1,\n"
        "  \"reagent\": \"Cl2\", \"reagent_eq\": -2}]}";
    struct hl_err e;
    struct campaign *c = NULL;
    CU_ASSERT_EQUAL(camp_parse(T, strlen(T), "p.json", NULL, &c, &e), HL_ERR_INPUT);
    CU_ASSERT_EQUAL(e.line, 4);
    CU_ASSERT_EQUAL(e.col, 35);
    CU_ASSERT_STRING_EQUAL(e.field, "runs[0].reagent_eq");
    CU_ASSERT_STRING_EQUAL(e.msg, "must be >= 1e-06 (got -2): below a millionth of an equivalent nothing is charged");
    /* the same text with a good amount: check the recorded positions */
    char *g = hl_strdup(T);
    CU_ASSERT_PTR_NOT_NULL_FATAL(g);
    char *p = strstr(g, "-2}");
    p[0] = ' ';
    c = NULL;
    CU_ASSERT_EQUAL(camp_parse(g, strlen(g), "p.json", NULL, &c, &e), HL_OK);
    if (c) {
        CU_ASSERT_STRING_EQUAL(c->title, "a\"b\\c\xc3\xa9 \xc3\xa9\xe2\x82\xac");
        CU_ASSERT_STRING_EQUAL(c->runs[0].id, "\xe2\x82\xac-1");
        CU_ASSERT_EQUAL(c->runs[0].pos.line, 2);
        CU_ASSERT_EQUAL(c->runs[0].pos.col, 12); /* tab is one byte */
        CU_ASSERT_EQUAL(c->runs[0].pos_start.col, 37); /* after a 3-byte euro sign */
        CU_ASSERT_EQUAL(c->runs[0].pos_smiles.line, 3);
        CU_ASSERT_EQUAL(c->runs[0].pos_smiles.col, 45); /* after brackets inside a string */
        CU_ASSERT_EQUAL(c->runs[0].pos_reagent.line, 4);
        CU_ASSERT_EQUAL(c->runs[0].pos_reagent.col, 14);
    }
    camp_free(c);
    hl_free(g);
    /* not NUL-terminated: only len bytes are read */
    static const char U[] = "{\"format\": 1}XXXX";
    CU_ASSERT_EQUAL(camp_parse(U, 13, "u.json", NULL, &c, &e), HL_ERR_INPUT);
    CU_ASSERT_STRING_EQUAL(e.field, "format");
    CU_ASSERT_EQUAL(e.col, 12);
}

/* Column in T (1-based, bytes) of the first byte of the n-th (0-based) occurrence of
 * needle after the anchor, counted on the raw text: the reference for camp_string_col. */
static int raw_col(const char *t, const char *anchor, const char *needle, int n)
{
    const char *p = strstr(t, anchor);
    if (!p)
        return -1;
    for (int j = 0; j <= n; j++) {
        p = strstr(j ? p + 1 : p, needle);
        if (!p)
            return -1;
    }
    const char *ls = p;
    while (ls > t && ls[-1] != '\n')
        ls--;
    return (int)(p - ls) + 1;
}

static void string_columns(void)
{
    /* decoded smiles: F / C = C \ F e-acute(2 bytes) U+1F600(4 bytes) C = 14 bytes */
    static const char T[] =
        "{\"format\": \"haloledger-campaign/1\", \"runs\": [\n"
        "{\"id\": \"R\", \"start\": \"2027-01-01\", \"substrate_kg\": 1, \"reagent\": \"Cl2\",\n"
        " \"reagent_eq\": 1, \"repeat\": {\"count\": 2, \"every_days\": 1}, \"product_smiles\": \"Cl\\/C\",\n"
        " \"substrate\": {\"smiles\": \"F/C=C\\\\F\\u00e9\\uD83D\\uDE00C\"}}]}\n";
    struct hl_err e;
    struct campaign *c = NULL;
    CU_ASSERT_EQUAL(camp_parse(T, strlen(T), "s.json", NULL, &c, &e), HL_OK);
    if (!c)
        return;
    CU_ASSERT_EQUAL(c->nruns, 2);
    CU_ASSERT_STRING_EQUAL(c->runs[0].smiles, "F/C=C\\F\xc3\xa9\xf0\x9f\x98\x80" "C");
    const char *A = "\"smiles\"";
    int q = raw_col(T, A, "\"F/", 0);        /* opening quote */
    int bs2 = raw_col(T, A, "\\\\F", 0);     /* the escaped backslash (2 raw bytes) */
    int f2 = raw_col(T, A, "F\\u", 0);       /* F after it */
    int eac = raw_col(T, A, "\\u00e9", 0);   /* e-acute as \u00e9 */
    int pair = raw_col(T, A, "\\uD83D", 0);  /* U+1F600 as a surrogate pair */
    int last = raw_col(T, A, "C\"", 0);      /* the final C */
    for (int r = 0; r < c->nruns; r++) { /* repeat copies carry their own map */
        const struct camp_strpos *sp = &c->runs[r].sp_smiles;
        CU_ASSERT_EQUAL(sp->pos.line, 4);
        CU_ASSERT_EQUAL(sp->pos.col, q);
        CU_ASSERT_EQUAL(sp->nesc, 3);
        CU_ASSERT_EQUAL(camp_string_col(sp, 0), q);
        CU_ASSERT_EQUAL(camp_string_col(sp, 1), q + 1);
        CU_ASSERT_EQUAL(camp_string_col(sp, 5), q + 5);  /* before any escape: quote + k */
        CU_ASSERT_EQUAL(camp_string_col(sp, 6), bs2);
        CU_ASSERT_EQUAL(camp_string_col(sp, 7), f2);
        CU_ASSERT_EQUAL(f2, q + 8);                      /* the backslash took two bytes */
        CU_ASSERT_EQUAL(camp_string_col(sp, 8), eac);    /* both bytes of e-acute: the escape */
        CU_ASSERT_EQUAL(camp_string_col(sp, 9), eac);
        for (int k = 10; k <= 13; k++)
            CU_ASSERT_EQUAL(camp_string_col(sp, k), pair);
        CU_ASSERT_EQUAL(camp_string_col(sp, 14), last);
        CU_ASSERT_EQUAL(camp_string_col(sp, 15), last + 1); /* one past: the closing quote */
        const struct camp_strpos *pp = &c->runs[r].sp_product_smiles;
        int pq = raw_col(T, "\"product_smiles\"", "\"Cl", 0);
        CU_ASSERT_EQUAL(pp->pos.line, 3);
        CU_ASSERT_EQUAL(pp->pos.col, pq);
        CU_ASSERT_EQUAL(camp_string_col(pp, 2), pq + 2);
        CU_ASSERT_EQUAL(camp_string_col(pp, 3), raw_col(T, "\"product_smiles\"", "\\/", 0));
        CU_ASSERT_EQUAL(camp_string_col(pp, 4), pq + 5); /* C, l, backslash, slash, C */
        CU_ASSERT_EQUAL(c->runs[r].sp_formula.nesc, 0);
        CU_ASSERT_PTR_NULL(c->runs[r].sp_formula.esc);
        CU_ASSERT_EQUAL(c->runs[r].own_model, 0);
    }
    CU_ASSERT_EQUAL(c->has_model, 0);
    camp_free(c);

    /* a map built by hand: no escapes, then one \u escape of 3 decoded bytes */
    struct camp_strpos none = {{7, 20}, 0, NULL};
    CU_ASSERT_EQUAL(camp_string_col(&none, 1), 21);
    CU_ASSERT_EQUAL(camp_string_col(&none, 100), 120);
    CU_ASSERT_EQUAL(camp_string_col(&none, -3), 20);
    struct camp_esc one[1] = {{2, 3, 6}}; /* "ab\u20acd": euro sign at decoded bytes 3..5 */
    struct camp_strpos euro = {{1, 10}, 1, one};
    CU_ASSERT_EQUAL(camp_string_col(&euro, 2), 12);
    CU_ASSERT_EQUAL(camp_string_col(&euro, 3), 13);
    CU_ASSERT_EQUAL(camp_string_col(&euro, 5), 13);
    CU_ASSERT_EQUAL(camp_string_col(&euro, 6), 19); /* d: 1 + 1 + 1 + 6 bytes after the quote */

    /* every allocation of the maps and their repeat copies may fail cleanly */
    int clean = 1;
    long walked = 0;
    for (long n = 1; n < 10000; n++) {
        c = NULL;
        hl_mem_fail_at(n);
        enum hl_status st = camp_parse(T, strlen(T), "s.json", NULL, &c, &e);
        hl_mem_fail_at(0);
        if (st == HL_OK) {
            camp_free(c);
            break;
        }
        walked++;
        if (st != HL_ERR_NOMEM || c)
            clean = 0;
    }
    CU_ASSERT(clean);
    CU_ASSERT(walked > 5);
}

static void campaign_model_position(void)
{
    static const char T[] =
        "{\"format\": \"haloledger-campaign/1\",\n"
        "  \"model\": {\"overhalogenation_factor\": 2}, \"runs\": [\n"
        "{\"id\": \"A\", \"start\": \"2027-01-01\", \"substrate_kg\": 1, \"reagent\": \"Cl2\",\n"
        " \"reagent_eq\": 1, \"substrate\": {\"smiles\": \"CC\"}},\n"
        "{\"id\": \"B\", \"start\": \"2027-01-01\", \"substrate_kg\": 1, \"reagent\": \"Cl2\",\n"
        " \"reagent_eq\": 1, \"substrate\": {\"formula\": \"C2H6\"}, \"model\": {}}]}\n";
    struct hl_err e;
    struct campaign *c = NULL;
    CU_ASSERT_EQUAL(camp_parse(T, strlen(T), "m.json", NULL, &c, &e), HL_OK);
    if (!c)
        return;
    CU_ASSERT_EQUAL(c->has_model, 1);
    CU_ASSERT_EQUAL(c->pos_model.line, 2);
    CU_ASSERT_EQUAL(c->pos_model.col, raw_col(T, "\"model\"", "{", 0));
    CU_ASSERT_EQUAL(c->runs[0].own_model, 0);
    CU_ASSERT_EQUAL(c->runs[1].own_model, 1);
    CU_ASSERT_EQUAL(c->runs[1].sp_formula.pos.line, 6);
    CU_ASSERT_EQUAL(c->runs[1].sp_formula.pos.col, raw_col(T, "\"formula\"", "\"C2H6", 0));
    camp_free(c);
}

struct bad { const char *text; int line, col; const char *field, *msg_start; };

static void errors(void)
{
#define HEAD "{\"format\": \"haloledger-campaign/1\",\n"
#define RUN "{\"id\": \"A\", \"start\": \"2027-01-01\", \"substrate\": {\"smiles\": \"C\"}, \"substrate_kg\": 1, \"reagent\": \"Cl2\""
    static const struct bad cases[] = {
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1, \"reagent_q\": 2}]}", 2, 129, "runs[0].reagent_q",
         "unknown key (did you mean 'reagent_eq'?)"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1e400}]}", 2, 126, "runs[0].reagent_eq",
         "must be a finite number (got 1e400)"},
        {HEAD "\"runs\": [" RUN "}]}", 2, 10, "runs[0].reagent_eq", "missing: give reagent_eq"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1, \"reagent_kg\": 2}]}", 2, 129, "runs[0].reagent_kg",
         "give reagent_eq or reagent_kg, not both"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1, \"scrubber\": \"X\"}]}", 2, 141, "runs[0].scrubber",
         "unknown scrubber \"X\" (the campaign lists no scrubbers)"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1}, \n" RUN ", \"reagent_eq\": 1}]}", 3, 8, "runs[1].id",
         "run id \"A\" is already used by runs[0] (id at 2:17)"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1, \"temp_c\": 401}]}", 2, 139, "runs[0].temp_c",
         "must be <= 400 (got 401)"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1, \"reactor_mode\": \"CSTR\"}]}", 2, 145, "runs[0].reactor_mode",
         "must be \"batch\" or \"cstr\" (got \"CSTR\")"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1}]", 2, 129, "runs", "unexpected end of file (the object opened at 1:1"},
        {HEAD "\"runs\": [" RUN ", \"reagent_eq\": 1}]} }", 2, 131, "$", "trailing characters after the campaign"},
        {HEAD "\"runs\": [], \"runs\": []}", 2, 13, "runs", "duplicate key (first given at 2:1)"},
        {HEAD "\"title\": \"\xc3\x28\", \"runs\": []}", 2, 10, "title", "invalid UTF-8 in a string (byte 0xC3 at byte 1"},
        {HEAD "\"issued\": \"2027-02-29\", \"runs\": []}", 2, 11, "issued", "\"2027-02-29\" is not a valid ISO 8601 date"},
        {HEAD "\"runs\": []}", 2, 9, "runs", "must not be empty"},
        {"{\"format\": \"haloledger-campaign/1\"\n  \"runs\": []}", 2, 3, "format", "expected ',' or '}', found '\"'"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        const struct bad *b = &cases[i];
        struct hl_err e;
        struct campaign *c = (struct campaign *)&e; /* must be reset to NULL */
        enum hl_status st = camp_parse(b->text, strlen(b->text), "x.json", NULL, &c, &e);
        int ok = st == HL_ERR_INPUT && c == NULL && e.line == b->line && e.col == b->col &&
                 strcmp(e.field, b->field) == 0 && strncmp(e.msg, b->msg_start, strlen(b->msg_start)) == 0;
        if (!ok)
            printf("\n  case %zu: got %d %d:%d %s: %s", i, st, e.line, e.col, e.field, e.msg);
        CU_ASSERT(ok);
    }
}

/* XML 1.0 (Fifth Edition) section 2.2, Char: #x9 | #xA | #xD | [#x20-#xD7FF] |
 * [#xE000-#xFFFD] | [#x10000-#x10FFFF].  Text reaching the workbook must stay inside it
 * (and the reader also refuses tab, newline, CR, DEL and the C1 controls there); every
 * code point below U+0100 is tried, plus the edges of the planes.  Each is given once as a
 * \u escape in the title and once as raw UTF-8 in a container name of the catalog. */
static int xml_char_ok(unsigned cp)
{
    return (cp >= 0x20 && cp < 0x7f) || (cp >= 0xA0 && cp <= 0xD7FF) || (cp >= 0xE000 && cp <= 0xFFFD) ||
           (cp >= 0x10000 && cp <= 0x10FFFF);
}

static size_t utf8_put(unsigned cp, char *o)
{
    if (cp < 0x80) { o[0] = (char)cp; return 1; }
    if (cp < 0x800) { o[0] = (char)(0xC0 | cp >> 6); o[1] = (char)(0x80 | (cp & 63)); return 2; }
    if (cp < 0x10000) {
        o[0] = (char)(0xE0 | cp >> 12); o[1] = (char)(0x80 | ((cp >> 6) & 63)); o[2] = (char)(0x80 | (cp & 63));
        return 3;
    }
    o[0] = (char)(0xF0 | cp >> 18); o[1] = (char)(0x80 | ((cp >> 12) & 63));
    o[2] = (char)(0x80 | ((cp >> 6) & 63)); o[3] = (char)(0x80 | (cp & 63));
    return 4;
}

static void xml_forbidden_text(void)
{
    static const unsigned edges[] = {0xD7FF, 0xE000, 0xFDD0, 0xFFFD, 0xFFFE, 0xFFFF, 0x10000, 0x1FFFE, 0x10FFFF};
    int refused = 0, accepted = 0;
    for (unsigned k = 0; k < 0x100 + sizeof edges / sizeof edges[0]; k++) {
        unsigned cp = k < 0x100 ? k : edges[k - 0x100];
        if (cp == 0 || cp == '"' || cp == '\\')
            continue; /* NUL is refused by the scanner; quote and backslash need escapes */
        int ok = xml_char_ok(cp);
        char text[512], esc[16], raw[8], cat[400];
        if (cp >= 0x10000) { /* a surrogate pair in JSON */
            unsigned v = cp - 0x10000;
            snprintf(esc, sizeof esc, "\\u%04X\\u%04X", 0xD800 + (v >> 10), 0xDC00 + (v & 0x3FF));
        } else {
            snprintf(esc, sizeof esc, "\\u%04X", cp);
        }
        snprintf(text, sizeof text, "{\"format\": \"haloledger-campaign/1\", \"title\": \"a%sb\", \"runs\": "
                 "[{\"id\": \"X\", \"start\": \"2027-01-01\", \"substrate\": {\"smiles\": \"CC\"}, "
                 "\"substrate_kg\": 1, \"reagent\": \"Cl2\", \"reagent_eq\": 1}]}", esc);
        struct hl_err e;
        struct campaign *c = NULL;
        enum hl_status st = camp_parse(text, strlen(text), "x.json", NULL, &c, &e);
        camp_free(c);
        int good = ok ? st == HL_OK : st == HL_ERR_INPUT && !strcmp(e.field, "title") && e.line == 1 && e.col == 46; /* the title's opening quote */
        if (!good)
            printf("U+%04X as an escape: status %d (%s), expected %s\n", cp, st, e.msg, ok ? "accepted" : "refused");
        CU_ASSERT(good);
        raw[utf8_put(cp, raw)] = '\0';
        snprintf(cat, sizeof cat, "{\"format\": \"haloledger-catalog/1\", \"containers\": [{\"reagent\": \"Cl2\", "
                 "\"name\": \"a%sb\", \"net_kg\": 50}]}", raw);
        c = NULL;
        st = camp_parse(text, strlen(text) - 0, "x.json", cat, &c, &e);
        camp_free(c);
        if (ok) {
            CU_ASSERT_EQUAL(st, HL_OK);
            accepted++;
        } else {
            /* the title refuses it first when it is forbidden: parse the catalog under a plain title */
            char plain[512];
            snprintf(plain, sizeof plain, "%s", text);
            char *t = strstr(plain, esc);
            memmove(t, t + strlen(esc), strlen(t + strlen(esc)) + 1);
            st = camp_parse(plain, strlen(plain), "x.json", cat, &c, &e);
            camp_free(c);
            /* at the name's opening quote (column 78), or at the character itself (80) where the
             * JSON scanner refuses a raw control character */
            good = st == HL_ERR_INPUT && !strcmp(e.field, "catalog.containers[0].name") &&
                   (e.col == 78 || (cp < 0x20 && e.col == 80));
            if (!good)
                printf("U+%04X raw in the catalog: status %d %s:%d:%d %s\n", cp, st, e.field, e.line, e.col, e.msg);
            CU_ASSERT(good);
            refused++;
        }
    }
    CU_ASSERT_EQUAL(refused, 31 + 1 + 32 + 2); /* C0 but NUL, DEL, C1, U+FFFE and U+FFFF */
    CU_ASSERT(accepted > 150);
}

static void load_file(void)
{
    struct hl_err e;
    struct campaign *c = NULL;
    /* a campaign that does not exist is bad usage (exit 2), not a run-time failure */
    CU_ASSERT_EQUAL(camp_load("/nonexistent/dir/c.json", NULL, &c, &e), HL_ERR_INPUT);
    CU_ASSERT_PTR_NULL(c);
    char path[] = "/tmp/hl-test-campaign-XXXXXX";
    int fd = mkstemp(path);
    CU_ASSERT_FATAL(fd >= 0);
    FILE *f = fdopen(fd, "wb");
    fwrite(DEMO, 1, strlen(DEMO), f);
    fclose(f);
    CU_ASSERT_EQUAL(camp_load(path, CATALOG, &c, &e), HL_OK);
    if (c) {
        CU_ASSERT_STRING_EQUAL(c->file, path);
        CU_ASSERT_EQUAL(c->nruns, 5);
    }
    camp_free(c);
    remove(path);
}

/* Every allocation of a parse (cJSON's too) made to fail in turn: a clean NOMEM each time
 * and no leak (run under valgrind or ASan). */
static void alloc_failure(void)
{
    long n, walked = 0;
    int clean = 1;
    for (n = 1; n < 100000; n++) {
        struct hl_err e;
        struct campaign *c = NULL;
        hl_mem_fail_at(n);
        enum hl_status st = camp_parse(DEMO, strlen(DEMO), "demo.json", CATALOG, &c, &e);
        hl_mem_fail_at(0);
        if (st == HL_OK) {
            CU_ASSERT_EQUAL(c->nruns, 5);
            camp_free(c);
            break;
        }
        walked++;
        if (st != HL_ERR_NOMEM || c != NULL) {
            printf("\n  failure point %ld: status %d (%s)", n, st, e.msg);
            clean = 0;
        }
    }
    CU_ASSERT(clean);
    CU_ASSERT(walked > 50); /* the demo needs many allocations: the loop really walked them */
    printf(" [%ld failure points] ", walked);
}

int main(void)
{
    hl_mem_hook_cjson();
    static const struct cu_case cases[] = {
        {"demo fields", demo_fields}, {"defaults", defaults}, {"soda-ash scrubber", soda_ash_scrubber}, {"report paper", report_paper}, {"repeat expansion", repeat_expansion},
        {"model merge", model_merge}, {"catalog merge", catalog_merge}, {"positions", positions},
        {"errors", errors}, {"load file", load_file}, {"allocation failure", alloc_failure},
        {"string columns", string_columns}, {"campaign model position", campaign_model_position},
        {"XML forbidden text", xml_forbidden_text}};
    return CU_RUN_ALL("campaign", cases);
}

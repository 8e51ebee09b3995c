/*
 * tool_writers.c - writes a synthetic ledger through both writers, for
 * tests/e2e/writers_readback.py.
 *
 *   tool_writers [--runs N] [--stream 0|1] [--nan] OUT.xlsx|- OUT.json|-
 *
 * The ledger is built by hand here (no model code), but kept internally
 * consistent so that read-back checks mean something: monthly figures are sums
 * of the runs, scrubber totals sums of the run rows, the hourly profile the
 * runs' vent rates binned by hour, orders follow design section 4.  Default: 3
 * runs over 2 months on one scrubber, one run id "=1+1".  --runs N spreads N runs
 * over a year (timing and streaming mode).  --nan puts a NaN into one value: both
 * writers must refuse it.  Exit 0 on success, 1 with a message on stderr.
 */
#include "hlmem.h"
#include "isodate.h"
#include "json_out.h"
#include "ledger.h"
#include "xlsx_out.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Molar masses [g/mol] from CIAAW 2021 conventional atomic weights (H 1.008, C 12.011,
 * O 15.999, Na 22.990, Cl 35.45, Br 79.904). */
#define M_H 1.008
#define M_C 12.011
#define M_CL 35.45
#define M_BR 79.904
#define M_NAOH 39.997
#define M_H2O 18.015

struct spec {
    const char *id, *reactor, *name, *smiles, *wanted, *isomer;
    const char *start; int reagent; int c, h; double kg, eq, conv, feed_h, temp_c;
};

static const struct spec base[3] = {
    {"C-101", "R-3", "2-methylpropane", "CC(C)C", "CC(C)CCl", "CC(C)(C)Cl",
     "2027-03-02T06:00", RG_CL2, 4, 10, 800, 0.6, 0.97, 5, 40},
    {"=1+1", "R-4", "2-methylpropane", "CC(C)C", "CC(C)CCl", "CC(C)(C)Cl",
     "2027-03-02T09:00", RG_CL2, 4, 10, 400, 0.6, 0.97, 3, 40},
    {"B-201", "R-3", "toluene", "Cc1ccccc1", "BrCc1ccccc1", "Cc1ccc(Br)cc1",
     "2027-04-06T06:00", RG_BR2, 7, 8, 500, 0.5, 0.95, 4, 80},
};

static void *need(void *p)
{
    if (!p) {
        fprintf(stderr, "tool_writers: out of memory\n");
        exit(1);
    }
    return p;
}

static char *dup(const char *s) { return s ? need(hl_strdup(s)) : NULL; }

static void formula_text(char *buf, size_t n, int c, int h, int x, const char *xs)
{
    char hb[16] = "", xb[16] = "";
    if (h > 1) snprintf(hb, sizeof hb, "H%d", h); else if (h == 1) snprintf(hb, sizeof hb, "H");
    if (x > 1) snprintf(xb, sizeof xb, "%s%d", xs, x); else if (x == 1) snprintf(xb, sizeof xb, "%s", xs);
    snprintf(buf, n, "C%d%s%s", c, hb, xb);
}

/* One run: balance and scrubber row from the spec (simple, consistent numbers). */
static void make_run(struct ledger_run *r, const struct spec *s, const char *id, int64_t start)
{
    int br = s->reagent == RG_BR2;
    double mx = br ? M_BR : M_CL, mhx = M_H + mx, mx2 = 2 * mx;
    double msub = s->c * M_C + s->h * M_H;
    struct ledger_bal *b = &r->bal;
    r->id = dup(id);
    r->reactor = dup(s->reactor);
    r->scrubber = dup("VS-1");
    r->substrate_name = dup(s->name);
    r->smiles = dup(s->smiles);
    r->start_min = start;
    r->feed_h = s->feed_h;
    r->temp_c = s->temp_c;
    r->substrate_kg = s->kg;
    r->reagent = s->reagent;
    r->mode = KIN_BATCH;
    char text[64];
    formula_text(text, sizeof text, s->c, s->h, 0, "");
    b->substrate_formula = dup(text);
    b->substrate_molar_mass_g_mol = msub;
    b->substrate_mol = s->kg * 1000 / msub;
    b->reagent_mol = s->eq * b->substrate_mol;
    b->reagent_kg = b->reagent_mol * mx2 / 1000;
    b->reagent_reacted_mol = s->conv * b->reagent_mol;
    b->reagent_unreacted_mol = b->reagent_mol - b->reagent_reacted_mol;
    b->halogen_reacted_mol = b->reagent_reacted_mol;
    b->mean_degree = b->halogen_reacted_mol / b->substrate_mol;
    double x2 = 0.08 * b->mean_degree, x1 = b->mean_degree - 2 * x2, x0 = 1 - x1 - x2;
    double share[4] = {x0, 0.64 * x1, 0.36 * x1, x2};
    int deg[4] = {0, 1, 1, 2};
    enum bal_role role[4] = {ROLE_UNREACTED, ROLE_WANTED, ROLE_ISOMER, ROLE_OVERHAL};
    const char *smi[4] = {s->smiles, s->wanted, s->isomer, NULL};
    b->nproducts = 4;
    b->products = need(hl_calloc(4, sizeof *b->products));
    double el_out_c = 0, el_out_h = 0, el_out_x = 0;
    for (int p = 0; p < 4; p++) {
        struct ledger_product *q = &b->products[p];
        q->smiles = dup(smi[p]);
        formula_text(text, sizeof text, s->c, s->h - deg[p], deg[p], br ? "Br" : "Cl");
        q->formula = dup(text);
        q->degree = deg[p];
        q->molar_mass_g_mol = msub - deg[p] * M_H + deg[p] * mx;
        q->mol_fraction = share[p];
        q->mol = share[p] * b->substrate_mol;
        q->kg = q->mol * q->molar_mass_g_mol / 1000;
        q->role = role[p];
        el_out_c += s->c * q->mol;
        el_out_h += (s->h - deg[p]) * q->mol;
        el_out_x += deg[p] * q->mol;
    }
    b->wanted_kg = b->products[1].kg;
    b->isomer_kg = b->products[2].kg;
    b->overhal_kg = b->products[3].kg;
    b->unreacted_substrate_kg = b->products[0].kg;
    b->hx_kg[br] = b->reagent_reacted_mol * mhx / 1000;
    b->vent_mol[br ? VS_HBR : VS_HCL] = b->reagent_reacted_mol;
    b->vent_mol[br ? VS_BR2 : VS_CL2] = b->reagent_unreacted_mol;
    b->retained_mol[br ? VS_HBR : VS_HCL] = 0;
    el_out_h += b->reagent_reacted_mol;
    el_out_x += b->reagent_reacted_mol + 2 * b->reagent_unreacted_mol;
    /* bal_elements order: C H N O S Cl Br */
    int xi = br ? 6 : 5;
    b->el_in_mol[0] = s->c * b->substrate_mol;
    b->el_in_mol[1] = s->h * b->substrate_mol;
    b->el_in_mol[xi] = 2 * b->reagent_mol;
    b->el_out_mol[0] = el_out_c;
    b->el_out_mol[1] = el_out_h;
    b->el_out_mol[xi] = el_out_x;
    for (int k = 0; k < BAL_NEL; k++)
        if (b->el_in_mol[k] > 0) {
            double rel = fabs(b->el_out_mol[k] - b->el_in_mol[k]) / b->el_in_mol[k];
            b->max_rel_error = rel > b->max_rel_error ? rel : b->max_rel_error;
        }
}

static void spent_from(struct scrub_spent *p, int64_t at, double liquor, double naoh,
                       const double *salts, double water, int final)
{
    p->at_min = at;
    p->mass_kg = liquor;
    p->naoh_kg = naoh;
    p->water_kg = water;
    memcpy(p->salt_kg, salts, sizeof p->salt_kg);
    p->final = final;
}

static struct ledger *build(int nruns, int nan)
{
    struct ledger *l = need(hl_calloc(1, sizeof *l));
    l->title = dup("Line 2, spring chlorinations & brominations");
    l->site = dup("Eastfield works");
    l->file = dup("campaigns/synthetic.json");
    isodate_parse("2027-02-15", &l->created_min, NULL);
    isodate_parse("2027-02-25", &l->today_min, NULL);
    int big = nruns > 0;
    if (!big)
        nruns = 3;
    l->nruns = nruns;
    l->runs = need(hl_calloc((size_t)nruns, sizeof *l->runs));
    for (int i = 0; i < nruns; i++) {
        const struct spec *s = &base[big ? i % 3 : i];
        int64_t start;
        char id[32];
        if (big) {
            isodate_parse("2027-01-01T00:00", &start, NULL);
            start += (int64_t)i * 525600 / nruns;
            snprintf(id, sizeof id, "R-%06d", i + 1);
        } else {
            isodate_parse(s->start, &start, NULL);
        }
        make_run(&l->runs[i], s, big ? id : s->id, start);
    }

    /* scrubber VS-1: 6000 kg of 18 wt% NaOH, changeout below 8 wt% (or forced before B-201) */
    const double fresh_liquor = 6000, fresh_naoh = 1080, min_pct = 8, cp = 3.7;
    l->nscrubbers = 1;
    l->scrubbers = need(hl_calloc(1, sizeof *l->scrubbers));
    struct ledger_scrubber *u = &l->scrubbers[0];
    u->id = dup("VS-1");
    u->rated_acid_kmol_h = 2.0;
    struct scrub_unit_out *o = &u->out;
    o->spent = need(hl_calloc((size_t)nruns + 1, sizeof *o->spent));
    double liquor = fresh_liquor, naoh = fresh_naoh, salts[SALT_COUNT] = {0}, water = 0;
    for (int i = 0; i < nruns; i++) {
        struct ledger_run *r = &l->runs[i];
        struct scrub_run_out *s = &r->scrub;
        const double *v = r->bal.vent_mol;
        double acid = v[VS_HCL] + v[VS_HBR], hal = v[VS_CL2] + v[VS_BR2];
        double used = (acid + 2 * hal) * M_NAOH / 1000;
        double gas = (v[VS_HCL] * (M_H + M_CL) + v[VS_HBR] * (M_H + M_BR) +
                      v[VS_CL2] * 2 * M_CL + v[VS_BR2] * 2 * M_BR) / 1000;
        int force = !big && i == 2;
        if (force || (naoh - used) / (liquor + gas) * 100 < min_pct) {
            spent_from(&o->spent[o->nspent++], r->start_min, liquor, naoh, salts, water, 0);
            liquor = fresh_liquor;
            naoh = fresh_naoh;
            memset(salts, 0, sizeof salts);
            water = 0;
            s->changeout_before = 1;
            o->changeouts++;
            o->makeup_kg += fresh_naoh / 0.5; /* 50 wt% make-up solution */
        }
        s->acid_kmol_h = (acid + hal) / r->feed_h / 1000;
        s->naoh_kg = used;
        s->heat_kj = 130.7 * v[VS_HCL] + 100.1 * v[VS_CL2] + 125.0 * v[VS_HBR] + 95.0 * v[VS_BR2];
        s->temp_rise_k = s->heat_kj / ((liquor + gas) * cp);
        naoh -= used;
        liquor += gas;
        s->salt_kg[SALT_NACL] = (v[VS_HCL] + v[VS_CL2]) * 58.44 / 1000;
        s->salt_kg[SALT_NAOCL] = v[VS_CL2] * 74.44 / 1000;
        s->salt_kg[SALT_NABR] = (v[VS_HBR] + v[VS_BR2]) * 102.894 / 1000;
        s->salt_kg[SALT_NAOBR] = v[VS_BR2] * 118.893 / 1000;
        for (int q = 0; q < SALT_COUNT; q++)
            salts[q] += s->salt_kg[q];
        s->water_formed_kg = (acid + hal) * M_H2O / 1000;
        water += s->water_formed_kg;
        s->naoh_left_kg = naoh;
        s->liquor_kg_after = liquor;
        s->naoh_wt_pct_after = naoh / liquor * 100;
        o->naoh_kg += used;
        o->heat_kj += s->heat_kj;
    }
    const struct ledger_run *lastr = &l->runs[nruns - 1];
    spent_from(&o->spent[o->nspent++], lastr->start_min + (int64_t)(lastr->feed_h * 60), liquor,
               naoh, salts, water, 1);

    /* hourly profile: each run's rate over its feed window, binned by the hour */
    int64_t h0 = l->runs[0].start_min / 60 * 60, end = h0;
    for (int i = 0; i < nruns; i++) {
        int64_t e = l->runs[i].start_min + (int64_t)llround(l->runs[i].feed_h * 60);
        end = e > end ? e : end;
    }
    o->hour0_min = h0;
    o->nhours = (int)((end - h0 + 59) / 60);
    o->hourly_kmol_h = need(hl_calloc((size_t)o->nhours, sizeof(double)));
    for (int i = 0; i < nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        int64_t a = r->start_min, e = a + (int64_t)llround(r->feed_h * 60);
        for (int64_t t = a; t < e;) {
            int64_t hs = (t - h0) / 60, next = h0 + (hs + 1) * 60;
            int64_t stop = next < e ? next : e;
            o->hourly_kmol_h[hs] += r->scrub.acid_kmol_h * (double)(stop - t) / 60.0;
            t = stop;
        }
    }
    int peak = 0;
    for (int h = 1; h < o->nhours; h++)
        if (o->hourly_kmol_h[h] > o->hourly_kmol_h[peak])
            peak = h;
    o->peak_acid_kmol_h = o->hourly_kmol_h[peak];
    o->peak_at_min = h0 + 60 * (int64_t)peak;
    o->overloaded = o->peak_acid_kmol_h > u->rated_acid_kmol_h;
    o->peak_runs = need(hl_calloc((size_t)nruns, sizeof(int)));
    for (int i = 0; i < nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        int64_t e = r->start_min + (int64_t)llround(r->feed_h * 60);
        if (r->start_min < o->peak_at_min + 60 && e > o->peak_at_min)
            o->peak_runs[o->npeak_runs++] = i;
    }
    /* packed-column screening figures (consistent: NTU = ln(y_in/y_out), height = NTU x HTU 0.6 m) */
    struct scrub_column_check *c = &o->column;
    c->present = 1;
    c->gas_kmol_h = 20 + o->peak_acid_kmol_h;
    c->y_in = o->peak_acid_kmol_h / c->gas_kmol_h;
    c->y_out = c->y_in * 0.001;
    c->ntu = log(c->y_in / c->y_out);
    c->height_m = c->ntu * 0.6;
    c->diameter_m = 0.45;
    c->flood_velocity_m_s = 2.1;
    c->flow_parameter = 0.35;

    /* months: sums of the runs by start month */
    int m0 = isodate_month_index(l->runs[0].start_min);
    int m1 = isodate_month_index(l->runs[nruns - 1].start_min);
    l->nmonths = m1 - m0 + 1;
    l->months = need(hl_calloc((size_t)l->nmonths, sizeof *l->months));
    for (int m = 0; m < l->nmonths; m++)
        l->months[m].month_index = m0 + m;
    for (int i = 0; i < nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        struct ledger_month *m = &l->months[isodate_month_index(r->start_min) - m0];
        m->runs++;
        m->product_kg += r->bal.wanted_kg;
        m->isomer_kg += r->bal.isomer_kg;
        m->overhal_kg += r->bal.overhal_kg;
        m->unreacted_substrate_kg += r->bal.unreacted_substrate_kg;
        m->reagents_kg[r->reagent] += r->bal.reagent_kg;
        for (int s = 0; s < VS_COUNT; s++)
            m->vent_kg[s] += r->bal.vent_mol[s] * vent_molar_mass_g_mol(s) / 1000;
        m->naoh_kg += r->scrub.naoh_kg;
        if (r->scrub.changeout_before) {
            m->changeouts++;
            m->reagents_kg[RG_NAOH] += fresh_naoh / 0.5;
        }
    }
    for (int k = 0; k < o->nspent; k++)
        if (!o->spent[k].final)
            l->months[isodate_month_index(o->spent[k].at_min) - m0].spent_liquor_kg += o->spent[k].mass_kg;

    /* orders: one line per month and reagent used (design section 4 arithmetic) */
    l->orders = need(hl_calloc((size_t)l->nmonths * 2, sizeof *l->orders));
    double stock[2] = {450, 0};
    const double safety[2] = {300, 50}, lead[2] = {10, 14}, net[2] = {907, 150}, heel[2] = {9, 1.5};
    const char *cont[2] = {"ton container", "drum \"=A1\""};
    for (int m = 0; m < l->nmonths; m++)
        for (int g = 0; g < 2; g++) {
            double demand = l->months[m].reagents_kg[g];
            if (demand <= 0)
                continue;
            struct ord_line *d = &l->orders[l->norders++];
            d->month_index = l->months[m].month_index;
            d->item = g;
            d->demand_kg = demand;
            d->stock_start_kg = stock[g];
            d->safety_kg = safety[g];
            d->to_order_kg = fmax(0, demand + safety[g] - stock[g]);
            d->container = cont[g];
            d->net_kg = net[g];
            d->heel_kg = heel[g];
            d->containers = (int)ceil(d->to_order_kg / (net[g] - heel[g]));
            d->ordered_usable_kg = d->containers * (net[g] - heel[g]);
            d->stock_end_kg = stock[g] + d->ordered_usable_kg - demand;
            stock[g] = d->stock_end_kg;
            for (int i = 0; i < nruns; i++)
                if (l->runs[i].reagent == g &&
                    isodate_month_index(l->runs[i].start_min) == d->month_index) {
                    d->first_use_min = l->runs[i].start_min;
                    break;
                }
            d->order_by_min = d->first_use_min - (int64_t)(lead[g] * 1440);
            d->late = d->order_by_min < l->today_min;
        }

    l->warnings = need(hl_calloc(2, sizeof *l->warnings));
    char msg[200];
    snprintf(msg, sizeof msg, "scrubber VS-1: peak %.3f kmol/h exceeds the rated 2 kmol/h",
             o->peak_acid_kmol_h);
    l->warnings[0].run = o->npeak_runs ? dup(l->runs[o->peak_runs[0]].id) : NULL;
    l->warnings[0].message = dup(msg);
    l->warnings[1].run = NULL;
    l->warnings[1].message = dup("an order-by date has already passed");
    l->nwarnings = 2;

    static const struct { const char *what; double v; const char *unit, *origin; } as[4] = {
        {"Cl2 per-H reactivity, tertiary, at 25 C", 5.0, "", "synthetic test value"},
        {"Liquor heat capacity", 3.7, "kJ/(kg K)", "synthetic test value"},
        {"Fresh liquor strength", 18, "wt%", "campaign"},
        {"Caustic make-up strength", 50, "wt%", "common practice"}};
    l->assumptions = need(hl_calloc(4, sizeof *l->assumptions));
    for (int k = 0; k < 4; k++) {
        l->assumptions[k].what = dup(as[k].what);
        l->assumptions[k].has_value = 1;
        l->assumptions[k].value = as[k].v;
        l->assumptions[k].unit = dup(as[k].unit);
        l->assumptions[k].origin = dup(as[k].origin);
    }
    l->nassumptions = 4;
    l->cautions_mask = 1u << CA_CL2 | 1u << CA_BR2 | 1u << CA_HCL | 1u << CA_HBR |
                       1u << CA_NAOCL | 1u << CA_NAOH;
    if (nan)
        l->runs[nruns - 1].bal.vent_mol[VS_SO2] = NAN;
    return l;
}

static void destroy(struct ledger *l)
{
    for (int i = 0; i < l->nruns; i++) {
        struct ledger_run *r = &l->runs[i];
        hl_free(r->id); hl_free(r->reactor); hl_free(r->scrubber);
        hl_free(r->substrate_name); hl_free(r->smiles);
        for (int p = 0; p < r->bal.nproducts; p++) {
            hl_free(r->bal.products[p].smiles);
            hl_free(r->bal.products[p].formula);
        }
        hl_free(r->bal.products);
        hl_free(r->bal.substrate_formula);
    }
    for (int u = 0; u < l->nscrubbers; u++) {
        struct scrub_unit_out *o = &l->scrubbers[u].out;
        hl_free(l->scrubbers[u].id);
        hl_free(o->peak_runs); hl_free(o->hourly_kmol_h); hl_free(o->spent);
    }
    for (int k = 0; k < l->nwarnings; k++) {
        hl_free(l->warnings[k].run);
        hl_free(l->warnings[k].message);
    }
    for (int k = 0; k < l->nassumptions; k++) {
        hl_free(l->assumptions[k].what); hl_free(l->assumptions[k].unit);
        hl_free(l->assumptions[k].origin);
    }
    hl_free(l->runs); hl_free(l->scrubbers); hl_free(l->months); hl_free(l->orders);
    hl_free(l->warnings); hl_free(l->assumptions);
    hl_free(l->title); hl_free(l->site); hl_free(l->file);
    hl_free(l);
}

int main(int argc, char **argv)
{
    int nruns = 0, stream = -1, nan = 0, a = 1;
    for (; a < argc && strncmp(argv[a], "--", 2) == 0; a++) {
        if (!strcmp(argv[a], "--runs") && a + 1 < argc)
            nruns = atoi(argv[++a]);
        else if (!strcmp(argv[a], "--stream") && a + 1 < argc)
            stream = atoi(argv[++a]);
        else if (!strcmp(argv[a], "--nan"))
            nan = 1;
        else
            break;
    }
    if (argc - a != 2 || nruns < 0) {
        fprintf(stderr, "usage: tool_writers [--runs N] [--stream 0|1] [--nan] OUT.xlsx|- OUT.json|-\n");
        return 1;
    }
    hl_mem_hook_cjson();
    struct ledger *l = build(nruns, nan);
    struct hl_err e;
    hl_err_clear(&e);
    enum hl_status st = HL_OK;
    if (strcmp(argv[a], "-") != 0)
        st = xlsx_out_write_opt(l, argv[a], stream, &e);
    if (st == HL_OK && strcmp(argv[a + 1], "-") != 0)
        st = json_out_write(l, argv[a + 1], &e);
    destroy(l);
    if (st != HL_OK) {
        fprintf(stderr, "tool_writers: %s: %s\n", hl_strerror(st), e.msg);
        return 1;
    }
    return 0;
}

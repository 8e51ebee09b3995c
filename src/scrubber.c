/*
 * scrubber.c - vent scrubber liquor, heat, hourly load and packed-column check.
 *
 * Everything here is an engineering estimate for planning and checking.  A
 * scrubber design, its relief and its interlocks need the SDS of every
 * substance, local regulations and review by a licensed engineer.
 * Hypochlorite/hypobromite liquor releases Cl2/Br2 when acidified: keep the
 * liquor alkaline (that is what the minimum base strength is for) and never mix spent
 * liquor with acid waste.
 */
#include "scrubber.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "elements.h"
#include "hlmem.h"

/* ---- molar masses: the vent-gas, salt and reagent tables (reagents.c, liquor.c) ---- */
#define M_H2O (2 * ELEM_W_H + ELEM_W_O)
#define M_CO2 (ELEM_W_C + 2 * ELEM_W_O)
#define M_AIR 28.9644 /* dry air, U.S. Standard Atmosphere 1976 */

static double gas_mm(int v) { return vent_molar_mass_g_mol(v); }
static double salt_mm(int k) { return liquor_salt_get(k)->molar_mass_g_mol; }
static double dfh_of(int i) { return liquor_dfh_get(i)->dfh_kj_mol; }
/* Molar mass of a liquor's base [g/mol] (its reagent row); 0 for a liquor without one. */
static double base_mm(const struct liquor_info *l)
{
    return l->base >= 0 ? reagent_get(l->base)->molar_mass_g_mol : 0;
}
/* The public NaOH-named figures (naoh_kg, design section 5) are those of a NaOH base only. */
static int naoh_named(const struct liquor_info *l) { return l->base == RG_NAOH; }

/* ---- heats, from the formation enthalpies of liquor.c ---- */

double scrub_heat_kj_per_mol(int vs, int liquor)
{
    const struct liquor_info *l = liquor_get(liquor);
    if (!l || vs < 0 || vs >= VS_COUNT)
        return 0;
    const struct liquor_gas *g = &l->gas[vs];
    if (g->uptake == LQ_DISSOLVES) /* gas -> its solution */
        return -(dfh_of(g->dfh_taken) - dfh_of(g->dfh_gas));
    if (g->uptake != LQ_REACTS)
        return 0; /* passes: the run is flagged */
    double h = g->water_mol * dfh_of(DFH_H2O) - dfh_of(g->dfh_gas) - g->base_mol * dfh_of(l->dfh_base);
    for (int k = 0; k < LQ_MAX_SALTS; k++)
        if (g->salt[k] >= 0)
            h += g->salt_mol[k] * dfh_of(liquor_salt_get(g->salt[k])->dfh);
    if (g->co2_mol > 0) /* given off as gas */
        h += g->co2_mol * dfh_of(DFH_CO2_G);
    return -h; /* released */
}

/* The reductant of the liquor's redox step (the sulfite), -1 when the table has none. */
static int reductant(void)
{
    for (int k = 0; k < SALT_COUNT; k++)
        if (liquor_salt_get(k)->oxidised_to >= 0)
            return k;
    return -1;
}

/* Na+ is a spectator, so the heat is that of the ions. */
double scrub_sulfite_redox_kj_per_mol(int salt)
{
    const struct liquor_salt *ox = liquor_salt_get(salt);
    int red = reductant();
    if (!ox || ox->reduced_to < 0 || red < 0)
        return 0;
    const struct liquor_salt *rs = liquor_salt_get(red);
    double h = dfh_of(liquor_salt_get(rs->oxidised_to)->dfh) + dfh_of(liquor_salt_get(ox->reduced_to)->dfh) -
               dfh_of(rs->dfh) - dfh_of(ox->dfh);
    return -h; /* released */
}

double scrub_naoh_per_mol(int vs)
{
    return vs >= 0 && vs < VS_COUNT ? liquor_get(LQ_NAOH)->gas[vs].base_mol : 0;
}

/* ---- packed column ----
 * Flooding line of Eckert's generalized pressure-drop correlation (J. S. Eckert,
 * Chem. Eng. Prog. 66(3), 39 (1970)) as the cubic fit in ln X
 *   ln Y = -3.7121 - 1.0371 ln X - 0.1501 (ln X)^2 - 0.007544 (ln X)^3,
 *   X = (L/G) sqrt(rho_G/rho_L),  Y = (u^2 Fp / g)(rho_G/rho_L)(rho_W/rho_L) mu_L^0.2
 * with u the superficial gas velocity, Fp the packing factor, mu_L in mPa s.  The fit's
 * coefficients are from memory (the form is the one common in separation-process
 * texts) and it is used for 0.01 <= X <= 10 only.  Packing factors: Perry's Chemical
 * Engineers' Handbook table of packing characteristics (listed in 1/ft: multiply by
 * 3.281 for 1/m). */
#define GPDC_X_MIN 0.01
#define GPDC_X_MAX 10.0

double scrub_gpdc_flood_y(double x)
{
    double l = log(x);
    return exp(-3.7121 - 1.0371 * l - 0.1501 * l * l - 0.007544 * l * l * l);
}

double scrub_ntu(double y_in, double y_out)
{
    if (!(y_in > 0) || !(y_out > 0) || y_out >= y_in)
        return 0;
    return log(y_in / y_out);
}

/* ---- removal credited to a unit (emissions): the liquor row's default ---- */
double scrub_removal_default(int vs, int liquor, const char **origin)
{
    const struct liquor_info *l = liquor_get(liquor);
    if (!l || vs < 0 || vs >= VS_COUNT) {
        if (origin)
            *origin = "";
        return 0;
    }
    if (origin)
        *origin = l->gas[vs].removal_origin;
    return l->gas[vs].removal;
}

/* A fast irreversible reaction keeps the gas-liquid interface free of the gas (no
 * back-pressure), so with gas-film control dy/dZ = -y / HTU and y_out / y_in = exp(-NTU).
 * expm1 keeps the small-NTU end exact (removal -> NTU). */
double scrub_removal_from_ntu(double ntu)
{
    return ntu > 0 ? -expm1(-ntu) : 0.0;
}

#define P_ATM 101325.0        /* the column runs near atmospheric: common practice */
#define R_GAS 8.314462618     /* J/(mol K), CODATA 2018 */
#define G_STD 9.80665         /* m/s2, standard gravity */
#define RHO_WATER LIQUOR_RHO_WATER_KG_M3
#define PI 3.14159265358979323846

static void column_check(const struct scrub_unit_in *u, double peak_kmol_h, double acid_mm,
                         struct scrub_column_check *c)
{
    memset(c, 0, sizeof *c);
    c->present = 1;
    c->gas_kmol_h = u->carrier_kmol_h + peak_kmol_h;
    if (!(c->gas_kmol_h > 0))
        return;
    c->y_in = peak_kmol_h / c->gas_kmol_h;
    c->y_out = c->y_in * (1.0 - u->removal_fraction);
    c->ntu = scrub_ntu(c->y_in, c->y_out);
    c->height_m = c->ntu * u->htu_m;

    double gas_kg_h = u->carrier_kmol_h * M_AIR + peak_kmol_h * acid_mm;
    double mix_mm = gas_kg_h / c->gas_kmol_h; /* kg/kmol = g/mol */
    c->gas_density_kg_m3 = P_ATM * mix_mm / 1000.0 / (R_GAS * (u->gas_temp_c + 273.15));
    /* the fresh liquor's properties (its row in liquor.c) */
    const struct liquor_info *l = liquor_get(u->liquor);
    const struct liquor_comp fresh = {.base_wt_pct = l->base >= 0 ? u->base_wt_pct : 0};
    c->liquid_density_kg_m3 = l->density_kg_m3(&fresh);
    double mu = l->viscosity_mpa_s(&fresh);
    double rg = c->gas_density_kg_m3, rl = c->liquid_density_kg_m3;
    double x = u->liquor_kg_h / gas_kg_h * sqrt(rg / rl);
    c->flow_parameter = x;
    if (x < GPDC_X_MIN || x > GPDC_X_MAX) {
        c->outside_fit = 1;
        x = x < GPDC_X_MIN ? GPDC_X_MIN : GPDC_X_MAX;
    }
    double y = scrub_gpdc_flood_y(x);
    c->flood_velocity_m_s = sqrt(y * G_STD / (u->packing_factor_1_m * (rg / rl) * (RHO_WATER / rl) *
                                              pow(mu, 0.2)));
    c->design_velocity_m_s = u->flood_fraction * c->flood_velocity_m_s;
    double q_m3_s = gas_kg_h / rg / 3600.0;
    c->diameter_m = sqrt(4.0 * q_m3_s / (PI * c->design_velocity_m_s));
}

/* ---- campaign ---- */

#define MAX_HOURS (20L * 366 * 24) /* a load profile longer than 20 years is a bad input */

void scrub_fresh_charge(double liquor_kg, double base_wt_pct, double makeup_base_wt_pct,
                        int liquor, double *makeup_kg, double *water_kg)
{
    /* the base is conserved on dilution: liquor_kg x w_fresh = make-up x w_makeup */
    double sol = liquor_get(liquor)->base < 0 ? 0.0 : liquor_kg * base_wt_pct / makeup_base_wt_pct;
    *makeup_kg = sol;
    *water_kg = liquor_kg - sol;
}

struct liq {
    double base, water;      /* kg of base (as 100 %) and of water in the unit */
    double gas[VS_COUNT];    /* kg of each gas held dissolved (LQ_DISSOLVES) */
    double salt[SALT_COUNT]; /* kg of each salt */
    double temp_c;           /* adiabatic liquor temperature: no cooling since the last fill */
    int dirty;               /* something absorbed since the last fill */
    int used;                /* any run on this unit */
    double group_busy_min;   /* end of the latest vent window of the current group */
    int group;               /* current group while grouping, then the last group seen */
    int64_t first_min;       /* earliest run start */
    double last_end_min;     /* latest vent-window end */
    double gas_mol, gas_g;   /* totals, for the column's mean acid molar mass */
    double max_rate;         /* largest run rate [kmol/h]: scale of the round-off */
    int cap_spent;
};

static double liq_mass(const struct liq *q)
{
    double m = q->base + q->water;
    for (int v = 0; v < VS_COUNT; v++)
        m += q->gas[v];
    for (int s = 0; s < SALT_COUNT; s++)
        m += q->salt[s];
    return m;
}

static void fill(const struct scrub_unit_in *u, struct liq *q)
{
    q->base = liquor_get(u->liquor)->base < 0 ? 0 : u->liquor_kg * u->base_wt_pct / 100.0;
    q->water = u->liquor_kg - q->base;
    memset(q->gas, 0, sizeof q->gas);
    memset(q->salt, 0, sizeof q->salt);
    q->temp_c = u->fresh_liquor_temp_c;
    q->dirty = 0;
}

static enum hl_status push_spent(struct scrub_unit_out *o, struct liq *q, int64_t at, int final,
                                 int naoh_named)
{
    if (o->nspent == q->cap_spent) {
        int cap = q->cap_spent ? 2 * q->cap_spent : 4;
        struct scrub_spent *p = hl_realloc(o->spent, (size_t)cap * sizeof *p);
        if (!p)
            return HL_ERR_NOMEM;
        o->spent = p;
        q->cap_spent = cap;
    }
    struct scrub_spent *s = &o->spent[o->nspent++];
    memset(s, 0, sizeof *s);
    s->at_min = at;
    s->mass_kg = liq_mass(q);
    s->base_kg = q->base;
    s->naoh_kg = naoh_named ? q->base : 0;
    s->water_kg = q->water;
    s->hcl_kg = q->gas[VS_HCL]; /* the spent-liquor fields of the ledger */
    s->hbr_kg = q->gas[VS_HBR];
    memcpy(s->salt_kg, q->salt, sizeof s->salt_kg);
    s->final = final;
    return HL_OK;
}

/* Changeout strength [wt%] of a gas the liquor dissolves, as the unit gives it. */
static double max_wt(const struct scrub_unit_in *u, const struct liquor_info *l, int v)
{
    (void)l;
    return u->max_gas_wt_pct[v];
}

/* Dissolving: how far the acid has gone towards its changeout strength, as the sum of each
 * acid's strength over its own limit (the campaign's defaults sit under the azeotropes).
 * A linear share rule for a mixed acid (assumption); above 1 is past the limit.  add_kg[v]
 * is what would be added; strengths in wt% of the whole liquor after it. */
static double acid_load(const struct scrub_unit_in *u, const struct liquor_info *l,
                        const struct liq *q, const double *add_kg)
{
    double m = liq_mass(q), load = 0;
    for (int v = 0; v < VS_COUNT; v++)
        if (l->gas[v].uptake == LQ_DISSOLVES)
            m += add_kg[v];
    for (int v = 0; v < VS_COUNT; v++)
        if (l->gas[v].uptake == LQ_DISSOLVES)
            load += (q->gas[v] + add_kg[v]) / m * 100.0 / max_wt(u, l, v);
    return load;
}

/* kg of each gas of vent (mol) the liquor would take up by uptake u; their sum returned. */
static double uptake_kg(const struct liquor_info *l, int u, const double *vent, double *kg)
{
    double sum = 0;
    for (int v = 0; v < VS_COUNT; v++) {
        kg[v] = l->gas[v].uptake == u ? vent[v] * gas_mm(v) / 1000.0 : 0;
        sum += kg[v];
    }
    return sum;
}

/* Would absorbing vent (mol) break the liquor limit? Reacting gases: base wt% below the
 * minimum (or base short); dissolving gases: the acid past its changeout strength.  Both
 * strengths move one way only as gas is absorbed, so the test on a group's total holds for
 * every run of the group. */
static int over_limit(const struct scrub_unit_in *u, const struct liq *q, const double *vent)
{
    const struct liquor_info *l = liquor_get(u->liquor);
    double kg[VS_COUNT];
    if (liquor_has(u->liquor, LQ_DISSOLVES) && uptake_kg(l, LQ_DISSOLVES, vent, kg) > 0 &&
        acid_load(u, l, q, kg) > 1.0)
        return 1;
    double gas_kg = 0, base_kg = 0, co2_kg = 0;
    for (int v = 0; v < VS_COUNT; v++) {
        if (l->gas[v].uptake != LQ_REACTS)
            continue;
        gas_kg += vent[v] * gas_mm(v) / 1000.0;
        base_kg += vent[v] * l->gas[v].base_mol * base_mm(l) / 1000.0;
        co2_kg += vent[v] * l->gas[v].co2_mol * M_CO2 / 1000.0;
    }
    if (!(base_kg > 0))
        return 0;
    double left = q->base - base_kg;
    return left < 0 || left / (liq_mass(q) + gas_kg - co2_kg) * 100.0 < u->min_base_wt_pct;
}

/* One oxidant salt (hypohalite) meets the reductant (sulfite) in the liquor: red + ox ->
 * red's oxidised form + ox's reduced form, one to one, whichever is in excess remains.  No
 * base is used and the mass is unchanged (same atoms).  Amounts in kmol = kg / (g/mol). */
static void redox_pair(struct liq *q, struct scrub_run_out *r, int red, int hypo)
{
    int sulfate = liquor_salt_get(red)->oxidised_to, halide = liquor_salt_get(hypo)->reduced_to;
    double so3 = q->salt[red] / salt_mm(red);
    double ox = q->salt[hypo] / salt_mm(hypo);
    double n = so3 < ox ? so3 : ox;
    if (!(n > 0))
        return;
    double d_so3 = -n * salt_mm(red), d_ox = -n * salt_mm(hypo);
    /* the limiting one is used up exactly (no round-off residue left behind) */
    if (so3 <= ox)
        d_so3 = -q->salt[red];
    else
        d_ox = -q->salt[hypo];
    const int sp[4] = {red, hypo, sulfate, halide};
    const double d[4] = {d_so3, d_ox, n * salt_mm(sulfate), n * salt_mm(halide)};
    for (int j = 0; j < 4; j++) {
        q->salt[sp[j]] += d[j];
        r->salt_kg[sp[j]] += d[j];
    }
    r->heat_kj += n * 1000.0 * scrub_sulfite_redox_kj_per_mol(hypo);
    r->sulfite_oxidised_mol += n * 1000.0;
}

/* The oxidants of the salt table, stronger first (table order), on the reductant. */
static void sulfite_redox(struct liq *q, struct scrub_run_out *r)
{
    int red = reductant();
    for (int k = 0; red >= 0 && k < SALT_COUNT; k++)
        if (liquor_salt_get(k)->reduced_to >= 0)
            redox_pair(q, r, red, k);
}

/* Dissolving gases: the share g of this run's acid gases the liquor can take before its acid
 * reaches the changeout strength (acid_load = 1), with the acids in the run's proportion.
 * The load after taking g is linear-fractional in g, so the bound is one division. */
static double acid_capacity(const struct scrub_unit_in *u, const struct liq *q, const double *vent)
{
    const struct liquor_info *l = liquor_get(u->liquor);
    double kg[VS_COUNT], sum = uptake_kg(l, LQ_DISSOLVES, vent, kg);
    if (!(sum > 0))
        return 1.0;
    /* sum over acids of 100 (q_v + g kg_v) / max_v <= mass + g sum */
    double room = liq_mass(q), per_g = 0;
    for (int v = 0; v < VS_COUNT; v++)
        if (l->gas[v].uptake == LQ_DISSOLVES) {
            room -= 100.0 * q->gas[v] / max_wt(u, l, v);
            per_g += 100.0 * kg[v] / max_wt(u, l, v);
        }
    per_g -= sum;
    if (!(room > 0))
        return 0.0;
    if (!(per_g > room))
        return 1.0;
    return room / per_g;
}

/* Dissolving gases into the liquor: taken[v] for them, their heat; the gases the liquor
 * passes are counted as unabsorbed (a warning). */
static void absorb_dissolved(const struct scrub_unit_in *u, struct liq *q, const double *vent,
                             struct scrub_run_out *r, double *taken)
{
    const struct liquor_info *l = liquor_get(u->liquor);
    /* past the changeout strength the acid's vapour pressure stops absorption; the liquor
     * figures still count the whole vent (the changeout warning covers it) */
    double g = acid_capacity(u, q, vent);
    for (int v = 0; v < VS_COUNT; v++) {
        if (l->gas[v].uptake == LQ_DISSOLVES) {
            taken[v] = g;
            q->gas[v] += vent[v] * gas_mm(v) / 1000.0;
            r->heat_kj += vent[v] * scrub_heat_kj_per_mol(v, u->liquor);
        }
    }
    for (int v = 0; v < VS_COUNT; v++)
        if (l->gas[v].uptake == LQ_PASSES)
            r->unabsorbed_mol += vent[v];
    r->unabsorbed = r->unabsorbed_mol > 0;
}

/* Reacting gases on the base: salts, water, base used and heat.  When the base runs out,
 * every gas is neutralised in the same proportion f and the rest breaks through: a simple
 * bound, flagged as exhausted. */
static void absorb_base(const struct scrub_unit_in *u, struct liq *q, const double *vent,
                        struct scrub_run_out *r, double *taken)
{
    const struct liquor_info *l = liquor_get(u->liquor);
    double mm = base_mm(l), need_kg = 0, total_mol = 0;
    for (int v = 0; v < VS_COUNT; v++) {
        if (l->gas[v].uptake != LQ_REACTS)
            continue;
        need_kg += vent[v] * l->gas[v].base_mol * mm / 1000.0;
        total_mol += vent[v];
    }
    double f = need_kg > q->base ? (q->base > 0 ? q->base / need_kg : 0) : 1.0;
    r->breakthrough_mol = (1.0 - f) * total_mol;
    for (int v = 0; v < VS_COUNT; v++) {
        const struct liquor_gas *g = &l->gas[v];
        double n = f * vent[v];
        if (g->uptake != LQ_REACTS)
            continue;
        taken[v] = f;
        if (!(n > 0))
            continue;
        q->base -= n * g->base_mol * mm / 1000.0;
        q->water += n * g->water_mol * M_H2O / 1000.0;
        r->water_formed_kg += n * g->water_mol * M_H2O / 1000.0;
        for (int k = 0; k < LQ_MAX_SALTS; k++)
            if (g->salt[k] >= 0) {
                double kg = n * g->salt_mol[k] * salt_mm(g->salt[k]) / 1000.0;
                q->salt[g->salt[k]] += kg;
                r->salt_kg[g->salt[k]] += kg;
            }
        r->base_kg += n * g->base_mol * mm / 1000.0;
        if (g->co2_mol > 0) /* leaves the liquor as gas: the liquor keeps the rest */
            r->co2_kg += n * g->co2_mol * M_CO2 / 1000.0;
        r->heat_kj += n * scrub_heat_kj_per_mol(v, u->liquor);
    }
    if (q->base < 0)
        q->base = 0; /* round-off only: f caps the use at what is there */
    sulfite_redox(q, r);
}

/* Composition of the liquor in q [wt%]. */
static struct liquor_comp comp_of(const struct liq *q)
{
    struct liquor_comp c = {0};
    double m = liq_mass(q);
    if (m > 0) {
        c.base_wt_pct = q->base / m * 100.0;
        for (int v = 0; v < VS_COUNT; v++)
            c.gas_wt_pct[v] = q->gas[v] / m * 100.0;
    }
    return c;
}

/* Absorb one run's vent into the liquor and fill the run's liquor figures; taken[v] is
 * the share of each gas the liquor could take (the rest breaks through). */
static void absorb(const struct scrub_unit_in *u, struct liq *q, const double *vent,
                   struct scrub_run_out *r, double *taken)
{
    const struct liquor_info *l = liquor_get(u->liquor);
    for (int v = 0; v < VS_COUNT; v++)
        taken[v] = 1.0;
    double mass_before = liq_mass(q);
    struct liquor_comp before = comp_of(q);
    if (liquor_has(u->liquor, LQ_DISSOLVES))
        absorb_dissolved(u, q, vent, r, taken);
    if (liquor_has(u->liquor, LQ_REACTS))
        absorb_base(u, q, vent, r, taken);
    double mass = liq_mass(q);
    if (mass > mass_before)
        q->dirty = 1;
    /* The heat warms the whole liquor after absorption; cp at the composition the run
     * starts with (an input cp overrides the liquor's tables).  No cooling: the rises add
     * up until the next fresh charge (pessimistic). */
    double cp = u->liquor_cp_given ? u->liquor_cp_kj_kg_k : l->cp_kj_kg_k(&before);
    r->temp_rise_k = mass > 0 ? r->heat_kj / (mass * cp) : 0;
    q->temp_c += r->temp_rise_k;
    r->liquor_temp_c_after = q->temp_c;
    r->too_hot = q->temp_c > u->max_liquor_temp_c;
    r->base_left_kg = q->base;
    r->liquor_kg_after = mass;
    r->base_wt_pct_after = mass > 0 ? q->base / mass * 100.0 : 0;
    if (naoh_named(l)) {
        r->naoh_kg = r->base_kg;
        r->naoh_left_kg = r->base_left_kg;
        r->naoh_wt_pct_after = r->base_wt_pct_after;
    }
    struct liquor_comp after = comp_of(q);
    after.base_wt_pct = r->base_wt_pct_after;
    double acid_kg = 0;
    for (int v = 0; v < VS_COUNT; v++)
        acid_kg += q->gas[v];
    r->acid_wt_pct_after = mass > 0 ? acid_kg / mass * 100.0 : 0;
    r->hbr_wt_pct_after = after.gas_wt_pct[VS_HBR]; /* the ledger's own HBr figure */
    r->boiling_point_c = l->boiling_point_c(&after);
    r->boils = q->temp_c >= r->boiling_point_c;
}
/* What leaves the stack: of the share the liquor takes, 1 - removal; the rest whole. */
static void emit(const double *removal, const double *vent, const double *taken,
                 struct scrub_run_out *r)
{
    for (int v = 0; v < VS_COUNT; v++) {
        double kg = vent[v] * gas_mm(v) / 1000.0, passed = kg * (1.0 - taken[v]);
        r->emis_kg[v] = passed + kg * taken[v] * (1.0 - removal[v]);
        r->emis_breakthrough_kg += passed;
    }
}

/* The removal in force per unit and species: given, else from the column's transfer units
 * (the NTU of its design removal, the same for every gas the liquor absorbs: gas-film
 * control, diffusivity differences left out), else the default. */
static void removal_in_force(const struct scrub_unit_in *u, struct scrub_unit_out *o)
{
    for (int v = 0; v < VS_COUNT; v++) {
        double def = scrub_removal_default(v, u->liquor, NULL);
        if (u->removal_given & (1u << v)) {
            o->removal[v] = u->removal[v];
            o->removal_origin[v] = SCRUB_REM_GIVEN;
        } else if (u->has_column && def > 0) {
            o->removal[v] = scrub_removal_from_ntu(scrub_ntu(1.0, 1.0 - u->removal_fraction));
            o->removal_origin[v] = SCRUB_REM_COLUMN;
        } else {
            o->removal[v] = def;
            o->removal_origin[v] = def > 0 ? SCRUB_REM_DEFAULT : SCRUB_REM_NONE;
        }
    }
}

static enum hl_status check_inputs(const struct scrub_unit_in *units, int nunits,
                                   const struct scrub_run_in *runs, int nruns, const int *order,
                                   char *seen, struct hl_err *e)
{
    for (int i = 0; i < nunits; i++) {
        const struct scrub_unit_in *u = &units[i];
        const char *id = u->id ? u->id : "?";
        if (!(u->liquor_kg > 0) || !isfinite(u->liquor_kg))
            return hl_err_set(e, HL_ERR_INPUT, "scrubber %s: liquor_kg must be > 0", id);
        const struct liquor_info *l = liquor_get(u->liquor);
        if (!l)
            return hl_err_set(e, HL_ERR_INPUT, "scrubber %s: unknown liquor %d", id, u->liquor);
        if (l->base >= 0 && (!(u->base_wt_pct > 0 && u->base_wt_pct < 100) ||
                                 !(u->min_base_wt_pct >= 0 && u->min_base_wt_pct < u->base_wt_pct)))
            return hl_err_set(e, HL_ERR_INPUT,
                              "scrubber %s: need 0 < base_wt_pct < 100 and 0 <= min_base_wt_pct < "
                              "base_wt_pct", id);
        if (l->base >= 0 && !(u->makeup_base_wt_pct >= u->base_wt_pct && u->makeup_base_wt_pct <= 100))
            return hl_err_set(e, HL_ERR_INPUT,
                              "scrubber %s: need base_wt_pct <= makeup_base_wt_pct <= 100", id);
        if (u->liquor_cp_given && !(u->liquor_cp_kj_kg_k > 0 && isfinite(u->liquor_cp_kj_kg_k)))
            return hl_err_set(e, HL_ERR_INPUT, "scrubber %s: liquor_cp_kj_kg_k must be > 0", id);
        if (!isfinite(u->fresh_liquor_temp_c) || !(u->fresh_liquor_temp_c > -273.15) ||
            !isfinite(u->max_liquor_temp_c))
            return hl_err_set(e, HL_ERR_INPUT,
                              "scrubber %s: liquor temperatures must be finite and above -273.15 C",
                              id);
        for (int v = 0; v < VS_COUNT; v++)
            if ((u->removal_given & (1u << v)) &&
                (!(u->removal[v] >= 0 && u->removal[v] <= 1) ||
                 (l->gas[v].uptake == LQ_PASSES && u->removal[v] > 0)))
                return hl_err_set(e, HL_ERR_INPUT, "scrubber %s: removal of %s must lie in [0, 1] "
                                  "(0 for Cl2, Br2, SO2 on a water liquor)", id, vent_name(v));
        for (int v = 0; v < VS_COUNT; v++)
            if (l->gas[v].uptake == LQ_DISSOLVES &&
                !(u->max_gas_wt_pct[v] > 0 && u->max_gas_wt_pct[v] < 100))
                return hl_err_set(e, HL_ERR_INPUT,
                                  "scrubber %s: max_acid_wt_pct and max_hbr_wt_pct must be > 0 and < 100", id);
        if (u->has_column &&
            (!(u->packing_factor_1_m > 0) || !(u->htu_m > 0) || !(u->removal_fraction > 0) ||
             !(u->removal_fraction < 1) || !(u->flood_fraction > 0) || !(u->flood_fraction <= 1) ||
             !(u->carrier_kmol_h >= 0) || !(u->liquor_kg_h > 0) || !(u->gas_temp_c > -273.15)))
            return hl_err_set(e, HL_ERR_INPUT,
                              "scrubber %s: column needs packing factor, HTU, liquor flow > 0, "
                              "0 < removal < 1, 0 < flood fraction <= 1, carrier >= 0", id);
    }
    for (int i = 0; i < nruns; i++) {
        const struct scrub_run_in *r = &runs[i];
        if (r->unit < -1 || r->unit >= nunits)
            return hl_err_set(e, HL_ERR_INPUT, "run %d: scrubber index %d out of range", i, r->unit);
        if (!(r->feed_h > 0) || !isfinite(r->feed_h))
            return hl_err_set(e, HL_ERR_INPUT, "run %d: feed_h must be > 0", i);
        if (!(r->peak_factor > 0) || !isfinite(r->peak_factor))
            return hl_err_set(e, HL_ERR_INPUT, "run %d: peak_factor must be > 0", i);
        double gas = 0;
        for (int v = 0; v < VS_COUNT; v++) {
            if (!(r->vent_mol[v] >= 0) || !isfinite(r->vent_mol[v]))
                return hl_err_set(e, HL_ERR_INPUT, "run %d: vent amounts must be >= 0", i);
            gas += r->vent_mol[v];
        }
        /* a rate that overflows would hide the overload it stands for: refuse it */
        double pf = r->peak_factor, window_s = r->feed_h / pf * 3600.0;
        if (!isfinite(gas / 1000.0 / r->feed_h * pf) || !isfinite(window_s) || !(window_s > 0) ||
            !isfinite(gas * 1000.0 / window_s)) /* heat_kw stays finite: < 1000 kJ/mol */
            return hl_err_set(e, HL_ERR_INPUT,
                              "run %d: vent rate is not a finite number (feed_h %g too short)", i,
                              r->feed_h);
    }
    for (int k = 0; k < nruns; k++) {
        int i = order[k];
        if (i < 0 || i >= nruns || seen[i])
            return hl_err_set(e, HL_ERR_INPUT, "run order: entry %d is not a permutation", k);
        seen[i] = 1;
        if (k > 0 && runs[i].start_min < runs[order[k - 1]].start_min)
            return hl_err_set(e, HL_ERR_INPUT, "run order: entry %d starts before entry %d", k, k - 1);
    }
    return HL_OK;
}

/* End of a run's vent window [min].  feed_h / peak_factor x 60 is rarely an exact binary
 * number (2 h / 1.5 = 80 min), so an end within 1e-6 min of a whole minute is that minute:
 * "ends at 08:50" and "starts at 08:50" must compare equal (no overlap).  The snap never
 * moves the end back to the start, and a window too short to show in a double still ends
 * after its start: a safety check must not lose the load of the shortest vent. */
static double vent_end_min(const struct scrub_run_in *r)
{
    double start = (double)r->start_min, end = start + r->feed_h / r->peak_factor * 60.0;
    double whole = round(end);
    if (fabs(end - whole) < 1e-6 && whole > start)
        end = whole;
    return end > start ? end : nextafter(start, HUGE_VAL);
}

double scrub_vent_end_min(const struct scrub_run_in *r) { return vent_end_min(r); }

static int64_t floor_div(int64_t a, int64_t b) { return a / b - ((a % b != 0) && ((a < 0) != (b < 0))); }

void scrub_unit_out_free(struct scrub_unit_out *u, int nunits)
{
    if (!u)
        return;
    for (int i = 0; i < nunits; i++) {
        hl_free(u[i].peak_runs);
        hl_free(u[i].peak_instant_runs);
        hl_free(u[i].peak_heat_runs);
        u[i].peak_heat_runs = NULL;
        u[i].npeak_heat_runs = 0;
        hl_free(u[i].hourly_kmol_h);
        hl_free(u[i].hourly_hour);
        u[i].hourly_hour = NULL;
        u[i].nhourly = 0;
        hl_free(u[i].spent);
        for (int v = 0; v < VS_COUNT; v++) {
            hl_free(u[i].emis[v].hourly_kg_h);
            hl_free(u[i].emis[v].hourly_hour);
            memset(&u[i].emis[v], 0, sizeof u[i].emis[v]);
        }
        u[i].peak_runs = u[i].peak_instant_runs = NULL;
        u[i].hourly_kmol_h = NULL;
        u[i].spent = NULL;
        u[i].npeak_runs = u[i].npeak_instant_runs = u[i].nhours = u[i].nspent = 0;
    }
}

/* One vent-window edge for the instantaneous peak sweep. */
struct edge {
    int unit;
    int start;      /* 1 = window opens, 0 = closes */
    double t_min;
    double rate;    /* kmol/h */
    int run;
};

static int edge_cmp(const void *pa, const void *pb)
{
    const struct edge *a = pa, *b = pb;
    if (a->unit != b->unit)
        return a->unit < b->unit ? -1 : 1;
    if (a->t_min != b->t_min)
        return a->t_min < b->t_min ? -1 : 1;
    if (a->start != b->start)
        return a->start < b->start ? -1 : 1;
    return (a->run > b->run) - (a->run < b->run);
}

/* Instantaneous peak per unit: the load is a step function that changes only at window
 * edges, so its maximum is reached just after some group of edges at one time.  The load
 * is read only after every edge at that time is applied, so a window closing at the
 * minute another opens never adds to it.  One sort of the 2n edges, one sweep
 * (Neumaier-compensated running sum, reset when the unit falls idle); runs_at_peak then
 * finds the runs venting at the peak and sums their rates afresh, so the figure carries
 * no sweep round-off. */
/* What a sweep or a peak-run list is about: the gas load or the heat release. */
enum peak_kind { PK_HOURLY, PK_INSTANT, PK_HEAT };

static double rate_of(const struct scrub_run_out *ro, int heat)
{
    return heat ? ro->heat_kw : ro->acid_kmol_h;
}

static enum hl_status instant_peaks(const struct scrub_run_in *runs, int nruns,
                                    const struct scrub_run_out *run_out,
                                    struct scrub_unit_out *unit_out, int heat, struct hl_err *e)
{
    struct edge *ev = hl_malloc((size_t)(2 * nruns + 1) * sizeof *ev);
    if (!ev)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
    int ne = 0;
    for (int i = 0; i < nruns; i++) {
        const struct scrub_run_in *r = &runs[i];
        double rate = rate_of(&run_out[i], heat);
        if (r->unit < 0 || !(rate > 0))
            continue;
        ev[ne++] = (struct edge){r->unit, 1, (double)r->start_min, rate, i};
        ev[ne++] = (struct edge){r->unit, 0, vent_end_min(r), rate, i};
    }
    qsort(ev, (size_t)ne, sizeof *ev, edge_cmp);
    for (int k = 0; k < ne;) {
        int u = ev[k].unit, active = 0;
        double sum = 0, comp = 0, best = 0, at = 0;
        for (; k < ne && ev[k].unit == u;) {
            double t_now = ev[k].t_min;
            for (; k < ne && ev[k].unit == u && ev[k].t_min == t_now; k++) {
                double x = ev[k].start ? ev[k].rate : -ev[k].rate, s = sum + x;
                comp += fabs(sum) >= fabs(x) ? (sum - s) + x : (x - s) + sum;
                sum = s;
                active += ev[k].start ? 1 : -1;
            }
            if (active == 0)
                sum = comp = 0;
            /* earliest time wins a tie, including ties broken only by round-off */
            if (sum + comp > best * (1 + 1e-12) + 1e-300) {
                best = sum + comp;
                at = t_now;
            }
        }
        /* maxima begin at a start: whole minutes */
        *(heat ? &unit_out[u].peak_heat_at_min : &unit_out[u].peak_instant_at_min) = (int64_t)at;
        *(heat ? &unit_out[u].peak_heat_kw : &unit_out[u].peak_instant_kmol_h) = best;
    }
    hl_free(ev);

    return HL_OK;
}

/* The peak-run list of one kind and the figure summed afresh from it (NULL: none). */
static int **peak_list(struct scrub_unit_out *o, enum peak_kind k, int **n, double **sum)
{
    *sum = k == PK_INSTANT ? &o->peak_instant_kmol_h : k == PK_HEAT ? &o->peak_heat_kw : NULL;
    *n = k == PK_HOURLY ? &o->npeak_runs : k == PK_INSTANT ? &o->npeak_instant_runs
                                                          : &o->npeak_heat_runs;
    return k == PK_HOURLY ? &o->peak_runs : k == PK_INSTANT ? &o->peak_instant_runs
                                                           : &o->peak_heat_runs;
}

/* The runs of each unit that make its peak: for the hourly peak those whose vent window
 * overlaps the peak clock hour [at, at + 60 min) by a positive length, for the
 * instantaneous gas and heat peaks those venting at its instant (start <= at < end),
 * whose rates are summed again into peak_instant_kmol_h / peak_heat_kw. Two passes over
 * the runs (count, then fill): linear in runs. */
static enum hl_status runs_at_peak(const struct scrub_run_in *runs, int nruns, const int *order,
                                   const struct scrub_run_out *run_out, int nunits,
                                   struct scrub_unit_out *unit_out, enum peak_kind kind,
                                   struct hl_err *e)
{
    int *n;
    double *sum;
    for (int pass = 0; pass < 2; pass++) {
        for (int u = 0; u < nunits; u++) {
            int **list = peak_list(&unit_out[u], kind, &n, &sum);
            if (pass == 1 && *n && !(*list = hl_malloc((size_t)*n * sizeof(int))))
                return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
            *n = 0;
            if (pass == 1 && sum)
                *sum = 0;
        }
        for (int k = 0; k < nruns; k++) {
            int i = order[k];
            const struct scrub_run_in *r = &runs[i];
            double rate = rate_of(&run_out[i], kind == PK_HEAT);
            if (r->unit < 0 || !(rate > 0))
                continue;
            struct scrub_unit_out *o = &unit_out[r->unit];
            double a = (double)r->start_min, b = vent_end_min(r);
            int hit;
            if (kind == PK_HOURLY) {
                double p0 = (double)o->peak_at_min, p1 = p0 + 60.0;
                hit = o->peak_acid_kmol_h > 0 && (b < p1 ? b : p1) - (a > p0 ? a : p0) > 0;
            } else {
                double at = (double)(kind == PK_HEAT ? o->peak_heat_at_min : o->peak_instant_at_min);
                hit = a <= at && b > at;
            }
            if (!hit)
                continue;
            int **list = peak_list(o, kind, &n, &sum);
            if (pass == 1) {
                (*list)[*n] = i;
                if (sum)
                    *sum += rate;
            }
            (*n)++;
        }
    }
    return HL_OK;
}

/* ---- sparse hourly bins ----
 * One entry per partial hour (kind 0) and per difference-array step (kind 1), in the order
 * the runs add them (seq), so that after the sort every hour sums its terms in the same
 * order as a dense array would: the profile is bit for bit the dense one. */
struct bin_ev {
    int unit, kind;
    int64_t hour;
    size_t seq;
    double v;
};
struct bins { struct bin_ev *ev; size_t n; };

static void bin_add(struct bins *b, int unit, int64_t hour, int kind, double v)
{
    b->ev[b->n] = (struct bin_ev){unit, kind, hour, b->n, v};
    b->n++;
}

static int bin_cmp(const void *pa, const void *pb)
{
    const struct bin_ev *a = pa, *b = pb;
    if (a->unit != b->unit)
        return a->unit < b->unit ? -1 : 1;
    if (a->hour != b->hour)
        return a->hour < b->hour ? -1 : 1;
    return (a->seq > b->seq) - (a->seq < b->seq);
}

/* The walk over one unit's hours: peak (earliest hour wins a tie, including ties broken
 * only by round-off) and the loaded hours kept, into one series (the load profile or one
 * species' emissions: the same walk for both). */
struct walk { double best; int at, cap; };
struct series { double **v; int **hour; int *n; int nhours; };

static enum hl_status keep_hour(struct series *o, struct walk *w, int h, double v)
{
    if (v > w->best * (1 + 1e-12) + 1e-300) {
        w->best = v;
        w->at = h;
    }
    if (v == 0)
        return HL_OK;
    if (*o->n == w->cap) {
        int cap = w->cap ? 2 * w->cap : 16;
        int *hh = hl_realloc(*o->hour, (size_t)cap * sizeof *hh);
        if (hh)
            *o->hour = hh;
        double *vv = hh ? hl_realloc(*o->v, (size_t)cap * sizeof *vv) : NULL;
        if (!vv)
            return HL_ERR_NOMEM;
        *o->v = vv;
        w->cap = cap;
    }
    (*o->hour)[*o->n] = h;
    (*o->v)[(*o->n)++] = v;
    return HL_OK;
}

/* Hours h0 .. h1-1 hold no entry: each carries the running sum alone.  With no load only
 * the first can change the peak (a zero beats only the starting -1). */
static enum hl_status gap_hours(struct series *o, struct walk *w, int h0, int h1, double run)
{
    if (h0 >= h1)
        return HL_OK;
    if (run == 0)
        return keep_hour(o, w, h0, 0.0);
    for (int h = h0; h < h1; h++)
        if (keep_hour(o, w, h, 0.0 + run))
            return HL_ERR_NOMEM;
    return HL_OK;
}

/* One unit's series from its sorted entries ev[0..n-1]: hours with load only; the peak
 * and its hour (index from hour0) into *peak and *peak_h. */
static enum hl_status profile(struct series *o, const struct bin_ev *ev, size_t n, double max_rate,
                              double *peak, int *peak_h, struct hl_err *e)
{
    struct walk w = {-1, 0, 0};
    double run = 0;
    int next = 0;
    for (size_t k = 0; k < n && ev[k].hour < o->nhours;) {
        int h = (int)ev[k].hour;
        double part = 0, step = 0;
        for (; k < n && ev[k].hour == h; k++)
            *(ev[k].kind ? &step : &part) += ev[k].v;
        if (gap_hours(o, &w, next, h, run))
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
        run += step;
        if (fabs(run) < 1e-12 * max_rate)
            run = 0; /* what is left of +r -r pairs is round-off */
        if (keep_hour(o, &w, h, part + run))
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
        next = h + 1;
    }
    if (gap_hours(o, &w, next, o->nhours, run))
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
    *peak = w.best > 0 ? w.best : 0;
    *peak_h = w.at;
    return HL_OK;
}

/* A run's vent at `rate` (per hour) into the bins of its unit: the partial first and last
 * hours straight into their bins, the whole hours between into a difference array. */
static void bin_run(struct bins *bn, const struct scrub_run_in *r, const struct scrub_unit_out *o,
                    double rate)
{
    double a = (double)(r->start_min - o->hour0_min);
    double b = a + r->feed_h / r->peak_factor * 60.0; /* minutes from hour0 */
    /* b <= nhours x 60 up to round-off, so ib <= nhours: an entry at hour nhours
     * is never reported */
    int64_t ia = (r->start_min - o->hour0_min) / 60, ib = (int64_t)floor(b / 60.0);
    if (ib > o->nhours)
        ib = o->nhours;
    if (ia == ib) {
        bin_add(bn, r->unit, ia, 0, rate * (b - a) / 60.0);
    } else {
        bin_add(bn, r->unit, ia, 0, rate * ((double)(ia + 1) * 60.0 - a) / 60.0);
        bin_add(bn, r->unit, ia + 1, 1, rate);
        bin_add(bn, r->unit, ib, 1, -rate);
        bin_add(bn, r->unit, ib, 0, rate * (b - (double)ib * 60.0) / 60.0);
    }
}

static double sparse_at(const double *v, const int *hour, int n, int h)
{
    int lo = 0, hi = n;
    while (lo < hi) {
        int mid = lo + (hi - lo) / 2;
        if (hour[mid] < h)
            lo = mid + 1;
        else
            hi = mid;
    }
    return lo < n && hour[lo] == h ? v[lo] : 0;
}

double scrub_hourly_emis_kg_h(const struct scrub_unit_out *u, int vs, int h)
{
    if (!u || vs < 0 || vs >= VS_COUNT || h < 0 || h >= u->nhours || !u->emis[vs].hourly_kg_h)
        return 0;
    return sparse_at(u->emis[vs].hourly_kg_h, u->emis[vs].hourly_hour, u->emis[vs].nhourly, h);
}

/* Each species' hourly emissions, on the bins of the load profile (emptied and refilled
 * per species: the same memory, one sort per species that leaves the stack). */
static enum hl_status emission_profiles(const struct scrub_run_in *runs, int nruns, const int *order,
                                        const struct scrub_run_out *run_out, int nunits,
                                        struct scrub_unit_out *unit_out, struct liq *q,
                                        struct bins *bn, struct hl_err *e)
{
    for (int v = 0; v < VS_COUNT; v++) {
        bn->n = 0;
        for (int u = 0; u < nunits; u++)
            q[u].max_rate = 0;
        for (int k = 0; k < nruns; k++) {
            int i = order[k];
            const struct scrub_run_in *r = &runs[i];
            double kg = run_out[i].emis_kg[v];
            if (r->unit < 0 || !(kg > 0))
                continue;
            unit_out[r->unit].emis[v].kg += kg;
            double rate = kg / (r->feed_h / r->peak_factor); /* kg/h over the vent window */
            if (rate > q[r->unit].max_rate)
                q[r->unit].max_rate = rate;
            bin_run(bn, r, &unit_out[r->unit], rate);
        }
        if (bn->n == 0)
            continue;
        qsort(bn->ev, bn->n, sizeof *bn->ev, bin_cmp);
        for (size_t k = 0, u = 0; u < (size_t)nunits; u++) {
            size_t k0 = k;
            while (k < bn->n && bn->ev[k].unit == (int)u)
                k++;
            struct scrub_unit_out *o = &unit_out[u];
            struct scrub_emis *m = &o->emis[v];
            if (k == k0)
                continue;
            struct series sr = {&m->hourly_kg_h, &m->hourly_hour, &m->nhourly, o->nhours};
            int at = 0;
            enum hl_status st = profile(&sr, &bn->ev[k0], k - k0, q[u].max_rate, &m->peak_kg_h, &at, e);
            if (st)
                return st;
            m->peak_at_min = o->hour0_min + (int64_t)at * 60;
        }
    }
    return HL_OK;
}

double scrub_hourly_kmol_h(const struct scrub_unit_out *u, int h)
{
    if (!u || h < 0 || h >= u->nhours || !u->hourly_kmol_h)
        return 0;
    if (!u->hourly_hour)
        return u->hourly_kmol_h[h];
    return sparse_at(u->hourly_kmol_h, u->hourly_hour, u->nhourly, h);
}

/* What the campaign passes share: the inputs, the outputs and the working arrays. */
struct pass {
    const struct scrub_unit_in *units; int nunits;
    const struct scrub_run_in *runs; int nruns;
    const int *order;
    struct scrub_run_out *run_out;
    struct scrub_unit_out *unit_out;
    struct liq *q;           /* per unit */
    struct bins bn;          /* sparse hourly bins of the load */
    int *grp;                /* per run: its group */
    double *gvent;           /* per group and gas: the group's vent [mol] */
};

/* Pass 1: each run's gas rate, each unit's time span (the size of its hourly profile) and
 * gas totals, and the first fill.  A span over 20 years is a bad input. */
static enum hl_status pass_spans(struct pass *p, struct hl_err *e)
{
    for (int i = 0; i < p->nruns; i++) {
        const struct scrub_run_in *r = &p->runs[i];
        double gas = 0;
        for (int v = 0; v < VS_COUNT; v++)
            gas += r->vent_mol[v];
        p->run_out[i].acid_kmol_h = gas / 1000.0 / r->feed_h * r->peak_factor;
        if (r->unit < 0)
            continue;
        struct liq *l = &p->q[r->unit];
        double end = (double)r->start_min + r->feed_h / r->peak_factor * 60.0;
        if (!l->used || r->start_min < l->first_min)
            l->first_min = r->start_min;
        if (!l->used || end > l->last_end_min)
            l->last_end_min = end;
        l->used = 1;
        for (int v = 0; v < VS_COUNT; v++) {
            l->gas_mol += r->vent_mol[v];
            l->gas_g += r->vent_mol[v] * gas_mm(v);
        }
    }
    for (int u = 0; u < p->nunits; u++) {
        struct scrub_unit_out *o = &p->unit_out[u];
        struct liq *q = &p->q[u];
        q->group = -1;
        q->group_busy_min = -HUGE_VAL;
        if (!q->used)
            continue;
        o->hour0_min = floor_div(q->first_min, 60) * 60;
        double hours = ceil((q->last_end_min - (double)o->hour0_min) / 60.0);
        if (!(hours <= MAX_HOURS))
            return hl_err_set(e, HL_ERR_INPUT,
                              "scrubber %s: load profile would span %.0f hours (more than 20 years)",
                              p->units[u].id ? p->units[u].id : "?", hours);
        o->nhours = hours < 1 ? 1 : (int)hours;
        fill(&p->units[u], q);
        o->max_liquor_temp_c = q->temp_c;
    }
    return HL_OK;
}

/* Pass 1b, in start order: groups of runs whose vent windows chain into each other on a
 * unit (a run joins the group when it starts before the group's latest end), and each
 * group's total vent, so the changeout is decided once for the whole group. */
static void pass_groups(struct pass *p)
{
    int ngroups = 0;
    for (int k = 0; k < p->nruns; k++) {
        int i = p->order[k];
        const struct scrub_run_in *r = &p->runs[i];
        if (r->unit < 0)
            continue;
        struct liq *l = &p->q[r->unit];
        double end = vent_end_min(r);
        if (l->group < 0 || (double)r->start_min >= l->group_busy_min) {
            l->group = ngroups++;
            l->group_busy_min = end;
        } else if (end > l->group_busy_min) {
            l->group_busy_min = end;
        }
        p->grp[i] = l->group;
        for (int v = 0; v < VS_COUNT; v++)
            p->gvent[(size_t)l->group * VS_COUNT + (size_t)v] += r->vent_mol[v];
    }
    for (int u = 0; u < p->nunits; u++)
        p->q[u].group = -1;
}

/* Pass 2, in start order: liquor run by run, and each run's vent into the bins.
 * The vent leaves at rate = amount / feed_h x peak_factor over [start, start +
 * feed_h / peak_factor], so the amount is conserved.  Bin k holds the kmol entering
 * in clock hour k (per 1 h): the partial first and last hours go straight into the
 * bin, the whole hours between into a difference array - O(1) per run.  Both are kept
 * as sparse entries (bin_add), summed per hour after one sort: memory follows the hours
 * with load, not the span. */
static enum hl_status pass_liquor(struct pass *p, struct hl_err *e)
{
    for (int k = 0; k < p->nruns; k++) {
        int i = p->order[k];
        const struct scrub_run_in *r = &p->runs[i];
        struct scrub_run_out *ro = &p->run_out[i];
        if (r->unit < 0)
            continue;
        const struct scrub_unit_in *u = &p->units[r->unit];
        struct scrub_unit_out *o = &p->unit_out[r->unit];
        struct liq *l = &p->q[r->unit];

        double rate = ro->acid_kmol_h;
        if (rate > 0) {
            if (rate > l->max_rate)
                l->max_rate = rate;
            bin_run(&p->bn, r, o, rate);
        }

        /* At a group's first run the unit is idle: charge fresh liquor when the liquor in
         * the unit cannot carry the whole group (pointless on fresh liquor).  Inside a
         * group no changeout is possible; a run past the limit is flagged. */
        if (p->grp[i] != l->group) {
            l->group = p->grp[i];
            /* between groups the unit stands idle (hours to days here): the liquor is taken
             * back at the fresh-liquor temperature, so heat piles up only within a group of
             * overlapping runs (common practice assumption; no cooler is modelled) */
            l->temp_c = u->fresh_liquor_temp_c;
            if (l->dirty && over_limit(u, l, &p->gvent[(size_t)p->grp[i] * VS_COUNT])) {
                if (push_spent(o, l, r->start_min, 0, naoh_named(liquor_get(u->liquor))))
                    return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
                fill(u, l);
                o->changeouts++;
                ro->changeout_before = 1;
            }
        }
        if (over_limit(u, l, r->vent_mol))
            ro->exhausted = 1;
        double taken[VS_COUNT];
        absorb(u, l, r->vent_mol, ro, taken);
        emit(o->removal, r->vent_mol, taken, ro);
        ro->heat_kw = ro->heat_kj / (r->feed_h / r->peak_factor * 3600.0);
        o->base_kg += ro->base_kg;
        o->co2_kg += ro->co2_kg;
        o->naoh_kg += ro->naoh_kg;
        o->heat_kj += ro->heat_kj;
        if (ro->liquor_temp_c_after > o->max_liquor_temp_c)
            o->max_liquor_temp_c = ro->liquor_temp_c_after;
        o->too_hot_runs += ro->too_hot;
        o->boiling_runs += ro->boils;
    }
    return HL_OK;
}

/* Per unit: the load profile and its peak, the final liquor as a spent batch and the
 * caustic make-up bought for the changeouts. */
static enum hl_status pass_units(struct pass *p, struct hl_err *e)
{
    struct bins *bn = &p->bn;
    qsort(bn->ev, (size_t)bn->n, sizeof *bn->ev, bin_cmp);
    for (size_t k = 0, u = 0; u < (size_t)p->nunits; u++) {
        struct scrub_unit_out *o = &p->unit_out[u];
        const struct scrub_unit_in *ui = &p->units[u];
        struct liq *q = &p->q[u];
        size_t k0 = k;
        while (k < bn->n && bn->ev[k].unit == (int)u)
            k++;
        if (!q->used)
            continue;
        struct series sr = {&o->hourly_kmol_h, &o->hourly_hour, &o->nhourly, o->nhours};
        int at = 0;
        enum hl_status st = profile(&sr, &bn->ev[k0], k - k0, q->max_rate, &o->peak_acid_kmol_h, &at, e);
        if (st)
            return st;
        o->peak_at_min = o->hour0_min + (int64_t)at * 60;
        if (push_spent(o, q, (int64_t)ceil(q->last_end_min - 1e-9), 1, naoh_named(liquor_get(ui->liquor))))
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
        /* The first fill is in place before the campaign: only changeouts buy caustic. */
        double solution_kg, water_kg;
        scrub_fresh_charge(ui->liquor_kg, ui->base_wt_pct, ui->makeup_base_wt_pct,
                           ui->liquor, &solution_kg, &water_kg);
        o->makeup_kg = o->changeouts * solution_kg;
    }
    return HL_OK;
}

/* The peaks (instantaneous gas and heat, and the runs making each peak), then per unit the
 * overload against its rating and the column check. */
static enum hl_status pass_peaks(struct pass *p, struct hl_err *e)
{
    enum hl_status st;
    if ((st = instant_peaks(p->runs, p->nruns, p->run_out, p->unit_out, 0, e)) ||
        (st = instant_peaks(p->runs, p->nruns, p->run_out, p->unit_out, 1, e)) ||
        (st = runs_at_peak(p->runs, p->nruns, p->order, p->run_out, p->nunits, p->unit_out, PK_HOURLY, e)) ||
        (st = runs_at_peak(p->runs, p->nruns, p->order, p->run_out, p->nunits, p->unit_out, PK_INSTANT, e)) ||
        (st = runs_at_peak(p->runs, p->nruns, p->order, p->run_out, p->nunits, p->unit_out, PK_HEAT, e)))
        return st;
    for (int u = 0; u < p->nunits; u++) {
        const struct scrub_unit_in *ui = &p->units[u];
        struct scrub_unit_out *o = &p->unit_out[u];
        /* a rating is an instantaneous limit: held against the instantaneous peak */
        o->overloaded = ui->rated_acid_kmol_h > 0 &&
                        o->peak_instant_kmol_h > ui->rated_acid_kmol_h * (1 + 1e-12);
        if (ui->has_column) {
            double mm = p->q[u].gas_mol > 0 ? p->q[u].gas_g / p->q[u].gas_mol : gas_mm(VS_HCL);
            column_check(ui, o->peak_instant_kmol_h, mm, &o->column);
        }
    }
    return HL_OK;
}

enum hl_status scrub_campaign(const struct scrub_unit_in *units, int nunits,
                              const struct scrub_run_in *runs, int nruns, const int *order,
                              struct scrub_run_out *run_out, struct scrub_unit_out *unit_out,
                              struct hl_err *e)
{
    if (nunits < 0 || nruns < 0 || (nunits && (!units || !unit_out)) ||
        (nruns && (!runs || !order || !run_out)))
        return hl_err_set(e, HL_ERR_INPUT, "scrub_campaign: bad arguments");
    if (nunits)
        memset(unit_out, 0, (size_t)nunits * sizeof *unit_out);
    if (nruns)
        memset(run_out, 0, (size_t)nruns * sizeof *run_out);

    enum hl_status st = HL_OK;
    size_t n1 = (size_t)(nruns ? nruns : 1);
    struct pass p = {units, nunits, runs, nruns, order, run_out, unit_out, NULL, {NULL, 0}, NULL, NULL};
    /* allocated one after another, in this order (the allocation-failure walks count them) */
    char *seen = hl_calloc(n1, 1);
    p.q = hl_calloc((size_t)(nunits ? nunits : 1), sizeof *p.q);
    p.bn.ev = hl_malloc((size_t)(4 * nruns + 1) * sizeof *p.bn.ev);
    p.grp = hl_malloc(n1 * sizeof *p.grp);
    p.gvent = hl_calloc(n1 * VS_COUNT, sizeof *p.gvent);
    if (!seen || !p.q || !p.bn.ev || !p.grp || !p.gvent) {
        st = hl_err_set(e, HL_ERR_NOMEM, "out of memory in the scrubber model");
        goto out;
    }
    if ((st = check_inputs(units, nunits, runs, nruns, order, seen, e)))
        goto out;
    for (int u = 0; u < nunits; u++)
        removal_in_force(&units[u], &unit_out[u]);
    if ((st = pass_spans(&p, e)))
        goto out;
    pass_groups(&p);
    if ((st = pass_liquor(&p, e)) || (st = pass_units(&p, e)) ||
        (st = emission_profiles(runs, nruns, order, run_out, nunits, unit_out, p.q, &p.bn, e)) ||
        (st = pass_peaks(&p, e)))
        goto out;

out:
    if (st && nunits && unit_out) {
        scrub_unit_out_free(unit_out, nunits);
        memset(unit_out, 0, (size_t)nunits * sizeof *unit_out);
    }
    hl_free(p.bn.ev);
    hl_free(p.gvent);
    hl_free(p.grp);
    hl_free(p.q);
    hl_free(seen);
    return st;
}

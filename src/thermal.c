/*
 * thermal.c - reaction heat from bond enthalpies, adiabatic rise, MTSR, Stoessel's
 * criticality class, containers on line for a gas feed (thermal.h).
 */
#include "thermal.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "elements.h"
#include "reagents.h"

/*
 * Bond dissociation enthalpies at 298 K [kJ/mol] and the uncertainties stated with them,
 * from one compilation: Y.-R. Luo, Comprehensive Handbook of Chemical Bond Energies (CRC
 * Press, 2007), which adopts for the small alkyls the values of S. J. Blanksby and G. B.
 * Ellison, Acc. Chem. Res. 2003, 36, 255 (there in kcal/mol, x 4.184 here).  All values
 * below are from memory, not read from the tables at the time of writing: check them
 * against the handbook before relying on them.  test_thermal holds the sums against
 * published formation enthalpies (a separate source) for nine reactions.
 * Site rows: methyl = CH3-X, primary = C2H5-X, secondary = (CH3)2CH-X, tertiary =
 * (CH3)3C-X, benzylic = C6H5CH2-X, allylic = CH2=CHCH2-X.
 */
struct bde { double v, u; };
static const struct bde D_CH[THERM_NSITE] = {
    {439.3, 0.4}, {423.0, 1.7}, {412.5, 1.7}, {403.8, 1.7}, {375.5, 1.3}, {371.5, 1.7}};
static const struct bde D_CCL[THERM_NSITE] = {
    {350.2, 0.8}, {354.8, 0.8}, {356.5, 1.7}, {355.2, 2.5}, {309.6, 4.0}, {298.3, 4.0}};
static const struct bde D_CBR[THERM_NSITE] = {
    {294.1, 1.3}, {293.3, 1.7}, {298.7, 1.7}, {292.9, 2.1}, {254.8, 4.0}, {242.0, 4.0}};
/* The bonds of the reagents (enum reagent_bond, named in each reagent's row). */
static const struct bde D_BOND[RB_COUNT] = {
    [RB_CLCL] = {242.6, 0.1}, [RB_BRBR] = {192.8, 0.1}, [RB_HCL] = {431.6, 0.1},
    [RB_HBR] = {366.3, 0.2},
    /* SO2Cl2(g) -> SO2(g) + 2 Cl(g), both S-Cl bonds and the relaxation of the SO2 left:
     * 2 x 121.68 - 296.83 + 364.0 from the NBS tables of formation enthalpies (Wagman et al.,
     * J. Phys. Chem. Ref. Data 11, Suppl. 2, 1982), from memory. */
    [RB_SO2CL2] = {310.5, 2.0},
    /* N-Br of N-bromosuccinimide and N-H of succinimide (Luo 2007, from memory; gas phase,
     * wider uncertainty: NBS and succinimide are solids, their lattice terms are left out). */
    [RB_NBR] = {280.0, 8.0}, [RB_NH] = {460.0, 8.0},
};
/* Thermochemical pi bond of ethylene: D(C2H5-H) - D(H-CH2CH2*) = 423.0 - 151.4 (Blanksby &
 * Ellison 2003 values, from memory). Every C=C is taken as a terminal alkene CH2=CHR: Br on
 * the CH2 (primary C-Br), H on the CH (secondary C-H), as for propene. */
static const struct bde E_PI = {271.6, 2.0};

const char therm_bde_origin[] =
    "Luo, Comprehensive Handbook of Chemical Bond Energies, CRC Press, 2007 (small alkyls as "
    "Blanksby & Ellison, Acc. Chem. Res. 2003, 36, 255), 298 K, gas phase; from memory";
const char therm_manifold_origin[] =
    "common practice: more containers than this on one gas manifold draw unevenly; feed "
    "liquid through an evaporator instead (ask the supplier)";

const char *therm_site_name(int site)
{
    static const char *const n[THERM_NSITE] = {"methyl", "primary", "secondary", "tertiary",
                                                "benzylic", "allylic"};
    return site >= 0 && site < THERM_NSITE ? n[site] : "?";
}

/* 1 when the reagent adds across C=C (its row's kind), 0 otherwise or when unknown. */
static int is_addition(int reagent)
{
    const struct reagent_info *ri = reagent_get(reagent);
    return ri && ri->kind == RK_ADDITION;
}

const char *therm_step_name(int reagent, int site)
{
    return is_addition(reagent) ? "C=C" : therm_site_name(site);
}

/* The site class of reagents.h (enum site_class bit) a thermal site row stands for. */
static unsigned site_bit(int site)
{
    static const unsigned bit[THERM_NSITE] = {
        [THERM_METHYL] = 1u << 0, [THERM_PRIMARY] = 1u << 0, [THERM_SECONDARY] = 1u << 1,
        [THERM_TERTIARY] = 1u << 2, [THERM_BENZYLIC] = 1u << 3, [THERM_ALLYLIC] = 1u << 4};
    return bit[site];
}

int therm_bond_kj_mol(int bond, double *d, double *unc)
{
    if (bond < 0 || bond >= RB_COUNT)
        return -1;
    *d = D_BOND[bond].v;
    if (unc)
        *unc = D_BOND[bond].u;
    return 0;
}

int therm_step_dh(int reagent, int site, double *dh_kj_mol, double *unc_kj_mol)
{
    const struct reagent_info *ri = reagent_get(reagent);
    double dh, u;
    if (!ri || ri->bond_x == RB_NONE)
        return -1;
    const struct bde *bx = &D_BOND[ri->bond_x];
    if (ri->kind == RK_ADDITION) {
        /* H-X + pi bond broken; C-H (secondary) and C-X (primary) formed, as for propene */
        const struct bde *cx = ri->halogen_el == EL_Cl ? D_CCL : D_CBR;
        dh = bx->v + E_PI.v - D_CH[THERM_SECONDARY].v - cx[THERM_PRIMARY].v;
        u = bx->u + E_PI.u + D_CH[THERM_SECONDARY].u + cx[THERM_PRIMARY].u;
    } else {
        if (site < 0 || site >= THERM_NSITE || !(ri->sites & site_bit(site)) || ri->bond_h == RB_NONE)
            return -1;
        const struct bde *rh = &D_CH[site], *bh = &D_BOND[ri->bond_h];
        const struct bde *cx = ri->halogen_el == EL_Cl ? &D_CCL[site] : &D_CBR[site];
        dh = rh->v + bx->v - cx->v - bh->v;
        u = rh->u + bx->u + cx->u + bh->u;
    }
    *dh_kj_mol = dh;
    if (unc_kj_mol)
        *unc_kj_mol = u;
    return 0;
}

int therm_class(double temp_c, double mtsr_c, double mtt_c, double td24_c, char *why, size_t n)
{
    int cls;
    const char *text;
    /* Stoessel 2008, section 3.3: the four temperatures in order decide the class. */
    if (mtsr_c < td24_c) {
        if (mtsr_c < mtt_c && mtt_c < td24_c) {
            cls = 1;
            text = "MTSR stays below MTT and TD24, and MTT lies below TD24: a runaway of the "
                   "reaction cannot trigger the decomposition, and evaporative cooling at MTT is a "
                   "further barrier";
        } else if (mtsr_c < mtt_c) {
            cls = 2;
            text = "MTSR stays below MTT and TD24, but TD24 is not below MTT: the runaway cannot "
                   "trigger the decomposition, but a mass held long at MTSR could; MTT is no "
                   "barrier (keep the hold time short)";
        } else {
            cls = 3;
            text = "MTSR reaches MTT but stays below TD24: the mass boils (or reaches the "
                   "equipment limit); the condenser and vent must take the heat release at MTT";
        }
    } else if (mtt_c < td24_c) {
        cls = 4;
        text = "MTSR reaches MTT and TD24, with MTT below TD24: the decomposition is triggered "
               "unless evaporative cooling at MTT holds; that barrier must be designed and proven";
    } else {
        cls = 5;
        text = "MTSR reaches TD24 and MTT is not below TD24: the decomposition is triggered before "
               "any evaporative cooling; change the process (feed control, dilution, lower "
               "accumulation)";
    }
    if (why && n)
        snprintf(why, n, "class %d: Tp %.1f C, MTSR %.1f C, MTT %.1f C, TD24 %.1f C. %s", cls,
                 temp_c, mtsr_c, mtt_c, td24_c, text);
    return cls;
}

void therm_compute(const struct therm_in *in, struct therm_out *out)
{
    memset(out, 0, sizeof *out);
    double sum = 0;
    for (int s = 0; s < THERM_NSITE; s++)
        sum += in->share[s] > 0 ? in->share[s] : 0;
    if (is_addition(in->reagent)) {
        /* one value for every C=C; share kept on the primary row (the C-Br formed) */
        out->share[THERM_PRIMARY] = 1;
    } else if (sum > 0) {
        for (int s = 0; s < THERM_NSITE; s++)
            out->share[s] = in->share[s] > 0 ? in->share[s] / sum : 0;
    } else {
        out->site_assumed = 1;
        /* a formula-only substrate: a secondary C-H, or benzylic for a reagent that attacks
         * no secondary C-H (design section 4) */
        const struct reagent_info *ri = reagent_get(in->reagent);
        out->share[ri && ri->sites && !(ri->sites & site_bit(THERM_SECONDARY)) ? THERM_BENZYLIC
                                                                  : THERM_SECONDARY] = 1;
    }
    for (int s = 0; s < THERM_NSITE; s++) {
        double dh, u;
        if (!(out->share[s] > 0) || therm_step_dh(in->reagent, s, &dh, &u))
            continue;
        out->step_dh_kj_mol[s] = dh;
        out->dh_kj_mol += out->share[s] * dh;
        out->dh_unc_kj_mol += out->share[s] * u;
    }
    out->heat_kj = -out->dh_kj_mol * in->bonds_mol;
    out->mean_kw = out->heat_kj / (in->feed_h * 3600.0);
    out->peak_kw = out->mean_kw * in->peak_factor;
    out->delta_t_ad_k = out->heat_kj / (in->mass_kg * in->cp_kj_kg_k);
    /* an endothermic sum (none in the table) would not cool the mass below Tp */
    out->mtsr_c = in->temp_c + in->accumulation * (out->delta_t_ad_k > 0 ? out->delta_t_ad_k : 0);
    out->mtsr_over_mtt = in->has_mtt && out->mtsr_c >= in->mtt_c;
    out->mtsr_over_td24 = in->has_td24 && out->mtsr_c >= in->td24_c;
    if (in->has_mtt && in->has_td24) {
        out->crit_class = therm_class(in->temp_c, out->mtsr_c, in->mtt_c, in->td24_c, NULL, 0);
        out->reason = THERM_REASON_CLASSED;
    } else {
        out->reason = !in->has_mtt && !in->has_td24 ? THERM_REASON_NO_BOTH
                      : !in->has_mtt ? THERM_REASON_NO_MTT : THERM_REASON_NO_TD24;
    }
}

void therm_reason_text(const struct therm_out *t, double temp_c, double mtt_c, double td24_c,
                       char *why, size_t n)
{
    if (n == 0)
        return;
    why[0] = '\0';
    if (t->reason == THERM_REASON_CLASSED) {
        therm_class(temp_c, t->mtsr_c, mtt_c, td24_c, why, n);
    } else if (t->reason >= THERM_REASON_NO_BOTH && t->reason <= THERM_REASON_NO_TD24) {
        snprintf(why, n,
                 "not classed: %s not given (the criticality class needs MTT, the highest "
                 "temperature the equipment tolerates, and TD24, the decomposition onset with 24 h "
                 "to maximum rate)",
                 t->reason == THERM_REASON_NO_BOTH ? "mtt_c and td24_c"
                 : t->reason == THERM_REASON_NO_MTT ? "mtt_c" : "td24_c");
    }
}

void therm_withdrawal(double charged_kg, double feed_h, double peak_factor,
                      double container_kg_h, struct therm_withdrawal *out)
{
    memset(out, 0, sizeof *out);
    out->kg_h = charged_kg / feed_h * peak_factor;
    out->container_kg_h = container_kg_h;
    /* a demand within a part per million of a whole number of containers needs that many
     * (kg/h from a division: 3 x 7.5 must not read as 3.0000000001 containers) */
    double q = out->kg_h / container_kg_h;
    double c = ceil(q * (1 - 1e-9));
    /* nothing drawn (a cancelled run) needs no container; any draw needs at least one */
    out->containers_on_line = out->kg_h <= 0 ? 0 : c < 1 ? 1 : c > 1e9 ? 1000000000 : (int)c;
    out->evaporator_needed = out->containers_on_line > THERM_MAX_ON_MANIFOLD;
}

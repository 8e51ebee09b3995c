/*
 * balance.c - mass balance of one run (see balance.h).
 *
 * Order of work: substrate identity (SMILES via selectivity, or a formula),
 * moles charged, halogen reacted (capped by what the substrate can take),
 * degree distribution from kinetics, products by degree and isomer,
 * by-products and vent, then an independent element count over everything
 * that went in and came out.  The element balance is computed from the
 * formulas, not from the stoichiometric shortcuts used above, so it catches
 * a wrong table entry or a solver that lost mass.
 */
#include "balance.h"
#include "hlmem.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

const int bal_elements[BAL_NEL] = {EL_C, EL_H, EL_N, EL_O, EL_S, EL_Cl, EL_Br};

static enum hl_status parse_known(const char *text, struct formula *f, struct hl_err *e)
{
    enum hl_status st = formula_parse(text, f, e);
    if (st)
        return hl_err_set(e, HL_ERR_INTERNAL, "built-in formula %s does not parse", text);
    return HL_OK;
}

/* Degree of unsaturation (rings + pi bonds) = C - (H + X)/2 + N/2 + 1 for C, H, N, O, S and
 * halogens at their normal valences (rings-plus-double-bonds count, common practice); a
 * closed-shell molecule has a whole, non-negative value. Other elements: not judged. */
static int closed_shell(const struct formula *f)
{
    static const int judged[] = {EL_C, EL_H, EL_N, EL_O, EL_S, EL_F, EL_Cl, EL_Br, EL_I};
    long known = 0, all = 0;
    for (size_t i = 0; i < sizeof judged / sizeof judged[0]; i++)
        known += f->n[judged[i]];
    for (int el = 0; el < EL_COUNT; el++)
        all += f->n[el];
    if (known != all)
        return 1;
    long twice = 2 * f->n[EL_C] - f->n[EL_H] - f->n[EL_F] - f->n[EL_Cl] - f->n[EL_Br] -
                 f->n[EL_I] + f->n[EL_N] + 2;
    return twice >= 0 && twice % 2 == 0;
}

/* Substrate without SMILES: every H alike, one monohalide, no structures. */
static enum hl_status substrate_from_formula(const struct bal_in *in, struct sel_result *s,
                                             struct hl_err *e)
{
    const struct reagent_info *ri = reagent_get(in->reagent);
    if (ri->kind != RK_SUBSTITUTION)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "formula",
                         "%s needs substrate.smiles: the %s sites cannot be found from a formula",
                         ri->name, ri->kind == RK_NBS ? "allylic/benzylic" : "C=C");
    if (in->product_smiles)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "product_smiles",
                         "needs substrate.smiles to compare structures");
    enum hl_status st = formula_parse(in->formula, &s->substrate, e);
    if (st) {
        snprintf(e->field, sizeof e->field, "formula");
        return st;
    }
    if (s->substrate.n[EL_C] < 1)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "formula", "substrate %s has no carbon", in->formula);
    if (!closed_shell(&s->substrate))
        return hl_err_at(e, HL_ERR_INPUT, 0, 1, "formula",
                         "%s is not a possible molecule: its degree of unsaturation "
                         "C - (H + X)/2 + N/2 + 1 is negative or not a whole number", in->formula);
    long h = s->substrate.n[EL_H];
    if (h < 1)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "formula",
                         "substrate %s has no hydrogen to substitute", in->formula);
    s->molar_mass_g_mol = formula_molar_mass_g_mol(&s->substrate);
    /* the true H count: the step constants fall as (H - n); kin_step_constants* cap the
     * chain at KIN_MAX_STEPS themselves */
    s->h0 = (int)h;
    s->mean_r = 1.0;
    s->class_h[SITE_PRIMARY] = (double)h;
    s->class_r[SITE_PRIMARY] = 1.0;
    s->iso = hl_calloc(1, sizeof *s->iso);
    if (!s->iso)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    s->niso = 1;
    s->wanted = 0;
    s->iso[0].smiles = NULL;
    s->iso[0].fraction = 1.0;
    s->iso[0].site_class = SITE_PRIMARY;
    s->iso[0].n_h = (int)h;
    s->iso[0].r_per_h = 1.0;
    return HL_OK;
}

/* Formula of the degree-d product: substitution/NBS trade d H for d X; HBr adds d HBr. */
static void degree_formula(const struct formula *sub, const struct reagent_info *ri, int d,
                           struct formula *out)
{
    *out = *sub;
    if (ri->kind == RK_ADDITION) {
        out->n[EL_H] += d;
        out->n[EL_Br] += d;
    } else {
        out->n[EL_H] -= d;
        out->n[ri->halogen_el] += d;
    }
}

static enum hl_status push_product(struct bal_out *o, int cap, const char *smiles,
                                   const struct formula *f, int degree, double mol,
                                   double substrate_mol, enum bal_role role, struct hl_err *e)
{
    if (o->nproducts >= cap)
        return hl_err_set(e, HL_ERR_INTERNAL, "product table overflow");
    struct bal_product *p = &o->products[o->nproducts];
    memset(p, 0, sizeof *p);
    if (smiles && !(p->smiles = hl_strdup(smiles)))
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    o->nproducts++;
    formula_hill(f, p->formula, sizeof p->formula);
    p->degree = degree;
    p->molar_mass_g_mol = formula_molar_mass_g_mol(f);
    p->mol = mol;
    p->kg = mol * p->molar_mass_g_mol / 1000.0;
    p->mol_fraction = mol / substrate_mol;
    p->role = role;
    return HL_OK;
}

static void count_elements(double *acc, const struct formula *f, double mol)
{
    for (int i = 0; i < BAL_NEL; i++)
        acc[i] += (double)f->n[bal_elements[i]] * mol;
}

/* Count every element in and out from formulas. formed[] = gas made by the reaction
 * (before the split into vent and retained); unreacted reagent is counted once, as
 * the reagent, whether it vents or stays. */
static enum hl_status element_balance(const struct reagent_info *ri, struct bal_out *o,
                                      const struct formula *product_f, const double *formed_mol,
                                      double succinimide_mol, struct hl_err *e)
{
    static const char *const gas_formula[VS_COUNT] = {"HCl", "HBr", "Cl2", "Br2", "SO2"};
    struct formula rf, gas, succ;
    enum hl_status st;
    if ((st = parse_known(ri->formula, &rf, e)) || (st = parse_known("C4H5NO2", &succ, e)))
        return st;
    memset(o->el_in_mol, 0, sizeof o->el_in_mol);
    memset(o->el_out_mol, 0, sizeof o->el_out_mol);
    count_elements(o->el_in_mol, &o->sel.substrate, o->substrate_mol);
    count_elements(o->el_in_mol, &rf, o->reagent_mol);
    for (int i = 0; i < o->nproducts; i++)
        count_elements(o->el_out_mol, &product_f[i], o->products[i].mol);
    for (int v = 0; v < VS_COUNT; v++) {
        if ((st = parse_known(gas_formula[v], &gas, e)))
            return st;
        count_elements(o->el_out_mol, &gas, formed_mol[v]);
    }
    count_elements(o->el_out_mol, &succ, succinimide_mol);
    count_elements(o->el_out_mol, &rf, o->reagent_unreacted_mol);
    double worst = 0.0;
    for (int i = 0; i < BAL_NEL; i++) {
        double a = o->el_in_mol[i], b = o->el_out_mol[i];
        double scale = fmax(fabs(a), fabs(b));
        double rel = scale > 0 ? fabs(a - b) / scale : 0.0;
        if (rel > worst)
            worst = rel;
    }
    o->max_rel_error = worst;
    return HL_OK;
}

/* Yield, conversion, selectivity and halogen efficiency from the products (issue 15.3).
 * Halogen atoms per mole of reagent come from its formula, so Cl2 counts 2 (one goes to
 * HCl), SO2Cl2 2 (one to HCl), NBS and HBr 1: the efficiency is the share of the halogen
 * bought that ends up in the wanted product. */
static enum hl_status run_figures(const struct reagent_info *ri, struct bal_out *o, struct hl_err *e)
{
    struct formula rf;
    enum hl_status st = parse_known(ri->formula, &rf, e);
    if (st)
        return st;
    double unreacted = 0;
    for (int i = 0; i < o->nproducts; i++) {
        const struct bal_product *p = &o->products[i];
        if (p->role == ROLE_WANTED) {
            o->wanted_mol += p->mol;
            o->halogen_in_wanted_mol += p->mol * p->degree;
        } else if (p->role == ROLE_UNREACTED) {
            unreacted += p->mol;
        }
    }
    o->converted_mol = fmax(0.0, o->substrate_mol - unreacted);
    o->halogen_charged_mol = o->reagent_mol * rf.n[ri->halogen_el];
    o->yield_pct = o->substrate_mol > 0 ? 100.0 * o->wanted_mol / o->substrate_mol : 0.0;
    o->conversion_pct = o->substrate_mol > 0 ? 100.0 * o->converted_mol / o->substrate_mol : 0.0;
    o->selectivity_defined = o->converted_mol > 0;
    o->selectivity_pct = o->selectivity_defined ? 100.0 * o->wanted_mol / o->converted_mol : 0.0;
    o->halogen_efficiency_pct =
        o->halogen_charged_mol > 0 ? 100.0 * o->halogen_in_wanted_mol / o->halogen_charged_mol : 0.0;
    return HL_OK;
}

static enum hl_status compute(const struct bal_in *in, struct bal_out *o, struct hl_err *e)
{
    const struct reagent_info *ri = reagent_get(in->reagent);
    if (!ri || in->reagent >= RG_CHARGEABLE)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "reagent", "not a reactor reagent");
    enum hl_status st;
    struct sel_reactivity user = in->user;
    if (in->nratios > 0)
        user.set_mask |= SEL_OWN_RATIOS;
    if (in->smiles)
        st = sel_predict(in->smiles, in->product_smiles, in->reagent, in->temp_c,
                         user.set_mask ? &user : NULL, &o->sel, e);
    else
        st = substrate_from_formula(in, &o->sel, e);
    if (st)
        return st;
    struct sel_result *s = &o->sel;
    o->isomers_resolved = in->smiles != NULL;
    formula_hill(&s->substrate, o->substrate_formula, sizeof o->substrate_formula);
    o->substrate_molar_mass_g_mol = s->molar_mass_g_mol;
    o->substrate_mol = in->substrate_kg * 1000.0 / s->molar_mass_g_mol;

    /* Step constants of the degree model. Published ratios (methane + Cl2) yield to
     * the campaign's own. The chain ends where no abstractable H (or C=C) is left. */
    double k[KIN_MAX_STEPS];
    double phi = in->has_phi ? in->phi : 1.0;
    const double *ratios = in->nratios ? in->ratios : (s->nratios ? s->rate_ratios : NULL);
    int nratios = in->nratios ? in->nratios : s->nratios;
    int nsteps = ratios ? kin_step_constants(s->h0, s->mean_r, phi, ratios, nratios, k)
                        : kin_step_constants_sites(s->class_h, s->class_r, SITE_CLASS_COUNT, phi, k);
    if (nsteps < 1)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "model", "rate constants are not usable");

    /* Charged and reacted. Each mole of reagent reacted puts one halogen on carbon
     * (X2 and SO2Cl2 by substitution, NBS at allylic/benzylic C-H, HBr across one C=C). */
    if (in->amount_is_kg) {
        o->reagent_kg = in->reagent_kg;
        o->reagent_mol = in->reagent_kg * 1000.0 / ri->molar_mass_g_mol;
    } else {
        o->reagent_mol = in->reagent_eq * o->substrate_mol;
        o->reagent_kg = o->reagent_mol * ri->molar_mass_g_mol / 1000.0;
    }
    double wanted_react = o->reagent_mol * in->halogen_conversion;
    double capacity = o->substrate_mol * nsteps;
    o->reagent_reacted_mol = wanted_react;
    if (wanted_react >= capacity * (1.0 - 1e-12)) {
        o->reagent_reacted_mol = capacity;
        o->capped = 1;
        snprintf(o->warning, sizeof o->warning,
                 "%s reacted capped at %.6g mol: the substrate can take only %d per molecule "
                 "(%.6g mol asked); the excess %s",
                 ri->name, capacity, nsteps, wanted_react,
                 ri->unreacted_vent >= 0 ? "goes to the vent" : "stays in the reaction mass");
    }
    o->reagent_unreacted_mol = o->reagent_mol - o->reagent_reacted_mol;
    o->halogen_reacted_mol = o->reagent_reacted_mol;
    o->mean_degree = o->reagent_reacted_mol / o->substrate_mol;

    double x[KIN_MAX_STEPS + 1];
    double mean = o->mean_degree > nsteps ? nsteps : o->mean_degree;
    if ((st = kin_solve_extent(in->mode, k, nsteps, mean, x, NULL, e)))
        return st;

    /* Products: degree 0, the first-step isomers, then higher degrees. */
    int cap = 1 + s->niso + nsteps;
    struct formula *pf = hl_calloc((size_t)cap, sizeof *pf);
    o->products = hl_calloc((size_t)cap, sizeof *o->products);
    if (!pf || !o->products) {
        hl_free(pf);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    double n0 = o->substrate_mol;
    pf[0] = s->substrate;
    st = push_product(o, cap, in->smiles, &s->substrate, 0, x[0] * n0, n0, ROLE_UNREACTED, e);
    for (int j = 0; !st && j < s->niso; j++) {
        struct formula f1;
        degree_formula(&s->substrate, ri, 1, &f1);
        if (s->iso[j].smiles && !formula_equal(&f1, &s->iso[j].formula)) {
            st = hl_err_set(e, HL_ERR_INTERNAL, "isomer %s has an unexpected formula", s->iso[j].smiles);
            break;
        }
        pf[o->nproducts] = f1;
        st = push_product(o, cap, s->iso[j].smiles, &f1, 1, x[1] * s->iso[j].fraction * n0, n0,
                          j == s->wanted ? ROLE_WANTED : ROLE_ISOMER, e);
    }
    for (int d = 2; !st && d <= nsteps; d++) {
        struct formula fd;
        degree_formula(&s->substrate, ri, d, &fd);
        pf[o->nproducts] = fd;
        st = push_product(o, cap, s->over_smiles[d], &fd, d, x[d] * n0, n0, ROLE_OVERHAL, e);
    }
    if (st) {
        hl_free(pf);
        return st;
    }
    for (int i = 0; i < o->nproducts; i++) {
        const struct bal_product *p = &o->products[i];
        if (p->role == ROLE_WANTED) o->wanted_kg += p->kg;
        else if (p->role == ROLE_ISOMER) o->isomer_kg += p->kg;
        else if (p->role == ROLE_OVERHAL) o->overhal_kg += p->kg;
        else o->unreacted_substrate_kg += p->kg;
    }

    /* By-products and vent. Acid gases (HCl, HBr, SO2) partly stay dissolved in the
     * reaction mass (vent_retained_fraction); unreacted Cl2/Br2 all leave. */
    double keep = in->vent_retained_fraction;
    double formed[VS_COUNT] = {0};
    if (ri->hx_species >= 0)
        formed[ri->hx_species] += ri->hx_mol * o->reagent_reacted_mol;
    formed[VS_SO2] += ri->so2_mol * o->reagent_reacted_mol;
    o->hx_kg[0] = formed[VS_HCL] * vent_molar_mass_g_mol(VS_HCL) / 1000.0;
    o->hx_kg[1] = formed[VS_HBR] * vent_molar_mass_g_mol(VS_HBR) / 1000.0;
    o->so2_kg = formed[VS_SO2] * vent_molar_mass_g_mol(VS_SO2) / 1000.0;
    double succ_mol = ri->succinimide_mol * o->reagent_reacted_mol;
    struct formula succ;
    if ((st = parse_known("C4H5NO2", &succ, e))) {
        hl_free(pf);
        return st;
    }
    o->succinimide_kg = succ_mol * formula_molar_mass_g_mol(&succ) / 1000.0;
    double leaving[VS_COUNT];
    memcpy(leaving, formed, sizeof leaving);
    if (ri->unreacted_vent >= 0)
        leaving[ri->unreacted_vent] += o->reagent_unreacted_mol;
    else
        o->reagent_left_kg = o->reagent_unreacted_mol * ri->molar_mass_g_mol / 1000.0;
    for (int v = 0; v < VS_COUNT; v++) {
        int acid = v == VS_HCL || v == VS_HBR || v == VS_SO2;
        o->retained_mol[v] = acid ? leaving[v] * keep : 0.0;
        o->vent_mol[v] = leaving[v] - o->retained_mol[v];
    }
    st = element_balance(ri, o, pf, formed, succ_mol, e);
    hl_free(pf);
    if (!st)
        st = run_figures(ri, o, e);
    if (!st && !o->warning[0] && s->warning[0])
        snprintf(o->warning, sizeof o->warning, "%s", s->warning);
    /* SO2Cl2 boils at about 69 C (from memory): above that, unreacted reagent the ledger
     * keeps in the mass can leave with the vent gas and hydrolyse in the scrubber. */
    if (!st && in->reagent == RG_SO2CL2 && in->temp_c >= 69.0 && o->reagent_left_kg > 0 &&
        !o->warning[0])
        snprintf(o->warning, sizeof o->warning,
                 "%.1f kg of unreacted SO2Cl2 at %.0f C, above its boiling point (about 69 C): "
                 "it may leave with the vent gas (SO2Cl2 + 4 NaOH -> Na2SO4 + 2 NaCl + 2 H2O in "
                 "caustic); the ledger keeps it in the reaction mass",
                 o->reagent_left_kg, in->temp_c);
    return st;
}

enum hl_status bal_compute(const struct bal_in *in, struct bal_out *o, struct hl_err *e)
{
    memset(o, 0, sizeof *o);
    enum hl_status st = compute(in, o, e);
    if (st)
        bal_free(o);
    return st;
}

enum hl_status bal_copy(struct bal_out *dst, const struct bal_out *src, struct hl_err *e)
{
    *dst = *src;
    memset(&dst->sel, 0, sizeof dst->sel);
    dst->products = hl_calloc((size_t)(src->nproducts ? src->nproducts : 1), sizeof *dst->products);
    dst->nproducts = 0;
    if (!dst->products)
        goto nomem;
    for (int i = 0; i < src->nproducts; i++) {
        dst->products[i] = src->products[i];
        dst->products[i].smiles = NULL;
        dst->nproducts = i + 1;
        if (src->products[i].smiles && !(dst->products[i].smiles = hl_strdup(src->products[i].smiles)))
            goto nomem;
    }
    return HL_OK;
nomem:
    bal_free(dst);
    return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
}

void bal_free(struct bal_out *o)
{
    if (!o)
        return;
    for (int i = 0; i < o->nproducts; i++)
        hl_free(o->products[i].smiles);
    hl_free(o->products);
    sel_free(&o->sel);
    memset(o, 0, sizeof *o);
}

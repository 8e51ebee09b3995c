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

#include <stddef.h>
#include <stdint.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

const int bal_elements[BAL_NEL] = {EL_C, EL_H, EL_N, EL_O, EL_S, EL_Cl, EL_Br};

/* Parses a formula built into the program into *f; a failure is an internal error. */
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

/* ---- what runs share (bal_cache) ---- */

/* Hill text and molar mass of one product formula. */
struct bal_formula { char hill[64]; double molar_mass_g_mol; };

/* The built-in formulas the balance counts with. */
struct bal_consts {
    struct formula reagent[RG_CHARGEABLE], gas[VS_COUNT], succ;
    double succ_molar_mass_g_mol;
};

/* One selectivity prediction and its products' formulas by degree (filled as met). */
struct bal_entry {
    struct bal_entry *next;
    uint64_t hash;
    char *smiles, *formula, *product_smiles;  /* the key: copies, may be NULL */
    int reagent;
    double temp_c;
    struct sel_reactivity user;                /* set_mask 0: defaults */
    struct sel_result sel;
    struct bal_formula prod[KIN_MAX_STEPS + 1];
    unsigned char known[KIN_MAX_STEPS + 1];
};

/* What a solved extent depends on: the mode, the step constants and the mean degree. Runs
 * of one recipe differ in batch size, not in these, so most solves repeat. */
struct bal_extent_key {
    int mode, nsteps;
    double mean, k[KIN_MAX_STEPS]; /* k[nsteps..] stay 0 */
};

/* An empty slot is all zero: its nsteps 0 matches no key (a solve has nsteps >= 1). */
struct bal_extent { struct bal_extent_key key; double x[KIN_MAX_STEPS + 1]; };

#define BAL_NEXTENT 64 /* direct-mapped: a miss only costs the solve */

struct bal_cache {
    struct bal_entry **bucket; size_t nbucket, n;
    struct bal_consts k;
    int have_k;
    struct bal_extent extent[BAL_NEXTENT];
};

/* Fills k with the parsed formulas of every chargeable reagent, vent gas and succinimide
 * and succinimide's molar mass. */
static enum hl_status consts_init(struct bal_consts *k, struct hl_err *e)
{
    enum hl_status st = HL_OK;
    for (int r = 0; r < RG_CHARGEABLE && !st; r++)
        st = parse_known(reagent_get(r)->formula, &k->reagent[r], e);
    for (int v = 0; v < VS_COUNT && !st; v++)
        st = parse_known(vent_formula(v), &k->gas[v], e);
    if (!st)
        st = parse_known("C4H5NO2", &k->succ, e);
    if (!st)
        k->succ_molar_mass_g_mol = formula_molar_mass_g_mol(&k->succ);
    return st;
}

/* FNV-1a hash of n bytes at p, continuing from h (Fowler, Noll, Vo; the 64-bit prime). */
static uint64_t fnv_bytes(uint64_t h, const void *p, size_t n)
{
    const unsigned char *b = p;
    for (size_t i = 0; i < n; i++)
        h = (h ^ b[i]) * 1099511628211u;
    return h;
}

/* fnv_bytes of s with its NUL; a NULL s hashes apart from "". */
static uint64_t fnv_str(uint64_t h, const char *s)
{
    return s ? fnv_bytes(h, s, strlen(s) + 1) : fnv_bytes(h, "", 1) * 31u;
}

/* 1 when a and b are both NULL or equal strings. */
static int same_str(const char *a, const char *b) { return (!a && !b) || (a && b && !strcmp(a, b)); }

/* Everything sel_predict (or the formula path) reads, compared bit for bit. */
static uint64_t key_hash(const struct bal_in *in, const struct sel_reactivity *u)
{
    uint64_t h = 14695981039346656037u;
    h = fnv_str(h, in->smiles);
    h = fnv_str(h, in->formula);
    h = fnv_str(h, in->product_smiles);
    h = fnv_bytes(h, &in->reagent, sizeof in->reagent);
    h = fnv_bytes(h, &in->temp_c, sizeof in->temp_c);
    h = fnv_bytes(h, u->r, sizeof u->r);
    h = fnv_bytes(h, &u->ref_temp_c, sizeof u->ref_temp_c);
    return fnv_bytes(h, &u->set_mask, sizeof u->set_mask);
}

/* 1 when cache entry x was predicted from exactly these inputs (in, u): every field
 * key_hash reads, bit for bit. */
static int key_equal(const struct bal_entry *x, const struct bal_in *in, const struct sel_reactivity *u)
{
    return x->reagent == in->reagent && !memcmp(&x->temp_c, &in->temp_c, sizeof x->temp_c) &&
           !memcmp(x->user.r, u->r, sizeof u->r) &&
           !memcmp(&x->user.ref_temp_c, &u->ref_temp_c, sizeof u->ref_temp_c) &&
           x->user.set_mask == u->set_mask && same_str(x->smiles, in->smiles) &&
           same_str(x->formula, in->formula) && same_str(x->product_smiles, in->product_smiles);
}

struct bal_cache *bal_cache_new(void)
{
    struct bal_cache *c = hl_calloc(1, sizeof *c);
    if (!c)
        return NULL;
    c->nbucket = 256;
    if (!(c->bucket = hl_calloc(c->nbucket, sizeof *c->bucket))) {
        hl_free(c);
        return NULL;
    }
    return c;
}

/* Frees cache entry x, its prediction and its copies of the input strings. */
static void entry_free(struct bal_entry *x)
{
    sel_free(&x->sel);
    hl_free(x->smiles);
    hl_free(x->formula);
    hl_free(x->product_smiles);
    hl_free(x);
}

void bal_cache_free(struct bal_cache *c)
{
    if (!c)
        return;
    for (size_t b = 0; b < c->nbucket; b++)
        for (struct bal_entry *x = c->bucket[b], *nx; x; x = nx) {
            nx = x->next;
            entry_free(x);
        }
    hl_free(c->bucket);
    hl_free(c);
}

/* Double the table when it holds more entries than buckets (chains stay short). */
static enum hl_status cache_grow(struct bal_cache *c, struct hl_err *e)
{
    size_t nb = c->nbucket * 2;
    struct bal_entry **nbk = hl_calloc(nb, sizeof *nbk);
    if (!nbk)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    for (size_t b = 0; b < c->nbucket; b++)
        for (struct bal_entry *x = c->bucket[b], *nx; x; x = nx) {
            nx = x->next;
            x->next = nbk[x->hash & (nb - 1)];
            nbk[x->hash & (nb - 1)] = x;
        }
    hl_free(c->bucket);
    c->bucket = nbk;
    c->nbucket = nb;
    return HL_OK;
}

/* The prediction for in: from the cache, else computed (and kept when cache is given). */
static enum hl_status predict_once(const struct bal_in *in, const struct sel_reactivity *user,
                                   struct bal_cache *c, struct bal_entry **ent,
                                   struct sel_result *own, struct hl_err *e)
{
    *ent = NULL;
    if (!c)
        return in->smiles ? sel_predict(in->smiles, in->product_smiles, in->reagent, in->temp_c,
                                        user->set_mask ? user : NULL, own, e)
                          : substrate_from_formula(in, own, e);
    uint64_t h = key_hash(in, user);
    for (struct bal_entry *x = c->bucket[h & (c->nbucket - 1)]; x; x = x->next)
        if (x->hash == h && key_equal(x, in, user)) {
            *ent = x;
            return HL_OK;
        }
    struct bal_entry *x = hl_calloc(1, sizeof *x);
    if (!x)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    x->hash = h;
    x->reagent = in->reagent;
    x->temp_c = in->temp_c;
    x->user = *user;
    x->smiles = hl_strdup(in->smiles);
    x->formula = hl_strdup(in->formula);
    x->product_smiles = hl_strdup(in->product_smiles);
    if ((in->smiles && !x->smiles) || (in->formula && !x->formula) ||
        (in->product_smiles && !x->product_smiles)) {
        entry_free(x);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    enum hl_status st = predict_once(in, user, NULL, ent, &x->sel, e);
    if (st) {
        entry_free(x); /* errors are not kept: the ledger stops at the first one */
        return st;
    }
    if (c->n >= c->nbucket && (st = cache_grow(c, e))) {
        entry_free(x);
        return st;
    }
    x->next = c->bucket[h & (c->nbucket - 1)];
    c->bucket[h & (c->nbucket - 1)] = x;
    c->n++;
    *ent = x;
    return HL_OK;
}

/* Hill text and molar mass of the degree-d product formula f, from the entry when known. */
static const struct bal_formula *product_formula(struct bal_entry *x, int d, const struct formula *f,
                                                 struct bal_formula *scratch)
{
    struct bal_formula *out = x ? &x->prod[d] : scratch;
    if (x && x->known[d])
        return out;
    formula_hill(f, out->hill, sizeof out->hill);
    out->molar_mass_g_mol = formula_molar_mass_g_mol(f);
    if (x)
        x->known[d] = 1;
    return out;
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

/* Appends one product row to o->products (cap rows): its SMILES copied (owned by o; NULL:
 * none), formula text and molar mass from f, degree, moles, kg and mole fraction of the
 * substrate_mol charged, role. Overflow is an internal error. */
static enum hl_status push_product(struct bal_out *o, int cap, const char *smiles,
                                   const struct bal_formula *f, int degree, double mol,
                                   double substrate_mol, enum bal_role role, struct hl_err *e)
{
    if (o->nproducts >= cap)
        return hl_err_set(e, HL_ERR_INTERNAL, "product table overflow");
    struct bal_product *p = &o->products[o->nproducts];
    memset(p, 0, sizeof *p);
    if (smiles && !(p->smiles = hl_strdup(smiles)))
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    o->nproducts++;
    memcpy(p->formula, f->hill, sizeof p->formula);
    p->degree = degree;
    p->molar_mass_g_mol = f->molar_mass_g_mol;
    p->mol = mol;
    p->kg = mol * p->molar_mass_g_mol / 1000.0;
    p->mol_fraction = mol / substrate_mol;
    p->role = role;
    return HL_OK;
}

/* Adds mol x the element counts of f to acc[BAL_NEL] (the elements of bal_elements). */
static void count_elements(double *acc, const struct formula *f, double mol)
{
    for (int i = 0; i < BAL_NEL; i++)
        acc[i] += (double)f->n[bal_elements[i]] * mol;
}

/* Count every element in and out from formulas. formed[] = gas made by the reaction
 * (before the split into vent and retained); unreacted reagent is counted once, as
 * the reagent, whether it vents or stays. */
static void element_balance(const struct bal_consts *k, int reagent, struct bal_out *o,
                            const struct formula *product_f, const double *formed_mol,
                            double succinimide_mol)
{
    const struct formula *rf = &k->reagent[reagent];
    memset(o->el_in_mol, 0, sizeof o->el_in_mol);
    memset(o->el_out_mol, 0, sizeof o->el_out_mol);
    count_elements(o->el_in_mol, &o->sel->substrate, o->substrate_mol);
    count_elements(o->el_in_mol, rf, o->reagent_mol);
    for (int i = 0; i < o->nproducts; i++)
        count_elements(o->el_out_mol, &product_f[i], o->products[i].mol);
    for (int v = 0; v < VS_COUNT; v++)
        count_elements(o->el_out_mol, &k->gas[v], formed_mol[v]);
    count_elements(o->el_out_mol, &k->succ, succinimide_mol);
    count_elements(o->el_out_mol, rf, o->reagent_unreacted_mol);
    double worst = 0.0;
    for (int i = 0; i < BAL_NEL; i++) {
        double a = o->el_in_mol[i], b = o->el_out_mol[i];
        double scale = fmax(fabs(a), fabs(b));
        double rel = scale > 0 ? fabs(a - b) / scale : 0.0;
        if (rel > worst)
            worst = rel;
    }
    o->max_rel_error = worst;
}

/* Yield, conversion, selectivity and halogen efficiency from the products (issue 15.3).
 * Halogen atoms per mole of reagent come from its formula, so Cl2 counts 2 (one goes to
 * HCl), SO2Cl2 2 (one to HCl), NBS and HBr 1: the efficiency is the share of the halogen
 * bought that ends up in the wanted product. */
static void run_figures(const struct reagent_info *ri, const struct formula *rf, struct bal_out *o)
{
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
    o->halogen_charged_mol = o->reagent_mol * rf->n[ri->halogen_el];
    o->yield_pct = o->substrate_mol > 0 ? 100.0 * o->wanted_mol / o->substrate_mol : 0.0;
    o->conversion_pct = o->substrate_mol > 0 ? 100.0 * o->converted_mol / o->substrate_mol : 0.0;
    o->selectivity_defined = o->converted_mol > 0;
    o->selectivity_pct = o->selectivity_defined ? 100.0 * o->wanted_mol / o->converted_mol : 0.0;
    o->halogen_efficiency_pct =
        o->halogen_charged_mol > 0 ? 100.0 * o->halogen_in_wanted_mol / o->halogen_charged_mol : 0.0;
}

/* The model constants, the selectivity prediction and the substrate's figures of one run.
 * Takes the run and the cache (NULL: none); gives *kk (the cache's constants, or *local_k
 * filled), o->sel (owned by o without a cache, by the cache's entry *ent with one) and o's
 * substrate formula, molar mass and moles. */
static enum hl_status prepare(const struct bal_in *in, struct bal_cache *cache,
                              struct bal_consts *local_k, const struct bal_consts **kk,
                              struct bal_entry **ent, struct bal_out *o, struct hl_err *e)
{
    enum hl_status st;
    *kk = local_k;
    if (cache) {
        if (!cache->have_k && (st = consts_init(&cache->k, e)))
            return st;
        cache->have_k = 1;
        *kk = &cache->k;
    } else if ((st = consts_init(local_k, e))) {
        return st;
    }
    struct sel_reactivity user = in->user;
    if (in->nratios > 0)
        user.set_mask |= SEL_OWN_RATIOS;
    *ent = NULL;
    if (!cache) {
        if (!(o->sel = hl_calloc(1, sizeof *o->sel)))
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
        o->sel_owned = 1;
    }
    if ((st = predict_once(in, &user, cache, ent, o->sel, e)))
        return st;
    if (*ent)
        o->sel = &(*ent)->sel;
    struct sel_result *s = o->sel;
    o->isomers_resolved = in->smiles != NULL;
    formula_hill(&s->substrate, o->substrate_formula, sizeof o->substrate_formula);
    o->substrate_molar_mass_g_mol = s->molar_mass_g_mol;
    o->substrate_mol = in->substrate_kg * 1000.0 / s->molar_mass_g_mol;
    return HL_OK;
}

/* Step constants of the degree model. Published ratios (methane + Cl2) yield to the
 * campaign's own. The chain ends where no abstractable H (or C=C) is left. Takes the run and
 * its prediction; gives k[0..*nsteps-1] (k holds KIN_MAX_STEPS) and *nsteps >= 1. */
static enum hl_status step_constants(const struct bal_in *in, const struct sel_result *s,
                                     double *k, int *nsteps, struct hl_err *e)
{
    double phi = in->has_phi ? in->phi : 1.0;
    const double *ratios = in->nratios ? in->ratios : (s->nratios ? s->rate_ratios : NULL);
    int nratios = in->nratios ? in->nratios : s->nratios;
    *nsteps = ratios ? kin_step_constants(s->h0, s->mean_r, phi, ratios, nratios, k)
                     : kin_step_constants_sites(s->class_h, s->class_r, SITE_CLASS_COUNT, phi, k);
    if (*nsteps < 1)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "model", "rate constants are not usable");
    return HL_OK;
}

/* Charged and reacted. Each mole of reagent reacted puts one halogen on carbon (X2 and
 * SO2Cl2 by substitution, NBS at allylic/benzylic C-H, HBr across one C=C). Takes the run,
 * its reagent row and the number of steps (halogens a substrate molecule can take); sets o's
 * reagent figures, the mean degree and, when the substrate caps the reaction, o->capped and
 * the warning. */
static void charge_reagent(const struct bal_in *in, const struct reagent_info *ri, int nsteps,
                           struct bal_out *o)
{
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
}

/* Products: degree 0, the first-step isomers, then higher degrees. Takes the run, its
 * reagent row, prediction and cache entry (NULL: none), the degree fractions x[0..nsteps] and
 * pf[cap] (the caller's, freed by it); pushes each product into o->products (cap rows, owned
 * by o), its formula into pf[] at the same index, and sums the kg of each role. */
static enum hl_status push_products(const struct bal_in *in, const struct reagent_info *ri,
                                    const struct sel_result *s, struct bal_entry *ent,
                                    const double *x, int nsteps, int cap, struct formula *pf,
                                    struct bal_out *o, struct hl_err *e)
{
    double n0 = o->substrate_mol;
    struct bal_formula scratch;
    pf[0] = s->substrate;
    enum hl_status st = push_product(o, cap, in->smiles,
                                     product_formula(ent, 0, &s->substrate, &scratch), 0,
                                     x[0] * n0, n0, ROLE_UNREACTED, e);
    const struct bal_formula *f1_text = NULL;
    for (int j = 0; !st && j < s->niso; j++) {
        struct formula f1;
        degree_formula(&s->substrate, ri, 1, &f1);
        if (s->iso[j].smiles && !formula_equal(&f1, &s->iso[j].formula)) {
            st = hl_err_set(e, HL_ERR_INTERNAL, "isomer %s has an unexpected formula", s->iso[j].smiles);
            break;
        }
        pf[o->nproducts] = f1;
        if (!f1_text)
            f1_text = product_formula(ent, 1, &f1, &scratch);
        st = push_product(o, cap, s->iso[j].smiles, f1_text, 1, x[1] * s->iso[j].fraction * n0, n0,
                          j == s->wanted ? ROLE_WANTED : ROLE_ISOMER, e);
    }
    for (int d = 2; !st && d <= nsteps; d++) {
        struct formula fd;
        degree_formula(&s->substrate, ri, d, &fd);
        pf[o->nproducts] = fd;
        st = push_product(o, cap, s->over_smiles[d], product_formula(ent, d, &fd, &scratch), d,
                          x[d] * n0, n0, ROLE_OVERHAL, e);
    }
    if (st)
        return st;
    for (int i = 0; i < o->nproducts; i++) {
        const struct bal_product *p = &o->products[i];
        if (p->role == ROLE_WANTED) o->wanted_kg += p->kg;
        else if (p->role == ROLE_ISOMER) o->isomer_kg += p->kg;
        else if (p->role == ROLE_OVERHAL) o->overhal_kg += p->kg;
        else o->unreacted_substrate_kg += p->kg;
    }
    return HL_OK;
}

/* By-products and vent. Acid gases (HCl, HBr, SO2) partly stay dissolved in the reaction
 * mass (vent_retained_fraction); unreacted Cl2/Br2 all leave. Takes the run, its reagent row
 * and the constants; gives formed[VS_COUNT] (mol of each vent species formed) and the
 * succinimide formed [mol]; sets o's by-product kg, reagent left, retained and vent moles. */
static double vent_gas(const struct bal_in *in, const struct reagent_info *ri,
                       const struct bal_consts *kk, double *formed, struct bal_out *o)
{
    double keep = in->vent_retained_fraction;
    for (int v = 0; v < VS_COUNT; v++)
        formed[v] = 0.0;
    if (ri->hx_species >= 0)
        formed[ri->hx_species] += ri->hx_mol * o->reagent_reacted_mol;
    formed[VS_SO2] += ri->so2_mol * o->reagent_reacted_mol;
    o->hx_kg[0] = formed[VS_HCL] * vent_molar_mass_g_mol(VS_HCL) / 1000.0;
    o->hx_kg[1] = formed[VS_HBR] * vent_molar_mass_g_mol(VS_HBR) / 1000.0;
    o->so2_kg = formed[VS_SO2] * vent_molar_mass_g_mol(VS_SO2) / 1000.0;
    double succ_mol = ri->succinimide_mol * o->reagent_reacted_mol;
    o->succinimide_kg = succ_mol * kk->succ_molar_mass_g_mol / 1000.0;
    double leaving[VS_COUNT];
    memcpy(leaving, formed, sizeof leaving);
    if (ri->unreacted_vent >= 0)
        leaving[ri->unreacted_vent] += o->reagent_unreacted_mol;
    else
        o->reagent_left_kg = o->reagent_unreacted_mol * ri->molar_mass_g_mol / 1000.0;
    for (int v = 0; v < VS_COUNT; v++) {
        o->retained_mol[v] = vent_get(v)->retained ? leaving[v] * keep : 0.0;
        o->vent_mol[v] = leaving[v] - o->retained_mol[v];
    }
    return succ_mol;
}

/* The run's warning when no earlier one was set: the prediction's, else a hot liquid
 * reagent's. Takes the run, its reagent row and prediction; writes o->warning. */
static void late_warning(const struct bal_in *in, const struct reagent_info *ri,
                         const struct sel_result *s, struct bal_out *o)
{
    if (!o->warning[0] && s->warning[0])
        snprintf(o->warning, sizeof o->warning, "%s", s->warning);
    /* A liquid reagent kept in the mass (SO2Cl2 boils at about 69 C, its row): above its
     * boiling point, unreacted reagent can leave with the vent gas and react in the scrubber. */
    if (ri->hot_vent_c > 0 && in->temp_c >= ri->hot_vent_c && o->reagent_left_kg > 0 &&
        !o->warning[0])
        snprintf(o->warning, sizeof o->warning,
                 "%.1f kg of unreacted %s at %.0f C, above its boiling point (about %.0f C): "
                 "it may leave with the vent gas (%s); the ledger keeps it in the reaction mass",
                 o->reagent_left_kg, ri->name, in->temp_c, ri->hot_vent_c, ri->hot_vent_note);
}

/* kin_solve_extent through the cache's memo (cache NULL: none). A hit needs the same key,
 * bit for bit, so it gives the very x the solve would: the ledger cannot change by it. */
static enum hl_status solve_extent(struct bal_cache *cache, enum kin_mode mode, const double *k,
                                   int nsteps, double mean, double *x, struct hl_err *e)
{
    if (!cache)
        return kin_solve_extent(mode, k, nsteps, mean, x, NULL, e);
    struct bal_extent_key key;
    memset(&key, 0, sizeof key); /* the padding too: the key is hashed and compared as bytes */
    key.mode = (int)mode;
    key.nsteps = nsteps;
    key.mean = mean;
    memcpy(key.k, k, (size_t)nsteps * sizeof *k);
    size_t nb = offsetof(struct bal_extent_key, k) + (size_t)nsteps * sizeof *k; /* the rest is 0 */
    uint64_t h = 1469598103934665603ull; /* FNV-1a */
    const unsigned char *b = (const unsigned char *)&key;
    for (size_t i = 0; i < nb; i++)
        h = (h ^ b[i]) * 1099511628211ull;
    struct bal_extent *m = &cache->extent[(h ^ (h >> 32)) % BAL_NEXTENT];
    size_t nx = (size_t)(nsteps + 1) * sizeof *x;
    if (!memcmp(&m->key, &key, nb)) {
        memcpy(x, m->x, nx);
        return HL_OK;
    }
    enum hl_status st = kin_solve_extent(mode, k, nsteps, mean, x, NULL, e);
    if (st)
        return st;
    m->key = key;
    memcpy(m->x, x, nx);
    return HL_OK;
}

/* One run's balance (bal_compute_cached without the clean-up): takes the run and the cache
 * (NULL: none); fills o, which owns what it points at unless the cache does (o->sel). On an
 * error o may be partly filled: the caller frees it. */
static enum hl_status compute(const struct bal_in *in, struct bal_cache *cache, struct bal_out *o,
                              struct hl_err *e)
{
    const struct reagent_info *ri = reagent_get(in->reagent);
    if (!ri || in->reagent >= RG_CHARGEABLE)
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, "reagent", "not a reactor reagent");
    enum hl_status st;
    struct bal_consts local_k;
    const struct bal_consts *kk;
    struct bal_entry *ent;
    if ((st = prepare(in, cache, &local_k, &kk, &ent, o, e)))
        return st;
    const struct sel_result *s = o->sel;
    double k[KIN_MAX_STEPS];
    int nsteps;
    if ((st = step_constants(in, s, k, &nsteps, e)))
        return st;
    charge_reagent(in, ri, nsteps, o);

    double x[KIN_MAX_STEPS + 1];
    double mean = o->mean_degree > nsteps ? nsteps : o->mean_degree;
    if ((st = solve_extent(cache, in->mode, k, nsteps, mean, x, e)))
        return st;

    int cap = 1 + s->niso + nsteps;
    struct formula *pf = hl_calloc((size_t)cap, sizeof *pf);
    o->products = hl_calloc((size_t)cap, sizeof *o->products);
    if (!pf || !o->products) {
        hl_free(pf);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    if ((st = push_products(in, ri, s, ent, x, nsteps, cap, pf, o, e))) {
        hl_free(pf);
        return st;
    }
    double formed[VS_COUNT];
    double succ_mol = vent_gas(in, ri, kk, formed, o);
    element_balance(kk, in->reagent, o, pf, formed, succ_mol);
    hl_free(pf);
    run_figures(ri, &kk->reagent[in->reagent], o);
    late_warning(in, ri, s, o);
    return HL_OK;
}

enum hl_status bal_compute_cached(const struct bal_in *in, struct bal_cache *cache,
                                  struct bal_out *o, struct hl_err *e)
{
    memset(o, 0, sizeof *o);
    enum hl_status st = compute(in, cache, o, e);
    if (st)
        bal_free(o);
    return st;
}

enum hl_status bal_compute(const struct bal_in *in, struct bal_out *o, struct hl_err *e)
{
    return bal_compute_cached(in, NULL, o, e);
}

enum hl_status bal_copy(struct bal_out *dst, const struct bal_out *src, struct hl_err *e)
{
    *dst = *src;
    dst->sel = NULL;
    dst->sel_owned = 0;
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
    if (o->sel_owned) {
        sel_free(o->sel);
        hl_free(o->sel);
    }
    memset(o, 0, sizeof *o);
}

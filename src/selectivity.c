/*
 * selectivity.c - first-step products and shares from a substrate SMILES
 * (see selectivity.h).
 *
 * Substitution (Cl2, Br2, SO2Cl2) and NBS: one candidate product per symmetry
 * class of attacked carbons, weight n_h * r(T).  An allylic radical (also one
 * that is benzylic at the same time, as in allylbenzene) is shared
 * equally between its termini (the carbon attacked and the far end of each
 * adjacent C=C, double bond shifted) - an equal split is the simplest
 * assumption and is marked as such (common practice); equal products from
 * different termini (propene, cyclohexene) merge back into one.
 * HBr: each non-aromatic C=C adds once, Br on the end with fewer heavy
 * neighbours (anti-Markovnikov), both ends equally on a tie; every C=C is
 * taken as equally reactive (common practice).
 */
#include "selectivity.h"
#include "elements.h"
#include "hlmem.h"
#include "reagents.h"
#include "sites.h"
#include "smiles.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_PARTNERS 8

static const char *const class_name[SITE_CLASS_COUNT] = {
    "primary", "secondary", "tertiary", "benzylic", "allylic", "vinylic/aryl"};

static const char MB_CL[] = "Morrison & Boyd, Organic Chemistry (Cl atom, per H, 25 C)";
static const char MB_BR[] = "Morrison & Boyd, Organic Chemistry (Br atom, per H, 127 C)";
static const char MEM_CL[] = "from memory (rough estimate for Cl atom) - verify for the substrate";
static const char MEM_BR[] = "from memory (rough estimate for Br atom) - verify for the substrate";
static const char HBR_SRC[] = "every non-aromatic C=C taken as equally reactive (common practice)";

_Static_assert(RG_SITE(SITE_PRIMARY) == 1u && RG_SITE(SITE_ALLYLIC) == 0x10u &&
                   RG_SITES_SP3 == ((1u << SITE_VINYL_ARYL) - 1) &&
                   RG_SITES_ALLYL_BENZYL == (RG_SITE(SITE_BENZYLIC) | RG_SITE(SITE_ALLYLIC)),
               "reagents.h site bits follow enum site_class");

/* Per-H reactivities of the atom that abstracts the H, one row per atom; a reagent names its
 * carrier in its row (reagents.c).  origin: the primary..tertiary values, origin_special:
 * benzylic and allylic. */
static const struct carrier_row {
    int el;
    double r[SITE_VINYL_ARYL], ref_temp_c;
    const char *origin, *origin_special;
} carriers[] = {
    /* Morrison & Boyd: Cl atom at 25 C, primary : secondary : tertiary = 1 : 3.8 : 5.0;
     * benzylic and allylic from memory */
    {EL_Cl,
     {[SITE_PRIMARY] = 1.0, [SITE_SECONDARY] = 3.8, [SITE_TERTIARY] = 5.0,
      [SITE_BENZYLIC] = 1.3, [SITE_ALLYLIC] = 1.3},
     25.0, MB_CL, MEM_CL},
    /* Morrison & Boyd: Br atom at 127 C, 1 : 82 : 1600; benzylic and allylic from memory,
     * order of magnitude only */
    {EL_Br,
     {[SITE_PRIMARY] = 1.0, [SITE_SECONDARY] = 82.0, [SITE_TERTIARY] = 1600.0,
      [SITE_BENZYLIC] = 3.0e4, [SITE_ALLYLIC] = 3.0e4},
     127.0, MB_BR, MEM_BR},
};

static const struct carrier_row *carrier_of(const struct reagent_info *ri)
{
    for (size_t i = 0; ri && i < sizeof carriers / sizeof carriers[0]; i++)
        if (carriers[i].el == ri->carrier_el)
            return &carriers[i];
    return NULL;
}

static int halogen_of(int reagent)
{
    return reagent_get(reagent)->halogen_el;
}

static int is_addition(int reagent)
{
    return reagent_get(reagent)->kind == RK_ADDITION;
}

/* Does the reagent substitute H on carbons of site class cls? */
static int attacks(int reagent, int cls)
{
    return cls >= 0 && cls < SITE_VINYL_ARYL && (reagent_get(reagent)->sites & RG_SITE(cls));
}

void sel_defaults(int reagent, struct sel_reactivity *r, const char **origin)
{
    memset(r, 0, sizeof *r);
    const struct reagent_info *ri = reagent_get(reagent);
    const struct carrier_row *cr = carrier_of(ri);
    const char *o = "";
    if (cr) {
        for (int c = 0; c < SITE_VINYL_ARYL; c++)
            r->r[c] = cr->r[c];
        r->ref_temp_c = cr->ref_temp_c;
        o = ri->sel_origin ? ri->sel_origin : cr->origin;
    } else if (ri && ri->kind == RK_ADDITION) {
        r->ref_temp_c = 25.0;
        o = HBR_SRC;
    }
    if (origin)
        *origin = o;
}

const char *sel_default_origin(int reagent, int c)
{
    const struct reagent_info *ri = reagent_get(reagent);
    const struct carrier_row *cr = carrier_of(ri);
    if (!cr || c < 0 || c >= SITE_VINYL_ARYL || !(ri->sites & RG_SITE(c)))
        return "";
    if (ri->sel_origin)
        return ri->sel_origin;
    return c == SITE_BENZYLIC || c == SITE_ALLYLIC ? cr->origin_special : cr->origin;
}

double sel_scale_to_temp(double r_ref, double ref_temp_c, double temp_c)
{
    return pow(r_ref, (ref_temp_c + 273.15) / (temp_c + 273.15));
}

/* ---- Cl + CH4, CH3Cl, CH2Cl2, CHCl3 ----------------------------------------------
 * Bryukov, Slagle & Knyazev, J. Phys. Chem. A 2002, 106, 10532: k = A T^n exp(-E/T),
 * A in cm3 molecule-1 s-1, E in K; the four expressions and their temperature ranges as
 * given in the paper's abstract.  Only the ratios k_n / k_0 enter the model
 * (per-molecule constants, design section 4); test_selectivity checks them at 298 K
 * against the NASA/JPL evaluation (Burkholder et al., JPL Publication 19-5, 2019). */
static const struct bsk_row {
    const char *what;
    double a_cm3_s, n, e_k, tmin_k, tmax_k;
} bsk[4] = {
    {"Cl + CH4", 1.30e-19, 2.69, 497.0, 295.0, 1104.0},
    {"Cl + CH3Cl", 4.00e-14, 0.92, 795.0, 300.0, 843.0},
    {"Cl + CH2Cl2", 1.48e-16, 1.58, 360.0, 296.0, 790.0},
    {"Cl + CHCl3", 1.19e-16, 1.51, 571.0, 297.0, 854.0},
};
static const char BSK_SRC[] = "Bryukov, Slagle & Knyazev, J. Phys. Chem. A 2002, 106, 10532 "
                              "(rate expressions of the abstract, k = A T^n exp(-E/T))";

static double bsk_k(int i, double t_k)
{
    return bsk[i].a_cm3_s * pow(t_k, bsk[i].n) * exp(-bsk[i].e_k / t_k);
}

/* ---- helpers ---------------------------------------------------------------------- */

struct cand {
    struct smi_mol mol;
    double w;
    int cls, n_h, source;
    int direct; /* plain substitution at the attacked carbon */
    double r;
};

static void warn(struct sel_result *o, const char *text)
{
    size_t n = strlen(o->warning);
    if (n && n + 2 < sizeof o->warning) {
        snprintf(o->warning + n, sizeof o->warning - n, "; ");
        n += 2;
    }
    if (n < sizeof o->warning)
        snprintf(o->warning + n, sizeof o->warning - n, "%s", text);
}

static enum hl_status add_used(struct sel_result *o, int *cap, const char *what, double v,
                               const char *unit, const char *origin, struct hl_err *e)
{
    if (o->nused == *cap) {
        int nc = *cap ? 2 * *cap : 16;
        struct sel_used *p = hl_realloc(o->used, (size_t)nc * sizeof *p);
        if (!p)
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
        o->used = p;
        *cap = nc;
    }
    struct sel_used *u = &o->used[o->nused++];
    snprintf(u->what, sizeof u->what, "%s", what);
    u->value = v;
    snprintf(u->unit, sizeof u->unit, "%s", unit);
    snprintf(u->origin, sizeof u->origin, "%s", origin);
    return HL_OK;
}

/* Add a candidate, merging it into an equal structure already listed. Takes p.
 * Two direct substitution products from different symmetry classes are never equal
 * (an isomorphism would map X to X and so restrict to a substrate automorphism
 * taking one attacked carbon to the other), so only other pairs are compared. */
static enum hl_status push_cand(struct cand **cv, int *nc, int *cap, struct smi_mol *p, double w,
                                int cls, int n_h, double r, int source, int direct,
                                struct hl_err *e)
{
    for (int i = 0; i < *nc; i++) {
        if (direct && (*cv)[i].direct)
            continue;
        int same = sites_same(&(*cv)[i].mol, p, e);
        if (same < 0) {
            smiles_free(p);
            return e->status ? e->status : HL_ERR_INTERNAL;
        }
        if (same) {
            (*cv)[i].w += w;
            if ((*cv)[i].source != source)
                (*cv)[i].n_h += n_h;
            smiles_free(p);
            return HL_OK;
        }
    }
    if (*nc == *cap) {
        int ncap = *cap ? 2 * *cap : 8;
        struct cand *q = hl_realloc(*cv, (size_t)ncap * sizeof *q);
        if (!q) {
            smiles_free(p);
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
        }
        *cv = q;
        *cap = ncap;
    }
    struct cand *c = &(*cv)[(*nc)++];
    c->mol = *p;
    c->w = w;
    c->cls = cls;
    c->n_h = n_h;
    c->r = r;
    c->source = source;
    c->direct = direct;
    memset(p, 0, sizeof *p);
    return HL_OK;
}

static enum hl_status input_err(struct hl_err *e, const char *field, int col, const char *msg,
                                const char *arg)
{
    return hl_err_at(e, HL_ERR_INPUT, 0, col, field, msg, arg);
}

/* ---- prediction ------------------------------------------------------------------- */

struct work {
    struct smi_mol m;
    int *sym, *seen;
    struct cand *cv; int nc, cap;
    int used_cap;
};

static enum hl_status reactivities(int reagent, double temp_c, const struct sel_reactivity *user,
                                   double *r_ref, double *t_ref, double *r_t, const char **orig,
                                   struct hl_err *e)
{
    struct sel_reactivity d;
    sel_defaults(reagent, &d, NULL);
    int user_t = user && (user->set_mask & (1u << SITE_CLASS_COUNT));
    if (user_t && !(isfinite(user->ref_temp_c) && user->ref_temp_c > -273.15))
        return input_err(e, "relative_reactivity.ref_temp_c", 0, "must be above absolute zero%s", "");
    for (int c = 0; c < SITE_CLASS_COUNT; c++) {
        r_ref[c] = d.r[c];
        t_ref[c] = d.ref_temp_c;
        orig[c] = sel_default_origin(reagent, c);
        if (user && (user->set_mask & (1u << c))) {
            if (!(isfinite(user->r[c]) && user->r[c] > 0))
                return input_err(e, "relative_reactivity", 0, "%s reactivity must be > 0",
                                 class_name[c]);
            r_ref[c] = user->r[c];
            orig[c] = "campaign model";
            if (user_t)
                t_ref[c] = user->ref_temp_c;
        }
        r_t[c] = r_ref[c] > 0 ? sel_scale_to_temp(r_ref[c], t_ref[c], temp_c) : 0.0;
    }
    return HL_OK;
}

static enum hl_status substitution(struct work *w, int reagent, const double *r_t,
                                   struct sel_result *o, struct hl_err *e)
{
    struct smi_mol *m = &w->m;
    int x = halogen_of(reagent);
    enum hl_status st = HL_OK;
    for (int a = 0; a < m->natoms && !st; a++) {
        int s = w->sym[a];
        if (w->seen[s])
            continue;
        w->seen[s] = 1;
        int cls = sites_class(m, a);
        if (!attacks(reagent, cls))
            continue;
        int size = 0;
        for (int b = 0; b < m->natoms; b++)
            size += w->sym[b] == s;
        int n_h = size * m->atoms[a].hcount;
        o->h0 += n_h;
        o->class_h[cls] += n_h;
        o->class_r[cls] = r_t[cls];
        double wt = n_h * r_t[cls];
        int pb[MAX_PARTNERS], pc[MAX_PARTNERS], np = 0;
        /* the radical is delocalised whenever a C=C is adjacent, also when the benzylic
         * class (which sets the reactivity) won the classification */
        if (cls == SITE_ALLYLIC || cls == SITE_BENZYLIC)
            np = sites_allyl_partners(m, a, pb, pc, MAX_PARTNERS);
        struct smi_mol p;
        if ((st = sites_substitute(m, a, 1, x, &p, e)) ||
            (st = push_cand(&w->cv, &w->nc, &w->cap, &p, wt / (1 + np), cls, n_h, r_t[cls], s, 1,
                            e)))
            break;
        for (int k = 0; k < np && !st; k++)
            if (!(st = sites_allyl_shift(m, a, pb[k], pc[k], x, &p, e)))
                st = push_cand(&w->cv, &w->nc, &w->cap, &p, wt / (1 + np), cls, n_h, r_t[cls], s,
                               0, e);
    }
    return st;
}

static enum hl_status hbr_addition(struct work *w, struct sel_result *o, struct hl_err *e)
{
    struct smi_mol *m = &w->m;
    enum hl_status st = HL_OK;
    for (int bd = 0; bd < m->nbonds && !st; bd++) {
        if (!sites_is_cc_double(m, bd))
            continue;
        o->h0++;
        o->class_h[0] += 1;
        o->class_r[0] = 1.0;
        int ends[2], ne = sites_hbr_br_ends(m, bd, ends);
        for (int k = 0; k < ne && !st; k++) {
            struct smi_mol p;
            if (!(st = sites_hbr_adduct(m, &bd, &ends[k], 1, &p, e)))
                st = push_cand(&w->cv, &w->nc, &w->cap, &p, 1.0 / ne, sites_class(m, ends[k]), 1,
                               1.0, bd, 0, e);
        }
    }
    return st;
}

/* over_smiles: all abstractable H on one carbon (substitution), or every C=C added (HBr). */
static enum hl_status over_structures(struct work *w, int reagent, struct sel_result *o,
                                      struct hl_err *e)
{
    struct smi_mol *m = &w->m, p;
    enum hl_status st = HL_OK;
    if (is_addition(reagent)) {
        if (o->h0 < 2 || o->h0 > KIN_MAX_STEPS)
            return HL_OK;
        int bonds[KIN_MAX_STEPS], at[KIN_MAX_STEPS], n = 0;
        for (int bd = 0; bd < m->nbonds; bd++) {
            if (!sites_is_cc_double(m, bd))
                continue;
            int ends[2];
            if (sites_hbr_br_ends(m, bd, ends) != 1)
                return HL_OK; /* a tie leaves the full adduct ambiguous */
            bonds[n] = bd;
            at[n++] = ends[0];
        }
        if (!(st = sites_hbr_adduct(m, bonds, at, n, &p, e))) {
            st = smiles_write(&p, &o->over_smiles[n], e);
            smiles_free(&p);
        }
        return st;
    }
    int only = -1;
    for (int a = 0; a < m->natoms; a++) {
        int cls = sites_class(m, a);
        if (!attacks(reagent, cls))
            continue;
        if (only >= 0)
            return HL_OK;
        only = a;
    }
    /* An allylic carbon's radical can shift the double bond: not unambiguous. */
    int pb, pc;
    if (only < 0 || sites_allyl_partners(m, only, &pb, &pc, 1))
        return HL_OK;
    for (int d = 2; d <= m->atoms[only].hcount && d <= KIN_MAX_STEPS && !st; d++) {
        if (!(st = sites_substitute(m, only, d, halogen_of(reagent), &p, e))) {
            st = smiles_write(&p, &o->over_smiles[d], e);
            smiles_free(&p);
        }
    }
    return st;
}

static int cmp_frac_desc(const void *a, const void *b)
{
    const struct sel_isomer *x = a, *y = b;
    if (x->fraction != y->fraction)
        return x->fraction < y->fraction ? 1 : -1;
    return strcmp(x->smiles, y->smiles);
}

/* Reactivities in use for one prediction: reference values, their temperatures and
 * origins, and the values at the run temperature (per site class). */
struct react {
    double r_ref[SITE_CLASS_COUNT], t_ref[SITE_CLASS_COUNT], r_t[SITE_CLASS_COUNT];
    const char *orig[SITE_CLASS_COUNT];
};

/* Check the arguments, read the substrate, fill its formula, the reactivities and the
 * symmetry classes (w->sym, w->seen allocated in w). */
static enum hl_status predict_setup(const char *smiles, int reagent, double temp_c,
                                    const struct sel_reactivity *user, struct work *w,
                                    struct react *rx, struct sel_result *o, struct hl_err *e)
{
    if (reagent < 0 || reagent >= RG_CHARGEABLE)
        return input_err(e, "reagent", 0, "not a reactor reagent%s", "");
    if (!isfinite(temp_c) || temp_c <= -273.15)
        return input_err(e, "temp_c", 0, "temperature must be above absolute zero%s", "");
    enum hl_status st = smiles_parse(smiles, &w->m, e);
    if (st) {
        if (st == HL_ERR_INPUT)
            snprintf(e->field, sizeof e->field, "smiles");
        return st;
    }
    struct smi_mol *m = &w->m;
    smiles_formula(m, &o->substrate);
    o->molar_mass_g_mol = formula_molar_mass_g_mol(&o->substrate);
    if ((st = reactivities(reagent, temp_c, user, rx->r_ref, rx->t_ref, rx->r_t, rx->orig, e)))
        return st;
    w->sym = hl_malloc((size_t)m->natoms * 2 * sizeof *w->sym);
    if (!w->sym)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    w->seen = w->sym + m->natoms;
    memset(w->seen, 0, (size_t)m->natoms * sizeof *w->seen);
    int ncls;
    return sites_symmetry(m, w->sym, &ncls, e);
}

/* The first-step candidates (addition or substitution); a substrate the reagent cannot
 * attack is a bad input that says why. */
static enum hl_status first_step(struct work *w, int reagent, const double *r_t,
                                 struct sel_result *o, struct hl_err *e)
{
    const struct reagent_info *ri = reagent_get(reagent);
    enum hl_status st = is_addition(reagent) ? hbr_addition(w, o, e)
                                             : substitution(w, reagent, r_t, o, e);
    if (st || w->nc)
        return st;
    if (is_addition(reagent))
        return input_err(e, "smiles", 0, "%s adds to a non-aromatic C=C and this substrate has none",
                         ri->name);
    if (ri->sites == RG_SITES_ALLYL_BENZYL) {
        char msg[160];
        snprintf(msg, sizeof msg, "%s %s allylic or benzylic C-H and this substrate has none%%s",
                 ri->name, ri->halogen_el == EL_Cl ? "chlorinates" : "brominates");
        return input_err(e, "smiles", 0, msg, "");
    }
    return input_err(e, "smiles", 0,
                     "%s has no sp3 C-H to abstract on this substrate (aryl and vinylic H are "
                     "not substituted by the radical chain)", ri->name);
}

/* The isomers with their shares (largest first) and the mean per-H reactivity. */
static enum hl_status shares(struct work *w, int reagent, const double *r_t, struct sel_result *o,
                             struct hl_err *e)
{
    struct smi_mol *m = &w->m;
    enum hl_status st;
    double sum_w = 0, sum_nr = 0;
    int sum_n = 0;
    for (int i = 0; i < w->nc; i++)
        sum_w += w->cv[i].w;
    o->iso = hl_calloc((size_t)w->nc, sizeof *o->iso);
    if (!o->iso)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    o->niso = w->nc;
    for (int i = 0; i < w->nc; i++) {
        struct sel_isomer *s = &o->iso[i];
        if ((st = smiles_write(&w->cv[i].mol, &s->smiles, e)))
            return st;
        smiles_formula(&w->cv[i].mol, &s->formula);
        s->fraction = w->cv[i].w / sum_w;
        s->site_class = w->cv[i].cls;
        s->n_h = w->cv[i].n_h;
        s->r_per_h = w->cv[i].r;
    }
    qsort(o->iso, (size_t)o->niso, sizeof *o->iso, cmp_frac_desc);
    /* mean per-H reactivity over the abstractable H (addition: per C=C, 1) */
    if (is_addition(reagent)) {
        o->mean_r = 1.0;
        return HL_OK;
    }
    for (int a = 0; a < m->natoms; a++) {
        int cls = sites_class(m, a);
        if (!attacks(reagent, cls))
            continue;
        sum_n += m->atoms[a].hcount;
        sum_nr += m->atoms[a].hcount * r_t[cls];
    }
    o->mean_r = sum_nr / sum_n;
    return HL_OK;
}

/* o->wanted: the isomer equal to product_smiles (a bad input when none is), else 0. */
static enum hl_status find_wanted(const char *product_smiles, struct sel_result *o,
                                  struct hl_err *e)
{
    o->wanted = 0;
    if (!product_smiles)
        return HL_OK;
    struct smi_mol pm;
    enum hl_status st = smiles_parse(product_smiles, &pm, e);
    if (st) {
        smiles_free(&pm);
        if (st == HL_ERR_INPUT)
            snprintf(e->field, sizeof e->field, "product_smiles");
        return st;
    }
    int found = -1;
    for (int i = 0; i < o->niso && found < 0; i++) {
        struct smi_mol im;
        if ((st = smiles_parse(o->iso[i].smiles, &im, e))) {
            smiles_free(&im);
            smiles_free(&pm);
            if (st == HL_ERR_INPUT)
                st = hl_err_set(e, HL_ERR_INTERNAL, "written SMILES %s does not read back",
                                o->iso[i].smiles);
            return st;
        }
        int same = sites_same(&im, &pm, e);
        smiles_free(&im);
        if (same < 0) {
            smiles_free(&pm);
            return e->status;
        }
        if (same)
            found = i;
    }
    smiles_free(&pm);
    if (found < 0) {
        char list[320] = "";
        for (int i = 0; i < o->niso; i++) {
            size_t n = strlen(list);
            snprintf(list + n, sizeof list - n, "%s%s", i ? ", " : "", o->iso[i].smiles);
        }
        return input_err(e, "product_smiles", 0,
                         "is not one of the predicted first-step products (%s)", list);
    }
    o->wanted = found;
    return HL_OK;
}

/* The reactivity values used, for the Assumptions sheet. */
static enum hl_status list_used(struct work *w, int reagent, double temp_c, const struct react *rx,
                                struct sel_result *o, struct hl_err *e)
{
    struct smi_mol *m = &w->m;
    const char *rname = reagent_get(reagent)->name;
    enum hl_status st;
    char what[96];
    if (is_addition(reagent)) {
        snprintf(what, sizeof what, "%s addition, relative reactivity per C=C", rname);
        return add_used(o, &w->used_cap, what, 1.0, "relative, per C=C", HBR_SRC, e);
    }
    int present[SITE_CLASS_COUNT] = {0};
    for (int i = 0; i < o->niso; i++)
        present[o->iso[i].site_class >= 0 ? o->iso[i].site_class : SITE_VINYL_ARYL] = 1;
    for (int c = 0; c < SITE_VINYL_ARYL; c++) {
        if (!present[c])
            continue;
        snprintf(what, sizeof what, "%s per-H reactivity, %s, at %.4g C", rname, class_name[c],
                 rx->t_ref[c]);
        if ((st = add_used(o, &w->used_cap, what, rx->r_ref[c], "relative, per H", rx->orig[c], e)))
            return st;
        snprintf(what, sizeof what, "%s per-H reactivity, %s, at %.4g C (run)", rname,
                 class_name[c], temp_c);
        if ((st = add_used(o, &w->used_cap, what, rx->r_t[c], "relative, per H",
                           "r(T) = r(Tref)^(Tref/T), equal pre-exponential factors (assumption)", e)))
            return st;
    }
    int shifted = 0;
    for (int a = 0; a < m->natoms; a++) {
        int cls = sites_class(m, a), pb, pc;
        shifted |= (cls == SITE_ALLYLIC || cls == SITE_BENZYLIC) &&
                   sites_allyl_partners(m, a, &pb, &pc, 1);
    }
    if (shifted)
        return add_used(o, &w->used_cap, "allylic radical: share of each terminus", 0.5, "fraction",
                        "equal split between the radical termini (common practice assumption)", e);
    return HL_OK;
}

/* Methane with a reagent whose row takes the published Cl + CH4 .. CHCl3 ratios: the
 * per-step rate ratios, listed as used, with a warning outside their temperature range. */
static enum hl_status methane_ratios(struct work *w, int reagent, double temp_c,
                                     const struct sel_reactivity *user, struct sel_result *o,
                                     struct hl_err *e)
{
    struct smi_mol *m = &w->m;
    if (!reagent_get(reagent)->methane_ratios || m->natoms != 1 || m->atoms[0].el != EL_C ||
        m->atoms[0].hcount != 4 || m->atoms[0].charge || (user && (user->set_mask & SEL_OWN_RATIOS)))
        return HL_OK;
    double t_k = temp_c + 273.15, k0 = bsk_k(0, t_k);
    int out = -1;
    char what[96];
    o->nratios = 4;
    for (int i = 0; i < 4; i++) {
        o->rate_ratios[i] = bsk_k(i, t_k) / k0;
        if (out < 0 && (t_k < bsk[i].tmin_k || t_k > bsk[i].tmax_k))
            out = i;
        snprintf(what, sizeof what, "%s rate constant / Cl + CH4 at %.4g C", bsk[i].what, temp_c);
        enum hl_status st = add_used(o, &w->used_cap, what, o->rate_ratios[i],
                                     "ratio of rate constants", BSK_SRC, e);
        if (st)
            return st;
    }
    if (out >= 0) {
        char msg[200];
        snprintf(msg, sizeof msg,
                 "%.4g C (%.2f K) is outside the %.0f-%.0f K range of the %s rate expression "
                 "(Bryukov et al. 2002); rate ratios extrapolated",
                 temp_c, t_k, bsk[out].tmin_k, bsk[out].tmax_k, bsk[out].what);
        warn(o, msg);
    }
    return HL_OK;
}

/* The whole prediction, step by step (each step's contract above it). */
static enum hl_status predict(const char *smiles, const char *product_smiles, int reagent,
                              double temp_c, const struct sel_reactivity *user, struct work *w,
                              struct sel_result *o, struct hl_err *e)
{
    struct react rx;
    enum hl_status st;
    if ((st = predict_setup(smiles, reagent, temp_c, user, w, &rx, o, e)) ||
        (st = first_step(w, reagent, rx.r_t, o, e)) || (st = shares(w, reagent, rx.r_t, o, e)) ||
        (st = find_wanted(product_smiles, o, e)) || (st = over_structures(w, reagent, o, e)) ||
        (st = list_used(w, reagent, temp_c, &rx, o, e)) ||
        (st = methane_ratios(w, reagent, temp_c, user, o, e)))
        return st;
    /* a substituting halogen also adds to a C=C, which the model leaves out */
    if (reagent_get(reagent)->kind == RK_SUBSTITUTION) {
        for (int bd = 0; bd < w->m.nbonds; bd++)
            if (sites_is_cc_double(&w->m, bd)) {
                warn(o, "substrate has a C=C: halogen addition to the double bond is not modelled");
                break;
            }
    }
    return HL_OK;
}

enum hl_status sel_predict(const char *smiles, const char *product_smiles, int reagent,
                           double temp_c, const struct sel_reactivity *user,
                           struct sel_result *out, struct hl_err *e)
{
    memset(out, 0, sizeof *out);
    struct work w;
    memset(&w, 0, sizeof w);
    enum hl_status st = predict(smiles, product_smiles, reagent, temp_c, user, &w, out, e);
    for (int i = 0; i < w.nc; i++)
        smiles_free(&w.cv[i].mol);
    hl_free(w.cv);
    hl_free(w.sym);
    smiles_free(&w.m);
    if (st)
        sel_free(out);
    return st;
}

void sel_free(struct sel_result *r)
{
    if (!r)
        return;
    for (int i = 0; i < r->niso; i++)
        hl_free(r->iso[i].smiles);
    hl_free(r->iso);
    for (int d = 0; d <= KIN_MAX_STEPS; d++)
        hl_free(r->over_smiles[d]);
    hl_free(r->used);
    memset(r, 0, sizeof *r);
}

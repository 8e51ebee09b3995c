/*
 * ledger.c - run every model over a validated campaign (see ledger.h).
 *
 * The order is fixed by the data flow: balance per run (independent), then
 * the scrubbers over the runs in start order (the liquor has a history), then
 * orders over the month-grouped demand (stock has a history).  Runs are
 * sorted once by start; everything after is a single pass or a sort, so the
 * cost is O(n log n) in runs (design section 7).
 */
#include "ledger.h"
#include "campaign.h"
#include "hlmem.h"
#include "isodate.h"
#include "liquor.h"

/* The campaign's liquor spellings index the liquor table (liquor.c). */
_Static_assert((int)CAMP_LIQUOR_NAOH == (int)LQ_NAOH && (int)CAMP_LIQUOR_WATER == (int)LQ_WATER,
               "enum camp_liquor follows enum liquor_id");

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

const char *ledger_role_name(enum bal_role r)
{
    switch (r) {
    case ROLE_WANTED: return "wanted";
    case ROLE_ISOMER: return "isomer";
    case ROLE_OVERHAL: return "overhalogenated";
    case ROLE_UNREACTED: return "unreacted";
    case ROLE_OTHER: return "other";
    }
    return "?";
}

void ledger_other_label(const struct ledger_product *p, char *buf, size_t n)
{
    snprintf(buf, n, "other over-halogenated (degree >= %d)", p->degree);
}

/* ---- growing lists of warnings and assumptions ---- */

static enum hl_status nomem(struct hl_err *e) { return hl_err_set(e, HL_ERR_NOMEM, "out of memory"); }

/* Lists grow by doubling (capacity 8, 16, 32 ...), so n appends cost O(n): the capacity
 * is implied by the count, and a new block is due when the count reaches it. */
static int grow_due(int n) { return n == 0 || (n >= 8 && (n & (n - 1)) == 0); }
static size_t grown(int n) { return n == 0 ? 8 : 2 * (size_t)n; }

/* ---- shared strings ----
 * The texts of runs and warnings live in blocks of one arena (no allocation and no malloc
 * header per string: at 10^5 runs these were some 30 allocations a run). A text met before
 * (a reactor, a substrate, a product structure, a run id named by several warnings) is
 * stored once, found through an open-addressing table of FNV-1a hashes. */
#define POOL_BLOCK 65536
struct pool_block { struct pool_block *next; size_t used, cap; char data[]; };
struct ledger_strings {
    struct pool_block *blocks;
    char **slots; size_t nslots, nused;      /* nslots a power of two, at most half full */
    int assume_hint[64];                     /* by hash of the text: 1 + an assumption's index */
};

static uint64_t pool_hash(const char *s, size_t len)
{
    uint64_t h = 1469598103934665603u;
    for (size_t i = 0; i < len; i++)
        h = (h ^ (unsigned char)s[i]) * 1099511628211u;
    return h;
}

/* n bytes of the arena, aligned for any member of a table when align is 1; NULL when out
 * of memory. (data[] starts 8-aligned: three 8-byte members before it.) */
static void *pool_alloc(struct ledger_strings *p, size_t n, int align)
{
    struct pool_block *b = p->blocks;
    size_t at = b ? (align ? (b->used + 7u) & ~(size_t)7u : b->used) : 0;
    if (!b || at > b->cap || b->cap - at < n) {
        size_t cap = n > POOL_BLOCK ? n : POOL_BLOCK;
        if (!(b = hl_malloc(sizeof *b + cap)))
            return NULL;
        b->next = p->blocks;
        b->used = 0;
        b->cap = cap;
        p->blocks = b;
        at = 0;
    }
    b->used = at + n;
    return b->data + at;
}

/* A copy of s (len bytes) in the arena; NULL when out of memory. */
static char *pool_store(struct ledger_strings *p, const char *s, size_t len)
{
    char *q = pool_alloc(p, len + 1, 0);
    if (q) {
        memcpy(q, s, len);
        q[len] = '\0';
    }
    return q;
}

static int pool_grow(struct ledger_strings *p)
{
    size_t n = p->nslots ? 2 * p->nslots : 1024;
    char **v = hl_calloc(n, sizeof *v);
    if (!v)
        return -1;
    for (size_t i = 0; i < p->nslots; i++) {
        if (!p->slots[i])
            continue;
        size_t k = pool_hash(p->slots[i], strlen(p->slots[i])) & (n - 1);
        while (v[k])
            k = (k + 1) & (n - 1);
        v[k] = p->slots[i];
    }
    hl_free(p->slots);
    p->slots = v;
    p->nslots = n;
    return 0;
}

/* The ledger's copy of s into *out: NULL for NULL (not a failure); shared 1 stores a text
 * met before once (texts that repeat), 0 always stores (texts that do not). */
static enum hl_status pool_dup(struct ledger *l, const char *s, int shared, char **out,
                               struct hl_err *e)
{
    *out = NULL;
    if (!s)
        return HL_OK;
    if (!l->strings && !(l->strings = hl_calloc(1, sizeof *l->strings)))
        return nomem(e);
    struct ledger_strings *p = l->strings;
    size_t len = strlen(s);
    if (!shared)
        return (*out = pool_store(p, s, len)) ? HL_OK : nomem(e);
    if (2 * (p->nused + 1) > p->nslots && pool_grow(p))
        return nomem(e);
    size_t k = pool_hash(s, len) & (p->nslots - 1);
    for (; p->slots[k]; k = (k + 1) & (p->nslots - 1))
        if (!strcmp(p->slots[k], s))
            return *out = p->slots[k], HL_OK;
    if (!(*out = pool_store(p, s, len)))
        return nomem(e);
    p->slots[k] = *out;
    p->nused++;
    return HL_OK;
}

static void pool_free(struct ledger_strings *p)
{
    if (!p)
        return;
    while (p->blocks) {
        struct pool_block *b = p->blocks;
        p->blocks = b->next;
        hl_free(b);
    }
    hl_free(p->slots);
    hl_free(p);
}

static enum hl_status warn(struct ledger *l, struct hl_err *e, const char *run, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

static enum hl_status warn(struct ledger *l, struct hl_err *e, const char *run, const char *fmt, ...)
{
    char buf[600];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(buf, sizeof buf, fmt, ap);
    va_end(ap);
    struct ledger_warning *w = l->warnings;
    if (grow_due(l->nwarnings)) {
        w = hl_realloc(l->warnings, grown(l->nwarnings) * sizeof *w);
        if (!w)
            return nomem(e);
        l->warnings = w;
    }
    w += l->nwarnings;
    enum hl_status st;
    if ((st = pool_dup(l, run, 1, &w->run, e)) || (st = pool_dup(l, buf, 0, &w->message, e)))
        return st;
    l->nwarnings++;
    return HL_OK;
}

/* "A, B, C" from run indices into buf (", ..." when it would not fit). */
static void join_run_ids(const struct ledger *l, const int *idx, int n, char *buf, size_t cap)
{
    size_t len = 0;
    buf[0] = '\0';
    for (int k = 0; k < n; k++) {
        const char *id = l->runs[idx[k]].id;
        if (len + strlen(id) + 6 >= cap) {
            snprintf(buf + len, cap - len, "%s...", k ? ", " : "");
            break;
        }
        len += (size_t)snprintf(buf + len, cap - len, "%s%s", k ? ", " : "", id);
    }
}

/* A liquor reaching its boiling point (issue: an alarm of its own, apart from cooling):
 * the runs whose adiabatic liquor temperature reaches the boiling point of the liquor at
 * 1 atm, the basis named (the liquor's row), the worst margin quoted. */
static enum hl_status warn_boiling(struct ledger *l, struct hl_err *e, int u, int liquor)
{
    const struct ledger_scrubber *s = &l->scrubbers[u];
    char runs[240];
    size_t len = 0;
    int n = 0;
    double worst_t = 0, worst_bp = 0, worst = -HUGE_VAL;
    runs[0] = '\0';
    for (int i = 0; i < l->nruns; i++) {
        const struct scrub_run_out *ro = &l->runs[i].scrub;
        if (l->runs[i].scrubber_index != u || !ro->boils)
            continue;
        if (ro->liquor_temp_c_after - ro->boiling_point_c > worst) {
            worst = ro->liquor_temp_c_after - ro->boiling_point_c;
            worst_t = ro->liquor_temp_c_after;
            worst_bp = ro->boiling_point_c;
        }
        const char *id = l->runs[i].id;
        if (len + strlen(id) + 6 < sizeof runs)
            len += (size_t)snprintf(runs + len, sizeof runs - len, "%s%s", n ? ", " : "", id);
        else if (len + 6 < sizeof runs)
            len += (size_t)snprintf(runs + len, sizeof runs - len, ", ...");
        n++;
    }
    if (!n)
        return HL_OK;
    return warn(l, e, NULL,
                "scrubber %s liquor would boil in %d run%s (%s): its adiabatic temperature "
                "reaches %.0f C against a boiling point of %.0f C at 1 atm (%s); acid gas and "
                "steam would leave the scrubber",
                s->id, n, n == 1 ? "" : "s", runs, worst_t, worst_bp,
                liquor_get(liquor)->bp_basis);
}

/* Whether assumption a is the one given (same text, and the same value where it has one). */
static int assume_same(const struct ledger_assumption *a, const char *what, int has_value,
                       double value)
{
    return !strcmp(a->what, what) && (!has_value || a->value == value);
}

/* Add an assumption unless one with the same text (and value) is listed. The list stays
 * short, a few dozen entries, but every run asks again for each of its model's. */
static enum hl_status assume(struct ledger *l, struct hl_err *e, const char *what, int has_value,
                             double value, const char *unit, const char *origin)
{
    /* Every run repeats its model's assumptions, so first try the one this text last
     * matched (or added); only a miss scans the list, which gives the same answer. */
    if (!l->strings && !(l->strings = hl_calloc(1, sizeof *l->strings)))
        return nomem(e);
    int *hint = &l->strings->assume_hint[pool_hash(what, strlen(what)) % 64];
    if (*hint > 0 && *hint <= l->nassumptions &&
        assume_same(&l->assumptions[*hint - 1], what, has_value, value))
        return HL_OK;
    for (int i = 0; i < l->nassumptions; i++)
        if (assume_same(&l->assumptions[i], what, has_value, value)) {
            *hint = i + 1;
            return HL_OK;
        }
    struct ledger_assumption *a = l->assumptions;
    if (grow_due(l->nassumptions)) {
        a = hl_realloc(l->assumptions, grown(l->nassumptions) * sizeof *a);
        if (!a)
            return nomem(e);
        l->assumptions = a;
    }
    a += l->nassumptions;
    a->what = hl_strdup(what);
    a->unit = hl_strdup(unit ? unit : "");
    a->origin = hl_strdup(origin);
    a->has_value = has_value;
    a->value = has_value ? value : 0.0;
    if (!a->what || !a->unit || !a->origin) {
        hl_free(a->what);
        hl_free(a->unit);
        hl_free(a->origin);
        return nomem(e);
    }
    *hint = ++l->nassumptions;
    return HL_OK;
}

/* ---- per-run balance ---- */

static void model_to_input(const struct camp_model *m, struct bal_in *in)
{
    static const struct { unsigned bit; int cls; } map[] = {
        {CM_PRIMARY, SITE_PRIMARY}, {CM_SECONDARY, SITE_SECONDARY}, {CM_TERTIARY, SITE_TERTIARY},
        {CM_BENZYLIC, SITE_BENZYLIC}, {CM_ALLYLIC, SITE_ALLYLIC}};
    const double val[] = {m->primary, m->secondary, m->tertiary, m->benzylic, m->allylic};
    memset(&in->user, 0, sizeof in->user);
    for (size_t i = 0; i < sizeof map / sizeof map[0]; i++)
        if (m->set_mask & map[i].bit) {
            in->user.r[map[i].cls] = val[i];
            in->user.set_mask |= 1u << map[i].cls;
        }
    if (m->set_mask & CM_REF_TEMP) {
        in->user.ref_temp_c = m->ref_temp_c;
        in->user.set_mask |= 1u << SITE_CLASS_COUNT;
    }
    in->has_phi = (m->set_mask & CM_OVERHAL) != 0;
    in->phi = m->overhalogenation_factor;
    in->ratios = (m->set_mask & CM_RATIOS) ? m->rate_ratios : NULL;
    in->nratios = (m->set_mask & CM_RATIOS) ? m->nratios : 0;
}

/* A model error names a field inside the run; point it at the campaign file. */
static enum hl_status blame_run(const struct campaign *c, const struct camp_run *r, struct hl_err *e)
{
    static const struct { const char *field, *path; } names[] = {
        {"smiles", "substrate.smiles"}, {"product_smiles", "product_smiles"},
        {"formula", "substrate.formula"}, {"reagent", "reagent"}, {"model", "model"}};
    struct camp_pos pos = r->pos;
    const struct camp_strpos *sp = NULL;
    const char *path = NULL;
    for (size_t i = 0; i < sizeof names / sizeof names[0]; i++)
        if (!strcmp(e->field, names[i].field))
            path = names[i].path;
    if (path && !strcmp(e->field, "smiles")) sp = &r->sp_smiles;
    else if (path && !strcmp(e->field, "product_smiles")) sp = &r->sp_product_smiles;
    else if (path && !strcmp(e->field, "formula")) sp = &r->sp_formula;
    else if (path && !strcmp(e->field, "reagent")) pos = r->pos_reagent;
    if (sp)
        pos = sp->pos;
    /* pos.col is the opening quote; escapes before character k take their raw bytes. */
    int col = (sp && e->col > 0) ? camp_string_col(sp, e->col) : pos.col;
    if (r->sched_file && sp && e->col <= 0) /* a schedule cell: its first byte, not a quote before it */
        col = camp_string_col(sp, 1);
    /* a run without a model block of its own ran on the campaign's: blame that one */
    int camp_model = path && !strcmp(e->field, "model") && !r->own_model && c->has_model;
    if (camp_model) {
        pos = c->pos_model;
        col = pos.col;
    }
    char field[64], msg[sizeof e->msg];
    if (camp_model)
        snprintf(field, sizeof field, "model");
    else
        camp_run_field(r, path ? path : "", field, sizeof field);
    /* the run id tells which repeat of an entry failed; keep the model's text whole */
    snprintf(msg, sizeof msg, "%.400s (run %.60s)", e->msg, r->id);
    hl_err_at(e, HL_ERR_INPUT, pos.line, col, field, "%s", msg);
    if (r->sched_file && !camp_model)
        snprintf(e->file, sizeof e->file, "%s", r->sched_file);
    return HL_ERR_INPUT;
}

/* Every value a run's balance used: the selectivity values, then the degree-model
 * parameters (campaign model or the default). */
static enum hl_status run_assumptions(struct ledger *l, const struct bal_in *in,
                                      const struct bal_out *b, struct hl_err *e)
{
    enum hl_status st = HL_OK;
    const char *rg = reagent_get(in->reagent)->name;
    char what[160];
    for (int j = 0; b->sel && j < b->sel->nused && !st; j++)
        st = assume(l, e, b->sel->used[j].what, 1, b->sel->used[j].value, b->sel->used[j].unit,
                    b->sel->used[j].origin);
    if (st)
        return st;
    if (in->nratios > 0) {
        for (int i = 0; i < in->nratios && !st; i++) {
            snprintf(what, sizeof what, "%s rate_ratios[%d]: step %d -> %d relative to step 0", rg,
                     i, i, i + 1);
            st = assume(l, e, what, 1, in->ratios[i], "ratio of rate constants", "campaign model");
        }
        return st;
    }
    snprintf(what, sizeof what, "%s overhalogenation_factor", rg);
    return assume(l, e, what, 1, in->has_phi ? in->phi : 1.0, "per added halogen",
                  in->has_phi ? "campaign model"
                              : "default: a halogen already placed neither speeds nor slows the "
                                "next abstraction (set model.overhalogenation_factor)");
}

/* Values that move safety figures should not pass unnoticed when left to a default:
 * once per campaign entry, and only where they matter for this run. */
static enum hl_status warn_defaults(struct ledger *l, const struct camp_run *r,
                                    const struct bal_out *b, struct hl_err *e)
{
    double gas = 0;
    for (int v = 0; v < VS_COUNT; v++)
        gas += b->vent_mol[v];
    enum hl_status st = HL_OK;
    if ((r->defaulted & CAMP_DEFAULT_FEED_H) && gas > 0)
        st = warn(l, e, r->id, "feed_h not given: %.3g h assumed; the vent rate and the scrubber "
                  "peak depend on it", r->feed_h);
    if (!st && (r->defaulted & CAMP_DEFAULT_TEMP) && r->smiles)
        st = warn(l, e, r->id, "temp_c not given: %.3g C assumed; the isomer shares depend on it",
                  r->temp_c);
    return st;
}

/* ---- reaction heat and gas withdrawal (thermal.h) ---- */

/* Share of the first-step C-X bonds at each bond-table site, from the selectivity
 * result (bal.sel, still set): a one-carbon substrate is a methyl site; no isomers
 * (formula input) leaves every share 0 and thermal.c takes its default site. */
static void therm_shares(const struct sel_result *sel, double *share)
{
    static const int map[SITE_CLASS_COUNT] = {THERM_PRIMARY, THERM_SECONDARY, THERM_TERTIARY,
                                              THERM_BENZYLIC, THERM_ALLYLIC, -1};
    if (!sel)
        return;
    int one_carbon = sel->substrate.n[EL_C] == 1;
    for (int j = 0; j < sel->niso; j++) {
        int c = sel->iso[j].site_class;
        int t = c >= 0 && c < SITE_CLASS_COUNT ? map[c] : -1;
        if (t >= 0)
            share[one_carbon ? THERM_METHYL : t] += sel->iso[j].fraction;
    }
}

/* First container of the run's reagent with a gas withdrawal rate; NULL for a reagent not
 * drawn as gas (liquids, solids) or without a rate. */
static const struct camp_container *gas_container(const struct campaign *c, int reagent)
{
    const struct reagent_info *ri = reagent_get(reagent);
    if (!ri || strncmp(ri->phase, "gas", 3))
        return NULL;
    for (int i = 0; i < c->ncontainers; i++)
        if (c->containers[i].reagent == reagent && c->containers[i].gas_withdrawal_kg_h > 0)
            return &c->containers[i];
    return NULL;
}

/* Heat, MTSR and class of one run (twin >= 0: a repeat, the same batch: copied), its gas
 * withdrawal, the warnings they raise and the values they used. sel: the run's selectivity
 * prediction (the cache's), NULL when the balance carries none. */
static enum hl_status run_thermal(const struct campaign *c, const struct camp_run *r,
                                  struct ledger *l, struct ledger_run *lr,
                                  const struct sel_result *sel, int twin, struct hl_err *e)
{
    enum hl_status st = HL_OK;
    lr->therm_mass_kg = r->substrate_kg + lr->bal.reagent_kg + r->solvent_kg;
    lr->therm_cp_kj_kg_k = r->mass_cp_kj_kg_k;
    lr->therm_accumulation = r->accumulation;
    lr->has_mtt = r->has_mtt;
    lr->mtt_c = r->mtt_c;
    lr->has_td24 = r->has_td24;
    lr->td24_c = r->td24_c;
    if (twin >= 0) {
        lr->therm = l->runs[twin].therm;
    } else {
        struct therm_in ti = {.reagent = r->reagent, .bonds_mol = lr->bal.halogen_reacted_mol,
                              .mass_kg = lr->therm_mass_kg, .cp_kj_kg_k = lr->therm_cp_kj_kg_k,
                              .accumulation = r->accumulation, .temp_c = r->temp_c,
                              .feed_h = r->feed_h, .peak_factor = r->peak_factor,
                              .has_mtt = r->has_mtt, .mtt_c = r->mtt_c,
                              .has_td24 = r->has_td24, .td24_c = r->td24_c};
        therm_shares(sel, ti.share);
        therm_compute(&ti, &lr->therm);
        const char *rg = reagent_get(r->reagent)->name;
        char what[160];
        for (int s = 0; s < THERM_NSITE && !st; s++) {
            if (!(lr->therm.share[s] > 0))
                continue;
            if (reagent_get(r->reagent)->kind == RK_ADDITION)
                snprintf(what, sizeof what, "Heat of radical %s addition to a C=C (as propene)", rg);
            else
                snprintf(what, sizeof what, "Heat of one %s substitution step, %s C-H", rg,
                         therm_site_name(s));
            st = assume(l, e, what, 1, lr->therm.step_dh_kj_mol[s], "kJ/mol (negative: released)",
                        therm_bde_origin);
        }
        if (!st && lr->therm.site_assumed)
            st = assume(l, e, "Site of a substrate given by formula only", 0, 0, NULL,
                        "reaction heat taken at a secondary C-H (NBS: benzylic); give a SMILES "
                        "for the site classes (common practice assumption)");
        if (!st && (r->defaulted & CAMP_DEFAULT_CP))
            st = assume(l, e, "Heat capacity of the reaction mass (mass_cp_kj_kg_k)", 1,
                        r->mass_cp_kj_kg_k, "kJ/(kg K)", camp_origin_mass_cp);
        if (!st && r->accumulation == 1)
            st = assume(l, e, "Accumulation of unreacted halogen (accumulation)", 1, 1, "fraction",
                        "default: the whole charge present unreacted (batch, worst case)");
    }
    const struct therm_out *t = &lr->therm;
    /* warned once per campaign entry: its repeats are the same batch (the JSON flags each run) */
    const char *rep = r->repeat_no > 0 ? " (the same for every repeat of this entry)" : "";
    if (!st && twin < 0 && t->mtsr_over_td24)
        st = warn(l, e, lr->id, "MTSR %.1f C reaches TD24 %.1f C (decomposition onset): criticality "
                  "class %d; a process-safety study with calorimetry by qualified people must "
                  "decide before this runs (screening estimate)%s", t->mtsr_c, r->td24_c, t->crit_class,
                  rep);
    else if (!st && twin < 0 && t->mtsr_over_mtt)
        st = warn(l, e, lr->id, "MTSR %.1f C reaches MTT %.1f C (equipment limit): criticality "
                  "class %d; a process-safety study with calorimetry by qualified people must "
                  "decide before this runs (screening estimate)%s", t->mtsr_c, r->mtt_c, t->crit_class,
                  rep);
    const struct camp_container *ct = gas_container(c, r->reagent);
    if (st || !ct)
        return st;
    lr->has_withdrawal = 1;
    if ((st = pool_dup(l, ct->name, 1, &lr->withdrawal_container, e)))
        return st;
    therm_withdrawal(lr->bal.reagent_kg, r->feed_h, r->peak_factor, ct->gas_withdrawal_kg_h,
                     &lr->withdrawal);
    char what[200];
    snprintf(what, sizeof what, "Gas withdrawal of one %s %s without icing, at about 20 C",
             reagent_get(r->reagent)->name, ct->name);
    st = assume(l, e, what, 1, ct->gas_withdrawal_kg_h, "kg/h",
                ct->from_catalog ? "built-in catalog: supplier and trade-association guidance, from "
                                   "memory; ask the supplier" : "campaign containers[]");
    if (!st && lr->withdrawal.evaporator_needed)
        st = assume(l, e, "Most containers on one gas manifold", 1, THERM_MAX_ON_MANIFOLD,
                    "containers", therm_manifold_origin);
    if (!st && lr->withdrawal.evaporator_needed && twin < 0)
        st = warn(l, e, lr->id, "%s feed of %.1f kg/h at its peak needs %d %ss on line (%.3g kg/h "
                  "each as gas); above %d on one manifold, draw liquid through an evaporator "
                  "(follow the supplier's and the Chlorine Institute's guidance and local codes)%s",
                  reagent_get(r->reagent)->name, lr->withdrawal.kg_h,
                  lr->withdrawal.containers_on_line, ct->name, ct->gas_withdrawal_kg_h,
                  THERM_MAX_ON_MANIFOLD, rep);
    return st;
}

/* Sum the over-halogenated products below min_frac into one ROLE_OTHER row at the end.
 * Why only over-halogenated ones: a run has a handful of monohalides and one unreacted
 * substrate, but a long tail of traces of high degree (down to 1e-14 mol/mol), which
 * is what nobody reads. The sums keep the mass and element balances closed. */
static enum hl_status lump_products(struct ledger_run *lr, struct bal_out *b, double min_frac,
                                    struct hl_err *e)
{
    struct bal_product other = {.smiles = NULL, .degree = 0, .role = ROLE_OTHER};
    double degree_mol = 0;
    int kept = 0, lumped = 0;
    for (int p = 0; p < b->nproducts; p++) {
        struct bal_product *bp = &b->products[p];
        if (bp->role != ROLE_OVERHAL || !(bp->mol_fraction < min_frac)) {
            b->products[kept++] = *bp;
            continue;
        }
        if (lumped++ == 0 || bp->degree < other.degree)
            other.degree = bp->degree;
        other.mol += bp->mol;
        other.kg += bp->kg;
        other.mol_fraction += bp->mol_fraction;
        degree_mol += bp->degree * bp->mol;
        hl_free(bp->smiles);
    }
    if (lumped == 0)
        return HL_OK;
    /* a mean over zero moles (every trace underflowed) falls back to the lowest degree */
    other.molar_mass_g_mol = other.mol > 0 ? other.kg * 1000.0 / other.mol : 0.0;
    lr->other_mean_degree = other.mol > 0 ? degree_mol / other.mol : other.degree;
    lr->other_rows = lumped;
    b->products[kept++] = other; /* kept < nproducts: at least one row was removed */
    b->nproducts = kept;
    /* the table was sized for every degree; a ledger keeps only the rows it lists */
    struct bal_product *fit = hl_realloc(b->products, (size_t)kept * sizeof *fit);
    if (!fit)
        return nomem(e); /* the larger block stays with the run and is freed with it */
    b->products = fit;
    return HL_OK;
}

/* ---- actuals ---- */

/* NaOH the vent gas of a balance takes in a caustic liquor, as 100 % [kg]: the liquor
 * reactions' stoichiometry (design section 4), without the liquor's history. */
static double vent_naoh_kg(const struct bal_out *b)
{
    double mol = 0;
    for (int v = 0; v < VS_COUNT; v++)
        mol += b->vent_mol[v] * scrub_naoh_per_mol(v);
    return mol * reagent_get(RG_NAOH)->molar_mass_g_mol / 1000.0;
}

/* A cancelled run charged, drew and vented nothing: its products keep their rows (structures,
 * roles) at zero, so the writers show what was planned to be made and that none was. */
static void cancel_balance(struct bal_out *b)
{
    for (int p = 0; p < b->nproducts; p++)
        b->products[p].mol = b->products[p].kg = b->products[p].mol_fraction = 0;
    b->substrate_mol = b->reagent_mol = b->reagent_kg = 0;
    b->reagent_reacted_mol = b->reagent_unreacted_mol = b->halogen_reacted_mol = 0;
    b->capped = 0;
    b->mean_degree = 0;
    b->hx_kg[0] = b->hx_kg[1] = b->so2_kg = b->succinimide_kg = 0;
    for (int v = 0; v < VS_COUNT; v++)
        b->vent_mol[v] = b->retained_mol[v] = 0;
    b->reagent_left_kg = b->wanted_kg = b->isomer_kg = b->overhal_kg = b->unreacted_substrate_kg = 0;
    b->wanted_mol = b->converted_mol = b->halogen_charged_mol = b->halogen_in_wanted_mol = 0;
    b->yield_pct = b->conversion_pct = b->selectivity_pct = b->halogen_efficiency_pct = 0;
    b->selectivity_defined = 0;
    for (int k = 0; k < BAL_NEL; k++)
        b->el_in_mol[k] = b->el_out_mol[k] = 0;
    b->max_rel_error = 0;
    b->warning[0] = '\0';
}

/* The plan side of a run's variance, from its planned balance; NaOH only on a caustic unit. */
static void variance_plan(const struct campaign *c, const struct camp_run *r, struct ledger_run *lr,
                          const struct bal_out *b)
{
    struct ledger_variance *v = lr->var;
    v->reagent_kg_plan = b->reagent_kg;
    v->product_kg_plan = b->wanted_kg;
    v->yield_pct_plan = b->yield_pct;
    int caustic = r->scrubber >= 0 && liquor_get(c->scrubbers[r->scrubber].liquor)->base == RG_NAOH;
    v->naoh_kg_plan = caustic ? vent_naoh_kg(b) : 0.0;
}

/* actual - plan of a done run, each where the actual gives it; flagged outside tolerance. */
static void variance_actual(const struct campaign *c, struct ledger_run *lr, const struct bal_out *b)
{
    struct ledger_variance *v = lr->var;
    const struct ledger_actual *a = &lr->actual;
    const struct camp_tolerances *t = &c->tolerances;
    if (a->given & LEDGER_ACT_REAGENT) {
        v->has_reagent = 1;
        v->reagent_kg = a->reagent_kg - v->reagent_kg_plan;
        v->reagent_pct = 100.0 * v->reagent_kg / v->reagent_kg_plan; /* plan >= 1 g (reader) */
        if (fabs(v->reagent_pct) > t->reagent_pct)
            v->flagged = 1;
    }
    if (a->given & LEDGER_ACT_PRODUCT) {
        v->has_product = 1;
        v->product_kg = a->product_kg - v->product_kg_plan;
        v->product_pct = v->product_kg_plan > 0 ? 100.0 * v->product_kg / v->product_kg_plan : 0.0;
        const struct bal_product *w = NULL;
        for (int p = 0; p < b->nproducts && !w; p++)
            if (b->products[p].role == ROLE_WANTED)
                w = &b->products[p];
        /* substrate charged as planned: no actual substrate figure is taken */
        double sub_mol = lr->substrate_kg * 1000.0 / b->substrate_molar_mass_g_mol;
        v->yield_pct_actual = w && w->molar_mass_g_mol > 0
                                  ? 100.0 * (a->product_kg * 1000.0 / w->molar_mass_g_mol) / sub_mol
                                  : 0.0;
        if (v->product_kg_plan > 0 ? fabs(v->product_pct) > t->product_pct : a->product_kg > 0)
            v->flagged = 1;
    }
    if (a->given & LEDGER_ACT_NAOH) {
        v->has_naoh = 1;
        v->naoh_kg = a->naoh_kg - v->naoh_kg_plan;
        v->naoh_pct_defined = v->naoh_kg_plan > 0;
        v->naoh_pct = v->naoh_pct_defined ? 100.0 * v->naoh_kg / v->naoh_kg_plan : 0.0;
    }
}

/* Actual of run r into lr: a done run's actual draw replaces the planned balance (the
 * halogen drawn is what reached the reactor and then the vent); a cancelled run's balance
 * is zeroed after the plan side of its figures is kept. */
static enum hl_status apply_actual(const struct campaign *c, const struct ledger_opts *o,
                                   struct ledger *l, const struct camp_run *r, struct bal_in *in,
                                   struct ledger_run *lr, struct bal_out *b, double min_frac,
                                   struct bal_cache *cache, struct hl_err *e)
{
    const struct camp_actual *a = &r->actual;
    lr->actual = (struct ledger_actual){
        .status = a->status == CAMP_DONE ? LEDGER_DONE
                  : a->status == CAMP_CANCELLED ? LEDGER_CANCELLED : LEDGER_PLANNED,
        .given = ((a->given & CAMP_ACT_REAGENT_KG) ? LEDGER_ACT_REAGENT : 0u) |
                 ((a->given & CAMP_ACT_PRODUCT_KG) ? LEDGER_ACT_PRODUCT : 0u) |
                 ((a->given & CAMP_ACT_NAOH_KG) ? LEDGER_ACT_NAOH : 0u) |
                 ((a->given & CAMP_ACT_END) ? LEDGER_ACT_END : 0u),
        .reagent_kg = a->reagent_kg, .product_kg = a->product_kg, .naoh_kg = a->naoh_kg,
        .end_min = a->end_min};
    if (a->status == CAMP_PLANNED)
        return HL_OK;
    if (a->status == CAMP_DONE && o && o->today_min >= 0 && r->start_min >= o->today_min + 1440) {
        char when[24], today[24], field[64], idq[64];
        isodate_format(r->start_min, 0, when, sizeof when);
        isodate_format(o->today_min, 1, today, sizeof today);
        snprintf(field, sizeof field, "runs[%d].actual.status", r->src_index);
        snprintf(idq, sizeof idq, "%.60s", r->id);
        return hl_err_at(e, HL_ERR_INPUT, a->pos_status.line, a->pos_status.col, field,
                         "run %s is done but starts %s, after --today %s: an actual needs a run "
                         "that has started", idq, when, today);
    }
    /* only runs with an actual carry a variance: in the arena (the run id made it) */
    if (!(lr->var = pool_alloc(l->strings, sizeof *lr->var, 1)))
        return nomem(e);
    memset(lr->var, 0, sizeof *lr->var);
    variance_plan(c, r, lr, b);
    if (a->status == CAMP_CANCELLED) {
        cancel_balance(b);
        lr->substrate_kg = 0;
        return HL_OK;
    }
    if (a->given & CAMP_ACT_REAGENT_KG) {
        struct bal_out actual;
        in->amount_is_kg = 1;
        in->reagent_kg = a->reagent_kg;
        hl_err_clear(e);
        enum hl_status st = bal_compute_cached(in, cache, &actual, e);
        if (st == HL_ERR_INPUT)
            return blame_run(c, r, e);
        if (st)
            return st;
        /* actual.sel is the cache's (sel_owned 0): it outlives b, and the reaction heat
         * takes its site shares from it (the weighed draw changes no site) */
        bal_free(b);
        *b = actual;
        lr->other_rows = 0;
        lr->other_mean_degree = 0;
        if (min_frac > 0 && (st = lump_products(lr, b, min_frac, e)))
            return st;
    }
    variance_actual(c, lr, b);
    return HL_OK;
}

/* The inputs of run_assumptions that vary from run to run: a (sel, model, reagent) met
 * before adds nothing to the list. */
struct assumed { const void *sel, *model; int reagent; };
#define ASSUMED_SLOTS 64

static int by_start(const void *a, const void *b)
{
    const struct camp_run *x = *(const struct camp_run *const *)a, *y = *(const struct camp_run *const *)b;
    if (x->start_min != y->start_min)
        return x->start_min < y->start_min ? -1 : 1;
    return (x > y) - (x < y); /* file order: runs[] is contiguous */
}

/* The scalar fields struct ledger_bal shares with struct bal_out (ledger.h). */
#define LEDGER_BAL_SCALARS(X) X(substrate_molar_mass_g_mol) X(substrate_mol) X(reagent_mol) \
    X(reagent_kg) X(reagent_reacted_mol) X(reagent_unreacted_mol) X(halogen_reacted_mol) \
    X(capped) X(isomers_resolved) X(mean_degree) X(so2_kg) X(succinimide_kg) \
    X(reagent_left_kg) X(wanted_kg) X(isomer_kg) X(overhal_kg) X(unreacted_substrate_kg) \
    X(wanted_mol) X(converted_mol) X(halogen_charged_mol) X(halogen_in_wanted_mol) \
    X(yield_pct) X(conversion_pct) X(selectivity_pct) X(selectivity_defined) \
    X(halogen_efficiency_pct) X(max_rel_error)
#define LEDGER_BAL_ARRAYS(X) X(hx_kg) X(vent_mol) X(retained_mol) \
    X(el_in_mol) X(el_out_mol)

/* Balance b as the run's ledger_bal d: the product table copied into the arena (sized to
 * its rows, no allocation of its own), each structure and the warning as shared strings.
 * b keeps what it owns (the caller frees it); on failure d's structures are shared or NULL. */
static enum hl_status keep_bal(struct ledger *l, struct ledger_bal *d, struct bal_out *b,
                               struct hl_err *e)
{
#define COPY_S(f) d->f = b->f;
#define COPY_A(f) memcpy(d->f, b->f, sizeof d->f);
    LEDGER_BAL_SCALARS(COPY_S)
    LEDGER_BAL_ARRAYS(COPY_A)
#undef COPY_S
#undef COPY_A
    d->products = NULL;
    d->nproducts = 0;
    enum hl_status st;
    if ((st = pool_dup(l, b->substrate_formula, 1, &d->substrate_formula, e)))
        return st;
    if (b->nproducts > 0) {
        size_t n = (size_t)b->nproducts * sizeof *d->products;
        if (!(d->products = pool_alloc(l->strings, n, 1)))
            return nomem(e);
        memset(d->products, 0, n);
        d->nproducts = b->nproducts;
        for (int p = 0; p < d->nproducts && !st; p++) {
            const struct bal_product *s = &b->products[p];
            struct ledger_product *q = &d->products[p];
            q->degree = s->degree;
            q->role = s->role;
            q->molar_mass_g_mol = s->molar_mass_g_mol;
            q->mol = s->mol;
            q->kg = s->kg;
            q->mol_fraction = s->mol_fraction;
            if (!(st = pool_dup(l, s->smiles, 1, &q->smiles, e)))
                st = pool_dup(l, s->formula, 1, &q->formula, e);
        }
    }
    if (!st && b->warning[0])
        st = pool_dup(l, b->warning, 1, &d->warning, e);
    return st;
}

/* A balance of its own from a kept one (a repeat of an entry: the same batch), as bal_copy
 * gives: structures duplicated, no selectivity detail. */
static enum hl_status unkeep_bal(struct bal_out *b, const struct ledger_bal *s, struct hl_err *e)
{
    memset(b, 0, sizeof *b);
#define COPY_S(f) b->f = s->f;
#define COPY_A(f) memcpy(b->f, s->f, sizeof b->f);
    LEDGER_BAL_SCALARS(COPY_S)
    LEDGER_BAL_ARRAYS(COPY_A)
#undef COPY_S
#undef COPY_A
    snprintf(b->warning, sizeof b->warning, "%s", s->warning ? s->warning : "");
    snprintf(b->substrate_formula, sizeof b->substrate_formula, "%s", s->substrate_formula);
    if (!(b->products = hl_calloc((size_t)(s->nproducts ? s->nproducts : 1), sizeof *b->products)))
        return nomem(e);
    for (int i = 0; i < s->nproducts; i++) {
        const struct ledger_product *q = &s->products[i];
        b->products[i] = (struct bal_product){.degree = q->degree, .role = q->role,
            .molar_mass_g_mol = q->molar_mass_g_mol, .mol = q->mol, .kg = q->kg,
            .mol_fraction = q->mol_fraction};
        snprintf(b->products[i].formula, sizeof b->products[i].formula, "%s", q->formula);
        b->nproducts = i + 1;
        if (s->products[i].smiles && !(b->products[i].smiles = hl_strdup(s->products[i].smiles)))
            return nomem(e); /* the caller frees b */
    }
    return HL_OK;
}

/* The balance of run r into ledger run i, with its assumptions, warnings and reaction heat.
 * The balance is worked on as a struct bal_out and kept as a ledger_bal at the end. */
static enum hl_status balance_one(const struct campaign *c, const struct ledger_opts *o,
                                  struct ledger *l, const struct camp_run *r, int i, int *first,
                                  struct assumed *assumed, struct bal_cache *cache,
                                  double min_frac, struct hl_err *e)
{
    struct ledger_run *lr = &l->runs[i];
    enum hl_status st;
    if ((st = pool_dup(l, r->id, 0, &lr->id, e)) || (st = pool_dup(l, r->reactor, 1, &lr->reactor, e)) ||
        (st = pool_dup(l, r->scrubber >= 0 ? c->scrubbers[r->scrubber].id : NULL, 1, &lr->scrubber, e)) ||
        (st = pool_dup(l, r->substrate_name, 1, &lr->substrate_name, e)) ||
        (st = pool_dup(l, r->smiles, 1, &lr->smiles, e)))
        return st;
    lr->scrubber_index = r->scrubber;
    lr->peak_factor = r->peak_factor;
    lr->start_min = r->start_min;
    lr->feed_h = r->feed_h;
    lr->temp_c = r->temp_c;
    lr->substrate_kg = r->substrate_kg;
    lr->reagent = r->reagent;
    lr->mode = r->mode == CAMP_CSTR ? KIN_CSTR : KIN_BATCH;
    struct bal_in in = {
        .smiles = r->smiles, .formula = r->formula, .product_smiles = r->product_smiles,
        .substrate_kg = r->substrate_kg, .reagent = r->reagent,
        .amount_is_kg = r->amount_is_kg, .reagent_eq = r->reagent_eq,
        .reagent_kg = r->reagent_kg, .halogen_conversion = r->halogen_conversion,
        .temp_c = r->temp_c, .mode = lr->mode,
        .vent_retained_fraction = r->vent_retained_fraction};
    model_to_input(r->model, &in);
    hl_err_clear(e);
    struct bal_out b;
    memset(&b, 0, sizeof b);
    int twin = first[r->src_index];
    if (twin >= 0) {
        st = unkeep_bal(&b, &l->runs[twin].bal, e); /* already lumped */
        lr->other_rows = l->runs[twin].other_rows;
        lr->other_mean_degree = l->runs[twin].other_mean_degree;
    } else {
        st = bal_compute_cached(&in, cache, &b, e);
        if (st == HL_ERR_INPUT)
            st = blame_run(c, r, e);
        if (!st) {
            first[r->src_index] = i;
            /* the same prediction under the same model lists the same values again,
             * which assume() would find listed: skip the scan (a few dozen strcmp) */
            struct assumed *m = &assumed[((uintptr_t)b.sel / 64u) % ASSUMED_SLOTS];
            if (m->sel != b.sel || m->model != r->model || m->reagent != r->reagent) {
                st = run_assumptions(l, &in, &b, e);
                if (!st)
                    *m = (struct assumed){b.sel, r->model, r->reagent};
            }
        }
        if (!st)
            st = warn_defaults(l, r, &b, e);
        if (!st && min_frac > 0)
            st = lump_products(lr, &b, min_frac, e);
    }
    if (!st)
        st = apply_actual(c, o, l, r, &in, lr, &b, min_frac, cache, e);
    const struct sel_result *sel = b.sel; /* the cache's: outlives b */
    if (!st)
        st = keep_bal(l, &lr->bal, &b, e);
    bal_free(&b);
    if (!st && lr->bal.warning)
        st = warn(l, e, lr->id, "%s", lr->bal.warning);
    if (!st)
        st = run_thermal(c, r, l, lr, sel, twin, e);
    return st;
}

static enum hl_status balance_runs(const struct campaign *c, const struct ledger_opts *o,
                                   struct ledger *l, double min_frac, struct hl_err *e)
{
    struct assumed assumed[ASSUMED_SLOTS];
    memset(assumed, 0, sizeof assumed);
    const struct camp_run **sorted = hl_malloc((size_t)(c->nruns ? c->nruns : 1) * sizeof *sorted);
    l->runs = hl_calloc((size_t)(c->nruns ? c->nruns : 1), sizeof *l->runs);
    int nsrc = 1;
    for (int i = 0; i < c->nruns; i++)
        if (c->runs[i].src_index >= nsrc)
            nsrc = c->runs[i].src_index + 1;
    /* first[s] = ledger index of the first run of campaign entry s: its repeats are the
     * same batch at another time, so their balance is copied rather than recomputed */
    int *first = hl_malloc((size_t)nsrc * sizeof *first);
    /* runs with the same substrate, reagent, temperature and model share one selectivity
     * prediction and their product formulas (bit-identical balances, computed once) */
    struct bal_cache *cache = bal_cache_new();
    if (!sorted || !l->runs || !first || !cache) {
        hl_free(sorted);
        hl_free(first);
        bal_cache_free(cache);
        return nomem(e);
    }
    for (int s = 0; s < nsrc; s++)
        first[s] = -1;
    for (int i = 0; i < c->nruns; i++)
        sorted[i] = &c->runs[i];
    qsort(sorted, (size_t)c->nruns, sizeof *sorted, by_start);
    enum hl_status st = HL_OK;
    for (int i = 0; i < c->nruns && !st; i++) {
        l->nruns = i + 1;
        st = balance_one(c, o, l, sorted[i], i, first, assumed, cache, min_frac, e);
    }
    hl_free(sorted);
    hl_free(first);
    bal_cache_free(cache);
    return st;
}

/* ---- scrubbers ---- */

static enum hl_status run_scrubbers(const struct campaign *c, struct ledger *l, struct hl_err *e)
{
    int nu = c->nscrubbers, nr = l->nruns;
    struct scrub_unit_in *units = hl_calloc((size_t)(nu ? nu : 1), sizeof *units);
    struct scrub_unit_out *uout = hl_calloc((size_t)(nu ? nu : 1), sizeof *uout);
    struct scrub_run_in *rin = hl_calloc((size_t)(nr ? nr : 1), sizeof *rin);
    struct scrub_run_out *rout = hl_calloc((size_t)(nr ? nr : 1), sizeof *rout);
    int *order = hl_malloc((size_t)(nr ? nr : 1) * sizeof *order);
    l->scrubbers = hl_calloc((size_t)(nu ? nu : 1), sizeof *l->scrubbers);
    enum hl_status st = HL_OK;
    if (!units || !uout || !rin || !rout || !order || !l->scrubbers) {
        st = nomem(e);
        goto out;
    }
    for (int u = 0; u < nu; u++) {
        const struct camp_scrubber *s = &c->scrubbers[u];
        units[u] = (struct scrub_unit_in){
            .id = s->id, .liquor = s->liquor,
            .base_wt_pct = s->base_wt_pct, .liquor_kg = s->liquor_kg,
            .min_base_wt_pct = s->min_base_wt_pct,
            /* the campaign's changeout strengths of the acids a water liquor dissolves */
            .max_gas_wt_pct = {[VS_HCL] = s->max_acid_wt_pct, [VS_HBR] = s->max_hbr_wt_pct},
            .rated_acid_kmol_h = s->rated_acid_kmol_h, .makeup_base_wt_pct = s->makeup_base_wt_pct,
            .liquor_cp_kj_kg_k = s->liquor_cp_kj_kg_k, .liquor_cp_given = s->liquor_cp_given,
            .has_column = s->column.present,
            .packing_factor_1_m = s->column.packing_factor_1_m, .htu_m = s->column.htu_m,
            .removal_fraction = s->column.removal_fraction, .flood_fraction = s->column.flood_fraction,
            .carrier_kmol_h = s->column.carrier_kmol_h, .liquor_kg_h = s->column.liquor_kg_h,
            .gas_temp_c = s->column.gas_temp_c,
            .fresh_liquor_temp_c = s->fresh_liquor_temp_c,
            .max_liquor_temp_c = s->max_liquor_temp_c, .removal_given = s->removal_given};
        memcpy(units[u].removal, s->removal, sizeof units[u].removal);
    }
    for (int i = 0; i < nr; i++) {
        const struct ledger_run *lr = &l->runs[i];
        rin[i].unit = lr->scrubber_index;
        rin[i].start_min = lr->start_min;
        rin[i].feed_h = lr->feed_h;
        rin[i].peak_factor = lr->peak_factor;
        memcpy(rin[i].vent_mol, lr->bal.vent_mol, sizeof rin[i].vent_mol);
        order[i] = i; /* l->runs is already in start order */
    }
    if ((st = scrub_campaign(units, nu, rin, nr, order, rout, uout, e)))
        goto out;
    for (int u = 0; u < nu; u++) {
        l->scrubbers[u].out = uout[u]; /* ownership moves to the ledger */
        memset(&uout[u], 0, sizeof uout[u]);
        l->scrubbers[u].rated_acid_kmol_h = c->scrubbers[u].rated_acid_kmol_h;
        l->nscrubbers = u + 1;
        if (!(l->scrubbers[u].id = hl_strdup(c->scrubbers[u].id))) {
            st = nomem(e);
            goto out;
        }
    }
    for (int u = 0; u < nu; u++) {
        const struct camp_scrubber *cs = &c->scrubbers[u];
        struct ledger_scrubber *ls = &l->scrubbers[u];
        ls->base = liquor_get(cs->liquor)->base;
        ls->makeup_base_wt_pct = ls->base < 0 ? 0.0 : cs->makeup_base_wt_pct;
        scrub_fresh_charge(cs->liquor_kg, cs->base_wt_pct, cs->makeup_base_wt_pct, cs->liquor,
                           &ls->changeout_makeup_kg, &ls->changeout_water_kg);
        /* the caustic figures of the ledger (design section 5) are those of a NaOH base */
        int caustic = ls->base == RG_NAOH;
        ls->makeup_naoh_wt_pct = caustic ? ls->makeup_base_wt_pct : 0.0;
        ls->changeout_caustic_solution_kg = caustic ? ls->changeout_makeup_kg : 0.0;
        ls->dilution_water_kg = ls->out.changeouts * ls->changeout_water_kg;
        ls->caustic_solution_kg = caustic ? ls->out.makeup_kg : 0.0;
    }
    for (int i = 0; i < nr; i++) {
        struct ledger_run *lr = &l->runs[i];
        lr->scrub = rout[i];
        if (lr->scrub.changeout_before && lr->scrubber_index >= 0) {
            const struct ledger_scrubber *ls = &l->scrubbers[lr->scrubber_index];
            lr->changeout_makeup_kg = ls->changeout_makeup_kg;
            lr->changeout_caustic_solution_kg = ls->changeout_caustic_solution_kg;
            lr->changeout_water_kg = ls->changeout_water_kg;
        }
    }
out:
    if (uout && st)
        scrub_unit_out_free(uout, nu);
    hl_free(units);
    hl_free(uout);
    hl_free(rin);
    hl_free(rout);
    hl_free(order);
    return st;
}

/* ---- emissions ---- */

/* What leaves the stacks: each run's emission comes from the scrubber model, which took it
 * from the vent amounts it was given (so any change to a run's vent moves both). */
static enum hl_status build_emissions(const struct campaign *c, struct ledger *l, struct hl_err *e)
{
    int nu = l->nscrubbers, nr = l->nruns, np = c->npermits;
    struct emis_run *er = hl_calloc((size_t)(nr ? nr : 1), sizeof *er);
    struct emis_permit *ep = hl_calloc((size_t)(np ? np : 1), sizeof *ep);
    struct scrub_unit_out *uo = hl_calloc((size_t)(nu ? nu : 1), sizeof *uo);
    double *stack = hl_calloc((size_t)(nu ? nu : 1), sizeof *stack);
    enum hl_status st = HL_OK;
    if (!er || !ep || !uo || !stack) {
        st = nomem(e);
        goto out;
    }
    for (int u = 0; u < nu; u++) {
        uo[u] = l->scrubbers[u].out; /* a shallow view: emis_build only reads it */
        stack[u] = c->scrubbers[u].stack_nm3_h;
    }
    for (int i = 0; i < nr; i++) {
        const struct ledger_run *r = &l->runs[i];
        struct scrub_run_in ri = {.unit = r->scrubber_index, .start_min = r->start_min,
                                  .feed_h = r->feed_h, .peak_factor = r->peak_factor};
        er[i] = (struct emis_run){r->scrubber_index, r->start_min, scrub_vent_end_min(&ri), {0}};
        memcpy(er[i].kg, r->scrub.emis_kg, sizeof er[i].kg);
    }
    for (int k = 0; k < np; k++) {
        const struct camp_permit *p = &c->permits[k];
        ep[k] = (struct emis_permit){p->scrubber, p->species, p->max_kg_h, p->max_mg_nm3,
                                     p->max_t_yr, p->averaging_day};
    }
    st = emis_build(uo, stack, nu, er, nr, ep, np, &l->emis, &l->permit_checks,
                    &l->npermit_checks, e);
out:
    hl_free(er);
    hl_free(ep);
    hl_free(uo);
    hl_free(stack);
    return st;
}

/* Each removal fraction in force (Assumptions sheet), and a warning per permit limit
 * exceeded or not checkable. */
static enum hl_status report_emissions(const struct campaign *c, struct ledger *l, struct hl_err *e)
{
    enum hl_status st = HL_OK;
    char what[200], when[20], runs[200];
    for (int u = 0; u < l->nscrubbers && !st; u++) {
        const struct scrub_unit_out *o = &l->scrubbers[u].out;
        for (int v = 0; v < VS_COUNT && !st; v++) {
            const char *origin = NULL;
            scrub_removal_default(v, c->scrubbers[u].liquor, &origin);
            if (o->removal_origin[v] == SCRUB_REM_GIVEN)
                origin = "campaign scrubbers[].removal";
            else if (o->removal_origin[v] == SCRUB_REM_COLUMN)
                origin = "column: 1 - exp(-NTU), NTU = ln(1 / (1 - removal_fraction)) of its design "
                         "(gas-film control, fast irreversible reaction; the same NTU for every gas "
                         "the liquor absorbs)";
            snprintf(what, sizeof what, "Removal of %s credited to scrubber %s (emissions)",
                     vent_name(v), l->scrubbers[u].id);
            st = assume(l, e, what, 1, o->removal[v], "fraction", origin);
        }
    }
    if (!st && l->nscrubbers > 0)
        st = assume(l, e, "Emissions", 0, 0, NULL,
                    "planning estimates: of what the liquor can still take (caustic: until its "
                    "NaOH is used up; water: HCl and HBr up to its changeout strength) 1 - removal "
                    "leaves the stack, all the rest breaks through; spread evenly over the vent "
                    "window, binned by clock hour; mg/Nm3 = kg/h x 1e6 / stack_nm3_h (0 C, "
                    "101.325 kPa). A permit is judged on measured emissions by the method the "
                    "authority prescribes");
    for (int k = 0; k < l->npermit_checks && !st; k++) {
        const struct emis_check *x = &l->permit_checks[k];
        const char *sid = l->scrubbers[x->unit].id, *sp = vent_name(x->species);
        const char *unit = emis_limit_unit(x->kind);
        if (!x->has_value) {
            st = warn(l, e, NULL, "permit on scrubber %s %s: the %.4g mg/Nm3 limit cannot be "
                      "checked: the scrubber gives no stack_nm3_h", sid, sp, x->limit);
            continue;
        }
        if (!x->exceeded)
            continue;
        join_run_ids(l, x->runs, x->nruns, runs, sizeof runs);
        if (x->kind == EMIS_T_YR)
            snprintf(when, sizeof when, "%04d", x->at_year);
        else
            isodate_format(x->at_min, x->averaging_day, when, sizeof when);
        st = warn(l, e, NULL,
                  "permit on scrubber %s %s exceeded: %.4g %s %s %s (runs %s) against the limit "
                  "of %.4g %s; a planning estimate: the permit and local rules decide, on "
                  "measured emissions",
                  sid, sp, x->value, unit,
                  x->kind == EMIS_T_YR ? "in the year" : x->averaging_day ? "as the mean of the day"
                                                                          : "in the hour from",
                  when, runs, x->limit, unit);
    }
    return st;
}

/* ---- orders ---- */

/* Orders from where things stand: for a reagent counted, the latest count is its stock, the
 * runs starting before it are past (the count shows what they drew) and the deliveries
 * received up to it are in the count; placed orders and later deliveries count in the month
 * they are due. A cancelled run draws nothing. */
static enum hl_status plan_orders(const struct campaign *c, struct ledger *l, struct hl_err *e)
{
    int nd = 0, ns = 0, nsup = 0;
    struct ord_demand *d = hl_calloc((size_t)(2 * l->nruns + 1), sizeof *d);
    struct ord_stock *s = hl_calloc((size_t)(c->nstock + RG_COUNT + 1), sizeof *s);
    struct ord_container *k = hl_calloc((size_t)(c->ncontainers + 1), sizeof *k);
    struct ord_supply *sup = hl_calloc((size_t)(c->ndeliveries + 1), sizeof *sup);
    enum hl_status st = HL_OK;
    if (!d || !s || !k || !sup) {
        st = nomem(e);
        goto out;
    }
    int64_t counted_at[RG_COUNT];
    double counted_kg[RG_COUNT];
    for (int r = 0; r < RG_COUNT; r++) {
        counted_at[r] = INT64_MIN;
        counted_kg[r] = 0;
    }
    for (int i = 0; i < c->ncounts; i++) {
        const struct camp_count *n = &c->counts[i];
        if (n->date_min > counted_at[n->reagent]) {
            counted_at[n->reagent] = n->date_min;
            counted_kg[n->reagent] = n->kg;
        }
    }
    for (int i = 0; i < l->nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        if (r->bal.reagent_kg > 0 && r->start_min >= counted_at[r->reagent])
            d[nd++] = (struct ord_demand){r->reagent, r->start_min, r->bal.reagent_kg};
        /* the base's make-up for a fresh charge, bought at its make-up strength */
        if (r->changeout_makeup_kg > 0)
            d[nd++] = (struct ord_demand){l->scrubbers[r->scrubber_index].base, r->start_min,
                                          r->changeout_makeup_kg};
    }
    int has_row[RG_COUNT] = {0};
    for (int i = 0; i < c->nstock; i++) {
        int it = c->stock[i].reagent;
        has_row[it] = 1;
        s[ns++] = (struct ord_stock){it, counted_at[it] != INT64_MIN ? counted_kg[it] : c->stock[i].on_hand_kg,
                                     c->stock[i].safety_kg, c->stock[i].lead_days};
    }
    for (int it = 0; it < RG_COUNT; it++)
        if (!has_row[it] && counted_at[it] != INT64_MIN)
            s[ns++] = (struct ord_stock){it, counted_kg[it], 0, 0};
    for (int i = 0; i < c->ndeliveries; i++) {
        const struct camp_delivery *v = &c->deliveries[i];
        if (v->received && v->date_min <= counted_at[v->reagent])
            continue; /* in the count already */
        sup[nsup++] = (struct ord_supply){v->reagent, v->date_min, v->kg, v->received};
    }
    for (int i = 0; i < c->ncontainers; i++)
        k[i] = (struct ord_container){c->containers[i].reagent, c->containers[i].name,
                                      c->containers[i].net_kg, c->containers[i].heel_kg};
    st = ord_plan_supply(d, nd, s, ns, k, c->ncontainers, sup, nsup, l->today_min, &l->orders,
                         &l->norders, e);
    /* each container size ordered, with where it comes from, on the Assumptions list (the
     * order lines still point at the campaign's names here, so the match is by pointer) */
    for (int i = 0; st == HL_OK && i < l->norders; i++) {
        const struct ord_line *o = &l->orders[i];
        for (int j = 0; o->container && j < c->ncontainers; j++) {
            const struct camp_container *ct = &c->containers[j];
            if (ct->name != o->container)
                continue;
            char what[200];
            const struct reagent_info *ri = reagent_get(ct->reagent);
            snprintf(what, sizeof what, "%s container \"%.120s\": net content",
                     ri ? ri->name : "?", ct->name);
            st = assume(l, e, what, 1, ct->net_kg, "kg",
                        ct->source ? ct->source
                                   : ct->from_catalog ? "default container catalog (no source given)"
                                                      : "given in the campaign (containers[])");
            break;
        }
    }
    if (st != HL_OK) /* the names are still the campaign's: the ledger must not free them */
        for (int i = 0; i < l->norders; i++)
            l->orders[i].container = NULL;
out:
    hl_free(d);
    hl_free(s);
    hl_free(k);
    hl_free(sup);
    return st;
}

/* ---- containers on line at the busiest moment ---- */

struct online_ev { int64_t t_min; int delta, item; };

static int cmp_online(const void *pa, const void *pb)
{
    const struct online_ev *a = pa, *b = pb;
    if (a->t_min != b->t_min)
        return a->t_min < b->t_min ? -1 : 1;
    return (a->delta > b->delta) - (a->delta < b->delta); /* a run ending frees its containers first */
}

static int cmp_line_key(const void *key, const void *el)
{
    const int *k = key;
    const struct ord_line *o = el;
    if (k[0] != o->month_index)
        return k[0] < o->month_index ? -1 : 1;
    return (k[1] > o->item) - (k[1] < o->item);
}

/* For each order line, the most containers of its item on line at once (design section 5,
 * orders[].containers_on_line_peak): the runs' gas withdrawal counts added over the time their
 * feeds overlap, swept in time order; the count only rises at a run's start, so the peak of a
 * month is taken at a start in that month. Order lines are in month then item order. */
static enum hl_status orders_on_line(struct ledger *l, struct hl_err *e)
{
    int n = 0;
    for (int i = 0; i < l->nruns; i++)
        n += l->runs[i].has_withdrawal && l->runs[i].withdrawal.containers_on_line > 0;
    if (!n || !l->norders)
        return HL_OK;
    struct online_ev *v = hl_malloc((size_t)n * 2 * sizeof *v);
    if (!v)
        return nomem(e);
    int k = 0;
    for (int i = 0; i < l->nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        if (!r->has_withdrawal || r->withdrawal.containers_on_line <= 0)
            continue;
        int64_t len_min = (int64_t)ceil(r->feed_h * 60.0);
        v[k++] = (struct online_ev){r->start_min, r->withdrawal.containers_on_line, r->reagent};
        v[k++] = (struct online_ev){r->start_min + (len_min > 0 ? len_min : 1),
                                    -r->withdrawal.containers_on_line, r->reagent};
    }
    qsort(v, (size_t)k, sizeof *v, cmp_online);
    int on[RG_COUNT] = {0};
    for (int j = 0; j < k; j++) {
        on[v[j].item] += v[j].delta;
        if (v[j].delta <= 0)
            continue;
        int key[2] = {isodate_month_index(v[j].t_min), v[j].item};
        struct ord_line *o = bsearch(key, l->orders, (size_t)l->norders, sizeof *l->orders, cmp_line_key);
        if (o && on[v[j].item] > o->peak_on_line) {
            o->peak_on_line = on[v[j].item];
            o->peak_on_line_min = v[j].t_min;
        }
    }
    hl_free(v);
    return HL_OK;
}

/* ---- stock checks ---- */

static int cmp_count(const void *pa, const void *pb)
{
    const struct camp_count *a = *(const struct camp_count *const *)pa,
                            *b = *(const struct camp_count *const *)pb;
    if (a->date_min != b->date_min)
        return a->date_min < b->date_min ? -1 : 1;
    if (a->reagent != b->reagent)
        return a->reagent < b->reagent ? -1 : 1;
    return (a > b) - (a < b);
}

/* Each count against the book since the previous count of its reagent (ledger.h). A few
 * counts a month, each a pass over the runs and deliveries. */
static enum hl_status stock_checks(const struct campaign *c, struct ledger *l, struct hl_err *e)
{
    l->tol_reagent_pct = c->tolerances.reagent_pct;
    l->tol_product_pct = c->tolerances.product_pct;
    l->tol_stock_pct = c->tolerances.stock_pct;
    if (!c->ncounts)
        return HL_OK;
    const struct camp_count **v = hl_malloc((size_t)c->ncounts * sizeof *v);
    l->stock_checks = hl_calloc((size_t)c->ncounts, sizeof *l->stock_checks);
    if (!v || !l->stock_checks) {
        hl_free(v);
        return nomem(e);
    }
    for (int i = 0; i < c->ncounts; i++)
        v[i] = &c->counts[i];
    qsort(v, (size_t)c->ncounts, sizeof *v, cmp_count);
    int64_t since[RG_COUNT];
    double base[RG_COUNT];
    int seen[RG_COUNT];
    for (int r = 0; r < RG_COUNT; r++) {
        since[r] = 0;
        base[r] = 0;
        seen[r] = 0;
    }
    for (int i = 0; i < c->nstock; i++)
        base[c->stock[i].reagent] = c->stock[i].on_hand_kg;
    for (int i = 0; i < c->ncounts; i++) {
        const struct camp_count *n = v[i];
        struct ledger_stock_check *k = &l->stock_checks[i];
        int rg = n->reagent;
        int first = !seen[rg];
        *k = (struct ledger_stock_check){.reagent = rg, .date_min = n->date_min, .since_min = since[rg],
                                         .has_since = !first, .start_kg = base[rg], .counted_kg = n->kg};
        for (int j = 0; j < c->ndeliveries; j++) {
            const struct camp_delivery *d = &c->deliveries[j];
            if (d->reagent == rg && d->received && d->date_min <= n->date_min &&
                (first || d->date_min > since[rg]))
                k->received_kg += d->kg;
        }
        for (int j = 0; j < l->nruns; j++) {
            const struct ledger_run *r = &l->runs[j];
            if (r->reagent == rg && r->start_min < n->date_min && (first || r->start_min >= since[rg]))
                k->drawn_kg += r->bal.reagent_kg;
        }
        k->book_kg = k->start_kg + k->received_kg - k->drawn_kg;
        k->unexplained_kg = k->book_kg - k->counted_kg;
        /* a difference below round-off of the sums is none */
        if (fabs(k->unexplained_kg) <= 1e-9 * (k->start_kg + k->received_kg + k->drawn_kg + k->counted_kg))
            k->unexplained_kg = 0;
        k->pct_defined = k->drawn_kg > 0;
        k->unexplained_pct = k->pct_defined ? 100.0 * k->unexplained_kg / k->drawn_kg : 0.0;
        /* nothing drawn: the tolerance is taken of the book stock */
        k->flagged = k->pct_defined ? fabs(k->unexplained_pct) > c->tolerances.stock_pct
                                    : fabs(k->unexplained_kg) > c->tolerances.stock_pct / 100.0 *
                                                                     fabs(k->book_kg);
        since[rg] = n->date_min;
        base[rg] = n->kg;
        seen[rg] = 1;
        l->nstock_checks = i + 1;
    }
    hl_free(v);
    return HL_OK;
}

/* The container names in l->orders are borrowed from the campaign; copy them so the
 * ledger stands alone once the campaign is freed. */
static enum hl_status own_container_names(struct ledger *l, struct hl_err *e)
{
    for (int i = 0; i < l->norders; i++) {
        if (!l->orders[i].container)
            continue;
        char *dup = hl_strdup(l->orders[i].container);
        if (!dup) {
            /* the copies made so far are freed with the ledger; the rest are still
             * borrowed from the campaign and must not be */
            for (int j = i; j < l->norders; j++)
                l->orders[j].container = NULL;
            return nomem(e);
        }
        l->orders[i].container = dup;
    }
    return HL_OK;
}

/* ---- months ---- */

static int cmp_int(const void *a, const void *b)
{
    int x = *(const int *)a, y = *(const int *)b;
    return (x > y) - (x < y);
}

static struct ledger_month *month_of(struct ledger *l, int64_t t)
{
    int key = isodate_month_index(t);
    int lo = 0, hi = l->nmonths - 1;
    while (lo <= hi) {
        int mid = (lo + hi) / 2;
        if (l->months[mid].month_index == key)
            return &l->months[mid];
        if (l->months[mid].month_index < key) lo = mid + 1;
        else hi = mid - 1;
    }
    return NULL;
}

/* Identity of a run's wanted product: its SMILES, else its formula; NULL when the run
 * lists none (no product carries the role). */
static const struct ledger_product *wanted_of(const struct ledger_bal *b)
{
    for (int i = 0; i < b->nproducts; i++)
        if (b->products[i].role == ROLE_WANTED)
            return &b->products[i];
    return NULL;
}

static void month_product_figures(struct ledger_month_product *p)
{
    p->yield_pct = p->substrate_mol > 0 ? 100.0 * p->wanted_mol / p->substrate_mol : 0.0;
    p->conversion_pct = p->substrate_mol > 0 ? 100.0 * p->converted_mol / p->substrate_mol : 0.0;
    p->selectivity_defined = p->converted_mol > 0;
    p->selectivity_pct = p->selectivity_defined ? 100.0 * p->wanted_mol / p->converted_mol : 0.0;
    p->halogen_efficiency_pct =
        p->halogen_charged_mol > 0 ? 100.0 * p->halogen_in_wanted_mol / p->halogen_charged_mol : 0.0;
}

/* Add a run to its month's route (substrate, reagent, wanted product). A month holds a
 * handful of routes, so the scan is short; the cost stays linear in runs. */
static enum hl_status month_product(struct ledger_month *m, const struct ledger_run *r,
                                    struct hl_err *e)
{
    const struct ledger_bal *b = &r->bal;
    const struct ledger_product *w = wanted_of(b);
    const char *sub = r->smiles ? r->smiles : b->substrate_formula;
    const char *want = w ? (w->smiles ? w->smiles : w->formula) : "";
    struct ledger_month_product *p = NULL;
    for (int i = 0; i < m->nproducts && !p; i++)
        if (m->products[i].reagent == r->reagent && !strcmp(m->products[i].substrate, sub) &&
            !strcmp(m->products[i].wanted, want))
            p = &m->products[i];
    if (!p) {
        if (grow_due(m->nproducts)) {
            p = hl_realloc(m->products, grown(m->nproducts) * sizeof *p);
            if (!p)
                return nomem(e);
            m->products = p;
        }
        p = &m->products[m->nproducts];
        memset(p, 0, sizeof *p);
        p->substrate_name = hl_strdup(r->substrate_name);
        p->substrate = hl_strdup(sub);
        p->wanted = hl_strdup(want);
        if ((r->substrate_name && !p->substrate_name) || !p->substrate || !p->wanted) {
            hl_free(p->substrate_name);
            hl_free(p->substrate);
            hl_free(p->wanted);
            return nomem(e);
        }
        snprintf(p->wanted_formula, sizeof p->wanted_formula, "%s", w ? w->formula : "");
        p->reagent = r->reagent;
        m->nproducts++;
    }
    p->runs++;
    p->substrate_kg += r->substrate_kg;
    p->substrate_mol += b->substrate_mol;
    p->converted_mol += b->converted_mol;
    p->wanted_mol += b->wanted_mol;
    p->wanted_kg += b->wanted_kg;
    p->halogen_charged_mol += b->halogen_charged_mol;
    p->halogen_in_wanted_mol += b->halogen_in_wanted_mol;
    month_product_figures(p);
    return HL_OK;
}

/* A run's part in its month's close (ledger.h: struct ledger_month_close). */
static void month_close_run(struct ledger_month *m, const struct ledger_run *r)
{
    struct ledger_month_close *k = &m->close;
    const struct ledger_variance *v = r->var;
    const struct ledger_actual *a = &r->actual;
    if (a->status == LEDGER_PLANNED) {
        k->planned++;
        return;
    }
    k->reagent_plan_kg[r->reagent] += v->reagent_kg_plan;
    k->product_plan_kg += v->product_kg_plan;
    k->naoh_plan_kg += v->naoh_kg_plan;
    if (a->status == LEDGER_CANCELLED) {
        k->cancelled++;
        return;
    }
    k->done++;
    k->reagent_actual_kg[r->reagent] += r->bal.reagent_kg; /* the draw where weighed */
    k->product_actual_kg += (a->given & LEDGER_ACT_PRODUCT) ? a->product_kg : r->bal.wanted_kg;
    k->naoh_actual_kg += (a->given & LEDGER_ACT_NAOH) ? a->naoh_kg : r->scrub.naoh_kg;
}

static enum hl_status build_months(struct ledger *l, struct hl_err *e)
{
    int n = l->nruns;
    for (int u = 0; u < l->nscrubbers; u++)
        n += l->scrubbers[u].out.nspent;
    int *keys = hl_malloc((size_t)(n ? n : 1) * sizeof *keys);
    l->months = hl_calloc((size_t)(n ? n : 1), sizeof *l->months);
    if (!keys || !l->months) {
        hl_free(keys);
        return nomem(e);
    }
    int k = 0;
    for (int i = 0; i < l->nruns; i++)
        keys[k++] = isodate_month_index(l->runs[i].start_min);
    for (int u = 0; u < l->nscrubbers; u++)
        for (int j = 0; j < l->scrubbers[u].out.nspent; j++)
            keys[k++] = isodate_month_index(l->scrubbers[u].out.spent[j].at_min);
    qsort(keys, (size_t)k, sizeof *keys, cmp_int);
    for (int i = 0; i < k; i++)
        if (l->nmonths == 0 || l->months[l->nmonths - 1].month_index != keys[i])
            l->months[l->nmonths++].month_index = keys[i];
    hl_free(keys);

    enum hl_status st = HL_OK;
    for (int i = 0; i < l->nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        const struct ledger_bal *b = &r->bal;
        struct ledger_month *m = month_of(l, r->start_min);
        m->runs++;
        m->product_kg += b->wanted_kg;
        m->isomer_kg += b->isomer_kg;
        m->overhal_kg += b->overhal_kg;
        m->unreacted_substrate_kg += b->unreacted_substrate_kg;
        m->reagents_kg[r->reagent] += b->reagent_kg;
        for (int v = 0; v < VS_COUNT; v++) {
            m->vent_kg[v] += b->vent_mol[v] * vent_molar_mass_g_mol(v) / 1000.0;
            m->retained_acid_kg += b->retained_mol[v] * vent_molar_mass_g_mol(v) / 1000.0;
        }
        m->naoh_kg += r->scrub.naoh_kg;
        if (r->scrubber_index >= 0 && l->scrubbers[r->scrubber_index].base >= 0)
            m->base_kg[l->scrubbers[r->scrubber_index].base] += r->scrub.base_kg;
        m->co2_kg += r->scrub.co2_kg;
        m->changeouts += r->scrub.changeout_before;
        if (r->scrub.changeout_before && r->scrubber_index >= 0) {
            m->caustic_solution_kg += r->changeout_caustic_solution_kg;
            m->caustic_solution_naoh_kg += r->changeout_caustic_solution_kg *
                                           l->scrubbers[r->scrubber_index].makeup_naoh_wt_pct / 100.0;
            m->dilution_water_kg += r->changeout_water_kg;
        }
        month_close_run(m, r);
        /* a cancelled run made nothing: no route figures (they divide by the substrate) */
        if (r->actual.status != LEDGER_CANCELLED && (st = month_product(m, r, e)))
            return st;
        m->succinimide_kg += b->succinimide_kg;
        m->reagent_left_kg += b->reagent_left_kg;
    }
    for (int i = 0; i < l->norders; i++)
        if (reagent_get(l->orders[i].item)->kind == RK_BASE) /* make-up for changeouts, by month of need */
            month_of(l, l->orders[i].first_use_min)->reagents_kg[l->orders[i].item] += l->orders[i].demand_kg;
    for (int u = 0; u < l->nscrubbers; u++)
        for (int j = 0; j < l->scrubbers[u].out.nspent; j++) {
            const struct scrub_spent *sp = &l->scrubbers[u].out.spent[j];
            month_of(l, sp->at_min)->spent_liquor_kg += sp->mass_kg;
        }
    for (int i = 0; i < l->nmonths; i++)
        l->months[i].close.closed = l->months[i].close.planned == 0;
    /* a count in a month without runs has no month to be shown in: its check stands alone */
    for (int i = 0; i < l->nstock_checks; i++) {
        const struct ledger_stock_check *k = &l->stock_checks[i];
        struct ledger_month *m = month_of(l, k->date_min);
        if (m)
            m->close.unexplained_kg[k->reagent] += k->unexplained_kg;
    }
    return HL_OK;
}

/* ---- warnings, cautions, assumptions ---- */

/* The name of the base of a run's scrubber ("NaOH"; "base" without one). */
static const char *base_name(const struct ledger *l, const struct ledger_run *r)
{
    int b = r->scrubber_index >= 0 ? l->scrubbers[r->scrubber_index].base : -1;
    return b >= 0 ? reagent_get(b)->name : "base";
}

static enum hl_status collect_warnings(const struct campaign *c, struct ledger *l,
                                       struct hl_err *e)
{
    enum hl_status st = HL_OK;
    char when[20];
    for (int i = 0; i < l->nruns && !st; i++) {
        const struct ledger_run *r = &l->runs[i];
        double gas = 0;
        for (int v = 0; v < VS_COUNT; v++)
            gas += r->bal.vent_mol[v];
        if (r->scrubber_index < 0 && gas > 0)
            st = warn(l, e, r->id, "vents %.1f mol of gas but names no scrubber", gas);
        else if (r->scrub.breakthrough_mol > 0)
            st = warn(l, e, r->id,
                      "scrubber %s runs out of %s during this run: %.1f mol of gas pass "
                      "unneutralised; plan a changeout or move the run",
                      r->scrubber, base_name(l, r), r->scrub.breakthrough_mol);
        else if (r->scrub.exhausted)
            st = warn(l, e, r->id,
                      "scrubber %s liquor falls below the minimum %s strength during this run "
                      "(%.2f wt%% after it); overlapping runs leave no time for a changeout",
                      r->scrubber, base_name(l, r), r->scrub.base_wt_pct_after);
        if (!st && r->scrub.unabsorbed)
            st = warn(l, e, r->id, "scrubber %s has a water liquor: %.1f mol of Cl2/Br2/SO2 "
                      "pass it unabsorbed", r->scrubber, r->scrub.unabsorbed_mol);
    }
    for (int u = 0; u < l->nscrubbers && !st; u++) {
        const struct ledger_scrubber *s = &l->scrubbers[u];
        const struct scrub_unit_out *o = &s->out;
        if (o->overloaded) {
            isodate_format(o->peak_instant_at_min, 0, when, sizeof when);
            char runs[200];
            join_run_ids(l, o->peak_instant_runs, o->npeak_instant_runs, runs, sizeof runs);
            st = warn(l, e, NULL,
                      "scrubber %s overloaded: %.3f kmol/h from %s (runs %s) exceeds the rated "
                      "%.3f kmol/h (hourly mean peak %.3f kmol/h)",
                      s->id, o->peak_instant_kmol_h, when, runs, s->rated_acid_kmol_h,
                      o->peak_acid_kmol_h);
        }
        if (!st && o->too_hot_runs > 0) {
            const char *hottest = NULL;
            double hot_t = -HUGE_VAL;
            for (int i = 0; i < l->nruns; i++)
                if (l->runs[i].scrubber_index == u) {
                    const struct scrub_run_out *ro = &l->runs[i].scrub;
                    if (ro->liquor_temp_c_after > hot_t) {
                        hot_t = ro->liquor_temp_c_after;
                        hottest = l->runs[i].id;
                    }
                }
            char when_heat[20], runs[200];
            isodate_format(o->peak_heat_at_min, 0, when_heat, sizeof when_heat);
            join_run_ids(l, o->peak_heat_runs, o->npeak_heat_runs, runs, sizeof runs);
            /* the cooler duty is that of the runs heating the liquor together */
            st = warn(l, e, NULL,
                      "scrubber %s needs liquor cooling: without it the liquor would reach %.0f C "
                      "in run %s (limit %.0f C, %d runs above it); the heat release peaks at "
                      "%.0f kW from %s (runs %s)",
                      s->id, hot_t, hottest ? hottest : "?", c->scrubbers[u].max_liquor_temp_c,
                      o->too_hot_runs, o->peak_heat_kw, when_heat, runs);
        }
        if (!st && o->boiling_runs > 0)
            st = warn_boiling(l, e, u, c->scrubbers[u].liquor);
    }
    /* NaOH order lines add the solution every unit buys: one strength or the sum mixes
     * unlike things */
    for (int u = 0; u < l->nscrubbers && !st; u++) {
        const struct ledger_scrubber *s = &l->scrubbers[u];
        if (s->out.changeouts == 0 || s->changeout_caustic_solution_kg <= 0)
            continue;
        if (l->caustic_order_wt_pct == 0) {
            l->caustic_order_wt_pct = s->makeup_naoh_wt_pct;
        } else if (l->caustic_order_wt_pct != s->makeup_naoh_wt_pct) {
            l->caustic_order_wt_pct = -1;
            st = warn(l, e, NULL, "scrubbers buy caustic of different strengths (%s: %.4g wt%%): "
                      "the NaOH order lines add solutions of unlike strength; order each "
                      "strength separately", s->id, s->makeup_naoh_wt_pct);
        }
    }
    if (l->caustic_order_wt_pct < 0)
        l->caustic_order_wt_pct = 0;
    for (int i = 0; i < l->norders && !st; i++) {
        const struct ord_line *o = &l->orders[i];
        const char *item = reagent_get(o->item)->name;
        char month[8];
        isodate_month(o->first_use_min, month, sizeof month);
        if (o->late) {
            isodate_format(o->order_by_min, 1, when, sizeof when);
            st = warn(l, e, NULL, "%s order for %s is late: it had to be placed by %s", item, month, when);
        } else if (o->no_container && o->to_order_kg > 0) {
            st = warn(l, e, NULL, "%s for %s: %.1f kg to order but no container is defined",
                      item, month, o->to_order_kg);
        }
    }
    return st;
}

/* Flagged variances and stock checks: what a month close must explain. */
static enum hl_status close_warnings(struct ledger *l, struct hl_err *e)
{
    enum hl_status st = HL_OK;
    for (int i = 0; i < l->nruns && !st; i++) {
        const struct ledger_run *r = &l->runs[i];
        const struct ledger_variance *v = r->var;
        if (r->actual.status != LEDGER_DONE || !v->flagged)
            continue;
        const char *rg = reagent_get(r->reagent)->name;
        if (v->has_reagent && fabs(v->reagent_pct) > l->tol_reagent_pct)
            st = warn(l, e, r->id, "drew %.1f kg of %s against %.1f kg planned (%+.1f %%, tolerance "
                      "%.4g %%)", r->actual.reagent_kg, rg, v->reagent_kg_plan, v->reagent_pct,
                      l->tol_reagent_pct);
        if (!st && v->has_product &&
            (v->product_kg_plan > 0 ? fabs(v->product_pct) > l->tol_product_pct : r->actual.product_kg > 0))
            st = warn(l, e, r->id, "isolated %.1f kg of wanted product against %.1f kg planned "
                      "(%+.1f %%, tolerance %.4g %%)", r->actual.product_kg, v->product_kg_plan,
                      v->product_pct, l->tol_product_pct);
    }
    char when[20];
    for (int i = 0; i < l->nstock_checks && !st; i++) {
        const struct ledger_stock_check *k = &l->stock_checks[i];
        if (!k->flagged)
            continue;
        const char *rg = reagent_get(k->reagent)->name;
        isodate_format(k->date_min, 0, when, sizeof when);
        char share[64] = "";
        if (k->pct_defined)
            snprintf(share, sizeof share, " (%.1f %% of the %.1f kg drawn since the last count)",
                     fabs(k->unexplained_pct), k->drawn_kg);
        if (k->unexplained_kg > 0 && reagent_get(k->reagent)->toxic_gas)
            st = warn(l, e, NULL,
                      "stock check %s %s: %.1f kg unaccounted for%s: the book says %.1f kg, the count "
                      "%.1f kg. %s is a toxic gas: check containers, valves, lines and the scrubber "
                      "record for a leak; a release of this size may be reportable under local "
                      "rules (see the SDS and your permit)",
                      rg, when, k->unexplained_kg, share, k->book_kg, k->counted_kg, rg);
        else
            st = warn(l, e, NULL,
                      "stock check %s %s: the count (%.1f kg) is %.1f kg %s the book (%.1f kg)%s; "
                      "check the weighings, the draws booked and the deliveries",
                      rg, when, k->counted_kg, fabs(k->unexplained_kg),
                      k->unexplained_kg > 0 ? "below" : "above", k->book_kg, share);
    }
    return st;
}

static void collect_cautions(struct ledger *l)
{
    for (int i = 0; i < l->nruns; i++) {
        const struct ledger_run *r = &l->runs[i];
        l->cautions_mask |= 1u << reagent_get(r->reagent)->caution;
        for (int v = 0; v < VS_COUNT; v++)
            if (r->bal.vent_mol[v] > 0 || r->bal.retained_mol[v] > 0)
                l->cautions_mask |= 1u << vent_caution(v);
        if (r->scrubber_index >= 0 && r->bal.vent_mol[VS_CL2] > 0)
            l->cautions_mask |= 1u << CA_NAOCL; /* Cl2 on caustic makes hypochlorite liquor */
    }
    /* the base each liquor is made up with; a water unit keeps the caustic caution it has
     * always carried */
    for (int u = 0; u < l->nscrubbers; u++)
        l->cautions_mask |= 1u << (l->scrubbers[u].base >= 0 ? reagent_get(l->scrubbers[u].base)->caution
                                                              : CA_NAOH);
}

/* "2 " for a coefficient of 2, "" for 1: a reaction written as chemists write it. */
static void coef_text(double k, char *out, size_t n)
{
    if (k == 1)
        out[0] = '\0';
    else
        snprintf(out, n, "%g ", k);
}

/* The reaction of vent gas v in liquor q, written from its row ("HCl + 0.5 Na2CO3 -> NaCl +
 * 0.5 H2O + 0.5 CO2"): the Assumptions rows of a liquor quote what its row says. */
static void reaction_text(const struct liquor_info *q, int v, char *out, size_t n)
{
    const struct liquor_gas *g = &q->gas[v];
    char k[32];
    size_t len = 0;
    coef_text(g->base_mol, k, sizeof k);
    len += (size_t)snprintf(out + len, n - len, "%s + %s%s", vent_name(v), k, reagent_get(q->base)->name);
    if (g->water_mol < 0 && len < n) { /* the reaction takes water up */
        coef_text(-g->water_mol, k, sizeof k);
        len += (size_t)snprintf(out + len, n - len, " + %sH2O", k);
    }
    const char *sep = " -> ";
    for (int i = 0; i < LQ_MAX_SALTS && len < n; i++)
        if (g->salt[i] >= 0) {
            coef_text(g->salt_mol[i], k, sizeof k);
            len += (size_t)snprintf(out + len, n - len, "%s%s%s", sep, k, liquor_salt_get(g->salt[i])->name);
            sep = " + ";
        }
    if (g->water_mol > 0 && len < n) {
        coef_text(g->water_mol, k, sizeof k);
        len += (size_t)snprintf(out + len, n - len, "%s%sH2O", sep, k);
    }
    if (g->co2_mol > 0 && len < n) {
        coef_text(g->co2_mol, k, sizeof k);
        snprintf(out + len, n - len, " + %sCO2 (given off)", k);
    }
}

/* Assumption rows of a liquor with a base other than caustic (whose rows are written as
 * before): per gas it neutralises, the base used, the CO2 given off and the heat. */
static enum hl_status assume_liquor(struct ledger *l, struct hl_err *e, int liquor)
{
    const struct liquor_info *q = liquor_get(liquor);
    const char *base = reagent_get(q->base)->name;
    char what[160], origin[240], eq[160];
    enum hl_status st = HL_OK;
    for (int v = 0; v < VS_COUNT && !st; v++) {
        const struct liquor_gas *g = &q->gas[v];
        if (g->uptake != LQ_REACTS)
            continue;
        reaction_text(q, v, eq, sizeof eq);
        snprintf(origin, sizeof origin, "liquor reaction (%s liquor): %s", q->name, eq);
        snprintf(what, sizeof what, "%s consumed per mol of %s", base, vent_name(v));
        st = assume(l, e, what, 1, g->base_mol, "mol/mol", origin);
        if (!st && g->co2_mol > 0) {
            snprintf(what, sizeof what, "CO2 given off per mol of %s (%s liquor)", vent_name(v), q->name);
            st = assume(l, e, what, 1, g->co2_mol, "mol/mol", origin);
        }
        if (!st) {
            snprintf(what, sizeof what, "Heat of absorption of %s in %s liquor", vent_name(v), q->name);
            st = assume(l, e, what, 1, scrub_heat_kj_per_mol(v, liquor), "kJ/mol released",
                        "standard enthalpies of formation: NBS tables (Wagman et al. 1982), CODATA Key Values (Cox, Wagman & Medvedev 1989)");
        }
    }
    return st;
}

/* The caustic rows stand unless the campaign's units all hold a liquor with another base
 * (a water-only campaign keeps them: caustic is the liquor a unit gets by default). */
static int caustic_rows_apply(const struct campaign *c)
{
    int other = 0;
    for (int u = 0; u < c->nscrubbers; u++) {
        int b = liquor_get(c->scrubbers[u].liquor)->base;
        if (b == RG_NAOH)
            return 1;
        other += b >= 0;
    }
    return other == 0;
}

static enum hl_status collect_assumptions(const struct campaign *c, struct ledger *l, struct hl_err *e)
{
    enum hl_status st;
    if ((st = assume(l, e, "Standard atomic weights", 0, 0, NULL,
                     "CIAAW 2021 standard atomic weights (abridged values)")) ||
        (st = assume(l, e, "Temperature scaling of per-H reactivity", 0, 0, NULL,
                     "r(T) = r(Tref)^(Tref/T) in kelvin: equal pre-exponential factors for all "
                     "site classes, so only the activation energies differ")) ||
        (st = assume(l, e, "Later halogenation steps", 0, 0, NULL,
                     "k_n = overhalogenation_factor^n x sum over site classes of (H left) x "
                     "(per-H reactivity); each step removes one H split over the classes as the "
                     "first-step isomer shares are (expected-value depletion; with all H alike "
                     "this is the plain H-count rule). Replaced by rate_ratios where given")))
        return st;
    for (int q = 0; q < LQ_COUNT; q++) { /* each other liquor with a base that a unit holds */
        int used = 0;
        for (int u = 0; u < c->nscrubbers; u++)
            used |= c->scrubbers[u].liquor == q;
        int b = liquor_get(q)->base;
        if (used && b >= 0 && b != RG_NAOH && (st = assume_liquor(l, e, q)))
            return st;
    }
    int caustic = caustic_rows_apply(c);
    char what[160];
    for (int v = 0; v < VS_COUNT && caustic; v++) {
        snprintf(what, sizeof what, "Heat of absorption of %s in caustic liquor", vent_name(v));
        if ((st = assume(l, e, what, 1, scrub_heat_kj_per_mol(v, 0), "kJ/mol released",
                         "standard enthalpies of formation: NBS tables (Wagman et al. 1982), CODATA Key Values (Cox, Wagman & Medvedev 1989)")))
            return st;
    }
    if ((st = assume(l, e, "Heat of Na2SO3 + NaOCl -> Na2SO4 + NaCl in the liquor", 1,
                     scrub_sulfite_redox_kj_per_mol(SALT_NAOCL), "kJ/mol released",
                     "standard enthalpies of formation: NBS tables (Wagman et al. 1982), CODATA Key Values (Cox, Wagman & Medvedev 1989)")) ||
        (st = assume(l, e, "Heat of Na2SO3 + NaOBr -> Na2SO4 + NaBr in the liquor", 1,
                     scrub_sulfite_redox_kj_per_mol(SALT_NAOBR), "kJ/mol released",
                     "standard enthalpies of formation: NBS tables (Wagman et al. 1982), CODATA Key Values (Cox, Wagman & Medvedev 1989)")) ||
        (st = assume(l, e, "Liquor temperature", 0, 0, NULL,
                     "adiabatic: heat piles up within a group of overlapping runs; an idle unit "
                     "is back at fresh_liquor_temp_c (default 25 C) before the next group; no "
                     "cooler is modelled (common practice assumption)")) ||
        (st = assume(l, e, "Highest liquor temperature before a cooling warning", 1, 40, "C",
                     "default of max_liquor_temp_c: hypochlorite liquor turns to chlorate faster "
                     "and absorbs chlorine worse when hot (common practice)")))
        return st;
    for (int v = 0; v < VS_COUNT && caustic; v++) {
        snprintf(what, sizeof what, "NaOH consumed per mol of %s", vent_name(v));
        if ((st = assume(l, e, what, 1, scrub_naoh_per_mol(v), "mol/mol",
                         "liquor reactions: HX + NaOH -> NaX + H2O; X2 + 2 NaOH -> NaX + NaOX + H2O; SO2 + 2 NaOH -> Na2SO3 + H2O")))
            return st;
    }
    return HL_OK;
}

/* The reporting threshold in force and its assumption row: --all-products, else the
 * campaign's report.min_mol_fraction, else the default. */
static enum hl_status report_threshold(const struct campaign *c, const struct ledger_opts *o,
                                       struct ledger *l, struct hl_err *e)
{
    const char *what = "Reporting threshold: over-halogenated products below this share of the "
                       "substrate charged are summed into one \"other\" row per run (all totals "
                       "and balances use every product)";
    if (o && o->all_products) {
        l->report_min_mol_fraction = 0;
        return assume(l, e, what, 1, 0, "mol/mol", "--all-products: every product listed");
    }
    l->report_min_mol_fraction = c->report_min_mol_fraction;
    return assume(l, e, what, 1, l->report_min_mol_fraction, "mol/mol",
                  c->report_min_mol_fraction_given ? "campaign report.min_mol_fraction"
                                                   : camp_origin_min_mol_fraction);
}

static enum hl_status copy_identity(const struct campaign *c, const struct ledger_opts *o,
                                    struct ledger *l, struct hl_err *e)
{
    l->title = hl_strdup(c->title);
    l->site = hl_strdup(c->site);
    l->paper_letter = c->paper == CAMP_PAPER_LETTER;
    l->file = hl_strdup(c->file);
    if ((c->title && !l->title) || (c->site && !l->site) || (c->file && !l->file))
        return nomem(e);
    if (c->nsets && !(l->overrides = hl_calloc((size_t)c->nsets, sizeof *l->overrides)))
        return nomem(e);
    for (; l->noverrides < c->nsets; l->noverrides++)
        if (!(l->overrides[l->noverrides] = hl_strdup(c->sets[l->noverrides])))
            return nomem(e);
    l->today_min = o ? o->today_min : -1;
    /* Document time: the campaign's issued date wins, then the caller's (SOURCE_DATE_EPOCH),
     * else 0 = a fixed stamp chosen by the writers. Never the wall clock. */
    l->created_min = c->issued_min >= 0 ? c->issued_min : (o && o->created_min >= 0 ? o->created_min : 0);
    return HL_OK;
}

/* consume: the same campaign, whose runs may be freed once the balances are taken */
static enum hl_status build(const struct campaign *c, struct campaign *consume,
                            const struct ledger_opts *o, struct ledger **out, struct hl_err *e)
{
    *out = NULL;
    struct ledger *l = hl_calloc(1, sizeof *l);
    if (!l)
        return nomem(e);
    enum hl_status st;
    if ((st = copy_identity(c, o, l, e)) || (st = collect_assumptions(c, l, e)) ||
        (st = report_threshold(c, o, l, e)) || (st = balance_runs(c, o, l, l->report_min_mol_fraction, e)))
        goto fail;
    camp_free_runs(consume); /* nothing below reads c->runs */
    if ((st = run_scrubbers(c, l, e)) || (st = stock_checks(c, l, e)) || (st = plan_orders(c, l, e)) ||
        (st = own_container_names(l, e)) || (st = orders_on_line(l, e)) || (st = build_months(l, e)) ||
        (st = collect_warnings(c, l, e)) || (st = close_warnings(l, e)))
        goto fail;
    if ((st = build_emissions(c, l, e)) || (st = report_emissions(c, l, e)))
        goto fail;
    collect_cautions(l);
    *out = l;
    return HL_OK;
fail:
    ledger_free(l);
    return st;
}

enum hl_status ledger_build(const struct campaign *c, const struct ledger_opts *o,
                            struct ledger **out, struct hl_err *e)
{
    return build(c, NULL, o, out, e);
}

enum hl_status ledger_build_consuming(struct campaign *c, const struct ledger_opts *o,
                                      struct ledger **out, struct hl_err *e)
{
    return build(c, c, o, out, e);
}

void ledger_free(struct ledger *l)
{
    if (!l)
        return;
    hl_free(l->runs); /* their texts and product tables: l->strings */
    for (int i = 0; i < l->nmonths; i++) {
        for (int j = 0; j < l->months[i].nproducts; j++) {
            hl_free(l->months[i].products[j].substrate_name);
            hl_free(l->months[i].products[j].substrate);
            hl_free(l->months[i].products[j].wanted);
        }
        hl_free(l->months[i].products);
    }
    hl_free(l->months);
    for (int i = 0; i < l->norders; i++)
        hl_free((char *)l->orders[i].container);
    hl_free(l->orders);
    for (int i = 0; i < l->nscrubbers; i++) {
        hl_free(l->scrubbers[i].id);
        scrub_unit_out_free(&l->scrubbers[i].out, 1);
    }
    emis_free(l->emis, l->nscrubbers, l->permit_checks, l->npermit_checks);
    hl_free(l->scrubbers);
    hl_free(l->warnings);
    hl_free(l->stock_checks);
    for (int i = 0; i < l->nassumptions; i++) {
        hl_free(l->assumptions[i].what);
        hl_free(l->assumptions[i].unit);
        hl_free(l->assumptions[i].origin);
    }
    hl_free(l->assumptions);
    hl_free(l->title);
    hl_free(l->site);
    hl_free(l->file);
    for (int i = 0; i < l->noverrides; i++)
        hl_free(l->overrides[i]);
    hl_free(l->overrides);
    pool_free(l->strings);
    hl_free(l);
}

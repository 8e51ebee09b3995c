/*
 * campaign.c - the campaign schema (see campaign.h): which keys each object takes, their
 * ranges and defaults, the checks between values, repeat expansion, dates, CSV schedules.
 *
 * Reading is in three parts: jsonpos.c checks the JSON text and gives the tree with the
 * line:column of every value, validate.c reads one value at a time with its messages, and
 * this file says what a campaign is.  The runs array is read one element at a time (each
 * its own small tree, design section 7); only the strings the models may blame (SMILES,
 * formula) are walked once more, to map their escapes.
 */
#include "campaign.h"
#include "afile.h"

#include <cjson/cJSON.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "hlmem.h"
#include "isodate.h"
#include "jsonpos.h"
#include "liquor.h"
#include "override.h"
#include "reagents.h"
#include "sched.h"
#include "validate.h"

#define MAX_ID 100            /* ids are short labels */
#define MAX_RUNS 1000000      /* expanded runs; design section 7 plans for 1e5 a year */

int camp_string_col(const struct camp_strpos *p, int k)
{
    if (k <= 0)
        return p->pos.col;
    int idx = k - 1, extra = 0; /* 0-based decoded byte; raw bytes beyond the decoded ones */
    for (int j = 0; j < p->nesc; j++) {
        const struct camp_esc *x = &p->esc[j];
        if (idx < x->at)
            break;
        if (idx < x->at + x->dec_len)
            return p->pos.col + 1 + x->at + extra; /* inside the escape: its backslash */
        extra += x->raw_len - x->dec_len;
    }
    return p->pos.col + k + extra;
}

/* ------------------------------------------------------------------ */
/* The schema                                                          */
/* ------------------------------------------------------------------ */

/* ---- Defaults: the one place where a value the file may leave out is set.  Each object
 * is filled here before its keys are read, so the campaign reaches the models with every
 * value in place and no model reads 0 as "use the default" (issue 9).  campaign.h lists
 * them with the keys; the Assumptions sheet names the origins given here. ---- */

const char camp_origin_mass_cp[] =
    "typical of organic reaction masses, 1.8-2.0 kJ/(kg K) (Stoessel, Thermal Safety of "
    "Chemical Processes, 2008); lower end taken (larger rise); from memory";
const char camp_origin_min_mol_fraction[] =
    "default: 1e-4 (0.01 %), a fifth of the 0.05 % impurity reporting threshold of ICH "
    "Q3A(R2) (from memory)";

/* Top level: no issue date, A4 paper, US container sizes (so that older campaigns order as
 * before), the reporting threshold of camp_origin_min_mol_fraction, and the month-close
 * tolerances: common practice, a container weighing reads to about 1 % of a draw, a batch
 * isolation varies by several per cent, a monthly stock count to about 1 %; the defaults flag
 * twice those. */
static void campaign_defaults(struct campaign *cp)
{
    cp->issued_min = -1;
    cp->paper = CAMP_PAPER_A4;
    cp->units = CAMP_UNITS_US;
    cp->report_min_mol_fraction = 1e-4;
    cp->tolerances = (struct camp_tolerances){5.0, 10.0, 2.0};
}

static void scrubber_defaults(struct camp_scrubber *s)
{
    s->liquor = CAMP_LIQUOR_NAOH;
    s->max_acid_wt_pct = 20;     /* near the HCl-water azeotrope, 20.2 wt% at 1 atm (from memory) */
    /* not a key: built in, under the HBr-water azeotrope, about 47.6 wt% (from memory) */
    s->max_hbr_wt_pct = 47;
    s->liquor_cp_given = 0;      /* the liquor's heat capacity from the built-in tables */
    s->fresh_liquor_temp_c = 25; /* ambient (common practice) */
    /* Hypochlorite liquor is kept below about 40 C: above it hypochlorite disproportionates
     * to chlorate faster and the liquor absorbs Cl2 worse (common practice; hot water also
     * holds less HCl, so the same default serves a water liquor). */
    s->max_liquor_temp_c = 40;
}

/* The base strengths, by the keys the scrubber's liquor reads (liquor.h enum liquor_keys),
 * set once the liquor is known.  Keep a few % free base before a changeout (common
 * practice: for caustic, and the same rule for any base).  Caustic (naoh_* keys) is bought
 * as the usual commercial 50 wt% solution; another base (base_* keys) as the dry solid,
 * dissolved on site: soda ash is sold as dense soda ash, over 99 % Na2CO3 (common
 * practice). */
static void scrubber_base_defaults(struct camp_scrubber *s, int keys)
{
    s->min_base_wt_pct = 2;
    s->makeup_base_wt_pct = keys == LQ_KEYS_BASE ? 100 : 50;
}

static void column_defaults(struct camp_column *col)
{
    col->flood_fraction = 0.7; /* common practice: design at 60-80 % of flooding */
    col->gas_temp_c = 25;
}

/* A run: no scrubber, every halogen charged reacts, 25 C, a 1 h feed vented at its mean
 * rate, nothing retained, batch, no solvent, the whole charge able to accumulate (batch,
 * worst case) and the reaction mass's heat capacity of camp_origin_mass_cp. */
static void run_defaults(struct camp_run *r)
{
    r->scrubber = -1;
    r->halogen_conversion = 1;
    r->temp_c = 25;
    r->feed_h = 1;
    r->peak_factor = 1;
    r->vent_retained_fraction = 0;
    r->mode = CAMP_BATCH;
    r->solvent_kg = 0;
    r->mass_cp_kj_kg_k = 1.8;
    r->accumulation = 1;
}

/* stock: no safety stock, no lead time; containers: no heel, for both unit systems;
 * permits: kg/h and mg/Nm3 over the clock hour */
static void stock_defaults(struct camp_stock *s) { s->safety_kg = 0; s->lead_days = 0; }
static void container_defaults(struct camp_container *ct) { ct->heel_kg = 0; ct->units = CAMP_UNITS_ANY; }
static void permit_defaults(struct camp_permit *p) { p->averaging_day = 0; }

/* Lower bounds (issue 16.2).  Each is far below any real value and far above the
 * underflow that made the models print inf; the reason is given in the message. */
static const struct val_rng R_CHARGE_KG = {1e-3, 1e9, 0, 1,  /* [1 g, 1e9) kg */
    "a charge below a gram is not weighed in a plant (common practice): check the unit", NULL};
static const struct val_rng R_NONNEG_KG = {0, 1e9, 0, 1, NULL, NULL};  /* [0, 1e9) kg */
static const struct val_rng R_TEMP_C = {-80, 400, 0, 0, NULL, NULL};   /* liquid- and gas-phase plant range */
static const struct val_rng R_REACT = {1e-6, 1e6, 0, 0,                /* relative rates */
    "relative rates span at most 1e12 (from 1e-6 to 1e6)", NULL};

/* model block */
enum { MK_RR, MK_OVERHAL, MK_RATIOS, MK_N };
static const char *const model_keys[MK_N] = {"relative_reactivity", "overhalogenation_factor",
                                             "rate_ratios"};
enum { RR_PRIMARY, RR_SECONDARY, RR_TERTIARY, RR_ALLYLIC, RR_BENZYLIC, RR_REF, RR_N };
static const char *const rr_keys[RR_N] = {"primary", "secondary", "tertiary", "allylic", "benzylic",
                                          "ref_temp_c"};

static const struct val_rng R_OVERHAL = {1e-3, 1000, 0, 0,
    "a step 1000 times slower per added halogen is already no over-halogenation", NULL};

static enum hl_status parse_model(struct val_ctx *c, const cJSON *m, struct camp_model *out)
{
    const cJSON *k[MK_N];
    size_t old = val_push_key(c, m->string);
    enum hl_status st = val_members(c, m, model_keys, MK_N, k);
    if (st)
        return st;
    memset(out, 0, sizeof *out);
    if (k[MK_RR]) {
        const cJSON *r[RR_N];
        size_t o2 = val_push_key(c, k[MK_RR]->string);
        if ((st = val_members(c, k[MK_RR], rr_keys, RR_N, r)))
            return st;
        static const unsigned bit[RR_N] = {CM_PRIMARY, CM_SECONDARY, CM_TERTIARY, CM_ALLYLIC,
                                           CM_BENZYLIC, CM_REF_TEMP};
        double *dst[RR_N] = {&out->primary, &out->secondary, &out->tertiary, &out->allylic,
                             &out->benzylic, &out->ref_temp_c};
        for (int j = 0; j < RR_N; j++) {
            if (!r[j])
                continue;
            if ((st = val_num(c, r[j], j == RR_REF ? R_TEMP_C : R_REACT, dst[j])))
                return st;
            out->set_mask |= bit[j];
        }
        val_pop(c, o2);
    }
    if (k[MK_OVERHAL]) {
        if ((st = val_num(c, k[MK_OVERHAL], R_OVERHAL, &out->overhalogenation_factor)))
            return st;
        out->set_mask |= CM_OVERHAL;
    }
    if (k[MK_RATIOS]) {
        const cJSON *a = k[MK_RATIOS];
        if ((st = val_array(c, a, 1)))
            return st;
        size_t o2 = val_push_key(c, a->string);
        int n = 0;
        for (const cJSON *x = a->child; x; x = x->next, n++) {
            size_t o3 = val_push_index(c, n);
            if (n >= CAMP_MAX_RATIOS)
                return val_err(c, x, 0, "too many rate ratios (at most %d)", CAMP_MAX_RATIOS);
            if (!cJSON_IsNumber(x))
                return val_err(c, x, 0, "must be a number (got %s)", val_tname(x));
            double v = x->valuedouble;
            if (!isfinite(v)) {
                char raw[72];
                val_raw_number(c, x, raw, sizeof raw);
                return val_err(c, x, 0, "must be a finite number (got %s)", raw);
            }
            if (!(v >= 1e-6) || v > 1e6) /* as R_REACT: relative rates span at most 1e12 */
                return val_err(c, x, 0, "must be >= 1e-06 and <= 1e6 (got %.15g)", v);
            if (n == 0 && v != 1)
                return val_err(c, x, 0, "must be 1: the ratios are relative to step 0 (got %.15g)", v);
            out->rate_ratios[n] = v;
            val_pop(c, o3);
        }
        out->nratios = n;
        out->set_mask |= CM_RATIOS;
        val_pop(c, o2);
    }
    val_pop(c, old);
    return HL_OK;
}

/* Campaign-level block under the run's own, key by key. */
static void merge_model(struct camp_model *run, const struct camp_model *camp)
{
    struct camp_model m = *camp;
    unsigned s = run->set_mask;
    if (s & CM_PRIMARY) m.primary = run->primary;
    if (s & CM_SECONDARY) m.secondary = run->secondary;
    if (s & CM_TERTIARY) m.tertiary = run->tertiary;
    if (s & CM_ALLYLIC) m.allylic = run->allylic;
    if (s & CM_BENZYLIC) m.benzylic = run->benzylic;
    if (s & CM_REF_TEMP) m.ref_temp_c = run->ref_temp_c;
    if (s & CM_OVERHAL) m.overhalogenation_factor = run->overhalogenation_factor;
    if (s & CM_RATIOS) {
        memcpy(m.rate_ratios, run->rate_ratios, sizeof m.rate_ratios);
        m.nratios = run->nratios;
    }
    m.set_mask = camp->set_mask | s;
    *run = m;
}

/* scrubbers */
enum { SK_ID, SK_LIQUOR, SK_NAOH, SK_LIQKG, SK_MIN, SK_MAXACID, SK_RATED, SK_MAKEUP, SK_CP, SK_COLUMN,
       SK_NOTE, SK_FRESHT, SK_MAXT, SK_STACK, SK_REMOVAL, SK_BASE, SK_MINBASE, SK_MKBASE, SK_N };
static const char *const scrub_keys[SK_N] = {
    "id", "liquor", "naoh_wt_pct", "liquor_kg", "min_naoh_wt_pct", "max_acid_wt_pct",
    "rated_acid_kmol_h", "makeup_naoh_wt_pct", "liquor_cp_kj_kg_k", "column", "note",
    "fresh_liquor_temp_c", "max_liquor_temp_c", "stack_nm3_h", "removal", "base_wt_pct",
    "min_base_wt_pct", "makeup_base_wt_pct"};
/* The base-strength keys of each spelling a liquor row names (enum liquor_keys): fresh,
 * minimum and make-up strength. */
enum { BK_FRESH, BK_MIN, BK_MAKEUP, BK_N };
static const int base_keys[3][BK_N] = {[LQ_KEYS_NONE] = {-1, -1, -1},
                                       [LQ_KEYS_NAOH] = {SK_NAOH, SK_MIN, SK_MAKEUP},
                                       [LQ_KEYS_BASE] = {SK_BASE, SK_MINBASE, SK_MKBASE}};
enum { CK_FP, CK_HTU, CK_REMOVAL, CK_FLOOD, CK_CARRIER, CK_LIQ, CK_GAST, CK_N };
static const char *const col_keys[CK_N] = {"packing_factor_1_m", "htu_m", "removal_fraction",
                                           "flood_fraction", "carrier_kmol_h", "liquor_kg_h",
                                           "gas_temp_c"};

static enum hl_status parse_column(struct val_ctx *c, const cJSON *m, struct camp_column *col)
{
    const cJSON *k[CK_N];
    size_t old = val_push_key(c, m->string);
    enum hl_status st = val_members(c, m, col_keys, CK_N, k);
    if (st)
        return st;
    col->present = 1;
    col->pos = val_pos(c, m);
    column_defaults(col);
    static const int required[] = {CK_FP, CK_HTU, CK_REMOVAL, CK_CARRIER, CK_LIQ};
    for (size_t j = 0; j < sizeof required / sizeof required[0]; j++)
        if (!k[required[j]])
            return val_missing(c, m, col_keys[required[j]], NULL);
    /* Floors: the loosest random packings have Fp of about 30 1/m and HTU rarely falls below
     * 0.1 m (from memory, Perry's Chemical Engineers' Handbook section 14); a column that removes
     * under 1 % or runs below 10 % of flooding is no design point; the sweep gas carries the
     * acid gas, a mole an hour is the least that could (common practice). */
    const struct val_rng rfp = {1, 1e4, 0, 0, "no packing has a packing factor below 1 1/m", NULL},
                     rhtu = {0.01, 20, 0, 0, "no packing has a transfer unit shorter than 1 cm", NULL},
                     rrem = {0.01, 1, 0, 1, "a column removing under 1 % is no absorber", NULL},
                     rflood = {0.1, 1, 0, 1, "below 10 % of flooding a column is far oversized", NULL},
                     rcar = {1e-3, 1e6, 0, 0, "the sweep gas is at least a mole an hour", NULL},
                     rliq = {1, 1e9, 0, 1, "a circulation below 1 kg/h wets no packing", NULL},
                     rgas = {-40, 200, 0, 0, NULL, NULL};
    if ((st = val_num(c, k[CK_FP], rfp, &col->packing_factor_1_m)) ||
        (st = val_num(c, k[CK_HTU], rhtu, &col->htu_m)) ||
        (st = val_num(c, k[CK_REMOVAL], rrem, &col->removal_fraction)) ||
        (k[CK_FLOOD] && (st = val_num(c, k[CK_FLOOD], rflood, &col->flood_fraction))) ||
        (st = val_num(c, k[CK_CARRIER], rcar, &col->carrier_kmol_h)) ||
        (st = val_num(c, k[CK_LIQ], rliq, &col->liquor_kg_h)) ||
        (k[CK_GAST] && (st = val_num(c, k[CK_GAST], rgas, &col->gas_temp_c))))
        return st;
    val_pop(c, old);
    return HL_OK;
}

/* The vent gases a liquor absorbs, "HCl and HBr", into buf (messages). */
static const char *absorbed_list(int liquor, char *buf, size_t n)
{
    const struct liquor_info *l = liquor_get(liquor);
    int names[VS_COUNT], nn = 0;
    for (int v = 0; v < VS_COUNT; v++)
        if (l->gas[v].uptake != LQ_PASSES)
            names[nn++] = v;
    size_t len = 0;
    buf[0] = '\0';
    for (int j = 0; j < nn && len < n; j++)
        len += (size_t)snprintf(buf + len, n - len, "%s%s", j == 0 ? "" : j == nn - 1 ? " and " : ", ",
                                vent_name(names[j]));
    return buf;
}

/* The emission keys of a scrubber (issue 12): its stack flow and the removal it is
 * credited with, species by species (the vent species names as keys). */
static enum hl_status parse_emission_keys(struct val_ctx *c, const cJSON *stack, const cJSON *rem,
                                          struct camp_scrubber *s)
{
    /* a divisor of every concentration: a stack under 0.1 Nm3/h carries no vent gas
     * (common practice floor) */
    const struct val_rng rstack = {0.1, 1e9, 0, 0, "a stack flow below 0.1 Nm3/h carries no vent gas", NULL},
                     rfrac = {0, 1, 0, 0, NULL, NULL};
    enum hl_status st;
    if (stack && (st = val_num(c, stack, rstack, &s->stack_nm3_h)))
        return st;
    if (!rem)
        return HL_OK;
    const char *names[VS_COUNT];
    const cJSON *k[VS_COUNT];
    char list[64];
    for (int v = 0; v < VS_COUNT; v++)
        names[v] = vent_name(v);
    size_t old = val_push_key(c, rem->string);
    if ((st = val_members(c, rem, names, VS_COUNT, k)))
        return st;
    for (int v = 0; v < VS_COUNT; v++) {
        if (!k[v])
            continue;
        if ((st = val_num(c, k[v], rfrac, &s->removal[v])))
            return st;
        /* the liquor model lets Cl2, Br2 and SO2 pass a water liquor: crediting it with
         * removing them would contradict the liquor figures */
        if (liquor_get(s->liquor)->gas[v].uptake == LQ_PASSES && s->removal[v] > 0) {
            val_push_key(c, names[v]);
            return val_err(c, k[v], 0, "a \"%s\" liquor absorbs only %s: %s passes it "
                        "(give 0 or leave it out)", liquor_get(s->liquor)->name,
                        absorbed_list(s->liquor, list, sizeof list), names[v]);
        }
        s->removal_given |= 1u << v;
    }
    val_pop(c, old);
    return HL_OK;
}

/* The liquors a key applies to, as '"naoh"' or '"a", "b" or "c"', into buf (messages):
 * those whose row reads base-strength spelling sp, or (sp < 0) those that dissolve HCl. */
static const char *liquors_taking(int sp, char *buf, size_t n)
{
    int ids[LQ_COUNT], nn = 0;
    for (int q = 0; q < LQ_COUNT; q++)
        if (sp >= 0 ? liquor_get(q)->keys == sp : liquor_get(q)->gas[VS_HCL].uptake == LQ_DISSOLVES)
            ids[nn++] = q;
    size_t len = 0;
    buf[0] = '\0';
    for (int j = 0; j < nn && len < n; j++)
        len += (size_t)snprintf(buf + len, n - len, "%s\"%s\"", j == 0 ? "" : j == nn - 1 ? " or " : ", ",
                                liquor_get(ids[j])->name);
    return buf;
}

/* The keys that apply to the scrubber's liquor, from its row: the base-strength keys of
 * its spelling (any other spelling is refused, naming the liquors it applies to), the fresh
 * strength required where there is a base, max_acid_wt_pct only where the liquor dissolves
 * HCl. */
static enum hl_status liquor_keys(struct val_ctx *c, const cJSON *o, const cJSON **k,
                                  const struct liquor_info *l)
{
    char names[120], what[160];
    for (int sp = LQ_KEYS_NAOH; sp <= LQ_KEYS_BASE; sp++)
        for (int j = 0; j < BK_N && sp != l->keys; j++) {
            const cJSON *x = k[base_keys[sp][j]];
            if (!x)
                continue;
            val_push_key(c, x->string);
            return val_err(c, x, 1, "applies to a %s liquor only", liquors_taking(sp, names, sizeof names));
        }
    if (l->keys != LQ_KEYS_NONE && !k[base_keys[l->keys][BK_FRESH]]) {
        snprintf(what, sizeof what, "a %s needs its fresh liquor strength", l->unit_noun);
        return val_missing(c, o, scrub_keys[base_keys[l->keys][BK_FRESH]], what);
    }
    if (k[SK_MAXACID] && l->gas[VS_HCL].uptake != LQ_DISSOLVES) {
        val_push_key(c, "max_acid_wt_pct");
        return val_err(c, k[SK_MAXACID], 1, "applies to a %s liquor only", liquors_taking(-1, names, sizeof names));
    }
    return HL_OK;
}

/* The base strengths as given (the row's spelling), and the checks between them: the least
 * below the fresh strength, the make-up at least as strong. */
static enum hl_status base_strengths(struct val_ctx *c, const cJSON **k, const struct liquor_info *l,
                                     struct camp_scrubber *s)
{
    if (l->keys == LQ_KEYS_NONE)
        return HL_OK;
    const cJSON *kw = k[base_keys[l->keys][BK_FRESH]], *kmin = k[base_keys[l->keys][BK_MIN]],
                *kmk = k[base_keys[l->keys][BK_MAKEUP]];
    const char *base = reagent_get(l->base)->name, *wkey = scrub_keys[base_keys[l->keys][BK_FRESH]],
               *minkey = scrub_keys[base_keys[l->keys][BK_MIN]];
    /* Floor (common practice): a liquor under 0.1 wt% of its base absorbs next to nothing.
     * Ceiling: the liquor row's (its tables' end or its base's solubility). */
    char floor_why[120];
    snprintf(floor_why, sizeof floor_why, "a liquor under 0.1 wt%% %s is no %s", base, l->unit_noun);
    const struct val_rng rwt = {0.1, 100, 0, 0, floor_why, NULL},
                     rmin = {0, 50, 0, 1, NULL, NULL}, rmk = {0, 100, 1, 0, NULL, NULL};
    enum hl_status st;
    if ((st = val_num(c, kw, rwt, &s->base_wt_pct)))
        return st;
    if (s->base_wt_pct > l->max_base_wt_pct) {
        val_push_key(c, kw->string);
        return val_err(c, kw, 0, "must be <= %.15g (got %.15g)%s%s", l->max_base_wt_pct, s->base_wt_pct,
                       l->max_base_why ? ": " : "", l->max_base_why ? l->max_base_why : "");
    }
    if ((kmin && (st = val_num(c, kmin, rmin, &s->min_base_wt_pct))) ||
        (kmk && (st = val_num(c, kmk, rmk, &s->makeup_base_wt_pct))))
        return st;
    if (s->min_base_wt_pct >= s->base_wt_pct) {
        const cJSON *x = kmin ? kmin : kw;
        val_push_key(c, x->string);
        return kmin ? val_err(c, x, 0, "must be < %s (%.15g)", wkey, s->base_wt_pct)
                    : val_err(c, x, 0, "must be > %s (%.15g, the default)", minkey, s->min_base_wt_pct);
    }
    if (s->makeup_base_wt_pct < s->base_wt_pct) {
        const cJSON *x = kmk ? kmk : kw;
        val_push_key(c, x->string);
        return val_err(c, x, 0, "the make-up %s (%.15g wt%%) must be at least as strong as the "
                    "liquor (%.15g wt%%)", l->makeup_noun, s->makeup_base_wt_pct, s->base_wt_pct);
    }
    return HL_OK;
}

static enum hl_status parse_scrubber(struct val_ctx *c, const cJSON *o, struct camp_scrubber *s)
{
    const cJSON *k[SK_N];
    enum hl_status st = val_members(c, o, scrub_keys, SK_N, k);
    if (st)
        return st;
    s->pos = val_pos(c, o);
    scrubber_defaults(s);
    if (!k[SK_ID])
        return val_missing(c, o, "id", NULL);
    if ((st = val_dup_str(c, k[SK_ID], VAL_TEXT | VAL_NONEMPTY, MAX_ID, &s->id)))
        return st;
    const char *liquor_names[LQ_COUNT];
    for (int q = 0; q < LQ_COUNT; q++)
        liquor_names[q] = liquor_get(q)->name;
    int liq = s->liquor;
    if (k[SK_LIQUOR] && (st = val_enum(c, k[SK_LIQUOR], liquor_names, LQ_COUNT, &liq)))
        return st;
    s->liquor = liq;
    const struct liquor_info *l = liquor_get(liq);
    scrubber_base_defaults(s, l->keys);
    if ((st = liquor_keys(c, o, k, l)))
        return st;
    /* Floors (common practice): a water liquor allowed under 0.1 wt% acid absorbs next to
     * nothing; a charge under 1 kg or a rating under a mole an hour is no plant scrubber. */
    const struct val_rng racid = {0.1, 60, 0, 0, "a water liquor changed below 0.1 wt% acid absorbs nothing", NULL},
                     rliqkg = {1, 1e9, 0, 1, "a liquor charge below 1 kg is no scrubber", NULL},
                     rrate = {1e-3, 1e6, 0, 0, "a rating below a mole an hour is no plant scrubber", NULL},
                     rcp = {0.5, 10, 0, 0, NULL, NULL},
                     rfresh = {-20, 80, 0, 0, NULL, NULL}, rmaxt = {0, 150, 1, 0, NULL, NULL};
    if ((st = base_strengths(c, k, l, s)) ||
        (!k[SK_LIQKG] && (st = val_missing(c, o, "liquor_kg", NULL))) ||
        (st = val_num(c, k[SK_LIQKG], rliqkg, &s->liquor_kg)) ||
        (k[SK_MAXACID] && (st = val_num(c, k[SK_MAXACID], racid, &s->max_acid_wt_pct))) ||
        (!k[SK_RATED] && (st = val_missing(c, o, "rated_acid_kmol_h", NULL))) ||
        (st = val_num(c, k[SK_RATED], rrate, &s->rated_acid_kmol_h)) ||
        (k[SK_CP] && (st = val_num(c, k[SK_CP], rcp, &s->liquor_cp_kj_kg_k))) ||
        (k[SK_FRESHT] && (st = val_num(c, k[SK_FRESHT], rfresh, &s->fresh_liquor_temp_c))) ||
        (k[SK_MAXT] && (st = val_num(c, k[SK_MAXT], rmaxt, &s->max_liquor_temp_c))))
        return st;
    s->liquor_cp_given = k[SK_CP] != NULL;
    if (k[SK_COLUMN] && (st = parse_column(c, k[SK_COLUMN], &s->column)))
        return st;
    if ((st = parse_emission_keys(c, k[SK_STACK], k[SK_REMOVAL], s)))
        return st;
    const char *note;
    if (k[SK_NOTE] && (st = val_str(c, k[SK_NOTE], 0, VAL_MAX_TEXT, &note)))
        return st;
    return HL_OK;
}

/* stock */
enum { TK_REAGENT, TK_ONHAND, TK_SAFETY, TK_LEAD, TK_NOTE, TK_N };
static const char *const stock_keys[TK_N] = {"reagent", "on_hand_kg", "safety_kg", "lead_days", "note"};

static enum hl_status parse_stock(struct val_ctx *c, const cJSON *o, struct camp_stock *s)
{
    const cJSON *k[TK_N];
    enum hl_status st = val_members(c, o, stock_keys, TK_N, k);
    if (st)
        return st;
    s->pos = val_pos(c, o);
    stock_defaults(s);
    const struct val_rng rlead = {0, 3650, 0, 0, NULL, NULL};
    s->pos_lead_days = k[TK_LEAD] ? val_pos(c, k[TK_LEAD]) : s->pos;
    const char *note;
    if ((!k[TK_REAGENT] && (st = val_missing(c, o, "reagent", NULL))) ||
        (st = val_reagent(c, k[TK_REAGENT], 1, &s->reagent)) ||
        (!k[TK_ONHAND] && (st = val_missing(c, o, "on_hand_kg", NULL))) ||
        (st = val_num(c, k[TK_ONHAND], R_NONNEG_KG, &s->on_hand_kg)) ||
        (k[TK_SAFETY] && (st = val_num(c, k[TK_SAFETY], R_NONNEG_KG, &s->safety_kg))) ||
        (k[TK_LEAD] && (st = val_num(c, k[TK_LEAD], rlead, &s->lead_days))) ||
        (k[TK_NOTE] && (st = val_str(c, k[TK_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    return HL_OK;
}

/* containers (campaign and catalog) */
enum { NK_REAGENT, NK_NAME, NK_NET, NK_HEEL, NK_NOTE, NK_WITHDRAW, NK_UNITS, NK_SOURCE, NK_N };
static const char *const cont_keys[NK_N] = {"reagent", "name", "net_kg", "heel_kg", "note",
                                            "gas_withdrawal_kg_h", "units", "source"};
/* in the order of enum camp_units */
static const char *const units_names[2] = {"us", "metric"};

static enum hl_status parse_container(struct val_ctx *c, const cJSON *o, struct camp_container *ct)
{
    const cJSON *k[NK_N];
    enum hl_status st = val_members(c, o, cont_keys, NK_N, k);
    if (st)
        return st;
    ct->pos = val_pos(c, o);
    container_defaults(ct);
    /* containers hold at least 100 g usable: laboratory bottles of NBS start there (common
     * practice); smaller would only inflate the container counts */
    const struct val_rng rnet = {0.1, 1e6, 0, 0, "no container holds less than 100 g", NULL};
    /* 10 g/h: below it a container gives nothing a reactor could run on (common practice) */
    const struct val_rng rdraw = {0.01, 1e6, 0, 0, "below 10 g/h no feed is served", NULL};
    const char *note;
    if ((!k[NK_REAGENT] && (st = val_missing(c, o, "reagent", NULL))) ||
        (st = val_reagent(c, k[NK_REAGENT], 1, &ct->reagent)) ||
        (!k[NK_NAME] && (st = val_missing(c, o, "name", NULL))) ||
        (st = val_dup_str(c, k[NK_NAME], VAL_TEXT | VAL_NONEMPTY, VAL_MAX_TEXT, &ct->name)) ||
        (!k[NK_NET] && (st = val_missing(c, o, "net_kg", NULL))) ||
        (st = val_num(c, k[NK_NET], rnet, &ct->net_kg)) ||
        (k[NK_HEEL] && (st = val_num(c, k[NK_HEEL], R_NONNEG_KG, &ct->heel_kg))) ||
        (k[NK_WITHDRAW] && (st = val_num(c, k[NK_WITHDRAW], rdraw, &ct->gas_withdrawal_kg_h))) ||
        (k[NK_NOTE] && (st = val_str(c, k[NK_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    int units = ct->units;
    if ((k[NK_UNITS] && (st = val_enum(c, k[NK_UNITS], units_names, 2, &units))) ||
        (k[NK_SOURCE] && (st = val_dup_str(c, k[NK_SOURCE], VAL_TEXT | VAL_NONEMPTY, VAL_MAX_TEXT, &ct->source))))
        return st;
    ct->units = (enum camp_units)units;
    if (ct->net_kg - ct->heel_kg < 0.1) { /* the same 100 g floor for the usable content */
        val_push_key(c, "heel_kg");
        return val_err(c, k[NK_HEEL], 0, "must be < net_kg (%.15g) by at least 0.1 kg, the least a "
                    "container holds usable (got %.15g)", ct->net_kg, ct->heel_kg);
    }
    return HL_OK;
}

/* runs */
enum { RK_ID, RK_START, RK_REACTOR, RK_SCRUB, RK_SUBSTRATE, RK_PRODUCT, RK_SUBKG, RK_REAGENT, RK_EQ,
       RK_KG, RK_CONV, RK_TEMP, RK_FEED, RK_PEAK, RK_VENT, RK_MODE, RK_REPEAT, RK_MODEL, RK_NOTE,
       RK_ACTUAL, RK_SOLVENT, RK_CP, RK_ACCUM, RK_MTT, RK_TD24, RK_N };
static const char *const run_keys[RK_N] = {
    "id", "start", "reactor", "scrubber", "substrate", "product_smiles", "substrate_kg", "reagent",
    "reagent_eq", "reagent_kg", "halogen_conversion", "temp_c", "feed_h", "peak_factor",
    "vent_retained_fraction", "reactor_mode", "repeat", "model", "note", "actual",
    "solvent_kg", "mass_cp_kj_kg_k", "accumulation", "mtt_c", "td24_c"};
enum { UK_NAME, UK_SMILES, UK_FORMULA, UK_N };
static const char *const sub_keys[UK_N] = {"name", "smiles", "formula"};
enum { PK_COUNT, PK_EVERY, PK_N };
static const char *const rep_keys[PK_N] = {"count", "every_days"};
static const char *const mode_names[2] = {"batch", "cstr"};

static void run_free(struct camp_run *r)
{
    hl_free(r->id);
    hl_free(r->reactor);
    hl_free(r->substrate_name);
    hl_free(r->smiles);
    hl_free(r->formula);
    hl_free(r->product_smiles);
    hl_free(r->sp_smiles.esc);
    hl_free(r->sp_formula.esc);
    hl_free(r->sp_product_smiles.esc);
    if (r->own_model)
        hl_free(r->model);
    memset(r, 0, sizeof *r);
}

/* Atoms of a SMILES, counted as its reader will (organic-subset letters outside brackets,
 * a bracket atom as one; Cl and Br as one); 0 if at most CAMP_MAX_SMILES_ATOMS, else the
 * 1-based byte of the first atom beyond.  Malformed text is the SMILES reader's to refuse. */
static int smiles_over_limit(const char *s)
{
    int n = 0;
    for (int i = 0; s[i]; i++) {
        char ch = s[i];
        int atom = 0;
        if (ch == '[') {
            atom = 1;
            while (s[i + 1] && s[i] != ']')
                i++;
        } else if ((ch >= 'A' && ch <= 'Z') || strchr("bcnops", ch)) {
            atom = !(i > 0 && ((s[i - 1] == 'C' && ch == 'l') || (s[i - 1] == 'B' && ch == 'r')));
        }
        if (atom && ++n > CAMP_MAX_SMILES_ATOMS)
            return i + 1;
    }
    return 0;
}

/* Refuse a SMILES of more atoms than the models handle well under a second. */
static enum hl_status check_smiles_size(struct val_ctx *c, const cJSON *m, const struct camp_strpos *sp,
                                        const char *smiles, const char *key)
{
    int at = smiles_over_limit(smiles);
    if (!at)
        return HL_OK;
    size_t old = val_push_key(c, key);
    struct camp_pos p = {sp->pos.line, camp_string_col(sp, at)};
    char field[160];
    jpos_field(field, sizeof field, c->prefix, c->path);
    val_pop(c, old);
    (void)m;
    return hl_err_at(c->e, HL_ERR_INPUT, p.line, p.col, field,
                     "more than %d atoms (this one is atom %d): every symmetry class gives a product "
                     "structure of the whole molecule, so the cost grows with the square of the size",
                     CAMP_MAX_SMILES_ATOMS, CAMP_MAX_SMILES_ATOMS + 1);
}

static enum hl_status parse_substrate(struct val_ctx *c, const cJSON *m, struct camp_run *r)
{
    const cJSON *k[UK_N];
    size_t old = val_push_key(c, m->string);
    enum hl_status st = val_members(c, m, sub_keys, UK_N, k);
    if (st)
        return st;
    if (k[UK_NAME] && (st = val_dup_str(c, k[UK_NAME], VAL_TEXT | VAL_NONEMPTY, VAL_MAX_TEXT, &r->substrate_name)))
        return st;
    if (!k[UK_SMILES] && !k[UK_FORMULA])
        return val_missing(c, m, "smiles", "give the substrate's smiles (or its formula)");
    if (k[UK_SMILES] && k[UK_FORMULA]) {
        val_push_key(c, "formula");
        return val_err(c, k[UK_FORMULA], 1, "give smiles or formula, not both");
    }
    if (k[UK_SMILES]) {
        if ((st = val_dup_str(c, k[UK_SMILES], VAL_TEXT | VAL_NONEMPTY, VAL_MAX_TEXT, &r->smiles)))
            return st;
        r->pos_smiles = val_pos(c, k[UK_SMILES]);
        if ((st = val_esc_map(c, k[UK_SMILES], &r->sp_smiles)) ||
            (st = check_smiles_size(c, k[UK_SMILES], &r->sp_smiles, r->smiles, "smiles")))
            return st;
    } else {
        if ((st = val_dup_str(c, k[UK_FORMULA], VAL_TEXT | VAL_NONEMPTY, VAL_MAX_TEXT, &r->formula)))
            return st;
        r->pos_formula = val_pos(c, k[UK_FORMULA]);
        if ((st = val_esc_map(c, k[UK_FORMULA], &r->sp_formula)))
            return st;
    }
    val_pop(c, old);
    return HL_OK;
}

struct reader {
    struct val_ctx c;
    struct campaign *camp;
    struct camp_model model;   /* campaign-level */
    struct val_idset scrub_ids;
    size_t runs_cap;
    const struct camp_opts *opts; /* may be NULL */
    int nentries;               /* runs[] entries and schedule rows so far (src_index) */
};

/* ---- run actuals: what happened to a run.  The one place their fields are named, ranged
 * and checked against each other, so that a schedule's actual_* columns go through the
 * same rules as runs[].actual: fill a struct camp_actual with actual_field() per value,
 * then actual_conflict() once. ---- */
enum { AC_STATUS, AC_REAGENT, AC_PRODUCT, AC_NAOH, AC_END, AC_NOTE, AC_N };
static const char *const actual_keys[AC_N] = {"status", "reagent_kg", "product_kg", "naoh_kg", "end",
                                              "note"};
static const char *const status_names[2] = {"done", "cancelled"};
/* The figures' ranges: a done run's draw has the floor of a charge (1 g), since the balance
 * is computed from it; product and caustic may be 0 (a batch that made nothing). */
static const struct val_rng R_ACTUAL_DRAW = {1e-3, 1e9, 0, 1, "a run that drew less than 1 g drew "
                                         "nothing: give status \"cancelled\"", NULL};

/* Store value x (already range-checked with actual_range) of figure key k. */
static void actual_set_num(struct camp_actual *a, int k, double x)
{
    if (k == AC_REAGENT) { a->reagent_kg = x; a->given |= CAMP_ACT_REAGENT_KG; }
    if (k == AC_PRODUCT) { a->product_kg = x; a->given |= CAMP_ACT_PRODUCT_KG; }
    if (k == AC_NAOH) { a->naoh_kg = x; a->given |= CAMP_ACT_NAOH_KG; }
}

static struct val_rng actual_range(int k) { return k == AC_REAGENT ? R_ACTUAL_DRAW : R_NONNEG_KG; }

/* After every field of run r's actual is read: the key to blame (AC_*) with why in msg, or
 * -1 when the fields agree. */
static int actual_conflict(const struct camp_run *r, const struct camp_actual *a, char *msg, size_t n)
{
    static const unsigned bit[AC_N] = {0, CAMP_ACT_REAGENT_KG, CAMP_ACT_PRODUCT_KG, CAMP_ACT_NAOH_KG,
                                       CAMP_ACT_END, 0};
    for (int k = AC_REAGENT; k <= AC_END; k++) {
        if (!(a->given & bit[k]))
            continue;
        if (a->status == CAMP_PLANNED) {
            snprintf(msg, n, "a run still planned has no measured figures: give \"status\": \"done\" "
                     "(or \"cancelled\")");
            return k;
        }
        if (a->status == CAMP_CANCELLED && k != AC_END) {
            snprintf(msg, n, "a cancelled run draws nothing and makes nothing: give \"status\": "
                     "\"done\" for a run that drew reagent");
            return k;
        }
    }
    if ((a->given & CAMP_ACT_END) && a->end_min < r->start_min) {
        char when[24];
        isodate_format(r->start_min, 0, when, sizeof when);
        snprintf(msg, n, "the run ends before it starts (%s)", when);
        return AC_END;
    }
    return -1;
}

static enum hl_status parse_actual(struct val_ctx *c, const cJSON *m, struct camp_run *r)
{
    struct camp_actual *a = &r->actual;
    size_t old = val_push_key(c, "actual");
    const cJSON *k[AC_N];
    enum hl_status st = val_members(c, m, actual_keys, AC_N, k);
    if (st)
        return st;
    a->pos = a->pos_status = val_pos(c, m);
    int status = 0;
    if (k[AC_STATUS]) {
        if ((st = val_enum(c, k[AC_STATUS], status_names, 2, &status)))
            return st;
        a->status = status ? CAMP_CANCELLED : CAMP_DONE;
        a->pos_status = val_pos(c, k[AC_STATUS]);
    }
    for (int j = AC_REAGENT; j <= AC_NAOH; j++) {
        double x;
        if (k[j] && (st = val_num(c, k[j], actual_range(j), &x)))
            return st;
        if (k[j])
            actual_set_num(a, j, x);
    }
    const char *note;
    if ((k[AC_END] && (st = val_date(c, k[AC_END], &a->end_min))) ||
        (k[AC_NOTE] && (st = val_str(c, k[AC_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    if (k[AC_END])
        a->given |= CAMP_ACT_END;
    char msg[200];
    int bad = actual_conflict(r, a, msg, sizeof msg);
    if (bad >= 0) {
        val_push_key(c, actual_keys[bad]);
        return val_err(c, k[bad], 0, "%s", msg);
    }
    val_pop(c, old);
    return HL_OK;
}

/* The thermal keys of a run (thermal.h): k = the members solvent_kg, mass_cp_kj_kg_k,
 * accumulation, mtt_c, td24_c in that order. A heat capacity below 0.5 kJ/(kg K) is
 * below any liquid's (liquid hydrocarbons about 2, common practice) and would make the
 * adiabatic rise absurd; TD24 and MTT below the process temperature are contradictions. */
static enum hl_status parse_run_thermal(struct val_ctx *c, const cJSON *const *k, struct camp_run *r)
{
    const struct val_rng rcp = {0.5, 10, 0, 0, "no liquid reaction mass holds less heat (common practice)", NULL},
                     racc = {0, 1, 0, 0, NULL, NULL}, rt = {-80, 1000, 0, 0, NULL, NULL};
    enum hl_status st;
    if (!k[1])
        r->defaulted |= CAMP_DEFAULT_CP;
    if ((k[0] && (st = val_num(c, k[0], R_NONNEG_KG, &r->solvent_kg))) ||
        (k[1] && (st = val_num(c, k[1], rcp, &r->mass_cp_kj_kg_k))) ||
        (k[2] && (st = val_num(c, k[2], racc, &r->accumulation))) ||
        (k[3] && (st = val_num(c, k[3], rt, &r->mtt_c))) ||
        (k[4] && (st = val_num(c, k[4], rt, &r->td24_c))))
        return st;
    r->has_mtt = k[3] != NULL;
    r->has_td24 = k[4] != NULL;
    for (int j = 3; j <= 4; j++) {
        double v = j == 3 ? r->mtt_c : r->td24_c;
        if (k[j] && v < r->temp_c) {
            val_push_key(c, k[j]->string);
            return val_err(c, k[j], 0, "must be >= temp_c (%.15g): the process runs at temp_c, so "
                        "%s cannot lie below it (got %.15g)", r->temp_c,
                        j == 3 ? "the highest temperature the equipment tolerates" :
                                 "the decomposition onset", v);
        }
    }
    return HL_OK;
}

/* Floors: a millionth of an equivalent charged or converted is below what any analysis
 * sees (common practice); start times are kept to the minute, so a feed shorter than a
 * minute has no time of its own (and 1e-308 h made the vent rate infinite). */
static const struct val_rng req = {1e-6, 1000, 0, 0, "below a millionth of an equivalent nothing is charged", NULL},
                 rconv = {1e-6, 1, 0, 0, "below a millionth nothing measurable reacts", NULL},
                 rfeed = {1.0 / 60.0, 8760, 0, 0, "start times are kept to the minute", "1/60 (one minute)"},
                 rpeak = {1, 1000, 0, 0, NULL, NULL}, rvent = {0, 1, 0, 1, NULL, NULL};

/* The later in the file of two given values; one a --set put in (no position) counts later. */
static const cJSON *later_of(const struct val_ctx *c, const cJSON *a, const cJSON *b)
{
    const struct jpos_val *pa = val_vp(c, a), *pb = val_vp(c, b);
    return !pa || (pb && pa->off > pb->off) ? a : b;
}

/* The run's "scrubber" m: an id of scrubbers[] into r->scrubber; an unknown id gets the
 * nearest known one (within 2 edits). */
static enum hl_status parse_run_scrubber(struct reader *rd, const cJSON *m, struct camp_run *r)
{
    struct val_ctx *c = &rd->c;
    enum hl_status st;
    const char *sid;
    if ((st = val_str(c, m, VAL_TEXT | VAL_NONEMPTY, MAX_ID, &sid)))
        return st;
    r->scrubber = val_idset_find(&rd->scrub_ids, sid);
    if (r->scrubber < 0) {
        char q[64];
        val_quote(sid, q, sizeof q);
        val_push_key(c, "scrubber");
        /* suggestion only on this error path: a scan of the (few) scrubber ids */
        const char *best = NULL;
        int bd = 1000;
        for (int j = 0; j < rd->camp->nscrubbers; j++) {
            int d = hl_edit_distance(sid, rd->camp->scrubbers[j].id, 1);
            if (d < bd) { bd = d; best = rd->camp->scrubbers[j].id; }
        }
        if (!rd->camp->nscrubbers)
            return val_err(c, m, 0, "unknown scrubber \"%s\" (the campaign lists no scrubbers)", q);
        if (best && bd <= 2)
            return val_err(c, m, 0, "unknown scrubber \"%s\" (did you mean \"%s\"?)", q, best);
        return val_err(c, m, 0, "unknown scrubber \"%s\"", q);
    }
    return HL_OK;
}

/* substrate_kg, reagent and its amount (reagent_eq or reagent_kg, exactly one) of run
 * entry o (k = its members by RK_*). */
static enum hl_status parse_run_amounts(struct val_ctx *c, const cJSON *o, const cJSON *const *k,
                                        struct camp_run *r)
{
    enum hl_status st;
    if (!k[RK_SUBKG])
        return val_missing(c, o, "substrate_kg", NULL);
    if ((st = val_num(c, k[RK_SUBKG], R_CHARGE_KG, &r->substrate_kg)))
        return st;
    if (!k[RK_REAGENT])
        return val_missing(c, o, "reagent", NULL);
    if ((st = val_reagent(c, k[RK_REAGENT], 0, &r->reagent)))
        return st;
    r->pos_reagent = val_pos(c, k[RK_REAGENT]);
    if (!k[RK_EQ] && !k[RK_KG])
        return val_missing(c, o, "reagent_eq", "give reagent_eq (mol per mol substrate) or reagent_kg");
    if (k[RK_EQ] && k[RK_KG]) {
        const cJSON *later = later_of(c, k[RK_EQ], k[RK_KG]);
        val_push_key(c, later->string);
        return val_err(c, later, 1, "give reagent_eq or reagent_kg, not both");
    }
    if (k[RK_EQ]) {
        if ((st = val_num(c, k[RK_EQ], req, &r->reagent_eq)))
            return st;
        r->pos_amount = val_pos(c, k[RK_EQ]);
    } else {
        if ((st = val_num(c, k[RK_KG], R_CHARGE_KG, &r->reagent_kg)))
            return st;
        r->amount_is_kg = 1;
        r->pos_amount = val_pos(c, k[RK_KG]);
    }
    return HL_OK;
}

/* The run's "repeat" m: count and every_days, and the campaign must stay within MAX_RUNS. */
static enum hl_status parse_run_repeat(struct reader *rd, const cJSON *m, struct camp_run *r,
                                       long *count, double *every_days)
{
    struct val_ctx *c = &rd->c;
    enum hl_status st;
    const cJSON *p[PK_N];
    size_t old = val_push_key(c, "repeat");
    if ((st = val_members(c, m, rep_keys, PK_N, p)))
        return st;
    const struct val_rng revery = {1.0 / 1440.0, 3650, 0, 0, "start times are kept to the minute",
                               "1/1440 (one minute)"};
    if ((!p[PK_COUNT] && (st = val_missing(c, m, "count", NULL))) ||
        (st = val_int(c, p[PK_COUNT], 1, 10000, count)) ||
        (!p[PK_EVERY] && (st = val_missing(c, m, "every_days", NULL))) ||
        (st = val_num(c, p[PK_EVERY], revery, every_days)))
        return st;
    r->pos_repeat = val_pos(c, p[PK_COUNT]);
    r->pos_every = val_pos(c, p[PK_EVERY]);
    size_t total = (size_t)rd->camp->nruns + (size_t)*count;
    if (total > MAX_RUNS) {
        val_push_key(c, "count");
        return val_err(c, p[PK_COUNT], 0, "the campaign would hold more than %d runs", MAX_RUNS);
    }
    val_pop(c, old);
    return HL_OK;
}

/* The run's model block m (NULL: none): a run without one shares the campaign's block
 * (584 bytes a run saved), a run with one gets its own copy with the campaign's merged under. */
static enum hl_status parse_run_model(struct reader *rd, const cJSON *m, struct camp_run *r)
{
    struct val_ctx *c = &rd->c;
    enum hl_status st;
    r->own_model = m != NULL;
    r->model = rd->camp->model;
    if (r->own_model && !(r->model = hl_calloc(1, sizeof *r->model)))
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    if (m && (st = parse_model(c, m, r->model)))
        return st;
    if (r->own_model)
        merge_model(r->model, &rd->model);
    return HL_OK;
}

static enum hl_status parse_run(struct reader *rd, const cJSON *o, int idx, struct camp_run *r,
                                long *count, double *every_days)
{
    struct val_ctx *c = &rd->c;
    const cJSON *k[RK_N];
    enum hl_status st = val_members(c, o, run_keys, RK_N, k);
    if (st)
        return st;
    r->src_index = idx;
    run_defaults(r);
    r->pos = val_pos(c, o);
    *count = 0;
    if (!k[RK_ID])
        return val_missing(c, o, "id", NULL);
    if ((st = val_dup_str(c, k[RK_ID], VAL_TEXT | VAL_NONEMPTY, MAX_ID, &r->id)))
        return st;
    r->pos_id = val_pos(c, k[RK_ID]);
    if (!k[RK_START])
        return val_missing(c, o, "start", NULL);
    if ((st = val_date(c, k[RK_START], &r->start_min)))
        return st;
    r->pos_start = val_pos(c, k[RK_START]);
    if (k[RK_REACTOR] && (st = val_dup_str(c, k[RK_REACTOR], VAL_TEXT | VAL_NONEMPTY, MAX_ID, &r->reactor)))
        return st;
    if (k[RK_SCRUB] && (st = parse_run_scrubber(rd, k[RK_SCRUB], r)))
        return st;
    if (!k[RK_SUBSTRATE])
        return val_missing(c, o, "substrate", NULL);
    if ((st = parse_substrate(c, k[RK_SUBSTRATE], r)))
        return st;
    if (k[RK_PRODUCT]) {
        if ((st = val_dup_str(c, k[RK_PRODUCT], VAL_TEXT | VAL_NONEMPTY, VAL_MAX_TEXT, &r->product_smiles)))
            return st;
        r->pos_product_smiles = val_pos(c, k[RK_PRODUCT]);
        if ((st = val_esc_map(c, k[RK_PRODUCT], &r->sp_product_smiles)) ||
            (st = check_smiles_size(c, k[RK_PRODUCT], &r->sp_product_smiles, r->product_smiles,
                                    "product_smiles")))
            return st;
    }
    if ((st = parse_run_amounts(c, o, k, r)))
        return st;
    int mode = r->mode == CAMP_CSTR;
    r->defaulted = (k[RK_FEED] ? 0u : CAMP_DEFAULT_FEED_H) | (k[RK_TEMP] ? 0u : CAMP_DEFAULT_TEMP);
    r->pos_feed = k[RK_FEED] ? val_pos(c, k[RK_FEED]) : r->pos;
    if ((k[RK_CONV] && (st = val_num(c, k[RK_CONV], rconv, &r->halogen_conversion))) ||
        (k[RK_TEMP] && (st = val_num(c, k[RK_TEMP], R_TEMP_C, &r->temp_c))) ||
        (k[RK_FEED] && (st = val_num(c, k[RK_FEED], rfeed, &r->feed_h))) ||
        (k[RK_PEAK] && (st = val_num(c, k[RK_PEAK], rpeak, &r->peak_factor))) ||
        (k[RK_VENT] && (st = val_num(c, k[RK_VENT], rvent, &r->vent_retained_fraction))) ||
        (k[RK_MODE] && (st = val_enum(c, k[RK_MODE], mode_names, 2, &mode))))
        return st;
    r->mode = mode ? CAMP_CSTR : CAMP_BATCH;
    if ((st = parse_run_thermal(c, k + RK_SOLVENT, r)))
        return st;
    if (k[RK_REPEAT] && (st = parse_run_repeat(rd, k[RK_REPEAT], r, count, every_days)))
        return st;
    if ((st = parse_run_model(rd, k[RK_MODEL], r)))
        return st;
    const char *note;
    if (k[RK_NOTE] && (st = val_str(c, k[RK_NOTE], 0, VAL_MAX_TEXT, &note)))
        return st;
    if (k[RK_ACTUAL] && k[RK_REPEAT]) {
        val_push_key(c, "actual");
        return val_err(c, k[RK_ACTUAL], 1, "an actual belongs to one batch, not to every copy of a "
                    "repeat: give the runs that have happened entries of their own");
    }
    if (k[RK_ACTUAL] && (st = parse_actual(c, k[RK_ACTUAL], r)))
        return st;
    return HL_OK;
}

static enum hl_status grow_runs(struct reader *rd, size_t need)
{
    struct campaign *cp = rd->camp;
    if (need <= rd->runs_cap)
        return HL_OK;
    size_t cap = rd->runs_cap ? rd->runs_cap : 16;
    while (cap < need)
        cap *= 2;
    struct camp_run *n = hl_realloc(cp->runs, cap * sizeof *n);
    if (!n)
        return hl_err_set(rd->c.e, HL_ERR_NOMEM, "out of memory reading the campaign");
    cp->runs = n;
    rd->runs_cap = cap;
    return HL_OK;
}

static int copy_str(char **dst, const char *src)
{
    *dst = NULL;
    if (!src)
        return 0;
    *dst = hl_strdup(src);
    return *dst ? 0 : -1;
}

/* Own copy of an escape map (repeat copies are freed one by one). */
static int copy_esc(struct camp_strpos *dst, const struct camp_strpos *src)
{
    *dst = *src;
    dst->esc = NULL;
    if (!src->nesc)
        return 0;
    dst->esc = hl_malloc((size_t)src->nesc * sizeof *dst->esc);
    if (!dst->esc) {
        dst->nesc = 0;
        return -1;
    }
    memcpy(dst->esc, src->esc, (size_t)src->nesc * sizeof *dst->esc);
    return 0;
}

/* Repeat k (1-based) of template t into out. */
static enum hl_status expand_one(struct reader *rd, const struct camp_run *t, long k, double every_days,
                                 struct camp_run *out)
{
    *out = *t;
    out->id = out->reactor = out->substrate_name = out->smiles = out->formula = out->product_smiles = NULL;
    out->sp_smiles.esc = out->sp_formula.esc = out->sp_product_smiles.esc = NULL;
    size_t n = strlen(t->id) + 24;
    out->id = hl_malloc(n);
    if (t->own_model && (out->model = hl_malloc(sizeof *out->model)))
        *out->model = *t->model;
    if (!out->id || (t->own_model && !out->model) || copy_str(&out->reactor, t->reactor) || copy_str(&out->substrate_name, t->substrate_name) ||
        copy_str(&out->smiles, t->smiles) || copy_str(&out->formula, t->formula) ||
        copy_str(&out->product_smiles, t->product_smiles) || copy_esc(&out->sp_smiles, &t->sp_smiles) ||
        copy_esc(&out->sp_formula, &t->sp_formula) ||
        copy_esc(&out->sp_product_smiles, &t->sp_product_smiles)) {
        run_free(out);
        return hl_err_set(rd->c.e, HL_ERR_NOMEM, "out of memory reading the campaign");
    }
    snprintf(out->id, n, "%s-%ld", t->id, k);
    out->repeat_no = (int)k;
    out->start_min = t->start_min + llround((double)(k - 1) * every_days * 1440.0);
    return HL_OK;
}

/* ---- dates and span (issues 16.5 and 16.8), one linear pass over the expanded runs ---- */

#define SPAN_DAYS 7320 /* 20 years of 366 days: the longest campaign the models bin hour by hour */
#define DAY_MIN 1440

static int64_t floor_to(int64_t m, int64_t unit) { return (m / unit - (m % unit < 0)) * unit; }

static void run_where(const struct camp_run *r, char *buf, size_t n);
static enum hl_status run_err(struct hl_err *e, const struct camp_run *r, struct camp_pos p,
                              const char *path, const char *fmt, ...) __attribute__((format(printf, 5, 6)));

/* Where a computed date of run r is blamed: its start, or its repeat when a later copy moved it. */
static enum hl_status run_date_err(struct val_ctx *c, const struct camp_run *r, const char *fmt, ...)
    __attribute__((format(printf, 3, 4)));
static enum hl_status run_date_err(struct val_ctx *c, const struct camp_run *r, const char *fmt, ...)
{
    char msg[400], idq[64];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    val_quote(r->id, idq, sizeof idq);
    struct camp_pos p = r->repeat_no > 1 ? r->pos_every : r->pos_start;
    const char *path = r->repeat_no > 1 ? "repeat.every_days" : "start";
    if (r->repeat_no > 1)
        return run_err(c->e, r, p, path, "repeat %d (run \"%s\") %s", r->repeat_no, idq, msg);
    return run_err(c->e, r, p, path, "run \"%s\" %s", idq, msg);
}

/* Every date the ledger will show must lie in 0001-01-01 .. 9999-12-31: the run starts (also
 * those made by repeat), the ends of their feeds and the order-by dates (first use minus the
 * stock's lead time, rounded to whole days as orders.c does).  All runs, from the hour of the
 * earliest start to the hour after the latest end of a feed, must fit in SPAN_DAYS: the
 * scrubber keeps an hourly load profile over that span, so the limit is checked here, at the
 * first run (in file order) that breaks it, before any model runs. */
static enum hl_status check_dates(struct reader *rd)
{
    struct val_ctx *c = &rd->c;
    const struct campaign *cp = rd->camp;
    const struct camp_stock *lead[RG_COUNT] = {NULL};
    for (int j = 0; j < cp->nstock; j++)
        if (cp->stock[j].lead_days > 0)
            lead[cp->stock[j].reagent] = &cp->stock[j];
    int64_t lo = 0, hi = 0;
    int lo_run = -1, hi_run = -1;
    for (int i = 0; i < cp->nruns; i++) {
        const struct camp_run *r = &cp->runs[i];
        char when[24];
        if (r->start_min < ISODATE_MIN_MIN || r->start_min > ISODATE_MAX_MIN)
            return run_date_err(c, r, "would start after 9999-12-31, the last date a ledger can show");
        int64_t end = r->start_min + (int64_t)ceil(r->feed_h * 60.0);
        if (end > ISODATE_MAX_MIN) {
            isodate_format(r->start_min, 0, when, sizeof when);
            if (r->repeat_no > 1)
                return run_date_err(c, r, "starts %s and its feed would end after 9999-12-31, the last "
                                    "date a ledger can show", when);
            return run_err(c->e, r, r->pos_feed, "feed_h", "the feed of run starting %s would end after 9999-12-31, the last date a "
                             "ledger can show", when);
        }
        /* order-by dates: the reagent, and the make-up of its scrubber's base */
        int items[2] = {r->reagent, -1};
        if (r->scrubber >= 0)
            items[1] = liquor_get(cp->scrubbers[r->scrubber].liquor)->base;
        for (int k = 0; k < 2; k++) {
            const struct camp_stock *s = items[k] >= 0 ? lead[items[k]] : NULL;
            if (!s)
                continue;
            int64_t by = floor_to(r->start_min, DAY_MIN) - (int64_t)ceil(s->lead_days - 1e-9) * DAY_MIN;
            if (by >= ISODATE_MIN_MIN)
                continue;
            char field[160], idq[64], where[360];
            int si = (int)(s - cp->stock);
            run_where(r, where, sizeof where);
            snprintf(field, sizeof field, "stock[%d].lead_days", si);
            val_quote(r->id, idq, sizeof idq);
            isodate_format(r->start_min, 0, when, sizeof when);
            return hl_err_at(c->e, HL_ERR_INPUT, s->pos_lead_days.line, s->pos_lead_days.col, field,
                             "%.15g days before run \"%s\" (%s, %s) falls before 0001-01-01, the "
                             "first date a ledger can show", s->lead_days, idq, where, when);
        }
        int64_t a = floor_to(r->start_min, 60), b = -floor_to(-end, 60); /* whole hours */
        if (lo_run < 0 || a < lo) {
            lo = a;
            lo_run = i;
        }
        if (hi_run < 0 || b > hi) {
            hi = b;
            hi_run = i;
        }
        if (hi - lo > (int64_t)SPAN_DAYS * DAY_MIN) {
            const struct camp_run *o = &cp->runs[lo_run == i ? hi_run : lo_run];
            char ow[24], oq[64], where[360];
            run_where(o, where, sizeof where);
            isodate_format(o->start_min, 0, ow, sizeof ow);
            isodate_format(r->start_min, 0, when, sizeof when);
            val_quote(o->id, oq, sizeof oq);
            return run_date_err(c, r, "starting %s would make the campaign span more than %d days "
                                "(20 years): run \"%s\" (%s) starts %s; split the campaign",
                                when, SPAN_DAYS, oq, where, ow);
        }
    }
    return HL_OK;
}

/* Where run r is named in messages: "runs[3] (id at 18:12)" in the campaign, or
 * "FILE:5:1" for a schedule row (at its id). */
static void run_where(const struct camp_run *r, char *buf, size_t n)
{
    if (r->sched_file)
        snprintf(buf, n, "%.300s:%d:%d", r->sched_file, r->pos_id.line, r->pos_id.col);
    else
        snprintf(buf, n, "runs[%d]", r->src_index);
}

void camp_run_field(const struct camp_run *r, const char *path, char *buf, size_t n)
{
    const char *col = r->sched_file ? sched_column(path) : NULL;
    if (r->sched_file)
        snprintf(buf, n, "column %s", col ? col : path);
    else
        snprintf(buf, n, "runs[%d]%s%s", r->src_index, path[0] ? "." : "", path);
}

/* An error at a run's value: the field as camp_run_field, the file its row is in. */
static enum hl_status run_err(struct hl_err *e, const struct camp_run *r, struct camp_pos p,
                              const char *path, const char *fmt, ...) __attribute__((format(printf, 5, 6)));
static enum hl_status run_err(struct hl_err *e, const struct camp_run *r, struct camp_pos p,
                              const char *path, const char *fmt, ...)
{
    char msg[480], field[160];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    camp_run_field(r, path, field, sizeof field);
    hl_err_at(e, HL_ERR_INPUT, p.line, p.col, field, "%s", msg);
    if (e && r->sched_file)
        snprintf(e->file, sizeof e->file, "%s", r->sched_file);
    return HL_ERR_INPUT;
}

/* One runs entry o (index idx) or schedule row (sched_file) into the campaign, repeats expanded. */
static enum hl_status add_run(struct reader *rd, const cJSON *o, int idx, const char *sched_file)
{
    struct val_ctx *c = &rd->c;
    struct campaign *cp = rd->camp;
    struct camp_run t;
    long count = 0;
    double every = 0;
    memset(&t, 0, sizeof t);
    size_t o2 = val_push_index(c, idx);
    enum hl_status st = HL_OK;
    /* --set on this entry: o is the reader's own tree (a runs element or a schedule row) */
    if (rd->opts && rd->opts->sets)
        st = ovr_apply_run(rd->opts->sets, (cJSON *)o, c->e);
    if (!st)
        st = parse_run(rd, o, idx, &t, &count, &every);
    if (!st && (size_t)cp->nruns + (size_t)(count ? count : 1) > MAX_RUNS)
        st = val_err(c, o, 0, "the campaign would hold more than %d runs", MAX_RUNS);
    if (!st)
        st = grow_runs(rd, (size_t)cp->nruns + (size_t)(count ? count : 1));
    if (st) {
        run_free(&t);
        return st;
    }
    rd->nentries++;
    t.sched_file = sched_file;
    if (!count) {
        cp->runs[cp->nruns++] = t;
    } else {
        for (long k = 1; k <= count; k++) {
            if ((st = expand_one(rd, &t, k, every, &cp->runs[cp->nruns]))) {
                run_free(&t);
                return st;
            }
            cp->nruns++;
        }
        run_free(&t);
    }
    val_pop(c, o2);
    return HL_OK;
}

static enum hl_status parse_runs(struct reader *rd, const cJSON *arr)
{
    struct val_ctx *c = &rd->c;
    enum hl_status st = HL_OK;
    size_t old = val_push_key(c, "runs");
    const struct jpos_doc *top = c->d;
    if ((size_t)arr->valueint == top->run_vi) {
        /* streamed: each element its own tree, freed before the next is built */
        struct jpos_doc one;
        memset(&one, 0, sizeof one);
        one.run_vi = (size_t)-1;
        size_t cap = 0;
        for (size_t i = 0; i < top->nel && !st; i++) {
            if ((st = jpos_parse_span(c->text, &top->el[i], &cap, &one, c->e)))
                break;
            c->d = &one;
            st = add_run(rd, one.root, (int)i, NULL);
            c->d = top;
        }
        jpos_free(&one);
        if (st)
            return st;
    } else {
        int idx = 0;
        for (const cJSON *o = arr->child; o && !st; o = o->next, idx++)
            st = add_run(rd, o, idx, NULL);
        if (st)
            return st;
    }
    val_pop(c, old);
    return HL_OK;
}

/* ---- CSV schedules: each row is a runs[] entry built by sched.c, validated above ---- */

static int bad_text(const char *s)
{
    for (; *s; s++)
        if ((unsigned char)*s < 0x20 || *s == 0x7f)
            return 1;
    return 0;
}

struct sched_ctx { struct reader *rd; const char *file; struct jpos_val *v; size_t vcap; };

/* A row's error from the JSON-run checks: "runs[N].substrate.smiles" becomes
 * "column substrate_smiles" (the header's spelling), in the schedule file; a value that
 * is missing is placed at its empty cell when the header has the column. */
static void sched_blame(struct hl_err *e, const struct sched_row *row, const char *file)
{
    const char *path = strchr(e->field, ']');
    path = path && path[1] == '.' ? path + 2 : "";
    const char *col = sched_column(path);
    char field[160];
    snprintf(field, sizeof field, "column %s", col ? col : path[0] ? path : "id");
    for (int j = 0; col && j < row->ncols; j++)
        if (!strcmp(row->names[j], col)) {
            if (!row->given[j]) {
                e->line = row->cell[j].line;
                e->col = row->cell[j].col;
            }
            break;
        }
    snprintf(e->field, sizeof e->field, "%s", field);
    snprintf(e->file, sizeof e->file, "%s", file);
}

static enum hl_status sched_row_cb(void *data, const struct sched_row *row, struct hl_err *e)
{
    struct sched_ctx *x = data;
    struct reader *rd = x->rd;
    if (row->npos > x->vcap) {
        size_t cap = row->npos * 2;
        struct jpos_val *nv = hl_realloc(x->v, cap * sizeof *nv);
        if (!nv)
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the schedule");
        x->v = nv;
        x->vcap = cap;
    }
    for (size_t k = 0; k < row->npos; k++) {
        const struct sched_pos *p = &row->pos[k];
        x->v[k] = (struct jpos_val){p->off, p->line, p->col, p->line, p->col};
    }
    struct jpos_doc d;
    memset(&d, 0, sizeof d);
    d.v = x->v;
    d.nv = row->npos;
    d.root = row->run;
    d.run_vi = (size_t)-1;
    struct val_ctx saved = rd->c;
    rd->c.d = &d;
    rd->c.text = row->text;
    rd->c.prefix = "";
    rd->c.csv = 1;
    rd->c.plen = 0;
    rd->c.path[0] = '\0';
    val_push_key(&rd->c, "runs");
    enum hl_status st = add_run(rd, row->run, rd->nentries, x->file);
    if (st == HL_ERR_INPUT && e->line >= 0) /* not a --set value's (ovr_blame) */
        sched_blame(e, row, x->file);
    rd->c = saved;
    return st;
}

static enum hl_status read_schedule(struct reader *rd, const char *path)
{
    struct campaign *cp = rd->camp;
    char **ns = hl_realloc(cp->schedules, ((size_t)cp->nschedules + 1) * sizeof *ns);
    if (!ns)
        return hl_err_set(rd->c.e, HL_ERR_NOMEM, "out of memory reading the campaign");
    cp->schedules = ns;
    if (!(ns[cp->nschedules] = hl_strdup(path)))
        return hl_err_set(rd->c.e, HL_ERR_NOMEM, "out of memory reading the campaign");
    struct sched_ctx x = {rd, ns[cp->nschedules++], NULL, 0};
    enum hl_status st = sched_load(path, rd->opts ? rd->opts->csv_sep : 0, sched_row_cb, &x, rd->c.e);
    hl_free(x.v);
    if (st && rd->c.e && !rd->c.e->file[0])
        snprintf(rd->c.e->file, sizeof rd->c.e->file, "%s", path);
    return st;
}

/* The campaign's "schedule" (one name or an array), each relative to the campaign's folder. */
static enum hl_status parse_schedule_key(struct reader *rd, const cJSON *m)
{
    struct val_ctx *c = &rd->c;
    enum hl_status st;
    int arr = cJSON_IsArray(m);
    if (arr && (st = val_array(c, m, 1)))
        return st;
    if (!arr && !cJSON_IsString(m)) {
        val_push_key(c, "schedule");
        return val_err(c, m, 0, "must be a file name or an array of file names (got %s)", val_tname(m));
    }
    size_t old = val_push_key(c, "schedule");
    int idx = 0;
    for (const cJSON *x = arr ? m->child : m; x; x = arr ? x->next : NULL, idx++) {
        if (arr)
            val_push_index(c, idx);
        if (!cJSON_IsString(x) || !x->valuestring[0] || bad_text(x->valuestring))
            return val_err(c, x, 0, "must be a file name: a non-empty string without control characters");
        const char *name = x->valuestring;
        char *full;
        char *dir = NULL;
        if (!(name[0] == '/' || !rd->camp->file) && (st = afile_dirname(rd->camp->file, &dir, c->e)))
            return st;
        if (!dir || !strcmp(dir, ".")) {
            full = hl_strdup(name);
        } else {
            size_t n = strlen(dir) + strlen(name) + 2;
            if ((full = hl_malloc(n)))
                snprintf(full, n, "%s/%s", dir, name);
        }
        hl_free(dir);
        if (!full)
            return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
        char field[160];
        jpos_field(field, sizeof field, c->prefix, c->path);
        struct camp_pos at = val_pos(c, x);
        st = read_schedule(rd, full);
        hl_free(full);
        if (st == HL_ERR_INPUT && c->e && c->e->line == 0) {
            /* the file itself cannot be read: blame the campaign's key that names it */
            char msg[sizeof c->e->msg];
            snprintf(msg, sizeof msg, "%s", c->e->msg);
            hl_err_at(c->e, HL_ERR_INPUT, at.line, at.col, field, "%s", msg);
            c->e->file[0] = '\0';
        }
        if (st)
            return st;
        if (arr)
            val_pop(c, old + strlen(".schedule"));
    }
    val_pop(c, old);
    return HL_OK;
}

/* After every run is in: duplicate ids (also those made by repeat), then dates. */
static enum hl_status finish_runs(struct reader *rd)
{
    struct val_ctx *c = &rd->c;
    struct campaign *cp = rd->camp;
    struct val_idset ids;
    enum hl_status st;
    if (rd->opts && rd->opts->sets && (st = ovr_check_runs(rd->opts->sets, cp, c->e)))
        return st; /* a --set on a run id that is not there */
    if (val_idset_init(&ids, (size_t)cp->nruns))
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    for (int j = 0; j < cp->nruns; j++) {
        const struct camp_run *r = &cp->runs[j];
        int prev = val_idset_add(&ids, r->id, j);
        if (prev < 0)
            continue;
        const struct camp_run *p = &cp->runs[prev];
        char q[64], where[360];
        val_quote(r->id, q, sizeof q);
        val_idset_free(&ids);
        run_where(p, where, sizeof where);
        if (!p->sched_file) {
            size_t n = strlen(where);
            snprintf(where + n, sizeof where - n, "%s (id at %d:%d)",
                     !r->repeat_no && p->repeat_no ? ", made by its repeat" : "", p->pos_id.line,
                     p->pos_id.col);
        }
        if (r->repeat_no)
            return run_err(c->e, r, r->pos_id, "id", "repeat makes run id \"%s\", already used by %s",
                           q, where);
        return run_err(c->e, r, r->pos_id, "id", "run id \"%s\" is already used by %s", q, where);
    }
    val_idset_free(&ids);
    return check_dates(rd);
}

/* top level */
enum { GK_FORMAT, GK_TITLE, GK_SITE, GK_ISSUED, GK_MODEL, GK_SCRUB, GK_STOCK, GK_CONT, GK_RUNS, GK_NOTE,
       GK_REPORT, GK_DELIV, GK_COUNTS, GK_TOL, GK_PERMITS, GK_SCHED, GK_UNITS, GK_N };
static const char *const top_keys[GK_N] = {"format", "title", "site", "issued", "model", "scrubbers",
                                           "stock", "containers", "runs", "note", "report",
                                           "deliveries", "counts", "tolerances", "permits", "schedule",
                                           "units"};

/* ---- month close: deliveries, stock counts, tolerances ---- */
enum { DK_REAGENT, DK_KG, DK_DATE, DK_STATUS, DK_REF, DK_NOTE, DK_N };
static const char *const deliv_keys[DK_N] = {"reagent", "kg", "date", "status", "ref", "note"};
static const char *const deliv_status[2] = {"ordered", "received"};

static enum hl_status parse_delivery(struct val_ctx *c, const cJSON *o, struct camp_delivery *d)
{
    const cJSON *k[DK_N];
    enum hl_status st = val_members(c, o, deliv_keys, DK_N, k);
    if (st)
        return st;
    d->pos = val_pos(c, o);
    int recv = 0;
    const char *note;
    if ((!k[DK_REAGENT] && (st = val_missing(c, o, "reagent", NULL))) ||
        (st = val_reagent(c, k[DK_REAGENT], 1, &d->reagent)) ||
        (!k[DK_KG] && (st = val_missing(c, o, "kg", "the usable content delivered"))) ||
        (st = val_num(c, k[DK_KG], R_CHARGE_KG, &d->kg)) ||
        (!k[DK_DATE] && (st = val_missing(c, o, "date", "due date (ordered) or day received"))) ||
        (st = val_date(c, k[DK_DATE], &d->date_min)) ||
        (!k[DK_STATUS] && (st = val_missing(c, o, "status", "\"ordered\" or \"received\""))) ||
        (st = val_enum(c, k[DK_STATUS], deliv_status, 2, &recv)) ||
        (k[DK_REF] && (st = val_dup_str(c, k[DK_REF], VAL_TEXT | VAL_NONEMPTY, MAX_ID, &d->ref))) ||
        (k[DK_NOTE] && (st = val_str(c, k[DK_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    d->received = recv;
    return HL_OK;
}

enum { CN_REAGENT, CN_DATE, CN_KG, CN_NOTE, CN_N };
static const char *const count_keys[CN_N] = {"reagent", "date", "kg", "note"};

/* A count is a stock check against the book, which starts from stock[].on_hand_kg on the day
 * of the earliest run: a count before that day has no book to be held against. */
static enum hl_status parse_count(struct val_ctx *c, const cJSON *o, int64_t first_day_min,
                                  struct camp_count *n)
{
    const cJSON *k[CN_N];
    enum hl_status st = val_members(c, o, count_keys, CN_N, k);
    if (st)
        return st;
    n->pos = val_pos(c, o);
    const char *note;
    if ((!k[CN_REAGENT] && (st = val_missing(c, o, "reagent", NULL))) ||
        (st = val_reagent(c, k[CN_REAGENT], 0, &n->reagent)) ||
        (!k[CN_DATE] && (st = val_missing(c, o, "date", NULL))) ||
        (st = val_date(c, k[CN_DATE], &n->date_min)) ||
        (!k[CN_KG] && (st = val_missing(c, o, "kg", "weighed containers less heel"))) ||
        (st = val_num(c, k[CN_KG], R_NONNEG_KG, &n->kg)) ||
        (k[CN_NOTE] && (st = val_str(c, k[CN_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    n->pos_date = val_pos(c, k[CN_DATE]);
    if (n->date_min < first_day_min) {
        char day[24];
        isodate_format(first_day_min, 1, day, sizeof day);
        val_push_key(c, "date");
        return val_err(c, k[CN_DATE], 0, "the count is dated before the campaign, which starts %s "
                    "(the day of its earliest run): the book starts from stock[].on_hand_kg then",
                    day);
    }
    return HL_OK;
}

enum { TL_REAGENT, TL_PRODUCT, TL_STOCK, TL_NOTE, TL_N };
static const char *const tol_keys[TL_N] = {"reagent_pct", "product_pct", "stock_pct", "note"};

static enum hl_status parse_tolerances(struct val_ctx *c, const cJSON *m, struct camp_tolerances *t)
{
    const cJSON *k[TL_N];
    size_t old = val_push_key(c, "tolerances");
    enum hl_status st = val_members(c, m, tol_keys, TL_N, k);
    if (st)
        return st;
    const struct val_rng rpct = {0, 1000, 0, 0, NULL, NULL};
    const char *note;
    if ((k[TL_REAGENT] && (st = val_num(c, k[TL_REAGENT], rpct, &t->reagent_pct))) ||
        (k[TL_PRODUCT] && (st = val_num(c, k[TL_PRODUCT], rpct, &t->product_pct))) ||
        (k[TL_STOCK] && (st = val_num(c, k[TL_STOCK], rpct, &t->stock_pct))) ||
        (k[TL_NOTE] && (st = val_str(c, k[TL_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    val_pop(c, old);
    return HL_OK;
}

/* deliveries[], counts[] and tolerances, read after the runs (a count needs the first run day) */
static enum hl_status parse_close(struct val_ctx *c, struct campaign *cp, const cJSON *deliv,
                                  const cJSON *counts, const cJSON *tol)
{
    enum hl_status st;
    if (tol && (st = parse_tolerances(c, tol, &cp->tolerances)))
        return st;
    if (deliv) {
        if ((st = val_array(c, deliv, 0)))
            return st;
        cp->deliveries = hl_calloc((size_t)cJSON_GetArraySize(deliv) + 1, sizeof *cp->deliveries);
        if (!cp->deliveries)
            return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
        size_t old = val_push_key(c, "deliveries");
        int idx = 0;
        for (const cJSON *o = deliv->child; o; o = o->next, idx++) {
            size_t o2 = val_push_index(c, idx);
            cp->ndeliveries = idx + 1; /* so camp_free sees a half-read entry */
            if ((st = parse_delivery(c, o, &cp->deliveries[idx])))
                return st;
            val_pop(c, o2);
        }
        val_pop(c, old);
    }
    if (counts) {
        if ((st = val_array(c, counts, 0)))
            return st;
        cp->counts = hl_calloc((size_t)cJSON_GetArraySize(counts) + 1, sizeof *cp->counts);
        if (!cp->counts)
            return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
        int64_t first = cp->runs[0].start_min;
        for (int i = 1; i < cp->nruns; i++)
            if (cp->runs[i].start_min < first)
                first = cp->runs[i].start_min;
        first = floor_to(first, DAY_MIN);
        size_t old = val_push_key(c, "counts");
        int idx = 0;
        for (const cJSON *o = counts->child; o; o = o->next, idx++) {
            size_t o2 = val_push_index(c, idx);
            struct camp_count *n = &cp->counts[idx];
            if ((st = parse_count(c, o, first, n)))
                return st;
            cp->ncounts = idx + 1;
            /* a quadratic scan: counts are a few a month */
            for (int j = 0; j < idx; j++)
                if (cp->counts[j].reagent == n->reagent && cp->counts[j].date_min == n->date_min) {
                    const cJSON *dn = cJSON_GetObjectItemCaseSensitive(o, "date");
                    val_push_key(c, "date");
                    return val_err(c, dn, 0, "a second count of %s at this time (first at %d:%d)",
                                reagent_get(n->reagent)->name, cp->counts[j].pos.line,
                                cp->counts[j].pos.col);
                }
            val_pop(c, o2);
        }
        val_pop(c, old);
    }
    return HL_OK;
}

/* permits (issue 12): limits on what leaves a scrubber's stack */
enum { PMK_SCRUB, PMK_SPECIES, PMK_KG_H, PMK_MG_NM3, PMK_T_YR, PMK_AVG, PMK_NOTE, PMK_N };
static const char *const permit_keys[PMK_N] = {"scrubber", "species", "max_kg_h", "max_mg_nm3",
                                              "max_t_yr", "averaging", "note"};
static const char *const averaging_names[2] = {"hour", "day"};

static enum hl_status parse_permit(struct val_ctx *c, const struct val_idset *ids, const cJSON *o,
                                   struct camp_permit *p)
{
    const cJSON *k[PMK_N];
    enum hl_status st = val_members(c, o, permit_keys, PMK_N, k);
    if (st)
        return st;
    p->pos = val_pos(c, o);
    permit_defaults(p);
    if (!k[PMK_SCRUB])
        return val_missing(c, o, "scrubber", NULL);
    const char *sid;
    if ((st = val_str(c, k[PMK_SCRUB], VAL_TEXT | VAL_NONEMPTY, MAX_ID, &sid)))
        return st;
    if ((p->scrubber = val_idset_find(ids, sid)) < 0) {
        char q[64];
        val_quote(sid, q, sizeof q);
        val_push_key(c, "scrubber");
        return val_err(c, k[PMK_SCRUB], 0, "unknown scrubber \"%s\"", q);
    }
    if (!k[PMK_SPECIES])
        return val_missing(c, o, "species", NULL);
    const char *names[VS_COUNT];
    for (int v = 0; v < VS_COUNT; v++)
        names[v] = vent_name(v);
    const char *sp;
    if ((st = val_str(c, k[PMK_SPECIES], 0, VAL_MAX_TEXT, &sp)))
        return st;
    p->species = -1;
    for (int v = 0; v < VS_COUNT; v++)
        if (!strcmp(sp, names[v]))
            p->species = v;
    if (p->species < 0) {
        char q[64];
        val_quote(sp, q, sizeof q);
        val_push_key(c, "species");
        return val_err(c, k[PMK_SPECIES], 0, "unknown species \"%s\" (known: HCl, HBr, Cl2, Br2, SO2)", q);
    }
    /* floors: a limit must be above zero; these are far below any permit (common practice) */
    const struct val_rng rkg = {1e-6, 1e9, 0, 0, "a limit must be above zero (at least 1 mg/h)", NULL},
                     rmg = {1e-3, 1e9, 0, 0, "a limit must be above zero (at least 0.001 mg/Nm3)", NULL},
                     rt = {1e-6, 1e9, 0, 0, "a limit must be above zero (at least 1 g/yr)", NULL};
    int avg = p->averaging_day;
    const char *note;
    if ((k[PMK_KG_H] && (st = val_num(c, k[PMK_KG_H], rkg, &p->max_kg_h))) ||
        (k[PMK_MG_NM3] && (st = val_num(c, k[PMK_MG_NM3], rmg, &p->max_mg_nm3))) ||
        (k[PMK_T_YR] && (st = val_num(c, k[PMK_T_YR], rt, &p->max_t_yr))) ||
        (k[PMK_AVG] && (st = val_enum(c, k[PMK_AVG], averaging_names, 2, &avg))) ||
        (k[PMK_NOTE] && (st = val_str(c, k[PMK_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    if (!k[PMK_KG_H] && !k[PMK_MG_NM3] && !k[PMK_T_YR])
        return val_err(c, o, 0, "a permit needs at least one limit: max_kg_h, max_mg_nm3 or max_t_yr");
    p->averaging_day = avg;
    return HL_OK;
}

static enum hl_status parse_permits(struct reader *rd, const cJSON *a);
/* report: how the ledgers are laid out (not what they compute) */
enum { OK_PAPER, OK_MINFRAC, OK_NOTE, OK_N };
static const char *const report_keys[OK_N] = {"paper", "min_mol_fraction", "note"};
static const char *const paper_names[2] = {"A4", "Letter"};

static enum hl_status parse_report(struct val_ctx *c, const cJSON *m, struct campaign *cp)
{
    const cJSON *k[OK_N];
    const char *note;
    int paper = cp->paper == CAMP_PAPER_LETTER;
    size_t old = val_push_key(c, "report");
    enum hl_status st;
    if ((st = val_members(c, m, report_keys, OK_N, k)) ||
        (k[OK_PAPER] && (st = val_enum(c, k[OK_PAPER], paper_names, 2, &paper))) ||
        (k[OK_MINFRAC] && (st = val_num(c, k[OK_MINFRAC], (struct val_rng){0, 1, 0, 1, NULL, NULL},
                                        &cp->report_min_mol_fraction))) ||
        (k[OK_NOTE] && (st = val_str(c, k[OK_NOTE], 0, VAL_MAX_TEXT, &note))))
        return st;
    cp->paper = paper ? CAMP_PAPER_LETTER : CAMP_PAPER_A4;
    cp->report_min_mol_fraction_given = k[OK_MINFRAC] != NULL;
    val_pop(c, old);
    return HL_OK;
}
enum { AK_FORMAT, AK_NOTE, AK_CONT, AK_N };
static const char *const cat_keys[AK_N] = {"format", "note", "containers"};

static enum hl_status check_format(struct val_ctx *c, const cJSON *obj, const cJSON *m, const char *want)
{
    if (!m)
        return val_missing(c, obj, "format", NULL);
    const char *s;
    enum hl_status st = val_str(c, m, 0, VAL_MAX_TEXT, &s);
    if (st)
        return st;
    if (strcmp(s, want) == 0)
        return HL_OK;
    char q[64];
    val_quote(s, q, sizeof q);
    val_push_key(c, "format");
    return val_err(c, m, 0, "must be \"%s\" (got \"%s\")", want, q);
}

static enum hl_status parse_containers(struct val_ctx *c, const cJSON *arr, struct campaign *cp,
                                       int from_catalog, const unsigned char *skip_reagent)
{
    enum hl_status st;
    size_t old = val_push_key(c, "containers");
    int n = cJSON_GetArraySize(arr), idx = 0;
    struct camp_container *nc = hl_realloc(cp->containers, ((size_t)cp->ncontainers + (size_t)n + 1) * sizeof *nc);
    if (!nc)
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    cp->containers = nc;
    for (const cJSON *o = arr->child; o; o = o->next, idx++) {
        struct camp_container ct;
        memset(&ct, 0, sizeof ct);
        size_t o2 = val_push_index(c, idx);
        if ((st = parse_container(c, o, &ct))) {
            hl_free(ct.name);
            hl_free(ct.source);
            return st;
        }
        val_pop(c, o2);
        /* a catalog entry for a reagent the campaign lists, or sized in the other units */
        if ((skip_reagent && skip_reagent[ct.reagent]) ||
            (from_catalog && ct.units != CAMP_UNITS_ANY && ct.units != cp->units)) {
            hl_free(ct.name);
            hl_free(ct.source);
            continue;
        }
        ct.from_catalog = from_catalog;
        cp->containers[cp->ncontainers++] = ct;
    }
    val_pop(c, old);
    return HL_OK;
}

static enum hl_status parse_catalog(struct campaign *cp, const char *text, struct hl_err *e)
{
    unsigned char have[RG_COUNT] = {0};
    for (int j = 0; j < cp->ncontainers; j++)
        have[cp->containers[j].reagent] = 1;
    struct jpos_doc d;
    enum hl_status st = jpos_parse(text, strlen(text), "catalog", "catalog", 0, &d, e);
    if (st)
        return st;
    struct val_ctx c;
    memset(&c, 0, sizeof c);
    c.d = &d;
    c.text = text + 0;
    c.prefix = "catalog";
    c.e = e;
    const cJSON *k[AK_N];
    const char *note;
    if ((st = val_members(&c, d.root, cat_keys, AK_N, k)) ||
        (st = check_format(&c, d.root, k[AK_FORMAT], "haloledger-catalog/1")) ||
        (k[AK_NOTE] && (st = val_str(&c, k[AK_NOTE], 0, VAL_MAX_TEXT, &note))) ||
        (!k[AK_CONT] && (st = val_missing(&c, d.root, "containers", NULL))) ||
        (st = val_array(&c, k[AK_CONT], 0)) ||
        (st = parse_containers(&c, k[AK_CONT], cp, 1, have))) {
        jpos_free(&d);
        return st;
    }
    jpos_free(&d);
    return st;
}

/* scrubbers[] a, each id once (rd->scrub_ids, for the runs' and permits' references). */
static enum hl_status parse_scrubbers(struct reader *rd, const cJSON *a)
{
    struct val_ctx *c = &rd->c;
    struct campaign *cp = rd->camp;
    enum hl_status st;
    if ((st = val_array(c, a, 0)))
        return st;
    int n = cJSON_GetArraySize(a);
    cp->scrubbers = hl_calloc((size_t)n + 1, sizeof *cp->scrubbers);
    if (!cp->scrubbers || val_idset_init(&rd->scrub_ids, (size_t)n))
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    size_t old = val_push_key(c, "scrubbers");
    int idx = 0;
    for (const cJSON *o = a->child; o; o = o->next, idx++) {
        size_t o2 = val_push_index(c, idx);
        struct camp_scrubber *s = &cp->scrubbers[idx];
        cp->nscrubbers = idx + 1; /* so camp_free sees a half-read entry */
        if ((st = parse_scrubber(c, o, s)))
            return st;
        int prev = val_idset_add(&rd->scrub_ids, s->id, idx);
        if (prev >= 0) {
            const cJSON *idn = cJSON_GetObjectItemCaseSensitive(o, "id");
            val_push_key(c, "id");
            return val_err(c, idn, 0, "duplicate scrubber id (first at %d:%d)",
                        cp->scrubbers[prev].pos.line, cp->scrubbers[prev].pos.col);
        }
        val_pop(c, o2);
    }
    val_pop(c, old);
    return HL_OK;
}

/* stock[] a, one entry per reagent. */
static enum hl_status parse_stocks(struct val_ctx *c, struct campaign *cp, const cJSON *a)
{
    enum hl_status st;
    if ((st = val_array(c, a, 0)))
        return st;
    int n = cJSON_GetArraySize(a);
    cp->stock = hl_calloc((size_t)n + 1, sizeof *cp->stock);
    if (!cp->stock)
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    int first[RG_COUNT];
    for (int j = 0; j < RG_COUNT; j++)
        first[j] = -1;
    size_t old = val_push_key(c, "stock");
    int idx = 0;
    for (const cJSON *o = a->child; o; o = o->next, idx++) {
        size_t o2 = val_push_index(c, idx);
        struct camp_stock *s = &cp->stock[idx];
        if ((st = parse_stock(c, o, s)))
            return st;
        cp->nstock = idx + 1;
        if (first[s->reagent] >= 0) {
            const cJSON *rn = cJSON_GetObjectItemCaseSensitive(o, "reagent");
            val_push_key(c, "reagent");
            return val_err(c, rn, 0, "a second stock entry for %s (first at %d:%d)",
                        reagent_get(s->reagent) ? reagent_get(s->reagent)->name : "?",
                        cp->stock[first[s->reagent]].pos.line, cp->stock[first[s->reagent]].pos.col);
        }
        first[s->reagent] = idx;
        val_pop(c, o2);
    }
    val_pop(c, old);
    return HL_OK;
}

static enum hl_status parse_top(struct reader *rd, const cJSON *root)
{
    struct val_ctx *c = &rd->c;
    struct campaign *cp = rd->camp;
    const cJSON *k[GK_N];
    enum hl_status st = val_members(c, root, top_keys, GK_N, k);
    if (st)
        return st;
    if ((st = check_format(c, root, k[GK_FORMAT], "haloledger-campaign/1")))
        return st;
    const char *note;
    if ((k[GK_TITLE] && (st = val_dup_str(c, k[GK_TITLE], VAL_TEXT, VAL_MAX_TEXT, &cp->title))) ||
        (k[GK_SITE] && (st = val_dup_str(c, k[GK_SITE], VAL_TEXT, VAL_MAX_TEXT, &cp->site))) ||
        (k[GK_ISSUED] && (st = val_date(c, k[GK_ISSUED], &cp->issued_min))) ||
        (k[GK_NOTE] && (st = val_str(c, k[GK_NOTE], 0, VAL_MAX_TEXT, &note))) ||
        (k[GK_MODEL] && (st = parse_model(c, k[GK_MODEL], &rd->model))) ||
        (k[GK_REPORT] && (st = parse_report(c, k[GK_REPORT], cp))))
        return st;
    int units = cp->units;
    if (k[GK_UNITS] && (st = val_enum(c, k[GK_UNITS], units_names, 2, &units)))
        return st;
    cp->units = (enum camp_units)units;
    if (k[GK_MODEL]) {
        cp->has_model = 1;
        cp->pos_model = val_pos(c, k[GK_MODEL]);
    }
    if (k[GK_SCRUB] && (st = parse_scrubbers(rd, k[GK_SCRUB])))
        return st;
    if (k[GK_STOCK] && (st = parse_stocks(c, cp, k[GK_STOCK])))
        return st;
    if (k[GK_CONT]) {
        if ((st = val_array(c, k[GK_CONT], 0)) || (st = parse_containers(c, k[GK_CONT], cp, 0, NULL)))
            return st;
    }
    if (k[GK_PERMITS] && (st = parse_permits(rd, k[GK_PERMITS])))
        return st;
    if (!(cp->model = hl_malloc(sizeof *cp->model)))
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    *cp->model = rd->model;
    int scheduled = k[GK_SCHED] || (rd->opts && rd->opts->nschedules > 0);
    if (!k[GK_RUNS] && !scheduled)
        return val_missing(c, root, "runs", NULL);
    if (k[GK_RUNS] && ((st = val_array(c, k[GK_RUNS], !scheduled)) || (st = parse_runs(rd, k[GK_RUNS]))))
        return st;
    if (k[GK_SCHED] && (st = parse_schedule_key(rd, k[GK_SCHED])))
        return st;
    for (int j = 0; rd->opts && j < rd->opts->nschedules; j++)
        if ((st = read_schedule(rd, rd->opts->schedules[j])))
            return st;
    if (!cp->nruns) {
        val_push_key(c, k[GK_RUNS] ? "runs" : "schedule");
        return val_err(c, k[GK_RUNS] ? k[GK_RUNS] : k[GK_SCHED] ? k[GK_SCHED] : root, 0,
                    "no runs: the campaign and its schedules hold none");
    }
    if ((st = finish_runs(rd)))
        return st;
    return parse_close(c, cp, k[GK_DELIV], k[GK_COUNTS], k[GK_TOL]);
}

static enum hl_status parse_permits(struct reader *rd, const cJSON *a)
{
    struct val_ctx *c = &rd->c;
    struct campaign *cp = rd->camp;
    enum hl_status st;
    if ((st = val_array(c, a, 0)))
        return st;
    int n = cJSON_GetArraySize(a), idx = 0;
    cp->permits = hl_calloc((size_t)n + 1, sizeof *cp->permits);
    if (!cp->permits)
        return hl_err_set(c->e, HL_ERR_NOMEM, "out of memory reading the campaign");
    size_t old = val_push_key(c, "permits");
    for (const cJSON *o = a->child; o; o = o->next, idx++) {
        size_t o2 = val_push_index(c, idx);
        if ((st = parse_permit(c, &rd->scrub_ids, o, &cp->permits[idx])))
            return st;
        cp->npermits = idx + 1;
        val_pop(c, o2);
    }
    val_pop(c, old);
    return HL_OK;
}

enum hl_status camp_parse(const char *text, size_t len, const char *path, const char *catalog_text,
                          struct campaign **out, struct hl_err *e)
{
    return camp_parse_opts(text, len, path, catalog_text, NULL, out, e);
}

/* The --set arguments as given, for the ledger to show that it is a what-if. */
static enum hl_status keep_sets(struct campaign *cp, const struct ovr_list *l, struct hl_err *e)
{
    if (!l->n)
        return HL_OK;
    if (!(cp->sets = hl_calloc((size_t)l->n, sizeof *cp->sets)))
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the campaign");
    for (; cp->nsets < l->n; cp->nsets++)
        if (!(cp->sets[cp->nsets] = hl_strdup(l->v[cp->nsets].arg)))
            return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the campaign");
    return HL_OK;
}

enum hl_status camp_parse_opts(const char *text, size_t len, const char *path, const char *catalog_text,
                               const struct camp_opts *o, struct campaign **out, struct hl_err *e)
{
    hl_err_clear(e);
    *out = NULL;
    struct reader rd;
    memset(&rd, 0, sizeof rd);
    struct campaign *cp = hl_calloc(1, sizeof *cp);
    if (!cp)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the campaign");
    campaign_defaults(cp);
    if (path && !(cp->file = hl_strdup(path))) {
        hl_free(cp);
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading the campaign");
    }
    struct jpos_doc d;
    enum hl_status st = jpos_parse(text, len, "", "campaign", 1, &d, e);
    if (!st && o && o->sets && (st = keep_sets(cp, o->sets, e)))
        jpos_free(&d);
    if (!st && o && o->sets && (st = ovr_apply_top(o->sets, d.root, e)))
        jpos_free(&d); /* the values go into the tree before it is validated */
    if (!st) {
        rd.camp = cp;
        rd.opts = o;
        rd.c.d = &d;
        rd.c.text = text;
        rd.c.prefix = "";
        rd.c.e = e;
        st = parse_top(&rd, d.root);
        val_idset_free(&rd.scrub_ids);
        jpos_free(&d);
    }
    if (!st && catalog_text && (st = parse_catalog(cp, catalog_text, e)) && e)
        e->doc = HL_DOC_CATALOG; /* its line:column are the catalog's, not the campaign's */
    if (st) {
        camp_free(cp);
        if (e)
            e->status = st;
        if (o)
            ovr_blame(o->sets, e); /* an error in a --set value names the --set */
        return st;
    }
    *out = cp;
    return HL_OK;
}

enum hl_status camp_load(const char *path, const char *catalog_text, struct campaign **out,
                         struct hl_err *e)
{
    return camp_load_opts(path, catalog_text, NULL, out, e);
}

enum hl_status camp_load_opts(const char *path, const char *catalog_text, const struct camp_opts *o,
                              struct campaign **out, struct hl_err *e)
{
    hl_err_clear(e);
    *out = NULL;
    char *buf;
    size_t n;
    enum hl_status st = afile_read(path, &buf, &n, e);
    if (st)
        return st;
    if (n > JPOS_MAX_FILE) {
        hl_free(buf);
        return hl_err_at(e, HL_ERR_INPUT, 1, 1, "$", "the campaign is larger than %u bytes", JPOS_MAX_FILE);
    }
    st = camp_parse_opts(buf, n, path, catalog_text, o, out, e);
    hl_free(buf);
    return st;
}

void camp_free_runs(struct campaign *c)
{
    if (!c)
        return;
    for (int i = 0; i < c->nruns; i++)
        run_free(&c->runs[i]);
    hl_free(c->runs);
    c->runs = NULL;
    c->nruns = 0;
}

void camp_free(struct campaign *c)
{
    if (!c)
        return;
    for (int i = 0; i < c->nscrubbers; i++)
        hl_free(c->scrubbers[i].id);
    hl_free(c->scrubbers);
    hl_free(c->permits);
    hl_free(c->stock);
    for (int i = 0; i < c->ncontainers; i++) {
        hl_free(c->containers[i].name);
        hl_free(c->containers[i].source);
    }
    hl_free(c->containers);
    for (int i = 0; i < c->ndeliveries; i++)
        hl_free(c->deliveries[i].ref);
    hl_free(c->deliveries);
    hl_free(c->counts);
    camp_free_runs(c);
    for (int i = 0; i < c->nschedules; i++)
        hl_free(c->schedules[i]);
    hl_free(c->schedules);
    for (int i = 0; i < c->nsets; i++)
        hl_free(c->sets[i]);
    hl_free(c->sets);
    hl_free(c->model);
    hl_free(c->title);
    hl_free(c->site);
    hl_free(c->file);
    hl_free(c);
}

/* One value of run i set as the file would set it: the same ranges and the same messages. */
enum hl_status camp_run_set(struct campaign *cp, int i, const char *key, const char *value,
                            struct hl_err *e)
{
    hl_err_clear(e);
    struct camp_run *r = &cp->runs[i];
    struct jpos_val v = {0, 0, 0, 0, 0};
    struct jpos_doc d;
    memset(&d, 0, sizeof d);
    d.v = &v;
    d.nv = 1;
    d.run_vi = (size_t)-1;
    struct val_ctx c;
    memset(&c, 0, sizeof c);
    c.d = &d;
    c.text = value;
    c.prefix = "";
    c.e = e;
    c.csv = 1;
    cJSON node;
    memset(&node, 0, sizeof node);
    node.string = (char *)key;
    node.valueint = 0;
    if (!strcmp(key, "reactor_mode")) {
        node.type = cJSON_String;
        node.valuestring = (char *)value;
        int mode = 0;
        enum hl_status st = val_enum(&c, &node, mode_names, 2, &mode);
        if (!st)
            r->mode = mode ? CAMP_CSTR : CAMP_BATCH;
        return st;
    }
    static const struct { const char *key; const struct val_rng *r; } num[] = {
        {"reagent_eq", &req}, {"temp_c", &R_TEMP_C}, {"halogen_conversion", &rconv},
        {"feed_h", &rfeed}, {"overhalogenation_factor", &R_OVERHAL}};
    size_t k = 0;
    while (k < sizeof num / sizeof num[0] && strcmp(num[k].key, key))
        k++;
    if (k == sizeof num / sizeof num[0])
        return hl_err_at(e, HL_ERR_INPUT, 0, 0, key, "cannot be varied (reagent_eq, temp_c, "
                         "halogen_conversion, feed_h, reactor_mode, overhalogenation_factor)");
    char *end;
    double x = strtod(value, &end);
    if (!value[0] || *end || !strchr("+-.0123456789", value[0])) {
        node.type = cJSON_String;
        node.valuestring = (char *)value;
    } else {
        node.type = cJSON_Number;
        node.valuedouble = x;
    }
    enum hl_status st = val_num(&c, &node, *num[k].r, &x);
    if (st)
        return st;
    switch (k) {
    case 0: r->reagent_eq = x; r->amount_is_kg = 0; break;
    case 1: r->temp_c = x; r->defaulted &= ~CAMP_DEFAULT_TEMP; break;
    case 2: r->halogen_conversion = x; break;
    case 3:
        if (r->start_min + (int64_t)ceil(x * 60.0) > ISODATE_MAX_MIN)
            return hl_err_at(e, HL_ERR_INPUT, 0, 0, key, "the feed would end after 9999-12-31");
        r->feed_h = x;
        r->defaulted &= ~CAMP_DEFAULT_FEED_H;
        break;
    default:
        if (!r->own_model) {
            /* the campaign's block is shared by every run without one: this run gets a copy */
            struct camp_model *m = hl_calloc(1, sizeof *m);
            if (!m)
                return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
            if (r->model)
                *m = *r->model;
            r->model = m;
            r->own_model = 1;
        }
        r->model->overhalogenation_factor = x;
        r->model->set_mask |= CM_OVERHAL;
        break;
    }
    return HL_OK;
}

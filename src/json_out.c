/*
 * json_out.c - the JSON ledger (see json_out.h and design section 5).
 *
 * Why one record per line instead of one cJSON tree for the whole ledger: a
 * plant books up to 1e5 runs a year, and a full tree costs ~100 bytes per
 * node (hundreds of MB).  Each run, month, order ... is built as a small
 * cJSON object, printed compactly onto its own line and freed, so memory is
 * bounded by one record and the cost is linear in the ledger size.  The
 * result is still one valid JSON document, and line-oriented tools (diff,
 * grep) see one record per line.
 *
 * Keys are written in a fixed order and numbers by cJSON's round-trip
 * printer under LC_NUMERIC "C", so the same ledger gives the same bytes.
 */
#include "json_out.h"

#include "afile.h"
#include "hlmem.h"
#include "isodate.h"

#include <cjson/cJSON.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>

/* Public key spellings of the vent species and salts: fixed here, not taken from
 * display names elsewhere, because pipelines depend on them. */
static const char *const jo_vent_key[VS_COUNT] = {"HCl", "HBr", "Cl2", "Br2", "SO2"};
static const char *const jo_salt_key[SALT_COUNT] = {"NaCl", "NaBr", "NaOCl", "NaOBr", "Na2SO3", "Na2SO4"};
_Static_assert(VS_COUNT == 5 && SALT_COUNT == 6, "update the key tables of json_out.c");

struct jo {
    char *buf; size_t len, cap;       /* the document being assembled */
    enum hl_status st;                /* first failure; every helper is a no-op after it */
    struct hl_err *e;
    char path[160]; size_t plen;      /* JSON path of the record being built, for messages */
    cJSON *root;                      /* the record being built */
};

/* --- failures ------------------------------------------------------------ */

static void jo_nomem(struct jo *w)
{
    if (w->st == HL_OK)
        w->st = hl_err_set(w->e, HL_ERR_NOMEM, "out of memory while writing the JSON ledger");
}

/* Path of target below node into buf ("" when node is target); 0 if not found.
 * Used only to name a bad value, so a search is cheaper than bookkeeping. */
static int jo_find(const cJSON *node, const cJSON *target, char *buf, size_t n)
{
    if (node == target) {
        buf[0] = '\0';
        return 1;
    }
    int i = 0;
    for (const cJSON *c = node ? node->child : NULL; c; c = c->next, i++) {
        char sub[160];
        if (jo_find(c, target, sub, sizeof sub)) {
            int len = cJSON_IsArray(node)
                          ? snprintf(buf, n, "[%d]%s", i, sub)
                          : snprintf(buf, n, ".%s%s", c->string ? c->string : "?", sub);
            return len > 0; /* a path cut at n bytes still names the place */
        }
    }
    return 0;
}

/* Report a bad value: suffix is ".key" or "[i]" below the object node. */
static void jo_bad(struct jo *w, const cJSON *node, const char *suffix, const char *what)
{
    if (w->st != HL_OK)
        return;
    char where[160] = "", field[200];
    if (w->root && node)
        jo_find(w->root, node, where, sizeof where);
    if (snprintf(field, sizeof field, "%s%s%s", w->path, where, suffix) < 0)
        field[0] = '\0';
    if (field[0] == '.')
        memmove(field, field + 1, strlen(field));
    w->st = hl_err_at(w->e, HL_ERR_INTERNAL, 0, 0, field, "JSON ledger: %s at %s", what, field);
}

static void jo_badkey(struct jo *w, const cJSON *node, const char *key, const char *what)
{
    char suffix[64];
    snprintf(suffix, sizeof suffix, ".%s", key);
    jo_bad(w, node, suffix, what);
}

static size_t jo_push(struct jo *w, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static size_t jo_push(struct jo *w, const char *fmt, ...)
{
    size_t old = w->plen;
    va_list ap;
    va_start(ap, fmt);
    int n = vsnprintf(w->path + old, sizeof w->path - old, fmt, ap);
    va_end(ap);
    w->plen = n < 0 ? old : strlen(w->path);
    return old;
}

static void jo_pop(struct jo *w, size_t old)
{
    w->plen = old;
    w->path[old] = '\0';
}

/* --- output buffer ------------------------------------------------------- */

static void jo_put(struct jo *w, const char *s, size_t n)
{
    if (w->st != HL_OK)
        return;
    if (w->len + n + 1 > w->cap) {
        size_t cap = w->cap ? w->cap : 4096;
        while (cap < w->len + n + 1)
            cap *= 2;
        char *p = hl_realloc(w->buf, cap);
        if (!p) {
            jo_nomem(w);
            return;
        }
        w->buf = p;
        w->cap = cap;
    }
    memcpy(w->buf + w->len, s, n);
    w->len += n;
    w->buf[w->len] = '\0';
}

static void jo_puts(struct jo *w, const char *s) { jo_put(w, s, strlen(s)); }

/* Print item compactly after "prefix", then free it (always). */
static void jo_emit(struct jo *w, const char *prefix, cJSON *item, const char *suffix)
{
    if (w->st == HL_OK && item) {
        char *txt = cJSON_PrintUnformatted(item);
        if (!txt) {
            jo_nomem(w);
        } else {
            jo_puts(w, prefix);
            jo_puts(w, txt);
            jo_puts(w, suffix);
            cJSON_free(txt);
        }
    } else if (w->st == HL_OK) {
        jo_nomem(w); /* a record builder returned NULL without reporting */
    }
    cJSON_Delete(item);
}

/* --- values -------------------------------------------------------------- */

/* RFC 3629 UTF-8: no overlong forms, no surrogates, nothing above U+10FFFF. */
static int jo_utf8_ok(const unsigned char *s)
{
    while (*s) {
        unsigned c = *s++;
        int n;
        unsigned min, cp;
        if (c < 0x80) continue;
        else if ((c & 0xE0) == 0xC0) { n = 1; min = 0x80; cp = c & 0x1F; }
        else if ((c & 0xF0) == 0xE0) { n = 2; min = 0x800; cp = c & 0x0F; }
        else if ((c & 0xF8) == 0xF0) { n = 3; min = 0x10000; cp = c & 0x07; }
        else return 0;
        for (int k = 0; k < n; k++) {
            if ((*s & 0xC0) != 0x80)
                return 0;
            cp = (cp << 6) | (*s++ & 0x3F);
        }
        if (cp < min || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF))
            return 0;
    }
    return 1;
}

static cJSON *jo_obj(struct jo *w, cJSON *parent, const char *key)
{
    if (w->st != HL_OK)
        return NULL;
    cJSON *o = parent ? cJSON_AddObjectToObject(parent, key) : cJSON_CreateObject();
    if (!o)
        jo_nomem(w);
    else if (!parent)
        w->root = o;
    return o;
}

static cJSON *jo_arr(struct jo *w, cJSON *parent, const char *key)
{
    if (w->st != HL_OK)
        return NULL;
    cJSON *a = cJSON_AddArrayToObject(parent, key);
    if (!a)
        jo_nomem(w);
    return a;
}

static void jo_num(struct jo *w, cJSON *o, const char *key, double v)
{
    if (w->st != HL_OK)
        return;
    if (!isfinite(v)) {
        jo_badkey(w, o, key, isnan(v) ? "non-finite number (NaN)" : "non-finite number (infinity)");
        return;
    }
    if (!cJSON_AddNumberToObject(o, key, v + 0.0)) /* + 0.0 turns -0 into 0 */
        jo_nomem(w);
}

static void jo_bool(struct jo *w, cJSON *o, const char *key, int v)
{
    if (w->st == HL_OK && !cJSON_AddBoolToObject(o, key, v != 0))
        jo_nomem(w);
}

static void jo_null(struct jo *w, cJSON *o, const char *key)
{
    if (w->st == HL_OK && !cJSON_AddNullToObject(o, key))
        jo_nomem(w);
}

/* Text, or null for NULL. */
static void jo_str(struct jo *w, cJSON *o, const char *key, const char *s)
{
    if (w->st != HL_OK)
        return;
    if (!s) {
        jo_null(w, o, key);
        return;
    }
    if (!jo_utf8_ok((const unsigned char *)s)) {
        jo_badkey(w, o, key, "text that is not valid UTF-8");
        return;
    }
    if (!cJSON_AddStringToObject(o, key, s))
        jo_nomem(w);
}

static void jo_date(struct jo *w, cJSON *o, const char *key, int64_t min, int date_only)
{
    char buf[32];
    isodate_format(min, date_only, buf, sizeof buf);
    jo_str(w, o, key, buf);
}

/* Array element helpers. */
static void jo_arr_num(struct jo *w, cJSON *a, double v, size_t i)
{
    if (w->st != HL_OK)
        return;
    if (!isfinite(v)) {
        char key[32];
        snprintf(key, sizeof key, "[%zu]", i);
        jo_bad(w, a, key, "non-finite number");
        return;
    }
    cJSON *n = cJSON_CreateNumber(v + 0.0);
    if (!n || !cJSON_AddItemToArray(a, n)) {
        cJSON_Delete(n);
        jo_nomem(w);
    }
}

static void jo_arr_str(struct jo *w, cJSON *a, const char *s)
{
    if (w->st != HL_OK)
        return;
    cJSON *n = s ? cJSON_CreateString(s) : cJSON_CreateNull();
    if (!n || !cJSON_AddItemToArray(a, n)) {
        cJSON_Delete(n);
        jo_nomem(w);
    }
}

static const char *jo_item_name(int item)
{
    const struct reagent_info *ri = reagent_get(item);
    return ri ? ri->name : "unknown";
}

static void jo_month_text(int month_index, char *buf, size_t n)
{
    int y = month_index >= 0 ? month_index / 12 : -((-month_index + 11) / 12);
    snprintf(buf, n, "%04d-%02d", y, month_index - y * 12 + 1);
}

/* --- records ------------------------------------------------------------- */

static void jo_species(struct jo *w, cJSON *parent, const char *key, const double *mol,
                       const char *suffix)
{
    cJSON *o = jo_obj(w, parent, key);
    for (int s = 0; s < VS_COUNT && o; s++) {
        char k[24];
        snprintf(k, sizeof k, "%s%s", jo_vent_key[s], suffix);
        jo_num(w, o, k, mol[s]);
    }
}

static cJSON *jo_run(struct jo *w, const struct ledger *l, int i)
{
    const struct ledger_run *r = &l->runs[i];
    const struct bal_out *b = &r->bal;
    const struct scrub_run_out *s = &r->scrub;
    size_t mark = jo_push(w, "runs[%d]", i);
    cJSON *o = jo_obj(w, NULL, NULL);
    if (!o) {
        jo_pop(w, mark);
        return NULL;
    }
    jo_str(w, o, "id", r->id);
    jo_date(w, o, "start", r->start_min, 0);
    if (!isfinite(r->feed_h) || fabs(r->feed_h) > 1e9)
        jo_badkey(w, o, "end", "feed time out of range");
    else
        jo_date(w, o, "end", r->start_min + (int64_t)llround(r->feed_h * 60.0), 0);
    jo_str(w, o, "reactor", r->reactor);
    jo_str(w, o, "scrubber_id", r->scrubber);
    jo_str(w, o, "reagent", jo_item_name(r->reagent));
    jo_num(w, o, "temp_c", r->temp_c);
    jo_str(w, o, "reactor_mode", r->mode == KIN_CSTR ? "cstr" : "batch");
    jo_num(w, o, "feed_h", r->feed_h);

    cJSON *sub = jo_obj(w, o, "substrate");
    jo_str(w, sub, "name", r->substrate_name);
    jo_str(w, sub, "smiles", r->smiles);
    jo_str(w, sub, "formula", b->substrate_formula);
    jo_num(w, sub, "molar_mass_g_mol", b->substrate_molar_mass_g_mol);
    jo_num(w, sub, "kg", r->substrate_kg);
    jo_num(w, sub, "mol", b->substrate_mol);

    cJSON *rc = jo_obj(w, o, "reagent_charged");
    jo_num(w, rc, "kg", b->reagent_kg);
    jo_num(w, rc, "mol", b->reagent_mol);
    jo_num(w, o, "reagent_reacted_mol", b->reagent_reacted_mol);
    jo_num(w, o, "reagent_unreacted_mol", b->reagent_unreacted_mol);
    jo_num(w, o, "halogen_reacted_mol", b->halogen_reacted_mol);
    jo_bool(w, o, "capped", b->capped);
    jo_num(w, o, "mean_degree", b->mean_degree);

    cJSON *pa = jo_arr(w, o, "products");
    for (int p = 0; p < b->nproducts && w->st == HL_OK; p++) {
        const struct bal_product *bp = &b->products[p];
        cJSON *po = cJSON_CreateObject();
        if (!po || !cJSON_AddItemToArray(pa, po)) {
            cJSON_Delete(po);
            jo_nomem(w);
            break;
        }
        jo_str(w, po, "smiles", bp->smiles);
        jo_str(w, po, "formula", bp->role == ROLE_OTHER ? NULL : bp->formula); /* a mixture */
        jo_num(w, po, "degree", bp->degree);
        jo_num(w, po, "molar_mass_g_mol", bp->molar_mass_g_mol);
        jo_num(w, po, "mol", bp->mol);
        jo_num(w, po, "kg", bp->kg);
        jo_num(w, po, "mol_fraction", bp->mol_fraction);
        jo_str(w, po, "role", ledger_role_name(bp->role));
        if (bp->role == ROLE_OTHER) { /* the sum of the rows below the reporting threshold */
            jo_num(w, po, "mean_degree", r->other_mean_degree);
            jo_num(w, po, "rows_summed", r->other_rows);
            char label[64];
            ledger_other_label(bp, label, sizeof label);
            jo_str(w, po, "label", label);
        }
    }

    cJSON *by = jo_obj(w, o, "byproducts");
    jo_num(w, by, "HCl_kg", b->hx_kg[0]);
    jo_num(w, by, "HBr_kg", b->hx_kg[1]);
    jo_num(w, by, "SO2_kg", b->so2_kg);
    jo_num(w, by, "succinimide_kg", b->succinimide_kg);

    jo_species(w, o, "vent", b->vent_mol, "_mol");
    cJSON *vent = cJSON_GetObjectItemCaseSensitive(o, "vent");
    if (vent)
        jo_num(w, vent, "acid_kmol_h", s->acid_kmol_h);
    jo_species(w, o, "retained", b->retained_mol, "_mol");
    jo_num(w, o, "reagent_left_kg", b->reagent_left_kg);

    cJSON *lo = jo_obj(w, o, "losses");
    jo_num(w, lo, "wanted_kg", b->wanted_kg);
    jo_num(w, lo, "isomer_kg", b->isomer_kg);
    jo_num(w, lo, "overhalogenated_kg", b->overhal_kg);
    jo_num(w, lo, "unreacted_substrate_kg", b->unreacted_substrate_kg);

    cJSON *sc = jo_obj(w, o, "scrubber");
    jo_str(w, sc, "id", r->scrubber);
    jo_num(w, sc, "naoh_kg", s->naoh_kg);
    jo_num(w, sc, "heat_kj", s->heat_kj);
    jo_num(w, sc, "temp_rise_k", s->temp_rise_k);
    jo_bool(w, sc, "changeout_before", s->changeout_before);
    jo_bool(w, sc, "exhausted", s->exhausted);
    jo_num(w, sc, "naoh_left_kg", s->naoh_left_kg);
    jo_num(w, sc, "liquor_kg_after", s->liquor_kg_after);
    jo_num(w, sc, "naoh_wt_pct_after", s->naoh_wt_pct_after);
    cJSON *salts = jo_obj(w, sc, "salts_kg");
    for (int k = 0; k < SALT_COUNT && salts; k++)
        jo_num(w, salts, jo_salt_key[k], s->salt_kg[k]);
    jo_num(w, sc, "water_formed_kg", s->water_formed_kg);
    jo_num(w, sc, "acid_wt_pct_after", s->acid_wt_pct_after);
    jo_num(w, sc, "liquor_temp_c_after", s->liquor_temp_c_after);
    jo_num(w, sc, "heat_kw", s->heat_kw);
    jo_bool(w, sc, "too_hot", s->too_hot);
    jo_num(w, sc, "sulfite_oxidised_mol", s->sulfite_oxidised_mol);
    jo_num(w, sc, "breakthrough_mol", s->breakthrough_mol);
    jo_num(w, sc, "unabsorbed_mol", s->unabsorbed_mol);
    jo_num(w, sc, "caustic_solution_kg", r->changeout_caustic_solution_kg);
    jo_num(w, sc, "dilution_water_kg", r->changeout_water_kg);
    jo_num(w, sc, "hbr_wt_pct_after", s->hbr_wt_pct_after);
    jo_num(w, sc, "boiling_point_c", s->boiling_point_c);
    jo_bool(w, sc, "boils", s->boils);

    cJSON *eb = jo_obj(w, o, "element_balance");
    jo_num(w, eb, "max_rel_error", b->max_rel_error);
    cJSON *els = jo_obj(w, eb, "elements");
    for (int k = 0; k < BAL_NEL && els; k++) {
        const char *sym = elem_symbol(bal_elements[k]);
        cJSON *eo = jo_obj(w, els, sym ? sym : "?");
        jo_num(w, eo, "in_mol", b->el_in_mol[k]);
        jo_num(w, eo, "out_mol", b->el_out_mol[k]);
    }
    jo_bool(w, o, "isomers_resolved", b->isomers_resolved);
    jo_num(w, o, "wanted_mol", b->wanted_mol);
    jo_num(w, o, "converted_mol", b->converted_mol);
    jo_num(w, o, "halogen_charged_mol", b->halogen_charged_mol);
    jo_num(w, o, "halogen_in_wanted_mol", b->halogen_in_wanted_mol);
    jo_num(w, o, "yield_pct", b->yield_pct);
    jo_num(w, o, "conversion_pct", b->conversion_pct);
    if (b->selectivity_defined)
        jo_num(w, o, "selectivity_pct", b->selectivity_pct);
    else
        jo_null(w, o, "selectivity_pct"); /* nothing converted: no selectivity */
    jo_num(w, o, "halogen_efficiency_pct", b->halogen_efficiency_pct);
    if (b->warning[0])
        jo_str(w, o, "warning", b->warning);
    jo_pop(w, mark);
    return o;
}

static void jo_month_products(struct jo *w, cJSON *o, const struct ledger_month *m)
{
    cJSON *pa = jo_arr(w, o, "products");
    for (int j = 0; j < m->nproducts && pa && w->st == HL_OK; j++) {
        const struct ledger_month_product *p = &m->products[j];
        cJSON *po = cJSON_CreateObject();
        if (!po || !cJSON_AddItemToArray(pa, po)) {
            cJSON_Delete(po);
            jo_nomem(w);
            return;
        }
        jo_str(w, po, "substrate_name", p->substrate_name);
        jo_str(w, po, "substrate", p->substrate);
        jo_str(w, po, "reagent", jo_item_name(p->reagent));
        jo_str(w, po, "wanted", p->wanted);
        jo_str(w, po, "wanted_formula", p->wanted_formula);
        jo_num(w, po, "runs", p->runs);
        jo_num(w, po, "substrate_kg", p->substrate_kg);
        jo_num(w, po, "substrate_mol", p->substrate_mol);
        jo_num(w, po, "converted_mol", p->converted_mol);
        jo_num(w, po, "wanted_mol", p->wanted_mol);
        jo_num(w, po, "wanted_kg", p->wanted_kg);
        jo_num(w, po, "halogen_charged_mol", p->halogen_charged_mol);
        jo_num(w, po, "halogen_in_wanted_mol", p->halogen_in_wanted_mol);
        jo_num(w, po, "yield_pct", p->yield_pct);
        jo_num(w, po, "conversion_pct", p->conversion_pct);
        if (p->selectivity_defined)
            jo_num(w, po, "selectivity_pct", p->selectivity_pct);
        else
            jo_null(w, po, "selectivity_pct");
        jo_num(w, po, "halogen_efficiency_pct", p->halogen_efficiency_pct);
    }
}

static cJSON *jo_month(struct jo *w, const struct ledger_month *m, int i)
{
    size_t mark = jo_push(w, "months[%d]", i);
    cJSON *o = jo_obj(w, NULL, NULL);
    char mt[32];
    jo_month_text(m->month_index, mt, sizeof mt);
    jo_str(w, o, "month", mt);
    jo_num(w, o, "runs", m->runs);
    jo_num(w, o, "product_kg", m->product_kg);
    jo_num(w, o, "isomer_kg", m->isomer_kg);
    jo_num(w, o, "overhalogenated_kg", m->overhal_kg);
    jo_num(w, o, "unreacted_substrate_kg", m->unreacted_substrate_kg);
    cJSON *rk = jo_obj(w, o, "reagents_kg");
    for (int k = 0; k < RG_COUNT && rk; k++)
        jo_num(w, rk, jo_item_name(k), m->reagents_kg[k]);
    cJSON *vk = jo_obj(w, o, "vent_kg");
    for (int k = 0; k < VS_COUNT && vk; k++)
        jo_num(w, vk, jo_vent_key[k], m->vent_kg[k]);
    jo_num(w, o, "naoh_kg", m->naoh_kg);
    jo_num(w, o, "changeouts", m->changeouts);
    cJSON *wk = jo_obj(w, o, "waste_kg");
    jo_num(w, wk, "spent_liquor", m->spent_liquor_kg);
    jo_num(w, wk, "succinimide", m->succinimide_kg);
    jo_num(w, wk, "reagent_left", m->reagent_left_kg);
    jo_num(w, wk, "retained_acid", m->retained_acid_kg);
    jo_num(w, o, "caustic_solution_kg", m->caustic_solution_kg);
    jo_num(w, o, "caustic_solution_naoh_kg", m->caustic_solution_naoh_kg);
    jo_num(w, o, "dilution_water_kg", m->dilution_water_kg);
    jo_month_products(w, o, m);
    jo_pop(w, mark);
    return o;
}

static cJSON *jo_order(struct jo *w, const struct ledger *l, const struct ord_line *d, int i)
{
    size_t mark = jo_push(w, "orders[%d]", i);
    cJSON *o = jo_obj(w, NULL, NULL);
    char mt[32];
    jo_month_text(d->month_index, mt, sizeof mt);
    jo_str(w, o, "month", mt);
    jo_str(w, o, "reagent", jo_item_name(d->item));
    jo_num(w, o, "demand_kg", d->demand_kg);
    jo_num(w, o, "stock_start_kg", d->stock_start_kg);
    jo_num(w, o, "safety_kg", d->safety_kg);
    jo_num(w, o, "to_order_kg", d->to_order_kg);
    jo_str(w, o, "container", d->container);
    jo_num(w, o, "net_kg", d->net_kg);
    jo_num(w, o, "heel_kg", d->heel_kg);
    jo_num(w, o, "containers", d->containers);
    jo_num(w, o, "ordered_usable_kg", d->ordered_usable_kg);
    jo_num(w, o, "stock_end_kg", d->stock_end_kg);
    jo_date(w, o, "first_use", d->first_use_min, 0);
    /* Date only, truncated: ordering on that day is never later than required. */
    jo_date(w, o, "order_by", d->order_by_min, 1);
    jo_bool(w, o, "late", d->late);
    jo_bool(w, o, "no_container", d->no_container);
    if (d->item == RG_NAOH) { /* caustic is bought as solution: say its strength */
        if (l->caustic_order_wt_pct > 0)
            jo_num(w, o, "naoh_wt_pct", l->caustic_order_wt_pct);
        else
            jo_null(w, o, "naoh_wt_pct"); /* units buy unlike strengths (warned) */
    }
    jo_pop(w, mark);
    return o;
}

static cJSON *jo_scrubber(struct jo *w, const struct ledger *l, int i)
{
    const struct ledger_scrubber *u = &l->scrubbers[i];
    const struct scrub_unit_out *s = &u->out;
    size_t mark = jo_push(w, "scrubbers[%d]", i);
    cJSON *o = jo_obj(w, NULL, NULL);
    jo_str(w, o, "id", u->id);
    jo_num(w, o, "peak_acid_kmol_h", s->peak_acid_kmol_h);
    if (s->nhours > 0)
        jo_date(w, o, "peak_at", s->peak_at_min, 0);
    else
        jo_null(w, o, "peak_at");
    jo_num(w, o, "rated_acid_kmol_h", u->rated_acid_kmol_h);
    jo_bool(w, o, "overloaded", s->overloaded);
    jo_num(w, o, "changeouts", s->changeouts);
    jo_num(w, o, "naoh_kg", s->naoh_kg);
    jo_num(w, o, "makeup_kg", s->makeup_kg);
    jo_num(w, o, "makeup_naoh_wt_pct", u->makeup_naoh_wt_pct);
    jo_num(w, o, "caustic_solution_kg", s->makeup_kg);
    jo_num(w, o, "changeout_caustic_solution_kg", u->changeout_caustic_solution_kg);
    jo_num(w, o, "changeout_water_kg", u->changeout_water_kg);
    jo_num(w, o, "dilution_water_kg", u->dilution_water_kg);
    jo_num(w, o, "heat_kj", s->heat_kj);
    cJSON *pr = jo_arr(w, o, "peak_runs");
    for (int k = 0; k < s->npeak_runs && pr; k++) {
        int ri = s->peak_runs[k];
        if (ri < 0 || ri >= l->nruns) {
            jo_badkey(w, o, "peak_runs", "run index out of range");
            break;
        }
        jo_arr_str(w, pr, l->runs[ri].id);
    }
    jo_num(w, o, "peak_instant_kmol_h", s->peak_instant_kmol_h);
    if (s->npeak_instant_runs > 0)
        jo_date(w, o, "peak_instant_at", s->peak_instant_at_min, 0);
    else
        jo_null(w, o, "peak_instant_at");
    cJSON *pi = jo_arr(w, o, "peak_instant_runs");
    for (int k = 0; k < s->npeak_instant_runs && pi; k++) {
        int ri = s->peak_instant_runs[k];
        if (ri < 0 || ri >= l->nruns) {
            jo_badkey(w, o, "peak_instant_runs", "run index out of range");
            break;
        }
        jo_arr_str(w, pi, l->runs[ri].id);
    }
    jo_num(w, o, "peak_heat_kw", s->peak_heat_kw);
    if (s->npeak_heat_runs > 0)
        jo_date(w, o, "peak_heat_at", s->peak_heat_at_min, 0);
    else
        jo_null(w, o, "peak_heat_at");
    cJSON *ph = jo_arr(w, o, "peak_heat_runs");
    for (int k = 0; k < s->npeak_heat_runs && ph; k++) {
        int ri = s->peak_heat_runs[k];
        if (ri < 0 || ri >= l->nruns) {
            jo_badkey(w, o, "peak_heat_runs", "run index out of range");
            break;
        }
        jo_arr_str(w, ph, l->runs[ri].id);
    }
    jo_num(w, o, "max_liquor_temp_c", s->max_liquor_temp_c);
    jo_num(w, o, "too_hot_runs", s->too_hot_runs);
    jo_num(w, o, "boiling_runs", s->boiling_runs);
    cJSON *h = jo_obj(w, o, "hourly");
    if (s->nhours > 0)
        jo_date(w, h, "start", s->hour0_min, 0);
    else
        jo_null(w, h, "start");
    cJSON *ha = h ? jo_arr(w, h, "kmol_h") : NULL;
    for (int k = 0; k < s->nhours && ha && w->st == HL_OK; k++)
        jo_arr_num(w, ha, scrub_hourly_kmol_h(s, k), (size_t)k);
    cJSON *sp = jo_arr(w, o, "spent");
    for (int k = 0; k < s->nspent && sp && w->st == HL_OK; k++) {
        const struct scrub_spent *b = &s->spent[k];
        cJSON *so = cJSON_CreateObject();
        if (!so || !cJSON_AddItemToArray(sp, so)) {
            cJSON_Delete(so);
            jo_nomem(w);
            break;
        }
        jo_date(w, so, "at", b->at_min, 0);
        jo_bool(w, so, "final", b->final);
        jo_num(w, so, "mass_kg", b->mass_kg);
        jo_num(w, so, "naoh_kg", b->naoh_kg);
        jo_num(w, so, "water_kg", b->water_kg);
        jo_num(w, so, "hcl_kg", b->hcl_kg);
        jo_num(w, so, "hbr_kg", b->hbr_kg);
        cJSON *salts = jo_obj(w, so, "salts_kg");
        for (int q = 0; q < SALT_COUNT && salts; q++)
            jo_num(w, salts, jo_salt_key[q], b->salt_kg[q]);
    }
    if (s->column.present) {
        const struct scrub_column_check *c = &s->column;
        cJSON *co = jo_obj(w, o, "column");
        jo_num(w, co, "gas_kmol_h", c->gas_kmol_h);
        jo_num(w, co, "y_in", c->y_in);
        jo_num(w, co, "y_out", c->y_out);
        jo_num(w, co, "ntu", c->ntu);
        jo_num(w, co, "height_m", c->height_m);
        jo_num(w, co, "diameter_m", c->diameter_m);
        jo_num(w, co, "flood_velocity_m_s", c->flood_velocity_m_s);
        jo_num(w, co, "flow_parameter", c->flow_parameter);
        jo_str(w, co, "note", "Screening check only; a final column design needs review by a licensed engineer.");
    } else {
        jo_null(w, o, "column");
    }
    jo_pop(w, mark);
    return o;
}

static cJSON *jo_caution(struct jo *w, int ca)
{
    const struct caution_info *c = caution_get(ca);
    size_t mark = jo_push(w, "cautions[%d]", ca);
    cJSON *o = jo_obj(w, NULL, NULL);
    jo_str(w, o, "substance", c->substance);
    jo_str(w, o, "cas", c->cas);
    cJSON *la = jo_arr(w, o, "limits");
    for (int k = 0; k < c->nlimits && k < 4 && la && w->st == HL_OK; k++) {
        cJSON *lo = cJSON_CreateObject();
        if (!lo || !cJSON_AddItemToArray(la, lo)) {
            cJSON_Delete(lo);
            jo_nomem(w);
            break;
        }
        jo_str(w, lo, "kind", c->limits[k].kind);
        jo_str(w, lo, "value", c->limits[k].value);
        jo_str(w, lo, "source", c->limits[k].source);
    }
    jo_str(w, o, "hazards", c->hazards);
    jo_str(w, o, "incompatible", c->incompatible);
    jo_str(w, o, "ppe", c->ppe);
    jo_pop(w, mark);
    return o;
}

/* Emit "key": [ records ] with one record per line. */
typedef cJSON *(*jo_build_fn)(struct jo *, const struct ledger *, int);

static cJSON *jo_b_run(struct jo *w, const struct ledger *l, int i) { return jo_run(w, l, i); }
static cJSON *jo_b_month(struct jo *w, const struct ledger *l, int i) { return jo_month(w, &l->months[i], i); }
static cJSON *jo_b_order(struct jo *w, const struct ledger *l, int i) { return jo_order(w, l, &l->orders[i], i); }
static cJSON *jo_b_scrub(struct jo *w, const struct ledger *l, int i) { return jo_scrubber(w, l, i); }
static cJSON *jo_b_warn(struct jo *w, const struct ledger *l, int i)
{
    size_t mark = jo_push(w, "warnings[%d]", i);
    cJSON *o = jo_obj(w, NULL, NULL);
    jo_str(w, o, "run", l->warnings[i].run);
    jo_str(w, o, "message", l->warnings[i].message);
    jo_pop(w, mark);
    return o;
}
static cJSON *jo_b_assume(struct jo *w, const struct ledger *l, int i)
{
    const struct ledger_assumption *a = &l->assumptions[i];
    size_t mark = jo_push(w, "assumptions[%d]", i);
    cJSON *o = jo_obj(w, NULL, NULL);
    jo_str(w, o, "what", a->what);
    if (a->has_value)
        jo_num(w, o, "value", a->value);
    else
        jo_null(w, o, "value"); /* a text-only assumption */
    jo_str(w, o, "unit", a->unit);
    jo_str(w, o, "origin", a->origin);
    jo_pop(w, mark);
    return o;
}

static void jo_list(struct jo *w, const struct ledger *l, const char *key, int n, jo_build_fn fn)
{
    jo_puts(w, "\"");
    jo_puts(w, key);
    jo_puts(w, n ? "\": [\n" : "\": [");
    for (int i = 0; i < n && w->st == HL_OK; i++)
        jo_emit(w, "  ", fn(w, l, i), i + 1 < n ? ",\n" : "\n");
    jo_puts(w, "],\n");
}

enum hl_status json_out_render(const struct ledger *l, char **text, struct hl_err *e)
{
    struct jo w = {0};
    w.e = e;
    *text = NULL;

    jo_puts(&w, "{\n\"format\": \"haloledger-ledger/1\",\n\"generator\": \"haloledger\",\n");
    char when[32];
    isodate_format(l->created_min, 0, when, sizeof when);
    jo_emit(&w, "\"created\": ", l->created_min != 0 ? cJSON_CreateString(when) : cJSON_CreateNull(), ",\n");
    isodate_format(l->today_min, 1, when, sizeof when);
    jo_emit(&w, "\"today\": ", l->today_min >= 0 ? cJSON_CreateString(when) : cJSON_CreateNull(), ",\n");
    size_t mark = jo_push(&w, "campaign");
    cJSON *head = jo_obj(&w, NULL, NULL);
    jo_str(&w, head, "title", l->title);
    jo_str(&w, head, "site", l->site);
    jo_str(&w, head, "file", l->file);
    jo_pop(&w, mark);
    jo_emit(&w, "\"campaign\": ", head, ",\n");

    jo_list(&w, l, "runs", l->nruns, jo_b_run);
    jo_list(&w, l, "months", l->nmonths, jo_b_month);
    jo_list(&w, l, "orders", l->norders, jo_b_order);
    jo_list(&w, l, "scrubbers", l->nscrubbers, jo_b_scrub);
    jo_list(&w, l, "warnings", l->nwarnings, jo_b_warn);
    jo_list(&w, l, "assumptions", l->nassumptions, jo_b_assume);

    int nca = 0;
    for (int k = 0; k < CA_COUNT; k++)
        nca += (l->cautions_mask >> k & 1u) && caution_get(k);
    jo_puts(&w, nca ? "\"cautions\": [\n" : "\"cautions\": [");
    for (int k = 0, done = 0; k < CA_COUNT && w.st == HL_OK; k++) {
        if (!(l->cautions_mask >> k & 1u) || !caution_get(k))
            continue;
        done++;
        jo_emit(&w, "  ", jo_caution(&w, k), done < nca ? ",\n" : "\n");
    }
    jo_puts(&w, "],\n");

    cJSON *d = w.st == HL_OK ? cJSON_CreateString(caution_deferral()) : NULL;
    if (w.st == HL_OK && !d)
        jo_nomem(&w);
    else if (d)
        jo_emit(&w, "\"caution_deferral\": ", d, "\n}\n");

    if (w.st != HL_OK) {
        hl_free(w.buf);
        return w.st;
    }
    *text = w.buf;
    return HL_OK;
}

enum hl_status json_out_write(const struct ledger *l, const char *path, struct hl_err *e)
{
    enum hl_status st = afile_check_target(path, e);
    if (st)
        return st;
    char *text;
    st = json_out_render(l, &text, e);
    if (st)
        return st;
    st = afile_write(path, text, strlen(text), e);
    hl_free(text);
    return st;
}

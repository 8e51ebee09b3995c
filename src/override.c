/*
 * override.c - `--set KEY=VALUE` (see override.h): parsed once, put into the campaign's JSON
 * tree (top-level blocks) and into each runs entry or schedule row as the reader meets it,
 * so the campaign reader validates the value with the file's own checks and messages.
 */
#include "override.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "campaign.h"
#include "hlmem.h"

#define MAX_VALUE_DEPTH 32 /* the campaign's own nesting limit is 64 from the top */

/* Arrays whose entries an override picks by a key: the key and what to call one entry. */
static const struct { const char *block, *idkey, *noun; } id_blocks[] = {
    {"runs", "id", "run"}, {"scrubbers", "id", "scrubber"}, {"stock", "reagent", "stock entry"}};
#define N_ID_BLOCKS ((int)(sizeof id_blocks / sizeof id_blocks[0]))

static int block_of(const char *name)
{
    for (int b = 0; b < N_ID_BLOCKS; b++)
        if (!strcmp(name, id_blocks[b].block))
            return b;
    return -1;
}

static enum hl_status serr(struct hl_err *e, const char *arg, const char *field, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));
static enum hl_status serr(struct hl_err *e, const char *arg, const char *field, const char *fmt, ...)
{
    char msg[480];
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(msg, sizeof msg, fmt, ap);
    va_end(ap);
    hl_err_at(e, HL_ERR_INPUT, 0, 0, field ? field : "", "%s", msg);
    if (e)
        snprintf(e->file, sizeof e->file, "--set %.500s", arg);
    return HL_ERR_INPUT;
}

static enum hl_status nomem(struct hl_err *e)
{
    return hl_err_set(e, HL_ERR_NOMEM, "out of memory reading --set");
}

/* RFC 3629 UTF-8 without control characters (the argument reaches messages and cells). */
static int text_ok(const unsigned char *s)
{
    while (*s) {
        int n = *s < 0x80 ? 0 : (*s & 0xE0) == 0xC0 && *s >= 0xC2 ? 1 : (*s & 0xF0) == 0xE0 ? 2
              : (*s & 0xF8) == 0xF0 && *s <= 0xF4 ? 3 : -1;
        if (n < 0 || (n == 0 && (*s < 0x20 || *s == 0x7f)))
            return 0;
        unsigned cp = n ? *s & (0x3Fu >> n) : *s;
        for (int k = 1; k <= n; k++) {
            if ((s[k] & 0xC0) != 0x80)
                return 0;
            cp = cp << 6 | (s[k] & 0x3Fu);
        }
        if ((n == 2 && (cp < 0x800 || (cp >= 0xD800 && cp <= 0xDFFF))) || (n == 3 && (cp < 0x10000 || cp > 0x10FFFF)))
            return 0;
        s += n + 1;
    }
    return 1;
}

/* A value the campaign scanner would also accept: finite numbers, bounded nesting. */
static int value_ok(const cJSON *v, int depth)
{
    if (depth > MAX_VALUE_DEPTH)
        return 0;
    if (cJSON_IsNumber(v) && !isfinite(v->valuedouble))
        return 0;
    for (const cJSON *c = v->child; c; c = c->next)
        if (!value_ok(c, depth + 1))
            return 0;
    return 1;
}

static enum hl_status add_key(struct ovr *o, const char *s, size_t n, struct hl_err *e)
{
    if (!n)
        return serr(e, o->arg, NULL, "empty key in '%s' (keys are joined by single dots)", o->arg);
    char **np = hl_realloc(o->path, ((size_t)o->npath + 1) * sizeof *np);
    if (!np)
        return nomem(e);
    o->path = np;
    if (!(np[o->npath] = hl_malloc(n + 1)))
        return nomem(e);
    memcpy(np[o->npath], s, n);
    np[o->npath++][n] = '\0';
    return HL_OK;
}

/* KEY of o->arg (n bytes) into block, id and path. */
static enum hl_status parse_key(struct ovr *o, const char *key, size_t n, struct hl_err *e)
{
    const char *end = key + n, *p = key;
    size_t first = strcspn(key, ".[");
    if (first > n)
        first = n;
    enum hl_status st;
    char name[32];
    snprintf(name, sizeof name, "%.*s", first < sizeof name ? (int)first : (int)sizeof name - 1, key);
    int b = first < sizeof name ? block_of(name) : -1;
    if (b < 0) {
        if (first < n && key[first] == '[')
            return serr(e, o->arg, NULL, "'[ID]' selects an entry of runs, scrubbers or stock only");
    } else {
        if (!(o->block = hl_strdup(id_blocks[b].block)))
            return nomem(e);
        p = key + first;
        const char *id = p + 1, *idend;
        if (p == end)
            return serr(e, o->arg, o->block, "give a key of one entry: %s.ID.KEY (the %s's %s)",
                        o->block, id_blocks[b].noun, id_blocks[b].idkey);
        if (*p == '[') {
            idend = memchr(id, ']', (size_t)(end - id));
            if (!idend || (idend + 1 < end && idend[1] != '.'))
                return serr(e, o->arg, o->block, "'[' without its ']' before the next key");
            p = idend + 1;
        } else {
            idend = memchr(id, '.', (size_t)(end - id));
            if (!idend)
                idend = end;
            p = idend;
        }
        if (idend == id)
            return serr(e, o->arg, o->block, "empty %s id", id_blocks[b].noun);
        if (!(o->id = hl_malloc((size_t)(idend - id) + 1)))
            return nomem(e);
        memcpy(o->id, id, (size_t)(idend - id));
        o->id[idend - id] = '\0';
        if (p == end)
            return serr(e, o->arg, o->block, "give a key of the %s: %s.%s.KEY", id_blocks[b].noun,
                        o->block, o->id);
        p++; /* the dot */
    }
    while (p <= end) {
        const char *dot = memchr(p, '.', (size_t)(end - p));
        const char *stop = dot ? dot : end;
        if ((st = add_key(o, p, (size_t)(stop - p), e)))
            return st;
        if (memchr(p, '[', (size_t)(stop - p)) || memchr(p, ']', (size_t)(stop - p)))
            return serr(e, o->arg, NULL, "'%s': brackets only around the id after runs, scrubbers "
                        "or stock", o->path[o->npath - 1]);
        p = stop + 1;
    }
    if (b >= 0 && !strcmp(o->path[0], id_blocks[b].idkey)) {
        char f[160];
        snprintf(f, sizeof f, "%s.%.100s.%s", o->block, o->id, o->path[0]);
        return serr(e, o->arg, f, "the %s selects the %s and cannot be set", id_blocks[b].idkey,
                    id_blocks[b].noun);
    }
    if (b < 0 && !strcmp(o->path[0], "runs"))
        return serr(e, o->arg, NULL, "give runs.ID.KEY");
    return HL_OK;
}

static enum hl_status parse_one(const char *arg, struct ovr *o, struct hl_err *e)
{
    memset(o, 0, sizeof *o);
    if (!(o->arg = hl_strdup(arg)))
        return nomem(e);
    if (!text_ok((const unsigned char *)arg))
        return serr(e, "(not shown)", NULL, "not valid UTF-8 text, or holds a control character");
    /* the first '=' outside an [ID] ends the key */
    const char *eq = arg;
    for (int in = 0; *eq && (in || *eq != '='); eq++)
        in = *eq == '[' ? 1 : *eq == ']' ? 0 : in;
    if (!*eq)
        return serr(e, arg, NULL, "expected KEY=VALUE (for example runs.PR-1.reagent_eq=1.2)");
    if (eq == arg)
        return serr(e, arg, NULL, "no KEY before '='");
    enum hl_status st = parse_key(o, arg, (size_t)(eq - arg), e);
    if (st)
        return st;
    const char *val = eq + 1;
    if (!*val)
        return serr(e, arg, NULL, "no VALUE after '=' (write \"\" for an empty text, null to remove "
                    "the key)");
    const char *end = NULL;
    cJSON *v = cJSON_ParseWithOpts(val, &end, 1);
    if (!v && !(v = cJSON_CreateString(val))) /* not JSON: the text itself, as a string */
        return nomem(e);
    if (!value_ok(v, 0)) {
        cJSON_Delete(v);
        return serr(e, arg, NULL, "the value holds a number that is not finite or nests deeper "
                    "than %d levels", MAX_VALUE_DEPTH);
    }
    if (cJSON_IsNull(v))
        cJSON_Delete(v); /* null: remove the key */
    else
        o->value = v;
    return HL_OK;
}

static int same_target(const struct ovr *a, const struct ovr *b)
{
    if (!a->block != !b->block || (a->block && (strcmp(a->block, b->block) || strcmp(a->id, b->id))))
        return 0;
    return 1;
}

/* Keys of one entry that the file allows only one of: setting one removes the other. */
static const char *partner(const struct ovr *o, int npath, char *const *path)
{
    if (!o->block || strcmp(o->block, "runs"))
        return NULL;
    static const char *const pairs[][3] = {{"", "reagent_eq", "reagent_kg"},
                                           {"substrate", "smiles", "formula"}};
    for (size_t k = 0; k < sizeof pairs / sizeof pairs[0]; k++) {
        int depth = pairs[k][0][0] ? 2 : 1;
        if (npath != depth || (depth == 2 && strcmp(path[0], pairs[k][0])))
            continue;
        const char *last = path[npath - 1];
        if (!strcmp(last, pairs[k][1]))
            return pairs[k][2];
        if (!strcmp(last, pairs[k][2]))
            return pairs[k][1];
    }
    return NULL;
}

/* Two overrides of one target: the same key, one inside the other, or the two of a pair. */
static int clash(const struct ovr *a, const struct ovr *b)
{
    if (!same_target(a, b))
        return 0;
    int n = a->npath < b->npath ? a->npath : b->npath;
    for (int k = 0; k < n; k++)
        if (strcmp(a->path[k], b->path[k])) {
            const char *p = partner(a, a->npath, a->path);
            return k == n - 1 && a->npath == b->npath && p && !strcmp(p, b->path[k]) ? 2 : 0;
        }
    return 1;
}

enum hl_status ovr_parse(const char *const *args, int n, struct ovr_list *out, struct hl_err *e)
{
    memset(out, 0, sizeof *out);
    if (n > OVR_MAX)
        return serr(e, args[OVR_MAX], NULL, "at most %d --set options", OVR_MAX);
    for (int i = 0; i < n; i++) {
        out->n = i + 1;
        enum hl_status st = parse_one(args[i], &out->v[i], e);
        if (st)
            return st;
        for (int j = 0; j < i; j++) {
            int c = clash(&out->v[j], &out->v[i]);
            if (c == 1)
                return serr(e, args[i], NULL, "%s the key of --set %s: give each key once",
                            out->v[j].npath == out->v[i].npath ? "repeats" : "overlaps", out->v[j].arg);
            if (c == 2)
                return serr(e, args[i], NULL, "--set %s sets the other of the two: give one",
                            out->v[j].arg);
        }
    }
    return HL_OK;
}

static void tag(cJSON *v, int k)
{
    for (; v; v = v->next) {
        v->valueint = -(k + 1);
        tag(v->child, k);
    }
}

static void path_text(const struct ovr *o, int upto, char *buf, size_t cap)
{
    size_t n = 0;
    buf[0] = '\0';
    if (o->block)
        n = (size_t)snprintf(buf, cap, "%s.%s", o->block, o->id);
    for (int k = 0; k < upto && n < cap; k++)
        n += (size_t)snprintf(buf + n, cap - n, "%s%s", n ? "." : "", o->path[k]);
}

/* Put override k into obj (the entry, or the tree's root). */
static enum hl_status put(struct ovr *o, int k, cJSON *obj, struct hl_err *e)
{
    cJSON *cur = obj;
    for (int i = 0; i + 1 < o->npath; i++) {
        cJSON *m = cJSON_GetObjectItemCaseSensitive(cur, o->path[i]);
        if (m && !cJSON_IsObject(m)) {
            char f[160];
            path_text(o, i + 1, f, sizeof f);
            return serr(e, o->arg, f, "is not an object in the campaign, so it has no key '%s'",
                        o->path[i + 1]);
        }
        if (!m) {
            if (!o->value)
                return HL_OK; /* nothing to remove */
            if (!(m = cJSON_AddObjectToObject(cur, o->path[i])))
                return nomem(e);
            m->valueint = -(k + 1);
        }
        cur = m;
    }
    const char *last = o->path[o->npath - 1], *other = partner(o, o->npath, o->path);
    if (other)
        cJSON_DeleteItemFromObjectCaseSensitive(cur, other);
    if (!o->value) {
        cJSON_DeleteItemFromObjectCaseSensitive(cur, last);
        return HL_OK;
    }
    cJSON *v = cJSON_Duplicate(o->value, 1);
    if (!v)
        return nomem(e);
    tag(v, k);
    v->next = NULL;
    cJSON *old = cJSON_GetObjectItemCaseSensitive(cur, last);
    if (!old) {
        if (!cJSON_AddItemToObject(cur, last, v)) {
            cJSON_Delete(v);
            return nomem(e);
        }
        return HL_OK;
    }
    /* in place, so the keys keep the file's order; the key copied first (cJSON's own
     * replace would go on with no key when that copy fails) */
    if (!(v->string = hl_strdup(last))) {
        cJSON_Delete(v);
        return nomem(e);
    }
    cJSON_ReplaceItemViaPointer(cur, old, v);
    return HL_OK;
}

static const char *id_of(const cJSON *entry, const char *idkey)
{
    const cJSON *id = cJSON_IsObject(entry) ? cJSON_GetObjectItemCaseSensitive(entry, idkey) : NULL;
    return cJSON_IsString(id) ? id->valuestring : NULL;
}

/* The entry of block b in root with the override's id, or an error naming the nearest. */
static enum hl_status find_entry(struct ovr *o, int b, cJSON *root, cJSON **out, struct hl_err *e)
{
    const cJSON *arr = cJSON_GetObjectItemCaseSensitive(root, o->block);
    const char *best = NULL;
    int bd = 1000;
    for (cJSON *x = cJSON_IsArray(arr) ? arr->child : NULL; x; x = x->next) {
        const char *id = id_of(x, id_blocks[b].idkey);
        if (id && !strcmp(id, o->id)) {
            *out = x;
            return HL_OK;
        }
        int d = id ? hl_edit_distance(o->id, id, 1) : 1000;
        if (d < bd) {
            bd = d;
            best = id;
        }
    }
    char f[160];
    snprintf(f, sizeof f, "%s.%.100s", o->block, o->id);
    if (!cJSON_IsArray(arr))
        return serr(e, o->arg, f, "the campaign has no %s array", o->block);
    if (best && bd <= 2)
        return serr(e, o->arg, f, "no %s has %s \"%s\" (did you mean \"%s\"?)", id_blocks[b].noun,
                    id_blocks[b].idkey, o->id, best);
    return serr(e, o->arg, f, "no %s has %s \"%s\"", id_blocks[b].noun, id_blocks[b].idkey, o->id);
}

enum hl_status ovr_apply_top(struct ovr_list *l, cJSON *root, struct hl_err *e)
{
    for (int k = 0; k < l->n; k++)
        l->v[k].hit = 0;
    for (int k = 0; k < l->n; k++) {
        struct ovr *o = &l->v[k];
        if (o->block && !strcmp(o->block, "runs"))
            continue;
        cJSON *target = root;
        enum hl_status st;
        if (o->block && (st = find_entry(o, block_of(o->block), root, &target, e)))
            return st;
        if ((st = put(o, k, target, e)))
            return st;
        o->hit++;
    }
    return HL_OK;
}

enum hl_status ovr_apply_run(struct ovr_list *l, cJSON *entry, struct hl_err *e)
{
    const char *id = id_of(entry, "id");
    for (int k = 0; id && k < l->n; k++) {
        struct ovr *o = &l->v[k];
        if (!o->block || strcmp(o->block, "runs") || strcmp(o->id, id))
            continue;
        enum hl_status st = put(o, k, entry, e);
        if (st)
            return st;
        o->hit++;
    }
    return HL_OK;
}

/* The id of the entry a repeat copy came from: its own id less the "-N" suffix. */
static void entry_id(const struct camp_run *r, char *buf, size_t cap)
{
    size_t n = strlen(r->id);
    if (r->repeat_no) {
        const char *dash = strrchr(r->id, '-');
        n = dash ? (size_t)(dash - r->id) : n;
    }
    snprintf(buf, cap, "%.*s", (int)n, r->id);
}

enum hl_status ovr_check_runs(const struct ovr_list *l, const struct campaign *c, struct hl_err *e)
{
    for (int k = 0; k < l->n; k++) {
        const struct ovr *o = &l->v[k];
        if (!o->block || strcmp(o->block, "runs") || o->hit)
            continue;
        char f[160], base[128], best[128] = "";
        int bd = 1000;
        snprintf(f, sizeof f, "runs.%.100s", o->id);
        for (int i = 0; i < c->nruns; i++) {
            const struct camp_run *r = &c->runs[i];
            entry_id(r, base, sizeof base);
            if (r->repeat_no && !strcmp(r->id, o->id))
                return serr(e, o->arg, f, "run \"%s\" is a copy made by the repeat of the entry \"%s\"; "
                            "--set changes an entry as written (runs.%s.%s changes every copy)",
                            o->id, base, base, o->path[0]);
            int d = hl_edit_distance(o->id, base, 1);
            if (d < bd) {
                bd = d;
                snprintf(best, sizeof best, "%s", base);
            }
        }
        if (bd <= 2)
            return serr(e, o->arg, f, "no run has id \"%s\" (did you mean \"%s\"?)", o->id, best);
        return serr(e, o->arg, f, "no run has id \"%s\" in the campaign or its schedules", o->id);
    }
    return HL_OK;
}

/* The null override whose removal left the key e says is missing ("runs[3].substrate_kg",
 * or "column substrate_kg" in a schedule), or -1. */
static int removed_key(const struct ovr_list *l, const struct hl_err *e)
{
    if (strncmp(e->msg, "missing", 7))
        return -1;
    for (int k = 0; k < l->n; k++) {
        const struct ovr *o = &l->v[k];
        char local[160], col[168];
        path_text(o, o->npath, local, sizeof local);
        const char *last = strrchr(local, '.') ? strrchr(local, '.') + 1 : local;
        size_t nf = strlen(e->field), nl = strlen(last);
        snprintf(col, sizeof col, "column %s", last);
        for (char *q = col; *q; q++)
            *q = *q == '.' ? '_' : *q;
        if (!o->value && ((nf > nl && e->field[nf - nl - 1] == '.' && !strcmp(e->field + nf - nl, last)) ||
                          (o->npath == 1 && !strcmp(e->field, col))))
            return k;
        /* reagent_kg removed: the reader asks for the amount under the name reagent_eq */
        const char *other = o->value ? NULL : partner(o, o->npath, o->path);
        size_t no = other ? strlen(other) : 0;
        if (other && nf > no && !strcmp(e->field + nf - no, other) && strchr(".  ", e->field[nf - no - 1]))
            return k;
    }
    return -1;
}

void ovr_blame(const struct ovr_list *l, struct hl_err *e)
{
    if (!l || !e)
        return;
    int removed = e->line >= 0 ? removed_key(l, e) : -1;
    if (removed >= 0)
        e->line = -(removed + 1);
    if (e->line >= 0 || -e->line > l->n)
        return;
    const struct ovr *o = &l->v[-e->line - 1];
    char local[160], head[160], field[sizeof e->field];
    path_text(o, 0, head, sizeof head);
    size_t n = 0;
    local[0] = '\0';
    for (int k = 0; k < o->npath && n < sizeof local; k++)
        n += (size_t)snprintf(local + n, sizeof local - n, "%s%s", k ? "." : "", o->path[k]);
    /* the reader's path may go deeper than the key (a value that is an object) */
    const char *at = strstr(e->field, local);
    if (!at || (at > e->field && at[-1] != '.'))
        at = local;
    size_t w = strlen(head);
    if (w > 100)
        w = 100;
    memcpy(field, head, w);
    field[w] = '\0';
    snprintf(field + w, sizeof field - w, "%s%.100s", w ? "." : "", at);
    memcpy(e->field, field, sizeof e->field);
    snprintf(e->file, sizeof e->file, "--set %.500s", o->arg);
    e->line = e->col = 0;
    e->doc = HL_DOC_CAMPAIGN;
}

void ovr_free(struct ovr_list *l)
{
    if (!l)
        return;
    for (int k = 0; k < l->n; k++) {
        struct ovr *o = &l->v[k];
        hl_free(o->arg);
        hl_free(o->block);
        hl_free(o->id);
        for (int j = 0; j < o->npath; j++)
            hl_free(o->path[j]);
        hl_free(o->path);
        cJSON_Delete(o->value);
    }
    l->n = 0;
}

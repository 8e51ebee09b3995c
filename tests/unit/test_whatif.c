/* test_whatif.c - the compare and sweep documents: complete or refused, never a row short. */
#include <stdio.h>
#include <stdlib.h>
#include <unistd.h>
#include <string.h>

#include "compare.h"
#include "sweep.h"
#include "cu_helpers.h"
#include "hlmem.h"

/* Four differences, each field distinct, so a missing key or row is seen. */
static void fill(struct cmp_result *r, struct cmp_diff *d)
{
    for (int i = 0; i < 4; i++) {
        snprintf(d[i].where, sizeof d[i].where, "run R-%d", i);
        snprintf(d[i].what, sizeof d[i].what, "charged_kg");
        snprintf(d[i].a, sizeof d[i].a, "%d", 100 + i);
        snprintf(d[i].b, sizeof d[i].b, "%d", 200 + i);
    }
    r->d = d;
    r->n = r->cap = 4;
}

/* The document as the design gives it: format, a, b, and one object per difference with
 * where/what/a/b (the keys and rows counted here, not taken from the program). */
static int complete(const cJSON *j)
{
    const cJSON *f = cJSON_GetObjectItemCaseSensitive(j, "format");
    const cJSON *arr = cJSON_GetObjectItemCaseSensitive(j, "differences");
    if (!cJSON_IsString(f) || strcmp(f->valuestring, "haloledger-compare/1") ||
        !cJSON_IsString(cJSON_GetObjectItemCaseSensitive(j, "a")) ||
        !cJSON_IsString(cJSON_GetObjectItemCaseSensitive(j, "b")) || cJSON_GetArraySize(arr) != 4)
        return 0;
    for (int i = 0; i < 4; i++) {
        const cJSON *o = cJSON_GetArrayItem(arr, i);
        static const char *const keys[] = {"where", "what", "a", "b"};
        for (int k = 0; k < 4; k++)
            if (!cJSON_IsString(cJSON_GetObjectItemCaseSensitive(o, keys[k])))
                return 0;
    }
    return 1;
}

static void document_or_nothing(void)
{
    struct cmp_diff d[4];
    struct cmp_result r;
    fill(&r, d);
    cJSON *j = cmp_to_json(&r, "a.json", "b.json");
    CU_ASSERT(j && complete(j));
    cJSON_Delete(j);
    /* every allocation may fail: the result is then NULL, never a document a row short */
    long partial = 0, refused = 0, n;
    for (n = 1; n < 1000; n++) {
        hl_mem_fail_at(n);
        j = cmp_to_json(&r, "a.json", "b.json");
        hl_mem_fail_at(0);
        if (!j) {
            refused++;
            continue;
        }
        int whole = complete(j);
        cJSON_Delete(j);
        if (!whole)
            partial++;
        else
            break; /* the n-th allocation is past the last one: walked them all */
    }
    CU_ASSERT_EQUAL(partial, 0);
    CU_ASSERT(refused >= 4 * 5); /* at least one allocation per key and row object */
    CU_ASSERT(n < 1000);
}

/* Read path as JSON; NULL when it is missing or not JSON (caller deletes). */
static cJSON *read_json(const char *path)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return NULL;
    char buf[16384];
    size_t n = fread(buf, 1, sizeof buf - 1, f);
    fclose(f);
    buf[n] = 0;
    return cJSON_Parse(buf);
}

/* A sweep document: three points with every point key, the overrides given, best, trade-off
 * (design section 5 / README: the sweep keys; the count of point keys typed from there). */
static int sweep_complete(const cJSON *j)
{
    static const char *const pk[] = {"value", "wanted_kg", "isomer_kg", "overhalogenated_kg",
        "unreacted_substrate_kg", "selectivity_pct", "conversion_pct", "acid_gas_kg",
        "acid_gas_kg_per_kg_wanted", "wanted_kg_per_kg_reagent", "naoh_kg", "peak_acid_kmol_h",
        "reagent_kg", "containers"};
    const cJSON *pts = cJSON_GetObjectItemCaseSensitive(j, "points");
    const cJSON *ov = cJSON_GetObjectItemCaseSensitive(j, "overrides");
    if (cJSON_GetArraySize(pts) != 3 || cJSON_GetArraySize(ov) != 2 ||
        !cJSON_IsString(cJSON_GetObjectItemCaseSensitive(j, "tradeoff")) ||
        !cJSON_GetObjectItemCaseSensitive(j, "best"))
        return 0;
    for (int i = 0; i < 3; i++)
        for (size_t k = 0; k < sizeof pk / sizeof pk[0]; k++)
            if (!cJSON_GetObjectItemCaseSensitive(cJSON_GetArrayItem(pts, i), pk[k]))
                return 0;
    return 1;
}

static void sweep_or_nothing(void)
{
    struct sweep_point p[3] = {{.value = "1", .x = 1, .wanted_kg = 10, .containers = 1, .has_scrubber = 1},
                               {.value = "1.5", .x = 1.5, .wanted_kg = 12, .containers = 1},
                               {.value = "2", .x = 2, .wanted_kg = 11, .containers = 2}};
    char *ov[2] = {"model.overhalogenation_factor=0.5", "runs.A.temp_c=30"};
    struct sweep s = {.run = "A", .key = "reagent_eq", .reagent = "Cl2", .points = p, .npoints = 3,
                      .objective = "wanted_kg", .best = 1, .tradeoff = "more is not better",
                      .overrides = ov, .noverrides = 2};
    char path[] = "/tmp/hl-whatif-XXXXXX";
    int fd = mkstemp(path);
    CU_ASSERT_FATAL(fd >= 0);
    close(fd);
    unlink(path);
    struct hl_err e;
    CU_ASSERT_EQUAL(sweep_write_json(&s, path, &e), HL_OK);
    cJSON *j = read_json(path);
    CU_ASSERT(j && sweep_complete(j));
    cJSON_Delete(j);
    unlink(path);
    long partial = 0, refused = 0, n;
    for (n = 1; n < 2000; n++) {
        hl_mem_fail_at(n);
        enum hl_status st = sweep_write_json(&s, path, &e);
        hl_mem_fail_at(0);
        j = read_json(path);
        unlink(path);
        if (st != HL_OK) {
            refused++;
            if (j) /* refused, yet a file was left */
                partial++;
            cJSON_Delete(j);
            continue;
        }
        int whole = j && sweep_complete(j);
        cJSON_Delete(j);
        if (!whole)
            partial++;
        else
            break;
    }
    CU_ASSERT_EQUAL(partial, 0);
    CU_ASSERT(refused >= 3 * 14); /* at least one allocation per point key */
    CU_ASSERT(n < 2000);
}

int main(void)
{
    hl_mem_hook_cjson();
    static const struct cu_case cases[] = {{"compare: document or nothing", document_or_nothing},
                                            {"sweep: document or nothing", sweep_or_nothing}};
    return CU_RUN_ALL("whatif", cases);
}

/*
 * fuzz_pipeline.c - libFuzzer target for the whole pipeline into the JSON ledger, in memory:
 * campaign text -> reader -> models -> ledger (fuzz_pipeline.h checks them) -> json_out_render.
 *
 * A campaign the models accept must give a ledger the writer can print: json_out_render
 * refuses a non-finite number, so every model result must be finite (issue 16.2).  The text
 * must then read back with cJSON as one strict JSON document (no bytes after it) whose
 * format is "haloledger-ledger/1" and whose runs, months, orders, scrubbers and warnings
 * arrays hold as many records as the ledger; every date it shows (keys at, created, end,
 * first_use, order_by, peak_at, peak_heat_at, peak_instant_at, start, today; month as
 * YYYY-MM) must read back with the campaign's own date reader, years 0001-9999 (issue
 * 16.5).  Campaigns of more than 256 runs are skipped to keep one input fast.
 */
#include "fuzz_pipeline.h"
#include "isodate.h"
#include "json_out.h"

#include <cjson/cJSON.h>
#include <stdio.h>

static const char *const date_keys[] = {"at", "created", "end", "first_use", "order_by",
                                        "peak_at", "peak_heat_at", "peak_instant_at", "start",
                                        "today"};

static void check_dates(const cJSON *node)
{
    for (const cJSON *it = node ? node->child : NULL; it; it = it->next) {
        if (cJSON_IsObject(it) || cJSON_IsArray(it)) {
            check_dates(it);
            continue;
        }
        if (!it->string || !cJSON_IsString(it))
            continue;
        int64_t m;
        int bad;
        if (!strcmp(it->string, "month")) {
            char day[32];
            if (strlen(it->valuestring) != 7)
                abort();
            snprintf(day, sizeof day, "%s-01", it->valuestring);
            if (isodate_parse(day, &m, &bad) != 0)
                abort();
            continue;
        }
        for (size_t k = 0; k < sizeof date_keys / sizeof date_keys[0]; k++)
            if (!strcmp(it->string, date_keys[k]) && isodate_parse(it->valuestring, &m, &bad) != 0)
                abort();
    }
}

static void check_count(const cJSON *doc, const char *key, int n)
{
    const cJSON *a = cJSON_GetObjectItemCaseSensitive(doc, key);
    if (!cJSON_IsArray(a) || cJSON_GetArraySize(a) != n)
        abort();
}

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc;
    (void)argv;
    hl_mem_hook_cjson();
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct ledger *l = fuzz_ledger(data, size, 256, (unsigned)(size & 3));
    if (!l)
        return 0;
    struct hl_err e;
    char *text = NULL;
    hl_err_clear(&e);
    enum hl_status st = json_out_render(l, &text, &e);
    if (st == HL_ERR_NOMEM) {
        ledger_free(l);
        return 0;
    }
    if (st != HL_OK || !text)
        abort(); /* a non-finite number or a string the writer refuses: a model result */
    const char *end = NULL;
    cJSON *doc = cJSON_ParseWithOpts(text, &end, 1);
    if (!doc)
        abort();
    const cJSON *fmt = cJSON_GetObjectItemCaseSensitive(doc, "format");
    if (!cJSON_IsString(fmt) || strcmp(fmt->valuestring, "haloledger-ledger/1"))
        abort();
    check_count(doc, "runs", l->nruns);
    check_count(doc, "months", l->nmonths);
    check_count(doc, "orders", l->norders);
    check_count(doc, "scrubbers", l->nscrubbers);
    check_count(doc, "warnings", l->nwarnings);
    check_dates(doc);
    cJSON_Delete(doc);
    hl_free(text);
    ledger_free(l);
    return 0;
}

/*
 * fuzz_campaign.c - libFuzzer target for the campaign reader (campaign.h).
 *
 * Every input is read three ways: as a campaign without a catalog, as a
 * campaign with the built-in container catalog (templates/containers.json,
 * compiled in as catalog_default_json), and as the catalog text under a small
 * valid campaign, so the catalog merge is fuzzed too.  The input buffer is
 * passed with its exact length and no NUL after it, so any read past len is
 * caught by AddressSanitizer.  Contract checks (abort = finding): on success
 * *out is set and has runs; on failure *out is NULL, the status is returned
 * in e->status and a message is given.  Everything is freed (LeakSanitizer).
 */
#include "campaign.h"
#include "hlmem.h"

#include "fuzz_input.h"
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

extern const char catalog_default_json[];

/* A small valid campaign (design section 3) that uses the catalog's containers. */
static const char fixed_campaign[] =
    "{\"format\": \"haloledger-campaign/1\", \"runs\": [{\"id\": \"F-1\", "
    "\"start\": \"2027-03-02T06:00\", \"substrate\": {\"smiles\": \"CC(C)C\"}, "
    "\"substrate_kg\": 100, \"reagent\": \"Cl2\", \"reagent_eq\": 0.5}]}";

static void check_result(enum hl_status st, const struct campaign *c, const struct hl_err *e)
{
    if (st == HL_OK) {
        if (!c || c->nruns < 1 || !c->runs)
            abort();
        for (int i = 0; i < c->nruns; i++)
            if (!c->runs[i].id || (!c->runs[i].smiles == !c->runs[i].formula))
                abort();
    } else {
        if (c || e->status != st || !e->msg[0])
            abort();
        if (st != HL_ERR_INPUT && st != HL_ERR_NOMEM)
            abort(); /* text in memory: neither I/O nor internal errors can happen */
    }
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
    struct hl_err e;
    struct campaign *c = NULL;
    enum hl_status st;

    st = camp_parse((const char *)data, size, "fuzz.json", NULL, &c, &e);
    check_result(st, c, &e);
    camp_free(c);

    c = NULL;
    st = camp_parse((const char *)data, size, "fuzz.json", catalog_default_json, &c, &e);
    check_result(st, c, &e);
    camp_free(c);

    /* The input as catalog text: NUL-terminated by contract, so copy it. */
    char *cat = fuzz_cstring(data, size);
    if (!cat)
        return 0;
    c = NULL;
    st = camp_parse(fixed_campaign, sizeof fixed_campaign - 1, "fixed.json", cat, &c, &e);
    check_result(st, c, &e);
    camp_free(c);
    hl_free(cat);
    return 0;
}

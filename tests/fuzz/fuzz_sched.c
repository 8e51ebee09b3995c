/*
 * fuzz_sched.c - libFuzzer target for the CSV schedule reader (sched.h) and the campaign
 * reader's validation of its rows.
 *
 * Every input is read twice: by sched_parse alone with each separator (detected, ',' ';'
 * tab), counting rows, and as the schedule of a small valid plant campaign through
 * camp_parse_opts, so each row goes through the runs[] checks.  The input buffer has its
 * exact length and no NUL after it (AddressSanitizer sees a read past len).  Contract
 * checks (abort = finding): a failure is HL_ERR_INPUT or HL_ERR_NOMEM with a message, an
 * input error has a line (>= 1) and a field; a success of the campaign has runs, each with
 * an id and exactly one of smiles and formula.  Everything is freed (LeakSanitizer).
 */
#include "campaign.h"
#include "hlmem.h"
#include "sched.h"

#include "fuzz_input.h"
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static const char plant[] =
    "{\"format\": \"haloledger-campaign/1\", \"scrubbers\": [{\"id\": \"VS-1\", \"naoh_wt_pct\": 18, "
    "\"liquor_kg\": 6000, \"rated_acid_kmol_h\": 5}], \"runs\": []}";

static enum hl_status count_row(void *data, const struct sched_row *row, struct hl_err *e)
{
    (void)e;
    if (!row->run || row->line < 1 || row->ncols < 1)
        abort();
    ++*(long *)data;
    return HL_OK;
}

static void check_err(enum hl_status st, const struct hl_err *e)
{
    if (st != HL_ERR_INPUT && st != HL_ERR_NOMEM)
        abort();
    if (!e->msg[0] || (st == HL_ERR_INPUT && (e->line < 1 || !e->field[0])))
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
    static const char seps[4] = {0, ',', ';', '\t'};
    struct hl_err e;
    for (int k = 0; k < 4; k++) {
        long rows = 0;
        enum hl_status st = sched_parse((const char *)data, size, seps[k], count_row, &rows, &e);
        if (st)
            check_err(st, &e);
    }
    /* as a file named by --schedule: the reader takes files only */
    char path[64];
    snprintf(path, sizeof path, "/tmp/fuzz_sched.%ld.csv", (long)getpid());
    FILE *f = fopen(path, "wb");
    if (!f)
        return 0;
    fwrite(data, 1, size, f);
    fclose(f);
    const char *scheds[1] = {path};
    struct camp_opts o = {scheds, 1, 0, NULL};
    struct campaign *c = NULL;
    enum hl_status st = camp_parse_opts(plant, sizeof plant - 1, "plant.json", NULL, &o, &c, &e);
    if (st == HL_OK) {
        if (!c || c->nruns < 1)
            abort();
        for (int i = 0; i < c->nruns; i++)
            if (!c->runs[i].id || (!c->runs[i].smiles == !c->runs[i].formula) || !c->runs[i].sched_file)
                abort();
    } else {
        if (c)
            abort();
        check_err(st, &e);
    }
    camp_free(c);
    unlink(path);
    return 0;
}

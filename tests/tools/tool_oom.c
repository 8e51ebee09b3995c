/*
 * tool_oom.c - allocation-failure walk over the whole report path.
 *
 *   tool_oom CAMPAIGN DIR [--stride K] [--first N] [--trace]
 *
 * One pass = what `haloledger report` does in-process: read CAMPAIGN, camp_parse
 * (with the built-in catalog), ledger_build, json_out_render, afile_write of
 * that text to DIR/oom.json (json_out_write is a target check and these two),
 * xlsx_out_write DIR/oom.xlsx, free everything.  A clean pass counts
 * the allocation calls (hl_mem_calls); then hl_mem_fail_at(n) makes call n fail
 * for n = first, first + K, ... until a pass completes without reaching call n.
 * Every failing pass must
 *   - return HL_ERR_NOMEM with a message (HL_ERR_IO is accepted from the workbook
 *     stage only: libxlsxwriter allocates with malloc itself, so our wrapper never
 *     fails its calls, but a failure of ours may surface through its status),
 *   - leave the failing stage's target as it was: absent if it did not exist,
 *     byte-identical if it did (every other pass starts with old files in place),
 *   - leave no temporary file in DIR,
 *   - free what it allocated: the bytes in use (glibc mallinfo2, which also sees
 *     libxlsxwriter's and stdio's allocations) must be back to the clean-pass level.
 *     Needs GLIBC_TUNABLES=glibc.malloc.tcache_count=0 (the cache hides frees); off
 *     under ASan and valgrind, whose own leak checkers report at exit.
 * Prints the number of failure points walked and the problems; exit 0 when none.
 */
#include "afile.h"
#include "campaign.h"
#include "hlmem.h"
#include "json_out.h"
#include "ledger.h"
#include "xlsx_out.h"

#include <dirent.h>
#include <errno.h>
#include <malloc.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

extern const char catalog_default_json[];

enum stage { S_READ, S_PARSE, S_LEDGER, S_RENDER, S_JSON, S_XLSX, S_DONE, S_COUNT };
static const char *stage_name[S_COUNT] = {"read", "camp_parse", "ledger_build", "json_out_render",
                                          "afile_write", "xlsx_out_write", "done"};

static const char OLD_JSON[] = "{\"previous\": \"ledger\"}\n";
static const char OLD_XLSX[] = "PK\003\004 previous workbook bytes\n";

static char json_path[4096], xlsx_path[4096];


/* One report pass; *where = the stage that failed (S_DONE on success). */
static enum hl_status pass(const char *campaign_path, enum stage *where, struct hl_err *e)
{
    struct ledger_opts lo = {.today_min = -1, .created_min = -1};
    struct campaign *c = NULL;
    struct ledger *l = NULL;
    char *text = NULL, *json = NULL;
    size_t len = 0;
    hl_err_clear(e);
    enum hl_status st = afile_read(campaign_path, &text, &len, e);
    *where = S_READ;
    if (!st) {
        *where = S_PARSE;
        st = camp_parse(text, len, campaign_path, catalog_default_json, &c, e);
        hl_free(text);
    }
    if (!st) {
        *where = S_LEDGER;
        st = ledger_build(c, &lo, &l, e);
        camp_free(c);
    }
    if (!st) {
        *where = S_RENDER;
        st = json_out_render(l, &json, e);
    }
    if (!st) {
        /* what json_out_write does after rendering; rendering twice would only repeat points */
        *where = S_JSON;
        st = afile_write(json_path, json, strlen(json), e);
    }
    hl_free(json);
    if (!st) {
        *where = S_XLSX;
        st = xlsx_out_write(l, xlsx_path, e);
    }
    ledger_free(l);
    if (!st)
        *where = S_DONE;
    return st;
}

static size_t heap_in_use(void)
{
    struct mallinfo2 mi = mallinfo2();
    return mi.uordblks + mi.hblkhd;
}

static void put_file(const char *path, const char *data, size_t n)
{
    FILE *f = fopen(path, "wb");
    if (!f || fwrite(data, 1, n, f) != n || fclose(f) != 0) {
        fprintf(stderr, "tool_oom: cannot prepare %s\n", path);
        exit(2);
    }
}

/* 1 if path holds exactly data[0..n). */
static int same_bytes(const char *path, const char *data, size_t n)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        return 0;
    char buf[256];
    size_t got = fread(buf, 1, sizeof buf, f);
    fclose(f);
    return got == n && !memcmp(buf, data, n);
}

/* Names in dir other than oom.json and oom.xlsx, written into list; returns the count. */
static int strays(const char *dir, char *list, size_t cap)
{
    DIR *d = opendir(dir);
    int n = 0;
    list[0] = '\0';
    if (!d)
        return -1;
    for (struct dirent *de; (de = readdir(d));) {
        if (!strcmp(de->d_name, ".") || !strcmp(de->d_name, "..") ||
            !strcmp(de->d_name, "oom.json") || !strcmp(de->d_name, "oom.xlsx"))
            continue;
        n++;
        size_t k = strlen(list);
        snprintf(list + k, cap - k, "%s%s", k ? " " : "", de->d_name);
    }
    closedir(d);
    return n;
}

int main(int argc, char **argv)
{
    long stride = 1, first = 1;
    int trace = 0; /* print each point before its pass: names the point of a crash */
    const char *campaign_path = NULL, *dir = NULL;
    for (int i = 1; i < argc; i++) {
        if (!strcmp(argv[i], "--stride") && i + 1 < argc)
            stride = atol(argv[++i]);
        else if (!strcmp(argv[i], "--first") && i + 1 < argc)
            first = atol(argv[++i]);
        else if (!strcmp(argv[i], "--trace"))
            trace = 1;
        else if (!campaign_path)
            campaign_path = argv[i];
        else if (!dir)
            dir = argv[i];
        else
            campaign_path = NULL, i = argc;
    }
    if (!campaign_path || !dir || stride < 1 || first < 1) {
        fprintf(stderr, "usage: tool_oom CAMPAIGN DIR [--stride K] [--first N] [--trace]\n");
        return 2;
    }
    snprintf(json_path, sizeof json_path, "%s/oom.json", dir);
    snprintf(xlsx_path, sizeof xlsx_path, "%s/oom.xlsx", dir);
    hl_mem_hook_cjson();

    /* Two clean passes: the count of allocation calls, and a warmed-up heap baseline
     * (stdio, locale and libxlsxwriter's first-use allocations are made by then). */
    struct hl_err e;
    enum stage where;
    long total = 0;
    size_t base = 0;
    for (int k = 0; k < 2; k++) {
        unlink(json_path);
        unlink(xlsx_path);
        long c0 = hl_mem_calls();
        if (pass(campaign_path, &where, &e) != HL_OK) {
            fprintf(stderr, "tool_oom: the clean pass failed at %s: %s (%s)\n", stage_name[where],
                    e.msg, hl_strerror(e.status));
            return 1;
        }
        long calls = hl_mem_calls() - c0;
        if (k && calls != total) {
            fprintf(stderr, "tool_oom: clean passes differ: %ld then %ld allocation calls\n", total,
                    calls);
            return 1;
        }
        total = calls;
        unlink(json_path);
        unlink(xlsx_path);
        base = heap_in_use();
    }
    /* glibc's per-thread cache keeps freed chunks counted as in use, so the byte count is
     * exact only with it off; ASan and valgrind report 0 (their own checkers apply). */
    const char *tun = getenv("GLIBC_TUNABLES");
    int heap_check = base > 0 && tun && strstr(tun, "glibc.malloc.tcache_count=0");

    long walked = 0, problems = 0, io = 0, per_stage[S_COUNT] = {0};
    long n = first;
    char names[1024];
    for (;; n += stride) {
        int old = (int)((n / stride) & 1); /* alternate: targets absent / old files in place */
        unlink(json_path);
        unlink(xlsx_path);
        if (old) {
            put_file(json_path, OLD_JSON, sizeof OLD_JSON - 1);
            put_file(xlsx_path, OLD_XLSX, sizeof OLD_XLSX - 1);
        }
        if (trace)
            fprintf(stderr, "point %ld\n", n);
        size_t before = heap_in_use();
        long c0 = hl_mem_calls();
        hl_mem_fail_at(n);
        enum hl_status st = pass(campaign_path, &where, &e);
        hl_mem_fail_at(0);
        long used = hl_mem_calls() - c0;
        size_t after = heap_in_use();
        if (used < n) {
            /* the failure point lies past the end: this pass must be the clean one */
            if (st != HL_OK) {
                printf("point %ld: never reached (%ld calls) but the pass failed at %s: %s\n", n,
                       used, stage_name[where], e.msg);
                problems++;
            }
            break;
        }
        walked++;
        per_stage[where]++;
        char what[64];
        snprintf(what, sizeof what, "point %ld/%ld (%s)", n, total, stage_name[where]);
        if (st == HL_OK) {
            printf("%s: the failed allocation was swallowed: the pass succeeded\n", what);
            problems++;
            continue;
        }
        if (st == HL_ERR_IO && where == S_XLSX) {
            io++;
        } else if (st != HL_ERR_NOMEM) {
            printf("%s: status %s, expected out of memory: %s\n", what, hl_strerror(st), e.msg);
            problems++;
        }
        if (!e.msg[0]) {
            printf("%s: no message\n", what);
            problems++;
        }
        /* the stage that failed and the ones not reached leave their targets alone */
        const char *targets[2] = {json_path, xlsx_path};
        const char *olds[2] = {OLD_JSON, OLD_XLSX};
        size_t oldn[2] = {sizeof OLD_JSON - 1, sizeof OLD_XLSX - 1};
        for (int t = 0; t < 2; t++) {
            int written = (t == 0 && where > S_JSON); /* json done before xlsx failed */
            if (written)
                continue;
            if (old ? !same_bytes(targets[t], olds[t], oldn[t]) : access(targets[t], F_OK) == 0) {
                printf("%s: %s %s\n", what, targets[t], old ? "was changed" : "appeared");
                problems++;
            }
        }
        if (strays(dir, names, sizeof names) != 0) {
            printf("%s: left behind in %s: %s\n", what, dir, names);
            problems++;
        }
        if (heap_check && after != before) {
            printf("%s: %ld bytes still allocated after the pass\n", what, (long)after - (long)before);
            problems++;
        }
    }
    unlink(json_path);
    unlink(xlsx_path);
    printf("stages:");
    for (int s = 0; s < S_DONE; s++)
        printf(" %s %ld", stage_name[s], per_stage[s]);
    printf("\n");
    printf("oom: %ld failure points walked (of %ld allocation calls, stride %ld), %ld gave I/O "
           "error from the workbook, heap check %s, %ld problems\n",
           walked, total, stride, io,
           heap_check ? "on" : base ? "off (GLIBC_TUNABLES=glibc.malloc.tcache_count=0 not set)"
                                    : "off (ASan/valgrind heap)",
           problems);
    return problems ? 1 : 0;
}

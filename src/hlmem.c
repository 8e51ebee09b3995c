/*
 * hlmem.c - counting allocation wrapper (see hlmem.h).
 *
 * Why a wrapper: every allocation failure must be
 * reachable from a test.  hl_mem_fail_at(n) arms a countdown; the n-th call
 * after it returns NULL exactly once.  Not thread-safe (haloledger is single
 * threaded).
 */
#include "hlmem.h"

#include <cjson/cJSON.h>
#include <stdlib.h>
#include <string.h>

static long calls;
static long fail_countdown; /* 0 = disarmed */

static int should_fail(void)
{
    calls++;
    if (fail_countdown > 0 && --fail_countdown == 0)
        return 1;
    return 0;
}

void *hl_malloc(size_t n)
{
    if (should_fail())
        return NULL;
    return malloc(n ? n : 1);
}

void *hl_calloc(size_t count, size_t size)
{
    if (should_fail())
        return NULL;
    return calloc(count ? count : 1, size ? size : 1);
}

void *hl_realloc(void *p, size_t n)
{
    if (should_fail())
        return NULL;
    return realloc(p, n ? n : 1);
}

char *hl_strdup(const char *s)
{
    if (!s)
        return NULL;
    size_t n = strlen(s) + 1;
    char *d = hl_malloc(n);
    if (d)
        memcpy(d, s, n);
    return d;
}

void hl_free(void *p) { free(p); }

void hl_mem_fail_at(long n) { fail_countdown = n > 0 ? n : 0; }

long hl_mem_calls(void) { return calls; }

static void *cjson_malloc(size_t n) { return hl_malloc(n); }

void hl_mem_hook_cjson(void)
{
    cJSON_Hooks h = {cjson_malloc, hl_free};
    cJSON_InitHooks(&h);
}

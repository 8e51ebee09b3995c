/*
 * hlmem.h - the one allocation wrapper of haloledger.
 *
 * Every allocation in the project (and cJSON's, via hl_mem_hook_cjson) goes
 * through these functions so that a test can make the Nth call fail and walk
 * every failure point (hl_mem_fail_at).  They behave like their libc
 * namesakes, return NULL on failure and never abort.
 */
#ifndef HLMEM_H
#define HLMEM_H

#include <stddef.h>

/* malloc/calloc/realloc/strdup/free through the counting wrapper. Caller owns the result. */
void *hl_malloc(size_t n);
void *hl_calloc(size_t count, size_t size);
void *hl_realloc(void *p, size_t n);
char *hl_strdup(const char *s); /* NULL in -> NULL out (not a failure) */
void hl_free(void *p);

/* Testing: make the n-th allocation from now fail (1 = the next one), 0 = never. */
void hl_mem_fail_at(long n);
/* Number of allocation calls made since the program started (for walking failure points). */
long hl_mem_calls(void);
/* Install the wrapper as cJSON's allocator (cJSON_InitHooks). Call once at start-up. */
void hl_mem_hook_cjson(void);

#endif

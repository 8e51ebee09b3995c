/* fuzz_input.h - the fuzzer's bytes as a C string (the readers take NUL-terminated text). */
#ifndef FUZZ_INPUT_H
#define FUZZ_INPUT_H

#include <stdint.h>
#include <string.h>
#include "hlmem.h"

/* Copy of data[0..size) with a NUL after it (hl_free); NULL when out of memory. */
static inline char *fuzz_cstring(const uint8_t *data, size_t size)
{
    char *text = hl_malloc(size + 1);
    if (text) {
        memcpy(text, data, size);
        text[size] = '\0';
    }
    return text;
}

#endif

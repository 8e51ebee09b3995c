/*
 * json_out.h - the JSON ledger ("format": "haloledger-ledger/1", design section 5).
 *
 * The keys of design section 5 are a public interface: never renamed, only
 * added to.  Streamed (no document tree: memory does not grow with the
 * ledger) and written atomically (temporary file in the target folder, then
 * rename).
 */
#ifndef JSON_OUT_H
#define JSON_OUT_H

#include "hlerr.h"
#include "ledger.h"

/* Print v (finite) into out (>= 32 bytes, NUL-terminated) exactly as cJSON 1.7.15's
 * print_number does; returns the length. Exposed so tests can hold it against cJSON. */
size_t json_out_number(double v, char *out);

/* Serialize the ledger; *text owned by the caller (hl_free). */
enum hl_status json_out_render(const struct ledger *l, char **text, struct hl_err *e);
/* Render and write to path atomically. */
enum hl_status json_out_write(const struct ledger *l, const char *path, struct hl_err *e);

#endif

/*
 * jsonpos.h - the positioned JSON reader under the campaign and catalog readers.
 *
 * jpos_parse checks a text against RFC 8259 (and its strings against RFC 3629 UTF-8),
 * with a message and line:column for the first fault, and gives the cJSON tree together
 * with a table of every value's position: node->valueint of each tree node is its index
 * in that table (a pre-order count), so a reader finds the line and column of any value
 * and of its key.  Streamed mode keeps a campaign's top-level "runs" array out of the
 * tree: its elements are only spans, each parsed by jpos_parse_span when it is read, so
 * the runs never stand in memory as one tree (design section 7).
 */
#ifndef JSONPOS_H
#define JSONPOS_H

#include <stddef.h>
#include <cjson/cJSON.h>
#include "hlerr.h"

#define JPOS_MAX_FILE (1u << 30) /* largest text read: keeps value counts inside int (valueint) */

/* Where a value sits: byte offset of its first byte, its line:column (1-based) and those of
 * its key (0:0 for an array element or the root). */
struct jpos_val { size_t off; int line, col, kline, kcol; };

/* One element of a streamed runs array: its bytes [off, end) and where it starts. */
struct jpos_span { size_t off, end; int line, col; };

/* A parsed text: the tree, the position table v[nv] (v[node->valueint] is a node's), and in
 * streamed mode the runs array's element spans (its tree node has no children). */
struct jpos_doc {
    struct jpos_val *v; size_t nv;
    cJSON *root;
    size_t run_vi;              /* value index of the streamed runs array, SIZE_MAX when none */
    struct jpos_span *el; size_t nel;
};

/* Check and parse text[0..len) (need not be NUL-terminated) into d.  prefix ("" or
 * "catalog") starts the field path of messages, docname ("campaign", "catalog") names the
 * text in them; streams: keep the top-level "runs" array as spans.  On HL_ERR_INPUT e has
 * line:column and field; d is then empty.  d is the caller's (jpos_free) on success. */
enum hl_status jpos_parse(const char *text, size_t len, const char *prefix, const char *docname,
                          int streams, struct jpos_doc *d, struct hl_err *e);

/* Tree and positions of runs element sp of text (already checked by jpos_parse) into d,
 * replacing d's previous tree; d->v is reused and grows to the largest element (*cap is its
 * capacity, 0 at first).  Free d with jpos_free after the last element. */
enum hl_status jpos_parse_span(const char *text, const struct jpos_span *sp, size_t *cap,
                               struct jpos_doc *d, struct hl_err *e);

/* Free the tree and tables of d and empty it (run_vi SIZE_MAX). */
void jpos_free(struct jpos_doc *d);

/* Field path of a message into out[cap]: prefix, then path (".runs[3].temp_c" style); a
 * campaign's paths start with "$" unless they start with a key ("runs[3].temp_c"). */
void jpos_field(char *out, size_t cap, const char *prefix, const char *path);

/* Append s[0..n) to buf[cap] at *k (advanced; always NUL-terminated), control bytes shown
 * as '?', so user text in a message cannot break the line. */
void jpos_put_clean(char *buf, size_t cap, size_t *k, const char *s, size_t n);

/* The value of four hex digits at p (avail bytes there) into *cp: 0, or -1 if not four. */
int jpos_hex4(const char *p, size_t avail, unsigned *cp);

#endif

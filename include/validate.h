/*
 * validate.h - the validation kit of the campaign reader: each getter checks one value of a
 * tree read by jsonpos.h (type, range, enum, date, reagent name, text rules) and on a fault
 * returns HL_ERR_INPUT with the message, the value's line:column and its field path.
 *
 * The field path is kept in the context: val_push_key / val_push_index append a component
 * and return the old length, val_pop goes back to it.  A getter pushes the member's key
 * itself and pops it on success, so after an error the path names the faulty value.
 * Ranges carry their reason (struct val_rng); unknown keys get the nearest known key.
 */
#ifndef VALIDATE_H
#define VALIDATE_H

#include <stddef.h>
#include <stdint.h>
#include "campaign.h"
#include "jsonpos.h"

#define VAL_MAX_TEXT 32767 /* longest string a workbook cell holds */

/* Where the values come from and where a message points. */
struct val_ctx {
    const struct jpos_doc *d;   /* tree and position table */
    const char *text;           /* the text positions are offsets into */
    const char *prefix;         /* field path prefix ("" or "catalog") */
    char path[256];             /* current field path, plen bytes */
    size_t plen;
    struct hl_err *e;
    int csv;        /* the values are cells of a CSV schedule (sched.h), not JSON text */
};

/* An accepted range.  Every lower bound of a quantity the models divide by or scale with
 * is a physical floor, not 0 (issue 16.2: 1e-308 made "inf" downstream); `why` says what
 * the floor stands for, and `lo_text` shows it where a decimal would read badly (1/60 h). */
struct val_rng { double lo, hi; int lo_open, hi_open; const char *why, *lo_text; };

/* val_str flags: refuse "" (VAL_NONEMPTY); refuse control characters and U+FFFE/U+FFFF,
 * which no workbook cell can hold (VAL_TEXT). */
enum { VAL_NONEMPTY = 1, VAL_TEXT = 2 };

/* Field path: append ".key" (an empty key shows as "") / "[i]"; both return the old length
 * for val_pop, which cuts the path back to it. */
size_t val_push_key(struct val_ctx *c, const char *k);
size_t val_push_index(struct val_ctx *c, long i);
void val_pop(struct val_ctx *c, size_t old);

/* Position entry of node n (NULL for a node without one, such as a synthetic value). */
const struct jpos_val *val_vp(const struct val_ctx *c, const cJSON *n);
/* Line:column of node n's value (0:0 without a position). */
struct camp_pos val_pos(const struct val_ctx *c, const cJSON *n);

/* Escape map of string value n (struct camp_strpos) so a column inside the decoded text
 * maps back to the file; for a CSV cell the doubled quotes.  sp->esc is allocated (owner:
 * the caller) when the string has escapes.  HL_ERR_NOMEM on allocation failure. */
enum hl_status val_esc_map(struct val_ctx *c, const cJSON *n, struct camp_strpos *sp);

/* Error at node n (at its key when at_key and it has one) with the current field path:
 * HL_ERR_INPUT, message printf-formatted (at most 479 bytes). */
enum hl_status val_err(struct val_ctx *c, const cJSON *n, int at_key, const char *fmt, ...)
    __attribute__((format(printf, 4, 5)));

/* "an object", "a number" ... for messages. */
const char *val_tname(const cJSON *n);

/* Members of object obj into slot[k] by names[k] (NULL when absent); an unknown key (with
 * the nearest of names suggested, else the list) or a duplicate key is an error at the key. */
enum hl_status val_members(struct val_ctx *c, const cJSON *obj, const char *const *names, int n,
                           const cJSON **slot);

/* Error "missing (required)" or "missing: what" for key of obj, placed at obj. */
enum hl_status val_missing(struct val_ctx *c, const cJSON *obj, const char *key, const char *what);

/* Raw text of number value n into buf[cap] (1e400 as written, not as inf). */
void val_raw_number(const struct val_ctx *c, const cJSON *n, char *buf, size_t cap);

/* Member m as a finite number in range r into *out; as a whole number in [lo, hi]. */
enum hl_status val_num(struct val_ctx *c, const cJSON *m, struct val_rng r, double *out);
enum hl_status val_int(struct val_ctx *c, const cJSON *m, long lo, long hi, long *out);

/* Member m as a string of at most maxlen bytes (flags VAL_*): *out points into the tree;
 * val_dup_str stores an hl_strdup copy in *out (the old *out freed; owner: the caller). */
enum hl_status val_str(struct val_ctx *c, const cJSON *m, int flags, size_t maxlen, const char **out);
enum hl_status val_dup_str(struct val_ctx *c, const cJSON *m, int flags, size_t maxlen, char **out);

/* Printable quote of user text s for messages into buf[cap]: at most 40 bytes, then "...". */
void val_quote(const char *s, char *buf, size_t cap);

/* Member m as one of names[0..n) into *out (its index). */
enum hl_status val_enum(struct val_ctx *c, const cJSON *m, const char *const *names, int n, int *out);

/* Member m as an ISO 8601 date or date-time (isodate.h) into *out, minutes. */
enum hl_status val_date(struct val_ctx *c, const cJSON *m, int64_t *out);

/* Member m as a reagent name (reagents.h) into *out (enum reagent_id); NaOH only with
 * allow_naoh; an unknown name gets the nearest known one. */
enum hl_status val_reagent(struct val_ctx *c, const cJSON *m, int allow_naoh, int *out);

/* Member m must be an array (nonempty: with at least one element, the spans of a streamed
 * runs array counted). */
enum hl_status val_array(struct val_ctx *c, const cJSON *m, int nonempty);

/* A set of ids (open addressing, FNV-1a) sized once for `expect` keys; the keys are not
 * copied (they must outlive the set).  init: 0 or -1 (no memory); find: the value or -1;
 * add: -1 when new, else the value already stored under key (which is kept). */
struct val_idset { const char **key; int *val; size_t cap, n; };
int val_idset_init(struct val_idset *h, size_t expect);
int val_idset_find(const struct val_idset *h, const char *key);
int val_idset_add(struct val_idset *h, const char *key, int val);
void val_idset_free(struct val_idset *h);

#endif

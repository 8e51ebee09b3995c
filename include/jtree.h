/*
 * jtree.h - building small cJSON documents (the sweep and compare outputs) so that a failed
 * allocation anywhere refuses the whole document instead of leaving a part out.
 *
 * cJSON's create calls return NULL when memory runs out and its add calls then quietly add
 * nothing: a writer that ignores that prints a valid-looking document with keys or rows
 * missing.  jt_add carries the failure in a flag the writer checks once at the end.
 */
#ifndef JTREE_H
#define JTREE_H

#include <cjson/cJSON.h>

/* Add item to object obj under name (to the array obj when name is NULL).  A NULL item, or
 * a failed add (the item is then deleted), clears *ok; *ok is never set back to 1. */
void jt_add(cJSON *obj, const char *name, cJSON *item, int *ok);

#endif

/* hlerr.c - error values (see hlerr.h). */
#include "hlerr.h"

#include <stdarg.h>
#include <stdio.h>
#include <string.h>

const char *hl_strerror(enum hl_status st)
{
    switch (st) {
    case HL_OK: return "no error";
    case HL_ERR_INPUT: return "bad input";
    case HL_ERR_NOMEM: return "out of memory";
    case HL_ERR_IO: return "input/output error";
    case HL_ERR_INTERNAL: return "internal error";
    }
    return "unknown error";
}

void hl_err_clear(struct hl_err *e)
{
    if (e)
        memset(e, 0, sizeof *e);
}

static void set_msg(struct hl_err *e, const char *fmt, va_list ap)
{
    vsnprintf(e->msg, sizeof e->msg, fmt, ap);
}

enum hl_status hl_err_set(struct hl_err *e, enum hl_status st, const char *fmt, ...)
{
    if (!e)
        return st;
    va_list ap;
    va_start(ap, fmt);
    set_msg(e, fmt, ap);
    va_end(ap);
    e->status = st;
    return st;
}

enum hl_status hl_err_at(struct hl_err *e, enum hl_status st, int line, int col,
                         const char *field, const char *fmt, ...)
{
    if (!e)
        return st;
    va_list ap;
    va_start(ap, fmt);
    set_msg(e, fmt, ap);
    va_end(ap);
    e->status = st;
    e->line = line;
    e->col = col;
    snprintf(e->field, sizeof e->field, "%s", field ? field : "");
    return st;
}

/*
 * afile.c - whole-file input and atomic output (see afile.h).
 *
 * Why fsync before rename: without it a crash after rename can leave an empty
 * file under the final name on some file systems (ext4 delayed allocation),
 * which is the half-written state this module exists to prevent.
 */
#define _XOPEN_SOURCE 700 /* realpath */
#include "afile.h"
#include "hlmem.h"

#include <errno.h>
#include <fcntl.h>
#include <stdint.h>
#include <stdlib.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

enum hl_status afile_read(const char *path, char **buf, size_t *len, struct hl_err *e)
{
    return afile_read_max(path, AFILE_READ_MAX, buf, len, e);
}

/* The cap is applied while reading: a device or pipe that never ends (/dev/zero, a FIFO
 * fed forever) is refused after max + 1 bytes instead of filling memory first. */
enum hl_status afile_read_max(const char *path, size_t max, char **buf, size_t *len,
                              struct hl_err *e)
{
    *buf = NULL;
    int fd = open(path, O_RDONLY | O_CLOEXEC);
    if (fd < 0)
        return hl_err_set(e, errno == ENOENT ? HL_ERR_INPUT : HL_ERR_IO, "cannot open: %s",
                          strerror(errno));
    struct stat sb;
    if (fstat(fd, &sb) != 0) {
        int err = errno;
        close(fd);
        return hl_err_set(e, HL_ERR_IO, "cannot read: %s", strerror(err));
    }
    if (S_ISDIR(sb.st_mode)) {
        close(fd);
        return hl_err_set(e, HL_ERR_INPUT, "is a folder, not a file");
    }
    if (S_ISREG(sb.st_mode) && (uintmax_t)sb.st_size > max) {
        close(fd);
        return hl_err_set(e, HL_ERR_INPUT, "larger than the limit of %zu bytes", max);
    }
    /* room for max + 1 bytes (to see that a stream is too long) and the NUL */
    size_t limit = max + 2, cap = 1 << 16, n = 0;
    if (S_ISREG(sb.st_mode) && (size_t)sb.st_size + 2 > cap)
        cap = (size_t)sb.st_size + 2; /* one read for a regular file that does not grow */
    if (cap > limit)
        cap = limit;
    char *b = hl_malloc(cap);
    int err = 0;
    while (b) {
        if (n + 1 == cap) {
            if (cap == limit)
                break; /* max + 1 bytes read: too long */
            size_t want = cap > limit / 2 ? limit : cap * 2;
            char *bigger = hl_realloc(b, want);
            if (!bigger) {
                hl_free(b);
                b = NULL;
                break;
            }
            b = bigger;
            cap = want;
        }
        ssize_t got = read(fd, b + n, cap - 1 - n);
        if (got < 0 && errno == EINTR)
            continue;
        if (got < 0) {
            err = errno;
            break;
        }
        if (got == 0)
            break;
        n += (size_t)got;
    }
    close(fd);
    if (!b)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    if (err || n > max) {
        hl_free(b);
        return err ? hl_err_set(e, HL_ERR_IO, "read error: %s", strerror(err))
                   : hl_err_set(e, HL_ERR_INPUT, "larger than the limit of %zu bytes", max);
    }
    b[n] = '\0';
    *buf = b;
    if (len)
        *len = n;
    return HL_OK;
}

/* Identity of a path that may not exist yet: the real folder and the last component.
 * NULL when the folder cannot be resolved (or no memory). */
static char *where_named(const char *path)
{
    const char *slash = strrchr(path, '/');
    const char *base = slash ? slash + 1 : path;
    char *dir = NULL;
    if (afile_dirname(path, &dir, NULL) != HL_OK)
        return NULL;
    char *real = realpath(dir, NULL); /* malloc'd by libc */
    hl_free(dir);
    if (!real)
        return NULL;
    size_t n = strlen(real) + strlen(base) + 2;
    char *out = hl_malloc(n);
    if (out)
        snprintf(out, n, "%s/%s", real, base);
    free(real);
    return out;
}

int afile_same(const char *a, const char *b)
{
    struct stat sa, sb;
    int ha = stat(a, &sa) == 0, hb = stat(b, &sb) == 0;
    if (ha && hb)
        return sa.st_dev == sb.st_dev && sa.st_ino == sb.st_ino;
    if (ha != hb)
        return 0;
    /* neither exists yet: the same name in the same real folder is the same file-to-be */
    char *wa = where_named(a), *wb = where_named(b);
    int same = wa && wb ? !strcmp(wa, wb) : !strcmp(a, b);
    hl_free(wa);
    hl_free(wb);
    return same;
}

enum hl_status afile_check_target(const char *path, struct hl_err *e)
{
    struct stat sb;
    if (stat(path, &sb) == 0 && !S_ISREG(sb.st_mode))
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: not a regular file", path);
    return HL_OK;
}

enum hl_status afile_dirname(const char *path, char **dir, struct hl_err *e)
{
    const char *slash = strrchr(path, '/');
    size_t n = slash ? (size_t)(slash - path) : 1;
    if (slash == path)
        n = 1; /* "/file" -> "/" */
    *dir = hl_malloc(n + 1);
    if (!*dir)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    memcpy(*dir, slash ? path : ".", n);
    (*dir)[n] = '\0';
    return HL_OK;
}

enum hl_status afile_tmpname(const char *path, char **tmp, struct hl_err *e)
{
    const char *slash = strrchr(path, '/');
    size_t dirlen = slash ? (size_t)(slash - path + 1) : 0;
    size_t n = strlen(path) + 48;
    *tmp = hl_malloc(n);
    if (!*tmp)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    for (unsigned attempt = 0; attempt < 1000; attempt++) {
        snprintf(*tmp, n, "%.*s.%s.tmp-%ld-%u", (int)dirlen, path, path + dirlen, (long)getpid(),
                 attempt);
        int fd = open(*tmp, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
        if (fd >= 0) {
            close(fd);
            return HL_OK;
        }
        if (errno != EEXIST)
            break;
    }
    int err = errno;
    hl_free(*tmp);
    *tmp = NULL;
    return hl_err_set(e, HL_ERR_IO, "cannot write %s: cannot create a file in its folder: %s", path,
                      strerror(err));
}

enum hl_status afile_commit(const char *tmp, const char *path, struct hl_err *e)
{
    if (rename(tmp, path) != 0) {
        int err = errno;
        unlink(tmp);
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: rename failed: %s", path, strerror(err));
    }
    return HL_OK;
}

enum hl_status afile_write(const char *path, const void *data, size_t len, struct hl_err *e)
{
    char *tmp;
    enum hl_status st = afile_tmpname(path, &tmp, e);
    if (st)
        return st;
    FILE *f = fopen(tmp, "wb");
    if (!f) {
        st = hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(errno));
        unlink(tmp);
        hl_free(tmp);
        return st;
    }
    int err = 0;
    if (fwrite(data, 1, len, f) != len || fflush(f) != 0 || ferror(f))
        err = errno ? errno : EIO;
    if (!err && fsync(fileno(f)) != 0 && errno != EINVAL)
        err = errno;
    if (fclose(f) != 0 && !err)
        err = errno ? errno : EIO;
    if (err) {
        unlink(tmp);
        hl_free(tmp);
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(err));
    }
    st = afile_commit(tmp, path, e);
    hl_free(tmp);
    return st;
}

/*
 * afile.c - atomic output files (see afile.h).
 *
 * Why fsync before rename: without it a crash after rename can leave an empty
 * file under the final name on some file systems (ext4 delalloc), which is
 * the half-written state this module exists to prevent.
 */
#include "afile.h"
#include "hlmem.h"

#include <errno.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

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
    static unsigned serial;
    const char *slash = strrchr(path, '/');
    size_t dirlen = slash ? (size_t)(slash - path + 1) : 0;
    const char *base = path + dirlen;
    size_t n = strlen(path) + 48;
    *tmp = hl_malloc(n);
    if (!*tmp)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    snprintf(*tmp, n, "%.*s.%s.tmp-%ld-%u", (int)dirlen, path, base, (long)getpid(), serial++);
    return HL_OK;
}

enum hl_status afile_commit(const char *tmp, const char *path, struct hl_err *e)
{
    if (rename(tmp, path) != 0) {
        int err = errno;
        unlink(tmp);
        return hl_err_set(e, HL_ERR_IO, "cannot rename into %s: %s", path, strerror(err));
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
        st = hl_err_set(e, HL_ERR_IO, "cannot create %s: %s", tmp, strerror(errno));
        hl_free(tmp);
        return st;
    }
    int bad = fwrite(data, 1, len, f) != len;
    bad |= fflush(f) != 0;
    int err = errno;
    bad |= ferror(f) != 0;
    if (!bad && fsync(fileno(f)) != 0 && errno != EINVAL) {
        bad = 1;
        err = errno;
    }
    if (fclose(f) != 0 && !bad) {
        bad = 1;
        err = errno;
    }
    if (bad) {
        unlink(tmp);
        hl_free(tmp);
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(err ? err : EIO));
    }
    st = afile_commit(tmp, path, e);
    hl_free(tmp);
    return st;
}

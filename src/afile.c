/*
 * afile.c - whole-file input and atomic output (see afile.h).
 *
 * Why fsync before rename: without it a crash after rename can leave an empty
 * file under the final name on some file systems (ext4 delayed allocation),
 * which is the half-written state this module exists to prevent.
 */
#include "afile.h"
#include "hlmem.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

enum hl_status afile_read(const char *path, char **buf, size_t *len, struct hl_err *e)
{
    *buf = NULL;
    FILE *f = fopen(path, "rb");
    if (!f)
        return hl_err_set(e, errno == ENOENT ? HL_ERR_INPUT : HL_ERR_IO, "cannot open: %s",
                          strerror(errno));
    size_t cap = 1 << 16, n = 0;
    char *b = hl_malloc(cap);
    while (b) {
        n += fread(b + n, 1, cap - n - 1, f);
        if (n < cap - 1)
            break;
        char *bigger = hl_realloc(b, cap * 2);
        if (!bigger) {
            hl_free(b);
            b = NULL;
            break;
        }
        b = bigger;
        cap *= 2;
    }
    int bad = ferror(f), err = errno;
    fclose(f);
    if (!b)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    if (bad) {
        hl_free(b);
        return hl_err_set(e, HL_ERR_IO, "read error: %s", strerror(err));
    }
    b[n] = '\0';
    *buf = b;
    if (len)
        *len = n;
    return HL_OK;
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

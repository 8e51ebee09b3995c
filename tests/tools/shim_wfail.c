/*
 * shim_wfail.c - LD_PRELOAD shim that makes one write-side call fail with ENOSPC.
 *
 * Counts the calls that put bytes on a file system: write, fwrite, fputs, fputc, putc,
 * fprintf, vfprintf (and their _chk forms used by fortified libraries), fflush, fseek,
 * fsync, fclose on regular files, and every rename.  Calls on pipes, terminals and
 * devices (stdout, stderr, the writer's status pipe) are not counted, so the walk
 * reaches only the outputs, whatever writer code makes the calls.
 *
 *   HL_WFAIL_AT=N       call N (1-based) fails; 0 or unset: count only
 *   HL_WFAIL_PERSIST=1  call N and every later one fail (a disk that stays full)
 *   HL_WFAIL_SCOPE=named  count only files that have a name (not the unlinked scratch
 *                       files a library writes and reads back, e.g. libxlsxwriter's)
 *   HL_WFAIL_REPORT=F   at exit of the first process, F gets "calls C" and, when call N
 *                       was reached, "failed N NAME"
 * The count lives in a shared mapping, so calls made by forked children are counted in
 * the same sequence.  A failing stdio call also sets the stream's error flag, as a real
 * write error does (ferror then reports it).  Built without sanitizers (see Makefile).
 */
#define _GNU_SOURCE
#include <dlfcn.h>
#include <errno.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <unistd.h>

struct shared {
    long calls, failed_at;
    char failed_name[32];
};
static struct shared *sh;
static long fail_at;
static int named_only, persist;
static pid_t origin;

__attribute__((constructor)) static void wfail_init(void)
{
    void *m = mmap(NULL, sizeof *sh, PROT_READ | PROT_WRITE, MAP_SHARED | MAP_ANONYMOUS, -1, 0);
    if (m == MAP_FAILED)
        abort();
    sh = m;
    const char *at = getenv("HL_WFAIL_AT");
    fail_at = at ? atol(at) : 0;
    const char *scope = getenv("HL_WFAIL_SCOPE");
    named_only = scope && !strcmp(scope, "named");
    const char *p = getenv("HL_WFAIL_PERSIST");
    persist = p && !strcmp(p, "1");
    origin = getpid();
}

__attribute__((destructor)) static void wfail_report(void)
{
    const char *path = getenv("HL_WFAIL_REPORT");
    if (!path || getpid() != origin)
        return;
    int fd = open(path, O_WRONLY | O_CREAT | O_TRUNC, 0644);
    if (fd < 0)
        return;
    char line[96];
    int n = snprintf(line, sizeof line, "calls %ld\n", sh->calls);
    if (sh->failed_at)
        n += snprintf(line + n, sizeof line - n, "failed %ld %s\n", sh->failed_at, sh->failed_name);
    ssize_t (*real_write)(int, const void *, size_t) =
        (ssize_t(*)(int, const void *, size_t))dlsym(RTLD_NEXT, "write");
    if (real_write(fd, line, (size_t)n) < 0)
        n = 0;
    close(fd);
}

static int regular_fd(int fd)
{
    struct stat sb;
    return fd >= 0 && fstat(fd, &sb) == 0 && S_ISREG(sb.st_mode) && (!named_only || sb.st_nlink > 0);
}

/* Count the call; 1 when this is the call that must fail. */
static int hit(const char *name, int eligible)
{
    if (!sh || !eligible)
        return 0;
    long n = __atomic_add_fetch(&sh->calls, 1, __ATOMIC_SEQ_CST);
    if (fail_at <= 0 || n < fail_at || (n > fail_at && !persist))
        return 0;
    if (n == fail_at) {
        sh->failed_at = n;
        snprintf(sh->failed_name, sizeof sh->failed_name, "%s", name);
    }
    errno = ENOSPC;
    return 1;
}

static int stream_hit(const char *name, FILE *f)
{
    if (!hit(name, f && regular_fd(fileno(f))))
        return 0;
    f->_flags |= _IO_ERR_SEEN;
    errno = ENOSPC;
    return 1;
}

#define REAL(ret, name, args) \
    static ret(*real) args;   \
    if (!real)                \
        real = (ret(*) args)dlsym(RTLD_NEXT, name);

ssize_t write(int fd, const void *buf, size_t n)
{
    REAL(ssize_t, "write", (int, const void *, size_t));
    if (hit("write", regular_fd(fd)))
        return -1;
    return real(fd, buf, n);
}

size_t fwrite(const void *p, size_t size, size_t n, FILE *f)
{
    REAL(size_t, "fwrite", (const void *, size_t, size_t, FILE *));
    if (stream_hit("fwrite", f))
        return 0;
    return real(p, size, n, f);
}

int fputs(const char *s, FILE *f)
{
    REAL(int, "fputs", (const char *, FILE *));
    if (stream_hit("fputs", f))
        return EOF;
    return real(s, f);
}

int fputc(int c, FILE *f)
{
    REAL(int, "fputc", (int, FILE *));
    if (stream_hit("fputc", f))
        return EOF;
    return real(c, f);
}

int putc(int c, FILE *f)
{
    REAL(int, "putc", (int, FILE *));
    if (stream_hit("putc", f))
        return EOF;
    return real(c, f);
}

int vfprintf(FILE *f, const char *fmt, va_list ap)
{
    REAL(int, "vfprintf", (FILE *, const char *, va_list));
    if (stream_hit("vfprintf", f))
        return -1;
    return real(f, fmt, ap);
}

int fprintf(FILE *f, const char *fmt, ...)
{
    REAL(int, "vfprintf", (FILE *, const char *, va_list));
    if (stream_hit("fprintf", f))
        return -1;
    va_list ap;
    va_start(ap, fmt);
    int r = real(f, fmt, ap);
    va_end(ap);
    return r;
}

int __vfprintf_chk(FILE *f, int flag, const char *fmt, va_list ap)
{
    REAL(int, "__vfprintf_chk", (FILE *, int, const char *, va_list));
    if (stream_hit("__vfprintf_chk", f))
        return -1;
    return real(f, flag, fmt, ap);
}

int __fprintf_chk(FILE *f, int flag, const char *fmt, ...)
{
    REAL(int, "__vfprintf_chk", (FILE *, int, const char *, va_list));
    if (stream_hit("__fprintf_chk", f))
        return -1;
    va_list ap;
    va_start(ap, fmt);
    int r = real(f, flag, fmt, ap);
    va_end(ap);
    return r;
}

int fflush(FILE *f)
{
    REAL(int, "fflush", (FILE *));
    if (f && stream_hit("fflush", f))
        return EOF;
    return real(f);
}

int fseek(FILE *f, long off, int whence)
{
    REAL(int, "fseek", (FILE *, long, int));
    if (stream_hit("fseek", f))
        return -1;
    return real(f, off, whence);
}

int fseeko64(FILE *f, off_t off, int whence)
{
    REAL(int, "fseeko64", (FILE *, off_t, int));
    if (stream_hit("fseeko64", f))
        return -1;
    return real(f, off, whence);
}

int fsync(int fd)
{
    REAL(int, "fsync", (int));
    if (hit("fsync", regular_fd(fd)))
        return -1;
    return real(fd);
}

/* The stream is closed either way (as a failing close does); only the result is an error. */
int fclose(FILE *f)
{
    REAL(int, "fclose", (FILE *));
    int failing = stream_hit("fclose", f);
    int r = real(f);
    if (failing) {
        errno = ENOSPC;
        return EOF;
    }
    return r;
}

int rename(const char *from, const char *to)
{
    REAL(int, "rename", (const char *, const char *));
    if (hit("rename", 1))
        return -1;
    return real(from, to);
}

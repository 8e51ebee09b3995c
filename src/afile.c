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

#include <dirent.h>
#include <errno.h>
#include <limits.h>
#include <signal.h>
#include <fcntl.h>
#include <stdint.h>
#include <stdlib.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>
#ifdef __linux__
#include <sys/prctl.h>
#endif
#include <sys/wait.h>
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

/*
 * Staged names.  A signal that ends the process (Ctrl-C, kill, a closed terminal) must not
 * leave a staged file behind, so every name is kept in a fixed table that the handler can
 * walk with async-signal-safe calls only (unlink, kill, waitpid, raise).  This is the one
 * piece of process-wide state besides the allocation counter: a signal handler gets no
 * arguments.  Names are entered before the file is created and removed after it is
 * renamed or unlinked, with the handled signals blocked in between, so no file exists
 * unrecorded.
 */
#define STAGED_MAX 32
static char staged_name[STAGED_MAX][PATH_MAX];
static volatile sig_atomic_t staged_used[STAGED_MAX];
static volatile sig_atomic_t writer_pid; /* a child writing for us, 0 if none */
static const int guarded[] = {SIGHUP, SIGINT, SIGQUIT, SIGTERM, SIGPIPE, SIGALRM, SIGUSR1, SIGUSR2};
#define NGUARDED (int)(sizeof guarded / sizeof guarded[0])

/* Blocks the guarded signals; *old gets the mask to restore. */
static void block_guarded(sigset_t *old)
{
    sigset_t set;
    sigemptyset(&set);
    for (int i = 0; i < NGUARDED; i++)
        sigaddset(&set, guarded[i]);
    sigprocmask(SIG_BLOCK, &set, old);
}

/* Handler of the guarded signals: stops and waits for a writer child, removes every staged
 * file, then ends the process by the same signal. Async-signal-safe calls only. */
static void on_fatal_signal(int sig)
{
    pid_t child = (pid_t)writer_pid;
    if (child > 0) { /* its own handler removes its files; wait so none is created after */
        kill(child, SIGTERM);
        waitpid(child, NULL, 0);
    }
    for (int i = 0; i < STAGED_MAX; i++)
        if (staged_used[i])
            unlink(staged_name[i]);
    signal(sig, SIG_DFL);
    raise(sig); /* delivered on return: the process ends by the same signal, as expected */
}

void afile_guard_signals(void)
{
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_fatal_signal;
    sigemptyset(&sa.sa_mask);
    for (int i = 0; i < NGUARDED; i++)
        sigaddset(&sa.sa_mask, guarded[i]);
    for (int i = 0; i < NGUARDED; i++) {
        struct sigaction old;
        /* a signal ignored by whoever started us (nohup, a shell's background job) stays so */
        if (sigaction(guarded[i], NULL, &old) == 0 && old.sa_handler != SIG_IGN)
            sigaction(guarded[i], &sa, NULL);
    }
    /* past RLIMIT_FSIZE a write then fails with EFBIG and is reported like a full disk */
    signal(SIGXFSZ, SIG_IGN);
}

long afile_fork_writer(void)
{
    sigset_t old;
    /* no signal between fork and the record of the child: the handler must know it */
    block_guarded(&old);
    pid_t pid = fork();
    int err = errno;
    if (pid == 0) {
        for (int i = 0; i < STAGED_MAX; i++)
            staged_used[i] = 0; /* the parent's files: the parent removes them */
        writer_pid = 0;
#ifdef __linux__
        prctl(PR_SET_PDEATHSIG, SIGTERM); /* a parent killed outright takes the writer along */
        if (getppid() == 1)
            raise(SIGTERM);
#endif
    } else if (pid > 0) {
        writer_pid = (sig_atomic_t)pid;
    }
    sigprocmask(SIG_SETMASK, &old, NULL);
    errno = err;
    return (long)pid;
}

void afile_writer_done(void)
{
    writer_pid = 0;
}

/* Drops tmp from the list of staged names (the file itself is left alone). */
static void forget(const char *tmp)
{
    for (int i = 0; i < STAGED_MAX; i++)
        if (staged_used[i] && !strcmp(staged_name[i], tmp))
            staged_used[i] = 0;
}

void afile_discard(const char *tmp)
{
    sigset_t old;
    block_guarded(&old);
    unlink(tmp);
    forget(tmp);
    sigprocmask(SIG_SETMASK, &old, NULL);
}

void afile_discard_all(void)
{
    sigset_t old;
    block_guarded(&old);
    for (int i = 0; i < STAGED_MAX; i++)
        if (staged_used[i]) {
            unlink(staged_name[i]);
            staged_used[i] = 0;
        }
    sigprocmask(SIG_SETMASK, &old, NULL);
}

/* Our pattern: ".NAME.hl.tmp-PID-N", NAME cut so the whole stays within NAME_MAX however
 * long the target's name is (and however often a staged name is staged again). */
#define TMP_TAG ".hl.tmp-"
#define TMP_ROOM (1 + sizeof TMP_TAG - 1 + 20 + 1 + 10) /* '.', tag, pid, '-', N */

/* Create the staged file exclusively, recorded in the table; -1 with errno on failure. */
static int create_staged(const char *name)
{
    sigset_t old;
    block_guarded(&old);
    int slot = -1, fd = -1;
    /* a writer that removed its staged file with unlink() left its entry: the same name
     * takes that entry again, and a full table reclaims entries whose file is gone */
    for (int i = 0; i < STAGED_MAX && slot < 0; i++)
        if (staged_used[i] && !strcmp(staged_name[i], name))
            slot = i;
    for (int i = 0; i < STAGED_MAX && slot < 0; i++)
        if (!staged_used[i])
            slot = i;
    struct stat sb;
    for (int i = 0; i < STAGED_MAX && slot < 0; i++)
        if (lstat(staged_name[i], &sb) != 0 && errno == ENOENT)
            slot = i;
    if (slot < 0 || strlen(name) >= PATH_MAX) {
        sigprocmask(SIG_SETMASK, &old, NULL);
        errno = slot < 0 ? EMFILE : ENAMETOOLONG;
        return -1;
    }
    memcpy(staged_name[slot], name, strlen(name) + 1);
    staged_used[slot] = 1;
    fd = open(name, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, 0666);
    int err = errno;
    if (fd < 0)
        staged_used[slot] = 0;
    else
        close(fd);
    sigprocmask(SIG_SETMASK, &old, NULL);
    errno = err;
    return fd < 0 ? -1 : 0;
}

enum hl_status afile_tmpname(const char *path, char **tmp, struct hl_err *e)
{
    const char *slash = strrchr(path, '/');
    size_t dirlen = slash ? (size_t)(slash - path + 1) : 0;
    size_t baselen = strlen(path + dirlen);
    if (baselen > NAME_MAX - TMP_ROOM)
        baselen = NAME_MAX - TMP_ROOM;
    size_t n = dirlen + TMP_ROOM + baselen + 1;
    *tmp = hl_malloc(n);
    if (!*tmp)
        return hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    for (unsigned attempt = 0; attempt < 1000; attempt++) {
        snprintf(*tmp, n, "%.*s.%.*s" TMP_TAG "%ld-%u", (int)dirlen, path, (int)baselen,
                 path + dirlen, (long)getpid(), attempt);
        if (create_staged(*tmp) == 0)
            return HL_OK;
        if (errno != EEXIST)
            break;
    }
    int err = errno;
    hl_free(*tmp);
    *tmp = NULL;
    return hl_err_set(e, HL_ERR_IO, "cannot write %s: cannot create a file in its folder: %s", path,
                      strerror(err));
}

/* PID of a name of our pattern, or 0. The test is on the last ".tmp-PID-N", so the
 * ".NAME.tmp-PID-N" names of earlier versions (before the ".hl" tag) are found too. */
static long staged_pid(const char *name)
{
    static const char tag_end[] = ".tmp-";
    if (name[0] != '.')
        return 0;
    const char *tag = NULL;
    for (const char *p = strstr(name, tag_end); p; p = strstr(p + 1, tag_end))
        tag = p;
    if (!tag)
        return 0;
    const char *p = tag + strlen(tag_end);
    long pid = 0;
    int digits = 0;
    for (; *p >= '0' && *p <= '9' && digits < 10; p++, digits++)
        pid = pid * 10 + (*p - '0');
    if (!digits || *p++ != '-' || !(*p >= '0' && *p <= '9'))
        return 0;
    while (*p >= '0' && *p <= '9')
        p++;
    return *p ? 0 : pid;
}

int afile_sweep(const char *dir)
{
    DIR *d = opendir(dir);
    if (!d)
        return 0;
    int removed = 0;
    struct dirent *de;
    while ((de = readdir(d))) {
        long pid = staged_pid(de->d_name);
        if (pid <= 0 || pid == (long)getpid())
            continue;
        /* only a process that no longer exists cannot be writing it (a live one may be
         * another run in the same folder) */
        if (kill((pid_t)pid, 0) == 0 || errno != ESRCH)
            continue;
        struct stat sb;
        if (fstatat(dirfd(d), de->d_name, &sb, AT_SYMLINK_NOFOLLOW) != 0 || !S_ISREG(sb.st_mode) ||
            sb.st_uid != geteuid())
            continue;
        if (unlinkat(dirfd(d), de->d_name, 0) == 0)
            removed++;
    }
    closedir(d);
    return removed;
}

enum hl_status afile_commit(const char *tmp, const char *path, struct hl_err *e)
{
    sigset_t old;
    block_guarded(&old);
    int bad = rename(tmp, path) != 0, err = errno;
    if (bad)
        unlink(tmp);
    forget(tmp);
    sigprocmask(SIG_SETMASK, &old, NULL);
    if (bad)
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: rename failed: %s", path, strerror(err));
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
        afile_discard(tmp);
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
        afile_discard(tmp);
        hl_free(tmp);
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: %s", path, strerror(err));
    }
    st = afile_commit(tmp, path, e);
    hl_free(tmp);
    return st;
}

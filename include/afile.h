/*
 * afile.h - whole-file input and atomic output.
 *
 * An output is first written under a temporary name in the target folder
 * (same file system, so rename(2) is atomic) and renamed over the target only
 * when every byte is written and fclose() succeeded.  On any failure the
 * temporary is removed and the previous file stays as it was.
 */
#ifndef AFILE_H
#define AFILE_H

#include <stddef.h>
#include "hlerr.h"

/* Largest input afile_read accepts: the campaign reader's own limit (jsonpos.h JPOS_MAX_FILE). */
#define AFILE_READ_MAX ((size_t)1 << 30)

/* Read the whole file at path into *buf (NUL-terminated, hl_free) and its length into
 * *len (may be NULL); at most AFILE_READ_MAX bytes. Missing file, a folder or a longer
 * input: HL_ERR_INPUT; other failures HL_ERR_IO/_NOMEM. */
enum hl_status afile_read(const char *path, char **buf, size_t *len, struct hl_err *e);
/* Same with a cap of max bytes, applied while reading (pipes and devices included). */
enum hl_status afile_read_max(const char *path, size_t max, char **buf, size_t *len,
                              struct hl_err *e);

/* 1 when a and b name one file: same device and inode if both exist (through symlinks
 * and hard links), else the same name in the same real folder when neither exists. */
int afile_same(const char *a, const char *b);

/* Refuse a target that exists and is not a regular file (a device, folder or fifo:
 * renaming over /dev/full as root would replace the device). */
enum hl_status afile_check_target(const char *path, struct hl_err *e);

/* Create an empty temporary file next to path, "DIR/.NAME.hl.tmp-PID-N" (NAME cut so
 * the name fits NAME_MAX), exclusively (O_EXCL; N counts up past names in use) with the
 * usual 0666-minus-umask mode, recorded for removal on a fatal signal, and return its
 * name in *tmp (hl_free). Errors name path, not the temporary. */
enum hl_status afile_tmpname(const char *path, char **tmp, struct hl_err *e);
/* unlink(tmp) and drop it from the signal-cleanup record. */
void afile_discard(const char *tmp);
/* Remove every staged file still recorded (for exit paths that did not commit). */
void afile_discard_all(void);
/* Remove files of our pattern in folder dir left by processes that no longer exist
 * (same user, regular files only). Returns how many were removed. */
int afile_sweep(const char *dir);

/* Catch the terminating signals (HUP INT QUIT TERM PIPE ALRM USR1 USR2) to remove the
 * staged files, then end by the same signal; ignore SIGXFSZ so an over-size write fails
 * with EFBIG and is reported. Call once, early. */
void afile_guard_signals(void);
/* fork() for a child that writes an output: in the parent the child is recorded, so a
 * fatal signal stops and awaits it before the staged files are removed; the child forgets
 * the parent's staged files (the parent removes them) and, on Linux, is sent SIGTERM if
 * the parent dies. Returns what fork returns (-1 with errno). */
long afile_fork_writer(void);
/* The recorded writer child has been awaited: forget it. */
void afile_writer_done(void);

/* Directory part of path ("." when none); *dir owned by caller (hl_free). */
enum hl_status afile_dirname(const char *path, char **dir, struct hl_err *e);
/* rename(tmp, path) and drop tmp from the record; on failure unlink(tmp) and report
 * HL_ERR_IO naming path. */
enum hl_status afile_commit(const char *tmp, const char *path, struct hl_err *e);
/* Write len bytes to path atomically (tmp + fwrite + fflush + fsync + fclose + rename). */
enum hl_status afile_write(const char *path, const void *data, size_t len, struct hl_err *e);

#endif

/* report_set.h - the report files of one screening run published as one set:
 * DIR/<stem>.screen/ is replaced whole by one rename, never file by file. */
#ifndef PS_REPORT_SET_H
#define PS_REPORT_SET_H

#include <signal.h>
#include <stdbool.h>
#include <stddef.h>

#include "core/diag.h"
#include "report/reports.h"

enum { PS_SET_PATH = 4096, PS_SET_FILES = 8 };

/* One set being written. The writers know nothing of it: each writes one
 * stream, the set decides where the stream lands.
 *
 *   DIR/.<stem>.screen.lock          held (flock) from open to release; a second run
 *                                    of the same stem on DIR is refused (PS_ERR_BUSY)
 *   DIR/.<stem>.screen.new-XXXXXX/   staging: every file of the new set, written and synced
 *   DIR/<stem>.screen/               the published set; swapped for the staging directory
 *                                    by one renameat2(RENAME_EXCHANGE) (or one rename(2)
 *                                    when there is no set yet), then the old set is removed
 *
 * A reader of DIR therefore sees the previous set or the new one, whole. The
 * fields are the set's own; callers only read `published` (DIR/<stem>.screen).
 * The paths are kept in fixed buffers so that ps_report_set_release can run
 * in a signal handler. */
typedef struct ps_report_set {
    char dir[PS_SET_PATH];
    char published[PS_SET_PATH];  /* DIR/<stem>.screen */
    char lock[PS_SET_PATH];       /* DIR/.<stem>.screen.lock */
    char prefix[PS_SET_PATH];     /* .<stem>.screen. (the hidden names of this set) */
    char staging[PS_SET_PATH];    /* DIR/.<stem>.screen.new-XXXXXX once made */
    char staged[PS_SET_FILES][PS_SET_PATH];
    volatile sig_atomic_t n_staged;     /* entries of staged[] that may exist */
    volatile sig_atomic_t has_staging;  /* staging[] names a directory of ours */
    volatile sig_atomic_t lock_fd;      /* -1 when not held */
} ps_report_set;

/* Prepare s for the set DIR/<stem>.screen: make DIR if it is missing, take
 * the lock, and remove what a run of the same stem killed without cleanup
 * left (staging directories; a previous set moved aside by the fallback
 * swap is moved back when no set is published). Call before the long work,
 * so that a concurrent run is refused at once.
 * Returns PS_OK, PS_ERR_BUSY (another process holds the lock; d says so),
 * or PS_ERR_IO (d names the path and the reason). On failure nothing is
 * held and DIR is as it was (except a DIR that was made). */
ps_status ps_report_set_open(ps_report_set *s, const char *dir, const char *stem, ps_diag *d);

/* Write one file of the new set: fn's stream into the staging directory
 * (made on the first call) under `name` (a plain file name), flushed and
 * synced. At most PS_SET_FILES files. On failure the partial file is
 * removed; the published set is untouched. */
ps_status ps_report_set_write(ps_report_set *s, const char *name, ps_writer_fn fn, const ps_run *r, ps_diag *d);

/* The same in three steps, so that several files can be written at once:
 * ps_report_set_create makes the file `name` in the staging directory and
 * opens it (*f; *slot names it for ps_report_set_finish); ps_report_set_fill
 * runs fn into it and closes it (flushed and synced), touching nothing
 * else of s, so fills of different files may run in different threads;
 * ps_report_set_finish, called in the creating thread after the fill,
 * removes the file when the fill failed and says why in d. */
ps_status ps_report_set_create(ps_report_set *s, const char *name, FILE **f, int *slot, ps_diag *d);
typedef struct ps_report_fill {
    ps_status status;
    int err;          /* errno of the failure (status PS_ERR_IO) */
} ps_report_fill;
ps_report_fill ps_report_set_fill(FILE *f, ps_writer_fn fn, const ps_run *r);
ps_status ps_report_set_finish(ps_report_set *s, int slot, const char *name, ps_report_fill fill, ps_diag *d);

/* Publish the staged files as DIR/<stem>.screen in one step, remove the
 * previous set, then remove the files named in `retired` (plain names
 * directly in DIR: what an earlier layout wrote for this stem; missing ones
 * are fine). Must not run while a signal handler may call
 * ps_report_set_release: block those signals around it.
 * Returns PS_OK once the new set is published; d->text is then non-empty
 * only when the previous set could not be fully removed (a warning).
 * Returns PS_ERR_IO when nothing was published (the previous set stays). */
ps_status ps_report_set_publish(ps_report_set *s, const char *const *retired, size_t n_retired, ps_diag *d);

/* Remove the staging directory and its files (if any) and release the lock.
 * Async-signal-safe (unlink, rmdir, close only); safe to call twice. The
 * published set is never touched. */
void ps_report_set_release(ps_report_set *s);

#endif

/* report_set.c - a screening run's reports published whole: staged in a
 * private directory, swapped in by one rename, under a per-stem lock. */
#define _GNU_SOURCE /* flock, renameat2 and RENAME_EXCHANGE (Linux, glibc >= 2.28) */
#include "report/report_set.h"

#include <dirent.h>
#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdio_ext.h>
#include <stdlib.h>
#include <string.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

/* Length of the random part mkdtemp fills in ("XXXXXX"). */
#define SUFFIX_LEN 6

static mode_t file_mode(mode_t full)
{
    /* mkdtemp makes 0700; a report set is an ordinary directory. The umask is
     * read by setting it, so this runs only where nothing else does. */
    mode_t mask = umask(0);
    umask(mask);
    return full & ~mask;
}

/* Remove a directory that holds only files (a set or a staging directory).
 * Returns 0, or -1 with errno set (an entry that is a directory, say). */
static int remove_flat(const char *path)
{
    DIR *dp = opendir(path);
    if (!dp)
        return -1;
    int fd = dirfd(dp), err = 0;
    for (struct dirent *e = readdir(dp); e; e = readdir(dp)) {
        if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
            continue;
        if (unlinkat(fd, e->d_name, 0) != 0 && errno != ENOENT && !err)
            err = errno;
    }
    closedir(dp);
    if (rmdir(path) != 0)
        return -1;
    if (err) {
        errno = err;
        return -1;
    }
    return 0;
}

/* The lock: flock on DIR/.<stem>.screen.lock, removed on release. A run that
 * opened the file just before the holder removed it would lock a name that
 * no longer exists, so the lock counts only when the locked file is still the
 * one under the name. */
static ps_status lock_take(ps_report_set *s, ps_diag *d)
{
    for (int tries = 0; tries < 64; tries++) {
        int fd = open(s->lock, O_RDWR | O_CREAT | O_CLOEXEC, 0666);
        if (fd < 0)
            return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot create the lock file %s: %s", s->lock,
                               strerror(errno));
        if (flock(fd, LOCK_EX | LOCK_NB) != 0) {
            int e = errno;
            close(fd);
            if (e == EWOULDBLOCK)
                return ps_diag_set(d, PS_ERR_BUSY, 0, 0, "",
                                   "another plantsieve run is writing the same reports into %s "
                                   "(it holds %s); this run wrote nothing",
                                   s->dir, s->lock);
            return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot lock %s: %s", s->lock, strerror(e));
        }
        struct stat held, named;
        if (fstat(fd, &held) == 0 && stat(s->lock, &named) == 0 && held.st_dev == named.st_dev &&
            held.st_ino == named.st_ino) {
            s->lock_fd = fd;
            return PS_OK;
        }
        close(fd);
    }
    return ps_diag_set(d, PS_ERR_BUSY, 0, 0, "", "the lock file %s keeps changing: another run is using %s",
                       s->lock, s->dir);
}

/* What a run of this stem killed without cleanup left in DIR: staging
 * directories (removed) and a previous set moved aside by the fallback swap
 * (moved back when no set is published, else removed). Runs under the lock. */
static void leftovers_remove(ps_report_set *s)
{
    DIR *dp = opendir(s->dir);
    if (!dp)
        return;
    size_t np = strlen(s->prefix);
    char path[PS_SET_PATH];
    for (struct dirent *e = readdir(dp); e; e = readdir(dp)) {
        const char *rest = e->d_name + np;
        if (strncmp(e->d_name, s->prefix, np) != 0 || strlen(rest) != 4 + SUFFIX_LEN)
            continue;
        bool is_new = strncmp(rest, "new-", 4) == 0, is_old = strncmp(rest, "old-", 4) == 0;
        if (!is_new && !is_old)
            continue;
        if (snprintf(path, sizeof path, "%s/%s", s->dir, e->d_name) >= (int)sizeof path)
            continue;
        struct stat st;
        if (is_old && lstat(s->published, &st) != 0 && errno == ENOENT && rename(path, s->published) == 0)
            continue;
        (void)remove_flat(path);
    }
    closedir(dp);
}

ps_status ps_report_set_open(ps_report_set *s, const char *dir, const char *stem, ps_diag *d)
{
    s->lock_fd = -1;
    s->has_staging = 0;
    s->n_staged = 0;
    s->staging[0] = '\0';
    if (snprintf(s->dir, sizeof s->dir, "%s", dir) >= (int)sizeof s->dir ||
        snprintf(s->published, sizeof s->published, "%s/%s.screen", dir, stem) >= (int)sizeof s->published ||
        snprintf(s->lock, sizeof s->lock, "%s/.%s.screen.lock", dir, stem) >= (int)sizeof s->lock ||
        snprintf(s->prefix, sizeof s->prefix, ".%s.screen.", stem) >= (int)sizeof s->prefix ||
        /* room for DIR/<prefix>new-XXXXXX/<name> */
        strlen(s->dir) + strlen(s->prefix) + 4 + SUFFIX_LEN + 256 >= PS_SET_PATH)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s/%s.screen: path too long", dir, stem);
    if (mkdir(dir, 0777) != 0 && errno != EEXIST)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot create %s: %s", dir, strerror(errno));
    ps_status st = lock_take(s, d);
    if (st != PS_OK)
        return st;
    struct stat pub;
    if (lstat(s->published, &pub) == 0 && !S_ISDIR(pub.st_mode)) {
        ps_report_set_release(s);
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s exists and is not a directory (a report set is one)",
                           s->published);
    }
    leftovers_remove(s);
    return PS_OK;
}

static ps_status staging_make(ps_report_set *s, ps_diag *d)
{
    if (snprintf(s->staging, sizeof s->staging, "%s/%snew-XXXXXX", s->dir, s->prefix) >= (int)sizeof s->staging)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: path too long", s->published);
    if (!mkdtemp(s->staging))
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot create a directory in %s: %s", s->dir,
                           strerror(errno));
    s->has_staging = 1;
    if (chmod(s->staging, file_mode(0777)) != 0) {
        int e = errno;
        ps_report_set_release(s);
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", s->staging, strerror(e));
    }
    return PS_OK;
}

ps_status ps_report_set_create(ps_report_set *s, const char *name, FILE **f, int *slot, ps_diag *d)
{
    *f = NULL;
    *slot = -1;
    if (s->lock_fd < 0)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: the report set is not open", s->published);
    if (!s->has_staging) {
        ps_status st = staging_make(s, d);
        if (st != PS_OK)
            return st;
    }
    if (s->n_staged >= PS_SET_FILES || strchr(name, '/'))
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: not a file name for a report set of at most %d files",
                           name, PS_SET_FILES);
    char *path = s->staged[s->n_staged];
    if (snprintf(path, PS_SET_PATH, "%s/%s", s->staging, name) >= PS_SET_PATH)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s/%s: path too long", s->staging, name);
    s->n_staged = s->n_staged + 1; /* counted before it exists: a handler may remove it any time */
    int fd = open(path, O_WRONLY | O_CREAT | O_EXCL | O_CLOEXEC, file_mode(0666));
    *f = fd < 0 ? NULL : fdopen(fd, "w");
    if (!*f) {
        int e = errno;
        if (fd >= 0)
            close(fd);
        unlink(path);
        s->n_staged = s->n_staged - 1;
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot write %s: %s", name, strerror(e));
    }
    /* One thread writes a report at a time (its writer, then the closing
     * thread after a join): the stream need not lock itself on every call. */
    __fsetlocking(*f, FSETLOCKING_BYCALLER);
    *slot = s->n_staged - 1;
    return PS_OK;
}

ps_report_fill ps_report_set_fill(FILE *f, ps_writer_fn fn, const ps_run *r)
{
    ps_report_fill out = {fn(f, r), 0};
    if (out.status != PS_OK)
        out.err = errno;
    else if (fflush(f) != 0 || ferror(f) || fsync(fileno(f)) != 0)
        out = (ps_report_fill){PS_ERR_IO, errno};
    if (fclose(f) != 0 && out.status == PS_OK)
        out = (ps_report_fill){PS_ERR_IO, errno};
    return out;
}

ps_status ps_report_set_finish(ps_report_set *s, int slot, const char *name, ps_report_fill fill, ps_diag *d)
{
    if (fill.status == PS_OK)
        return PS_OK;
    /* Removed now; the slot stays counted (release removes what it names
     * again, harmlessly), since later files may be staged after it. */
    if (slot >= 0 && slot < PS_SET_FILES)
        unlink(s->staged[slot]);
    return ps_diag_set(d, fill.status, 0, 0, "", "cannot write %s: %s", name,
                       fill.status == PS_ERR_NOMEM ? "out of memory" : strerror(fill.err));
}

ps_status ps_report_set_write(ps_report_set *s, const char *name, ps_writer_fn fn, const ps_run *r, ps_diag *d)
{
    FILE *f;
    int slot;
    ps_status st = ps_report_set_create(s, name, &f, &slot, d);
    if (st != PS_OK)
        return st;
    ps_report_fill fill = ps_report_set_fill(f, fn, r);
    if (fill.status != PS_OK && slot == s->n_staged - 1) {
        unlink(s->staged[slot]);
        s->n_staged = s->n_staged - 1; /* the last one: no longer counted */
    }
    return ps_report_set_finish(s, slot, name, fill, d);
}

static void dir_sync(const char *path)
{
    int fd = open(path, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (fd >= 0) {
        (void)fsync(fd);
        close(fd);
    }
}

/* The swap itself. On return PS_OK the new set is under s->published and
 * `old` names the previous set's directory (or is empty when there was none). */
static ps_status swap_in(ps_report_set *s, char *old, size_t n_old, ps_diag *d)
{
    old[0] = '\0';
    struct stat pub;
    if (lstat(s->published, &pub) != 0) {
        if (errno != ENOENT)
            return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", s->published, strerror(errno));
        if (rename(s->staging, s->published) != 0)
            return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot rename %s to %s: %s", s->staging, s->published,
                               strerror(errno));
        return PS_OK;
    }
    if (!S_ISDIR(pub.st_mode))
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s exists and is not a directory (a report set is one)",
                           s->published);
#ifdef RENAME_EXCHANGE
    if (renameat2(AT_FDCWD, s->staging, AT_FDCWD, s->published, RENAME_EXCHANGE) == 0) {
        snprintf(old, n_old, "%s", s->staging); /* the previous set now sits there */
        return PS_OK;
    }
    if (errno != EINVAL && errno != ENOSYS && errno != EOPNOTSUPP)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot swap %s for %s: %s", s->staging, s->published,
                           strerror(errno));
#endif
    /* No exchange on this file system: move the previous set aside, then the
     * new one in. Between the two renames the set is absent, never mixed; a
     * run killed there is repaired by the next one (leftovers_remove). */
    size_t n = strlen(s->staging);
    if (snprintf(old, n_old, "%s/%sold-%s", s->dir, s->prefix, s->staging + n - SUFFIX_LEN) >= (int)n_old) {
        old[0] = '\0';
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: path too long", s->published);
    }
    if (rename(s->published, old) != 0) {
        int e = errno;
        old[0] = '\0';
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot move %s aside: %s", s->published, strerror(e));
    }
    if (rename(s->staging, s->published) != 0) {
        int e = errno;
        (void)rename(old, s->published);
        old[0] = '\0';
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot rename %s to %s: %s", s->staging, s->published,
                           strerror(e));
    }
    return PS_OK;
}

ps_status ps_report_set_publish(ps_report_set *s, const char *const *retired, size_t n_retired, ps_diag *d)
{
    if (s->lock_fd < 0 || !s->has_staging)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: nothing staged to publish", s->published);
    dir_sync(s->staging);
    char old[PS_SET_PATH];
    ps_status st = swap_in(s, old, sizeof old, d);
    if (st != PS_OK)
        return st;
    s->has_staging = 0;
    s->n_staged = 0;
    dir_sync(s->dir);
    ps_diag_clear(d);
    if (old[0] && remove_flat(old) != 0)
        ps_diag_set(d, PS_OK, 0, 0, "", "the previous set could not be removed from %s: %s", old, strerror(errno));
    char path[PS_SET_PATH];
    for (size_t i = 0; i < n_retired; i++) {
        if (snprintf(path, sizeof path, "%s/%s", s->dir, retired[i]) >= (int)sizeof path)
            continue;
        if (unlink(path) != 0 && errno != ENOENT && !d->text[0])
            ps_diag_set(d, PS_OK, 0, 0, "", "cannot remove %s (left by an earlier version): %s", path,
                        strerror(errno));
    }
    return PS_OK;
}

void ps_report_set_release(ps_report_set *s)
{
    for (sig_atomic_t i = 0; i < s->n_staged && i < PS_SET_FILES; i++)
        (void)unlink(s->staged[i]);
    s->n_staged = 0;
    if (s->has_staging)
        (void)rmdir(s->staging);
    s->has_staging = 0;
    if (s->lock_fd >= 0) {
        (void)unlink(s->lock);
        (void)close(s->lock_fd);
    }
    s->lock_fd = -1;
}

/* atomic.c - reports appear whole or not at all: temporary file in the
 * target directory, flushed and synced, then renamed over the name. */
#include "report/reports.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

ps_status ps_write_atomic(const char *dir, const char *name, ps_writer_fn fn, const ps_run *r, ps_diag *d)
{
    char final[4096], tmp[4096];
    if (snprintf(final, sizeof final, "%s/%s", dir, name) >= (int)sizeof final ||
        snprintf(tmp, sizeof tmp, "%s/.%s.XXXXXX", dir, name) >= (int)sizeof tmp)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s/%s: path too long", dir, name);
    int fd = mkstemp(tmp);
    if (fd < 0)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot create a file in %s: %s", dir, strerror(errno));
    /* mkstemp makes the file 0600; a report is an ordinary file. */
    mode_t mask = umask(0);
    umask(mask);
    (void)fchmod(fd, 0666 & ~mask);
    FILE *f = fdopen(fd, "w");
    if (!f) {
        int e = errno;
        close(fd);
        unlink(tmp);
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", final, strerror(e));
    }
    ps_status st = fn(f, r);
    if (st == PS_OK && (fflush(f) != 0 || ferror(f) || fsync(fileno(f)) != 0))
        st = PS_ERR_IO;
    int e = errno;
    if (fclose(f) != 0 && st == PS_OK) {
        st = PS_ERR_IO;
        e = errno;
    }
    if (st == PS_OK && rename(tmp, final) != 0) {
        st = PS_ERR_IO;
        e = errno;
    }
    if (st != PS_OK) {
        unlink(tmp);
        return ps_diag_set(d, st, 0, 0, "", "cannot write %s: %s", final,
                           st == PS_ERR_NOMEM ? "out of memory" : strerror(e));
    }
    return PS_OK;
}

/* fuzz_common.c - the fuzz input as a file in a private temporary directory,
 * and the invariant checks shared by the fuzz entries. */
#include "fuzz_common.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

static char dir[256];
static char path[320];

static void remove_dir(void)
{
    if (path[0])
        unlink(path);
    rmdir(dir);
}

void ps_fuzz_require(bool ok, const char *what)
{
    if (ok)
        return;
    fprintf(stderr, "plantsieve fuzz: %s\n", what);
    abort();
}

void ps_fuzz_require_clear(ps_status st, const ps_diag *d, const char *what)
{
    if (st == PS_OK)
        return;
    size_t len = strnlen(d->text, sizeof d->text);
    if (len == 0 || len == sizeof d->text) {
        fprintf(stderr, "plantsieve fuzz: %s: status %d without a clear message\n", what, (int)st);
        abort();
    }
}

const char *ps_fuzz_file(const uint8_t *data, size_t size, const char *name)
{
    if (!dir[0]) {
        const char *tmp = getenv("TMPDIR");
        snprintf(dir, sizeof dir, "%s/psfuzzXXXXXX", tmp && tmp[0] ? tmp : "/tmp");
        ps_fuzz_require(mkdtemp(dir) != NULL, "cannot make a temporary directory");
        atexit(remove_dir);
    }
    if (path[0])
        unlink(path);
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "wb");
    ps_fuzz_require(f != NULL, "cannot create the input file");
    ps_fuzz_require(size == 0 || fwrite(data, 1, size, f) == size, "cannot write the input file");
    ps_fuzz_require(fclose(f) == 0, "cannot close the input file");
    return path;
}

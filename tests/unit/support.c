/* support.c - helpers shared by the unit tests. */
#define _GNU_SOURCE
#include "support.h"

#include <gsl/gsl_errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

void ps_test_init(void) { gsl_set_error_handler_off(); }

const char *ps_test_write_temp(const char *suffix, const char *text)
{
    static char path[256];
    const char *dir = getenv("TMPDIR");
    snprintf(path, sizeof path, "%s/pstestXXXXXX%s", dir ? dir : "/tmp", suffix);
    int fd = mkstemps(path, (int)strlen(suffix));
    if (fd < 0)
        return NULL;
    size_t n = strlen(text);
    if (write(fd, text, n) != (ssize_t)n) {
        close(fd);
        return NULL;
    }
    close(fd);
    return path;
}

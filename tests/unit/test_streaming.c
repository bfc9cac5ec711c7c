/* test_streaming.c - memory stays flat as the catalog grows: the command
 * line screens catalogs of 2000 and 8000 plants, and the peak resident set
 * of each run (getrusage of the child) may not grow with the plant count
 * beyond the ranking keys. A summary is about 3.4 kB, so 6000 more plants
 * kept in memory would add about 20 MB; the bound is 6 MB. */
#define _DEFAULT_SOURCE /* wait4 */
#include <criterion/criterion.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <fcntl.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <unistd.h>

#include "sanitizer.h"
#include "support.h"

static void write_catalog(const char *path, size_t n)
{
    FILE *f = fopen(path, "w");
    cr_assert_not_null(f);
    fprintf(f, "catalog: streaming test\ndefaults:\n  rolloff_start: 60\nplants:\n");
    for (size_t i = 0; i < n; i++) {
        double p = 0.5 + (double)(i % 97) * 0.2, z = 3.0 + (double)(i % 89) * 0.9;
        if (i % 3 == 0)
            fprintf(f, "  - id: s%zu\n    zeros: [%.4g]\n    poles: [%.4g, -%.4g, -40]\n    gain: 5\n", i, z, p, p);
        else
            fprintf(f, "  - id: s%zu\n    poles: [-%.4g, -%.4g]\n    gain: 2\n", i, p, z);
    }
    cr_assert_eq(fclose(f), 0);
}

/* Peak RSS (kB) of one screening run of path. */
static long screen_rss(const char *path)
{
    pid_t pid = fork();
    cr_assert_geq(pid, 0);
    if (pid == 0) {
        int null = open("/dev/null", 1);
        dup2(null, 1);
        dup2(null, 2);
        execl(PS_CLI_PATH, PS_CLI_PATH, "screen", "--no-files", "--gate", "never", "--memory-rows", "500", "--threads",
              "1", path, (char *)NULL);
        _exit(127);
    }
    int status;
    struct rusage ru;
    cr_assert_eq(wait4(pid, &status, 0, &ru), pid);
    cr_assert(WIFEXITED(status) && WEXITSTATUS(status) == 0, "screen exited %d", WEXITSTATUS(status));
    return ru.ru_maxrss;
}

TestSuite(streaming, .init = ps_test_init, .timeout = 120);

Test(streaming, resident_memory_flat_in_the_plant_count)
{
    /* ASan's quarantine holds freed memory back, so the peak grows with the
     * work done, not with what is kept; TSan's shadow memory does likewise. */
    if (PS_TEST_ALLOCATOR_REPLACED)
        cr_skip_test("skipped: built with ASan/TSan, whose allocator makes the peak RSS grow with the "
                     "work done; the memory bound is checked in the plain build");
    char small[64], large[64];
    snprintf(small, sizeof small, "stream-small-%d.yaml", (int)getpid());
    snprintf(large, sizeof large, "stream-large-%d.yaml", (int)getpid());
    write_catalog(small, 2000);
    write_catalog(large, 8000);
    long a = screen_rss(small), b = screen_rss(large);
    remove(small);
    remove(large);
    cr_log_info("peak RSS: %ld kB for 2000 plants, %ld kB for 8000 plants", a, b);
    cr_assert_lt(b - a, 6 * 1024, "peak RSS grew by %ld kB for 6000 more plants (%ld -> %ld kB)", b - a, a, b);
}

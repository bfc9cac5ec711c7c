/* replay.c - runs every file of a regression corpus through a fuzz entry,
 * compiled without libFuzzer, as one test of the normal suite. */
#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>

#include "fuzz_common.h"

enum { MAX_FILES = 4096 };

static int by_name(const void *a, const void *b)
{
    return strcmp(*(char *const *)a, *(char *const *)b);
}

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* Read a whole file into a fresh buffer (the caller frees it); NULL on failure. */
static unsigned char *slurp(const char *file, size_t *n)
{
    FILE *f = fopen(file, "rb");
    if (!f)
        return NULL;
    size_t cap = 1 << 16, len = 0;
    unsigned char *buf = malloc(cap);
    while (buf) {
        len += fread(buf + len, 1, cap - len, f);
        if (len < cap)
            break;
        unsigned char *bigger = realloc(buf, cap * 2);
        if (!bigger) {
            free(buf);
            buf = NULL;
            break;
        }
        buf = bigger;
        cap *= 2;
    }
    int bad = ferror(f);
    fclose(f);
    if (bad) {
        free(buf);
        return NULL;
    }
    *n = len;
    return buf;
}

/* Usage: replay_<fuzzer> MAX_SECONDS DIR. Every regular file of DIR, in name
 * order, goes through the entry; a file that takes longer than MAX_SECONDS
 * fails the run (a crash fails it by itself). */
int main(int argc, char **argv)
{
    if (argc != 3) {
        fprintf(stderr, "usage: %s MAX_SECONDS CORPUS_DIR\n", argv[0]);
        return 2;
    }
    double limit = atof(argv[1]);
    DIR *d = opendir(argv[2]);
    if (!d) {
        fprintf(stderr, "%s: cannot open %s\n", argv[0], argv[2]);
        return 2;
    }
    static char *names[MAX_FILES];
    size_t n = 0;
    struct dirent *e;
    while ((e = readdir(d)) && n < MAX_FILES) {
        char full[4096];
        struct stat st;
        snprintf(full, sizeof full, "%s/%s", argv[2], e->d_name);
        if (e->d_name[0] != '.' && stat(full, &st) == 0 && S_ISREG(st.st_mode))
            names[n++] = strdup(full);
    }
    closedir(d);
    qsort(names, n, sizeof *names, by_name);
    int failed = 0;
    double worst = 0;
    for (size_t i = 0; i < n; i++) {
        size_t len = 0;
        unsigned char *buf = names[i] ? slurp(names[i], &len) : NULL;
        if (!buf) {
            fprintf(stderr, "%s: cannot read %s\n", argv[0], names[i] ? names[i] : "(no memory)");
            return 2;
        }
        double t0 = now_s();
        LLVMFuzzerTestOneInput(buf, len);
        double dt = now_s() - t0;
        free(buf);
        if (dt > worst)
            worst = dt;
        printf("%-72s %8zu bytes %8.3f s\n", names[i], len, dt);
        if (dt > limit) {
            fprintf(stderr, "%s: %s took %.3f s, more than %.3f s\n", argv[0], names[i], dt, limit);
            failed = 1;
        }
        free(names[i]);
    }
    printf("%zu files replayed, slowest %.3f s%s\n", n, worst, failed ? ", TOO SLOW" : "");
    if (n == 0) {
        fprintf(stderr, "%s: no corpus files in %s\n", argv[0], argv[2]);
        return 1;
    }
    return failed;
}

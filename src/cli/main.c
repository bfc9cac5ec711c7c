/* main.c - the plantsieve command line: argument parsing and exit codes over
 * the core library. Data goes to stdout, diagnostics to stderr. */
#include <locale.h>
#include <stdio.h>
#include <string.h>

#include "batch/batch.h"
#include "report/listing.h"
#include "roots/roots.h"

/* Exit codes (README, "Exit codes"). */
enum {
    EXIT_CLEAN = 0,      /* every entry read (and, for screening, every plant passed) */
    EXIT_GATE = 1,       /* reserved for the screening gate */
    EXIT_USAGE = 2,      /* bad command line */
    EXIT_ENTRIES = 3,    /* some entries could not be read; the rest were processed */
    EXIT_IO = 4          /* a catalog could not be opened or parsed, or output failed */
};

static const char usage_text[] =
    "usage: plantsieve COMMAND [OPTIONS] CATALOG...\n"
    "\n"
    "Screen candidate plant variants for the limits that no controller can beat.\n"
    "\n"
    "commands:\n"
    "  survey CATALOG...   list each plant's poles, zeros, their side of the jw axis,\n"
    "                      gain, relative degree, delay and warnings\n"
    "\n"
    "options:\n"
    "  --json              write one JSON document to stdout instead of text\n"
    "  -h, --help          show this help and exit\n"
    "  --version           show the version and exit\n"
    "\n"
    "Catalogs are YAML (.yaml, .yml) or CSV (.csv). Exit codes: 0 all entries read,\n"
    "2 usage error, 3 some entries rejected, 4 a catalog or the output failed.\n";

typedef struct cli_ctx {
    ps_listing *listing;
} cli_ctx;

static void report_entry(void *ctx, const ps_outcome *o)
{
    cli_ctx *c = ctx;
    if (o->err)
        fprintf(stderr, "plantsieve: %s:%zu:%zu: %s%s%s%s\n", o->file, o->err->line, o->err->col,
                o->p->id[0] ? "plant '" : "", o->p->id, o->p->id[0] ? "': " : "", o->err->text);
    ps_listing_add(c->listing, o);
}

static int usage_error(const char *what, const char *arg)
{
    fprintf(stderr, "plantsieve: %s%s%s\nTry 'plantsieve --help'.\n", what, arg ? ": " : "", arg ? arg : "");
    return EXIT_USAGE;
}

static int cmd_survey(int argc, char **argv)
{
    bool json = false;
    int first = -1, n_files = 0;
    for (int i = 0; i < argc; i++) {
        if (strcmp(argv[i], "--json") == 0)
            json = true;
        else if (strcmp(argv[i], "--") == 0) {
            if (first < 0 && i + 1 < argc)
                first = i + 1;
            n_files += argc - i - 1;
            break;
        } else if (argv[i][0] == '-' && argv[i][1] != '\0')
            return usage_error("unknown option", argv[i]);
        else {
            if (first < 0)
                first = i;
            n_files++;
        }
    }
    if (n_files == 0)
        return usage_error("survey needs at least one catalog file", NULL);

    cli_ctx c = {ps_listing_new(stdout, json)};
    ps_batch *b = c.listing ? ps_batch_new(report_entry, &c) : NULL;
    if (!b) {
        fputs("plantsieve: out of memory\n", stderr);
        ps_listing_free(c.listing);
        return EXIT_IO;
    }
    bool io_failed = false, after_dashdash = false;
    for (int i = first; i < argc; i++) {
        if (!after_dashdash && strcmp(argv[i], "--") == 0) {
            after_dashdash = true;
            continue;
        }
        if (!after_dashdash && argv[i][0] == '-' && argv[i][1] != '\0')
            continue;
        ps_diag fd = {0};
        ps_status st = ps_batch_run(b, argv[i], &fd);
        if (st != PS_OK) {
            io_failed = true;
            fprintf(stderr, "plantsieve: %s:%zu:%zu: %s\n", argv[i], fd.line, fd.col, fd.text);
        }
        ps_listing_catalog(c.listing, argv[i], st == PS_OK ? NULL : &fd);
    }
    const ps_batch_counts *counts = ps_batch_counts_get(b);
    ps_status wst = ps_listing_finish(c.listing, counts);
    int rc = counts->errors ? EXIT_ENTRIES : EXIT_CLEAN;
    if (io_failed)
        rc = EXIT_IO;
    ps_batch_free(b);
    ps_listing_free(c.listing);
    if (wst != PS_OK || fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        rc = EXIT_IO;
    }
    return rc;
}

int main(int argc, char **argv)
{
    /* Numbers are read and written in the C locale whatever the environment says. */
    setlocale(LC_ALL, "C");
    ps_roots_init();
    if (argc < 2)
        return usage_error("no command given", NULL);
    const char *cmd = argv[1];
    if (strcmp(cmd, "-h") == 0 || strcmp(cmd, "--help") == 0 || strcmp(cmd, "help") == 0) {
        fputs(usage_text, stdout);
        return fflush(stdout) == 0 ? EXIT_CLEAN : EXIT_IO;
    }
    if (strcmp(cmd, "--version") == 0) {
        printf("plantsieve %s\n", PS_VERSION);
        return fflush(stdout) == 0 ? EXIT_CLEAN : EXIT_IO;
    }
    if (strcmp(cmd, "survey") == 0)
        return cmd_survey(argc - 2, argv + 2);
    return usage_error("unknown command", cmd);
}

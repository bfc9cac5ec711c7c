/* compare_cmd.c - `plantsieve compare OLD NEW`: options and exit codes over
 * report/compare.h; the reading, diff and writers are in the library. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli/compare_cmd.h"
#include "report/compare.h"

/* Exit codes of compare (README "Comparing two runs"). */
enum { CMP_OK = 0, CMP_GATE = 1, CMP_USAGE = 2, CMP_IO = 4 };

/* Default severity tolerance: 0.01 of the allowed log-peak. */
#define CMP_TOL_DEFAULT 0.01

static const char compare_usage[] =
    "usage: plantsieve compare [OPTIONS] OLD NEW\n"
    "\n"
    "List what changed between two screening runs: plants whose verdict changed,\n"
    "whose severity changed by more than the tolerance with the same verdict,\n"
    "plants added and plants removed, then a summary line.\n"
    "OLD and NEW are each a report set directory (screen -o DIR gives DIR/STEM.screen),\n"
    "a STEM.screen.json file or a STEM.screen.plants.jsonl file.\n"
    "\n"
    "options:\n"
    "  --gate WHEN         exit 1 when WHEN: worse (default: some plant is worse),\n"
    "                      changed (some plant changed, was added or removed), never\n"
    "  --tolerance X       severity changes of at most X are not listed (default 0.01)\n"
    "  --markdown FILE     also write the comparison as Markdown to FILE\n"
    "  --json FILE         also write the comparison as JSON to FILE\n"
    "  -q, --quiet         print nothing on stdout (the files and exit code only)\n"
    "  -h, --help          show this help and exit\n"
    "\n"
    "Worse: a verdict later in clear < marginal < redesign < not-stabilizable; one of\n"
    "those four become needs-bandwidth or input-error (no longer judged); or marginal\n"
    "or redesign in both runs with the severity up by more than the tolerance.\n"
    "Better is the reverse. Added and removed plants are neither.\n"
    "\n"
    "Exit codes: 0 the gate did not trip, 1 it tripped, 2 usage error, 4 a report\n"
    "could not be read or an output could not be written.\n";

static int cmp_usage_error(const char *what, const char *arg)
{
    fprintf(stderr, "plantsieve compare: %s%s%s\nTry 'plantsieve compare --help'.\n", what, arg ? ": " : "",
            arg ? arg : "");
    return CMP_USAGE;
}

static int write_file(const char *path, ps_status (*fn)(FILE *, const ps_cmp_view *), const ps_cmp_view *v)
{
    FILE *f = fopen(path, "w");
    if (!f) {
        fprintf(stderr, "plantsieve: %s: cannot write: %s\n", path, strerror(errno));
        return CMP_IO;
    }
    ps_status st = fn(f, v);
    if (fclose(f) != 0 || st != PS_OK) {
        fprintf(stderr, "plantsieve: %s: %s\n", path, st == PS_ERR_NOMEM ? "out of memory" : "write error");
        return CMP_IO;
    }
    return CMP_OK;
}

int ps_cli_compare(int argc, char **argv)
{
    static const struct option opts[] = {
        {"gate", required_argument, NULL, 'g'}, {"tolerance", required_argument, NULL, 't'},
        {"markdown", required_argument, NULL, 'm'}, {"json", required_argument, NULL, 'j'},
        {"quiet", no_argument, NULL, 'q'}, {"help", no_argument, NULL, 'h'}, {NULL, 0, NULL, 0}};
    ps_cmp_view v = {.tol = CMP_TOL_DEFAULT, .gate = PS_GATE_WORSE};
    const char *md_path = NULL, *json_path = NULL;
    bool quiet = false;
    /* argv[0] is "compare"; getopt starts at 1 and may move the options before the operands. */
    optind = 1;
    opterr = 0;
    int o;
    while ((o = getopt_long(argc, argv, ":qh", opts, NULL)) != -1) {
        switch (o) {
        case 'g':
            if (strcmp(optarg, "worse") == 0)
                v.gate = PS_GATE_WORSE;
            else if (strcmp(optarg, "changed") == 0)
                v.gate = PS_GATE_CHANGED;
            else if (strcmp(optarg, "never") == 0)
                v.gate = PS_GATE_NEVER;
            else
                return cmp_usage_error("--gate takes worse, changed or never", optarg);
            break;
        case 't': {
            char *end;
            double x = strtod(optarg, &end);
            if (end == optarg || *end || !isfinite(x) || x < 0)
                return cmp_usage_error("--tolerance takes a number >= 0", optarg);
            v.tol = x;
            break;
        }
        case 'm': md_path = optarg; break;
        case 'j': json_path = optarg; break;
        case 'q': quiet = true; break;
        case 'h':
            fputs(compare_usage, stdout);
            return fflush(stdout) == 0 && !ferror(stdout) ? CMP_OK : CMP_IO;
        case ':': return cmp_usage_error("option needs a value", argv[optind - 1]);
        default: return cmp_usage_error("unknown option", argv[optind - 1]);
        }
    }
    if (argc - optind != 2)
        return cmp_usage_error(argc - optind < 2 ? "compare needs two reports, OLD and NEW"
                                                 : "compare takes exactly two reports, OLD and NEW",
                               NULL);
    ps_cmp *c = ps_cmp_new();
    if (!c) {
        fputs("plantsieve: out of memory\n", stderr);
        return CMP_IO;
    }
    v.c = c;
    for (int s = 0; s < 2; s++) {
        ps_diag d = {0};
        if (ps_cmp_read(c, (ps_cmp_side)s, argv[optind + s], &v.src[s], &d) != PS_OK) {
            if (d.line && d.col)
                fprintf(stderr, "plantsieve: %s:%zu:%zu: %s\n", d.file, d.line, d.col, d.text);
            else if (d.line)
                fprintf(stderr, "plantsieve: %s:%zu: %s\n", d.file, d.line, d.text);
            else
                fprintf(stderr, "plantsieve: %s: %s\n", d.file, d.text);
            fprintf(stderr, "plantsieve: the %s run could not be read; nothing was compared\n", s ? "new" : "old");
            ps_cmp_free(c);
            return CMP_IO;
        }
    }
    ps_cmp_count(c, v.tol, &v.n);
    v.tripped = ps_cmp_gate_tripped(v.gate, &v.n);
    int rc = v.tripped ? CMP_GATE : CMP_OK;
    if (!quiet && ps_cmp_write_text(stdout, &v) != PS_OK)
        rc = CMP_IO;
    if (md_path && write_file(md_path, ps_cmp_write_markdown, &v) != CMP_OK)
        rc = CMP_IO;
    if (json_path && write_file(json_path, ps_cmp_write_json, &v) != CMP_OK)
        rc = CMP_IO;
    ps_cmp_free(c);
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        rc = CMP_IO;
    }
    return rc;
}

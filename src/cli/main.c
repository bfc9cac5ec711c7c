/* main.c - the plantsieve command line: argument parsing and exit codes over
 * the core library. Data goes to stdout, diagnostics to stderr. */
#include <assert.h>
#include <errno.h>
#include <getopt.h>
#include <limits.h>
#include <locale.h>
#include <math.h>
#include <pthread.h>
#include <signal.h>
#include <stdatomic.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "batch/batch.h"
#include "certify/certify.h"
#include "cli/compare_cmd.h"
#include "catalog/catalog.h"
#include "core/diag.h"
#include "core/text.h"
#include "report/json_parts.h"
#include "report/listing.h"
#include "report/certificate.h"
#include "report/partial.h"
#include "report/report_set.h"
#include "report/reports.h"
#include "screen/audit.h"
#include "screen/screen.h"
#include "screen/pool.h"
#include "screen/study.h"
#include "roots/roots.h"

/* Exit codes (README, "Exit codes"). */
enum {
    EXIT_CLEAN = 0,      /* every entry read (and, for screening, every plant passed) */
    EXIT_GATE = 1,       /* screening: the gate tripped (by default: some plant needs redesign or is not stabilizable) */
    EXIT_USAGE = 2,      /* bad command line */
    EXIT_ENTRIES = 3,    /* some entries could not be read or (screen) judged; the rest were processed */
    EXIT_IO = 4,         /* a catalog could not be opened or parsed, or output failed */
    EXIT_BUSY = 5        /* screen: another run is writing the same report set into DIR */
};
/* An interrupted screen run exits 128 + the signal number (130 SIGINT,
 * 143 SIGTERM, 129 SIGHUP), as a shell reports a process killed by it. */

/* Rows per section of the stdout listing unless --show says otherwise. */
#define SHOW_DEFAULT 40
#define SHOW_STR(x) #x
#define SHOW_XSTR(x) SHOW_STR(x)
#define SHOW_TEXT SHOW_XSTR(SHOW_DEFAULT)

/* The program's help: the commands. Each command's options are in its
 * table below and printed by `plantsieve COMMAND --help`. */
static const char usage_text[] =
    "usage: plantsieve COMMAND [OPTIONS] CATALOG...\n"
    "       plantsieve COMMAND --help\n"
    "       plantsieve --help | --version\n"
    "\n"
    "Screen candidate plant variants for the limits that no controller can beat.\n"
    "\n"
    "commands:\n"
    "  screen CATALOG...   rank every plant, give verdicts, causes and redesign\n"
    "                      targets; print the ranked table and write the reports\n"
    "  explain ID CATALOG...  every number behind one plant's verdict, with formula,\n"
    "                      inputs, source and assumption, and what raises the binding\n"
    "                      floor; a family id lists the family's plants\n"
    "  survey CATALOG...   list each plant's poles, zeros, their side of the jw axis,\n"
    "                      gain, relative degree, delay, warnings and floors\n"
    "  certify CATALOG...  search and verify a controller for each plant: the\n"
    "                      peaks one controller reaches beside the floors\n"
    "  merge PARTIAL...    join the partial results of screen --shard K/N runs into\n"
    "                      the reports of the whole run\n"
    "  compare OLD NEW     what changed between two screen runs (compare --help)\n"
    "  read CATALOG...     read every entry and discard it; print the count (the\n"
    "                      reading cost alone, for benchmarks)\n"
    "\n"
    "options:\n"
    "  -h, --help          show this help and exit (after a command: its options)\n"
    "  --version           show the version and exit\n"
    "\n"
    "Catalogs are YAML (.yaml, .yml) or CSV (.csv). Options may come before or after\n"
    "the catalogs; a value follows its option as '--show 5' or '--show=5'; '--' ends\n"
    "the options (for a file name that begins with '-').\n"
    "\n"
    "Exit codes: 0 success (screen: the gate passed), 1 the gate tripped, 2 usage\n"
    "error, 3 some entries rejected or (screen) some plants not judged: an unstable\n"
    "plant needs rolloff_start (the rest processed), 4 a catalog, a report or the\n"
    "output failed, 5 another run is writing the same reports into DIR; interrupted\n"
    "by SIGINT, SIGTERM or SIGHUP: 128 + the signal number, and no report of the run\n"
    "is published.\n";

/* ---- options: one table per command drives getopt_long and the help ---- */

/* Keys of the options that have a long name only (getopt_long's val). */
enum {
    OPT_JSON = 256,
    OPT_GATE,
    OPT_MARGINAL_AT,
    OPT_NO_FILES,
    OPT_THREADS,
    OPT_QUIET,
    OPT_SHOW,
    OPT_DETAIL,
    OPT_MEMORY_ROWS,
    OPT_SHARD,
    OPT_BUDGET,
    OPT_CERTIFY
};

typedef struct cli_option {
    const char *name;  /* long name without the dashes; NULL for a short option alone */
    int key;           /* the short letter, or an OPT_* key */
    const char *value; /* the value's name in the help; NULL for an option without a value */
    const char *help;  /* what it does; each '\n' starts a continuation line */
} cli_option;

typedef struct cli_command {
    const char *name;
    const char *operands; /* what follows the options in the usage line */
    const char *about;    /* printed under the usage line */
    const cli_option *opts; /* ends with a zero entry */
    const char *after;    /* printed after the options (exit codes), or NULL */
} cli_command;

#define HELP_OPTION {"help", 'h', NULL, "show this help and exit"}

static const cli_option survey_opts[] = {
    {"json", OPT_JSON, NULL, "write one JSON document to stdout instead of text"},
    HELP_OPTION,
    {0},
};

static const cli_option screen_opts[] = {
    {NULL, 'o', "DIR", "write the report set into DIR/<stem>.screen/, <stem>\n"
                       "the first catalog's name without its ending\n"
                       "(default: reports)"},
    {"gate", OPT_GATE, "WHEN", "exit 1 when WHEN: redesign (default; redesign or not\n"
                               "stabilizable), marginal (also marginal), never"},
    {"marginal-at", OPT_MARGINAL_AT, "X", "share of the allowed log-peak that makes a plant\n"
                                          "marginal, a number in (0, 1] (default 0.8)"},
    {"no-files", OPT_NO_FILES, NULL, "print the listing only, write no report files; past\n"
                                     "--memory-rows only the rows it can print are kept,\n"
                                     "and only their targets and band curves computed"},
    {"threads", OPT_THREADS, "N", "assess plants, then write the report files, on N\n"
                                  "threads, 1 to 64 (default: the online CPUs); the\n"
                                  "reports are the same for any N"},
    {"quiet", OPT_QUIET, NULL, "no progress line on stderr (shown only on a terminal)"},
    {"show", OPT_SHOW, "N", "rows per section of the listing on stdout (default\n"
                            SHOW_TEXT "; all: every row); the .txt report has them all"},
    {"detail", OPT_DETAIL, "WHICH", "redesign targets and band curves for all plants\n"
                                    "(default), flagged ones (marginal, redesign) or none:\n"
                                    "faster on large runs"},
    {"memory-rows", OPT_MEMORY_ROWS, "N", "keep at most N plant summaries in memory (default\n"
                                          "16384); beyond, they go to a temporary file (about\n"
                                          "1.7 kB each, 1.2 kB with --detail none)"},
    {"shard", OPT_SHARD, "K/N", "screen only shard K of N (entries K-1, K-1+N, ... and\n"
                                "their share of the family studies) and write its\n"
                                "partial result DIR/<stem>.shard-K-of-N.partial\n"
                                "instead of reports; `plantsieve merge` joins the N"},
    {"certify", OPT_CERTIFY, "WHICH", "search and verify a certificate controller for the\n"
                                      "plants whose floors pass (passing) or for every\n"
                                      "judged plant (judged): ruled out, demonstrated or\n"
                                      "undecided in every report; about 0.1 s of CPU a\n"
                                      "plant"},
    {"budget", OPT_BUDGET, "N", "loop evaluations a plant for --certify, 100 to\n"
                                "10000000 (default " PS_CERT_BUDGET_TEXT ")"},
    HELP_OPTION,
    {0},
};

static const cli_option merge_opts[] = {
    {NULL, 'o', "DIR", "write the report set into DIR/<stem>.screen/ (default:\n"
                       "reports), as screen does"},
    {"gate", OPT_GATE, "WHEN", "exit 1 when WHEN: redesign (default; redesign or not\n"
                               "stabilizable), marginal (also marginal), never"},
    {"no-files", OPT_NO_FILES, NULL, "print the listing only, write no report files"},
    {"threads", OPT_THREADS, "N", "write the report files on N threads, 1 to 64\n"
                                  "(default: the online CPUs)"},
    {"show", OPT_SHOW, "N", "rows per section of the listing on stdout (default\n"
                            SHOW_TEXT "; all: every row)"},
    {"memory-rows", OPT_MEMORY_ROWS, "N", "keep at most N plant summaries in memory (default\n"
                                          "16384); beyond, they go to a temporary file"},
    HELP_OPTION,
    {0},
};

static const cli_option plain_opts[] = {HELP_OPTION, {0}};

static const cli_option explain_opts[] = {
    {"certify", OPT_CERTIFY, NULL, "add section 8: a controller searched and verified for\n"
                                   "the plant, its peaks beside the floors (as certify)"},
    {"budget", OPT_BUDGET, "N", "loop evaluations for --certify, 100 to 10000000\n"
                                "(default " PS_CERT_BUDGET_TEXT ")"},
    HELP_OPTION,
    {0},
};

static const cli_option certify_opts[] = {
    {"budget", OPT_BUDGET, "N", "loop evaluations a plant may spend in the search,\n"
                                "100 to 10000000 (default " PS_CERT_BUDGET_TEXT ")"},
    {"json", OPT_JSON, NULL, "write one JSON document to stdout instead of text"},
    {"threads", OPT_THREADS, "N", "search on N threads, 1 to 64 (default: the online\n"
                                  "CPUs); the output is the same for any N"},
    HELP_OPTION,
    {0},
};

static const cli_command certify_cmd = {
    "certify", "CATALOG...",
    "The other side of each plant's bracket: search a ladder of controllers (PI,\n"
    "PID, lead-lag, and for a plant only an unstable controller stabilizes, one\n"
    "with an unstable pole; each with the roll-off poles its requirement needs)\n"
    "for the lowest peaks within the budget, verify the best (closed-loop\n"
    "stability by the argument principle and, without delay, by the closed-loop\n"
    "roots; peaks, roll-off, band and effort on a dense grid) and print the\n"
    "outcome: ruled out (a floor exceeds what is allowed), demonstrated (a\n"
    "verified controller meets every requirement) or undecided (the floors pass,\n"
    "no controller found within the budget). Continuous loops only.",
    certify_opts,
    "Exit codes: 0 every entry read and searched, 2 usage error, 3 some entries\n"
    "rejected (the rest listed), 4 a catalog could not be opened or parsed to the\n"
    "end, or the output failed.\n"};

static const cli_command survey_cmd = {
    "survey", "CATALOG...",
    "List each plant's poles and zeros (marked [rhp] or [axis]; in z: outside or\n"
    "circle), gain, relative degree, delay, the counts of RHP poles and zeros, hidden\n"
    "unstable modes, warnings and floors. Rejected entries are listed with their\n"
    "error.",
    survey_opts,
    "Exit codes: 0 every entry read and analysed, 2 usage error, 3 some entries\n"
    "rejected (the rest listed), 4 a catalog could not be opened or parsed to the\n"
    "end, or the output failed.\n"};

static const cli_command screen_cmd = {
    "screen", "CATALOG...",
    "Rank every plant by the share of its allowed peak its floors use, give each a\n"
    "verdict, a cause and redesign targets, print the ranked table and write the\n"
    "report set (.txt, .csv, .json, .md, .html; .families.csv when the run has\n"
    "families), published whole or not at all.",
    screen_opts,
    "Exit codes: 0 the gate passed, 1 the gate tripped, 2 usage error, 3 some entries\n"
    "could not be read or some plants not judged (an unstable plant needs\n"
    "rolloff_start; takes precedence over 1), 4 a catalog, a report or the output\n"
    "failed, 5 another run is writing the same report set into DIR; interrupted by\n"
    "SIGINT, SIGTERM or SIGHUP: 128 + the signal number, no report of the run is\n"
    "published.\n"};

static const cli_command merge_cmd = {
    "merge", "PARTIAL...",
    "Join the partial results of `screen --shard K/N` (one per shard, K = 1..N, in\n"
    "any order) into the run one machine would have made: the same listing, the\n"
    "same report set and the same exit code; only the command line the reports\n"
    "quote differs. Partials that do not belong together are refused: other\n"
    "catalogs (by SHA-256) or options, a shard missing or given twice, another\n"
    "build of plantsieve.",
    merge_opts,
    "Exit codes: as screen; 4 also when the partials do not belong together or one\n"
    "cannot be read.\n"};

static const cli_command explain_cmd = {
    "explain", "ID CATALOG...",
    "Every number behind the verdict of the plant ID: roots, requirements, each\n"
    "floor with formula, inputs, source and assumption, the severity arithmetic,\n"
    "what raises the binding floor, the verdict and every redesign target. A family\n"
    "id lists the family's plants. An ID that begins with '-' follows '--'.",
    explain_opts,
    "Exit codes: 0 explained, 2 usage error or no plant ID in the catalogs, 3 some\n"
    "entries rejected, 4 a catalog could not be opened or parsed to the end, or the\n"
    "output failed.\n"};

static const cli_command read_cmd = {
    "read", "CATALOG...",
    "Read every entry of each catalog and discard it; print the count per catalog\n"
    "(the reading cost alone, for benchmarks).",
    plain_opts,
    "Exit codes: 0 every catalog read to the end, 2 usage error, 4 a catalog could\n"
    "not be opened or parsed to the end, or the output failed.\n"};

/* The command whose --help a usage error points to (NULL: the program's). */
static const cli_command *usage_of;

static int usage_error(const char *what, const char *arg)
{
    fprintf(stderr, "plantsieve: %s%s%s\nTry 'plantsieve %s%s--help'.\n", what, arg ? ": " : "", arg ? arg : "",
            usage_of ? usage_of->name : "", usage_of ? " " : "");
    return EXIT_USAGE;
}

/* "-o" or "--gate": how a message names an option. */
static const char *option_name(const cli_option *o, char *out, size_t n)
{
    if (o->name)
        snprintf(out, n, "--%s", o->name);
    else
        snprintf(out, n, "-%c", o->key);
    return out;
}

/* "-o DIR", "--gate WHEN", "-h, --help": how the help names an option. */
static int option_label(const cli_option *o, char *out, size_t n)
{
    char letter[4] = "";
    if (o->key < 256)
        snprintf(letter, sizeof letter, "-%c%s", o->key, o->name ? "," : "");
    return snprintf(out, n, "%s%s%s%s%s%s", letter, letter[0] && o->name ? " " : "", o->name ? "--" : "",
                    o->name ? o->name : "", o->value ? " " : "", o->value ? o->value : "");
}

static int print_help(const cli_command *cmd)
{
    printf("usage: plantsieve %s [OPTIONS] %s\n\n%s\n\noptions:\n", cmd->name, cmd->operands, cmd->about);
    for (const cli_option *o = cmd->opts; o->key; o++) {
        char label[64];
        int w = option_label(o, label, sizeof label);
        printf("  %-18s", label);
        if (w > 18)
            printf("\n  %18s", "");
        for (const char *h = o->help; *h;) {
            size_t len = strcspn(h, "\n");
            printf("  %.*s\n", (int)len, h);
            h += len;
            if (*h == '\n' && *++h)
                printf("  %18s", "");
        }
    }
    if (cmd->after)
        printf("\n%s", cmd->after);
    return fflush(stdout) == 0 && !ferror(stdout) ? EXIT_CLEAN : EXIT_IO;
}

static const cli_option *option_find(const cli_command *cmd, int key)
{
    for (const cli_option *o = cmd->opts; o->key; o++)
        if (o->key == key)
            return o;
    return NULL;
}

/* Handles one option of a command: returns GO_ON, or the exit code of a bad value. */
typedef int (*option_fn)(void *ctx, int key, const char *value);
enum { GO_ON = -1, MAX_OPTIONS = 16 };

/* Parse the options of cmd with getopt_long. argv[0] is the command name;
 * options and operands may come in any order, a value as "--opt v" or
 * "--opt=v", "--" ends the options. Each option goes to fn; --help prints the
 * command's help. OUT: operands[0 .. *n_operands) (pointers into argv, in
 * command-line order; room for argc). Returns GO_ON, or the exit code when
 * the command ends here (help printed: 0; usage error: 2). */
static int options_parse(const cli_command *cmd, int argc, char **argv, option_fn fn, void *ctx, char **operands,
                         int *n_operands)
{
    struct option longs[MAX_OPTIONS + 1];
    /* "-": operands come back in place as key 1 (no reordering of argv, and
     * so also under POSIXLY_CORRECT); ":": a missing value returns ':'. */
    char shorts[2 + 2 * MAX_OPTIONS + 1] = "-:";
    size_t n_long = 0, n_short = 2;
    for (const cli_option *o = cmd->opts; o->key; o++) {
        assert(n_long < MAX_OPTIONS);
        if (o->name)
            longs[n_long++] = (struct option){o->name, o->value ? required_argument : no_argument, NULL, o->key};
        if (o->key < 256) {
            shorts[n_short++] = (char)o->key;
            if (o->value)
                shorts[n_short++] = ':';
        }
    }
    longs[n_long] = (struct option){0};
    shorts[n_short] = '\0';

    usage_of = cmd;
    *n_operands = 0;
    opterr = 0; /* our own messages, not getopt's */
    optind = 0; /* glibc: 0 starts getopt afresh (also inside a cluster of short options) */
    for (;;) {
        int li = -1;
        int key = getopt_long(argc, argv, shorts, longs, &li);
        if (key == -1)
            break;
        if (key == 1) {
            operands[(*n_operands)++] = optarg;
            continue;
        }
        if (key == ':') {
            const cli_option *o = option_find(cmd, optopt);
            char name[64];
            return usage_error("option needs a value", o ? option_name(o, name, sizeof name) : NULL);
        }
        if (key == '?') {
            /* optopt: 0 for an unknown long option, the key of a known one
             * given a value it does not take ("--json=x"), else the unknown
             * letter. A long option's error has moved optind past it; a
             * letter inside a cluster ("-xq") has not. */
            if (optopt == 0)
                return usage_error("unknown option", argv[optind - 1]);
            if (option_find(cmd, optopt))
                return usage_error("option takes no value", argv[optind - 1]);
            char letter[3] = {'-', (char)optopt, '\0'};
            return usage_error("unknown option", letter);
        }
        if (li >= 0) {
            /* getopt_long takes a unique prefix ("--no" for --no-files); we
             * do not, so that a later option cannot change what a script means. */
            const char *arg = argv[optind - 1];
            if (optarg == arg && optind >= 2)
                arg = argv[optind - 2];
            size_t len = strlen(longs[li].name);
            if (strncmp(arg + 2, longs[li].name, len) != 0 || (arg[2 + len] != '\0' && arg[2 + len] != '='))
                return usage_error("unknown option", arg);
        }
        if (key == 'h')
            return print_help(cmd);
        int rc = fn(ctx, key, optarg);
        if (rc != GO_ON)
            return rc;
    }
    while (optind < argc)
        operands[(*n_operands)++] = argv[optind++];
    return GO_ON;
}

static int no_options(void *ctx, int key, const char *value)
{
    (void)ctx, (void)key, (void)value;
    return GO_ON;
}

typedef struct cli_ctx {
    ps_listing *listing;
} cli_ctx;

/* A diagnostic on stderr: "plantsieve: FILE:LINE:COL: [plant 'ID': ]TEXT", the
 * line and column only where known (ps_diag_pos). */
static void say_at(const char *file, const ps_diag *d, const char *id)
{
    char pos[PS_DIAG_POS];
    bool named = id && id[0];
    fprintf(stderr, "plantsieve: %s%s: %s%s%s%s\n", file, ps_diag_pos(pos, sizeof pos, d->line, d->col),
            named ? "plant '" : "", named ? id : "", named ? "': " : "", d->text);
}

static void report_entry(void *ctx, const ps_outcome *o)
{
    cli_ctx *c = ctx;
    if (o->err)
        say_at(o->file, o->err, o->p->id);
    ps_listing_add(c->listing, o);
}

static int survey_option(void *ctx, int key, const char *value)
{
    (void)value;
    if (key == OPT_JSON)
        *(bool *)ctx = true;
    return GO_ON;
}

/* Room for every operand of a command line of argc words; NULL when out of memory (told). */
static char **operands_new(int argc)
{
    char **a = calloc((size_t)argc + 1, sizeof *a);
    if (!a)
        fputs("plantsieve: out of memory\n", stderr);
    return a;
}

static int cmd_survey(int argc, char **argv)
{
    bool json = false;
    int n = 0;
    char **cats = operands_new(argc);
    if (!cats)
        return EXIT_IO;
    int rc = options_parse(&survey_cmd, argc, argv, survey_option, &json, cats, &n);
    if (rc == GO_ON && n == 0)
        rc = usage_error("survey needs at least one catalog file", NULL);
    if (rc != GO_ON) {
        free(cats);
        return rc;
    }

    cli_ctx c = {ps_listing_new(stdout, json)};
    ps_batch *b = c.listing ? ps_batch_new(report_entry, &c) : NULL;
    if (!b) {
        fputs("plantsieve: out of memory\n", stderr);
        ps_listing_free(c.listing);
        free(cats);
        return EXIT_IO;
    }
    bool io_failed = false;
    for (int i = 0; i < n; i++) {
        ps_diag fd = {0};
        ps_status st = ps_batch_run(b, cats[i], &fd);
        if (st != PS_OK) {
            io_failed = true;
            say_at(cats[i], &fd, NULL);
        }
        ps_listing_catalog(c.listing, cats[i], st == PS_OK ? NULL : &fd);
    }
    const ps_batch_counts *counts = ps_batch_counts_get(b);
    ps_status wst = ps_listing_finish(c.listing, counts);
    rc = counts->errors ? EXIT_ENTRIES : EXIT_CLEAN;
    if (io_failed)
        rc = EXIT_IO;
    ps_batch_free(b);
    ps_listing_free(c.listing);
    free(cats);
    if (wst != PS_OK || fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        rc = EXIT_IO;
    }
    return rc;
}

/* ---- screen and explain ---- */

typedef enum gate { GATE_REDESIGN, GATE_MARGINAL, GATE_NEVER } gate;

/* Progress on stderr for long runs on a terminal: plants done, rate and the
 * time left, from a count of the entries made by reading the catalogs first
 * (reading costs a few per cent of screening). */
typedef struct progress {
    size_t total, done;
    double start, last;
    const char *verb;    /* "screened" (NULL) or "searched" */
} progress;

static double now_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_MONOTONIC, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

static void progress_show(progress *pg, bool final);

static void progress_tick(progress *pg, bool final)
{
    if (!final)
        pg->done++;
    progress_show(pg, final);
}

static void progress_show(progress *pg, bool final)
{
    double t = now_s();
    if (!final && t - pg->last < 0.5)
        return;
    pg->last = t;
    double rate = (double)pg->done / fmax(t - pg->start, 1e-9);
    double left = pg->total > pg->done ? (double)(pg->total - pg->done) / fmax(rate, 1e-9) : 0.0;
    if (pg->verb) /* a family's grid plants count one entry in total: no total, no time left */
        fprintf(stderr, "\r  %s %zu plants, %.*f plants/s   ", pg->verb, pg->done, rate < 10 ? 1 : 0, rate);
    else
        fprintf(stderr, "\r  screened %zu of %zu plants, %.0f plants/s, about %.1f s left   ", pg->done, pg->total,
                rate, left);
    if (final)
        fputc('\n', stderr);
}

/* The report files of a screen, written at once on up to `threads` threads
 * (the calling one among them): each file is one writer over the ranked
 * run, and the longest go first. */
typedef struct report_job {
    const char *name;
    ps_writer_fn fn;
    int cost;            /* order of dispatch: 0 first */
    FILE *f;
    int slot;
    ps_report_fill fill;
} report_job;

typedef struct report_work {
    report_job **order; /* the jobs, longest first */
    size_t n;
    const ps_run *run;
    atomic_size_t next;
} report_work;

static void fill_jobs(report_work *w)
{
    for (size_t i; (i = atomic_fetch_add(&w->next, 1)) < w->n;)
        w->order[i]->fill = ps_report_set_fill(w->order[i]->f, w->order[i]->fn, w->run);
}

typedef struct report_thread {
    pthread_t tid;
    report_work *work;
    bool read_failed;
} report_thread;

static void *fill_thread(void *arg)
{
    report_thread *t = arg;
    if (ps_run_reader_begin(t->work->run) == PS_OK) /* else the other threads take the files */
        fill_jobs(t->work);
    t->read_failed = ps_run_reader_end();
    return NULL;
}

static int by_cost(const void *a, const void *b)
{
    const report_job *x = *(report_job *const *)a, *y = *(report_job *const *)b;
    return (x->cost > y->cost) - (x->cost < y->cost);
}

/* Fill every job's file; returns whether some row could not be read back. */
static bool fill_reports(report_job *jobs, size_t n, ps_run *run, size_t threads)
{
    report_job *order[16];
    report_thread th[16];
    assert(n <= 16);
    for (size_t i = 0; i < n; i++)
        order[i] = &jobs[i];
    qsort(order, n, sizeof order[0], by_cost);
    report_work w = {.order = order, .n = n, .run = run};
    atomic_init(&w.next, 0);
    size_t extra = threads > 1 ? (threads - 1 < n ? threads - 1 : n - 1) : 0, started = 0;
    for (; started < extra; started++) {
        th[started] = (report_thread){.work = &w};
        if (pthread_create(&th[started].tid, NULL, fill_thread, &th[started]) != 0)
            break; /* the threads that started, and this one, do the rest */
    }
    fill_jobs(&w);
    bool read_failed = false;
    for (size_t i = 0; i < started; i++) {
        pthread_join(th[i].tid, NULL);
        read_failed = read_failed || th[i].read_failed;
    }
    return read_failed;
}

typedef struct screen_ctx {
    ps_run run;
    ps_screen_ws *ws;
    ps_study_ws *study;
    ps_pool *pool;       /* screen: assessments on worker threads */
    progress *prog;      /* screen on a terminal: plants done, rate, time left */
    bool nomem;
    const char *only_id; /* explain: keep this plant only */
    void (*also)(const ps_outcome *o, const ps_summary *s); /* explain: print while the model is here */
    size_t found;
    char **members;      /* explain of a family id: the ids of its grid plants */
    size_t n_members;
    bool shard;          /* screen --shard K/N */
    size_t shard_k, shard_n; /* 0-based k of n (without --shard: 0 of 1) */
    size_t seen;         /* entries read in all (a shard reads every entry) */
    ps_yield_tally *tally; /* --shard: this shard's yield blocks, one per family of the run */
    size_t cap_tally;
} screen_ctx;

static void say_entry_error(void *ctx, const char *file, const ps_plant *p, const ps_diag *err)
{
    (void)ctx;
    say_at(file, err, p->id);
}

static void remember_member(screen_ctx *c, const char *id)
{
    char **m = realloc(c->members, (c->n_members + 1) * sizeof *m);
    if (!m || !(m[c->n_members] = strdup(id))) {
        if (m)
            c->members = m;
        c->nomem = true;
        return;
    }
    c->members = m;
    c->n_members++;
}

static void screen_entry(void *ctx, const ps_outcome *o)
{
    screen_ctx *c = ctx;
    if (c->prog)
        progress_tick(c->prog, false);
    if (c->pool) { /* errors are told when the pool commits them, in order */
        if (ps_pool_add(c->pool, o) != PS_OK)
            c->nomem = true;
        return;
    }
    if (o->err)
        say_entry_error(c, o->file, o->p, o->err);
    if (c->only_id && strcmp(o->p->id, c->only_id) != 0) {
        size_t n = strlen(c->only_id);
        if (strncmp(o->p->id, c->only_id, n) == 0 && o->p->id[n] == '[') /* a grid plant of that family */
            remember_member(c, o->p->id);
        return;
    }
    ps_summary *s = ps_run_next(&c->run);
    if (!s) {
        c->nomem = true;
        return;
    }
    s->order = o->seq;
    ps_screen_assess(c->ws, o, &c->run.opt, s);
    ps_run_commit(&c->run);
    c->found++;
    if (c->also)
        c->also(o, s);
}

/* A family's boundaries and yield, after its grid plants (screen only). */
static void screen_family(void *ctx, ps_family *fam, const char *file)
{
    (void)file;
    screen_ctx *c = ctx;
    if (c->only_id)
        return;
    if (!c->study && !(c->study = ps_study_ws_new())) {
        c->nomem = true;
        return;
    }
    ps_family_result *fr = ps_run_next_family(&c->run);
    if (!fr) {
        c->nomem = true;
        return;
    }
    size_t f = c->run.n_families - 1;
    if (c->shard) { /* boundaries where the family is this shard's, yield blocks of this shard */
        if (f == c->cap_tally) {
            size_t cap = c->cap_tally ? 2 * c->cap_tally : 16;
            ps_yield_tally *t = realloc(c->tally, cap * sizeof *t);
            if (!t) {
                c->nomem = true;
                c->run.n_families--;
                return;
            }
            c->tally = t;
            c->cap_tally = cap;
        }
        if (ps_study_family_shard(c->study, fam, &c->run.opt, c->shard_k, c->shard_n, f % c->shard_n == c->shard_k,
                                  fr, &c->tally[f]) != PS_OK)
            c->nomem = true;
    } else
        ps_study_family(c->study, fam, &c->run.opt, fr);
    fr->file_index = c->run.n_catalogs ? c->run.n_catalogs - 1 : 0;
}

/* Read every catalog into c->run; true when every catalog was read to the end. */
static bool screen_catalogs(screen_ctx *c, char **files, int n)
{
    bool ok = true;
    ps_batch *b = ps_batch_new(screen_entry, c);
    if (!b) {
        c->nomem = true;
        return false;
    }
    ps_batch_on_family(b, screen_family);
    ps_batch_defer_analysis(b, c->pool != NULL);
    if (c->shard)
        ps_batch_shard(b, c->shard_k, c->shard_n);
    for (int i = 0; i < n; i++) {
        if (ps_run_add_catalog(&c->run, files[i], NULL) != PS_OK) {
            c->nomem = true;
            break;
        }
        ps_diag fd = {0};
        ps_status st = ps_batch_run(b, files[i], &fd);
        if (ps_run_catalog_title(&c->run, ps_batch_title(b)) != PS_OK)
            c->nomem = true;
        if (c->pool && ps_pool_flush(c->pool) != PS_OK)
            c->nomem = true;
        if (st != PS_OK) {
            ok = false;
            say_at(files[i], &fd, NULL);
            if (ps_run_catalog_failed(&c->run, &fd) != PS_OK)
                c->nomem = true;
        }
    }
    c->run.counts = *ps_batch_counts_get(b);
    c->seen = ps_batch_seen(b);
    if (c->pool) {
        size_t failed = ps_pool_analysis_errors(c->pool);
        c->run.counts.models -= failed;
        c->run.counts.errors += failed;
    }
    ps_batch_free(b);
    ps_study_ws_free(c->study);
    c->study = NULL;
    return ok;
}

/* Report base name: the first catalog's file name without directory and ending. */
static void stem_of(const char *path, char *out, size_t n)
{
    const char *base = strrchr(path, '/');
    base = base ? base + 1 : path;
    snprintf(out, n, "%s", base);
    char *dot = strrchr(out, '.');
    if (dot && dot != out)
        *dot = '\0';
}

static ps_status write_terminal_plain(FILE *f, const ps_run *r)
{
    return ps_write_terminal(f, r, false, 0, NULL);
}

static bool want_colour(void)
{
    const char *nc = getenv("NO_COLOR");
    return isatty(STDOUT_FILENO) && !(nc && nc[0]);
}

static size_t count_entries(char **files, int n, size_t *families);

/* The report set of a screen run and what an interrupt prints, static so
 * that the handler reaches them; it uses only async-signal-safe calls. */
static ps_report_set screen_set;
static const int interrupt_signals[] = {SIGINT, SIGTERM, SIGHUP};
static char interrupt_text[3][PS_SET_PATH + 200];
static size_t interrupt_len[3];

static void on_interrupt(int sig)
{
    ps_report_set_release(&screen_set);
    size_t k = sig == SIGINT ? 0 : sig == SIGTERM ? 1 : 2;
    ssize_t w = write(STDERR_FILENO, interrupt_text[k], interrupt_len[k]);
    (void)w;
    _exit(128 + sig);
}

/* From here until the run ends, SIGINT, SIGTERM and SIGHUP discard the
 * staged reports, release the lock and end the run. */
static void interrupts_catch(const char *outdir)
{
    static const char *const names[] = {"SIGINT", "SIGTERM", "SIGHUP"};
    struct sigaction sa;
    memset(&sa, 0, sizeof sa);
    sa.sa_handler = on_interrupt;
    sigemptyset(&sa.sa_mask);
    for (size_t k = 0; k < 3; k++)
        sigaddset(&sa.sa_mask, interrupt_signals[k]);
    for (size_t k = 0; k < 3; k++) {
        /* A signal ignored at start (a background job of a script, nohup) stays ignored. */
        struct sigaction was;
        if (sigaction(interrupt_signals[k], NULL, &was) == 0 && was.sa_handler == SIG_IGN)
            continue;
        int n = snprintf(interrupt_text[k], sizeof interrupt_text[k],
                         "plantsieve: interrupted by %s: no report of this run was published; the previous "
                         "reports in %s are left as they were\n",
                         names[k], outdir);
        interrupt_len[k] = n < 0 ? 0 : (size_t)n < sizeof interrupt_text[k] ? (size_t)n : sizeof interrupt_text[k] - 1;
        sigaction(interrupt_signals[k], &sa, NULL);
    }
}

/* Publishing is one step that a signal must not cut: hold the signals from
 * here to the end of the run (a signal this late finds the run finished). */
static void interrupts_hold(void)
{
    sigset_t set;
    sigemptyset(&set);
    for (size_t k = 0; k < 3; k++)
        sigaddset(&set, interrupt_signals[k]);
    sigprocmask(SIG_BLOCK, &set, NULL);
}

/* The whole command line, for the provenance of the reports (argv[0] as
 * "plantsieve", so no report names the directory the program sits in). */
static int whole_argc;
static char **whole_argv;

/* What the options of screen set. */
typedef struct screen_args {
    const char *outdir;
    gate g;
    ps_screen_opts opt;
    bool files, quiet;
    size_t show;
    size_t threads;
    size_t shard_k, shard_n;    /* --shard K/N (1-based K); n 0: not given */
} screen_args;

/* A whole number in [lo, hi] written in full ("12", not "12x" or ""). */
static bool whole_number(const char *v, long lo, long hi, long *out)
{
    char *end;
    errno = 0;
    long m = strtol(v, &end, 10);
    if (errno || end == v || *end || m < lo || m > hi)
        return false;
    *out = m;
    return true;
}

static int screen_option(void *ctx, int key, const char *v)
{
    screen_args *a = ctx;
    long m;
    switch (key) {
    case 'o':
        a->outdir = v;
        break;
    case OPT_NO_FILES:
        a->files = false;
        break;
    case OPT_QUIET:
        a->quiet = true;
        break;
    case OPT_DETAIL:
        if (strcmp(v, "all") == 0)
            a->opt.detail = PS_DETAIL_ALL;
        else if (strcmp(v, "flagged") == 0)
            a->opt.detail = PS_DETAIL_FLAGGED;
        else if (strcmp(v, "none") == 0)
            a->opt.detail = PS_DETAIL_NONE;
        else
            return usage_error("--detail takes all, flagged or none", v);
        break;
    case OPT_SHOW:
        if (strcmp(v, "all") == 0)
            a->show = 0;
        else if (whole_number(v, 1, LONG_MAX, &m))
            a->show = (size_t)m;
        else
            return usage_error("--show takes a whole number >= 1 or all", v);
        break;
    case OPT_MEMORY_ROWS:
        if (!whole_number(v, 1, LONG_MAX, &m))
            return usage_error("--memory-rows takes a whole number >= 1", v);
        a->opt.memory_rows = (size_t)m;
        break;
    case OPT_THREADS:
        if (!whole_number(v, 1, PS_POOL_MAX_THREADS, &m))
            return usage_error("--threads takes a whole number from 1 to 64", v);
        a->threads = (size_t)m;
        break;
    case OPT_SHARD: {
        char k_text[32];
        const char *slash = strchr(v, '/');
        long k, n;
        if (!slash || (size_t)(slash - v) >= sizeof k_text)
            return usage_error("--shard takes K/N, whole numbers with 1 <= K <= N", v);
        memcpy(k_text, v, (size_t)(slash - v));
        k_text[slash - v] = '\0';
        if (!whole_number(k_text, 1, PS_SHARD_MAX, &k) || !whole_number(slash + 1, 1, PS_SHARD_MAX, &n) || k > n)
            return usage_error("--shard takes K/N, whole numbers with 1 <= K <= N <= 100000", v);
        a->shard_k = (size_t)k;
        a->shard_n = (size_t)n;
        break;
    }
    case OPT_GATE:
        if (strcmp(v, "redesign") == 0)
            a->g = GATE_REDESIGN;
        else if (strcmp(v, "marginal") == 0)
            a->g = GATE_MARGINAL;
        else if (strcmp(v, "never") == 0)
            a->g = GATE_NEVER;
        else
            return usage_error("--gate takes redesign, marginal or never", v);
        break;
    case OPT_CERTIFY:
        if (strcmp(v, "passing") == 0)
            a->opt.certify = PS_CERTIFY_PASSING;
        else if (strcmp(v, "judged") == 0)
            a->opt.certify = PS_CERTIFY_JUDGED;
        else
            return usage_error("--certify takes passing or judged", v);
        break;
    case OPT_BUDGET:
        if (!whole_number(v, 100, 10000000, &m))
            return usage_error("--budget takes a whole number from 100 to 10000000", v);
        a->opt.certify_budget = (size_t)m;
        break;
    case OPT_MARGINAL_AT: {
        char *end;
        errno = 0;
        double x = strtod(v, &end);
        if (errno || *end || end == v || !(x > 0 && x <= 1))
            return usage_error("--marginal-at takes a number in (0, 1]", v);
        a->opt.marginal_at = x;
        break;
    }
    default:
        assert(!"an option of the table without a case");
    }
    return GO_ON;
}

/* What screen and merge do once the run is read: rank it, print the
 * listing, write and publish the report set (when a->files, the set already
 * open), and the exit code. digest: take the catalogs' SHA-256 now (a merge
 * keeps the digests its shards took). Frees nothing. */
static int finish_run(const screen_args *a, ps_run *run, const char *stem, bool read_ok, bool digest)
{
    ps_run_rank(run);
    if (a->files && digest)
        ps_run_digest_catalogs(run); /* the bytes each report says it was made from */
    int rc = EXIT_CLEAN;
    bool io_failed = !read_ok;
    char full[PS_SET_PATH + 600];
    snprintf(full, sizeof full, "%s/%s.screen.txt", screen_set.published, stem);
    if (ps_write_terminal(stdout, run, want_colour(), a->show, a->files ? full : NULL) != PS_OK)
        io_failed = true;
    if (a->files) {
        /* The whole set is staged, then published at once, or nothing is. */
        /* cost: the order in which the files are handed to the threads,
         * the ones that grow with the run first (the longest first). */
        struct { const char *ext; ps_writer_fn fn; int cost; } out[] = {
            {"txt", write_terminal_plain, 2}, {"csv", ps_write_csv, 1}, {"json", ps_write_json, 6},
            {"md", ps_write_markdown, 5},     {"html", ps_write_html, 4},
            {"families.csv", ps_write_families_csv, 7}, {"plants.jsonl", ps_write_plants_jsonl, 0},
            {"junit.xml", ps_write_junit, 3},
        };
        enum { N_OUT = sizeof out / sizeof out[0] };
        _Static_assert(N_OUT <= 16, "fill_reports takes at most 16 files");
        char retired[N_OUT][320], names[N_OUT][320];
        const char *retired_names[N_OUT];
        report_job jobs[N_OUT];
        size_t n_jobs = 0;
        bool staged = true;
        ps_diag d = {0};
        for (size_t i = 0; i < N_OUT; i++) {
            snprintf(names[i], sizeof names[i], "%s.screen.%s", stem, out[i].ext);
            snprintf(retired[i], sizeof retired[i], "%s.screen.%s", stem, out[i].ext); /* the flat layout before sets */
            retired_names[i] = retired[i];
            if (!staged || (out[i].fn == ps_write_families_csv && run->n_families == 0))
                continue;
            report_job *j = &jobs[n_jobs];
            *j = (report_job){.name = names[i], .fn = out[i].fn, .cost = out[i].cost};
            if (ps_report_set_create(&screen_set, j->name, &j->f, &j->slot, &d) != PS_OK) {
                fprintf(stderr, "plantsieve: %s\n", d.text);
                staged = false;
            } else
                n_jobs++;
        }
        if (staged) {
            if (fill_reports(jobs, n_jobs, run, a->threads))
                ps_run_mark_failed(run);
        } else
            for (size_t i = 0; i < n_jobs; i++) { /* not written: the set is dropped */
                fclose(jobs[i].f);
                jobs[i].fill = (ps_report_fill){PS_ERR_IO, ECANCELED};
            }
        for (size_t i = 0; i < n_jobs; i++)
            if (ps_report_set_finish(&screen_set, jobs[i].slot, jobs[i].name, jobs[i].fill, &d) != PS_OK && staged) {
                fprintf(stderr, "plantsieve: %s\n", d.text);
                staged = false;
            }
        if (staged && ps_run_failed(run)) {
            fputs("plantsieve: the temporary summary file could not be written or read\n", stderr);
            staged = false;
        }
        if (staged) {
            interrupts_hold();
            ps_diag_clear(&d);
            if (ps_report_set_publish(&screen_set, retired_names, N_OUT, &d) != PS_OK) {
                fprintf(stderr, "plantsieve: %s\n", d.text);
                staged = false;
            } else if (d.text[0])
                fprintf(stderr, "plantsieve: warning: %s\n", d.text);
        }
        ps_report_set_release(&screen_set);
        if (!staged) {
            fprintf(stderr, "plantsieve: no report of this run was published; the previous reports in %s are left "
                            "as they were\n", a->outdir);
            io_failed = true;
        }
    } else if (ps_run_failed(run)) {
        fputs("plantsieve: the temporary summary file could not be written or read: the listing is incomplete\n",
              stderr);
        io_failed = true;
    }
    const size_t *pv = run->per_verdict;
    gate g = a->g;
    bool tripped = (g != GATE_NEVER && (pv[PS_VERDICT_REDESIGN] || pv[PS_VERDICT_UNSTABILIZABLE])) ||
                   (g == GATE_MARGINAL && pv[PS_VERDICT_MARGINAL]);
    if (tripped)
        rc = EXIT_GATE;
    if (run->counts.errors || pv[PS_VERDICT_NEEDS_BANDWIDTH]) /* entries that could not be judged */
        rc = EXIT_ENTRIES;
    if (io_failed)
        rc = EXIT_IO;
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        rc = EXIT_IO;
    }
    return rc;
}

/* screen --shard K/N: write this shard's partial result into DIR; the
 * listing, the reports and the gate wait for the merge. */
static int write_shard(const screen_args *a, screen_ctx *c, const char *stem, bool read_ok)
{
    ps_run_rank(&c->run);
    ps_run_digest_catalogs(&c->run); /* the merge checks every shard read the same bytes */
    if (mkdir(a->outdir, 0777) != 0 && errno != EEXIST) {
        fprintf(stderr, "plantsieve: cannot make the directory %s: %s\n", a->outdir, strerror(errno));
        return EXIT_IO;
    }
    char name[320], path[PS_SET_PATH + 400];
    ps_partial_name(stem, a->shard_k, a->shard_n, name, sizeof name);
    snprintf(path, sizeof path, "%s/%s", a->outdir, name);
    ps_shard_info sh = {a->shard_k, a->shard_n, c->seen, c->run.n_families, c->tally};
    ps_diag d = {0};
    if (ps_partial_write(path, &c->run, &sh, &d) != PS_OK) {
        fprintf(stderr, "plantsieve: %s\n", d.text);
        return EXIT_IO;
    }
    const size_t *pv = c->run.per_verdict;
    printf("shard %zu of %zu: %zu of the %zu entries screened (%zu clear, %zu marginal, %zu redesign, %zu not "
           "stabilizable, %zu needs-bandwidth, %zu input errors), its share of the studies of %zu families; partial "
           "result in %s\n",
           a->shard_k, a->shard_n, c->run.n_rows, c->seen, pv[PS_VERDICT_CLEAR], pv[PS_VERDICT_MARGINAL],
           pv[PS_VERDICT_REDESIGN], pv[PS_VERDICT_UNSTABILIZABLE], pv[PS_VERDICT_NEEDS_BANDWIDTH],
           pv[PS_VERDICT_UNREAD], c->run.n_families, path);
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        return EXIT_IO;
    }
    (void)read_ok; /* a catalog that could not be read is in the partial: the merge judges the run */
    return EXIT_CLEAN;
}

static void screen_ctx_free(screen_ctx *c)
{
    for (size_t f = 0; c->tally && f < c->run.n_families; f++) /* before the run forgets its families */
        ps_yield_tally_free(&c->tally[f]);
    free(c->tally);
    ps_screen_ws_free(c->ws);
    ps_run_free(&c->run);
}

/* The defaults of screen and merge. */
static screen_args screen_defaults(void)
{
    long ncpu = sysconf(_SC_NPROCESSORS_ONLN);
    return (screen_args){
        .outdir = "reports",
        .g = GATE_REDESIGN,
        .opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_ALL},
        .files = true,
        .show = SHOW_DEFAULT,
        .threads = ncpu > 0 ? (size_t)(ncpu < PS_POOL_MAX_THREADS ? ncpu : PS_POOL_MAX_THREADS) : 1,
    };
}

static int cmd_screen(int argc, char **argv)
{
    screen_args a = screen_defaults();
    int n = 0;
    char **cats = operands_new(argc);
    if (!cats)
        return EXIT_IO;
    int prc = options_parse(&screen_cmd, argc, argv, screen_option, &a, cats, &n);
    if (prc == GO_ON && n == 0)
        prc = usage_error("screen needs at least one catalog file", NULL);
    if (prc == GO_ON && a.opt.certify_budget && a.opt.certify == PS_CERTIFY_NONE)
        prc = usage_error("--budget sets the search of --certify: give --certify passing or judged too", NULL);
    if (prc != GO_ON) {
        free(cats);
        return prc;
    }
    bool shard = a.shard_n > 0;
    if (shard)
        a.files = false; /* the merge writes the reports */
    else if (!a.files)
        a.opt.keep_top = a.show; /* only the cut listing reads the rows (0: all) */
    char stem[256];
    stem_of(cats[0], stem, sizeof stem);
    if (a.files) {
        /* The lock is taken before the work, so a concurrent run is refused at once. */
        ps_diag d = {0};
        ps_status st = ps_report_set_open(&screen_set, a.outdir, stem, &d);
        if (st != PS_OK) {
            fprintf(stderr, "plantsieve: %s\n", d.text);
            free(cats);
            return st == PS_ERR_BUSY ? EXIT_BUSY : EXIT_IO;
        }
        interrupts_catch(a.outdir);
    }
    screen_ctx c = {0};
    c.shard = shard;
    c.shard_k = shard ? a.shard_k - 1 : 0;
    c.shard_n = shard ? a.shard_n : 1;
    ps_run_init(&c.run, &a.opt);
    if (ps_run_set_meta(&c.run, whole_argc, whole_argv) != PS_OK)
        c.nomem = true;
    c.ws = ps_screen_ws_new();
    c.pool = ps_pool_new(a.threads, &c.run, say_entry_error, &c);
    progress pg = {0};
    if (!a.quiet && isatty(STDERR_FILENO)) {
        size_t families = 0;
        pg.total = count_entries(cats, n, &families);
        if (families) /* the grids' plants are not counted ahead: no total, no time left */
            pg.verb = "screened";
        pg.start = pg.last = now_s();
        c.prog = &pg;
    }
    bool read_ok = c.ws && c.pool && screen_catalogs(&c, cats, n);
    if (c.prog && pg.done)
        progress_tick(&pg, true);
    ps_pool_free(c.pool);
    if (!c.ws || c.nomem) {
        fputs("plantsieve: out of memory (or no room for the temporary summary file)\n", stderr);
        if (a.files)
            ps_report_set_release(&screen_set);
        screen_ctx_free(&c);
        free(cats);
        return EXIT_IO;
    }
    int rc = shard ? write_shard(&a, &c, stem, read_ok) : finish_run(&a, &c.run, stem, read_ok, true);
    screen_ctx_free(&c);
    free(cats);
    return rc;
}

static int cmd_merge(int argc, char **argv)
{
    screen_args a = screen_defaults();
    int n = 0;
    char **parts = operands_new(argc);
    if (!parts)
        return EXIT_IO;
    int prc = options_parse(&merge_cmd, argc, argv, screen_option, &a, parts, &n);
    if (prc == GO_ON && n == 0)
        prc = usage_error("merge needs the partial results of every shard", NULL);
    if (prc != GO_ON) {
        free(parts);
        return prc;
    }
    ps_run run;
    ps_run_init(&run, &a.opt);
    ps_diag d = {0};
    ps_status st = ps_run_set_meta(&run, whole_argc, whole_argv);
    if (st != PS_OK)
        ps_diag_set(&d, st, 0, 0, "", "out of memory");
    else
        st = ps_partial_merge(&run, parts, (size_t)n, &d);
    free(parts);
    if (st != PS_OK) {
        fprintf(stderr, "plantsieve: %s\n", d.text);
        ps_run_free(&run);
        return EXIT_IO;
    }
    char stem[256];
    stem_of(run.n_catalogs ? run.catalogs[0].file : "run", stem, sizeof stem);
    if (a.files) {
        st = ps_report_set_open(&screen_set, a.outdir, stem, &d);
        if (st != PS_OK) {
            fprintf(stderr, "plantsieve: %s\n", d.text);
            ps_run_free(&run);
            return st == PS_ERR_BUSY ? EXIT_BUSY : EXIT_IO;
        }
        interrupts_catch(a.outdir);
    }
    bool read_ok = run.counts.files_failed == 0;
    int rc = finish_run(&a, &run, stem, read_ok, false);
    ps_run_free(&run);
    return rc;
}

/* explain: every number of one plant in the order it is checked by hand;
 * the words come from the library (screen/audit.h, screen/attribution.h). */
static void print_roots(const char *label, const ps_root *r, size_t n, bool in_z)
{
    printf("  %-22s", label);
    if (n == 0)
        fputs(" none", stdout);
    for (size_t i = 0; i < n; i++)
        printf(" %.10g%+.10gj[%s]", r[i].v.re, r[i].v.im,
               in_z ? (r[i].region == PS_RHP ? "outside" : r[i].region == PS_AXIS ? "circle" : "inside")
                    : ps_region_name(r[i].region));
    putchar('\n');
}

static void print_value(double v)
{
    if (isnan(v))
        fputs("not applicable", stdout);
    else if (isinf(v))
        fputs("infinite", stdout);
    else
        printf("%.10g", v);
}

/* A floor with its logarithm: past a double's range, as a power of ten. */
static void print_big(double v, double ln)
{
    char b[48];
    if (isinf(v) && v > 0 && isfinite(ln))
        printf("%s (past a double's range; ln = %.10g)", ps_text_big(b, sizeof b, v, ln, 10), ln);
    else
        print_value(v);
}

/* explain --certify [--budget N]: section 8, the certificate controller. */
static bool explain_certify;
static size_t explain_budget = PS_CERT_BUDGET;

static int explain_option(void *ctx, int key, const char *value)
{
    (void)ctx;
    if (key == OPT_CERTIFY)
        explain_certify = true;
    else if (key == OPT_BUDGET) {
        long v;
        if (!whole_number(value, 100, 10000000, &v))
            return usage_error("--budget needs a whole number from 100 to 10000000", value);
        explain_budget = (size_t)v;
    }
    return GO_ON;
}

static void explain_one(const ps_outcome *o, const ps_summary *s)
{
    const ps_plant *p = o->p;
    printf("plantsieve %s: explanation of plant '%s' (%s:%zu)\n\n", PS_VERSION, p->id, o->file, p->line);
    if (o->err) {
        char pos[PS_DIAG_POS];
        ps_diag_pos_words(pos, sizeof pos, o->err->line, o->err->col);
        printf("  input error%s%s, field '%s': %s\n", pos[0] ? " at " : "", pos, o->err->field, o->err->text);
        return;
    }
    const ps_analysis *an = o->an;
    const ps_floors *fl = o->fl;
    const ps_requirements *q = &p->req;
    char line[600];
    ps_requirements_text(s, line, sizeof line);
    puts("1. The plant as analysed (roots: GSL companion solver, Newton-polished; state space: balanced eigenvalues)");
    print_roots(an->in_z ? "poles in z" : "poles", an->poles, an->n_poles, an->in_z);
    print_roots(an->in_z ? "zeros in z" : "zeros", an->zeros, an->n_zeros, an->in_z);
    printf("  %-22s %.10g\n  %-22s %d\n  %-22s %.10g s\n  %-22s %s\n", "gain", an->gain, "relative degree",
           an->rel_degree, "delay", an->delay, "hidden unstable mode", an->hidden_unstable ? "yes" : "no");
    if (an->h > 0) {
        char zline[600];
        ps_sampling_text(an->h, an->compute_delay, an->in_z, zline, sizeof zline);
        printf("  %-22s %s\n", "digital loop", zline);
        ps_zroots_text(fl, an->in_z, zline, sizeof zline);
        printf("  %-22s %s\n", "roots in z", zline);
        if (!an->in_z) {
            double f = fmod((an->delay + an->compute_delay) / an->h, 1.0);
            printf("  %-22s the hold and the delay's fraction f = %.4g of a sample act like an extra delay between "
                   "h/2 and h: for one real unstable pole p the floor is about e^{p (theta + max(f, 1 - f) h)} "
                   "(exact for f = 0; first order in h)\n",
                   "the hold", f > 1 - 1e-9 ? 0.0 : f);
        }
        puts("  The floors below are those of the sampled loop: the plant in z mapped by w = (z - 1)/(z + 1) "
             "onto the right half plane (zeros at z = infinity to w = 1), computed there as for a plant without "
             "delay; the inputs printed are the plant's own roots.");
    }
    printf("\n2. Requirements: %s\n", line);
    printf("  %-22s %.10g\n  %-22s %.10g\n  %-22s %.10g\n  %-22s %.10g\n  %-22s %.10g\n  %-22s %.10g\n"
           "  %-22s %.10g\n  %-22s %.10g\n",
           "peak_s_allowed", q->ms_allowed, "peak_t_allowed", q->mt_allowed, "band_edge", q->wb > 0 ? q->wb : 0.0,
           "band_attenuation", q->wb > 0 ? q->eps : 1.0, "rolloff_start", q->wh > 0 ? q->wh : 0.0, "rolloff_gain",
           q->delta, "rolloff_slope", q->k, "effort_allowed", q->effort_allowed);
    puts("  (0 means not given)");
    puts("\n3. Floors (each holds for every stabilizing LTI controller, under its assumption)");
    ps_audit audit;
    ps_audit_floors(an, q, fl, &audit);
    for (size_t i = 0; i < audit.n; i++) {
        const ps_audit_item *it = &audit.item[i];
        printf("\n  [%s] %s = ", it->key, it->name);
        print_big(it->value, it->value_ln);
        printf("\n    formula:    %s\n", it->formula);
        if (it->inputs[0])
            printf("    inputs:     %s\n", it->inputs);
        printf("    source:     %s\n    assumption: %s\n", it->source, it->assumption);
    }
    printf("\n  crossover window (rules of thumb, not laws; S&P 2nd ed. ch. 5): %.4g .. %.4g rad/s, %s\n",
           fl->crossover_min, fl->crossover_max, fl->window_open ? "open" : "closed");
    printf("  parity interlacing (Youla, Bongiorno & Lu, Automatica 10, 1974): %s\n",
           fl->parity_interlacing ? "holds: a stable controller can stabilize"
                                  : "fails: every stabilizing controller is itself unstable");
    printf("  Bode area floor covers: %s\n", ps_bode_coverage_text(fl->bode_controller_rd));
    if (fl->note[0])
        printf("  note: %s\n", fl->note);
    puts("\n4. Severity (share of the allowed log-peak; a floor below 1 counts as 1)");
    char big[48];
    printf("  [share_ms] ln(%s)/ln(%.10g) = ", ps_text_big(big, sizeof big, fmax(fl->ms, 1), fl->ms_ln, 10),
           q->ms_allowed);
    print_value(s->share_ms);
    printf("\n  [share_mt] ln(%s)/ln(%.10g) = ", ps_text_big(big, sizeof big, fmax(fl->mt, 1), fl->mt_ln, 10),
           q->mt_allowed);
    print_value(s->share_mt);
    if (q->effort_allowed > 0) {
        printf("\n  [share_effort] ln(1 + %s)/ln(1 + %.10g) = ",
               ps_text_big(big, sizeof big, fl->effort, fl->effort_ln, 10), q->effort_allowed);
        print_value(s->share_effort);
    } else
        fputs("\n  effort: no effort_allowed given, not counted", stdout);
    printf("\n  [severity] = ");
    print_value(s->severity);
    printf(" (worst: %s)\n", s->worst);
    const ps_attribution *a = &s->attr;
    puts("\n5. What raises the binding floor (each factor relaxed alone, the floor recomputed in full)");
    if (a->binding == PS_PEAK_NONE || !isfinite(a->floor_ln))
        puts("  no finite binding floor above 1: nothing to take apart");
    else {
        printf("  binding: %s floor %s against %.10g allowed\n", ps_peak_name(a->binding),
               ps_text_big(big, sizeof big, a->floor, a->floor_ln, 10), a->allowed);
        if (a->n_present == 0)
            puts("  the plant and its requirements have none of the factors (delay, RHP zeros, roll-off start, band)");
        for (size_t i = 0; i < a->n_present; i++) {
            ps_factor f = (ps_factor)a->order[i];
            printf("  [without_%s] %s: %s (%s)\n", ps_factor_key(f), ps_factor_relaxed_words(f),
                   ps_text_big(big, sizeof big, a->without[f], a->without_ln[f], 10),
                   i < a->n_lowering ? "lowers it: named in the cause" : "does not lower it");
        }
        if (a->n_present > 1)
            printf("  [all_relaxed] every factor relaxed at once: %s\n",
                   ps_text_big(big, sizeof big, a->all_relaxed, a->all_relaxed_ln, 10));
    }
    printf("\n6. Verdict: %s: %s\n   cause: %s\n", ps_verdict_name(s->verdict), ps_verdict_meaning(s->verdict),
           s->cause);
    printf("   (marginal from a severity of %.2g, redesign above 1)\n", PS_MARGINAL_AT);
    puts("\n7. Redesign targets (bisection on the floors, the rest of the plant held fixed)");
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        ps_target_text(s, (ps_target_kind)k, line, sizeof line);
        if (line[0])
            printf("  - %s\n", line);
        else
            printf("  - %s: %s\n", ps_target_label((ps_target_kind)k), s->target[k].why);
    }
    if (explain_certify) {
        puts("\n8. The other side of the bracket (certify: a controller searched within the budget and verified)");
        ps_cert *cert = malloc(sizeof *cert);
        if (!cert) {
            puts("  not computed: out of memory");
        } else {
            ps_certify(an, q, fl, p->id, explain_budget, cert);
            printf("  ");
            ps_certificate_text(stdout, s, cert);
            free(cert);
        }
    }
    printf("\n%s\n", ps_caution_text);
}

static int cmd_explain(int argc, char **argv)
{
    int n = 0;
    char **ops = operands_new(argc);
    if (!ops)
        return EXIT_IO;
    int prc = options_parse(&explain_cmd, argc, argv, explain_option, NULL, ops, &n);
    if (prc == GO_ON && n < 2)
        prc = usage_error("explain needs a plant id and at least one catalog file", NULL);
    if (prc != GO_ON) {
        free(ops);
        return prc;
    }
    const char *id = ops[0];
    screen_ctx c = {0};
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_ALL};
    ps_run_init(&c.run, &opt);
    c.only_id = id;
    c.also = explain_one;
    c.ws = ps_screen_ws_new();
    bool ok = c.ws && screen_catalogs(&c, ops + 1, n - 1);
    int rc = EXIT_CLEAN;
    if (!c.ws || c.nomem)
        rc = EXIT_IO;
    else if (c.found == 0 && c.n_members > 0) {
        /* A family id: its grid plants are the ones that can be explained. */
        printf("'%s' is a family of %zu plants; explain one of them:\n", id, c.n_members);
        for (size_t i = 0; i < c.n_members; i++)
            printf("  %s\n", c.members[i]);
    } else if (c.found == 0) {
        fprintf(stderr, "plantsieve: no plant with id '%s' in the catalogs given\n", id);
        rc = EXIT_USAGE;
    } else if (c.run.counts.errors)
        rc = EXIT_ENTRIES;
    if (!ok)
        rc = EXIT_IO;
    for (size_t i = 0; i < c.n_members; i++)
        free(c.members[i]);
    free(c.members);
    ps_screen_ws_free(c.ws);
    ps_run_free(&c.run);
    free(ops);
    if (fflush(stdout) != 0 || ferror(stdout))
        rc = EXIT_IO;
    return rc;
}

/* ---- read: the reading cost alone ---- */

typedef struct read_count {
    size_t entries, errors, families;
} read_count;

static int count_entry(void *ctx, ps_plant *p, const ps_diag *err)
{
    (void)p;
    read_count *c = ctx;
    c->entries++;
    c->errors += err != NULL;
    return 0;
}

static int count_family(void *ctx, const ps_ynode *family, const ps_plant *defaults)
{
    (void)family, (void)defaults;
    ((read_count *)ctx)->entries++;
    ((read_count *)ctx)->families++;
    return 0;
}

/* The catalogs' entries, a family counting one; *families: how many are
 * families (their grid plants are screened too, so the entries are then no
 * total of the plants). */
static size_t count_entries(char **files, int n, size_t *families)
{
    ps_plant *scratch = malloc(sizeof *scratch);
    read_count c = {0};
    for (int i = 0; scratch && i < n; i++) {
        ps_diag fd = {0};
        ps_catalog_read_families(files[i], scratch, count_entry, count_family, &c, &fd);
    }
    free(scratch);
    if (families)
        *families = c.families;
    return c.entries;
}

/* ---- certify ---- */

/* Plants wait in a chunk of CERT_CHUNK; the searches of a full chunk run on
 * the threads, then the chunk is printed in catalog order (each search
 * depends only on its plant, so the output is the same for any --threads). */
enum { CERT_CHUNK = 32 };

typedef struct cert_job {
    ps_summary s;      /* the screened plant: id, verdict, floors, requirements */
    ps_analysis an;
    ps_cert cert;
} cert_job;

typedef struct certify_ctx {
    size_t budget, threads;
    bool json;
    ps_screen_ws *ws;
    cert_job *jobs;
    size_t n_jobs;
    atomic_size_t next;
    json_t *plants;
    size_t per_bracket[PS_BRACKET_COUNT];
    bool nomem;
    progress *prog;     /* on a terminal: plants searched so far */
} certify_ctx;

static void *certify_worker(void *arg)
{
    certify_ctx *c = arg;
    for (size_t i; (i = atomic_fetch_add(&c->next, 1)) < c->n_jobs;) {
        cert_job *j = &c->jobs[i];
        ps_certify(&j->an, &j->s.req, &j->s.fl, j->s.id, c->budget, &j->cert);
    }
    return NULL;
}

/* Search the waiting plants, then print them in order. */
static void certify_flush(certify_ctx *c)
{
    if (c->n_jobs == 0)
        return;
    atomic_store(&c->next, 0);
    pthread_t th[PS_POOL_MAX_THREADS];
    size_t started = 0;
    for (size_t t = 1; t < c->threads && t < c->n_jobs; t++)
        if (pthread_create(&th[started], NULL, certify_worker, c) == 0)
            started++;
    certify_worker(c);
    for (size_t t = 0; t < started; t++)
        pthread_join(th[t], NULL);
    for (size_t i = 0; i < c->n_jobs; i++) {
        cert_job *j = &c->jobs[i];
        c->per_bracket[ps_bracket_of(&j->s, &j->cert)]++;
        if (!c->json) {
            ps_certificate_text(stdout, &j->s, &j->cert);
            continue;
        }
        json_t *o = ps_certificate_json(&j->s, &j->cert);
        json_t *pl = ps_certificate_plant_json(&j->an);
        if (!o || !pl || json_object_set_new(o, "plant", pl) != 0 || json_array_append_new(c->plants, o) != 0)
            c->nomem = true;
    }
    if (c->prog) {
        c->prog->done += c->n_jobs;
        progress_show(c->prog, false);
    }
    c->n_jobs = 0;
}

static int certify_option(void *ctx, int key, const char *value)
{
    certify_ctx *c = ctx;
    if (key == OPT_JSON)
        c->json = true;
    else if (key == OPT_BUDGET) {
        long v;
        if (!whole_number(value, 100, 10000000, &v))
            return usage_error("--budget needs a whole number from 100 to 10000000", value);
        c->budget = (size_t)v;
    } else if (key == OPT_THREADS) {
        long v;
        if (!whole_number(value, 1, PS_POOL_MAX_THREADS, &v))
            return usage_error("--threads takes a whole number from 1 to 64", value);
        c->threads = (size_t)v;
    }
    return GO_ON;
}

static void certify_entry(void *ctx, const ps_outcome *o)
{
    certify_ctx *c = ctx;
    if (o->err) {
        certify_flush(c); /* the plants before it are printed first */
        say_at(o->file, o->err, o->p->id);
        return;
    }
    cert_job *j = &c->jobs[c->n_jobs++];
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_NONE};
    j->s.order = 0;
    j->s.file_index = 0;
    ps_screen_assess(c->ws, o, &opt, &j->s);
    j->an = *o->an;
    if (c->n_jobs == CERT_CHUNK)
        certify_flush(c);
}

static int cmd_certify(int argc, char **argv)
{
    int n = 0;
    char **cats = operands_new(argc);
    if (!cats)
        return EXIT_IO;
    long ncpu = sysconf(_SC_NPROCESSORS_ONLN);
    certify_ctx c = {.budget = PS_CERT_BUDGET, .threads = ncpu >= 1 ? (size_t)(ncpu < 64 ? ncpu : 64) : 1};
    int rc = options_parse(&certify_cmd, argc, argv, certify_option, &c, cats, &n);
    if (rc == GO_ON && n == 0)
        rc = usage_error("certify needs at least one catalog file", NULL);
    if (rc != GO_ON) {
        free(cats);
        return rc;
    }
    c.ws = ps_screen_ws_new();
    c.jobs = malloc(CERT_CHUNK * sizeof *c.jobs);
    c.plants = json_array();
    progress pg = {.verb = "searched"};
    if (isatty(STDERR_FILENO)) { /* a line on stderr that tells how far the search is */
        pg.start = pg.last = now_s();
        c.prog = &pg;
    }
    ps_batch *b = c.ws && c.jobs && c.plants ? ps_batch_new(certify_entry, &c) : NULL;
    rc = EXIT_CLEAN;
    if (!b) {
        fputs("plantsieve: out of memory\n", stderr);
        rc = EXIT_IO;
    }
    for (int i = 0; b && i < n; i++) {
        ps_diag fd = {0};
        if (ps_batch_run(b, cats[i], &fd) != PS_OK) {
            say_at(cats[i], &fd, NULL);
            rc = EXIT_IO;
        }
    }
    if (b) {
        certify_flush(&c);
        if (c.prog && pg.done)
            progress_show(&pg, true);
        const ps_batch_counts *counts = ps_batch_counts_get(b);
        if (rc == EXIT_CLEAN && counts->errors)
            rc = EXIT_ENTRIES;
        if (c.nomem) {
            fputs("plantsieve: out of memory\n", stderr);
            rc = EXIT_IO;
        } else if (c.json) {
            json_t *doc = json_pack("{s:i,s:i,s:o,s:{s:i,s:i,s:i,s:i},s:s}", "budget", (json_int_t)c.budget,
                                    "entries", (json_int_t)counts->entries, "plants", json_incref(c.plants),
                                    "outcomes", "ruled out", (json_int_t)c.per_bracket[PS_BRACKET_RULED_OUT],
                                    "demonstrated", (json_int_t)c.per_bracket[PS_BRACKET_DEMONSTRATED], "undecided",
                                    (json_int_t)c.per_bracket[PS_BRACKET_UNDECIDED], "not attempted",
                                    (json_int_t)c.per_bracket[PS_BRACKET_NOT_ATTEMPTED], "caution", ps_caution_text);
            if (!doc || json_dumpf(doc, stdout, JSON_INDENT(1) | JSON_REAL_PRECISION(17)) != 0)
                rc = EXIT_IO;
            fputc('\n', stdout);
            json_decref(doc);
        } else {
            printf("%zu entries: %zu ruled out, %zu demonstrated, %zu undecided, %zu not attempted, %zu rejected\n",
                   counts->entries, c.per_bracket[PS_BRACKET_RULED_OUT], c.per_bracket[PS_BRACKET_DEMONSTRATED],
                   c.per_bracket[PS_BRACKET_UNDECIDED], c.per_bracket[PS_BRACKET_NOT_ATTEMPTED], counts->errors);
            printf("\nThe floors are necessary conditions: no controller under the stated requirements does\n"
                   "better. A demonstrated plant has one controller that meets its stated requirements in this\n"
                   "model; it is not a design. Undecided means no controller was found within the budget, not\n"
                   "that none exists.\n\n%s\n",
                   ps_caution_text);
        }
    }
    ps_batch_free(b);
    json_decref(c.plants);
    free(c.jobs);
    ps_screen_ws_free(c.ws);
    free(cats);
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        rc = EXIT_IO;
    }
    return rc;
}

static int cmd_read(int argc, char **argv)
{
    int n = 0;
    char **cats = operands_new(argc);
    if (!cats)
        return EXIT_IO;
    int rc = options_parse(&read_cmd, argc, argv, no_options, NULL, cats, &n);
    if (rc == GO_ON && n == 0)
        rc = usage_error("read needs at least one catalog file", NULL);
    ps_plant *scratch = rc == GO_ON ? malloc(sizeof *scratch) : NULL;
    if (rc == GO_ON && !scratch) {
        fputs("plantsieve: out of memory\n", stderr);
        rc = EXIT_IO;
    }
    if (rc != GO_ON) {
        free(cats);
        return rc;
    }
    rc = EXIT_CLEAN;
    for (int i = 0; i < n; i++) {
        read_count c = {0};
        ps_diag fd = {0};
        if (ps_catalog_read_families(cats[i], scratch, count_entry, count_family, &c, &fd) != PS_OK) {
            say_at(cats[i], &fd, NULL);
            rc = EXIT_IO;
        }
        printf("%s: %zu entries read, %zu with errors\n", cats[i], c.entries, c.errors);
    }
    free(scratch);
    free(cats);
    if (fflush(stdout) != 0 || ferror(stdout)) {
        fputs("plantsieve: error writing the output\n", stderr);
        rc = EXIT_IO;
    }
    return rc;
}

/* plantsieve help COMMAND */
static int main_help(const char *name)
{
    static const cli_command *const commands[] = {&screen_cmd, &merge_cmd, &explain_cmd, &survey_cmd, &read_cmd,
                                                  &certify_cmd};
    for (size_t i = 0; i < sizeof commands / sizeof commands[0]; i++)
        if (strcmp(name, commands[i]->name) == 0)
            return print_help(commands[i]);
    if (strcmp(name, "compare") == 0) {
        char *args[] = {"compare", "--help", NULL};
        return ps_cli_compare(2, args);
    }
    return usage_error("unknown command", name);
}

int main(int argc, char **argv)
{
    /* Numbers are read and written in the C locale whatever the environment says. */
    setlocale(LC_ALL, "C");
    ps_roots_init();
    whole_argc = argc;
    whole_argv = argv;
    if (argc < 2)
        return usage_error("no command given", NULL);
    const char *cmd = argv[1];
    if (strcmp(cmd, "-h") == 0 || strcmp(cmd, "--help") == 0 || strcmp(cmd, "help") == 0) {
        if (argc > 2 && strcmp(cmd, "help") == 0) /* help COMMAND: that command's help */
            return main_help(argv[2]);
        fputs(usage_text, stdout);
        return fflush(stdout) == 0 ? EXIT_CLEAN : EXIT_IO;
    }
    if (strcmp(cmd, "--version") == 0) {
        printf("plantsieve %s\n", PS_VERSION);
        return fflush(stdout) == 0 ? EXIT_CLEAN : EXIT_IO;
    }
    /* Each command gets its own name as argv[0] (getopt starts after it). */
    if (strcmp(cmd, "survey") == 0)
        return cmd_survey(argc - 1, argv + 1);
    if (strcmp(cmd, "read") == 0)
        return cmd_read(argc - 1, argv + 1);
    if (strcmp(cmd, "screen") == 0)
        return cmd_screen(argc - 1, argv + 1);
    if (strcmp(cmd, "explain") == 0)
        return cmd_explain(argc - 1, argv + 1);
    if (strcmp(cmd, "merge") == 0)
        return cmd_merge(argc - 1, argv + 1);
    if (strcmp(cmd, "certify") == 0)
        return cmd_certify(argc - 1, argv + 1);
    if (strcmp(cmd, "compare") == 0)
        return ps_cli_compare(argc - 1, argv + 1);
    return usage_error(cmd[0] == '-' ? "unknown option" : "unknown command", cmd);
}

/* test_reports.c - the CSV, Markdown and HTML screening reports written from
 * a hand-built run: CSV read back by a real CSV reader, escaping, one row per
 * plant, write errors, and atomic replacement of report files. */
#include <criterion/criterion.h>
#include <jansson.h>
#include <ctype.h>
#include <dirent.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "report/csv_cells.h"
#include "report/reports.h"
#include "screen/screen.h"
#include "support.h"

TestSuite(reports, .init = ps_test_init);

/* ---- the run under test ---- */

/* A cause with every character RFC 4180 must quote, and a Markdown pipe. */
static const char tricky_cause[] = "RHP pole at 4.27 rad/s, cancelled by the \"zero\" at 4.27\r\nexactly; |S| cannot be shaped";
static const char tricky_id[] = "strider-&<b>'x\"";
static const char error_text[] = "expected a number, got \"7,3.x\"";

static ps_summary *add_screened(ps_run *r, const char *id, ps_verdict v, double severity, double ms, double mt,
                                size_t line)
{
    ps_summary *s = ps_run_next(r);
    cr_assert_not_null(s);
    size_t order = s->order, file_index = s->file_index;
    memset(s, 0, sizeof *s);
    s->order = order;
    s->file_index = file_index;
    snprintf(s->id, sizeof s->id, "%s", id);
    s->line = line;
    s->verdict = v;
    s->severity = severity;
    s->share_ms = log(fmax(ms, 1)) / log(2.0);
    s->share_mt = log(fmax(mt, 1)) / log(1.25);
    s->share_effort = NAN;
    s->worst = "Ms";
    snprintf(s->cause, sizeof s->cause, "floors of %s", id);
    s->fl.ms = ms;
    s->fl.mt = mt;
    s->fl.bode_area = 13.41;
    s->fl.ms_interpolation = ms;
    s->fl.mt_interpolation = mt;
    s->fl.effort = 2.718;
    s->fl.ms_band = NAN;
    s->fl.ms_poisson = NAN;
    s->fl.mt_poisson = NAN;
    s->fl.limiting = "interpolation";
    s->fl.crossover_min = 8.54;
    s->fl.crossover_max = INFINITY;
    s->fl.window_open = true;
    s->req = (ps_requirements){.ms_allowed = 2.0, .mt_allowed = 1.25, .wh = 377.0, .delta = 0.5, .k = 1.0};
    s->req_overridden[PS_F_ROLLOFF_START] = true;
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        s->target[k] = (ps_target){.state = PS_TARGET_NA, .now = NAN, .limit = NAN};
        snprintf(s->target[k].why, sizeof s->target[k].why, "no such feature");
    }
    s->band_eps = 0.1;
    s->n_poles = 3;
    s->poles[0] = (ps_cplx){62.64, 0};
    s->poles[1] = (ps_cplx){-62.64, 0};
    s->poles[2] = (ps_cplx){-0.0413, 2.9};
    s->n_zeros = 1;
    s->zeros[0] = (ps_cplx){1730.0, 0};
    s->n_rhp_poles = 1;
    s->n_rhp_zeros = 1;
    return s;
}

static void add_curve(ps_summary *s)
{
    s->n_curve = PS_CURVE_N;
    for (size_t i = 0; i < PS_CURVE_N; i++) {
        s->curve_wb[i] = 0.0731 * pow(10.0, 4.0 * (double)i / (PS_CURVE_N - 1));
        s->curve_ms[i] = 1.0 + pow(s->curve_wb[i] / 6.3, 2);
    }
    s->curve_ms[PS_CURVE_N - 1] = INFINITY; /* must be clipped, not break the figure */
}

/* Five plants in two catalogs, committed out of rank order:
 * clear, redesign, input error, not stabilizable, marginal. */
static void build_run(ps_run *r)
{
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(r, &opt);
    cr_assert_eq(ps_run_add_catalog(r, "catalogs/cat,one.yaml", NULL), PS_OK);

    ps_summary *s = add_screened(r, "pallas-1", PS_VERDICT_CLEAR, 0.215, 1.161, 1.049, 12);
    s->fl.window_open = false;
    s->req.wb = 2.5;
    s->req.eps = 0.1;
    s->req_overridden[PS_F_BAND_EDGE] = true;
    add_curve(s);
    s->target[PS_TARGET_BAND] = (ps_target){.state = PS_TARGET_FOUND, .now = 2.5, .limit = 8.3, .passes_now = true};
    ps_run_commit(r);

    s = add_screened(r, "glide-g5", PS_VERDICT_REDESIGN, 1.734, 3.31, 1.47, 40);
    add_curve(s);
    s->target[PS_TARGET_POLE] = (ps_target){.state = PS_TARGET_FOUND, .now = 62.64, .limit = 41.87};
    s->target[PS_TARGET_DELAY] = (ps_target){.state = PS_TARGET_UNBOUNDED, .now = 0.0, .limit = NAN,
                                             .searched = 0.5, .passes_now = true};
    snprintf(s->target[PS_TARGET_DELAY].why, sizeof s->target[PS_TARGET_DELAY].why, "no delay in the plant");
    s->target[PS_TARGET_BAND] = (ps_target){.state = PS_TARGET_FOUND, .now = NAN, .limit = 3.77};
    ps_run_commit(r);

    cr_assert_eq(ps_run_add_catalog(r, "two.csv", NULL), PS_OK);
    s = ps_run_next(r);
    size_t order = s->order, file_index = s->file_index;
    memset(s, 0, sizeof *s);
    s->order = order;
    s->file_index = file_index;
    snprintf(s->id, sizeof s->id, "bad-row");
    s->line = 4;
    s->verdict = PS_VERDICT_UNREAD;
    s->severity = NAN;
    s->share_ms = s->share_mt = s->share_effort = NAN;
    s->worst = "none";
    s->err_line = 4;
    s->err_col = 17;
    snprintf(s->err_field, sizeof s->err_field, "denominator");
    snprintf(s->err_text, sizeof s->err_text, "%s", error_text);
    snprintf(s->cause, sizeof s->cause, "input error: %s", error_text);
    ps_run_commit(r);

    s = add_screened(r, tricky_id, PS_VERDICT_UNSTABILIZABLE, INFINITY, INFINITY, INFINITY, 9);
    s->fl.infinite = true;
    s->fl.limiting = "cancellation"; /* what ps_floors_compute names an exact cancellation */
    snprintf(s->cause, sizeof s->cause, "%s", tricky_cause);
    s->zeros[0] = (ps_cplx){62.64, 0}; /* the exact cancellation */
    ps_run_commit(r);

    s = add_screened(r, "reach-b", PS_VERDICT_MARGINAL, 0.873, 1.83, 1.21, 77);
    ps_run_commit(r);

    ps_diag fd = {0};
    fd.line = 6;
    fd.col = 1;
    snprintf(fd.text, sizeof fd.text, "unterminated quoted field");
    cr_assert_eq(ps_run_catalog_failed(r, &fd), PS_OK);
    r->counts = (ps_batch_counts){.entries = 5, .models = 4, .errors = 1, .files_failed = 1};
    ps_run_rank(r);
}

/* Ranked order the run must have (ps_run_rank's contract). */
static const char *const ranked_ids[] = {tricky_id, "glide-g5", "reach-b", "pallas-1", "bad-row"};
enum { N_PLANTS = 5 };

static void check_rank_order(const ps_run *r)
{
    cr_assert_eq(r->n_rows, N_PLANTS);
    for (size_t i = 0; i < N_PLANTS; i++)
        cr_assert_str_eq(r->rows[i].id, ranked_ids[i], "rank %zu", i + 1);
}

/* Run a writer into memory; returns a malloc'd NUL-terminated document. */
static char *render(ps_writer_fn fn, const ps_run *r, size_t *len)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    cr_assert_eq(fn(f, r), PS_OK);
    cr_assert_eq(fclose(f), 0);
    if (len)
        *len = n;
    return buf;
}

static size_t count_of(const char *hay, const char *needle)
{
    size_t n = 0;
    for (const char *p = strstr(hay, needle); p; p = strstr(p + strlen(needle), needle))
        n++;
    return n;
}

/* word occurs in hay with no letter on either side ("nan" but not "dominant"). */
static bool has_word(const char *hay, const char *word)
{
    size_t n = strlen(word);
    for (const char *p = strstr(hay, word); p; p = strstr(p + 1, word)) {
        bool before = p > hay && isalpha((unsigned char)p[-1]);
        bool after = isalpha((unsigned char)p[n]);
        if (!before && !after)
            return true;
    }
    return false;
}

/* ---- CSV, read back by Python's csv module ---- */

typedef ps_csv_table table;

static void read_back(const char *csv_path, table *t) { ps_test_csv_read(csv_path, t); }

static int column(const table *t, const char *name)
{
    for (size_t c = 0; c < t->n_cols[0]; c++)
        if (strcmp(t->cell[0][c], name) == 0)
            return (int)c;
    cr_assert_fail("no column '%s' in the header", name);
    return -1;
}

static const char *cell(const table *t, size_t row, const char *name) { return t->cell[row][column(t, name)]; }

static void assert_near(const char *text, double want, double rel)
{
    char *end;
    double got = strtod(text, &end);
    cr_assert(end != text && *end == '\0', "'%s' is not a number", text);
    cr_assert(fabs(got - want) <= rel * fabs(want), "got %s, want %.9g", text, want);
}

/* Formula injection (common practice: a spreadsheet runs a cell that begins
 * with =, +, -, @, a tab or a CR as a formula; an apostrophe in front makes it
 * text). Text cells get the apostrophe, numbers never do. */
Test(reports, csv_text_cells_guarded_against_formulas_numbers_not)
{
    static const char *const ids[] = {"=HYPERLINK(\"http://x.example\",\"2.385\")", "+7.13+cmd|' /C calc'!A0",
                                      "-4.91+A1", "@SUM(A1:A9)", "\tlead-tab", "plain-6.02"};
    enum { N_IDS = sizeof ids / sizeof ids[0] };
    static ps_run r;
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "=cmd.yaml", NULL), PS_OK);
    for (size_t i = 0; i < N_IDS; i++) {
        ps_summary *s = add_screened(&r, ids[i], PS_VERDICT_MARGINAL, 0.8 + 0.0173 * (double)i, 1.83, 1.21, 11 + i);
        s->fl.bode_area = -1.5 - 0.25 * (double)i; /* a negative number must stay a number */
        snprintf(s->cause, sizeof s->cause, "-%zu dB of margin lost", i + 3);
        ps_run_commit(&r);
    }
    r.counts = (ps_batch_counts){.entries = N_IDS, .models = N_IDS};
    ps_run_rank(&r);
    char *doc = render(ps_write_csv, &r, NULL);
    const char *path = ps_test_write_temp(".csv", doc);
    cr_assert_not_null(path);
    char csv_path[256];
    snprintf(csv_path, sizeof csv_path, "%s", path);
    static table t;
    read_back(csv_path, &t);
    unlink(csv_path);
    cr_assert_eq(t.n_rows, N_IDS + 1);
    size_t seen = 0;
    for (size_t row = 1; row < t.n_rows; row++) {
        const char *got = cell(&t, row, "id");
        size_t i = 0;
        while (i < N_IDS && strcmp(got + (got[0] == '\''), ids[i]) != 0)
            i++;
        cr_assert_lt(i, N_IDS, "row %zu: id '%s' is none of the plants", row, got);
        seen |= (size_t)1 << i;
        bool risky = strchr("=+-@\t", ids[i][0]) != NULL;
        if (risky) {
            cr_assert_eq(got[0], '\'', "row %zu: id '%s' is not guarded", row, got);
            cr_assert_str_eq(got + 1, ids[i]);
        } else {
            cr_assert_str_eq(got, ids[i], "a safe id is written as it is");
        }
        char want_cause[64];
        snprintf(want_cause, sizeof want_cause, "'-%zu dB of margin lost", i + 3);
        cr_assert_str_eq(cell(&t, row, "cause"), want_cause);
        cr_assert_str_eq(cell(&t, row, "file"), "'=cmd.yaml");
        /* Numbers: no apostrophe, and negative ones parse back exactly. */
        assert_near(cell(&t, row, "bode_area"), -1.5 - 0.25 * (double)i, 1e-12);
        assert_near(cell(&t, row, "severity"), 0.8 + 0.0173 * (double)i, 1e-8);
    }
    cr_assert_eq(seen, ((size_t)1 << N_IDS) - 1, "every plant has its row");
    cr_assert(ps_csv_text_guarded("-x") && !ps_csv_text_guarded("x-") && !ps_csv_text_guarded(""));
    free(doc);
    ps_run_free(&r);
}

Test(reports, csv_read_back_by_a_csv_reader)
{
    static ps_run r;
    build_run(&r);
    check_rank_order(&r);
    size_t len;
    char *doc = render(ps_write_csv, &r, &len);

    /* Record ends are CRLF: outside quotes no LF stands alone and no CR is bare. */
    bool quoted = false;
    size_t crlf = 0;
    for (size_t i = 0; i < len; i++) {
        if (doc[i] == '"')
            quoted = !quoted;
        else if (!quoted && doc[i] == '\n') {
            cr_assert(i > 0 && doc[i - 1] == '\r', "bare LF at byte %zu", i);
            crlf++;
        } else if (!quoted && doc[i] == '\r')
            cr_assert(i + 1 < len && doc[i + 1] == '\n', "bare CR at byte %zu", i);
    }
    cr_assert_not(quoted, "unbalanced quotes");
    cr_assert_eq(crlf, N_PLANTS + 1);
    cr_assert(len >= 2 && doc[len - 2] == '\r' && doc[len - 1] == '\n');

    const char *path = ps_test_write_temp(".csv", doc);
    cr_assert_not_null(path);
    char csv_path[256];
    snprintf(csv_path, sizeof csv_path, "%s", path);
    static table t;
    read_back(csv_path, &t);
    unlink(csv_path);

    cr_assert_eq(t.n_rows, N_PLANTS + 1, "header + one row per plant");
    for (size_t i = 1; i < t.n_rows; i++)
        cr_assert_eq(t.n_cols[i], t.n_cols[0], "row %zu has %zu cells, header %zu", i, t.n_cols[i], t.n_cols[0]);
    static const char *const required[] = {
        "rank", "id", "verdict", "severity", "worst", "cause", "file", "line", "ms_floor", "mt_floor",
        "ms_allowed", "mt_allowed", "effort_floor", "effort_allowed", "bode_area", "ms_interpolation",
        "mt_interpolation", "ms_band", "ms_poisson", "mt_poisson", "limiting", "crossover_min", "crossover_max",
        "window_open", "error"};
    for (size_t i = 0; i < sizeof required / sizeof required[0]; i++)
        column(&t, required[i]);
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        static const char *const parts[] = {"state", "now", "limit"};
        for (size_t j = 0; j < 3; j++) {
            char name[64];
            snprintf(name, sizeof name, "%s_%s", ps_target_key((ps_target_kind)k), parts[j]);
            column(&t, name);
        }
    }
    /* Column names are unique snake_case. */
    for (size_t c = 0; c < t.n_cols[0]; c++) {
        cr_assert_eq(strspn(t.cell[0][c], "abcdefghijklmnopqrstuvwxyz0123456789_"), strlen(t.cell[0][c]),
                     "column '%s'", t.cell[0][c]);
        for (size_t d = c + 1; d < t.n_cols[0]; d++)
            cr_assert_str_neq(t.cell[0][c], t.cell[0][d]);
    }

    for (size_t i = 0; i < N_PLANTS; i++) {
        char want[16];
        snprintf(want, sizeof want, "%zu", i + 1);
        cr_assert_str_eq(cell(&t, i + 1, "rank"), want);
        cr_assert_str_eq(cell(&t, i + 1, "id"), ranked_ids[i]);
        cr_assert_str_eq(cell(&t, i + 1, "verdict"), ps_verdict_name(r.rows[i].verdict));
    }
    /* Row 1: not stabilizable, the tricky id and cause round-trip exactly; infinite floors are empty. */
    cr_assert_str_eq(cell(&t, 1, "cause"), tricky_cause);
    cr_assert_str_eq(cell(&t, 1, "file"), "two.csv");
    cr_assert_str_eq(cell(&t, 2, "file"), "catalogs/cat,one.yaml");
    cr_assert_str_eq(cell(&t, 1, "verdict"), "not-stabilizable");
    cr_assert_str_eq(cell(&t, 1, "severity"), "");
    cr_assert_str_eq(cell(&t, 1, "severity_infinite"), "true");
    cr_assert_str_eq(cell(&t, 1, "ms_floor"), "");
    cr_assert_str_eq(cell(&t, 1, "mt_floor"), "");
    assert_near(cell(&t, 1, "bode_area"), 13.41, 1e-9);
    cr_assert_str_eq(cell(&t, 1, "line"), "9");
    cr_assert_str_eq(cell(&t, 1, "error"), "");
    /* Row 2: redesign, numbers with 9 significant digits, targets. */
    assert_near(cell(&t, 2, "severity"), 1.734, 1e-9);
    assert_near(cell(&t, 2, "ms_floor"), 3.31, 1e-9);
    assert_near(cell(&t, 2, "mt_floor"), 1.47, 1e-9);
    assert_near(cell(&t, 2, "ms_allowed"), 2.0, 0);
    assert_near(cell(&t, 2, "effort_floor"), 2.718, 1e-9);
    cr_assert_str_eq(cell(&t, 2, "effort_allowed"), "");
    cr_assert_str_eq(cell(&t, 2, "ms_band"), "");
    cr_assert_str_eq(cell(&t, 2, "crossover_max"), "");
    assert_near(cell(&t, 2, "crossover_min"), 8.54, 1e-9);
    cr_assert_str_eq(cell(&t, 2, "window_open"), "true");
    cr_assert_str_eq(cell(&t, 2, "limiting"), "interpolation");
    cr_assert_str_eq(cell(&t, 2, "unstable_pole_state"), "found");
    assert_near(cell(&t, 2, "unstable_pole_now"), 62.64, 1e-9);
    assert_near(cell(&t, 2, "unstable_pole_limit"), 41.87, 1e-9);
    cr_assert_str_eq(cell(&t, 2, "delay_state"), "unbounded");
    cr_assert_str_eq(cell(&t, 2, "delay_limit"), "");
    cr_assert_str_eq(cell(&t, 2, "rhp_zero_state"), "not-applicable");
    cr_assert_str_eq(cell(&t, 2, "rhp_zero_now"), "");
    cr_assert_str_eq(cell(&t, 2, "band_edge_now"), "");
    assert_near(cell(&t, 2, "band_edge_limit"), 3.77, 1e-9);
    /* Row 4: clear, a false boolean, the band requirement. */
    cr_assert_str_eq(cell(&t, 4, "window_open"), "false");
    assert_near(cell(&t, 4, "band_edge"), 2.5, 0);
    /* Row 5: the input error: empty numbers, the error text, its own catalog. */
    cr_assert_str_eq(cell(&t, 5, "file"), "two.csv");
    cr_assert_str_eq(cell(&t, 5, "error"), error_text);
    cr_assert_str_eq(cell(&t, 5, "error_line"), "4");
    cr_assert_str_eq(cell(&t, 5, "error_column"), "17");
    cr_assert_str_eq(cell(&t, 5, "error_field"), "denominator");
    static const char *const empty_for_errors[] = {"severity", "severity_infinite", "worst", "ms_floor", "mt_floor",
                                                   "ms_allowed", "bode_area", "limiting", "window_open",
                                                   "unstable_pole_state", "band_edge_limit"};
    for (size_t i = 0; i < sizeof empty_for_errors / sizeof empty_for_errors[0]; i++)
        cr_assert_str_eq(cell(&t, 5, empty_for_errors[i]), "", "%s", empty_for_errors[i]);
    free(doc);
    ps_run_free(&r);
}

/* ---- Markdown ---- */

/* Unescaped pipes on one line (a backslash-escaped pipe is cell text). */
static size_t pipes(const char *line, size_t n)
{
    size_t k = 0;
    for (size_t i = 0; i < n; i++)
        if (line[i] == '|' && (i == 0 || line[i - 1] != '\\'))
            k++;
    return k;
}

Test(reports, markdown_one_table_row_per_plant)
{
    static ps_run r;
    build_run(&r);
    char *doc = render(ps_write_markdown, &r, NULL);
    const char *sec = strstr(doc, "## Ranking\n");
    cr_assert_not_null(sec);
    const char *p = strstr(sec, "\n|");
    cr_assert_not_null(p);
    p++;
    size_t lines = 0, header_pipes = 0;
    while (*p == '|') {
        const char *eol = strchr(p, '\n');
        cr_assert_not_null(eol);
        size_t n = (size_t)(eol - p);
        if (lines == 0)
            header_pipes = pipes(p, n);
        else
            cr_assert_eq(pipes(p, n), header_pipes, "table line %zu: %.*s", lines, (int)n, p);
        if (lines >= 2) {
            char want[32];
            snprintf(want, sizeof want, "| %zu | ", lines - 1);
            cr_assert(strncmp(p, want, strlen(want)) == 0, "row %zu: %.*s", lines - 1, (int)n, p);
        }
        lines++;
        p = eol + 1;
    }
    cr_assert_eq(lines, 2 + N_PLANTS, "header, delimiter and one row per plant");
    cr_assert_eq(header_pipes, 11);
    /* The tricky text stays on its row and cannot open HTML. */
    cr_assert_null(strstr(doc, "&<b>"));
    cr_assert_not_null(strstr(doc, "strider-&\\<b>'x\""));
    cr_assert_not_null(strstr(doc, "\\|S\\| cannot be shaped"));
    /* First page: what must change lists both flagged plants with their
     * found targets, not the others; then the caution once, before the
     * distribution. */
    const char *chg = strstr(doc, "## What must change");
    const char *dist = strstr(doc, "## Severity of all");
    const char *det = strstr(doc, "## Plants in detail");
    cr_assert(chg && dist && det && chg < dist && dist < det);
    char text[400];
    ps_target_text(&r.rows[1], PS_TARGET_POLE, text, sizeof text);
    cr_assert(text[0] && strstr(chg, text) && strstr(chg, text) < dist, "pole target missing: %s", text);
    cr_assert(strstr(chg, "- **strider-") && strstr(chg, "- **strider-") < dist);
    cr_assert(strstr(chg, "- **glide-g5** (") && strstr(chg, "- **glide-g5** (") < dist);
    const char *clear_in_list = strstr(chg, "pallas-1");
    cr_assert(clear_in_list == NULL || clear_in_list > dist, "a clear plant is in the redesign list");
    /* In detail: every target sentence of a flagged plant, the requirements
     * of each plant shown. */
    cr_assert(strstr(det, "### 1. strider-") && strstr(det, "### 2. glide-g5"));
    ps_target_text(&r.rows[1], PS_TARGET_BAND, text, sizeof text);
    cr_assert(text[0] && strstr(det, text), "band target missing: %s", text);
    cr_assert_not_null(strstr(det, "pallas-1"));
    cr_assert_not_null(strstr(doc, "`two.csv`: **not read to the end** (line 6, column 1"));
    cr_assert_not_null(strstr(doc, "`catalogs/cat,one.yaml`: read to the end"));
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        cr_assert_not_null(strstr(doc, ps_verdict_meaning((ps_verdict)v)), "%d", v);
    cr_assert(strpbrk(ps_caution_text, "\\`*_[]<&|") == NULL, "caution needs escaping in this test");
    /* The caution once, its own "Caution:" not doubled by a heading. */
    const char *caution = strstr(doc, ps_caution_text + strlen("Caution:"));
    cr_assert(caution && caution < dist, "caution on the first page");
    size_t n_caution = 0;
    for (const char *c = strstr(doc, "Caution"); c; c = strstr(c + 1, "Caution"))
        n_caution++;
    cr_assert_eq(n_caution, 1, "the word Caution %zu times", n_caution);
    cr_assert_not_null(strstr(doc, "**Caution:** these floors"));
    cr_assert_not_null(strstr(doc, PS_VERSION));
    free(doc);
    ps_run_free(&r);
}

/* ---- HTML ---- */

Test(reports, html_escapes_and_has_one_plant_row_per_plant)
{
    static ps_run r;
    build_run(&r);
    size_t len, len2;
    char *doc = render(ps_write_html, &r, &len);
    char *again = render(ps_write_html, &r, &len2);
    cr_assert(len == len2 && memcmp(doc, again, len) == 0, "output is not deterministic");
    free(again);
    cr_assert(strncmp(doc, "<!DOCTYPE html>", 15) == 0);
    cr_assert_eq(count_of(doc, "<tr class=\"plant-row\""), N_PLANTS);
    cr_assert_eq(count_of(doc, "class=\"plant-row\""), N_PLANTS);
    cr_assert_not_null(strstr(doc, "<tr class=\"plant-row\" id=\"r1\" data-id=\"strider-&amp;&lt;b&gt;&#39;x&quot;\""));
    cr_assert_null(strstr(doc, "&<b>"));
    cr_assert_null(strstr(doc, "<b>'x"));
    cr_assert_not_null(strstr(doc, "cancelled by the &quot;zero&quot; at 4.27"));
    cr_assert_not_null(strstr(doc, "expected a number, got &quot;7,3.x&quot;"));
    cr_assert(strpbrk(ps_caution_text, "&<>\"'") == NULL, "caution needs escaping in this test");
    cr_assert_not_null(strstr(doc, ps_caution_text + strlen("Caution: ")));
    cr_assert_not_null(strstr(doc, "<strong>Caution:</strong>"));
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        cr_assert_not_null(strstr(doc, ps_verdict_meaning((ps_verdict)v)), "%d", v);
    /* Self-contained: no script, no external resources. */
    cr_assert_null(strstr(doc, "<script"));
    cr_assert_null(strstr(doc, "<link"));
    cr_assert_null(strstr(doc, "src="));
    cr_assert_null(strstr(doc, "https:"));
    cr_assert_eq(count_of(doc, "http:"), count_of(doc, "xmlns=\"http://www.w3.org/2000/svg\""));
    /* Figures: severity bars, a map in the section of each of the four
     * screened plants, a band figure for each of the two plants with a curve,
     * a log-area budget for the one of those that is marginal or redesign. */
    cr_assert_eq(count_of(doc, "<svg "), 1 + 4 + 2 + 1);
    cr_assert_eq(count_of(doc, "</svg>"), 1 + 4 + 2 + 1);
    cr_assert_eq(count_of(doc, "<figure class=\"budget\""), 1);
    cr_assert_eq(count_of(doc, "<article class=\"plant flagged\""), 2);
    cr_assert_eq(count_of(doc, "<article class=\"plant"), N_PLANTS);
    cr_assert_not_null(strstr(doc, "not stabilizable (off-scale)"));
    cr_assert_not_null(strstr(doc, "input error, no bar: bad-row"));
    cr_assert_not_null(strstr(doc, "Symmetric-log axes"));
    cr_assert_not_null(strstr(doc, "widest band edge 8.3 rad/s"));
    cr_assert_not_null(strstr(doc, "widest band edge 3.77 rad/s"));
    /* printf's words for non-finite numbers never reach the page. */
    cr_assert_not(has_word(doc, "nan"));
    cr_assert_not(has_word(doc, "inf"));
    /* Every target sentence of the redesign plant, escaped. */
    char text[400];
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        ps_target_text(&r.rows[1], (ps_target_kind)k, text, sizeof text);
        if (text[0] && strpbrk(text, "&<>\"'") == NULL)
            cr_assert_not_null(strstr(doc, text), "%s", text);
    }
    free(doc);
    ps_run_free(&r);
}

/* The SVG figures are well-formed XML (checked by Python's XML parser). */
Test(reports, html_figures_are_well_formed_svg)
{
    static ps_run r;
    build_run(&r);
    char *doc = render(ps_write_html, &r, NULL);
    char path[256];
    snprintf(path, sizeof path, "%s", ps_test_write_temp(".html", doc));
    static const char script[] =
        "import re, sys, xml.etree.ElementTree as ET\n"
        "doc = open(sys.argv[1], encoding='utf-8').read()\n"
        "svgs = re.findall(r'<svg .*?</svg>', doc, re.S)\n"
        "assert len(svgs) == 8, len(svgs)\n"
        "for s in svgs:\n"
        "    s = s.replace('&plusmn;', '+-').replace('&le;', '<=')\n"
        "    root = ET.fromstring(s)\n"
        "    assert root.find('{http://www.w3.org/2000/svg}title') is not None\n"
        "    assert len(root.findall('.//{http://www.w3.org/2000/svg}text')) >= 5\n"
        "print('ok')\n";
    char spath[256], cmd[1024];
    snprintf(spath, sizeof spath, "%s", ps_test_write_temp(".py", script));
    snprintf(cmd, sizeof cmd, "'%s' '%s' '%s' 2>&1", PS_ORACLE_PYTHON, spath, path);
    FILE *p = popen(cmd, "r");
    cr_assert_not_null(p);
    char out[2048] = "";
    size_t n = fread(out, 1, sizeof out - 1, p);
    out[n] = '\0';
    cr_assert_eq(pclose(p), 0, "%s", out);
    cr_assert_str_eq(out, "ok\n");
    unlink(spath);
    unlink(path);
    free(doc);
    ps_run_free(&r);
}

static char *slurp(const char *path)
{
    FILE *f = fopen(path, "rb");
    cr_assert_not_null(f, "%s", path);
    static char buf[1 << 16];
    size_t n = fread(buf, 1, sizeof buf - 1, f);
    buf[n] = '\0';
    fclose(f);
    return buf;
}

/* The three documents of the hand-built run written as report files through
 * ps_write_atomic, each non-empty and starting as its format does. With
 * PS_REPORTS_SAMPLE_DIR set they are written there and kept (to look at them
 * or to try tests/e2e/html_chromium.sh --report on them); otherwise into a
 * temporary directory that is removed. */
Test(reports, documents_as_report_files)
{
    static ps_run r;
    build_run(&r);
    const char *keep = getenv("PS_REPORTS_SAMPLE_DIR");
    char tmp[] = "psrepXXXXXX" /* made in the working directory (ctest: the build tree) */;
    const char *dir = keep && keep[0] ? keep : mkdtemp(tmp);
    cr_assert_not_null(dir);
    static const char *const names[] = {"sample.screen.csv", "sample.screen.md", "sample.screen.html"};
    static const char *const starts[] = {"rank,id,verdict,", "# ", "<!DOCTYPE html>"};
    ps_writer_fn fns[] = {ps_write_csv, ps_write_markdown, ps_write_html};
    for (size_t i = 0; i < 3; i++) {
        ps_diag d = {0};
        cr_assert_eq(ps_write_atomic(dir, names[i], fns[i], &r, &d), PS_OK, "%s", d.text);
        char path[512];
        snprintf(path, sizeof path, "%s/%s", dir, names[i]);
        const char *text = slurp(path);
        cr_assert(strncmp(text, starts[i], strlen(starts[i])) == 0, "%s starts '%.20s'", names[i], text);
        if (!(keep && keep[0]))
            cr_assert_eq(unlink(path), 0);
    }
    if (!(keep && keep[0]))
        cr_assert_eq(rmdir(dir), 0);
    ps_run_free(&r);
}

/* ---- write errors ---- */

Test(reports, writers_report_write_errors)
{
    static ps_run r;
    build_run(&r);
    ps_writer_fn fns[] = {ps_write_csv, ps_write_markdown, ps_write_html};
    for (size_t i = 0; i < 3; i++) {
        FILE *f = fopen("/dev/null", "r"); /* every write fails and sets the error flag */
        cr_assert_not_null(f);
        cr_assert_eq(fns[i](f, &r), PS_ERR_IO, "writer %zu", i);
        fclose(f);
    }
    ps_run_free(&r);
}

/* ---- ps_write_atomic ---- */

static size_t dir_entries(const char *dir, char *only, size_t n)
{
    DIR *d = opendir(dir);
    cr_assert_not_null(d);
    size_t k = 0;
    for (struct dirent *e = readdir(d); e; e = readdir(d)) {
        if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
            continue;
        if (k++ == 0)
            snprintf(only, n, "%s", e->d_name);
    }
    closedir(d);
    return k;
}

static ps_status half_then_fail(FILE *f, const ps_run *r)
{
    (void)r;
    fputs("rank,id\r\n1,half", f);
    return PS_ERR_IO;
}

Test(reports, atomic_write_replaces_whole_or_not_at_all)
{
    static ps_run r;
    build_run(&r);
    char dir[] = "psrepXXXXXX" /* made in the working directory (ctest: the build tree) */;
    cr_assert_not_null(mkdtemp(dir));
    char path[256], name[256];
    snprintf(path, sizeof path, "%s/run.screen.csv", dir);
    ps_diag d = {0};

    /* Success: exactly the final file, holding the complete report. */
    cr_assert_eq(ps_write_atomic(dir, "run.screen.csv", ps_write_csv, &r, &d), PS_OK, "%s", d.text);
    cr_assert_eq(dir_entries(dir, name, sizeof name), 1);
    cr_assert_str_eq(name, "run.screen.csv");
    char *want = render(ps_write_csv, &r, NULL);
    cr_assert_str_eq(slurp(path), want);
    free(want);

    /* Failure: the old file untouched, no temporary left. */
    FILE *f = fopen(path, "w");
    cr_assert_not_null(f);
    fputs("old report\n", f);
    fclose(f);
    ps_diag_clear(&d);
    cr_assert_eq(ps_write_atomic(dir, "run.screen.csv", half_then_fail, &r, &d), PS_ERR_IO);
    cr_assert(d.text[0] != '\0', "no reason given");
    cr_assert_eq(dir_entries(dir, name, sizeof name), 1, "a temporary was left behind");
    cr_assert_str_eq(name, "run.screen.csv");
    cr_assert_str_eq(slurp(path), "old report\n");

    /* Failure with no old file: nothing at all is left. */
    cr_assert_eq(unlink(path), 0);
    cr_assert_eq(ps_write_atomic(dir, "run.screen.csv", half_then_fail, &r, &d), PS_ERR_IO);
    cr_assert_eq(dir_entries(dir, name, sizeof name), 0, "left: %s", name);
    cr_assert_eq(rmdir(dir), 0);
    ps_run_free(&r);
}

/* ---- catalog text in the text report ---- */

/* A note or title with control characters reaches a terminal or the .txt
 * report only as visible escapes: C0 (tab, line feed, carriage return as
 * \t \n \r, others \xHH), DEL, and the C1 controls that UTF-8 writes as
 * C2 80..9F (ECMA-48 reads them as commands) as \u00HH; other UTF-8 text
 * (the verdict marks, accents) passes unchanged. */
Test(reports, visible_text_escapes_control_characters)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    ps_put_visible(f, "a\tb\nc\rd\x01" "e\x7f" "f\xc2\x9b" "31m\xc3\xa9\xe2\x97\x8f");
    ps_put_visible(f, NULL);
    fclose(f);
    cr_assert_str_eq(buf, "a\\tb\\nc\\rd\\x01e\\x7ff\\u009b31m\xc3\xa9\xe2\x97\x8f");
    free(buf);
}

/* The JSON Lines record's number shapes (plantsieve-screening-plant.schema.json):
 * a value that is whole at 9 significant digits without a fraction, a real
 * root as its number and a complex one as [re, im]; other values unchanged. */
Test(reports, jsonl_numbers_whole_and_roots_compact)
{
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run r;
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "c.yaml", NULL), PS_OK);
    ps_summary *s = add_screened(&r, "shapes", PS_VERDICT_CLEAR, 0.25, 1.0, 0.99999999999, 3);
    s->fl.effort = 2.5;
    s->fl.bode_area = 1.0000001; /* 8 digits: not whole */
    s->fl.crossover_min = -0.0;  /* a negative zero keeps its sign */
    s->fl.parity_interlacing = true;
    ps_run_commit(&r);
    r.counts = (ps_batch_counts){.entries = 1, .models = 1};
    ps_run_rank(&r);
    char *text = render(ps_write_plants_jsonl, &r, NULL);
    cr_expect(strstr(text, "\"ms\":1,") != NULL, "unit floor written as 1: %s", text);
    cr_expect(strstr(text, "\"mt\":1,") != NULL, "0.99999999999 is 1 at 9 digits: %s", text);
    cr_expect(strstr(text, "\"effort\":2.5,") != NULL, "%s", text);
    cr_expect(strstr(text, "\"bode_area\":1.0000001,") != NULL, "%s", text);
    cr_expect(strstr(text, "\"crossover_min\":-0.0") != NULL, "%s", text);
    cr_expect(strstr(text, "\"poles\":[62.64,-62.64,[-0.0413,2.9]]") != NULL, "%s", text);
    cr_expect(strstr(text, "\"zeros\":[1730]") != NULL, "%s", text);
    cr_expect(strstr(text, "\"line\":3,") != NULL, "%s", text);
    /* false and null members left out at the top too, except the fixed seven */
    cr_expect(strstr(text, "unstable_controller_required") == NULL, "%s", text);
    cr_expect(strstr(text, "\"sampling\"") == NULL, "%s", text);
    cr_expect(strstr(text, "severity_infinite") == NULL, "%s", text);
    cr_expect(strstr(text, "\"note\":null") != NULL, "%s", text);
    free(text);
    ps_run_free(&r);
}

/* The record's strings and numbers read back by a JSON parser (jansson's):
 * control characters, quotes and backslashes escaped, text that is not
 * valid UTF-8 written as null (or left out), every number as written. */
Test(reports, jsonl_strings_and_numbers_parse_back)
{
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run r;
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "dir/\"odd\"\\cat.yaml", NULL), PS_OK);
    ps_summary *s = add_screened(&r, "ctl\x01\x1f\t\"q\"\\b\x7f-\xc3\xa9", PS_VERDICT_REDESIGN, 1.5, 3.0, 1.2, 7);
    snprintf(s->note, sizeof s->note, "bad \xc3\x28 byte");          /* not UTF-8: null */
    snprintf(s->cause, sizeof s->cause, "overlong \xc0\xaf slash"); /* not UTF-8: left out */
    s->fl.effort = 1.23456789012e-7;
    s->fl.bode_area = 6.02214076e23;
    s->gain = -0.0;
    ps_run_commit(&r);
    r.counts = (ps_batch_counts){.entries = 1, .models = 1};
    ps_run_rank(&r);
    char *text = render(ps_write_plants_jsonl, &r, NULL);
    cr_assert(strchr(text, '\n') == text + strlen(text) - 1, "one line: %s", text);
    json_error_t err;
    json_t *j = json_loads(text, 0, &err);
    cr_assert_not_null(j, "parse: %s at %d: %s", err.text, err.position, text);
    cr_expect_str_eq(json_string_value(json_object_get(j, "id")), "ctl\x01\x1f\t\"q\"\\b\x7f-\xc3\xa9");
    cr_expect_str_eq(json_string_value(json_object_get(j, "file")), "dir/\"odd\"\\cat.yaml");
    cr_expect(json_is_null(json_object_get(j, "note")), "%s", text);
    cr_expect_null(json_object_get(j, "cause"), "%s", text);
    cr_expect(strstr(text, "\\u0001\\u001F\\t\\\"q\\\"\\\\b\x7f") != NULL, "escapes: %s", text);
    json_t *fl = json_object_get(j, "floors");
    cr_expect_eq(json_number_value(json_object_get(fl, "effort")), 1.23456789e-7, "%s", text);
    cr_expect(strstr(text, "\"effort\":1.23456789e-7") != NULL, "exponent without '+' or leading zeros: %s", text);
    cr_expect(strstr(text, "\"bode_area\":6.02214076e23") != NULL, "%s", text);
    cr_expect(strstr(text, "\"gain\":-0.0") != NULL, "%s", text);
    cr_expect_eq(json_real_value(json_object_get(j, "severity")), 1.5);
    json_decref(j);
    free(text);
    ps_run_free(&r);
}

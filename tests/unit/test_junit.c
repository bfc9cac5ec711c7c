/* test_junit.c - the JUnit XML report (src/report/junit_report.c) read back
 * by Python's xml.etree (tests/oracle/junit_oracle.py): counts, names and
 * verdicts against the screen's own JSON on real catalogs, and hostile
 * strings on a hand-built run. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "report/reports.h"
#include "screen/screen.h"
#include "support.h"

TestSuite(junit, .init = ps_test_init);

static int oracle(const char *xml, const char *json_or_flag)
{
    char cmd[2048];
    snprintf(cmd, sizeof cmd, "%s %s/tests/oracle/junit_oracle.py '%s' '%s'", PS_ORACLE_PYTHON, PS_SOURCE_DIR, xml,
             json_or_flag);
    return system(cmd);
}

/* Screen the catalogs into a fresh directory with the real program; the
 * report set of the first catalog (stem) is checked against its JSON. */
static void screen_and_check(const char *stem, const char *catalogs)
{
    if (!PS_ORACLE_PYTHON[0])
        cr_skip_test("no Debian python3");
    char dir[256];
    ps_test_temp_name(dir, sizeof dir, "ps_junit_");
    cr_assert_not_null(mkdtemp(dir));
    char cmd[2048], xml[512], json[512];
    snprintf(cmd, sizeof cmd, "cd %s && %s screen --gate never --quiet --memory-rows 4 -o %s %s >/dev/null 2>&1",
             PS_SOURCE_DIR, PS_CLI_PATH, dir, catalogs);
    int rc = system(cmd);
    cr_assert(rc != -1 && WEXITSTATUS(rc) <= 4, "screen failed (%d)", rc);
    snprintf(xml, sizeof xml, "%s/%s.screen/%s.screen.junit.xml", dir, stem, stem);
    snprintf(json, sizeof json, "%s/%s.screen/%s.screen.json", dir, stem, stem);
    rc = oracle(xml, json);
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_expect_eq(system(cmd), 0);
    cr_expect_eq(rc, 0, "the JUnit report disagrees with the screen's own counts (see above)");
}

/* The demo: passing, marginal, redesign and not-stabilizable plants; more
 * plants than --memory-rows, so the rows are read back from the run's file. */
Test(junit, demo_counts_match_the_screen)
{
    screen_and_check("demo-variants", "catalogs/demo-variants.yaml");
}

/* Input errors (one without an id) and a catalog cut short by a syntax error. */
Test(junit, input_errors_and_unread_catalog_counted_as_errors)
{
    screen_and_check("broken-entries", "catalogs/broken/broken-entries.yaml tests/data/e2e/cut-structure.yaml "
                                       "catalogs/demo-variants.csv");
}

static ps_summary *add_row(ps_run *r, const char *id, ps_verdict v, double severity, const char *cause, size_t line)
{
    ps_summary *s = ps_run_next(r);
    cr_assert_not_null(s);
    size_t order = s->order, file_index = s->file_index;
    memset(s, 0, sizeof *s);
    s->order = order;
    s->file_index = file_index;
    snprintf(s->id, sizeof s->id, "%s", id);
    snprintf(s->cause, sizeof s->cause, "%s", cause);
    s->verdict = v;
    s->severity = severity;
    s->line = line;
    s->worst = "Ms";
    return s;
}

/* Markup characters in ids, catalog names, causes and messages; a control
 * character, a byte that is not UTF-8 and a cut UTF-8 sequence in a cause
 * (XML 1.0 allows none of them: each becomes U+FFFD); CR, LF and tab kept. */
Test(junit, hostile_strings_escaped)
{
    if (!PS_ORACLE_PYTHON[0])
        cr_skip_test("no Debian python3");
    static ps_run r;
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "cat&<1>'\".yaml", NULL), PS_OK);
    add_row(&r, "cause-\u00fc\u6f22\U0001d11e&<b>'x\"", PS_VERDICT_UNSTABILIZABLE, INFINITY,
            "pole \"x\" & <y> 'z' ]]> a\x01" "b\xff" "c\r\nline2\tend\xe6\xbc", 12);
    ps_run_commit(&r);
    add_row(&r, "plain-\u00e9", PS_VERDICT_CLEAR, 0.2385, "all floors inside", 20);
    ps_run_commit(&r);
    ps_summary *s = add_row(&r, "", PS_VERDICT_UNREAD, NAN, "", 30);
    s->err_line = 31;
    s->err_col = 7;
    snprintf(s->err_field, sizeof s->err_field, "gain");
    snprintf(s->err_text, sizeof s->err_text, "expected a number <1e3 & >0");
    ps_run_commit(&r);
    ps_run_rank(&r);

    char path[256];
    ps_test_temp_name(path, sizeof path, "ps_junit_");
    int fd = mkstemp(path);
    cr_assert_geq(fd, 0);
    FILE *f = fdopen(fd, "w");
    cr_assert_eq(ps_write_junit(f, &r), PS_OK);
    cr_assert_eq(fclose(f), 0);
    int rc = oracle(path, "--hostile");
    unlink(path);
    ps_run_free(&r);
    cr_expect_eq(rc, 0, "the hostile run's XML did not read back as written (see above)");
}

/* A write error is reported, not ignored. */
Test(junit, write_error_reported)
{
    static ps_run r;
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "c.yaml", NULL), PS_OK);
    add_row(&r, "x", PS_VERDICT_CLEAR, 0.5, "", 1);
    ps_run_commit(&r);
    ps_run_rank(&r);
    FILE *f = fopen("/dev/full", "w");
    if (!f)
        cr_skip_test("no /dev/full");
    setvbuf(f, NULL, _IONBF, 0);
    cr_expect_eq(ps_write_junit(f, &r), PS_ERR_IO);
    fclose(f);
    ps_run_free(&r);
}

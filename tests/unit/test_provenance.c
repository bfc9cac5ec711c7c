/* test_provenance.c - what the reports say about where a run came from: the
 * date from SOURCE_DATE_EPOCH (reproducible-builds.org specification: a
 * decimal count of seconds since 1970-01-01 UTC), the command line as a POSIX
 * shell would take it back, and the catalog title read from a YAML file. */
#include <criterion/criterion.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "catalog/catalog.h"
#include "screen/screen.h"
#include "support.h"

TestSuite(provenance, .init = ps_test_init);

Test(provenance, date_from_source_date_epoch)
{
    ps_run_meta m = {0};
    const char *why = NULL;
    cr_assert(ps_run_meta_date(&m, "0", &why));
    cr_expect_str_eq(m.date, "1970-01-01T00:00:00Z");
    /* 2024-12-05 00:00:00 UTC: 20062 days after the epoch (date -u -d @1733356800) */
    cr_assert(ps_run_meta_date(&m, "1733356800", &why));
    cr_expect_str_eq(m.date, "2024-12-05T00:00:00Z");
    const char *bad[] = {"", "-5", "+5", " 5", "5s", "1e9", "99999999999999999999", "0x10"};
    for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
        snprintf(m.date, sizeof m.date, "left over");
        cr_expect(!ps_run_meta_date(&m, bad[i], &why), "'%s' accepted as %s", bad[i], m.date);
        cr_expect_str_empty(m.date, "'%s' leaves a date", bad[i]);
    }
    cr_expect(!ps_run_meta_date(&m, NULL, &why));
}

Test(provenance, command_line_quoted_for_a_shell)
{
    ps_screen_opts opt = {0};
    ps_run r;
    ps_run_init(&r, &opt);
    char *argv[] = {"/some/dir/plantsieve", "screen", "-o", "out dir", "--gate=never", "it's.yaml", ""};
    cr_assert_eq(ps_run_set_meta(&r, 7, argv), PS_OK);
    cr_expect_str_eq(r.meta.command_line, "plantsieve screen -o 'out dir' --gate=never 'it'\\''s.yaml' ''");
    /* The quoted line, given to sh, gives back the same arguments. */
    char cmd[600];
    snprintf(cmd, sizeof cmd, "set -- %s; [ \"$#\" = 7 ] && [ \"$4\" = 'out dir' ] && [ \"$6\" = \"it's.yaml\" ] && [ -z \"$7\" ]",
             r.meta.command_line);
    cr_expect_eq(system(cmd), 0, "sh reads back other arguments from: %s", r.meta.command_line);
    ps_run_free(&r);
}

static int count_entry(void *ctx, ps_plant *p, const ps_diag *err)
{
    (void)p;
    (void)err;
    ++*(size_t *)ctx;
    return 0;
}

Test(provenance, catalog_title_read_from_yaml)
{
    ps_plant *scratch = malloc(sizeof *scratch);
    char title[PS_NOTE_MAX];
    size_t n = 0;
    ps_diag d = {0};
    cr_assert_eq(ps_catalog_read_titled(PS_SOURCE_DIR "/catalogs/demo-variants.yaml", scratch, count_entry, NULL, &n,
                                        &d, title, sizeof title), PS_OK, "%s", d.text);
    cr_expect_gt(n, 0);
    cr_expect_str_not_empty(title);
    cr_expect(strstr(title, "\n") == NULL);
    title[0] = 'x';
    cr_assert_eq(ps_catalog_read_titled(PS_SOURCE_DIR "/catalogs/demo-variants.csv", scratch, count_entry, NULL, &n,
                                        &d, title, sizeof title), PS_OK, "%s", d.text);
    cr_expect_str_empty(title, "a CSV catalog has no title");

    char dir[256], path[320];
    ps_test_temp_name(dir, sizeof dir, "ps_title_");
    cr_assert_not_null(mkdtemp(dir));
    snprintf(path, sizeof path, "%s/t.yaml", dir);
    FILE *f = fopen(path, "w");
    cr_assert_not_null(f);
    fputs("catalog: \"bad \\e title\"\nplants:\n  - {id: a, poles: [-1], gain: 1}\n", f);
    fclose(f);
    ps_status st = ps_catalog_read_titled(path, scratch, count_entry, NULL, &n, &d, title, sizeof title);
    unlink(path);
    rmdir(dir);
    cr_expect_neq(st, PS_OK, "a title with a control character is refused");
    cr_expect(strstr(d.text, "catalog title") != NULL, "%s", d.text);
    cr_expect_eq(d.line, 1);
    free(scratch);
}

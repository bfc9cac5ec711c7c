/* test_report_set.c - a report set is published whole or not at all: staging,
 * the one-step swap, the lock, the cleanup a signal handler runs, leftovers. */
#include <criterion/criterion.h>
#include <dirent.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "report/report_set.h"
#include "support.h"

TestSuite(report_set, .init = ps_test_init);

/* The writers under test ignore the run: each writes `text`. */
static const char *text;

static ps_status write_text(FILE *f, const ps_run *r)
{
    (void)r;
    fputs(text, f);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

static ps_status half_then_fail(FILE *f, const ps_run *r)
{
    (void)r;
    fputs("rank,id\r\n1,half", f);
    return PS_ERR_IO;
}

static char *slurp(const char *dir, const char *name)
{
    static char buf[4096];
    char path[1024];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "r");
    if (!f)
        return NULL;
    size_t n = fread(buf, 1, sizeof buf - 1, f);
    buf[n] = '\0';
    fclose(f);
    return buf;
}

static void put(const char *dir, const char *name, const char *content)
{
    char path[1024];
    snprintf(path, sizeof path, "%s/%s", dir, name);
    FILE *f = fopen(path, "w");
    cr_assert_not_null(f, "%s", path);
    fputs(content, f);
    fclose(f);
}

/* The entries of dir, sorted, joined by spaces (hidden ones too). */
static const char *listing(const char *dir)
{
    static char out[2048];
    struct dirent **names;
    int n = scandir(dir, &names, NULL, alphasort);
    cr_assert(n >= 0, "cannot list %s", dir);
    out[0] = '\0';
    for (int i = 0; i < n; i++) {
        if (strcmp(names[i]->d_name, ".") != 0 && strcmp(names[i]->d_name, "..") != 0) {
            if (out[0])
                strncat(out, " ", sizeof out - strlen(out) - 1);
            strncat(out, names[i]->d_name, sizeof out - strlen(out) - 1);
        }
        free(names[i]);
    }
    free(names);
    return out;
}

static char *fresh_dir(void)
{
    static char dir[64];
    snprintf(dir, sizeof dir, "psrsXXXXXX"); /* in the working directory (ctest: the build tree) */
    cr_assert_not_null(mkdtemp(dir));
    return dir;
}

static void remove_all(const char *dir)
{
    char cmd[256];
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_assert_eq(system(cmd), 0);
}

static ps_report_set set; /* large (fixed path buffers): not on the stack */

static void publish_one(const char *dir, const char *stem, const char *const *names, const char *const *texts,
                        size_t n)
{
    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, stem, &d), PS_OK, "%s", d.text);
    for (size_t i = 0; i < n; i++) {
        text = texts[i];
        cr_assert_eq(ps_report_set_write(&set, names[i], write_text, NULL, &d), PS_OK, "%s", d.text);
    }
    cr_assert_eq(ps_report_set_publish(&set, NULL, 0, &d), PS_OK, "%s", d.text);
    cr_assert_str_eq(d.text, "", "warning: %s", d.text);
    ps_report_set_release(&set);
}

Test(report_set, publish_replaces_the_whole_set)
{
    const char *dir = fresh_dir();
    char sub[256];
    snprintf(sub, sizeof sub, "%s/run.screen", dir);
    const char *const names1[] = {"run.screen.csv", "run.screen.families.csv"};
    const char *const texts1[] = {"rank,id\r\n1,strider-a\r\n", "family,study\r\nglide,yield\r\n"};
    publish_one(dir, "run", names1, texts1, 2);
    cr_assert_str_eq(listing(dir), "run.screen");
    cr_assert_str_eq(listing(sub), "run.screen.csv run.screen.families.csv");
    cr_assert_str_eq(slurp(sub, "run.screen.csv"), texts1[0]);

    /* The next set has no families file: none is left from the first. */
    const char *const names2[] = {"run.screen.csv"};
    const char *const texts2[] = {"rank,id\r\n1,strider-b\r\n2,strider-c\r\n"};
    publish_one(dir, "run", names2, texts2, 1);
    cr_assert_str_eq(listing(dir), "run.screen");
    cr_assert_str_eq(listing(sub), "run.screen.csv");
    cr_assert_str_eq(slurp(sub, "run.screen.csv"), texts2[0]);
    remove_all(dir);
}

Test(report_set, a_failed_write_leaves_the_previous_set)
{
    const char *dir = fresh_dir();
    char sub[256];
    snprintf(sub, sizeof sub, "%s/run.screen", dir);
    const char *const names[] = {"run.screen.csv", "run.screen.md"};
    const char *const texts[] = {"rank,id\r\n1,old\r\n", "# old\n"};
    publish_one(dir, "run", names, texts, 2);

    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, "run", &d), PS_OK, "%s", d.text);
    text = "rank,id\r\n1,new\r\n";
    cr_assert_eq(ps_report_set_write(&set, "run.screen.csv", write_text, NULL, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_report_set_write(&set, "run.screen.md", half_then_fail, NULL, &d), PS_ERR_IO);
    cr_assert(strstr(d.text, "run.screen.md") != NULL, "reason: %s", d.text);
    ps_report_set_release(&set);
    cr_assert_str_eq(listing(dir), "run.screen", "left: %s", listing(dir));
    cr_assert_str_eq(listing(sub), "run.screen.csv run.screen.md");
    cr_assert_str_eq(slurp(sub, "run.screen.csv"), texts[0]);
    cr_assert_str_eq(slurp(sub, "run.screen.md"), texts[1]);
    remove_all(dir);
}

/* What the signal handler does: release in the middle of a set. */
Test(report_set, release_mid_set_removes_staging_and_lock)
{
    const char *dir = fresh_dir();
    const char *const names[] = {"run.screen.txt"};
    const char *const texts[] = {"old listing\n"};
    publish_one(dir, "run", names, texts, 1);
    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, "run", &d), PS_OK, "%s", d.text);
    cr_assert_str_eq(listing(dir), ".run.screen.lock run.screen");
    text = "new listing\n";
    cr_assert_eq(ps_report_set_write(&set, "run.screen.txt", write_text, NULL, &d), PS_OK, "%s", d.text);
    cr_assert_eq(strncmp(listing(dir), ".run.screen.lock .run.screen.new-", 33), 0, "%s", listing(dir));
    ps_report_set_release(&set);
    ps_report_set_release(&set); /* twice is harmless */
    cr_assert_str_eq(listing(dir), "run.screen");
    char sub[256];
    snprintf(sub, sizeof sub, "%s/run.screen", dir);
    cr_assert_str_eq(slurp(sub, "run.screen.txt"), texts[0]);
    remove_all(dir);
}

Test(report_set, a_second_open_of_the_same_stem_is_busy)
{
    const char *dir = fresh_dir();
    static ps_report_set other;
    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, "run", &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_report_set_open(&other, dir, "run", &d), PS_ERR_BUSY);
    cr_assert(strstr(d.text, "another plantsieve run is writing the same reports") != NULL, "%s", d.text);
    /* Another stem in the same directory is not held up. */
    cr_assert_eq(ps_report_set_open(&other, dir, "run2", &d), PS_OK, "%s", d.text);
    ps_report_set_release(&other);
    ps_report_set_release(&set);
    cr_assert_str_eq(listing(dir), "", "left: %s", listing(dir));
    cr_assert_eq(ps_report_set_open(&other, dir, "run", &d), PS_OK, "%s", d.text);
    ps_report_set_release(&other);
    remove_all(dir);
}

Test(report_set, leftovers_of_a_killed_run_are_cleared)
{
    const char *dir = fresh_dir();
    char path[256];
    /* A staging directory of a run killed while writing, and one of another stem. */
    snprintf(path, sizeof path, "%s/.run.screen.new-Q7x2Kp", dir);
    cr_assert_eq(mkdir(path, 0777), 0);
    put(path, "run.screen.json", "{\"half");
    snprintf(path, sizeof path, "%s/.run2.screen.new-Q7x2Kp", dir);
    cr_assert_eq(mkdir(path, 0777), 0);
    /* A previous set moved aside by the fallback swap, the new one never renamed in. */
    snprintf(path, sizeof path, "%s/.run.screen.old-ab3Z9w", dir);
    cr_assert_eq(mkdir(path, 0777), 0);
    put(path, "run.screen.csv", "rank,id\r\n1,kept\r\n");
    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, "run", &d), PS_OK, "%s", d.text);
    ps_report_set_release(&set);
    cr_assert_str_eq(listing(dir), ".run2.screen.new-Q7x2Kp run.screen");
    snprintf(path, sizeof path, "%s/run.screen", dir);
    cr_assert_str_eq(slurp(path, "run.screen.csv"), "rank,id\r\n1,kept\r\n");
    remove_all(dir);
}

Test(report_set, files_of_the_flat_layout_are_retired)
{
    const char *dir = fresh_dir();
    put(dir, "run.screen.csv", "flat, from an earlier version\n");
    put(dir, "run.screen.families.csv", "flat, from an earlier version\n");
    put(dir, "notes.txt", "the user's own\n");
    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, "run", &d), PS_OK, "%s", d.text);
    text = "rank,id\r\n";
    cr_assert_eq(ps_report_set_write(&set, "run.screen.csv", write_text, NULL, &d), PS_OK, "%s", d.text);
    const char *const retired[] = {"run.screen.csv", "run.screen.families.csv", "run.screen.html"};
    cr_assert_eq(ps_report_set_publish(&set, retired, 3, &d), PS_OK, "%s", d.text);
    cr_assert_str_eq(d.text, "");
    ps_report_set_release(&set);
    cr_assert_str_eq(listing(dir), "notes.txt run.screen");
    remove_all(dir);
}

Test(report_set, a_file_in_the_way_is_refused)
{
    const char *dir = fresh_dir();
    put(dir, "run.screen", "not a set\n");
    ps_diag d = {0};
    cr_assert_eq(ps_report_set_open(&set, dir, "run", &d), PS_ERR_IO);
    cr_assert(strstr(d.text, "is not a directory") != NULL, "%s", d.text);
    cr_assert_str_eq(listing(dir), "run.screen");
    cr_assert_str_eq(slurp(dir, "run.screen"), "not a set\n");
    remove_all(dir);
}

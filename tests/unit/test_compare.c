/* test_compare.c - the diff of two runs (src/report/compare.c): every pair of
 * verdicts against the definition of worse written out as a table, the
 * severity rule at the tolerance, duplicate ids, rows without id, and the
 * gates. Reports are written as JSON Lines by the test. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#include "report/compare.h"
#include "support.h"

TestSuite(compare, .init = ps_test_init);

static const char *const names[PS_VERDICT_COUNT] = {"clear", "marginal", "redesign", "not-stabilizable",
                                                    "needs-bandwidth", "input-error"};

/* One JSON Lines row. */
static void row(FILE *f, size_t rank, const char *id, int v, double sev)
{
    bool judged_number = v <= PS_VERDICT_REDESIGN;
    fprintf(f, "{\"rank\": %zu, \"id\": %s%s%s, \"verdict\": \"%s\", \"severity\": ", rank, id ? "\"" : "",
            id ? id : "null", id ? "\"" : "", names[v]);
    if (judged_number)
        fprintf(f, "%.17g", sev);
    else
        fputs("null", f);
    fprintf(f, ", \"severity_infinite\": %s, \"file\": \"t.yaml\", \"line\": %zu}\n",
            v == PS_VERDICT_UNSTABILIZABLE ? "true" : "false", 10 * rank);
}

static ps_cmp *read_pair(const char *old_text, const char *new_text)
{
    ps_cmp *c = ps_cmp_new();
    cr_assert_not_null(c);
    ps_diag d = {0};
    char a[256];
    snprintf(a, sizeof a, "%s", ps_test_write_temp(".plants.jsonl", old_text));
    cr_assert_eq(ps_cmp_read(c, PS_CMP_OLD, a, NULL, &d), PS_OK, "%s:%zu: %s", d.file, d.line, d.text);
    unlink(a);
    const char *b = ps_test_write_temp(".plants.jsonl", new_text);
    cr_assert_eq(ps_cmp_read(c, PS_CMP_NEW, b, NULL, &d), PS_OK, "%s:%zu: %s", d.file, d.line, d.text);
    unlink(b);
    return c;
}

/* Every (old, new) verdict pair. The table is the README's definition:
 * W worse, B better, N neither (0 on the diagonal: unchanged). Rows: old
 * verdict, columns: new, in the order clear, marginal, redesign,
 * not-stabilizable, needs-bandwidth, input-error. */
Test(compare, every_verdict_pair_against_the_definition)
{
    static const char want[PS_VERDICT_COUNT][PS_VERDICT_COUNT + 1] = {
        "0WWWWW", /* clear -> */
        "B0WWWW", /* marginal -> */
        "BB0WWW", /* redesign -> */
        "BBB0WW", /* not-stabilizable -> */
        "NNNN0N", /* needs-bandwidth -> (now judged, or still not judged) */
        "NNNNN0", /* input-error -> */
    };
    char *ob = NULL, *nb = NULL;
    size_t on = 0, nn = 0;
    FILE *o = open_memstream(&ob, &on), *n = open_memstream(&nb, &nn);
    cr_assert(o && n);
    size_t rank = 0;
    for (int i = 0; i < PS_VERDICT_COUNT; i++)
        for (int j = 0; j < PS_VERDICT_COUNT; j++) {
            char id[32];
            snprintf(id, sizeof id, "p-%d-%d", i, j);
            rank++;
            row(o, rank, id, i, 0.6173);
            row(n, rank, id, j, 0.6173);
        }
    fclose(o);
    fclose(n);
    ps_cmp *c = read_pair(ob, nb);
    free(ob);
    free(nb);
    cr_assert_eq(ps_cmp_size(c), PS_VERDICT_COUNT * PS_VERDICT_COUNT);
    size_t worse = 0, better = 0;
    for (size_t k = 0; k < ps_cmp_size(c); k++) {
        ps_change ch;
        ps_cmp_get(c, k, 0.01, &ch);
        int i, j;
        cr_assert_eq(sscanf(ch.id, "p-%d-%d", &i, &j), 2);
        char w = want[i][j];
        cr_expect_eq(ch.kind, w == '0' ? PS_CHANGE_NONE : PS_CHANGE_VERDICT, "%s", ch.id);
        ps_change_dir dir = w == 'W' ? PS_DIR_WORSE : w == 'B' ? PS_DIR_BETTER : PS_DIR_NONE;
        cr_expect_eq(ch.dir, dir, "%s -> %s: direction %d, want %c", names[i], names[j], ch.dir, w);
        cr_expect_eq(ch.judged_again, i >= PS_VERDICT_NEEDS_BANDWIDTH && j <= PS_VERDICT_UNSTABILIZABLE, "%s", ch.id);
        worse += w == 'W';
        better += w == 'B';
    }
    ps_cmp_counts cnt;
    ps_cmp_count(c, 0.01, &cnt);
    cr_expect_eq(cnt.worse, worse);
    cr_expect_eq(cnt.better, better);
    cr_expect_eq(cnt.verdict, 30);
    cr_expect_eq(cnt.unchanged, 6);
    ps_cmp_free(c);
}

/* Same verdict, severity 0.5 -> 0.5 + 2^-7 (exact in binary): listed when
 * the change exceeds the tolerance, not when it equals it; worse only for
 * marginal and redesign. */
Test(compare, severity_rule_at_the_tolerance)
{
    char *ob = NULL, *nb = NULL;
    size_t on = 0, nn = 0;
    FILE *o = open_memstream(&ob, &on), *n = open_memstream(&nb, &nn);
    cr_assert(o && n);
    for (int v = 0; v <= PS_VERDICT_REDESIGN; v++) {
        char up[16], down[16];
        snprintf(up, sizeof up, "up-%d", v);
        snprintf(down, sizeof down, "down-%d", v);
        row(o, (size_t)(2 * v + 1), up, v, 0.5);
        row(n, (size_t)(2 * v + 1), up, v, 0.5078125);
        row(o, (size_t)(2 * v + 2), down, v, 0.5078125);
        row(n, (size_t)(2 * v + 2), down, v, 0.5);
    }
    fclose(o);
    fclose(n);
    ps_cmp *c = read_pair(ob, nb);
    free(ob);
    free(nb);
    for (size_t k = 0; k < ps_cmp_size(c); k++) {
        ps_change ch;
        cr_expect_eq(ps_cmp_get(c, k, 0.0078125, &ch), PS_CHANGE_NONE, "%s at the tolerance", ch.id);
        cr_expect_eq(ps_cmp_get(c, k, 0.0078, &ch), PS_CHANGE_SEVERITY, "%s beyond the tolerance", ch.id);
        bool flagged = ch.old.verdict == PS_VERDICT_MARGINAL || ch.old.verdict == PS_VERDICT_REDESIGN;
        bool up = ch.id[0] == 'u';
        cr_expect_eq(ch.dir, !flagged ? PS_DIR_NONE : up ? PS_DIR_WORSE : PS_DIR_BETTER, "%s", ch.id);
    }
    ps_cmp_counts cnt;
    ps_cmp_count(c, 0.0078, &cnt);
    cr_expect_eq(cnt.worse, 2);
    cr_expect_eq(cnt.better, 2);
    cr_expect_eq(cnt.severity, 6);
    cr_expect(!ps_cmp_gate_tripped(PS_GATE_NEVER, &cnt));
    cr_expect(ps_cmp_gate_tripped(PS_GATE_WORSE, &cnt));
    ps_cmp_count(c, 0.0078125, &cnt);
    cr_expect(!ps_cmp_gate_tripped(PS_GATE_CHANGED, &cnt));
    ps_cmp_free(c);
}

/* An id three times in the old run and twice in the new: occurrences matched
 * in order, the third removed; rows without id never matched. */
Test(compare, duplicate_ids_and_rows_without_id)
{
    char *ob = NULL, *nb = NULL;
    size_t on = 0, nn = 0;
    FILE *o = open_memstream(&ob, &on), *n = open_memstream(&nb, &nn);
    cr_assert(o && n);
    row(o, 1, "twin", PS_VERDICT_REDESIGN, 1.25);
    row(o, 2, "twin", PS_VERDICT_CLEAR, 0.3);
    row(o, 3, "twin", PS_VERDICT_UNREAD, 0);
    row(o, 4, NULL, PS_VERDICT_UNREAD, 0);
    row(n, 1, "twin", PS_VERDICT_REDESIGN, 1.25);
    row(n, 2, "twin", PS_VERDICT_MARGINAL, 0.85);
    row(n, 3, NULL, PS_VERDICT_UNREAD, 0);
    fclose(o);
    fclose(n);
    ps_cmp *c = read_pair(ob, nb);
    free(ob);
    free(nb);
    ps_cmp_counts cnt;
    ps_cmp_count(c, 0.01, &cnt);
    cr_expect_eq(cnt.plants[0], 4);
    cr_expect_eq(cnt.plants[1], 3);
    cr_expect_eq(cnt.unchanged, 1);
    cr_expect_eq(cnt.verdict, 1);
    cr_expect_eq(cnt.removed, 1);
    cr_expect_eq(cnt.no_id[0], 1);
    cr_expect_eq(cnt.no_id[1], 1);
    cr_expect_eq(cnt.duplicate_ids[0], 1);
    cr_expect_eq(cnt.duplicate_ids[1], 1);
    for (size_t k = 0; k < ps_cmp_size(c); k++) {
        ps_change ch;
        ps_cmp_get(c, k, 0.01, &ch);
        if (ch.kind == PS_CHANGE_VERDICT)
            cr_expect(ch.occurrence == 2 && ch.old.verdict == PS_VERDICT_CLEAR && ch.cur.verdict == PS_VERDICT_MARGINAL);
        if (ch.kind == PS_CHANGE_REMOVED)
            cr_expect(ch.occurrence == 3 && ch.occurrences[0] == 3 && ch.occurrences[1] == 2);
        if (ps_cmp_occurrences(c, PS_CMP_OLD, k))
            cr_expect_eq(ps_cmp_occurrences(c, PS_CMP_OLD, k), 3);
    }
    ps_cmp_free(c);
}

/* A side is read once; a second read is refused with a message. */
Test(compare, side_read_once)
{
    ps_cmp *c = ps_cmp_new();
    cr_assert_not_null(c);
    ps_diag d = {0};
    const char *p = ps_test_write_temp(".plants.jsonl", "");
    cr_expect_eq(ps_cmp_read(c, PS_CMP_OLD, p, NULL, &d), PS_OK);
    cr_expect_neq(ps_cmp_read(c, PS_CMP_OLD, p, NULL, &d), PS_OK);
    cr_expect(d.text[0]);
    unlink(p);
    ps_cmp_free(c);
    ps_cmp_free(NULL);
}

/* test_yaml_reader.c - the YAML catalog reader: the three model forms, list
 * and matrix notations, defaults, aliases, every entry and file error path,
 * and the budgets that keep hostile files cheap. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "catalog/catalog.h"
#include "reader_fixture.h"

TestSuite(yaml_reader, .init = setup, .fini = teardown);

static const char *write_bytes(const char *bytes, size_t n)
{
    const char *path = ps_test_write_temp(".yaml", "");
    cr_assert_not_null(path);
    FILE *f = fopen(path, "wb");
    cr_assert_not_null(f);
    cr_assert_eq(fwrite(bytes, 1, n, f), n);
    fclose(f);
    return path;
}

static ps_status read_bytes(const char *bytes, size_t n)
{
    const char *path = write_bytes(bytes, n);
    ps_status st = ps_yaml_read(path, scratch, collect, &col, &fd);
    remove(path);
    return st;
}

static ps_status read_text(const char *text) { return read_bytes(text, strlen(text)); }

static const ps_plant *kept(size_t i) { return &col.kept[i]; }

static void expect_ok(size_t i)
{
    cr_assert(i < col.calls, "entry %zu was not delivered (%zu calls)", i, col.calls);
    cr_assert_not(col.failed[i], "entry %zu failed: %zu:%zu %s: %s", i, col.diag[i].line,
                  col.diag[i].col, col.diag[i].field, col.diag[i].text);
}

static void expect_entry_error(size_t i, size_t line, size_t column, const char *field,
                               const char *text)
{
    cr_assert(i < col.calls, "entry %zu was not delivered (%zu calls)", i, col.calls);
    cr_assert(col.failed[i], "entry %zu should be an error", i);
    cr_expect_eq(col.diag[i].line, line, "line %zu, want %zu (%s)", col.diag[i].line, line,
                 col.diag[i].text);
    cr_expect_eq(col.diag[i].col, column, "col %zu, want %zu (%s)", col.diag[i].col, column,
                 col.diag[i].text);
    cr_expect_str_eq(col.diag[i].field, field);
    cr_expect(strstr(col.diag[i].text, text) != NULL, "text '%s' lacks '%s'", col.diag[i].text,
              text);
}

static void expect_file_error(ps_status got, ps_status want, size_t line, size_t column,
                              const char *text)
{
    cr_assert_eq(got, want, "status %d, want %d (%s)", got, want, fd.text);
    cr_expect_eq(fd.line, line, "line %zu, want %zu (%s)", fd.line, line, fd.text);
    cr_expect_eq(fd.col, column, "col %zu, want %zu (%s)", fd.col, column, fd.text);
    cr_expect(strstr(fd.text, text) != NULL, "text '%s' lacks '%s'", fd.text, text);
}

static ps_status check_copy(size_t i, ps_form *form)
{
    ps_diag d = {0};
    ps_plant copy = *kept(i);
    ps_status st = ps_plant_check(&copy, &d);
    cr_expect_eq(st, PS_OK, "entry %zu: %s", i, d.text);
    if (form)
        *form = copy.form;
    return st;
}

/* ---- the three forms ---------------------------------------------------- */

Test(yaml_reader, fixture_three_forms)
{
    ps_status st = ps_yaml_read(PS_TEST_DATA "/yaml/three_forms.yaml", scratch, collect, &col, &fd);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 3);
    cr_assert_eq(col.errors, 0, "%s", col.diag[0].text);

    const ps_plant *p = kept(0);
    cr_expect_str_eq(p->id, "ball_beam");
    cr_expect_str_eq(p->note, "ball and beam, unstable pair");
    cr_expect_eq(p->line, 6);
    cr_assert_eq(p->n_num, 1);
    cr_expect_eq(p->num[0], 2.385);
    cr_assert_eq(p->n_den, 3);
    cr_expect_eq(p->den[0], 1.0);
    cr_expect_eq(p->den[1], 0.0);
    cr_expect_eq(p->den[2], -19.6);
    cr_expect_eq(p->delay, 0.013, "its own delay wins over the default");
    cr_expect_eq(p->field_line[PS_F_DEN], 9);
    cr_expect_eq(p->field_col[PS_F_DEN], 18, "col of the value '['");

    p = kept(1);
    cr_expect_str_eq(p->id, "maglev");
    cr_expect_eq(p->line, 11);
    cr_expect(ps_plant_has(p, PS_F_ZEROS));
    cr_expect_eq(p->n_zeros, 0);
    cr_assert_eq(p->n_poles, 4);
    cr_expect_eq(p->poles[0].re, 31.3);
    cr_expect_eq(p->poles[1].re, -31.3);
    cr_expect_eq(p->poles[2].re, -5.0);
    cr_expect_eq(p->poles[2].im, 12.0);
    cr_expect_eq(p->poles[3].re, -5.0);
    cr_expect_eq(p->poles[3].im, -12.0);
    cr_expect_eq(p->gain, -1200.0);
    cr_expect_eq(p->delay, 0.002, "the default delay applies");
    cr_expect(ps_plant_has(p, PS_F_DELAY));

    p = kept(2);
    cr_expect_str_eq(p->id, "pendulum");
    cr_assert_eq(p->a_rows, 2);
    cr_assert_eq(p->a_cols, 2);
    cr_expect_eq(p->a[0], 0.0);
    cr_expect_eq(p->a[1], 1.0);
    cr_expect_eq(p->a[2], 19.6);
    cr_expect_eq(p->a[3], -0.35);
    cr_assert_eq(p->n_b, 2);
    cr_expect_eq(p->b[1], 1.0);
    cr_assert_eq(p->n_c, 2);
    cr_expect_eq(p->c[0], 1.0);
    cr_expect_eq(p->d, 0.25);

    ps_form want[3] = {PS_FORM_POLY, PS_FORM_FACTORED, PS_FORM_SS};
    for (size_t i = 0; i < 3; i++) {
        ps_form got = PS_FORM_NONE;
        check_copy(i, &got);
        cr_expect_eq(got, want[i], "entry %zu", i);
    }
}

Test(yaml_reader, block_sequences_and_quoted_numbers)
{
    cr_assert_eq(read_text("plants:\n"
                           "- id: '007'\n"
                           "  numerator:\n"
                           "    - \"2.385\"\n"
                           "  denominator:\n"
                           "    - 1\n"
                           "    - '0.5'\n"
                           "    - -19.6\n"
                           "  gain: 1\n"),
                 PS_OK, "%s", fd.text);
    expect_ok(0);
    const ps_plant *p = kept(0);
    cr_expect_str_eq(p->id, "007");
    cr_expect_eq(p->line, 2);
    cr_assert_eq(p->n_num, 1);
    cr_expect_eq(p->num[0], 2.385);
    cr_assert_eq(p->n_den, 3);
    cr_expect_eq(p->den[1], 0.5);
    cr_expect_eq(p->field_line[PS_F_DEN], 6, "a block sequence starts at its first '-'");
    cr_expect_eq(p->gain, 1.0);
}

Test(yaml_reader, complex_pair_notations)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: q\n"
                           "    zeros: [\"-2.385\"]\n"
                           "    poles: [-1.5+2j, -1.5-2j, 3j, -3j, \"-0.7\xC2\xB1" "4.25j\", "
                           "-5+-12j]\n"),
                 PS_OK, "%s", fd.text);
    expect_ok(0);
    const ps_plant *p = kept(0);
    cr_assert_eq(p->n_zeros, 1);
    cr_expect_eq(p->zeros[0].re, -2.385);
    cr_assert_eq(p->n_poles, 8);
    cr_expect_eq(p->poles[0].re, -1.5);
    cr_expect_eq(p->poles[0].im, 2.0);
    cr_expect_eq(p->poles[1].im, -2.0);
    cr_expect_eq(p->poles[2].re, 0.0);
    cr_expect_eq(p->poles[2].im, 3.0);
    cr_expect_eq(p->poles[3].im, -3.0);
    cr_expect_eq(p->poles[4].re, -0.7);
    cr_expect_eq(p->poles[4].im, 4.25);
    cr_expect_eq(p->poles[5].im, -4.25);
    cr_expect_eq(p->poles[6].re, -5.0);
    cr_expect_eq(p->poles[6].im, 12.0);
    cr_expect_eq(p->poles[7].im, -12.0);
    check_copy(0, NULL);
}

Test(yaml_reader, string_list_forms)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: poly\n"
                           "    numerator: \"2.385 0.5\"\n"
                           "    denominator: 1 0 -19.6\n"
                           "  - id: fact\n"
                           "    zeros: \"\"\n"
                           "    poles: 31.3 -31.3 -5+-12j\n"
                           "    gain: \"-1200\"\n"
                           "  - id: ss\n"
                           "    a: \"0 1; 19.6 -0.35;\"\n"
                           "    b: 0 1\n"
                           "    c: '1 0'\n"
                           "  - id: rows\n"
                           "    a: [\"0 1\", \"19.6 -0.35\"]\n"
                           "    b: [0, 1]\n"
                           "    c: [1, 0]\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 4);
    for (size_t i = 0; i < 4; i++)
        expect_ok(i);
    cr_assert_eq(kept(0)->n_num, 2);
    cr_expect_eq(kept(0)->num[1], 0.5);
    cr_assert_eq(kept(0)->n_den, 3);
    cr_expect_eq(kept(0)->den[2], -19.6);
    cr_expect_eq(kept(1)->n_zeros, 0);
    cr_assert_eq(kept(1)->n_poles, 4);
    cr_expect_eq(kept(1)->poles[3].im, -12.0);
    cr_expect_eq(kept(1)->gain, -1200.0);
    for (size_t i = 2; i < 4; i++) {
        const ps_plant *p = kept(i);
        cr_assert_eq(p->a_rows, 2, "entry %zu", i);
        cr_assert_eq(p->a_cols, 2, "entry %zu", i);
        cr_expect_eq(p->a[2], 19.6);
        cr_expect_eq(p->a[3], -0.35);
        cr_expect_eq(p->n_b, 2);
        cr_expect_eq(p->c[0], 1.0);
        ps_form form;
        check_copy(i, &form);
        cr_expect_eq(form, PS_FORM_SS);
    }
    check_copy(0, NULL);
    check_copy(1, NULL);
}

Test(yaml_reader, defaults_applied_and_overridden)
{
    cr_assert_eq(read_text("catalog: bench\n"
                           "defaults:\n"
                           "  delay: 0.002\n"
                           "  note: shared\n"
                           "  gain: 4.75\n"
                           "plants:\n"
                           "  - id: uses\n"
                           "    poles: [-1.25]\n"
                           "  - id: overrides\n"
                           "    poles: [-1.25]\n"
                           "    delay: 0.0375\n"
                           "    gain: -3.5\n"
                           "    note: own\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 2);
    expect_ok(0);
    expect_ok(1);
    cr_expect_eq(kept(0)->delay, 0.002);
    cr_expect_eq(kept(0)->gain, 4.75);
    cr_expect_str_eq(kept(0)->note, "shared");
    cr_expect(ps_plant_has(kept(0), PS_F_DELAY));
    cr_expect_eq(kept(0)->field_line[PS_F_DELAY], 3, "a default keeps its own position");
    cr_expect_eq(kept(1)->delay, 0.0375);
    cr_expect_eq(kept(1)->gain, -3.5);
    cr_expect_str_eq(kept(1)->note, "own");
    cr_expect_eq(kept(1)->field_line[PS_F_DELAY], 11);
}

Test(yaml_reader, aliases_to_scalars_and_sequences)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: first\n"
                           "    numerator: &num [2.385]\n"
                           "    denominator: &den [1, &k 0.5, -19.6]\n"
                           "    delay: &dl 0.013\n"
                           "  - id: second\n"
                           "    numerator: *num\n"
                           "    denominator: [*k, *k, 3]\n"
                           "    delay: *dl\n"
                           "  - id: third\n"
                           "    a: &m [&r [0, 1], *r]\n"
                           "    b: [0, 1]\n"
                           "    c: [1, 0]\n"
                           "  - id: fourth\n"
                           "    a: *m\n"
                           "    b: [0, 1]\n"
                           "    c: [1, 0]\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 4);
    for (size_t i = 0; i < 4; i++)
        expect_ok(i);
    cr_assert_eq(kept(1)->n_num, 1);
    cr_expect_eq(kept(1)->num[0], 2.385);
    cr_assert_eq(kept(1)->n_den, 3);
    cr_expect_eq(kept(1)->den[0], 0.5);
    cr_expect_eq(kept(1)->den[1], 0.5);
    cr_expect_eq(kept(1)->den[2], 3.0);
    cr_expect_eq(kept(1)->delay, 0.013);
    cr_expect_eq(kept(1)->field_line[PS_F_NUM], 7, "an alias value is placed at the alias");
    cr_assert_eq(kept(3)->a_rows, 2);
    cr_assert_eq(kept(3)->a_cols, 2);
    cr_expect_eq(kept(3)->a[2], 0.0);
    cr_expect_eq(kept(3)->a[3], 1.0);
}

/* ---- entry errors ------------------------------------------------------- */

Test(yaml_reader, bad_number)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: p\n"
                           "    numerator: [1]\n"
                           "    denominator: [1, 0, x19.6]\n"
                           "  - id: q\n"
                           "    gain: 1.5.2\n"
                           "  - id: r\n"
                           "    denominator: 1 0 0x10\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 3);
    expect_entry_error(0, 4, 25, "denominator", "denominator: item 3: expected a decimal number");
    cr_expect_str_eq(kept(0)->id, "p");
    cr_expect_eq(kept(0)->line, 2);
    expect_entry_error(1, 6, 11, "gain", "gain: unexpected characters after the number");
    expect_entry_error(2, 8, 18, "denominator", "denominator: item 3: hexadecimal");
}

Test(yaml_reader, unknown_field_then_next_entry)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: p\n"
                           "    gian: 2\n"
                           "    poles: [-1]\n"
                           "  - id: q\n"
                           "    poles: [-1]\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 3, 5, "gian", "unknown field 'gian'");
    cr_expect_str_eq(kept(0)->id, "p");
    expect_ok(1);
    cr_expect_str_eq(kept(1)->id, "q");
}

/* A key is echoed in the message: its control characters are shown as '?'. */
Test(yaml_reader, unknown_key_with_control_characters_not_echoed_raw)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: p\n"
                           "    \"ga\\e[2Jin\\x9b\": 2.385\n"
                           "    poles: [-1]\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 1);
    expect_entry_error(0, 3, 5, "ga?[2Jin?" "?", "unknown field 'ga?[2Jin?" "?'");
}

Test(yaml_reader, id_after_error_still_named)
{
    cr_assert_eq(read_text("plants:\n  - foo: 1\n    id: later\n"), PS_OK);
    expect_entry_error(0, 2, 5, "foo", "unknown field 'foo'");
    cr_expect_str_eq(kept(0)->id, "later");
}

Test(yaml_reader, unknown_top_level_key)
{
    ps_status st = read_text("catalog: x\n"
                             "plants:\n"
                             "  - id: p\n"
                             "    poles: [-1]\n"
                             "plannts: []\n");
    expect_file_error(st, PS_ERR_SYNTAX, 5, 1,
                      "unknown top-level key 'plannts' (expected catalog, defaults, plants, families)");
    cr_expect_str_eq(fd.field, "plannts");
    cr_expect_eq(col.calls, 1, "the entry before the bad key is delivered");
}

Test(yaml_reader, ragged_matrix)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: p\n"
                           "    a: [[0, 1],\n"
                           "        [19.6, 0, 2]]\n"
                           "  - id: q\n"
                           "    a: \"0 1; 19.6 0 2\"\n"),
                 PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 4, 9, "a", "a: row 2 has 3 entries, row 1 has 2");
    expect_entry_error(1, 6, 8, "a", "a: row 2 has 3 entries, row 1 has 2");
}

static void append(char **buf, size_t *len, const char *s)
{
    size_t n = strlen(s);
    *buf = realloc(*buf, *len + n + 1);
    cr_assert_not_null(*buf);
    memcpy(*buf + *len, s, n + 1);
    *len += n;
}

Test(yaml_reader, too_many_coefficients)
{
    char *text = NULL;
    size_t len = 0;
    append(&text, &len, "plants:\n  - id: big\n    numerator: [1]\n    denominator: [");
    for (int i = 0; i < PS_MAX_ORDER + 2; i++) /* 66 coefficients: order 65 */
        append(&text, &len, i ? ", 1.25" : "1.25");
    append(&text, &len, "]\n  - id: poles\n    poles: [");
    for (int i = 0; i < PS_MAX_ORDER / 2; i++) /* 32 pairs = 64 values, then one more */
        append(&text, &len, "-1+-2j, ");
    append(&text, &len, "-3]\n  - id: mat\n    a: [");
    for (int i = 0; i < PS_MAX_ORDER + 1; i++)
        append(&text, &len, i ? ", [1]" : "[1]");
    append(&text, &len, "]\n  - id: wide\n    b: \"");
    for (int i = 0; i < PS_MAX_ORDER + 1; i++)
        append(&text, &len, "2 ");
    append(&text, &len, "\"\n");
    ps_status st = read_text(text);
    free(text);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 4);
    /* item 66 is at column 19 + 65 * 6 = 409 */
    expect_entry_error(0, 4, 409, "denominator", "denominator: more than 65 values");
    expect_entry_error(1, 6, 13 + 32 * 8, "poles", "poles: more than 64 values");
    expect_entry_error(2, 8, 9 + 64 * 5, "a", "a: more than 64 rows");
    expect_entry_error(3, 10, 8, "b", "b: item 65: too many values");
}

Test(yaml_reader, duplicate_key)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: p\n"
                           "    poles: [-1]\n"
                           "    poles: [-2]\n"),
                 PS_OK);
    cr_assert_eq(col.calls, 1);
    expect_entry_error(0, 4, 5, "poles", "duplicate field 'poles' (first given at line 3)");
}

Test(yaml_reader, non_mapping_item)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - just text\n"
                           "  - [1, 2]\n"
                           "  - id: fine\n"
                           "    poles: [-1]\n"),
                 PS_OK);
    cr_assert_eq(col.calls, 3);
    expect_entry_error(0, 2, 5, "", "must be a mapping");
    cr_expect_eq(kept(0)->line, 2);
    expect_entry_error(1, 3, 5, "", "found a sequence");
    expect_ok(2);
}

Test(yaml_reader, undefined_alias)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: p\n"
                           "    poles: *nope\n"
                           "  - id: q\n"
                           "    poles: [-1, *nada]\n"),
                 PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 3, 12, "poles", "undefined alias '*nope'");
    expect_entry_error(1, 5, 17, "poles", "poles: item 2: undefined alias '*nada'");
}

Test(yaml_reader, merge_key_refused)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - &base {id: a, poles: [-1]}\n"
                           "  - <<: *base\n"
                           "    id: b\n"
                           "  - id: c\n"
                           "    poles: *base\n"),
                 PS_OK);
    cr_assert_eq(col.calls, 3);
    expect_ok(0);
    expect_entry_error(1, 3, 5, "<<", "merge keys ('<<') are not supported");
    expect_entry_error(2, 6, 12, "poles", "refers to a mapping");
}

Test(yaml_reader, alias_cycle_refused)
{
    cr_assert_eq(read_text("plants:\n  - id: p\n    poles: &x [-1, *x]\n"), PS_OK);
    cr_assert_eq(col.calls, 1);
    expect_entry_error(0, 3, 20, "poles", "cycle");
}

Test(yaml_reader, id_too_long)
{
    char text[400];
    char id[PS_ID_MAX + 1];
    memset(id, 'k', PS_ID_MAX);
    id[PS_ID_MAX] = '\0';
    snprintf(text, sizeof text, "plants:\n  - id: %.*s\n  - id: %s\n", PS_ID_MAX - 1, id, id);
    cr_assert_eq(read_text(text), PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_ok(0);
    cr_expect_eq(strlen(kept(0)->id), PS_ID_MAX - 1);
    expect_entry_error(1, 3, 9, "id", "id: longer than 95 bytes");
}

/* libyaml refuses raw control bytes, but escapes in double quotes and a raw
 * NEL (U+0085, a C1 character YAML allows) still make them: the id is refused
 * where its scalar starts. */
Test(yaml_reader, control_characters_in_ids_refused)
{
    static const char text[] = "plants:\n"
                               "  - id: \"red\\e[31mx\"\n"          /* ESC by escape */
                               "    gain: 2.385\n"
                               "  - {gain: 1.5, id: \"a\\tb\"}\n"     /* tab by escape, line 4 col 17 */
                               "  - id: \"nel\\N\"\n"                /* U+0085 by escape */
                               "  - id: \"csi\\x9b\"\n"              /* U+009B by escape */
                               "  - id: \"del\\x7f\"\n"
                               "  - id: \"ok\\u00a0nbsp\"\n"
                               "    note: \"tab\\tin a note\"\n";
    cr_assert_eq(read_text(text), PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 6);
    expect_entry_error(0, 2, 9, "id", "id: control character U+001B at character 4");
    expect_entry_error(1, 4, 21, "id", "control character U+0009 at character 2");
    expect_entry_error(2, 5, 9, "id", "control character U+0085 at character 4");
    expect_entry_error(3, 6, 9, "id", "control character U+009B at character 4");
    expect_entry_error(4, 7, 9, "id", "control character U+007F at character 4");
    expect_ok(5);
    cr_expect_str_eq(kept(5)->id, "ok\xC2\xA0nbsp");
    cr_expect_str_eq(kept(5)->note, "tab\tin a note", "a note may hold a tab");
}

/* The README's anchor cap: 256 distinct anchor names per file are read, the
 * 257th ends the read of the file where it stands. */
static char *anchored_plants(size_t n)
{
    size_t cap = 32 + n * 48;
    char *text = malloc(cap);
    cr_assert_not_null(text);
    size_t used = (size_t)snprintf(text, cap, "plants:\n");
    for (size_t i = 0; i < n; i++)
        used += (size_t)snprintf(text + used, cap - used, "  - id: &k%zu p%zu\n    gain: 2.385\n", i, i);
    return text;
}

Test(yaml_reader, anchor_cap_256_names)
{
    char *text = anchored_plants(256);
    cr_assert_eq(read_text(text), PS_OK, "%s", fd.text);
    free(text);
    cr_assert_eq(col.calls, 256);
    cr_assert_eq(col.errors, 0);
    col.calls = col.errors = 0;
    text = anchored_plants(257);
    ps_status st = read_text(text);
    free(text);
    cr_assert_eq(st, PS_ERR_SYNTAX);
    cr_expect_eq(fd.line, 2 + 2 * 256, "the 257th anchor's line: %zu", fd.line);
    cr_expect(strstr(fd.text, "more than 256 distinct anchors in one file") != NULL, "%s", fd.text);
    cr_expect_geq(col.calls, 256, "the 256 plants before it are read");
    cr_expect_eq(col.calls - col.errors, 256);
}

Test(yaml_reader, scalar_over_field_limit)
{
    size_t n = (size_t)PS_FIELD_MAX_BYTES + 10;
    char *text = malloc(n + 64);
    cr_assert_not_null(text);
    int head = sprintf(text, "plants:\n  - id: p\n    note: ");
    memset(text + head, 'z', n);
    strcpy(text + head + n, "\n  - id: q\n");
    ps_status st = read_text(text);
    free(text);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 3, 11, "note", "longer than the limit");
    expect_ok(1);
}

Test(yaml_reader, defaults_errors_are_file_errors)
{
    ps_status st = read_text("defaults:\n  dealy: 1\nplants: []\n");
    expect_file_error(st, PS_ERR_SYNTAX, 2, 3, "in defaults: unknown field 'dealy'");
    memset(&fd, 0, sizeof fd);
    st = read_text("plants: []\ndefaults: {delay: 1}\n");
    expect_file_error(st, PS_ERR_SYNTAX, 2, 1, "defaults must come before plants");
    memset(&fd, 0, sizeof fd);
    st = read_text("defaults: {id: x}\nplants: []\n");
    expect_file_error(st, PS_ERR_SYNTAX, 1, 12, "cannot give an id");
    cr_expect_eq(col.calls, 0);
}

Test(yaml_reader, structure_errors)
{
    expect_file_error(read_text(""), PS_ERR_SYNTAX, 0, 0, "empty");
    expect_file_error(read_text("catalog: x\n"), PS_ERR_SYNTAX, 1, 1, "no 'plants' list");
    expect_file_error(read_text("- 1\n"), PS_ERR_SYNTAX, 1, 1, "top level must be a mapping");
    expect_file_error(read_text("plants: 3\n"), PS_ERR_SYNTAX, 1, 9, "plants must be a sequence");
    expect_file_error(read_text("plants: []\n---\nplants: []\n"), PS_ERR_SYNTAX, 2, 1,
                      "only one YAML document");
    cr_expect_eq(col.calls, 0);
}

/* ---- hostile files ------------------------------------------------------ */

Test(yaml_reader, deep_nesting_bomb, .timeout = 10)
{
    size_t n = 10000;
    char *text = malloc(n + 32);
    cr_assert_not_null(text);
    strcpy(text, "plants: ");
    memset(text + 8, '[', n);
    text[8 + n] = '\0';
    clock_t t0 = clock();
    ps_status st = read_text(text);
    double secs = (double)(clock() - t0) / CLOCKS_PER_SEC;
    free(text);
    expect_file_error(st, PS_ERR_SYNTAX, 1, 9 + PS_YAML_MAX_DEPTH - 1,
                      "nesting deeper than 32 levels");
    cr_expect_lt(secs, 0.5, "took %g s", secs);
    cr_expect_eq(col.calls, 1, "the cut item is delivered as an error");
    cr_expect_eq(col.errors, 1);
}

Test(yaml_reader, billion_laughs, .timeout = 10)
{
    /* 9 levels of 9 aliases each: 9^9 leaves if expanded naively. */
    char text[4096];
    size_t len = (size_t)sprintf(text, "plants:\n  - id: lol\n    l0: &a0 [1,1,1,1,1,1,1,1,1]\n");
    for (int lvl = 1; lvl < 9; lvl++) {
        len += (size_t)sprintf(text + len, "    l%d: &a%d [", lvl, lvl);
        for (int i = 0; i < 9; i++)
            len += (size_t)sprintf(text + len, "%s*a%d", i ? "," : "", lvl - 1);
        len += (size_t)sprintf(text + len, "]\n");
    }
    clock_t t0 = clock();
    ps_status st = read_text(text);
    double secs = (double)(clock() - t0) / CLOCKS_PER_SEC;
    cr_assert_eq(st, PS_ERR_SYNTAX, "%s", fd.text);
    cr_expect(strstr(fd.text, "aliases expand beyond the budget") != NULL, "%s", fd.text);
    cr_expect_lt(secs, 1.0, "took %g s", secs);
    cr_expect_eq(col.calls, 1);
    cr_expect_eq(col.errors, 1);
}

Test(yaml_reader, replay_budget, .timeout = 10)
{
    /* An anchor of 1000 events replayed 101 times is over 100000 events. */
    char *text = NULL;
    size_t len = 0;
    append(&text, &len, "plants:\n  - id: big\n    numerator: &big [");
    for (int i = 0; i < 998; i++)
        append(&text, &len, i ? ",1" : "1");
    append(&text, &len, "]\n  - id: many\n    b: [");
    for (int i = 0; i < 101; i++)
        append(&text, &len, i ? ", *big" : "*big");
    append(&text, &len, "]\n  - id: never\n");
    ps_status st = read_text(text);
    free(text);
    cr_assert_eq(st, PS_ERR_SYNTAX, "%s", fd.text);
    cr_expect(strstr(fd.text, "aliases expand beyond the budget of 100000 events") != NULL, "%s",
              fd.text);
    cr_expect_eq(fd.line, 5);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 3, 152, "numerator", "numerator: more than 65 values");
    expect_entry_error(1, 5, 9, "b", "b: item 1: expected a number, found a sequence");
}

Test(yaml_reader, mid_file_syntax_error)
{
    ps_status st = read_text("plants:\n"
                             "  - id: ok1\n"
                             "    poles: [-1]\n"
                             "  - id: ok2\n"
                             "    poles: [-2]\n"
                             "  - id: cut\n"
                             "    poles: [-3]\n"
                             "    gain: 3: 4\n"
                             "  - id: never\n"
                             "    poles: [-4]\n");
    cr_assert_eq(st, PS_ERR_SYNTAX, "%s", fd.text);
    cr_expect_eq(fd.line, 8, "%s", fd.text);
    cr_assert_eq(col.calls, 3);
    expect_ok(0);
    expect_ok(1);
    cr_assert(col.failed[2]);
    cr_expect_str_eq(kept(2)->id, "cut");
    cr_expect_eq(kept(2)->line, 6);
    cr_expect_eq(col.diag[2].line, fd.line);
    cr_expect_str_eq(col.diag[2].text, fd.text);
}

Test(yaml_reader, unclosed_flow_sequence)
{
    ps_status st = read_text("plants:\n  - id: a\n    poles: [-1, -2\n");
    cr_assert_eq(st, PS_ERR_SYNTAX);
    cr_expect(strstr(fd.text, "flow sequence") != NULL, "%s", fd.text);
    cr_expect_eq(col.calls, 1);
    cr_expect_eq(col.errors, 1);
}

Test(yaml_reader, invalid_utf8_line)
{
    const char text[] = "plants:\n"
                        "  - id: ok1\n"
                        "    poles: [-1]\n"
                        "  - id: b\n"
                        "    note: \"x\xFFy\"\n"
                        "    poles: [-2]\n";
    ps_status st = read_bytes(text, sizeof text - 1);
    cr_assert_eq(st, PS_ERR_SYNTAX, "%s", fd.text);
    cr_expect_eq(fd.line, 5, "%s", fd.text);
    cr_expect_eq(fd.col, 13);
    cr_expect(strstr(fd.text, "UTF-8") != NULL, "%s", fd.text);
    cr_expect(strstr(fd.text, "0xFF") != NULL, "%s", fd.text);
    /* Whatever was read before the bad byte is delivered, and nothing is dropped. */
    cr_expect_eq(col.calls - col.errors, 1);
    cr_expect_str_eq(kept(0)->id, "ok1");
}

Test(yaml_reader, missing_file)
{
    ps_status st = ps_yaml_read("/nonexistent/dir/catalog.yaml", scratch, collect, &col, &fd);
    cr_assert_eq(st, PS_ERR_IO);
    cr_expect(strstr(fd.text, "cannot open") != NULL, "%s", fd.text);
    cr_expect_str_eq(fd.file, "/nonexistent/dir/catalog.yaml");
    cr_expect_eq(col.calls, 0);
    st = ps_yaml_read(PS_TEST_DATA, scratch, collect, &col, &fd);
    cr_expect_eq(st, PS_ERR_IO, "a directory is refused");
}

/* ---- invariants --------------------------------------------------------- */

Test(yaml_reader, one_callback_per_plant_item)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: good1\n"
                           "    poles: [-1]\n"
                           "  - id: badnum\n"
                           "    poles: [-1, zz]\n"
                           "  - 42\n"
                           "  - id: unknown\n"
                           "    colour: red\n"
                           "  - id: dup\n"
                           "    id: dup2\n"
                           "  - {id: flow, gain: 2, poles: \"-1 -2\"}\n"
                           "  - id: nested\n"
                           "    poles: [[-1]]\n"
                           "  -\n"),
                 PS_OK, "%s", fd.text);
    cr_expect_eq(col.calls, 8, "8 plant items, 8 callbacks");
    cr_expect_eq(col.errors, 6);
    expect_ok(0);
    expect_ok(5);
    cr_expect_eq(kept(5)->n_poles, 2);
    expect_entry_error(6, 13, 13, "poles", "poles: item 1: expected a number, found a sequence");
    expect_entry_error(7, 14, 4, "", "must be a mapping");
}

Test(yaml_reader, stop_on_request)
{
    col.stop_after = 1;
    cr_assert_eq(read_text("plants:\n  - id: a\n  - id: b\n  - id: c\n"), PS_OK);
    cr_expect_eq(col.calls, 1);
}

Test(yaml_reader, bom_and_crlf)
{
    cr_assert_eq(read_text("\xEF\xBB\xBFplants:\r\n  - id: a\r\n    poles: [-1.5]\r\n"), PS_OK,
                 "%s", fd.text);
    expect_ok(0);
    cr_expect_eq(kept(0)->poles[0].re, -1.5);
    cr_expect_eq(kept(0)->field_line[PS_F_POLES], 3);
}

Test(yaml_reader, giant_token_refused, .timeout = 20)
{
    /* 5 MiB of comment with no event: refused before libyaml buffers it all. */
    size_t n = (size_t)5 << 20;
    char *text = malloc(n + 64);
    cr_assert_not_null(text);
    int head = sprintf(text, "plants:\n  - id: p\n    #");
    memset(text + head, 'c', n);
    strcpy(text + head + n, "\n");
    ps_status st = read_text(text);
    free(text);
    cr_assert_eq(st, PS_ERR_SYNTAX, "%s", fd.text);
    cr_expect(strstr(fd.text, "spans more than") != NULL, "%s", fd.text);
    cr_expect_eq(col.calls, 1);
    cr_expect_eq(col.errors, 1);
}

/* ---- the digital loop (README "Digital loops") ---------------------------- */

Test(yaml_reader, digital_fixture_units_and_defaults)
{
    ps_status st = ps_yaml_read(PS_TEST_DATA "/yaml/digital.yaml", scratch, collect, &col, &fd);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 4);
    for (size_t i = 0; i < 4; i++)
        expect_ok(i);
    /* inherits "2.5 kHz" and "0.5 samples" from the defaults */
    cr_expect_float_eq(kept(0)->sample_period, 1.0 / 2500.0, 1e-18);
    cr_expect_float_eq(kept(0)->compute_delay_samples, 0.5, 0);
    cr_expect_eq(kept(0)->field_line[PS_F_SAMPLE_RATE], 3, "a default keeps its own position");
    cr_expect_float_eq(kept(0)->defaults_sample_period, 1.0 / 2500.0, 1e-18);
    cr_expect_not(kept(0)->in_z);
    /* its own period "250 us" and delay "0.4 ms" win */
    cr_expect_float_eq(kept(1)->sample_period, 250e-6, 1e-18);
    cr_expect_float_eq(kept(1)->compute_delay, 0.4e-3, 1e-18);
    cr_expect(isnan(kept(1)->compute_delay_samples));
    cr_expect_eq(kept(1)->field_line[PS_F_SAMPLE_RATE], 12);
    /* in z at the defaults' rate, two samples */
    cr_expect(kept(2)->in_z);
    cr_expect_float_eq(kept(2)->compute_delay_samples, 2.0, 0);
    cr_expect_float_eq(kept(3)->sample_period, 1.0 / 1.25e6, 1e-21);
    cr_expect_float_eq(kept(3)->compute_delay_samples, 1.0, 0);
    for (size_t i = 0; i < 4; i++)
        check_copy(i, NULL);
    ps_plant copy = *kept(1);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(&copy, &d), PS_OK, "%s", d.text);
    cr_expect_float_eq(copy.compute_delay, 0.4e-3, 1e-18);
    copy = *kept(0);
    cr_assert_eq(ps_plant_check(&copy, &d), PS_OK, "%s", d.text);
    cr_expect_float_eq(copy.compute_delay, 0.5 / 2500.0, 1e-18);
}

Test(yaml_reader, digital_fields_refused_without_units_or_out_of_range)
{
    cr_assert_eq(read_text("plants:\n"
                           "  - id: bare-rate\n"
                           "    poles: [-41.3]\n"
                           "    sample_rate: 1000\n"
                           "  - id: radians\n"
                           "    poles: [-41.3]\n"
                           "    sample_rate: 6283 rad/s\n"
                           "  - id: zero-rate\n"
                           "    poles: [-41.3]\n"
                           "    sample_rate: 0 kHz\n"
                           "  - id: bare-delay\n"
                           "    poles: [-41.3]\n"
                           "    sample_rate: 1 kHz\n"
                           "    compute_delay: 0.5\n"
                           "  - id: negative-delay\n"
                           "    poles: [-41.3]\n"
                           "    sample_rate: 1 kHz\n"
                           "    compute_delay: -1 sample\n"
                           "  - id: bad-domain\n"
                           "    poles: [-41.3]\n"
                           "    domain: w\n"
                           "  - id: negative-period\n"
                           "    poles: [-41.3]\n"
                           "    sample_rate: -2 ms\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 7);
    expect_entry_error(0, 4, 18, "sample_rate", "Hz or rad/s");
    expect_entry_error(1, 7, 18, "sample_rate", "needs its unit");
    expect_entry_error(2, 10, 18, "sample_rate", "above 0");
    expect_entry_error(3, 14, 20, "compute_delay", "needs its unit: samples");
    expect_entry_error(4, 18, 20, "compute_delay", "0 or more");
    expect_entry_error(5, 21, 13, "domain", "expected s");
    expect_entry_error(6, 24, 18, "sample_rate", "above 0");
}

Test(yaml_reader, digital_checks_name_the_line)
{
    cr_assert_eq(read_text("defaults:\n"
                           "  sample_rate: 1 kHz\n"
                           "plants:\n"
                           "  - id: z-other-rate\n"
                           "    domain: z\n"
                           "    poles: [0.5]\n"
                           "    sample_rate: 2 kHz\n"
                           "  - id: past-nyquist\n"
                           "    poles: [-41.3]\n"
                           "    rolloff_start: 600 Hz\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 2);
    expect_ok(0);
    expect_ok(1);
    ps_diag d = {0};
    ps_plant copy = *kept(0);
    cr_assert_eq(ps_plant_check(&copy, &d), PS_ERR_INPUT);
    cr_expect_eq(d.line, 7);
    cr_expect_str_eq(d.field, "sample_rate");
    cr_expect(strstr(d.text, "differs from the 1000 Hz of the catalog defaults") != NULL, "%s", d.text);
    copy = *kept(1);
    cr_assert_eq(ps_plant_check(&copy, &d), PS_ERR_INPUT);
    cr_expect_eq(d.line, 10);
    cr_expect_str_eq(d.field, "rolloff_start");
    cr_expect(strstr(d.text, "Nyquist frequency pi/h = 3141.59 rad/s (500 Hz)") != NULL, "%s", d.text);
}

/* test_csv_reader.c - the CSV catalog reader: the three model forms, physical
 * line numbers, BOM/CRLF, and every entry and file error path. */
#include <criterion/criterion.h>
#include <math.h>
#include <errno.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>

#include "catalog/catalog.h"
#include "reader_fixture.h"

TestSuite(csv_reader, .init = setup, .fini = teardown);

/* Writes n raw bytes (they may contain NUL) to a fresh temp file. */
static const char *write_bytes(const char *suffix, const char *bytes, size_t n)
{
    const char *path = ps_test_write_temp(suffix, "");
    cr_assert_not_null(path);
    FILE *f = fopen(path, "wb");
    cr_assert_not_null(f);
    cr_assert_eq(fwrite(bytes, 1, n, f), n);
    fclose(f);
    return path;
}

static ps_status read_bytes(const char *bytes, size_t n)
{
    const char *path = write_bytes(".csv", bytes, n);
    ps_status st = ps_csv_read(path, scratch, collect, &col, &fd);
    remove(path);
    return st;
}

static ps_status read_text(const char *text) { return read_bytes(text, strlen(text)); }

static const ps_plant *kept(size_t i) { return &col.kept[i]; }

static void expect_entry_error(size_t i, size_t line, size_t column, const char *field,
                               const char *text)
{
    cr_assert(i < col.calls, "entry %zu was not delivered (%zu calls)", i, col.calls);
    cr_assert(col.failed[i], "entry %zu should be an error", i);
    cr_expect_eq(col.diag[i].line, line, "line %zu, want %zu", col.diag[i].line, line);
    cr_expect_eq(col.diag[i].col, column, "col %zu, want %zu", col.diag[i].col, column);
    cr_expect_str_eq(col.diag[i].field, field);
    cr_expect(strstr(col.diag[i].text, text) != NULL, "text '%s' lacks '%s'", col.diag[i].text,
              text);
}

/* ---- the three forms ---------------------------------------------------- */

Test(csv_reader, polynomial_form)
{
    cr_assert_eq(read_text("id,numerator,denominator,delay\nball_beam,2.385,1 0 -19.6,0.013\n"),
                 PS_OK);
    cr_assert_eq(col.calls, 1);
    const ps_plant *p = kept(0);
    cr_assert_not(col.failed[0]);
    cr_expect_str_eq(p->id, "ball_beam");
    cr_expect_eq(p->line, 2);
    cr_assert_eq(p->n_num, 1);
    cr_expect_eq(p->num[0], 2.385);
    cr_assert_eq(p->n_den, 3);
    cr_expect_eq(p->den[0], 1.0);
    cr_expect_eq(p->den[1], 0.0);
    cr_expect_eq(p->den[2], -19.6);
    cr_expect_eq(p->delay, 0.013);
    cr_expect(ps_plant_has(p, PS_F_NUM) && ps_plant_has(p, PS_F_DEN) && ps_plant_has(p, PS_F_DELAY));
    cr_expect_not(ps_plant_has(p, PS_F_GAIN));
    cr_expect_eq(p->field_col[PS_F_DEN], 3, "col is the column number");
    cr_expect_eq(p->field_line[PS_F_DEN], 2);
    ps_diag d = {0};
    ps_plant copy = *p;
    cr_expect_eq(ps_plant_check(&copy, &d), PS_OK, "%s", d.text);
}

Test(csv_reader, factored_form_with_pair)
{
    cr_assert_eq(read_text("id,zeros,poles,gain\nmaglev,-2.385,31.3 -31.3 -5+-12j,4.75\n"), PS_OK);
    cr_assert_eq(col.calls, 1);
    const ps_plant *p = kept(0);
    cr_assert_not(col.failed[0]);
    cr_assert_eq(p->n_zeros, 1);
    cr_expect_eq(p->zeros[0].re, -2.385);
    cr_expect_eq(p->zeros[0].im, 0.0);
    cr_assert_eq(p->n_poles, 4);
    cr_expect_eq(p->poles[0].re, 31.3);
    cr_expect_eq(p->poles[1].re, -31.3);
    cr_expect_eq(p->poles[2].re, -5.0);
    cr_expect_eq(p->poles[2].im, 12.0);
    cr_expect_eq(p->poles[3].re, -5.0);
    cr_expect_eq(p->poles[3].im, -12.0);
    cr_expect_eq(p->gain, 4.75);
    cr_expect_eq(p->field_col[PS_F_GAIN], 4);
}

Test(csv_reader, complex_notations)
{
    /* "-1.5+2j -1.5-2j" written out, a pure imaginary pair, and the ± form. */
    cr_assert_eq(read_text("id,poles\nq,\"-1.5+2j -1.5-2j 3j -3j -0.7\xC2\xB1" "4.25j\"\n"), PS_OK);
    cr_assert_eq(col.calls, 1);
    const ps_plant *p = kept(0);
    cr_assert_not(col.failed[0], "%s", col.diag[0].text);
    cr_assert_eq(p->n_poles, 6);
    cr_expect_eq(p->poles[0].re, -1.5);
    cr_expect_eq(p->poles[0].im, 2.0);
    cr_expect_eq(p->poles[1].im, -2.0);
    cr_expect_eq(p->poles[2].re, 0.0);
    cr_expect_eq(p->poles[2].im, 3.0);
    cr_expect_eq(p->poles[3].im, -3.0);
    cr_expect_eq(p->poles[4].re, -0.7);
    cr_expect_eq(p->poles[4].im, 4.25);
    cr_expect_eq(p->poles[5].re, -0.7);
    cr_expect_eq(p->poles[5].im, -4.25);
}

Test(csv_reader, state_space_form)
{
    cr_assert_eq(read_text("id,a,b,c,d\npendulum,0 1; 19.6 -0.35,0 1,1 0,0.25\n"), PS_OK);
    cr_assert_eq(col.calls, 1);
    const ps_plant *p = kept(0);
    cr_assert_not(col.failed[0], "%s", col.diag[0].text);
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
    ps_diag d = {0};
    ps_plant copy = *p;
    cr_expect_eq(ps_plant_check(&copy, &d), PS_OK, "%s", d.text);
    cr_expect_eq(copy.form, PS_FORM_SS);
}

Test(csv_reader, matrix_trailing_semicolon)
{
    cr_assert_eq(read_text("id,a\ns,\"1.5 2; 3 4.25;\"\n"), PS_OK);
    cr_assert_not(col.failed[0], "%s", col.diag[0].text);
    cr_expect_eq(kept(0)->a_rows, 2);
    cr_expect_eq(kept(0)->a[3], 4.25);
}

Test(csv_reader, fixture_file_all_forms)
{
    ps_status st = ps_csv_read(PS_TEST_DATA "/csv/three_forms.csv", scratch, collect, &col, &fd);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 3);
    cr_assert_eq(col.errors, 0);
    ps_form want[3] = {PS_FORM_POLY, PS_FORM_FACTORED, PS_FORM_SS};
    for (size_t i = 0; i < 3; i++) {
        ps_plant copy = *kept(i);
        ps_diag d = {0};
        cr_expect_eq(ps_plant_check(&copy, &d), PS_OK, "row %zu: %s", i, d.text);
        cr_expect_eq(copy.form, want[i]);
        cr_expect_eq(copy.line, i + 2);
    }
    cr_expect_str_eq(kept(0)->note, "polynomial, from the lab sheet");
    cr_expect_eq(kept(0)->delay, 0.013);
}

/* ---- empty fields, layout, line numbers --------------------------------- */

Test(csv_reader, empty_fields_are_not_given)
{
    cr_assert_eq(read_text("id,note,zeros,poles,gain\np,,\"\",  ,-1\n"), PS_OK);
    cr_assert_eq(col.calls, 1);
    const ps_plant *p = kept(0);
    cr_assert_not(col.failed[0]);
    cr_expect_not(ps_plant_has(p, PS_F_NOTE));
    cr_expect_not(ps_plant_has(p, PS_F_ZEROS));
    cr_expect_not(ps_plant_has(p, PS_F_POLES));
    cr_expect(ps_plant_has(p, PS_F_POLES) == false && p->n_poles == 0);
    cr_expect(ps_plant_has(p, PS_F_GAIN));
    cr_expect_eq(p->gain, -1.0);
}

/* A short row is an error of its own, named where it ends: not read as if the
 * missing cells were empty (which left "denominator missing" at column 0). */
Test(csv_reader, fewer_fields_than_header)
{
    cr_assert_eq(read_text("id,poles,note,gain,delay\np,-1\nq,-2.385,,4.7,\nr,-3.1,\"two\nlines\"\n"), PS_OK);
    cr_assert_eq(col.calls, 3);
    expect_entry_error(0, 2, 2, "", "row has 2 fields, the header has 5");
    cr_expect_str_eq(kept(0)->id, "p", "the id read before the end is kept for the report");
    cr_assert_not(col.failed[1], "%s", col.diag[1].text);
    cr_expect_not(ps_plant_has(kept(1), PS_F_DELAY));
    /* A row over two physical lines: named at the line where it ends. */
    expect_entry_error(2, 5, 3, "", "row has 3 fields, the header has 5");
}

/* ---- text cells: UTF-8 and control characters ------------------------------ */

Test(csv_reader, invalid_utf8_in_text_cells_refused)
{
    static const char bytes[] = "id,note,gain\n"
                                "ab\xFF" "c,x,2.385\n"                  /* stray byte in an id */
                                "caf\xC3\xA9-7,\"na\xC3\xAFve\",1.5\n"   /* valid two-byte UTF-8 */
                                "r,\"ok \xC3\x28\",3.1\n"              /* cut sequence in a note */
                                "s\xC0\xAF,x,4\n"                        /* overlong '/' */
                                "t\xED\xA0\x80,x,4\n"                   /* a surrogate */
                                "u\xF4\x90\x80\x80,x,4\n";             /* past U+10FFFF */
    cr_assert_eq(read_bytes(bytes, sizeof bytes - 1), PS_OK);
    cr_assert_eq(col.calls, 6);
    expect_entry_error(0, 2, 1, "id", "id: not valid UTF-8 (byte 0xFF at character 3)");
    cr_assert_not(col.failed[1], "%s", col.diag[1].text);
    cr_expect_str_eq(kept(1)->id, "caf\xC3\xA9-7");
    cr_expect_str_eq(kept(1)->note, "na\xC3\xAFve");
    expect_entry_error(2, 4, 2, "note", "note: not valid UTF-8 (byte 0xC3 at character 4)");
    expect_entry_error(3, 5, 1, "id", "byte 0xC0 at character 2");
    expect_entry_error(4, 6, 1, "id", "byte 0xED at character 2");
    expect_entry_error(5, 7, 1, "id", "byte 0xF4 at character 2");
}

Test(csv_reader, control_characters_in_ids_refused)
{
    static const char bytes[] = "id,note,gain\n"
                                "a\x1B[2Jb,x,2.385\n"           /* ESC: a terminal escape */
                                "\"tab\there\",x,1\n"           /* C0 tab */
                                "del\x7F,x,1\n"                  /* DEL */
                                "c1-\xC2\x9B" "31m,x,1\n"         /* C1 CSI in UTF-8 */
                                "ok-\xC2\xA0nbsp,\"tab\tin note\",1\n";
    cr_assert_eq(read_bytes(bytes, sizeof bytes - 1), PS_OK);
    cr_assert_eq(col.calls, 5);
    expect_entry_error(0, 2, 1, "id", "control character U+001B at character 2");
    expect_entry_error(1, 3, 1, "id", "control character U+0009 at character 4");
    expect_entry_error(2, 4, 1, "id", "control character U+007F at character 4");
    expect_entry_error(3, 5, 1, "id", "control character U+009B at character 4");
    cr_assert_not(col.failed[4], "%s", col.diag[4].text);
    cr_expect_str_eq(kept(4)->note, "tab\tin note", "a note may hold a tab");
}

Test(csv_reader, quoted_newlines_keep_physical_lines)
{
    const char *text = "id,note,poles\n"
                       "a,\"two\nlines\",-1\n"    /* row on lines 2-3 */
                       "b,\"x\ny\",-2\n"          /* field 2 spans lines 4-5 (an id may not) */
                       "\n"                       /* blank line 6 is skipped */
                       "d,,-3 q\n";               /* line 7, bad pole */
    cr_assert_eq(read_text(text), PS_OK);
    cr_assert_eq(col.calls, 3);
    cr_expect_eq(kept(0)->line, 2);
    cr_expect_str_eq(kept(0)->note, "two\nlines");
    cr_expect_eq(kept(0)->field_line[PS_F_NOTE], 2);
    cr_expect_eq(kept(0)->field_line[PS_F_POLES], 3);
    cr_expect_eq(kept(1)->line, 4);
    cr_expect_str_eq(kept(1)->note, "x\ny");
    cr_expect_eq(kept(1)->field_line[PS_F_POLES], 5);
    cr_expect_eq(kept(2)->line, 7);
    expect_entry_error(2, 7, 3, "poles", "poles: item 2: expected a decimal number");
}

Test(csv_reader, bom_crlf_and_no_final_newline)
{
    cr_assert_eq(read_text("\xEF\xBB\xBFid,note,denominator\r\np1,,1 2.5\r\np2,\"n\r\n2\",1 3.75"), PS_OK,
                 "%s", fd.text);
    cr_assert_eq(col.calls, 2);
    cr_assert_not(col.failed[0]);
    cr_assert_not(col.failed[1]);
    cr_expect_str_eq(kept(0)->id, "p1");
    cr_expect_eq(kept(0)->den[1], 2.5);
    cr_expect_eq(kept(1)->line, 3);
    cr_expect_eq(kept(1)->n_den, 2);
    cr_expect_eq(kept(1)->den[1], 3.75, "last row without newline is read");
}

Test(csv_reader, header_only_and_blank_lines)
{
    cr_assert_eq(read_text("\n\nid,gain\n\n"), PS_OK);
    cr_expect_eq(col.calls, 0);
}

Test(csv_reader, empty_file_is_an_error)
{
    cr_assert_eq(read_text(""), PS_ERR_SYNTAX);
    cr_expect(strstr(fd.text, "header") != NULL);
    cr_expect_eq(col.calls, 0);
}

Test(csv_reader, long_line_read_in_pieces)
{
    /* A note far over PS_NOTE_MAX and longer than the 64 KiB read chunk: the
     * row is an error, and the next row's line number is still right. */
    size_t n = 200000;
    char *text = malloc(n + 100);
    strcpy(text, "id,note\nlong,\"");
    size_t at = strlen(text);
    memset(text + at, 'x', n);
    strcpy(text + at + n, "\"\nshort,ok\n");
    cr_assert_eq(read_text(text), PS_OK);
    free(text);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 2, 2, "note", "note: longer than 255 bytes");
    cr_expect_str_eq(kept(0)->id, "long");
    cr_assert_not(col.failed[1]);
    cr_expect_eq(kept(1)->line, 3);
}

/* 1e-400 is not 0: the underflow is an error naming the field and item. */
Test(csv_reader, underflow_names_the_field)
{
    cr_assert_eq(read_text("id,poles,gain,delay\np,-2.385 -1e-400,3.1,\nq,-1,2,4.7e-330\nr,-1,2,0e-400\n"), PS_OK);
    cr_assert_eq(col.calls, 3);
    expect_entry_error(0, 2, 2, "poles", "poles: item 2: nonzero number too small");
    expect_entry_error(1, 3, 4, "delay", "delay: nonzero number too small");
    cr_assert_not(col.failed[2], "%s", col.diag[2].text);
    cr_expect(ps_plant_has(kept(2), PS_F_DELAY) && kept(2)->delay == 0.0, "zero stays zero");
}

Test(csv_reader, callback_can_stop)
{
    col.stop_after = 1;
    cr_assert_eq(read_text("id,gain\na,1\nb,2\nc,3\n"), PS_OK);
    cr_expect_eq(col.calls, 1);
}

/* ---- entry errors --------------------------------------------------------- */

Test(csv_reader, bad_number_names_line_field_col)
{
    cr_assert_eq(read_text("id,numerator,denominator\nok,1,1 2\nbad,1,1 2 x3\n"), PS_OK);
    cr_assert_eq(col.calls, 2);
    cr_assert_not(col.failed[0]);
    expect_entry_error(1, 3, 3, "denominator", "denominator: item 3: expected a decimal number");
    cr_expect_str_eq(kept(1)->id, "bad");
    cr_expect_eq(kept(1)->line, 3);
}

Test(csv_reader, strict_numbers_rejected)
{
    cr_assert_eq(read_text("id,gain\na,0x10\nb,inf\nc,nan\nd,1e400\ne,2.5kg\nf,1 2\n"), PS_OK);
    cr_assert_eq(col.calls, 6);
    cr_expect_eq(col.errors, 6);
    expect_entry_error(0, 2, 2, "gain", "hexadecimal");
    expect_entry_error(3, 5, 2, "gain", "out of range");
    expect_entry_error(4, 6, 2, "gain", "unexpected characters");
}

Test(csv_reader, error_text_keeps_first_error_and_id_after_it)
{
    cr_assert_eq(read_text("gain,delay,id\nq,w,late_id\n"), PS_OK);
    expect_entry_error(0, 2, 1, "gain", "gain: expected a decimal number");
    cr_expect_str_eq(kept(0)->id, "late_id");
}

Test(csv_reader, ragged_matrix)
{
    cr_assert_eq(read_text("id,a\ns,0 1; 19.6 0 2\n"), PS_OK);
    expect_entry_error(0, 2, 2, "a", "a: row 2 has 3 entries, row 1 has 2");
}

Test(csv_reader, matrix_bad_entry)
{
    cr_assert_eq(read_text("id,a\ns,0 1; 19.6 zz\n"), PS_OK);
    expect_entry_error(0, 2, 2, "a", "a: row 2, item 2: expected a decimal number");
}

/* A field of n copies of item separated by sep (with optional suffix). */
static char *repeat(const char *item, const char *sep, size_t n)
{
    size_t k = strlen(item) + strlen(sep);
    char *s = malloc(n * k + 1);
    s[0] = '\0';
    for (size_t i = 0; i < n; i++) {
        strcat(s, item);
        if (i + 1 < n)
            strcat(s, sep);
    }
    return s;
}

static void read_one_field(const char *header, const char *field)
{
    size_t n = strlen(header) + strlen(field) + 16;
    char *text = malloc(n);
    snprintf(text, n, "id,%s\np,\"%s\"\n", header, field);
    cr_assert_eq(read_text(text), PS_OK);
    free(text);
    cr_assert_eq(col.calls, 1);
}

Test(csv_reader, coefficients_at_the_limit_accepted)
{
    char *s = repeat("1.25", " ", PS_MAX_ORDER + 1);
    read_one_field("denominator", s);
    free(s);
    cr_assert_not(col.failed[0], "%s", col.diag[0].text);
    cr_expect_eq(kept(0)->n_den, PS_MAX_ORDER + 1);
}

Test(csv_reader, too_many_coefficients)
{
    char *s = repeat("1.25", " ", PS_MAX_ORDER + 2);
    read_one_field("numerator", s);
    free(s);
    expect_entry_error(0, 2, 2, "numerator", "item 66: too many values");
}

Test(csv_reader, too_many_poles_pair_overflows)
{
    char *s = repeat("-1", " ", PS_MAX_ORDER - 1);
    char *t = malloc(strlen(s) + 16);
    sprintf(t, "%s -2+-3j", s); /* 63 + 2 values: one over */
    free(s);
    read_one_field("poles", t);
    free(t);
    expect_entry_error(0, 2, 2, "poles", "poles: item 64: too many values");
}

Test(csv_reader, too_many_b_entries)
{
    char *s = repeat("0.5", " ", PS_MAX_ORDER + 1);
    read_one_field("b", s);
    free(s);
    expect_entry_error(0, 2, 2, "b", "b: item 65: too many values");
}

Test(csv_reader, matrix_too_wide_and_too_tall)
{
    char *wide = repeat("0.5", " ", PS_MAX_ORDER + 1);
    read_one_field("a", wide);
    free(wide);
    expect_entry_error(0, 2, 2, "a", "a: row 1, item 65: too many values");

    ps_plant *keep = col.kept;
    memset(&col, 0, sizeof col);
    col.kept = keep;
    char *tall = repeat("1", ";", PS_MAX_ORDER + 1);
    read_one_field("a", tall);
    free(tall);
    expect_entry_error(0, 2, 2, "a", "a: more than 64 rows");
}

Test(csv_reader, matrix_at_the_limit_accepted)
{
    char *row = repeat("0.5", " ", PS_MAX_ORDER);
    char *m = repeat(row, ";", PS_MAX_ORDER);
    free(row);
    read_one_field("a", m);
    free(m);
    cr_assert_not(col.failed[0], "%s", col.diag[0].text);
    cr_expect_eq(kept(0)->a_rows, PS_MAX_ORDER);
    cr_expect_eq(kept(0)->a_cols, PS_MAX_ORDER);
    cr_expect_eq(kept(0)->a[PS_MAX_ORDER * PS_MAX_ORDER - 1], 0.5);
}

Test(csv_reader, id_too_long)
{
    char *s = repeat("x", "", PS_ID_MAX);
    char text[PS_ID_MAX + 32];
    snprintf(text, sizeof text, "id\n%s\n", s);
    free(s);
    cr_assert_eq(read_text(text), PS_OK);
    expect_entry_error(0, 2, 1, "id", "id: longer than 95 bytes");
}

Test(csv_reader, extra_fields)
{
    cr_assert_eq(read_text("id,gain\np,1,2,3\nq,2\n"), PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 2, 3, "", "too many fields: the header names 2 columns");
    cr_assert_not(col.failed[1]);
}

Test(csv_reader, embedded_nul)
{
    static const char bytes[] = "id,note\np,a\0b\nq,fine\n";
    cr_assert_eq(read_bytes(bytes, sizeof bytes - 1), PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 2, 2, "note", "NUL");
    cr_assert_not(col.failed[1]);
}

/* ---- broken structure ---------------------------------------------------- */

Test(csv_reader, bad_quote_in_the_middle_resyncs)
{
    const char *text = "id,gain,delay\n"
                       "a,1,0\n"
                       "b,\"2\"x,0\n"        /* junk after a closing quote */
                       "c,3,0\n"
                       "d,4\"5,0\n"          /* quote inside an unquoted field */
                       "e,5,0\n";
    cr_assert_eq(read_text(text), PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 5);
    cr_expect_eq(col.errors, 2);
    cr_assert_not(col.failed[0]);
    expect_entry_error(1, 3, 2, "gain", "bad quoting at character 6 of line 3");
    cr_expect_str_eq(kept(1)->id, "b");
    cr_expect_eq(kept(1)->line, 3);
    cr_assert_not(col.failed[2]);
    cr_expect_str_eq(kept(2)->id, "c");
    cr_expect_eq(kept(2)->line, 4);
    cr_expect_eq(kept(2)->gain, 3.0);
    expect_entry_error(3, 5, 2, "gain", "bad quoting");
    cr_assert_not(col.failed[4]);
    cr_expect_eq(kept(4)->line, 6);
    cr_expect_eq(kept(4)->gain, 5.0);
}

Test(csv_reader, bad_quote_after_multiline_field)
{
    /* The broken row starts on line 2; the error is on line 3. */
    cr_assert_eq(read_text("note,id,gain\n\"a\nb\",\"n\"!,1\nc,,2\n"), PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 3, 2, "id", "bad quoting");
    cr_expect_eq(kept(0)->line, 2);
    cr_expect_eq(kept(1)->line, 4);
    cr_expect_eq(kept(1)->gain, 2.0);
}

Test(csv_reader, bad_quote_in_first_field)
{
    cr_assert_eq(read_text("id,gain\n\"a\nb\"c,1\nd,2\n"), PS_OK);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(0, 3, 1, "id", "bad quoting");
    cr_expect_eq(kept(0)->line, 2);
    cr_expect_str_eq(kept(0)->id, "");
    cr_expect_eq(kept(1)->line, 4);
}

Test(csv_reader, unterminated_quote)
{
    cr_assert_eq(read_text("id,note,gain\na,ok,1\nb,2,\"never\nclosed\n3,4\n"), PS_ERR_SYNTAX);
    cr_assert_eq(col.calls, 2);
    cr_assert_not(col.failed[0]);
    expect_entry_error(1, 3, 3, "gain", "opened on line 3 is never closed");
    cr_expect_str_eq(kept(1)->id, "b");
    cr_expect_eq(kept(1)->line, 3);
    cr_expect_eq(fd.line, 3);
    cr_expect(strstr(fd.text, "never closed") != NULL);
}

Test(csv_reader, unterminated_quote_in_first_field)
{
    cr_assert_eq(read_text("id,gain\na,1\n\n\"b\nc,2\n"), PS_ERR_SYNTAX);
    cr_assert_eq(col.calls, 2);
    expect_entry_error(1, 4, 1, "id", "opened on line 4");
    cr_expect_eq(kept(1)->line, 4);
}

Test(csv_reader, oversized_field)
{
    size_t n = (size_t)PS_FIELD_MAX_BYTES + 4096;
    char *text = malloc(n + 64);
    strcpy(text, "id,note\nbig,\"");
    size_t at = strlen(text);
    memset(text + at, 'y', n);
    strcpy(text + at + n, "\"\nnext,1\n");
    cr_assert_eq(read_text(text), PS_ERR_SYNTAX);
    free(text);
    cr_assert_eq(col.calls, 1);
    expect_entry_error(0, 2, 2, "note", "field longer than the limit of 1048576 bytes");
    cr_expect(strstr(col.diag[0].text, "memory") == NULL, "says which one happened: %s", col.diag[0].text);
    cr_expect(strstr(fd.text, "memory") == NULL, "%s", fd.text);
}

/* The allocator failing below the field cap is named as out of memory, not as
 * a field over the limit. The address space is capped in this test's own
 * process (Criterion runs each test in one) a little above what is mapped. */
#if defined(__SANITIZE_ADDRESS__) || defined(__SANITIZE_THREAD__)
#define PS_TEST_SHADOW_MEMORY 1
#elif defined(__has_feature)
#if __has_feature(address_sanitizer) || __has_feature(thread_sanitizer)
#define PS_TEST_SHADOW_MEMORY 1
#endif
#endif

Test(csv_reader, out_of_memory_is_not_called_too_long)
{
#ifdef PS_TEST_SHADOW_MEMORY
    /* ASan and TSan reserve terabytes of shadow address space up front: an
     * address-space cap cannot be set a little above what is mapped. */
    cr_skip_test("address-space cap not possible under a sanitizer's shadow memory");
#endif
    size_t n = 900000; /* below PS_FIELD_MAX_BYTES */
    char *text = malloc(n + 64);
    cr_assert_not_null(text);
    strcpy(text, "id,note\nbig,\"");
    size_t at = strlen(text);
    memset(text + at, 'y', n);
    strcpy(text + at + n, "\"\n");
    const char *path = write_bytes(".csv", text, strlen(text));
    free(text);
    FILE *st = fopen("/proc/self/status", "r");
    cr_assert_not_null(st);
    char line[256];
    unsigned long vm_kb = 0;
    while (fgets(line, sizeof line, st))
        if (sscanf(line, "VmSize: %lu kB", &vm_kb) == 1)
            break;
    fclose(st);
    cr_assert_gt(vm_kb, 0);
    struct rlimit lim = {.rlim_cur = (vm_kb + 320) * 1024, .rlim_max = RLIM_INFINITY};
    cr_assert_eq(setrlimit(RLIMIT_AS, &lim), 0);
    ps_status got = ps_csv_read(path, scratch, collect, &col, &fd);
    lim.rlim_cur = RLIM_INFINITY;
    setrlimit(RLIMIT_AS, &lim);
    remove(path);
    cr_assert_eq(got, PS_ERR_NOMEM, "status %d: %s", (int)got, fd.text);
    cr_expect(strstr(fd.text, "out of memory while reading a field") != NULL, "%s", fd.text);
    cr_expect(strstr(fd.text, "longer than") == NULL, "%s", fd.text);
    cr_assert_eq(col.calls, 1);
    expect_entry_error(0, 2, 2, "note", "out of memory");
}

/* ---- header errors ------------------------------------------------------- */

Test(csv_reader, unknown_column)
{
    cr_assert_eq(read_text("id,foo,gain\np,1,2\n"), PS_ERR_SYNTAX);
    cr_expect_eq(col.calls, 0);
    cr_expect_eq(fd.line, 1);
    cr_expect_eq(fd.col, 2);
    cr_expect_str_eq(fd.field, "foo");
    cr_expect(strstr(fd.text, "unknown column 'foo' (expected one of id, note, numerator, "
                              "denominator, zeros, poles, gain, a, b, c, d, delay, peak_s_allowed, "
                              "peak_t_allowed, band_edge, band_attenuation, rolloff_start, "
                              "rolloff_gain, rolloff_slope, effort_allowed, sample_rate, "
                              "compute_delay, domain)") != NULL,
              "%s", fd.text);
}

Test(csv_reader, header_name_with_raw_bytes_is_not_echoed)
{
    static const char bytes[] = "id,gain\x1B[2J,no\xFFte\np,2.385,x\n";
    cr_assert_eq(read_bytes(bytes, sizeof bytes - 1), PS_ERR_SYNTAX);
    cr_expect_eq(col.calls, 0);
    cr_expect_eq(fd.line, 1);
    cr_expect_eq(fd.col, 2);
    cr_expect(strstr(fd.text, "header column 2: control character U+001B at character 5") != NULL, "%s", fd.text);
    cr_expect(strchr(fd.text, '\x1B') == NULL, "the escape is not in the message");
}

Test(csv_reader, duplicate_column)
{
    cr_assert_eq(read_text("id,gain,poles,gain\np,1,2,3\n"), PS_ERR_SYNTAX);
    cr_expect_eq(col.calls, 0);
    cr_expect_eq(fd.line, 1);
    cr_expect_eq(fd.col, 4);
    cr_expect(strstr(fd.text, "duplicate column 'gain' (already column 2)") != NULL, "%s", fd.text);
}

Test(csv_reader, header_bad_quote)
{
    cr_assert_eq(read_text("id,\"gain\"x\np,1\n"), PS_ERR_SYNTAX);
    cr_expect_eq(col.calls, 0);
    cr_expect_eq(fd.line, 1);
}

/* ---- files ----------------------------------------------------------------- */

Test(csv_reader, missing_file)
{
    ps_status st = ps_csv_read("/nonexistent/dir/plants.csv", scratch, collect, &col, &fd);
    cr_assert_eq(st, PS_ERR_IO);
    cr_expect(strstr(fd.text, strerror(ENOENT)) != NULL, "%s", fd.text);
    cr_expect_str_eq(fd.file, "/nonexistent/dir/plants.csv");
    cr_expect_eq(col.calls, 0);
}

Test(csv_reader, directory_is_an_io_error)
{
    cr_assert_eq(ps_csv_read("/tmp", scratch, collect, &col, &fd), PS_ERR_IO);
    cr_expect_eq(col.calls, 0);
}

Test(csv_reader, catalog_unknown_ending)
{
    const char *path = write_bytes(".txt", "id,gain\np,1\n", 12);
    ps_status st = ps_catalog_read(path, scratch, collect, &col, &fd);
    remove(path);
    cr_assert_eq(st, PS_ERR_IO);
    cr_expect_str_eq(fd.text, "unknown catalog type: expected a .yaml, .yml or .csv file");
    cr_expect_eq(col.calls, 0);
}

Test(csv_reader, catalog_dispatches_csv_case_insensitively)
{
    const char *path = write_bytes(".CSV", "id,gain\np,1.5\n", 14);
    ps_status st = ps_catalog_read(path, scratch, collect, &col, &fd);
    remove(path);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 1);
    cr_expect_eq(kept(0)->gain, 1.5);
}

/* ---- the count law ---------------------------------------------------------- */

Test(csv_reader, every_data_row_gives_exactly_one_call)
{
    /* 9 data rows of every kind (good, bad number, extra field, bad quote,
     * multi-line, all empty, ragged matrix, CR LF inside a list, no final
     * newline), plus blank lines that are not rows. */
    const char *text = "id,numerator,denominator,a\n"
                       "r1,1,1 2,\n"
                       "r2,x,1 2,\n"
                       "r3,1,1 2,,extra\n"
                       "\n"
                       "r4,\"1\"z,1 2,\n"
                       "r5,1,1 2,\"\n\"\n"
                       ",,,\n"
                       "r7,1,1 2,1 2;3\n"
                       "   \n"
                       "r8,1,\"1\r\n2\",\n"
                       "r9";
    cr_assert_eq(read_text(text), PS_OK, "%s", fd.text);
    cr_expect_eq(col.calls, 9);
    cr_expect_eq(col.errors, 6, "r2, r3, r4, r7, r8 and the short r9 fail");
}

/* ---- the digital loop (README "Digital loops") ---------------------------- */

Test(csv_reader, digital_columns)
{
    ps_status st = ps_csv_read(PS_TEST_DATA "/csv/digital.csv", scratch, collect, &col, &fd);
    cr_assert_eq(st, PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 4);
    cr_assert_eq(col.errors, 0, "%s", col.diag[0].text);
    cr_expect_float_eq(kept(0)->sample_period, 1.0 / 4000.0, 1e-18);
    cr_expect_float_eq(kept(0)->compute_delay, 300e-6, 1e-18);
    cr_expect(isnan(kept(0)->compute_delay_samples));
    cr_expect_not(ps_plant_has(kept(0), PS_F_DOMAIN));
    cr_expect_float_eq(kept(1)->sample_period, 0.01, 0);
    cr_expect_float_eq(kept(1)->compute_delay_samples, 2.0, 0);
    cr_expect_not(kept(1)->in_z);
    cr_expect(kept(2)->in_z);
    cr_expect_float_eq(kept(2)->sample_period, 0.002, 1e-18);
    cr_expect_eq(kept(2)->field_col[PS_F_DOMAIN], 8);
    ps_form want[4] = {PS_FORM_FACTORED, PS_FORM_FACTORED, PS_FORM_POLY, PS_FORM_FACTORED};
    double delay[4] = {300e-6, 0.02, 0.002, 0.02};
    for (size_t i = 0; i < 4; i++) {
        ps_plant copy = *kept(i);
        ps_diag d = {0};
        cr_expect_eq(ps_plant_check(&copy, &d), PS_OK, "row %zu: %s", i, d.text);
        cr_expect_eq(copy.form, want[i]);
        cr_expect_float_eq(copy.compute_delay, delay[i], 1e-15, "row %zu", i);
    }
}

Test(csv_reader, digital_cells_need_units)
{
    cr_assert_eq(read_text("id,poles,sample_rate,compute_delay,domain\n"
                           "a,-41.3,1000,,\n"
                           "b,-41.3,1 kHz,2,\n"
                           "c,-41.3,1 kHz,,zz\n"
                           "d,-41.3,-5 Hz,,\n"),
                 PS_OK, "%s", fd.text);
    cr_assert_eq(col.calls, 4);
    expect_entry_error(0, 2, 3, "sample_rate", "a bare number could mean Hz or rad/s");
    expect_entry_error(1, 3, 4, "compute_delay", "needs its unit");
    expect_entry_error(2, 4, 5, "domain", "expected s");
    expect_entry_error(3, 5, 3, "sample_rate", "above 0");
}

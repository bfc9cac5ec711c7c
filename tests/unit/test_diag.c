/* test_diag.c - the diagnostic record: filling, clearing, and the position
 * text that follows a file name (only the parts that are known). */
#include <criterion/criterion.h>
#include <stdio.h>
#include <string.h>

#include "core/diag.h"
#include "support.h"

TestSuite(diag, .init = ps_test_init);

Test(diag, set_and_clear_keep_the_file)
{
    ps_diag d = {0};
    snprintf(d.file, sizeof d.file, "%s", "rig.yaml");
    cr_assert_eq(ps_diag_set(&d, PS_ERR_INPUT, 17, 9, "gain", "gain: %s", "not a number"), PS_ERR_INPUT);
    cr_assert_eq(d.line, 17);
    cr_assert_eq(d.col, 9);
    cr_assert_str_eq(d.field, "gain");
    cr_assert_str_eq(d.text, "gain: not a number");
    ps_diag_clear(&d);
    cr_assert_eq(d.line + d.col, 0);
    cr_assert_str_eq(d.text, "");
    cr_assert_str_eq(d.file, "rig.yaml");
    cr_assert_eq(ps_diag_set(NULL, PS_ERR_IO, 1, 1, NULL, "x"), PS_ERR_IO);
}

Test(diag, position_names_only_what_is_known)
{
    char pos[PS_DIAG_POS];
    cr_assert_str_eq(ps_diag_pos(pos, sizeof pos, 0, 0), "");  /* a file that cannot be opened */
    cr_assert_str_eq(ps_diag_pos(pos, sizeof pos, 0, 7), "");  /* a column without a line means nothing */
    cr_assert_str_eq(ps_diag_pos(pos, sizeof pos, 23, 0), ":23");
    cr_assert_str_eq(ps_diag_pos(pos, sizeof pos, 23, 4), ":23:4");
    cr_assert_str_eq(ps_diag_pos(pos, sizeof pos, (size_t)-1, (size_t)-1), ":18446744073709551615:18446744073709551615");
    cr_assert_str_eq(ps_diag_pos_words(pos, sizeof pos, 0, 0), "");
    cr_assert_str_eq(ps_diag_pos_words(pos, sizeof pos, 0, 7), "");
    cr_assert_str_eq(ps_diag_pos_words(pos, sizeof pos, 23, 0), "line 23");
    cr_assert_str_eq(ps_diag_pos_words(pos, sizeof pos, 23, 4), "line 23, column 4");
    char small[4];
    cr_assert_str_eq(ps_diag_pos(small, sizeof small, 1234, 5), ":12"); /* cut, never overrun */
}

/* html_page.h - the page of the HTML screening report, apart from its figures:
 * the verdict palette, anchors for plant ids, the caps that bound the page, and the first page. */
#ifndef PS_HTML_PAGE_H
#define PS_HTML_PAGE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

#include "screen/screen.h"

/* Caps that keep the page a few MB whatever the number of plants; what they
 * leave out is counted on the page and is in the CSV, JSON and JSON Lines files. */
enum {
    PS_HTML_RANK_ROWS = 500,   /* rows of the ranking table (the worst first) */
    PS_HTML_SECTIONS = 200,    /* plant sections, with their figures: the first ranked plants */
    PS_HTML_BOARD_FLAGGED = 25, /* flagged plants (redesign, not stabilizable) on the first page */
    PS_HTML_ERRORS = 200       /* input errors listed with their file, line and field */
};

/* The colour of a verdict: `background` as "#RRGGBB" and the `text` colour
 * written on it ("#000000" or "#FFFFFF"). Okabe-Ito colours; see html_page.c. */
typedef struct ps_html_colour {
    const char *background;
    const char *text;
} ps_html_colour;
ps_html_colour ps_html_verdict_colour(ps_verdict v);

/* The stated limits the palette is chosen to meet (checked by test_html_page.c):
 * CIE 1976 L* of any two verdict backgrounds differs by at least
 * PS_HTML_MIN_LIGHTNESS_GAP, and the text on each has a WCAG 2.x contrast
 * ratio of at least PS_HTML_MIN_CONTRAST. */
#define PS_HTML_MIN_LIGHTNESS_GAP 10.0
#define PS_HTML_MIN_CONTRAST 4.5

/* Write s escaped for HTML text and attribute values; control characters
 * other than tab and newline become spaces. */
void ps_html_text(FILE *f, const char *s);
/* Write a file path as ps_html_text does, with a line-break opportunity
 * (<wbr>) after each '/' so a long path folds at its directories on a narrow
 * screen; the copied text is unchanged. Used inside class "path". */
void ps_html_path(FILE *f, const char *path);

/* The element id of the plant section of ranked row `rank` (1-based):
 * "p<rank>-" then the id with every byte outside [A-Za-z0-9-] written as
 * "_XX" (hex), so any id gives a valid, unique anchor (the rank makes it
 * unique even for repeated ids). OUT: out (n bytes; cut, never mid-escape,
 * when too small; 16 + 3 * PS_ID_MAX bytes always suffice). */
void ps_html_plant_anchor(char *out, size_t n, size_t rank, const char *id);
/* The element id of ranked row `rank` in the ranking table: "r<rank>". */
void ps_html_row_anchor(char *out, size_t n, size_t rank);

/* Whether ranked row i (0-based) has a plant section / a ranking row. */
bool ps_html_has_section(const ps_run *r, size_t i);
bool ps_html_has_row(const ps_run *r, size_t i);

/* The verdict as a coloured label: mark, word. */
void ps_html_verdict_label(FILE *f, ps_verdict v);

/* The page's own style sheet (after the figures' one): verdict colours,
 * ranking layout (stacked rows below 700 px), print rules. */
void ps_html_page_style(FILE *f);

/* The first page: title(s), date, input files, tool and command line,
 * counts per verdict with a bar chart, the flagged plants with causes and
 * their main targets, and the caution. */
void ps_html_board(FILE *f, const ps_run *r);

/* One sentence naming the files of the report set that hold every plant
 * (<stem>.screen.csv, .json and .plants.jsonl). */
void ps_html_files_sentence(FILE *f, const ps_run *r);

#endif

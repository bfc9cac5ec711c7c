/* reports.h - the screening run written for people and for machines:
 * terminal table, CSV (RFC 4180), JSON (schema in reports/schema/),
 * Markdown and self-contained HTML with inline SVG figures. Every writer
 * takes the ranked run and writes one complete document to f; shared
 * wording (caution, verdict meanings, target sentences) lives here too. */
#ifndef PS_REPORTS_H
#define PS_REPORTS_H

#include <stdbool.h>
#include <stdio.h>

#include "core/diag.h"
#include "screen/screen.h"

/* Version of the screening JSON layout (the summary document and the plant
 * records of the JSON Lines file share it). */
#define PS_SCREEN_SCHEMA_VERSION 6
/* Significant digits of the numbers in a JSON Lines plant record (the CSV's
 * "%.9g" too); the summary document keeps 15. */
#define PS_JSONL_DIGITS 9
/* Caps of the bounded reports, whatever the number of plants:
 * PS_JSON_WORST plants listed in the JSON summary's "worst"; the Markdown
 * ranking table lists the first PS_MD_TABLE_MAX plants and the Markdown
 * gives full detail (cause, targets, note, digital loop) for at most
 * PS_MD_DETAIL_MAX plants: every flagged one (redesign, not stabilizable)
 * and the worst of the rest up to PS_MD_WORST in all, in rank order; its
 * first page lists at most PS_MD_BOARD_MAX plants to send back. */
enum { PS_JSON_WORST = 20, PS_MD_TABLE_MAX = 200, PS_MD_DETAIL_MAX = 200, PS_MD_WORST = 10, PS_MD_BOARD_MAX = 20 };

/* The caution every report carries (one paragraph, plain text). */
extern const char ps_caution_text[];

/* A mark per verdict, different in shape for each, so that a verdict reads
 * without colour (colour-blind readers, greyscale print): every report puts
 * it beside the verdict word. UTF-8, one character. */
const char *ps_verdict_mark(ps_verdict v);

/* The structural flag of a plant in words, and whether a report states it
 * for s: parity interlacing fails (src/limits/floors.c), so every
 * stabilizing controller is itself unstable (Youla, Bongiorno and Lu,
 * Automatica 10, 1974). Not stated for an input error or a plant no
 * controller stabilizes (there it would say nothing). */
extern const char ps_unstable_controller_text[];
bool ps_unstable_controller_claim(const ps_summary *s);

/* Write catalog or command-line text to a terminal or a text file with its
 * control characters as visible escapes (\t, \n, \r, \xHH; C1 as \u00HH). */
void ps_put_visible(FILE *f, const char *s);

/* One sentence on what a verdict means (README "Verdicts"). */
const char *ps_verdict_meaning(ps_verdict v);

/* One line on a target, e.g. "dominant unstable pole must stay below
 * 6.12 rad/s (time to double 113 ms; now 7.9 rad/s)". Empty when the target
 * does not apply. */
void ps_target_text(const ps_summary *s, ps_target_kind k, char *buf, size_t n);

/* Short label of a target kind ("largest unstable pole", ...). */
const char *ps_target_label(ps_target_kind k);

/* Requirements of one plant in one line, marking which were given in the
 * catalog and which are built-in defaults. */
void ps_requirements_text(const ps_summary *s, char *buf, size_t n);


/* The digital loop in words (sampling_words.c); each writes "" for a
 * continuous loop (h == 0). A root in z is flagged as outside the unit circle
 * only when |z| > 1 + PS_CIRCLE_TOL; a zero is called a sampling zero only for
 * a held plant (never for a plant given in z, whose zeros are the model's). */
#define PS_CIRCLE_TOL 1e-9
bool ps_zroot_outside(ps_cplx z);
bool ps_zzero_is_sampling(const ps_floors *fl, bool in_z, size_t i);
/* "sample rate 1000 Hz (period 1 ms), Nyquist frequency 3142 rad/s (500 Hz),
 * computation delay 1 ms (1 sample); continuous plant behind a zero-order hold". */
void ps_sampling_text(double h, double compute_delay, bool in_z, char *buf, size_t n);
/* "poles in z: ...; zeros in z: -3.732 (sampling zero, outside the unit circle), ...; relative degree in z 1". */
void ps_zroots_text(const ps_floors *fl, bool in_z, char *buf, size_t n);
/* The Ms floor over [wb, pi/h] from the discrete Bode area, with its source. */
void ps_nyquist_floor_text(const ps_floors *fl, double wb, char *buf, size_t n);

/* Severity distribution of a run, shared by the JSON summary and the
 * Markdown: PS_HIST_BINS bins, each holding the severities s with
 * above < s <= up_to (the first bin also holds 0), then one bin of the
 * infinite severities (not stabilizable) and one of the plants without a
 * severity (not judged for want of a bandwidth limit, input errors).
 * ps_histogram_bin gives a bin's ends (NAN where it has none). OUT: count. */
enum { PS_HIST_BINS = 10 };
void ps_severity_histogram(const ps_run *r, size_t count[PS_HIST_BINS]);
void ps_histogram_bin(int b, double *above, double *up_to);
const char *ps_histogram_label(int b);

/* The run's title: the first catalog's YAML `catalog` title, NULL when it
 * has none. */
const char *ps_run_title(const ps_run *r);

/* The base name of a run's report files: the first catalog's file name
 * without directory and ending ("plantsieve" when the run has no catalog).
 * The summary and the Markdown name the other files of the set with it. */
enum { PS_STEM_MAX = 256 };
void ps_report_stem(const ps_run *r, char *out, size_t n);

/* Writers. Each returns PS_OK or PS_ERR_IO (PS_ERR_NOMEM for JSON). */
/* The terminal listing: at most `show` rows per section (0: all); a cut
 * section ends with a line saying how many more there are and, when `full`
 * is not NULL, which file holds them all. */
ps_status ps_write_terminal(FILE *f, const ps_run *r, bool colour, size_t show, const char *full);
ps_status ps_write_csv(FILE *f, const ps_run *r);
ps_status ps_write_families_csv(FILE *f, const ps_run *r); /* one row per boundary and yield study */
/* The JSON summary (run provenance, counts, severity distribution, the worst
 * plants, families, the name of the plant file) and the JSON Lines file of
 * every plant's full record, one compact object a line in rank order. */
ps_status ps_write_json(FILE *f, const ps_run *r);
ps_status ps_write_plants_jsonl(FILE *f, const ps_run *r);
ps_status ps_write_markdown(FILE *f, const ps_run *r);
ps_status ps_write_html(FILE *f, const ps_run *r);
/* JUnit XML (common-practice layout, src/report/junit_report.c): one
 * <testsuite> for the run, one <testcase> per plant in rank order (name: the
 * id, classname: the catalog); redesign and not-stabilizable as <failure>,
 * needs-bandwidth and input errors as <error> (not judged), clear and
 * marginal pass (a marginal plant's cause in <system-out>); a catalog not
 * read to the end adds one <testcase> with an <error>. */
ps_status ps_write_junit(FILE *f, const ps_run *r);

typedef ps_status (*ps_writer_fn)(FILE *f, const ps_run *r);

/* What a catalog not read to the end left out, as a sentence without a final
 * period: "the entries after line L were not read; their number is not
 * known, ...", or, when the stop has no line (line 0), the same about the
 * point where reading stopped. Counting them would mean parsing past a break in
 * the file's structure, so no number is given. OUT: out (n bytes). */
void ps_unread_text(size_t line, char *out, size_t n);

/* Family studies (src/report/family_report.c): a section of the text report,
 * of the Markdown report (cell escapes a table cell), one boundary in words. */
struct ps_family_result;
struct ps_boundary;
void ps_text_families(FILE *f, const ps_run *r);
void ps_md_families(FILE *f, const ps_run *r, void (*cell)(FILE *, const char *));
void ps_boundary_text(const struct ps_family_result *fr, const struct ps_boundary *b, char *out, size_t n);
/* A yield study in words (share passing among the units that could be
 * evaluated, culprit, redrawn draws per ranged parameter), and its warning
 * line on invalid units ("" when every unit could be evaluated). */
void ps_yield_text(const struct ps_family_result *fr, char *out, size_t n);
void ps_yield_warning_text(const struct ps_family_result *fr, char *out, size_t n);

/* Write dir/name through a temporary file in dir and rename(2): readers see
 * the old file or the complete new one, never half a report. The temporary
 * is removed on failure. d gets the reason. */
ps_status ps_write_atomic(const char *dir, const char *name, ps_writer_fn fn, const ps_run *r, ps_diag *d);

#endif

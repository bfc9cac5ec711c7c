/* test_html_page.c - the page of the HTML report: verdict colours measured by
 * the WCAG 2.x and CIE formulas, plant anchors, the caps that bound the page,
 * links in both directions, and the first page's facts. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "report/html_page.h"
#include "report/reports.h"
#include "screen/screen.h"
#include "support.h"

TestSuite(html_page, .init = ps_test_init);

/* ---- colour measures ---- */

/* "#RRGGBB" to three 8-bit channels; fails the test on anything else. */
static void parse_hex(const char *hex, int rgb[3])
{
    cr_assert(hex && strlen(hex) == 7 && hex[0] == '#', "colour '%s' is not #RRGGBB", hex ? hex : "(null)");
    for (int i = 0; i < 3; i++) {
        char part[3] = {hex[1 + 2 * i], hex[2 + 2 * i], '\0'};
        char *end;
        long v = strtol(part, &end, 16);
        cr_assert(*end == '\0', "colour '%s'", hex);
        rgb[i] = (int)v;
    }
}

/* Relative luminance, WCAG 2.1 "relative luminance" definition (sRGB
 * channel c/255 linearised: c/12.92 up to 0.03928, else ((c+0.055)/1.055)^2.4;
 * L = 0.2126 R + 0.7152 G + 0.0722 B). */
static double luminance(const char *hex)
{
    int rgb[3];
    parse_hex(hex, rgb);
    double lin[3];
    for (int i = 0; i < 3; i++) {
        double c = rgb[i] / 255.0;
        lin[i] = c <= 0.03928 ? c / 12.92 : pow((c + 0.055) / 1.055, 2.4);
    }
    return 0.2126 * lin[0] + 0.7152 * lin[1] + 0.0722 * lin[2];
}

/* Contrast ratio, WCAG 2.1 "contrast ratio" definition: (L1 + 0.05) / (L2 + 0.05), L1 the lighter. */
static double contrast(double a, double b)
{
    return (fmax(a, b) + 0.05) / (fmin(a, b) + 0.05);
}

/* Greyscale lightness: CIE 1976 L* of the luminance (ISO/CIE 11664-4:
 * 116 f(Y) - 16, f(t) = t^(1/3) above (6/29)^3, else t / (3 (6/29)^2) + 4/29). */
static double lightness(double y)
{
    const double d = 6.0 / 29.0;
    double f = y > d * d * d ? cbrt(y) : y / (3 * d * d) + 4.0 / 29.0;
    return 116 * f - 16;
}

/* The formulas themselves, on values the standards' readers know: white
 * 1.0 / L* 100, black 0 / L* 0, black on white 21:1, mid grey #777777
 * 4.48:1 on white (the well-known just-failing grey), L* of Y 0.18 = 49.5. */
Test(html_page, colour_formulas_match_known_values)
{
    cr_assert_float_eq(luminance("#FFFFFF"), 1.0, 1e-12);
    cr_assert_float_eq(luminance("#000000"), 0.0, 1e-12);
    cr_assert_float_eq(contrast(luminance("#000000"), luminance("#FFFFFF")), 21.0, 1e-9);
    cr_assert_float_eq(contrast(luminance("#777777"), luminance("#FFFFFF")), 4.48, 5e-3);
    cr_assert_float_eq(lightness(1.0), 100.0, 1e-9);
    cr_assert_float_eq(lightness(0.18), 49.5, 0.05);
}

/* Every pair of verdict colours differs in greyscale lightness by at least
 * PS_HTML_MIN_LIGHTNESS_GAP, and the text on each meets PS_HTML_MIN_CONTRAST
 * (WCAG 2.1 success criterion 1.4.3, contrast minimum 4.5:1 for normal text). */
Test(html_page, verdict_colours_differ_in_greyscale_and_carry_readable_text)
{
    double L[PS_VERDICT_COUNT];
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        ps_html_colour c = ps_html_verdict_colour((ps_verdict)v);
        double yb = luminance(c.background), yt = luminance(c.text);
        L[v] = lightness(yb);
        double ratio = contrast(yb, yt);
        fprintf(stderr, "verdict %-16s background %s luminance %.4f L* %5.1f text %s contrast %5.2f:1\n",
                ps_verdict_name((ps_verdict)v), c.background, yb, L[v], c.text, ratio);
        cr_assert(ratio >= PS_HTML_MIN_CONTRAST, "%s: text contrast %.2f:1 below %.1f:1", ps_verdict_name((ps_verdict)v),
                  ratio, PS_HTML_MIN_CONTRAST);
    }
    double gap = INFINITY;
    for (int a = 0; a < PS_VERDICT_COUNT; a++)
        for (int b = a + 1; b < PS_VERDICT_COUNT; b++) {
            double d = fabs(L[a] - L[b]);
            gap = fmin(gap, d);
            cr_assert(d >= PS_HTML_MIN_LIGHTNESS_GAP, "%s and %s: L* %.1f and %.1f differ by %.1f < %.1f",
                      ps_verdict_name((ps_verdict)a), ps_verdict_name((ps_verdict)b), L[a], L[b], d,
                      PS_HTML_MIN_LIGHTNESS_GAP);
        }
    fprintf(stderr, "smallest L* difference between two verdict colours: %.1f\n", gap);
}

/* ---- a run of many plants ---- */

static ps_summary *add_plant(ps_run *r, const char *id, ps_verdict v, double severity)
{
    ps_summary *s = ps_run_next(r);
    cr_assert_not_null(s);
    size_t order = s->order, file_index = s->file_index;
    memset(s, 0, sizeof *s);
    s->order = order;
    s->file_index = file_index;
    snprintf(s->id, sizeof s->id, "%s", id);
    s->line = 3 + order;
    s->verdict = v;
    s->severity = severity;
    s->share_ms = s->share_mt = s->share_effort = NAN;
    s->worst = "Ms";
    snprintf(s->cause, sizeof s->cause, "cause of %s", id);
    s->fl.ms = s->fl.mt = 1.5;
    s->fl.ms_ln = s->fl.mt_ln = log(1.5);
    s->fl.limiting = "interpolation";
    s->fl.parity_interlacing = true;
    s->req = (ps_requirements){.ms_allowed = 2.0, .mt_allowed = 1.25, .wh = 377.0, .delta = 0.5, .k = 1.0};
    for (int k = 0; k < PS_TARGET_COUNT; k++)
        s->target[k] = (ps_target){.state = PS_TARGET_NA, .now = NAN, .limit = NAN};
    s->n_poles = 2;
    s->poles[0] = (ps_cplx){2.385, 0};
    s->poles[1] = (ps_cplx){-7.1, 0};
    s->n_rhp_poles = 1;
    return s;
}

static char *render(const ps_run *r, size_t *len)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    cr_assert_eq(ps_write_html(f, r), PS_OK);
    fclose(f);
    if (len)
        *len = n;
    return buf;
}

static size_t count_of(const char *hay, const char *needle)
{
    size_t n = 0;
    for (const char *p = strstr(hay, needle); p; p = strstr(p + 1, needle))
        n++;
    return n;
}

/* n plants with ids "unit <k>/\"x\"" (spaces, slash, quotes: ids that need
 * encoding), redesign for the first n_flagged, clear after. */
static void build_many(ps_run *r, size_t n, size_t n_flagged)
{
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(r, &opt);
    cr_assert_eq(ps_run_add_catalog(r, "data/big run.yaml", NULL), PS_OK);
    for (size_t k = 0; k < n; k++) {
        char id[64];
        snprintf(id, sizeof id, "unit %zu/\"x\"", k);
        bool bad = k < n_flagged;
        add_plant(r, id, bad ? PS_VERDICT_REDESIGN : PS_VERDICT_CLEAR, bad ? 1.5 + 1e-3 * (double)k : 0.3);
        ps_run_commit(r);
    }
    r->counts = (ps_batch_counts){.entries = n, .models = n};
    ps_run_rank(r);
}

/* Every href="#x" of the page names an element id="x", ids are unique. */
static void check_links(const char *doc)
{
    size_t n_ids = 0, cap = 4096;
    char **ids = calloc(cap, sizeof *ids);
    cr_assert_not_null(ids);
    for (const char *p = strstr(doc, " id=\""); p; p = strstr(p + 1, " id=\"")) {
        const char *a = p + 5, *e = strchr(a, '"');
        cr_assert_not_null(e);
        cr_assert(n_ids < cap);
        ids[n_ids++] = strndup(a, (size_t)(e - a));
    }
    for (size_t i = 0; i < n_ids; i++)
        for (size_t j = i + 1; j < n_ids; j++)
            cr_assert_str_neq(ids[i], ids[j], "id '%s' twice", ids[i]);
    size_t links = 0;
    for (const char *p = strstr(doc, "href=\"#"); p; p = strstr(p + 1, "href=\"#")) {
        const char *a = p + 7, *e = strchr(a, '"');
        bool found = false;
        for (size_t i = 0; i < n_ids && !found; i++)
            found = strlen(ids[i]) == (size_t)(e - a) && strncmp(ids[i], a, (size_t)(e - a)) == 0;
        cr_assert(found, "link to '%.*s' has no target", (int)(e - a), a);
        links++;
    }
    cr_assert(links > 0);
    for (size_t i = 0; i < n_ids; i++)
        free(ids[i]);
    free(ids);
}

Test(html_page, caps_bound_the_page_and_say_so)
{
    static ps_run r;
    size_t n = PS_HTML_RANK_ROWS + 137, n_flagged = PS_HTML_BOARD_FLAGGED + 4;
    build_many(&r, n, n_flagged);
    size_t len;
    char *doc = render(&r, &len);
    cr_assert_eq(count_of(doc, "<tr class=\"plant-row\""), PS_HTML_RANK_ROWS);
    cr_assert_eq(count_of(doc, "<article class=\"plant"), PS_HTML_SECTIONS);
    /* Figures: one map per section, and the severity bars. */
    cr_assert_eq(count_of(doc, "<svg "), PS_HTML_SECTIONS + 1);
    char want[200];
    snprintf(want, sizeof want, "Showing %d of %zu plants.", PS_HTML_RANK_ROWS, n);
    cr_assert_not_null(strstr(doc, want), "%s", want);
    snprintf(want, sizeof want, "Showing %d of %zu plants</span>", PS_HTML_SECTIONS, n);
    cr_assert_not_null(strstr(doc, want), "%s", want);
    snprintf(want, sizeof want, "showing %d of %zu here", PS_HTML_BOARD_FLAGGED, n_flagged);
    cr_assert_not_null(strstr(doc, want), "%s", want);
    cr_assert_eq(count_of(doc, "<ol class=\"flagged-list\">"), 1);
    /* The files that hold every plant, named as the report set names them. */
    cr_assert_not_null(strstr(doc, "<code class=\"tok\">big run.screen.csv</code>"));
    cr_assert_not_null(strstr(doc, "<code class=\"tok\">big run.screen.json</code>"));
    cr_assert_not_null(strstr(doc, "<code class=\"tok\">big run.screen.plants.jsonl</code>"));
    /* Each of the first PS_HTML_SECTIONS rows links to its section and back. */
    char anchor[16 + 3 * PS_ID_MAX], link[40 + sizeof anchor];
    ps_html_plant_anchor(anchor, sizeof anchor, PS_HTML_SECTIONS, "unit 199/\"x\"");
    snprintf(link, sizeof link, "href=\"#%s\"", anchor);
    cr_assert_eq(count_of(doc, link), 1, "%s", link);
    snprintf(link, sizeof link, "id=\"%s\"", anchor);
    cr_assert_eq(count_of(doc, link), 1, "%s", link);
    snprintf(link, sizeof link, "href=\"#r%d\"", PS_HTML_SECTIONS);
    cr_assert_eq(count_of(doc, link), 1, "%s", link);
    ps_html_plant_anchor(anchor, sizeof anchor, PS_HTML_SECTIONS + 1, "unit 200/\"x\"");
    cr_assert_null(strstr(doc, anchor), "row %d has no section, so no link", PS_HTML_SECTIONS + 1);
    check_links(doc);
    fprintf(stderr, "HTML of %zu plants: %zu bytes\n", n, len);
    free(doc);
    ps_run_free(&r);
}

/* The bytes do not grow with the number of plants past the caps. */
Test(html_page, size_bounded_past_the_caps)
{
    static ps_run a, b;
    build_many(&a, PS_HTML_RANK_ROWS + 10, 30);
    build_many(&b, 4 * PS_HTML_RANK_ROWS, 30);
    size_t la, lb;
    free(render(&a, &la));
    free(render(&b, &lb));
    /* Only digits of the counts differ. */
    cr_assert(lb <= la + 64, "%zu plants: %zu bytes; %zu plants: %zu bytes", a.n_rows, la, b.n_rows, lb);
    ps_run_free(&a);
    ps_run_free(&b);
}

/* ---- anchors ---- */

Test(html_page, anchors_are_valid_and_unique_for_odd_ids)
{
    static const char *const ids[] = {"a b", "a_20b", "a_b", "a-b", "a.b", "ä\"<b>", "glide-gap[gap=0.012]", "", "#x",
                                      "a b"};
    enum { N = sizeof ids / sizeof ids[0] };
    char out[N][16 + 3 * PS_ID_MAX];
    for (size_t i = 0; i < N; i++) {
        /* the same rank for all but the repeated id: the encoding alone keeps them apart */
        ps_html_plant_anchor(out[i], sizeof out[i], i + 1 < N ? 7 : 8, ids[i]);
        cr_assert(out[i][0] == 'p', "%s", out[i]);
        for (const char *c = out[i]; *c; c++)
            cr_assert((*c >= 'a' && *c <= 'z') || (*c >= 'A' && *c <= 'Z') || (*c >= '0' && *c <= '9') || *c == '-' ||
                          *c == '_',
                      "'%s' holds '%c'", out[i], *c);
        for (size_t j = 0; j < i; j++)
            cr_assert_str_neq(out[i], out[j], "'%s' and '%s' share an anchor", ids[i], ids[j]);
    }
    cr_assert_str_eq(out[0], "p7-a_20b");
    cr_assert_str_eq(out[1], "p7-a_5F20b");
    cr_assert_str_eq(out[6], "p7-glide-gap_5Bgap_3D0_2E012_5D");
    /* Too small a buffer cuts before an escape, never inside it. */
    char small[9];
    ps_html_plant_anchor(small, sizeof small, 7, "ab\"cd");
    cr_assert_str_eq(small, "p7-ab_22");
    ps_html_plant_anchor(small, sizeof small, 7, "abc\"d");
    cr_assert_str_eq(small, "p7-abc");
}

/* ---- the first page ---- */

static char *board_of(const ps_run *r)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    ps_html_board(f, r);
    fclose(f);
    return buf;
}

Test(html_page, first_page_holds_the_run_facts)
{
    static ps_run r;
    build_many(&r, 3, 1);
    free(r.catalogs[0].title);
    r.catalogs[0].title = strdup("Gimbal <variants> & more");
    snprintf(r.catalogs[0].sha256, sizeof r.catalogs[0].sha256, "%s",
             "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    r.catalogs[0].bytes = 23859;
    r.meta.command_line = strdup("plantsieve screen -o 'out dir' data/big\\ run.yaml");
    char *doc = board_of(&r);
    cr_assert_not_null(strstr(doc, "<h1>Screening report: Gimbal &lt;variants&gt; &amp; more</h1>"));
    cr_assert_null(strstr(doc, "Date:"), "no date without SOURCE_DATE_EPOCH");
    cr_assert_not_null(strstr(doc, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"));
    cr_assert_not_null(strstr(doc, ">23859</td>"));
    cr_assert_not_null(strstr(doc, PS_VERSION));
    cr_assert_not_null(strstr(doc, "<code class=\"cmd\">plantsieve screen -o &#39;out dir&#39; data/big\\ run.yaml</code>"));
    /* The caution once, its own "Caution:" in bold, no heading repeating the word. */
    cr_assert_not_null(strstr(doc, "<strong>Caution:</strong> ") );
    cr_assert_not_null(strstr(doc, ps_caution_text + strlen("Caution: ")));
    size_t n_caution = 0;
    for (const char *c = strstr(doc, "Caution"); c; c = strstr(c + 1, "Caution"))
        n_caution++;
    cr_assert_eq(n_caution, 1, "the word Caution %zu times", n_caution);
    /* Counts per verdict: word, mark and a bar whose width is the share. */
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        char label[200];
        snprintf(label, sizeof label, "<span class=\"mark\" aria-hidden=\"true\">%s</span> %s</span>",
                 ps_verdict_mark((ps_verdict)v), ps_verdict_name((ps_verdict)v));
        cr_assert_not_null(strstr(doc, label), "%s", label);
    }
    cr_assert_not_null(strstr(doc, "<span class=\"bar v-redesign\" style=\"width:33.3%\""));
    cr_assert_not_null(strstr(doc, "<span class=\"bar v-clear\" style=\"width:66.7%\""));
    cr_assert_not_null(strstr(doc, "cause of unit 0/&quot;x&quot;."));
    free(doc);
    snprintf(r.meta.date, sizeof r.meta.date, "2026-12-05T05:14:02Z");
    doc = board_of(&r);
    cr_assert_not_null(strstr(doc, "Date: <time>2026-12-05T05:14:02Z</time>"));
    free(doc);
    ps_run_free(&r);
}

/* The colours the page uses are the table's: one rule per verdict. */
Test(html_page, style_uses_the_palette)
{
    char *buf = NULL;
    size_t n = 0;
    FILE *f = open_memstream(&buf, &n);
    cr_assert_not_null(f);
    ps_html_page_style(f);
    fclose(f);
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        ps_html_colour c = ps_html_verdict_colour((ps_verdict)v);
        char rule[120];
        snprintf(rule, sizeof rule, ".v-%s{background:%s;color:%s}", ps_verdict_name((ps_verdict)v), c.background,
                 c.text);
        cr_assert_not_null(strstr(buf, rule), "%s", rule);
    }
    cr_assert_not_null(strstr(buf, "@media print"));
    cr_assert_not_null(strstr(buf, "@media (max-width:700px)"));
    free(buf);
}

/* The note (tabs, line breaks, markup) in the section and shortened in the
 * ranking; the structural flag only where parity interlacing fails. */
Test(html_page, note_and_structural_flag)
{
    static ps_run r;
    ps_screen_opts opt = {.marginal_at = 0.8};
    ps_run_init(&r, &opt);
    cr_assert_eq(ps_run_add_catalog(&r, "c.yaml", NULL), PS_OK);
    ps_summary *s = add_plant(&r, "odd-parity", PS_VERDICT_REDESIGN, 1.7);
    s->fl.parity_interlacing = false;
    snprintf(s->note, sizeof s->note, "rev B\tmotor <2>\nsecond line of a long note that goes on and on past sixty "
                                      "characters");
    ps_run_commit(&r);
    s = add_plant(&r, "even-parity", PS_VERDICT_CLEAR, 0.2);
    ps_run_commit(&r);
    r.counts = (ps_batch_counts){.entries = 2, .models = 2};
    ps_run_rank(&r);
    char *doc = render(&r, NULL);
    cr_assert_not_null(strstr(doc, "<p class=\"note\">Note: rev B\tmotor &lt;2&gt;\nsecond line of a long note"));
    cr_assert_not_null(strstr(doc, "<span class=\"note-short\">rev B\tmotor &lt;2&gt;\nsecond line of a long note "
                                   "that goes on and ...</span>"));
    cr_assert_eq(count_of(doc, "Every stabilizing controller is itself unstable"), 1);
    const char *flag = strstr(doc, "Every stabilizing controller is itself unstable");
    const char *sec = strstr(doc, "data-id=\"odd-parity\" data-verdict=\"redesign\">\n<h3>");
    const char *other = strstr(doc, "data-id=\"even-parity\" data-verdict=\"clear\">\n<h3>");
    cr_assert(sec && other && sec < flag && flag < other, "the flag is in odd-parity's section");
    free(doc);
    ps_run_free(&r);
}

/* A path folds only at its directories: <wbr> after each '/' that is followed
 * by more text, the text itself escaped and otherwise unchanged. */
static char *path_html(const char *path)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    cr_assert_not_null(f);
    ps_html_path(f, path);
    fclose(f);
    return buf;
}

Test(html_page, path_breaks_only_after_slashes)
{
    struct {
        const char *in, *want;
    } cases[] = {
        {"/srv/a b/c.yaml", "/<wbr>srv/<wbr>a b/<wbr>c.yaml"},
        {"plain.yaml", "plain.yaml"},
        {"dir/", "dir/"},
        {"x<&>/y\"z", "x&lt;&amp;&gt;/<wbr>y&quot;z"},
        {"", ""},
    };
    for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
        char *got = path_html(cases[i].in);
        cr_expect_str_eq(got, cases[i].want, "path %zu", i);
        free(got);
    }
    /* a directory name longer than the copy buffer comes out whole */
    char longp[700];
    memset(longp, 'd', 600);
    strcpy(longp + 600, "/f");
    char *got = path_html(longp);
    char want[720];
    memcpy(want, longp, 600);
    strcpy(want + 600, "/<wbr>f");
    cr_expect_str_eq(got, want);
    free(got);
}

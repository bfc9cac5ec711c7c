/* html_report.c - the screening run as one self-contained HTML5 page: inline
 * style, no script, no external assets, figures as inline SVG; prints in black on white. */
#include "report/reports.h"
#include "report/certificate.h"
#include "report/html_page.h"
#include "core/diag.h"
#include "core/text.h"
#include "report/plot.h"

#include <math.h>
#include <stdbool.h>
#include <string.h>

#include "screen/study.h"

/* ---- text ---- */

/* Write s escaped for HTML text and attribute values. Control characters
 * other than tab and newline become spaces (they are not allowed in HTML). */
/* Figures per kind (severity bars, pole/zero maps, band curves): the worst
 * plants first; a longer run's others are in the table, CSV and JSON. */
enum { PS_HTML_FIGURES = 300 };

static void h_text(FILE *f, const char *s)
{
    ps_html_text(f, s);
}

/* A value for a table cell: "%.4g", or a word when it has no finite value. */
static void h_num(FILE *f, double x)
{
    if (isfinite(x))
        fprintf(f, "%.4g", x);
    else
        fputs(isinf(x) ? "infinite" : "n/a", f);
}

/* A floor: as h_num, and past a double's range as a power of ten from its logarithm. */
static void h_big(FILE *f, double x, double ln)
{
    char b[48];
    if (isinf(x) && x > 0 && isfinite(ln))
        fputs(ps_text_big(b, sizeof b, x, ln, 4), f);
    else
        h_num(f, x);
}

/* Copy at most max_chars UTF-8 characters of src into dst (size n), with
 * "..." when shortened; never cuts a multi-byte character. */
static void fit_label(char *dst, size_t n, const char *src, size_t max_chars)
{
    size_t i = 0, chars = 0;
    while (src[i] && chars < max_chars) {
        i++;
        while (((unsigned char)src[i] & 0xC0) == 0x80)
            i++;
        chars++;
    }
    if (!src[i] || i + 4 > n) {
        snprintf(dst, n, "%.*s", (int)(i < n ? i : n - 1), src);
        return;
    }
    snprintf(dst, n, "%.*s...", (int)i, src);
}

static const char *catalog_of(const ps_run *r, const ps_summary *s)
{
    return s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : "";
}

static bool is_flagged(const ps_summary *s)
{
    return s->verdict == PS_VERDICT_REDESIGN || s->verdict == PS_VERDICT_UNSTABILIZABLE;
}

/* ---- style ---- */

static const char style_sheet[] =
    "html{background:#fff;color:#000}\n"
    "body{font-family:sans-serif;font-size:14px;line-height:1.45;max-width:76em;margin:1.5em auto;padding:0 1em;"
    "color:#000;background:#fff}\n"
    "h1{font-size:1.6em;margin:0 0 .2em}h2{font-size:1.25em;border-bottom:1px solid #000;margin-top:1.6em}"
    "h3{font-size:1.05em;margin:1.2em 0 .3em}\n"
    "table{border-collapse:collapse;margin:.5em 0}table.ranking{width:100%;font-size:.92em}td.cause{min-width:12em}\n"
    "td.id{word-break:break-word;min-width:6em}td.src{word-break:break-all;font-size:.9em;min-width:8em}"
    "td.verdict{white-space:nowrap}th,td{border:1px solid #777;padding:.2em .45em;"
    "vertical-align:top;text-align:left}\n"
    "th{font-weight:bold;border-bottom:2px solid #000}td.num{text-align:right;font-variant-numeric:tabular-nums;"
    "white-space:nowrap}\n"
    "tr[data-verdict=redesign] td.verdict,tr[data-verdict=not-stabilizable] td.verdict{font-weight:bold}\n"
    "tr[data-verdict=not-stabilizable] td.verdict{text-decoration:underline}\n"
    "tr[data-verdict=input-error] td{font-style:italic}\n"
    ".meta{margin:.2em 0}.caution{border:2px solid #000;padding:.4em .8em;margin:1em 0}"
    ".caution h2{border:none;margin:.2em 0}\n"
    "figure{margin:1em 0;break-inside:avoid;page-break-inside:avoid}figcaption{font-size:.9em;max-width:52em}\n"
    ".figs{display:flex;flex-wrap:wrap;gap:1em 2em}.figs figure{margin:.5em 0;max-width:400px}\n"
    "article.flagged{break-inside:avoid;page-break-inside:avoid;border-top:1px solid #777}\n"
    "svg{max-width:100%;height:auto;background:#fff}\n"
    "svg text{font-family:sans-serif;font-size:11px;fill:#000}svg text.title{font-size:12px;font-weight:bold}\n"
    "svg text.small{font-size:10px}svg text.value{paint-order:stroke;stroke:#fff;stroke-width:3px;"
    "stroke-linejoin:round}\n"
    "svg line{stroke:#000;stroke-width:1}svg line.grid{stroke:#aaa;stroke-width:.6;stroke-dasharray:2 2}\n"
    "svg line.halo{stroke:#fff;stroke-width:4.5}svg line.limit{stroke-width:1.8}svg line.marginal{stroke-width:1.2;stroke-dasharray:6 3}\n"
    "svg line.required{stroke-width:1.2;stroke-dasharray:1.5 2.5}svg line.promise{stroke-width:1.8}\n"
    "svg .frame{fill:none;stroke:#000;stroke-width:1}svg .rhp{fill:#e2e2e2;stroke:none}\n"
    "svg .bar-clear{fill:#c8c8c8;stroke:#000;stroke-width:.6}svg .bar-marginal{fill:#808080;stroke:#000;"
    "stroke-width:.6}\n"
    "svg .bar-redesign{fill:#000}svg .bar-unstab{fill:url(#ps-hatch);stroke:#000;stroke-width:1}\n"
    "svg .pole{stroke:#000;stroke-width:1.7}svg .zero{fill:#fff;stroke:#000;stroke-width:1.5}\n"
    "svg .curve{fill:none;stroke:#000;stroke-width:1.8}svg .clipmark{fill:#000}\n"
    "svg .pt-pass{fill:#fff;stroke:#000;stroke-width:1.5}svg .pt-fail{fill:#000;stroke:#000;stroke-width:1}"
    "svg .flip{fill:#e2e2e2;stroke:none}\n"
    "svg .bar-unstab-y{stroke:#000;stroke-width:1}svg .bar-unread{fill:#fff;stroke:#000;stroke-width:.6;"
    "stroke-dasharray:2 1}\n"
    "article.family{border-top:1px solid #777}.figs figure.family-boundary{max-width:500px}"
    "figure.family-yield{max-width:700px}\n"
    "@media print{body{max-width:none;margin:0;padding:0;font-size:10pt}"
    "h2{break-after:avoid;page-break-after:avoid}tr{break-inside:avoid}"
    "table.ranking{font-size:7pt}table.ranking th,table.ranking td{padding:.15em .25em}"
    "td.cause,td.src{min-width:0}td.id{min-width:5.5em}td.verdict{white-space:normal}"
    "*{-webkit-print-color-adjust:exact;print-color-adjust:exact}}\n"
    "@page{margin:14mm}\n";

/* ---- ranking ---- */

/* One ranked row: the plant's id links to its section (when it has one),
 * each cell carries its column name for the stacked layout of narrow screens. */
static const char *base_name(const char *path)
{
    const char *slash = strrchr(path, '/');
    return slash ? slash + 1 : path;
}

/* The ranking names a catalog by its file name alone (the first page has
 * the paths) unless two catalogs of the run share a file name. */
static bool short_catalog_names(const ps_run *r)
{
    for (size_t i = 0; i < r->n_catalogs; i++)
        for (size_t j = i + 1; j < r->n_catalogs; j++)
            if (strcmp(base_name(r->catalogs[i].file), base_name(r->catalogs[j].file)) == 0)
                return false;
    return true;
}

static void ranking_row(FILE *f, const ps_run *r, size_t i, const ps_summary *s, bool short_names)
{
    bool unread = s->verdict == PS_VERDICT_UNREAD;
    char anchor[16 + 3 * PS_ID_MAX], row[32];
    ps_html_row_anchor(row, sizeof row, i + 1);
    fprintf(f, "<tr class=\"plant-row\" id=\"%s\" data-id=\"", row);
    h_text(f, s->id);
    fprintf(f, "\" data-verdict=\"%s\"><td class=\"num\" data-label=\"Rank\">%zu</td>"
               "<th scope=\"row\" class=\"id\" data-label=\"Plant\">",
            ps_verdict_name(s->verdict), i + 1);
    if (ps_html_has_section(r, i)) {
        ps_html_plant_anchor(anchor, sizeof anchor, i + 1, s->id);
        fprintf(f, "<a class=\"tok\" href=\"#%s\">", anchor);
        h_text(f, s->id[0] ? s->id : "(no id)");
        fprintf(f, "</a>");
    } else {
        fprintf(f, "<span class=\"tok\">");
        h_text(f, s->id[0] ? s->id : "(no id)");
        fprintf(f, "</span>");
    }
    if (s->note[0]) {
        char note[200];
        fit_label(note, sizeof note, s->note, 60);
        fprintf(f, "<span class=\"note-short\">");
        h_text(f, note);
        fprintf(f, "</span>");
    }
    fprintf(f, "</th><td class=\"verdict\" data-label=\"Verdict\">");
    ps_html_verdict_label(f, s->verdict);
    fprintf(f, "</td><td class=\"num\" data-label=\"Severity\">");
    if (isfinite(s->severity))
        fprintf(f, "%.3f", s->severity);
    else
        fputs(isinf(s->severity) ? "infinite" : "n/a", f);
    fprintf(f, "</td><td data-label=\"Worst\">%s</td>", unread ? "n/a" : s->worst);
    if (unread)
        fprintf(f, "<td class=\"num\" data-label=\"Ms floor\">n/a</td><td class=\"num\" data-label=\"Ms allowed\">n/a"
                   "</td><td class=\"num\" data-label=\"Mt floor\">n/a</td><td class=\"num\" data-label=\"Mt allowed\">"
                   "n/a</td><td data-label=\"Limiting\">n/a</td>");
    else {
        fprintf(f, "<td class=\"num\" data-label=\"Ms floor\">");
        h_big(f, s->fl.ms, s->fl.ms_ln);
        fprintf(f, "</td><td class=\"num\" data-label=\"Ms allowed\">");
        h_num(f, s->req.ms_allowed);
        fprintf(f, "</td><td class=\"num\" data-label=\"Mt floor\">");
        h_big(f, s->fl.mt, s->fl.mt_ln);
        fprintf(f, "</td><td class=\"num\" data-label=\"Mt allowed\">");
        h_num(f, s->req.mt_allowed);
        fprintf(f, "</td><td data-label=\"Limiting\">");
        h_text(f, s->fl.limiting ? s->fl.limiting : "none");
        fprintf(f, "</td>");
    }
    fprintf(f, "<td class=\"cause\" data-label=\"Cause\">");
    h_text(f, s->cause);
    fprintf(f, "</td><td class=\"src\" data-label=\"Source\"><code class=\"path\" title=\"");
    h_text(f, catalog_of(r, s));
    fprintf(f, "\">");
    ps_html_path(f, short_names ? base_name(catalog_of(r, s)) : catalog_of(r, s));
    fprintf(f, ":%zu</code></td></tr>\n", s->line);
}

static void ranking(FILE *f, const ps_run *r)
{
    fprintf(f, "<section id=\"ranking\">\n<h2>Ranking</h2>\n");
    if (r->n_rows == 0) {
        fprintf(f, "<p>No plants.</p>\n</section>\n");
        return;
    }
    size_t shown = r->n_rows < PS_HTML_RANK_ROWS ? r->n_rows : PS_HTML_RANK_ROWS;
    size_t sections = r->n_rows < PS_HTML_SECTIONS ? r->n_rows : PS_HTML_SECTIONS;
    fprintf(f, "<p>Worst first: not stabilizable, then by severity (the largest share of the allowed log-peak), "
               "then the plants not judged for want of a bandwidth limit, input errors last, each in catalog order. ");
    if (sections == r->n_rows)
        fprintf(f, "Each plant's id links to its section below.");
    else
        fprintf(f, "The ids of the first %zu link to their sections below.", sections);
    fprintf(f, "</p>\n");
    if (shown < r->n_rows) {
        fprintf(f, "<p><span class=\"cap\">Showing %zu of %zu plants.</span> ", shown, r->n_rows);
        ps_html_files_sentence(f, r);
        fprintf(f, "</p>\n");
    }
    fprintf(f, "<table class=\"ranking stack\">\n<caption>Plants ranked worst first");
    if (shown < r->n_rows)
        fprintf(f, " (the first %zu of %zu)", shown, r->n_rows);
    fprintf(f, "</caption>\n<thead><tr><th scope=\"col\">Rank</th><th scope=\"col\">Plant</th>"
               "<th scope=\"col\">Verdict</th><th scope=\"col\">Severity</th><th scope=\"col\">Worst</th>"
               "<th scope=\"col\">Ms floor</th><th scope=\"col\">Ms allowed</th><th scope=\"col\">Mt floor</th>"
               "<th scope=\"col\">Mt allowed</th><th scope=\"col\">Limiting</th><th scope=\"col\">Cause</th>"
               "<th scope=\"col\">Source</th></tr></thead>\n<tbody>\n");
    bool short_names = short_catalog_names(r);
    for (size_t i = 0; i < shown; i++)
        ranking_row(f, r, i, ps_run_row(r, i), short_names);
    fprintf(f, "</tbody>\n</table>\n</section>\n");
}

/* ---- figure (a): severity bars ---- */

/* The hatch of not-stabilizable bars, id unique in the page. */
static void hatch_pattern(FILE *f, const char *id)
{
    fprintf(f, "<defs><pattern id=\"%s\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
               "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#fff\"/>"
               "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" style=\"stroke:#000;stroke-width:2.5\"/></pattern></defs>\n",
            id);
}

static void severity_figure(FILE *f, const ps_run *r)
{
    size_t n_bars = 0, n_errors = 0;
    double top = 1.25;
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict == PS_VERDICT_UNREAD) {
            n_errors += n_errors < PS_HTML_FIGURES;
            continue;
        }
        if (n_bars == PS_HTML_FIGURES)
            continue;
        n_bars++;
        if (s->verdict != PS_VERDICT_UNSTABILIZABLE && isfinite(s->severity) && s->severity > top)
            top = s->severity;
    }
    fprintf(f, "<section id=\"severity\">\n<h2>Severity</h2>\n");
    if (n_bars + n_errors == 0) {
        fprintf(f, "<p>No plants.</p>\n</section>\n");
        return;
    }
    /* The axis ends at the next quarter above the worst finite severity, at
     * most 3: a longer bar is cut at the edge and marked off-scale, so one
     * hopeless plant does not squeeze every other bar against zero. */
    top = fmin(ceil(top * 4.0) / 4.0, 3.0);
    const double L = 175, PW = 460, T = 44, RH = 20;
    double bottom = T + RH * (double)n_bars;
    ps_plot p;
    ps_plot_open(&p, f, 820, bottom + 52 + 16 * (double)n_errors, "severity",
                 "Severity of every plant (share of the allowed log-peak)");
    hatch_pattern(f, "ps-hatch");
    ps_plot_area(&p, L, T, PW, bottom - T);
    p.x = (ps_plot_axis){.scale = PS_SCALE_LINEAR, .lo = 0, .hi = top,
                         .title = "severity: ln(floor) / ln(allowed), largest of Ms, Mt and effort (dimensionless)"};
    p.y = (ps_plot_axis){.scale = PS_SCALE_NONE, .lo = 0, .hi = 1};
    ps_plot_axes(&p);
    char buf[160];
    /* Bars, then the reference lines over them (with a white edge so they
     * stay visible across a black bar), then the values over both. */
    for (int pass = 0; pass < 2; pass++) {
        if (pass == 1) {
            double xm = ps_plot_x(&p, r->opt.marginal_at), x1 = ps_plot_x(&p, 1.0);
            if (r->opt.marginal_at > 0 && r->opt.marginal_at < top) {
                ps_plot_line_px(&p, xm, T, xm, bottom, "halo");
                ps_plot_line_px(&p, xm, T - 10, xm, bottom, "marginal");
                snprintf(buf, sizeof buf, "marginal %.2f", r->opt.marginal_at);
                ps_plot_text_px(&p, xm - 3, T - 13, "end", "small", 0, buf);
            }
            ps_plot_line_px(&p, x1, T, x1, bottom, "halo");
            ps_plot_line_px(&p, x1, T - 10, x1, bottom, "limit");
            ps_plot_text_px(&p, x1 + 3, T - 13, "start", "small", 0, "allowed 1.00");
        }
        size_t row = 0;
        for (size_t i = 0; i < r->n_rows && row < n_bars; i++) {
            const ps_summary *s = ps_run_row(r, i);
            if (s->verdict == PS_VERDICT_UNREAD)
                continue;
            double y = T + RH * (double)row++;
            bool unstab = s->verdict == PS_VERDICT_UNSTABILIZABLE;
            double v = isfinite(s->severity) ? fmax(0.0, s->severity) : 0;
            bool off = v > top, unjudged = s->verdict == PS_VERDICT_NEEDS_BANDWIDTH;
            if (pass == 1) {
                if (unjudged)
                    snprintf(buf, sizeof buf, "not judged: no rolloff_start given");
                else if (unstab)
                    snprintf(buf, sizeof buf, "not stabilizable (off-scale)");
                else if (!isfinite(s->severity))
                    snprintf(buf, sizeof buf, "no share (nothing to bound)");
                else
                    snprintf(buf, sizeof buf, off ? "%.3f (off-scale)" : "%.3f", s->severity);
                double x = unstab ? L + PW + 6 : off ? L + PW + 10 : ps_plot_x(&p, v) + 5;
                ps_plot_text_px(&p, x, y + 14, "start", "value", 0, buf);
                continue;
            }
            char label[80];
            fit_label(label, sizeof label, s->id, 24);
            fprintf(f, "<g><title>");
            h_text(f, s->id);
            fprintf(f, ": %s</title>\n", ps_verdict_name(s->verdict));
            ps_plot_text_px(&p, L - 6, y + 14, "end", "", 0, label);
            const char *cls = s->verdict == PS_VERDICT_CLEAR      ? "bar-clear"
                              : s->verdict == PS_VERDICT_MARGINAL ? "bar-marginal"
                              : s->verdict == PS_VERDICT_REDESIGN ? "bar-redesign"
                                                                  : "bar-unstab";
            if (unstab)
                fprintf(f, "<rect class=\"bar-unstab\" fill=\"url(#ps-hatch)\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" "
                           "height=\"12\"/>\n", L, y + 4, PW);
            else if (!unjudged && isfinite(s->severity))
                ps_plot_rect_px(&p, L, y + 4, ps_plot_x(&p, fmin(v, top)) - L, 12, cls);
            if (off && !unstab && !unjudged)
                ps_plot_marker_px(&p, L + PW + 4, y + 10, 5, PS_MARK_DIAMOND, "mark-solid");
            fprintf(f, "</g>\n");
        }
    }
    double y = bottom + 52;
    size_t shown_errors = 0;
    for (size_t i = 0; i < r->n_rows && shown_errors < n_errors; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict != PS_VERDICT_UNREAD)
            continue;
        shown_errors++;
        char label[80];
        fit_label(label, sizeof label, s->id[0] ? s->id : "(no id)", 40);
        snprintf(buf, sizeof buf, "input error, no bar: %s (line %zu)", label, s->err_line ? s->err_line : s->line);
        ps_plot_text_px(&p, 10, y, "start", "", 0, buf);
        y += 16;
    }
    ps_plot_close(&p);
    fprintf(f, "<figcaption>Figure: severity of every screened plant, worst first. Severity 1 (solid line) is the "
               "allowed peak; from the dashed line on (%.2f) a plant is marginal. Bars: light grey clear, mid grey "
               "marginal, black redesign, hatched not stabilizable (drawn off-scale: no controller stabilizes it). "
               "The axis ends at %.2f; longer bars are cut and marked off-scale (a black diamond). Input errors have "
               "no bar.",
            r->opt.marginal_at, top);
    if (r->n_rows > n_bars + n_errors)
        fprintf(f, " Only the %d worst plants are drawn; all %zu are in the CSV report and the JSON Lines records.",
                PS_HTML_FIGURES, r->n_rows);
    fprintf(f, "</figcaption>\n");
    fprintf(f, "</section>\n");
}

/* ---- figure (b): pole/zero map ---- */

/* Every pole/zero map in a report has the same symmetric-log axes: linear
 * within +-1 rad/s and logarithmic beyond, so that maps side by side can be
 * compared at a glance; each map reaches the power of ten at or above its
 * largest root. The region is stated on every map. */
static const double pz_linear = 1.0;

static void pz_map(FILE *f, const ps_summary *s)
{
    size_t np = s->n_poles < PS_MAP_MAX ? s->n_poles : PS_MAP_MAX;
    size_t nz = s->n_zeros < PS_MAP_MAX ? s->n_zeros : PS_MAP_MAX;
    double big = 0, small = INFINITY;
    for (size_t i = 0; i < np + nz; i++) {
        ps_cplx v = i < np ? s->poles[i] : s->zeros[i - np];
        if (!isfinite(v.re) || !isfinite(v.im))
            continue;
        big = fmax(big, fmax(fabs(v.re), fabs(v.im)));
        if (hypot(v.re, v.im) > 0)
            small = fmin(small, hypot(v.re, v.im));
    }
    double ext = pz_linear;
    int decades = 0;
    while (ext < big * (1 - 1e-12)) {
        ext *= 10;
        decades++;
    }
    char buf[200], label[80];
    fit_label(label, sizeof label, s->id, 40);
    snprintf(buf, sizeof buf, "Poles and zeros of %s", label);
    fprintf(f, "<figure>\n");
    ps_plot p;
    ps_plot_open(&p, f, 400, 400, "pz-map", buf);
    ps_plot_area(&p, 70, 34, 280, 280);
    p.x = (ps_plot_axis){.scale = PS_SCALE_SYMLOG, .lo = -ext, .hi = ext, .c = pz_linear, .title = "Re s (rad/s)",
                         .label_every = decades > 3 ? 2 : 1};
    p.y = p.x;
    p.y.title = "Im s (rad/s)";
    p.y.label_every = 1;
    ps_plot_rect(&p, 0, -ext, ext, ext, "shade");
    ps_plot_text_px(&p, 346, 47, "end", "small", 0, "right half plane");
    ps_plot_axes(&p);
    ps_plot_hline(&p, 0, "", NULL);
    ps_plot_vline(&p, 0, "", NULL, false);
    for (size_t i = 0; i < nz; i++)
        if (isfinite(s->zeros[i].re) && isfinite(s->zeros[i].im))
            ps_plot_marker(&p, s->zeros[i].re, s->zeros[i].im, PS_MARK_CIRCLE, "mark");
    for (size_t i = 0; i < np; i++)
        if (isfinite(s->poles[i].re) && isfinite(s->poles[i].im))
            ps_plot_marker(&p, s->poles[i].re, s->poles[i].im, PS_MARK_CROSS, "mark-cross");
    static const ps_plot_key keys[] = {{PS_KEY_MARK, PS_MARK_CROSS, "mark-cross", "pole"},
                                       {PS_KEY_MARK, PS_MARK_CIRCLE, "mark", "zero"}};
    ps_plot_legend(&p, 70, 390, keys, 2);
    snprintf(buf, sizeof buf, "linear within \xc2\xb1%g rad/s, log beyond", pz_linear);
    ps_plot_text_px(&p, 350, 390, "end", "small pz-linear", 0, buf);
    ps_plot_close(&p);
    /* What every map shares is said once, above the plant sections. */
    fprintf(f, "<figcaption>Poles (x) and zeros (o) of ");
    h_text(f, s->id);
    fprintf(f, ".");
    if (s->n_poles > PS_MAP_MAX || s->n_zeros > PS_MAP_MAX)
        fprintf(f, " Only the first %d of %zu poles and %zu zeros are drawn.", PS_MAP_MAX, s->n_poles, s->n_zeros);
    if (small < 0.05 * pz_linear)
        fprintf(f, " Roots closer than %g rad/s to the origin (the smallest %.3g rad/s) sit within a few pixels of "
                   "it at this scale; their values are in the JSON report.",
                0.05 * pz_linear, small);
    if (s->delay > 0)
        fprintf(f, " The delay of %.4g s is not a root and is not drawn.", s->delay);
    fprintf(f, "</figcaption>\n</figure>\n");
}

/* ---- families: boundary along each swept parameter, yield bar ---- */

/* The value axis of a boundary figure (see ps_boundary.plotted): log from 1
 * for the Ms and Mt floors (a floor below 1 counts as 1), log over whole
 * decades for the effort floor, linear from 0 for the severity, with 5 %
 * room above top. Values below bot sit on the foot; above top, on the top
 * edge, marked. */
typedef struct value_axis {
    ps_plot_axis a;
    double bot, top;
} value_axis;

static value_axis boundary_value_axis(const ps_boundary *b, double allowed)
{
    double vtop = 0, vmin = INFINITY;
    for (size_t i = 0; i < b->n_curve; i++) {
        double v = ps_boundary_plotted_value(b, i);
        if (b->curve_unstab[i] || !isfinite(v))
            continue;
        vtop = fmax(vtop, v);
        if (v > 0)
            vmin = fmin(vmin, v);
    }
    value_axis y = {.a = {.scale = PS_SCALE_LOG}};
    switch (b->plotted) {
    case PS_QTY_SEVERITY:
        y.top = fmin(fmax(1.05 * vtop, 2.0), 10.0);
        y.a = (ps_plot_axis){.scale = PS_SCALE_LINEAR, .lo = 0, .hi = y.top,
                             .title = "severity, largest share (dimensionless)"};
        return y;
    case PS_QTY_EFFORT:
        /* at most four decades below the allowed effort */
        y.bot = pow(10.0, floor(log10(fmax(fmin(vmin, allowed / 2), allowed * 1e-4))));
        y.top = fmin(fmax(vtop, 2 * allowed), 100 * allowed);
        y.a.title = "effort floor, peak |C S| (catalog units)";
        break;
    default: /* as the band-edge figures' Ms axis: up to the largest finite floor, 2 to 100 times the allowed */
        y.bot = 1;
        y.top = fmax(fmin(fmax(vtop, 2 * allowed), 100 * allowed), 2);
        y.a.title = b->plotted == PS_QTY_MT ? "Mt floor, peak |T| (ratio)" : "Ms floor, peak |S| (ratio)";
        break;
    }
    y.a.lo = y.bot;
    y.a.hi = pow(10.0, log10(y.bot) + 1.05 * (log10(y.top) - log10(y.bot)));
    return y;
}

static double value_px(const ps_plot *p, const value_axis *y, double v)
{
    return ps_plot_y(p, fmin(fmax(v, y->bot), y->top));
}

static const char *plotted_short(ps_quantity q)
{
    switch (q) {
    case PS_QTY_MS: return "Ms";
    case PS_QTY_MT: return "Mt";
    case PS_QTY_EFFORT: return "effort";
    default: return "severity";
    }
}

static void boundary_figure(FILE *f, const ps_family_result *fr, const ps_boundary *b)
{
    const char *name = fr->param[b->param].name;
    bool found = b->state == PS_BOUND_FOUND && isfinite(b->value);
    ps_quantity q = b->plotted;
    bool sev = q == PS_QTY_SEVERITY;
    const char *what = sev ? "severity" : ps_quantity_words(q), *brief = plotted_short(q);
    double allowed = ps_boundary_plotted_allowed(b);
    double xmin = INFINITY, xmax = -INFINITY;
    for (size_t i = 0; i < b->n_curve; i++) {
        xmin = fmin(xmin, b->curve_x[i]);
        xmax = fmax(xmax, b->curve_x[i]);
    }
    if (found) {
        xmin = fmin(xmin, b->value);
        xmax = fmax(xmax, b->value);
    }
    const double H = 292, L = 64, T = 34, PW = 400, PH = 190;
    /* x: logarithmic over whole decades when the positive sweep spans more
     * than a decade, else linear with a margin of 4 % so the end points do
     * not sit on the frame. The catalog declares no unit for a parameter. */
    char xtitle[160];
    ps_plot_axis ax = {.scale = xmin > 0 && xmax > 10 * xmin ? PS_SCALE_LOG : PS_SCALE_LINEAR, .title = xtitle};
    if (ax.scale == PS_SCALE_LOG) {
        ax.lo = pow(10.0, floor(log10(xmin)));
        ax.hi = pow(10.0, fmax(ceil(log10(xmax)), floor(log10(xmin)) + 1));
        ax.minor = true;
        ax.label_every = log10(ax.hi / ax.lo) > 8 ? 2 : 1;
    } else {
        double span = xmax - xmin;
        if (!(span > 0))
            span = xmin != 0 ? fabs(xmin) : 1;
        ax.lo = xmin - 0.04 * span;
        ax.hi = xmax + 0.04 * span;
    }
    snprintf(xtitle, sizeof xtitle, "%s (catalog units, no unit declared; %s)", name,
             ax.scale == PS_SCALE_LOG ? "log" : "linear");
    value_axis ay = boundary_value_axis(b, allowed);

    char buf[240], label[80];
    fit_label(label, sizeof label, fr->id, 30);
    snprintf(buf, sizeof buf, "%s: %s along %s", label, sev ? "severity" : brief, name);
    if (!sev)
        snprintf(buf, sizeof buf, "%s: %s floor along %s", label, brief, name);
    fprintf(f, "<figure class=\"family-boundary\" data-family=\"");
    h_text(f, fr->id);
    fprintf(f, "\" data-parameter=\"");
    h_text(f, name);
    fprintf(f, "\" data-state=\"%s\" data-plotted=\"%s\">\n", ps_bound_state_name(b->state), ps_quantity_key(q));
    ps_plot p;
    ps_plot_open(&p, f, 500, H, "family-boundary", buf);
    ps_plot_area(&p, L, T, PW, PH);
    p.x = ax;
    p.y = ay.a;
    /* Where a non-monotone verdict changes: between which sweep points. */
    if (b->state == PS_BOUND_NON_MONOTONE)
        for (size_t i = 0; i < b->n_changes; i++)
            ps_plot_xspan(&p, b->change_lo[i], b->change_hi[i], "shade");
    ps_plot_axes(&p);
    /* The line every point is compared with: the allowed value of the drawn
     * floor, or severity 1 (data-allowed: read back by the end-to-end test). */
    if (isfinite(allowed) && allowed > ay.bot && allowed <= ay.top) {
        double y = ps_plot_y(&p, allowed);
        fprintf(f, "<line class=\"marginal\" data-allowed=\"%.17g\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n",
                allowed, L, y, L + PW, y);
        if (sev)
            snprintf(buf, sizeof buf, "severity 1");
        else
            snprintf(buf, sizeof buf, "allowed %s %.4g", brief, allowed);
        ps_plot_text_px(&p, L + PW - 3, y - 4, "end", "small value", 0, buf);
    }
    /* The curve through the sweep points, broken where the value is missing;
     * a point that cannot be stabilized sits on the top edge. */
    bool clipped = false, any_unstab = false;
    double cx[PS_FAM_SWEEP], cy[PS_FAM_SWEEP], py[PS_FAM_SWEEP];
    for (size_t i = 0; i < b->n_curve; i++) {
        double v = b->curve_unstab[i] ? INFINITY : ps_boundary_plotted_value(b, i);
        cx[i] = b->curve_x[i];
        cy[i] = isnan(v) ? NAN : fmin(fmax(v, ay.bot), ay.top);
        py[i] = isnan(v) ? NAN : value_px(&p, &ay, v);
        any_unstab |= b->curve_unstab[i];
        clipped |= !b->curve_unstab[i] && v > ay.top;
    }
    ps_plot_series(&p, cx, cy, b->n_curve, false, "curve");
    if (found) {
        double x = ps_plot_x(&p, b->value);
        ps_plot_line_px(&p, x, T, x, T + PH, "halo");
        ps_plot_line_px(&p, x, T, x, T + PH, "promise");
        ps_plot_marker_px(&p, x, T + PH - 5, 5, PS_MARK_UP, "mark-solid");
        /* The label goes on the side where the curve is lower next to the
         * line (the top corner is free there), unless that side is too narrow. */
        double y_left = NAN, y_right = NAN;
        for (size_t i = 0; i < b->n_curve; i++) {
            if (b->curve_x[i] <= b->value)
                y_left = py[i];
            else if (isnan(y_right))
                y_right = py[i];
        }
        bool left = isnan(y_right) || (!isnan(y_left) && y_left > y_right);
        if (left && x - L < 110)
            left = false;
        else if (!left && L + PW - x < 110)
            left = true;
        snprintf(buf, sizeof buf, "boundary %.3g", b->value);
        ps_plot_text_px(&p, x + (left ? -4 : 4), T + 13, left ? "end" : "start", "small value", 0, buf);
        ps_plot_text_px(&p, x + (left ? -4 : 4), T + 25, left ? "end" : "start", "small value", 0,
                        b->pass_below ? "passes below" : "passes above");
    }
    for (size_t i = 0; i < b->n_curve; i++) {
        if (isnan(py[i]))
            continue;
        double x = ps_plot_x(&p, b->curve_x[i]), v = ps_boundary_plotted_value(b, i);
        fprintf(f, "<g class=\"sweep-point\" data-x=\"%.17g\" data-value=\"%.17g\" data-passes=\"%s\" "
                   "data-stabilizable=\"%s\"><title>",
                b->curve_x[i], v, b->curve_pass[i] ? "yes" : "no", b->curve_unstab[i] ? "no" : "yes");
        h_text(f, name);
        fprintf(f, " = %.6g: Ms floor ", b->curve_x[i]);
        h_num(f, b->curve_ms[i]);
        fprintf(f, ", Mt floor ");
        h_num(f, b->curve_mt[i]);
        if (isfinite(b->effort_allowed)) {
            fprintf(f, ", effort floor ");
            h_num(f, b->curve_effort[i]);
        }
        fprintf(f, ", severity ");
        h_num(f, b->curve_sev[i]);
        fprintf(f, ", %s</title>\n", b->curve_unstab[i] ? "not stabilizable" : b->curve_pass[i] ? "passes" : "fails");
        if (b->curve_unstab[i] || !(v <= ay.top))
            ps_plot_marker_px(&p, x, T - 6, 5, PS_MARK_DOWN, "mark-solid");
        ps_plot_marker_px(&p, x, py[i], 4, b->curve_pass[i] ? PS_MARK_CIRCLE : PS_MARK_SQUARE,
                          b->curve_pass[i] ? "mark" : "mark-solid");
        fprintf(f, "</g>\n");
    }
    ps_plot_key keys[3] = {{PS_KEY_MARK, PS_MARK_CIRCLE, "mark", "passes"},
                           {PS_KEY_MARK, PS_MARK_SQUARE, "mark-solid", "fails"},
                           {PS_KEY_BOX, 0, "shade", "verdict changes"}};
    ps_plot_legend(&p, L, H - 12, keys, b->state == PS_BOUND_NON_MONOTONE ? 3 : 2);
    switch (b->state) {
    case PS_BOUND_FOUND: snprintf(buf, sizeof buf, "one change of verdict"); break;
    case PS_BOUND_ALL_PASS: snprintf(buf, sizeof buf, "passes over the whole sweep"); break;
    case PS_BOUND_ALL_FAIL: snprintf(buf, sizeof buf, "fails over the whole sweep"); break;
    default: snprintf(buf, sizeof buf, "not monotone: %zu changes", b->n_changes); break;
    }
    ps_plot_text_px(&p, L + PW, H - 12, "end", "small", 0, buf);
    ps_plot_close(&p);

    char text[700];
    ps_boundary_text(fr, b, text, sizeof text);
    size_t fail_stab = 0;
    for (size_t i = 0; i < b->n_curve; i++)
        fail_stab += !b->curve_pass[i] && !b->curve_unstab[i];
    fprintf(f, "<figcaption>%s of ", sev ? "Severity" : q == PS_QTY_EFFORT ? "Effort floor (peak |C S|)" : what);
    h_text(f, fr->id);
    fprintf(f, " at the sorted sweep points of ");
    h_text(f, name);
    fprintf(f, " (in the catalog's units: a family parameter declares none), the other parameters at nominal; %s "
               "parameter axis, %s %s axis. Open circles pass (clear or marginal), black squares fail.",
            ax.scale == PS_SCALE_LOG ? "log" : "linear", sev ? "linear" : "log", brief);
    if (sev) {
        fprintf(f, " The severity is the largest of the Ms, Mt and effort shares of what is allowed; dashed: "
                   "severity 1, the most that passes.");
        if (fail_stab)
            fprintf(f, " It is drawn because no single floor lies above its allowed value at every failing point "
                       "that can be stabilized.");
    } else {
        fprintf(f, " Dashed: the allowed %s (%.4g). The verdict weighs every floor (Ms, Mt, effort); ", brief, allowed);
        if (found && b->binding == q)
            fprintf(f, "at the boundary the %s sets it, ", ps_quantity_words(q));
        else
            fprintf(f, "drawn: the floor with the largest share at the worst point that can be stabilized, ");
        fprintf(f, "and at every failing point that can be stabilized it lies above the allowed %s.", brief);
    }
    if (found)
        fprintf(f, " Solid with a triangle: the boundary, located by bisection.");
    if (b->state == PS_BOUND_NON_MONOTONE)
        fprintf(f, " Shaded: between these sweep points the verdict changes; no single boundary is reported.");
    if (clipped)
        fprintf(f, " Values above %.3g are drawn at %.3g with a triangle above the frame.", ay.top, ay.top);
    if (any_unstab)
        fprintf(f, " Points that cannot be stabilized (infinite floor or hidden unstable mode) are drawn on the top "
                   "edge with a triangle above the frame.");
    fprintf(f, " Result: ");
    h_text(f, text);
    fprintf(f, ".</figcaption>\n</figure>\n");
}

/* One segment of the yield bar or its legend, filled as on the severity
 * figure; the hatch of not-stabilizable units is the family's own pattern k. */
static void yield_rect(FILE *f, int v, size_t k, double x, double y, double w, double h)
{
    static const char *const cls[PS_VERDICT_COUNT] = {"bar-clear", "bar-marginal", "bar-redesign", "bar-unstab",
                                                      "bar-unread", "bar-unread"};
    fprintf(f, "<rect class=\"%s\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"", cls[v], x, y, w, h);
    if (v == PS_VERDICT_UNSTABILIZABLE)
        fprintf(f, " fill=\"url(#ps-hatch-y%zu)\"", k);
    fputs("/>", f);
}

static void yield_figure(FILE *f, const ps_family_result *fr, size_t k)
{
    const ps_yield *y = &fr->yield;
    const double H = 108, L = 12, PW = 400, T = 34, BH = 22;
    char buf[240], label[80];
    fit_label(label, sizeof label, fr->id, 40);
    if (y->invalid)
        snprintf(buf, sizeof buf, "%s: verdicts of the %zu units that could be evaluated, of %zu (seed %lu)", label,
                 y->valid, y->samples, y->seed);
    else
        snprintf(buf, sizeof buf, "%s: verdicts of %zu sampled units (seed %lu)", label, y->samples, y->seed);
    fprintf(f, "<figure class=\"family-yield\" data-family=\"");
    h_text(f, fr->id);
    fprintf(f, "\">\n");
    ps_plot p;
    ps_plot_open(&p, f, 700, H, "family-yield", buf);
    char hatch[32];
    snprintf(hatch, sizeof hatch, "ps-hatch-y%zu", k);
    hatch_pattern(f, hatch);
    ps_plot_area(&p, L, T, PW, BH);
    p.x = (ps_plot_axis){.scale = PS_SCALE_NONE, .lo = 0, .hi = 100};
    p.y = (ps_plot_axis){.scale = PS_SCALE_NONE, .lo = 0, .hi = 1};
    double x = L;
    for (int v = 0; v < PS_VERDICT_UNREAD; v++) {
        double w = PW * (isfinite(y->frac[v]) ? y->frac[v] : 0);
        if (y->count[v] == 0)
            continue;
        fprintf(f, "<g><title>%s: %zu units (%.1f %%, 95 %% Wilson %.1f .. %.1f %%)</title>", ps_verdict_name((ps_verdict)v),
                y->count[v], 100 * y->frac[v], 100 * y->lo[v], 100 * y->hi[v]);
        yield_rect(f, v, k, x, T, w, BH);
        fputs("</g>\n", f);
        x += w;
    }
    ps_plot_rect_px(&p, L, T, PW, BH, "frame");
    /* The passing share (clear and marginal: the first two segments) and its interval above the bar. */
    double xp = L + PW * y->pass_frac, xl = L + PW * y->pass_lo, xh = L + PW * y->pass_hi;
    if (y->valid) {
        ps_plot_line_px(&p, xp, T - 8, xp, T + BH, "halo");
        ps_plot_line_px(&p, xp, T - 8, xp, T + BH, "limit");
        ps_plot_line_px(&p, xl, T - 5, xh, T - 5, "limit");
        ps_plot_line_px(&p, xl, T - 9, xl, T - 1, "");
        ps_plot_line_px(&p, xh, T - 9, xh, T - 1, "");
    }
    for (int pc = 0; pc <= 100; pc += 25) {
        double xt = ps_plot_x(&p, pc);
        ps_plot_line_px(&p, xt, T + BH, xt, T + BH + 4, "");
        snprintf(buf, sizeof buf, "%d", pc);
        ps_plot_text_px(&p, xt, T + BH + 15, pc == 0 ? "start" : pc == 100 ? "end" : "middle", "small", 0, buf);
    }
    ps_plot_text_px(&p, L + PW / 2, T + BH + 29, "middle", "axis-title", 0, "share of the evaluated units (%)");
    if (y->valid) {
        snprintf(buf, sizeof buf, "passing %.1f %%", 100 * y->pass_frac);
        ps_plot_text_px(&p, L + PW + 12, T + 9, "start", "title", 0, buf);
        snprintf(buf, sizeof buf, "95 %% interval %.1f .. %.1f %% (Wilson)", 100 * y->pass_lo, 100 * y->pass_hi);
        ps_plot_text_px(&p, L + PW + 12, T + 22, "start", "small", 0, buf);
    } else
        ps_plot_text_px(&p, L + PW + 12, T + 9, "start", "title", 0, "no unit could be evaluated");
    if (y->invalid) {
        snprintf(buf, sizeof buf, "not in the bar: %zu invalid units", y->invalid);
        ps_plot_text_px(&p, L + PW + 12, T + 35, "start", "small", 0, buf);
    }
    double lx = L;
    for (int v = 0; v < PS_VERDICT_UNREAD; v++) {
        if (y->count[v] == 0)
            continue;
        yield_rect(f, v, k, lx, H - 19, 14, 10);
        fputc('\n', f);
        snprintf(buf, sizeof buf, "%s %.1f %% (%zu)", ps_verdict_name((ps_verdict)v), 100 * y->frac[v], y->count[v]);
        ps_plot_text_px(&p, lx + 18, H - 10, "start", "small", 0, buf);
        lx += 30 + 5.6 * (double)strlen(buf);
    }
    ps_plot_close(&p);
    char text[1400];
    ps_yield_text(fr, text, sizeof text);
    fprintf(f, "<figcaption>Share per verdict of the %zu units that could be evaluated, of %zu drawn, the "
               "toleranced parameters drawn from one seeded generator (seed %lu); passing (clear or marginal) with its "
               "95 %% Wilson score interval (the bracket above the bar). Result: ",
            y->valid, y->samples, y->seed);
    h_text(f, text);
    fprintf(f, ".</figcaption>\n</figure>\n");
}

static void family_params(FILE *f, const ps_family_result *fr)
{
    fprintf(f, "<table class=\"family-params\">\n<thead><tr><th>Parameter</th><th>Nominal</th><th>Sweep</th>"
               "<th>Tolerance</th></tr></thead>\n<tbody>\n");
    for (size_t j = 0; j < fr->n_params; j++) {
        const ps_fam_param *p = &fr->param[j];
        fprintf(f, "<tr><td>");
        h_text(f, p->name);
        fprintf(f, "</td><td class=\"num\">");
        h_num(f, p->nominal);
        fprintf(f, "</td><td>");
        if (p->n_sweep) {
            double lo = INFINITY, hi = -INFINITY;
            for (size_t i = 0; i < p->n_sweep; i++) {
                lo = fmin(lo, p->sweep[i]);
                hi = fmax(hi, p->sweep[i]);
            }
            fprintf(f, "%zu values, %.4g .. %.4g", p->n_sweep, lo, hi);
        } else
            fprintf(f, "not swept");
        fprintf(f, "</td><td>");
        if (p->tol == PS_TOL_NORMAL)
            fprintf(f, "normal, sigma %.4g", p->tol_value);
        else if (p->tol == PS_TOL_UNIFORM)
            fprintf(f, "uniform, &plusmn;%.4g", p->tol_value);
        else
            fprintf(f, "none");
        if (p->has_min || p->has_max) {
            char range[80];
            ps_family_range_text(p, range, sizeof range);
            fprintf(f, ", truncated to ");
            h_text(f, range);
            fprintf(f, " (%.1f %% of it)", 100 * p->range_mass);
        }
        fprintf(f, "</td></tr>\n");
    }
    fprintf(f, "</tbody>\n</table>\n");
}

static void families(FILE *f, const ps_run *r)
{
    if (r->n_families == 0)
        return;
    fprintf(f, "<section id=\"families\">\n<h2>Families</h2>\n<p>Boundaries: one swept parameter at a time, the "
               "others at nominal; the verdict at the sweep points, one change located by bisection. Yield: seeded "
               "samples of the toleranced parameters, 95 %% Wilson intervals. The grid plants are screened and "
               "ranked like any other plant.</p>\n");
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_family_result *fr = &r->families[i];
        fprintf(f, "<article class=\"family\" data-id=\"");
        h_text(f, fr->id);
        fprintf(f, "\">\n<h3>");
        h_text(f, fr->id);
        fprintf(f, "</h3>\n<p class=\"meta\">");
        if (fr->note[0]) {
            h_text(f, fr->note);
            fprintf(f, ". ");
        }
        fprintf(f, "%zu grid plant%s; <code>", fr->grid, fr->grid == 1 ? "" : "s");
        h_text(f, fr->file_index < r->n_catalogs ? r->catalogs[fr->file_index].file : "");
        fprintf(f, ":%zu</code>.</p>\n", fr->line);
        family_params(f, fr);
        if (fr->n_bound == 0)
            fprintf(f, "<p>No swept parameter: no boundary.</p>\n");
        else
            fprintf(f, "<div class=\"figs\">\n");
        for (size_t j = 0; j < fr->n_bound; j++) {
            const ps_boundary *b = &fr->bound[j];
            if (b->state == PS_BOUND_ERROR || b->n_curve == 0) {
                /* Past the failing point the curve holds no values: words only. */
                char text[700];
                ps_boundary_text(fr, b, text, sizeof text);
                fprintf(f, "<p class=\"study-error\">Boundary: ");
                h_text(f, text);
                fprintf(f, ".</p>\n");
                continue;
            }
            boundary_figure(f, fr, b);
        }
        if (fr->n_bound)
            fprintf(f, "</div>\n");
        if (fr->has_yield) {
            char warning[PS_DIAG_TEXT + 200];
            ps_yield_warning_text(fr, warning, sizeof warning);
            if (warning[0]) {
                fprintf(f, "<p class=\"study-warning\"><strong>Warning:</strong> ");
                h_text(f, warning);
                fprintf(f, ".</p>\n");
            }
            yield_figure(f, fr, i);
        }
        fprintf(f, "</article>\n");
    }
    fprintf(f, "</section>\n");
}

/* ---- figure (c): Ms floor against the band edge ---- */

static void band_figure(FILE *f, const ps_summary *s)
{
    double wlo = INFINITY, whi = 0, mtop = 1;
    for (size_t i = 0; i < s->n_curve; i++) {
        double w = s->curve_wb[i], m = s->curve_ms[i];
        if (!(isfinite(w) && w > 0))
            continue;
        wlo = fmin(wlo, w);
        whi = fmax(whi, w);
        if (isfinite(m))
            mtop = fmax(mtop, m);
    }
    if (!(whi > 0))
        return;
    const ps_target *bt = &s->target[PS_TARGET_BAND];
    bool widest = bt->state == PS_TARGET_FOUND && isfinite(bt->limit) && bt->limit > 0;
    bool required = s->req.wb > 0 && isfinite(s->req.wb);
    if (widest) {
        wlo = fmin(wlo, bt->limit);
        whi = fmax(whi, bt->limit);
    }
    if (required) {
        wlo = fmin(wlo, s->req.wb);
        whi = fmax(whi, s->req.wb);
    }
    double allowed = s->req.ms_allowed;
    /* Ms axis (log): up to the curve's largest finite value, but at least
     * twice the allowed Ms and at most a hundred times it; larger values are
     * drawn on the top edge and marked. */
    double ytop = fmin(fmax(mtop, 2 * allowed), 100 * allowed);
    char buf[200], label[80];
    fit_label(label, sizeof label, s->id, 36);
    snprintf(buf, sizeof buf, "%s: Ms floor against band edge", label);
    fprintf(f, "<figure>\n");
    ps_plot p;
    ps_plot_open(&p, f, 400, 300, "band-edge", buf);
    ps_plot_area(&p, 64, 34, 300, 200);
    p.x = (ps_plot_axis){.scale = PS_SCALE_LOG, .lo = pow(10.0, floor(log10(wlo))),
                         .hi = pow(10.0, fmax(ceil(log10(whi)), floor(log10(wlo)) + 1)), .minor = true,
                         .title = "band edge w_b (rad/s, log)"};
    p.y = (ps_plot_axis){.scale = PS_SCALE_LOG, .lo = 1, .hi = pow(ytop, 1.02), .title = "Ms floor, peak |S| (ratio, log)"};
    ps_plot_axes(&p);
    /* The curve, broken where the floor has no value; values above the axis sit on the top edge. */
    double x[PS_CURVE_N], y[PS_CURVE_N];
    bool clipped = false;
    for (size_t i = 0; i < s->n_curve; i++) {
        double w = s->curve_wb[i], m = s->curve_ms[i];
        bool ok = isfinite(w) && w > 0 && !isnan(m);
        clipped |= ok && m > ytop;
        x[i] = ok ? w : NAN;
        y[i] = ok ? fmax(fmin(m, ytop), 1.0) : NAN;
    }
    ps_plot_series(&p, x, y, s->n_curve, false, "curve");
    if (allowed > 1 && allowed <= ytop) {
        snprintf(buf, sizeof buf, "allowed Ms %.3g", allowed);
        ps_plot_hline(&p, allowed, "marginal", buf);
    }
    if (required) {
        snprintf(buf, sizeof buf, "required %.3g", s->req.wb);
        ps_plot_vline(&p, s->req.wb, "required", NULL, false);
        ps_plot_text_px(&p, ps_plot_x(&p, s->req.wb) + 3, 228, "start", "small value", 0, buf);
    }
    if (widest) {
        snprintf(buf, sizeof buf, "widest band edge %.3g rad/s", bt->limit);
        /* Left of the line the floor is still below the allowed Ms, so the
         * top-left corner is free; near the left edge use the right side. */
        ps_plot_vline(&p, bt->limit, "promise", buf, ps_plot_x(&p, bt->limit) - 64 > 125);
        ps_plot_marker_px(&p, ps_plot_x(&p, bt->limit), 229, 5, PS_MARK_UP, "mark-solid");
    }
    ps_plot_close(&p);
    char text[400];
    ps_target_text(s, PS_TARGET_BAND, text, sizeof text);
    fprintf(f, "<figcaption>Ms floor of ");
    h_text(f, s->id);
    fprintf(f, " with |S| &le; %.3g up to the band edge.", s->band_eps);
    if (required)
        fprintf(f, " Dotted: the required band edge.");
    if (widest)
        fprintf(f, " Triangle: the widest band edge that passes.");
    if (clipped)
        fprintf(f, " Values above %.3g are drawn on the top edge.", ytop);
    if (text[0]) {
        fprintf(f, " Target: ");
        h_text(f, text);
        fprintf(f, ".");
    }
    fprintf(f, "</figcaption>\n</figure>\n");
}

/* ---- figure (d): the log-area budget of a flagged plant ---- */

/* The Bode sensitivity integral of the band floor (README "Floors";
 * src/limits/floors.c) as a budget of log-area, the integral of ln|S| over
 * frequency in rad/s (ln|S| in nepers): the unstable poles force the area F
 * (fl.bode_area); |S| <= eps on [0, wb] takes wb ln(1/eps) more; the
 * roll-off bound past wh gives back at most I (fl.band_tail, up to pi/h
 * for a digital loop); the rest must fit under the peak on [wb, wh]:
 * (wh - wb) ln Ms >= F + wb ln(1/eps) - I, with equality at the band floor.
 * Without a roll-off start a continuous loop's rest has no end to fit
 * under; a digital loop's rest then goes on [wb, pi/h] (the Nyquist floor). */
static void budget_figure(FILE *f, const ps_summary *s)
{
    const ps_floors *fl = &s->fl;
    double F = fl->bode_area;
    if (!isfinite(F))
        return;
    bool sampled = s->h > 0, band = s->req.wb > 0;
    double wb = band ? s->req.wb : 0.0, B = band ? wb * log(1.0 / s->req.eps) : 0.0;
    bool tail = isfinite(fl->band_tail) && isfinite(fl->ms_band_ln);
    bool nyq = !tail && sampled && isfinite(fl->ms_nyquist_ln);
    double I = tail ? fl->band_tail : 0.0, R = F + B - I;
    double width = tail ? s->req.wh - wb : nyq ? fl->nyquist - wb : NAN;
    double ms_ln = tail ? fl->ms_band_ln : nyq ? fl->ms_nyquist_ln : NAN;
    double allowed_area = isfinite(width) && s->req.ms_allowed > 1 ? width * log(s->req.ms_allowed) : NAN;
    double lo = fmin(0.0, R), hi = fmax(F + B, fmax(R, isfinite(allowed_area) ? allowed_area : 0.0));
    if (!(hi > lo))
        hi = lo + 1;
    double pad = 0.04 * (hi - lo);

    char buf[240], label[80];
    fit_label(label, sizeof label, s->id, 36);
    snprintf(buf, sizeof buf, "%s: log-area budget", label);
    fprintf(f, "<figure class=\"budget\" data-id=\"");
    h_text(f, s->id);
    fprintf(f, "\" data-bode-area=\"%.17g\" data-band-area=\"%.17g\" data-tail-area=\"%.17g\" "
               "data-rest-area=\"%.17g\" data-width=\"%.17g\" data-ms-ln=\"%.17g\">\n",
            F, B, I, R, width, ms_ln);
    bool room = isfinite(allowed_area);
    int rows = room ? 5 : 4;
    const double RH = 38, T = 34, L = 14, PW = 360;
    ps_plot p;
    ps_plot_open(&p, f, 400, T + rows * RH + 48, "budget", buf);
    ps_plot_area(&p, L, T, PW, rows * RH);
    p.x = (ps_plot_axis){.scale = PS_SCALE_LINEAR, .lo = lo - pad, .hi = hi + pad,
                         .title = "log-area, ln|S| integrated over frequency (rad/s \xc2\xb7 Np)"};
    p.y = (ps_plot_axis){.scale = PS_SCALE_NONE, .lo = 0, .hi = rows};
    ps_plot_axes(&p);
    ps_plot_vline(&p, 0, "", NULL, false);
    /* One row each, top down: the words above a bar of 14 px. */
    char text[5][120];
    if (sampled)
        snprintf(text[0], sizeof text[0], "unstable poles force (\xcf\x80/h) \xce\xa3 ln|p_d| = %.4g", F);
    else
        snprintf(text[0], sizeof text[0], "unstable poles force \xcf\x80 \xce\xa3 Re p = %.4g", F);
    if (band)
        snprintf(text[1], sizeof text[1], "|S| \xe2\x89\xa4 %.3g on [0, %.3g] takes w_b ln(1/\xce\xb5) = %.4g", s->req.eps,
                 wb, B);
    else
        snprintf(text[1], sizeof text[1], "no band requirement: nothing taken");
    if (tail)
        snprintf(text[2], sizeof text[2], "roll-off past w_h = %.3g%s gives back I = %.4g", s->req.wh,
                 sampled ? " (to \xcf\x80/h)" : "", I);
    else
        snprintf(text[2], sizeof text[2], "no roll-off start: nothing given back");
    if (tail || nyq)
        snprintf(text[3], sizeof text[3], "rest for [%.3g, %.3g] = %.4g: Ms \xe2\x89\xa5 %.4g", wb,
                 tail ? s->req.wh : fl->nyquist, R, exp(ms_ln));
    else
        snprintf(text[3], sizeof text[3], "rest %.4g may go anywhere past %.3g rad/s: no floor", R, wb);
    if (room)
        snprintf(text[4], sizeof text[4], "allowed Ms %.3g leaves room for %.4g", s->req.ms_allowed, allowed_area);
    double x0[5] = {0, F, F + B - I, 0, 0}, x1[5] = {F, F + B, F + B, R, room ? allowed_area : 0};
    static const char *const cls[5] = {"bar-take", "bar-take", "bar-give", "bar-rest", "bar-room"};
    for (int k = 0; k < rows; k++) {
        double y = T + RH * k;
        ps_plot_text_px(&p, L + 4, y + 13, "start", "small value", 0, text[k]);
        if (x1[k] != x0[k])
            ps_plot_rect_px(&p, fmin(ps_plot_x(&p, x0[k]), ps_plot_x(&p, x1[k])), y + 18,
                            fabs(ps_plot_x(&p, x1[k]) - ps_plot_x(&p, x0[k])), 14, cls[k]);
    }
    ps_plot_close(&p);
    fprintf(f, "<figcaption>Log-area budget of ");
    h_text(f, s->id);
    fprintf(f, ": F = %s%s.", sampled ? "(&pi;/h) &Sigma; ln|p_d| of the poles outside the unit circle"
                                     : "&pi; &Sigma; Re p of the unstable poles",
            sampled ? " on [0, &pi;/h], the roll-off tail cut at &pi;/h" : "");
    if (!band)
        fprintf(f, " No band requirement: w_b = 0, nothing taken.");
    if (!tail && nyq)
        fprintf(f, " No roll-off start: the rest goes on [w_b, &pi;/h], the Nyquist floor.");
    else if (!tail)
        fprintf(f, " No roll-off start: the rest may spread over every frequency past w_b, so the area sets no floor.");
    if (room)
        fprintf(f, " Last bar (dashed): the room the allowed Ms leaves.");
    fprintf(f, "</figcaption>\n</figure>\n");
}

/* ---- plant sections ---- */

/* The structural flag holds where the floors were computed for a plant
 * given in s (not for an infinite floor or a plant given in z, where the
 * terminal listing leaves it out too). */
static bool unstable_controller_required(const ps_summary *s)
{
    return s->verdict != PS_VERDICT_UNREAD && !s->fl.infinite && !s->in_z && !s->fl.parity_interlacing;
}

/* Where an input error is: FILE:LINE:COL as far as it is known (no made-up
 * ":0"), and the field. */
static void error_where(FILE *f, const ps_run *r, const ps_summary *s)
{
    char pos[PS_DIAG_POS];
    fprintf(f, "<code class=\"path\">");
    ps_html_path(f, catalog_of(r, s));
    fprintf(f, "%s</code>", ps_diag_pos(pos, sizeof pos, s->err_line, s->err_col));
    if (s->err_field[0]) {
        fprintf(f, ", field <code class=\"tok\">");
        h_text(f, s->err_field);
        fprintf(f, "</code>");
    }
}

/* screen --certify: |S| and |T| of the verified controller's loop against
 * frequency, with the floors and the allowed peaks. */
static void cert_figure(FILE *f, const ps_summary *s)
{
    size_t n = s->n_cert_curve;
    if (!n || !s->n_cert || !s->cert[0].found)
        return;
    const ps_loop_check *k = &s->cert[0].chk;
    double ylo = 1, yhi = 1;
    for (size_t i = 0; i < n; i++) {
        if (isfinite(s->cert_s[i]) && s->cert_s[i] > 0)
            ylo = fmin(ylo, s->cert_s[i]);
        if (isfinite(s->cert_t[i]) && s->cert_t[i] > 0)
            ylo = fmin(ylo, s->cert_t[i]);
    }
    const double tops[] = {k->ms, k->mt, s->req.ms_allowed, s->req.mt_allowed, s->fl.ms, s->fl.mt};
    for (size_t i = 0; i < sizeof tops / sizeof tops[0]; i++)
        if (isfinite(tops[i]))
            yhi = fmax(yhi, tops[i]);
    ylo = fmax(ylo, 1e-3);
    char buf[200], label[80];
    fit_label(label, sizeof label, s->id, 36);
    snprintf(buf, sizeof buf, "%s: |S| and |T| of the controller found", label);
    fprintf(f, "<figure>\n");
    ps_plot p;
    ps_plot_open(&p, f, 400, 300, "cert-loop", buf);
    ps_plot_area(&p, 64, 34, 300, 200);
    double w[PS_CERT_CURVE_N];
    for (size_t i = 0; i < n; i++) /* the grid of ps_loop_curve */
        w[i] = exp(log(s->cert_w_from) + (log(s->cert_w_to) - log(s->cert_w_from)) * (double)i / (double)(n - 1));
    p.x = (ps_plot_axis){.scale = PS_SCALE_LOG, .lo = pow(10.0, floor(log10(w[0]))),
                         .hi = pow(10.0, ceil(log10(w[n - 1]))), .minor = false, .label_every = 2,
                         .title = "frequency w (rad/s, log)"};
    p.y = (ps_plot_axis){.scale = PS_SCALE_LOG, .lo = pow(10.0, floor(log10(ylo))), .hi = pow(10.0, log10(yhi) + 0.15),
                         .title = "|S|, |T| (ratio, log)"};
    ps_plot_axes(&p);
    double ys[PS_CERT_CURVE_N], yt[PS_CERT_CURVE_N];
    for (size_t i = 0; i < n; i++) {
        ys[i] = s->cert_s[i] >= p.y.lo ? s->cert_s[i] : NAN; /* below the axis: not drawn */
        yt[i] = s->cert_t[i] >= p.y.lo ? s->cert_t[i] : NAN;
    }
    ps_plot_series(&p, w, ys, n, false, "curve");
    ps_plot_series(&p, w, yt, n, false, "curve-alt");
    /* the lines unlabelled (they lie close together on a log axis); the caption gives their values */
    char lines[200];
    int at = snprintf(lines, sizeof lines, "dashed: the allowed peaks (Ms %.3g, Mt %.3g)", s->req.ms_allowed,
                      s->req.mt_allowed);
    ps_plot_hline(&p, s->req.ms_allowed, "marginal", NULL);
    if (s->req.mt_allowed != s->req.ms_allowed)
        ps_plot_hline(&p, s->req.mt_allowed, "marginal", NULL);
    bool ms_floor = isfinite(s->fl.ms) && s->fl.ms > 1;
    bool mt_floor = isfinite(s->fl.mt) && s->fl.mt > 1 && !(ms_floor && fabs(s->fl.mt / s->fl.ms - 1) <= 0.005);
    if (ms_floor)
        ps_plot_hline(&p, s->fl.ms, "required", NULL);
    if (mt_floor)
        ps_plot_hline(&p, s->fl.mt, "required", NULL);
    if (ms_floor && mt_floor)
        snprintf(lines + at, sizeof lines - (size_t)at, "; dotted: the floors above 1, which no controller meeting "
                 "every requirement goes below (Ms %.3g, Mt %.3g)", s->fl.ms, s->fl.mt);
    else if (ms_floor || mt_floor)
        snprintf(lines + at, sizeof lines - (size_t)at, "; dotted: the %s floor %.3g, which no controller meeting "
                 "every requirement goes below", ms_floor ? "Ms" : "Mt", ms_floor ? s->fl.ms : s->fl.mt);
    static const ps_plot_key keys[] = {{PS_KEY_LINE, PS_MARK_CROSS, "curve", "|S|"},
                                       {PS_KEY_LINE, PS_MARK_CROSS, "curve-alt", "|T|"}};
    ps_plot_legend(&p, 64, 290, keys, 2);
    ps_plot_close(&p);
    fprintf(f, "<figcaption>The loop of the controller found for ");
    h_text(f, s->id);
    fprintf(f, ": |S| solid, |T| dashed grey; %s. Peaks found: Ms %.4g, Mt %.4g (%s).</figcaption>\n</figure>\n",
            lines, k->ms, k->mt,
            k->shape_met ? "an upper bound on the best achievable, not the optimum"
                         : "this controller misses a requirement the floors assume, so its peaks bound nothing");
}

static void plant_section(FILE *f, const ps_run *r, size_t i, const ps_summary *s)
{
    char anchor[16 + 3 * PS_ID_MAX], row[32], text[1200];
    ps_html_plant_anchor(anchor, sizeof anchor, i + 1, s->id);
    ps_html_row_anchor(row, sizeof row, i + 1);
    fprintf(f, "<article class=\"plant%s\" id=\"%s\" data-id=\"", is_flagged(s) ? " flagged" : "", anchor);
    h_text(f, s->id);
    fprintf(f, "\" data-verdict=\"%s\">\n<h3>%zu. <span class=\"tok\">", ps_verdict_name(s->verdict), i + 1);
    h_text(f, s->id[0] ? s->id : "(no id)");
    fprintf(f, "</span> ");
    ps_html_verdict_label(f, s->verdict);
    fprintf(f, "</h3>\n");
    if (ps_html_has_row(r, i))
        fprintf(f, "<p class=\"back\"><a href=\"#%s\">Back to row %zu of the ranking</a></p>\n", row, i + 1);
    if (s->note[0]) {
        fprintf(f, "<p class=\"note\">Note: ");
        h_text(f, s->note);
        fprintf(f, "</p>\n");
    }
    fprintf(f, "<p>Source: <code class=\"path\">");
    ps_html_path(f, catalog_of(r, s));
    fprintf(f, ":%zu</code></p>\n", s->line);
    if (s->verdict == PS_VERDICT_UNREAD) {
        fprintf(f, "<p>Input error at ");
        error_where(f, r, s);
        fprintf(f, ": ");
        h_text(f, s->err_text);
        fprintf(f, ".</p>\n</article>\n");
        return;
    }
    size_t len = strlen(s->cause);
    fprintf(f, "<p>Cause: ");
    h_text(f, s->cause);
    fprintf(f, "%s</p>\n", len && s->cause[len - 1] != '.' ? "." : "");
    if (unstable_controller_required(s))
        fprintf(f, "<p class=\"structure\">Every stabilizing controller is itself unstable (parity interlacing "
                   "fails: an odd number of real unstable poles lies between two real zeros on [0, +infinity], "
                   "infinity counting as a zero of a strictly proper or delayed plant).</p>\n");
    fprintf(f, "<ul class=\"targets\">\n");
    bool any_target = false;
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        ps_target_text(s, (ps_target_kind)k, text, sizeof text);
        if (!text[0])
            continue;
        any_target = true;
        fprintf(f, "<li>");
        h_text(f, text);
        fprintf(f, "</li>\n");
    }
    if (!any_target)
        fprintf(f, "<li>no single change of pole, zero, delay or bandwidth applies</li>\n");
    fprintf(f, "</ul>\n<p>Requirements: ");
    ps_requirements_text(s, text, sizeof text);
    h_text(f, text);
    fprintf(f, ".</p>\n");
    if (s->h > 0) {
        fprintf(f, "<p>Digital loop: ");
        ps_sampling_text(s->h, s->compute_delay, s->in_z, text, sizeof text);
        h_text(f, text);
        fprintf(f, ".</p>\n<p>");
        ps_zroots_text(&s->fl, s->in_z, text, sizeof text);
        h_text(f, text);
        fprintf(f, ".</p>\n<p>");
        ps_nyquist_floor_text(&s->fl, s->req.wb, text, sizeof text);
        h_text(f, text);
        fprintf(f, ".</p>\n");
    }
    char cert[1400];
    ps_bracket_text(s, &r->opt, cert, sizeof cert);
    if (cert[0]) {
        fprintf(f, "<p>Certificate controller: ");
        h_text(f, cert);
        fprintf(f, ".</p>\n");
    }
    bool map = !s->in_z, band = s->n_curve > 0;
    if (s->in_z)
        fprintf(f, "<p>The plant is given in z: its roots are listed above, not drawn in the s-plane.</p>\n");
    if (map || band) {
        fprintf(f, "<div class=\"figs\">\n");
        if (map)
            pz_map(f, s);
        if (band)
            band_figure(f, s);
        if (band && (s->verdict == PS_VERDICT_REDESIGN || s->verdict == PS_VERDICT_MARGINAL))
            budget_figure(f, s);
        cert_figure(f, s);
        fprintf(f, "</div>\n");
    }
    fprintf(f, "</article>\n");
}

static void plant_sections(FILE *f, const ps_run *r)
{
    if (r->n_rows == 0)
        return;
    size_t shown = r->n_rows < PS_HTML_SECTIONS ? r->n_rows : PS_HTML_SECTIONS;
    fprintf(f, "<section id=\"plants\">\n<h2>Plant details</h2>\n<p>");
    if (shown < r->n_rows) {
        fprintf(f, "<span class=\"cap\">Showing %zu of %zu plants</span>: the first of the ranking. ", shown,
                r->n_rows);
        ps_html_files_sentence(f, r);
        fprintf(f, " ");
    }
    fprintf(f, "Each section gives the plant's note, source line, cause, its targets (one quantity changed at a "
               "time, the value with which every floor passes), the requirements it was screened against and its "
               "figures.</p>\n<p><strong>Pole/zero maps</strong> (plants given in s): poles x, zeros o, the right half "
               "plane shaded. Symmetric-log axes, the same on Re and Im and on every map of this report: linear "
               "within &plusmn;%g rad/s, logarithmic beyond (u = sign(x) log10(1 + |x| / %g rad/s)). A delay is "
               "not a root and is not drawn.</p>\n",
            pz_linear, pz_linear);
    fprintf(f, "<p><strong>Ms floor against band edge</strong> (where the curve was computed): the Ms floor forced "
               "by keeping |S| below the attenuation up to the band edge w_b, against w_b, both axes log; dashed the "
               "allowed Ms, dotted the required band edge, a triangle on the widest band edge with which every floor "
               "passes.</p>\n");
    bool sampled = false; /* say how a sampled loop differs only when one is shown */
    for (size_t i = 0; i < shown && !sampled; i++)
        sampled = ps_run_row(r, i)->h > 0;
    fprintf(f, "<p><strong>Log-area budget</strong> (marginal and redesign plants with that curve): log-area is "
               "ln|S| (nepers) integrated over frequency (rad/s). For a stable loop of relative degree 2 or more, "
               "ln|S| integrates to F = &pi; &Sigma; Re p of the unstable poles over all frequencies (Bode's "
               "sensitivity integral%s). The band requirement "
               "takes w_b ln(1/&epsilon;) more; the roll-off bound |L| &le; &delta; (w_h/w)<sup>1+k</sup> can give "
               "back at most I = w_h &Sigma; &delta;<sup>n</sup> / (n (n (1+k) - 1))%s; the rest must fit under the peak between w_b and w_h: (w_h - w_b) ln Ms &ge; F + w_b "
               "ln(1/&epsilon;) - I, the band floor's own numbers. A dashed last bar is the room the allowed Ms "
               "leaves there: the band floor passes when the rest fits in it.</p>\n",
            sampled ? "; a sampled loop: (&pi;/h) &Sigma; ln|p_d| on [0, &pi;/h]" : "",
            sampled ? " (each term cut at &pi;/h in a sampled loop)" : "");
    for (size_t i = 0; i < shown; i++)
        plant_section(f, r, i, ps_run_row(r, i));
    fprintf(f, "</section>\n");
}

/* ---- input errors, meanings ---- */

static void input_errors(FILE *f, const ps_run *r)
{
    size_t n = r->per_verdict[PS_VERDICT_UNREAD];
    if (n == 0)
        return;
    fprintf(f, "<section id=\"errors\">\n<h2>Input errors</h2>\n");
    if (n > PS_HTML_ERRORS) {
        fprintf(f, "<p><span class=\"cap\">Showing %d of %zu input errors.</span> ", PS_HTML_ERRORS, n);
        ps_html_files_sentence(f, r);
        fprintf(f, "</p>\n");
    }
    fprintf(f, "<ul>\n");
    size_t listed = 0;
    for (size_t i = 0; i < r->n_rows && listed < PS_HTML_ERRORS; i++) {
        if (ps_run_verdict(r, i) != PS_VERDICT_UNREAD)
            continue;
        const ps_summary *s = ps_run_row(r, i);
        listed++;
        fprintf(f, "<li><span class=\"tok\">");
        h_text(f, s->id[0] ? s->id : "(no id)");
        fprintf(f, "</span> (");
        error_where(f, r, s);
        fprintf(f, "): ");
        h_text(f, s->err_text);
        fprintf(f, "</li>\n");
    }
    fprintf(f, "</ul>\n</section>\n");
}

static void meanings(FILE *f)
{
    fprintf(f, "<section id=\"verdicts\">\n<h2>What the verdicts mean</h2>\n<dl>\n");
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        fprintf(f, "<dt>");
        ps_html_verdict_label(f, (ps_verdict)v);
        fprintf(f, "</dt><dd>");
        h_text(f, ps_verdict_meaning((ps_verdict)v));
        fprintf(f, "</dd>\n");
    }
    fprintf(f, "</dl>\n</section>\n");
}

static void bracket_row(void *ctx, const ps_bracket_row *row)
{
    FILE *f = ctx;
    const ps_summary *s = row->s;
    fprintf(f, "<tr><td>%zu</td><td>", row->rank);
    h_text(f, s->id);
    fprintf(f, "</td><td>%s</td><td>", ps_bracket_name(row->b));
    h_big(f, s->fl.ms, s->fl.ms_ln);
    fprintf(f, "</td><td>");
    h_num(f, row->found ? s->cert[0].chk.ms : NAN);
    fprintf(f, "</td><td>");
    h_big(f, s->fl.mt, s->fl.mt_ln);
    fprintf(f, "</td><td>");
    h_num(f, row->found ? s->cert[0].chk.mt : NAN);
    fprintf(f, "</td><td>");
    h_text(f, row->what);
    fprintf(f, "</td></tr>\n");
}

/* screen --certify: the count of each outcome and a table of the plants
 * with a bracket (the first PS_HTML_RANK_ROWS in rank order). */
static void bracket_section(FILE *f, const ps_run *r)
{
    if (r->opt.certify == PS_CERTIFY_NONE)
        return;
    const size_t *pb = r->per_bracket;
    size_t n = ps_bracket_count(r);
    fprintf(f, "<section id=\"bracket\">\n<h2>Bracket: floors against a verified controller</h2>\n<p>The floors "
               "say what no controller can do; a controller searched within %zu loop evaluations a plant and "
               "verified shows what one controller does. Searched: the %s plants. <strong>%zu demonstrated, %zu "
               "undecided, %zu ruled out, %zu not attempted.</strong> A found peak of a controller that meets the "
               "roll-off, band and effort requirements is an upper bound on the best achievable peak, not the "
               "optimum; undecided means no controller was found within the budget, never "
               "that none exists. The floors hold for loops that meet every stated requirement: a controller that "
               "misses the band or the roll-off may show a peak below them.</p>\n",
            r->opt.certify_budget ? r->opt.certify_budget : (size_t)PS_CERT_BUDGET,
            r->opt.certify == PS_CERTIFY_PASSING ? "passing" : "judged", pb[PS_BRACKET_DEMONSTRATED],
            pb[PS_BRACKET_UNDECIDED], pb[PS_BRACKET_RULED_OUT], pb[PS_BRACKET_NOT_ATTEMPTED]);
    if (n > PS_HTML_RANK_ROWS)
        fprintf(f, "<p><span class=\"cap\">Showing %d of %zu plants.</span> All of them are in the CSV and JSON Lines "
                   "files.</p>\n",
                PS_HTML_RANK_ROWS, n);
    fprintf(f, "<table class=\"stack\">\n<caption>Plants with a bracket, worst first</caption>\n<thead><tr>"
               "<th scope=\"col\">Rank</th><th scope=\"col\">Plant</th><th scope=\"col\">Outcome</th>"
               "<th scope=\"col\">Ms floor</th><th scope=\"col\">Ms found</th><th scope=\"col\">Mt floor</th>"
               "<th scope=\"col\">Mt found</th><th scope=\"col\">Controller</th></tr></thead>\n<tbody>\n");
    ps_bracket_rows(r, PS_HTML_RANK_ROWS, bracket_row, f);
    fprintf(f, "</tbody>\n</table>\n</section>\n");
}

ps_status ps_write_html(FILE *f, const ps_run *r)
{
    fprintf(f, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
               "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
               "<title>Screening report (plantsieve)</title>\n<style>\n%s",
            style_sheet);
    ps_html_page_style(f);
    fprintf(f, "</style>\n</head>\n<body>\n");
    ps_html_board(f, r);
    ranking(f, r);
    severity_figure(f, r);
    bracket_section(f, r);
    families(f, r);
    plant_sections(f, r);
    input_errors(f, r);
    meanings(f);
    fprintf(f, "</body>\n</html>\n");
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

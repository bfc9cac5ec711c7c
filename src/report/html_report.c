/* html_report.c - the screening run as one self-contained HTML5 page: inline
 * style, no script, no external assets, figures as inline SVG; prints in black on white. */
#include "report/reports.h"
#include "report/html_page.h"
#include "core/text.h"

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
    if (!s)
        return;
    for (const unsigned char *c = (const unsigned char *)s; *c; c++) {
        switch (*c) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs("&quot;", f); break;
        case '\'': fputs("&#39;", f); break;
        default:
            if ((*c < 0x20 && *c != '\n' && *c != '\t') || *c == 0x7f)
                fputc(' ', f);
            else
                fputc(*c, f);
        }
    }
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

/* ---- SVG primitives (coordinates in px, one decimal) ---- */

/* cls: a class for the svg element (for readers of the page), or NULL. */
static void svg_open_class(FILE *f, double w, double h, const char *cls, const char *label)
{
    fprintf(f, "<svg xmlns=\"http://www.w3.org/2000/svg\"");
    if (cls)
        fprintf(f, " class=\"%s\"", cls);
    fprintf(f, " viewBox=\"0 0 %.0f %.0f\" width=\"%.0f\" height=\"%.0f\" role=\"img\" aria-label=\"", w, h, w, h);
    h_text(f, label);
    fprintf(f, "\">\n<title>");
    h_text(f, label);
    fprintf(f, "</title>\n");
}

static void svg_open(FILE *f, double w, double h, const char *label) { svg_open_class(f, w, h, NULL, label); }

static void svg_line(FILE *f, double x1, double y1, double x2, double y2, const char *cls)
{
    fprintf(f, "<line class=\"%s\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n", cls, x1, y1, x2, y2);
}

/* anchor: "start", "middle" or "end"; rotate: degrees about (x, y), 0 for none. */
static void svg_text(FILE *f, double x, double y, const char *anchor, const char *cls, double rotate, const char *s)
{
    fprintf(f, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\"", x, y, anchor);
    if (cls && cls[0])
        fprintf(f, " class=\"%s\"", cls);
    if (rotate != 0)
        fprintf(f, " transform=\"rotate(%.0f %.1f %.1f)\"", rotate, x, y);
    fputc('>', f);
    h_text(f, s);
    fputs("</text>\n", f);
}

/* A tick label for a value on a log or symmetric-log axis: "%.4g", and
 * powers of ten outside 1e-3 .. 1e4 as "1e5", "-1e-4". */
static void tick_label(char *buf, size_t n, double v)
{
    double a = fabs(v);
    if (a != 0 && (a < 1e-3 || a >= 1e4)) {
        double e = round(log10(a));
        if (fabs(a / pow(10.0, e) - 1) < 1e-9) {
            snprintf(buf, n, "%s1e%d", v < 0 ? "-" : "", (int)e);
            return;
        }
        snprintf(buf, n, "%.1e", v);
        return;
    }
    snprintf(buf, n, "%.4g", v);
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
    fprintf(f, "</td><td class=\"src\" data-label=\"Source\"><code class=\"tok\" title=\"");
    h_text(f, catalog_of(r, s));
    fprintf(f, "\">");
    h_text(f, short_names ? base_name(catalog_of(r, s)) : catalog_of(r, s));
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
    double step = top <= 1.5 ? 0.25 : 0.5;
    const double W = 820, L = 175, PW = 460, T = 44, RH = 20;
    double plot_bottom = T + RH * (double)n_bars;
    double H = plot_bottom + 52 + 16 * (double)n_errors;
    svg_open(f, W, H, "Severity of every plant against the allowed and marginal lines");
    fprintf(f, "<defs><pattern id=\"ps-hatch\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
               "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#fff\"/>"
               "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" style=\"stroke:#000;stroke-width:2.5\"/></pattern></defs>\n");
    svg_text(f, 10, 16, "start", "title", 0, "Severity of every plant (share of the allowed log-peak)");
#define XS(v) (L + PW * (v) / top)
    for (double v = 0; v <= top + 1e-9; v += step)
        svg_line(f, XS(v), T - 4, XS(v), plot_bottom, "grid");
    char buf[160];
    /* Bars, then the reference lines over them (with a white edge so they
     * stay visible across a black bar), then the values over both. */
    for (int pass = 0; pass < 2; pass++) {
        if (pass == 1) {
            if (r->opt.marginal_at > 0 && r->opt.marginal_at < top) {
                svg_line(f, XS(r->opt.marginal_at), T, XS(r->opt.marginal_at), plot_bottom, "halo");
                svg_line(f, XS(r->opt.marginal_at), T - 10, XS(r->opt.marginal_at), plot_bottom, "marginal");
                snprintf(buf, sizeof buf, "marginal %.2f", r->opt.marginal_at);
                svg_text(f, XS(r->opt.marginal_at) - 3, T - 13, "end", "small", 0, buf);
            }
            svg_line(f, XS(1.0), T, XS(1.0), plot_bottom, "halo");
            svg_line(f, XS(1.0), T - 10, XS(1.0), plot_bottom, "limit");
            svg_text(f, XS(1.0) + 3, T - 13, "start", "small", 0, "allowed 1.00");
        }
        size_t row = 0;
        for (size_t i = 0; i < r->n_rows && row < n_bars; i++) {
            const ps_summary *s = ps_run_row(r, i);
            if (s->verdict == PS_VERDICT_UNREAD)
                continue;
            double y = T + RH * (double)row++;
            bool unstab = s->verdict == PS_VERDICT_UNSTABILIZABLE;
            double v = isfinite(s->severity) ? fmax(0.0, s->severity) : 0;
            bool off = v > top;
            bool unjudged = s->verdict == PS_VERDICT_NEEDS_BANDWIDTH;
            if (pass == 1) {
                if (unjudged)
                    snprintf(buf, sizeof buf, "not judged: no rolloff_start given");
                else if (unstab)
                    snprintf(buf, sizeof buf, "not stabilizable (off-scale)");
                else if (!isfinite(s->severity))
                    snprintf(buf, sizeof buf, "no share (nothing to bound)");
                else
                    snprintf(buf, sizeof buf, off ? "%.3f (off-scale)" : "%.3f", s->severity);
                svg_text(f, unstab ? L + PW + 6 : off ? L + PW + 10 : XS(v) + 5, y + 14, "start", "value", 0, buf);
                continue;
            }
            char label[80];
            fit_label(label, sizeof label, s->id, 24);
            fprintf(f, "<g><title>");
            h_text(f, s->id);
            fprintf(f, ": %s</title>\n", ps_verdict_name(s->verdict));
            svg_text(f, L - 6, y + 14, "end", "", 0, label);
            const char *cls = s->verdict == PS_VERDICT_CLEAR      ? "bar-clear"
                              : s->verdict == PS_VERDICT_MARGINAL ? "bar-marginal"
                              : s->verdict == PS_VERDICT_REDESIGN ? "bar-redesign"
                                                                  : "bar-unstab";
            if (!unjudged && (unstab || isfinite(s->severity)))
                fprintf(f, "<rect class=\"%s\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"12\"/>\n", cls, L,
                        y + 4, unstab ? PW : XS(fmin(v, top)) - L);
            if (off && !unstab && !unjudged)
                fprintf(f, "<path class=\"clipmark\" d=\"M%.1f %.1fl7 6l-7 6z\"/>\n", L + PW + 1, y + 4);
            fprintf(f, "</g>\n");
        }
    }
    svg_line(f, L, plot_bottom, L + PW, plot_bottom, "");
    for (double v = 0; v <= top + 1e-9; v += step) {
        svg_line(f, XS(v), plot_bottom, XS(v), plot_bottom + 5, "");
        snprintf(buf, sizeof buf, "%.2f", v);
        svg_text(f, XS(v), plot_bottom + 17, "middle", "", 0, buf);
    }
    svg_text(f, L + PW / 2, plot_bottom + 34, "middle", "", 0,
             "severity: ln(floor) / ln(allowed), largest over Ms, Mt and effort (dimensionless)");
#undef XS
    double y = plot_bottom + 52;
    size_t shown_errors = 0;
    for (size_t i = 0; i < r->n_rows && shown_errors < n_errors; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict != PS_VERDICT_UNREAD)
            continue;
        shown_errors++;
        char label[80];
        fit_label(label, sizeof label, s->id[0] ? s->id : "(no id)", 40);
        snprintf(buf, sizeof buf, "input error, no bar: %s (line %zu)", label, s->err_line ? s->err_line : s->line);
        svg_text(f, 10, y, "start", "", 0, buf);
        y += 16;
    }
    fprintf(f, "</svg>\n");
    fprintf(f, "<figcaption>Figure: severity of every screened plant, worst first. Severity 1 (solid line) is the "
               "allowed peak; from the dashed line on (%.2f) a plant is marginal. Bars: light grey clear, mid grey "
               "marginal, black redesign, hatched not stabilizable (drawn off-scale: no controller stabilizes it). "
               "The axis ends at %.2f; longer bars are cut and marked off-scale. Input errors have no bar.",
            r->opt.marginal_at, top);
    if (r->n_rows > n_bars + n_errors)
        fprintf(f, " Only the %d worst plants are drawn; all %zu are in the ranking table.", PS_HTML_FIGURES,
                r->n_rows);
    fprintf(f, "</figcaption>\n");
    fprintf(f, "</section>\n");
}

/* ---- figure (b): pole/zero map ---- */

/* Symmetric-log coordinate: linear within +-c, logarithmic beyond. */
static double symlog(double x, double c)
{
    return copysign(log10(1.0 + fabs(x) / c), x);
}

static void pz_map(FILE *f, const ps_summary *s)
{
    size_t np = s->n_poles < PS_MAP_MAX ? s->n_poles : PS_MAP_MAX;
    size_t nz = s->n_zeros < PS_MAP_MAX ? s->n_zeros : PS_MAP_MAX;
    double big = 0, small = INFINITY;
    for (size_t i = 0; i < np + nz; i++) {
        ps_cplx v = i < np ? s->poles[i] : s->zeros[i - np];
        if (!isfinite(v.re) || !isfinite(v.im))
            continue;
        double m = hypot(v.re, v.im);
        big = fmax(big, fmax(fabs(v.re), fabs(v.im)));
        if (m > 0)
            small = fmin(small, m);
    }
    if (!(big > 0))
        big = 1;
    /* c: the decade of the smallest non-zero root, so it is not lost at the
     * origin, kept within eight decades of the largest root so the ticks
     * stay readable. */
    double c = isfinite(small) ? pow(10.0, floor(log10(small))) : 1.0;
    c = fmax(c, pow(10.0, floor(log10(big))) * 1e-8);
    int K = 0;
    while (c * pow(10.0, K) < big * (1 - 1e-12))
        K++;
    double umax = symlog(c * pow(10.0, K), c);
    const double W = 400, H = 390, L = 70, T = 34, P = 280;
    double cx = L + P / 2, cy = T + P / 2;
#define PX(x) (cx + (P / 2) * symlog((x), c) / umax)
#define PY(y) (cy - (P / 2) * symlog((y), c) / umax)
    char buf[200], label[80];
    fit_label(label, sizeof label, s->id, 40);
    snprintf(buf, sizeof buf, "Poles and zeros of %s", label);
    fprintf(f, "<figure>\n");
    svg_open(f, W, H, buf);
    svg_text(f, 10, 16, "start", "title", 0, buf);
    fprintf(f, "<rect class=\"rhp\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", cx, T, P / 2, P);
    svg_text(f, L + P - 4, T + 13, "end", "small", 0, "right half plane");
    /* Ticks at 0, +-c, +-10c, ...; +-c sits only 0.3 decade from 0, so it
     * is labelled only when it is the sole decade, and with many decades
     * every other one is labelled on the Re axis. */
    int every = K > 3 ? 2 : 1;
    for (int k = -1; k <= K; k++) {
        for (int sign = -1; sign <= 1; sign += 2) {
            double v = k < 0 ? 0 : sign * c * pow(10.0, k);
            if (k < 0 && sign > 0)
                continue;
            bool on_y = k < 0 || k > 0 || K == 0;
            bool on_x = on_y && (k < 0 || (K - k) % every == 0);
            svg_line(f, PX(v), T, PX(v), T + P, "grid");
            svg_line(f, L, PY(v), L + P, PY(v), "grid");
            svg_line(f, PX(v), T + P, PX(v), T + P + 4, "");
            svg_line(f, L - 4, PY(v), L, PY(v), "");
            tick_label(buf, sizeof buf, v);
            if (on_x)
                svg_text(f, PX(v), T + P + 15, "middle", "small", 0, buf);
            if (on_y)
                svg_text(f, L - 6, PY(v) + 3.5, "end", "small", 0, buf);
        }
    }
    svg_line(f, cx, T, cx, T + P, "");
    svg_line(f, L, cy, L + P, cy, "");
    fprintf(f, "<rect class=\"frame\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", L, T, P, P);
    for (size_t i = 0; i < nz; i++) {
        ps_cplx v = s->zeros[i];
        if (isfinite(v.re) && isfinite(v.im))
            fprintf(f, "<circle class=\"zero\" cx=\"%.1f\" cy=\"%.1f\" r=\"4.5\"/>\n", PX(v.re), PY(v.im));
    }
    for (size_t i = 0; i < np; i++) {
        ps_cplx v = s->poles[i];
        if (!isfinite(v.re) || !isfinite(v.im))
            continue;
        double x = PX(v.re), y = PY(v.im);
        fprintf(f, "<path class=\"pole\" d=\"M%.1f %.1fl9 9M%.1f %.1fl-9 9\"/>\n", x - 4.5, y - 4.5, x + 4.5,
                y - 4.5);
    }
    svg_text(f, L + P / 2, T + P + 32, "middle", "", 0, "Re (rad/s)");
    svg_text(f, 16, cy, "middle", "", -90, "Im (rad/s)");
    fprintf(f, "<path class=\"pole\" d=\"M%.1f %.1fl8 8M%.1f %.1fl-8 8\"/>\n", L, H - 14, L + 8, H - 14);
    svg_text(f, L + 13, H - 6, "start", "small", 0, "pole");
    fprintf(f, "<circle class=\"zero\" cx=\"%.1f\" cy=\"%.1f\" r=\"4\"/>\n", L + 70, H - 10);
    svg_text(f, L + 78, H - 6, "start", "small", 0, "zero");
    fprintf(f, "</svg>\n");
#undef PX
#undef PY
    fprintf(f, "<figcaption>Poles (x) and zeros (o) of ");
    h_text(f, s->id);
    fprintf(f, "; the right half plane is shaded. Symmetric-log axes, the same on Re and Im: linear within "
               "&plusmn;%.3g rad/s, logarithmic beyond (u = sign(x) log10(1 + |x| / %.3g)).",
            c, c);
    if (s->n_poles > PS_MAP_MAX || s->n_zeros > PS_MAP_MAX)
        fprintf(f, " Only the first %d of %zu poles and %zu zeros are drawn.", PS_MAP_MAX, s->n_poles, s->n_zeros);
    if (s->delay > 0)
        fprintf(f, " The delay of %.4g s is not a root and is not drawn.", s->delay);
    fprintf(f, "</figcaption>\n</figure>\n");
}

/* ---- families: boundary along each swept parameter, yield bar ---- */

/* An axis maps a value to a pixel: log10 of the value or the value itself,
 * between lo and hi (in those units), onto from .. to. */
typedef struct axis {
    bool log;
    double lo, hi;
    double from, to;
} axis;

static double ax_px(const axis *a, double v)
{
    double u = a->log ? log10(v) : v;
    return a->from + (a->to - a->from) * (u - a->lo) / (a->hi - a->lo);
}

/* 1, 2 or 5 times a power of ten, giving about target steps over span. */
static double nice_step(double span, double target)
{
    double raw = span / target, p = pow(10.0, floor(log10(raw))), m = raw / p;
    return (m < 1.5 ? 1 : m < 3 ? 2 : m < 7 ? 5 : 10) * p;
}

static void pass_mark(FILE *f, double x, double y, bool pass)
{
    if (pass)
        fprintf(f, "<circle class=\"pt-pass\" cx=\"%.1f\" cy=\"%.1f\" r=\"4\"/>\n", x, y);
    else
        fprintf(f, "<rect class=\"pt-fail\" x=\"%.1f\" y=\"%.1f\" width=\"8\" height=\"8\"/>\n", x - 4, y - 4);
}

/* The y axis of a boundary figure (see ps_boundary.plotted): log from 1 for
 * the Ms and Mt floors (a floor below 1 counts as 1), log over whole
 * decades for the effort floor, linear from 0 for the severity. Values
 * below the foot sit on it; above the top, on the top edge, marked. */
typedef struct value_axis {
    axis a;
    double bot, top;
} value_axis;

static value_axis boundary_value_axis(const ps_boundary *b, double allowed, double T, double PH)
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
    value_axis y = {.a = {.from = T + PH, .to = T}};
    switch (b->plotted) {
    case PS_QTY_SEVERITY:
        y.bot = 0;
        y.top = fmin(fmax(1.05 * vtop, 2.0), 10.0);
        y.a.log = false;
        y.a.lo = 0;
        y.a.hi = y.top;
        return y;
    case PS_QTY_EFFORT:
        /* at most four decades below the allowed effort */
        y.bot = pow(10.0, floor(log10(fmax(fmin(vmin, allowed / 2), allowed * 1e-4))));
        y.top = fmin(fmax(vtop, 2 * allowed), 100 * allowed);
        break;
    default: /* the band-edge figures' Ms axis: up to the largest finite floor, 2 to 100 times the allowed */
        y.bot = 1;
        y.top = fmax(fmin(fmax(vtop, 2 * allowed), 100 * allowed), 2);
        break;
    }
    y.a.log = true;
    y.a.lo = log10(y.bot);
    y.a.hi = y.a.lo + 1.05 * (log10(y.top) - y.a.lo);
    return y;
}

static double value_px(const value_axis *y, double v)
{
    return ax_px(&y->a, fmin(fmax(v, y->bot), y->top));
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
    const double W = 500, H = 292, L = 64, T = 34, PW = 400, PH = 190;
    /* x: logarithmic when the positive sweep spans more than a decade (whole
     * decades, as on the band-edge figures), else linear with a margin of
     * 4 % so the end points do not sit on the frame. */
    axis ax = {.log = xmin > 0 && xmax > 10 * xmin, .from = L, .to = L + PW};
    double step = 0;
    if (ax.log) {
        ax.lo = floor(log10(xmin));
        ax.hi = ceil(log10(xmax));
        if (ax.hi <= ax.lo)
            ax.hi = ax.lo + 1;
    } else {
        double span = xmax - xmin;
        if (!(span > 0))
            span = xmin != 0 ? fabs(xmin) : 1;
        ax.lo = xmin - 0.04 * span;
        ax.hi = xmax + 0.04 * span;
        step = nice_step(ax.hi - ax.lo, 6);
    }
    value_axis ay = boundary_value_axis(b, allowed, T, PH);

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
    svg_open_class(f, W, H, "family-boundary", buf);
    svg_text(f, 10, 16, "start", "title", 0, buf);

    if (ax.log) {
        int every = ax.hi - ax.lo > 8 ? 2 : 1;
        for (double e = ax.lo; e <= ax.hi + 1e-9; e += 1) {
            double x = pow(10.0, e);
            svg_line(f, ax_px(&ax, x), T, ax_px(&ax, x), T + PH + 4, "grid");
            if ((int)(e - ax.lo) % every == 0) {
                tick_label(buf, sizeof buf, x);
                svg_text(f, ax_px(&ax, x), T + PH + 16, "middle", "small", 0, buf);
            }
            for (int m = 2; m <= 9 && e < ax.hi; m++)
                svg_line(f, ax_px(&ax, m * x), T + PH, ax_px(&ax, m * x), T + PH + 3, "");
        }
    } else {
        /* Enough digits that neighbouring ticks differ (a sweep of 1000.1 .. 1000.5). */
        int digits = (int)ceil(log10(fmax(fabs(ax.lo), fabs(ax.hi)) / step)) + 1;
        digits = digits < 4 ? 4 : digits > 12 ? 12 : digits;
        for (double k = ceil(ax.lo / step); k * step <= ax.hi; k += 1) {
            double x = k * step;
            if (fabs(x) < 1e-9 * step)
                x = 0; /* no "-1e-19" where the axis crosses zero */
            svg_line(f, ax_px(&ax, x), T, ax_px(&ax, x), T + PH + 4, "grid");
            snprintf(buf, sizeof buf, "%.*g", digits, x);
            svg_text(f, ax_px(&ax, x), T + PH + 16, "middle", "small", 0, buf);
        }
    }
    if (ay.a.log) {
        /* ticks 1, 1.5, 2, 3, 5 per decade over one decade; 1, 2, 5 up to two; powers of ten beyond */
        double decades = log10(ay.top) - ay.a.lo;
        for (int e = 0; e <= (int)ceil(decades); e++) {
            static const double mult[] = {1, 1.5, 2, 3, 5};
            double d = pow(10.0, ay.a.lo + e);
            for (size_t j = 0; j < 5; j++) {
                double m = d * mult[j];
                bool keep = decades <= 1 ? true : decades <= 2 ? (j == 0 || j == 2 || j == 4) : j == 0;
                if (m > ay.top * 1.0001 || !keep)
                    continue;
                svg_line(f, L - 4, ax_px(&ay.a, m), L + PW, ax_px(&ay.a, m), "grid");
                tick_label(buf, sizeof buf, m);
                svg_text(f, L - 6, ax_px(&ay.a, m) + 3.5, "end", "small", 0, buf);
            }
        }
    } else {
        double ystep = nice_step(ay.top, 5);
        for (double k = 0; k * ystep <= ay.top * 1.0001; k += 1) {
            svg_line(f, L - 4, ax_px(&ay.a, k * ystep), L + PW, ax_px(&ay.a, k * ystep), "grid");
            snprintf(buf, sizeof buf, "%.4g", k * ystep);
            svg_text(f, L - 6, ax_px(&ay.a, k * ystep) + 3.5, "end", "small", 0, buf);
        }
    }
    /* Where a non-monotone verdict changes: between which sweep points. */
    if (b->state == PS_BOUND_NON_MONOTONE)
        for (size_t i = 0; i < b->n_changes; i++) {
            double x1 = ax_px(&ax, b->change_lo[i]), x2 = ax_px(&ax, b->change_hi[i]);
            fprintf(f, "<rect class=\"flip\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", fmin(x1, x2),
                    T, fabs(x2 - x1), PH);
        }
    fprintf(f, "<rect class=\"frame\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", L, T, PW, PH);
    /* The line every point is compared with: the allowed value of the drawn
     * floor, or severity 1. */
    bool line = isfinite(allowed) && allowed > ay.bot && allowed <= ay.top;
    if (line) {
        double y = ax_px(&ay.a, allowed);
        fprintf(f, "<line class=\"marginal\" data-allowed=\"%.17g\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n",
                allowed, L, y, L + PW, y);
        if (sev)
            snprintf(buf, sizeof buf, "severity 1");
        else
            snprintf(buf, sizeof buf, "allowed %s %.4g", brief, allowed);
        svg_text(f, L + PW - 3, y - 4, "end", "small value", 0, buf);
    }
    /* The curve through the sweep points, broken where the value is missing;
     * a point that cannot be stabilized sits on the top edge. */
    bool open = false, clipped = false, any_unstab = false;
    double py[PS_FAM_SWEEP];
    for (size_t i = 0; i < b->n_curve; i++) {
        double v = b->curve_unstab[i] ? INFINITY : ps_boundary_plotted_value(b, i);
        py[i] = NAN;
        if (isnan(v)) {
            if (open)
                fprintf(f, "\"/>\n");
            open = false;
            continue;
        }
        any_unstab |= b->curve_unstab[i];
        clipped |= !b->curve_unstab[i] && v > ay.top;
        py[i] = value_px(&ay, v);
        fprintf(f, "%s%.1f,%.1f", open ? " " : "<polyline class=\"curve\" points=\"", ax_px(&ax, b->curve_x[i]),
                py[i]);
        open = true;
    }
    if (open)
        fprintf(f, "\"/>\n");
    if (found) {
        double x = ax_px(&ax, b->value);
        svg_line(f, x, T, x, T + PH, "halo");
        svg_line(f, x, T, x, T + PH, "promise");
        fprintf(f, "<path class=\"clipmark\" d=\"M%.1f %.1fl-5 -8h10z\"/>\n", x, T + PH);
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
        svg_text(f, x + (left ? -4 : 4), T + 13, left ? "end" : "start", "small value", 0, buf);
        svg_text(f, x + (left ? -4 : 4), T + 25, left ? "end" : "start", "small value", 0,
                 b->pass_below ? "passes below" : "passes above");
    }
    for (size_t i = 0; i < b->n_curve; i++) {
        if (isnan(py[i]))
            continue;
        double x = ax_px(&ax, b->curve_x[i]), v = ps_boundary_plotted_value(b, i);
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
            fprintf(f, "<path class=\"clipmark\" d=\"M%.1f %.1fl-5 8h10z\"/>\n", x, T - 10);
        pass_mark(f, x, py[i], b->curve_pass[i]);
        fprintf(f, "</g>\n");
    }
    snprintf(buf, sizeof buf, "%s (parameter value, %s)", name, ax.log ? "log" : "linear");
    svg_text(f, L + PW / 2, T + PH + 34, "middle", "", 0, buf);
    if (sev)
        snprintf(buf, sizeof buf, "severity (largest share, linear)");
    else
        snprintf(buf, sizeof buf, "%s floor (log)", q == PS_QTY_EFFORT ? "effort |C S|" : brief);
    svg_text(f, 16, T + PH / 2, "middle", "", -90, buf);
    double ly = H - 12;
    pass_mark(f, L + 4, ly - 4, true);
    svg_text(f, L + 13, ly, "start", "small", 0, "passes");
    pass_mark(f, L + 64, ly - 4, false);
    svg_text(f, L + 73, ly, "start", "small", 0, "fails");
    if (b->state == PS_BOUND_NON_MONOTONE) {
        fprintf(f, "<rect class=\"flip\" x=\"%.1f\" y=\"%.1f\" width=\"14\" height=\"10\"/>\n", L + 112, ly - 9);
        svg_text(f, L + 130, ly, "start", "small", 0, "verdict changes");
    }
    switch (b->state) {
    case PS_BOUND_FOUND: snprintf(buf, sizeof buf, "one change of verdict"); break;
    case PS_BOUND_ALL_PASS: snprintf(buf, sizeof buf, "passes over the whole sweep"); break;
    case PS_BOUND_ALL_FAIL: snprintf(buf, sizeof buf, "fails over the whole sweep"); break;
    default: snprintf(buf, sizeof buf, "not monotone: %zu changes", b->n_changes); break;
    }
    svg_text(f, L + PW, ly, "end", "small", 0, buf);
    fprintf(f, "</svg>\n");

    char text[700];
    ps_boundary_text(fr, b, text, sizeof text);
    size_t fail_stab = 0;
    for (size_t i = 0; i < b->n_curve; i++)
        fail_stab += !b->curve_pass[i] && !b->curve_unstab[i];
    fprintf(f, "<figcaption>%s of ", sev ? "Severity" : q == PS_QTY_EFFORT ? "Effort floor (peak |C S|)" : what);
    h_text(f, fr->id);
    fprintf(f, " at the sorted sweep points of ");
    h_text(f, name);
    fprintf(f, ", the other parameters at nominal; %s parameter axis, %s %s axis. Open circles pass (clear or "
               "marginal), black squares fail.",
            ax.log ? "log" : "linear", sev ? "linear" : "log", brief);
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
    static const char *const cls[PS_VERDICT_COUNT] = {"bar-clear", "bar-marginal", "bar-redesign", "bar-unstab-y",
                                                      "bar-unread", "bar-unread"};
    fprintf(f, "<rect class=\"%s\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"", cls[v], x, y, w, h);
    if (v == PS_VERDICT_UNSTABILIZABLE)
        fprintf(f, " fill=\"url(#ps-hatch-y%zu)\"", k);
    fputs("/>", f);
}

static void yield_figure(FILE *f, const ps_family_result *fr, size_t k)
{
    const ps_yield *y = &fr->yield;
    const double W = 700, H = 100, L = 12, PW = 400, T = 34, BH = 22;
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
    svg_open_class(f, W, H, "family-yield", buf);
    /* The hatch of not-stabilizable units; its id is unique in the page, one per family. */
    fprintf(f, "<defs><pattern id=\"ps-hatch-y%zu\" width=\"6\" height=\"6\" patternUnits=\"userSpaceOnUse\" "
               "patternTransform=\"rotate(45)\"><rect width=\"6\" height=\"6\" fill=\"#fff\"/>"
               "<line x1=\"0\" y1=\"0\" x2=\"0\" y2=\"6\" style=\"stroke:#000;stroke-width:2.5\"/></pattern></defs>\n",
            k);
    svg_text(f, 10, 16, "start", "title", 0, buf);
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
    fprintf(f, "<rect class=\"frame\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", L, T, PW, BH);
    /* The passing share (clear and marginal: the first two segments) and its interval above the bar. */
    double xp = L + PW * y->pass_frac, xl = L + PW * y->pass_lo, xh = L + PW * y->pass_hi;
    if (y->valid) {
        svg_line(f, xp, T - 8, xp, T + BH, "halo");
        svg_line(f, xp, T - 8, xp, T + BH, "limit");
        svg_line(f, xl, T - 5, xh, T - 5, "limit");
        svg_line(f, xl, T - 9, xl, T - 1, "");
        svg_line(f, xh, T - 9, xh, T - 1, "");
    }
    for (int p = 0; p <= 100; p += 25) {
        double xt = L + PW * p / 100.0;
        svg_line(f, xt, T + BH, xt, T + BH + 4, "");
        snprintf(buf, sizeof buf, "%d %%", p);
        svg_text(f, xt, T + BH + 15, p == 0 ? "start" : p == 100 ? "end" : "middle", "small", 0, buf);
    }
    if (y->valid) {
        snprintf(buf, sizeof buf, "passing %.1f %%", 100 * y->pass_frac);
        svg_text(f, L + PW + 12, T + 9, "start", "title", 0, buf);
        snprintf(buf, sizeof buf, "95 %% interval %.1f .. %.1f %% (Wilson)", 100 * y->pass_lo, 100 * y->pass_hi);
        svg_text(f, L + PW + 12, T + 22, "start", "small", 0, buf);
    } else
        svg_text(f, L + PW + 12, T + 9, "start", "title", 0, "no unit could be evaluated");
    if (y->invalid) {
        snprintf(buf, sizeof buf, "not in the bar: %zu invalid units", y->invalid);
        svg_text(f, L + PW + 12, T + 35, "start", "small", 0, buf);
    }
    double lx = L;
    for (int v = 0; v < PS_VERDICT_UNREAD; v++) {
        if (y->count[v] == 0)
            continue;
        yield_rect(f, v, k, lx, H - 19, 14, 10);
        fputc('\n', f);
        snprintf(buf, sizeof buf, "%s %.1f %% (%zu)", ps_verdict_name((ps_verdict)v), 100 * y->frac[v], y->count[v]);
        svg_text(f, lx + 18, H - 10, "start", "small", 0, buf);
        lx += 30 + 5.6 * (double)strlen(buf);
    }
    char text[1400];
    ps_yield_text(fr, text, sizeof text);
    fprintf(f, "</svg>\n<figcaption>Share per verdict of the %zu units that could be evaluated, of %zu drawn, the "
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
    double xlo = floor(log10(wlo)), xhi = ceil(log10(whi));
    if (xhi <= xlo)
        xhi = xlo + 1;
    double allowed = s->req.ms_allowed;
    /* Ms axis (log): up to the curve's largest finite value, but at least
     * twice the allowed Ms and at most a hundred times it; larger values are
     * drawn on the top edge and marked. */
    double ytop = fmin(fmax(mtop, 2 * allowed), 100 * allowed);
    double ylo = 0, yhi = log10(ytop) * 1.02;
    const double W = 400, H = 300, L = 64, T = 34, PW = 300, PH = 200;
#define PX(w) (L + PW * (log10(w) - xlo) / (xhi - xlo))
#define PY(m) (T + PH - PH * (log10(m) - ylo) / (yhi - ylo))
    char buf[200], label[80];
    fit_label(label, sizeof label, s->id, 36);
    snprintf(buf, sizeof buf, "%s: Ms floor against band edge", label);
    fprintf(f, "<figure>\n");
    svg_open(f, W, H, buf);
    svg_text(f, 10, 16, "start", "title", 0, buf);
    for (double e = xlo; e <= xhi + 1e-9; e += 1) {
        double w = pow(10.0, e);
        svg_line(f, PX(w), T, PX(w), T + PH + 4, "grid");
        tick_label(buf, sizeof buf, w);
        svg_text(f, PX(w), T + PH + 16, "middle", "small", 0, buf);
        for (int m = 2; m <= 9 && e < xhi; m++)
            svg_line(f, PX(m * w), T + PH, PX(m * w), T + PH + 3, "");
    }
    /* Ms ticks 1, 2, 5, 10, ... (only powers of ten beyond two decades). */
    bool dense = ytop <= 100;
    for (double d = 1; d <= ytop * 1.0001; d *= 10) {
        static const double mult[] = {1, 2, 5};
        for (size_t j = 0; j < 3; j++) {
            double m = d * mult[j];
            if (m > ytop * 1.0001 || (!dense && j > 0))
                continue;
            svg_line(f, L - 4, PY(m), L + PW, PY(m), "grid");
            tick_label(buf, sizeof buf, m);
            svg_text(f, L - 6, PY(m) + 3.5, "end", "small", 0, buf);
        }
    }
    fprintf(f, "<rect class=\"frame\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", L, T, PW, PH);
    /* The curve, broken where the floor has no value; values above the axis sit on the top edge. */
    bool open = false, clipped = false;
    for (size_t i = 0; i < s->n_curve; i++) {
        double w = s->curve_wb[i], m = s->curve_ms[i];
        if (!(isfinite(w) && w > 0) || isnan(m)) {
            if (open)
                fprintf(f, "\"/>\n");
            open = false;
            continue;
        }
        if (m > ytop) {
            m = ytop;
            clipped = true;
        }
        m = fmax(m, 1.0);
        fprintf(f, "%s%.1f,%.1f", open ? " " : "<polyline class=\"curve\" points=\"", PX(w), PY(m));
        open = true;
    }
    if (open)
        fprintf(f, "\"/>\n");
    if (allowed > 1 && allowed <= ytop) {
        svg_line(f, L, PY(allowed), L + PW, PY(allowed), "marginal");
        snprintf(buf, sizeof buf, "allowed Ms %.3g", allowed);
        svg_text(f, L + PW - 3, PY(allowed) - 4, "end", "small", 0, buf);
    }
    if (required) {
        svg_line(f, PX(s->req.wb), T, PX(s->req.wb), T + PH, "required");
        snprintf(buf, sizeof buf, "required %.3g", s->req.wb);
        svg_text(f, PX(s->req.wb) + 3, T + PH - 6, "start", "small", 0, buf);
    }
    if (widest) {
        svg_line(f, PX(bt->limit), T, PX(bt->limit), T + PH, "promise");
        fprintf(f, "<path class=\"clipmark\" d=\"M%.1f %.1fl-5 -8h10z\"/>\n", PX(bt->limit), T + PH);
        snprintf(buf, sizeof buf, "widest band edge %.3g rad/s", bt->limit);
        /* Left of the line the floor is still below the allowed Ms, so the
         * top-left corner is free; near the left edge use the right side. */
        bool left = PX(bt->limit) - L > 125;
        svg_text(f, PX(bt->limit) + (left ? -3 : 3), T + 12, left ? "end" : "start", "small", 0, buf);
    }
    svg_text(f, L + PW / 2, T + PH + 34, "middle", "", 0, "band edge w_b (rad/s, log)");
    svg_text(f, 16, T + PH / 2, "middle", "", -90, "Ms floor (ratio, log)");
    fprintf(f, "</svg>\n");
#undef PX
#undef PY
    char text[400];
    ps_target_text(s, PS_TARGET_BAND, text, sizeof text);
    fprintf(f, "<figcaption>Ms floor forced by |S| &le; %.3g up to the band edge w_b, against w_b (both axes log). "
               "Dashed: the allowed Ms.",
            s->band_eps);
    if (required)
        fprintf(f, " Dotted: the required band edge.");
    if (widest)
        fprintf(f, " Solid with a triangle: the widest band edge with which every floor passes.");
    if (clipped)
        fprintf(f, " Values above %.3g are drawn on the top edge.", ytop);
    if (text[0]) {
        fprintf(f, " Target: ");
        h_text(f, text);
        fprintf(f, ".");
    }
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
    fprintf(f, "<p>Source: <code class=\"tok\">");
    h_text(f, catalog_of(r, s));
    fprintf(f, ":%zu</code></p>\n", s->line);
    if (s->verdict == PS_VERDICT_UNREAD) {
        fprintf(f, "<p>Input error at <code class=\"tok\">");
        h_text(f, catalog_of(r, s));
        fprintf(f, ":%zu:%zu</code>", s->err_line, s->err_col);
        if (s->err_field[0]) {
            fprintf(f, ", field <code class=\"tok\">");
            h_text(f, s->err_field);
            fprintf(f, "</code>");
        }
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
    bool map = !s->in_z, band = s->n_curve > 0;
    if (s->in_z)
        fprintf(f, "<p>The plant is given in z: its roots are listed above, not drawn in the s-plane.</p>\n");
    if (map || band) {
        fprintf(f, "<div class=\"figs\">\n");
        if (map)
            pz_map(f, s);
        if (band)
            band_figure(f, s);
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
               "figures. Pole/zero maps: poles x, zeros o, the right half plane shaded, symmetric-log axes. Ms floor "
               "against band edge: the floor forced by keeping |S| small up to the band edge, both axes log, the "
               "allowed Ms dashed; drawn where the curve was computed.</p>\n");
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
        fprintf(f, "</span> (<code class=\"tok\">");
        h_text(f, catalog_of(r, s));
        fprintf(f, ":%zu:%zu</code>", s->err_line, s->err_col);
        if (s->err_field[0]) {
            fprintf(f, ", field <code class=\"tok\">");
            h_text(f, s->err_field);
            fprintf(f, "</code>");
        }
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
    families(f, r);
    plant_sections(f, r);
    input_errors(f, r);
    meanings(f);
    fprintf(f, "</body>\n</html>\n");
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

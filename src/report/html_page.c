/* html_page.c - the page of the HTML screening report apart from its figures:
 * verdict colours and labels, plant anchors, the page style sheet and the first page for the board. */
#include "report/html_page.h"

#include <math.h>
#include <string.h>

#include "report/plot.h"
#include "core/diag.h"
#include "report/reports.h"

/* ---- verdict colours ----
 *
 * Okabe and Ito, "Color Universal Design (CUD): how to make figures and
 * presentations that are friendly to colorblind people" (2002, jfly.iam.u-tokyo.ac.jp/color/),
 * hex values from memory: bluish green #009E73, yellow #F0E442, orange
 * #E69F00, blue #0072B2, black; input errors get no colour (white). The
 * eight Okabe-Ito colours fall in five bands of greyscale lightness, so six
 * verdicts take one colour from each band plus white: CIE L* about 58, 89,
 * 71, 0, 46 and 100, at least 10.9 apart (test_html_page.c computes them),
 * so the verdicts also differ in greyscale print. The mark beside every
 * verdict word carries it without any colour. */
static const ps_html_colour verdict_colour[PS_VERDICT_COUNT] = {
    [PS_VERDICT_CLEAR] = {"#009E73", "#000000"},
    [PS_VERDICT_MARGINAL] = {"#F0E442", "#000000"},
    [PS_VERDICT_REDESIGN] = {"#E69F00", "#000000"},
    [PS_VERDICT_UNSTABILIZABLE] = {"#000000", "#FFFFFF"},
    [PS_VERDICT_NEEDS_BANDWIDTH] = {"#0072B2", "#FFFFFF"},
    [PS_VERDICT_UNREAD] = {"#FFFFFF", "#000000"},
};

ps_html_colour ps_html_verdict_colour(ps_verdict v)
{
    if ((int)v < 0 || v >= PS_VERDICT_COUNT)
        return (ps_html_colour){"#FFFFFF", "#000000"};
    return verdict_colour[v];
}

/* ---- text and anchors ---- */

void ps_html_text(FILE *f, const char *s)
{
    ps_plot_escape(f, s); /* one escaper for page and figures */
}

void ps_html_path(FILE *f, const char *path)
{
    char part[256];
    const char *p = path ? path : "";
    while (*p) {
        size_t n = strcspn(p, "/");
        size_t take = n < sizeof part - 1 ? n : sizeof part - 1;
        if (p[take] == '/')
            take++;
        memcpy(part, p, take);
        part[take] = '\0';
        ps_html_text(f, part);
        p += take;
        if (take && part[take - 1] == '/' && *p)
            fputs("<wbr>", f);
    }
}

void ps_html_plant_anchor(char *out, size_t n, size_t rank, const char *id)
{
    static const char hex[] = "0123456789ABCDEF";
    if (n == 0)
        return;
    int k = snprintf(out, n, "p%zu-", rank);
    size_t at = k < 0 ? 0 : (size_t)k < n ? (size_t)k : n - 1;
    for (const unsigned char *c = (const unsigned char *)(id ? id : ""); *c; c++) {
        bool plain = (*c >= 'a' && *c <= 'z') || (*c >= 'A' && *c <= 'Z') || (*c >= '0' && *c <= '9') || *c == '-';
        size_t need = plain ? 1 : 3;
        if (at + need >= n)
            break;
        if (plain)
            out[at++] = (char)*c;
        else {
            out[at++] = '_';
            out[at++] = hex[*c >> 4];
            out[at++] = hex[*c & 15];
        }
    }
    out[at] = '\0';
}

void ps_html_row_anchor(char *out, size_t n, size_t rank)
{
    snprintf(out, n, "r%zu", rank);
}

bool ps_html_has_section(const ps_run *r, size_t i)
{
    return i < r->n_rows && i < PS_HTML_SECTIONS;
}

bool ps_html_has_row(const ps_run *r, size_t i)
{
    return i < r->n_rows && i < PS_HTML_RANK_ROWS;
}

void ps_html_verdict_label(FILE *f, ps_verdict v)
{
    fprintf(f, "<span class=\"verdict-label v-%s\"><span class=\"mark\" aria-hidden=\"true\">%s</span> %s</span>",
            ps_verdict_name(v), ps_verdict_mark(v), ps_verdict_name(v));
}

/* ---- style ---- */

/* Page rules; they follow the figures' style sheet and override its table
 * rules where the page needs other ones (ids and file:line kept whole). */
static const char page_style[] =
    "a{color:#003a70}a:visited{color:#4b1d6b}\n"
    "caption{text-align:left;font-weight:bold;padding:.2em 0}\n"
    ".tok{white-space:nowrap;word-break:normal;overflow-wrap:normal}\n"
    ".path{white-space:normal;word-break:normal;overflow-wrap:normal}\n"
    "td.id,th.id,td.src{word-break:normal;overflow-wrap:normal;min-width:0}\n"
    "th[scope=row]{font-weight:normal;border-bottom:1px solid #777}\n"
    ".verdict-label{display:inline-block;padding:0 .35em;border:1px solid #000;border-radius:.2em;"
    "white-space:nowrap}\n"
    ".verdict-label .mark{font-weight:bold}\n"
    ".v-input-error{border-style:dashed}\n"
    ".note{white-space:pre-wrap}.note-short{display:block;font-size:.85em;color:#333}\n"
    ".hash{overflow-wrap:anywhere;word-break:break-all;font-size:.85em}\n"
    "code.cmd{white-space:pre-wrap;overflow-wrap:anywhere}\n"
    "table.counts td.chart{width:16em}.bar{display:inline-block;height:.95em;border:1px solid #000;"
    "vertical-align:middle;min-width:2px}\n"
    ".board .meta{margin:.15em 0}ol.flagged-list li{margin:.3em 0}\n"
    ".cap{font-weight:bold}\n"
    "article.plant{border-top:1px solid #777;margin-top:1em}\n"
    ".back{font-size:.9em;margin:.1em 0}\n"
    ".structure{font-weight:bold}\n"
    "body{max-width:92em}\n"
    /* Narrow screens: every ranking row becomes a block of labelled lines. */
    "@media (max-width:700px){body{padding:0 .5em;margin:.5em auto}"
    /* an id wider than the screen folds rather than widening the page */
    ".tok{white-space:normal;overflow-wrap:anywhere}"
    "table.stack,table.stack>tbody,table.stack>tbody>tr,table.stack td,table.stack th[scope=row]{display:block;"
    "width:auto}"
    "table.stack>caption{display:block}"
    "table.stack>thead{position:absolute;width:1px;height:1px;overflow:hidden;clip:rect(0 0 0 0)}"
    "table.stack>tbody>tr{border:1px solid #000;margin:0 0 .6em}"
    "table.stack td,table.stack th[scope=row]{border:none;border-bottom:1px solid #ccc;text-align:left;"
    "white-space:normal;overflow-x:auto}"
    "table.stack td[data-label]::before,table.stack th[data-label]::before{content:attr(data-label) \": \";"
    "font-weight:bold}"
    "table.counts td.chart{width:auto}.figs{display:block}}\n"
    "@media print{html,body{overflow:visible}a{color:#000;text-decoration:none}"
    ".board{break-after:page;page-break-after:always}"
    "article.plant{break-inside:auto;page-break-inside:auto}article.plant h3{break-after:avoid;"
    "page-break-after:avoid}.back{display:none}"
    "thead{display:table-header-group}caption{break-after:avoid}}\n";

void ps_html_page_style(FILE *f)
{
    fputs(page_style, f);
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        ps_html_colour c = verdict_colour[v];
        fprintf(f, ".v-%s{background:%s;color:%s}\n", ps_verdict_name((ps_verdict)v), c.background, c.text);
    }
}

/* ---- the first page ---- */

/* The report set's stem: the first catalog's file name without directory
 * and ending, as the command line names the set (src/cli/main.c stem_of). */
static void stem_of(const ps_run *r, char *out, size_t n)
{
    const char *path = r->n_catalogs ? r->catalogs[0].file : "";
    const char *base = strrchr(path, '/');
    base = base ? base + 1 : path;
    snprintf(out, n, "%s", base);
    char *dot = strrchr(out, '.');
    if (dot && dot != out)
        *dot = '\0';
}

void ps_html_files_sentence(FILE *f, const ps_run *r)
{
    char stem[256];
    stem_of(r, stem, sizeof stem);
    const char *ext[] = {"csv", "json", "plants.jsonl"};
    fprintf(f, "Every plant is in the files of this report set: ");
    for (size_t i = 0; i < 3; i++) {
        fprintf(f, "%s<code class=\"tok\">", i == 0 ? "" : i == 1 ? ", " : " and the per-plant records in ");
        ps_html_text(f, stem);
        fprintf(f, ".screen.%s</code>", ext[i]);
    }
    fputs(".", f);
}

static void inputs_table(FILE *f, const ps_run *r)
{
    fprintf(f, "<table class=\"inputs stack\">\n<caption>Input files</caption>\n<thead><tr><th scope=\"col\">File</th>"
               "<th scope=\"col\">Title</th><th scope=\"col\">SHA-256</th><th scope=\"col\">Bytes</th>"
               "<th scope=\"col\">Read</th></tr></thead>\n<tbody>\n");
    if (r->n_catalogs == 0)
        fprintf(f, "<tr><td colspan=\"5\">none</td></tr>\n");
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        fprintf(f, "<tr><th scope=\"row\" data-label=\"File\"><code class=\"path\">");
        ps_html_path(f, c->file);
        fprintf(f, "</code></th><td data-label=\"Title\">");
        ps_html_text(f, c->title && c->title[0] ? c->title : "none");
        fprintf(f, "</td><td data-label=\"SHA-256\">");
        if (c->sha256[0]) {
            fprintf(f, "<code class=\"hash\">");
            ps_html_text(f, c->sha256);
            fprintf(f, "</code></td><td class=\"num\" data-label=\"Bytes\">%llu</td>", (unsigned long long)c->bytes);
        } else
            fprintf(f, "not taken</td><td class=\"num\" data-label=\"Bytes\">n/a</td>");
        fprintf(f, "<td data-label=\"Read\">");
        if (c->failed) {
            char pos[PS_DIAG_POS];
            ps_diag_pos_words(pos, sizeof pos, c->line, c->col);
            fprintf(f, "<strong>not read to the end</strong> (%s%s", pos, pos[0] ? ": " : "");
            ps_html_text(f, c->error);
            char unread[256];
            ps_unread_text(c->line, unread, sizeof unread);
            fprintf(f, "); ");
            ps_html_text(f, unread);
        } else
            fprintf(f, "read to the end");
        fprintf(f, "</td></tr>\n");
    }
    fprintf(f, "</tbody>\n</table>\n");
}

static void counts_table(FILE *f, const ps_run *r)
{
    fprintf(f, "<p>Entries: %zu; screened: %zu; input errors: %zu.</p>\n", r->counts.entries, r->counts.models,
            r->counts.errors);
    fprintf(f, "<table class=\"counts\">\n<caption>Plants per verdict (bar: share of all %zu plants)</caption>\n"
               "<thead><tr><th scope=\"col\">Verdict</th><th scope=\"col\">Plants</th><th scope=\"col\">Share</th>"
               "<th scope=\"col\">Chart</th></tr></thead>\n<tbody>\n",
            r->n_rows);
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        size_t k = r->per_verdict[v];
        double share = r->n_rows ? 100.0 * (double)k / (double)r->n_rows : 0.0;
        fprintf(f, "<tr><th scope=\"row\">");
        ps_html_verdict_label(f, (ps_verdict)v);
        fprintf(f, "</th><td class=\"num\">%zu</td><td class=\"num\">%.1f %%</td><td class=\"chart\">", k, share);
        if (k > 0)
            fprintf(f, "<span class=\"bar v-%s\" style=\"width:%.1f%%\" aria-hidden=\"true\"></span>",
                    ps_verdict_name((ps_verdict)v), share);
        fprintf(f, "</td></tr>\n");
    }
    fprintf(f, "</tbody>\n</table>\n");
}

/* The targets that matter most for one plant: those with a boundary value
 * (at most two); failing that, the first that says anything. */
static void main_targets(FILE *f, const ps_summary *s)
{
    char text[400];
    size_t shown = 0;
    for (int k = 0; k < PS_TARGET_COUNT && shown < 2; k++) {
        if (s->target[k].state != PS_TARGET_FOUND)
            continue;
        ps_target_text(s, (ps_target_kind)k, text, sizeof text);
        if (!text[0])
            continue;
        fputs(shown ? "; " : " Main targets: ", f);
        ps_html_text(f, text);
        shown++;
    }
    for (int k = 0; k < PS_TARGET_COUNT && shown == 0; k++) {
        ps_target_text(s, (ps_target_kind)k, text, sizeof text);
        if (!text[0])
            continue;
        fputs(" Target: ", f);
        ps_html_text(f, text);
        shown++;
    }
    if (shown == 0)
        fputs(" No single change of pole, zero, delay or bandwidth applies", f);
    fputs(".", f);
}

static void flagged_list(FILE *f, const ps_run *r)
{
    size_t n_redesign = r->per_verdict[PS_VERDICT_REDESIGN], n_unstab = r->per_verdict[PS_VERDICT_UNSTABILIZABLE];
    size_t n_flagged = n_redesign + n_unstab;
    fprintf(f, "<section id=\"flagged\">\n<h2>Plants that need a hardware change</h2>\n");
    if (n_flagged == 0) {
        fprintf(f, "<p>No plant needs a hardware change.</p>\n</section>\n");
        return;
    }
    fprintf(f, "<p>%zu plant%s: %zu redesign, %zu not stabilizable, worst first", n_flagged, n_flagged == 1 ? "" : "s",
            n_redesign, n_unstab);
    if (n_flagged > PS_HTML_BOARD_FLAGGED)
        fprintf(f, "; <span class=\"cap\">showing %d of %zu here</span>", PS_HTML_BOARD_FLAGGED, n_flagged);
    fprintf(f, ".</p>\n<ol class=\"flagged-list\">\n");
    size_t listed = 0;
    for (size_t i = 0; i < r->n_rows && listed < PS_HTML_BOARD_FLAGGED && listed < n_flagged; i++) {
        ps_verdict v = ps_run_verdict(r, i);
        if (v != PS_VERDICT_REDESIGN && v != PS_VERDICT_UNSTABILIZABLE)
            continue;
        const ps_summary *s = ps_run_row(r, i);
        listed++;
        fprintf(f, "<li value=\"%zu\">", i + 1);
        if (ps_html_has_section(r, i)) {
            char anchor[16 + 3 * PS_ID_MAX];
            ps_html_plant_anchor(anchor, sizeof anchor, i + 1, s->id);
            fprintf(f, "<a class=\"tok\" href=\"#%s\">", anchor);
            ps_html_text(f, s->id);
            fprintf(f, "</a> ");
        } else {
            fprintf(f, "<span class=\"tok\">");
            ps_html_text(f, s->id);
            fprintf(f, "</span> ");
        }
        ps_html_verdict_label(f, s->verdict);
        if (isfinite(s->severity))
            fprintf(f, " severity %.3f", s->severity);
        fprintf(f, ". Cause: ");
        ps_html_text(f, s->cause);
        size_t len = strlen(s->cause);
        if (len && s->cause[len - 1] != '.')
            fputc('.', f);
        main_targets(f, s);
        fprintf(f, "</li>\n");
    }
    fprintf(f, "</ol>\n");
    if (n_flagged > PS_HTML_BOARD_FLAGGED) {
        fprintf(f, "<p>");
        ps_html_files_sentence(f, r);
        fprintf(f, "</p>\n");
    }
    fprintf(f, "</section>\n");
}

void ps_html_board(FILE *f, const ps_run *r)
{
    fprintf(f, "<header class=\"board\" id=\"top\">\n<h1>Screening report");
    bool titled = false;
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const char *t = r->catalogs[i].title;
        if (!t || !t[0])
            continue;
        fputs(titled ? "; " : ": ", f);
        ps_html_text(f, t);
        titled = true;
    }
    fprintf(f, "</h1>\n");
    if (r->meta.date[0]) {
        fprintf(f, "<p class=\"meta\">Date: <time>");
        ps_html_text(f, r->meta.date);
        fprintf(f, "</time> (UTC, from SOURCE_DATE_EPOCH).</p>\n");
    }
    fprintf(f, "<p class=\"meta\">Written by plantsieve ");
    ps_html_text(f, PS_VERSION);
    if (r->meta.command_line) {
        fprintf(f, "; command line: <code class=\"cmd\">");
        ps_html_text(f, r->meta.command_line);
        fprintf(f, "</code>");
    }
    fprintf(f, ".</p>\n<p class=\"meta\">A plant is marginal from a share of %.3g of the allowed log-peak. "
               "Each verdict is shown by its word, a mark of its own shape and a colour.</p>\n",
            r->opt.marginal_at);
    inputs_table(f, r);
    counts_table(f, r);
    flagged_list(f, r);
    /* The caution's text begins with its own "Caution:", set in bold here
     * rather than repeated by a heading. */
    static const char lead[] = "Caution: ";
    bool led = strncmp(ps_caution_text, lead, sizeof lead - 1) == 0;
    fprintf(f, "<section class=\"caution\" id=\"caution\">\n<p><strong>Caution:</strong> ");
    ps_html_text(f, led ? ps_caution_text + sizeof lead - 1 : ps_caution_text);
    fprintf(f, "</p>\n</section>\n</header>\n");
}

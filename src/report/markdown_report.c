/* markdown_report.c - the screening run as a Markdown document for design
 * reviews: counts, ranked table, redesign list, requirements and caution. */
#include "report/reports.h"
#include "report/certificate.h"
#include "core/text.h"

#include <ctype.h>
#include <math.h>
#include <stdbool.h>
#include <string.h>

/* Write s as inline Markdown text. Characters that CommonMark could read as
 * markup get a backslash (allowed before any ASCII punctuation): '*', code
 * and link brackets always; '_' unless it sits inside a word (CommonMark never
 * reads an intraword underscore as emphasis, so "w_h" stays readable); '<'
 * only where it could open raw HTML or an
 * autolink, '&' only where it could start an entity, '|' only inside a table
 * cell. Line breaks and tabs become spaces so a value never ends a row. */
static void md_put(FILE *f, const char *s, bool in_table)
{
    if (!s)
        return;
    for (const char *c = s; *c; c++) {
        char next = c[1];
        bool intraword = c > s && isalnum((unsigned char)c[-1]) && isalnum((unsigned char)next);
        bool esc = strchr("\\`*[]", *c) != NULL || (*c == '_' && !intraword) ||
                   (*c == '<' && (isalpha((unsigned char)next) || (next && strchr("/!?", next)))) ||
                   (*c == '&' && (isalnum((unsigned char)next) || next == '#')) || (*c == '|' && in_table);
        if (*c == '\r' || *c == '\n' || *c == '\t')
            fputc(' ', f);
        else {
            if (esc)
                fputc('\\', f);
            fputc(*c, f);
        }
    }
}

static void md_text(FILE *f, const char *s) { md_put(f, s, false); }
static void md_cell(FILE *f, const char *s) { md_put(f, s, true); }

/* A number ("%.3f" for shares, "%.4g" otherwise), or a word when it has no
 * finite value. */
/* A floor: as md_num, and past a double's range as a power of ten from its logarithm. */
static void md_num(FILE *f, bool share, double x, const char *inf_word);
static void md_big(FILE *f, double x, double ln)
{
    char b[48];
    if (isinf(x) && x > 0 && isfinite(ln))
        fputs(ps_text_big(b, sizeof b, x, ln, 4), f);
    else
        md_num(f, false, x, "infinite");
}

static void md_num(FILE *f, bool share, double x, const char *inf_word)
{
    if (isfinite(x))
        fprintf(f, share ? "%.3f" : "%.4g", x);
    else if (isinf(x))
        fputs(inf_word, f);
    else
        fputs("n/a", f);
}

static const char *catalog_of(const ps_run *r, const ps_summary *s)
{
    return s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : "";
}

/* Inside a code span nothing is markup; only a backtick or a line break
 * would end it. */
static void md_code(FILE *f, const char *s)
{
    fputc('`', f);
    for (const char *p = s; p && *p; p++)
        fputc(*p == '`' || *p == '\n' || *p == '\r' ? '?' : *p, f);
    fputc('`', f);
}

/* A bar of the text charts: width proportional to n of max, at least one
 * character for a non-zero count. */
static void md_bar(FILE *f, size_t n, size_t max)
{
    enum { WIDTH = 30 };
    size_t w = max ? (size_t)((double)n / (double)max * WIDTH + 0.5) : 0;
    if (n && !w)
        w = 1;
    fputc('`', f);
    for (size_t i = 0; i < WIDTH; i++)
        fputc(i < w ? '#' : '.', f);
    fputc('`', f);
}

static bool is_flagged(ps_verdict v)
{
    return v == PS_VERDICT_REDESIGN || v == PS_VERDICT_UNSTABILIZABLE;
}

static size_t n_flagged(const ps_run *r)
{
    return r->per_verdict[PS_VERDICT_REDESIGN] + r->per_verdict[PS_VERDICT_UNSTABILIZABLE];
}

/* The first page: what the run was made from, the counts with a chart, what
 * must change (cause and the targets found), and the caution. */
static void first_page(FILE *f, const ps_run *r)
{
    const char *title = ps_run_title(r);
    fprintf(f, "# Screening report");
    if (title) {
        fputs(": ", f);
        md_text(f, title);
    }
    fprintf(f, "\n\n");
    if (r->meta.date[0])
        fprintf(f, "- Date: %s\n", r->meta.date);
    fprintf(f, "- Written by plantsieve %s\n", PS_VERSION);
    if (r->meta.command_line) {
        fprintf(f, "- Command: ");
        md_code(f, r->meta.command_line);
        fprintf(f, "\n");
    }
    fprintf(f, "- Inputs:%s\n", r->n_catalogs ? "" : " none");
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        fprintf(f, "  - ");
        md_code(f, c->file);
        if (c->title && c->title[0]) {
            fprintf(f, " (");
            md_text(f, c->title);
            fprintf(f, ")");
        }
        if (c->sha256[0])
            fprintf(f, ", %llu bytes, SHA-256 `%s`", (unsigned long long)c->bytes, c->sha256);
        if (c->failed) {
            char pos[PS_DIAG_POS];
            ps_diag_pos_words(pos, sizeof pos, c->line, c->col);
            fprintf(f, ": **not read to the end** (%s%s", pos, pos[0] ? ": " : "");
            md_text(f, c->error);
            char unread[256];
            ps_unread_text(c->line, unread, sizeof unread);
            fprintf(f, "); %s\n", unread);
        } else
            fprintf(f, ": read to the end\n");
    }
    fprintf(f, "\nSeverity is the share of the allowed log-peak used by the worst floor; marginal from %.3g, "
               "redesign above 1.\n\n",
            r->opt.marginal_at);

    fprintf(f, "## Counts\n\n");
    fprintf(f, "Entries: %zu; screened: %zu; input errors: %zu.\n\n", r->counts.entries, r->counts.models,
            r->counts.errors);
    size_t max = 0;
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        if (r->per_verdict[v] > max)
            max = r->per_verdict[v];
    fprintf(f, "| Verdict | Plants | Chart |\n|---|---:|---|\n");
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        fprintf(f, "| %s %s | %zu | ", ps_verdict_mark((ps_verdict)v), ps_verdict_name((ps_verdict)v),
                r->per_verdict[v]);
        md_bar(f, r->per_verdict[v], max);
        fprintf(f, " |\n");
    }
    fprintf(f, "\n");

    fprintf(f, "## What must change\n\n");
    size_t nf = n_flagged(r), shown = 0;
    if (nf == 0)
        fprintf(f, "No plant needs a hardware change.\n\n");
    else if (nf > PS_MD_BOARD_MAX)
        fprintf(f, "Showing %d of %zu plants to send back, worst first (all of them under \"Plants in detail\" "
                   "up to its cap, and in the CSV and JSON Lines files).\n\n",
                PS_MD_BOARD_MAX, nf);
    for (size_t i = 0; i < r->n_rows && shown < nf && shown < PS_MD_BOARD_MAX; i++) {
        if (!is_flagged(ps_run_verdict(r, i)))
            continue;
        const ps_summary *s = ps_run_row(r, i);
        shown++;
        fprintf(f, "- **");
        md_text(f, s->id);
        fprintf(f, "** (%s %s): ", ps_verdict_mark(s->verdict), ps_verdict_name(s->verdict));
        md_text(f, s->cause);
        fprintf(f, "\n");
        /* The most important targets: those with a boundary found (a change
         * that makes the plant pass), at most two, in the fixed order. */
        int told = 0;
        for (int k = 0; k < PS_TARGET_COUNT && told < 2; k++) {
            if (s->target[k].state != PS_TARGET_FOUND)
                continue;
            char text[400];
            ps_target_text(s, (ps_target_kind)k, text, sizeof text);
            if (!text[0])
                continue;
            fprintf(f, "  - ");
            md_text(f, text);
            fprintf(f, "\n");
            told++;
        }
        if (!told)
            fprintf(f, "  - no single change of pole, zero, delay or bandwidth found that makes it pass\n");
    }
    if (nf)
        fprintf(f, "\n");
    /* The caution text begins with its own "Caution:": no heading repeats it. */
    static const char lead[] = "Caution:";
    if (strncmp(ps_caution_text, lead, sizeof lead - 1) == 0) {
        fprintf(f, "**%s**", lead);
        md_text(f, ps_caution_text + sizeof lead - 1);
    } else
        md_text(f, ps_caution_text);
    fprintf(f, "\n\n");
}

/* Counts of every plant by severity, with a chart. */
static void distribution(FILE *f, const ps_run *r)
{
    fprintf(f, "## Severity of all %zu plants\n\n", r->n_rows);
    size_t count[PS_HIST_BINS], max = 0;
    ps_severity_histogram(r, count);
    for (int b = 0; b < PS_HIST_BINS; b++)
        if (count[b] > max)
            max = count[b];
    fprintf(f, "| Severity | Plants | Chart |\n|---|---:|---|\n");
    for (int b = 0; b < PS_HIST_BINS; b++) {
        const char *label = ps_histogram_label(b);
        if (b == PS_HIST_BINS - 2)
            label = "infinite (not stabilizable)";
        else if (b == PS_HIST_BINS - 1)
            label = "none (not judged, input error)";
        fprintf(f, "| %s | %zu | ", label, count[b]);
        md_bar(f, count[b], max);
        fprintf(f, " |\n");
    }
    fprintf(f, "\nA bin holds the severities above its lower end up to and including its upper end; the first bin "
               "also holds 0.\n\n");
}

/* The sentence naming the files that hold every plant. */
static void rest_files(FILE *f, const ps_run *r)
{
    char stem[PS_STEM_MAX];
    ps_report_stem(r, stem, sizeof stem);
    fprintf(f, "Every plant is in `");
    for (const char *p = stem; *p; p++)
        fputc(*p == '`' ? '?' : *p, f);
    fprintf(f, ".screen.csv` (one row per plant) and `");
    for (const char *p = stem; *p; p++)
        fputc(*p == '`' ? '?' : *p, f);
    fprintf(f, ".screen.plants.jsonl` (one JSON record per line), in this report's directory.");
}

static void ranked_table(FILE *f, const ps_run *r)
{
    fprintf(f, "## Ranking\n\n");
    if (r->n_rows == 0) {
        fprintf(f, "No plants.\n\n");
        return;
    }
    fprintf(f, "Worst first: not stabilizable, then by severity (largest share of the allowed log-peak), "
               "then the plants not judged for want of a bandwidth limit, input errors last.");
    if (r->n_rows > PS_MD_TABLE_MAX) {
        fprintf(f, " Showing %d of %zu plants. ", PS_MD_TABLE_MAX, r->n_rows);
        rest_files(f, r);
    }
    fprintf(f, "\n\n");
    fprintf(f, "| Rank | Plant | Verdict | Severity | Worst | Ms floor | Ms allowed | Mt floor | Mt allowed | Cause |\n");
    fprintf(f, "|---:|---|---|---:|---|---:|---:|---:|---:|---|\n");
    for (size_t i = 0; i < r->n_rows && i < PS_MD_TABLE_MAX; i++) {
        const ps_summary *s = ps_run_row(r, i);
        bool unread = s->verdict == PS_VERDICT_UNREAD;
        fprintf(f, "| %zu | ", i + 1);
        md_cell(f, s->id);
        fprintf(f, " | %s %s | ", ps_verdict_mark(s->verdict), ps_verdict_name(s->verdict));
        md_num(f, true, s->severity, "infinite");
        fprintf(f, " | %s | ", unread ? "n/a" : s->worst);
        if (unread)
            fprintf(f, "n/a | n/a | n/a | n/a | ");
        else {
            md_big(f, s->fl.ms, s->fl.ms_ln);
            fprintf(f, " | %.4g | ", s->req.ms_allowed);
            md_big(f, s->fl.mt, s->fl.mt_ln);
            fprintf(f, " | %.4g | ", s->req.mt_allowed);
        }
        md_cell(f, s->cause);
        fprintf(f, " |\n");
    }
    fprintf(f, "\n");
}

/* The digital loop of a sampled plant, as list items (nothing for a
 * continuous loop). */
static void digital_loop(FILE *f, const ps_summary *s)
{
    if (!(s->h > 0))
        return;
    char text[1200];
    fprintf(f, "- Digital loop: ");
    ps_sampling_text(s->h, s->compute_delay, s->in_z, text, sizeof text);
    md_text(f, text);
    fprintf(f, "\n  - ");
    ps_zroots_text(&s->fl, s->in_z, text, sizeof text);
    md_text(f, text);
    fprintf(f, "\n  - ");
    ps_nyquist_floor_text(&s->fl, s->req.wb, text, sizeof text);
    md_text(f, text);
    fprintf(f, "\n");
}

/* One plant in full: verdict, cause, note, structure, requirements, digital
 * loop, every target. */
static void plant_detail(FILE *f, const ps_run *r, const ps_summary *s, size_t rank)
{
    fprintf(f, "### %zu. ", rank);
    md_text(f, s->id);
    fprintf(f, " (%s %s)\n\n", ps_verdict_mark(s->verdict), ps_verdict_name(s->verdict));
    fprintf(f, "- Cause: ");
    md_text(f, s->cause);
    fprintf(f, "\n");
    if (s->note[0]) {
        fprintf(f, "- Note: ");
        md_text(f, s->note);
        fprintf(f, "\n");
    }
    if (ps_unstable_controller_claim(s)) {
        fprintf(f, "- ");
        md_text(f, ps_unstable_controller_text);
        fprintf(f, "\n");
    }
    char text[512];
    ps_requirements_text(s, text, sizeof text);
    fprintf(f, "- Requirements: ");
    md_text(f, text);
    fprintf(f, "\n");
    digital_loop(f, s);
    char cert[1400];
    ps_bracket_text(s, &r->opt, cert, sizeof cert);
    if (cert[0]) {
        fprintf(f, "- Certificate controller: ");
        md_text(f, cert);
        fprintf(f, "\n");
    }
    bool any_target = false;
    for (int k = 0; k < PS_TARGET_COUNT; k++) {
        char t[400];
        ps_target_text(s, (ps_target_kind)k, t, sizeof t);
        if (!t[0])
            continue;
        fprintf(f, "%s", any_target ? "  - " : "- Targets:\n  - ");
        any_target = true;
        md_text(f, t);
        fprintf(f, "\n");
    }
    if (!any_target && is_flagged(s->verdict))
        fprintf(f, "- Targets: no single change of pole, zero, delay or bandwidth applies\n");
    fprintf(f, "\n");
}

/* Full detail for every flagged plant and the worst of the rest, in rank
 * order, up to PS_MD_DETAIL_MAX; input errors listed apart. */
static void details(FILE *f, const ps_run *r)
{
    size_t nf = n_flagged(r), judged = r->n_rows - r->per_verdict[PS_VERDICT_UNREAD];
    size_t want = nf > PS_MD_WORST ? nf : PS_MD_WORST;
    if (want > judged)
        want = judged;
    size_t cap = want < PS_MD_DETAIL_MAX ? want : PS_MD_DETAIL_MAX;
    fprintf(f, "## Plants in detail\n\n");
    if (judged == 0)
        fprintf(f, "No plant could be judged.\n\n");
    else {
        fprintf(f, "Every plant to send back (redesign, not stabilizable) and the worst of the others, at least %d "
                   "in all, in rank order",
                PS_MD_WORST);
        if (want > cap)
            fprintf(f, "; showing %zu of %zu (the cap is %d). ", cap, want, PS_MD_DETAIL_MAX);
        else
            fprintf(f, ": %zu of the %zu plants that could be read. ", cap, judged);
        rest_files(f, r);
        fprintf(f, "\n\n");
    }
    size_t shown = 0;
    for (size_t i = 0; i < r->n_rows && shown < cap; i++) {
        ps_verdict v = ps_run_verdict(r, i);
        if (v == PS_VERDICT_UNREAD)
            continue;
        if (!is_flagged(v) && shown >= want)
            continue;
        shown++;
        plant_detail(f, r, ps_run_row(r, i), i + 1);
    }

    size_t n_err = r->per_verdict[PS_VERDICT_UNREAD];
    if (!n_err)
        return;
    fprintf(f, "## Input errors\n\n");
    if (n_err > PS_MD_DETAIL_MAX)
        fprintf(f, "Showing %d of %zu entries that could not be read (all of them in the CSV and JSON Lines "
                   "files).\n\n",
                PS_MD_DETAIL_MAX, n_err);
    size_t told = 0;
    for (size_t i = 0; i < r->n_rows && told < PS_MD_DETAIL_MAX; i++) {
        if (ps_run_verdict(r, i) != PS_VERDICT_UNREAD)
            continue;
        const ps_summary *s = ps_run_row(r, i);
        told++;
        fprintf(f, "- ");
        md_text(f, s->id[0] ? s->id : "(no id)");
        fprintf(f, " (");
        md_text(f, catalog_of(r, s));
        char pos[PS_DIAG_POS];
        fputs(ps_diag_pos(pos, sizeof pos, s->err_line, s->err_col), f);
        if (s->err_field[0]) {
            fprintf(f, ", field ");
            md_text(f, s->err_field);
        }
        fprintf(f, "): ");
        md_text(f, s->err_text);
        fprintf(f, "\n");
    }
    fprintf(f, "\n");
}

static void bracket_row(void *ctx, const ps_bracket_row *row)
{
    FILE *f = ctx;
    const ps_summary *s = row->s;
    fprintf(f, "| %zu | ", row->rank);
    md_cell(f, s->id);
    fprintf(f, " | %s | ", ps_bracket_name(row->b));
    md_big(f, s->fl.ms, s->fl.ms_ln);
    fprintf(f, " | ");
    md_num(f, false, row->found ? s->cert[0].chk.ms : NAN, "inf");
    fprintf(f, " | ");
    md_big(f, s->fl.mt, s->fl.mt_ln);
    fprintf(f, " | ");
    md_num(f, false, row->found ? s->cert[0].chk.mt : NAN, "inf");
    fprintf(f, " | %s |\n", row->what);
}

/* screen --certify: the outcome counts and, in rank order, at most
 * PS_MD_TABLE_MAX plants with a bracket. */
static void bracket(FILE *f, const ps_run *r)
{
    if (r->opt.certify == PS_CERTIFY_NONE)
        return;
    const size_t *pb = r->per_bracket;
    size_t n = ps_bracket_count(r);
    fprintf(f, "## Bracket: floors against a verified controller\n\n");
    fprintf(f, "The floors say what no controller can do; a controller searched within %zu loop evaluations a plant "
               "and verified (stability by the argument principle and, for a loop without delay, the closed-loop roots; peaks and "
               "requirements on a dense grid) shows what one controller does. Searched: the %s plants. %zu demonstrated, %zu "
               "undecided, %zu ruled out, %zu not attempted. A found peak of a controller that meets the roll-off, "
               "band and effort requirements is an upper bound on the best achievable peak, not the optimum; "
               "undecided means no controller was found within the budget, never that none "
               "exists. The floors hold for loops that meet every stated requirement: a controller that misses the "
               "band or the roll-off may show a peak below them.\n\n",
            r->opt.certify_budget ? r->opt.certify_budget : (size_t)PS_CERT_BUDGET,
            r->opt.certify == PS_CERTIFY_PASSING ? "passing" : "judged", pb[PS_BRACKET_DEMONSTRATED],
            pb[PS_BRACKET_UNDECIDED], pb[PS_BRACKET_RULED_OUT], pb[PS_BRACKET_NOT_ATTEMPTED]);
    if (n > PS_MD_TABLE_MAX)
        fprintf(f, "The first %d of %zu in rank order (all of them in the CSV and JSON Lines files).\n\n",
                PS_MD_TABLE_MAX, n);
    fprintf(f, "| rank | plant | outcome | Ms floor | Ms found | Mt floor | Mt found | controller |\n");
    fprintf(f, "|---:|---|---|---:|---:|---:|---:|---|\n");
    ps_bracket_rows(r, PS_MD_TABLE_MAX, bracket_row, f);
    fprintf(f, "\n");
}

static void meanings(FILE *f)
{
    fprintf(f, "## What the verdicts mean\n\n");
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        fprintf(f, "- %s **%s**: ", ps_verdict_mark((ps_verdict)v), ps_verdict_name((ps_verdict)v));
        md_text(f, ps_verdict_meaning((ps_verdict)v));
        fprintf(f, "\n");
    }
    fprintf(f, "\n");
}

/* Bounded whatever the number of plants: the first page, the distribution
 * of all plants, then at most PS_MD_TABLE_MAX ranking rows and
 * PS_MD_DETAIL_MAX plants in detail (and as many input errors), each cut
 * stated where it cuts. */
ps_status ps_write_markdown(FILE *f, const ps_run *r)
{
    first_page(f, r);
    distribution(f, r);
    ranked_table(f, r);
    details(f, r);
    bracket(f, r);
    ps_md_families(f, r, md_cell);
    meanings(f);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

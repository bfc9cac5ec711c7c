/* markdown_report.c - the screening run as a Markdown document for design
 * reviews: counts, ranked table, redesign list, requirements and caution. */
#include "report/reports.h"
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

static void header(FILE *f, const ps_run *r)
{
    fprintf(f, "# Screening report\n\n");
    fprintf(f, "Written by plantsieve %s. Marginal from a share of %.3g of the allowed log-peak.\n\n", PS_VERSION,
            r->opt.marginal_at);
    fprintf(f, "## Catalogs\n\n");
    if (r->n_catalogs == 0)
        fprintf(f, "- none\n");
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        fprintf(f, "- `");
        /* Inside a code span nothing is markup; only a backtick would end it. */
        for (const char *p = c->file; p && *p; p++)
            fputc(*p == '`' || *p == '\n' || *p == '\r' ? '?' : *p, f);
        fprintf(f, "`: ");
        if (c->failed) {
            char pos[PS_DIAG_POS];
            ps_diag_pos_words(pos, sizeof pos, c->line, c->col);
            fprintf(f, "**not read to the end** (%s%s", pos, pos[0] ? ": " : "");
            md_text(f, c->error);
            char unread[256];
            ps_unread_text(c->line, unread, sizeof unread);
            fprintf(f, "); %s\n", unread);
        } else
            fprintf(f, "read to the end\n");
    }
    fprintf(f, "\n## Counts\n\n");
    fprintf(f, "Entries: %zu; screened: %zu; input errors: %zu.\n\n", r->counts.entries, r->counts.models,
            r->counts.errors);
    fprintf(f, "| Verdict | Plants |\n|---|---:|\n");
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        fprintf(f, "| %s | %zu |\n", ps_verdict_name((ps_verdict)v), r->per_verdict[v]);
    fprintf(f, "\n");
}

static void ranked_table(FILE *f, const ps_run *r)
{
    fprintf(f, "## Ranking\n\n");
    if (r->n_rows == 0) {
        fprintf(f, "No plants.\n\n");
        return;
    }
    fprintf(f, "Worst first: not stabilizable, then by severity (largest share of the allowed log-peak), "
               "then the plants not judged for want of a bandwidth limit, input errors last.\n\n");
    fprintf(f, "| Rank | Plant | Verdict | Severity | Worst | Ms floor | Ms allowed | Mt floor | Mt allowed | Cause |\n");
    fprintf(f, "|---:|---|---|---:|---|---:|---:|---:|---:|---|\n");
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        bool unread = s->verdict == PS_VERDICT_UNREAD;
        fprintf(f, "| %zu | ", i + 1);
        md_cell(f, s->id);
        fprintf(f, " | %s | ", ps_verdict_name(s->verdict));
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

static void redesign_list(FILE *f, const ps_run *r)
{
    fprintf(f, "## What must change\n\n");
    bool any = false;
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict != PS_VERDICT_REDESIGN && s->verdict != PS_VERDICT_UNSTABILIZABLE)
            continue;
        any = true;
        fprintf(f, "### %zu. ", i + 1);
        md_text(f, s->id);
        fprintf(f, " (%s)\n\n", ps_verdict_name(s->verdict));
        fprintf(f, "Cause: ");
        md_text(f, s->cause);
        fprintf(f, "\n\n");
        bool any_target = false;
        for (int k = 0; k < PS_TARGET_COUNT; k++) {
            char text[400];
            ps_target_text(s, (ps_target_kind)k, text, sizeof text);
            if (!text[0])
                continue;
            any_target = true;
            fprintf(f, "- ");
            md_text(f, text);
            fprintf(f, "\n");
        }
        if (!any_target)
            fprintf(f, "- no single change of pole, zero, delay or bandwidth applies\n");
        fprintf(f, "\n");
    }
    if (!any)
        fprintf(f, "No plant needs a hardware change.\n\n");
}

/* The sampled plants (section absent when every loop is continuous). */
static void digital_loops(FILE *f, const ps_run *r)
{
    bool any = false;
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict == PS_VERDICT_UNREAD || !(s->h > 0))
            continue;
        if (!any)
            fprintf(f, "## Digital loops\n\n");
        any = true;
        char text[1200];
        fprintf(f, "- ");
        md_text(f, s->id);
        fprintf(f, ": ");
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
    if (any)
        fprintf(f, "\n");
}

static void requirements(FILE *f, const ps_run *r)
{
    fprintf(f, "## Requirements screened against\n\n");
    bool any_error = false;
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict == PS_VERDICT_UNREAD) {
            any_error = true;
            continue;
        }
        char text[512];
        ps_requirements_text(s, text, sizeof text);
        fprintf(f, "- ");
        md_text(f, s->id);
        fprintf(f, ": ");
        md_text(f, text);
        fprintf(f, "\n");
    }
    fprintf(f, "\n");
    if (!any_error)
        return;
    fprintf(f, "## Input errors\n\n");
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        if (s->verdict != PS_VERDICT_UNREAD)
            continue;
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

static void meanings(FILE *f)
{
    fprintf(f, "## What the verdicts mean\n\n");
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        fprintf(f, "- **%s**: ", ps_verdict_name((ps_verdict)v));
        md_text(f, ps_verdict_meaning((ps_verdict)v));
        fprintf(f, "\n");
    }
    fprintf(f, "\n");
}

ps_status ps_write_markdown(FILE *f, const ps_run *r)
{
    header(f, r);
    ranked_table(f, r);
    redesign_list(f, r);
    digital_loops(f, r);
    ps_md_families(f, r, md_cell);
    requirements(f, r);
    meanings(f);
    fprintf(f, "## Caution\n\n");
    md_text(f, ps_caution_text);
    fprintf(f, "\n");
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

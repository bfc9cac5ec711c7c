/* terminal_report.c - the screening run for a person at a terminal: a ranked
 * table, the redesign list with causes and targets, the headroom of passing
 * plants, counts per verdict and the caution. Colour only when asked. */
#include "report/reports.h"
#include "core/numfmt.h"
#include "core/text.h"
#include "report/certificate.h"

#include <math.h>
#include <stdint.h>
#include <string.h>

/* SGR sequences per verdict (our own choice; only used on a terminal). */
static const char *tint(ps_verdict v)
{
    switch (v) {
    case PS_VERDICT_CLEAR: return "\033[32m";
    case PS_VERDICT_MARGINAL: return "\033[33m";
    case PS_VERDICT_REDESIGN: return "\033[1;31m";
    case PS_VERDICT_UNSTABILIZABLE: return "\033[1;35m";
    case PS_VERDICT_NEEDS_BANDWIDTH: return "\033[34m";
    case PS_VERDICT_UNREAD: return "\033[36m";
    case PS_VERDICT_COUNT: break;
    }
    return "";
}

static void num(char *buf, size_t n, double x)
{
    if (isnan(x))
        snprintf(buf, n, "-");
    else if (isinf(x))
        snprintf(buf, n, "inf");
    else
        ps_fmt_g(buf, n, x, 3);
}

/* A floor: as num, and past a double's range as a power of ten from its logarithm. */
static void num_big(char *buf, size_t n, double x, double ln)
{
    if (isinf(x) && x > 0 && isfinite(ln))
        ps_text_big(buf, n, x, ln, 3);
    else
        num(buf, n, x);
}

static void wrap(FILE *f, const char *text, const char *indent, size_t width)
{
    size_t col = 0;
    const char *p = text;
    fputs(indent, f);
    /* continuation lines are indented as far as the first, without its bullet */
    size_t ind = strlen(indent);
    while (*p) {
        const char *sp = strchr(p, ' ');
        size_t len = sp ? (size_t)(sp - p) : strlen(p);
        if (col > 0 && col + 1 + len > width) {
            fputc('\n', f);
            for (size_t i = 0; i < ind; i++)
                fputc(' ', f);
            col = 0;
        } else if (col > 0) {
            fputc(' ', f);
            col++;
        }
        fwrite(p, 1, len, f);
        col += len;
        p += len;
        while (*p == ' ')
            p++;
    }
    fputc('\n', f);
}

/* The digital loop of a sampled plant (nothing for a continuous loop). */
static void digital(FILE *f, const ps_summary *s)
{
    if (!(s->h > 0))
        return;
    char text[1200], line[1240];
    ps_sampling_text(s->h, s->compute_delay, s->in_z, text, sizeof text);
    snprintf(line, sizeof line, "digital loop: %s", text);
    wrap(f, line, "    ", 96);
    ps_zroots_text(&s->fl, s->in_z, text, sizeof text);
    wrap(f, text, "    ", 96);
    ps_nyquist_floor_text(&s->fl, s->req.wb, text, sizeof text);
    wrap(f, text, "    ", 96);
}

/* Text from a catalog or the command line shown harmlessly: control
 * characters (C0, DEL, and C1 as UTF-8 C2 80..9F) written as escapes (\t,
 * \n, \r, \xHH), so that a note can neither break the layout nor send a
 * terminal a command. */
void ps_put_visible(FILE *f, const char *s)
{
    const unsigned char *p = (const unsigned char *)s, *run = p;
    for (; p && *p; p++) {
        bool c1 = *p == 0xc2 && p[1] >= 0x80 && p[1] <= 0x9f;
        if (!(*p < 0x20 || *p == 0x7f || c1))
            continue; /* plain: goes out with its run */
        fwrite(run, 1, (size_t)(p - run), f);
        if (*p == '\t')
            fputs("\\t", f);
        else if (*p == '\n')
            fputs("\\n", f);
        else if (*p == '\r')
            fputs("\\r", f);
        else if (c1)
            fprintf(f, "\\u%04x", *++p);
        else
            fprintf(f, "\\x%02x", *p);
        run = p + 1;
    }
    if (run)
        fwrite(run, 1, (size_t)(p - run), f);
}

/* The provenance of the run: title, date (only when set), every input with
 * its size and SHA-256 (when taken), version, command line. */
static void provenance(FILE *f, const ps_run *r)
{
    const char *title = ps_run_title(r);
    if (title) {
        fputs("title: ", f);
        ps_put_visible(f, title);
        fputc('\n', f);
    }
    if (r->meta.date[0])
        fprintf(f, "date: %s\n", r->meta.date);
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        fputs("input: ", f);
        ps_put_visible(f, c->file);
        if (c->sha256[0])
            fprintf(f, ", %llu bytes, SHA-256 %s", (unsigned long long)c->bytes, c->sha256);
        if (c->title && c->title[0] && i > 0) {
            fputs(", title ", f);
            ps_put_visible(f, c->title);
        }
        fputc('\n', f);
    }
    fprintf(f, "version: plantsieve %s\n", PS_VERSION);
    if (r->meta.command_line) {
        fputs("command: ", f);
        ps_put_visible(f, r->meta.command_line);
        fputc('\n', f);
    }
}

/* The plant's note and its structural flag, under its heading. */
static void note_and_flags(FILE *f, const ps_summary *s)
{
    if (s->note[0]) {
        fputs("    note: ", f);
        ps_put_visible(f, s->note);
        fputc('\n', f);
    }
    if (ps_unstable_controller_claim(s))
        wrap(f, ps_unstable_controller_text, "    ", 96);
}

static void more(FILE *f, size_t left, const char *full);

/* The bracket of a plant, when the run asked for one. */
static void certificate(FILE *f, const ps_run *r, const ps_summary *s)
{
    char text[1400], line[1440];
    ps_bracket_text(s, &r->opt, text, sizeof text);
    if (!text[0])
        return;
    snprintf(line, sizeof line, "certificate controller: %s", text);
    wrap(f, line, "    ", 96);
}

static void bracket_row(void *ctx, const ps_bracket_row *row)
{
    FILE *f = ctx;
    const ps_summary *s = row->s;
    char msf[PS_NUMFMT_ROOM], mtf[PS_NUMFMT_ROOM], msc[PS_NUMFMT_ROOM], mtc[PS_NUMFMT_ROOM];
    num_big(msf, sizeof msf, s->fl.ms, s->fl.ms_ln);
    num_big(mtf, sizeof mtf, s->fl.mt, s->fl.mt_ln);
    num(msc, sizeof msc, row->found ? s->cert[0].chk.ms : NAN);
    num(mtc, sizeof mtc, row->found ? s->cert[0].chk.mt : NAN);
    fprintf(f, "  %-24.24s  %-13s  %9s  %9s  %9s  %9s  %s\n", s->id, ps_bracket_name(row->b), msf, msc, mtf, mtc,
            row->what);
}

/* screen --certify: the count of each outcome and a line a plant (the
 * flagged and passing plants' sections above give the controllers). */
static void bracket_section(FILE *f, const ps_run *r, size_t show, const char *full)
{
    if (r->opt.certify == PS_CERTIFY_NONE)
        return;
    const size_t *pb = r->per_bracket;
    size_t n = ps_bracket_count(r);
    fprintf(f, "\nBracket: floors (what no controller can do) against a verified controller (what one does), "
               "%s plants, budget %zu loop evaluations a plant\n",
            r->opt.certify == PS_CERTIFY_PASSING ? "passing" : "judged",
            r->opt.certify_budget ? r->opt.certify_budget : (size_t)PS_CERT_BUDGET);
    fprintf(f, "  %zu demonstrated, %zu undecided, %zu ruled out, %zu not attempted\n", pb[PS_BRACKET_DEMONSTRATED],
            pb[PS_BRACKET_UNDECIDED], pb[PS_BRACKET_RULED_OUT], pb[PS_BRACKET_NOT_ATTEMPTED]);
    fprintf(f, "  %-24s  %-13s  %9s  %9s  %9s  %9s  %s\n", "plant", "outcome", "Ms floor", "Ms found", "Mt floor",
            "Mt found", "controller");
    size_t told = ps_bracket_rows(r, show, bracket_row, f);
    more(f, n - told, full);
    wrap(f, "A found peak of a controller that meets the roll-off, band and effort requirements is an upper "
            "bound on the best achievable peak, not the optimum; undecided means no "
            "controller was found within the budget, never that none exists. The floors hold for loops that meet "
            "every stated requirement: a controller that misses the band or the roll-off may show a peak below "
            "them.", "  ", 96);
}

static bool flagged(ps_verdict v)
{
    return v == PS_VERDICT_REDESIGN || v == PS_VERDICT_UNSTABILIZABLE;
}

/* The line that closes a section cut at `show` rows. */
static void more(FILE *f, size_t left, const char *full)
{
    if (left == 0)
        return;
    if (full)
        fprintf(f, "  ... and %zu more (all of them in %s; --show all prints them here)\n", left, full);
    else
        fprintf(f, "  ... and %zu more (--show all prints them here)\n", left);
}

ps_status ps_write_terminal(FILE *f, const ps_run *r, bool colour, size_t show, const char *full)
{
    if (show == 0)
        show = SIZE_MAX;
    fprintf(f, "plantsieve %s screening of %zu plant%s from", PS_VERSION, r->n_rows, r->n_rows == 1 ? "" : "s");
    for (size_t i = 0; i < r->n_catalogs; i++) {
        fprintf(f, " %s", r->catalogs[i].file);
        if (r->catalogs[i].failed) {
            char unread[256];
            ps_unread_text(r->catalogs[i].line, unread, sizeof unread);
            fprintf(f, " (not read to the end: %s)", unread);
        }
    }
    fputc('\n', f);
    provenance(f, r);
    fprintf(f, "severity = share of the allowed log-peak used by the worst floor; marginal from %.2g, "
               "redesign above 1\n\n",
            r->opt.marginal_at);

    size_t idw = r->id_len_max > 5 ? r->id_len_max : 5;
    if (idw > 40)
        idw = 40;
    fprintf(f, "%4s  %-*s  %-18s  %8s  %-6s  %9s  %9s  %9s  %9s\n", "rank", (int)idw, "plant", "verdict",
            "severity", "worst", "Ms floor", "Ms allow", "Mt floor", "Mt allow");
    for (size_t i = 0; i < r->n_rows && i < show; i++) {
        const ps_summary *s = ps_run_row(r, i);
        char sev[PS_NUMFMT_ROOM], msf[PS_NUMFMT_ROOM], msa[PS_NUMFMT_ROOM], mtf[PS_NUMFMT_ROOM], mta[PS_NUMFMT_ROOM];
        num(sev, sizeof sev, s->severity);
        bool read = s->verdict != PS_VERDICT_UNREAD;
        num_big(msf, sizeof msf, read ? s->fl.ms : NAN, s->fl.ms_ln);
        num(msa, sizeof msa, read ? s->req.ms_allowed : NAN);
        num_big(mtf, sizeof mtf, read ? s->fl.mt : NAN, s->fl.mt_ln);
        num(mta, sizeof mta, read ? s->req.mt_allowed : NAN);
        fprintf(f, "%4zu  %-*.*s  %s%s %-16s%s  %8s  %-6s  %9s  %9s  %9s  %9s\n", i + 1, (int)idw, (int)idw, s->id,
                colour ? tint(s->verdict) : "", ps_verdict_mark(s->verdict), ps_verdict_name(s->verdict),
                colour ? "\033[0m" : "", sev,
                s->worst, msf, msa, mtf, mta);
    }
    more(f, r->n_rows > show ? r->n_rows - show : 0, full);

    size_t n_flag = r->per_verdict[PS_VERDICT_REDESIGN] + r->per_verdict[PS_VERDICT_UNSTABILIZABLE];
    fprintf(f, "\nSend back for mechanical redesign (%zu)\n", n_flag);
    if (n_flag == 0)
        fputs("  none\n", f);
    char line[512];
    size_t shown = 0;
    for (size_t i = 0; i < r->n_rows && shown < show; i++) {
        if (!flagged(ps_run_verdict(r, i)))
            continue;
        const ps_summary *s = ps_run_row(r, i);
        shown++;
        fprintf(f, "\n  %s  [%s %s]\n", s->id, ps_verdict_mark(s->verdict), ps_verdict_name(s->verdict));
        snprintf(line, sizeof line, "cause: %s", s->cause);
        wrap(f, line, "    ", 96);
        note_and_flags(f, s);
        digital(f, s);
        certificate(f, r, s);
        for (int k = 0; k < PS_TARGET_COUNT; k++) {
            ps_target_text(s, (ps_target_kind)k, line, sizeof line);
            if (line[0])
                wrap(f, line, "    - ", 96);
        }
    }

    if (n_flag > shown)
        fputc('\n', f);
    more(f, n_flag - shown, full);

    fputs("\nHeadroom of the plants that pass\n", f);
    size_t n_pass = 0, all_pass = r->per_verdict[PS_VERDICT_CLEAR] + r->per_verdict[PS_VERDICT_MARGINAL];
    for (size_t i = 0; i < r->n_rows && n_pass < show; i++) {
        ps_verdict v = ps_run_verdict(r, i);
        if (v != PS_VERDICT_CLEAR && v != PS_VERDICT_MARGINAL)
            continue;
        const ps_summary *s = ps_run_row(r, i);
        n_pass++;
        fprintf(f, "\n  %s  [%s %s]  largest share: %s\n", s->id, ps_verdict_mark(s->verdict),
                ps_verdict_name(s->verdict), s->cause);
        note_and_flags(f, s);
        digital(f, s);
        certificate(f, r, s);
        for (int k = 0; k < PS_TARGET_COUNT; k++) {
            ps_target_text(s, (ps_target_kind)k, line, sizeof line);
            if (line[0])
                wrap(f, line, "    - ", 96);
        }
    }
    if (n_pass == 0)
        fputs("  none\n", f);
    if (all_pass > n_pass)
        fputc('\n', f);
    more(f, all_pass - n_pass, full);

    if (r->per_verdict[PS_VERDICT_NEEDS_BANDWIDTH]) {
        size_t n_nb = r->per_verdict[PS_VERDICT_NEEDS_BANDWIDTH], told = 0;
        fprintf(f, "\nNot judged: unstable plants given no bandwidth limit (%zu)\n", n_nb);
        for (size_t i = 0; i < r->n_rows && told < show; i++) {
            if (ps_run_verdict(r, i) != PS_VERDICT_NEEDS_BANDWIDTH)
                continue;
            const ps_summary *s = ps_run_row(r, i);
            told++;
            fprintf(f, "\n  %s  [%s %s]\n", s->id, ps_verdict_mark(s->verdict), ps_verdict_name(s->verdict));
            snprintf(line, sizeof line, "cause: %s", s->cause);
            wrap(f, line, "    ", 96);
            note_and_flags(f, s);
            digital(f, s);
        }
        more(f, n_nb - told, full);
    }

    if (r->per_verdict[PS_VERDICT_UNREAD]) {
        size_t n_unread = r->per_verdict[PS_VERDICT_UNREAD], told = 0;
        fprintf(f, "\nEntries that could not be read (%zu)\n", n_unread);
        for (size_t i = 0; i < r->n_rows && told < show; i++) {
            if (ps_run_verdict(r, i) != PS_VERDICT_UNREAD)
                continue;
            const ps_summary *s = ps_run_row(r, i);
            told++;
            char pos[PS_DIAG_POS];
            fprintf(f, "  %s%s: %s%s%s%s%s%s\n", r->catalogs[s->file_index].file,
                    ps_diag_pos(pos, sizeof pos, s->err_line, s->err_col), s->id[0] ? s->id : "(no id)", ": ", s->err_text,
                    s->err_field[0] ? " (field '" : "", s->err_field, s->err_field[0] ? "')" : "");
        }
        more(f, n_unread - told, full);
    }

    ps_text_families(f, r);
    bracket_section(f, r, show, full);

    fputs("\nCounts:", f);
    for (int v = 0; v < PS_VERDICT_COUNT; v++)
        fprintf(f, "%s %s %s %zu", v ? "," : "", ps_verdict_mark((ps_verdict)v), ps_verdict_name((ps_verdict)v),
                r->per_verdict[v]);
    fputs("\n\n", f);
    wrap(f, ps_caution_text, "", 96);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

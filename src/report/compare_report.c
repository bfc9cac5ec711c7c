/* compare_report.c - the comparison of two screening runs as text, Markdown
 * and JSON (schema reports/schema/plantsieve-comparison.schema.json). */
#include "report/compare.h"
#include "report/json_parts.h"
#include "report/reports.h"

#include <math.h>
#include <string.h>

/* Severities are written with "%.6g" (six significant digits), changes with "%+.3g". */
static void sev_text(const ps_cmp_plant *p, char *buf, size_t n)
{
    if (p->has_severity)
        snprintf(buf, n, "%.6g", p->severity);
    else
        snprintf(buf, n, "%s", p->infinite ? "infinite" : "none");
}

/* The words on a change's direction; every one is true of that plant under
 * the definition in compare.h. */
static const char *dir_text(const ps_change *ch)
{
    if (ch->kind == PS_CHANGE_VERDICT) {
        if (ch->dir == PS_DIR_WORSE)
            return ch->cur.verdict <= PS_VERDICT_UNSTABILIZABLE ? "worse" : "worse: no longer judged";
        if (ch->dir == PS_DIR_BETTER)
            return "better";
        return ch->judged_again ? "now judged; neither worse nor better" : "not judged in either run";
    }
    if (ch->kind == PS_CHANGE_SEVERITY) {
        if (ch->dir == PS_DIR_WORSE)
            return "worse";
        if (ch->dir == PS_DIR_BETTER)
            return "better";
        return "neither worse nor better for this verdict";
    }
    return "";
}

static const char *kind_key(ps_change_kind k)
{
    static const char *const keys[] = {"unchanged", "verdict", "severity", "added", "removed", "without-id"};
    return keys[k];
}

static const char *dir_key(ps_change_dir d)
{
    static const char *const keys[] = {"none", "worse", "better"};
    return keys[d];
}

static bool duplicated(const ps_change *ch) { return ch->occurrences[0] > 1 || ch->occurrences[1] > 1; }

/* ---- text ---- */

static void text_where(FILE *f, const char *run, const ps_cmp_plant *p)
{
    char sev[32];
    sev_text(p, sev, sizeof sev);
    fprintf(f, "%s, severity %s (%s rank %zu, %s:%zu)", ps_verdict_name(p->verdict), sev, run, p->rank,
            p->file[0] ? p->file : "(no catalog named)", p->line);
}

static void text_id(FILE *f, const ps_change *ch)
{
    fprintf(f, "  %s", ch->id);
    if (duplicated(ch))
        fprintf(f, " (occurrence %zu)", ch->occurrence);
}

static const char *const section_title[] = {
    NULL, "verdict changed", "severity changed by more than the tolerance, same verdict", "added (only in the new run)",
    "removed (only in the old run)", "rows without an id (not matched, not compared)"};

static size_t kind_count(const ps_cmp_counts *n, ps_change_kind k)
{
    switch (k) {
    case PS_CHANGE_VERDICT: return n->verdict;
    case PS_CHANGE_SEVERITY: return n->severity;
    case PS_CHANGE_ADDED: return n->added;
    case PS_CHANGE_REMOVED: return n->removed;
    case PS_CHANGE_NO_ID: return n->no_id[0] + n->no_id[1];
    case PS_CHANGE_NONE: break;
    }
    return n->unchanged;
}

static void summary_text(FILE *f, const ps_cmp_view *v)
{
    const ps_cmp_counts *n = &v->n;
    fprintf(f, "summary: %zu worse, %zu better; %zu verdict changed, %zu severity changed, %zu added, %zu removed, "
               "%zu unchanged",
            n->worse, n->better, n->verdict, n->severity, n->added, n->removed, n->unchanged);
    if (n->no_id[0] + n->no_id[1])
        fprintf(f, ", %zu without id (old %zu, new %zu)", n->no_id[0] + n->no_id[1], n->no_id[0], n->no_id[1]);
    fputc('\n', f);
}

ps_status ps_cmp_write_text(FILE *f, const ps_cmp_view *v)
{
    for (int s = 0; s < 2; s++)
        fprintf(f, "%s run: %s (%zu plants, %s)\n", s ? "new" : "old", v->src[s].path, v->n.plants[s],
                v->src[s].format);
    fprintf(f, "severity tolerance: %g\n", v->tol);
    for (ps_change_kind k = PS_CHANGE_VERDICT; k <= PS_CHANGE_NO_ID; k++) {
        if (!kind_count(&v->n, k))
            continue;
        fprintf(f, "\n%s (%zu):\n", section_title[k], kind_count(&v->n, k));
        for (size_t i = 0; i < ps_cmp_size(v->c); i++) {
            ps_change ch;
            if (ps_cmp_get(v->c, i, v->tol, &ch) != k)
                continue;
            char a[32], b[32];
            sev_text(&ch.old, a, sizeof a);
            sev_text(&ch.cur, b, sizeof b);
            switch (k) {
            case PS_CHANGE_VERDICT:
                text_id(f, &ch);
                fprintf(f, ": %s -> %s (severity %s -> %s): %s\n", ps_verdict_name(ch.old.verdict),
                        ps_verdict_name(ch.cur.verdict), a, b, dir_text(&ch));
                break;
            case PS_CHANGE_SEVERITY:
                text_id(f, &ch);
                fprintf(f, ": %s, severity %s -> %s (%+.3g): %s\n", ps_verdict_name(ch.old.verdict), a, b,
                        ch.cur.severity - ch.old.severity, dir_text(&ch));
                break;
            case PS_CHANGE_ADDED:
            case PS_CHANGE_REMOVED:
                text_id(f, &ch);
                fputs(": ", f);
                text_where(f, k == PS_CHANGE_ADDED ? "new" : "old", k == PS_CHANGE_ADDED ? &ch.cur : &ch.old);
                fputc('\n', f);
                break;
            case PS_CHANGE_NO_ID:
                fputs("  ", f);
                text_where(f, ch.old.present ? "old" : "new", ch.old.present ? &ch.old : &ch.cur);
                fputc('\n', f);
                break;
            case PS_CHANGE_NONE: break;
            }
        }
    }
    if (v->n.duplicate_ids[0] + v->n.duplicate_ids[1]) {
        fprintf(f, "\nids that occur more than once in a run (their occurrences are matched in rank order: "
                   "the first with the first, ...):\n");
        for (size_t i = 0; i < ps_cmp_size(v->c); i++) {
            size_t a = ps_cmp_occurrences(v->c, PS_CMP_OLD, i), b = ps_cmp_occurrences(v->c, PS_CMP_NEW, i);
            if (a > 1 || b > 1) {
                ps_change ch;
                ps_cmp_get(v->c, i, v->tol, &ch);
                fprintf(f, "  %s: %zu times in the old run, %zu in the new\n", ch.id, a, b);
            }
        }
    }
    fputc('\n', f);
    summary_text(f, v);
    fprintf(f, "gate %s: %s\n\n%s\n", ps_cmp_gate_name(v->gate), v->tripped ? "tripped" : "not tripped",
            ps_caution_text);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

/* ---- Markdown ---- */

/* Inline Markdown text: a backslash (CommonMark allows one before any ASCII
 * punctuation) before each character that could open markup inside a line
 * or end a table cell: \ ` * _ [ ] < > | & ~ (strikethrough in GFM); line
 * breaks and tabs as spaces, so a value never ends a row. No text written
 * here starts a line, so '#', '-', '+' and digits need no escape. */
static void md(FILE *f, const char *s)
{
    for (; *s; s++) {
        unsigned char ch = (unsigned char)*s;
        if (ch == '\n' || ch == '\r' || ch == '\t')
            fputc(' ', f);
        else {
            if (strchr("\\`*_[]<>|&~", ch))
                fputc('\\', f);
            fputc(ch, f);
        }
    }
}

static void md_id(FILE *f, const ps_change *ch)
{
    fputs("| ", f);
    md(f, ch->id);
    if (duplicated(ch))
        fprintf(f, " (occurrence %zu)", ch->occurrence);
    fputs(" |", f);
}

static void md_plant_cells(FILE *f, const ps_cmp_plant *p)
{
    char sev[32];
    sev_text(p, sev, sizeof sev);
    fprintf(f, " %s %s | %s | %zu | ", ps_verdict_mark(p->verdict), ps_verdict_name(p->verdict), sev, p->rank);
    md(f, p->file);
    fprintf(f, " | %zu |\n", p->line);
}

ps_status ps_cmp_write_markdown(FILE *f, const ps_cmp_view *v)
{
    fputs("# Comparison of two screening runs\n\n", f);
    for (int s = 0; s < 2; s++) {
        fprintf(f, "- %s run: ", s ? "New" : "Old");
        md(f, v->src[s].path);
        fprintf(f, " (%zu plants, %s)\n", v->n.plants[s], v->src[s].format);
    }
    fprintf(f, "- Severity tolerance: %g\n- Gate %s: %s\n\n", v->tol, ps_cmp_gate_name(v->gate),
            v->tripped ? "tripped" : "not tripped");
    const ps_cmp_counts *n = &v->n;
    fputs("## Summary\n\n| Worse | Better | Verdict changed | Severity changed | Added | Removed | Unchanged | "
          "Without id |\n|---:|---:|---:|---:|---:|---:|---:|---:|\n",
          f);
    fprintf(f, "| %zu | %zu | %zu | %zu | %zu | %zu | %zu | %zu |\n", n->worse, n->better, n->verdict, n->severity,
            n->added, n->removed, n->unchanged, n->no_id[0] + n->no_id[1]);
    static const char *const head[] = {
        NULL,
        "| Plant | Old verdict | New verdict | Old severity | New severity | Direction |\n|---|---|---|---:|---:|---|\n",
        "| Plant | Verdict | Old severity | New severity | Change | Direction |\n|---|---|---:|---:|---:|---|\n",
        "| Plant | Verdict | Severity | New rank | Catalog | Line |\n|---|---|---:|---:|---|---:|\n",
        "| Plant | Verdict | Severity | Old rank | Catalog | Line |\n|---|---|---:|---:|---|---:|\n",
        "| Run | Verdict | Severity | Rank | Catalog | Line |\n|---|---|---:|---:|---|---:|\n"};
    for (ps_change_kind k = PS_CHANGE_VERDICT; k <= PS_CHANGE_NO_ID; k++) {
        if (!kind_count(n, k))
            continue;
        fprintf(f, "\n## %c%s (%zu)\n\n%s", section_title[k][0] - 'a' + 'A', section_title[k] + 1, kind_count(n, k),
                head[k]);
        for (size_t i = 0; i < ps_cmp_size(v->c); i++) {
            ps_change ch;
            if (ps_cmp_get(v->c, i, v->tol, &ch) != k)
                continue;
            char a[32], b[32];
            sev_text(&ch.old, a, sizeof a);
            sev_text(&ch.cur, b, sizeof b);
            if (k == PS_CHANGE_VERDICT) {
                md_id(f, &ch);
                fprintf(f, " %s %s | %s %s | %s | %s | %s |\n", ps_verdict_mark(ch.old.verdict),
                        ps_verdict_name(ch.old.verdict), ps_verdict_mark(ch.cur.verdict),
                        ps_verdict_name(ch.cur.verdict), a, b, dir_text(&ch));
            } else if (k == PS_CHANGE_SEVERITY) {
                md_id(f, &ch);
                fprintf(f, " %s %s | %s | %s | %+.3g | %s |\n", ps_verdict_mark(ch.old.verdict),
                        ps_verdict_name(ch.old.verdict), a, b, ch.cur.severity - ch.old.severity, dir_text(&ch));
            } else if (k == PS_CHANGE_NO_ID) {
                fprintf(f, "| %s |", ch.old.present ? "old" : "new");
                md_plant_cells(f, ch.old.present ? &ch.old : &ch.cur);
            } else {
                md_id(f, &ch);
                md_plant_cells(f, k == PS_CHANGE_ADDED ? &ch.cur : &ch.old);
            }
        }
    }
    fputs("\n## What the words mean\n\nA plant is *worse* when its verdict moved later in the order clear < marginal "
          "< redesign < not\\-stabilizable, when it had one of these four verdicts and now has needs\\-bandwidth or "
          "input\\-error (no longer judged), or when it is marginal or redesign in both runs and its severity rose by "
          "more than the tolerance. *Better* is the reverse of each. Plants added or removed are neither. Plants are "
          "matched by id; an id that occurs more than once in a run is matched occurrence by occurrence in rank "
          "order.\n\n## Caution\n\n",
          f);
    md(f, ps_caution_text);
    fputc('\n', f);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

/* ---- JSON ---- */

static json_t *plant_json(const ps_cmp_plant *p)
{
    if (!p->present)
        return json_null();
    return json_pack("{s:s,s:o,s:b,s:I,s:o,s:I}", "verdict", ps_verdict_name(p->verdict), "severity",
                     p->has_severity ? json_real(p->severity) : json_null(), "severity_infinite", p->infinite, "rank",
                     (json_int_t)p->rank, "file", ps_json_str(p->file), "line", (json_int_t)p->line);
}

static json_t *source_json(const ps_cmp_view *v, int s)
{
    return json_pack("{s:o,s:s,s:I}", "path", ps_json_str(v->src[s].path), "format", v->src[s].format, "plants",
                     (json_int_t)v->n.plants[s]);
}

/* Written as it would be dumped whole, but change by change (one compact
 * object per line inside "changes"), so that memory stays at one change. */
ps_status ps_cmp_write_json(FILE *f, const ps_cmp_view *v)
{
    const ps_cmp_counts *n = &v->n;
    json_t *dups = json_array();
    for (size_t i = 0; dups && i < ps_cmp_size(v->c); i++) {
        size_t a = ps_cmp_occurrences(v->c, PS_CMP_OLD, i), b = ps_cmp_occurrences(v->c, PS_CMP_NEW, i);
        if (a > 1 || b > 1) {
            ps_change ch;
            ps_cmp_get(v->c, i, v->tol, &ch);
            json_array_append_new(dups, json_pack("{s:s,s:I,s:I}", "id", ch.id, "old", (json_int_t)a, "new",
                                                  (json_int_t)b));
        }
    }
    json_t *doc = json_pack(
        "{s:i,s:s,s:{s:s,s:s},s:o,s:o,s:f,s:s,s:b,s:{s:I,s:I,s:I,s:I,s:I,s:I,s:I,s:I,s:I},s:o,s:o,s:s}",
        "schema_version", PS_CMP_SCHEMA_VERSION, "kind", "comparison", "tool", "name", "plantsieve", "version",
        PS_VERSION, "old", source_json(v, 0), "new", source_json(v, 1), "severity_tolerance", v->tol, "gate",
        ps_cmp_gate_name(v->gate), "gate_tripped", v->tripped, "counts", "worse", (json_int_t)n->worse, "better",
        (json_int_t)n->better, "verdict_changed", (json_int_t)n->verdict, "severity_changed", (json_int_t)n->severity,
        "added", (json_int_t)n->added, "removed", (json_int_t)n->removed, "unchanged", (json_int_t)n->unchanged,
        "without_id_old", (json_int_t)n->no_id[0], "without_id_new", (json_int_t)n->no_id[1], "duplicate_ids", dups,
        "changes", json_array(), "caution", ps_caution_text);
    if (!doc)
        return PS_ERR_NOMEM;
    char *text = json_dumps(doc, JSON_INDENT(2) | JSON_REAL_PRECISION(15));
    json_decref(doc);
    if (!text)
        return PS_ERR_NOMEM;
    static const char slot[] = "\"changes\": []";
    char *mark = strstr(text, slot);
    ps_status st = PS_OK;
    size_t head = mark ? (size_t)(mark - text) + sizeof slot - 2 : 0;
    if (!mark || fwrite(text, 1, head, f) != head)
        st = mark ? PS_ERR_IO : PS_ERR_NOMEM;
    bool first = true;
    for (size_t i = 0; st == PS_OK && i < ps_cmp_size(v->c); i++) {
        ps_change ch;
        if (ps_cmp_get(v->c, i, v->tol, &ch) == PS_CHANGE_NONE)
            continue;
        json_t *cj = json_pack("{s:s,s:o,s:I,s:s,s:s,s:o,s:o}", "kind", kind_key(ch.kind), "id",
                               ch.kind == PS_CHANGE_NO_ID ? json_null() : json_string(ch.id), "occurrence",
                               (json_int_t)ch.occurrence, "direction", dir_key(ch.dir), "words", dir_text(&ch), "old",
                               plant_json(&ch.old), "new", plant_json(&ch.cur));
        char *ct = cj ? json_dumps(cj, JSON_COMPACT | JSON_REAL_PRECISION(15)) : NULL;
        json_decref(cj);
        if (!ct)
            st = PS_ERR_NOMEM;
        else if (fputs(first ? "\n    " : ",\n    ", f) == EOF || fputs(ct, f) == EOF)
            st = PS_ERR_IO;
        first = false;
        free(ct);
    }
    if (st == PS_OK && ((!first && fputs("\n  ", f) == EOF) || fputs(mark + sizeof slot - 2, f) == EOF ||
                        fputc('\n', f) == EOF))
        st = PS_ERR_IO;
    free(text);
    if (st != PS_OK)
        return st;
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

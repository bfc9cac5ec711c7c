/* junit_report.c - the screening run as JUnit XML for CI servers: one
 * <testsuite> for the run, one <testcase> per plant (and per catalog not read
 * to the end), failing verdicts as <failure>, plants not judged as <error>. */
#include "core/diag.h"
#include "report/reports.h"
#include "report/certificate.h"

#include <math.h>
#include <stdint.h>
#include <string.h>

/* Length of the UTF-8 sequence at s and its code point, or 0 when the bytes
 * are not one well-formed sequence (RFC 3629 sec. 4: no overlong forms, no
 * surrogates, nothing above U+10FFFF). */
static size_t utf8_next(const unsigned char *s, uint32_t *cp)
{
    unsigned char b = s[0];
    size_t n;
    uint32_t c, min;
    if (b < 0x80) {
        *cp = b;
        return 1;
    } else if ((b & 0xE0) == 0xC0) {
        n = 2, c = b & 0x1Fu, min = 0x80;
    } else if ((b & 0xF0) == 0xE0) {
        n = 3, c = b & 0x0Fu, min = 0x800;
    } else if ((b & 0xF8) == 0xF0) {
        n = 4, c = b & 0x07u, min = 0x10000;
    } else
        return 0;
    for (size_t i = 1; i < n; i++) {
        if ((s[i] & 0xC0) != 0x80) /* also stops at the terminating NUL */
            return 0;
        c = (c << 6) | (s[i] & 0x3Fu);
    }
    if (c < min || c > 0x10FFFF || (c >= 0xD800 && c <= 0xDFFF))
        return 0;
    *cp = c;
    return n;
}

/* XML 1.0 (Fifth Edition) sec. 2.2, production [2] Char. */
static bool xml_char(uint32_t c)
{
    return c == 0x9 || c == 0xA || c == 0xD || (c >= 0x20 && c <= 0xD7FF) || (c >= 0xE000 && c <= 0xFFFD) ||
           (c >= 0x10000 && c <= 0x10FFFF);
}

/* s as XML character data (attr: inside a double- or single-quoted
 * attribute value). Markup characters become entity references; a byte that
 * is not well-formed UTF-8, or a character XML 1.0 does not allow (control
 * characters other than tab, line feed and carriage return; U+FFFE, U+FFFF),
 * becomes U+FFFD. Tab, line feed and carriage return are written as
 * character references in attributes (sec. 3.3.3 would turn them into spaces)
 * and carriage return also in text (sec. 2.11 would drop it). */
static void xml_put(FILE *f, const char *s, bool attr)
{
    const unsigned char *p = (const unsigned char *)(s ? s : "");
    while (*p) {
        uint32_t c;
        size_t n = utf8_next(p, &c);
        if (!n || !xml_char(c)) {
            fputs("\xEF\xBF\xBD", f);
            p += n ? n : 1;
            continue;
        }
        switch (c) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs(attr ? "&quot;" : "\"", f); break;
        case '\'': fputs(attr ? "&apos;" : "'", f); break;
        case '\r': fputs("&#13;", f); break;
        case '\t': fputs(attr ? "&#9;" : "\t", f); break;
        case '\n': fputs(attr ? "&#10;" : "\n", f); break;
        default: fwrite(p, 1, n, f);
        }
        p += n;
    }
}

static void xml_attr(FILE *f, const char *name, const char *value)
{
    fprintf(f, " %s=\"", name);
    xml_put(f, value, true);
    fputc('"', f);
}

static const char *catalog_of(const ps_run *r, const ps_summary *s)
{
    return s->file_index < r->n_catalogs ? r->catalogs[s->file_index].file : "";
}

/* The severity in words: "infinite", or "%.4g". */
static void severity_text(const ps_summary *s, char *buf, size_t n)
{
    if (isinf(s->severity))
        snprintf(buf, n, "infinite");
    else if (isnan(s->severity))
        snprintf(buf, n, "none");
    else
        snprintf(buf, n, "%.4g", s->severity);
}

/* "file:line" of a plant in its catalog, as text. */
static void put_where(FILE *f, const ps_run *r, const ps_summary *s)
{
    xml_put(f, catalog_of(r, s), false);
    fprintf(f, ":%zu", s->verdict == PS_VERDICT_UNREAD && s->err_line ? s->err_line : s->line);
}

/* screen --certify: the bracket on a line of its own (the test's outcome
 * stays the floors' verdict: undecided is not a failure). */
static void put_certificate(FILE *f, const ps_run *r, const ps_summary *s)
{
    char text[1400];
    ps_bracket_text(s, &r->opt, text, sizeof text);
    if (!text[0])
        return;
    fputs("\ncertificate controller: ", f);
    xml_put(f, text, false);
}

static void testcase(FILE *f, const ps_run *r, const ps_summary *s, size_t rank)
{
    char name[PS_ID_MAX + 64], sev[32];
    if (s->id[0])
        snprintf(name, sizeof name, "%s", s->id);
    else
        snprintf(name, sizeof name, "(no id, line %zu)", s->err_line ? s->err_line : s->line);
    severity_text(s, sev, sizeof sev);
    const char *verdict = ps_verdict_name(s->verdict);
    fputs("    <testcase", f);
    xml_attr(f, "name", name);
    xml_attr(f, "classname", catalog_of(r, s));
    fputs(">\n", f);
    switch (s->verdict) {
    case PS_VERDICT_REDESIGN:
    case PS_VERDICT_UNSTABILIZABLE:
        /* Fails: no linear time-invariant controller meets the requirements. */
        fputs("      <failure", f);
        xml_attr(f, "message", s->cause);
        xml_attr(f, "type", verdict);
        fprintf(f, ">verdict %s, rank %zu, severity %s (above 1 fails): ", verdict, rank, sev);
        xml_put(f, ps_verdict_meaning(s->verdict), false);
        fputs(".\ncause: ", f);
        xml_put(f, s->cause, false);
        fputs("\nplant: ", f);
        put_where(f, r, s);
        put_certificate(f, r, s);
        fputs("</failure>\n", f);
        break;
    case PS_VERDICT_NEEDS_BANDWIDTH:
    case PS_VERDICT_UNREAD: {
        /* Not judged: an error of the test, not a failure of the plant. */
        char msg[PS_DIAG_TEXT + PS_DIAG_FIELD + 32];
        if (s->verdict == PS_VERDICT_UNREAD)
            snprintf(msg, sizeof msg, "%s%s%s%s", s->err_text, s->err_field[0] ? " (field '" : "", s->err_field,
                     s->err_field[0] ? "')" : "");
        else
            snprintf(msg, sizeof msg, "%s", ps_verdict_meaning(s->verdict));
        fputs("      <error", f);
        xml_attr(f, "message", msg);
        xml_attr(f, "type", verdict);
        fprintf(f, ">verdict %s, rank %zu: ", verdict, rank);
        xml_put(f, ps_verdict_meaning(s->verdict), false);
        fputs(".\n", f);
        xml_put(f, msg, false);
        fputs("\nplant: ", f);
        put_where(f, r, s);
        if (s->verdict == PS_VERDICT_UNREAD && s->err_col)
            fprintf(f, ":%zu", s->err_col);
        fputs("</error>\n", f);
        break;
    }
    case PS_VERDICT_CLEAR:
    case PS_VERDICT_MARGINAL:
        /* Passes; a marginal plant says so in its output. */
        fprintf(f, "      <system-out>verdict %s, rank %zu, severity %s (above 1 fails)", verdict, rank, sev);
        if (s->verdict == PS_VERDICT_MARGINAL) {
            fputs(": ", f);
            xml_put(f, ps_verdict_meaning(s->verdict), false);
            fputs(".\ncause: ", f);
            xml_put(f, s->cause, false);
        }
        put_certificate(f, r, s);
        fputs("</system-out>\n", f);
        break;
    case PS_VERDICT_COUNT: break;
    }
    fputs("    </testcase>\n", f);
}

/* One suite for the run: the ranking is the run's, and a plant id is unique
 * in a run, not only in its catalog; classname names the catalog. */
ps_status ps_write_junit(FILE *f, const ps_run *r)
{
    size_t failures = 0, errors = 0, unread_catalogs = 0;
    for (size_t i = 0; i < r->n_rows; i++) {
        ps_verdict v = ps_run_verdict(r, i);
        failures += v == PS_VERDICT_REDESIGN || v == PS_VERDICT_UNSTABILIZABLE;
        errors += v == PS_VERDICT_NEEDS_BANDWIDTH || v == PS_VERDICT_UNREAD;
    }
    for (size_t i = 0; i < r->n_catalogs; i++)
        unread_catalogs += r->catalogs[i].failed;
    size_t tests = r->n_rows + unread_catalogs;
    errors += unread_catalogs;
    fputs("<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n", f);
    fprintf(f, "<testsuites name=\"plantsieve screen\" tests=\"%zu\" failures=\"%zu\" errors=\"%zu\" skipped=\"0\">\n",
            tests, failures, errors);
    fprintf(f, "  <testsuite name=\"plantsieve screen\" tests=\"%zu\" failures=\"%zu\" errors=\"%zu\" skipped=\"0\">\n",
            tests, failures, errors);
    fputs("    <properties>\n      <property name=\"tool\" value=\"plantsieve " PS_VERSION "\"/>\n", f);
    fprintf(f, "      <property name=\"marginal_at\" value=\"%g\"/>\n", r->opt.marginal_at);
    if (r->meta.date[0]) {
        fputs("      <property name=\"date\"", f);
        xml_attr(f, "value", r->meta.date);
        fputs("/>\n", f);
    }
    for (size_t i = 0; i < r->n_catalogs; i++) {
        fputs("      <property name=\"catalog\"", f);
        xml_attr(f, "value", r->catalogs[i].file);
        fputs("/>\n", f);
    }
    fputs("      <property name=\"caution\"", f);
    xml_attr(f, "value", ps_caution_text);
    fputs("/>\n    </properties>\n", f);
    for (size_t i = 0; i < r->n_rows && !ferror(f); i++)
        testcase(f, r, ps_run_row(r, i), i + 1);
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        if (!c->failed)
            continue;
        char unread[256], msg[PS_DIAG_TEXT + 320];
        ps_unread_text(c->line, unread, sizeof unread);
        char pos[PS_DIAG_POS];
        snprintf(msg, sizeof msg, "%s%s: %s; %s", c->file, ps_diag_pos(pos, sizeof pos, c->line, c->col),
                 c->error ? c->error : "", unread);
        fputs("    <testcase name=\"(catalog not read to the end)\"", f);
        xml_attr(f, "classname", c->file);
        fputs(">\n      <error type=\"catalog-unread\"", f);
        xml_attr(f, "message", msg);
        fputc('>', f);
        xml_put(f, msg, false);
        fputs("</error>\n    </testcase>\n", f);
    }
    fputs("  </testsuite>\n</testsuites>\n", f);
    return ferror(f) ? PS_ERR_IO : PS_OK;
}

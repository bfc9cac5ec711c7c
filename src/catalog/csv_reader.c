/* csv_reader.c - streaming RFC 4180 catalog reader over libcsv: a header row of
 * field names, then one plant per row, each handed to the caller as it ends. */
#include "catalog/catalog.h"

#include <csv.h>
#include <errno.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stdio.h>
#include <string.h>
#include <sys/stat.h>

#include "catalog/catalog_internal.h"
#include "catalog/numtext.h"

/* Bytes read from the file per fread. The reader hands libcsv one physical
 * line at a time (split at '\n' by hand, not with getline, so a hostile
 * single-line file cannot make the line buffer grow without bound: a line
 * longer than this is simply fed in several pieces). */
enum { CSV_READ_CHUNK = 64 * 1024 };

/* libcsv grows its field buffer through this; refusing past the field cap
 * makes csv_parse stop with CSV_ENOMEM instead of swallowing memory. The
 * margin lets a field of exactly PS_FIELD_MAX_BYTES (plus libcsv's
 * terminating NUL) through; on_field enforces the exact limit. */
static void *capped_realloc(void *p, size_t n)
{
    return n > (size_t)PS_FIELD_MAX_BYTES + 256 ? NULL : realloc(p, n);
}

typedef struct csv_reader {
    const char *path;
    ps_plant *p;
    ps_entry_fn fn;
    void *ctx;

    size_t line;          /* physical line now being fed (1-based) */
    size_t pending_line;  /* first non-blank line since the last row ended; 0 if none */
    size_t last_field_line; /* line where the previous field of this row ended */

    bool header_done;
    size_t n_cols;
    ps_field cols[PS_F_COUNT]; /* field of each header column */
    unsigned seen;             /* bit (1u << field) per header column */

    bool in_row;          /* at least one field of the current row was seen */
    size_t row_line;      /* physical line where the current row starts */
    size_t field_no;      /* fields of the current row seen so far */
    bool row_failed;      /* row_diag holds the row's first error */
    ps_diag row_diag;

    bool stop;            /* fn asked to stop, or a file-level error is set */
    ps_status status;     /* first file-level error */
    ps_diag *fdiag;
} csv_reader;

static bool is_blank(const char *s, size_t n)
{
    for (size_t i = 0; i < n; i++)
        if (s[i] != ' ' && s[i] != '\t' && s[i] != '\r' && s[i] != '\n')
            return false;
    return true;
}

static size_t count_newlines(const char *s, size_t n)
{
    size_t nl = 0;
    for (size_t i = 0; i < n; i++)
        nl += s[i] == '\n';
    return nl;
}

/* Record the first file-level error and stop reading. */
static void file_fail(csv_reader *r, ps_status st, size_t line, size_t col, const char *field,
                      const char *fmt, ...) __attribute__((format(printf, 6, 7)));
static void file_fail(csv_reader *r, ps_status st, size_t line, size_t col, const char *field,
                      const char *fmt, ...)
{
    if (r->status != PS_OK)
        return;
    va_list ap;
    va_start(ap, fmt);
    r->status = ps_diag_vset(r->fdiag, st, line, col, field, fmt, ap);
    va_end(ap);
    r->stop = true;
}

/* Record the first error of the current row (later ones are dropped). */
static void row_fail(csv_reader *r, size_t line, size_t col, const char *field,
                     const char *fmt, ...) __attribute__((format(printf, 5, 6)));
static void row_fail(csv_reader *r, size_t line, size_t col, const char *field,
                     const char *fmt, ...)
{
    if (r->row_failed)
        return;
    r->row_failed = true;
    va_list ap;
    va_start(ap, fmt);
    ps_diag_vset(&r->row_diag, PS_ERR_INPUT, line, col, field, fmt, ap);
    va_end(ap);
}

static void row_begin(csv_reader *r, size_t line)
{
    r->in_row = true;
    r->row_line = line;
    r->field_no = 0;
    r->last_field_line = line;
    if (r->header_done) {
        ps_plant_reset(r->p);
        r->p->line = line;
        r->row_failed = false;
    }
}

/* Hand the current data row to the caller: exactly one call per row. */
static void row_deliver(csv_reader *r)
{
    if (r->fn(r->ctx, r->p, r->row_failed ? &r->row_diag : NULL) != 0)
        r->stop = true;
    r->in_row = false;
    r->field_no = 0;
    r->pending_line = 0;
}

static const char *column_field_name(const csv_reader *r, size_t col)
{
    return col >= 1 && col <= r->n_cols ? ps_field_name(r->cols[col - 1]) : "";
}

static void header_field(csv_reader *r, const char *s, size_t len, size_t col, size_t line)
{
    if (!s)
        s = "";
    if (strlen(s) != len) {
        file_fail(r, PS_ERR_SYNTAX, line, col, NULL, "header column %zu contains a NUL byte", col);
        return;
    }
    /* A column name is echoed in the error below: no raw bytes or control
     * characters may reach the terminal through it either. */
    char why[PS_DIAG_TEXT / 2];
    size_t at = 0;
    if (ps_catalog_text_check(s, len, true, &at, why, sizeof why) != 0) {
        file_fail(r, PS_ERR_SYNTAX, line, col, NULL, "header column %zu: %s", col, why);
        return;
    }
    ps_field f = ps_field_lookup(s);
    if (f == PS_F_COUNT) {
        char names[PS_DIAG_TEXT / 2] = "";
        size_t used = 0;
        for (int k = 0; k < PS_F_COUNT && used < sizeof names; k++)
            used += (size_t)snprintf(names + used, sizeof names - used, "%s%s", k ? ", " : "",
                                     ps_field_name((ps_field)k));
        file_fail(r, PS_ERR_SYNTAX, line, col, s, "unknown column '%.60s' (expected one of %s)", s,
                  names);
        return;
    }
    if (r->seen & (1u << f)) {
        size_t first = 0;
        while (r->cols[first] != f)
            first++;
        file_fail(r, PS_ERR_SYNTAX, line, col, s, "duplicate column '%s' (already column %zu)", s,
                  first + 1);
        return;
    }
    r->seen |= 1u << f;
    r->cols[r->n_cols++] = f; /* no overflow: every field is accepted at most once */
}

static void parse_scalar(csv_reader *r, ps_field f, const char *s, size_t line, size_t col, ps_plant *p)
{
    const char *why = "";
    if (ps_text_scalar_field(p, f, s, &why))
        row_fail(r, line, col, ps_field_name(f), "%s: %s", ps_field_name(f), why);
}

static void parse_real_list(csv_reader *r, ps_field f, const char *s, size_t line, size_t col,
                            double *out, size_t cap, size_t *n)
{
    const char *why = "";
    size_t bad = 0;
    int k = ps_text_real_list(s, out, cap, &bad, &why);
    if (k < 0) {
        row_fail(r, line, col, ps_field_name(f), "%s: item %zu: %s", ps_field_name(f), bad + 1, why);
        k = 0;
    }
    *n = (size_t)k;
}

static void parse_complex_list(csv_reader *r, ps_field f, const char *s, size_t line, size_t col,
                               ps_cplx *out, size_t *n)
{
    const char *why = "";
    size_t bad = 0;
    int k = ps_text_complex_list(s, out, PS_MAX_ORDER, &bad, &why);
    if (k < 0) {
        row_fail(r, line, col, ps_field_name(f), "%s: item %zu: %s", ps_field_name(f), bad + 1, why);
        k = 0;
    }
    *n = (size_t)k;
}

/* Matrix a: rows separated by ';', entries by blanks ("0 1; 19.6 0"). A
 * trailing ';' is allowed. s is libcsv's field buffer, which we may write to
 * during the callback: each ';' is cut to a NUL while its row is parsed. */
static void parse_matrix(csv_reader *r, char *s, size_t line, size_t col)
{
    ps_plant *p = r->p;
    const char *name = ps_field_name(PS_F_A);
    double row[PS_MAX_ORDER];
    size_t rows = 0, cols = 0;
    for (char *seg = s;;) {
        char *semi = strchr(seg, ';');
        if (semi)
            *semi = '\0';
        bool skip = !semi && rows > 0 && is_blank(seg, strlen(seg));
        int k = 0;
        const char *why = "";
        size_t bad = 0;
        if (!skip && rows == PS_MAX_ORDER) {
            row_fail(r, line, col, name, "%s: more than %d rows (order limit)", name, PS_MAX_ORDER);
            k = -2;
        } else if (!skip) {
            k = ps_text_real_list(seg, row, PS_MAX_ORDER, &bad, &why);
            if (k < 0)
                row_fail(r, line, col, name, "%s: row %zu, item %zu: %s", name, rows + 1, bad + 1,
                         why);
            else if (rows == 0 && k == 0)
                row_fail(r, line, col, name, "%s: row 1 is empty", name);
            else if (rows > 0 && (size_t)k != cols)
                row_fail(r, line, col, name, "%s: row %zu has %d entries, row 1 has %zu", name,
                         rows + 1, k, cols);
        }
        if (semi)
            *semi = ';';
        if (r->row_failed)
            return;
        if (!skip) {
            if (rows == 0)
                cols = (size_t)k;
            memcpy(p->a + rows * cols, row, cols * sizeof *row);
            rows++;
        }
        if (!semi)
            break;
        seg = semi + 1;
    }
    p->a_rows = rows;
    p->a_cols = cols;
}

static void copy_text(csv_reader *r, ps_field f, const char *s, size_t len, size_t line,
                      size_t col, char *out, size_t cap)
{
    char why[PS_DIAG_TEXT / 2];
    size_t at = 0;
    if (ps_catalog_text_check(s, len, f == PS_F_ID, &at, why, sizeof why) != 0) {
        row_fail(r, line, col, ps_field_name(f), "%s: %s", ps_field_name(f), why);
        return;
    }
    if (len >= cap) {
        row_fail(r, line, col, ps_field_name(f), "%s: longer than %zu bytes", ps_field_name(f),
                 cap - 1);
        return;
    }
    memcpy(out, s, len + 1);
}

/* col is the 1-based column NUMBER of the field (not a character offset): it
 * is what ps_plant_mark and the entry diagnostics record for CSV. */
static void data_field(csv_reader *r, char *s, size_t len, size_t col, size_t line)
{
    ps_plant *p = r->p;
    if (col > r->n_cols) {
        row_fail(r, line, col, NULL, "too many fields: the header names %zu columns", r->n_cols);
        return;
    }
    ps_field f = r->cols[col - 1];
    const char *name = ps_field_name(f);
    if (!s)
        return; /* empty unquoted field: not given */
    if (strlen(s) != len) {
        row_fail(r, line, col, name, "%s: contains a NUL byte", name);
        return;
    }
    if (len > PS_FIELD_MAX_BYTES) {
        row_fail(r, line, col, name, "%s: longer than %d bytes", name, PS_FIELD_MAX_BYTES);
        return;
    }
    /* Blank, including a quoted "" as spreadsheets write it, means not given. */
    if (is_blank(s, len))
        return;
    ps_plant_mark(p, f, line, col);
    switch (f) {
    case PS_F_ID: copy_text(r, f, s, len, line, col, p->id, sizeof p->id); break;
    case PS_F_NOTE: copy_text(r, f, s, len, line, col, p->note, sizeof p->note); break;
    case PS_F_NUM: parse_real_list(r, f, s, line, col, p->num, PS_MAX_ORDER + 1, &p->n_num); break;
    case PS_F_DEN: parse_real_list(r, f, s, line, col, p->den, PS_MAX_ORDER + 1, &p->n_den); break;
    case PS_F_ZEROS: parse_complex_list(r, f, s, line, col, p->zeros, &p->n_zeros); break;
    case PS_F_POLES: parse_complex_list(r, f, s, line, col, p->poles, &p->n_poles); break;
    case PS_F_A: parse_matrix(r, s, line, col); break;
    case PS_F_B: parse_real_list(r, f, s, line, col, p->b, PS_MAX_ORDER, &p->n_b); break;
    case PS_F_C: parse_real_list(r, f, s, line, col, p->c, PS_MAX_ORDER, &p->n_c); break;
    default: /* single values: numbers, frequencies, ratios, the digital-loop fields */
        parse_scalar(r, f, s, line, col, p);
        break;
    }
}

/* libcsv callbacks cannot fail: errors are kept in the reader and checked
 * after every csv_parse / csv_fini call. */
static void on_field(void *sv, size_t len, void *data)
{
    csv_reader *r = data;
    if (r->stop)
        return;
    char *s = sv;
    /* The field ends on the line being fed; it started as many lines earlier
     * as it holds newlines (only quoted fields can hold them). */
    size_t start = r->line - (s ? count_newlines(s, len) : 0);
    if (!r->in_row)
        row_begin(r, start);
    size_t col = ++r->field_no;
    if (r->header_done)
        data_field(r, s, len, col, start);
    else
        header_field(r, s, len, col, r->row_line);
    r->last_field_line = r->line;
}

static void on_row(int term, void *data)
{
    (void)term;
    csv_reader *r = data;
    if (r->stop)
        return;
    if (!r->in_row)
        row_begin(r, r->pending_line ? r->pending_line : r->line);
    if (!r->header_done) {
        r->header_done = true;
        r->in_row = false;
        r->field_no = 0;
        r->pending_line = 0;
        return;
    }
    /* RFC 4180 (section 2, item 4): every row has the header's field count.
     * A short row is named where it ends, not as if its cells were empty. */
    if (r->field_no < r->n_cols)
        row_fail(r, r->line, r->field_no, "",
                 "row has %zu field%s, the header has %zu: it ends after column %zu (%s); write "
                 "an empty cell for a value not given",
                 r->field_no, r->field_no == 1 ? "" : "s", r->n_cols, r->field_no,
                 column_field_name(r, r->field_no));
    row_deliver(r);
}

static int parser_init(struct csv_parser *cp)
{
    if (csv_init(cp, CSV_STRICT | CSV_STRICT_FINI | CSV_APPEND_NULL | CSV_EMPTY_IS_NULL) != 0)
        return -1;
    csv_set_realloc_func(cp, capped_realloc);
    /* libcsv grows a field's buffer by this many bytes at a time (128 by
     * default): a field near the 1 MiB cap took some 8000 reallocations,
     * each a copy under a sanitizer's allocator (19 s under ASan). */
    csv_set_blk_size(cp, 64 * 1024);
    return 0;
}

/* csv_parse stopped early at byte `at` (1-based) of the current line. A strict
 * parse error (bad quoting) is confined to its row: the row is delivered as an
 * error, the parser is re-initialised, and reading resumes at the next
 * physical line. A field over the size cap ends the read (PS_ERR_SYNTAX): it is
 * usually an unterminated quote, and resyncing inside it would invent rows. */
static void parse_error(csv_reader *r, struct csv_parser *cp, size_t at)
{
    int err = csv_error(cp);
    bool too_big = err == CSV_ENOMEM || err == CSV_ETOOBIG;
    /* libcsv asks for ever smaller increments before it gives up, so when
     * capped_realloc refused for the cap the field already holds at least
     * PS_FIELD_MAX_BYTES bytes; shorter, the allocator itself failed. */
    bool no_memory = err == CSV_ENOMEM && cp->entry_pos < (size_t)PS_FIELD_MAX_BYTES;
    size_t col = r->field_no + 1;
    char text[PS_DIAG_TEXT];
    if (no_memory)
        snprintf(text, sizeof text, "out of memory while reading a field (%zu bytes read into it, "
                 "below the limit of %d)", cp->entry_pos, PS_FIELD_MAX_BYTES);
    else if (too_big)
        snprintf(text, sizeof text, "field longer than the limit of %d bytes", PS_FIELD_MAX_BYTES);
    else
        snprintf(text, sizeof text,
                 "bad quoting at character %zu of line %zu: a field must be wholly quoted "
                 "(\"...\", with \"\" for a quote) or contain no quotes",
                 at, r->line);
    if (!r->header_done) {
        file_fail(r, no_memory ? PS_ERR_NOMEM : PS_ERR_SYNTAX, r->line, col, NULL, "header: %s", text);
        return;
    }
    if (!r->in_row)
        row_begin(r, r->pending_line ? r->pending_line : r->line);
    const char *name = column_field_name(r, col);
    row_fail(r, r->line, col, name, "%s", text);
    row_deliver(r);
    if (too_big)
        file_fail(r, no_memory ? PS_ERR_NOMEM : PS_ERR_SYNTAX, r->line, col, name, "%s", text);
}

ps_status ps_csv_read(const char *path, ps_plant *scratch, ps_entry_fn fn, void *ctx,
                      ps_diag *fdiag)
{
    FILE *f;
    ps_status open_st = ps_catalog_open(path, &f, fdiag);
    if (open_st != PS_OK)
        return open_st;

    csv_reader r = {.path = path, .p = scratch, .fn = fn, .ctx = ctx, .fdiag = fdiag};
    snprintf(r.row_diag.file, sizeof r.row_diag.file, "%s", path);
    struct csv_parser cp;
    char *buf = malloc(CSV_READ_CHUNK);
    if (!buf || parser_init(&cp) != 0) {
        free(buf);
        fclose(f);
        return ps_diag_set(fdiag, PS_ERR_NOMEM, 0, 0, NULL, "out of memory");
    }

    size_t len = 0, pos = 0, total = 0, lines_done = 0, line_off = 0;
    bool first = true, skip_line = false;
    while (!r.stop) {
        if (pos == len) {
            len = fread(buf, 1, CSV_READ_CHUNK, f);
            pos = 0;
            if (len == 0)
                break;
            total += len;
            if (total > (size_t)PS_CATALOG_MAX_BYTES) {
                file_fail(&r, PS_ERR_IO, lines_done + 1, 0, NULL,
                          "file is larger than the catalog size limit of %d bytes",
                          PS_CATALOG_MAX_BYTES);
                break;
            }
            if (first && len >= 3 && memcmp(buf, "\xEF\xBB\xBF", 3) == 0)
                pos = 3; /* UTF-8 byte order mark: libcsv would keep it in the first name */
            first = false;
        }
        const char *seg = buf + pos;
        const char *nl = memchr(seg, '\n', len - pos);
        size_t n = nl ? (size_t)(nl - seg) + 1 : len - pos;
        pos += n;
        r.line = lines_done + 1;
        if (!skip_line) {
            if (r.pending_line == 0 && !is_blank(seg, n))
                r.pending_line = r.line;
            size_t used = csv_parse(&cp, seg, n, on_field, on_row, &r);
            if (used != n && !r.stop) {
                parse_error(&r, &cp, line_off + used + 1);
                csv_free(&cp);
                if (parser_init(&cp) != 0) {
                    /* csv_init only fills in the struct; it cannot fail with our arguments */
                    file_fail(&r, PS_ERR_NOMEM, r.line, 0, NULL, "out of memory");
                    fclose(f);
                    free(buf);
                    return r.status;
                }
                skip_line = nl == NULL; /* resync: drop the rest of this line */
            }
        }
        line_off += n;
        if (nl) {
            lines_done++;
            line_off = 0;
            skip_line = false;
        }
    }

    if (!r.stop && ferror(f))
        file_fail(&r, PS_ERR_IO, lines_done + 1, 0, NULL, "read error: %s", strerror(errno));
    if (!r.stop && csv_fini(&cp, on_field, on_row, &r) != 0 && !r.stop) {
        /* Only an unterminated quote makes csv_fini fail: it opened right
         * after the previous field's delimiter, or at the row's first line. */
        size_t opened = r.in_row ? r.last_field_line : (r.pending_line ? r.pending_line : r.line);
        size_t col = r.field_no + 1;
        if (!r.header_done) {
            file_fail(&r, PS_ERR_SYNTAX, opened, col, NULL,
                      "header: quoted field opened on line %zu is never closed", opened);
        } else {
            if (!r.in_row)
                row_begin(&r, opened);
            const char *name = column_field_name(&r, col);
            row_fail(&r, opened, col, name,
                     "quoted field opened on line %zu is never closed (the rest of the file "
                     "was read into it)", opened);
            row_deliver(&r);
            file_fail(&r, PS_ERR_SYNTAX, opened, col, name,
                      "quoted field opened on line %zu is never closed", opened);
        }
    }
    if (r.status == PS_OK && !r.stop && !r.header_done)
        file_fail(&r, PS_ERR_SYNTAX, 0, 0, NULL, "empty file: expected a header row naming the columns");
    csv_free(&cp);
    fclose(f);
    free(buf);
    return r.status;
}

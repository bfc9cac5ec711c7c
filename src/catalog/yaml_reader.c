/* yaml_reader.c - streaming YAML catalog reader over the libyaml event API:
 * one plant mapping at a time, with depth, alias and size budgets for hostile files. */
#include "catalog/catalog.h"

#include <errno.h>
#include <stdarg.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <yaml.h>

#include "catalog/catalog_internal.h"
#include "catalog/numtext.h"

/* Alias policy. Anchors on scalars and sequences are recorded (as copied
 * events) into a bounded table; an alias replays its anchor's events, and
 * every replayed event is charged to PS_YAML_MAX_ALIAS_EVENTS. Anchors on
 * mappings are remembered by name only: an alias to one is an entry error
 * (so are '<<' merge keys). An anchor whose node outgrows its recording cap
 * cannot be replayed: an alias to it is treated as exceeding the budget.
 * Aliases are expanded when the anchored node is complete, so a node cannot
 * contain itself (cycles are refused). */
enum {
    YR_MAX_ANCHORS = 256,            /* distinct anchor names per file */
    YR_ANCHOR_NAME_MAX = 256,        /* bytes of one anchor name */
    YR_ANCHOR_EVENTS = 1024,         /* events recorded for one anchor */
    YR_ANCHOR_BYTES = 4 << 20,       /* scalar text held by all anchors together */
    YR_READ_CHUNK = 64 * 1024,       /* bytes per fread */
    YR_KEY_MAX = 64,                 /* longer keys are unknown fields anyway */
    YR_MSG = 160,
    YR_FAMILY_NODES = 4096           /* nodes in one family mapping */
};

/* Bytes libyaml may consume without producing an event: one scalar of the
 * field limit, written with escapes (up to 4 source bytes per character), plus
 * slack for comments and read-ahead. Past it the file is refused, so a giant
 * token cannot make libyaml's own buffers grow without bound. */
#define YR_TOKEN_GUARD ((size_t)PS_FIELD_MAX_BYTES * 4 + 64 * 1024)

typedef enum ev_type {
    EV_STREAM_START, EV_STREAM_END, EV_DOC_START, EV_DOC_END,
    EV_SEQ_START, EV_SEQ_END, EV_MAP_START, EV_MAP_END, EV_SCALAR,
    EV_BAD /* a node that cannot be used (undefined alias, oversize scalar...); value = why */
} ev_type;

/* One event as the catalog grammar sees it. value stays valid until the next
 * call to next_event. */
typedef struct ev {
    ev_type type;
    bool plain;
    size_t line, col; /* 1-based */
    const char *value;
    size_t len;
    char msg[YR_MSG];
} ev;

typedef struct rec_ev {
    ev_type type;
    bool plain;
    size_t len;
    char *value; /* NUL-terminated copy, or NULL */
} rec_ev;

typedef enum anchor_state { AN_RECORDING, AN_DONE, AN_MAPPING, AN_TOO_BIG } anchor_state;

typedef struct anchor {
    char *name;
    anchor_state state;
    size_t n, cap, bytes;
    rec_ev *ev;
} anchor;

typedef struct yaml_rd {
    const char *path;
    FILE *f;
    ps_plant *p;
    ps_plant *defaults;
    ps_entry_fn fn;
    ps_family_fn ffn;
    void *ctx;

    yaml_parser_t parser;
    yaml_event_t yev;
    bool have_yev;

    /* input side (read handler) */
    unsigned char *buf;
    size_t buf_len, buf_pos;
    bool eof;
    size_t fed;          /* bytes handed to libyaml */
    size_t fed_at_event; /* fed when the last parser event came out */
    ps_status in_status; /* why the read handler refused, or PS_OK */
    char in_msg[YR_MSG];

    /* structure */
    size_t depth;

    /* anchors and replay */
    anchor anchors[YR_MAX_ANCHORS];
    size_t n_anchors, anchor_bytes;
    size_t rec_stack[PS_YAML_MAX_DEPTH + 2]; /* anchor index of each open recording */
    size_t rec_depth[PS_YAML_MAX_DEPTH + 2]; /* depth inside the recorded sequence */
    size_t n_rec;
    anchor *replay;
    size_t replay_pos, replay_line, replay_col;
    size_t alias_events;

    /* the entry being read */
    bool entry_failed;
    ps_diag entry_diag;

    char *tmp; /* scratch copy of a matrix scalar, grown as needed */
    size_t tmp_cap;

    bool stop; /* fn asked to stop */
    ps_status status;
    ps_diag *fdiag;
    char *title;        /* the caller's room for the `catalog` title, or NULL */
    size_t title_cap;
} yaml_rd;

/* ---- diagnostics --------------------------------------------------------- */

static void fatal(yaml_rd *r, ps_status st, size_t line, size_t col, const char *field,
                  const char *fmt, ...) __attribute__((format(printf, 6, 7)));
static void fatal(yaml_rd *r, ps_status st, size_t line, size_t col, const char *field,
                  const char *fmt, ...)
{
    if (r->status != PS_OK)
        return;
    r->status = st;
    ps_diag local;
    va_list ap;
    va_start(ap, fmt);
    ps_diag_vset(&local, st, line, col, field, fmt, ap);
    va_end(ap);
    ps_diag_set(r->fdiag, st, line, col, field, "%s", local.text);
    /* Kept here too (fdiag may be NULL): an entry cut by this error is
     * reported with it unless it already had an error of its own. */
    if (!r->entry_failed)
        ps_diag_set(&r->entry_diag, st, line, col, field, "%s", local.text);
}

/* Record the first error of the current entry; later ones are dropped. */
static void entry_fail(yaml_rd *r, size_t line, size_t col, const char *field, const char *fmt,
                       ...) __attribute__((format(printf, 5, 6)));
static void entry_fail(yaml_rd *r, size_t line, size_t col, const char *field, const char *fmt,
                       ...)
{
    if (r->entry_failed)
        return;
    r->entry_failed = true;
    va_list ap;
    va_start(ap, fmt);
    ps_diag_vset(&r->entry_diag, PS_ERR_INPUT, line, col, field, fmt, ap);
    va_end(ap);
}

static const char *kind_name(ev_type t)
{
    switch (t) {
    case EV_SEQ_START: return "a sequence";
    case EV_MAP_START: return "a mapping";
    case EV_SCALAR: return "a single value";
    default: return "something else";
    }
}

/* ---- input --------------------------------------------------------------- */

/* libyaml read handler. It hands over at most one line per call so libyaml,
 * which decodes everything it holds before scanning, reports an encoding
 * error near the entry that contains it rather than a whole chunk early. */
static int read_input(void *data, unsigned char *out, size_t size, size_t *size_read)
{
    yaml_rd *r = data;
    *size_read = 0;
    if (r->buf_pos == r->buf_len) {
        if (r->eof)
            return 1;
        r->buf_len = fread(r->buf, 1, YR_READ_CHUNK, r->f);
        r->buf_pos = 0;
        if (r->buf_len == 0) {
            if (ferror(r->f)) {
                r->in_status = PS_ERR_IO;
                snprintf(r->in_msg, sizeof r->in_msg, "cannot read: %s", strerror(errno));
                return 0;
            }
            r->eof = true;
            return 1;
        }
    }
    size_t n = r->buf_len - r->buf_pos;
    if (n > size)
        n = size;
    const unsigned char *at = r->buf + r->buf_pos;
    const unsigned char *nl = memchr(at, '\n', n);
    if (nl)
        n = (size_t)(nl - at) + 1;
    if (r->fed + n > (size_t)PS_CATALOG_MAX_BYTES) {
        r->in_status = PS_ERR_IO;
        snprintf(r->in_msg, sizeof r->in_msg,
                 "file is larger than the catalog size limit of %d bytes", PS_CATALOG_MAX_BYTES);
        return 0;
    }
    if (r->fed + n - r->fed_at_event > YR_TOKEN_GUARD) {
        r->in_status = PS_ERR_SYNTAX;
        snprintf(r->in_msg, sizeof r->in_msg,
                 "a single scalar or comment spans more than %zu bytes", YR_TOKEN_GUARD);
        return 0;
    }
    memcpy(out, at, n);
    r->buf_pos += n;
    r->fed += n;
    *size_read = n;
    return 1;
}

/* Line and column (characters) of byte offset off, found by reading the file
 * again from the start; 0/0 when it cannot be re-read. */
static void offset_position(yaml_rd *r, size_t off, size_t *line, size_t *col)
{
    *line = *col = 0;
    if (fseek(r->f, 0, SEEK_SET) != 0)
        return;
    size_t ln = 1, cl = 1, pos = 0;
    while (pos < off) {
        size_t want = off - pos < YR_READ_CHUNK ? off - pos : YR_READ_CHUNK;
        size_t got = fread(r->buf, 1, want, r->f);
        if (got == 0)
            break;
        for (size_t i = 0; i < got; i++) {
            if (r->buf[i] == '\n') {
                ln++;
                cl = 1;
            } else if ((r->buf[i] & 0xC0) != 0x80) { /* not a UTF-8 continuation byte */
                cl++;
            }
        }
        pos += got;
    }
    *line = ln;
    *col = cl;
}

static void parser_fail(yaml_rd *r)
{
    if (r->in_status != PS_OK) {
        fatal(r, r->in_status, 0, 0, NULL, "%s", r->in_msg);
        return;
    }
    yaml_parser_t *yp = &r->parser;
    const char *problem = yp->problem ? yp->problem : "unknown error";
    if (yp->error == YAML_MEMORY_ERROR) {
        fatal(r, PS_ERR_NOMEM, 0, 0, NULL, "out of memory");
    } else if (yp->error == YAML_READER_ERROR) {
        /* problem_mark is not advanced for reader errors; the byte offset is right. */
        size_t line, col;
        offset_position(r, yp->problem_offset, &line, &col);
        if (yp->problem_value >= 0)
            fatal(r, PS_ERR_SYNTAX, line, col, NULL, "%s (byte 0x%02X)", problem,
                  (unsigned)yp->problem_value);
        else
            fatal(r, PS_ERR_SYNTAX, line, col, NULL, "%s", problem);
    } else if (yp->context) {
        fatal(r, PS_ERR_SYNTAX, yp->problem_mark.line + 1, yp->problem_mark.column + 1, NULL,
              "%s (%s at %zu:%zu)", problem, yp->context, yp->context_mark.line + 1,
              yp->context_mark.column + 1);
    } else {
        fatal(r, PS_ERR_SYNTAX, yp->problem_mark.line + 1, yp->problem_mark.column + 1, NULL,
              "%s", problem);
    }
}

/* ---- anchors ------------------------------------------------------------- */

static void anchor_clear(yaml_rd *r, anchor *a)
{
    for (size_t i = 0; i < a->n; i++)
        free(a->ev[i].value);
    free(a->ev);
    r->anchor_bytes -= a->bytes;
    a->ev = NULL;
    a->n = a->cap = a->bytes = 0;
}

static anchor *anchor_find(yaml_rd *r, const char *name)
{
    for (size_t i = 0; i < r->n_anchors; i++)
        if (strcmp(r->anchors[i].name, name) == 0)
            return &r->anchors[i];
    return NULL;
}

/* Start (or restart: YAML lets a name be reused) the anchor called name.
 * NULL after a file-level error. */
static anchor *anchor_define(yaml_rd *r, const char *name, anchor_state state, size_t line,
                             size_t col)
{
    if (strlen(name) > YR_ANCHOR_NAME_MAX) {
        fatal(r, PS_ERR_SYNTAX, line, col, NULL, "anchor name longer than %d bytes",
              YR_ANCHOR_NAME_MAX);
        return NULL;
    }
    anchor *a = anchor_find(r, name);
    if (a) {
        if (a->state == AN_RECORDING) {
            fatal(r, PS_ERR_SYNTAX, line, col, NULL, "anchor '&%.64s' is redefined inside its own node",
                  name);
            return NULL;
        }
        anchor_clear(r, a);
    } else {
        if (r->n_anchors == YR_MAX_ANCHORS) {
            fatal(r, PS_ERR_SYNTAX, line, col, NULL, "more than %d distinct anchors in one file",
                  YR_MAX_ANCHORS);
            return NULL;
        }
        char *copy = strdup(name);
        if (!copy) {
            fatal(r, PS_ERR_NOMEM, line, col, NULL, "out of memory");
            return NULL;
        }
        a = &r->anchors[r->n_anchors++];
        memset(a, 0, sizeof *a);
        a->name = copy;
    }
    a->state = state;
    return a;
}

/* Append e to anchor a; an anchor past its caps is dropped to AN_TOO_BIG. */
static void anchor_append(yaml_rd *r, anchor *a, const ev *e)
{
    if (a->state != AN_RECORDING)
        return;
    size_t len = e->value ? e->len : 0;
    if (a->n == YR_ANCHOR_EVENTS || r->anchor_bytes + len + 1 > YR_ANCHOR_BYTES) {
        anchor_clear(r, a);
        a->state = AN_TOO_BIG;
        return;
    }
    if (a->n == a->cap) {
        size_t cap = a->cap ? a->cap * 2 : 16;
        rec_ev *grown = realloc(a->ev, cap * sizeof *grown);
        if (!grown) {
            fatal(r, PS_ERR_NOMEM, e->line, e->col, NULL, "out of memory");
            return;
        }
        a->ev = grown;
        a->cap = cap;
    }
    rec_ev *re = &a->ev[a->n];
    re->type = e->type;
    re->plain = e->plain;
    re->len = len;
    re->value = NULL;
    if (e->value) {
        re->value = malloc(len + 1);
        if (!re->value) {
            fatal(r, PS_ERR_NOMEM, e->line, e->col, NULL, "out of memory");
            return;
        }
        memcpy(re->value, e->value, len);
        re->value[len] = '\0';
        a->bytes += len + 1;
        r->anchor_bytes += len + 1;
    }
    a->n++;
}

/* ---- events -------------------------------------------------------------- */

static void set_bad(ev *e, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void set_bad(ev *e, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(e->msg, sizeof e->msg, fmt, ap);
    va_end(ap);
    e->type = EV_BAD;
    e->value = e->msg;
    e->len = strlen(e->msg);
}

/* Take the next parser event into e. Returns 1 for an event to pass on, 0 when
 * an alias started a replay (take the next event again), -1 on a file error. */
static int pull_parser(yaml_rd *r, ev *e, anchor **started)
{
    *started = NULL;
    if (r->have_yev) {
        yaml_event_delete(&r->yev);
        r->have_yev = false;
    }
    if (!yaml_parser_parse(&r->parser, &r->yev)) {
        parser_fail(r);
        return -1;
    }
    r->have_yev = true;
    r->fed_at_event = r->fed;
    const yaml_event_t *y = &r->yev;
    e->line = y->start_mark.line + 1;
    e->col = y->start_mark.column + 1;
    e->value = NULL;
    e->len = 0;
    e->plain = false;
    const yaml_char_t *anchor_name = NULL;
    switch (y->type) {
    case YAML_STREAM_START_EVENT: e->type = EV_STREAM_START; return 1;
    case YAML_STREAM_END_EVENT: e->type = EV_STREAM_END; return 1;
    case YAML_DOCUMENT_START_EVENT: e->type = EV_DOC_START; return 1;
    case YAML_DOCUMENT_END_EVENT: e->type = EV_DOC_END; return 1;
    case YAML_SEQUENCE_END_EVENT: e->type = EV_SEQ_END; return 1;
    case YAML_MAPPING_END_EVENT: e->type = EV_MAP_END; return 1;
    case YAML_SEQUENCE_START_EVENT:
        e->type = EV_SEQ_START;
        anchor_name = y->data.sequence_start.anchor;
        break;
    case YAML_MAPPING_START_EVENT:
        e->type = EV_MAP_START;
        anchor_name = y->data.mapping_start.anchor;
        break;
    case YAML_SCALAR_EVENT:
        e->type = EV_SCALAR;
        e->value = (const char *)y->data.scalar.value;
        e->len = y->data.scalar.length;
        e->plain = y->data.scalar.style == YAML_PLAIN_SCALAR_STYLE;
        anchor_name = y->data.scalar.anchor;
        if (e->len > (size_t)PS_FIELD_MAX_BYTES)
            set_bad(e, "value of %zu bytes is longer than the limit of %d bytes", e->len,
                    PS_FIELD_MAX_BYTES);
        break;
    case YAML_ALIAS_EVENT: {
        const char *name = (const char *)y->data.alias.anchor;
        anchor *a = anchor_find(r, name);
        if (!a) {
            set_bad(e, "undefined alias '*%.64s'", name);
            return 1;
        }
        switch (a->state) {
        case AN_DONE:
            r->replay = a;
            r->replay_pos = 0;
            r->replay_line = e->line;
            r->replay_col = e->col;
            return 0;
        case AN_RECORDING:
            set_bad(e, "alias '*%.64s' refers to the node that contains it (a cycle)", name);
            return 1;
        case AN_MAPPING:
            set_bad(e, "alias '*%.64s' refers to a mapping: only scalars and sequences can be "
                       "aliased", name);
            return 1;
        case AN_TOO_BIG:
            fatal(r, PS_ERR_SYNTAX, e->line, e->col, NULL,
                  "aliases expand beyond the budget (anchor '&%.64s' holds more than %d events)",
                  name, YR_ANCHOR_EVENTS);
            return -1;
        }
        return 1;
    }
    default: /* YAML_NO_EVENT: not produced by a working parser */
        fatal(r, PS_ERR_SYNTAX, e->line, e->col, NULL, "unexpected YAML event");
        return -1;
    }
    if (anchor_name) {
        anchor_state st = e->type == EV_MAP_START ? AN_MAPPING : AN_RECORDING;
        anchor *a = anchor_define(r, (const char *)anchor_name, st, e->line, e->col);
        if (!a)
            return -1;
        *started = a;
    }
    return 1;
}

/* The next event of the document, with aliases expanded, depth and budgets
 * enforced and open anchors recorded. false after a file-level error (the
 * status is set) or when the caller asked to stop. */
static bool next_event(yaml_rd *r, ev *e)
{
    if (r->status != PS_OK)
        return false;
    anchor *started = NULL;
    for (;;) {
        if (r->replay) {
            const rec_ev *re = &r->replay->ev[r->replay_pos++];
            if (r->replay_pos == r->replay->n)
                r->replay = NULL;
            if (++r->alias_events > PS_YAML_MAX_ALIAS_EVENTS) {
                fatal(r, PS_ERR_SYNTAX, r->replay_line, r->replay_col, NULL,
                      "aliases expand beyond the budget of %d events", PS_YAML_MAX_ALIAS_EVENTS);
                return false;
            }
            e->type = re->type;
            e->plain = re->plain;
            e->value = re->value;
            e->len = re->len;
            e->line = r->replay_line;
            e->col = r->replay_col;
            break;
        }
        int got = pull_parser(r, e, &started);
        if (got < 0)
            return false;
        if (got > 0)
            break;
    }

    if (e->type == EV_SEQ_START || e->type == EV_MAP_START) {
        if (++r->depth > PS_YAML_MAX_DEPTH) {
            fatal(r, PS_ERR_SYNTAX, e->line, e->col, NULL, "nesting deeper than %d levels",
                  PS_YAML_MAX_DEPTH);
            return false;
        }
    }
    if (started && started->state == AN_RECORDING && e->type == EV_SEQ_START) {
        r->rec_stack[r->n_rec] = (size_t)(started - r->anchors);
        r->rec_depth[r->n_rec] = r->depth;
        r->n_rec++;
    }
    for (size_t i = 0; i < r->n_rec; i++)
        anchor_append(r, &r->anchors[r->rec_stack[i]], e);
    if (started && e->type != EV_SEQ_START && e->type != EV_MAP_START) {
        /* an anchored scalar (or bad node) is complete at once */
        if (started->state == AN_RECORDING) {
            anchor_append(r, started, e);
            if (started->state == AN_RECORDING)
                started->state = AN_DONE;
        }
    }
    if (e->type == EV_SEQ_END || e->type == EV_MAP_END) {
        if (r->n_rec > 0 && r->rec_depth[r->n_rec - 1] == r->depth) {
            anchor *a = &r->anchors[r->rec_stack[--r->n_rec]];
            if (a->state == AN_RECORDING)
                a->state = AN_DONE;
        }
        r->depth--;
    }
    return r->status == PS_OK;
}

/* Consume the rest of the node that starts with e. */
static bool skip_node(yaml_rd *r, const ev *e)
{
    if (e->type != EV_SEQ_START && e->type != EV_MAP_START)
        return true;
    size_t level = 1;
    while (level > 0) {
        ev x;
        if (!next_event(r, &x))
            return false;
        if (x.type == EV_SEQ_START || x.type == EV_MAP_START)
            level++;
        else if (x.type == EV_SEQ_END || x.type == EV_MAP_END)
            level--;
    }
    return true;
}

/* ---- values -------------------------------------------------------------- */

/* A number from a scalar (plain or quoted). 0, or -1 with why. */
static int scalar_real(const ev *e, double *out, const char **why)
{
    if (memchr(e->value, '\0', e->len)) {
        *why = "contains a NUL character";
        return -1;
    }
    return ps_text_real(e->value, out, why);
}

/* Sequence items (after its start event) as reals into out[0..cap). label
 * names the list in messages ("denominator", "a: row 2"). */
static bool read_real_seq(yaml_rd *r, ps_field f, const char *label, double *out, size_t cap,
                          size_t *n_out)
{
    const char *name = ps_field_name(f);
    size_t n = 0, item = 0;
    for (;;) {
        ev e;
        if (!next_event(r, &e))
            return false;
        if (e.type == EV_SEQ_END)
            break;
        item++;
        if (r->entry_failed) {
            if (!skip_node(r, &e))
                return false;
            continue;
        }
        const char *why = "";
        if (e.type == EV_BAD) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: %s", label, item, e.value);
        } else if (e.type != EV_SCALAR) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: expected a number, found %s", label,
                       item, kind_name(e.type));
            if (!skip_node(r, &e))
                return false;
        } else if (n == cap) {
            entry_fail(r, e.line, e.col, name, "%s: more than %zu values (order limit %d)", label,
                       cap, PS_MAX_ORDER);
        } else if (scalar_real(&e, &out[n], &why) != 0) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: %s", label, item, why);
        } else {
            n++;
        }
    }
    *n_out = n;
    return true;
}

/* A list of reals: a sequence of numbers or one blank-separated scalar. */
static bool read_real_list(yaml_rd *r, ps_field f, const ev *v, double *out, size_t cap,
                           size_t *n_out)
{
    const char *name = ps_field_name(f);
    if (v->type == EV_SEQ_START)
        return read_real_seq(r, f, name, out, cap, n_out);
    if (v->type == EV_SCALAR) {
        const char *why = "";
        size_t bad = 0;
        int k = memchr(v->value, '\0', v->len) ? -1 : 0;
        if (k < 0)
            why = "contains a NUL character";
        else
            k = ps_text_real_list(v->value, out, cap, &bad, &why);
        if (k < 0)
            entry_fail(r, v->line, v->col, name, "%s: item %zu: %s", name, bad + 1, why);
        else
            *n_out = (size_t)k;
        return true;
    }
    if (v->type == EV_BAD) {
        entry_fail(r, v->line, v->col, name, "%s: %s", name, v->value);
        return true;
    }
    entry_fail(r, v->line, v->col, name, "%s: expected a list of numbers, found %s", name,
               kind_name(v->type));
    return skip_node(r, v);
}

/* Roots: a sequence of complex tokens or one blank-separated scalar. A pair
 * token ("-5+-12j") yields two values. */
static bool read_complex_list(yaml_rd *r, ps_field f, const ev *v, ps_cplx *out, size_t *n_out)
{
    const char *name = ps_field_name(f);
    const size_t cap = PS_MAX_ORDER;
    if (v->type == EV_SCALAR) {
        const char *why = "";
        size_t bad = 0;
        int k = memchr(v->value, '\0', v->len) ? -1 : 0;
        if (k < 0)
            why = "contains a NUL character";
        else
            k = ps_text_complex_list(v->value, out, cap, &bad, &why);
        if (k < 0)
            entry_fail(r, v->line, v->col, name, "%s: item %zu: %s", name, bad + 1, why);
        else
            *n_out = (size_t)k;
        return true;
    }
    if (v->type == EV_BAD) {
        entry_fail(r, v->line, v->col, name, "%s: %s", name, v->value);
        return true;
    }
    if (v->type != EV_SEQ_START) {
        entry_fail(r, v->line, v->col, name, "%s: expected a list of numbers, found %s", name,
                   kind_name(v->type));
        return skip_node(r, v);
    }
    size_t n = 0, item = 0;
    for (;;) {
        ev e;
        if (!next_event(r, &e))
            return false;
        if (e.type == EV_SEQ_END)
            break;
        item++;
        if (r->entry_failed) {
            if (!skip_node(r, &e))
                return false;
            continue;
        }
        ps_cplx z[2];
        int k = 0;
        const char *why = "";
        if (e.type == EV_BAD) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: %s", name, item, e.value);
        } else if (e.type != EV_SCALAR) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: expected a number, found %s", name,
                       item, kind_name(e.type));
            if (!skip_node(r, &e))
                return false;
        } else if (memchr(e.value, '\0', e.len)) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: contains a NUL character", name,
                       item);
        } else if ((k = ps_text_complex(e.value, z, &why)) < 0) {
            entry_fail(r, e.line, e.col, name, "%s: item %zu: %s", name, item, why);
        } else if (n + (size_t)k > cap) {
            entry_fail(r, e.line, e.col, name, "%s: more than %zu values (order limit %d)", name,
                       cap, PS_MAX_ORDER);
        } else {
            for (int i = 0; i < k; i++)
                out[n++] = z[i];
        }
    }
    *n_out = n;
    return true;
}

/* Add one row of A, checking the row count and that rows agree in length. */
static void matrix_add_row(yaml_rd *r, ps_plant *p, const double *row, size_t n, size_t rowno,
                           size_t line, size_t col)
{
    const char *name = ps_field_name(PS_F_A);
    if (p->a_rows == PS_MAX_ORDER) {
        entry_fail(r, line, col, name, "%s: more than %d rows (order limit)", name, PS_MAX_ORDER);
        return;
    }
    if (p->a_rows == 0) {
        if (n == 0) {
            entry_fail(r, line, col, name, "%s: row 1 is empty", name);
            return;
        }
        p->a_cols = n;
    } else if (n != p->a_cols) {
        entry_fail(r, line, col, name, "%s: row %zu has %zu entries, row 1 has %zu", name, rowno,
                   n, p->a_cols);
        return;
    }
    memcpy(p->a + p->a_rows * p->a_cols, row, n * sizeof *row);
    p->a_rows++;
}

/* Matrix text "0 1; 19.6 0" (a trailing ';' is allowed). */
static bool matrix_text(yaml_rd *r, ps_plant *p, const ev *v)
{
    const char *name = ps_field_name(PS_F_A);
    if (memchr(v->value, '\0', v->len)) {
        entry_fail(r, v->line, v->col, name, "%s: contains a NUL character", name);
        return true;
    }
    if (v->len + 1 > r->tmp_cap) {
        char *grown = realloc(r->tmp, v->len + 1);
        if (!grown) {
            fatal(r, PS_ERR_NOMEM, v->line, v->col, NULL, "out of memory");
            return false;
        }
        r->tmp = grown;
        r->tmp_cap = v->len + 1;
    }
    memcpy(r->tmp, v->value, v->len + 1);
    double row[PS_MAX_ORDER];
    for (char *seg = r->tmp; !r->entry_failed;) {
        char *semi = strchr(seg, ';');
        if (semi)
            *semi = '\0';
        size_t bad = 0;
        const char *why = "";
        int k = ps_text_real_list(seg, row, PS_MAX_ORDER, &bad, &why);
        size_t rowno = p->a_rows + 1;
        if (k < 0)
            entry_fail(r, v->line, v->col, name, "%s: row %zu, item %zu: %s", name, rowno, bad + 1,
                       why);
        else if (k > 0 || semi || p->a_rows == 0) /* blank text after a final ';' is no row */
            matrix_add_row(r, p, row, (size_t)k, rowno, v->line, v->col);
        if (!semi)
            break;
        seg = semi + 1;
    }
    return true;
}

/* Matrix as a sequence of rows; a row is a sequence of numbers or a scalar
 * "0 1". */
static bool matrix_rows(yaml_rd *r, ps_plant *p)
{
    const char *name = ps_field_name(PS_F_A);
    double row[PS_MAX_ORDER];
    for (;;) {
        ev e;
        if (!next_event(r, &e))
            return false;
        if (e.type == EV_SEQ_END)
            return true;
        if (r->entry_failed) {
            if (!skip_node(r, &e))
                return false;
            continue;
        }
        size_t rowno = p->a_rows + 1, n = 0;
        char label[32];
        snprintf(label, sizeof label, "%s: row %zu", name, rowno);
        if (e.type == EV_SEQ_START) {
            if (!read_real_seq(r, PS_F_A, label, row, PS_MAX_ORDER, &n))
                return false;
        } else if (e.type == EV_SCALAR) {
            size_t bad = 0;
            const char *why = "";
            int k = memchr(e.value, '\0', e.len) ? -1 : 0;
            if (k < 0)
                why = "contains a NUL character";
            else
                k = ps_text_real_list(e.value, row, PS_MAX_ORDER, &bad, &why);
            if (k < 0)
                entry_fail(r, e.line, e.col, name, "%s, item %zu: %s", label, bad + 1, why);
            else
                n = (size_t)k;
        } else if (e.type == EV_BAD) {
            entry_fail(r, e.line, e.col, name, "%s: %s", label, e.value);
        } else {
            entry_fail(r, e.line, e.col, name, "%s: expected a list of numbers, found %s", label,
                       kind_name(e.type));
            if (!skip_node(r, &e))
                return false;
        }
        if (!r->entry_failed)
            matrix_add_row(r, p, row, n, rowno, e.line, e.col);
    }
}

/* Text field (id, note) into dst of size cap. */
static void read_text(yaml_rd *r, ps_field f, const ev *v, char *dst, size_t cap)
{
    const char *name = ps_field_name(f);
    char why[YR_MSG];
    size_t at = 0;
    if (v->type == EV_BAD)
        entry_fail(r, v->line, v->col, name, "%s: %s", name, v->value);
    else if (memchr(v->value, '\0', v->len))
        entry_fail(r, v->line, v->col, name, "%s: contains a NUL character", name);
    else if (v->len >= cap)
        entry_fail(r, v->line, v->col, name, "%s: longer than %zu bytes", name, cap - 1);
    else if (ps_catalog_text_check(v->value, v->len, f == PS_F_ID, &at, why, sizeof why) != 0)
        entry_fail(r, v->line, v->col, name, "%s: %s", name, why);
    else
        memcpy(dst, v->value, v->len + 1);
}

/* The value of field f, whose first event is v. */
static bool read_value(yaml_rd *r, ps_plant *p, ps_field f, const ev *v)
{
    const char *name = ps_field_name(f);
    ps_plant_mark(p, f, v->line, v->col);
    switch (f) {
    case PS_F_NUM: return read_real_list(r, f, v, p->num, PS_MAX_ORDER + 1, &p->n_num);
    case PS_F_DEN: return read_real_list(r, f, v, p->den, PS_MAX_ORDER + 1, &p->n_den);
    case PS_F_B: return read_real_list(r, f, v, p->b, PS_MAX_ORDER, &p->n_b);
    case PS_F_C: return read_real_list(r, f, v, p->c, PS_MAX_ORDER, &p->n_c);
    case PS_F_ZEROS: return read_complex_list(r, f, v, p->zeros, &p->n_zeros);
    case PS_F_POLES: return read_complex_list(r, f, v, p->poles, &p->n_poles);
    case PS_F_A:
        p->a_rows = p->a_cols = 0;
        if (v->type == EV_SEQ_START)
            return matrix_rows(r, p);
        if (v->type == EV_SCALAR)
            return matrix_text(r, p, v);
        if (v->type == EV_BAD) {
            entry_fail(r, v->line, v->col, name, "%s: %s", name, v->value);
            return true;
        }
        entry_fail(r, v->line, v->col, name, "%s: expected a list of rows, found %s", name,
                   kind_name(v->type));
        return skip_node(r, v);
    default: break;
    }
    if (v->type != EV_SCALAR && v->type != EV_BAD) {
        entry_fail(r, v->line, v->col, name, "%s: expected a single value, found %s", name,
                   kind_name(v->type));
        return skip_node(r, v);
    }
    if (f == PS_F_ID) {
        read_text(r, f, v, p->id, sizeof p->id);
        return true;
    }
    if (f == PS_F_NOTE) {
        read_text(r, f, v, p->note, sizeof p->note);
        return true;
    }
    if (v->type == EV_BAD) {
        entry_fail(r, v->line, v->col, name, "%s: %s", name, v->value);
        return true;
    }
    const char *why = "contains a NUL character";
    if (memchr(v->value, '\0', v->len) || ps_text_scalar_field(p, f, v->value, &why) != 0)
        entry_fail(r, v->line, v->col, name, "%s: %s", name, why);
    return true;
}

/* src cut to fit n bytes (what snprintf "%s" does, without the format),
 * with every control character (C0, DEL, and C1 in UTF-8) made '?': a key is
 * echoed in messages, and no field name holds a '?', so the lookup is
 * unchanged. */
static void copy_key(char *dst, size_t n, const char *src)
{
    size_t len = strnlen(src, n - 1);
    memcpy(dst, src, len);
    dst[len] = '\0';
    for (size_t i = 0; i < len; i++) {
        unsigned char c = (unsigned char)dst[i];
        if (c < 0x20 || c == 0x7F)
            dst[i] = '?';
        else if (c == 0xC2 && i + 1 < len && (unsigned char)dst[i + 1] >= 0x80 && (unsigned char)dst[i + 1] <= 0x9F)
            dst[i] = dst[i + 1] = '?';
    }
}

/* Fields of one mapping (after its start event) into p: a plant entry, or
 * the defaults when is_defaults. Errors go to the entry diagnostic. */
static bool read_fields(yaml_rd *r, ps_plant *p, bool is_defaults)
{
    unsigned seen = 0;
    for (;;) {
        ev k;
        if (!next_event(r, &k))
            return false;
        if (k.type == EV_MAP_END)
            return true;
        char key[YR_KEY_MAX] = "";
        ps_field f = PS_F_COUNT;
        bool merge = false, key_ok = false;
        size_t kline = k.line, kcol = k.col;
        if (k.type == EV_SCALAR) {
            key_ok = true;
            merge = k.plain && strcmp(k.value, "<<") == 0;
            copy_key(key, sizeof key, k.value);
            if (k.len < sizeof key && !memchr(k.value, '\0', k.len))
                f = ps_field_lookup(key);
        } else if (k.type == EV_BAD) {
            entry_fail(r, kline, kcol, "", "%s", k.value);
        } else {
            entry_fail(r, kline, kcol, "", "a field name must be a plain key, found %s",
                       kind_name(k.type));
            if (!skip_node(r, &k))
                return false;
        }
        ev v;
        if (!next_event(r, &v))
            return false;
        bool take = false;
        if (!key_ok) {
            /* already reported */
        } else if (merge) {
            entry_fail(r, kline, kcol, "<<",
                       "merge keys ('<<') are not supported: write the fields out");
        } else if (f == PS_F_COUNT) {
            entry_fail(r, kline, kcol, key, "unknown field '%s'", key);
        } else if (is_defaults && f == PS_F_ID) {
            entry_fail(r, kline, kcol, key, "defaults cannot give an id");
        } else if (seen & (1u << f)) {
            entry_fail(r, kline, kcol, key, "duplicate field '%s' (first given at line %zu)", key,
                       p->field_line[f]);
        } else {
            seen |= 1u << f;
            /* After an error only the id is still read, so the report can name the plant. */
            take = !r->entry_failed || f == PS_F_ID;
        }
        if (take) {
            if (!read_value(r, p, f, &v))
                return false;
        } else if (!skip_node(r, &v)) {
            return false;
        }
    }
}

/* ---- entries ------------------------------------------------------------- */

static void entry_begin(yaml_rd *r, ps_plant *p, size_t line)
{
    ps_plant_reset(p);
    p->line = line;
    r->entry_failed = false;
    ps_diag_clear(&r->entry_diag);
}

/* One item of the plants sequence, first event e: exactly one call of fn. */
static void read_plant(yaml_rd *r, const ev *e)
{
    ps_plant *p = r->p;
    entry_begin(r, p, e->line);
    if (e->type == EV_MAP_START) {
        read_fields(r, p, false);
    } else if (e->type == EV_BAD) {
        entry_fail(r, e->line, e->col, "", "plant entry: %s", e->value);
    } else {
        entry_fail(r, e->line, e->col, "",
                   "a plant entry must be a mapping of fields (id: ..., ...), found %s",
                   kind_name(e->type));
        skip_node(r, e);
    }
    int rc;
    if (r->status != PS_OK || r->entry_failed) {
        /* Cut by a file-level error: entry_diag holds the entry's first error,
         * or the file error when there was none before. */
        rc = r->fn(r->ctx, p, &r->entry_diag);
    } else {
        ps_plant_apply_defaults(p, r->defaults);
        rc = r->fn(r->ctx, p, NULL);
    }
    if (rc != 0)
        r->stop = true;
}

/* A top-level sequence (plants or families): each item to read_item, in
 * file order, until the end, a file-level error or the callback's stop. */
static bool read_items(yaml_rd *r, const ev *v, const char *key, const char *what,
                       void (*read_item)(yaml_rd *, const ev *))
{
    if (v->type != EV_SEQ_START) {
        fatal(r, PS_ERR_SYNTAX, v->line, v->col, key, "%s must be a sequence of %s mappings, found %s", key, what,
              kind_name(v->type));
        return false;
    }
    for (;;) {
        ev e;
        if (!next_event(r, &e))
            return false;
        if (e.type == EV_SEQ_END)
            return true;
        read_item(r, &e);
        if (r->status != PS_OK || r->stop)
            return false;
    }
}

static bool read_plants(yaml_rd *r, const ev *v)
{
    return read_items(r, v, "plants", "plant", read_plant);
}

static bool read_defaults(yaml_rd *r, const ev *v)
{
    entry_begin(r, r->defaults, v->line);
    if (v->type == EV_SCALAR && v->plain && v->len == 0)
        return true; /* "defaults:" with nothing under it */
    if (v->type != EV_MAP_START) {
        fatal(r, PS_ERR_SYNTAX, v->line, v->col, "defaults",
              "defaults must be a mapping of fields, found %s", kind_name(v->type));
        return false;
    }
    if (!read_fields(r, r->defaults, true))
        return false;
    if (r->entry_failed) {
        const ps_diag *d = &r->entry_diag;
        fatal(r, PS_ERR_SYNTAX, d->line, d->col, d->field, "in defaults: %s", d->text);
        return false;
    }
    return true;
}

/* ---- families: kept whole as node trees ---------------------------------- */

static void ynode_free(ps_ynode *n)
{
    if (!n)
        return;
    for (size_t i = 0; i < n->n; i++) {
        ynode_free(n->items[i]);
        if (n->keys)
            ynode_free(n->keys[i]);
    }
    free(n->items);
    free(n->keys);
    free(n->text);
    free(n);
}

/* Build the node that starts with e. On a problem, *why gets the message
 * and *at the place; returns NULL (the rest of the node is consumed). */
static ps_ynode *ynode_build(yaml_rd *r, const ev *e, size_t *budget, char *why, size_t nwhy, size_t *wl,
                             size_t *wc)
{
    if (e->type == EV_BAD) {
        snprintf(why, nwhy, "%s", e->value);
        *wl = e->line, *wc = e->col;
        return NULL;
    }
    ps_ynode *n = calloc(1, sizeof *n);
    if (!n || (*budget)-- == 0) {
        snprintf(why, nwhy, n ? "family larger than %d nodes" : "out of memory", YR_FAMILY_NODES);
        *wl = e->line, *wc = e->col;
        free(n);
        skip_node(r, e);
        return NULL;
    }
    n->line = e->line;
    n->col = e->col;
    if (e->type == EV_SCALAR) {
        n->kind = PS_YN_SCALAR;
        n->plain = e->plain;
        if (memchr(e->value, '\0', e->len) || !(n->text = malloc(e->len + 1))) {
            snprintf(why, nwhy, "scalar contains a NUL character");
            *wl = e->line, *wc = e->col;
            free(n);
            return NULL;
        }
        memcpy(n->text, e->value, e->len + 1);
        return n;
    }
    n->kind = e->type == EV_SEQ_START ? PS_YN_SEQ : PS_YN_MAP;
    size_t cap = 0;
    bool failed = false;
    for (;;) {
        ev k, v;
        if (!next_event(r, &k)) {
            ynode_free(n);
            return NULL;
        }
        if (k.type == EV_SEQ_END || k.type == EV_MAP_END)
            break;
        ps_ynode *key = NULL, *val;
        if (n->kind == PS_YN_MAP) {
            if (k.type != EV_SCALAR && !failed) {
                snprintf(why, nwhy, "a key must be a plain name, found %s", kind_name(k.type));
                *wl = k.line, *wc = k.col;
                failed = true;
            }
            key = failed ? NULL : ynode_build(r, &k, budget, why, nwhy, wl, wc);
            if (failed)
                skip_node(r, &k);
            if (!next_event(r, &v)) {
                ynode_free(key);
                ynode_free(n);
                return NULL;
            }
        } else
            v = k;
        val = failed ? NULL : ynode_build(r, &v, budget, why, nwhy, wl, wc);
        if (failed)
            skip_node(r, &v);
        if (!val || (n->kind == PS_YN_MAP && !key)) {
            failed = true;
            ynode_free(key);
            ynode_free(val);
            continue;
        }
        if (n->n == cap) {
            cap = cap ? 2 * cap : 8;
            ps_ynode **ni = realloc(n->items, cap * sizeof *ni);
            if (ni)
                n->items = ni;
            ps_ynode **nk = n->kind == PS_YN_MAP ? realloc(n->keys, cap * sizeof *nk) : NULL;
            if (nk)
                n->keys = nk;
            if (!ni || (n->kind == PS_YN_MAP && !nk)) {
                snprintf(why, nwhy, "out of memory");
                failed = true;
                ynode_free(key);
                ynode_free(val);
                continue;
            }
        }
        n->items[n->n] = val;
        if (n->kind == PS_YN_MAP)
            n->keys[n->n] = key;
        n->n++;
    }
    if (failed) {
        ynode_free(n);
        return NULL;
    }
    return n;
}

/* One family item: a tree for ffn, or an entry error through fn. */
static void read_family(yaml_rd *r, const ev *e)
{
    char why[YR_MSG] = "";
    size_t wl = e->line, wc = e->col, budget = YR_FAMILY_NODES;
    ps_ynode *tree = ynode_build(r, e, &budget, why, sizeof why, &wl, &wc);
    if (r->status != PS_OK) {
        ynode_free(tree);
        return;
    }
    int rc = 0;
    if (tree && tree->kind == PS_YN_MAP && r->ffn) {
        rc = r->ffn(r->ctx, tree, r->defaults);
    } else {
        ps_plant *p = r->p;
        entry_begin(r, p, e->line);
        const ps_ynode *id = ps_ynode_get(tree, "id");
        if (id && id->kind == PS_YN_SCALAR)
            snprintf(p->id, sizeof p->id, "%s", id->text);
        if (!tree)
            entry_fail(r, wl, wc, "", "family: %s", why);
        else if (tree->kind != PS_YN_MAP)
            entry_fail(r, e->line, e->col, "", "a family must be a mapping (id: ..., parameters: ...)");
        else
            entry_fail(r, e->line, e->col, "", "families are not read by this reader");
        rc = r->fn(r->ctx, p, &r->entry_diag);
    }
    ynode_free(tree);
    if (rc != 0)
        r->stop = true;
}

static bool read_families(yaml_rd *r, const ev *v)
{
    return read_items(r, v, "families", "family", read_family);
}

/* The whole stream: one document holding the top-level mapping. */
static void read_stream(yaml_rd *r)
{
    ev e;
    if (!next_event(r, &e)) /* stream start */
        return;
    if (!next_event(r, &e))
        return;
    if (e.type == EV_STREAM_END) {
        fatal(r, PS_ERR_SYNTAX, 0, 0, NULL, "the catalog is empty: expected a 'plants' list");
        return;
    }
    if (!next_event(r, &e)) /* after document start */
        return;
    if (e.type != EV_MAP_START) {
        fatal(r, PS_ERR_SYNTAX, e.line, e.col, NULL,
              "the top level must be a mapping with catalog, defaults and plants, found %s",
              kind_name(e.type));
        return;
    }
    size_t map_line = e.line;
    bool have_catalog = false, have_defaults = false, have_plants = false, have_families = false;
    for (;;) {
        ev k, v;
        if (!next_event(r, &k))
            return;
        if (k.type == EV_MAP_END)
            break;
        if (k.type != EV_SCALAR) {
            fatal(r, PS_ERR_SYNTAX, k.line, k.col, NULL,
                  "top-level keys must be catalog, defaults, plants or families, found %s",
                  kind_name(k.type));
            return;
        }
        char key[YR_KEY_MAX];
        copy_key(key, sizeof key, k.value);
        bool *seen = strcmp(key, "catalog") == 0    ? &have_catalog
                     : strcmp(key, "defaults") == 0 ? &have_defaults
                     : strcmp(key, "plants") == 0   ? &have_plants
                     : strcmp(key, "families") == 0 ? &have_families
                                                    : NULL;
        if (!seen || k.len >= sizeof key) {
            fatal(r, PS_ERR_SYNTAX, k.line, k.col, key,
                  "unknown top-level key '%s' (expected catalog, defaults, plants, families)", key);
            return;
        }
        if (*seen) {
            fatal(r, PS_ERR_SYNTAX, k.line, k.col, key, "duplicate top-level key '%s'", key);
            return;
        }
        *seen = true;
        if (!next_event(r, &v))
            return;
        if (seen == &have_catalog) {
            if (v.type != EV_SCALAR) {
                fatal(r, PS_ERR_SYNTAX, v.line, v.col, key, "catalog must be a title text, found %s",
                      kind_name(v.type));
                return;
            }
            size_t at;
            char why[200];
            if (ps_catalog_text_check(v.value, v.len, true, &at, why, sizeof why) != 0) {
                char *paren = strstr(why, " (refused");
                if (paren)
                    *paren = '\0'; /* its reason speaks of ids */
                fatal(r, PS_ERR_SYNTAX, v.line, v.col, key,
                      "catalog title: %s (refused: the title is printed on terminals and in every report)", why);
                return;
            }
            if (r->title) {
                size_t n = v.len < r->title_cap ? v.len : r->title_cap - 1;
                while (n < v.len && n > 0 && ((unsigned char)v.value[n] & 0xC0) == 0x80)
                    n--; /* cut at a character boundary */
                memcpy(r->title, v.value, n);
                r->title[n] = '\0';
            }
        } else if (seen == &have_families) {
            if (!read_families(r, &v))
                return;
        } else if (seen == &have_defaults) {
            if (have_plants || have_families) {
                fatal(r, PS_ERR_SYNTAX, k.line, k.col, key,
                      "defaults must come before plants (the reader streams the entries)");
                return;
            }
            if (!read_defaults(r, &v))
                return;
        } else if (!read_plants(r, &v)) {
            return;
        }
    }
    if (!have_plants && !have_families) {
        fatal(r, PS_ERR_SYNTAX, map_line, 1, "plants", "the catalog has no 'plants' list");
        return;
    }
    if (!next_event(r, &e)) /* document end */
        return;
    if (!next_event(r, &e))
        return;
    if (e.type != EV_STREAM_END)
        fatal(r, PS_ERR_SYNTAX, e.line, e.col, NULL, "only one YAML document per catalog");
}

ps_status ps_yaml_read(const char *path, ps_plant *scratch, ps_entry_fn fn, void *ctx,
                       ps_diag *fdiag)
{
    return ps_yaml_read_families(path, scratch, fn, NULL, ctx, fdiag);
}

ps_status ps_yaml_read_families(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn,
                                void *ctx, ps_diag *fdiag)
{
    return ps_yaml_read_titled(path, scratch, fn, ffn, ctx, fdiag, NULL, 0);
}

ps_status ps_yaml_read_titled(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn, void *ctx,
                              ps_diag *fdiag, char *title, size_t title_cap)
{
    if (title && title_cap)
        title[0] = '\0';
    FILE *f;
    ps_status open_st = ps_catalog_open(path, &f, fdiag);
    if (open_st != PS_OK)
        return open_st;

    yaml_rd *r = calloc(1, sizeof *r);
    ps_plant *defaults = malloc(sizeof *defaults);
    unsigned char *buf = malloc(YR_READ_CHUNK);
    if (!r || !defaults || !buf || !yaml_parser_initialize(&r->parser)) {
        free(r);
        free(defaults);
        free(buf);
        fclose(f);
        return ps_diag_set(fdiag, PS_ERR_NOMEM, 0, 0, NULL, "out of memory");
    }
    r->path = path;
    r->f = f;
    r->p = scratch;
    r->defaults = defaults;
    r->fn = fn;
    r->ffn = ffn;
    r->ctx = ctx;
    r->buf = buf;
    r->fdiag = fdiag;
    r->title = title_cap ? title : NULL;
    r->title_cap = title_cap;
    ps_plant_reset(defaults);
    snprintf(r->entry_diag.file, sizeof r->entry_diag.file, "%s", path);
    yaml_parser_set_input(&r->parser, read_input, r);

    read_stream(r);

    ps_status status = r->status;
    if (r->have_yev)
        yaml_event_delete(&r->yev);
    yaml_parser_delete(&r->parser);
    for (size_t i = 0; i < r->n_anchors; i++) {
        anchor_clear(r, &r->anchors[i]);
        free(r->anchors[i].name);
    }
    free(r->tmp);
    free(r->buf);
    free(r->defaults);
    free(r);
    fclose(f);
    return status;
}

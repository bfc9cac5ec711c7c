/* compare.c - reading the plant rows of two screening runs (our own JSON) into
 * one table keyed by (id, occurrence), and classifying each plant's change. */
#include "report/compare.h"

#include <dirent.h>
#include <errno.h>
#include <jansson.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "report/reports.h"

/* One plant as one run has it, packed: 24 bytes. */
typedef struct side_rec {
    double severity;
    uint32_t rank, line, file;
    uint8_t verdict;
    uint8_t flags;
} side_rec;

enum { REC_PRESENT = 1, REC_HAS_SEV = 2, REC_INF = 4 };

/* One (id, occurrence): 72 bytes, plus a 4-byte hash slot at a load of at
 * most 1/2 (8 to 16 bytes), plus the id and its NUL in the arena. */
typedef struct entry {
    size_t id_off;             /* into ids; SIZE_MAX for a row without id */
    uint32_t occ;              /* 0-based occurrence of the id */
    uint32_t seen[2];          /* occ 0 only: occurrences of the id in each run */
    side_rec s[2];
} entry;

struct ps_cmp {
    entry *e;
    size_t n, cap;
    uint32_t *slot;            /* entry index + 1; 0 empty */
    size_t n_slots;
    char *ids;
    size_t ids_len, ids_cap;
    char **files;              /* catalog names, interned */
    size_t n_files, cap_files;
    size_t rows[2];
    bool read[2];
};

ps_cmp *ps_cmp_new(void)
{
    ps_cmp *c = calloc(1, sizeof *c);
    if (!c)
        return NULL;
    c->n_slots = 1024;
    c->slot = calloc(c->n_slots, sizeof *c->slot);
    if (!c->slot) {
        free(c);
        return NULL;
    }
    return c;
}

void ps_cmp_free(ps_cmp *c)
{
    if (!c)
        return;
    for (size_t i = 0; i < c->n_files; i++)
        free(c->files[i]);
    free(c->files);
    free(c->e);
    free(c->slot);
    free(c->ids);
    free(c);
}

static uint64_t key_hash(const char *id, uint32_t occ)
{
    uint64_t h = 1469598103934665603ull; /* FNV-1a, then the occurrence mixed in */
    for (const unsigned char *p = (const unsigned char *)id; *p; p++)
        h = (h ^ *p) * 1099511628211ull;
    h ^= (uint64_t)occ * 0x9E3779B97F4A7C15ull;
    return h ^ (h >> 29);
}

/* Index of (id, occ), or SIZE_MAX. */
static size_t find(const ps_cmp *c, const char *id, uint32_t occ)
{
    size_t mask = c->n_slots - 1;
    for (size_t i = (size_t)key_hash(id, occ) & mask;; i = (i + 1) & mask) {
        uint32_t s = c->slot[i];
        if (!s)
            return SIZE_MAX;
        const entry *e = &c->e[s - 1];
        if (e->occ == occ && strcmp(c->ids + e->id_off, id) == 0)
            return s - 1;
    }
}

static void place(ps_cmp *c, size_t idx)
{
    size_t mask = c->n_slots - 1;
    const entry *e = &c->e[idx];
    size_t i = (size_t)key_hash(c->ids + e->id_off, e->occ) & mask;
    while (c->slot[i])
        i = (i + 1) & mask;
    c->slot[i] = (uint32_t)(idx + 1);
}

/* A new entry for (id, occ) (id NULL: a row without id, not hashed); its
 * index in *idx. */
static ps_status add_entry(ps_cmp *c, const char *id, uint32_t occ, size_t *idx)
{
    if (c->n >= UINT32_MAX - 1)
        return PS_ERR_NOMEM;
    if (c->n == c->cap) {
        size_t cap = c->cap ? c->cap * 2 : 1024;
        entry *e = realloc(c->e, cap * sizeof *e);
        if (!e)
            return PS_ERR_NOMEM;
        c->e = e;
        c->cap = cap;
    }
    entry *e = &c->e[c->n];
    memset(e, 0, sizeof *e);
    e->id_off = SIZE_MAX;
    e->occ = occ;
    if (id) {
        size_t len = strlen(id) + 1;
        if (c->ids_len + len > c->ids_cap) {
            size_t cap = c->ids_cap ? c->ids_cap : 65536;
            while (c->ids_len + len > cap)
                cap *= 2;
            char *ids = realloc(c->ids, cap);
            if (!ids)
                return PS_ERR_NOMEM;
            c->ids = ids;
            c->ids_cap = cap;
        }
        memcpy(c->ids + c->ids_len, id, len);
        e->id_off = c->ids_len;
        c->ids_len += len;
        if (2 * (c->n + 1) > c->n_slots) { /* keep the load at most 1/2 */
            uint32_t *slot = calloc(c->n_slots * 2, sizeof *slot);
            if (!slot)
                return PS_ERR_NOMEM;
            free(c->slot);
            c->slot = slot;
            c->n_slots *= 2;
            for (size_t i = 0; i < c->n; i++)
                if (c->e[i].id_off != SIZE_MAX)
                    place(c, i);
        }
    }
    *idx = c->n++;
    if (id)
        place(c, *idx);
    return PS_OK;
}

static ps_status intern_file(ps_cmp *c, const char *file, uint32_t *out)
{
    for (size_t i = c->n_files; i-- > 0;)
        if (strcmp(c->files[i], file) == 0) {
            *out = (uint32_t)i;
            return PS_OK;
        }
    if (c->n_files == c->cap_files) {
        size_t cap = c->cap_files ? c->cap_files * 2 : 8;
        char **f = realloc(c->files, cap * sizeof *f);
        if (!f)
            return PS_ERR_NOMEM;
        c->files = f;
        c->cap_files = cap;
    }
    size_t len = strlen(file) + 1;
    char *copy = malloc(len);
    if (!copy)
        return PS_ERR_NOMEM;
    memcpy(copy, file, len);
    c->files[c->n_files] = copy;
    *out = (uint32_t)c->n_files++;
    return PS_OK;
}

/* ---- one plant row ---- */

/* Where a row is, for diagnostics: a line of a JSON Lines file, or an
 * element of a document's plants array (line 0). */
typedef struct row_at {
    size_t line;      /* JSON Lines: the line; 0 in a document */
    size_t index;     /* 0-based position among the rows */
} row_at;

static ps_status row_error(ps_diag *d, const row_at *at, const char *field, const char *what)
{
    char where[64] = "";
    if (!at->line)
        snprintf(where, sizeof where, "plants[%zu]: ", at->index);
    return ps_diag_set(d, PS_ERR_INPUT, at->line, 0, field, "%sfield '%s': %s", where, field, what);
}

static bool verdict_of_name(const char *s, ps_verdict *v)
{
    for (int i = 0; i < PS_VERDICT_COUNT; i++)
        if (strcmp(s, ps_verdict_name((ps_verdict)i)) == 0) {
            *v = (ps_verdict)i;
            return true;
        }
    return false;
}

static bool judged(ps_verdict v) { return v <= PS_VERDICT_UNSTABILIZABLE; }

/* Read one plant object o (v3: the catalog and line are in "source") into
 * run side. */
static ps_status take_row(ps_cmp *c, ps_cmp_side side, json_t *o, bool v3, const row_at *at, ps_diag *d)
{
    if (!json_is_object(o))
        return row_error(d, at, "plant", "expected a JSON object (one plant)");
    json_t *rank = json_object_get(o, "rank"), *id = json_object_get(o, "id"),
           *verdict = json_object_get(o, "verdict"), *sev = json_object_get(o, "severity"),
           *inf = json_object_get(o, "severity_infinite");
    json_t *loc = v3 ? json_object_get(o, "source") : o;
    if (!rank)
        return row_error(d, at, "rank", "missing; expected the plant's rank (1, 2, ...)");
    if (!json_is_integer(rank) || json_integer_value(rank) != (json_int_t)at->index + 1) {
        char want[96];
        snprintf(want, sizeof want, "expected %zu (rows in rank order, one after another)", at->index + 1);
        return row_error(d, at, "rank", want);
    }
    if (!id || !(json_is_string(id) || json_is_null(id)))
        return row_error(d, at, "id", id ? "expected a string (or null for a row without id)" : "missing");
    if (!verdict || !json_is_string(verdict))
        return row_error(d, at, "verdict",
                         verdict ? "expected a string" : "missing; expected one of clear, marginal, redesign, "
                                                         "not-stabilizable, needs-bandwidth, input-error");
    ps_verdict v;
    if (!verdict_of_name(json_string_value(verdict), &v))
        return row_error(d, at, "verdict",
                         "expected one of clear, marginal, redesign, not-stabilizable, needs-bandwidth, input-error");
    if (!sev || !(json_is_number(sev) || json_is_null(sev)))
        return row_error(d, at, "severity", sev ? "expected a number or null" : "missing");
    if (inf && !json_is_boolean(inf)) /* absent: false (a plants file leaves out a false member) */
        return row_error(d, at, "severity_infinite", "expected true or false, or no member (false)");
    if (json_is_true(inf) && !json_is_null(sev))
        return row_error(d, at, "severity", "expected null when severity_infinite is true");
    if (json_is_null(sev) && (v == PS_VERDICT_CLEAR || v == PS_VERDICT_MARGINAL || v == PS_VERDICT_REDESIGN))
        return row_error(d, at, "severity", "expected a number for a clear, marginal or redesign plant");
    if (json_is_number(sev) && json_number_value(sev) < 0)
        return row_error(d, at, "severity", "expected a number >= 0");
    if (!loc || !json_is_object(loc))
        return row_error(d, at, "source", loc ? "expected an object with file and line" : "missing");
    json_t *file = json_object_get(loc, "file"), *line = json_object_get(loc, "line");
    if (!file || !(json_is_string(file) || json_is_null(file)))
        return row_error(d, at, "file", file ? "expected a string (the catalog)" : "missing");
    if (!line || !json_is_integer(line) || json_integer_value(line) < 0 || json_integer_value(line) >= UINT32_MAX)
        return row_error(d, at, "line", line ? "expected a whole number >= 0" : "missing");
    if (at->index + 1 >= UINT32_MAX)
        return ps_diag_set(d, PS_ERR_NOMEM, at->line, 0, "rank", "more plants than this comparison can hold");

    side_rec r = {0};
    r.flags = REC_PRESENT;
    r.verdict = (uint8_t)v;
    r.rank = (uint32_t)(at->index + 1);
    r.line = (uint32_t)json_integer_value(line);
    r.severity = NAN;
    if (json_is_number(sev)) {
        r.severity = json_number_value(sev);
        r.flags |= REC_HAS_SEV;
    }
    if (json_is_true(inf))
        r.flags |= REC_INF;
    if (intern_file(c, json_is_string(file) ? json_string_value(file) : "", &r.file) != PS_OK)
        return ps_diag_set(d, PS_ERR_NOMEM, at->line, 0, "", "out of memory");

    const char *ids = json_is_string(id) ? json_string_value(id) : "";
    size_t idx;
    if (!ids[0] || strlen(ids) != json_string_length(id)) { /* no id (or one with a NUL: not an id we write) */
        if (ids[0])
            return row_error(d, at, "id", "expected a string without NUL characters");
        if (add_entry(c, NULL, 0, &idx) != PS_OK)
            return ps_diag_set(d, PS_ERR_NOMEM, at->line, 0, "", "out of memory");
        c->e[idx].s[side] = r;
        c->rows[side]++;
        return PS_OK;
    }
    size_t first = find(c, ids, 0);
    if (first == SIZE_MAX && add_entry(c, ids, 0, &first) != PS_OK)
        return ps_diag_set(d, PS_ERR_NOMEM, at->line, 0, "", "out of memory");
    uint32_t occ = c->e[first].seen[side]++;
    idx = first;
    if (occ > 0) {
        idx = find(c, ids, occ);
        if (idx == SIZE_MAX && add_entry(c, ids, occ, &idx) != PS_OK)
            return ps_diag_set(d, PS_ERR_NOMEM, at->line, 0, "", "out of memory");
    }
    c->e[idx].s[side] = r;
    c->rows[side]++;
    return PS_OK;
}

/* The report's own per-verdict counts (counts.per_verdict, when the
 * document has them) must match the rows read: a plants file cut at a line
 * boundary would otherwise pass for a run with fewer plants. */
static ps_status check_counts(const ps_cmp *c, ps_cmp_side side, json_t *doc, ps_diag *d)
{
    json_t *per = json_object_get(json_object_get(doc, "counts"), "per_verdict");
    if (!json_is_object(per))
        return PS_OK;
    size_t have[PS_VERDICT_COUNT] = {0};
    for (size_t i = 0; i < c->n; i++)
        if (c->e[i].s[side].flags & REC_PRESENT)
            have[c->e[i].s[side].verdict]++;
    for (int v = 0; v < PS_VERDICT_COUNT; v++) {
        json_t *n = json_object_get(per, ps_verdict_name((ps_verdict)v));
        if (n && !json_is_integer(n))
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "per_verdict", "counts.per_verdict.%s: expected a whole number",
                               ps_verdict_name((ps_verdict)v));
        if (n && json_integer_value(n) != (json_int_t)have[v])
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "per_verdict",
                               "counts.per_verdict.%s is %lld but %zu plants with that verdict were read: the "
                               "plant rows are incomplete or do not belong to this report",
                               ps_verdict_name((ps_verdict)v), (long long)json_integer_value(n), have[v]);
    }
    return PS_OK;
}

static ps_status read_jsonl(ps_cmp *c, ps_cmp_side side, const char *path, ps_diag *d)
{
    snprintf(d->file, sizeof d->file, "%s", path);
    FILE *f = fopen(path, "r");
    if (!f)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot open: %s", strerror(errno));
    char *buf = NULL;
    size_t cap = 0;
    ssize_t len;
    size_t line = 0;
    ps_status st = PS_OK;
    while (st == PS_OK && (len = getline(&buf, &cap, f)) >= 0) {
        line++;
        size_t n = (size_t)len;
        if (n && buf[n - 1] == '\n')
            n--;
        if (n && buf[n - 1] == '\r')
            n--;
        json_error_t err;
        json_t *o = json_loadb(buf, n, JSON_REJECT_DUPLICATES, &err);
        if (!o) {
            st = ps_diag_set(d, PS_ERR_SYNTAX, line, err.column > 0 ? (size_t)err.column : 0, "",
                             "%s; expected one JSON object per line (JSON Lines), one plant each", n ? err.text
                                                                                     : "empty line");
            break;
        }
        row_at at = {line, c->rows[side]};
        st = take_row(c, side, o, false, &at, d);
        json_decref(o);
    }
    if (st == PS_OK && ferror(f))
        st = ps_diag_set(d, PS_ERR_IO, line, 0, "", "read error: %s", strerror(errno));
    free(buf);
    fclose(f);
    return st;
}

static bool ends_with(const char *s, const char *tail)
{
    size_t n = strlen(s), m = strlen(tail);
    return n >= m && strcmp(s + n - m, tail) == 0;
}

static ps_status read_document(ps_cmp *c, ps_cmp_side side, const char *path, ps_cmp_source *src, ps_diag *d)
{
    snprintf(d->file, sizeof d->file, "%s", path);
    json_error_t err;
    json_t *doc = json_load_file(path, JSON_REJECT_DUPLICATES, &err);
    if (!doc) {
        FILE *f = fopen(path, "r");
        if (!f)
            return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot open: %s", strerror(errno));
        fclose(f);
        return ps_diag_set(d, PS_ERR_SYNTAX, err.line > 0 ? (size_t)err.line : 0,
                           err.column > 0 ? (size_t)err.column : 0, "",
                           "not JSON (%s); expected a screening report (.screen.json) or its plants (.jsonl)",
                           err.text);
    }
    ps_status st;
    json_t *ver = json_object_get(doc, "schema_version"), *kind = json_object_get(doc, "kind");
    if (!json_is_object(doc) || !json_is_string(kind) || strcmp(json_string_value(kind), "screening") != 0)
        st = ps_diag_set(d, PS_ERR_SYNTAX, 0, 0, "kind",
                         "expected a screening report: a JSON object with \"kind\": \"screening\"");
    else if (!json_is_integer(ver) || json_integer_value(ver) < 1 || json_integer_value(ver) > PS_SCREEN_SCHEMA_VERSION)
        st = ps_diag_set(d, PS_ERR_SYNTAX, 0, 0, "schema_version", "expected schema_version 1 to %d", PS_SCREEN_SCHEMA_VERSION);
    else if (json_integer_value(ver) >= 4) { /* a summary and its JSON Lines file */
        json_t *pf = json_object_get(doc, "plants_file");
        const char *name = json_string_value(pf);
        if (!name || !name[0] || strchr(name, '/'))
            st = ps_diag_set(d, PS_ERR_INPUT, 0, 0, "plants_file",
                             "expected the name of the plants file beside the summary (no '/')");
        else {
            char jl[PS_DIAG_FILE];
            const char *slash = strrchr(path, '/');
            int dir_len = slash ? (int)(slash - path + 1) : 0;
            if (snprintf(jl, sizeof jl, "%.*s%s", dir_len, path, name) >= (int)sizeof jl)
                st = ps_diag_set(d, PS_ERR_INPUT, 0, 0, "plants_file", "path too long");
            else {
                st = read_jsonl(c, side, jl, d);
                if (st == PS_OK) {
                    snprintf(src->path, sizeof src->path, "%s", jl);
                    snprintf(src->format, sizeof src->format, "jsonl-v%d-summary", (int)json_integer_value(ver));
                    st = check_counts(c, side, doc, d);
                    if (st != PS_OK) /* the summary holds the counts: name it */
                        snprintf(d->file, sizeof d->file, "%s", path);
                }
            }
        }
    } else {
        json_t *plants = json_object_get(doc, "plants");
        st = json_is_array(plants) ? PS_OK
                                   : ps_diag_set(d, PS_ERR_INPUT, 0, 0, "plants",
                                                 "expected an array of plants (schema_version 1 to 3)");
        for (size_t i = 0; st == PS_OK && i < json_array_size(plants); i++) {
            row_at at = {0, i};
            st = take_row(c, side, json_array_get(plants, i), true, &at, d);
        }
        if (st == PS_OK) {
            snprintf(src->path, sizeof src->path, "%s", path);
            snprintf(src->format, sizeof src->format, "json-v%d", (int)json_integer_value(ver));
            st = check_counts(c, side, doc, d);
        }
    }
    json_decref(doc);
    return st;
}

/* The one file in dir whose name ends in tail: PS_OK with it in out; or
 * PS_ERR_INPUT (none; out empty) / PS_ERR_SYNTAX (several) / PS_ERR_IO. */
static ps_status find_in_dir(const char *dir, const char *tail, char *out, size_t n, size_t *found)
{
    DIR *dh = opendir(dir);
    if (!dh)
        return PS_ERR_IO;
    *found = 0;
    out[0] = '\0';
    struct dirent *de;
    while ((de = readdir(dh)) != NULL)
        if (ends_with(de->d_name, tail) && strlen(de->d_name) > strlen(tail)) {
            if (!*found)
                snprintf(out, n, "%s/%s", dir, de->d_name);
            ++*found;
        }
    closedir(dh);
    return PS_OK;
}

static ps_status read_file(ps_cmp *c, ps_cmp_side side, const char *path, ps_cmp_source *src, ps_diag *d)
{
    if (ends_with(path, ".jsonl")) {
        ps_status st = read_jsonl(c, side, path, d);
        if (st == PS_OK) {
            snprintf(src->path, sizeof src->path, "%s", path);
            snprintf(src->format, sizeof src->format, "jsonl");
        }
        return st;
    }
    return read_document(c, side, path, src, d);
}

ps_status ps_cmp_read(ps_cmp *c, ps_cmp_side side, const char *path, ps_cmp_source *src, ps_diag *d)
{
    ps_cmp_source scratch;
    if (!src)
        src = &scratch;
    memset(src, 0, sizeof *src);
    snprintf(d->file, sizeof d->file, "%s", path);
    if (c->read[side])
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "this run was read already");
    c->read[side] = true;
    DIR *dh = opendir(path);
    if (!dh)
        return read_file(c, side, path, src, d);
    closedir(dh);
    static const char *const tails[] = {".screen.plants.jsonl", ".screen.json"};
    for (size_t t = 0; t < 2; t++) {
        char file[PS_DIAG_FILE];
        size_t found = 0;
        if (find_in_dir(path, tails[t], file, sizeof file, &found) != PS_OK)
            return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot list the directory: %s", strerror(errno));
        if (found > 1)
            return ps_diag_set(d, PS_ERR_SYNTAX, 0, 0, "",
                               "the directory holds %zu files ending in %s; name the one to compare", found, tails[t]);
        if (found == 1)
            return read_file(c, side, file, src, d);
    }
    /* The directory given to screen -o: its one report set. */
    char sub[PS_DIAG_FILE];
    size_t found = 0;
    if (find_in_dir(path, ".screen", sub, sizeof sub, &found) == PS_OK && found == 1) {
        DIR *sh = opendir(sub);
        if (sh) {
            closedir(sh);
            c->read[side] = false;
            return ps_cmp_read(c, side, sub, src, d);
        }
    }
    if (found > 1)
        return ps_diag_set(d, PS_ERR_SYNTAX, 0, 0, "",
                           "the directory holds %zu report sets (*.screen); name the one to compare", found);
    return ps_diag_set(d, PS_ERR_IO, 0, 0, "",
                       "no *.screen.plants.jsonl or *.screen.json in this directory (nor one *.screen report set); "
                       "expected a report set written by plantsieve screen");
}

/* ---- the diff ---- */

size_t ps_cmp_size(const ps_cmp *c) { return c->n; }

static void plant_of(const ps_cmp *c, const side_rec *r, ps_cmp_plant *p)
{
    memset(p, 0, sizeof *p);
    p->present = r->flags & REC_PRESENT;
    p->severity = NAN;
    p->file = "";
    if (!p->present)
        return;
    p->verdict = (ps_verdict)r->verdict;
    p->has_severity = r->flags & REC_HAS_SEV;
    p->infinite = r->flags & REC_INF;
    p->severity = r->severity;
    p->rank = r->rank;
    p->line = r->line;
    p->file = c->files[r->file];
}

/* Verdict order for "worse": the four judged verdicts in this order. */
ps_change_kind ps_cmp_get(const ps_cmp *c, size_t i, double tol, ps_change *out)
{
    const entry *e = &c->e[i];
    memset(out, 0, sizeof *out);
    out->id = e->id_off == SIZE_MAX ? "" : c->ids + e->id_off;
    out->occurrence = (size_t)e->occ + 1;
    if (e->id_off != SIZE_MAX) {
        size_t first = e->occ ? find(c, out->id, 0) : i;
        out->occurrences[0] = c->e[first].seen[0];
        out->occurrences[1] = c->e[first].seen[1];
    }
    plant_of(c, &e->s[PS_CMP_OLD], &out->old);
    plant_of(c, &e->s[PS_CMP_NEW], &out->cur);
    const ps_cmp_plant *a = &out->old, *b = &out->cur;
    if (e->id_off == SIZE_MAX)
        out->kind = PS_CHANGE_NO_ID;
    else if (!a->present)
        out->kind = PS_CHANGE_ADDED;
    else if (!b->present)
        out->kind = PS_CHANGE_REMOVED;
    else if (a->verdict != b->verdict) {
        out->kind = PS_CHANGE_VERDICT;
        if (judged(a->verdict) && judged(b->verdict))
            out->dir = b->verdict > a->verdict ? PS_DIR_WORSE : PS_DIR_BETTER;
        else if (judged(a->verdict))
            out->dir = PS_DIR_WORSE; /* no longer judged */
        else
            out->judged_again = judged(b->verdict);
    } else if (a->has_severity && b->has_severity && fabs(b->severity - a->severity) > tol) {
        out->kind = PS_CHANGE_SEVERITY;
        if (a->verdict == PS_VERDICT_MARGINAL || a->verdict == PS_VERDICT_REDESIGN)
            out->dir = b->severity > a->severity ? PS_DIR_WORSE : PS_DIR_BETTER;
    }
    return out->kind;
}

size_t ps_cmp_occurrences(const ps_cmp *c, ps_cmp_side side, size_t i)
{
    const entry *e = &c->e[i];
    return e->id_off != SIZE_MAX && e->occ == 0 ? e->seen[side] : 0;
}

void ps_cmp_count(const ps_cmp *c, double tol, ps_cmp_counts *n)
{
    memset(n, 0, sizeof *n);
    n->plants[0] = c->rows[0];
    n->plants[1] = c->rows[1];
    for (size_t i = 0; i < c->n; i++) {
        ps_change ch;
        switch (ps_cmp_get(c, i, tol, &ch)) {
        case PS_CHANGE_NONE: n->unchanged++; break;
        case PS_CHANGE_VERDICT: n->verdict++; break;
        case PS_CHANGE_SEVERITY: n->severity++; break;
        case PS_CHANGE_ADDED: n->added++; break;
        case PS_CHANGE_REMOVED: n->removed++; break;
        case PS_CHANGE_NO_ID: n->no_id[ch.old.present ? 0 : 1]++; break;
        }
        n->worse += ch.dir == PS_DIR_WORSE;
        n->better += ch.dir == PS_DIR_BETTER;
        for (int s = 0; s < 2; s++)
            n->duplicate_ids[s] += ps_cmp_occurrences(c, (ps_cmp_side)s, i) > 1;
    }
}

const char *ps_cmp_gate_name(ps_cmp_gate g)
{
    static const char *const names[] = {"worse", "changed", "never"};
    return (unsigned)g < 3 ? names[g] : "?";
}

bool ps_cmp_gate_tripped(ps_cmp_gate g, const ps_cmp_counts *n)
{
    switch (g) {
    case PS_GATE_WORSE: return n->worse > 0;
    case PS_GATE_CHANGED: return n->verdict + n->severity + n->added + n->removed > 0;
    case PS_GATE_NEVER: break;
    }
    return false;
}

/* partial.c - a shard's partial result, written and merged (partial.h).
 * Layout: a text line naming the format, a layout record, the shard and the
 * options, the counts, the catalogs, the rows (compact records), the
 * families with their yield tallies, and a closing line (a file cut short
 * is refused). Numbers are written as the machine holds them. */
#include "report/partial.h"

#include <errno.h>
#include <inttypes.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "core/sha256.h"
#include "report/reports.h"

static const char head_line[] = "plantsieve partial result, format 1\n";
static const char end_line[] = "end of plantsieve partial result\n";

/* The pointers a summary holds, written as their place in these lists. */
static const char *const worst_words[] = {"Ms", "Mt", "effort", "none"};
static const char *const limiting_words[] = {"interpolation", "band",        "nyquist",      "poisson",
                                             "complementary", "none",        "hidden-mode",  "cancellation"};
#define N_OF(a) (sizeof(a) / sizeof((a)[0]))

/* 0 for NULL, 1 + place in words, 255 when not in the list. */
static unsigned char word_code(const char *w, const char *const *words, size_t n)
{
    if (!w)
        return 0;
    for (size_t i = 0; i < n; i++)
        if (strcmp(w, words[i]) == 0)
            return (unsigned char)(i + 1);
    return 255;
}

static bool word_of(unsigned char code, const char *const *words, size_t n, const char **out)
{
    if (code == 0) {
        *out = NULL;
        return true;
    }
    if (code > n)
        return false;
    *out = words[code - 1];
    return true;
}

/* ---- writing ---------------------------------------------------------- */

/* Every byte written also goes into the digest that closes the file. */
typedef struct out {
    FILE *f;
    ps_sha256 h;
} writer;

static void put(writer *w, const void *p, size_t n)
{
    if (n) {
        fwrite(p, 1, n, w->f);
        ps_sha256_add(&w->h, p, n);
    }
}

static void put_u64(writer *f, uint64_t v)
{
    put(f, &v, sizeof v);
}

static void put_str(writer *f, const char *s)
{
    if (!s) {
        put_u64(f, UINT64_MAX);
        return;
    }
    size_t n = strlen(s);
    put_u64(f, n);
    put(f, s, n);
}

static void put_layout(writer *f)
{
    put_u64(f, sizeof(ps_summary));
    put_u64(f, sizeof(ps_family_result));
    put_u64(f, sizeof(ps_yield_tally));
    put_u64(f, sizeof(ps_yield_block));
    put_u64(f, PS_SCREEN_SCHEMA_VERSION);
    put_u64(f, PS_YIELD_BLOCK);
}

static ps_status write_body(writer *f, const ps_run *r, const ps_shard_info *sh, unsigned char *rec, ps_diag *d)
{
    put(f, head_line, sizeof head_line - 1);
    put_layout(f);
    put_u64(f, sh->k);
    put_u64(f, sh->n);
    put_u64(f, sh->seen);
    put_u64(f, sh->families_seen);
    put(f, &r->opt.marginal_at, sizeof r->opt.marginal_at);
    put_u64(f, (uint64_t)r->opt.detail);
    put_u64(f, (uint64_t)r->opt.certify);
    put_u64(f, (uint64_t)r->opt.certify_budget);
    put_u64(f, r->counts.entries);
    put_u64(f, r->counts.models);
    put_u64(f, r->counts.errors);
    put_u64(f, r->counts.files_failed);
    put_u64(f, r->n_catalogs);
    for (size_t i = 0; i < r->n_catalogs; i++) {
        const ps_catalog_entry *c = &r->catalogs[i];
        put_str(f, c->file);
        put_u64(f, c->failed);
        put_u64(f, c->line);
        put_u64(f, c->col);
        put_str(f, c->error);
        put_str(f, c->title);
        put(f, c->sha256, sizeof c->sha256);
        put_u64(f, c->bytes);
    }
    put_u64(f, r->n_rows);
    for (size_t i = 0; i < r->n_rows; i++) {
        const ps_summary *s = ps_run_row(r, i);
        unsigned char codes[2] = {word_code(s->worst, worst_words, N_OF(worst_words)),
                                  word_code(s->fl.limiting, limiting_words, N_OF(limiting_words))};
        if (codes[0] == 255 || codes[1] == 255)
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "plant '%s': a word the partial format does not know "
                               "('%s', '%s')", s->id, s->worst ? s->worst : "", s->fl.limiting ? s->fl.limiting : "");
        uint32_t len = (uint32_t)ps_summary_pack(s, rec);
        put(f, &len, sizeof len);
        put(f, codes, sizeof codes);
        put(f, rec, len);
    }
    put_u64(f, r->n_families);
    for (size_t i = 0; i < r->n_families; i++) {
        const ps_yield_tally *t = &sh->tally[i];
        put(f, &r->families[i], sizeof r->families[i]);
        ps_yield_tally fixed = *t;
        fixed.blocks = NULL;
        fixed.cap_blocks = 0;
        put(f, &fixed, sizeof fixed);
        put(f, t->blocks, t->n_blocks * sizeof *t->blocks);
    }
    put(f, end_line, sizeof end_line - 1);
    char hex[65];
    ps_sha256_hex(&f->h, hex);
    fwrite(hex, 1, 64, f->f); /* the SHA-256 of every byte before it */
    return PS_OK;
}

ps_status ps_partial_write(const char *path, const ps_run *r, const ps_shard_info *sh, ps_diag *d)
{
    if (sh->families_seen != r->n_families)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: %zu families studied but %zu in the run", path,
                           sh->families_seen, r->n_families);
    char tmp[4096];
    if (snprintf(tmp, sizeof tmp, "%s.XXXXXX", path) >= (int)sizeof tmp)
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: path too long", path);
    unsigned char *rec = malloc(sizeof(ps_summary));
    if (!rec)
        return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
    int fd = mkstemp(tmp);
    if (fd < 0) {
        free(rec);
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "cannot create %s: %s", tmp, strerror(errno));
    }
    mode_t mask = umask(0);
    umask(mask);
    (void)fchmod(fd, 0666 & ~mask);
    FILE *f = fdopen(fd, "w");
    if (!f) {
        close(fd);
        unlink(tmp);
        free(rec);
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", path, strerror(errno));
    }
    writer w;
    w.f = f;
    ps_sha256_init(&w.h);
    ps_status st = write_body(&w, r, sh, rec, d);
    free(rec);
    if (st == PS_OK && ps_run_failed(r))
        st = ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: the temporary summary file could not be read", path);
    int e = 0;
    if (st == PS_OK && (fflush(f) != 0 || ferror(f) || fsync(fileno(f)) != 0)) {
        e = errno;
        st = ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", path, strerror(e));
    }
    if (fclose(f) != 0 && st == PS_OK)
        st = ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", path, strerror(errno));
    if (st == PS_OK && rename(tmp, path) != 0)
        st = ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", path, strerror(errno));
    if (st != PS_OK)
        unlink(tmp);
    return st;
}

void ps_partial_name(const char *stem, size_t k, size_t n, char *out, size_t size)
{
    snprintf(out, size, "%s.shard-%zu-of-%zu.partial", stem, k, n);
}

/* ---- reading ---------------------------------------------------------- */

typedef struct part {
    const char *path;
    FILE *f;
    ps_sha256 h;          /* of every byte read */
    bool bad;             /* a read came short */
    uint64_t k, n, seen, families_seen;
    double marginal_at;
    uint64_t detail;
    uint64_t certify, certify_budget;
    ps_batch_counts counts;
    size_t n_catalogs;
    ps_catalog_entry *catalogs;
} part;

static void get(part *p, void *dst, size_t n)
{
    if (!p->bad && n && fread(dst, 1, n, p->f) != n)
        p->bad = true;
    if (n == 0)
        return;
    if (p->bad)
        memset(dst, 0, n);
    else
        ps_sha256_add(&p->h, dst, n);
}

static uint64_t get_u64(part *p)
{
    uint64_t v;
    get(p, &v, sizeof v);
    return v;
}

/* A string of at most 1 MiB (NULL for the NULL mark); *ok false on no
 * memory or a length past that. */
static char *get_str(part *p, bool *ok)
{
    uint64_t n = get_u64(p);
    if (p->bad || n == UINT64_MAX)
        return NULL;
    if (n > (1u << 20)) {
        p->bad = true;
        return NULL;
    }
    char *s = malloc(n + 1);
    if (!s) {
        *ok = false;
        return NULL;
    }
    get(p, s, n);
    s[n] = '\0';
    return s;
}

static void part_free(part *p)
{
    if (p->f)
        fclose(p->f);
    for (size_t i = 0; i < p->n_catalogs; i++) {
        free(p->catalogs[i].file);
        free(p->catalogs[i].error);
        free(p->catalogs[i].title);
    }
    free(p->catalogs);
    memset(p, 0, sizeof *p);
}

static ps_status short_read(const part *p, ps_diag *d)
{
    return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: cut short or damaged (%s)", p->path,
                       ferror(p->f) ? strerror(errno) : "ends before the partial result does");
}

/* Open one partial and read it up to its rows. */
static ps_status part_open(part *p, const char *path, ps_diag *d)
{
    memset(p, 0, sizeof *p);
    p->path = path;
    if (!(p->f = fopen(path, "rb")))
        return ps_diag_set(d, PS_ERR_IO, 0, 0, "", "%s: %s", path, strerror(errno));
    char head[sizeof head_line - 1];
    ps_sha256_init(&p->h);
    get(p, head, sizeof head);
    if (p->bad || memcmp(head, head_line, sizeof head) != 0)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: not a partial result of plantsieve (expected a file "
                           "written by screen --shard K/N)", path);
    uint64_t want[6] = {sizeof(ps_summary), sizeof(ps_family_result), sizeof(ps_yield_tally), sizeof(ps_yield_block),
                        PS_SCREEN_SCHEMA_VERSION, PS_YIELD_BLOCK};
    for (size_t i = 0; i < 6; i++)
        if (get_u64(p) != want[i])
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: written by another build of plantsieve (its record "
                               "layout differs): merge partials with the program that wrote them", path);
    p->k = get_u64(p);
    p->n = get_u64(p);
    p->seen = get_u64(p);
    p->families_seen = get_u64(p);
    get(p, &p->marginal_at, sizeof p->marginal_at);
    p->detail = get_u64(p);
    p->certify = get_u64(p);
    p->certify_budget = get_u64(p);
    p->counts.entries = get_u64(p);
    p->counts.models = get_u64(p);
    p->counts.errors = get_u64(p);
    p->counts.files_failed = get_u64(p);
    uint64_t nc = get_u64(p);
    if (p->bad)
        return short_read(p, d);
    if (p->k < 1 || p->k > p->n || p->n > PS_SHARD_MAX || nc > 1000000 || p->detail > PS_DETAIL_NONE ||
        p->certify >= PS_CERTIFY_COUNT || p->certify_budget > 10000000)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: damaged header (shard %" PRIu64 " of %" PRIu64 ")", path,
                           p->k, p->n);
    if (nc && !(p->catalogs = calloc(nc, sizeof *p->catalogs)))
        return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
    p->n_catalogs = nc;
    bool ok = true;
    for (size_t i = 0; i < nc && !p->bad; i++) {
        ps_catalog_entry *c = &p->catalogs[i];
        c->file = get_str(p, &ok);
        c->failed = get_u64(p) != 0;
        c->line = get_u64(p);
        c->col = get_u64(p);
        c->error = get_str(p, &ok);
        c->title = get_str(p, &ok);
        get(p, c->sha256, sizeof c->sha256);
        c->sha256[64] = '\0';
        c->bytes = get_u64(p);
        if (!c->file && !p->bad)
            p->bad = true;
    }
    if (!ok)
        return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
    return p->bad ? short_read(p, d) : PS_OK;
}

static bool same_str(const char *a, const char *b)
{
    return (!a && !b) || (a && b && strcmp(a, b) == 0);
}

static const char *certify_word(uint64_t which)
{
    return which == PS_CERTIFY_PASSING ? "passing" : which == PS_CERTIFY_JUDGED ? "judged" : "not given";
}

/* Whether q belongs with p (the first partial): the same run of the same catalogs. */
static ps_status part_matches(const part *p, const part *q, ps_diag *d)
{
    if (q->n != p->n)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s is shard %" PRIu64 " of %" PRIu64 " but %s is of %" PRIu64
                           ": partials of one split are merged together", q->path, q->k, q->n, p->path, p->n);
    if (q->marginal_at != p->marginal_at || q->detail != p->detail)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s was screened with other options than %s (--marginal-at "
                           "%g against %g, --detail %s against %s)", q->path, p->path, q->marginal_at, p->marginal_at,
                           q->detail == 0 ? "all" : q->detail == 1 ? "flagged" : "none",
                           p->detail == 0 ? "all" : p->detail == 1 ? "flagged" : "none");
    if (q->certify != p->certify || q->certify_budget != p->certify_budget)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s was screened with other options than %s (--certify %s "
                           "against %s, --budget %" PRIu64 " against %" PRIu64 ")", q->path, p->path,
                           certify_word(q->certify), certify_word(p->certify), q->certify_budget, p->certify_budget);
    if (q->n_catalogs != p->n_catalogs)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s was made from %zu catalogs but %s from %zu", q->path,
                           q->n_catalogs, p->path, p->n_catalogs);
    for (size_t i = 0; i < p->n_catalogs; i++) {
        const ps_catalog_entry *a = &p->catalogs[i], *b = &q->catalogs[i];
        if (!same_str(a->file, b->file))
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s names catalog %zu '%s' but %s names it '%s': every "
                               "shard is given the same catalogs in the same order", q->path, i + 1, b->file, p->path,
                               a->file);
        if (strcmp(a->sha256, b->sha256) != 0 || a->bytes != b->bytes)
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: catalog '%s' differs from the one %s was made from "
                               "(SHA-256 %.12s... against %.12s...): the catalog changed between the shards",
                               q->path, b->file, p->path, b->sha256[0] ? b->sha256 : "(none)",
                               a->sha256[0] ? a->sha256 : "(none)");
        if (a->failed != b->failed || a->line != b->line || a->col != b->col || !same_str(a->error, b->error) ||
            !same_str(a->title, b->title))
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: catalog '%s' was read differently than in %s",
                               q->path, b->file, p->path);
    }
    if (q->seen != p->seen || q->families_seen != p->families_seen || q->counts.files_failed != p->counts.files_failed)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s read %" PRIu64 " entries and %" PRIu64 " families but %s "
                           "read %" PRIu64 " and %" PRIu64, q->path, q->seen, q->families_seen, p->path, p->seen,
                           p->families_seen);
    return PS_OK;
}

/* The rows of p into r. */
static ps_status read_rows(part *p, ps_run *r, ps_summary *s, unsigned char *rec, ps_diag *d)
{
    uint64_t n = get_u64(p);
    for (uint64_t i = 0; i < n && !p->bad; i++) {
        uint32_t len;
        unsigned char codes[2];
        get(p, &len, sizeof len);
        get(p, codes, sizeof codes);
        if (p->bad)
            break;
        if (len > sizeof *s) {
            p->bad = true;
            break;
        }
        get(p, rec, len);
        if (p->bad)
            break;
        const char *worst, *limiting;
        if (!ps_summary_unpack(rec, len, s) || !word_of(codes[0], worst_words, N_OF(worst_words), &worst) ||
            !word_of(codes[1], limiting_words, N_OF(limiting_words), &limiting) || s->verdict >= PS_VERDICT_COUNT ||
            s->n_curve > PS_CURVE_N || s->attr.n_lowering > PS_FACTOR_COUNT ||
            s->order >= p->seen || s->order % p->n != p->k - 1 || s->file_index >= r->n_catalogs)
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: row %" PRIu64 " is damaged", p->path, i + 1);
        s->worst = worst;
        s->fl.limiting = limiting;
        ps_status st = ps_run_put(r, s);
        if (st != PS_OK)
            return ps_diag_set(d, st, 0, 0, "", "out of memory (or no room for the temporary summary file)");
    }
    return p->bad ? short_read(p, d) : PS_OK;
}

static bool bounds_sane(const ps_family_result *fr)
{
    for (size_t j = 0; j < fr->n_bound; j++) {
        const ps_boundary *b = &fr->bound[j];
        if (b->param >= fr->n_params || b->n_curve > PS_FAM_SWEEP || b->n_changes > PS_BOUND_CHANGES)
            return false;
    }
    return true;
}

/* The families of p: the first partial gives every family's description;
 * each family's owner its boundaries; every partial its yield blocks. */
static ps_status read_families(part *p, bool first, ps_run *r, ps_yield_tally *tally, ps_family_result *fr,
                               ps_diag *d)
{
    uint64_t n = get_u64(p);
    if (!p->bad && n != p->families_seen)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s holds %" PRIu64 " families, its header %" PRIu64,
                           p->path, n, p->families_seen);
    for (uint64_t i = 0; i < n && !p->bad; i++) {
        ps_yield_tally t;
        get(p, fr, sizeof *fr);
        get(p, &t, sizeof t);
        if (p->bad)
            break;
        if (t.n_blocks > (PS_FAM_SAMPLES + PS_YIELD_BLOCK - 1) / PS_YIELD_BLOCK || fr->n_bound > PS_FAM_PARAMS ||
            fr->n_params > PS_FAM_PARAMS || fr->file_index >= r->n_catalogs || !bounds_sane(fr))
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: family %" PRIu64 " is damaged", p->path, i + 1);
        t.blocks = NULL;
        t.cap_blocks = 0;
        if (t.n_blocks && !(t.blocks = malloc(t.n_blocks * sizeof *t.blocks)))
            return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
        t.cap_blocks = t.n_blocks;
        get(p, t.blocks, t.n_blocks * sizeof *t.blocks);
        ps_family_result *into;
        if (first) {
            into = ps_run_next_family(r);
            if (!into) {
                free(t.blocks);
                return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
            }
            *into = *fr;
            tally[i] = t; /* its blocks are the merged tally's from here */
            continue;
        }
        into = &r->families[i];
        if (strcmp(into->id, fr->id) != 0 || into->has_yield != fr->has_yield) {
            free(t.blocks);
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: family %" PRIu64 " is '%s' but '%s' in the first "
                               "partial", p->path, i + 1, fr->id, into->id);
        }
        if (i % p->n == p->k - 1) { /* the owner's boundaries */
            into->n_bound = fr->n_bound;
            memcpy(into->bound, fr->bound, sizeof into->bound);
        }
        ps_status st = ps_yield_tally_add(&tally[i], &t);
        free(t.blocks);
        if (st != PS_OK)
            return ps_diag_set(d, st, 0, 0, "", "out of memory");
    }
    if (p->bad)
        return short_read(p, d);
    char tail[sizeof end_line - 1], want[65], got[65];
    get(p, tail, sizeof tail);
    if (p->bad || memcmp(tail, end_line, sizeof tail) != 0)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: does not end as a partial result does (cut short, or "
                           "damaged)", p->path);
    ps_sha256_hex(&p->h, want);
    if (fread(got, 1, 64, p->f) != 64 || fgetc(p->f) != EOF)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: does not end as a partial result does (its digest cut "
                           "short, or something appended)", p->path);
    got[64] = '\0';
    if (strcmp(got, want) != 0)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "%s: damaged: the SHA-256 of its content is %.12s..., the "
                           "file says %.12s...", p->path, want, got);
    return PS_OK;
}

static int by_shard(const void *a, const void *b)
{
    const part *x = a, *y = b;
    return x->k < y->k ? -1 : x->k > y->k;
}

static ps_status merge_parts(ps_run *r, part *parts, size_t n, ps_diag *d)
{
    /* every shard once */
    const part *p0 = &parts[0];
    qsort(parts, n, sizeof *parts, by_shard);
    for (size_t i = 1; i < n; i++)
        if (parts[i].k == parts[i - 1].k)
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "shard %" PRIu64 " of %" PRIu64 " is given twice: %s and "
                               "%s", parts[i].k, parts[i].n, parts[i - 1].path, parts[i].path);
    for (size_t i = 0; i < p0->n; i++)
        if (i >= n || parts[i].k != i + 1)
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "shard %zu of %" PRIu64 " is missing: the merge needs "
                               "every shard's partial result (%zu given)", i + 1, p0->n, n);
    r->opt.marginal_at = p0->marginal_at;
    r->opt.detail = (ps_detail)p0->detail;
    r->opt.certify = (ps_cert_which)p0->certify;
    r->opt.certify_budget = (size_t)p0->certify_budget;
    for (size_t i = 0; i < p0->n_catalogs; i++) {
        const ps_catalog_entry *c = &p0->catalogs[i];
        ps_diag fd = {0};
        if (c->failed) {
            fd.line = c->line;
            fd.col = c->col;
            snprintf(fd.text, sizeof fd.text, "%s", c->error ? c->error : "");
        }
        if (ps_run_add_catalog(r, c->file, c->failed ? &fd : NULL) != PS_OK ||
            ps_run_catalog_title(r, c->title) != PS_OK)
            return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
        ps_catalog_entry *e = &r->catalogs[r->n_catalogs - 1];
        memcpy(e->sha256, c->sha256, sizeof e->sha256);
        e->bytes = c->bytes;
    }
    ps_summary *s = malloc(sizeof *s);
    unsigned char *rec = malloc(sizeof *s);
    ps_family_result *fr = malloc(sizeof *fr);
    ps_yield_tally *tally = calloc(p0->families_seen ? p0->families_seen : 1, sizeof *tally);
    ps_status st = s && rec && fr && tally ? PS_OK : ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
    for (size_t i = 0; i < n && st == PS_OK; i++) {
        st = read_rows(&parts[i], r, s, rec, d);
        if (st == PS_OK)
            st = read_families(&parts[i], i == 0, r, tally, fr, d);
        r->counts.entries += parts[i].counts.entries;
        r->counts.models += parts[i].counts.models;
        r->counts.errors += parts[i].counts.errors;
    }
    r->counts.files_failed = p0->counts.files_failed;
    if (st == PS_OK && (r->n_rows != p0->seen || r->counts.entries != p0->seen))
        st = ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "the partials hold %zu rows and count %zu entries, but the "
                         "catalogs have %" PRIu64 ": a partial is not complete", r->n_rows, r->counts.entries,
                         p0->seen);
    for (size_t f = 0; st == PS_OK && f < r->n_families; f++) {
        ps_family_result *x = &r->families[f];
        if (x->has_yield)
            ps_yield_finish(x->param, x->n_params, x->yield.samples, x->yield.seed, &tally[f], &x->yield);
    }
    if (tally)
        for (size_t f = 0; f < p0->families_seen; f++)
            ps_yield_tally_free(&tally[f]);
    free(tally);
    free(fr);
    free(rec);
    free(s);
    return st;
}

ps_status ps_partial_merge(ps_run *r, char *const *paths, size_t n, ps_diag *d)
{
    if (n == 0)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "no partial result given");
    part *parts = calloc(n, sizeof *parts);
    if (!parts)
        return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory");
    ps_status st = PS_OK;
    for (size_t i = 0; i < n && st == PS_OK; i++) {
        st = part_open(&parts[i], paths[i], d);
        if (st == PS_OK && i > 0)
            st = part_matches(&parts[0], &parts[i], d);
    }
    if (st == PS_OK)
        st = merge_parts(r, parts, n, d);
    for (size_t i = 0; i < n; i++)
        part_free(&parts[i]);
    free(parts);
    return st;
}

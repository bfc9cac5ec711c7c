/* batch.c - the per-entry pipeline: read -> check -> duplicate id -> roots -> floors.
 * One scratch entry and one root workspace are reused for every plant. */
#include "batch/batch.h"

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "catalog/catalog.h"

/* Open-addressing set of the ids seen so far (duplicate detection across
 * every catalog of the batch). Keys are copies packed one after another in
 * chunks of IDSET_CHUNK bytes (no allocation of its own per id: at 3M plants
 * one malloc an id and slots at load below 1/2 took about 160 MB); slots
 * at load up to 3/4. */
enum { IDSET_CHUNK = 1 << 20 };

typedef struct idset {
    char **slot;
    size_t cap, n;
    char **chunks;          /* every chunk, for freeing */
    size_t n_chunks, cap_chunks;
    size_t used, room;      /* bytes used and held by the last chunk */
} idset;

static uint64_t hash_str(const char *s)
{
    uint64_t h = 1469598103934665603ull; /* FNV-1a */
    for (; *s; s++)
        h = (h ^ (unsigned char)*s) * 1099511628211ull;
    return h;
}

static int idset_grow(idset *set)
{
    size_t cap = set->cap ? set->cap * 2 : 1024;
    char **slot = calloc(cap, sizeof *slot);
    if (!slot)
        return -1;
    for (size_t i = 0; i < set->cap; i++) {
        if (!set->slot[i])
            continue;
        size_t k = hash_str(set->slot[i]) & (cap - 1);
        while (slot[k])
            k = (k + 1) & (cap - 1);
        slot[k] = set->slot[i];
    }
    free(set->slot);
    set->slot = slot;
    set->cap = cap;
    return 0;
}

/* Room for len bytes in the last chunk, or a new chunk; NULL on no memory. */
static char *idset_room(idset *set, size_t len)
{
    if (set->n_chunks == 0 || set->room - set->used < len) {
        if (set->n_chunks == set->cap_chunks) {
            size_t cap = set->cap_chunks ? 2 * set->cap_chunks : 16;
            char **c = realloc(set->chunks, cap * sizeof *c);
            if (!c)
                return NULL;
            set->chunks = c;
            set->cap_chunks = cap;
        }
        size_t room = len > IDSET_CHUNK ? len : IDSET_CHUNK;
        char *chunk = malloc(room);
        if (!chunk)
            return NULL;
        set->chunks[set->n_chunks++] = chunk;
        set->used = 0;
        set->room = room;
    }
    char *at = set->chunks[set->n_chunks - 1] + set->used;
    set->used += len;
    return at;
}

/* 1 when id was new (now added), 0 when already present, -1 on no memory. */
static int idset_add(idset *set, const char *id)
{
    if (4 * (set->n + 1) > 3 * set->cap && idset_grow(set))
        return -1;
    size_t k = hash_str(id) & (set->cap - 1);
    while (set->slot[k]) {
        if (strcmp(set->slot[k], id) == 0)
            return 0;
        k = (k + 1) & (set->cap - 1);
    }
    size_t len = strlen(id) + 1;
    char *copy = idset_room(set, len);
    if (!copy)
        return -1;
    memcpy(copy, id, len);
    set->slot[k] = copy;
    set->n++;
    return 1;
}

static void idset_free(idset *set)
{
    for (size_t i = 0; i < set->n_chunks; i++)
        free(set->chunks[i]);
    free(set->chunks);
    free(set->slot);
}

struct ps_batch {
    ps_outcome_fn fn;
    ps_family_done_fn family_fn;
    void *ctx;
    ps_plant *scratch;
    ps_roots_ws *ws;
    ps_limits_ws *lws;
    ps_analysis an;
    ps_floors fl;
    idset ids;
    ps_batch_counts counts;
    const char *file;
    bool defer;      /* the sink analyses checked plants itself */
    size_t seq;      /* entries seen so far (the next entry's seq) */
    size_t shard_k, shard_n; /* deliver only seq % shard_n == shard_k */
    char title[PS_NOTE_MAX]; /* the last catalog's title */
};

ps_batch *ps_batch_new(ps_outcome_fn fn, void *ctx)
{
    ps_batch *b = calloc(1, sizeof *b);
    if (!b)
        return NULL;
    b->fn = fn;
    b->ctx = ctx;
    b->shard_n = 1;
    b->scratch = malloc(sizeof *b->scratch);
    b->ws = ps_roots_ws_new();
    b->lws = ps_limits_ws_new();
    if (!b->scratch || !b->ws || !b->lws) {
        ps_batch_free(b);
        return NULL;
    }
    return b;
}

void ps_batch_free(ps_batch *b)
{
    if (!b)
        return;
    free(b->scratch);
    ps_roots_ws_free(b->ws);
    ps_limits_ws_free(b->lws);
    idset_free(&b->ids);
    free(b);
}

/* The entry that takes the next seq: whether this shard delivers it. */
static bool next_mine(ps_batch *b, size_t *seq)
{
    *seq = b->seq++;
    bool mine = *seq % b->shard_n == b->shard_k;
    if (mine)
        b->counts.entries++;
    return mine;
}

static void deliver_error(ps_batch *b, ps_plant *p, const ps_diag *err, size_t seq)
{
    b->counts.errors++;
    ps_outcome o = {b->file, p, NULL, NULL, err, seq};
    b->fn(b->ctx, &o);
}

static int on_entry(void *ctx, ps_plant *p, const ps_diag *err)
{
    ps_batch *b = ctx;
    size_t seq;
    bool mine = next_mine(b, &seq);
    if (err) {
        if (mine)
            deliver_error(b, p, err, seq);
        return 0;
    }
    ps_diag d = {0};
    if (ps_plant_check(p, &d) != PS_OK) {
        if (mine)
            deliver_error(b, p, &d, seq);
        return 0;
    }
    int fresh = idset_add(&b->ids, p->id);
    if (!mine)
        return 0; /* the id is remembered: a later duplicate in this shard is found */
    if (fresh <= 0) {
        ps_diag_set(&d, fresh < 0 ? PS_ERR_NOMEM : PS_ERR_INPUT, p->field_line[PS_F_ID],
                    p->field_col[PS_F_ID], "id",
                    fresh < 0 ? "out of memory" : "duplicate id '%s': ids must be unique in a run", p->id);
        deliver_error(b, p, &d, seq);
        return 0;
    }
    if (b->defer) {
        b->counts.models++;
        ps_outcome o = {b->file, p, NULL, NULL, NULL, seq};
        b->fn(b->ctx, &o);
        return 0;
    }
    if (ps_roots_analyse(b->ws, p, &b->an, &d) != PS_OK) {
        deliver_error(b, p, &d, seq);
        return 0;
    }
    ps_floors_compute(b->lws, &b->an, &p->req, &b->fl);
    if (ps_floors_formed(&b->an, &b->fl, p->field_line[PS_F_SAMPLE_RATE] ? p->field_line[PS_F_SAMPLE_RATE] : p->line,
                         &d) != PS_OK) {
        deliver_error(b, p, &d, seq);
        return 0;
    }
    b->counts.models++;
    ps_outcome o = {b->file, p, &b->an, &b->fl, NULL, seq};
    b->fn(b->ctx, &o);
    return 0;
}

/* A family: its grid plants go through on_entry like read entries; a family
 * that cannot be read, or a grid point whose expressions fail, is an entry
 * error naming the family's line and field. */
static int on_family(void *ctx, const ps_ynode *node, const ps_plant *defaults)
{
    ps_batch *b = ctx;
    ps_family *fam = malloc(sizeof *fam);
    ps_diag d = {0};
    size_t seq;
    if (!fam) {
        ps_plant_reset(b->scratch);
        ps_diag_set(&d, PS_ERR_NOMEM, node->line, node->col, "", "out of memory for a family");
        if (next_mine(b, &seq))
            deliver_error(b, b->scratch, &d, seq);
        return 0;
    }
    if (ps_family_parse(fam, node, defaults, &d) != PS_OK) {
        ps_plant_reset(b->scratch);
        snprintf(b->scratch->id, sizeof b->scratch->id, "%s", fam->id);
        b->scratch->line = node->line;
        if (next_mine(b, &seq))
            deliver_error(b, b->scratch, &d, seq);
    } else {
        size_t n = ps_family_grid_size(fam);
        double values[PS_FAM_PARAMS];
        for (size_t k = 0; k < n; k++) {
            ps_family_grid_point(fam, k, values);
            if (ps_family_eval(fam, values, false, b->scratch, &d) != PS_OK) {
                if (next_mine(b, &seq))
                    deliver_error(b, b->scratch, &d, seq);
            } else
                on_entry(b, b->scratch, NULL);
        }
        if (b->family_fn)
            b->family_fn(b->ctx, fam, b->file);
    }
    ps_family_free(fam);
    free(fam);
    return 0;
}

void ps_batch_defer_analysis(ps_batch *b, bool defer)
{
    b->defer = defer;
}

void ps_batch_on_family(ps_batch *b, ps_family_done_fn fn)
{
    b->family_fn = fn;
}

void ps_batch_shard(ps_batch *b, size_t k, size_t n)
{
    b->shard_n = n ? n : 1;
    b->shard_k = k < b->shard_n ? k : 0;
}

size_t ps_batch_seen(const ps_batch *b)
{
    return b->seq;
}

ps_status ps_batch_run(ps_batch *b, const char *path, ps_diag *fdiag)
{
    b->file = path;
    ps_status st = ps_catalog_read_titled(path, b->scratch, on_entry, on_family, b, fdiag, b->title, sizeof b->title);
    if (st != PS_OK)
        b->counts.files_failed++;
    return st;
}

const char *ps_batch_title(const ps_batch *b)
{
    return b->title;
}

const ps_batch_counts *ps_batch_counts_get(const ps_batch *b)
{
    return &b->counts;
}

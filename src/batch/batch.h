/* batch.h - runs catalogs through reading, checking and root analysis, one
 * entry at a time, and hands every outcome (model or error) to a sink. */
#ifndef PS_BATCH_H
#define PS_BATCH_H

#include <stdbool.h>
#include <stddef.h>

#include "core/diag.h"
#include "family/family.h"
#include "model/plant.h"
#include "limits/floors.h"
#include "roots/roots.h"

/* One entry's outcome. When err is NULL the plant was checked and analysed
 * (only checked, an and fl NULL, with ps_batch_defer_analysis); otherwise
 * err says why it was rejected (p holds what was read). */
typedef struct ps_outcome {
    const char *file;
    ps_plant *p;
    const ps_analysis *an;   /* NULL when err is set or the analysis is deferred */
    const ps_floors *fl;     /* NULL when an is */
    const ps_diag *err;
    size_t seq;              /* the entry's place among every entry of the batch (0-based, errors too) */
} ps_outcome;

typedef void (*ps_outcome_fn)(void *ctx, const ps_outcome *o);

typedef struct ps_batch_counts {
    size_t entries, models, errors;   /* invariant: entries == models + errors (of a shard: its own entries) */
    size_t files_failed;              /* catalogs that could not be opened or parsed to the end */
} ps_batch_counts;

typedef struct ps_batch ps_batch;

/* New batch; fn receives every outcome in catalog order. NULL on no memory. */
ps_batch *ps_batch_new(ps_outcome_fn fn, void *ctx);
void ps_batch_free(ps_batch *b);

/* Read one catalog. File-level problems (cannot open, broken structure) are
 * returned with fdiag set; entries delivered before that still count. */
ps_status ps_batch_run(ps_batch *b, const char *path, ps_diag *fdiag);

const ps_batch_counts *ps_batch_counts_get(const ps_batch *b);
/* The title of the catalog ps_batch_run read last ("" when it has none). */
const char *ps_batch_title(const ps_batch *b);

/* Deliver checked plants without their root analysis and floors, for a sink
 * that works them out elsewhere (the screening pool). Such plants count as
 * models; the sink moves those whose analysis fails to the errors. */
void ps_batch_defer_analysis(ps_batch *b, bool defer);

/* After the grid plants of a family have been delivered (as ordinary
 * outcomes, ids "<family>[name=value,...]"), fn gets the family itself, for
 * the boundary and yield studies. file is the catalog. Optional. */
typedef void (*ps_family_done_fn)(void *ctx, ps_family *fam, const char *file);
void ps_batch_on_family(ps_batch *b, ps_family_done_fn fn);

/* Deliver and count only the entries whose seq % n == k (0 <= k < n): one
 * shard of a run split over n processes. Every entry is still read and
 * checked and its id remembered, so a duplicate id is found whichever shard
 * holds the first one, and seq is the same in every shard. Families are
 * handed to the family function in every shard. Default: k = 0, n = 1. */
void ps_batch_shard(ps_batch *b, size_t k, size_t n);

/* Entries read so far in all (every shard counts them all). */
size_t ps_batch_seen(const ps_batch *b);

#endif

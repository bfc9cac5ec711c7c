/* partial.h - one shard's share of a screening run, written by
 * `screen --shard K/N` and combined by `merge` into the run a single
 * machine would have made.
 *
 * A shard screens the entries whose place in the run (ps_outcome.seq) is
 * K-1 modulo N, computes the boundaries of the families whose place among
 * the families is K-1 modulo N, and draws the yield blocks K-1, K-1+N, ...
 * of every yield study (study.h). Its partial file keeps those rows as the
 * run's compact records, with their places, the family results and yield
 * tallies, the catalogs with their SHA-256 digests, the options that change
 * a result, and the counts. The merge checks that the partials belong
 * together (one build, the same catalogs by digest, the same options, every
 * shard 1..N once) and rebuilds the run: the rows ranked by their places,
 * the boundaries from their owners, the yield tallies added block by block.
 *
 * The file is binary, in the byte order and layout of the program that
 * wrote it: partials are merged by the same build on the same kind of
 * machine (the header records the layout, and a mismatch is refused). It
 * ends with the SHA-256 of everything before, so a file damaged in transit
 * or storage is refused, not merged; a partial is an intermediate file of
 * plantsieve's own, not an input format to be written by other programs. */
#ifndef PS_PARTIAL_H
#define PS_PARTIAL_H

#include <stddef.h>

#include "core/diag.h"
#include "screen/screen.h"
#include "screen/study.h"

/* Largest N of --shard K/N. */
#define PS_SHARD_MAX 100000

/* What a shard adds to its run when it writes its partial. */
typedef struct ps_shard_info {
    size_t k, n;                  /* shard k of n, 1 <= k <= n */
    size_t seen;                  /* entries read in all (every shard reads every entry) */
    size_t families_seen;         /* families studied in all (r->n_families) */
    const ps_yield_tally *tally;  /* one per family of the run, this shard's blocks */
} ps_shard_info;

/* Write the ranked (or unranked) run r as shard sh to path, through a
 * temporary file in the same directory renamed over path once complete.
 * The catalogs must have been digested (ps_run_digest_catalogs). PS_OK, or
 * PS_ERR_IO / PS_ERR_NOMEM with d set. */
ps_status ps_partial_write(const char *path, const ps_run *r, const ps_shard_info *sh, ps_diag *d);

/* Read the partials paths[0..n) into r (ps_run_init'ed, no catalog or row
 * yet; its memory_rows and keep_top are the caller's, its marginal_at and
 * detail are taken from the partials), checking that they belong together.
 * On an error d names the file and what was expected; r then holds an
 * incomplete run and is only to be freed. PS_OK, PS_ERR_INPUT (the partials
 * do not belong together, or one is not a partial), PS_ERR_IO or
 * PS_ERR_NOMEM. */
ps_status ps_partial_merge(ps_run *r, char *const *paths, size_t n, ps_diag *d);

/* The file name of shard k of n of a run whose reports are named stem:
 * "<stem>.shard-<k>-of-<n>.partial". */
void ps_partial_name(const char *stem, size_t k, size_t n, char *out, size_t size);

#endif

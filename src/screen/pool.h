/* pool.h - root analysis, floors and assessments on worker threads, while
 * the reader goes on reading. Outcomes are copied into one of two chunks as
 * they arrive; a full chunk goes to the workers (each with its own
 * workspaces, taking jobs in turn) while the reader fills the other one.
 * Results are committed to the run in arrival order, so the run is the same
 * for any thread count and any timing. */
#ifndef PS_POOL_H
#define PS_POOL_H

#include <stddef.h>

#include "screen/screen.h"

enum { PS_POOL_CHUNK = 512, PS_POOL_MAX_THREADS = 64, PS_POOL_WORKER_NICE = 5 };

typedef struct ps_pool ps_pool;

/* Called at commit, in arrival order, for every entry that is an input error
 * (from reading, checking or the root analysis). */
typedef void (*ps_pool_error_fn)(void *ctx, const char *file, const ps_plant *p, const ps_diag *err);

/* threads >= 1 workers. NULL on no memory. */
ps_pool *ps_pool_new(size_t threads, ps_run *run, ps_pool_error_fn say, void *ctx);
void ps_pool_free(ps_pool *p);

/* Queue one outcome (copied): an input error, or a checked plant that the
 * pool analyses itself (o->an and o->fl are not used). PS_ERR_NOMEM when
 * the run cannot grow. */
ps_status ps_pool_add(ps_pool *p, const ps_outcome *o);

/* Finish and commit everything queued; call before the run's catalog list
 * changes and at the end. */
ps_status ps_pool_flush(ps_pool *p);

/* Plants whose root analysis failed in the pool (they are input errors in
 * the run, but the batch counted them as models). */
size_t ps_pool_analysis_errors(const ps_pool *p);

#endif

/* pool.h - screening assessments on several threads. Outcomes are copied
 * into a chunk as they arrive; a full chunk (or a flush) is assessed by the
 * worker threads, each with its own workspace, and committed to the run in
 * arrival order: the run is the same for any thread count. */
#ifndef PS_POOL_H
#define PS_POOL_H

#include <stddef.h>

#include "screen/screen.h"

enum { PS_POOL_CHUNK = 128, PS_POOL_MAX_THREADS = 64 };

typedef struct ps_pool ps_pool;

/* threads >= 1. NULL on no memory. */
ps_pool *ps_pool_new(size_t threads, ps_run *run);
void ps_pool_free(ps_pool *p);

/* Queue one outcome (copied). PS_ERR_NOMEM when the run cannot grow. */
ps_status ps_pool_add(ps_pool *p, const ps_outcome *o);

/* Assess and commit everything queued; call before the run's catalog list
 * changes and at the end. */
ps_status ps_pool_flush(ps_pool *p);

#endif

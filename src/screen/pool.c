/* pool.c - see pool.h. Job j of a chunk goes to thread j mod T (static,
 * so the work split never depends on timing); results land in the run's
 * rows at their arrival positions. */
#include "screen/pool.h"

#include <pthread.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

typedef struct job {
    ps_plant p;
    ps_analysis an;
    ps_floors fl;
    ps_diag err;
    bool has_err;
    const char *file;
} job;

struct ps_pool {
    ps_run *run;
    size_t threads, n;
    job *jobs;
    ps_screen_ws *ws[PS_POOL_MAX_THREADS];
};

typedef struct worker {
    ps_pool *p;
    size_t t;
} worker;

ps_pool *ps_pool_new(size_t threads, ps_run *run)
{
    if (threads < 1)
        threads = 1;
    if (threads > PS_POOL_MAX_THREADS)
        threads = PS_POOL_MAX_THREADS;
    ps_pool *p = calloc(1, sizeof *p);
    if (!p)
        return NULL;
    p->run = run;
    p->threads = threads;
    p->jobs = malloc(PS_POOL_CHUNK * sizeof *p->jobs);
    bool ok = p->jobs != NULL;
    for (size_t t = 0; ok && t < threads; t++)
        ok = (p->ws[t] = ps_screen_ws_new()) != NULL;
    if (!ok) {
        ps_pool_free(p);
        return NULL;
    }
    return p;
}

void ps_pool_free(ps_pool *p)
{
    if (!p)
        return;
    for (size_t t = 0; t < p->threads; t++)
        ps_screen_ws_free(p->ws[t]);
    free(p->jobs);
    free(p);
}

static void *work(void *arg)
{
    worker *w = arg;
    ps_pool *p = w->p;
    for (size_t j = w->t; j < p->n; j += p->threads) {
        job *jb = &p->jobs[j];
        ps_outcome o = {jb->file, &jb->p, jb->has_err ? NULL : &jb->an, jb->has_err ? NULL : &jb->fl,
                        jb->has_err ? &jb->err : NULL};
        ps_screen_assess(p->ws[w->t], &o, &p->run->opt, ps_run_stage(p->run, j));
    }
    return NULL;
}

ps_status ps_pool_flush(ps_pool *p)
{
    if (p->n == 0)
        return PS_OK;
    ps_run *r = p->run;
    if (ps_run_reserve(r, p->n) != PS_OK)
        return PS_ERR_NOMEM;
    for (size_t j = 0; j < p->n; j++) {
        ps_summary *s = ps_run_stage(r, j);
        s->order = r->n_rows + j;
        s->file_index = r->n_catalogs ? r->n_catalogs - 1 : 0;
    }
    worker w[PS_POOL_MAX_THREADS];
    pthread_t tid[PS_POOL_MAX_THREADS];
    bool started[PS_POOL_MAX_THREADS] = {false};
    size_t use = p->threads < p->n ? p->threads : p->n;
    for (size_t t = 0; t < use; t++)
        w[t] = (worker){p, t};
    /* If a thread cannot be started its jobs run here, after the others. */
    for (size_t t = 1; t < use; t++)
        started[t] = pthread_create(&tid[t], NULL, work, &w[t]) == 0;
    work(&w[0]);
    for (size_t t = 1; t < use; t++) {
        if (started[t])
            pthread_join(tid[t], NULL);
        else
            work(&w[t]);
    }
    ps_run_commit_n(r, p->n);
    p->n = 0;
    return PS_OK;
}

ps_status ps_pool_add(ps_pool *p, const ps_outcome *o)
{
    job *jb = &p->jobs[p->n++];
    jb->p = *o->p;
    jb->file = o->file;
    jb->has_err = o->err != NULL;
    if (o->err)
        jb->err = *o->err;
    else {
        jb->an = *o->an;
        jb->fl = *o->fl;
    }
    return p->n == PS_POOL_CHUNK ? ps_pool_flush(p) : PS_OK;
}

/* pool.c - see pool.h. The reader fills chunk A while the workers work on
 * chunk B; when A is full the reader waits for B, hands A over, commits B
 * while the workers are on A, and goes on filling B. Workers take the next
 * job of the chunk from a shared counter; every result lands in its own
 * job, so the split never shows. */
#if defined(__linux__) && !defined(_GNU_SOURCE)
#define _GNU_SOURCE /* syscall(SYS_gettid): the worker's own nice value, see lower_priority */
#endif
#include "screen/pool.h"

#include <pthread.h>
#ifdef __linux__
#include <errno.h>
#include <sys/resource.h>
#include <sys/syscall.h>
#include <unistd.h>
#endif
#include <stdatomic.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include "limits/floors.h"
#include "roots/roots.h"

typedef struct job {
    ps_plant p;
    ps_diag err;
    bool has_err;        /* an input error from the batch, or the analysis failed here */
    bool analysis_err;   /* the latter */
    const char *file;
    size_t file_index;
    size_t seq;          /* the entry's place in the run (the row's order) */
    bool defer;          /* detail deferred (a keep_top run past memory: most rows are dropped) */
    size_t n_warn;       /* the plant's warnings before its root analysis */
    ps_summary s;
} job;

/* One worker's workspaces. */
typedef struct lane {
    ps_roots_ws *rws;
    ps_limits_ws *lws;
    ps_screen_ws *sws;
    ps_analysis an;
    ps_floors fl;
} lane;

struct ps_pool {
    ps_run *run;
    ps_pool_error_fn say;
    void *ctx;
    size_t threads;
    job *chunk[2];
    size_t fill;            /* jobs in chunk[cur] */
    int cur;
    lane *lanes;
    pthread_t tid[PS_POOL_MAX_THREADS];
    size_t started;         /* worker threads running */
    /* the chunk in flight */
    pthread_mutex_t mu;
    pthread_cond_t go, done;
    job *flight;
    size_t flight_n;
    atomic_size_t next;
    size_t busy;            /* workers not yet done with the flight */
    unsigned long gen;
    bool quit;
    size_t analysis_errors;
};

typedef struct worker_arg {
    ps_pool *p;
    size_t t;
} worker_arg;

static void run_job(ps_pool *p, lane *ln, job *jb)
{
    ps_outcome o = {jb->file, &jb->p, NULL, NULL, NULL, jb->seq};
    jb->n_warn = jb->p.n_warn;
    if (!jb->has_err) {
        memset(&jb->err, 0, sizeof jb->err);
        if (ps_roots_analyse(ln->rws, &jb->p, &ln->an, &jb->err) == PS_OK) {
            ps_floors_compute(ln->lws, &ln->an, &jb->p.req, &ln->fl);
            size_t at = jb->p.field_line[PS_F_SAMPLE_RATE] ? jb->p.field_line[PS_F_SAMPLE_RATE] : jb->p.line;
            if (ps_floors_formed(&ln->an, &ln->fl, at, &jb->err) == PS_OK) {
                o.an = &ln->an;
                o.fl = &ln->fl;
            } else
                jb->has_err = jb->analysis_err = true;
        } else
            jb->has_err = jb->analysis_err = true;
    }
    if (jb->has_err)
        o.err = &jb->err;
    jb->s.file_index = jb->file_index;
    jb->s.order = jb->seq;
    ps_screen_opts opt = p->run->opt;
    if (jb->defer && !jb->has_err)
        opt.detail = PS_DETAIL_DEFERRED;
    ps_screen_assess(ln->sws, &o, &opt, &jb->s);
}

static void drain(ps_pool *p, lane *ln)
{
    for (;;) {
        size_t j = atomic_fetch_add(&p->next, 1);
        if (j >= p->flight_n)
            return;
        run_job(p, ln, &p->flight[j]);
    }
}

/* The reader thread is the run's critical path (it alone parses the
 * catalog), and with as many workers as cores it shares a core with them.
 * On Linux, where a thread has its own nice value, each worker lowers its
 * own priority by PS_POOL_WORKER_NICE so that the scheduler lets the reader
 * run when it can; the workers still get every cycle it leaves. Results do
 * not depend on it (only timing does). Measured with tests/bench: README. */
static void lower_priority(void)
{
#ifdef __linux__
    id_t tid = (id_t)syscall(SYS_gettid);
    errno = 0;
    int now = getpriority(PRIO_PROCESS, tid);
    if (errno == 0)
        (void)setpriority(PRIO_PROCESS, tid, now + PS_POOL_WORKER_NICE > 19 ? 19 : now + PS_POOL_WORKER_NICE);
#endif
}

static void *worker(void *arg)
{
    ps_pool *p = ((worker_arg *)arg)->p;
    lane *ln = &p->lanes[((worker_arg *)arg)->t];
    free(arg);
    lower_priority();
    unsigned long seen = 0;
    pthread_mutex_lock(&p->mu);
    for (;;) {
        while (p->gen == seen && !p->quit)
            pthread_cond_wait(&p->go, &p->mu);
        if (p->quit)
            break;
        seen = p->gen;
        pthread_mutex_unlock(&p->mu);
        drain(p, ln);
        pthread_mutex_lock(&p->mu);
        if (--p->busy == 0)
            pthread_cond_signal(&p->done);
    }
    pthread_mutex_unlock(&p->mu);
    return NULL;
}

static void lane_free(lane *ln)
{
    ps_roots_ws_free(ln->rws);
    ps_limits_ws_free(ln->lws);
    ps_screen_ws_free(ln->sws);
}

ps_pool *ps_pool_new(size_t threads, ps_run *run, ps_pool_error_fn say, void *ctx)
{
    if (threads < 1)
        threads = 1;
    if (threads > PS_POOL_MAX_THREADS)
        threads = PS_POOL_MAX_THREADS;
    ps_pool *p = calloc(1, sizeof *p);
    if (!p)
        return NULL;
    p->run = run;
    p->say = say;
    p->ctx = ctx;
    p->threads = threads;
    pthread_mutex_init(&p->mu, NULL);
    pthread_cond_init(&p->go, NULL);
    pthread_cond_init(&p->done, NULL);
    p->chunk[0] = malloc(PS_POOL_CHUNK * sizeof *p->chunk[0]);
    p->chunk[1] = malloc(PS_POOL_CHUNK * sizeof *p->chunk[1]);
    p->lanes = calloc(threads, sizeof *p->lanes);
    bool ok = p->chunk[0] && p->chunk[1] && p->lanes;
    for (size_t t = 0; ok && t < threads; t++) {
        lane *ln = &p->lanes[t];
        ln->rws = ps_roots_ws_new();
        ln->lws = ps_limits_ws_new();
        ln->sws = ps_screen_ws_new();
        ok = ln->rws && ln->lws && ln->sws;
    }
    if (!ok) {
        ps_pool_free(p);
        return NULL;
    }
    /* Threads that cannot be started leave their share to the others; with
     * none at all the chunks are worked on by the reader (see launch). */
    for (size_t t = 0; t < threads; t++) {
        worker_arg *a = malloc(sizeof *a);
        if (!a)
            break;
        *a = (worker_arg){p, p->started};
        if (pthread_create(&p->tid[p->started], NULL, worker, a) != 0) {
            free(a);
            break;
        }
        p->started++;
    }
    return p;
}

/* Wait until the workers are done with the chunk in flight. */
static void wait_flight(ps_pool *p)
{
    pthread_mutex_lock(&p->mu);
    while (p->busy > 0)
        pthread_cond_wait(&p->done, &p->mu);
    pthread_mutex_unlock(&p->mu);
}

/* Commit n finished jobs in order. */
static ps_status commit(ps_pool *p, job *jobs, size_t n)
{
    ps_status st = PS_OK;
    for (size_t j = 0; j < n; j++) {
        job *jb = &jobs[j];
        if (jb->has_err && p->say)
            p->say(p->ctx, jb->file, &jb->p, &jb->err);
        p->analysis_errors += jb->analysis_err;
        if (st == PS_OK && jb->s.detail_deferred) {
            jb->p.n_warn = jb->n_warn; /* the plant as it was read, for the analysis done again */
            st = ps_run_put_deferred(p->run, &jb->s, &jb->p);
        } else if (st == PS_OK)
            st = ps_run_put(p->run, &jb->s);
    }
    return st;
}

/* Wait for the chunk in flight and commit it. */
static ps_status land(ps_pool *p)
{
    if (!p->flight)
        return PS_OK;
    wait_flight(p);
    job *done = p->flight;
    size_t n = p->flight_n;
    p->flight = NULL;
    p->flight_n = 0;
    return commit(p, done, n);
}

static void launch(ps_pool *p, job *jobs, size_t n)
{
    pthread_mutex_lock(&p->mu);
    p->flight = jobs;
    p->flight_n = n;
    atomic_store(&p->next, 0);
    p->busy = p->started;
    p->gen++;
    pthread_cond_broadcast(&p->go);
    pthread_mutex_unlock(&p->mu);
    if (p->started == 0)
        drain(p, &p->lanes[0]);
}

void ps_pool_free(ps_pool *p)
{
    if (!p)
        return;
    pthread_mutex_lock(&p->mu);
    p->quit = true;
    pthread_cond_broadcast(&p->go);
    pthread_mutex_unlock(&p->mu);
    for (size_t t = 0; t < p->started; t++)
        pthread_join(p->tid[t], NULL);
    for (size_t t = 0; p->lanes && t < p->threads; t++)
        lane_free(&p->lanes[t]);
    free(p->lanes);
    free(p->chunk[0]);
    free(p->chunk[1]);
    pthread_mutex_destroy(&p->mu);
    pthread_cond_destroy(&p->go);
    pthread_cond_destroy(&p->done);
    free(p);
}

/* Hand the filled chunk over as soon as the workers are done with the one
 * in flight, then commit that one while they work on the new one (the
 * reader refills it afterwards). */
static ps_status hand_over(ps_pool *p)
{
    if (p->fill == 0)
        return land(p);
    job *done = NULL;
    size_t n = 0;
    if (p->flight) {
        wait_flight(p);
        done = p->flight;
        n = p->flight_n;
    }
    launch(p, p->chunk[p->cur], p->fill);
    p->cur ^= 1;
    p->fill = 0;
    return done ? commit(p, done, n) : PS_OK;
}

ps_status ps_pool_flush(ps_pool *p)
{
    ps_status st = hand_over(p);
    ps_status st2 = land(p);
    return st != PS_OK ? st : st2;
}

ps_status ps_pool_add(ps_pool *p, const ps_outcome *o)
{
    job *jb = &p->chunk[p->cur][p->fill++];
    ps_plant_copy(&jb->p, o->p);
    jb->file = o->file;
    jb->seq = o->seq;
    /* decided here, in the thread that commits: the run has left memory for good */
    jb->defer = ps_run_defers(p->run) && p->run->opt.detail != PS_DETAIL_NONE;
    jb->file_index = p->run->n_catalogs ? p->run->n_catalogs - 1 : 0;
    jb->has_err = o->err != NULL;
    jb->analysis_err = false;
    if (o->err)
        jb->err = *o->err;
    return p->fill == PS_POOL_CHUNK ? hand_over(p) : PS_OK;
}

size_t ps_pool_analysis_errors(const ps_pool *p)
{
    return p->analysis_errors;
}

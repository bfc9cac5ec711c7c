/* floors_bench.c - plantsieve's floors timed apart from reading: the C side
 * of the benchmark's "compute against compute" comparison with
 * tests/bench/np_floors.py (not a ctest timing; tests/bench/run.sh prints
 * the figures).
 *
 *   floors_bench CATALOG
 *
 * The catalog is read with the library's streaming reader. Plants are
 * copied into a block as they come; each full block is then worked out
 * with the process CPU clock running: the plant check, the root analysis
 * (roots, RHP counts, hidden modes), every floor ps_floors_compute gives
 * (Bode area, single-point and joint interpolation, band-forced with the
 * roll-off tail, Poisson, effort) and the severity and verdict, the same
 * steps and functions `plantsieve screen` uses for them. Reading, and the
 * copy into the block, are outside the clock; np_floors.py's "compute" is
 * likewise everything after its YAML load (its prepare loop included).
 * No cause sentence, redesign target, band curve, ranking or output: the
 * numpy script computes none of them.
 *
 * Prints one line:
 *   floors_bench: N plants, read R s, compute C s (CPU), verdicts clear A, marginal B, redesign D,
 *   not-stabilizable U, needs-bandwidth W, errors E
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "catalog/catalog.h"
#include "limits/floors.h"
#include "limits/limits.h"
#include "roots/roots.h"
#include "screen/screen.h"

enum { BLOCK = 256 };

typedef struct bench {
    ps_plant *block;   /* BLOCK plants as read */
    size_t n_block;
    ps_roots_ws *rws;
    ps_limits_ws *lws;
    ps_analysis an;
    ps_floors fl;
    size_t plants, errors;
    size_t per_verdict[PS_VERDICT_COUNT];
    double compute_s;
} bench;

static double cpu_s(void)
{
    struct timespec t;
    clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &t);
    return (double)t.tv_sec + 1e-9 * (double)t.tv_nsec;
}

/* As ps_screen_assess judges a plant (severity_of, ps_verdict_of and the
 * needs-bandwidth rule), without the cause, targets and curve. */
static void judge(bench *b, ps_plant *p)
{
    ps_diag d = {0};
    if (ps_plant_check(p, &d) != PS_OK || ps_roots_analyse(b->rws, p, &b->an, &d) != PS_OK) {
        b->errors++;
        return;
    }
    ps_floors_compute(b->lws, &b->an, &p->req, &b->fl);
    if (ps_floors_formed(&b->an, &b->fl, p->line, &d) != PS_OK) {
        b->errors++;
        return;
    }
    const ps_requirements *q = &p->req;
    double sm = ps_share_peak_ln(b->fl.ms, b->fl.ms_ln, q->ms_allowed);
    double st = ps_share_peak_ln(b->fl.mt, b->fl.mt_ln, q->mt_allowed);
    double sev = b->fl.infinite ? INFINITY : fmax(sm, st);
    if (q->effort_allowed > 0 && !b->fl.infinite) {
        double se = ps_share_effort_ln(b->fl.effort, b->fl.effort_ln, q->effort_allowed);
        if (!isnan(se))
            sev = fmax(sev, se);
    }
    ps_verdict v = ps_verdict_of(sev, b->fl.infinite, b->an.hidden_unstable, PS_MARGINAL_AT);
    if ((v == PS_VERDICT_CLEAR || v == PS_VERDICT_MARGINAL) && b->an.n_rhp_poles > 0 && !(q->wh > 0) &&
        !(b->an.h > 0))
        v = PS_VERDICT_NEEDS_BANDWIDTH;
    b->per_verdict[v]++;
}

static void run_block(bench *b)
{
    double t0 = cpu_s();
    for (size_t i = 0; i < b->n_block; i++)
        judge(b, &b->block[i]);
    b->compute_s += cpu_s() - t0;
    b->n_block = 0;
}

static int on_entry(void *ctx, ps_plant *p, const ps_diag *err)
{
    bench *b = ctx;
    b->plants++;
    if (err) {
        b->errors++;
        return 0;
    }
    memcpy(&b->block[b->n_block++], p, sizeof *p);
    if (b->n_block == BLOCK)
        run_block(b);
    return 0;
}

int main(int argc, char **argv)
{
    if (argc != 2) {
        fputs("usage: floors_bench CATALOG\n", stderr);
        return 2;
    }
    ps_roots_init();
    bench b = {0};
    ps_plant *scratch = malloc(sizeof *scratch);
    b.block = malloc(BLOCK * sizeof *b.block);
    b.rws = ps_roots_ws_new();
    b.lws = ps_limits_ws_new();
    if (!scratch || !b.block || !b.rws || !b.lws) {
        fputs("floors_bench: out of memory\n", stderr);
        return 4;
    }
    ps_diag fd = {0};
    double t0 = cpu_s();
    ps_status st = ps_catalog_read(argv[1], scratch, on_entry, &b, &fd);
    run_block(&b);
    double total = cpu_s() - t0;
    if (st != PS_OK) {
        fprintf(stderr, "floors_bench: %s:%zu: %s\n", argv[1], fd.line, fd.text);
        return 4;
    }
    printf("floors_bench: %zu plants, read %.3f s, compute %.3f s (CPU), verdicts clear %zu, marginal %zu, "
           "redesign %zu, not-stabilizable %zu, needs-bandwidth %zu, errors %zu\n",
           b.plants, total - b.compute_s, b.compute_s, b.per_verdict[PS_VERDICT_CLEAR],
           b.per_verdict[PS_VERDICT_MARGINAL], b.per_verdict[PS_VERDICT_REDESIGN],
           b.per_verdict[PS_VERDICT_UNSTABILIZABLE], b.per_verdict[PS_VERDICT_NEEDS_BANDWIDTH], b.errors);
    free(scratch);
    free(b.block);
    ps_roots_ws_free(b.rws);
    ps_limits_ws_free(b.lws);
    return 0;
}

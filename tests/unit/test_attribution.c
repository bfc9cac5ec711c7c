/* test_attribution.c - causes by attribution: on a seeded corpus of random
 * plants with requirements, every counterfactual floor is recomputed here by
 * changing the plant or its requirements and running the whole pipeline
 * again (check, roots, floors), and the cause sentence is read against it. */
#include <criterion/criterion.h>
#include <gsl/gsl_rng.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "limits/floors.h"
#include "screen/attribution.h"
#include "screen/screen.h"
#include "support.h"

static ps_roots_ws *rws;
static ps_limits_ws *lws;
static ps_screen_ws *sws;

static void setup(void)
{
    ps_test_init();
    rws = ps_roots_ws_new();
    lws = ps_limits_ws_new();
    sws = ps_screen_ws_new();
}
static void teardown(void)
{
    ps_roots_ws_free(rws);
    ps_limits_ws_free(lws);
    ps_screen_ws_free(sws);
}
TestSuite(attribution, .init = setup, .fini = teardown);

/* A random plant in factored form: up to two real RHP poles or one RHP pair,
 * LHP poles, up to two real RHP zeros, LHP zeros; relative degree >= 1. */
typedef struct spec {
    ps_cplx zeros[8], poles[8];
    size_t nz, np;
    double gain, delay;
    ps_requirements req;
} spec;

static double uniform(gsl_rng *r, double lo, double hi) { return lo + (hi - lo) * gsl_rng_uniform(r); }

static void draw(gsl_rng *r, spec *s)
{
    memset(s, 0, sizeof *s);
    double p0 = exp(uniform(r, log(0.3), log(80.0)));
    int kind = (int)gsl_rng_uniform_int(r, 4); /* 0: none, 1: one real, 2: two real, 3: a pair */
    if (kind == 1 || kind == 2)
        s->poles[s->np++] = (ps_cplx){p0, 0};
    if (kind == 2)
        s->poles[s->np++] = (ps_cplx){p0 * uniform(r, 0.15, 0.8), 0};
    if (kind == 3) {
        double im = p0 * uniform(r, 0.3, 3.0);
        s->poles[s->np++] = (ps_cplx){p0 * 0.4, im};
        s->poles[s->np++] = (ps_cplx){p0 * 0.4, -im};
    }
    size_t nlhp = 1 + gsl_rng_uniform_int(r, 3);
    for (size_t i = 0; i < nlhp; i++)
        s->poles[s->np++] = (ps_cplx){-p0 * uniform(r, 0.2, 20.0), 0};
    size_t nrz = gsl_rng_uniform_int(r, 3) == 0 ? 0 : gsl_rng_uniform_int(r, 3);
    for (size_t j = 0; j < nrz && s->nz + 1 < s->np; j++)
        s->zeros[s->nz++] = (ps_cplx){p0 * exp(uniform(r, log(0.3), log(30.0))), 0};
    if (s->nz + 1 < s->np && gsl_rng_uniform(r) < 0.3)
        s->zeros[s->nz++] = (ps_cplx){-p0 * uniform(r, 0.5, 5.0), 0};
    s->gain = uniform(r, 0.5, 50.0) * (gsl_rng_uniform(r) < 0.5 ? -1 : 1);
    s->delay = gsl_rng_uniform(r) < 0.5 ? uniform(r, 0.0, 0.6) / p0 : 0.0;
    s->req.ms_allowed = uniform(r, 1.3, 3.0);
    s->req.mt_allowed = uniform(r, 1.1, 2.0);
    s->req.delta = gsl_rng_uniform(r) < 0.3 ? 0.0 : uniform(r, 0.1, 0.7);
    s->req.k = uniform(r, 0.5, 2.0);
    if (gsl_rng_uniform(r) < 0.85)
        s->req.wh = p0 * exp(uniform(r, log(1.5), log(60.0)));
    if (gsl_rng_uniform(r) < 0.45) {
        s->req.wb = (s->req.wh > 0 ? s->req.wh : 10 * p0) * uniform(r, 0.01, 0.5);
        s->req.eps = uniform(r, 0.05, 0.7);
    }
    if (gsl_rng_uniform(r) < 0.25)
        s->req.effort_allowed = uniform(r, 0.2, 20.0);
}

/* The whole pipeline on s: check, roots, floors. */
static void analyse(const spec *s, ps_plant *p, ps_analysis *an, ps_floors *fl)
{
    ps_plant_reset(p);
    snprintf(p->id, sizeof p->id, "r");
    memcpy(p->zeros, s->zeros, s->nz * sizeof *s->zeros);
    memcpy(p->poles, s->poles, s->np * sizeof *s->poles);
    p->n_zeros = s->nz;
    p->n_poles = s->np;
    p->gain = s->gain;
    p->delay = s->delay;
    p->present = (1u << PS_F_ID) | (1u << PS_F_ZEROS) | (1u << PS_F_POLES) | (1u << PS_F_GAIN);
    ps_diag d = {0};
    cr_assert_eq(ps_plant_check(p, &d), PS_OK, "%s", d.text);
    p->req = s->req;
    cr_assert_eq(ps_roots_analyse(rws, p, an, &d), PS_OK, "%s", d.text);
    ps_floors_compute(lws, an, &p->req, fl);
}

static double floor_of(const ps_floors *fl, ps_peak b)
{
    return b == PS_PEAK_MS ? fl->ms : b == PS_PEAK_MT ? fl->mt : fl->effort;
}

/* The same plant with one factor relaxed, written into the catalog entry
 * itself (not through the attribution code): delay 0; RHP zeros replaced by
 * their mirror images -conj z (same gain curve: |jw - z| = |jw + conj z|);
 * no roll-off start; no band. */
static double relaxed_here(const spec *s, ps_factor f, ps_peak b, ps_plant *p, ps_analysis *an)
{
    spec t = *s;
    switch (f) {
    case PS_FACTOR_DELAY: t.delay = 0; break;
    case PS_FACTOR_ZEROS:
        for (size_t j = 0; j < t.nz; j++)
            if (t.zeros[j].re > 0)
                t.zeros[j].re = -t.zeros[j].re;
        break;
    case PS_FACTOR_ROLLOFF: t.req.wh = 0; break;
    case PS_FACTOR_BAND: t.req.wb = 0; break;
    case PS_FACTOR_COMPUTE: /* the digital factors: these plants are continuous (present_in is false) */
    case PS_FACTOR_RATE:
    case PS_FACTOR_SAMPLING_ZEROS:
    case PS_FACTOR_COUNT: break;
    }
    ps_floors fl;
    analyse(&t, p, an, &fl);
    return floor_of(&fl, b);
}

/* Words that name each factor in a cause, and must not appear when the
 * plant lacks it. */
static const char *const factor_words[PS_FACTOR_COUNT] = {"delay", "RHP zero", "bandwidth", "band ",
                                                               "computation delay", "sample rate", "sampling zero"};

static bool present_in(const spec *s, ps_factor f)
{
    switch (f) {
    case PS_FACTOR_DELAY: return s->delay > 0;
    case PS_FACTOR_ZEROS:
        for (size_t j = 0; j < s->nz; j++)
            if (s->zeros[j].re > 0)
                return true;
        return false;
    case PS_FACTOR_ROLLOFF: return s->req.wh > 0;
    case PS_FACTOR_BAND: return s->req.wb > 0;
    case PS_FACTOR_COMPUTE:
    case PS_FACTOR_RATE:
    case PS_FACTOR_SAMPLING_ZEROS:
    case PS_FACTOR_COUNT: break;
    }
    return false;
}

/* A needs-bandwidth plant's cause says what is missing instead. */
static bool sentence_checked(const ps_summary *s)
{
    return s->verdict != PS_VERDICT_NEEDS_BANDWIDTH;
}

/* At least 2000 plants with a binding floor, from one seed. For each: the
 * first factor the cause names is the one whose relaxation, recomputed
 * here, lowers the binding floor most (within 1 %); every named factor's
 * recomputed counterfactual is below the floor; the sentence names no factor
 * the plant lacks and names the first factor before any other. */
Test(attribution, random_corpus_causes_match_recomputed_counterfactuals)
{
    gsl_rng *r = gsl_rng_alloc(gsl_rng_mt19937);
    gsl_rng_set(r, 20261204);
    static ps_plant p, p2;
    static ps_analysis an, an2;
    static ps_summary sum;
    ps_floors fl;
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_NONE};
    size_t judged = 0, first_counts[PS_FACTOR_COUNT] = {0}, none_named = 0;
    for (int draws = 0; judged < 2000 && draws < 20000; draws++) {
        spec s;
        draw(r, &s);
        analyse(&s, &p, &an, &fl);
        ps_outcome o = {"corpus", &p, &an, &fl, NULL, 0};
        memset(&sum, 0, sizeof sum);
        ps_screen_assess(sws, &o, &opt, &sum);
        const ps_attribution *a = &sum.attr;
        if (a->binding == PS_PEAK_NONE || !isfinite(a->floor) || sum.verdict == PS_VERDICT_UNSTABILIZABLE)
            continue;
        judged++;
        cr_assert_eq(a->floor, floor_of(&fl, a->binding), "draw %d", draws);
        double best = INFINITY;
        ps_factor best_f = PS_FACTOR_COUNT;
        double here[PS_FACTOR_COUNT];
        for (int f = 0; f < PS_FACTOR_COUNT; f++) {
            cr_assert_eq(a->present[f], present_in(&s, (ps_factor)f), "draw %d factor %d", draws, f);
            here[f] = NAN;
            if (!present_in(&s, (ps_factor)f)) {
                cr_assert(sentence_checked(&sum) == false || strstr(sum.cause, factor_words[f]) == NULL,
                          "draw %d: '%s' names absent %s", draws, sum.cause, factor_words[f]);
                continue;
            }
            here[f] = relaxed_here(&s, (ps_factor)f, a->binding, &p2, &an2);
            cr_assert(fabs(here[f] - a->without[f]) <= 1e-9 * fmax(1.0, fabs(here[f])),
                      "draw %d factor %d: %.17g here, %.17g attributed", draws, f, here[f], a->without[f]);
            if (here[f] < best) {
                best = here[f];
                best_f = (ps_factor)f;
            }
        }
        for (size_t i = 0; i < a->n_lowering; i++)
            cr_assert(here[a->order[i]] < a->floor, "draw %d: named factor %d does not lower the floor", draws,
                      a->order[i]);
        if (best < a->floor * (1 - PS_ATTR_RTOL)) {
            cr_assert_gt(a->n_lowering, 0, "draw %d: a factor lowers the floor but none is named", draws);
            ps_factor first = (ps_factor)a->order[0];
            cr_assert(here[first] <= best * 1.01 + 1e-12, "draw %d: first named %d (%.6g), best %d (%.6g)", draws,
                      first, here[first], best_f, best);
            first_counts[first]++;
            if (!sentence_checked(&sum))
                continue;
            /* the first factor is named first in the sentence */
            const char *at = strstr(sum.cause, factor_words[first] );
            cr_assert_not_null(at, "draw %d: '%s' misses %s", draws, sum.cause, factor_words[first]);
            for (size_t i = 1; i < a->n_lowering; i++) {
                const char *other = strstr(sum.cause, factor_words[a->order[i]]);
                cr_assert(other && other >= at, "draw %d: '%s' names %d before %d", draws, sum.cause, a->order[i],
                          first);
            }
            char fig[32];
            snprintf(fig, sizeof fig, "%.3g %s", a->without[first], first == PS_FACTOR_ROLLOFF ? "with" : "without");
            cr_assert_not_null(strstr(sum.cause, fig), "draw %d: '%s' lacks the figure '%s'", draws, sum.cause, fig);
        } else {
            cr_assert_eq(a->n_lowering, 0);
            none_named++;
        }
    }
    gsl_rng_free(r);
    cr_assert_geq(judged, 2000);
    /* the corpus exercises every factor of a continuous loop as the first
     * cause (those of the digital loop: test_sampled.c) */
    for (int f = 0; f <= PS_FACTOR_BAND; f++)
        cr_assert_gt(first_counts[f], 20, "factor %d first in only %zu plants", f, first_counts[f]);
    cr_log_info("%zu plants judged; first factor: delay %zu, zeros %zu, roll-off %zu, band %zu; none lowers %zu",
                judged, first_counts[0], first_counts[1], first_counts[2], first_counts[3], none_named);
}

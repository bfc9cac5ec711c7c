/* yield.h - statistics of a tolerance-yield study: confidence intervals for
 * a pass fraction k/n, and seeded random draws that do not depend on how the
 * samples are spread over threads. */
#ifndef PS_YIELD_H
#define PS_YIELD_H

#include <stddef.h>
#include <stdint.h>

#include "core/diag.h"

enum {
    /* Largest n for Clopper-Pearson: GSL 2.7.1's gsl_cdf_beta_Pinv did not
     * return within seconds at n = 3e6, k = n/2 (see yield.c). */
    PS_YIELD_TRIALS_MAX = 1000000
};

/* Index of the last sample a sampler can start: 2^32 - 2 (see
 * ps_yield_sampler_start). */
#define PS_YIELD_INDEX_MAX UINT64_C(4294967294)

typedef struct ps_interval {
    double lo, hi;
} ps_interval;

/* Wilson score interval for the success probability after k successes in n
 * trials, two-sided at confidence conf (0.95 for 95 %): z = the (1+conf)/2
 * normal quantile, centre (k + z^2/2)/(n + z^2). Exactly 0 below for k = 0
 * and 1 above for k = n. Returns PS_OK, or PS_ERR_INPUT (n = 0, k > n, conf
 * outside (0, 1)). OUT: out. */
ps_status ps_yield_wilson(size_t k, size_t n, double conf, ps_interval *out, ps_diag *d);

/* Clopper-Pearson ("exact") interval: lo = Beta^-1(a/2; k, n-k+1),
 * hi = Beta^-1(1-a/2; k+1, n-k) with a = 1 - conf; lo = 0 for k = 0 and
 * hi = 1 for k = n (the other end then in closed form). Returns PS_OK,
 * PS_ERR_INPUT (as Wilson, or n > PS_YIELD_TRIALS_MAX) or PS_ERR_NUMERIC
 * when no quantile could be found. OUT: out. */
ps_status ps_yield_clopper_pearson(size_t k, size_t n, double conf, ps_interval *out, ps_diag *d);

/* A random stream for tolerance samples (GSL's mt19937); one per thread.
 * NULL on no memory. ps_yield_sampler_free(NULL) is a no-op. */
typedef struct ps_yield_sampler ps_yield_sampler;
ps_yield_sampler *ps_yield_sampler_new(void);
void ps_yield_sampler_free(ps_yield_sampler *s);

/* Position s at the start of sample `index` of the run with `seed`. Every
 * sample has a stream of its own that depends on (seed, index) only, so the
 * samples may be computed in any order, by any number of threads, with the
 * same draws. Within a run the streams of indices 0..PS_YIELD_INDEX_MAX are
 * all different. Draw a sample's values in a fixed order (parameter order).
 * Returns PS_OK, or PS_ERR_INPUT when index > PS_YIELD_INDEX_MAX. */
ps_status ps_yield_sampler_start(ps_yield_sampler *s, uint64_t seed, uint64_t index, ps_diag *d);

/* The next draw of the current sample: normal(mean, sigma), or uniform on
 * [mean - half_width, mean + half_width). mean finite and sigma, half_width
 * finite and >= 0 (the catalog reader checks tolerances). */
double ps_yield_normal(ps_yield_sampler *s, double mean, double sigma);
double ps_yield_uniform(ps_yield_sampler *s, double mean, double half_width);

/* A tolerance distribution cut to a declared range [lo, hi] (lo may be
 * -INFINITY, hi INFINITY): the share of the distribution inside it, and the
 * mean and standard deviation of the truncated distribution (NAN when the
 * share is 0). Normal: Johnson, Kotz & Balakrishnan, Continuous Univariate
 * Distributions vol. 1, 2nd ed. (1994), ch. 13 (truncated normal). */
typedef struct ps_truncated {
    double mass, mean, sd;
} ps_truncated;
void ps_yield_normal_truncated(double mean, double sigma, double lo, double hi, ps_truncated *out);
void ps_yield_uniform_truncated(double mean, double half_width, double lo, double hi, ps_truncated *out);

/* Truncation by redrawing: the next draw of the current sample that lies in
 * [lo, hi], drawing again from the same stream while it does not, at most
 * max_tries draws in all. *rejected grows by the number of draws that fell
 * outside. Returns the draw, or NAN when none of max_tries was inside. */
double ps_yield_normal_in(ps_yield_sampler *s, double mean, double sigma, double lo, double hi, size_t max_tries,
                          size_t *rejected);
double ps_yield_uniform_in(ps_yield_sampler *s, double mean, double half_width, double lo, double hi,
                           size_t max_tries, size_t *rejected);

#endif

/* test_yield.c - Wilson and Clopper-Pearson intervals against scipy, published
 * examples and their defining equations; the seeded sampler's
 * reproducibility, order and thread independence, and its moments; draws
 * truncated to a range against scipy and the closed-form truncated mean. */
#include <criterion/criterion.h>
#include <gsl/gsl_cdf.h>
#include <gsl/gsl_randist.h>
#include <math.h>
#include <pthread.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

#include "family/yield.h"
#include "support.h"

TestSuite(yield, .init = ps_test_init);

typedef struct ci_case {
    size_t k, n;
    double cp_lo, cp_hi, w_lo, w_hi;
} ci_case;

/* From scipy 1.10.1 (Debian's python3), 95 %, printed once:
 * Clopper-Pearson columns:
 *   command -p python3 -c "from scipy.stats import beta;[print(k,n,repr(float(beta.ppf(0.025,k,n-k+1)) if k else 0.0),repr(float(beta.ppf(0.975,k+1,n-k)) if k<n else 1.0)) for k,n in [(81,263),(15,148),(0,20),(1,29),(5,25),(20,20),(1,1),(7,10),(31,1000),(5000,10000),(10,100000),(12345,100000),(1,1000000),(500000,1000000)]]"
 * Wilson columns (scipy's own Wilson code, not our formula):
 *   command -p python3 -c "from scipy.stats import binomtest as b;[print(k,n,*(repr(float(v)) for v in b(k,n).proportion_ci(0.95,'wilson'))) for k,n in [(81,263),(15,148),(0,20),(1,29),(5,25),(20,20),(1,1),(7,10),(31,1000),(5000,10000),(10,100000),(12345,100000),(1,1000000),(500000,1000000)]]"
 * 31/1000, 5000/10000 and 10/100000 are cases where GSL 2.7.1's beta
 * inversion returns NaN, so they exercise the bracketed fallback. */
static const ci_case cases[] = {
    {81, 263, 0.2527367455852713, 0.36762192260135146, 0.2552885198782742, 0.36620957698280004},
    {15, 148, 0.05784401008344857, 0.161650490349479, 0.06238639953073629, 0.16048724172330803},
    {0, 20, 0.0, 0.1684334709830853, 0.0, 0.16112515805281935},
    {1, 29, 0.000872646883579922, 0.1776442954887229, 0.006113214292762667, 0.17175521879320282},
    {5, 25, 0.06831146401248402, 0.4070374322786773, 0.08860584686802575, 0.39130950369540335},
    {20, 20, 0.8315665290169146, 1.0, 0.8388748419471808, 1.0},
    {1, 1, 0.025, 1.0, 0.20654931437723745, 1.0},
    {7, 10, 0.3475471499400027, 0.9332604888222655, 0.39677814746114526, 0.892208732593699},
    {31, 1000, 0.02115817197020863, 0.043715085006238906, 0.021924003447158568, 0.04366549601229214},
    {5000, 10000, 0.4901513805899815, 0.5098486194100185, 0.49020206181540477, 0.5097979381845952},
    {10, 100000, 4.7954895139011426e-05, 0.0001838958453766498, 5.432073450963089e-05, 0.00018408469545089213},
    {12345, 100000, 0.12141710670798048, 0.125504760848672, 0.12142561775452174, 0.12550331116056454},
    {1, 1000000, 2.5317807663794178e-08, 5.571630655166939e-06, 1.765245767453709e-07, 5.664911804311442e-06},
    {500000, 1000000, 0.49901951919531184, 0.5009804808046882, 0.4990200198900048, 0.5009799801099952},
};
enum { NCASES = sizeof cases / sizeof *cases };

static void expect_close(double got, double want, double rtol, const char *what, const ci_case *c)
{
    double err = want == 0.0 ? fabs(got) : fabs(got - want) / fabs(want);
    cr_expect(err <= rtol, "%s %zu/%zu: %.17g, scipy %.17g (rel %.2g > %.0e)", what, c->k, c->n, got, want, err,
              rtol);
}

/* GSL's beta functions and scipy's (Boost) agreed to 5e-11 on a grid of 826
 * cases up to n = 1e6; 1e-9 leaves room without hiding a wrong quantile. */
Test(yield, clopper_pearson_against_scipy)
{
    for (size_t i = 0; i < NCASES; i++) {
        const ci_case *c = &cases[i];
        ps_interval ci = {-1, -1};
        ps_diag d = {0};
        cr_assert_eq(ps_yield_clopper_pearson(c->k, c->n, 0.95, &ci, &d), PS_OK, "%zu/%zu: %s", c->k, c->n,
                     d.text);
        expect_close(ci.lo, c->cp_lo, 1e-9, "CP lo", c);
        expect_close(ci.hi, c->cp_hi, 1e-9, "CP hi", c);
    }
}

Test(yield, wilson_against_scipy)
{
    for (size_t i = 0; i < NCASES; i++) {
        const ci_case *c = &cases[i];
        ps_interval ci = {-1, -1};
        ps_diag d = {0};
        cr_assert_eq(ps_yield_wilson(c->k, c->n, 0.95, &ci, &d), PS_OK, "%s", d.text);
        expect_close(ci.lo, c->w_lo, 1e-13, "Wilson lo", c);
        expect_close(ci.hi, c->w_hi, 1e-13, "Wilson hi", c);
    }
}

/* command -p python3 -c "from scipy.stats import beta,binomtest as b;k,n=81,263;print(repr(float(beta.ppf(0.005,k,n-k+1))),repr(float(beta.ppf(0.995,k+1,n-k))),*(repr(float(v)) for v in b(k,n).proportion_ci(0.99,'wilson')))" */
Test(yield, other_confidence)
{
    ps_interval cp, w;
    ps_diag d = {0};
    cr_assert_eq(ps_yield_clopper_pearson(81, 263, 0.99, &cp, &d), PS_OK, "%s", d.text);
    cr_assert_eq(ps_yield_wilson(81, 263, 0.99, &w, &d), PS_OK);
    cr_expect_float_eq(cp.lo, 0.23683735816553914, 1e-10);
    cr_expect_float_eq(cp.hi, 0.386258325669745, 1e-10);
    cr_expect_float_eq(w.lo, 0.24013690268760768, 1e-14);
    cr_expect_float_eq(w.hi, 0.3852825023182298, 1e-14);
}

/* Published values, as printed (4 and 3 decimals). */
Test(yield, published_examples)
{
    /* Newcombe (1998), "Two-sided confidence intervals for the single
     * proportion: comparison of seven methods", Statist. Med. 17:857-872,
     * worked examples: method 3 (Wilson score) and method 5 (exact). */
    static const struct {
        size_t k, n;
        double w_lo, w_hi, cp_lo, cp_hi;
    } nc[] = {
        {81, 263, 0.2553, 0.3662, 0.2527, 0.3676},
        {15, 148, 0.0624, 0.1605, 0.0578, 0.1617},
        {0, 20, 0.0000, 0.1611, 0.0000, 0.1684},
        {1, 29, 0.0061, 0.1718, 0.0009, 0.1776},
    };
    for (size_t i = 0; i < sizeof nc / sizeof *nc; i++) {
        ps_interval w, cp;
        ps_diag d = {0};
        cr_assert_eq(ps_yield_wilson(nc[i].k, nc[i].n, 0.95, &w, &d), PS_OK);
        cr_assert_eq(ps_yield_clopper_pearson(nc[i].k, nc[i].n, 0.95, &cp, &d), PS_OK);
        cr_expect_float_eq(w.lo, nc[i].w_lo, 0.5e-4, "%zu/%zu", nc[i].k, nc[i].n);
        cr_expect_float_eq(w.hi, nc[i].w_hi, 0.5e-4, "%zu/%zu", nc[i].k, nc[i].n);
        cr_expect_float_eq(cp.lo, nc[i].cp_lo, 0.5e-4, "%zu/%zu", nc[i].k, nc[i].n);
        cr_expect_float_eq(cp.hi, nc[i].cp_hi, 0.5e-4, "%zu/%zu", nc[i].k, nc[i].n);
    }
    /* 5 of 25 seedlings: exact limits 0.068 to 0.407 from the tables of
     * Conover (1999), Practical Nonparametric Statistics, 3rd ed., as worked
     * in influentialpoints.com/Training/confidence_intervals_of_proportions.htm */
    ps_interval cp;
    ps_diag d = {0};
    cr_assert_eq(ps_yield_clopper_pearson(5, 25, 0.95, &cp, &d), PS_OK);
    cr_expect_float_eq(cp.lo, 0.068, 0.5e-3);
    cr_expect_float_eq(cp.hi, 0.407, 0.5e-3);
}

/* The defining equations, with no beta function: the Wilson bounds solve
 * (k/n - p)^2 = z^2 p (1-p) / n; the Clopper-Pearson bounds make the
 * binomial tails P(X >= k | lo) and P(X <= k | hi) equal to 0.025. */
static double binom_tail(size_t k, size_t n, double p, bool upper)
{
    double s = 0.0, lp = log(p), lq = log1p(-p), ln = lgamma((double)n + 1.0);
    size_t from = upper ? k : 0, to = upper ? n : k;
    for (size_t j = from; j <= to; j++)
        s += exp(ln - lgamma((double)j + 1.0) - lgamma((double)(n - j) + 1.0) + (double)j * lp +
                 (double)(n - j) * lq);
    return s;
}

Test(yield, defining_equations)
{
    const double z = 1.959963984540054; /* scipy.stats.norm.ppf(0.975) */
    for (size_t i = 0; i < NCASES; i++) {
        const ci_case *c = &cases[i];
        ps_interval w, cp;
        ps_diag d = {0};
        cr_assert_eq(ps_yield_wilson(c->k, c->n, 0.95, &w, &d), PS_OK);
        double n = (double)c->n, ph = (double)c->k / n;
        double b[2] = {w.lo, w.hi};
        for (int j = 0; j < 2; j++) {
            double lhs = (ph - b[j]) * (ph - b[j]), rhs = z * z * b[j] * (1.0 - b[j]) / n;
            cr_expect(fabs(lhs - rhs) <= 1e-12 * fmax(rhs, 1e-300), "Wilson %zu/%zu bound %d: %.17g vs %.17g",
                      c->k, c->n, j, lhs, rhs);
        }
        if (c->n > 10000)
            continue; /* the direct sums below get slow and lose digits */
        cr_assert_eq(ps_yield_clopper_pearson(c->k, c->n, 0.95, &cp, &d), PS_OK);
        if (c->k > 0)
            cr_expect_float_eq(binom_tail(c->k, c->n, cp.lo, true), 0.025, 0.025 * 1e-8, "CP lo %zu/%zu", c->k,
                               c->n);
        if (c->k < c->n)
            cr_expect_float_eq(binom_tail(c->k, c->n, cp.hi, false), 0.025, 0.025 * 1e-8, "CP hi %zu/%zu", c->k,
                               c->n);
    }
}

Test(yield, interval_inputs_refused)
{
    ps_interval ci = {-1, -1};
    ps_diag d = {0};
    cr_expect_eq(ps_yield_wilson(0, 0, 0.95, &ci, &d), PS_ERR_INPUT);
    cr_expect(strstr(d.text, "no trials") != NULL, "%s", d.text);
    cr_expect_eq(ps_yield_wilson(11, 10, 0.95, &ci, &d), PS_ERR_INPUT);
    cr_expect_eq(ps_yield_clopper_pearson(11, 10, 0.95, &ci, &d), PS_ERR_INPUT);
    const double bad_conf[] = {0.0, 1.0, -0.5, 95.0, NAN};
    for (size_t i = 0; i < sizeof bad_conf / sizeof *bad_conf; i++) {
        cr_expect_eq(ps_yield_wilson(3, 10, bad_conf[i], &ci, &d), PS_ERR_INPUT, "conf %g", bad_conf[i]);
        cr_expect_eq(ps_yield_clopper_pearson(3, 10, bad_conf[i], &ci, &d), PS_ERR_INPUT, "conf %g", bad_conf[i]);
    }
    cr_expect_eq(ps_yield_clopper_pearson(1, PS_YIELD_TRIALS_MAX + 1, 0.95, &ci, &d), PS_ERR_INPUT);
    cr_expect(strstr(d.text, "at most 1000000") != NULL, "%s", d.text);
    cr_expect(ci.lo == -1 && ci.hi == -1, "out untouched on failure");
    cr_expect_eq(ps_yield_wilson(1, 10000000, 0.95, &ci, &d), PS_OK, "Wilson has no such limit");
}

/* ---- sampler ---- */

enum { NDRAW = 5 };

/* The draws of one sample: three normals and two uniforms, in that order. */
static void draw_sample(ps_yield_sampler *s, uint64_t seed, uint64_t index, double *out)
{
    ps_diag d = {0};
    cr_assert_eq(ps_yield_sampler_start(s, seed, index, &d), PS_OK, "%s", d.text);
    out[0] = ps_yield_normal(s, 2.385, 0.073);
    out[1] = ps_yield_normal(s, -19.6, 0.98);
    out[2] = ps_yield_normal(s, 0.475, 0.0);
    out[3] = ps_yield_uniform(s, 1.2, 0.06);
    out[4] = ps_yield_uniform(s, 9.81, 0.0);
}

enum { NS = 2000 };
static double serial[NS][NDRAW];

static void fill_serial(uint64_t seed)
{
    ps_yield_sampler *s = ps_yield_sampler_new();
    cr_assert_not_null(s);
    for (size_t i = 0; i < NS; i++)
        draw_sample(s, seed, i, serial[i]);
    ps_yield_sampler_free(s);
}

Test(yield, same_seed_same_draws)
{
    fill_serial(2385);
    ps_yield_sampler *s = ps_yield_sampler_new();
    double again[NDRAW];
    for (size_t i = 0; i < NS; i++) {
        draw_sample(s, 2385, i, again);
        cr_assert(memcmp(again, serial[i], sizeof again) == 0, "sample %zu differs", i);
    }
    /* Zero spread gives the mean exactly. */
    cr_expect_eq(serial[17][2], 0.475);
    cr_expect_eq(serial[17][4], 9.81);
    ps_yield_sampler_free(s);
    ps_yield_sampler_free(NULL);
}

Test(yield, any_order_same_draws)
{
    fill_serial(77);
    ps_yield_sampler *s = ps_yield_sampler_new(), *other = ps_yield_sampler_new();
    double got[NDRAW], junk[NDRAW];
    for (size_t r = 0; r < NS; r++) { /* reverse order, another run interleaved */
        size_t i = NS - 1 - r;
        draw_sample(other, 78, r, junk);
        draw_sample(s, 77, i, got);
        cr_assert(memcmp(got, serial[i], sizeof got) == 0, "sample %zu differs in reverse order", i);
    }
    for (size_t r = 0; r < NS; r++) { /* a stride through the indices, NS and 1999*7 coprime */
        size_t i = (r * 1999 * 7) % NS;
        draw_sample(s, 77, i, got);
        cr_assert(memcmp(got, serial[i], sizeof got) == 0, "sample %zu differs in stride order", i);
    }
    ps_yield_sampler_free(s);
    ps_yield_sampler_free(other);
}

typedef struct share {
    size_t first, step;
    double (*out)[NDRAW];
} share;

static void *draw_share(void *arg)
{
    share *sh = arg;
    ps_yield_sampler *s = ps_yield_sampler_new();
    if (!s)
        return NULL;
    for (size_t i = sh->first; i < NS; i += sh->step) {
        ps_diag d;
        if (ps_yield_sampler_start(s, 77, i, &d) != PS_OK)
            break;
        sh->out[i][0] = ps_yield_normal(s, 2.385, 0.073);
        sh->out[i][1] = ps_yield_normal(s, -19.6, 0.98);
        sh->out[i][2] = ps_yield_normal(s, 0.475, 0.0);
        sh->out[i][3] = ps_yield_uniform(s, 1.2, 0.06);
        sh->out[i][4] = ps_yield_uniform(s, 9.81, 0.0);
    }
    ps_yield_sampler_free(s);
    return NULL;
}

Test(yield, thread_count_does_not_matter)
{
    fill_serial(77);
    static double threaded[NS][NDRAW];
    for (size_t nt = 2; nt <= 3; nt++) {
        memset(threaded, 0, sizeof threaded);
        pthread_t t[3];
        share sh[3];
        for (size_t j = 0; j < nt; j++) {
            sh[j] = (share){.first = j, .step = nt, .out = threaded};
            cr_assert_eq(pthread_create(&t[j], NULL, draw_share, &sh[j]), 0);
        }
        for (size_t j = 0; j < nt; j++)
            pthread_join(t[j], NULL);
        cr_expect(memcmp(threaded, serial, sizeof serial) == 0, "%zu threads drew differently", nt);
    }
}

static int cmp_pair(const void *a, const void *b)
{
    const double *x = a, *y = b;
    return x[0] < y[0] ? -1 : x[0] > y[0] ? 1 : x[1] < y[1] ? -1 : x[1] > y[1] ? 1 : 0;
}

/* Every sample of a run has its own stream: no two of 1e5 start alike. (A
 * stream seed hashed to 32 bits would repeat about once among 1e5 samples.) */
Test(yield, streams_differ)
{
    enum { N = 100000 };
    double(*first)[2] = malloc(N * sizeof *first);
    ps_yield_sampler *s = ps_yield_sampler_new();
    cr_assert(first && s);
    ps_diag d;
    for (size_t i = 0; i < N; i++) {
        cr_assert_eq(ps_yield_sampler_start(s, 4357, i, &d), PS_OK);
        first[i][0] = ps_yield_uniform(s, 0.5, 0.5);
        first[i][1] = ps_yield_uniform(s, 0.5, 0.5);
    }
    qsort(first, N, sizeof *first, cmp_pair);
    size_t same = 0;
    for (size_t i = 1; i < N; i++)
        same += first[i][0] == first[i - 1][0] && first[i][1] == first[i - 1][1];
    cr_expect_eq(same, 0, "%zu samples share a stream", same);

    /* Other seeds give other draws, seed 0 included (GSL's gsl_rng_set
     * would turn a raw 0 into 4357). */
    double a, b, c;
    ps_yield_sampler_start(s, 0, 0, &d);
    a = ps_yield_uniform(s, 0.5, 0.5);
    ps_yield_sampler_start(s, 4357, 0, &d);
    b = ps_yield_uniform(s, 0.5, 0.5);
    ps_yield_sampler_start(s, 1, 0, &d);
    c = ps_yield_uniform(s, 0.5, 0.5);
    cr_expect(a != b && a != c && b != c);

    cr_expect_eq(ps_yield_sampler_start(s, 1, PS_YIELD_INDEX_MAX, &d), PS_OK);
    cr_expect_eq(ps_yield_sampler_start(s, 1, PS_YIELD_INDEX_MAX + 1, &d), PS_ERR_INPUT);
    ps_yield_sampler_free(s);
    free(first);
}

/* Moments of 1e5 draws, one per sample (the way a yield study draws) and
 * all from one sample's stream: within 5 standard errors. */
static void moments(const double *x, size_t n, double *mean, double *var)
{
    double m = 0.0, v = 0.0;
    for (size_t i = 0; i < n; i++)
        m += x[i];
    m /= (double)n;
    for (size_t i = 0; i < n; i++)
        v += (x[i] - m) * (x[i] - m);
    *mean = m;
    *var = v / (double)(n - 1);
}

Test(yield, moments)
{
    enum { N = 100000 };
    const double mu = 2.385, sigma = 0.73, c = -19.6, h = 0.475;
    double *xn = malloc(N * sizeof *xn), *xu = malloc(N * sizeof *xu), *yn = malloc(N * sizeof *yn);
    ps_yield_sampler *s = ps_yield_sampler_new();
    cr_assert(xn && xu && yn && s);
    ps_diag d;
    for (size_t i = 0; i < N; i++) {
        ps_yield_sampler_start(s, 31337, i, &d);
        xn[i] = ps_yield_normal(s, mu, sigma);
        xu[i] = ps_yield_uniform(s, c, h);
        cr_expect(xu[i] >= c - h && xu[i] < c + h, "uniform draw %.17g outside", xu[i]);
    }
    ps_yield_sampler_start(s, 31337, 0, &d);
    for (size_t i = 0; i < N; i++)
        yn[i] = ps_yield_normal(s, mu, sigma);

    double m, v, rn = sqrt((double)N);
    moments(xn, N, &m, &v);
    cr_expect(fabs(m - mu) < 5 * sigma / rn, "normal mean %.6g", m);
    cr_expect(fabs(v - sigma * sigma) < 5 * sigma * sigma * sqrt(2.0 / N), "normal variance %.6g", v);
    moments(yn, N, &m, &v);
    cr_expect(fabs(m - mu) < 5 * sigma / rn, "one-stream normal mean %.6g", m);
    cr_expect(fabs(v - sigma * sigma) < 5 * sigma * sigma * sqrt(2.0 / N), "one-stream variance %.6g", v);
    /* uniform: variance h^2/3; the sample variance has variance 4 h^4 / (45 n) */
    moments(xu, N, &m, &v);
    cr_expect(fabs(m - c) < 5 * h / sqrt(3.0) / rn, "uniform mean %.6g", m);
    cr_expect(fabs(v - h * h / 3) < 5 * sqrt(4 * pow(h, 4) / 45 / N), "uniform variance %.6g", v);

    /* Neighbouring samples are uncorrelated: lag-1 correlation of the
     * first draws, standard error 1/sqrt(n). */
    double mx, vx, r = 0.0;
    moments(xn, N, &mx, &vx);
    for (size_t i = 1; i < N; i++)
        r += (xn[i] - mx) * (xn[i - 1] - mx);
    r /= (double)(N - 1) * vx;
    cr_expect(fabs(r) < 5 / rn, "lag-1 correlation %.4g", r);
    ps_yield_sampler_free(s);
    free(xn);
    free(xu);
    free(yn);
}

/* ---- truncation to a declared range ------------------------------------------ */

typedef struct trunc_case {
    double mu, sigma, lo, hi;
    double mass, mean, sd;
} trunc_case;

/* scipy 1.10.1 (Debian's python3), printed once:
 *   command -p python3 -c "from scipy.stats import truncnorm, norm
 *   for mu,s,lo,hi in [(0.006,0.003,0.0,float('inf')),(2.385,0.73,1.9,3.1),(-19.6,0.98,float('-inf'),-20.1),
 *                      (0.475,0.2,0.9,float('inf'))]:
 *       a,b=(lo-mu)/s,(hi-mu)/s; d=truncnorm(a,b,loc=mu,scale=s)
 *       print(repr(float(norm.sf(a)-norm.sf(b))),repr(float(d.mean())),repr(float(d.std())))"
 * (a lower cut only, both cuts, an upper cut only, a cut 2.1 sigma above the mean). */
static const trunc_case tcases[] = {
    {0.006, 0.003, 0.0, INFINITY, 0.9772498680518208, 0.00616574358803697, 0.002824547315022854},
    {2.385, 0.73, 1.9, 3.1, 0.5830992406966097, 2.476380622277126, 0.3305219210435062},
    {-19.6, 0.98, -INFINITY, -20.1, 0.30495424647969993, -20.725579689149985, 0.5062215008748845},
    {0.475, 0.2, 0.9, INFINITY, 0.016793306448448803, 0.9718763642158434, 0.06547009603916877},
};

Test(yield, truncated_normal_moments_against_scipy)
{
    for (size_t i = 0; i < sizeof tcases / sizeof *tcases; i++) {
        const trunc_case *c = &tcases[i];
        ps_truncated t;
        ps_yield_normal_truncated(c->mu, c->sigma, c->lo, c->hi, &t);
        cr_expect(fabs(t.mass - c->mass) <= 1e-12 * c->mass, "case %zu mass %.17g, scipy %.17g", i, t.mass, c->mass);
        cr_expect(fabs(t.mean - c->mean) <= 1e-12 * fabs(c->mean), "case %zu mean %.17g, scipy %.17g", i, t.mean,
                  c->mean);
        cr_expect(fabs(t.sd - c->sd) <= 1e-9 * c->sd, "case %zu sd %.17g, scipy %.17g", i, t.sd, c->sd);
    }
    /* No cut: the distribution itself. */
    ps_truncated t;
    ps_yield_normal_truncated(2.385, 0.73, -INFINITY, INFINITY, &t);
    cr_expect(t.mass == 1.0 && t.mean == 2.385 && fabs(t.sd - 0.73) < 1e-15, "%g %g %g", t.mass, t.mean, t.sd);
    /* Uniform: the overlap, its midpoint and width / sqrt 12. */
    ps_yield_uniform_truncated(1.2, 0.06, 1.185, INFINITY, &t);
    cr_expect(fabs(t.mass - 0.075 / 0.12) < 1e-14 && fabs(t.mean - 1.2225) < 1e-14 &&
                  fabs(t.sd - 0.075 / sqrt(12.0)) < 1e-15,
              "uniform %.17g %.17g %.17g", t.mass, t.mean, t.sd);
    ps_yield_uniform_truncated(1.2, 0.06, 1.3, 1.4, &t);
    cr_expect(t.mass == 0.0 && isnan(t.mean) && isnan(t.sd));
}

/* Redrawn normal draws, one unit per sample as a yield study draws: every
 * draw inside [0, inf); their mean against the closed form of a lower cut,
 * mu + sigma phi(a) / (1 - Phi(a)), a = (0 - mu)/sigma (Johnson, Kotz &
 * Balakrishnan, Continuous Univariate Distributions vol. 1, 2nd ed., ch. 13;
 * scipy's truncnorm gives 0.00616574358803697, table above), within 5
 * standard errors sd / sqrt(n) of the truncated distribution (a correct
 * sampler fails that with probability 6e-7; the seed makes it one fixed
 * outcome). Without truncation the mean would be mu = 0.006, 12 standard
 * errors away. The rejected draws: negative binomial, mean n q / (1 - q),
 * standard deviation sqrt(n q) / (1 - q), q = Phi(a); within 5 of those. */
Test(yield, redrawn_normal_draws_follow_the_truncated_normal)
{
    enum { N = 100000 };
    const double mu = 0.006, sigma = 0.003;
    ps_yield_sampler *s = ps_yield_sampler_new();
    cr_assert_not_null(s);
    ps_diag d;
    double sum = 0, least = INFINITY;
    size_t rejected = 0;
    for (size_t i = 0; i < N; i++) {
        ps_yield_sampler_start(s, 2385, i, &d);
        double x = ps_yield_normal_in(s, mu, sigma, 0.0, INFINITY, 10000, &rejected);
        cr_assert(x >= 0.0, "draw %zu: %.17g", i, x);
        sum += x;
        least = fmin(least, x);
    }
    double a = (0.0 - mu) / sigma, q = gsl_cdf_ugaussian_P(a);
    double want = mu + sigma * gsl_ran_ugaussian_pdf(a) / (1 - q);
    cr_assert(fabs(want - tcases[0].mean) < 1e-15, "closed form %.17g, scipy %.17g", want, tcases[0].mean);
    double se = tcases[0].sd / sqrt((double)N), mean = sum / N;
    cr_expect(fabs(mean - want) < 5 * se, "mean %.9g, truncated normal %.9g (5 se = %.3g)", mean, want, 5 * se);
    cr_expect(fabs(mean - mu) > 10 * se, "the draws are not the untruncated normal");
    double er = N * q / (1 - q), sr = sqrt(N * q) / (1 - q);
    cr_expect(fabs((double)rejected - er) < 5 * sr, "%zu rejected, expected %.0f +- %.0f", rejected, er, sr);
    /* A range the stream cannot reach in the tries allowed: NAN, every try counted. */
    size_t before = rejected;
    ps_yield_sampler_start(s, 2385, 0, &d);
    cr_expect(isnan(ps_yield_normal_in(s, mu, sigma, 1.0, 2.0, 50, &rejected)));
    cr_expect_eq(rejected - before, 50);
    /* Uniform draws inside [1.185, inf) only. */
    for (size_t i = 0; i < 1000; i++) {
        ps_yield_sampler_start(s, 77, i, &d);
        double x = ps_yield_uniform_in(s, 1.2, 0.06, 1.185, INFINITY, 10000, &rejected);
        cr_assert(x >= 1.185 && x < 1.26, "uniform draw %.17g", x);
    }
    ps_yield_sampler_free(s);
}

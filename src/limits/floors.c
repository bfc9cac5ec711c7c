/* floors.c - requirement-free floors of one plant (see floors.h). */
#include "limits/floors.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "core/complex_make.h"
#include "limits/sampled.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

enum { NP = PS_MAX_ORDER };

static inline double complex cx(ps_cplx a) { return ps_complex_make(a.re, a.im); }

/* A floor with its natural logarithm (ps_floors): the value may overflow a
 * double (+INFINITY) while the logarithm stays finite. */
typedef struct big {
    double v, ln;
} big;

static big big_val(double v) { return (big){v, log(v)}; }
static big big_exp(double ln) { return (big){exp(ln), ln}; }
/* A value computed directly, with its logarithm computed apart for when it overflowed. */
static big big_pair(double v, double ln) { return isfinite(v) || isnan(v) ? big_val(v) : (big){v, ln}; }

/* fmax of two floors: by value while both are finite (exactly fmax), else
 * by logarithm; a NAN loses, as with fmax. */
static big big_max(big a, big b)
{
    if (isnan(a.v))
        return b;
    if (isnan(b.v))
        return a;
    if (isfinite(a.v) && isfinite(b.v))
        return a.v >= b.v ? a : b;
    return a.ln >= b.ln ? a : b;
}

/* Interpolation data whose modulus exceeds e^SCALE_LN are scaled by their
 * largest modulus before the Pick matrices are formed (whose entries hold
 * products of two data values): the Pick value scales with a common factor
 * of the data, gamma(c w) = |c| gamma(w), so ln gamma = ln|c| + ln gamma(w/c). */
#define SCALE_LN 230.0

/* RHP roots as plain values (multiplicity kept: each member once). */
static size_t rhp(const ps_root *r, size_t n, ps_cplx *out)
{
    size_t k = 0;
    for (size_t i = 0; i < n; i++)
        if (r[i].region == PS_RHP)
            out[k++] = r[i].v;
    return k;
}

/* Are the points distinct (no repeated RHP root)? Points closer than
 * PS_MERGE_RTOL (relative) count as one point of higher multiplicity. */
static bool same_point(ps_cplx a, ps_cplx b)
{
    return cabs(cx(a) - cx(b)) <= PS_MERGE_RTOL * fmax(1.0, cabs(cx(a)));
}

static bool distinct(const ps_cplx *s, size_t n)
{
    for (size_t i = 0; i < n; i++)
        for (size_t j = i + 1; j < n; j++)
            if (same_point(s[i], s[j]))
                return false;
    return true;
}

/* Group points into distinct ones with multiplicities (mean of the members). */
static size_t group(const ps_cplx *s, size_t n, ps_cplx *g, unsigned *mult)
{
    size_t ng = 0;
    for (size_t i = 0; i < n; i++) {
        size_t k = 0;
        while (k < ng && !same_point(g[k], s[i]))
            k++;
        if (k == ng) {
            g[ng] = s[i];
            mult[ng++] = 1;
        } else {
            g[k].re = (g[k].re * mult[k] + s[i].re) / (mult[k] + 1);
            g[k].im = (g[k].im * mult[k] + s[i].im) / (mult[k] + 1);
            mult[k]++;
        }
    }
    return ng;
}

/* Truncated power series in u = s - s0, m coefficients (m <= NP). */
static void ser_one(double complex *a, unsigned m)
{
    a[0] = 1;
    for (unsigned k = 1; k < m; k++)
        a[k] = 0;
}

/* a *= (b + u), b = s0 - c for a factor (s - c). */
static void ser_mul_lin(double complex *a, unsigned m, double complex b)
{
    for (unsigned k = m; k-- > 0;)
        a[k] = b * a[k] + (k ? a[k - 1] : 0);
}

/* a /= (b + u), b != 0. */
static void ser_div_lin(double complex *a, unsigned m, double complex b)
{
    for (unsigned k = 0; k < m; k++)
        a[k] = (a[k] - (k ? a[k - 1] : 0)) / b;
}

/* a *= e^{theta s - shift} = e^{theta s0 - shift} sum (theta u)^k / k!. */
static void ser_mul_exp(double complex *a, unsigned m, double complex s0, double theta, double shift)
{
    double complex e[NP], out[NP];
    e[0] = cexp(theta * s0 - shift);
    for (unsigned k = 1; k < m; k++)
        e[k] = e[k - 1] * theta / k;
    for (unsigned k = 0; k < m; k++) {
        out[k] = 0;
        for (unsigned i = 0; i <= k; i++)
            out[k] += e[i] * a[k - i];
    }
    for (unsigned k = 0; k < m; k++)
        a[k] = out[k];
}

/* The functions interpolated at repeated points (docs/method.md "Floors"):
 * T at the RHP poles: e^{theta s} / B_z(s); S at the RHP zeros: 1 / B_p(s);
 * effort at the RHP poles: e^{theta s} / G_s(s). */
enum interp_kind { AT_POLES_T, AT_ZEROS_S, AT_POLES_EFFORT };

static void taylor(enum interp_kind kind, const ps_analysis *an, const ps_cplx *z, size_t nz,
                   const ps_cplx *p, size_t np, double complex s0, unsigned m, double shift, double complex *a)
{
    ser_one(a, m);
    if (kind == AT_ZEROS_S) {
        for (size_t i = 0; i < np; i++) {
            ser_mul_lin(a, m, s0 + conj(cx(p[i])));
            ser_div_lin(a, m, s0 - cx(p[i]));
        }
        return;
    }
    ser_mul_exp(a, m, s0, an->delay, shift);
    if (kind == AT_POLES_T) {
        for (size_t j = 0; j < nz; j++) {
            ser_mul_lin(a, m, s0 + conj(cx(z[j])));
            ser_div_lin(a, m, s0 - cx(z[j]));
        }
        return;
    }
    for (size_t i = 0; i < an->n_poles; i++) {
        double complex q = cx(an->poles[i].v);
        ser_mul_lin(a, m, an->poles[i].region == PS_RHP ? s0 + conj(q) : s0 - q);
    }
    for (size_t j = 0; j < an->n_zeros; j++)
        ser_div_lin(a, m, s0 - cx(an->zeros[j].v));
    for (unsigned k = 0; k < m; k++)
        a[k] /= an->gain;
}

/* Confluent Pick value for repeated points. The delay's factor
 * e^{theta s} is scaled by e^{-shift} when it could overflow (SCALE_LN). */
static ps_status confluent(ps_limits_ws *ws, enum interp_kind kind, const ps_analysis *an, const ps_cplx *z,
                           size_t nz, const ps_cplx *p, size_t np, big *out, double *cond, ps_diag *d)
{
    const ps_cplx *pts = kind == AT_ZEROS_S ? z : p;
    size_t npts = kind == AT_ZEROS_S ? nz : np;
    ps_cplx g[NP] = {{0, 0}}, data[NP] = {{0, 0}}; /* zeroed: the compiler cannot see that ng > 0 fills them */
    unsigned mult[NP] = {0};
    size_t ng = group(pts, npts, g, mult), at = 0;
    double top = 0.0;
    for (size_t k = 0; kind != AT_ZEROS_S && k < ng; k++)
        top = fmax(top, an->delay * g[k].re);
    double shift = top > SCALE_LN ? top : 0.0, gamma;
    for (size_t k = 0; k < ng; k++) {
        double complex a[NP];
        taylor(kind, an, z, nz, p, np, cx(g[k]), mult[k], shift, a);
        for (unsigned i = 0; i < mult[k]; i++)
            data[at++] = (ps_cplx){creal(a[i]), cimag(a[i])};
    }
    ps_status st = ps_pick_confluent(ws, g, mult, ng, data, &gamma, cond, d);
    if (st == PS_OK)
        *out = shift > 0 ? big_exp(shift + log(gamma)) : big_val(gamma);
    return st;
}

/* The Pick value at distinct points s for data w, given also as log-modulus
 * lm and phase ph: w is used as it is unless its modulus could overflow, then
 * the data are rebuilt from lm and ph scaled by the largest modulus. */
static ps_status pick_big(ps_limits_ws *ws, const ps_cplx *s, ps_cplx *w, const double *lm, const double *ph, size_t n,
                          big *out, double *cond, ps_diag *d)
{
    double top = -INFINITY, gamma;
    for (size_t i = 0; i < n; i++)
        top = fmax(top, lm[i]);
    bool scaled = top > SCALE_LN && isfinite(top);
    if (scaled)
        for (size_t i = 0; i < n; i++) {
            double m = exp(lm[i] - top);
            w[i] = (ps_cplx){m * cos(ph[i]), m * sin(ph[i])};
        }
    ps_status st = ps_pick_gamma(ws, s, w, n, &gamma, cond, d);
    if (st == PS_OK)
        *out = scaled ? big_exp(top + log(gamma)) : big_val(gamma);
    return st;
}

/* G_s(p) = k prod(p - z) / [prod_{non-RHP poles}(p - q) prod_{RHP i}(p + conj p_i)]:
 * the stable mirror of the plant, evaluated at an RHP pole (S&P 2nd ed. ch. 5). */
static double complex mirror_at(const ps_analysis *an, double complex p)
{
    double complex v = an->gain;
    for (size_t j = 0; j < an->n_zeros; j++)
        v *= p - cx(an->zeros[j].v);
    for (size_t i = 0; i < an->n_poles; i++) {
        double complex q = cx(an->poles[i].v);
        v /= an->poles[i].region == PS_RHP ? p + conj(q) : p - q;
    }
    return v;
}

/* Parity interlacing (Youla, Bongiorno & Lu, Automatica 10, 1974): a plant
 * is stabilizable by a stable controller iff between every pair of real
 * zeros in [0, +inf] lies an even number of real poles (with multiplicity).
 * +inf counts as a zero for a strictly proper plant, and for a delay
 * (e^{-s theta} -> 0 along the positive real axis). */
static bool parity_interlacing(const ps_analysis *an)
{
    double zr[NP + 1];
    size_t n = 0;
    for (size_t j = 0; j < an->n_zeros; j++)
        if (an->zeros[j].v.im == 0 && an->zeros[j].region != PS_LHP)
            zr[n++] = fmax(an->zeros[j].v.re, 0.0);
    if (an->rel_degree > 0 || an->delay > 0)
        zr[n++] = INFINITY;
    for (size_t i = 1; i < n; i++) /* insertion sort: n is small */
        for (size_t k = i; k > 0 && zr[k - 1] > zr[k]; k--) {
            double t = zr[k];
            zr[k] = zr[k - 1];
            zr[k - 1] = t;
        }
    for (size_t k = 0; k + 1 < n; k++) {
        unsigned count = 0;
        for (size_t i = 0; i < an->n_poles; i++) {
            const ps_root *q = &an->poles[i];
            if (q->v.im == 0 && q->region != PS_LHP && q->v.re > zr[k] && q->v.re < zr[k + 1])
                count++;
        }
        if (count % 2)
            return false;
    }
    return true;
}

/* Does the plant alone force S = 1 somewhere on the closed right half plane
 * or at infinity, so that ||S|| >= 1 for every stabilizing controller
 * (interpolation constraints, S&P 2nd ed. 2005, ch. 5)? S(z) = 1 at an RHP
 * zero (maximum modulus) and at a zero on the imaginary axis; S -> 1 at high
 * frequency when the plant is strictly proper; with a delay and a biproper
 * loop, sup |S| >= 1/(1 - |L(inf)|) >= 1 (a stable neutral loop has
 * |L(inf)| < 1). Otherwise (biproper, no delay, every zero in the LHP) a high
 * gain C = k sends the closed-loop poles to the plant's zeros and ||S|| to 0. */
static bool s_forced_one(const ps_analysis *an, size_t nz)
{
    if (nz > 0 || an->rel_degree >= 1 || an->delay > 0)
        return true;
    for (size_t j = 0; j < an->n_zeros; j++)
        if (an->zeros[j].region == PS_AXIS)
            return true;
    return false;
}

/* A fallback note: what was not computed, why (the diagnostic, cut to width)
 * and what is shown instead. Without room (the requirement half may append
 * ROLLOFF_NOTE) the why is left out, so that the appended sentence fits. */
#define FALLBACK_TAIL ": single-point products shown"
static void note_fallback(ps_floors *out, const char *what, const char *why, int width, bool room)
{
    if (room)
        snprintf(out->note, sizeof out->note, "%s (%.*s)" FALLBACK_TAIL, what, width, why);
    else
        snprintf(out->note, sizeof out->note, "%s" FALLBACK_TAIL, what);
}

/* Appended to the note when Ms >= 1 comes from the roll-off requirement
 * alone (see overall()). */
#define ROLLOFF_NOTE "Ms >= 1 assumes the roll-off requirement: the loop is strictly proper, so S -> 1"
#define LONGEST_PLANT_NOTE_WITHOUT_ROOM "repeated RHP roots, joint floor not computed" FALLBACK_TAIL
_Static_assert(sizeof LONGEST_PLANT_NOTE_WITHOUT_ROOM - 1 + 2 + sizeof ROLLOFF_NOTE <= sizeof((ps_floors *)0)->note,
               "the roll-off sentence fits after every plant note written without room");

static void sampled_plant(ps_limits_ws *ws, const ps_analysis *an, ps_floors *out);

/* Above this many RHP zeros (with multiplicity) and more zeros than poles,
 * the joint floor without delay is taken from the poles' problem alone. */
enum { CONFLUENT_ZEROS_MAX = 8 };

void ps_floors_plant(ps_limits_ws *ws, const ps_analysis *an, ps_floors *out)
{
    if (an->h > 0) {
        sampled_plant(ws, an, out);
        return;
    }
    ps_cplx p[NP], z[NP], w[NP];
    size_t np = rhp(an->poles, an->n_poles, p), nz = rhp(an->zeros, an->n_zeros, z);
    double theta = an->delay;
    memset(out, 0, sizeof *out);
    out->bode_area = ps_bode_area(p, np);
    out->cond = 1.0;
    ps_diag d = {0};

    /* The value 1 is a floor only where S or T is forced to 1 (S&P 2nd ed.
     * 2005, ch. 5): T(p) = 1 at an RHP pole and T(jw0) = 1 at a pole on the
     * imaginary axis; for S see s_forced_one. Without such a point the plant
     * forces nothing (a stable plant: C = 0 gives T = 0), and the floor is 0.
     * ps_ms_single and ps_mt_single return 1 when there is no point, so they
     * are used only with one. */
    bool s_one = s_forced_one(an, nz), t_one = np > 0 || an->n_axis_poles > 0;
    big ms_single = nz ? big_exp(ps_ms_single_ln(z, nz, p, np)) : big_val(s_one ? 1.0 : 0.0);
    big mt_single = np ? big_exp(ps_mt_single_ln(z, nz, p, np, theta)) : big_val(t_one ? 1.0 : 0.0);
    /* Infinite only for an exact cancellation (a zero divisor in a product);
     * a product too large for a double has a finite logarithm. */
    out->infinite = ms_single.ln == INFINITY || mt_single.ln == INFINITY;
    bool ok_points = distinct(p, np) && distinct(z, nz);
    big ms_i = {NAN, NAN}, mt_i = {NAN, NAN};
    if (out->infinite) {
        out->ms_route = out->mt_route = PS_ROUTE_INFINITE;
        ms_i = mt_i = big_val(INFINITY);
        snprintf(out->note, sizeof out->note, "%s",
                 an->hidden_unstable ? "hidden unstable mode: no controller can stabilize this plant"
                                     : "an RHP zero coincides with an RHP pole");
    } else if (np == 0) {
        ms_i = ms_single; /* 1 or 0: nothing to interpolate against */
        mt_i = mt_single;
    } else if (!ok_points) {
        out->mt_route = PS_ROUTE_CONFLUENT;
        out->ms_route = theta > 0 ? PS_ROUTE_EQUAL_MT : nz > 0 ? PS_ROUTE_CONFLUENT : PS_ROUTE_NONE;
        /* Repeated RHP roots: derivative conditions at each repeated point
         * (confluent Pick). Without delay the floor on ||S|| is the Pick value
         * at the zeros, which equals the one at the poles (Chen's equality). */
        big g = big_val(1.0);
        double c1 = 1.0, c2 = 1.0;
        ps_status st = confluent(ws, AT_POLES_T, an, z, nz, p, np, &g, &c1, &d);
        if (st == PS_OK) {
            mt_i = big_max(g, mt_single);
            ms_i = theta > 0 ? mt_i : ms_single;
            big gz;
            if (theta == 0 && nz > 0) {
                /* Without delay both problems give the one joint floor (Chen's
                 * equality); they differ by rounding only, and a zero close to
                 * a repeated one (a zero near z = infinity in a sampled loop)
                 * makes the problem at the zeros the worse conditioned: the
                 * better one is taken for both. */
                /* A large problem at the zeros (many zeros at z = infinity: a
                 * long delay in samples) costs far more than the one at the
                 * poles and is the worse conditioned: it is not formed. */
                bool zeros_side = nz <= CONFLUENT_ZEROS_MAX || nz <= np;
                if (zeros_side && confluent(ws, AT_ZEROS_S, an, z, nz, p, np, &gz, &c2, &d) == PS_OK &&
                    c2 <= 10 * c1) {
                    ms_i = big_max(gz, ms_single);
                    mt_i = big_max(gz, mt_single);
                } else {
                    ms_i = big_max(g, ms_single);
                    out->ms_route = PS_ROUTE_JOINT_POLES;
                    c2 = 1.0;
                }
            }
        }
        if (st == PS_OK)
            snprintf(out->note, sizeof out->note, "repeated RHP root: confluent interpolation (derivative conditions)");
        else {
            out->ms_route = out->mt_route = PS_ROUTE_SINGLE;
            ms_i = ms_single;
            mt_i = mt_single;
            note_fallback(out, "repeated RHP roots, joint floor not computed", d.text, 70, s_one);
        }
        out->cond = fmax(c1, c2);
    } else {
        /* Pick route: points p_i, values e^{p_i theta} / B_z(p_i). Without
         * delay this equals Chen's joint floor; with delay it is the floor on
         * ||T||, and on ||S|| by the commutant-lifting equality noted in the
         * README (held in every numerical check; labelled as such). */
        double lm[NP], ph[NP];
        for (size_t i = 0; i < np; i++) {
            double complex v = cexp(cx(p[i]) * theta);
            lm[i] = p[i].re * theta;
            ph[i] = p[i].im * theta;
            for (size_t j = 0; j < nz; j++) {
                double complex r = (cx(p[i]) + conj(cx(z[j]))) / (cx(p[i]) - cx(z[j]));
                v *= r;
                lm[i] += log(cabs(r));
                ph[i] += carg(r);
            }
            w[i] = (ps_cplx){creal(v), cimag(v)};
        }
        big g;
        double cond = 1.0;
        out->mt_route = np == 1 ? PS_ROUTE_ONE_POINT : PS_ROUTE_PICK;
        out->ms_route = theta > 0 ? PS_ROUTE_EQUAL_MT : nz == 0 ? PS_ROUTE_NONE : np == 1 ? PS_ROUTE_ONE_POINT
                                                                                          : PS_ROUTE_CHEN;
        if (pick_big(ws, p, w, lm, ph, np, &g, &cond, &d) == PS_OK) {
            mt_i = big_max(g, mt_single);
            ms_i = theta > 0 ? mt_i : ms_single;
            if (theta == 0 && nz > 0 && np == 1)
                /* One RHP pole: Chen's joint floor equals the Pick value at
                 * the pole (his equality Ms_min = Mt_min without delay), so
                 * no matrix is needed. */
                ms_i = big_max(g, ms_single);
            else if (theta == 0 && nz > 0) {
                /* Chen's formula and the Pick value at the poles are the one
                 * joint floor: the better conditioned is taken for both. */
                double chen, c2 = 1.0;
                if (ps_chen_floor(ws, z, nz, p, np, &chen, &c2, &d) == PS_OK && c2 <= 10 * cond) {
                    ms_i = big_max(big_val(chen), ms_single);
                    cond = fmax(cond, c2);
                } else {
                    ms_i = big_max(g, ms_single);
                    out->ms_route = PS_ROUTE_JOINT_POLES;
                }
            }
        } else {
            out->ms_route = out->mt_route = PS_ROUTE_SINGLE;
            ms_i = ms_single;
            mt_i = mt_single;
            note_fallback(out, "joint floor not computed", d.text, 100, s_one);
        }
        out->cond = cond;
    }
    out->ms_interpolation = ms_i.v;
    out->ms_interpolation_ln = ms_i.ln;
    out->mt_interpolation = mt_i.v;
    out->mt_interpolation_ln = mt_i.ln;

    /* Effort: Pick with points p_i and values e^{p_i theta} / G_s(p_i). */
    big effort;
    if (np == 0)
        effort = big_val(0.0);
    else if (ps_limits_effort_skipped(ws))
        effort = big_val(NAN);
    else if (out->infinite)
        effort = big_val(INFINITY);
    else {
        big single = big_val(0.0);
        double lm[NP], ph[NP];
        for (size_t i = 0; i < np; i++) {
            double complex m = mirror_at(an, cx(p[i]));
            double complex v = cexp(cx(p[i]) * theta) / m;
            lm[i] = p[i].re * theta - log(cabs(m));
            ph[i] = p[i].im * theta - carg(m);
            w[i] = (ps_cplx){creal(v), cimag(v)};
            single = big_max(single, big_pair(cabs(v), lm[i]));
        }
        big g;
        double cond = 1.0;
        ps_status st = ok_points ? pick_big(ws, p, w, lm, ph, np, &g, &cond, &d)
                                 : confluent(ws, AT_POLES_EFFORT, an, z, nz, p, np, &g, &cond, &d);
        effort = st == PS_OK ? big_max(g, single) : single;
    }
    out->effort = effort.v;
    out->effort_ln = effort.ln;

    /* Structure: parity interlacing, and which controllers the Bode area
     * floor covers (loop relative degree >= 2; at exactly 1 the integral
     * gains the term -pi kappa / 2, kappa = lim s L(s); S&P 2nd ed. ch. 5). */
    out->parity_interlacing = parity_interlacing(an);
    out->bode_controller_rd = an->rel_degree >= 2 ? 0 : 2 - an->rel_degree;
    out->note_plant = strlen(out->note);
}

/* The floors on ||S|| that the band edge moves: band-forced and Poisson. */
static void band_floors(ps_limits_ws *ws, const ps_cplx *z, size_t nz, const ps_cplx *p, size_t np,
                        const ps_requirements *req, ps_floors *out)
{
    out->ms_band = out->ms_poisson = out->ms_band_ln = out->ms_poisson_ln = out->band_tail = NAN;
    bool band = req && req->wb > 0, rolloff = req && req->wh > 0;
    if (rolloff) {
        out->band_tail = ps_rolloff_tail_ws(ws, req->wh, req->delta, req->k);
        out->ms_band_ln = ps_band_floor_ln_ws(ws, out->bode_area, band ? req->wb : 0.0, band ? req->eps : 1.0,
                                              req->wh, req->delta, req->k);
        out->ms_band = exp(out->ms_band_ln);
    }
    if (band) {
        out->ms_poisson_ln = out->infinite ? INFINITY : ps_poisson_s_floor_ln(z, nz, p, np, req->eps, req->wb);
        out->ms_poisson = exp(out->ms_poisson_ln);
    }
}

/* Is floor a above floor b? By value while both are finite, else by
 * logarithm (a NAN is above nothing). */
static bool above(double a, double a_ln, double b, double b_ln)
{
    return isfinite(a) && isfinite(b) ? a > b : a_ln > b_ln;
}

/* ln(x - 1) for a floor x given with its logarithm: exact while x is
 * finite; past a double's range x - 1 and x have the same logarithm (they
 * differ by a factor 1 - 1/x, below any rounding). */
static double ln_less_one(double x, double x_ln) { return isfinite(x) || isnan(x) ? log(x - 1.0) : x_ln; }

/* Overall: the largest floor on each, with ||S|| >= ||T|| - 1 and ||T|| >=
 * ||S|| - 1 (S + T = 1). A roll-off requirement |L| <= delta (w_h/w)^(1+k)
 * makes the loop strictly proper, so S -> 1 and ||S|| >= 1; when that is
 * the only source of the 1, the note says so. limiting names what sets ms;
 * a plant no controller stabilizes has none of the floors as its limit.
 * Each floor goes with its logarithm (ps_floors), compared by value while
 * both are finite. */
static void overall(const ps_analysis *an, bool rolloff, ps_floors *out)
{
    double s_only = out->ms_interpolation, t_only = out->mt_interpolation;
    double s_ln = out->ms_interpolation_ln, t_ln = out->mt_interpolation_ln;
    const char *s_src = "interpolation";
    if (above(out->ms_band, out->ms_band_ln, s_only, s_ln)) {
        s_only = out->ms_band;
        s_ln = out->ms_band_ln;
        s_src = "band";
    }
    /* The bare Nyquist floor equals the interpolation floor at z = infinity
     * in exact arithmetic (one unstable pole, relative degree 1): a tie,
     * to rounding, is left to the interpolation floor. */
    if (above(out->ms_nyquist * (1 - 1e-12), out->ms_nyquist_ln - 1e-12, s_only, s_ln)) {
        s_only = out->ms_nyquist;
        s_ln = out->ms_nyquist_ln;
        s_src = "nyquist";
    }
    if (above(out->ms_poisson, out->ms_poisson_ln, s_only, s_ln)) {
        s_only = out->ms_poisson;
        s_ln = out->ms_poisson_ln;
        s_src = "poisson";
    }
    if (above(out->mt_poisson, out->mt_poisson_ln, t_only, t_ln)) {
        t_only = out->mt_poisson;
        t_ln = out->mt_poisson_ln;
    }
    bool one_from_rolloff = rolloff && !(fmax(s_only, t_only - 1.0) >= 1.0);
    if (rolloff && s_only < 1.0) {
        s_only = 1.0;
        s_ln = 0.0;
    }
    /* ms = max(s_only, t_only - 1), mt = max(t_only, s_only - 1) */
    double t1_ln = ln_less_one(t_only, t_ln), s1_ln = ln_less_one(s_only, s_ln);
    bool s_sets = !above(t_only - 1.0, t1_ln, s_only, s_ln);
    out->ms = fmax(s_only, t_only - 1.0);
    out->ms_ln = isfinite(out->ms) || isnan(out->ms) ? log(out->ms) : s_sets ? s_ln : t1_ln;
    out->mt = fmax(t_only, s_only - 1.0);
    out->mt_ln = isfinite(out->mt) || isnan(out->mt) ? log(out->mt)
                 : above(s_only - 1.0, s1_ln, t_only, t_ln) ? s1_ln : t_ln;
    if (an->hidden_unstable)
        out->limiting = "hidden-mode";
    else if (out->infinite)
        out->limiting = "cancellation";
    else
        out->limiting = out->ms <= 1.0 ? "none" : s_sets ? s_src : "complementary";

    /* The plant half's note, then this half's sentence (the same whatever
     * was applied to out before). */
    out->note[out->note_plant] = '\0';
    if (one_from_rolloff)
        snprintf(out->note + out->note_plant, sizeof out->note - out->note_plant, "%s" ROLLOFF_NOTE,
                 out->note_plant ? "; " : "");
}

static void sampled_apply(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out);

void ps_floors_apply(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out)
{
    if (an->h > 0) {
        sampled_apply(ws, an, req, out);
        return;
    }
    out->ms_nyquist = out->ms_nyquist_ln = NAN;
    ps_cplx p[NP], z[NP];
    size_t np = rhp(an->poles, an->n_poles, p), nz = rhp(an->zeros, an->n_zeros, z);
    double theta = an->delay;

    /* Requirement-dependent floors (docs/method.md "Floors"). */
    band_floors(ws, z, nz, p, np, req, out);
    bool rolloff = req && req->wh > 0;
    out->mt_poisson = out->mt_poisson_ln = NAN;
    if (rolloff && req->delta > 0) {
        out->mt_poisson_ln = out->infinite ? INFINITY
                                           : ps_poisson_t_floor_ln(z, nz, p, np, theta, req->delta / (1 - req->delta),
                                                                   req->wh);
        out->mt_poisson = exp(out->mt_poisson_ln);
    }
    overall(an, rolloff, out);

    /* Crossover window, rules of thumb (S&P 2nd ed. ch. 5): w_c > 2 p for a
     * real RHP pole (|p| for complex), w_c < z/2 for a real RHP zero (|z|
     * for complex), w_c < 1/theta. */
    out->crossover_min = 0.0;
    for (size_t i = 0; i < np; i++)
        out->crossover_min = fmax(out->crossover_min, p[i].im == 0 ? 2 * p[i].re : cabs(cx(p[i])));
    out->crossover_max = INFINITY;
    for (size_t j = 0; j < nz; j++)
        out->crossover_max = fmin(out->crossover_max, z[j].im == 0 ? z[j].re / 2 : cabs(cx(z[j])));
    if (theta > 0)
        out->crossover_max = fmin(out->crossover_max, 1 / theta);
    if (rolloff)
        out->crossover_max = fmin(out->crossover_max, req->wh);
    out->window_open = out->crossover_min < out->crossover_max;
}

void ps_floors_apply_band(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out)
{
    if (an->h > 0) { /* the whole requirement half: the same result, and cheap beside the hold */
        sampled_apply(ws, an, req, out);
        return;
    }
    ps_cplx p[NP], z[NP];
    size_t np = rhp(an->poles, an->n_poles, p), nz = rhp(an->zeros, an->n_zeros, z);
    band_floors(ws, z, nz, p, np, req, out);
    overall(an, req && req->wh > 0, out);
}

void ps_floors_compute(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out)
{
    ps_floors_plant(ws, an, out);
    ps_floors_apply(ws, an, req, out);
}

/* ---- the digital loop (README "Digital loops") ---- */

/* The floors when the plant of a digital loop could not be formed: every
 * value NAN, the reason in the note. */
static void sampled_unknown(const ps_analysis *an, const char *why, ps_floors *out)
{
    memset(out, 0, sizeof *out);
    out->h = an->h;
    out->nyquist = M_PI / an->h;
    out->ms = out->mt = out->ms_interpolation = out->mt_interpolation = out->effort = NAN;
    out->ms_ln = out->mt_ln = out->ms_interpolation_ln = out->mt_interpolation_ln = out->effort_ln = NAN;
    out->ms_band = out->ms_band_ln = out->ms_poisson = out->ms_poisson_ln = out->band_tail = NAN;
    out->mt_poisson = out->mt_poisson_ln = out->ms_nyquist = out->ms_nyquist_ln = NAN;
    out->bode_area = out->crossover_min = out->crossover_max = NAN;
    out->limiting = "none";
    snprintf(out->note, sizeof out->note, "held plant not formed: %.120s", why);
    out->note_plant = strlen(out->note);
}

ps_status ps_floors_formed(const ps_analysis *an, const ps_floors *fl, size_t line, ps_diag *d)
{
    if (!(an->h > 0) || !isnan(fl->ms))
        return PS_OK;
    return ps_diag_set(d, PS_ERR_INPUT, line, 0, "sample_rate", "%s", fl->note);
}

static const ps_sampled_view *view(ps_limits_ws *ws, const ps_analysis *an, ps_diag *d)
{
    ps_sampled_ws *sws = ps_limits_sampled(ws);
    if (!sws) {
        ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "no memory for the held plant");
        return NULL;
    }
    return ps_sampled_view_of(sws, an, d);
}

/* The plant half of a digital loop: the floors of the plant in w (a
 * continuous plant without delay), with the Bode area of the discrete
 * integral and the roots in z for the reports. */
static void sampled_plant(ps_limits_ws *ws, const ps_analysis *an, ps_floors *out)
{
    ps_diag d = {0};
    const ps_sampled_view *v = view(ws, an, &d);
    if (!v) {
        sampled_unknown(an, d.text, out);
        return;
    }
    ps_floors_plant(ws, &v->w, out);
    if (strncmp(out->note, "repeated RHP root:", 18) == 0) { /* in z words: w = 1 is z = infinity */
        snprintf(out->note, sizeof out->note,
                 "repeated root outside the unit circle or at z = infinity (relative degree %d in z): confluent "
                 "interpolation (derivative conditions)",
                 v->z_rel_degree);
        out->note_plant = strlen(out->note);
    }
    out->h = v->h;
    out->nyquist = M_PI / v->h;
    /* (1/pi) int_0^pi ln|S(e^{jW})| dW = sum ln|p_d| - ln|1 + L(inf)| (Sung &
     * Hara, Int. J. Control 48(6), 1988): over [0, pi/h] rad/s the area is
     * (pi/h) sum ln|p_d|, pi sum Re p for a held plant; it holds for every
     * proper controller when P(inf) = 0, for strictly proper ones otherwise. */
    out->bode_area = M_PI * v->sum_ln_out / v->h;
    out->bode_controller_rd = v->feedthrough ? 1 : 0;
    out->z_rel_degree = v->z_rel_degree;
    out->n_zpoles = v->n_zp;
    out->n_zzeros = v->n_zz;
    for (size_t i = 0; i < v->n_zp && i < PS_ZMAP; i++)
        out->zpoles[i] = v->zp[i];
    for (size_t j = 0; j < v->n_zz && j < PS_ZMAP; j++) {
        out->zzeros[j] = v->zz[j];
        out->zzero_sampling[j] = v->zz_sampling[j];
    }
    out->n_sampling_zeros = v->n_sampling;
    out->n_zzeros_outside = v->n_zz_outside;
}

/* int_{wh}^{W} -ln(1 - delta (wh/w)^(1+k)) dw, the roll-off bound's share of
 * the band up to the Nyquist frequency W: the series of ps_rolloff_tail with
 * each term cut at W, wh sum delta^n / (n (m - 1)) [1 - (wh/W)^(m - 1)], m = n (1 + k). */
static double rolloff_part(double wh, double W, double delta, double k)
{
    if (delta <= 0 || !(W > wh))
        return 0.0;
    double sum = 0, dn = 1, q = wh / W;
    for (int n = 1; n < 100000; n++) {
        dn *= delta;
        double m = n * (1 + k), term = dn / (n * (m - 1)) * (1 - pow(q, m - 1));
        sum += term;
        if (term < 1e-17 * sum)
            break;
    }
    return wh * sum;
}

/* Continuous-time equivalent of a root in z, ln(z)/h (principal branch), for the rules of thumb. */
static double complex s_equivalent(ps_cplx z, double h) { return clog(cx(z)) / h; }

static void sampled_apply(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out)
{
    ps_diag d = {0};
    const ps_sampled_view *v = view(ws, an, &d);
    if (!v) {
        sampled_unknown(an, d.text, out);
        return;
    }
    const ps_analysis *wa = &v->w;
    ps_cplx p[NP], z[NP];
    size_t np = rhp(wa->poles, wa->n_poles, p), nz = rhp(wa->zeros, wa->n_zeros, z);
    double h = v->h, W = M_PI / h;
    bool band = req && req->wb > 0, rolloff = req && req->wh > 0;
    double wb = band ? req->wb : 0.0, eps = band ? req->eps : 1.0;
    out->ms_band = out->ms_band_ln = out->ms_poisson = out->ms_poisson_ln = out->band_tail = NAN;
    out->mt_poisson = out->mt_poisson_ln = out->ms_nyquist = out->ms_nyquist_ln = NAN;
    double lead = out->bode_area + (band ? wb * log(1.0 / eps) : 0.0);
    if (!v->feedthrough) {
        /* |S| <= eps on [0, wb] leaves the area pi sum Re p + wb ln(1/eps) to
         * [wb, pi/h]: ln sup |S| there >= that / (pi/h - wb). With a roll-off
         * start, [wh, pi/h] can hold at most the roll-off bound's part of it. */
        out->ms_nyquist_ln = wb < W ? lead / (W - wb) : INFINITY;
        out->ms_nyquist = exp(out->ms_nyquist_ln);
        if (rolloff && req->wh > wb) {
            out->band_tail = rolloff_part(req->wh, W, req->delta, req->k);
            out->ms_band_ln = (lead - out->band_tail) / (req->wh - wb);
            out->ms_band = exp(out->ms_band_ln);
        }
    }
    if (band) { /* Poisson in w: the band [0, wb] rad/s is [0, tan(wb h / 2)] on the w axis */
        out->ms_poisson_ln = out->infinite ? INFINITY
                             : wb < W     ? ps_poisson_s_floor_ln(z, nz, p, np, eps, tan(0.5 * wb * h))
                                          : INFINITY;
        out->ms_poisson = exp(out->ms_poisson_ln);
    }
    if (rolloff && req->delta > 0 && req->wh < W) {
        out->mt_poisson_ln = out->infinite ? INFINITY
                                           : ps_poisson_t_floor_ln(z, nz, p, np, 0.0, req->delta / (1 - req->delta),
                                                                   tan(0.5 * req->wh * h));
        out->mt_poisson = exp(out->mt_poisson_ln);
    }
    overall(an, rolloff, out);

    /* Crossover window, rules of thumb: those of the continuous plant (S&P
     * 2nd ed. ch. 5) with the hold counted as half a sample of delay, and a
     * sample rate at least ten times the crossover frequency (common
     * practice: 10 to 30 times). A plant in z is read through ln(z)/h. */
    out->crossover_min = 0.0;
    out->crossover_max = 2 * M_PI / h / 10;
    double theta_eq = v->theta + 0.5 * h;
    if (an->in_z) {
        for (size_t i = 0; i < v->n_zp; i++)
            if (cabs(cx(v->zp[i])) > 1.0 + PS_CIRCLE_RTOL) {
                double complex q = s_equivalent(v->zp[i], h);
                out->crossover_min = fmax(out->crossover_min, cimag(q) == 0 ? 2 * creal(q) : cabs(q));
            }
        for (size_t j = 0; j < v->n_zz; j++)
            if (v->zz_region[j] == PS_RHP) {
                double complex q = s_equivalent(v->zz[j], h);
                out->crossover_max = fmin(out->crossover_max, cimag(q) == 0 ? creal(q) / 2 : cabs(q));
            }
    } else {
        for (size_t i = 0; i < an->n_poles; i++)
            if (an->poles[i].region == PS_RHP) {
                ps_cplx q = an->poles[i].v;
                out->crossover_min = fmax(out->crossover_min, q.im == 0 ? 2 * q.re : cabs(cx(q)));
            }
        for (size_t j = 0; j < an->n_zeros; j++)
            if (an->zeros[j].region == PS_RHP) {
                ps_cplx q = an->zeros[j].v;
                out->crossover_max = fmin(out->crossover_max, q.im == 0 ? q.re / 2 : cabs(cx(q)));
            }
    }
    out->crossover_max = fmin(out->crossover_max, 1 / theta_eq);
    if (rolloff)
        out->crossover_max = fmin(out->crossover_max, req->wh);
    out->window_open = out->crossover_min < out->crossover_max;
}

/* floors.c - requirement-free floors of one plant (see floors.h). */
#include "limits/floors.h"

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "core/complex_make.h"

enum { NP = PS_MAX_ORDER };

static inline double complex cx(ps_cplx a) { return ps_complex_make(a.re, a.im); }

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

/* a *= e^{theta s} = e^{theta s0} sum (theta u)^k / k!. */
static void ser_mul_exp(double complex *a, unsigned m, double complex s0, double theta)
{
    double complex e[NP], out[NP];
    e[0] = cexp(theta * s0);
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

/* The functions interpolated at repeated points (README "Floors"):
 * T at the RHP poles: e^{theta s} / B_z(s); S at the RHP zeros: 1 / B_p(s);
 * effort at the RHP poles: e^{theta s} / G_s(s). */
enum interp_kind { AT_POLES_T, AT_ZEROS_S, AT_POLES_EFFORT };

static void taylor(enum interp_kind kind, const ps_analysis *an, const ps_cplx *z, size_t nz,
                   const ps_cplx *p, size_t np, double complex s0, unsigned m, double complex *a)
{
    ser_one(a, m);
    if (kind == AT_ZEROS_S) {
        for (size_t i = 0; i < np; i++) {
            ser_mul_lin(a, m, s0 + conj(cx(p[i])));
            ser_div_lin(a, m, s0 - cx(p[i]));
        }
        return;
    }
    ser_mul_exp(a, m, s0, an->delay);
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

/* Confluent Pick value for repeated points. */
static ps_status confluent(ps_limits_ws *ws, enum interp_kind kind, const ps_analysis *an, const ps_cplx *z,
                           size_t nz, const ps_cplx *p, size_t np, double *out, double *cond, ps_diag *d)
{
    const ps_cplx *pts = kind == AT_ZEROS_S ? z : p;
    size_t npts = kind == AT_ZEROS_S ? nz : np;
    ps_cplx g[NP], data[NP];
    unsigned mult[NP];
    size_t ng = group(pts, npts, g, mult), at = 0;
    for (size_t k = 0; k < ng; k++) {
        double complex a[NP];
        taylor(kind, an, z, nz, p, np, cx(g[k]), mult[k], a);
        for (unsigned i = 0; i < mult[k]; i++)
            data[at++] = (ps_cplx){creal(a[i]), cimag(a[i])};
    }
    return ps_pick_confluent(ws, g, mult, ng, data, out, cond, d);
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

void ps_floors_plant(ps_limits_ws *ws, const ps_analysis *an, ps_floors *out)
{
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
    double ms_single = nz ? ps_ms_single(z, nz, p, np) : s_one ? 1.0 : 0.0;
    double mt_single = np ? ps_mt_single(z, nz, p, np, theta) : t_one ? 1.0 : 0.0;
    out->infinite = isinf(ms_single) || isinf(mt_single);
    bool ok_points = distinct(p, np) && distinct(z, nz);
    if (out->infinite) {
        out->ms_route = out->mt_route = PS_ROUTE_INFINITE;
        out->ms_interpolation = out->mt_interpolation = INFINITY;
        snprintf(out->note, sizeof out->note, "%s",
                 an->hidden_unstable ? "hidden unstable mode: no controller can stabilize this plant"
                                     : "an RHP zero coincides with an RHP pole");
    } else if (np == 0) {
        out->ms_interpolation = ms_single; /* 1 or 0: nothing to interpolate against */
        out->mt_interpolation = mt_single;
    } else if (!ok_points) {
        out->mt_route = PS_ROUTE_CONFLUENT;
        out->ms_route = theta > 0 ? PS_ROUTE_EQUAL_MT : nz > 0 ? PS_ROUTE_CONFLUENT : PS_ROUTE_NONE;
        /* Repeated RHP roots: derivative conditions at each repeated point
         * (confluent Pick). Without delay the floor on ||S|| is the Pick value
         * at the zeros, which equals the one at the poles (Chen's equality). */
        double g = 1.0, c1 = 1.0, c2 = 1.0;
        ps_status st = confluent(ws, AT_POLES_T, an, z, nz, p, np, &g, &c1, &d);
        if (st == PS_OK) {
            out->mt_interpolation = fmax(g, mt_single);
            out->ms_interpolation = theta > 0 ? out->mt_interpolation : ms_single;
            if (theta == 0 && nz > 0 && (st = confluent(ws, AT_ZEROS_S, an, z, nz, p, np, &g, &c2, &d)) == PS_OK)
                out->ms_interpolation = fmax(g, ms_single);
        }
        if (st == PS_OK)
            snprintf(out->note, sizeof out->note, "repeated RHP root: confluent interpolation (derivative conditions)");
        else {
            out->ms_route = out->mt_route = PS_ROUTE_SINGLE;
            out->ms_interpolation = ms_single;
            out->mt_interpolation = mt_single;
            note_fallback(out, "repeated RHP roots, joint floor not computed", d.text, 70, s_one);
        }
        out->cond = fmax(c1, c2);
    } else {
        /* Pick route: points p_i, values e^{p_i theta} / B_z(p_i). Without
         * delay this equals Chen's joint floor; with delay it is the floor on
         * ||T||, and on ||S|| by the commutant-lifting equality noted in the
         * README (held in every numerical check; labelled as such). */
        for (size_t i = 0; i < np; i++) {
            double complex v = cexp(cx(p[i]) * theta);
            for (size_t j = 0; j < nz; j++)
                v *= (cx(p[i]) + conj(cx(z[j]))) / (cx(p[i]) - cx(z[j]));
            w[i] = (ps_cplx){creal(v), cimag(v)};
        }
        double g, cond = 1.0;
        out->mt_route = np == 1 ? PS_ROUTE_ONE_POINT : PS_ROUTE_PICK;
        out->ms_route = theta > 0 ? PS_ROUTE_EQUAL_MT : nz == 0 ? PS_ROUTE_NONE : np == 1 ? PS_ROUTE_ONE_POINT
                                                                                          : PS_ROUTE_CHEN;
        if (ps_pick_gamma(ws, p, w, np, &g, &cond, &d) == PS_OK) {
            out->mt_interpolation = fmax(g, mt_single);
            out->ms_interpolation = theta > 0 ? out->mt_interpolation : ms_single;
            if (theta == 0 && nz > 0 && np == 1)
                /* One RHP pole: Chen's joint floor equals the Pick value at
                 * the pole (his equality Ms_min = Mt_min without delay), so
                 * no matrix is needed. */
                out->ms_interpolation = fmax(g, ms_single);
            else if (theta == 0 && nz > 0) {
                double chen, c2 = 1.0;
                if (ps_chen_floor(ws, z, nz, p, np, &chen, &c2, &d) == PS_OK)
                    out->ms_interpolation = fmax(chen, ms_single);
                else
                    out->ms_route = PS_ROUTE_SINGLE;
                cond = fmax(cond, c2);
            }
        } else {
            out->ms_route = out->mt_route = PS_ROUTE_SINGLE;
            out->ms_interpolation = ms_single;
            out->mt_interpolation = mt_single;
            note_fallback(out, "joint floor not computed", d.text, 100, s_one);
        }
        out->cond = cond;
    }

    /* Effort: Pick with points p_i and values e^{p_i theta} / G_s(p_i). */
    if (np == 0)
        out->effort = 0.0;
    else if (ps_limits_effort_skipped(ws))
        out->effort = NAN;
    else if (out->infinite)
        out->effort = INFINITY;
    else {
        double single = 0;
        for (size_t i = 0; i < np; i++) {
            double complex v = cexp(cx(p[i]) * theta) / mirror_at(an, cx(p[i]));
            w[i] = (ps_cplx){creal(v), cimag(v)};
            single = fmax(single, cabs(v));
        }
        double g, cond = 1.0;
        ps_status st = ok_points ? ps_pick_gamma(ws, p, w, np, &g, &cond, &d)
                                 : confluent(ws, AT_POLES_EFFORT, an, z, nz, p, np, &g, &cond, &d);
        out->effort = st == PS_OK ? fmax(g, single) : single;
    }

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
    out->ms_band = out->ms_poisson = NAN;
    bool band = req && req->wb > 0, rolloff = req && req->wh > 0;
    if (rolloff)
        out->ms_band = ps_band_floor_ws(ws, out->bode_area, band ? req->wb : 0.0, band ? req->eps : 1.0, req->wh,
                                     req->delta, req->k);
    if (band)
        out->ms_poisson = out->infinite ? INFINITY : ps_poisson_s_floor(z, nz, p, np, req->eps, req->wb);
}

/* Overall: the largest floor on each, with ||S|| >= ||T|| - 1 and ||T|| >=
 * ||S|| - 1 (S + T = 1). A roll-off requirement |L| <= delta (w_h/w)^(1+k)
 * makes the loop strictly proper, so S -> 1 and ||S|| >= 1; when that is
 * the only source of the 1, the note says so. limiting names what sets ms;
 * a plant no controller stabilizes has none of the floors as its limit. */
static void overall(const ps_analysis *an, bool rolloff, ps_floors *out)
{
    double s_only = out->ms_interpolation, t_only = out->mt_interpolation;
    const char *s_src = "interpolation";
    if (out->ms_band > s_only) {
        s_only = out->ms_band;
        s_src = "band";
    }
    if (out->ms_poisson > s_only) {
        s_only = out->ms_poisson;
        s_src = "poisson";
    }
    if (out->mt_poisson > t_only)
        t_only = out->mt_poisson;
    bool one_from_rolloff = rolloff && !(fmax(s_only, t_only - 1.0) >= 1.0);
    if (rolloff && s_only < 1.0)
        s_only = 1.0;
    out->ms = fmax(s_only, t_only - 1.0);
    out->mt = fmax(t_only, s_only - 1.0);
    if (an->hidden_unstable)
        out->limiting = "hidden-mode";
    else if (out->infinite)
        out->limiting = "cancellation";
    else
        out->limiting = out->ms <= 1.0 ? "none" : out->ms == s_only ? s_src : "complementary";

    /* The plant half's note, then this half's sentence (the same whatever
     * was applied to out before). */
    out->note[out->note_plant] = '\0';
    if (one_from_rolloff)
        snprintf(out->note + out->note_plant, sizeof out->note - out->note_plant, "%s" ROLLOFF_NOTE,
                 out->note_plant ? "; " : "");
}

void ps_floors_apply(ps_limits_ws *ws, const ps_analysis *an, const ps_requirements *req, ps_floors *out)
{
    ps_cplx p[NP], z[NP];
    size_t np = rhp(an->poles, an->n_poles, p), nz = rhp(an->zeros, an->n_zeros, z);
    double theta = an->delay;

    /* Requirement-dependent floors (README "Floors"). */
    band_floors(ws, z, nz, p, np, req, out);
    bool rolloff = req && req->wh > 0;
    out->mt_poisson = NAN;
    if (rolloff && req->delta > 0)
        out->mt_poisson = out->infinite ? INFINITY
                                        : ps_poisson_t_floor(z, nz, p, np, theta, req->delta / (1 - req->delta), req->wh);
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

/* loop.c - one loop L = P C evaluated and verified: the closed-loop
 * stability by the argument principle on the line Re s = -decay_min (delay,
 * integrators and axis poles included), cross-checked by the closed-loop
 * roots when the loop has no delay; the peaks of |S|, |T| and |C S| on a
 * dense grid refined around its maxima; the roll-off and band requirements
 * on that grid with the margin PS_CERT_MARGIN. */
#include "certify/loop_internal.h"

#include <float.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "core/complex_make.h"

const char *ps_ctrl_structure_name(ps_ctrl_structure s)
{
    static const char *const names[PS_CTRL_COUNT] = {"PI", "PID", "lead-lag", "unstable", "PID-notch", "fixed-order"};
    if (s == PS_CTRL_INTERPOLATION)
        return "interpolation";
    return (unsigned)s < PS_CTRL_COUNT ? names[s] : "?";
}

const char *ps_cert_status_name(ps_cert_status s)
{
    static const char *const names[PS_CERT_COUNT] = {"not attempted", "demonstrated", "undecided"};
    return (unsigned)s < PS_CERT_COUNT ? names[s] : "?";
}

static double complex polyval(const double *c, size_t n, double complex s)
{
    double complex acc = 0;
    for (size_t i = 0; i < n; i++)
        acc = acc * s + c[i];
    return acc;
}

void ps_controller_eval(const ps_controller *c, double re, double im, double *out_re, double *out_im)
{
    double complex s = ps_complex_make(re, im);
    double complex v = polyval(c->num, c->n_num, s) / polyval(c->den, c->n_den, s);
    *out_re = creal(v);
    *out_im = cimag(v);
}

/* P(s) from the analysis: gain prod(s - z) / prod(s - p) e^{-s delay}. */
static double complex plant_at(const ps_analysis *an, double complex s)
{
    double complex v = an->gain;
    size_t i = 0, j = 0;
    /* interleaved, so that a high-order plant's products stay in range */
    for (; i < an->n_zeros && j < an->n_poles; i++, j++)
        v *= (s - ps_complex_make(an->zeros[i].v.re, an->zeros[i].v.im)) /
             (s - ps_complex_make(an->poles[j].v.re, an->poles[j].v.im));
    for (; i < an->n_zeros; i++)
        v *= s - ps_complex_make(an->zeros[i].v.re, an->zeros[i].v.im);
    for (; j < an->n_poles; j++)
        v /= s - ps_complex_make(an->poles[j].v.re, an->poles[j].v.im);
    if (an->delay > 0)
        v *= cexp(-s * an->delay);
    return v;
}

void ps_loop_at(const ps_analysis *an, const ps_controller *c, double complex s, double complex *l, double complex *cv)
{
    *cv = polyval(c->num, c->n_num, s) / polyval(c->den, c->n_den, s);
    *l = plant_at(an, s) * *cv;
}

/* ---- frequency range ---- */

void ps_loop_range(const ps_analysis *an, const ps_requirements *q, const ps_controller *c, double *lo, double *hi)
{
    double mn = INFINITY, mx = 0;
#define SEE(w)                                                                                                         \
    do {                                                                                                               \
        double w_ = (w);                                                                                               \
        if (w_ > 0 && isfinite(w_)) {                                                                                  \
            mn = fmin(mn, w_);                                                                                         \
            mx = fmax(mx, w_);                                                                                         \
        }                                                                                                              \
    } while (0)
    for (size_t i = 0; i < an->n_poles; i++)
        SEE(hypot(an->poles[i].v.re, an->poles[i].v.im));
    for (size_t i = 0; i < an->n_zeros; i++)
        SEE(hypot(an->zeros[i].v.re, an->zeros[i].v.im));
    for (size_t i = 1; i < c->n_param; i++)
        SEE(c->param[i]);
    SEE(q->wh);
    SEE(q->wb);
    if (an->delay > 0)
        SEE(1.0 / an->delay);
#undef SEE
    if (!(mx > 0)) {
        mn = mx = 1.0;
    }
    *lo = mn * 1e-3;
    *hi = ps_loop_top(an, c, mx * 1e3);
}

double ps_loop_bottom(const ps_analysis *an, const ps_controller *c, double lo)
{
    /* below the slowest scale the loop may still be crossing over (a low gain) or its
       |T| and |C S| still climbing to their limits (an integrating loop: T -> 1, C S -> 1/P):
       go down by decades until |S|, |T| and |C S| have settled to 1e-7 */
    double complex l, cv;
    ps_loop_at(an, c, ps_complex_make(0.0, lo), &l, &cv);
    for (int i = 0; i < 30; i++) {
        double complex l2, cv2;
        ps_loop_at(an, c, ps_complex_make(0.0, lo / 10), &l2, &cv2);
        double s1 = cabs(1 / (1 + l)), s2 = cabs(1 / (1 + l2)), t1 = cabs(l / (1 + l)), t2 = cabs(l2 / (1 + l2));
        double c1 = cabs(cv / (1 + l)), c2 = cabs(cv2 / (1 + l2));
        if (!isfinite(s2) || !isfinite(t2) || !isfinite(c2))
            break;
        if (fabs(s1 - s2) <= 1e-7 * fmax(s1, 1e-300) + 1e-12 && fabs(t1 - t2) <= 1e-7 * fmax(t1, 1e-300) + 1e-12 &&
            fabs(c1 - c2) <= 1e-7 * fmax(c1, 1e-300))
            break;
        lo /= 10;
        l = l2;
        cv = cv2;
    }
    return lo;
}

double ps_loop_top(const ps_analysis *an, const ps_controller *c, double hi)
{
    /* a high gain moves the crossover past every root and corner: go on by
       decades until |L| is below 1e-3 (a strictly proper loop falls for good) */
    for (int i = 0; i < 24; i++) {
        double complex l, cv;
        ps_loop_at(an, c, ps_complex_make(0.0, hi), &l, &cv);
        if (cabs(l) < 1e-3)
            break;
        hi *= 10;
    }
    return hi;
}

/* ---- stability ---- */

/* arg(b / a) in (-pi, pi]. */
static double turn(double complex a, double complex b)
{
    return carg(b / a);
}

typedef struct winder {
    const ps_analysis *an;
    const ps_controller *c;
    double alpha;
    double total;
    bool lost;       /* the contour passed through (or too near) a zero of 1 + L */
    int evals;
} winder;

static double complex ret_diff(winder *w, double om)
{
    double complex l, cv;
    ps_loop_at(w->an, w->c, ps_complex_make(-w->alpha, om), &l, &cv);
    w->evals++;
    return 1.0 + l;
}

/* Add the change of arg(1 + L) from a to b, bisecting while a step turns by
 * more than 0.25 rad or its midpoint disagrees with the straight step. */
static void wind(winder *w, double a, double fa_re, double fa_im, double b, double complex fb, int depth)
{
    double complex fa = ps_complex_make(fa_re, fa_im);
    double d = turn(fa, fb);
    if (depth < 48 && w->evals < 200000) {
        double m = 0.5 * (a + b);
        double complex fm = ret_diff(w, m);
        double d1 = turn(fa, fm), d2 = turn(fm, fb);
        if (fabs(d) > 0.25 || fabs(d1 + d2 - d) > 1e-3) {
            wind(w, a, creal(fa), cimag(fa), m, fm, depth + 1);
            wind(w, m, creal(fm), cimag(fm), b, fb, depth + 1);
            return;
        }
        d = d1 + d2;
    } else if (fabs(d) > 0.25) {
        w->lost = true;
    }
    if (cabs(fb) < 1e-9)
        w->lost = true;
    w->total += d;
}

/* Count the loop's poles (plant and controller) right of -alpha. */
static int open_right(const ps_analysis *an, const ps_root *cpoles, size_t ncp, double alpha)
{
    int n = 0;
    for (size_t i = 0; i < an->n_poles; i++)
        n += an->poles[i].v.re > -alpha;
    for (size_t i = 0; i < ncp; i++)
        n += cpoles[i].v.re > -alpha;
    return n;
}

/* The argument principle on Re s = -alpha: Z = P - (change of arg(1 + L)
 * along w = 0..inf) / pi, the symmetry of a real loop supplying w < 0.
 * Returns Z (closed-loop poles right of -alpha), or -1 when undecided. */
int ps_loop_winding(const ps_analysis *an, const ps_controller *c, const ps_root *cpoles, size_t ncp, double alpha,
                    double hi, int per_decade)
{
    winder w = {an, c, alpha, 0.0, false, 0};
    double lo = hi * 1e-12;
    /* from w = 0, then a log grid up to hi */
    double complex f0 = ret_diff(&w, 0.0);
    if (!isfinite(creal(f0)) || cabs(f0) < 1e-12)
        return -1;
    double prev = 0.0;
    double complex fp = f0;
    int n = (int)ceil(per_decade * log10(hi / lo));
    for (int i = 0; i <= n; i++) {
        double om = lo * pow(10.0, (double)i / per_decade);
        double complex f = ret_diff(&w, om);
        if (!isfinite(creal(f)) || !isfinite(cimag(f)))
            return -1;
        wind(&w, prev, creal(fp), cimag(fp), om, f, 0);
        prev = om;
        fp = f;
    }
    /* past hi the loop must be small: 1 + L then stays near its limit */
    double complex l, cv;
    ps_loop_at(an, c, ps_complex_make(-alpha, hi), &l, &cv);
    if (!(cabs(l) < 0.05))
        return -1;
    /* the limit of 1 + L at infinity: 1 for a strictly proper loop */
    w.total += turn(fp, 1.0);
    if (w.lost)
        return -1;
    int p = open_right(an, cpoles, ncp, alpha);
    double z = p - w.total / 3.14159265358979323846;
    double zr = round(z);
    if (fabs(z - zr) > 0.05)
        return -1;
    return (int)zr;
}

/* ---- verification ---- */

/* The largest of f over the grid cell around i, by golden section on log w. */
typedef double (*cell_fn)(const ps_analysis *, const ps_controller *, double);

static double mag_s(const ps_analysis *an, const ps_controller *c, double w)
{
    double complex l, cv;
    ps_loop_at(an, c, ps_complex_make(0.0, w), &l, &cv);
    return 1.0 / cabs(1.0 + l);
}

static double mag_t(const ps_analysis *an, const ps_controller *c, double w)
{
    double complex l, cv;
    ps_loop_at(an, c, ps_complex_make(0.0, w), &l, &cv);
    return cabs(l / (1.0 + l));
}

static double mag_cs(const ps_analysis *an, const ps_controller *c, double w)
{
    double complex l, cv;
    ps_loop_at(an, c, ps_complex_make(0.0, w), &l, &cv);
    return cabs(cv / (1.0 + l));
}

static double refine(cell_fn f, const ps_analysis *an, const ps_controller *c, double wa, double wb, double *wbest)
{
    const double g = 0.5 * (sqrt(5.0) - 1.0);
    double a = log(wa), b = log(wb);
    double x1 = b - g * (b - a), x2 = a + g * (b - a);
    double f1 = f(an, c, exp(x1)), f2 = f(an, c, exp(x2));
    for (int it = 0; it < 60 && b - a > 1e-10; it++) {
        if (f1 > f2) {
            b = x2;
            x2 = x1;
            f2 = f1;
            x1 = b - g * (b - a);
            f1 = f(an, c, exp(x1));
        } else {
            a = x1;
            x1 = x2;
            f1 = f2;
            x2 = a + g * (b - a);
            f2 = f(an, c, exp(x2));
        }
    }
    *wbest = f1 > f2 ? exp(x1) : exp(x2);
    return fmax(f1, f2);
}

void ps_loop_curve(const ps_analysis *an, const ps_controller *c, double lo, double hi, size_t n, double *w,
                   double *s_mag, double *t_mag)
{
    for (size_t i = 0; i < n; i++) {
        w[i] = exp(log(lo) + (log(hi) - log(lo)) * (double)i / (double)(n - 1));
        s_mag[i] = mag_s(an, c, w[i]);
        t_mag[i] = mag_t(an, c, w[i]);
    }
}

/* The controller's relative degree plus the plant's. */
static int loop_rel_degree(const ps_analysis *an, const ps_controller *c)
{
    return an->rel_degree + (int)c->n_den - (int)c->n_num;
}

void ps_loop_verify(const ps_analysis *an, const ps_requirements *q, const ps_controller *c, ps_loop_check *out)
{
    memset(out, 0, sizeof *out);
    out->rolloff_ratio = q->wh > 0 ? 0.0 : NAN;
    out->band_peak = q->wb > 0 ? 0.0 : NAN;
    double lo, hi;
    ps_loop_range(an, q, c, &lo, &hi);
    /* the decay rate asked of every closed-loop pole: a thousandth of the slowest nonzero
       root or corner of the plant and controller (or of wb, wh, 1/delay) */
    out->decay_min = lo; /* lo is a thousandth of the slowest root or corner */
    if (loop_rel_degree(an, c) < 1) {
        snprintf(out->why, sizeof out->why, "the loop is not strictly proper");
        return;
    }
    ps_root cpoles[PS_CTRL_MAX_ORDER];
    size_t ncp = 0;
    if (ps_ctrl_poles(c, cpoles, &ncp) != 0) {
        snprintf(out->why, sizeof out->why, "the controller's poles could not be computed");
        return;
    }
    int z = ps_loop_winding(an, c, cpoles, ncp, out->decay_min, hi * 1e3, 24);
    out->stable = z == 0;
    out->roots_agree = true;
    out->decay = out->stable ? out->decay_min : NAN;
    if (!(an->delay > 0)) {
        double maxre;
        if (ps_loop_closed_max_re(an, c, &maxre) == 0) {
            out->roots_checked = true;
            bool by_roots = maxre < -out->decay_min;
            out->roots_agree = z >= 0 && by_roots == out->stable;
            out->decay = -maxre;
        }
    }
    if (z < 0) {
        snprintf(out->why, sizeof out->why, "the argument principle could not decide stability");
        return;
    }
    if (!out->stable) {
        snprintf(out->why, sizeof out->why, "the closed loop is unstable (%d poles right of -%.3g)", z,
                 out->decay_min);
        return;
    }
    if (!out->roots_agree) {
        snprintf(out->why, sizeof out->why, "the closed-loop roots and the argument principle disagree");
        return;
    }
    /* dense grid: 400 points a decade, then each local maximum refined */
    enum { PER_DECADE = 400 };
    lo = ps_loop_bottom(an, c, lo);
    int n = (int)ceil(PER_DECADE * log10(hi / lo));
    double ps_prev2 = 0, ps_prev = 0, pt_prev2 = 0, pt_prev = 0, pc_prev2 = 0, pc_prev = 0;
    double wprev2 = lo, wprev = lo;
    double k1 = 1.0 + q->k;
    for (int i = 0; i <= n + 1; i++) {
        double w = lo * pow(10.0, (double)i / PER_DECADE);
        double complex l, cv;
        ps_loop_at(an, c, ps_complex_make(0.0, w), &l, &cv);
        double sm = 1.0 / cabs(1.0 + l), tm = cabs(l / (1.0 + l)), cm = cabs(cv / (1.0 + l));
        if (!isfinite(sm) || !isfinite(tm)) {
            snprintf(out->why, sizeof out->why, "|S| or |T| is not finite at %.4g rad/s", w);
            out->ms = out->mt = INFINITY;
            return;
        }
        if (sm > out->ms) {
            out->ms = sm;
            out->w_ms = w;
        }
        if (tm > out->mt) {
            out->mt = tm;
            out->w_mt = w;
        }
        out->effort = fmax(out->effort, cm);
        if (i >= 2) {
            double wb_;
            if (ps_prev > ps_prev2 && ps_prev >= sm) {
                double v = refine(mag_s, an, c, wprev2, w, &wb_);
                if (v > out->ms) {
                    out->ms = v;
                    out->w_ms = wb_;
                }
            }
            if (pt_prev > pt_prev2 && pt_prev >= tm) {
                double v = refine(mag_t, an, c, wprev2, w, &wb_);
                if (v > out->mt) {
                    out->mt = v;
                    out->w_mt = wb_;
                }
            }
            if (pc_prev > pc_prev2 && pc_prev >= cm)
                out->effort = fmax(out->effort, refine(mag_cs, an, c, wprev2, w, &wb_));
        }
        if (q->wh > 0 && w >= q->wh)
            out->rolloff_ratio = fmax(out->rolloff_ratio, cabs(l) / (q->delta * pow(q->wh / w, k1)));
        if (q->wb > 0 && w <= q->wb)
            out->band_peak = fmax(out->band_peak, sm);
        ps_prev2 = ps_prev;
        ps_prev = sm;
        pt_prev2 = pt_prev;
        pt_prev = tm;
        pc_prev2 = pc_prev;
        pc_prev = cm;
        wprev2 = wprev;
        wprev = w;
    }
    /* |S| -> 1 as w -> infinity for a strictly proper loop: the supremum is at least 1 */
    if (out->ms < 1.0) {
        out->ms = 1.0;
        out->w_ms = INFINITY;
    }
    if (q->wh > 0) { /* the roll-off start itself, where the bound is loosest relative to a flat |L| */
        double complex l, cv;
        ps_loop_at(an, c, ps_complex_make(0.0, q->wh), &l, &cv);
        out->rolloff_ratio = fmax(out->rolloff_ratio, cabs(l) / q->delta);
    }
    if (q->wb > 0) { /* the band edge itself and w -> 0 */
        out->band_peak = fmax(out->band_peak, mag_s(an, c, q->wb));
        out->band_peak = fmax(out->band_peak, mag_s(an, c, lo * 1e-3));
    }
    /* Past the grid the loop falls as w^-r (r its relative degree): the
     * roll-off bound, falling as w^-(1+k), holds there when r >= 1+k and
     * the ratio is falling at the grid's end (r > 1+k), or level (r = 1+k). */
    if (q->wh > 0) {
        int r = loop_rel_degree(an, c);
        double complex l, cv;
        ps_loop_at(an, c, ps_complex_make(0.0, hi * 1e3), &l, &cv);
        double tail = cabs(l) / (q->delta * pow(q->wh / (hi * 1e3), k1));
        out->rolloff_ratio = fmax(out->rolloff_ratio, tail);
        if ((double)r < k1 - 1e-12 && an->delay == 0.0) {
            snprintf(out->why, sizeof out->why, "the loop falls as w^-%d, slower than the roll-off's w^-%.3g", r, k1);
            return;
        }
    }
    double m = 1.0 + PS_CERT_MARGIN;
    out->shape_met = out->stable && out->roots_agree && !(q->wh > 0 && out->rolloff_ratio * m > 1.0) &&
                     !(q->wb > 0 && out->band_peak * m > q->eps) &&
                     !(q->effort_allowed > 0 && out->effort * m > q->effort_allowed);
    if (out->ms * m > q->ms_allowed)
        snprintf(out->why, sizeof out->why, "peak |S| %.4g is above the allowed %.4g", out->ms, q->ms_allowed);
    else if (out->mt * m > q->mt_allowed)
        snprintf(out->why, sizeof out->why, "peak |T| %.4g is above the allowed %.4g", out->mt, q->mt_allowed);
    else if (q->wh > 0 && out->rolloff_ratio * m > 1.0)
        snprintf(out->why, sizeof out->why, "|L| exceeds the roll-off bound past %.4g rad/s by a factor %.4g", q->wh,
                 out->rolloff_ratio);
    else if (q->wb > 0 && out->band_peak * m > q->eps)
        snprintf(out->why, sizeof out->why, "|S| reaches %.4g on the band [0, %.4g] rad/s, above %.4g", out->band_peak,
                 q->wb, q->eps);
    else if (q->effort_allowed > 0 && out->effort * m > q->effort_allowed)
        snprintf(out->why, sizeof out->why, "peak |C S| %.4g is above the allowed %.4g", out->effort,
                 q->effort_allowed);
    else
        out->meets = true;
}

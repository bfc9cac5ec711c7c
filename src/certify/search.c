/* search.c - the ladder of controller structures searched for a plant:
 * each structure with either sign of gain is sampled at random in a box of
 * parameters scaled to the plant (a global stage), the best few points are
 * then improved by Nelder-Mead kept inside the box (a local stage), and the
 * best controller found is verified by ps_loop_verify. The cost of a point
 * is the share of the allowed log-peaks its loop uses (the screen's
 * severity, for a real loop), plus a penalty for a roll-off or band
 * requirement it breaks; an unstable loop costs more than any stable one. */
#include <gsl/gsl_errno.h>
#include <gsl/gsl_poly.h>

#include "certify/loop_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

enum { ORDER_LIMIT = 40, KEEP = 4, SEARCH_PER_DECADE = 20 };

/* ---- controllers from parameters ---- */

typedef struct arm {
    ps_ctrl_structure structure;
    double sign;
    size_t dim;     /* search coordinates, each in [0, 1] */
} arm;

typedef struct space {
    const ps_analysis *an;
    const ps_requirements *q;
    double w_ref, k0;
    double w_mode;          /* the most lightly damped plant pole pair's modulus (0: none below 0.2) */
    double w_mode_zeta;     /* and its damping ratio */
    size_t n_rolloff[PS_CTRL_COUNT];
    double decay_min;
    double lo, hi;          /* search grid */
    size_t evaluations, budget;
} space;

static size_t arm_dim(ps_ctrl_structure s)
{
    switch (s) {
    case PS_CTRL_PI:
        return 3; /* K, wi, wf */
    case PS_CTRL_PID:
        return 4; /* K, wn, zeta, wf */
    case PS_CTRL_LEADLAG:
    case PS_CTRL_UNSTABLE:
        return 5; /* K, z1, z2 or p1, p2 or p1, wf */
    case PS_CTRL_NOTCH:
        return 7; /* K, wn, zeta, wm, zz, zp, wf */
    case PS_CTRL_FIXED:
        return 8; /* K, wz, zz, wp, zp, z3, p3, wf */
    default:
        return 0;
    }
}

/* out = a * b (descending coefficients); returns the count of out. */
static size_t pmul(const double *a, size_t na, const double *b, size_t nb, double *out)
{
    double t[2 * (PS_CTRL_MAX_ORDER + 1)] = {0};
    for (size_t i = 0; i < na; i++)
        for (size_t j = 0; j < nb; j++)
            t[i + j] += a[i] * b[j];
    memcpy(out, t, (na + nb - 1) * sizeof *out);
    return na + nb - 1;
}

static double decade(double x, double from, double span) { return pow(10.0, from + span * x); }

static void build(const space *sp, const arm *a, const double *x, ps_controller *c)
{
    memset(c, 0, sizeof *c);
    c->structure = a->structure;
    c->n_rolloff = sp->n_rolloff[a->structure];
    /* built with K = +-1, then scaled so that |C(j w_ref)| = k0 10^(6 x0 - 3): the first
       coordinate is the loop gain at the reference frequency whatever the structure */
    double w = sp->w_ref, k = a->sign;
    double wf = w * decade(x[a->dim - 1], 0, 3);
    c->param[0] = k;
    double num[PS_CTRL_MAX_ORDER + 1], den[PS_CTRL_MAX_ORDER + 1];
    size_t nn, nd;
    switch (a->structure) {
    case PS_CTRL_PI: {
        double wi = w * decade(x[1], -3, 3.5);
        c->param[1] = wi;
        num[0] = k, num[1] = k * wi, nn = 2;
        den[0] = 1, den[1] = 0, nd = 2;
        c->n_param = 3;
        break;
    }
    case PS_CTRL_PID:
    case PS_CTRL_NOTCH: {
        double wn = w * decade(x[1], -2.5, 3.5), zeta = decade(x[2], -1.3, 2.3);
        c->param[1] = wn;
        c->param[2] = zeta;
        num[0] = k, num[1] = k * 2 * zeta * wn, num[2] = k * wn * wn, nn = 3;
        den[0] = 1, den[1] = 0, nd = 2;
        c->n_param = 4;
        if (a->structure == PS_CTRL_NOTCH) {
            double wm = sp->w_mode * decade(x[3], -0.15, 0.3), zz = decade(x[4], -2.5, 2.2),
                   zp = decade(x[5], -1.3, 1.3);
            double nz[3] = {1, 2 * zz * wm, wm * wm}, pz[3] = {1, 2 * zp * wm, wm * wm};
            nn = pmul(num, nn, nz, 3, num);
            nd = pmul(den, nd, pz, 3, den);
            c->param[3] = wm;
            c->param[4] = zz;
            c->param[5] = zp;
            c->n_param = 7;
        }
        break;
    }
    case PS_CTRL_LEADLAG:
    case PS_CTRL_UNSTABLE: {
        double z1 = w * decade(x[1], -3, 5), z2 = w * decade(x[2], -3, 5);
        double p1 = w * decade(x[3], -3, 5);
        c->param[1] = z1;
        c->param[2] = z2;
        c->param[3] = p1;
        double f1[2] = {1 / z1, 1}, f2[2] = {1 / z2, 1};
        num[0] = k, nn = 1;
        nn = pmul(num, nn, f1, 2, num);
        nn = pmul(num, nn, f2, 2, num);
        if (a->structure == PS_CTRL_LEADLAG) {
            double p2 = w * decade(x[4], -3, 5);
            c->param[4] = p2;
            /* the lead-lag's last coordinate is p2; its roll-off corner is tied to the larger corner */
            wf = 10 * fmax(fmax(z1, z2), fmax(p1, p2));
            double g1[2] = {1 / p1, 1}, g2[2] = {1 / p2, 1};
            den[0] = 1, nd = 1;
            nd = pmul(den, nd, g1, 2, den);
            nd = pmul(den, nd, g2, 2, den);
            c->n_param = 6;
        } else {
            double g1[2] = {1 / p1, -1};
            den[0] = 1, nd = 1;
            nd = pmul(den, nd, g1, 2, den);
            c->n_param = 5;
        }
        break;
    }
    case PS_CTRL_FIXED: {
        double wz = w * decade(x[1], -3, 5), zz = decade(x[2], -1.3, 1.6), wp = w * decade(x[3], -3, 5),
               zp = decade(x[4], -1.3, 1.6), z3 = w * decade(x[5], -3, 5), p3 = w * decade(x[6], -3, 5);
        double n2[3] = {1 / (wz * wz), 2 * zz / wz, 1}, d2[3] = {1 / (wp * wp), 2 * zp / wp, 1};
        double n1[2] = {1 / z3, 1}, d1[2] = {1 / p3, 1};
        num[0] = k, nn = 1;
        nn = pmul(num, nn, n2, 3, num);
        nn = pmul(num, nn, n1, 2, num);
        den[0] = 1, nd = 1;
        nd = pmul(den, nd, d2, 3, den);
        nd = pmul(den, nd, d1, 2, den);
        c->param[1] = wz;
        c->param[2] = zz;
        c->param[3] = wp;
        c->param[4] = zp;
        c->param[5] = z3;
        c->param[6] = p3;
        c->n_param = 8;
        /* its roll-off corner: a decade above the largest of its own corners, times the coordinate */
        wf = 10 * fmax(fmax(wz, wp), fmax(z3, p3)) * decade(x[7], 0, 2);
        break;
    }
    default:
        return;
    }
    for (size_t i = 0; i < c->n_rolloff; i++) {
        double r[2] = {1 / wf, 1};
        nd = pmul(den, nd, r, 2, den);
    }
    c->param[c->n_param - 1] = wf;
    double complex jw = ps_complex_make(0.0, w), nv = 0, dv = 0;
    for (size_t i = 0; i < nn; i++)
        nv = nv * jw + num[i];
    for (size_t i = 0; i < nd; i++)
        dv = dv * jw + den[i];
    double shape = cabs(nv / dv), scale = sp->k0 * decade(x[0], -3, 6) / (shape > 0 && isfinite(shape) ? shape : 1);
    for (size_t i = 0; i < nn; i++)
        num[i] *= scale;
    c->param[0] = k * scale;
    /* monic denominator */
    double lead = den[0];
    for (size_t i = 0; i < nd; i++)
        c->den[i] = den[i] / lead;
    for (size_t i = 0; i < nn; i++)
        c->num[i] = num[i] / lead;
    c->n_num = nn;
    c->n_den = nd;
}

/* The deg roots of the polynomial with ASCENDING coefficients asc[0..deg]
 * into z (re, im pairs) by GSL. 0, or -1 when the solver fails. */
static int solve_asc(const double *asc, size_t deg, double *z)
{
    gsl_poly_complex_workspace *w = gsl_poly_complex_workspace_alloc(deg + 1);
    if (!w)
        return -1;
    int rc = gsl_poly_complex_solve(asc, deg + 1, w, z);
    gsl_poly_complex_workspace_free(w);
    return rc == GSL_SUCCESS ? 0 : -1;
}

int ps_ctrl_poles(const ps_controller *c, ps_root *out, size_t *n)
{
    size_t lead = 0;
    while (lead < c->n_den && c->den[lead] == 0.0)
        lead++;
    if (lead == c->n_den || c->n_den - lead > PS_CTRL_MAX_ORDER + 1)
        return -1;
    size_t deg = c->n_den - lead - 1;
    *n = 0;
    /* roots at the origin exactly, then the rest by GSL */
    size_t last = c->n_den;
    while (deg > 0 && c->den[last - 1] == 0.0) {
        out[(*n)++] = (ps_root){{0, 0}, PS_AXIS, 1, 0};
        last--;
        deg--;
    }
    if (deg == 0)
        return 0;
    double asc[PS_CTRL_MAX_ORDER + 1], z[2 * PS_CTRL_MAX_ORDER];
    for (size_t i = 0; i <= deg; i++)
        asc[i] = c->den[last - 1 - i];
    if (deg == 1) {
        out[(*n)++] = (ps_root){{-asc[0] / asc[1], 0}, PS_LHP, 1, 0};
        return 0;
    }
    if (solve_asc(asc, deg, z) != 0)
        return -1;
    for (size_t i = 0; i < deg; i++)
        out[(*n)++] = (ps_root){{z[2 * i], z[2 * i + 1]}, PS_LHP, 1, 0};
    return 0;
}

/* ---- closed-loop roots ---- */

/* prod (x - r_i) for roots r scaled by 1/sc, real parts of the expansion. */
static size_t expand(const ps_root *r, size_t n, double sc, double *out)
{
    double complex t[PS_MAX_ORDER + 1] = {1.0};
    for (size_t i = 0; i < n; i++) {
        double complex ri = ps_complex_make(r[i].v.re / sc, r[i].v.im / sc);
        for (size_t j = i + 1; j > 0; j--)
            t[j] = t[j] - ri * t[j - 1];
    }
    for (size_t i = 0; i <= n; i++)
        out[i] = creal(t[i]);
    return n + 1;
}

int ps_loop_closed_max_re(const ps_analysis *an, const ps_controller *c, double *max_re)
{
    size_t np = an->n_poles, nz = an->n_zeros;
    if (np + c->n_den > PS_MAX_ORDER || np < nz || an->delay > 0)
        return -1;
    /* in x = s / sc, sc the geometric mean of the plant's nonzero root moduli */
    double lsum = 0;
    size_t cnt = 0;
    for (size_t i = 0; i < np; i++) {
        double m = hypot(an->poles[i].v.re, an->poles[i].v.im);
        if (m > 0)
            lsum += log(m), cnt++;
    }
    for (size_t i = 0; i < nz; i++) {
        double m = hypot(an->zeros[i].v.re, an->zeros[i].v.im);
        if (m > 0)
            lsum += log(m), cnt++;
    }
    double sc = cnt ? exp(lsum / (double)cnt) : 1.0;
    double dp[PS_MAX_ORDER + 1], zp[PS_MAX_ORDER + 1];
    size_t ndp = expand(an->poles, np, sc, dp), nzp = expand(an->zeros, nz, sc, zp);
    /* C(sc x): coefficients in x */
    double cn[PS_CTRL_MAX_ORDER + 1], cd[PS_CTRL_MAX_ORDER + 1];
    for (size_t i = 0; i < c->n_num; i++)
        cn[i] = c->num[i] * pow(sc, (double)(c->n_num - 1 - i));
    for (size_t i = 0; i < c->n_den; i++)
        cd[i] = c->den[i] * pow(sc, (double)(c->n_den - 1 - i));
    /* gain prod(s - z) = gain sc^nz prod(x - z/sc); prod(s - p) = sc^np prod(x - p/sc):
       char(x) = prod(x - p/sc) cd(x) + gain sc^(nz - np) prod(x - z/sc) cn(x) */
    double g = an->gain * pow(sc, (double)nz - (double)np);
    size_t n = ndp + c->n_den - 1;
    double ch[2 * PS_MAX_ORDER + 2] = {0};
    for (size_t i = 0; i < ndp; i++)
        for (size_t j = 0; j < c->n_den; j++)
            ch[i + j] += dp[i] * cd[j];
    size_t m = nzp + c->n_num - 1, off = n - m;
    if (m > n)
        return -1;
    for (size_t i = 0; i < nzp; i++)
        for (size_t j = 0; j < c->n_num; j++)
            ch[off + i + j] += g * zp[i] * cn[j];
    size_t lead = 0;
    while (lead < n && ch[lead] == 0.0)
        lead++;
    if (n - lead < 2) {
        *max_re = -INFINITY;
        return n - lead == 1 ? 0 : -1;
    }
    double asc[2 * PS_MAX_ORDER + 2], z[4 * PS_MAX_ORDER + 4];
    size_t deg = n - 1 - lead;
    for (size_t i = 0; i <= deg; i++)
        asc[i] = ch[n - 1 - i];
    if (solve_asc(asc, deg, z) != 0)
        return -1;
    double mx = -INFINITY;
    for (size_t i = 0; i < deg; i++)
        mx = fmax(mx, z[2 * i] * sc);
    *max_re = mx;
    return 0;
}

/* ---- the cost of a point ---- */

static double share(double peak, double allowed)
{
    return log(peak) / log(allowed);
}

static double cost(space *sp, const arm *a, const double *x)
{
    sp->evaluations++;
    ps_controller c;
    build(sp, a, x, &c);
    ps_root cp[PS_CTRL_MAX_ORDER];
    size_t ncp = 0;
    if (ps_ctrl_poles(&c, cp, &ncp) != 0)
        return 1e6;
    int z;
    double mre;
    double top = ps_loop_top(sp->an, &c, sp->hi);
    if (!(sp->an->delay > 0) && ps_loop_closed_max_re(sp->an, &c, &mre) == 0)
        z = mre < -sp->decay_min ? 0 : 1;
    else
        z = ps_loop_winding(sp->an, &c, cp, ncp, sp->decay_min, top * 10, 6);
    if (z != 0)
        return 1e3 + (z > 0 ? z : 50);
    const ps_requirements *q = sp->q;
    double ms = 1, mt = 0, cs = 0, roll = 0, band = 0, k1 = 1 + q->k; /* |S| -> 1 at infinity */
    double bottom = ps_loop_bottom(sp->an, &c, sp->lo);
    int n = (int)ceil(SEARCH_PER_DECADE * log10(top / bottom));
    if (q->wh > 0) {
        double complex l, cv;
        ps_loop_at(sp->an, &c, ps_complex_make(0.0, q->wh), &l, &cv);
        roll = cabs(l) / q->delta;
    }
    for (int i = 0; i <= n; i++) {
        double w = bottom * pow(10.0, (double)i / SEARCH_PER_DECADE);
        double complex l, cv;
        ps_loop_at(sp->an, &c, ps_complex_make(0.0, w), &l, &cv);
        double complex s = 1.0 / (1.0 + l);
        ms = fmax(ms, cabs(s));
        mt = fmax(mt, cabs(l * s));
        cs = fmax(cs, cabs(cv * s));
        if (q->wh > 0 && w >= q->wh)
            roll = fmax(roll, cabs(l) / (q->delta * pow(q->wh / w, k1)));
        if (q->wb > 0 && w <= q->wb)
            band = fmax(band, cabs(s));
    }
    if (!isfinite(ms) || !isfinite(mt))
        return 1e3;
    double j = fmax(share(ms, q->ms_allowed), share(mt, q->mt_allowed));
    if (q->effort_allowed > 0)
        j = fmax(j, log1p(cs) / log1p(q->effort_allowed));
    double m = 1 + 2 * PS_CERT_MARGIN;
    if (q->wh > 0 && roll * m > 1)
        j += 10 * (log(roll * m) + 0.1);
    if (q->wb > 0 && band * m > q->eps)
        j += 10 * (log(band * m / q->eps) + 0.1);
    return j;
}

/* ---- random numbers: xorshift64*, seeded from the plant id ---- */

static uint64_t fnv1a(const char *s)
{
    uint64_t h = 1469598103934665603ull;
    for (; *s; s++)
        h = (h ^ (unsigned char)*s) * 1099511628211ull;
    return h ? h : 1;
}

static double uniform(uint64_t *st)
{
    uint64_t x = *st;
    x ^= x >> 12;
    x ^= x << 25;
    x ^= x >> 27;
    *st = x;
    return (double)((x * 2685821657736338717ull) >> 11) * 0x1p-53;
}

/* ---- Nelder-Mead inside the unit box ---- */

typedef struct point {
    size_t arm;
    double x[PS_CTRL_MAX_PARAMS];
    double j;
} point;

static void clamp01(double *x, size_t d)
{
    for (size_t i = 0; i < d; i++)
        x[i] = fmin(1.0, fmax(0.0, x[i]));
}

static void nelder_mead(space *sp, const arm *a, point *best, size_t evals)
{
    size_t d = a->dim;
    double s[PS_CTRL_MAX_PARAMS + 1][PS_CTRL_MAX_PARAMS], f[PS_CTRL_MAX_PARAMS + 1];
    for (size_t i = 0; i <= d; i++) {
        memcpy(s[i], best->x, d * sizeof(double));
        if (i > 0)
            s[i][i - 1] += best->x[i - 1] < 0.9 ? 0.08 : -0.08;
        f[i] = i ? cost(sp, a, s[i]) : best->j;
    }
    size_t used = d;
    while (used + 2 <= evals) {
        /* order: worst h, second worst g, best l */
        size_t h = 0, l = 0;
        for (size_t i = 1; i <= d; i++) {
            if (f[i] > f[h])
                h = i;
            if (f[i] < f[l])
                l = i;
        }
        size_t g = l;
        for (size_t i = 0; i <= d; i++)
            if (i != h && f[i] > f[g])
                g = i;
        if (f[h] - f[l] < 1e-9)
            break;
        double cen[PS_CTRL_MAX_PARAMS] = {0}, xr[PS_CTRL_MAX_PARAMS], xe[PS_CTRL_MAX_PARAMS];
        for (size_t i = 0; i <= d; i++)
            if (i != h)
                for (size_t k = 0; k < d; k++)
                    cen[k] += s[i][k] / (double)d;
        for (size_t k = 0; k < d; k++)
            xr[k] = cen[k] + (cen[k] - s[h][k]);
        clamp01(xr, d);
        double fr = cost(sp, a, xr);
        used++;
        if (fr < f[l]) {
            for (size_t k = 0; k < d; k++)
                xe[k] = cen[k] + 2 * (cen[k] - s[h][k]);
            clamp01(xe, d);
            double fe = cost(sp, a, xe);
            used++;
            if (fe < fr) {
                memcpy(s[h], xe, d * sizeof(double));
                f[h] = fe;
            } else {
                memcpy(s[h], xr, d * sizeof(double));
                f[h] = fr;
            }
        } else if (fr < f[g]) {
            memcpy(s[h], xr, d * sizeof(double));
            f[h] = fr;
        } else {
            for (size_t k = 0; k < d; k++)
                xe[k] = cen[k] + 0.5 * (s[h][k] - cen[k]);
            double fc = cost(sp, a, xe);
            used++;
            if (fc < f[h]) {
                memcpy(s[h], xe, d * sizeof(double));
                f[h] = fc;
            } else { /* shrink toward the best */
                for (size_t i = 0; i <= d && used < evals; i++) {
                    if (i == l)
                        continue;
                    for (size_t k = 0; k < d; k++)
                        s[i][k] = s[l][k] + 0.5 * (s[i][k] - s[l][k]);
                    f[i] = cost(sp, a, s[i]);
                    used++;
                }
            }
        }
    }
    for (size_t i = 0; i <= d; i++)
        if (f[i] < best->j) {
            best->j = f[i];
            memcpy(best->x, s[i], d * sizeof(double));
        }
}

/* ---- the search ---- */

static int rel_need(const ps_requirements *q)
{
    return q->wh > 0 ? (int)ceil(1.0 + q->k - 1e-9) : 1;
}

static double reference_w(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl)
{
    if (q->wh > 0)
        return q->wh / 4;
    double lo = fl->crossover_min, hi = fl->crossover_max;
    if (lo > 0 && isfinite(hi) && hi > lo)
        return sqrt(lo * hi);
    if (lo > 0)
        return 3 * lo;
    double lsum = 0;
    size_t n = 0;
    for (size_t i = 0; i < an->n_poles; i++) {
        double m = hypot(an->poles[i].v.re, an->poles[i].v.im);
        if (m > 0)
            lsum += log(m), n++;
    }
    return n ? exp(lsum / (double)n) : 1.0;
}

/* The largest share of the allowed peaks a verified loop uses (as the
 * screen's severity: ln M / ln M_allowed, and the effort share when an
 * effort limit is given). */
static double verified_share(const ps_requirements *q, const ps_loop_check *k)
{
    double share = fmax(log(fmax(k->ms, 1.0)) / log(q->ms_allowed), log(fmax(k->mt, 1.0)) / log(q->mt_allowed));
    if (q->effort_allowed > 0)
        share = fmax(share, log1p(k->effort) / log1p(q->effort_allowed));
    return share;
}

void ps_certify(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, const char *id, size_t budget,
                ps_cert *out)
{
    memset(out, 0, sizeof *out);
    out->seed = fnv1a(id);
    if (an->h > 0) {
        snprintf(out->reason, sizeof out->reason, "a digital loop: the controller search covers continuous loops only");
        return;
    }
    if (fl->infinite || an->hidden_unstable) {
        snprintf(out->reason, sizeof out->reason, "no controller stabilizes this plant");
        return;
    }
    ps_attain_floors(an, q, fl, &out->attain); /* where no roll-off is required: the floors reached */
    if (an->n_poles > ORDER_LIMIT) {
        snprintf(out->reason, sizeof out->reason, "order %zu is above the search's limit of %d", an->n_poles,
                 ORDER_LIMIT);
        return;
    }
    if (!(an->gain != 0) || !isfinite(an->gain)) {
        snprintf(out->reason, sizeof out->reason, "the plant's gain is zero or not finite");
        return;
    }
    if (budget == 0)
        budget = PS_CERT_BUDGET;
    space sp = {.an = an, .q = q, .w_ref = reference_w(an, q, fl), .k0 = 1, .budget = budget};
    double complex p0, cv;
    ps_controller unit = {.n_num = 1, .n_den = 1, .num = {1}, .den = {1}};
    ps_loop_at(an, &unit, ps_complex_make(0, sp.w_ref), &p0, &cv);
    sp.k0 = cabs(p0) > 0 && isfinite(cabs(p0)) ? 1 / cabs(p0) : 1;
    static const int base_rel[PS_CTRL_COUNT] = {0, -1, 0, -1, -1, 0};
    for (size_t i = 0; i < an->n_poles; i++) { /* the most lightly damped pair, for the notch */
        double m = hypot(an->poles[i].v.re, an->poles[i].v.im);
        if (an->poles[i].v.im > 0 && m > 0 && -an->poles[i].v.re / m < 0.2 &&
            (sp.w_mode == 0 || -an->poles[i].v.re / m < sp.w_mode_zeta)) {
            sp.w_mode = m;
            sp.w_mode_zeta = -an->poles[i].v.re / m;
        }
    }
    for (int s = 0; s < PS_CTRL_COUNT; s++) {
        int nf = rel_need(q) - an->rel_degree - base_rel[s];
        if (nf < -base_rel[s])
            nf = -base_rel[s];
        if (nf < 0)
            nf = 0;
        sp.n_rolloff[s] = (size_t)nf;
    }
    ps_controller probe;
    arm arms[2 * PS_CTRL_COUNT];
    size_t n_arms = 0;
    for (int s = 0; s < PS_CTRL_COUNT; s++) {
        if (s == PS_CTRL_UNSTABLE && fl->parity_interlacing)
            continue; /* a stable controller can stabilize: the unstable rung is for plants that need it */
        if (s == PS_CTRL_NOTCH && sp.w_mode == 0)
            continue; /* no light mode to notch */
        size_t order = (s == PS_CTRL_LEADLAG ? 2 : s == PS_CTRL_NOTCH || s == PS_CTRL_FIXED ? 3 : 1) + sp.n_rolloff[s];
        if (order > PS_CTRL_MAX_ORDER)
            continue;
        arms[n_arms++] = (arm){(ps_ctrl_structure)s, 1, arm_dim((ps_ctrl_structure)s)};
        arms[n_arms++] = (arm){(ps_ctrl_structure)s, -1, arm_dim((ps_ctrl_structure)s)};
    }
    if (n_arms == 0) {
        snprintf(out->reason, sizeof out->reason,
                 "the roll-off slope %.4g needs more roll-off poles than a controller of order %d can carry", q->k,
                 PS_CTRL_MAX_ORDER);
        return;
    }
    /* the grid the search judges on */
    double x_mid[PS_CTRL_MAX_PARAMS] = {0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5, 0.5};
    build(&sp, &arms[0], x_mid, &probe);
    ps_loop_range(an, q, &probe, &sp.lo, &sp.hi);
    sp.decay_min = sp.lo; /* as the verification asks: a thousandth of the slowest scale */
    sp.lo = fmin(sp.lo, sp.w_ref * 1e-4);
    sp.hi = fmax(sp.hi, sp.w_ref * 1e4);
    uint64_t rng = out->seed;
    /* the best point of each arm (structure and sign), then the best KEEP of all others:
       the local stage starts from every structure, not only the one that sampled best */
    point keep[2 * PS_CTRL_COUNT + KEEP];
    size_t n_keep = 0;
    point rest[KEEP];
    size_t n_rest = 0;
    size_t global = budget / 2, per_arm = n_arms ? global / n_arms : 0;
    for (size_t a = 0; a < n_arms; a++) {
        point top = {a, {0}, INFINITY};
        for (size_t i = 0; i < per_arm; i++) {
            point p = {a, {0}, 0};
            for (size_t k = 0; k < arms[a].dim; k++)
                p.x[k] = uniform(&rng);
            p.j = cost(&sp, &arms[a], p.x);
            point loser = p;
            if (p.j < top.j) {
                loser = top;
                top = p;
            }
            if (!isfinite(loser.j))
                continue;
            /* keep the KEEP best of the rest, best first */
            size_t at = n_rest < KEEP ? n_rest++ : KEEP;
            if (at == KEEP && loser.j >= rest[KEEP - 1].j)
                continue;
            if (at == KEEP)
                at = KEEP - 1;
            while (at > 0 && rest[at - 1].j > loser.j) {
                rest[at] = rest[at - 1];
                at--;
            }
            rest[at] = loser;
        }
        if (isfinite(top.j))
            keep[n_keep++] = top;
    }
    for (size_t i = 0; i < n_rest; i++)
        keep[n_keep++] = rest[i];
    size_t left = budget > sp.evaluations ? budget - sp.evaluations : 0;
    for (size_t i = 0; i < n_keep; i++)
        nelder_mead(&sp, &arms[keep[i].arm], &keep[i], left / n_keep);
    /* best first again after the local stage */
    for (size_t i = 1; i < n_keep; i++)
        for (size_t j = i; j > 0 && keep[j].j < keep[j - 1].j; j--) {
            point t = keep[j];
            keep[j] = keep[j - 1];
            keep[j - 1] = t;
        }
    out->evaluations = sp.evaluations;
    out->status = PS_CERT_UNDECIDED;
    snprintf(out->reason, sizeof out->reason, "no stabilizing controller found within the budget");
    /* Every kept point is verified on the dense grid, and the best verified one is taken: one
       that meets every requirement before one that does not, then the smaller verified share of
       the allowed peaks. (The search judges on a coarser grid, where a sharp peak can fall
       between points; taking the first stable point in the search's order kept such a one.) */
    double best_share = INFINITY;
    bool best_meets = false;
    for (size_t i = 0; i < n_keep; i++) {
        if (keep[i].j >= 1e3)
            break;
        ps_controller c;
        build(&sp, &arms[keep[i].arm], keep[i].x, &c);
        ps_loop_check chk;
        ps_loop_verify(an, q, &c, &chk);
        if (!chk.stable || !chk.roots_agree)
            continue;
        double share = verified_share(q, &chk);
        if (out->found && (best_meets > chk.meets || (best_meets == chk.meets && share >= best_share)))
            continue;
        out->found = true;
        out->ctrl = c;
        out->chk = chk;
        best_share = share;
        best_meets = chk.meets;
    }
    if (!out->found)
        return;
    if (out->chk.meets) {
        out->status = PS_CERT_DEMONSTRATED;
        out->reason[0] = '\0';
    } else
        snprintf(out->reason, sizeof out->reason, "best found: %.180s", out->chk.why);
}

/* sampling_words.c - the digital loop of one plant in words, shared by every
 * report: sample rate, Nyquist frequency, computation delay, roots in z with
 * the sampling zeros marked, and the Nyquist floor (discrete Bode area). */
#include "report/reports.h"
#include "core/text.h"

#include <math.h>
#include <stdio.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

bool ps_zroot_outside(ps_cplx z)
{
    return hypot(z.re, z.im) > 1.0 + PS_CIRCLE_TOL;
}

bool ps_zzero_is_sampling(const ps_floors *fl, bool in_z, size_t i)
{
    return !in_z && i < PS_ZMAP && i < fl->n_zzeros && fl->zzero_sampling[i];
}

static void put_time(ps_text *t, double th)
{
    if (th < 1.0)
        ps_text_put(t, "%.4g ms", th * 1e3);
    else
        ps_text_put(t, "%.4g s", th);
}

void ps_sampling_text(double h, double compute_delay, bool in_z, char *buf, size_t n)
{
    ps_text t = ps_text_on(buf, n);
    if (!(h > 0))
        return;
    double samples = compute_delay / h;
    ps_text_put(&t, "sample rate %.4g Hz (period ", 1.0 / h);
    put_time(&t, h);
    ps_text_put(&t, "), Nyquist frequency %.4g rad/s (%.4g Hz), computation delay ", M_PI / h, 0.5 / h);
    put_time(&t, compute_delay);
    ps_text_put(&t, " (%.4g sample%s); %s", samples, samples == 1.0 ? "" : "s",
                in_z ? "plant given in z" : "continuous plant behind a zero-order hold");
}

static void put_root(ps_text *t, ps_cplx z)
{
    if (z.im != 0)
        ps_text_put(t, "%.4g+-%.4gj", z.re, fabs(z.im));
    else
        ps_text_put(t, "%.4g", z.re);
}

/* Each root once: the lower member of a conjugate pair is skipped. */
static bool seen_before(const ps_cplx *r, size_t i)
{
    for (size_t k = 0; k < i; k++)
        if (r[k].re == r[i].re && fabs(r[k].im) == fabs(r[i].im))
            return true;
    return false;
}

void ps_zroots_text(const ps_floors *fl, bool in_z, char *buf, size_t n)
{
    ps_text t = ps_text_on(buf, n);
    if (!(fl->h > 0))
        return;
    size_t np = fl->n_zpoles < PS_ZMAP ? fl->n_zpoles : PS_ZMAP;
    size_t nz = fl->n_zzeros < PS_ZMAP ? fl->n_zzeros : PS_ZMAP;
    ps_text_put(&t, "poles in z:");
    if (np == 0)
        ps_text_put(&t, " none");
    for (size_t i = 0, first = 1; i < np; i++) {
        if (seen_before(fl->zpoles, i))
            continue;
        ps_text_put(&t, first ? " " : ", ");
        first = 0;
        put_root(&t, fl->zpoles[i]);
        if (ps_zroot_outside(fl->zpoles[i]))
            ps_text_put(&t, " (outside the unit circle)");
    }
    if (fl->n_zpoles > np)
        ps_text_put(&t, " (the first %zu of %zu)", np, fl->n_zpoles);
    ps_text_put(&t, "; zeros in z:");
    if (nz == 0)
        ps_text_put(&t, " none");
    for (size_t i = 0, first = 1; i < nz; i++) {
        if (seen_before(fl->zzeros, i))
            continue;
        ps_text_put(&t, first ? " " : ", ");
        first = 0;
        put_root(&t, fl->zzeros[i]);
        bool smp = ps_zzero_is_sampling(fl, in_z, i), out = ps_zroot_outside(fl->zzeros[i]);
        if (smp && out)
            ps_text_put(&t, " (sampling zero, outside the unit circle)");
        else if (smp)
            ps_text_put(&t, " (sampling zero)");
        else if (out)
            ps_text_put(&t, " (outside the unit circle)");
    }
    if (fl->n_zzeros > nz)
        ps_text_put(&t, " (the first %zu of %zu)", nz, fl->n_zzeros);
    ps_text_put(&t, "; relative degree in z %d", fl->z_rel_degree);
}

void ps_nyquist_floor_text(const ps_floors *fl, double wb, char *buf, size_t n)
{
    ps_text t = ps_text_on(buf, n);
    if (!(fl->h > 0))
        return;
    double wn = M_PI / fl->h;
    if (isnan(fl->ms_nyquist)) {
        ps_text_put(&t, "Ms floor from the discrete Bode area: not applicable (the plant in z has direct "
                        "feedthrough, so L(inf) may be non-zero)");
        return;
    }
    ps_text_put(&t, "Ms floor on [%.4g, %.4g rad/s] from the discrete Bode area (Sung & Hara, IJC 48, 1988): ",
                wb > 0 ? wb : 0.0, wn);
    ps_text_put_big(&t, fl->ms_nyquist, fl->ms_nyquist_ln, 4);
}

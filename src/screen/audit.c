/* audit.c - every floor of one plant with the formula of the route taken,
 * its inputs, source and assumption (see audit.h). */
#include "screen/audit.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>

#include "core/text.h"

/* "p = 7, 0.5+6j" : the RHP roots of one kind, full precision (both members of a pair). */
static void put_rhp(ps_text *t, const char *label, const ps_root *r, size_t n)
{
    ps_text_put(t, "%s =", label);
    size_t k = 0;
    for (size_t i = 0; i < n; i++) {
        if (r[i].region != PS_RHP)
            continue;
        ps_text_put(t, "%s %.10g", k++ ? "," : "", r[i].v.re);
        if (r[i].v.im != 0)
            ps_text_put(t, "%+.10gj", r[i].v.im);
    }
    if (k == 0)
        ps_text_put(t, " none");
}

static ps_audit_item *add(ps_audit *a, const char *key, const char *name, double value, double value_ln,
                          const char *source, const char *assumption)
{
    ps_audit_item *it = &a->item[a->n++];
    it->key = key;
    it->name = name;
    it->value = value;
    it->value_ln = value_ln;
    it->formula[0] = it->inputs[0] = '\0';
    it->source = source;
    it->assumption = assumption;
    return it;
}

static void set_formula(ps_audit_item *it, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void set_formula(ps_audit_item *it, const char *fmt, ...)
{
    va_list ap;
    va_start(ap, fmt);
    vsnprintf(it->formula, sizeof it->formula, fmt, ap);
    va_end(ap);
}

/* The inputs of the interpolation routes: RHP poles, RHP zeros, delay. */
static void roots_inputs(ps_audit_item *it, const ps_analysis *an)
{
    ps_text t = ps_text_on(it->inputs, sizeof it->inputs);
    put_rhp(&t, "p", an->poles, an->n_poles);
    put_rhp(&t, "; z", an->zeros, an->n_zeros);
    ps_text_put(&t, "; theta = %.10g s", an->delay);
}

static const char SRC_SP5[] = "Skogestad & Postlethwaite, Multivariable Feedback Control, 2nd ed. 2005, ch. 5";
static const char SRC_CHEN[] = "J. Chen, IEEE TAC 45(6), 2000; Skogestad & Postlethwaite, 2nd ed. 2005, ch. 5-6";
static const char SRC_PICK[] = "Nevanlinna-Pick interpolation: Doyle, Francis & Tannenbaum, Feedback Control Theory, "
                               "1992, ch. \"Model Matching\"; Skogestad & Postlethwaite, 2nd ed. 2005, ch. 5";
static const char SRC_FL[] = "Freudenberg & Looze, IEEE TAC 30(6), 1985";
static const char ASSUME_IS[] = "internal stability: no RHP pole/zero cancellation between plant and controller";

static void mt_item(ps_audit *a, const ps_analysis *an, const ps_floors *fl)
{
    ps_audit_item *it = add(a, "mt_interpolation", "Mt interpolation floor", fl->mt_interpolation, fl->mt_interpolation_ln, SRC_PICK, ASSUME_IS);
    roots_inputs(it, an);
    switch (fl->mt_route) {
    case PS_ROUTE_NONE:
        if (fl->mt_interpolation > 0)
            set_formula(it, "1: T = 1 at a pole on the imaginary axis, so ||T|| >= 1");
        else
            set_formula(it, "0: no RHP or axis pole forces T anywhere (C = 0 gives T = 0)");
        it->source = SRC_SP5;
        break;
    case PS_ROUTE_INFINITE:
        set_formula(it, "infinite: %s", fl->note);
        it->source = SRC_SP5;
        break;
    case PS_ROUTE_ONE_POINT:
        set_formula(it, "|w| at the one RHP pole p, w = e^{p theta} prod_j (p + conj z_j)/(p - z_j) "
                        "(Pick with one point)");
        break;
    case PS_ROUTE_PICK:
    case PS_ROUTE_CHEN:
        set_formula(it, "sqrt(lambda_max(B, A)), A_kl = 1/(conj p_k + p_l), B_kl = conj(w_k) w_l/(conj p_k + p_l), "
                        "w_i = e^{p_i theta} prod_j (p_i + conj z_j)/(p_i - z_j)");
        break;
    case PS_ROUTE_CONFLUENT:
        set_formula(it, "confluent Nevanlinna-Pick: T(p) = 1 with T', T'', ... = 0 at a repeated pole, the Pick "
                        "matrices of the Taylor coefficients of e^{theta s}/B_z(s) and of 1/(conj s + t)");
        break;
    case PS_ROUTE_SINGLE:
        set_formula(it, "max_i e^{Re p_i theta} prod_j |conj z_j + p_i|/|z_j - p_i| (single-point product; the "
                        "joint floor could not be computed: %s)", fl->note);
        it->source = SRC_SP5;
        break;
    case PS_ROUTE_EQUAL_MT:
    case PS_ROUTE_JOINT_POLES: break;
    }
}

static void ms_item(ps_audit *a, const ps_analysis *an, const ps_floors *fl)
{
    ps_audit_item *it = add(a, "ms_interpolation", "Ms interpolation floor", fl->ms_interpolation, fl->ms_interpolation_ln, SRC_CHEN, ASSUME_IS);
    roots_inputs(it, an);
    switch (fl->ms_route) {
    case PS_ROUTE_NONE:
        if (an->n_rhp_zeros > 0)
            set_formula(it, "max_j prod_i |z_j + conj p_i|/|z_j - p_i| over the RHP zeros (no RHP pole: 1, "
                            "S(z) = 1)");
        else if (fl->ms_interpolation >= 1)
            set_formula(it, "1: S -> 1 at high frequency (strictly proper or delayed loop) or S = 1 at a zero "
                            "on the imaginary axis");
        else
            set_formula(it, "0: a biproper, delay-free plant with no RHP or axis zero forces no value of S (a high "
                            "gain drives ||S|| towards 0)");
        it->source = SRC_SP5;
        break;
    case PS_ROUTE_INFINITE:
        set_formula(it, "infinite: %s", fl->note);
        it->source = SRC_SP5;
        break;
    case PS_ROUTE_ONE_POINT:
        set_formula(it, "prod_j |p + conj z_j|/|p - z_j| at the one RHP pole p: the Pick value at the pole, equal "
                        "to Chen's joint floor (his equality Ms_min = Mt_min without delay)");
        break;
    case PS_ROUTE_CHEN:
        set_formula(it, "sqrt(1 + sigma_max^2(Qz^-1/2 Qzp Qp^-1/2)), [Qz]_ik = 1/(z_i + conj z_k), "
                        "[Qp]_jl = 1/(conj p_j + p_l), [Qzp]_ij = 1/(z_i - p_j)");
        break;
    case PS_ROUTE_PICK: /* not taken for Ms: several poles with zeros go through Chen's formula */
    case PS_ROUTE_EQUAL_MT:
        set_formula(it, "equal to the Mt interpolation floor: with a delay the floor on ||S|| equals the one on "
                        "||T|| (commutant-lifting equality; held in every numerical check, not proven here)");
        it->source = "Astrom, European J. Control 2000 (single pole, from memory); equality checked numerically";
        break;
    case PS_ROUTE_JOINT_POLES:
        set_formula(it, "equal to the Mt interpolation floor: without delay the floors on ||S|| and ||T|| are one "
                        "joint floor (Chen's equality Ms_min = Mt_min), here from the Pick problem at the poles, "
                        "the better conditioned of the two");
        break;
    case PS_ROUTE_CONFLUENT:
        set_formula(it, "confluent Nevanlinna-Pick at the RHP zeros: S(z) = 1 with S', S'', ... = 0 at a "
                        "repeated zero, data the Taylor coefficients of 1/B_p(s)");
        break;
    case PS_ROUTE_SINGLE:
        set_formula(it, "max_j prod_i |z_j + conj p_i|/|z_j - p_i| (single-point product; the joint floor could "
                        "not be computed: %s)", fl->note);
        it->source = SRC_SP5;
        break;
    }
}

static ps_audit_item *find_item(ps_audit *a, const char *key)
{
    for (size_t i = 0; i < a->n; i++)
        if (strcmp(a->item[i].key, key) == 0)
            return &a->item[i];
    return NULL;
}

/* Prefix an item's formula with how the sampled loop reaches it. */
static void prefix_formula(ps_audit_item *it, const char *prefix)
{
    char was[PS_AUDIT_TEXT];
    snprintf(was, sizeof was, "%s", it->formula);
    ps_text t = ps_text_on(it->formula, sizeof it->formula);
    ps_text_put(&t, "%s%s", prefix, was);
}

static const char SRC_SH[] = "Sung & Hara, Int. J. Control 48(6), 1988 (discrete Bode integral)";

/* A digital loop: the items say what was computed for the sampled loop
 * (README "Digital loops"), with the inputs in z, and the Nyquist floor. */
static void sampled_items(ps_audit *out, const ps_requirements *q, const ps_floors *fl)
{
    const char *w_route = "on the plant in w = (z - 1)/(z + 1) (roots in z mapped; the zeros at z = infinity, "
                          "as many as the relative degree in z, at w = 1; no delay left): ";
    char zin[PS_AUDIT_TEXT];
    ps_text t = ps_text_on(zin, sizeof zin);
    ps_text_put(&t, "h = %.10g s; poles in z outside the unit circle:", fl->h);
    size_t k = 0;
    for (size_t i = 0; i < fl->n_zpoles && i < PS_ZMAP; i++)
        if (hypot(fl->zpoles[i].re, fl->zpoles[i].im) > 1.0)
            ps_text_put(&t, "%s %.10g%+.10gj", k++ ? "," : "", fl->zpoles[i].re, fl->zpoles[i].im);
    ps_text_put(&t, "%s; finite zeros in z outside:", k ? "" : " none");
    k = 0;
    for (size_t j = 0; j < fl->n_zzeros && j < PS_ZMAP; j++)
        if (hypot(fl->zzeros[j].re, fl->zzeros[j].im) > 1.0)
            ps_text_put(&t, "%s %.10g%+.10gj%s", k++ ? "," : "", fl->zzeros[j].re, fl->zzeros[j].im,
                        fl->zzero_sampling[j] ? " (sampling zero)" : "");
    ps_text_put(&t, "%s; relative degree in z %d", k ? "" : " none", fl->z_rel_degree);

    ps_audit_item *it = find_item(out, "bode_area");
    if (it) {
        set_formula(it, "F = (pi/h) sum ln|p_d| over the poles outside the unit circle (pi sum Re p for a held "
                        "plant), the area of ln|S| over [0, pi/h] rad/s");
        snprintf(it->inputs, sizeof it->inputs, "%s", zin);
        it->source = SRC_SH;
        it->assumption = fl->bode_controller_rd ? "closed loop stable; a strictly proper controller (the plant in z "
                                                  "has direct feedthrough)"
                                                : "closed loop stable; any proper controller (P(z) -> 0 as z -> "
                                                  "infinity, so L(inf) = 0)";
    }
    const char *keys[] = {"ms_interpolation", "mt_interpolation", "effort"};
    for (int i = 0; i < 3; i++)
        if ((it = find_item(out, keys[i]))) {
            prefix_formula(it, w_route);
            snprintf(it->inputs, sizeof it->inputs, "%s", zin);
        }
    if ((it = find_item(out, "ms_band"))) {
        it->value = fl->ms_band;
        it->value_ln = fl->ms_band_ln;
        if (q->wh > 0 && !isnan(fl->ms_band))
            set_formula(it, "exp([F + w_b ln(1/eps) - I_h] / (w_h - w_b)), I_h the integral of the roll-off bound "
                            "-ln(1 - delta (w_h/w)^(1+k)) over [w_h, pi/h] only (a value below 1 binds nothing)");
        else if (q->wh > 0)
            set_formula(it, "not applicable: the plant in z has direct feedthrough (L(inf) may be non-zero)");
    }
    if ((it = find_item(out, "ms_band")) && q->wh > 0)
        it->assumption = "the future loop meets |L| <= delta (w_h/w)^(1+k) on [w_h, pi/h] (an assumption about the "
                         "controller); L(inf) = 0";
    if ((it = find_item(out, "ms_poisson")) && q->wb > 0) {
        set_formula(it, "the Poisson floor at the zeros outside the unit circle (z = infinity included, at w = 1) of "
                        "the plant in w, with the band edge tan(w_b h / 2) on the w axis");
        t = ps_text_on(it->inputs, sizeof it->inputs);
        ps_text_put(&t, "%s; eps = %.10g; w_b = %.10g rad/s", zin, q->eps, q->wb);
    }
    if ((it = find_item(out, "mt_poisson")) && q->wh > 0 && q->delta > 0) {
        set_formula(it, "the Poisson floor at the poles of the plant in w, with the roll-off start tan(w_h h / 2) on "
                        "the w axis and no delay left");
        t = ps_text_on(it->inputs, sizeof it->inputs);
        ps_text_put(&t, "%s; eps_T = %.10g; w_h = %.10g rad/s", zin, q->delta / (1 - q->delta), q->wh);
    }
    if (out->n < PS_AUDIT_MAX) {
        /* before the two overall items */
        ps_audit_item ny = {0};
        ny.key = "ms_nyquist";
        ny.name = "Ms Nyquist floor";
        ny.value = fl->ms_nyquist;
        ny.value_ln = fl->ms_nyquist_ln;
        ny.source = SRC_SH;
        ny.assumption = "|S| <= eps on [0, w_b] (no band: w_b = 0); L(inf) = 0";
        if (isnan(fl->ms_nyquist))
            snprintf(ny.formula, sizeof ny.formula, "not applicable: the plant in z has direct feedthrough");
        else
            snprintf(ny.formula, sizeof ny.formula,
                     "exp([F + w_b ln(1/eps)] / (pi/h - w_b)): the area F left to [w_b, pi/h] (no roll-off "
                     "assumption needed)");
        snprintf(ny.inputs, sizeof ny.inputs, "F = %.10g; w_b = %.10g rad/s; eps = %.10g; pi/h = %.10g rad/s",
                 fl->bode_area, q->wb > 0 ? q->wb : 0.0, q->wb > 0 ? q->eps : 1.0, fl->nyquist);
        size_t at = out->n >= 2 ? out->n - 2 : out->n;
        memmove(&out->item[at + 1], &out->item[at], (out->n - at) * sizeof out->item[0]);
        out->item[at] = ny;
        out->n++;
    }
    if ((it = find_item(out, "ms")))
        prefix_formula(it, "with the Ms Nyquist floor among the Ms floors: ");
}

void ps_audit_floors(const ps_analysis *an, const ps_requirements *q, const ps_floors *fl, ps_audit *out)
{
    memset(out, 0, sizeof *out);
    ps_audit_item *it;
    ps_text t;

    it = add(out, "bode_area", "Bode area F", fl->bode_area, log(fl->bode_area), "Bode 1945; " "Freudenberg & Looze, IEEE TAC 30(6), 1985",
             "closed loop stable; loop of relative degree >= 2 (degree 1 adds -pi/2 lim s L(s))");
    set_formula(it, "F = pi * sum Re p over the RHP poles (with multiplicity)");
    t = ps_text_on(it->inputs, sizeof it->inputs);
    put_rhp(&t, "p", an->poles, an->n_poles);

    ms_item(out, an, fl);
    mt_item(out, an, fl);

    it = add(out, "effort", "effort floor (peak |C S|)", fl->effort, fl->effort_ln, SRC_SP5, ASSUME_IS);
    t = ps_text_on(it->inputs, sizeof it->inputs);
    put_rhp(&t, "p", an->poles, an->n_poles);
    ps_text_put(&t, "; theta = %.10g s; G_s the stable mirror k prod(s - z)/[prod_{LHP, axis}(s - q) prod_{RHP}(s + conj p)]",
        an->delay);
    if (an->n_rhp_poles == 0)
        set_formula(it, "0: no unstable pole to stabilize");
    else if (fl->infinite)
        set_formula(it, "infinite: %s", fl->note);
    else
        set_formula(it, "Pick minimum norm with points p_i and values e^{p_i theta}/G_s(p_i) (one pole: "
                        "e^{p theta}/|G_s(p)|)");

    it = add(out, "ms_band", "Ms band-forced floor", fl->ms_band, fl->ms_band_ln,
             "Doyle, Francis & Tannenbaum, Feedback Control Theory, 1992, ch. \"Design Constraints\"; "
             "delta = 0: G. Stein, IEEE CSM 23(4), 2003",
             "the future loop meets |L| <= delta (w_h/w)^(1+k) beyond w_h (an assumption about the controller); "
             "loop relative degree >= 2");
    t = ps_text_on(it->inputs, sizeof it->inputs);
    if (q->wh > 0) {
        set_formula(it, "exp([F + w_b ln(1/eps) - I] / (w_h - w_b)), I = w_h sum_n delta^n/(n (n(1+k) - 1)) the exact "
                        "roll-off tail (a value below 1 binds nothing)");
        ps_text_put(&t, "F = %.10g; w_b = %.10g rad/s; eps = %.10g; w_h = %.10g rad/s; delta = %.10g; k = %.10g",
            fl->bode_area, q->wb > 0 ? q->wb : 0.0, q->wb > 0 ? q->eps : 1.0, q->wh, q->delta, q->k);
    } else
        set_formula(it, "not applicable: no rolloff_start given");

    it = add(out, "ms_poisson", "Ms Poisson floor", fl->ms_poisson, fl->ms_poisson_ln, SRC_FL, "|S| <= eps on [0, w_b]");
    t = ps_text_on(it->inputs, sizeof it->inputs);
    if (q->wb > 0) {
        set_formula(it, "max over the RHP zeros z = x + jy (one per pair) of (1/eps)^{Theta/(pi - Theta)} "
                        "|B_p(z)^-1|^{pi/(pi - Theta)}, Theta = atan((w_b - y)/x) + atan((w_b + y)/x); 1 without an "
                        "RHP zero");
        put_rhp(&t, "z", an->zeros, an->n_zeros);
        put_rhp(&t, "; p", an->poles, an->n_poles);
        ps_text_put(&t, "; eps = %.10g; w_b = %.10g rad/s", q->eps, q->wb);
    } else
        set_formula(it, "not applicable: no band requirement");

    it = add(out, "mt_poisson", "Mt Poisson floor", fl->mt_poisson, fl->mt_poisson_ln, SRC_FL,
             "|T| <= eps_T = delta/(1 - delta) beyond w_h (from the roll-off requirement)");
    t = ps_text_on(it->inputs, sizeof it->inputs);
    if (q->wh > 0 && q->delta > 0) {
        set_formula(it, "max over the RHP poles p = x + jy of (1/eps_T)^{(pi - Theta)/Theta} "
                        "(|B_z(p)^-1| e^{x theta})^{pi/Theta}, Theta = atan((w_h - y)/x) + atan((w_h + y)/x); 1 "
                        "without an RHP pole");
        put_rhp(&t, "p", an->poles, an->n_poles);
        put_rhp(&t, "; z", an->zeros, an->n_zeros);
        ps_text_put(&t, "; theta = %.10g s; eps_T = %.10g; w_h = %.10g rad/s", an->delay, q->delta / (1 - q->delta), q->wh);
    } else
        set_formula(it, q->wh > 0 ? "not applicable: with rolloff_gain delta = 0 (the available-bandwidth form) "
                                    "eps_T = 0 and the Poisson bound on T degenerates; the band-forced floor "
                                    "covers that form"
                                  : "not applicable: no rolloff_start given");

    it = add(out, "ms", "overall Ms floor", fl->ms, fl->ms_ln, "S + T = 1 (identity)",
             "each floor above under its own assumption");
    set_formula(it, "max(Ms interpolation, Ms band-forced, Ms Poisson, max(Mt interpolation, Mt Poisson) - 1)%s; "
                    "set by: %s",
                q->wh > 0 ? ", at least 1 with a roll-off requirement (a strictly proper loop)" : "", fl->limiting);
    it = add(out, "mt", "overall Mt floor", fl->mt, fl->mt_ln, "S + T = 1 (identity)",
             "each floor above under its own assumption");
    set_formula(it, "max(Mt interpolation, Mt Poisson, max(Ms interpolation, Ms band-forced, Ms Poisson) - 1)");
    if (an->h > 0)
        sampled_items(out, q, fl);
}

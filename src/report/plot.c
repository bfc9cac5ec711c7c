/* plot.c - the SVG plotting module of the report figures (see plot.h): every
 * figure's axes, ticks, titles, series and marks are drawn here, one way. */
#include "report/plot.h"

#include <math.h>
#include <string.h>

/* The figures' look, inside each <svg> so that a figure is whole on its own;
 * black on white, told apart by dash, width, fill and shape, not colour. */
static const char plot_style[] =
    ".psplot{background:#fff}"
    ".psplot text{font-family:sans-serif;font-size:11px;fill:#000}"
    ".psplot text.title{font-size:12px;font-weight:bold}.psplot text.small{font-size:10px}"
    ".psplot text.value{paint-order:stroke;stroke:#fff;stroke-width:3px;stroke-linejoin:round}"
    ".psplot line{stroke:#000;stroke-width:1}.psplot line.grid{stroke:#aaa;stroke-width:.6;stroke-dasharray:2 2}"
    ".psplot line.halo{stroke:#fff;stroke-width:4.5}.psplot line.limit{stroke-width:1.8}"
    ".psplot line.marginal{stroke-width:1.2;stroke-dasharray:6 3}"
    ".psplot line.required{stroke-width:1.2;stroke-dasharray:1.5 2.5}.psplot line.promise{stroke-width:1.8}"
    ".psplot .frame{fill:none;stroke:#000;stroke-width:1}.psplot .shade{fill:#e2e2e2;stroke:none}"
    ".psplot .curve{fill:none;stroke:#000;stroke-width:1.8}"
    ".psplot .curve-alt{fill:none;stroke:#555;stroke-width:1.8;stroke-dasharray:7 3}"
    ".psplot .mark{fill:#fff;stroke:#000;stroke-width:1.5}.psplot .mark-solid{fill:#000;stroke:#000;stroke-width:1}"
    ".psplot .mark-cross{fill:none;stroke:#000;stroke-width:1.7}"
    ".psplot .bar-clear{fill:#c8c8c8;stroke:#000;stroke-width:.6}"
    ".psplot .bar-marginal{fill:#808080;stroke:#000;stroke-width:.6}.psplot .bar-redesign{fill:#000}"
    ".psplot .bar-unstab{stroke:#000;stroke-width:1}"
    ".psplot .bar-unread{fill:#fff;stroke:#000;stroke-width:.6;stroke-dasharray:2 1}"
    ".psplot .bar-take{fill:#404040;stroke:#000;stroke-width:.6}"
    ".psplot .bar-give{fill:#e8e8e8;stroke:#000;stroke-width:1;stroke-dasharray:2 2}"
    ".psplot .bar-room{fill:#fff;stroke:#000;stroke-width:1.2;stroke-dasharray:6 3}"
    ".psplot .bar-rest{fill:#b0b0b0;stroke:#000;stroke-width:.6}";

void ps_plot_escape(FILE *f, const char *s)
{
    if (!s)
        return;
    for (const unsigned char *c = (const unsigned char *)s; *c; c++) {
        switch (*c) {
        case '&': fputs("&amp;", f); break;
        case '<': fputs("&lt;", f); break;
        case '>': fputs("&gt;", f); break;
        case '"': fputs("&quot;", f); break;
        case '\'': fputs("&#39;", f); break;
        default:
            if ((*c < 0x20 && *c != '\n' && *c != '\t') || *c == 0x7f)
                fputc(' ', f);
            else
                fputc(*c, f);
        }
    }
}

/* ---- numbers ---- */

double ps_plot_nice_step(double span, double target)
{
    double raw = span / target, p = pow(10.0, floor(log10(raw))), m = raw / p;
    return (m < 1.5 ? 1 : m < 3 ? 2 : m < 7 ? 5 : 10) * p;
}

double ps_plot_symlog(double x, double c) { return copysign(log10(1.0 + fabs(x) / c), x); }

double ps_plot_symlog_inv(double u, double c) { return copysign(c * (pow(10.0, fabs(u)) - 1.0), u); }

static double linear_step(const ps_plot_axis *a) { return ps_plot_nice_step(a->hi - a->lo, 6); }

size_t ps_plot_ticks(const ps_plot_axis *a, double *out, size_t max)
{
    size_t n = 0;
    if (!(a->hi > a->lo))
        return 0;
    switch (a->scale) {
    case PS_SCALE_LINEAR: {
        double step = linear_step(a);
        for (double k = ceil(a->lo / step - 1e-9); k * step <= a->hi + 1e-9 * step && n < max; k += 1)
            out[n++] = fabs(k) < 0.5 ? 0.0 : k * step; /* no "-1e-19" where the axis crosses zero */
        break;
    }
    case PS_SCALE_LOG: {
        /* Powers of ten; over two decades or less also 2 and 5 times them,
         * over one or less 1.5, 2, 3, 5 and 7 times them. */
        static const double m1[] = {1, 1.5, 2, 3, 5, 7}, m2[] = {1, 2, 5}, m3[] = {1};
        double decades = log10(a->hi) - log10(a->lo);
        const double *m = decades <= 1 ? m1 : decades <= 2 ? m2 : m3;
        size_t nm = decades <= 1 ? 6 : decades <= 2 ? 3 : 1;
        for (double e = floor(log10(a->lo)); e <= log10(a->hi) + 1e-9; e += 1)
            for (size_t j = 0; j < nm && n < max; j++) {
                double v = m[j] * pow(10.0, e);
                if (v >= a->lo * (1 - 1e-12) && v <= a->hi * (1 + 1e-12))
                    out[n++] = v;
            }
        break;
    }
    case PS_SCALE_SYMLOG: {
        int kmax = 0;
        double big = fmax(fabs(a->lo), fabs(a->hi));
        while (a->c * pow(10.0, kmax + 1) <= big * (1 + 1e-12))
            kmax++;
        for (int k = kmax; k >= 0 && n < max; k--)
            if (-a->c * pow(10.0, k) >= a->lo * (1 + 1e-12))
                out[n++] = -a->c * pow(10.0, k);
        if (a->lo <= 0 && a->hi >= 0 && n < max)
            out[n++] = 0;
        for (int k = 0; k <= kmax && n < max; k++)
            if (a->c * pow(10.0, k) <= a->hi * (1 + 1e-12))
                out[n++] = a->c * pow(10.0, k);
        break;
    }
    case PS_SCALE_NONE: break;
    }
    return n;
}

void ps_plot_tick_label(char *buf, size_t n, double v, double step)
{
    double a = fabs(v);
    if (step > 0 && a < 1e15) {
        /* Enough digits that neighbouring ticks differ (a sweep of 1000.1 .. 1000.5). */
        int digits = a > step ? (int)ceil(log10(a / step)) + 1 : 1;
        digits = digits < 4 ? 4 : digits > 12 ? 12 : digits;
        snprintf(buf, n, "%.*g", digits, v);
        return;
    }
    if (a != 0 && (a < 1e-3 || a >= 1e4)) {
        double e = round(log10(a));
        if (fabs(a / pow(10.0, e) - 1) < 1e-9) {
            snprintf(buf, n, "%s1e%d", v < 0 ? "-" : "", (int)e);
            return;
        }
        snprintf(buf, n, "%.1e", v);
        return;
    }
    snprintf(buf, n, "%.4g", v);
}

/* ---- the figure ---- */

void ps_plot_open(ps_plot *p, FILE *f, double w, double h, const char *cls, const char *label)
{
    memset(p, 0, sizeof *p);
    p->f = f;
    p->w = w;
    p->h = h;
    fprintf(f, "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"psplot%s%s\"", cls ? " " : "", cls ? cls : "");
    fprintf(f, " viewBox=\"0 0 %.0f %.0f\" width=\"%.0f\" height=\"%.0f\" role=\"img\" aria-label=\"", w, h, w, h);
    ps_plot_escape(f, label);
    fprintf(f, "\">\n<title>");
    ps_plot_escape(f, label);
    fprintf(f, "</title>\n<style>%s</style>\n", plot_style);
    ps_plot_text_px(p, 10, 16, "start", "title", 0, label);
}

void ps_plot_area(ps_plot *p, double left, double top, double pw, double ph)
{
    p->left = left;
    p->top = top;
    p->pw = pw;
    p->ph = ph;
}

void ps_plot_close(ps_plot *p) { fputs("</svg>\n", p->f); }

/* Where v lies along the axis, 0 at lo and 1 at hi. */
static double frac(const ps_plot_axis *a, double v)
{
    switch (a->scale) {
    case PS_SCALE_LOG: return (log10(v) - log10(a->lo)) / (log10(a->hi) - log10(a->lo));
    case PS_SCALE_SYMLOG: {
        double u0 = ps_plot_symlog(a->lo, a->c), u1 = ps_plot_symlog(a->hi, a->c);
        return (ps_plot_symlog(v, a->c) - u0) / (u1 - u0);
    }
    default: return (v - a->lo) / (a->hi - a->lo);
    }
}

double ps_plot_x(const ps_plot *p, double v) { return p->left + p->pw * frac(&p->x, v); }

double ps_plot_y(const ps_plot *p, double v) { return p->top + p->ph - p->ph * frac(&p->y, v); }

/* Is the i-th of n ticks labelled? Every label_every-th counted from the
 * outer ticks; on a symlog axis +-c is left out when a decade lies beyond
 * it (it sits 0.3 decade from 0, its label would run into 0's). */
static bool labelled(const ps_plot_axis *a, const double *t, size_t n, size_t i)
{
    if (a->scale == PS_SCALE_SYMLOG && t[i] != 0) {
        double k = round(log10(fabs(t[i]) / a->c));
        double kmax = round(log10(fmax(fabs(t[0]), fabs(t[n - 1])) / a->c));
        if (k == 0 && kmax > 0)
            return false;
        return a->label_every <= 1 || (int)(kmax - k) % a->label_every == 0;
    }
    if (a->scale == PS_SCALE_SYMLOG || a->label_every <= 1)
        return true;
    return i % (size_t)a->label_every == 0;
}

void ps_plot_axes(ps_plot *p)
{
    char buf[64];
    double t[64];
    double L = p->left, T = p->top, R = p->left + p->pw, B = p->top + p->ph;
    for (int side = 0; side < 2; side++) {
        const ps_plot_axis *a = side == 0 ? &p->x : &p->y;
        size_t n = ps_plot_ticks(a, t, 64);
        double step = a->scale == PS_SCALE_LINEAR ? linear_step(a) : 0;
        for (size_t i = 0; i < n; i++) {
            double v = side == 0 ? ps_plot_x(p, t[i]) : ps_plot_y(p, t[i]);
            ps_plot_tick_label(buf, sizeof buf, t[i], step);
            if (side == 0) {
                ps_plot_line_px(p, v, T, v, B, "grid");
                ps_plot_line_px(p, v, B, v, B + 4, "");
                if (labelled(a, t, n, i))
                    ps_plot_text_px(p, v, B + 15, "middle", "small", 0, buf);
            } else {
                ps_plot_line_px(p, L, v, R, v, "grid");
                ps_plot_line_px(p, L - 4, v, L, v, "");
                if (labelled(a, t, n, i))
                    ps_plot_text_px(p, L - 6, v + 3.5, "end", "small", 0, buf);
            }
        }
        if (a->scale == PS_SCALE_LOG && a->minor)
            for (double d = pow(10.0, floor(log10(a->lo))); d < a->hi; d *= 10)
                for (int m = 2; m <= 9; m++) {
                    double v = m * d;
                    if (v < a->lo || v > a->hi)
                        continue;
                    if (side == 0)
                        ps_plot_line_px(p, ps_plot_x(p, v), B, ps_plot_x(p, v), B + 3, "");
                    else
                        ps_plot_line_px(p, L - 3, ps_plot_y(p, v), L, ps_plot_y(p, v), "");
                }
    }
    ps_plot_rect_px(p, L, T, p->pw, p->ph, "frame");
    if (p->x.title)
        ps_plot_text_px(p, L + p->pw / 2, B + 32, "middle", "axis-title", 0, p->x.title);
    if (p->y.title)
        ps_plot_text_px(p, 14, T + p->ph / 2, "middle", "axis-title", -90, p->y.title);
}

/* ---- drawing ---- */

void ps_plot_series(ps_plot *p, const double *x, const double *y, size_t n, bool steps, const char *cls)
{
    bool open = false;
    double last_y = 0;
    for (size_t i = 0; i < n; i++) {
        if (!isfinite(x[i]) || !isfinite(y[i])) {
            if (open)
                fputs("\"/>\n", p->f);
            open = false;
            continue;
        }
        double px = ps_plot_x(p, x[i]), py = ps_plot_y(p, y[i]);
        if (!open)
            fprintf(p->f, "<polyline class=\"%s\" points=\"", cls);
        else if (steps)
            fprintf(p->f, " %.1f,%.1f", px, last_y);
        fprintf(p->f, "%s%.1f,%.1f", open ? " " : "", px, py);
        open = true;
        last_y = py;
    }
    if (open)
        fputs("\"/>\n", p->f);
}

void ps_plot_marker_px(ps_plot *p, double x, double y, double r, ps_plot_mark m, const char *cls)
{
    FILE *f = p->f;
    switch (m) {
    case PS_MARK_CROSS:
        fprintf(f, "<path class=\"%s\" d=\"M%.1f %.1fl%.1f %.1fM%.1f %.1fl%.1f %.1f\"/>\n", cls, x - r, y - r, 2 * r,
                2 * r, x + r, y - r, -2 * r, 2 * r);
        break;
    case PS_MARK_CIRCLE: fprintf(f, "<circle class=\"%s\" cx=\"%.1f\" cy=\"%.1f\" r=\"%.1f\"/>\n", cls, x, y, r); break;
    case PS_MARK_SQUARE: ps_plot_rect_px(p, x - r, y - r, 2 * r, 2 * r, cls); break;
    case PS_MARK_UP:
        fprintf(f, "<path class=\"%s\" d=\"M%.1f %.1fl%.1f %.1fh%.1fz\"/>\n", cls, x, y - r, r, 1.7 * r, -2 * r);
        break;
    case PS_MARK_DOWN:
        fprintf(f, "<path class=\"%s\" d=\"M%.1f %.1fl%.1f %.1fh%.1fz\"/>\n", cls, x, y + r, r, -1.7 * r, -2 * r);
        break;
    case PS_MARK_DIAMOND:
        fprintf(f, "<path class=\"%s\" d=\"M%.1f %.1fl%.1f %.1fl%.1f %.1fl%.1f %.1fz\"/>\n", cls, x, y - r, r, r, -r,
                r, -r, -r);
        break;
    }
}

void ps_plot_marker(ps_plot *p, double x, double y, ps_plot_mark m, const char *cls)
{
    ps_plot_marker_px(p, ps_plot_x(p, x), ps_plot_y(p, y), m == PS_MARK_CROSS ? 4.5 : 4, m, cls);
}

void ps_plot_hline(ps_plot *p, double y, const char *cls, const char *label)
{
    double py = ps_plot_y(p, y);
    ps_plot_line_px(p, p->left, py, p->left + p->pw, py, cls);
    if (label)
        ps_plot_text_px(p, p->left + p->pw - 3, py - 4, "end", "small value", 0, label);
}

void ps_plot_vline(ps_plot *p, double x, const char *cls, const char *label, bool left)
{
    double px = ps_plot_x(p, x);
    ps_plot_line_px(p, px, p->top, px, p->top + p->ph, cls);
    if (label)
        ps_plot_text_px(p, px + (left ? -3 : 3), p->top + 12, left ? "end" : "start", "small value", 0, label);
}

void ps_plot_xspan(ps_plot *p, double x0, double x1, const char *cls)
{
    double a = ps_plot_x(p, x0), b = ps_plot_x(p, x1);
    ps_plot_rect_px(p, fmin(a, b), p->top, fabs(b - a), p->ph, cls);
}

void ps_plot_rect(ps_plot *p, double x0, double y0, double x1, double y1, const char *cls)
{
    double a = ps_plot_x(p, x0), b = ps_plot_x(p, x1), c = ps_plot_y(p, y0), d = ps_plot_y(p, y1);
    ps_plot_rect_px(p, fmin(a, b), fmin(c, d), fabs(b - a), fabs(d - c), cls);
}

void ps_plot_rect_px(ps_plot *p, double x, double y, double w, double h, const char *cls)
{
    fprintf(p->f, "<rect class=\"%s\" x=\"%.1f\" y=\"%.1f\" width=\"%.1f\" height=\"%.1f\"/>\n", cls, x, y, w, h);
}

void ps_plot_line_px(ps_plot *p, double x1, double y1, double x2, double y2, const char *cls)
{
    fprintf(p->f, "<line class=\"%s\" x1=\"%.1f\" y1=\"%.1f\" x2=\"%.1f\" y2=\"%.1f\"/>\n", cls, x1, y1, x2, y2);
}

void ps_plot_text_px(ps_plot *p, double x, double y, const char *anchor, const char *cls, double rotate,
                     const char *s)
{
    fprintf(p->f, "<text x=\"%.1f\" y=\"%.1f\" text-anchor=\"%s\"", x, y, anchor);
    if (cls && cls[0])
        fprintf(p->f, " class=\"%s\"", cls);
    if (rotate != 0)
        fprintf(p->f, " transform=\"rotate(%.0f %.1f %.1f)\"", rotate, x, y);
    fputc('>', p->f);
    ps_plot_escape(p->f, s);
    fputs("</text>\n", p->f);
}

void ps_plot_legend(ps_plot *p, double x, double y, const ps_plot_key *keys, size_t n)
{
    for (size_t i = 0; i < n; i++) {
        const ps_plot_key *k = &keys[i];
        if (k->kind == PS_KEY_MARK)
            ps_plot_marker_px(p, x + 5, y - 4, 4, k->mark, k->cls);
        else if (k->kind == PS_KEY_LINE)
            ps_plot_line_px(p, x, y - 4, x + 14, y - 4, k->cls);
        else
            ps_plot_rect_px(p, x, y - 9, 14, 10, k->cls);
        ps_plot_text_px(p, x + 18, y, "start", "small", 0, k->label);
        /* about 5.6 px a character at 10 px sans-serif */
        x += 30 + 5.6 * (double)strlen(k->label);
    }
}

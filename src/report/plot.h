/* plot.h - one small SVG plotting module for the report figures: a figure
 * with a plot area, linear / log10 / symmetric-log axes with ticks and titles,
 * series, markers, reference lines, spans, bars, a legend, escaped text. */
#ifndef PS_PLOT_H
#define PS_PLOT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

typedef enum ps_plot_scale {
    PS_SCALE_LINEAR = 0,
    PS_SCALE_LOG,    /* log10; lo and hi > 0 */
    PS_SCALE_SYMLOG, /* sign(x) log10(1 + |x| / c): linear within +-c, logarithmic beyond */
    PS_SCALE_NONE    /* linear mapping, no ticks or grid drawn (bar rows, a single bar) */
} ps_plot_scale;

/* An axis: the data range lo .. hi shown on the plot area's side, its scale,
 * the linear half-width c of a symlog axis, and a title that names the unit
 * in parentheses ("band edge w_b (rad/s)"). */
typedef struct ps_plot_axis {
    ps_plot_scale scale;
    double lo, hi;
    double c;
    const char *title;
    bool minor;      /* log: minor ticks at 2 .. 9 of each decade */
    int label_every; /* label every n-th tick (0 or 1: all) */
} ps_plot_axis;

/* A figure being written: plot area at (left, top), pw x ph px. */
typedef struct ps_plot {
    FILE *f;
    double w, h;
    double left, top, pw, ph;
    ps_plot_axis x, y;
} ps_plot;

typedef enum ps_plot_mark {
    PS_MARK_CROSS = 0, /* x (a pole) */
    PS_MARK_CIRCLE,    /* o (a zero; passes) */
    PS_MARK_SQUARE,    /* filled square (fails) */
    PS_MARK_UP,        /* triangle pointing up */
    PS_MARK_DOWN,      /* triangle pointing down */
    PS_MARK_DIAMOND
} ps_plot_mark;

/* One legend entry: a marker, a line of class line_cls, or a swatch of class box_cls. */
typedef struct ps_plot_key {
    enum { PS_KEY_MARK, PS_KEY_LINE, PS_KEY_BOX } kind;
    ps_plot_mark mark;
    const char *cls;
    const char *label;
} ps_plot_key;

/* ---- text and numbers ---- */

/* Write s escaped for XML text and attribute values (&, <, >, ", '); control
 * characters other than tab and newline become spaces. NULL writes nothing. */
void ps_plot_escape(FILE *f, const char *s);

/* 1, 2 or 5 times a power of ten giving about target steps over span (> 0). */
double ps_plot_nice_step(double span, double target);

/* The ticks of an axis, ascending, into out (at most max); returns the count.
 * Linear: multiples of ps_plot_nice_step(hi - lo, 6) within [lo, hi]; log:
 * the powers of ten within [lo, hi] (over two decades or less also 2 and 5
 * times them, over one or less 1.5, 2, 3, 5, 7 times them); symlog: 0 and
 * +-c 10^k within [lo, hi]. */
size_t ps_plot_ticks(const ps_plot_axis *a, double *out, size_t max);

/* A tick label: "%.4g" (with enough digits that ticks step apart), powers of
 * ten outside 1e-3 .. 1e4 as "1e5". step: the tick step of a linear axis, 0 otherwise. */
void ps_plot_tick_label(char *buf, size_t n, double v, double step);

/* Symmetric log and its inverse (c > 0). */
double ps_plot_symlog(double x, double c);
double ps_plot_symlog_inv(double u, double c);

/* ---- the figure ---- */

/* Start a figure w x h px: <svg> with class "psplot" and cls (may be NULL),
 * aria-label and <title> label, the module's <style>, and label as the
 * visible title at the top left. The plot area is (left, top, pw, ph); set
 * p->x and p->y before drawing. */
void ps_plot_open(ps_plot *p, FILE *f, double w, double h, const char *cls, const char *label);
void ps_plot_area(ps_plot *p, double left, double top, double pw, double ph);
void ps_plot_close(ps_plot *p);

/* Pixel of a data value on each axis (values outside the range map outside the area). */
double ps_plot_x(const ps_plot *p, double v);
double ps_plot_y(const ps_plot *p, double v);

/* Grid, frame, ticks, tick labels and both axis titles. */
void ps_plot_axes(ps_plot *p);

/* ---- drawing (data coordinates unless the name ends in _px) ---- */

/* A polyline through the points, broken at a non-finite x or y; steps: a
 * horizontal then a vertical segment between neighbours (a step line). */
void ps_plot_series(ps_plot *p, const double *x, const double *y, size_t n, bool steps, const char *cls);
void ps_plot_marker(ps_plot *p, double x, double y, ps_plot_mark m, const char *cls);
void ps_plot_marker_px(ps_plot *p, double x, double y, double r, ps_plot_mark m, const char *cls);
/* A full-width horizontal / full-height vertical line; label (may be NULL)
 * above the line at the right end / beside the line at the top, on the left
 * when left is true. */
void ps_plot_hline(ps_plot *p, double y, const char *cls, const char *label);
void ps_plot_vline(ps_plot *p, double x, const char *cls, const char *label, bool left);
/* A shaded span across the whole height (x0 .. x1) or a rectangle (a bar). */
void ps_plot_xspan(ps_plot *p, double x0, double x1, const char *cls);
void ps_plot_rect(ps_plot *p, double x0, double y0, double x1, double y1, const char *cls);
void ps_plot_rect_px(ps_plot *p, double x, double y, double w, double h, const char *cls);
void ps_plot_line_px(ps_plot *p, double x1, double y1, double x2, double y2, const char *cls);
/* Text at a pixel position; anchor "start", "middle" or "end"; rotate in degrees (0: none). */
void ps_plot_text_px(ps_plot *p, double x, double y, const char *anchor, const char *cls, double rotate,
                     const char *s);
/* A legend in one row from (x, y) px (the text's baseline), entries spaced by their text. */
void ps_plot_legend(ps_plot *p, double x, double y, const ps_plot_key *keys, size_t n);

#endif

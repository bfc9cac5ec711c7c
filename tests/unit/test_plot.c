/* test_plot.c - the SVG plotting module (ticks, scales, escaping) and the
 * figures of a real screening run: well-formed XML, one pole/zero linear
 * region per report, a unit on every axis, the log-area budget's numbers. */
#include <criterion/criterion.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "report/plot.h"
#include "support.h"

TestSuite(plot, .init = ps_test_init);

/* Is step m 10^k with m 1, 2 or 5? */
static bool one_two_five(double step)
{
    double p = pow(10.0, floor(log10(step) + 1e-12)), m = step / p;
    return fabs(m - 1) < 1e-9 || fabs(m - 2) < 1e-9 || fabs(m - 5) < 1e-9;
}

/* Linear ticks (common practice: 1, 2, 5 times a power of ten): inside the
 * range, equally spaced by a 1-2-5 step, no gap of a step or more at either
 * end, between 3 and 12 of them. */
Test(plot, linear_ticks_cover_the_range_in_one_two_five_steps)
{
    static const double ranges[][2] = {{0, 1.25},      {-3.7, 12.9},   {1000.1, 1000.5}, {2.385e-7, 9.41e-6},
                                       {-41.3, -2.17}, {0.013, 0.0917}, {-1e5, 3.3e5},   {7.77, 8.01}};
    for (size_t r = 0; r < sizeof ranges / sizeof ranges[0]; r++) {
        ps_plot_axis a = {.scale = PS_SCALE_LINEAR, .lo = ranges[r][0], .hi = ranges[r][1]};
        double t[64];
        size_t n = ps_plot_ticks(&a, t, 64);
        cr_assert(n >= 3 && n <= 12, "range %g .. %g: %zu ticks", a.lo, a.hi, n);
        double step = t[1] - t[0];
        cr_expect(one_two_five(step), "range %g .. %g: step %g", a.lo, a.hi, step);
        for (size_t i = 0; i < n; i++) {
            cr_expect(t[i] >= a.lo - 1e-9 * step && t[i] <= a.hi + 1e-9 * step, "tick %g outside", t[i]);
            if (i > 0)
                cr_expect(fabs(t[i] - t[i - 1] - step) <= 1e-6 * step, "uneven ticks at %g", t[i]);
        }
        cr_expect(t[0] - a.lo < step && a.hi - t[n - 1] < step, "range %g .. %g not covered: %g .. %g", a.lo, a.hi,
                  t[0], t[n - 1]);
    }
    cr_expect_eq(ps_plot_nice_step(7.3, 6), 1.0);
    cr_expect_eq(ps_plot_nice_step(0.0413, 5), 0.01);
}

/* Over more than two decades the log ticks are exactly the powers of ten in
 * the range, all of them; over fewer, the 1-2-5 (and 1.5, 3, 7) multiples. */
Test(plot, log_ticks_are_the_powers_of_ten_in_range)
{
    static const double ranges[][2] = {{0.0238, 417}, {1, 1e6}, {3.3e-9, 2.7e-3}, {0.5, 2000}};
    for (size_t r = 0; r < sizeof ranges / sizeof ranges[0]; r++) {
        ps_plot_axis a = {.scale = PS_SCALE_LOG, .lo = ranges[r][0], .hi = ranges[r][1]};
        double t[64];
        size_t n = ps_plot_ticks(&a, t, 64);
        int e0 = (int)ceil(log10(a.lo) - 1e-12), e1 = (int)floor(log10(a.hi) + 1e-12);
        cr_assert_eq(n, (size_t)(e1 - e0 + 1), "range %g .. %g: %zu ticks", a.lo, a.hi, n);
        for (size_t i = 0; i < n; i++) {
            cr_expect(fabs(t[i] / pow(10.0, e0 + (int)i) - 1) < 1e-12, "tick %g", t[i]);
            cr_expect(t[i] >= a.lo && t[i] <= a.hi);
        }
    }
    ps_plot_axis a = {.scale = PS_SCALE_LOG, .lo = 1, .hi = 41.7};
    double t[64];
    size_t n = ps_plot_ticks(&a, t, 64);
    static const double want[] = {1, 2, 5, 10, 20};
    cr_assert_eq(n, 5);
    for (size_t i = 0; i < n; i++)
        cr_expect(fabs(t[i] - want[i]) < 1e-12, "%g", t[i]);
}

/* sign(x) log10(1 + |x|/c): strictly increasing, odd, inverted by
 * ps_plot_symlog_inv, and near zero linear with slope 1/(c ln 10). */
Test(plot, symlog_is_monotone_and_inverts)
{
    const double c = 2.385;
    double prev = -INFINITY;
    for (double x = -3.1e6; x <= 3.1e6; x = x < 0 ? x / 1.37 + (x > -1e-6 ? 2e-6 : 0) : (x < 1e-6 ? x + 2e-6 : x * 1.37)) {
        double u = ps_plot_symlog(x, c);
        cr_assert(u > prev, "not increasing at %g", x);
        prev = u;
        cr_expect(fabs(ps_plot_symlog(-x, c) + u) <= 1e-15 * fabs(u) + 1e-300, "not odd at %g", x);
        cr_expect(fabs(ps_plot_symlog_inv(u, c) - x) <= 1e-11 * fabs(x) + 1e-14, "inverse at %g: %g", x,
                  ps_plot_symlog_inv(u, c));
    }
    double x = 1e-7 * c;
    cr_expect(fabs(ps_plot_symlog(x, c) / (x / (c * log(10.0))) - 1) < 1e-6);
    /* ticks: 0 and +-c 10^k inside the range */
    ps_plot_axis a = {.scale = PS_SCALE_SYMLOG, .lo = -1000 * c, .hi = 100 * c, .c = c};
    double t[64];
    size_t n = ps_plot_ticks(&a, t, 64);
    static const double want[] = {-1000, -100, -10, -1, 0, 1, 10, 100};
    cr_assert_eq(n, 8);
    for (size_t i = 0; i < n; i++)
        cr_expect(fabs(t[i] - want[i] * c) <= 1e-12 * fabs(want[i] * c), "%g", t[i]);
}

/* XML 1.0 (W3C, section 2.4): & and < must be escaped in text; quotes in attribute values. */
Test(plot, escapes_every_text)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    cr_assert_not_null(f);
    ps_plot_escape(f, "a<b & \"c\" 'd'>\x01 e");
    ps_plot_escape(f, NULL);
    ps_plot p;
    ps_plot_open(&p, f, 100, 80, NULL, "x<&\"y");
    ps_plot_close(&p);
    fclose(f);
    const char *want = "a&lt;b &amp; &quot;c&quot; &#39;d&#39;&gt;  e";
    cr_assert(strncmp(buf, want, strlen(want)) == 0, "%s", buf);
    cr_expect_not_null(strstr(buf, "aria-label=\"x&lt;&amp;&quot;y\""));
    cr_expect_not_null(strstr(buf, "<title>x&lt;&amp;&quot;y</title>"));
    cr_expect_null(strstr(buf + strlen(want), "x<"));
    free(buf);
}

/* A series breaks at a missing value; a step line holds each value until
 * the next x (a horizontal then a vertical segment). Axis 0 .. 10 onto 100 px. */
Test(plot, series_break_at_gaps_and_step)
{
    char *buf = NULL;
    size_t len = 0;
    FILE *f = open_memstream(&buf, &len);
    cr_assert_not_null(f);
    ps_plot p = {.f = f};
    ps_plot_area(&p, 0, 0, 100, 100);
    p.x = (ps_plot_axis){.scale = PS_SCALE_LINEAR, .lo = 0, .hi = 10};
    p.y = p.x;
    const double x[] = {1, 2, 3, NAN, 5, 6, 7, 8, 9}, y[] = {1, 3, 2, 4, 7, 9, NAN, 5, 6};
    ps_plot_series(&p, x, y, 9, false, "a");
    ps_plot_series(&p, x, y, 3, true, "b");
    fclose(f);
    cr_expect_str_eq(buf, "<polyline class=\"a\" points=\"10.0,90.0 20.0,70.0 30.0,80.0\"/>\n"
                          "<polyline class=\"a\" points=\"50.0,30.0 60.0,10.0\"/>\n"
                          "<polyline class=\"a\" points=\"80.0,50.0 90.0,40.0\"/>\n"
                          "<polyline class=\"b\" points=\"10.0,90.0 20.0,90.0 20.0,70.0 30.0,70.0 30.0,80.0\"/>\n");
    free(buf);
}

/* ---- the figures of a real run ---- */

/* Plants of the budget check: one band requirement each, the band floor
 * binding; one continuous loop and the same on a 200 Hz board. */
static const char budget_catalog[] =
    "plants:\n"
    "  - id: band-binds\n"
    "    poles: [3.7, -20.0]\n"
    "    zeros: []\n"
    "    gain: 41.3\n"
    "    band_edge: 1.3\n"
    "    band_attenuation: 0.1\n"
    "    rolloff_start: 9.4\n"
    "  - id: band-binds-200hz\n"
    "    poles: [3.7, -20.0]\n"
    "    zeros: []\n"
    "    gain: 41.3\n"
    "    band_edge: 1.3\n"
    "    band_attenuation: 0.1\n"
    "    rolloff_start: 9.4\n"
    "    sample_rate: \"200 Hz\"\n";

/* The checks, run by Debian's python3 on the HTML and JSON reports:
 * every <svg> parses as XML; every pole/zero map states one and the same
 * linear region; every axis title names a unit in parentheses; every
 * budget figure's parts are the floors' numbers (bode_area from the JSON,
 * w_b ln(1/eps) from the requirements, I_tail summed here from the series
 * I = w_h sum delta^n / (n (n (1+k) - 1)), each term cut at
 * pi/h for a digital loop: -ln(1 - x) = sum x^n / n integrated term by term
 * over [w_h, W]) and add up to (w_h - w_b) ln Ms_band. */
static const char script[] =
    "import re, sys, json, math, xml.etree.ElementTree as ET\n"
    "NS = '{http://www.w3.org/2000/svg}'\n"
    "need_band = sys.argv[1] == 'band'\n"
    "doc = open(sys.argv[2], encoding='utf-8').read()\n"
    "sys.path.insert(0, sys.argv[4])\n"
    "import screen_doc\n"
    "plants = {p['id']: p for p in screen_doc.load(sys.argv[3])['plants']}\n"
    "svgs = re.findall(r'<svg .*?</svg>', doc, re.S)\n"
    "assert svgs, 'no figure'\n"
    "regions, titles = set(), 0\n"
    "for s in svgs:\n"
    "    root = ET.fromstring(s)\n"
    "    cls = root.get('class').split()\n"
    "    for t in root.iter(NS + 'text'):\n"
    "        if 'axis-title' in (t.get('class') or '').split():\n"
    "            titles += 1\n"
    "            assert re.search(r'\\([^()]+\\)', t.text), 'axis title without a unit: %r' % t.text\n"
    "    if 'pz-map' in cls:\n"
    "        r = [t.text for t in root.iter(NS + 'text') if 'pz-linear' in (t.get('class') or '')]\n"
    "        assert len(r) == 1, r\n"
    "        regions.add(re.search(r'linear within \\u00b1(\\S+) rad/s', r[0]).group(1))\n"
    "assert titles >= len(svgs), (titles, len(svgs))\n"
    "assert len(regions) <= 1, 'pole/zero maps with different linear regions: %s' % regions\n"
    "budgets = re.findall(r'<figure class=\"budget\"([^>]*)>', doc)\n"
    "assert budgets, 'no budget figure'\n"
    "band_seen = 0\n"
    "for b in budgets:\n"
    "    a = dict(re.findall(r'data-([a-z-]+)=\"([^\"]*)\"', b))\n"
    "    p = plants[a['id']]\n"
    "    F, B, I, R = (float(a[k]) for k in ('bode-area', 'band-area', 'tail-area', 'rest-area'))\n"
    "    fl, rq = p['floors'], p['requirements']\n"
    "    assert abs(F - fl['bode_area']) <= 5e-9 * abs(F) + 1e-300, (F, fl['bode_area'])\n"
    "    wb, eps = rq['band_edge'] or 0.0, rq['band_attenuation'] or 1.0\n"
    "    assert abs(B - wb * math.log(1 / eps)) <= 1e-13 * B + 1e-300, (B, wb, eps)\n"
    "    assert abs(R - (F + B - I)) <= 1e-12 * (abs(F) + B + I)\n"
    "    if fl['ms_band'] is None:\n"
    "        continue\n"
    "    wh, d, k = rq['rolloff_start'], rq['rolloff_gain'], rq['rolloff_slope']\n"
    "    smp = p.get('sampling')\n"
    "    W = smp['nyquist_rad_s'] if smp else math.inf\n"
    "    tail = wh * sum(d**n / (n * (n*(1+k) - 1)) * (1 - (wh / W)**(n*(1+k) - 1)) for n in range(1, 400))\n"
    "    # the inputs come from the JSON Lines record, 9 significant digits\n"
    "    assert abs(I - tail) <= 1e-7 * tail, ('I_tail', I, tail)\n"
    "    width, ms_ln = float(a['width']), float(a['ms-ln'])\n"
    "    assert abs(width - (wh - wb)) <= 5e-9 * (wh + wb), (width, wh, wb)\n"
    "    assert abs(ms_ln * width - (F + B - I)) <= 1e-12 * (abs(F) + B + I), ('identity', ms_ln * width, F + B - I)\n"
    "    assert abs(math.exp(ms_ln) - fl['ms_band']) <= 5e-9 * fl['ms_band'], (math.exp(ms_ln), fl['ms_band'])\n"
    "    if fl['limiting'] == 'band' and B > 0:\n"
    "        band_seen += 1\n"
    "assert band_seen >= (2 if need_band else 0), 'band floor binding in %d budgets' % band_seen\n"
    "print('ok %d %d %d' % (len(svgs), len(regions), len(budgets)))\n";

/* Screen catalog into a fresh directory with the real program and run the
 * checks on its HTML and JSON; want_band: the catalog's plants must show
 * the band floor binding. */
static void check_run(const char *catalog, bool want_band)
{
    if (!PS_ORACLE_PYTHON[0])
        cr_skip_test("no Debian python3");
    char dir[256];
    ps_test_temp_name(dir, sizeof dir, "ps_plot_");
    cr_assert_not_null(mkdtemp(dir));
    char cmd[2048], spath[256];
    snprintf(cmd, sizeof cmd, "'%s' screen -o '%s' --gate never '%s' >/dev/null 2>&1", PS_CLI_PATH, dir, catalog);
    cr_assert_eq(system(cmd), 0, "%s", cmd);
    const char *stem = strrchr(catalog, '/') ? strrchr(catalog, '/') + 1 : catalog;
    char base[256];
    snprintf(base, sizeof base, "%.*s", (int)(strrchr(stem, '.') - stem), stem);
    snprintf(spath, sizeof spath, "%s", ps_test_write_temp(".py", script));
    snprintf(cmd, sizeof cmd, "'%s' '%s' %s '%s/%s.screen/%s.screen.html' '%s/%s.screen/%s.screen.json' '%s' 2>&1",
             PS_ORACLE_PYTHON, spath, want_band ? "band" : "any", dir, base, base, dir, base, base,
             PS_SOURCE_DIR "/tests/e2e");
    FILE *p = popen(cmd, "r");
    cr_assert_not_null(p);
    char out[4096] = "";
    size_t n = fread(out, 1, sizeof out - 1, p);
    out[n] = '\0';
    int rc = pclose(p);
    unlink(spath);
    snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
    cr_expect_eq(system(cmd), 0);
    cr_assert_eq(rc, 0, "%s", out);
    cr_assert(strncmp(out, "ok ", 3) == 0, "%s", out);
}

Test(plot, demo_figures_are_well_formed_with_one_linear_region_and_units)
{
    check_run(PS_SOURCE_DIR "/catalogs/demo-variants.yaml", false);
}

Test(plot, budget_adds_up_to_the_band_floor)
{
    char dir[256], path[320];
    ps_test_temp_name(dir, sizeof dir, "ps_budget_");
    cr_assert_not_null(mkdtemp(dir));
    snprintf(path, sizeof path, "%s/budget.yaml", dir);
    FILE *f = fopen(path, "w");
    cr_assert_not_null(f);
    fputs(budget_catalog, f);
    fclose(f);
    check_run(path, true);
    unlink(path);
    rmdir(dir);
}

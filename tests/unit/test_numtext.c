/* test_numtext.c - strict parsing of catalog numbers: reals, complex values
 * and pairs, and blank-separated lists. */
#include <criterion/criterion.h>
#include <math.h>
#include <float.h>
#include <string.h>

#include "catalog/numtext.h"
#include "support.h"

TestSuite(numtext, .init = ps_test_init);

static double real_ok(const char *s)
{
    double x = -999.0;
    const char *why = NULL;
    cr_assert_eq(ps_text_real(s, &x, &why), 0, "'%s' rejected: %s", s, why ? why : "?");
    return x;
}

static const char *real_bad(const char *s)
{
    double x = 7.125;
    const char *why = NULL;
    cr_assert_eq(ps_text_real(s, &x, &why), -1, "'%s' accepted as %g", s, x);
    cr_assert_not_null(why);
    cr_expect_eq(x, 7.125, "output untouched on failure");
    return why;
}

Test(numtext, reals)
{
    cr_expect_eq(real_ok("2.385"), 2.385);
    cr_expect_eq(real_ok("-19.6"), -19.6);
    cr_expect_eq(real_ok("+4.75"), 4.75);
    cr_expect_eq(real_ok(".5"), 0.5);
    cr_expect_eq(real_ok("5."), 5.0);
    cr_expect_eq(real_ok("  1.25e-3\t"), 1.25e-3);
    cr_expect_eq(real_ok("6.02E23"), 6.02e23);
    cr_expect_eq(real_ok("-0"), 0.0);
    /* Zero in any spelling stays 0; the smallest normal double is still read
     * (IEEE 754 binary64: DBL_MIN = 2^-1022 = 2.2250738585072014e-308). */
    cr_expect_eq(real_ok("0e-400"), 0.0);
    cr_expect_eq(real_ok("-0.000e-999"), 0.0);
    cr_expect_eq(real_ok("2.2250738585072014e-308"), DBL_MIN);
    cr_expect_eq(real_ok("-3.917e-300"), -3.917e-300);
}

/* A nonzero decimal that would underflow to 0 (or to a subnormal) is refused,
 * not read as 0: a pole or delay of 1e-400 is not a pole or delay at 0. */
Test(numtext, underflow_refused)
{
    cr_expect(strstr(real_bad("1e-400"), "too small") != NULL);
    cr_expect(strstr(real_bad("-2.385e-400"), "too small") != NULL);
    cr_expect(strstr(real_bad("4.9e-324"), "too small") != NULL, "the smallest subnormal");
    cr_expect(strstr(real_bad("1.7e-310"), "too small") != NULL, "a subnormal");
    cr_expect(strstr(real_bad("0.0000001e-305"), "too small") != NULL);
    ps_cplx v[2];
    const char *why = NULL;
    cr_expect_eq(ps_text_complex("-1.5+1e-400j", v, &why), -1);
    cr_expect(why && strstr(why, "too small"));
    double out[4];
    size_t bad = 99;
    cr_expect_eq(ps_text_real_list("1 2.385 6.1e-401", out, 4, &bad, &why), -1);
    cr_expect_eq(bad, 2, "the third value is named");
    ps_plant p;
    ps_plant_reset(&p);
    cr_expect_eq(ps_text_scalar_field(&p, PS_F_DELAY, "3.3e-342", &why), -1);
    cr_expect_eq(ps_text_scalar_field(&p, PS_F_BAND_EDGE, "1e-330 Hz", &why), -1);
}

Test(numtext, real_rejections)
{
    cr_expect(strstr(real_bad("0x10"), "hexadecimal") != NULL);
    cr_expect(strstr(real_bad("-0X1p3"), "hexadecimal") != NULL);
    real_bad("inf");
    real_bad("-inf");
    real_bad("infinity");
    real_bad("nan");
    real_bad("NAN");
    cr_expect(strstr(real_bad("1e400"), "out of range") != NULL);
    cr_expect(strstr(real_bad("-1e400"), "out of range") != NULL);
    cr_expect(strstr(real_bad("2.5kg"), "unexpected characters") != NULL);
    real_bad("1 2");
    real_bad("1,5");
    real_bad("1e");
    real_bad("");
    real_bad("   ");
    real_bad("-");
    real_bad(".");
    real_bad("+-1");
    real_bad("3j");
}

static int cplx(const char *s, ps_cplx out[2])
{
    const char *why = NULL;
    int k = ps_text_complex(s, out, &why);
    cr_assert(k > 0, "'%s' rejected: %s", s, why ? why : "?");
    return k;
}

Test(numtext, complex_forms)
{
    ps_cplx v[2];
    cr_assert_eq(cplx("2.385", v), 1);
    cr_expect(v[0].re == 2.385 && v[0].im == 0.0);
    cr_assert_eq(cplx("-1.5+2j", v), 1);
    cr_expect(v[0].re == -1.5 && v[0].im == 2.0);
    cr_assert_eq(cplx("-1.5-2j", v), 1);
    cr_expect(v[0].re == -1.5 && v[0].im == -2.0);
    cr_assert_eq(cplx("3j", v), 1);
    cr_expect(v[0].re == 0.0 && v[0].im == 3.0);
    cr_assert_eq(cplx("-3.25j", v), 1);
    cr_expect(v[0].re == 0.0 && v[0].im == -3.25);
    cr_assert_eq(cplx("1e1+2.5e-1i", v), 1);
    cr_expect(v[0].re == 10.0 && v[0].im == 0.25);
}

Test(numtext, complex_pairs)
{
    ps_cplx v[2];
    /* U+00B1 split off so that the hex escape stops before the 2; the
     * parentheses tell clang the concatenation is meant. */
    const char *forms[] = {"-1.5+-2j", ("-1.5\xC2\xB1" "2j"), "-1.5+/-2j"};
    for (size_t i = 0; i < sizeof forms / sizeof *forms; i++) {
        memset(v, 0, sizeof v);
        cr_assert_eq(cplx(forms[i], v), 2, "%s", forms[i]);
        cr_expect(v[0].re == -1.5 && v[0].im == 2.0, "%s: +im first", forms[i]);
        cr_expect(v[1].re == -1.5 && v[1].im == -2.0, "%s: then -im", forms[i]);
    }
}

Test(numtext, complex_rejections)
{
    const char *bad[] = {"-1.5+2",  "-1.5+2jj", "1+-+2j", "1+--2j", "1 2j", "1+0x2j", "inf+2j",
                         "1+infj",  "j",        "1+j",    "1e400j", "2+3jx",  "",     "1*2j"};
    for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
        ps_cplx v[2];
        const char *why = NULL;
        cr_expect_eq(ps_text_complex(bad[i], v, &why), -1, "'%s' accepted", bad[i]);
        cr_expect_not_null(why, "%s", bad[i]);
    }
}

Test(numtext, real_lists)
{
    double out[4];
    size_t bad = 99;
    const char *why = NULL;
    cr_assert_eq(ps_text_real_list("1 0 -19.6", out, 4, &bad, &why), 3);
    cr_expect(out[0] == 1.0 && out[1] == 0.0 && out[2] == -19.6);
    cr_assert_eq(ps_text_real_list("  2.5\t3.5, 4.5  ", out, 4, &bad, &why), 3);
    cr_expect_eq(out[2], 4.5);
    cr_assert_eq(ps_text_real_list("", out, 4, &bad, &why), 0);
    cr_assert_eq(ps_text_real_list(" \t ", out, 4, &bad, &why), 0);
    cr_assert_eq(ps_text_real_list("1 2 3 4", out, 4, &bad, &why), 4, "exactly cap is fine");

    cr_assert_eq(ps_text_real_list("1 2 x 4", out, 4, &bad, &why), -1);
    cr_expect_eq(bad, 2);
    cr_expect_str_eq(why, "expected a decimal number");
    cr_assert_eq(ps_text_real_list("1 2 3 4 5", out, 4, &bad, &why), -1);
    cr_expect_eq(bad, 4);
    cr_expect(strstr(why, "too many") != NULL);
    cr_assert_eq(ps_text_real_list("1 nan", out, 4, &bad, &why), -1);
    cr_expect_eq(bad, 1);

    char longtok[200];
    memset(longtok, '1', sizeof longtok - 1);
    longtok[sizeof longtok - 1] = '\0';
    cr_assert_eq(ps_text_real_list(longtok, out, 4, &bad, &why), -1);
    cr_expect_eq(bad, 0);
    cr_expect(strstr(why, "too long") != NULL);
}

Test(numtext, complex_lists)
{
    ps_cplx out[5];
    size_t bad = 99;
    const char *why = NULL;
    cr_assert_eq(ps_text_complex_list("31.3 -31.3 -5+-12j", out, 5, &bad, &why), 4);
    cr_expect(out[0].re == 31.3 && out[0].im == 0.0);
    cr_expect(out[1].re == -31.3);
    cr_expect(out[2].re == -5.0 && out[2].im == 12.0);
    cr_expect(out[3].re == -5.0 && out[3].im == -12.0);

    /* bad_index is the token position: the pair counts as one token. */
    cr_assert_eq(ps_text_complex_list("-5+-12j 2 oops", out, 5, &bad, &why), -1);
    cr_expect_eq(bad, 2, "third token, though it would be the fourth value");

    /* A pair that does not fit is refused whole, never written past cap. */
    cr_assert_eq(ps_text_complex_list("1 2 3 4 -1+-1j", out, 5, &bad, &why), -1);
    cr_expect_eq(bad, 4);
    cr_expect(strstr(why, "too many") != NULL);
    cr_assert_eq(ps_text_complex_list("1 2 3 -1+-1j", out, 5, &bad, &why), 5);
    cr_assert_eq(ps_text_complex_list("", out, 5, &bad, &why), 0);
}

Test(numtext, requirement_units)
{
    static ps_plant p;
    ps_plant_reset(&p);
    const char *why = "";
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_BAND_EDGE, "2.5", &why), 0);
    cr_assert_float_eq(p.req.wb, 2.5, 0);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_BAND_EDGE, "3 Hz", &why), 0);
    cr_assert_float_eq(p.req.wb, 6 * 3.14159265358979323846, 1e-12);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_ROLLOFF_START, "40 rad/s", &why), 0);
    cr_assert_float_eq(p.req.wh, 40.0, 0);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_BAND_ATTENUATION, "-20 dB", &why), 0);
    cr_assert_float_eq(p.req.eps, 0.1, 1e-15);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_BAND_ATTENUATION, "0.3", &why), 0);
    cr_assert_float_eq(p.req.eps, 0.3, 0);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_BAND_EDGE, "3 kHz", &why), -1);
    cr_assert(strstr(why, "rad/s or Hz") != NULL, "%s", why);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_BAND_ATTENUATION, "-6 dBm", &why), -1);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_MS_ALLOWED, "2 Hz", &why), -1);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_POLES, "2", &why), -1);
}

/* Every unit of the digital-loop fields (README "Digital loops"). */
Test(numtext, digital_loop_units)
{
    static ps_plant p;
    ps_plant_reset(&p);
    const char *why = "";
    struct { const char *text; double period; } rates[] = {
        {"1 kHz", 1e-3}, {"500 Hz", 2e-3}, {"2.5 MHz", 4e-7}, {"2 ms", 2e-3}, {"250 us", 250e-6},
        {"0.01 s", 0.01}, {"730Hz", 1.0 / 730}, {" 4.17 kHz ", 1.0 / 4170},
    };
    for (size_t i = 0; i < sizeof rates / sizeof *rates; i++) {
        cr_assert_eq(ps_text_scalar_field(&p, PS_F_SAMPLE_RATE, rates[i].text, &why), 0, "%s: %s", rates[i].text, why);
        cr_assert_float_eq(p.sample_period, rates[i].period, 1e-15 * rates[i].period, "%s", rates[i].text);
    }
    struct { const char *text; double samples, seconds; } delays[] = {
        {"1 sample", 1, 0}, {"0.5 samples", 0.5, 0}, {"2 samples", 2, 0}, {"0 samples", 0, 0},
        {"300 us", NAN, 300e-6}, {"0.4 ms", NAN, 0.4e-3}, {"0.001 s", NAN, 0.001},
    };
    for (size_t i = 0; i < sizeof delays / sizeof *delays; i++) {
        cr_assert_eq(ps_text_scalar_field(&p, PS_F_COMPUTE_DELAY, delays[i].text, &why), 0, "%s: %s", delays[i].text, why);
        if (isnan(delays[i].samples)) {
            cr_assert(isnan(p.compute_delay_samples), "%s", delays[i].text);
            cr_assert_float_eq(p.compute_delay, delays[i].seconds, 1e-18, "%s", delays[i].text);
        } else
            cr_assert_float_eq(p.compute_delay_samples, delays[i].samples, 0, "%s", delays[i].text);
    }
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_DOMAIN, "z", &why), 0);
    cr_assert(p.in_z);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_DOMAIN, " s ", &why), 0);
    cr_assert_not(p.in_z);

    const char *bad_rates[] = {"1000", "6283 rad/s", "0 Hz", "-2 ms", "1e306 MHz", "1 khz", "kHz", "1 kHz 2"};
    for (size_t i = 0; i < sizeof bad_rates / sizeof *bad_rates; i++)
        cr_assert_eq(ps_text_scalar_field(&p, PS_F_SAMPLE_RATE, bad_rates[i], &why), -1, "%s", bad_rates[i]);
    cr_assert_eq(ps_text_scalar_field(&p, PS_F_SAMPLE_RATE, "1000", &why), -1);
    cr_assert(strstr(why, "Hz or rad/s") != NULL, "%s", why);
    const char *bad_delays[] = {"0.5", "-1 sample", "3 Hz", "2 samp", "1e309 s"};
    for (size_t i = 0; i < sizeof bad_delays / sizeof *bad_delays; i++)
        cr_assert_eq(ps_text_scalar_field(&p, PS_F_COMPUTE_DELAY, bad_delays[i], &why), -1, "%s", bad_delays[i]);
    const char *bad_domains[] = {"Z", "w", "", "s z", "continuous"};
    for (size_t i = 0; i < sizeof bad_domains / sizeof *bad_domains; i++)
        cr_assert_eq(ps_text_scalar_field(&p, PS_F_DOMAIN, bad_domains[i], &why), -1, "%s", bad_domains[i]);
}

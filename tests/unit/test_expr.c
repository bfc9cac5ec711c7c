/* test_expr.c - family expressions through muParser: values by hand,
 * re-evaluation with new parameter values, and every refusal with its
 * position (unknown names, syntax, division by zero, non-finite values,
 * bad or duplicate parameter names, assignment, stale handles). */
#include <criterion/criterion.h>
#include <fenv.h>
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <string.h>

#include "family/expr.h"
#include "support.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

static ps_expr_ctx *ctx;
static double val[3];
static const char *const names[] = {"M", "m", "g"};

static void setup(void)
{
    ps_test_init();
    ctx = ps_expr_ctx_new();
    cr_assert_not_null(ctx);
    val[0] = 1.2; /* cart mass, kg */
    val[1] = 0.1; /* pendulum mass, kg */
    val[2] = 9.81;
    ps_diag d = {0};
    cr_assert_eq(ps_expr_set_params(ctx, names, val, 3, &d), PS_OK, "%s", d.text);
}

static void teardown(void) { ps_expr_ctx_free(ctx); }

TestSuite(expr, .init = setup, .fini = teardown);

static ps_expr compile_ok(const char *text)
{
    ps_expr e;
    ps_diag d = {0};
    cr_assert_eq(ps_expr_compile(ctx, text, &e, &d), PS_OK, "'%s' refused: %s", text, d.text);
    return e;
}

static double eval_ok(ps_expr e)
{
    double x = -999.0;
    ps_diag d = {0};
    cr_assert_eq(ps_expr_eval(ctx, e, &x, &d), PS_OK, "'%s': %s", ps_expr_text(ctx, e), d.text);
    return x;
}

static double value_of(const char *text) { return eval_ok(compile_ok(text)); }

/* Compile must fail with st; returns the diagnostic. */
static ps_diag compile_bad(const char *text, ps_status st)
{
    ps_expr e = {.id = 77, .gen = 77};
    ps_diag d = {0};
    cr_assert_eq(ps_expr_compile(ctx, text, &e, &d), st, "'%s' not refused as expected (%s)", text, d.text);
    cr_expect(e.id == 77 && e.gen == 77, "'%s': out untouched on failure", text);
    cr_expect_eq(d.line, 0, "the caller fills the line");
    cr_expect_str_eq(d.field, "", "the caller fills the field");
    return d;
}

/* Evaluation must fail with PS_ERR_NUMERIC; returns the diagnostic. */
static ps_diag eval_bad(const char *text)
{
    ps_expr e = compile_ok(text);
    double x = 7.125;
    ps_diag d = {0};
    cr_assert_eq(ps_expr_eval(ctx, e, &x, &d), PS_ERR_NUMERIC, "'%s' gave %g", text, x);
    cr_expect_eq(x, 7.125, "'%s': out untouched on failure", text);
    cr_expect(strstr(d.text, text) != NULL, "names the expression: %s", d.text);
    return d;
}

#define EXPECT_IN(d, s) cr_expect(strstr((d).text, (s)) != NULL, "expected \"%s\" in: %s", (s), (d).text)
#define EXPECT_NOT_IN(d, s) cr_expect(strstr((d).text, (s)) == NULL, "unexpected \"%s\" in: %s", (s), (d).text)

/* Hand values: the same operations written in C give the same doubles. */
Test(expr, hand_values)
{
    double M = val[0], m = val[1], g = val[2];
    cr_expect_eq(value_of("-(M+m)*g"), -(M + m) * g); /* -12.753 */
    cr_expect_float_eq(value_of("-(M+m)*g"), -12.753, 1e-14);
    cr_expect_eq(value_of("M*m*g/(M+m)"), M * m * g / (M + m));
    cr_expect_eq(value_of("M - m - g"), (M - m) - g, "left-associative minus");
    cr_expect_eq(value_of("M/m/g"), (M / m) / g, "left-associative division");
    cr_expect_eq(value_of("0.5*m*g^2"), 0.5 * m * (g * g));
    cr_expect_eq(value_of("1.5e3*m"), 1500.0 * m);
}

Test(expr, precedence)
{
    cr_expect_eq(value_of("M+m*g"), val[0] + val[1] * val[2]);
    cr_expect_eq(value_of("(M+m)*g"), (val[0] + val[1]) * val[2]);
    cr_expect_eq(value_of("2*3^2"), 18.0);
    cr_expect_eq(value_of("2^3^2"), 512.0, "^ is right-associative: 2^(3^2)");
    cr_expect_eq(value_of("-2^2"), -4.0, "^ binds tighter than unary minus");
    cr_expect_float_eq(value_of("-M^2"), -1.44, 1e-15);
    cr_expect_eq(value_of("M > m ? g : -g"), val[2]);
    cr_expect_eq(value_of("M == 1.2"), 1.0, "== compares, it does not assign");
    cr_expect_eq(value_of("M <= m"), 0.0);
}

Test(expr, functions)
{
    cr_expect_eq(value_of("sqrt(g)"), sqrt(9.81));
    cr_expect_float_eq(value_of("sin(M)"), sin(1.2), 1e-15);
    cr_expect_float_eq(value_of("g^2.5"), pow(9.81, 2.5), 1e-15 * pow(9.81, 2.5));
    cr_expect_float_eq(value_of("exp(-m*g)"), exp(-0.981), 1e-15);
    cr_expect_float_eq(value_of("log(g)"), log(9.81), 1e-15, "log is the natural logarithm");
    cr_expect_float_eq(value_of("ln(g)"), log(9.81), 1e-15);
    cr_expect_float_eq(value_of("log10(1000)"), 3.0, 1e-15);
    cr_expect_eq(value_of("min(M, m, g)"), 0.1);
    cr_expect_eq(value_of("max(M, m, g)"), 9.81);
    cr_expect_eq(value_of("abs(m - g)"), fabs(0.1 - 9.81));
    /* muParser 2.3.3 defines _pi as 3.141592653589; the context restores it. */
    cr_expect_eq(value_of("_pi"), M_PI);
    cr_expect_eq(value_of("_e"), exp(1.0));
}

Test(expr, reevaluation_reads_new_values)
{
    ps_expr den = compile_ok("-(M+m)*g"), w = compile_ok("sqrt(g/M)"), k = compile_ok("m/(M+m)");
    cr_expect_float_eq(eval_ok(den), -12.753, 1e-14);
    val[0] = 2.385;
    val[2] = 9.80665;
    cr_expect_eq(eval_ok(den), -(2.385 + 0.1) * 9.80665, "no new parse needed");
    cr_expect_eq(eval_ok(w), sqrt(9.80665 / 2.385));
    cr_expect_eq(eval_ok(k), 0.1 / (2.385 + 0.1));
    val[1] = 0.475;
    cr_expect_eq(eval_ok(k), 0.475 / (2.385 + 0.475));
    cr_expect_str_eq(ps_expr_text(ctx, k), "m/(M+m)");
}

Test(expr, unknown_name_is_an_error_with_position)
{
    ps_diag d = compile_bad("-(M+q)*g", PS_ERR_INPUT);
    cr_expect_eq(d.col, 5);
    EXPECT_IN(d, "unknown name \"q\"");
    EXPECT_IN(d, "\"-(M+q)*g\"");
    EXPECT_IN(d, "character 5");
    EXPECT_IN(d, "parameters: M, m, g");

    d = compile_bad("M*pi", PS_ERR_INPUT); /* the constant is _pi */
    cr_expect_eq(d.col, 3);
    EXPECT_IN(d, "unknown name \"pi\"");

    d = compile_bad("2.5x + 1", PS_ERR_INPUT);
    cr_expect_eq(d.col, 4);
    EXPECT_IN(d, "unknown name \"x\"");
    EXPECT_IN(d, "2*x");

    d = compile_bad("mass*g", PS_ERR_INPUT);
    cr_expect_eq(d.col, 1);
    EXPECT_IN(d, "unknown name \"mass\"");
}

Test(expr, syntax_errors_with_position)
{
    struct {
        const char *text;
        size_t col;
        const char *says;
    } cases[] = {
        {"2*(M+", 6, "Unexpected end of expression"}, /* just after the end */
        {"M m", 3, "Unexpected variable \"m\""},
        {"2**3", 3, "Unexpected operator \"*\""},
        {"sin(M", 6, "Missing parenthesis"},
        {"M)", 2, "Unexpected parenthesis"},
        {"sin()", 5, "Too few parameters"},
        {"sin(M, g)", 9, "Too many parameters"},
        {"(M,m)", 6, "Function arguments used without a function"},
        {"1e400*M", 1, "Unexpected token"},
        {"M % 2", 3, "Unexpected token"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
        ps_diag d = compile_bad(cases[i].text, PS_ERR_INPUT);
        cr_expect_eq(d.col, cases[i].col, "'%s': col %zu, expected %zu (%s)", cases[i].text, d.col,
                     cases[i].col, d.text);
        EXPECT_IN(d, cases[i].says);
        char at[32];
        snprintf(at, sizeof at, "at character %zu", cases[i].col);
        EXPECT_IN(d, at);
        EXPECT_NOT_IN(d, "position"); /* muParser's 0-based position is replaced */
    }
    ps_diag d = compile_bad("M > 0 ? 1", PS_ERR_INPUT);
    EXPECT_IN(d, "else");
}

Test(expr, refusals_before_muparser)
{
    double before = val[0];
    ps_diag d = compile_bad("M=5", PS_ERR_INPUT);
    cr_expect_eq(d.col, 2);
    EXPECT_IN(d, "assign");
    cr_expect_eq(val[0], before, "the parameter was not overwritten");
    d = compile_bad("g*(M+=1)", PS_ERR_INPUT);
    cr_expect_eq(d.col, 6);
    cr_expect_eq(val[0], before);

    d = compile_bad("M, m", PS_ERR_INPUT);
    cr_expect_eq(d.col, 2);
    EXPECT_IN(d, "comma");
    cr_expect_eq(value_of("min(M, m)"), 0.1, "commas between arguments are fine");

    compile_bad("", PS_ERR_INPUT);
    d = compile_bad(" \t ", PS_ERR_INPUT);
    EXPECT_IN(d, "empty");

    /* "g+m+m+...+m+10": 1 + 2*498 + 3 = 1000 characters, the maximum. */
    char text[PS_EXPR_TEXT_MAX + 2] = "g";
    for (int i = 0; i < 498; i++)
        strcat(text, "+m");
    strcat(text, "+10");
    cr_assert_eq(strlen(text), PS_EXPR_TEXT_MAX);
    cr_expect_float_eq(value_of(text), 9.81 + 498 * 0.1 + 10, 1e-10);
    strcat(text, "0");
    d = compile_bad(text, PS_ERR_INPUT);
    EXPECT_IN(d, "longer than 1000");
}

Test(expr, division_by_zero)
{
    ps_diag d = eval_bad("M/(M-1.2)");
    EXPECT_IN(d, "division by zero");
    EXPECT_IN(d, "result inf");
    EXPECT_IN(d, "M=1.2");
    EXPECT_NOT_IN(d, "g="); /* only the parameters the expression uses */

    /* Hidden by the final value: 1/(1/0) = 0 is still an error. */
    d = eval_bad("1/(1/(M-1.2))");
    EXPECT_IN(d, "division by zero");
    EXPECT_IN(d, "on the way");
    EXPECT_IN(d, "result 0");

    d = eval_bad("log(M-1.2) + g");
    EXPECT_IN(d, "log of 0");
    EXPECT_IN(d, "M=1.2, g=9.81");

    /* At other values the same expressions are fine. */
    val[0] = 2.385;
    cr_expect_float_eq(value_of("M/(M-1.2)"), 2.385 / 1.185, 1e-14);
}

Test(expr, non_finite_values)
{
    ps_diag d = eval_bad("sqrt(m - g)");
    EXPECT_IN(d, "invalid operation");
    EXPECT_IN(d, "result nan");
    EXPECT_IN(d, "m=0.1, g=9.81"); /* shortest text that reads back: not 0.10000000000000001 */

    d = eval_bad("exp(g*M*100)");
    EXPECT_IN(d, "overflow");
    EXPECT_IN(d, "result inf");

    d = eval_bad("1/exp(g*M*100)");
    EXPECT_IN(d, "overflow");
    EXPECT_IN(d, "on the way");

    val[1] = NAN;
    d = eval_bad("M + m");
    EXPECT_IN(d, "parameter that is not finite");
    EXPECT_IN(d, "m=nan");
}

/* muParser folds parts without parameters while parsing, so these never
 * reach evaluation: the compile refuses them. */
Test(expr, non_finite_constant_parts)
{
    struct {
        const char *text, *says;
    } cases[] = {
        {"sqrt(-1)", "invalid operation"},
        {"1/0", "division by zero"},
        {"exp(1000)", "overflow"},
        {"M + 1/0", "division by zero"},
        {"M*(1/exp(1000))", "overflow"},
        {"log(0)*g", "log of 0"},
    };
    for (size_t i = 0; i < sizeof cases / sizeof *cases; i++) {
        ps_diag d = compile_bad(cases[i].text, PS_ERR_INPUT);
        EXPECT_IN(d, cases[i].says);
        EXPECT_IN(d, "part without parameters");
    }
    /* A failure at the compile-time values alone is not a constant part. */
    val[0] = 1.2;
    ps_expr e = compile_ok("1/(M-1.2)");
    val[0] = 2.2;
    cr_expect_float_eq(eval_ok(e), 1.0, 1e-14);
}

Test(expr, flags_left_up_elsewhere_do_not_fail_an_evaluation)
{
    ps_expr e = compile_ok("M*g");
    feraiseexcept(FE_DIVBYZERO | FE_OVERFLOW);
    cr_expect_eq(eval_ok(e), 1.2 * 9.81);
    eval_bad("M/(m-0.1)");
    cr_expect_eq(eval_ok(e), 1.2 * 9.81, "the failed evaluation left its flag up");
}

Test(expr, parameter_names)
{
    double v[4] = {1, 2, 3, 4};
    struct {
        const char *n[2];
        const char *says;
    } bad[] = {
        {{"M", "M"}, "duplicate parameter name \"M\" (parameters 1 and 2)"},
        {{"k", "1k"}, "parameter 2 name \"1k\" must start with a letter"},
        {{"a b", "k"}, "only letters, digits and _"},
        {{"k", ""}, "is empty"},
        {{"sin", "k"}, "built-in"},
        {{"k", "_pi"}, "built-in"},
        {{"k", NULL}, "is missing"},
        {{"x.y", "k"}, "only letters"},
    };
    for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
        ps_diag d = {0};
        cr_expect_eq(ps_expr_set_params(ctx, bad[i].n, v, 2, &d), PS_ERR_INPUT, "%s", bad[i].says);
        EXPECT_IN(d, bad[i].says);
    }
    char longname[PS_EXPR_NAME_MAX + 2];
    memset(longname, 'k', sizeof longname - 1);
    longname[sizeof longname - 1] = '\0';
    const char *too_long[] = {longname};
    ps_diag d = {0};
    cr_expect_eq(ps_expr_set_params(ctx, too_long, v, 1, &d), PS_ERR_INPUT);
    EXPECT_IN(d, "longer than 63");
    longname[PS_EXPR_NAME_MAX] = '\0';
    cr_expect_eq(ps_expr_set_params(ctx, too_long, v, 1, &d), PS_OK, "63 bytes is the limit: %s", d.text);

    /* A refused set leaves the previous parameters in place. */
    cr_expect_eq(ps_expr_set_params(ctx, names, val, 3, &d), PS_OK);
    cr_expect_eq(ps_expr_set_params(ctx, bad[0].n, v, 2, &d), PS_ERR_INPUT);
    cr_expect_eq(value_of("M+m"), 1.2 + 0.1);

    /* Names are case-sensitive; _ and digits after the first letter are fine. */
    const char *good[] = {"k_1", "K_1", "_tau", "Jm2"};
    cr_assert_eq(ps_expr_set_params(ctx, good, v, 4, &d), PS_OK, "%s", d.text);
    cr_expect_eq(value_of("k_1 + 10*K_1 + 100*_tau + 1000*Jm2"), 4321.0);
    cr_expect_eq(ps_expr_set_params(ctx, good, NULL, 4, &d), PS_ERR_INPUT, "values are needed");
}

Test(expr, no_parameters)
{
    ps_diag d = {0};
    cr_assert_eq(ps_expr_set_params(ctx, NULL, NULL, 0, &d), PS_OK);
    cr_expect_eq(value_of("2*_pi"), 2 * M_PI);
    d = compile_bad("M+1", PS_ERR_INPUT);
    EXPECT_IN(d, "parameters: none");
}

Test(expr, stale_handles_are_refused)
{
    ps_expr e = compile_ok("M*g");
    ps_diag d = {0};
    cr_assert_eq(ps_expr_set_params(ctx, names, val, 3, &d), PS_OK);
    double x = 7.125;
    cr_expect_eq(ps_expr_eval(ctx, e, &x, &d), PS_ERR_INPUT);
    EXPECT_IN(d, "stale");
    cr_expect_eq(x, 7.125);
    cr_expect_null(ps_expr_text(ctx, e));
    ps_expr zero = {0};
    cr_expect_eq(ps_expr_eval(ctx, zero, &x, &d), PS_ERR_INPUT, "a zeroed handle is never valid");
    ps_expr fresh = compile_ok("M*g");
    cr_expect_eq(eval_ok(fresh), 1.2 * 9.81);
    ps_expr_ctx_free(NULL);
}

Test(expr, many_expressions_one_context)
{
    ps_expr e[40];
    char text[40][32];
    for (size_t i = 0; i < 40; i++) {
        snprintf(text[i], sizeof text[i], "%zu.5*M - m/g", i);
        e[i] = compile_ok(text[i]);
    }
    for (size_t i = 0; i < 40; i++)
        cr_expect_float_eq(eval_ok(e[i]), ((double)i + 0.5) * 1.2 - 0.1 / 9.81, 1e-13, "%s", text[i]);
}

/* muParser's C interface returns every message through one static buffer;
 * two threads failing at once must still each get their own message. */
typedef struct worker {
    char name[8];
    int mismatches;
} worker;

static void *fail_repeatedly(void *arg)
{
    worker *w = arg;
    ps_expr_ctx *c = ps_expr_ctx_new();
    double v = 2.385;
    const char *n[] = {"p"};
    ps_diag d = {0};
    if (!c || ps_expr_set_params(c, n, &v, 1, &d) != PS_OK) {
        w->mismatches = -1;
        ps_expr_ctx_free(c);
        return NULL;
    }
    char text[32], want[48];
    snprintf(text, sizeof text, "p*%s", w->name);
    snprintf(want, sizeof want, "unknown name \"%s\"", w->name);
    for (int i = 0; i < 300; i++) {
        ps_expr e;
        if (ps_expr_compile(c, text, &e, &d) != PS_ERR_INPUT || !strstr(d.text, want))
            w->mismatches++;
        if (ps_expr_compile(c, "p*(1+", &e, &d) != PS_ERR_INPUT || !strstr(d.text, "Unexpected end"))
            w->mismatches++;
    }
    ps_expr_ctx_free(c);
    return NULL;
}

Test(expr, contexts_in_threads)
{
    worker w[2] = {{"alpha", 0}, {"beta", 0}};
    pthread_t t[2];
    for (int i = 0; i < 2; i++)
        cr_assert_eq(pthread_create(&t[i], NULL, fail_repeatedly, &w[i]), 0);
    for (int i = 0; i < 2; i++)
        pthread_join(t[i], NULL);
    cr_expect_eq(w[0].mismatches, 0);
    cr_expect_eq(w[1].mismatches, 0);
}

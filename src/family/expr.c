/* expr.c - family expressions on muParser's C interface: name checks, one
 * parser handle per expression, errors with 1-based positions, and the
 * floating-point checks muParser does not make (it returns inf and nan). */
#include "family/expr.h"

#include <ctype.h>
#include <fenv.h>
#include <math.h>
#include <muParserDLL.h>
#include <pthread.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* Why one handle per expression: muParser keeps one expression per handle,
 * and mupSetExpr throws the bytecode away, so the next mupEval parses again.
 * Measured here (muParser 2.3.3, gcc -O2, 2-core machine; 30 typical
 * coefficient expressions over 8 parameters): a kept handle evaluates in
 * 20 ns per expression (0.6 us per plant), mupSetExpr + mupEval on one shared
 * handle in 7.5-10 us per expression (226-298 us per plant), about 400 times
 * slower. (All 30 joined by commas in one handle, read with mupEvalMulti,
 * took 12 ns each but cannot tell which expression failed.) With the checks
 * below, ps_expr_eval takes 28-32 ns per expression. A handle costs 8 us to
 * create and 25-35 us with its first parse, paid once per family. */

/* muParser's C interface copies every message it hands out (mupGetErrorMsg,
 * mupGetErrorToken, mupGetExpr) into one static 2048-byte buffer shared by
 * all handles (muParserDLL.cpp: s_tmpOutBuf, filled by an unbounded
 * sprintf). So a message is read under this lock and copied at once, and
 * texts are capped at PS_EXPR_TEXT_MAX so that a message quoting a token of
 * the text cannot overflow that buffer. The lock is this module's only
 * shared state; everything else lives in a context. */
static pthread_mutex_t message_lock = PTHREAD_MUTEX_INITIALIZER;

/* muParserDef.h, EErrorCodes (the C header does not export them). */
enum { MUP_UNASSIGNABLE_TOKEN = 1 };

/* The flags that make a value an error even when the result is finite. */
#define FE_CHECKED (FE_DIVBYZERO | FE_INVALID | FE_OVERFLOW)

/* muParser 2.3.3's built-in functions and constants. A parameter may not
 * take one of these names: muParser accepts a variable "sin", but then
 * "sin(x)" still calls the function and "sin*2" reads the variable. */
static const char *const builtin_names[] = {
    "sin",  "cos",  "tan", "asin", "acos", "atan", "sinh", "cosh", "tanh", "asinh", "acosh", "atanh", "log2", "log10",
    "log",  "ln",   "exp", "sqrt", "sign", "rint", "abs",  "sum",  "avg",  "min",   "max",   "_pi",   "_e",
};

typedef struct compiled {
    muParserHandle_t h;
    char *text;          /* a copy, for messages */
    unsigned char *uses; /* uses[i]: parameter i occurs in text (same block as text) */
} compiled;

struct ps_expr_ctx {
    size_t n_params;
    char (*names)[PS_EXPR_NAME_MAX + 1];
    double *values; /* the caller's */
    unsigned gen;   /* bumped whenever the parameters change; ps_expr carries it */
    compiled *items;
    size_t n_items, cap_items;
};

ps_expr_ctx *ps_expr_ctx_new(void)
{
    ps_expr_ctx *ctx = calloc(1, sizeof *ctx);
    if (ctx)
        ctx->gen = 1; /* a zeroed ps_expr is never valid */
    return ctx;
}

static void drop_items(ps_expr_ctx *ctx)
{
    for (size_t i = 0; i < ctx->n_items; i++) {
        mupRelease(ctx->items[i].h);
        free(ctx->items[i].text);
    }
    ctx->n_items = 0;
    if (++ctx->gen == 0)
        ctx->gen = 1;
}

void ps_expr_ctx_free(ps_expr_ctx *ctx)
{
    if (!ctx)
        return;
    drop_items(ctx);
    free(ctx->items);
    free(ctx->names);
    free(ctx);
}

/* ---- names ------------------------------------------------------------------ */

static bool ident_start(char c) { return isalpha((unsigned char)c) || c == '_'; }
static bool ident_char(char c) { return isalnum((unsigned char)c) || c == '_'; }

static const char *name_problem(const char *s)
{
    size_t n = strlen(s);
    if (n == 0)
        return "is empty";
    if (n > PS_EXPR_NAME_MAX)
        return "is longer than 63 characters";
    if (!ident_start(s[0]))
        return "must start with a letter or _";
    for (size_t i = 1; i < n; i++)
        if (!ident_char(s[i]))
            return "may hold only letters, digits and _";
    for (size_t i = 0; i < sizeof builtin_names / sizeof *builtin_names; i++)
        if (strcmp(s, builtin_names[i]) == 0)
            return "is a built-in function or constant";
    return NULL;
}

ps_status ps_expr_set_params(ps_expr_ctx *ctx, const char *const *names, double *values, size_t n,
                             ps_diag *d)
{
    if (n > 0 && (!names || !values))
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "parameters: names and values are needed");
    for (size_t i = 0; i < n; i++) {
        const char *why = names[i] ? name_problem(names[i]) : "is missing";
        if (why)
            return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "parameter %zu name \"%.63s\" %s", i + 1,
                               names[i] ? names[i] : "", why);
        for (size_t j = 0; j < i; j++)
            if (strcmp(names[j], names[i]) == 0)
                return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "",
                                   "duplicate parameter name \"%s\" (parameters %zu and %zu)", names[i], j + 1,
                                   i + 1);
    }
    char(*copy)[PS_EXPR_NAME_MAX + 1] = NULL;
    if (n > 0 && !(copy = calloc(n, sizeof *copy)))
        return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory for parameter names");
    for (size_t i = 0; i < n; i++)
        memcpy(copy[i], names[i], strlen(names[i]) + 1);
    drop_items(ctx);
    free(ctx->names);
    ctx->names = copy;
    ctx->values = values;
    ctx->n_params = n;
    return PS_OK;
}

/* ---- messages --------------------------------------------------------------- */

/* text in quotes, shortened to fit a diagnostic. */
static const char *quoted(const char *text, char *buf, size_t n)
{
    if (strlen(text) <= 80)
        snprintf(buf, n, "\"%.80s\"", text);
    else
        snprintf(buf, n, "\"%.77s...\"", text);
    return buf;
}

/* The shortest of %.15g and %.17g that reads back as v. */
static void number_text(double v, char *buf, size_t n)
{
    if (isnan(v)) {
        snprintf(buf, n, "nan");
        return;
    }
    snprintf(buf, n, "%.15g", v);
    if (strtod(buf, NULL) != v)
        snprintf(buf, n, "%.17g", v);
}

/* "M=1.2, g=9.81": the parameters the expression uses, at their values now
 * ("" when it uses none). */
static void values_text(const ps_expr_ctx *ctx, const compiled *c, char *buf, size_t n)
{
    size_t w = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < ctx->n_params && w < n; i++) {
        if (!c->uses[i])
            continue;
        char num[32];
        number_text(ctx->values[i], num, sizeof num);
        int k = snprintf(buf + w, n - w, "%s%s=%s", w ? ", " : "", ctx->names[i], num);
        if (k < 0)
            break;
        w += (size_t)k;
    }
}

/* "M, m, g": the names an expression may use. */
static void names_text(const ps_expr_ctx *ctx, char *buf, size_t n)
{
    size_t w = 0;
    buf[0] = '\0';
    for (size_t i = 0; i < ctx->n_params && w < n; i++) {
        int k = snprintf(buf + w, n - w, "%s%s", i ? ", " : "", ctx->names[i]);
        if (k < 0)
            break;
        w += (size_t)k;
    }
    if (ctx->n_params == 0)
        snprintf(buf, n, "none");
}

/* Remove muParser's own position (0-based, and past the end for "unexpected
 * end"): the caller gets the 1-based one in d->col and in our text. */
static void strip_position(char *msg)
{
    static const char *const tails[] = {" found at position ", " at expression position ", " at position ",
                                        " (position: "};
    for (size_t t = 0; t < sizeof tails / sizeof *tails; t++) {
        char *last = NULL;
        for (char *p = strstr(msg, tails[t]); p; p = strstr(p + 1, tails[t]))
            last = p;
        if (last) {
            *last = '\0';
            break;
        }
    }
    size_t n = strlen(msg);
    while (n > 0 && (msg[n - 1] == '.' || msg[n - 1] == ' '))
        msg[--n] = '\0';
}

/* Report the error muParser holds for h (the flag already read). */
static ps_status mup_failure(const ps_expr_ctx *ctx, muParserHandle_t h, const char *text, ps_status st,
                             ps_diag *d)
{
    char msg[PS_DIAG_TEXT], q[96];
    pthread_mutex_lock(&message_lock);
    snprintf(msg, sizeof msg, "%s", mupGetErrorMsg(h));
    pthread_mutex_unlock(&message_lock);
    strip_position(msg);
    int code = mupGetErrorCode(h), pos = mupGetErrorPos(h);
    size_t len = strlen(text);
    size_t col = pos < 0 ? 0 : (size_t)pos >= len ? len + 1 : (size_t)pos + 1;
    quoted(text, q, sizeof q);
    if (code == MUP_UNASSIGNABLE_TOKEN && col >= 1 && col <= len && ident_start(text[col - 1])) {
        size_t k = col - 1, e = k;
        while (ident_char(text[e]))
            e++;
        char known[256];
        names_text(ctx, known, sizeof known);
        bool after_number = k > 0 && (isdigit((unsigned char)text[k - 1]) || text[k - 1] == '.');
        return ps_diag_set(d, st, 0, col, "", "unknown name \"%.*s\" in %s at character %zu%s (parameters: %s)",
                           (int)(e - k), text + k, q, col,
                           after_number ? "; a number directly followed by a name: write 2*x for a product" : "",
                           known);
    }
    if (col == 0)
        return ps_diag_set(d, st, 0, 0, "", "in %s: %s", q, msg);
    return ps_diag_set(d, st, 0, col, "", "in %s at character %zu: %s", q, col, msg);
}

/* 1-based position of an assignment '=' (muParser would store into the
 * parameter), 0 when there is none. ==, <=, >= and != compare. */
static size_t assignment_at(const char *s)
{
    for (size_t i = 0; s[i]; i++) {
        if (s[i] != '=')
            continue;
        if (s[i + 1] == '=') {
            i++;
            continue;
        }
        if (i > 0 && strchr("<>!", s[i - 1]))
            continue;
        return i + 1;
    }
    return 0;
}

/* 1-based position of a comma outside parentheses (muParser would return
 * several values and mupEval the last), 0 when there is none. */
static size_t top_comma_at(const char *s)
{
    long depth = 0;
    for (size_t i = 0; s[i]; i++) {
        if (s[i] == '(')
            depth++;
        else if (s[i] == ')')
            depth--;
        else if (s[i] == ',' && depth <= 0)
            return i + 1;
    }
    return 0;
}

/* Which parameters occur in text as whole identifiers (not the "e3" of 1.5e3). */
static void mark_uses(const ps_expr_ctx *ctx, const char *text, unsigned char *uses)
{
    memset(uses, 0, ctx->n_params);
    for (size_t i = 0; text[i];) {
        bool glued = i > 0 && (ident_char(text[i - 1]) || text[i - 1] == '.');
        if (!ident_start(text[i]) || glued) {
            i++;
            continue;
        }
        size_t e = i;
        while (ident_char(text[e]))
            e++;
        for (size_t p = 0; p < ctx->n_params; p++)
            if (strlen(ctx->names[p]) == e - i && memcmp(ctx->names[p], text + i, e - i) == 0)
                uses[p] = 1;
        i = e;
    }
}

/* ---- compile and evaluate ------------------------------------------------------ */

static const char *flag_reason(int fe)
{
    return fe & FE_DIVBYZERO ? "division by zero (or log of 0)"
           : fe & FE_INVALID ? "invalid operation (square root or log of a negative number, 0/0, ...)"
                             : "overflow (beyond 1.8e308)";
}

ps_status ps_expr_compile(ps_expr_ctx *ctx, const char *text, ps_expr *out, ps_diag *d)
{
    char q[96];
    size_t len = strlen(text), at;
    if (len > PS_EXPR_TEXT_MAX)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "expression %s is longer than %d characters",
                           quoted(text, q, sizeof q), PS_EXPR_TEXT_MAX);
    if (strspn(text, " \t") == len)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "empty expression");
    if ((at = assignment_at(text)))
        return ps_diag_set(d, PS_ERR_INPUT, 0, at, "",
                           "in %s at character %zu: '=' would assign to a parameter; compare with ==",
                           quoted(text, q, sizeof q), at);
    if ((at = top_comma_at(text)))
        return ps_diag_set(d, PS_ERR_INPUT, 0, at, "",
                           "in %s at character %zu: a comma outside a function's arguments (one expression "
                           "gives one value)", quoted(text, q, sizeof q), at);

    if (ctx->n_items == ctx->cap_items) {
        size_t cap = ctx->cap_items ? 2 * ctx->cap_items : 16;
        compiled *grown = realloc(ctx->items, cap * sizeof *grown);
        if (!grown)
            return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory for an expression");
        ctx->items = grown;
        ctx->cap_items = cap;
    }
    compiled c = {.text = malloc(len + 1 + ctx->n_params), .h = mupCreate(muBASETYPE_FLOAT)};
    if (!c.text || !c.h) {
        free(c.text);
        if (c.h)
            mupRelease(c.h);
        return ps_diag_set(d, PS_ERR_NOMEM, 0, 0, "", "out of memory for an expression");
    }
    memcpy(c.text, text, len + 1);
    c.uses = (unsigned char *)c.text + len + 1;
    mark_uses(ctx, text, c.uses);

    /* muParser 2.3.3 defines _pi as 3.141592653589 (13 digits); _e is exact. */
    mupDefineConst(c.h, "_pi", M_PI);
    bool failed = mupError(c.h);
    for (size_t i = 0; i < ctx->n_params && !failed; i++) {
        mupDefineVar(c.h, ctx->names[i], &ctx->values[i]);
        failed = mupError(c.h);
    }
    if (!failed) {
        mupSetExpr(c.h, c.text);
        failed = mupError(c.h);
    }
    int n_results = 0, folded = 0;
    if (!failed) {
        /* mupSetExpr only stores the text: muParser parses on the first
         * evaluation, and while parsing it folds the parts without
         * parameters into constants ("1/0" becomes inf, "1/exp(1000)" 0),
         * so later evaluations raise no flag for them. A flag of the first
         * evaluation that a second one does not raise again therefore comes
         * from a constant part. Neither may leave flags behind. */
        fexcept_t saved;
        fegetexceptflag(&saved, FE_ALL_EXCEPT);
        feclearexcept(FE_CHECKED);
        mupEvalMulti(c.h, &n_results);
        failed = mupError(c.h);
        if (!failed) {
            int first = fetestexcept(FE_CHECKED);
            feclearexcept(FE_CHECKED);
            mupEval(c.h);
            failed = mupError(c.h);
            folded = first & ~fetestexcept(FE_CHECKED);
        }
        fesetexceptflag(&saved, FE_ALL_EXCEPT);
    }
    ps_status st = PS_OK;
    if (failed)
        st = mup_failure(ctx, c.h, text, PS_ERR_INPUT, d);
    else if (n_results != 1)
        st = ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "in %s: gives %d values, not one", quoted(text, q, sizeof q),
                         n_results);
    else if (folded)
        st = ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "in %s: %s in a part without parameters",
                         quoted(text, q, sizeof q), flag_reason(folded));
    if (st != PS_OK) {
        mupRelease(c.h);
        free(c.text);
        return st;
    }
    ctx->items[ctx->n_items] = c;
    *out = (ps_expr){.id = ctx->n_items++, .gen = ctx->gen};
    return PS_OK;
}

static const compiled *lookup(const ps_expr_ctx *ctx, ps_expr e)
{
    return e.gen == ctx->gen && e.id < ctx->n_items ? &ctx->items[e.id] : NULL;
}

const char *ps_expr_text(const ps_expr_ctx *ctx, ps_expr e)
{
    const compiled *c = lookup(ctx, e);
    return c ? c->text : NULL;
}

static ps_status bad_value(const ps_expr_ctx *ctx, const compiled *c, double v, int fe, ps_diag *d)
{
    const char *why = fe ? flag_reason(fe) : "a value that is not finite";
    for (size_t i = 0; i < ctx->n_params && !fe; i++)
        if (c->uses[i] && !isfinite(ctx->values[i]))
            why = "a parameter that is not finite";
    char q[96], vals[320], num[32];
    number_text(v, num, sizeof num);
    values_text(ctx, c, vals, sizeof vals);
    return ps_diag_set(d, PS_ERR_NUMERIC, 0, 0, "", "%s: %s%s, result %s%s%s", quoted(c->text, q, sizeof q), why,
                       isfinite(v) ? " on the way" : "", num, vals[0] ? ", at " : "", vals);
}

ps_status ps_expr_eval(ps_expr_ctx *ctx, ps_expr e, double *out, ps_diag *d)
{
    const compiled *c = lookup(ctx, e);
    if (!c)
        return ps_diag_set(d, PS_ERR_INPUT, 0, 0, "", "stale expression (its parameters were set again)");
    /* Clearing the flags costs about 100 ns (the x87 environment is
     * rewritten), testing them 4 ns: clear only when one is already up. */
    if (fetestexcept(FE_CHECKED))
        feclearexcept(FE_CHECKED);
    double v = mupEval(c->h);
    if (mupError(c->h))
        return mup_failure(ctx, c->h, c->text, PS_ERR_NUMERIC, d);
    int fe = fetestexcept(FE_CHECKED);
    if (fe || !isfinite(v))
        return bad_value(ctx, c, v, fe, d);
    *out = v;
    return PS_OK;
}

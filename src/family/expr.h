/* expr.h - model-entry expressions of a plant family (e.g. "-(M+m)*g"),
 * parsed once and evaluated many times through muParser's C interface. */
#ifndef PS_EXPR_H
#define PS_EXPR_H

#include <stddef.h>

#include "core/diag.h"

enum {
    PS_EXPR_NAME_MAX = 63,   /* bytes of a parameter name, without the NUL */
    PS_EXPR_TEXT_MAX = 1000  /* bytes of one expression (see expr.c: muParser's message buffer) */
};

/* One evaluation context: the parameter names, a pointer to the caller's
 * array of their values, and every expression compiled against them. Not
 * shared between threads: make one per thread (contexts of different
 * threads may be used at the same time). Opaque. */
typedef struct ps_expr_ctx ps_expr_ctx;

/* A compiled expression: a small value naming an entry of its context. It is
 * valid until the context's parameters are set again or the context is freed;
 * a stale one is refused by ps_expr_eval, never evaluated. */
typedef struct ps_expr {
    size_t id;
    unsigned gen;
} ps_expr;

/* A context with no parameters and no expressions; NULL on no memory.
 * ps_expr_ctx_free releases it and every expression in it; NULL is a no-op. */
ps_expr_ctx *ps_expr_ctx_new(void);
void ps_expr_ctx_free(ps_expr_ctx *ctx);

/* Declare the parameters: names[i] is bound to values[i]. The names are
 * copied; the values array stays the CALLER's and must outlive every
 * evaluation: expressions read values[i] at the moment ps_expr_eval runs, so
 * new values need no new parse. Each name must be an identifier
 * ([A-Za-z_][A-Za-z0-9_]*, at most PS_EXPR_NAME_MAX bytes), unique, and not a
 * built-in function or constant (sin, sqrt, _pi, ...). Discards any
 * expression compiled before; a refused call changes nothing. n may be 0
 * (names and values may then be NULL).
 * Returns PS_OK, PS_ERR_INPUT (d->text names the bad name), PS_ERR_NOMEM. */
ps_status ps_expr_set_params(ps_expr_ctx *ctx, const char *const *names, double *values, size_t n,
                             ps_diag *d);

/* Parse text once (its bytecode is kept) and evaluate it once at the current
 * parameter values to make muParser parse it; that value and its
 * floating-point status are discarded, but the values must be initialised.
 * Grammar (muParser 2.3): + - * / ^ (right-associative, binding tighter
 * than unary minus: -2^2 = -4), comparisons, && ||, c ? a : b, and
 * sin cos tan asin acos atan sinh cosh tanh asinh acosh atanh exp sqrt abs
 * sign rint log = ln (natural) log2 log10, min max sum avg (any number of
 * arguments); constants _pi, _e. Refused: an unknown name (never read as
 * 0), '=' assignment, several comma-separated results, empty text, and a
 * part without parameters that divides by zero, overflows or is invalid
 * ("1/0", "sqrt(-1)", "M + exp(1000)"): muParser folds such parts into
 * constants while parsing, so evaluation could not notice them later.
 * On an error returns PS_ERR_INPUT with d->col the 1-based character in text
 * (0 when muParser gives none) and d->text quoting text and muParser's
 * message; d->line is 0 and d->field "" for the caller to fill (add the
 * column where text starts in its file). PS_ERR_NOMEM on no memory.
 * OUT: out. */
ps_status ps_expr_compile(ps_expr_ctx *ctx, const char *text, ps_expr *out, ps_diag *d);

/* Evaluate e at the values the parameter array holds now. A result that is
 * not finite, or any division by zero (log(0) included), invalid operation
 * (sqrt(M-g) with M < g, 0/0) or overflow on the way, even when the final
 * value is finite (1/(1/(M-m)) = 0 at M = m), is PS_ERR_NUMERIC with d->text
 * naming the expression, what went wrong and the values of the parameters
 * it uses.
 * Reads and may clear the calling thread's FE_DIVBYZERO, FE_INVALID and
 * FE_OVERFLOW flags. *out is written only on PS_OK. OUT: out. */
ps_status ps_expr_eval(ps_expr_ctx *ctx, ps_expr e, double *out, ps_diag *d);

/* The text e was compiled from, or NULL when e is stale. */
const char *ps_expr_text(const ps_expr_ctx *ctx, ps_expr e);

#endif

/* fuzz_expr.c - libFuzzer entry for family expressions (src/family/expr.h).
 * Input: first line the parameter names (blank-separated, at most 8), the
 * rest the expression text. Checks the contract of expr.h on every input. */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "family/expr.h"
#include "fuzz_common.h"

enum { MAX_PARAMS = 8, MAX_INPUT = 4096 };

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static char buf[MAX_INPUT + 1];
    if (size > MAX_INPUT)
        size = MAX_INPUT;
    memcpy(buf, data, size);
    buf[size] = '\0';

    char *text = strchr(buf, '\n');
    const char *names[MAX_PARAMS];
    size_t n = 0;
    if (text) {
        *text++ = '\0';
        for (char *tok = strtok(buf, " \t"); tok && n < MAX_PARAMS; tok = strtok(NULL, " \t"))
            names[n++] = tok;
    } else {
        text = buf;
    }
    /* High-entropy values, one set for the parse and another for the second
     * evaluation (a parameter may sit at a singular point in one of them). */
    double values[MAX_PARAMS] = {2.385, -0.4172, 9.81, 0.0731, 13.7, -5.06, 0.5, 1.203};
    static const double others[MAX_PARAMS] = {0.0, 7.31, -2.2e3, 1e-300, 4.4, 0.5, -0.5, 62.64};

    ps_expr_ctx *ctx = ps_expr_ctx_new();
    ps_fuzz_require(ctx != NULL, "no memory for a context");
    ps_diag d = {0};
    ps_status st = ps_expr_set_params(ctx, n ? names : NULL, n ? values : NULL, n, &d);
    ps_fuzz_require_clear(st, &d, "parameter names");
    if (st == PS_OK) {
        ps_expr e;
        memset(&d, 0, sizeof d);
        st = ps_expr_compile(ctx, text, &e, &d);
        ps_fuzz_require_clear(st, &d, "compile");
        ps_fuzz_require(st == PS_OK || st == PS_ERR_INPUT || st == PS_ERR_NOMEM, "compile status");
        if (st == PS_OK) {
            const char *kept = ps_expr_text(ctx, e);
            ps_fuzz_require(kept && strcmp(kept, text) == 0, "compiled text not kept");
            for (int round = 0; round < 2; round++) {
                double v = NAN;
                memset(&d, 0, sizeof d);
                st = ps_expr_eval(ctx, e, &v, &d);
                ps_fuzz_require_clear(st, &d, "evaluate");
                ps_fuzz_require(st == PS_OK ? isfinite(v) : st == PS_ERR_NUMERIC,
                                "an evaluation is a finite value or a numeric error");
                memcpy(values, others, sizeof values);
            }
        }
    }
    ps_expr_ctx_free(ctx);
    return 0;
}

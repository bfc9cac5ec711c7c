/* use_library.c - a program outside the tree that uses the installed
 * library: reads the catalogs named on the command line through the batch
 * API and prints each plant's RHP roots and its Ms and Mt floors. Built and
 * run by install_check.sh against what `cmake --install` wrote. */
#include <stdio.h>

#include "batch/batch.h"
#include "core/diag.h"
#include "roots/roots.h"

static void print_outcome(void *ctx, const ps_outcome *o)
{
    (void)ctx;
    if (o->err) {
        printf("%s: rejected: %s\n", o->p->id, o->err->text);
        return;
    }
    printf("%s: rhp_poles %zu rhp_zeros %zu ms_floor %.17g mt_floor %.17g\n", o->p->id, o->an->n_rhp_poles,
           o->an->n_rhp_zeros, o->fl->ms, o->fl->mt);
}

int main(int argc, char **argv)
{
    ps_roots_init();
    ps_batch *b = ps_batch_new(print_outcome, NULL);
    if (!b)
        return 4;
    int rc = 0;
    for (int i = 1; i < argc; i++) {
        ps_diag fd = {0};
        if (ps_batch_run(b, argv[i], &fd) != PS_OK) {
            fprintf(stderr, "use_library: %s: %s\n", argv[i], fd.text);
            rc = 4;
        }
    }
    const ps_batch_counts *c = ps_batch_counts_get(b);
    printf("entries %zu models %zu errors %zu\n", c->entries, c->models, c->errors);
    ps_batch_free(b);
    return rc;
}

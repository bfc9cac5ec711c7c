/* catalog_internal.h - pieces shared by the catalog readers. */
#ifndef PS_CATALOG_INTERNAL_H
#define PS_CATALOG_INTERNAL_H

#include <stdio.h>

#include "core/diag.h"

/* Clear fdiag (keeping path as its file), open path for binary reading and
 * refuse directories and files above PS_CATALOG_MAX_BYTES. OUT: *out, owned
 * by the caller (fclose). PS_ERR_IO with fdiag set on failure. */
ps_status ps_catalog_open(const char *path, FILE **out, ps_diag *fdiag);

#endif

/* catalog_internal.h - pieces shared by the catalog readers. */
#ifndef PS_CATALOG_INTERNAL_H
#define PS_CATALOG_INTERNAL_H

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

#include "core/diag.h"

/* Clear fdiag (keeping path as its file), open path for binary reading and
 * refuse directories and files above PS_CATALOG_MAX_BYTES. OUT: *out, owned
 * by the caller (fclose). PS_ERR_IO with fdiag set on failure. */
ps_status ps_catalog_open(const char *path, FILE **out, ps_diag *fdiag);

/* Check the len bytes of a text cell at s: well-formed UTF-8 (RFC 3629:
 * no overlong forms, surrogates or values past U+10FFFF), and, when is_id,
 * no control character (C0 U+0000..U+001F including tab and line ends, DEL
 * U+007F, C1 U+0080..U+009F). Returns 0, or -1 with OUT: *at the 1-based
 * character of the first offence and why (cap bytes) the reason:
 * "not valid UTF-8 (byte 0xFF at character 3)". */
int ps_catalog_text_check(const char *s, size_t len, bool is_id, size_t *at, char *why, size_t cap);

#endif

/* catalog.h - streaming catalog readers (YAML and CSV).
 * Each entry is handed to a callback as soon as it is read; memory is bounded
 * by one entry, not by the file. */
#ifndef PS_CATALOG_H
#define PS_CATALOG_H

#include <stdbool.h>
#include <stddef.h>

#include "core/diag.h"
#include "model/plant.h"

/* Called once per catalog entry. When err is NULL, p holds the entry as read
 * (not yet checked: the caller runs ps_plant_check). When err is not NULL the
 * entry could not be read; p->id and p->line hold what is known (id may be
 * empty). p and err are only valid during the call. Return 0 to go on,
 * non-zero to stop reading. */
typedef int (*ps_entry_fn)(void *ctx, ps_plant *p, const ps_diag *err);

/* A YAML node kept whole: families are small, so a family mapping is handed
 * over as a tree (src/family interprets it). Map pairs are keys[i] ->
 * items[i]. Freed by the reader after the call. */
typedef enum ps_ynode_kind { PS_YN_SCALAR, PS_YN_SEQ, PS_YN_MAP } ps_ynode_kind;

typedef struct ps_ynode {
    ps_ynode_kind kind;
    size_t line, col;             /* 1-based */
    char *text;                   /* scalar text (NUL-terminated) */
    bool plain;                   /* unquoted scalar */
    size_t n;                     /* items of a sequence, pairs of a mapping */
    struct ps_ynode **items;
    struct ps_ynode **keys;       /* mapping keys (scalars) */
} ps_ynode;

/* Called once per item of a top-level 'families' sequence, in file order
 * between the plants around it, with the catalog defaults read so far.
 * Return 0 to go on, non-zero to stop. */
typedef int (*ps_family_fn)(void *ctx, const ps_ynode *family, const ps_plant *defaults);

/* Mapping lookup: the value under key, or NULL. */
const ps_ynode *ps_ynode_get(const ps_ynode *map, const char *key);

/* Upper bounds that keep hostile files cheap. */
enum {
    PS_YAML_MAX_DEPTH = 32,            /* nesting levels */
    PS_YAML_MAX_ALIAS_EVENTS = 100000, /* events replayed through aliases per file */
    PS_CATALOG_MAX_BYTES = 1 << 30,    /* file size limit: 1 GiB */
    PS_FIELD_MAX_BYTES = 1 << 20       /* one CSV field or YAML scalar */
};

/* Check the len bytes of a text cell at s (an id, a note, a family id): well-formed UTF-8 (RFC 3629:
 * no overlong forms, surrogates or values past U+10FFFF), and, when is_id,
 * no control character (C0 U+0000..U+001F including tab and line ends, DEL
 * U+007F, C1 U+0080..U+009F). Returns 0, or -1 with OUT: *at the 1-based
 * character of the first offence and why (cap bytes) the reason:
 * "not valid UTF-8 (byte 0xFF at character 3)". */
int ps_catalog_text_check(const char *s, size_t len, bool is_id, size_t *at, char *why, size_t cap);

/* Read a YAML catalog. scratch is the caller's entry buffer (reused for each
 * entry). Returns PS_OK when the file was read to the end (entry errors are
 * reported through fn, not here); PS_ERR_IO / PS_ERR_SYNTAX with fdiag set
 * when the file cannot be opened or its structure breaks (entries read
 * before that point have been delivered; an entry cut by the break is
 * delivered as an error). */
ps_status ps_yaml_read(const char *path, ps_plant *scratch, ps_entry_fn fn, void *ctx,
                       ps_diag *fdiag);

/* As ps_yaml_read, with families handed to ffn (NULL: each family is an
 * entry error, "families are not read here"). */
ps_status ps_yaml_read_families(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn,
                                void *ctx, ps_diag *fdiag);

/* Read an RFC 4180 CSV catalog: header row of field names, one plant per row.
 * Same contract as ps_yaml_read. */
ps_status ps_csv_read(const char *path, ps_plant *scratch, ps_entry_fn fn, void *ctx,
                      ps_diag *fdiag);

/* Pick the reader by file name ending (.yaml/.yml or .csv). PS_ERR_IO with
 * fdiag set for an unknown ending. */
ps_status ps_catalog_read(const char *path, ps_plant *scratch, ps_entry_fn fn, void *ctx,
                          ps_diag *fdiag);

/* ps_yaml_read_families that also copies the top-level `catalog` title into
 * title (title_cap bytes, cut to fit; "" when the file has none). A title
 * that is not valid UTF-8 or holds a control character ends the read as a
 * break in the file, like any other malformed top-level value. */
ps_status ps_yaml_read_titled(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn, void *ctx,
                              ps_diag *fdiag, char *title, size_t title_cap);

/* ps_catalog_read_families with the title of a YAML catalog (CSV: ""). */
ps_status ps_catalog_read_titled(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn, void *ctx,
                                 ps_diag *fdiag, char *title, size_t title_cap);

/* ps_catalog_read with a family hook (YAML only; CSV has no families). */
ps_status ps_catalog_read_families(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn,
                                   void *ctx, ps_diag *fdiag);

#endif

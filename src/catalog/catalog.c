/* catalog.c - picks the catalog reader from the file name ending. */
#include "catalog/catalog.h"

#include <errno.h>
#include <sys/stat.h>

#include <stdbool.h>
#include <stdio.h>
#include <string.h>
#include <strings.h>

#include "catalog/catalog_internal.h"

/* True when the final name component of path ends in ext (case-insensitive). */
static bool has_ending(const char *path, const char *ext)
{
    const char *base = strrchr(path, '/');
    base = base ? base + 1 : path;
    size_t n = strlen(base), k = strlen(ext);
    return n > k && strcasecmp(base + n - k, ext) == 0;
}

ps_status ps_catalog_read(const char *path, ps_plant *scratch, ps_entry_fn fn, void *ctx,
                          ps_diag *fdiag)
{
    return ps_catalog_read_families(path, scratch, fn, NULL, ctx, fdiag);
}

ps_status ps_catalog_read_families(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn,
                                   void *ctx, ps_diag *fdiag)
{
    return ps_catalog_read_titled(path, scratch, fn, ffn, ctx, fdiag, NULL, 0);
}

ps_status ps_catalog_read_titled(const char *path, ps_plant *scratch, ps_entry_fn fn, ps_family_fn ffn, void *ctx,
                                 ps_diag *fdiag, char *title, size_t title_cap)
{
    if (title && title_cap)
        title[0] = '\0';
    if (has_ending(path, ".yaml") || has_ending(path, ".yml"))
        return ps_yaml_read_titled(path, scratch, fn, ffn, ctx, fdiag, title, title_cap);
    if (has_ending(path, ".csv"))
        return ps_csv_read(path, scratch, fn, ctx, fdiag);
    ps_diag_clear(fdiag);
    if (fdiag)
        snprintf(fdiag->file, sizeof fdiag->file, "%s", path);
    return ps_diag_set(fdiag, PS_ERR_IO, 0, 0, NULL,
                       "unknown catalog type: expected a .yaml, .yml or .csv file");
}

ps_status ps_catalog_open(const char *path, FILE **out, ps_diag *fdiag)
{
    ps_diag_clear(fdiag);
    if (fdiag)
        snprintf(fdiag->file, sizeof fdiag->file, "%s", path);
    FILE *f = fopen(path, "rb");
    if (!f)
        return ps_diag_set(fdiag, PS_ERR_IO, 0, 0, NULL, "cannot open: %s", strerror(errno));
    struct stat st;
    if (fstat(fileno(f), &st) == 0) {
        ps_status bad = PS_OK;
        if (S_ISDIR(st.st_mode))
            bad = ps_diag_set(fdiag, PS_ERR_IO, 0, 0, NULL, "cannot read: %s", strerror(EISDIR));
        else if (S_ISREG(st.st_mode) && st.st_size > PS_CATALOG_MAX_BYTES)
            bad = ps_diag_set(fdiag, PS_ERR_IO, 0, 0, NULL,
                              "file is larger than the catalog size limit of %d bytes",
                              PS_CATALOG_MAX_BYTES);
        if (bad != PS_OK) {
            fclose(f);
            return bad;
        }
    }
    *out = f;
    return PS_OK;
}

const ps_ynode *ps_ynode_get(const ps_ynode *map, const char *key)
{
    if (!map || map->kind != PS_YN_MAP)
        return NULL;
    for (size_t i = 0; i < map->n; i++)
        if (strcmp(map->keys[i]->text, key) == 0)
            return map->items[i];
    return NULL;
}

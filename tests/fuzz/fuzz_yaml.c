/* fuzz_yaml.c - libFuzzer entry for the YAML catalog reader: any bytes give
 * entries, entry errors with a message, or a file-level error with a message. */
#include <string.h>

#include "catalog/catalog.h"
#include "fuzz_common.h"

static ps_plant scratch;

static int on_entry(void *ctx, ps_plant *p, const ps_diag *err)
{
    (*(size_t *)ctx)++;
    if (err)
        ps_fuzz_require_clear(PS_ERR_INPUT, err, "YAML entry error");
    ps_fuzz_require(strnlen(p->id, sizeof p->id) < sizeof p->id, "entry id not terminated");
    return 0;
}

/* Walk the tree a family is handed over as: every node well formed. */
static void walk(const ps_ynode *y, size_t depth)
{
    ps_fuzz_require(depth <= PS_YAML_MAX_DEPTH + 1, "family tree deeper than the reader's limit");
    ps_fuzz_require(y->line > 0, "family node without a line");
    if (y->kind == PS_YN_SCALAR) {
        ps_fuzz_require(y->text != NULL, "scalar without text");
        return;
    }
    ps_fuzz_require(y->kind == PS_YN_SEQ || y->kind == PS_YN_MAP, "node of no known kind");
    for (size_t i = 0; i < y->n; i++) {
        walk(y->items[i], depth + 1);
        if (y->kind == PS_YN_MAP)
            walk(y->keys[i], depth + 1);
    }
}

static int on_family(void *ctx, const ps_ynode *family, const ps_plant *defaults)
{
    (void)defaults;
    (*(size_t *)ctx)++;
    walk(family, 0);
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const char *path = ps_fuzz_file(data, size, "catalog.yaml");
    size_t seen = 0;
    ps_diag fd = {0};
    ps_status st = ps_yaml_read_families(path, &scratch, on_entry, on_family, &seen, &fd);
    ps_fuzz_require_clear(st, &fd, "YAML file error");
    return 0;
}

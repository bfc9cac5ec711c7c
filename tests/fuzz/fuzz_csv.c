/* fuzz_csv.c - libFuzzer entry for the CSV catalog reader: any bytes give
 * entries, entry errors with a message, or a file-level error with a message. */
#include <string.h>

#include "catalog/catalog.h"
#include "fuzz_common.h"

static ps_plant scratch;

static int on_entry(void *ctx, ps_plant *p, const ps_diag *err)
{
    (*(size_t *)ctx)++;
    if (err)
        ps_fuzz_require_clear(PS_ERR_INPUT, err, "CSV entry error");
    ps_fuzz_require(strnlen(p->id, sizeof p->id) < sizeof p->id, "entry id not terminated");
    return 0;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    const char *path = ps_fuzz_file(data, size, "catalog.csv");
    size_t seen = 0;
    ps_diag fd = {0};
    ps_status st = ps_csv_read(path, &scratch, on_entry, &seen, &fd);
    ps_fuzz_require_clear(st, &fd, "CSV file error");
    return 0;
}

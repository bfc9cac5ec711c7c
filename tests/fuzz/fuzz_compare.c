/* fuzz_compare.c - libFuzzer entry for the reader of screening reports that
 * compare uses: the bytes as JSON Lines and as a screening document, each
 * compared with the other through every writer; any bytes give rows or an
 * error with a message. */
#include <stdio.h>

#include "fuzz_common.h"
#include "report/compare.h"

static ps_status read_as(ps_cmp *c, ps_cmp_side side, const char *path, ps_cmp_source *src)
{
    ps_diag d = {0};
    ps_status st = ps_cmp_read(c, side, path, src, &d);
    ps_fuzz_require_clear(st, &d, "report reader error");
    return st;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    ps_cmp *c = ps_cmp_new();
    ps_fuzz_require(c != NULL, "no memory for a comparison");
    ps_cmp_view v = {.c = c, .tol = 0.01, .gate = PS_GATE_WORSE};
    const char *jl = ps_fuzz_file(data, size, "run.screen.plants.jsonl");
    ps_status a = read_as(c, PS_CMP_OLD, jl, &v.src[0]);
    const char *doc = ps_fuzz_file(data, size, "run.screen.json");
    ps_status b = read_as(c, PS_CMP_NEW, doc, &v.src[1]);
    if (a == PS_OK && b == PS_OK) {
        ps_cmp_count(c, v.tol, &v.n);
        v.tripped = ps_cmp_gate_tripped(v.gate, &v.n);
        ps_fuzz_require(v.n.plants[0] + v.n.plants[1] ==
                            2 * v.n.unchanged + 2 * v.n.verdict + 2 * v.n.severity + v.n.added + v.n.removed +
                                v.n.no_id[0] + v.n.no_id[1],
                        "a row neither matched nor listed");
        FILE *f = fopen("/dev/null", "w");
        ps_fuzz_require(f != NULL, "cannot open /dev/null");
        ps_fuzz_require(ps_cmp_write_text(f, &v) == PS_OK && ps_cmp_write_markdown(f, &v) == PS_OK &&
                            ps_cmp_write_json(f, &v) == PS_OK,
                        "a writer failed");
        fclose(f);
    }
    ps_cmp_free(c);
    return 0;
}

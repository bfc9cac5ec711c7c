/* fuzz_screen.c - libFuzzer entry for a whole small screen: catalog bytes ->
 * batch (read, check, roots, floors; families with their studies) -> assess
 * -> rank -> the JSON report writer into /dev/null. */
#include <stdio.h>
#include <string.h>

#include "batch/batch.h"
#include "fuzz_common.h"
#include "report/reports.h"
#include "roots/roots.h"
#include "screen/screen.h"
#include "screen/study.h"

typedef struct screen_ctx {
    ps_run run;
    ps_screen_ws *ws;
    ps_study_ws *study;
    size_t outcomes;
} screen_ctx;

static void on_outcome(void *ctx, const ps_outcome *o)
{
    screen_ctx *c = ctx;
    c->outcomes++;
    if (o->err)
        ps_fuzz_require_clear(PS_ERR_INPUT, o->err, "entry error");
    else
        ps_fuzz_require(o->an && o->fl, "a checked plant without its analysis");
    ps_summary *s = ps_run_next(&c->run);
    ps_fuzz_require(s != NULL, "no room for a summary");
    ps_screen_assess(c->ws, o, &c->run.opt, s);
    ps_run_commit(&c->run);
}

static void on_family(void *ctx, ps_family *fam, const char *file)
{
    (void)file;
    screen_ctx *c = ctx;
    ps_family_result *fr = ps_run_next_family(&c->run);
    ps_fuzz_require(fr != NULL, "no room for a family result");
    ps_study_family(c->study, fam, &c->run.opt, fr);
    fr->file_index = 0;
}

/* CSV when the first line has a comma and no colon (a CSV header), else YAML. */
static const char *name_for(const uint8_t *data, size_t size)
{
    const uint8_t *nl = memchr(data, '\n', size);
    size_t n = nl ? (size_t)(nl - data) : size;
    bool comma = n && memchr(data, ',', n), colon = n && memchr(data, ':', n);
    return comma && !colon ? "screen.csv" : "screen.yaml";
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    static FILE *sink;
    static bool ready;
    if (!ready) {
        ps_roots_init();
        sink = fopen("/dev/null", "w");
        ps_fuzz_require(sink != NULL, "cannot open /dev/null");
        ready = true;
    }
    const char *path = ps_fuzz_file(data, size, name_for(data, size));
    screen_ctx c = {0};
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_ALL};
    ps_run_init(&c.run, &opt);
    c.ws = ps_screen_ws_new();
    c.study = ps_study_ws_new();
    ps_batch *b = ps_batch_new(on_outcome, &c);
    ps_fuzz_require(c.ws && c.study && b, "no memory for the workspaces");
    ps_batch_on_family(b, on_family);
    ps_fuzz_require(ps_run_add_catalog(&c.run, path, NULL) == PS_OK, "cannot add the catalog");
    ps_diag fd = {0};
    ps_status st = ps_batch_run(b, path, &fd);
    ps_fuzz_require_clear(st, &fd, "catalog error");
    if (st != PS_OK)
        ps_fuzz_require(ps_run_catalog_failed(&c.run, &fd) == PS_OK, "cannot record the catalog error");
    c.run.counts = *ps_batch_counts_get(b);
    const ps_batch_counts *k = &c.run.counts;
    ps_fuzz_require(k->entries == k->models + k->errors, "entries != models + errors");
    ps_fuzz_require(k->entries <= c.outcomes, "an entry counted without its outcome");
    ps_run_rank(&c.run);
    ps_fuzz_require(ps_write_json(sink, &c.run) == PS_OK, "the JSON writer failed");
    ps_fuzz_require(ps_write_plants_jsonl(sink, &c.run) == PS_OK, "the JSON Lines writer failed");
    ps_fuzz_require(ps_write_markdown(sink, &c.run) == PS_OK, "the Markdown writer failed");
    ps_fuzz_require(ps_write_terminal(sink, &c.run, false, 0, NULL) == PS_OK, "the text writer failed");
    ps_batch_free(b);
    ps_study_ws_free(c.study);
    ps_screen_ws_free(c.ws);
    ps_run_free(&c.run);
    return 0;
}

/* test_noalloc.c - the per-plant path allocates nothing: analysis, floors
 * and the screening assessment (targets and curve included) run on
 * workspaces made once. The test interposes malloc and friends for this
 * executable (GSL's calls included, symbol interposition) and counts the
 * calls made by this thread while the per-plant path runs. */
#define _GNU_SOURCE /* dladdr */
#include <criterion/criterion.h>
#include <dlfcn.h>
#include <execinfo.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "catalog/catalog.h"
#include "sanitizer.h"
#include "model/discrete.h"
#include "screen/screen.h"
#include "support.h"

/* glibc's own entry points, exported for exactly this use. */
extern void *__libc_malloc(size_t n);
extern void *__libc_calloc(size_t n, size_t m);
extern void *__libc_realloc(void *p, size_t n);
extern void __libc_free(void *p);
extern void *__libc_memalign(size_t a, size_t n);

static _Thread_local int counting;
static _Thread_local size_t calls, in_qz;
static int trace; /* PS_NOALLOC_TRACE=1: print the stack of each counted call */

/* ASan and TSan replace the allocator themselves and cannot have it replaced
 * again here (under ASan the interposed malloc crashes at start-up): the
 * audit is then compiled out and its tests skip, saying so. */
#if !PS_TEST_ALLOCATOR_REPLACED

/* GSL 2.7's QZ (gsl_eigen_gen, used for the zeros of a state-space plant)
 * allocates one small vector inside, for a 2 x 2 SVD, whatever workspace it
 * is given: the one allocation the per-plant path cannot avoid. Calls made
 * from inside it are counted apart (dladdr names each frame; no malloc). */
static bool inside_gsl_qz(void)
{
    void *frames[16];
    int n = backtrace(frames, 16);
    for (int i = 0; i < n; i++) {
        Dl_info info;
        if (dladdr(frames[i], &info) && info.dli_sname && strcmp(info.dli_sname, "gsl_eigen_gen") == 0)
            return true;
    }
    return false;
}

static void seen_call(void)
{
    if (!counting)
        return;
    counting = 0;
    if (inside_gsl_qz())
        in_qz++;
    else {
        calls++;
        if (trace) {
            void *frames[10];
            int n = backtrace(frames, 10);
            backtrace_symbols_fd(frames, n, 2);
            write(2, "--\n", 3);
        }
    }
    counting = 1;
}

void *malloc(size_t n)
{
    seen_call();
    return __libc_malloc(n);
}
void *calloc(size_t n, size_t m)
{
    seen_call();
    return __libc_calloc(n, m);
}
void *realloc(void *p, size_t n)
{
    seen_call();
    return __libc_realloc(p, n);
}
void free(void *p) { __libc_free(p); }
void *aligned_alloc(size_t a, size_t n)
{
    seen_call();
    return __libc_memalign(a, n);
}
int posix_memalign(void **out, size_t a, size_t n)
{
    seen_call();
    *out = __libc_memalign(a, n);
    return *out ? 0 : 12; /* ENOMEM */
}
#endif

#define SKIP_UNDER_SANITIZER()                                                                  \
    do {                                                                                        \
        if (PS_TEST_ALLOCATOR_REPLACED)                                                         \
            cr_skip_test("skipped: built with a sanitizer that replaces malloc (ASan/TSan); "   \
                         "the allocation audit runs in the plain build");                       \
    } while (0)

enum { MAX_PLANTS = 64 };
static ps_plant *plants;
static size_t n_plants;

static int keep(void *ctx, ps_plant *p, const ps_diag *err)
{
    (void)ctx;
    ps_diag d = {0};
    if (!err && n_plants < MAX_PLANTS && ps_plant_check(p, &d) == PS_OK)
        plants[n_plants++] = *p;
    return 0;
}

static void setup(void)
{
    ps_test_init();
    void *frame[1];
    backtrace(frame, 1); /* loads the unwinder now, not while counting */
    trace = getenv("PS_NOALLOC_TRACE") != NULL;
}

TestSuite(noalloc, .init = setup);

/* Self-check: the counter sees an allocation made through GSL. */
#include <gsl/gsl_vector.h>
Test(noalloc, counter_sees_library_allocations)
{
    SKIP_UNDER_SANITIZER();
    counting = 1;
    calls = 0;
    gsl_vector *v = gsl_vector_alloc(3);
    counting = 0;
    gsl_vector_free(v);
    cr_assert_geq(calls, 1, "interposition failed: GSL's allocation was not counted");
}

Test(noalloc, per_plant_path_allocates_nothing)
{
    SKIP_UNDER_SANITIZER();
    plants = __libc_calloc(MAX_PLANTS, sizeof *plants);
    cr_assert_not_null(plants);
    ps_plant *scratch = __libc_calloc(1, sizeof *scratch);
    ps_diag fd = {0};
    cr_assert_eq(ps_catalog_read(PS_SOURCE_DIR "/catalogs/demo-variants.yaml", scratch, keep, NULL, &fd), PS_OK,
                 "%s", fd.text);
    cr_assert_geq(n_plants, 20);

    ps_roots_ws *rws = ps_roots_ws_new();
    ps_screen_ws *sws = ps_screen_ws_new();
    cr_assert(rws && sws);
    ps_screen_opts opt = {.marginal_at = PS_MARGINAL_AT, .detail = PS_DETAIL_ALL};
    ps_analysis an;
    ps_floors fl;
    ps_summary s;
    ps_limits_ws *lws = ps_limits_ws_new();
    size_t per_pass[2] = {0, 0}, qz_total = 0;
    for (int pass = 0; pass < 2; pass++) {
        for (size_t i = 0; i < n_plants; i++) {
            *scratch = plants[i];
            ps_diag d = {0};
            counting = 1;
            calls = 0;
            in_qz = 0;
            ps_status st = ps_roots_analyse(rws, scratch, &an, &d);
            if (st == PS_OK) {
                ps_floors_compute(lws, &an, &scratch->req, &fl);
                ps_outcome o = {"demo", scratch, &an, &fl, NULL, 0};
                ps_screen_assess(sws, &o, &opt, &s);
            }
            counting = 0;
            cr_expect_eq(calls, 0, "pass %d, plant '%s': %zu allocation(s)", pass + 1, plants[i].id, calls);
            per_pass[pass] += calls;
            qz_total += in_qz;
            if (in_qz) /* QZ finds the zeros of state-space plants and of every held plant */
                cr_expect(plants[i].form == PS_FORM_SS || (plants[i].sample_period > 0 && !plants[i].in_z),
                          "'%s': QZ allocations outside state space and held plants", plants[i].id);
        }
    }
    cr_assert_eq(per_pass[0] + per_pass[1], 0, "allocations: first pass %zu, second pass %zu", per_pass[0],
                 per_pass[1]);
    cr_log_info("per-plant path: 0 allocations of our own over 2 x %zu plants; %zu inside GSL's QZ "
                "(zeros of state-space and held plants)", n_plants, qz_total);
    ps_limits_ws_free(lws);
    ps_screen_ws_free(sws);
    ps_roots_ws_free(rws);
    __libc_free(scratch);
    __libc_free(plants);
}

/* The hold discretisation and the held plant's roots (model/discrete, roots):
 * every demo plant held at 13.7 ms with its own delay plus 1.37 samples. */
Test(noalloc, held_plant_path_allocates_nothing)
{
    SKIP_UNDER_SANITIZER();
    plants = __libc_calloc(MAX_PLANTS, sizeof *plants);
    ps_plant *scratch = __libc_calloc(1, sizeof *scratch);
    ps_held *held = __libc_calloc(1, sizeof *held);
    ps_held_roots *hr = __libc_calloc(1, sizeof *hr);
    cr_assert(plants && scratch && held && hr);
    n_plants = 0;
    ps_diag fd = {0};
    cr_assert_eq(ps_catalog_read(PS_SOURCE_DIR "/catalogs/demo-variants.yaml", scratch, keep, NULL, &fd), PS_OK,
                 "%s", fd.text);
    cr_assert_geq(n_plants, 20);
    ps_roots_ws *rws = ps_roots_ws_new();
    ps_discrete_ws *dws = ps_discrete_ws_new();
    cr_assert(rws && dws);
    ps_analysis an;
    size_t total = 0, held_ok = 0;
    for (size_t i = 0; i < n_plants; i++) {
        *scratch = plants[i];
        ps_diag d = {0};
        if (ps_roots_analyse(rws, scratch, &an, &d) != PS_OK)
            continue;
        const double h = 0.0137;
        counting = 1;
        calls = 0;
        ps_status st = ps_discrete_hold(dws, scratch, h, scratch->delay + 1.37 * h, held, &d);
        if (st == PS_OK)
            st = ps_roots_held(rws, held, &an, hr, &d);
        counting = 0;
        held_ok += st == PS_OK;
        cr_expect_eq(calls, 0, "plant '%s': %zu allocation(s)", plants[i].id, calls);
        total += calls;
    }
    cr_assert_eq(total, 0);
    cr_assert_geq(held_ok, 20, "only %zu plants held", held_ok);
    ps_discrete_ws_free(dws);
    ps_roots_ws_free(rws);
    __libc_free(hr);
    __libc_free(held);
    __libc_free(scratch);
    __libc_free(plants);
}

/* study.h - what a family tells beyond its grid plants: for each swept
 * parameter (the others at nominal) where along it the plant stops passing,
 * and for toleranced parameters the share of built units per verdict. */
#ifndef PS_STUDY_H
#define PS_STUDY_H

#include <stdbool.h>
#include <stddef.h>

#include "family/family.h"
#include "screen/screen.h"

typedef enum ps_bound_state {
    PS_BOUND_FOUND = 0,    /* one change of verdict along the sweep: value holds it */
    PS_BOUND_ALL_PASS,     /* every sweep point passes */
    PS_BOUND_ALL_FAIL,     /* no sweep point passes */
    PS_BOUND_NON_MONOTONE, /* the verdict changes more than once: no single boundary */
    PS_BOUND_ERROR         /* a sweep point could not be evaluated */
} ps_bound_state;

const char *ps_bound_state_name(ps_bound_state s);

enum { PS_BOUND_CHANGES = 8 };

/* What a boundary figure draws and which floor sets a verdict: the three
 * floors the severity weighs (README "Verdicts"), or the severity itself. */
typedef enum ps_quantity {
    PS_QTY_NONE = 0,  /* no floor: the failing side is not stabilizable */
    PS_QTY_MS,        /* Ms floor, against the allowed Ms */
    PS_QTY_MT,        /* Mt floor, against the allowed Mt */
    PS_QTY_EFFORT,    /* effort floor (peak |C S|), against the allowed effort */
    PS_QTY_SEVERITY   /* the largest share, against 1 */
} ps_quantity;

/* "Ms floor", "Mt floor", "effort floor (peak |C S|)", "severity", "none". */
const char *ps_quantity_words(ps_quantity q);
/* Stable keys: "Ms", "Mt", "effort", "severity", "not-stabilizable". */
const char *ps_quantity_key(ps_quantity q);

typedef struct ps_boundary {
    size_t param;               /* index into the family's parameters */
    ps_bound_state state;
    double value;               /* FOUND: where the verdict changes (bisection to 1e-10 relative) */
    bool pass_below;            /* FOUND: the plant passes for values below value */
    ps_quantity binding;        /* FOUND: the floor whose share exceeds 1 just on the failing side (the
                                   largest share there; Ms before Mt before effort on a tie), or NONE
                                   when that side is not stabilizable */
    bool fail_hidden;           /* FOUND, binding NONE: a hidden unstable mode (else an infinite floor) */
    double ms_allowed, mt_allowed, effort_allowed; /* the family's requirements; effort NAN when not set */
    double ms_pass, ms_fail;    /* FOUND: the floors just on the passing and the failing side */
    double mt_pass, mt_fail;
    double effort_pass, effort_fail;
    double sev_pass, sev_fail;  /* ... and the severity */
    size_t n_changes;           /* NON_MONOTONE: between which sweep points the verdict flips */
    double change_lo[PS_BOUND_CHANGES], change_hi[PS_BOUND_CHANGES];
    size_t n_curve;             /* floors and severity at the sweep points (sorted), others nominal */
    double curve_x[PS_FAM_SWEEP], curve_ms[PS_FAM_SWEEP], curve_mt[PS_FAM_SWEEP], curve_effort[PS_FAM_SWEEP],
        curve_sev[PS_FAM_SWEEP];
    bool curve_pass[PS_FAM_SWEEP];
    bool curve_unstab[PS_FAM_SWEEP]; /* not stabilizable (infinite floor or hidden unstable mode) */
    ps_quantity plotted;        /* what the figure draws against its allowed value: the binding floor (or,
                                   with no boundary, the largest share at the worst point) when every
                                   failing stabilizable sweep point has that floor above its allowed value,
                                   else the severity against 1. So no failing point is drawn below the line. */
    char why[PS_DIAG_TEXT];     /* ERROR: the evaluation message */
} ps_boundary;

/* The value a boundary figure draws at sweep point k (b->plotted), and the
 * line it is compared with. */
double ps_boundary_plotted_value(const ps_boundary *b, size_t k);
double ps_boundary_plotted_allowed(const ps_boundary *b);

typedef struct ps_yield {
    size_t samples;
    unsigned long seed;
    size_t invalid;                        /* units whose model could not be evaluated (an expression
                                              error, an improper plant, a non-finite value): left out
                                              of every share and reported as a warning */
    size_t valid;                          /* samples - invalid: the denominator of every share */
    size_t count[PS_VERDICT_COUNT];        /* valid units per verdict (PS_VERDICT_UNREAD stays 0) */
    double frac[PS_VERDICT_COUNT];         /* count / valid (NAN when valid = 0) */
    double lo[PS_VERDICT_COUNT], hi[PS_VERDICT_COUNT]; /* Wilson score interval, 95 % */
    double pass_frac, pass_lo, pass_hi;    /* clear or marginal, among valid units */
    int culprit;                           /* parameter most responsible for failures; -1 none */
    double culprit_shift;                  /* (mean over failing - mean over passing) / draw_sd */
    size_t redrawn[PS_FAM_PARAMS];         /* draws outside the parameter's declared range, drawn again */
    size_t redrawn_total;
    double drawn_min[PS_FAM_PARAMS], drawn_max[PS_FAM_PARAMS]; /* toleranced parameters, over every unit */
    char first_error[PS_DIAG_TEXT];        /* the first invalid unit's message */
} ps_yield;

typedef struct ps_family_result {
    char id[PS_ID_MAX];
    char note[PS_NOTE_MAX];
    size_t line, file_index;
    size_t n_params;
    ps_fam_param param[PS_FAM_PARAMS];
    size_t grid;                 /* grid plants in the ranking */
    size_t n_bound;
    ps_boundary bound[PS_FAM_PARAMS];
    bool has_yield;
    ps_yield yield;
} ps_family_result;

/* What a yield study has counted so far: the parts of ps_yield that add up
 * across shards. Units are drawn in blocks of PS_YIELD_BLOCK consecutive
 * samples; the sums the culprit is found from are added within a block in
 * sample order and then block after block in block order, so a study split
 * over shards (each taking whole blocks) adds the same numbers in the same
 * order and gives the same result to the last bit. */
enum { PS_YIELD_BLOCK = 4096 };

typedef struct ps_yield_block {
    size_t block;                          /* samples block * PS_YIELD_BLOCK onward */
    double sum_pass[PS_FAM_PARAMS], sum_fail[PS_FAM_PARAMS]; /* drawn values of passing / failing units */
} ps_yield_block;

typedef struct ps_yield_tally {
    size_t count[PS_VERDICT_COUNT];
    size_t invalid, n_pass, n_fail;
    size_t redrawn[PS_FAM_PARAMS];
    double drawn_min[PS_FAM_PARAMS], drawn_max[PS_FAM_PARAMS];
    size_t first_error_at;                 /* sample of the first invalid unit; SIZE_MAX: none */
    char first_error[PS_DIAG_TEXT];
    size_t n_blocks, cap_blocks;
    ps_yield_block *blocks;                /* ascending block */
} ps_yield_tally;

void ps_yield_tally_init(ps_yield_tally *t);
void ps_yield_tally_free(ps_yield_tally *t);
/* Add the blocks and counts of part (blocks no other part holds) into into.
 * PS_OK or PS_ERR_NOMEM. */
ps_status ps_yield_tally_add(ps_yield_tally *into, const ps_yield_tally *part);
/* The study's shares, intervals and culprit from a tally of every block. */
void ps_yield_finish(const ps_fam_param *param, size_t n_params, size_t samples, unsigned long seed,
                     const ps_yield_tally *t, ps_yield *y);

typedef struct ps_study_ws ps_study_ws;
ps_study_ws *ps_study_ws_new(void);
void ps_study_ws_free(ps_study_ws *ws);

/* Boundaries for every swept parameter and, when the family asks, the yield
 * study, into out. Deterministic for a given family (seeded generator). */
void ps_study_family(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, ps_family_result *out);

/* One shard's part of it: the boundaries only when bounds is set (a shard
 * computes those of the families it owns), the yield blocks k, k + n, ...
 * into tally (initialised here; the caller frees it). out->yield is then
 * that of these blocks alone. PS_OK, or PS_ERR_NOMEM (tally incomplete). */
ps_status ps_study_family_shard(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, size_t k, size_t n,
                                bool bounds, ps_family_result *out, ps_yield_tally *tally);

/* Room for the next family result in the run (NULL on no memory). */
ps_family_result *ps_run_next_family(ps_run *r);

#endif

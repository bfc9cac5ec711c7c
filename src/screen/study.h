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

typedef struct ps_boundary {
    size_t param;               /* index into the family's parameters */
    ps_bound_state state;
    double value;               /* FOUND: where the verdict changes (bisection to 1e-10 relative) */
    bool pass_below;            /* FOUND: the plant passes for values below value */
    double ms_pass, ms_fail;    /* FOUND: Ms floor just on the passing and the failing side */
    double sev_pass, sev_fail;  /* ... and the severity */
    size_t n_changes;           /* NON_MONOTONE: between which sweep points the verdict flips */
    double change_lo[PS_BOUND_CHANGES], change_hi[PS_BOUND_CHANGES];
    size_t n_curve;             /* Ms floor and severity at the sweep points (sorted), others nominal */
    double curve_x[PS_FAM_SWEEP], curve_ms[PS_FAM_SWEEP], curve_sev[PS_FAM_SWEEP];
    bool curve_pass[PS_FAM_SWEEP];
    char why[PS_DIAG_TEXT];     /* ERROR: the evaluation message */
} ps_boundary;

typedef struct ps_yield {
    size_t samples;
    unsigned long seed;
    size_t count[PS_VERDICT_COUNT];        /* PS_VERDICT_UNREAD: samples that could not be evaluated */
    double frac[PS_VERDICT_COUNT];
    double lo[PS_VERDICT_COUNT], hi[PS_VERDICT_COUNT]; /* Wilson score interval, 95 % */
    double pass_frac, pass_lo, pass_hi;    /* clear or marginal */
    int culprit;                           /* parameter most responsible for failures; -1 none */
    double culprit_shift;                  /* (mean over failing - mean over passing) / spread */
    char first_error[PS_DIAG_TEXT];
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

typedef struct ps_study_ws ps_study_ws;
ps_study_ws *ps_study_ws_new(void);
void ps_study_ws_free(ps_study_ws *ws);

/* Boundaries for every swept parameter and, when the family asks, the yield
 * study, into out. Deterministic for a given family (seeded generator). */
void ps_study_family(ps_study_ws *ws, ps_family *fam, const ps_screen_opts *opt, ps_family_result *out);

/* Room for the next family result in the run (NULL on no memory). */
ps_family_result *ps_run_next_family(ps_run *r);

#endif

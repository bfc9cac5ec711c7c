/* family.h - parametric plant families: named parameters (nominal value,
 * optional sweep, optional tolerance) and a model whose entries are
 * expressions in them, evaluated with muParser. A family expands to a grid
 * of plants (one per sweep point) and is the input of the boundary and yield
 * studies (src/screen/study.c). Catalog syntax: README "Families". */
#ifndef PS_FAMILY_H
#define PS_FAMILY_H

#include <stdbool.h>
#include <stddef.h>

#include "catalog/catalog.h"
#include "catalog/numtext.h"
#include "core/diag.h"
#include "family/expr.h"
#include "model/plant.h"

enum {
    PS_FAM_PARAMS = 8,       /* parameters per family */
    PS_FAM_NAME = 32,        /* bytes of a parameter name */
    PS_FAM_SWEEP = 64,       /* values of one swept parameter */
    PS_FAM_GRID = 4096,      /* plants of one family's grid */
    PS_FAM_EXPRS = 512,      /* expressions of one model */
    PS_FAM_SAMPLES = 1000000, /* yield samples */
    PS_FAM_TRIES = 10000      /* draws per value of a ranged parameter before the unit is given up */
};

/* Least share of a tolerance distribution a declared range must hold: with
 * it, 10000 draws all miss the range with probability 0.99^10000 < 1e-43. */
#define PS_FAM_RANGE_MASS_MIN 0.01

typedef enum ps_tol_kind { PS_TOL_NONE = 0, PS_TOL_NORMAL, PS_TOL_UNIFORM } ps_tol_kind;

typedef struct ps_fam_param {
    char name[PS_FAM_NAME];
    double nominal;
    size_t n_sweep;            /* 0: not swept */
    double sweep[PS_FAM_SWEEP];
    ps_tol_kind tol;
    double tol_value;          /* sigma (normal) or half-width (uniform) */
    bool has_min, has_max;     /* a declared physical range (only with a tolerance) */
    double min, max;           /* -INFINITY / INFINITY where not declared */
    double range_mass;         /* share of the tolerance distribution inside [min, max]; 1 without a range */
    double draw_sd;            /* standard deviation of the values drawn (the truncated one with a range) */
    size_t line, col;
} ps_fam_param;

typedef struct ps_fam_expr {
    char *text;
    ps_field field;
    size_t index;              /* list item, or row-major element of a */
    size_t line, col;
    ps_expr compiled;          /* in the family's expression context */
    /* sample_rate, compute_delay: the unit written after the expression
     * ("rate kHz", "d samples"); PS_UNIT_NONE for every other field */
    ps_text_unit unit;
    double unit_scale;
} ps_fam_expr;

typedef struct ps_family {
    char id[PS_ID_MAX];
    char note[PS_NOTE_MAX];
    size_t line;
    size_t n_params;
    ps_fam_param param[PS_FAM_PARAMS];
    double value[PS_FAM_PARAMS]; /* the values the expressions read (muParser variables) */
    ps_expr_ctx *ectx;           /* muParser handles, one per expression (src/family/expr.c) */
    size_t n_expr;
    ps_fam_expr expr[PS_FAM_EXPRS];
    size_t n_list[PS_F_COUNT];   /* items of each list field; a: rows * cols */
    size_t a_rows, a_cols;
    ps_plant *tmpl;              /* requirements and defaults, no model */
    size_t samples;              /* yield samples (0: no yield study) */
    unsigned long seed;
} ps_family;

/* Interpret a family mapping (with the catalog defaults, may be NULL). On an
 * error returns PS_ERR_INPUT with d naming line, field and what was expected;
 * the family is then empty (ps_family_free is still safe). */
ps_status ps_family_parse(ps_family *fam, const ps_ynode *node, const ps_plant *defaults, ps_diag *d);
void ps_family_free(ps_family *fam);

/* The declared range in words: "[0.001, 0.02]", ">= 0" or "<= 5"; "" with
 * none. */
void ps_family_range_text(const ps_fam_param *par, char *out, size_t n);

/* Number of grid plants (product of the sweep counts; 1 with no sweep). */
size_t ps_family_grid_size(const ps_family *fam);
/* Parameter values of grid point k (swept parameters vary, the last fastest). */
void ps_family_grid_point(const ps_family *fam, size_t k, double *values);

/* The plant at these parameter values, id "<family>[name=value,...]" (swept
 * names only, or every name when all_names). Unchecked (the caller runs
 * ps_plant_check). An expression that fails or gives a non-finite value is
 * PS_ERR_INPUT with the expression, the character position and the values. */
ps_status ps_family_eval(ps_family *fam, const double *values, bool all_names, ps_plant *out, ps_diag *d);

#endif

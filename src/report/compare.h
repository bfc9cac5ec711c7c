/* compare.h - two screening runs side by side: a reader of our own screening
 * JSON (summary + JSON Lines, or the older single document) and the diff. */
#ifndef PS_COMPARE_H
#define PS_COMPARE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "core/diag.h"
#include "screen/screen.h"

/* Which run a report belongs to. */
typedef enum ps_cmp_side { PS_CMP_OLD = 0, PS_CMP_NEW = 1 } ps_cmp_side;

/* What happened to one plant between the runs. Plants are matched by id; an
 * id that occurs k times in one report is matched occurrence by occurrence
 * in rank order (the first with the first, ...). */
typedef enum ps_change_kind {
    PS_CHANGE_NONE = 0,  /* same verdict; severities equal within the tolerance (or not numbers) */
    PS_CHANGE_VERDICT,   /* the verdict differs */
    PS_CHANGE_SEVERITY,  /* same verdict, both severities numbers, |new - old| > tol */
    PS_CHANGE_ADDED,     /* only in the new run */
    PS_CHANGE_REMOVED,   /* only in the old run */
    PS_CHANGE_NO_ID      /* the row has no id (an input error without one): not matched */
} ps_change_kind;

/* The direction of a change ("worse" is defined in README "Comparing two runs"):
 * WORSE  - a verdict later in clear < marginal < redesign < not-stabilizable;
 *          a judged verdict (those four) become needs-bandwidth or input-error;
 *          or, with the verdict marginal or redesign in both runs, the severity
 *          up by more than the tolerance.
 * BETTER - the reverse of each of these.
 * NONE   - anything else (added, removed, no id, a plant that becomes judged,
 *          a change between the two unjudged verdicts, a severity change
 *          within clear, needs-bandwidth or input-error). */
typedef enum ps_change_dir { PS_DIR_NONE = 0, PS_DIR_WORSE, PS_DIR_BETTER } ps_change_dir;

/* One plant as one report has it. */
typedef struct ps_cmp_plant {
    bool present;
    ps_verdict verdict;
    bool has_severity;     /* severity is a number */
    bool infinite;         /* severity_infinite */
    double severity;       /* NAN unless has_severity */
    size_t rank, line;     /* rank 1-based; line in the catalog (0: not known) */
    const char *file;      /* the catalog; "" when the report names none. Owned by the ps_cmp */
} ps_cmp_plant;

typedef struct ps_change {
    ps_change_kind kind;
    ps_change_dir dir;
    bool judged_again;     /* VERDICT: the old verdict was unjudged, the new is judged */
    const char *id;        /* "" for NO_ID; owned by the ps_cmp */
    size_t occurrence;     /* 1-based occurrence of the id in its report */
    size_t occurrences[2]; /* how often the id occurs in each run (0 for NO_ID) */
    ps_cmp_plant old, cur; /* old.present / cur.present say which runs hold it */
} ps_change;

typedef struct ps_cmp_counts {
    size_t plants[2];      /* rows read per run */
    size_t verdict, severity, added, removed, unchanged, no_id[2];
    size_t worse, better;
    size_t duplicate_ids[2]; /* ids that occur more than once in a run */
} ps_cmp_counts;

/* Where a run was read from (for the reports). */
typedef struct ps_cmp_source {
    char path[PS_DIAG_FILE];   /* the file whose plant rows were read */
    char format[24];           /* "jsonl", "jsonl-v4-summary" or "json-v3" (also for v1, v2) */
} ps_cmp_source;

typedef struct ps_cmp ps_cmp;

/* A comparison; NULL on no memory. Owns every string it hands out. */
ps_cmp *ps_cmp_new(void);
void ps_cmp_free(ps_cmp *c);

/* Read the plant rows of one run from path: a report-set directory (its one
 * *.screen.plants.jsonl, else its one *.screen.json; a directory with
 * neither but exactly one *.screen directory: that one), a screening JSON
 * document (schema_version 4: the summary, whose "plants_file" beside it is
 * read; 1 to 3: its "plants" array) or a JSON Lines file (name ending in
 * .jsonl). Each side is read once. JSON Lines are read one line at a time; an
 * older document is parsed whole. Returns PS_OK, PS_ERR_IO (cannot open),
 * PS_ERR_SYNTAX (not JSON, or not one of these layouts), PS_ERR_INPUT (a row
 * lacks a field or holds a wrong value) or PS_ERR_NOMEM; d gets the file,
 * the line (of the JSON Lines file, or of jansson's parse error; 0 when not
 * known), the field and what was expected. OUT: src (may be NULL). */
ps_status ps_cmp_read(ps_cmp *c, ps_cmp_side side, const char *path, ps_cmp_source *src, ps_diag *d);

/* Classify every plant with tolerance tol (>= 0) on severity. OUT: n. */
void ps_cmp_count(const ps_cmp *c, double tol, ps_cmp_counts *n);

/* The entries in the order read: the old run's rows in its rank order,
 * then the plants only in the new run (and the new rows without id) in its
 * rank order. ps_cmp_get fills out for
 * entry i < ps_cmp_size(c) and returns out->kind. */
size_t ps_cmp_size(const ps_cmp *c);
ps_change_kind ps_cmp_get(const ps_cmp *c, size_t i, double tol, ps_change *out);

/* Ids that occur more than once in run side: entry i (as above) holds the
 * first occurrence of such an id when ps_cmp_occurrences(c, side, i) > 1 (it
 * returns the number of occurrences, 0 for an entry that is not a first one). */
size_t ps_cmp_occurrences(const ps_cmp *c, ps_cmp_side side, size_t i);

/* Which changes trip the gate. */
typedef enum ps_cmp_gate { PS_GATE_WORSE = 0, PS_GATE_CHANGED, PS_GATE_NEVER } ps_cmp_gate;
const char *ps_cmp_gate_name(ps_cmp_gate g);
/* WORSE: some plant is worse. CHANGED: some plant changed verdict, changed
 * severity beyond tol, was added or was removed. NEVER: never. */
bool ps_cmp_gate_tripped(ps_cmp_gate g, const ps_cmp_counts *n);

/* What the writers print besides the entries. */
typedef struct ps_cmp_view {
    const ps_cmp *c;
    ps_cmp_source src[2];
    double tol;
    ps_cmp_gate gate;
    ps_cmp_counts n;
    bool tripped;
} ps_cmp_view;

/* The comparison as text (stdout), Markdown, or JSON (schema
 * reports/schema/plantsieve-comparison.schema.json). Each returns PS_OK,
 * PS_ERR_IO or PS_ERR_NOMEM. */
ps_status ps_cmp_write_text(FILE *f, const ps_cmp_view *v);
ps_status ps_cmp_write_markdown(FILE *f, const ps_cmp_view *v);
ps_status ps_cmp_write_json(FILE *f, const ps_cmp_view *v);

/* Version of the comparison JSON layout. */
#define PS_CMP_SCHEMA_VERSION 1

#endif

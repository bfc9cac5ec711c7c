/* screen.h - the screening decision for one plant: verdict, severity, the
 * limiting cause in engineering words, and redesign targets found by
 * bisection on the floors; and the ranked run that reports are written from.
 * Definitions (thresholds, formulas) are documented in README "Verdicts". */
#ifndef PS_SCREEN_H
#define PS_SCREEN_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "batch/batch.h"
#include "certify/certify.h"
#include "limits/floors.h"
#include "model/plant.h"
#include "roots/roots.h"
#include "screen/attribution.h"

typedef enum ps_verdict {
    PS_VERDICT_CLEAR = 0,      /* every floor well inside what is allowed */
    PS_VERDICT_MARGINAL,       /* floors use at least marginal_at of the allowed log-peak */
    PS_VERDICT_REDESIGN,       /* some floor exceeds what the requirements allow */
    PS_VERDICT_UNSTABILIZABLE, /* hidden unstable mode or an infinite floor */
    PS_VERDICT_NEEDS_BANDWIDTH, /* an unstable plant with no roll-off start that no bandwidth-free floor fails:
                                   with unlimited bandwidth every floor it has may be 1, so it is not judged */
    PS_VERDICT_UNREAD,         /* the entry could not be read or checked */
    PS_VERDICT_COUNT
} ps_verdict;

/* Stable words used in every report ("clear", "marginal", "redesign",
 * "not-stabilizable", "needs-bandwidth", "input-error"). */
const char *ps_verdict_name(ps_verdict v);

/* Default share of the allowed log-peak at which a plant becomes marginal. */
#define PS_MARGINAL_AT 0.8

typedef enum ps_target_kind {
    PS_TARGET_POLE = 0, /* largest dominant unstable pole that passes (all RHP poles scaled together) */
    PS_TARGET_ZERO,     /* smallest RHP zero that passes (all RHP zeros scaled together) */
    PS_TARGET_DELAY,    /* largest delay that passes */
    PS_TARGET_ROLLOFF,  /* smallest roll-off start w_h (available bandwidth) that passes */
    PS_TARGET_BAND,     /* widest band edge w_b with which every floor passes */
    PS_TARGET_EFFORT,   /* smallest allowed peak |C S| that passes (the effort floor), when effort is counted */
    PS_TARGET_SAMPLE_RATE,   /* lowest sample rate (Hz) at which the plant passes (digital loops) */
    PS_TARGET_COMPUTE_DELAY, /* largest computation delay (s) that passes (digital loops) */
    PS_TARGET_COUNT
} ps_target_kind;

/* Stable key of a target ("unstable_pole", "rhp_zero", "delay", "rolloff_start", "band_edge",
 * "effort_allowed", "sample_rate", "compute_delay"). */
const char *ps_target_key(ps_target_kind k);

typedef enum ps_target_state {
    PS_TARGET_NA = 0,    /* does not apply (e.g. no RHP zero); why says so */
    PS_TARGET_FOUND,     /* limit holds the boundary value */
    PS_TARGET_NONE,      /* no value in the searched range passes */
    PS_TARGET_UNBOUNDED, /* every value in the searched range passes */
    PS_TARGET_NOT_MONOTONE /* passes at limit but fails again at a value beyond it (why says where):
                              no single boundary is claimed */
} ps_target_state;

const char *ps_target_state_name(ps_target_state s);

typedef struct ps_target {
    ps_target_state state;
    double now;       /* present value: |dominant RHP pole|, |smallest RHP zero|, delay s, w_h, w_b (rad/s) */
    double limit;     /* boundary value, same unit; NAN unless FOUND */
    double searched;  /* the end of the searched range (for UNBOUNDED / NONE) */
    bool passes_now;  /* the present value passes: limit - now is headroom */
    char why[120];
} ps_target;

enum { PS_MAP_MAX = 16, PS_CURVE_N = 33, PS_CAUSE_MAX = 440, PS_CERT_CURVE_N = 41 };

/* What a report needs of one plant: a fixed record, no pointers into the
 * model (the model is gone once the next entry is read). */
typedef struct ps_summary {
    size_t order;               /* position in the run (catalog order), 0-based */
    size_t file_index;          /* into the run's catalog list */
    char id[PS_ID_MAX];
    char note[PS_NOTE_MAX];     /* the plant's note from the catalog ("" when none) */
    size_t line;
    ps_verdict verdict;
    double severity;            /* max share; INFINITY when not stabilizable, NAN for input errors */
    double share_ms, share_mt, share_effort; /* NAN when not applicable */
    const char *worst;          /* "Ms", "Mt", "effort" or "none" (ps_peak_name of attr.binding) */
    char cause[PS_CAUSE_MAX];   /* one sentence from attr */
    ps_attribution attr;        /* the binding floor taken apart by factor */
    ps_floors fl;
    ps_requirements req;
    bool req_overridden[PS_F_COUNT]; /* the field was given on the plant (or by catalog defaults) */
    ps_target target[PS_TARGET_COUNT];
    double band_eps;            /* attenuation used for the band target and curve */
    size_t n_curve;             /* Ms floor against the band edge, log grid */
    double curve_wb[PS_CURVE_N], curve_ms[PS_CURVE_N];
    /* the plant as analysed (first PS_MAP_MAX of each; counts are the true counts) */
    size_t n_poles, n_zeros, n_rhp_poles, n_rhp_zeros;
    ps_cplx poles[PS_MAP_MAX], zeros[PS_MAP_MAX];
    size_t n_growth;            /* RHP poles, one per real pole or conjugate pair (im >= 0), for times to double */
    ps_cplx growth[PS_MAP_MAX];
    double delay, gain;
    int rel_degree;
    /* the digital loop (h 0 for a continuous loop); the roots in z are in fl */
    double h, compute_delay;
    bool in_z;
    bool hidden_unstable;
    bool detail_deferred;       /* targets and curve not yet computed (PS_DETAIL_DEFERRED) */
    /* the certificate controller (screen --certify): n_cert 1 when this plant was
       taken, and then |S| and |T| of the loop found, when one was (n_cert_curve points) */
    size_t n_cert;
    ps_cert cert[1];
    size_t n_cert_curve;        /* points log-spaced from cert_w_from to cert_w_to (rad/s) */
    double cert_w_from, cert_w_to;
    float cert_s[PS_CERT_CURVE_N], cert_t[PS_CERT_CURVE_N]; /* single precision: a figure's data */
    /* input errors */
    size_t err_line, err_col;
    char err_field[PS_DIAG_FIELD];
    char err_text[PS_DIAG_TEXT];
} ps_summary;

/* Redesign targets and the band curve cost about 100 floor evaluations a
 * plant; a large run may keep them for the flagged plants (marginal,
 * redesign) or drop them. */
typedef enum ps_detail {
    PS_DETAIL_ALL = 0, PS_DETAIL_FLAGGED, PS_DETAIL_NONE,
    PS_DETAIL_DEFERRED /* the run's own: not yet; the row is marked detail_deferred, and a keep_top run
                          computes the detail of the rows it keeps once it is ranked (ps_run_rank) */
} ps_detail;

/* The three outcomes of a plant (and the cases the search does not take). */
typedef enum ps_bracket {
    PS_BRACKET_RULED_OUT = 0,  /* a floor exceeds what is allowed (verdict redesign or not stabilizable) */
    PS_BRACKET_DEMONSTRATED,   /* a verified controller meets every requirement */
    PS_BRACKET_UNDECIDED,      /* the floors pass; no controller found within the budget meets every requirement */
    PS_BRACKET_NOT_ATTEMPTED,  /* the search does not take this plant (the reason says why) */
    PS_BRACKET_COUNT,
    PS_BRACKET_NONE = PS_BRACKET_COUNT /* no bracket: the run was not asked for one, or not for this plant */
} ps_bracket;

/* Which plants screen --certify gives a certificate controller. */
typedef enum ps_cert_which {
    PS_CERTIFY_NONE = 0,
    PS_CERTIFY_PASSING,         /* the plants whose floors pass (clear, marginal) */
    PS_CERTIFY_JUDGED,          /* those and the ones the floors rule out (redesign, not stabilizable) */
    PS_CERTIFY_COUNT
} ps_cert_which;

typedef struct ps_screen_opts {
    double marginal_at;         /* default PS_MARGINAL_AT */
    size_t memory_rows;         /* summaries kept in memory before the run uses its file; 0: PS_RUN_MEMORY_ROWS */
    ps_detail detail;           /* which plants get redesign targets and the Ms-vs-band curve */
    size_t keep_top;            /* > 0: a run read only by the terminal listing cut at keep_top rows a
                                   list (no report files): past memory_rows it keeps the records of
                                   the rows that can still be among the first keep_top of the ranking,
                                   of the redesign list, of the passing list or of the input errors,
                                   in memory, and writes no file; 0: every record is kept */
    ps_cert_which certify;      /* plants given a certificate controller (ps_certify) */
    size_t certify_budget;      /* its loop evaluations a plant; 0: PS_CERT_BUDGET */
} ps_screen_opts;

typedef struct ps_screen_ws ps_screen_ws;
ps_screen_ws *ps_screen_ws_new(void);
void ps_screen_ws_free(ps_screen_ws *ws);

/* Shares of the allowed log-peak: ln(floor)/ln(allowed) for Ms and Mt (floor
 * below 1 counts as 1), ln(1 + effort)/ln(1 + allowed) for effort. */
double ps_share_peak(double floor, double allowed);
double ps_share_effort(double floor, double allowed);
/* The same for a floor given with its natural logarithm (ps_floors): where
 * the floor overflowed a double (+INFINITY with a finite floor_ln) the share
 * is taken from the logarithm, so it stays finite; otherwise as above. */
double ps_share_peak_ln(double floor, double floor_ln, double allowed);
double ps_share_effort_ln(double floor, double floor_ln, double allowed);

/* Verdict from the floors, requirements and structure. */
ps_verdict ps_verdict_of(double severity, bool infinite, bool hidden, double marginal_at);

/* Assess one outcome into s (order and file_index set by the caller). For an
 * input error only the identity and error fields are filled. */
void ps_screen_assess(ps_screen_ws *ws, const ps_outcome *o, const ps_screen_opts *opt, ps_summary *s);

/* Floors of an analysis under requirements, and whether they pass
 * (severity <= 1 and not infinite). Exposed for the targets' tests. */
bool ps_screen_passes(ps_screen_ws *ws, const ps_analysis *an, const ps_requirements *req, double *severity);

/* The floors of the last ps_screen_passes call. */
const ps_floors *ps_screen_last_floors(const ps_screen_ws *ws);

/* ---- the run: every summary, ranked ---- */

typedef struct ps_catalog_entry {
    char *file;
    bool failed;
    size_t line, col;
    char *error;
    char *title;                /* the YAML `catalog` title; NULL when none */
    char sha256[65];            /* digest of the file's bytes ("" when not taken) */
    uint64_t bytes;             /* the file's size when the digest was taken */
} ps_catalog_entry;

/* Where a run came from, for the first page of every report. */
typedef struct ps_run_meta {
    char *command_line;         /* the arguments, quoted for a POSIX shell where needed; NULL: none */
    char date[40];              /* UTC, ISO 8601, from SOURCE_DATE_EPOCH; "" without it (no date, so
                                   two runs on the same input are byte-identical) */
} ps_run_meta;

/* Rows kept in memory; beyond this a run moves its summaries to a
 * temporary file (deleted on exit) and keeps a 32-byte rank key per plant;
 * the file holds each summary as a compact record (texts and lists cut to
 * their length: about 1.2-1.7 kB instead of 4.0 kB). */
enum { PS_RUN_MEMORY_ROWS = 16384, PS_RUN_RING = 8, PS_RUN_WINDOW = 65536, PS_RUN_WRITE_BUF = 1 << 20, PS_RUN_LISTS = 5 };

typedef struct ps_rank_key {
    double severity;
    size_t order;               /* arrival position in the run */
    uint64_t at;                /* the record's offset in the file */
    uint32_t len;               /* and its length */
    int16_t cls;                /* 0 not stabilizable, 1 screened, 2 input error */
    int16_t verdict;            /* the row's verdict (a ps_verdict), for ps_run_verdict */
} ps_rank_key;

/* What reading rows back takes: the store has one, and so has each thread
 * that reads rows beside others (ps_run_reader_begin). */
typedef struct ps_run_cursor {
    uint64_t last_end;          /* where the record read last ends */
    uint64_t win_at;            /* file offset of window[0] */
    size_t win_len;             /* bytes in window (0: none) */
    unsigned char window[PS_RUN_WINDOW]; /* records read ahead */
    unsigned char scratch[sizeof(ps_summary)]; /* a record being read */
    ps_summary ring[PS_RUN_RING]; /* rows read back for ps_run_row */
    size_t ring_pos;
    bool failed;                /* a read failed (a thread's own cursor) */
} ps_run_cursor;

typedef struct ps_run_store {
    FILE *file;                 /* NULL while every row is in memory */
    char *file_buf;             /* stdio buffer of file (PS_RUN_WRITE_BUF bytes) */
    ps_rank_key *keys;          /* one per row (spilled runs), ranked by ps_run_rank */
    size_t cap_keys;
    uint64_t end;               /* bytes written */
    ps_run_cursor cur;          /* the reading of the thread that ranked the run */
    unsigned char scratch[sizeof(ps_summary)]; /* a record being written */
    bool failed;                /* a write or read of the file failed */
    /* keep_top runs (no file): records in slots (key.at = slot, len 0 when
     * dropped); per list (ranking, redesign, passing, input errors, needs-bandwidth) a heap
     * of the keep_top first rows so far, the last on top; a slot lives
     * while some list holds its row. */
    unsigned char **slot;
    ps_plant **slot_plant;      /* the plant of a row whose detail is deferred (else NULL) */
    unsigned *slot_refs;
    size_t n_slots, cap_slots, *free_slots, n_free;
    size_t *heap[PS_RUN_LISTS], heap_len[PS_RUN_LISTS];
} ps_run_store;

typedef struct ps_run {
    ps_screen_opts opt;
    ps_catalog_entry *catalogs;
    size_t n_catalogs, cap_catalogs;
    ps_summary *rows;           /* in memory: every row (after ps_run_rank worst first); spilled: staging */
    size_t n_rows, cap_rows;
    ps_run_store *store;
    struct ps_family_result *families; /* boundary and yield studies, catalog order */
    size_t n_families, cap_families;
    size_t per_verdict[PS_VERDICT_COUNT];
    size_t per_bracket[PS_BRACKET_COUNT + 1]; /* rows by ps_summary_bracket (the last: none) */
    size_t id_len_max;          /* longest plant id among the rows */
    ps_batch_counts counts;
    ps_run_meta meta;
} ps_run;

void ps_run_init(ps_run *r, const ps_screen_opts *opt);

/* The bracket of a row of a run made with opt: ruled out for a plant the
 * floors rule out (searched or not), the search's outcome for a plant it
 * took, PS_BRACKET_NONE without --certify or for a plant not selected. */
ps_bracket ps_summary_bracket(const ps_summary *s, const ps_screen_opts *opt);
void ps_run_free(ps_run *r);
/* Add a catalog before reading it (fdiag NULL); summaries that follow belong
 * to it. ps_run_catalog_failed marks the last one as not read to the end. */
ps_status ps_run_add_catalog(ps_run *r, const char *file, const ps_diag *fdiag);
ps_status ps_run_catalog_failed(ps_run *r, const ps_diag *fdiag);
/* The last catalog's title (NULL or "" for none) and the digest of its bytes
 * (ps_sha256_file; NULL path: not taken). PS_ERR_NOMEM or PS_OK. */
ps_status ps_run_catalog_title(ps_run *r, const char *title);
/* Take the SHA-256 of every catalog file of the run; a file that cannot be
 * read again keeps an empty digest. */
void ps_run_digest_catalogs(ps_run *r);
/* Record the command line (argv[0..argc), quoted; argv[0] written as
 * "plantsieve", so that no report names the directory the program is in) and the date from the
 * environment's SOURCE_DATE_EPOCH (a decimal count of seconds since 1970;
 * anything else leaves the date empty and returns false with why set). */
ps_status ps_run_set_meta(ps_run *r, int argc, char *const argv[]);
bool ps_run_meta_date(ps_run_meta *m, const char *epoch, const char **why);
/* Room for the next summary (NULL on no memory); ps_run_commit keeps it. */
ps_summary *ps_run_next(ps_run *r);
void ps_run_commit(ps_run *r);
/* Keep a copy of s as the next row (order and file_index are the
 * caller's: order is the entry's place in the whole run, ps_outcome.seq,
 * which ranks ties). May move the run to its file. */
ps_status ps_run_put(ps_run *r, ps_summary *s);
/* Row i (ranked after ps_run_rank). In a spilled run the pointer is valid
 * for the next PS_RUN_RING - 1 calls of the same thread. Once ranked, a run
 * may be read by several threads at once: each thread but the one that
 * ranked it brackets its reading with ps_run_reader_begin and
 * ps_run_reader_end (its own read-ahead window and rows). */
const ps_summary *ps_run_row(const ps_run *r, size_t i);
/* ps_run_put for a keep_top run past memory_rows: s may have its detail
 * deferred, and p is the plant as it was before its root analysis (NULL:
 * not deferred); a row the listing may print keeps a copy of p, and
 * ps_run_rank computes its detail from it, as ps_screen_assess would have. */
ps_status ps_run_put_deferred(ps_run *r, ps_summary *s, const ps_plant *p);
/* Whether put should defer the detail of the next rows: a keep_top run
 * that has left memory (only the rows the listing can print are kept). */
bool ps_run_defers(const ps_run *r);
/* PS_OK or PS_ERR_NOMEM. */
ps_status ps_run_reader_begin(const ps_run *r);
/* Whether a read of this thread failed (its rows then say so); after the
 * threads are joined, ps_run_mark_failed(r) records it for ps_run_failed. */
bool ps_run_reader_end(void);
void ps_run_mark_failed(ps_run *r);
/* The verdict of row i (ranked), without reading the row back. */
ps_verdict ps_run_verdict(const ps_run *r, size_t i);
/* A spill file could not be written or read: the reports are incomplete. */
bool ps_run_failed(const ps_run *r);
/* A summary as the run's file keeps it: texts and lists cut to their length
 * (out has room for sizeof *s; returns the length), and back (false when in
 * is not such a record). The record holds the summary's two pointers (worst,
 * fl.limiting) as they are: valid only in the process that packed it. */
size_t ps_summary_pack(const ps_summary *s, unsigned char *out);
bool ps_summary_unpack(const unsigned char *in, size_t len, ps_summary *s);

/* Rank: not stabilizable first, then severity descending, ties by catalog
 * order; then needs-bandwidth, then input errors, each in catalog order. Deterministic.
 * A keep_top run then computes the deferred detail of the rows it kept. */
void ps_run_rank(ps_run *r);

#endif

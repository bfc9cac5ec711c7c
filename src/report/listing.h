/* listing.h - the pole/zero listing of a batch: a terminal text block per
 * plant, or one JSON document (schema in reports/schema/). */
#ifndef PS_LISTING_H
#define PS_LISTING_H

#include <stdbool.h>
#include <stdio.h>

#include "batch/batch.h"
#include "core/diag.h"

/* Version of the JSON document layout; bumped when a key changes meaning. */
#define PS_JSON_SCHEMA_VERSION 1

typedef struct ps_listing ps_listing;

/* Listing written to out (not owned) when finished; text blocks are written
 * as outcomes arrive, JSON at the end. NULL on no memory. */
ps_listing *ps_listing_new(FILE *out, bool json);
void ps_listing_free(ps_listing *l);

/* Record one outcome (use as the batch's ps_outcome_fn with l as ctx). */
void ps_listing_add(void *l, const ps_outcome *o);

/* Record a catalog and how reading it ended (fdiag NULL when it was read to the end). */
void ps_listing_catalog(ps_listing *l, const char *file, const ps_diag *fdiag);

/* Write what is still pending (the JSON document, the text summary).
 * PS_ERR_IO when writing failed. */
ps_status ps_listing_finish(ps_listing *l, const ps_batch_counts *c);

#endif

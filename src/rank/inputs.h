/* inputs.h - what the ranking commands (coverage, propose) read: the
 * taxonomy's labels, and counts from counts tables, postings files
 * (counted here, cleaned by the normaliser with the labels protected)
 * or a store.
 *
 * A rank_inputs owns everything it loads; inputs_free releases it (and
 * accepts a zeroed or half-loaded one). */
#ifndef TM_INPUTS_H
#define TM_INPUTS_H

#include "core/buf.h"
#include "rank/labels.h"
#include "norm/lexicon.h"
#include "norm/norm.h"
#include "norm/setup.h"
#include "count/store.h"
#include "count/tally.h"

typedef struct rank_inputs {
	lexicon *lx;
	normaliser *nm;
	labelset ls;
	tally_mem m;
} rank_inputs;

typedef struct rank_sources {
	const setup_opts *setup;  /* the lexicons, and the labels file (setup->labels) */
	const char *store_url;    /* a store whose counts are read, or NULL */
	const char *prefix;       /* its key prefix, or NULL for the default */
	char *const *paths;       /* counts tables or postings files, in order */
	int npaths;
	size_t memo_bytes;        /* the normaliser's memory of recent titles */
} rank_sources;

/* Loads the labels, then the store's counts, then each path (a counts
 * table when its header says so, else postings).  Malformed posting rows
 * are skipped with a message on warn (the first five, then their number).
 * Returns 0, or -1 with a message in err (in -1 cases in is left for
 * inputs_free). */
int inputs_load(rank_inputs *in, const rank_sources *src, FILE *warn, tm_buf *err);

void inputs_free(rank_inputs *in);

#endif

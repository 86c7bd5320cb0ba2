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
#include "count/series.h"
#include "count/store.h"
#include "count/tally.h"

typedef struct rank_inputs {
	lexicon *lx;
	normaliser *nm;
	labelset ls;
	tally_mem m;        /* the counts of every period read (in the window) */
	tally_series s;     /* by period (src->period); with PERIOD_NONE its one
			     * engine has moved to m and it holds only what the
			     * window left out */
	labels_idmap map;
} rank_inputs;

typedef struct rank_sources {
	const setup_opts *setup;  /* the lexicons, and the labels file (setup->labels) */
	const char *store_url;    /* a store whose counts are read, or NULL */
	const char *prefix;       /* its key prefix, or NULL for the default */
	char *const *paths;       /* counts tables or postings files, in order;
				   * "-" (once) is standard input */
	int npaths;
	size_t memo_bytes;        /* the normaliser's memory of recent titles */
	int ids_local;            /* match the labels' ids on local names */
	const char *id_map;       /* a map from codes to concepts, or NULL */
	int period;               /* PERIOD_NONE (0): all periods summed into m;
				   * else also kept by period in s (series.h) */
	int windowed;             /* only the periods wholly within from..to */
	long from, to;
} rank_sources;

/* Loads the labels, the store's counts, then each path (a counts table
 * when its header says so, else postings), the labels under the
 * postings' codes when src asks for it (labels_idmap: with ids_local
 * they are read after the counts, whose codes they are matched with).
 * Standard input, whose header must be read before its reader starts,
 * is first copied to an unlinked temporary file when it is a pipe (a
 * file given with '<' is read in place).  Malformed posting rows are
 * skipped with a message on warn (the first five, then their number).
 * Returns 0, or -1 with a message in err (in -1 cases in is left for
 * inputs_free). */
int inputs_load(rank_inputs *in, const rank_sources *src, FILE *warn, tm_buf *err);

void inputs_free(rank_inputs *in);

/* Do the taxonomy's ids meet the postings' codes?  When fewer than
 * INPUTS_IDS_MIN_SHARE of the occupations in the counts have a label,
 * they most likely do not (IRIs against short codes): the commands warn,
 * and stop under --strict. */
#define INPUTS_IDS_MIN_SHARE 0.5
/* The unmatched codes a warning names. */
#define INPUTS_IDS_SHOWN 3

/* What the loaded counts hold, in one pass over them. */
typedef struct inputs_survey {
	uint64_t occupations;   /* distinct occupations in the counts */
	uint64_t labelled;      /* of them, those with at least one label */
	const char *unmatched[INPUTS_IDS_SHOWN]; /* the first without a label,
				 * in byte order; pointers into the counts */
	size_t unmatched_len[INPUTS_IDS_SHOWN];
	int nunmatched;
	/* with a filter (occ and/or lang): postings seen of the occupation
	 * (any language), of the language (any occupation), of both */
	int occ_seen, lang_seen, both_seen;
	/* postings in the filter's view, each posting once whatever its
	 * occupations (a coverage total counts posting-occupation pairs) */
	uint64_t distinct;
} inputs_survey;

/* Surveys in's counts, for occ and lang (either may be NULL).  Returns
 * 0, or -1 when memory ran out. */
int inputs_survey_run(rank_inputs *in, const char *occ, const char *lang, inputs_survey *s);
/* The same of counts m under labels ls (one period's, say). */
int inputs_survey_counts(const tally_mem *m, const labelset *ls, const char *occ,
			 const char *lang, inputs_survey *s);

/* True when the survey says the ids most likely do not match. */
static inline int inputs_ids_doubtful(const inputs_survey *s)
{
	return s->occupations && (double)s->labelled < INPUTS_IDS_MIN_SHARE * (double)s->occupations;
}

#endif

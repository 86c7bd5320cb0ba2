/* code.h - coding the postings that arrived without an occupation by
 * their best match (titlemill tally --code-missing).
 *
 * While a load is read, each posting without occupations is held (a copy
 * of its id, date, language, title, file and line) instead of counted.
 * Once every coded posting is counted, an index is built from the labels
 * and those counts (match.h), and each held posting whose best candidate
 * scores at least min_score is counted under that occupation; the others
 * are counted as they came, without one.  The numbers of both are kept
 * so that the command reports them beside the coded postings: a posting
 * coded by a match is never passed off as one coded at the source.
 *
 * A match_coder owns its copies; mc_free releases them. */
#ifndef TM_CODE_H
#define TM_CODE_H

#include <stdint.h>

#include "core/buf.h"
#include "count/store.h"
#include "count/tally.h"
#include "match/match.h" /* MATCH_MIN_SCORE_CODE */
#include "io/postings.h"
#include "norm/norm.h"
#include "rank/labels.h"

typedef struct mc_held {
	size_t id, date, title, file;   /* offsets in the arena */
	uint32_t idlen, datelen, titlelen, filelen;
	char lang[4];
	int has_id;
	long line;
} mc_held;

typedef struct match_coder {
	mc_held *v;
	size_t n, cap;
	tm_buf arena;
	uint64_t coded, uncoded;   /* after mc_code: coded by a match, left without */
} match_coder;

void mc_init(match_coder *c);
void mc_free(match_coder *c);

/* Holds p, read from file name: TM_OK or TM_ENOMEM. */
int mc_hold(match_coder *c, const posting *p, const char *name);

/* Builds the index from ls and m (the counts so far), then counts each
 * held posting through st: under its best match when it scores at least
 * min_score, else without an occupation.  nm cleans the titles.  TM_OK,
 * or a negative kind with a message in err. */
int mc_code(match_coder *c, const labelset *ls, tally_mem *m, normaliser *nm,
	    double min_score, store *st, tm_buf *err);

#endif

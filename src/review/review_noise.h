/* review_noise.h - what the curators' rejections as noise have in common:
 * the words of the rejected titles that no label holds, as candidates
 * for the normaliser's lexicons.  Informs the curator, who decides what
 * goes into a lexicon; nothing is written here.
 *
 * Returns TM_OK, TM_ENOMEM, or what the callback returned (err.h). */
#ifndef TM_REVIEW_NOISE_H
#define TM_REVIEW_NOISE_H

#include <stdint.h>

#include "rank/labels.h"
#include "review/review.h"

typedef struct rq_noise_word {
	const char *lang;  /* the primary language subtag, as lexicons write it */
	const char *word;  /* a word of the match key (lexicons match on it) */
	uint64_t items;    /* rejections as noise whose title holds it */
	uint64_t of;       /* rejections as noise in that language */
} rq_noise_word;

/* For each word of the match key (the evidence's "key", else the label)
 * of the items whose standing decision is a rejection as noise: how many
 * such items hold it, when no label of the taxonomy ls (NULL: none) and
 * no accepted suggestion of q holds that word in any language, and at
 * least floor items do.  cb gets the words by items (most first), then
 * language and word (bytes); a non-zero return stops and is returned. */
int rq_noise_words(const rq_queue *q, const labelset *ls, uint64_t floor,
		   int (*cb)(const rq_noise_word *w, void *arg), void *arg);

#endif

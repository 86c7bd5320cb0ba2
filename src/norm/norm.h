/* norm.h - the title normaliser: raw title in, clean title, match key
 * and facets out.
 *
 * A normaliser borrows a lexicon (which must outlive it) and owns the
 * buffers it reuses from line to line; the hot path allocates nothing
 * once they have grown.  Results point into the normaliser and are valid
 * until the next norm_title call.  One normaliser per thread. */
#ifndef TM_NORM_H
#define TM_NORM_H

#include <stddef.h>
#include <stdint.h>

#include "norm/lexicon.h"
#include "norm/title.h" /* enum nf_kind, nf_kind_name */

typedef struct nf_piece {
	uint8_t kind;      /* enum nf_kind */
	const char *value; /* seniority step, schedule value, country; or NULL */
	const char *text;  /* the removed text as written (prepared form) */
	size_t len;
} nf_piece;

typedef struct norm_result {
	const char *title; /* lowercase, single spaces; not NUL-terminated */
	size_t title_len;
	const char *key;   /* the match key */
	size_t key_len;
	const nf_piece *piece; /* removed pieces, in title order */
	size_t npiece;
	const char *masked; /* the raw title as prepared (NFKC, spaces unified),
			     * e-mail addresses, phone numbers and URLs
			     * replaced by <email>, <phone>, <url>: what may be
			     * kept as an example */
	size_t masked_len;
	int repaired;      /* DEC_* flags of decode.h */
} norm_result;

typedef struct normaliser normaliser;

/* Returns a normaliser over lx, or NULL when memory ran out.  lx is
 * borrowed and must not change while the normaliser lives (it remembers
 * the lexicon's answers for recent words). */
normaliser *norm_new(const lexicon *lx);
void norm_free(normaliser *nm);

/* Normalises raw[0..n) (any bytes: invalid UTF-8 is repaired).  lang is a
 * primary language subtag ("de") enabling that language's ambiguous
 * entries, or NULL.  Returns 0, or -1 when memory ran out. */
int norm_title(normaliser *nm, const char *raw, size_t n, const char *lang,
	       norm_result *res);

/* Remembers the results of up to `bytes` of recent distinct titles
 * (raw bytes, title, key, facets) so a title seen again is not cleaned
 * again: job-posting streams repeat titles heavily.  A title is kept
 * from its second cleaning on (most titles of a stream are seen once:
 * they are not copied in).  0 switches the memory off (the default).
 * Returns 0 or -1 (memory; nothing changed). */
int norm_memo(normaliser *nm, size_t bytes);

/* Titles answered from the memory, and all titles, so far. */
void norm_memo_stats(const normaliser *nm, size_t *hits, size_t *calls);

/* Match key of an already clean text (labels, titles from a counts
 * table): the fold of its words, nothing removed. */
int norm_key_only(normaliser *nm, const char *s, size_t n, norm_result *res);


#endif

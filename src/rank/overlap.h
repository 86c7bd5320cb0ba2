/* overlap.h - occupations the postings cannot tell apart, and
 * occupations whose titles sit nearer another group than their own.
 *
 * Each occupation in each language is a distribution over match keys:
 * p(key) = postings of the occupation with the key / its postings with
 * any non-empty key.  Two distributions are compared by
 *   divergence  the Jensen-Shannon divergence in bits (Lin 1991): 0 for
 *               the same keys in the same proportions, 1 for no key in
 *               common;
 *   shared      the shared mass, sum over keys of min(p, q), in [0, 1].
 *
 * Pairs.  Only occupations sharing a key are compared: an inverted index
 * key -> occupations gives the candidates.  A key held by more than
 * key_cap occupations (a word every trade uses) does not make
 * candidates; it still counts, exactly, in the divergence of every pair
 * found through another key.  So the work of finding pairs is at most
 * key_cap x (occupation, key) rows, linear in the counts whatever they
 * hold; a pair sharing only such keys is not compared (their number is
 * in overlap_stats).  A pair where either side has fewer than
 * min_postings postings is not ranked, and counted.
 *
 * Groups (when a groupmap is given).  A group's pooled distribution in a
 * language sums the counts of its members.  For a group: its postings,
 * members, dispersion (the postings-weighted mean divergence of its
 * members from its pooled distribution) and the nearest other group (by
 * the divergence of the pooled distributions).  For an occupation: the
 * divergence from its own group's pool without itself (so that a big
 * occupation does not make its group look like itself; undefined for
 * the only member with postings), and from the nearest other group's
 * pool.  An occupation (min_postings or more) nearer another group than
 * its own is listed as nearer_other_group, with the titles that pull it
 * there: those whose mass shared with the other group most exceeds the
 * mass shared with its own.
 *
 * Output order (deterministic): pairs by divergence ascending, then
 * occupation, other occupation, language (bytes), the smaller id first
 * in each pair; groups by language, then group; occupations by
 * language, then occupation; nearer_other_group by the margin (own
 * divergence - nearest) descending, then occupation, language.
 *
 * The engine reads the counts and keeps its own copies: an overlap owns
 * all it holds (overlap_free).  It prints nothing: rows go to callbacks;
 * their strings live until the callback returns. */
#ifndef TM_OVERLAP_H
#define TM_OVERLAP_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "count/tally.h"
#include "rank/groups.h"

/* The defaults, one place (README "overlap", titlemill.1). */
#define OVERLAP_MIN_POSTINGS 50 /* postings each side needs to be ranked */
#define OVERLAP_KEY_CAP 1000    /* occupations a key may hold and still make candidates */
#define OVERLAP_TITLES 5        /* titles shown per row */

typedef struct overlap_opts {
	uint64_t min_postings;
	uint64_t key_cap;
	const char *lang;         /* only this language, or NULL */
	const groupmap *groups;   /* NULL or empty: no groups */
} overlap_opts;

typedef struct overlap_stats {
	uint64_t distributions;   /* (occupation, language) with postings */
	uint64_t pairs_compared;  /* pairs whose divergence was computed */
	uint64_t pairs_all;       /* n(n-1)/2 summed over languages */
	uint64_t pairs_small;     /* compared, but a side below min_postings */
	uint64_t keys_capped;     /* keys held by more than key_cap occupations */
	uint64_t ungrouped;       /* distributions whose occupation has no group */
} overlap_stats;

/* A title in a row: its display title and key, its postings in the
 * occupation, and on the other side (the other occupation, or the other
 * group), and, for nearer_other_group, in its own group without it. */
typedef struct overlap_title {
	const char *title, *key;
	size_t tl, kl;
	uint64_t postings, other_postings, own_postings;
} overlap_title;

typedef struct overlap_pair {
	const char *occ, *other;
	size_t ol, otl;
	const char *lang;         /* NUL-terminated */
	double divergence, shared;
	uint64_t postings, other_postings;
	const overlap_title *titles;
	int ntitles;
} overlap_pair;

typedef struct overlap_group {
	const char *group, *nearest;  /* nearest: NULL when no group shares a key */
	size_t gl, nl;
	const char *lang;
	uint64_t postings, members;
	double dispersion, nearest_divergence;
} overlap_group;

typedef struct overlap_occ {
	const char *occ, *group, *nearest; /* group NULL: none; nearest NULL: none */
	size_t ol, gl, nl;
	const char *lang;
	uint64_t postings, nearest_postings; /* its own; the nearest group's */
	int has_own;              /* own_divergence is defined */
	double own_divergence, nearest_divergence;
	int nearer;               /* nearer the other group than its own */
	const overlap_title *titles; /* the titles that pull it there (nearer only) */
	int ntitles;
} overlap_occ;

typedef struct overlap overlap;

/* Builds the distributions from m and compares them.  Returns TM_OK with
 * *ov, or TM_ENOMEM (message in err). */
int overlap_build(overlap **ov, tally_mem *m, const overlap_opts *o, tm_buf *err);

const overlap_stats *overlap_get_stats(const overlap *ov);

/* Handle rows; non-zero stops (and is returned).  The iterators return
 * 0, fn's value, or TM_ENOMEM. */
typedef int (*overlap_pair_fn)(void *ctx, const overlap_pair *p);
typedef int (*overlap_group_fn)(void *ctx, const overlap_group *g);
typedef int (*overlap_occ_fn)(void *ctx, const overlap_occ *o);

/* The ranked pairs with divergence <= max_divergence, at most top
 * (0: all). */
int overlap_pairs(overlap *ov, double max_divergence, uint64_t top, overlap_pair_fn fn, void *ctx);
int overlap_groups(overlap *ov, overlap_group_fn fn, void *ctx);
/* Every occupation (only_nearer 0) or the nearer_other_group ones,
 * ranked as above, at most top (0: all). */
int overlap_occupations(overlap *ov, int only_nearer, uint64_t top, overlap_occ_fn fn, void *ctx);

void overlap_free(overlap *ov);

/* The divergence and shared mass of two distributions given as counts
 * over the same n keys (dense; for tests and small callers). */
void overlap_jsd_dense(const uint64_t *a, const uint64_t *b, size_t n, double *divergence,
		       double *shared);

#endif

/* coverage.h - how much of each occupation's postings its labels match.
 *
 * For each occupation and language in the counts (in the counts' order:
 * occupation, then language, by bytes), a row: the postings, those whose
 * match key is one of its labels' keys (with the Wilson 95 % interval of
 * that share), those matched by a preferred label, its distinct label
 * keys and those never seen, and its biggest unmatched titles.  A last
 * row, occupation and language "*", sums all the rows (its label figures
 * too; no titles).  The engine reads the counts and labels and keeps
 * nothing: each row is handed to a callback, whose strings live until it
 * returns. */
#ifndef TM_COVERAGE_H
#define TM_COVERAGE_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "rank/labels.h"
#include "count/tally.h"

/* The unmatched titles kept per row: the biggest by postings, ties in
 * key order. */
#define COVERAGE_TOP 5

typedef struct coverage_title {
	const char *title, *key;
	size_t tl, kl;
	uint64_t postings;
} coverage_title;

typedef struct coverage_row {
	const char *occ;
	size_t ol;
	const char *lang;          /* NUL-terminated */
	uint64_t postings;         /* of the occupation in the language */
	uint64_t matched;          /* whose key is one of its labels' keys */
	double share, low, high;   /* matched / postings, Wilson 95 % (0 when no postings) */
	uint64_t pref_matched;     /* whose key is a preferred label's */
	double pref_share;
	uint64_t labels, unseen;   /* distinct label keys; those with no postings */
	const coverage_title *top; /* biggest first */
	int ntop;
} coverage_row;

typedef struct coverage_filter {
	const char *occ;           /* only this occupation, or NULL */
	const char *lang;          /* only this language, or NULL */
} coverage_filter;

/* Returns non-zero to stop. */
typedef int (*coverage_fn)(void *ctx, const coverage_row *row);

/* Hands fn each row, then the total.  Returns 0; fn's value when it
 * stopped; -1 when memory ran out. */
int coverage_run(tally_mem *m, const labelset *ls, const coverage_filter *f, coverage_fn fn,
		 void *ctx);

#endif

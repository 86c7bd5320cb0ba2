/* labkeys.h - the labels' keys grouped by occupation and language, each
 * group's keys in byte order: what the ranking engines walk beside the
 * counts' triples (which tm_each_triple hands out in the same order
 * within an occupation and language), so that "is this title a label of
 * its occupation?" is a step of a merge, not a hash lookup.
 *
 * One entry per distinct (occupation, language, key), naming the first
 * label with that key in the labels file (as labels_find does).
 * Ownership: a labkeys owns its array; it points into nothing, and is
 * valid for the labelset it was built from. */
#ifndef TM_LABKEYS_H
#define TM_LABKEYS_H

#include <stddef.h>
#include <stdint.h>

#include "rank/labels.h"

typedef struct labkey {
	uint32_t lab;  /* index in the labelset: the first label with this key */
	uint32_t pref; /* 1 when some label with this key is preferred */
} labkey;

typedef struct labkeys {
	labkey *v;     /* by occupation, language, key (bytes; shorter first) */
	size_t n;
} labkeys;

/* Builds lk from ls.  0, or -1 when memory ran out (lk is then empty). */
int labkeys_build(labkeys *lk, const labelset *ls);

/* The entries of occ and lang: [*lo, *hi), empty when it has none.
 * Binary search: O(log n). */
void labkeys_group(const labkeys *lk, const labelset *ls, const char *occ, size_t ol,
		   const char *lang, size_t *lo, size_t *hi);

/* Byte order of two strings, the shorter first on a common prefix:
 * < 0, 0, > 0. */
int labkeys_cmp(const char *a, size_t an, const char *b, size_t bn);

void labkeys_free(labkeys *lk);

#endif

/* pass_place.h - the location slots the place and employer rules share,
 * included by their two files only: pass_place.c (places in location
 * slots, trailing places) and pass_employer.c (firms, and the places
 * written beside a removed firm). */
#ifndef TM_PASS_PLACE_H
#define TM_PASS_PLACE_H

#include <stddef.h>

#include "norm/pass.h"

/* Is the word of unit k capitalised or in capitals? */
static inline int cap_word(const tm_title *ti, size_t k)
{
	return (U(ti, k)->flags & (TF_CAP | TF_ALLCAPS)) != 0;
}

/* Is the word of unit k a Roman numeral in capitals of at most max
 * letters (II, VIII): a rung of a career ladder ("Nurse II") or a
 * city's district ("Budapest VIII.")? */
static inline int roman_caps(const tm_title *ti, size_t k, uint32_t max)
{
	const tm_tok *t = U(ti, k);
	return t->kind == TK_WORD && (t->flags & TF_ALLCAPS) && t->len <= max &&
	       tok_only(ti, t, "IVX");
}

/* A place starting at unit k: 1 with its length in units, whether it
 * needs a strong slot (an ordinary word too), whether it is a location by
 * itself (a case form: Helsingissä) and its country (NULL when none);
 * else 0 (pass_place.c). */
int place_info(tm_title *ti, size_t k, size_t *len, int *strong, int *itself,
	       const char **cc);

/* place_info without *itself; most units are no place, answered without
 * the call. */
static inline int place_at(tm_title *ti, size_t k, size_t *len, int *strong,
			   const char **cc)
{
	int itself;
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << LC_PLACE)))
		return 0;
	return place_info(ti, k, len, strong, &itself, cc);
}

/* Is the place of len units at unit k an acronym of a mixed-case line
 * (caps: the line is in capitals) that the lexicon writes only in lower
 * case, so no place: (OSS) is a qualification, not Oss (pass_place.c)? */
int place_acronym(tm_title *ti, size_t k, size_t len, int caps);

/* From unit k, a place of plen units, the end (exclusive) of its run of
 * places joined by connectors or slashes (Köln/Bonn), with a region word,
 * a postcode or a district after it; allow_strong admits places that are
 * ordinary words too (pass_place.c). */
size_t place_run(tm_title *ti, size_t k, size_t plen, int allow_strong);

/* Removes units [k, e) of a location slot: places as locations (their
 * facet), the rest as slot words.  Returns 0, or -1 when memory ran out
 * (pass_place.c). */
int place_take(tm_title *ti, size_t k, size_t e);

/* Removes a place written right before or after a firm's name that the
 * employer rule removed (pass_employer.c).  Returns 0 or -1. */
int firm_places(tm_title *ti);

#endif

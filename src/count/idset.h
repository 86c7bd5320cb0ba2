/* idset.h - a set of byte strings (posting ids), built for hundreds of
 * millions of members.
 *
 * Open addressing, at most half full, 8-byte slots: the upper 32 bits of
 * the member's 64-bit hash (its fingerprint) beside its index + 1 (0: an
 * empty slot); the home slot comes from the fingerprint.  Eight slots
 * share a cache line, so a lookup of an id not in the set (most ids of a
 * load) reads one line and no string; a member's bytes are read only
 * when its fingerprint matches (the bits of it the home does not fix:
 * 32 - log2(slots), 11 at two million slots).  The slots lie in 2 MiB
 * pages where the system offers them (one TLB entry per 2 MiB).  The
 * members' bytes lie end to end in one arena, their starts in one array:
 * nothing is allocated per member; a member costs 16 to 32 bytes of
 * slots, 8 of offset and its bytes.  Growing reads the old slots in order
 * and files each from its fingerprint (no member read, no hash), at most
 * 2^32 slots.
 *
 * Ownership: the set owns its arrays; ids_free releases them. */
#ifndef TM_IDSET_H
#define TM_IDSET_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

typedef struct idset {
	uint64_t *slot;    /* fingerprint << 32 | (index + 1); 0 empty */
	size_t nslot;      /* a power of two, or 0 */
	uint64_t *start;   /* member i is arena[start[i] .. start[i + 1]) */
	size_t n, cap;     /* members; room in start (n + 1 used) */
	tm_buf arena;
} idset;

/* The hash the set files a member under. */
uint64_t ids_hash(const char *s, size_t n);

/* Adds s[0..n) (h = ids_hash(s, n)).  Returns 1 when it is new, 0 when
 * it was there, TM_ENOMEM when memory ran out (the set unchanged). */
int ids_add_h(idset *t, const char *s, size_t n, uint64_t h);

static inline int ids_add(idset *t, const char *s, size_t n)
{
	return ids_add_h(t, s, n, ids_hash(s, n));
}

/* The home slot of a slot's fingerprint (its upper half): the top bits
 * of the fingerprint's product with 2^32 / phi.  In a table twice the
 * size slot j's home is 2j or 2j + 1, so growing reads the old slots in
 * order and writes the new ones nearly in order. */
static inline size_t ids_home(uint64_t fp, size_t nslot)
{
	uint32_t f = (uint32_t)(fp >> 32) * 0x9E3779B9u;
	return (size_t)(f >> (32 - __builtin_ctzll((unsigned long long)nslot)));
}

/* Asks the processor for the home slot of a member of hash h, so that a
 * caller with several lookups to make has their cache misses overlap.
 * Changes nothing. */
static inline void ids_prefetch(const idset *t, uint64_t h)
{
	if (t->nslot)
		__builtin_prefetch(&t->slot[ids_home(h, t->nslot)]);
}

/* 1 when s[0..n) is a member, else 0. */
int ids_has(const idset *t, const char *s, size_t n);

/* Member i (0 <= i < t->n) and its length. */
static inline const char *ids_member(const idset *t, size_t i, size_t *n)
{
	*n = (size_t)(t->start[i + 1] - t->start[i]);
	return t->arena.data + t->start[i];
}

/* Bytes held (slots, starts, arena), for measurements. */
size_t ids_bytes(const idset *t);

void ids_free(idset *t);

#endif

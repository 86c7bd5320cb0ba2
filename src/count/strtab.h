/* strtab.h - a hash table from byte strings to 64-bit counts, with the
 * strings kept in one arena.
 *
 * Built for millions of keys: an entry costs 16 bytes, and 8 in the slot
 * array (at a load of at most 3/4), plus its string bytes; nothing is
 * allocated per key.  A slot holds a fingerprint of its key's hash (the
 * entry keeps no hash: the fingerprint serves), so that a lookup reads
 * one cache line of slots and, nearly always, the entry of the key
 * itself only.  The slots, the entries and the arena grow by half when
 * full (st_grow), not twice.  Keys are any bytes (the engine joins fields
 * with 0x1F).
 * Entry indices are stable while no entry is removed (none ever is);
 * string pointers move when the arena grows: take them afresh after an
 * insert. */
#ifndef TM_STRTAB_H
#define TM_STRTAB_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

typedef struct st_entry {
	uint64_t count;
	uint32_t off, len; /* the key in the arena */
} st_entry;

typedef struct strtab {
	st_entry *ent;     /* entries in insertion order */
	size_t n, cap;
	uint64_t *slot;    /* open addressing: the hash's low 32 bits, then
			    * the entry index + 1; 0 empty */
	size_t nslot;      /* at most 2^32; kept at most 3/4 full */
	tm_buf arena;
} strtab;

/* Adds by to the count of key (inserting it at 0 first); *idx receives
 * its entry index.  Returns 1 when the key is new, 0 when it was there,
 * -1 when memory ran out (table unchanged). */
int st_add(strtab *t, const char *key, size_t n, uint64_t by, size_t *idx);

/* Index of key, or -1. */
long st_find(const strtab *t, const char *key, size_t n);

/* A key given as its fields f[0..k) (k <= ST_FIELDS_MAX), to be joined
 * with sep, and the hash the caller files it under: the joined key is
 * never built to be looked up, only its bytes copied into the arena when
 * it is new.  A table is used either with st_add and st_find (the hash
 * of the whole key) or with these two (the caller's hash), never both. */
#define ST_FIELDS_MAX 4
typedef struct st_fields {
	const char *f[ST_FIELDS_MAX];
	size_t n[ST_FIELDS_MAX];
	int k;
	char sep;
	uint64_t h;
} st_fields;

/* As st_add and st_find, for a key given as fields. */
int st_add_fields(strtab *t, const st_fields *key, uint64_t by, size_t *idx);
long st_find_fields(const strtab *t, const st_fields *key);

/* The home slot of a fingerprint (a slot's upper half, the hash's low
 * 32 bits shifted up): the fingerprint's product with 2^32 / phi (which
 * spreads the low-entropy bits of similar keys), mapped onto the slots
 * by its share of 2^32, so that the home rises with that product.  The
 * slots need not be a power of two (they grow by half), and growing
 * reads the old slots in order, never an entry, and writes the new ones
 * nearly in order. */
static inline size_t st_home_fp(uint64_t slot_fp, size_t nslot)
{
	uint32_t f = (uint32_t)(slot_fp >> 32) * 0x9E3779B9u;
	return (size_t)(((uint64_t)f * nslot) >> 32);
}

/* The slot a probe visits after j. */
static inline size_t st_next(size_t j, size_t nslot)
{
	return j + 1 == nslot ? 0 : j + 1;
}

/* Asks the processor for the home slot of a key filed under h (as
 * st_fields.h), so that a caller with several keys to look up has their
 * cache misses overlap.  Changes nothing. */
static inline void st_prefetch(const strtab *t, uint64_t h)
{
	if (t->nslot)
		__builtin_prefetch(&t->slot[st_home_fp((uint64_t)(uint32_t)h << 32, t->nslot)]);
}

static inline const char *st_key(const strtab *t, size_t i, size_t *n)
{
	*n = t->ent[i].len;
	return t->arena.data + t->ent[i].off;
}

/* As tm_grow (core/buf.h), growing by half rather than doubling: a big
 * array of n elements then holds at most n / 2 unused, not n.  Many
 * small steps cost little: the system moves big blocks by remapping
 * their pages. */
void *st_grow(void *p, size_t *cap, size_t need, size_t size, size_t first);

/* Makes room for extra more bytes in an arena, growing as st_grow.
 * 0 or TM_ENOMEM (b then fails as buf_reserve leaves it). */
int st_arena_grow(tm_buf *b, size_t extra);
static inline int st_arena_reserve(tm_buf *b, size_t extra)
{
	/* a failed buffer has cap == len: it always takes the slow path */
	if (b->data && extra <= b->cap - b->len && !b->max)
		return 0;
	return st_arena_grow(b, extra);
}

void st_free(strtab *t);

/* Bytes held (slots, entries, arena), for measurements. */
size_t st_bytes(const strtab *t);

#endif

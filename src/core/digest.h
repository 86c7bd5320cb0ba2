/* digest.h - a fast 64-bit hash of bytes, and a 128-bit digest made of
 * two of them, for telling files and cache images apart.  Not a
 * cryptographic hash: it detects change and damage, not an adversary
 * (the lexicon cache is trusted only in a folder of the user's own). */
#ifndef TM_DIGEST_H
#define TM_DIGEST_H

#include <stddef.h>
#include <stdint.h>

/* The hash of p[0..n) under a seed; the same on every machine. */
uint64_t dg_hash(const void *p, size_t n, uint64_t seed);

/* FNV-1a (64 bits) with its high bits folded into the low ones.  Its
 * values are kept by the project's files and stores: a suggestion's id
 * (propose.c), which three examples a count keeps (the smallest hashes:
 * tally_mem.c, and a store's examples carry them), a store's shards and
 * chunk digests (count/chunk.h).  So it never changes, whatever hash the
 * normaliser or the tables use for themselves; test_chunk.c pins its
 * values. */
uint64_t dg_fnv(const void *p, size_t n);

/* A running digest of a sequence of byte strings: each added string is
 * hashed with its length, so that ("ab","c") and ("a","bc") differ. */
typedef struct dg_state {
	uint64_t a, b;
} dg_state;

void dg_init(dg_state *d);
void dg_add(dg_state *d, const void *p, size_t n);
/* The digest so far, 16 bytes. */
void dg_final(const dg_state *d, unsigned char out[16]);

#endif

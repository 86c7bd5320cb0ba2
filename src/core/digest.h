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

/* chunk.h - the chunks of a load: their digest and their byte format,
 * shared by every counting backend's loader (store.c) and by the Redis
 * store's claims, applies and journals (store_redis*.c).
 *
 * A load hands a backend its postings in chunks (store_set_chunk
 * postings, and the rest at the end of each input).  A chunk is known by
 * its digest: the postings as read (id, language, raw title, date,
 * occupations) and everything before it in its input, so the same input
 * loaded again -- a rerun after a kill, a reload -- gives the same
 * digests; the kind of period the load counts by is mixed in, so the
 * same input loaded by another kind is another load.  Within one run the k-th chunk whose digest an earlier chunk
 * of the run had (an input named twice, two identical files) gets the
 * digest mixed with k (chunk_run_digest), so identical inputs of one run
 * are distinct chunks, as in memory, and the same run again gives the
 * same digests.
 *
 * The byte format: a chunk's postings, after normalising, one record
 * after another, every length a uint32_t in the machine's byte order:
 *   len id, has-id byte (0 or 1), len lang, len key, len title,
 *   len example, len period (its label, core/period.h: shorter than
 *   PERIOD_MAX; empty for the undated), the number of occupations n (at
 *   most PR_MAXOCC), then n times len occupation.
 * A journal written in this format by a machine of another byte order is
 * refused by its header (store_redis_chunk.c), not by chunk_next. */
#ifndef TM_CHUNK_H
#define TM_CHUNK_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "core/period.h"
#include "io/postings.h"
#include "count/strtab.h"
#include "count/tally.h"

/* ---- the store's hash ----
 * What the digests are made of, and what spreads the Redis store's posting
 * ids and key totals over its shards (store_redis_apply.c): which shard
 * an id was claimed in by an earlier load, and the digests of the chunks
 * a store's ledgers and journals name, are part of what the store holds,
 * so these two functions are the store's own and never change, whatever
 * hash the normaliser or the memory engine use (the unit tests pin their
 * values).  chunk_hash is dg_fnv (core/digest.h), whose values the
 * project keeps;
 * chunk_mix mixes a value into a running hash. */
uint64_t chunk_hash(const char *s, size_t n);

static inline uint64_t chunk_mix(uint64_t h, uint64_t v)
{
	h ^= v + 0x9E3779B97F4A7C15ULL + (h << 6) + (h >> 2);
	return h * 0xFF51AFD7ED558CCDULL;
}

/* ---- the digest ---- */

/* The digest of an input before its first posting, in a load that
 * counts by period kind (core/period.h; PERIOD_NONE mixes nothing in, so
 * a load without periods keeps the digests it always had). */
void chunk_digest_start(uint64_t dg[2], int kind);
/* Mixes one posting, as read, into dg. */
void chunk_digest_posting(uint64_t dg[2], const posting *p);
/* Moves dg on past a committed chunk (the next chunk's digest starts
 * from it). */
void chunk_digest_next(uint64_t dg[2]);

/* The digests committed in one run: digest -> times seen. */
typedef struct chunk_run {
	strtab seen;
} chunk_run;

/* The digest to commit dg under in this run (see above) in out.
 * Returns 0, or -1 when memory ran out. */
int chunk_run_digest(chunk_run *r, const uint64_t dg[2], uint64_t out[2]);
void chunk_run_free(chunk_run *r);

/* 32 lower-case hex digits and a NUL; and back: 0, or -1 when s is not
 * 32 lower-case hex digits. */
void chunk_hex(const uint64_t dg[2], char out[33]);
int chunk_unhex(const char *s, size_t n, uint64_t dg[2]);

/* ---- the byte format ---- */

/* Appends p's record to b, counted in period label[0..n) (n <
 * PERIOD_MAX).  Returns 0, or -1 when memory ran out. */
int chunk_put(tm_buf *b, const tally_posting *p, const char *label, size_t n);

/* One record read back: rec.p points into the chunk's bytes (lang into
 * rec.lang: its first three bytes, as the engines keep it), rec.p.id is
 * NULL when the posting has none, rec.p.date is NULL (the period says
 * where it counts). */
typedef struct chunk_rec {
	tally_posting p;
	const char *period;  /* its period's label, periodlen bytes */
	size_t periodlen;
	char lang[4];
	const char *occ[PR_MAXOCC];
	size_t occlen[PR_MAXOCC];
} chunk_rec;

/* Reads the record at *pos (before end) into rec and moves *pos past it.
 * Returns 1, 0 at end, or -1 when the bytes are not a record (a length
 * past the end, a has-id byte not 0 or 1, a period of PERIOD_MAX bytes
 * or more, more than PR_MAXOCC occupations). */
int chunk_next(const char **pos, const char *end, chunk_rec *rec);

/* 1 when b..b+n is a whole number of well-formed records, else 0. */
int chunk_valid(const char *b, size_t n);

/* A length-framed string (the format's framing, also used for script
 * arguments being built): put appends it, get reads the one at *pos
 * without checks (for buffers this process wrote). */
int chunk_put_str(tm_buf *b, const char *s, size_t n);
const char *chunk_get_str(const char **pos, size_t *n);

#endif

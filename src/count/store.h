/* store.h - the counting backend: one interface (a struct of function
 * pointers) that every place counts can live implements -- the memory
 * engine (store_mem_open, tally_mem.c) and Redis, one server or a Redis
 * Cluster (store_open, store_redis*.c).  The same suite runs against
 * each (tests/unit/count/test_backend.c).
 *
 * A load hands the backend its postings with store_feed, input by input,
 * and store_input_end after each input; store_feed cuts them into chunks
 * (chunk.h) for a backend that commits in chunks (st->chunk > 0).  A
 * chunking backend applies a chunk atomically and remembers its digest,
 * so a chunk seen before (the same file loaded twice, or a load killed
 * and run again) changes nothing.  Then finish, once; dump reads what
 * the backend holds back into a memory engine (the common currency:
 * counts tables are written from one).
 *
 * Errors: functions return 0 or -1 and leave a message in st->err; a
 * failed backend stays usable only for close.  Ownership: the caller
 * owns the backend and closes it with store_close; a memory backend
 * borrows the tally_mem it counts into.
 *
 * A posting's date travels in its tally_posting: the backend counts it
 * in its period.  A chunk handed to commit is the backend's to keep until finish, so a backend may keep
 * chunks in flight, and parallel normalisers hand postings to one
 * backend in their input order. */
#ifndef TM_STORE_H
#define TM_STORE_H

#include <stdint.h>

#include "core/buf.h"
#include "count/chunk.h"
#include "io/postings.h"
#include "count/series.h"
#include "count/tally.h"

typedef struct store store;

typedef struct store_ops {
	/* Counts one posting, or buffers it in the current chunk (copied). */
	int (*add)(store *st, const tally_posting *p);
	/* Applies the buffered chunk under its digest (chunking backends
	 * only): st->applied or st->skipped (the backend had it) goes up. */
	int (*commit)(store *st, const uint64_t digest[2]);
	/* Ends a load (called once, after the last input).  Redis: finishes
	 * the chunks that loads left unfinished (cut off between claiming
	 * their ids and applying their last share) from what the store
	 * journalled of them: st->settled of them, st->settled_postings
	 * postings counted now. */
	int (*finish)(store *st);
	/* Adds everything the backend holds to s, period by period
	 * (series_at: s's kind and window decide where each goes);
	 * st->unfinished counts the chunks left unfinished (their counts are
	 * not all in).  A memory backend dumped into the series it counts
	 * into changes nothing. */
	int (*dump)(store *st, tally_series *s);
	void (*close)(store *st);

} store_ops;

struct store {
	const store_ops *ops;
	tm_buf err;
	uint64_t counted, republished;  /* postings: counted, their id seen before */
	uint64_t applied, skipped;      /* chunks: applied, already in the backend */
	uint64_t settled, settled_postings, unfinished; /* chunks, postings, chunks */
	uint64_t undated;  /* postings counted without a date by a load by
			    * period (Redis: of the chunks applied; the memory
			    * backend's series counts its own) */
	/* the loader's state (store_feed): postings per chunk (0: the
	 * backend does not chunk), postings in the current chunk, its
	 * digest so far, the digests of this run */
	long chunk, inchunk;
	uint64_t dg[2];
	chunk_run run;
	int period;  /* the load's kind of period (store_conf.period; 0:
		      * none), mixed into every digest (chunk_digest_start):
		      * the same input loaded by another kind is another load */
};

/* The longest key prefix, and its characters: letters, digits and
 * . _ : - (no glob characters for SCAN MATCH, no braces that would change
 * a key's Redis Cluster hash tag, nothing cut short). */
#define STORE_PREFIX_MAX 64
/* The key prefix when none is given. */
#define STORE_PREFIX_DEFAULT "titlemill"
/* Reconnect attempts after a lost connection, and the connect and reply
 * timeout in milliseconds, when the caller does not say. */
#define STORE_RETRIES_DEFAULT 5
#define STORE_TIMEOUT_MS_DEFAULT 5000
/* The settings of a store with the given prefix (NULL: the default) and
 * everything else by default. */
#define STORE_CONF_INIT(prefix) {(prefix), STORE_RETRIES_DEFAULT, STORE_TIMEOUT_MS_DEFAULT, 0, \
			       PERIOD_NONE}
/* Postings per chunk of a chunking backend unless store_set_chunk says:
 * large, so that claims and shares go to the server in few big batches
 * (the Redis store keeps two chunks in flight, so a kill redoes at most
 * two chunks). */
#define STORE_CHUNK_DEFAULT 100000

/* 0 when p is a valid key prefix, else -1 with the reason in err. */
int store_prefix_check(const char *p, tm_buf *err);

typedef struct store_conf {
	const char *prefix;  /* all keys start with it; NULL: STORE_PREFIX_DEFAULT;
			      * store_open refuses one store_prefix_check
			      * refuses */
	int retries;         /* reconnect attempts after a failure (< 0:
			      * STORE_RETRIES_DEFAULT) */
	int timeout_ms;      /* connect and reply timeout (<= 0:
			      * STORE_TIMEOUT_MS_DEFAULT) */
	long long ttl_s;     /* > 0: the counting keys a load touches expire
			      * this many seconds after it (renewed by each
			      * load: a period no load touches any more
			      * expires); 0: they stay */
	int period;          /* the kind of period a load counts each
			      * posting in (core/period.h: PERIOD_NONE, _DAY,
			      * _WEEK, _MONTH; SERIES_AS_READ counts by month,
			      * as series_add does).  A store holds one kind:
			      * a load of another kind is refused.  Reading
			      * ignores it (the series' kind decides). */
} store_conf;

/* Opens the store named by url: redis://[user:password@]host:port[/db] or
 * unix:/path/to/socket (the password may also come from the environment
 * variable TITLEMILL_REDIS_PASSWORD).  Returns the store, or NULL with a
 * message naming the server in err. */
store *store_open(const char *url, const store_conf *conf, tm_buf *err);
/* 0 when url has a scheme store_open knows (redis://, rediss://, unix:),
 * else -1 with the forms of a store URL in err (the URL shown without
 * its user-info): for the options, a usage error. */
int store_url_check(const char *url, tm_buf *err);

/* A memory backend counting into s (initialised, borrowed: it must
 * outlive the backend), each posting in its period (series.h).  Does not
 * chunk.  NULL when memory ran out. */
store *store_mem_open(tally_series *s, tm_buf *err);

/* Postings per chunk (n >= 1) for a backend that chunks; a backend that
 * counts postings as they come stays so. */
void store_set_chunk(store *st, long n);

/* Hands the backend one posting: raw as read (for the chunk's digest),
 * tp normalised; commits the chunk when it is full.  name and line say
 * where raw was read, for the message of a failed commit. */
int store_feed(store *st, const posting *raw, const tally_posting *tp, const char *name,
	       long line);
/* The end of an input named name: commits what is left of its chunk,
 * and the next input's digest starts afresh. */
int store_input_end(store *st, const char *name);

/* The Redis key layout (see store_redis_keys.c): the key of an
 * occupation's hash ('f' forms, 'n' totals, 'x' examples), and of shard
 * h % 64 of a spread key ('k' key totals, 'i' posting ids).  Return 0 or
 * -1. */
int store_key_occ(const char *prefix, const char *occ, size_t ol, char suffix, tm_buf *kb);
int store_key_shard(const char *prefix, char kind, uint64_t h, tm_buf *kb);

/* Closes st (NULL is fine). */
void store_close(store *st);

/* For backends: sets up the common part of a new backend (zeroed
 * before, its period set); chunk 0 for a backend that does not chunk.  A backend's close
 * frees its own state and the struct, after store_close has freed the
 * common part. */
void store_base_init(store *st, const store_ops *ops, long chunk);

#endif

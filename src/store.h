/* store.h - the counting backends behind one interface (a struct of
 * function pointers): memory, and Redis for long runs.
 *
 * A load hands the store postings one by one; every `chunk` postings (and
 * at the end of a file) it commits the chunk with the chunk's digest.  A
 * store applies a chunk atomically and remembers its digest, so that a
 * chunk seen before (the same file loaded twice, or a load killed and run
 * again) changes nothing.  Errors: functions return -1 and leave a message
 * in st->err; a failed store stays usable only for close. */
#ifndef TM_STORE_H
#define TM_STORE_H

#include <stdint.h>

#include "buf.h"
#include "tally.h"

typedef struct store store;

/* One item of the review queue to write: its id and its JSON line. */
typedef struct store_rq_put {
	const char *id, *item;
	size_t idlen, itemlen;
} store_rq_put;

/* One event for the review log: field/value pairs as NUL-terminated
 * strings back to back (field, value, field, value ...), len bytes. */
typedef struct store_rq_event {
	const char *fv;
	size_t len;
} store_rq_event;

typedef struct store_ops {
	/* Buffers one posting of the current chunk (copied). */
	int (*add)(store *st, const tally_posting *p);
	/* Applies the buffered chunk; *applied is 0 when the store had it. */
	int (*commit)(store *st, const uint64_t digest[2], int *applied);
	/* Finishes the chunks that loads left unfinished (cut off between
	 * claiming their ids and applying their last share), from what the
	 * store journalled of them: st->settled of them, st->settled_postings
	 * postings counted now.  Called at the end of a load. */
	int (*settle)(store *st);
	/* Adds everything the store holds to m; st->unfinished counts the
	 * chunks left unfinished (their counts are not all in). */
	int (*dump)(store *st, tally_mem *m);
	void (*close)(store *st);

	/* The review queue (see review.h).  rq_load appends every item's
	 * JSON line, each ended by a newline, to out, and watches the queue:
	 * the next rq_commit writes the puts and appends the events in one
	 * transaction, which fails with *conflict = 1 and writes nothing if
	 * anyone changed the queue since rq_load.  Both return 0 or -1. */
	int (*rq_load)(store *st, tm_buf *out);
	int (*rq_commit)(store *st, const store_rq_put *puts, size_t nputs,
			 const store_rq_event *ev, size_t nev, int *conflict);
} store_ops;

struct store {
	const store_ops *ops;
	tm_buf err;
	uint64_t counted, republished, applied, skipped; /* postings, chunks */
	uint64_t settled, settled_postings, unfinished;  /* chunks, postings, chunks */
};

/* The longest key prefix, and its characters: letters, digits and
 * . _ : - (no glob characters for SCAN MATCH, no braces that would change
 * a key's Redis Cluster hash tag, nothing cut short). */
#define STORE_PREFIX_MAX 64

/* 0 when p is a valid key prefix, else -1 with the reason in err. */
int store_prefix_check(const char *p, tm_buf *err);

typedef struct store_conf {
	const char *prefix;  /* all keys start with it; default "titlemill";
			      * store_open refuses one store_prefix_check
			      * refuses */
	int retries;         /* reconnect attempts after a failure (default 5) */
	int timeout_ms;      /* connect and reply timeout (default 5000) */
	long long ttl_s;     /* > 0: the counting keys a load touches expire
			      * this many seconds after it (renewed by each
			      * load); 0: they stay */
} store_conf;

/* Opens the store named by url: redis://[user:password@]host:port[/db] or
 * unix:/path/to/socket (the password may also come from the environment
 * variable TITLEMILL_REDIS_PASSWORD).  Returns the store, or NULL with a
 * message naming the server in err. */
store *store_open(const char *url, const store_conf *conf, tm_buf *err);

/* The Redis key layout (see store_redis.c): the key of an occupation's
 * hash ('f' forms, 'n' totals, 'x' examples), and of shard h % 64 of a
 * spread key ('k' key totals, 'i' posting ids).  Return 0 or -1. */
int store_key_occ(const char *prefix, const char *occ, size_t ol, char suffix, tm_buf *kb);
int store_key_shard(const char *prefix, char kind, uint64_t h, tm_buf *kb);

static inline void store_close(store *st)
{
	if (st)
		st->ops->close(st);
}

#endif

/* load.h - a load: postings files read, their titles cleaned by parallel
 * workers, and every posting handed to one counting backend in input
 * order.
 *
 * The reader (the calling thread) cuts the input into batches of
 * LOAD_BATCH rows (or LOAD_BATCH_BYTES) under sequence numbers; each worker cleans whole
 * batches with a normaliser of its own over the shared, read-only
 * lexicon; the calling thread takes the batches back in sequence order
 * and replays each row as the single-threaded loop would: a malformed
 * row is reported, a posting goes through store_feed, the end of an
 * input through store_input_end.  So the counts, the examples kept, the
 * messages and the order of everything a backend receives (the Redis
 * store's chunks and their digests) are the same bytes whatever the
 * number of workers and however they are scheduled.
 *
 * With one thread no worker is started: the calling thread cleans each
 * batch itself.
 *
 * Returns as err.h says: TM_OK; TM_EINPUT for a malformed row under
 * conf->strict (the reader's "file:line: what" in err); TM_EFAIL for an
 * input that cannot be opened or read, the backend's failure (its
 * message, naming the file and line being loaded), or memory (naming the
 * file and line of the title being cleaned). */
#ifndef TM_LOAD_H
#define TM_LOAD_H

#include <stdint.h>

#include "core/buf.h"
#include "count/store.h"
#include "io/postings.h"
#include "norm/lexicon.h"

/* Rows per batch: large enough that handing a batch over costs nothing
 * beside cleaning it, small enough that the workers share the work
 * evenly on short inputs. */
#define LOAD_BATCH 512
/* A batch is also cut once its rows hold this many bytes, so that long
 * titles (a row may hold a mebibyte) keep the batches in flight small. */
#define LOAD_BATCH_BYTES ((size_t)1 << 20)
/* Batches in flight per worker. */
#define LOAD_AHEAD 4
/* The most workers a load starts. */
#define LOAD_THREADS_MAX 256

typedef struct load_conf {
	enum pr_format format;
	int threads;            /* workers that clean titles (1: none, the
				 * calling thread cleans) */
	size_t memo_bytes;      /* the memory of recent titles, shared out
				 * between the workers' normalisers */
	int strict;             /* a malformed row stops the load */
	/* Each called on the calling thread, in input order (any may be
	 * NULL): a malformed row skipped ("file:line: what"); a note on a
	 * row (its "file:line: ..." text); after each batch, the postings
	 * handed to the backend so far and the input bytes read so far. */
	void (*skipped)(void *ctx, const char *msg, size_t len);
	void (*note)(void *ctx, const char *msg, size_t len);
	void (*progress)(void *ctx, uint64_t postings, uint64_t bytes);
	/* NULL, or each posting without occupations is handed here (with the
	 * name of its file) instead of the backend, and such postings are
	 * read rather than refused as malformed: 0, or TM_ENOMEM */
	int (*hold)(void *ctx, const posting *p, const char *name);
	void *ctx;
} load_conf;

/* Loads paths[0..n) ("-" is standard input) into st with the titles
 * cleaned over lx. */
int load_run(store *st, const lexicon *lx, const load_conf *conf, char *const *paths, int n,
	     tm_buf *err);

/* The number of online processors (at least 1). */
int load_online_cpus(void);

#endif

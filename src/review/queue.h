/* queue.h - where the review queue lives: its storage behind one
 * interface (a struct of function pointers), implemented by the queue
 * file (queue_file.c) and by Redis (store_redis_queue.c), and the one
 * read-change-write cycle over it (queue.c).
 *
 * A change loads the queue and holds it (the file: its lock; Redis:
 * WATCH), changes it in memory (review.h) and commits it: the file is
 * written whole (outfile.h: the old queue or the new, never a torn one);
 * Redis writes the changed items and appends their new events in one
 * MULTI/EXEC, which does nothing when anyone changed the queue since it
 * was loaded -- the change is then run again on what the queue holds
 * now, so two curators never lose an update and the first one wins.
 *
 * Errors: 0 or -1 with a message in err.  Ownership: rq_place owns its
 * storage; rq_place_close releases it (and any lock it holds). */
#ifndef TM_QUEUE_H
#define TM_QUEUE_H

#include "core/buf.h"
#include "review/review.h"
#include "review/review_json.h"
#include "count/store.h"

typedef struct rq_store rq_store;

typedef struct rq_store_ops {
	/* Puts every item line of the queue, each ended by a newline (a
	 * queue file's text, unreadable lines included), in text.  With
	 * hold, the queue is held until commit or release.  A missing file
	 * is an error unless missing_ok (always so with hold).  Notes for
	 * the user go to warn. */
	int (*load)(rq_store *s, int hold, int missing_ok, tm_buf *text, tm_buf *warn, tm_buf *err);
	/* Writes what changed in q since load (its changed items and their
	 * new events; unreadable lines dropped when q->drop_bad) and lets
	 * the queue go.  *conflict = 1, nothing written, when the queue
	 * changed since load: load again and decide again. */
	int (*commit)(rq_store *s, const rq_queue *q, int *conflict, tm_buf *warn, tm_buf *err);
	/* Lets a held queue go without writing. */
	void (*release)(rq_store *s);
	void (*close)(rq_store *s);
} rq_store_ops;

struct rq_store {
	const rq_store_ops *ops;
	const char *name;     /* for messages: the file as given, or "the
			       * store's review queue" */
};

/* The queue file at path (borrowed), or the queue in the store at url. */
rq_store *rq_store_file_open(const char *path, tm_buf *err);
/* Reconnect attempts of `titlemill review` on a store after a lost
 * connection (a load's are STORE_RETRIES_DEFAULT). */
#define RQ_STORE_RETRIES 2
rq_store *rq_store_redis_open(const char *url, const store_conf *conf, tm_buf *err);

typedef struct rq_place {
	const char *path;     /* the queue file, or NULL for a store */
	rq_store *qs;
	tm_buf text;
	tm_buf warn;          /* notes for the user (lines that cannot be read,
			       * unknown statuses, a group not kept), one line
			       * each, from the last rq_read or rq_transact */
	size_t nbad;          /* lines that could not be read, from the same */
} rq_place;

/* A place over the queue storage qs, opened by the caller with
 * rq_store_file_open (path: the same file, which repair needs) or
 * rq_store_redis_open (path NULL).  The place owns qs from now on:
 * rq_place_close closes it. */
void rq_place_init(rq_place *pl, rq_store *qs, const char *path);

/* Reads the queue for reading only (no lock).  A missing file is an error
 * unless missing_ok.  The queue file is written by the rules of
 * outfile.h (a link followed only when it is the user's or root's; the
 * mode and group kept); FILE.lock beside it is created with the queue's
 * mode and group and never through a link. */
int rq_read(rq_place *pl, rq_queue *q, int missing_ok, tm_buf *err);

/* Runs one change: loads and holds the queue, calls change(q, arg, err),
 * and commits the changed items when it returns 0; a commit that lost a
 * race is run again (change must then decide afresh on what it reads).
 * change returning -1 writes nothing and its error is returned. */
int rq_transact(rq_place *pl, int (*change)(rq_queue *q, void *arg, tm_buf *err),
		void *arg, tm_buf *err);

/* Moves the lines of a queue file that cannot be read to FILE.rejected
 * beside it (its name, links resolved, put in rejected; appended, never
 * replacing what it holds; created with the queue's mode and group) and
 * writes the queue without them, under the lock.  Sets *moved; nothing is
 * written when there is nothing to move.  A store is refused. */
int rq_repair(rq_place *pl, tm_buf *rejected, size_t *moved, tm_buf *err);

void rq_place_close(rq_place *pl);

/* For the storage backends: err = "where: what detail" (where and detail
 * may be NULL). */
void rq_store_msg(tm_buf *err, const char *where, const char *what, const char *detail);

#endif

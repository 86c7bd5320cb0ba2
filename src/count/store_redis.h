/* store_redis.h - what the parts of the Redis store share (internal:
 * only store_redis*.c include it; with cluster.c they are the only files
 * that know hiredis).
 *
 * The store is in parts, one concept each:
 *   store_redis.c        opening (the scripts loaded on each connection),
 *                        closing, errors, one routed command
 *   store_redis_url.c    the store's URL: seeds, user, password, db
 *   store_redis_keys.c   the key layout (documented there) and the key
 *                        prefix
 *   store_redis_chunk.c  a chunk's life: its journal, commit, and the
 *                        chunks other loads left unfinished (finish);
 *                        why a chunk counts exactly once is told there
 *   store_redis_apply.c  one attempt at a chunk: claim its ids, split
 *                        what it owns into shares, apply each share
 *   store_redis_dump.c   reading the counts back
 *   store_redis_queue.c  the review queue's storage (queue.h)
 *
 * Errors: -1 or NULL with a message naming the server in r->base.err
 * (rerr, or kerr_up for the router's). */
#ifndef TM_STORE_REDIS_H
#define TM_STORE_REDIS_H

#include <stdint.h>

#include "count/cluster.h"
#include "count/store.h"
#include "count/strtab.h"

#define SR_SHARDS 64      /* spread keys: 'k' key totals, 'i' posting ids */
#define SR_SEP '\x1F'     /* joins the fields of a hash field */
/* the value of the field "" of each id shard (store_redis_apply.c):
 * longer than 64 bytes */
#define SR_ID_NOTE "no posting id: this hash maps posting ids to the chunks that count them"

/* A chunk on its way: its postings, its digest, and what its attempt
 * has sent (store_redis_apply.c keeps that part to itself). */
enum { SR_IDLE, SR_CLAIMING, SR_APPLYING };
typedef struct sr_flight {
	int stage;              /* SR_IDLE, or claims / shares sent */
	uint64_t digest[2];
	char dg[33];            /* the digest in hex */
	long attempt;           /* the chunk's number in this run (test hook) */
	tm_buf chunk;           /* its postings, in the format of chunk.h */
	struct sr_work *w;
} sr_flight;

typedef struct rstore {
	store base;
	rcluster k;
	char *name;             /* for messages: the URL without password */
	char prefix[STORE_PREFIX_MAX + 1];
	char sha_claim[41], sha_apply[41];
	char ttl[24];           /* seconds, as the scripts take it; "0" none */
	int period;             /* the load's kind of period (never SERIES_AS_READ) */
	int kind_known;         /* the store's kind checked (and set) by this load */
	/* the current chunk, in the format of chunk.h */
	tm_buf chunk;
	size_t nchunk;
	/* the last date read and its period's label (a load's postings come
	 * mostly day by day: the date is checked and labelled once per run
	 * of equal dates); datelen 0 none */
	char date[16], label[PERIOD_MAX];
	size_t datelen, labellen;
	strtab exbound;         /* per title: 1 + the largest example hash the
				 * store can still hold, as this load knows it */
	/* the chunks in flight (store_redis_chunk.c): at most two, one whose
	 * claims are sent, one whose shares are sent */
	sr_flight fly[2];
	char drop[2][33];       /* digests of chunks done: journals to delete */
	int ndrop;
	/* test hook (TITLEMILL_TEST_KILL=claim:N or apply:N): the process
	 * kills itself with SIGKILL after the claims of its N-th chunk, or
	 * after half of that chunk's shares */
	int kill_stage;         /* 0 none, 1 claim, 2 apply */
	long kill_at, nattempt;
} rstore;

/* ---- store_redis.c ---- */
void sr_err(rstore *r, const char *what, const char *detail);
void sr_kerr_up(rstore *r);
/* One command routed by the slot of its key argv[1]: the reply (the
 * caller frees it), or NULL with the message set (error replies become
 * messages). */
redisReply *sr_cmd(rstore *r, int argc, const char **argv, const size_t *len);
/* Runs the batch and frees the replies; ints[i] (when ints) gets the
 * integer reply of cmds[i] (-1 for another reply); an error reply's text
 * goes to the message after what.  Returns 0 or -1. */
int sr_run_batch(rstore *r, rc_cmd *cmds, size_t n, long long *ints, const char *what);
/* The scripts (store_redis_apply.c), loaded on every connection; the
 * apply script in two parts, joined (each within the length a C string
 * constant may portably have). */
extern const char sr_claim_script[], sr_apply_script[], sr_apply_examples[];

/* ---- store_redis_url.c ---- */
typedef struct sr_seeds {
	char *host[16], *path[16];
	int port[16];
	size_t n;
} sr_seeds;
/* Parses url into seeds, r->k.user, r->k.pass, r->k.db and r->name.
 * Returns 0, or -1 with the reason in err (never the password). */
int sr_parse_url(rstore *r, const char *url, sr_seeds *sd, tm_buf *err);
void sr_seeds_free(sr_seeds *sd);

/* ---- store_redis_keys.c ---- */
/* The key in kb (an undated key, ending in "}:" and its letter) made
 * the key of period label[0..n) (n 0: the undated, kb unchanged);
 * *taglen is the length of its part up to "}:" (its ledger is that part
 * then L).  0 or -1. */
int sr_key_at(tm_buf *kb, const char *label, size_t n, size_t *taglen);
/* The length of key k without its period, and the period's label in
 * *label, *n (NULL, 0 and kl for an undated key). */
size_t sr_key_period(const char *k, size_t kl, const char **label, size_t *n);
/* The length of the first field of a joined key a 1F b 1F c. */
size_t sr_first_field(const char *s, size_t n);
/* P:{j:DG}:j, the journal of chunk dg (32 hex digits). */
int sr_key_journal(const char *prefix, const char *dg, tm_buf *kb);
/* P:{TAG}:WHAT: the journals' index ("j", "open"), the review queue
 * ("r", "items" or "log"). */
int sr_key_tagged(const char *prefix, const char *tag, const char *what, tm_buf *kb);
/* The SCAN MATCH pattern of the keys prefix + rest (a glob): the
 * prefix's characters escaped, so it matches only itself. */
int sr_match_pattern(const char *prefix, const char *rest, tm_buf *out);

/* ---- store_redis_apply.c ---- */
/* One attempt at the chunk of f (f->chunk, f->digest, f->dg), in three
 * steps (store_redis_chunk.c tells why it counts once): claims_send
 * sends the claims of its ids (f->stage SR_CLAIMING); once rc_drain has
 * read their replies, shares_send works out what the chunk owns and
 * sends its shares (SR_APPLYING); once rc_drain has read those, applied
 * answers 1 applied (some share was new), 0 every share was in its
 * ledger, and sets *counted and *repub (its postings counted, and
 * skipped for an id another chunk owns); f is idle again.  -1: failure
 * (message set).  sr_attempt does the three, waiting for each. */
int sr_claims_send(rstore *r, sr_flight *f);
int sr_shares_send(rstore *r, sr_flight *f);
int sr_applied(rstore *r, sr_flight *f, uint64_t *counted, uint64_t *repub);
int sr_attempt(rstore *r, sr_flight *f, uint64_t *counted, uint64_t *repub);
/* Frees what f holds (its postings too); f is idle. */
void sr_flight_free(sr_flight *f);

/* ---- store_redis_chunk.c ---- */
int sr_commit(store *st, const uint64_t digest[2]);
int sr_finish(store *st);

/* ---- store_redis_dump.c ---- */
int sr_dump(store *st, tally_series *s);

/* ---- store_redis.c ---- */
/* The kind of period the store counts by (P:{p}:kind) in *kind, -1
 * when it holds none (never loaded, or written before periods).  0, or
 * -1 with the message set (a kind key that names no kind). */
int sr_kind_get(rstore *r, int *kind);

#endif

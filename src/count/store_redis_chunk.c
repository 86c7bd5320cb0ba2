/* store_redis_chunk.c - a chunk's life in the Redis store: its journal,
 * its commit, and finishing the chunks other loads left unfinished.
 *
 * Why a chunk counts exactly once, on one server or on a cluster (where
 * a script may touch the keys of one slot only):
 *  0. Journal.  The chunk's postings are written to its journal, whole,
 *     before anything else; the journal is deleted after step 3.
 *  1. Claim.  For each id shard, one script gives every new id of the
 *     chunk to the chunk (HSET id digest unless the id has an owner) and
 *     answers which ids the chunk owns.  Ownership is first come, first
 *     served, and for ever: the same chunk run again (a rerun after a
 *     kill, the same file twice, two loaders of one file at once) owns
 *     exactly the same ids, because a chunk's digest is its content.
 *  2. Share.  The postings whose ids the chunk owns (and those without
 *     an id) are aggregated and split by hash tag: each occupation's
 *     forms, totals and examples, and each key-total shard.
 *  3. Apply.  Each share goes to one script in its own slot, which does
 *     nothing if the tag's ledger holds the chunk's digest, and otherwise
 *     applies the increments and the examples and adds the digest, all
 *     atomically.
 * A share is thus applied at most once (its ledger, in its slot), and a
 * rerun of what was cut off applies what is missing: steps 1 and 2 give
 * the same shares every time.  An id owned by another chunk was counted
 * there (republished), whichever loader got there first -- or will be:
 * a chunk cut off after step 1 has its journal left, and every load
 * ends by running such chunks again from their journals (steps 1 to 3
 * as the same chunk), so their ids are counted even when the input
 * that held them changed and will never give that chunk again.
 *
 * Within one run, the k-th chunk with the same digest as an earlier one
 * of that run (an input repeated) is committed under the digest mixed
 * with k (chunk.h), so inputs of one run are distinct, as in memory.
 *
 * With a time to live (tally --ttl), the scripts renew it on every key
 * they touch, so the keys of a tag expire together, some time after the
 * last load that touched them.  The review queue never expires. */
#include "count/store_redis.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "count/chunk.h"
#include "count/slot.h"

/* ---- the journal ----
 * Before a chunk claims anything, its postings go to its journal,
 * P:{j:DIGEST}:j, a hash: "0" a header (magic and byte order), "1".."n"
 * the chunk buffer in pieces of at most JOURNAL_PIECE bytes, then "n" = n
 * (written last: a journal without it is incomplete, and its chunk has
 * claimed nothing yet).  When every share of the chunk is applied, the
 * journal is deleted.  A journal left behind is a chunk that was cut off
 * between its claims and its last share -- the only time ids are owned
 * by a chunk whose counts are not all in.  Any later load (settle) runs
 * it again from the journal exactly as it was: it claims as the same
 * chunk (so it owns the same ids), and the ledgers skip the shares that
 * went through.  Running it twice at once is harmless for the same
 * reason, so a load may finish a chunk another loader is still busy
 * with.  The writes are idempotent too: two loaders of one chunk write
 * the same bytes under the same fields.
 *
 * P:{j}:open, a set, lists the digests of the journals (added before a
 * journal's "n" is written, removed after it is deleted), so a load finds them
 * without scanning the keyspace.  An entry without its journal is a
 * journal not written yet, or gone already: left to its loader. */
#define JOURNAL_PIECE (1u << 20)
#define JOURNAL_MAX_PIECES 1000000 /* 1 TiB: more is not a journal of ours */

static const char journal_magic[4] = {'T', 'M', 'J', '2'};
/* the magic of journals written before postings carried their period */
static const char journal_magic_v1[4] = {'T', 'M', 'J', '1'};

/* A batch of small commands being built (at most four arguments each). */
typedef struct jbatch {
	rc_cmd *c;
	const char **av;
	size_t *al, n;
} jbatch;

static void jput(jbatch *b, const char *a0, const char *a1, size_t l1, const char *a2, size_t l2,
		 const char *a3, size_t l3)
{
	const char **a = b->av + 4 * b->n;
	size_t *l = b->al + 4 * b->n;
	a[0] = a0, l[0] = strlen(a0);
	a[1] = a1, l[1] = l1;
	a[2] = a2, l[2] = l2;
	a[3] = a3, l[3] = l3;
	b->c[b->n++] = (rc_cmd){a3 ? 4 : a2 ? 3 : 2, a, l, slot_of(a1, l1), NULL};
}

static void jfree(jbatch *b)
{
	for (size_t i = 0; b->c && i < b->n; i++)
		if (b->c[i].reply)
			freeReplyObject(b->c[i].reply);
	free(b->c);
	free(b->av);
	free(b->al);
}

/* One journal round, waiting for both of its steps: f's journal written
 * (f NULL: none), and the journals of the chunks done (r->drop) deleted.
 * First the index entry of f and its pieces, and the deletions; then f's
 * "n" (every piece is in before it) and the index entries of the deleted
 * journals (each journal is gone before its entry).  0 or -1. */
static int journal_round(rstore *r, const sr_flight *f)
{
	size_t npiece = f ? (f->chunk.len + JOURNAL_PIECE - 1) / JOURNAL_PIECE : 0;
	size_t cap = npiece + 4 + (size_t)r->ndrop;
	jbatch b1 = {calloc(cap, sizeof(rc_cmd)), calloc(4 * cap, sizeof(char *)),
		     calloc(4 * cap, sizeof(size_t)), 0};
	jbatch b2 = {calloc(cap, sizeof(rc_cmd)), calloc(4 * cap, sizeof(char *)),
		     calloc(4 * cap, sizeof(size_t)), 0};
	char (*fld)[24] = calloc(npiece + 2, sizeof *fld);
	tm_buf ik = {0}, jk = {0}, dk[2] = {{0}, {0}};
	unsigned char head[8];
	uint32_t order = 0x01020304;
	int ttl = strcmp(r->ttl, "0") != 0, rc = -1;
	size_t tl = strlen(r->ttl);

	memcpy(head, journal_magic, 4);
	memcpy(head + 4, &order, 4);
	if (!b1.c || !b1.av || !b1.al || !b2.c || !b2.av || !b2.al || !fld ||
	    sr_key_tagged(r->prefix, "j", "open", &ik) || (f && sr_key_journal(r->prefix, f->dg, &jk)))
		goto oom;
	for (int d = 0; d < r->ndrop; d++) {
		if (sr_key_journal(r->prefix, r->drop[d], &dk[d]))
			goto oom;
		jput(&b1, "DEL", dk[d].data, dk[d].len, NULL, 0, NULL, 0);
		jput(&b2, "SREM", ik.data, ik.len, r->drop[d], 32, NULL, 0);
	}
	if (f) {
		jput(&b1, "SADD", ik.data, ik.len, f->dg, 32, NULL, 0);
		if (ttl)
			jput(&b1, "EXPIRE", ik.data, ik.len, r->ttl, tl, NULL, 0);
		jput(&b1, "HSET", jk.data, jk.len, "0", 1, (const char *)head, sizeof head);
		for (size_t i = 1; i <= npiece; i++) {
			size_t off = (i - 1) * (size_t)JOURNAL_PIECE, left = f->chunk.len - off;
			snprintf(fld[i], sizeof fld[i], "%zu", i);
			jput(&b1, "HSET", jk.data, jk.len, fld[i], strlen(fld[i]), f->chunk.data + off,
			     left < JOURNAL_PIECE ? left : JOURNAL_PIECE);
		}
		snprintf(fld[0], sizeof fld[0], "%zu", npiece);
		jput(&b2, "HSET", jk.data, jk.len, "n", 1, fld[0], strlen(fld[0]));
		if (ttl)
			jput(&b2, "EXPIRE", jk.data, jk.len, r->ttl, tl, NULL, 0);
	}
	if (sr_run_batch(r, b1.c, b1.n, NULL, "the server refused the chunk's journal") == 0 &&
	    sr_run_batch(r, b2.c, b2.n, NULL, "the server refused the chunk's journal") == 0) {
		rc = 0;
		r->ndrop = 0;
	}
	goto done;
oom:
	sr_err(r, "out of memory", NULL);
done:
	jfree(&b1);
	jfree(&b2);
	free(fld);
	buf_free(&ik);
	buf_free(&jk);
	buf_free(&dk[0]);
	buf_free(&dk[1]);
	return rc;
}

/* The flight done: its counts, and its journal to delete. */
static void flight_done(rstore *r, sr_flight *f, int a, uint64_t counted, uint64_t repub)
{
	store *st = &r->base;
	if (a == 1) {
		st->applied++;
		st->counted += counted;
		st->republished += repub;
	} else
		st->skipped++;
	memcpy(r->drop[r->ndrop++], f->dg, 33);
}

/* Reads the replies of everything sent; the chunks whose shares came
 * back are done (their journals join r->drop).  *claimed: the flight
 * whose claims came back, or NULL.  0 or -1. */
static int collect(rstore *r, sr_flight **claimed)
{
	*claimed = NULL;
	if (rc_drain(&r->k) != 0) {
		sr_kerr_up(r);
		return -1;
	}
	for (int i = 0; i < 2; i++) {
		sr_flight *f = &r->fly[i];
		uint64_t counted, repub;
		if (f->stage == SR_CLAIMING)
			*claimed = f;
		else if (f->stage == SR_APPLYING) {
			int a = sr_applied(r, f, &counted, &repub);
			if (a < 0)
				return -1;
			flight_done(r, f, a, counted, repub);
		}
	}
	return 0;
}

/* Brings every chunk in flight to its end, waiting for each step. */
static int settle_flights(rstore *r)
{
	sr_flight *c;
	for (;;) {
		if (collect(r, &c) != 0)
			return -1;
		if (!c)
			break;
		if (sr_shares_send(r, c) != 0)
			return -1;
	}
	return r->ndrop ? journal_round(r, NULL) : 0;
}

/* Two chunks in flight: when chunk k is committed, the replies of what
 * was sent before are read (the claims of chunk k-1, the shares of chunk
 * k-2, which is then done); chunk k's journal is written (with the
 * deletion of k-2's) and its claims sent; then chunk k-1's shares are
 * worked out and sent while the server claims.  The server works on
 * chunks k and k-1 while this process reads and normalises chunk k+1.
 * The order of the steps of each chunk is the one told at the top, and
 * each step waits for the replies of the one before it: a kill at any
 * moment leaves at most the two chunks in flight unfinished -- their
 * journals, or the same load run again, finish them. */
int sr_commit(store *st, const uint64_t digest[2])
{
	rstore *r = (rstore *)st;
	sr_flight *f, *prev;
	tm_buf t;

	if (!r->nchunk)
		return 0;
	r->nattempt++;
	if (r->kill_stage && r->nattempt == r->kill_at && settle_flights(r) != 0)
		return -1; /* the test hook: this chunk alone in flight */
	if (collect(r, &prev) != 0)
		return -1;
	f = r->fly[0].stage == SR_IDLE ? &r->fly[0] : &r->fly[1];
	/* the chunk buffered becomes the flight's; the flight's old buffer
	 * takes the next chunk */
	t = f->chunk;
	f->chunk = r->chunk;
	r->chunk = t;
	buf_reset(&r->chunk);
	r->nchunk = 0;
	memcpy(f->digest, digest, sizeof f->digest);
	chunk_hex(digest, f->dg);
	f->attempt = r->nattempt;
	if (journal_round(r, f) != 0 || sr_claims_send(r, f) != 0)
		return -1;
	if (prev && sr_shares_send(r, prev) != 0)
		return -1;
	if (r->kill_stage && r->nattempt == r->kill_at)
		return settle_flights(r);
	return 0;
}

/* Reads journal key into *out: 1 done, 0 incomplete (no "n" yet) or
 * gone, -1 failure (message set). */
static int journal_read(rstore *r, const char *key, size_t kl, tm_buf *out)
{
	const char *av[3] = {"HGET", key, "n"};
	size_t al[3] = {4, kl, 1};
	redisReply *rep = sr_cmd(r, 3, av, al);
	unsigned long n;
	char nb[24], *e;
	uint32_t order = 0x01020304;

	if (!rep)
		return -1;
	if (rep->type != REDIS_REPLY_STRING) {
		freeReplyObject(rep);
		return 0;
	}
	snprintf(nb, sizeof nb, "%.*s", (int)rep->len, rep->str);
	freeReplyObject(rep);
	errno = 0;
	n = strtoul(nb, &e, 10);
	if (errno || e == nb || *e || n > JOURNAL_MAX_PIECES) {
		sr_err(r, "a chunk's journal is unreadable (its piece count)", key);
		return -1;
	}
	buf_reset(out);
	for (unsigned long i = 0; i <= n; i++) {
		snprintf(nb, sizeof nb, "%lu", i);
		av[2] = nb, al[2] = strlen(nb);
		if (!(rep = sr_cmd(r, 3, av, al)))
			return -1;
		if (rep->type == REDIS_REPLY_NIL) {
			/* its loader finished it meanwhile and dropped the journal */
			freeReplyObject(rep);
			buf_reset(out);
			return 0;
		}
		int ok = rep->type == REDIS_REPLY_STRING, old = 0;
		if (ok && i == 0) {
			old = rep->len == 8 && !memcmp(rep->str, journal_magic_v1, 4);
			ok = rep->len == 8 && !memcmp(rep->str, journal_magic, 4) &&
			     !memcmp(rep->str + 4, &order, 4);
		}
		else if (ok && buf_append(out, rep->str, rep->len)) {
			freeReplyObject(rep);
			sr_err(r, "out of memory", NULL);
			return -1;
		}
		freeReplyObject(rep);
		if (old) {
			sr_err(r, "a chunk's journal was written by an earlier titlemill, before counts had "
			       "periods: finish that load with the version that began it", key);
			return -1;
		}
		if (!ok) {
			sr_err(r, "a chunk's journal is unreadable (written by another kind of machine?)", key);
			return -1;
		}
	}
	if (!chunk_valid(out->data, out->len)) {
		sr_err(r, "a chunk's journal is unreadable (its postings)", key);
		return -1;
	}
	return 1;
}

int sr_finish(store *st)
{
	rstore *r = (rstore *)st;
	tm_buf kb = {0};
	redisReply *open = NULL;
	int rc = -1;

	if (r->nchunk) {
		sr_err(r, "a chunk is still buffered", NULL);
		return -1;
	}
	if (settle_flights(r) != 0)
		return -1;
	if (sr_key_tagged(r->prefix, "j", "open", &kb)) {
		sr_err(r, "out of memory", NULL);
		goto done;
	}
	const char *av[2] = {"SMEMBERS", kb.data};
	size_t al[2] = {8, kb.len};
	if (!(open = sr_cmd(r, 2, av, al)))
		goto done;
	if (open->type != REDIS_REPLY_ARRAY) {
		sr_err(r, "unexpected reply to SMEMBERS", kb.data);
		goto done;
	}
	rc = 0;
	for (size_t i = 0; i < open->elements && !rc; i++) {
		const redisReply *e = open->element[i];
		sr_flight *f = &r->fly[0];
		uint64_t counted, repub;
		if (e->type != REDIS_REPLY_STRING || chunk_unhex(e->str, e->len, f->digest) != 0)
			continue; /* not one of ours */
		chunk_hex(f->digest, f->dg);
		f->attempt = 0;
		if (sr_key_journal(r->prefix, f->dg, &kb)) {
			sr_err(r, "out of memory", NULL);
			rc = -1;
			break;
		}
		int got = journal_read(r, kb.data, kb.len, &f->chunk);
		if (got == 1) {
			int a = sr_attempt(r, f, &counted, &repub);
			memcpy(r->drop[0], f->dg, 33);
			r->ndrop = 1;
			if (a < 0 || journal_round(r, NULL) != 0)
				rc = -1;
			else {
				st->settled++;
				st->settled_postings += a == 1 ? counted : 0;
			}
		} else if (got < 0)
			rc = -1;
		r->ndrop = 0;
		buf_reset(&f->chunk);
	}
done:
	if (open)
		freeReplyObject(open);
	buf_free(&kb);
	return rc;
}

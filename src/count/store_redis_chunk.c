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
 * journal is written, removed after it is deleted), so a load finds them
 * without scanning the keyspace.  An entry without its journal is a
 * journal not written yet, or gone already: left to its loader. */
#define JOURNAL_PIECE (1u << 20)
#define JOURNAL_MAX_PIECES 1000000 /* 1 TiB: more is not a journal of ours */

static const char journal_magic[4] = {'T', 'M', 'J', '1'};

/* SADD (add) or SREM the digest dg in P:{j}:open. */
static int journal_index(rstore *r, int add, const char *dg)
{
	tm_buf kb = {0};
	int rc = -1;
	if (sr_key_tagged(r->prefix, "j", "open", &kb)) {
		sr_err(r, "out of memory", NULL);
		goto done;
	}
	const char *av[3] = {add ? "SADD" : "SREM", kb.data, dg};
	size_t al[3] = {4, kb.len, 32};
	redisReply *rep = sr_cmd(r, 3, av, al);
	if (!rep)
		goto done;
	freeReplyObject(rep);
	if (add && strcmp(r->ttl, "0")) {
		const char *ev[3] = {"EXPIRE", kb.data, r->ttl};
		size_t el[3] = {6, kb.len, strlen(r->ttl)};
		if (!(rep = sr_cmd(r, 3, ev, el)))
			goto done;
		freeReplyObject(rep);
	}
	rc = 0;
done:
	buf_free(&kb);
	return rc;
}

static int journal_write(rstore *r, const tm_buf *key, const char *dg)
{
	size_t npiece = (r->chunk.len + JOURNAL_PIECE - 1) / JOURNAL_PIECE, n = npiece + 3, i;
	rc_cmd *cmds = calloc(n, sizeof *cmds);
	char (*fld)[24] = calloc(n, sizeof *fld);
	const char **avs = calloc(n * 4, sizeof *avs);
	size_t *als = calloc(n * 4, sizeof *als);
	unsigned char head[8];
	uint32_t order = 0x01020304;
	unsigned slot = slot_of(key->data, key->len);
	int ttl = strcmp(r->ttl, "0") != 0, rc = -1;

	memcpy(head, journal_magic, 4);
	memcpy(head + 4, &order, 4);
	if (!cmds || !fld || !avs || !als) {
		sr_err(r, "out of memory", NULL);
		goto done;
	}
	if (journal_index(r, 1, dg) != 0)
		goto done;
	/* HSET of the pieces 0 (the header) to npiece; then of "n", and the
	 * time to live */
	for (i = 0; i < npiece + 2 + (size_t)ttl; i++) {
		const char **a = avs + 4 * i;
		size_t *l = als + 4 * i;
		a[0] = "HSET", l[0] = 4;
		a[1] = key->data, l[1] = key->len;
		if (i == 0)
			a[2] = "0", l[2] = 1, a[3] = (const char *)head, l[3] = sizeof head;
		else if (i <= npiece) {
			size_t off = (i - 1) * (size_t)JOURNAL_PIECE, left = r->chunk.len - off;
			snprintf(fld[i], sizeof fld[i], "%zu", i);
			a[2] = fld[i], l[2] = strlen(fld[i]);
			a[3] = r->chunk.data + off, l[3] = left < JOURNAL_PIECE ? left : JOURNAL_PIECE;
		} else if (i == npiece + 1) {
			snprintf(fld[i], sizeof fld[i], "%zu", npiece);
			a[2] = "n", l[2] = 1, a[3] = fld[i], l[3] = strlen(fld[i]);
		} else {
			a[0] = "EXPIRE", l[0] = 6;
			a[2] = r->ttl, l[2] = strlen(r->ttl);
		}
		cmds[i] = (rc_cmd){i == npiece + 2 ? 3 : 4, a, l, slot, NULL};
	}
	/* every piece is in before "n" is written */
	if (sr_run_batch(r, cmds, npiece + 1, NULL, "the server refused the chunk's journal") == 0 &&
	    sr_run_batch(r, cmds + npiece + 1, 1 + (size_t)ttl, NULL,
		      "the server refused the chunk's journal") == 0)
		rc = 0;
done:
	if (cmds)
		for (i = 0; i < n; i++)
			if (cmds[i].reply)
				freeReplyObject(cmds[i].reply);
	free(cmds);
	free(fld);
	free(avs);
	free(als);
	return rc;
}

static int journal_drop(rstore *r, const tm_buf *key, const char *dg)
{
	const char *av[2] = {"DEL", key->data};
	size_t al[2] = {3, key->len};
	redisReply *rep = sr_cmd(r, 2, av, al);
	if (!rep)
		return -1;
	freeReplyObject(rep);
	return journal_index(r, 0, dg);
}

int sr_commit(store *st, const uint64_t digest[2])
{
	rstore *r = (rstore *)st;
	uint64_t counted, repub;
	tm_buf key = {0};
	char dg[33];
	int rc;

	if (!r->nchunk)
		return 0;
	chunk_hex(digest, dg);
	if (sr_key_journal(r->prefix, dg, &key)) {
		sr_err(r, "out of memory", NULL);
		return -1;
	}
	r->nattempt++;
	/* the router waits out short outages and failovers itself */
	rc = journal_write(r, &key, dg);
	if (rc == 0)
		rc = sr_attempt(r, digest, &counted, &repub);
	if (rc >= 0 && journal_drop(r, &key, dg) != 0)
		rc = -1;
	buf_free(&key);
	if (rc < 0)
		return -1;
	if (rc == 1) {
		st->applied++;
		st->counted += counted;
		st->republished += repub;
	} else
		st->skipped++;
	buf_reset(&r->chunk);
	r->nchunk = 0;
	return 0;
}

/* Reads journal key into r->chunk: 1 done, 0 incomplete (no "n" yet) or
 * gone, -1 failure (message set). */
static int journal_read(rstore *r, const char *key, size_t kl)
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
	buf_reset(&r->chunk);
	r->nchunk = 0;
	for (unsigned long i = 0; i <= n; i++) {
		snprintf(nb, sizeof nb, "%lu", i);
		av[2] = nb, al[2] = strlen(nb);
		if (!(rep = sr_cmd(r, 3, av, al)))
			return -1;
		if (rep->type == REDIS_REPLY_NIL) {
			/* its loader finished it meanwhile and dropped the journal */
			freeReplyObject(rep);
			buf_reset(&r->chunk);
			return 0;
		}
		int ok = rep->type == REDIS_REPLY_STRING;
		if (ok && i == 0)
			ok = rep->len == 8 && !memcmp(rep->str, journal_magic, 4) &&
			     !memcmp(rep->str + 4, &order, 4);
		else if (ok && buf_append(&r->chunk, rep->str, rep->len)) {
			freeReplyObject(rep);
			sr_err(r, "out of memory", NULL);
			return -1;
		}
		freeReplyObject(rep);
		if (!ok) {
			sr_err(r, "a chunk's journal is unreadable (written by another kind of machine?)", key);
			return -1;
		}
	}
	if (!chunk_valid(r->chunk.data, r->chunk.len)) {
		sr_err(r, "a chunk's journal is unreadable (its postings)", key);
		return -1;
	}
	r->nchunk = 1;
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
		uint64_t digest[2], counted, repub;
		char dg[33];
		if (e->type != REDIS_REPLY_STRING || chunk_unhex(e->str, e->len, digest) != 0)
			continue; /* not one of ours */
		chunk_hex(digest, dg);
		if (sr_key_journal(r->prefix, dg, &kb)) {
			sr_err(r, "out of memory", NULL);
			rc = -1;
			break;
		}
		int got = journal_read(r, kb.data, kb.len);
		if (got == 1) {
			int a = sr_attempt(r, digest, &counted, &repub);
			if (a < 0 || journal_drop(r, &kb, dg) != 0)
				rc = -1;
			else {
				st->settled++;
				st->settled_postings += a == 1 ? counted : 0;
			}
		} else if (got < 0)
			rc = -1;
		buf_reset(&r->chunk);
		r->nchunk = 0;
	}
done:
	if (open)
		freeReplyObject(open);
	buf_free(&kb);
	return rc;
}

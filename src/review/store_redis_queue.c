/* store_redis_queue.c - the review queue's storage in Redis.
 *
 * The queue is changed optimistically: WATCH P:{r}:items, read it,
 * decide in the client, then MULTI, HSET the changed items, XADD the
 * events, EXEC.  If anyone wrote the hash in between, EXEC does nothing
 * and the client reads again and decides again, so the first of two
 * curators wins and the second is told.  Both keys share one hash tag. */
#include "count/store_redis.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "review/queue.h"
#include "review/review.h"
#include "count/slot.h"

/* One item to write: its id and its JSON line. */
typedef struct rq_put {
	const char *id, *item;
	size_t idlen, itemlen;
} rq_put;

/* One event for the log: field/value pairs as NUL-terminated strings
 * back to back (field, value, field, value ...), len bytes. */
typedef struct rq_ev {
	const char *fv;
	size_t len;
} rq_ev;

typedef struct qredis {
	rq_store base;
	rstore *r;
} qredis;

static int rq_key(rstore *r, tm_buf *kb, const char *what)
{
	return sr_key_tagged(r->prefix, "r", what, kb);
}

/* The connection of the node that holds the queue (one hash tag). */
static redisContext *rq_conn(rstore *r)
{
	tm_buf kb = {0};
	redisContext *c = NULL;
	if (rq_key(r, &kb, "items") == 0)
		c = rc_conn(&r->k, slot_of(kb.data, kb.len));
	buf_free(&kb);
	if (!c)
		sr_kerr_up(r);
	return c;
}

static redisReply *rq_cmd(rstore *r, redisContext *c, int argc, const char **argv, const size_t *al)
{
	redisReply *rep = rc_command(c, argc, argv, al);
	if (!rep) {
		sr_err(r, "lost the connection", c->errstr[0] ? c->errstr : "no reply");
		return NULL;
	}
	if (rep->type == REDIS_REPLY_ERROR) {
		sr_err(r, "the server answered with an error", rep->str);
		freeReplyObject(rep);
		return NULL;
	}
	return rep;
}

static int rq_watch_load(rstore *r, int watch, tm_buf *out)
{
	tm_buf kb = {0};
	redisReply *rep;
	redisContext *c;
	int rc = -1;

	if (rq_key(r, &kb, "items") || !(c = rq_conn(r)))
		goto done;
	const char *w[2] = {"WATCH", kb.data}, *h[2] = {"HVALS", kb.data};
	size_t wl[2] = {5, kb.len}, hl[2] = {5, kb.len};
	if (watch) {
		if (!(rep = rq_cmd(r, c, 2, w, wl)))
			goto done;
		freeReplyObject(rep);
	}
	if (!(rep = rq_cmd(r, c, 2, h, hl)))
		goto done;
	if (rep->type != REDIS_REPLY_ARRAY) {
		freeReplyObject(rep);
		sr_err(r, "unexpected reply to HVALS", NULL);
		goto done;
	}
	rc = 0;
	for (size_t i = 0; i < rep->elements && !rc; i++) {
		redisReply *e = rep->element[i];
		if (e->type != REDIS_REPLY_STRING)
			rc = -1;
		else if (buf_append(out, e->str, e->len) || buf_putc(out, '\n'))
			rc = -1;
	}
	if (rc)
		sr_err(r, "unexpected reply to HVALS", NULL);
	freeReplyObject(rep);
done:
	buf_free(&kb);
	return rc;
}

static int rq_multi(rstore *r, const rq_put *puts, size_t nputs, const rq_ev *ev, size_t nev,
		    int *conflict)
{
	tm_buf items = {0}, log = {0};
	redisReply *rep = NULL;
	redisContext *c;
	size_t sent = 0;
	int rc = -1;

	*conflict = 0;
	if (rq_key(r, &items, "items") || rq_key(r, &log, "log") || !(c = rq_conn(r)))
		goto done;
	if (!nputs && !nev) {
		const char *u[1] = {"UNWATCH"};
		size_t ul[1] = {7};
		if ((rep = rq_cmd(r, c, 1, u, ul)))
			rc = 0;
		goto done;
	}
	redisAppendCommand(c, "MULTI");
	sent++;
	for (size_t i = 0; i < nputs; i++, sent++) {
		const char *av[4] = {"HSET", items.data, puts[i].id, puts[i].item};
		size_t al[4] = {4, items.len, puts[i].idlen, puts[i].itemlen};
		redisAppendCommandArgv(c, 4, av, al);
	}
	for (size_t i = 0; i < nev; i++, sent++) {
		const char *av[64];
		size_t al[64];
		int ac = 0;
		av[ac] = "XADD", al[ac++] = 4;
		av[ac] = log.data, al[ac++] = log.len;
		av[ac] = "*", al[ac++] = 1;
		for (const char *p = ev[i].fv; p < ev[i].fv + ev[i].len && ac < 64; p += al[ac++] + 1)
			av[ac] = p, al[ac] = strlen(p);
		redisAppendCommandArgv(c, ac, av, al);
	}
	redisAppendCommand(c, "EXEC");
	sent++;
	/* every queued command answers QUEUED; EXEC answers the results, or
	 * nil when the watched hash changed */
	for (size_t i = 0; i < sent; i++) {
		void *p = NULL;
		if (rc_get_reply(c, &p) != REDIS_OK || !p) {
			sr_err(r, "lost the connection", c->errstr[0] ? c->errstr : "no reply");
			goto done;
		}
		if (rep)
			freeReplyObject(rep);
		rep = p;
		if (rep->type == REDIS_REPLY_ERROR && (!strncmp(rep->str, "MOVED ", 6) ||
						       !strncmp(rep->str, "ASK ", 4))) {
			/* the queue's slot moved: read the map again and start over */
			for (i++; i < sent; i++)
				if (rc_get_reply(c, &p) == REDIS_OK && p)
					freeReplyObject(p);
			rc_refresh(&r->k);
			*conflict = 1;
			rc = 0;
			goto done;
		}
		if (rep->type == REDIS_REPLY_ERROR) {
			sr_err(r, "the server answered with an error", rep->str);
			/* read what is left, so the connection stays in step */
			for (i++; i < sent; i++)
				if (rc_get_reply(c, &p) == REDIS_OK && p)
					freeReplyObject(p);
			goto done;
		}
	}
	if (rep->type == REDIS_REPLY_NIL)
		*conflict = 1;
	else if (rep->type != REDIS_REPLY_ARRAY) {
		sr_err(r, "unexpected reply to EXEC", NULL);
		goto done;
	}
	rc = 0;
done:
	if (rep)
		freeReplyObject(rep);
	buf_free(&items);
	buf_free(&log);
	return rc;
}

/* Writes the changed items of q and their new events (one MULTI/EXEC). */
static int q_commit(rq_store *s, const rq_queue *q, int *conflict, tm_buf *warn, tm_buf *err)
{
	rstore *r = ((qredis *)s)->r;
	rq_put *puts = NULL;
	rq_ev *ev = NULL;
	tm_buf items = {0}, fv = {0};
	size_t np = 0, ne = 0, nput = 0, nevt = 0;
	size_t *ioff = NULL, *foff = NULL;
	int rc = -1;

	(void)warn;
	for (size_t i = 0; i < q->n; i++)
		if (q->it[i].changed) {
			nput++;
			nevt += q->it[i].nev - q->it[i].nev_stored;
		}
	puts = calloc(nput + 1, sizeof *puts);
	ev = calloc(nevt + 1, sizeof *ev);
	ioff = calloc(nput + 1, sizeof *ioff);
	foff = calloc(nevt + 1, sizeof *foff);
	if (!puts || !ev || !ioff || !foff)
		goto oom;
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if (!it->changed)
			continue;
		ioff[np++] = items.len;
		if (rq_item_json(it, &items))
			goto oom;
		items.len--; /* the newline */
		for (size_t k = it->nev_stored; k < it->nev; k++) {
			const rq_event *e = &it->ev[k];
			char num[32];
			const char *pairs[] = {"event", rq_what_names[e->what], "id", it->id,
					       "status", rq_status_name(it),
					       "kind", rq_kind_names[it->kind], "occupation", it->occ,
					       "lang", it->lang, "label", it->label, "at", e->at};
			foff[ne++] = fv.len;
			for (size_t j = 0; j < sizeof pairs / sizeof *pairs; j++)
				if (buf_append(&fv, pairs[j], strlen(pairs[j]) + 1))
					goto oom;
			snprintf(num, sizeof num, "%llu", (unsigned long long)e->postings);
			if (buf_append(&fv, "postings", 9) || buf_append(&fv, num, strlen(num) + 1))
				goto oom;
			if (e->reviewer && (buf_append(&fv, "reviewer", 9) ||
					    buf_append(&fv, e->reviewer, strlen(e->reviewer) + 1)))
				goto oom;
			if (e->note && (buf_append(&fv, "note", 5) ||
					buf_append(&fv, e->note, strlen(e->note) + 1)))
				goto oom;
		}
	}
	/* pointers only once the buffers stop moving */
	for (size_t i = 0, k = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if (!it->changed)
			continue;
		puts[k].id = it->id;
		puts[k].idlen = strlen(it->id);
		puts[k].item = items.data + ioff[k];
		puts[k].itemlen = (k + 1 < np ? ioff[k + 1] : items.len) - ioff[k];
		k++;
	}
	for (size_t k = 0; k < ne; k++) {
		ev[k].fv = fv.data + foff[k];
		ev[k].len = (k + 1 < ne ? foff[k + 1] : fv.len) - foff[k];
	}
	if (rq_multi(r, puts, np, ev, ne, conflict)) {
		rq_store_msg(err, NULL, r->base.err.data, NULL);
		goto done;
	}
	rc = 0;
	goto done;
oom:
	rq_store_msg(err, NULL, "out of memory", NULL);
done:
	free(puts);
	free(ev);
	free(ioff);
	free(foff);
	buf_free(&items);
	buf_free(&fv);
	return rc;
}

static int q_load(rq_store *s, int hold, int missing_ok, tm_buf *text, tm_buf *warn, tm_buf *err)
{
	rstore *r = ((qredis *)s)->r;
	(void)missing_ok; /* an empty queue is no queue yet */
	(void)warn;
	buf_reset(text);
	if (rq_watch_load(r, hold, text)) {
		rq_store_msg(err, NULL, r->base.err.data, NULL);
		return -1;
	}
	return 0;
}

static void q_release(rq_store *s)
{
	int conflict;
	rq_multi(((qredis *)s)->r, NULL, 0, NULL, 0, &conflict); /* UNWATCH */
}

static void q_close(rq_store *s)
{
	if (!s)
		return;
	store_close(&((qredis *)s)->r->base);
	free(s);
}

static const rq_store_ops redis_queue_ops = {q_load, q_commit, q_release, q_close};

rq_store *rq_store_redis_open(const char *url, const store_conf *conf, tm_buf *err)
{
	qredis *q = calloc(1, sizeof *q);
	store *st;
	if (!q) {
		buf_puts(err, "out of memory");
		return NULL;
	}
	if (!(st = store_open(url, conf, err))) {
		free(q);
		return NULL;
	}
	q->r = (rstore *)st;
	q->base.ops = &redis_queue_ops;
	q->base.name = "the store's review queue";
	return &q->base;
}

/* store_redis.c - the Redis store; the only module that knows hiredis.
 *
 * Key layout (every key starts with the prefix P; the part in braces is
 * the Redis Cluster hash tag, so all keys of one occupation share a slot):
 *   P:{o:OCC}:f   hash  LANG 1F KEY 1F TITLE -> postings of that form
 *   P:{o:OCC}:n   hash  LANG -> postings of the occupation
 *   P:{o:OCC}:x   hash  LANG 1F KEY -> up to three examples, each
 *                       16 hex digits of its hash then its text, joined
 *                       by 1E (kept: the smallest hashes)
 *   P:{k:NN}:k    hash  LANG 1F KEY -> postings whatever the occupation,
 *                       spread over 64 keys by the hash of the field
 *   P:{i:NN}:i    set   posting ids counted, spread over 64 keys
 *   P:{l}:chunks  set   digests of the chunks applied (the ledger)
 *   P:{r}:items   hash  review queue: suggestion id -> the item, one JSON
 *                       line (the same line as in a queue file)
 *   P:{r}:log     stream review events in the order they happened:
 *                       event, id, status, kind, occupation, lang, label,
 *                       at, and reviewer and note for decisions
 *
 * A chunk is applied by one Lua script, which Redis runs atomically: if
 * the ledger holds the chunk's digest it does nothing; if one of the
 * chunk's new posting ids has been counted meanwhile (another loader) it
 * does nothing and says so, and the client recounts the chunk; otherwise
 * it adds the ids, all the increments and the examples, and the digest
 * to the ledger.  So a chunk is counted once or not at all, whatever
 * fails when: a load killed or a server lost mid-load, run again, skips
 * what was applied and applies the rest.
 *
 * The review queue is changed optimistically: WATCH P:{r}:items, read it,
 * decide in the client, then MULTI, HSET the changed items, XADD the
 * events, EXEC.  If anyone wrote the hash in between, EXEC does nothing
 * and the client reads again and decides again, so the first of two
 * curators wins and the second is told.  Both keys share one hash tag. */
#include "store.h"

#include <errno.h>
#include <hiredis/hiredis.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "token.h"

#define SHARDS 64
#define SEP '\x1F'

static const char script[] =
	"if redis.call('SISMEMBER', KEYS[1], ARGV[1]) == 1 then return 0 end\n"
	"local i = 2\n"
	"local G = tonumber(ARGV[i]); i = i + 1\n"
	"local groups = {}\n"
	"for g = 1, G do\n"
	"  local k = KEYS[tonumber(ARGV[i])]; local c = tonumber(ARGV[i + 1]); i = i + 2\n"
	"  for j = i, i + c - 1, 256 do\n"
	"    local m = redis.call('SMISMEMBER', k, unpack(ARGV, j, math.min(j + 255, i + c - 1)))\n"
	"    for q = 1, #m do if m[q] == 1 then return -1 end end\n"
	"  end\n"
	"  groups[g] = {k, i, c}; i = i + c\n"
	"end\n"
	"for g = 1, G do\n"
	"  local k, s, c = groups[g][1], groups[g][2], groups[g][3]\n"
	"  for j = s, s + c - 1, 256 do\n"
	"    redis.call('SADD', k, unpack(ARGV, j, math.min(j + 255, s + c - 1)))\n"
	"  end\n"
	"end\n"
	"local H = tonumber(ARGV[i]); i = i + 1\n"
	"for h = 1, H do\n"
	"  redis.call('HINCRBY', KEYS[tonumber(ARGV[i])], ARGV[i + 1], ARGV[i + 2]); i = i + 3\n"
	"end\n"
	"local E = tonumber(ARGV[i]); i = i + 1\n"
	"for x = 1, E do\n"
	"  local k = KEYS[tonumber(ARGV[i])]; local f = ARGV[i + 1]; local n = tonumber(ARGV[i + 2])\n"
	"  local all, seen = {}, {}\n"
	"  local cur = redis.call('HGET', k, f)\n"
	"  if cur then for e in string.gmatch(cur, '[^\\30]+') do\n"
	"    if not seen[e] then seen[e] = 1; all[#all + 1] = e end end end\n"
	"  for j = i + 3, i + 2 + n do\n"
	"    local e = ARGV[j]; if not seen[e] then seen[e] = 1; all[#all + 1] = e end\n"
	"  end\n"
	"  table.sort(all)\n"
	"  local keep = {}\n"
	"  for j = 1, math.min(3, #all) do keep[j] = all[j] end\n"
	"  redis.call('HSET', k, f, table.concat(keep, '\\30'))\n"
	"  i = i + 3 + n\n"
	"end\n"
	"redis.call('SADD', KEYS[1], ARGV[1])\n"
	"return 1\n";

typedef struct rstore {
	store base;
	redisContext *c;
	char *host, *user, *pass, *path, *name;
	int port, db, retries, timeout_ms;
	char prefix[128];
	char sha[41];
	/* the current chunk: postings as records in one buffer */
	tm_buf chunk;
	size_t nchunk;
	/* building the script call */
	strtab keyidx;
	strtab exbound;         /* per title: 1 + the largest example hash the
				 * store can still hold, as this load knows it */
	tm_buf pending;
	tm_buf args;            /* all arguments back to back */
	size_t *argoff, *arglen, nargs, argcap;
} rstore;

/* A server that goes away must give an error, not kill the process:
 * SIGPIPE is held back while hiredis talks to the socket, and one raised
 * meanwhile is dropped.  (Standard output keeps the usual behaviour.) */
static void pipe_hold(sigset_t *old)
{
	sigset_t s;
	sigemptyset(&s);
	sigaddset(&s, SIGPIPE);
	sigprocmask(SIG_BLOCK, &s, old);
}

static void pipe_release(const sigset_t *old)
{
	sigset_t s, pend;
	struct timespec zero = {0, 0};
	sigemptyset(&s);
	sigaddset(&s, SIGPIPE);
	if (!sigismember(old, SIGPIPE) && sigpending(&pend) == 0 && sigismember(&pend, SIGPIPE))
		sigtimedwait(&s, NULL, &zero);
	sigprocmask(SIG_SETMASK, old, NULL);
}

static int get_reply(redisContext *c, void **rep)
{
	sigset_t old;
	pipe_hold(&old);
	int rc = redisGetReply(c, rep);
	pipe_release(&old);
	return rc;
}

static redisReply *command_argv(redisContext *c, int argc, const char **argv, const size_t *len)
{
	sigset_t old;
	pipe_hold(&old);
	redisReply *rep = redisCommandArgv(c, argc, argv, len);
	pipe_release(&old);
	return rep;
}

static void rerr(rstore *r, const char *what, const char *detail)
{
	char m[600];
	snprintf(m, sizeof m, "%s: %s%s%s", r->name, what, detail ? ": " : "",
		 detail ? detail : "");
	buf_reset(&r->base.err);
	buf_puts(&r->base.err, m);
}

static void sleep_ms(long ms)
{
	struct timespec ts = {ms / 1000, (ms % 1000) * 1000000L};
	nanosleep(&ts, NULL);
}

static redisReply *cmd(rstore *r, int argc, const char **argv, const size_t *len)
{
	redisReply *rep = command_argv(r->c, argc, argv, len);
	if (!rep) {
		rerr(r, "lost the connection", r->c->errstr[0] ? r->c->errstr : "no reply");
		return NULL;
	}
	if (rep->type == REDIS_REPLY_ERROR) {
		rerr(r, "the server answered with an error", rep->str);
		freeReplyObject(rep);
		return NULL;
	}
	return rep;
}

static redisReply *cmd1(rstore *r, const char *a, const char *b, const char *c)
{
	const char *v[3] = {a, b, c};
	size_t l[3] = {strlen(a), b ? strlen(b) : 0, c ? strlen(c) : 0};
	return cmd(r, c ? 3 : b ? 2 : 1, v, l);
}

static int connect_once(rstore *r)
{
	struct timeval tv = {r->timeout_ms / 1000, (r->timeout_ms % 1000) * 1000};
	redisReply *rep;

	if (r->c)
		redisFree(r->c);
	r->c = r->path ? redisConnectUnixWithTimeout(r->path, tv)
		       : redisConnectWithTimeout(r->host, r->port, tv);
	if (!r->c || r->c->err) {
		rerr(r, "cannot connect", r->c ? r->c->errstr : "out of memory");
		return -1;
	}
	redisSetTimeout(r->c, tv);
	if (r->pass) {
		rep = r->user ? cmd1(r, "AUTH", r->user, r->pass) : cmd1(r, "AUTH", r->pass, NULL);
		if (!rep)
			return -1; /* the message has the server's reason */
		freeReplyObject(rep);
	}
	if (r->db) {
		char db[16];
		snprintf(db, sizeof db, "%d", r->db);
		if (!(rep = cmd1(r, "SELECT", db, NULL)))
			return -1;
		freeReplyObject(rep);
	}
	/* a server that wants a password says so on the first command */
	if (!(rep = cmd1(r, "SCRIPT", "LOAD", script))) {
		if (strstr(r->base.err.data, "NOAUTH"))
			rerr(r, "the server requires a password",
			     "set TITLEMILL_REDIS_PASSWORD or put user:password@ in the URL");
		return -1;
	}
	if (rep->type != REDIS_REPLY_STRING || rep->len != 40) {
		freeReplyObject(rep);
		rerr(r, "unexpected reply to SCRIPT LOAD", NULL);
		return -1;
	}
	memcpy(r->sha, rep->str, 40);
	r->sha[40] = 0;
	freeReplyObject(rep);
	return 0;
}

/* Connects, with retries and growing back-off for a short outage. */
static int reconnect(rstore *r)
{
	long wait = 100;
	for (int a = 0;; a++) {
		if (connect_once(r) == 0)
			return 0;
		if (a >= r->retries)
			return -1;
		sleep_ms(wait);
		wait = wait * 2 > 2000 ? 2000 : wait * 2;
	}
}

/* ---- the chunk buffer ---- */

static int put(tm_buf *b, const char *s, size_t n)
{
	uint32_t l = (uint32_t)n;
	return buf_append(b, &l, sizeof l) || buf_append(b, s, n);
}

static const char *get(const char **p, size_t *n)
{
	uint32_t l;
	memcpy(&l, *p, sizeof l);
	*p += sizeof l;
	const char *s = *p;
	*p += l;
	*n = l;
	return s;
}

static int r_add(store *st, const tally_posting *p)
{
	rstore *r = (rstore *)st;
	uint32_t nocc = (uint32_t)p->nocc;
	if (put(&r->chunk, p->id ? p->id : "", p->id ? p->idlen : 0) ||
	    buf_putc(&r->chunk, p->id ? 1 : 0) || put(&r->chunk, p->lang, strlen(p->lang)) ||
	    put(&r->chunk, p->key, p->keylen) || put(&r->chunk, p->title, p->titlelen) ||
	    put(&r->chunk, p->example, p->examplelen) ||
	    buf_append(&r->chunk, &nocc, sizeof nocc)) {
		rerr(r, "out of memory", NULL);
		return -1;
	}
	for (size_t i = 0; i < p->nocc; i++)
		if (put(&r->chunk, p->occ[i], p->occlen[i])) {
			rerr(r, "out of memory", NULL);
			return -1;
		}
	r->nchunk++;
	return 0;
}

/* ---- building the script's arguments ---- */

static int arg(rstore *r, const char *s, size_t n)
{
	if (r->nargs == r->argcap) {
		size_t cap = r->argcap ? r->argcap * 2 : 4096;
		size_t *o = realloc(r->argoff, cap * sizeof *o), *l;
		if (!o)
			return -1;
		r->argoff = o;
		if (!(l = realloc(r->arglen, cap * sizeof *l)))
			return -1;
		r->arglen = l;
		r->argcap = cap;
	}
	r->argoff[r->nargs] = r->args.len;
	r->arglen[r->nargs] = n;
	r->nargs++;
	return buf_append(&r->args, s, n);
}

static int argnum(rstore *r, unsigned long long v)
{
	char b[24];
	int n = snprintf(b, sizeof b, "%llu", v);
	return arg(r, b, (size_t)n);
}

/* Index (1-based, as Lua sees KEYS) of a key, added when new. */
static long keyno(rstore *r, const char *k, size_t n)
{
	size_t idx;
	if (st_add(&r->keyidx, k, n, 0, &idx) < 0)
		return -1;
	return (long)idx + 1;
}

int store_key_occ(const char *prefix, const char *occ, size_t ol, char suffix, tm_buf *kb)
{
	buf_reset(kb);
	if (buf_puts(kb, prefix) || buf_puts(kb, ":{o:") || buf_append(kb, occ, ol) ||
	    buf_puts(kb, "}:") || buf_putc(kb, suffix))
		return -1;
	return 0;
}

int store_key_shard(const char *prefix, char kind, uint64_t h, tm_buf *kb)
{
	char t[64];
	snprintf(t, sizeof t, ":{%c:%02u}:%c", kind, (unsigned)(h % SHARDS), kind);
	buf_reset(kb);
	if (buf_puts(kb, prefix) || buf_puts(kb, t))
		return -1;
	return 0;
}

static int occkey(rstore *r, tm_buf *kb, const char *occ, size_t ol, char suffix)
{
	return store_key_occ(r->prefix, occ, ol, suffix, kb);
}

static void shard_key(rstore *r, tm_buf *kb, char kind, uint64_t h)
{
	store_key_shard(r->prefix, kind, h, kb);
}

/* Splits a joined key "a 1F b 1F c" into its first field and the rest. */
static size_t first_field(const char *s, size_t n)
{
	const char *x = memchr(s, SEP, n);
	return x ? (size_t)(x - s) : n;
}

/* One attempt at applying the chunk: 1 applied, 0 in the ledger, -1
 * failure (message set), -2 an id was counted meanwhile. */
static int attempt(rstore *r, const uint64_t digest[2], uint64_t *counted,
		   uint64_t *repub)
{
	tally_mem agg;
	strtab chunk_ids = {0};
	tm_buf kb = {0};
	const char *p, *end;
	size_t i, hpos, epos;
	long nh = 0, ne = 0;
	int rc = -1;
	char dg[40];
	redisReply *rep = NULL;
	/* ids per shard, and which are already counted */
	tm_buf shard_ids[SHARDS];
	size_t nshard[SHARDS];
	uint8_t *seen = NULL, *shard = NULL;
	size_t nids = 0;

	memset(shard_ids, 0, sizeof shard_ids);
	memset(nshard, 0, sizeof nshard);
	tm_init(&agg);
	st_free(&r->keyidx);
	buf_reset(&r->args);
	r->nargs = 0;
	*counted = *repub = 0;
	buf_reset(&r->pending);

	/* 1. the chunk's distinct ids, and which the server has */
	for (p = r->chunk.data, end = p + r->chunk.len; p < end;) {
		size_t n, l;
		const char *id = get(&p, &n);
		int has = *p++;
		get(&p, &l); get(&p, &l); get(&p, &l); get(&p, &l);
		uint32_t nocc;
		memcpy(&nocc, p, sizeof nocc);
		p += sizeof nocc;
		for (uint32_t k = 0; k < nocc; k++)
			get(&p, &l);
		if (!has)
			continue;
		if (st_add(&chunk_ids, id, n, 0, NULL) == 1)
			nids++;
	}
	if (nids) {
		seen = calloc(nids, 1);
		if (!seen)
			goto oom;
		/* SMISMEMBER per shard, pipelined */
		int sent[SHARDS];
		memset(sent, 0, sizeof sent);
		shard = malloc(chunk_ids.n);
		if (!shard)
			goto oom;
		for (i = 0; i < chunk_ids.n; i++)
			shard[i] = (uint8_t)(chunk_ids.ent[i].hash % SHARDS);
		for (int s = 0; s < SHARDS; s++) {
			size_t cnt = 0;
			for (i = 0; i < chunk_ids.n; i++)
				cnt += shard[i] == s;
			if (!cnt)
				continue;
			const char **av = malloc((cnt + 2) * sizeof *av);
			size_t *al = malloc((cnt + 2) * sizeof *al), q = 2;
			if (!av || !al) {
				free(av);
				free(al);
				goto oom;
			}
			shard_key(r, &kb, 'i', (uint64_t)s);
			av[0] = "SMISMEMBER";
			al[0] = 10;
			av[1] = kb.data;
			al[1] = kb.len;
			for (i = 0; i < chunk_ids.n; i++) {
				size_t n;
				const char *id = st_key(&chunk_ids, i, &n);
				if (shard[i] == s) {
					av[q] = id;
					al[q++] = n;
				}
			}
			int ok = redisAppendCommandArgv(r->c, (int)q, av, al) == REDIS_OK;
			free(av);
			free(al);
			if (!ok) {
				rerr(r, "lost the connection", r->c->errstr);
				goto fail;
			}
			sent[s] = 1;
		}
		for (int s = 0; s < SHARDS; s++) {
			if (!sent[s])
				continue;
			void *v;
			if (get_reply(r->c, &v) != REDIS_OK) {
				rerr(r, "lost the connection", r->c->errstr);
				goto fail;
			}
			redisReply *x = v;
			if (x->type != REDIS_REPLY_ARRAY) {
				rerr(r, "the server answered with an error",
				     x->type == REDIS_REPLY_ERROR ? x->str : "unexpected reply");
				freeReplyObject(x);
				goto fail;
			}
			size_t q = 0;
			for (i = 0; i < chunk_ids.n; i++)
				if (shard[i] == s) {
					if (q < x->elements && x->element[q]->integer == 1)
						seen[i] = 1;
					q++;
				}
			freeReplyObject(x);
		}
	}

	/* 2. aggregate the postings whose ids are new */
	for (p = r->chunk.data, end = p + r->chunk.len; p < end;) {
		size_t n, ll, kl, tl, xl;
		const char *id = get(&p, &n);
		int has = *p++;
		const char *lang = get(&p, &ll), *key = get(&p, &kl), *title = get(&p, &tl),
			   *ex = get(&p, &xl);
		uint32_t nocc;
		const char *occ[64];
		size_t occlen[64];
		char lg[4] = {0};
		memcpy(&nocc, p, sizeof nocc);
		p += sizeof nocc;
		for (uint32_t k = 0; k < nocc; k++)
			occ[k] = get(&p, &occlen[k]);
		memcpy(lg, lang, ll < 3 ? ll : 3);
		if (has) {
			long idx = st_find(&chunk_ids, id, n);
			size_t cidx;
			if (seen[idx] || st_add(&agg.ids, id, n, 0, &cidx) == 0) {
				(*repub)++;
				continue;
			}
			/* the id goes to its shard's SADD */
			uint64_t s = shard[idx];
			if (put(&shard_ids[s], id, n))
				goto oom;
			nshard[s]++;
		}
		tally_posting tp = {0};
		tp.lang = lg;
		tp.key = key;
		tp.keylen = kl;
		tp.title = title;
		tp.titlelen = tl;
		tp.example = ex;
		tp.examplelen = xl;
		tp.occ = occ;
		tp.occlen = occlen;
		tp.nocc = nocc;
		if (tm_add(&agg, &tp) < 0)
			goto oom;
		(*counted)++;
	}

	/* 3. the script's arguments: ledger first among the keys */
	snprintf(dg, sizeof dg, "%016llx%016llx", (unsigned long long)digest[0],
		 (unsigned long long)digest[1]);
	buf_reset(&kb);
	buf_puts(&kb, r->prefix);
	buf_puts(&kb, ":{l}:chunks");
	if (keyno(r, kb.data, kb.len) != 1 || arg(r, dg, 32))
		goto oom;
	int groups = 0;
	for (int s = 0; s < SHARDS; s++)
		groups += nshard[s] > 0;
	if (argnum(r, (unsigned long long)groups))
		goto oom;
	for (int s = 0; s < SHARDS; s++) {
		if (!nshard[s])
			continue;
		shard_key(r, &kb, 'i', (uint64_t)s);
		long kn = keyno(r, kb.data, kb.len);
		if (kn < 0 || argnum(r, (unsigned long long)kn) || argnum(r, nshard[s]))
			goto oom;
		const char *q = shard_ids[s].data, *qe = q + shard_ids[s].len;
		while (q < qe) {
			size_t n;
			const char *id = get(&q, &n);
			if (arg(r, id, n))
				goto oom;
		}
	}
	hpos = r->nargs;
	if (argnum(r, 0))
		goto oom;
	for (i = 0; i < agg.forms.n; i++) {
		size_t n;
		const char *k = st_key(&agg.forms, i, &n), *f;
		size_t ol = first_field(k, n);
		if (occkey(r, &kb, k, ol, 'f'))
			goto oom;
		long kn = keyno(r, kb.data, kb.len);
		f = k + ol + 1;
		if (kn < 0 || argnum(r, (unsigned long long)kn) || arg(r, f, n - ol - 1) ||
		    argnum(r, agg.forms.ent[i].count))
			goto oom;
		nh++;
	}
	for (i = 0; i < agg.occs.n; i++) {
		size_t n;
		const char *k = st_key(&agg.occs, i, &n);
		size_t ol = first_field(k, n);
		if (occkey(r, &kb, k, ol, 'n'))
			goto oom;
		long kn = keyno(r, kb.data, kb.len);
		if (kn < 0 || argnum(r, (unsigned long long)kn) || arg(r, k + ol + 1, n - ol - 1) ||
		    argnum(r, agg.occs.ent[i].count))
			goto oom;
		nh++;
	}
	for (i = 0; i < agg.keys.n; i++) {
		size_t n;
		const char *k = st_key(&agg.keys, i, &n);
		shard_key(r, &kb, 'k', tok_hash(k, n));
		long kn = keyno(r, kb.data, kb.len);
		if (kn < 0 || argnum(r, (unsigned long long)kn) || arg(r, k, n) ||
		    argnum(r, agg.keys.ent[i].count))
			goto oom;
		nh++;
	}
	epos = r->nargs;
	if (argnum(r, 0))
		goto oom;
	for (i = 0; i < agg.exkeys.n; i++) {
		size_t n;
		const char *k = st_key(&agg.exkeys, i, &n);
		size_t ol = first_field(k, n);
		const struct tm_example *e = &agg.ex[agg.exkeys.ent[i].count];
		/* the store keeps the three smallest hashes it was sent: once
		 * this load has sent three, it keeps none above the largest
		 * of them, and a candidate above that bound cannot enter */
		long known = st_find(&r->exbound, k, n);
		uint64_t bound = known >= 0 ? r->exbound.ent[known].count : 0; /* bound+1; 0 none */
		int take = 0, sendq[TALLY_EXAMPLES];
		uint64_t worst = 0;
		for (int q = 0; q < e->n; q++)
			if (!bound || e->h[q] < bound - 1)
				sendq[take++] = q;
		if (!take)
			continue;
		if (take == TALLY_EXAMPLES) {
			for (int q = 0; q < e->n; q++)
				if (e->h[q] > worst)
					worst = e->h[q];
			/* noted now, applied when the chunk has gone through */
			uint64_t w1 = worst + 1;
			if (put(&r->pending, k, n) || buf_append(&r->pending, &w1, sizeof w1))
				goto oom;
		}
		if (occkey(r, &kb, k, ol, 'x'))
			goto oom;
		long kn = keyno(r, kb.data, kb.len);
		if (kn < 0 || argnum(r, (unsigned long long)kn) || arg(r, k + ol + 1, n - ol - 1) ||
		    argnum(r, (unsigned long long)take))
			goto oom;
		for (int qq = 0; qq < take; qq++) {
			int q = sendq[qq];
			char hx[17];
			snprintf(hx, sizeof hx, "%016llx", (unsigned long long)e->h[q]);
			tm_buf eb = {0};
			if (buf_append(&eb, hx, 16) ||
			    buf_append(&eb, agg.exarena.data + e->off[q], e->len[q]) ||
			    arg(r, eb.data, eb.len)) {
				buf_free(&eb);
				goto oom;
			}
			buf_free(&eb);
		}
		ne++;
	}
	/* the counts of operations, now known */
	{
		char b[24];
		int l1 = snprintf(b, sizeof b, "%ld", nh);
		/* rewrite in place: the placeholder "0" was one byte */
		tm_buf fixed = {0};
		for (size_t a = 0; a < r->nargs; a++) {
			size_t off = fixed.len;
			if (a == hpos) {
				buf_append(&fixed, b, (size_t)l1);
			} else if (a == epos) {
				char e2[24];
				int l2 = snprintf(e2, sizeof e2, "%ld", ne);
				buf_append(&fixed, e2, (size_t)l2);
			} else
				buf_append(&fixed, r->args.data + r->argoff[a], r->arglen[a]);
			r->arglen[a] = fixed.len - off;
			r->argoff[a] = off;
		}
		buf_free(&r->args);
		r->args = fixed;
	}

	/* 4. EVALSHA sha nkeys keys... args... */
	{
		size_t nk = r->keyidx.n, total = 3 + nk + r->nargs, q = 0;
		const char **av = malloc(total * sizeof *av);
		size_t *al = malloc(total * sizeof *al);
		char nks[24];
		if (!av || !al) {
			free(av);
			free(al);
			goto oom;
		}
		snprintf(nks, sizeof nks, "%zu", nk);
		av[q] = "EVALSHA"; al[q++] = 7;
		av[q] = r->sha; al[q++] = 40;
		av[q] = nks; al[q++] = strlen(nks);
		for (i = 0; i < nk; i++) {
			av[q] = st_key(&r->keyidx, i, &al[q]);
			q++;
		}
		for (i = 0; i < r->nargs; i++) {
			av[q] = r->args.data + r->argoff[i];
			al[q++] = r->arglen[i];
		}
		rep = command_argv(r->c, (int)q, av, al);
		free(av);
		free(al);
	}
	if (!rep) {
		rerr(r, "lost the connection while applying a chunk", r->c->errstr);
		goto fail;
	}
	if (rep->type == REDIS_REPLY_ERROR) {
		if (!strncmp(rep->str, "NOSCRIPT", 8)) {
			/* a restarted server: load the script again */
			rerr(r, "the server lost the script", NULL);
			goto fail;
		}
		rerr(r, "the server refused the chunk", rep->str);
		goto fail;
	}
	if (rep->type != REDIS_REPLY_INTEGER) {
		rerr(r, "unexpected reply to the chunk script", NULL);
		goto fail;
	}
	rc = rep->integer == 1 ? 1 : rep->integer == 0 ? 0 : -2;
	if (rc == 1) {
		/* the examples' bounds, now that the chunk is in */
		const char *q = r->pending.data, *qe = q + r->pending.len;
		while (q < qe) {
			size_t n, kx;
			const char *k = get(&q, &n);
			uint64_t w1;
			memcpy(&w1, q, sizeof w1);
			q += sizeof w1;
			if (st_add(&r->exbound, k, n, 0, &kx) < 0)
				goto oom;
			if (!r->exbound.ent[kx].count || w1 < r->exbound.ent[kx].count)
				r->exbound.ent[kx].count = w1;
		}
	}
	goto done;
oom:
	rerr(r, "out of memory", NULL);
fail:
	rc = -1;
done:
	if (rep)
		freeReplyObject(rep);
	for (int s = 0; s < SHARDS; s++)
		buf_free(&shard_ids[s]);
	free(seen);
	free(shard);
	st_free(&chunk_ids);
	buf_free(&kb);
	tm_free(&agg);
	return rc;
}

static int r_commit(store *st, const uint64_t digest[2], int *applied)
{
	rstore *r = (rstore *)st;
	uint64_t counted, repub;
	int rc;

	*applied = 0;
	if (!r->nchunk)
		return 0;
	for (int round = 0;; round++) {
		rc = attempt(r, digest, &counted, &repub);
		if (rc >= 0)
			break;
		if (rc == -2 && round < 50)
			continue; /* another loader counted one of our ids: recount */
		if (rc == -2) {
			rerr(r, "other loaders keep counting this chunk's ids", NULL);
			return -1;
		}
		if (!strstr(r->base.err.data, "lost the") &&
		    !strstr(r->base.err.data, "LOADING") && !strstr(r->base.err.data, "script"))
			return -1;
		/* a short outage: reconnect and try the chunk again (the
		 * ledger says whether the lost attempt went through) */
		char first[600];
		snprintf(first, sizeof first, "%.*s", (int)r->base.err.len, r->base.err.data);
		if (round >= r->retries || reconnect(r) != 0) {
			buf_reset(&r->base.err);
			buf_puts(&r->base.err, first);
			return -1;
		}
	}
	if (rc == 1) {
		*applied = 1;
		st->applied++;
		st->counted += counted;
		st->republished += repub;
	} else
		st->skipped++;
	buf_reset(&r->chunk);
	r->nchunk = 0;
	return 0;
}

/* ---- reading back ---- */

static int scan_hash(rstore *r, const char *key, size_t kl, int kind, const char *occ,
		     size_t ol, tally_mem *m)
{
	char cursor[32] = "0";
	do {
		const char *av[5] = {"HSCAN", key, cursor, "COUNT", "1000"};
		size_t al[5] = {5, kl, strlen(cursor), 5, 4};
		redisReply *rep = cmd(r, 5, av, al);
		if (!rep)
			return -1;
		if (rep->type != REDIS_REPLY_ARRAY || rep->elements != 2) {
			freeReplyObject(rep);
			rerr(r, "unexpected reply to HSCAN", NULL);
			return -1;
		}
		snprintf(cursor, sizeof cursor, "%.*s", (int)rep->element[0]->len, rep->element[0]->str);
		redisReply *a = rep->element[1];
		for (size_t i = 0; i + 1 < a->elements; i += 2) {
			const char *f = a->element[i]->str, *v = a->element[i + 1]->str;
			size_t fl = a->element[i]->len, vl = a->element[i + 1]->len;
			uint64_t n = strtoull(v, NULL, 10);
			char lang[4] = {0};
			size_t l1 = first_field(f, fl);
			memcpy(lang, f, l1 < 3 ? l1 : 3);
			int bad = 0;
			if (kind == 'n')
				bad = tm_add_occ(m, occ, ol, lang, n);
			else if (kind == 'k')
				bad = tm_add_key(m, lang, f + l1 + 1, fl > l1 ? fl - l1 - 1 : 0, n);
			else if (kind == 'f') {
				const char *rest = f + l1 + 1;
				size_t rl = fl - l1 - 1, l2 = first_field(rest, rl);
				bad = tm_add_form(m, occ, ol, lang, rest, l2, rest + l2 + 1,
						  rl > l2 ? rl - l2 - 1 : 0, n);
			} else if (kind == 'x') {
				size_t s = 0;
				for (size_t j = 0; j <= vl && !bad; j++)
					if (j == vl || v[j] == '\x1E') {
						if (j - s > 16)
							bad = tm_add_example(m, occ, ol, lang, f + l1 + 1,
									     fl - l1 - 1, v + s + 16, j - s - 16);
						s = j + 1;
					}
			}
			if (bad) {
				freeReplyObject(rep);
				rerr(r, "out of memory", NULL);
				return -1;
			}
		}
		freeReplyObject(rep);
	} while (strcmp(cursor, "0"));
	return 0;
}

static int r_dump(store *st, tally_mem *m)
{
	rstore *r = (rstore *)st;
	char cursor[32] = "0", match[160];
	size_t pl = strlen(r->prefix);

	snprintf(match, sizeof match, "%s:*", r->prefix);
	do {
		const char *av[6] = {"SCAN", cursor, "MATCH", match, "COUNT", "1000"};
		size_t al[6] = {4, strlen(cursor), 5, strlen(match), 5, 4};
		redisReply *rep = cmd(r, 6, av, al);
		if (!rep)
			return -1;
		if (rep->type != REDIS_REPLY_ARRAY || rep->elements != 2) {
			freeReplyObject(rep);
			rerr(r, "unexpected reply to SCAN", NULL);
			return -1;
		}
		snprintf(cursor, sizeof cursor, "%.*s", (int)rep->element[0]->len, rep->element[0]->str);
		redisReply *a = rep->element[1];
		for (size_t i = 0; i < a->elements; i++) {
			const char *k = a->element[i]->str;
			size_t kl = a->element[i]->len;
			int rc = 0;
			if (kl > pl + 7 && !memcmp(k + pl, ":{o:", 4) && k[kl - 3] == '}' &&
			    k[kl - 2] == ':' && strchr("fnx", k[kl - 1]))
				rc = scan_hash(r, k, kl, k[kl - 1], k + pl + 4, kl - pl - 7, m);
			else if (kl == pl + 9 && !memcmp(k + pl, ":{k:", 4) && k[kl - 1] == 'k')
				rc = scan_hash(r, k, kl, 'k', NULL, 0, m);
			if (rc) {
				freeReplyObject(rep);
				return -1;
			}
		}
		freeReplyObject(rep);
	} while (strcmp(cursor, "0"));
	return 0;
}

static void r_close(store *st)
{
	rstore *r = (rstore *)st;
	if (!r)
		return;
	if (r->c)
		redisFree(r->c);
	free(r->host);
	free(r->user);
	free(r->pass);
	free(r->path);
	free(r->name);
	buf_free(&r->chunk);
	st_free(&r->keyidx);
	st_free(&r->exbound);
	buf_free(&r->pending);
	buf_free(&r->args);
	free(r->argoff);
	free(r->arglen);
	buf_free(&r->base.err);
	free(r);
}

/* ---- the review queue ---- */

static int rq_key(rstore *r, tm_buf *kb, const char *what)
{
	buf_reset(kb);
	return buf_puts(kb, r->prefix) || buf_puts(kb, ":{r}:") || buf_puts(kb, what) ? -1 : 0;
}

static int r_rq_load(store *st, tm_buf *out)
{
	rstore *r = (rstore *)st;
	tm_buf kb = {0};
	redisReply *rep;
	int rc = -1;

	if (rq_key(r, &kb, "items"))
		goto done;
	if (!(rep = cmd1(r, "WATCH", kb.data, NULL)))
		goto done;
	freeReplyObject(rep);
	if (!(rep = cmd1(r, "HVALS", kb.data, NULL)))
		goto done;
	if (rep->type != REDIS_REPLY_ARRAY) {
		freeReplyObject(rep);
		rerr(r, "unexpected reply to HVALS", NULL);
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
		rerr(r, "unexpected reply to HVALS", NULL);
	freeReplyObject(rep);
done:
	buf_free(&kb);
	return rc;
}

static int r_rq_commit(store *st, const store_rq_put *puts, size_t nputs,
		       const store_rq_event *ev, size_t nev, int *conflict)
{
	rstore *r = (rstore *)st;
	tm_buf items = {0}, log = {0};
	redisReply *rep = NULL;
	size_t sent = 0;
	int rc = -1;

	*conflict = 0;
	if (rq_key(r, &items, "items") || rq_key(r, &log, "log"))
		goto done;
	if (!nputs && !nev) {
		if ((rep = cmd1(r, "UNWATCH", NULL, NULL)))
			rc = 0;
		goto done;
	}
	redisAppendCommand(r->c, "MULTI");
	sent++;
	for (size_t i = 0; i < nputs; i++, sent++) {
		const char *av[4] = {"HSET", items.data, puts[i].id, puts[i].item};
		size_t al[4] = {4, items.len, puts[i].idlen, puts[i].itemlen};
		redisAppendCommandArgv(r->c, 4, av, al);
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
		redisAppendCommandArgv(r->c, ac, av, al);
	}
	redisAppendCommand(r->c, "EXEC");
	sent++;
	/* every queued command answers QUEUED; EXEC answers the results, or
	 * nil when the watched hash changed */
	for (size_t i = 0; i < sent; i++) {
		void *p = NULL;
		if (get_reply(r->c, &p) != REDIS_OK || !p) {
			rerr(r, "lost the connection", r->c->errstr[0] ? r->c->errstr : "no reply");
			goto done;
		}
		if (rep)
			freeReplyObject(rep);
		rep = p;
		if (rep->type == REDIS_REPLY_ERROR) {
			rerr(r, "the server answered with an error", rep->str);
			/* read what is left, so the connection stays in step */
			for (i++; i < sent; i++)
				if (get_reply(r->c, &p) == REDIS_OK && p)
					freeReplyObject(p);
			goto done;
		}
	}
	if (rep->type == REDIS_REPLY_NIL)
		*conflict = 1;
	else if (rep->type != REDIS_REPLY_ARRAY) {
		rerr(r, "unexpected reply to EXEC", NULL);
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

static const store_ops redis_ops = {r_add, r_commit, r_dump, r_close, r_rq_load, r_rq_commit};

/* redis://[user:password@]host:port[/db] or unix:/path */
static int parse_url(rstore *r, const char *url, tm_buf *err)
{
	const char *p;
	char *e;

	if (!strncmp(url, "unix:", 5)) {
		if (!url[5]) {
			buf_puts(err, "unix: wants a socket path, e.g. unix:/run/redis.sock");
			return -1;
		}
		r->path = strdup(url + 5);
		r->name = strdup(url);
		return r->path && r->name ? 0 : -1;
	}
	if (strncmp(url, "redis://", 8)) {
		buf_puts(err, "a store is redis://[user:password@]host:port[/db] or unix:/path, not '");
		buf_puts(err, url);
		buf_puts(err, "'");
		return -1;
	}
	p = url + 8;
	const char *at = strrchr(p, '@');
	if (at) {
		const char *colon = memchr(p, ':', (size_t)(at - p));
		if (colon) {
			if (colon > p)
				r->user = strndup(p, (size_t)(colon - p));
			r->pass = strndup(colon + 1, (size_t)(at - colon - 1));
		} else
			r->pass = strndup(p, (size_t)(at - p));
		p = at + 1;
	}
	const char *colon = strrchr(p, ':'), *slash = strchr(p, '/');
	if (!colon || (slash && colon > slash) || colon == p) {
		buf_puts(err, "redis:// wants host:port");
		return -1;
	}
	r->host = strndup(p, (size_t)(colon - p));
	errno = 0;
	long port = strtol(colon + 1, &e, 10);
	if (errno || e == colon + 1 || port < 1 || port > 65535 || (*e && *e != '/')) {
		buf_puts(err, "redis:// port must be a number from 1 to 65535");
		return -1;
	}
	r->port = (int)port;
	if (*e == '/') {
		char *e2;
		long db = strtol(e + 1, &e2, 10);
		if (e2 == e + 1 || *e2 || db < 0 || db > 1000000) {
			buf_puts(err, "redis:// database must be a number");
			return -1;
		}
		r->db = (int)db;
	}
	/* the name in messages never shows the password */
	char nm[300];
	snprintf(nm, sizeof nm, "redis://%s:%d%s", r->host, r->port, r->db ? "/db" : "");
	if (r->db)
		snprintf(nm, sizeof nm, "redis://%s:%d/%d", r->host, r->port, r->db);
	r->name = strdup(nm);
	return r->host && r->name ? 0 : -1;
}

store *store_open(const char *url, const store_conf *conf, tm_buf *err)
{
	rstore *r = calloc(1, sizeof *r);
	const char *env = getenv("TITLEMILL_REDIS_PASSWORD");

	if (!r) {
		buf_puts(err, "out of memory");
		return NULL;
	}
	r->base.ops = &redis_ops;
	r->retries = conf && conf->retries >= 0 ? conf->retries : 5;
	r->timeout_ms = conf && conf->timeout_ms > 0 ? conf->timeout_ms : 5000;
	snprintf(r->prefix, sizeof r->prefix, "%s",
		 conf && conf->prefix ? conf->prefix : "titlemill");
	if (parse_url(r, url, err) != 0) {
		r_close(&r->base);
		return NULL;
	}
	if (!r->pass && env && *env)
		r->pass = strdup(env);
	if (reconnect(r) != 0) {
		buf_append(err, r->base.err.data, r->base.err.len);
		r_close(&r->base);
		return NULL;
	}
	return &r->base;
}

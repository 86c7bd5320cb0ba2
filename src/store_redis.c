/* store_redis.c - the Redis store: one server or a Redis Cluster.  With
 * its router (cluster.c), the only module that knows hiredis.
 *
 * Key layout (every key starts with the prefix P; the part in braces is
 * the Redis Cluster hash tag, so all keys of one tag share a slot):
 *   P:{o:OCC}:f   hash  LANG 1F KEY 1F TITLE -> postings of that form
 *   P:{o:OCC}:n   hash  LANG -> postings of the occupation
 *   P:{o:OCC}:x   hash  LANG 1F KEY -> up to three examples, each
 *                       16 hex digits of its hash then its text, joined
 *                       by 1E (kept: the smallest hashes)
 *   P:{o:OCC}:L   set   the ledger of this tag: digests of the chunks
 *                       whose share of this occupation is applied
 *   P:{k:NN}:k    hash  LANG 1F KEY -> postings whatever the occupation,
 *                       spread over 64 keys by the hash of the field
 *   P:{k:NN}:L    set   the ledger of that key-total shard
 *   P:{i:NN}:i    hash  posting id -> the chunk that counts it (16 hex
 *                       digits of its digest), spread over 64 keys
 *   P:{j:D}:j     hash  the journal of chunk D (32 hex digits): its
 *                       postings, while it is being loaded (below)
 *   P:{j}:open    set   the digests of the journals there are
 *   P:{r}:items   hash  review queue: suggestion id -> the item, one JSON
 *                       line (the same line as in a queue file)
 *   P:{r}:log     stream review events in the order they happened:
 *                       event, id, status, kind, occupation, lang, label,
 *                       at, and reviewer and note for decisions
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
 * with k (cli_tally.c), so inputs of one run are distinct, as in memory.
 *
 * With a time to live (tally --ttl), the scripts renew it on every key
 * they touch, so the keys of a tag expire together, some time after the
 * last load that touched them.  The review queue never expires.
 *
 * The review queue is changed optimistically: WATCH P:{r}:items, read it,
 * decide in the client, then MULTI, HSET the changed items, XADD the
 * events, EXEC.  If anyone wrote the hash in between, EXEC does nothing
 * and the client reads again and decides again, so the first of two
 * curators wins and the second is told.  Both keys share one hash tag. */
#include "store.h"

#include <errno.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <time.h>

#include "cluster.h"
#include "postings.h"
#include "slot.h"
#include "token.h"

#define SHARDS 64
#define SEP '\x1F'

/* Step 1: KEYS[1] an id shard, ARGV[1] the chunk's owner tag, ARGV[2]
 * the time to live (0: none), then ids. */
static const char claim_script[] =
	"local k, d, out = KEYS[1], ARGV[1], {}\n"
	"for i = 3, #ARGV do\n"
	"  local o = redis.call('HGET', k, ARGV[i])\n"
	"  if not o then redis.call('HSET', k, ARGV[i], d); o = d end\n"
	"  out[i - 2] = (o == d) and 1 or 0\n"
	"end\n"
	"if tonumber(ARGV[2]) > 0 then redis.call('EXPIRE', k, ARGV[2]) end\n"
	"return out\n";

/* The largest count the store holds: Redis counts are signed 64-bit
 * (HINCRBY stops at 2^63 - 1), and a script stopped half way would apply
 * half a share; so each share is checked first, whole (in decimal, not
 * in the scripts' doubles), and refused whole if a count would pass
 * this bound. */
#define STORE_COUNT_MAX_S "9000000000000000000"

/* Step 3: KEYS[1] the tag's ledger, ARGV[1] the chunk's digest, ARGV[2]
 * the time to live of the tag's keys (0: none); then H and H triples
 * (key index, field, increment); then E and E groups (key index, field,
 * n, n examples).  The keys of a tag expire together. */
static const char apply_script[] =
	"if redis.call('SISMEMBER', KEYS[1], ARGV[1]) == 1 then return 0 end\n"
	"local i = 3\n"
	"local H = tonumber(ARGV[i]); i = i + 1\n"
	"local function over(a, b)\n"
	"  if #a < 18 and #b < 18 then return false end\n"
	"  local r, c, x, y = {}, 0, #a, #b\n"
	"  while x > 0 or y > 0 or c > 0 do\n"
	"    local d = c + (x > 0 and a:byte(x) - 48 or 0) + (y > 0 and b:byte(y) - 48 or 0)\n"
	"    r[#r + 1] = d % 10; c = (d - d % 10) / 10; x = x - 1; y = y - 1\n"
	"  end\n"
	"  local s = string.reverse(table.concat(r))\n"
	"  return #s > 19 or (#s == 19 and s > '" STORE_COUNT_MAX_S "')\n"
	"end\n"
	"for h = 1, H do\n"
	"  local k, f = KEYS[tonumber(ARGV[i])], ARGV[i + 1]\n"
	"  if over(redis.call('HGET', k, f) or '0', ARGV[i + 2]) then\n"
	"    return redis.error_reply('a count would pass " STORE_COUNT_MAX_S ", the most the store holds: ' .. k .. ' ' .. f)\n"
	"  end\n"
	"  i = i + 3\n"
	"end\n"
	"i = 4\n"
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
	"if tonumber(ARGV[2]) > 0 then\n"
	"  for j = 1, #KEYS do redis.call('EXPIRE', KEYS[j], ARGV[2]) end\n"
	"end\n"
	"return 1\n";

typedef struct rstore {
	store base;
	rcluster k;
	char *name;
	char prefix[STORE_PREFIX_MAX + 1];
	char sha_claim[41], sha_apply[41];
	char ttl[24];           /* seconds, as the scripts take it */
	/* the current chunk: postings as records in one buffer */
	tm_buf chunk;
	size_t nchunk;
	strtab exbound;         /* per title: 1 + the largest example hash the
				 * store can still hold, as this load knows it */
	tm_buf pending;
	/* test hook (TITLEMILL_TEST_KILL=claim:N or apply:N): the process
	 * kills itself with SIGKILL after the claims of its N-th chunk, or
	 * after half of that chunk's shares */
	int kill_stage;         /* 0 none, 1 claim, 2 apply */
	long kill_at, nattempt;
} rstore;

static void rerr(rstore *r, const char *what, const char *detail)
{
	char m[800];
	snprintf(m, sizeof m, "%s: %s%s%s", r->name, what, detail ? ": " : "",
		 detail ? detail : "");
	buf_reset(&r->base.err);
	buf_puts(&r->base.err, m);
}

/* The router's message as the store's. */
static void kerr_up(rstore *r)
{
	buf_reset(&r->base.err);
	buf_append(&r->base.err, r->k.err.data ? r->k.err.data : "", r->k.err.len);
	if (!r->k.cluster && !strncmp(r->base.err.data, r->name, strlen(r->name)))
		return;
	if (r->k.cluster) {
		/* name the cluster too */
		tm_buf b = {0};
		buf_puts(&b, r->name);
		buf_puts(&b, ": ");
		buf_append(&b, r->base.err.data, r->base.err.len);
		buf_free(&r->base.err);
		r->base.err = b;
	}
}

/* Loads the scripts on a new connection: also where a server that wants
 * a password says so. */
static int load_scripts(void *ctx, redisContext *c, tm_buf *err)
{
	rstore *r = ctx;
	const char *src[2] = {claim_script, apply_script};
	char *sha[2] = {r->sha_claim, r->sha_apply};
	for (int i = 0; i < 2; i++) {
		const char *av[3] = {"SCRIPT", "LOAD", src[i]};
		size_t al[3] = {6, 4, strlen(src[i])};
		redisReply *rep = redisCommandArgv(c, 3, av, al);
		buf_reset(err);
		if (!rep) {
			buf_puts(err, "lost the connection");
			return -1;
		}
		if (rep->type == REDIS_REPLY_ERROR) {
			if (strstr(rep->str, "NOAUTH"))
				buf_puts(err, "the server requires a password: set TITLEMILL_REDIS_PASSWORD "
					      "or put user:password@ in the URL");
			else {
				buf_puts(err, "the server refused the script: ");
				buf_puts(err, rep->str);
			}
			freeReplyObject(rep);
			return -1;
		}
		if (rep->type != REDIS_REPLY_STRING || rep->len != 40) {
			freeReplyObject(rep);
			buf_puts(err, "unexpected reply to SCRIPT LOAD");
			return -1;
		}
		memcpy(sha[i], rep->str, 40);
		sha[i][40] = 0;
		freeReplyObject(rep);
	}
	return 0;
}

/* One command routed by the slot of its key argv[1]; the reply, or NULL
 * with the message set (error replies become messages). */
static redisReply *cmd(rstore *r, int argc, const char **argv, const size_t *len)
{
	rc_cmd c = {argc, argv, len, argc > 1 ? slot_of(argv[1], len[1]) : 0, NULL};
	if (rc_run(&r->k, &c, 1) != 0) {
		kerr_up(r);
		return NULL;
	}
	if (c.reply->type == REDIS_REPLY_ERROR) {
		rerr(r, "the server answered with an error", c.reply->str);
		freeReplyObject(c.reply);
		return NULL;
	}
	return c.reply;
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

int store_prefix_check(const char *p, tm_buf *err)
{
	size_t n = strlen(p);
	char m[160];
	if (!n || n > STORE_PREFIX_MAX) {
		snprintf(m, sizeof m, "a key prefix has 1 to %d characters, not %zu", STORE_PREFIX_MAX, n);
		buf_puts(err, m);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		unsigned char c = (unsigned char)p[i];
		if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
		      c == '.' || c == '_' || c == ':' || c == '-')) {
			snprintf(m, sizeof m, "a key prefix is made of letters, digits and . _ : - "
				 "(character %zu is not)", i + 1);
			buf_puts(err, m);
			return -1;
		}
	}
	return 0;
}

/* The SCAN MATCH pattern of the keys prefix + rest, where rest is a
 * glob: the prefix's characters are escaped, so whatever it holds it
 * matches only itself. */
static int match_pattern(const char *prefix, const char *rest, tm_buf *out)
{
	buf_reset(out);
	for (const char *c = prefix; *c; c++)
		if ((strchr("*?[]\\", *c) && buf_putc(out, '\\')) || buf_putc(out, *c))
			return -1;
	return buf_puts(out, rest);
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

/* Splits a joined key "a 1F b 1F c" into its first field and the rest. */
static size_t first_field(const char *s, size_t n)
{
	const char *x = memchr(s, SEP, n);
	return x ? (size_t)(x - s) : n;
}


/* A script call being built: its KEYS (KEYS[1] the ledger) and its
 * arguments, increments and examples apart until the counts are known. */
typedef struct call {
	strtab keys;
	tm_buf h, e;            /* put()-framed arguments */
	size_t nhargs, neargs;
	long nh, ne;
	unsigned slot;
} call;

typedef struct calls {
	strtab tags;            /* key without its last letter -> call + 1 */
	call *v;
	size_t n, cap;
} calls;

static void calls_free(calls *cs)
{
	for (size_t i = 0; i < cs->n; i++) {
		st_free(&cs->v[i].keys);
		buf_free(&cs->v[i].h);
		buf_free(&cs->v[i].e);
	}
	free(cs->v);
	st_free(&cs->tags);
}

/* The call of key's tag (made with the tag's ledger as KEYS[1] when
 * new) and key's index among its KEYS (1-based); NULL when out of memory. */
static call *call_for(calls *cs, const char *key, size_t kl, long *kn)
{
	size_t ti, ki;
	int fresh = st_add(&cs->tags, key, kl - 1, 0, &ti);
	if (fresh < 0)
		return NULL;
	if (fresh) {
		if (cs->n == cs->cap) {
			size_t cap = cs->cap ? cs->cap * 2 : 64;
			call *p = realloc(cs->v, cap * sizeof *p);
			if (!p)
				return NULL;
			cs->v = p;
			cs->cap = cap;
		}
		call *c = &cs->v[cs->n];
		memset(c, 0, sizeof *c);
		tm_buf lk = {0};
		if (buf_append(&lk, key, kl - 1) || buf_putc(&lk, 'L') ||
		    st_add(&c->keys, lk.data, lk.len, 0, NULL) < 0) {
			buf_free(&lk);
			return NULL;
		}
		c->slot = slot_of(lk.data, lk.len);
		buf_free(&lk);
		cs->tags.ent[ti].count = ++cs->n;
	}
	call *c = &cs->v[cs->tags.ent[ti].count - 1];
	if (st_add(&c->keys, key, kl, 0, &ki) < 0)
		return NULL;
	*kn = (long)ki + 1;
	return c;
}

static int putnum(tm_buf *b, unsigned long long v)
{
	char s[24];
	int n = snprintf(s, sizeof s, "%llu", v);
	return put(b, s, (size_t)n);
}

/* An increment of field in key by v. */
static int add_incr(calls *cs, const char *key, size_t kl, const char *f, size_t fl, uint64_t v)
{
	long kn;
	call *c = call_for(cs, key, kl, &kn);
	if (!c || putnum(&c->h, (unsigned long long)kn) || put(&c->h, f, fl) ||
	    putnum(&c->h, (unsigned long long)v))
		return -1;
	c->nhargs += 3;
	c->nh++;
	return 0;
}

/* The increments of a table keyed "OCC 1F field": each into the
 * occupation's hash with that suffix ('f' forms, 'n' totals). */
static int add_occ_incrs(rstore *r, calls *cs, const strtab *t, char suffix, tm_buf *kb)
{
	for (size_t i = 0; i < t->n; i++) {
		size_t n;
		const char *k = st_key(t, i, &n);
		size_t ol = first_field(k, n);
		if (store_key_occ(r->prefix, k, ol, suffix, kb) ||
		    add_incr(cs, kb->data, kb->len, k + ol + 1, n - ol - 1, t->ent[i].count))
			return -1;
	}
	return 0;
}

/* Runs the batch and frees the replies; out[i] gets the integer reply of
 * cmds[i] (or -1 for an error reply, whose text goes to the message). */
static int run_batch(rstore *r, rc_cmd *cmds, size_t n, long long *ints, const char *what)
{
	int rc = 0;
	if (rc_run(&r->k, cmds, n) != 0) {
		kerr_up(r);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		redisReply *x = cmds[i].reply;
		if (x->type == REDIS_REPLY_ERROR) {
			if (!rc)
				rerr(r, what, x->str);
			rc = -1;
		} else if (ints)
			ints[i] = x->type == REDIS_REPLY_INTEGER ? x->integer : -1;
	}
	return rc;
}

static void hexdigest(const uint64_t digest[2], char dg[40])
{
	snprintf(dg, 40, "%016llx%016llx", (unsigned long long)digest[0],
		 (unsigned long long)digest[1]);
}

/* Applies the buffered chunk: 1 applied (some share was new), 0 every
 * share was in its ledger, -1 failure (message set). */
static int attempt(rstore *r, const uint64_t digest[2], uint64_t *counted, uint64_t *repub)
{
	tally_mem agg;
	strtab chunk_ids = {0};
	calls cs = {0};
	tm_buf kb = {0}, kb2 = {0};
	const char *p, *end;
	size_t i;
	int rc = -1;
	char dg[40], owner[17];
	uint8_t *mine = NULL;
	rc_cmd *cmds = NULL;
	const char ***avs = NULL;
	size_t **als = NULL, ncmd = 0;
	long long *res = NULL;

	tm_init(&agg);
	*counted = *repub = 0;
	buf_reset(&r->pending);
	hexdigest(digest, dg);
	memcpy(owner, dg, 16);
	owner[16] = 0;

	/* 1. the chunk's distinct ids, claimed shard by shard */
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
		if (has && st_add(&chunk_ids, id, n, 0, NULL) < 0)
			goto oom;
	}
	mine = calloc(chunk_ids.n + 1, 1);
	cmds = calloc(SHARDS, sizeof *cmds);
	avs = calloc(SHARDS, sizeof *avs);
	als = calloc(SHARDS, sizeof *als);
	char (*shkeys)[160] = calloc(SHARDS, 160);
	if (!mine || !cmds || !avs || !als || !shkeys) {
		free(shkeys);
		goto oom;
	}
	{
		size_t cnt[SHARDS] = {0};
		int which[SHARDS];
		for (i = 0; i < chunk_ids.n; i++)
			cnt[chunk_ids.ent[i].hash % SHARDS]++;
		for (int s = 0; s < SHARDS; s++) {
			if (!cnt[s])
				continue;
			store_key_shard(r->prefix, 'i', (uint64_t)s, &kb);
			snprintf(shkeys[ncmd], 160, "%s", kb.data);
			avs[ncmd] = malloc((cnt[s] + 6) * sizeof **avs);
			als[ncmd] = malloc((cnt[s] + 6) * sizeof **als);
			if (!avs[ncmd] || !als[ncmd]) {
				ncmd++;
				free(shkeys);
				goto oom;
			}
			size_t q = 0;
			avs[ncmd][q] = "EVALSHA", als[ncmd][q++] = 7;
			avs[ncmd][q] = r->sha_claim, als[ncmd][q++] = 40;
			avs[ncmd][q] = "1", als[ncmd][q++] = 1;
			avs[ncmd][q] = shkeys[ncmd], als[ncmd][q++] = strlen(shkeys[ncmd]);
			avs[ncmd][q] = owner, als[ncmd][q++] = 16;
			avs[ncmd][q] = r->ttl, als[ncmd][q++] = strlen(r->ttl);
			for (i = 0; i < chunk_ids.n; i++)
				if (chunk_ids.ent[i].hash % SHARDS == (uint64_t)s) {
					avs[ncmd][q] = st_key(&chunk_ids, i, &als[ncmd][q]);
					q++;
				}
			cmds[ncmd] = (rc_cmd){(int)q, avs[ncmd], als[ncmd],
					      slot_of(shkeys[ncmd], strlen(shkeys[ncmd])), NULL};
			which[ncmd] = s;
			ncmd++;
		}
		if (rc_run(&r->k, cmds, ncmd) != 0) {
			kerr_up(r);
			free(shkeys);
			goto fail;
		}
		for (size_t c = 0; c < ncmd; c++) {
			redisReply *x = cmds[c].reply;
			int s = which[c];
			size_t q = 0;
			if (x->type != REDIS_REPLY_ARRAY) {
				rerr(r, "the server refused the ids",
				     x->type == REDIS_REPLY_ERROR ? x->str : "unexpected reply");
				free(shkeys);
				goto fail;
			}
			for (i = 0; i < chunk_ids.n; i++)
				if (chunk_ids.ent[i].hash % SHARDS == (uint64_t)s) {
					if (q < x->elements && x->element[q]->integer == 1)
						mine[i] = 1;
					q++;
				}
		}
		for (size_t c = 0; c < ncmd; c++) {
			freeReplyObject(cmds[c].reply);
			cmds[c].reply = NULL;
			free(avs[c]);
			free(als[c]);
			avs[c] = NULL;
			als[c] = NULL;
		}
		ncmd = 0;
	}
	free(shkeys);
	if (r->kill_stage == 1 && r->nattempt == r->kill_at)
		raise(SIGKILL);

	/* 2. aggregate the postings the chunk owns */
	for (p = r->chunk.data, end = p + r->chunk.len; p < end;) {
		size_t n, ll, kl, tl, xl;
		const char *id = get(&p, &n);
		int has = *p++;
		const char *lang = get(&p, &ll), *key = get(&p, &kl), *title = get(&p, &tl),
			   *ex = get(&p, &xl);
		uint32_t nocc;
		const char *occ[PR_MAXOCC];
		size_t occlen[PR_MAXOCC];
		char lg[4] = {0};
		memcpy(&nocc, p, sizeof nocc);
		p += sizeof nocc;
		for (uint32_t k = 0; k < nocc; k++)
			occ[k] = get(&p, &occlen[k]);
		memcpy(lg, lang, ll < 3 ? ll : 3);
		if (has) {
			long idx = st_find(&chunk_ids, id, n);
			if (!mine[idx] || st_add(&agg.ids, id, n, 0, NULL) == 0) {
				(*repub)++;
				continue;
			}
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

	/* 3. the shares, one script call per hash tag */
	if (add_occ_incrs(r, &cs, &agg.forms, 'f', &kb) || add_occ_incrs(r, &cs, &agg.occs, 'n', &kb))
		goto oom;
	for (i = 0; i < agg.keys.n; i++) {
		size_t n;
		const char *k = st_key(&agg.keys, i, &n);
		if (store_key_shard(r->prefix, 'k', tok_hash(k, n), &kb) ||
		    add_incr(&cs, kb.data, kb.len, k, n, agg.keys.ent[i].count))
			goto oom;
	}
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
		long kn;
		call *c;
		if (store_key_occ(r->prefix, k, ol, 'x', &kb) ||
		    !(c = call_for(&cs, kb.data, kb.len, &kn)) ||
		    putnum(&c->e, (unsigned long long)kn) || put(&c->e, k + ol + 1, n - ol - 1) ||
		    putnum(&c->e, (unsigned long long)take))
			goto oom;
		for (int qq = 0; qq < take; qq++) {
			int q = sendq[qq];
			char hx[17];
			snprintf(hx, sizeof hx, "%016llx", (unsigned long long)e->h[q]);
			buf_reset(&kb2);
			if (buf_append(&kb2, hx, 16) ||
			    buf_append(&kb2, agg.exarena.data + e->off[q], e->len[q]) ||
			    put(&c->e, kb2.data, kb2.len))
				goto oom;
		}
		c->neargs += 3 + (size_t)take;
		c->ne++;
	}

	/* 4. EVALSHA sha nkeys keys... digest H ... E ..., every call at once */
	free(cmds);
	free(avs);
	free(als);
	cmds = calloc(cs.n + 1, sizeof *cmds);
	avs = calloc(cs.n + 1, sizeof *avs);
	als = calloc(cs.n + 1, sizeof *als);
	res = calloc(cs.n + 1, sizeof *res);
	char (*nums)[3][24] = calloc(cs.n + 1, sizeof *nums);
	if (!cmds || !avs || !als || !res || !nums) {
		free(nums);
		goto oom;
	}
	for (ncmd = 0; ncmd < cs.n; ncmd++) {
		call *c = &cs.v[ncmd];
		size_t nk = c->keys.n, total = 7 + nk + c->nhargs + c->neargs, q = 0;
		const char **av = avs[ncmd] = malloc(total * sizeof *av);
		size_t *al = als[ncmd] = malloc(total * sizeof *al);
		if (!av || !al) {
			ncmd++;
			free(nums);
			goto oom;
		}
		snprintf(nums[ncmd][0], 24, "%zu", nk);
		snprintf(nums[ncmd][1], 24, "%ld", c->nh);
		snprintf(nums[ncmd][2], 24, "%ld", c->ne);
		av[q] = "EVALSHA", al[q++] = 7;
		av[q] = r->sha_apply, al[q++] = 40;
		av[q] = nums[ncmd][0], al[q++] = strlen(nums[ncmd][0]);
		for (i = 0; i < nk; i++) {
			av[q] = st_key(&c->keys, i, &al[q]);
			q++;
		}
		av[q] = dg, al[q++] = 32;
		av[q] = r->ttl, al[q++] = strlen(r->ttl);
		av[q] = nums[ncmd][1], al[q++] = strlen(nums[ncmd][1]);
		for (const char *x = c->h.data, *xe = x + c->h.len; x < xe; q++)
			av[q] = get(&x, &al[q]);
		av[q] = nums[ncmd][2], al[q++] = strlen(nums[ncmd][2]);
		for (const char *x = c->e.data, *xe = x + c->e.len; x < xe; q++)
			av[q] = get(&x, &al[q]);
		cmds[ncmd] = (rc_cmd){(int)q, av, al, c->slot, NULL};
	}
	if (r->kill_stage == 2 && r->nattempt == r->kill_at) {
		run_batch(r, cmds, ncmd / 2, res, "the server refused a chunk");
		raise(SIGKILL);
	}
	int brc = run_batch(r, cmds, ncmd, res, "the server refused a chunk");
	free(nums);
	if (brc)
		goto fail;
	rc = 0;
	for (i = 0; i < ncmd; i++)
		if (res[i] == 1)
			rc = 1;
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
	if (cmds)
		for (i = 0; i < ncmd; i++)
			if (cmds[i].reply)
				freeReplyObject(cmds[i].reply);
	if (avs)
		for (i = 0; i < ncmd; i++) {
			free(avs[i]);
			free(als[i]);
		}
	free(cmds);
	free(avs);
	free(als);
	free(res);
	free(mine);
	st_free(&chunk_ids);
	calls_free(&cs);
	buf_free(&kb);
	buf_free(&kb2);
	tm_free(&agg);
	return rc;
}

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

/* Whether p..p+n is a chunk buffer as r_add writes them: every length
 * within the buffer, at most PR_MAXOCC occupations a posting (what
 * attempt() relies on); a journal is read from the server. */
static int chunk_ok(const char *p, size_t n)
{
	const char *end = p + n;
	while (p < end) {
		/* id, has-id byte, lang, key, title, example, occupations */
		for (int f = 0; f < 7; f++) {
			uint32_t l;
			if (f == 1) {
				if (end - p < 1)
					return 0;
				p++; /* has an id */
				continue;
			}
			if ((size_t)(end - p) < sizeof l)
				return 0;
			memcpy(&l, p, sizeof l);
			p += sizeof l;
			if (f == 6) {
				/* the number of occupations, then each */
				if (l > PR_MAXOCC)
					return 0;
				for (uint32_t k = 0; k < l; k++) {
					uint32_t ol;
					if ((size_t)(end - p) < sizeof ol)
						return 0;
					memcpy(&ol, p, sizeof ol);
					p += sizeof ol;
					if ((size_t)(end - p) < ol)
						return 0;
					p += ol;
				}
			} else {
				if ((size_t)(end - p) < l)
					return 0;
				p += l;
			}
		}
	}
	return 1;
}
static const char journal_magic[4] = {'T', 'M', 'J', '1'};

static int journal_key(rstore *r, const char *dg, tm_buf *kb)
{
	buf_reset(kb);
	return buf_puts(kb, r->prefix) || buf_puts(kb, ":{j:") || buf_append(kb, dg, 32) ||
			       buf_puts(kb, "}:j")
		       ? -1
		       : 0;
}

/* SADD (add) or SREM the digest dg in P:{j}:open. */
static int journal_index(rstore *r, int add, const char *dg)
{
	tm_buf kb = {0};
	int rc = -1;
	if (buf_puts(&kb, r->prefix) || buf_puts(&kb, ":{j}:open")) {
		rerr(r, "out of memory", NULL);
		goto done;
	}
	const char *av[3] = {add ? "SADD" : "SREM", kb.data, dg};
	size_t al[3] = {4, kb.len, 32};
	redisReply *rep = cmd(r, 3, av, al);
	if (!rep)
		goto done;
	freeReplyObject(rep);
	if (add && strcmp(r->ttl, "0")) {
		const char *ev[3] = {"EXPIRE", kb.data, r->ttl};
		size_t el[3] = {6, kb.len, strlen(r->ttl)};
		if (!(rep = cmd(r, 3, ev, el)))
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
		rerr(r, "out of memory", NULL);
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
	if (run_batch(r, cmds, npiece + 1, NULL, "the server refused the chunk's journal") == 0 &&
	    run_batch(r, cmds + npiece + 1, 1 + (size_t)ttl, NULL,
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
	redisReply *rep = cmd(r, 2, av, al);
	if (!rep)
		return -1;
	freeReplyObject(rep);
	return journal_index(r, 0, dg);
}

static int r_commit(store *st, const uint64_t digest[2], int *applied)
{
	rstore *r = (rstore *)st;
	uint64_t counted, repub;
	tm_buf key = {0};
	char dg[40];
	int rc;

	*applied = 0;
	if (!r->nchunk)
		return 0;
	hexdigest(digest, dg);
	if (journal_key(r, dg, &key)) {
		rerr(r, "out of memory", NULL);
		return -1;
	}
	r->nattempt++;
	/* the router waits out short outages and failovers itself */
	rc = journal_write(r, &key, dg);
	if (rc == 0)
		rc = attempt(r, digest, &counted, &repub);
	if (rc >= 0 && journal_drop(r, &key, dg) != 0)
		rc = -1;
	buf_free(&key);
	if (rc < 0)
		return -1;
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

/* Reads journal key into r->chunk: 1 done, 0 incomplete (no "n" yet) or
 * gone, -1 failure (message set). */
static int journal_read(rstore *r, const char *key, size_t kl)
{
	const char *av[3] = {"HGET", key, "n"};
	size_t al[3] = {4, kl, 1};
	redisReply *rep = cmd(r, 3, av, al);
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
		rerr(r, "a chunk's journal is unreadable (its piece count)", key);
		return -1;
	}
	buf_reset(&r->chunk);
	r->nchunk = 0;
	for (unsigned long i = 0; i <= n; i++) {
		snprintf(nb, sizeof nb, "%lu", i);
		av[2] = nb, al[2] = strlen(nb);
		if (!(rep = cmd(r, 3, av, al)))
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
			rerr(r, "out of memory", NULL);
			return -1;
		}
		freeReplyObject(rep);
		if (!ok) {
			rerr(r, "a chunk's journal is unreadable (written by another kind of machine?)", key);
			return -1;
		}
	}
	if (!chunk_ok(r->chunk.data, r->chunk.len)) {
		rerr(r, "a chunk's journal is unreadable (its postings)", key);
		return -1;
	}
	r->nchunk = 1;
	return 1;
}

static int r_settle(store *st)
{
	rstore *r = (rstore *)st;
	tm_buf kb = {0};
	redisReply *open = NULL;
	int rc = -1;

	if (r->nchunk) {
		rerr(r, "a chunk is still buffered", NULL);
		return -1;
	}
	if (buf_puts(&kb, r->prefix) || buf_puts(&kb, ":{j}:open")) {
		rerr(r, "out of memory", NULL);
		goto done;
	}
	const char *av[2] = {"SMEMBERS", kb.data};
	size_t al[2] = {8, kb.len};
	if (!(open = cmd(r, 2, av, al)))
		goto done;
	if (open->type != REDIS_REPLY_ARRAY) {
		rerr(r, "unexpected reply to SMEMBERS", kb.data);
		goto done;
	}
	rc = 0;
	for (size_t i = 0; i < open->elements && !rc; i++) {
		const redisReply *e = open->element[i];
		uint64_t digest[2], counted, repub;
		char h[17] = {0}, dg[33] = {0}, *e1, *e2;
		if (e->type != REDIS_REPLY_STRING || e->len != 32 ||
		    strspn(e->str, "0123456789abcdef") != 32)
			continue; /* not one of ours */
		memcpy(dg, e->str, 32);
		memcpy(h, dg, 16);
		digest[0] = strtoull(h, &e1, 16);
		memcpy(h, dg + 16, 16);
		digest[1] = strtoull(h, &e2, 16);
		if (journal_key(r, dg, &kb)) {
			rerr(r, "out of memory", NULL);
			rc = -1;
			break;
		}
		int got = journal_read(r, kb.data, kb.len);
		if (got == 1) {
			int a = attempt(r, digest, &counted, &repub);
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
			uint64_t n = 0;
			if (kind != 'x') {
				/* a count: digits only, and no more than 64 bits hold */
				char *e;
				errno = 0;
				n = vl && v[0] >= '0' && v[0] <= '9' ? strtoull(v, &e, 10) : 0;
				if (!vl || v[0] < '0' || v[0] > '9' || errno || e != v + vl) {
					rerr(r, "the store holds a count that is not a number", key);
					freeReplyObject(rep);
					return -1;
				}
			}
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
				rerr(r, bad == -2 ? "the counts add up past 2^64 - 1" : "out of memory",
				     bad == -2 ? key : NULL);
				return -1;
			}
		}
		freeReplyObject(rep);
	} while (strcmp(cursor, "0"));
	return 0;
}

/* Calls fn(ctx, key, length) for every key of every master that is the
 * prefix followed by what the glob rest matches; stops at fn's first
 * non-zero value and returns it (-1 with the message set on failure). */
static int scan_keys(rstore *r, const char *rest,
		     int (*fn)(rstore *r, void *ctx, const char *k, size_t kl), void *ctx)
{
	tm_buf match = {0};
	size_t pl = strlen(r->prefix);
	int rc = 0;

	if (match_pattern(r->prefix, rest, &match)) {
		rerr(r, "out of memory", NULL);
		return -1;
	}
	/* every master holds its share of the keys */
	for (size_t mi = 0; !rc && rc_master(&r->k, mi); mi++) {
		size_t node = rc_master(&r->k, mi) - 1;
		char cursor[32] = "0";
		do {
			const char *av[6] = {"SCAN", cursor, "MATCH", match.data, "COUNT", "1000"};
			size_t al[6] = {4, strlen(cursor), 5, match.len, 5, 4};
			redisContext *c = rc_node_conn(&r->k, node);
			redisReply *rep = c ? rc_command(c, 6, av, al) : NULL;
			if (!rep) {
				if (c)
					rerr(r, "lost the connection", c->errstr);
				else
					kerr_up(r);
				rc = -1;
				break;
			}
			if (rep->type != REDIS_REPLY_ARRAY || rep->elements != 2) {
				rerr(r, "unexpected reply to SCAN", rep->type == REDIS_REPLY_ERROR ? rep->str : NULL);
				freeReplyObject(rep);
				rc = -1;
				break;
			}
			snprintf(cursor, sizeof cursor, "%.*s", (int)rep->element[0]->len, rep->element[0]->str);
			redisReply *a = rep->element[1];
			for (size_t i = 0; i < a->elements && !rc; i++) {
				const char *k = a->element[i]->str;
				size_t kl = a->element[i]->len;
				/* (the pattern is escaped; the prefix checked all the same) */
				if (kl > pl && !memcmp(k, r->prefix, pl) && k[pl] == ':')
					rc = fn(r, ctx, k, kl);
			}
			freeReplyObject(rep);
		} while (!rc && strcmp(cursor, "0"));
	}
	buf_free(&match);
	return rc;
}

static int dump_key(rstore *r, void *ctx, const char *k, size_t kl)
{
	tally_mem *m = ctx;
	size_t pl = strlen(r->prefix);
	if (kl > pl + 7 && !memcmp(k + pl, ":{o:", 4) && k[kl - 3] == '}' &&
	    k[kl - 2] == ':' && strchr("fnx", k[kl - 1]))
		return scan_hash(r, k, kl, k[kl - 1], k + pl + 4, kl - pl - 7, m);
	if (kl == pl + 9 && !memcmp(k + pl, ":{k:", 4) && k[kl - 1] == 'k')
		return scan_hash(r, k, kl, 'k', NULL, 0, m);
	if (kl == pl + 39 && !memcmp(k + pl, ":{j:", 4))
		r->base.unfinished++;
	return 0;
}

static int r_dump(store *st, tally_mem *m)
{
	return scan_keys((rstore *)st, ":*", dump_key, m) ? -1 : 0;
}

static void r_close(store *st)
{
	rstore *r = (rstore *)st;
	if (!r)
		return;
	rc_close(&r->k);
	free(r->k.user);
	free(r->k.pass);
	free(r->k.name);
	free(r->name);
	buf_free(&r->chunk);
	st_free(&r->exbound);
	buf_free(&r->pending);
	buf_free(&r->base.err);
	free(r);
}

/* ---- the review queue ---- */

static int rq_key(rstore *r, tm_buf *kb, const char *what)
{
	buf_reset(kb);
	return buf_puts(kb, r->prefix) || buf_puts(kb, ":{r}:") || buf_puts(kb, what) ? -1 : 0;
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
		kerr_up(r);
	return c;
}

static redisReply *rq_cmd(rstore *r, redisContext *c, int argc, const char **argv, const size_t *al)
{
	redisReply *rep = rc_command(c, argc, argv, al);
	if (!rep) {
		rerr(r, "lost the connection", c->errstr[0] ? c->errstr : "no reply");
		return NULL;
	}
	if (rep->type == REDIS_REPLY_ERROR) {
		rerr(r, "the server answered with an error", rep->str);
		freeReplyObject(rep);
		return NULL;
	}
	return rep;
}

static int r_rq_load(store *st, tm_buf *out)
{
	rstore *r = (rstore *)st;
	tm_buf kb = {0};
	redisReply *rep;
	redisContext *c;
	int rc = -1;

	if (rq_key(r, &kb, "items") || !(c = rq_conn(r)))
		goto done;
	const char *w[2] = {"WATCH", kb.data}, *h[2] = {"HVALS", kb.data};
	size_t wl[2] = {5, kb.len}, hl[2] = {5, kb.len};
	if (!(rep = rq_cmd(r, c, 2, w, wl)))
		goto done;
	freeReplyObject(rep);
	if (!(rep = rq_cmd(r, c, 2, h, hl)))
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
			rerr(r, "lost the connection", c->errstr[0] ? c->errstr : "no reply");
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
			rerr(r, "the server answered with an error", rep->str);
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

static const store_ops redis_ops = {r_add, r_commit, r_settle, r_dump, r_close, r_rq_load,
				    r_rq_commit};

/* redis://[user:password@]host:port[,host:port...][/db] or unix:/path;
 * several host:port are the seeds of a cluster (one is enough: the
 * router finds the others).  A host may be an IPv6 address in brackets,
 * [::1]:6379. */
typedef struct seeds {
	char *host[16], *path[16];
	int port[16];
	size_t n;
} seeds;

static const char url_forms[] =
	"a store is redis://[user:password@]host:port[,host:port...][/db] or unix:/path";

/* Puts url into err for a message, its user-info (which may hold a
 * password) replaced by "...@". */
static void url_shown(const char *url, tm_buf *err)
{
	const char *at = strrchr(url, '@');
	if (!at) {
		buf_puts(err, url);
		return;
	}
	const char *sch = strstr(url, "://");
	if (sch && sch < at)
		buf_append(err, url, (size_t)(sch + 3 - url));
	buf_puts(err, "...");
	buf_puts(err, at);
}

static int parse_url(rstore *r, const char *url, seeds *sd, tm_buf *err)
{
	const char *p;
	char *e;

	if (!strncmp(url, "unix:", 5)) {
		if (!url[5]) {
			buf_puts(err, "unix: wants a socket path, e.g. unix:/run/redis.sock");
			return -1;
		}
		sd->path[0] = strdup(url + 5);
		sd->n = 1;
		r->name = strdup(url);
		return sd->path[0] && r->name ? 0 : -1;
	}
	if (!strncasecmp(url, "rediss://", 9)) {
		/* hiredis 0.14 (Debian 12) has no TLS: better no store than a
		 * password and the counts sent in the clear */
		buf_puts(err, "rediss:// (TLS) is not supported by this build: reach the server over "
			      "a Unix socket or a TLS tunnel (e.g. stunnel) and give redis:// or unix: here");
		return -1;
	}
	if (strncasecmp(url, "redis://", 8)) {
		buf_puts(err, url_forms);
		buf_puts(err, ", not '");
		url_shown(url, err);
		buf_puts(err, "'");
		return -1;
	}
	p = url + 8;
	const char *at = strrchr(p, '@');
	if (at) {
		const char *colon = memchr(p, ':', (size_t)(at - p));
		if (colon) {
			if (colon > p)
				r->k.user = strndup(p, (size_t)(colon - p));
			r->k.pass = strndup(colon + 1, (size_t)(at - colon - 1));
		} else
			r->k.pass = strndup(p, (size_t)(at - p));
		p = at + 1;
	}
	const char *slash = strchr(p, '/');
	const char *hosts_end = slash ? slash : p + strlen(p);
	while (p < hosts_end) {
		const char *comma = memchr(p, ',', (size_t)(hosts_end - p));
		const char *he = comma ? comma : hosts_end;
		const char *colon = NULL, *hs = p, *hz;
		if (*p == '[') {
			/* [IPv6]:port */
			const char *rb = memchr(p, ']', (size_t)(he - p));
			if (!rb || rb == p + 1 || rb + 1 == he || rb[1] != ':') {
				buf_puts(err, "redis:// wants [IPv6 address]:port");
				return -1;
			}
			for (const char *q = p + 1; q < rb; q++)
				if (!strchr("0123456789abcdefABCDEF:.", *q)) {
					buf_puts(err, "redis:// wants an IPv6 address between [ and ]");
					return -1;
				}
			hs = p + 1;
			hz = rb;
			colon = rb + 1;
		} else {
			for (const char *q = p; q < he; q++)
				if (*q == ':')
					colon = q;
			hz = colon;
		}
		if (!colon || colon == p) {
			buf_puts(err, "redis:// wants host:port");
			return -1;
		}
		if (sd->n == 16) {
			buf_puts(err, "redis:// takes at most 16 seed nodes");
			return -1;
		}
		errno = 0;
		long port = strtol(colon + 1, &e, 10);
		if (errno || e == colon + 1 || port < 1 || port > 65535 || e != he) {
			buf_puts(err, "redis:// port must be a number from 1 to 65535");
			return -1;
		}
		sd->host[sd->n] = strndup(hs, (size_t)(hz - hs));
		sd->port[sd->n++] = (int)port;
		p = comma ? comma + 1 : hosts_end;
	}
	if (!sd->n) {
		buf_puts(err, "redis:// wants host:port");
		return -1;
	}
	if (slash) {
		char *e2;
		long db = strtol(slash + 1, &e2, 10);
		if (e2 == slash + 1 || *e2 || db < 0 || db > 1000000) {
			buf_puts(err, "redis:// database must be a number");
			return -1;
		}
		r->k.db = (int)db;
	}
	/* the name in messages never shows the password */
	char nm[300], db[16] = "";
	int v6 = strchr(sd->host[0], ':') != NULL;
	if (r->k.db)
		snprintf(db, sizeof db, "/%d", r->k.db);
	snprintf(nm, sizeof nm, "redis://%s%s%s:%d%s%s", v6 ? "[" : "", sd->host[0], v6 ? "]" : "",
		 sd->port[0], sd->n > 1 ? ",..." : "", db);
	r->name = strdup(nm);
	return r->name ? 0 : -1;
}

store *store_open(const char *url, const store_conf *conf, tm_buf *err)
{
	rstore *r = calloc(1, sizeof *r);
	const char *env = getenv("TITLEMILL_REDIS_PASSWORD");
	seeds sd = {0};
	store *out = NULL;

	if (!r) {
		buf_puts(err, "out of memory");
		return NULL;
	}
	r->base.ops = &redis_ops;
	r->k.retries = conf && conf->retries >= 0 ? conf->retries : 5;
	r->k.timeout_ms = conf && conf->timeout_ms > 0 ? conf->timeout_ms : 5000;
	r->k.on_connect = load_scripts;
	const char *kill = getenv("TITLEMILL_TEST_KILL");
	if (kill && (!strncmp(kill, "claim:", 6) || !strncmp(kill, "apply:", 6))) {
		r->kill_stage = kill[0] == 'c' ? 1 : 2;
		r->kill_at = strtol(kill + 6, NULL, 10);
	}
	r->k.ctx = r;
	const char *prefix = conf && conf->prefix ? conf->prefix : "titlemill";
	if (store_prefix_check(prefix, err) != 0) {
		r_close(&r->base);
		return NULL;
	}
	memcpy(r->prefix, prefix, strlen(prefix) + 1);
	snprintf(r->ttl, sizeof r->ttl, "%lld", conf && conf->ttl_s > 0 ? conf->ttl_s : 0LL);
	if (parse_url(r, url, &sd, err) != 0) {
		r_close(&r->base);
		goto done;
	}
	if (!r->k.pass && env && *env)
		r->k.pass = strdup(env);
	r->k.name = strdup(r->name);
	/* a short outage at the start is waited out like one later on */
	long wait = 100;
	for (int a = 0;; a++) {
		if (rc_open(&r->k, sd.host, sd.port, sd.path, sd.n) == 0)
			break;
		if (a >= r->k.retries || strstr(r->k.err.data, "password") ||
		    strstr(r->k.err.data, "not a Redis Cluster") || strstr(r->k.err.data, "database 0")) {
			kerr_up(r);
			buf_append(err, r->base.err.data, r->base.err.len);
			r_close(&r->base);
			goto done;
		}
		rc_close(&r->k);
		struct timespec ts = {wait / 1000, (wait % 1000) * 1000000L};
		nanosleep(&ts, NULL);
		wait = wait * 2 > 2000 ? 2000 : wait * 2;
	}
	out = &r->base;
done:
	for (size_t i = 0; i < sd.n; i++)
		free(sd.host[i]);
	free(sd.path[0]);
	return out;
}

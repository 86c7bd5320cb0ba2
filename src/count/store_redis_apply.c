/* store_redis_apply.c - one attempt at a chunk (the steps of
 * store_redis_chunk.c): claim its ids shard by shard, aggregate the
 * postings it owns, split them into shares by hash tag, and apply each
 * share with one script in its own slot, which skips a share its ledger
 * holds. */
#include "count/store_redis.h"

#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "count/chunk.h"
#include "count/slot.h"
#include "norm/token.h"

/* Step 1: KEYS[1] an id shard, ARGV[1] the chunk's owner tag, ARGV[2]
 * the time to live (0: none), then ids. */
const char sr_claim_script[] =
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
const char sr_apply_script[] =
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

/* A script call being built: its KEYS (KEYS[1] the ledger) and its
 * arguments, increments and examples apart until the counts are known. */
typedef struct call {
	strtab keys;
	tm_buf h, e;            /* chunk_put_str-framed arguments */
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
		call *v = tm_grow(cs->v, &cs->cap, cs->n + 1, sizeof *v, 64);
		if (!v)
			return NULL;
		cs->v = v;
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
	return chunk_put_str(b, s, (size_t)n);
}

/* An increment of field in key by v. */
static int add_incr(calls *cs, const char *key, size_t kl, const char *f, size_t fl, uint64_t v)
{
	long kn;
	call *c = call_for(cs, key, kl, &kn);
	if (!c || putnum(&c->h, (unsigned long long)kn) || chunk_put_str(&c->h, f, fl) ||
	    putnum(&c->h, (unsigned long long)v))
		return -1;
	c->nhargs += 3;
	c->nh++;
	return 0;
}

/* The increments of a table keyed "OCC 1F field": each into the
 * occupation's hash with that suffix ('f' forms, 'n' totals). */
static int add_occ_incrs(const rstore *r, calls *cs, const strtab *t, char suffix, tm_buf *kb)
{
	for (size_t i = 0; i < t->n; i++) {
		size_t n;
		const char *k = st_key(t, i, &n);
		size_t ol = sr_first_field(k, n);
		if (store_key_occ(r->prefix, k, ol, suffix, kb) ||
		    add_incr(cs, kb->data, kb->len, k + ol + 1, n - ol - 1, t->ent[i].count))
			return -1;
	}
	return 0;
}

/* An argument vector being built for one command. */
typedef struct argv_b {
	const char **v;
	size_t *l;
	size_t n;
} argv_b;

static int argv_init(argv_b *a, size_t cap)
{
	a->n = 0;
	a->v = malloc(cap * sizeof *a->v);
	a->l = malloc(cap * sizeof *a->l);
	return a->v && a->l ? 0 : -1;
}

static void argv_push(argv_b *a, const char *s, size_t n)
{
	a->v[a->n] = s;
	a->l[a->n++] = n;
}

static void argv_free(argv_b *a)
{
	free(a->v);
	free(a->l);
	a->v = NULL;
	a->l = NULL;
}

/* A batch of commands with their argument vectors; freed whole. */
typedef struct batch {
	rc_cmd *cmds;
	argv_b *args;
	size_t n;
} batch;

static int batch_init(batch *b, size_t cap)
{
	b->n = 0;
	b->cmds = calloc(cap + 1, sizeof *b->cmds);
	b->args = calloc(cap + 1, sizeof *b->args);
	return b->cmds && b->args ? 0 : -1;
}

static void batch_free(batch *b)
{
	for (size_t i = 0; b->cmds && i < b->n; i++) {
		if (b->cmds[i].reply)
			freeReplyObject(b->cmds[i].reply);
		argv_free(&b->args[i]);
	}
	free(b->cmds);
	free(b->args);
	memset(b, 0, sizeof *b);
}

/* Step 1: claims the chunk's distinct ids (ids), shard by shard, for
 * the chunk (owner: the first 16 hex digits of its digest); mine[i] = 1
 * for each id the chunk owns.  Returns 0 or -1. */
static int claim(rstore *r, const strtab *ids, const char *owner, uint8_t *mine)
{
	size_t cnt[SR_SHARDS] = {0};
	int which[SR_SHARDS];
	char (*shkeys)[160] = calloc(SR_SHARDS, 160);
	tm_buf kb = {0};
	batch b;
	int rc = -1;

	if (batch_init(&b, SR_SHARDS) || !shkeys) {
		sr_err(r, "out of memory", NULL);
		goto done;
	}
	for (size_t i = 0; i < ids->n; i++)
		cnt[ids->ent[i].hash % SR_SHARDS]++;
	for (int s = 0; s < SR_SHARDS; s++) {
		if (!cnt[s])
			continue;
		argv_b *a = &b.args[b.n];
		if (store_key_shard(r->prefix, 'i', (uint64_t)s, &kb) || argv_init(a, cnt[s] + 6)) {
			b.n++;
			sr_err(r, "out of memory", NULL);
			goto done;
		}
		snprintf(shkeys[b.n], 160, "%s", kb.data);
		argv_push(a, "EVALSHA", 7);
		argv_push(a, r->sha_claim, 40);
		argv_push(a, "1", 1);
		argv_push(a, shkeys[b.n], strlen(shkeys[b.n]));
		argv_push(a, owner, 16);
		argv_push(a, r->ttl, strlen(r->ttl));
		for (size_t i = 0; i < ids->n; i++)
			if (ids->ent[i].hash % SR_SHARDS == (uint64_t)s) {
				size_t n;
				const char *id = st_key(ids, i, &n);
				argv_push(a, id, n);
			}
		b.cmds[b.n] = (rc_cmd){(int)a->n, a->v, a->l,
				       slot_of(shkeys[b.n], strlen(shkeys[b.n])), NULL};
		which[b.n++] = s;
	}
	if (rc_run(&r->k, b.cmds, b.n) != 0) {
		sr_kerr_up(r);
		goto done;
	}
	for (size_t c = 0; c < b.n; c++) {
		redisReply *x = b.cmds[c].reply;
		size_t q = 0;
		if (x->type != REDIS_REPLY_ARRAY) {
			sr_err(r, "the server refused the ids",
			       x->type == REDIS_REPLY_ERROR ? x->str : "unexpected reply");
			goto done;
		}
		for (size_t i = 0; i < ids->n; i++)
			if (ids->ent[i].hash % SR_SHARDS == (uint64_t)which[c]) {
				if (q < x->elements && x->element[q]->integer == 1)
					mine[i] = 1;
				q++;
			}
	}
	rc = 0;
done:
	batch_free(&b);
	free(shkeys);
	buf_free(&kb);
	return rc;
}

/* The examples of a triple (joined key k) that can still enter the
 * store, added to call c; a bound is noted in r->pending once three are
 * sent.  Returns 0 or -1 (out of memory). */
static int add_examples(rstore *r, calls *cs, const tally_mem *agg, size_t i, tm_buf *kb,
			tm_buf *kb2)
{
	size_t n;
	const char *k = st_key(&agg->exkeys, i, &n);
	size_t ol = sr_first_field(k, n);
	const struct tm_example *e = &agg->ex[agg->exkeys.ent[i].count];
	/* the store keeps the three smallest hashes it was sent: once this
	 * load has sent three, it keeps none above the largest of them, and
	 * a candidate above that bound cannot enter */
	long known = st_find(&r->exbound, k, n);
	uint64_t bound = known >= 0 ? r->exbound.ent[known].count : 0; /* bound+1; 0 none */
	int take = 0, sendq[TALLY_EXAMPLES];
	uint64_t worst = 0;
	for (int q = 0; q < e->n; q++)
		if (!bound || e->h[q] < bound - 1)
			sendq[take++] = q;
	if (!take)
		return 0;
	if (take == TALLY_EXAMPLES) {
		for (int q = 0; q < e->n; q++)
			if (e->h[q] > worst)
				worst = e->h[q];
		/* noted now, applied when the chunk has gone through */
		uint64_t w1 = worst + 1;
		if (chunk_put_str(&r->pending, k, n) || buf_append(&r->pending, &w1, sizeof w1))
			return -1;
	}
	long kn;
	call *c;
	if (store_key_occ(r->prefix, k, ol, 'x', kb) || !(c = call_for(cs, kb->data, kb->len, &kn)) ||
	    putnum(&c->e, (unsigned long long)kn) || chunk_put_str(&c->e, k + ol + 1, n - ol - 1) ||
	    putnum(&c->e, (unsigned long long)take))
		return -1;
	for (int qq = 0; qq < take; qq++) {
		int q = sendq[qq];
		char hx[17];
		snprintf(hx, sizeof hx, "%016llx", (unsigned long long)e->h[q]);
		buf_reset(kb2);
		if (buf_append(kb2, hx, 16) || buf_append(kb2, agg->exarena.data + e->off[q], e->len[q]) ||
		    chunk_put_str(&c->e, kb2->data, kb2->len))
			return -1;
	}
	c->neargs += 3 + (size_t)take;
	c->ne++;
	return 0;
}

/* Step 2: the shares of what the chunk owns (agg), one script call per
 * hash tag.  Returns 0 or -1 (out of memory). */
static int shares(rstore *r, const tally_mem *agg, calls *cs)
{
	tm_buf kb = {0}, kb2 = {0};
	int rc = -1;

	if (add_occ_incrs(r, cs, &agg->forms, 'f', &kb) || add_occ_incrs(r, cs, &agg->occs, 'n', &kb))
		goto done;
	for (size_t i = 0; i < agg->keys.n; i++) {
		size_t n;
		const char *k = st_key(&agg->keys, i, &n);
		if (store_key_shard(r->prefix, 'k', tok_hash(k, n), &kb) ||
		    add_incr(cs, kb.data, kb.len, k, n, agg->keys.ent[i].count))
			goto done;
	}
	for (size_t i = 0; i < agg->exkeys.n; i++)
		if (add_examples(r, cs, agg, i, &kb, &kb2))
			goto done;
	rc = 0;
done:
	buf_free(&kb);
	buf_free(&kb2);
	return rc;
}

/* Step 3: EVALSHA sha nkeys keys... digest ttl H ... E ..., every call
 * at once: 1 some share was new, 0 none, -1 failure (message set). */
static int apply(rstore *r, const calls *cs, const char *dg)
{
	batch b;
	long long *res = calloc(cs->n + 1, sizeof *res);
	char (*nums)[3][24] = calloc(cs->n + 1, sizeof *nums);
	int rc = -1;

	if (batch_init(&b, cs->n) || !res || !nums) {
		sr_err(r, "out of memory", NULL);
		goto done;
	}
	for (; b.n < cs->n; b.n++) {
		const call *c = &cs->v[b.n];
		size_t nk = c->keys.n;
		argv_b *a = &b.args[b.n];
		if (argv_init(a, 7 + nk + c->nhargs + c->neargs)) {
			b.n++;
			sr_err(r, "out of memory", NULL);
			goto done;
		}
		snprintf(nums[b.n][0], 24, "%zu", nk);
		snprintf(nums[b.n][1], 24, "%ld", c->nh);
		snprintf(nums[b.n][2], 24, "%ld", c->ne);
		argv_push(a, "EVALSHA", 7);
		argv_push(a, r->sha_apply, 40);
		argv_push(a, nums[b.n][0], strlen(nums[b.n][0]));
		for (size_t i = 0; i < nk; i++) {
			size_t n;
			const char *k = st_key(&c->keys, i, &n);
			argv_push(a, k, n);
		}
		argv_push(a, dg, 32);
		argv_push(a, r->ttl, strlen(r->ttl));
		argv_push(a, nums[b.n][1], strlen(nums[b.n][1]));
		for (const char *x = c->h.data, *xe = x + c->h.len; x < xe; a->n++)
			a->v[a->n] = chunk_get_str(&x, &a->l[a->n]);
		argv_push(a, nums[b.n][2], strlen(nums[b.n][2]));
		for (const char *x = c->e.data, *xe = x + c->e.len; x < xe; a->n++)
			a->v[a->n] = chunk_get_str(&x, &a->l[a->n]);
		b.cmds[b.n] = (rc_cmd){(int)a->n, a->v, a->l, c->slot, NULL};
	}
	if (r->kill_stage == 2 && r->nattempt == r->kill_at) {
		sr_run_batch(r, b.cmds, b.n / 2, res, "the server refused a chunk");
		raise(SIGKILL);
	}
	if (sr_run_batch(r, b.cmds, b.n, res, "the server refused a chunk"))
		goto done;
	rc = 0;
	for (size_t i = 0; i < b.n; i++)
		if (res[i] == 1)
			rc = 1;
done:
	batch_free(&b);
	free(res);
	free(nums);
	return rc;
}

/* Keeps the examples' bounds an applied chunk noted.  0 or -1. */
static int keep_bounds(rstore *r)
{
	const char *q = r->pending.data, *qe = q + r->pending.len;
	while (q < qe) {
		size_t n, kx;
		const char *k = chunk_get_str(&q, &n);
		uint64_t w1;
		memcpy(&w1, q, sizeof w1);
		q += sizeof w1;
		if (st_add(&r->exbound, k, n, 0, &kx) < 0)
			return -1;
		if (!r->exbound.ent[kx].count || w1 < r->exbound.ent[kx].count)
			r->exbound.ent[kx].count = w1;
	}
	return 0;
}

int sr_attempt(rstore *r, const uint64_t digest[2], uint64_t *counted, uint64_t *repub)
{
	tally_mem agg;
	strtab ids = {0};
	calls cs = {0};
	chunk_rec rec;
	const char *p, *end = r->chunk.data + r->chunk.len;
	uint8_t *mine = NULL;
	char dg[33];
	int rc = -1, got;

	tm_init(&agg);
	*counted = *repub = 0;
	buf_reset(&r->pending);
	chunk_hex(digest, dg);

	/* 1. the chunk's distinct ids, claimed */
	for (p = r->chunk.data; (got = chunk_next(&p, end, &rec)) == 1;)
		if (rec.p.id && st_add(&ids, rec.p.id, rec.p.idlen, 0, NULL) < 0)
			goto oom;
	if (got < 0)
		goto bad;
	if (!(mine = calloc(ids.n + 1, 1)))
		goto oom;
	if (claim(r, &ids, dg, mine))
		goto done;
	if (r->kill_stage == 1 && r->nattempt == r->kill_at)
		raise(SIGKILL);

	/* 2. the postings the chunk owns (and those without an id) */
	for (p = r->chunk.data; (got = chunk_next(&p, end, &rec)) == 1;) {
		if (rec.p.id) {
			long idx = st_find(&ids, rec.p.id, rec.p.idlen);
			if (!mine[idx] || ids_add(&agg.ids, rec.p.id, rec.p.idlen) == 0) {
				(*repub)++;
				continue;
			}
		}
		rec.p.id = NULL; /* the ids are settled: count it */
		if (tm_add(&agg, &rec.p) < 0)
			goto oom;
		(*counted)++;
	}
	if (got < 0)
		goto bad;

	/* 3. the shares, applied */
	if (shares(r, &agg, &cs))
		goto oom;
	rc = apply(r, &cs, dg);
	if (rc == 1 && keep_bounds(r))
		goto oom;
	goto done;
bad:
	sr_err(r, "a chunk's postings are unreadable", NULL);
	rc = -1;
	goto done;
oom:
	sr_err(r, "out of memory", NULL);
	rc = -1;
done:
	free(mine);
	st_free(&ids);
	calls_free(&cs);
	tm_free(&agg);
	return rc;
}

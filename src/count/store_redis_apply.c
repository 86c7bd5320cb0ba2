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

/* Step 1: KEYS[1] an id shard, ARGV[1] the chunk's owner tag, ARGV[2]
 * the time to live (0: none), then the chunk's ids in that shard (each
 * once).  The ids are looked up a thousand at a time with one HMGET, and
 * those without an owner become the chunk's with one HSET: the script
 * runs alone, so no other claim comes between the two, and an id is
 * given to its first claimant as by HSETNX.  The answer is one character
 * per id, '1' for an id the chunk owns (new, or already this chunk's: a
 * rerun).  The field "" (no posting id is empty) holds a note longer than
 * a small hash's values may be (the server's hash-max-listpack-value, 64
 * bytes by default), so the shard is a hash table from its first claim:
 * a small hash is a list the server searches end to end, and the first
 * few hundred ids of each shard would each cost a search of all. */
const char sr_claim_script[] =
	"local k, d, out, n = KEYS[1], ARGV[1], {}, #ARGV\n"
	"redis.call('HSETNX', k, '', '" SR_ID_NOTE "')\n"
	"for a = 3, n, 1000 do\n"
	"  local z = math.min(a + 999, n)\n"
	"  local cur, set, m = redis.call('HMGET', k, unpack(ARGV, a, z)), {}, 0\n"
	"  for i = a, z do\n"
	"    local c = cur[i - a + 1]\n"
	"    if not c then m = m + 2; set[m - 1] = ARGV[i]; set[m] = d; out[i - 2] = '1'\n"
	"    elseif c == d then out[i - 2] = '1'\n"
	"    else out[i - 2] = '0' end\n"
	"  end\n"
	"  if m > 0 then redis.call('HSET', k, unpack(set, 1, m)) end\n"
	"end\n"
	"if tonumber(ARGV[2]) > 0 then redis.call('EXPIRE', k, ARGV[2]) end\n"
	"return table.concat(out)\n";

/* The largest count the store holds: Redis counts are signed 64-bit
 * (HINCRBY stops at 2^63 - 1), and a script stopped half way would apply
 * half a share.  So a share is applied whole or not at all: each
 * increment whose result comes near the bound (in the scripts' doubles,
 * which are exact far below it) is checked in decimal, and when one
 * passes it (or HINCRBY refuses, e.g. past 2^63 - 1) the increments made
 * so far are taken back before the script answers with the error.  No
 * one sees the difference: a script runs alone. */
#define STORE_COUNT_MAX_S "9000000000000000000"

/* Step 3: KEYS[1] the tag's ledger, ARGV[1] the chunk's digest, ARGV[2]
 * the time to live of the tag's keys (0: none); then G and G groups of
 * increments, one per key: its index in KEYS, m, m fields, m increments;
 * then X and X groups of examples, one per key: its index, m, m fields,
 * m candidate lists (each at most three examples, joined by 1E, in
 * order).  A field's examples are merged with the candidates, read with
 * one HMGET and written with one HSET per thousand fields, only those
 * that changed; the merge takes the first three of both lists, each
 * once (a stored value in another order is sorted first; a single
 * candidate for a field without examples is taken as it is).  The
 * merge's shortcut (kept): a stored value of three examples whose 16-digit
 * hashes rise strictly and whose third hash is below the first
 * candidate's (the candidates come by hash, so below all of theirs) is
 * what the merge would give back, so it is neither taken apart nor
 * written; the memory engine keeps the same three (tally_mem.c: the
 * three distinct texts of smallest hash).  And a single candidate
 * (one) is put in its place among one to three stored examples that are
 * in order by slicing and joining, without the lists the merge builds.
 * Anything else, and equal hashes, goes through the merge.  The keys of
 * a tag expire together.  Every key but the ledger must be a hash (or
 * absent) before the first write: a script that fails half way keeps
 * what it wrote, so an examples key of another kind found after the
 * increments would leave them applied and the chunk unrecorded, to be
 * counted again by the rerun. */
const char sr_apply_script[] =
	"if redis.call('SISMEMBER', KEYS[1], ARGV[1]) == 1 then return 0 end\n"
	"for j = 2, #KEYS do\n"
	"  local t = redis.call('TYPE', KEYS[j]).ok\n"
	"  if t ~= 'hash' and t ~= 'none' then\n"
	"    return redis.error_reply('WRONGTYPE the store keeps a hash there, not a ' .. t .. ': ' .. KEYS[j])\n"
	"  end\n"
	"end\n"
	"local function undo(gl, jl)\n"
	"  local p = 4\n"
	"  for g = 1, gl do\n"
	"    local k, m = KEYS[tonumber(ARGV[p])], tonumber(ARGV[p + 1])\n"
	"    local f, v = p + 2, p + 2 + m\n"
	"    for j = 0, (g < gl and m or jl) - 1 do\n"
	"      if redis.call('HINCRBY', k, ARGV[f + j], -tonumber(ARGV[v + j])) == 0 then\n"
	"        redis.call('HDEL', k, ARGV[f + j]) end\n"
	"    end\n"
	"    p = v + m\n"
	"  end\n"
	"end\n"
	"local i = 4\n"
	"for g = 1, tonumber(ARGV[3]) do\n"
	"  local k, m = KEYS[tonumber(ARGV[i])], tonumber(ARGV[i + 1])\n"
	"  local f, v = i + 2, i + 2 + m\n"
	"  for j = 0, m - 1 do\n"
	"    local n = redis.pcall('HINCRBY', k, ARGV[f + j], ARGV[v + j])\n"
	"    local over = type(n) == 'table'\n"
	"    if over then\n"
	"      undo(g, j)\n"
	"      if not string.find(n.err, 'overflow', 1, true) then\n"
	"        return redis.error_reply(n.err .. ': ' .. k .. ' ' .. ARGV[f + j])\n"
	"      end\n"
	"    elseif n >= 8.99e18 then\n"
	"      local s = redis.call('HGET', k, ARGV[f + j])\n"
	"      if #s > 19 or (#s == 19 and s > '" STORE_COUNT_MAX_S "') then undo(g, j + 1); over = true end\n"
	"    end\n"
	"    if over then\n"
	"      return redis.error_reply('a count would pass " STORE_COUNT_MAX_S ", the most the store holds: ' .. k .. ' ' .. ARGV[f + j])\n"
	"    end\n"
	"  end\n"
	"  i = v + m\n"
	"end\n"
	;

/* The apply script's second part (joined to the first when loaded: one
 * script), the examples: the merge, its shortcuts, and the writes. */
const char sr_apply_examples[] =
	"local function entries(s)\n"
	"  local t, p = {}, 1\n"
	"  while true do\n"
	"    local q = string.find(s, '\\30', p, true)\n"
	"    local e = string.sub(s, p, (q or 0) - 1)\n"
	"    if e ~= '' then t[#t + 1] = e end\n"
	"    if not q then break end\n"
	"    p = q + 1\n"
	"  end\n"
	"  for j = 2, #t do\n"
	"    if not (t[j - 1] < t[j]) then\n"
	"      local seen, u = {}, {}\n"
	"      for _, e in ipairs(t) do if not seen[e] then seen[e] = 1; u[#u + 1] = e end end\n"
	"      table.sort(u)\n"
	"      return u\n"
	"    end\n"
	"  end\n"
	"  return t\n"
	"end\n"
	"local function merged(c, e)\n"
	"  local a, b, out, x, y = entries(c), entries(e), {}, 1, 1\n"
	"  while #out < 3 and (a[x] or b[y]) do\n"
	"    if not b[y] or (a[x] and a[x] < b[y]) then out[#out + 1] = a[x]; x = x + 1\n"
	"    elseif not a[x] or b[y] < a[x] then out[#out + 1] = b[y]; y = y + 1\n"
	"    else out[#out + 1] = a[x]; x = x + 1; y = y + 1 end\n"
	"  end\n"
	"  return table.concat(out, '\\30')\n"
	"end\n"
	"local function kept(c, e)\n"
	"  local p = string.find(c, '\\30', 1, true)\n"
	"  if not p or p < 17 then return false end\n"
	"  local q = string.find(c, '\\30', p + 1, true)\n"
	"  if not q or q < p + 17 or #c < q + 16 or string.find(c, '\\30', q + 1, true) then return false end\n"
	"  local h = string.sub(c, q + 1, q + 16)\n"
	"  if not (h < string.sub(e, 1, 16)) then return false end\n"
	"  local g = string.sub(c, p + 1, p + 16)\n"
	"  return g < h and string.sub(c, 1, 16) < g\n"
	"end\n"
	"local function one(c, e)\n"
	"  local p = string.find(c, '\\30', 1, true)\n"
	"  if not p then\n"
	"    if c == '' then return nil elseif c < e then return c .. '\\30' .. e elseif e < c then return e .. '\\30' .. c end\n"
	"    return c\n"
	"  end\n"
	"  local q = string.find(c, '\\30', p + 1, true)\n"
	"  local a, b = string.sub(c, 1, p - 1), string.sub(c, p + 1, (q or 0) - 1)\n"
	"  if a == '' or b == '' or not (a < b) then return nil end\n"
	"  if not q then\n"
	"    if e < a then return e .. '\\30' .. c elseif b < e then return c .. '\\30' .. e\n"
	"    elseif a < e and e < b then return a .. '\\30' .. e .. '\\30' .. b end\n"
	"    return c\n"
	"  end\n"
	"  local d = string.sub(c, q + 1)\n"
	"  if d == '' or string.find(d, '\\30', 1, true) or not (b < d) then return nil end\n"
	"  if e < a then return e .. '\\30' .. a .. '\\30' .. b\n"
	"  elseif a < e and e < b then return a .. '\\30' .. e .. '\\30' .. b\n"
	"  elseif b < e and e < d then return a .. '\\30' .. b .. '\\30' .. e end\n"
	"  return c\n"
	"end\n"
	"local X = tonumber(ARGV[i]); i = i + 1\n"
	"for g = 1, X do\n"
	"  local k, m = KEYS[tonumber(ARGV[i])], tonumber(ARGV[i + 1])\n"
	"  local f, v = i + 2, i + 2 + m\n"
	"  for a = 0, m - 1, 1000 do\n"
	"    local z = math.min(a + 999, m - 1)\n"
	"    local cur, set, s = redis.call('HMGET', k, unpack(ARGV, f + a, f + z)), {}, 0\n"
	"    for j = a, z do\n"
	"      local c, e = cur[j - a + 1], ARGV[v + j]\n"
	"      local w = e\n"
	"      local many = string.find(e, '\\30', 1, true)\n"
	"      if c then\n"
	"        if kept(c, e) then w = c else w = (not many and e ~= '' and one(c, e)) or merged(c, e) end\n"
	"      elseif many then w = merged('', e) end\n"
	"      if w ~= c then s = s + 2; set[s - 1] = ARGV[f + j]; set[s] = w end\n"
	"    end\n"
	"    if s > 0 then redis.call('HSET', k, unpack(set, 1, s)) end\n"
	"  end\n"
	"  i = v + m\n"
	"end\n"
	"redis.call('SADD', KEYS[1], ARGV[1])\n"
	"if tonumber(ARGV[2]) > 0 then\n"
	"  for j = 1, #KEYS do redis.call('EXPIRE', KEYS[j], ARGV[2]) end\n"
	"end\n"
	"return 1\n";

/* What a call sends for one of its keys: its increments (the fields,
 * then the values) and its examples (the fields, then the candidate
 * lists), chunk_put_str-framed. */
typedef struct kgroup {
	tm_buf hf, hv, ef, ev;
	size_t nh, ne;
} kgroup;

/* A script call being built: its KEYS (KEYS[1] the ledger) and, per
 * key (by its index in keys), what it sends. */
typedef struct call {
	strtab keys;
	kgroup *g;
	size_t gcap;
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
		call *c = &cs->v[i];
		for (size_t k = 0; k < c->keys.n && c->g; k++) {
			buf_free(&c->g[k].hf);
			buf_free(&c->g[k].hv);
			buf_free(&c->g[k].ef);
			buf_free(&c->g[k].ev);
		}
		free(c->g);
		st_free(&c->keys);
	}
	free(cs->v);
	st_free(&cs->tags);
}

/* The group of key in the call of its tag (its first taglen bytes, up
 * to "}:"; the call made with the tag's ledger as KEYS[1] when new);
 * NULL when out of memory. */
static kgroup *group_for(calls *cs, const char *key, size_t kl, size_t taglen)
{
	size_t ti, ki;
	int fresh = st_add(&cs->tags, key, taglen, 0, &ti);
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
		if (buf_append(&lk, key, taglen) || buf_putc(&lk, 'L') ||
		    st_add(&c->keys, lk.data, lk.len, 0, NULL) < 0) {
			buf_free(&lk);
			return NULL;
		}
		c->slot = slot_of(lk.data, lk.len);
		buf_free(&lk);
		cs->tags.ent[ti].count = ++cs->n;
		if (!(c->g = tm_grow(NULL, &c->gcap, 1, sizeof *c->g, 8)))
			return NULL;
		memset(c->g, 0, sizeof *c->g); /* the ledger's: empty */
	}
	call *c = &cs->v[cs->tags.ent[ti].count - 1];
	int nk = st_add(&c->keys, key, kl, 0, &ki);
	if (nk < 0)
		return NULL;
	if (nk) {
		kgroup *g = tm_grow(c->g, &c->gcap, c->keys.n, sizeof *g, 8);
		if (!g)
			return NULL;
		c->g = g;
		memset(&g[ki], 0, sizeof *g);
	}
	return &c->g[ki];
}

static int putnum(tm_buf *b, unsigned long long v)
{
	char s[24];
	int n = snprintf(s, sizeof s, "%llu", v);
	return chunk_put_str(b, s, (size_t)n);
}

/* An increment of field in key (its tag taglen bytes) by v. */
static int add_incr(calls *cs, const char *key, size_t kl, size_t taglen, const char *f,
		    size_t fl, uint64_t v)
{
	kgroup *g = group_for(cs, key, kl, taglen);
	if (!g || chunk_put_str(&g->hf, f, fl) || putnum(&g->hv, (unsigned long long)v))
		return -1;
	g->nh++;
	return 0;
}

/* The increments of a table keyed "OCC 1F field" of period label[0..ln):
 * each into the occupation's hash with that suffix ('f' forms, 'n'
 * totals) of that period. */
static int add_occ_incrs(const rstore *r, calls *cs, const strtab *t, char suffix,
			 const char *label, size_t ln, tm_buf *kb)
{
	for (size_t i = 0; i < t->n; i++) {
		size_t n, tl;
		const char *k = st_key(t, i, &n);
		size_t ol = sr_first_field(k, n);
		if (store_key_occ(r->prefix, k, ol, suffix, kb) || sr_key_at(kb, label, ln, &tl) ||
		    add_incr(cs, kb->data, kb->len, tl, k + ol + 1, n - ol - 1, t->ent[i].count))
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

/* What an attempt at a chunk holds between its steps: the commands it
 * has sent keep pointing into it until their replies are read. */
struct sr_work {
	strtab ids;             /* the chunk's distinct ids */
	uint8_t *mine;          /* per id: 1 when the chunk owns it (2 once
				 * its posting is counted) */
	uint8_t *shard;         /* per id: its shard (SR_SHARDS <= 256) */
	size_t *order;          /* the ids by shard: shard s holds
				 * order[first[s] .. first[s] + cnt[s]) */
	size_t *recid, nrec, reccap; /* per posting in the chunk: 1 + its
				 * id's index in ids, 0 none */
	size_t cnt[SR_SHARDS], first[SR_SHARDS];
	int which[SR_SHARDS];   /* the shard of each claim command */
	char (*shkeys)[160];
	batch b;                /* the claims, then the applies */
	calls cs;
	tm_buf nums;            /* the applies' counts, framed */
	tm_buf pending;         /* the examples' bounds noted, kept once the
				 * chunk has gone through */
	uint64_t counted, repub, undated;
};

_Static_assert(SR_SHARDS <= 256, "an id's shard is kept in a byte");

static void work_free(sr_flight *f)
{
	struct sr_work *w = f->w;
	if (!w)
		return;
	st_free(&w->ids);
	free(w->mine);
	free(w->shard);
	free(w->order);
	free(w->recid);
	free(w->shkeys);
	batch_free(&w->b);
	calls_free(&w->cs);
	buf_free(&w->nums);
	buf_free(&w->pending);
	free(w);
	f->w = NULL;
}

void sr_flight_free(sr_flight *f)
{
	work_free(f);
	buf_free(&f->chunk);
	f->stage = SR_IDLE;
}

/* Step 1: the claims of the chunk's distinct ids, shard by shard, for
 * the chunk (owner: the first 16 hex digits of its digest), sent.
 * Returns 0 or -1. */
int sr_claims_send(rstore *r, sr_flight *f)
{
	struct sr_work *w = calloc(1, sizeof *w);
	const char *p, *end = f->chunk.data + f->chunk.len;
	chunk_rec rec;
	tm_buf kb = {0};
	int got;

	work_free(f);
	if (!w || !(w->shkeys = calloc(SR_SHARDS, 160)) || batch_init(&w->b, SR_SHARDS)) {
		if (w)
			free(w->shkeys);
		free(w);
		goto oom;
	}
	f->w = w;
	for (p = f->chunk.data; (got = chunk_next(&p, end, &rec)) == 1; w->nrec++) {
		size_t ix = 0, *v = tm_grow(w->recid, &w->reccap, w->nrec + 1, sizeof *v, 1024);
		if (!v)
			goto oom;
		w->recid = v;
		if (rec.p.id && st_add(&w->ids, rec.p.id, rec.p.idlen, 0, &ix) < 0)
			goto oom;
		v[w->nrec] = rec.p.id ? ix + 1 : 0;
	}
	if (got < 0) {
		sr_err(r, "a chunk's postings are unreadable", NULL);
		return -1;
	}
	if (!(w->mine = calloc(w->ids.n + 1, 1)) || !(w->shard = malloc(w->ids.n + 1)) ||
	    !(w->order = malloc((w->ids.n + 1) * sizeof *w->order)))
		goto oom;
	/* an id's shard from the store's own hash of its bytes (chunk.h):
	 * the shard earlier loads claimed it in */
	for (size_t i = 0; i < w->ids.n; i++) {
		size_t n;
		const char *id = st_key(&w->ids, i, &n);
		w->cnt[w->shard[i] = (uint8_t)(chunk_hash(id, n) % SR_SHARDS)]++;
	}
	size_t at[SR_SHARDS], sum = 0;
	for (int s = 0; s < SR_SHARDS; s++) {
		w->first[s] = at[s] = sum;
		sum += w->cnt[s];
	}
	for (size_t i = 0; i < w->ids.n; i++)
		w->order[at[w->shard[i]]++] = i;
	for (int s = 0; s < SR_SHARDS; s++) {
		batch *b = &w->b;
		if (!w->cnt[s])
			continue;
		argv_b *a = &b->args[b->n];
		if (store_key_shard(r->prefix, 'i', (uint64_t)s, &kb) || argv_init(a, w->cnt[s] + 6)) {
			b->n++;
			goto oom;
		}
		snprintf(w->shkeys[b->n], 160, "%s", kb.data);
		argv_push(a, "EVALSHA", 7);
		argv_push(a, r->sha_claim, 40);
		argv_push(a, "1", 1);
		argv_push(a, w->shkeys[b->n], strlen(w->shkeys[b->n]));
		argv_push(a, f->dg, 16);
		argv_push(a, r->ttl, strlen(r->ttl));
		for (size_t q = 0; q < w->cnt[s]; q++) {
			size_t n;
			const char *id = st_key(&w->ids, w->order[w->first[s] + q], &n);
			argv_push(a, id, n);
		}
		b->cmds[b->n] = (rc_cmd){(int)a->n, a->v, a->l,
					 slot_of(w->shkeys[b->n], strlen(w->shkeys[b->n])), NULL};
		w->which[b->n++] = s;
	}
	buf_free(&kb);
	if (rc_send(&r->k, w->b.cmds, w->b.n) != 0) {
		sr_kerr_up(r);
		return -1;
	}
	f->stage = SR_CLAIMING;
	return 0;
oom:
	buf_free(&kb);
	sr_err(r, "out of memory", NULL);
	return -1;
}

/* The claims' replies (read): which ids the chunk owns.  0 or -1. */
static int claims_read(rstore *r, struct sr_work *w)
{
	for (size_t c = 0; c < w->b.n; c++) {
		redisReply *x = w->b.cmds[c].reply;
		int s = w->which[c];
		if (!x || x->type != REDIS_REPLY_STRING || x->len != w->cnt[s]) {
			sr_err(r, "the server refused the ids",
			       x && x->type == REDIS_REPLY_ERROR ? x->str : "unexpected reply");
			return -1;
		}
		for (size_t q = 0; q < w->cnt[s]; q++)
			w->mine[w->order[w->first[s] + q]] = x->str[q] == '1';
	}
	batch_free(&w->b);
	return 0;
}

/* A triple's examples as the memory engine gives them
 * (tm_triple_examples). */
typedef struct sr_ex {
	const char *t[TALLY_EXAMPLES];
	size_t len[TALLY_EXAMPLES];
	uint64_t h[TALLY_EXAMPLES];
	int n;
} sr_ex;

/* Whether example a of e comes before example b in the store: by hash,
 * then by text. */
static int ex_before(const sr_ex *e, int a, int b)
{
	if (e->h[a] != e->h[b])
		return e->h[a] < e->h[b];
	size_t la = e->len[a], lb = e->len[b];
	int c = memcmp(e->t[a], e->t[b], la < lb ? la : lb);
	return c < 0 || (c == 0 && la < lb);
}

/* The examples of a triple (joined key k) in period label[0..ln) that
 * can still enter the store, added to call c; a bound is noted in
 * pending once three are sent.  Returns 0 or -1 (out of memory). */
static int add_examples(rstore *r, calls *cs, tm_buf *pending, const tally_mem *agg, size_t i,
			const char *label, size_t ln, tm_buf *kb, tm_buf *kb2)
{
	size_t n, tl;
	const char *k = tm_triple_key(agg, i, &n);
	size_t ol = sr_first_field(k, n);
	sr_ex x, *e = &x;
	x.n = tm_triple_examples(agg, i, x.t, x.len, x.h);
	/* the store keeps the three smallest hashes it was sent: once this
	 * load has sent three, it keeps none above the largest of them, and
	 * a candidate above that bound cannot enter (per period: the bound
	 * is kept under LABEL 1F k) */
	buf_reset(kb2);
	if (buf_append(kb2, label, ln) || buf_putc(kb2, SR_SEP) || buf_append(kb2, k, n))
		return -1;
	long known = st_find(&r->exbound, kb2->data, kb2->len);
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
		if (chunk_put_str(pending, kb2->data, kb2->len) || buf_append(pending, &w1, sizeof w1))
			return -1;
	}
	/* the candidates in the store's order: by hash (its 16 hex digits
	 * lead each), then by text */
	for (int a = 1; a < take; a++)
		for (int b = a; b > 0 && ex_before(e, sendq[b], sendq[b - 1]); b--) {
			int t = sendq[b];
			sendq[b] = sendq[b - 1];
			sendq[b - 1] = t;
		}
	kgroup *g;
	if (store_key_occ(r->prefix, k, ol, 'x', kb) || sr_key_at(kb, label, ln, &tl) ||
	    !(g = group_for(cs, kb->data, kb->len, tl)) ||
	    chunk_put_str(&g->ef, k + ol + 1, n - ol - 1))
		return -1;
	buf_reset(kb2);
	for (int qq = 0; qq < take; qq++) {
		int q = sendq[qq];
		char hx[16];
		for (int d = 0; d < 16; d++)
			hx[d] = "0123456789abcdef"[e->h[q] >> (60 - 4 * d) & 15];
		if ((qq && buf_putc(kb2, '\x1E')) || buf_append(kb2, hx, 16) ||
		    buf_append(kb2, e->t[q], e->len[q]))
			return -1;
	}
	if (chunk_put_str(&g->ev, kb2->data, kb2->len))
		return -1;
	g->ne++;
	return 0;
}

/* Step 2: the shares of what the chunk owns in one period (agg, label
 * label[0..ln)), added to the script calls, one per hash tag (a tag's
 * call holds every period of it).  Returns 0 or -1 (out of memory). */
static int shares(rstore *r, const tally_mem *agg, const char *label, size_t ln, calls *cs,
		  tm_buf *pending)
{
	tm_buf kb = {0}, kb2 = {0};
	int rc = -1;

	if (add_occ_incrs(r, cs, &agg->forms, 'f', label, ln, &kb) ||
	    add_occ_incrs(r, cs, &agg->occs, 'n', label, ln, &kb))
		goto done;
	for (size_t i = 0; i < agg->keys.n; i++) {
		size_t n, tl;
		const char *k = st_key(&agg->keys, i, &n);
		if (store_key_shard(r->prefix, 'k', chunk_hash(k, n), &kb) || sr_key_at(&kb, label, ln, &tl) ||
		    add_incr(cs, kb.data, kb.len, tl, k, n, agg->keys.ent[i].count))
			goto done;
	}
	for (size_t i = 0; i < tm_ntriples(agg); i++)
		if (add_examples(r, cs, pending, agg, i, label, ln, &kb, &kb2))
			goto done;
	rc = 0;
done:
	buf_free(&kb);
	buf_free(&kb2);
	return rc;
}

/* The number of groups of kind h (0 increments, 1 examples) of c. */
static size_t ngroups(const call *c, int h)
{
	size_t ng = 0;
	for (size_t k = 1; k < c->keys.n; k++)
		ng += (h ? c->g[k].ne : c->g[k].nh) > 0;
	return ng;
}

/* Step 3: EVALSHA sha nkeys keys... digest ttl G ... X ..., one call
 * per tag, built into w->b.  0 or -1 (out of memory). */
static int apply_build(rstore *r, struct sr_work *w, const char *dg)
{
	const calls *cs = &w->cs;
	batch *b = &w->b;
	const char *x;
	size_t l;

	/* the numbers first, in the order the arguments take them (they
	 * point into w->nums): per call the number of keys, then G and its
	 * groups' key indexes and sizes, then X and its */
	buf_reset(&w->nums);
	for (size_t i = 0; i < cs->n; i++) {
		const call *c = &cs->v[i];
		if (putnum(&w->nums, c->keys.n))
			return -1;
		for (int h = 0; h < 2; h++) {
			if (putnum(&w->nums, ngroups(c, h)))
				return -1;
			for (size_t k = 1; k < c->keys.n; k++) {
				size_t m = h ? c->g[k].ne : c->g[k].nh;
				if (m && (putnum(&w->nums, k + 1) || putnum(&w->nums, m)))
					return -1;
			}
		}
	}
	if (batch_init(b, cs->n))
		return -1;
	x = w->nums.data;
	for (; b->n < cs->n; b->n++) {
		const call *c = &cs->v[b->n];
		size_t nk = c->keys.n, na = 7 + 5 * nk;
		for (size_t k = 1; k < nk; k++)
			na += 2 * (c->g[k].nh + c->g[k].ne);
		argv_b *a = &b->args[b->n];
		if (argv_init(a, na)) {
			b->n++;
			return -1;
		}
		argv_push(a, "EVALSHA", 7);
		argv_push(a, r->sha_apply, 40);
		a->v[a->n] = chunk_get_str(&x, &a->l[a->n]), a->n++;
		for (size_t i = 0; i < nk; i++) {
			const char *k = st_key(&c->keys, i, &l);
			argv_push(a, k, l);
		}
		argv_push(a, dg, 32);
		argv_push(a, r->ttl, strlen(r->ttl));
		for (int h = 0; h < 2; h++) {
			a->v[a->n] = chunk_get_str(&x, &a->l[a->n]), a->n++;
			for (size_t k = 1; k < nk; k++) {
				const kgroup *g = &c->g[k];
				if (!(h ? g->ne : g->nh))
					continue;
				for (int q = 0; q < 2; q++) /* its index and size */
					a->v[a->n] = chunk_get_str(&x, &a->l[a->n]), a->n++;
				const tm_buf *fv[2] = {h ? &g->ef : &g->hf, h ? &g->ev : &g->hv};
				for (int q = 0; q < 2; q++)
					for (const char *p = fv[q]->data, *pe = p + fv[q]->len; p < pe; a->n++)
						a->v[a->n] = chunk_get_str(&p, &a->l[a->n]);
			}
		}
		b->cmds[b->n] = (rc_cmd){(int)a->n, a->v, a->l, c->slot, NULL};
	}
	return 0;
}

/* Keeps the examples' bounds an applied chunk noted.  0 or -1. */
static int keep_bounds(rstore *r, const tm_buf *pending)
{
	const char *q = pending->data, *qe = q + pending->len;
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

int sr_shares_send(rstore *r, sr_flight *f)
{
	struct sr_work *w = f->w;
	tally_series agg;
	tm_buf why = {0};
	chunk_rec rec;
	const char *p, *end = f->chunk.data + f->chunk.len;
	int got;

	if (claims_read(r, w))
		return -1;
	if (r->kill_stage == 1 && f->attempt == r->kill_at)
		raise(SIGKILL);
	/* 2. the postings the chunk owns (and those without an id), each in
	 * its period */
	series_init(&agg, SERIES_AS_READ);
	size_t nr = 0;
	for (p = f->chunk.data; (got = chunk_next(&p, end, &rec)) == 1; nr++) {
		tally_mem *m;
		int k = 0;
		if (rec.p.id) {
			/* another chunk's id, or one counted already in this chunk */
			size_t idx = w->recid[nr] - 1;
			if (w->mine[idx] != 1) {
				w->repub++;
				continue;
			}
			w->mine[idx] = 2;
		}
		if ((k = series_at(&agg, rec.period, rec.periodlen, &m, &why)) == -2)
			goto oom;
		if (k) {
			got = -1;
			break;
		}
		rec.p.id = NULL; /* the ids are settled: count it */
		if (tm_add(m, &rec.p) < 0)
			goto oom;
		w->counted++;
		if (!rec.periodlen && r->period != PERIOD_NONE)
			w->undated++;
	}
	if (got < 0) {
		series_free(&agg);
		sr_err(r, "a chunk's postings are unreadable", why.len ? why.data : NULL);
		buf_free(&why);
		return -1;
	}
	/* 3. the shares, sent */
	for (size_t i = 0; i < agg.n; i++)
		if (shares(r, &agg.p[i]->m, agg.p[i]->label, agg.p[i]->len, &w->cs, &w->pending))
			goto oom;
	if (apply_build(r, w, f->dg))
		goto oom;
	series_free(&agg);
	if (r->kill_stage == 2 && f->attempt == r->kill_at) {
		sr_run_batch(r, w->b.cmds, w->b.n / 2, NULL, "the server refused a chunk");
		raise(SIGKILL);
	}
	if (rc_send(&r->k, w->b.cmds, w->b.n) != 0) {
		sr_kerr_up(r);
		return -1;
	}
	f->stage = SR_APPLYING;
	return 0;
oom:
	series_free(&agg);
	buf_free(&why);
	sr_err(r, "out of memory", NULL);
	return -1;
}

int sr_applied(rstore *r, sr_flight *f, uint64_t *counted, uint64_t *repub)
{
	struct sr_work *w = f->w;
	int rc = 0;

	for (size_t i = 0; i < w->b.n; i++) {
		redisReply *x = w->b.cmds[i].reply;
		if (!x || x->type == REDIS_REPLY_ERROR) {
			sr_err(r, "the server refused a chunk", x ? x->str : "no reply");
			rc = -1;
			break;
		}
		if (x->type == REDIS_REPLY_INTEGER && x->integer == 1)
			rc = 1;
	}
	if (rc == 1 && keep_bounds(r, &w->pending)) {
		sr_err(r, "out of memory", NULL);
		rc = -1;
	}
	if (rc == 1)
		r->base.undated += w->undated;
	*counted = w->counted;
	*repub = w->repub;
	work_free(f);
	f->stage = SR_IDLE;
	return rc;
}

int sr_attempt(rstore *r, sr_flight *f, uint64_t *counted, uint64_t *repub)
{
	if (sr_claims_send(r, f))
		goto fail;
	if (rc_drain(&r->k)) {
		sr_kerr_up(r);
		goto fail;
	}
	if (sr_shares_send(r, f))
		goto fail;
	if (rc_drain(&r->k)) {
		sr_kerr_up(r);
		goto fail;
	}
	return sr_applied(r, f, counted, repub);
fail:
	work_free(f);
	f->stage = SR_IDLE;
	return -1;
}

/* strtab.c - string-keyed counting table. */
#include "count/strtab.h"

#include <stdlib.h>
#include <string.h>

#include "norm/token.h"

/* A slot: a fingerprint of its entry's hash (the hash's low 32 bits),
 * then the entry's index + 1 (0: the slot is empty).  A probe passes
 * over a slot of another fingerprint without reading its entry: eight
 * slots to a cache line, so a lookup reads the entry (and its key) only
 * when the fingerprints agree, nearly always the key itself. */
#define SLOT_FP(s) ((s) & 0xFFFFFFFF00000000ULL)
static inline uint64_t fp(uint64_t h)
{
	return (uint64_t)(uint32_t)h << 32;
}

static inline uint64_t slot_of(uint64_t h, size_t i)
{
	return fp(h) | (uint32_t)(i + 1);
}

static inline size_t home(uint64_t h, size_t nslot)
{
	return st_home_fp(fp(h), nslot);
}

static int grow_slots(strtab *t)
{
	size_t ns = t->nslot ? t->nslot + t->nslot / 2 : 1024;
	if (ns > ((size_t)1 << 32) || ns > SIZE_MAX / sizeof *t->slot) /* st_home_fp's 32 bits */
		return -1;
	uint64_t *s = calloc(ns, sizeof *s);
	if (!s)
		return -1;
	tm_hugepages(s, ns * sizeof *s);
	for (size_t i = 0; i < t->nslot; i++) {
		uint64_t e = t->slot[i];
		if (!e)
			continue;
		size_t j = st_home_fp(SLOT_FP(e), ns);
		while (s[j])
			j = st_next(j, ns);
		s[j] = e;
	}
	free(t->slot);
	t->slot = s;
	t->nslot = ns;
	return 0;
}

long st_find(const strtab *t, const char *key, size_t n)
{
	uint64_t h;
	size_t j;

	if (!t->nslot)
		return -1;
	h = tok_hash(key, n);
	for (j = home(h, t->nslot); t->slot[j]; j = st_next(j, t->nslot)) {
		if (SLOT_FP(t->slot[j]) != fp(h))
			continue;
		const st_entry *e = &t->ent[(uint32_t)t->slot[j] - 1];
		if (e->len == n && (n == 0 || !memcmp(t->arena.data + e->off, key, n)))
			return (long)((uint32_t)t->slot[j] - 1);
	}
	return -1;
}

/* The joined length of a key given as fields. */
static size_t fields_len(const st_fields *k)
{
	size_t n = k->k ? (size_t)k->k - 1 : 0;
	for (int i = 0; i < k->k; i++)
		n += k->n[i];
	return n;
}

/* Does the entry's key (of the joined length) read as the fields? */
static int same_fields(const strtab *t, const st_entry *e, const st_fields *k)
{
	const char *s = t->arena.data + e->off;
	for (int i = 0; i < k->k; i++) {
		if (i && *s++ != k->sep)
			return 0;
		if (k->n[i] && memcmp(s, k->f[i], k->n[i]))
			return 0;
		s += k->n[i];
	}
	return 1;
}

long st_find_fields(const strtab *t, const st_fields *k)
{
	size_t j, n = fields_len(k);

	if (!t->nslot)
		return -1;
	for (j = home(k->h, t->nslot); t->slot[j]; j = st_next(j, t->nslot)) {
		if (SLOT_FP(t->slot[j]) != fp(k->h))
			continue;
		const st_entry *e = &t->ent[(uint32_t)t->slot[j] - 1];
		if (e->len == n && same_fields(t, e, k))
			return (long)((uint32_t)t->slot[j] - 1);
	}
	return -1;
}

/* Room for one more entry of n bytes: slots and entries.  0 or -1. */
static int room(strtab *t, size_t n)
{
	if (n > UINT32_MAX || t->n >= UINT32_MAX - 1 || t->arena.len + n > UINT32_MAX)
		return -1;
	if ((t->n + 1) * 4 > t->nslot * 3 && grow_slots(t) != 0)
		return -1;
	if (t->n == t->cap) {
		st_entry *p = st_grow(t->ent, &t->cap, t->n + 1, sizeof *p, 1024);
		if (!p)
			return -1;
		t->ent = p;
	}
	return 0;
}

/* Files a new key of n bytes under h, its bytes the arena's last (room
 * made first), in slot empty when it is not -1 (the empty slot that ended
 * a probe for it in the slots as they are), else in the first empty slot
 * from its home.  Returns 1. */
static int insert(strtab *t, uint64_t h, size_t n, uint64_t by, size_t *idx, long empty)
{
	size_t j;
	st_entry *e = &t->ent[t->n];
	e->count = by;
	e->off = (uint32_t)(t->arena.len - n);
	e->len = (uint32_t)n;
	if (empty >= 0)
		j = (size_t)empty; /* the probe's end, the slots unchanged since */
	else
		for (j = home(h, t->nslot); t->slot[j]; j = st_next(j, t->nslot))
			;
	t->slot[j] = slot_of(h, t->n);
	if (idx)
		*idx = t->n;
	t->n++;
	return 1;
}

int st_add_fields(strtab *t, const st_fields *k, uint64_t by, size_t *idx)
{
	size_t n = fields_len(k), j = 0;

	/* one probe: the key's slot, or the empty slot that ends its run */
	if (t->nslot) {
		for (j = home(k->h, t->nslot); t->slot[j]; j = st_next(j, t->nslot)) {
			if (SLOT_FP(t->slot[j]) != fp(k->h))
				continue;
			size_t i = (uint32_t)t->slot[j] - 1;
			st_entry *e = &t->ent[i];
			if (e->len == n && same_fields(t, e, k)) {
				e->count += by;
				if (idx)
					*idx = i;
				return 0;
			}
		}
	}
	size_t ns = t->nslot;
	if (room(t, n) != 0 || st_arena_reserve(&t->arena, n + 1) != 0)
		return -1;
	for (int f = 0; f < k->k; f++) {
		if (f)
			buf_putc(&t->arena, k->sep);
		buf_append(&t->arena, k->f[f], k->n[f]);
	}
	return insert(t, k->h, n, by, idx, ns == t->nslot ? (long)j : -1);
}

int st_add(strtab *t, const char *key, size_t n, uint64_t by, size_t *idx)
{
	uint64_t h = tok_hash(key, n);
	size_t j = 0, ns = t->nslot;

	if (t->nslot) {
		for (j = home(h, t->nslot); t->slot[j]; j = st_next(j, t->nslot)) {
			if (SLOT_FP(t->slot[j]) != fp(h))
				continue;
			st_entry *e = &t->ent[(uint32_t)t->slot[j] - 1];
			if (e->len == n && (n == 0 || !memcmp(t->arena.data + e->off, key, n))) {
				e->count += by;
				if (idx)
					*idx = (uint32_t)t->slot[j] - 1;
				return 0;
			}
		}
	}
	if (room(t, n) != 0 || st_arena_reserve(&t->arena, n + 1) != 0 ||
	    buf_append(&t->arena, key, n) != 0)
		return -1;
	return insert(t, h, n, by, idx, ns == t->nslot ? (long)j : -1);
}

/* Past this many bytes a block grows by an eighth: the system moves a
 * block that big by remapping its pages, not by copying its bytes. */
#define ST_GROW_FINE ((size_t)4 << 20)

void *st_grow(void *p, size_t *cap, size_t need, size_t size, size_t first)
{
	return tm_grow_half(p, cap, need, size, first, ST_GROW_FINE);
}

int st_arena_grow(tm_buf *b, size_t extra)
{
	if (b->failed || b->max || extra > SIZE_MAX - b->len)
		return buf_reserve(b, extra); /* its checks, its errors */
	if (b->data && b->len + extra <= b->cap)
		return TM_OK;
	char *d = st_grow(b->data, &b->cap, b->len + extra, 1, 4096);
	if (!d) {
		b->failed = 1;
		b->cap = b->len; /* as buf_reserve leaves a failed buffer */
		return TM_ENOMEM;
	}
	b->data = d;
	return TM_OK;
}

void st_free(strtab *t)
{
	if (!t)
		return;
	free(t->ent);
	free(t->slot);
	buf_free(&t->arena);
	memset(t, 0, sizeof *t);
}

size_t st_bytes(const strtab *t)
{
	return t->cap * sizeof(st_entry) + t->nslot * sizeof(uint64_t) + t->arena.cap;
}

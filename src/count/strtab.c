/* strtab.c - string-keyed counting table. */
#include "count/strtab.h"

#include <stdlib.h>
#include <string.h>

#include "norm/token.h"

/* Slot of a hash: Fibonacci hashing spreads the low-entropy bits of
 * similar keys (ids that share their prefix) over the whole table. */
static inline size_t home(uint64_t h, size_t nslot)
{
	return (size_t)((h * 0x9E3779B97F4A7C15ULL) >> 32) & (nslot - 1);
}

static int grow_slots(strtab *t)
{
	size_t ns = t->nslot ? t->nslot * 2 : 1024, i;
	uint32_t *s = calloc(ns, sizeof *s);
	if (!s)
		return -1;
	for (i = 0; i < t->n; i++) {
		size_t j = home(t->ent[i].hash, ns);
		while (s[j])
			j = (j + 1) & (ns - 1);
		s[j] = (uint32_t)(i + 1);
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
	for (j = home(h, t->nslot); t->slot[j]; j = (j + 1) & (t->nslot - 1)) {
		const st_entry *e = &t->ent[t->slot[j] - 1];
		if (e->hash == h && e->len == n &&
		    (n == 0 || !memcmp(t->arena.data + e->off, key, n)))
			return (long)(t->slot[j] - 1);
	}
	return -1;
}

int st_add(strtab *t, const char *key, size_t n, uint64_t by, size_t *idx)
{
	uint64_t h = tok_hash(key, n);
	size_t j;

	if (n > UINT32_MAX || t->n >= UINT32_MAX - 1)
		return -1;
	if (t->nslot) {
		for (j = home(h, t->nslot); t->slot[j]; j = (j + 1) & (t->nslot - 1)) {
			st_entry *e = &t->ent[t->slot[j] - 1];
			if (e->hash == h && e->len == n &&
			    (n == 0 || !memcmp(t->arena.data + e->off, key, n))) {
				e->count += by;
				if (idx)
					*idx = t->slot[j] - 1;
				return 0;
			}
		}
	}
	if ((t->n + 1) * 4 > t->nslot * 3 && grow_slots(t) != 0)
		return -1;
	if (t->n == t->cap) {
		st_entry *p = tm_grow(t->ent, &t->cap, t->n + 1, sizeof *p, 1024);
		if (!p)
			return -1;
		t->ent = p;
	}
	if (t->arena.len + n > UINT32_MAX || buf_append(&t->arena, key, n) != 0)
		return -1;
	st_entry *e = &t->ent[t->n];
	e->hash = h;
	e->count = by;
	e->off = (uint32_t)(t->arena.len - n);
	e->len = (uint32_t)n;
	for (j = home(h, t->nslot); t->slot[j]; j = (j + 1) & (t->nslot - 1))
		;
	t->slot[j] = (uint32_t)(t->n + 1);
	if (idx)
		*idx = t->n;
	t->n++;
	return 1;
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
	return t->cap * sizeof(st_entry) + t->nslot * sizeof(uint32_t) + t->arena.cap;
}

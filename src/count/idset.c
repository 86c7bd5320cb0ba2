/* idset.c - the set of posting ids (see idset.h). */
#include "count/idset.h"

#include <stdlib.h>
#include <string.h>

#include "core/err.h"
#include "core/digest.h"
#include "count/strtab.h"

/* The slots are grown when they would be more than half full. */
#define IDS_FIRST_SLOTS 1024

uint64_t ids_hash(const char *s, size_t n)
{
	/* eight bytes at a step, fully mixed: both halves (the slot, the
	 * fingerprint) depend on every byte */
	return dg_hash(s, n, 0x6964736574ULL);
}

static inline int same(const idset *t, uint64_t v, const char *s, size_t n)
{
	size_t i = (size_t)(v & 0xFFFFFFFFu) - 1;
	return t->start[i + 1] - t->start[i] == n &&
	       (n == 0 || !memcmp(t->arena.data + t->start[i], s, n));
}

int ids_has(const idset *t, const char *s, size_t n)
{
	uint64_t h = ids_hash(s, n), fp = h >> 32 << 32;
	size_t mask = t->nslot - 1, j;

	if (!t->nslot)
		return 0;
	for (j = ids_home(fp, t->nslot); t->slot[j]; j = (j + 1) & mask)
		if ((t->slot[j] & ~0xFFFFFFFFull) == fp && same(t, t->slot[j], s, n))
			return 1;
	return 0;
}

/* Doubles the slots and files every slot again from its fingerprint. */
static int grow(idset *t)
{
	size_t ns = t->nslot ? t->nslot * 2 : IDS_FIRST_SLOTS, mask = ns - 1;
	uint64_t *s;

	if (ns > ((size_t)1 << 32) || ns > SIZE_MAX / sizeof *s || !(s = calloc(ns, sizeof *s)))
		return TM_ENOMEM; /* ids_home's 32 bits */
	tm_hugepages(s, ns * sizeof *s); /* each lookup a random slot: one TLB entry per 2 MiB */
	for (size_t i = 0; i < t->nslot; i++) {
		uint64_t e = t->slot[i];
		if (!e)
			continue;
		size_t j = ids_home(e, ns);
		while (s[j])
			j = (j + 1) & mask;
		s[j] = e;
	}
	free(t->slot);
	t->slot = s;
	t->nslot = ns;
	return TM_OK;
}

int ids_add_h(idset *t, const char *s, size_t n, uint64_t h)
{
	uint64_t fp = h >> 32 << 32;
	size_t j = 0, ns = t->nslot;

	/* one probe: the member's slot, or the empty slot that ends its run */
	if (t->nslot) {
		size_t mask = t->nslot - 1;
		for (j = ids_home(fp, t->nslot); t->slot[j]; j = (j + 1) & mask)
			if ((t->slot[j] & ~0xFFFFFFFFull) == fp && same(t, t->slot[j], s, n))
				return 0;
	}
	if (t->n >= UINT32_MAX - 1)
		return TM_ENOMEM;
	if ((t->n + 1) * 2 > t->nslot && grow(t) != TM_OK)
		return TM_ENOMEM;
	if (t->n + 2 > t->cap) {
		uint64_t *p = st_grow(t->start, &t->cap, t->n + 2, sizeof *p, 1024);
		if (!p)
			return TM_ENOMEM;
		t->start = p;
		if (t->n == 0)
			p[0] = 0;
	}
	if (st_arena_reserve(&t->arena, n + 1) != 0 || buf_append(&t->arena, s, n) != 0)
		return TM_ENOMEM;
	t->start[t->n + 1] = t->arena.len;
	if (ns != t->nslot) /* grown: the probe's end is another slot now */
		for (j = ids_home(fp, t->nslot); t->slot[j]; j = (j + 1) & (t->nslot - 1))
			;
	t->slot[j] = fp | (uint64_t)(t->n + 1);
	t->n++;
	return 1;
}

size_t ids_bytes(const idset *t)
{
	return t->nslot * sizeof *t->slot + t->cap * sizeof *t->start + t->arena.cap;
}

void ids_free(idset *t)
{
	if (!t)
		return;
	free(t->slot);
	free(t->start);
	buf_free(&t->arena);
	memset(t, 0, sizeof *t);
}

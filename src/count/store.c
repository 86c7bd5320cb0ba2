/* store.c - the loader every counting backend shares: postings in,
 * chunks under their digests out (see store.h, chunk.h). */
#include "count/store.h"

#include <stdio.h>
#include <stdlib.h>

/* Commits the chunk at hand under its digest in this run. */
static int commit(store *st)
{
	uint64_t d[2];
	if (chunk_run_digest(&st->run, st->dg, d) != 0) {
		buf_reset(&st->err);
		buf_puts(&st->err, "out of memory");
		return -1;
	}
	return st->ops->commit(st, d);
}

int store_feed(store *st, const posting *raw, const tally_posting *tp, const char *name,
	       long line)
{
	if (!st->chunk)
		return st->ops->add(st, tp);
	chunk_digest_posting(st->dg, raw);
	if (st->ops->add(st, tp) != 0)
		return -1;
	if (++st->inchunk < st->chunk)
		return 0;
	if (commit(st) != 0) {
		char m[400];
		snprintf(m, sizeof m, "; %s:%ld was being loaded: the chunks before it are in but for the "
			 "last two, which may still have been on their way, and the one at hand; "
			 "run the same load again to finish them", name, line);
		buf_puts(&st->err, m);
		return -1;
	}
	st->inchunk = 0;
	chunk_digest_next(st->dg);
	return 0;
}

int store_input_end(store *st, const char *name)
{
	int rc = 0;
	if (st->chunk && st->inchunk && commit(st) != 0) {
		buf_puts(&st->err, "; the end of ");
		buf_puts(&st->err, name);
		buf_puts(&st->err, " was being loaded: run the same load again to finish it");
		rc = -1;
	}
	st->inchunk = 0;
	chunk_digest_start(st->dg, st->period);
	return rc;
}

void store_base_init(store *st, const store_ops *ops, long chunk)
{
	st->ops = ops;
	st->chunk = chunk;
	chunk_digest_start(st->dg, st->period);
}

void store_set_chunk(store *st, long n)
{
	if (st->chunk && n > 0)
		st->chunk = n;
}

void store_close(store *st)
{
	if (!st)
		return;
	chunk_run_free(&st->run);
	buf_free(&st->err);
	st->ops->close(st);
}

/* ---- the memory backend (store.h) ---- */

typedef struct mstore {
	store base;
	tally_series *s;
} mstore;

static int m_add(store *st, const tally_posting *p)
{
	tally_series *s = ((mstore *)st)->s;
	uint64_t outside = s->outside;
	int r = series_add(s, p, &st->err);
	if (r < 0) {
		if (r == -1) {
			buf_reset(&st->err);
			buf_puts(&st->err, "out of memory");
		}
		return -1;
	}
	if (r == 0)
		st->counted++;
	else if (s->outside == outside)
		st->republished++;
	return 0;
}

/* Counted as they came: no chunks (store_mem_open chunks by 0). */
static int m_commit(store *st, const uint64_t digest[2])
{
	(void)st;
	(void)digest;
	return 0;
}

static int m_finish(store *st)
{
	(void)st;
	return 0;
}

static int m_dump(store *st, tally_series *out)
{
	tally_series *s = ((mstore *)st)->s;
	int r = 0;
	if (out == s)
		return 0;
	for (size_t i = 0; i < s->n && !r; i++) {
		tally_mem *m;
		r = series_at(out, s->p[i]->label, s->p[i]->len, &m, &st->err);
		if (r == -1)
			return -1; /* the reason is set */
		if (r == 0 && m)
			r = tm_merge(m, &s->p[i]->m);
		else if (r == -2)
			r = -1;
	}
	if (r) {
		buf_reset(&st->err);
		buf_puts(&st->err, r == -2 ? "the counts add up past 2^64 - 1" : "out of memory");
		return -1;
	}
	return 0;
}

static void m_close(store *st)
{
	free(st);
}

static const store_ops mem_ops = {m_add, m_commit, m_finish, m_dump, m_close};

store *store_mem_open(tally_series *s, tm_buf *err)
{
	mstore *m = calloc(1, sizeof *m);
	if (!m) {
		buf_puts(err, "out of memory");
		return NULL;
	}
	store_base_init(&m->base, &mem_ops, 0);
	m->s = s;
	return &m->base;
}

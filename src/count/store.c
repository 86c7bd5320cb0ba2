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
	chunk_digest_init(st->dg);
	return rc;
}

void store_base_init(store *st, const store_ops *ops, long chunk)
{
	st->ops = ops;
	st->chunk = chunk;
	chunk_digest_init(st->dg);
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

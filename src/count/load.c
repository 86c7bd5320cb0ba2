/* load.c - postings read, cleaned in parallel, counted in input order
 * (see load.h). */
#include "count/load.h"

#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/types.h>
#include <unistd.h>

#include "core/err.h"
#include "norm/norm.h"

/* What a row of a batch is: a posting, a malformed row (its message),
 * a read error (its message), or the end of an input. */
enum { ROW_POSTING, ROW_SKIP, ROW_ERROR, ROW_END };

/* One row: offsets into its batch's arenas (they move as they grow). */
typedef struct lrow {
	uint8_t kind, noeol, has_id, has_date;
	int status;             /* the cleaning: 0, or -1 (memory) */
	char lang[4];
	int input;              /* index into the load's paths */
	long line;
	size_t id, idlen, date, datelen, title, titlelen; /* raw; a message in title */
	size_t occ, nocc;       /* into the batch's occupations */
	size_t key, keylen, clean, cleanlen, masked, maskedlen; /* results */
} lrow;

typedef struct batch {
	lrow *row;
	size_t n, cap;
	size_t *occ;            /* offset, length pairs into raw */
	size_t nocc, occcap;
	tm_buf raw, res;
	uint64_t bytes;         /* input bytes read when it was cut */
	int done;               /* cleaned (under the load's lock) */
} batch;

typedef struct loader {
	const load_conf *conf;
	char *const *paths;
	int npaths;
	/* the reader (calling thread only) */
	postings_reader pr;
	int open, in, over, oom;
	uint64_t bytes_done;    /* bytes of the inputs read to their end */
	/* the batches: filled and taken by the workers under mu */
	batch *ring;
	size_t nb;
	uint64_t filled, taken;
	int quit;
	pthread_mutex_t mu;
	pthread_cond_t work, done;
	normaliser **nm;
} loader;

static const char *input_name(const loader *L, int i)
{
	return strcmp(L->paths[i], "-") ? L->paths[i] : "<stdin>";
}

static lrow *new_row(loader *L, batch *b, int kind)
{
	if (b->n == b->cap) {
		lrow *r = tm_grow(b->row, &b->cap, b->n + 1, sizeof *r, 64);
		if (!r) {
			L->oom = 1;
			return NULL;
		}
		b->row = r;
	}
	lrow *r = &b->row[b->n++];
	memset(r, 0, sizeof *r);
	r->kind = (uint8_t)kind;
	r->input = L->in;
	return r;
}

/* Appends s to the batch's raw bytes; *off receives where. */
static int raw(loader *L, batch *b, const char *s, size_t n, size_t *off)
{
	*off = b->raw.len;
	if (n && buf_append(&b->raw, s, n) != 0) {
		L->oom = 1;
		return -1;
	}
	return 0;
}

/* A message row (a malformed row or a read error): the reader's text. */
static void message_row(loader *L, batch *b, int kind)
{
	lrow *r = new_row(L, b, kind);
	if (r && raw(L, b, L->pr.err.data ? L->pr.err.data : "", L->pr.err.len, &r->title) == 0)
		r->titlelen = L->pr.err.len;
}

static void close_input(loader *L)
{
	off_t at = ftello(L->pr.lr.fp);
	if (at > 0)
		L->bytes_done += (uint64_t)at;
	pr_close(&L->pr);
	L->open = 0;
}

static int copy_posting(loader *L, batch *b, const posting *p)
{
	lrow *r = new_row(L, b, ROW_POSTING);
	if (!r)
		return -1;
	r->line = p->line;
	r->noeol = (uint8_t)(L->pr.lr.noeol != 0);
	memcpy(r->lang, p->lang, sizeof r->lang);
	r->has_id = p->id != NULL;
	r->has_date = p->date != NULL;
	if ((p->id && raw(L, b, p->id, p->idlen, &r->id)) ||
	    (p->date && raw(L, b, p->date, p->datelen, &r->date)) ||
	    raw(L, b, p->title, p->titlelen, &r->title))
		return -1;
	r->idlen = p->id ? p->idlen : 0;
	r->datelen = p->date ? p->datelen : 0;
	r->titlelen = p->titlelen;
	if (b->nocc + p->nocc > b->occcap) {
		size_t *o = tm_grow(b->occ, &b->occcap, b->nocc + p->nocc, 2 * sizeof *o, 256);
		if (!o) {
			L->oom = 1;
			return -1;
		}
		b->occ = o;
	}
	r->occ = b->nocc;
	r->nocc = p->nocc;
	for (size_t q = 0; q < p->nocc; q++) {
		if (raw(L, b, p->occ[q], p->occlen[q], &b->occ[2 * b->nocc]))
			return -1;
		b->occ[2 * b->nocc + 1] = p->occlen[q];
		b->nocc++;
	}
	return 0;
}

/* Reads the next rows into b, up to LOAD_BATCH postings or
 * LOAD_BATCH_BYTES; the last row of the load is an error or the end of
 * the last input. */
static void fill(loader *L, batch *b)
{
	size_t postings = 0;

	b->n = b->nocc = 0;
	buf_reset(&b->raw);
	buf_reset(&b->res);
	while (postings < LOAD_BATCH && b->raw.len < LOAD_BATCH_BYTES && !L->over && !L->oom) {
		posting p;
		pr_row row;
		if (!L->open) {
			if (L->in == L->npaths) {
				L->over = 1;
				break;
			}
			if (pr_open(&L->pr, L->paths[L->in], L->conf->format) != 0) {
				message_row(L, b, ROW_ERROR);
				pr_close(&L->pr);
				L->over = 1;
				break;
			}
			L->pr.uncoded = L->conf->hold != NULL;
			L->open = 1;
		}
		if (pr_next(&L->pr, &p, &row) != 0) {
			message_row(L, b, ROW_ERROR);
			close_input(L);
			L->over = 1;
		} else if (row == PR_END) {
			new_row(L, b, ROW_END);
			close_input(L);
			L->in++;
		} else if (row == PR_SKIP) {
			message_row(L, b, ROW_SKIP);
			if (L->conf->strict)
				L->over = 1;
		} else if (copy_posting(L, b, &p) == 0)
			postings++;
	}
	b->bytes = L->bytes_done;
	if (L->open) {
		off_t at = ftello(L->pr.lr.fp);
		if (at > 0)
			b->bytes += (uint64_t)at;
	}
}

/* Cleans the postings of b with nm: the results go to b->res. */
static void clean(batch *b, normaliser *nm)
{
	for (size_t i = 0; i < b->n; i++) {
		lrow *r = &b->row[i];
		norm_result res;
		if (r->kind != ROW_POSTING)
			continue;
		if (norm_title(nm, b->raw.data + r->title, r->titlelen,
			       strcmp(r->lang, "und") ? r->lang : NULL, &res) != 0) {
			r->status = -1;
			continue;
		}
		r->key = b->res.len;
		buf_append(&b->res, res.key, res.key_len);
		r->clean = b->res.len;
		buf_append(&b->res, res.title, res.title_len);
		r->masked = b->res.len;
		buf_append(&b->res, res.masked, res.masked_len);
		r->keylen = res.key_len;
		r->cleanlen = res.title_len;
		r->maskedlen = res.masked_len;
		if (buf_status(&b->res) != 0)
			r->status = -1;
	}
}

static int backend_failed(const store *st, tm_buf *err)
{
	buf_reset(err);
	buf_append(err, st->err.data ? st->err.data : "", st->err.len);
	return TM_EFAIL;
}

/* Hands the rows of b to st, as the single-threaded loop would. */
static int count(loader *L, store *st, batch *b, uint64_t *fed, tm_buf *err)
{
	const load_conf *c = L->conf;
	const char *rd = b->raw.data, *rs = b->res.data;

	for (size_t i = 0; i < b->n; i++) {
		const lrow *r = &b->row[i];
		const char *name = input_name(L, r->input);
		posting p;
		tally_posting tp;
		norm_result res;

		switch (r->kind) {
		case ROW_ERROR:
			buf_reset(err);
			buf_append(err, rd + r->title, r->titlelen);
			return TM_EFAIL;
		case ROW_SKIP:
			if (c->strict) {
				buf_reset(err);
				buf_append(err, rd + r->title, r->titlelen);
				return TM_EINPUT;
			}
			if (c->skipped)
				c->skipped(c->ctx, rd + r->title, r->titlelen);
			continue;
		case ROW_END:
			if (store_input_end(st, name) != 0)
				return backend_failed(st, err);
			continue;
		}
		if (r->noeol && c->note) {
			char m[600];
			int k = snprintf(m, sizeof m, "%.400s:%ld: the last row has no line end: "
					 "was the file cut short? (counted as it is)", name, r->line);
			c->note(c->ctx, m, (size_t)k < sizeof m ? (size_t)k : sizeof m - 1);
		}
		if (r->status != 0)
			return tm_failf(err, TM_EFAIL, "%s:%ld: out of memory while cleaning the title",
					name, r->line);
		p.id = r->has_id ? rd + r->id : NULL;
		p.idlen = r->idlen;
		p.date = r->has_date ? rd + r->date : NULL;
		p.datelen = r->datelen;
		p.title = rd + r->title;
		p.titlelen = r->titlelen;
		memcpy(p.lang, r->lang, sizeof p.lang);
		p.nocc = r->nocc;
		for (size_t q = 0; q < r->nocc; q++) {
			p.occ[q] = rd + b->occ[2 * (r->occ + q)];
			p.occlen[q] = b->occ[2 * (r->occ + q) + 1];
		}
		p.line = r->line;
		memset(&res, 0, sizeof res);
		res.key = rs + r->key;
		res.key_len = r->keylen;
		res.title = rs + r->clean;
		res.title_len = r->cleanlen;
		res.masked = rs + r->masked;
		res.masked_len = r->maskedlen;
		if (c->hold && !p.nocc) {
			if (c->hold(c->ctx, &p, name) != TM_OK)
				return tm_failf(err, TM_ENOMEM, "%s:%ld: out of memory", name, r->line);
			continue;
		}
		tally_posting_of(&tp, &p, &res);
		if (store_feed(st, &p, &tp, name, r->line) != 0)
			return backend_failed(st, err);
		(*fed)++;
	}
	if (c->progress)
		c->progress(c->ctx, *fed, b->bytes);
	return TM_OK;
}

static void *worker(void *arg)
{
	void **a = arg;
	loader *L = a[0];
	normaliser *nm = a[1];

	for (;;) {
		batch *b;
		pthread_mutex_lock(&L->mu);
		while (L->taken == L->filled && !L->quit)
			pthread_cond_wait(&L->work, &L->mu);
		if (L->taken == L->filled) {
			pthread_mutex_unlock(&L->mu);
			return NULL;
		}
		b = &L->ring[L->taken++ % L->nb];
		pthread_mutex_unlock(&L->mu);
		clean(b, nm);
		pthread_mutex_lock(&L->mu);
		b->done = 1;
		pthread_cond_signal(&L->done);
		pthread_mutex_unlock(&L->mu);
	}
}

int load_online_cpus(void)
{
	long n = sysconf(_SC_NPROCESSORS_ONLN);
	return n < 1 ? 1 : n > LOAD_THREADS_MAX ? LOAD_THREADS_MAX : (int)n;
}

int load_run(store *st, const lexicon *lx, const load_conf *conf, char *const *paths, int n,
	     tm_buf *err)
{
	loader L;
	int nw = conf->threads < 1 ? 1 : conf->threads > LOAD_THREADS_MAX ? LOAD_THREADS_MAX
									: conf->threads;
	int threaded = nw > 1, started = 0, rc = TM_OK;
	size_t memo = conf->memo_bytes / (size_t)nw;
	uint64_t counted = 0, fed = 0;
	pthread_t *tid = NULL;
	void *(*args)[2] = NULL;

	memset(&L, 0, sizeof L);
	L.conf = conf;
	L.paths = paths;
	L.npaths = n;
	L.nb = threaded ? (size_t)nw * LOAD_AHEAD : 1;
	L.ring = calloc(L.nb, sizeof *L.ring);
	L.nm = calloc((size_t)nw, sizeof *L.nm);
	tid = calloc((size_t)nw, sizeof *tid);
	args = calloc((size_t)nw, sizeof *args);
	if (!L.ring || !L.nm || !tid || !args) {
		rc = tm_fail(err, TM_EFAIL, NULL, "out of memory", NULL);
		goto out;
	}
	for (int w = 0; w < nw; w++)
		if (!(L.nm[w] = norm_new(lx)) || norm_memo(L.nm[w], memo) != 0) {
			rc = tm_fail(err, TM_EFAIL, NULL, "out of memory", NULL);
			goto out;
		}
	pthread_mutex_init(&L.mu, NULL);
	pthread_cond_init(&L.work, NULL);
	pthread_cond_init(&L.done, NULL);
	for (; threaded && started < nw; started++) {
		args[started][0] = &L;
		args[started][1] = L.nm[started];
		if (pthread_create(&tid[started], NULL, worker, args[started]) != 0) {
			rc = tm_fail(err, TM_EFAIL, NULL, "cannot start a thread to clean titles "
				     "(try --threads 1)", NULL);
			break;
		}
	}
	/* read ahead while there is room, then count the oldest batch */
	while (rc == TM_OK || counted < L.filled) {
		while (rc == TM_OK && !L.over && !L.oom && L.filled - counted < L.nb) {
			batch *b = &L.ring[L.filled % L.nb];
			fill(&L, b);
			if (L.oom)
				break;
			if (!b->n)
				continue;
			if (!threaded) {
				clean(b, L.nm[0]);
				b->done = 1;
			} else
				b->done = 0;
			pthread_mutex_lock(&L.mu);
			L.filled++;
			pthread_cond_signal(&L.work);
			pthread_mutex_unlock(&L.mu);
		}
		if (L.oom && rc == TM_OK)
			rc = tm_fail(err, TM_EFAIL, NULL, "out of memory while reading the postings", NULL);
		if (counted == L.filled)
			break;
		batch *b = &L.ring[counted % L.nb];
		pthread_mutex_lock(&L.mu);
		while (!b->done)
			pthread_cond_wait(&L.done, &L.mu);
		pthread_mutex_unlock(&L.mu);
		if (rc == TM_OK)
			rc = count(&L, st, b, &fed, err);
		counted++;
	}
	pthread_mutex_lock(&L.mu);
	L.quit = 1;
	pthread_cond_broadcast(&L.work);
	pthread_mutex_unlock(&L.mu);
	for (int w = 0; w < started; w++)
		pthread_join(tid[w], NULL);
	pthread_cond_destroy(&L.work);
	pthread_cond_destroy(&L.done);
	pthread_mutex_destroy(&L.mu);
out:
	if (L.open)
		pr_close(&L.pr);
	for (size_t i = 0; L.ring && i < L.nb; i++) {
		free(L.ring[i].row);
		free(L.ring[i].occ);
		buf_free(&L.ring[i].raw);
		buf_free(&L.ring[i].res);
	}
	for (int w = 0; L.nm && w < nw; w++)
		norm_free(L.nm[w]);
	free(L.ring);
	free(L.nm);
	free(tid);
	free(args);
	return rc;
}

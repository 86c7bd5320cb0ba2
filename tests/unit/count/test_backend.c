/* One suite for every backend: the counting interface (src/count/store.h) and
 * the review queue's storage (src/review/queue.h) give the same answers in
 * memory (a queue file) and in Redis.  Without TITLEMILL_TEST_REDIS the
 * memory backend and the queue file are tested; tests/cli/redis.sh and
 * tests/cli/cluster.sh run this binary again with TITLEMILL_TEST_REDIS
 * set to the URL of the server or cluster they started, so each
 * assertion holds for every backend.  The reference is the memory engine
 * fed directly (tm_add): what one run of the postings must count. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "review/queue.h"
#include "review/review.h"
#include "review/review_change.h"
#include "count/store.h"
#include "count/tally.h"

/* A posting as the test writes it: the key is the title lower-cased by
 * hand (the normaliser is not under test here). */
typedef struct row {
	const char *id, *lang, *title, *key, *occ[2];
} row;

static const row rows[] = {
	{"1", "de", "Koch (m/w/d)", "koch", {"occ:5120", NULL}},
	{"2", "de", "Koch", "koch", {"occ:5120", NULL}},
	{"3", "de", "Köchin", "koch", {"occ:5120", "occ:9412"}},
	{"1", "de", "Koch (m/w/d)", "koch", {"occ:5120", NULL}}, /* republished */
	{NULL, "en", "Cook", "cook", {"occ:5120", NULL}},
	{NULL, "en", "Cook", "cook", {"occ:5120", NULL}},
	{"4", "de", "Jungkoch", "jungkoch", {"occ:5120", NULL}},
	{"5", "de", "Koch Valdoria Logistik GmbH", "koch", {"occ:5120", NULL}},
	{"6", "de", "Koch, Vollzeit", "koch", {"occ:5120", NULL}},
	{"7", "fr", "Cuisinier", "cuisinier", {"occ:5120", "occ:9412"}},
	{"3", "de", "Köchin", "koch", {"occ:5120", "occ:9412"}},  /* republished */
	{"8", "und", "Koch", "koch", {"occ:9412", NULL}},
};
#define NROWS (sizeof rows / sizeof *rows)

static size_t nocc(const row *r)
{
	return r->occ[1] ? 2 : 1;
}

static void make_posting(const row *r, posting *p, tally_posting *tp, size_t *ol)
{
	memset(p, 0, sizeof *p);
	p->id = r->id;
	p->idlen = r->id ? strlen(r->id) : 0;
	p->title = r->title;
	p->titlelen = strlen(r->title);
	snprintf(p->lang, sizeof p->lang, "%s", r->lang);
	p->nocc = nocc(r);
	for (size_t i = 0; i < p->nocc; i++) {
		p->occ[i] = r->occ[i];
		p->occlen[i] = ol[i] = strlen(r->occ[i]);
	}
	memset(tp, 0, sizeof *tp);
	tp->id = p->id;
	tp->idlen = p->idlen;
	tp->lang = p->lang;
	tp->key = r->key;
	tp->keylen = strlen(r->key);
	tp->title = r->title;
	tp->titlelen = strlen(r->title);
	tp->example = r->title;
	tp->examplelen = strlen(r->title);
	tp->occ = r->occ;
	tp->occlen = ol;
	tp->nocc = p->nocc;
}

/* ---- the backends under test ---- */

typedef struct backend {
	const char *name;
	const char *url;      /* NULL: memory */
} backend;

static backend backends[2];
static size_t nbackends;
static unsigned serial;

/* A prefix of its own for each store a test opens. */
static void fresh_prefix(char *pfx, size_t n)
{
	snprintf(pfx, n, "tmtest%ld.%u", (long)getpid(), ++serial);
}

/* Opens backend b for a load by period kind (counting into m when it is
 * memory: m's kind decides there). */
static store *open_backend_by(const backend *b, const char *prefix, tally_series *m, int kind)
{
	tm_buf err = {0};
	store_conf conf = {prefix, 2, 5000, 0, kind};
	store *st = b->url ? store_open(b->url, &conf, &err) : store_mem_open(m, &err);
	if (!st)
		fprintf(stderr, "%s: %s\n", b->name, err.data ? err.data : "");
	assert_non_null(st);
	buf_free(&err);
	return st;
}

static store *open_backend(const backend *b, const char *prefix, tally_series *m)
{
	return open_backend_by(b, prefix, m, PERIOD_NONE);
}

/* Sets the date of a posting (NULL: undated). */
static void date_posting(posting *p, tally_posting *tp, const char *date)
{
	p->date = tp->date = date;
	p->datelen = tp->datelen = date ? strlen(date) : 0;
}

/* Feeds rows r[0..n) dated dates[i] (dates NULL: all undated). */
static void feed_dated(store *st, const row *r, const char *const *dates, size_t n,
		       const char *name)
{
	for (size_t i = 0; i < n; i++) {
		posting p;
		tally_posting tp;
		size_t ol[2];
		make_posting(&r[i], &p, &tp, ol);
		date_posting(&p, &tp, dates ? dates[i] : NULL);
		int rc = store_feed(st, &p, &tp, name, (long)i + 2);
		if (rc)
			fprintf(stderr, "%s\n", st->err.data);
		assert_int_equal(rc, 0);
	}
	assert_int_equal(store_input_end(st, name), 0);
}

static void feed(store *st, const row *r, size_t n, const char *name)
{
	feed_dated(st, r, NULL, n, name);
}

static void reference(tally_mem *ref, const row *r, size_t n)
{
	for (size_t i = 0; i < n; i++) {
		posting p;
		tally_posting tp;
		size_t ol[2];
		make_posting(&r[i], &p, &tp, ol);
		assert_true(tm_add(ref, &tp) >= 0);
	}
}

/* The counts table of m, as bytes (the caller frees). */
static char *table(tally_mem *m, size_t *len)
{
	char *s = NULL;
	FILE *fp = open_memstream(&s, len);
	assert_non_null(fp);
	assert_int_equal(tm_write(m, fp), 0);
	fclose(fp);
	return s;
}

/* The same of a series summed over its periods. */
static char *series_table(tally_series *m, size_t *len)
{
	char *s = NULL;
	FILE *fp = open_memstream(&s, len);
	assert_non_null(fp);
	assert_int_equal(series_write(m, fp, 0), 0);
	fclose(fp);
	return s;
}

static void reference_dated(tally_series *ref, const row *r, const char *const *dates, size_t n)
{
	tm_buf err = {0};
	for (size_t i = 0; i < n; i++) {
		posting p;
		tally_posting tp;
		size_t ol[2];
		make_posting(&r[i], &p, &tp, ol);
		date_posting(&p, &tp, dates ? dates[i] : NULL);
		assert_true(series_add(ref, &tp, &err) >= 0);
	}
	buf_free(&err);
}

static void reference_series(tally_series *ref, const row *r, size_t n)
{
	reference_dated(ref, r, NULL, n);
}

/* The counts table of a series with its period column (the caller
 * frees). */
static char *period_table(tally_series *m, size_t *len)
{
	char *s = NULL;
	FILE *fp = open_memstream(&s, len);
	assert_non_null(fp);
	assert_int_equal(series_write(m, fp, 1), 0);
	fclose(fp);
	return s;
}


/* Two tables (freed here) are the same bytes. */
static void assert_same_bytes(char *ta, size_t la, char *tb, size_t lb, const char *what)
{
	if (la != lb || memcmp(ta, tb, la))
		fprintf(stderr, "%s: tables differ\n--- want\n%s--- got\n%s", what, ta, tb);
	assert_int_equal(la, lb);
	assert_memory_equal(ta, tb, la);
	free(ta);
	free(tb);
}

static void assert_same_table(tally_mem *a, tally_series *b, const char *what)
{
	size_t la, lb;
	char *ta = table(a, &la), *tb = series_table(b, &lb);
	assert_same_bytes(ta, la, tb, lb, what);
}

/* The same with periods: want and got by the same kind. */
static void assert_same_series(tally_series *a, tally_series *b, const char *what)
{
	size_t la, lb;
	char *ta = period_table(a, &la), *tb = period_table(b, &lb);
	assert_same_bytes(ta, la, tb, lb, what);
}

/* Runs rows r[0..n) through backend b (chunk postings a chunk) and
 * reads it back into a table that held the rows pre[0..npre) before;
 * checks the table against the memory engine fed all of them directly.
 * The run's figures go to the rest. */
static void check_run(const backend *b, const row *pre, size_t npre, const row *r, size_t n,
		      long chunk, uint64_t *counted, uint64_t *repub, uint64_t *skipped)
{
	char pfx[64], what[160];
	tally_series m, got;
	tally_mem ref;
	series_init(&m, PERIOD_NONE);
	series_init(&got, PERIOD_NONE);
	tm_init(&ref);
	reference(&ref, pre, npre);
	reference(&ref, r, n);
	reference_series(&got, pre, npre);
	fresh_prefix(pfx, sizeof pfx);
	store *st = open_backend(b, pfx, &m);
	store_set_chunk(st, chunk);
	feed(st, r, n, "postings.tsv");
	assert_int_equal(st->ops->finish(st), 0);
	*counted = st->counted;
	*repub = st->republished;
	*skipped = st->skipped;
	int rc = st->ops->dump(st, &got);
	if (rc)
		fprintf(stderr, "%s\n", st->err.data);
	assert_int_equal(rc, 0);
	assert_int_equal(st->unfinished, 0);
	snprintf(what, sizeof what, "%s, chunk %ld", b->name, chunk);
	assert_same_table(&ref, &got, what);
	/* the figures a curator reads, checked by hand */
	if (!npre) {
		const char *ex[TALLY_EXAMPLES];
		size_t exl[TALLY_EXAMPLES];
		tally_mem *all = series_all(&got);
		assert_non_null(all);
		assert_int_equal(tm_occ_postings(all, "occ:5120", 8, "de"), 6);
		assert_int_equal(tm_occ_postings(all, "occ:9412", 8, "de"), 1);
		assert_int_equal(tm_key_postings(all, "de", "koch", 4), 5);
		assert_int_equal(tm_examples(all, "occ:5120", 8, "de", "koch", 4, ex, exl), 3);
	}
	store_close(st);
	series_free(&m);
	series_free(&got);
	tm_free(&ref);
}

/* ---- counting ---- */

/* Every backend counts what the memory engine counts: each id once,
 * postings without an id every time, each occupation of a posting, at
 * most three examples (the smallest hashes), whatever the chunk size. */
static void test_counts(void **state)
{
	(void)state;
	for (size_t b = 0; b < nbackends; b++) {
		const long chunks[] = {1, 3, 5, 10000};
		for (size_t c = 0; c < sizeof chunks / sizeof *chunks; c++) {
			uint64_t counted, repub, skipped;
			check_run(&backends[b], NULL, 0, rows, NROWS, chunks[c], &counted, &repub,
				  &skipped);
			assert_int_equal(counted, 10);
			/* a store's figures are of the chunks it applied: a
			 * chunk all of whose ids were counted before has nothing
			 * to apply and shows as already in the store */
			if (!skipped)
				assert_int_equal(repub, 2);
			else
				assert_true(repub < 2);
		}
	}
}

/* dump adds to what the table holds: a store read beside a counts
 * table sums them (the table holds the last posting, whose id is
 * nowhere else; the backend the rest). */
static void test_dump_adds(void **state)
{
	(void)state;
	for (size_t b = 0; b < nbackends; b++) {
		uint64_t counted, repub, skipped;
		check_run(&backends[b], rows + NROWS - 1, 1, rows, NROWS - 1, 2, &counted, &repub,
			  &skipped);
		assert_int_equal(counted, 9);
	}
}

/* Within one run every input counts, as in memory: the same input twice
 * counts its postings without an id twice (and its ids once). */
static void test_input_twice(void **state)
{
	(void)state;
	tally_mem ref;
	tm_init(&ref);
	reference(&ref, rows, NROWS);
	reference(&ref, rows, NROWS);
	for (size_t b = 0; b < nbackends; b++) {
		char pfx[64];
		tally_series m, got;
		series_init(&m, PERIOD_NONE);
		series_init(&got, PERIOD_NONE);
		fresh_prefix(pfx, sizeof pfx);
		store *st = open_backend(&backends[b], pfx, &m);
		store_set_chunk(st, 4);
		feed(st, rows, NROWS, "a.tsv");
		feed(st, rows, NROWS, "a.tsv");
		assert_int_equal(st->ops->finish(st), 0);
		assert_int_equal(st->counted, 12);
		if (!st->skipped)
			assert_int_equal(st->republished, 12);
		assert_int_equal(st->ops->dump(st, &got), 0);
		assert_same_table(&ref, &got, backends[b].name);
		store_close(st);
		series_free(&m);
		series_free(&got);
	}
	tm_free(&ref);
}

/* A backend that keeps its counts between runs (a store) counts a
 * reloaded input once: every chunk is in its ledger. */
static void test_reload_counts_once(void **state)
{
	(void)state;
	tally_mem ref;
	tm_init(&ref);
	reference(&ref, rows, NROWS);
	for (size_t b = 0; b < nbackends; b++) {
		char pfx[64];
		if (!backends[b].url)
			continue; /* memory starts empty every run */
		fresh_prefix(pfx, sizeof pfx);
		for (int run = 0; run < 2; run++) {
			tally_series none, got;
			series_init(&none, PERIOD_NONE);
			series_init(&got, PERIOD_NONE);
			store *st = open_backend(&backends[b], pfx, &none);
			store_set_chunk(st, 3);
			feed(st, rows, NROWS, "postings.tsv");
			assert_int_equal(st->ops->finish(st), 0);
			assert_int_equal(st->applied, run ? 0 : (NROWS + 2) / 3);
			assert_int_equal(st->skipped, run ? (NROWS + 2) / 3 : 0);
			assert_int_equal(st->ops->dump(st, &got), 0);
			assert_same_table(&ref, &got, backends[b].name);
			store_close(st);
			series_free(&none);
			series_free(&got);
		}
	}
	tm_free(&ref);
}

/* ---- periods ---- */

/* The rows' dates: two months, an ISO week-year that is not the
 * calendar year (2026-12-31 and 2027-01-01 are in 2026-W53), a leap day,
 * and undated postings; the republished rows come in another period
 * than their first (an id counts in the first period it came in). */
static const char *const dates[NROWS] = {
	"2026-12-31", "2027-01-01", "2027-01-04", "2027-02-01", NULL, "2024-02-29",
	"2027-01-04", NULL, "2026-12-28", "2027-01-03", "2028-02-29", "2026-12-31",
};

/* Every backend counts each posting in its period as the memory engine
 * does: the series read back (by the load's kind, and summed to all
 * time) is byte for byte the reference's, for each kind and chunk size. */
static void test_periods(void **state)
{
	(void)state;
	const int kinds[] = {PERIOD_DAY, PERIOD_WEEK, PERIOD_MONTH, PERIOD_NONE};
	for (size_t b = 0; b < nbackends; b++)
		for (size_t k = 0; k < sizeof kinds / sizeof *kinds; k++) {
			const long chunks[] = {1, 5, 10000};
			for (size_t c = 0; c < sizeof chunks / sizeof *chunks; c++) {
				char pfx[64], what[160];
				tally_series ref, m, got, all, refall;
				series_init(&ref, kinds[k]);
				series_init(&m, kinds[k]);
				series_init(&got, kinds[k]);
				series_init(&all, PERIOD_NONE);
				series_init(&refall, PERIOD_NONE);
				reference_dated(&ref, rows, dates, NROWS);
				reference_dated(&refall, rows, dates, NROWS);
				fresh_prefix(pfx, sizeof pfx);
				store *st = open_backend_by(&backends[b], pfx, &m, kinds[k]);
				store_set_chunk(st, chunks[c]);
				feed_dated(st, rows, dates, NROWS, "dated.tsv");
				assert_int_equal(st->ops->finish(st), 0);
				assert_int_equal(st->counted, 10);
				/* a store says how many had no date (rows 5 and 8) */
				if (backends[b].url)
					assert_int_equal(st->undated, kinds[k] == PERIOD_NONE ? 0 : 2);
				assert_int_equal(st->ops->dump(st, &got), 0);
				assert_int_equal(st->ops->dump(st, &all), 0);
				snprintf(what, sizeof what, "%s, by %s, chunk %ld", backends[b].name,
					 period_kind_name(kinds[k]), chunks[c]);
				assert_same_series(&ref, &got, what);
				assert_same_series(&refall, &all, what);
				if (kinds[k] == PERIOD_WEEK) {
					/* the week-year's last week, 2026-12-28 ..
					 * 2027-01-03, across the calendar year's end */
					tally_mem *w53;
					tm_buf err = {0};
					assert_int_equal(series_at(&got, "2026-W53", 8, &w53, &err), 0);
					assert_int_equal(tm_occ_postings(w53, "occ:5120", 8, "de"), 3);
					assert_int_equal(tm_occ_postings(w53, "occ:5120", 8, "fr"), 1);
					buf_free(&err);
				}
				store_close(st);
				series_free(&ref);
				series_free(&m);
				series_free(&got);
				series_free(&all);
				series_free(&refall);
			}
		}
}

/* A store holds one kind of period: a load by another kind is refused
 * before it writes anything, and so is reading a store by weeks into
 * months; a store by days reads into weeks and months (rolled up). */
static void test_period_kind(void **state)
{
	(void)state;
	for (size_t b = 0; b < nbackends; b++) {
		char pfx[64];
		tally_series none, got, ref;
		if (!backends[b].url)
			continue; /* memory holds what one run counts */
		fresh_prefix(pfx, sizeof pfx);
		series_init(&none, PERIOD_NONE);
		store *st = open_backend_by(&backends[b], pfx, &none, PERIOD_WEEK);
		feed_dated(st, rows, dates, NROWS, "dated.tsv");
		assert_int_equal(st->ops->finish(st), 0);
		store_close(st);

		st = open_backend_by(&backends[b], pfx, &none, PERIOD_MONTH);
		posting p;
		tally_posting tp;
		size_t ol[2];
		make_posting(&rows[0], &p, &tp, ol);
		date_posting(&p, &tp, "2027-03-01");
		assert_int_equal(store_feed(st, &p, &tp, "other.tsv", 2), -1);
		assert_non_null(strstr(st->err.data, "the store counts by week, and this load by month"));
		series_init(&got, PERIOD_MONTH);
		assert_int_equal(st->ops->dump(st, &got), -1);
		assert_non_null(strstr(st->err.data, "the store counts by week, which cannot be read by month"));
		series_free(&got);
		/* read by week it is the week load's, nothing of the refused one */
		series_init(&got, PERIOD_WEEK);
		series_init(&ref, PERIOD_WEEK);
		reference_dated(&ref, rows, dates, NROWS);
		assert_int_equal(st->ops->dump(st, &got), 0);
		assert_same_series(&ref, &got, "week store after a refused month load");
		series_free(&got);
		series_free(&ref);
		store_close(st);

		/* by day, read as months */
		fresh_prefix(pfx, sizeof pfx);
		st = open_backend_by(&backends[b], pfx, &none, PERIOD_DAY);
		feed_dated(st, rows, dates, NROWS, "dated.tsv");
		assert_int_equal(st->ops->finish(st), 0);
		series_init(&got, PERIOD_MONTH);
		series_init(&ref, PERIOD_MONTH);
		reference_dated(&ref, rows, dates, NROWS);
		assert_int_equal(st->ops->dump(st, &got), 0);
		assert_same_series(&ref, &got, "day store read by month");
		series_free(&got);
		series_free(&ref);
		store_close(st);
		series_free(&none);
	}
}

/* ---- the review queue's storage ---- */

/* Two suggestions as propose writes them. */
static const char alt_line[] =
	"{\"id\":\"00000000000000b1\",\"kind\":\"new_alt_label\",\"occupation\":\"occ:5120\","
	"\"lang\":\"de\",\"label\":\"koch\",\"score\":40.5,\"postings\":40,"
	"\"examples\":[\"Koch (m/w/d)\"]}";
static const char rare_line[] =
	"{\"id\":\"00000000000000b2\",\"kind\":\"rare_label\",\"occupation\":\"occ:5120\","
	"\"lang\":\"de\",\"label\":\"jungkoch\",\"score\":3.5,\"postings\":3,"
	"\"examples\":[\"Jungkoch\"]}";

typedef struct add_arg {
	const char *line, *now;
} add_arg;

static int add_change(rq_queue *q, void *a0, tm_buf *err)
{
	add_arg *a = a0;
	rq_addstat st = {0};
	return rq_add(q, a->line, strlen(a->line), "t:1", a->now, 3, &st, err);
}

static int decide_change(rq_queue *q, void *a0, tm_buf *err)
{
	(void)a0;
	int many, outcome;
	rq_item *it = rq_find(q, "00000000000000b1", 16, &many);
	if (!it || rq_decide(it, 0, "Mira Ostvalden", "kept", "2026-12-03T10:00:00Z", 0, &outcome,
			     err) != TM_OK || outcome != RD_APPLIED)
		return -1;
	return 0;
}

static int fail_change(rq_queue *q, void *a0, tm_buf *err)
{
	(void)q;
	(void)a0;
	buf_puts(err, "refused");
	return -1;
}

/* Every storage of the queue keeps what a change wrote, writes nothing
 * for a change that fails, and reads back the same items. */
static void test_queue(void **state)
{
	(void)state;
	char qpath[] = "/tmp/tm-backend-queue-XXXXXX";
	int fd = mkstemp(qpath);
	assert_true(fd >= 0);
	close(fd);
	unlink(qpath);
	for (size_t b = 0; b < nbackends; b++) {
		char pfx[64];
		tm_buf err = {0};
		rq_place pl;
		rq_queue q = {0};
		store_conf conf = {pfx, 2, 5000, 0, PERIOD_NONE};
		add_arg a = {alt_line, "2026-12-02T09:00:00Z"};

		fresh_prefix(pfx, sizeof pfx);
		rq_store *qs = backends[b].url ? rq_store_redis_open(backends[b].url, &conf, &err)
					       : rq_store_file_open(qpath, &err);
		assert_non_null(qs);
		rq_place_init(&pl, qs, backends[b].url ? NULL : qpath);
		/* no queue yet: empty when that is allowed */
		assert_int_equal(rq_read(&pl, &q, 1, &err), 0);
		assert_int_equal(q.n, 0);
		rq_free(&q);
		assert_int_equal(rq_transact(&pl, add_change, &a, &err), 0);
		a.line = rare_line;
		assert_int_equal(rq_transact(&pl, add_change, &a, &err), 0);
		assert_int_equal(rq_transact(&pl, decide_change, NULL, &err), 0);
		assert_int_equal(rq_transact(&pl, fail_change, NULL, &err), -1);
		assert_string_equal(err.data, "refused");
		rq_place_close(&pl);

		qs = backends[b].url ? rq_store_redis_open(backends[b].url, &conf, &err)
					       : rq_store_file_open(qpath, &err);
		assert_non_null(qs);
		rq_place_init(&pl, qs, backends[b].url ? NULL : qpath);
		memset(&q, 0, sizeof q);
		assert_int_equal(rq_read(&pl, &q, 0, &err), 0);
		assert_int_equal(q.n, 2);
		assert_int_equal(pl.nbad, 0);
		int many;
		const rq_item *it = rq_find(&q, "00000000000000b1", 16, &many);
		assert_non_null(it);
		assert_string_equal(rq_status_name(it), "accepted");
		assert_int_equal(it->nev, 2);
		it = rq_find(&q, "00000000000000b2", 16, &many);
		assert_non_null(it);
		assert_string_equal(rq_status_name(it), "open");
		rq_free(&q);
		rq_place_close(&pl);
		buf_free(&err);
	}
	unlink(qpath);
	char lock[64];
	snprintf(lock, sizeof lock, "%s.lock", qpath);
	unlink(lock);
}

int main(void)
{
	const char *url = getenv("TITLEMILL_TEST_REDIS");
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_counts),
		cmocka_unit_test(test_input_twice),
		cmocka_unit_test(test_dump_adds),
		cmocka_unit_test(test_reload_counts_once),
		cmocka_unit_test(test_periods),
		cmocka_unit_test(test_period_kind),
		cmocka_unit_test(test_queue),
	};
	backends[nbackends++] = (backend){"memory", NULL};
	if (url && *url)
		backends[nbackends++] = (backend){url, url};
	return cmocka_run_group_tests_name(url && *url ? "backend (memory and store)" : "backend (memory)",
					   tests, NULL, NULL);
}

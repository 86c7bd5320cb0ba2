/* Unit tests for the similarity measures and their search
 * (src/match/sim.c).
 *
 * Outside values: ref_sim.py beside this file computes, for a fixed
 * corpus and queries, the TF-IDF character 3-gram cosine with
 * scikit-learn 1.2 (Debian's python3-sklearn: TfidfVectorizer(analyzer=
 * "char_wb", ngram_range=(3, 3)), its analyzer, idf_ and normalised
 * vectors) and Okapi BM25 written with Python's standard library; each
 * (query, document) pair is checked here against them. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "core/err.h"
#include "match/sim.h"

#define MAXT 64

static char docs[MAXT][128], queries[MAXT][128];
static int ndocs, nqueries;

typedef struct pair { int q, d; double cos, bm25, bm25n, dcov; } pair;
static pair pairs[MAXT * MAXT];
static int npairs;

static int setup(void **state)
{
	(void)state;
	char cmd[1024], line[512];
	const char *here = __FILE__;
	const char *slash = strrchr(here, '/');
	snprintf(cmd, sizeof cmd, "/usr/bin/python3 %.*sref_sim.py",
		 slash ? (int)(slash - here + 1) : 0, here);
	FILE *fp = popen(cmd, "r");
	if (!fp)
		return -1;
	while (fgets(line, sizeof line, fp)) {
		line[strcspn(line, "\n")] = 0;
		if (!strncmp(line, "doc ", 4) && ndocs < MAXT)
			snprintf(docs[ndocs++], sizeof docs[0], "%.120s", line + 4);
		else if (!strncmp(line, "query ", 6) && nqueries < MAXT)
			snprintf(queries[nqueries++], sizeof queries[0], "%.120s", line + 6);
		else if (!strncmp(line, "pair ", 5) && npairs < MAXT * MAXT) {
			pair *p = &pairs[npairs++];
			if (sscanf(line + 5, "%d %d %lf %lf %lf %lf", &p->q, &p->d, &p->cos, &p->bm25,
				   &p->bm25n, &p->dcov) != 6)
				return -1;
		}
	}
	if (pclose(fp) != 0 || !npairs) {
		fprintf(stderr, "test_sim: %s failed (is python3-sklearn installed?)\n", cmd);
		return -1;
	}
	return 0;
}

static sim_index *build(void)
{
	sim_index *x = sim_new();
	assert_non_null(x);
	for (int i = 0; i < ndocs; i++)
		assert_int_equal(sim_add(x, docs[i], strlen(docs[i])), TM_OK);
	assert_int_equal(sim_finish(x), TM_OK);
	return x;
}

/* Every (query, document) pair: cosine and BM25 as the references give. */
static void test_reference(void **state)
{
	(void)state;
	sim_index *x = build();
	sim_work *w = sim_work_new(x);
	assert_non_null(w);
	assert_int_equal(npairs, ndocs * nqueries);
	for (int i = 0; i < npairs; i++) {
		const pair *p = &pairs[i];
		sim_hit h;
		assert_int_equal(sim_pair(x, w, queries[p->q], strlen(queries[p->q]), (uint32_t)p->d, &h),
				 TM_OK);
		if (fabs(h.cos - p->cos) > 1e-5 || fabs(h.bm25 - p->bm25) > 1e-9 ||
		    fabs(h.bm25n - p->bm25n) > 1e-9 || fabs(h.dcov - p->dcov) > 1e-9)
			fail_msg("'%s' vs '%s': cos %.9f bm25 %.9f bm25n %.9f dcov %.9f, "
				 "reference %.9f %.9f %.9f %.9f",
				 queries[p->q], docs[p->d], h.cos, h.bm25, h.bm25n, h.dcov, p->cos,
				 p->bm25, p->bm25n, p->dcov);
		assert_true(fabs(h.s - (SIM_W_CHAR * h.cos + SIM_W_WORD * h.bm25n * h.dcov)) < 1e-12);
	}
	sim_work_free(w);
	sim_free(x);
}

/* The search ranks as scoring every document would (the corpus is smaller
 * than SIM_CANDIDATES, so nothing is cut), best first, ties by number. */
static void test_search(void **state)
{
	(void)state;
	sim_index *x = build();
	sim_work *w = sim_work_new(x);
	sim_hit hits[MAXT];
	size_t n;
	for (int q = 0; q < nqueries; q++) {
		double best = 0;
		int bestd = -1, positive = 0;
		for (int d = 0; d < ndocs; d++) {
			sim_hit h;
			assert_int_equal(sim_pair(x, w, queries[q], strlen(queries[q]), (uint32_t)d, &h), TM_OK);
			if (h.s > 0 && h.cos > 0)
				positive++;
			if (h.s > best) {
				best = h.s;
				bestd = d;
			}
		}
		assert_int_equal(sim_query(x, w, queries[q], strlen(queries[q]), hits, MAXT, &n), TM_OK);
		assert_int_equal((int)n, positive);
		if (bestd >= 0) {
			assert_int_equal((int)hits[0].doc, bestd);
			assert_true(fabs(hits[0].s - best) < 1e-12);
		}
		for (size_t i = 1; i < n; i++)
			assert_true(hits[i - 1].s > hits[i].s ||
				    (hits[i - 1].s == hits[i].s && hits[i - 1].doc < hits[i].doc));
	}
	/* a document equal to the query is its own best match, at s = 1 */
	assert_int_equal(sim_query(x, w, "lagerist", 8, hits, MAXT, &n), TM_OK);
	assert_int_equal(hits[0].doc, 0);
	assert_true(fabs(hits[0].s - 1.0) < 1e-6);
	/* no gram shared: no hit; an empty query: none */
	assert_int_equal(sim_query(x, w, "zzz qqq", 7, hits, MAXT, &n), TM_OK);
	assert_int_equal(n, 0);
	assert_int_equal(sim_query(x, w, "", 0, hits, MAXT, &n), TM_OK);
	assert_int_equal(n, 0);
	sim_work_free(w);
	sim_free(x);
}

/* A query longer than SIM_QUERY_MAX is cut at a word boundary: the words
 * after the cut do not count; a long word without spaces is cut at a code
 * point boundary and still scores. */
static void test_long_query(void **state)
{
	(void)state;
	sim_index *x = build();
	sim_work *w = sim_work_new(x);
	char q[4 * SIM_QUERY_MAX];
	sim_hit h1, h2;
	memset(q, 0, sizeof q);
	for (size_t i = 0; i + 9 < SIM_QUERY_MAX; i += 9)
		memcpy(q + i, "lagerist ", 9);
	size_t base = strlen(q);
	memcpy(q + base, "kassierer kassierer kassierer kassierer", 39);
	assert_int_equal(sim_pair(x, w, q, base, 0, &h1), TM_OK);
	assert_int_equal(sim_pair(x, w, q, strlen(q), 0, &h2), TM_OK);
	assert_true(fabs(h1.cos - h2.cos) < 1e-12);
	for (size_t i = 0; i < sizeof q - 1; i += 2)
		memcpy(q + i, "\xc3\xa9", 2);
	q[sizeof q - 1] = 0;
	size_t n;
	sim_hit hits[4];
	assert_int_equal(sim_query(x, w, q, strlen(q), hits, 4, &n), TM_OK);
	sim_work_free(w);
	sim_free(x);
}

/* An empty index answers nothing. */
static void test_empty(void **state)
{
	(void)state;
	sim_index *x = sim_new();
	sim_hit hits[4];
	size_t n = 9;
	assert_int_equal(sim_finish(x), TM_OK);
	sim_work *w = sim_work_new(x);
	assert_int_equal(sim_query(x, w, "lagerist", 8, hits, 4, &n), TM_OK);
	assert_int_equal(n, 0);
	sim_work_free(w);
	sim_free(x);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_reference),
		cmocka_unit_test(test_search),
		cmocka_unit_test(test_long_query),
		cmocka_unit_test(test_empty),
	};
	return cmocka_run_group_tests(tests, setup, NULL);
}

/* test_overlap.c - the divergence against scipy, and the overlap engine
 * on small counts whose answers are worked out by hand. */
#include <inttypes.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "count/tally.h"
#include "rank/groups.h"
#include "rank/overlap.h"

/* Identical proportions are 0 exactly, disjoint ones 1 exactly. */
static void test_edges(void **state)
{
	(void)state;
	uint64_t a[] = {5, 0, 10}, b[] = {15, 0, 30}, c[] = {0, 7, 0};
	double d, s;
	overlap_jsd_dense(a, b, 3, &d, &s);
	assert_true(d == 0);
	assert_float_equal(s, 1, 1e-15);
	overlap_jsd_dense(a, c, 3, &d, &s);
	assert_true(d == 1);
	assert_true(s == 0);
	/* p = (1/2, 1/2), q = (1, 0): JSD = 1 - 1/2 (1/2 log2 3 + log2 3/2)
	 * (by hand from the shared-key form) */
	uint64_t x[] = {1, 1}, y[] = {1, 0};
	overlap_jsd_dense(x, y, 2, &d, &s);
	assert_float_equal(d, 1 - 0.5 * (0.5 * log2(3) + log2(1.5)), 1e-15);
	assert_float_equal(s, 0.5, 1e-15);
}

/* 400 pairs against scipy.spatial.distance.jensenshannon(p, q, base=2)
 * squared, from the file tests/unit/rank/gen_jsd_cases.py writes
 * (JSD_CASES; the Makefile's unit target makes it). */
static void test_scipy(void **state)
{
	(void)state;
	const char *path = getenv("JSD_CASES");
	FILE *fp;
	int n, cases = 0;
	if (!path)
		fail_msg("JSD_CASES is not set (run the tests through make unit)");
	fp = fopen(path, "r");
	assert_non_null(fp);
	while (fscanf(fp, "%d", &n) == 1) {
		uint64_t a[64], b[64];
		double want, wshared, got, shared;
		assert_true(n > 0 && n <= 64);
		for (int i = 0; i < n; i++)
			assert_int_equal(fscanf(fp, "%" SCNu64, &a[i]), 1);
		for (int i = 0; i < n; i++)
			assert_int_equal(fscanf(fp, "%" SCNu64, &b[i]), 1);
		assert_int_equal(fscanf(fp, "%lf %lf", &want, &wshared), 2);
		overlap_jsd_dense(a, b, (size_t)n, &got, &shared);
		if (fabs(got - want) > 1e-9 || fabs(shared - wshared) > 1e-9)
			fail_msg("case %d: divergence %.12g (scipy %.12g), shared %.12g (%.12g)", cases + 1,
				 got, want, shared, wshared);
		cases++;
	}
	fclose(fp);
	assert_int_equal(cases, 400);
}

static void form(tally_mem *m, const char *occ, const char *lang, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_form(m, occ, strlen(occ), lang, key, strlen(key), key, strlen(key), n), 0);
}

typedef struct seen {
	char row[16][160];
	int n;
} seen;

static int on_pair(void *ctx, const overlap_pair *p)
{
	seen *s = ctx;
	assert_true(s->n < 16);
	snprintf(s->row[s->n++], sizeof s->row[0], "%.*s %.*s %s %.4f %.4f %d %.*s", (int)p->ol, p->occ,
		 (int)p->otl, p->other, p->lang, p->divergence, p->shared, p->ntitles,
		 p->ntitles ? (int)p->titles[0].kl : 0, p->ntitles ? p->titles[0].key : "");
	return 0;
}

static int on_occ(void *ctx, const overlap_occ *o)
{
	seen *s = ctx;
	assert_true(s->n < 16);
	snprintf(s->row[s->n++], sizeof s->row[0], "%.*s %s %.*s %.*s %d %.*s", (int)o->ol, o->occ,
		 o->lang, (int)o->gl, o->group, (int)o->nl, o->nearest ? o->nearest : "-",
		 o->ntitles, o->ntitles ? (int)o->titles[0].kl : 0, o->ntitles ? o->titles[0].key : "");
	return 0;
}

/* Pairs: the order, the smaller id first, the skipped and the capped. */
static void test_pairs(void **state)
{
	(void)state;
	tally_mem m;
	overlap *ov;
	seen s = {0};
	tm_buf err = {0};
	tm_init(&m);
	/* b and c: the same proportions; a and b: half shared */
	form(&m, "b", "en", "cook", 60);
	form(&m, "b", "en", "chef", 60);
	form(&m, "c", "en", "cook", 30);
	form(&m, "c", "en", "chef", 30);
	form(&m, "a", "en", "cook", 100);
	form(&m, "a", "en", "baker", 100);
	form(&m, "d", "en", "welder", 80);   /* shares nothing */
	form(&m, "e", "en", "cook", 10);     /* too few postings */
	form(&m, "a", "de", "koch", 100);    /* another language */
	form(&m, "b", "de", "koch", 100);
	overlap_opts o = {50, 1000, NULL, NULL};
	assert_int_equal(overlap_build(&ov, &m, &o, &err), 0);
	assert_int_equal(overlap_pairs(ov, 1, 0, on_pair, &s), 0);
	assert_int_equal(s.n, 4);
	assert_string_equal(s.row[0], "a b de 0.0000 1.0000 1 koch");
	assert_string_equal(s.row[1], "b c en 0.0000 1.0000 2 chef");
	/* a = (1/2 cook, 1/2 baker), b = (1/2 cook, 1/2 chef): 1 - 1/2 (1/2 + 1/2) = 0.5 */
	assert_string_equal(s.row[2], "a b en 0.5000 0.5000 1 cook");
	assert_string_equal(s.row[3], "a c en 0.5000 0.5000 1 cook");
	const overlap_stats *st = overlap_get_stats(ov);
	assert_int_equal(st->distributions, 7);
	assert_int_equal(st->pairs_all, 10 + 1);
	assert_int_equal(st->pairs_compared, 4 + 3); /* e with a, b, c */
	assert_int_equal(st->pairs_small, 3);
	assert_int_equal(st->keys_capped, 0);
	s.n = 0;
	assert_int_equal(overlap_pairs(ov, 0.25, 1, on_pair, &s), 0);
	assert_int_equal(s.n, 1);
	overlap_free(ov);

	/* a cap of 2: "cook" (4 occupations) makes no pairs; b and c still
	 * meet through "chef", and cook counts in their divergence */
	o.key_cap = 2;
	s.n = 0;
	assert_int_equal(overlap_build(&ov, &m, &o, &err), 0);
	assert_int_equal(overlap_pairs(ov, 1, 0, on_pair, &s), 0);
	assert_int_equal(s.n, 2);
	assert_string_equal(s.row[1], "b c en 0.0000 1.0000 2 chef");
	assert_int_equal(overlap_get_stats(ov)->keys_capped, 1);
	overlap_free(ov);
	tm_free(&m);
	buf_free(&err);
}

/* Groups: the misfiled occupation and its pulling title; a sole member
 * has no own divergence. */
static void test_groups(void **state)
{
	(void)state;
	tally_mem m;
	overlap *ov;
	groupmap g;
	seen s = {0};
	tm_buf err = {0};
	tm_init(&m);
	form(&m, "x:11", "en", "cook", 100);
	form(&m, "x:12", "en", "cook", 80);
	form(&m, "x:12", "en", "chef", 20);
	form(&m, "x:13", "en", "welder", 90); /* filed with the cooks, writes like 2x */
	form(&m, "x:13", "en", "cook", 10);
	form(&m, "x:21", "en", "welder", 100);
	form(&m, "x:22", "en", "welder", 50);
	form(&m, "x:22", "en", "fitter", 50);
	form(&m, "x:31", "en", "fitter", 100);
	groups_by_prefix(&g, 1);
	overlap_opts o = {50, 1000, NULL, &g};
	assert_int_equal(overlap_build(&ov, &m, &o, &err), 0);
	assert_int_equal(overlap_occupations(ov, 1, 0, on_occ, &s), 0);
	assert_int_equal(s.n, 1);
	assert_string_equal(s.row[0], "x:13 en 1 2 1 welder");
	s.n = 0;
	assert_int_equal(overlap_occupations(ov, 0, 0, on_occ, &s), 0);
	assert_int_equal(s.n, 6);
	assert_string_equal(s.row[5], "x:31 en 3 2 0 "); /* alone in 3: nearest 2 */
	overlap_free(ov);
	groups_free(&g);
	tm_free(&m);
	buf_free(&err);
}

/* A code prefix counts characters, after the last '/', '#' or ':'. */
static void test_prefix(void **state)
{
	(void)state;
	groupmap g;
	size_t n;
	const char *p;
	groups_by_prefix(&g, 2);
	p = groups_of(&g, "http://example.org/isco/C2512", 29, &n);
	assert_int_equal(n, 2);
	assert_memory_equal(p, "C2", 2);
	p = groups_of(&g, "urn:x#ÄÖ12", strlen("urn:x#ÄÖ12"), &n);
	assert_int_equal(n, 4);
	assert_memory_equal(p, "ÄÖ", 4);
	assert_null(groups_of(&g, "occ:7", 5, &n));
	groups_free(&g);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_edges),
		cmocka_unit_test(test_scipy),
		cmocka_unit_test(test_pairs),
		cmocka_unit_test(test_groups),
		cmocka_unit_test(test_prefix),
	};
	return cmocka_run_group_tests_name("overlap", tests, NULL, NULL);
}

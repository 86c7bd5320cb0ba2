/* Unit tests for the trend engine (src/rank/trend.c) on two small
 * hand-built windows.
 *
 * Outside values: G^2 from scipy 1.10 (Debian's python3-scipy)
 * chi2_contingency(t, correction=False, lambda_="log-likelihood") with
 * t = [[after, occupation's other after], [before, other before]]; Wilson
 * intervals are those of wilson(), checked against scipy in
 * test_stats.c. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "norm/lexicon.h"
#include "norm/norm.h"
#include "rank/labels.h"
#include "rank/trend.h"
#include "count/series.h"
#include "count/tally.h"

#include "trend_fixture.h"

static const trend_row *find(const trend_list *l, const char *occ, const char *key)
{
	for (size_t i = 0; i < l->n; i++)
		if (l->v[i].ol == strlen(occ) && !memcmp(l->v[i].occ, occ, l->v[i].ol) &&
		    l->v[i].kl == strlen(key) && !memcmp(l->v[i].key, key, l->v[i].kl))
			return &l->v[i];
	return NULL;
}

static void test_directions(void **state)
{
	(void)state;
	trend_bars b;
	trend_list l;
	trend_bars_default(&b);
	assert_int_equal(trend_run(&B, &A, &LS, &b, NULL, &l), 0);
	/* rising: lagerlogistiker, koch; falling: kuechenhilfe, lagerist */
	assert_int_equal(l.n, 4);
	assert_int_equal(l.one_window, 1);
	const trend_row *r = find(&l, "occ:1", "lagerlogistiker");
	assert_non_null(r);
	assert_int_equal(r->direction, TREND_RISING);
	assert_int_equal(r->before, 0);
	assert_int_equal(r->after, 40);
	assert_null(r->lb);
	assert_float_equal(r->g2, 65.55863601, 1e-6); /* scipy [[40,60],[0,100]] */
	assert_float_equal(r->share_after, 0.40, 1e-12);
	assert_true(r->lo_after < 0.40 && r->hi_after > 0.40);
	assert_float_equal(r->lo_before, 0, 1e-12);
	r = find(&l, "occ:1", "lagerist");
	assert_non_null(r);
	assert_int_equal(r->direction, TREND_FALLING);
	assert_non_null(r->lb);
	assert_float_equal(r->g2, 20.26873479, 1e-6); /* scipy [[20,80],[50,50]] */
	r = find(&l, "occ:2", "kuechenhilfe");
	assert_non_null(r);
	assert_int_equal(r->direction, TREND_FALLING);
	assert_int_equal(r->after, 0);
	assert_non_null(r->lb);
	assert_int_equal(r->lb->kind, 'a');
	assert_float_equal(r->g2, 51.78277304, 1e-6); /* scipy [[0,60],[30,30]] */
	assert_null(find(&l, "occ:1", "kommissionierer")); /* ratio 1.43 < 2 */
	assert_null(find(&l, "occ:1", "lagerhelfer"));     /* 5 postings < 10 */
	/* rising first, then falling, each by G^2 */
	assert_int_equal(l.v[0].direction, TREND_RISING);
	assert_true(l.v[0].g2 >= l.v[1].g2);
	assert_int_equal(l.v[2].direction, TREND_FALLING);
	assert_true(l.v[2].g2 >= l.v[3].g2);
	trend_list_free(&l);

	/* kommissionierer 50 -> 35 has G^2 4.62 (scipy) below 10.83: not at ratio
	 * 1.0 either; and a filter keeps one occupation */
	b.min_ratio = 1.0;
	trend_filter f = {"occ:2", NULL};
	assert_int_equal(trend_run(&B, &A, &LS, &b, NULL, &l), 0);
	assert_null(find(&l, "occ:1", "kommissionierer"));
	trend_list_free(&l);
	assert_int_equal(trend_run(&B, &A, &LS, &b, &f, &l), 0);
	assert_int_equal(l.n, 2);
	assert_int_equal(l.one_window, 0);
	trend_list_free(&l);

	/* the same window on both sides: nothing moves */
	assert_int_equal(trend_run(&A, &A, &LS, &b, NULL, &l), 0);
	assert_int_equal(l.n, 0);
	trend_list_free(&l);
}

/* One period of a series by week: occ:1 with 100 postings, and the
 * titles' postings given (0: none). */
static void week(tally_series *s, const char *per, uint64_t spike, uint64_t fading,
		 uint64_t neu)
{
	tally_mem *m;
	tm_buf err = {0};
	assert_int_equal(series_at(s, per, strlen(per), &m, &err), 0);
	assert_non_null(m);
	const char *k[3] = {"spitze", "schwund", "neuling"};
	uint64_t n[3] = {spike, fading, neu}, rest = 100;
	for (int i = 0; i < 3; i++)
		if (n[i]) {
			form(m, "occ:1", k[i], n[i]);
			rest -= n[i];
		}
	form(m, "occ:1", "sonst", rest);
	occ(m, "occ:1", 100);
	buf_free(&err);
}

/* occ:2 in a period: stamm 20 postings, welle as given, 80 others. */
static void diluted(tally_series *s, const char *per, uint64_t welle)
{
	tally_mem *m;
	tm_buf err = {0};
	assert_int_equal(series_at(s, per, strlen(per), &m, &err), 0);
	form(m, "occ:2", "stamm", 20);
	form(m, "occ:2", "sonst", 80);
	if (welle)
		form(m, "occ:2", "welle", welle);
	occ(m, "occ:2", 100 + welle);
	buf_free(&err);
}

static long day_of(const char *per, int last)
{
	long a, b;
	assert_int_equal(period_span(per, strlen(per), &a, &b, NULL), 0);
	return last ? b : a;
}

/* The windows from..to and W05..W08 summed into before and after (which
 * the rows point into: the caller frees them): trend_run, then
 * trend_periods (with first_seen when first is not NULL). */
static void compare(tally_series *s, const char *from, const char *to, tally_mem *before,
		    tally_mem *after, trend_list *l, const char **first)
{
	trend_bars b;
	long b0 = day_of(from, 0), b1 = day_of(to, 1);
	long a0 = day_of("2026-W05", 0), a1 = day_of("2026-W08", 1);
	trend_bars_default(&b);
	tm_init(before);
	tm_init(after);
	assert_true(series_sum(s, b0, b1, before) > 0);
	assert_int_equal(series_sum(s, a0, a1, after), 4);
	assert_int_equal(trend_run(before, after, &LS, &b, NULL, l), 0);
	assert_int_equal(trend_periods(s, b0, b1, a0, a1, &b, l, first), 0);
}

/* A one-week mass posting in an earlier window of four weeks is no
 * trend, nor are the other titles it dilutes; a label fading and a title
 * new in the later window are, whatever their busiest week; with two
 * weeks before, a burst cannot be told from a change and is kept. */
static void test_lasting(void **state)
{
	(void)state;
	tally_series s;
	tally_mem bm, am;
	trend_list l;
	const char *first[8];
	series_init(&s, SERIES_AS_READ);
	/* spitze: 5, 60, 5, 5 -> 5 each (75/400 -> 20/400: ratio 3.75, but
	 * W02 is a burst against the weeks on either side, and the others
	 * hold 15/300, as after); schwund 20 each -> 2 each; neuling none ->
	 * 0, 0, 10, 30 */
	week(&s, "2026-W01", 5, 20, 0);
	week(&s, "2026-W02", 60, 20, 0);
	week(&s, "2026-W03", 5, 20, 0);
	week(&s, "2026-W04", 5, 20, 0);
	week(&s, "2026-W05", 5, 2, 0);
	week(&s, "2026-W06", 5, 2, 0);
	week(&s, "2026-W07", 5, 2, 10);
	week(&s, "2026-W08", 5, 2, 30);
	/* occ:2: welle mass-posted in W02 (400 of 500 postings) dilutes stamm,
	 * 20 % everywhere else: 80/800 before, 80/400 after is ratio 2 and
	 * G^2 above 10.83, but W02 is a dip of stamm against the weeks on
	 * either side, and without it stamm is 60/300: no change */
	for (int i = 1; i <= 8; i++) {
		char per[16];
		snprintf(per, sizeof per, "2026-W%02d", i);
		diluted(&s, per, i == 2 ? 400 : 0);
	}
	compare(&s, "2026-W01", "2026-W04", &bm, &am, &l, first);
	assert_int_equal(l.n, 2);
	const trend_row *r = find(&l, "occ:1", "neuling");
	assert_non_null(r);
	assert_int_equal(r->direction, TREND_RISING);
	assert_string_equal(first[r - l.v], "2026-W07");
	r = find(&l, "occ:1", "schwund");
	assert_non_null(r);
	assert_int_equal(r->direction, TREND_FALLING);
	assert_string_equal(first[r - l.v], "2026-W01");
	assert_null(find(&l, "occ:1", "spitze"));
	assert_null(find(&l, "occ:2", "stamm"));
	assert_null(find(&l, "occ:2", "welle"));
	trend_list_free(&l);
	tm_free(&bm);
	tm_free(&am);
	/* before W01..W02: two weeks, no check: spitze 65/200 -> 20/400 kept */
	compare(&s, "2026-W01", "2026-W02", &bm, &am, &l, NULL);
	assert_non_null(find(&l, "occ:1", "spitze"));
	assert_non_null(find(&l, "occ:2", "welle"));
	assert_non_null(find(&l, "occ:1", "schwund"));
	trend_list_free(&l);
	tm_free(&bm);
	tm_free(&am);
	series_free(&s);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_directions),
		cmocka_unit_test(test_lasting),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}

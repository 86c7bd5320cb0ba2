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

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_directions),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}

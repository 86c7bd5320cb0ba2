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

static lexicon *LX;
static normaliser *NM;
static labelset LS;
static tally_mem B, A;

static void form(tally_mem *m, const char *occ, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_form(m, occ, strlen(occ), "de", key, strlen(key), key, strlen(key),
				     n), 0);
	assert_int_equal(tm_add_key(m, "de", key, strlen(key), n), 0);
}

static void occ(tally_mem *m, const char *o, uint64_t n)
{
	assert_int_equal(tm_add_occ(m, o, strlen(o), "de", n), 0);
}

/* occ:1 (100 postings in each window): lagerist 50 -> 20 (its label,
 * falling), kommissionierer 50 -> 40 (down by a fifth only),
 * lagerlogistiker 0 -> 40 (new, rising), lagerhelfer 0 -> 5 (too few).
 * occ:2 (60 each): koch 30 -> 60, kuechenhilfe 30 -> 0 (its label,
 * vanished).  occ:3 is counted after only. */
static int setup(void **state)
{
	(void)state;
	char path[] = "/tmp/tm-trend-XXXXXX";
	int fd = mkstemp(path);
	const char *labels = "occupation\tkind\tlang\tlabel\n"
			     "occ:1\tpref\tde\tLagerist\n"
			     "occ:2\tpref\tde\tKoch\n"
			     "occ:2\talt\tde\tKuechenhilfe\n";
	tm_buf err = {0};
	if (fd < 0 || write(fd, labels, strlen(labels)) != (ssize_t)strlen(labels))
		return -1;
	close(fd);
	LX = lex_new();
	NM = norm_new(LX);
	if (!NM || labels_read(&LS, path, NM, stderr, &err) != 0)
		return -1;
	remove(path);
	buf_free(&err);
	tm_init(&B);
	tm_init(&A);
	form(&B, "occ:1", "lagerist", 50);
	form(&B, "occ:1", "kommissionierer", 50);
	occ(&B, "occ:1", 100);
	form(&A, "occ:1", "lagerist", 20);
	form(&A, "occ:1", "kommissionierer", 35);
	form(&A, "occ:1", "lagerlogistiker", 40);
	form(&A, "occ:1", "lagerhelfer", 5);
	occ(&A, "occ:1", 100);
	form(&B, "occ:2", "koch", 30);
	form(&B, "occ:2", "kuechenhilfe", 30);
	occ(&B, "occ:2", 60);
	form(&A, "occ:2", "koch", 60);
	occ(&A, "occ:2", 60);
	form(&A, "occ:3", "baecker", 70);
	occ(&A, "occ:3", 70);
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	tm_free(&B);
	tm_free(&A);
	labels_free(&LS);
	norm_free(NM);
	lex_free(LX);
	return 0;
}

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

/* Unit tests for counts by period (src/count/series.c): rolling up,
 * refusing what cannot be rolled up, windows, ids across periods, and the
 * counts table's period column written and read back. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "count/series.h"
#include "count/tally.h"

/* A posting of occupation occ:1 in German titled t, with id (or NULL)
 * and date (or NULL). */
static int add(tally_series *s, const char *id, const char *date, const char *t)
{
	static const char *occ[1] = {"occ:1"};
	static const size_t occlen[1] = {5};
	tally_posting p;
	tm_buf err = {0};
	memset(&p, 0, sizeof p);
	p.id = id;
	p.idlen = id ? strlen(id) : 0;
	p.date = date;
	p.datelen = date ? strlen(date) : 0;
	p.lang = "de";
	p.key = p.title = p.example = t;
	p.keylen = p.titlelen = p.examplelen = strlen(t);
	p.occ = occ;
	p.occlen = occlen;
	p.nocc = 1;
	int r = series_add(s, &p, &err);
	buf_free(&err);
	return r;
}

/* The postings of occ:1 in the period labelled l (0 when none). */
static uint64_t in_period(tally_series *s, const char *l)
{
	for (size_t i = 0; i < s->n; i++)
		if (!strcmp(s->p[i]->label, l))
			return tm_occ_postings(&s->p[i]->m, "occ:1", 5, "de");
	return 0;
}

static char *table(tally_series *s, int with_period, size_t *len)
{
	char *out = NULL;
	FILE *fp = open_memstream(&out, len);
	assert_non_null(fp);
	assert_int_equal(series_write(s, fp, with_period), 0);
	fclose(fp);
	return out;
}

static void test_rollup(void **state)
{
	(void)state;
	tally_series w, m;
	series_init(&w, PERIOD_WEEK);
	series_init(&m, PERIOD_MONTH);
	/* 2020-12-31 is a Thursday of ISO week 2020-W53; 2021-01-03 a Sunday
	 * of the same week; 2021-01-04 starts 2021-W01 */
	const char *days[] = {"2020-12-31", "2021-01-03", "2021-01-04", "2024-02-29"};
	for (int i = 0; i < 4; i++) {
		assert_int_equal(add(&w, NULL, days[i], "koch"), 0);
		assert_int_equal(add(&m, NULL, days[i], "koch"), 0);
	}
	assert_int_equal(in_period(&w, "2020-W53"), 2);
	assert_int_equal(in_period(&w, "2021-W01"), 1);
	assert_int_equal(in_period(&w, "2024-W09"), 1);
	assert_int_equal(in_period(&m, "2020-12"), 1);
	assert_int_equal(in_period(&m, "2021-01"), 2);
	assert_int_equal(in_period(&m, "2024-02"), 1);
	assert_true(series_dated(&w));
	/* a week is not counted by month; a month not by week */
	tally_mem *x;
	tm_buf err = {0};
	assert_int_equal(series_at(&m, "2021-W01", 8, &x, &err), -1);
	assert_non_null(strstr(err.data, "a week can straddle two months"));
	assert_int_equal(series_at(&w, "2021-01", 7, &x, &err), -1);
	/* not a period at all */
	assert_int_equal(series_at(&w, "2021-02-30", 10, &x, &err), -1);
	assert_int_equal(series_at(&w, "2021-Q1", 7, &x, &err), -1);
	buf_free(&err);
	series_free(&w);
	series_free(&m);
}

static void test_as_read_and_none(void **state)
{
	(void)state;
	tally_series a, n;
	tally_mem *x;
	tm_buf err = {0};
	series_init(&a, SERIES_AS_READ);
	series_init(&n, PERIOD_NONE);
	assert_int_equal(series_at(&a, "2026-W09", 8, &x, &err), 0);
	assert_non_null(x);
	/* one kind per series */
	assert_int_equal(series_at(&a, "2026-03", 7, &x, &err), -1);
	assert_non_null(strstr(err.data, "is a month, and the counts before it are by week"));
	/* postings read as they come count by month */
	series_free(&a);
	series_init(&a, SERIES_AS_READ);
	assert_int_equal(add(&a, NULL, "2026-03-05", "koch"), 0);
	assert_int_equal(in_period(&a, "2026-03"), 1);
	/* none: everything in the undated period, the undated too */
	assert_int_equal(add(&n, NULL, "2026-03-05", "koch"), 0);
	assert_int_equal(add(&n, NULL, NULL, "koch"), 0);
	assert_int_equal(n.n, 1);
	assert_int_equal(in_period(&n, ""), 2);
	assert_false(series_dated(&n));
	assert_int_equal(n.undated, 1);
	buf_free(&err);
	series_free(&a);
	series_free(&n);
}

static void test_window(void **state)
{
	(void)state;
	tally_series s;
	long a, b;
	tally_mem *x;
	tm_buf err = {0};
	series_init(&s, PERIOD_WEEK);
	/* March 2026: 2026-W10 (2 to 8 March) lies inside, 2026-W09 (23
	 * February to 1 March) and 2026-W14 (30 March to 5 April) partly */
	assert_int_equal(period_span("2026-03", 7, &a, &b, NULL), 0);
	series_window(&s, a, b);
	assert_int_equal(add(&s, "1", "2026-03-01", "koch"), 1);
	assert_int_equal(add(&s, "2", "2026-03-02", "koch"), 0);
	assert_int_equal(add(&s, "3", "2026-03-31", "koch"), 1);
	assert_int_equal(add(&s, "4", NULL, "koch"), 1);
	assert_int_equal(add(&s, "5", "2026-04-07", "koch"), 1);
	assert_int_equal(s.postings, 1);
	assert_int_equal(s.outside, 4);
	assert_int_equal(s.partial, 2);
	assert_int_equal(s.dropped, 2); /* undated, and 2026-W15 */
	/* a posting left out claims no id: the same id inside counts */
	assert_int_equal(add(&s, "1", "2026-03-03", "koch"), 0);
	assert_int_equal(in_period(&s, "2026-W10"), 2);
	assert_int_equal(series_at(&s, "2026-W11", 8, &x, &err), 0);
	assert_non_null(x);
	buf_free(&err);
	series_free(&s);
}

static void test_ids_across_periods(void **state)
{
	(void)state;
	tally_series s;
	series_init(&s, PERIOD_DAY);
	assert_int_equal(add(&s, "p1", "2026-03-01", "koch"), 0);
	assert_int_equal(add(&s, "p1", "2026-03-02", "koch"), 1); /* republished */
	assert_int_equal(add(&s, NULL, "2026-03-02", "koch"), 0);
	assert_int_equal(s.postings, 2);
	assert_int_equal(s.republished, 1);
	assert_int_equal(in_period(&s, "2026-03-01"), 1);
	assert_int_equal(in_period(&s, "2026-03-02"), 1);
	series_free(&s);
}

static void test_table_round_trip(void **state)
{
	(void)state;
	tally_series s, r, sum;
	char path[] = "/tmp/tm-series-XXXXXX";
	size_t l1, l2, l3;
	tm_buf err = {0};
	series_init(&s, PERIOD_MONTH);
	assert_int_equal(add(&s, NULL, "2026-03-05", "koch"), 0);
	assert_int_equal(add(&s, NULL, "2026-02-05", "koch"), 0);
	assert_int_equal(add(&s, NULL, "2026-02-06", "bäcker"), 0);
	assert_int_equal(add(&s, NULL, NULL, "koch"), 0);
	char *t1 = table(&s, 1, &l1);
	/* the periods in time order, the undated first, each row's last field */
	assert_non_null(strstr(t1, "postings\tperiod\noccupation\tocc:1\tde\t\t\t1\t\n"));
	assert_true(strstr(t1, "\t2026-02\n") < strstr(t1, "\t2026-03\n"));
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, t1, l1), (ssize_t)l1);
	close(fd);
	series_init(&r, SERIES_AS_READ);
	assert_int_equal(series_read(&r, path, &err), 0);
	char *t2 = table(&r, 1, &l2);
	assert_int_equal(l1, l2);
	assert_memory_equal(t1, t2, l1);
	/* summed: the table of all time, as plain tm_read reads it */
	series_init(&sum, PERIOD_NONE);
	assert_int_equal(series_read(&sum, path, &err), 0);
	char *t3 = table(&sum, 0, &l3);
	tally_mem m;
	tm_init(&m);
	assert_int_equal(tm_read(&m, path, &err), 0);
	assert_int_equal(tm_occ_postings(&m, "occ:1", 5, "de"), 4);
	assert_non_null(strstr(t3, "occupation\tocc:1\tde\t\t\t4\n"));
	/* series_sum adds whole periods within the days only */
	long a, b;
	tally_mem feb;
	tm_init(&feb);
	assert_int_equal(period_span("2026-02", 7, &a, &b, NULL), 0);
	assert_int_equal(series_sum(&r, a, b, &feb), 1);
	assert_int_equal(tm_occ_postings(&feb, "occ:1", 5, "de"), 2);
	tm_free(&feb);
	tm_free(&m);
	unlink(path);
	free(t1);
	free(t2);
	free(t3);
	buf_free(&err);
	series_free(&s);
	series_free(&r);
	series_free(&sum);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_rollup),
		cmocka_unit_test(test_as_read_and_none),
		cmocka_unit_test(test_window),
		cmocka_unit_test(test_ids_across_periods),
		cmocka_unit_test(test_table_round_trip),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

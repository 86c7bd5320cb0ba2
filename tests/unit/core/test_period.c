/* test_period.c - days, ISO 8601 weeks and months (core/period.h).
 *
 * Outside reference: Python's datetime module (the python3 Debian
 * ships), run by the test: date.toordinal() for day numbers,
 * date.isocalendar() for ISO 8601 weeks, over every day from 1896-01-01
 * to 2104-12-31 (leap years, the century years 1900, 2000 and 2100, both
 * kinds of year end).
 * Worked examples from ISO 8601-1:2019 (from memory, and confirmed by
 * the Python run): 2008-12-29 is in 2009-W01, 2010-01-03 in 2009-W53. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "core/period.h"

static const char *label(int kind, const char *date)
{
	static char out[PERIOD_MAX];
	long z;
	assert_int_equal(period_date(date, strlen(date), &z), 0);
	period_label(kind, z, out);
	return out;
}

static void test_examples(void **state)
{
	(void)state;
	assert_string_equal(label(PERIOD_WEEK, "2008-12-29"), "2009-W01");
	assert_string_equal(label(PERIOD_WEEK, "2010-01-03"), "2009-W53");
	assert_string_equal(label(PERIOD_WEEK, "2026-03-01"), "2026-W09");
	assert_string_equal(label(PERIOD_WEEK, "2027-01-01"), "2026-W53");
	assert_string_equal(label(PERIOD_MONTH, "2024-02-29"), "2024-02");
	assert_string_equal(label(PERIOD_DAY, "2024-02-29"), "2024-02-29");
	assert_string_equal(label(PERIOD_NONE, "2024-02-29"), "");
	long z;
	assert_int_equal(period_date("1970-01-01", 10, &z), 0);
	assert_int_equal(z, 0);
	assert_int_equal(period_weekday(z), 4); /* a Thursday */
	assert_int_equal(period_date("1969-12-31", 10, &z), 0);
	assert_int_equal(z, -1);
}

static void test_bad_dates(void **state)
{
	(void)state;
	static const char *const bad[] = {"2026-02-29", "1900-02-29", "2026-13-01", "2026-00-10",
					  "2026-04-31", "0000-01-01", "2026-1-01", "2026/01/01",
					  "2026-01-01T10:00", "２026-01-01", ""};
	long z;
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++)
		assert_int_equal(period_date(bad[i], strlen(bad[i]), &z), -1);
	assert_int_equal(period_date("2000-02-29", 10, &z), 0);
}

static void span(const char *s, const char *first, const char *last, int kind)
{
	long f, l, a, b;
	int k;
	assert_int_equal(period_span(s, strlen(s), &f, &l, &k), 0);
	assert_int_equal(period_date(first, 10, &a), 0);
	assert_int_equal(period_date(last, 10, &b), 0);
	assert_int_equal(f, a);
	assert_int_equal(l, b);
	assert_int_equal(k, kind);
}

static void test_spans(void **state)
{
	(void)state;
	span("2026", "2026-01-01", "2026-12-31", PERIOD_YEAR);
	span("2024-Q1", "2024-01-01", "2024-03-31", PERIOD_QUARTER);
	span("2026-Q4", "2026-10-01", "2026-12-31", PERIOD_QUARTER);
	span("2024-02", "2024-02-01", "2024-02-29", PERIOD_MONTH);
	span("2100-02", "2100-02-01", "2100-02-28", PERIOD_MONTH);
	span("2009-W01", "2008-12-29", "2009-01-04", PERIOD_WEEK);
	span("2009-W53", "2009-12-28", "2010-01-03", PERIOD_WEEK);
	span("2026-W53", "2026-12-28", "2027-01-03", PERIOD_WEEK);
	span("2026-03-01", "2026-03-01", "2026-03-01", PERIOD_DAY);
	long f, l;
	int k;
	assert_int_equal(period_span("", 0, &f, &l, &k), 0);
	assert_true(f > l);
	assert_int_equal(k, PERIOD_NONE);
	static const char *const bad[] = {"2025-W53", "2026-W00", "2026-W54", "2026-Q0", "2026-Q5",
					  "2026-13", "2026-00", "0000", "20261", "2026-W5", "x"};
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++)
		assert_int_equal(period_span(bad[i], strlen(bad[i]), &f, &l, &k), -1);
	assert_int_equal(period_kind_of("week"), PERIOD_WEEK);
	assert_int_equal(period_kind_of("year"), -1);
}

/* Every day of two centuries against Python's datetime: the day
 * number (toordinal() - 719163), the ISO week and its label, and the
 * week's span, which must hold the day. */
static void test_against_python(void **state)
{
	(void)state;
	FILE *p = popen("/usr/bin/python3 -c '\n"
			"import datetime\n"
			"d = datetime.date(1896, 1, 1)\n"
			"end = datetime.date(2104, 12, 31)\n"
			"one = datetime.timedelta(days=1)\n"
			"while d <= end:\n"
			"    y, w, wd = d.isocalendar()\n"
			"    print(d.isoformat(), d.toordinal() - 719163, \"%04d-W%02d\" % (y, w), wd)\n"
			"    d += one\n'",
			"r");
	char date[16], week[16], mine[PERIOD_MAX];
	long ord, z, f, l, n = 0;
	int wd, y, m, d;
	assert_non_null(p);
	while (fscanf(p, "%15s %ld %15s %d", date, &ord, week, &wd) == 4) {
		assert_int_equal(period_date(date, strlen(date), &z), 0);
		if (z != ord)
			fail_msg("%s: day %ld, Python %ld", date, z, ord);
		period_civil(z, &y, &m, &d);
		snprintf(mine, sizeof mine, "%04d-%02d-%02d", y, m, d);
		assert_string_equal(mine, date);
		period_label(PERIOD_WEEK, z, mine);
		if (strcmp(mine, week))
			fail_msg("%s: week %s, Python %s", date, mine, week);
		assert_int_equal(period_weekday(z), wd);
		assert_int_equal(period_span(week, strlen(week), &f, &l, NULL), 0);
		assert_true(f <= z && z <= l && l - f == 6);
		n++;
	}
	assert_int_equal(pclose(p), 0);
	assert_int_equal(n, 76336); /* 1896-01-01 .. 2104-12-31 */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_examples),
		cmocka_unit_test(test_bad_dates),
		cmocka_unit_test(test_spans),
		cmocka_unit_test(test_against_python),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

/* Unit tests for the statistics (src/rank/stats.c).
 *
 * Wilson score intervals against the worked examples of Newcombe RG
 * (1998), "Two-sided confidence intervals for the single proportion:
 * comparison of seven methods", Statistics in Medicine 17:857-872,
 * Table I, method 3 (values to 4 decimals; from ../shared/REFERENCES.md,
 * where they match scipy's binomtest(k, n).proportion_ci("wilson")). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>

#include <cmocka.h>

#include "rank/stats.h"

static void wilson_is(uint64_t k, uint64_t n, double lo, double hi, double tol)
{
	double a, b;
	wilson(k, n, STATS_Z95, &a, &b);
	assert_float_equal(a, lo, tol);
	assert_float_equal(b, hi, tol);
}

static void test_newcombe(void **state)
{
	(void)state;
	wilson_is(81, 263, 0.2553, 0.3662, 0.00006);
	wilson_is(15, 148, 0.0624, 0.1605, 0.00006);
	wilson_is(0, 20, 0.0000, 0.1611, 0.00006);
	wilson_is(1, 29, 0.0061, 0.1718, 0.00006);
	wilson_is(29, 29, 0.8830, 1.0000, 0.00006);
}

static void test_scipy_values(void **state)
{
	(void)state;
	/* scipy 1.10 binomtest(k, n).proportion_ci(method="wilson"),
	 * computed for REFERENCES.md */
	wilson_is(81, 263, 0.255289, 0.366210, 0.000001);
	wilson_is(15, 148, 0.062386, 0.160487, 0.000001);
	wilson_is(1, 29, 0.006113, 0.171755, 0.000001);
	/* 99 %: z = 2.575829 */
	double a, b;
	wilson(81, 263, 2.5758293035489, &a, &b);
	assert_float_equal(a, 0.240137, 0.000001);
	assert_float_equal(b, 0.385283, 0.000001);
}

static void test_edges(void **state)
{
	(void)state;
	double a, b;
	wilson(0, 0, STATS_Z95, &a, &b);
	assert_float_equal(a, 0, 0);
	assert_float_equal(b, 1, 0);
	wilson(5, 3, STATS_Z95, &a, &b); /* k > n is no proportion */
	assert_float_equal(a, 0, 0);
	assert_float_equal(b, 1, 0);
	for (uint64_t n = 1; n < 200; n += 7)
		for (uint64_t k = 0; k <= n; k++) {
			wilson(k, n, STATS_Z95, &a, &b);
			assert_true(a >= 0 && a <= (double)k / (double)n + 1e-12);
			assert_true(b <= 1 && b >= (double)k / (double)n - 1e-12);
		}
}

/* G^2 against REFERENCES.md: Dunning (1993) p. 72 (as cited, second
 * hand) and scipy chi2_contingency(lambda_="log-likelihood",
 * correction=False). */
static void test_g2(void **state)
{
	(void)state;
	assert_float_equal(g2(10, 0, 3, 31764), 167.229804, 0.00001);
	assert_float_equal(g2(1, 0, 0, 1), 2.772589, 0.000001);
	assert_float_equal(g2(10, 0, 0, 10), 27.72589, 0.00001);
	assert_float_equal(g2(5, 1995, 0, 100000), 39.33052, 0.00001);
	assert_float_equal(g2(1000, 1995, 1000, 100000), 4730.737, 0.001);
	assert_float_equal(g2(10, 990, 5, 995), 1.711585, 0.000001);
	assert_float_equal(g2(0, 0, 0, 0), 0, 0);
}

/* G^2 on 500 random tables against scipy, read from the file that
 * tests/unit/rank/gen_g2_cases.py writes (G2_CASES; the Makefile's unit
 * target makes it). */
static void test_g2_random(void **state)
{
	(void)state;
	const char *path = getenv("G2_CASES");
	unsigned long long a, b, c, d;
	double want;
	int n = 0;
	FILE *fp;
	if (!path)
		fail_msg("G2_CASES is not set (run the tests through make unit)");
	fp = fopen(path, "r");
	assert_non_null(fp);
	while (fscanf(fp, "%llu %llu %llu %llu %lf", &a, &b, &c, &d, &want) == 5) {
		double got = g2(a, b, c, d);
		if (fabs(got - want) > 1e-6 * (want > 1 ? want : 1))
			fail_msg("g2(%llu, %llu, %llu, %llu) = %.10g, scipy %.10g", a, b, c, d, got, want);
		n++;
	}
	fclose(fp);
	assert_int_equal(n, 500);
}

/* The chi-square critical values with 1 degree of freedom, from handbook
 * tables (from memory; scipy chi2.isf agrees, REFERENCES.md): the
 * constant the ranker uses is the p = 0.001 one. */
static void test_chi2_critical(void **state)
{
	(void)state;
	assert_float_equal(STATS_CHI2_1DF_P001, 10.828, 0.0005);
	assert_float_equal(STATS_Z95 * STATS_Z95, 3.841, 0.0005); /* p = 0.05 */
}

/* Levenshtein against REFERENCES.md's values (computed there). */
static void test_levenshtein(void **state)
{
	(void)state;
	assert_int_equal(levenshtein("kitten", 6, "sitting", 7, 9), 3);
	assert_int_equal(levenshtein("Saturday", 8, "Sunday", 6, 9), 3);
	assert_int_equal(levenshtein("flaw", 4, "lawn", 4, 9), 2);
	assert_int_equal(levenshtein("", 0, "abc", 3, 9), 3);
	assert_int_equal(levenshtein("gumbo", 5, "gambol", 6, 9), 2);
	assert_int_equal(levenshtein("Straße", 7, "Strasse", 7, 9), 2); /* code points */
	assert_int_equal(levenshtein("CA", 2, "ABC", 3, 9), 3);
	assert_int_equal(levenshtein("kitten", 6, "sitting", 7, 1), 2); /* stops past max */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_newcombe),
		cmocka_unit_test(test_scipy_values),
		cmocka_unit_test(test_edges),
		cmocka_unit_test(test_g2),
		cmocka_unit_test(test_g2_random),
		cmocka_unit_test(test_chi2_critical),
		cmocka_unit_test(test_levenshtein),
	};
	return cmocka_run_group_tests_name("stats", tests, NULL, NULL);
}

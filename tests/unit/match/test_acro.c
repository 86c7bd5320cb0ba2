/* Unit tests for the acronym keys and table (src/match/acro.c): the runs
 * and forms acro.h states, the words a document holds, the shape of a
 * query word, and the chance that a string of letters hits the table. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "core/err.h"
#include "match/acro.h"

/* 1 when key's acronyms hold a with the run (first, nw). */
static int has(const char *key, const char *a, int first, int nw)
{
	acro_key k[ACRO_KEYS_MAX];
	size_t n = acro_keys(key, strlen(key), k);
	for (size_t i = 0; i < n; i++)
		if (k[i].len == strlen(a) && !memcmp(k[i].a, a, k[i].len))
			return k[i].first == first && k[i].nw == nw;
	return 0;
}

static size_t count(const char *key)
{
	acro_key k[ACRO_KEYS_MAX];
	return acro_keys(key, strlen(key), k);
}

static void test_keys(void **state)
{
	(void)state;
	assert_true(has("registered nurse", "rn", 0, 2));
	assert_int_equal(count("registered nurse"), 1);
	assert_int_equal(count("nurse"), 0);
	assert_int_equal(count(""), 0);
	/* all runs of two or more words: csr, cs, sr */
	assert_true(has("customer service representative", "csr", 0, 3));
	assert_true(has("customer service representative", "cs", 0, 2));
	assert_true(has("customer service representative", "sr", 1, 2));
	assert_int_equal(count("customer service representative"), 3);
	/* the long form leaves out words of at most 3 code points */
	assert_true(has("agent de sécurité", "ads", 0, 3));
	assert_true(has("agent de sécurité", "as", 0, 3));
	assert_true(has("fachkraft für schutz und sicherheit", "fss", 0, 5));
	assert_true(has("fachkraft für schutz und sicherheit", "ffsus", 0, 5));
	assert_true(has("gesundheits und krankenpfleger", "guk", 0, 3));
	/* the first run giving it: für left out at its start */
	assert_true(has("anlagenmechaniker für sanitär heizungs und klimatechnik", "shk", 1, 5));
	/* hyphens and other ASCII punctuation split words */
	assert_true(has("lkw-fahrer", "lf", 0, 2));
	/* a word's first code point, whole */
	assert_true(has("électricien bâtiment", "\xc3\xa9" "b", 0, 2));
	/* no acronym longer than ACRO_MAX letters: six words give none of six */
	assert_false(has("a1 b2 c3 d4 e5 f6", "abcdef", 0, 6));
	assert_true(has("a1 b2 c3 d4 e5 f6", "abcde", 0, 5));
	/* a key's first ACRO_WORDS words only, each acronym once */
	assert_true(count("w1 x2 y3 z4 w5 x6 y7 z8 q9 r10") <= ACRO_KEYS_MAX);
	assert_false(has("w1 x2 y3 z4 w5 x6 y7 z8 q9 r10", "zq", 7, 2));
}

static void test_shape(void **state)
{
	(void)state;
	assert_true(acro_shape("rn", 2));
	assert_true(acro_shape("CSR", 3));
	assert_true(acro_shape("abcde", 5));
	assert_false(acro_shape("r", 1));
	assert_false(acro_shape("abcdef", 6));
	assert_false(acro_shape("b2b", 3));
	assert_false(acro_shape("\xc3\xa9t", 3));
}

static void test_table(void **state)
{
	(void)state;
	acro_index *a = acro_new();
	size_t n;
	assert_non_null(a);
	assert_int_equal(acro_add(a, 0, "registered nurse", 16), TM_OK);
	assert_int_equal(acro_add(a, 3, "it administrator", 16), TM_OK);
	assert_int_equal(acro_add(a, 5, "retail nurse", 12), TM_OK);
	assert_int_equal(acro_add(a, 7, "a b c d e f g h i j k l", 23), TM_OK);
	assert_int_equal(acro_finish(a), TM_OK);
	const acro_ent *e = acro_find(a, "rn", 2, &n);
	assert_int_equal(n, 2);
	assert_int_equal(e[0].doc, 0); /* in the order the documents were added */
	assert_int_equal(e[1].doc, 5);
	assert_int_equal(e[0].first, 0);
	assert_int_equal(e[0].nw, 2);
	assert_null(acro_find(a, "xy", 2, &n));
	assert_int_equal(n, 0);
	assert_true(acro_is_word(a, "it", 2));
	assert_true(acro_is_word(a, "nurse", 5));
	assert_true(acro_is_word(a, "l", 1)); /* every word, past ACRO_WORDS */
	assert_false(acro_is_word(a, "rn", 2));
	/* two-letter acronyms: rn, ia, and of a..h the 7 neighbouring pairs,
	 * 9 of 26^2 */
	assert_float_equal(acro_chance(a, 2), 9.0 / 676, 1e-12);
	assert_float_equal(acro_chance(a, 1), 0, 0);
	assert_float_equal(acro_chance(a, 6), 0, 0);
	assert_true(acro_bytes(a) > 0);
	acro_free(a);
	acro_free(NULL);
}

/* The fit: the run's words and the words shared outside it, over each
 * side's words. */
static void test_fit(void **state)
{
	(void)state;
	const char *q[3];
	size_t ql[3];
	const char *doc = "chauffeur poids lourd";
	acro_ent r = {0, 1, 2}; /* poids lourd */
	size_t nq = acro_words("chauffeur pl", 12, q, ql, 3);
	assert_float_equal(acro_fit(q, ql, nq, 1, doc, strlen(doc), &r), 1.0, 1e-12);
	nq = acro_words("pl", 2, q, ql, 3); /* chauffeur unexplained */
	assert_float_equal(acro_fit(q, ql, nq, 0, doc, strlen(doc), &r), 2.0 / 3, 1e-12);
	nq = acro_words("pl nuit", 7, q, ql, 3); /* and nuit */
	assert_float_equal(acro_fit(q, ql, nq, 0, doc, strlen(doc), &r), 2.0 / 3 * 0.5, 1e-12);
	/* a word of the run the query also says is not counted twice:
	 * (2 + 0) / 3 of the document, 1 / 2 of the query */
	nq = acro_words("lourd pl", 8, q, ql, 3);
	assert_float_equal(acro_fit(q, ql, nq, 1, doc, strlen(doc), &r), 1.0 / 3, 1e-12);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_keys),
		cmocka_unit_test(test_shape),
		cmocka_unit_test(test_table),
		cmocka_unit_test(test_fit),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

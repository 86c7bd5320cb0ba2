/* Unit tests for the tokeniser (src/norm/token.c). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "norm/token.h"

static uni_ctx U_;
static tok_line TL;

/* Tokens as "text|text|..." with their kinds as a string of W N S P. */
static void split_is(const char *in, const char *want, const char *kinds)
{
	char got[1024] = "", k[256] = "";
	size_t i;
	assert_int_equal(tok_split(&TL, &U_, in, strlen(in)), 0);
	for (i = 0; i < TL.n; i++) {
		const tm_tok *t = &TL.t[i];
		if (i)
			strcat(got, "|");
		strncat(got, in + t->off, t->len);
		k[i] = "WNSP"[t->kind];
	}
	k[i] = 0;
	assert_string_equal(got, want);
	if (kinds)
		assert_string_equal(k, kinds);
}

static void test_words(void **state)
{
	(void)state;
	split_is("Java-Entwickler (m/w/d)", "Java|-|Entwickler|(|m|/|w|/|d|)", "WPWPWPWPWP");
	split_is("3.200 € brutto", "3.200|€|brutto", "NSW");
	split_is("75k", "75|k", "NW");
	split_is("B2B JR12345", "B2B|JR12345", "WW");
	split_is("C++ C# .NET node.js", "C++|C#|.NET|node|.|js", "WWWWPW");
	split_is("we're", "we|'|re", "WPW");
}

static void test_capital_i(void **state)
{
	(void)state;
	split_is("VerkäuferIn", "Verkäufer|In", "WW");
	split_is("MitarbeiterInnen", "Mitarbeiter|Innen", "WW");
	assert_true(TL.t[1].flags & TF_CAPSUF);
	split_is("Inhaber", "Inhaber", "W");
	split_is("LINIE", "LINIE", "W");
	split_is("Lehrer Inklusion", "Lehrer|Inklusion", "WW");
}

static void test_strong(void **state)
{
	(void)state;
	split_is("Koch - Berlin", "Koch|-|Berlin", "WPW");
	assert_true(TL.t[1].flags & TF_STRONG);
	split_is("Koch-Berlin", "Koch|-|Berlin", "WPW");
	assert_false(TL.t[1].flags & TF_STRONG);
	split_is("Ref: 12", "Ref|:|12", "WPN");
	assert_true(TL.t[1].flags & TF_STRONG);
}

static void test_folds(void **state)
{
	(void)state;
	assert_int_equal(tok_split(&TL, &U_, "STRASSE Straße", 14 + 1), 0);
	assert_int_equal(TL.n, 2);
	assert_int_equal(TL.t[0].hash, TL.t[1].hash);
	assert_memory_equal(tok_fold(&TL, &TL.t[1]), "strasse", 7);
}

static int teardown(void **state)
{
	(void)state;
	uni_ctx_free(&U_);
	tok_line_free(&TL);
	return 0;
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_words),
		cmocka_unit_test(test_capital_i),
		cmocka_unit_test(test_strong),
		cmocka_unit_test(test_folds),
	};
	return cmocka_run_group_tests_name("token", tests, NULL, teardown);
}

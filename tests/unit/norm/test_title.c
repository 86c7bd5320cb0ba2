/* Unit tests for the annotated title (src/norm/title.c): the one scan that
 * finds the lexicon phrases starting at each unit, over a lexicon built
 * here. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "norm/title.h"
#include "norm/unicode.h"

static lexicon *LX;
static tm_title TI;
static uni_ctx U8;
static tm_buf TEXT;

static void add(int cat, const char *lang, const char *ph, const char *v)
{
	tm_buf err = {0};
	if (lex_add(LX, cat, lang, ph, strlen(ph), v, LW_ANY, &err) < 0)
		fail_msg("lex_add %s: %.*s", ph, (int)err.len, err.data);
	buf_free(&err);
}

static int setup(void **state)
{
	(void)state;
	LX = lex_new();
	add(LC_PLACE, "*", "Frankfurt", "DE");
	add(LC_PLACE, "*", "Frankfurt am Main", "DE");
	add(LC_LOCATION, "*", "am", "prep");
	add(LC_SCHEDULE, "de", "Vollzeit", "full_time");
	add(LC_MARKETING, "de", "ab sofort", "-");
	add(LC_SCHEDULE, "it", "tempo pieno", "full_time");
	add(LC_UNIT, "*", "ab", "connector");
	add(LC_MARKER, "*", "m/w/d", "-");
	add(LC_OCCUPATION, "de", "Koch", "head");
	add(LC_OCCUPATION, "de", "Fachkraft", "head");
	add(LC_OCCUPATION, "de", "fachkraft", "suffix");
	add(LC_BUSINESS, "de", "Hotel", "kind");
	TI.lx = LX;
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	title_free(&TI);
	uni_ctx_free(&U8);
	buf_free(&TEXT);
	lex_free(LX);
	return 0;
}

static void scan(const char *raw)
{
	buf_reset(&TEXT);
	assert_int_equal(uni_prepare(&U8, raw, strlen(raw), &TEXT), 0);
	TI.text = TEXT.data;
	assert_int_equal(tok_split(&TI.tl, &U8, TEXT.data, TEXT.len), 0);
	assert_int_equal(title_build(&TI), 0);
	assert_int_equal(title_scan(&TI), 0);
}

/* The phrases found at unit k, as "units:category" longest first. */
static void at_is(size_t k, const char *want)
{
	char got[256] = "";
	size_t n = 0;
	assert_true(k < TI.nunit);
	for (uint32_t i = TI.aoff[k]; i < TI.aoff[k + 1]; i++) {
		const lex_entry *e = lex_entry_at(LX, TI.ann[i].first);
		n += (size_t)snprintf(got + n, sizeof got - n, "%s%u:%s", n ? " " : "",
				      (unsigned)TI.ann[i].units, lex_cat_name(e->cat));
	}
	if (strcmp(got, want))
		fail_msg("unit %zu: \"%s\", want \"%s\"", k, got, want);
}

static void test_longest_first(void **state)
{
	(void)state;
	scan("Maler Frankfurt am Main Vollzeit");
	at_is(0, "");
	at_is(1, "3:places 1:places");
	at_is(2, "1:location");
	at_is(3, "");
	at_is(4, "1:schedule");
	assert_int_equal(TI.ucats[1], 1u << LC_PLACE);
	assert_int_equal(TI.lcats, 1u << LC_PLACE | 1u << LC_LOCATION | 1u << LC_SCHEDULE);
	/* case, accents and weak punctuation fold away as in the lexicon */
	scan("FRANKFURT-AM-MAIN");
	at_is(0, "3:places 1:places");
}

static void test_words_outside_end_a_phrase(void **state)
{
	(void)state;
	/* "xyz" is no word of the lexicon: nothing goes across it */
	scan("Frankfurt xyz am Main");
	at_is(0, "1:places");
	at_is(1, "");
	at_is(2, "1:location");
	at_is(3, "");
	/* a phrase stays inside its segment */
	scan("Frankfurt, am Main");
	at_is(0, "1:places");
	scan("ab (sofort)");
	at_is(0, "1:units");
}

static void test_removed_markers_are_transparent(void **state)
{
	(void)state;
	scan("ab m/w/d sofort");
	at_is(0, "1:units");
	/* the gender rule removes the marker; the scan again sees the
	 * phrase across it, of three units */
	size_t len;
	assert_non_null(match_cat(&TI, 1, LC_MARKER, 1, &len));
	assert_int_equal(remove_units(&TI, 1, 1 + len, NF_GENDER, NULL), 0);
	assert_int_equal(title_scan(&TI), 0);
	at_is(0, "5:marketing 1:units");
	/* across a segment end right after the removed units too */
	scan("tempo (m/w/d) pieno");
	assert_int_equal(remove_units(&TI, 1, 4, NF_GENDER, NULL), 0);
	assert_int_equal(title_scan(&TI), 0);
	at_is(0, "5:schedule");
	assert_non_null(match_cat(&TI, 0, LC_SCHEDULE, 1, &len));
	assert_int_equal(len, 5);
}

static void test_walks_stop_early(void **state)
{
	(void)state;
	/* 5,000 units each starting a prefix of a longer phrase: every walk
	 * stops after two steps */
	size_t n = 5000;
	char *s = malloc(n * 10 + 1), *p = s;
	for (size_t i = 0; i < n; i++)
		p += sprintf(p, "%s ", i % 2 ? "am" : "Frankfurt");
	*p = 0;
	scan(s);
	assert_int_equal(TI.nunit, n);
	at_is(0, "1:places");
	at_is(1, "1:location");
	assert_int_equal(TI.nann, n);
	free(s);
}

/* The value of the i-th phrase at unit k. */
static const char *value_at(size_t k, size_t i)
{
	assert_true(TI.aoff[k] + i < TI.aoff[k + 1]);
	return lex_entry_at(LX, TI.ann[TI.aoff[k] + i].first)->value;
}

static void test_occupational_words_and_endings(void **state)
{
	(void)state;
	scan("Lagerfachkraft / Koch - Hotel Bergblick");
	at_is(0, "1:occupation");
	assert_string_equal(value_at(0, 0), "suffix");
	at_is(1, "1:occupation");
	assert_string_equal(value_at(1, 0), "head");
	at_is(2, "1:business");
	at_is(3, "");
	assert_int_equal(TI.ucats[0], 1u << LC_OCCUPATION);
	assert_int_equal(TI.lcats, 1u << LC_OCCUPATION | 1u << LC_BUSINESS);
	/* the word itself: the phrase first, then the ending */
	scan("FACHKRAFT");
	at_is(0, "1:occupation 1:occupation");
	assert_string_equal(value_at(0, 0), "head");
	assert_string_equal(value_at(0, 1), "suffix");
	/* an ending ends a word: not inside one, not a number */
	scan("Fachkraftwerk 12");
	at_is(0, "");
	at_is(1, "");
}

/* Every gendered pair is found under the last bytes of its endings and
 * their difference in length, in file order, also for pairs added after
 * a title was built (the index follows the lexicon). */
static void pairs_found(void)
{
	size_t n, m;
	const lex_pair *p = lex_pairs(LX, &n);
	assert_true(n > 0);
	for (size_t i = 0; i < n; i++) {
		unsigned fl = p[i].flen ? (unsigned char)p[i].fem[p[i].flen - 1] : 256;
		unsigned ml = p[i].mlen ? (unsigned char)p[i].masc[p[i].mlen - 1] : 256;
		const uint32_t *g = title_pairs(&TI, fl, ml, (long)p[i].mlen - (long)p[i].flen, &m);
		size_t seen = 0;
		for (size_t j = 0; j < m; j++) {
			if (j)
				assert_true(g[j - 1] < g[j]);
			seen += g[j] == i;
		}
		if (seen != 1)
			fail_msg("pair %zu (%s/%s) found %zu times", i, p[i].masc, p[i].fem, seen);
	}
}

static void load_pairs(const char *lines)
{
	tm_buf err = {0}, text = {0};
	assert_int_equal(buf_puts(&text, lines), 0);
	assert_int_equal(buf_reserve(&text, 1), 0);
	if (lex_load_text(LX, LC_MARKER, 3, "pairs-test.txt", text.data, text.len, &err) != 0)
		fail_msg("%.*s", (int)err.len, err.data);
	buf_free(&err);
	buf_free(&text);
}

static void test_pairs_by_endings(void **state)
{
	(void)state;
	load_pairs("de\t-\tin\nde\tmann\tfrau\nfr\teur\teuse\nfr\tr\tse\n"
		   "fr\ter\tère\nes\to\ta\nfr\t-\te\nes\to\t@\nda\ttjener\tservitrice\n");
	scan("Koch");
	pairs_found();
	load_pairs("nl\ter\tster\npl\tik\ticzka\nhr\tik\tica\n");
	scan("Koch");
	pairs_found();
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_longest_first),
		cmocka_unit_test(test_words_outside_end_a_phrase),
		cmocka_unit_test(test_removed_markers_are_transparent),
		cmocka_unit_test(test_walks_stop_early),
		cmocka_unit_test(test_occupational_words_and_endings),
		cmocka_unit_test(test_pairs_by_endings),
	};
	return cmocka_run_group_tests_name("title", tests, setup, teardown);
}

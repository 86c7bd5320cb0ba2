/* Unit tests for the field checks of the review queue (src/io/fieldcheck.c)
 * and the BCP 47 grammar (src/core/lang.c).  The language tags are the
 * examples of RFC 5646 Appendix A (well-formed ones, and the malformed
 * ones it lists), taken from memory of that appendix; the character
 * ranges are those of RFC 3987 section 2.2 and Unicode's line breaks. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>

#include "io/fieldcheck.h"
#include "core/lang.h"

static int wf(const char *s)
{
	return lang_wellformed(s, strlen(s));
}

static void test_bcp47(void **state)
{
	static const char *const good[] = {
		"de", "fr", "ja", "i-enochian", "zh-Hant", "zh-Hans", "sr-Cyrl", "sr-Latn",
		"zh-cmn-Hans-CN", "cmn-Hans-CN", "zh-yue-HK", "yue-HK", "zh-Hans-CN", "sr-Latn-RS",
		"sl-rozaj", "sl-rozaj-biske", "sl-nedis", "de-CH-1901", "sl-IT-nedis",
		"hy-Latn-IT-arevela", "de-DE", "en-US", "es-419", "de-CH-x-phonebk",
		"az-Arab-x-AZE-derbend", "x-whatever", "qaa-Qaaa-QM-x-southern", "de-Qaaa",
		"sr-Latn-QM", "sr-Qaaa-RS", "en-US-u-islamcal", "zh-CN-a-myext-x-private",
		"en-a-myext-b-another", "EN-gb-OED", "art-lojban", "zh-min-nan", "de-AT",
		"en-GB-oxendict", "tlh", "abcd", "abcdefgh", "de-1996", "x-a",
		/* a repeated singleton makes a tag invalid (section 2.2.9), not
		 * malformed: the grammar alone takes it */
		"ar-a-aaa-b-bbb-a-ccc",
	};
	static const char *const bad[] = {
		"de-419-DE", "a-DE", "", "-", "de-", "-de", "de--AT",
		"d", "abcdefghi", "de_AT", "de AT", "de-AT\n", "de .", "x", "x-", "de-x",
		"de-a", "de-a-b", "de-abcdefghi", "1de", "de-AT-x-abcdefghi", "abcd-abc",
		"de-\xc3\xa4", "en-GB-oed-x",
	};
	(void)state;
	for (size_t i = 0; i < sizeof good / sizeof *good; i++) {
		if (!wf(good[i]))
			fail_msg("well-formed, refused: %s", good[i]);
	}
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
		if (wf(bad[i]))
			fail_msg("malformed, taken: %s", bad[i]);
	}
	/* a tag's length stops nowhere in the grammar: the subtag count does */
	char longtag[400] = "de";
	for (int i = 0; i < 70; i++)
		strcat(longtag, "-x1");
	assert_false(wf(longtag));
}

static int text(const char *s)
{
	char why[FC_WHY];
	return fc_text(s, strlen(s), 100, why);
}

static void test_text(void **state)
{
	char why[FC_WHY];
	(void)state;
	assert_int_equal(text("Lagerist (m/w/d)"), 0);
	assert_int_equal(text("K\xc3\xb6" "chin"), 0);
	assert_int_equal(text("\xe2\x80\x8b zero width space is no break"), 0);
	/* every C0 control, DEL, every C1 control, LS, PS */
	for (unsigned c = 1; c < 0x20; c++) {
		char s[4] = {'a', (char)c, 'b', 0};
		assert_int_equal(text(s), TM_EINPUT);
	}
	assert_int_equal(text("a\x7f"), TM_EINPUT);
	for (unsigned c = 0x80; c < 0xa0; c++) {
		char s[4] = {(char)0xc2, (char)c, 0, 0};
		assert_int_equal(fc_text(s, 2, 10, why), TM_EINPUT);
	}
	assert_int_equal(fc_text("a\0b", 3, 10, why), TM_EINPUT);
	assert_int_equal(text("a\xe2\x80\xa8" "b"), TM_EINPUT);
	assert_non_null(strstr((fc_text("a\xe2\x80\xa9", 4, 10, why), why), "U+2029"));
	assert_non_null(strstr((fc_text("ab\ncd", 5, 10, why), why), "U+000A (a control character) at byte 3"));
	/* invalid UTF-8, empty, too long */
	assert_int_equal(text("\xc3"), TM_EINPUT);
	assert_int_equal(text("\xed\xa0\x80"), TM_EINPUT); /* a surrogate */
	assert_int_equal(text(""), TM_EINPUT);
	assert_int_equal(fc_text("abcd", 4, 3, why), TM_EINPUT);
	assert_int_equal(fc_text("abc", 3, 3, why), 0);
	assert_int_equal(fc_note("", 0, why), 0);
	assert_int_equal(fc_name("", 0, why), TM_EINPUT);
	/* ids */
	assert_int_equal(fc_id("840717ed2fa8afce", 16, why), 0);
	assert_int_equal(fc_id("84 07", 5, why), TM_EINPUT);
	assert_int_equal(fc_id("\xc3\xa4", 2, why), TM_EINPUT);
	/* lang with the length limit */
	assert_int_equal(fc_lang("de-AT", 5, why), 0);
	assert_int_equal(fc_lang("de .", 4, why), TM_EINPUT);
}

static int occ(const char *s)
{
	char why[FC_WHY];
	return fc_occupation(s, strlen(s), why);
}

static void test_occupation(void **state)
{
	(void)state;
	assert_int_equal(occ("http://data.valdoria.example/occupation/5223"), 0);
	assert_int_equal(occ("occ:1"), 0);
	assert_int_equal(occ("5223"), 0);
	assert_int_equal(occ("urn:x-valdoria:occ:Lagerist%C3%A4"), 0);
	assert_int_equal(occ("http://example.org/Berufe/K\xc3\xb6" "chin?x=1#a"), 0);
	assert_int_equal(occ("http://example.org/a[1]!$&'()*+,;=~@"), 0);
	assert_int_equal(occ("http://example.org/\xf3\xb0\x80\x80"), 0); /* U+F0000, iprivate */
	static const char *const bad[] = {
		"occ 1", "occ:1\t", "occ:1\n", "<occ:1>", "occ\"1", "occ{1}", "a|b", "a\\b", "a^b",
		"a`b", "%", "%4", "%4g", "a\xc2\x85", "a\xc2\xa0\xe2\x80\xa8", "a\xe2\x80\xae",
		"a\xef\xbf\xbe", "a\xef\xb7\x90", "a\xf3\xa0\x80\x81", "", "a\x7f",
	};
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++)
		if (occ(bad[i]) != TM_EINPUT)
			fail_msg("not an IRI or id, taken: case %zu", i);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_bcp47),
		cmocka_unit_test(test_text),
		cmocka_unit_test(test_occupation),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

/* Unit tests for the UTF-8 check and repair stage (src/decode.c).
 * Expected replacements follow Unicode 15.0 section 3.9, "U+FFFD
 * Substitution of Maximal Subparts", and its Table 3-8 worked example. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "decode.h"

#define FFFD "\xEF\xBF\xBD"

static void repair_is(const char *in, size_t n, const char *want, int flags)
{
	tm_buf b = {0};
	int r = dec_repair(in, n, &b);
	assert_int_equal(r, flags);
	assert_int_equal(b.len, strlen(want));
	assert_memory_equal(b.data ? b.data : "", want, b.len);
	buf_free(&b);
}

static void test_valid_passes(void **state)
{
	(void)state;
	repair_is("Köln – Straße", strlen("Köln – Straße"), "Köln – Straße", 0);
	repair_is("", 0, "", 0);
	repair_is("\xF0\x9F\x98\x80", 4, "\xF0\x9F\x98\x80", 0); /* U+1F600 */
	assert_int_equal(dec_valid_prefix("abc\xC3", 4), 3);
}

/* Unicode 15.0 Table 3-8: 61 F1 80 80 E1 80 C2 62 80 63 80 BF 64 gives
 * a, FFFD, FFFD, FFFD, b, FFFD, c, FFFD, FFFD, d. */
static void test_table_3_8(void **state)
{
	(void)state;
	const char in[] = "\x61\xF1\x80\x80\xE1\x80\xC2\x62\x80\x63\x80\xBF\x64";
	repair_is(in, sizeof in - 1,
		  "a" FFFD FFFD FFFD "b" FFFD "c" FFFD FFFD "d", DEC_INVALID);
}

static void test_ill_formed(void **state)
{
	(void)state;
	repair_is("\xC0\xAF", 2, FFFD FFFD, DEC_INVALID);         /* overlong */
	repair_is("\xED\xA0\x80", 3, FFFD FFFD FFFD, DEC_INVALID); /* surrogate */
	repair_is("\xF4\x90\x80\x80", 4, FFFD FFFD FFFD FFFD, DEC_INVALID);
	repair_is("ab\xE2\x82", 4, "ab" FFFD, DEC_INVALID);        /* truncated */
	repair_is("\xFF", 1, FFFD, DEC_INVALID);
}

static void test_nul(void **state)
{
	(void)state;
	repair_is("a\0b", 3, "a" FFFD "b", DEC_NUL);
	repair_is("\0\xFF", 2, FFFD FFFD, DEC_NUL | DEC_INVALID);
	assert_true(dec_is_utf8("a\0b", 3));
}

/* Every output of repair is well-formed, for arbitrary bytes. */
static void test_random_bytes(void **state)
{
	(void)state;
	uint64_t x = 88172645463325252ULL;
	char in[64];
	for (int round = 0; round < 20000; round++) {
		size_t n = (size_t)(round % 64);
		tm_buf b = {0};
		for (size_t i = 0; i < n; i++) {
			x ^= x << 13;
			x ^= x >> 7;
			x ^= x << 17;
			in[i] = (char)(x & 0xFF);
		}
		assert_true(dec_repair(in, n, &b) >= 0);
		assert_true(dec_is_utf8(b.data ? b.data : "", b.len));
		assert_int_equal(dec_valid_prefix(b.data ? b.data : "", b.len) == b.len ||
					 memchr(b.data, 0, b.len) == NULL,
				 1);
		buf_free(&b);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_valid_passes),
		cmocka_unit_test(test_table_3_8),
		cmocka_unit_test(test_ill_formed),
		cmocka_unit_test(test_nul),
		cmocka_unit_test(test_random_bytes),
	};
	return cmocka_run_group_tests_name("decode", tests, NULL, NULL);
}

/* Unit tests for the UTF-8 check and repair stage (src/io/decode.c).
 * Expected replacements follow Unicode 15.0 section 3.9, "U+FFFD
 * Substitution of Maximal Subparts", and its Table 3-8 worked example. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "io/decode.h"

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
	/* ASCII is read eight bytes at a step: a NUL stops the prefix
	 * wherever it stands, bytes next to 0 (1, 0x7F) do not */
	char buf[24];
	for (size_t at = 0; at <= sizeof buf; at++) {
		for (size_t i = 0; i < sizeof buf; i++)
			buf[i] = (char)(i % 3 == 0 ? 0x01 : i % 3 == 1 ? 0x7F : 'a');
		if (at < sizeof buf)
			buf[at] = 0;
		assert_int_equal(dec_valid_prefix(buf, sizeof buf), at);
	}
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

static void markup_is(const char *in, const char *want, int flags)
{
	tm_buf b = {0}, scratch = {0};
	int r = dec_markup(in, strlen(in), &b, &scratch);
	assert_int_equal(r, flags);
	assert_int_equal(b.len, strlen(want));
	assert_memory_equal(b.data ? b.data : "", want, b.len);
	buf_free(&b);
	buf_free(&scratch);
}

/* Named references: the HTML standard's table (generated from Python's
 * html.entities.html5), case-sensitive, only with their ';'. */
static void test_named_refs(void **state)
{
	(void)state;
	markup_is("Ing&eacute;nieur", "Ingénieur", 0);
	markup_is("&Eacute;&eacute;&ouml;&Ouml;&szlig;&oslash;&aelig;",
		  "ÉéöÖßøæ", 0);
	markup_is("&Rcaron;&ccaron;&Scedil;&abreve;&ncaron;", "ŘčŞăň", 0);
	markup_is("&Alpha;&sigma;&sigmaf;", "Ασς", 0);
	markup_is("a&nbsp;b&shy;c&ndash;d&mdash;e&hellip;&bull;", "a\xC2\xA0" "b\xC2\xAD" "c–d—e…•", 0);
	markup_is("Sales &amp; Marketing &lt;x&gt; &quot;&apos;", "Sales & Marketing <x> \"'", 0);
	/* the longest name, two code points */
	markup_is("&CounterClockwiseContourIntegral;&NotEqualTilde;", "∳≂̸", 0);
	/* unknown names, no ';', a lone '&' stay as written */
	markup_is("R&D &foo; &eacute &EACUTE; AT&T &; & &#; &#x; &#12a;",
		  "R&D &foo; &eacute &EACUTE; AT&T &; & &#; &#x; &#12a;", 0);
	/* a name longer than any in the table */
	markup_is("&abcdefghijklmnopqrstuvwxyzabcdefghij;", "&abcdefghijklmnopqrstuvwxyzabcdefghij;", 0);
}

static void test_numeric_refs(void **state)
{
	(void)state;
	markup_is("Buc&#259;tar &#x2013; &#X2014; &#233;&#xe9;&#00000233;", "Bucătar – — éé" "é", 0);
	markup_is("&#128512;&#x1F600;", "\xF0\x9F\x98\x80\xF0\x9F\x98\x80", 0);
	/* U+0080..U+009F read as windows-1252, as the HTML standard says */
	markup_is("&#150;&#128;&#x9F;&#129;", "–€Ÿ\xC2\x81", 0);
	/* NUL, surrogates, beyond U+10FFFF: U+FFFD, reported */
	markup_is("a&#0;b", "a" FFFD "b", DEC_REF);
	markup_is("&#xD800;&#57343;", FFFD FFFD, DEC_REF);
	markup_is("&#x110000;&#99999999999999999999999;", FFFD FFFD, DEC_REF);
	markup_is("&#x10FFFF;", "\xF4\x8F\xBF\xBF", 0);
}

/* Text escaped twice reads as once, so decoding is idempotent. */
static void test_double_escaped(void **state)
{
	(void)state;
	markup_is("&amp;eacute; &amp;amp;ouml; &#38;#233; &amp;lt;br&amp;gt;", "é ö é |", 0);
	markup_is("&amp;foo; &amp;", "&foo; &", 0);
}

static void test_tags(void **state)
{
	(void)state;
	markup_is("Koch<br>Wien", "Koch | Wien", 0);
	markup_is("Koch <br/> Wien <BR /> x", "Koch | Wien | x", 0);
	markup_is("Kassierer <b>Linz</b>", "Kassierer | Linz |", 0);
	markup_is("<strong>Koch</strong>", "| Koch |", 0);
	markup_is("Koch <span class=\"x y\" id='z' data-a=b hidden>Wien</span>",
		  "Koch | Wien |", 0);
	/* a phrasing element inside a word leaves nothing */
	markup_is("Kade<b>ř</b>nice", "Kadeřnice", 0);
	/* one break for a run of tags */
	markup_is("Koch</b> <br><p>Wien", "Koch | Wien", 0);
	/* not tags: unknown names, no name, a '<' inside, unclosed */
	markup_is("<3 years", "<3 years", 0);
	markup_is("a<b", "a<b", 0);
	markup_is("a < b > c", "a < b > c", 0);
	markup_is("<Koch> <brx> </b x> <b/x>", "<Koch> <brx> </b x> <b/x>", 0);
	/* a removal never completes a tag or a reference: after an unclosed
	 * "<x" a tag stays as written, and inside a word after an unfinished
	 * "&x" it parts the word */
	markup_is("<b a=\"<b>\">", "<b a=\"<b>\">", 0);
	markup_is("<b<br>r>", "<b<br>r>", 0);
	markup_is("<span class=\"x<b></b>y\">", "<span class=\"x<b></b>y\">", 0);
	markup_is("a < b <br> c", "a < b | c", 0);
	markup_is("&am<b></b>p;", "&am | p;", 0);
	markup_is("&amp&#59; &#38;&#35;233;", "&amp&#59; &&#35;233;", 0);
	markup_is("<span class=\"x>Koch", "<span class=\"x>Koch", 0);
	/* escaped markup is markup */
	markup_is("Koch &lt;br&gt; Wien", "Koch | Wien", 0);
}

/* Adversarial shapes cost what plain text of the same length costs: a
 * failed tag or reference never reads past the next '<' or the end of
 * its digits and name. */
static void test_markup_linear(void **state)
{
	(void)state;
	static const char *const unit[] = {"<b a=\"", "&#1234", "<span ", "&amp;amp",
					   "&amp", "<b x='y' ", "</b"};
	for (size_t u = 0; u < sizeof unit / sizeof unit[0]; u++) {
		tm_buf in = {0}, out = {0}, scratch = {0};
		while (in.len < 200000)
			assert_int_equal(buf_puts(&in, unit[u]), 0);
		assert_true(dec_markup(in.data, in.len, &out, &scratch) >= 0);
		assert_true(out.len <= in.len + 4);
		buf_free(&in);
		buf_free(&out);
		buf_free(&scratch);
	}
}

/* Reading markup twice reads it once: the result holds no reference or
 * tag left to read, whatever the input. */
static void test_markup_idempotent(void **state)
{
	(void)state;
	static const char *const piece[] = {"&", "amp", ";", "#", "38", "x26", "<", ">", "b",
					    "br", "/", "\"", " ", "a", "lt", "gt", "eacute",
					    "span", "=", "'", "59", "p"};
	uint64_t x = 88172645463325252ULL;
	tm_buf in = {0}, once = {0}, twice = {0}, scratch = {0};
	for (int round = 0; round < 200000; round++) {
		buf_reset(&in);
		x ^= x << 13;
		x ^= x >> 7;
		x ^= x << 17;
		for (int k = (int)(x % 10) + 1; k > 0; k--) {
			x ^= x << 13;
			x ^= x >> 7;
			x ^= x << 17;
			assert_int_equal(buf_puts(&in, piece[x % (sizeof piece / sizeof piece[0])]), 0);
		}
		buf_reset(&once);
		buf_reset(&twice);
		assert_true(dec_markup(in.data, in.len, &once, &scratch) >= 0);
		assert_true(dec_markup(once.data ? once.data : "", once.len, &twice, &scratch) >= 0);
		if (once.len != twice.len || memcmp(once.data, twice.data, once.len))
			fail_msg("\"%.*s\" -> \"%.*s\" -> \"%.*s\"", (int)in.len, in.data,
				 (int)once.len, once.data, (int)twice.len, twice.data);
	}
	buf_free(&in);
	buf_free(&once);
	buf_free(&twice);
	buf_free(&scratch);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_valid_passes),
		cmocka_unit_test(test_table_3_8),
		cmocka_unit_test(test_ill_formed),
		cmocka_unit_test(test_nul),
		cmocka_unit_test(test_random_bytes),
		cmocka_unit_test(test_named_refs),
		cmocka_unit_test(test_numeric_refs),
		cmocka_unit_test(test_double_escaped),
		cmocka_unit_test(test_tags),
		cmocka_unit_test(test_markup_linear),
		cmocka_unit_test(test_markup_idempotent),
	};
	return cmocka_run_group_tests_name("decode", tests, NULL, NULL);
}

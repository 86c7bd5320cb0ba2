/* Unit tests for the Unicode layer (src/norm/unicode.c).
 *
 * Conformance: every line of NormalizationTest.txt from Debian's
 * unicode-data package (Unicode 15.0.0, the version utf8proc 2.8
 * implements) is checked through uni_normalize against all the
 * invariants its header states (UAX #15):
 *   c2 == NFC(c1) == NFC(c2) == NFC(c3),  c4 == NFC(c4) == NFC(c5)
 *   c3 == NFD(c1) == NFD(c2) == NFD(c3),  c5 == NFD(c4) == NFD(c5)
 *   c4 == NFKC(c1..c5),                   c5 == NFKD(c1..c5)
 * and code points not listed in Part 1 are unchanged by all four forms.
 * The file is read from NORMALIZATION_TEST (default: the Debian path,
 * decompressed by the suite runner). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "io/decode.h"
#include "norm/unicode.h"

static uni_ctx U_;

static void fold_is(const char *in, const char *want)
{
	tm_buf b = {0};
	assert_int_equal(uni_fold(&U_, in, strlen(in), &b), 0);
	assert_int_equal(b.len, strlen(want));
	assert_memory_equal(b.data ? b.data : "", want, b.len);
	buf_free(&b);
}

static void prep_is(const char *in, const char *want)
{
	tm_buf b = {0};
	assert_int_equal(uni_prepare(&U_, in, strlen(in), &b), 0);
	assert_int_equal(b.len, strlen(want));
	assert_memory_equal(b.data ? b.data : "", want, b.len);
	buf_free(&b);
}

static void lower_is(const char *in, const char *want)
{
	tm_buf b = {0};
	assert_int_equal(uni_lower(in, strlen(in), &b), 0);
	assert_int_equal(b.len, strlen(want));
	assert_memory_equal(b.data ? b.data : "", want, b.len);
	buf_free(&b);
}

static void lower_word_is(const char *in, unsigned opt, const char *want)
{
	tm_buf b = {0};
	assert_int_equal(uni_lower_word(in, strlen(in), opt, &b), 0);
	assert_int_equal(b.len, strlen(want));
	assert_memory_equal(b.data ? b.data : "", want, b.len);
	buf_free(&b);
}

/* Final sigma (Unicode 15.0 section 3.13, Final_Sigma; written from the
 * standard's definition), Turkish i (SpecialCasing.txt, conditional
 * mappings for tr and az), capital sharp s (UnicodeData.txt: 1E9E
 * lowercases to 00DF). */
static void test_lower_word(void **state)
{
	(void)state;
	/* FS is ς (U+03C2), S is σ (U+03C3) */
#define FS "\xCF\x82"
#define S "\xCF\x83"
	lower_word_is("ΠΩΛΗΤΗΣ", 0, "πωλητη" FS);
	lower_word_is("Οδηγό" S, 0, "οδηγό" FS); /* a final σ written as σ */
	lower_word_is("ΣΟΦΙΑ", 0, S "οφια");      /* initial: σ */
	lower_word_is("Σ", 0, S);                  /* alone: no letter before */
	lower_word_is("ΑΣΣΑ", 0, "α" S S "α");     /* inside: σ */
	lower_word_is("ΑΣΣ", 0, "α" S FS);
	lower_word_is("ΑΣ\xCC\x81", 0, "α" FS "\xCC\x81"); /* a mark after is no letter */
	lower_word_is("ΑΣ\xCC\x81Α", 0, "α" S "\xCC\x81α");
	lower_word_is("ΑΣ1", 0, "α" FS "1");
#undef FS
#undef S
	lower_word_is("KASİYER", UNI_TURKIC, "kasiyer");
	lower_word_is("MUHASEBE ELEMANI", UNI_TURKIC, "muhasebe elemanı");
	lower_word_is("IT", UNI_TURKIC, "ıt");
	lower_word_is("KASİYER ELEMANI", 0, "kasiyer elemani");
	lower_word_is("GROẞHANDEL", 0, "großhandel");
	lower_word_is("ПРОДАВАЧ-КОНСУЛТАНТ", 0, "продавач-консултант");
}

/* Values of ../shared/REFERENCES.md, seen with utf8proc 2.8 and checked
 * against CaseFolding.txt (00DF -> 0073 0073; 0130 -> 0069 0307). */
static void test_fold(void **state)
{
	(void)state;
	fold_is("Straße", "strasse");
	fold_is("\xEF\xBC\xA1\xEF\xBD\x92\xEF\xBD\x9A\xEF\xBD\x94", "arzt"); /* Ａｒｚｔ */
	fold_is("Ⅻ", "xii");
	fold_is("İstanbul", "istanbul"); /* İ -> i + U+0307, mark stripped */
	fold_is("Ingénieur", "ingenieur");
	fold_is("Łódź", "lodz");
	fold_is("København", "kobenhavn");
	fold_is("Manœuvre", "manoeuvre");
	fold_is("Cafe\xCC\x81", "cafe"); /* decomposed é */
	fold_is("ASCII Only", "ascii only");
}

static void test_prepare(void **state)
{
	(void)state;
	prep_is("Koch \xE2\x80\x93 Berlin", "Koch - Berlin");          /* en dash */
	prep_is("a\xE2\x80\x94" "b", "a-b");                            /* em dash */
	prep_is("agent d\xE2\x80\x99" "accueil", "agent d'accueil");   /* ’ */
	prep_is("a\xC2\xA0" "b", "a b");                                /* NBSP */
	prep_is("Soft\xC2\xADware", "Software");                       /* soft hyphen */
	prep_is("zero\xE2\x80\x8Bwidth", "zerowidth");                 /* ZWSP */
	prep_is("job \xF0\x9F\x9A\x80!", "job |!");                    /* emoji */
	prep_is("a \xE2\x80\xA2 b", "a | b");                          /* bullet */
	prep_is("\xEF\xAC\x81le", "file");                             /* ﬁ ligature */
	prep_is("Cafe\xCC\x81", "Café");                               /* composed */
	prep_is("vendeur\xC2\xB7" "euse", "vendeur\xC2\xB7" "euse");   /* middle dot kept */
	prep_is("tab\there", "tab here");
}

/* A line of Latin letters (which compose with a following mark) and
 * code point X takes the per-code-point path when X allows it; a
 * trailing " U+FB01" (a ligature: decomposed, so never taken code point
 * by code point; it changes nothing before it) sends the same line down
 * the general algorithm.  Both must agree, in
 * the working form and the fold, for every code point sampled (every
 * 61st; whole: the emoji and symbol blocks, and the combining marks,
 * Indic vowel signs and Hangul jamo that compose with what precedes). */
static void test_fast_paths_agree(void **state)
{
	(void)state;
	tm_buf a = {0}, b = {0}, c = {0};
	char line[64];
	static const char mark[] = " \xEF\xAC\x81"; /* " ﬁ": a decomposition */
	for (int32_t cp = 0x80; cp <= 0x10FFFF; cp++) {
		if (cp % 61 && !(cp >= 0x2000 && cp <= 0x2BFF) &&
		    !(cp >= 0x1F000 && cp <= 0x1FAFF) && !(cp >= 0x300 && cp <= 0x36F) &&
		    !(cp >= 0x900 && cp <= 0xDFF) && !(cp >= 0x1100 && cp <= 0x11FF) &&
		    !(cp >= 0x3099 && cp <= 0x309A))
			continue;
		if (cp >= 0xD800 && cp <= 0xDFFF)
			continue;
		for (int shape = 0; shape < 2; shape++) {
			/* "EeXeXa"; "EᄀXXa" (a Hangul leading consonant, which
			 * composes with a vowel jamo after it) */
			size_t n = 0;
			line[n++] = 'E';
			if (shape)
				n += dec_put_utf8(0x1100, line + n);
			else
				line[n++] = 'e';
			n += dec_put_utf8(cp, line + n);
			if (!shape)
				line[n++] = 'e';
			n += dec_put_utf8(cp, line + n);
			line[n++] = 'a';
			for (int fold = 0; fold < 2; fold++) {
				int (*f)(uni_ctx *, const char *, size_t, tm_buf *) =
					fold ? uni_fold : uni_prepare;
				buf_reset(&a);
				buf_reset(&b);
				buf_reset(&c);
				assert_int_equal(f(&U_, line, n, &a), 0);
				assert_int_equal(f(&U_, mark, sizeof mark - 1, &c), 0);
				assert_int_equal(buf_append(&a, c.data, c.len), 0);
				memcpy(line + n, mark, sizeof mark - 1);
				assert_int_equal(f(&U_, line, n + sizeof mark - 1, &b), 0);
				if (a.len != b.len || memcmp(a.data, b.data, a.len))
					fail_msg("U+%04X (%s): the two paths differ", (unsigned)cp,
						 fold ? "fold" : "prepare");
			}
		}
	}
	buf_free(&a);
	buf_free(&b);
	buf_free(&c);
}

static void test_lower(void **state)
{
	(void)state;
	lower_is("STRASSE Straße", "strasse straße");
	lower_is("İNŞAAT", "inşaat"); /* simple mapping: U+0130 -> U+0069 */
	lower_is("ÉCOLE", "école");
}

/* Parses "0044 0307" into UTF-8. */
static int hex_to_utf8(const char *s, const char *end, tm_buf *out)
{
	char enc[5];
	while (s < end) {
		char *e;
		unsigned long cp;
		while (s < end && *s == ' ')
			s++;
		if (s >= end)
			break;
		cp = strtoul(s, &e, 16);
		if (e == s)
			return -1;
		s = e;
		size_t n;
		if (cp < 0x80) { enc[0] = (char)cp; n = 1; }
		else if (cp < 0x800) { enc[0] = (char)(0xC0 | cp >> 6); enc[1] = (char)(0x80 | (cp & 63)); n = 2; }
		else if (cp < 0x10000) { enc[0] = (char)(0xE0 | cp >> 12); enc[1] = (char)(0x80 | ((cp >> 6) & 63)); enc[2] = (char)(0x80 | (cp & 63)); n = 3; }
		else { enc[0] = (char)(0xF0 | cp >> 18); enc[1] = (char)(0x80 | ((cp >> 12) & 63)); enc[2] = (char)(0x80 | ((cp >> 6) & 63)); enc[3] = (char)(0x80 | (cp & 63)); n = 4; }
		if (buf_append(out, enc, n))
			return -1;
	}
	return 0;
}

static int same(const tm_buf *a, const tm_buf *b)
{
	return a->len == b->len && (a->len == 0 || !memcmp(a->data, b->data, a->len));
}

static void norm_is(enum uni_form f, const tm_buf *in, const tm_buf *want, long line)
{
	tm_buf got = {0};
	assert_int_equal(uni_normalize(&U_, f, in->data, in->len, &got), 0);
	if (!same(&got, want))
		fail_msg("NormalizationTest.txt:%ld: form %d differs", line, (int)f);
	buf_free(&got);
}

static void encode_cp(unsigned long cp, tm_buf *out)
{
	char h[16];
	snprintf(h, sizeof h, "%lX", cp);
	buf_reset(out);
	hex_to_utf8(h, h + strlen(h), out);
}

static void test_normalization_file(void **state)
{
	(void)state;
	const char *path = getenv("NORMALIZATION_TEST");
	FILE *fp;
	char line[4096];
	long lineno = 0, tests = 0;
	int part = -1;
	static unsigned char in_part1[0x110000];

	if (!path)
		path = "/usr/share/unicode/NormalizationTest.txt";
	fp = fopen(path, "r");
	if (!fp)
		fail_msg("cannot read %s (Debian unicode-data; set NORMALIZATION_TEST)", path);
	while (fgets(line, sizeof line, fp)) {
		tm_buf c[5] = {{0}};
		char *p = line, *semi;
		int i;
		lineno++;
		if (line[0] == '#' || line[0] == '\n')
			continue;
		if (line[0] == '@') {
			part = atoi(line + 5);
			continue;
		}
		for (i = 0; i < 5; i++) {
			semi = strchr(p, ';');
			assert_non_null(semi);
			assert_int_equal(hex_to_utf8(p, semi, &c[i]), 0);
			p = semi + 1;
		}
		if (part == 1)
			in_part1[strtoul(line, NULL, 16)] = 1;
		for (i = 0; i < 3; i++) {
			norm_is(UNI_NFC, &c[i], &c[1], lineno);
			norm_is(UNI_NFD, &c[i], &c[2], lineno);
		}
		for (i = 3; i < 5; i++) {
			norm_is(UNI_NFC, &c[i], &c[3], lineno);
			norm_is(UNI_NFD, &c[i], &c[4], lineno);
		}
		for (i = 0; i < 5; i++) {
			norm_is(UNI_NFKC, &c[i], &c[3], lineno);
			norm_is(UNI_NFKD, &c[i], &c[4], lineno);
		}
		tests++;
		for (i = 0; i < 5; i++)
			buf_free(&c[i]);
	}
	fclose(fp);
	/* 19,074 test lines in Unicode 15.0 (REFERENCES.md) */
	assert_int_equal(tests, 19074);
	/* code points outside Part 1 are unchanged by every form */
	tm_buf one = {0};
	long checked = 0;
	for (unsigned long cp = 0; cp < 0x110000; cp++) {
		if (in_part1[cp] || (cp >= 0xD800 && cp <= 0xDFFF))
			continue;
		if (cp % 7 && cp > 0x3000)
			continue; /* every 7th above U+3000 keeps the run short */
		encode_cp(cp, &one);
		for (int f = UNI_NFC; f <= UNI_NFKD; f++)
			norm_is((enum uni_form)f, &one, &one, -(long)cp);
		checked++;
	}
	assert_true(checked > 100000);
	buf_free(&one);
}

/* The Stream-Safe Text Format (UAX #15 section 13): at most 30
 * non-starters in a row are kept, the rest dropped, whatever the form;
 * ignorables do not end a run, a starter does. */
static void test_stream_safe(void **state)
{
	uni_ctx u = {0};
	tm_buf in = {0}, out = {0}, want = {0};
	(void)state;
	/* "a" + 40 x (U+0316 ccc 220, U+0301 ccc 230): NFD keeps 30 marks
	 * (15 of each), sorted by class */
	buf_putc(&in, 'a');
	for (int i = 0; i < 40; i++)
		buf_puts(&in, "\xCC\x96\xCC\x81");
	assert_int_equal(uni_normalize(&u, UNI_NFD, in.data, in.len, &out), 0);
	buf_putc(&want, 'a');
	for (int i = 0; i < 15; i++)
		buf_puts(&want, "\xCC\x96");
	for (int i = 0; i < 15; i++)
		buf_puts(&want, "\xCC\x81");
	assert_int_equal(out.len, want.len);
	assert_memory_equal(out.data, want.data, want.len);
	/* 30 marks are left alone; a starter starts a new run */
	buf_reset(&in);
	buf_reset(&out);
	buf_puts(&in, "a");
	for (int i = 0; i < 30; i++)
		buf_puts(&in, "\xCC\x81");
	buf_puts(&in, "b\xCC\x81");
	assert_int_equal(uni_normalize(&u, UNI_NFD, in.data, in.len, &out), 0);
	assert_int_equal(out.len, in.len);
	assert_memory_equal(out.data, in.data, in.len);
	/* a zero-width joiner (ignorable) between marks does not restart the
	 * count: 20 + 20 marks keep 30 */
	buf_reset(&in);
	buf_reset(&out);
	buf_puts(&in, "a");
	for (int i = 0; i < 20; i++)
		buf_puts(&in, "\xCC\x81");
	buf_puts(&in, "\xE2\x80\x8D");
	for (int i = 0; i < 20; i++)
		buf_puts(&in, "\xCC\x81");
	assert_int_equal(uni_prepare(&u, in.data, in.len, &out), 0);
	assert_int_equal(out.len, 2 + 29 * 2); /* á and 29 marks */
	/* U+0344 decomposes to two non-starters: 20 of them keep 15 */
	buf_reset(&in);
	buf_reset(&out);
	buf_puts(&in, "a");
	for (int i = 0; i < 20; i++)
		buf_puts(&in, "\xCD\x84");
	assert_int_equal(uni_normalize(&u, UNI_NFD, in.data, in.len, &out), 0);
	assert_int_equal(out.len, 1 + 30 * 2);
	buf_free(&in);
	buf_free(&out);
	buf_free(&want);
	uni_ctx_free(&u);
}

static void test_class(void **state)
{
	(void)state;
	assert_int_equal(uni_classify('a'), UNI_LETTER);
	assert_int_equal(uni_classify(0x0301), UNI_MARK);
	assert_int_equal(uni_classify('7'), UNI_DIGIT);
	assert_int_equal(uni_classify(0x20AC), UNI_CURRENCY); /* € */
	assert_int_equal(uni_classify(0x2013), UNI_PUNCT);
	assert_true(uni_is_upper(0x00C9));
	assert_true(uni_is_lower(0x00DF));
	assert_string_equal(uni_version(), "15.0.0");
}

static int teardown(void **state)
{
	(void)state;
	uni_ctx_free(&U_);
	return 0;
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_fold),
		cmocka_unit_test(test_prepare),
		cmocka_unit_test(test_fast_paths_agree),
		cmocka_unit_test(test_lower),
		cmocka_unit_test(test_class),
		cmocka_unit_test(test_lower_word),
		cmocka_unit_test(test_stream_safe),
		cmocka_unit_test(test_normalization_file),
	};
	return cmocka_run_group_tests_name("unicode", tests, NULL, teardown);
}

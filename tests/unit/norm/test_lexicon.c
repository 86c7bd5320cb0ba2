/* Unit tests for lexicon loading and lookup (src/norm/lexicon.c,
 * lexicon_read.c) and its image (lexicon_image.c). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cmocka.h>

#include "norm/lexicon.h"
#include "norm/token.h"

/* The phrase of text as the scanner finds it: the title's tokens, each
 * word's id in the vocabulary, one trie step per word. */
static const lex_entry *find(lexicon *lx, const char *text)
{
	static uni_ctx u;
	static tok_line tl;
	static tm_buf w;
	uint32_t n = LEX_ROOT;
	int words = 0;

	if (!text[0]) {
		uni_ctx_free(&u);
		tok_line_free(&tl);
		buf_free(&w);
		return NULL;
	}
	buf_reset(&w);
	uni_prepare(&u, text, strlen(text), &w);
	tok_split(&tl, &u, w.data, w.len);
	for (size_t i = 0; i < tl.n; i++) {
		const tm_tok *t = &tl.t[i];
		if (t->kind == TK_PUNCT)
			continue;
		n = lex_step(lx, n, lex_word(lx, tok_fold(&tl, t), t->flen, t->hash));
		words++;
		if (!n)
			return NULL;
	}
	return words ? lex_phrase(lx, n, NULL) : NULL;
}

static uint32_t word_id(lexicon *lx, const char *w)
{
	return lex_word(lx, w, strlen(w), tok_hash(w, strlen(w)));
}

static void test_add_and_find(void **state)
{
	(void)state;
	lexicon *lx = lex_new();
	tm_buf err = {0};
	assert_int_equal(lex_add(lx, LC_SCHEDULE, "en", "full-time", 9, "full_time", LW_ANY, &err), 0);
	assert_int_equal(lex_add(lx, LC_SENIORITY, "de", "Erfahrener", 10, "senior", LW_EDGE, &err), 0);
	assert_int_equal(lex_add(lx, LC_PLACE, "*", "Köln", strlen("Köln"), "DE", LW_SLOT, &err), 0);
	const lex_entry *e = find(lx, "FULL TIME");
	assert_non_null(e);
	assert_string_equal(e->value, "full_time");
	assert_non_null(find(lx, "full.time"));
	assert_null(find(lx, "fulltime"));
	e = find(lx, "KOLN");
	assert_non_null(e);
	assert_int_equal(e->cat, LC_PLACE);
	assert_string_equal(e->value, "DE");
	/* "full" starts a phrase but is none; "time" is a word of the
	 * vocabulary that starts none; "fuller" is no word of it */
	uint32_t full = lex_step(lx, LEX_ROOT, word_id(lx, "full"));
	assert_int_not_equal(full, 0);
	assert_null(lex_phrase(lx, full, NULL));
	uint32_t cats = 0;
	assert_non_null(lex_phrase(lx, lex_step(lx, full, word_id(lx, "time")), &cats));
	assert_int_equal(cats, 1u << LC_SCHEDULE);
	assert_int_not_equal(word_id(lx, "time"), 0);
	assert_int_equal(lex_step(lx, LEX_ROOT, word_id(lx, "time")), 0);
	assert_int_equal(word_id(lx, "fuller"), 0);
	assert_int_equal(lex_step(lx, full, 0), 0);
	/* one phrase, entries of several categories in the order added */
	assert_int_equal(lex_add(lx, LC_UNIT, "*", "Full Time", 9, "hours", LW_ANY, &err), 0);
	e = find(lx, "full time");
	assert_int_equal(e->cat, LC_SCHEDULE);
	assert_int_equal(lex_next(lx, e)->cat, LC_UNIT);
	assert_null(lex_next(lx, lex_next(lx, e)));
	assert_non_null(lex_phrase(lx, lex_step(lx, full, word_id(lx, "time")), &cats));
	assert_int_equal(cats, 1u << LC_SCHEDULE | 1u << LC_UNIT);
	/* a line given twice adds no entry */
	assert_int_equal(lex_add(lx, LC_UNIT, "*", "full time", 9, "hours", LW_ANY, &err), 0);
	assert_null(lex_next(lx, lex_next(lx, find(lx, "full time"))));
	/* bad values are refused with a message */
	assert_int_equal(lex_add(lx, LC_SENIORITY, "de", "x", 1, "boss", LW_ANY, &err), -1);
	assert_non_null(strstr(err.data, "unknown value 'boss'"));
	assert_int_equal(lex_add(lx, LC_SENIORITY, "DEU", "x", 1, "senior", LW_ANY, &err), -1);
	/* a phrase of punctuation only adds nothing */
	assert_int_equal(lex_add(lx, LC_MARKETING, "*", "!!!", 3, "-", LW_ANY, &err), 1);
	/* off switches an entry off */
	assert_int_equal(lex_add(lx, LC_SCHEDULE, "en", "full time", 9, "full_time", LW_OFF, &err), 0);
	assert_true(find(lx, "full time")->off);
	assert_false(lex_next(lx, find(lx, "full time"))->off);
	/* off for a phrase never added adds nothing */
	assert_int_equal(lex_add(lx, LC_SCHEDULE, "en", "part time", 9, "part_time", LW_OFF, &err), 0);
	assert_null(find(lx, "part time"));
	assert_int_equal(word_id(lx, "part"), 0);
	find(lx, "");
	lex_free(lx);
	buf_free(&err);
}

static void test_load_dir(void **state)
{
	(void)state;
	char dir[] = "/tmp/tm-lex-XXXXXX", p[256];
	FILE *fp;
	tm_buf err = {0};
	lexicon *lx;
	size_t n;

	assert_non_null(mkdtemp(dir));
	snprintf(p, sizeof p, "%s/gender", dir);
	mkdir(p, 0700);
	snprintf(p, sizeof p, "%s/gender/pairs-a.txt", dir);
	fp = fopen(p, "w");
	fputs("# comment\nfr\teur\teuse\nde\t-\tin\n", fp);
	fclose(fp);
	snprintf(p, sizeof p, "%s/seniority", dir);
	mkdir(p, 0700);
	snprintf(p, sizeof p, "%s/seniority/a.txt", dir);
	fp = fopen(p, "w");
	fputs("en\tsenior\tsenior\nen\tjunior\tjunor\n", fp);
	fclose(fp);
	lx = lex_new();
	assert_int_equal(lex_load_dir(lx, dir, &err), -1);
	assert_non_null(strstr(err.data, "seniority/a.txt:2: unknown value 'junor'"));
	const lex_pair *pr = lex_pairs(lx, &n);
	assert_int_equal(n, 2);
	assert_string_equal(pr[0].masc, "eur");
	assert_string_equal(pr[0].fem, "euse");
	assert_string_equal(pr[1].masc, "");
	lex_free(lx);
	buf_free(&err);
	unlink(p);
	snprintf(p, sizeof p, "%s/gender/pairs-a.txt", dir);
	unlink(p);
	snprintf(p, sizeof p, "%s/gender", dir);
	rmdir(p);
	snprintf(p, sizeof p, "%s/seniority", dir);
	rmdir(p);
	rmdir(dir);
}

static void write_file(const char *dir, const char *sub, const char *name,
		       const char *text)
{
	char p[512];
	FILE *fp;
	snprintf(p, sizeof p, "%s/%s", dir, sub);
	mkdir(p, 0700);
	snprintf(p, sizeof p, "%s/%s/%s", dir, sub, name);
	assert_non_null(fp = fopen(p, "w"));
	fputs(text, fp);
	fclose(fp);
}

static void remove_file(const char *dir, const char *sub, const char *name)
{
	char p[512];
	snprintf(p, sizeof p, "%s/%s/%s", dir, sub, name);
	unlink(p);
	snprintf(p, sizeof p, "%s/%s", dir, sub);
	rmdir(p);
}

static const lex_entry *ending(lexicon *lx, const char *w, size_t *elen)
{
	return lex_ending(lx, w, strlen(w), elen);
}

/* occupation/ and business/: a sample of each in the agreed format */
static void test_occupation_and_business(void **state)
{
	(void)state;
	char dir[] = "/tmp/tm-lex-XXXXXX";
	tm_buf err = {0};
	lexicon *lx;
	const lex_entry *e;
	size_t elen = 0;

	assert_non_null(mkdtemp(dir));
	write_file(dir, "occupation", "de.txt",
		   "# occupational words, German\n"
		   "de\tKoch\thead\n"
		   "de\tFachkraft\tsuffix\n"
		   "de\tkraft\tsuffix\n"
		   "de\t-arbeiter\tsuffix\n"
		   "da\tør\tsuffix\n"
		   "de\tBuchhaltung\tfield\n"
		   "en\tsales manager\thead\n");
	write_file(dir, "business", "de.txt",
		   "de\tHotel\tkind\n"
		   "de\tBäckerei\tkind\n"
		   "de\te.V.\tlegal\n"
		   "de\t& Söhne\tlegal\n"
		   "de\tder\tarticle\n"
		   "de\tHotel\tkind\n");
	lx = lex_new();
	assert_int_equal(lex_load_dir(lx, dir, &err), 0);
	e = find(lx, "KOCH");
	assert_non_null(e);
	assert_int_equal(e->cat, LC_OCCUPATION);
	assert_string_equal(e->value, "head");
	assert_string_equal(find(lx, "buchhaltung")->value, "field");
	assert_string_equal(find(lx, "Sales-Manager")->value, "head");
	e = find(lx, "hotel");
	assert_int_equal(e->cat, LC_BUSINESS);
	assert_string_equal(e->value, "kind");
	assert_null(lex_next(lx, e)); /* the line given twice: one entry */
	assert_string_equal(find(lx, "Backerei")->value, "kind");
	assert_string_equal(find(lx, "E.V.")->value, "legal");
	assert_string_equal(find(lx, "& Söhne")->value, "legal");
	assert_string_equal(find(lx, "der")->value, "article");
	/* endings are no phrases: they match the end of a word, the
	 * longest one first, the word itself too */
	assert_null(find(lx, "fachkraft"));
	e = ending(lx, "lagerfachkraft", &elen);
	assert_non_null(e);
	assert_int_equal(e->cat, LC_OCCUPATION);
	assert_string_equal(e->value, "suffix");
	assert_string_equal(e->lang, "de");
	assert_int_equal(elen, strlen("fachkraft"));
	assert_non_null(ending(lx, "lehrkraft", &elen));
	assert_int_equal(elen, strlen("kraft"));
	assert_non_null(ending(lx, "fachkraft", &elen));
	assert_int_equal(elen, strlen("fachkraft"));
	assert_non_null(ending(lx, "hilfsarbeiter", &elen));
	assert_int_equal(elen, strlen("arbeiter"));
	/* folded like a title's words: ø is o in the match key */
	assert_non_null(ending(lx, "operator", &elen));
	assert_int_equal(elen, 2);
	assert_null(ending(lx, "kraftwerk", &elen));
	assert_null(ending(lx, "arbeit", &elen));
	assert_null(ending(lx, "", &elen));
	lex_free(lx);
	remove_file(dir, "occupation", "de.txt");
	remove_file(dir, "business", "de.txt");

	/* refusals name the file and the line */
	static const struct { const char *sub, *text, *msg; } bad[] = {
		{"occupation", "de\tKoch\thead\nde\tKoch\tchef\n",
		 "occupation/x.txt:2: unknown value 'chef' for occupation"},
		{"occupation", "de\tKoch\thead\tedge\n",
		 "occupation/x.txt:1: no WHERE in occupation/"},
		{"occupation", "de\tfach kraft\tsuffix\n",
		 "occupation/x.txt:1: an ending is one word"},
		{"occupation", "de\t-\tsuffix\n",
		 "occupation/x.txt:1: an ending is one word"},
		{"business", "de\tHotel\tkind\tany\n",
		 "business/x.txt:1: no WHERE in business/"},
		{"business", "#\n\nde\tHotel\thotel\n",
		 "business/x.txt:3: unknown value 'hotel' for business"},
		{"business", "DE\tHotel\tkind\n", "business/x.txt:1: bad language 'DE'"},
	};
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		write_file(dir, bad[i].sub, "x.txt", bad[i].text);
		lx = lex_new();
		assert_int_equal(lex_load_dir(lx, dir, &err), -1);
		if (!strstr(err.data, bad[i].msg))
			fail_msg("got \"%.*s\", want \"%s\"", (int)err.len, err.data, bad[i].msg);
		lex_free(lx);
		remove_file(dir, bad[i].sub, "x.txt");
	}
	rmdir(dir);
	buf_free(&err);
}

/* places: `any` (a case form, a location by itself), `adjective` (a
 * place only before an area word) and `city` (a larger place); the two
 * are refused elsewhere; units/ takes the value `link` */
static void test_place_where(void **state)
{
	(void)state;
	char dir[] = "/tmp/tm-lex-XXXXXX";
	tm_buf err = {0};
	lexicon *lx;
	const lex_entry *e;

	assert_non_null(mkdtemp(dir));
	write_file(dir, "places", "x.txt",
		   "fi\tHelsingissä\tFI\tany\n"
		   "de\tMünchner\tDE\tadjective\n"
		   "lv?\tRīgā\tLV\tany\n"
		   "*\tRiga\tLV\tslot\n"
		   "*\tWarszawa\tPL\tcity\n");
	write_file(dir, "units", "x.txt", "de\tder\tlink\n");
	lx = lex_new();
	assert_int_equal(lex_load_dir(lx, dir, &err), 0);
	e = find(lx, "HELSINGISSA");
	assert_non_null(e);
	assert_int_equal(e->cat, LC_PLACE);
	assert_int_equal(e->where, LW_ANY);
	assert_string_equal(e->value, "FI");
	assert_int_equal(find(lx, "münchner")->where, LW_ADJ);
	assert_int_equal(find(lx, "warszawa")->where, LW_CITY);
	assert_int_equal(find(lx, "warszawa")->cat, LC_PLACE);
	assert_string_equal(find(lx, "der")->value, "link");
	/* one match key, two entries: the Latvian case form and the name */
	e = find(lx, "riga");
	assert_non_null(e);
	assert_non_null(lex_next(lx, e));
	lex_free(lx);
	remove_file(dir, "places", "x.txt");
	remove_file(dir, "units", "x.txt");

	write_file(dir, "schedule", "x.txt", "en\tday shift\tshift\tadjective\n");
	lx = lex_new();
	assert_int_equal(lex_load_dir(lx, dir, &err), -1);
	assert_non_null(strstr(err.data, "schedule/x.txt:1: unknown place restriction 'adjective'"));
	lex_free(lx);
	write_file(dir, "schedule", "x.txt", "en\tday shift\tshift\tcity\n");
	lx = lex_new();
	assert_int_equal(lex_load_dir(lx, dir, &err), -1);
	assert_non_null(strstr(err.data, "schedule/x.txt:1: unknown place restriction 'city'"));
	lex_free(lx);
	remove_file(dir, "schedule", "x.txt");
	rmdir(dir);
	buf_free(&err);
}

/* A small lexicon of every kind of data an image holds. */
static lexicon *small_lexicon(void)
{
	lexicon *lx = lex_new();
	tm_buf err = {0};
	static const char *const ph[][4] = {
		{"en", "full-time", "full_time", ""}, {"de", "Vollzeit", "full_time", ""},
		{"fr", "temps plein", "full_time", ""}, {"*", "Köln", "DE", ""},
		{"*", "Zürich", "CH", ""}, {"en", "care home", "kind", "b"},
		{"de", "-fachkraft", "suffix", "o"}, {"en", "manager", "head", "o"},
		{"en", "part time", "part_time", ""}, {"en", "part time job", "part_time", ""},
	};
	assert_non_null(lx);
	for (size_t i = 0; i < sizeof ph / sizeof ph[0]; i++) {
		int cat = ph[i][3][0] == 'b' ? LC_BUSINESS : ph[i][3][0] == 'o' ? LC_OCCUPATION
			: ph[i][2][0] >= 'A' && ph[i][2][0] <= 'Z' ? LC_PLACE : LC_SCHEDULE;
		assert_int_equal(lex_add(lx, cat, ph[i][0], ph[i][1], strlen(ph[i][1]), ph[i][2],
					 cat == LC_PLACE ? LW_SLOT : LW_ANY, &err), 0);
	}
	/* the phrase entered twice, in two categories */
	assert_int_equal(lex_add(lx, LC_UNIT, "*", "Full Time", 9, "hours", LW_ANY, &err), 0);
	/* the last WHERE value an image may hold */
	assert_int_equal(lex_add(lx, LC_PLACE, "*", "Wien", 4, "AT", LW_CITY, &err), 0);
	FILE *f = fopen("/tmp/tm-test-img-pairs.txt", "w");
	assert_non_null(f);
	fputs("de\ter\terin\nfr\teur\teuse\nes\to\ta\n", f);
	fclose(f);
	assert_int_equal(lex_load_file(lx, LC_MARKER, 3, "/tmp/tm-test-img-pairs.txt", &err), 0);
	unlink("/tmp/tm-test-img-pairs.txt");
	buf_free(&err);
	return lx;
}

/* Every lookup of the small lexicon, walking what it finds: on a
 * damaged image that was accepted this must stay in bounds (ASan). */
static void walk(lexicon *lx)
{
	static const char *const words[] = {"full", "time", "koln", "zurich", "care", "home",
					    "manager", "job", "part", "vollzeit", "x"};
	size_t n, elen;
	for (size_t i = 0; i < sizeof words / sizeof words[0]; i++) {
		uint32_t node = lex_step(lx, LEX_ROOT, word_id(lx, words[i]));
		for (size_t j = 0; j < sizeof words / sizeof words[0] && node; j++) {
			uint32_t cats;
			for (const lex_entry *e = lex_phrase(lx, node, &cats); e; e = lex_next(lx, e))
				assert_true(strlen(e->value) < sizeof e->value);
			node = lex_step(lx, node, word_id(lx, words[j]));
		}
	}
	lex_ending(lx, "lagerfachkraft", 14, &elen);
	lex_pairs(lx, &n);
	for (int c = -1; c < 256; c++) {
		const uint32_t *g = lex_pairs_fem_last(lx, c, &n);
		for (size_t i = 0; i < n; i++)
			assert_true(g[i] < 1000);
	}
}

static void *copy8(const tm_buf *b)
{
	void *p = NULL;
	assert_int_equal(posix_memalign(&p, 8, b->len), 0);
	memcpy(p, b->data, b->len);
	return p;
}

/* The image of a lexicon read back in place gives the same lookups,
 * stays extendable, and a damaged, truncated or foreign image is refused
 * (never read out of bounds, also when its checksum was made right). */
static void test_image(void **state)
{
	(void)state;
	static const unsigned char key[16] = "0123456789abcdef", other[16] = "0123456789abcdeX";
	lexicon *lx = small_lexicon(), *back = NULL;
	tm_buf img = {0}, img2 = {0}, why = {0}, err = {0};
	size_t n, n2, elen;
	void *p;

	assert_int_equal(lex_image_write(lx, key, &img), 0);
	p = copy8(&img);
	assert_int_equal(lex_image_use(p, img.len, 0, other, &back, &why), 1);
	assert_null(back);
	assert_non_null(strstr(why.data, "other lexicon files"));
	assert_int_equal(lex_image_use(p, img.len, 0, key, &back, &why), 0);
	/* the same lookups and the same image again */
	assert_int_equal(word_id(back, "vollzeit"), word_id(lx, "vollzeit"));
	assert_string_equal(find(back, "full time")->value, "full_time");
	assert_string_equal(lex_next(back, find(back, "full time"))->value, "hours");
	assert_string_equal(find(back, "Köln")->value, "DE");
	assert_int_equal(find(back, "Wien")->where, LW_CITY);
	assert_string_equal(find(back, "part time job")->value, "part_time");
	assert_non_null(lex_ending(back, "lagerfachkraft", 14, &elen));
	assert_int_equal(elen, 9);
	assert_string_equal(lex_pairs(back, &n)[1].fem, "euse");
	assert_int_equal(n, 3);
	assert_int_equal(lex_pairs_fem_last(back, 'a', &n)[0], 2);
	assert_int_equal(lex_image_write(back, key, &img2), 0);
	assert_int_equal(img2.len, img.len);
	assert_memory_equal(img2.data, img.data, img.len);
	/* extendable: a label added after the image was read */
	assert_int_equal(lex_add(back, LC_PROTECT, "*", "Pflegefachkraft Intensiv", 24, "-", LW_ANY, &err), 0);
	assert_non_null(find(back, "pflegefachkraft intensiv"));
	assert_string_equal(find(back, "full time")->value, "full_time");
	assert_int_equal(lex_add(back, LC_SCHEDULE, "en", "full time", 9, "full_time", LW_OFF, &err), 0);
	assert_true(find(back, "full time")->off);
	lex_free(back); /* and the image it owned */
	p = copy8(&img);

	/* truncated at every length of the header, and at a sample past it */
	for (n = 0; n < img.len; n = n < 256 ? n + 1 : n * 3 / 2 + 7) {
		assert_int_equal(lex_image_use(p, n, 0, key, &back, &why), 1);
		assert_null(back);
	}
	/* bytes flipped: refused by the checksum; with the checksum made
	 * right again, refused by the checks or read within bounds */
	srand(7);
	for (int k = 0; k < 400; k++) {
		unsigned char *q = p;
		size_t at = k < 200 ? (size_t)rand() % img.len
				    : img.len - 1 - (size_t)rand() % (img.len / 8);
		unsigned char bit = (unsigned char)(1u << (rand() % 8));
		q[at] ^= bit;
		if (at >= 48)
			assert_int_equal(lex_image_use(p, img.len, 0, key, &back, &why), 1);
		lex_image_seal(p, img.len);
		n2 = 0;
		int r = lex_image_use(p, img.len, 0, key, &back, &why);
		assert_true(r == 0 || r == 1);
		if (r == 0) {
			walk(back);
			/* the lexicon owns the image now: give it a copy back */
			lex_free(back);
			p = copy8(&img);
			n2 = 1;
		}
		if (!n2) {
			q[at] ^= bit;
			lex_image_seal(p, img.len);
		}
	}
	free(p);
	find(lx, "");
	lex_free(lx);
	buf_free(&img);
	buf_free(&img2);
	buf_free(&why);
	buf_free(&err);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_add_and_find),
		cmocka_unit_test(test_load_dir),
		cmocka_unit_test(test_occupation_and_business),
		cmocka_unit_test(test_place_where),
		cmocka_unit_test(test_image),
	};
	return cmocka_run_group_tests_name("lexicon", tests, NULL, NULL);
}

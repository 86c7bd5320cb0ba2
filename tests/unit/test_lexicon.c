/* Unit tests for lexicon loading and lookup (src/lexicon.c). */
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

#include "lexicon.h"
#include "token.h"

static const lex_entry *find(lexicon *lx, const char *text)
{
	static uni_ctx u;
	static tok_line tl;
	static tm_buf w;
	const char *f[12];
	uint32_t fl[12];
	uint64_t h = LEX_SEQ_SEED;
	size_t n = 0;

	buf_reset(&w);
	uni_prepare(&u, text, strlen(text), &w);
	tok_split(&tl, &u, w.data, w.len);
	for (size_t i = 0; i < tl.n; i++) {
		if (tl.t[i].kind == TK_PUNCT)
			continue;
		f[n] = tok_fold(&tl, &tl.t[i]);
		fl[n] = tl.t[i].flen;
		h = lex_seq_step(h, tl.t[i].hash);
		n++;
	}
	if (!text[0]) {
		uni_ctx_free(&u);
		tok_line_free(&tl);
		buf_free(&w);
		return NULL;
	}
	return lex_find(lx, lex_seq_final(h, n), n, f, fl);
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
	/* the prefix filter knows "full" starts a phrase; "fuller" none */
	assert_true(lex_maybe_prefix(lx, lex_seq_final(lex_seq_step(LEX_SEQ_SEED, tok_hash("full", 4)), 1)));
	assert_false(lex_maybe_phrase(lx, lex_seq_final(lex_seq_step(LEX_SEQ_SEED, tok_hash("full", 4)), 1)));
	/* bad values are refused with a message */
	assert_int_equal(lex_add(lx, LC_SENIORITY, "de", "x", 1, "boss", LW_ANY, &err), -1);
	assert_non_null(strstr(err.data, "unknown value 'boss'"));
	assert_int_equal(lex_add(lx, LC_SENIORITY, "DEU", "x", 1, "senior", LW_ANY, &err), -1);
	/* a phrase of punctuation only adds nothing */
	assert_int_equal(lex_add(lx, LC_MARKETING, "*", "!!!", 3, "-", LW_ANY, &err), 1);
	/* off switches an entry off */
	assert_int_equal(lex_add(lx, LC_SCHEDULE, "en", "full time", 9, "full_time", LW_OFF, &err), 0);
	assert_true(find(lx, "full time")->off);
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

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_add_and_find),
		cmocka_unit_test(test_load_dir),
	};
	return cmocka_run_group_tests_name("lexicon", tests, NULL, NULL);
}

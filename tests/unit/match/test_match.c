/* Unit tests for the match index (src/match/match.c): each way a
 * candidate is found and its score as match.h states it, the order of
 * candidates, language hints, and answers that do not depend on the order
 * the counts were read in.  The Wilson bounds come from rank/stats.c,
 * checked against scipy in tests/unit/rank/test_stats.c. */
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "core/err.h"
#include "count/tally.h"
#include "match/match.h"
#include "norm/lexicon.h"
#include "norm/norm.h"
#include "rank/labels.h"
#include "rank/stats.h"

static lexicon *LX;
static normaliser *NM;

static void read_labels(labelset *ls, const char *text)
{
	char path[] = "/tmp/tm-match-XXXXXX";
	int fd = mkstemp(path);
	tm_buf err = {0};
	assert_true(fd >= 0);
	assert_int_equal(write(fd, text, strlen(text)), (ssize_t)strlen(text));
	close(fd);
	FILE *devnull = fopen("/dev/null", "w");
	assert_int_equal(labels_read(ls, path, NM, devnull, &err), 0);
	fclose(devnull);
	remove(path);
	buf_free(&err);
}

static void form(tally_mem *m, const char *occ, const char *lang, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_form(m, occ, strlen(occ), lang, key, strlen(key), key, strlen(key), n), 0);
}

static void keyn(tally_mem *m, const char *lang, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_key(m, lang, key, strlen(key), n), 0);
}

static const char LABELS[] =
	"occupation\tkind\tlang\tlabel\n"
	"occ:1\tpref\tde\tLagerist\n"
	"occ:1\tpref\ten\tStock Controller\n"
	"occ:2\tpref\ten\tWarehouse Operative\n"
	"occ:2\talt\ten\tStock Controller\n"
	"occ:3\tpref\tde\tGabelstaplerfahrer\n"
	"occ:4\tpref\tde\tChef\n"
	"occ:5\tpref\ten\tChef\n";

/* The counts: "stock controller" 10 postings, 7 of occ:2 and 3 of occ:1;
 * "lagermitarbeiter" 8 in de, all occ:2, and 2 in en, occ:1. */
static void counts(tally_mem *m, int reverse)
{
	if (!reverse) {
		form(m, "occ:2", "en", "stock controller", 7);
		form(m, "occ:1", "en", "stock controller", 3);
		keyn(m, "en", "stock controller", 10);
		form(m, "occ:2", "de", "lagermitarbeiter", 8);
		keyn(m, "de", "lagermitarbeiter", 8);
		form(m, "occ:1", "en", "lagermitarbeiter", 2);
		keyn(m, "en", "lagermitarbeiter", 2);
	} else {
		keyn(m, "en", "lagermitarbeiter", 2);
		form(m, "occ:1", "en", "lagermitarbeiter", 2);
		keyn(m, "de", "lagermitarbeiter", 8);
		form(m, "occ:2", "de", "lagermitarbeiter", 8);
		keyn(m, "en", "stock controller", 10);
		form(m, "occ:1", "en", "stock controller", 3);
		form(m, "occ:2", "en", "stock controller", 7);
	}
}

typedef struct fixture {
	labelset ls;
	tally_mem m;
	match_index *ix;
	match_work *w;
} fixture;

static void open_fixture(fixture *f, const char *labels, int reverse, int with_counts)
{
	match_conf conf = {1};
	tm_buf err = {0};
	memset(f, 0, sizeof *f);
	read_labels(&f->ls, labels);
	tm_init(&f->m);
	if (with_counts)
		counts(&f->m, reverse);
	assert_int_equal(match_build(&f->ix, &f->ls, with_counts ? &f->m : NULL, &conf, &err), TM_OK);
	f->w = match_work_new(f->ix);
	assert_non_null(f->w);
	buf_free(&err);
}

static void close_fixture(fixture *f)
{
	match_work_free(f->w);
	match_free(f->ix);
	tm_free(&f->m);
	labels_free(&f->ls);
}

static size_t find(fixture *f, const char *key, const char *lang, size_t top, double min,
		   const match_cand **c)
{
	size_t n;
	assert_int_equal(match_find(f->ix, f->w, key, strlen(key), lang, top, min, c, &n), TM_OK);
	return n;
}

static int is(const match_cand *c, const char *occ)
{
	return c->ol == strlen(occ) && !memcmp(c->occ, occ, c->ol);
}

static int setup(void **state)
{
	(void)state;
	LX = lex_new();
	NM = LX ? norm_new(LX) : NULL;
	return NM ? 0 : -1;
}

static int teardown(void **state)
{
	(void)state;
	norm_free(NM);
	lex_free(LX);
	return 0;
}

/* A label shared by two occupations: both via label, ordered by the
 * market's share, score = 0.9 + 0.1 p. */
static void test_label(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	open_fixture(&f, LABELS, 0, 1);
	size_t n = find(&f, "stock controller", NULL, 5, 0.5, &c);
	assert_int_equal(n, 2);
	assert_true(is(&c[0], "occ:2") && is(&c[1], "occ:1"));
	assert_int_equal(c[0].via, VIA_LABEL);
	assert_int_equal(c[1].via, VIA_LABEL);
	assert_true(fabs(c[0].score - (MATCH_LABEL_BASE + MATCH_LABEL_MARKET * 0.7)) < 1e-12);
	assert_true(fabs(c[1].score - (MATCH_LABEL_BASE + MATCH_LABEL_MARKET * 0.3)) < 1e-12);
	assert_int_equal(c[0].postings, 10);
	assert_int_equal(c[0].occ_postings, 7);
	assert_int_equal(c[0].ml, strlen("Stock Controller"));
	assert_memory_equal(c[0].matched, "Stock Controller", c[0].ml);
	/* top and min_score */
	assert_int_equal(find(&f, "stock controller", NULL, 1, 0, &c), 1);
	assert_true(is(&c[0], "occ:2"));
	assert_int_equal(find(&f, "stock controller", NULL, 5, 0.95, &c), 1);
	assert_int_equal(find(&f, "stock controller", NULL, 5, 0.99, &c), 0);
	close_fixture(&f);
}

/* A counted title that is no label: its share with the Wilson lower
 * bound; with a language hint, that language's counts alone. */
static void test_title(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	double lo, hi;
	open_fixture(&f, LABELS, 0, 1);
	size_t n = find(&f, "lagermitarbeiter", NULL, 5, 0, &c);
	assert_true(n >= 2);
	assert_true(is(&c[0], "occ:2"));
	assert_int_equal(c[0].via, VIA_TITLE);
	wilson(8, 10, STATS_Z95, &lo, &hi);
	assert_true(fabs(c[0].score - (MATCH_TITLE_BASE + MATCH_TITLE_SPAN * lo)) < 1e-12);
	assert_true(fabs(c[0].low - lo) < 1e-12 && fabs(c[0].high - hi) < 1e-12);
	assert_int_equal(c[0].postings, 10);
	/* in English, the two English postings only: occ:1 */
	n = find(&f, "lagermitarbeiter", "en", 5, 0, &c);
	assert_true(is(&c[0], "occ:1"));
	assert_int_equal(c[0].via, VIA_TITLE);
	assert_int_equal(c[0].postings, 2);
	wilson(2, 2, STATS_Z95, &lo, &hi);
	assert_true(fabs(c[0].score - (MATCH_TITLE_BASE + MATCH_TITLE_SPAN * lo)) < 1e-12);
	/* a language never counted: all languages */
	n = find(&f, "lagermitarbeiter", "fr", 5, 0, &c);
	assert_true(is(&c[0], "occ:2"));
	assert_int_equal(c[0].postings, 10);
	close_fixture(&f);
}

/* Separators and compounding: equal compact keys, via variant. */
static void test_variant(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	open_fixture(&f, LABELS, 0, 1);
	assert_true(find(&f, "gabelstapler fahrer", NULL, 5, 0, &c) >= 1);
	assert_true(is(&c[0], "occ:3"));
	assert_int_equal(c[0].via, VIA_VARIANT);
	assert_true(fabs(c[0].score - MATCH_VARIANT * MATCH_LABEL_BASE) < 1e-12);
	assert_true(find(&f, "stock-controller", NULL, 5, 0, &c) >= 1);
	assert_int_equal(c[0].via, VIA_VARIANT);
	assert_true(is(&c[0], "occ:2"));
	close_fixture(&f);
}

/* A typo: via similar, with its nearest neighbours as evidence; the
 * score is MATCH_SIM_SPAN s for a label neighbour. */
static void test_similar(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	open_fixture(&f, LABELS, 0, 1);
	assert_true(find(&f, "lagerisst", NULL, 5, 0, &c) >= 1);
	assert_true(is(&c[0], "occ:1"));
	assert_int_equal(c[0].via, VIA_SIMILAR);
	assert_true(c[0].nnear >= 1 && c[0].near[0].label);
	assert_true(fabs(c[0].score - MATCH_SIM_SPAN * c[0].near[0].sim) < 1e-12);
	assert_true(c[0].score > 0.3 && c[0].score < MATCH_SIM_SPAN);
	/* nothing alike: no candidate; an empty key: none */
	assert_int_equal(find(&f, "qqqq", NULL, 5, 0, &c), 0);
	assert_int_equal(find(&f, "", NULL, 5, 0, &c), 0);
	close_fixture(&f);
}

/* With a hint, a label in its language comes first; without one, ties
 * are broken by occupation id. */
static void test_lang(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	open_fixture(&f, LABELS, 0, 0);
	assert_int_equal(find(&f, "chef", NULL, 5, 0, &c), 2);
	assert_true(is(&c[0], "occ:4") && c[0].score == c[1].score);
	assert_int_equal(find(&f, "chef", "en", 5, 0, &c), 2);
	assert_true(is(&c[0], "occ:5"));
	assert_true(fabs(c[1].score - MATCH_OTHER_LANG * MATCH_LABEL_BASE) < 1e-12);
	assert_int_equal(find(&f, "chef", "de", 5, 0, &c), 2);
	assert_true(is(&c[0], "occ:4"));
	close_fixture(&f);
}

/* The same answers whatever order the counts came in. */
static void test_order(void **state)
{
	(void)state;
	fixture a, b;
	const char *keys[] = {"stock controller", "lagermitarbeiter", "lagerisst", "stock contrller",
			      "gabelstapler fahrer", "warehouse"};
	open_fixture(&a, LABELS, 0, 1);
	open_fixture(&b, LABELS, 1, 1);
	for (size_t k = 0; k < sizeof keys / sizeof *keys; k++) {
		const match_cand *ca, *cb;
		size_t na = find(&a, keys[k], NULL, 10, 0, &ca);
		size_t nb = find(&b, keys[k], NULL, 10, 0, &cb);
		assert_int_equal(na, nb);
		for (size_t i = 0; i < na; i++) {
			assert_int_equal(ca[i].ol, cb[i].ol);
			assert_memory_equal(ca[i].occ, cb[i].occ, ca[i].ol);
			assert_true(ca[i].score == cb[i].score);
			assert_int_equal(ca[i].via, cb[i].via);
		}
	}
	close_fixture(&a);
	close_fixture(&b);
}

/* No labels and no counts: an index that answers nothing. */
static void test_empty(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	open_fixture(&f, "occupation\tkind\tlang\tlabel\n", 0, 0);
	assert_int_equal(find(&f, "lagerist", NULL, 5, 0, &c), 0);
	size_t docs, sim, bytes;
	match_stats(f.ix, &docs, &sim, &bytes);
	assert_int_equal(docs, 0);
	close_fixture(&f);
}

/* The acronym path: a word shaped like an acronym that no document holds,
 * read as the initials of a run of words; the occupations sharing it
 * share the mass; a word of a label ("it") is never an acronym. */
static const char ACRO_LABELS[] =
	"occupation\tkind\tlang\tlabel\n"
	"occ:1\tpref\ten\tRegistered Nurse\n"
	"occ:2\tpref\ten\tCustomer Service Representative\n"
	"occ:3\tpref\ten\tCustomer Support Representative\n"
	"occ:4\tpref\ten\tIT Administrator\n";

static void test_acronym(void **state)
{
	(void)state;
	fixture f;
	const match_cand *c;
	/* the two-letter acronyms: rn, cs, sr, ia; the three-letter: csr */
	double c2 = 4.0 / (26 * 26), c3 = 1.0 / (26 * 26 * 26);
	open_fixture(&f, ACRO_LABELS, 0, 0);
	size_t n = find(&f, "rn", NULL, 5, 0.01, &c);
	assert_int_equal(n, 1);
	assert_true(is(&c[0], "occ:1"));
	assert_int_equal(c[0].via, VIA_ACRONYM);
	assert_string_equal(match_via_name(c[0].via), "acronym");
	assert_true(c[0].ml == 16 && !memcmp(c[0].matched, "Registered Nurse", 16));
	assert_true(fabs(c[0].score - MATCH_ACRO_SPAN * (1 - c2) * MATCH_LABEL_BASE) < 1e-12);
	/* two occupations share csr: half each, ordered by id */
	n = find(&f, "csr", NULL, 5, 0.01, &c);
	assert_int_equal(n, 2);
	assert_true(is(&c[0], "occ:2") && is(&c[1], "occ:3"));
	for (int i = 0; i < 2; i++) {
		assert_int_equal(c[i].via, VIA_ACRONYM);
		assert_true(fabs(c[i].score - MATCH_ACRO_SPAN * (1 - c3) * MATCH_LABEL_BASE * 0.5) < 1e-12);
		assert_true(fabs(c[i].ashare - 0.5) < 1e-12);
	}
	/* one word of two explained: fit 1/2 */
	n = find(&f, "rn icu", NULL, 5, 0.01, &c);
	assert_true(n >= 1 && is(&c[0], "occ:1") && c[0].via == VIA_ACRONYM);
	assert_true(fabs(c[0].score - MATCH_ACRO_SPAN * (1 - c2) * MATCH_LABEL_BASE * 0.5) < 1e-12);
	/* a head word outside the run counts on both sides: cs abbreviates
	 * customer service (occ:2) and customer support (occ:3), and both
	 * hold representative: fit 1 each, half each */
	n = find(&f, "cs representative", NULL, 5, 0.01, &c);
	assert_true(n >= 2 && c[0].via == VIA_ACRONYM && c[1].via == VIA_ACRONYM);
	assert_true(fabs(c[0].score - MATCH_ACRO_SPAN * (1 - c2) * MATCH_LABEL_BASE * 0.5) < 1e-12);
	/* a word a label holds is no acronym */
	n = find(&f, "it", NULL, 5, 0, &c);
	for (size_t i = 0; i < n; i++)
		assert_int_not_equal(c[i].via, VIA_ACRONYM);
	/* an acronym of nothing */
	assert_int_equal(find(&f, "zq", NULL, 5, 0, &c), 0);
	close_fixture(&f);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_label),
		cmocka_unit_test(test_title),
		cmocka_unit_test(test_variant),
		cmocka_unit_test(test_similar),
		cmocka_unit_test(test_lang),
		cmocka_unit_test(test_order),
		cmocka_unit_test(test_empty),
		cmocka_unit_test(test_acronym),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}

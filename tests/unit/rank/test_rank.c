/* Unit tests for the ranking engines: the coverage figures
 * (src/rank/coverage.c), the ranker (src/rank/propose.c) and the record writer
 * they print through (src/io/record.c), on small hand-built counts and
 * labels.
 *
 * Outside values: Wilson 95 % intervals from scipy 1.10 (Debian's
 * python3-scipy) binomtest(k, n).proportion_ci(method="wilson"); G^2
 * from scipy chi2_contingency(t, correction=False,
 * lambda_="log-likelihood"); each named beside its check. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "rank/coverage.h"
#include "rank/labels.h"
#include "norm/lexicon.h"
#include "norm/norm.h"
#include "rank/propose.h"
#include "io/record.h"
#include "count/tally.h"

static lexicon *LX;
static normaliser *NM;
static labelset LS;
static tally_mem M;

static void form(const char *occ, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_form(&M, occ, strlen(occ), "de", key, strlen(key), key,
				     strlen(key), n), 0);
	assert_int_equal(tm_add_key(&M, "de", key, strlen(key), n), 0);
}

/* Two occupations in German.  occ:1 (75 postings): lagerist 40 (its
 * preferred label), kommissionierer 30 (no label), lagerrist 4 (one
 * letter off its label), staplerfahrer 1 (its alternative label, whose
 * postings mostly carry occ:2).  occ:2 (59): koch 50 (its label),
 * staplerfahrer 9; its label kuechenhilfe is never seen. */
static int setup(void **state)
{
	(void)state;
	char path[] = "/tmp/tm-rank-XXXXXX";
	int fd = mkstemp(path);
	const char *labels = "occupation\tkind\tlang\tlabel\n"
			     "occ:1\tpref\tde\tLagerist\n"
			     "occ:1\talt\tde\tStaplerfahrer\n"
			     "occ:2\tpref\tde\tKoch\n"
			     "occ:2\talt\tde\tKuechenhilfe\n";
	tm_buf err = {0};
	if (fd < 0 || write(fd, labels, strlen(labels)) != (ssize_t)strlen(labels))
		return -1;
	close(fd);
	LX = lex_new();
	NM = norm_new(LX);
	if (!NM || labels_read(&LS, path, NM, stderr, &err) != 0)
		return -1;
	remove(path);
	buf_free(&err);
	tm_init(&M);
	form("occ:1", "lagerist", 40);
	form("occ:1", "kommissionierer", 30);
	form("occ:1", "lagerrist", 4);
	form("occ:1", "staplerfahrer", 1);
	form("occ:2", "koch", 50);
	form("occ:2", "staplerfahrer", 9);
	assert_int_equal(tm_add_occ(&M, "occ:1", 5, "de", 75), 0);
	assert_int_equal(tm_add_occ(&M, "occ:2", 5, "de", 59), 0);
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	tm_free(&M);
	labels_free(&LS);
	norm_free(NM);
	lex_free(LX);
	return 0;
}

typedef struct rows {
	coverage_row r[4];
	char top[4][COVERAGE_TOP][32];
	char occ[4][16], lang[4][4];
	int n;
} rows;

static int keep(void *ctx, const coverage_row *row)
{
	rows *c = ctx;
	assert_true(c->n < 4);
	c->r[c->n] = *row;
	for (int i = 0; i < row->ntop; i++)
		snprintf(c->top[c->n][i], 32, "%.*s %llu", (int)row->top[i].kl, row->top[i].key,
			 (unsigned long long)row->top[i].postings);
	snprintf(c->occ[c->n], 16, "%.*s", (int)row->ol, row->occ);
	snprintf(c->lang[c->n], 4, "%s", row->lang);
	c->r[c->n].occ = c->occ[c->n]; /* the row's strings live in the call only */
	c->r[c->n].lang = c->lang[c->n];
	c->r[c->n].top = NULL;
	c->n++;
	return 0;
}

static void test_coverage(void **state)
{
	(void)state;
	rows c = {0};
	assert_int_equal(coverage_run(&M, &LS, NULL, keep, &c), 0);
	assert_int_equal(c.n, 3);
	/* occ:1: 41 of 75 matched (lagerist 40, staplerfahrer 1) */
	assert_int_equal(c.r[0].ol, 5);
	assert_memory_equal(c.r[0].occ, "occ:1", 5);
	assert_string_equal(c.r[0].lang, "de");
	assert_int_equal(c.r[0].postings, 75);
	assert_int_equal(c.r[0].matched, 41);
	assert_int_equal(c.r[0].pref_matched, 40);
	assert_float_equal(c.r[0].share, 41.0 / 75, 1e-12);
	assert_float_equal(c.r[0].pref_share, 40.0 / 75, 1e-12);
	/* scipy binomtest(41, 75).proportion_ci("wilson") */
	assert_float_equal(c.r[0].low, 0.434484, 0.000001);
	assert_float_equal(c.r[0].high, 0.654302, 0.000001);
	assert_int_equal(c.r[0].labels, 2);
	assert_int_equal(c.r[0].unseen, 0);
	assert_int_equal(c.r[0].ntop, 2);
	assert_string_equal(c.top[0][0], "kommissionierer 30");
	assert_string_equal(c.top[0][1], "lagerrist 4");
	/* occ:2: 50 of 59; kuechenhilfe unseen */
	assert_int_equal(c.r[1].postings, 59);
	assert_int_equal(c.r[1].matched, 50);
	assert_int_equal(c.r[1].labels, 2);
	assert_int_equal(c.r[1].unseen, 1);
	assert_string_equal(c.top[1][0], "staplerfahrer 9");
	/* the total */
	assert_memory_equal(c.r[2].occ, "*", 1);
	assert_string_equal(c.r[2].lang, "*");
	assert_int_equal(c.r[2].postings, 134);
	assert_int_equal(c.r[2].matched, 91);
	assert_int_equal(c.r[2].pref_matched, 90);
	assert_int_equal(c.r[2].labels, 4);
	assert_int_equal(c.r[2].unseen, 1);
	assert_int_equal(c.r[2].ntop, 0);

	/* a filter keeps one occupation and the total of what it kept */
	coverage_filter f = {"occ:2", NULL};
	memset(&c, 0, sizeof c);
	assert_int_equal(coverage_run(&M, &LS, &f, keep, &c), 0);
	assert_int_equal(c.n, 2);
	assert_int_equal(c.r[1].postings, 59);
	/* scipy binomtest(50, 59).proportion_ci("wilson") */
	assert_float_equal(c.r[0].low, 0.734820, 0.000001);
	assert_float_equal(c.r[0].high, 0.917615, 0.000001);
}

static int stop(void *ctx, const coverage_row *row)
{
	(void)ctx;
	(void)row;
	return 7;
}

static void test_coverage_stops(void **state)
{
	(void)state;
	assert_int_equal(coverage_run(&M, &LS, NULL, stop, NULL), 7);
}

static const propose_sugg *find(const propose_list *l, int kind, const char *occ,
				const char *key)
{
	for (size_t i = 0; i < l->n; i++)
		if (l->v[i].kind == kind && l->v[i].ol == strlen(occ) &&
		    !memcmp(l->v[i].occ, occ, l->v[i].ol) && l->v[i].kl == strlen(key) &&
		    !memcmp(l->v[i].key, key, l->v[i].kl))
			return &l->v[i];
	return NULL;
}

static void test_propose(void **state)
{
	(void)state;
	propose_bars b;
	propose_list l;
	const propose_sugg *s;

	propose_bars_default(&b);
	assert_int_equal(b.min_postings, 5);
	assert_float_equal(b.min_g2, STATS_CHI2_1DF_P001, 0);
	b.rare_min = 50;
	b.rare_share = 0.065;
	assert_int_equal(propose_run(&M, &LS, &b, NULL, &l), 0);
	assert_int_equal(l.n, 4);

	/* new_alt_label: kommissionierer, 30 of occ:1's 75 postings, all its
	 * key's; G2 of [[30, 0], [45, 59]] by scipy chi2_contingency
	 * (log-likelihood): 41.564166 */
	s = &l.v[0];
	assert_int_equal(s->kind, PROPOSE_ALT);
	assert_memory_equal(s->key, "kommissionierer", s->kl);
	assert_int_equal(s->postings, 30);
	assert_int_equal(s->occ_postings, 75);
	assert_int_equal(s->key_postings, 30);
	assert_int_equal(s->lang_postings, 134);
	assert_float_equal(s->precision, 1.0, 0);
	assert_float_equal(s->g2, 41.564166, 0.000001);
	assert_float_equal(s->score, s->g2, 0);
	assert_null(s->rival);
	assert_int_equal(strlen(s->id), 16);

	/* new_hidden_label: lagerrist, one edit from lagerist */
	s = &l.v[1];
	assert_int_equal(s->kind, PROPOSE_HIDDEN);
	assert_memory_equal(s->key, "lagerrist", s->kl);
	assert_string_equal(s->variant, "typo");
	assert_non_null(s->lb);
	assert_memory_equal(lab_str(&LS, s->lb->text), "Lagerist", 8);
	assert_float_equal(s->score, 4.0, 0);

	/* rare_label: kuechenhilfe, no posting of occ:2's 59; Wilson upper
	 * bound of 0 in 59 by scipy: 0.061129 < 0.065; score 59 * (0.065 -
	 * 0.061129) */
	s = &l.v[2];
	assert_int_equal(s->kind, PROPOSE_RARE);
	assert_memory_equal(s->key, "kuechenhilfe", s->kl);
	assert_int_equal(s->postings, 0);
	assert_float_equal(s->score, 59 * (0.065 - 0.061129), 0.0001);

	/* used_elsewhere: staplerfahrer, a label of occ:1 whose postings are
	 * 9 in 10 occ:2's (its Wilson upper bound, 1 in 75: 0.071734 by scipy,
	 * is above the rare bar) */
	s = &l.v[3];
	assert_int_equal(s->kind, PROPOSE_ELSEWHERE);
	assert_memory_equal(s->occ, "occ:1", 5);
	assert_memory_equal(s->key, "staplerfahrer", s->kl);
	assert_int_equal(s->postings, 1);
	assert_int_equal(s->key_postings, 10);
	assert_memory_equal(s->rival, "occ:2", s->rl);
	assert_int_equal(s->rival_postings, 9);
	assert_float_equal(s->score, 0.9, 1e-12);
	propose_list_free(&l);

	/* staplerfahrer as a title of occ:2: G2 of [[9, 1], [50, 74]] is
	 * 10.120878 by scipy, under the default bar, over a bar of 10 */
	b.min_g2 = 10;
	assert_int_equal(propose_run(&M, &LS, &b, NULL, &l), 0);
	assert_int_equal(l.n, 5);
	s = find(&l, PROPOSE_ALT, "occ:2", "staplerfahrer");
	assert_non_null(s);
	assert_float_equal(s->g2, 10.120878, 0.000001);
	assert_ptr_equal(s, &l.v[1]); /* ranked under kommissionierer's 41.56 */
	assert_memory_equal(s->rival, "occ:1", s->rl);
	propose_list_free(&l);

	/* filters */
	propose_filter f = {"occ:2", NULL};
	assert_int_equal(propose_run(&M, &LS, &b, &f, &l), 0);
	assert_int_equal(l.n, 2);
	assert_non_null(find(&l, PROPOSE_RARE, "occ:2", "kuechenhilfe"));
	propose_list_free(&l);
	f = (propose_filter){NULL, "fr"};
	assert_int_equal(propose_run(&M, &LS, &b, &f, &l), 0);
	assert_int_equal(l.n, 0);
	propose_list_free(&l);
}

/* A labelset from the text of a labels TSV. */
static void read_labels(labelset *ls, const char *text)
{
	char path[] = "/tmp/tm-labels-XXXXXX";
	int fd = mkstemp(path);
	tm_buf err = {0};
	assert_true(fd >= 0);
	assert_int_equal(write(fd, text, strlen(text)), (ssize_t)strlen(text));
	close(fd);
	assert_int_equal(labels_read(ls, path, NM, stderr, &err), 0);
	remove(path);
	buf_free(&err);
}

static void form_in(tally_mem *m, const char *occ, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_form(m, occ, strlen(occ), "de", key, strlen(key), key,
				     strlen(key), n), 0);
	assert_int_equal(tm_add_key(m, "de", key, strlen(key), n), 0);
	assert_int_equal(tm_add_occ(m, occ, strlen(occ), "de", n), 0);
}

/* new_hidden_label needs a recurrent variant: the Wilson lower bound of
 * its share of its and the label's postings above hidden_share; a
 * variant may be two edits apart in a word of seven letters or more;
 * rare_label never names a hidden label.  occ:9 (415 postings):
 * schweisser 200 (its label), schweiser 3 (a slip), dialogue editor 200
 * (its label), dialog editor 12; its alternative label lagerhelfer and
 * its hidden label schwiesser are never seen. */
static void test_hidden(void **state)
{
	(void)state;
	labelset ls;
	tally_mem m;
	propose_bars b;
	propose_list l;
	const propose_sugg *s;

	read_labels(&ls, "occupation\tkind\tlang\tlabel\n"
			 "occ:9\tpref\tde\tSchweisser\n"
			 "occ:9\talt\tde\tDialogue Editor\n"
			 "occ:9\talt\tde\tLagerhelfer\n"
			 "occ:9\thidden\tde\tSchwiesser\n");
	tm_init(&m);
	form_in(&m, "occ:9", "schweisser", 200);
	form_in(&m, "occ:9", "schweiser", 3);
	form_in(&m, "occ:9", "dialogue editor", 200);
	form_in(&m, "occ:9", "dialog editor", 12);
	propose_bars_default(&b);
	assert_float_equal(b.hidden_share, 0.01, 0);
	b.rare_min = 100;
	b.rare_share = 0.02;
	assert_int_equal(propose_run(&m, &ls, &b, NULL, &l), 0);
	/* dialog editor: two edits in a word of eight letters; 12 in 212,
	 * Wilson lower bound 0.032673 by scipy */
	s = find(&l, PROPOSE_HIDDEN, "occ:9", "dialog editor");
	assert_non_null(s);
	assert_string_equal(s->variant, "spelling");
	assert_memory_equal(lab_str(&ls, s->lb->text), "Dialogue Editor", 15);
	assert_int_equal(s->label_postings, 200);
	/* schweiser: 3 in 203, Wilson lower bound 0.005038 by scipy: a slip */
	assert_null(find(&l, PROPOSE_HIDDEN, "occ:9", "schweiser"));
	/* the unseen alternative label is rare, the unseen hidden one not */
	assert_non_null(find(&l, PROPOSE_RARE, "occ:9", "lagerhelfer"));
	assert_null(find(&l, PROPOSE_RARE, "occ:9", "schwiesser"));
	assert_int_equal(l.n, 2);
	/* strength: alone in its kind, the middle */
	for (size_t i = 0; i < l.n; i++)
		assert_float_equal(l.v[i].strength, 0.5, 0);
	propose_list_free(&l);

	/* a bar under the slip's bound lets it through */
	b.hidden_share = 0.005;
	assert_int_equal(propose_run(&m, &ls, &b, NULL, &l), 0);
	s = find(&l, PROPOSE_HIDDEN, "occ:9", "schweiser");
	assert_non_null(s);
	assert_string_equal(s->variant, "typo");
	assert_int_equal(s->label_postings, 200);
	/* two of a kind: dialog editor (12) above schweiser (3) */
	assert_float_equal(find(&l, PROPOSE_HIDDEN, "occ:9", "dialog editor")->strength, 0.75, 0);
	assert_float_equal(s->strength, 0.25, 0);
	propose_list_free(&l);
	tm_free(&m);
	labels_free(&ls);
}

/* A title that only joins labels of its occupation, one of them of
 * another language only, is its names in two languages, not a new label
 * (PROPOSE_JOIN_WORDS).  German postings of occ:7, labels Maurer (de),
 * Bricklayer (en), Polier and Vorarbeiter (de); occ:8 has the German
 * label Fliesenleger.  Proposed: maurer polier (two German names: a title
 * of its own), bricklayer alone (one label of another language: evidence
 * of its own), maurer fliesenleger (a label of another occupation), maurer
 * bricklayer helfer (a word no label has).  Not proposed: maurer
 * bricklayer, bricklayer maurer, polier vorarbeiter bricklayer. */
static void test_joined(void **state)
{
	(void)state;
	labelset ls;
	tally_mem m;
	propose_bars b;
	propose_list l;

	read_labels(&ls, "occupation\tkind\tlang\tlabel\n"
			 "occ:7\tpref\tde\tMaurer\n"
			 "occ:7\tpref\ten\tBricklayer\n"
			 "occ:7\talt\tde\tPolier\n"
			 "occ:7\talt\tde\tVorarbeiter\n"
			 "occ:8\tpref\tde\tFliesenleger\n");
	tm_init(&m);
	form_in(&m, "occ:7", "maurer", 400);
	form_in(&m, "occ:7", "maurer bricklayer", 60);
	form_in(&m, "occ:7", "bricklayer maurer", 40);
	form_in(&m, "occ:7", "polier vorarbeiter bricklayer", 30);
	form_in(&m, "occ:7", "maurer polier", 50);
	form_in(&m, "occ:7", "bricklayer", 45);
	form_in(&m, "occ:7", "maurer fliesenleger", 35);
	form_in(&m, "occ:7", "maurer bricklayer helfer", 25);
	form_in(&m, "occ:8", "fliesenleger", 300);
	propose_bars_default(&b);
	assert_int_equal(propose_run(&m, &ls, &b, NULL, &l), 0);
	assert_null(find(&l, PROPOSE_ALT, "occ:7", "maurer bricklayer"));
	assert_null(find(&l, PROPOSE_ALT, "occ:7", "bricklayer maurer"));
	assert_null(find(&l, PROPOSE_ALT, "occ:7", "polier vorarbeiter bricklayer"));
	assert_int_equal(l.joined, 3);
	assert_non_null(find(&l, PROPOSE_ALT, "occ:7", "maurer polier"));
	assert_non_null(find(&l, PROPOSE_ALT, "occ:7", "bricklayer"));
	assert_non_null(find(&l, PROPOSE_ALT, "occ:7", "maurer fliesenleger"));
	assert_non_null(find(&l, PROPOSE_ALT, "occ:7", "maurer bricklayer helfer"));
	propose_list_free(&l);
	tm_free(&m);
	labels_free(&ls);
}

/* Variants of labels whose words are all under PROPOSE_TYPO_MIN code
 * points (the ranker tries those for spacing alone): occ:5's label koch
 * hilfe is written kochhilfe and koch-hilfe (spacing variants), koch
 * hilfen (a word under six letters: no variant); its label bote is
 * written boote (no variant).  A typo of a wide word beside it still
 * counts: fahrzeugpfleger / fahrzeugpfeger.  occ:6 holds the language's
 * other postings. */
static void test_hidden_narrow(void **state)
{
	(void)state;
	labelset ls;
	tally_mem m;
	propose_bars b;
	propose_list l;
	const propose_sugg *s;

	read_labels(&ls, "occupation\tkind\tlang\tlabel\n"
			 "occ:5\tpref\tde\tKoch Hilfe\n"
			 "occ:5\talt\tde\tBote\n"
			 "occ:5\talt\tde\tFahrzeugpfleger\n");
	tm_init(&m);
	form_in(&m, "occ:5", "koch hilfe", 100);
	form_in(&m, "occ:5", "kochhilfe", 30);
	form_in(&m, "occ:5", "koch-hilfe", 20);
	form_in(&m, "occ:5", "koch hilfen", 30);
	form_in(&m, "occ:5", "bote", 100);
	form_in(&m, "occ:5", "boote", 30);
	form_in(&m, "occ:5", "fahrzeugpfleger", 100);
	form_in(&m, "occ:5", "fahrzeugpfeger", 30);
	form_in(&m, "occ:6", "maurer", 5000); /* the language's other postings */
	propose_bars_default(&b);
	assert_int_equal(propose_run(&m, &ls, &b, NULL, &l), 0);
	s = find(&l, PROPOSE_HIDDEN, "occ:5", "kochhilfe");
	assert_non_null(s);
	assert_string_equal(s->variant, "spacing");
	assert_memory_equal(lab_str(&ls, s->lb->text), "Koch Hilfe", 10);
	s = find(&l, PROPOSE_HIDDEN, "occ:5", "koch-hilfe");
	assert_non_null(s);
	assert_string_equal(s->variant, "spacing");
	s = find(&l, PROPOSE_HIDDEN, "occ:5", "fahrzeugpfeger");
	assert_non_null(s);
	assert_string_equal(s->variant, "typo");
	assert_null(find(&l, PROPOSE_HIDDEN, "occ:5", "koch hilfen"));
	assert_null(find(&l, PROPOSE_HIDDEN, "occ:5", "boote"));
	/* not variants, so titles of their own */
	assert_non_null(find(&l, PROPOSE_ALT, "occ:5", "koch hilfen"));
	assert_non_null(find(&l, PROPOSE_ALT, "occ:5", "boote"));
	propose_list_free(&l);
	tm_free(&m);
	labels_free(&ls);
}

/* The name of an occupation for curators: its preferred label in the
 * language asked for, else its first preferred label in file order. */
static void test_pref(void **state)
{
	(void)state;
	labelset ls;
	read_labels(&ls, "occupation\tkind\tlang\tlabel\n"
			 "occ:7\talt\tde\tLagerhelfer\n"
			 "occ:7\tpref\tfr\tMagasinier\n"
			 "occ:7\tpref\tde\tLagerist\n"
			 "occ:8\talt\ten\tCook\n");
	const label *l = labels_pref(&ls, "occ:7", 5, "de");
	assert_non_null(l);
	assert_string_equal(lab_str(&ls, l->text), "Lagerist");
	l = labels_pref(&ls, "occ:7", 5, "DE");
	assert_string_equal(lab_str(&ls, l->text), "Lagerist");
	l = labels_pref(&ls, "occ:7", 5, "it"); /* none in Italian: the first */
	assert_string_equal(lab_str(&ls, l->text), "Magasinier");
	assert_null(labels_pref(&ls, "occ:8", 5, "en")); /* no preferred label */
	assert_null(labels_pref(&ls, "occ:9", 5, "de"));
	labels_free(&ls);
}

static void test_variant(void **state)
{
	(void)state;
	assert_string_equal(propose_variant("software entwickler", 19, "softwareentwickler", 18),
			    "spacing");
	assert_string_equal(propose_variant("schweiser", 9, "schweisser", 10), "typo");
	assert_null(propose_variant("tig", 3, "mig", 3));             /* words under six */
	assert_null(propose_variant("lagerist", 8, "lagerist", 8));   /* the same */
	assert_null(propose_variant("lagerrist helfer", 16, "lagerist hilfe", 14)); /* two words */
	/* hyphens count as spaces */
	assert_string_equal(propose_variant("gabelstapler-fahrer", 19, "gabelstapler fahrer", 19),
			    "spacing");
	assert_string_equal(propose_variant("gabelstapler-fahrer", 19, "gabelstaplerfahrer", 18),
			    "spacing");
	/* two edits: when the longer word has seven letters or more */
	assert_string_equal(propose_variant("theater technician", 18, "theatre technician", 18),
			    "spelling");
	assert_string_equal(propose_variant("catalog", 7, "catalogue", 9), "spelling");
	assert_string_equal(propose_variant("dialog editor", 13, "dialogue editor", 15), "spelling");
	assert_null(propose_variant("fahrer", 6, "f\xc3\xa4rber", 7));      /* six letters each */
	assert_null(propose_variant("maler", 5, "malerin", 7));            /* a word under six */
	assert_null(propose_variant("mechaniker", 10, "mechatroniker", 13)); /* three edits */
	/* two edits apart from each other: another word, not a spelling */
	assert_null(propose_variant("technicien automobile", 21, "mecanicien automobile", 21));
	assert_string_equal(propose_variant("programme", 9, "program", 7), "spelling");
	assert_string_equal(propose_variant("th\xc3\xa9\xc3\xa2tre", 9, "theatre", 7), "spelling");
}

static void test_as_written(void **state)
{
	(void)state;
	const char *ex[] = {"LAGERIST (M/W/D)", "Senior Lagerist in Bremen", "xlagerist"};
	size_t exl[] = {16, 25, 9};
	tm_buf out = {0};
	assert_int_equal(propose_as_written(ex, exl, 3, "lagerist", 8, &out), 0);
	assert_int_equal(out.len, 8);
	assert_memory_equal(out.data, "Lagerist", 8); /* not the capitals, not inside a word */
	buf_reset(&out);
	assert_int_equal(propose_as_written(ex, exl, 1, "lagerist", 8, &out), 0);
	assert_int_equal(out.len, 0);
	buf_free(&out);
}

static const rec_field demo_fields[] = {
	{"a", REC_BOTH}, {"b", REC_JSON}, {"c", REC_TSV}, {"d", REC_BOTH}, {"e", REC_BOTH},
	{NULL, 0},
};

static void fill_demo(rec *r)
{
	rec_begin(r);
	rec_str(r, "x\ty\"", 4);
	rec_u64(r, 18446744073709551615ull);
	rec_num(r, 0.12345);
	rec_null(r);
	rec_list_begin(r, "; ");
	rec_cstr(r, "p");
	if (rec_is_json(r)) {
		rec_obj_begin(r);
		rec_member_str(r, "k", "v", 1);
		rec_member_u64(r, "n", 2);
		rec_obj_end(r);
	} else {
		rec_cell_begin(r);
		rec_cell_str(r, "v (", 3);
		rec_cell_u64(r, 2);
		rec_cell_str(r, ")", 1);
		rec_cell_end(r);
	}
	rec_list_end(r);
}

static void test_record(void **state)
{
	(void)state;
	tm_buf b = {0};
	rec r;

	rec_init(&r, &b, REC_TSV, demo_fields);
	assert_int_equal(rec_header(&r), 0);
	fill_demo(&r);
	assert_int_equal(rec_end(&r), 0);
	assert_string_equal(b.data, "a\tc\td\te\nx y\"\t0.1235\t\tp; v (2)\n");

	buf_reset(&b);
	rec_init(&r, &b, REC_JSON, demo_fields);
	assert_int_equal(rec_header(&r), 0);
	fill_demo(&r);
	assert_int_equal(rec_end(&r), 0);
	assert_string_equal(b.data, "{\"a\":\"x\\ty\\\"\",\"b\":18446744073709551615,"
				    "\"d\":null,\"e\":[\"p\",{\"k\":\"v\",\"n\":2}]}\n");

	/* omitted fields: absent in JSON, empty in TSV */
	static const rec_field two[] = {{"a", REC_BOTH}, {"b", REC_BOTH}, {NULL, 0}};
	buf_reset(&b);
	rec_init(&r, &b, REC_JSON, two);
	rec_begin(&r);
	rec_omit(&r);
	rec_u64(&r, 1);
	assert_int_equal(rec_end(&r), 0);
	assert_string_equal(b.data, "{\"b\":1}\n");
	buf_reset(&b);
	rec_init(&r, &b, REC_TSV, two);
	rec_begin(&r);
	rec_omit(&r);
	rec_u64(&r, 1);
	assert_int_equal(rec_end(&r), 0);
	assert_string_equal(b.data, "\t1\n");

	/* a record that does not follow its field list fails, and stays failed */
	buf_reset(&b);
	rec_init(&r, &b, REC_TSV, two);
	rec_begin(&r);
	rec_u64(&r, 1);
	assert_int_equal(rec_end(&r), -1); /* one value short */
	rec_begin(&r);
	rec_u64(&r, 1);
	rec_u64(&r, 2);
	assert_int_equal(rec_end(&r), -1);
	rec_init(&r, &b, REC_TSV, two);
	rec_begin(&r);
	rec_u64(&r, 1);
	rec_u64(&r, 2);
	rec_u64(&r, 3); /* one too many */
	assert_int_equal(rec_end(&r), -1);
	rec_init(&r, &b, REC_JSON, two);
	rec_begin(&r);
	rec_cell_begin(&r); /* a TSV cell in JSON */
	assert_int_equal(r.failed, 1);
	buf_free(&b);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_coverage),
		cmocka_unit_test(test_coverage_stops),
		cmocka_unit_test(test_propose),
		cmocka_unit_test(test_hidden),
		cmocka_unit_test(test_hidden_narrow),
		cmocka_unit_test(test_joined),
		cmocka_unit_test(test_pref),
		cmocka_unit_test(test_variant),
		cmocka_unit_test(test_as_written),
		cmocka_unit_test(test_record),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}

/* Unit tests for the rows of titlemill trend in the review queue
 * (src/review/review_trend.c, the trend rules of review_change.c): which
 * rows become items and of what kind, their ids, postings and score, the
 * evidence of a later run, the reopening rules on the share of the window
 * "after" (Wilson intervals from rank/stats.h), rows refused, and rows of
 * trend --tsv read as the same items.  The rows are written here by hand. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "io/jsonr.h"
#include "review/review.h"
#include "review/review_change.h"
#include "review/review_trend.h"

#define NOW1 "2026-12-01T09:00:00Z"
#define NOW2 "2026-12-08T09:00:00Z"
#define NOW3 "2026-12-15T09:00:00Z"

/* A trend row: direction, key (the label is the key here), is_label
 * (label_kind alt when it is), the four counts, G2. */
static const char *row(char *b, const char *dir, const char *key, int is_label, unsigned pb,
		       unsigned pa, unsigned ob, unsigned oa, double g2)
{
	sprintf(b,
		"{\"direction\":\"%s\",\"occupation\":\"occ:0042\",\"occupation_label\":"
		"\"Kommissionierer\",\"lang\":\"de\",\"label\":\"%s\",\"key\":\"%s\",\"is_label\":%s%s,"
		"\"postings_before\":%u,\"postings_after\":%u,\"occupation_postings_before\":%u,"
		"\"occupation_postings_after\":%u,\"g2\":%.4f,\"first_seen\":\"2026-W09\","
		"\"examples\":[\"Scan-Picker (m/w/d) Valdoria Logistik GmbH\"]}",
		dir, key, key, is_label ? "true" : "false", is_label ? ",\"label_kind\":\"alt\"" : "",
		pb, pa, ob, oa, g2);
	return b;
}

/* base with its first from replaced by to, in line (cap bytes). */
static void splice(char *line, size_t cap, const char *base, const char *from, const char *to)
{
	const char *at = strstr(base, from);
	assert_non_null(at);
	snprintf(line, cap, "%.*s%s%s", (int)(at - base), base, to, at + strlen(from));
}

static int add(rq_queue *q, const char *line, const char *now, double factor, rq_addstat *st,
	       tm_buf *err)
{
	buf_reset(err);
	return rq_add(q, line, strlen(line), "t.jsonl:1", now, factor, st, err);
}

static void test_which_rows_are_items(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf err = {0};
	char b[1024], id[17];
	(void)state;

	assert_int_equal(add(&q, row(b, "rising", "scan-picker", 0, 0, 41, 900, 1000, 52.1), NOW1, 0,
			     &st, &err), TM_OK);
	assert_int_equal(add(&q, row(b, "rising", "picker", 1, 10, 80, 900, 1000, 60.2), NOW1, 0, &st,
			     &err), TM_OK);
	assert_int_equal(add(&q, row(b, "falling", "lagerist", 1, 40, 3, 1000, 900, 35.5), NOW1, 0,
			     &st, &err), TM_OK);
	assert_int_equal(add(&q, row(b, "falling", "lagerjunge", 0, 30, 0, 1000, 900, 40.5), NOW1, 0,
			     &st, &err), TM_OK);
	assert_int_equal(st.added, 2);
	assert_int_equal(st.rising_labels, 1);
	assert_int_equal(st.falling_titles, 1);
	assert_int_equal(q.n, 2);

	/* a rising title: the title proposed, the postings after, G2 the score */
	rq_item *r = &q.it[0];
	assert_int_equal(r->kind, RK_RISING);
	assert_string_equal(rq_kind_names[r->kind], "rising_title");
	assert_int_equal(rq_kind_delta[r->kind], 'a');
	assert_string_equal(r->label, "scan-picker");
	assert_string_equal(r->occ, "occ:0042");
	assert_int_equal(r->postings, 41);
	assert_true(r->score > 52.0999 && r->score < 52.1001);
	rq_trend_id(RK_RISING, "occ:0042", "de", "scan-picker", 11, id);
	assert_string_equal(r->id, id);
	assert_int_equal(strspn(id, "0123456789abcdef"), 16);
	/* its list figures: the window after, both shares */
	assert_int_equal(r->brief.occ_postings, 1000);
	assert_true(r->brief.share_before == 0);
	assert_true(r->brief.share_after > 0.0409 && r->brief.share_after < 0.0411);
	assert_true(r->brief.precision < 0);
	assert_non_null(strstr(r->evidence, "\"first_seen\":\"2026-W09\""));

	/* a fading label: a review row, the postings before */
	rq_item *f = &q.it[1];
	assert_int_equal(f->kind, RK_FADING);
	assert_string_equal(rq_kind_names[f->kind], "fading_label");
	assert_int_equal(rq_kind_delta[f->kind], 'r');
	assert_int_equal(f->postings, 40);
	assert_int_equal(f->brief.occ_postings, 1000);

	/* ids: the kind, occupation, language and key, nothing else */
	char other[17];
	rq_trend_id(RK_FADING, "occ:0042", "de", "scan-picker", 11, other);
	assert_string_not_equal(id, other);
	rq_trend_id(RK_RISING, "occ:0042", "fr", "scan-picker", 11, other);
	assert_string_not_equal(id, other);
	rq_trend_id(RK_RISING, "occ:0042", "de", "scan-picker", 11, other);
	assert_string_equal(id, other);
	buf_free(&err);
	rq_free(&q);
}

static void test_later_runs(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf err = {0}, m = {0};
	char b[1024];
	int outcome;
	(void)state;

	/* the same title in a later run: the same item, its new evidence */
	add(&q, row(b, "rising", "scan-picker", 0, 0, 41, 900, 1000, 52.1), NOW1, 3, &st, &err);
	assert_int_equal(add(&q, row(b, "rising", "scan-picker", 0, 2, 60, 1000, 1000, 66.0), NOW2, 3,
			     &st, &err), TM_OK);
	assert_int_equal(q.n, 1);
	assert_int_equal(st.refreshed, 1);
	assert_int_equal(q.it[0].postings, 60);
	assert_int_equal(q.it[0].ev[q.it[0].nev - 1].what, RE_REFRESHED);
	assert_non_null(strstr(q.it[0].evidence, "\"postings_after\":60"));

	/* rejected at 60 of 1000 after: the same share again stays closed, and
	 * a little more at about the same share */
	assert_int_equal(rq_decide(&q.it[0], 1, "bo", "a fad", NOW2, 0, &outcome, &m), TM_OK);
	memset(&st, 0, sizeof st);
	add(&q, row(b, "rising", "scan-picker", 0, 2, 60, 1000, 1000, 66.0), NOW3, 0, &st, &err);
	assert_int_equal(st.kept_closed, 1);
	add(&q, row(b, "rising", "scan-picker", 0, 2, 70, 1000, 1100, 70.0), NOW3, 0, &st, &err);
	assert_int_equal(st.kept_closed, 2);
	assert_int_equal(q.it[0].status, RQ_REJECTED);
	/* the share after grew beyond chance: open again, and why */
	add(&q, row(b, "rising", "scan-picker", 0, 2, 200, 1000, 1000, 240.0), NOW3, 0, &st, &err);
	assert_int_equal(st.reopened, 1);
	assert_int_equal(q.it[0].status, RQ_OPEN);
	assert_non_null(strstr(q.it[0].ev[q.it[0].nev - 1].reason, "the share grew"));

	/* a fading label kept (rejected) at 30 of 900 after */
	memset(&st, 0, sizeof st);
	add(&q, row(b, "falling", "lagerist", 1, 100, 30, 1000, 900, 45.0), NOW1, 3, &st, &err);
	rq_item *f = &q.it[1];
	assert_int_equal(f->kind, RK_FADING);
	assert_int_equal(rq_decide(f, 1, "ana", "still in use", NOW2, 0, &outcome, &m), TM_OK);
	/* three times the postings after at about the same share: the factor
	 * never reopens a fading label */
	add(&q, row(b, "falling", "lagerist", 1, 100, 90, 1000, 2900, 45.0), NOW3, 3, &st, &err);
	assert_int_equal(st.kept_closed, 1);
	/* its share after grew: no reason to ask again */
	add(&q, row(b, "falling", "lagerist", 1, 100, 40, 1000, 900, 30.0), NOW3, 3, &st, &err);
	assert_int_equal(st.kept_closed, 2);
	/* it fell further, beyond chance: asked again */
	add(&q, row(b, "falling", "lagerist", 1, 100, 3, 1000, 900, 120.0), NOW3, 3, &st, &err);
	assert_int_equal(st.reopened, 1);
	assert_int_equal(f->status, RQ_OPEN);
	assert_non_null(strstr(f->ev[f->nev - 1].reason, "the share fell: 3 of 900 postings"));
	buf_free(&err);
	buf_free(&m);
	rq_free(&q);
}

static void test_rows_refused(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf err = {0};
	char b[1024];
	(void)state;
	static const struct {
		const char *from, *to, *says;
	} bad[] = {
		{"\"direction\":\"rising\"", "\"direction\":\"up\"", "\"direction\" must be one of rising, falling"},
		{"\"postings_after\":41", "\"postings_after\":1041", "\"postings_after\" is more than"},
		{"\"postings_after\":41", "\"postings_after\":-1", "\"postings_after\" must be a whole number"},
		{"\"occupation_postings_before\":900", "\"occupation_postings_before\":0",
		 "\"occupation_postings_before\" must be 1 or more"},
		{"\"key\":\"scan-picker\",", "", "\"key\" is missing"},
		{"\"is_label\":false", "\"is_label\":\"no\"", "\"is_label\" must be true or false"},
		{"\"is_label\":false", "\"is_label\":true", "\"label_kind\" must be one of pref, alt, hidden"},
		{"\"is_label\":false", "\"is_label\":false,\"label_kind\":\"alt\"", "\"label_kind\" is given"},
		{"\"g2\":52.1000", "\"g2\":-1", "\"g2\" must be 0 or more"},
		{"\"g2\":52.1000", "\"g2\":\"52\"", "\"g2\" must be a number"},
		{"\"g2\":52.1000", "\"g2\":52.1,\"share_after\":1.5", "\"share_after\" must be a share"},
		{"\"postings_before\":0", "\"postings_before\":200", "\"direction\" is rising but"},
		{"\"label\":\"scan-picker\"", "\"label\":\"scan\\npicker\"", "\"label\" holds U+000A"},
	};
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
		char line[1200];
		row(b, "rising", "scan-picker", 0, 0, 41, 900, 1000, 52.1);
		splice(line, sizeof line, b, bad[i].from, bad[i].to);
		assert_int_equal(add(&q, line, NOW1, 0, &st, &err), TM_EINPUT);
		if (!strstr(err.data, bad[i].says))
			fail_msg("row %zu: want \"%s\" in \"%s\"", i, bad[i].says, err.data);
		assert_non_null(strstr(err.data, "t.jsonl:1: "));
	}
	assert_int_equal(q.n, 0);
	assert_int_equal(st.added + st.rising_labels + st.falling_titles, 0);
	buf_free(&err);
	rq_free(&q);
}

static const char head[] =
	"\xEF\xBB\xBF" "direction\toccupation\toccupation_label\tlang\tlabel\tkey\tis_label\tlabel_kind\t"
	"postings_before\tpostings_after\toccupation_postings_before\toccupation_postings_after\t"
	"share_before\tshare_before_low\tshare_before_high\tshare_after\tshare_after_low\t"
	"share_after_high\tg2\tfirst_seen\texample_1\texample_2\texample_3\tnew_column";

static void test_tsv_rows(void **state)
{
	rq_trend_tsv h;
	tm_buf err = {0}, out = {0};
	char jerr[100];
	(void)state;

	assert_int_equal(rq_trend_tsv_head(&h, head, strlen(head), "t.tsv:1", &err), TM_OK);
	const char *r = "rising\tocc:0042\tKommissionierer\tde\tscan-picker\tscan-picker\tfalse\t\t0\t41\t"
			"900\t1000\t0.0000\t0.0000\t0.0043\t0.0410\t0.0304\t0.0552\t52.1000\t2026-W09\t"
			"Scan-Picker (m/w/d) \"Valdoria\"\t\t\tignored";
	assert_int_equal(rq_trend_tsv_row(&h, r, strlen(r), &out, "t.tsv:2", &err), TM_OK);
	assert_int_equal(buf_putc(&out, 0), 0);
	/* JSON that reads back, with trend's field names and types */
	jr_doc *d = jr_parse(out.data, strlen(out.data), jerr, sizeof jerr);
	assert_non_null(d);
	assert_int_equal(jr_int(d, "postings_after"), 41);
	assert_int_equal(jr_type(d, "is_label"), JR_OTHER);
	assert_int_equal(jr_type(d, "label_kind"), JR_MISSING);
	assert_int_equal(jr_type(d, "g2"), JR_REAL);
	assert_int_equal(jr_type(d, "new_column"), JR_MISSING);
	assert_int_equal(jr_len(d, "examples"), 1);
	size_t n;
	assert_string_equal(jr_elem_str(d, "examples", 0, &n), "Scan-Picker (m/w/d) \"Valdoria\"");
	jr_free(d);
	/* the same item as the JSON row */
	rq_queue q = {0};
	rq_addstat st = {0};
	char id[17];
	assert_int_equal(rq_add(&q, out.data, strlen(out.data), "t.tsv:2", NOW1, 0, &st, &err), TM_OK);
	rq_trend_id(RK_RISING, "occ:0042", "de", "scan-picker", 11, id);
	assert_string_equal(q.it[0].id, id);
	rq_free(&q);

	/* cells that are not what their column holds: out unchanged */
	static const struct {
		const char *from, *to, *says;
	} bad[] = {
		{"\t41\t", "\t4.1e1\t", "\"postings_after\" must be a whole number"},
		{"\t41\t", "\t041\t", "\"postings_after\" must be a whole number"},
		{"\t41\t", "\t 41\t", "\"postings_after\" must be a whole number"},
		{"\t41\t", "\t18446744073709551616\t", "\"postings_after\" must be a whole number"},
		/* past 2^63 - 1 no JSON reader takes it as an integer */
		{"\t41\t", "\t9223372036854775808\t", "\"postings_after\" must be a whole number"},
		{"52.1000", "3333333333333333333333333333333333333333", "\"g2\" must be a number"},
		{"52.1000", "nan", "\"g2\" must be a number"},
		{"52.1000", "0x1p3", "\"g2\" must be a number"},
		{"52.1000", "1e999", "\"g2\" must be a number"},
		{"52.1000", "", "\"g2\" is empty"},
		{"\tfalse\t", "\tno\t", "\"is_label\" must be true or false"},
		{"rising\t", "\t", "\"direction\" is empty"},
		{"occ:0042", "occ:\x91", "\"occupation\" is not valid UTF-8"},
		{"(m/w/d)", "(m/w/d\xC3)", "\"example_1\" is not valid UTF-8"},
	};
	for (size_t i = 0; i < sizeof bad / sizeof *bad; i++) {
		char line[600];
		splice(line, sizeof line, r, bad[i].from, bad[i].to);
		buf_reset(&out);
		assert_int_equal(rq_trend_tsv_row(&h, line, strlen(line), &out, "t.tsv:3", &err), TM_EINPUT);
		if (!strstr(err.data, bad[i].says))
			fail_msg("cell %zu: want \"%s\" in \"%s\"", i, bad[i].says, err.data);
		assert_int_equal(out.len, 0);
	}
	/* a header without trend's columns, or with one twice */
	const char *ph = "id\tkind\toccupation\tlang\tlabel\tscore\tpostings";
	assert_int_equal(rq_trend_tsv_head(&h, ph, strlen(ph), "p.tsv:1", &err), TM_EINPUT);
	assert_non_null(strstr(err.data, "p.tsv:1: no column \"direction\""));
	char twice[sizeof head + 8];
	snprintf(twice, sizeof twice, "%s\tg2", head);
	assert_int_equal(rq_trend_tsv_head(&h, twice, strlen(twice), "t.tsv:1", &err), TM_EINPUT);
	assert_non_null(strstr(err.data, "\"g2\" names two columns"));
	buf_free(&out);
	buf_free(&err);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_which_rows_are_items),
		cmocka_unit_test(test_later_runs),
		cmocka_unit_test(test_rows_refused),
		cmocka_unit_test(test_tsv_rows),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

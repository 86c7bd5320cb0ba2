/* Unit tests for the queue over weeks (src/review/): the kinds table and
 * what each kind becomes in the delta, reopening on changed evidence
 * (cumulative counts whose share stays put must not reopen), rejections
 * as noise, batches undone, clashes among accepted labels, the words of
 * rejections as noise, and the dates --since takes. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "review/delta.h"
#include "review/review.h"
#include "review/review_change.h"
#include "review/review_clash.h"
#include "review/review_noise.h"
#include "review/review_time.h"

static const char *const T0 = "2026-12-01T09:00:00Z";

/* A suggestion line with the figures the reopening rules read. */
static const char *sugg(char *b, const char *id, const char *kind, const char *occ,
			const char *lang, const char *key, unsigned long postings,
			unsigned long occ_postings, double precision)
{
	sprintf(b,
		"{\"id\":\"%s\",\"kind\":\"%s\",\"occupation\":\"%s\",\"lang\":\"%s\","
		"\"label\":\"%s\",\"key\":\"%s\",\"score\":%lu.5,\"postings\":%lu,"
		"\"occupation_postings\":%lu,\"precision\":%.4f}",
		id, kind, occ, lang, key, key, postings, postings, occ_postings, precision);
	return b;
}

static void add(rq_queue *q, const char *line, const char *now, const rq_reopen *r,
		rq_addstat *st)
{
	tm_buf err = {0};
	memset(st, 0, sizeof *st);
	int rc = rq_add_by(q, line, strlen(line), "t:1", now, r, st, &err);
	if (rc)
		fprintf(stderr, "%s\n", err.data);
	assert_int_equal(rc, TM_OK);
	buf_free(&err);
}

static int decide(rq_item *it, int d, const rq_how *how)
{
	tm_buf m = {0};
	int outcome;
	assert_int_equal(rq_decide_how(it, d, "ana", NULL, T0, how, &outcome, &m), TM_OK);
	buf_free(&m);
	return outcome;
}

/* Every kind of the table: taken in, and when accepted either a label to
 * add (alt, hidden) or a review row, never anything else. */
static void test_kinds_table(void **state)
{
	rq_queue q = {0};
	rq_addstat st;
	rq_reopen r = {0, RQ_REOPEN_PRECISION};
	rq_how how = {0, 0, 0};
	char b[600], id[20];
	(void)state;
	for (int k = 0; k < RK_N; k++) {
		assert_non_null(strchr("ahr", rq_kind_delta[k]));
		for (int j = 0; j < k; j++)
			assert_string_not_equal(rq_kind_names[k], rq_kind_names[j]);
		sprintf(id, "00000000000000%02x", k);
		add(&q, sugg(b, id, rq_kind_names[k], "occ:1", "de", "koch", 10, 100, 0.9), T0, &r, &st);
		assert_int_equal(st.added, 1);
		assert_int_equal(q.it[k].kind, k);
		assert_int_equal(decide(&q.it[k], 0, &how), RD_APPLIED);
	}
	dl_opts o = {DL_TSV, -1, NULL, 0};
	tm_buf out = {0}, err = {0};
	assert_int_equal(dl_export(&q, &o, &out, &err), 0);
	int rows = 0;
	for (char *line = strchr(out.data, '\n') + 1; *line; line = strchr(line, '\n') + 1) {
		char idf[20], change[10];
		/* occupation kind lang label change id ... */
		assert_int_equal(sscanf(line, "%*s %*s %*s %*s %9s %19s", change, idf), 2);
		int k = (int)strtol(idf + 14, NULL, 16);
		assert_string_equal(change, rq_kind_delta[k] == 'r' ? "review" : "add");
		rows++;
	}
	assert_int_equal(rows, RK_N);
	buf_free(&out);
	buf_free(&err);
	rq_free(&q);
}

/* Cumulative counts: three times the postings of a three times larger
 * occupation is the same share and must not reopen; a share that grew
 * past the interval does.  --reopen-factor reopens on the postings. */
static void test_reopen_on_share(void **state)
{
	rq_queue q = {0};
	rq_addstat st;
	rq_reopen r = {0, RQ_REOPEN_PRECISION}, factor = {3, RQ_REOPEN_PRECISION};
	rq_how how = {0, 0, 0};
	char b[600];
	(void)state;

	add(&q, sugg(b, "00000000000000a1", "new_alt_label", "occ:1", "de", "koch", 30, 1000, 0.5),
	    T0, &r, &st);
	assert_int_equal(decide(&q.it[0], 1, &how), RD_APPLIED);
	for (int week = 2; week <= 6; week++) { /* 60/2000 ... 180/6000: 3 % each week */
		add(&q, sugg(b, "00000000000000a1", "new_alt_label", "occ:1", "de", "koch", 30ul * week,
			     1000ul * week, 0.5), T0, &r, &st);
		assert_int_equal(st.kept_closed, 1);
		assert_int_equal(q.it[0].status, RQ_REJECTED);
	}
	/* the same cumulative counts reopen with the raw-postings rule */
	rq_queue q2 = {0};
	add(&q2, sugg(b, "00000000000000a1", "new_alt_label", "occ:1", "de", "koch", 30, 1000, 0.5),
	    T0, &factor, &st);
	assert_int_equal(decide(&q2.it[0], 1, &how), RD_APPLIED);
	add(&q2, sugg(b, "00000000000000a1", "new_alt_label", "occ:1", "de", "koch", 90, 3000, 0.5),
	    T0, &factor, &st);
	assert_int_equal(st.reopened, 1);
	assert_non_null(strstr(q2.it[0].ev[q2.it[0].nev - 1].reason, "postings grew from 30 to 90"));
	rq_free(&q2);

	/* 3 % of 1000 (upper bound 0.0425) against 4 % of 6000 (lower bound
	 * 0.0353): not yet; 6 % of 6000 (lower bound 0.0543): reopened */
	add(&q, sugg(b, "00000000000000a1", "new_alt_label", "occ:1", "de", "koch", 240, 6000, 0.5),
	    T0, &r, &st);
	assert_int_equal(st.kept_closed, 1);
	add(&q, sugg(b, "00000000000000a1", "new_alt_label", "occ:1", "de", "koch", 360, 6000, 0.5),
	    T0, &r, &st);
	assert_int_equal(st.reopened, 1);
	assert_int_equal(q.it[0].status, RQ_OPEN);
	const rq_event *e = &q.it[0].ev[q.it[0].nev - 1];
	assert_int_equal(e->what, RE_REOPENED);
	assert_non_null(strstr(e->reason, "the share grew: 360 of 6000 postings, lower bound 0.0543 "
					  "above 0.0425"));
	rq_free(&q);
}

/* The precision up by the margin reopens; less does not; a rejection as
 * noise never reopens, whatever the evidence. */
static void test_reopen_on_precision_and_noise(void **state)
{
	rq_queue q = {0};
	rq_addstat st;
	rq_reopen r = {0, 0.2};
	rq_how how = {0, 0, 0}, noise = {0, 1, 0};
	char b[600];
	(void)state;

	add(&q, sugg(b, "00000000000000b1", "new_alt_label", "occ:1", "de", "koch", 30, 1000, 0.40),
	    T0, &r, &st);
	add(&q, sugg(b, "00000000000000b2", "new_alt_label", "occ:1", "de", "sofort", 30, 1000, 0.40),
	    T0, &r, &st);
	assert_int_equal(decide(&q.it[0], 1, &how), RD_APPLIED);
	assert_int_equal(decide(&q.it[1], 1, &noise), RD_APPLIED);
	assert_true(rq_last_decision(&q.it[1])->noise);
	add(&q, sugg(b, "00000000000000b1", "new_alt_label", "occ:1", "de", "koch", 30, 1000, 0.59),
	    T0, &r, &st);
	assert_int_equal(st.kept_closed, 1);
	add(&q, sugg(b, "00000000000000b1", "new_alt_label", "occ:1", "de", "koch", 30, 1000, 0.61),
	    T0, &r, &st);
	assert_int_equal(st.reopened, 1);
	assert_non_null(strstr(q.it[0].ev[q.it[0].nev - 1].reason, "precision grew from 0.4000 to 0.6100"));
	add(&q, sugg(b, "00000000000000b2", "new_alt_label", "occ:1", "de", "sofort", 900, 1000, 0.99),
	    T0, &r, &st);
	assert_int_equal(st.kept_closed, 1);
	assert_int_equal(st.noise, 1);
	assert_int_equal(q.it[1].status, RQ_REJECTED);
	/* a plain rejection marked as noise later is a new rejection */
	assert_int_equal(decide(&q.it[0], 1, &how), RD_APPLIED);
	assert_int_equal(decide(&q.it[0], 1, &how), RD_SAME);
	assert_int_equal(decide(&q.it[0], 1, &noise), RD_APPLIED);
	assert_int_equal(decide(&q.it[0], 1, &noise), RD_SAME);
	/* a curator reopens it all the same */
	tm_buf m = {0};
	int outcome;
	assert_int_equal(rq_reopen_item(&q.it[1], "bo", "second look", T0, &outcome, &m), TM_OK);
	assert_int_equal(outcome, RD_APPLIED);
	assert_int_equal(q.it[1].status, RQ_OPEN);
	assert_string_equal(q.it[1].ev[q.it[1].nev - 1].reviewer, "bo");
	assert_int_equal(rq_reopen_item(&q.it[1], "bo", NULL, T0, &outcome, &m), TM_OK);
	assert_int_equal(outcome, RD_SAME);
	buf_free(&m);
	rq_free(&q);
}

/* A batch undone: each item back to the status before it; refused when
 * an item changed after the batch; never twice. */
static void test_undo_batch(void **state)
{
	rq_queue q = {0};
	rq_addstat st;
	rq_reopen r = {0, RQ_REOPEN_PRECISION};
	rq_how plain = {0, 0, 0};
	char b[600];
	tm_buf err = {0};
	size_t n;
	(void)state;

	add(&q, sugg(b, "00000000000000c1", "new_alt_label", "occ:1", "de", "koch", 5, 100, 1), T0, &r, &st);
	add(&q, sugg(b, "00000000000000c2", "new_alt_label", "occ:1", "de", "maurer", 5, 100, 1), T0, &r, &st);
	add(&q, sugg(b, "00000000000000c3", "new_alt_label", "occ:1", "de", "fahrer", 5, 100, 1), T0, &r, &st);
	assert_int_equal(decide(&q.it[1], 0, &plain), RD_APPLIED);
	assert_int_equal(rq_next_batch(&q), 1);
	rq_how batch = {1, 0, rq_next_batch(&q)};
	assert_int_equal(decide(&q.it[0], 0, &batch), RD_APPLIED);
	assert_int_equal(decide(&q.it[1], 1, &batch), RD_APPLIED); /* overruled */
	assert_int_equal(decide(&q.it[2], 2, &batch), RD_APPLIED);
	assert_int_equal(rq_next_batch(&q), 2);
	assert_int_equal(rq_undo(&q, 1, "ana", "wrong sheet", T0, &n, &err), TM_OK);
	assert_int_equal(n, 3);
	assert_int_equal(q.it[0].status, RQ_OPEN);
	assert_int_equal(q.it[1].status, RQ_ACCEPTED);
	assert_int_equal(q.it[2].status, RQ_OPEN);
	assert_null(rq_last_decision(&q.it[0]));
	assert_int_equal(rq_last_decision(&q.it[1])->batch, 0); /* the acceptance before */
	assert_int_equal(q.it[1].ev[q.it[1].nev - 1].what, RE_UNDONE);
	assert_int_equal(rq_undo(&q, 1, "ana", NULL, T0, &n, &err), TM_EINPUT);
	assert_non_null(strstr(err.data, "no decision of batch 1 stands"));

	/* batch 2, then one of its items reopened: not undone */
	rq_how batch2 = {0, 0, rq_next_batch(&q)};
	assert_int_equal(batch2.batch, 2);
	assert_int_equal(decide(&q.it[0], 0, &batch2), RD_APPLIED);
	assert_int_equal(decide(&q.it[2], 1, &batch2), RD_APPLIED);
	tm_buf m = {0};
	int outcome;
	assert_int_equal(rq_reopen_item(&q.it[2], "bo", NULL, T0, &outcome, &m), TM_OK);
	assert_int_equal(rq_undo(&q, 2, "ana", NULL, T0, &n, &err), TM_EINPUT);
	assert_non_null(strstr(err.data, "batch 2 not undone: 00000000000000c3: changed after the batch"));
	assert_int_equal(q.it[0].status, RQ_ACCEPTED); /* nothing changed */
	buf_free(&m);
	buf_free(&err);
	rq_free(&q);
}

/* A key accepted for one occupation clashes with another occupation's
 * label suggestion in the same language (any region), not with its own
 * occupation's, and never for a kind that adds no label. */
static void test_clash_in_queue(void **state)
{
	rq_queue q = {0};
	rq_addstat st;
	rq_reopen r = {0, RQ_REOPEN_PRECISION};
	rq_how plain = {0, 0, 0};
	char b[600];
	tm_buf m = {0};
	int clash;
	(void)state;

	add(&q, sugg(b, "00000000000000d1", "new_alt_label", "occ:1", "de", "koch", 5, 100, 1), T0, &r, &st);
	add(&q, sugg(b, "00000000000000d2", "new_hidden_label", "occ:2", "de-AT", "koch", 5, 100, 1), T0, &r, &st);
	add(&q, sugg(b, "00000000000000d3", "new_hidden_label", "occ:1", "de", "koch", 5, 100, 1), T0, &r, &st);
	add(&q, sugg(b, "00000000000000d4", "used_elsewhere", "occ:3", "de", "koch", 5, 100, 1), T0, &r, &st);
	add(&q, sugg(b, "00000000000000d5", "new_alt_label", "occ:2", "fr", "koch", 5, 100, 1), T0, &r, &st);
	assert_int_equal(decide(&q.it[0], 0, &plain), RD_APPLIED);
	rq_clashes *c = rq_clashes_new(NULL, &q);
	assert_non_null(c);
	assert_int_equal(rq_clash_find(c, &q.it[1], &clash, &m), TM_OK);
	assert_true(clash);
	assert_string_equal(m.data, "the key 'koch' is already an alternative label 'koch' of occ:1 "
				    "(accepted in the queue as 00000000000000d1)");
	assert_int_equal(rq_clash_find(c, &q.it[2], &clash, &m), TM_OK);
	assert_false(clash);
	assert_int_equal(rq_clash_find(c, &q.it[3], &clash, &m), TM_OK);
	assert_false(clash);
	assert_int_equal(rq_clash_find(c, &q.it[4], &clash, &m), TM_OK);
	assert_false(clash);
	/* accepted within the same batch: the next one clashes with it */
	assert_int_equal(rq_clash_note(c, &q.it[4]), TM_OK);
	add(&q, sugg(b, "00000000000000d6", "new_alt_label", "occ:9", "fr", "koch", 5, 100, 1), T0, &r, &st);
	assert_int_equal(rq_clash_find(c, &q.it[5], &clash, &m), TM_OK);
	assert_true(clash);
	assert_non_null(strstr(m.data, "of occ:2 (accepted in the queue as 00000000000000d5)"));
	rq_clashes_free(c);
	buf_free(&m);
	rq_free(&q);
}

typedef struct words_seen {
	char text[400];
} words_seen;

static int note_word(const rq_noise_word *w, void *a0)
{
	words_seen *a = a0;
	char line[100];
	snprintf(line, sizeof line, "%s %s %llu/%llu;", w->lang, w->word,
		 (unsigned long long)w->items, (unsigned long long)w->of);
	strcat(a->text, line);
	return 0;
}

/* The words rejections as noise share, without the words of accepted
 * labels, above the floor, most shared first. */
static void test_noise_words(void **state)
{
	rq_queue q = {0};
	rq_addstat st;
	rq_reopen r = {0, RQ_REOPEN_PRECISION};
	rq_how plain = {0, 0, 0}, noise = {0, 1, 0};
	char b[600];
	static const char *const keys[] = {"sofort koch", "sofort maurer gesucht", "sofort fahrer gesucht",
					   "gesucht sofort sofort", "koch", "top job"};
	(void)state;
	for (int i = 0; i < 6; i++) {
		char id[20];
		sprintf(id, "00000000000000e%d", i);
		add(&q, sugg(b, id, "new_alt_label", "occ:1", i == 5 ? "en" : "de", keys[i], 5, 100, 1), T0,
		    &r, &st);
	}
	for (int i = 0; i < 4; i++)
		assert_int_equal(decide(&q.it[i], 1, &noise), RD_APPLIED);
	assert_int_equal(decide(&q.it[4], 0, &plain), RD_APPLIED); /* koch: a label */
	assert_int_equal(decide(&q.it[5], 1, &plain), RD_APPLIED); /* not as noise */
	words_seen a = {""};
	assert_int_equal(rq_noise_words(&q, NULL, 2, note_word, &a), 0);
	assert_string_equal(a.text, "de sofort 4/4;de gesucht 3/4;");
	a.text[0] = 0;
	assert_int_equal(rq_noise_words(&q, NULL, 1, note_word, &a), 0);
	assert_string_equal(a.text, "de sofort 4/4;de gesucht 3/4;de fahrer 1/4;de maurer 1/4;");
	rq_free(&q);
}

static void test_since_takes_a_date(void **state)
{
	(void)state;
	assert_int_equal(rq_since("2026-12-02"), rq_time("2026-12-02T00:00:00Z"));
	assert_int_equal(rq_since("2026-12-02T09:30:00Z"), rq_time("2026-12-02T09:30:00Z"));
	assert_int_equal(rq_since("2026-02-30"), -1);
	assert_int_equal(rq_since("2026-12-2"), -1);
	assert_int_equal(rq_since("02.12.2026"), -1);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_kinds_table),
		cmocka_unit_test(test_reopen_on_share),
		cmocka_unit_test(test_reopen_on_precision_and_noise),
		cmocka_unit_test(test_undo_batch),
		cmocka_unit_test(test_clash_in_queue),
		cmocka_unit_test(test_noise_words),
		cmocka_unit_test(test_since_takes_a_date),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

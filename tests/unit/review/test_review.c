/* Unit tests for the review queue (src/review/): the clock against
 * glibc's timegm (an outside implementation of the same calendar
 * arithmetic), the add/reopen rules, decisions and conflicts, prefixes,
 * and the queue line written and read back. */
#define _DEFAULT_SOURCE /* timegm */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <cmocka.h>

#include "review/review.h"
#include "review/review_change.h"
#include "review/review_json.h"
#include "review/review_time.h"

/* rq_decide's outcome (RD_*); the call itself must succeed. */
static int decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
		  int overrule, tm_buf *m)
{
	int outcome;
	assert_int_equal(rq_decide(it, d, reviewer, note, now, overrule, &outcome, m), TM_OK);
	return outcome;
}

static void test_time_against_timegm(void **state)
{
	(void)state;
	srand(11);
	for (int i = 0; i < 20000; i++) {
		struct tm tm = {0};
		char s[32];
		tm.tm_year = 70 + rand() % 200; /* 1970 to 2169 */
		tm.tm_mon = rand() % 12;
		tm.tm_mday = 1 + rand() % 28;
		tm.tm_hour = rand() % 24;
		tm.tm_min = rand() % 60;
		tm.tm_sec = rand() % 60;
		time_t t = timegm(&tm);
		strftime(s, sizeof s, "%Y-%m-%dT%H:%M:%SZ", &tm);
		assert_int_equal(rq_time(s), (long long)t);
	}
	/* 29 February only in leap years; the Gregorian century rule */
	assert_true(rq_time("2024-02-29T00:00:00Z") > 0);
	assert_int_equal(rq_time("2026-02-29T00:00:00Z"), -1);
	assert_int_equal(rq_time("2100-02-29T00:00:00Z"), -1);
	assert_true(rq_time("2000-02-29T00:00:00Z") > 0);
	assert_int_equal(rq_time("2026-12-02 09:30:00Z"), -1);
	assert_int_equal(rq_time("2026-12-02T09:30:00"), -1);
	assert_int_equal(rq_time("2026-13-02T09:30:00Z"), -1);
	assert_int_equal(rq_time("2026-12-02T24:00:00Z"), -1);
}

static const char *sugg(char *buf, const char *id, const char *kind, long postings)
{
	sprintf(buf,
		"{\"id\":\"%s\",\"kind\":\"%s\",\"occupation\":\"occ:1\",\"lang\":\"de\","
		"\"label\":\"koch\",\"score\":%ld.5,\"postings\":%ld,\"examples\":[\"Koch (m/w/d)\"]}",
		id, kind, postings, postings);
	return buf;
}

static void add(rq_queue *q, const char *line, const char *now, rq_addstat *st)
{
	tm_buf err = {0};
	int rc = rq_add(q, line, strlen(line), "t:1", now, 3, st, &err);
	if (rc)
		fprintf(stderr, "%s\n", err.data);
	assert_int_equal(rc, 0);
	buf_free(&err);
}

static void test_add_rules(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf m = {0};
	char b[512];
	(void)state;

	add(&q, sugg(b, "00000000000000a1", "new_alt_label", 10), "2026-12-01T09:00:00Z", &st);
	add(&q, sugg(b, "00000000000000b2", "new_alt_label", 40), "2026-12-01T09:00:00Z", &st);
	assert_int_equal(st.added, 2);
	assert_int_equal(q.n, 2);
	assert_int_equal(q.it[1].seq, 2);
	/* the same again: unchanged; more postings: refreshed, one event more */
	add(&q, sugg(b, "00000000000000a1", "new_alt_label", 10), "2026-12-02T09:00:00Z", &st);
	assert_int_equal(st.unchanged, 1);
	add(&q, sugg(b, "00000000000000a1", "new_alt_label", 12), "2026-12-03T09:00:00Z", &st);
	assert_int_equal(st.refreshed, 1);
	assert_int_equal(q.it[0].nev, 2);
	assert_int_equal(q.it[0].postings, 12);
	assert_string_equal(q.it[0].added, "2026-12-01T09:00:00Z");
	assert_string_equal(q.it[0].proposed, "2026-12-03T09:00:00Z");

	/* rejected at 12 postings: closed below 36, open again at 36 */
	assert_int_equal(decide(&q.it[0], 1, "bo", "no", "2026-12-04T09:00:00Z", 0, &m), RD_APPLIED);
	add(&q, sugg(b, "00000000000000a1", "new_alt_label", 35), "2026-12-05T09:00:00Z", &st);
	assert_int_equal(st.kept_closed, 1);
	assert_int_equal(q.it[0].status, RQ_REJECTED);
	assert_int_equal(q.it[0].postings, 12); /* evidence of the rejection kept */
	add(&q, sugg(b, "00000000000000a1", "new_alt_label", 36), "2026-12-06T09:00:00Z", &st);
	assert_int_equal(st.reopened, 1);
	assert_int_equal(q.it[0].status, RQ_OPEN);
	const rq_event *e = &q.it[0].ev[q.it[0].nev - 1];
	assert_int_equal(e->what, RE_REOPENED);
	assert_int_equal(e->postings, 36);
	assert_int_equal(rq_last_decision(&q.it[0])->postings, 12);

	/* accepted: left alone */
	assert_int_equal(decide(&q.it[1], 0, "ana", NULL, "2026-12-04T09:00:00Z", 0, &m), RD_APPLIED);
	size_t nev = q.it[1].nev;
	add(&q, sugg(b, "00000000000000b2", "new_alt_label", 400), "2026-12-07T09:00:00Z", &st);
	assert_int_equal(st.accepted_before, 1);
	assert_int_equal(q.it[1].nev, nev);
	assert_int_equal(q.it[1].postings, 40);

	/* the same id for another suggestion is refused */
	tm_buf err = {0};
	sugg(b, "00000000000000b2", "rare_label", 4);
	assert_int_equal(rq_add(&q, b, strlen(b), "t:9", "2026-12-07T09:00:00Z", 3, &st, &err), TM_EINPUT);
	assert_non_null(strstr(err.data, "t:9: id 00000000000000b2 is in the queue for another suggestion"));
	buf_free(&err);
	buf_free(&m);
	rq_free(&q);
}

static void test_decisions(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf m = {0};
	char b[512];
	int many;
	(void)state;

	add(&q, sugg(b, "0123456789abcdef", "new_alt_label", 10), "2026-12-01T09:00:00Z", &st);
	add(&q, sugg(b, "0123456700000000", "new_hidden_label", 10), "2026-12-01T09:00:00Z", &st);
	rq_item *it = rq_find(&q, "0123456789", 10, &many);
	assert_non_null(it);
	assert_string_equal(it->id, "0123456789abcdef");
	assert_null(rq_find(&q, "01234567", 8, &many)); /* two start so */
	assert_true(many);
	assert_null(rq_find(&q, "01234", 5, &many));    /* too short a prefix */

	assert_int_equal(decide(it, 2, "ana", NULL, "2026-12-02T09:00:00Z", 0, &m), RD_APPLIED);
	assert_int_equal(it->status, RQ_DEFERRED);
	/* deferred takes any decision */
	assert_int_equal(decide(it, 0, "bo", "ok", "2026-12-03T09:00:00Z", 0, &m), RD_APPLIED);
	assert_int_equal(it->status, RQ_ACCEPTED);
	assert_int_equal(decide(it, 0, "cy", NULL, "2026-12-04T09:00:00Z", 0, &m), RD_SAME);
	assert_non_null(strstr(m.data, "already accepted by bo at 2026-12-03T09:00:00Z"));
	assert_int_equal(decide(it, 1, "cy", NULL, "2026-12-04T09:00:00Z", 0, &m), RD_CONFLICT);
	assert_non_null(strstr(m.data, "accepted by bo"));
	assert_int_equal(it->status, RQ_ACCEPTED);
	assert_int_equal(decide(it, 1, "cy", "wrong", "2026-12-04T09:00:00Z", 1, &m), RD_APPLIED);
	assert_int_equal(it->status, RQ_REJECTED);
	const rq_event *d = rq_last_decision(it);
	assert_string_equal(d->reviewer, "cy");
	assert_string_equal(d->note, "wrong");
	assert_non_null(d->evidence);
	assert_non_null(strstr(d->evidence, "\"examples\":[\"Koch (m/w/d)\"]"));
	buf_free(&m);
	rq_free(&q);
}

static void test_round_trip(void **state)
{
	rq_queue q = {0}, q2 = {0};
	rq_addstat st = {0};
	tm_buf a = {0}, b = {0}, err = {0}, m = {0};
	char s[512];
	(void)state;

	for (int i = 0; i < 30; i++) {
		char id[17];
		snprintf(id, sizeof id, "%016x", 1000 + i * 7);
		add(&q, sugg(s, id, i % 2 ? "new_alt_label" : "used_elsewhere", 5 + i), "2026-12-01T09:00:00Z", &st);
		if (i % 3 == 0)
			decide(&q.it[i], (i / 3) % 3, "ana", i % 2 ? "a \"quoted\" note \\ é" : NULL,
				  "2026-12-02T09:00:00Z", 0, &m);
	}
	/* written in reverse order, read back in arrival order */
	for (size_t i = q.n; i-- > 0;)
		rq_item_json(&q.it[i], &a);
	assert_int_equal(rq_parse(&q2, a.data, a.len, "q", &err), 0);
	for (size_t i = 0; i < q.n; i++) {
		assert_int_equal(q2.it[i].seq, i + 1);
		rq_item_json(&q.it[i], &b);
	}
	/* q2 borrows a's text: read back into another buffer */
	tm_buf c = {0};
	for (size_t i = 0; i < q2.n; i++)
		rq_item_json(&q2.it[i], &c);
	assert_int_equal(c.len, b.len);
	assert_memory_equal(c.data, b.data, c.len);
	buf_free(&c);
	/* a changed item is written anew, an unchanged one as it was read */
	tm_buf m2 = {0};
	assert_int_equal(decide(&q2.it[1], 2, "bo", NULL, "2026-12-03T09:00:00Z", 0, &m2), RD_APPLIED);
	assert_true(q2.it[1].changed);
	assert_false(q2.it[2].changed);
	buf_free(&m2);
	assert_int_equal(q2.next_seq, 31);

	/* a duplicated line is reported with its line number and kept
	 * aside; the rest of the queue is read */
	rq_free(&q2);
	buf_reset(&a); /* q2 is gone: a may change */
	rq_item_json(&q.it[0], &a);
	rq_item_json(&q.it[1], &a);
	rq_item_json(&q.it[0], &a);
	buf_puts(&a, "{\"id\":\"00000000000003e8\",\"seq\":\n");
	assert_int_equal(rq_parse(&q2, a.data, a.len, "q", &err), 0);
	assert_int_equal(q2.n, 2);
	assert_int_equal(q2.nbad, 2);
	assert_int_equal(q2.bad[0].line, 3);
	assert_int_equal(q2.bad[1].line, 4);
	assert_int_equal(q2.bad[0].after, q2.it[1].seq);
	assert_non_null(strstr(q2.notes.data, "q:3: the id appears twice"));
	assert_non_null(strstr(q2.notes.data, "q:4: not a queue item"));
	rq_free(&q2);
	rq_free(&q);
	buf_free(&a);
	buf_free(&b);
	buf_free(&err);
	buf_free(&m);
}

/* A queue line of a newer version: members this one does not know. */
static const char newer[] =
	"{\"id\":\"00000000000000c3\",\"seq\":1,\"status\":\"%s\",\"kind\":\"new_alt_label\","
	"\"occupation\":\"occ:1\",\"lang\":\"de\",\"label\":\"koch\",\"score\":2.5,"
	"\"postings\":2,\"added\":\"2026-12-01T09:00:00Z\",\"proposed\":\"2026-12-01T09:00:00Z\","
	"\"evidence\":{\"postings\":2},\"history\":[{\"event\":\"added\","
	"\"at\":\"2026-12-01T09:00:00Z\",\"postings\":2,\"score\":2.5,"
	"\"channel\":{\"via\":\"Valdoria board\"}}],\"priority\":[3,\"high\"],"
	"\"team\":\"Nordhafen curators\"}\n";

static void test_unknown_members_survive(void **state)
{
	rq_queue q = {0}, q2 = {0};
	tm_buf a = {0}, b = {0}, err = {0}, m = {0};
	char line[1024];
	(void)state;

	snprintf(line, sizeof line, newer, "open");
	assert_int_equal(rq_parse(&q, line, strlen(line), "q", &err), 0);
	assert_int_equal(q.n, 1);
	assert_int_equal(decide(&q.it[0], 0, "ana", NULL, "2026-12-02T09:00:00Z", 0, &m),
			 RD_APPLIED);
	assert_true(q.it[0].changed);
	rq_item_json(&q.it[0], &a);
	assert_non_null(strstr(a.data, ",\"priority\":[3,\"high\"],\"team\":\"Nordhafen curators\"}"));
	assert_non_null(strstr(a.data, "\"channel\":{\"via\":\"Valdoria board\"}}"));
	assert_non_null(strstr(a.data, "\"status\":\"accepted\""));
	/* and read back and written again, the same bytes */
	assert_int_equal(rq_parse(&q2, a.data, a.len, "q", &err), 0);
	q2.it[0].changed = 1;
	rq_item_json(&q2.it[0], &b);
	assert_int_equal(a.len, b.len);
	assert_memory_equal(a.data, b.data, a.len);
	rq_free(&q);
	rq_free(&q2);
	buf_free(&a);
	buf_free(&b);
	buf_free(&err);
	buf_free(&m);
}

static void test_unknown_status(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf a = {0}, err = {0}, m = {0};
	char line[1024], s[512];
	(void)state;

	snprintf(line, sizeof line, newer, "escalated");
	assert_int_equal(rq_parse(&q, line, strlen(line), "q", &err), 0);
	assert_int_equal(q.n, 1);
	assert_int_equal(q.nbad, 0);
	assert_string_equal(rq_status_name(&q.it[0]), "escalated");
	assert_non_null(strstr(q.notes.data, "q:1: the status \"escalated\" is unknown"));
	/* never decided, not even on purpose */
	for (int d = 0; d < 3; d++) {
		assert_int_equal(decide(&q.it[0], d, "ana", NULL, "2026-12-02T09:00:00Z", 1, &m),
				 RD_CONFLICT);
		assert_non_null(strstr(m.data, "unknown to this version"));
	}
	/* new evidence leaves it alone */
	add(&q, sugg(s, "00000000000000c3", "new_alt_label", 90), "2026-12-03T09:00:00Z", &st);
	assert_int_equal(st.unknown_status, 1);
	assert_false(q.it[0].changed);
	rq_item_json(&q.it[0], &a);
	assert_int_equal(a.len, strlen(line));
	assert_memory_equal(a.data, line, a.len);
	rq_free(&q);
	buf_free(&a);
	buf_free(&err);
	buf_free(&m);
}

/* A queue line is written whole or not at all: whatever the point at
 * which the buffer runs out, nothing of the failed line stays in it, the
 * lines before it are intact and the failure is reported. */
static void test_item_json_all_or_nothing(void **state)
{
	rq_queue q = {0};
	rq_addstat st = {0};
	tm_buf ref = {0}, m = {0};
	char s[512];
	(void)state;

	for (int i = 0; i < 3; i++) {
		char id[17];
		snprintf(id, sizeof id, "%016x", 77 + i);
		add(&q, sugg(s, id, "new_alt_label", 9 + i), "2026-12-01T09:00:00Z", &st);
	}
	decide(&q.it[1], 1, "ana", "a note with \"quotes\"", "2026-12-02T09:00:00Z", 0, &m);
	for (size_t i = 0; i < q.n; i++)
		assert_int_equal(rq_item_json(&q.it[i], &ref), TM_OK);
	size_t first = (size_t)(strchr(ref.data, '\n') - ref.data) + 1;
	for (size_t cap = 1; cap < ref.len; cap++) {
		tm_buf b = {0};
		size_t whole = 0; /* bytes of the lines that fit whole */
		int rc = TM_OK;
		b.max = cap;
		for (size_t i = 0; i < q.n && rc == TM_OK; i++) {
			rc = rq_item_json(&q.it[i], &b);
			if (rc == TM_OK)
				whole = b.len;
		}
		assert_int_equal(rc, TM_ENOMEM);
		assert_int_equal(buf_status(&b), TM_ENOMEM);
		assert_int_equal(b.len, whole);
		assert_true(whole <= cap);
		if (whole)
			assert_memory_equal(b.data, ref.data, whole);
		assert_true(whole == 0 || whole == first || ref.data[whole - 1] == '\n');
		/* the buffer stays failed: a later short line is refused too */
		assert_int_equal(buf_puts(&b, "x"), TM_ENOMEM);
		assert_int_equal(b.len, whole);
		buf_free(&b);
	}
	tm_buf b = {0};
	b.max = ref.len;
	for (size_t i = 0; i < q.n; i++)
		assert_int_equal(rq_item_json(&q.it[i], &b), TM_OK);
	assert_int_equal(b.len, ref.len);
	assert_memory_equal(b.data, ref.data, ref.len);
	buf_free(&b);
	rq_free(&q);
	buf_free(&ref);
	buf_free(&m);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_time_against_timegm),
		cmocka_unit_test(test_add_rules),
		cmocka_unit_test(test_decisions),
		cmocka_unit_test(test_round_trip),
		cmocka_unit_test(test_unknown_members_survive),
		cmocka_unit_test(test_unknown_status),
		cmocka_unit_test(test_item_json_all_or_nothing),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

/* libFuzzer target: the review queue's readers.  The first byte picks
 * the reader: 0 a queue file, 1 propose (or overlap, or trend) output
 * taken into a queue, 2 a batch of decisions applied to that queue, 3
 * (that byte only; others count modulo 3) the TSV of trend --tsv taken
 * into a queue.  Whatever is accepted must write out a queue that reads
 * back and writes out the same bytes; a trend row read from TSV must be
 * one JSON object; a refusal always says why. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "review/review.h"
#include "review/review_batch.h"
#include "review/review_change.h"
#include "review/review_json.h"
#include "review/review_trend.h"
#include "io/jsonr.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static const char now[] = "2026-12-02T09:30:00Z";
static char path[64];

static void dump(const rq_queue *q, tm_buf *b)
{
	for (size_t i = 0; i < q->n; i++)
		if (rq_item_json(&q->it[i], b))
			abort();
}

/* q written, read back and written again gives the same bytes */
static void round_trip(const rq_queue *q)
{
	tm_buf a = {0}, b = {0}, err = {0};
	rq_queue q2 = {0};
	dump(q, &a);
	if (rq_parse(&q2, a.data, a.len, "written", &err) != 0 || q2.nbad) {
		fprintf(stderr, "cannot read back: %s\n", err.data);
		abort();
	}
	dump(&q2, &b);
	if (a.len != b.len || (a.len && memcmp(a.data, b.data, a.len)))
		abort();
	rq_free(&q2);
	buf_free(&a);
	buf_free(&b);
	buf_free(&err);
}

/* propose lines into q; returns 0 when all were taken */
static int add_lines(rq_queue *q, const char *s, size_t n)
{
	tm_buf err = {0};
	rq_addstat st = {0};
	const char *p = s, *end = s + n;
	int rc = 0;
	while (p < end && rc == 0) {
		const char *nl = memchr(p, '\n', (size_t)(end - p));
		size_t len = (size_t)((nl ? nl : end) - p);
		if (len) {
			rc = rq_add(q, p, len, "in:1", now, 3, &st, &err);
			if (rc && !err.len)
				abort();
		}
		p = nl ? nl + 1 : end;
	}
	buf_free(&err);
	return rc;
}

/* trend --tsv: a header line, then rows turned into trend's JSON objects
 * and taken into q */
static void add_tsv(rq_queue *q, const char *s, size_t n)
{
	tm_buf err = {0}, row = {0};
	rq_trend_tsv h;
	rq_addstat st = {0};
	const char *p = s, *end = s + n;
	int head = 1;
	while (p < end) {
		const char *line = p, *nl = memchr(p, '\n', (size_t)(end - p));
		size_t len = (size_t)((nl ? nl : end) - p);
		p = nl ? nl + 1 : end;
		if (memchr(line, 0, len))
			break; /* add refuses NUL bytes before these */
		if (head) {
			if (rq_trend_tsv_head(&h, line, len, "in:1", &err)) {
				if (!err.len)
					abort();
				break;
			}
			head = 0;
			continue;
		}
		buf_reset(&row);
		int rc = rq_trend_tsv_row(&h, line, len, &row, "in:2", &err);
		if (rc && !err.len)
			abort();
		if (rc)
			continue;
		char jerr[100];
		jr_doc *d = jr_parse(row.data, row.len, jerr, sizeof jerr);
		if (!d)
			abort();
		jr_free(d);
		if (rq_add(q, row.data, row.len, "in:2", now, 3, &st, &err) && !err.len)
			abort();
	}
	buf_free(&row);
	buf_free(&err);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	rq_queue q = {0};
	tm_buf err = {0};

	if (size < 1)
		return 0;
	const char *s = (const char *)data + 1;
	size_t n = size - 1;
	switch (data[0] == 3 ? 3 : data[0] % 3) {
	case 0:
		if (rq_parse(&q, s, n, "queue", &err) == 0)
			round_trip(&q);
		else if (!err.len)
			abort();
		break;
	case 1:
		add_lines(&q, s, n);
		round_trip(&q);
		break;
	case 2: {
		static const char base[] =
			"{\"id\":\"00000000000000a1\",\"kind\":\"new_alt_label\",\"occupation\":\"occ:1\","
			"\"lang\":\"de\",\"label\":\"koch\",\"score\":12.5,\"postings\":20}\n"
			"{\"id\":\"00000000000000b2\",\"kind\":\"rare_label\",\"occupation\":\"occ:2\","
			"\"lang\":\"en\",\"label\":\"cook\",\"score\":1,\"postings\":0}\n";
		rq_decisions ds = {0};
		FILE *fp, *report = fopen("/dev/null", "w");
		if (add_lines(&q, base, sizeof base - 1))
			abort();
		if (!path[0])
			snprintf(path, sizeof path, "/dev/shm/tm-fuzz-r-%ld", (long)getpid());
		fp = fopen(path, "wb");
		fwrite(s, 1, n, fp);
		fclose(fp);
		long bad = 0;
		int rc = rq_decisions_read(path, "fuzz", &ds, report, &bad, &err);
		fclose(report);
		if (rc < 0 && !err.len)
			abort();
		if (rc == TM_OK && bad == 0) {
			tm_buf m = {0};
			for (size_t i = 0; i < ds.n; i++) {
				int many;
				rq_item *it = rq_find(&q, ds.v[i].id, strlen(ds.v[i].id), &many);
				int outcome;
				if (it && rq_decide(it, ds.v[i].d, ds.v[i].reviewer, ds.v[i].note, now,
						    (int)(i & 1), &outcome, &m) < 0)
					abort();
			}
			buf_free(&m);
			round_trip(&q);
		}
		rq_decisions_free(&ds);
		break;
	}
	case 3:
		add_tsv(&q, s, n);
		round_trip(&q);
		break;
	}
	rq_free(&q);
	buf_free(&err);
	return 0;
}

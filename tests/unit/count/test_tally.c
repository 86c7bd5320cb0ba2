/* Unit tests for the postings readers (src/io/postings.c), the string table
 * (src/count/strtab.c) and the memory engine with its counts table
 * (src/count/tally_mem.c). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "core/digest.h"
#include "io/postings.h"
#include "count/idset.h"
#include "count/store.h"
#include "count/strtab.h"
#include "count/tally.h"

static char path[64];

/* What pr_next read (pr_row), or -1 on a read error. */
static int next_row(postings_reader *pr, posting *p)
{
	pr_row row;
	return pr_next(pr, p, &row) == 0 ? (int)row : -1;
}

static void write_file(const char *s)
{
	strcpy(path, "/tmp/tm-tally-XXXXXX");
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, s, strlen(s)), (ssize_t)strlen(s));
	close(fd);
}

static void test_dates(void **state)
{
	(void)state;
	assert_true(pr_valid_date("2026-03-01", 10));
	assert_true(pr_valid_date("2024-02-29", 10));  /* leap year */
	assert_false(pr_valid_date("2023-02-29", 10));
	assert_false(pr_valid_date("1900-02-29", 10)); /* century, not leap */
	assert_true(pr_valid_date("2000-02-29", 10));  /* 400 years: leap */
	assert_false(pr_valid_date("2026-13-01", 10));
	assert_false(pr_valid_date("2026-04-31", 10));
	assert_false(pr_valid_date("2026-3-01", 9));
	assert_false(pr_valid_date("20260301xx", 10));
}

static void test_tsv_reader(void **state)
{
	(void)state;
	postings_reader pr;
	posting p;
	write_file("\xEF\xBB\xBFlang\ttitle\textra\toccupations\tid\r\n"
		   "de-AT\tKoch (m/w/d)\tx\t occ:1 | occ:2 |occ:1\t7\r\n"
		   "\n"
		   "xx-!!\tKoch\t\tocc:1\t8\n"
		   "\t\t\tocc:1\n"
		   "en\tCook\n");
	assert_int_equal(pr_open(&pr, path, PR_AUTO), 0);
	assert_int_equal(pr.format, PR_TSV);
	assert_int_equal(next_row(&pr, &p), PR_POSTING);
	assert_string_equal(p.lang, "de");
	assert_int_equal(p.nocc, 2); /* trimmed, the repeat dropped */
	assert_memory_equal(p.occ[1], "occ:2", 5);
	assert_memory_equal(p.id, "7", 1);
	assert_int_equal(p.line, 2);
	assert_int_equal(next_row(&pr, &p), PR_SKIP); /* bad lang */
	assert_non_null(strstr(pr.err.data, ":4: bad lang"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP); /* no title */
	assert_non_null(strstr(pr.err.data, ":5: no title"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP); /* short row */
	assert_non_null(strstr(pr.err.data, ":6: row has fewer fields"));
	assert_int_equal(next_row(&pr, &p), PR_END);
	pr_close(&pr);
	unlink(path);
}

static void test_json_reader(void **state)
{
	(void)state;
	postings_reader pr;
	posting p;
	write_file("\n{\"title\":\"Koch\",\"occupations\":[\"occ:1\",\"occ:2\"],\"id\":42}\n"
		   "{\"title\":\"Koch\",\"occupations\":\"occ:3|occ:4\",\"lang\":\"fr\",\"date\":\"2026-03-02\"}\n"
		   "{\"title\":\"Koch\",\"occupations\":[1]}\n"
		   "[1,2]\n"
		   "{\"title\":\"A\",\"title\":\"B\",\"occupations\":\"o\"}\n"
		   "{\"title\":\"Koch\",\"occupations\":\"o\",\"date\":\"2026-02-30\"}\n");
	assert_int_equal(pr_open(&pr, path, PR_AUTO), 0);
	assert_int_equal(pr.format, PR_JSONL);
	assert_int_equal(next_row(&pr, &p), PR_POSTING);
	assert_int_equal(p.nocc, 2);
	assert_memory_equal(p.id, "42", 2);
	assert_string_equal(p.lang, "und");
	assert_int_equal(p.line, 2);
	assert_int_equal(next_row(&pr, &p), PR_POSTING);
	assert_int_equal(p.nocc, 2);
	assert_string_equal(p.lang, "fr");
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":4: 'occupations' holds something that is not a string"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":5: bad JSON: not a JSON object"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP); /* duplicate key */
	assert_non_null(strstr(pr.err.data, ":6: bad JSON"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":7: bad date"));
	assert_int_equal(next_row(&pr, &p), PR_END);
	pr_close(&pr);
	unlink(path);
}

static void test_strtab(void **state)
{
	(void)state;
	strtab t = {0};
	char k[32];
	size_t idx, n;
	for (int i = 0; i < 100000; i++) {
		snprintf(k, sizeof k, "id-%d", i);
		assert_int_equal(st_add(&t, k, strlen(k), 1, &idx), 1);
		assert_int_equal(idx, (size_t)i);
	}
	for (int i = 0; i < 100000; i += 7) {
		snprintf(k, sizeof k, "id-%d", i);
		assert_int_equal(st_add(&t, k, strlen(k), 2, &idx), 0);
		assert_int_equal(t.ent[idx].count, 3);
	}
	assert_int_equal(t.n, 100000);
	assert_int_equal(st_find(&t, "id-99999", 8), 99999);
	assert_int_equal(st_find(&t, "id-100000", 9), -1);
	assert_memory_equal(st_key(&t, 5, &n), "id-5", 4);
	assert_int_equal(st_add(&t, "", 0, 1, &idx), 1); /* the empty key is a key */
	st_free(&t);
}

static tally_posting P(const char *id, const char *lang, const char *key, const char *title,
		       const char *ex, const char *const *occ, const size_t *ol, size_t n)
{
	tally_posting p = {0};
	p.id = id;
	p.idlen = id ? strlen(id) : 0;
	p.lang = lang;
	p.key = key;
	p.keylen = strlen(key);
	p.title = title;
	p.titlelen = strlen(title);
	p.example = ex;
	p.examplelen = strlen(ex);
	p.occ = occ;
	p.occlen = ol;
	p.nocc = n;
	return p;
}

static char *table(tally_mem *m)
{
	char *buf = NULL;
	size_t len = 0;
	FILE *fp = open_memstream(&buf, &len);
	assert_int_equal(tm_write(m, fp), 0);
	fclose(fp);
	return buf;
}

static void test_engine(void **state)
{
	(void)state;
	tally_mem m;
	const char *o12[2] = {"occ:1", "occ:2"}, *o1[1] = {"occ:1"};
	size_t l12[2] = {5, 5}, l1[1] = {5};
	tm_init(&m);
	tally_posting a = P("1", "de", "koch", "koch", "Koch (m/w/d)", o12, l12, 2);
	tally_posting b = P("2", "de", "koch", "köch", "KÖCH", o1, l1, 1);
	tally_posting c = P("3", "de", "koch", "koch", "Koch!", o1, l1, 1);
	tally_posting a2 = P("1", "de", "koch", "koch", "Koch (m/w/d)", o12, l12, 2);
	assert_int_equal(tm_add(&m, &a), 0);
	assert_int_equal(tm_add(&m, &b), 0);
	assert_int_equal(tm_add(&m, &c), 0);
	assert_int_equal(tm_add(&m, &a2), 1); /* republished */
	char *t = table(&m);
	/* the display title is the most frequent form; the key row counts
	 * each posting once though the first had two occupations */
	assert_non_null(strstr(t, "kind\toccupation\tlang\tkey\ttext\tpostings\n"
				  "occupation\tocc:1\tde\t\t\t3\n"
				  "title\tocc:1\tde\tkoch\tkoch\t3\n"
				  "form\tocc:1\tde\tkoch\tkoch\t2\n"
				  "form\tocc:1\tde\tkoch\tköch\t1\n"));
	assert_non_null(strstr(t, "key\t\tde\tkoch\t\t3\n"));
	assert_non_null(strstr(t, "occupation\tocc:2\tde\t\t\t1\n"));
	/* round trip: read the table back, write it again: same bytes */
	FILE *fp = fopen("/tmp/tm-tally-rt.tsv", "w");
	fputs(t, fp);
	fclose(fp);
	tally_mem m2;
	tm_buf err = {0};
	tm_init(&m2);
	assert_int_equal(tm_read(&m2, "/tmp/tm-tally-rt.tsv", &err), 0);
	char *t2 = table(&m2);
	assert_string_equal(t, t2);
	/* merging doubles every count */
	assert_int_equal(tm_read(&m2, "/tmp/tm-tally-rt.tsv", &err), 0);
	char *t3 = table(&m2);
	assert_non_null(strstr(t3, "title\tocc:1\tde\tkoch\tkoch\t6\n"));
	remove("/tmp/tm-tally-rt.tsv");
	free(t);
	free(t2);
	free(t3);
	tm_free(&m);
	tm_free(&m2);
	buf_free(&err);
}

/* The three examples kept are the three of smallest hash, whatever the
 * order they came in: two engines fed in opposite orders agree. */
static void test_examples_order_free(void **state)
{
	(void)state;
	tally_mem x, y;
	char ex[32];
	tm_init(&x);
	tm_init(&y);
	for (int i = 0; i < 200; i++) {
		snprintf(ex, sizeof ex, "Koch %d", i);
		assert_int_equal(tm_add_example(&x, "o", 1, "de", "koch", 4, ex, strlen(ex)), 0);
		snprintf(ex, sizeof ex, "Koch %d", 199 - i);
		assert_int_equal(tm_add_example(&y, "o", 1, "de", "koch", 4, ex, strlen(ex)), 0);
	}
	assert_int_equal(tm_add_form(&x, "o", 1, "de", "koch", 4, "koch", 4, 1), 0);
	assert_int_equal(tm_add_form(&y, "o", 1, "de", "koch", 4, "koch", 4, 1), 0);
	char *a = table(&x), *b = table(&y);
	assert_string_equal(a, b);
	int n = 0;
	for (char *p = a; (p = strstr(p, "\nexample\t")); p++)
		n++;
	assert_int_equal(n, 3);
	free(a);
	free(b);
	tm_free(&x);
	tm_free(&y);
}

/* Each triple keeps the TALLY_EXAMPLES distinct texts of smallest
 * dg_fnv (ties: the smaller bytes), whether it was offered one, two,
 * three or many, its offers interleaved with other triples' (so the
 * records of second and third examples are made in no order of the
 * triples); an engine merged from it keeps the same. */
static void test_examples_kept(void **state)
{
	(void)state;
	enum { T = 40, OFFERS = 60 };
	tally_mem m, copy;
	char key[16], ex[32];
	tm_init(&m);
	tm_init(&copy);
	for (int o = 0; o < OFFERS; o++)
		for (int t = 0; t < T; t++) {
			if (o >= t % 7 + 1 && t % 7 != 6)
				continue; /* triple t is offered t % 7 + 1 texts, or 60 */
			int kl = snprintf(key, sizeof key, "k%d", t);
			int el = snprintf(ex, sizeof ex, "Koch %d", (o * 37 + t) % OFFERS);
			assert_int_equal(tm_add_example(&m, "o", 1, "de", key, (size_t)kl, ex, (size_t)el), 0);
			/* offered again: no change */
			assert_int_equal(tm_add_example(&m, "o", 1, "de", key, (size_t)kl, ex, (size_t)el), 0);
		}
	assert_int_equal(tm_merge(&copy, &m), 0);
	for (int t = 0; t < T; t++) {
		int offers = t % 7 == 6 ? OFFERS : t % 7 + 1, want = 0;
		uint64_t h[OFFERS];
		char txt[OFFERS][32];
		for (int o = 0; o < offers; o++) {
			snprintf(txt[o], sizeof txt[o], "Koch %d", (o * 37 + t) % OFFERS);
			h[o] = dg_fnv(txt[o], strlen(txt[o]));
		}
		int kept[TALLY_EXAMPLES];
		for (; want < TALLY_EXAMPLES && want < offers; want++) { /* brute force */
			int best = -1;
			for (int o = 0; o < offers; o++) {
				int taken = 0;
				for (int q = 0; q < want; q++)
					taken |= kept[q] == o;
				if (!taken && (best < 0 || h[o] < h[best] ||
					       (h[o] == h[best] && strcmp(txt[o], txt[best]) < 0)))
					best = o;
			}
			kept[want] = best;
		}
		int kl = snprintf(key, sizeof key, "k%d", t);
		for (int e = 0; e < 2; e++) {
			const char *text[TALLY_EXAMPLES];
			size_t len[TALLY_EXAMPLES];
			int n = tm_examples(e ? &copy : &m, "o", 1, "de", key, (size_t)kl, text, len);
			assert_int_equal(n, want);
			for (int q = 0; q < want; q++) {
				int found = 0;
				for (int a = 0; a < n; a++)
					found |= len[a] == strlen(txt[kept[q]]) &&
						 !memcmp(text[a], txt[kept[q]], len[a]);
				assert_true(found);
			}
			for (int a = 1; a < n; a++) /* in byte order */
				assert_true(memcmp(text[a - 1], text[a], len[a] < len[a - 1] ? len[a] : len[a - 1]) <= 0);
		}
	}
	tm_free(&m);
	tm_free(&copy);
}

/* The tables grow by half, not twice: entries, arenas and slots stay
 * within a small factor of what they hold (slots: at most 3/4 full, and
 * a table just past that grows to 1.5 times, not twice its slots). */
static void test_growth(void **state)
{
	(void)state;
	size_t cap = 0;
	char *p = NULL;
	for (size_t need = 1; need < ((size_t)16 << 20); need = need * 5 / 4 + 1) {
		p = st_grow(p, &cap, need, 1, 64);
		assert_non_null(p);
		assert_true(cap >= need);
		assert_true(cap <= need * 3 / 2 + 64);
		if (need > ((size_t)8 << 20))
			assert_true(cap <= need + need / 8 + 1);
		p[need - 1] = 1;
	}
	free(p);
	tm_buf b = {0};
	for (int i = 0; i < 100000; i++) {
		assert_int_equal(st_arena_reserve(&b, 11), 0);
		assert_int_equal(buf_append(&b, "0123456789", 10), 0);
		assert_true(b.cap >= b.len + 1 && b.cap <= b.len * 3 / 2 + 4096);
	}
	buf_free(&b);
	strtab t = {0};
	char k[16];
	for (int i = 0; i < 769; i++) /* 768 fill 1024 slots to 3/4 */
		assert_int_equal(st_add(&t, k, (size_t)snprintf(k, sizeof k, "k%d", i), 1, NULL), 1);
	assert_int_equal(t.nslot, 1536);
	assert_true(t.cap <= 1536);
	for (int i = 0; i < 769; i++)
		assert_int_equal(st_find(&t, k, (size_t)snprintf(k, sizeof k, "k%d", i)), i);
	st_free(&t);
}

static void test_bad_tables(void **state)
{
	(void)state;
	tally_mem m;
	tm_buf err = {0};
	tm_init(&m);
	write_file("kind\toccupation\tlang\tkey\ttext\tpostings\nform\to\tde\tk\tt\t-1\n");
	assert_int_equal(tm_read(&m, path, &err), -1);
	assert_non_null(strstr(err.data, ":2: postings is not a whole number"));
	unlink(path);
	write_file("kind\toccupation\tlang\tkey\ttext\tpostings\nweird\to\tde\tk\tt\t1\n");
	assert_int_equal(tm_read(&m, path, &err), -1);
	assert_non_null(strstr(err.data, ":2: unknown kind"));
	unlink(path);
	write_file("a\tb\n");
	assert_int_equal(tm_read(&m, path, &err), -1);
	assert_non_null(strstr(err.data, ":1: not a counts table"));
	unlink(path);
	write_file("kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tk\t\t1\tx\n");
	assert_int_equal(tm_read(&m, path, &err), -1);
	assert_non_null(strstr(err.data, ":2: row has more fields than the header"));
	unlink(path);
	tm_free(&m);
	buf_free(&err);
}

/* Counts near 2^64: one table of 19-digit counts reads, the sum of two
 * is refused with the line instead of wrapping around. */
static void test_count_overflow(void **state)
{
	(void)state;
	tally_mem m;
	tm_buf err = {0};
	tm_init(&m);
	write_file("kind\toccupation\tlang\tkey\ttext\tpostings\n"
		   "occupation\to\tde\t\t\t9999999999999999999\n"
		   "form\to\tde\tk\tk\t9999999999999999999\n"
		   "key\t\tde\tk\t\t9999999999999999999\n");
	assert_int_equal(tm_read(&m, path, &err), 0);
	assert_int_equal(tm_occ_postings(&m, "o", 1, "de"), 9999999999999999999ULL);
	assert_int_equal(tm_read(&m, path, &err), -1);
	assert_non_null(strstr(err.data, ":2: the postings add up past 18446744073709551615"));
	/* nothing was changed by the refused line */
	assert_int_equal(tm_occ_postings(&m, "o", 1, "de"), 9999999999999999999ULL);
	unlink(path);
	tm_free(&m);
	buf_free(&err);
}

/* Occupations with a control character (a TAB or newline in JSON, a NUL
 * or CR in TSV) or invalid UTF-8 would break the counts table: the row is
 * malformed.  So are a lang with a NUL and a TSV row with more fields than
 * the header. */
static void test_bad_occupations(void **state)
{
	(void)state;
	postings_reader pr;
	posting p;
	static const char tsv[] = "title\toccupations\tlang\n"
				  "Koch\tocc\0001\tde\n"
				  "Koch\tocc\r1\tde\n"
				  "Koch\t\xFFocc\tde\n"
				  "Koch\tocc:1\tde\0xx\n"
				  "Senior\tKoch\tocc:1\tde\n"
				  "Koch\tocc:1\tde\t\n";
	strcpy(path, "/tmp/tm-tally-XXXXXX");
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, tsv, sizeof tsv - 1), (ssize_t)(sizeof tsv - 1));
	close(fd);
	assert_int_equal(pr_open(&pr, path, PR_AUTO), 0);
	for (int line = 2; line <= 4; line++) {
		char want[80];
		assert_int_equal(next_row(&pr, &p), PR_SKIP);
		snprintf(want, sizeof want, ":%d: an occupation holds a control character", line);
		assert_non_null(strstr(pr.err.data, want));
	}
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":5: bad lang"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":6: row has more fields than the header"));
	assert_int_equal(next_row(&pr, &p), PR_POSTING); /* an empty extra field is fine */
	assert_int_equal(p.line, 7);
	assert_int_equal(next_row(&pr, &p), PR_END);
	pr_close(&pr);
	unlink(path);
	write_file("{\"title\":\"Koch\",\"occupations\":[\"occ\\n1\"]}\n"
		   "{\"title\":\"Koch\",\"occupations\":\"occ\\t1|occ:2\"}\n");
	assert_int_equal(pr_open(&pr, path, PR_AUTO), 0);
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":1: an occupation holds a control character"));
	assert_int_equal(next_row(&pr, &p), PR_SKIP);
	assert_non_null(strstr(pr.err.data, ":2: an occupation holds a control character"));
	assert_int_equal(next_row(&pr, &p), PR_END);
	pr_close(&pr);
	unlink(path);
}

/* The hash tag (what lies between the first '{' and the next '}', as
 * Redis Cluster reads it) of every key of one occupation is the same,
 * so its keys share a slot; spread keys stay within 64 shards. */
static void tag(const tm_buf *k, char *out)
{
	const char *a = memchr(k->data, '{', k->len), *b = a ? memchr(a, '}', k->len - (size_t)(a - k->data)) : NULL;
	assert_non_null(a);
	assert_non_null(b);
	memcpy(out, a + 1, (size_t)(b - a - 1));
	out[b - a - 1] = 0;
}

static void test_key_layout(void **state)
{
	(void)state;
	tm_buf k = {0};
	char t1[64], t2[64];
	assert_int_equal(store_key_occ("tm", "occ:2512", 8, 'f', &k), 0);
	assert_memory_equal(k.data, "tm:{o:occ:2512}:f", k.len);
	tag(&k, t1);
	assert_int_equal(store_key_occ("tm", "occ:2512", 8, 'x', &k), 0);
	tag(&k, t2);
	assert_string_equal(t1, t2);
	assert_int_equal(store_key_occ("tm", "occ:2512", 8, 'n', &k), 0);
	tag(&k, t2);
	assert_string_equal(t1, "o:occ:2512");
	assert_string_equal(t2, "o:occ:2512");
	for (uint64_t h = 0; h < 1000; h += 37) {
		assert_int_equal(store_key_shard("tm", 'k', h, &k), 0);
		tag(&k, t1);
		unsigned s = (unsigned)atoi(t1 + 2);
		assert_true(s < 64);
		assert_int_equal(s, h % 64);
		assert_int_equal(k.data[k.len - 1], 'k');
	}
	buf_free(&k);
}

/* The id set: growth from empty past a million members, every member
 * found and its bytes kept, ids that are not members not found, the
 * empty id, and ids of equal fingerprint (the hash's upper half) but
 * different bytes kept apart. */
static void test_idset(void **state)
{
	(void)state;
	idset s = {0};
	char k[32];
	enum { N = 1100000 };

	assert_int_equal(ids_has(&s, "x", 1), 0);
	for (uint32_t i = 0; i < N; i++) {
		int n = snprintf(k, sizeof k, "posting-%u", i);
		assert_int_equal(ids_add(&s, k, (size_t)n), 1);
	}
	assert_int_equal(s.n, N);
	assert_true(s.nslot >= 2 * (size_t)N); /* at most half full */
	for (uint32_t i = 0; i < N; i += 7) {
		int n = snprintf(k, sizeof k, "posting-%u", i);
		size_t ml;
		const char *m = ids_member(&s, i, &ml);
		assert_int_equal(ids_add(&s, k, (size_t)n), 0);
		assert_int_equal(ids_has(&s, k, (size_t)n), 1);
		assert_int_equal(ml, (size_t)n);
		assert_memory_equal(m, k, ml);
		n = snprintf(k, sizeof k, "posting-%u", N + i);
		assert_int_equal(ids_has(&s, k, (size_t)n), 0);
		/* its first bytes are another member: posting-(110000 + i / 10) */
		assert_int_equal(ids_has(&s, k, (size_t)n - 1), 1);
	}
	assert_int_equal(s.n, N);
	assert_int_equal(ids_has(&s, "", 0), 0);
	assert_int_equal(ids_add(&s, "", 0), 1);
	assert_int_equal(ids_add(&s, "", 0), 0);
	assert_int_equal(ids_has(&s, "", 0), 1);
	ids_free(&s);

	/* two ids whose hashes share the fingerprint and the home slot of
	 * the first 1,024 slots (found by a search over "fs-N" for N below
	 * 4,000,000: 42 equal bits): the second meets the first's slot
	 * first, and only the bytes tell them apart */
	const char *ka = "fs-526287", *kb = "fs-1799457";
	size_t la = strlen(ka), lb = strlen(kb);
	uint64_t ha = ids_hash(ka, la), hb = ids_hash(kb, lb);
	assert_true(ha >> 32 == hb >> 32 && (ha & 1023) == (hb & 1023));
	assert_int_equal(ids_add(&s, ka, la), 1);
	assert_int_equal(ids_has(&s, kb, lb), 0);
	assert_int_equal(ids_add(&s, kb, lb), 1);
	assert_int_equal(ids_add(&s, ka, la), 0);
	assert_int_equal(ids_add(&s, kb, lb), 0);
	assert_int_equal(s.n, 2);
	/* and through growth: the pair, then enough ids to double the slots
	 * three times, the pair still two members */
	for (uint32_t i = 0; i < 5000; i++) {
		int n = snprintf(k, sizeof k, "g-%u", i);
		assert_int_equal(ids_add(&s, k, (size_t)n), 1);
	}
	assert_true(s.nslot >= 8192);
	assert_int_equal(ids_add(&s, ka, la), 0);
	assert_int_equal(ids_add(&s, kb, lb), 0);
	assert_int_equal(s.n, 5002);
	ids_free(&s);
}

/* Keys given as fields: one entry per joined key, found again from its
 * fields, the joined bytes in the arena; fields that join differently
 * are different keys, even under one hash. */
static void test_fields(void **state)
{
	(void)state;
	strtab t = {0};
	st_fields a = {{"occ:1", "de", "koch"}, {5, 2, 4}, 3, '\x1F', 42};
	st_fields b = {{"occ:1", "dek", "och"}, {5, 3, 3}, 3, '\x1F', 42};
	st_fields c = {{"occ:1", "de"}, {5, 2}, 2, '\x1F', 42};
	size_t i, n;

	assert_int_equal(st_add_fields(&t, &a, 2, &i), 1);
	assert_int_equal(st_add_fields(&t, &a, 3, &i), 0);
	assert_int_equal(t.ent[i].count, 5);
	assert_int_equal(st_find_fields(&t, &b), -1);
	assert_int_equal(st_find_fields(&t, &c), -1);
	assert_int_equal(st_add_fields(&t, &b, 1, NULL), 1);
	assert_int_equal(st_add_fields(&t, &c, 1, NULL), 1);
	assert_int_equal(t.n, 3);
	assert_int_equal(st_find_fields(&t, &a), 0);
	assert_int_equal(st_find_fields(&t, &b), 1);
	const char *s = st_key(&t, 0, &n);
	assert_int_equal(n, 13);
	assert_memory_equal(s, "occ:1\x1F" "de\x1F" "koch", 13);
	/* past a growth of the slots */
	for (int q = 0; q < 3000; q++) {
		char w[16];
		st_fields d = {{w}, {(size_t)snprintf(w, sizeof w, "w%d", q)}, 1, '\x1F', (uint64_t)q * 7919};
		assert_int_equal(st_add_fields(&t, &d, 1, NULL), 1);
	}
	assert_int_equal(st_find_fields(&t, &a), 0);
	assert_int_equal(st_find_fields(&t, &c), 2);
	st_free(&t);
}

/* Keys filed under hashes that collide whole, agree in their high or in
 * their low 32 bits only (the low ones are a slot's fingerprint and its
 * home): each found, counted and told apart from the others, across
 * growths of the slots. */
static void test_fingerprints(void **state)
{
	(void)state;
	strtab t = {0};
	char w[16];
	enum { N = 6000 };
	for (int pass = 0; pass < 2; pass++)
		for (int q = 0; q < N; q++) {
			uint64_t h = q % 3 == 0 ? 77				 /* whole */
				   : q % 3 == 1 ? 0xABCD000000000000ULL | (uint64_t)(q & 15) /* high */
						: (uint64_t)q << 32 | 5;	 /* low */
			st_fields d = {{w}, {(size_t)snprintf(w, sizeof w, "k%d", q)}, 1, '\x1F', h};
			size_t i;
			assert_int_equal(st_add_fields(&t, &d, 1, &i), pass == 0);
			assert_int_equal(i, (size_t)q);
			assert_int_equal(t.ent[i].count, (uint64_t)pass + 1);
			d.n[0] = (size_t)snprintf(w, sizeof w, "x%d", q); /* same hash, another key */
			assert_int_equal(st_find_fields(&t, &d), -1);
		}
	assert_int_equal(t.n, N);
	/* whole keys, through st_add and st_find, in a table of their own */
	strtab u = {0};
	for (int q = 0; q < N; q++) {
		int n = snprintf(w, sizeof w, "id-%d", q);
		assert_int_equal(st_add(&u, w, (size_t)n, 1, NULL), 1);
	}
	for (int q = 0; q < N; q++) {
		int n = snprintf(w, sizeof w, "id-%d", q);
		assert_int_equal(st_find(&u, w, (size_t)n), q);
		w[0] = 'x';
		assert_int_equal(st_find(&u, w, (size_t)n), -1);
	}
	st_free(&t);
	st_free(&u);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_dates),
		cmocka_unit_test(test_tsv_reader),
		cmocka_unit_test(test_json_reader),
		cmocka_unit_test(test_strtab),
		cmocka_unit_test(test_idset),
		cmocka_unit_test(test_fields),
		cmocka_unit_test(test_fingerprints),
		cmocka_unit_test(test_engine),
		cmocka_unit_test(test_examples_order_free),
		cmocka_unit_test(test_examples_kept),
		cmocka_unit_test(test_growth),
		cmocka_unit_test(test_bad_tables),
		cmocka_unit_test(test_count_overflow),
		cmocka_unit_test(test_bad_occupations),
		cmocka_unit_test(test_key_layout),
	};
	return cmocka_run_group_tests_name("tally", tests, NULL, NULL);
}

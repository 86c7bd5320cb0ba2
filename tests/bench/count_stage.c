/* count_stage.c - the counting stage of tally alone: every posting of a
 * postings file is read and cleaned first (not timed), then the memory
 * engine counts them (timed): ids de-duplicated, keys, forms, examples.
 *
 *   count_stage POSTINGS [RUNS]
 *
 * Prints, on standard output: postings, distinct (occupation, language,
 * key) rows, the median processor seconds of RUNS counts (default 3,
 * each into a fresh engine; processor time, since the wall clock of a
 * shared machine counts other people's work) and the postings per such
 * second, and the engine's bytes per distinct row beyond its string
 * bytes.  Uses only the engine's public
 * interface (tally.h), so it builds against any tree that has it, for a
 * ratio against a baseline. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "count/tally.h"
#include "io/postings.h"
#include "norm/norm.h"
#include "norm/setup.h"

/* One cleaned posting, owned: offsets into one arena. */
typedef struct cp {
	size_t id, idlen, key, keylen, title, titlelen, ex, exlen, occ, nocc;
	int has_id;
	char lang[4];
} cp;

static double now(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_PROCESS_CPUTIME_ID, &ts);
	return (double)ts.tv_sec + (double)ts.tv_nsec / 1e9;
}

static int cmp_d(const void *a, const void *b)
{
	double x = *(const double *)a, y = *(const double *)b;
	return x < y ? -1 : x > y;
}

static size_t put(tm_buf *a, const char *s, size_t n)
{
	size_t at = a->len;
	buf_append(a, s, n);
	return at;
}

int main(int argc, char **argv)
{
	setup_opts so;
	tm_buf err = {0}, arena = {0};
	postings_reader pr;
	posting p;
	pr_row row;
	cp *v = NULL;
	size_t n = 0, cap = 0, *occ = NULL, nocc = 0, occcap = 0;
	int runs = argc > 2 ? atoi(argv[2]) : 3;

	if (argc < 2 || runs < 1) {
		fputs("usage: count_stage POSTINGS [RUNS]\n", stderr);
		return 2;
	}
	memset(&so, 0, sizeof so);
	lexicon *lx = setup_lexicon(&so, &err);
	normaliser *nm = lx ? norm_new(lx) : NULL;
	if (!nm || norm_memo(nm, (size_t)16 << 20) != 0 || pr_open(&pr, argv[1], PR_AUTO) != 0) {
		fprintf(stderr, "count_stage: cannot set up: %s\n", err.data ? err.data : argv[1]);
		return 1;
	}
	while (pr_next(&pr, &p, &row) == 0 && row != PR_END) {
		norm_result r;
		if (row != PR_POSTING)
			continue;
		if (norm_title(nm, p.title, p.titlelen, strcmp(p.lang, "und") ? p.lang : NULL, &r))
			return 1;
		cp *c = tm_grow(v, &cap, n + 1, sizeof *v, 1024);
		size_t *o = tm_grow(occ, &occcap, nocc + 2 * p.nocc, sizeof *occ, 1024);
		if (!c || !o)
			return 1;
		v = c;
		occ = o;
		c = &v[n++];
		c->has_id = p.id != NULL;
		c->idlen = p.id ? p.idlen : 0;
		c->id = put(&arena, p.id ? p.id : "", c->idlen);
		c->key = put(&arena, r.key, c->keylen = r.key_len);
		c->title = put(&arena, r.title, c->titlelen = r.title_len);
		c->ex = put(&arena, r.masked, c->exlen = r.masked_len);
		memcpy(c->lang, p.lang, sizeof c->lang);
		c->occ = nocc;
		c->nocc = p.nocc;
		for (size_t q = 0; q < p.nocc; q++) {
			occ[nocc++] = put(&arena, p.occ[q], p.occlen[q]);
			occ[nocc++] = p.occlen[q];
		}
	}
	pr_close(&pr);
	if (buf_status(&arena) != 0)
		return 1;

	double *secs = calloc((size_t)runs, sizeof *secs);
	size_t rows = 0;
	double per_row = 0;
	for (int k = 0; k < runs; k++) {
		tally_mem m;
		double t0;
		tm_init(&m);
		t0 = now();
		for (size_t i = 0; i < n; i++) {
			const cp *c = &v[i];
			const char *op[PR_MAXOCC];
			size_t ol[PR_MAXOCC];
			tally_posting tp;
			for (size_t q = 0; q < c->nocc; q++) {
				op[q] = arena.data + occ[c->occ + 2 * q];
				ol[q] = occ[c->occ + 2 * q + 1];
			}
			memset(&tp, 0, sizeof tp);
			tp.id = c->has_id ? arena.data + c->id : NULL;
			tp.idlen = c->idlen;
			tp.lang = c->lang;
			tp.key = arena.data + c->key;
			tp.keylen = c->keylen;
			tp.title = arena.data + c->title;
			tp.titlelen = c->titlelen;
			tp.example = arena.data + c->ex;
			tp.examplelen = c->exlen;
			tp.occ = op;
			tp.occlen = ol;
			tp.nocc = c->nocc;
			if (tm_add(&m, &tp) < 0)
				return 1;
		}
		secs[k] = now() - t0;
		rows = tm_ntriples(&m);
		per_row = rows ? (double)(tm_bytes(&m) - tm_string_bytes(&m)) / (double)rows : 0.0;
		tm_free(&m);
	}
	qsort(secs, (size_t)runs, sizeof *secs, cmp_d);
	double med = secs[runs / 2];
	printf("postings %zu rows %zu cpu_seconds %.4f rate %.0f bytes_per_row %.1f\n", n, rows, med,
	       med > 0 ? (double)n / med : 0.0, per_row);
	free(secs);
	free(v);
	free(occ);
	buf_free(&arena);
	buf_free(&err);
	norm_free(nm);
	lex_free(lx);
	return 0;
}

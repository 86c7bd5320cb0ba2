/* inputs.c - the labels and counts the ranking commands read. */
#include <stdio.h>
#include <string.h>

#include "count/tally.h"
#include "rank/inputs.h"
#include "io/postings.h"

/* Is path a counts table (its header names the table's columns)? */
static int is_counts(const char *path)
{
	char line[256];
	FILE *fp = fopen(path, "rb");
	int r = 0;
	if (!fp)
		return 0;
	if (fgets(line, sizeof line, fp)) {
		const char *p = line;
		if (!strncmp(p, "\xEF\xBB\xBF", 3))
			p += 3;
		r = !strncmp(p, "kind\toccupation\t", 16);
	}
	fclose(fp);
	return r;
}

static void set_err(tm_buf *err, const tm_buf *from)
{
	buf_reset(err);
	buf_append(err, from->data ? from->data : "", from->len);
}

/* Adds the postings of path to m, cleaned by nm. */
static int count_postings(tally_mem *m, normaliser *nm, const char *path, FILE *warn,
			  tm_buf *err)
{
	postings_reader pr;
	posting p;
	pr_row row;
	int r;
	long bad = 0;

	if (pr_open(&pr, path, PR_AUTO) != 0) {
		set_err(err, &pr.err);
		pr_close(&pr);
		return -1;
	}
	while ((r = pr_next(&pr, &p, &row)) == 0 && row != PR_END) {
		norm_result res;
		tally_posting tp;
		if (row == PR_SKIP) {
			if (bad++ < 5)
				fprintf(warn, "titlemill: %.*s (skipped)\n", (int)pr.err.len, pr.err.data);
			continue;
		}
		if (pr.lr.noeol)
			fprintf(warn, "titlemill: %s:%ld: the last row has no line end: was the file "
				"cut short? (counted as it is)\n", pr.lr.name, p.line);
		if (norm_title(nm, p.title, p.titlelen, strcmp(p.lang, "und") ? p.lang : NULL, &res))
			goto oom;
		tally_posting_of(&tp, &p, &res);
		if (tm_add(m, &tp) < 0)
			goto oom;
	}
	if (r < 0) {
		set_err(err, &pr.err);
		pr_close(&pr);
		return -1;
	}
	if (bad > 5)
		fprintf(warn, "titlemill: %s: %ld malformed rows skipped in all\n", pr.lr.name, bad);
	pr_close(&pr);
	return 0;
oom:
	pr_close(&pr);
	buf_reset(err);
	buf_puts(err, "out of memory");
	return -1;
}

int inputs_load(rank_inputs *in, const rank_sources *src, FILE *warn, tm_buf *err)
{
	memset(in, 0, sizeof *in);
	tm_init(&in->m);
	if (!(in->lx = setup_lexicon(src->setup, err)))
		return -1;
	in->nm = norm_new(in->lx);
	if (!in->nm || norm_memo(in->nm, src->memo_bytes) != 0) {
		buf_puts(err, "out of memory");
		return -1;
	}
	if (labels_read(&in->ls, src->setup->labels, in->nm, warn, err) != 0)
		return -1;
	if (src->store_url) {
		store_conf sc = STORE_CONF_INIT(src->prefix);
		store *st = store_open(src->store_url, &sc, err);
		int rc = 0;
		if (!st || st->ops->dump(st, &in->m) != 0) {
			if (st)
				set_err(err, &st->err);
			rc = -1;
		}
		store_close(st);
		if (rc)
			return -1;
	}
	for (int i = 0; i < src->npaths; i++)
		if ((is_counts(src->paths[i]) ? tm_read(&in->m, src->paths[i], err)
					      : count_postings(&in->m, in->nm, src->paths[i], warn, err)) != 0)
			return -1;
	return 0;
}

void inputs_free(rank_inputs *in)
{
	labels_free(&in->ls);
	tm_free(&in->m);
	norm_free(in->nm);
	lex_free(in->lx);
	memset(in, 0, sizeof *in);
}

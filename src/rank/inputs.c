/* inputs.c - the labels and counts the ranking commands read. */
#include <errno.h>
#include <stdio.h>
#include <string.h>
#include <sys/types.h>
#include <unistd.h>

#include "core/msg.h"
#include "count/tally.h"
#include "rank/inputs.h"
#include "io/postings.h"

/* Is a header a counts table's (it names the table's first columns)? */
static int counts_header(const char *line, size_t n)
{
	static const char bom[] = "\xEF\xBB\xBF", head[] = "kind\toccupation\t";
	if (n >= 3 && !memcmp(line, bom, 3)) {
		line += 3;
		n -= 3;
	}
	return n >= sizeof head - 1 && !memcmp(line, head, sizeof head - 1);
}

/* Makes standard input readable twice from where it stands: a file given
 * with '<' is; a pipe or terminal is copied to an unlinked temporary file
 * that takes its place as descriptor 0.  Nothing of stdin's FILE has been
 * read yet, so its reader later starts at the first byte.  *at receives
 * the offset of the first byte.  Returns 0, or -1 with a message in err. */
static int stdin_rewindable(off_t *at, tm_buf *err)
{
	char b[65536];
	ssize_t n;
	FILE *tmp;

	if ((*at = lseek(0, 0, SEEK_CUR)) >= 0)
		return 0;
	if (!(tmp = tmpfile()))
		return tm_failf(err, TM_EFAIL, "<stdin>: no temporary file to hold it: %s",
				strerror(errno));
	while ((n = read(0, b, sizeof b)) != 0) {
		if (n < 0 && errno == EINTR)
			continue;
		if (n < 0 || fwrite(b, 1, (size_t)n, tmp) != (size_t)n) {
			int e = errno;
			fclose(tmp);
			return tm_failf(err, TM_EFAIL, "<stdin>: %s while copying it to a temporary "
					"file", strerror(e));
		}
	}
	if (fflush(tmp) != 0 || dup2(fileno(tmp), 0) < 0 || lseek(0, 0, SEEK_SET) < 0) {
		int e = errno;
		fclose(tmp);
		return tm_failf(err, TM_EFAIL, "<stdin>: %s while copying it to a temporary file",
				strerror(e));
	}
	fclose(tmp);
	*at = 0;
	return 0;
}

/* Is path a counts table (its header names the table's columns)?  1, 0,
 * or -1 with a message in err ("-": standard input made rewindable). */
static int is_counts(const char *path, tm_buf *err)
{
	char line[256];
	int r = 0;
	if (!strcmp(path, "-")) {
		off_t at;
		ssize_t n;
		if (stdin_rewindable(&at, err) != 0)
			return -1;
		while ((n = pread(0, line, sizeof line, at)) < 0 && errno == EINTR)
			;
		return n > 0 && counts_header(line, (size_t)n);
	}
	FILE *fp = fopen(path, "rb");
	if (!fp)
		return 0; /* the reader says why */
	if (fgets(line, sizeof line, fp))
		r = counts_header(line, strlen(line));
	fclose(fp);
	return r;
}

static void set_err(tm_buf *err, const tm_buf *from)
{
	buf_reset(err);
	buf_append(err, from->data ? from->data : "", from->len);
}

/* Adds the postings of path to s, cleaned by nm. */
static int count_postings(tally_series *s, normaliser *nm, const char *path, FILE *warn,
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
				msg_warnf(warn, "%.*s (skipped)\n", (int)pr.err.len, pr.err.data);
			continue;
		}
		if (pr.lr.noeol)
			msg_warnf(warn, "%s:%ld: the last row has no line end: was the file "
				"cut short? (counted as it is)\n", pr.lr.name, p.line);
		if (norm_title(nm, p.title, p.titlelen, strcmp(p.lang, "und") ? p.lang : NULL, &res))
			goto oom;
		tally_posting_of(&tp, &p, &res);
		int ar = series_add(s, &tp, err);
		if (ar == -1)
			goto oom;
		if (ar == -2) {
			char why[300];
			snprintf(why, sizeof why, "%s:%ld: %.*s", pr.lr.name, p.line, (int)err->len,
				 err->data ? err->data : "");
			buf_reset(err);
			buf_puts(err, why);
			pr_close(&pr);
			return -1;
		}
	}
	if (r < 0) {
		set_err(err, &pr.err);
		pr_close(&pr);
		return -1;
	}
	if (bad > 5)
		msg_warnf(warn, "%s: %ld malformed rows skipped in all\n", pr.lr.name, bad);
	pr_close(&pr);
	return 0;
oom:
	pr_close(&pr);
	buf_reset(err);
	buf_puts(err, "out of memory");
	return -1;
}

static int add_code(void *ctx, const tm_triple *t);

int inputs_load(rank_inputs *in, const rank_sources *src, FILE *warn, tm_buf *err)
{
	memset(in, 0, sizeof *in);
	tm_init(&in->m);
	series_init(&in->s, src->period);
	if (src->windowed)
		series_window(&in->s, src->from, src->to);
	if (!(in->lx = setup_lexicon(src->setup, err)))
		return -1;
	in->nm = norm_new(in->lx);
	if (!in->nm || norm_memo(in->nm, src->memo_bytes) != 0) {
		buf_puts(err, "out of memory");
		return -1;
	}
	if (src->id_map && labels_idmap_read(&in->map, src->id_map, err) != 0)
		return -1;
	in->map.local = src->ids_local;
	const labels_idmap *map = src->id_map || src->ids_local ? &in->map : NULL;
	/* matching on local names needs the codes first */
	if (!src->ids_local &&
	    labels_read_mapped(&in->ls, src->setup->labels, in->nm, map, warn, err) != 0)
		return -1;
	if (src->store_url) {
		store_conf sc = STORE_CONF_INIT(src->prefix);
		store *st = store_open(src->store_url, &sc, err);
		int rc = 0;
		if (!st || st->ops->dump(st, &in->s) != 0) {
			if (st)
				set_err(err, &st->err);
			rc = -1;
		}
		store_close(st);
		if (rc)
			return -1;
	}
	for (int i = 0; i < src->npaths; i++) {
		int c = is_counts(src->paths[i], err);
		if (c < 0 || (c ? series_read(&in->s, src->paths[i], err)
				: count_postings(&in->s, in->nm, src->paths[i], warn, err)) != 0)
			return -1;
	}
	if (src->period == PERIOD_NONE) {
		tally_mem *all = series_all(&in->s);
		if (!all) {
			buf_reset(err);
			buf_puts(err, "out of memory");
			return -1;
		}
		tm_free(&in->m);
		in->m = *all; /* moved: the series keeps an empty engine */
		tm_init(all);
	} else if (series_merge_all(&in->s, &in->m) != 0) {
		buf_reset(err);
		buf_puts(err, "out of memory, or the counts add up past 2^64 - 1");
		return -1;
	}
	if (src->ids_local) {
		if (tm_each_triple(&in->m, add_code, &in->map) != 0) {
			buf_reset(err);
			buf_puts(err, "out of memory");
			return -1;
		}
		if (in->map.shared) {
			size_t al, bl;
			const char *a = st_key(&in->map.codes, in->map.shared_a, &al),
				   *b = st_key(&in->map.codes, in->map.shared_b, &bl);
			msg_warnf(warn, "--ids local: %ld code%s share%s a local name with another "
				  "('%.*s' and '%.*s'); a concept of that name is read under the "
				  "first\n", in->map.shared, msg_plural((unsigned long long)in->map.shared),
				  in->map.shared == 1 ? "s" : "", (int)al, a, (int)bl, b);
		}
		if (labels_read_mapped(&in->ls, src->setup->labels, in->nm, map, warn, err) != 0)
			return -1;
	}
	return 0;
}

/* tm_each_triple: each code of the counts, once (triples come sorted by
 * occupation). */
static int add_code(void *ctx, const tm_triple *t)
{
	labels_idmap *m = ctx;
	return labels_idmap_code(m, t->occ, t->ol) ? -1 : 0;
}

/* The part of a joined key before its first 0x1F, and the rest. */
static void split1f(const char *k, size_t n, size_t *head, const char **rest, size_t *rl)
{
	const char *u = memchr(k, '\x1F', n);
	*head = u ? (size_t)(u - k) : n;
	*rest = u ? u + 1 : k + n;
	*rl = u ? n - *head - 1 : 0;
}

static int same(const char *a, size_t al, const char *b)
{
	return b && strlen(b) == al && !memcmp(a, b, al);
}

/* Keeps s->unmatched the INPUTS_IDS_SHOWN smallest codes in byte order. */
static void keep_smallest(inputs_survey *s, const char *o, size_t ol)
{
	int i = s->nunmatched;
	if (i == INPUTS_IDS_SHOWN) {
		const char *l = s->unmatched[i - 1];
		size_t ll = s->unmatched_len[i - 1];
		int c = memcmp(o, l, ol < ll ? ol : ll);
		if (c > 0 || (c == 0 && ol >= ll))
			return;
		i--;
	} else
		s->nunmatched++;
	for (; i > 0; i--) {
		const char *p = s->unmatched[i - 1];
		size_t pl = s->unmatched_len[i - 1];
		int c = memcmp(o, p, ol < pl ? ol : pl);
		if (c > 0 || (c == 0 && ol > pl))
			break;
		s->unmatched[i] = p;
		s->unmatched_len[i] = pl;
	}
	s->unmatched[i] = o;
	s->unmatched_len[i] = ol;
}

/* One pass over the occupation rows and one over the key rows of the
 * counts (no sorting: linear in the counts). */
int inputs_survey_run(rank_inputs *in, const char *occ, const char *lang, inputs_survey *s)
{
	return inputs_survey_counts(&in->m, &in->ls, occ, lang, s);
}

int inputs_survey_counts(const tally_mem *m, const labelset *ls, const char *occ,
			 const char *lang, inputs_survey *s)
{
	const strtab *occs = &m->occs, *keys = &m->keys;
	strtab seen = {0};
	int rc = 0;

	memset(s, 0, sizeof *s);
	for (size_t i = 0; i < occs->n; i++) {
		size_t n, ol, ll;
		const char *k = st_key(occs, i, &n), *lg;
		uint64_t c = occs->ent[i].count;
		split1f(k, n, &ol, &lg, &ll);
		int r = st_add(&seen, k, ol, 0, NULL);
		if (r < 0) {
			rc = -1;
			break;
		}
		if (r == 1) {
			s->occupations++;
			if (labels_has_occ(ls, k, ol))
				s->labelled++;
			else
				keep_smallest(s, k, ol);
		}
		int occ_ok = !occ || same(k, ol, occ), lang_ok = !lang || same(lg, ll, lang);
		s->occ_seen |= occ_ok && c;
		s->lang_seen |= lang_ok && c;
		s->both_seen |= occ_ok && lang_ok && c;
		if (occ && occ_ok && lang_ok)
			s->distinct += c; /* a posting counts once per occupation */
	}
	/* without an occupation: each posting once, under its language and key */
	for (size_t i = 0; !occ && rc == 0 && i < keys->n; i++) {
		size_t n, ll, kl;
		const char *k = st_key(keys, i, &n), *key;
		split1f(k, n, &ll, &key, &kl);
		if (!lang || same(k, ll, lang))
			s->distinct += keys->ent[i].count;
	}
	st_free(&seen);
	return rc;
}

void inputs_free(rank_inputs *in)
{
	labels_free(&in->ls);
	labels_idmap_free(&in->map);
	tm_free(&in->m);
	series_free(&in->s);
	norm_free(in->nm);
	lex_free(in->lx);
	memset(in, 0, sizeof *in);
}

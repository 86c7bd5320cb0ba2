/* cli_rank.c - titlemill coverage: how much of each occupation's postings
 * its labels already match. */
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "jsonw.h"
#include "labels.h"
#include "lang.h"
#include "norm.h"
#include "postings.h"
#include "setup.h"
#include "stats.h"
#include "store.h"
#include "tally.h"

#define TOP 5

static const char coverage_usage[] =
	"usage: titlemill coverage --labels FILE [--json] [--occupation ID] [--lang L]\n"
	"                          (COUNTS|POSTINGS...|--store URL [--prefix P])\n"
	"\n"
	"Per occupation and language: postings, postings whose key matches one of\n"
	"its labels (a share with its Wilson 95 % interval), the share matched by\n"
	"the preferred label alone, labels never seen, and the top unmatched titles.\n"
	"A last line sums all occupations.  Inputs are counts tables (from tally or\n"
	"counts) or postings files (counted in memory first, with the labels\n"
	"protected), or what a store holds.\n"
	"\n"
	"  --labels FILE    the taxonomy's labels TSV (occupation, kind, lang, label)\n"
	"  --json           JSON Lines instead of TSV\n"
	"  --occupation ID  only this occupation\n"
	"  --lang L         only this language\n"
	"  --store URL      read the counts of a Redis store (see tally)\n"
	"  --prefix P       the store's key prefix (default titlemill)\n"
	"  --lexicons DIR   read the lexicons in DIR too (repeatable)\n"
	"  -h, --help       show this help\n";

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

/* Adds postings from path to m, cleaned by nm. */
static int count_postings(tally_mem *m, normaliser *nm, const char *path, tm_buf *err)
{
	postings_reader pr;
	posting p;
	int r;
	long bad = 0;

	if (pr_open(&pr, path, PR_AUTO) != 0) {
		buf_reset(err);
		buf_append(err, pr.err.data, pr.err.len);
		pr_close(&pr);
		return -1;
	}
	while ((r = pr_next_row(&pr, &p)) != 0) {
		norm_result res;
		tally_posting tp;
		if (r == TM_EINPUT) {
			if (bad++ < 5)
				fprintf(stderr, "titlemill: %.*s (skipped)\n", (int)pr.err.len, pr.err.data);
			continue;
		}
		if (r < 0) {
			buf_reset(err);
			buf_append(err, pr.err.data, pr.err.len);
			pr_close(&pr);
			return -1;
		}
		if (pr.lr.noeol)
			fprintf(stderr, "titlemill: %s:%ld: the last row has no line end: was the file "
				"cut short? (counted as it is)\n", pr.lr.name, p.line);
		if (norm_title(nm, p.title, p.titlelen, strcmp(p.lang, "und") ? p.lang : NULL, &res))
			goto oom;
		cli_tally_posting(&tp, &p, &res);
		if (tm_add(m, &tp) < 0)
			goto oom;
	}
	if (bad > 5)
		fprintf(stderr, "titlemill: %s: %ld malformed rows skipped in all\n", pr.lr.name, bad);
	pr_close(&pr);
	return 0;
oom:
	pr_close(&pr);
	buf_reset(err);
	buf_puts(err, "out of memory");
	return -1;
}

/* Loads the labels and the counts (tables, postings, a store) for the
 * ranking commands.  *nmp and *lxp receive the normaliser and lexicon
 * (the caller frees them).  Returns 0, or -1 with a message in err. */
int coverage_load(tally_mem *m, labelset *ls, normaliser **nmp, lexicon **lxp,
		  setup_opts *so, const char *surl, store_conf *sc, int argc, char **argv,
		  int first, tm_buf *err);

int coverage_load(tally_mem *m, labelset *ls, normaliser **nmp, lexicon **lxp,
		  setup_opts *so, const char *surl, store_conf *sc, int argc, char **argv,
		  int first, tm_buf *err)
{
	memset(ls, 0, sizeof *ls);
	if (!(*lxp = setup_lexicon(so, err)))
		return -1;
	*nmp = norm_new(*lxp);
	if (!*nmp || norm_memo(*nmp, 16u << 20) != 0) {
		buf_puts(err, "out of memory");
		return -1;
	}
	if (labels_read(ls, so->labels, *nmp, stderr, err) != 0)
		return -1;
	if (surl) {
		store *st = store_open(surl, sc, err);
		int rc = 0;
		if (!st || st->ops->dump(st, m) != 0) {
			if (st) {
				buf_reset(err);
				buf_append(err, st->err.data, st->err.len);
			}
			rc = -1;
		}
		store_close(st);
		if (rc)
			return -1;
	}
	for (int i = first; i < argc; i++)
		if ((is_counts(argv[i]) ? tm_read(m, argv[i], err)
					: count_postings(m, *nmp, argv[i], err)) != 0)
			return -1;
	return 0;
}

typedef struct top_t {
	tm_buf title, key;
	uint64_t n;
} top_t;

typedef struct cov {
	labelset *ls;
	tally_mem *m;
	int json;
	const char *only_occ, *only_lang;
	/* the group being summed */
	tm_buf occ;
	char lang[4];
	int open;
	uint64_t postings, matched, pref, seen;
	top_t top[TOP];
	int ntop;
	/* all groups */
	uint64_t t_postings, t_matched, t_pref, t_labels, t_unseen, rows;
	tm_buf out;
} cov;

static int put_num(tm_buf *b, double v)
{
	char s[32];
	snprintf(s, sizeof s, "%.4f", v);
	return buf_puts(b, s);
}

static int put_u(tm_buf *b, uint64_t v)
{
	char s[32];
	snprintf(s, sizeof s, "%llu", (unsigned long long)v);
	return buf_puts(b, s);
}

static void emit(cov *c, const char *occ, size_t ol, const char *lang, uint64_t postings,
		 uint64_t matched, uint64_t pref, uint64_t labels, uint64_t unseen,
		 const top_t *top, int ntop)
{
	double lo, hi, share = postings ? (double)matched / (double)postings : 0,
		       pshare = postings ? (double)pref / (double)postings : 0;
	tm_buf *b = &c->out;
	wilson(matched, postings, STATS_Z95, &lo, &hi);
	if (c->json) {
		buf_puts(b, "{\"occupation\":");
		json_str(b, occ, ol);
		buf_puts(b, ",\"lang\":");
		json_str(b, lang, strlen(lang));
		buf_puts(b, ",\"postings\":");
		put_u(b, postings);
		buf_puts(b, ",\"matched\":");
		put_u(b, matched);
		buf_puts(b, ",\"coverage\":");
		put_num(b, share);
		buf_puts(b, ",\"coverage_low\":");
		put_num(b, lo);
		buf_puts(b, ",\"coverage_high\":");
		put_num(b, hi);
		buf_puts(b, ",\"pref_matched\":");
		put_u(b, pref);
		buf_puts(b, ",\"pref_coverage\":");
		put_num(b, pshare);
		buf_puts(b, ",\"labels\":");
		put_u(b, labels);
		buf_puts(b, ",\"labels_unseen\":");
		put_u(b, unseen);
		buf_puts(b, ",\"top_unmatched\":[");
		for (int i = 0; i < ntop; i++) {
			if (i)
				buf_putc(b, ',');
			buf_puts(b, "{\"title\":");
			json_str(b, top[i].title.data ? top[i].title.data : "", top[i].title.len);
			buf_puts(b, ",\"key\":");
			json_str(b, top[i].key.data ? top[i].key.data : "", top[i].key.len);
			buf_puts(b, ",\"postings\":");
			put_u(b, top[i].n);
			buf_putc(b, '}');
		}
		buf_puts(b, "]}\n");
	} else {
		buf_append(b, occ, ol);
		buf_putc(b, '\t');
		buf_puts(b, lang);
		buf_putc(b, '\t');
		put_u(b, postings);
		buf_putc(b, '\t');
		put_u(b, matched);
		buf_putc(b, '\t');
		put_num(b, share);
		buf_putc(b, '\t');
		put_num(b, lo);
		buf_putc(b, '\t');
		put_num(b, hi);
		buf_putc(b, '\t');
		put_u(b, pref);
		buf_putc(b, '\t');
		put_num(b, pshare);
		buf_putc(b, '\t');
		put_u(b, labels);
		buf_putc(b, '\t');
		put_u(b, unseen);
		buf_putc(b, '\t');
		for (int i = 0; i < ntop; i++) {
			if (i)
				buf_puts(b, "; ");
			buf_append(b, top[i].title.data, top[i].title.len);
			buf_puts(b, " (");
			put_u(b, top[i].n);
			buf_putc(b, ')');
		}
		buf_putc(b, '\n');
	}
}

static void flush_group(cov *c)
{
	if (!c->open)
		return;
	uint64_t labels = labels_count(c->ls, c->occ.data, c->occ.len, c->lang);
	uint64_t unseen = labels > c->seen ? labels - c->seen : 0;
	c->postings = tm_occ_postings(c->m, c->occ.data, c->occ.len, c->lang);
	emit(c, c->occ.data, c->occ.len, c->lang, c->postings, c->matched, c->pref, labels,
	     unseen, c->top, c->ntop);
	c->t_postings += c->postings;
	c->t_matched += c->matched;
	c->t_pref += c->pref;
	c->t_labels += labels;
	c->t_unseen += unseen;
	c->rows++;
	c->open = 0;
}

static int on_triple(void *ctx, const tm_triple *t)
{
	cov *c = ctx;
	char lang[4] = {0};
	memcpy(lang, t->lang, t->ll < 3 ? t->ll : 3);
	if (c->only_occ && (strlen(c->only_occ) != t->ol || memcmp(c->only_occ, t->occ, t->ol)))
		return 0;
	if (c->only_lang && strcmp(c->only_lang, lang))
		return 0;
	if (!c->open || c->occ.len != t->ol || memcmp(c->occ.data, t->occ, t->ol) ||
	    strcmp(c->lang, lang)) {
		flush_group(c);
		buf_reset(&c->occ);
		buf_append(&c->occ, t->occ, t->ol);
		memcpy(c->lang, lang, 4);
		c->open = 1;
		c->matched = c->pref = c->seen = 0;
		c->ntop = 0;
	}
	if (t->kl && labels_find(c->ls, t->occ, t->ol, lang, t->key, t->kl)) {
		c->matched += t->postings;
		c->seen++;
		if (labels_is_pref(c->ls, t->occ, t->ol, lang, t->key, t->kl))
			c->pref += t->postings;
		return 0;
	}
	/* the biggest unmatched titles; ties keep the first in key order */
	int pos = c->ntop;
	while (pos > 0 && c->top[pos - 1].n < t->postings)
		pos--;
	if (pos >= TOP)
		return 0;
	if (c->ntop < TOP)
		c->ntop++;
	top_t last = c->top[c->ntop - 1];
	memmove(&c->top[pos + 1], &c->top[pos], (size_t)(c->ntop - 1 - pos) * sizeof c->top[0]);
	c->top[pos] = last; /* reuse the buffers of the one pushed out */
	buf_reset(&c->top[pos].title);
	buf_reset(&c->top[pos].key);
	buf_append(&c->top[pos].title, t->title, t->tl);
	buf_append(&c->top[pos].key, t->key, t->kl);
	c->top[pos].n = t->postings;
	return 0;
}

int cmd_coverage(int argc, char **argv)
{
	static const struct option longopts[] = {
		{"labels", required_argument, NULL, 'L'},
		{"json", no_argument, NULL, 'j'},
		{"occupation", required_argument, NULL, 'O'},
		{"lang", required_argument, NULL, 'l'},
		{"store", required_argument, NULL, 'S'},
		{"prefix", required_argument, NULL, 'P'},
		{"lexicons", required_argument, NULL, 'x'},
		{"help", no_argument, NULL, 'h'},
		{NULL, 0, NULL, 0},
	};
	const char *surl = NULL;
	store_conf sc = {NULL, 5, 5000, 0};
	setup_opts so;
	char lang[4];
	cov c;
	labelset ls;
	tally_mem m;
	tm_buf err = {0};
	lexicon *lx;
	normaliser *nm;
	int ch, rc = EXIT_OK;

	memset(&so, 0, sizeof so);
	memset(&c, 0, sizeof c);
	optind = 1;
	while ((ch = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
		switch (ch) {
		case 'L': so.labels = optarg; break;
		case 'j': c.json = 1; break;
		case 'O': c.only_occ = optarg; break;
		case 'l':
			if (lang_tag(optarg, lang) != 0) {
				fprintf(stderr, "titlemill coverage: --lang: '%s' is not a BCP 47 language tag\n", optarg);
				return EXIT_USAGE;
			}
			c.only_lang = lang;
			break;
		case 'S': surl = optarg; break;
		case 'P':
			if (cli_check_prefix("coverage", optarg))
				return EXIT_USAGE;
			sc.prefix = optarg;
			break;
		case 'x':
			if (so.nextra == 16)
				return EXIT_USAGE;
			so.extra[so.nextra++] = optarg;
			break;
		case 'h': fputs(coverage_usage, stdout); return EXIT_OK;
		default: fputs(coverage_usage, stderr); return EXIT_USAGE;
		}
	}
	if (!so.labels) {
		fputs("titlemill coverage: --labels FILE is required\n", stderr);
		return EXIT_USAGE;
	}
	if (!surl && optind >= argc) {
		fputs("titlemill coverage: name a counts table or postings files, or --store\n", stderr);
		return EXIT_USAGE;
	}
	if (!(lx = setup_lexicon(&so, &err))) {
		fprintf(stderr, "titlemill coverage: %.*s\n", (int)err.len, err.data ? err.data : "");
		buf_free(&err);
		return EXIT_RUNTIME;
	}
	nm = norm_new(lx);
	if (!nm || norm_memo(nm, 16u << 20) != 0) {
		fputs("titlemill coverage: out of memory\n", stderr);
		lex_free(lx);
		return EXIT_RUNTIME;
	}
	tm_init(&m);
	if (labels_read(&ls, so.labels, nm, stderr, &err) != 0)
		rc = EXIT_RUNTIME;
	if (rc == EXIT_OK && surl) {
		store *st = store_open(surl, &sc, &err);
		if (!st || st->ops->dump(st, &m) != 0) {
			if (st) {
				buf_reset(&err);
				buf_append(&err, st->err.data, st->err.len);
			}
			rc = EXIT_RUNTIME;
		}
		store_close(st);
	}
	for (int i = optind; i < argc && rc == EXIT_OK; i++)
		if ((is_counts(argv[i]) ? tm_read(&m, argv[i], &err)
					: count_postings(&m, nm, argv[i], &err)) != 0)
			rc = EXIT_RUNTIME;
	if (rc == EXIT_OK) {
		c.ls = &ls;
		c.m = &m;
		if (!c.json)
			buf_puts(&c.out, "occupation\tlang\tpostings\tmatched\tcoverage\tcoverage_low\t"
					 "coverage_high\tpref_matched\tpref_coverage\tlabels\tlabels_unseen\t"
					 "top_unmatched\n");
		if (tm_each_triple(&m, on_triple, &c) != 0)
			rc = EXIT_RUNTIME;
		flush_group(&c);
		emit(&c, "*", 1, "*", c.t_postings, c.t_matched, c.t_pref, c.t_labels, c.t_unseen, NULL, 0);
		if (fwrite(c.out.data, 1, c.out.len, stdout) != c.out.len || fflush(stdout) != 0) {
			fprintf(stderr, "titlemill coverage: write error: %s\n", strerror(errno));
			rc = EXIT_RUNTIME;
		}
	} else
		fprintf(stderr, "titlemill coverage: %.*s\n", (int)err.len, err.data ? err.data : "");
	for (int i = 0; i < TOP; i++) {
		buf_free(&c.top[i].title);
		buf_free(&c.top[i].key);
	}
	buf_free(&c.occ);
	buf_free(&c.out);
	labels_free(&ls);
	tm_free(&m);
	norm_free(nm);
	lex_free(lx);
	buf_free(&err);
	return rc;
}

/* titlemill labels: a taxonomy's labels (TSV or SKOS) as a labels TSV
 * with their match keys. */
int cmd_labels(int argc, char **argv)
{
	setup_opts so;
	tm_buf err = {0}, out = {0};
	int rc = EXIT_OK;

	memset(&so, 0, sizeof so);
	if (argc < 2 || !strcmp(argv[1], "--help") || !strcmp(argv[1], "-h")) {
		fputs("usage: titlemill labels FILE...\n\n"
		      "Prints the labels of labels TSVs or SKOS files (Turtle .ttl, N-Triples .nt:\n"
		      "skos:prefLabel, altLabel, hiddenLabel with a language tag) as one labels\n"
		      "TSV, with each label's match key; doubtful labels are reported.\n",
		      argc < 2 ? stderr : stdout);
		return argc < 2 ? EXIT_USAGE : EXIT_OK;
	}
	lexicon *lx = setup_lexicon(&so, &err);
	normaliser *nm = lx ? norm_new(lx) : NULL;
	if (!nm) {
		fprintf(stderr, "titlemill labels: %.*s\n", (int)err.len, err.data ? err.data : "out of memory");
		lex_free(lx);
		return EXIT_RUNTIME;
	}
	buf_puts(&out, "occupation\tkind\tlang\tlabel\tkey\n");
	for (int i = 1; i < argc && rc == EXIT_OK; i++) {
		labelset ls;
		if (labels_read(&ls, argv[i], nm, stderr, &err) != 0) {
			fprintf(stderr, "titlemill labels: %.*s\n", (int)err.len, err.data);
			rc = EXIT_RUNTIME;
		} else
			for (size_t k = 0; k < ls.n; k++) {
				const label *lb = &ls.v[k];
				buf_append(&out, lab_str(&ls, lb->occ), lb->occlen);
				buf_puts(&out, lb->kind == 'p' ? "\tpref\t" : lb->kind == 'a' ? "\talt\t" : "\thidden\t");
				buf_puts(&out, lb->lang);
				buf_putc(&out, '\t');
				/* a TAB or newline in a literal would break the table */
				for (uint32_t q = 0; q < lb->textlen; q++) {
					char ch = lab_str(&ls, lb->text)[q];
					buf_putc(&out, ch == '\t' || ch == '\n' || ch == '\r' ? ' ' : ch);
				}
				buf_putc(&out, '\t');
				buf_append(&out, lab_str(&ls, lb->key), lb->keylen);
				buf_putc(&out, '\n');
			}
		labels_free(&ls);
	}
	if (rc == EXIT_OK && (fwrite(out.data, 1, out.len, stdout) != out.len || fflush(stdout))) {
		fprintf(stderr, "titlemill labels: write error: %s\n", strerror(errno));
		rc = EXIT_RUNTIME;
	}
	buf_free(&out);
	buf_free(&err);
	norm_free(nm);
	lex_free(lx);
	return rc;
}

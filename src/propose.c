/* propose.c - titlemill propose: scored suggestions for the curators.
 *
 * Every threshold lives in struct bars below and is an option; the
 * README explains each.  Suggestions are evidence for a human curator,
 * who decides. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "decode.h"
#include "jsonw.h"
#include "labels.h"
#include "lang.h"
#include "norm.h"
#include "setup.h"
#include "stats.h"
#include "store.h"
#include "tally.h"
#include "token.h"
#include "unicode.h"

/* The evidence bars, with their defaults. */
typedef struct bars {
	uint64_t min_postings;   /* new_alt_label: postings of the title (5) */
	double min_share;        /* new_alt_label: lower Wilson bound of the share of the occupation's postings (0.01) */
	double min_precision;    /* new_alt_label: share of the key's postings that carry the occupation (0.6) */
	double min_g2;           /* new_alt_label: G^2 above chi2(1 df) at p = 0.001 (10.827566) */
	uint64_t hidden_min;     /* new_hidden_label: postings of the variant (3) */
	double hidden_precision; /* new_hidden_label: precision of the variant (0.5) */
	uint64_t rare_min;       /* rare_label: postings of the occupation (200) */
	double rare_share;       /* rare_label: upper Wilson bound below it (0.005) */
	double elsewhere_share;  /* used_elsewhere: share of the key's postings with another occupation (0.6) */
	uint64_t elsewhere_min;  /* used_elsewhere: postings of the key (5) */
} bars;

enum { K_ALT, K_HIDDEN, K_RARE, K_ELSEWHERE, K_N };
static const char *const kind_names[K_N] = {"new_alt_label", "new_hidden_label",
					    "rare_label", "used_elsewhere"};

typedef struct trip {
	const char *occ, *lang, *key, *title;
	size_t ol, ll, kl, tl;
	uint64_t k;
} trip;

typedef struct sugg {
	int kind;
	const trip *t;          /* the title (alt, hidden) or NULL */
	const label *lb;        /* the label (rare, elsewhere, the label varied) */
	const char *occ, *key;
	size_t ol, kl;
	char lang[4];
	uint64_t k, n, kt, nl;   /* postings: title, occupation, key, language */
	double score, g2, precision;
	const trip *rival;      /* the strongest other occupation of the key */
	const char *variant;    /* "spacing" or "typo" */
	char id[17];
} sugg;

typedef struct ctx {
	trip *t;
	size_t n, cap;
} ctx;

static int collect(void *c0, const tm_triple *x)
{
	ctx *c = c0;
	if (c->n == c->cap) {
		size_t cap = c->cap ? c->cap * 2 : 4096;
		trip *p = realloc(c->t, cap * sizeof *p);
		if (!p)
			return -1;
		c->t = p;
		c->cap = cap;
	}
	trip *t = &c->t[c->n++];
	t->occ = x->occ;
	t->ol = x->ol;
	t->lang = x->lang;
	t->ll = x->ll;
	t->key = x->key;
	t->kl = x->kl;
	t->title = x->title;
	t->tl = x->tl;
	t->k = x->postings;
	return 0;
}

static int same(const char *a, size_t an, const char *b, size_t bn)
{
	return an == bn && !memcmp(a, b, an);
}

/* The key without its spaces. */
static size_t nosep(const char *s, size_t n, char *out, size_t cap)
{
	size_t k = 0;
	for (size_t i = 0; i < n && k < cap; i++)
		if (s[i] != ' ')
			out[k++] = s[i];
	return k;
}

static size_t ncp(const char *s, size_t n)
{
	size_t c = 0;
	for (size_t i = 0; i < n; i++)
		c += ((unsigned char)s[i] & 0xC0) != 0x80;
	return c;
}

/* Is key a spelling variant of label key lk?  "spacing": equal without
 * spaces (software entwickler, softwareentwickler; fork lift, forklift);
 * "typo": the same words but one, and that one a single edit
 * (Levenshtein) from its counterpart, both of six code points or more. */
static const char *variant(const char *key, size_t kl, const char *lk, size_t ll)
{
	char a[512], b[512];
	size_t an, bn;
	if (same(key, kl, lk, ll))
		return NULL;
	an = nosep(key, kl, a, sizeof a);
	bn = nosep(lk, ll, b, sizeof b);
	if (an == bn && an && !memcmp(a, b, an))
		return "spacing";
	/* one edit inside one word of six letters or more, the other words
	 * the same: "schweisser" / "schweiser", not "tig" / "mig" */
	const char *p = key, *q = lk, *pe = key + kl, *qe = lk + ll;
	int diff = 0;
	while (p < pe && q < qe) {
		const char *a1 = memchr(p, ' ', (size_t)(pe - p)), *b1 = memchr(q, ' ', (size_t)(qe - q));
		size_t wa = a1 ? (size_t)(a1 - p) : (size_t)(pe - p), wb = b1 ? (size_t)(b1 - q) : (size_t)(qe - q);
		if (!same(p, wa, q, wb)) {
			if (diff++ || ncp(p, wa) < 6 || ncp(q, wb) < 6 || levenshtein(p, wa, q, wb, 1) != 1)
				return NULL;
		}
		p += wa + (a1 != NULL);
		q += wb + (b1 != NULL);
	}
	return p >= pe && q >= qe && diff == 1 ? "typo" : NULL;
}

static int cmp_sugg(const void *a, const void *b)
{
	const sugg *x = a, *y = b;
	int c;
	if (x->kind != y->kind)
		return x->kind - y->kind;
	if (x->score != y->score)
		return x->score > y->score ? -1 : 1;
	if ((c = memcmp(x->occ, y->occ, x->ol < y->ol ? x->ol : y->ol)) || x->ol != y->ol)
		return c ? c : (x->ol < y->ol ? -1 : 1);
	if ((c = strcmp(x->lang, y->lang)))
		return c;
	if ((c = memcmp(x->key, y->key, x->kl < y->kl ? x->kl : y->kl)) || x->kl != y->kl)
		return c ? c : (x->kl < y->kl ? -1 : 1);
	return 0;
}

static void put_d(tm_buf *b, double v)
{
	char s[40];
	snprintf(s, sizeof s, "%.4f", v);
	buf_puts(b, s);
}

static void put_u(tm_buf *b, uint64_t v)
{
	char s[32];
	snprintf(s, sizeof s, "%llu", (unsigned long long)v);
	buf_puts(b, s);
}

static int wordish(unsigned char c)
{
	return c >= 0x80 || (c >= '0' && c <= '9') || ((c | 0x20) >= 'a' && (c | 0x20) <= 'z');
}

/* The label as the postings write it: the first example holding the
 * (lowercase) label as whole words, in mixed case rather than shouting
 * capitals; appended to out, or nothing when no example shows it. */
static void as_written(const char *const *ex, const size_t *exl, int nex, const char *text,
		       size_t tl, tm_buf *out)
{
	tm_buf low = {0}, cand = {0};
	for (int i = 0; i < nex && !out->len; i++) {
		buf_reset(&low);
		if (uni_lower(ex[i], exl[i], &low) || low.len != exl[i] || tl == 0 || tl > exl[i])
			continue;
		for (size_t o = 0; o + tl <= low.len; o++) {
			if (memcmp(low.data + o, text, tl) ||
			    (o > 0 && wordish((unsigned char)low.data[o - 1])) ||
			    (o + tl < low.len && wordish((unsigned char)low.data[o + tl])))
				continue;
			/* all capitals says nothing about the usual casing (the
			 * test looks at Latin letters only) */
			int lower = 0;
			for (size_t k = o; k < o + tl; k++)
				lower |= ex[i][k] >= 'a' && ex[i][k] <= 'z';
			if (lower) {
				buf_reset(&cand);
				buf_append(&cand, ex[i] + o, tl);
				if (dec_is_utf8(cand.data, cand.len) && !memchr(cand.data, 0, cand.len))
					buf_append(out, cand.data, cand.len);
			}
			break;
		}
	}
	buf_free(&low);
	buf_free(&cand);
}

static void write_sugg(tm_buf *b, const sugg *s, tally_mem *m, const labelset *ls, int tsv)
{
	double lo, hi, share = s->n ? (double)s->k / (double)s->n : 0;
	const char *ex[TALLY_EXAMPLES];
	size_t exl[TALLY_EXAMPLES];
	int nex = tm_examples(m, s->occ, s->ol, s->lang, s->key, s->kl, ex, exl);
	const char *text = s->t ? s->t->title : lab_str(ls, s->lb->text);
	size_t labell = s->t ? s->t->tl : s->lb->textlen;

	wilson(s->k, s->n, STATS_Z95, &lo, &hi);
	if (tsv) {
		buf_puts(b, s->id);
		buf_putc(b, '\t');
		buf_puts(b, kind_names[s->kind]);
		buf_putc(b, '\t');
		buf_append(b, s->occ, s->ol);
		buf_putc(b, '\t');
		buf_puts(b, s->lang);
		buf_putc(b, '\t');
		buf_append(b, text, labell);
		buf_putc(b, '\t');
		put_d(b, s->score);
		buf_putc(b, '\t');
		put_u(b, s->k);
		buf_putc(b, '\t');
		put_u(b, s->n);
		buf_putc(b, '\t');
		put_u(b, s->kt);
		buf_putc(b, '\t');
		put_d(b, share);
		buf_putc(b, '\t');
		put_d(b, lo);
		buf_putc(b, '\t');
		put_d(b, hi);
		buf_putc(b, '\t');
		put_d(b, s->precision);
		buf_putc(b, '\t');
		put_d(b, s->g2);
		buf_putc(b, '\t');
		if (s->rival) {
			buf_append(b, s->rival->occ, s->rival->ol);
			buf_puts(b, " (");
			put_u(b, s->rival->k);
			buf_putc(b, ')');
		}
		buf_putc(b, '\t');
		if (s->variant && s->lb)
			buf_append(b, lab_str(ls, s->lb->text), s->lb->textlen);
		buf_putc(b, '\t');
		for (int i = 0; i < nex; i++) {
			if (i)
				buf_puts(b, " | ");
			buf_append(b, ex[i], exl[i]);
		}
		buf_putc(b, '\n');
		return;
	}
	buf_puts(b, "{\"id\":\"");
	buf_puts(b, s->id);
	buf_puts(b, "\",\"kind\":\"");
	buf_puts(b, kind_names[s->kind]);
	buf_puts(b, "\",\"occupation\":");
	json_str(b, s->occ, s->ol);
	buf_puts(b, ",\"lang\":");
	json_str(b, s->lang, strlen(s->lang));
	buf_puts(b, ",\"label\":");
	json_str(b, text, labell);
	buf_puts(b, ",\"key\":");
	json_str(b, s->key, s->kl);
	if (s->t) {
		tm_buf w = {0};
		as_written(ex, exl, nex, text, labell, &w);
		if (w.len && (w.len != labell || memcmp(w.data, text, labell))) {
			buf_puts(b, ",\"label_as_written\":");
			json_str(b, w.data, w.len);
		}
		buf_free(&w);
	}
	if ((s->kind == K_RARE || s->kind == K_ELSEWHERE) && s->lb)
		buf_puts(b, s->lb->kind == 'p' ? ",\"label_kind\":\"pref\""
			 : s->lb->kind == 'a' ? ",\"label_kind\":\"alt\""
					      : ",\"label_kind\":\"hidden\"");
	buf_puts(b, ",\"score\":");
	put_d(b, s->score);
	buf_puts(b, ",\"postings\":");
	put_u(b, s->k);
	buf_puts(b, ",\"occupation_postings\":");
	put_u(b, s->n);
	buf_puts(b, ",\"key_postings\":");
	put_u(b, s->kt);
	buf_puts(b, ",\"lang_postings\":");
	put_u(b, s->nl);
	buf_puts(b, ",\"share\":");
	put_d(b, share);
	buf_puts(b, ",\"share_low\":");
	put_d(b, lo);
	buf_puts(b, ",\"share_high\":");
	put_d(b, hi);
	buf_puts(b, ",\"precision\":");
	put_d(b, s->precision);
	buf_puts(b, ",\"g2\":");
	put_d(b, s->g2);
	buf_puts(b, ",\"competitor\":");
	if (s->rival) {
		buf_puts(b, "{\"occupation\":");
		json_str(b, s->rival->occ, s->rival->ol);
		buf_puts(b, ",\"postings\":");
		put_u(b, s->rival->k);
		buf_puts(b, ",\"share\":");
		put_d(b, s->kt ? (double)s->rival->k / (double)s->kt : 0);
		buf_putc(b, '}');
	} else
		buf_puts(b, "null");
	if (s->variant && s->lb) {
		buf_puts(b, ",\"variant_of\":");
		json_str(b, lab_str(ls, s->lb->text), s->lb->textlen);
		buf_puts(b, ",\"variant\":\"");
		buf_puts(b, s->variant);
		buf_putc(b, '"');
	}
	buf_puts(b, ",\"examples\":[");
	for (int i = 0; i < nex; i++) {
		if (i)
			buf_putc(b, ',');
		json_str(b, ex[i], exl[i]);
	}
	buf_puts(b, "]}\n");
}

/* The strongest occupation other than occ among the triples of one
 * (lang, key): trips [a, b) sorted by occupation... they are spread over
 * the whole table, so a map keyed by lang 1F key holds the two best. */
typedef struct best2 {
	uint32_t i1, i2; /* trip index + 1 */
} best2;

static const char propose_usage[] =
	"usage: titlemill propose --labels FILE [--tsv] [--top N] [--kind K]\n"
	"                         [--occupation ID] [--lang L] [thresholds]\n"
	"                         (COUNTS|POSTINGS...|--store URL [--prefix P])\n"
	"\n"
	"Scored suggestions for the taxonomy's curators, as JSON Lines (or TSV):\n"
	"new_alt_label, new_hidden_label, rare_label, used_elsewhere, each with\n"
	"its evidence.  They inform a curator, who decides.\n"
	"\n"
	"  --labels FILE          the taxonomy's labels TSV\n"
	"  --tsv                  a table instead of JSON Lines\n"
	"  --top N                at most N suggestions of each kind\n"
	"  --kind K               only this kind\n"
	"  --occupation ID, --lang L   only these\n"
	"  --min-postings N       new_alt_label: postings of the title (5)\n"
	"  --min-share X          new_alt_label: lower Wilson bound of its share (0.01)\n"
	"  --min-precision X      new_alt_label: share of the key's postings (0.6)\n"
	"  --min-g2 X             new_alt_label: Dunning's G2 (10.827566, p = 0.001)\n"
	"  --hidden-min N         new_hidden_label: postings of the variant (3)\n"
	"  --hidden-precision X   new_hidden_label: precision of the variant (0.5)\n"
	"  --rare-min N           rare_label: postings of the occupation (200)\n"
	"  --rare-share X         rare_label: upper Wilson bound below X (0.005)\n"
	"  --elsewhere-share X    used_elsewhere: share of another occupation (0.6)\n"
	"  --elsewhere-min N      used_elsewhere: postings of the key (5)\n"
	"  --store URL, --prefix P, --lexicons DIR   as for coverage\n"
	"  -h, --help             show this help\n";

int coverage_load(tally_mem *m, labelset *ls, normaliser **nmp, lexicon **lxp,
		  setup_opts *so, const char *surl, store_conf *sc, int argc, char **argv,
		  int first, tm_buf *err);

static int dnum(const char *s, double lo, double hi, double *v)
{
	char *e;
	errno = 0;
	*v = strtod(s, &e);
	return errno || e == s || *e || !(*v >= lo && *v <= hi) ? -1 : 0;
}

static int unum(const char *s, uint64_t *v)
{
	char *e;
	errno = 0;
	unsigned long long x = strtoull(s, &e, 10);
	if (errno || e == s || *e || s[0] == '-')
		return -1;
	*v = x;
	return 0;
}

int cmd_propose(int argc, char **argv)
{
	static const struct option longopts[] = {
		{"labels", required_argument, NULL, 'L'}, {"tsv", no_argument, NULL, 't'},
		{"top", required_argument, NULL, 'T'}, {"kind", required_argument, NULL, 'K'},
		{"occupation", required_argument, NULL, 'O'}, {"lang", required_argument, NULL, 'l'},
		{"store", required_argument, NULL, 'S'}, {"prefix", required_argument, NULL, 'P'},
		{"lexicons", required_argument, NULL, 'x'},
		{"min-postings", required_argument, NULL, 1}, {"min-share", required_argument, NULL, 2},
		{"min-precision", required_argument, NULL, 3}, {"min-g2", required_argument, NULL, 4},
		{"hidden-min", required_argument, NULL, 5}, {"hidden-precision", required_argument, NULL, 6},
		{"rare-min", required_argument, NULL, 7}, {"rare-share", required_argument, NULL, 8},
		{"elsewhere-share", required_argument, NULL, 9}, {"elsewhere-min", required_argument, NULL, 10},
		{"help", no_argument, NULL, 'h'}, {NULL, 0, NULL, 0},
	};
	bars bar = {5, 0.01, 0.6, STATS_CHI2_1DF_P001, 3, 0.5, 200, 0.005, 0.6, 5};
	setup_opts so;
	store_conf sc = {NULL, 5, 5000, 0};
	const char *surl = NULL, *only_occ = NULL, *only_lang = NULL;
	char lang[4];
	int tsv = 0, only_kind = -1, ch, rc = EXIT_OK;
	uint64_t top = UINT64_MAX;
	tally_mem m;
	labelset ls;
	tm_buf err = {0}, out = {0};
	normaliser *nm = NULL;
	lexicon *lx = NULL;
	ctx c = {0};
	sugg *sv = NULL;
	size_t ns = 0, scap = 0;
	strtab kidx = {0}, groups = {0}, tidx = {0};
	best2 *best = NULL;
	uint32_t *order = NULL;

	memset(&so, 0, sizeof so);
	optind = 1;
	int oi = 0;
	while ((ch = getopt_long(argc, argv, "h", longopts, &oi)) != -1) {
		int bad = 0;
		switch (ch) {
		case 'L': so.labels = optarg; break;
		case 't': tsv = 1; break;
		case 'T': bad = unum(optarg, &top); break;
		case 'K':
			for (int k = 0; k < K_N; k++)
				if (!strcmp(optarg, kind_names[k]))
					only_kind = k;
			bad = only_kind < 0;
			break;
		case 'O': only_occ = optarg; break;
		case 'l': bad = lang_tag(optarg, lang); only_lang = lang; break;
		case 'S': surl = optarg; break;
		case 'P':
			if (cli_check_prefix("propose", optarg))
				return EXIT_USAGE;
			sc.prefix = optarg;
			break;
		case 'x':
			if (so.nextra < 16)
				so.extra[so.nextra++] = optarg;
			break;
		case 1: bad = unum(optarg, &bar.min_postings); break;
		case 2: bad = dnum(optarg, 0, 1, &bar.min_share); break;
		case 3: bad = dnum(optarg, 0, 1, &bar.min_precision); break;
		case 4: bad = dnum(optarg, 0, 1e12, &bar.min_g2); break;
		case 5: bad = unum(optarg, &bar.hidden_min); break;
		case 6: bad = dnum(optarg, 0, 1, &bar.hidden_precision); break;
		case 7: bad = unum(optarg, &bar.rare_min); break;
		case 8: bad = dnum(optarg, 0, 1, &bar.rare_share); break;
		case 9: bad = dnum(optarg, 0, 1, &bar.elsewhere_share); break;
		case 10: bad = unum(optarg, &bar.elsewhere_min); break;
		case 'h': fputs(propose_usage, stdout); return EXIT_OK;
		default: fputs(propose_usage, stderr); return EXIT_USAGE;
		}
		if (bad) {
			fprintf(stderr, "titlemill propose: --%s: bad value '%s'\n",
				longopts[oi].name, optarg);
			return EXIT_USAGE;
		}
	}
	if (!so.labels) {
		fputs("titlemill propose: --labels FILE is required\n", stderr);
		return EXIT_USAGE;
	}
	if (!surl && optind >= argc) {
		fputs("titlemill propose: name a counts table or postings files, or --store\n", stderr);
		return EXIT_USAGE;
	}
	tm_init(&m);
	if (coverage_load(&m, &ls, &nm, &lx, &so, surl, &sc, argc, argv, optind, &err) != 0) {
		fprintf(stderr, "titlemill propose: %.*s\n", (int)err.len, err.data ? err.data : "");
		rc = EXIT_RUNTIME;
		goto done;
	}
	if (tm_each_triple(&m, collect, &c) != 0)
		goto oom;
	/* the two strongest occupations of each (lang, key) */
	best = calloc(c.n + 1, sizeof *best);
	if (!best)
		goto oom;
	for (size_t i = 0; i < c.n; i++) {
		tm_buf j = {0};
		size_t idx;
		buf_append(&j, c.t[i].lang, c.t[i].ll);
		buf_putc(&j, '\x1F');
		buf_append(&j, c.t[i].key, c.t[i].kl);
		int r = st_add(&kidx, j.data, j.len, 0, &idx);
		buf_free(&j);
		if (r < 0)
			goto oom;
		best2 *bb = &best[idx];
		uint32_t me = (uint32_t)i + 1;
		{
			tm_buf j2 = {0};
			size_t ti;
			buf_append(&j2, c.t[i].occ, c.t[i].ol);
			buf_putc(&j2, '\x1F');
			buf_append(&j2, c.t[i].lang, c.t[i].ll);
			buf_putc(&j2, '\x1F');
			buf_append(&j2, c.t[i].key, c.t[i].kl);
			int r2 = st_add(&tidx, j2.data, j2.len, 0, &ti);
			buf_free(&j2);
			if (r2 < 0)
				goto oom;
			tidx.ent[ti].count = i;
		}
		if (!bb->i1 || c.t[i].k > c.t[bb->i1 - 1].k) {
			bb->i2 = bb->i1;
			bb->i1 = me;
		} else if (!bb->i2 || c.t[i].k > c.t[bb->i2 - 1].k)
			bb->i2 = me;
	}
	/* postings per language */
	strtab nlang = {0};
	for (size_t i = 0; i < m.keys.n; i++) {
		size_t n;
		const char *k = st_key(&m.keys, i, &n);
		const char *sep = memchr(k, '\x1F', n);
		if (st_add(&nlang, k, sep ? (size_t)(sep - k) : n, m.keys.ent[i].count, NULL) < 0)
			goto oom;
	}
	/* labels grouped by occupation and language, for the variants:
	 * order[] holds each group's labels together, groups maps the group
	 * to (start << 20 | count) */
	order = malloc((ls.n + 1) * sizeof *order);
	if (!order)
		goto oom;
	{
		tm_buf j = {0};
		size_t gidx;
		uint64_t *cnt = calloc(ls.n + 1, sizeof *cnt);
		uint32_t *gof = malloc((ls.n + 1) * sizeof *gof);
		if (!cnt || !gof) {
			free(cnt);
			free(gof);
			goto oom;
		}
		for (size_t q = 0; q < ls.n; q++) {
			buf_reset(&j);
			buf_append(&j, lab_str(&ls, ls.v[q].occ), ls.v[q].occlen);
			buf_putc(&j, '\x1F');
			buf_puts(&j, ls.v[q].lang);
			if (st_add(&groups, j.data, j.len, 0, &gidx) < 0) {
				free(cnt);
				free(gof);
				buf_free(&j);
				goto oom;
			}
			gof[q] = (uint32_t)gidx;
			cnt[gidx]++;
		}
		uint64_t at = 0;
		for (size_t gq = 0; gq < groups.n; gq++) {
			groups.ent[gq].count = at << 20 | (cnt[gq] & 0xFFFFF);
			cnt[gq] = at;
			at += groups.ent[gq].count & 0xFFFFF;
		}
		for (size_t q = 0; q < ls.n; q++)
			order[cnt[gof[q]]++] = (uint32_t)q;
		free(cnt);
		free(gof);
		buf_free(&j);
	}
	for (size_t i = 0; i < c.n; i++) {
		const trip *t = &c.t[i];
		char lg[4] = {0};
		memcpy(lg, t->lang, t->ll < 3 ? t->ll : 3);
		if ((only_occ && !same(only_occ, strlen(only_occ), t->occ, t->ol)) ||
		    (only_lang && strcmp(only_lang, lg)) || !t->kl)
			continue;
		if (labels_find(&ls, t->occ, t->ol, lg, t->key, t->kl))
			continue;
		uint64_t n = tm_occ_postings(&m, t->occ, t->ol, lg);
		uint64_t kt = tm_key_postings(&m, lg, t->key, t->kl);
		long li = st_find(&nlang, lg, strlen(lg));
		uint64_t nl = li < 0 ? 0 : nlang.ent[li].count;
		double prec = kt ? (double)t->k / (double)kt : 0;
		sugg s;
		memset(&s, 0, sizeof s);
		s.t = t;
		s.occ = t->occ;
		s.ol = t->ol;
		s.key = t->key;
		s.kl = t->kl;
		memcpy(s.lang, lg, 4);
		s.k = t->k;
		s.n = n;
		s.kt = kt;
		s.precision = prec;
		s.nl = nl;
		if (kt >= t->k && nl >= kt + n - t->k)
			s.g2 = g2(t->k, kt - t->k, n - t->k, nl - kt - n + t->k);
		/* the rival: the strongest other occupation of the key */
		{
			tm_buf j = {0};
			buf_append(&j, t->lang, t->ll);
			buf_putc(&j, '\x1F');
			buf_append(&j, t->key, t->kl);
			long bi = st_find(&kidx, j.data, j.len);
			buf_free(&j);
			if (bi >= 0) {
				best2 *bb = &best[bi];
				uint32_t r = bb->i1 && bb->i1 - 1 != i ? bb->i1 : bb->i2;
				s.rival = r ? &c.t[r - 1] : NULL;
			}
		}
		/* a spelling variant of one of its labels? */
		const label *var = NULL;
		const char *how = NULL;
		{
			tm_buf j = {0};
			buf_append(&j, t->occ, t->ol);
			buf_putc(&j, '\x1F');
			buf_puts(&j, lg);
			long gi = st_find(&groups, j.data, j.len);
			buf_free(&j);
			uint64_t g = gi < 0 ? 0 : groups.ent[gi].count;
			for (uint64_t q = g >> 20, e = q + (g & 0xFFFFF); q < e && !var; q++) {
				const label *lb = &ls.v[order[q]];
				if ((how = variant(t->key, t->kl, lab_str(&ls, lb->key), lb->keylen)))
					var = lb;
			}
		}
		if (var) {
			/* a key that is some other occupation's label is no
			 * misspelling: "delta01 agent" is not a typo of
			 * "delta00 agent" when both are labels */
			tm_buf j = {0};
			buf_puts(&j, lg);
			buf_putc(&j, '\x1F');
			buf_append(&j, t->key, t->kl);
			long other = st_find(&ls.keys, j.data, j.len);
			buf_free(&j);
			if (other >= 0 || t->k < bar.hidden_min || prec < bar.hidden_precision)
				continue;
			s.kind = K_HIDDEN;
			s.lb = var;
			s.variant = how;
			s.score = (double)t->k * prec;
		} else {
			double lo, hi;
			wilson(t->k, n, STATS_Z95, &lo, &hi);
			if (t->k < bar.min_postings || lo < bar.min_share || prec < bar.min_precision ||
			    s.g2 <= bar.min_g2)
				continue;
			s.kind = K_ALT;
			s.score = s.g2;
		}
		if (ns == scap) {
			scap = scap ? scap * 2 : 256;
			sugg *p = realloc(sv, scap * sizeof *p);
			if (!p)
				goto oom;
			sv = p;
		}
		sv[ns++] = s;
	}
	/* the labels: rare, or used for another occupation */
	for (size_t q = 0; q < ls.n; q++) {
		const label *lb = &ls.v[q];
		const char *occ = lab_str(&ls, lb->occ), *key = lab_str(&ls, lb->key);
		if ((only_occ && !same(only_occ, strlen(only_occ), occ, lb->occlen)) ||
		    (only_lang && strcmp(only_lang, lb->lang)))
			continue;
		/* one suggestion per key, even when a key has two labels */
		if (labels_find(&ls, occ, lb->occlen, lb->lang, key, lb->keylen) != lb)
			continue;
		uint64_t n = tm_occ_postings(&m, occ, lb->occlen, lb->lang);
		uint64_t kt = tm_key_postings(&m, lb->lang, key, lb->keylen);
		uint64_t k = 0;
		const trip *rival = NULL;
		tm_buf j = {0};
		buf_puts(&j, lb->lang);
		buf_putc(&j, '\x1F');
		buf_append(&j, key, lb->keylen);
		long bi = st_find(&kidx, j.data, j.len);
		buf_free(&j);
		if (bi >= 0) {
			best2 *bb = &best[bi];
			for (uint32_t r = 0; r < 2; r++) {
				uint32_t x = r ? bb->i2 : bb->i1;
				if (!x)
					continue;
				const trip *t = &c.t[x - 1];
				if (same(t->occ, t->ol, occ, lb->occlen))
					k = t->k;
				else if (!rival)
					rival = t;
			}
			/* the label's own count, when it is not among the best two */
			if (!k) {
				long ti;
				tm_buf j2 = {0};
				buf_append(&j2, occ, lb->occlen);
				buf_putc(&j2, '\x1F');
				buf_puts(&j2, lb->lang);
				buf_putc(&j2, '\x1F');
				buf_append(&j2, key, lb->keylen);
				ti = st_find(&tidx, j2.data, j2.len);
				buf_free(&j2);
				if (ti >= 0)
					k = c.t[tidx.ent[ti].count].k;
			}
		}
		sugg s;
		memset(&s, 0, sizeof s);
		s.lb = lb;
		s.occ = occ;
		s.ol = lb->occlen;
		s.key = key;
		s.kl = lb->keylen;
		memcpy(s.lang, lb->lang, 4);
		s.k = k;
		s.n = n;
		s.kt = kt;
		s.precision = kt ? (double)k / (double)kt : 0;
		s.rival = rival;
		double lo, hi;
		wilson(k, n, STATS_Z95, &lo, &hi);
		if (n >= bar.rare_min && hi < bar.rare_share) {
			s.kind = K_RARE;
			s.score = (double)n * (bar.rare_share - hi);
		} else if (rival && kt >= bar.elsewhere_min &&
			   (double)rival->k / (double)kt >= bar.elsewhere_share) {
			s.kind = K_ELSEWHERE;
			s.score = (double)rival->k / (double)kt;
		} else
			continue;
		if (ns == scap) {
			scap = scap ? scap * 2 : 256;
			sugg *p = realloc(sv, scap * sizeof *p);
			if (!p)
				goto oom;
			sv = p;
		}
		sv[ns++] = s;
	}
	st_free(&nlang);
	/* stable ids: the kind, occupation, language and key */
	for (size_t i = 0; i < ns; i++) {
		tm_buf j = {0};
		buf_puts(&j, kind_names[sv[i].kind]);
		buf_putc(&j, '\x1F');
		buf_append(&j, sv[i].occ, sv[i].ol);
		buf_putc(&j, '\x1F');
		buf_puts(&j, sv[i].lang);
		buf_putc(&j, '\x1F');
		buf_append(&j, sv[i].key, sv[i].kl);
		snprintf(sv[i].id, sizeof sv[i].id, "%016llx",
			 (unsigned long long)tok_hash(j.data, j.len));
		buf_free(&j);
	}
	qsort(sv, ns, sizeof *sv, cmp_sugg);
	if (tsv)
		buf_puts(&out, "id\tkind\toccupation\tlang\tlabel\tscore\tpostings\toccupation_postings\t"
			       "key_postings\tshare\tshare_low\tshare_high\tprecision\tg2\tcompetitor\t"
			       "variant_of\texamples\n");
	{
		uint64_t per[K_N] = {0};
		for (size_t i = 0; i < ns; i++) {
			if (only_kind >= 0 && sv[i].kind != only_kind)
				continue;
			if (per[sv[i].kind]++ >= top)
				continue;
			write_sugg(&out, &sv[i], &m, &ls, tsv);
		}
	}
	if (fwrite(out.data ? out.data : "", 1, out.len, stdout) != out.len || fflush(stdout) != 0) {
		fprintf(stderr, "titlemill propose: write error: %s\n", strerror(errno));
		rc = EXIT_RUNTIME;
	}
	goto done;
oom:
	fputs("titlemill propose: out of memory\n", stderr);
	rc = EXIT_RUNTIME;
done:
	free(sv);
	free(best);
	free(order);
	st_free(&groups);
	st_free(&tidx);
	free(c.t);
	st_free(&kidx);
	buf_free(&out);
	buf_free(&err);
	labels_free(&ls);
	tm_free(&m);
	norm_free(nm);
	lex_free(lx);
	return rc;
}

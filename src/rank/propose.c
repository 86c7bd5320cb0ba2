/* propose.c - the ranker: suggestions with their evidence (propose.h).
 *
 * One pass over the counts' triples finds each (language, key)'s two
 * strongest occupations; a second pass scores every counted title that
 * is none of its occupation's labels (new_alt_label, or new_hidden_label
 * when it is a spelling variant of one); a pass over the labels scores
 * rare_label and used_elsewhere.  Cost: linear in triples and labels
 * (hash lookups), plus the labels of one occupation and language per
 * title for the variants. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "rank/propose.h"
#include "count/strtab.h"
#include "norm/token.h"
#include "norm/unicode.h"

const char *const propose_kind_names[PROPOSE_NKINDS + 1] = {
	"new_alt_label", "new_hidden_label", "rare_label", "used_elsewhere", NULL};

#define PROPOSE_BAR_DEFAULT(type, kind, m, opt, arg, def, lo, hi, meaning) b->m = (type)(def);
void propose_bars_default(propose_bars *b)
{
	PROPOSE_BARS(PROPOSE_BAR_DEFAULT)
}

typedef struct trip {
	const char *occ, *lang, *key, *title;
	size_t ol, ll, kl, tl;
	uint64_t k;
} trip;

/* The two strongest occupations of one (lang, key): trip index + 1. */
typedef struct best2 {
	uint32_t i1, i2;
} best2;

typedef struct ranker {
	tally_mem *m;
	const labelset *ls;
	const propose_bars *b;
	const propose_filter *f;
	trip *t;
	size_t n, cap;
	strtab kidx;     /* lang 1F key -> best[] */
	strtab tidx;     /* occ 1F lang 1F key -> its trip (count) */
	strtab nlang;    /* lang -> postings */
	strtab groups;   /* occ 1F lang -> labels in order[]: start << 20 | count */
	best2 *best;
	uint32_t *order;
	tm_buf j;        /* scratch for joined keys */
	propose_list *out;
	size_t outcap;
} ranker;

static int collect(void *c0, const tm_triple *x)
{
	ranker *c = c0;
	trip *t = tm_grow(c->t, &c->cap, c->n + 1, sizeof *t, 4096);
	if (!t)
		return -1;
	c->t = t;
	c->t[c->n++] = (trip){x->occ, x->lang, x->key, x->title, x->ol, x->ll, x->kl, x->tl,
			      x->postings};
	return 0;
}

static int same(const char *a, size_t an, const char *b, size_t bn)
{
	return an == bn && !memcmp(a, b, an);
}

/* The scratch key: the pieces joined by U+001F. */
static const tm_buf *join(ranker *c, const char *a, size_t al, const char *b, size_t bl,
			  const char *d, size_t dl)
{
	int bad;
	buf_reset(&c->j);
	bad = buf_append(&c->j, a, al) || buf_putc(&c->j, '\x1F') || buf_append(&c->j, b, bl);
	if (d)
		bad = bad || buf_putc(&c->j, '\x1F') || buf_append(&c->j, d, dl);
	return bad ? NULL : &c->j;
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

const char *propose_variant(const char *key, size_t kl, const char *lk, size_t ll)
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
	const propose_sugg *x = a, *y = b;
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

static int wordish(unsigned char c)
{
	return c >= 0x80 || (c >= '0' && c <= '9') || ((c | 0x20) >= 'a' && (c | 0x20) <= 'z');
}

int propose_as_written(const char *const *ex, const size_t *exl, int nex, const char *text,
		       size_t tl, tm_buf *out)
{
	tm_buf low = {0}, cand = {0};
	size_t len0 = out->len;
	int rc = 0;
	for (int i = 0; i < nex && out->len == len0 && rc == 0; i++) {
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
				if (buf_append(&cand, ex[i] + o, tl))
					rc = -1;
				else if (dec_is_utf8(cand.data, cand.len) && !memchr(cand.data, 0, cand.len))
					rc = buf_append(out, cand.data, cand.len);
			}
			break;
		}
	}
	buf_free(&low);
	buf_free(&cand);
	return rc;
}

static int push(ranker *c, const propose_sugg *s)
{
	propose_list *l = c->out;
	propose_sugg *v = tm_grow(l->v, &c->outcap, l->n + 1, sizeof *v, 256);
	if (!v)
		return -1;
	l->v = v;
	l->v[l->n++] = *s;
	return 0;
}

/* The indexes: each (lang, key)'s two strongest occupations, each
 * triple by (occ, lang, key), postings per language, and the labels
 * grouped by occupation and language (order[] holds each group's labels
 * together). */
static int index_all(ranker *c)
{
	const labelset *ls = c->ls;
	tally_mem *m = c->m;
	const tm_buf *j;
	size_t idx;

	c->best = calloc(c->n + 1, sizeof *c->best);
	c->order = malloc((ls->n + 1) * sizeof *c->order);
	if (!c->best || !c->order)
		return -1;
	for (size_t i = 0; i < c->n; i++) {
		const trip *t = &c->t[i];
		if (!(j = join(c, t->lang, t->ll, t->key, t->kl, NULL, 0)) ||
		    st_add(&c->kidx, j->data, j->len, 0, &idx) < 0)
			return -1;
		best2 *bb = &c->best[idx];
		uint32_t me = (uint32_t)i + 1;
		size_t ti;
		if (!(j = join(c, t->occ, t->ol, t->lang, t->ll, t->key, t->kl)) ||
		    st_add(&c->tidx, j->data, j->len, 0, &ti) < 0)
			return -1;
		c->tidx.ent[ti].count = i;
		if (!bb->i1 || t->k > c->t[bb->i1 - 1].k) {
			bb->i2 = bb->i1;
			bb->i1 = me;
		} else if (!bb->i2 || t->k > c->t[bb->i2 - 1].k)
			bb->i2 = me;
	}
	for (size_t i = 0; i < m->keys.n; i++) {
		size_t n;
		const char *k = st_key(&m->keys, i, &n);
		const char *sep = memchr(k, '\x1F', n);
		if (st_add(&c->nlang, k, sep ? (size_t)(sep - k) : n, m->keys.ent[i].count, NULL) < 0)
			return -1;
	}
	uint64_t *cnt = calloc(ls->n + 1, sizeof *cnt);
	uint32_t *gof = malloc((ls->n + 1) * sizeof *gof);
	int rc = -1;
	if (!cnt || !gof)
		goto out;
	for (size_t q = 0; q < ls->n; q++) {
		const label *lb = &ls->v[q];
		if (!(j = join(c, lab_str(ls, lb->occ), lb->occlen, lb->lang, strlen(lb->lang), NULL, 0)) ||
		    st_add(&c->groups, j->data, j->len, 0, &idx) < 0)
			goto out;
		gof[q] = (uint32_t)idx;
		cnt[idx]++;
	}
	uint64_t at = 0;
	for (size_t g = 0; g < c->groups.n; g++) {
		c->groups.ent[g].count = at << 20 | (cnt[g] & 0xFFFFF);
		cnt[g] = at;
		at += c->groups.ent[g].count & 0xFFFFF;
	}
	for (size_t q = 0; q < ls->n; q++)
		c->order[cnt[gof[q]]++] = (uint32_t)q;
	rc = 0;
out:
	free(cnt);
	free(gof);
	return rc;
}

static int filtered(const propose_filter *f, const char *occ, size_t ol, const char *lang)
{
	return f && ((f->occ && !same(f->occ, strlen(f->occ), occ, ol)) ||
		     (f->lang && strcmp(f->lang, lang)));
}

/* new_alt_label and new_hidden_label: the counted titles that are none
 * of their occupation's labels. */
static int rank_titles(ranker *c)
{
	const labelset *ls = c->ls;
	const propose_bars *bar = c->b;
	const tm_buf *j;

	for (size_t i = 0; i < c->n; i++) {
		const trip *t = &c->t[i];
		char lg[4] = {0};
		memcpy(lg, t->lang, t->ll < 3 ? t->ll : 3);
		if (filtered(c->f, t->occ, t->ol, lg) || !t->kl)
			continue;
		if (labels_find(ls, t->occ, t->ol, lg, t->key, t->kl))
			continue;
		uint64_t n = tm_occ_postings(c->m, t->occ, t->ol, lg);
		uint64_t kt = tm_key_postings(c->m, lg, t->key, t->kl);
		long li = st_find(&c->nlang, lg, strlen(lg));
		uint64_t nl = li < 0 ? 0 : c->nlang.ent[li].count;
		double prec = kt ? (double)t->k / (double)kt : 0;
		propose_sugg s;
		memset(&s, 0, sizeof s);
		s.is_title = 1;
		s.text = t->title;
		s.tl = t->tl;
		s.occ = t->occ;
		s.ol = t->ol;
		s.key = t->key;
		s.kl = t->kl;
		memcpy(s.lang, lg, 4);
		s.postings = t->k;
		s.occ_postings = n;
		s.key_postings = kt;
		s.precision = prec;
		s.lang_postings = nl;
		if (kt >= t->k && nl >= kt + n - t->k)
			s.g2 = g2(t->k, kt - t->k, n - t->k, nl - kt - n + t->k);
		/* the rival: the strongest other occupation of the key */
		if (!(j = join(c, t->lang, t->ll, t->key, t->kl, NULL, 0)))
			return -1;
		long bi = st_find(&c->kidx, j->data, j->len);
		if (bi >= 0) {
			best2 *bb = &c->best[bi];
			uint32_t r = bb->i1 && bb->i1 - 1 != i ? bb->i1 : bb->i2;
			if (r) {
				s.rival = c->t[r - 1].occ;
				s.rl = c->t[r - 1].ol;
				s.rival_postings = c->t[r - 1].k;
			}
		}
		/* a spelling variant of one of its labels? */
		const label *var = NULL;
		const char *how = NULL;
		if (!(j = join(c, t->occ, t->ol, lg, strlen(lg), NULL, 0)))
			return -1;
		long gi = st_find(&c->groups, j->data, j->len);
		uint64_t g = gi < 0 ? 0 : c->groups.ent[gi].count;
		for (uint64_t q = g >> 20, e = q + (g & 0xFFFFF); q < e && !var; q++) {
			const label *lb = &ls->v[c->order[q]];
			if ((how = propose_variant(t->key, t->kl, lab_str(ls, lb->key), lb->keylen)))
				var = lb;
		}
		if (var) {
			/* a key that is some other occupation's label is no
			 * misspelling: "delta01 agent" is not a typo of
			 * "delta00 agent" when both are labels */
			if (!(j = join(c, lg, strlen(lg), t->key, t->kl, NULL, 0)))
				return -1;
			long other = st_find(&ls->keys, j->data, j->len);
			if (other >= 0 || t->k < bar->hidden_min || prec < bar->hidden_precision)
				continue;
			s.kind = PROPOSE_HIDDEN;
			s.lb = var;
			s.variant = how;
			s.score = (double)t->k * prec;
		} else {
			double lo, hi;
			wilson(t->k, n, STATS_Z95, &lo, &hi);
			if (t->k < bar->min_postings || lo < bar->min_share ||
			    prec < bar->min_precision || s.g2 <= bar->min_g2)
				continue;
			s.kind = PROPOSE_ALT;
			s.score = s.g2;
		}
		if (push(c, &s) != 0)
			return -1;
	}
	return 0;
}

/* rare_label and used_elsewhere: the labels. */
static int rank_labels(ranker *c)
{
	const labelset *ls = c->ls;
	const propose_bars *bar = c->b;
	const tm_buf *j;

	for (size_t q = 0; q < ls->n; q++) {
		const label *lb = &ls->v[q];
		const char *occ = lab_str(ls, lb->occ), *key = lab_str(ls, lb->key);
		if (filtered(c->f, occ, lb->occlen, lb->lang))
			continue;
		/* one suggestion per key, even when a key has two labels */
		if (labels_find(ls, occ, lb->occlen, lb->lang, key, lb->keylen) != lb)
			continue;
		uint64_t n = tm_occ_postings(c->m, occ, lb->occlen, lb->lang);
		uint64_t kt = tm_key_postings(c->m, lb->lang, key, lb->keylen);
		uint64_t k = 0;
		const trip *rival = NULL;
		if (!(j = join(c, lb->lang, strlen(lb->lang), key, lb->keylen, NULL, 0)))
			return -1;
		long bi = st_find(&c->kidx, j->data, j->len);
		if (bi >= 0) {
			best2 *bb = &c->best[bi];
			for (uint32_t r = 0; r < 2; r++) {
				uint32_t x = r ? bb->i2 : bb->i1;
				if (!x)
					continue;
				const trip *t = &c->t[x - 1];
				if (same(t->occ, t->ol, occ, lb->occlen))
					k = t->k;
				else if (!rival)
					rival = t;
			}
			/* the label's own count, when it is not among the best two */
			if (!k) {
				if (!(j = join(c, occ, lb->occlen, lb->lang, strlen(lb->lang), key,
					       lb->keylen)))
					return -1;
				long ti = st_find(&c->tidx, j->data, j->len);
				if (ti >= 0)
					k = c->t[c->tidx.ent[ti].count].k;
			}
		}
		propose_sugg s;
		memset(&s, 0, sizeof s);
		s.lb = lb;
		s.text = lab_str(ls, lb->text);
		s.tl = lb->textlen;
		s.occ = occ;
		s.ol = lb->occlen;
		s.key = key;
		s.kl = lb->keylen;
		memcpy(s.lang, lb->lang, 4);
		s.postings = k;
		s.occ_postings = n;
		s.key_postings = kt;
		s.precision = kt ? (double)k / (double)kt : 0;
		if (rival) {
			s.rival = rival->occ;
			s.rl = rival->ol;
			s.rival_postings = rival->k;
		}
		double lo, hi;
		wilson(k, n, STATS_Z95, &lo, &hi);
		if (n >= bar->rare_min && hi < bar->rare_share) {
			s.kind = PROPOSE_RARE;
			s.score = (double)n * (bar->rare_share - hi);
		} else if (rival && kt >= bar->elsewhere_min &&
			   (double)rival->k / (double)kt >= bar->elsewhere_share) {
			s.kind = PROPOSE_ELSEWHERE;
			s.score = (double)rival->k / (double)kt;
		} else
			continue;
		if (push(c, &s) != 0)
			return -1;
	}
	return 0;
}

int propose_run(tally_mem *m, const labelset *ls, const propose_bars *b,
		const propose_filter *f, propose_list *out)
{
	ranker c;
	int rc = -1;

	memset(&c, 0, sizeof c);
	memset(out, 0, sizeof *out);
	c.m = m;
	c.ls = ls;
	c.b = b;
	c.f = f;
	c.out = out;
	if (tm_each_triple(m, collect, &c) != 0 || index_all(&c) != 0 || rank_titles(&c) != 0 ||
	    rank_labels(&c) != 0)
		goto done;
	/* stable ids: the kind, occupation, language and key */
	for (size_t i = 0; i < out->n; i++) {
		propose_sugg *s = &out->v[i];
		tm_buf *j = &c.j;
		buf_reset(j);
		if (buf_puts(j, propose_kind_names[s->kind]) || buf_putc(j, '\x1F') ||
		    buf_append(j, s->occ, s->ol) || buf_putc(j, '\x1F') || buf_puts(j, s->lang) ||
		    buf_putc(j, '\x1F') || buf_append(j, s->key, s->kl))
			goto done;
		snprintf(s->id, sizeof s->id, "%016llx", (unsigned long long)tok_hash(j->data, j->len));
	}
	if (out->n > 1)
		qsort(out->v, out->n, sizeof *out->v, cmp_sugg);
	rc = 0;
done:
	if (rc != 0)
		propose_list_free(out);
	free(c.t);
	free(c.best);
	free(c.order);
	st_free(&c.kidx);
	st_free(&c.tidx);
	st_free(&c.nlang);
	st_free(&c.groups);
	buf_free(&c.j);
	return rc;
}

void propose_list_free(propose_list *l)
{
	free(l->v);
	memset(l, 0, sizeof *l);
}

/* coverage.c - the coverage figures, one occupation and language at a
 * time over the counts' triples: each group's triples (in key order)
 * walk beside its labels' keys (in the same order), so that the cost is
 * one step per triple and per label, and one binary search per group. */
#include <string.h>

#include "rank/coverage.h"
#include "rank/labkeys.h"
#include "rank/stats.h"

typedef struct top_t {
	tm_buf title, key;
	uint64_t n;
} top_t;

typedef struct cov {
	const labelset *ls;
	labkeys lk;
	tally_mem *m;
	const coverage_filter *f;
	coverage_fn fn;
	void *ctx;
	/* the group being summed */
	tm_buf occ;
	char lang[4];
	int open;
	uint64_t matched, pref, seen;
	size_t at, end;  /* the group's label keys not yet passed: lk.v[at, end) */
	top_t top[COVERAGE_TOP];
	int ntop;
	/* all groups */
	uint64_t t_postings, t_matched, t_pref, t_labels, t_unseen;
	int oom;
} cov;

static int emit(cov *c, const char *occ, size_t ol, const char *lang, uint64_t postings,
		uint64_t matched, uint64_t pref, uint64_t labels, uint64_t unseen)
{
	coverage_title top[COVERAGE_TOP];
	coverage_row r = {occ, ol, lang, postings, matched, 0, 0, 0, pref, 0, labels, unseen,
			  top, 0};
	if (postings) {
		r.share = (double)matched / (double)postings;
		r.pref_share = (double)pref / (double)postings;
	}
	wilson(matched, postings, STATS_Z95, &r.low, &r.high);
	for (int i = 0; i < c->ntop; i++, r.ntop++) {
		const top_t *t = &c->top[i];
		top[i] = (coverage_title){t->title.data ? t->title.data : "",
					  t->key.data ? t->key.data : "", t->title.len, t->key.len,
					  t->n};
	}
	return c->fn(c->ctx, &r);
}

static int flush_group(cov *c)
{
	if (!c->open)
		return 0;
	c->open = 0;
	uint64_t labels = 0;
	size_t lo, hi;
	labkeys_group(&c->lk, c->ls, c->occ.data, c->occ.len, c->lang, &lo, &hi);
	labels = hi - lo;
	uint64_t unseen = labels > c->seen ? labels - c->seen : 0;
	uint64_t postings = tm_occ_postings(c->m, c->occ.data, c->occ.len, c->lang);
	c->t_postings += postings;
	c->t_matched += c->matched;
	c->t_pref += c->pref;
	c->t_labels += labels;
	c->t_unseen += unseen;
	return emit(c, c->occ.data, c->occ.len, c->lang, postings, c->matched, c->pref, labels,
		    unseen);
}

static int on_triple(void *ctx, const tm_triple *t)
{
	cov *c = ctx;
	char lang[4] = {0};
	int rc;
	memcpy(lang, t->lang, t->ll < 3 ? t->ll : 3);
	if (c->f && c->f->occ && (strlen(c->f->occ) != t->ol || memcmp(c->f->occ, t->occ, t->ol)))
		return 0;
	if (c->f && c->f->lang && strcmp(c->f->lang, lang))
		return 0;
	if (!c->open || c->occ.len != t->ol || memcmp(c->occ.data, t->occ, t->ol) ||
	    strcmp(c->lang, lang)) {
		if ((rc = flush_group(c)) != 0)
			return rc;
		buf_reset(&c->occ);
		if (buf_append(&c->occ, t->occ, t->ol))
			return c->oom = -1;
		memcpy(c->lang, lang, 4);
		c->open = 1;
		c->matched = c->pref = c->seen = 0;
		c->ntop = 0;
		labkeys_group(&c->lk, c->ls, t->occ, t->ol, lang, &c->at, &c->end);
	}
	/* the triples come in key order: pass the label keys before this one */
	int cmp = 1;
	while (c->at < c->end) {
		const label *lb = &c->ls->v[c->lk.v[c->at].lab];
		if ((cmp = labkeys_cmp(lab_str(c->ls, lb->key), lb->keylen, t->key, t->kl)) >= 0)
			break;
		c->at++;
	}
	if (t->kl && c->at < c->end && cmp == 0) {
		c->matched += t->postings;
		c->seen++;
		if (c->lk.v[c->at].pref)
			c->pref += t->postings;
		return 0;
	}
	/* the biggest unmatched titles; ties keep the first in key order */
	int pos = c->ntop;
	while (pos > 0 && c->top[pos - 1].n < t->postings)
		pos--;
	if (pos >= COVERAGE_TOP)
		return 0;
	if (c->ntop < COVERAGE_TOP)
		c->ntop++;
	top_t last = c->top[c->ntop - 1];
	memmove(&c->top[pos + 1], &c->top[pos], (size_t)(c->ntop - 1 - pos) * sizeof c->top[0]);
	c->top[pos] = last; /* reuse the buffers of the one pushed out */
	buf_reset(&c->top[pos].title);
	buf_reset(&c->top[pos].key);
	if (buf_append(&c->top[pos].title, t->title, t->tl) ||
	    buf_append(&c->top[pos].key, t->key, t->kl))
		return c->oom = -1;
	c->top[pos].n = t->postings;
	return 0;
}

int coverage_run(tally_mem *m, const labelset *ls, const coverage_filter *f, coverage_fn fn,
		 void *ctx)
{
	cov c;
	int rc;

	memset(&c, 0, sizeof c);
	c.ls = ls;
	c.m = m;
	c.f = f;
	c.fn = fn;
	c.ctx = ctx;
	if (labkeys_build(&c.lk, ls) != 0)
		return -1;
	rc = tm_each_triple(m, on_triple, &c);
	if (rc == 0)
		rc = flush_group(&c);
	if (rc == 0) {
		c.ntop = 0;
		rc = emit(&c, "*", 1, "*", c.t_postings, c.t_matched, c.t_pref, c.t_labels,
			  c.t_unseen);
	}
	for (int i = 0; i < COVERAGE_TOP; i++) {
		buf_free(&c.top[i].title);
		buf_free(&c.top[i].key);
	}
	buf_free(&c.occ);
	labkeys_free(&c.lk);
	return rc;
}

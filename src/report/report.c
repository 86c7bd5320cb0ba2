/* report.c - the HTML report (report.h).
 *
 * One pass of the coverage engine keeps its rows; the ranker gives the
 * suggestions; one pass over the counts' triples and one over the labels
 * gather the label shares of the occupations that get a section.  Then
 * the page is written top to bottom into one buffer, section by section
 * (report_int.h says which file writes which).  Linear in rows,
 * labels and suggestions, plus the sorts. */
#include "report/report.h"

#include <stdlib.h>
#include <string.h>

#include "core/err.h"
#include "report/report_int.h"

const char *rp_str(const rep *r, uint32_t off)
{
	return r->arena.data + off;
}

static uint32_t keep(rep *r, const char *s, size_t n)
{
	uint32_t off = (uint32_t)r->arena.len;
	if (buf_append(&r->arena, s, n) || buf_putc(&r->arena, 0))
		r->oom = 1;
	return off;
}

static int on_row(void *ctx, const coverage_row *x)
{
	rep *r = ctx;
	crow c;
	memset(&c, 0, sizeof c);
	c.occ = keep(r, x->occ, x->ol);
	c.ol = (uint32_t)x->ol;
	snprintf(c.lang, sizeof c.lang, "%s", x->lang);
	c.postings = x->postings;
	c.matched = x->matched;
	c.pref = x->pref_matched;
	c.labels = x->labels;
	c.unseen = x->unseen;
	c.share = x->share;
	c.low = x->low;
	c.high = x->high;
	c.pref_share = x->pref_share;
	for (int i = 0; i < x->ntop; i++) {
		c.top[i].title = keep(r, x->top[i].title, x->top[i].tl);
		c.top[i].tl = (uint32_t)x->top[i].tl;
		c.top[i].key = keep(r, x->top[i].key, x->top[i].kl);
		c.top[i].kl = (uint32_t)x->top[i].kl;
		c.top[i].n = x->top[i].postings;
	}
	c.ntop = x->ntop;
	if (r->oom)
		return -1;
	if (x->ol == 1 && x->occ[0] == '*') {
		r->total = c;
		r->have_total = 1;
		return 0;
	}
	crow *v = tm_grow(r->rows, &r->cap, r->n + 1, sizeof *v, 256);
	if (!v)
		return -1;
	r->rows = v;
	r->rows[r->n++] = c;
	return 0;
}

/* ---- choosing the sections ---- */

static const rep *SORT_REP; /* qsort has no context argument */

static int by_weakness(const void *a0, const void *b0)
{
	const crow *a = &SORT_REP->rows[*(const size_t *)a0], *b = &SORT_REP->rows[*(const size_t *)b0];
	if (a->share != b->share)
		return a->share < b->share ? -1 : 1;
	if (a->postings != b->postings)
		return a->postings > b->postings ? -1 : 1;
	int c = strcmp(rp_str(SORT_REP, a->occ), rp_str(SORT_REP, b->occ));
	return c ? c : strcmp(a->lang, b->lang);
}

/* The rows with enough postings, weakest first; *n their number. */
static size_t *weakest(rep *r, size_t *n)
{
	size_t *ix = malloc((r->n ? r->n : 1) * sizeof *ix), k = 0;
	if (!ix)
		return NULL;
	for (size_t i = 0; i < r->n; i++)
		if (r->rows[i].postings >= r->o->min_postings && r->rows[i].postings)
			ix[k++] = i;
	SORT_REP = r;
	tm_qsort(ix, k, sizeof *ix, by_weakness);
	*n = k;
	return ix;
}

static const tm_buf *join(rep *r, const char *a, size_t al, const char *b, size_t bl)
{
	buf_reset(&r->j);
	buf_append(&r->j, a, al);
	buf_putc(&r->j, '\x1F');
	buf_append(&r->j, b, bl);
	if (buf_status(&r->j))
		r->oom = 1;
	return &r->j;
}

static int add_section(rep *r, size_t row)
{
	size_t idx;
	crow *c = &r->rows[row];
	const tm_buf *k = join(r, rp_str(r, c->occ), c->ol, c->lang, strlen(c->lang));
	int added = r->oom ? -1 : st_add(&r->secidx, k->data, k->len, 0, &idx);
	if (added < 0)
		return -1;
	if (!added)
		return 0;
	sec *s = realloc(r->secs, (r->nsec + 1) * sizeof *s);
	if (!s)
		return -1;
	r->secs = s;
	memset(&s[r->nsec], 0, sizeof *s);
	s[r->nsec].row = row;
	r->secidx.ent[idx].count = ++r->nsec;
	c->section = (int)r->nsec;
	return 0;
}

static int choose_sections(rep *r, const size_t *weak, size_t nweak)
{
	if (r->o->occs) {
		for (int i = 0; i < r->o->nocc; i++) {
			size_t before = r->nsec;
			for (size_t k = 0; k < r->n; k++)
				if (!strcmp(rp_str(r, r->rows[k].occ), r->o->occs[i]) && add_section(r, k))
					return -1;
			if (r->nsec == before && r->o->notes &&
			    buf_printf(r->o->notes, "occupation '%s' has no postings%s%s\n",
				       r->o->occs[i], r->o->lang ? " in " : "",
				       r->o->lang ? r->o->lang : ""))
				return -1;
		}
		return 0;
	}
	for (size_t i = 0; i < nweak && r->nsec < r->o->sections; i++)
		if (add_section(r, weak[i]))
			return -1;
	return 0;
}

/* The section of (occ, lang), or -1. */
long rp_section_of(rep *r, const char *occ, size_t ol, const char *lang, size_t ll)
{
	const tm_buf *k = join(r, occ, ol, lang, ll);
	long i = r->oom ? -1 : st_find(&r->secidx, k->data, k->len);
	return i < 0 ? -1 : (long)r->secidx.ent[i].count - 1;
}

static const tm_buf *sec_key(rep *r, long s, const char *key, size_t kl)
{
	char num[24];
	int n = snprintf(num, sizeof num, "%ld", s);
	return join(r, num, (size_t)n, key, kl);
}

static int on_triple(void *ctx, const tm_triple *t)
{
	rep *r = ctx;
	size_t idx;
	long s = rp_section_of(r, t->occ, t->ol, t->lang, t->ll);
	if (s < 0)
		return r->oom ? -1 : 0;
	const tm_buf *k = sec_key(r, s, t->key, t->kl);
	if (r->oom || st_add(&r->keyn, k->data, k->len, t->postings, &idx) < 0)
		return -1;
	return 0;
}

static int gather_labels(rep *r)
{
	if (!r->nsec)
		return 0;
	if (tm_each_triple(r->m, on_triple, r))
		return -1;
	for (size_t i = 0; i < r->ls->n; i++) {
		const label *lb = &r->ls->v[i];
		long s = rp_section_of(r, lab_str(r->ls, lb->occ), lb->occlen, lb->lang,
				    strlen(lb->lang));
		size_t idx;
		if (s < 0) {
			if (r->oom)
				return -1;
			continue;
		}
		const tm_buf *k = sec_key(r, s, lab_str(r->ls, lb->key), lb->keylen);
		int added = r->oom ? -1 : st_add(&r->seen, k->data, k->len, 0, &idx);
		if (added < 0)
			return -1;
		if (!added)
			continue;
		sec *x = &r->secs[s];
		size_t *v = tm_grow(x->lab, &x->labcap, x->nlab + 1, sizeof *v, 8);
		if (!v)
			return -1;
		x->lab = v;
		x->lab[x->nlab++] = i;
	}
	return 0;
}

int rp_by_section(rep *r, const long *where, size_t n, size_t **start, size_t *order)
{
	size_t *st = calloc(r->nsec + 2, sizeof *st);
	if (!st)
		return -1;
	for (size_t i = 0; i < n; i++)
		if (where[i] >= 0)
			st[where[i] + 2]++;
	for (size_t k = 2; k < r->nsec + 2; k++)
		st[k] += st[k - 1];
	for (size_t i = 0; i < n; i++)
		if (where[i] >= 0)
			order[st[where[i] + 1]++] = i;
	*start = st;
	return 0;
}

/* Groups the suggestions by section, in list order. */
static int index_suggestions(rep *r)
{
	long *where = malloc((r->sugg.n ? r->sugg.n : 1) * sizeof *where);
	r->bysec = malloc((r->sugg.n ? r->sugg.n : 1) * sizeof *r->bysec);
	int rc = where && r->bysec ? 0 : -1;
	for (size_t i = 0; !rc && i < r->sugg.n; i++) {
		const propose_sugg *x = &r->sugg.v[i];
		where[i] = r->nsec ? rp_section_of(r, x->occ, x->ol, x->lang, strlen(x->lang)) : -1;
		rc = r->oom ? -1 : 0;
	}
	if (!rc)
		rc = rp_by_section(r, where, r->sugg.n, &r->secstart, r->bysec);
	free(where);
	return rc;
}

uint64_t rp_key_postings(rep *r, long s, const char *key, size_t kl)
{
	const tm_buf *k = sec_key(r, s, key, kl);
	long i = r->oom ? -1 : st_find(&r->keyn, k->data, k->len);
	return i < 0 ? 0 : r->keyn.ent[i].count;
}

int report_write(tally_mem *m, const labelset *ls, const report_opts *o, tm_buf *out,
		 tm_buf *err)
{
	rep r;
	size_t *weak = NULL, nweak = 0;
	int st = TM_ENOMEM;
	memset(&r, 0, sizeof r);
	r.m = m;
	r.ls = ls;
	r.o = o;
	r.out = out;
	coverage_filter cf = {NULL, o->lang};
	propose_filter pf = {NULL, o->lang};
	if (coverage_run(m, ls, &cf, on_row, &r) || r.oom)
		goto done;
	if (!(weak = weakest(&r, &nweak)) || choose_sections(&r, weak, nweak) ||
	    gather_labels(&r) || propose_run(m, ls, o->bars, &pf, &r.sugg) ||
	    index_suggestions(&r) || rp_gather_periods(&r))
		goto done;
	rp_head(&r);
	if (rp_overview(&r) || rp_coverage(&r, weak, nweak))
		goto done;
	rp_put(&r, "<section id=\"occupations\">\n<h2>Occupations to look at</h2>\n<p>");
	if (o->occs)
		rp_put(&r, "The occupations asked for.");
	else
		buf_printf(out, "The %zu occupations (in a language) with the lowest coverage among "
				"those with at least %llu postings.", r.nsec,
			   (unsigned long long)o->min_postings);
	rp_put(&r, "</p>\n");
	for (size_t i = 0; i < r.nsec; i++)
		if (rp_occ_section(&r, i))
			goto done;
	if (!r.nsec)
		rp_put(&r, "<p class=\"tm-muted\">None.</p>\n");
	rp_put(&r, "</section>\n");
	if (rp_suggestions(&r) || (o->trend && rp_trend(&r)) || (o->overlap && rp_overlap(&r)))
		goto done;
	rp_reading(&r);
	rp_foot(&r);
	st = buf_status(out);
done:
	if (st)
		tm_fail(err, st, NULL, "out of memory while writing the report", NULL);
	free(weak);
	for (size_t i = 0; i < r.nsec; i++)
		free(r.secs[i].lab);
	free(r.secs);
	free(r.secstart);
	free(r.bysec);
	free(r.pts);
	free(r.ptstart);
	free(r.rows);
	buf_free(&r.arena);
	buf_free(&r.j);
	st_free(&r.secidx);
	st_free(&r.keyn);
	st_free(&r.seen);
	propose_list_free(&r.sugg);
	return st;
}

/* trend.c - titles rising and falling between two windows (trend.h).
 *
 * Both counts' triples are listed in their sorted order (occupation,
 * language, key) and walked together, one occupation and language at a
 * time: linear in the triples of both windows, plus the sort of the rows
 * reported. */
#include "rank/trend.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

const char *const trend_direction_names[2] = {"rising", "falling"};

#define TREND_BAR_DEFAULT(type, kind, m, opt, arg, def, lo, hi, meaning) b->m = (type)(def);
void trend_bars_default(trend_bars *b)
{
	TREND_BARS(TREND_BAR_DEFAULT)
}

typedef struct side {
	tm_triple *t;
	size_t n, cap;
} side;

static int collect(void *c0, const tm_triple *x)
{
	side *s = c0;
	tm_triple *t = tm_grow(s->t, &s->cap, s->n + 1, sizeof *t, 4096);
	if (!t)
		return -1;
	s->t = t;
	s->t[s->n++] = *x;
	return 0;
}

static int bytes_cmp(const char *a, size_t an, const char *b, size_t bn)
{
	int c = memcmp(a, b, an < bn ? an : bn);
	return c ? c : (an > bn) - (an < bn);
}

/* Order of the (occupation, language) of two triples. */
static int group_cmp(const tm_triple *a, const tm_triple *b)
{
	int c = bytes_cmp(a->occ, a->ol, b->occ, b->ol);
	return c ? c : bytes_cmp(a->lang, a->ll, b->lang, b->ll);
}

static int key_cmp(const tm_triple *a, const tm_triple *b)
{
	return bytes_cmp(a->key, a->kl, b->key, b->kl);
}

static int wanted(const tm_triple *t, const trend_filter *f)
{
	if (!f)
		return 1;
	if (f->occ && (strlen(f->occ) != t->ol || memcmp(f->occ, t->occ, t->ol)))
		return 0;
	if (f->lang && (strlen(f->lang) != t->ll || memcmp(f->lang, t->lang, t->ll)))
		return 0;
	return 1;
}

typedef struct walk {
	tally_mem *mb, *ma;
	const labelset *ls;
	const trend_bars *b;
	trend_list *out;
	size_t cap;
} walk;

/* Tests one title of a group; pb, pa its postings, ob, oa the
 * occupation's; x the triple of the window where it is stronger. */
static int test(walk *w, const tm_triple *x, uint64_t pb, uint64_t pa, uint64_t ob,
		uint64_t oa)
{
	double sb = (double)pb / (double)ob, sa = (double)pa / (double)oa;
	int dir;
	if (sa > sb)
		dir = TREND_RISING;
	else if (sb > sa)
		dir = TREND_FALLING;
	else
		return 0;
	uint64_t strong = dir == TREND_RISING ? pa : pb;
	double hi = dir == TREND_RISING ? sa : sb, lo = dir == TREND_RISING ? sb : sa;
	if (strong < w->b->min_postings || hi < w->b->min_ratio * lo)
		return 0;
	double g = g2(pa, oa - pa, pb, ob - pb);
	if (!(g >= w->b->min_g2))
		return 0;
	trend_row *v = tm_grow(w->out->v, &w->cap, w->out->n + 1, sizeof *v, 256);
	if (!v)
		return -1;
	w->out->v = v;
	trend_row *r = &v[w->out->n++];
	memset(r, 0, sizeof *r);
	r->direction = dir;
	r->occ = x->occ;
	r->ol = x->ol;
	r->key = x->key;
	r->kl = x->kl;
	r->title = x->title;
	r->tl = x->tl;
	memcpy(r->lang, x->lang, x->ll < 3 ? x->ll : 3);
	r->lb = labels_find(w->ls, x->occ, x->ol, r->lang, x->key, x->kl);
	r->before = pb;
	r->after = pa;
	r->occ_before = ob;
	r->occ_after = oa;
	r->share_before = sb;
	r->share_after = sa;
	wilson(pb, ob, STATS_Z95, &r->lo_before, &r->hi_before);
	wilson(pa, oa, STATS_Z95, &r->lo_after, &r->hi_after);
	r->g2 = g;
	return 0;
}

static int row_cmp(const void *a0, const void *b0)
{
	const trend_row *a = a0, *b = b0;
	int c;
	if (a->direction != b->direction)
		return a->direction - b->direction;
	if (a->g2 != b->g2)
		return a->g2 > b->g2 ? -1 : 1;
	if ((c = bytes_cmp(a->occ, a->ol, b->occ, b->ol)))
		return c;
	if ((c = strcmp(a->lang, b->lang)))
		return c;
	return bytes_cmp(a->key, a->kl, b->key, b->kl);
}

int trend_run(tally_mem *before, tally_mem *after, const labelset *ls, const trend_bars *b,
	      const trend_filter *f, trend_list *out)
{
	side sb = {0}, sa = {0};
	walk w = {before, after, ls, b, out, 0};
	int r = 0;
	memset(out, 0, sizeof *out);
	if (tm_each_triple(before, collect, &sb) || tm_each_triple(after, collect, &sa)) {
		r = -1;
		goto done;
	}
	size_t i = 0, j = 0;
	while (r == 0 && (i < sb.n || j < sa.n)) {
		/* the next (occupation, language) group of either side */
		int c = i == sb.n ? 1 : j == sa.n ? -1 : group_cmp(&sb.t[i], &sa.t[j]);
		size_t ie = i, je = j;
		const tm_triple *g = c <= 0 ? &sb.t[i] : &sa.t[j];
		if (c <= 0)
			while (ie < sb.n && !group_cmp(&sb.t[ie], g))
				ie++;
		if (c >= 0)
			while (je < sa.n && !group_cmp(&sa.t[je], g))
				je++;
		if (!wanted(g, f)) {
			i = ie;
			j = je;
			continue;
		}
		if (c != 0) {
			out->one_window++;
			i = ie;
			j = je;
			continue;
		}
		char lang[4] = {0};
		memcpy(lang, g->lang, g->ll < 3 ? g->ll : 3);
		uint64_t ob = tm_occ_postings(before, g->occ, g->ol, lang);
		uint64_t oa = tm_occ_postings(after, g->occ, g->ol, lang);
		if (!ob || !oa) {
			out->one_window++;
			i = ie;
			j = je;
			continue;
		}
		while (r == 0 && (i < ie || j < je)) {
			int k = i == ie ? 1 : j == je ? -1 : key_cmp(&sb.t[i], &sa.t[j]);
			uint64_t pb = k <= 0 ? sb.t[i].postings : 0, pa = k >= 0 ? sa.t[j].postings : 0;
			/* the display title of the window where the share is higher */
			const tm_triple *x = k < 0 ? &sb.t[i] : k > 0 ? &sa.t[j]
				: (double)pa / (double)oa >= (double)pb / (double)ob ? &sa.t[j] : &sb.t[i];
			/* counts tables hold a title's postings at most once per
			 * occupation: a share above 1 is a broken table, left out */
			if (pb <= ob && pa <= oa)
				r = test(&w, x, pb, pa, ob, oa);
			if (k <= 0)
				i++;
			if (k >= 0)
				j++;
		}
	}
	if (r == 0 && out->n)
		tm_qsort(out->v, out->n, sizeof *out->v, row_cmp);
done:
	free(sb.t);
	free(sa.t);
	if (r) {
		trend_list_free(out);
		return -1;
	}
	return 0;
}

void trend_list_free(trend_list *l)
{
	free(l->v);
	memset(l, 0, sizeof *l);
}

/* ---- windows over periods ---- */

/* The first day of the period of kind holding day z. */
static long period_start(int kind, long z)
{
	char l[PERIOD_MAX];
	long a, b;
	size_t n = period_label(kind, z, l);
	period_span(l, n, &a, &b, NULL);
	return a;
}

int trend_default_windows(tally_series *s, long today, int have_before, int have_after,
			  long *b0, long *b1, long *a0, long *a1)
{
	int kind = s->seen_kind;
	if (have_before && have_after)
		return 0;
	if (kind == PERIOD_NONE)
		return -1;
	if (!have_after) {
		const series_period *latest = NULL;
		for (size_t i = 0; i < s->n; i++) {
			const series_period *p = s->p[i];
			if (p->len && p->last < today && (p->m.occs.n || p->m.keys.n) &&
			    (!latest || p->first > latest->first))
				latest = p;
		}
		if (!latest)
			return -2;
		*a0 = latest->first;
		*a1 = latest->last;
	}
	if (!have_before) {
		long d = *a0;
		for (int i = 0; i < TREND_BEFORE_PERIODS; i++)
			d = period_start(kind, d - 1);
		*b0 = d;
		*b1 = *a0 - 1;
	}
	return 0;
}

void trend_window_text(int kind, long a, long b, char *out, size_t cap)
{
	char x[PERIOD_MAX], y[PERIOD_MAX];
	long s1, e1, s2, e2;
	size_t n1, n2;
	if (kind != PERIOD_DAY && kind != PERIOD_WEEK && kind != PERIOD_MONTH)
		kind = PERIOD_DAY;
	n1 = period_label(kind, a, x);
	n2 = period_label(kind, b, y);
	period_span(x, n1, &s1, &e1, NULL);
	period_span(y, n2, &s2, &e2, NULL);
	if (s1 != a || e2 != b) {
		period_label(PERIOD_DAY, a, x);
		period_label(PERIOD_DAY, b, y);
	}
	if (!strcmp(x, y))
		snprintf(out, cap, "%s", x);
	else
		snprintf(out, cap, "%s..%s", x, y);
}

/* The joined key occ 1F lang 1F key of a row, in k. */
static int row_key(const trend_row *r, tm_buf *k)
{
	buf_reset(k);
	buf_append(k, r->occ, r->ol);
	buf_putc(k, '\x1F');
	buf_puts(k, r->lang);
	buf_putc(k, '\x1F');
	buf_append(k, r->key, r->kl);
	return buf_status(k) ? -1 : 0;
}

/* ---- a change that outlasts its bursts ---- */

/* Is period p wholly within days from..to (the undated never)? */
static int within(const series_period *p, long from, long to)
{
	return p->len && p->first >= from && p->last <= to;
}

long trend_window_used(const tally_series *s, long from, long to, char *out, size_t cap)
{
	long u0 = 1, u1 = 0, partial = 0;
	for (size_t i = 0; i < s->n; i++) {
		const series_period *p = s->p[i];
		if (within(p, from, to)) {
			int none = u0 > u1;
			if (none || p->first < u0)
				u0 = p->first;
			if (none || p->last > u1)
				u1 = p->last;
		} else if (p->len && p->first <= to && p->last >= from)
			partial++;
	}
	if (u0 > u1)
		trend_window_text(s->seen_kind, from, to, out, cap);
	else
		trend_window_text(s->seen_kind, u0, u1, out, cap);
	return partial;
}

/* A window's periods among the dated ones in time order: [w0, w1), and
 * the span its bursts are judged in, up to as many periods again on
 * each side: [x0, x1). */
typedef struct span {
	size_t w0, w1, x0, x1;
} span;

/* One period of a row's span: the title's postings and the
 * occupation's. */
typedef struct lasting_cell {
	uint64_t title, occ;
} lasting_cell;

/* Does the title's share in period c pass the bars against its share in
 * the periods summed to t of o (a context), upwards (up) or downwards?
 * The postings where the share is higher must reach min_postings. */
static int apart(const lasting_cell *c, uint64_t t, uint64_t o, int up, const trend_bars *b)
{
	if (!o || !c->occ || t > o || c->title > c->occ || (up ? c->title : t) < b->min_postings)
		return 0;
	double sk = (double)c->title / (double)c->occ, sr = (double)t / (double)o;
	double hi = up ? sk : sr, lo = up ? sr : sk;
	return hi > lo && hi >= b->min_ratio * lo &&
	       g2(c->title, c->occ - c->title, t, o - t) >= b->min_g2;
}

/* The postings of the title (*t) and the occupation (*o) in the periods
 * of window sp that are no outlier: a burst (up) or a dip (!up) is a
 * period apart from both its contexts, up to as many periods as the
 * window holds before it and after it.  c: the cells of sp's span (from
 * sp.x0), pre: room for one more.  Returns the number of outliers; 0
 * too when the window has fewer than TREND_LASTING_MIN_PERIODS periods
 * that counted the occupation (then *t, *o are the whole window's). */
static size_t unusual(const lasting_cell *c, span sp, int up, const trend_bars *b,
		      lasting_cell *pre, uint64_t *t, uint64_t *o)
{
	size_t n = sp.x1 - sp.x0, w0 = sp.w0 - sp.x0, w1 = sp.w1 - sp.x0, len = w1 - w0, with = 0,
	       out = 0;
	pre[0].title = pre[0].occ = 0;
	for (size_t i = 0; i < n; i++) {
		pre[i + 1].title = pre[i].title + c[i].title;
		pre[i + 1].occ = pre[i].occ + c[i].occ;
	}
	for (size_t i = w0; i < w1; i++)
		with += c[i].occ > 0;
	*t = *o = 0;
	for (size_t i = w0; i < w1; i++) {
		size_t a = i >= len ? i - len : 0, z = i + 1 + len < n ? i + 1 + len : n;
		if (with >= TREND_LASTING_MIN_PERIODS &&
		    apart(&c[i], pre[i].title - pre[a].title, pre[i].occ - pre[a].occ, up, b) &&
		    apart(&c[i], pre[z].title - pre[i + 1].title, pre[z].occ - pre[i + 1].occ, up,
			  b)) {
			out++;
			continue;
		}
		*t += c[i].title;
		*o += c[i].occ;
	}
	return out;
}

/* Does row r's change hold without the bursts of the window where its
 * share is higher and the dips of the other?  c: the cells of the
 * strong window's span, then the weak one's. */
static int lasts(const trend_row *r, const lasting_cell *c, const span sp[2],
		 const trend_bars *b, lasting_cell *pre)
{
	int w = r->direction;
	const span *hi = &sp[w], *lo = &sp[!w];
	uint64_t th, oh, tl, ol;
	size_t n = unusual(c, *hi, 1, b, pre, &th, &oh) +
		   unusual(c + (hi->x1 - hi->x0), *lo, 0, b, pre, &tl, &ol);
	if (!n)
		return 1;
	if (!oh || !ol)
		return 0;
	double strong = (double)th / (double)oh, weak = (double)tl / (double)ol;
	return strong > weak && strong >= b->min_ratio * weak;
}

/* Where the cells of window w's span begin for row r, whose cells begin
 * at off: its stronger window's span first. */
static size_t cell_at(const trend_row *r, const span sp[2], int w, size_t off)
{
	return w == r->direction ? off : off + sp[!w].x1 - sp[!w].x0;
}

int trend_periods(tally_series *s, long b0, long b1, long a0, long a1, const trend_bars *b,
		  trend_list *l, const char **first)
{
	series_period **v = NULL;
	size_t np = 0, nd = 0, *off = NULL, total = 0, most = 0;
	span sp[2];
	strtab want = {0};
	tm_buf k = {0};
	lasting_cell *cell = NULL, *pre = NULL;
	long *row_of = NULL;
	const char **at = NULL;
	int rc = -1;

	if (!l->n)
		return 0;
	if (!(v = series_sorted(s, &np)) && s->n)
		return -1;
	/* the dated periods, in time order */
	for (size_t p = 0; p < np; p++)
		if (v[p]->len)
			v[nd++] = v[p];
	/* each window's run of periods (0 rising: the later; 1 falling: the
	 * earlier) and its span */
	for (int w = 0; w < 2; w++) {
		long from = w == TREND_RISING ? a0 : b0, to = w == TREND_RISING ? a1 : b1;
		size_t p = 0;
		while (p < nd && !within(v[p], from, to))
			p++;
		sp[w].w0 = sp[w].w1 = p;
		while (sp[w].w1 < nd && within(v[sp[w].w1], from, to))
			sp[w].w1++;
		size_t len = sp[w].w1 - sp[w].w0;
		sp[w].x0 = sp[w].w0 >= len ? sp[w].w0 - len : 0;
		sp[w].x1 = sp[w].w1 + len < nd ? sp[w].w1 + len : nd;
		if (sp[w].x1 - sp[w].x0 > most)
			most = sp[w].x1 - sp[w].x0;
	}
	/* every row's key; the cells of each row checked at off[i] */
	if (!(off = malloc(l->n * sizeof *off)) || !(row_of = malloc(l->n * sizeof *row_of)) ||
	    !(at = calloc(l->n, sizeof *at)) || !(pre = malloc((most + 1) * sizeof *pre)))
		goto done;
	int check = sp[0].w1 - sp[0].w0 >= TREND_LASTING_MIN_PERIODS ||
		    sp[1].w1 - sp[1].w0 >= TREND_LASTING_MIN_PERIODS;
	for (size_t i = 0; i < l->n; i++) {
		size_t e;
		if (row_key(&l->v[i], &k) || st_add(&want, k.data, k.len, 0, &e) < 0)
			goto done;
		row_of[e] = (long)i;
		off[i] = SIZE_MAX;
		if (check) {
			off[i] = total;
			total += sp[0].x1 - sp[0].x0 + sp[1].x1 - sp[1].x0;
		}
	}
	if (!(cell = calloc(total ? total : 1, sizeof *cell)))
		goto done;
	/* one walk over the periods' forms (a title's forms summed): where
	 * each row was first seen, and its postings period by period */
	for (size_t p = 0; p < nd; p++) {
		const strtab *f = &v[p]->m.forms;
		int in[2];
		for (int w = 0; w < 2; w++)
			in[w] = p >= sp[w].x0 && p < sp[w].x1;
		if (!first && !in[0] && !in[1])
			continue;
		for (size_t i = 0; i < f->n; i++) {
			size_t n, cut = 0, seps = 0;
			const char *key = st_key(f, i, &n);
			while (cut < n && (key[cut] != '\x1F' || ++seps < 3))
				cut++;
			long e = st_find(&want, key, cut);
			if (e < 0)
				continue;
			size_t r = (size_t)row_of[e];
			if (!at[r])
				at[r] = v[p]->label;
			if (off[r] != SIZE_MAX)
				for (int w = 0; w < 2; w++)
					if (in[w])
						cell[cell_at(&l->v[r], sp, w, off[r]) + p - sp[w].x0].title +=
							f->ent[i].count;
		}
	}
	/* the occupation's postings in each period of a row's span */
	for (size_t r = 0; r < l->n; r++)
		for (int w = 0; off[r] != SIZE_MAX && w < 2; w++) {
			size_t at0 = cell_at(&l->v[r], sp, w, off[r]);
			for (size_t p = sp[w].x0; p < sp[w].x1; p++)
				cell[at0 + p - sp[w].x0].occ =
					tm_occ_postings(&v[p]->m, l->v[r].occ, l->v[r].ol, l->v[r].lang);
		}
	size_t kept = 0;
	for (size_t i = 0; i < l->n; i++)
		if (off[i] == SIZE_MAX || lasts(&l->v[i], &cell[off[i]], sp, b, pre)) {
			if (first)
				first[kept] = at[i];
			l->v[kept++] = l->v[i];
		}
	l->n = kept;
	rc = 0;
done:
	free(v);
	free(off);
	free(row_of);
	free(at);
	free(cell);
	free(pre);
	st_free(&want);
	buf_free(&k);
	return rc;
}

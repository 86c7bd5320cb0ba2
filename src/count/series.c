/* series.c - counts by period, and the memory backend over them. */
#include "count/series.h"

#include <limits.h>
#include <stdlib.h>
#include <string.h>


void series_init(tally_series *s, int kind)
{
	memset(s, 0, sizeof *s);
	s->kind = kind;
	s->seen_kind = PERIOD_NONE;
}

void series_free(tally_series *s)
{
	for (size_t i = 0; i < s->n; i++) {
		tm_free(&s->p[i]->m);
		free(s->p[i]);
	}
	free(s->p);
	st_free(&s->index);
	st_free(&s->left);
	ids_free(&s->ids);
	memset(s, 0, sizeof *s);
}

void series_window(tally_series *s, long from, long to)
{
	s->windowed = 1;
	s->from = from;
	s->to = to;
}

/* The engine of target label t[0..n) (first..last its days), new when
 * it is not there yet.  NULL when memory ran out. */
static tally_mem *period_get(tally_series *s, const char *t, size_t n, long first, long last)
{
	size_t idx;
	long at = st_find(&s->index, t, n);
	if (at >= 0)
		return &s->p[s->index.ent[at].count]->m;
	series_period **v = tm_grow(s->p, &s->cap, s->n + 1, sizeof *v, 16);
	if (!v)
		return NULL;
	s->p = v;
	series_period *p = calloc(1, sizeof *p);
	if (!p || st_add(&s->index, t, n, 0, &idx) < 0) {
		free(p);
		return NULL;
	}
	memcpy(p->label, t, n);
	p->len = (uint8_t)n;
	p->first = n ? first : LONG_MIN;
	p->last = n ? last : LONG_MIN;
	tm_init(&p->m);
	s->index.ent[idx].count = s->n;
	s->p[s->n++] = p;
	return &p->m;
}

static int say(tm_buf *err, const char *a, const char *label, size_t n, const char *b)
{
	buf_reset(err);
	buf_puts(err, a);
	buf_append(err, label, n);
	buf_puts(err, b);
	return -1;
}

/* Remembers a label the window leaves out (why: 1 outside, 2 partly
 * inside), counting each once. */
static int leave_out(tally_series *s, const char *label, size_t n, int why)
{
	size_t idx;
	int r = st_add(&s->left, label, n, 0, &idx);
	if (r < 0)
		return -2;
	if (r == 1) {
		s->left.ent[idx].count = (uint64_t)why;
		if (why == 2)
			s->partial++;
		else
			s->dropped++;
	}
	return 0;
}

/* 1 when the period label[0..n) (days first..last) lies wholly within
 * s's window; else 0 after remembering it as left out (-2: memory). */
static int in_window(tally_series *s, const char *label, size_t n, long first, long last)
{
	if (!n || last < s->from || first > s->to)
		return leave_out(s, label, n, 1);
	if (first < s->from || last > s->to)
		return leave_out(s, label, n, 2);
	return 1;
}

static int resolve(tally_series *s, const char *label, size_t n, tally_mem **m, tm_buf *err)
{
	long first = 1, last = 0;
	int kind = PERIOD_NONE;
	char t[PERIOD_MAX];
	size_t tn = 0;

	*m = NULL;
	if (n && (n >= PERIOD_MAX || period_span(label, n, &first, &last, &kind) != 0 ||
		  kind == PERIOD_QUARTER || kind == PERIOD_YEAR))
		return say(err, "bad period '", label, n > 40 ? 40 : n,
			   "' (want a day 2026-03-01, a week 2026-W09, a month 2026-03, or empty "
			   "for undated)");
	if (s->windowed && s->kind == PERIOD_NONE) {
		/* summed into one: each period (a posting: its day) on its own */
		int r = in_window(s, label, n, first, last);
		if (r <= 0)
			return r;
	}
	if (n && s->kind == SERIES_AS_READ) {
		if (s->seen_kind != PERIOD_NONE && kind != s->seen_kind) {
			char b[200];
			snprintf(b, sizeof b, "' is a %s, and the counts before it are by %s: "
				 "roll them up to one kind (--period)", period_kind_name(kind),
				 period_kind_name(s->seen_kind));
			return say(err, "period '", label, n, b);
		}
		s->seen_kind = kind;
		memcpy(t, label, n);
		tn = n;
	} else if (n && s->kind != PERIOD_NONE) {
		if (kind == s->kind) {
			memcpy(t, label, n);
			tn = n;
		} else if (kind == PERIOD_DAY) {
			tn = period_label(s->kind, first, t);
			period_span(t, tn, &first, &last, NULL);
		} else {
			char b[200];
			snprintf(b, sizeof b, "' is a %s and cannot be counted by %s (%s)",
				 period_kind_name(kind), period_kind_name(s->kind),
				 kind == PERIOD_WEEK && s->kind == PERIOD_MONTH
					 ? "a week can straddle two months"
					 : "it holds several");
			return say(err, "period '", label, n, b);
		}
		s->seen_kind = s->kind;
	}
	if (s->windowed && s->kind != PERIOD_NONE) {
		/* kept by period: whole periods of the series only */
		int r = in_window(s, t, tn, first, last);
		if (r <= 0)
			return r;
	}
	if (!(*m = period_get(s, t, tn, first, last)))
		return -2;
	return 0;
}

int series_at(tally_series *s, const char *label, size_t n, tally_mem **m, tm_buf *err)
{
	int r;
	if (s->cached && n == s->cachen && !memcmp(label, s->cache, n)) {
		*m = s->cachem;
		return 0;
	}
	if ((r = resolve(s, label, n, m, err)) != 0)
		return r;
	if (n < PERIOD_MAX) {
		memcpy(s->cache, label, n);
		s->cachen = n;
		s->cachem = *m;
		s->cached = 1;
	}
	return 0;
}

int series_add(tally_series *s, const tally_posting *tp, tm_buf *err)
{
	tally_mem *m;
	tally_posting q;
	char month[PERIOD_MAX];
	const char *d = tp->date ? tp->date : "";
	size_t dn = tp->date ? tp->datelen : 0;
	if (dn == 10 && s->kind == SERIES_AS_READ) {
		/* postings read as they come count by month, as tally's default */
		memcpy(month, d, 7);
		d = month;
		dn = 7;
	}
	int r = series_at(s, d, dn, &m, err);
	if (r)
		return r == -1 ? -2 : -1;
	if (!m) {
		s->outside++;
		return 1;
	}
	if (tp->id) {
		int k = ids_add(&s->ids, tp->id, tp->idlen);
		if (k < 0)
			return -1;
		if (k == 0) {
			s->republished++;
			return 1;
		}
	}
	q = *tp;
	q.id = NULL;
	if (tm_add(m, &q) < 0)
		return -1;
	s->postings++;
	if (!tp->date)
		s->undated++;
	return 0;
}

static int route(void *ctx, const char *period, size_t n, tally_mem **m, tm_buf *err)
{
	int r = series_at(ctx, period, n, m, err);
	if (r == -2) {
		buf_reset(err);
		buf_puts(err, "out of memory");
	}
	return r ? -1 : 0;
}

int series_read(tally_series *s, const char *path, tm_buf *err)
{
	return tm_read_routed(path, route, s, err);
}

static int cmp_period(const void *a, const void *b)
{
	const series_period *x = *(series_period *const *)a, *y = *(series_period *const *)b;
	if (x->first != y->first)
		return x->first < y->first ? -1 : 1;
	if (x->last != y->last)
		return x->last < y->last ? -1 : 1;
	return strcmp(x->label, y->label);
}

series_period **series_sorted(tally_series *s, size_t *n)
{
	series_period **v = malloc((s->n ? s->n : 1) * sizeof *v);
	*n = 0;
	if (!v)
		return NULL;
	if (s->n)
		memcpy(v, s->p, s->n * sizeof *v);
	tm_qsort(v, s->n, sizeof *v, cmp_period);
	*n = s->n;
	return v;
}

int series_write(tally_series *s, FILE *out, int with_period)
{
	size_t n;
	series_period **v = series_sorted(s, &n);
	int rc = 0;
	if (!v)
		return -1;
	fputs(with_period ? TM_HEADER "\tperiod\n" : TM_HEADER "\n", out);
	if (!with_period && n > 1) {
		tally_mem all;
		tm_init(&all);
		for (size_t i = 0; i < n && !rc; i++)
			rc = tm_merge(&all, &v[i]->m) ? -1 : 0;
		if (!rc)
			rc = tm_write_rows(&all, out, NULL, 0);
		tm_free(&all);
	} else
		for (size_t i = 0; i < n && !rc; i++)
			rc = tm_write_rows(&v[i]->m, out, with_period ? v[i]->label : NULL,
					   with_period ? v[i]->len : 0);
	free(v);
	if (!rc && ferror(out))
		rc = -1;
	return rc;
}

tally_mem *series_all(tally_series *s)
{
	return period_get(s, "", 0, 1, 0);
}

long series_sum(tally_series *s, long from, long to, tally_mem *dst)
{
	long k = 0;
	for (size_t i = 0; i < s->n; i++) {
		series_period *p = s->p[i];
		int r;
		if (!p->len || p->first < from || p->last > to)
			continue;
		if ((r = tm_merge(dst, &p->m)) != 0)
			return r;
		k++;
	}
	return k;
}

int series_merge_all(tally_series *s, tally_mem *dst)
{
	int r = 0;
	for (size_t i = 0; i < s->n && !r; i++)
		r = tm_merge(dst, &s->p[i]->m);
	return r;
}

int series_any(const tally_series *s)
{
	for (size_t i = 0; i < s->n; i++)
		if (s->p[i]->m.occs.n || s->p[i]->m.keys.n || s->p[i]->m.forms.n)
			return 1;
	return 0;
}

size_t series_bytes(const tally_series *s)
{
	size_t b = s->cap * sizeof *s->p + st_bytes(&s->index) + st_bytes(&s->left) +
		   ids_bytes(&s->ids);
	for (size_t i = 0; i < s->n; i++)
		b += sizeof *s->p[i] + tm_bytes(&s->p[i]->m);
	return b;
}

/* report_trend.c - time in the report: the titles rising and fading
 * between two windows (a trend list the caller made with rank/trend.h),
 * and each occupation section's preferred-label share per period (the
 * periods the caller added with report_periods_add); report_int.h. */
#include <stdlib.h>
#include <string.h>

#include "core/err.h"
#include "rank/stats.h"
#include "report/report_int.h"

/* ---- the periods ---- */

typedef struct addctx {
	report_periods *ps;
	uint32_t period;
	int oom;
} addctx;

static uint32_t keep(addctx *c, const char *s, size_t n)
{
	uint32_t off = (uint32_t)c->ps->arena.len;
	if (buf_append(&c->ps->arena, s, n) || buf_putc(&c->ps->arena, 0))
		c->oom = 1;
	return off;
}

static int on_cov(void *ctx, const coverage_row *x)
{
	addctx *c = ctx;
	report_periods *ps = c->ps;
	if (x->ol == 1 && x->occ[0] == '*')
		return 0;
	report_period *v = tm_grow(ps->v, &ps->cap, ps->n + 1, sizeof *v, 256);
	if (!v)
		return -1;
	ps->v = v;
	report_period *p = &v[ps->n];
	memset(p, 0, sizeof *p);
	p->occ = keep(c, x->occ, x->ol);
	p->ol = (uint32_t)x->ol;
	p->period = c->period;
	snprintf(p->lang, sizeof p->lang, "%s", x->lang);
	p->postings = x->postings;
	p->pref = x->pref_matched;
	if (c->oom)
		return -1;
	ps->n++;
	return 0;
}

int report_periods_add(report_periods *ps, const char *period, tally_mem *m, const labelset *ls,
		       const char *lang)
{
	addctx c = {ps, 0, 0};
	coverage_filter f = {NULL, lang};
	c.period = keep(&c, period, strlen(period));
	if (c.oom)
		return -1;
	return coverage_run(m, ls, &f, on_cov, &c) || c.oom ? -1 : 0;
}

void report_periods_free(report_periods *ps)
{
	if (!ps)
		return;
	free(ps->v);
	buf_free(&ps->arena);
	memset(ps, 0, sizeof *ps);
}

static int by_period(const void *a, const void *b)
{
	return strcmp(((const chart_point *)a)->period, ((const chart_point *)b)->period);
}

/* Groups the periods of the sections' occupations into r->pts (a
 * counting sort by section), each section's in period order, the same
 * period given twice summed. */
int rp_gather_periods(rep *r)
{
	const report_periods *ps = r->o->periods;
	if (!ps || !ps->n || !r->nsec)
		return 0;
	long *where = malloc(ps->n * sizeof *where);
	size_t *order = malloc(ps->n * sizeof *order);
	r->pts = calloc(ps->n, sizeof *r->pts);
	int rc = where && order && r->pts ? 0 : -1;
	for (size_t i = 0; !rc && i < ps->n; i++) {
		const report_period *p = &ps->v[i];
		where[i] = ps->arena.data[p->period]
				   ? rp_section_of(r, ps->arena.data + p->occ, p->ol, p->lang,
						   strlen(p->lang)) : -1;
		rc = r->oom ? -1 : 0;
	}
	if (!rc)
		rc = rp_by_section(r, where, ps->n, &r->ptstart, order);
	for (size_t j = 0; !rc && j < r->ptstart[r->nsec]; j++) {
		const report_period *p = &ps->v[order[j]];
		r->pts[j].period = ps->arena.data + p->period;
		r->pts[j].n = p->postings;
		r->pts[j].value = (double)p->pref; /* the count until merged */
	}
	free(where);
	free(order);
	if (rc)
		return -1;
	/* each section: sort, sum a period given twice, then the shares */
	size_t out = 0;
	for (size_t s = 0; s < r->nsec; s++) {
		size_t from = r->ptstart[s], to = r->ptstart[s + 1], start = out;
		tm_qsort(r->pts + from, to - from, sizeof *r->pts, by_period);
		for (size_t i = from; i < to; i++) {
			if (out > start && !strcmp(r->pts[out - 1].period, r->pts[i].period)) {
				r->pts[out - 1].n += r->pts[i].n;
				r->pts[out - 1].value += r->pts[i].value;
			} else
				r->pts[out++] = r->pts[i];
		}
		r->ptstart[s] = start;
		for (size_t i = start; i < out; i++) {
			chart_point *c = &r->pts[i];
			uint64_t pref = (uint64_t)c->value;
			c->value = c->n ? (double)pref / (double)c->n : 0;
			wilson(pref, c->n, STATS_Z95, &c->low, &c->high);
		}
	}
	r->ptstart[r->nsec] = out;
	return 0;
}

int rp_occ_series(rep *r, size_t si)
{
	if (!r->pts)
		return 0;
	size_t from = r->ptstart[si], to = r->ptstart[si + 1];
	if (to <= from)
		return 0;
	const crow *c = &r->rows[r->secs[si].row];
	char id[40], title[80];
	snprintf(id, sizeof id, "chart-time-%zu", si + 1);
	snprintf(title, sizeof title, "Its preferred label's share over time (%s)", c->lang);
	return chart_series(r->out, id, title,
			    "The share of the occupation's postings in each period whose title "
			    "matches its preferred label, with its 95 % Wilson interval; the table "
			    "gives the postings of each period.", r->pts + from, to - from)
		       ? -1 : 0;
}

/* ---- rising and fading titles ---- */

static const char *kind_words(const label *lb)
{
	if (!lb)
		return "";
	return lb->kind == 'p' ? "preferred label" : lb->kind == 'h' ? "hidden label"
								   : "alternative label";
}

static void trend_table(rep *r, int dir, size_t n)
{
	static const char *const cols[] = {
		"occupation", "language", "title", "a label?", "postings before",
		"postings after", "share before", "95 % interval", "share after", "95 % interval",
		"G\xC2\xB2", NULL};
	const trend_list *l = r->o->trend;
	buf_printf(r->out, "<table class=\"tm-sort tm-filterable\" id=\"trend-%s\"><caption>",
		   trend_direction_names[dir]);
	buf_printf(r->out, "%s titles, the strongest change first", dir == TREND_RISING ? "Rising"
							 : "Fading");
	rp_put(r, "</caption>\n");
	rp_th(r, cols);
	rp_put(r, "<tbody>\n");
	size_t shown = 0;
	for (size_t i = 0; i < l->n && shown < n; i++) {
		const trend_row *t = &l->v[i];
		if (t->direction != dir)
			continue;
		shown++;
		rp_put(r, "<tr>");
		rp_occ_cell(r, t->occ, t->ol, t->lang);
		rp_td_text(r, t->lang, strlen(t->lang));
		/* the label as the taxonomy writes it, else the title as the
		 * postings write it (as titlemill trend shows them) */
		if (t->lb)
			rp_td_text(r, lab_str(r->ls, t->lb->text), t->lb->textlen);
		else {
			const char *ex[TALLY_EXAMPLES];
			size_t exl[TALLY_EXAMPLES];
			int nex = tm_examples(r->m, t->occ, t->ol, t->lang, t->key, t->kl, ex, exl);
			buf_reset(&r->j);
			if (propose_as_written(ex, exl, nex, t->title, t->tl, &r->j) != 0)
				r->oom = 1;
			if (r->j.len)
				rp_td_text(r, r->j.data, r->j.len);
			else
				rp_td_text(r, t->title, t->tl);
		}
		rp_put(r, "<td>");
		rp_ctext(r, kind_words(t->lb));
		rp_put(r, "</td>");
		rp_td_u64(r, t->before);
		rp_td_u64(r, t->after);
		rp_td_pct(r, t->share_before);
		rp_td_interval(r, t->lo_before, t->hi_before);
		rp_td_pct(r, t->share_after);
		rp_td_interval(r, t->lo_after, t->hi_after);
		rp_td_num(r, t->g2);
		rp_put(r, "</tr>\n");
	}
	rp_put(r, "</tbody></table>\n");
}

int rp_trend(rep *r)
{
	const report_opts *o = r->o;
	const trend_list *l = o->trend;
	size_t n[2] = {0, 0};
	for (size_t i = 0; i < l->n; i++)
		n[l->v[i].direction == TREND_FALLING]++;
	rp_put(r, "<section id=\"trend\">\n<h2>Rising and fading titles</h2>\n<p>Titles whose "
		  "share of an occupation's postings changed beyond chance");
	if (o->trend_before && o->trend_after) {
		rp_put(r, " between ");
		rp_ctext(r, o->trend_before);
		rp_put(r, " and ");
		rp_ctext(r, o->trend_after);
	}
	rp_put(r, ": a rising title that is no label may be one to add; a fading label may be "
		  "one to keep, demote to a hidden label or retire. The figures of "
		  "<code>titlemill trend</code>.");
	if (l->one_window)
		buf_printf(r->out, " %llu occupation%s (in a language) counted in one window only "
				   "had no share to compare.", (unsigned long long)l->one_window,
			   l->one_window == 1 ? "" : "s");
	rp_put(r, "</p>\n");
	for (int d = TREND_RISING; d <= TREND_FALLING; d++) {
		buf_printf(r->out, "<h3>%s titles <span class=\"tm-muted\">(%zu)</span></h3>\n",
			   d == TREND_RISING ? "Rising" : "Fading", n[d]);
		if (!n[d]) {
			rp_put(r, "<p class=\"tm-muted\">None passes the bars.</p>\n");
			continue;
		}
		if (n[d] > o->top)
			buf_printf(r->out, "<p>The %llu strongest of %zu.</p>\n",
				   (unsigned long long)o->top, n[d]);
		trend_table(r, d, n[d] > o->top ? (size_t)o->top : n[d]);
	}
	rp_put(r, "</section>\n");
	return buf_status(r->out) ? -1 : 0;
}

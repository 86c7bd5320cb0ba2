/* report_cov.c - the overview and coverage per occupation: the figures
 * of titlemill coverage as charts and a sortable table (report_int.h). */
#include <stdlib.h>
#include <string.h>

#include "rank/stats.h"
#include "report/report_int.h"


typedef struct langsum {
	char lang[4];
	uint64_t postings, matched;
} langsum;

int rp_overview(rep *r)
{
	langsum *ls = NULL;
	size_t nl = 0, cap = 0, nocc = 0;
	for (size_t i = 0; i < r->n; i++) {
		const crow *c = &r->rows[i];
		if (i == 0 || strcmp(rp_str(r, c->occ), rp_str(r, r->rows[i - 1].occ)))
			nocc++;
		size_t k = 0;
		while (k < nl && strcmp(ls[k].lang, c->lang))
			k++;
		if (k == nl) {
			langsum *v = tm_grow(ls, &cap, nl + 1, sizeof *v, 8);
			if (!v) {
				free(ls);
				return -1;
			}
			ls = v;
			memset(&ls[nl], 0, sizeof *ls);
			memcpy(ls[nl++].lang, c->lang, sizeof c->lang);
		}
		ls[k].postings += c->postings;
		ls[k].matched += c->matched;
	}
	const crow *t = &r->total;
	rp_put(r, "<section id=\"overview\">\n<h2>Overview</h2>\n<dl class=\"tm-facts\">\n");
	buf_printf(r->out, "<dt>Postings counted per occupation</dt><dd>%llu (a posting with "
			   "two occupations counts for each)</dd>\n", (unsigned long long)t->postings);
	if (r->o->distinct)
		buf_printf(r->out, "<dt>Distinct postings</dt><dd>%llu</dd>\n",
			   (unsigned long long)r->o->distinct);
	buf_printf(r->out, "<dt>Occupations with postings</dt><dd>%zu</dd>\n"
			   "<dt>Languages</dt><dd>%zu</dd>\n", nocc, nl);
	buf_printf(r->out, "<dt>Matched by a label</dt><dd>%llu: ", (unsigned long long)t->matched);
	rp_pct(r, t->share);
	rp_put(r, " (95\xC2\xA0% interval ");
	rp_range(r, t->low, t->high);
	rp_put(r, ")</dd>\n<dt>Matched by a preferred label</dt><dd>");
	rp_pct(r, t->pref_share);
	buf_printf(r->out, "</dd>\n<dt>Labels never seen</dt><dd>%llu of %llu</dd>\n</dl>\n",
		   (unsigned long long)t->unseen, (unsigned long long)t->labels);
	chart_row *cr = calloc(nl ? nl : 1, sizeof *cr);
	if (!cr) {
		free(ls);
		return -1;
	}
	for (size_t k = 0; k < nl; k++) {
		cr[k].name = ls[k].lang;
		cr[k].nl = strlen(ls[k].lang);
		cr[k].value = ls[k].postings ? (double)ls[k].matched / (double)ls[k].postings : 0;
		wilson(ls[k].matched, ls[k].postings, STATS_Z95, &cr[k].low, &cr[k].high);
	}
	chart_rows(r->out, "chart-lang", CHART_BARS, "Coverage per language",
		   "The share of each language's postings whose title matches one of its "
		   "occupation's labels, with its 95 % Wilson interval.", "coverage", cr, nl);
	rp_put(r, "</section>\n");
	free(cr);
	free(ls);
	return 0;
}

int rp_coverage(rep *r, const size_t *weak, size_t nweak)
{
	size_t n = nweak < LOWEST_SHOWN ? nweak : LOWEST_SHOWN;
	chart_row *cr = calloc(n ? n : 1, sizeof *cr);
	tm_buf names = {0};
	size_t *off = calloc(n ? n : 1, sizeof *off);
	if (!cr || !off) {
		free(cr);
		free(off);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		const crow *c = &r->rows[weak[i]];
		size_t nn;
		const char *name = rp_occ_name(r, rp_str(r, c->occ), c->ol, c->lang, &nn);
		off[i] = names.len;
		buf_append(&names, rp_str(r, c->occ), c->ol);
		buf_printf(&names, " %s", c->lang);
		if (nn) {
			buf_puts(&names, " \xC2\xB7 ");
			buf_append(&names, name, nn);
		}
		buf_putc(&names, 0);
	}
	if (buf_status(&names)) {
		free(cr);
		free(off);
		buf_free(&names);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		const crow *c = &r->rows[weak[i]];
		cr[i].name = names.data + off[i];
		cr[i].nl = strlen(cr[i].name);
		cr[i].value = c->share;
		cr[i].low = c->low;
		cr[i].high = c->high;
	}
	rp_put(r, "<section id=\"coverage\">\n<h2>Coverage per occupation</h2>\n");
	buf_printf(r->out, "<p>The %zu occupations (in a language) with the lowest coverage among "
			   "those with at least %llu postings: the dot is the share of their "
			   "postings matched by one of their labels, the line its 95\xC2\xA0%% "
			   "interval.</p>\n", n, (unsigned long long)r->o->min_postings);
	chart_rows(r->out, "chart-lowest", CHART_DOTS, "The lowest coverage",
		   "Coverage of the lowest-covered occupations, with 95 % Wilson intervals.",
		   "coverage", cr, n);
	free(cr);
	free(off);
	buf_free(&names);
	static const char *const cols[] = {"occupation", "name", "language", "postings",
					   "coverage", "95 % interval", "preferred label",
					   "labels", "labels never seen", NULL};
	rp_put(r, "<p>Every occupation and language. A table of the figures of "
	       "<code>titlemill coverage</code>; select a heading to sort.</p>\n"
	       "<table class=\"tm-sort tm-filterable\" id=\"coverage-table\">"
	       "<caption>Coverage per occupation and language</caption>\n");
	rp_th(r, cols);
	rp_put(r, "<tbody>\n");
	for (size_t i = 0; i < r->n; i++) {
		const crow *c = &r->rows[i];
		rp_put(r, "<tr>");
		rp_occ_cells(r, rp_str(r, c->occ), c->ol, c->lang);
		rp_td_text(r, c->lang, strlen(c->lang));
		rp_td_u64(r, c->postings);
		rp_td_pct(r, c->share);
		rp_td_interval(r, c->low, c->high);
		rp_td_pct(r, c->pref_share);
		rp_td_u64(r, c->labels);
		rp_td_u64(r, c->unseen);
		rp_put(r, "</tr>\n");
	}
	rp_put(r, "</tbody></table>\n</section>\n");
	return 0;
}

/* report_occ.c - one section per occupation to look at (its labels'
 * shares, its biggest unmatched titles, its suggestions) and the
 * suggestions by kind (report_int.h). */
#include <stdlib.h>
#include <string.h>

#include "rank/stats.h"
#include "report/report_int.h"


static const char *status_of(rep *r, const propose_sugg *s)
{
	int many = 0;
	const rq_item *it = r->o->queue ? rq_find(r->o->queue, s->id, strlen(s->id), &many) : NULL;
	return it ? rq_status_name(it) : NULL;
}

/* A table of the suggestions ix[0..n) (indices in the list); with_occ:
 * with the occupation's columns (else the kind beside the text). */
static void sugg_table(rep *r, const char *caption, const size_t *ix, size_t n, int with_occ)
{
	static const char *const cols[] = {"occupation", "name", "language", "title or label",
					   "postings", "of the occupation", "precision", "score",
					   "other occupation", "variant of", "queue", NULL};
	const char *shown[sizeof cols / sizeof *cols];
	size_t k = 0;
	if (!n)
		return;
	/* the occupation's columns when the table has several; the queue's
	 * when there is a queue */
	for (size_t i = with_occ ? 0 : 3; cols[i]; i++)
		if (strcmp(cols[i], "queue") || r->o->queue)
			shown[k++] = cols[i];
	shown[k] = NULL;
	rp_put(r, "<table class=\"tm-sort\"><caption>");
	rp_ctext(r, caption);
	rp_put(r, "</caption>\n");
	rp_th(r, shown);
	rp_put(r, "<tbody>\n");
	for (size_t i = 0; i < n; i++) {
		const propose_sugg *s = &r->sugg.v[ix[i]];
		rp_put(r, "<tr>");
		if (with_occ) {
			rp_occ_cells(r, s->occ, s->ol, s->lang);
			rp_td_text(r, s->lang, strlen(s->lang));
		}
		rp_put(r, "<td>");
		rp_text(r, s->text, s->tl, CUT);
		if (!with_occ) {
			rp_put(r, " <span class=\"tm-muted\">(");
			rp_ctext(r, propose_kind_names[s->kind]);
			rp_put(r, ")</span>");
		}
		rp_put(r, "</td>");
		rp_td_u64(r, s->postings);
		rp_td_u64(r, s->occ_postings);
		rp_td_num(r, s->precision);
		rp_td_num(r, s->score);
		rp_put(r, "<td>");
		if (s->rival) {
			rp_text(r, s->rival, s->rl, CUT);
			buf_printf(r->out, " (%llu)", (unsigned long long)s->rival_postings);
		}
		rp_put(r, "</td><td>");
		if (s->kind == PROPOSE_HIDDEN && s->lb)
			rp_text(r, lab_str(r->ls, s->lb->text), s->lb->textlen, CUT);
		rp_put(r, "</td>");
		if (r->o->queue) {
			const char *st = status_of(r, s);
			rp_put(r, "<td>");
			rp_ctext(r, st ? st : "not in the queue");
			rp_put(r, "</td>");
		}
		rp_put(r, "</tr>\n");
	}
	rp_put(r, "</tbody></table>\n");
}

int rp_occ_section(rep *r, size_t si)
{
	const sec *s = &r->secs[si];
	const crow *c = &r->rows[s->row];
	const char *occ = rp_str(r, c->occ);
	size_t nn;
	const char *name = rp_occ_name(r, occ, c->ol, c->lang, &nn);
	buf_printf(r->out, "<section class=\"tm-occ\" id=\"occ-%zu\">\n<h3>", si + 1);
	rp_text(r, occ, c->ol, CUT);
	if (nn) {
		rp_put(r, " \xC2\xB7 ");
		rp_text(r, name, nn, CUT);
	}
	buf_printf(r->out, " <span class=\"tm-muted\">(%s)</span></h3>\n<p>%llu postings; ",
		   c->lang, (unsigned long long)c->postings);
	rp_pct(r, c->share);
	rp_put(r, " matched by a label (95\xC2\xA0% interval ");
	rp_range(r, c->low, c->high);
	if (c->labels)
		buf_printf(r->out, "); %llu of its %llu labels never seen", (unsigned long long)c->unseen,
			   (unsigned long long)c->labels);
	else
		rp_put(r, ")");
	rp_put(r, ".</p>\n");
	if (!s->nlab)
		rp_put(r, "<p>It has no label in this language.</p>\n");
	chart_row *cr = s->nlab ? calloc(s->nlab, sizeof *cr) : NULL;
	if (s->nlab && !cr)
		return -1;
	for (size_t i = 0; i < s->nlab; i++) {
		const label *lb = &r->ls->v[s->lab[i]];
		uint64_t k = rp_key_postings(r, (long)si, lab_str(r->ls, lb->key), lb->keylen);
		cr[i].name = lab_str(r->ls, lb->text);
		cr[i].nl = lb->textlen;
		cr[i].value = c->postings ? (double)k / (double)c->postings : 0;
		wilson(k, c->postings, STATS_Z95, &cr[i].low, &cr[i].high);
		cr[i].mark = !k ? (lb->kind == 'p' ? "preferred label, never seen" : "never seen")
			     : lb->kind == 'p' ? "preferred label" : lb->kind == 'h' ? "hidden label"
			     : NULL;
	}
	char id[40], title[64];
	snprintf(id, sizeof id, "chart-occ-%zu", si + 1);
	snprintf(title, sizeof title, "Each label's share of the postings (%s)", c->lang);
	if (s->nlab)
		chart_rows(r->out, id, CHART_BARS, title,
			   "The share of the occupation's postings whose title matches each label, "
			   "with its 95 % Wilson interval; labels never seen are marked.", "share", cr,
			   s->nlab);
	free(cr);
	if (rp_occ_series(r, si))
		return -1;
	if (c->ntop) {
		static const char *const cols[] = {"title", "postings", "examples as posted", NULL};
		rp_put(r, "<table><caption>The biggest titles no label matches</caption>\n");
		rp_th(r, cols);
		rp_put(r, "<tbody>\n");
		for (int i = 0; i < c->ntop; i++) {
			const ctop *t = &c->top[i];
			const char *ex[TALLY_EXAMPLES];
			size_t exl[TALLY_EXAMPLES];
			int ne = tm_examples(r->m, occ, c->ol, c->lang, rp_str(r, t->key), t->kl, ex, exl);
			rp_put(r, "<tr>");
			rp_td_text(r, rp_str(r, t->title), t->tl);
			rp_td_u64(r, t->n);
			rp_put(r, "<td>");
			for (int e = 0; e < ne; e++) {
				if (e)
					rp_put(r, "<br>");
				rp_text(r, ex[e], exl[e], CUT);
			}
			rp_put(r, "</td></tr>\n");
		}
		rp_put(r, "</tbody></table>\n");
	}
	size_t from = r->secstart[si], to = r->secstart[si + 1];
	if (to > from)
		sugg_table(r, "Its suggestions", r->bysec + from, to - from, 0);
	else
		rp_put(r, "<p class=\"tm-muted\">No suggestion passes the bars for it.</p>\n");
	rp_put(r, "</section>\n");
	return 0;
}

int rp_suggestions(rep *r)
{
	size_t *ix = malloc((r->sugg.n ? r->sugg.n : 1) * sizeof *ix);
	if (!ix)
		return -1;
	rp_put(r, "<section id=\"suggestions\">\n<h2>Suggestions</h2>\n<p>What "
	       "<code>titlemill propose</code> finds, by kind, strongest first, with its evidence");
	if (r->o->queue)
		rp_put(r, " and the queue's status of each");
	buf_printf(r->out, ". At most %llu of each kind are shown; <code>titlemill propose</code> "
			   "lists them all. Each is for a curator to accept or reject.</p>\n",
		   (unsigned long long)r->o->top);
	static const char *const what[PROPOSE_NKINDS] = {
		"titles the occupation's postings use often and specifically, matching none of "
		"its labels",
		"spelling variants of a label, recurrent in the postings",
		"labels the occupation's postings hardly use",
		"labels whose postings mostly carry another occupation"};
	for (int k = 0; k < PROPOSE_NKINDS; k++) {
		size_t n = 0;
		for (size_t i = 0; i < r->sugg.n; i++)
			if (r->sugg.v[i].kind == k)
				ix[n++] = i;
		rp_put(r, "<h3>");
		rp_ctext(r, propose_kind_names[k]);
		buf_printf(r->out, " <span class=\"tm-muted\">(%zu)</span></h3>\n<p>", n);
		rp_ctext(r, what[k]);
		rp_put(r, ".");
		if (n > r->o->top)
			buf_printf(r->out, " The %llu strongest of %zu:",
				   (unsigned long long)r->o->top, n);
		rp_put(r, "</p>\n");
		sugg_table(r, propose_kind_names[k], ix, n > r->o->top ? r->o->top : n, 1);
	}
	rp_put(r, "</section>\n");
	free(ix);
	return 0;
}

/* report_overlap.c - occupations the postings cannot tell apart: the
 * pairs of occupations whose postings are named with the same titles,
 * closest first, with the titles they share; and, when occupations have
 * groups, those whose titles sit nearer another group than their own.
 * The rows are those of titlemill overlap (rank/overlap.h, called here
 * with the caller's options); report_int.h. */
#include <stdlib.h>
#include <string.h>

#include "report/report_int.h"

/* The titles of a row in one cell, a line each: the title, then its
 * postings on each side ("12 / 9"; with own: "/ in its own group"). */
static void titles_cell(rep *r, const overlap_title *t, int n, int own)
{
	rp_put(r, "<td class=\"tm-titles\">");
	for (int i = 0; i < n; i++) {
		if (i)
			rp_put(r, "<br>");
		rp_text(r, t[i].title, t[i].tl, CUT);
		buf_printf(r->out, " <span class=\"tm-muted\">(%llu\xC2\xA0/\xC2\xA0%llu",
			   (unsigned long long)t[i].postings, (unsigned long long)t[i].other_postings);
		if (own)
			buf_printf(r->out, "\xC2\xA0/\xC2\xA0%llu", (unsigned long long)t[i].own_postings);
		rp_put(r, ")</span>");
	}
	rp_put(r, "</td>");
}

/* A divergence in bits, sortable; the value behind it in full, so that
 * it reads back as the number overlap prints. */
static void td_bits(rep *r, double v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.17g\">%.3f</td>", v, v);
}

static void td_shared(rep *r, double v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.17g\">", v);
	rp_pct(r, v);
	rp_put(r, "</td>");
}

typedef struct ovctx {
	rep *r;
	uint64_t n;
	tm_buf names;      /* the chart's names, NUL-separated */
	double *shared;    /* the chart's values */
	size_t cap;
} ovctx;

/* The first pass: each pair's name and shared mass for the chart. */
static int chart_pair(void *ctx, const overlap_pair *p)
{
	ovctx *c = ctx;
	double *v = tm_grow(c->shared, &c->cap, c->n + 1, sizeof *v, 16);
	if (!v)
		return -1;
	c->shared = v;
	c->shared[c->n++] = p->shared;
	buf_append(&c->names, p->occ, p->ol);
	buf_puts(&c->names, " ~ ");
	buf_append(&c->names, p->other, p->otl);
	buf_printf(&c->names, " (%s)", p->lang);
	buf_putc(&c->names, 0);
	return buf_status(&c->names);
}

/* The closest pairs' shared mass as bars (a measure, no interval). */
static int pairs_chart(rep *r, overlap *ov, ovctx *c)
{
	int st = overlap_pairs(ov, 1.0, r->o->overlap_top, chart_pair, c);
	chart_row *cr = st || !c->n ? NULL : calloc(c->n, sizeof *cr);
	if (!st && c->n) {
		if (!cr)
			return -1;
		const char *name = c->names.data;
		for (size_t i = 0; i < c->n; i++) {
			cr[i].name = name;
			cr[i].nl = strlen(name);
			cr[i].value = c->shared[i];
			name += cr[i].nl + 1;
		}
		st = chart_rows(r->out, "chart-overlap", CHART_SHARES,
				"The shared mass of the closest pairs",
				"For each of the closest pairs of occupations (in a language), the "
				"share of their postings the two name alike: the sum over titles of "
				"the smaller of their two shares.", "shared", cr, c->n);
	}
	free(cr);
	c->n = 0;
	return st ? -1 : 0;
}

static int on_pair(void *ctx, const overlap_pair *p)
{
	ovctx *c = ctx;
	rep *r = c->r;
	c->n++;
	buf_printf(r->out, "<tr><td class=\"num\" data-v=\"%llu\">%llu</td>", (unsigned long long)c->n,
		   (unsigned long long)c->n);
	rp_occ_cell(r, p->occ, p->ol, p->lang);
	rp_occ_cell(r, p->other, p->otl, p->lang);
	rp_td_text(r, p->lang, strlen(p->lang));
	td_bits(r, p->divergence);
	td_shared(r, p->shared);
	rp_td_u64(r, p->postings);
	rp_td_u64(r, p->other_postings);
	titles_cell(r, p->titles, p->ntitles, 0);
	rp_put(r, "</tr>\n");
	return buf_status(r->out);
}

static int on_nearer(void *ctx, const overlap_occ *o)
{
	ovctx *c = ctx;
	rep *r = c->r;
	c->n++;
	rp_put(r, "<tr>");
	rp_occ_cell(r, o->occ, o->ol, o->lang);
	rp_td_text(r, o->lang, strlen(o->lang));
	rp_td_u64(r, o->postings);
	rp_td_text(r, o->group, o->gl);
	td_bits(r, o->own_divergence);
	rp_td_text(r, o->nearest, o->nl);
	td_bits(r, o->nearest_divergence);
	titles_cell(r, o->titles, o->ntitles, 1);
	rp_put(r, "</tr>\n");
	return buf_status(r->out);
}

static const char *const PAIR_COLS[] = {
	"rank", "occupation", "other occupation", "language",
	"divergence (bits)", "shared", "postings", "other's postings",
	"shared titles (postings / other's)", NULL};

static const char *const NEARER_COLS[] = {
	"occupation", "language", "postings", "its group", "divergence from it (bits)",
	"nearer group", "divergence from that (bits)",
	"titles that pull it there (postings / that group's / its own group's)", NULL};

int rp_overlap(rep *r)
{
	const report_opts *o = r->o;
	overlap *ov = NULL;
	tm_buf err = {0};
	ovctx c = {r, 0, {0}, NULL, 0};
	int st;
	if (overlap_build(&ov, r->m, o->overlap, &err)) {
		buf_free(&err);
		return -1;
	}
	const overlap_stats *s = overlap_get_stats(ov);
	rp_put(r, "<section id=\"overlap\">\n<h2>Occupations the postings cannot tell apart</h2>\n"
		  "<p>Pairs of occupations (in one language) whose postings are named with the "
		  "same titles, the closest first: the Jensen\xE2\x80\x93Shannon divergence of their "
		  "titles in bits (0: the same titles in the same proportions; 1: none shared) "
		  "and the shared mass (the share of the postings the two name alike). Either "
		  "they are one occupation in practice, or their labels do not say what "
		  "separates them. The figures of <code>titlemill overlap</code>.</p>\n");
	buf_printf(r->out, "<p class=\"tm-muted\">%llu pair%s compared of %llu (only occupations "
			   "sharing a title are compared)", (unsigned long long)s->pairs_compared,
		   s->pairs_compared == 1 ? "" : "s", (unsigned long long)s->pairs_all);
	if (s->pairs_small)
		buf_printf(r->out, "; %llu not ranked, with fewer than %llu postings on a side",
			   (unsigned long long)s->pairs_small,
			   (unsigned long long)o->overlap->min_postings);
	if (s->keys_capped)
		buf_printf(r->out, "; %llu title%s held by more than %llu occupations made no pairs",
			   (unsigned long long)s->keys_capped, s->keys_capped == 1 ? "" : "s",
			   (unsigned long long)o->overlap->key_cap);
	rp_put(r, ".</p>\n");
	st = pairs_chart(r, ov, &c);
	rp_put(r, "<table class=\"tm-sort tm-filterable\" id=\"overlap-table\"><caption>");
	buf_printf(r->out, "The closest pairs (at most %llu)", (unsigned long long)o->overlap_top);
	rp_put(r, "</caption>\n");
	rp_th(r, PAIR_COLS);
	rp_put(r, "<tbody>\n");
	if (!st)
		st = overlap_pairs(ov, 1.0, o->overlap_top, on_pair, &c);
	rp_put(r, "</tbody></table>\n");
	if (!st && !c.n)
		rp_put(r, "<p class=\"tm-muted\">No pair of occupations with enough postings shares "
			  "a title.</p>\n");
	rp_put(r, "<h3 id=\"overlap-groups\">Occupations nearer another group than their own</h3>\n");
	if (!st && o->overlap->groups && groups_any(o->overlap->groups)) {
		rp_put(r, "<p>Occupations whose titles sit closer to another group's postings than "
			  "to the rest of their own group's: they may be filed in the wrong group. "
			  "The titles listed pull them there.</p>\n"
			  "<table class=\"tm-sort\" id=\"nearer-table\"><caption>");
		buf_printf(r->out, "Nearer another group (at most %llu), the widest margin first",
			   (unsigned long long)o->overlap_top);
		rp_put(r, "</caption>\n");
		rp_th(r, NEARER_COLS);
		rp_put(r, "<tbody>\n");
		c.n = 0;
		st = overlap_occupations(ov, 1, o->overlap_top, on_nearer, &c);
		rp_put(r, "</tbody></table>\n");
		if (!st && !c.n)
			rp_put(r, "<p class=\"tm-muted\">None: every occupation with enough postings "
				  "is nearest its own group.</p>\n");
	} else if (!st)
		rp_put(r, "<p class=\"tm-muted\">The occupations have no groups here (a SKOS "
			  "taxonomy's skos:broader, or <code>--groups FILE</code>), so none is "
			  "compared with its group.</p>\n");
	rp_put(r, "</section>\n");
	overlap_free(ov);
	buf_free(&err);
	buf_free(&c.names);
	free(c.shared);
	return st || buf_status(r->out) ? -1 : 0;
}

/* report.c - the HTML report (report.h).
 *
 * One pass of the coverage engine keeps its rows; the ranker gives the
 * suggestions; one pass over the counts' triples and one over the labels
 * gather the label shares of the occupations that get a section.  Then
 * the page is written top to bottom into one buffer.  Linear in rows,
 * labels and suggestions, plus the sorts. */
#include "report/report.h"

#include <stdlib.h>
#include <string.h>

#include "core/err.h"
#include "io/htmlw.h"
#include "rank/coverage.h"
#include "rank/stats.h"
#include "report/chart.h"

/* How many of the lowest-covered occupations the coverage chart shows,
 * how many unmatched titles a section lists (all the engine keeps), and
 * how long a text may run in a table before it is cut. */
enum { LOWEST_SHOWN = 20, CUT = 120 };

typedef struct ctop {
	uint32_t title, tl, key, kl;
	uint64_t n;
} ctop;

typedef struct crow {
	uint32_t occ, ol;             /* in the arena */
	char lang[4];
	uint64_t postings, matched, pref, labels, unseen;
	double share, low, high, pref_share;
	ctop top[COVERAGE_TOP];
	int ntop;
	int section;                  /* its section + 1, or 0 */
} crow;

typedef struct sec {
	size_t row;                   /* its coverage row */
	size_t *lab;                  /* its labels (indices in ls->v), one per key */
	size_t nlab, labcap;
} sec;

typedef struct rep {
	tally_mem *m;
	const labelset *ls;
	const report_opts *o;
	tm_buf arena;
	crow *rows;
	size_t n, cap;
	crow total;
	int have_total;
	sec *secs;
	size_t nsec;
	strtab secidx;                /* occ 1F lang -> section + 1 */
	strtab keyn;                  /* section 1F key -> postings of the key */
	strtab seen;                  /* section 1F key: a label already listed */
	propose_list sugg;
	size_t *bysec;                /* suggestion indices grouped by section */
	size_t *secstart;             /* section s: bysec[secstart[s] .. secstart[s + 1]) */
	tm_buf *out;
	tm_buf j;
	int oom;
} rep;

static const char *A(const rep *r, uint32_t off)
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
	int c = strcmp(A(SORT_REP, a->occ), A(SORT_REP, b->occ));
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
	const tm_buf *k = join(r, A(r, c->occ), c->ol, c->lang, strlen(c->lang));
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
				if (!strcmp(A(r, r->rows[k].occ), r->o->occs[i]) && add_section(r, k))
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
static long section_of(rep *r, const char *occ, size_t ol, const char *lang, size_t ll)
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
	long s = section_of(r, t->occ, t->ol, t->lang, t->ll);
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
		long s = section_of(r, lab_str(r->ls, lb->occ), lb->occlen, lb->lang,
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

/* Groups the suggestions by section (a counting sort, in list order). */
static int index_suggestions(rep *r)
{
	long *where = malloc((r->sugg.n ? r->sugg.n : 1) * sizeof *where);
	r->secstart = calloc(r->nsec + 2, sizeof *r->secstart);
	r->bysec = malloc((r->sugg.n ? r->sugg.n : 1) * sizeof *r->bysec);
	if (!where || !r->secstart || !r->bysec) {
		free(where);
		return -1;
	}
	for (size_t i = 0; i < r->sugg.n; i++) {
		const propose_sugg *x = &r->sugg.v[i];
		where[i] = r->nsec ? section_of(r, x->occ, x->ol, x->lang, strlen(x->lang)) : -1;
		if (r->oom) {
			free(where);
			return -1;
		}
		if (where[i] >= 0)
			r->secstart[where[i] + 2]++;
	}
	for (size_t k = 2; k < r->nsec + 2; k++)
		r->secstart[k] += r->secstart[k - 1];
	for (size_t i = 0; i < r->sugg.n; i++)
		if (where[i] >= 0)
			r->bysec[r->secstart[where[i] + 1]++] = i;
	free(where);
	return 0;
}

static uint64_t key_postings(rep *r, long s, const char *key, size_t kl)
{
	const tm_buf *k = sec_key(r, s, key, kl);
	long i = r->oom ? -1 : st_find(&r->keyn, k->data, k->len);
	return i < 0 ? 0 : r->keyn.ent[i].count;
}

/* ---- writing ---- */

static void put(rep *r, const char *s)
{
	buf_puts(r->out, s);
}

static void text(rep *r, const char *s, size_t n, size_t max)
{
	html_text(r->out, s, n, max);
}

static void ctext(rep *r, const char *s)
{
	html_str(r->out, s);
}

static void pct(rep *r, double v)
{
	chart_pct(r->out, v);
}

static void range(rep *r, double lo, double hi)
{
	chart_range(r->out, lo, hi);
}

/* A table cell holding a share, sortable by its value. */
static void td_pct(rep *r, double v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.6f\">", v);
	pct(r, v);
	put(r, "</td>");
}

static void td_interval(rep *r, double lo, double hi)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.6f\">", lo);
	range(r, lo, hi);
	put(r, "</td>");
}

static void td_u64(rep *r, uint64_t v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%llu\">%llu</td>", (unsigned long long)v,
		   (unsigned long long)v);
}

static void td_num(rep *r, double v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.6f\">%.4g</td>", v, v);
}

static void td_text(rep *r, const char *s, size_t n)
{
	put(r, "<td>");
	text(r, s, n, CUT);
	put(r, "</td>");
}

static void th(rep *r, const char *const *names)
{
	put(r, "<thead><tr>");
	for (; *names; names++) {
		put(r, "<th scope=\"col\">");
		ctext(r, *names);
		put(r, "</th>");
	}
	put(r, "</tr></thead>\n");
}

/* The occupation's name for curators, or "" when it has none. */
static const char *occ_name(rep *r, const char *occ, size_t ol, const char *lang, size_t *n)
{
	const label *p = labels_pref(r->ls, occ, ol, lang);
	*n = p ? p->textlen : 0;
	return p ? lab_str(r->ls, p->text) : "";
}

static const char STYLE[] =
	"body{font:15px/1.45 system-ui,-apple-system,\"Segoe UI\",Roboto,sans-serif;color:#1b1b1b;"
	"background:#fff;margin:0 auto;max-width:70rem;padding:0 1.2rem 3rem}\n"
	"h1{font-size:1.6rem;margin:1.5rem 0 .3rem}h2{font-size:1.3rem;margin-top:2.2rem;"
	"border-bottom:2px solid #d0d7de;padding-bottom:.2rem}h3{font-size:1.1rem;margin-top:1.6rem}\n"
	"nav ol{columns:2;padding-left:1.2rem}dl.tm-facts{display:grid;grid-template-columns:"
	"max-content auto;gap:.2rem 1rem}dl.tm-facts dt{font-weight:600}dl.tm-facts dd{margin:0}\n"
	"table{border-collapse:collapse;margin:.6rem 0;font-size:.9rem}caption{text-align:left;"
	"font-weight:600;padding:.3rem 0}th,td{border:1px solid #d0d7de;padding:.2rem .45rem;"
	"vertical-align:top;text-align:left}th{background:#f3f5f7}td.num{text-align:right;"
	"font-variant-numeric:tabular-nums;white-space:nowrap}\n"
	"th button{font:inherit;font-weight:600;background:none;border:0;padding:0;cursor:pointer;"
	"text-align:left}th[aria-sort=ascending] button::after{content:\" \\25B2\"}"
	"th[aria-sort=descending] button::after{content:\" \\25BC\"}\n"
	"figure.tm-chart{margin:1rem 0}figure svg{max-width:50rem;height:auto;display:block}"
	"figcaption{font-size:.85rem;color:#444}details summary{cursor:pointer;font-size:.85rem}\n"
	".tm-axis{stroke:#c8ced5;stroke-width:1}.tm-tick{font-size:11px;fill:#555}"
	".tm-name,.tm-value{font-size:12px;fill:#1b1b1b}.tm-bar{fill:#4c78a8}"
	".tm-bar.tm-marked{fill:#f2b447}.tm-ci{stroke:#1b1b1b;stroke-width:1.5}"
	".tm-dot{fill:#1f4e79}.tm-line{fill:none;stroke:#1f4e79;stroke-width:2}"
	".tm-band{fill:#4c78a8;opacity:.2}\n"
	".tm-note{background:#f6f8fa;border-left:4px solid #4c78a8;padding:.5rem .8rem}"
	".tm-muted{color:#555}.tm-filter{margin:.4rem 0}\n"
	"@media print{nav,.tm-filter,details summary{display:none}body{max-width:none;font-size:11pt}"
	"section.tm-occ{break-inside:avoid-page}h2{break-after:avoid}a{color:inherit}}\n";

/* Sorting and filtering of tables marked tm-sort; the page is complete
 * without it. */
static const char SCRIPT[] =
	"(function(){\n"
	"function val(c){var v=c.getAttribute('data-v');return v===null?c.textContent:v;}\n"
	"function cmp(a,b){var x=parseFloat(a),y=parseFloat(b);"
	"if(!isNaN(x)&&!isNaN(y)&&String(x)===a.trim()&&String(y)===b.trim())return x-y;"
	"if(!isNaN(x)&&!isNaN(y)&&/^[-0-9.e+]+$/.test(a)&&/^[-0-9.e+]+$/.test(b))return x-y;"
	"return a<b?-1:a>b?1:0;}\n"
	"document.querySelectorAll('table.tm-sort').forEach(function(t){\n"
	" var hs=t.tHead.rows[0].cells,body=t.tBodies[0];\n"
	" Array.prototype.forEach.call(hs,function(h,i){\n"
	"  var b=document.createElement('button');b.type='button';b.textContent=h.textContent;"
	"h.textContent='';h.appendChild(b);\n"
	"  b.addEventListener('click',function(){\n"
	"   var up=h.getAttribute('aria-sort')!=='ascending';\n"
	"   Array.prototype.forEach.call(hs,function(x){x.removeAttribute('aria-sort');});\n"
	"   h.setAttribute('aria-sort',up?'ascending':'descending');\n"
	"   var rs=Array.prototype.slice.call(body.rows);\n"
	"   rs.sort(function(p,q){var c=cmp(val(p.cells[i]),val(q.cells[i]));return up?c:-c;});\n"
	"   rs.forEach(function(x){body.appendChild(x);});});});\n"
	" if(t.classList.contains('tm-filterable')){\n"
	"  var l=document.createElement('label');l.className='tm-filter';"
	"l.textContent='Show rows containing: ';\n"
	"  var f=document.createElement('input');f.type='search';l.appendChild(f);"
	"t.parentNode.insertBefore(l,t);\n"
	"  f.addEventListener('input',function(){var s=f.value.toLowerCase();"
	"Array.prototype.forEach.call(body.rows,function(x){"
	"x.hidden=s!==''&&x.textContent.toLowerCase().indexOf(s)<0;});});}\n"
	"});})();\n";

static void head(rep *r)
{
	put(r, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
	       "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
	       "<title>How the taxonomy's labels name the postings</title>\n<style>\n");
	put(r, STYLE);
	put(r, "</style>\n</head>\n<body>\n<header>\n"
	       "<h1>How the taxonomy's labels name the postings</h1>\n<p class=\"tm-muted\">");
	if (r->o->window) {
		put(r, "Postings of ");
		ctext(r, r->o->window);
	} else
		put(r, "All the postings counted");
	if (r->o->lang) {
		put(r, ", language ");
		ctext(r, r->o->lang);
	}
	put(r, ".");
	if (r->o->stamp) {
		put(r, " Made ");
		ctext(r, r->o->stamp);
		put(r, ".");
	}
	put(r, "</p>\n<p class=\"tm-note\">Everything below is evidence for a curator, who "
	       "decides: the suggestions are proposals, never changes to the taxonomy.</p>\n"
	       "</header>\n<nav aria-label=\"Contents\"><ol>\n"
	       "<li><a href=\"#overview\">Overview</a></li>\n"
	       "<li><a href=\"#coverage\">Coverage per occupation</a></li>\n"
	       "<li><a href=\"#occupations\">Occupations to look at</a></li>\n"
	       "<li><a href=\"#suggestions\">Suggestions</a></li>\n"
	       "<li><a href=\"#reading\">How to read this report</a></li>\n</ol></nav>\n<main>\n");
}

typedef struct langsum {
	char lang[4];
	uint64_t postings, matched;
} langsum;

static int overview(rep *r)
{
	langsum *ls = NULL;
	size_t nl = 0, cap = 0, nocc = 0;
	for (size_t i = 0; i < r->n; i++) {
		const crow *c = &r->rows[i];
		if (i == 0 || strcmp(A(r, c->occ), A(r, r->rows[i - 1].occ)))
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
	put(r, "<section id=\"overview\">\n<h2>Overview</h2>\n<dl class=\"tm-facts\">\n");
	buf_printf(r->out, "<dt>Postings counted per occupation</dt><dd>%llu (a posting with "
			   "two occupations counts for each)</dd>\n", (unsigned long long)t->postings);
	if (r->o->distinct)
		buf_printf(r->out, "<dt>Distinct postings</dt><dd>%llu</dd>\n",
			   (unsigned long long)r->o->distinct);
	buf_printf(r->out, "<dt>Occupations with postings</dt><dd>%zu</dd>\n"
			   "<dt>Languages</dt><dd>%zu</dd>\n", nocc, nl);
	buf_printf(r->out, "<dt>Matched by a label</dt><dd>%llu: ", (unsigned long long)t->matched);
	pct(r, t->share);
	put(r, " (95\xC2\xA0% interval ");
	range(r, t->low, t->high);
	put(r, ")</dd>\n<dt>Matched by a preferred label</dt><dd>");
	pct(r, t->pref_share);
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
	put(r, "</section>\n");
	free(cr);
	free(ls);
	return 0;
}

static void occ_cell(rep *r, const crow *c)
{
	size_t nn;
	const char *name = occ_name(r, A(r, c->occ), c->ol, c->lang, &nn);
	put(r, "<td>");
	if (c->section)
		buf_printf(r->out, "<a href=\"#occ-%d\">", c->section);
	text(r, A(r, c->occ), c->ol, CUT);
	if (c->section)
		put(r, "</a>");
	put(r, "</td>");
	td_text(r, name, nn);
}

static int coverage_section(rep *r, const size_t *weak, size_t nweak)
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
		const char *name = occ_name(r, A(r, c->occ), c->ol, c->lang, &nn);
		off[i] = names.len;
		buf_append(&names, A(r, c->occ), c->ol);
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
	put(r, "<section id=\"coverage\">\n<h2>Coverage per occupation</h2>\n");
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
	put(r, "<p>Every occupation and language. A table of the figures of "
	       "<code>titlemill coverage</code>; select a heading to sort.</p>\n"
	       "<table class=\"tm-sort tm-filterable\" id=\"coverage-table\">"
	       "<caption>Coverage per occupation and language</caption>\n");
	th(r, cols);
	put(r, "<tbody>\n");
	for (size_t i = 0; i < r->n; i++) {
		const crow *c = &r->rows[i];
		put(r, "<tr>");
		occ_cell(r, c);
		td_text(r, c->lang, strlen(c->lang));
		td_u64(r, c->postings);
		td_pct(r, c->share);
		td_interval(r, c->low, c->high);
		td_pct(r, c->pref_share);
		td_u64(r, c->labels);
		td_u64(r, c->unseen);
		put(r, "</tr>\n");
	}
	put(r, "</tbody></table>\n</section>\n");
	return 0;
}

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
	put(r, "<table class=\"tm-sort\"><caption>");
	ctext(r, caption);
	put(r, "</caption>\n");
	th(r, shown);
	put(r, "<tbody>\n");
	for (size_t i = 0; i < n; i++) {
		const propose_sugg *s = &r->sugg.v[ix[i]];
		put(r, "<tr>");
		if (with_occ) {
			size_t nn;
			const char *name = occ_name(r, s->occ, s->ol, s->lang, &nn);
			td_text(r, s->occ, s->ol);
			td_text(r, name, nn);
			td_text(r, s->lang, strlen(s->lang));
		}
		put(r, "<td>");
		text(r, s->text, s->tl, CUT);
		if (!with_occ) {
			put(r, " <span class=\"tm-muted\">(");
			ctext(r, propose_kind_names[s->kind]);
			put(r, ")</span>");
		}
		put(r, "</td>");
		td_u64(r, s->postings);
		td_u64(r, s->occ_postings);
		td_num(r, s->precision);
		td_num(r, s->score);
		put(r, "<td>");
		if (s->rival) {
			text(r, s->rival, s->rl, CUT);
			buf_printf(r->out, " (%llu)", (unsigned long long)s->rival_postings);
		}
		put(r, "</td><td>");
		if (s->kind == PROPOSE_HIDDEN && s->lb)
			text(r, lab_str(r->ls, s->lb->text), s->lb->textlen, CUT);
		put(r, "</td>");
		if (r->o->queue) {
			const char *st = status_of(r, s);
			put(r, "<td>");
			ctext(r, st ? st : "not in the queue");
			put(r, "</td>");
		}
		put(r, "</tr>\n");
	}
	put(r, "</tbody></table>\n");
}

static int occ_section(rep *r, size_t si)
{
	const sec *s = &r->secs[si];
	const crow *c = &r->rows[s->row];
	const char *occ = A(r, c->occ);
	size_t nn;
	const char *name = occ_name(r, occ, c->ol, c->lang, &nn);
	buf_printf(r->out, "<section class=\"tm-occ\" id=\"occ-%zu\">\n<h3>", si + 1);
	text(r, occ, c->ol, CUT);
	if (nn) {
		put(r, " \xC2\xB7 ");
		text(r, name, nn, CUT);
	}
	buf_printf(r->out, " <span class=\"tm-muted\">(%s)</span></h3>\n<p>%llu postings; ",
		   c->lang, (unsigned long long)c->postings);
	pct(r, c->share);
	put(r, " matched by a label (95\xC2\xA0% interval ");
	range(r, c->low, c->high);
	if (c->labels)
		buf_printf(r->out, "); %llu of its %llu labels never seen", (unsigned long long)c->unseen,
			   (unsigned long long)c->labels);
	else
		put(r, ")");
	put(r, ".</p>\n");
	if (!s->nlab)
		put(r, "<p>It has no label in this language.</p>\n");
	chart_row *cr = s->nlab ? calloc(s->nlab, sizeof *cr) : NULL;
	if (s->nlab && !cr)
		return -1;
	for (size_t i = 0; i < s->nlab; i++) {
		const label *lb = &r->ls->v[s->lab[i]];
		uint64_t k = key_postings(r, (long)si, lab_str(r->ls, lb->key), lb->keylen);
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
	if (c->ntop) {
		static const char *const cols[] = {"title", "postings", "examples as posted", NULL};
		put(r, "<table><caption>The biggest titles no label matches</caption>\n");
		th(r, cols);
		put(r, "<tbody>\n");
		for (int i = 0; i < c->ntop; i++) {
			const ctop *t = &c->top[i];
			const char *ex[TALLY_EXAMPLES];
			size_t exl[TALLY_EXAMPLES];
			int ne = tm_examples(r->m, occ, c->ol, c->lang, A(r, t->key), t->kl, ex, exl);
			put(r, "<tr>");
			td_text(r, A(r, t->title), t->tl);
			td_u64(r, t->n);
			put(r, "<td>");
			for (int e = 0; e < ne; e++) {
				if (e)
					put(r, "<br>");
				text(r, ex[e], exl[e], CUT);
			}
			put(r, "</td></tr>\n");
		}
		put(r, "</tbody></table>\n");
	}
	size_t from = r->secstart[si], to = r->secstart[si + 1];
	if (to > from)
		sugg_table(r, "Its suggestions", r->bysec + from, to - from, 0);
	else
		put(r, "<p class=\"tm-muted\">No suggestion passes the bars for it.</p>\n");
	put(r, "</section>\n");
	return 0;
}

static int suggestions(rep *r)
{
	size_t *ix = malloc((r->sugg.n ? r->sugg.n : 1) * sizeof *ix);
	if (!ix)
		return -1;
	put(r, "<section id=\"suggestions\">\n<h2>Suggestions</h2>\n<p>What "
	       "<code>titlemill propose</code> finds, by kind, strongest first, with its evidence");
	if (r->o->queue)
		put(r, " and the queue's status of each");
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
		put(r, "<h3>");
		ctext(r, propose_kind_names[k]);
		buf_printf(r->out, " <span class=\"tm-muted\">(%zu)</span></h3>\n<p>", n);
		ctext(r, what[k]);
		put(r, ".");
		if (n > r->o->top)
			buf_printf(r->out, " The %llu strongest of %zu:",
				   (unsigned long long)r->o->top, n);
		put(r, "</p>\n");
		sugg_table(r, propose_kind_names[k], ix, n > r->o->top ? r->o->top : n, 1);
	}
	put(r, "</section>\n");
	free(ix);
	return 0;
}

static void reading(rep *r)
{
	const propose_bars *b = r->o->bars;
	put(r, "<section id=\"reading\">\n<h2>How to read this report</h2>\n<ul>\n"
	       "<li><strong>Coverage</strong> is the share of an occupation's postings (in one "
	       "language) whose cleaned title has the match key of one of its labels. A posting "
	       "coded with two occupations counts for each.</li>\n"
	       "<li><strong>Intervals</strong> are 95\xC2\xA0% Wilson score intervals (Wilson "
	       "1927): with few postings they are wide, and two shares whose intervals overlap "
	       "may not differ at all.</li>\n"
	       "<li><strong>Suggestions</strong> pass bars on Dunning's log-likelihood ratio "
	       "G\xC2\xB2 (Dunning 1993), on postings, on shares (by their Wilson bounds) and on "
	       "precision (the share of a title's postings that carry the occupation). ");
	buf_printf(r->out, "The bars used here: new_alt_label at least %llu postings, a share "
			   "whose lower bound is at least %.4g, precision %.4g and G\xC2\xB2 %.4g; "
			   "new_hidden_label at least %llu postings and precision %.4g; rare_label "
			   "for occupations of at least %llu postings, share below %.4g; "
			   "used_elsewhere when at least %.4g of at least %llu postings carry "
			   "another occupation.</li>\n",
		   (unsigned long long)b->min_postings, b->min_share, b->min_precision, b->min_g2,
		   (unsigned long long)b->hidden_min, b->hidden_precision,
		   (unsigned long long)b->rare_min, b->rare_share, b->elsewhere_share,
		   (unsigned long long)b->elsewhere_min);
	put(r, "<li><strong>Examples</strong> are titles as posted, with e-mail addresses, "
	       "telephone numbers and web addresses masked. Gender markers are removed from "
	       "titles for counting only; local law governs how postings must be written.</li>\n"
	       "<li>These are suggestions for a curator, who decides. titlemill never changes "
	       "the taxonomy.</li>\n</ul>\n</section>\n");
}

static void foot(rep *r)
{
	put(r, "</main>\n<footer><p class=\"tm-muted\">Made by titlemill ");
	ctext(r, r->o->version ? r->o->version : "");
	put(r, ".</p></footer>\n<script>\n");
	put(r, SCRIPT);
	put(r, "</script>\n</body>\n</html>\n");
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
	    index_suggestions(&r))
		goto done;
	head(&r);
	if (overview(&r) || coverage_section(&r, weak, nweak))
		goto done;
	put(&r, "<section id=\"occupations\">\n<h2>Occupations to look at</h2>\n<p>");
	if (o->occs)
		put(&r, "The occupations asked for.");
	else
		buf_printf(out, "The %zu occupations (in a language) with the lowest coverage among "
				"those with at least %llu postings.", r.nsec,
			   (unsigned long long)o->min_postings);
	put(&r, "</p>\n");
	for (size_t i = 0; i < r.nsec; i++)
		if (occ_section(&r, i))
			goto done;
	if (!r.nsec)
		put(&r, "<p class=\"tm-muted\">None.</p>\n");
	put(&r, "</section>\n");
	if (suggestions(&r))
		goto done;
	reading(&r);
	foot(&r);
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
	free(r.rows);
	buf_free(&r.arena);
	buf_free(&r.j);
	st_free(&r.secidx);
	st_free(&r.keyn);
	st_free(&r.seen);
	propose_list_free(&r.sugg);
	return st;
}

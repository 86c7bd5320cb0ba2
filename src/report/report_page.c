/* report_page.c - the report's frame (style, script, head, foot), the
 * helpers that write text and cells, and "How to read this report"
 * (report_int.h). */
#include <string.h>

#include "io/htmlw.h"
#include "report/report_int.h"

void rp_put(rep *r, const char *s)
{
	buf_puts(r->out, s);
}

void rp_text(rep *r, const char *s, size_t n, size_t max)
{
	html_text(r->out, s, n, max);
}

void rp_ctext(rep *r, const char *s)
{
	html_str(r->out, s);
}

void rp_pct(rep *r, double v)
{
	chart_pct(r->out, v);
}

void rp_range(rep *r, double lo, double hi)
{
	chart_range(r->out, lo, hi);
}

/* A table cell holding a share, sortable by its value. */
void rp_td_pct(rep *r, double v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.6f\">", v);
	rp_pct(r, v);
	rp_put(r, "</td>");
}

void rp_td_interval(rep *r, double lo, double hi)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.6f\">", lo);
	rp_range(r, lo, hi);
	rp_put(r, "</td>");
}

void rp_td_u64(rep *r, uint64_t v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%llu\">%llu</td>", (unsigned long long)v,
		   (unsigned long long)v);
}

void rp_td_num(rep *r, double v)
{
	buf_printf(r->out, "<td class=\"num\" data-v=\"%.6f\">%.4g</td>", v, v);
}

void rp_td_text(rep *r, const char *s, size_t n)
{
	rp_put(r, "<td>");
	rp_text(r, s, n, CUT);
	rp_put(r, "</td>");
}

void rp_th(rep *r, const char *const *names)
{
	rp_put(r, "<thead><tr>");
	for (; *names; names++) {
		rp_put(r, "<th scope=\"col\">");
		rp_ctext(r, *names);
		rp_put(r, "</th>");
	}
	rp_put(r, "</tr></thead>\n");
}

/* The occupation's name for curators, or "" when it has none. */
const char *rp_occ_name(rep *r, const char *occ, size_t ol, const char *lang, size_t *n)
{
	const label *p = labels_pref(r->ls, occ, ol, lang);
	*n = p ? p->textlen : 0;
	return p ? lab_str(r->ls, p->text) : "";
}

/* The occupation's id, a link to its section when it has one. */
static void occ_id(rep *r, const char *occ, size_t ol, const char *lang)
{
	long s = r->nsec ? rp_section_of(r, occ, ol, lang, strlen(lang)) : -1;
	if (s >= 0)
		buf_printf(r->out, "<a href=\"#occ-%ld\">", s + 1);
	rp_text(r, occ, ol, CUT);
	if (s >= 0)
		rp_put(r, "</a>");
}

void rp_occ_cells(rep *r, const char *occ, size_t ol, const char *lang)
{
	size_t nn;
	const char *name = rp_occ_name(r, occ, ol, lang, &nn);
	rp_put(r, "<td>");
	occ_id(r, occ, ol, lang);
	rp_put(r, "</td>");
	rp_td_text(r, name, nn);
}

void rp_occ_cell(rep *r, const char *occ, size_t ol, const char *lang)
{
	size_t nn;
	const char *name = rp_occ_name(r, occ, ol, lang, &nn);
	rp_put(r, "<td data-v=\"");
	html_text(r->out, occ, ol, 0);
	rp_put(r, "\">");
	occ_id(r, occ, ol, lang);
	if (nn) {
		rp_put(r, "<br><span class=\"tm-muted\">");
		rp_text(r, name, nn, CUT);
		rp_put(r, "</span>");
	}
	rp_put(r, "</td>");
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
	".tm-muted{color:#555}.tm-filter{margin:.4rem 0}td.tm-titles{min-width:16rem}\n"
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

void rp_head(rep *r)
{
	rp_put(r, "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
	       "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
	       "<title>How the taxonomy's labels name the postings</title>\n<style>\n");
	rp_put(r, STYLE);
	rp_put(r, "</style>\n</head>\n<body>\n<header>\n"
	       "<h1>How the taxonomy's labels name the postings</h1>\n<p class=\"tm-muted\">");
	if (r->o->window) {
		rp_put(r, "Postings of ");
		rp_ctext(r, r->o->window);
	} else
		rp_put(r, "All the postings counted");
	if (r->o->lang) {
		rp_put(r, ", language ");
		rp_ctext(r, r->o->lang);
	}
	rp_put(r, ".");
	if (r->o->stamp) {
		rp_put(r, " Made ");
		rp_ctext(r, r->o->stamp);
		rp_put(r, ".");
	}
	rp_put(r, "</p>\n<p class=\"tm-note\">Everything below is evidence for a curator, who "
	       "decides: the suggestions are proposals, never changes to the taxonomy.</p>\n"
	       "</header>\n<nav aria-label=\"Contents\"><ol>\n"
	       "<li><a href=\"#overview\">Overview</a></li>\n"
	       "<li><a href=\"#coverage\">Coverage per occupation</a></li>\n"
	       "<li><a href=\"#occupations\">Occupations to look at</a></li>\n"
	       "<li><a href=\"#suggestions\">Suggestions</a></li>\n");
	if (r->o->trend)
		rp_put(r, "<li><a href=\"#trend\">Rising and fading titles</a></li>\n");
	if (r->o->overlap)
		rp_put(r, "<li><a href=\"#overlap\">Occupations the postings cannot tell "
			  "apart</a></li>\n");
	rp_put(r, "<li><a href=\"#reading\">How to read this report</a></li>\n</ol></nav>\n"
		  "<main>\n");
}

void rp_reading(rep *r)
{
	const propose_bars *b = r->o->bars;
	rp_put(r, "<section id=\"reading\">\n<h2>How to read this report</h2>\n<ul>\n"
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
	if (r->o->trend && r->o->trend_bars) {
		const trend_bars *t = r->o->trend_bars;
		buf_printf(r->out, "<li><strong>Rising and fading titles</strong> compare two "
				   "windows of time, occupation by occupation, with Dunning's "
				   "G\xC2\xB2 on the title's postings against the occupation's other "
				   "postings, before and after. A title is listed when its G\xC2\xB2 is "
				   "at least %.4g (chance at p\xC2\xA0=\xC2\xA0" "0.001), it has at least "
				   "%llu postings in the window where its share is higher, and that "
				   "share is at least %.4g times the other.</li>\n",
			   t->min_g2, (unsigned long long)t->min_postings, t->min_ratio);
	}
	if (r->o->overlap) {
		const overlap_opts *v = r->o->overlap;
		buf_printf(r->out, "<li><strong>Occupations the postings cannot tell apart</strong> "
				   "are compared by the Jensen\xE2\x80\x93Shannon divergence (Lin "
				   "1991) of their postings over titles, in bits: 0 when they use the "
				   "same titles in the same proportions, 1 when they share none; the "
				   "shared mass is the sum over titles of the smaller of the two "
				   "shares. A pair is ranked when each side has at least %llu postings; "
				   "a title held by more than %llu occupations makes no pairs (it still "
				   "counts in every pair found through another title). The %llu "
				   "closest pairs are shown. An occupation is nearer another group when "
				   "its divergence from that group's pooled postings is below its "
				   "divergence from the rest of its own group's.</li>\n",
			   (unsigned long long)v->min_postings, (unsigned long long)v->key_cap,
			   (unsigned long long)r->o->overlap_top);
	}
	rp_put(r, "<li><strong>Examples</strong> are titles as posted, with e-mail addresses, "
	       "telephone numbers and web addresses masked. Gender markers are removed from "
	       "titles for counting only; local law governs how postings must be written.</li>\n"
	       "<li>These are suggestions for a curator, who decides. titlemill never changes "
	       "the taxonomy.</li>\n</ul>\n</section>\n");
}

void rp_foot(rep *r)
{
	rp_put(r, "</main>\n<footer><p class=\"tm-muted\">Made by titlemill ");
	rp_ctext(r, r->o->version ? r->o->version : "");
	rp_put(r, ".</p></footer>\n<script>\n");
	rp_put(r, SCRIPT);
	rp_put(r, "</script>\n</body>\n</html>\n");
}

/* chart.c - charts for the report as inline SVG (chart.h). */
#include "report/chart.h"

#include <math.h>

#include "io/htmlw.h"

/* The geometry of the row charts, in SVG user units (the figure scales
 * with the page through its viewBox). */
enum { W = 800, NAME_W = 310, VAL_W = 170, ROW_H = 20, TOP = 24, PLOT_W = W - NAME_W - VAL_W };

static double clamp01(double v)
{
	return isfinite(v) ? v < 0 ? 0 : v > 1 ? 1 : v : 0;
}

static double x_of(double v)
{
	return NAME_W + clamp01(v) * PLOT_W;
}

void chart_pct(tm_buf *b, double v)
{
	buf_printf(b, "%.1f\xC2\xA0%%", 100 * clamp01(v));
}

void chart_range(tm_buf *b, double lo, double hi)
{
	chart_pct(b, lo);
	buf_puts(b, "\xE2\x80\x93");
	chart_pct(b, hi);
}

static void head(tm_buf *b, const char *id, const char *title, const char *desc, int h)
{
	buf_puts(b, "<figure class=\"tm-chart\" id=\"");
	html_str(b, id);
	buf_printf(b, "\">\n<svg role=\"img\" viewBox=\"0 0 %d %d\" width=\"100%%\" "
		      "aria-labelledby=\"", W, h);
	html_str(b, id);
	buf_puts(b, "-t ");
	html_str(b, id);
	buf_puts(b, "-d\"><title id=\"");
	html_str(b, id);
	buf_puts(b, "-t\">");
	html_str(b, title);
	buf_puts(b, "</title><desc id=\"");
	html_str(b, id);
	buf_puts(b, "-d\">");
	html_str(b, desc);
	buf_puts(b, "</desc>\n");
}

/* The 0, 25, 50, 75 and 100 % grid with its labels at the top. */
static void axis(tm_buf *b, int h)
{
	for (int q = 0; q <= 4; q++) {
		double x = x_of(q / 4.0);
		buf_printf(b, "<line class=\"tm-axis\" x1=\"%.1f\" y1=\"%d\" x2=\"%.1f\" y2=\"%d\"/>"
			      "<text class=\"tm-tick\" x=\"%.1f\" y=\"%d\" text-anchor=\"middle\">%d %%"
			      "</text>\n", x, TOP - 6, x, h - 4, x, TOP - 10, 25 * q);
	}
}

static void table_head(tm_buf *b, const char *title, const char *first, const char *col,
		       int interval)
{
	buf_puts(b, "<details><summary>The numbers of this chart</summary>\n<table><caption>");
	html_str(b, title);
	buf_puts(b, "</caption>\n<thead><tr><th scope=\"col\">");
	html_str(b, first);
	buf_puts(b, "</th><th scope=\"col\">");
	html_str(b, col);
	buf_puts(b, interval ? "</th><th scope=\"col\">95 % interval</th>" : "</th>");
}

int chart_rows(tm_buf *b, const char *id, int style, const char *title, const char *desc,
	       const char *col, const chart_row *rows, size_t n)
{
	int h = TOP + (int)n * ROW_H + 8;
	head(b, id, title, desc, h);
	axis(b, h);
	for (size_t i = 0; i < n; i++) {
		const chart_row *r = &rows[i];
		int y = TOP + (int)i * ROW_H;
		double lo = x_of(r->low), hi = x_of(r->high), v = x_of(r->value);
		buf_printf(b, "<g><text class=\"tm-name\" x=\"%d\" y=\"%d\" text-anchor=\"end\">",
			   NAME_W - 8, y + 14);
		html_text(b, r->name, r->nl, CHART_NAME);
		buf_puts(b, "</text>");
		if (style != CHART_DOTS)
			buf_printf(b, "<rect class=\"tm-bar%s\" x=\"%d\" y=\"%d\" width=\"%.1f\" "
				      "height=\"%d\"/>", r->mark ? " tm-marked" : "", NAME_W, y + 4,
				   v - NAME_W, ROW_H - 8);
		if (style != CHART_SHARES)
			buf_printf(b, "<line class=\"tm-ci\" x1=\"%.1f\" y1=\"%d\" x2=\"%.1f\" y2=\"%d\"/>"
				      "<line class=\"tm-ci\" x1=\"%.1f\" y1=\"%d\" x2=\"%.1f\" y2=\"%d\"/>"
				      "<line class=\"tm-ci\" x1=\"%.1f\" y1=\"%d\" x2=\"%.1f\" y2=\"%d\"/>",
				   lo, y + ROW_H / 2, hi, y + ROW_H / 2, lo, y + 5, lo, y + ROW_H - 5, hi,
				   y + 5, hi, y + ROW_H - 5);
		if (style == CHART_DOTS)
			buf_printf(b, "<circle class=\"tm-dot\" cx=\"%.1f\" cy=\"%d\" r=\"4\"/>", v,
				   y + ROW_H / 2);
		buf_printf(b, "<text class=\"tm-value\" x=\"%d\" y=\"%d\">", W - VAL_W + 8, y + 14);
		chart_pct(b, r->value);
		if (r->mark) {
			buf_puts(b, " (");
			html_str(b, r->mark);
			buf_putc(b, ')');
		}
		buf_puts(b, "</text></g>\n");
	}
	buf_puts(b, "</svg>\n<figcaption>");
	html_str(b, desc);
	buf_puts(b, "</figcaption>\n");
	table_head(b, title, "name", col, style != CHART_SHARES);
	buf_puts(b, "<th scope=\"col\">note</th></tr></thead>\n<tbody>\n");
	for (size_t i = 0; i < n; i++) {
		const chart_row *r = &rows[i];
		buf_puts(b, "<tr><td>");
		html_text(b, r->name, r->nl, 0);
		buf_puts(b, "</td><td>");
		chart_pct(b, r->value);
		buf_puts(b, "</td><td>");
		if (style != CHART_SHARES) {
			chart_range(b, r->low, r->high);
			buf_puts(b, "</td><td>");
		}
		if (r->mark)
			html_str(b, r->mark);
		buf_puts(b, "</td></tr>\n");
	}
	buf_puts(b, "</tbody></table></details>\n</figure>\n");
	return buf_status(b);
}

int chart_series(tm_buf *b, const char *id, const char *title, const char *desc,
		 const chart_point *p, size_t n)
{
	enum { H = 200, L = 60, R = 20, PT = 20, PB = 40 };
	double step = n > 1 ? (double)(W - L - R) / (double)(n - 1) : 0;
	head(b, id, title, desc, H);
#define PX(i) (L + (n > 1 ? step * (double)(i) : (W - L - R) / 2.0))
#define PY(v) (PT + (1 - clamp01(v)) * (H - PT - PB))
	for (int q = 0; q <= 4; q++)
		buf_printf(b, "<line class=\"tm-axis\" x1=\"%d\" y1=\"%.1f\" x2=\"%d\" y2=\"%.1f\"/>"
			      "<text class=\"tm-tick\" x=\"%d\" y=\"%.1f\" text-anchor=\"end\">%d %%"
			      "</text>\n", L, PY(q / 4.0), W - R, PY(q / 4.0), L - 6, PY(q / 4.0) + 4,
			   25 * q);
	if (n) {
		buf_puts(b, "<polygon class=\"tm-band\" points=\"");
		for (size_t i = 0; i < n; i++)
			buf_printf(b, "%.1f,%.1f ", PX(i), PY(p[i].high));
		for (size_t i = n; i-- > 0;)
			buf_printf(b, "%.1f,%.1f ", PX(i), PY(p[i].low));
		buf_puts(b, "\"/>\n<polyline class=\"tm-line\" points=\"");
		for (size_t i = 0; i < n; i++)
			buf_printf(b, "%.1f,%.1f ", PX(i), PY(p[i].value));
		buf_puts(b, "\"/>\n");
	}
	/* every point a dot; period names under the axis, thinned to at
	 * most about twelve so that they do not overlap */
	size_t every = n > 12 ? (n + 11) / 12 : 1;
	for (size_t i = 0; i < n; i++) {
		buf_printf(b, "<circle class=\"tm-dot\" cx=\"%.1f\" cy=\"%.1f\" r=\"3\"/>", PX(i),
			   PY(p[i].value));
		/* the last name ends at its point, inside the picture, and
		 * the thinned name before it gives it room */
		int last = i + 1 == n && n > 1;
		if ((i % every == 0 && (last || n - 1 - i >= every)) || i + 1 == n) {
			buf_printf(b, "<text class=\"tm-tick\" x=\"%.1f\" y=\"%d\" text-anchor=\"%s\">",
				   PX(i), H - PB + 16, last ? "end" : "middle");
			html_str(b, p[i].period);
			buf_puts(b, "</text>");
		}
		buf_putc(b, '\n');
	}
#undef PX
#undef PY
	buf_puts(b, "</svg>\n<figcaption>");
	html_str(b, desc);
	buf_puts(b, "</figcaption>\n");
	table_head(b, title, "period", "share", 1);
	buf_puts(b, "<th scope=\"col\">postings</th></tr></thead>\n<tbody>\n");
	for (size_t i = 0; i < n; i++) {
		buf_puts(b, "<tr><td>");
		html_str(b, p[i].period);
		buf_puts(b, "</td><td>");
		chart_pct(b, p[i].value);
		buf_puts(b, "</td><td>");
		chart_range(b, p[i].low, p[i].high);
		buf_printf(b, "</td><td>%llu</td></tr>\n", p[i].n);
	}
	buf_puts(b, "</tbody></table></details>\n</figure>\n");
	return buf_status(b);
}

/* chart.h - charts for the report, drawn as inline SVG by titlemill.
 *
 * Each chart is a <figure> holding an <svg role="img"> with a <title>
 * and a <desc> (its text alternative), a caption, and the same numbers
 * as a table (inside <details>, so the page stays short and the numbers
 * stay one click away and in the page's text).  Colour never carries
 * meaning alone: every value is also written as text beside its mark,
 * and a marked row says what marks it in words.  Shapes take their
 * colours from the page's CSS classes (tm-bar, tm-ci, tm-dot, tm-line,
 * tm-axis, tm-mark), so that a print style can change them.
 *
 * Values are shares in [0, 1] (drawn on a 0-100 % axis); a value that is
 * not finite is drawn as 0.  Every string is escaped (io/htmlw.h).  The
 * functions append to b and return buf_status(b). */
#ifndef TM_CHART_H
#define TM_CHART_H

#include <stddef.h>

#include "core/buf.h"

/* One row: a share with its interval. */
typedef struct chart_row {
	const char *name;       /* shown at the left (cut to CHART_NAME code points) */
	size_t nl;
	double value, low, high;
	const char *mark;       /* NULL, or words shown after the value ("unseen") */
} chart_row;

/* One point of a series over periods. */
typedef struct chart_point {
	const char *period;     /* "2026-03", "2026-W09" ... */
	double value, low, high;
	unsigned long long n;   /* the postings behind it, for the table */
} chart_point;

/* CHART_BARS and CHART_DOTS draw each row's interval; CHART_SHARES
 * draws bars without one, for a share that is a measure and not an
 * estimate (low and high are ignored; the table has no interval
 * column). */
enum { CHART_BARS, CHART_DOTS, CHART_SHARES };

#define CHART_NAME 44

/* A share as a percentage with one decimal ("42.5 %"). */
void chart_pct(tm_buf *b, double v);

/* An interval of shares ("40.1 %\u201343.0 %"). */
void chart_range(tm_buf *b, double lo, double hi);

/* A figure of one row per item: bars from 0 (CHART_BARS, CHART_SHARES)
 * or a dot (CHART_DOTS), each with its interval as a whisker (but
 * CHART_SHARES).  id must be unique
 * in the page (letters, digits, '-'); title is the chart's heading, desc
 * says what it shows in a sentence; col names the value's column in the
 * table ("share"). */
int chart_rows(tm_buf *b, const char *id, int style, const char *title, const char *desc,
	       const char *col, const chart_row *rows, size_t n);

/* A figure of one series over periods (in the order given) with its
 * interval as a band. */
int chart_series(tm_buf *b, const char *id, const char *title, const char *desc,
		 const chart_point *p, size_t n);

#endif

/* report.h - one self-contained HTML page a curator opens in a browser,
 * forwards by e-mail or puts on an intranet: what the representativeness
 * review computes, with the pictures that make the case.
 *
 * Sections: an overview (postings, occupations, languages, coverage with
 * its interval, coverage per language as a chart); coverage per
 * occupation (the lowest covered as a dot-and-interval chart, all of them
 * in a sortable table); one section per occupation to look at (those
 * asked for, or the weakest): each label's share of its postings with
 * its interval, unseen labels marked, the biggest unmatched titles with
 * masked examples, its suggestions; the suggestions by kind with their
 * evidence and the queue's decision when a queue is given; rising and
 * fading titles (a trend list the caller hands in); occupations the
 * postings cannot tell apart (pairs, and occupations nearer another
 * group than their own, from rank/overlap.h); how to read the report
 * (the methods and bars used, and that every suggestion is for a
 * curator, who decides).  An occupation's section draws its preferred
 * label's share over time when the caller hands in its periods.
 *
 * The page needs nothing from the network: inline CSS, SVG drawn here,
 * and a little inline JavaScript that only sorts and filters tables (the
 * page reads the same without it).  Every text from the inputs is
 * escaped (io/htmlw.h).  The same inputs give the same bytes: no time is
 * written unless the caller passes a stamp.
 *
 * The numbers are those of the engines the commands print (coverage.h,
 * propose.h, overlap.h, trend.h): the report calls them, it does not
 * compute them again. */
#ifndef TM_REPORT_H
#define TM_REPORT_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "count/tally.h"
#include "rank/labels.h"
#include "rank/overlap.h"
#include "rank/propose.h"
#include "rank/trend.h"
#include "review/review.h"

/* The figures of one occupation in one language in one period: what an
 * occupation's section draws over time.  Filled by report_periods_add,
 * one period's counts at a time; owns its strings. */
typedef struct report_period {
	uint32_t occ, ol, period;  /* offsets in arena */
	char lang[4];
	uint64_t postings, pref;   /* its postings; those a preferred label matches */
} report_period;

typedef struct report_periods {
	report_period *v;
	size_t n, cap;
	tm_buf arena;
} report_periods;

/* Adds the figures of every occupation and language (only lang, when
 * not NULL) in the counts m of one period (its name, e.g. "2026-03" or
 * "2026-W09": the names must sort in time order, as ISO 8601 names do;
 * an empty name, the undated postings, is not drawn).  Runs the
 * coverage engine on m.  Returns 0, or -1 when memory ran out (ps then
 * holds what was added before). */
int report_periods_add(report_periods *ps, const char *period, tally_mem *m, const labelset *ls,
		       const char *lang);
void report_periods_free(report_periods *ps);

typedef struct report_opts {
	const char *lang;          /* only this language, or NULL */
	char *const *occs;         /* the occupations given a section of their
				    * own, or NULL for the weakest */
	int nocc;
	uint64_t sections;         /* without occs: the weakest this many */
	uint64_t min_postings;     /* an occupation needs this many postings in
				    * a language to count among the weakest */
	const propose_bars *bars;  /* the ranker's bars */
	uint64_t top;              /* the suggestions of each kind listed */
	const rq_queue *queue;     /* decisions to show, or NULL */
	const char *window;        /* the time covered, in words, or NULL */
	const char *stamp;         /* a time to print, or NULL */
	const char *version;       /* titlemill's version */
	tm_buf *notes;             /* NULL, or receives what the reader should
				    * know, a line each (an occupation asked
				    * for that has no postings) */
	uint64_t distinct;         /* the distinct postings, when known (else 0) */
	/* occupations the postings cannot tell apart (rank/overlap.h) */
	const overlap_opts *overlap; /* NULL: no such section */
	uint64_t overlap_top;      /* the closest pairs shown (at least 1), and
				    * at most as many occupations nearer
				    * another group */
	/* time, when the counts have periods (the caller's) */
	const trend_list *trend;   /* NULL: no section on rising and fading titles */
	const trend_bars *trend_bars; /* the bars the list was made with */
	const char *trend_before, *trend_after; /* the two windows, in words */
	const report_periods *periods; /* NULL, or each occupation's periods */
} report_opts;

/* Writes the page for counts m and labels ls to out.  Returns 0, or a
 * negative kind of err.h with a message in err (memory ran out). */
int report_write(tally_mem *m, const labelset *ls, const report_opts *o, tm_buf *out,
		 tm_buf *err);

#endif

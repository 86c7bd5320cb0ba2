/* report_int.h - what the files of the HTML report share (report.h):
 * the rows gathered from the engines, the chosen sections, and the
 * helpers that write cells and text.  Internal to src/report/.
 *
 *   report.c          gathers the rows and writes the page in order
 *   report_page.c     the page's frame (style, script, head, foot), the
 *                     cell helpers, "How to read this report"
 *   report_cov.c      the overview and coverage per occupation
 *   report_occ.c      one section per occupation, the suggestions
 *   report_overlap.c  occupations the postings cannot tell apart
 *   report_trend.c    rising and fading titles; the series over periods
 *
 * Everything a section writes goes into r->out; the writers return 0 or
 * -1 when memory ran out (r->out's status says so as well).  Strings of
 * the rows live in r->arena (offsets, read with rp_str). */
#ifndef TM_REPORT_INT_H
#define TM_REPORT_INT_H

#include <stddef.h>
#include <stdint.h>

#include "count/strtab.h"
#include "rank/coverage.h"
#include "report/chart.h"
#include "report/report.h"

/* How many of the lowest-covered occupations the coverage chart shows,
 * and how long a text may run in a table before it is cut. */
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
	chart_point *pts;             /* the periods of the sections, grouped by
				       * section, each in period order */
	size_t *ptstart;              /* section s: pts[ptstart[s] .. ptstart[s + 1]) */
	tm_buf *out;
	tm_buf j;
	int oom;
} rep;

/* report.c */
const char *rp_str(const rep *r, uint32_t off);
/* The section of (occ, lang), or -1. */
long rp_section_of(rep *r, const char *occ, size_t ol, const char *lang, size_t ll);
/* Groups n items by section, a counting sort that keeps their order:
 * where[i] is item i's section or -1 (left out); *start gets the bounds
 * (section s holds order[(*start)[s] .. (*start)[s + 1]), allocated,
 * the caller frees), order the item indices (room for n).  0, or -1
 * when memory ran out. */
int rp_by_section(rep *r, const long *where, size_t n, size_t **start, size_t *order);
/* The postings of key in section s's occupation. */
uint64_t rp_key_postings(rep *r, long s, const char *key, size_t kl);

/* report_page.c: text and cells (escaped; shares as percentages) */
void rp_put(rep *r, const char *s);
void rp_text(rep *r, const char *s, size_t n, size_t max);
void rp_ctext(rep *r, const char *s);
void rp_pct(rep *r, double v);
void rp_range(rep *r, double lo, double hi);
void rp_td_pct(rep *r, double v);
void rp_td_interval(rep *r, double lo, double hi);
void rp_td_u64(rep *r, uint64_t v);
void rp_td_num(rep *r, double v);
void rp_td_text(rep *r, const char *s, size_t n);
void rp_th(rep *r, const char *const *names);
/* The occupation's name for curators, or "" when it has none. */
const char *rp_occ_name(rep *r, const char *occ, size_t ol, const char *lang, size_t *n);
/* An occupation's id (a link to its section when it has one) and name,
 * two cells. */
void rp_occ_cells(rep *r, const char *occ, size_t ol, const char *lang);
/* The same in one cell (the id, its name below), sorted by the id. */
void rp_occ_cell(rep *r, const char *occ, size_t ol, const char *lang);
void rp_head(rep *r);
void rp_reading(rep *r);
void rp_foot(rep *r);

/* the sections */
int rp_overview(rep *r);
int rp_coverage(rep *r, const size_t *weak, size_t nweak);
int rp_occ_section(rep *r, size_t si);
int rp_suggestions(rep *r);
int rp_trend(rep *r);
int rp_overlap(rep *r);
/* report_trend.c: groups o->periods by section into r->pts */
int rp_gather_periods(rep *r);
/* report_trend.c: the series chart of section si, when it has one */
int rp_occ_series(rep *r, size_t si);

#endif

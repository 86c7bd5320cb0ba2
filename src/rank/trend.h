/* trend.h - titles rising and falling between two windows of time.
 *
 * The engine compares two counts, each the sum of the periods of one
 * window (the earlier "before", the later "after"), occupation by
 * occupation and language by language.  For each title (match key) of
 * an occupation counted in either window it tests the 2x2 table
 *
 *                     before              after
 *     this title      postings_before     postings_after
 *     its other       occ_before - pb     occ_after - pa
 *
 * with Dunning's G^2 (Dunning 1993) and reports the title when its
 * share of the occupation's postings changed beyond chance:
 *
 *   rising   share after > share before (titles never counted before
 *            included), postings after >= min_postings, G^2 >= min_g2,
 *            share after >= min_ratio x share before;
 *   falling  the mirror: share before > share after (titles and labels
 *            that vanished included), postings before >= min_postings,
 *            share before >= min_ratio x share after.
 *
 * An occupation counted in one window only has no share to compare: it
 * is left out and counted (trend_list.one_window).  Shares come with
 * their Wilson 95 % intervals.  These are suggestions for a curator,
 * who decides; the engine changes nothing.
 *
 * Ownership: a trend_list owns its array; the strings of a row point
 * into the two counts and the labels, which must outlive it. */
#ifndef TM_TREND_H
#define TM_TREND_H

#include <stddef.h>
#include <stdint.h>

#include "count/series.h"
#include "count/tally.h"
#include "rank/labels.h"
#include "rank/stats.h"

enum { TREND_RISING, TREND_FALLING };

/* The directions' names, by the enum. */
extern const char *const trend_direction_names[2];

/* The bars: each an option of titlemill trend with the same name (X:
 * type, option kind (cli/options.h), member, option, argument, default,
 * low, high, meaning).  The one place where they are defined.  The
 * defaults are common practice for keeping day-to-day noise out, not
 * fitted to any data: a G^2 at p = 0.001 with one degree of freedom, a
 * title seen at least ten times in the window where it is strong, and a
 * share that at least doubled or halved. */
#define TREND_BARS(X) \
	X(uint64_t, OPT_U64, min_postings, "min-postings", "N", 10, 1, 1e18, \
	  "postings of the title in the window where its share is higher") \
	X(double, OPT_REAL, min_g2, "min-g2", "X", STATS_CHI2_1DF_P001, 0, 1e12, \
	  "Dunning's G2 of the change at least X (chi2 at p=0.001, 1 df)") \
	X(double, OPT_REAL, min_ratio, "min-ratio", "X", 2, 1, 1e12, \
	  "the higher share at least X times the lower")

#define TREND_BAR_MEMBER(type, kind, m, opt, arg, def, lo, hi, meaning) type m;
typedef struct trend_bars {
	TREND_BARS(TREND_BAR_MEMBER)
} trend_bars;

void trend_bars_default(trend_bars *b);

typedef struct trend_filter {
	const char *occ;   /* only this occupation, or NULL */
	const char *lang;  /* only this language, or NULL */
} trend_filter;

typedef struct trend_row {
	int direction;
	const char *occ, *key, *title; /* title: the display title of the
					* window where the title is strong */
	size_t ol, kl, tl;
	char lang[4];
	const label *lb;               /* the label with this key, or NULL */
	uint64_t before, after;        /* postings of the title */
	uint64_t occ_before, occ_after;
	double share_before, lo_before, hi_before;
	double share_after, lo_after, hi_after;
	double g2;
} trend_row;

typedef struct trend_list {
	trend_row *v;      /* rising first, then falling; each by G^2
			    * (highest first), occupation, language, key */
	size_t n;
	uint64_t one_window; /* occupations (with a language) counted in
			      * one window only */
} trend_list;

/* Compares before and after under bars b (filtered by f, which may be
 * NULL) into out.  Returns 0, or -1 when memory ran out (out then
 * empty).  Deterministic. */
int trend_run(tally_mem *before, tally_mem *after, const labelset *ls, const trend_bars *b,
	      const trend_filter *f, trend_list *out);

void trend_list_free(trend_list *l);

/* A change must outlast its bursts.  A title mass-posted on a day or two
 * (one employer's campaign, a job reposted in bulk) lifts its share in
 * that window as much as a lasting change does, and G^2, which takes
 * postings as independent, cannot tell them apart; the periods around
 * can.  So when the window where the title's share is higher holds at
 * least TREND_LASTING_MIN_PERIODS periods in which the occupation was
 * counted, each of its periods is tested against the periods before it
 * and, apart, against those after it (as many as the window holds, on
 * each side, inside or outside the window) by the bars a change must
 * pass (the title's postings in the period, the ratio of its shares,
 * G^2): a period above both is a burst.  When there are bursts, the share
 * of the window's other periods must still pass min_ratio against the
 * other window's.  A level that changes and stays (a label that fades, a
 * title that appears and goes on) is above one side only, and counts.
 * Two periods cannot tell a burst from a change, nor can a window of one
 * (the default later window).  The figures printed stay those of the
 * whole windows. */
#define TREND_LASTING_MIN_PERIODS 3

/* One walk over the dated periods of s: leaves out of l (keeping its
 * order) the rows whose change rests on bursts (above),
 * the windows being the periods of s wholly within days b0..b1 and
 * a0..a1; and, when first is not NULL (room for l->n), sets first[i] to
 * the first period of s (in time order, the undated aside) the title of
 * the kept l->v[i] was counted in, a label of s or NULL.  Linear in the
 * forms of the periods walked (all of them with first, else the
 * windows'), plus rows x periods of the windows.  0, or -1 when memory
 * ran out (l unchanged). */
int trend_periods(tally_series *s, long b0, long b1, long a0, long a1, const trend_bars *b,
		  trend_list *l, const char **first);

/* Window from..to as the periods of s wholly within it cover it (the
 * first day of the first to the last day of the last; from..to itself
 * when none is), as text (trend_window_text) in out.  Returns how many
 * periods lie partly within it (left out of the sums). */
long trend_window_used(const tally_series *s, long from, long to, char *out, size_t cap);

/* The periods the default earlier window holds: the ones just before
 * the later. */
#define TREND_BEFORE_PERIODS 3

/* The default windows over the periods of s: the later the latest
 * period of s with counts that ended before day today (a complete one),
 * the earlier the TREND_BEFORE_PERIODS periods of its kind before it.
 * Only the missing ones are set: *a0..*a1 when !have_after, *b0..*b1
 * when !have_before; a given later window is read from *a0 (the earlier
 * one is the periods before it).  Returns 0; -1 when s has no periods; -2 when no
 * period of s ended before today. */
int trend_default_windows(tally_series *s, long today, int have_before, int have_after,
			  long *b0, long *b1, long *a0, long *a1);

/* A window as text: the labels of its first and last periods of kind
 * when it is made of whole ones, else its first and last days ("a..b",
 * or "a" alone). */
void trend_window_text(int kind, long a, long b, char *out, size_t cap);

#endif

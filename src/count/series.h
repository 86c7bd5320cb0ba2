/* series.h - counts by period: one memory engine (tally.h) per period,
 * the posting ids shared by all of them.
 *
 * A posting counts in the period of its date (core/period.h: a day, an
 * ISO 8601 week or a month); one without a date, and every row of a
 * counts table without a period column, counts in the undated period
 * "".  A series has a kind:
 *
 *   SERIES_AS_READ  periods stay as they come (a table by month stays by
 *                   month; a posting counts in its month, as tally's
 *                   default); one series holds periods of one kind
 *                   only, and a period of another kind is refused
 *   PERIOD_DAY, PERIOD_WEEK, PERIOD_MONTH
 *                   periods are rolled up to this kind: a day goes into
 *                   its week or month; a week or a month goes only into
 *                   its own kind (a week can straddle two months, so it
 *                   is refused as a month, never split or guessed)
 *   PERIOD_NONE     every period is summed into the undated one (the
 *                   counts of all time, as the ranking engines read them)
 *
 * A window (series_window) keeps only the periods that lie wholly
 * inside it, and drops the undated period: a period partly inside is
 * left out and counted in `partial`, so that a command can say so.  The
 * periods are the series' own (a day rolled up to a week counts only
 * when the whole week lies inside), except under PERIOD_NONE, where each
 * period read (a posting's day) is taken on its own.
 *
 * A posting id counts once in the whole series (in the first period it
 * came in); rows of counts tables carry no ids.
 *
 * Ownership: the series owns its engines and their strings; pointers
 * from series_at or series_sorted live until series_free. */
#ifndef TM_SERIES_H
#define TM_SERIES_H

#include <stdint.h>
#include <stdio.h>

#include "core/buf.h"
#include "core/period.h"
#include "count/tally.h"

#define SERIES_AS_READ (-1)

typedef struct series_period {
	char label[PERIOD_MAX];
	uint8_t len;
	long first, last;  /* its days; first > last for the undated one */
	tally_mem m;
} series_period;

typedef struct tally_series {
	int kind;           /* SERIES_AS_READ, PERIOD_NONE, _DAY, _WEEK, _MONTH */
	int seen_kind;      /* the dated periods' kind so far (PERIOD_NONE: none yet) */
	int windowed;
	long from, to;      /* the window's days, when windowed */
	series_period **p;  /* in the order they came */
	size_t n, cap;
	strtab index;       /* label -> index into p */
	/* the label asked for last and where it went (postings and rows
	 * come in runs of one period) */
	char cache[PERIOD_MAX];
	size_t cachen;
	tally_mem *cachem;
	int cached;
	strtab left;        /* labels left out by the window -> 1 outside,
			     * 2 partly inside */
	idset ids;
	/* postings counted (each id once), their id seen before, left out
	 * by the window (postings; rows of tables are not counted here) */
	uint64_t postings, republished, outside;
	uint64_t undated;   /* postings counted in the undated period */
	uint64_t partial;   /* periods left out: partly inside the window */
	uint64_t dropped;   /* periods left out: outside the window, or undated */
} tally_series;

void series_init(tally_series *s, int kind);
void series_free(tally_series *s);

/* Keeps only the periods that lie wholly within days from..to
 * (inclusive), dropping the undated.  Call before anything is added. */
void series_window(tally_series *s, long from, long to);

/* The engine that counts period label[0..n) (any form a table can hold:
 * "", a day, a week, a month) after rolling it up to s's kind, created
 * when new: *m is set, or NULL when the window leaves it out.  Returns
 * 0, -1 with the reason in err (a label that is no period, a kind that
 * cannot be rolled up or mixed), -2 when memory ran out. */
int series_at(tally_series *s, const char *label, size_t n, tally_mem **m, tm_buf *err);

/* Counts one posting in its period (tp->period).  Returns 0, 1 when its
 * id was counted before or the window leaves it out, -1 when memory ran
 * out, -2 when its period cannot be counted here (message in err). */
int series_add(tally_series *s, const tally_posting *tp, tm_buf *err);

/* Reads a counts table (its period column, when it has one, says where
 * each row counts) into s.  Returns 0, or -1 with "file:line: what". */
int series_read(tally_series *s, const char *path, tm_buf *err);

/* Writes the counts table: with_period, a period column first and the
 * periods in time order (the undated first); without, one table of the
 * undated period (the series must be of kind PERIOD_NONE).  Returns 0,
 * -1 on a write error or when memory ran out. */
int series_write(tally_series *s, FILE *out, int with_period);

/* The periods in time order (the undated first), in a new array the
 * caller frees; NULL when memory ran out (or there are none: *n 0). */
series_period **series_sorted(tally_series *s, size_t *n);

/* The undated period's engine when s is of kind PERIOD_NONE (created
 * empty when nothing was counted): the counts of all time.  NULL when
 * memory ran out. */
tally_mem *series_all(tally_series *s);

/* Adds to dst every period of s that lies wholly within days from..to.
 * Returns the number of periods added, or -1 (memory), -2 (past 2^64). */
long series_sum(tally_series *s, long from, long to, tally_mem *dst);

/* Adds every period of s, the undated too, to dst: 0, -1, -2 as
 * tm_merge. */
int series_merge_all(tally_series *s, tally_mem *dst);

/* Does s hold a dated period (a table of it has a period column)? */
static inline int series_dated(const tally_series *s)
{
	return s->seen_kind != PERIOD_NONE;
}

/* Does s hold any count? */
int series_any(const tally_series *s);

/* Bytes held, for measurements. */
size_t series_bytes(const tally_series *s);

#endif

/* period.h - periods of time for counts: days, ISO 8601 weeks, months.
 *
 * A day is a day number: days since 1970-01-01 in the proleptic
 * Gregorian calendar (negative before).  A period has a label:
 *
 *   day    2026-03-01
 *   week   2026-W09    ISO 8601 week date: weeks start on Monday, week 1
 *                      holds the year's first Thursday, so the week-year
 *                      of the last days of December or the first of
 *                      January can be the next or the previous year
 *   month  2026-03
 *   none   ""          (undated postings, or counts without periods)
 *
 * Windows (--from, --to) take any of these forms, and also a year
 * (2026) and a quarter (2026-Q2); a form stands for all its days.
 * Labels sort as text in time order within one kind.  Years run from
 * 0001 to 9999. */
#ifndef TM_PERIOD_H
#define TM_PERIOD_H

#include <stddef.h>

enum period_kind {
	PERIOD_NONE, PERIOD_DAY, PERIOD_WEEK, PERIOD_MONTH,
	PERIOD_QUARTER, PERIOD_YEAR /* window forms only */
};

/* The longest label and its NUL ("2026-03-01"). */
#define PERIOD_MAX 11

/* The kind named s ("day", "week", "month", "none"), or -1. */
int period_kind_of(const char *s);

/* The kind's name ("day", ..., "quarter", "year"). */
const char *period_kind_name(int kind);

/* Day number of a calendar date (no check; m 1-12, d 1-31). */
long period_days(int y, int m, int d);

/* The calendar date of day number z. */
void period_civil(long z, int *y, int *m, int *d);

/* ISO 8601 weekday of day z: 1 Monday ... 7 Sunday. */
int period_weekday(long z);

/* Reads an ISO 8601 calendar date YYYY-MM-DD (exactly ten bytes, a real
 * day: 2026-02-29 is not) into *day.  0, or -1 when s is not one. */
int period_date(const char *s, size_t n, long *day);

/* Writes the label of the period of kind (day, week or month; "" for
 * none) holding day z into out, NUL-terminated; returns its length. */
size_t period_label(int kind, long z, char out[PERIOD_MAX]);

/* Reads a period in any form (a date, 2026-W09, 2026-03, 2026-Q1, 2026,
 * or "" for the undated period, whose days are none: *first > *last)
 * into its first and last day and, when kind is not NULL, its kind.
 * 0, or -1 when s is none of the forms or names a day, week or month
 * that does not exist (2026-W53, 2026-13). */
int period_span(const char *s, size_t n, long *first, long *last, int *kind);

#endif

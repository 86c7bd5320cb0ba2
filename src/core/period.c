/* period.c - days, ISO 8601 weeks and months (period.h).
 *
 * The calendar conversions are Howard Hinnant's days_from_civil and
 * civil_from_days ("chrono-Compatible Low-Level Date Algorithms", public
 * domain): exact over the proleptic Gregorian calendar with no table and
 * no loop.  The ISO week of a day is the week of its Thursday: the year
 * of that Thursday is the week-year, and the week number counts from the
 * week holding 4 January (ISO 8601-1:2019, 5.2.4.1). */
#include "core/period.h"

#include <string.h>

static long floor_div(long a, long b)
{
	return a / b - ((a % b != 0) && ((a < 0) != (b < 0)));
}

long period_days(int y, int m, int d)
{
	long yy = y - (m <= 2);
	long era = floor_div(yy, 400);
	long yoe = yy - era * 400;                              /* [0, 399] */
	long doy = (153L * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1; /* [0, 365] */
	long doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;       /* [0, 146096] */
	return era * 146097 + doe - 719468;
}

void period_civil(long z, int *y, int *m, int *d)
{
	z += 719468;
	long era = floor_div(z, 146097);
	long doe = z - era * 146097;
	long yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
	long doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
	long mp = (5 * doy + 2) / 153;
	*d = (int)(doy - (153 * mp + 2) / 5 + 1);
	*m = (int)(mp < 10 ? mp + 3 : mp - 9);
	*y = (int)(yoe + era * 400 + (*m <= 2));
}

int period_weekday(long z)
{
	long w = (z + 3) % 7; /* 1970-01-01 was a Thursday: 3 from Monday */
	if (w < 0)
		w += 7;
	return (int)w + 1;
}

static int leap(int y)
{
	return (y % 4 == 0 && y % 100 != 0) || y % 400 == 0;
}

static int month_days(int y, int m)
{
	static const int md[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
	return md[m - 1] + (m == 2 && leap(y));
}

/* Week-year and week of day z. */
static void iso_week(long z, int *wy, int *wk)
{
	long th = z - period_weekday(z) + 4; /* the Thursday of z's week */
	int m, d;
	period_civil(th, wy, &m, &d);
	*wk = (int)((th - period_days(*wy, 1, 1)) / 7 + 1);
}

/* Monday of week 1 of week-year y. */
static long week_one(int y)
{
	long j4 = period_days(y, 1, 4);
	return j4 - period_weekday(j4) + 1;
}

int period_kind_of(const char *s)
{
	static const char *const names[] = {"none", "day", "week", "month"};
	for (int k = 0; k < 4; k++)
		if (!strcmp(s, names[k]))
			return k;
	return -1;
}

const char *period_kind_name(int kind)
{
	static const char *const names[] = {"none", "day", "week", "month", "quarter", "year"};
	return kind >= 0 && kind <= PERIOD_YEAR ? names[kind] : "?";
}

/* n digits of s as a number, or -1. */
static int digits(const char *s, size_t n)
{
	int v = 0;
	for (size_t i = 0; i < n; i++) {
		if (s[i] < '0' || s[i] > '9')
			return -1;
		v = v * 10 + (s[i] - '0');
	}
	return v;
}

int period_date(const char *s, size_t n, long *day)
{
	int y, m, d;
	if (n != 10 || s[4] != '-' || s[7] != '-')
		return -1;
	y = digits(s, 4);
	m = digits(s + 5, 2);
	d = digits(s + 8, 2);
	if (y < 1 || m < 1 || m > 12 || d < 1 || d > month_days(y, m))
		return -1;
	*day = period_days(y, m, d);
	return 0;
}

static void put_digits(char *out, int v, int n)
{
	for (int i = n - 1; i >= 0; i--, v /= 10)
		out[i] = (char)('0' + v % 10);
}

size_t period_label(int kind, long z, char out[PERIOD_MAX])
{
	int y, m, d;
	size_t n = 0;
	switch (kind) {
	case PERIOD_DAY:
	case PERIOD_MONTH:
		period_civil(z, &y, &m, &d);
		put_digits(out, y, 4);
		out[4] = '-';
		put_digits(out + 5, m, 2);
		n = 7;
		if (kind == PERIOD_DAY) {
			out[7] = '-';
			put_digits(out + 8, d, 2);
			n = 10;
		}
		break;
	case PERIOD_WEEK:
		iso_week(z, &y, &m);
		put_digits(out, y, 4);
		memcpy(out + 4, "-W", 2);
		put_digits(out + 6, m, 2);
		n = 8;
		break;
	default:
		break;
	}
	out[n] = 0;
	return n;
}

int period_span(const char *s, size_t n, long *first, long *last, int *kind)
{
	int y = n >= 4 ? digits(s, 4) : -1, k, v;
	if (n == 0) {
		*first = 1;
		*last = 0;
		k = PERIOD_NONE;
	} else if (y < 1) {
		return -1;
	} else if (n == 4) {
		*first = period_days(y, 1, 1);
		*last = period_days(y, 12, 31);
		k = PERIOD_YEAR;
	} else if (n == 10) {
		if (period_date(s, n, first))
			return -1;
		*last = *first;
		k = PERIOD_DAY;
	} else if (n == 7 && s[4] == '-' && s[5] == 'Q' && (v = digits(s + 6, 1)) >= 1 && v <= 4) {
		*first = period_days(y, 3 * v - 2, 1);
		*last = period_days(y, 3 * v, month_days(y, 3 * v));
		k = PERIOD_QUARTER;
	} else if (n == 7 && s[4] == '-' && (v = digits(s + 5, 2)) >= 1 && v <= 12) {
		*first = period_days(y, v, 1);
		*last = period_days(y, v, month_days(y, v));
		k = PERIOD_MONTH;
	} else if (n == 8 && s[4] == '-' && s[5] == 'W' && (v = digits(s + 6, 2)) >= 1 &&
		   v <= 53) {
		/* week 53 exists only when the next year's week 1 starts later */
		*first = week_one(y) + 7L * (v - 1);
		*last = *first + 6;
		if (*last >= week_one(y + 1))
			return -1;
		k = PERIOD_WEEK;
	} else {
		return -1;
	}
	if (kind)
		*kind = k;
	return 0;
}

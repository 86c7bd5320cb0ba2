/* pass_days.c - days, clock times and head counts: Mo–Fr 7–15 Uhr,
 * 6am-9am, 22:00–06:00, (5 posts). */
#include <stdlib.h>
#include <string.h>

#include "norm/pass_noise.h"


static int unit_val(tm_title *ti, size_t k, const char *v, size_t *len)
{
	return k < ti->nunit && ukept(ti, k) && !ti->prot[ti->unit[k]] &&
	       match_val(ti, k, LC_UNIT, v, 1, len) != NULL;
}

/* Is unit k a kept number? */
static int num_at(tm_title *ti, size_t k)
{
	return k < ti->nunit && ukept(ti, k) && !ti->prot[ti->unit[k]] &&
	       U(ti, k)->kind == TK_NUM;
}

/* The English clock suffix written after a time at unit k, glued to it
 * or not: "am", "pm", "a.m.", "p.m." (6am, 9 pm, 6 a.m.).  Its length in
 * units, or 0.  (Code, not a lexicon entry: the word "am" is a German
 * preposition, and the suffix means a clock time only right after a
 * number.) */
static size_t meridiem(tm_title *ti, size_t k)
{
	uint32_t n, n2;
	const char *f, *f2;
	if (k >= ti->nunit || !ukept(ti, k) || U(ti, k)->kind != TK_WORD)
		return 0;
	f = ufold(ti, k, &n);
	if (n == 0 || (f[0] != 'a' && f[0] != 'p'))
		return 0;
	if (n == 2 && f[1] == 'm')
		return 1;
	if (n != 1 || k + 1 >= ti->nunit || !ukept(ti, k + 1) ||
	    U(ti, k + 1)->kind != TK_WORD || !glued(ti, k, k + 1, "."))
		return 0;
	f2 = ufold(ti, k + 1, &n2);
	return n2 == 1 && f2[0] == 'm' ? 2 : 0;
}

/* Does number token t hold the minutes of a time after a dot, "6.00",
 * "14.30": one or two digits, a dot, two digits below 60? */
static int dotted_minutes(const tm_title *ti, const tm_tok *t)
{
	const char *p = ti->text + t->off;
	uint32_t d = 0;
	while (d < t->len && p[d] >= '0' && p[d] <= '9')
		d++;
	return d >= 1 && d <= 2 && t->len == d + 3 && p[d] == '.' &&
	       p[d + 1] >= '0' && p[d + 1] <= '5' && p[d + 2] >= '0' && p[d + 2] <= '9';
}

/* Is the fold of word unit k an "h" and two digits of minutes below 60,
 * the tail of "9h30", "6h00"? */
static int hour_minutes(tm_title *ti, size_t k)
{
	uint32_t n;
	const char *f = ufold(ti, k, &n);
	return n == 3 && f[0] == 'h' && f[1] >= '0' && f[1] <= '5' &&
	       f[2] >= '0' && f[2] <= '9';
}

/* A time of day at unit k: 7, 08, 15.30, 15:30, 9h30, 6h, 6am, 9 p.m.
 * Returns its end (exclusive), or 0.  *sure (when not NULL) is set to 1
 * when the time can be nothing but a clock time: minutes written after
 * ":" or "." or "h" (15:30, 6.00, 9h30) or an am/pm suffix (6am); to 2
 * for a glued "h" alone (6h, also six hours); else to 0. */
static size_t clock_time_(tm_title *ti, size_t k, int *sure)
{
	size_t len, m;
	unsigned v;
	int s = 0;
	if (!num_at(ti, k) || ndigits(ti, U(ti, k)) > 4 ||
	    (v = lead_value(ti, U(ti, k))) > 24)
		return 0;
	if (dotted_minutes(ti, U(ti, k)))
		s = 1;
	k++;
	if (num_at(ti, k) && glued(ti, k - 1, k, ":") && U(ti, k)->len == 2) {
		if (ti->unit[k] == ti->unit[k - 1] + 2 && lead_value(ti, U(ti, k)) < 60)
			s = 1;
		k++;
	}
	if (unit_val(ti, k, "hours", &len) && len == 1 && glued(ti, k - 1, k, "")) {
		if (num_at(ti, k + 1) && glued(ti, k, k + 1, "") && U(ti, k + 1)->len == 2) {
			k += 2; /* 9h30 */
			s = 1;
		} else if (U(ti, k)->flen == 1) {
			k++; /* 6h */
			s = s ? s : 2;
		}
	} else if (k < ti->nunit && ukept(ti, k) && U(ti, k)->kind == TK_WORD &&
		   glued(ti, k - 1, k, "") && hour_minutes(ti, k)) {
		k++; /* 6h00, 9h30 */
		s = 1;
	} else if (v >= 1 && v <= 12 && (m = meridiem(ti, k))) {
		k += m;
		s = 1;
	}
	if (sure)
		*sure = s;
	return k;
}

static size_t clock_time(tm_title *ti, size_t k)
{
	return clock_time_(ti, k, NULL);
}

/* A clock range at k: 7–15, 9-5, 08.00–16.00 Uhr, 7 bis 15 h, its two
 * times glued by one of dashes ("-/" or "-": "2/2" is a rotation).
 * Returns its end (exclusive), or 0. */
static size_t clock_range(tm_title *ti, size_t k, const char *dashes)
{
	size_t e = clock_time(ti, k), r, len;
	if (!e || e >= ti->nunit)
		return 0;
	if (glued(ti, e - 1, e, dashes) && ti->unit[e] == ti->unit[e - 1] + 2)
		r = e;
	else if (unit_val(ti, e, "connector", &len) && len == 1)
		r = e + 1;
	else
		return 0;
	if (!(e = clock_time(ti, r)))
		return 0;
	if (unit_val(ti, e, "hours", &len))
		e += len;
	return e;
}

/* A clock range that needs no shift or day word to be one, at unit k:
 * two times of which one at least is a clock time by its writing
 * ("6am-9am", "6-9am", "06:00-09:00", "22:00–06:00", "6.00-14.00 Uhr",
 * "8:30 to 17:00"), or both with a glued "h" ("6h-14h"), or a glued
 * range of two times followed by a time word ("7-15 Uhr", "4-12 h").  A
 * dash with spaces around it ("6am - 9am") joins two times that are
 * both clock times by their writing.  Numbers alone are not times:
 * "Level 3-4", "NVQ 2-3", "C1-C2" stay, unless plain is set (a clock
 * word stands before them: "kl. 6-9", "klo 6-9").  Returns the range's
 * end (exclusive), or 0. */
static size_t plain_clock_range(tm_title *ti, size_t k, int plain)
{
	size_t e, r, len, t;
	int s1, s2, spaced = 0;
	/* money: £11-13/hr */
	if (k > 0 && ukept(ti, k - 1) && is_currency(ti, k - 1, &len))
		return 0;
	if (!(e = clock_time_(ti, k, &s1)) || e >= ti->nunit)
		return 0;
	t = ti->unit[e - 1] + 1;
	if (tok_is(ti, t, '.') && !ti->tl.t[t].sp)
		t++; /* the dot ending "6 a.m." */
	if (ti->unit[e] == t + 1 && tok_is(ti, t, '-')) {
		r = e; /* 6-9am, 6am - 9am */
		spaced = ti->tl.t[t].sp || U(ti, e)->sp;
		if (spaced && s1 != 1)
			return 0;
	} else if (unit_val(ti, e, "connector", &len) && len == 1)
		r = e + 1; /* 8:30 to 17:00 */
	else
		return 0;
	if (!(e = clock_time_(ti, r, &s2)) || (spaced && s2 != 1))
		return 0;
	/* a time word after the pair goes with it, and makes clock times of
	 * two plain numbers: 6.00-14.00 Uhr, 7-15 Uhr */
	if (unit_val(ti, e, "hours", &len) && ti->unit[e] == ti->unit[e - 1] + 1) {
		/* hours a week are no clock times: "10-20 Std./Woche",
		 * "6-12 Stunden/Woche", "4-8 hours per week" */
		size_t l2;
		const lex_entry *w = match_cat(ti, e, LC_UNIT, 1, &l2);
		if (w && l2 > len)
			return 0;
		w = match_cat(ti, e + len, LC_UNIT, 1, &l2);
		if (w && (!strcmp(w->value, "week") || !strcmp(w->value, "month") ||
			  !strcmp(w->value, "day") || !strcmp(w->value, "connector")))
			return 0;
		return e + len;
	}
	return plain || s1 == 1 || s2 == 1 || (s1 == 2 && s2 == 2) ? e : 0;
}

/* Are units a and b (a < b) apart by nothing but spaces and list
 * punctuation (/ , + ;), none of it inside a word?  "6-14 / 14-22",
 * "6-14, 14-22", "6-14/14-22". */
static int list_sep(const tm_title *ti, size_t a, size_t b)
{
	for (size_t t = ti->unit[a] + 1; t < ti->unit[b]; t++) {
		const tm_tok *x = &ti->tl.t[t];
		if (x->kind != TK_PUNCT || !x->ch || !strchr("/,+;", x->ch))
			return 0;
	}
	return 1;
}

/* A list of clock ranges at k, "6-14 / 14-22 / 22-6", the ranges apart
 * by list punctuation or a connector ("6-14 und 14-22").  Returns the
 * end (exclusive) of the last, or 0. */
static size_t clock_ranges(tm_title *ti, size_t k)
{
	size_t e = clock_range(ti, k, "-"), n, len;
	while (e && e < ti->nunit) {
		size_t r = e;
		if (unit_val(ti, r, "connector", &len) && len == 1)
			r++;
		if (r >= ti->nunit || !list_sep(ti, e - 1, e) ||
		    !list_sep(ti, r - 1, r) || !(n = clock_range(ti, r, "-")))
			break;
		e = n;
	}
	return e;
}

/* A shift phrase of schedule/ (value `shift` or `night`) ending at unit
 * e, starting at most SHIFT_WORD_BACK units before it: the start of the
 * longest ("su turni", not "turni"), or e. */
static size_t shift_word_before(tm_title *ti, size_t e)
{
	static const char *const vals[] = {"shift", "night"};
	size_t start = e;
	for (size_t b = e; b-- > 0 && e - b <= SHIFT_WORD_BACK;) {
		size_t len;
		if (!ukept(ti, b) || ti->prot[ti->unit[b]])
			break;
		for (size_t v = 0; v < 2; v++)
			if (match_val(ti, b, LC_SCHEDULE, vals[v], 1, &len) &&
			    b + len == e)
				start = b;
	}
	return start;
}

/* Removes the clock ranges of plain_clock_range wherever they stand in the
 * title ("Cleaner 6am-9am", "Reinigungskraft (22:00–06:00) Wien"), unless
 * nothing else would be left.  Returns 0, or -1 (memory). */
int clock_ranges_anywhere(tm_title *ti)
{
	for (size_t k = 0; k < ti->nunit; k++) {
		size_t e, b = k, len;
		if (!num_at(ti, k))
			continue;
		/* a clock word before the range: "kl. 6-9", "klo 6-9" */
		if (k > 0 && U(ti, k - 1)->kind == TK_WORD &&
		    unit_val(ti, k - 1, "hours", &len) && len == 1 &&
		    useg(ti, k - 1) == useg(ti, k))
			b = k - 1;
		if (!(e = plain_clock_range(ti, k, b < k)))
			continue;
		if (!units_free(ti, b, e) || last_word(ti, b, e))
			continue;
		/* the shift word that opens it, and the word that opens the
		 * range: "turno de 18:00 a 00:00" */
		size_t s = shift_word_before(ti, b), f0, f1;
		if (s == b && b > 0 && ukept(ti, b - 1) && !ti->prot[ti->unit[b - 1]] &&
		    (unit_val(ti, b - 1, "connector", &len) ||
		     match_val(ti, b - 1, LC_PAY, "lead", 1, &len)) && len == 1 &&
		    (s = shift_word_before(ti, b - 1)) == b - 1)
			s = b;
		seg_kept(ti, useg(ti, e - 1), &f0, &f1);
		if (s < b && e != f1) {
			seg_kept(ti, useg(ti, s), &f0, &f1);
			if (s != f0)
				s = b;
		}
		if ((s < b && remove_units(ti, s, b, NF_SCHEDULE, "shift")) ||
		    remove_units(ti, b, e, NF_HOURS, NULL))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* Shift times: clock ranges after a word that names shifts ("Schicht
 * 22-6", "Turni 6-14 / 14-22", "shifts 6-2 / 2-10"); the word says the
 * numbers are clock times, which alone ("Klasse 1-4") they need not be.
 * The phrase goes whole when it ends or opens its segment; it runs
 * before the reference codes, which would read a segment "14-22" as
 * one, and the rotations, which would read "14/14" as days. */
int pass_shifts(tm_title *ti)
{
	for (size_t k = 1; k < ti->nunit; k++) {
		size_t b, e, k0, k1;
		if (U(ti, k)->kind != TK_NUM || !ukept(ti, k) ||
		    (b = shift_word_before(ti, k)) == k || !(e = clock_ranges(ti, k)))
			continue;
		seg_kept(ti, useg(ti, b), &k0, &k1);
		size_t f0, f1;
		seg_kept(ti, useg(ti, e - 1), &f0, &f1);
		if (b != k0 && e != f1)
			continue;
		if (remove_units(ti, b, k, NF_SCHEDULE, "shift") ||
		    remove_units(ti, k, e, NF_HOURS, NULL))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* Day names: a weekday, a range of them (Mo–Fr, man–fre, de lunes a
 * sábado, mit-Tnejn sal-Ġimgħa) and the clock range after them.  Returns
 * the end (exclusive) of the day phrase at k, or 0; *range has 1 when two
 * days were found, 2 when a clock range was. */
static size_t day_phrase(tm_title *ti, size_t k, int *range)
{
	size_t len, e, c;
	*range = 0;
	if (!unit_val(ti, k, "weekday", &len))
		return 0;
	e = k + len;
	if (e < ti->nunit && (glued(ti, e - 1, e, "-/.") || U(ti, e)->sp) &&
	    unit_val(ti, e, "weekday", &len)) {
		/* Mo–Fr, pon.–pt., "de lunes" "a sábado" */
		e += len;
		*range = 1;
	} else if (unit_val(ti, e, "connector", &c) &&
		   unit_val(ti, e + c, "weekday", &len)) {
		/* Monday to Friday, ma t/m vr */
		e += c + len;
		*range = 1;
	}
	if ((c = clock_range(ti, e, "-/"))) {
		e = c;
		*range |= 2;
	}
	return e;
}

/* Is unit k a kept year, 1900-2099? */
static int year_at(tm_title *ti, size_t k)
{
	const tm_tok *t;
	const char *p;
	if (!num_at(ti, k))
		return 0;
	t = U(ti, k);
	p = ti->text + t->off;
	return t->len == 4 && ndigits(ti, t) == 4 &&
	       ((p[0] == '1' && p[1] == '9') || (p[0] == '2' && p[1] == '0'));
}

/* Months (units/, value `monthname`): a month name with its year
 * ("Julio 2027", "ab September 2027"; the year kept, or already removed
 * by the date rule), or a range of months ("May–September", "de junio a
 * septiembre", "lipiec–sierpień 2026", "Mai bis August 2027"), or a
 * month after a connector, a term's end ("till och med december": *term
 * set, for the caller to take only where it ends its segment).  A month
 * alone is a word ("May", "Mars") and no date.  Returns the end
 * (exclusive) of the phrase at k, or 0. */
static size_t month_phrase(tm_title *ti, size_t k, int *term)
{
	size_t len, e, c;
	int dated = 0;
	*term = 0;
	if (unit_val(ti, k, "connector", &c) && unit_val(ti, k + c, "monthname", &len)) {
		e = k + c + len;
		*term = 1;
		return year_at(ti, e) ? e + 1 : e;
	}
	if (!unit_val(ti, k, "monthname", &len))
		return 0;
	e = k + len;
	if (e < ti->nunit && (glued(ti, e - 1, e, "-/") || U(ti, e)->sp) &&
	    unit_val(ti, e, "monthname", &len)) {
		e += len; /* May–September, Mai/Juni */
		dated = 1;
	} else if (unit_val(ti, e, "connector", &c) &&
		   unit_val(ti, e + c, "monthname", &len)) {
		e += c + len; /* May to September, de junio a septiembre */
		dated = 1;
	}
	if (year_at(ti, e)) {
		e++;
		dated = 1;
	} else if (ti->unit[e - 1] + 1 < ti->tl.n &&
		   ti->rm[ti->unit[e - 1] + 1] == NF_DATE)
		dated = 1;
	return dated ? e : 0;
}

/* The start of the date whose month is at unit k: the day written
 * before the month ("1 augustus 2027", "1. Januar 2027"), with the one
 * word that opens the date when it opens the segment ("Per 1 augustus
 * 2027", "ab 1. Januar"): a connector or a pay lead of units/ and pay/. */
static size_t month_start(tm_title *ti, size_t k)
{
	size_t len, k0, k1;
	const tm_tok *t;
	if (k == 0 || !num_at(ti, k - 1) || useg(ti, k - 1) != useg(ti, k))
		return k;
	t = U(ti, k - 1);
	if (t->len > 2 || !tok_only(ti, t, "0123456789") || lead_value(ti, t) < 1 ||
	    lead_value(ti, t) > 31)
		return k;
	k--;
	seg_kept(ti, useg(ti, k), &k0, &k1);
	if (k == k0 + 1 && (unit_val(ti, k0, "connector", &len) ||
			    match_val(ti, k0, LC_PAY, "lead", 1, &len)) && len == 1)
		k = k0;
	return k;
}

/* A head count at k: "5 posts", "3 Stellen", "10 postes", "x2", or the
 * count of the persons a carer looks after ("2 lapsele", "за 2 деца":
 * units/, value `post` too).  Returns its end (exclusive), or 0. */
static size_t head_count(tm_title *ti, size_t k)
{
	size_t len, e;
	const tm_tok *t = U(ti, k);
	/* (not glued to a number before it: "4x4" is a vehicle, "12x36" a
	 * rota, no head count "x4") */
	if (t->kind == TK_WORD && (t->flags & TF_DIGIT) && t->flen <= 4 &&
	    tok_fold(&ti->tl, t)[0] == 'x' && ukept(ti, k) && !ti->prot[ti->unit[k]] &&
	    !(k > 0 && U(ti, k - 1)->kind == TK_NUM && glued(ti, k - 1, k, ""))) {
		for (uint32_t i = 1; i < t->flen; i++)
			if (tok_fold(&ti->tl, t)[i] < '0' || tok_fold(&ti->tl, t)[i] > '9')
				return 0;
		return k + 1;
	}
	if (!num_at(ti, k))
		return 0;
	e = k + 1;
	if (!unit_val(ti, e, "post", &len))
		return 0;
	return e + len;
}

/* Is [k, e) at an edge of its segment's kept units, or the whole of a
 * bracket? */
static int at_seg_edge(tm_title *ti, size_t k, size_t e)
{
	size_t k0, k1;
	seg_kept(ti, useg(ti, k), &k0, &k1);
	return k == k0 || e == k1;
}

/* Are units [k, e), a day, the whole of a segment's kept units, a
 * segment that is not the title's first, and the day written out: one
 * word of at least DAY_NAME_MIN bytes ("Samstag", "domingo"; "SAT",
 * "(VR)", "(Sun)" may be codes or fields)? */
static int side_segment(tm_title *ti, size_t k, size_t e)
{
	size_t k0, k1, s = useg(ti, k);
	const tm_tok *t = U(ti, k);
	seg_kept(ti, s, &k0, &k1);
	return k == k0 && e == k1 && e == k + 1 && ti->segs[s].index > 0 &&
	       t->kind == TK_WORD && t->flen >= DAY_NAME_MIN;
}

int pass_days(tm_title *ti)
{
	for (size_t k = 0; k < ti->nunit; k++) {
		size_t e;
		int range, term;
		if (!ukept(ti, k))
			continue;
		/* a shift pattern before "x8" reads as a head count */
		if (U(ti, k)->kind == TK_NUM && !ti->prot[ti->unit[k]] &&
		    (e = rotation(ti, k))) {
			if (remove_units(ti, k, e, NF_SCHEDULE, "shift"))
				return -1;
			k = e - 1;
			continue;
		}
		/* a day is a word of units/: most units are none */
		range = 0;
		e = ti->ucats[k] & (1u << LC_UNIT) ? day_phrase(ti, k, &range) : 0;
		/* one day alone is a word (Sunday school), unless it is the
		 * whole of a segment beside the occupation ("Kassierer –
		 * Samstag", "Aushilfe (Samstag)") */
		if (e && !range && side_segment(ti, k, e) && !last_word(ti, k, e)) {
			if (remove_units(ti, k, e, NF_HOURS, NULL))
				return -1;
			k = e - 1;
			continue;
		}
		if ((!e || !range) && (ti->ucats[k] & (1u << LC_UNIT))) {
			/* a short day name of another language ("po–pá",
			 * "ma–pe") counts when its hours follow (numbers:
			 * without one on the line, none follow) */
			range = 0;
			if (ti->lflags & LF_NUM) {
				ti->any_lang = 1;
				e = day_phrase(ti, k, &range);
				ti->any_lang = 0;
			}
			if (!(range & 2))
				e = 0;
		}
		if (e) {
			/* one day alone is a word (Sunday school); a range or a
			 * day with its hours, at a segment's edge, is a rota */
			if (!range || !at_seg_edge(ti, k, e) || last_word(ti, k, e))
				continue;
			/* the word that opened the range: "de lunes a sábado" */
			size_t b = k, l;
			if (k > 0 && unit_val(ti, k - 1, "connector", &l) && l == 1 &&
			    at_seg_edge(ti, k - 1, e))
				b = k - 1;
			if (remove_units(ti, b, e, NF_HOURS, NULL))
				return -1;
			k = e - 1;
		} else if ((ti->ucats[k] & (1u << LC_UNIT)) && (e = month_phrase(ti, k, &term))) {
			size_t b = month_start(ti, k), k0, k1;
			seg_kept(ti, useg(ti, k), &k0, &k1);
			/* at a segment's edge (a term: ending its segment),
			 * never the title's last words */
			if (!at_seg_edge(ti, b, e) || (term && e != k1) || last_word(ti, b, e))
				continue;
			if (remove_units(ti, b, e, NF_DATE, NULL))
				return -1;
			k = e - 1;
		} else if ((e = head_count(ti, k))) {
			if (!at_seg_edge(ti, k, e) || last_word(ti, k, e))
				continue;
			if (remove_units(ti, k, e, NF_MARKETING, "headcount"))
				return -1;
			k = e - 1;
		}
	}
	return 0;
}

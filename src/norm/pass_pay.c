/* pass_pay.c - pay, pay scales and grades, schedule numbers, days,
 * clock times and head counts. */
#include <stdlib.h>
#include <string.h>

#include "norm/pass_noise.h"

/* ---- pay ---- */

static const unsigned phrase_mask_pay = 1u << LC_SCHEDULE | 1u << LC_MARKETING;

static int time_unit(tm_title *ti, size_t k, size_t *len)
{
	const lex_entry *e = match_cat(ti, k, LC_UNIT, 1, len);
	return e && (!strcmp(e->value, "hours") || !strcmp(e->value, "week") ||
		     !strcmp(e->value, "month") || !strcmp(e->value, "year") ||
		     !strcmp(e->value, "day"));
}

/* An amount: [currency] number [k] [currency].  Returns its end unit
 * (exclusive) or 0. */
size_t noise_amount(tm_title *ti, size_t k, int *cur, int *unit)
{
	size_t len;
	if (k < ti->nunit && ukept(ti, k) && is_currency(ti, k, &len)) {
		*cur = 1;
		k += len;
	}
	if (k >= ti->nunit || U(ti, k)->kind != TK_NUM || !ukept(ti, k))
		return 0;
	k++;
	/* 2 000, 35 000: thousands set apart by a space */
	while (k < ti->nunit && U(ti, k)->kind == TK_NUM && U(ti, k)->sp &&
	       U(ti, k)->len == 3 && ndigits(ti, U(ti, k)) == 3 &&
	       U(ti, k - 1)->len <= 3 && ti->unit[k] == ti->unit[k - 1] + 1)
		k++;
	if (k < ti->nunit && ukept(ti, k) && glued(ti, k - 1, k, "") &&
	    match_val(ti, k, LC_PAY, "unit", 1, &len) && !time_unit(ti, k, &len)) {
		*unit = 1;
		k += len;
	}
	/* a currency after the number, with nothing but a space between
	 * ("£6.00-£8.00": the second "£" opens the range's other end) */
	if (k < ti->nunit && ukept(ti, k) && ti->unit[k] == ti->unit[k - 1] + 1 &&
	    is_currency(ti, k, &len)) {
		*cur = 1;
		k += len;
	}
	return k;
}

/* The start of the pay word written right before an amount at unit k,
 * in its segment, or k: a phrase of pay/ ending at k ("Day Rate £180",
 * "Net 60.000 TL", "Gehalt 2.500 €"), with the words glued to it by a
 * hyphen before it, a scheme's name ("KV-Lohn € 2.100",
 * "Brutto-Monatslohn 2.400 €").  A word naming an occupation is never
 * taken.  lead: a pay word opens the amount at k, and only the words
 * glued to it are looked for. */
static size_t pay_word_before(tm_title *ti, size_t k, int lead)
{
	size_t b, len, start = k;
	for (b = k; !lead && b-- > 0 && k - b <= PAY_WORD_BACK;) {
		if (!ukept(ti, b) || useg(ti, b) != useg(ti, k) ||
		    U(ti, b)->kind != TK_WORD)
			break;
		if (match_cat(ti, b, LC_PAY, 1, &len) && b + len == k && !plus_glued(ti, b))
			start = b; /* the longest: "Sign-on Bonus £1,000" */
	}
	if (start == k && !lead)
		return k;
	while (start > 0 && ukept(ti, start - 1) && U(ti, start - 1)->kind == TK_WORD &&
	       glued(ti, start - 1, start, "-"))
		start--;
	return head_within(ti, start, k) ? k : start;
}

/* The pay remarks joined to an amount ending at unit e, in its segment:
 * a word that adds one (units/ `with` or `connector`: "+", "plus",
 * "zzgl.", "and", "with") and a pay phrase of pay/ (value `phrase`,
 * wherever the lexicon lets it stand alone: "overtime", "Prämien",
 * "tickets restaurant"), or a pay phrase opening with such a word ("+
 * bonus"), one after another: "£18/hr + overtime + bonus", "2.500 €
 * zzgl. Prämien".  A phrase naming an occupation stops them.  Returns
 * the end of the last (exclusive), or e. */
static size_t pay_remarks(tm_title *ti, size_t e)
{
	for (;;) {
		size_t j = e, len, pl;
		if (j >= ti->nunit || !ukept(ti, j) || useg(ti, j) != useg(ti, e - 1) ||
		    !(match_val(ti, j, LC_UNIT, "with", 1, &len) ||
		      match_val(ti, j, LC_UNIT, "connector", 1, &len)))
			break;
		if (match_val(ti, j, LC_PAY, "phrase", 1, &pl) && pl > len)
			; /* "+ bonus" */
		else if (j + len < ti->nunit && useg(ti, j + len) == useg(ti, j) &&
			 match_val(ti, j + len, LC_PAY, "phrase", 1, &pl))
			pl += len;
		else
			break;
		if (head_within(ti, j, j + pl))
			break;
		e = j + pl;
	}
	return e;
}

static int clock_ranges_anywhere(tm_title *ti);

int pass_pay(tm_title *ti)
{
	size_t k, len;

	/* clock ranges first: "6.00-14.00" is no amount */
	if (clock_ranges_anywhere(ti))
		return -1;

	for (k = 0; k < ti->nunit; k++) {
		size_t j = k, e;
		int cur = 0, unit = 0;
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		while (j < ti->nunit && match_val(ti, j, LC_PAY, "lead", 1, &len) &&
		       !plus_glued(ti, j))
			j += len;
		if (!(e = noise_amount(ti, j, &cur, &unit)))
			continue;
		/* a lead that ends in the currency: "up to £18/hr" */
		for (size_t q = k; q < j && !cur; q++)
			cur = is_currency(ti, q, &len);
		/* a range: 3.200 - 4.000 €, 18 bis 22 €, 40/45k */
		if (e < ti->nunit) {
			size_t t = ti->unit[e - 1] + 1, r = e, e2;
			int c2 = 0, u2 = 0;
			if (t < ti->unit[e] && ti->tl.t[t].kind == TK_PUNCT &&
			    (ti->tl.t[t].ch == '-' || ti->tl.t[t].ch == '/') &&
			    t + 1 == ti->unit[e])
				r = e;
			else if (match_val(ti, e, LC_PAY, "lead", 1, &len) ||
				 (match_val(ti, e, LC_UNIT, "connector", 1, &len)))
				r = e + len;
			else
				r = SIZE_MAX;
			if (r != SIZE_MAX && (e2 = noise_amount(ti, r, &c2, &u2))) {
				e = e2;
				cur |= c2;
				unit |= u2;
			}
		}
		/* trailing units: brutto, p.a., /h, pro Monat; in the amount's
		 * segment ("2719 chf: HR-partner" keeps "HR") */
		for (;;) {
			if (e >= ti->nunit || !ukept(ti, e) || useg(ti, e) != useg(ti, e - 1))
				break;
			if (match_val(ti, e, LC_PAY, "unit", 1, &len)) {
				size_t l2;
				if (!time_unit(ti, e, &l2) || l2 < len)
					unit = 1;
				e += len;
			} else if ((cur || unit) && time_unit(ti, e, &len))
				e += len;
			else if (is_currency(ti, e, &len)) {
				cur = 1;
				e += len;
			} else if ((cur || unit) &&
				   match_val(ti, e, LC_UNIT, "connector", 1, &len) &&
				   e + len < ti->nunit && time_unit(ti, e + len, &len))
				e += 1 + len;
			else
				break;
		}
		if (!cur && !unit)
			continue;
		e = pay_remarks(ti, e);
		/* a longer phrase wins: auf 520-Euro-Basis is a schedule */
		{
			size_t pl;
			const lex_entry *ph = match_mask(ti, j, phrase_mask_pay, 1, &pl);
			if (ph && j + pl >= e)
				continue;
		}
		if (remove_units(ti, pay_word_before(ti, k, j > k), e, NF_PAY, NULL))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* ---- pay scales and grades: Band 6, E 9a TVöD, 10. platová třída ---- */

/* Is the fold of unit k a roman numeral of up to six letters (i v x l)? */
static int roman_unit(tm_title *ti, size_t k)
{
	uint32_t n;
	const char *f = ufold(ti, k, &n);
	if (U(ti, k)->kind != TK_WORD || n == 0 || n > 6)
		return 0;
	for (uint32_t i = 0; i < n; i++)
		if (!strchr("ivxl", f[i]))
			return 0;
	return 1;
}

/* A grade code at unit k: a number (10, 1,523), a short word with a digit
 * (8a, A2, SO1, 3S), a roman numeral (XII) or one letter or a short
 * capitalised abbreviation (B, Γ, OF). */
static int grade_code(tm_title *ti, size_t k)
{
	const tm_tok *t;
	if (k >= ti->nunit || !ukept(ti, k) || ti->prot[ti->unit[k]])
		return 0;
	t = U(ti, k);
	if (t->kind == TK_NUM)
		return 1;
	if (t->kind != TK_WORD)
		return 0;
	if (t->flags & TF_DIGIT)
		return t->flen <= 4;
	if (roman_unit(ti, k))
		return 1;
	/* one letter (a byte, or a two-byte letter: Γ) */
	if (t->len == 1 || (t->len == 2 && (t->flags & TF_NONASCII)))
		return 1;
	/* capitals tell a code from a word only in a line not all in
	 * capitals: "CHEF DE RANG" holds no grade RANG */
	return (t->flags & TF_ALLCAPS) && t->len <= 4 && !ti->caps;
}

/* A pay-scale word at unit k (pay "lead", "Besoldungsgruppe", "schaal";
 * an edge lead only at the segment's first kept unit k0): its length in
 * units, or 0. */
static inline size_t grade_word(tm_title *ti, size_t k, size_t k0)
{
	size_t len;
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << LC_PAY)))
		return 0; /* most units: no pay phrase starts there */
	const lex_entry *e = match_val(ti, k, LC_PAY, "lead", 1, &len);
	const tm_tok *t = U(ti, k);
	if (!e || (e->where == LW_EDGE && k != k0))
		return 0;
	/* a short word leads an amount ("de 30 a 40 €", "bis 22 €"); as a
	 * grade word it is written in capitals: E 12, VG 5, GS-11 */
	if (len == 1 && t->kind == TK_WORD && t->flen <= 3 &&
	    (!(t->flags & TF_ALLCAPS) || ti->caps) && !(t->len == 1 && (t->flags & TF_CAP)))
		return 0;
	return len;
}

/* The name of a collective agreement after a grade: a pay phrase (TVöD,
 * TV-L) or a capitalised abbreviation (CCNL, CAO, BBesO) with what follows
 * it to the segment's end, at most GRADE_TAIL_MAX units in all.  Returns
 * the end (exclusive), k when there is none. */
static size_t grade_tail(tm_title *ti, size_t k, size_t k1, int link)
{
	size_t len;
	const tm_tok *t;
	if (k >= k1)
		return k;
	if (match_val(ti, k, LC_PAY, "phrase", 1, &len) && k + len <= k1)
		return k + len == k1 || k1 - k <= GRADE_TAIL_MAX ? k1 : k + len;
	t = U(ti, k);
	/* a short linking word before the name: "nível 15 da TRU" (one, so
	 * that the look-ahead stays bounded) */
	if (link && k + 1 < k1 && t->kind == TK_WORD && !(t->flags & TF_CAP) &&
	    t->len <= 3 && grade_tail(ti, k + 1, k1, 0) == k1 && units_free(ti, k, k1))
		return k1;
	if (t->kind == TK_WORD && (t->flags & TF_CAP) &&
	    (t->flags & (TF_ALLCAPS | TF_CAPSUF | TF_DIGIT) || t->len <= 6) &&
	    k1 - k <= GRADE_TAIL_MAX && units_free(ti, k, k1)) {
		/* only a capitalised abbreviation opens a name of several words */
		if (k + 1 == k1 || (t->flags & TF_ALLCAPS))
			return k1;
	}
	return k;
}

/* Does unit k hold a word of a grade segment: a pay word, a grade code
 * or a seniority word ("III младши ранг")?  Its length in units, or 0. */
static size_t grade_part(tm_title *ti, size_t k, size_t k0)
{
	size_t len;
	const lex_entry *e;
	if ((len = grade_word(ti, k, k0)))
		return len;
	/* a pay phrase before a code of its first word: "CCNL
	 * Metalmeccanici 5° livello" is a phrase, then a grade */
	e = match_mask(ti, k, 1u << LC_PAY | 1u << LC_SENIORITY, 1, &len);
	if (e && (e->cat == LC_SENIORITY || !strcmp(e->value, "phrase")))
		return len;
	if (grade_code(ti, k))
		return 1;
	/* an ordinal sign glued to a number: 5° livello */
	if (k > k0 && U(ti, k)->kind == TK_SYM && U(ti, k - 1)->kind == TK_NUM &&
	    glued(ti, k - 1, k, ""))
		return 1;
	return 0;
}

/* A grade ends its segment: [code] grade-word code [code…] [agreement]
 * ("Band 8a", "E 9a TVöD", "SO1 Scale 6", "10. platová třída", "platová
 * trieda 7"), or a later segment is made of pay words, codes and seniority
 * words alone with one pay-scale word among them ("grupa zaszeregowania
 * XII", "III младши ранг", "LC-schaal").  A grade is never the whole
 * title, so "Band 6" alone stays. */
static int grade_segment(tm_title *ti, size_t s)
{
	size_t k0, k1, k, len, start = SIZE_MAX;
	int words = 0, codes = 0;
	const tm_seg *g = &ti->segs[s];

	seg_kept(ti, s, &k0, &k1);
	if (k0 >= k1)
		return 0;
	/* the whole segment (or the head going on after a bracket); the
	 * first segment only when it is all grade, with no agreement name
	 * that could be the occupation ("Vergütungsgruppe 9: Bäcker") */
	int first = !g->bracket && g->index == 0 && !g->resumed;
	if (!first || ti->nseg > 1) {
		for (k = k0; k < k1; k += len) {
			size_t w = grade_word(ti, k, k0);
			if (!(len = grade_part(ti, k, k0))) {
				size_t e = words && !first ? grade_tail(ti, k, k1, 1) : k;
				/* the name after an abbreviation: "CCNL Commercio" */
				if (words && !first && k > k0 && (U(ti, k - 1)->flags & TF_ALLCAPS) &&
				    k1 - k <= GRADE_TAIL_MAX && units_free(ti, k, k1))
					e = k1;
				if (e == k1)
					break;
				words = 0;
				break;
			}
			/* a pay phrase that opens with a grade word: "livello CCNL" */
			words |= w > 0 || match_val(ti, k, LC_PAY, "lead", 1, &w);
			codes += !w && grade_code(ti, k);
		}
		/* a first segment holds a code too: "PA" is a word, not the
		 * Irish grade word "pá" */
		if (words && (!first || codes) && !last_word(ti, k0, k1))
			return remove_units(ti, k0, k1, NF_PAY, "grade");
		if (!first)
			return 0;
	}
	/* a grade at the head segment's end: look for its grade word */
	for (k = k0 + 1; k < k1; k++) {
		size_t e;
		if (!(len = grade_word(ti, k, k0)) || !grade_code(ti, k + len))
			continue;
		e = k + len + 1;
		while (e < k1 && grade_code(ti, e))
			e++;
		e = grade_tail(ti, e, k1, 1);
		if (e != k1)
			continue;
		start = k;
		/* a code before it: "SO1 Scale 6" */
		if (start > k0 + 1 && grade_code(ti, start - 1) &&
		    U(ti, start - 1)->kind != TK_NUM)
			start--;
		break;
	}
	if (start == SIZE_MAX || !units_free(ti, start, k1))
		return 0;
	return remove_units(ti, start, k1, NF_PAY, "grade");
}

int pass_grade(tm_title *ti)
{
	for (size_t s = 0; s < ti->nseg; s++)
		if (grade_segment(ti, s))
			return -1;
	return 0;
}

/* ---- schedule numbers: 20 h/Woche, 30-35 Std., 80-100 % ---- */

/* The digits of a fold from byte i to its end, as a number (at most
 * two digits), else -1. */
static int small_digits(const char *f, uint32_t i, uint32_t n)
{
	int v = 0;
	if (i >= n || n - i > 2)
		return -1;
	for (; i < n; i++) {
		if (f[i] < '0' || f[i] > '9')
			return -1;
		v = v * 10 + (f[i] - '0');
	}
	return v;
}

/* Does a workload or share-of-a-post word stand at unit k? */
static int post_share(tm_title *ti, size_t k)
{
	size_t len;
	return k < ti->nunit && (match_val(ti, k, LC_UNIT, "fte", 1, &len) ||
				 match_val(ti, k, LC_UNIT, "workload", 1, &len));
}

/* A shift pattern at unit k: shifts times hours ("3x8", "2x8h",
 * "3 × 8", "2x12": the hours ROTA_HOURS_MIN to ROTA_HOURS_MAX or 24, so
 * that "4x4" stays a vehicle) or days on and off ("4/4", "2/2", "14/14",
 * "7/7": two days at least, at most ROTA_DAYS_MAX each, not before a
 * share of a post ("1/2 etatu"), only beside the occupation's
 * segment, in a bracket or after a schedule word, a time unit after it
 * taken too: "turnusy 2/2 týždne").  Returns its end (exclusive) or 0. */
static size_t rotation_(tm_title *ti, size_t k)
{
	size_t j = k + 1, e = 0, len;
	uint32_t n;
	const char *f;
	unsigned a = lead_value(ti, U(ti, k)), b;

	if (U(ti, k)->len > 2 || a == 0 || j >= ti->nunit || !ukept(ti, j))
		return 0;
	f = ufold(ti, j, &n);
	if (U(ti, j)->kind == TK_WORD && glued(ti, k, j, "") && n >= 2 && f[0] == 'x') {
		/* 3x8, 2x8h */
		int v = small_digits(f, 1, n);
		if (v < 0 && n >= 3 && f[n - 1] == 'h')
			v = small_digits(f, 1, n - 1);
		if (v < 0)
			return 0;
		b = (unsigned)v;
		e = j + 1;
	} else if (U(ti, j)->kind == TK_NUM && U(ti, j)->len <= 2 &&
		   ti->unit[j] == ti->unit[k] + 2) {
		const tm_tok *m = &ti->tl.t[ti->unit[k] + 1];
		const char *mt = ti->text + m->off;
		b = lead_value(ti, U(ti, j));
		if (m->kind == TK_PUNCT && m->len == 2 && !memcmp(mt, "\xc3\x97", 2) &&
		    !m->sp && !U(ti, j)->sp) {
			e = j + 1; /* 3×8 */
		} else if (m->kind == TK_PUNCT && m->ch == '/' && !m->sp && !U(ti, j)->sp) {
			/* days on and off */
			const tm_seg *g = &ti->segs[useg(ti, k)];
			/* not a share of a post: "1/2 etatu", "3/4 Stelle" */
			if (post_share(ti, j + 1))
				return 0;
			if (a < 2 || b < 2 || a > ROTA_DAYS_MAX || b > ROTA_DAYS_MAX ||
			    !(g->bracket || g->index > 0 ||
			      (k > 0 && ukept(ti, k - 1) &&
			       match_cat(ti, k - 1, LC_SCHEDULE, 1, &len))))
				return 0;
			e = j + 1;
			if (e < ti->nunit && time_unit(ti, e, &len))
				e += len;
			return e;
		} else
			return 0;
	} else if (j + 1 < ti->nunit && U(ti, j)->kind == TK_WORD && n == 1 && f[0] == 'x' &&
		   U(ti, j + 1)->kind == TK_NUM && U(ti, j + 1)->len <= 2) {
		b = lead_value(ti, U(ti, j + 1)); /* 3 x 8 */
		e = j + 2;
	} else
		return 0;
	if (a > ROTA_SHIFTS_MAX || !((b >= ROTA_HOURS_MIN && b <= ROTA_HOURS_MAX) || b == 24))
		return 0;
	if (e < ti->nunit && ukept(ti, e) && time_unit(ti, e, &len) && glued(ti, e - 1, e, ""))
		e += len; /* 3x8 h */
	return e;
}

/* rotation_, unless a longer phrase of the lexicons starts there:
 * "3/4 etatu" is a share of a post. */
static size_t rotation(tm_title *ti, size_t k)
{
	size_t e = rotation_(ti, k), len;
	if (e && match_cat(ti, k, LC_SCHEDULE, 1, &len) && k + len > e)
		return 0;
	return e;
}

/* Does the number at unit k end a seniority or pay phrase that starts
 * at most PAY_WORD_BACK units before it ("Level 3"), or follow a grade
 * word ("Band 5", "Stufe 2")? */
static int ends_grade_phrase(tm_title *ti, size_t k)
{
	size_t k0, k1;
	seg_kept(ti, useg(ti, k), &k0, &k1);
	if (k > k0 && ukept(ti, k - 1) && grade_word(ti, k - 1, k0) == 1)
		return 1;
	for (size_t b = k; b-- > 0 && k - b <= PAY_WORD_BACK;) {
		size_t len;
		if (!ukept(ti, b) || useg(ti, b) != useg(ti, k))
			break;
		if (match_mask(ti, b, 1u << LC_SENIORITY | 1u << LC_PAY, 1, &len) &&
		    b + len == k + 1)
			return 1;
	}
	return 0;
}

int pass_schedule(tm_title *ti)
{
	size_t k, len;

	for (k = 0; k < ti->nunit; k++) {
		size_t j, e;
		const lex_entry *u;
		if (U(ti, k)->kind != TK_NUM || !ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		/* a star rating, "5* Hotel", "4*-Hotel": one digit and a star
		 * glued to it (the lexicon cannot hold it: a star inside a
		 * phrase is ignored, and "5*" would match every 5) */
		if (U(ti, k)->len == 1 && lead_value(ti, U(ti, k)) >= 1 &&
		    lead_value(ti, U(ti, k)) <= 5 && tok_is(ti, ti->unit[k] + 1, '*') &&
		    !ti->tl.t[ti->unit[k] + 1].sp) {
			if (remove_toks(ti, ti->unit[k], ti->unit[k] + 1, NF_MARKETING, NULL))
				return -1;
			continue;
		}
		if ((e = rotation(ti, k))) {
			if (remove_units(ti, k, e, NF_SCHEDULE, "shift"))
				return -1;
			k = e - 1;
			continue;
		}
		j = k + 1;
		/* range; across a dash with spaces (a segment separator) not
		 * from the number that ends a level or grade phrase: "Level 3
		 * - 32.5 hrs/week" */
		if (j + 1 < ti->nunit && U(ti, j)->kind == TK_NUM &&
		    ti->unit[j] == ti->unit[k] + 2 &&
		    tok_is(ti, ti->unit[k] + 1, '-') &&
		    !((ti->tl.t[ti->unit[k] + 1].sp || U(ti, j)->sp) && ends_grade_phrase(ti, k)))
			j++;
		else if (j + 1 < ti->nunit &&
			 (match_val(ti, j, LC_UNIT, "connector", 1, &len) ||
			  match_val(ti, j, LC_PAY, "lead", 1, &len)) &&
			 j + len < ti->nunit && U(ti, j + len)->kind == TK_NUM)
			j += len + 1;
		/* the sign written first, as Turkish does: %100, %50-80 */
		if (k > 0 && U(ti, k - 1)->kind == TK_SYM && U(ti, k - 1)->ch == '%' &&
		    ukept(ti, k - 1) && glued(ti, k - 1, k, "") &&
		    !(j < ti->nunit && U(ti, j)->kind == TK_SYM && U(ti, j)->ch == '%')) {
			e = k + 1;
			if (e < ti->nunit && U(ti, e)->kind == TK_NUM && ukept(ti, e) &&
			    ti->unit[e] == ti->unit[k] + 2 && tok_is(ti, ti->unit[k] + 1, '-'))
				e++;
			if (remove_units(ti, k - 1, e, NF_WORKLOAD, NULL))
				return -1;
			k = e - 1;
			continue;
		}
		if (j < ti->nunit && U(ti, j)->kind == TK_SYM && U(ti, j)->ch == '%') {
			size_t b = k, l2;
			if (k > 0 && ukept(ti, k - 1) &&
			    match_val(ti, k - 1, LC_UNIT, "workload", 1, &l2) && l2 == 1)
				b = k - 1;
			if (remove_units(ti, b, j + 1, NF_WORKLOAD, NULL))
				return -1;
			k = j;
			continue;
		}
		if (j >= ti->nunit || !(u = match_cat(ti, j, LC_UNIT, 1, &len)))
			continue;
		if (!strcmp(u->value, "week")) {
			/* 20 Wochenstunden */
			e = j + len;
		} else if (!strcmp(u->value, "fte")) {
			if (remove_units(ti, k, j + len, NF_WORKLOAD, NULL))
				return -1;
			k = j + len - 1;
			continue;
		} else if (!strcmp(u->value, "month") || !strcmp(u->value, "year")) {
			/* a duration in a later segment: CDD 6 mois, 6 months */
			const tm_seg *g = &ti->segs[useg(ti, k)];
			if (!g->bracket && g->index == 0)
				continue;
			if (remove_units(ti, k, j + len, NF_SCHEDULE, "temporary"))
				return -1;
			k = j + len - 1;
			continue;
		} else if (!strcmp(u->value, "hours")) {
			e = j + len;
			size_t l2;
			const lex_entry *w;
			if (e < ti->nunit && match_val(ti, e, LC_UNIT, "connector", 1, &l2))
				e += l2;
			else if (e < ti->nunit && (match_val(ti, e, LC_PAY, "unit", 1, &l2)))
				e += 0;
			w = e < ti->nunit ? match_cat(ti, e, LC_UNIT, 1, &l2) : NULL;
			if (w && (!strcmp(w->value, "week") || !strcmp(w->value, "month") ||
				  !strcmp(w->value, "day")))
				e += l2;
			else {
				const tm_seg *g = &ti->segs[useg(ti, k)];
				/* a range by both its ends: 24-32 uur */
				int range = j > k + 1;
				unsigned hv = lead_value(ti, U(ti, k));
				unsigned hi = range ? lead_value(ti, U(ti, j - 1)) : hv;
				e = j + len;
				/* 35h, 32 uur, 38 Stunden, 24-32 uur are weekly
				 * hours wherever they stand (not 24h alone, a kind
				 * of care); a spaced "h" only in a slot */
				if (!g->bracket && g->index == 0 &&
				    !((glued(ti, j - 1, j, "") || U(ti, j)->flen >= 3) &&
				      hv >= 5 && hv <= 48 && hi >= hv && hi <= 48 &&
				      (range || hv != 24)))
					continue;
			}
		} else
			continue;
		/* a week or day word before the number: heti 40 óra,
		 * haftada 45 saat, günde 4 saat */
		size_t b = k, l2;
		const lex_entry *w;
		if (k > 0 && ukept(ti, k - 1) && !ti->prot[ti->unit[k - 1]] &&
		    ti->unit[k - 1] + 1 == ti->unit[k] &&
		    (w = match_cat(ti, k - 1, LC_UNIT, 1, &l2)) && l2 == 1 &&
		    (!strcmp(w->value, "week") || !strcmp(w->value, "day")))
			b = k - 1;
		if (remove_units(ti, b, e, NF_HOURS, NULL))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* ---- days, clock times and head counts: Mo–Fr 7–15 Uhr, (5 posts) ---- */

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
static int clock_ranges_anywhere(tm_title *ti)
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

/* A head count at k: "5 posts", "3 Stellen", "10 postes", "x2".  Returns
 * its end (exclusive), or 0. */
static size_t head_count(tm_title *ti, size_t k)
{
	size_t len, e;
	const tm_tok *t = U(ti, k);
	if (t->kind == TK_WORD && (t->flags & TF_DIGIT) && t->flen <= 4 &&
	    tok_fold(&ti->tl, t)[0] == 'x' && ukept(ti, k) && !ti->prot[ti->unit[k]]) {
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

int pass_days(tm_title *ti)
{
	for (size_t k = 0; k < ti->nunit; k++) {
		size_t e;
		int range;
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

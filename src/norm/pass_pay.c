/* pass_pay.c - pay, pay scales and grades, schedule numbers (days,
 * clock times and head counts: pass_days.c). */
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
/* Between units a (a number) and b: only ",-" glued to the number, the
 * mark of a whole amount ("38.000,- Kč", "5000,-")? */
static int whole_mark(tm_title *ti, size_t a, size_t b)
{
	uint32_t t = ti->unit[a] + 1;
	return U(ti, a)->kind == TK_NUM && ti->unit[b] == t + 2 &&
	       tok_is(ti, t, ',') && tok_is(ti, t + 1, '-') && !ti->tl.t[t].sp &&
	       !ti->tl.t[t + 1].sp;
}

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
	 * ("£6.00-£8.00": the second "£" opens the range's other end), or
	 * the mark of a whole amount glued to the number ("38.000,- Kč") */
	if (k < ti->nunit && ukept(ti, k) &&
	    (ti->unit[k] == ti->unit[k - 1] + 1 || whole_mark(ti, k - 1, k)) &&
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

/* A pay remark at unit k in segment s: pay phrases (pay/, value
 * `phrase`: "overtime", "Prämien", "car allowance") with schedule
 * phrases before or between them ("sleep-in allowance", "shift
 * allowance", "night enhancements"), ending in a pay phrase.  Returns
 * its length, or 0. */
static size_t remark_after(tm_title *ti, size_t k, uint32_t s)
{
	size_t p = k, last = k, len;
	while (p < ti->nunit && ukept(ti, p) && useg(ti, p) == s) {
		if (match_val(ti, p, LC_PAY, "phrase", 1, &len))
			last = p += len;
		else if (match_cat(ti, p, LC_SCHEDULE, 1, &len))
			p += len;
		else
			break;
	}
	return last - k;
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
		else if (!(pl = remark_after(ti, j + len, useg(ti, j))))
			break;
		else
			pl += len;
		if (head_within(ti, j, j + pl))
			break;
		e = j + pl;
	}
	return e;
}

/* Are units e - 1 and e set apart by one "/" and nothing else but the
 * dot of an abbreviation before it ("kr./t.") (spaces
 * allowed: "18 € / Std.", where the spaced slash also ends a segment)? */
static int slash_between(const tm_title *ti, size_t e)
{
	uint32_t t = ti->unit[e - 1] + 1;
	if (ti->unit[e] == t + 2 && tok_is(ti, t, '.') && !ti->tl.t[t].sp)
		t++; /* the dot of an abbreviation first: "kr./t." */
	return ti->unit[e] == t + 1 && tok_is(ti, t, '/');
}

/* The unit of an amount written after a slash, at unit e: a pay unit or a
 * time unit that ends its segment ("18 € / Std.", "£12 / hr", "30 zł /
 * godz."), or one letter glued to the slash after a currency ("€14/u",
 * "150 kr/t": the slash says "per").  Returns its length, or 0. */
static size_t slash_unit(tm_title *ti, size_t e, int cur)
{
	size_t len, k0, k1;
	const tm_tok *x = U(ti, e);
	if (!slash_between(ti, e) || x->kind != TK_WORD)
		return 0;
	if (useg(ti, e) == useg(ti, e - 1) && cur && x->flen == 1 &&
	    glued(ti, e - 1, e, "./")) /* kr/t, kr./t. */
		return 1;
	if (!match_val(ti, e, LC_PAY, "unit", 1, &len) && !time_unit(ti, e, &len))
		return 0;
	if (useg(ti, e) == useg(ti, e - 1))
		return len;
	/* across the slash, the units and remarks are all of their segment */
	seg_kept(ti, useg(ti, e), &k0, &k1);
	if (k0 != e)
		return 0;
	for (size_t p = e + len, l2;; p += l2) {
		if (p < k1 && (match_val(ti, p, LC_PAY, "unit", 1, &l2) ||
			       time_unit(ti, p, &l2) || is_currency(ti, p, &l2)))
			continue;
		return p == k1 || pay_remarks(ti, p) == k1 ? len : 0;
	}
}

/* The pay at unit k: leads, an amount or a range, its units, currencies
 * and remarks.  Sets [*b, *e) to remove and *amount_cur when a currency
 * stands in the amount itself (not only in a lead); returns 1 when there
 * is pay to remove, else 0. */
static int pay_at(tm_title *ti, size_t k, size_t *b, size_t *end, int *amount_cur)
{
	size_t j = k, e, len;
	int cur = 0, unit = 0;
	while (j < ti->nunit && match_val(ti, j, LC_PAY, "lead", 1, &len) &&
	       !plus_glued(ti, j))
		j += len;
	if (!(e = noise_amount(ti, j, &cur, &unit)))
		return 0;
	*amount_cur = cur;
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
			*amount_cur |= c2;
			cur |= c2;
			unit |= u2;
		}
	}
	/* trailing units: brutto, p.a., /h, pro Monat; in the amount's
	 * segment ("2719 chf: HR-partner" keeps "HR"), or after a slash */
	for (;;) {
		if (e >= ti->nunit || !ukept(ti, e))
			break;
		if ((cur || unit) && (len = slash_unit(ti, e, cur))) {
			unit = 1;
			e += len;
			continue;
		}
		if (useg(ti, e) != useg(ti, e - 1))
			break;
		if (match_val(ti, e, LC_PAY, "unit", 1, &len)) {
			size_t l2;
			if (!time_unit(ti, e, &l2) || l2 < len)
				unit = 1;
			e += len;
		} else if ((cur || unit) && time_unit(ti, e, &len))
			e += len;
		else if (is_currency(ti, e, &len)) {
			*amount_cur = cur = 1;
			e += len;
		} else if ((cur || unit) &&
			   match_val(ti, e, LC_UNIT, "connector", 1, &len) &&
			   e + len < ti->nunit && time_unit(ti, e + len, &len))
			e += 1 + len;
		else
			break;
	}
	if (!cur && !unit)
		return 0;
	e = pay_remarks(ti, e);
	/* a longer phrase wins: auf 520-Euro-Basis is a schedule */
	{
		size_t pl;
		const lex_entry *ph = match_mask(ti, j, phrase_mask_pay, 1, &pl);
		if (ph && j + pl >= e)
			return 0;
	}
	*b = pay_word_before(ti, k, j > k);
	*end = e;
	return 1;
}

size_t plus_remark(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0 + 1; k + 1 < k1; k++) {
		const tm_tok *x = U(ti, k);
		size_t len;
		if (x->kind != TK_SYM || x->ch != '+' || !ukept(ti, k) ||
		    glued(ti, k - 1, k, ""))
			continue;
		if ((len = remark_after(ti, k + 1, useg(ti, k))) && k + 1 + len == k1 &&
		    !head_within(ti, k + 1, k1))
			return k;
	}
	return k1;
}

/* The language of the first currency of units [k0, k1) that names one
 * ("PLN", "zł", "Kč", "Ft"; not "€" nor "£"), or NULL. */
static const char *currency_lang(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++) {
		size_t len;
		const lex_entry *c = match_val(ti, k, LC_PAY, "currency", 1, &len);
		if (c && c->lang[0])
			return c->lang;
	}
	return NULL;
}

/* The pay at unit k read in the language its currency names, whatever
 * the hint: a lead of that language before the amount goes with it
 * ("Magazynier DO 13 500 PLN", "od 3000 do 4000 zł" with no hint or
 * another one).  The lead and the amount stand in one segment. */
static int pay_in_currency_lang(tm_title *ti, size_t k, size_t *b, size_t *e)
{
	const char *hint = ti->lang, *lang;
	char cl[sizeof ((lex_entry *)0)->lang];
	int acur = 0, found;

	ti->any_lang = 1;
	found = pay_at(ti, k, b, e, &acur);
	ti->any_lang = 0;
	if (!found || !acur || !(lang = currency_lang(ti, k, *e)) ||
	    (hint && !strcmp(hint, lang)))
		return 0;
	memcpy(cl, lang, sizeof cl);
	ti->lang = cl;
	found = pay_at(ti, k, b, e, &acur) && acur && useg(ti, k) == useg(ti, *e - 1);
	ti->lang = hint;
	return found;
}

int pass_pay(tm_title *ti)
{
	/* clock ranges first: "6.00-14.00" is no amount */
	if (clock_ranges_anywhere(ti))
		return -1;

	for (size_t k = 0; k < ti->nunit; k++) {
		size_t b, e;
		int acur = 0, found;
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		found = pay_at(ti, k, &b, &e, &acur);
		/* a lead of another language than the hint's, or with no
		 * hint, counts before an amount with its currency: the
		 * currency names the region ("Magazynier DO 13 500 PLN",
		 * "od 3000 do 4000 zł") */
		if (!found && !ti->any_lang && (ti->ucats[k] & (1u << LC_PAY)))
			found = pay_in_currency_lang(ti, k, &b, &e);
		if (!found)
			continue;
		if (remove_units(ti, b, e, NF_PAY, NULL))
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
		/* a first segment holds a code too, and so does a segment
		 * of one word in capitals: "PA" is a word (a personal
		 * assistant), not the Irish grade word "pá" */
		if (words && (!first || codes) &&
		    (codes || k1 - k0 > 1 || !(U(ti, k0)->flags & TF_ALLCAPS)) &&
		    !last_word(ti, k0, k1))
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

/* Is unit k a share of one post written as a fraction: "0,6", "0.75",
 * "1,0", "1"? */
static int post_fraction(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	const char *p = ti->text + t->off;
	if (t->len == 1)
		return p[0] == '1';
	return t->len >= 3 && t->len <= 4 && (p[0] == '0' || p[0] == '1') &&
	       (p[1] == ',' || p[1] == '.') && (p[0] == '0' || p[2] == '0');
}

/* Is unit k, where a rota starts, beside the occupation's segment, in a
 * bracket or right after a schedule word? */
static int rota_context(tm_title *ti, size_t k)
{
	size_t len;
	const tm_seg *g = &ti->segs[useg(ti, k)];
	return g->bracket || g->index > 0 ||
	       (k > 0 && ukept(ti, k - 1) && match_cat(ti, k - 1, LC_SCHEDULE, 1, &len));
}

/* Work and rest written a x b, the scales of Brazilian postings: hours
 * on and off ("12x36", "24x48": 12 or 24 hours, then a multiple of 12
 * up to ROTA_REST_MAX) or days on and off in a week ("6x1", "5x2",
 * "4x3"; not "4x4", a vehicle). */
static int work_rest(unsigned a, unsigned b)
{
	if ((a == 12 || a == 24) && b >= a && b <= ROTA_REST_MAX && b % 12 == 0)
		return 1;
	return a >= 4 && a + b == 7;
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
			/* not a share of a post: "1/2 etatu", "3/4 Stelle" */
			if (post_share(ti, j + 1))
				return 0;
			if (a < 2 || b < 2 || a > ROTA_DAYS_MAX || b > ROTA_DAYS_MAX ||
			    !rota_context(ti, k))
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
	if (a > ROTA_SHIFTS_MAX || !((b >= ROTA_HOURS_MIN && b <= ROTA_HOURS_MAX) || b == 24)) {
		/* "plantão noturno 12x36", "(escala 6x1)" */
		if (!work_rest(a, b) || !rota_context(ti, k))
			return 0;
	}
	if (e < ti->nunit && ukept(ti, e) && time_unit(ti, e, &len) && glued(ti, e - 1, e, ""))
		e += len; /* 3x8 h */
	return e;
}

/* rotation_, unless a longer phrase of the lexicons starts there:
 * "3/4 etatu" is a share of a post. */
size_t rotation(tm_title *ti, size_t k)
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

/* Does a schedule phrase that starts at unit k or at most
 * SCHEDULE_COUNT_BACK units before it, in its segment, hold it ("1 in 3
 * weekends", "4 days a week")? */
static int inside_phrase(tm_title *ti, size_t k)
{
	size_t len;
	for (size_t b = k + 1; b-- > 0 && k - b <= SCHEDULE_COUNT_BACK;) {
		if (useg(ti, b) != useg(ti, k))
			break;
		if (match_cat(ti, b, LC_SCHEDULE, 1, &len) && b + len > k)
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
		/* a count of days before a schedule phrase, or of weeks
		 * before a perk, beside the occupation: "hybrydowo 2 dni w
		 * biurze", "4 týdny dovolené" */
		if (U(ti, k)->len == 1 && lead_value(ti, U(ti, k)) >= 1 &&
		    lead_value(ti, U(ti, k)) <= SCHEDULE_COUNT_MAX && k + 1 < ti->nunit &&
		    ukept(ti, k + 1) && useg(ti, k + 1) == useg(ti, k) &&
		    U(ti, k + 1)->sp && ti->unit[k + 1] == ti->unit[k] + 1 &&
		    (ti->segs[useg(ti, k)].bracket || ti->segs[useg(ti, k)].index > 0) &&
		    (match_cat(ti, k + 1, LC_SCHEDULE, 1, &len) ||
		     match_cat(ti, k + 1, LC_MARKETING, 1, &len)) && !inside_phrase(ti, k)) {
			if (remove_units(ti, k, k + 1, NF_SCHEDULE, NULL))
				return -1;
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
		/* the share of a post after its word, no sign: "úvazek 0,6" */
		if (k > 0 && ukept(ti, k - 1) && useg(ti, k - 1) == useg(ti, k) &&
		    match_val(ti, k - 1, LC_UNIT, "workload", 1, &len) && len == 1 &&
		    post_fraction(ti, k)) {
			if (remove_units(ti, k - 1, k + 1, NF_WORKLOAD, NULL))
				return -1;
			continue;
		}
		if (j < ti->nunit && U(ti, j)->kind == TK_SYM && U(ti, j)->ch == '%') {
			size_t b = k, l2;
			if (k > 0 && ukept(ti, k - 1) &&
			    match_val(ti, k - 1, LC_UNIT, "workload", 1, &l2) && l2 == 1)
				b = k - 1;
			/* or after it, ending the segment: "80 % työaika" */
			else if (j + 1 < ti->nunit && ukept(ti, j + 1) &&
				 useg(ti, j + 1) == useg(ti, k) &&
				 match_val(ti, j + 1, LC_UNIT, "workload", 1, &l2) &&
				 (j + 1 + l2 == ti->nunit || useg(ti, j + 1 + l2) != useg(ti, k)))
				j += l2;
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

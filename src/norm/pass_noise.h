/* pass_noise.h - what the noise rules share, included by their four
 * files only: pass_contact.c (contact data, reference codes and dates),
 * pass_pay.c (pay, grades, schedule numbers), pass_days.c (days, clock
 * times, head counts) and pass_noise.c (hashtags and the edge phrases). */
#ifndef TM_PASS_NOISE_H
#define TM_PASS_NOISE_H

#include <stddef.h>
#include <string.h>

#include "norm/pass.h"

static inline int tok_is(const tm_title *ti, size_t t, char ch)
{
	return t < ti->tl.n && ti->tl.t[t].kind != TK_WORD &&
	       ti->tl.t[t].kind != TK_NUM && ti->tl.t[t].ch == ch;
}

static inline size_t ndigits(const tm_title *ti, const tm_tok *t)
{
	size_t d = 0;
	const char *p = ti->text + t->off;
	for (uint32_t i = 0; i < t->len; i++)
		d += p[i] >= '0' && p[i] <= '9';
	return d;
}

/* The value of the leading digits of number token t, read inside the
 * token only (the prepared text is not cut after it), saturating at
 * 100000. */
static inline unsigned lead_value(const tm_title *ti, const tm_tok *t)
{
	const char *p = ti->text + t->off;
	unsigned v = 0;
	for (uint32_t i = 0; i < t->len && p[i] >= '0' && p[i] <= '9'; i++)
		v = v < 100000 ? v * 10 + (unsigned)(p[i] - '0') : v;
	return v;
}

static inline int is_currency(tm_title *ti, size_t k, size_t *len)
{
	const tm_tok *t = U(ti, k);
	if (t->kind == TK_SYM && !strchr("&+%#@", t->ch ? t->ch : '&')) {
		*len = 1;
		return 1;
	}
	if (t->kind == TK_SYM && t->ch == 0) {
		*len = 1;
		return 1;
	}
	return match_val(ti, k, LC_PAY, "currency", 1, len) != NULL;
}

/* Are units [k0, k1) all the words the title still has?  (Looks outward
 * from them: the nearest kept word is most often next door.) */
static inline int last_word(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k1; k < ti->nunit; k++)
		if (ukept(ti, k) && U(ti, k)->kind == TK_WORD)
			return 0;
	for (size_t k = k0; k-- > 0;)
		if (ukept(ti, k) && U(ti, k)->kind == TK_WORD)
			return 0;
	return 1;
}

/* Is unit k glued after a "+"?  A letter so written is a licence class
 * ("C+E"), no grade word leading an amount nor a word left hanging. */
static inline int plus_glued(const tm_title *ti, size_t k)
{
	return k > 0 && U(ti, k - 1)->kind == TK_SYM && U(ti, k - 1)->ch == '+' &&
	       glued(ti, k - 1, k, "");
}

/* An amount: [currency] number [k] [currency] at unit k.  Returns its
 * end unit (exclusive) or 0; *cur and *unit say whether it had a
 * currency and a time unit (pass_pay.c). */
size_t noise_amount(tm_title *ti, size_t k, int *cur, int *unit);

/* A "+" and a pay remark that ends the kept units [k0, k1) of a segment
 * after the occupation, with no amount before it ("Support Worker +
 * sleep-in allowance", "Kierowca + dodatki"; the "+" of "C+E" is glued
 * to its words): the "+" unit, or k1 (pass_pay.c). */
size_t plus_remark(tm_title *ti, size_t k0, size_t k1);

/* Removes a year or date at a segment edge at unit k; returns 1 when it
 * did, else 0 (pass_contact.c). */
int noise_date_at_edge(tm_title *ti, size_t k);

/* Clock ranges wherever a time is written as one ("6am-9am",
 * "22:00–06:00"), removed as schedule; run first by pass_pay, so that
 * "6.00-14.00" is no amount (pass_days.c).  Returns 0 or -1. */
int clock_ranges_anywhere(tm_title *ti);
/* The end of a rotation at unit k ("2/2", "14/14"), or 0 (pass_pay.c). */
size_t rotation(tm_title *ti, size_t k);

#endif

/* pass_noise.c - contact data, reference codes, pay, schedule, hashtags,
 * and the phrase lexicons peeled from the segment edges. */
#include <stdlib.h>
#include <string.h>

#include "norm/pass.h"

static int tok_is(const tm_title *ti, size_t t, char ch)
{
	return t < ti->tl.n && ti->tl.t[t].kind != TK_WORD &&
	       ti->tl.t[t].kind != TK_NUM && ti->tl.t[t].ch == ch;
}

static size_t ndigits(const tm_title *ti, const tm_tok *t)
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
static unsigned lead_value(const tm_title *ti, const tm_tok *t)
{
	const char *p = ti->text + t->off;
	unsigned v = 0;
	for (uint32_t i = 0; i < t->len && p[i] >= '0' && p[i] <= '9'; i++)
		v = v < 100000 ? v * 10 + (unsigned)(p[i] - '0') : v;
	return v;
}

/* Last token of the run glued to token t (no whitespace). */
static size_t glued_end(const tm_title *ti, size_t t)
{
	while (t + 1 < ti->tl.n && !ti->tl.t[t + 1].sp &&
	       !(ti->tl.t[t + 1].flags & (TF_OPEN | TF_CLOSE)) &&
	       !(ti->tl.t[t + 1].kind == TK_PUNCT &&
		 strchr(",;|!?", ti->tl.t[t + 1].ch ? ti->tl.t[t + 1].ch : 'x')))
		t++;
	while (t > 0 && ti->tl.t[t].kind == TK_PUNCT)
		t--;
	return t;
}

static size_t glued_start(const tm_title *ti, size_t t)
{
	while (t > 0 && !ti->tl.t[t].sp && ti->tl.t[t - 1].kind != TK_PUNCT)
		t--;
	while (t > 0 && !ti->tl.t[t].sp && ti->tl.t[t - 1].kind == TK_PUNCT &&
	       ti->tl.t[t - 1].ch && strchr(".-_", ti->tl.t[t - 1].ch) && t >= 2 &&
	       ti->tl.t[t - 2].kind != TK_PUNCT)
		t -= 2;
	return t;
}

/* ---- contact data: URLs, e-mail addresses, phone numbers ---- */

static int is_date(const tm_title *ti, const tm_tok *t);

/* Last token of a URL starting at t: everything up to whitespace. */
static size_t url_end(const tm_title *ti, size_t t)
{
	while (t + 1 < ti->tl.n && !ti->tl.t[t + 1].sp &&
	       !(ti->tl.t[t + 1].flags & TF_CLOSE))
		t++;
	return t;
}

/* Is token t the word w (its fold)? */
static int word_is(const tm_title *ti, size_t t, const char *w)
{
	const tm_tok *x;
	if (t >= ti->tl.n)
		return 0;
	x = &ti->tl.t[t];
	return x->kind == TK_WORD && x->flen == strlen(w) &&
	       !memcmp(tok_fold(&ti->tl, x), w, x->flen);
}

/* A word in brackets at t: "(at)", "[dot]".  Returns the closing
 * bracket's index, or 0. */
static size_t bracketed(const tm_title *ti, size_t t, const char *w)
{
	if (t + 2 < ti->tl.n && (ti->tl.t[t].flags & TF_OPEN) && word_is(ti, t + 1, w) &&
	    (ti->tl.t[t + 2].flags & TF_CLOSE))
		return t + 2;
	return 0;
}

/* The last word of a host name label from word q: "valdoria-gastro". */
static size_t label_end(const tm_title *ti, size_t q)
{
	while (tok_is(ti, q + 1, '-') && !ti->tl.t[q + 1].sp && q + 2 < ti->tl.n &&
	       !ti->tl.t[q + 2].sp && ti->tl.t[q + 2].kind == TK_WORD)
		q += 2;
	return q;
}

/* An e-mail address written to fool harvesters, "jobs(at)valdoria.example"
 * or "jobs [at] valdoria [dot] example", whose "(at)" opens at t: the
 * last token of its domain (a dot, plain or bracketed, at least once), or
 * 0. */
static size_t obfuscated_email(const tm_title *ti, size_t t)
{
	size_t q = bracketed(ti, t, "at"), e = 0;
	int dots = 0;
	if (!q || q + 1 >= ti->tl.n || ti->tl.t[q + 1].kind != TK_WORD)
		return 0;
	for (q++;;) {
		size_t c;
		e = q = label_end(ti, q); /* a label of the domain */
		if (tok_is(ti, q + 1, '.') && !ti->tl.t[q + 1].sp && q + 2 < ti->tl.n &&
		    !ti->tl.t[q + 2].sp && ti->tl.t[q + 2].kind == TK_WORD)
			q += 2;
		else if (((c = bracketed(ti, q + 1, "dot")) || (c = bracketed(ti, q + 1, "punkt"))) &&
			 c + 1 < ti->tl.n && ti->tl.t[c + 1].kind == TK_WORD)
			q = c + 1;
		else
			break;
		dots++;
	}
	return dots ? e : 0;
}

/* A URL without scheme or www that carries a query, as tracking links do:
 * "valdoria.example/jobs?id=991" (host, a path, "?", a key, "="); "Node.js/
 * React" and "ASP.NET/C#" are not.  Returns its last token, or 0.  When it
 * looked for the query up to the URL's end and found none, *none is set
 * to that end: no host starting before it carries a query either, since
 * a later host starts after this one's dots and sees less of the path
 * (so "(a.b" x N costs N, not N squared). */
static size_t bare_url(const tm_title *ti, size_t t, size_t *none)
{
	size_t q = t, e;
	int dots = 0, slash = 0;
	if (ti->tl.t[t].kind != TK_WORD || (t > 0 && !ti->tl.t[t].sp &&
					      !(ti->tl.t[t - 1].flags & TF_OPEN)))
		return 0;
	q = label_end(ti, q);
	while (tok_is(ti, q + 1, '.') && !ti->tl.t[q + 1].sp && q + 2 < ti->tl.n &&
	       !ti->tl.t[q + 2].sp && ti->tl.t[q + 2].kind == TK_WORD) {
		q = label_end(ti, q + 2);
		dots++;
	}
	if (!dots)
		return 0;
	e = url_end(ti, t);
	for (; q + 2 <= e; q++) {
		slash |= tok_is(ti, q, '/');
		if (slash && tok_is(ti, q, '?') && ti->tl.t[q + 1].kind == TK_WORD &&
		    tok_is(ti, q + 2, '='))
			return e;
	}
	*none = e;
	return 0;
}

int pass_pii(tm_title *ti)
{
	size_t t;
	tok_line *tl = &ti->tl;
	/* Tokens before which the look-ahead of an earlier token already
	 * showed there is no e-mail address, bare URL or phone number: each
	 * look-ahead below runs to the end of a glued run, and starting it
	 * again at every "@", host or digit group of that run cost the
	 * square of its length ("@" x 160,000 took 33 s). */
	size_t no_mail = 0, no_url = 0, no_phone = 0, ue;

	for (t = 0; t < tl->n; t++) {
		const tm_tok *x = &tl->t[t];
		const char *f = tok_fold(tl, x);
		if (ti->rm[t] != RM_NONE)
			continue;
		if (x->kind == TK_WORD &&
		    ((x->flen == 4 && !memcmp(f, "http", 4)) ||
		     (x->flen == 5 && !memcmp(f, "https", 5))) &&
		    tok_is(ti, t + 1, ':') && tok_is(ti, t + 2, '/')) {
			size_t e = url_end(ti, t);
			if (remove_toks(ti, t, e, NF_URL, NULL))
				return -1;
			t = e;
		} else if (x->kind == TK_WORD && x->flen == 3 &&
			   !memcmp(f, "www", 3) && tok_is(ti, t + 1, '.') &&
			   t + 2 < tl->n && !tl->t[t + 2].sp) {
			size_t e = url_end(ti, t);
			if (remove_toks(ti, t, e, NF_URL, NULL))
				return -1;
			t = e;
		} else if (x->kind == TK_SYM && x->ch == '@' && t >= no_mail && t > 0 && !x->sp &&
			   t + 1 < tl->n && !tl->t[t + 1].sp &&
			   tl->t[t - 1].kind != TK_PUNCT &&
			   tl->t[t + 1].kind != TK_PUNCT) {
			size_t e = glued_end(ti, t + 1), s;
			int dot = 0;
			for (size_t q = t + 1; q <= e; q++)
				dot |= tok_is(ti, q, '.');
			if (!dot) {
				/* an "@" later in the run has the same end and sees
				 * less of it: no dot there either */
				no_mail = e + 1;
				continue;
			}
			s = glued_start(ti, t - 1);
			/* "mailto:" goes with it */
			if (s >= 2 && tok_is(ti, s - 1, ':') && !tl->t[s].sp && !tl->t[s - 1].sp &&
			    word_is(ti, s - 2, "mailto") && ti->rm[s - 2] == RM_NONE)
				s -= 2;
			if (remove_toks(ti, s, e, NF_EMAIL, NULL))
				return -1;
			t = e;
		} else if ((x->flags & TF_OPEN) && t > 0 && tl->t[t - 1].kind == TK_WORD &&
			   ti->rm[t - 1] == RM_NONE && obfuscated_email(ti, t)) {
			size_t s = glued_start(ti, t - 1), e = obfuscated_email(ti, t);
			if (remove_toks(ti, s, e, NF_EMAIL, NULL))
				return -1;
			t = e;
		} else if (x->kind == TK_WORD && t >= no_url && (ue = bare_url(ti, t, &no_url))) {
			if (remove_toks(ti, t, ue, NF_URL, NULL))
				return -1;
			t = ue;
		} else if (t >= no_phone &&
			   ((x->kind == TK_SYM && x->ch == '+' && t + 1 < tl->n &&
			     tl->t[t + 1].kind == TK_NUM && !tl->t[t + 1].sp) ||
			    (x->kind == TK_NUM && ti->text[x->off] == '0' &&
			     x->len >= 2))) {
			/* digits grouped by spaces, - / . ( ) */
			size_t e = t, q = t + (x->kind == TK_SYM), d = 0;
			for (; q < tl->n; q++) {
				const tm_tok *m = &tl->t[q];
				if (m->kind == TK_NUM) {
					/* "01.03.2026 - 31.12.2026" is dates (a
					 * group 2015 may be a phone's) */
					if (m->len >= 8 && is_date(ti, m)) {
						d = 0;
						break;
					}
					d += ndigits(ti, m);
					e = q;
				} else if (m->kind == TK_PUNCT && m->ch &&
					   strchr("-/.()", m->ch)) {
					continue;
				} else
					break;
			}
			if (d >= (x->kind == TK_SYM ? 8u : 9u)) {
				if (remove_toks(ti, t, e, NF_PHONE, NULL))
					return -1;
				t = e;
			} else {
				/* a group starting later in the run stops at the
				 * same token with fewer digits */
				no_phone = q;
			}
		}
	}
	return 0;
}

/* ---- reference codes and dates ---- */

static int code_unit(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	return ukept(ti, k) && !ti->prot[ti->unit[k]] &&
	       (t->kind == TK_NUM || (t->kind == TK_WORD && (t->flags & TF_DIGIT)));
}

/* Extends a code over units glued with - _ / . that are codes or
 * capitals: REQ-0091, AB-12/2025. */
static int caps_unit(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	return t->kind == TK_WORD && ((t->flags & TF_ALLCAPS) ||
				      (t->len == 1 && (t->flags & TF_CAP)));
}

static size_t code_end(tm_title *ti, size_t k)
{
	while (k + 1 < ti->nunit && glued(ti, k, k + 1, "-_/.") &&
	       (code_unit(ti, k + 1) || caps_unit(ti, k + 1)))
		k++;
	return k;
}

/* A code at unit k: 2291, AB12, TM-2291, NL-5512. */
static int code_at(tm_title *ti, size_t k)
{
	if (k >= ti->nunit)
		return 0;
	if (code_unit(ti, k))
		return 1;
	return caps_unit(ti, k) && ukept(ti, k) && k + 1 < ti->nunit &&
	       glued(ti, k, k + 1, "-_/.") && code_unit(ti, k + 1);
}

static int is_date(const tm_title *ti, const tm_tok *t)
{
	const char *p = ti->text + t->off;
	size_t d, n = t->len;
	if (t->kind != TK_NUM || (n != 4 && n != 8 && n != 10))
		return 0;
	d = ndigits(ti, t);
	if (d == 4 && n == 4)
		return (p[0] == '1' && p[1] == '9') || (p[0] == '2' && p[1] == '0');
	/* dd.mm.yyyy, dd.mm.yy */
	return (n == 10 || n == 8) && p[2] == '.' && p[5] == '.';
}

static int is_currency(tm_title *ti, size_t k, size_t *len);

/* A year or date at a segment edge (Ausbildung 2026, Saison 2025/26)
 * is removed; returns 1 when it was.  A number with a currency beside it
 * is an amount ("2027 € brutto", "1966 kroner"), left to the pay rule. */
static int date_at_edge(tm_title *ti, size_t k)
{
	size_t k0, k1, e = k + 1, len;
	if (!ukept(ti, k) || ti->prot[ti->unit[k]] || !is_date(ti, U(ti, k)))
		return 0;
	if ((e < ti->nunit && ukept(ti, e) && is_currency(ti, e, &len)) ||
	    (k > 0 && ukept(ti, k - 1) && is_currency(ti, k - 1, &len)))
		return 0;
	/* 2025/26, 2025-2026 */
	if (e < ti->nunit && glued(ti, k, e, "/-") && U(ti, e)->kind == TK_NUM &&
	    ndigits(ti, U(ti, e)) <= 4)
		e++;
	seg_kept(ti, useg(ti, k), &k0, &k1);
	if (k != k0 && e != k1)
		return 0;
	return remove_units(ti, k, e, NF_DATE, NULL) == 0;
}

int pass_reference(tm_title *ti)
{
	size_t k, len;

	for (k = 0; k < ti->nunit; k++) {
		const tm_tok *t = U(ti, k);
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		if (match_cat(ti, k, LC_REFERENCE, 1, &len)) {
			size_t j = k + len, leads = 1;
			while (j < ti->nunit && leads < REF_LEAD_MAX &&
			       match_cat(ti, j, LC_REFERENCE, 1, &len)) {
				j += len;
				leads++;
			}
			/* ref 2291, Ref.: AB-12, Job-ID #44 */
			if (j < ti->nunit && U(ti, j)->kind == TK_SYM &&
			    U(ti, j)->ch == '#')
				j++;
			/* a number with a currency after it is an amount: "až
			 * 25000 Kč" (Czech "up to"; German "Az" is a file number) */
			size_t cl;
			if (code_at(ti, j) &&
			    !(U(ti, j)->kind == TK_NUM && code_end(ti, j) + 1 < ti->nunit &&
			      is_currency(ti, code_end(ti, j) + 1, &cl))) {
				size_t e = code_end(ti, j);
				if (remove_units(ti, k, e + 1, NF_REFERENCE, NULL))
					return -1;
				k = e;
				continue;
			}
		}
		if (t->kind == TK_SYM && t->ch == '#' && k + 1 < ti->nunit &&
		    glued(ti, k, k + 1, "") && code_unit(ti, k + 1)) {
			size_t e = code_end(ti, k + 1);
			if (remove_units(ti, k, e + 1, NF_REFERENCE, NULL))
				return -1;
			k = e;
			continue;
		}
		if (is_date(ti, t) && date_at_edge(ti, k))
			continue;
		/* JR12345: letters with four digits or more, one word */
		if (t->kind == TK_WORD && (t->flags & TF_DIGIT) && ndigits(ti, t) >= 4) {
			size_t e = code_end(ti, k);
			if (remove_units(ti, k, e + 1, NF_REFERENCE, NULL))
				return -1;
			k = e;
			continue;
		}
	}
	/* a bracket or later segment that is one code: [REQ-0091], - 12345 */
	for (size_t s = 0; s < ti->nseg; s++) {
		size_t k0, k1, e;
		const tm_seg *g = &ti->segs[s];
		if (!g->bracket && g->index == 0)
			continue;
		seg_kept(ti, s, &k0, &k1);
		if (k0 >= k1 || (!code_unit(ti, k0) && !(U(ti, k0)->flags & TF_ALLCAPS)))
			continue;
		e = code_end(ti, k0);
		if (e + 1 != k1)
			continue;
		size_t d = 0;
		for (size_t q = k0; q < k1; q++)
			d += ndigits(ti, U(ti, q));
		if (d >= 3 && units_free(ti, k0, k1))
			if (remove_units(ti, k0, k1, NF_REFERENCE, NULL))
				return -1;
	}
	return 0;
}

static int last_word(tm_title *ti, size_t k0, size_t k1);

/* ---- pay ---- */

static const unsigned phrase_mask_pay = 1u << LC_SCHEDULE | 1u << LC_MARKETING;

static int is_currency(tm_title *ti, size_t k, size_t *len)
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

static int time_unit(tm_title *ti, size_t k, size_t *len)
{
	const lex_entry *e = match_cat(ti, k, LC_UNIT, 1, len);
	return e && (!strcmp(e->value, "hours") || !strcmp(e->value, "week") ||
		     !strcmp(e->value, "month") || !strcmp(e->value, "year") ||
		     !strcmp(e->value, "day"));
}

/* An amount: [currency] number [k] [currency].  Returns its end unit
 * (exclusive) or 0. */
static size_t amount(tm_title *ti, size_t k, int *cur, int *unit)
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
	if (k < ti->nunit && ukept(ti, k) && is_currency(ti, k, &len)) {
		*cur = 1;
		k += len;
	}
	return k;
}

int pass_pay(tm_title *ti)
{
	size_t k, len;

	for (k = 0; k < ti->nunit; k++) {
		size_t j = k, e;
		int cur = 0, unit = 0;
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		while (j < ti->nunit && match_val(ti, j, LC_PAY, "lead", 1, &len))
			j += len;
		if (!(e = amount(ti, j, &cur, &unit)))
			continue;
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
			if (r != SIZE_MAX && (e2 = amount(ti, r, &c2, &u2))) {
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
		/* a longer phrase wins: auf 520-Euro-Basis is a schedule */
		{
			size_t pl;
			const lex_entry *ph = match_mask(ti, j, phrase_mask_pay, 1, &pl);
			if (ph && j + pl >= e)
				continue;
		}
		if (remove_units(ti, k, e, NF_PAY, NULL))
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
	return (t->flags & TF_ALLCAPS) && t->len <= 4;
}

/* A pay-scale word at unit k (pay "lead", "Besoldungsgruppe", "schaal";
 * an edge lead only at the segment's first kept unit k0): its length in
 * units, or 0. */
static size_t grade_word(tm_title *ti, size_t k, size_t k0)
{
	size_t len;
	const lex_entry *e = match_val(ti, k, LC_PAY, "lead", 1, &len);
	const tm_tok *t = U(ti, k);
	if (!e || (e->where == LW_EDGE && k != k0))
		return 0;
	/* a short word leads an amount ("de 30 a 40 €", "bis 22 €"); as a
	 * grade word it is written in capitals: E 12, VG 5, GS-11 */
	if (len == 1 && t->kind == TK_WORD && t->flen <= 3 &&
	    !(t->flags & TF_ALLCAPS) && !(t->len == 1 && (t->flags & TF_CAP)))
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
	if (grade_code(ti, k))
		return 1;
	/* an ordinal sign glued to a number: 5° livello */
	if (k > k0 && U(ti, k)->kind == TK_SYM && U(ti, k - 1)->kind == TK_NUM &&
	    glued(ti, k - 1, k, ""))
		return 1;
	e = match_mask(ti, k, 1u << LC_PAY | 1u << LC_SENIORITY, 1, &len);
	if (e && (e->cat == LC_SENIORITY || !strcmp(e->value, "phrase")))
		return len;
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

int pass_schedule(tm_title *ti)
{
	size_t k, len;

	for (k = 0; k < ti->nunit; k++) {
		size_t j, e;
		const lex_entry *u;
		if (U(ti, k)->kind != TK_NUM || !ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		j = k + 1;
		/* range */
		if (j + 1 < ti->nunit && U(ti, j)->kind == TK_NUM &&
		    ti->unit[j] == ti->unit[k] + 2 &&
		    tok_is(ti, ti->unit[k] + 1, '-'))
			j++;
		else if (j + 1 < ti->nunit &&
			 (match_val(ti, j, LC_UNIT, "connector", 1, &len) ||
			  match_val(ti, j, LC_PAY, "lead", 1, &len)) &&
			 j + len < ti->nunit && U(ti, j + len)->kind == TK_NUM)
			j += len + 1;
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
				unsigned hv = lead_value(ti, U(ti, k));
				e = j + len;
				/* 35h, 32 uur, 38 Stunden are weekly hours
				 * wherever they stand (not 24h, a kind of care);
				 * a spaced "h" only in a slot */
				if (!g->bracket && g->index == 0 &&
				    !((glued(ti, j - 1, j, "") || U(ti, j)->flen >= 3) &&
				      hv >= 5 && hv <= 48 && hv != 24))
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

/* A time of day at unit k: 7, 08, 15.30, 15:30, 9h30.  Returns its end
 * (exclusive), or 0. */
static size_t clock_time(tm_title *ti, size_t k)
{
	size_t len;
	if (!num_at(ti, k) || ndigits(ti, U(ti, k)) > 4 ||
	    lead_value(ti, U(ti, k)) > 24)
		return 0;
	k++;
	if (num_at(ti, k) && glued(ti, k - 1, k, ":") && U(ti, k)->len == 2)
		k++;
	if (unit_val(ti, k, "hours", &len) && len == 1 && glued(ti, k - 1, k, "") &&
	    num_at(ti, k + 1) && glued(ti, k, k + 1, "") && U(ti, k + 1)->len == 2)
		k += 2; /* 9h30 */
	return k;
}

/* A clock range at k: 7–15, 9-5, 08.00–16.00 Uhr, 7 bis 15 h.  Returns
 * its end (exclusive), or 0. */
static size_t clock_range(tm_title *ti, size_t k)
{
	size_t e = clock_time(ti, k), r, len;
	if (!e || e >= ti->nunit)
		return 0;
	if (glued(ti, e - 1, e, "-/") && ti->unit[e] == ti->unit[e - 1] + 2)
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
	if ((c = clock_range(ti, e))) {
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
		e = day_phrase(ti, k, &range);
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

/* ---- hashtags ---- */

int pass_hashtags(tm_title *ti)
{
	for (size_t k = 0; k + 1 < ti->nunit; k++) {
		const tm_tok *t = U(ti, k);
		if (t->kind == TK_SYM && t->ch == '#' && U(ti, k + 1)->kind == TK_WORD &&
		    glued(ti, k, k + 1, "") && ukept(ti, k + 1) &&
		    !ti->prot[ti->unit[k + 1]]) {
			size_t e = k + 1;
			while (e + 1 < ti->nunit && glued(ti, e, e + 1, "-_"))
				e++;
			if (remove_units(ti, k, e + 1, NF_MARKETING, NULL))
				return -1;
			k = e;
		}
	}
	return 0;
}

/* ---- the phrase lexicons, peeled from segment edges to a fixpoint ---- */

static const unsigned phrase_mask = 1u << LC_MARKER | 1u << LC_SENIORITY |
				    1u << LC_SCHEDULE | 1u << LC_PAY |
				    1u << LC_MARKETING;

static int kind_of(int cat)
{
	switch (cat) {
	case LC_MARKER: return NF_GENDER;
	case LC_SENIORITY: return NF_SENIORITY;
	case LC_SCHEDULE: return NF_SCHEDULE;
	case LC_PAY: return NF_PAY;
	default: return NF_MARKETING;
	}
}

/* A word left hanging at a segment edge once its neighbour went: "in",
 * "bei", "bis", "und", "Tel." */
static int dangling(tm_title *ti, size_t k)
{
	size_t len;
	const lex_entry *e;
	if (match_val(ti, k, LC_UNIT, "connector", 1, &len) && len == 1)
		return 1;
	if (match_val(ti, k, LC_UNIT, "contact", 1, &len) && len == 1)
		return 1;
	if (match_val(ti, k, LC_PAY, "lead", 1, &len) && len == 1)
		return 1;
	if (match_val(ti, k, LC_EMPLOYER, "marker", 1, &len) && len == 1)
		return 1;
	e = match_cat(ti, k, LC_LOCATION, 1, &len);
	return e && len == 1 && (!strcmp(e->value, "prep") || !strcmp(e->value, "before"));
}

static int removed_tok(const tm_title *ti, size_t t)
{
	return t < ti->tl.n && ti->rm[t] != RM_NONE;
}

/* Are units [k0, k1) all the words the title still has?  (Looks outward
 * from them: the nearest kept word is most often next door.) */
static int last_word(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k1; k < ti->nunit; k++)
		if (ukept(ti, k) && U(ti, k)->kind == TK_WORD)
			return 0;
	for (size_t k = k0; k-- > 0;)
		if (ukept(ti, k) && U(ti, k)->kind == TK_WORD)
			return 0;
	return 1;
}

static int is_contact_kind(int kind)
{
	return kind == NF_EMAIL || kind == NF_PHONE || kind == NF_URL;
}

/* Does the title keep a word outside units [k0, k1)? */
static int kept_elsewhere(tm_title *ti, size_t k0, size_t k1)
{
	return !last_word(ti, k0, k1);
}

/* Units [k0, k1), the kept words of a segment, are the label of the
 * contact data that comes right after them ("Gärtner – CV an
 * jobs@gruenwerk.example", "Maalari – lisätiedot: 01632 960533"): at
 * most CONTACT_LABEL_MAX words, none of them occupational or protected,
 * every unit between them kept or removed as contact data, followed
 * (past removed tokens, dots and colons) by removed contact data before
 * any kept word or other punctuation; and the title keeps a word
 * elsewhere. */
static int contact_label(tm_title *ti, size_t k0, size_t k1)
{
	size_t t, contact = 0;

	if (k1 - k0 > CONTACT_LABEL_MAX)
		return 0;
	for (size_t k = k0; k < k1; k++)
		if (!ukept(ti, k) || ti->prot[ti->unit[k]] ||
		    (ti->ucats[k] & (1u << LC_OCCUPATION)))
			return 0;
	for (t = ti->unit[k1 - 1] + 1; t < ti->tl.n; t++) {
		const tm_tok *x = &ti->tl.t[t];
		if (ti->rm[t] != RM_NONE) {
			if (is_contact_kind(ti->rm[t]))
				contact = 1;
			else if (!contact)
				return 0;
			continue;
		}
		if (x->kind == TK_PUNCT && (x->ch == ':' || x->ch == '.'))
			continue;
		break;
	}
	return contact && kept_elsewhere(ti, k0, k1);
}

static int peel_segment(tm_title *ti, size_t s, int *changed)
{
	size_t k0, k1, k, len;

	seg_kept(ti, s, &k0, &k1);
	size_t a = k0, b = k1;
	for (k = k0; k < k1; k++) {
		const lex_entry *e;
		if (ti->aoff[k] == ti->aoff[k + 1] || !ukept(ti, k))
			continue;
		e = match_mask(ti, k, phrase_mask, 1, &len);
		if (!e)
			continue;
		if (e->cat == LC_PAY && strcmp(e->value, "phrase")) {
			/* "timelønn" is a unit after an amount and a remark
			 * alone in its segment */
			size_t l2;
			const lex_entry *p = match_val(ti, k, LC_PAY, "phrase", 1, &l2);
			if (!p || l2 != len)
				continue;
			e = p;
		}
		/* an edge word is never the title's last word: Principal;
		 * whether it is shows only once the other rules removed
		 * their noise ("Trainee – neu", "Trainee – Hardegg"), so
		 * it goes in the last run alone */
		if (e->where == LW_EDGE && e->cat == LC_SENIORITY &&
		    (ti->phrase_runs < 2 || last_word(ti, k, k + len))) {
			/* the same phrase in another category goes as that
			 * ("ouvert aux débutants" is marketing too) */
			size_t l2;
			const lex_entry *o = match_mask(ti, k, phrase_mask &
							~(1u << LC_SENIORITY), 1, &l2);
			if (!o || l2 != len) {
				if (ti->phrase_runs < 2)
					k += len - 1; /* not a word of it alone */
				continue;
			}
			e = o;
		}
		if ((e->where == LW_EDGE && k != a && k + len != b) ||
		    (e->where == LW_ALONE && (k != a || k + len != b)) ||
		    e->where == LW_SLOT || e->where == LW_STRONG)
			continue;
		if (remove_units(ti, k, k + len, kind_of(e->cat), e->value))
			return -1;
		*changed = 1;
		k += len - 1;
		seg_kept(ti, s, &a, &b);
	}
	/* years left at an edge by the removals */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && date_at_edge(ti, k0))
		*changed = 1;
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && date_at_edge(ti, k1 - 1))
		*changed = 1;
	/* a contact word alone in its segment: "Contact: jobs@..." */
	seg_kept(ti, s, &k0, &k1);
	if (k0 + 1 == k1 && !ti->prot[ti->unit[k0]] &&
	    match_val(ti, k0, LC_UNIT, "contact", 1, &len) && len == 1 &&
	    ti->tl.n > ti->unit[k0] + 1) {
		if (remove_units(ti, k0, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	/* a label before contact data: "CV na adres praca@…" */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && ti->lflags & (LF_NUM | LF_SYM | LF_URL) && contact_label(ti, k0, k1)) {
		if (remove_units(ti, k0, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	/* a degree word left at an edge by the phrase it qualified: "fuld
	 * remote", "cianobair go hiomlán" */
	seg_kept(ti, s, &k0, &k1);
	for (k = k0; k < k1; k++) {
		size_t t0, t1;
		if (!match_val(ti, k, LC_UNIT, "degree", 1, &len) || k + len > k1 ||
		    (k != k0 && k + len != k1) || !units_free(ti, k, k + len))
			continue;
		t0 = ti->unit[k];
		t1 = ti->unit[k + len - 1];
		if (!(k + len == k1 && removed_tok(ti, t1 + 1)) &&
		    !(k == k0 && t0 > 0 && removed_tok(ti, t0 - 1)))
			continue;
		if (remove_units(ti, k, k + len, NF_MARKETING, NULL))
			return -1;
		*changed = 1; /* the next round looks again */
		break;
	}
	/* hanging words at the two edges */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && !ti->prot[ti->unit[k1 - 1]] && dangling(ti, k1 - 1) &&
	    (removed_tok(ti, ti->unit[k1 - 1] + 1) ||
	     (k1 < ti->nunit && !ukept(ti, k1) && useg(ti, k1) == s))) {
		if (remove_units(ti, k1 - 1, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && k0 > 0 && !ti->prot[ti->unit[k0]] &&
	    match_val(ti, k0, LC_UNIT, "connector", 1, &len) && len == 1 &&
	    ti->unit[k0] > 0 && removed_tok(ti, ti->unit[k0] - 1)) {
		if (remove_units(ti, k0, k0 + 1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	return 0;
}

/* A number is never the whole title once the words around it went: "TVöD
 * 9", "Vollzeit 9" leave no "9" (a grade or an amount without its word).
 * A title that was a number and nothing else stays as it was. */
static int lone_numbers(tm_title *ti)
{
	size_t k, first = SIZE_MAX;
	int pay = 0;
	if (!ti->nspan)
		return 0;
	for (k = 0; k < ti->nunit; k++) {
		if (!ukept(ti, k))
			continue;
		if (U(ti, k)->kind == TK_WORD)
			return 0;
		if (U(ti, k)->kind == TK_NUM && first == SIZE_MAX)
			first = k;
	}
	if (first == SIZE_MAX)
		return 0;
	for (size_t i = 0; i < ti->nspan; i++)
		pay |= ti->spans[i].kind == NF_PAY;
	for (k = first; k < ti->nunit; k++)
		if (ukept(ti, k) && !ti->prot[ti->unit[k]] &&
		    remove_units(ti, k, k + 1, pay ? NF_PAY : NF_MARKETING, NULL))
			return -1;
	return 0;
}

int pass_phrases(tm_title *ti)
{
	int changed = 1, rounds = 0;

	/* nothing removed since the last call ended at its fixpoint, and
	 * the edge seniority words already had their run (phrase_runs 2):
	 * a round would find nothing again (the rules read nothing else
	 * that changes), and neither would lone_numbers */
	if (ti->peeled == ti->gen && ti->phrase_runs >= 2)
		return 0;
	ti->phrase_runs++;
	while (changed && rounds++ < 64) {
		changed = 0;
		for (size_t s = 0; s < ti->nseg; s++)
			if (peel_segment(ti, s, &changed))
				return -1;
	}
	if (lone_numbers(ti))
		return -1;
	if (!changed)
		ti->peeled = ti->gen;
	return 0;
}

/* pass_noise.c - contact data, reference codes, pay, schedule, hashtags,
 * and the phrase lexicons peeled from the segment edges. */
#include <stdlib.h>
#include <string.h>

#include "pass.h"

static int tok_is(const normaliser *nm, size_t t, char ch)
{
	return t < nm->tl.n && nm->tl.t[t].kind != TK_WORD &&
	       nm->tl.t[t].kind != TK_NUM && nm->tl.t[t].ch == ch;
}

static size_t ndigits(const normaliser *nm, const tm_tok *t)
{
	size_t d = 0;
	const char *p = nm->work.data + t->off;
	for (uint32_t i = 0; i < t->len; i++)
		d += p[i] >= '0' && p[i] <= '9';
	return d;
}

/* Last token of the run glued to token t (no whitespace). */
static size_t glued_end(const normaliser *nm, size_t t)
{
	while (t + 1 < nm->tl.n && !nm->tl.t[t + 1].sp &&
	       !(nm->tl.t[t + 1].flags & (TF_OPEN | TF_CLOSE)) &&
	       !(nm->tl.t[t + 1].kind == TK_PUNCT &&
		 strchr(",;|!?", nm->tl.t[t + 1].ch ? nm->tl.t[t + 1].ch : 'x')))
		t++;
	while (t > 0 && nm->tl.t[t].kind == TK_PUNCT)
		t--;
	return t;
}

static size_t glued_start(const normaliser *nm, size_t t)
{
	while (t > 0 && !nm->tl.t[t].sp && nm->tl.t[t - 1].kind != TK_PUNCT)
		t--;
	while (t > 0 && !nm->tl.t[t].sp && nm->tl.t[t - 1].kind == TK_PUNCT &&
	       nm->tl.t[t - 1].ch && strchr(".-_", nm->tl.t[t - 1].ch) && t >= 2 &&
	       nm->tl.t[t - 2].kind != TK_PUNCT)
		t -= 2;
	return t;
}

/* ---- contact data: URLs, e-mail addresses, phone numbers ---- */

static int is_date(const normaliser *nm, const tm_tok *t);

/* Last token of a URL starting at t: everything up to whitespace. */
static size_t url_end(const normaliser *nm, size_t t)
{
	while (t + 1 < nm->tl.n && !nm->tl.t[t + 1].sp &&
	       !(nm->tl.t[t + 1].flags & TF_CLOSE))
		t++;
	return t;
}

/* Is token t the word w (its fold)? */
static int word_is(const normaliser *nm, size_t t, const char *w)
{
	const tm_tok *x;
	if (t >= nm->tl.n)
		return 0;
	x = &nm->tl.t[t];
	return x->kind == TK_WORD && x->flen == strlen(w) &&
	       !memcmp(tok_fold(&nm->tl, x), w, x->flen);
}

/* A word in brackets at t: "(at)", "[dot]".  Returns the closing
 * bracket's index, or 0. */
static size_t bracketed(const normaliser *nm, size_t t, const char *w)
{
	if (t + 2 < nm->tl.n && (nm->tl.t[t].flags & TF_OPEN) && word_is(nm, t + 1, w) &&
	    (nm->tl.t[t + 2].flags & TF_CLOSE))
		return t + 2;
	return 0;
}

/* The last word of a host name label from word q: "valdoria-gastro". */
static size_t label_end(const normaliser *nm, size_t q)
{
	while (tok_is(nm, q + 1, '-') && !nm->tl.t[q + 1].sp && q + 2 < nm->tl.n &&
	       !nm->tl.t[q + 2].sp && nm->tl.t[q + 2].kind == TK_WORD)
		q += 2;
	return q;
}

/* An e-mail address written to fool harvesters, "jobs(at)valdoria.example"
 * or "jobs [at] valdoria [dot] example", whose "(at)" opens at t: the
 * last token of its domain (a dot, plain or bracketed, at least once), or
 * 0. */
static size_t obfuscated_email(const normaliser *nm, size_t t)
{
	size_t q = bracketed(nm, t, "at"), e = 0;
	int dots = 0;
	if (!q || q + 1 >= nm->tl.n || nm->tl.t[q + 1].kind != TK_WORD)
		return 0;
	for (q++;;) {
		size_t c;
		e = q = label_end(nm, q); /* a label of the domain */
		if (tok_is(nm, q + 1, '.') && !nm->tl.t[q + 1].sp && q + 2 < nm->tl.n &&
		    !nm->tl.t[q + 2].sp && nm->tl.t[q + 2].kind == TK_WORD)
			q += 2;
		else if (((c = bracketed(nm, q + 1, "dot")) || (c = bracketed(nm, q + 1, "punkt"))) &&
			 c + 1 < nm->tl.n && nm->tl.t[c + 1].kind == TK_WORD)
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
static size_t bare_url(const normaliser *nm, size_t t, size_t *none)
{
	size_t q = t, e;
	int dots = 0, slash = 0;
	if (nm->tl.t[t].kind != TK_WORD || (t > 0 && !nm->tl.t[t].sp &&
					      !(nm->tl.t[t - 1].flags & TF_OPEN)))
		return 0;
	q = label_end(nm, q);
	while (tok_is(nm, q + 1, '.') && !nm->tl.t[q + 1].sp && q + 2 < nm->tl.n &&
	       !nm->tl.t[q + 2].sp && nm->tl.t[q + 2].kind == TK_WORD) {
		q = label_end(nm, q + 2);
		dots++;
	}
	if (!dots)
		return 0;
	e = url_end(nm, t);
	for (; q + 2 <= e; q++) {
		slash |= tok_is(nm, q, '/');
		if (slash && tok_is(nm, q, '?') && nm->tl.t[q + 1].kind == TK_WORD &&
		    tok_is(nm, q + 2, '='))
			return e;
	}
	*none = e;
	return 0;
}

int pass_pii(normaliser *nm)
{
	size_t t;
	tok_line *tl = &nm->tl;
	/* Tokens before which the look-ahead of an earlier token already
	 * showed there is no e-mail address, bare URL or phone number: each
	 * look-ahead below runs to the end of a glued run, and starting it
	 * again at every "@", host or digit group of that run cost the
	 * square of its length ("@" x 160,000 took 33 s). */
	size_t no_mail = 0, no_url = 0, no_phone = 0, ue;

	for (t = 0; t < tl->n; t++) {
		const tm_tok *x = &tl->t[t];
		const char *f = tok_fold(tl, x);
		if (nm->rm[t] != RM_NONE)
			continue;
		if (x->kind == TK_WORD &&
		    ((x->flen == 4 && !memcmp(f, "http", 4)) ||
		     (x->flen == 5 && !memcmp(f, "https", 5))) &&
		    tok_is(nm, t + 1, ':') && tok_is(nm, t + 2, '/')) {
			size_t e = url_end(nm, t);
			if (remove_toks(nm, t, e, NF_URL, NULL))
				return -1;
			t = e;
		} else if (x->kind == TK_WORD && x->flen == 3 &&
			   !memcmp(f, "www", 3) && tok_is(nm, t + 1, '.') &&
			   t + 2 < tl->n && !tl->t[t + 2].sp) {
			size_t e = url_end(nm, t);
			if (remove_toks(nm, t, e, NF_URL, NULL))
				return -1;
			t = e;
		} else if (x->kind == TK_SYM && x->ch == '@' && t >= no_mail && t > 0 && !x->sp &&
			   t + 1 < tl->n && !tl->t[t + 1].sp &&
			   tl->t[t - 1].kind != TK_PUNCT &&
			   tl->t[t + 1].kind != TK_PUNCT) {
			size_t e = glued_end(nm, t + 1), s;
			int dot = 0;
			for (size_t q = t + 1; q <= e; q++)
				dot |= tok_is(nm, q, '.');
			if (!dot) {
				/* an "@" later in the run has the same end and sees
				 * less of it: no dot there either */
				no_mail = e + 1;
				continue;
			}
			s = glued_start(nm, t - 1);
			/* "mailto:" goes with it */
			if (s >= 2 && tok_is(nm, s - 1, ':') && !tl->t[s].sp && !tl->t[s - 1].sp &&
			    word_is(nm, s - 2, "mailto") && nm->rm[s - 2] == RM_NONE)
				s -= 2;
			if (remove_toks(nm, s, e, NF_EMAIL, NULL))
				return -1;
			t = e;
		} else if ((x->flags & TF_OPEN) && t > 0 && tl->t[t - 1].kind == TK_WORD &&
			   nm->rm[t - 1] == RM_NONE && obfuscated_email(nm, t)) {
			size_t s = glued_start(nm, t - 1), e = obfuscated_email(nm, t);
			if (remove_toks(nm, s, e, NF_EMAIL, NULL))
				return -1;
			t = e;
		} else if (x->kind == TK_WORD && t >= no_url && (ue = bare_url(nm, t, &no_url))) {
			if (remove_toks(nm, t, ue, NF_URL, NULL))
				return -1;
			t = ue;
		} else if (t >= no_phone &&
			   ((x->kind == TK_SYM && x->ch == '+' && t + 1 < tl->n &&
			     tl->t[t + 1].kind == TK_NUM && !tl->t[t + 1].sp) ||
			    (x->kind == TK_NUM && nm->work.data[x->off] == '0' &&
			     x->len >= 2))) {
			/* digits grouped by spaces, - / . ( ) */
			size_t e = t, q = t + (x->kind == TK_SYM), d = 0;
			for (; q < tl->n; q++) {
				const tm_tok *m = &tl->t[q];
				if (m->kind == TK_NUM) {
					/* "01.03.2026 - 31.12.2026" is dates (a
					 * group 2015 may be a phone's) */
					if (m->len >= 8 && is_date(nm, m)) {
						d = 0;
						break;
					}
					d += ndigits(nm, m);
					e = q;
				} else if (m->kind == TK_PUNCT && m->ch &&
					   strchr("-/.()", m->ch)) {
					continue;
				} else
					break;
			}
			if (d >= (x->kind == TK_SYM ? 8u : 9u)) {
				if (remove_toks(nm, t, e, NF_PHONE, NULL))
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

static int code_unit(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	return ukept(nm, k) && !nm->prot[nm->unit[k]] &&
	       (t->kind == TK_NUM || (t->kind == TK_WORD && (t->flags & TF_DIGIT)));
}

/* Extends a code over units glued with - _ / . that are codes or
 * capitals: REQ-0091, AB-12/2025. */
static int caps_unit(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	return t->kind == TK_WORD && ((t->flags & TF_ALLCAPS) ||
				      (t->len == 1 && (t->flags & TF_CAP)));
}

static size_t code_end(normaliser *nm, size_t k)
{
	while (k + 1 < nm->nunit && glued(nm, k, k + 1, "-_/.") &&
	       (code_unit(nm, k + 1) || caps_unit(nm, k + 1)))
		k++;
	return k;
}

/* A code at unit k: 2291, AB12, TM-2291, NL-5512. */
static int code_at(normaliser *nm, size_t k)
{
	if (k >= nm->nunit)
		return 0;
	if (code_unit(nm, k))
		return 1;
	return caps_unit(nm, k) && ukept(nm, k) && k + 1 < nm->nunit &&
	       glued(nm, k, k + 1, "-_/.") && code_unit(nm, k + 1);
}

static int is_date(const normaliser *nm, const tm_tok *t)
{
	const char *p = nm->work.data + t->off;
	size_t d, n = t->len;
	if (t->kind != TK_NUM || (n != 4 && n != 8 && n != 10))
		return 0;
	d = ndigits(nm, t);
	if (d == 4 && n == 4)
		return (p[0] == '1' && p[1] == '9') || (p[0] == '2' && p[1] == '0');
	/* dd.mm.yyyy, dd.mm.yy */
	return (n == 10 || n == 8) && p[2] == '.' && p[5] == '.';
}

/* A year or date at a segment edge (Ausbildung 2026, Saison 2025/26)
 * is removed; returns 1 when it was. */
static int date_at_edge(normaliser *nm, size_t k)
{
	size_t k0, k1, e = k + 1;
	if (!ukept(nm, k) || nm->prot[nm->unit[k]] || !is_date(nm, U(nm, k)))
		return 0;
	/* 2025/26, 2025-2026 */
	if (e < nm->nunit && glued(nm, k, e, "/-") && U(nm, e)->kind == TK_NUM &&
	    ndigits(nm, U(nm, e)) <= 4)
		e++;
	seg_kept(nm, useg(nm, k), &k0, &k1);
	if (k != k0 && e != k1)
		return 0;
	return remove_units(nm, k, e, NF_DATE, NULL) == 0;
}

int pass_reference(normaliser *nm)
{
	size_t k, len;

	for (k = 0; k < nm->nunit; k++) {
		const tm_tok *t = U(nm, k);
		if (!ukept(nm, k) || nm->prot[nm->unit[k]])
			continue;
		if (match_cat(nm, k, LC_REFERENCE, 1, &len)) {
			size_t j = k + len, leads = 1;
			while (j < nm->nunit && leads < REF_LEAD_MAX &&
			       match_cat(nm, j, LC_REFERENCE, 1, &len)) {
				j += len;
				leads++;
			}
			/* ref 2291, Ref.: AB-12, Job-ID #44 */
			if (j < nm->nunit && U(nm, j)->kind == TK_SYM &&
			    U(nm, j)->ch == '#')
				j++;
			if (code_at(nm, j)) {
				size_t e = code_end(nm, j);
				if (remove_units(nm, k, e + 1, NF_REFERENCE, NULL))
					return -1;
				k = e;
				continue;
			}
		}
		if (t->kind == TK_SYM && t->ch == '#' && k + 1 < nm->nunit &&
		    glued(nm, k, k + 1, "") && code_unit(nm, k + 1)) {
			size_t e = code_end(nm, k + 1);
			if (remove_units(nm, k, e + 1, NF_REFERENCE, NULL))
				return -1;
			k = e;
			continue;
		}
		if (is_date(nm, t) && date_at_edge(nm, k))
			continue;
		/* JR12345: letters with four digits or more, one word */
		if (t->kind == TK_WORD && (t->flags & TF_DIGIT) && ndigits(nm, t) >= 4) {
			size_t e = code_end(nm, k);
			if (remove_units(nm, k, e + 1, NF_REFERENCE, NULL))
				return -1;
			k = e;
			continue;
		}
	}
	/* a bracket or later segment that is one code: [REQ-0091], - 12345 */
	for (size_t s = 0; s < nm->nseg; s++) {
		size_t k0, k1, e;
		const seg *g = &nm->segs[s];
		if (!g->bracket && g->index == 0)
			continue;
		seg_kept(nm, s, &k0, &k1);
		if (k0 >= k1 || (!code_unit(nm, k0) && !(U(nm, k0)->flags & TF_ALLCAPS)))
			continue;
		e = code_end(nm, k0);
		if (e + 1 != k1)
			continue;
		size_t d = 0;
		for (size_t q = k0; q < k1; q++)
			d += ndigits(nm, U(nm, q));
		if (d >= 3 && units_free(nm, k0, k1))
			if (remove_units(nm, k0, k1, NF_REFERENCE, NULL))
				return -1;
	}
	return 0;
}

/* ---- pay ---- */

static const unsigned phrase_mask_pay = 1u << LC_SCHEDULE | 1u << LC_MARKETING;

static int is_currency(normaliser *nm, size_t k, size_t *len)
{
	const tm_tok *t = U(nm, k);
	if (t->kind == TK_SYM && !strchr("&+%#@", t->ch ? t->ch : '&')) {
		*len = 1;
		return 1;
	}
	if (t->kind == TK_SYM && t->ch == 0) {
		*len = 1;
		return 1;
	}
	return match_val(nm, k, LC_PAY, "currency", 1, len) != NULL;
}

static int time_unit(normaliser *nm, size_t k, size_t *len)
{
	const lex_entry *e = match_cat(nm, k, LC_UNIT, 1, len);
	return e && (!strcmp(e->value, "hours") || !strcmp(e->value, "week") ||
		     !strcmp(e->value, "month") || !strcmp(e->value, "year") ||
		     !strcmp(e->value, "day"));
}

/* An amount: [currency] number [k] [currency].  Returns its end unit
 * (exclusive) or 0. */
static size_t amount(normaliser *nm, size_t k, int *cur, int *unit)
{
	size_t len;
	if (k < nm->nunit && ukept(nm, k) && is_currency(nm, k, &len)) {
		*cur = 1;
		k += len;
	}
	if (k >= nm->nunit || U(nm, k)->kind != TK_NUM || !ukept(nm, k))
		return 0;
	k++;
	/* 2 000, 35 000: thousands set apart by a space */
	while (k < nm->nunit && U(nm, k)->kind == TK_NUM && U(nm, k)->sp &&
	       U(nm, k)->len == 3 && ndigits(nm, U(nm, k)) == 3 &&
	       U(nm, k - 1)->len <= 3 && nm->unit[k] == nm->unit[k - 1] + 1)
		k++;
	if (k < nm->nunit && ukept(nm, k) && glued(nm, k - 1, k, "") &&
	    match_val(nm, k, LC_PAY, "unit", 1, &len) && !time_unit(nm, k, &len)) {
		*unit = 1;
		k += len;
	}
	if (k < nm->nunit && ukept(nm, k) && is_currency(nm, k, &len)) {
		*cur = 1;
		k += len;
	}
	return k;
}

int pass_pay(normaliser *nm)
{
	size_t k, len;

	for (k = 0; k < nm->nunit; k++) {
		size_t j = k, e;
		int cur = 0, unit = 0;
		if (!ukept(nm, k) || nm->prot[nm->unit[k]])
			continue;
		while (j < nm->nunit && match_val(nm, j, LC_PAY, "lead", 1, &len))
			j += len;
		if (!(e = amount(nm, j, &cur, &unit)))
			continue;
		/* a range: 3.200 - 4.000 €, 18 bis 22 €, 40/45k */
		if (e < nm->nunit) {
			size_t t = nm->unit[e - 1] + 1, r = e, e2;
			int c2 = 0, u2 = 0;
			if (t < nm->unit[e] && nm->tl.t[t].kind == TK_PUNCT &&
			    (nm->tl.t[t].ch == '-' || nm->tl.t[t].ch == '/') &&
			    t + 1 == nm->unit[e])
				r = e;
			else if (match_val(nm, e, LC_PAY, "lead", 1, &len) ||
				 (match_val(nm, e, LC_UNIT, "connector", 1, &len)))
				r = e + len;
			else
				r = SIZE_MAX;
			if (r != SIZE_MAX && (e2 = amount(nm, r, &c2, &u2))) {
				e = e2;
				cur |= c2;
				unit |= u2;
			}
		}
		/* trailing units: brutto, p.a., /h, pro Monat */
		for (;;) {
			if (e >= nm->nunit || !ukept(nm, e))
				break;
			if (match_val(nm, e, LC_PAY, "unit", 1, &len)) {
				size_t l2;
				if (!time_unit(nm, e, &l2) || l2 < len)
					unit = 1;
				e += len;
			} else if ((cur || unit) && time_unit(nm, e, &len))
				e += len;
			else if (is_currency(nm, e, &len)) {
				cur = 1;
				e += len;
			} else if ((cur || unit) &&
				   match_val(nm, e, LC_UNIT, "connector", 1, &len) &&
				   e + len < nm->nunit && time_unit(nm, e + len, &len))
				e += 1 + len;
			else
				break;
		}
		if (!cur && !unit)
			continue;
		/* a longer phrase wins: auf 520-Euro-Basis is a schedule */
		{
			size_t pl;
			const lex_entry *ph = match_mask(nm, j, phrase_mask_pay, 1, &pl);
			if (ph && j + pl >= e)
				continue;
		}
		if (remove_units(nm, k, e, NF_PAY, NULL))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* ---- schedule numbers: 20 h/Woche, 30-35 Std., 80-100 % ---- */

int pass_schedule(normaliser *nm)
{
	size_t k, len;

	for (k = 0; k < nm->nunit; k++) {
		size_t j, e;
		const lex_entry *u;
		if (U(nm, k)->kind != TK_NUM || !ukept(nm, k) || nm->prot[nm->unit[k]])
			continue;
		j = k + 1;
		/* range */
		if (j + 1 < nm->nunit && U(nm, j)->kind == TK_NUM &&
		    nm->unit[j] == nm->unit[k] + 2 &&
		    tok_is(nm, nm->unit[k] + 1, '-'))
			j++;
		else if (j + 1 < nm->nunit &&
			 (match_val(nm, j, LC_UNIT, "connector", 1, &len) ||
			  match_val(nm, j, LC_PAY, "lead", 1, &len)) &&
			 j + len < nm->nunit && U(nm, j + len)->kind == TK_NUM)
			j += len + 1;
		if (j < nm->nunit && U(nm, j)->kind == TK_SYM && U(nm, j)->ch == '%') {
			size_t b = k, l2;
			if (k > 0 && ukept(nm, k - 1) &&
			    match_val(nm, k - 1, LC_UNIT, "workload", 1, &l2) && l2 == 1)
				b = k - 1;
			if (remove_units(nm, b, j + 1, NF_WORKLOAD, NULL))
				return -1;
			k = j;
			continue;
		}
		if (j >= nm->nunit || !(u = match_cat(nm, j, LC_UNIT, 1, &len)))
			continue;
		if (!strcmp(u->value, "week")) {
			/* 20 Wochenstunden */
			e = j + len;
		} else if (!strcmp(u->value, "fte")) {
			if (remove_units(nm, k, j + len, NF_WORKLOAD, NULL))
				return -1;
			k = j + len - 1;
			continue;
		} else if (!strcmp(u->value, "month") || !strcmp(u->value, "year")) {
			/* a duration in a later segment: CDD 6 mois, 6 months */
			const seg *g = &nm->segs[useg(nm, k)];
			if (!g->bracket && g->index == 0)
				continue;
			if (remove_units(nm, k, j + len, NF_SCHEDULE, "temporary"))
				return -1;
			k = j + len - 1;
			continue;
		} else if (!strcmp(u->value, "hours")) {
			e = j + len;
			size_t l2;
			const lex_entry *w;
			if (e < nm->nunit && match_val(nm, e, LC_UNIT, "connector", 1, &l2))
				e += l2;
			else if (e < nm->nunit && (match_val(nm, e, LC_PAY, "unit", 1, &l2)))
				e += 0;
			w = e < nm->nunit ? match_cat(nm, e, LC_UNIT, 1, &l2) : NULL;
			if (w && (!strcmp(w->value, "week") || !strcmp(w->value, "month") ||
				  !strcmp(w->value, "day")))
				e += l2;
			else {
				const seg *g = &nm->segs[useg(nm, k)];
				int hv = atoi(nm->work.data + U(nm, k)->off);
				e = j + len;
				/* 35h, 32 uur, 38 Stunden are weekly hours
				 * wherever they stand (not 24h, a kind of care);
				 * a spaced "h" only in a slot */
				if (!g->bracket && g->index == 0 &&
				    !((glued(nm, j - 1, j, "") || U(nm, j)->flen >= 3) &&
				      hv >= 5 && hv <= 48 && hv != 24))
					continue;
			}
		} else
			continue;
		if (remove_units(nm, k, e, NF_HOURS, NULL))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* ---- hashtags ---- */

int pass_hashtags(normaliser *nm)
{
	for (size_t k = 0; k + 1 < nm->nunit; k++) {
		const tm_tok *t = U(nm, k);
		if (t->kind == TK_SYM && t->ch == '#' && U(nm, k + 1)->kind == TK_WORD &&
		    glued(nm, k, k + 1, "") && ukept(nm, k + 1) &&
		    !nm->prot[nm->unit[k + 1]]) {
			size_t e = k + 1;
			while (e + 1 < nm->nunit && glued(nm, e, e + 1, "-_"))
				e++;
			if (remove_units(nm, k, e + 1, NF_MARKETING, NULL))
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
static int dangling(normaliser *nm, size_t k)
{
	size_t len;
	const lex_entry *e;
	if (match_val(nm, k, LC_UNIT, "connector", 1, &len) && len == 1)
		return 1;
	if (match_val(nm, k, LC_UNIT, "contact", 1, &len) && len == 1)
		return 1;
	if (match_val(nm, k, LC_PAY, "lead", 1, &len) && len == 1)
		return 1;
	if (match_val(nm, k, LC_EMPLOYER, "marker", 1, &len) && len == 1)
		return 1;
	e = match_cat(nm, k, LC_LOCATION, 1, &len);
	return e && len == 1 && (!strcmp(e->value, "prep") || !strcmp(e->value, "before"));
}

static int removed_tok(const normaliser *nm, size_t t)
{
	return t < nm->tl.n && nm->rm[t] != RM_NONE;
}

/* Are units [k0, k1) all the words the title still has?  (Looks outward
 * from them: the nearest kept word is most often next door.) */
static int last_word(normaliser *nm, size_t k0, size_t k1)
{
	for (size_t k = k1; k < nm->nunit; k++)
		if (ukept(nm, k) && U(nm, k)->kind == TK_WORD)
			return 0;
	for (size_t k = k0; k-- > 0;)
		if (ukept(nm, k) && U(nm, k)->kind == TK_WORD)
			return 0;
	return 1;
}

static int peel_segment(normaliser *nm, size_t s, int *changed)
{
	size_t k0, k1, k, len;

	seg_kept(nm, s, &k0, &k1);
	size_t a = k0, b = k1;
	for (k = k0; k < k1; k++) {
		const lex_entry *e;
		if (nm->moff[k] == nm->moff[k + 1] || !ukept(nm, k))
			continue;
		e = match_mask(nm, k, phrase_mask, 1, &len);
		if (!e)
			continue;
		if (e->cat == LC_PAY && strcmp(e->value, "phrase"))
			continue;
		/* an edge word is never the title's last word: Principal */
		if (e->where == LW_EDGE && e->cat == LC_SENIORITY &&
		    last_word(nm, k, k + len))
			continue;
		if ((e->where == LW_EDGE && k != a && k + len != b) ||
		    (e->where == LW_ALONE && (k != a || k + len != b)) ||
		    e->where == LW_SLOT || e->where == LW_STRONG)
			continue;
		if (remove_units(nm, k, k + len, kind_of(e->cat), e->value))
			return -1;
		*changed = 1;
		k += len - 1;
		seg_kept(nm, s, &a, &b);
	}
	/* years left at an edge by the removals */
	seg_kept(nm, s, &k0, &k1);
	if (k0 < k1 && date_at_edge(nm, k0))
		*changed = 1;
	seg_kept(nm, s, &k0, &k1);
	if (k0 < k1 && date_at_edge(nm, k1 - 1))
		*changed = 1;
	/* a contact word alone in its segment: "Contact: jobs@..." */
	seg_kept(nm, s, &k0, &k1);
	if (k0 + 1 == k1 && !nm->prot[nm->unit[k0]] &&
	    match_val(nm, k0, LC_UNIT, "contact", 1, &len) && len == 1 &&
	    nm->tl.n > nm->unit[k0] + 1) {
		if (remove_units(nm, k0, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	/* hanging words at the two edges */
	seg_kept(nm, s, &k0, &k1);
	if (k0 < k1 && !nm->prot[nm->unit[k1 - 1]] && dangling(nm, k1 - 1) &&
	    (removed_tok(nm, nm->unit[k1 - 1] + 1) ||
	     (k1 < nm->nunit && !ukept(nm, k1) && useg(nm, k1) == s))) {
		if (remove_units(nm, k1 - 1, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	seg_kept(nm, s, &k0, &k1);
	if (k0 < k1 && k0 > 0 && !nm->prot[nm->unit[k0]] &&
	    match_val(nm, k0, LC_UNIT, "connector", 1, &len) && len == 1 &&
	    nm->unit[k0] > 0 && removed_tok(nm, nm->unit[k0] - 1)) {
		if (remove_units(nm, k0, k0 + 1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	return 0;
}

int pass_phrases(normaliser *nm)
{
	int changed = 1, rounds = 0;

	while (changed && rounds++ < 64) {
		changed = 0;
		for (size_t s = 0; s < nm->nseg; s++)
			if (peel_segment(nm, s, &changed))
				return -1;
	}
	return 0;
}

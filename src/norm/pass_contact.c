/* pass_contact.c - contact data (URLs, e-mail addresses, phone numbers),
 * reference codes and dates. */
#include <stdlib.h>
#include <string.h>

#include "norm/pass_noise.h"

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

static inline int is_date(const tm_title *ti, const tm_tok *t);

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

/* (inline: asked of most units by the edge rules) */
__attribute__((always_inline)) static inline int is_date(const tm_title *ti, const tm_tok *t)
{
	const char *p = ti->text + t->off;
	size_t d, n = t->len;
	if (t->kind != TK_NUM || n < 4 || n > 10)
		return 0;
	d = ndigits(ti, t);
	if (d == 4 && n == 4)
		return (p[0] == '1' && p[1] == '9') || (p[0] == '2' && p[1] == '0');
	/* dd.mm.yyyy, dd.mm.yy */
	if ((n == 10 || n == 8) && p[2] == '.' && p[5] == '.')
		return 1;
	/* d.m.yyyy, d.mm.yyyy, dd.m.yyyy (31.5.2026) */
	return (n == 8 || n == 9) && d == n - 2 && p[n - 5] == '.' &&
	       (p[1] == '.' || p[2] == '.') && p[n - 4] == '2' && p[n - 3] == '0';
}

/* Is unit k a kept number of one or two digits from 1 to max (a day or
 * a month written before a year)? */
static int day_or_month(tm_title *ti, size_t k, int max)
{
	const tm_tok *t = U(ti, k);
	const char *p = ti->text + t->off;
	int v;
	if (!ukept(ti, k) || t->kind != TK_NUM || t->len > 2 || ndigits(ti, t) != t->len)
		return 0;
	v = t->len == 2 ? (p[0] - '0') * 10 + (p[1] - '0') : p[0] - '0';
	return v >= 1 && v <= max;
}

/* A year or date at a segment edge (Ausbildung 2026, Saison 2025/26,
 * the day and month before it: 14/01/2027, 03/2027) is removed; returns 1 when
 * it was.  A number with a currency beside it
 * is an amount ("2027 € brutto", "1966 kroner"), left to the pay rule. */
int noise_date_at_edge(tm_title *ti, size_t k)
{
	size_t k0, k1, e = k + 1, len;
	if (!ukept(ti, k) || ti->prot[ti->unit[k]] || !is_date(ti, U(ti, k)))
		return 0;
	if ((e < ti->nunit && ukept(ti, e) && is_currency(ti, e, &len)) ||
	    (k > 0 && ukept(ti, k - 1) && is_currency(ti, k - 1, &len)))
		return 0;
	/* 2025/26, 2025-2026; 2026-05-31 */
	if (e < ti->nunit && glued(ti, k, e, "/-") && U(ti, e)->kind == TK_NUM &&
	    ndigits(ti, U(ti, e)) <= 4) {
		e++;
		if (U(ti, k)->len == 4 && U(ti, e - 1)->len == 2 && e < ti->nunit &&
		    glued(ti, e - 1, e, "-") && U(ti, e)->kind == TK_NUM &&
		    U(ti, e)->len == 2)
			e++;
	}
	/* dd/mm/yyyy, d-m-yyyy: the day and the month glued before the year;
	 * mm/yyyy: the month alone */
	size_t b = k;
	if (U(ti, k)->len == 4 && k >= 2 && glued(ti, k - 1, k, "/-") &&
	    glued(ti, k - 2, k - 1, "/-") && day_or_month(ti, k - 1, 12) &&
	    day_or_month(ti, k - 2, 31) && !ti->prot[ti->unit[k - 2]] &&
	    !ti->prot[ti->unit[k - 1]])
		b = k - 2;
	else if (U(ti, k)->len == 4 && k >= 1 && glued(ti, k - 1, k, "/") &&
		 day_or_month(ti, k - 1, 12) && !ti->prot[ti->unit[k - 1]] &&
		 !(k >= 2 && glued(ti, k - 2, k - 1, "/-.")))
		b = k - 1; /* mm/yyyy: 03/2027 */
	seg_kept(ti, useg(ti, k), &k0, &k1);
	if (b != k0 && e != k1)
		return 0;
	return remove_units(ti, b, e, NF_DATE, NULL) == 0;
}

/* Is units [k0, e] a code written in capitals, "SS844", "HR-2231",
 * "KO-123": code units and capitals glued, at least two letters and
 * three digits?  One letter ("A320", a type) or two digits ("ATR72")
 * are too little to tell a code from a qualifier. */
static int caps_code(tm_title *ti, size_t k0, size_t e)
{
	size_t letters = 0, digits = 0;
	for (size_t k = k0; k <= e; k++) {
		const tm_tok *t = U(ti, k);
		size_t d = ndigits(ti, t);
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			return 0;
		if (t->kind == TK_WORD && !(t->flags & TF_ALLCAPS) &&
		    !(t->len - d == 1 && (t->flags & TF_CAP)))
			return 0;
		digits += d;
		letters += t->kind == TK_WORD ? t->len - d : 0;
	}
	return letters >= 2 && digits >= 3;
}

/* Does a kept unit of [k0, k1) name an occupation: a head, a protected
 * phrase, or an occupational ending written whole ("lagerist")? */
static int names_occupation(tm_title *ti, size_t k0, size_t k1)
{
	size_t len;
	if (head_within(ti, k0, k1))
		return 1;
	for (size_t k = k0; k < k1; k++)
		if (ukept(ti, k) && match_val(ti, k, LC_OCCUPATION, "suffix", 1, &len) &&
		    ending_whole(ti, k))
			return 1;
	return 0;
}

/* An internal code written beside the occupation in the title's first
 * segment: opening the title ("SS844 Lagerist", "HR-2231: Koch", or the
 * whole first segment, "KO-123 – Koch") or ending the segment after the
 * occupation ("Koch SS844").  The occupation next to it is the signal
 * that the code qualifies nothing; a code alone stays. */
static int edge_code(tm_title *ti)
{
	size_t k0, k1, e, b;
	if (!ti->nseg || ti->segs[0].bracket)
		return 0;
	seg_kept(ti, 0, &k0, &k1);
	if (k0 >= k1)
		return 0;
	if (code_at(ti, k0) && U(ti, k0)->kind != TK_NUM &&
	    caps_code(ti, k0, e = code_end(ti, k0))) {
		size_t r0 = e + 1, r1 = k1;
		if (r0 >= k1 && ti->nseg > 1)
			seg_kept(ti, 1, &r0, &r1);
		if (r0 < r1 && names_occupation(ti, r0, r1))
			return remove_units(ti, k0, e + 1, NF_REFERENCE, NULL) ? -1 : 1;
	}
	/* the last code of the segment: back to its first unit */
	for (b = k1 - 1; b > k0 && glued(ti, b - 1, b, "-_/.") &&
	     (code_unit(ti, b - 1) || caps_unit(ti, b - 1));)
		b--;
	if (b > k0 && code_at(ti, b) && U(ti, b)->kind != TK_NUM &&
	    code_end(ti, b) + 1 == k1 && caps_code(ti, b, k1 - 1) &&
	    names_occupation(ti, k0, b))
		return remove_units(ti, b, k1, NF_REFERENCE, NULL) ? -1 : 1;
	return 0;
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
			/* a number with a currency after it, nothing but a space
			 * between, is an amount: "až 25000 Kč" (Czech "up to";
			 * German "Az" is a file number); "Ref. 7615 - CHF 8'400"
			 * is a code */
			size_t cl, ce = code_at(ti, j) ? code_end(ti, j) : 0;
			if (code_at(ti, j) &&
			    !(U(ti, j)->kind == TK_NUM && ce + 1 < ti->nunit &&
			      ti->unit[ce + 1] == ti->unit[ce] + 1 &&
			      is_currency(ti, ce + 1, &cl))) {
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
		if (is_date(ti, t) && noise_date_at_edge(ti, k))
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
	if (edge_code(ti) < 0)
		return -1;
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

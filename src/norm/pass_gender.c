/* pass_gender.c - gender markers and gendered spellings.
 *
 * Marker groups come from gender/markers*.txt.  Inflection spellings
 * (Verkäufer/in, vendeur·euse, camarero/a, Kaufmann/-frau, vendeur(se))
 * and full pairs (vendeur/vendeuse, Koch/Köchin) are recognised with the
 * ending pairs of gender/pairs*.txt and suffixes*.txt: the masculine
 * (first, base) form is kept. */
#include <string.h>

#include "norm/pass.h"

static int pair_applies(const tm_title *ti, const lex_pair *p)
{
	return !p->amb || (ti->lang && strcmp(p->lang, ti->lang) == 0);
}

static int ends_with(const char *s, size_t n, const char *e, size_t m)
{
	return m <= n && memcmp(s + n - m, e, m) == 0;
}

/* b is a written ending of a: "in", "euse", "a", "frau" after kaufmann.
 * When strict, only an ending that replaces one of a's own, of two
 * letters at least ("vendeur-euse"; "check-in" is no gender form). */
static int is_suffix(tm_title *ti, const char *a, size_t an, const char *b,
		     size_t bn, int strict)
{
	size_t n, m, i;
	const lex_pair *p = lex_pairs(ti->lx, &n);
	/* only the pairs whose ending ends as b does can be b; any decides */
	const uint32_t *g = lex_pairs_fem_last(ti->lx,
					       bn ? (unsigned char)b[bn - 1] : -1, &m);
	for (i = 0; i < m; i++) {
		const lex_pair *q = &p[g[i]];
		if (!pair_applies(ti, q) || q->flen != bn ||
		    memcmp(q->fem, b, bn) || (strict && (!q->mlen || bn < 2)))
			continue;
		/* one replaced letter is too little to tell an ending from a
		 * compound's particle ("Live-in", "Drive-in": e -> in), but
		 * for a pair of the title's own language ("créatif-ve") */
		if (strict && q->mlen < 2 && !(ti->lang && !strcmp(q->lang, ti->lang)))
			continue;
		if (ends_with(a, an, q->masc, q->mlen) && an >= (size_t)q->mlen + 2)
			return 1;
	}
	return 0;
}

/* b is the feminine form of a (both whole words). */
static inline int fem_pair(tm_title *ti, const lex_pair *q, const char *a,
		    size_t an, const char *b, size_t bn, int stem)
{
	size_t sa, sb;
	/* the lengths decide most pairs before any byte is compared */
	if (q->mlen > an || q->flen > bn)
		return 0;
	sa = an - q->mlen;
	sb = bn - q->flen;
	if (sa != sb || !((stem && sa >= 2) || (sa == 0 && an >= 3)))
		return 0;
	return pair_applies(ti, q) && ends_with(a, an, q->masc, q->mlen) &&
	       ends_with(b, bn, q->fem, q->flen) && memcmp(a, b, sa) == 0;
}

/* Only the pairs whose feminine ending ends as b does (or is empty) can
 * fit; any one that fits decides. */
static int is_fem(tm_title *ti, const char *a, size_t an, const char *b,
		  size_t bn)
{
	size_t n, m, i;
	const lex_pair *p = lex_pairs(ti->lx, &n);
	const uint32_t *g;
	/* the two share a stem of two letters at least, or a pair lists
	 * them whole (tjener/servitrice, číšník/servírka) */
	int stem = an >= 2 && bn >= 2 && a[0] == b[0] && a[1] == b[1];
	if (an < 2 || bn < 2)
		return 0;
	/* a pair fits only when b ends with its feminine ending and a
	 * with its masculine one, what precedes them as long in both
	 * (sa == sb in fem_pair): the pairs whose endings end as b and a
	 * do, or are empty (256), and differ in length as a and b do */
	const unsigned fl[4] = { (unsigned char)b[bn - 1], (unsigned char)b[bn - 1], 256, 256 };
	const unsigned ml[4] = { (unsigned char)a[an - 1], 256, (unsigned char)a[an - 1], 256 };
	for (int w = 0; w < 4; w++) {
		g = title_pairs(ti, fl[w], ml[w], (long)an - (long)bn, &m);
		for (i = 0; i < m; i++)
			if (fem_pair(ti, &p[g[i]], a, an, b, bn, stem))
				return 1;
	}
	return 0;
}

static int ascii(const char *s, size_t n)
{
	for (size_t i = 0; i < n; i++)
		if ((unsigned char)s[i] >= 0x80)
			return 0;
	return 1;
}

/* "Addetta/o", "Dependienta/e", "Direttrice/tore": the feminine written
 * first, b the masculine ending replacing its own.  The pair found, or
 * NULL.  Only ASCII endings written as their fold (so that the rendered
 * word can be cut by the same bytes), of the title's language. */
static const lex_pair *fem_first(tm_title *ti, size_t k, const char *a,
				 size_t an, const char *b, size_t bn)
{
	size_t n, i;
	const lex_pair *p = lex_pairs(ti->lx, &n);
	const tm_tok *t = U(ti, k);
	const char *raw = ti->text + t->off;
	/* endings of other languages fold plurals ("Barista/i"): only
	 * the title's own, given with --lang */
	if (!ti->lang)
		return NULL;
	for (i = 0; i < n; i++) {
		/* the lengths and bytes first: they rule out most pairs of
		 * every language before a language is compared */
		if (p[i].mlen != bn || !bn || memcmp(p[i].masc, b, bn) ||
		    strcmp(p[i].lang, ti->lang) || !ends_with(a, an, p[i].fem, p[i].flen) ||
		    an < (size_t)p[i].flen + 2 || !ascii(p[i].fem, p[i].flen) ||
		    !ascii(p[i].masc, p[i].mlen) || t->len < p[i].flen)
			continue;
		size_t j;
		for (j = 0; j < p[i].flen; j++) {
			char c = raw[t->len - p[i].flen + j];
			if ((c >= 'A' && c <= 'Z' ? c + 32 : c) != p[i].fem[j])
				break;
		}
		if (j == p[i].flen)
			return &p[i];
	}
	return NULL;
}

/* Tierarzt/-ärztin: b is the feminine of the last part of a. */
static int is_fem_tail(tm_title *ti, const char *a, size_t an, const char *b,
		       size_t bn)
{
	for (size_t i = 2; i + 2 <= an; i++)
		if (is_fem(ti, a + i, an - i, b, bn))
			return 1;
	return 0;
}

static int word_unit(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	return t->kind == TK_WORD && ukept(ti, k) && !ti->prot[ti->unit[k]];
}

/* The base word of a gendered spelling may be protected (a label, such
 * as "Verkäufer"): only its ending is removed. */
static int base_unit(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	return t->kind == TK_WORD && ukept(ti, k);
}

/* Removes tokens after unit a up to and including unit b (and a closing
 * bracket right after b when open is set). */
static int drop_after(tm_title *ti, size_t a, size_t b, int open)
{
	size_t t0 = ti->unit[a] + 1, t1 = ti->unit[b];
	if (open && t1 + 1 < ti->tl.n && (ti->tl.t[t1 + 1].flags & TF_CLOSE) &&
	    !ti->tl.t[t1 + 1].sp)
		t1++;
	return remove_toks(ti, t0, t1, NF_GENDER, NULL);
}

/* "Koch oder Köchin": a connector of the units lexicon joins a pair. */
static int is_conj(tm_title *ti, size_t k)
{
	size_t len;
	return match_val(ti, k, LC_UNIT, "connector", 1, &len) && len == 1;
}

static int pairs_and_suffixes(tm_title *ti)
{
	size_t k;

	for (k = 0; k + 1 < ti->nunit; k++) {
		uint32_t an, bn;
		const char *a, *b;
		size_t ta, tb, j = k + 1;
		const tm_tok *x;

		if (!base_unit(ti, k) || !word_unit(ti, j))
			continue;
		a = ufold(ti, k, &an);
		b = ufold(ti, j, &bn);
		if (an < 3)
			continue;
		ta = ti->unit[k];
		tb = ti->unit[j];
		x = &ti->tl.t[ta + 1];
		/* the feminine first, the masculine ending after it (before the
		 * suffixes: "o" is one) */
		const lex_pair *ff;
		if (tb == ta + 2 && x->ch == '/' && !x->sp && !ti->tl.t[tb].sp &&
		    (ff = fem_first(ti, k, a, an, b, bn))) {
			if (remove_toks(ti, ta + 1, tb, NF_GENDER, NULL))
				return -1;
			ti->madd[ta] = ff->masc;
			ti->mcut[ta] = ff->flen;
			char w[256];
			size_t wn = an - ff->flen + ff->mlen;
			if (wn < sizeof w) {
				memcpy(w, a, an - ff->flen);
				memcpy(w + an - ff->flen, ff->masc, ff->mlen);
				ti->uword[k] = lex_word(ti->lx, w, wn, tok_hash(w, wn));
			}
			k = j;
			continue;
		}
		/* written endings glued to the word: / /- * : · _ . ( */
		if (tb > ta + 1 && tb <= ta + 3 && !x->sp && !ti->tl.t[tb].sp) {
			int ok = 1, open = 0;
			for (size_t t = ta + 1; t < tb; t++) {
				const tm_tok *m = &ti->tl.t[t];
				if (m->kind != TK_PUNCT || m->sp ||
				    !m->ch || !strchr("/-*:_.(\x01", m->ch))
					ok = 0;
				if (m->ch == '(')
					open = 1;
				if (m->ch == '-' && t == ta + 1 && tb > ta + 2)
					ok = 0;
			}
			/* a hyphen alone joins compounds: only an ending
			 * that replaces the word's own */
			int hyph = x->ch == '-';
			if (ok && hyph) {
				if (is_suffix(ti, a, an, b, bn, 1)) {
					if (drop_after(ti, k, j, 0))
						return -1;
					k = j;
					continue;
				}
				ok = 0;
			}
			if (ok && (is_suffix(ti, a, an, b, bn, 0) ||
				   (x->ch != '.' && is_fem(ti, a, an, b, bn)) ||
				   (x->ch == '/' && tb == ta + 3 &&
				    ti->tl.t[ta + 2].ch == '-' &&
				    is_fem_tail(ti, a, an, b, bn)))) {
				if (drop_after(ti, k, j, open))
					return -1;
				k = j;
				continue;
			}
		}
		/* whole pairs: Koch / Köchin, vendeur, vendeuse, Koch oder Köchin */
		if (tb > ta + 1 && tb <= ta + 2 &&
		    (x->ch == '/' || x->ch == ',' || x->ch == '|')) {
			if (is_fem(ti, a, an, b, bn)) {
				if (remove_toks(ti, ta + 1, tb, NF_GENDER, NULL))
					return -1;
				k = j;
				continue;
			}
			if (is_fem(ti, b, bn, a, an)) {
				if (remove_toks(ti, ta, tb - 1, NF_GENDER, NULL))
					return -1;
				k = j;
				continue;
			}
		}
		if (tb == ta + 1 && is_conj(ti, j) && j + 1 < ti->nunit &&
		    word_unit(ti, j + 1) && ti->unit[j + 1] == tb + 1) {
			const char *c = ufold(ti, j + 1, &bn);
			if (is_fem(ti, a, an, c, bn)) {
				if (remove_toks(ti, tb, tb + 1, NF_GENDER, NULL))
					return -1;
				k = j + 1;
			}
		}
	}
	return 0;
}

/* VerkäuferIn, MitarbeiterInnen: the tokeniser split off "In"/"Innen". */
static int capital_i(tm_title *ti)
{
	for (size_t k = 1; k < ti->nunit; k++) {
		const tm_tok *t = U(ti, k), *p = U(ti, k - 1);
		char both[256];
		size_t len;
		if (!(t->flags & TF_CAPSUF) || ti->unit[k - 1] + 1 != ti->unit[k] ||
		    !word_unit(ti, k) || !base_unit(ti, k - 1))
			continue;
		len = p->flen + t->flen;
		if (len < sizeof both) {
			memcpy(both, tok_fold(&ti->tl, p), p->flen);
			memcpy(both + p->flen, tok_fold(&ti->tl, t), t->flen);
			/* a protected whole word (linkedin) is no gender form */
			uint32_t w = lex_word(ti->lx, both, len, tok_hash(both, len));
			int prot = 0;
			for (const lex_entry *e = lex_phrase(ti->lx, lex_step(ti->lx, LEX_ROOT, w), NULL);
			     e; e = lex_next(ti->lx, e))
				if (e->cat == LC_PROTECT)
					prot = 1;
			if (prot)
				continue;
		}
		if (remove_units(ti, k, k + 1, NF_GENDER, NULL))
			return -1;
	}
	return 0;
}

static int markers(tm_title *ti)
{
	size_t k = 0, len;
	while (k < ti->nunit) {
		const lex_entry *e = match_cat(ti, k, LC_MARKER, 1, &len);
		if (e && e->where == LW_ANY) {
			if (remove_units(ti, k, k + len, NF_GENDER, NULL))
				return -1;
			k += len;
		} else
			k++;
	}
	return 0;
}

/* The pair whose feminine is "@": the masculine ending that a glued "@"
 * stands for with its feminine ("camarer@" = camarero/camarera), NULL
 * when the title's language has none. */
static const lex_pair *at_pair(tm_title *ti)
{
	size_t n, m, i;
	const lex_pair *p = lex_pairs(ti->lx, &n);
	/* the first in file order of those ending in "@": the title's
	 * language's own, or any when none is given */
	const uint32_t *g = lex_pairs_fem_last(ti->lx, '@', &m);
	for (i = 0; i < m; i++)
		if (p[g[i]].flen == 1 &&
		    (!ti->lang || !strcmp(p[g[i]].lang, ti->lang)))
			return &p[g[i]];
	return NULL;
}

/* Is a (an bytes) already a whole masculine form: it ends with a
 * masculine ending of the "@" pair's language whose feminine adds to it
 * what the feminine of the "@" pair's masculine is ("profesor@": "or"
 * and "ora", as "o" and "a")? */
static int whole_masc(tm_title *ti, const char *a, size_t an, const lex_pair *at)
{
	size_t n, i, fn = 0;
	const lex_pair *p = lex_pairs(ti->lx, &n);
	const char *f = NULL;
	/* the feminine ending the "@" pair's masculine pairs with in the
	 * same language: "a" */
	for (i = 0; i < n && !f; i++)
		if (!strcmp(p[i].lang, at->lang) && p[i].mlen == at->mlen &&
		    !memcmp(p[i].masc, at->masc, at->mlen) && p[i].fem[0] != '@') {
			f = p[i].fem;
			fn = p[i].flen;
		}
	if (!f)
		return 0;
	for (i = 0; i < n; i++)
		if (!strcmp(p[i].lang, at->lang) && p[i].mlen &&
		    p[i].flen == p[i].mlen + fn &&
		    !memcmp(p[i].fem, p[i].masc, p[i].mlen) &&
		    !memcmp(p[i].fem + p[i].mlen, f, fn) &&
		    ends_with(a, an, p[i].masc, p[i].mlen) && an >= (size_t)p[i].mlen + 2)
			return 1;
	return 0;
}

/* "camarer@", "profesor@", "addett*": a glued "@" (or, in a language
 * given with --lang, "*") ending a word stands for both endings of the
 * language's "@" pair.  It is removed
 * and, unless the word is a whole masculine form already, the
 * masculine ending is written after the word. */
static int open_endings(tm_title *ti)
{
	/* the pair is looked for at the first such ending: most lines
	 * with a symbol or a joiner have none */
	const lex_pair *at = NULL;
	for (size_t k = 0; k < ti->nunit; k++) {
		size_t ta = ti->unit[k];
		const tm_tok *x, *y;
		uint32_t an;
		const char *a;
		if (!base_unit(ti, k) || ta + 1 >= ti->tl.n)
			continue;
		x = &ti->tl.t[ta + 1];
		/* "*" marks a footnote too: read as an ending only in a
		 * language that writes "@" for one */
		if (x->sp || (x->ch != '@' && (x->ch != '*' || !ti->lang)) ||
		    ti->rm[ta + 1] != RM_NONE)
			continue;
		/* the word ends there: "Verkäufer*in" is a suffix */
		y = ta + 2 < ti->tl.n ? &ti->tl.t[ta + 2] : NULL;
		if (y && !y->sp && y->kind != TK_PUNCT)
			continue;
		a = ufold(ti, k, &an);
		if (an < 3)
			continue;
		if (!at && !(at = at_pair(ti)))
			return 0;
		if (remove_toks(ti, ta + 1, ta + 1, NF_GENDER, NULL))
			return -1;
		if (at->mlen && !whole_masc(ti, a, an, at)) {
			char w[256];
			ti->madd[ta] = at->masc;
			/* the scan reads the word with its ending */
			if (an + at->mlen < sizeof w) {
				memcpy(w, a, an);
				memcpy(w + an, at->masc, at->mlen);
				ti->uword[k] = lex_word(ti->lx, w, an + at->mlen,
							tok_hash(w, an + at->mlen));
			}
		}
	}
	return 0;
}

/* "Medewerk(st)er": a bracketed infix glued between two parts of a
 * word, where the word without it ends with a masculine ending and the
 * infix followed by that ending is its feminine ("er"/"ster").  The
 * infix is removed and the two parts are written as one word. */
static int infixes(tm_title *ti)
{
	for (size_t k = 0; k + 2 < ti->nunit; k++) {
		size_t ta = ti->unit[k], n, i;
		uint32_t in, bn, an;
		const tm_tok *o = ta + 1 < ti->tl.n ? &ti->tl.t[ta + 1] : NULL;
		if (!o || !(o->flags & TF_OPEN) || o->sp || ti->unit[k + 1] != ta + 2 ||
		    ti->unit[k + 2] != ta + 4 || !(ti->tl.t[ta + 3].flags & TF_CLOSE) ||
		    ti->tl.t[ta + 2].sp || ti->tl.t[ta + 3].sp || ti->tl.t[ta + 4].sp ||
		    !base_unit(ti, k) || !word_unit(ti, k + 1) || !word_unit(ti, k + 2))
			continue;
		const char *a = ufold(ti, k, &an);
		const char *x = ufold(ti, k + 1, &in);
		const char *b = ufold(ti, k + 2, &bn);
		const lex_pair *p = lex_pairs(ti->lx, &n);
		char w[256];
		for (i = 0; i < n; i++)
			if (pair_applies(ti, &p[i]) && p[i].mlen &&
			    ends_with(b, bn, p[i].masc, p[i].mlen) &&
			    p[i].flen == in + p[i].mlen && !memcmp(p[i].fem, x, in) &&
			    !memcmp(p[i].fem + in, p[i].masc, p[i].mlen))
				break;
		if (i == n || an < 2)
			continue;
		if (remove_toks(ti, ta + 1, ta + 3, NF_GENDER, NULL))
			return -1;
		ti->madd[ta] = title_glue;
		/* the scan reads the whole word at the first part */
		if (an + bn < sizeof w) {
			memcpy(w, a, an);
			memcpy(w + an, b, bn);
			ti->uword[k] = lex_word(ti->lx, w, an + bn, tok_hash(w, an + bn));
			ti->uword[k + 2] = 0;
		}
		k += 2;
	}
	return 0;
}

/* How unit j > 0 is joined to the one before: 1 a space, 2 a glued
 * hyphen ("kasjer-sprzedawca"), 0 otherwise. */
static int joint(const tm_title *ti, size_t j)
{
	size_t a = ti->unit[j - 1], b = ti->unit[j];
	if (b == a + 1)
		return ti->tl.t[b].sp ? 1 : 0;
	if (b == a + 2 && ti->tl.t[a + 1].ch == '-' && !ti->tl.t[a + 1].sp &&
	    !ti->tl.t[b].sp && ti->rm[a + 1] == RM_NONE)
		return 2;
	return 0;
}

/* Are units [k, k + n) kept words of one segment, apart or hyphened?
 * (A label may protect either form: "vedoucí směny".) */
static int word_run(tm_title *ti, size_t k, size_t n)
{
	if (k + n > ti->nunit)
		return 0;
	for (size_t j = k; j < k + n; j++)
		if (!base_unit(ti, j) || useg(ti, j) != useg(ti, k) ||
		    (j > k && !joint(ti, j)))
			return 0;
	return 1;
}

/* Longest gendered phrase written twice across a spaced slash: the
 * adjectives agree with the noun ("Samodzielny księgowy / Samodzielna
 * księgowa", "Starszy specjalista / Starsza specjalistka ds.
 * sprzedaży"), a hyphened compound ("Kasjer-sprzedawca /
 * Kasjerka-sprzedawczyni"), or the two forms coincide ("Vedoucí směny / vedoucí
 * směny", when each is its whole segment: "Sales / Sales Manager"
 * stays).  The second form is
 * removed.  At most PAIR_WORDS words a side are compared at each slash. */
#define PAIR_WORDS 3
static int phrase_pairs(tm_title *ti)
{
	for (size_t k = 1; k < ti->nunit; k++) {
		size_t tl = ti->unit[k - 1], tr = ti->unit[k], n;
		if (tr != tl + 2 || ti->tl.t[tl + 1].ch != '/' ||
		    !(ti->tl.t[tl + 1].flags & TF_STRONG) || ti->rm[tl + 1] != RM_NONE)
			continue;
		for (n = PAIR_WORDS; n >= 1; n--) {
			size_t l0, i, fem = 0, same = 0;
			if (n > k || !word_run(ti, k - n, n) || !word_run(ti, k, n))
				continue;
			l0 = k - n;
			for (i = 0; i < n; i++) {
				uint32_t an, bn;
				/* joined alike on both sides */
				if (i && joint(ti, l0 + i) != joint(ti, k + i))
					break;
				const char *a = ufold(ti, l0 + i, &an);
				const char *b = ufold(ti, k + i, &bn);
				if (an == bn && !memcmp(a, b, an))
					same++;
				else if (is_fem(ti, a, an, b, bn))
					fem++;
				else
					break;
			}
			if (same + fem != n)
				continue;
			/* the same words: only a whole first segment
			 * repeated, and only a name of at least one word
			 * of three letters */
			if (!fem) {
				uint32_t an;
				size_t s0, s1, r0, r1;
				seg_kept(ti, useg(ti, l0), &s0, &s1);
				seg_kept(ti, useg(ti, k), &r0, &r1);
				ufold(ti, l0, &an);
				if (s0 != l0 || s1 != k || r0 != k || r1 != k + n || an < 3)
					continue;
			}
			/* the second form is the first one's other gender:
			 * a protection it carries is the first one's */
			for (size_t t = tl + 1; t <= ti->unit[k + n - 1]; t++)
				ti->prot[t] = 0;
			if (remove_toks(ti, tl + 1, ti->unit[k + n - 1], NF_GENDER, NULL))
				return -1;
			k += n - 1;
			break;
		}
	}
	return 0;
}

int pass_gender(tm_title *ti)
{
	if ((ti->lflags & (LF_SYM | LF_JOIN)) && open_endings(ti))
		return -1;
	if ((ti->lflags & LF_JOIN) && (phrase_pairs(ti) || infixes(ti)))
		return -1;
	if ((HAS(ti, LC_MARKER) && markers(ti)) ||
	    ((ti->lflags & LF_CAPSUF) && capital_i(ti)) ||
	    (((ti->lflags & LF_JOIN) || HAS(ti, LC_UNIT)) && pairs_and_suffixes(ti)))
		return -1;
	return 0;
}

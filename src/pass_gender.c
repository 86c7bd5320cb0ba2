/* pass_gender.c - gender markers and gendered spellings.
 *
 * Marker groups come from gender/markers*.txt.  Inflection spellings
 * (Verkäufer/in, vendeur·euse, camarero/a, Kaufmann/-frau, vendeur(se))
 * and full pairs (vendeur/vendeuse, Koch/Köchin) are recognised with the
 * ending pairs of gender/pairs*.txt and suffixes*.txt: the masculine
 * (first, base) form is kept. */
#include <string.h>

#include "pass.h"

static int pair_applies(const normaliser *nm, const lex_pair *p)
{
	return !p->amb || (nm->lang && strcmp(p->lang, nm->lang) == 0);
}

static int ends_with(const char *s, size_t n, const char *e, size_t m)
{
	return m <= n && memcmp(s + n - m, e, m) == 0;
}

/* b is a written ending of a: "in", "euse", "a", "frau" after kaufmann. */
static int is_suffix(normaliser *nm, const char *a, size_t an, const char *b,
		     size_t bn)
{
	size_t n, i;
	const lex_pair *p = lex_pairs(nm->lx, &n);
	for (i = 0; i < n; i++) {
		if (!pair_applies(nm, &p[i]) || p[i].flen != bn ||
		    memcmp(p[i].fem, b, bn))
			continue;
		if (ends_with(a, an, p[i].masc, p[i].mlen) && an >= (size_t)p[i].mlen + 2)
			return 1;
	}
	return 0;
}

/* b is the feminine form of a (both whole words). */
static int is_fem(normaliser *nm, const char *a, size_t an, const char *b,
		  size_t bn)
{
	size_t n, i;
	const lex_pair *p = lex_pairs(nm->lx, &n);
	/* the two share a stem of two letters at least */
	if (an < 2 || bn < 2 || a[0] != b[0] || a[1] != b[1])
		return 0;
	for (i = 0; i < n; i++) {
		size_t sa, sb;
		if (!pair_applies(nm, &p[i]))
			continue;
		if (!ends_with(a, an, p[i].masc, p[i].mlen) ||
		    !ends_with(b, bn, p[i].fem, p[i].flen))
			continue;
		sa = an - p[i].mlen;
		sb = bn - p[i].flen;
		if (sa == sb && sa >= 2 && memcmp(a, b, sa) == 0)
			return 1;
	}
	return 0;
}

/* Tierarzt/-ärztin: b is the feminine of the last part of a. */
static int is_fem_tail(normaliser *nm, const char *a, size_t an, const char *b,
		       size_t bn)
{
	for (size_t i = 2; i + 2 <= an; i++)
		if (is_fem(nm, a + i, an - i, b, bn))
			return 1;
	return 0;
}

static int word_unit(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	return t->kind == TK_WORD && ukept(nm, k) && !nm->prot[nm->unit[k]];
}

/* The base word of a gendered spelling may be protected (a label, such
 * as "Verkäufer"): only its ending is removed. */
static int base_unit(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	return t->kind == TK_WORD && ukept(nm, k);
}

/* Removes tokens after unit a up to and including unit b (and a closing
 * bracket right after b when open is set). */
static int drop_after(normaliser *nm, size_t a, size_t b, int open)
{
	size_t t0 = nm->unit[a] + 1, t1 = nm->unit[b];
	if (open && t1 + 1 < nm->tl.n && (nm->tl.t[t1 + 1].flags & TF_CLOSE) &&
	    !nm->tl.t[t1 + 1].sp)
		t1++;
	return remove_toks(nm, t0, t1, NF_GENDER, NULL);
}

/* "Koch oder Köchin": a connector of the units lexicon joins a pair. */
static int is_conj(normaliser *nm, size_t k)
{
	size_t len;
	return match_val(nm, k, LC_UNIT, "connector", 1, &len) && len == 1;
}

static int pairs_and_suffixes(normaliser *nm)
{
	size_t k;

	for (k = 0; k + 1 < nm->nunit; k++) {
		uint32_t an, bn;
		const char *a, *b;
		size_t ta, tb, j = k + 1;
		const tm_tok *x;

		if (!base_unit(nm, k) || !word_unit(nm, j))
			continue;
		a = ufold(nm, k, &an);
		b = ufold(nm, j, &bn);
		if (an < 3)
			continue;
		ta = nm->unit[k];
		tb = nm->unit[j];
		x = &nm->tl.t[ta + 1];
		/* written endings glued to the word: / /- * : · _ . ( */
		if (tb > ta + 1 && tb <= ta + 3 && !x->sp && !nm->tl.t[tb].sp) {
			int ok = 1, open = 0;
			for (size_t t = ta + 1; t < tb; t++) {
				const tm_tok *m = &nm->tl.t[t];
				if (m->kind != TK_PUNCT || m->sp ||
				    !m->ch || !strchr("/-*:_.(\x01", m->ch))
					ok = 0;
				if (m->ch == '(')
					open = 1;
				if (m->ch == '-' && t == ta + 1)
					ok = 0;
			}
			if (ok && (is_suffix(nm, a, an, b, bn) ||
				   (x->ch != '.' && is_fem(nm, a, an, b, bn)) ||
				   (x->ch == '/' && tb == ta + 3 &&
				    nm->tl.t[ta + 2].ch == '-' &&
				    is_fem_tail(nm, a, an, b, bn)))) {
				if (drop_after(nm, k, j, open))
					return -1;
				k = j;
				continue;
			}
		}
		/* whole pairs: Koch / Köchin, vendeur, vendeuse, Koch oder Köchin */
		if (tb > ta + 1 && tb <= ta + 2 &&
		    (x->ch == '/' || x->ch == ',' || x->ch == '|')) {
			if (is_fem(nm, a, an, b, bn)) {
				if (remove_toks(nm, ta + 1, tb, NF_GENDER, NULL))
					return -1;
				k = j;
				continue;
			}
			if (is_fem(nm, b, bn, a, an)) {
				if (remove_toks(nm, ta, tb - 1, NF_GENDER, NULL))
					return -1;
				k = j;
				continue;
			}
		}
		if (tb == ta + 1 && is_conj(nm, j) && j + 1 < nm->nunit &&
		    word_unit(nm, j + 1) && nm->unit[j + 1] == tb + 1) {
			const char *c = ufold(nm, j + 1, &bn);
			if (is_fem(nm, a, an, c, bn)) {
				if (remove_toks(nm, tb, tb + 1, NF_GENDER, NULL))
					return -1;
				k = j + 1;
			}
		}
	}
	return 0;
}

/* VerkäuferIn, MitarbeiterInnen: the tokeniser split off "In"/"Innen". */
static int capital_i(normaliser *nm)
{
	for (size_t k = 1; k < nm->nunit; k++) {
		const tm_tok *t = U(nm, k), *p = U(nm, k - 1);
		char both[256];
		size_t len;
		if (!(t->flags & TF_CAPSUF) || nm->unit[k - 1] + 1 != nm->unit[k] ||
		    !word_unit(nm, k) || !base_unit(nm, k - 1))
			continue;
		len = p->flen + t->flen;
		if (len < sizeof both) {
			memcpy(both, tok_fold(&nm->tl, p), p->flen);
			memcpy(both + p->flen, tok_fold(&nm->tl, t), t->flen);
			/* a protected whole word (linkedin) is no gender form */
			uint64_t th = tok_hash(both, len);
			const char *f[1] = {both};
			uint32_t fl[1] = {(uint32_t)len};
			uint64_t seq = lex_seq_final(lex_seq_step(LEX_SEQ_SEED, th), 1);
			const lex_entry *e = lex_find(nm->lx, seq, 1, f, fl);
			int prot = 0;
			for (; e; e = lex_next(nm->lx, e))
				if (e->cat == LC_PROTECT)
					prot = 1;
			if (prot)
				continue;
		}
		if (remove_units(nm, k, k + 1, NF_GENDER, NULL))
			return -1;
	}
	return 0;
}

static int markers(normaliser *nm)
{
	size_t k = 0, len;
	while (k < nm->nunit) {
		const lex_entry *e = match_cat(nm, k, LC_MARKER, 1, &len);
		if (e && e->where == LW_ANY) {
			if (remove_units(nm, k, k + len, NF_GENDER, NULL))
				return -1;
			k += len;
		} else
			k++;
	}
	return 0;
}

int pass_gender(normaliser *nm)
{
	if ((HAS(nm, LC_MARKER) && markers(nm)) ||
	    ((nm->lflags & LF_CAPSUF) && capital_i(nm)) ||
	    (((nm->lflags & LF_JOIN) || HAS(nm, LC_UNIT)) && pairs_and_suffixes(nm)))
		return -1;
	return 0;
}

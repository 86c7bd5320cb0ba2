/* pass_place.c - employer slots and location slots.
 *
 * A place name is removed only where it stands in a location slot: after
 * a location preposition or region word (in, à, Raum, région), before a
 * region word (area, und Umgebung), next to a postcode, or as the whole
 * of a bracket or of a later segment (" - Köln", ", Paris", "(Berlin)").
 * Place names that are also ordinary words (WHERE `strong`) need the
 * first three. */
#include <string.h>

#include "pass.h"

static int cap_word(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	return (t->flags & (TF_CAP | TF_ALLCAPS)) != 0;
}

static int all_caps_line(normaliser *nm)
{
	size_t words = 0, caps = 0;
	for (size_t k = 0; k < nm->nunit; k++) {
		const tm_tok *t = U(nm, k);
		if (t->kind != TK_WORD || t->len < 2)
			continue;
		words++;
		caps += (t->flags & TF_ALLCAPS) != 0;
	}
	return words >= 2 && caps * 5 >= words * 4;
}

/* A place starting at unit k: its length, whether it needs a strong slot,
 * and its country. */
static int place_at(normaliser *nm, size_t k, size_t *len, int *strong,
		    const char **cc)
{
	const lex_entry *e = match_cat(nm, k, LC_PLACE, 1, len);
	if (!e)
		return 0;
	*strong = 0;
	*cc = NULL;
	for (; e; e = lex_next(nm->lx, e)) {
		if (e->cat != LC_PLACE || !entry_applies(nm, e))
			continue;
		if (e->where == LW_STRONG)
			*strong = 1;
		if (!*cc && strcmp(e->value, "-"))
			*cc = e->value;
	}
	return 1;
}

static int num_digits(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	const char *p = nm->work.data + t->off;
	if (t->kind != TK_NUM)
		return -1;
	for (uint32_t i = 0; i < t->len; i++)
		if (p[i] < '0' || p[i] > '9')
			return -1;
	return (int)t->len;
}

static int letters_only(normaliser *nm, size_t k, size_t lo, size_t hi)
{
	const tm_tok *t = U(nm, k);
	if (t->kind != TK_WORD || (t->flags & TF_DIGIT) || t->len < lo || t->len > hi)
		return 0;
	return (t->flags & TF_ALLCAPS) || t->len == 1;
}

/* A postcode at unit k: 50667, D-50667, 00-950, SW1A 1AA, 1012 AB. */
static size_t postcode_at(normaliser *nm, size_t k)
{
	int d;
	if (k >= nm->nunit || !ukept(nm, k) || nm->prot[nm->unit[k]])
		return 0;
	d = num_digits(nm, k);
	if ((d == 2 || d == 4) && k + 1 < nm->nunit && glued(nm, k, k + 1, "-") &&
	    num_digits(nm, k + 1) == 3)
		return 2; /* PL 00-950, PT 1100-148 */
	if (d == 4 && k + 1 < nm->nunit && letters_only(nm, k + 1, 2, 2) &&
	    !glued(nm, k, k + 1, ""))
		return 2;
	/* CZ, SK, GR, SE: 702 00, 111 22 */
	if (d == 3 && k + 1 < nm->nunit && num_digits(nm, k + 1) == 2 &&
	    !glued(nm, k, k + 1, ""))
		return 2;
	if (d == 4 || d == 5)
		return 1;
	if (letters_only(nm, k, 1, 2) && k + 1 < nm->nunit &&
	    glued(nm, k, k + 1, "-") && (num_digits(nm, k + 1) == 4 ||
					  num_digits(nm, k + 1) == 5))
		return 2;
	/* UK: outward code (letters then a digit) and inward code (digit and
	 * two letters, split by the tokeniser into 1 + AA) */
	{
		const tm_tok *t = U(nm, k);
		if (t->kind == TK_WORD && (t->flags & TF_DIGIT) && t->len >= 2 &&
		    t->len <= 4 && (t->flags & TF_CAP) && k + 2 < nm->nunit &&
		    num_digits(nm, k + 1) == 1 && glued(nm, k + 1, k + 2, "") &&
		    letters_only(nm, k + 2, 2, 2))
			return 3;
	}
	return 0;
}

static int loc_word(normaliser *nm, size_t k, const char *value, size_t *len)
{
	const lex_entry *e = match_val(nm, k, LC_LOCATION, value, 1, len);
	if (!e)
		return 0;
	/* a country code is one only in capitals: DE, not "de" */
	if (!strcmp(e->value, "country-code") && !(U(nm, k)->flags & TF_ALLCAPS))
		return value == NULL && match_val(nm, k, LC_LOCATION, "prep", 1, len);
	return 1;
}

/* An acronym in a mixed-case title is no place unless the lexicon
 * writes the place in capitals too: (OSS) is a qualification, not Oss;
 * NRW is a region. */
static int acronym(normaliser *nm, size_t k, size_t len, int caps)
{
	const tm_tok *t = U(nm, k);
	size_t l2;
	if (caps || len != 1 || !(t->flags & TF_ALLCAPS) || t->len > 4)
		return 0;
	for (const lex_entry *e = match_cat(nm, k, LC_PLACE, 1, &l2); e;
	     e = lex_next(nm->lx, e))
		if (e->cat == LC_PLACE && e->caps && entry_applies(nm, e))
			return 0;
	return 1;
}

/* From unit k (a place), the end of a run of places joined by
 * connectors or slashes: Köln/Bonn, Köln und Bonn. */
static size_t place_run(normaliser *nm, size_t k, size_t plen, int allow_strong)
{
	size_t e = k + plen, len, l2;
	int strong;
	const char *cc;

	for (;;) {
		size_t j = e;
		if (j < nm->nunit && match_val(nm, j, LC_UNIT, "connector", 1, &len))
			j += len;
		if (j < nm->nunit && useg(nm, j) == useg(nm, k) &&
		    place_at(nm, j, &l2, &strong, &cc) && (allow_strong || !strong))
			e = j + l2;
		else
			break;
	}
	if (e < nm->nunit && loc_word(nm, e, "after", &len))
		e += len;
	if ((len = postcode_at(nm, e)) && useg(nm, e) == useg(nm, k))
		e += len;
	return e;
}

/* Removes a place of len units at k, with an apostrophe written
 * against its start ('s-Hertogenbosch). */
static int remove_place(normaliser *nm, size_t k, size_t len, const char *cc)
{
	size_t t0 = nm->unit[k];
	if (t0 > 0 && !nm->tl.t[t0].sp && nm->tl.t[t0 - 1].kind == TK_PUNCT &&
	    nm->tl.t[t0 - 1].ch == '\'' && (t0 == 1 || nm->tl.t[t0 - 1].sp))
		t0--;
	return remove_toks(nm, t0, nm->unit[k + len - 1], NF_LOCATION, cc);
}

/* Removes units [k, e) of a location slot piece by piece: places as
 * locations (their facet), the rest (prepositions, region words,
 * postcodes, connectors) as slot words. */
static int take(normaliser *nm, size_t k, size_t e)
{
	size_t len;
	int strong;
	const char *cc;

	while (k < e) {
		if (place_at(nm, k, &len, &strong, &cc) && k + len <= e) {
			if (remove_place(nm, k, len, cc))
				return -1;
		} else {
			if (!(len = postcode_at(nm, k)) || k + len > e)
				len = 1;
			if (remove_units(nm, k, k + len, NF_SLOT, NULL))
				return -1;
		}
		k += len;
	}
	return 0;
}

static int slots(normaliser *nm)
{
	size_t k, len, plen, pc;
	int strong;
	const char *cc;

	for (k = 0; k < nm->nunit; k++) {
		if (!ukept(nm, k) || nm->prot[nm->unit[k]])
			continue;
		/* in Köln, Raum Stuttgart, à 75001 Paris */
		if (loc_word(nm, k, "prep", &len) || loc_word(nm, k, "before", &len)) {
			size_t j = k + len, e;
			/* at most a few slot words in a row ("in der Region"): a
			 * run of them to the end of the line, tried again from
			 * each of its words, was quadratic ("a/" x 50,000) */
			for (int more = 0; more < 4 && j < nm->nunit &&
					   (loc_word(nm, j, "before", &plen) ||
					    loc_word(nm, j, "prep", &plen)); more++)
				j += plen;
			pc = postcode_at(nm, j);
			if (j + pc < nm->nunit && useg(nm, j + pc) == useg(nm, k) &&
			    place_at(nm, j + pc, &plen, &strong, &cc)) {
				e = place_run(nm, j + pc, plen, 1);
				if (take(nm, k, e))
					return -1;
				k = e - 1;
				continue;
			}
		}
		/* 50667 Köln */
		if ((pc = postcode_at(nm, k)) && k + pc < nm->nunit &&
		    place_at(nm, k + pc, &plen, &strong, &cc)) {
			size_t e = place_run(nm, k + pc, plen, 1);
			if (take(nm, k, e))
				return -1;
			k = e - 1;
			continue;
		}
		/* Paris area, Köln und Umgebung, Paris 75001 */
		if (place_at(nm, k, &plen, &strong, &cc)) {
			size_t e = k + plen;
			if (e < nm->nunit && (loc_word(nm, e, "after", &len) ||
					      (len = postcode_at(nm, e)))) {
				e = place_run(nm, k, plen, 1);
				if (take(nm, k, e))
					return -1;
				k = e - 1;
			} else
				k += plen - 1; /* Roveredo in Piano: no "in Piano" inside */
		}
	}
	return 0;
}

/* A bracket or later segment made only of location words. */
static int whole_segments(normaliser *nm)
{
	int caps = all_caps_line(nm);
	for (size_t s = 0; s < nm->nseg; s++) {
		const seg *g = &nm->segs[s];
		size_t k0, k1, k, len;
		int any = 0, weak = 0, need_strong = 0, ok = 1;
		const char *cc = NULL, *c;
		int strong;

		if (!g->bracket && g->index == 0 && !g->resumed)
			continue;
		seg_kept(nm, s, &k0, &k1);
		if (k0 >= k1)
			continue;
		for (k = k0; k < k1 && ok;) {
			if (!ukept(nm, k)) {
				k++;
				continue;
			}
			if (nm->prot[nm->unit[k]]) {
				ok = 0;
			} else if (place_at(nm, k, &len, &strong, &c) &&
				   !acronym(nm, k, len, caps)) {
				any = 1;
				if (strong)
					need_strong = 1;
				else
					weak = 1;
				if (!cc)
					cc = c;
				k += len;
				/* Hamburg-Harburg: a district glued to its city */
				if (!strong && k < k1 && glued(nm, k - 1, k, "-") &&
				    cap_word(nm, k) && U(nm, k)->kind == TK_WORD)
					k++;
			} else if (loc_word(nm, k, "country-code", &len)) {
				any = weak = 1;
				k += len;
			} else if ((len = postcode_at(nm, k))) {
				weak = 1;
				k += len;
			} else if (loc_word(nm, k, NULL, &len) ||
				   match_val(nm, k, LC_UNIT, "connector", 1, &len)) {
				weak = 1;
				k += len;
			} else
				ok = 0;
		}
		if (!ok || !any || (need_strong && !weak))
			continue;
		(void)cc;
		for (k = k0; k < k1;) {
			if (!ukept(nm, k)) {
				k++;
				continue;
			}
			if (place_at(nm, k, &len, &strong, &c)) {
				if (!strong && k + len < k1 && glued(nm, k + len - 1, k + len, "-") &&
				    cap_word(nm, k + len) && U(nm, k + len)->kind == TK_WORD)
					len++;
				if (remove_place(nm, k, len, c))
					return -1;
			} else if (loc_word(nm, k, "country-code", &len)) {
				if (remove_units(nm, k, k + len, NF_LOCATION, NULL))
					return -1;
			} else {
				if (!(len = postcode_at(nm, k)))
					len = 1;
				if (remove_units(nm, k, k + len, NF_SLOT, NULL))
					return -1;
			}
			k += len;
		}
	}
	return 0;
}

/* A bracket right after a removed place holding only a department or
 * province number or code: Bordeaux (33), Milano (MI), Paris (75). */
static int after_place(normaliser *nm)
{
	for (size_t s = 1; s < nm->nseg; s++) {
		const seg *g = &nm->segs[s];
		size_t k0, k1, open;
		if (!g->bracket)
			continue;
		seg_kept(nm, s, &k0, &k1);
		if (k1 != k0 + 1 || g->u0 == 0 || !units_free(nm, k0, k1))
			continue;
		open = nm->unit[k0] - 1;
		if (!(nm->tl.t[open].flags & TF_OPEN) || open == 0 ||
		    nm->rm[open - 1] != NF_LOCATION)
			continue;
		const tm_tok *t = U(nm, k0);
		int d = num_digits(nm, k0);
		if ((d >= 1 && d <= 3) ||
		    (t->kind == TK_WORD && (t->flags & TF_ALLCAPS) && t->len == 2))
			if (remove_units(nm, k0, k1, NF_SLOT, NULL))
				return -1;
	}
	return 0;
}

int pass_location(normaliser *nm)
{
	if (slots(nm) || whole_segments(nm) || after_place(nm))
		return -1;
	return 0;
}

/* ---- employers ---- */

/* A legal form of any language written in capitals at the end of a
 * segment, after a capitalised name: Norrsvalk Krog AB, Mirandol SAS. */
static int caps_legal(normaliser *nm, size_t k, size_t *len)
{
	size_t k0, k1;
	const lex_entry *e;
	if (!(U(nm, k)->flags & TF_ALLCAPS) || k == 0 || !cap_word(nm, k - 1) ||
	    !ukept(nm, k - 1))
		return 0;
	nm->any_lang = 1;
	e = match_val(nm, k, LC_EMPLOYER, "legal", 1, len);
	nm->any_lang = 0;
	if (!e)
		return 0;
	seg_kept(nm, useg(nm, k), &k0, &k1);
	return k + *len == k1 && k - 1 >= k0 &&
	       (nm->segs[useg(nm, k)].index > 0 || nm->segs[useg(nm, k)].bracket);
}

/* Does a segment after s hold kept words? */
static int later_content(normaliser *nm, size_t s)
{
	for (size_t t = s + 1; t < nm->nseg; t++) {
		size_t a, b;
		seg_kept(nm, t, &a, &b);
		if (a < b)
			return 1;
	}
	return 0;
}

int pass_employer(normaliser *nm)
{
	size_t k, len, k0, k1;
	int caps = all_caps_line(nm);

	/* legal forms: Nordwerk GmbH, Maison Ortalie SARL */
	for (k = 0; k < nm->nunit; k++) {
		size_t start, m;
		uint32_t s;
		const seg *g;
		if (!match_val(nm, k, LC_EMPLOYER, "legal", 1, &len) &&
		    !caps_legal(nm, k, &len))
			continue;
		s = useg(nm, k);
		g = &nm->segs[s];
		seg_kept(nm, s, &k0, &k1);
		start = SIZE_MAX;
		for (m = k; m > k0 && k - m < EMPLOYER_BACK; m--) {
			size_t l2;
			if (match_val(nm, m - 1, LC_EMPLOYER, "marker", 1, &l2)) {
				start = m - 1;
				break;
			}
		}
		if (start == SIZE_MAX) {
			if (g->bracket || g->index > 0)
				start = k0;
			else if (k > k0 && k - k0 <= 3 &&
				 (k + len < k1 || later_content(nm, s)))
				start = k0; /* Nordwerk GmbH sucht ..., Nordwerk GmbH - Koch */
			else {
				/* the capitalised name before the form, at most
				 * three words, never the first word of the title */
				start = k;
				while (start > k0 + 1 && k - start < 3 &&
				       cap_word(nm, start - 1) && ukept(nm, start - 1))
					start--;
			}
		}
		if (start == k && k == k0 && k + len < k1)
			continue; /* a lone legal word opening a title: not a firm */
		if (remove_units(nm, start, k + len, NF_EMPLOYER, NULL))
			return -1;
		k += len - 1;
	}
	/* markers: at Brennfeld Foods, bei Valdoria, chez Ortalie, @ Nordwerk */
	for (k = 0; k + 1 < nm->nunit; k++) {
		size_t j, plen;
		int strong;
		const char *cc;
		if (!ukept(nm, k) || nm->prot[nm->unit[k]] ||
		    !match_val(nm, k, LC_EMPLOYER, "marker", 1, &len))
			continue;
		j = k + len;
		if (j >= nm->nunit || useg(nm, j) != useg(nm, k) || !ukept(nm, j))
			continue;
		if (place_at(nm, j, &plen, &strong, &cc))
			continue; /* bei München: a location */
		if (!(cap_word(nm, j) || caps || (U(nm, k)->kind == TK_SYM)))
			continue;
		seg_kept(nm, useg(nm, k), &k0, &k1);
		if (k == k0)
			continue; /* nothing before it: not an employer slot */
		if (remove_units(nm, k, k1, NF_EMPLOYER, NULL))
			return -1;
		k = k1;
	}
	return 0;
}

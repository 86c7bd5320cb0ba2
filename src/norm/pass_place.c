/* pass_place.c - location slots.
 *
 * A place name is removed only where it stands in a location slot: after
 * a location preposition or region word (in, à, Raum, région), before a
 * region word (area, und Umgebung), next to a postcode, or as the whole
 * of a bracket or of a later segment (" - Köln", ", Paris", "(Berlin)"),
 * or, capitalised, at the end of a segment right after an occupational
 * word ("Lagerhelfer Hamburg": pass_trailing_place).  Place names that
 * are also ordinary words (WHERE `strong`) need the
 * first three.  A case form (WHERE `any`: Helsingissä, Tartus) is a
 * location wherever it stands; a place adjective (WHERE `adjective`:
 * Münchner) is one only before a region word (im Münchner Norden). */
#include <string.h>

#include "norm/pass_place.h"

int all_caps_line(tm_title *ti)
{
	return ti->caps; /* counted by title_build */
}

static int loc_word_(tm_title *ti, size_t k, const char *value, size_t *len);

/* Is unit k a word of location/ of that value (NULL: any)?  Most units
 * are none: answered without the call. */
static inline int loc_word(tm_title *ti, size_t k, const char *value, size_t *len)
{
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << LC_LOCATION)))
		return 0;
	return loc_word_(ti, k, value, len);
}

/* A place starting at unit k: its length, whether it needs a strong slot,
 * whether it is a location by itself (a case form: Helsingissä), and its
 * country.  A place adjective (Münchner) is a place only when a location
 * `after` word follows it in its segment (im Münchner Norden). */
int place_info(tm_title *ti, size_t k, size_t *len, int *strong, int *itself,
	       const char **cc)
{
	const lex_entry *e = match_cat(ti, k, LC_PLACE, 1, len);
	int noun = 0, adj = 0;
	if (!e)
		return 0;
	*strong = *itself = 0;
	*cc = NULL;
	for (; e; e = lex_next(ti->lx, e)) {
		if (e->cat != LC_PLACE || !entry_applies(ti, e))
			continue;
		if (!*cc && strcmp(e->value, "-"))
			*cc = e->value;
		if (e->where == LW_ADJ) {
			adj = 1;
			continue;
		}
		noun = 1;
		if (e->where == LW_STRONG)
			*strong = 1;
		if (e->where == LW_ANY)
			*itself = 1;
	}
	if (*strong)
		*itself = 0; /* an ordinary word too: a slot decides */
	if (adj && !noun) {
		size_t e2 = k + *len, l2;
		if (e2 >= ti->nunit || useg(ti, e2) != useg(ti, k) ||
		    !loc_word(ti, e2, "after", &l2))
			return 0;
	}
	return 1;
}

/* Is the place of len units at unit k a larger place (WHERE `city`) and
 * no ordinary word (no `strong` entry)? */
static int city_at(tm_title *ti, size_t k, size_t len)
{
	size_t l2;
	int city = 0;
	const lex_entry *e = match_cat(ti, k, LC_PLACE, 1, &l2);
	if (!e || l2 != len)
		return 0;
	for (; e; e = lex_next(ti->lx, e)) {
		if (e->cat != LC_PLACE || !entry_applies(ti, e))
			continue;
		if (e->where == LW_STRONG)
			return 0;
		city |= e->where == LW_CITY;
	}
	return city;
}

static int num_digits(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	const char *p = ti->text + t->off;
	if (t->kind != TK_NUM)
		return -1;
	for (uint32_t i = 0; i < t->len; i++)
		if (p[i] < '0' || p[i] > '9')
			return -1;
	return (int)t->len;
}

static int letters_only(tm_title *ti, size_t k, size_t lo, size_t hi)
{
	const tm_tok *t = U(ti, k);
	if (t->kind != TK_WORD || (t->flags & TF_DIGIT) || t->len < lo || t->len > hi)
		return 0;
	return (t->flags & TF_ALLCAPS) || t->len == 1;
}

static size_t postcode_at_(tm_title *ti, size_t k);

/* A postcode at unit k: 50667, D-50667, 00-950, SW1A 1AA, 1012 AB; its
 * length in units, or 0.  Every form holds a number unit: on a line
 * without one, none is looked for. */
static inline size_t postcode_at(tm_title *ti, size_t k)
{
	return ti->lflags & LF_NUM ? postcode_at_(ti, k) : 0;
}

/* Is token t a British outward code: one or two capitals, a digit, then
 * a digit or a capital or nothing ("LE1", "BS16", "EC2A", "M1")? */
static int uk_outward(const tm_title *ti, const tm_tok *t)
{
	const char *p = ti->text + t->off;
	uint32_t i = 0;
	while (i < t->len && i < 2 && p[i] >= 'A' && p[i] <= 'Z')
		i++;
	if (i == 0 || i >= t->len || p[i] < '0' || p[i] > '9')
		return 0;
	i++;
	if (i < t->len && ((p[i] >= '0' && p[i] <= '9') || (p[i] >= 'A' && p[i] <= 'Z')))
		i++;
	return i == t->len;
}

/* Does a kept place phrase end right before unit k (starting at most
 * POSTCODE_PLACE_BACK units before it)? */
static int place_ends_at(tm_title *ti, size_t k)
{
	size_t len;
	for (size_t j = k; j-- > 0 && k - j <= POSTCODE_PLACE_BACK;)
		if (ukept(ti, j) && match_cat(ti, j, LC_PLACE, 1, &len) && j + len == k)
			return 1;
	return 0;
}

static size_t postcode_at_(tm_title *ti, size_t k)
{
	int d;
	if (k >= ti->nunit || !ukept(ti, k) || ti->prot[ti->unit[k]])
		return 0;
	d = num_digits(ti, k);
	if ((d == 2 || d == 4) && k + 1 < ti->nunit && glued(ti, k, k + 1, "-") &&
	    num_digits(ti, k + 1) == 3)
		return 2; /* PL 00-950, PT 1100-148 */
	if (d == 4 && k + 1 < ti->nunit && letters_only(ti, k + 1, 2, 2) &&
	    !glued(ti, k, k + 1, ""))
		return 2;
	/* CZ, SK, GR, SE: 702 00, 111 22 */
	if (d == 3 && k + 1 < ti->nunit && num_digits(ti, k + 1) == 2 &&
	    !glued(ti, k, k + 1, ""))
		return 2;
	if (d == 4 || d == 5)
		return 1;
	if (letters_only(ti, k, 1, 2) && k + 1 < ti->nunit &&
	    glued(ti, k, k + 1, "-") && (num_digits(ti, k + 1) == 4 ||
					  num_digits(ti, k + 1) == 5))
		return 2;
	/* UK: outward code (letters then a digit) and inward code (digit and
	 * two letters, split by the tokeniser into 1 + AA) */
	{
		const tm_tok *t = U(ti, k);
		if (t->kind == TK_WORD && (t->flags & TF_DIGIT) && t->len >= 2 &&
		    t->len <= 4 && (t->flags & TF_CAP) && k + 2 < ti->nunit &&
		    num_digits(ti, k + 1) == 1 && glued(ti, k + 1, k + 2, "") &&
		    letters_only(ti, k + 2, 2, 2))
			return 3;
		/* the outward code alone, written right after a place:
		 * "Leicester LE1", "Bristol BS16", "London EC2A" */
		if (t->kind == TK_WORD && (t->flags & TF_ALLCAPS) && uk_outward(ti, t) &&
		    place_ends_at(ti, k))
			return 1;
	}
	return 0;
}

static int loc_word_(tm_title *ti, size_t k, const char *value, size_t *len)
{
	const lex_entry *e = match_val(ti, k, LC_LOCATION, value, 1, len);
	if (!e)
		return 0;
	/* a country code is one only in capitals: DE, not "de" */
	if (!strcmp(e->value, "country-code") && !(U(ti, k)->flags & TF_ALLCAPS))
		return value == NULL && match_val(ti, k, LC_LOCATION, "prep", 1, len);
	return 1;
}

/* A location `after` word at unit e, after a place at unit k of the
 * same segment (Paris area, Köln und Umgebung).  One written `edge`
 * counts only where it ends its segment, by itself or with the after
 * words that follow it: "Madrid centro", "Leeds City area", not "ropa
 * centro comercial" (the clean title is read again as one segment) nor
 * "Leeds City Manager"; *len then covers them all. */
static int after_word(tm_title *ti, size_t e, size_t k, size_t *len)
{
	const lex_entry *x;
	size_t a, b;

	if (e >= ti->nunit || useg(ti, e) != useg(ti, k) ||
	    !(x = match_val(ti, e, LC_LOCATION, "after", 1, len)))
		return 0;
	if (x->where != LW_EDGE)
		return 1;
	/* ending its segment, alone or with more after words: "Leeds
	 * City area", not "Leeds City Manager" */
	seg_kept(ti, useg(ti, e), &a, &b);
	size_t p = e + *len, l2;
	while (p < b && match_val(ti, p, LC_LOCATION, "after", 1, &l2))
		p += l2;
	if (p != b)
		return 0;
	*len = p - e;
	return 1;
}

/* An acronym in a mixed-case title is no place unless the lexicon
 * writes the place in capitals too: (OSS) is a qualification, not Oss;
 * NRW is a region. */
int place_acronym(tm_title *ti, size_t k, size_t len, int caps)
{
	const tm_tok *t = U(ti, k);
	size_t l2;
	if (caps || len != 1 || !(t->flags & TF_ALLCAPS) || t->len > 4)
		return 0;
	for (const lex_entry *e = match_cat(ti, k, LC_PLACE, 1, &l2); e;
	     e = lex_next(ti->lx, e))
		if (e->cat == LC_PLACE && e->caps && entry_applies(ti, e))
			return 0;
	return 1;
}

/* A district written after a place as the last word of its segment: a
 * number of one or two digits (Praha 5, Dublin 8), a Roman numeral of at
 * most five letters (Budapest VIII.) or a postal district
 * in capitals, letters then digits and at most one letter more (Derby
 * DE1, London SE15, Swindon SN2). */
static int district_form(tm_title *ti, size_t k);

static size_t district_at(tm_title *ti, size_t k, size_t seg)
{
	if (k >= ti->nunit || useg(ti, k) != seg || !ukept(ti, k) || ti->prot[ti->unit[k]] ||
	    (k + 1 < ti->nunit && useg(ti, k + 1) == seg))
		return 0;
	return (size_t)district_form(ti, k);
}

/* Is unit k written as a district: one or two digits, a Roman numeral
 * in capitals, a short code of capitals and digits? */
static int district_form(tm_title *ti, size_t k)
{
	const tm_tok *t;
	const char *p;
	size_t i = 0, a, d;

	d = (size_t)num_digits(ti, k);
	if (d == 1 || d == 2)
		return 1;
	t = U(ti, k);
	p = ti->text + t->off;
	/* a Roman numeral in capitals: Budapest VIII., Budapest XIII */
	if (roman_caps(ti, k, 5))
		return 1;
	if (t->kind != TK_WORD || !(t->flags & TF_DIGIT) || !(t->flags & TF_ALLCAPS) ||
	    t->len < 2 || t->len > 4)
		return 0;
	for (a = 0; i < t->len && p[i] >= 'A' && p[i] <= 'Z'; i++)
		a++;
	for (d = 0; i < t->len && p[i] >= '0' && p[i] <= '9'; i++)
		d++;
	if (i < t->len && p[i] >= 'A' && p[i] <= 'Z')
		i++;
	return a >= 1 && a <= 2 && d >= 1 && d <= 2 && i == t->len;
}

/* At unit e, after a place at unit k of the same segment: its district
 * and the word for a district after it, "Budapest VI. ker."; *len
 * covers both. */
static int district_after(tm_title *ti, size_t e, size_t k, size_t *len)
{
	size_t l2;
	if (e + 1 >= ti->nunit || useg(ti, e) != useg(ti, k) || !ukept(ti, e) ||
	    ti->prot[ti->unit[e]] || !district_form(ti, e) || !after_word(ti, e + 1, k, &l2))
		return 0;
	*len = 1 + l2;
	return 1;
}

/* Is unit e, right after the place run from unit k, a district glued to
 * its city with a hyphen that ends its segment, "in Köln-Ehrenfeld":
 * one capitalised word that no lexicon but the gazetteer knows? */
static int glued_district(tm_title *ti, size_t k, size_t e)
{
	size_t k0, k1;
	if (e >= ti->nunit || useg(ti, e) != useg(ti, k) || !ukept(ti, e) ||
	    ti->prot[ti->unit[e]] || U(ti, e)->kind != TK_WORD || !cap_word(ti, e) ||
	    !glued(ti, e - 1, e, "-") || (ti->ucats[e] & ~(1u << LC_PLACE)))
		return 0;
	seg_kept(ti, useg(ti, e), &k0, &k1);
	return e + 1 == k1;
}

/* From unit k (a place), the end of a run of places joined by
 * connectors or slashes: Köln/Bonn, Köln und Bonn. */
size_t place_run(tm_title *ti, size_t k, size_t plen, int allow_strong)
{
	size_t e = k + plen, len, l2;
	int strong;
	const char *cc;

	for (;;) {
		size_t j = e;
		if (j < ti->nunit && match_val(ti, j, LC_UNIT, "connector", 1, &len))
			j += len;
		if (j < ti->nunit && useg(ti, j) == useg(ti, k) &&
		    place_at(ti, j, &l2, &strong, &cc) && (allow_strong || !strong))
			e = j + l2;
		else
			break;
	}
	if (glued_district(ti, k, e))
		e++;
	if (after_word(ti, e, k, &len))
		e += len;
	else if (district_after(ti, e, k, &len))
		return e + len;
	if ((len = postcode_at(ti, e)) && useg(ti, e) == useg(ti, k))
		e += len;
	else
		e += district_at(ti, e, useg(ti, k));
	return e;
}

/* Removes a place of len units at k, with an apostrophe written
 * against its start ('s-Hertogenbosch). */
static int remove_place(tm_title *ti, size_t k, size_t len, const char *cc)
{
	size_t t0 = ti->unit[k];
	if (t0 > 0 && !ti->tl.t[t0].sp && ti->tl.t[t0 - 1].kind == TK_PUNCT &&
	    ti->tl.t[t0 - 1].ch == '\'' && (t0 == 1 || ti->tl.t[t0 - 1].sp))
		t0--;
	return remove_toks(ti, t0, ti->unit[k + len - 1], NF_LOCATION, cc);
}

/* Removes units [k, e) of a location slot piece by piece: places as
 * locations (their facet), the rest (prepositions, region words,
 * postcodes, connectors) as slot words. */
int place_take(tm_title *ti, size_t k, size_t e)
{
	size_t len;
	int strong;
	const char *cc;

	while (k < e) {
		if (place_at(ti, k, &len, &strong, &cc) && k + len <= e) {
			if (remove_place(ti, k, len, cc))
				return -1;
		} else {
			if (!(len = postcode_at(ti, k)) || k + len > e)
				len = 1;
			if (remove_units(ti, k, k + len, NF_SLOT, NULL))
				return -1;
		}
		k += len;
	}
	return 0;
}

/* Are the kept units [j, k1) numbers of an area, at most
 * AREA_CODES_MAX units: numbers of at most five digits, joined by
 * connectors ("7", "70-79", "8 und 9")? */
static int area_codes(tm_title *ti, size_t j, size_t k1)
{
	size_t len, nums = 0;
	if (j >= k1 || k1 - j > AREA_CODES_MAX)
		return 0;
	for (size_t m = j; m < k1; m++) {
		const tm_tok *t = U(ti, m);
		if (!ukept(ti, m) || ti->prot[ti->unit[m]])
			return 0;
		if (t->kind == TK_NUM && t->len <= 5 &&
		    tok_only(ti, t, "0123456789"))
			nums++;
		else if (!(match_val(ti, m, LC_UNIT, "connector", 1, &len) && len == 1))
			return 0;
	}
	return nums > 0;
}

static int slots(tm_title *ti)
{
	size_t k, len, plen, pc;
	int strong;
	const char *cc;

	for (k = 0; k < ti->nunit; k++) {
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			continue;
		/* in Köln, Raum Stuttgart, à 75001 Paris */
		if (loc_word(ti, k, "prep", &len) || loc_word(ti, k, "before", &len)) {
			size_t j = k + len, e, ml;
			/* an employer marker opened by the preposition is the
			 * longer phrase: "till vår restaurang" (not the place
			 * Var), "til vores plejecenter" */
			if (match_val(ti, k, LC_EMPLOYER, "marker", 1, &ml) && ml > len) {
				k += ml - 1;
				continue;
			}
			/* after a link word a preposition is the complement
			 * of the word before it ("Medico di base a Bologna",
			 * "Technicien de proximité"): it stays, and the
			 * place right after it goes alone ("MEDICO DI BASE
			 * MILANO"); a region word opens a slot ("Leiter der
			 * Region Süd") */
			int linked = link_ends(ti, ti->segs[useg(ti, k)].u0, k) < k &&
				     !loc_word(ti, k, "before", &ml);
			/* at most a few slot words in a row ("in der Region"): a
			 * run of them to the end of the line, tried again from
			 * each of its words, was quadratic ("a/" x 50,000) */
			for (int more = 0; !linked && more < 4 && j < ti->nunit &&
					   (loc_word(ti, j, "before", &plen) ||
					    loc_word(ti, j, "prep", &plen)); more++)
				j += plen;
			pc = postcode_at(ti, j);
			if (j + pc < ti->nunit && useg(ti, j + pc) == useg(ti, k) &&
			    place_at(ti, j + pc, &plen, &strong, &cc) && !(linked && strong)) {
				e = place_run(ti, j + pc, plen, !linked);
				if (place_take(ti, linked ? j : k, e))
					return -1;
				k = e - 1;
				continue;
			}
			if (linked)
				continue;
			/* a slot word opening a segment beside the occupation
			 * with the numbers of an area after it: "– PLZ-Gebiet
			 * 7", "– Gebiet 70-79" */
			{
				size_t s0, s1;
				const tm_seg *g = &ti->segs[useg(ti, k)];
				seg_kept(ti, useg(ti, k), &s0, &s1);
				uint32_t t0 = ti->unit[g->u0];
				/* (not after a spaced slash, the one segment
				 * break a clean title keeps: read again, "x /
				 * woj 22-6" would lose what the first reading,
				 * where other breaks stood, kept) */
				if (k == s0 && (g->index > 0 || g->bracket) &&
				    !(t0 > 0 && ti->tl.t[t0 - 1].kind == TK_PUNCT &&
				      ti->text[ti->tl.t[t0 - 1].off] == '/') &&
				    loc_word(ti, k, "before", &ml) && area_codes(ti, j, s1)) {
					if (remove_units(ti, k, s1, NF_SLOT, NULL))
						return -1;
					k = s1 - 1;
					continue;
				}
			}
		}
		/* 50667 Köln */
		if ((pc = postcode_at(ti, k)) && k + pc < ti->nunit &&
		    place_at(ti, k + pc, &plen, &strong, &cc)) {
			size_t e = place_run(ti, k + pc, plen, 1);
			if (place_take(ti, k, e))
				return -1;
			k = e - 1;
			continue;
		}
		/* Paris area, Köln und Umgebung, Paris 75001 */
		if (place_at(ti, k, &plen, &strong, &cc)) {
			size_t e = k + plen;
			/* the word after it in its own segment: "Ropa - Centro
			 * Comercial" is no "Ropa Centro" */
			if (after_word(ti, e, k, &len) || district_after(ti, e, k, &len) ||
			    (e < ti->nunit && useg(ti, e) == useg(ti, k) &&
			     (len = postcode_at(ti, e)))) {
				e = place_run(ti, k, plen, 1);
				if (place_take(ti, k, e))
					return -1;
				k = e - 1;
			} else
				k += plen - 1; /* Roveredo in Piano: no "in Piano" inside */
		}
	}
	return 0;
}

/* A district named after its city (a larger place, WHERE `city`) ending
 * the segment, "Kraków Kazimierz", "Tallinn Kristiine": one capitalised
 * word, spaced, that no lexicon but the gazetteer knows. */
static int district_name(tm_title *ti, size_t k, int caps)
{
	const tm_tok *t = U(ti, k);
	return t->kind == TK_WORD && !(t->flags & TF_DIGIT) &&
	       (caps || ((t->flags & TF_CAP) && !(t->flags & TF_ALLCAPS))) &&
	       !(ti->ucats[k] & ~(1u << LC_PLACE)) && !ti->prot[ti->unit[k]];
}

/* Is the country code of len units at unit k also an occupational field
 * (occupation/, value `field`: IT, HR)? */
static int field_code(tm_title *ti, size_t k, size_t len)
{
	size_t l2;
	return (ti->ucats[k] & (1u << LC_OCCUPATION)) &&
	       match_val(ti, k, LC_OCCUPATION, "field", 1, &l2) && l2 == len;
}

int place_segment(tm_title *ti, size_t s, int caps, int strong_ok)
{
	size_t k0, k1, k, len, pk = 0, plen = 0;
	int any = 0, weak = 0, need_strong = 0, strong;
	const char *c;

	seg_kept(ti, s, &k0, &k1);
	if (k0 >= k1)
		return 0;
	for (k = k0; k < k1;) {
		if (!ukept(ti, k)) {
			k++;
			continue;
		}
		if (ti->prot[ti->unit[k]]) {
			return 0;
		} else if (place_at(ti, k, &len, &strong, &c) &&
			   !place_acronym(ti, k, len, caps)) {
			any = 1;
			pk = k;
			plen = len;
			if (strong)
				need_strong = 1;
			else
				weak = 1;
			k += len;
			/* Hamburg-Harburg: a district glued to its city */
			if (!strong && k < k1 && glued(ti, k - 1, k, "-") &&
			    cap_word(ti, k) && U(ti, k)->kind == TK_WORD)
				k++;
		} else if (loc_word(ti, k, "country-code", &len)) {
			/* a code that is also a field, alone right after kept
			 * words: "Konsult, IT", "Manager (HR)" name the field,
			 * not Italy or Croatia ("Milano, IT" stays a place) */
			if (k == k0 && k + len == k1 && k > 0 && ukept(ti, k - 1) &&
			    field_code(ti, k, len))
				return 0;
			any = weak = 1;
			k += len;
		} else if ((len = postcode_at(ti, k))) {
			weak = 1;
			k += len;
		} else if (any && k + 1 == k1 && district_at(ti, k, useg(ti, k))) {
			k++;
		} else if (any && k + 1 == k1 && plen && pk + plen == k && U(ti, k)->sp &&
			   ti->unit[k] == ti->unit[k - 1] + 1 && city_at(ti, pk, plen) &&
			   district_name(ti, k, caps)) {
			k++;
		} else if (loc_word(ti, k, NULL, &len) ||
			   match_val(ti, k, LC_UNIT, "connector", 1, &len)) {
			weak = 1;
			k += len;
		} else
			return 0;
	}
	return any && (strong_ok || !need_strong || weak);
}

int remove_place_segment(tm_title *ti, size_t s)
{
	size_t k0, k1, k, len;
	int strong;
	const char *c;

	seg_kept(ti, s, &k0, &k1);
	for (k = k0; k < k1;) {
		if (!ukept(ti, k)) {
			k++;
			continue;
		}
		if (place_at(ti, k, &len, &strong, &c)) {
			if (!strong && k + len < k1 && glued(ti, k + len - 1, k + len, "-") &&
			    cap_word(ti, k + len) && U(ti, k + len)->kind == TK_WORD)
				len++;
			if (remove_place(ti, k, len, c))
				return -1;
		} else if (loc_word(ti, k, "country-code", &len)) {
			if (remove_units(ti, k, k + len, NF_LOCATION, NULL))
				return -1;
		} else {
			if (!(len = postcode_at(ti, k)))
				len = 1;
			if (remove_units(ti, k, k + len, NF_SLOT, NULL))
				return -1;
		}
		k += len;
	}
	return 0;
}

size_t link_ends(tm_title *ti, size_t k0, size_t k1)
{
	size_t len;
	if (!HAS(ti, LC_UNIT))
		return k1;
	for (size_t k = k1 - 1; k > k0 && k1 - k <= LINK_WORDS_MAX; k--) {
		size_t p = k - 1;
		if (!match_val(ti, k, LC_UNIT, "link", 1, &len) || k + len != k1 ||
		    !units_free(ti, k, k1))
			continue;
		/* the word it joins may end in a removed gender suffix:
		 * "Камериер/ка за [сезон]" */
		for (int n = 0; n < LINK_GENDER_SKIP_MAX && p > k0 && !ukept(ti, p) &&
				ti->rm[ti->unit[p]] == NF_GENDER; n++)
			p--;
		if (ukept(ti, p))
			return k;
	}
	return k1;
}

int ending_whole(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	size_t elen;
	return t->kind == TK_WORD &&
	       lex_ending(ti->lx, tok_fold(&ti->tl, t), t->flen, &elen) &&
	       elen == t->flen;
}

/* Does segment s hold an occupational word: a `head` of occupation/, or
 * a word that is an occupational ending whole ("kock")?  A place name
 * that merely ends like one ("Montpellier") is no such word. */
static int occupation_word(tm_title *ti, size_t s)
{
	size_t k0, k1, len;
	seg_kept(ti, s, &k0, &k1);
	for (size_t k = k0; k < k1; k++) {
		if (!(ti->ucats[k] & (1u << LC_OCCUPATION)))
			continue;
		if (match_val(ti, k, LC_OCCUPATION, "head", 1, &len) ||
		    (match_val(ti, k, LC_OCCUPATION, "suffix", 1, &len) &&
		     ending_whole(ti, k)))
			return 1;
	}
	return 0;
}

/* Is segment s the only kept segment with an occupational word?  Then
 * a place that is also one ("Kock", "Tolk") is the title, whatever else
 * the line holds ("tillsvidare - Kock (senior), Malmö"). */
static int only_occupation(tm_title *ti, size_t s)
{
	size_t a, b;
	if (!occupation_word(ti, s))
		return 0;
	for (size_t t = 0; t < ti->nseg; t++) {
		if (t == s)
			continue;
		seg_kept(ti, t, &a, &b);
		if (a < b && (occupation_word(ti, t) || head_within(ti, a, b)))
			return 0;
	}
	return 1;
}

/* A bracket or later segment made only of location words.  When the
 * rules before removed every other segment as noise ("Teilzeit: Kock"),
 * a place that is also an occupational word is the title. */
static int whole_segments(tm_title *ti)
{
	int caps = all_caps_line(ti);
	size_t a, b, with = 0;
	for (size_t s = 0; s < ti->nseg; s++) {
		seg_kept(ti, s, &a, &b);
		with += a < b;
	}
	for (size_t s = 0; s < ti->nseg; s++) {
		const tm_seg *g = &ti->segs[s];
		if (!g->bracket && g->index == 0 && !g->resumed)
			continue;
		if (place_segment(ti, s, caps, 0) &&
		    ((with > 1 && !only_occupation(ti, s)) || !occupation_word(ti, s))) {
			if (remove_place_segment(ti, s))
				return -1;
			with--;
		}
	}
	return 0;
}

/* A bracket right after a removed place holding only a department or
 * province number or code: Bordeaux (33), Milano (MI), Paris (75). */
static int after_place(tm_title *ti)
{
	for (size_t s = 1; s < ti->nseg; s++) {
		const tm_seg *g = &ti->segs[s];
		size_t k0, k1, open;
		if (!g->bracket)
			continue;
		seg_kept(ti, s, &k0, &k1);
		if (k1 != k0 + 1 || g->u0 == 0 || !units_free(ti, k0, k1))
			continue;
		open = ti->unit[k0] - 1;
		if (!(ti->tl.t[open].flags & TF_OPEN) || open == 0 ||
		    ti->rm[open - 1] != NF_LOCATION)
			continue;
		const tm_tok *t = U(ti, k0);
		int d = num_digits(ti, k0);
		if ((d >= 1 && d <= 3) ||
		    (t->kind == TK_WORD && (t->flags & TF_ALLCAPS) && t->len == 2))
			if (remove_units(ti, k0, k1, NF_SLOT, NULL))
				return -1;
	}
	return 0;
}

/* Case forms that are locations by themselves, with the places joined to
 * them: Kokk Tallinnas, Lastenhoitaja Espoossa ja Vantaalla. */
static int case_forms(tm_title *ti)
{
	size_t k, len;
	int strong, itself;
	const char *cc;

	for (k = 0; k < ti->nunit; k++) {
		if (!(ti->ucats[k] & (1u << LC_PLACE)) || !ukept(ti, k) ||
		    ti->prot[ti->unit[k]] ||
		    !place_info(ti, k, &len, &strong, &itself, &cc))
			continue;
		if (!itself || !units_free(ti, k, k + len)) {
			k += len - 1;
			continue;
		}
		size_t e = place_run(ti, k, len, 0);
		if (place_take(ti, k, e))
			return -1;
		k = e - 1;
	}
	return 0;
}

/* Does an occupational phrase end right before unit k, within [k0, k),
 * with nothing removed between: a word with an occupational ending
 * ("Lagerhelfer"), a `head` of occupation/ or a protected phrase ending
 * there, or a `field` ending there after such a head ("Sachbearbeiter
 * Buchhaltung"; "Hotel" alone may be the employer's business). */
static int occupation_before(tm_title *ti, size_t k0, size_t k)
{
	size_t len;

	if (k == k0 || !ukept(ti, k - 1))
		return 0;
	if (ti->prot[ti->unit[k - 1]] || (U(ti, k - 1)->kind == TK_WORD && ti->uend[k - 1]))
		return 1;
	for (size_t i = k0; i < k; i++) {
		if (!ukept(ti, i))
			continue;
		if (match_val(ti, i, LC_OCCUPATION, "head", 1, &len) && i + len == k)
			return 1;
		if (match_val(ti, i, LC_OCCUPATION, "field", 1, &len) && i + len == k &&
		    (head_within(ti, k0, i) || (i > k0 && ti->uend[i - 1])))
			return 1;
	}
	return 0;
}

/* A place written in lower case that ends a segment, at unit k (len
 * units, its run ending at e): a larger place (`city`) of one name, no
 * word that starts a phrase of another category ("koch berlin",
 * "kierowca warszawa"); a village named like a word is no `city`. */
static int lower_city(tm_title *ti, size_t k, size_t len, size_t e)
{
	for (size_t i = k; i < k + len; i++)
		if (ti->ucats[i] & ~(1u << LC_PLACE))
			return 0;
	return e == k + len && city_at(ti, k, len);
}

/* Places that end a segment right after an occupational phrase, with
 * only a space between (run after the segments' roles are decided, so
 * that no rule reads the words before as a place's name): "Koch
 * Berlin", "Sales Manager Germany", "Key Account Manager Benelux".
 * Only places whose place sense is the usual
 * one (not `strong`: "Fahrer Essen" keeps Essen), written with a capital
 * in a line not all in capitals (a village named like a word,
 * "Îngrijitor bătrâni", stays), not glued to the word before
 * ("Nadador-salvador"), and only after an occupational phrase, so that
 * what stays names the occupation. */
int pass_trailing_place(tm_title *ti)
{
	if (HAS(ti, LC_EMPLOYER) && firm_places(ti))
		return -1;
	if (all_caps_line(ti))
		return 0;
	for (size_t s = 0; s < ti->nseg; s++) {
		size_t k0, k1, len, e;
		int strong;
		const char *cc;
		seg_kept(ti, s, &k0, &k1);
		for (size_t k = k0 + 1; k < k1; k++) {
			if (!ukept(ti, k) || ti->prot[ti->unit[k]] ||
			    !place_at(ti, k, &len, &strong, &cc))
				continue;
			if (strong || place_acronym(ti, k, len, 0) ||
			    glued(ti, k - 1, k, "") || (e = place_run(ti, k, len, 0)) != k1 ||
			    !(U(ti, k)->flags & TF_CAP || lower_city(ti, k, len, e))) {
				k += len - 1;
				continue;
			}
			if (units_free(ti, k, e) && occupation_before(ti, k0, k) && place_take(ti, k, e))
				return -1;
			break;
		}
	}
	return 0;
}

int pass_location(tm_title *ti)
{
	if (slots(ti) || case_forms(ti) || whole_segments(ti) || after_place(ti))
		return -1;
	return 0;
}

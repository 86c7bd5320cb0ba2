/* pass_roles.c - segment roles: which segment names the job, and which
 * of the others are employers or places.
 *
 * Every segment gets a role from its annotations.  Occupational
 * evidence is a head word or an occupational ending (occupation/,
 * values `head` and `suffix`) or a protected phrase (protect/ and the
 * taxonomy's labels); a `field` word qualifies an occupation.  The head
 * is the first segment with occupational evidence, wherever it stands
 * ("Salzburg: Hausmeister", "Bäckerei Korngold | Verkäufer"); when no
 * segment has any, the first segment is the head, as it always was, so
 * that an occupation no lexicon knows is never lost.
 *
 * A segment beside the head without occupational evidence is dropped
 * when it is
 *  - an employer name: a business kind phrase with a name word outside
 *    it ("Hotel Bergblick", "Brackenfold Veterinary Clinic", "Horský
 *    hotel Valdoria"), a legal form after a name ("Musikverein Klangwerk
 *    e.V."), or a name article before a capitalised word ("The Copper
 *    Kettle"); a field word inside it does not save it ("Metallbau
 *    Harlander");
 *  - a place: gazetteer places, alone or with a region, a country or a
 *    postcode (place_segment), even when the name is also an ordinary
 *    word ("– Laufen", "(Wetter, Ruhr)"); a segment with a field word
 *    is kept;
 *  - a place written beside what the place rules removed: one or two
 *    name words before a removed slot or bracketed place ("Bø i
 *    Telemark", "Ed (Dalsland)"), or a region word with its region's
 *    name or adjective ("région bruxelloise");
 *  - the last segment, right after a segment removed as a place, when
 *    it looks like its region, district or code ("Kalmar, Småland",
 *    "Bra (CN)"), known to the gazetteer or not.
 * Before the head, only when the head was found by evidence.  A
 * capitalised word whose only evidence is an occupational ending is a
 * proper name in a mixed-case line ("Åkeri Valdqvist").
 * Inside any segment, an employer marker or a location preposition with
 * an employer name after it and no occupational evidence up to the
 * segment's end is an employer ("für unser Seniorenzentrum Rosengarten",
 * "im Landgasthof Zur Linde", "at Fenwick Logistics"), when a kept word
 * stands before it in the title.
 *
 * Linear: every segment is read twice, every unit's annotations a
 * bounded number of times; nothing is allocated. */
#include <string.h>

#include "norm/pass.h"

enum { EV_NONE, EV_FIELD, EV_HEAD };

static int is_kind(tm_title *ti, size_t k, size_t *len)
{
	return match_val(ti, k, LC_BUSINESS, "kind", 1, len) != NULL;
}

static int cap_word(tm_title *ti, size_t k, int caps)
{
	const tm_tok *t = U(ti, k);
	return t->kind == TK_WORD && (caps || (t->flags & (TF_CAP | TF_ALLCAPS)));
}

/* Occupational evidence of unit k; a unit starting a business kind
 * phrase ("Care Home", "Bäckerei") is at most a field.  With names set
 * (a mixed-case line), a capitalised word after unit names_from whose
 * only evidence is an occupational ending is a proper name
 * ("Åkeri Lindqvist", "Hoivakoti Kotipihlaja"): no evidence. */
static int evidence_at(tm_title *ti, size_t k, int names, size_t names_from)
{
	size_t len;
	int ev;

	if (!ukept(ti, k))
		return EV_NONE;
	if (ti->prot[ti->unit[k]])
		return EV_HEAD;
	/* the three kinds of occupational word in one look */
	static const char *const kinds[] = {"head", "suffix", "field"};
	unsigned f = match_vals(ti, k, LC_OCCUPATION, kinds, 3, 1);
	if (f & 1)
		ev = EV_HEAD;
	else if (f & 2)
		ev = names && k > names_from && cap_word(ti, k, 0) ? EV_NONE : EV_HEAD;
	else if (f & 4)
		ev = EV_FIELD;
	else
		return EV_NONE;
	/* a kind phrase at least as long as the occupation's: "Care Home";
	 * a longer occupation holds the kind: "Farm Hand" */
	if (ev == EV_HEAD && (ti->ucats[k] & (1u << LC_BUSINESS)) && is_kind(ti, k, &len)) {
		size_t hl;
		if (!(match_val(ti, k, LC_OCCUPATION, "head", 1, &hl) && hl > len))
			ev = EV_FIELD;
	}
	return ev;
}

/* The strongest evidence among the kept units of segment s; units
 * inside a business kind phrase count as fields; names as in
 * evidence_at.  A word of a place name that merely ends like an
 * occupation ("List", "Ozoir-la-Ferrière"), not an occupational ending
 * written whole ("Kock"), is none. */
static int seg_evidence(tm_title *ti, size_t s, int names)
{
	size_t k0, k1, k, len, kind_end = 0, place_end = 0;
	int best = EV_NONE;

	seg_kept(ti, s, &k0, &k1);
	for (k = k0; k < k1 && best != EV_HEAD; k++) {
		int ev = evidence_at(ti, k, names, k0);
		if (match_cat(ti, k, LC_PLACE, 1, &len) && k + len > place_end)
			place_end = k + len;
		if (ev == EV_HEAD && k < place_end && !ti->prot[ti->unit[k]] &&
		    !match_val(ti, k, LC_OCCUPATION, "head", 1, &len) && !ending_whole(ti, k))
			ev = EV_NONE;
		if (ev == EV_HEAD && k < kind_end)
			ev = EV_FIELD;
		if (ev > best)
			best = ev;
		if (is_kind(ti, k, &len) && k + len > kind_end)
			kind_end = k + len;
	}
	return best;
}

/* The start of a business kind phrase ending exactly at unit k1 and
 * starting after unit lo, or SIZE_MAX. */
static size_t kind_ending(tm_title *ti, size_t lo, size_t k1)
{
	size_t len, k = k1 > lo + ROLE_KIND_BACK ? k1 - ROLE_KIND_BACK : lo + 1;
	for (; k < k1; k++)
		if (ukept(ti, k) && is_kind(ti, k, &len) && k + len == k1)
			return k;
	return SIZE_MAX;
}

static int legal_at(tm_title *ti, size_t k, size_t *len)
{
	return match_val(ti, k, LC_BUSINESS, "legal", 1, len) != NULL ||
	       match_val(ti, k, LC_EMPLOYER, "legal", 1, len) != NULL;
}

/* A word of a proper name at unit k of a segment starting at unit k0:
 * capitalised, no business word starts there, and no occupational
 * evidence (as evidence_at with names: "Valdqvist" is a name).  "Pri",
 * "Kod" open names ("Gostilna Pri zelenem vrtu"). */
static int name_word(tm_title *ti, size_t k, size_t k0, int caps)
{
	return ukept(ti, k) && cap_word(ti, k, caps) &&
	       !(ti->ucats[k] & (1u << LC_BUSINESS)) &&
	       evidence_at(ti, k, !caps, k0) == EV_NONE;
}

/* Is the kept part of a segment, units [k0, k1) with evidence ev, an
 * employer name?  A kind phrase with a name word outside it ("Hotel
 * Belvedere sul Lago", "Solbakken sykehjem", "Veterinární klinika
 * Lesní"; not "de magasin", not "Koch – Hotel"), a legal form after a
 * name, or an article opening a capitalised name in a segment with no
 * evidence at all ("The Copper Kettle", not "de Matemática"). */
static int employer_segment(tm_title *ti, size_t k0, size_t k1, int ev,
			    int caps)
{
	size_t len, k, kind_end = k0;
	int kind = 0, name = 0;

	if (k1 - k0 < 2)
		return 0;
	for (k = k0; k < k1; k++) {
		if (!ukept(ti, k))
			continue;
		if (is_kind(ti, k, &len)) {
			kind = 1;
			if (k + len > kind_end)
				kind_end = k + len;
		} else if (k >= kind_end && name_word(ti, k, k0, caps))
			name = 1;
		if (k > k0 && legal_at(ti, k, &len))
			return 1;
	}
	if (kind && name)
		return 1;
	return ev == EV_NONE && match_val(ti, k0, LC_BUSINESS, "article", 1, &len) &&
	       k0 + len < k1 && cap_word(ti, k0 + len, caps);
}

/* Does [k0, k1) hold a kept `field` word?  Before a kind ending the
 * segment, it names what is taught or done, so the preposition before
 * it opens no firm's name ("Učitel matematiky [a] fyziky pro ZŠ": the
 * Czech "and" folds to the French preposition "à"). */
static int field_within(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (evidence_at(ti, k, 0, k0) == EV_FIELD)
			return 1;
	return 0;
}

/* In segment s: the leftmost employer marker or location preposition
 * with an employer name after it and no occupational evidence up to the
 * segment's end; removed from there on.  first: the title's first kept
 * unit. */
static int employer_tail(tm_title *ti, size_t s, size_t first, int caps)
{
	size_t k0, k1, k, len, best = SIZE_MAX, kind_end;
	int legal_after = 0;

	seg_kept(ti, s, &k0, &k1);
	if (k1 - k0 < 3)
		return 0;
	kind_end = kind_ending(ti, k0, k1);
	for (k = k1; k-- > k0 && k > first;) {
		if (!ukept(ti, k))
			continue;
		if (evidence_at(ti, k, !caps, k0) == EV_HEAD &&
		    !(kind_end != SIZE_MAX && k >= kind_end))
			break;
		if (legal_at(ti, k, &len))
			legal_after = 1;
		if (ti->prot[ti->unit[k]])
			break;
		int marker = match_val(ti, k, LC_EMPLOYER, "marker", 1, &len) != NULL;
		if (!marker && !match_val(ti, k, LC_LOCATION, "prep", 1, &len))
			continue;
		size_t j = k + len, l2;
		if (j >= k1 || !ukept(ti, j))
			continue;
		size_t n = j;
		if (match_cat(ti, j, LC_PLACE, 1, &l2)) {
			/* bei München: a location; at Fenwick Logistics: a
			 * name that holds a place name */
			if (!marker || j + l2 >= k1 || match_cat(ti, j + l2, LC_PLACE, 1, &len))
				continue;
			n = j + l2;
		}
		if ((is_kind(ti, n, &l2) && n + l2 < k1) ||
		    (kind_end != SIZE_MAX && kind_end > n && !field_within(ti, n, kind_end)) ||
		    legal_after ||
		    (marker && (cap_word(ti, n, caps) ||
				match_val(ti, n, LC_BUSINESS, "article", 1, &l2))))
			best = k;
	}
	if (best == SIZE_MAX)
		return 0;
	return remove_units(ti, best, k1, NF_EMPLOYER, NULL);
}

/* In segment s: a kind of workplace ending it, right after an employer
 * marker or a recruiting phrase that went, or inside a marker phrase that
 * ends it, with occupational evidence before it: "Säljare [till vår]
 * butik", "Kok [søges til] restaurant [i Skagen]", "Cocinero para el
 * restaurante".  The marker and the kind go; so does a segment beside the
 * head that is only a kind whose place went ("– stavby [v okolí Brna]"). */
static int workplace_tail(tm_title *ti, size_t s, size_t head, int caps)
{
	size_t k0, k1, n, m, len;
	seg_kept(ti, s, &k0, &k1);
	if (k1 > k0 && is_kind(ti, k0, &len) && k0 + len == k1 &&
	    evidence_at(ti, k0, 0, k0) == EV_NONE && ti->unit[k1 - 1] + 1 < ti->tl.n &&
	    (ti->rm[ti->unit[k1 - 1] + 1] == NF_SLOT ||
	     ti->rm[ti->unit[k1 - 1] + 1] == NF_LOCATION)) {
		/* beside the occupation, a kind of workplace with its place
		 * that went: "Zedník – stavby [v okolí Brna]" */
		return s > head ? remove_units(ti, k0, k1, NF_EMPLOYER, NULL) : 0;
	}
	if (k1 - k0 < 2)
		return 0;
	n = kind_ending(ti, k0, k1);
	m = n;
	if (n != SIZE_MAX)
		for (size_t k = k0 + 1; k < n; k++)
			if (ukept(ti, k) && match_val(ti, k, LC_EMPLOYER, "marker", 1, &len) &&
			    k + len == n && units_free(ti, k, n))
				m = k;
	if (n == SIZE_MAX || (m == n && ti->rm[ti->unit[n] - 1] != NF_MARKETING)) {
		/* a marker phrase that holds the kind ends the segment, with
		 * an article or a possessive ("Cocinero [para el
		 * restaurante]", "Serveur [dans notre restaurant]") or with
		 * its place gone after it ("Cocinero [para restaurante] en
		 * Ibiza"); "Μάγειρας για ξενοδοχείο" alone stays */
		int gone = ti->unit[k1 - 1] + 1 < ti->tl.n &&
			   (ti->rm[ti->unit[k1 - 1] + 1] == NF_SLOT ||
			    ti->rm[ti->unit[k1 - 1] + 1] == NF_LOCATION);
		for (m = k1 > k0 + ROLE_KIND_BACK ? k1 - ROLE_KIND_BACK : k0 + 1; m < k1; m++)
			if (ukept(ti, m) && match_val(ti, m, LC_EMPLOYER, "marker", 1, &len) &&
			    m + len == k1 && (len > 2 || (len == 2 && gone)) &&
			    is_kind(ti, k1 - 1, &len) && units_free(ti, m, k1))
				break;
		if (m == k1)
			return 0;
	}
	for (size_t k = k0; k < m; k++)
		if (evidence_at(ti, k, !caps, k0) == EV_HEAD)
			return remove_units(ti, m, k1, NF_EMPLOYER, NULL) ? -1 : 0;
	return 0;
}

/* Was segment s removed whole, a place (or, with firm set, an employer
 * name) among its pieces? */
static int removed_place(tm_title *ti, size_t s, int firm)
{
	const tm_seg *g = &ti->segs[s];
	int place = 0;
	for (size_t k = g->u0; k < g->u1; k++) {
		uint8_t rm = ti->rm[ti->unit[k]];
		if (rm == RM_NONE)
			return 0;
		place |= rm == NF_LOCATION || (firm && rm == NF_EMPLOYER);
	}
	return place;
}

/* Is the kept part of segment s, units [k0, k1), the region, province
 * or department written after a place ("Jönköping, Småland", "Singen
 * (Hohentwiel)", "Bra (CN)", "Cognac (16)"): a few name words, location
 * words, or in a bracket a code of two capitals or a number of up to
 * three digits? */
static int region_after(tm_title *ti, size_t s, size_t k0, size_t k1, int caps)
{
	size_t k, len;
	if (k1 - k0 > ROLE_REGION_MAX)
		return 0;
	for (k = k0; k < k1; k++) {
		const tm_tok *t = U(ti, k);
		if (!ukept(ti, k) || name_word(ti, k, k0, caps) ||
		    match_cat(ti, k, LC_LOCATION, 1, &len))
			continue;
		if (ti->segs[s].bracket && k1 == k0 + 1 &&
		    ((t->kind == TK_NUM && t->len <= 3 &&
		      tok_only(ti, t, "0123456789")) ||
		     (t->kind == TK_WORD && (t->flags & TF_ALLCAPS) && t->len == 2)))
			continue;
		return 0;
	}
	return 1;
}

/* Is the kept part of segment s, units [k0, k1), a place written with
 * what the place rules removed right after it: one or two name words
 * before a location slot or a bracketed place ("Bø [i Telemark]", "Ed
 * [(Dalsland)]"), or a region word with the name or adjective of its
 * region, in capitals or not ("région bruxelloise", "regione
 * Lombardia")?  At most ROLE_REGION_MAX words. */
static int place_beside_removed(tm_title *ti, size_t k0, size_t k1, int caps)
{
	size_t k, len, t;
	const lex_entry *e;

	e = match_val(ti, k0, LC_LOCATION, "before", 1, &len);
	/* the name after the region word, at most ROLE_REGION_MAX words
	 * ("Polígono Industrial [Las Cabezas]") */
	if (e && k0 + len < k1 && k1 - (k0 + len) <= ROLE_REGION_MAX) {
		size_t l2;
		for (k = k0 + len; k < k1; k++)
			if (!ukept(ti, k) || U(ti, k)->kind != TK_WORD ||
			    evidence_at(ti, k, 0, k0) != EV_NONE ||
			    ((ti->ucats[k] & (1u << LC_BUSINESS)) &&
			     !match_val(ti, k, LC_BUSINESS, "article", 1, &l2)))
				return 0; /* an article opens a name: "Las Cabezas" */
		return 1;
	}
	if (k1 - k0 > 2)
		return 0;
	for (k = k0; k < k1; k++)
		if (!name_word(ti, k, k0, caps))
			return 0;
	/* past brackets, the next token is a removed place or slot word;
	 * past a comma, a removed place ("Tjuvholmen, Oslo") */
	for (t = ti->unit[k1 - 1] + 1; t < ti->tl.n && ti->tl.t[t].kind == TK_PUNCT &&
	     (ti->tl.t[t].flags & TF_OPEN); t++)
		;
	if (t + 1 < ti->tl.n && ti->tl.t[t].kind == TK_PUNCT && ti->tl.t[t].ch == ',' &&
	    ti->rm[t + 1] == NF_LOCATION) {
		/* no word that could name an occupation, even as a name
		 * ("Shop Assistant, Graz"), no acronym in a mixed-case line
		 * ("DBA, Frankfurt"), and not the head going on after a
		 * bracket ("Ingeniero(a) electrónico, Bilbao") */
		if (ti->segs[useg(ti, k0)].resumed)
			return 0;
		for (k = k0; k < k1; k++)
			if (evidence_at(ti, k, 0, k0) != EV_NONE ||
			    (!caps && (U(ti, k)->flags & TF_ALLCAPS)))
				return 0;
		return 1;
	}
	return t < ti->tl.n && (ti->rm[t] == NF_LOCATION || ti->rm[t] == NF_SLOT);
}

/* Is the kept part of segment s, units [k0, k1), a bracket holding only
 * the code of a subdivision of the country of the title's language
 * (location/subdivisions.txt: "(TO)", "(69)")?  A code of letters counts
 * only in capitals. */
static int subdivision_bracket(tm_title *ti, size_t s, size_t k0, size_t k1)
{
	const tm_tok *t;
	size_t len;

	if (!ti->segs[s].bracket || k1 != k0 + 1 ||
	    !match_val(ti, k0, LC_LOCATION, "subdivision", 1, &len) || len != 1)
		return 0;
	t = U(ti, k0);
	return t->kind == TK_NUM || (t->flags & TF_ALLCAPS);
}

/* Is the kept part of a segment beside the head, units [k0, k1), a town
 * with the code of its state glued after a slash, the way Brazilian
 * boards write it ("Campinas/SP", "Belo Horizonte/MG")?  At most
 * ROLE_REGION_MAX capitalised words with no occupational evidence, then
 * a subdivision code in capitals.  The gazetteer need not know the
 * town. */
static int town_slash_subdivision(tm_title *ti, size_t k0, size_t k1)
{
	size_t len, k;

	if (k1 < k0 + 2 || k1 - k0 - 1 > ROLE_REGION_MAX ||
	    !match_val(ti, k1 - 1, LC_LOCATION, "subdivision", 1, &len) || len != 1 ||
	    !(U(ti, k1 - 1)->flags & TF_ALLCAPS) || !glued(ti, k1 - 2, k1 - 1, "/"))
		return 0;
	for (k = k0; k + 1 < k1; k++)
		if (!ukept(ti, k) || !(U(ti, k)->flags & TF_CAP) ||
		    evidence_at(ti, k, 0, k0) != EV_NONE)
			return 0;
	return 1;
}

/* The employer named before a verb that says it recruits, at the start
 * of the title: "Talvero Systems sucht Lagerist", "Pellworth Retail is
 * hiring: Dentist", "Groupe Vervial recrute …" (employer/, value
 * `verb`; the verb may have gone already as marketing).  The name is
 * one to EMPLOYER_NAME_MAX words in the first segment, opening with a
 * capital, none of them naming an occupation ("Koch sucht Stelle"
 * stays); the occupation follows the verb.  Name and verb go. */
static int employer_verb(tm_title *ti, int caps)
{
	size_t k0, k1, v, len = 0;
	if (!ti->nseg || ti->segs[0].bracket)
		return 0;
	seg_kept(ti, 0, &k0, &k1);
	if (k0 >= k1 || !cap_word(ti, k0, caps))
		return 0;
	for (v = k0 + 1; v <= k0 + EMPLOYER_NAME_MAX && v < ti->nunit && useg(ti, v) == 0; v++)
		if (match_val(ti, v, LC_EMPLOYER, "verb", 0, &len))
			break;
	if (v > k0 + EMPLOYER_NAME_MAX || v >= ti->nunit || useg(ti, v) != 0 ||
	    !units_free(ti, k0, v))
		return 0;
	for (size_t k = k0; k < v; k++)
		if (U(ti, k)->kind != TK_WORD || evidence_at(ti, k, 0, k0) == EV_HEAD)
			return 0;
	for (size_t k = v + len; k < ti->nunit; k++)
		if (evidence_at(ti, k, 0, k0) == EV_HEAD)
			return remove_units(ti, k0, v + len, NF_EMPLOYER, NULL) ? -1 : 1;
	return 0;
}

/* Is segment s, kept from unit k0, the head going on after a bracket
 * with a link word that joins it to the head's last noun: "Gestor(a) de
 * Conta", "Técnico(a) da Manutenção"?  Such a segment is part of the
 * occupation, never an employer or a place of its own. */
static int head_going_on(tm_title *ti, size_t s, size_t head, size_t k0)
{
	size_t len;
	return ti->segs[s].resumed && s > head && ti->segs[head].index == 0 &&
	       match_val(ti, k0, LC_UNIT, "link", 1, &len) != NULL;
}

int pass_roles(tm_title *ti)
{
	size_t s, head = SIZE_MAX, first = SIZE_MAX, last, k0, k1;
	int caps = all_caps_line(ti), evidence = 0;

	if (HAS(ti, LC_EMPLOYER) && employer_verb(ti, caps) < 0)
		return -1;

	/* the head: the first segment with evidence, a proper name that
	 * ends like an occupation counting only when nothing else does */
	for (int names = !caps; names >= 0 && !evidence; names--)
		for (s = 0; s < ti->nseg; s++) {
			seg_kept(ti, s, &k0, &k1);
			if (k0 >= k1)
				continue;
			if (first == SIZE_MAX)
				first = k0;
			if (head == SIZE_MAX && !ti->segs[s].bracket)
				head = s;
			if (seg_evidence(ti, s, names) == EV_HEAD) {
				head = s;
				evidence = 1;
				break;
			}
		}
	if (first == SIZE_MAX)
		return 0;
	for (last = ti->nseg; last-- > 0;) {
		seg_kept(ti, last, &k0, &k1);
		if (k0 < k1)
			break;
	}
	for (s = 0; s < ti->nseg; s++) {
		seg_kept(ti, s, &k0, &k1);
		if (k0 >= k1)
			continue;
		if (s != head && (s > head || evidence) && !head_going_on(ti, s, head, k0)) {
			int ev = seg_evidence(ti, s, !caps);
			/* the code may be a field too: "PR" */
			if (s > head && ((ev == EV_NONE && subdivision_bracket(ti, s, k0, k1)) ||
					 (ev != EV_HEAD && town_slash_subdivision(ti, k0, k1)))) {
				if (remove_units(ti, k0, k1, NF_LOCATION, NULL))
					return -1;
				continue;
			}
			/* "Jönköping, Småland"; the place after the firm:
			 * "Hotell Fjordgløtt – Geiranger" */
			if (ev == EV_NONE && s == last && s > 0 &&
			    removed_place(ti, s - 1, s - 1 > head) &&
			    region_after(ti, s, k0, k1, caps)) {
				if (remove_units(ti, k0, k1, NF_LOCATION, NULL))
					return -1;
				continue;
			}
			if (ev == EV_NONE && s > head && place_beside_removed(ti, k0, k1, caps)) {
				if (remove_units(ti, k0, k1, NF_LOCATION, NULL))
					return -1;
				continue;
			}
			if (ev != EV_HEAD && employer_segment(ti, k0, k1, ev, caps)) {
				if (remove_units(ti, k0, k1, NF_EMPLOYER, NULL))
					return -1;
				continue;
			}
			if (ev == EV_NONE && place_segment(ti, s, caps, 1)) {
				if (remove_place_segment(ti, s))
					return -1;
				continue;
			}
		}
		if (employer_tail(ti, s, first, caps) || workplace_tail(ti, s, head, caps))
			return -1;
	}
	return 0;
}

/* pass_employer.c - employer slots: a firm's name with its legal form or
 * after an employer marker, the workplace kinds, and the places written
 * beside a removed firm.  The location slots it reads are pass_place.c's
 * (pass_place.h). */
#include <string.h>

#include "norm/pass_place.h"

/* The longest legal form at unit k, of employer/ or business/ ("Limited
 * Company", "S.Coop.And.", "aktiebolag"). */
static inline const lex_entry *legal_form(tm_title *ti, size_t k, size_t *len)
{
	size_t l2;
	/* most units start no phrase of either: answered at once */
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << LC_EMPLOYER | 1u << LC_BUSINESS)))
		return NULL;
	const lex_entry *e = match_val(ti, k, LC_EMPLOYER, "legal", 1, len);
	const lex_entry *b = match_val(ti, k, LC_BUSINESS, "legal", 1, &l2);
	if (b && (!e || l2 > *len)) {
		*len = l2;
		return b;
	}
	return e;
}

/* A legal form of any language written in capitals at the end of a
 * segment, after a capitalised name: Norrsvalk Krog AB, Mirandol SAS. */
static int caps_legal(tm_title *ti, size_t k, size_t *len)
{
	size_t k0, k1;
	const lex_entry *e;
	if (!(U(ti, k)->flags & TF_ALLCAPS) || k == 0 || !cap_word(ti, k - 1) ||
	    !ukept(ti, k - 1) || roman_caps(ti, k, 4))
		return 0;
	ti->any_lang = 1;
	e = legal_form(ti, k, len);
	ti->any_lang = 0;
	if (!e)
		return 0;
	seg_kept(ti, useg(ti, k), &k0, &k1);
	return k + *len == k1 && k - 1 >= k0 &&
	       (ti->segs[useg(ti, k)].index > 0 || ti->segs[useg(ti, k)].bracket);
}

/* Does a segment after s hold kept words? */
static int later_content(tm_title *ti, size_t s)
{
	for (size_t t = s + 1; t < ti->nseg; t++) {
		size_t a, b;
		seg_kept(ti, t, &a, &b);
		if (a < b)
			return 1;
	}
	return 0;
}

int head_within(tm_title *ti, size_t k0, size_t k1)
{
	size_t len;
	for (size_t k = k0; k < k1; k++)
		if (ukept(ti, k) && (ti->prot[ti->unit[k]] ||
				     match_val(ti, k, LC_OCCUPATION, "head", 1, &len)))
			return 1;
	return 0;
}

/* Is the legal form at unit k (len units), in segment s whose kept units
 * are [k0, k1), written before the name of its firm, with the title
 * going on elsewhere?  The form in capitals or capitalised, then a
 * capitalised name of at most EMPLOYER_NAME_MAX words to the segment's
 * end with no word naming an occupation; and the title goes on in
 * another segment ("Sandėlininkas – UAB Nemuno logistika", "UAB Valdas
 * – vairuotojas") or before the form, with a word naming the occupation
 * ("Vairuotojas UAB Valdas"). */
static int form_before_name(tm_title *ti, size_t s, size_t k, size_t len,
			    size_t k0, size_t k1, int caps)
{
	size_t n = k + len;
	const tm_seg *g = &ti->segs[s];

	if (!(caps || cap_word(ti, k)) || n >= k1 || k1 - n > EMPLOYER_NAME_MAX ||
	    U(ti, n)->kind != TK_WORD || !(caps || cap_word(ti, n)) ||
	    head_within(ti, n, k1))
		return 0;
	if (k == k0)
		return g->bracket || g->index > 0 || later_content(ti, s);
	return head_within(ti, k0, k);
}

/* Does [k0, k1) hold a kept word written in lower case? */
static int lower_within(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (ukept(ti, k) && U(ti, k)->kind == TK_WORD && !cap_word(ti, k))
			return 1;
	return 0;
}

/* Is unit k a kept location preposition or employer marker of one word,
 * of any language ("en", "na", "at")?  Before a firm's capitalised name
 * and legal form it says what follows it, whatever the hint. */
static int link_word(tm_title *ti, size_t k)
{
	size_t len;
	int any = ti->any_lang, link;
	ti->any_lang = 1;
	link = ukept(ti, k) && (match_val(ti, k, LC_EMPLOYER, "marker", 1, &len) ||
				match_val(ti, k, LC_LOCATION, "prep", 1, &len)) && len == 1;
	ti->any_lang = any;
	return link;
}

/* Is a kept word naming an occupation in [k0, k1) (a `head`, or a word
 * with an occupational ending: "Programador", "Mecânico/a") followed by
 * a word that links it to the firm after it: the next word in lower
 * case, or a location preposition or employer marker later on ("Programador en Transportes
 * Aldevia S.A.", "AYUDANTE DE COCINA EN TRANSPORTES ALDEVIA S.A.",
 * "Programador Web Na Carvalhena Serviços Lda.")?  A firm's name may
 * hold a word that ends like an occupation, followed by another
 * capitalised word ("Logistica Brembana e Figli S.r.l."). */
static int occupation_linked(tm_title *ti, size_t k0, size_t k1, int caps)
{
	for (size_t k = k0; k + 1 < k1; k++) {
		size_t n = k + 1, len;
		if (!ukept(ti, k) || U(ti, k)->kind != TK_WORD ||
		    !(ti->uend[k] || match_val(ti, k, LC_OCCUPATION, "head", 1, &len)))
			continue;
		while (n < k1 && !(ukept(ti, n) && U(ti, n)->kind == TK_WORD))
			n++;
		if (n < k1 && !caps && !cap_word(ti, n))
			return 1;
		for (; n < k1; n++)
			if (link_word(ti, n))
				return 1;
		return 0;
	}
	return 0;
}

/* The stars of a hotel at unit k: one digit from 1 to 5 ("Hotel 4*",
 * "hôtel 3★": the star symbol is gone by then, the "*" is no unit), with
 * the word for stars after it (units/, value `star`: "4 stelle", "5-star",
 * "4-Sterne-Hotel").  Returns the number of units, or 0. */
static size_t stars_at(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	const char *p = ti->text + t->off;
	size_t len;
	if (t->kind != TK_NUM || t->len != 1 || p[0] < '1' || p[0] > '5')
		return 0;
	if (k + 1 < ti->nunit && useg(ti, k + 1) == useg(ti, k) &&
	    match_val(ti, k + 1, LC_UNIT, "star", 1, &len))
		return 1 + len;
	return 1;
}

/* Is segment s, all of it kept, a workplace kind and
 * nothing else: business kind phrases (business/, value `kind`), joined
 * by connectors or "&" ("Hotel", "Centro Comercial", "Hotel &
 * Restaurant"), with their stars ("hotel 5*") and marketing words, none
 * of them an occupational word?  A kind that is also
 * a field names a trade ("Verkäufer – Bäckerei"), and what a gender
 * pair left of a segment is none ("Kierownik / [Kierowniczka] sklepu"). */
static int kind_only(tm_title *ti, size_t s)
{
	size_t k = ti->segs[s].u0, k1 = ti->segs[s].u1, len;
	int kinds = 0;
	/* every unit of the segment kept, but the stars, which an earlier
	 * rule may have taken as a number, and marketing words ("luxury",
	 * "5-star") */
	while (k < k1) {
		if ((len = stars_at(ti, k)) && k + len <= k1) {
			k += len;
			continue;
		}
		if (!ukept(ti, k) && ti->rm[ti->unit[k]] == NF_MARKETING) {
			k++;
			continue;
		}
		if (!ukept(ti, k) || ti->prot[ti->unit[k]] ||
		    (ti->ucats[k] & (1u << LC_OCCUPATION)))
			return 0;
		if (match_val(ti, k, LC_BUSINESS, "kind", 1, &len) && k + len <= k1 &&
		    units_free(ti, k, k + len)) {
			/* the longer phrase wins: "Centro Comercial" holds
			 * the head "comercial" */
			kinds++;
			k += len;
		} else if (kinds && k + 1 < k1 &&
			   (match_val(ti, k, LC_UNIT, "connector", 1, &len) ||
			    (U(ti, k)->kind == TK_SYM && U(ti, k)->ch == '&'))) {
			k += U(ti, k)->kind == TK_SYM ? 1 : len;
		} else
			return 0;
	}
	return kinds > 0;
}

/* Segments that name only the kind of workplace after a segment that
 * names the occupation: "Rezeptionist – Hotel", "Vendedora - Centro
 * Comercial", "Koch | Restaurant".  Curators count occupations; the
 * workplace adds nothing to the key.  A kind inside the occupation's
 * segment stays ("Hotel Receptionist", "Restaurant Manager"), and so
 * does a title of one segment. */
static int workplace_segments(tm_title *ti)
{
	int occupation = 0;
	for (size_t s = 0; s < ti->nseg; s++) {
		size_t k0, k1;
		seg_kept(ti, s, &k0, &k1);
		if (k0 >= k1)
			continue;
		if (occupation && kind_only(ti, s)) {
			if (remove_units(ti, k0, k1, NF_EMPLOYER, NULL))
				return -1;
			continue;
		}
		for (size_t k = k0; k < k1 && !occupation; k++)
			occupation = ukept(ti, k) && U(ti, k)->kind == TK_WORD &&
				     (ti->uend[k] || head_within(ti, k, k + 1));
	}
	return 0;
}

static int occupation_within(tm_title *ti, size_t k0, size_t k1);

/* Is the legal form e at unit k, right after the one word opening its
 * segment, a word of the trade instead: of another language than the
 * title's, after a word naming an occupation ("Programmatore PLC" with
 * an Italian hint: the programmable logic controller, not the English
 * public limited company)?  Under the form's own language the name
 * stays a firm's ("Koch GmbH").  Capitals are not asked for: the clean
 * title, read again, must keep it too. */
static int trade_acronym(tm_title *ti, const lex_entry *e, size_t k, size_t k0)
{
	return ti->lang && e->lang[0] && strcmp(e->lang, ti->lang) != 0 &&
	       k == k0 + 1 && occupation_within(ti, k0, k);
}

int pass_employer(tm_title *ti)
{
	size_t k, len, k0, k1;
	int caps = all_caps_line(ti);

	if (HAS(ti, LC_BUSINESS) && ti->nseg > 1 && workplace_segments(ti))
		return -1;

	/* legal forms: Nordwerk GmbH, Maison Ortalie SARL */
	for (k = 0; k < ti->nunit; k++) {
		size_t start, m;
		uint32_t s;
		const tm_seg *g;
		const lex_entry *lf = legal_form(ti, k, &len);
		if (!lf && !caps_legal(ti, k, &len))
			continue;
		s = useg(ti, k);
		g = &ti->segs[s];
		seg_kept(ti, s, &k0, &k1);
		if (lf && trade_acronym(ti, lf, k, k0))
			continue;
		if (form_before_name(ti, s, k, len, k0, k1, caps)) {
			if (remove_units(ti, k, k1, NF_EMPLOYER, NULL))
				return -1;
			k = k1 - 1;
			continue;
		}
		start = SIZE_MAX;
		for (m = k; m > k0 && k - m < EMPLOYER_BACK; m--) {
			size_t l2;
			if (match_val(ti, m - 1, LC_EMPLOYER, "marker", 1, &l2)) {
				start = m - 1;
				break;
			}
		}
		/* a firm written in lower case after an occupation and a
		 * word that links them: "traductor [en clínica orvenda
		 * s.l.]" (no capitals tell the name, the link word does);
		 * the occupation at most EMPLOYER_BACK units before it */
		if (start == SIZE_MAX && !caps && k > k0 + 1 && !cap_word(ti, k - 1))
			for (m = k - 1; m > k0 && k - m <= EMPLOYER_NAME_MAX; m--)
				if (link_word(ti, m) &&
				    occupation_within(ti, m - k0 > EMPLOYER_BACK ? m - EMPLOYER_BACK : k0, m)) {
					start = m;
					break;
				}
		if (start == SIZE_MAX) {
			/* an occupation named before the firm in its segment
			 * (a head of occupation/), a word not capitalised
			 * between them, stays: "Oferta: Vendedor en Transportes
			 * Aldevia S.A." (not "Valdoria Logistik GmbH",
			 * "Logistica Brembana e Figli S.r.l.") */
			int occ = k > k0 && cap_word(ti, k - 1) &&
				  ((!caps && head_within(ti, k0, k) && lower_within(ti, k0, k)) ||
				   occupation_linked(ti, k0, k, caps));
			if ((g->bracket || g->index > 0) && !occ)
				start = k0;
			else if (k > k0 && k - k0 <= 3 && !occ &&
				 (k + len < k1 || later_content(ti, s)))
				start = k0; /* Nordwerk GmbH sucht ..., Nordwerk GmbH - Koch */
			else {
				/* the capitalised name before the form, at most
				 * three words, never the first word of the title */
				start = k;
				while (start > k0 + 1 && k - start < 3 &&
				       cap_word(ti, start - 1) && ukept(ti, start - 1))
					start--;
				/* and the word linking it to the occupation:
				 * "Cook [en Clínica Orvenda S.L.]" */
				if (occ && start > k0 + 1 && start < k && link_word(ti, start - 1))
					start--;
			}
		}
		if (start == k && k == k0 && k + len < k1)
			continue; /* a lone legal word opening a title: not a firm */
		/* the business kind before the name, from the segment's start,
		 * when the title goes on elsewhere: "domov pro seniory
		 * Brenriven a.s.: chůva" */
		{
			size_t kl;
			if (start > k0 && (g->bracket || g->index > 0 || later_content(ti, s)) &&
			    match_val(ti, k0, LC_BUSINESS, "kind", 1, &kl) && k0 + kl == start)
				start = k0;
		}
		if (remove_units(ti, start, k + len, NF_EMPLOYER, NULL))
			return -1;
		k += len - 1;
	}
	/* markers: at Brennfeld Foods, bei Valdoria, chez Ortalie, @ Nordwerk */
	for (k = 0; k + 1 < ti->nunit; k++) {
		size_t j, plen;
		int strong;
		const char *cc;
		if (!ukept(ti, k) || ti->prot[ti->unit[k]] ||
		    !match_val(ti, k, LC_EMPLOYER, "marker", 1, &len))
			continue;
		j = k + len;
		if (j >= ti->nunit || useg(ti, j) != useg(ti, k) || !ukept(ti, j))
			continue;
		if (place_at(ti, j, &plen, &strong, &cc))
			continue; /* bei München: a location */
		if (!(cap_word(ti, j) || caps || (U(ti, k)->kind == TK_SYM)))
			continue;
		seg_kept(ti, useg(ti, k), &k0, &k1);
		if (k == k0)
			continue; /* nothing before it: not an employer slot */
		if (remove_units(ti, k, k1, NF_EMPLOYER, NULL))
			return -1;
		k = k1;
	}
	return 0;
}

/* Does [k0, k1) hold a kept word naming an occupation: a `head` of
 * occupation/, a protected phrase, a word with an occupational ending? */
static int occupation_within(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (ukept(ti, k) && U(ti, k)->kind == TK_WORD && ti->uend[k])
			return 1;
	return head_within(ti, k0, k1);
}

/* Is [k, k1) a place written beside a firm: a location preposition of
 * any language ("en", "à", "in"; the firm says what it is, whatever the
 * hint) and a run of places to k1, or a run of places alone that needs
 * no strong slot? */
static int firm_place(tm_title *ti, size_t k, size_t k1)
{
	size_t plen;
	int strong, prep = link_word(ti, k) && !match_val(ti, k, LC_EMPLOYER,
							  "marker", 1, &plen);
	const char *cc;
	if (prep)
		k++;
	if (k >= k1 || !units_free(ti, k, k1) || !place_at(ti, k, &plen, &strong, &cc) ||
	    (strong && !prep) || place_acronym(ti, k, plen, all_caps_line(ti)))
		return 0;
	return place_run(ti, k, plen, prep) == k1;
}

/* A place written right before or after a firm's name that the employer
 * rule removed, ending its segment's kept words after an occupation:
 * "Ingeniero de software [en Transportes Aldevia S.A.] Madrid",
 * "Técnico de helpdesk [en Clínica Orvenda S.L.] en Bilbao",
 * "Ingeniero industrial en Zaragoza [en Transportes Aldevia S.A.]".
 * The place is where the work is, not part of the occupation. */
int firm_places(tm_title *ti)
{
	for (size_t s = 0; s < ti->nseg; s++) {
		size_t k0, k1, k;
		seg_kept(ti, s, &k0, &k1);
		if (k1 - k0 < 2)
			continue;
		/* after the firm: the kept units after the last removed
		 * employer token of the segment */
		for (k = k1 - 1; k > k0 && ukept(ti, k - 1); k--)
			;
		if (k > k0 && ti->rm[ti->unit[k - 1]] == NF_EMPLOYER &&
		    occupation_within(ti, k0, k) && firm_place(ti, k, k1)) {
			if (place_take(ti, k, k1))
				return -1;
			continue;
		}
		/* before the firm: the segment's kept units end where a
		 * removed employer follows in the segment */
		if (k1 < ti->nunit && useg(ti, k1) == s && !ukept(ti, k1) &&
		    ti->rm[ti->unit[k1]] == NF_EMPLOYER)
			for (k = k1 - 1; k > k0 && k1 - k <= 4; k--)
				if (link_word(ti, k) && occupation_within(ti, k0, k) &&
				    firm_place(ti, k, k1)) {
					if (place_take(ti, k, k1))
						return -1;
					break;
				}
	}
	return 0;
}

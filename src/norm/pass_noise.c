/* pass_noise.c - hashtags, and the phrase lexicons peeled from the
 * segment edges. */
#include <stdlib.h>
#include <string.h>

#include "norm/pass_noise.h"

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
 * "bei", "bis", "und", "Tel.", and at a segment's end the "mit" of
 * "Lagerist mit [Prämie]" (units/, value `with`) */
static int dangling(tm_title *ti, size_t k)
{
	size_t len;
	const lex_entry *e;
	if (plus_glued(ti, k))
		return 0; /* C+E */
	if (match_val(ti, k, LC_UNIT, "connector", 1, &len) && len == 1)
		return 1;
	if (match_val(ti, k, LC_UNIT, "contact", 1, &len) && len == 1)
		return 1;
	if (match_val(ti, k, LC_UNIT, "with", 1, &len) && len == 1)
		return 1;
	/* a pay lead that is the title's last word is a word of its own:
	 * "Senior PA [at Keldmoor Engineering Ltd]" is no Irish "pá" */
	if (match_val(ti, k, LC_PAY, "lead", 1, &len) && len == 1)
		return !last_word(ti, k, k + 1);
	if (match_val(ti, k, LC_EMPLOYER, "marker", 1, &len) && len == 1)
		return 1;
	e = match_cat(ti, k, LC_LOCATION, 1, &len);
	return e && len == 1 && (!strcmp(e->value, "prep") || !strcmp(e->value, "before"));
}

static int removed_tok(const tm_title *ti, size_t t)
{
	return t < ti->tl.n && ti->rm[t] != RM_NONE;
}

/* Does a link phrase start at unit k, kept, with a kept word of the
 * segment's kept units [.., b) after it that names no occupation (the
 * English "Urgent van driver" holds no Dutch "van"), and neither that
 * word nor the link starts a phrase of the peeled lexicons, a longer one
 * than the link for the link ("Nous recrutons [de nuit]"; "des" folds
 * like the pay lead "dès")? */
static int link_at(tm_title *ti, size_t k, size_t b)
{
	size_t len, n, l2;
	if (k >= b || !match_val(ti, k, LC_UNIT, "link", 1, &len) ||
	    (n = k + len) >= b || !units_free(ti, k, n + 1))
		return 0;
	return U(ti, n)->kind == TK_WORD && !ti->uend[n] && !head_within(ti, n, n + 1) &&
	       !(match_mask(ti, k, phrase_mask, 1, &l2) && l2 > len) &&
	       !match_mask(ti, n, phrase_mask, 1, &l2);
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

/* Are the kept units [k0, k1) of segment s all contact words (units/,
 * value `contact`: "Bel", "voor info", "Tel."), with contact data
 * removed between or beside them in the segment? */
static int contact_words(tm_title *ti, size_t s, size_t k0, size_t k1)
{
	size_t k = k0, len;
	int contact = 0;
	const tm_seg *g = &ti->segs[s];
	while (k < k1) {
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			k++;
		else if (match_val(ti, k, LC_UNIT, "contact", 1, &len) &&
			 units_free(ti, k, k + len))
			k += len;
		else
			return 0;
	}
	for (size_t t = ti->unit[g->u0]; t <= ti->unit[g->u1 - 1] && !contact; t++)
		contact = ti->rm[t] != RM_NONE && is_contact_kind(ti->rm[t]);
	return contact;
}

/* An application channel in segment s, kept units [k0, k1): "apply
 * via", "bewerben über", "postuler via", "solliciteer via" (units/,
 * value `channel`) with what it names after it to the segment's end
 * ("Jobboard Kestrel", "unser Karriereportal", "email"), at most
 * CHANNEL_REST_MAX units holding no word that names an occupation; the
 * title keeps a word elsewhere.  Returns 1 when it removed one, 0, or
 * -1 (memory). */
static int channel(tm_title *ti, size_t k0, size_t k1)
{
	size_t len;
	for (size_t k = k0; k < k1; k++) {
		if (!ukept(ti, k) || ti->prot[ti->unit[k]] ||
		    !match_val(ti, k, LC_UNIT, "channel", 1, &len) || k + len > k1 ||
		    k1 - (k + len) > CHANNEL_REST_MAX || head_within(ti, k, k1) ||
		    !kept_elsewhere(ti, k, k1))
			continue;
		return remove_units(ti, k, k1, NF_MARKETING, NULL) ? -1 : 1;
	}
	return 0;
}

/* Does a kept unit of [k0, k1) name an occupation: an occupational
 * ending, a word of occupation/, a head phrase or a protected one? */
static int occ_within(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (ukept(ti, k) && (ti->uend[k] || (ti->ucats[k] & (1u << LC_OCCUPATION))))
			return 1;
	return head_within(ti, k0, k1);
}

/* Units [k0, k1), the kept words of segment s, are a requirement: a
 * segment beside the occupation (not the head, nor the head going on
 * after a bracket) of at most NEED_SEG_MAX units that a requirement
 * phrase (units/, value `need`: "required", "erforderlich", "apprécié",
 * "imprescindible", "gewenst") ends, or opens when no word after it
 * names an occupation ("Se valora inglés", not "Approved Electrician"),
 * no word of it protected;
 * the title keeps a word elsewhere.  What is required is no part of
 * the occupation, even when it names one ("– Driver Essential",
 * "– Cariste CACES 1 apprécié").  Returns 1 when it removed them, 0,
 * or -1 (memory). */
static int need_segment(tm_title *ti, size_t s, size_t k0, size_t k1)
{
	size_t len, k;
	int need = 0;

	if (ti->segs[s].index == 0 || k1 - k0 > NEED_SEG_MAX)
		return 0;
	/* the only segment naming an occupation is the head, whatever
	 * noise came before it: "URGENT: Electrician needed" */
	if (occ_within(ti, k0, k1) && k0 <= NEED_LOOK && ti->nunit - k1 <= NEED_LOOK &&
	    !occ_within(ti, 0, k0) && !occ_within(ti, k1, ti->nunit))
		return 0;
	/* opening it, only where no word names an occupation: "Approved
	 * Electrician" is a grade of the trade */
	if (ukept(ti, k0) && match_val(ti, k0, LC_UNIT, "need", 1, &len) && k0 + len <= k1 &&
	    !head_within(ti, k0 + len, k1)) {
		need = 1;
		for (k = k0 + len; k < k1; k++)
			if (ti->uend[k])
				need = 0; /* an occupational ending: "Electrician" */
	}
	for (k = k1 - k0 > NEED_WORDS_MAX ? k1 - NEED_WORDS_MAX : k0; !need && k < k1; k++)
		if (ukept(ti, k) && match_val(ti, k, LC_UNIT, "need", 1, &len) && k + len == k1)
			need = 1;
	if (!need || !kept_elsewhere(ti, k0, k1))
		return 0;
	for (k = k0; k < k1; k++)
		if (ti->prot[ti->unit[k]])
			return 0;
	return remove_units(ti, k0, k1, NF_MARKETING, NULL) ? -1 : 1;
}

/* Are units [k0, k1) kept words with nothing occupational (no word of
 * occupation/, no protected phrase), all in one run? */
static int lead_words(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (!ukept(ti, k) || ti->prot[ti->unit[k]] || U(ti, k)->kind != TK_WORD ||
		    (ti->ucats[k] & (1u << LC_OCCUPATION)))
			return 0;
	return 1;
}

/* The end of a phrase ending at unit e: a phrase that ends in a number
 * takes the other end of the range glued to it ("Level 3-4", "level
 * 2/3"); else e. */
static size_t range_end(tm_title *ti, size_t e)
{
	if (e > 0 && e < ti->nunit && U(ti, e - 1)->kind == TK_NUM &&
	    U(ti, e)->kind == TK_NUM && ukept(ti, e) && !ti->prot[ti->unit[e]] &&
	    ti->unit[e] == ti->unit[e - 1] + 2 && glued(ti, e - 1, e, "-/"))
		return e + 1;
	return e;
}

/* Does a link phrase follow at unit j, directly or past at most
 * PHRASE_CHAIN_MAX phrases of the peeled lexicons in a row within the
 * kept units [.., b)? */
static int link_follows(tm_title *ti, size_t j, size_t b)
{
	size_t len;
	for (int n = 0; j < b && ukept(ti, j); n++) {
		if (link_at(ti, j, b))
			return 1;
		if (n == PHRASE_CHAIN_MAX || !match_mask(ti, j, phrase_mask, 1, &len))
			return 0;
		j += len;
	}
	return 0;
}

static int peel_segment(tm_title *ti, size_t s, int *changed)
{
	size_t k0, k1, k, len;

	seg_kept(ti, s, &k0, &k1);
	/* every rule below reads the segment's kept units, and units are
	 * only ever removed: a segment with none ("(m/w/d)") has nothing */
	if (k0 == k1)
		return 0;
	size_t a = k0, b = k1;
	/* a line with no phrase of these lexicons has none to peel */
	for (k = ti->lcats & phrase_mask ? k0 : k1; k < k1; k++) {
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
		len = range_end(ti, k + len) - k;
		/* phrases that a link word follows head a phrase going
		 * on after it: "Saisonnier cueillette des cerises" and
		 * "Stagionale raccolta delle ciliegie" stay whole (what
		 * is picked says what the work is); the title never
		 * starts with the link word */
		if (link_follows(ti, k + len, b))
			continue;
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
	/* years left at an edge by the removals (a year is a number) */
	if (ti->lflags & LF_NUM) {
		seg_kept(ti, s, &k0, &k1);
		if (k0 < k1 && noise_date_at_edge(ti, k0))
			*changed = 1;
		seg_kept(ti, s, &k0, &k1);
		if (k0 < k1 && noise_date_at_edge(ti, k1 - 1))
			*changed = 1;
	}
	/* a pay remark after a "+" at the segment's end, no amount before
	 * it: "Support Worker + sleep-in allowance" */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && (ti->lflags & LF_SYM) && HAS(ti, LC_PAY) &&
	    (k = plus_remark(ti, k0, k1)) < k1) {
		if (remove_units(ti, k, k1, NF_PAY, NULL))
			return -1;
		*changed = 1;
	}
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
	/* contact words all round removed contact data, the segment's
	 * only words: "Bel [07700 900125] voor info", "Tel. [0711 …] für
	 * Rückfragen" */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && ti->lflags & (LF_NUM | LF_SYM | LF_URL) && HAS(ti, LC_UNIT) &&
	    contact_words(ti, s, k0, k1) && kept_elsewhere(ti, k0, k1)) {
		if (remove_units(ti, k0, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	/* a degree word left at an edge by the phrase it qualified: "fuld
	 * remote", "cianobair go hiomlán" */
	seg_kept(ti, s, &k0, &k1);
	for (k = HAS(ti, LC_UNIT) ? k0 : k1; k < k1; k++) {
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
	/* a noun for the work itself left before the remote, schedule or
	 * workload phrase or the hours that said how it is done: "Lucru
	 * [100% remote]", "Programator lucru [100% remote]", "program [8
	 * ore]"; opening its segment or right
	 * after a word naming the occupation ("Social Work [Part-time]"
	 * keeps it) */
	seg_kept(ti, s, &k0, &k1);
	for (k = HAS(ti, LC_UNIT) ? k0 : k1; k < k1; k++) {
		/* one word: the token after it removed as the phrase */
		size_t t1 = ti->unit[k] + 1;
		if (U(ti, k)->kind != TK_WORD || !removed_tok(ti, t1) ||
		    (ti->rm[t1] != NF_SCHEDULE && ti->rm[t1] != NF_WORKLOAD &&
		     ti->rm[t1] != NF_HOURS) ||
		    !match_val(ti, k, LC_UNIT, "work", 1, &len) || len != 1 ||
		    !units_free(ti, k, k + 1))
			continue;
		if (k != k0 && !(ukept(ti, k - 1) && useg(ti, k - 1) == s &&
				 (head_within(ti, k - 1, k) || ending_whole(ti, k - 1))))
			continue;
		if (remove_units(ti, k, k + 1, NF_SCHEDULE, NULL))
			return -1;
		*changed = 1;
		break;
	}
	/* the contract word or preposition left before the duration the
	 * schedule rule removed, in a segment beside the occupation:
	 * "befristet für [2 Jahre]", "contrat de [3 mois]", "initial [3
	 * month contract]"; at most DURATION_LEAD_MAX words, none of
	 * them occupational */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && (ti->segs[s].bracket || ti->segs[s].index > 0) &&
	    k1 - k0 <= DURATION_LEAD_MAX && ti->unit[k1 - 1] + 1 < ti->tl.n &&
	    ti->rm[ti->unit[k1 - 1] + 1] == NF_SCHEDULE && lead_words(ti, k0, k1) &&
	    kept_elsewhere(ti, k0, k1)) {
		if (remove_units(ti, k0, k1, NF_SCHEDULE, NULL))
			return -1;
		*changed = 1;
	}
	/* hanging words at the two edges */
	seg_kept(ti, s, &k0, &k1);
	/* (not after a link word, whose complement it is: "Medico di
	 * base", "Technicien de proximité") */
	if (k0 < k1 && !ti->prot[ti->unit[k1 - 1]] && dangling(ti, k1 - 1) &&
	    !(HAS(ti, LC_UNIT) && k1 - 1 > k0 && link_ends(ti, k0, k1 - 1) < k1 - 1) &&
	    (removed_tok(ti, ti->unit[k1 - 1] + 1) ||
	     (k1 < ti->nunit && !ukept(ti, k1) && useg(ti, k1) == s))) {
		if (remove_units(ti, k1 - 1, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	/* a link word left at the segment's end by what it joined the
	 * title to: "Leiter der [Region Süd]", "Manager van [regio
	 * Utrecht]" */
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && HAS(ti, LC_UNIT) && removed_tok(ti, ti->unit[k1 - 1] + 1) &&
	    ti->rm[ti->unit[k1 - 1] + 1] != NF_GENDER &&
	    (k = link_ends(ti, k0, k1)) < k1) {
		if (remove_units(ti, k, k1, NF_MARKETING, NULL))
			return -1;
		*changed = 1;
	}
	seg_kept(ti, s, &k0, &k1);
	if (k0 < k1 && k0 > 0 && !ti->prot[ti->unit[k0]] &&
	    match_val(ti, k0, LC_UNIT, "connector", 1, &len) && len == 1 &&
	    ti->unit[k0] > 0 && removed_tok(ti, ti->unit[k0] - 1) &&
	    ti->rm[ti->unit[k0] - 1] != NF_GENDER) { /* "/ Vendeuse [en] …" */
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
	/* application channels, once a call (no other removal makes one) */
	if (HAS(ti, LC_UNIT))
		for (size_t s = 0; s < ti->nseg; s++) {
			size_t k0, k1;
			seg_kept(ti, s, &k0, &k1);
			if (k0 < k1 && channel(ti, k0, k1) < 0)
				return -1;
			seg_kept(ti, s, &k0, &k1);
			if (k0 < k1 && need_segment(ti, s, k0, k1) < 0)
				return -1;
		}
	/* nothing removed since the last call's rounds found nothing, and
	 * its numbers rule nothing either: the rounds would read the same
	 * title again, and only an edge seniority word is read otherwise
	 * in a later call: without one, they would find nothing */
	if (ti->peeled == ti->gen && ti->settled && !HAS(ti, LC_SENIORITY))
		return 0;
	/* a segment peeled with nothing found at the title's present state
	 * (gen: every removal moves it) would find nothing again: it is
	 * skipped until something is removed (the rounds are the same) */
	for (size_t s = 0; s < ti->nseg; s++)
		ti->segs[s].still = 0;
	while (changed && rounds++ < 64) {
		changed = 0;
		for (size_t s = 0; s < ti->nseg; s++) {
			int found = 0;
			if (ti->segs[s].still == ti->gen)
				continue;
			if (peel_segment(ti, s, &found))
				return -1;
			if (found)
				changed = 1;
			else
				ti->segs[s].still = ti->gen;
		}
	}
	uint64_t before = ti->gen;
	if (lone_numbers(ti))
		return -1;
	if (!changed) {
		ti->peeled = ti->gen;
		ti->settled = before == ti->gen;
	}
	return 0;
}

/* pass.h - the normaliser's rules over an annotated title (title.h).
 * Each marks tokens removed with their kind and records the facet
 * spans; none touches anything but the title it is given (and reads its
 * lexicon).  All return 0, or -1 when memory ran out. */
#ifndef TM_PASS_H
#define TM_PASS_H

#include "norm/title.h"

/* Look-aheads of the passes are bounded or remembered, so that every pass
 * is linear in the line length (tests/cases/check_linear.py):
 * a reference code is looked for after at most REF_LEAD_MAX lead-in
 * phrases in a row ("Job-ID Nr. #4711" has three; "#" x 100,000 made
 * every "#" look to the end of the line). */
#define REF_LEAD_MAX 4
/* An employer marker ("bei", "chez", "at") is looked for at most
 * EMPLOYER_BACK units before a legal form ("bei Valdoria Logistik Nord
 * GmbH"); "a b c d e GmbH " x 70,000 looked back to the segment's start
 * from every "GmbH". */
#define EMPLOYER_BACK 8
/* The words that may stand before contact data as its label and go with
 * it ("CV na adres praca@…", "enviar CV a …", "lisätiedot: 01632 …"):
 * a label is short, and anything longer is more than a label. */
#define CONTACT_LABEL_MAX 4
/* An application channel ("apply via", "bewerben über", "postuler
 * via") takes the rest of its segment with it, the board or portal it
 * names: at most CHANNEL_REST_MAX units after the phrase. */
#define CHANNEL_REST_MAX 6
/* The words left before a removed duration in a segment beside the
 * occupation ("befristet für [2 Jahre]", "contrat de [3 mois]") go with
 * it when they are at most DURATION_LEAD_MAX. */
#define DURATION_LEAD_MAX 2
/* A segment beside the occupation that a requirement word opens or
 * ends ("– CSCS card required", "– Führerschein erforderlich",
 * "(JIB Approved)") names what the applicant must bring and goes whole
 * when it holds at most NEED_SEG_MAX kept units; the requirement phrase
 * ending it is looked for at most NEED_WORDS_MAX units back. */
#define NEED_SEG_MAX 6
#define NEED_WORDS_MAX 3
/* Whether another segment names an occupation is read at most
 * NEED_LOOK units on each side of the segment; a title going on further
 * is taken to name one there (the read stays linear in the title). */
#define NEED_LOOK 64
/* A day alone as the whole of a segment beside the occupation
 * ("Kassierer – Samstag") is a schedule when written out: a word of at
 * least DAY_NAME_MIN bytes (abbreviations are also codes: SAT, VR). */
#define DAY_NAME_MIN 4
/* A British outward code alone ("Leicester LE1") is a postcode only
 * right after a place phrase, which starts at most POSTCODE_PLACE_BACK
 * units before it. */
#define POSTCODE_PLACE_BACK 4
/* A pay word written before an amount ("Day Rate £180", "KV-Lohn
 * € 2.100") is looked for at most PAY_WORD_BACK units before it. */
#define PAY_WORD_BACK 3
/* A link phrase (units/, value `link`: "of the", "van de", "de la") is
 * looked for at most LINK_WORDS_MAX units before a segment's end: the
 * longest the lexicon holds. */
#define LINK_WORDS_MAX 3
/* The word a link joins may end in a removed gender suffix ("Камериер/ка
 * за"): at most LINK_GENDER_SKIP_MAX removed units are stepped over. */
#define LINK_GENDER_SKIP_MAX 2
/* A phrase of the peeled lexicons is kept when a link word follows it,
 * directly or after at most PHRASE_CHAIN_MAX more such phrases
 * ("Saisonnier cueillette des cerises"): the words it heads go on. */
#define PHRASE_CHAIN_MAX 3
/* Shift patterns (pass_schedule): shifts times hours, "3x8", with at
 * most ROTA_SHIFTS_MAX shifts of ROTA_HOURS_MIN to ROTA_HOURS_MAX hours
 * (or 24; "4x4" is a vehicle); days on and off, "4/4", "14/14", at most
 * ROTA_DAYS_MAX days each. */
#define ROTA_SHIFTS_MAX 5
#define ROTA_HOURS_MIN 6
#define ROTA_HOURS_MAX 12
#define ROTA_DAYS_MAX 28
/* A count of days written before a schedule phrase in a segment beside
 * the occupation ("hybrydowo 2 dni w biurze", "2 dage om ugen"): one
 * digit, at most SCHEDULE_COUNT_MAX. */
#define SCHEDULE_COUNT_MAX 7
/* ... unless a schedule phrase starting at most SCHEDULE_COUNT_BACK
 * units before it holds it ("1 in 3 weekends"). */
#define SCHEDULE_COUNT_BACK 4
/* The hours of rest of a work-and-rest scale ("12x36", "24x72"): at most
 * ROTA_REST_MAX. */
#define ROTA_REST_MAX 72
/* The word naming shifts before a list of clock ranges ("in Schichten
 * 6-14 / 14-22") is a phrase of at most SHIFT_WORD_BACK units. */
#define SHIFT_WORD_BACK 4
/* The name of a firm written after its legal form ("UAB Nemuno
 * logistika", "SIA Daugavas loģistika") holds at most EMPLOYER_NAME_MAX
 * words; a longer rest of the segment is not a name. */
#define EMPLOYER_NAME_MAX 4
/* A business kind phrase ending a segment ("Larchmoor House Care Home")
 * is looked for at most ROLE_KIND_BACK units before the segment's end
 * (the longest phrase a lexicon holds). */
#define ROLE_KIND_BACK 12
/* The region, province or department written after a place as a
 * segment of its own ("Jönköping, Småland") holds at most
 * ROLE_REGION_MAX words. */
#define ROLE_REGION_MAX 3
/* The name of a collective agreement after a grade is at most
 * GRADE_TAIL_MAX units ("CCNL Commercio", "CAO Gemeenten"): a longer rest
 * of the segment is not a name. */
#define GRADE_TAIL_MAX 3
/* The numbers of a sales area written after a slot word that opens a
 * segment ("PLZ-Gebiet 7", "PLZ 70-79", "Gebiet 8 und 9") hold at most
 * AREA_CODES_MAX units. */
#define AREA_CODES_MAX 5

int pass_pii(tm_title *ti);       /* contact data: URLs, e-mail, phones */
int pass_gender(tm_title *ti);    /* markers, gendered spellings, pairs */
int pass_reference(tm_title *ti); /* reference codes and dates */
int pass_pay(tm_title *ti);
int pass_grade(tm_title *ti);    /* pay scales and grades */
int pass_schedule(tm_title *ti);  /* hours, workload, durations */
int pass_days(tm_title *ti);      /* day ranges, clock ranges, head counts */
int pass_shifts(tm_title *ti);    /* clock ranges after a shift word */
int pass_hashtags(tm_title *ti);
int pass_employer(tm_title *ti);
int pass_location(tm_title *ti);
int pass_phrases(tm_title *ti);   /* peels edge phrases to a fixpoint;
				   * run before and after the employer,
				   * place and role rules: an edge seniority
				   * word goes in the second run */
int pass_roles(tm_title *ti);     /* the head segment; employers and places beside it */
/* a place ending a segment right after an occupational phrase: "Koch
 * Berlin" (after the roles; pass_place.c) */
int pass_trailing_place(tm_title *ti);

/* Shared by the rules (pass_place.c; head_within: pass_employer.c). */
int all_caps_line(tm_title *ti);  /* most words of the line in capitals */
/* Is the kept part of segment s a place: gazetteer places, country
 * codes, postcodes, location and connector words, at least one place or
 * country code?  Without strong_ok a place that is also an ordinary
 * word (WHERE `strong`) needs one of the others beside it.  caps: the
 * line is in capitals (all_caps_line). */
int place_segment(tm_title *ti, size_t s, int caps, int strong_ok);
/* Removes the kept part of segment s as places and location-slot words. */
int remove_place_segment(tm_title *ti, size_t s);
/* Does a kept unit of [k0, k1) name an occupation: a `head` of
 * occupation/ or a protected phrase? */
int head_within(tm_title *ti, size_t k0, size_t k1);
/* The first unit of the link phrase (units/, value `link`: "of",
 * "der", "van", "de la") that ends at unit k1 of [k0, k1), kept and
 * unprotected, with a kept unit before it (past a removed gender suffix:
 * "Камериер/ка за"); k1 when none.  A link word
 * joins the word before it to the one after it ("Leiter der Region",
 * "cueillette des cerises", "Medico di base"): it never ends a title,
 * and what follows it is the complement of what precedes it. */
size_t link_ends(tm_title *ti, size_t k0, size_t k1);
/* Is the word of unit k an occupational ending written whole ("kock",
 * "arbeiter"), not a word that merely ends like one ("List")? */
int ending_whole(tm_title *ti, size_t k);

#endif

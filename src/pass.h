/* pass.h - internal to the normaliser: the line state the lexicon passes
 * work on.  Tokens are marked removed, never moved; units are the tokens
 * that are not punctuation. */
#ifndef TM_PASS_H
#define TM_PASS_H

#include <stddef.h>
#include <stdint.h>

#include "buf.h"
#include "lexicon.h"
#include "norm.h"
#include "token.h"
#include "unicode.h"

#define RM_NONE 0xFF

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

/* What a line holds, so that a pass with nothing to look for is skipped. */
enum {
	LF_NUM = 1,       /* a number */
	LF_SYM = 2,       /* & + % # @ or a currency */
	LF_DIGITWORD = 4, /* a word with a digit: JR12345 */
	LF_CAPSUF = 8,    /* VerkäuferIn */
	LF_JOIN = 16,     /* / - * : _ . ( · , | : may join a gender pair */
	LF_URL = 32,      /* http, https, www; "at" ("jobs(at)…"); "=" (a query) */
};
#define HAS(nm, cat) (((nm)->lcats >> (cat)) & 1)

typedef struct seg {
	uint32_t u0, u1;  /* units [u0, u1) */
	uint8_t bracket;  /* inside brackets */
	uint8_t index;    /* order among segments, saturating at 255; 0: the head */
	uint8_t resumed;  /* the head going on after a bracket: "Koch (m/w/d) Köln" */
	uint32_t k0, k1;
	uint64_t gen;     /* its kept units, as of removal generation gen */
} seg;

typedef struct span {
	uint32_t t0, t1;  /* tokens [t0, t1] */
	uint8_t kind;
	const char *value;
} span;

struct normaliser {
	const lexicon *lx;
	uni_ctx u;
	tok_line tl;
	tm_buf dec, work, title, key, ptext, again, masked;
	const char *lang;
	int any_lang;     /* while set, ambiguous entries apply too */
	size_t hidden;    /* kept units the renderer did not show */
	uint64_t gen;     /* bumped by every removal (seg_kept's memory) */
	/* per token */
	uint8_t *rm;      /* enum nf_kind, RM_NONE when kept */
	uint8_t *prot;
	uint32_t *tseg;   /* segment of each token */
	uint32_t *tunit;  /* unit index of each token, or UINT32_MAX */
	size_t tcap;
	/* units */
	uint32_t *unit;   /* unit -> token */
	size_t nunit, ucap;
	seg *segs;
	size_t nseg, scap;
	span *spans;
	size_t nspan, spcap;
	/* phrases starting at each unit, longest first: mc[moff[k] ..
	 * moff[k + 1]) (built once per line, again after the gender pass) */
	struct mcache { uint32_t first, units; uint16_t cats; } *mc;
	size_t nmc, mccap;
	uint32_t *moff;
	uint16_t *ucats;  /* categories of all phrases starting at each unit */
	uint32_t *nextk;  /* the first unit from each that the gender pass kept
			   * (the cache skips a run of removed markers at once) */
	unsigned lcats;   /* all categories of the line */
	unsigned lflags;  /* LF_* below */
	/* the memory of recent titles: a ring of records, a table of slots */
	char *ring;
	size_t ring_cap, ring_pos;
	uint64_t ring_total;  /* bytes ever written, for validity */
	struct memo_slot { uint64_t h, at; uint32_t len; } *slot;
	size_t nslot, hits, calls;
	nf_piece *pieces;
	size_t pcap;
};

typedef struct normaliser normaliser;

/* Token of unit k, and shorthands. */
static inline tm_tok *U(normaliser *nm, size_t k) { return &nm->tl.t[nm->unit[k]]; }
static inline int ukept(normaliser *nm, size_t k)
{
	return nm->rm[nm->unit[k]] == RM_NONE;
}
static inline const char *ufold(normaliser *nm, size_t k, uint32_t *len)
{
	tm_tok *t = U(nm, k);
	*len = t->flen;
	return tok_fold(&nm->tl, t);
}
static inline uint32_t useg(normaliser *nm, size_t k) { return nm->tseg[nm->unit[k]]; }

/* The applicable entry of category cat for the longest phrase starting at
 * unit k and lying inside its segment over kept, unprotected units (when
 * kept is set).  *len receives its length in units.  NULL when none. */
const lex_entry *match_cat_(normaliser *nm, size_t k, int cat, int kept,
			    size_t *len);
/* Same with a value filter (NULL: any value). */
const lex_entry *match_val_(normaliser *nm, size_t k, int cat,
			    const char *value, int kept, size_t *len);
/* The longest phrase with an applicable entry in any category of the
 * mask (1 << cat); for equal lengths the entry listed first wins. */
const lex_entry *match_mask_(normaliser *nm, size_t k, unsigned mask,
			     int kept, size_t *len);

/* Most units start no phrase of the category asked for: answer those
 * without a call. */
static inline const lex_entry *match_cat(normaliser *nm, size_t k, int cat,
					 int kept, size_t *len)
{
	if (k >= nm->nunit || !(nm->ucats[k] & (1u << cat)))
		return NULL;
	return match_cat_(nm, k, cat, kept, len);
}

static inline const lex_entry *match_val(normaliser *nm, size_t k, int cat,
					 const char *value, int kept, size_t *len)
{
	if (k >= nm->nunit || !(nm->ucats[k] & (1u << cat)))
		return NULL;
	return match_val_(nm, k, cat, value, kept, len);
}

static inline const lex_entry *match_mask(normaliser *nm, size_t k,
					  unsigned mask, int kept, size_t *len)
{
	if (k >= nm->nunit || !(nm->ucats[k] & mask))
		return NULL;
	return match_mask_(nm, k, mask, kept, len);
}
int entry_applies(const normaliser *nm, const lex_entry *e);

/* Marks tokens [t0, t1] removed as kind (protected tokens excepted) and
 * records the piece.  Returns 0 or -1 (memory). */
int remove_toks(normaliser *nm, size_t t0, size_t t1, int kind,
		const char *value);
/* Same over units [k0, k1). */
int remove_units(normaliser *nm, size_t k0, size_t k1, int kind,
		 const char *value);
int units_free(normaliser *nm, size_t k0, size_t k1); /* kept and unprotected */

/* First and one-past-last kept unit of segment s (u0 == u1 when empty). */
void seg_kept(normaliser *nm, size_t s, size_t *k0, size_t *k1);

/* Are units a and b (a < b) glued: no whitespace and only the given
 * punctuation characters between them? */
int glued(normaliser *nm, size_t a, size_t b, const char *puncts);

int pass_pii(normaliser *nm);
int pass_gender(normaliser *nm);
int pass_reference(normaliser *nm);
int pass_pay(normaliser *nm);
int pass_schedule(normaliser *nm);
int pass_hashtags(normaliser *nm);
int pass_employer(normaliser *nm);
int pass_location(normaliser *nm);
int pass_phrases(normaliser *nm); /* peels edge phrases to a fixpoint */

#endif

/* title.h - the annotated title: what the normaliser's rules read and
 * mark.  Tokens of the prepared line, units (the tokens that are not
 * punctuation), segments, the lexicon phrases found at each unit, the
 * removal marks and the facet spans, with the few operations the rules
 * need.  The rules (pass_*.c) depend on this header alone; norm.c fills
 * a title, runs the rules over it and renders what is left.
 *
 * A tm_title owns its arrays and its token line and reuses them from
 * line to line (nothing is allocated once they have grown); it borrows
 * the lexicon and the prepared text, which must outlive its use.
 * Tokens are marked removed, never moved. */
#ifndef TM_TITLE_H
#define TM_TITLE_H

#include <stddef.h>
#include <stdint.h>

#include "norm/lexicon.h"
#include "norm/token.h"

/* What a removed piece was. */
enum nf_kind {
	NF_GENDER, NF_SENIORITY, NF_LOCATION, NF_SCHEDULE, NF_HOURS,
	NF_WORKLOAD, NF_PAY, NF_REFERENCE, NF_DATE, NF_MARKETING, NF_EMPLOYER,
	NF_EMAIL, NF_PHONE, NF_URL,
	NF_SLOT, /* a location-slot word or postcode: in, Raum, area, 50667 */
	NF_NKIND
};

/* The facet name of a kind ("gender"), "other" out of range. */
const char *nf_kind_name(int kind);

#define RM_NONE 0xFF

/* tm_title.madd of a token the next kept word is glued to. */
extern const char title_glue[];

/* What a line holds, so that a rule with nothing to look for is skipped. */
enum {
	LF_NUM = 1,       /* a number */
	LF_SYM = 2,       /* & + % # @ or a currency */
	LF_DIGITWORD = 4, /* a word with a digit: JR12345 */
	LF_CAPSUF = 8,    /* VerkäuferIn */
	LF_JOIN = 16,     /* / - * : _ . ( · , | : may join a gender pair */
	LF_URL = 32,      /* http, https, www; "at" ("jobs(at)…"); "=" (a query) */
};
#define HAS(ti, cat) (((ti)->lcats >> (cat)) & 1)

typedef struct tm_seg {
	uint32_t u0, u1;  /* units [u0, u1) */
	uint8_t bracket;  /* inside brackets */
	uint8_t index;    /* order among segments, saturating at 255; 0: the head */
	uint8_t resumed;  /* the head going on after a bracket: "Koch (m/w/d) Köln" */
	uint32_t k0, k1;
	uint64_t gen;     /* its kept units, as of removal generation gen */
	uint64_t still;   /* pass_phrases peeled it at generation still and
			   * found nothing (0: not in this call) */
} tm_seg;

typedef struct tm_span {
	uint32_t t0, t1;  /* tokens [t0, t1] */
	uint8_t kind;     /* enum nf_kind */
	const char *value;
} tm_span;

/* A lexicon phrase starting at a unit: its first entry (lex_entry_at),
 * its length in units (removed gender units inside it included) and
 * the categories of all its entries (1 << cat). */
typedef struct tm_ann {
	uint32_t first;
	uint32_t units;
	uint32_t cats;
} tm_ann;

/* One remembered word lookup (lex_word, lex_ending) of a fold: the words
 * of job titles repeat from line to line, and the lexicon's tables are
 * far larger than a processor's cache.  Direct-mapped by the fold's
 * hash, the fold kept to tell words apart; words longer than
 * TITLE_WORDMEM_FOLD bytes are looked up every time.  16,384 slots of
 * 40 bytes (640 KiB, within a core's second-level cache): with 4,096 a
 * word of the bench titles went to the lexicon three times as often. */
#define TITLE_WORDMEM_BITS 14
#define TITLE_WORDMEM_FOLD 22
typedef struct tm_wordmem {
	uint64_t hash;
	uint32_t word;    /* lex_word */
	uint32_t ending;  /* 1 + lex_entry_index of lex_ending, 0: none */
	uint8_t flen;     /* 0: an empty slot */
	uint8_t ended;    /* ending looked up */
	char fold[TITLE_WORDMEM_FOLD];
} tm_wordmem;

typedef struct tm_title {
	const lexicon *lx;
	const char *text; /* the prepared line the tokens point into */
	tok_line tl;
	const char *lang; /* primary subtag, or NULL */
	int any_lang;     /* while set, ambiguous entries apply too */
	uint64_t gen;     /* bumped by every removal (seg_kept's memory) */
	uint64_t peeled;  /* gen when pass_phrases last found nothing more */
	uint8_t settled;  /* and its numbers rule then removed nothing */
	/* per token */
	uint8_t *rm;      /* enum nf_kind, RM_NONE when kept */
	uint8_t *prot;
	uint32_t *tseg;   /* segment of each token */
	uint32_t *tunit;  /* unit index of each token, or UINT32_MAX */
	/* the masculine ending the renderer writes after a token whose
	 * written ending stood for both forms ("camarer@" -> "camarero"),
	 * title_glue when the next kept word is written right after it
	 * ("Medewerk(st)er" -> "medewerker"), or NULL; borrowed from the
	 * lexicon */
	const char **madd;
	uint8_t *mcut;    /* bytes cut off the end of that token's word
			   * before madd is written ("addetta/o": 1) */
	size_t tcap;
	/* units */
	uint32_t *unit;   /* unit -> token */
	uint32_t *uword;  /* its word id in the lexicon's vocabulary, 0 outside */
	uint32_t *uend;   /* 1 + entry index of its word's occupational ending
			   * (lex_ending), 0: none or not a word */
	size_t nunit;
	tm_seg *segs;
	size_t nseg;
	tm_span *spans;
	size_t nspan, spcap;
	/* phrases starting at each unit, longest first: ann[aoff[k] ..
	 * aoff[k + 1]) (title_scan) */
	tm_ann *ann;
	size_t nann, anncap;
	uint32_t *aoff;
	uint32_t *ucats;  /* categories of all phrases starting at each unit */
	uint32_t *nextk;  /* the first unit from each that the gender rule kept */
	tm_wordmem *wmem; /* 1 << TITLE_WORDMEM_BITS slots, for lx */
	const lexicon *wmem_lx;
	/* the gendered pairs (lex_pairs) by the last bytes of their two
	 * endings, for wmem_lx: title_pairs */
	uint32_t *pbeg;   /* TITLE_PAIR_BUCKETS + 1 offsets into pidx */
	uint32_t *pidx;   /* pair indices, in file order within a bucket */
	size_t npairs;    /* lex_pairs' count when built */
	uint8_t caps;     /* all_caps_line: most words of the line in capitals */
	unsigned lcats;   /* all categories of the line */
	unsigned lflags;  /* LF_* */
	unsigned phrase_runs; /* pass_phrases calls since title_build */
} tm_title;

void title_free(tm_title *ti);

/* Units and segments of the tokens in ti->tl (over ti->text); every
 * mark, span and annotation is reset.  Returns 0 or -1 (memory). */
int title_build(tm_title *ti);

/* Finds every lexicon phrase starting at every unit (units removed as
 * gender markers are transparent inside a phrase).  Returns 0 or -1. */
int title_scan(tm_title *ti);

/* The gendered pairs whose feminine ending ends with byte fl, whose
 * masculine ending ends with byte ml (256: the ending is empty) and
 * whose masculine ending is d bytes longer than the feminine one (d
 * negative when shorter), and perhaps a few others: indices into
 * lex_pairs(), in file order, *n of them (built by title_build for the
 * title's lexicon).  A pair that is so is always among them. */
#define TITLE_PAIR_BUCKETS 1021
static inline size_t title_pair_bucket(unsigned fl, unsigned ml, long d)
{
	return ((fl * 257u + ml) * 64u + ((unsigned long)d & 63u)) % TITLE_PAIR_BUCKETS;
}

static inline const uint32_t *title_pairs(const tm_title *ti, unsigned fl,
					  unsigned ml, long d, size_t *n)
{
	size_t b = title_pair_bucket(fl, ml, d);
	*n = ti->pbeg[b + 1] - ti->pbeg[b];
	return ti->pidx + ti->pbeg[b];
}

/* Token of unit k, and shorthands. */
static inline tm_tok *U(const tm_title *ti, size_t k) { return &ti->tl.t[ti->unit[k]]; }

/* Are all the bytes of token t among the ASCII bytes of set?  (The
 * prepared text is not cut after a token, and what follows its last
 * token may be an earlier line's: never strspn past a token.) */
static inline int tok_only(const tm_title *ti, const tm_tok *t, const char *set)
{
	const char *p = ti->text + t->off;
	for (uint32_t i = 0; i < t->len; i++) {
		const char *q = set;
		while (*q && *q != p[i])
			q++;
		if (!*q)
			return 0;
	}
	return 1;
}
static inline int ukept(const tm_title *ti, size_t k)
{
	return ti->rm[ti->unit[k]] == RM_NONE;
}
static inline const char *ufold(const tm_title *ti, size_t k, uint32_t *len)
{
	const tm_tok *t = U(ti, k);
	*len = t->flen;
	return tok_fold(&ti->tl, t);
}
static inline uint32_t useg(const tm_title *ti, size_t k) { return ti->tseg[ti->unit[k]]; }

/* The applicable entry of category cat for the longest phrase starting at
 * unit k over kept, unprotected units (when kept is set; removed gender
 * units inside it excepted).  *len receives its length in units.  NULL
 * when none. */
const lex_entry *match_cat_(tm_title *ti, size_t k, int cat, int kept,
			    size_t *len);
/* Same with a value filter (NULL: any value). */
const lex_entry *match_val_(tm_title *ti, size_t k, int cat,
			    const char *value, int kept, size_t *len);
/* The longest phrase with an applicable entry in any category of the
 * mask (1 << cat); for equal lengths the entry listed first wins. */
const lex_entry *match_mask_(tm_title *ti, size_t k, unsigned mask,
			     int kept, size_t *len);

/* Which of the values vals[0..nval) (nval < 32) an applicable entry of
 * category cat has in some phrase starting at unit k (over kept,
 * unprotected units when kept is set): bit v for vals[v].  The first
 * value ends the look: with bit 0 set, the others may be missing. */
unsigned match_vals_(tm_title *ti, size_t k, int cat, const char *const *vals,
		     size_t nval, int kept);

/* Most units start no phrase of the category asked for: answer those
 * without a call. */
static inline const lex_entry *match_cat(tm_title *ti, size_t k, int cat,
					 int kept, size_t *len)
{
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << cat)))
		return NULL;
	return match_cat_(ti, k, cat, kept, len);
}

static inline const lex_entry *match_val(tm_title *ti, size_t k, int cat,
					 const char *value, int kept, size_t *len)
{
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << cat)))
		return NULL;
	return match_val_(ti, k, cat, value, kept, len);
}

static inline unsigned match_vals(tm_title *ti, size_t k, int cat,
				  const char *const *vals, size_t nval, int kept)
{
	if (k >= ti->nunit || !(ti->ucats[k] & (1u << cat)))
		return 0;
	return match_vals_(ti, k, cat, vals, nval, kept);
}

static inline const lex_entry *match_mask(tm_title *ti, size_t k,
					  unsigned mask, int kept, size_t *len)
{
	if (k >= ti->nunit || !(ti->ucats[k] & mask))
		return NULL;
	return match_mask_(ti, k, mask, kept, len);
}

/* entry_applies for an entry that applies in one language only. */
int entry_applies_amb(const tm_title *ti, const lex_entry *e);

/* Does entry e apply to this title's language? */
static inline int entry_applies(const tm_title *ti, const lex_entry *e)
{
	if (e->off)
		return 0;
	return !e->amb || ti->any_lang || entry_applies_amb(ti, e);
}

/* Marks tokens [t0, t1] removed as kind (protected tokens excepted) and
 * records the span.  Returns 0 or -1 (memory). */
int remove_toks(tm_title *ti, size_t t0, size_t t1, int kind,
		const char *value);
/* Same over units [k0, k1). */
int remove_units(tm_title *ti, size_t k0, size_t k1, int kind,
		 const char *value);
int units_free(tm_title *ti, size_t k0, size_t k1); /* kept and unprotected */

/* First and one-past-last kept unit of segment s (k0 == k1 when empty). */
void seg_kept_(tm_title *ti, size_t s, size_t *k0, size_t *k1);
static inline void seg_kept(tm_title *ti, size_t s, size_t *k0, size_t *k1)
{
	const tm_seg *g = &ti->segs[s];
	/* remembered until the next removal */
	if (g->gen == ti->gen) {
		*k0 = g->k0;
		*k1 = g->k1;
		return;
	}
	seg_kept_(ti, s, k0, k1);
}

/* Are units a and b (a < b) glued: no whitespace and only the given
 * punctuation characters between them? */
int glued(const tm_title *ti, size_t a, size_t b, const char *puncts);

/* Sorts the spans by their first token, stably. */
void title_sort_spans(tm_title *ti);

#endif

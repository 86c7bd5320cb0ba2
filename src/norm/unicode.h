/* unicode.h - the Unicode layer: normalisation, folding, classification.
 *
 * The only module that knows utf8proc.  All input must be well-formed
 * UTF-8 (run it through decode.h first).  A uni_ctx holds scratch space
 * reused from call to call, so the hot path allocates nothing once the
 * scratch has grown to the longest line; one context per thread.
 * Functions returning int give 0 on success and -1 when memory ran out
 * or the input was not well-formed UTF-8 (out is then unspecified). */
#ifndef TM_UNICODE_H
#define TM_UNICODE_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

#define UNI_FAST 0x190
#define UNI_INERT 64

typedef struct uni_ctx {
	int32_t *cp;
	size_t cap;
	/* per code point results for the Latin letters and common
	 * punctuation, computed with utf8proc on first use: lines made only
	 * of these skip the general algorithm */
	int ready;
	char prep[UNI_FAST][4], fold[UNI_FAST][4];
	uint8_t plen[UNI_FAST], flen[UNI_FAST];
	uint8_t cls[0x180]; /* enum uni_class | UNI_UP | UNI_LOW */
	tm_buf safe;        /* the input cut to the Stream-Safe Text Format */
	/* the same for code points outside that table that normalisation
	 * never joins to a neighbour (emoji, symbols: see inert_map),
	 * remembered by code point; cp 0 marks a free slot */
	struct uni_inert {
		int32_t cp;
		uint8_t plen, flen;
		char prep[4], fold[4];
	} inert[UNI_INERT];
	tm_buf one;         /* one code point's results while computed */
} uni_ctx;

/* Normalising sorts every run of combining marks by their combining
 * class, which costs the square of the run's length; so every function
 * below first keeps at most UNI_MAX_NONSTARTERS non-starters in a row
 * (the Stream-Safe Text Format of UAX #15, section 13) and drops the
 * non-starters beyond them, rather than inserting U+034F COMBINING
 * GRAPHEME JOINER: a title never needs more than a few marks on one
 * letter, and the joiner is a default ignorable the working form drops,
 * which would merge the runs again.  Default ignorables are transparent
 * to the count for that reason; a code point with a starter in its
 * decomposition ends a run.  So the cost is linear in the input. */
#define UNI_MAX_NONSTARTERS 30

#define UNI_UP 0x10
#define UNI_LOW 0x20

void uni_ctx_free(uni_ctx *u);

enum uni_form { UNI_NFC, UNI_NFD, UNI_NFKC, UNI_NFKD };

/* Appends the normalisation form `form` (UAX #15) of s to out. */
int uni_normalize(uni_ctx *u, enum uni_form form, const char *s, size_t n,
		  tm_buf *out);

/* Appends the working form of a title: NFKC; every dash (Pd, U+2212) as
 * '-'; single quotes and apostrophes as '\''; double quotes as '"';
 * spaces, tabs and controls as ' '; bullets and other symbols (emoji,
 * dingbats) as '|', U+FFFD as ' '; default-ignorable code points (soft hyphen,
 * zero-width spaces and joiners, variation selectors) removed.  Letter
 * case is kept. */
int uni_prepare(uni_ctx *u, const char *s, size_t n, tm_buf *out);

/* Appends the match-key form: as uni_prepare, then full case folding,
 * combining marks removed, and the letters without a decomposition that
 * readers write without their stroke folded too (ł→l, ø→o, đ→d, ħ→h,
 * ı→i, æ→ae, œ→oe). */
int uni_fold(uni_ctx *u, const char *s, size_t n, tm_buf *out);

/* Appends s with each code point replaced by its simple lowercase
 * mapping (UnicodeData.txt field 13): ß stays ß, İ becomes i. */
int uni_lower(const char *s, size_t n, tm_buf *out);

/* uni_lower_word options. */
#define UNI_TURKIC 1 /* Turkish and Azerbaijani: I is ı, İ is i */

/* Appends the lowercase form of the word s (a title's word, as the
 * tokeniser cut it): the simple lowercase mapping as uni_lower, except
 * that Σ or σ standing last in a word of several letters (after a letter,
 * before none, combining marks aside: Unicode's Final_Sigma condition,
 * section 3.13) is written ς, and with UNI_TURKIC the capital I is
 * dotless ı (SpecialCasing.txt, tr and az).  Linear in n. */
int uni_lower_word(const char *s, size_t n, unsigned opt, tm_buf *out);

/* A byte lowercased: A-Z to a-z, every other byte as it is (the lowercase
 * of ASCII text, byte by byte). */
extern const unsigned char uni_ascii_lower[256];

/* Decodes the code point at s[*i] (well-formed UTF-8) and advances *i;
 * a truncated sequence gives U+FFFD and advances one byte. */
static inline int32_t uni_next(const char *s, size_t n, size_t *i)
{
	const unsigned char *p = (const unsigned char *)s + *i;
	size_t left = n - *i;
	unsigned c = p[0];
	if (c < 0x80) {
		(*i)++;
		return (int32_t)c;
	}
	if (c >= 0xC0 && c < 0xE0 && left >= 2) {
		*i += 2;
		return (int32_t)(((c & 0x1F) << 6) | (p[1] & 0x3F));
	}
	if (c >= 0xE0 && c < 0xF0 && left >= 3) {
		*i += 3;
		return (int32_t)(((c & 0x0F) << 12) | ((p[1] & 0x3F) << 6) | (p[2] & 0x3F));
	}
	if (c >= 0xF0 && left >= 4) {
		*i += 4;
		return (int32_t)(((c & 0x07) << 18) | ((p[1] & 0x3F) << 12) |
				 ((p[2] & 0x3F) << 6) | (p[3] & 0x3F));
	}
	(*i)++;
	return 0xFFFD;
}

enum uni_class {
	UNI_OTHER = 0,
	UNI_LETTER,   /* L* */
	UNI_MARK,     /* M* */
	UNI_DIGIT,    /* Nd (and other N* that survive NFKC) */
	UNI_SPACE,    /* Z*, controls */
	UNI_PUNCT,    /* P* */
	UNI_CURRENCY, /* Sc */
	UNI_SYMBOL,   /* Sm, Sk, So */
};

enum uni_class uni_classify(int32_t cp);

/* Class with case bits (UNI_UP, UNI_LOW), from u's table below U+0180. */
int uni_class_case(uni_ctx *u, int32_t cp);
int uni_is_upper(int32_t cp);
int uni_is_lower(int32_t cp);

/* The Unicode version the layer implements, e.g. "15.0.0". */
const char *uni_version(void);

#endif

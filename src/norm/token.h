/* token.h - the tokeniser: a prepared title (see uni_prepare) as an
 * array of tokens that are offsets into it, each with its match-key fold.
 *
 * A tok_line owns its arrays and reuses them from line to line; nothing is
 * allocated once they have grown to the longest line.  The text passed to
 * tok_split is not copied: it must outlive the tokens. */
#ifndef TM_TOKEN_H
#define TM_TOKEN_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "norm/unicode.h"

enum tok_kind {
	TK_WORD,  /* letters and digits, starting with a letter: b2b, jr12345 */
	TK_NUM,   /* digits, with . , ' between digits: 3.200, 18,50 */
	TK_SYM,   /* a symbol that is a unit of its own: & + % # @ € £ $ */
	TK_PUNCT, /* punctuation: weak (- / . ' * : ·) or strong */
};

enum tok_flag {
	TF_STRONG = 1 << 0,  /* punctuation that ends a segment */
	TF_OPEN = 1 << 1,    /* ( [ { < */
	TF_CLOSE = 1 << 2,   /* ) ] } > */
	TF_CAP = 1 << 3,     /* word starts with a capital */
	TF_ALLCAPS = 1 << 4, /* word has two or more letters, all capitals */
	TF_DIGIT = 1 << 5,   /* word contains a digit */
	TF_CAPSUF = 1 << 6,  /* "In"/"Innen" split off a word: VerkäuferIn */
	TF_NONASCII = 1 << 7,
};

/* tm_tok.ch of the middle dot U+00B7 (vendeur·euse). */
#define TOK_MIDDOT 1

typedef struct tm_tok {
	uint32_t off, len;   /* bytes of the prepared text */
	uint32_t foff, flen; /* bytes of the fold arena */
	uint64_t hash;       /* hash of the fold */
	uint8_t kind;
	uint8_t flags;
	uint8_t sp;          /* whitespace precedes the token */
	uint8_t ch;          /* the character, for punctuation and ASCII symbols */
} tm_tok;

typedef struct tok_line {
	tm_tok *t;
	size_t n, cap;
	tm_buf fold; /* the folds of all tokens, back to back */
} tok_line;

/* Splits text[0..n) into tokens, replacing the previous contents of tl.
 * Returns 0, or -1 when memory ran out. */
int tok_split(tok_line *tl, uni_ctx *u, const char *text, size_t n);

/* The same for a text already in match-key form (uni_fold): each
 * token's fold is its text. */
int tok_split_folded(tok_line *tl, uni_ctx *u, const char *text, size_t n);

void tok_line_free(tok_line *tl);

static inline const char *tok_fold(const tok_line *tl, const tm_tok *t)
{
	return tl->fold.data + t->foff;
}

/* The hash used for folds and for token sequences. */
uint64_t tok_hash(const char *s, size_t n);

static inline uint64_t tok_hash_mix(uint64_t h, uint64_t th)
{
	h ^= th + 0x9E3779B97F4A7C15ULL + (h << 6) + (h >> 2);
	return h * 0xFF51AFD7ED558CCDULL;
}

#endif

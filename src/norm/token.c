/* token.c - the tokeniser. */
#include "norm/token.h"

#include <stdlib.h>

void tok_line_free(tok_line *tl)
{
	if (!tl)
		return;
	free(tl->t);
	tl->t = NULL;
	tl->n = tl->cap = 0;
	buf_free(&tl->fold);
}

uint64_t tok_hash(const char *s, size_t n)
{
	uint64_t h = 0xCBF29CE484222325ULL;
	size_t i;

	for (i = 0; i < n; i++) {
		h ^= (unsigned char)s[i];
		h *= 0x100000001B3ULL;
	}
	return h ^ (h >> 29);
}

static int grow(tok_line *tl)
{
	tm_tok *p = tm_grow(tl->t, &tl->cap, tl->n + 1, sizeof *p, 64);
	if (!p)
		return -1;
	tl->t = p;
	return 0;
}

/* A new zeroed token (inline: a title has a token every few bytes). */
static inline tm_tok *push(tok_line *tl)
{
	if (tl->n == tl->cap && grow(tl) != 0)
		return NULL;
	tm_tok *t = &tl->t[tl->n++];
	*t = (tm_tok){0};
	return t;
}

static int is_alnum_class(enum uni_class c)
{
	return c == UNI_LETTER || c == UNI_MARK || c == UNI_DIGIT;
}

/* Classes of the ASCII characters (the prepared text has no controls). */
static const unsigned char ascii_class[128] = {
#define L UNI_LETTER
#define D UNI_DIGIT
#define P UNI_PUNCT
#define S UNI_SYMBOL
	UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE,
	UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE,
	UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE,
	UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE, UNI_SPACE,
	/*   ! " # $ % & ' ( ) * + , - . / */
	UNI_SPACE, P, P, S, UNI_CURRENCY, S, S, P, P, P, P, S, P, P, P, P,
	D, D, D, D, D, D, D, D, D, D, P, P, P, P, P, P,
	S, L, L, L, L, L, L, L, L, L, L, L, L, L, L, L,
	L, L, L, L, L, L, L, L, L, L, L, P, P, P, P, P,
	P, L, L, L, L, L, L, L, L, L, L, L, L, L, L, L,
	L, L, L, L, L, L, L, L, L, L, L, P, P, P, P, UNI_SPACE,
#undef L
#undef D
#undef P
#undef S
};

/* peekc past ASCII. */
static enum uni_class peekc_utf8(uni_ctx *u, const char *s, size_t n, size_t i,
				 int32_t *cp, int *cc)
{
	size_t j = i;
	*cp = uni_next(s, n, &j);
	*cc = uni_class_case(u, *cp);
	return (enum uni_class)(*cc & 0x0F);
}

/* Class of the code point at s[i] without advancing; *cc receives the
 * class with its case bits.  Inline for ASCII, most of most titles
 * (always: called from five places, the compiler kept it a call, and
 * the case bits were then worked out for callers that drop them). */
__attribute__((always_inline)) static inline enum uni_class peekc(uni_ctx *u, const char *s, size_t n, size_t i,
				   int32_t *cp, int *cc)
{
	unsigned char c;

	if (i >= n) {
		*cp = -1;
		*cc = UNI_SPACE;
		return UNI_SPACE;
	}
	c = (unsigned char)s[i];
	if (c < 0x80) {
		*cp = c;
		*cc = ascii_class[c] | (c >= 'A' && c <= 'Z' ? UNI_UP : 0) |
		      (c >= 'a' && c <= 'z' ? UNI_LOW : 0);
		return (enum uni_class)ascii_class[c];
	}
	return peekc_utf8(u, s, n, i, cp, cc);
}

static size_t cp_len(const char *s, size_t n, size_t i)
{
	size_t j = i;
	(void)uni_next(s, n, &j);
	return j - i;
}

static int is_digit_at(const char *s, size_t n, size_t i)
{
	return i < n && s[i] >= '0' && s[i] <= '9';
}

/* Scans a word starting at i; returns its end.  Sets flags. */
static size_t scan_word(uni_ctx *u, const char *s, size_t n, size_t i,
			uint8_t *flags, size_t *capsuf)
{
	int32_t cp, prev = -1;
	size_t start = i;
	int letters = 0, upper = 0, lower_seen = 0;

	*capsuf = 0;
	int cc, prevlow = 0;
	for (;;) {
		/* ASCII letters and digits without the general lookup */
		unsigned char b = i < n ? (unsigned char)s[i] : 0;
		if (b && b < 0x80) {
			if (b >= 'a' && b <= 'z') {
				/* a run of small letters at once */
				size_t j = i + 1;
				while (j < n && (unsigned char)(s[j] - 'a') < 26u)
					j++;
				letters += (int)(j - i);
				lower_seen = 1;
				prevlow = 1;
				prev = (unsigned char)s[j - 1];
				i = j;
				continue;
			}
			if (b >= 'A' && b <= 'Z') {
				letters++;
				upper++;
				if (i == start)
					*flags |= TF_CAP;
				if (b == 'I' && prev >= 0 && lower_seen && prevlow &&
				    i - start >= 3)
					*capsuf = i;
				prevlow = 0;
				prev = b;
				i++;
				continue;
			}
			if (b >= '0' && b <= '9') {
				*flags |= TF_DIGIT;
				prevlow = 0;
				prev = b;
				i++;
				continue;
			}
			break;
		}
		enum uni_class c = peekc(u, s, n, i, &cp, &cc);
		if (!is_alnum_class(c))
			break;
		if (c == UNI_DIGIT)
			*flags |= TF_DIGIT;
		if (c == UNI_LETTER) {
			letters++;
			if (cc & UNI_UP) {
				upper++;
				if (i == start)
					*flags |= TF_CAP;
				if (cp == 'I' && prev >= 0 && lower_seen &&
				    prevlow && i - start >= 3)
					*capsuf = i;
			} else if (cc & UNI_LOW)
				lower_seen = 1;
		}
		prevlow = (cc & UNI_LOW) != 0;
		if (cp >= 0x80)
			*flags |= TF_NONASCII;
		prev = cp;
		i += cp < 0x80 ? 1 : cp_len(s, n, i);
	}
	if (letters >= 2 && upper == letters)
		*flags |= TF_ALLCAPS;
	/* VerkäuferIn, MitarbeiterInnen: keep the split only when the word
	 * ends right after "In" or "Innen". */
	if (*capsuf) {
		size_t rest = i - *capsuf;
		if (!((rest == 2 && s[*capsuf + 1] == 'n') ||
		      (rest == 5 && memcmp(s + *capsuf, "Innen", 5) == 0)))
			*capsuf = 0;
	}
	return i;
}

/* The number of code points in s[a..b), counting no further than max. */
static size_t letters_upto(const char *s, size_t a, size_t b, size_t max)
{
	size_t k = 0;
	for (size_t i = a; i < b && k < max; i++)
		k += ((unsigned char)s[i] & 0xC0) != 0x80;
	return k;
}

/* Is s[0..n) one to three Greek letters (a numeral such as Γ, ΙΒ)? */
static int greek_numeral(const char *s, size_t n)
{
	size_t i = 0, k = 0;
	while (i < n) {
		int32_t cp = uni_next(s, n, &i);
		if (cp < 0x0370 || cp > 0x03FF || ++k > 3)
			return 0;
	}
	return k > 0;
}

static int split(tok_line *tl, uni_ctx *u, const char *s, size_t n, int folded)
{
	size_t i = 0;
	int sp = 1;

	tl->n = 0;
	buf_reset(&tl->fold);
	while (i < n) {
		int32_t cp, cp2;
		int dummy;
		if (s[i] == ' ') {
			i++;
			sp = 1;
			continue;
		}
		enum uni_class c = peekc(u, s, n, i, &cp, &dummy);
		size_t start = i;
		tm_tok *t;

		if (c == UNI_SPACE || c == UNI_OTHER) {
			i += cp < 0x80 ? 1 : cp_len(s, n, i);
			sp = 1;
			continue;
		}
		if (!(t = push(tl)))
			return -1;
		t->sp = (uint8_t)sp;
		sp = 0;
		t->off = (uint32_t)start;
		if (c == UNI_DIGIT) {
			t->kind = TK_NUM;
			while (i < n) {
				enum uni_class d = peekc(u, s, n, i, &cp, &dummy);
				if (d == UNI_DIGIT) {
					i += cp < 0x80 ? 1 : cp_len(s, n, i);
				} else if ((s[i] == '.' || s[i] == ',' || s[i] == '\'') &&
					   is_digit_at(s, n, i + 1) && i > start) {
					i++;
				} else
					break;
			}
		} else if (c == UNI_LETTER || c == UNI_MARK ||
			   (cp == '.' && t->sp && i + 1 < n &&
			    peekc(u, s, n, i + 1, &cp2, &dummy) == UNI_LETTER)) {
			size_t capsuf = 0;
			t->kind = TK_WORD;
			if (s[i] == '.')
				i++;
			i = scan_word(u, s, n, i, &t->flags, &capsuf);
			/* c++, c#, f#: symbols glued to the end of a short word */
			/* (counted in letters, not bytes: the lowercase of a
			 * word may be longer or shorter, as ı is than I) */
			if (i < n && (s[i] == '+' || s[i] == '#') &&
			    letters_upto(s, start, i, 3 + 8) <= 2 + (s[i] == '+') * 8) {
				size_t j = i;
				char sym = s[i];
				while (j < n && s[j] == sym && j - i < 2)
					j++;
				if (j >= n || peekc(u, s, n, j, &cp, &dummy) != UNI_LETTER)
					if (sym == '+' ? j - i == 2 : 1)
						i = j;
			}
			/* a Greek numeral keeps its keraia, written as an
			 * apostrophe (NFKC makes U+0374 one): Γ' κατηγορίας */
			if (i < n && s[i] == '\'' && greek_numeral(s + start, i - start) &&
			    (i + 1 >= n || !is_alnum_class(peekc(u, s, n, i + 1, &cp, &dummy))))
				i++;
			if (capsuf && capsuf < i) {
				t->len = (uint32_t)(capsuf - start);
				if (!(t = push(tl)))
					return -1;
				t->kind = TK_WORD;
				t->flags = TF_CAPSUF | TF_CAP;
				t->off = (uint32_t)capsuf;
				start = capsuf;
			}
		} else {
			i += cp < 0x80 ? 1 : cp_len(s, n, i);
			if (c == UNI_CURRENCY || c == UNI_SYMBOL) {
				if (cp == '+' || cp == '&' || cp == '%' ||
				    cp == '#' || cp == '@' || c == UNI_CURRENCY)
					t->kind = TK_SYM;
				else
					t->kind = TK_PUNCT;
			} else
				t->kind = TK_PUNCT;
			t->ch = cp < 0x80 ? (uint8_t)cp : cp == 0xB7 ? TOK_MIDDOT : 0;
			if (t->kind == TK_PUNCT) {
				switch (cp) {
				case '(': case '[': case '{': case '<':
				case 0xFF08: case 0x3010:
					t->flags |= TF_STRONG | TF_OPEN;
					break;
				case ')': case ']': case '}': case '>':
				case 0xFF09: case 0x3011:
					t->flags |= TF_STRONG | TF_CLOSE;
					break;
				case ',':
					/* "38.000,- Kč": the mark of a whole amount
					 * (no cents), glued to its number, parts
					 * nothing */
					if (!t->sp && tl->n > 1 && tl->t[tl->n - 2].kind == TK_NUM &&
					    i < n && s[i] == '-' && !is_digit_at(s, n, i + 1))
						break;
					t->flags |= TF_STRONG;
					break;
				case '|': case ';': case '!': case '?':
				case 0xA1: case 0xBF: case 0x2026:
					t->flags |= TF_STRONG;
					break;
				case '-': {
					/* a run of dashes is one token: "--" */
					while (i < n && s[i] == '-')
						i++;
					int after = i >= n || s[i] == ' ';
					if (t->sp && after)
						t->flags |= TF_STRONG;
					break;
				}
				case ':':
					if (i >= n || s[i] == ' ')
						t->flags |= TF_STRONG;
					break;
				case '/':
					/* "Vollzeit / Dortmund": a spaced slash parts
					 * segments; "HR/Payroll" does not */
					if (t->sp && (i >= n || s[i] == ' '))
						t->flags |= TF_STRONG;
					break;
				default:
					break;
				}
			}
		}
		t->len = (uint32_t)(i - t->off);
	}
	/* folds */
	for (size_t k = 0; k < tl->n; k++) {
		tm_tok *t = &tl->t[k];
		const char *p = s + t->off;
		t->foff = (uint32_t)tl->fold.len;
		if (folded) {
			if (buf_append(&tl->fold, p, t->len) != 0)
				return -1;
		} else if (t->flags & TF_NONASCII || (t->kind != TK_WORD && t->kind != TK_NUM &&
					       (unsigned char)p[0] >= 0x80)) {
			if (uni_fold(u, p, t->len, &tl->fold) != 0)
				return -1;
		} else {
			/* ASCII: lowercase and hash in one go (the length
			 * and pointers in locals: a store through d may
			 * alias any of the token's fields) */
			uint64_t h = 0xCBF29CE484222325ULL;
			const unsigned char *q = (const unsigned char *)p;
			unsigned char *d;
			size_t len = t->len;
			if (tl->fold.cap - tl->fold.len < len &&
			    buf_reserve(&tl->fold, len) != 0)
				return -1;
			d = (unsigned char *)tl->fold.data + tl->fold.len;
			for (size_t j = 0; j < len; j++) {
				unsigned char ch = uni_ascii_lower[q[j]];
				d[j] = ch;
				h ^= ch;
				h *= 0x100000001B3ULL;
			}
			tl->fold.len += len;
			t->flen = (uint32_t)len;
			t->hash = h ^ (h >> 29);
			continue;
		}
		t->flen = (uint32_t)(tl->fold.len - t->foff);
		t->hash = tok_hash(tl->fold.data + t->foff, t->flen);
	}
	return 0;
}

int tok_split(tok_line *tl, uni_ctx *u, const char *text, size_t n)
{
	return split(tl, u, text, n, 0);
}

int tok_split_folded(tok_line *tl, uni_ctx *u, const char *text, size_t n)
{
	return split(tl, u, text, n, 1);
}

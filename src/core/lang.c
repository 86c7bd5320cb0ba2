/* lang.c - BCP 47 language tags. */
#include "core/lang.h"

#include <string.h>

int lang_tag(const char *tag, char out[4])
{
	size_t i = 0, n;
	const char *dash = strchr(tag, '-');

	n = dash ? (size_t)(dash - tag) : strlen(tag);
	if (n < 2 || n > 3)
		return -1;
	for (i = 0; i < n; i++) {
		char c = tag[i];
		if (c >= 'A' && c <= 'Z')
			c = (char)(c + 32);
		if (c < 'a' || c > 'z')
			return -1;
		out[i] = c;
	}
	out[n] = 0;
	/* the rest: subtags of 1 to 8 letters or digits */
	for (const char *p = dash; p && *p;) {
		size_t len = 0;
		p++;
		while (p[len] && p[len] != '-') {
			char c = p[len];
			if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
			      (c >= '0' && c <= '9')))
				return -1;
			len++;
		}
		if (len < 1 || len > 8)
			return -1;
		p += len;
		if (!*p)
			break;
	}
	return 0;
}


/* ---- RFC 5646 well-formedness ---- */

static int is_alpha(char c)
{
	return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z');
}

static int is_digit(char c)
{
	return c >= '0' && c <= '9';
}

/* One subtag: its letters and digits counted. */
typedef struct subtag {
	const char *s;
	size_t n, alpha, digit;
} subtag;

static int all_alpha(const subtag *t, size_t lo, size_t hi)
{
	return t->n >= lo && t->n <= hi && t->alpha == t->n;
}

static int same_ci(const char *a, size_t n, const char *b)
{
	size_t i;
	for (i = 0; i < n && b[i]; i++) {
		char x = a[i], y = b[i];
		if (x >= 'A' && x <= 'Z')
			x = (char)(x + 32);
		if (y >= 'A' && y <= 'Z')
			y = (char)(y + 32);
		if (x != y)
			return 0;
	}
	return i == n && !b[i];
}

int lang_wellformed(const char *s, size_t n)
{
	/* RFC 5646 section 2.1, "irregular": the grandfathered tags that the
	 * langtag production does not match (the "regular" ones it does) */
	static const char *const irregular[] = {
		"en-GB-oed", "i-ami",    "i-bnn",     "i-default", "i-enochian", "i-hak",
		"i-klingon", "i-lux",    "i-mingo",   "i-navajo",  "i-pwn",      "i-tao",
		"i-tay",     "i-tsu",    "sgn-BE-FR", "sgn-BE-NL", "sgn-CH-DE",
	};
	subtag t[64];
	size_t k = 0, i = 0;

	for (size_t j = 0; j < sizeof irregular / sizeof *irregular; j++)
		if (same_ci(s, n, irregular[j]))
			return 1;
	/* split into subtags of 1 to 8 letters or digits */
	while (i <= n) {
		subtag x = {s + i, 0, 0, 0};
		while (i < n && s[i] != '-') {
			if (is_alpha(s[i]))
				x.alpha++;
			else if (is_digit(s[i]))
				x.digit++;
			else
				return 0;
			x.n++;
			i++;
		}
		if (x.n < 1 || x.n > 8 || k == sizeof t / sizeof *t)
			return 0;
		t[k++] = x;
		i++; /* past the '-', or past the end */
	}
	i = 0;
	if (!(t[0].n == 1 && (*t[0].s == 'x' || *t[0].s == 'X'))) {
		/* language: 2*3ALPHA ["-" extlang] / 4ALPHA / 5*8ALPHA */
		if (!all_alpha(&t[0], 2, 8))
			return 0;
		i = 1;
		if (t[0].n <= 3)
			for (int e = 0; e < 3 && i < k && all_alpha(&t[i], 3, 3); e++)
				i++;
		/* script: 4ALPHA */
		if (i < k && all_alpha(&t[i], 4, 4))
			i++;
		/* region: 2ALPHA / 3DIGIT */
		if (i < k && (all_alpha(&t[i], 2, 2) || (t[i].n == 3 && t[i].digit == 3)))
			i++;
		/* variants: 5*8alphanum / (DIGIT 3alphanum) */
		while (i < k && (t[i].n >= 5 || (t[i].n == 4 && is_digit(*t[i].s))))
			i++;
		/* extensions: a singleton other than x, then 2-8 alphanum, once
		 * or more */
		while (i < k && t[i].n == 1 && *t[i].s != 'x' && *t[i].s != 'X') {
			size_t j = i + 1;
			while (j < k && t[j].n >= 2)
				j++;
			if (j == i + 1)
				return 0;
			i = j;
		}
		if (i == k)
			return 1;
		if (!(t[i].n == 1 && (*t[i].s == 'x' || *t[i].s == 'X')))
			return 0;
	}
	/* privateuse: "x" 1*("-" 1*8alphanum) */
	return k - i >= 2;
}

/* fieldcheck.c - the strings the review queue takes in and writes out. */
#include "io/fieldcheck.h"

#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "io/decode.h"
#include "io/jsonr.h"
#include "core/lang.h"

/* The code point at s[*i] of well-formed UTF-8; *i moves past it. */
static uint32_t next_cp(const char *s, size_t *i)
{
	const unsigned char *p = (const unsigned char *)s + *i;
	if (p[0] < 0x80) {
		*i += 1;
		return p[0];
	}
	if (p[0] < 0xe0) {
		*i += 2;
		return (uint32_t)(p[0] & 0x1f) << 6 | (p[1] & 0x3f);
	}
	if (p[0] < 0xf0) {
		*i += 3;
		return (uint32_t)(p[0] & 0x0f) << 12 | (uint32_t)(p[1] & 0x3f) << 6 | (p[2] & 0x3f);
	}
	*i += 4;
	return (uint32_t)(p[0] & 0x07) << 18 | (uint32_t)(p[1] & 0x3f) << 12 |
	       (uint32_t)(p[2] & 0x3f) << 6 | (p[3] & 0x3f);
}

/* Whether c may not appear in any field: C0, DEL, C1, U+2028, U+2029. */
static int is_break(uint32_t c)
{
	return c < 0x20 || (c >= 0x7f && c <= 0x9f) || c == 0x2028 || c == 0x2029;
}

static int says(char why[FC_WHY], const char *what)
{
	snprintf(why, FC_WHY, "%s", what);
	return TM_EINPUT;
}

/* The length and encoding checks every field shares. */
static int sized(const char *s, size_t n, size_t max, char why[FC_WHY])
{
	if (!n)
		return says(why, "is empty");
	if (n > max) {
		snprintf(why, FC_WHY, "is longer than %zu bytes", max);
		return TM_EINPUT;
	}
	if (!dec_is_utf8(s, n))
		return says(why, "is not valid UTF-8");
	return TM_OK;
}

static int bad_char(uint32_t c, size_t at, const char *what, char why[FC_WHY])
{
	snprintf(why, FC_WHY, "holds U+%04X (%s) at byte %zu", (unsigned)c, what, at + 1);
	return TM_EINPUT;
}

int fc_text(const char *s, size_t n, size_t max, char why[FC_WHY])
{
	if (sized(s, n, max, why))
		return TM_EINPUT;
	for (size_t i = 0; i < n;) {
		size_t at = i;
		uint32_t c = next_cp(s, &i);
		if (is_break(c))
			return bad_char(c, at, c >= 0x2028 ? "a line or paragraph separator"
							   : "a control character", why);
	}
	return TM_OK;
}

int fc_label(const char *s, size_t n, char why[FC_WHY])
{
	return fc_text(s, n, FC_LABEL_MAX, why);
}

int fc_name(const char *s, size_t n, char why[FC_WHY])
{
	return fc_text(s, n, FC_NAME_MAX, why);
}

int fc_note(const char *s, size_t n, char why[FC_WHY])
{
	return n ? fc_text(s, n, FC_NOTE_MAX, why) : TM_OK;
}

int fc_id(const char *s, size_t n, char why[FC_WHY])
{
	if (sized(s, n, FC_ID_MAX, why))
		return TM_EINPUT;
	for (size_t i = 0; i < n; i++)
		if (s[i] <= 0x20 || s[i] >= 0x7f)
			return says(why, "holds a character other than printable ASCII");
	return TM_OK;
}

int fc_lang(const char *s, size_t n, char why[FC_WHY])
{
	if (sized(s, n, FC_LANG_MAX, why))
		return TM_EINPUT;
	if (!lang_wellformed(s, n))
		return says(why, "is not a well-formed BCP 47 language tag (RFC 5646)");
	return TM_OK;
}

static int is_hex(char c)
{
	return (c >= '0' && c <= '9') || (c >= 'a' && c <= 'f') || (c >= 'A' && c <= 'F');
}

/* RFC 3987 section 2.2: ucschar and iprivate, less the line and
 * paragraph separators (which every field refuses) and the bidirectional
 * formatting characters (which section 4.1 keeps out of IRIs). */
static int iri_nonascii(uint32_t c)
{
	if (c == 0x200e || c == 0x200f || (c >= 0x2028 && c <= 0x202e) ||
	    (c >= 0x2066 && c <= 0x2069))
		return 0;
	if ((c >= 0xa0 && c <= 0xd7ff) || (c >= 0xf900 && c <= 0xfdcf) ||
	    (c >= 0xfdf0 && c <= 0xffef) || (c >= 0xe000 && c <= 0xf8ff))
		return 1;
	/* planes 1 to 16: all but the last two code points of each (E0000 to
	 * E0FFF excepted in plane 14) */
	if (c >= 0x10000 && c <= 0x10ffff && (c & 0xfffe) != 0xfffe)
		return !(c >= 0xe0000 && c <= 0xe0fff);
	return 0;
}

int fc_occupation(const char *s, size_t n, char why[FC_WHY])
{
	/* unreserved, gen-delims and sub-delims of RFC 3986/3987 */
	static const char ascii[] = "-._~:/?#[]@!$&'()*+,;=";
	if (sized(s, n, FC_OCC_MAX, why))
		return TM_EINPUT;
	for (size_t i = 0; i < n;) {
		size_t at = i;
		uint32_t c = next_cp(s, &i);
		if (c == '%') {
			if (i + 2 > n || !is_hex(s[i]) || !is_hex(s[i + 1]))
				return says(why, "holds a '%' that is not a %XX escape");
			i += 2;
		} else if (c >= 0x80 ? !iri_nonascii(c)
			   : !((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
			       (c >= '0' && c <= '9') || (c && strchr(ascii, (int)c))))
			return bad_char(c, at, c >= 0x2028 && c <= 0x2029 ? "a line or paragraph separator"
					       : is_break(c) ? "a control character"
					       : c == ' ' ? "a space"
							  : "a character an IRI may not hold", why);
	}
	return TM_OK;
}

int fc_suggestion(const struct jr_val *v, const char **field, char why[FC_WHY])
{
	static const struct {
		const char *name, *sub;
		int (*check)(const char *, size_t, char *);
	} f[] = {
		{"id", NULL, fc_id},
		{"occupation", NULL, fc_occupation},
		{"lang", NULL, fc_lang},
		{"label", NULL, fc_label},
		{"label_as_written", NULL, fc_label},
		{"variant_of", NULL, fc_label},
		{"occupation_label", NULL, fc_label},
		{"competitor", "occupation", fc_occupation},
	};
	for (size_t i = 0; i < sizeof f / sizeof *f; i++) {
		const jr_val *x = jr_get(v, f[i].name);
		size_t n;
		if (f[i].sub)
			x = jr_get(x, f[i].sub);
		const char *s = jr_vstr(x, &n);
		if (s && f[i].check(s, n, why)) {
			*field = f[i].sub ? "competitor.occupation" : f[i].name;
			return TM_EINPUT;
		}
	}
	return TM_OK;
}

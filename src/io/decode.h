/* decode.h - the first pipeline stage: UTF-8 check and repair, then
 * HTML markup.
 *
 * Each maximal ill-formed subsequence (Unicode 15.0, section 3.9, "U+FFFD
 * substitution of maximal subparts") becomes U+FFFD; a NUL byte becomes
 * U+FFFD as well, since no title carries one.  Overlong forms, surrogates
 * and code points above U+10FFFF are ill-formed (RFC 3629). */
#ifndef TM_DECODE_H
#define TM_DECODE_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

enum {
	DEC_INVALID = 1, /* at least one ill-formed sequence was replaced */
	DEC_NUL = 2,     /* at least one NUL byte was replaced */
	DEC_REF = 4,     /* at least one numeric character reference to NUL,
			  * a surrogate or beyond U+10FFFF was replaced */
};

/* The code points of s[0..n), valid UTF-8: the bytes that are not
 * continuation bytes. */
static inline size_t dec_cps(const char *s, size_t n)
{
	size_t c = 0;
	for (size_t i = 0; i < n; i++)
		c += ((unsigned char)s[i] & 0xC0) != 0x80;
	return c;
}

/* Returns the length of the longest prefix of s that is well-formed UTF-8
 * without NUL bytes (n when the whole input is). */
size_t dec_valid_prefix(const char *s, size_t n);

/* Appends the repaired form of s[0..n) to out.  Returns a mask of DEC_*
 * flags saying what was repaired (0: out received s unchanged), or -1 when
 * memory ran out (out then holds a partial copy). */
int dec_repair(const char *s, size_t n, tm_buf *out);

/* True when s[0..n) is well-formed UTF-8 (NUL bytes allowed). */
int dec_is_utf8(const char *s, size_t n);

/* Writes code point cp (at most U+10FFFF) to o as UTF-8; its length
 * (1 to 4 bytes). */
size_t dec_put_utf8(uint32_t cp, char *o);

/* True when s[0..n) holds a '&' or a '<', so that dec_markup may change
 * it. */
int dec_has_markup(const char *s, size_t n);

/* Appends s[0..n) (well-formed UTF-8) to out with its HTML markup read:
 *
 * - character references as the HTML standard defines them, written with
 *   their ';': the 2,125 named ones (&eacute; &ndash; &nbsp; &amp;, case
 *   as written) and numeric ones (&#233; &#xE9;); U+0080..U+009F are read
 *   as windows-1252 (&#150; is an en dash), NUL, surrogates and values
 *   beyond U+10FFFF give U+FFFD (DEC_REF).  Text escaped twice reads as
 *   once (&amp;eacute; is é).  Anything else (&foo; &eacute without ';',
 *   R&D) stays as written.
 * - tags of known HTML elements, well formed (<b>, </strong>, <br/>,
 *   <span class="x">), removed: a phrasing element inside a word
 *   (Kade<b>ř</b>nice) leaves nothing, any other tag a segment break
 *   " | ".  Other '<' (<3 years, a<b, <Koch>) stay.
 *
 * The result holds no reference or tag left to read (dec_markup of it
 * changes nothing): a reference that would complete one with the text
 * before it (&amp&#59;) and a tag after an unclosed "<x" stay as written,
 * and a tag inside a word after an unfinished "&x" parts the word.
 *
 * scratch is working space.  Linear in n.  Returns the DEC_REF flag or
 * 0, or -1 when memory ran out. */
int dec_markup(const char *s, size_t n, tm_buf *out, tm_buf *scratch);

#endif

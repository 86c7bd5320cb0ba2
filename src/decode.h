/* decode.h - the first pipeline stage: UTF-8 check and repair.
 *
 * Each maximal ill-formed subsequence (Unicode 15.0, section 3.9, "U+FFFD
 * substitution of maximal subparts") becomes U+FFFD; a NUL byte becomes
 * U+FFFD as well, since no title carries one.  Overlong forms, surrogates
 * and code points above U+10FFFF are ill-formed (RFC 3629). */
#ifndef TM_DECODE_H
#define TM_DECODE_H

#include <stddef.h>

#include "buf.h"

enum {
	DEC_INVALID = 1, /* at least one ill-formed sequence was replaced */
	DEC_NUL = 2,     /* at least one NUL byte was replaced */
};

/* Returns the length of the longest prefix of s that is well-formed UTF-8
 * without NUL bytes (n when the whole input is). */
size_t dec_valid_prefix(const char *s, size_t n);

/* Appends the repaired form of s[0..n) to out.  Returns a mask of DEC_*
 * flags saying what was repaired (0: out received s unchanged), or -1 when
 * memory ran out (out then holds a partial copy). */
int dec_repair(const char *s, size_t n, tm_buf *out);

/* True when s[0..n) is well-formed UTF-8 (NUL bytes allowed). */
int dec_is_utf8(const char *s, size_t n);

#endif

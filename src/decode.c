/* decode.c - UTF-8 check and repair, with an ASCII fast path. */
#include "decode.h"

#include <stdint.h>
#include <string.h>

/* Length of the well-formed sequence starting at s[i], or 0 when the
 * sequence is ill-formed; *bad receives the length of the maximal
 * ill-formed subpart to replace in that case (at least 1). */
static size_t seq_len(const unsigned char *s, size_t n, size_t i, size_t *bad)
{
	unsigned c = s[i];
	unsigned lo = 0x80, hi = 0xBF;
	size_t len, k;

	if (c < 0x80)
		return 1;
	if (c >= 0xC2 && c <= 0xDF)
		len = 2;
	else if (c >= 0xE0 && c <= 0xEF) {
		len = 3;
		if (c == 0xE0)
			lo = 0xA0;
		else if (c == 0xED)
			hi = 0x9F;
	} else if (c >= 0xF0 && c <= 0xF4) {
		len = 4;
		if (c == 0xF0)
			lo = 0x90;
		else if (c == 0xF4)
			hi = 0x8F;
	} else {
		*bad = 1;
		return 0;
	}
	for (k = 1; k < len; k++) {
		unsigned d;
		if (i + k >= n) {
			*bad = k;
			return 0;
		}
		d = s[i + k];
		if (k == 1 ? (d < lo || d > hi) : (d < 0x80 || d > 0xBF)) {
			*bad = k;
			return 0;
		}
	}
	return len;
}

static int ascii_word(const unsigned char *s)
{
	uint64_t w;
	memcpy(&w, s, 8);
	return (w & 0x8080808080808080ULL) == 0;
}

size_t dec_valid_prefix(const char *str, size_t n)
{
	const unsigned char *s = (const unsigned char *)str;
	size_t i = 0, bad;

	while (i < n) {
		if (i + 8 <= n && ascii_word(s + i) && !memchr(s + i, 0, 8)) {
			i += 8;
			continue;
		}
		if (s[i] == 0)
			return i;
		if (s[i] < 0x80) {
			i++;
			continue;
		}
		size_t l = seq_len(s, n, i, &bad);
		if (!l)
			return i;
		i += l;
	}
	return n;
}

int dec_is_utf8(const char *str, size_t n)
{
	const unsigned char *s = (const unsigned char *)str;
	size_t i = 0, bad;

	while (i < n) {
		if (s[i] < 0x80) {
			i++;
			continue;
		}
		size_t l = seq_len(s, n, i, &bad);
		if (!l)
			return 0;
		i += l;
	}
	return 1;
}

int dec_repair(const char *str, size_t n, tm_buf *out)
{
	static const char fffd[3] = {(char)0xEF, (char)0xBF, (char)0xBD};
	const unsigned char *s = (const unsigned char *)str;
	size_t i = 0;
	int flags = 0;

	while (i < n) {
		size_t ok = dec_valid_prefix((const char *)s + i, n - i);
		if (buf_append(out, s + i, ok) != 0)
			return -1;
		i += ok;
		if (i >= n)
			break;
		if (s[i] == 0) {
			flags |= DEC_NUL;
			i++;
		} else {
			size_t bad = 1;
			(void)seq_len(s, n, i, &bad);
			flags |= DEC_INVALID;
			i += bad;
		}
		if (buf_append(out, fffd, 3) != 0)
			return -1;
	}
	return flags;
}

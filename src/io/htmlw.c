/* htmlw.c - writing HTML text that no input can turn into markup
 * (htmlw.h). */
#include "io/htmlw.h"

#include <stdint.h>
#include <string.h>

/* Decodes one code point of s[0..n) (n > 0) into *cp; returns its length,
 * or 1 with *cp = 0xFFFD for an ill-formed byte. */
static size_t next_cp(const unsigned char *s, size_t n, uint32_t *cp)
{
	unsigned char c = s[0];
	size_t len;
	uint32_t v, min;
	if (c < 0x80) {
		*cp = c;
		return 1;
	}
	if (c >= 0xC2 && c <= 0xDF)
		len = 2, v = c & 0x1F, min = 0x80;
	else if (c >= 0xE0 && c <= 0xEF)
		len = 3, v = c & 0x0F, min = 0x800;
	else if (c >= 0xF0 && c <= 0xF4)
		len = 4, v = c & 0x07, min = 0x10000;
	else
		goto bad;
	if (n < len)
		goto bad;
	for (size_t i = 1; i < len; i++) {
		if ((s[i] & 0xC0) != 0x80)
			goto bad;
		v = v << 6 | (s[i] & 0x3F);
	}
	if (v < min || v > 0x10FFFF || (v >= 0xD800 && v <= 0xDFFF))
		goto bad;
	*cp = v;
	return len;
bad:
	*cp = 0xFFFD;
	return 1;
}

static int hidden(uint32_t c)
{
	return (c < 0x20 && c != '\t' && c != '\n') || (c >= 0x7F && c <= 0x9F) || c == 0x061C ||
	       c == 0x200E || c == 0x200F || (c >= 0x202A && c <= 0x202E) ||
	       (c >= 0x2066 && c <= 0x2069);
}

int html_text(tm_buf *b, const char *s, size_t n, size_t max)
{
	const unsigned char *u = (const unsigned char *)s;
	size_t i = 0, k = 0;
	while (i < n) {
		uint32_t c;
		size_t len = next_cp(u + i, n - i, &c);
		if (max && k == max) {
			buf_puts(b, "\xE2\x80\xA6");
			break;
		}
		switch (c) {
		case '&': buf_puts(b, "&amp;"); break;
		case '<': buf_puts(b, "&lt;"); break;
		case '>': buf_puts(b, "&gt;"); break;
		case '"': buf_puts(b, "&quot;"); break;
		case '\'': buf_puts(b, "&#39;"); break;
		default:
			if (c == 0xFFFD || hidden(c))
				buf_puts(b, "\xEF\xBF\xBD");
			else
				buf_append(b, s + i, len);
		}
		i += len;
		k++;
	}
	return buf_status(b);
}

int html_str(tm_buf *b, const char *s)
{
	return html_text(b, s, strlen(s), 0);
}

size_t html_width(const char *s, size_t n)
{
	size_t i = 0, k = 0;
	uint32_t c;
	while (i < n) {
		i += next_cp((const unsigned char *)s + i, n - i, &c);
		k++;
	}
	return k;
}

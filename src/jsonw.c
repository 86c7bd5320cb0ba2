/* jsonw.c - writing JSON strings. */
#include "jsonw.h"

#include <stdio.h>

int json_str(tm_buf *b, const char *s, size_t n)
{
	size_t i, run = 0;

	if (buf_putc(b, '"'))
		return -1;
	for (i = 0; i < n; i++) {
		unsigned char c = (unsigned char)s[i];
		const char *esc = NULL;
		char u[8];
		if (c >= 0x20 && c != '"' && c != '\\')
			continue;
		if (buf_append(b, s + run, i - run))
			return -1;
		switch (c) {
		case '"': esc = "\\\""; break;
		case '\\': esc = "\\\\"; break;
		case '\n': esc = "\\n"; break;
		case '\r': esc = "\\r"; break;
		case '\t': esc = "\\t"; break;
		default:
			snprintf(u, sizeof u, "\\u%04x", c);
			esc = u;
		}
		if (buf_puts(b, esc))
			return -1;
		run = i + 1;
	}
	if (buf_append(b, s + run, n - run) || buf_putc(b, '"'))
		return -1;
	return 0;
}

int json_key(tm_buf *b, const char *key)
{
	if (buf_putc(b, '"') || buf_puts(b, key) || buf_puts(b, "\":"))
		return -1;
	return 0;
}

/* jsonw.c - writing JSON. */
#include "io/jsonw.h"

#include <math.h>
#include <stdio.h>

int json_str(tm_buf *b, const char *s, size_t n)
{
	size_t i, run = 0;

	buf_putc(b, '"');
	for (i = 0; i < n; i++) {
		unsigned char c = (unsigned char)s[i];
		const char *esc = NULL;
		char u[8];
		if (c >= 0x20 && c != '"' && c != '\\')
			continue;
		buf_append(b, s + run, i - run);
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
		buf_puts(b, esc);
		run = i + 1;
	}
	buf_append(b, s + run, n - run);
	buf_putc(b, '"');
	return buf_status(b);
}

int json_key(tm_buf *b, const char *key)
{
	buf_putc(b, '"');
	buf_puts(b, key);
	buf_puts(b, "\":");
	return buf_status(b);
}

int json_field(tm_buf *b, const char *key, const char *s)
{
	buf_putc(b, ',');
	json_key(b, key);
	return json_str(b, s, strlen(s));
}

int json_u64(tm_buf *b, uint64_t v)
{
	char s[24];
	snprintf(s, sizeof s, "%llu", (unsigned long long)v);
	buf_puts(b, s);
	return buf_status(b);
}

int json_num(tm_buf *b, double v)
{
	char s[48];
	snprintf(s, sizeof s, "%.4f", isfinite(v) ? v : 0.0);
	buf_puts(b, s);
	return buf_status(b);
}

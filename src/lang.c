/* lang.c - BCP 47 language tags. */
#include "lang.h"

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


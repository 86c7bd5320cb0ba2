/* msg.c - the prefix of every diagnostic. */
#include <stdarg.h>
#include <string.h>

#include "core/msg.h"

static char prefix[64] = "titlemill";

void msg_command(const char *name)
{
	if (!name || !*name)
		snprintf(prefix, sizeof prefix, "titlemill");
	else
		snprintf(prefix, sizeof prefix, "titlemill %.47s", name);
}

const char *msg_prefix(void)
{
	return prefix;
}

void msg_warnf(FILE *fp, const char *fmt, ...)
{
	va_list ap;
	if (!fp)
		return;
	fprintf(fp, "%s: ", prefix);
	va_start(ap, fmt);
	vfprintf(fp, fmt, ap);
	va_end(ap);
}

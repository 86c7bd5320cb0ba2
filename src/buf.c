/* buf.c - growable byte buffers. */
#include "buf.h"

#include <stdint.h>
#include <stdlib.h>

int buf_reserve(tm_buf *b, size_t extra)
{
	size_t need, cap;
	char *p;

	if (extra > SIZE_MAX - b->len)
		return -1;
	need = b->len + extra;
	if (need <= b->cap && b->data)
		return 0; /* (an empty buffer still gets storage: no NULL + 0) */
	cap = b->cap ? b->cap : 64;
	while (cap < need)
		cap = cap > SIZE_MAX / 2 ? need : cap * 2;
	p = realloc(b->data, cap);
	if (!p)
		return -1;
	b->data = p;
	b->cap = cap;
	return 0;
}

void buf_free(tm_buf *b)
{
	if (!b)
		return;
	free(b->data);
	b->data = NULL;
	b->len = b->cap = 0;
}

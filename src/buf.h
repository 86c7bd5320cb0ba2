/* buf.h - growable, length-carrying byte buffers.
 *
 * A tm_buf owns its storage (allocated with malloc); buf_free releases it
 * and accepts a zeroed or already freed buffer.  The data pointer may move
 * on every append: never keep pointers into a buffer across an append,
 * keep offsets.  After an append the contents are followed by a NUL (not
 * counted in len), so a buffer of text can be printed as it is.
 * Functions returning int give 0 on success and -1 when memory ran out;
 * the buffer is then unchanged. */
#ifndef TM_BUF_H
#define TM_BUF_H

#include <stddef.h>
#include <string.h>

typedef struct tm_buf {
	char *data;
	size_t len;
	size_t cap;
} tm_buf;

int buf_reserve(tm_buf *b, size_t extra);
void buf_free(tm_buf *b);

static inline void buf_reset(tm_buf *b) { b->len = 0; }

static inline int buf_append(tm_buf *b, const void *p, size_t n)
{
	if ((b->cap - b->len <= n || !b->data) && buf_reserve(b, n + 1) != 0)
		return -1;
	if (n)
		memcpy(b->data + b->len, p, n);
	b->len += n;
	b->data[b->len] = 0;
	return 0;
}

static inline int buf_putc(tm_buf *b, char c)
{
	if ((b->cap - b->len <= 1 || !b->data) && buf_reserve(b, 2) != 0)
		return -1;
	b->data[b->len++] = c;
	b->data[b->len] = 0;
	return 0;
}

static inline int buf_puts(tm_buf *b, const char *s)
{
	return buf_append(b, s, strlen(s));
}

#endif

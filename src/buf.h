/* buf.h - growable, length-carrying byte buffers.
 *
 * A tm_buf owns its storage (allocated with malloc); buf_free releases it
 * and accepts a zeroed or already freed buffer.  The data pointer may move
 * on every append: never keep pointers into a buffer across an append,
 * keep offsets.  The contents are not NUL-terminated unless buf_cstr is
 * called.  Functions returning int give 0 on success and -1 when memory
 * ran out; the buffer is then unchanged. */
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
	if (b->cap - b->len < n && buf_reserve(b, n) != 0)
		return -1;
	if (n)
		memcpy(b->data + b->len, p, n);
	b->len += n;
	return 0;
}

static inline int buf_putc(tm_buf *b, char c)
{
	if (b->len == b->cap && buf_reserve(b, 1) != 0)
		return -1;
	b->data[b->len++] = c;
	return 0;
}

static inline int buf_puts(tm_buf *b, const char *s)
{
	return buf_append(b, s, strlen(s));
}

/* Terminates the contents with a NUL (not counted in len) and returns
 * the data pointer, or NULL when memory ran out. */
const char *buf_cstr(tm_buf *b);

#endif

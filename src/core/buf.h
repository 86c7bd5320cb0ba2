/* buf.h - growable, length-carrying byte buffers, and growing arrays.
 *
 * A tm_buf owns its storage (allocated with malloc); buf_free releases it
 * and accepts NULL, a zeroed or an already freed buffer.  The data pointer
 * may move on every append: never keep pointers into a buffer across an
 * append, keep offsets.  After an append the contents are followed by a
 * NUL (not counted in len), so a buffer of text can be printed as it is.
 *
 * A buffer remembers its first failure: when memory runs out (or the
 * content would pass max, when max is set) the append returns TM_ENOMEM,
 * the buffer keeps what it held before, and every later append fails
 * too and adds nothing.  So a long writer appends without checking each
 * call and asks buf_status once at the end: the contents are then either
 * whole or to be thrown away, never a line with a field missing.
 * buf_reset empties the buffer and forgets the failure.  Functions
 * returning int give TM_OK (0) or TM_ENOMEM (err.h). */
#ifndef TM_BUF_H
#define TM_BUF_H

#include <stddef.h>
#include <stdlib.h>
#include <string.h>

#include "core/err.h"

typedef struct tm_buf {
	char *data;
	size_t len;
	size_t cap;   /* bytes of data usable without growing */
	size_t max;   /* the most bytes len may reach; 0: no cap */
	int failed;   /* an append failed since the last reset */
} tm_buf;

/* Makes room for extra more bytes (the NUL included by the caller). */
int buf_reserve(tm_buf *b, size_t extra);
void buf_free(tm_buf *b);

/* TM_OK, or TM_ENOMEM when an append failed since the last reset. */
static inline int buf_status(const tm_buf *b) { return b->failed ? TM_ENOMEM : TM_OK; }

static inline void buf_reset(tm_buf *b)
{
	b->len = 0;
	b->failed = 0;
}

/* Cuts the contents back to len bytes (no-op when len >= b->len); a
 * failed buffer stays failed. */
static inline void buf_truncate(tm_buf *b, size_t len)
{
	if (len >= b->len)
		return;
	b->len = len;
	if (b->data)
		b->data[len] = 0;
	if (b->failed)
		b->cap = len; /* keeps every later append on the slow path */
}

static inline int buf_append(tm_buf *b, const void *p, size_t n)
{
	/* a failed buffer has cap == len: it always takes the slow path */
	if ((b->cap - b->len <= n || !b->data) && buf_reserve(b, n + 1) != 0)
		return TM_ENOMEM;
	if (n)
		memcpy(b->data + b->len, p, n);
	b->len += n;
	b->data[b->len] = 0;
	return TM_OK;
}

static inline int buf_putc(tm_buf *b, char c)
{
	if ((b->cap - b->len <= 1 || !b->data) && buf_reserve(b, 2) != 0)
		return TM_ENOMEM;
	b->data[b->len++] = c;
	b->data[b->len] = 0;
	return TM_OK;
}

static inline int buf_puts(tm_buf *b, const char *s)
{
	return buf_append(b, s, strlen(s));
}

/* Appends as printf would. */
int buf_printf(tm_buf *b, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* A malloc'd copy of s[0..n) with a NUL after it (s may hold NUL bytes);
 * NULL when memory runs out. */
char *tm_dupn(const char *s, size_t n);

/* Makes room in the array p (of *cap elements of size bytes each, malloc
 * storage owned by the caller; NULL with *cap 0 to begin) for at least
 * need elements: the capacity doubles from first.  Returns the array,
 * moved or not, with *cap updated; or NULL when memory runs out or the
 * size would overflow, and then p and *cap are as they were (p still the
 * caller's to free).  Usage:
 *     T *v = tm_grow(a->v, &a->cap, a->n + 1, sizeof *v, 16);
 *     if (!v) return TM_ENOMEM;
 *     a->v = v; */
void *tm_grow(void *p, size_t *cap, size_t need, size_t size, size_t first);

/* As tm_grow, but the capacity grows by half, and by an eighth once the
 * array holds fine bytes or more: for arrays that hold most of a
 * process's memory, where doubling would leave up to half of it unused. */
void *tm_grow_half(void *p, size_t *cap, size_t need, size_t size, size_t first, size_t fine);

/* Asks that the block p of n bytes, just allocated and not yet written,
 * be mapped in 2 MiB pages where the system can (Linux's transparent
 * huge pages: the 2 MiB-aligned part inside the block): for a big table
 * probed at random (hash slots), one TLB entry covers 512 times the
 * memory, and filling it costs a page fault per 2 MiB instead of per
 * 4 KiB.  Blocks under TM_HUGEPAGES_MIN are left alone.  Only for a
 * block that is freed whole and never given to realloc (the hint splits
 * the mapping, and realloc could then no longer move it in place); a
 * hint, never an error. */
#define TM_HUGEPAGES_MIN ((size_t)4 << 20)
void tm_hugepages(void *p, size_t n);

/* qsort of n elements that accepts an empty array (NULL when n is 0,
 * which qsort itself may not be given). */
static inline void tm_qsort(void *base, size_t n, size_t size,
			    int (*cmp)(const void *, const void *))
{
	if (n > 1)
		qsort(base, n, size, cmp);
}

#endif

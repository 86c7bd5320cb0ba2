/* buf.c - growable byte buffers, growing arrays, error messages. */
#define _DEFAULT_SOURCE /* madvise's MADV_HUGEPAGE */
#include "core/buf.h"

#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <sys/mman.h>

/* Marks b failed: cap drops to len so that every later append takes the
 * slow path and fails there. */
static int buf_fail(tm_buf *b)
{
	b->failed = 1;
	b->cap = b->len;
	return TM_ENOMEM;
}

int buf_reserve(tm_buf *b, size_t extra)
{
	size_t need, cap;
	char *p;

	if (b->failed || extra > SIZE_MAX - b->len)
		return buf_fail(b);
	need = b->len + extra;
	if (b->max && need - 1 > b->max)
		return buf_fail(b);
	if (need <= b->cap && b->data)
		return TM_OK; /* (an empty buffer still gets storage: no NULL + 0) */
	cap = b->cap > 64 ? b->cap : 64;
	while (cap < need)
		cap = cap > SIZE_MAX / 2 ? need : cap * 2;
	if (b->max && cap > b->max + 1)
		cap = b->max + 1; /* appends past max take the slow path */
	p = realloc(b->data, cap);
	if (!p)
		return buf_fail(b);
	b->data = p;
	b->cap = cap;
	return TM_OK;
}

void buf_free(tm_buf *b)
{
	if (!b)
		return;
	free(b->data);
	b->data = NULL;
	b->len = b->cap = 0;
	b->failed = 0;
}

static int buf_vprintf(tm_buf *b, const char *fmt, va_list ap)
{
	va_list aq;
	size_t room = b->failed || !b->data ? 0 : b->cap - b->len;
	int n;

	va_copy(aq, ap);
	n = vsnprintf(room ? b->data + b->len : NULL, room, fmt, aq);
	va_end(aq);
	if (n < 0)
		return buf_fail(b);
	if ((size_t)n >= room) {
		if (buf_reserve(b, (size_t)n + 1))
			return TM_ENOMEM;
		vsnprintf(b->data + b->len, (size_t)n + 1, fmt, ap);
	}
	b->len += (size_t)n;
	return TM_OK;
}

int buf_printf(tm_buf *b, const char *fmt, ...)
{
	va_list ap;
	va_start(ap, fmt);
	int rc = buf_vprintf(b, fmt, ap);
	va_end(ap);
	return rc;
}

/* p resized to n elements of size bytes, *cap set; NULL and both as
 * they were when memory runs out or the size would overflow */
static void *resize(void *p, size_t *cap, size_t n, size_t size)
{
	if (!size || n > SIZE_MAX / size)
		return NULL;
	void *q = realloc(p, n * size);
	if (!q)
		return NULL;
	*cap = n;
	return q;
}

void *tm_grow(void *p, size_t *cap, size_t need, size_t size, size_t first)
{
	size_t n = *cap ? *cap : (first ? first : 1);

	if (need <= *cap && p)
		return p;
	while (n < need) {
		if (n > SIZE_MAX / 2)
			return NULL;
		n *= 2;
	}
	return resize(p, cap, n, size);
}

void *tm_grow_half(void *p, size_t *cap, size_t need, size_t size, size_t first, size_t fine)
{
	size_t n = *cap ? *cap : (first ? first : 1);

	if (need <= *cap && p)
		return p;
	while (n < need) {
		if (n > SIZE_MAX / 3 * 2)
			return NULL;
		if (size && n >= fine / size)
			n += n / 8;
		else
			n += n / 2 ? n / 2 : 1;
	}
	return resize(p, cap, n, size);
}

void tm_hugepages(void *p, size_t n)
{
#ifdef MADV_HUGEPAGE
	const uintptr_t huge = (uintptr_t)1 << 21;
	uintptr_t a = ((uintptr_t)p + huge - 1) & ~(huge - 1), z = ((uintptr_t)p + n) & ~(huge - 1);
	if (p && n >= TM_HUGEPAGES_MIN && z > a)
		(void)madvise((void *)a, z - a, MADV_HUGEPAGE); /* a hint: failing changes nothing */
#else
	(void)p;
	(void)n;
#endif
}

char *tm_dupn(const char *s, size_t n)
{
	char *p = malloc(n + 1);
	if (p) {
		memcpy(p, s, n);
		p[n] = 0;
	}
	return p;
}

int tm_fail(tm_buf *err, int kind, const char *where, const char *what, const char *detail)
{
	buf_reset(err);
	if (where) {
		buf_puts(err, where);
		buf_puts(err, ": ");
	}
	buf_puts(err, what);
	if (detail)
		buf_puts(err, detail);
	return kind;
}

int tm_failf(tm_buf *err, int kind, const char *fmt, ...)
{
	va_list ap;
	buf_reset(err);
	va_start(ap, fmt);
	buf_vprintf(err, fmt, ap);
	va_end(ap);
	return kind;
}

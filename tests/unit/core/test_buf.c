/* test_buf.c - buffers that remember their first failure, growing
 * arrays, error messages (buf.h, err.h). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "core/buf.h"
#include "io/jsonw.h"

/* A capped buffer takes what fits; the first append that does not fit
 * fails, adds nothing, and every later one fails too until a reset. */
static void test_first_failure_sticks(void **state)
{
	tm_buf b = {0};
	(void)state;
	b.max = 10;
	assert_int_equal(buf_puts(&b, "abcdefgh"), TM_OK);
	assert_int_equal(buf_status(&b), TM_OK);
	assert_int_equal(buf_puts(&b, "xyz"), TM_ENOMEM); /* 11 > 10 */
	assert_int_equal(b.len, 8);
	assert_string_equal(b.data, "abcdefgh");
	assert_int_equal(buf_putc(&b, '!'), TM_ENOMEM);  /* would fit, but b failed */
	assert_int_equal(buf_append(&b, "", 0), TM_ENOMEM);
	assert_int_equal(buf_printf(&b, "%d", 1), TM_ENOMEM);
	assert_int_equal(json_str(&b, "q", 1), TM_ENOMEM);
	assert_int_equal(b.len, 8);
	assert_int_equal(buf_status(&b), TM_ENOMEM);
	/* cut back, still failed: nothing lands in the room made */
	buf_truncate(&b, 3);
	assert_int_equal(buf_putc(&b, 'z'), TM_ENOMEM);
	assert_string_equal(b.data, "abc");
	buf_reset(&b);
	assert_int_equal(buf_status(&b), TM_OK);
	assert_int_equal(buf_puts(&b, "0123456789"), TM_OK); /* exactly max */
	assert_int_equal(buf_putc(&b, 'x'), TM_ENOMEM);
	assert_string_equal(b.data, "0123456789");
	buf_free(&b);
	buf_free(&b);  /* a freed buffer may be freed again */
	buf_free(NULL);
}

/* buf_printf agrees with snprintf, across the growth of the buffer. */
static void test_printf(void **state)
{
	tm_buf b = {0};
	char want[64];
	(void)state;
	for (int i = 0; i < 2000; i++) {
		size_t at = b.len;
		snprintf(want, sizeof want, "%d:%.4f|%s", i, i / 7.0, i % 3 ? "é" : "");
		assert_int_equal(buf_printf(&b, "%d:%.4f|%s", i, i / 7.0, i % 3 ? "é" : ""), TM_OK);
		assert_string_equal(b.data + at, want);
	}
	buf_free(&b);
}

/* tm_grow doubles from first, keeps the contents, and refuses a size
 * that would overflow without touching the array. */
static void test_grow(void **state)
{
	int *v = NULL;
	size_t cap = 0;
	(void)state;
	for (size_t n = 0; n < 1000; n++) {
		int *p = tm_grow(v, &cap, n + 1, sizeof *p, 4);
		assert_non_null(p);
		v = p;
		v[n] = (int)n;
		assert_true(cap >= n + 1);
		assert_true(cap == 4 || (cap & (cap - 1)) == 0); /* 4, 8, 16 ... */
	}
	for (size_t n = 0; n < 1000; n++)
		assert_int_equal(v[n], (int)n);
	size_t before = cap;
	assert_null(tm_grow(v, &cap, SIZE_MAX / 2, sizeof *v, 4));
	assert_null(tm_grow(v, &cap, SIZE_MAX, 1, 4));
	assert_int_equal(cap, before);
	assert_int_equal(v[999], 999);
	free(v);
}

static void test_fail_message(void **state)
{
	tm_buf err = {0};
	(void)state;
	buf_puts(&err, "old text");
	assert_int_equal(tm_fail(&err, TM_EINPUT, "q.jsonl:3", "not an item: ", "x"), TM_EINPUT);
	assert_string_equal(err.data, "q.jsonl:3: not an item: x");
	assert_int_equal(tm_fail(&err, TM_ENOMEM, NULL, "out of memory", NULL), TM_ENOMEM);
	assert_string_equal(err.data, "out of memory");
	assert_int_equal(tm_failf(&err, TM_EFAIL, "%s:%ld: %s", "f.tsv", 12L, "bad"), TM_EFAIL);
	assert_string_equal(err.data, "f.tsv:12: bad");
	char *d = tm_dupn("a\0b", 3);
	assert_memory_equal(d, "a\0b", 4);
	free(d);
	buf_free(&err);
}

/* The big-pages hint leaves a block's contents and its ownership alone:
 * a block of several 2 MiB pages, at any alignment, reads back what was
 * written and is freed as usual; a small block and NULL are no-ops. */
static void test_hugepages(void **state)
{
	(void)state;
	size_t n = TM_HUGEPAGES_MIN * 2 + 12345;
	for (size_t shift = 0; shift < 2; shift++) {
		unsigned char *p = calloc(n, 1);
		assert_non_null(p);
		tm_hugepages(p + shift, n - shift);
		for (size_t i = 0; i < n; i += 4093)
			assert_int_equal(p[i], 0);
		for (size_t i = 0; i < n; i++)
			p[i] = (unsigned char)(i * 31);
		for (size_t i = 0; i < n; i++)
			if (p[i] != (unsigned char)(i * 31))
				fail_msg("byte %zu changed", i);
		free(p);
	}
	char small[64] = "kept";
	tm_hugepages(small, sizeof small);
	assert_string_equal(small, "kept");
	tm_hugepages(NULL, n);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_first_failure_sticks),
		cmocka_unit_test(test_printf),
		cmocka_unit_test(test_grow),
		cmocka_unit_test(test_hugepages),
		cmocka_unit_test(test_fail_message),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

/* Unit tests for line reading (src/reader.c) and TSV headers (src/tsv.c). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "reader.h"
#include "tsv.h"

static char path[64];

static void write_file(const char *s, size_t n)
{
	strcpy(path, "/tmp/tm-reader-XXXXXX");
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, s, n), (ssize_t)n);
	close(fd);
}

static void test_lines(void **state)
{
	(void)state;
	const char in[] = "\xEF\xBB\xBF" "one\r\ntwo\n\nfo\0ur";
	line_reader lr;
	const char *s;
	size_t n;
	write_file(in, sizeof in - 1);
	assert_int_equal(lr_open(&lr, path), 0);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_int_equal(n, 3);
	assert_memory_equal(s, "one", 3);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_memory_equal(s, "two", 3);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_int_equal(n, 0);
	assert_int_equal(lr_next(&lr, &s, &n), 1); /* no final newline */
	assert_int_equal(n, 5);
	assert_memory_equal(s, "fo\0ur", 5);
	assert_int_equal(lr.lineno, 4);
	assert_int_equal(lr_next(&lr, &s, &n), 0);
	lr_close(&lr);
	unlink(path);
}

static void test_long_line_cut(void **state)
{
	(void)state;
	size_t big = LR_MAXLINE + 100000;
	char *in = malloc(big + 3);
	line_reader lr;
	const char *s;
	size_t n;
	memset(in, 'x', big);
	memcpy(in + big, "\nok", 3);
	write_file(in, big + 3);
	free(in);
	assert_int_equal(lr_open(&lr, path), 0);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_int_equal(n, LR_MAXLINE);
	assert_true(lr.cut);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_false(lr.cut);
	assert_memory_equal(s, "ok", 2);
	assert_int_equal(lr_next(&lr, &s, &n), 0);
	lr_close(&lr);
	unlink(path);
}

static void test_tsv(void **state)
{
	(void)state;
	const char in[] = "\xEF\xBB\xBFlabel\tlang\textra\r\nKoch\tde\tx\r\n\r\nCook\ten\n";
	tsv_reader t;
	size_t n;
	write_file(in, sizeof in - 1);
	assert_int_equal(tsv_open(&t, path), 0);
	assert_int_equal(tsv_col(&t, "lang"), 1);
	assert_int_equal(tsv_col(&t, "label"), 0);
	assert_int_equal(tsv_col(&t, "missing"), -1);
	assert_int_equal(tsv_next(&t), 1);
	assert_memory_equal(tsv_field(&t, 0, &n), "Koch", 4);
	assert_int_equal(tsv_next(&t), 1);
	assert_memory_equal(tsv_field(&t, 1, &n), "en", 2);
	tsv_field(&t, 2, &n);
	assert_int_equal(n, 0);
	assert_int_equal(tsv_next(&t), 0);
	tsv_close(&t);
	unlink(path);
	write_file("a\tb\ta\n", 6);
	assert_int_equal(tsv_open(&t, path), -1);
	assert_non_null(strstr(t.err.data, ":1: column 'a' appears twice"));
	tsv_close(&t);
	unlink(path);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_lines),
		cmocka_unit_test(test_long_line_cut),
		cmocka_unit_test(test_tsv),
	};
	return cmocka_run_group_tests_name("reader", tests, NULL, NULL);
}

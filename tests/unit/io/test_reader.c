/* Unit tests for line reading (src/io/reader.c) and TSV headers (src/io/tsv.c). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "io/reader.h"
#include "io/tsv.h"

static char path[64];

static void write_file(const char *s, size_t n)
{
	strcpy(path, "/tmp/tm-reader-XXXXXX");
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, s, n), (ssize_t)n);
	close(fd);
}

/* a string literal, without its final NUL */
#define WRITE(lit) write_file(lit, sizeof lit - 1)

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
	assert_int_equal(tsv_open(&t, path), TM_EINPUT);
	assert_non_null(strstr(t.err.data, ":1: column 'a' appears twice"));
	tsv_close(&t);
	unlink(path);
}

/* A file with a UTF-16 byte order mark (either order) is refused at the
 * first line with a message that says so; a CR inside a line (CR-only
 * line ends) is flagged, a CRLF end is not. */
static void test_utf16_and_cr(void **state)
{
	(void)state;
	static const char *const boms[] = {"\xFF\xFEK\0o\0\n\0", "\xFE\xFF\0K\0o\0\n"};
	line_reader lr;
	const char *s;
	size_t n;
	for (int b = 0; b < 2; b++) {
		write_file(boms[b], 8);
		assert_int_equal(lr_open(&lr, path), 0);
		assert_int_equal(lr_next(&lr, &s, &n), -1);
		assert_non_null(strstr(lr_strerror(&lr), "UTF-16"));
		assert_int_equal(lr_next(&lr, &s, &n), -1); /* stays refused */
		lr_close(&lr);
		unlink(path);
	}
	WRITE("Koch\rKellner\rLagerist\r\nBote\r\nFahrer");
	assert_int_equal(lr_open(&lr, path), 0);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_int_equal(n, 21); /* one line: CR alone ends none */
	assert_true(lr.cr);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_memory_equal(s, "Bote", 4);
	assert_false(lr.cr);
	assert_int_equal(lr_next(&lr, &s, &n), 1);
	assert_false(lr.cr);
	lr_close(&lr);
	unlink(path);
}

/* A row with a field that is not empty beyond the header's last column
 * is flagged (a TAB inside a field); trailing empty fields are not; a
 * header line with a CR inside is refused. */
static void test_tsv_over(void **state)
{
	(void)state;
	tsv_reader t;
	WRITE("a\tb\nx\ty\nx\ty\t\t\nx\ty\tz\n");
	assert_int_equal(tsv_open(&t, path), 0);
	assert_int_equal(tsv_next(&t), 1);
	assert_false(t.over);
	assert_int_equal(tsv_next(&t), 1);
	assert_false(t.over);
	assert_int_equal(tsv_next(&t), 1);
	assert_true(t.over);
	tsv_close(&t);
	unlink(path);
	WRITE("a\tb\rx\ty\r");
	assert_int_equal(tsv_open(&t, path), -1);
	assert_non_null(strstr(t.err.data, ":1: a carriage return inside the header line"));
	tsv_close(&t);
	unlink(path);
}

/* Fields as split: empty ones at either end and between TABs, a short
 * row, a row past TSV_MAXCOL fields (the first TSV_MAXCOL kept, the row
 * flagged), and rows across the reader's buffer refills, each read back
 * whole (200,000 rows of varied widths: several refills of 64 KiB). */
static void test_tsv_fields(void **state)
{
	(void)state;
	tsv_reader t;
	size_t n;
	WRITE("a\tb\tc\n\t\t\nx\n\ty\t\n");
	assert_int_equal(tsv_open(&t, path), 0);
	assert_int_equal(t.ncol, 3);
	assert_int_equal(tsv_next(&t), 1); /* "\t\t": three empty fields */
	assert_int_equal(t.nfield, 3);
	for (int i = 0; i < 3; i++) {
		tsv_field(&t, i, &n);
		assert_int_equal(n, 0);
	}
	assert_int_equal(tsv_next(&t), 1); /* "x": one field, the others "" */
	assert_int_equal(t.nfield, 1);
	assert_memory_equal(tsv_field(&t, 0, &n), "x", 1);
	assert_int_equal(n, 1);
	assert_string_equal(tsv_field(&t, 2, &n), "");
	assert_int_equal(tsv_next(&t), 1); /* "\ty\t" */
	assert_int_equal(t.nfield, 3);
	assert_memory_equal(tsv_field(&t, 1, &n), "y", 1);
	tsv_field(&t, 2, &n);
	assert_int_equal(n, 0);
	assert_false(t.over);
	assert_int_equal(tsv_next(&t), 0);
	tsv_close(&t);
	unlink(path);

	/* TSV_MAXCOL + 6 fields under a header of two */
	tm_buf b = {0};
	buf_puts(&b, "a\tb\n");
	for (int i = 0; i < TSV_MAXCOL + 6; i++)
		buf_printf(&b, "%s%d", i ? "\t" : "", i);
	buf_puts(&b, "\n");
	write_file(b.data, b.len);
	assert_int_equal(tsv_open(&t, path), 0);
	assert_int_equal(tsv_next(&t), 1);
	assert_int_equal(t.nfield, TSV_MAXCOL);
	assert_true(t.over);
	assert_memory_equal(tsv_field(&t, TSV_MAXCOL - 1, &n), "63", 2);
	tsv_close(&t);
	unlink(path);

	enum { ROWS = 200000 };
	buf_reset(&b);
	buf_puts(&b, "n\tword\tpad\n");
	for (int i = 0; i < ROWS; i++)
		buf_printf(&b, "%d\tw%x\t%.*s\n", i, (unsigned)i * 2654435761u, i % 23, "xxxxxxxxxxxxxxxxxxxxxxx");
	write_file(b.data, b.len);
	assert_int_equal(tsv_open(&t, path), 0);
	int cn = tsv_col(&t, "n"), cw = tsv_col(&t, "word"), cp = tsv_col(&t, "pad");
	char want[32];
	for (int i = 0; i < ROWS; i++) {
		assert_int_equal(tsv_next(&t), 1);
		int wl = snprintf(want, sizeof want, "%d", i);
		const char *f = tsv_field(&t, cn, &n);
		assert_int_equal(n, (size_t)wl);
		assert_memory_equal(f, want, n);
		wl = snprintf(want, sizeof want, "w%x", (unsigned)i * 2654435761u);
		f = tsv_field(&t, cw, &n);
		assert_int_equal(n, (size_t)wl);
		assert_memory_equal(f, want, n);
		tsv_field(&t, cp, &n);
		assert_int_equal(n, (size_t)(i % 23));
		assert_false(t.over);
	}
	assert_int_equal(tsv_next(&t), 0);
	assert_int_equal(t.lr.lineno, ROWS + 1);
	tsv_close(&t);
	unlink(path);
	buf_free(&b);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_lines),
		cmocka_unit_test(test_long_line_cut),
		cmocka_unit_test(test_tsv),
		cmocka_unit_test(test_utf16_and_cr),
		cmocka_unit_test(test_tsv_over),
		cmocka_unit_test(test_tsv_fields),
	};
	return cmocka_run_group_tests_name("reader", tests, NULL, NULL);
}

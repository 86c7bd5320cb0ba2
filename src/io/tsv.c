/* tsv.c - header-aware TSV reading. */
#include "io/tsv.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Splits a row; all is the number of fields, however many.  The TABs
 * are found with memchr, which reads a word or a vector at a time. */
static void split(tsv_reader *t, const char *s, size_t n, size_t *all)
{
	const char *p = s, *end = s + n;
	size_t k = 0;
	t->nfield = 0;
	t->over = 0;
	for (;;) {
		const char *tab = memchr(p, '\t', (size_t)(end - p));
		const char *e = tab ? tab : end;
		if (t->nfield < TSV_MAXCOL) {
			t->field[t->nfield] = p;
			t->flen[t->nfield] = (size_t)(e - p);
			t->nfield++;
		}
		if (k++ >= t->nhead && e > p)
			t->over = 1;
		if (!tab)
			break;
		p = tab + 1;
	}
	*all = k;
}

int tsv_open(tsv_reader *t, const char *path)
{
	const char *s;
	size_t n, i;
	int r;
	char msg[512];

	memset(t, 0, sizeof *t);
	if (lr_open(&t->lr, path) != 0)
		return tm_failf(&t->err, TM_EFAIL, "%s: %s", path, strerror(errno));
	r = lr_next(&t->lr, &s, &n);
	if (r <= 0)
		return tm_failf(&t->err, TM_EFAIL, "%s: %s", t->lr.name,
				r < 0 ? lr_strerror(&t->lr) : "empty file, no header line");
	if (t->lr.cr)
		return tm_failf(&t->err, TM_EFAIL,
				"%s:1: a carriage return inside the header line: "
				"lines must end in LF or CRLF, not CR alone", t->lr.name);
	t->nhead = (size_t)-1;
	split(t, s, n, &t->nhead);
	for (i = 0; i < t->nfield; i++) {
		t->names[i] = strndup(t->field[i], t->flen[i]);
		if (!t->names[i])
			return tm_failf(&t->err, TM_ENOMEM, "%s: out of memory", t->lr.name);
		for (size_t j = 0; j < i; j++)
			if (!strcmp(t->names[j], t->names[i]) && t->names[i][0]) {
				snprintf(msg, sizeof msg, /* the name cut: a header may be long */
					 "%s:1: column '%s' appears twice", t->lr.name,
					 t->names[i]);
				t->ncol = i + 1;
				return tm_fail(&t->err, TM_EINPUT, NULL, msg, NULL);
			}
	}
	t->ncol = t->nfield;
	return 0;
}

int tsv_col(const tsv_reader *t, const char *name)
{
	for (size_t i = 0; i < t->ncol; i++)
		if (!strcmp(t->names[i], name))
			return (int)i;
	return -1;
}

int tsv_next(tsv_reader *t)
{
	const char *s;
	size_t n, all;
	int r;

	do {
		r = lr_next(&t->lr, &s, &n);
		if (r < 0)
			return tm_failf(&t->err, TM_EFAIL, "%s:%ld: %s", t->lr.name,
					t->lr.lineno + 1, lr_strerror(&t->lr));
		if (r == 0)
			return 0;
	} while (n == 0);
	split(t, s, n, &all);
	return 1;
}

void tsv_close(tsv_reader *t)
{
	for (size_t i = 0; i < t->ncol; i++)
		free(t->names[i]);
	t->ncol = 0;
	lr_close(&t->lr);
	buf_free(&t->err);
}

int tsv_put_fields(tm_buf *b, const char *const *f, size_t n)
{
	for (size_t i = 0; i < n; i++) {
		if (i)
			buf_putc(b, '\t');
		buf_puts(b, f[i]);
	}
	return buf_status(b);
}

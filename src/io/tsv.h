/* tsv.h - reading TSV files whose first line names the columns: columns
 * are found by name in any order, unknown columns are ignored, a leading
 * BOM and CRLF line ends are accepted. */
#ifndef TM_TSV_H
#define TM_TSV_H

#include <stddef.h>

#include "core/buf.h"
#include "io/reader.h"

#define TSV_MAXCOL 64

typedef struct tsv_reader {
	line_reader lr;
	char *names[TSV_MAXCOL];
	size_t ncol;
	const char *field[TSV_MAXCOL]; /* fields of the current row */
	size_t flen[TSV_MAXCOL];
	size_t nfield;
	size_t nhead;  /* fields of the header line, all of them */
	int over;      /* the current row has a field that is not empty
			* beyond the header's last column */
	tm_buf err;
} tsv_reader;

/* Opens path and reads its header.  Returns TM_OK, or a negative kind
 * (err.h: TM_EFAIL, TM_EINPUT for a column named twice, TM_ENOMEM) with a
 * message in t->err (naming the file). */
int tsv_open(tsv_reader *t, const char *path);

/* Index of the column called name, or -1. */
int tsv_col(const tsv_reader *t, const char *name);

/* An iterator (err.h): returns 1 with the next row's fields, 0 at the
 * end, TM_EFAIL on a read error (message in t->err).  Blank lines are skipped.  t->over says that the
 * row has more fields than the header (a TAB inside a field?): the
 * caller decides. */
int tsv_next(tsv_reader *t);

/* Field i of the current row ("" when the row is short). */
static inline const char *tsv_field(const tsv_reader *t, int i, size_t *n)
{
	if (i < 0 || (size_t)i >= t->nfield) {
		*n = 0;
		return "";
	}
	*n = t->flen[i];
	return t->field[i];
}

void tsv_close(tsv_reader *t);

/* Writing: appends f[0] TAB f[1] ... TAB f[n-1] to b (no line end; the
 * fields must hold no TAB or line end: the caller checks).  Returns
 * buf_status(b). */
int tsv_put_fields(tm_buf *b, const char *const *f, size_t n);

#endif

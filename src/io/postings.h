/* postings.h - reading postings: TSV with a header (columns by name:
 * `title` and `occupations` required; `id`, `date`, `lang` optional) or
 * JSON Lines with the same field names (`occupations` a string joined by
 * '|' or an array of strings; `id` a string or an integer).
 *
 * A reader owns what it returns: a posting's fields point into the reader
 * and live until the next pr_next call.
 *
 * Returns as err.h says: pr_open and pr_next give TM_OK or TM_EFAIL, each
 * failure with its message in pr->err; what pr_next read (a posting, a
 * malformed row to skip, the end) comes back through its pr_row. */
#ifndef TM_POSTINGS_H
#define TM_POSTINGS_H

#include <stddef.h>

#include "core/buf.h"
#include "io/jsonr.h"
#include "io/reader.h"

#define PR_MAXOCC 64

enum pr_format { PR_AUTO, PR_TSV, PR_JSONL };

typedef struct posting {
	const char *id, *date, *title;
	size_t idlen, datelen, titlelen;
	char lang[4];                 /* primary subtag, "und" when not given */
	const char *occ[PR_MAXOCC];   /* distinct, in the order given */
	size_t occlen[PR_MAXOCC];
	size_t nocc;
	long line;
} posting;

typedef struct postings_reader {
	line_reader lr;
	enum pr_format format;
	int c_title, c_occ, c_id, c_date, c_lang; /* TSV columns, -1 absent */
	size_t nhead;        /* TSV: fields of the header (a row with more that
			      * are not empty is malformed) */
	int has_id;          /* an id column or field is present */
	int uncoded;         /* set by the caller after pr_open: a posting
			      * without occupations is read (nocc 0), not
			      * refused as malformed */
	const char *pend;    /* the first line, read while detecting */
	size_t pendlen;
	int pending;
	jr_doc *doc;
	tm_buf hold, err;
	char idnum[32];
} postings_reader;

/* Opens path ("-" for standard input) and reads the header (TSV) or
 * detects the format.  Returns 0, or -1 with a message in pr->err. */
int pr_open(postings_reader *pr, const char *path, enum pr_format format);

/* What pr_next read. */
typedef enum pr_row {
	PR_END,      /* no more rows */
	PR_POSTING,  /* a posting, in p */
	PR_SKIP      /* a malformed row, to be skipped: "file:line: what" in
		      * pr->err */
} pr_row;

/* Reads the next row.  Returns TM_OK (0) with *row saying what it was, or
 * TM_EFAIL on a read error (message in pr->err; *row unchanged). */
int pr_next(postings_reader *pr, posting *p, pr_row *row);

void pr_close(postings_reader *pr);

/* Is s[0..n) a valid ISO 8601 calendar date YYYY-MM-DD? */
int pr_valid_date(const char *s, size_t n);

#endif

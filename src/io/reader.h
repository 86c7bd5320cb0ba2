/* reader.h - reading input line by line: files or standard input ("-"),
 * LF or CRLF, a leading BOM skipped, NUL bytes passed through, and lines
 * longer than a limit cut (and flagged) instead of held whole, so memory
 * stays bounded whatever the input.  A file that starts with a UTF-16
 * byte order mark is refused (a read error) rather than read as garbage;
 * a carriage return inside a line (a file with CR-only line ends) is
 * flagged, not taken for a line end. */
#ifndef TM_READER_H
#define TM_READER_H

#include <stdio.h>

#include "core/buf.h"

typedef struct line_reader {
	FILE *fp;
	const char *name;  /* as given; "-" reads as "<stdin>" */
	int own;           /* fp is ours to close */
	char *buf;
	size_t cap, pos, end;
	int eof, err;
	long lineno;       /* of the line last returned */
	tm_buf line;
	size_t maxline;
	int cut;           /* the line last returned was cut to maxline */
	int cr;            /* the line last returned has a CR inside (not CRLF) */
	int noeol;         /* the line last returned ended the input without a
			    * line end (the file may have been cut short) */
	int utf16;         /* refused: the input starts with a UTF-16 BOM */
	int bom_checked;
} line_reader;

#define LR_MAXLINE ((size_t)1 << 20)

/* Opens path ("-" for standard input).  Returns 0, or -1 with errno set. */
int lr_open(line_reader *lr, const char *path);

/* Returns 1 and the next line (without its end) in s and n, valid until the
 * next call; 0 at the end; -1 on a read error (errno set). */
int lr_next(line_reader *lr, const char **s, size_t *n);

/* What the last -1 of lr_next means, for a message: the UTF-16 refusal,
 * or strerror of the error. */
const char *lr_strerror(const line_reader *lr);

void lr_close(line_reader *lr);

#endif

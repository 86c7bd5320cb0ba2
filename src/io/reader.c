/* reader.c - buffered line reading with bounded memory. */
#include "io/reader.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>

int lr_open(line_reader *lr, const char *path)
{
	memset(lr, 0, sizeof *lr);
	if (!strcmp(path, "-")) {
		lr->fp = stdin;
		lr->name = "<stdin>";
	} else {
		lr->fp = fopen(path, "rb");
		if (!lr->fp)
			return -1;
		lr->own = 1;
		lr->name = path;
	}
	lr->cap = 1 << 16;
	lr->buf = malloc(lr->cap);
	lr->maxline = LR_MAXLINE;
	if (!lr->buf) {
		if (lr->own)
			fclose(lr->fp);
		errno = ENOMEM;
		return -1;
	}
	return 0;
}

void lr_close(line_reader *lr)
{
	if (lr->own && lr->fp)
		fclose(lr->fp);
	lr->fp = NULL;
	free(lr->buf);
	lr->buf = NULL;
	buf_free(&lr->line);
}

static int fill(line_reader *lr)
{
	size_t got;
	if (lr->utf16) {
		errno = EILSEQ;
		return -1;
	}
	if (lr->eof)
		return 0;
	got = fread(lr->buf, 1, lr->cap, lr->fp);
	lr->pos = 0;
	lr->end = got;
	if (got == 0) {
		if (ferror(lr->fp)) {
			lr->err = errno ? errno : EIO;
			return -1;
		}
		lr->eof = 1;
		return 0;
	}
	if (!lr->bom_checked) {
		lr->bom_checked = 1;
		if (got >= 3 && !memcmp(lr->buf, "\xEF\xBB\xBF", 3))
			lr->pos = 3;
		/* FF FE (UTF-16LE, and UTF-32LE) or FE FF (UTF-16BE): every
		 * second byte would be a NUL; no line of it is a title */
		unsigned char b0 = (unsigned char)lr->buf[0], b1 = got > 1 ? (unsigned char)lr->buf[1] : 0;
		if ((b0 == 0xFF && b1 == 0xFE) || (b0 == 0xFE && b1 == 0xFF)) {
			lr->utf16 = 1;
			lr->err = errno = EILSEQ;
			lr->eof = 1;
			lr->pos = lr->end = 0;
			return -1;
		}
	}
	return 1;
}

const char *lr_strerror(const line_reader *lr)
{
	if (lr->utf16)
		return "the file is UTF-16 (it starts with a UTF-16 byte order mark); titlemill "
		       "reads UTF-8: convert it first, e.g. iconv -f UTF-16 -t UTF-8";
	return strerror(lr->err ? lr->err : errno);
}

/* Appends at most what still fits under maxline. */
static int keep(line_reader *lr, const char *p, size_t n)
{
	size_t room = lr->maxline > lr->line.len ? lr->maxline - lr->line.len : 0;
	if (n > room) {
		n = room;
		lr->cut = 1;
	}
	return buf_append(&lr->line, p, n);
}

int lr_next(line_reader *lr, const char **s, size_t *n)
{
	int any = 0;

	buf_reset(&lr->line);
	lr->cut = 0;
	lr->cr = 0;
	lr->noeol = 0;
	for (;;) {
		if (lr->pos >= lr->end) {
			int r = fill(lr);
			if (r < 0)
				return -1;
			if (r == 0)
				break;
		}
		any = 1;
		char *p = lr->buf + lr->pos;
		char *nl = memchr(p, '\n', lr->end - lr->pos);
		size_t len = nl ? (size_t)(nl - p) : lr->end - lr->pos;
		/* whole line inside the buffer: hand it out without a copy */
		if (nl && lr->line.len == 0 && !lr->cut && len <= lr->maxline) {
			lr->pos += len + 1;
			if (len && p[len - 1] == '\r')
				len--;
			lr->lineno++;
			lr->cr = memchr(p, '\r', len) != NULL;
			*s = p;
			*n = len;
			return 1;
		}
		if (keep(lr, p, len) != 0) {
			errno = ENOMEM;
			return -1;
		}
		lr->pos += len + (nl != NULL);
		if (nl)
			goto done;
	}
	if (!any || (lr->line.len == 0 && !lr->cut))
		return 0;
	lr->noeol = 1;
done:
	if (lr->line.len && lr->line.data[lr->line.len - 1] == '\r' && !lr->cut)
		lr->line.len--;
	lr->lineno++;
	lr->cr = lr->line.len && memchr(lr->line.data, '\r', lr->line.len) != NULL;
	*s = lr->line.data ? lr->line.data : "";
	*n = lr->line.len;
	return 1;
}

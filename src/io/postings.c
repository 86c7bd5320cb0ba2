/* postings.c - the postings readers (TSV and JSON Lines). */
#include "io/postings.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "core/lang.h"

/* Puts "file:line: what" in pr->err (cut at 400 bytes). */
static void say(postings_reader *pr, long line, const char *what)
{
	char msg[400];
	if (line > 0)
		snprintf(msg, sizeof msg, "%s:%ld: %s", pr->lr.name, line, what);
	else /* an empty file has no line to name */
		snprintf(msg, sizeof msg, "%s: %s", pr->lr.name, what);
	tm_fail(&pr->err, TM_EINPUT, NULL, msg, NULL);
}

int pr_valid_date(const char *s, size_t n)
{
	static const int mdays[12] = {31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
	int y, m, d;

	if (n != 10 || s[4] != '-' || s[7] != '-')
		return 0;
	for (size_t i = 0; i < 10; i++)
		if (i != 4 && i != 7 && (s[i] < '0' || s[i] > '9'))
			return 0;
	y = (s[0] - '0') * 1000 + (s[1] - '0') * 100 + (s[2] - '0') * 10 + (s[3] - '0');
	m = (s[5] - '0') * 10 + (s[6] - '0');
	d = (s[8] - '0') * 10 + (s[9] - '0');
	if (m < 1 || m > 12 || d < 1 || d > mdays[m - 1])
		return 0;
	if (m == 2 && d == 29 && !((y % 4 == 0 && y % 100 != 0) || y % 400 == 0))
		return 0;
	return 1;
}

static int col(char **names, size_t n, const char *want)
{
	for (size_t i = 0; i < n; i++)
		if (!strcmp(names[i], want))
			return (int)i;
	return -1;
}

static int read_header(postings_reader *pr, const char *s, size_t n)
{
	char *names[64];
	size_t nn = 0, start = 0;
	int rc = 0;

	pr->nhead = 1;
	for (size_t i = 0; i < n; i++)
		pr->nhead += s[i] == '\t';
	for (size_t i = 0; i <= n && nn < 64; i++)
		if (i == n || s[i] == '\t') {
			names[nn] = strndup(s + start, i - start);
			/* (a NUL inside a name makes strndup stop early) */
			size_t nl = names[nn] ? strlen(names[nn]) : 0;
			if (nl && names[nn][nl - 1] == '\r')
				names[nn][nl - 1] = 0;
			nn++;
			start = i + 1;
		}
	for (size_t i = 0; i < nn; i++)
		for (size_t j = 0; j < i; j++)
			if (names[i] && names[j] && names[i][0] && !strcmp(names[i], names[j])) {
				char m[200];
				snprintf(m, sizeof m, "column '%.60s' appears twice in the header", names[i]);
				say(pr, 1, m);
				rc = -1;
			}
	pr->c_title = col(names, nn, "title");
	pr->c_occ = col(names, nn, "occupations");
	pr->c_id = col(names, nn, "id");
	pr->c_date = col(names, nn, "date");
	pr->c_lang = col(names, nn, "lang");
	pr->has_id = pr->c_id >= 0;
	if (rc == 0 && (pr->c_title < 0 || pr->c_occ < 0)) {
		say(pr, 1, pr->c_title < 0 ? "no 'title' column in the header"
					  : "no 'occupations' column in the header");
		rc = -1;
	}
	for (size_t i = 0; i < nn; i++)
		free(names[i]);
	return rc;
}

int pr_open(postings_reader *pr, const char *path, enum pr_format format)
{
	const char *s;
	size_t n;
	int r;

	memset(pr, 0, sizeof *pr);
	pr->c_title = pr->c_occ = pr->c_id = pr->c_date = pr->c_lang = -1;
	if (lr_open(&pr->lr, path) != 0) {
		char m[512];
		snprintf(m, sizeof m, "%s: %s", path, strerror(errno));
		return tm_fail(&pr->err, TM_EFAIL, NULL, m, NULL);
	}
	/* the first non-empty line tells the format */
	do {
		r = lr_next(&pr->lr, &s, &n);
		if (r < 0) {
			say(pr, pr->lr.lineno + 1, lr_strerror(&pr->lr));
			return -1;
		}
		if (r == 0) {
			say(pr, pr->lr.lineno, "empty input: no header line and no posting");
			return -1;
		}
	} while (n == 0);
	if (format == PR_AUTO)
		format = s[0] == '{' ? PR_JSONL : PR_TSV;
	pr->format = format;
	if (pr->lr.cr) {
		/* a file with CR-only line ends is one long line */
		say(pr, pr->lr.lineno, "a carriage return inside the first line: lines must end "
			"in LF or CRLF, not CR alone");
		return -1;
	}
	if (format == PR_TSV) {
		if (pr->lr.lineno != 1) {
			say(pr, pr->lr.lineno, "a TSV file starts with its header line");
			return -1;
		}
		return read_header(pr, s, n);
	}
	/* JSON Lines: keep the line for the first read_row */
	if (buf_append(&pr->hold, s, n) != 0)
		return -1;
	pr->pending = 1;
	pr->has_id = 1; /* known per row */
	return 0;
}

/* Splits occupations joined by '|' (trimmed, empty parts and repeats
 * dropped) into p.  Returns 0, -1 for more than PR_MAXOCC, -2 for an
 * occupation with a control character or invalid UTF-8 (it would break
 * the counts table and never match a label). */
static int add_occs(posting *p, const char *s, size_t n)
{
	size_t start = 0;
	for (size_t i = 0; i <= n; i++) {
		if (i < n && s[i] != '|')
			continue;
		const char *o = s + start;
		size_t l = i - start;
		while (l && (*o == ' ' || *o == '\t')) {
			o++;
			l--;
		}
		while (l && (o[l - 1] == ' ' || o[l - 1] == '\t' || o[l - 1] == '\r'))
			l--;
		start = i + 1;
		if (!l)
			continue;
		for (size_t k = 0; k < l; k++)
			if ((unsigned char)o[k] < 0x20 || o[k] == 0x7F)
				return -2;
		if (!dec_is_utf8(o, l))
			return -2;
		int dup = 0;
		for (size_t k = 0; k < p->nocc; k++)
			if (p->occlen[k] == l && !memcmp(p->occ[k], o, l))
				dup = 1;
		if (dup)
			continue;
		if (p->nocc == PR_MAXOCC)
			return -1;
		p->occ[p->nocc] = o;
		p->occlen[p->nocc++] = l;
	}
	return 0;
}

static int set_lang(postings_reader *pr, posting *p, const char *s, size_t n)
{
	char tag[64];
	if (n == 0) {
		memcpy(p->lang, "und", 4);
		return 0;
	}
	if (n >= sizeof tag || memchr(s, 0, n))
		return -1;
	memcpy(tag, s, n);
	tag[n] = 0;
	(void)pr;
	return lang_tag(tag, p->lang);
}

static int finish(postings_reader *pr, posting *p)
{
	if (!p->titlelen) {
		say(pr, p->line, "no title");
		return TM_EINPUT;
	}
	if (!p->nocc && !pr->uncoded) {
		say(pr, p->line, "no occupation");
		return TM_EINPUT;
	}
	if (p->date && !pr_valid_date(p->date, p->datelen)) {
		char m[120];
		snprintf(m, sizeof m, "bad date '%.*s' (want YYYY-MM-DD)",
			 (int)(p->datelen > 40 ? 40 : p->datelen), p->date);
		say(pr, p->line, m);
		return TM_EINPUT;
	}
	return 1;
}

static int next_tsv(postings_reader *pr, posting *p, const char *s, size_t n)
{
	const char *f[64];
	size_t fl[64], nf = 0, nall = 0, start = 0;
	int over = 0, r;

	for (size_t i = 0; i <= n; i++)
		if (i == n || s[i] == '\t') {
			if (nf < 64) {
				f[nf] = s + start;
				fl[nf++] = i - start;
			}
			if (nall++ >= pr->nhead && i > start)
				over = 1;
			start = i + 1;
		}
#define FIELD(c, ptr, len)                                  \
	do {                                                \
		if ((c) >= 0 && (size_t)(c) < nf) {         \
			ptr = f[c];                         \
			len = fl[c];                        \
		}                                           \
	} while (0)
	FIELD(pr->c_title, p->title, p->titlelen);
	const char *occ = NULL, *lang = NULL;
	size_t occlen = 0, langlen = 0;
	FIELD(pr->c_occ, occ, occlen);
	FIELD(pr->c_id, p->id, p->idlen);
	FIELD(pr->c_date, p->date, p->datelen);
	FIELD(pr->c_lang, lang, langlen);
#undef FIELD
	if ((size_t)pr->c_title >= nf || (size_t)pr->c_occ >= nf) {
		say(pr, p->line, "row has fewer fields than the header");
		return TM_EINPUT;
	}
	if (over) {
		say(pr, p->line, "row has more fields than the header (a TAB inside a field?)");
		return TM_EINPUT;
	}
	if (p->id && !p->idlen)
		p->id = NULL;
	if (p->date && !p->datelen)
		p->date = NULL;
	if (occ && (r = add_occs(p, occ, occlen)) != 0) {
		say(pr, p->line, r == -2 ? "an occupation holds a control character or invalid UTF-8"
					 : "more than 64 occupations");
		return TM_EINPUT;
	}
	if (set_lang(pr, p, lang, langlen) != 0) {
		say(pr, p->line, "bad lang (want a BCP 47 tag such as de or fr-BE)");
		return TM_EINPUT;
	}
	return finish(pr, p);
}

static int next_json(postings_reader *pr, posting *p, const char *s, size_t n)
{
	char err[200], m[300];
	enum jr_type t;
	size_t len;

	jr_free(pr->doc);
	pr->doc = jr_parse(s, n, err, sizeof err);
	if (!pr->doc) {
		snprintf(m, sizeof m, "bad JSON: %s", err);
		say(pr, p->line, m);
		return TM_EINPUT;
	}
	t = jr_type(pr->doc, "title");
	if (t != JR_STRING && t != JR_MISSING && t != JR_NULL) {
		say(pr, p->line, "'title' is not a string");
		return TM_EINPUT;
	}
	p->title = jr_str(pr->doc, "title", &p->titlelen);
	t = jr_type(pr->doc, "occupations");
	if (t == JR_STRING) {
		const char *o = jr_str(pr->doc, "occupations", &len);
		int r = add_occs(p, o, len);
		if (r != 0) {
			say(pr, p->line, r == -2 ? "an occupation holds a control character or invalid UTF-8"
						 : "more than 64 occupations");
			return TM_EINPUT;
		}
	} else if (t == JR_ARRAY) {
		for (size_t i = 0; i < jr_len(pr->doc, "occupations"); i++) {
			const char *o = jr_elem_str(pr->doc, "occupations", i, &len);
			if (!o) {
				say(pr, p->line, "'occupations' holds something that is not a string");
				return TM_EINPUT;
			}
			int r = memchr(o, '|', len) ? 1 : add_occs(p, o, len);
			if (r != 0) {
				say(pr, p->line, r == 1 ? "an occupation in the 'occupations' array contains '|'"
					: r == -2 ? "an occupation holds a control character or invalid UTF-8"
						  : "more than 64 occupations");
				return TM_EINPUT;
			}
		}
	} else if (t != JR_MISSING && t != JR_NULL) {
		say(pr, p->line, "'occupations' is neither a string nor an array");
		return TM_EINPUT;
	}
	t = jr_type(pr->doc, "id");
	if (t == JR_STRING) {
		p->id = jr_str(pr->doc, "id", &p->idlen);
		if (!p->idlen)
			p->id = NULL;
	} else if (t == JR_INT) {
		p->idlen = (size_t)snprintf(pr->idnum, sizeof pr->idnum, "%lld",
					    jr_int(pr->doc, "id"));
		p->id = pr->idnum;
	} else if (t != JR_MISSING && t != JR_NULL) {
		say(pr, p->line, "'id' is neither a string nor an integer");
		return TM_EINPUT;
	}
	t = jr_type(pr->doc, "date");
	if (t == JR_STRING)
		p->date = jr_str(pr->doc, "date", &p->datelen);
	else if (t != JR_MISSING && t != JR_NULL) {
		say(pr, p->line, "'date' is not a string");
		return TM_EINPUT;
	}
	t = jr_type(pr->doc, "lang");
	const char *lang = NULL;
	len = 0;
	if (t == JR_STRING)
		lang = jr_str(pr->doc, "lang", &len);
	else if (t != JR_MISSING && t != JR_NULL) {
		say(pr, p->line, "'lang' is not a string");
		return TM_EINPUT;
	}
	if (set_lang(pr, p, lang, len) != 0) {
		say(pr, p->line, "bad lang (want a BCP 47 tag such as de or fr-BE)");
		return TM_EINPUT;
	}
	return finish(pr, p);
}

/* 1 with a posting, 0 at the end, TM_EINPUT for a malformed row,
 * TM_EFAIL on a read error. */
static int read_row(postings_reader *pr, posting *p)
{
	const char *s;
	size_t n;
	int r;

	memset(p, 0, sizeof *p);
	for (;;) {
		if (pr->pending) {
			pr->pending = 0;
			s = pr->hold.data;
			n = pr->hold.len;
		} else {
			r = lr_next(&pr->lr, &s, &n);
			if (r < 0) {
				say(pr, pr->lr.lineno + 1, lr_strerror(&pr->lr));
				return TM_EFAIL;
			}
			if (r == 0)
				return 0;
		}
		if (n && s[n - 1] == '\r')
			n--;
		if (n == 0)
			continue;
		p->line = pr->lr.lineno;
		if (pr->lr.cut) {
			say(pr, p->line, "line longer than 1 MiB");
			return TM_EINPUT;
		}
		return pr->format == PR_TSV ? next_tsv(pr, p, s, n) : next_json(pr, p, s, n);
	}
}

int pr_next(postings_reader *pr, posting *p, pr_row *row)
{
	int r = read_row(pr, p);
	if (r < 0 && r != TM_EINPUT)
		return TM_EFAIL;
	*row = r == 0 ? PR_END : r == 1 ? PR_POSTING : PR_SKIP;
	return TM_OK;
}

void pr_close(postings_reader *pr)
{
	jr_free(pr->doc);
	pr->doc = NULL;
	lr_close(&pr->lr);
	buf_free(&pr->hold);
	buf_free(&pr->err);
}

/* review_trend.c - the rows of `titlemill trend` as review items
 * (review_trend.h): which rows are items, their ids and figures, and the
 * rows of trend --tsv read as trend's JSON objects. */
#include "review/review_trend.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "core/digest.h"
#include "io/decode.h"
#include "io/jsonw.h"
#include "rank/trend.h"
#include "review/review.h"
#include "review/review_int.h"

/* The fields of a trend row in the order trend writes them: the type of
 * each ('s' text, 'u' a whole number, 'r' a number, 'p' a share (a number
 * from 0 to 1), 'b' true or false, 'x' an example, gathered into
 * "examples") and whether every row has it. */
static const struct {
	const char *name;
	char type;
	char required;
} fields[] = {
	{"direction", 's', 1},
	{"occupation", 's', 1},
	{"occupation_label", 's', 0},
	{"lang", 's', 1},
	{"label", 's', 1},
	{"key", 's', 1},
	{"is_label", 'b', 0},
	{"label_kind", 's', 0},
	{"postings_before", 'u', 1},
	{"postings_after", 'u', 1},
	{"occupation_postings_before", 'u', 1},
	{"occupation_postings_after", 'u', 1},
	{"share_before", 'p', 0},
	{"share_before_low", 'p', 0},
	{"share_before_high", 'p', 0},
	{"share_after", 'p', 0},
	{"share_after_low", 'p', 0},
	{"share_after_high", 'p', 0},
	{"g2", 'r', 1},
	{"first_seen", 's', 0},
	{"example_1", 'x', 0},
	{"example_2", 'x', 0},
	{"example_3", 'x', 0},
};
#define NFIELDS (sizeof fields / sizeof *fields)
_Static_assert(NFIELDS <= sizeof ((rq_trend_tsv *)0)->col / sizeof(int), "rq_trend_tsv.col");

static const char *const label_kinds[] = {"pref", "alt", "hidden"};

int rq_trend_figures(const jr_val *ev, rq_trend_ev *t)
{
	size_t n;
	const char *d = jr_vstr(jr_get(ev, "direction"), &n);
	const char *const count[] = {"postings_before", "postings_after",
				     "occupation_postings_before", "occupation_postings_after"};
	uint64_t *to[] = {&t->before, &t->after, &t->occ_before, &t->occ_after};
	int dir = d ? rqi_name_index(trend_direction_names, 2, d, n) : -1;
	memset(t, 0, sizeof *t);
	if (dir < 0)
		return 0;
	for (int i = 0; i < 4; i++) {
		const jr_val *x = jr_get(ev, count[i]);
		if (jr_vtype(x) != JR_INT || jr_vint(x) < 0)
			return 0;
		*to[i] = (uint64_t)jr_vint(x);
	}
	if (!t->occ_before || !t->occ_after || t->before > t->occ_before || t->after > t->occ_after) {
		memset(t, 0, sizeof *t);
		return 0;
	}
	t->falling = dir == TREND_FALLING;
	t->g2 = jr_vnum(jr_get(ev, "g2"));
	return 1;
}

void rq_trend_id(int kind, const char *occ, const char *lang, const char *key, size_t kl,
		 char id[17])
{
	const char *k = rq_kind_names[kind];
	uint64_t h = dg_hash(k, strlen(k), 0x7472656e64ULL);
	h = dg_hash("\x1F", 1, h);
	h = dg_hash(occ, strlen(occ), h);
	h = dg_hash("\x1F", 1, h);
	h = dg_hash(lang, strlen(lang), h);
	h = dg_hash("\x1F", 1, h);
	h = dg_hash(key, kl, h);
	snprintf(id, 17, "%016llx", (unsigned long long)h);
}

void rqi_sugg_free(rqi_sugg *s)
{
	free(s->occ);
	free(s->lang);
	free(s->label);
	memset(s, 0, sizeof *s);
}

/* "where: "field" why" in err; returns TM_EINPUT. */
static int bad(tm_buf *err, const char *where, const char *field, const char *why)
{
	tm_fail(err, TM_EINPUT, where, "\"", field);
	buf_puts(err, "\" ");
	buf_puts(err, why);
	return TM_EINPUT;
}

/* A member left out, or written as null: a flag that is not set (is_label
 * is written only when true by some writers), a field a row has not. */
static int absent(const jr_val *x)
{
	return !x || jr_vtype(x) == JR_NULL;
}

int rqi_trend_sugg(const jr_val *v, rqi_sugg *s, int *what, const char *where, tm_buf *err)
{
	int dir, is_label = 0, lk = -1;
	uint64_t pb, pa, ob, oa;
	double g2;
	char *key = NULL;
	int rc = TM_EINPUT;

	memset(s, 0, sizeof *s);
	*what = RQI_ITEM;
	if (rqi_get_name(v, "direction", trend_direction_names, 2, &dir, where, err) ||
	    !(s->occ = rqi_get_str(v, "occupation", where, err)) ||
	    !(s->lang = rqi_get_str(v, "lang", where, err)) ||
	    !(s->label = rqi_get_str(v, "label", where, err)) ||
	    !(key = rqi_get_str(v, "key", where, err)) ||
	    (!absent(jr_get(v, "is_label")) && rqi_get_bool(v, "is_label", &is_label, where, err)) ||
	    rqi_get_count(v, "postings_before", &pb, where, err) ||
	    rqi_get_count(v, "postings_after", &pa, where, err) ||
	    rqi_get_count(v, "occupation_postings_before", &ob, where, err) ||
	    rqi_get_count(v, "occupation_postings_after", &oa, where, err) ||
	    rqi_get_score(v, "g2", &g2, where, err))
		goto done;
	if (is_label && rqi_get_name(v, "label_kind", label_kinds, 3, &lk, where, err))
		goto done;
	if (!is_label && !absent(jr_get(v, "label_kind"))) {
		bad(err, where, "label_kind", "is given for a title that is no label (is_label false)");
		goto done;
	}
	if (!ob || !oa) {
		bad(err, where, ob ? "occupation_postings_after" : "occupation_postings_before",
		    "must be 1 or more: trend compares occupations counted in both windows");
		goto done;
	}
	if (pb > ob || pa > oa) {
		bad(err, where, pb > ob ? "postings_before" : "postings_after",
		    "is more than the occupation's postings in that window");
		goto done;
	}
	if (g2 < 0) {
		bad(err, where, "g2", "must be 0 or more");
		goto done;
	}
	/* the shares as the counts give them, compared as trend compares them */
	double sb = (double)pb / (double)ob, sa = (double)pa / (double)oa;
	if (dir == TREND_RISING ? !(sa > sb) : !(sb > sa)) {
		bad(err, where, "direction",
		    dir == TREND_RISING ? "is rising but the share after is not higher than before"
					: "is falling but the share before is not higher than after");
		goto done;
	}
	for (size_t i = 0; i < NFIELDS; i++) {
		const jr_val *x = jr_get(v, fields[i].name);
		if (fields[i].type != 'p' || absent(x))
			continue;
		if ((jr_vtype(x) != JR_INT && jr_vtype(x) != JR_REAL) || !(jr_vnum(x) >= 0) ||
		    jr_vnum(x) > 1) {
			bad(err, where, fields[i].name, "must be a share: a number from 0 to 1");
			goto done;
		}
	}
	rc = TM_OK;
	if (dir == TREND_RISING && is_label)
		*what = RQI_RISING_LABEL;
	else if (dir == TREND_FALLING && !is_label)
		*what = RQI_FALLING_TITLE;
	else {
		s->kind = dir == TREND_RISING ? RK_RISING : RK_FADING;
		s->score = g2;
		s->postings = dir == TREND_RISING ? pa : pb;
		rq_trend_id(s->kind, s->occ, s->lang, key, strlen(key), s->id);
		s->idl = 16;
	}
done:
	free(key);
	if (rc || *what != RQI_ITEM)
		rqi_sugg_free(s);
	return rc;
}

/* ---- trend --tsv ---- */

int rq_trend_tsv_head(rq_trend_tsv *h, const char *line, size_t n, const char *where,
		      tm_buf *err)
{
	const char *p = line, *end = line + n;
	int col = 0;
	for (size_t i = 0; i < NFIELDS; i++)
		h->col[i] = -1;
	if (end - p >= 3 && !memcmp(p, "\xEF\xBB\xBF", 3))
		p += 3;
	while (p <= end) {
		const char *t = memchr(p, '\t', (size_t)(end - p));
		size_t l = (size_t)((t ? t : end) - p);
		if (l && p[l - 1] == '\r' && !t)
			l--;
		for (size_t i = 0; i < NFIELDS; i++) {
			if (strlen(fields[i].name) != l || memcmp(fields[i].name, p, l))
				continue;
			if (h->col[i] >= 0)
				return bad(err, where, fields[i].name, "names two columns");
			h->col[i] = col;
		}
		col++;
		if (!t)
			break;
		p = t + 1;
	}
	for (size_t i = 0; i < NFIELDS; i++)
		if (fields[i].required && h->col[i] < 0) {
			tm_fail(err, TM_EINPUT, where, "no column \"", fields[i].name);
			buf_puts(err, "\": review add reads JSON Lines of propose, overlap or trend, "
				      "or the TSV of trend --tsv");
			return TM_EINPUT;
		}
	return TM_OK;
}

/* A whole number: digits only, no sign, at most 2^63 - 1 (what a JSON
 * reader takes as an integer). */
static int is_count(const char *s, size_t n)
{
	uint64_t v = 0;
	if (!n || n > 19)
		return 0;
	for (size_t i = 0; i < n; i++) {
		if (s[i] < '0' || s[i] > '9')
			return 0;
		unsigned d = (unsigned)(s[i] - '0');
		if (v > ((uint64_t)INT64_MAX - d) / 10)
			return 0;
		v = v * 10 + d;
	}
	return !(n > 1 && s[0] == '0');
}

/* A finite number as trend writes it: digits, an optional fraction and
 * exponent, no sign but a leading minus, no spaces, no hex, inf or nan.
 * The text is JSON's grammar for numbers, checked here so that it can be
 * copied into the object as it is. */
static int is_number(const char *s, size_t n)
{
	size_t i = 0;
	char tmp[64], *end;
	if (!n || n >= sizeof tmp)
		return 0;
	if (s[i] == '-')
		i++;
	if (i == n || s[i] < '0' || s[i] > '9' || (s[i] == '0' && i + 1 < n && s[i + 1] >= '0' &&
						    s[i + 1] <= '9'))
		return 0;
	while (i < n && s[i] >= '0' && s[i] <= '9')
		i++;
	if (i < n && s[i] == '.') {
		if (++i == n || s[i] < '0' || s[i] > '9')
			return 0;
		while (i < n && s[i] >= '0' && s[i] <= '9')
			i++;
	}
	if (i < n && (s[i] == 'e' || s[i] == 'E')) {
		if (++i < n && (s[i] == '+' || s[i] == '-'))
			i++;
		if (i == n || s[i] < '0' || s[i] > '9')
			return 0;
		while (i < n && s[i] >= '0' && s[i] <= '9')
			i++;
	}
	if (i != n)
		return 0;
	/* without a fraction or an exponent it is an integer to a JSON
	 * reader: one that fits in 64 bits */
	if (!memchr(s, '.', n) && !memchr(s, 'e', n) && !memchr(s, 'E', n))
		return is_count(s[0] == '-' ? s + 1 : s, s[0] == '-' ? n - 1 : n);
	memcpy(tmp, s, n);
	tmp[n] = 0;
	errno = 0;
	double d = strtod(tmp, &end);
	return *end == 0 && errno != ERANGE && isfinite(d);
}

int rq_trend_tsv_row(const rq_trend_tsv *h, const char *line, size_t n, tm_buf *out,
		     const char *where, tm_buf *err)
{
	const char *cell[NFIELDS];
	size_t len[NFIELDS], start = out->len;
	const char *p = line, *end = line + n;
	int col = 0, nex = 0;

	if (n && line[n - 1] == '\r')
		end--;
	for (size_t i = 0; i < NFIELDS; i++)
		cell[i] = "", len[i] = 0;
	/* the cells of the columns we read */
	while (p <= end) {
		const char *t = memchr(p, '\t', (size_t)(end - p));
		size_t l = (size_t)((t ? t : end) - p);
		for (size_t i = 0; i < NFIELDS; i++)
			if (h->col[i] == col)
				cell[i] = p, len[i] = l;
		col++;
		if (!t)
			break;
		p = t + 1;
	}
	buf_putc(out, '{');
	for (size_t i = 0; i < NFIELDS; i++) {
		const char *c = cell[i];
		size_t l = len[i];
		if (!l) {
			if (fields[i].required) {
				bad(err, where, fields[i].name, "is empty");
				goto fail;
			}
			continue;
		}
		if ((fields[i].type == 's' || fields[i].type == 'x') && !dec_is_utf8(c, l)) {
			bad(err, where, fields[i].name, "is not valid UTF-8");
			goto fail;
		}
		if (fields[i].type == 'x') { /* the last fields */
			buf_puts(out, nex++ ? "," : ",\"examples\":[");
			json_str(out, c, l);
			continue;
		}
		if (out->len > start + 1)
			buf_putc(out, ',');
		json_key(out, fields[i].name);
		switch (fields[i].type) {
		case 's':
			json_str(out, c, l);
			break;
		case 'u':
		case 'r':
		case 'p': /* numbers copied as they are, once checked */
			if (fields[i].type == 'u' ? !is_count(c, l) : !is_number(c, l)) {
				bad(err, where, fields[i].name, fields[i].type == 'u'
					? "must be a whole number of 0 or more" : "must be a number");
				goto fail;
			}
			buf_append(out, c, l);
			break;
		case 'b':
			if ((l == 4 && !memcmp(c, "true", 4)) || (l == 1 && c[0] == '1'))
				buf_puts(out, "true");
			else if ((l == 5 && !memcmp(c, "false", 5)) || (l == 1 && c[0] == '0'))
				buf_puts(out, "false");
			else {
				bad(err, where, fields[i].name, "must be true or false");
				goto fail;
			}
			break;
		}
	}
	if (nex)
		buf_putc(out, ']');
	buf_putc(out, '}');
	if (buf_status(out)) {
		buf_truncate(out, start);
		return tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
	}
	return TM_OK;
fail:
	buf_truncate(out, start);
	return TM_EINPUT;
}

/* review_batch.c - a batch of decisions read from a TSV file. */
#include "review/review_batch.h"

#include <stdlib.h>
#include <string.h>
#include <strings.h>

#include "io/fieldcheck.h"
#include "review/review_int.h"
#include "io/tsv.h"

rq_decision *rq_decisions_push(rq_decisions *ds)
{
	rq_decision *p = tm_grow(ds->v, &ds->cap, ds->n + 1, sizeof *p, 16);
	if (!p)
		return NULL;
	ds->v = p;
	memset(&p[ds->n], 0, sizeof *p);
	return &p[ds->n++];
}

void rq_decisions_free(rq_decisions *ds)
{
	for (size_t i = 0; i < ds->n; i++) {
		free(ds->v[i].id);
		free(ds->v[i].reviewer);
		free(ds->v[i].note);
		free(ds->v[i].where);
		free(ds->v[i].label);
	}
	free(ds->v);
	ds->v = NULL;
	ds->n = ds->cap = 0;
}

int rq_plain_text(const char *s, size_t n)
{
	char why[FC_WHY];
	return !n || fc_text(s, n, (size_t)-1, why) == 0;
}

/* Whether a and b[0..n) are the same words but for ASCII case. */
static int same_word(const char *a, const char *b, size_t n)
{
	return strlen(a) == n && !strncasecmp(a, b, n);
}

/* The field s[0..n) as a spreadsheet means it: a field wholly in double
 * quotes without them, a doubled quote inside as one (in out).  Returns
 * -1 when the quotes do not close on the line (a line end inside a
 * cell, which a decisions file cannot hold). */
static int unquote(const char *s, size_t n, tm_buf *out, const char **r, size_t *rn)
{
	*r = s, *rn = n;
	if (!n || s[0] != '"')
		return 0;
	buf_reset(out);
	size_t i = 1;
	for (; i < n; i++) {
		if (s[i] != '"') {
			buf_putc(out, s[i]);
			continue;
		}
		if (i + 1 < n && s[i + 1] == '"') {
			buf_putc(out, '"');
			i++;
			continue;
		}
		break; /* the closing quote */
	}
	if (i != n - 1 || buf_putc(out, 0))
		return -1;
	*r = out->data, *rn = out->len - 1;
	return 0;
}

/* The column called name, whatever its case and quoting; -1 when none. */
static int column(const tsv_reader *t, const char *name)
{
	tm_buf b = {0};
	int at = -1;
	for (size_t i = 0; i < t->ncol && at < 0; i++) {
		const char *s;
		size_t n;
		if (!unquote(t->names[i], strlen(t->names[i]), &b, &s, &n) && same_word(name, s, n))
			at = (int)i;
	}
	buf_free(&b);
	return at;
}

enum { F_ID, F_DECISION, F_REVIEWER, F_NOTE, F_LABEL, F_N };

int rq_decisions_read(const char *path, const char *reviewer, rq_decisions *ds, FILE *report,
		      long *nbad, tm_buf *err)
{
	static const char *const names[F_N] = {"id", "decision", "reviewer", "note", "label"};
	tsv_reader t;
	tm_buf qb[F_N] = {{0}};
	long bad = 0;
	int r, col[F_N], rc = TM_OK;

	if (tsv_open(&t, path) != 0) {
		tm_fail(err, TM_EFAIL, NULL, t.err.data, NULL);
		tsv_close(&t);
		return TM_EFAIL;
	}
	for (int k = 0; k < F_N; k++)
		col[k] = column(&t, names[k]);
	if (col[F_ID] < 0 || col[F_DECISION] < 0 || (col[F_REVIEWER] < 0 && (!reviewer || !*reviewer))) {
		tm_fail(err, TM_EFAIL, NULL, path, ":1: a decisions file needs the columns id, decision and "
				     "reviewer (or --reviewer), and may have note and label");
		tsv_close(&t);
		return TM_EFAIL;
	}
	while ((r = tsv_next(&t)) == 1) {
		const char *f[F_N];
		size_t fl[F_N];
		char where[600];
		int d = -1, quotes = 0;
		snprintf(where, sizeof where, "%s:%ld", path, t.lr.lineno);
		for (int k = 0; k < F_N; k++) {
			const char *raw = tsv_field(&t, col[k], &fl[k]);
			if (unquote(raw, fl[k], &qb[k], &f[k], &fl[k]))
				quotes = 1;
		}
		const char *id = f[F_ID], *dw = f[F_DECISION], *rv = f[F_REVIEWER], *nt = f[F_NOTE];
		size_t il = fl[F_ID], dl = fl[F_DECISION], rl = fl[F_REVIEWER], nl = fl[F_NOTE];
		for (int k = 0; k < 3; k++)
			if (same_word(rq_decision_words[k], dw, dl))
				d = k;
		if (!rl && reviewer) {
			rv = reviewer;
			rl = strlen(rv);
		}
		const char *why = quotes ? "a quoted field does not close on its line (a line end "
					   "inside a cell?)"
				  : !il ? "no id"
				  : il > RQ_ID_MAX || !rq_plain_text(id, il) ? "that is not an id"
				  : d < 0 ? NULL
				  : !rl ? "no reviewer" : "";
		char w[FC_WHY];
		const char *field = !why || *why ? NULL
				    : fc_name(rv, rl, w) ? "the reviewer"
				    : fc_note(nt, nl, w) ? "the note"
				    : fl[F_LABEL] && fc_label(f[F_LABEL], fl[F_LABEL], w) ? "the label"
											 : NULL;
		if (field) {
			fprintf(report, "titlemill review: %s: %s %s\n", where, field, w);
			bad++;
			continue;
		}
		if (!why) {
			fprintf(report, "titlemill review: %s: the decision is accept, reject or defer, not '%.*s'\n",
				where, (int)(dl > 40 ? 40 : dl), dw);
			bad++;
			continue;
		}
		if (*why) {
			fprintf(report, "titlemill review: %s: %s\n", where, why);
			bad++;
			continue;
		}
		rq_decision *x = rq_decisions_push(ds);
		if (!x || !(x->id = tm_dupn(id, il)) || !(x->reviewer = tm_dupn(rv, rl)) ||
		    (nl && !(x->note = tm_dupn(nt, nl))) || !(x->where = strdup(where)) ||
		    (fl[F_LABEL] && !(x->label = tm_dupn(f[F_LABEL], fl[F_LABEL])))) {
			rc = tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
			goto done;
		}
		x->d = d;
	}
	if (r < 0)
		rc = tm_fail(err, TM_EFAIL, NULL, t.err.data, NULL);
done:
	for (int k = 0; k < F_N; k++)
		buf_free(&qb[k]);
	tsv_close(&t);
	*nbad = bad;
	return rc;
}

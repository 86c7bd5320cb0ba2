/* review_batch.c - a batch of decisions read from a TSV file. */
#include "review/review_batch.h"

#include <stdlib.h>
#include <string.h>

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

int rq_decisions_read(const char *path, const char *reviewer, rq_decisions *ds, FILE *report,
		      long *nbad, tm_buf *err)
{
	tsv_reader t;
	long bad = 0;
	int r;

	if (tsv_open(&t, path) != 0) {
		tm_fail(err, TM_EFAIL, NULL, t.err.data, NULL);
		tsv_close(&t);
		return TM_EFAIL;
	}
	int ci = tsv_col(&t, "id"), cd = tsv_col(&t, "decision"), cr = tsv_col(&t, "reviewer"),
	    cn = tsv_col(&t, "note");
	if (ci < 0 || cd < 0 || (cr < 0 && (!reviewer || !*reviewer))) {
		tm_fail(err, TM_EFAIL, NULL, path, ":1: a decisions file needs the columns id, decision and "
				     "reviewer (or --reviewer), and may have note");
		tsv_close(&t);
		return TM_EFAIL;
	}
	while ((r = tsv_next(&t)) == 1) {
		size_t il, dl, rl, nl;
		const char *id = tsv_field(&t, ci, &il), *dw = tsv_field(&t, cd, &dl);
		const char *rv = tsv_field(&t, cr, &rl), *nt = tsv_field(&t, cn, &nl);
		char where[600];
		int d = -1;
		snprintf(where, sizeof where, "%s:%ld", path, t.lr.lineno);
		for (int k = 0; k < 3; k++)
			if (strlen(rq_decision_words[k]) == dl && !memcmp(rq_decision_words[k], dw, dl))
				d = k;
		if (!rl && reviewer) {
			rv = reviewer;
			rl = strlen(rv);
		}
		const char *why = !il ? "no id"
				  : il > RQ_ID_MAX || !rq_plain_text(id, il) ? "that is not an id"
				  : d < 0 ? NULL
				  : !rl ? "no reviewer" : "";
		char w[FC_WHY];
		const char *field = !why || *why ? NULL
				    : fc_name(rv, rl, w) ? "the reviewer"
				    : fc_note(nt, nl, w) ? "the note" : NULL;
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
		    (nl && !(x->note = tm_dupn(nt, nl))) || !(x->where = strdup(where))) {
			tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
			tsv_close(&t);
			return TM_ENOMEM;
		}
		x->d = d;
	}
	if (r < 0) {
		tm_fail(err, TM_EFAIL, NULL, t.err.data, NULL);
		tsv_close(&t);
		return TM_EFAIL;
	}
	tsv_close(&t);
	*nbad = bad;
	return TM_OK;
}

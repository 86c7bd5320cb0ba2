/* cli_review_change.c - the subcommands of `titlemill review` that
 * change the queue: add, accept, reject, defer, decide, repair. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli/cli.h"
#include "cli/cli_review.h"
#include "io/fieldcheck.h"
#include "io/reader.h"
#include "review/review_batch.h"
#include "review/review_change.h"

/* ---- add ---- */

typedef struct add_arg {
	tm_buf lines;      /* the input: where NUL line NUL, back to back */
	size_t nlines;
	const char *now;
	double factor;
	rq_addstat st;
} add_arg;

static int add_change(rq_queue *q, void *a0, tm_buf *err)
{
	add_arg *a = a0;
	const char *p = a->lines.data;
	tm_buf all = {0};
	size_t bad = 0;
	memset(&a->st, 0, sizeof a->st);
	/* all or nothing, and every bad line named at once */
	for (size_t i = 0; i < a->nlines; i++) {
		const char *where = p;
		const char *line = where + strlen(where) + 1;
		size_t n = strlen(line);
		if (rq_add(q, line, n, where, a->now, a->factor, &a->st, err)) {
			if (bad++)
				buf_puts(&all, "\ntitlemill review: ");
			buf_append(&all, err->data, err->len);
		}
		p = line + n + 1;
	}
	if (bad) {
		buf_reset(err);
		buf_append(err, all.data, all.len);
		if (bad > 1) {
			char m[80];
			snprintf(m, sizeof m, "\ntitlemill review: %zu bad suggestions", bad);
			buf_puts(err, m);
		}
	}
	buf_free(&all);
	return bad ? -1 : 0;
}

/* Reads every input line first: a store transaction may run twice, and
 * standard input can be read only once. */
static int read_input(int nfiles, char **files, add_arg *a)
{
	static char *stdin_only[] = {"-"};
	if (!nfiles) {
		nfiles = 1;
		files = stdin_only;
	}
	for (int f = 0; f < nfiles; f++) {
		line_reader lr;
		const char *s;
		size_t n;
		int rc;
		if (lr_open(&lr, files[f]) != 0) {
			fprintf(stderr, "titlemill review: %s: %s\n", files[f], strerror(errno));
			return -1;
		}
		while ((rc = lr_next(&lr, &s, &n)) == 1) {
			char where[600];
			if (lr.cut || memchr(s, 0, n)) {
				fprintf(stderr, "titlemill review: %s:%ld: %s; nothing changed\n", lr.name,
					lr.lineno, lr.cut ? "line too long for a suggestion" : "NUL byte in a suggestion");
				lr_close(&lr);
				return -1;
			}
			size_t k = 0;
			while (k < n && (s[k] == ' ' || s[k] == '\t'))
				k++;
			if (k == n)
				continue;
			snprintf(where, sizeof where, "%s:%ld", lr.name, lr.lineno);
			if (buf_append(&a->lines, where, strlen(where) + 1) || buf_append(&a->lines, s, n) ||
			    buf_putc(&a->lines, 0)) {
				lr_close(&lr);
				return rv_fail("out of memory"), -1;
			}
			a->nlines++;
		}
		if (rc < 0) {
			fprintf(stderr, "titlemill review: %s: %s\n", lr.name, lr_strerror(&lr));
			lr_close(&lr);
			return -1;
		}
		lr_close(&lr);
	}
	return 0;
}

int rv_add(const review_opts *o, rq_place *pl, int nfiles, char **files, const char *now)
{
	add_arg a = {0};
	tm_buf err = {0};
	int rc = EXIT_RUNTIME;

	a.now = now;
	a.factor = o->reopen_factor;
	if (read_input(nfiles, files, &a))
		goto done;
	if (rq_transact(pl, add_change, &a, &err)) {
		fprintf(stderr, "titlemill review: %s; nothing changed\n", err.data);
		goto done;
	}
	fprintf(stderr,
		"review add: %zu suggestions: %zu new, %zu with new evidence, %zu unchanged, "
		"%zu reopened, %zu rejected before and kept closed, %zu accepted before\n",
		a.nlines, a.st.added, a.st.refreshed, a.st.unchanged, a.st.reopened, a.st.kept_closed,
		a.st.accepted_before);
	if (a.st.unknown_status)
		fprintf(stderr, "review add: %zu left alone: their status is unknown to this version\n",
			a.st.unknown_status);
	rc = EXIT_OK;
done:
	buf_free(&a.lines);
	buf_free(&err);
	return rc;
}

/* ---- decisions ---- */

typedef struct decide_arg {
	rq_decisions ds;
	const char *now;
	int overrule;
	tm_buf notes;     /* "already so" lines, printed after the change */
	size_t applied;
} decide_arg;

static int decide_change(rq_queue *q, void *a0, tm_buf *err)
{
	decide_arg *a = a0;
	tm_buf m = {0};
	int refused = 0;

	buf_reset(&a->notes);
	buf_reset(err);
	a->applied = 0;
	for (size_t i = 0; i < a->ds.n; i++) {
		rq_decision *d = &a->ds.v[i];
		int many;
		rq_item *it = rq_find(q, d->id, strlen(d->id), &many);
		if (!it) {
			if (refused++)
				buf_puts(err, "\n  ");
			if (d->where) {
				buf_puts(err, d->where);
				buf_puts(err, ": ");
			}
			buf_puts(err, many ? "more than one suggestion starts with " : "no suggestion ");
			buf_puts(err, d->id);
			buf_puts(err, many ? "" : " in the queue");
			continue;
		}
		int r;
		if (rq_decide(it, d->d, d->reviewer, d->note, a->now, a->overrule, &r, &m)) {
			buf_free(&m);
			return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
		}
		if (r == RD_CONFLICT) {
			if (refused++)
				buf_puts(err, "\n  ");
			if (d->where) {
				buf_puts(err, d->where);
				buf_puts(err, ": ");
			}
			buf_append(err, m.data, m.len);
		} else if (r == RD_SAME) {
			buf_puts(&a->notes, "titlemill review: ");
			buf_append(&a->notes, m.data, m.len);
			buf_puts(&a->notes, "; left as it is\n");
		} else
			a->applied++;
	}
	buf_free(&m);
	if (refused) {
		tm_buf all = {0};
		buf_puts(&all, refused > 1 ? "refused:\n  " : "refused: ");
		buf_append(&all, err->data, err->len);
		buf_reset(err);
		buf_append(err, all.data, all.len);
		buf_free(&all);
		return -1;
	}
	return 0;
}

static int run_decisions(rq_place *pl, decide_arg *a)
{
	tm_buf err = {0};
	int rc = EXIT_OK;
	if (rq_transact(pl, decide_change, a, &err)) {
		fprintf(stderr, "titlemill review: %s\nNothing changed.\n", err.data);
		rc = EXIT_RUNTIME;
	} else {
		fputs(a->notes.data ? a->notes.data : "", stderr);
		fprintf(stderr, "review: %zu decision%s recorded\n", a->applied,
			a->applied == 1 ? "" : "s");
	}
	buf_free(&err);
	return rc;
}

static void free_decisions(decide_arg *a)
{
	rq_decisions_free(&a->ds);
	buf_free(&a->notes);
}

static int check_reviewer(const char *r)
{
	if (!r || !*r) {
		fputs("titlemill review: who decides? Give --reviewer NAME (or set TITLEMILL_REVIEWER)\n",
		      stderr);
		return -1;
	}
	char why[FC_WHY];
	if (fc_name(r, strlen(r), why)) {
		fprintf(stderr, "titlemill review: the reviewer's name %s\n", why);
		return -1;
	}
	return 0;
}

int rv_decide_ids(const review_opts *o, rq_place *pl, int d, int n, char **ids,
			  const char *now)
{
	decide_arg a = {0};
	int rc;
	if (!n)
		return rv_usage_error("name the suggestions: their ids (or unique prefixes of 6 or more)", NULL);
	if (check_reviewer(o->reviewer))
		return EXIT_USAGE;
	char why[FC_WHY];
	if (o->note && fc_note(o->note, strlen(o->note), why))
		return rv_usage_error("the note ", why);
	a.now = now;
	a.overrule = o->overrule;
	for (int i = 0; i < n; i++) {
		rq_decision *x = rq_decisions_push(&a.ds);
		if (!x || !(x->id = strdup(ids[i])) || !(x->reviewer = strdup(o->reviewer)) ||
		    (o->note && !(x->note = strdup(o->note)))) {
			free_decisions(&a);
			return rv_fail("out of memory");
		}
		x->d = d;
	}
	rc = run_decisions(pl, &a);
	free_decisions(&a);
	return rc;
}

/* A batch from a TSV file: every line is checked before anything
 * changes. */
int rv_decide_file(const review_opts *o, rq_place *pl, const char *path, const char *now)
{
	decide_arg a = {0};
	tm_buf err = {0};
	int rc = EXIT_RUNTIME;

	a.now = now;
	a.overrule = o->overrule;
	long bad;
	if (rq_decisions_read(path, o->reviewer, &a.ds, stderr, &bad, &err))
		fprintf(stderr, "titlemill review: %s\n", err.data);
	else if (bad)
		fprintf(stderr, "titlemill review: %s: %ld bad line%s; nothing changed\n", path, bad,
			bad == 1 ? "" : "s");
	else
		rc = run_decisions(pl, &a);
	free_decisions(&a);
	buf_free(&err);
	return rc;
}

/* ---- repair ---- */

int rv_repair(rq_place *pl)
{
	tm_buf err = {0}, rejected = {0};
	size_t moved;
	int rc = EXIT_OK;

	if (rq_repair(pl, &rejected, &moved, &err)) {
		fprintf(stderr, "titlemill review: %s; nothing changed\n", err.data);
		rc = EXIT_RUNTIME;
	} else if (moved)
		fprintf(stderr, "review repair: %zu unreadable line%s moved to %s\n", moved,
			moved == 1 ? "" : "s", rejected.data);
	else
		fprintf(stderr, "review repair: every line of %s can be read; nothing to do\n",
			pl->path);
	buf_free(&err);
	buf_free(&rejected);
	return rc;
}

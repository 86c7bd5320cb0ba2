/* cli_review_change.c - the subcommands of `titlemill review` that
 * change the queue: add, accept, reject, defer, reopen, decide, undo,
 * repair. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <unistd.h>

#include "cli/cli.h"
#include "cli/cli_review.h"
#include "io/fieldcheck.h"
#include "io/reader.h"
#include "norm/setup.h"
#include "rank/labels.h"
#include "review/review_batch.h"
#include "review/review_change.h"
#include "review/review_clash.h"
#include "review/review_json.h"
#include "review/review_trend.h"

/* ---- add ---- */

typedef struct add_arg {
	tm_buf lines;      /* the input: where NUL line NUL, back to back */
	size_t nlines;
	const char *now;
	rq_reopen reopen;
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
		if (rq_add_by(q, line, n, where, a->now, &a->reopen, &a->st, err)) {
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
		/* JSON Lines, or the TSV of trend --tsv: its first line, which
		 * is no JSON object, names the columns */
		int format = 0; /* 0 not known yet, 1 JSON Lines, 2 trend's TSV */
		rq_trend_tsv head;
		tm_buf err = {0};
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
			if (!format && s[k] != '{') {
				format = 2;
				if (rq_trend_tsv_head(&head, s, n, where, &err)) {
					fprintf(stderr, "titlemill review: %s; nothing changed\n", err.data);
					buf_free(&err);
					lr_close(&lr);
					return -1;
				}
				continue;
			}
			format = format ? format : 1;
			if (buf_append(&a->lines, where, strlen(where) + 1)) {
				lr_close(&lr);
				return rv_fail("out of memory"), -1;
			}
			int r = format == 1 ? buf_append(&a->lines, s, n)
					    : rq_trend_tsv_row(&head, s, n, &a->lines, where, &err);
			if (r == TM_EINPUT) {
				fprintf(stderr, "titlemill review: %s; nothing changed\n", err.data);
				buf_free(&err);
				lr_close(&lr);
				return -1;
			}
			if (r || buf_putc(&a->lines, 0)) {
				buf_free(&err);
				lr_close(&lr);
				return rv_fail("out of memory"), -1;
			}
			a->nlines++;
		}
		buf_free(&err);
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
	a.reopen.factor = o->reopen_factor;
	a.reopen.precision_margin = o->reopen_precision;
	if (read_input(nfiles, files, &a))
		goto done;
	if (rq_transact(pl, add_change, &a, &err)) {
		fprintf(stderr, "titlemill review: %s; nothing changed\n", err.data);
		goto done;
	}
	size_t none = a.st.rising_labels + a.st.falling_titles;
	fprintf(stderr,
		"titlemill review: add: %zu suggestions: %zu new, %zu with new evidence, %zu unchanged, "
		"%zu reopened, %zu rejected before and kept closed, %zu accepted before\n",
		a.nlines - none, a.st.added, a.st.refreshed, a.st.unchanged, a.st.reopened,
		a.st.kept_closed, a.st.accepted_before);
	if (none)
		fprintf(stderr, "titlemill review: add: note: %zu row%s of trend %s no queue item%s: "
				"%zu rising title%s that %s a label already, %zu falling title%s that "
				"%s no label\n", none, none == 1 ? "" : "s", none == 1 ? "is" : "are",
			none == 1 ? "" : "s", a.st.rising_labels, a.st.rising_labels == 1 ? "" : "s",
			a.st.rising_labels == 1 ? "is" : "are", a.st.falling_titles,
			a.st.falling_titles == 1 ? "" : "s", a.st.falling_titles == 1 ? "is" : "are");
	if (a.st.noise)
		fprintf(stderr, "titlemill review: add: %zu of those kept closed were rejected as noise "
				"(for good)\n", a.st.noise);
	if (a.st.unknown_status)
		fprintf(stderr, "titlemill review: add: %zu left alone: their status is unknown to this "
				"version\n", a.st.unknown_status);
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
	int overrule, noise;
	int batched;      /* a batch of decide: numbered, for undo */
	uint64_t batch;   /* the number it got */
	const labelset *ls; /* the taxonomy accepted labels must not clash with, or NULL */
	tm_buf notes;     /* "already so" lines and clashes overruled, printed after the change */
	size_t applied;
} decide_arg;

/* Appends "where: " (when there is one) to a refusal, a line each. */
static void refusal(tm_buf *err, int *refused, const char *where)
{
	if ((*refused)++)
		buf_puts(err, "\n  ");
	if (where) {
		buf_puts(err, where);
		buf_puts(err, ": ");
	}
}

/* Files the outcome r (RD_*) of a change with its message m: a conflict
 * among the refusals, "already so" among the notes.  1 when applied. */
static int outcome(int r, const tm_buf *m, tm_buf *err, int *refused, const char *where,
		   tm_buf *notes)
{
	if (r == RD_CONFLICT) {
		refusal(err, refused, where);
		buf_append(err, m->data, m->len);
	} else if (r == RD_SAME) {
		buf_puts(notes, "titlemill review: ");
		buf_append(notes, m->data, m->len);
		buf_puts(notes, "; left as it is\n");
	}
	return r == RD_APPLIED;
}

/* Puts "refused:" before the refusals in err; returns -1. */
static int refused_all(tm_buf *err, int refused)
{
	tm_buf all = {0};
	buf_puts(&all, refused > 1 ? "refused:\n  " : "refused: ");
	buf_append(&all, err->data, err->len);
	buf_reset(err);
	buf_append(err, all.data, all.len);
	buf_free(&all);
	return -1;
}

/* Whether the sheet's label names it: its label, or the label as postings
 * write it, whatever the ASCII case. */
static int label_fits(const rq_item *it, const char *want)
{
	if (!strcasecmp(want, it->label))
		return 1;
	const char *ev = rq_item_evidence(it);
	char jerr[64];
	size_t n;
	jr_doc *d = ev ? jr_parse(ev, strlen(ev), jerr, sizeof jerr) : NULL;
	const char *w = jr_vstr(jr_get(jr_root(d), "label_as_written"), &n);
	int fits = w && strlen(want) == n && !strncasecmp(want, w, n);
	jr_free(d);
	return fits;
}

static int decide_change(rq_queue *q, void *a0, tm_buf *err)
{
	decide_arg *a = a0;
	tm_buf m = {0};
	int refused = 0;
	rq_clashes *clashes = rq_clashes_new(a->ls, q);
	rq_how how = {a->overrule, a->noise, a->batched ? rq_next_batch(q) : 0};

	buf_reset(&a->notes);
	buf_reset(err);
	a->applied = 0;
	a->batch = how.batch;
	if (!clashes)
		return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
	for (size_t i = 0; i < a->ds.n; i++) {
		rq_decision *d = &a->ds.v[i];
		int many, clash = 0;
		rq_item *it = rq_find(q, d->id, strlen(d->id), &many);
		if (!it) {
			refusal(err, &refused, d->where);
			buf_puts(err, many ? "more than one suggestion starts with " : "no suggestion ");
			buf_puts(err, d->id);
			buf_puts(err, many ? "" : " in the queue");
			continue;
		}
		if (d->label && !label_fits(it, d->label)) {
			refusal(err, &refused, d->where);
			buf_puts(err, "the label does not match suggestion ");
			buf_puts(err, it->id);
			buf_puts(err, " ('");
			buf_puts(err, it->label);
			buf_puts(err, "'): is the sheet sorted differently from the queue?");
			continue;
		}
		if (d->d == 0 && it->status != RQ_ACCEPTED &&
		    rq_clash_find(clashes, it, &clash, &m)) {
			rq_clashes_free(clashes);
			buf_free(&m);
			return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
		}
		if (clash && !a->overrule) {
			refusal(err, &refused, d->where);
			buf_puts(err, it->id);
			buf_puts(err, ": ");
			buf_append(err, m.data, m.len);
			buf_puts(err, "; not accepted (--overrule accepts it all the same)");
			continue;
		}
		if (clash) {
			buf_puts(&a->notes, "titlemill review: warning: ");
			buf_puts(&a->notes, it->id);
			buf_puts(&a->notes, ": ");
			buf_append(&a->notes, m.data, m.len);
			buf_puts(&a->notes, "; accepted all the same (--overrule)\n");
		}
		int r;
		if (rq_decide_how(it, d->d, d->reviewer, d->note, a->now, &how, &r, &m) ||
		    (r == RD_APPLIED && d->d == 0 && rq_clash_note(clashes, it))) {
			rq_clashes_free(clashes);
			buf_free(&m);
			return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
		}
		a->applied += outcome(r, &m, err, &refused, d->where, &a->notes);
	}
	rq_clashes_free(clashes);
	buf_free(&m);
	return refused ? refused_all(err, refused) : 0;
}

static int run_decisions(rq_place *pl, decide_arg *a)
{
	tm_buf err = {0};
	int rc = EXIT_OK;
	if (rq_transact(pl, decide_change, a, &err)) {
		fprintf(stderr, "titlemill review: %s\ntitlemill review: nothing changed\n", err.data);
		rc = EXIT_RUNTIME;
	} else {
		fputs(a->notes.data ? a->notes.data : "", stderr);
		if (a->batched && a->applied)
			fprintf(stderr, "titlemill review: %zu decision%s recorded as batch %llu "
					"(titlemill review undo --batch %llu takes %s back)\n",
				a->applied, a->applied == 1 ? "" : "s", (unsigned long long)a->batch,
				(unsigned long long)a->batch, a->applied == 1 ? "it" : "them");
		else
			fprintf(stderr, "titlemill review: %zu decision%s recorded\n", a->applied,
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

int rv_labels(const review_opts *o, labelset *ls)
{
	setup_opts so;
	tm_buf err = {0};
	memset(ls, 0, sizeof *ls);
	if (!o->labels)
		return 0;
	memset(&so, 0, sizeof so);
	lexicon *lx = setup_lexicon(&so, &err);
	normaliser *nm = lx ? norm_new(lx) : NULL;
	int rc = nm && labels_read(ls, o->labels, nm, NULL, &err) == 0 ? 0 : -1;
	if (rc)
		fprintf(stderr, "titlemill review: %.*s\n", (int)err.len,
			err.data ? err.data : "out of memory");
	norm_free(nm);
	lex_free(lx);
	buf_free(&err);
	return rc;
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

/* The reviewer and note of o, checked: 0, or EXIT_USAGE after saying why. */
static int check_who(const review_opts *o)
{
	char why[FC_WHY];
	if (check_reviewer(o->reviewer))
		return EXIT_USAGE;
	if (o->note && fc_note(o->note, strlen(o->note), why))
		return rv_usage_error("the note ", why);
	return 0;
}

int rv_decide_ids(const review_opts *o, rq_place *pl, int d, int n, char **ids,
			  const char *now)
{
	decide_arg a = {0};
	int rc;
	if (!n)
		return rv_usage_error("name the suggestions: their ids (or unique prefixes of 6 or more)", NULL);
	if ((rc = check_who(o)) != 0)
		return rc;
	a.now = now;
	a.overrule = o->overrule;
	a.noise = o->noise;
	labelset ls;
	if (rv_labels(o, &ls))
		return EXIT_RUNTIME;
	a.ls = o->labels ? &ls : NULL;
	for (int i = 0; i < n; i++) {
		rq_decision *x = rq_decisions_push(&a.ds);
		if (!x || !(x->id = strdup(ids[i])) || !(x->reviewer = strdup(o->reviewer)) ||
		    (o->note && !(x->note = strdup(o->note)))) {
			free_decisions(&a);
			labels_free(&ls);
			return rv_fail("out of memory");
		}
		x->d = d;
	}
	rc = run_decisions(pl, &a);
	free_decisions(&a);
	labels_free(&ls);
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
	a.batched = 1;
	labelset ls;
	if (rv_labels(o, &ls))
		return EXIT_RUNTIME;
	a.ls = o->labels ? &ls : NULL;
	long bad;
	if (rq_decisions_read(path, o->reviewer, &a.ds, stderr, &bad, &err))
		fprintf(stderr, "titlemill review: %s\n", err.data);
	else if (bad)
		fprintf(stderr, "titlemill review: %s: %ld bad line%s; nothing changed\n", path, bad,
			bad == 1 ? "" : "s");
	else
		rc = run_decisions(pl, &a);
	free_decisions(&a);
	labels_free(&ls);
	buf_free(&err);
	return rc;
}

/* ---- reopen, undo ---- */

typedef struct reopen_arg {
	int n;
	char **ids;
	const char *reviewer, *note, *now;
	uint64_t batch;   /* undo */
	size_t done;
	tm_buf notes;
} reopen_arg;

static int reopen_change(rq_queue *q, void *a0, tm_buf *err)
{
	reopen_arg *a = a0;
	tm_buf m = {0};
	int refused = 0;
	buf_reset(err);
	buf_reset(&a->notes);
	a->done = 0;
	for (int i = 0; i < a->n; i++) {
		int many, r;
		rq_item *it = rq_find(q, a->ids[i], strlen(a->ids[i]), &many);
		if (!it) {
			refusal(err, &refused, NULL);
			buf_puts(err, many ? "more than one suggestion starts with " : "no suggestion ");
			buf_puts(err, a->ids[i]);
			buf_puts(err, many ? "" : " in the queue");
			continue;
		}
		if (rq_reopen_item(it, a->reviewer, a->note, a->now, &r, &m)) {
			buf_free(&m);
			return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
		}
		a->done += outcome(r, &m, err, &refused, NULL, &a->notes);
	}
	buf_free(&m);
	return refused ? refused_all(err, refused) : 0;
}

int rv_reopen(const review_opts *o, rq_place *pl, int n, char **ids, const char *now)
{
	reopen_arg a = {n, ids, o->reviewer, o->note, now, 0, 0, {0}};
	tm_buf err = {0};
	int rc = EXIT_OK;
	if (!n)
		return rv_usage_error("name the suggestions: their ids (or unique prefixes of 6 or more)", NULL);
	if ((rc = check_who(o)) != 0)
		return rc;
	if (rq_transact(pl, reopen_change, &a, &err)) {
		fprintf(stderr, "titlemill review: %s\ntitlemill review: nothing changed\n", err.data);
		rc = EXIT_RUNTIME;
	} else {
		fputs(a.notes.data ? a.notes.data : "", stderr);
		fprintf(stderr, "titlemill review: %zu suggestion%s reopened\n", a.done,
			a.done == 1 ? "" : "s");
	}
	buf_free(&a.notes);
	buf_free(&err);
	return rc;
}

static int undo_change(rq_queue *q, void *a0, tm_buf *err)
{
	reopen_arg *a = a0;
	return rq_undo(q, a->batch, a->reviewer, a->note, a->now, &a->done, err) ? -1 : 0;
}

int rv_undo(const review_opts *o, rq_place *pl, const char *now)
{
	reopen_arg a = {0, NULL, o->reviewer, o->note, now, o->batch, 0, {0}};
	tm_buf err = {0};
	int rc;
	if ((rc = check_who(o)) != 0)
		return rc;
	if (rq_transact(pl, undo_change, &a, &err)) {
		fprintf(stderr, "titlemill review: %s\ntitlemill review: nothing changed\n", err.data);
		rc = EXIT_RUNTIME;
	} else
		fprintf(stderr, "titlemill review: batch %llu undone: %zu decision%s taken back\n",
			(unsigned long long)o->batch, a.done, a.done == 1 ? "" : "s");
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
		fprintf(stderr, "titlemill review: repair: %zu unreadable line%s moved to %s\n", moved,
			moved == 1 ? "" : "s", rejected.data);
	else
		fprintf(stderr, "titlemill review: repair: every line of %s can be read; nothing to do\n",
			pl->path);
	buf_free(&err);
	buf_free(&rejected);
	return rc;
}

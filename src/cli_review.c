/* cli_review.c - titlemill review: the curators' queue of suggestions.
 *
 * Subcommands: add, list, show, accept, reject, defer, decide (a batch
 * TSV), export (the accepted ones as a label delta), stats, repair (the
 * unreadable lines of a queue file moved aside).  The queue is
 * a JSON Lines file (--queue, default titlemill-queue.jsonl) or a store
 * (--store URL).  The curators decide; this command only records. */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli.h"
#include "delta.h"
#include "fieldcheck.h"
#include "jsonr.h"
#include "outfile.h"
#include "reader.h"
#include "review.h"
#include "queue.h"
#include "store.h"

static const char review_usage[] =
	"usage: titlemill review SUBCOMMAND [OPTIONS]\n"
	"\n"
	"The curators' queue of suggestions from 'titlemill propose'.\n"
	"\n"
	"  add [FILE...]              take propose output (JSON Lines) into the queue\n"
	"  list                       the suggestions, strongest first (TSV, or --json)\n"
	"  show ID                    one suggestion with its evidence and history\n"
	"  accept|reject|defer ID...  record a decision (--reviewer, --note)\n"
	"  decide FILE                a batch of decisions: TSV with id, decision,\n"
	"                             reviewer, note; all or nothing\n"
	"  export                     the accepted suggestions as a label delta\n"
	"  stats                      counts per status, kind and language\n"
	"  repair                     move the queue file's unreadable lines to\n"
	"                             FILE.rejected (appended) and rewrite the queue\n"
	"\n"
	"where the queue lives:\n"
	"  --queue FILE       a queue file (default $TITLEMILL_QUEUE, else\n"
	"                     titlemill-queue.jsonl); FILE.lock beside it is the lock\n"
	"  --store URL        a Redis store instead (as for tally), --prefix P\n"
	"add:\n"
	"  --reopen-factor F  a rejected suggestion reopens when its postings reach\n"
	"                     F times those at the rejection (default 3)\n"
	"list:\n"
	"  --status S         open (default), accepted, rejected, deferred or all\n"
	"  --kind K --occupation ID --lang L   filters\n"
	"  --sort S           score (default), postings or added\n"
	"  --limit N          at most N lines\n"
	"  --json             the queue's own JSON lines\n"
	"accept, reject, defer, decide:\n"
	"  --reviewer NAME    who decides (default $TITLEMILL_REVIEWER); required\n"
	"  --note TEXT        why (accept, reject, defer)\n"
	"  --overrule         change a decision that was already taken\n"
	"export:\n"
	"  --format F         tsv (default), turtle or ntriples\n"
	"  --since TIME       only decisions at or after TIME (ISO 8601 UTC)\n"
	"  --base IRI         prefix for occupation ids that are not IRIs (SKOS)\n"
	"  --case C           written (default: the label as postings write it, when\n"
	"                     propose found it so) or clean (the lowercase clean title)\n"
	"  -o FILE            write FILE instead of standard output (a file is\n"
	"                     replaced atomically, a device or FIFO written into)\n"
	"\n"
	"Times are UTC; TITLEMILL_NOW pins the clock (for tests and replays).\n"
	"Exit status: 0 done, 1 refused or failed (nothing changed), 2 usage.\n";

typedef struct review_opts {
	const char *queue, *store, *prefix;
	const char *reviewer, *note;
	int overrule, json;
	int status;              /* -1 all */
	int kind;                /* -1 any */
	const char *occ, *lang, *sort;
	long limit;
	double reopen_factor;
	int format;              /* 0 tsv, 1 turtle, 2 ntriples */
	const char *since, *base, *out;
	int clean_case;          /* export the clean (lowercase) label */
} review_opts;

enum { O_QUEUE = 256, O_STORE, O_PREFIX, O_REVIEWER, O_NOTE, O_OVERRULE, O_JSON, O_STATUS,
       O_KIND, O_OCC, O_LANG, O_SORT, O_LIMIT, O_REOPEN, O_FORMAT, O_SINCE, O_BASE, O_CASE };

static const struct option longopts[] = {
	{"queue", required_argument, NULL, O_QUEUE},
	{"store", required_argument, NULL, O_STORE},
	{"prefix", required_argument, NULL, O_PREFIX},
	{"reviewer", required_argument, NULL, O_REVIEWER},
	{"note", required_argument, NULL, O_NOTE},
	{"overrule", no_argument, NULL, O_OVERRULE},
	{"json", no_argument, NULL, O_JSON},
	{"status", required_argument, NULL, O_STATUS},
	{"kind", required_argument, NULL, O_KIND},
	{"occupation", required_argument, NULL, O_OCC},
	{"lang", required_argument, NULL, O_LANG},
	{"sort", required_argument, NULL, O_SORT},
	{"limit", required_argument, NULL, O_LIMIT},
	{"reopen-factor", required_argument, NULL, O_REOPEN},
	{"format", required_argument, NULL, O_FORMAT},
	{"since", required_argument, NULL, O_SINCE},
	{"base", required_argument, NULL, O_BASE},
	{"case", required_argument, NULL, O_CASE},
	{"output", required_argument, NULL, 'o'},
	{"help", no_argument, NULL, 'h'},
	{NULL, 0, NULL, 0}};

static int usage_error(const char *what, const char *detail)
{
	fprintf(stderr, "titlemill review: %s%s\nRun 'titlemill review --help' for the options.\n",
		what, detail ? detail : "");
	return EXIT_USAGE;
}

/* A name from a list, or -1. */
static int pick(const char *const *names, int n, const char *s)
{
	for (int i = 0; i < n; i++)
		if (!strcmp(names[i], s))
			return i;
	return -1;
}

/* Which options each subcommand takes. */
static const char *allowed(const char *sub)
{
	static const struct {
		const char *sub;
		int opts[12];
	} t[] = {
		{"add", {O_REOPEN}},
		{"list", {O_STATUS, O_KIND, O_OCC, O_LANG, O_SORT, O_LIMIT, O_JSON}},
		{"show", {O_JSON}},
		{"accept", {O_REVIEWER, O_NOTE, O_OVERRULE}},
		{"reject", {O_REVIEWER, O_NOTE, O_OVERRULE}},
		{"defer", {O_REVIEWER, O_NOTE, O_OVERRULE}},
		{"decide", {O_REVIEWER, O_OVERRULE}},
		{"export", {O_FORMAT, O_SINCE, O_BASE, O_CASE, 'o'}},
		{"stats", {0}},
		{"repair", {0}},
	};
	static char set[16];
	for (size_t i = 0; i < sizeof t / sizeof *t; i++)
		if (!strcmp(t[i].sub, sub)) {
			size_t k = 0;
			for (; k < 12 && t[i].opts[k]; k++)
				set[k] = (char)(t[i].opts[k] == 'o' ? 'o' : t[i].opts[k] - O_QUEUE + 'A');
			set[k] = 0;
			return set;
		}
	return NULL;
}

static int parse_opts(int argc, char **argv, const char *sub, review_opts *o)
{
	const char *ok = allowed(sub);
	int ch, oi;
	char *e;

	memset(o, 0, sizeof *o);
	o->status = RQ_OPEN;
	o->kind = -1;
	o->reopen_factor = 3;
	o->limit = -1;
	o->sort = "score";
	o->reviewer = getenv("TITLEMILL_REVIEWER");
	o->queue = getenv("TITLEMILL_QUEUE");
	if (!o->queue || !*o->queue)
		o->queue = "titlemill-queue.jsonl";
	optind = 1;
	opterr = 0;
	while ((ch = getopt_long(argc, argv, ":ho:", longopts, &oi)) != -1) {
		if (ch == 'h') {
			fputs(review_usage, stdout);
			return 1;
		}
		if (ch == '?' || ch == ':') {
			char opt[64];
			snprintf(opt, sizeof opt, "%s", argv[optind - 1]);
			return usage_error(ch == ':' ? "this option wants a value: " : "unknown option: ",
					   opt);
		}
		if (ch >= O_REVIEWER || ch == 'o') {
			char c = (char)(ch == 'o' ? 'o' : ch - O_QUEUE + 'A');
			if (!strchr(ok, c)) {
				char m[128];
				snprintf(m, sizeof m, "%s does not apply to 'review %s'", argv[optind - 1], sub);
				return usage_error(m, NULL);
			}
		}
		switch (ch) {
		case O_QUEUE: o->queue = optarg; break;
		case O_STORE: o->store = optarg; break;
		case O_PREFIX:
			if (cli_check_prefix("review", optarg))
				return EXIT_USAGE;
			o->prefix = optarg;
			break;
		case O_REVIEWER: o->reviewer = optarg; break;
		case O_NOTE: o->note = optarg; break;
		case O_OVERRULE: o->overrule = 1; break;
		case O_JSON: o->json = 1; break;
		case O_STATUS:
			if (!strcmp(optarg, "all"))
				o->status = -1;
			else if ((o->status = pick(rq_status_names, RQ_NSTATUS, optarg)) < 0)
				return usage_error("--status is open, accepted, rejected, deferred or all, not ", optarg);
			break;
		case O_KIND:
			if ((o->kind = pick(rq_kind_names, RK_N, optarg)) < 0)
				return usage_error("--kind is new_alt_label, new_hidden_label, rare_label or used_elsewhere, not ", optarg);
			break;
		case O_OCC: o->occ = optarg; break;
		case O_LANG: o->lang = optarg; break;
		case O_SORT:
			if (strcmp(optarg, "score") && strcmp(optarg, "postings") && strcmp(optarg, "added"))
				return usage_error("--sort is score, postings or added, not ", optarg);
			o->sort = optarg;
			break;
		case O_LIMIT:
			errno = 0;
			o->limit = strtol(optarg, &e, 10);
			if (errno || e == optarg || *e || o->limit < 0)
				return usage_error("--limit wants a whole number of 0 or more, not ", optarg);
			break;
		case O_REOPEN:
			errno = 0;
			o->reopen_factor = strtod(optarg, &e);
			if (errno || e == optarg || *e || !isfinite(o->reopen_factor) ||
			    o->reopen_factor < 1)
				return usage_error("--reopen-factor wants a number of 1 or more, not ", optarg);
			break;
		case O_FORMAT:
			if ((o->format = pick((const char *const[]){"tsv", "turtle", "ntriples"}, 3, optarg)) < 0)
				return usage_error("--format is tsv, turtle or ntriples, not ", optarg);
			break;
		case O_SINCE:
			if (rq_time(optarg) < 0)
				return usage_error("--since wants an ISO 8601 UTC time like 2026-12-02T09:30:00Z, not ", optarg);
			o->since = optarg;
			break;
		case O_BASE: o->base = optarg; break;
		case O_CASE:
			if (strcmp(optarg, "written") && strcmp(optarg, "clean"))
				return usage_error("--case is written or clean, not ", optarg);
			o->clean_case = !strcmp(optarg, "clean");
			break;
		case 'o': o->out = optarg; break;
		}
	}
	if (o->prefix && !o->store)
		return usage_error("--prefix goes with --store", NULL);
	return 0;
}

static int open_place(const review_opts *o, rq_place *pl)
{
	tm_buf err = {0};
	store_conf conf = {o->prefix, 2, 5000, 0};
	int rc = rq_place_open(pl, o->queue, o->store, &conf, &err);
	if (rc)
		fprintf(stderr, "titlemill review: %s\n", err.data);
	buf_free(&err);
	return rc;
}

static int fail(const char *m)
{
	fprintf(stderr, "titlemill review: %s\n", m);
	return EXIT_RUNTIME;
}

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
				return fail("out of memory"), -1;
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

static int sub_add(const review_opts *o, rq_place *pl, int nfiles, char **files, const char *now)
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
		int r = rq_decide(it, d->d, d->reviewer, d->note, a->now, a->overrule, &m);
		if (r < 0) {
			buf_free(&m);
			buf_reset(err);
			buf_puts(err, "out of memory");
			return -1;
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

static int sub_decide_ids(const review_opts *o, rq_place *pl, int d, int n, char **ids,
			  const char *now)
{
	decide_arg a = {0};
	int rc;
	if (!n)
		return usage_error("name the suggestions: their ids (or unique prefixes of 6 or more)", NULL);
	if (check_reviewer(o->reviewer))
		return EXIT_USAGE;
	char why[FC_WHY];
	if (o->note && fc_note(o->note, strlen(o->note), why))
		return usage_error("the note ", why);
	a.now = now;
	a.overrule = o->overrule;
	for (int i = 0; i < n; i++) {
		rq_decision *x = rq_decisions_push(&a.ds);
		if (!x || !(x->id = strdup(ids[i])) || !(x->reviewer = strdup(o->reviewer)) ||
		    (o->note && !(x->note = strdup(o->note)))) {
			free_decisions(&a);
			return fail("out of memory");
		}
		x->d = d;
	}
	rc = run_decisions(pl, &a);
	free_decisions(&a);
	return rc;
}

/* A batch from a TSV file: every line is checked before anything
 * changes. */
static int sub_decide_file(const review_opts *o, rq_place *pl, const char *path, const char *now)
{
	decide_arg a = {0};
	tm_buf err = {0};
	int rc = EXIT_RUNTIME;

	a.now = now;
	a.overrule = o->overrule;
	long bad = rq_decisions_read(path, o->reviewer, &a.ds, stderr, &err);
	if (bad < 0)
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

/* ---- reading: list, show, stats, export ---- */

/* The evidence fields list and show print. */
typedef struct evid {
	jr_doc *d;
	uint64_t n, kt;
	double precision, share, lo, hi, g2;
	const char *rival, *variant_of, *label_kind, *as_written;
	const jr_val *v;         /* the evidence object */
	uint64_t rival_postings;
	double rival_share;
} evid;

static void evid_fill(evid *e, const jr_val *v)
{
	size_t l;
	e->n = (uint64_t)jr_vint(jr_get(v, "occupation_postings"));
	e->kt = (uint64_t)jr_vint(jr_get(v, "key_postings"));
	e->precision = jr_vnum(jr_get(v, "precision"));
	e->share = jr_vnum(jr_get(v, "share"));
	e->lo = jr_vnum(jr_get(v, "share_low"));
	e->hi = jr_vnum(jr_get(v, "share_high"));
	e->g2 = jr_vnum(jr_get(v, "g2"));
	e->variant_of = jr_vstr(jr_get(v, "variant_of"), &l);
	e->label_kind = jr_vstr(jr_get(v, "label_kind"), &l);
	e->as_written = jr_vstr(jr_get(v, "label_as_written"), &l);
	const jr_val *c = jr_get(v, "competitor");
	e->rival = jr_vstr(jr_get(c, "occupation"), &l);
	e->rival_postings = (uint64_t)jr_vint(jr_get(c, "postings"));
	e->rival_share = jr_vnum(jr_get(c, "share"));
	e->v = v;
}

/* The evidence of an evidence object's text (NULL: no figures). */
static void evid_read(const char *json, evid *e)
{
	char jerr[64];
	memset(e, 0, sizeof *e);
	if (!json)
		return;
	e->d = jr_parse(json, strlen(json), jerr, sizeof jerr);
	evid_fill(e, jr_root(e->d));
}

/* The latest evidence of an item, read straight from its queue line when
 * it has one (one parse instead of two). */
static void evid_item(const rq_item *it, evid *e)
{
	char jerr[64];
	if (it->evidence || !it->raw) {
		evid_read(rq_item_evidence(it), e);
		return;
	}
	memset(e, 0, sizeof *e);
	e->d = jr_parse(it->raw, it->rawlen, jerr, sizeof jerr);
	evid_fill(e, jr_get(jr_root(e->d), "evidence"));
}

static const rq_item **selected(const rq_queue *q, const review_opts *o, size_t *n)
{
	const rq_item **v = malloc((q->n + 1) * sizeof *v);
	*n = 0;
	if (!v)
		return NULL;
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if ((o->status >= 0 && it->status != o->status) || (o->kind >= 0 && it->kind != o->kind) ||
		    (o->occ && strcmp(o->occ, it->occ)) || (o->lang && strcmp(o->lang, it->lang)))
			continue;
		v[(*n)++] = it;
	}
	return v;
}

static int by_score(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	if (x->score != y->score)
		return x->score > y->score ? -1 : 1;
	return strcmp(x->id, y->id);
}

static int by_postings(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	if (x->postings != y->postings)
		return x->postings > y->postings ? -1 : 1;
	return by_score(a, b);
}

static int by_seq(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	return x->seq < y->seq ? -1 : x->seq > y->seq;
}

static int flush(tm_buf *b, FILE *fp)
{
	if (b->len && fwrite(b->data, 1, b->len, fp) != b->len)
		return -1;
	buf_reset(b);
	return 0;
}

static int finish_stdout(void)
{
	if (fflush(stdout) != 0 || ferror(stdout))
		return fail("cannot write the output"), EXIT_RUNTIME;
	return EXIT_OK;
}

static int sub_list(const review_opts *o, const rq_queue *q)
{
	size_t n;
	const rq_item **v = selected(q, o, &n);
	tm_buf b = {0};
	char num[64];

	if (!v)
		return fail("out of memory");
	qsort(v, n, sizeof *v, !strcmp(o->sort, "added") ? by_seq
			       : !strcmp(o->sort, "postings") ? by_postings : by_score);
	if (o->limit >= 0 && (size_t)o->limit < n)
		n = (size_t)o->limit;
	if (!o->json)
		buf_puts(&b, "id\tstatus\tkind\toccupation\tlang\tlabel\tscore\tpostings\toccupation_postings"
			     "\tprecision\tcompetitor\tvariant_of\tadded\tproposed\tdecided_by\tdecided_at\tnote\n");
	for (size_t i = 0; i < n; i++) {
		const rq_item *it = v[i];
		if (o->json) {
			rq_item_json(it, &b);
		} else {
			const rq_event *dec = rq_last_decision(it);
			const rq_brief *e = &it->brief;
			buf_puts(&b, it->id);
			buf_putc(&b, '\t');
			buf_puts(&b, rq_status_name(it));
			buf_putc(&b, '\t');
			buf_puts(&b, rq_kind_names[it->kind]);
			buf_putc(&b, '\t');
			buf_puts(&b, it->occ);
			buf_putc(&b, '\t');
			buf_puts(&b, it->lang);
			buf_putc(&b, '\t');
			buf_puts(&b, it->label);
			snprintf(num, sizeof num, "\t%.4f\t%llu\t%llu\t%.4f\t", it->score,
				 (unsigned long long)it->postings, (unsigned long long)e->occ_postings,
				 e->precision);
			buf_puts(&b, num);
			if (e->rival) {
				snprintf(num, sizeof num, " (%llu)", (unsigned long long)e->rival_postings);
				buf_puts(&b, e->rival);
				buf_puts(&b, num);
			}
			buf_putc(&b, '\t');
			buf_puts(&b, e->variant_of ? e->variant_of : "");
			buf_putc(&b, '\t');
			buf_puts(&b, it->added);
			buf_putc(&b, '\t');
			buf_puts(&b, it->proposed);
			buf_putc(&b, '\t');
			buf_puts(&b, dec ? dec->reviewer : "");
			buf_putc(&b, '\t');
			buf_puts(&b, dec ? dec->at : "");
			buf_putc(&b, '\t');
			buf_puts(&b, dec && dec->note ? dec->note : "");
			buf_putc(&b, '\n');
		}
		if (b.len > 65536 && flush(&b, stdout))
			break;
	}
	flush(&b, stdout);
	buf_free(&b);
	free(v);
	return finish_stdout();
}

static void show_event(tm_buf *b, const rq_event *e, const rq_item *it, const rq_event *prev_dec)
{
	char line[160];
	snprintf(line, sizeof line, "  %s  %-9s ", e->at, rq_what_names[e->what]);
	buf_puts(b, line);
	if (e->reviewer) {
		buf_puts(b, "by ");
		buf_puts(b, e->reviewer);
		buf_puts(b, ", ");
	}
	snprintf(line, sizeof line, "on %llu postings, score %.4f", (unsigned long long)e->postings,
		 e->score);
	buf_puts(b, line);
	if (e->what == RE_REOPENED && prev_dec && prev_dec->postings) {
		snprintf(line, sizeof line, " (%.1f times the %llu postings at the rejection)",
			 (double)e->postings / (double)prev_dec->postings,
			 (unsigned long long)prev_dec->postings);
		buf_puts(b, line);
	}
	if (e->note) {
		buf_puts(b, ": \"");
		buf_puts(b, e->note);
		buf_putc(b, '"');
	}
	buf_putc(b, '\n');
	(void)it;
}

static void show_evidence(tm_buf *b, const char *title, const char *json)
{
	evid e;
	char line[400];
	evid_read(json, &e);
	const jr_val *v = e.v;
	snprintf(line, sizeof line,
		 "%s%llu postings of %llu (share %.4f, 95 %% interval %.4f-%.4f), "
		 "key postings %llu, precision %.4f, G2 %.4f\n",
		 title, (unsigned long long)jr_vint(jr_get(v, "postings")), (unsigned long long)e.n,
		 e.share, e.lo, e.hi, (unsigned long long)e.kt, e.precision, e.g2);
	buf_puts(b, line);
	if (e.rival) {
		snprintf(line, sizeof line, "              competitor %s: %llu postings (%.4f of the key's)\n",
			 e.rival, (unsigned long long)e.rival_postings, e.rival_share);
		buf_puts(b, line);
	}
	const jr_val *x = jr_get(v, "examples");
	for (size_t i = 0; i < jr_vlen(x); i++) {
		size_t l;
		const char *s = jr_vstr(jr_at(x, i), &l);
		if (!s)
			continue;
		buf_puts(b, "              example: ");
		buf_append(b, s, l);
		buf_putc(b, '\n');
	}
	jr_free(e.d);
}

static int sub_show(const review_opts *o, const rq_queue *q, int n, char **ids)
{
	tm_buf b = {0};
	int rc = EXIT_OK;
	if (!n)
		return usage_error("show wants the id of a suggestion", NULL);
	for (int k = 0; k < n; k++) {
		int many;
		const rq_item *it = rq_find(q, ids[k], strlen(ids[k]), &many);
		if (!it) {
			fprintf(stderr, "titlemill review: %s %s\n",
				many ? "more than one suggestion starts with" : "no suggestion in the queue is",
				ids[k]);
			rc = EXIT_RUNTIME;
			continue;
		}
		if (o->json) {
			rq_item_json(it, &b);
			continue;
		}
		evid e;
		evid_item(it, &e);
		if (k)
			buf_putc(&b, '\n');
		buf_puts(&b, "id            ");
		buf_puts(&b, it->id);
		buf_puts(&b, "\nstatus        ");
		buf_puts(&b, rq_status_name(it));
		buf_puts(&b, "\nkind          ");
		buf_puts(&b, rq_kind_names[it->kind]);
		buf_puts(&b, "\noccupation    ");
		buf_puts(&b, it->occ);
		buf_puts(&b, "\nlang          ");
		buf_puts(&b, it->lang);
		buf_puts(&b, "\nlabel         ");
		buf_puts(&b, it->label);
		size_t wl;
		const char *wr = jr_vstr(jr_get(e.v, "label_as_written"), &wl);
		if (wr) {
			buf_puts(&b, "\nas written    ");
			buf_append(&b, wr, wl);
		}
		if (e.variant_of) {
			buf_puts(&b, "\nvariant of    ");
			buf_puts(&b, e.variant_of);
		}
		if (e.label_kind) {
			buf_puts(&b, "\nlabel kind    ");
			buf_puts(&b, e.label_kind);
		}
		char line[64];
		snprintf(line, sizeof line, "\nscore         %.4f\n", it->score);
		buf_puts(&b, line);
		jr_free(e.d);
		show_evidence(&b, "evidence      ", rq_item_evidence(it));
		buf_puts(&b, "history\n");
		const rq_event *last_dec = NULL;
		for (size_t i = 0; i < it->nev; i++) {
			show_event(&b, &it->ev[i], it, last_dec);
			if (it->ev[i].what == RE_REOPENED && it->ev[i].evidence && last_dec &&
			    last_dec->evidence) {
				show_evidence(&b, "    before:   ", last_dec->evidence);
				show_evidence(&b, "    now:      ", it->ev[i].evidence);
			}
			if (it->ev[i].what >= RE_ACCEPTED)
				last_dec = &it->ev[i];
		}
	}
	flush(&b, stdout);
	buf_free(&b);
	int w = finish_stdout();
	return rc ? rc : w;
}

/* stats: one row per group */
typedef struct srow {
	char by[12], value[80];
	uint64_t items, st[RQ_NSTATUS + 1]; /* the last: statuses unknown here */
	long long oldest; /* added time of the oldest open item, or -1 */
} srow;

/* The index of the row (by, value), added when new; -1 when out of memory. */
static long row_for(srow **v, size_t *n, const char *by, const char *value)
{
	for (size_t i = 0; i < *n; i++)
		if (!strcmp((*v)[i].by, by) && !strcmp((*v)[i].value, value))
			return (long)i;
	srow *p = realloc(*v, (*n + 1) * sizeof *p);
	if (!p)
		return -1;
	*v = p;
	srow *r = &p[*n];
	memset(r, 0, sizeof *r);
	snprintf(r->by, sizeof r->by, "%s", by);
	snprintf(r->value, sizeof r->value, "%s", value);
	r->oldest = -1;
	return (long)(*n)++;
}

static int cmp_row(const void *a, const void *b)
{
	const srow *x = a, *y = b;
	static const char *const order[] = {"all", "kind", "lang", "reviewer"};
	int ox = 0, oy = 0;
	for (int i = 0; i < 4; i++) {
		if (!strcmp(x->by, order[i]))
			ox = i;
		if (!strcmp(y->by, order[i]))
			oy = i;
	}
	if (ox != oy)
		return ox - oy;
	if (ox == 1)
		return pick(rq_kind_names, RK_N, x->value) - pick(rq_kind_names, RK_N, y->value);
	return strcmp(x->value, y->value);
}

static int sub_stats(const rq_queue *q, const char *now)
{
	srow *v = NULL;
	size_t n = 0;
	long long t_now = rq_time(now);
	tm_buf b = {0};

	if (row_for(&v, &n, "all", "*") < 0)
		return fail("out of memory");
	for (int k = 0; k < RK_N; k++)
		if (row_for(&v, &n, "kind", rq_kind_names[k]) < 0)
			return fail("out of memory");
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		const rq_event *dec = rq_last_decision(it);
		/* indices, not pointers: a new row moves the array */
		long rs[4] = {row_for(&v, &n, "all", "*"), row_for(&v, &n, "kind", rq_kind_names[it->kind]),
			      row_for(&v, &n, "lang", it->lang),
			      dec ? row_for(&v, &n, "reviewer", dec->reviewer) : -2};
		for (int k = 0; k < 4; k++) {
			if (rs[k] == -1) {
				free(v);
				return fail("out of memory");
			}
			if (rs[k] < 0)
				continue;
			srow *r = &v[rs[k]];
			r->items++;
			r->st[it->status]++;
			long long t = rq_time(it->added);
			if (it->status == RQ_OPEN && (r->oldest < 0 || t < r->oldest))
				r->oldest = t;
		}
	}
	qsort(v, n, sizeof *v, cmp_row);
	buf_puts(&b, "by\tvalue\titems\topen\taccepted\trejected\tdeferred\tacceptance_rate\toldest_open_days\n");
	for (size_t i = 0; i < n; i++) {
		const srow *r = &v[i];
		char line[400], rate[32] = "", age[32] = "";
		uint64_t decided = r->st[RQ_ACCEPTED] + r->st[RQ_REJECTED];
		if (decided)
			snprintf(rate, sizeof rate, "%.4f", (double)r->st[RQ_ACCEPTED] / (double)decided);
		if (r->oldest >= 0)
			snprintf(age, sizeof age, "%.1f", (double)(t_now - r->oldest) / 86400.0);
		snprintf(line, sizeof line, "%s\t%s\t%llu\t%llu\t%llu\t%llu\t%llu\t%s\t%s\n", r->by,
			 r->value, (unsigned long long)r->items, (unsigned long long)r->st[0],
			 (unsigned long long)r->st[1], (unsigned long long)r->st[2],
			 (unsigned long long)r->st[3], rate, age);
		buf_puts(&b, line);
	}
	flush(&b, stdout);
	buf_free(&b);
	free(v);
	return finish_stdout();
}

/* export */

static int write_out(const char *path, const tm_buf *b)
{
	if (!path) {
		if (b->len && fwrite(b->data, 1, b->len, stdout) != b->len)
			return fail("cannot write the output");
		return finish_stdout();
	}
	of_file f;
	tm_buf err = {0};
	int ok = !of_open(&f, path, OF_DASH, &err) && !of_write(&f, b->data, b->len, &err);
	if (ok && f.warn.len)
		fprintf(stderr, "titlemill review: note: %s", f.warn.data);
	ok = ok && !of_commit(&f, &err);
	if (!ok)
		fprintf(stderr, "titlemill review: %s\n", err.data ? err.data : "cannot write");
	of_abort(&f);
	buf_free(&err);
	return ok ? EXIT_OK : EXIT_RUNTIME;
}

static int sub_export(const review_opts *o, const rq_queue *q)
{
	dl_opts d = {o->format, o->since ? rq_time(o->since) : -1, o->base, o->clean_case};
	tm_buf b = {0}, err = {0};
	int rc = EXIT_OK;

	if (dl_export(q, &d, &b, &err)) {
		/* one message a line */
		for (char *p = err.data, *nl; p; p = nl ? nl + 1 : NULL) {
			nl = strchr(p, '\n');
			fprintf(stderr, "titlemill review: %.*s\n", (int)(nl ? nl - p : (long)strlen(p)), p);
		}
		rc = EXIT_RUNTIME;
	} else
		rc = write_out(o->out, &b);
	buf_free(&b);
	buf_free(&err);
	return rc;
}

/* What reading or writing the queue noticed: one "warning:" line each. */
static void print_notes(const rq_place *pl)
{
	const char *p = pl->warn.data, *end = p + pl->warn.len;
	while (p && p < end) {
		const char *nl = memchr(p, '\n', (size_t)(end - p));
		size_t n = nl ? (size_t)(nl - p) : (size_t)(end - p);
		fprintf(stderr, "titlemill review: warning: %.*s\n", (int)n, p);
		p += n + 1;
	}
}

/* ---- repair ---- */

static int sub_repair(rq_place *pl)
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

int cmd_review(int argc, char **argv)
{
	review_opts o;
	rq_place pl;
	rq_queue q = {0};
	tm_buf err = {0};
	char now[21];
	int rc;

	if (argc < 2 || !strcmp(argv[1], "--help") || !strcmp(argv[1], "-h")) {
		fputs(review_usage, argc < 2 ? stderr : stdout);
		return argc < 2 ? EXIT_USAGE : EXIT_OK;
	}
	const char *sub = argv[1];
	if (!allowed(sub))
		return usage_error("unknown subcommand: ", sub);
	if ((rc = parse_opts(argc - 1, argv + 1, sub, &o)) != 0)
		return rc == 1 ? EXIT_OK : rc;
	int nargs = argc - 1 - optind;
	char **args = argv + 1 + optind;
	if (rq_now(now, &err)) {
		fprintf(stderr, "titlemill review: %s\n", err.data);
		buf_free(&err);
		return EXIT_USAGE;
	}
	if (!strcmp(sub, "decide") && nargs != 1)
		return usage_error("decide wants one decisions file (TSV: id, decision, reviewer, note)", NULL);
	if ((!strcmp(sub, "list") || !strcmp(sub, "stats") || !strcmp(sub, "export") ||
	     !strcmp(sub, "repair")) && nargs)
		return usage_error("unexpected argument: ", args[0]);
	if (open_place(&o, &pl))
		return EXIT_RUNTIME;

	if (!strcmp(sub, "add"))
		rc = sub_add(&o, &pl, nargs, args, now);
	else if (!strcmp(sub, "repair"))
		rc = sub_repair(&pl);
	else if (!strcmp(sub, "accept") || !strcmp(sub, "reject") || !strcmp(sub, "defer"))
		rc = sub_decide_ids(&o, &pl, pick(rq_decision_words, 3, sub), nargs, args, now);
	else if (!strcmp(sub, "decide"))
		rc = sub_decide_file(&o, &pl, args[0], now);
	else if (rq_read(&pl, &q, 0, &err)) {
		fprintf(stderr, "titlemill review: %s\n", err.data);
		rc = EXIT_RUNTIME;
	} else if (!strcmp(sub, "export") && q.nbad) {
		fprintf(stderr, "titlemill review: no export while lines of the queue cannot be read: "
				"a delta must not miss a decision\n");
		rc = EXIT_RUNTIME;
	} else if (!strcmp(sub, "list"))
		rc = sub_list(&o, &q);
	else if (!strcmp(sub, "show"))
		rc = sub_show(&o, &q, nargs, args);
	else if (!strcmp(sub, "stats"))
		rc = sub_stats(&q, now);
	else
		rc = sub_export(&o, &q);
	print_notes(&pl);
	if (pl.nbad && o.store)
		fprintf(stderr, "titlemill review: %zu item%s of the store cannot be read and %s left "
				"as %s\n", pl.nbad, pl.nbad == 1 ? "" : "s", pl.nbad == 1 ? "is" : "are",
			pl.nbad == 1 ? "it is" : "they are");
	else if (pl.nbad && strcmp(sub, "repair"))
		fprintf(stderr, "titlemill review: %zu line%s of the queue cannot be read and %s kept as "
				"%s; 'titlemill review repair' moves %s to %s.rejected\n",
			pl.nbad, pl.nbad == 1 ? "" : "s", pl.nbad == 1 ? "is" : "are",
			pl.nbad == 1 ? "it is" : "they are", pl.nbad == 1 ? "it" : "them", o.queue);
	rq_free(&q);
	rq_place_close(&pl);
	buf_free(&err);
	return rc;
}

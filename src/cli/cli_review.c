/* cli_review.c - titlemill review: the curators' queue of suggestions.
 *
 * Subcommands: add, list, show, accept, reject, defer, decide (a batch
 * TSV), export (the accepted ones as a label delta), stats, repair (the
 * unreadable lines of a queue file moved aside).  The queue is
 * a JSON Lines file (--queue, default titlemill-queue.jsonl) or a store
 * (--store URL).  The curators decide; this command only records.
 *
 * This file holds the options, opening the queue's storage and the
 * dispatch; the subcommands that change the queue are in
 * cli_review_change.c, those that read it in cli_review_read.c, what
 * they share for messages and output in cli_review_out.c (cli_review.h
 * between them). */
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli/cli.h"
#include "cli/cli_review.h"
#include "review/review.h"
#include "review/queue.h"
#include "review/review_time.h"
#include "count/store.h"

/* The values of the options that take a word, NULL-terminated; the
 * statuses and kinds are the queue's own (review.h), filled at start. */
static const char *status_choices[RQ_NSTATUS + 2];
static const char *kind_choices[RK_N + 1];
static const char *const sort_choices[] = {"score", "postings", "added", NULL};
static const char *const format_choices[] = {"tsv", "turtle", "ntriples", NULL};
static const char *const case_choices[] = {"written", "clean", NULL};

#define RV_OPT(name, kind, m, arg, def, lo, hi, meaning, choices, letter) \
	{name, kind, offsetof(review_opts, m), arg, def, lo, hi, meaning, choices, letter}

static const opt_spec review_specs[] = {
	RV_OPT("queue", OPT_STR, queue, "FILE", "titlemill-queue.jsonl", 0, 0,
	       "a queue file ($TITLEMILL_QUEUE when set and --queue is not given); "
	       "FILE.lock beside it is the lock", NULL, 0),
	OPT_SPEC_STORE(review_opts, store, "the queue in a Redis store instead (as for tally)"),
	OPT_SPEC_PREFIX(review_opts, prefix),
	RV_OPT("reopen-factor", OPT_REAL, reopen_factor, "F", "3", 1, OPT_UNBOUNDED,
	       "add: a rejected suggestion reopens when its postings reach F times those "
	       "at the rejection", NULL, 0),
	RV_OPT("status", OPT_CHOICE, status_k, "S", "open", 0, 0,
	       "list: open, accepted, rejected, deferred or all", status_choices, 0),
	RV_OPT("kind", OPT_CHOICE, kind_k, "K", NULL, 0, 0, "list: only this kind", kind_choices,
	       0),
	RV_OPT("occupation", OPT_STR, occ, "ID", NULL, 0, 0, "list: only this occupation", NULL,
	       0),
	OPT_SPEC_LANG(review_opts, lang, "list: only this language"),
	RV_OPT("sort", OPT_CHOICE, sort_k, "S", "score", 0, 0, "list: score, postings or added",
	       sort_choices, 0),
	RV_OPT("limit", OPT_U64, limit, "N", NULL, 0, 9e18, "list: at most N lines", NULL, 0),
	RV_OPT("json", OPT_FLAG, json, NULL, NULL, 0, 0, "list, show: the queue's own JSON lines",
	       NULL, 0),
	RV_OPT("reviewer", OPT_STR, reviewer, "NAME", NULL, 0, 0,
	       "accept, reject, defer, decide: who decides ($TITLEMILL_REVIEWER when not "
	       "given); required", NULL, 0),
	RV_OPT("note", OPT_STR, note, "TEXT", NULL, 0, 0, "accept, reject, defer: why", NULL, 0),
	RV_OPT("overrule", OPT_FLAG, overrule, NULL, NULL, 0, 0,
	       "accept, reject, defer, decide: change a decision that was already taken", NULL,
	       0),
	RV_OPT("format", OPT_CHOICE, format_k, "F", "tsv", 0, 0,
	       "export: tsv, turtle or ntriples", format_choices, 0),
	RV_OPT("since", OPT_STR, since, "TIME", NULL, 0, 0,
	       "export: only decisions at or after TIME (ISO 8601 UTC)", NULL, 0),
	RV_OPT("base", OPT_STR, base, "IRI", NULL, 0, 0,
	       "export: prefix for occupation ids that are not IRIs (SKOS)", NULL, 0),
	RV_OPT("case", OPT_CHOICE, case_k, "C", "written", 0, 0,
	       "export: written (the label as postings write it, when propose found it so) or "
	       "clean (the lowercase clean title)", case_choices, 0),
	RV_OPT("output", OPT_STR, out, "FILE", NULL, 0, 0,
	       "export: write FILE instead of standard output (a file is replaced atomically, "
	       "a device or FIFO written into)", NULL, 'o'),
	OPT_SPEC_END,
};

/* The subcommands, and the options each takes besides --queue, --store
 * and --prefix. */
static const struct {
	const char *sub, *opts;
} subs[] = {
	{"add", " reopen-factor "},
	{"list", " status kind occupation lang sort limit json "},
	{"show", " json "},
	{"accept", " reviewer note overrule "},
	{"reject", " reviewer note overrule "},
	{"defer", " reviewer note overrule "},
	{"decide", " reviewer overrule "},
	{"export", " format since base case output "},
	{"stats", " "},
	{"repair", " "},
};

static const char *sub_opts(const char *sub)
{
	for (size_t i = 0; i < sizeof subs / sizeof *subs; i++)
		if (!strcmp(subs[i].sub, sub))
			return subs[i].opts;
	return NULL;
}

static int admit(const opt_spec *s, void *ov)
{
	review_opts *o = ov;
	char word[32];
	if (!strcmp(s->name, "queue"))
		o->queue_given = 1;
	if (!strcmp(s->name, "queue") || !strcmp(s->name, "store") || !strcmp(s->name, "prefix"))
		return 0;
	snprintf(word, sizeof word, " %s ", s->name);
	if (strstr(sub_opts(o->sub), word))
		return 0;
	char m[128];
	snprintf(m, sizeof m, "--%s does not apply to 'review %s'", s->name, o->sub);
	rv_usage_error(m, NULL);
	return OPT_MISUSE;
}

static const opt_cmd review_cmd = {
	"review",
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
	"Times are UTC; TITLEMILL_NOW pins the clock (for tests and replays).\n"
	"Exit status: 0 done, 1 refused or failed (nothing changed), 2 usage.\n"
	"\n"
	"Options (each says the subcommands it applies to; the first three, all):\n",
	review_specs,
	admit,
};

/* Reads the options of subcommand sub (argv[0]) into o: 0 to run, 1
 * after --help, EXIT_USAGE after a misuse (said); *first the index of
 * the first operand. */
static int parse_opts(int argc, char **argv, const char *sub, review_opts *o, int *first)
{
	memset(o, 0, sizeof *o);
	o->sub = sub;
	for (int k = 0; k < RQ_NSTATUS; k++)
		status_choices[k] = rq_status_names[k];
	status_choices[RQ_NSTATUS] = "all";
	for (int k = 0; k < RK_N; k++)
		kind_choices[k] = rq_kind_names[k];
	o->reviewer = getenv("TITLEMILL_REVIEWER");
	switch (opt_parse(&review_cmd, o, argc, argv, first)) {
	case OPT_HELP_SHOWN: return 1;
	case OPT_MISUSE: return EXIT_USAGE;
	}
	const char *env = getenv("TITLEMILL_QUEUE");
	if (!o->queue_given && env && *env)
		o->queue = env;
	o->status = o->status_k - 1 == RQ_NSTATUS ? -1 : o->status_k - 1;
	o->kind = o->kind_k - 1;
	o->sort = sort_choices[o->sort_k - 1];
	o->format = o->format_k - 1;
	o->clean_case = o->case_k == 2;
	if (o->since && rq_time(o->since) < 0)
		return rv_usage_error("--since wants an ISO 8601 UTC time like 2026-12-02T09:30:00Z, not ", o->since);
	if (o->prefix && !o->store)
		return rv_usage_error("--prefix goes with --store", NULL);
	return 0;
}

static int open_place(const review_opts *o, rq_place *pl)
{
	tm_buf err = {0};
	store_conf conf = STORE_CONF_INIT(o->prefix);
	conf.retries = RQ_STORE_RETRIES;
	rq_store *qs = o->store ? rq_store_redis_open(o->store, &conf, &err)
				: rq_store_file_open(o->queue, &err);
	int rc = qs ? 0 : -1;
	rq_place_init(pl, qs, o->store ? NULL : o->queue);
	if (rc)
		fprintf(stderr, "titlemill review: %s\n", err.data);
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

int cmd_review(int argc, char **argv)
{
	review_opts o;
	rq_place pl;
	rq_queue q = {0};
	tm_buf err = {0};
	char now[21];
	int rc;

	if (argc < 2 || !strcmp(argv[1], "--help") || !strcmp(argv[1], "-h")) {
		opt_help(&review_cmd, argc < 2 ? stderr : stdout);
		return argc < 2 ? EXIT_USAGE : EXIT_OK;
	}
	const char *sub = argv[1];
	int first;
	if (!sub_opts(sub))
		return rv_usage_error("unknown subcommand: ", sub);
	if ((rc = parse_opts(argc - 1, argv + 1, sub, &o, &first)) != 0)
		return rc == 1 ? EXIT_OK : rc;
	int nargs = argc - 1 - first;
	char **args = argv + 1 + first;
	if (rq_now(now, &err)) {
		fprintf(stderr, "titlemill review: %s\n", err.data);
		buf_free(&err);
		return EXIT_USAGE;
	}
	if (!strcmp(sub, "decide") && nargs != 1)
		return rv_usage_error("decide wants one decisions file (TSV: id, decision, reviewer, note)", NULL);
	if ((!strcmp(sub, "list") || !strcmp(sub, "stats") || !strcmp(sub, "export") ||
	     !strcmp(sub, "repair")) && nargs)
		return rv_usage_error("unexpected argument: ", args[0]);
	if (open_place(&o, &pl))
		return EXIT_RUNTIME;

	if (!strcmp(sub, "add"))
		rc = rv_add(&o, &pl, nargs, args, now);
	else if (!strcmp(sub, "repair"))
		rc = rv_repair(&pl);
	else if (!strcmp(sub, "accept") || !strcmp(sub, "reject") || !strcmp(sub, "defer"))
		rc = rv_decide_ids(&o, &pl, rv_pick(rq_decision_words, 3, sub), nargs, args, now);
	else if (!strcmp(sub, "decide"))
		rc = rv_decide_file(&o, &pl, args[0], now);
	else if (rq_read(&pl, &q, 0, &err)) {
		fprintf(stderr, "titlemill review: %s\n", err.data);
		rc = EXIT_RUNTIME;
	} else if (!strcmp(sub, "export") && q.nbad) {
		fprintf(stderr, "titlemill review: no export while lines of the queue cannot be read: "
				"a delta must not miss a decision\n");
		rc = EXIT_RUNTIME;
	} else if (!strcmp(sub, "list"))
		rc = rv_list(&o, &q);
	else if (!strcmp(sub, "show"))
		rc = rv_show(&o, &q, nargs, args);
	else if (!strcmp(sub, "stats"))
		rc = rv_stats(&q, now);
	else
		rc = rv_export(&o, &q);
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


/* cli_review.c - titlemill review: the curators' queue of suggestions.
 *
 * Subcommands: add, list, show, accept, reject, defer, reopen, decide
 * (a batch TSV), undo (a batch taken back), export (the accepted ones as
 * a label delta), stats, noise-words, repair (the unreadable lines of a
 * queue file moved aside).  The queue is
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
#include "review/review_change.h"
#include "count/store.h"

/* The values of the options that take a word, NULL-terminated; the
 * statuses and kinds are the queue's own (review.h), filled at start. */
static const char *status_choices[RQ_NSTATUS + 2];
static const char *kind_choices[RK_N + 1];
static const char *const sort_choices[] = {"strength", "score", "postings", "added", NULL};
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
	RV_OPT("reopen-factor", OPT_REAL, reopen_factor, "F", NULL, 1, OPT_UNBOUNDED,
	       "add: a rejected suggestion reopens also when its postings reach F times those "
	       "at the rejection (off unless given: cumulative counts grow without new "
	       "evidence; never a fading_label)", NULL, 0),
	RV_OPT("reopen-precision", OPT_REAL, reopen_precision, "D",
	       OPT_XSTR(RQ_REOPEN_PRECISION), 0.01, 1,
	       "add: a rejected suggestion reopens when its precision rose by D or more since "
	       "the rejection (it reopens too when the lower bound of its share's Wilson "
	       "interval passes the upper bound at the rejection)", NULL, 0),
	RV_OPT("status", OPT_CHOICE, status_k, "S", "open", 0, 0,
	       "list: open, accepted, rejected, deferred or all", status_choices, 0),
	RV_OPT("kind", OPT_CHOICE, kind_k, "K", NULL, 0, 0, "list: only this kind", kind_choices,
	       0),
	RV_OPT("occupation", OPT_STR, occ, "ID", NULL, 0, 0, "list: only this occupation", NULL,
	       0),
	OPT_SPEC_LANG(review_opts, lang, "list: only this language"),
	RV_OPT("sort", OPT_CHOICE, sort_k, "S", "strength", 0, 0,
	       "list: strength (comparable across kinds; items without one last, by score), "
	       "score, postings or added", sort_choices, 0),
	RV_OPT("limit", OPT_U64, limit, "N", NULL, 0, 9e18, "list: at most N lines", NULL, 0),
	RV_OPT("json", OPT_FLAG, json, NULL, NULL, 0, 0,
	       "list, show: the queue's own JSON lines; stats: JSON Lines", NULL, 0),
	RV_OPT("reviewer", OPT_STR, reviewer, "NAME", NULL, 0, 0,
	       "accept, reject, defer, reopen, decide, undo: who decides ($TITLEMILL_REVIEWER "
	       "when not given); required", NULL, 0),
	RV_OPT("note", OPT_STR, note, "TEXT", NULL, 0, 0, "accept, reject, defer, reopen, undo: why",
	       NULL, 0),
	RV_OPT("overrule", OPT_FLAG, overrule, NULL, NULL, 0, 0,
	       "accept, reject, defer, decide: change a decision that was already taken, or "
	       "accept a label whose key another occupation has", NULL, 0),
	OPT_SPEC_LABELS(review_opts, labels,
			"accept, decide: the taxonomy (labels TSV or SKOS) whose labels an accepted "
			"label must not clash with; noise-words: whose words are no noise"),
	RV_OPT("noise", OPT_FLAG, noise, NULL, NULL, 0, 0,
	       "reject: as noise, for good: never reopens by itself, and its words feed "
	       "noise-words", NULL, 0),
	RV_OPT("batch", OPT_U64, batch, "N", NULL, 1, 9e18,
	       "undo: the batch of decide to take back (decide says its number)", NULL, 0),
	RV_OPT("min-rejections", OPT_U64, min_rejections, "N", "3", 1, 9e18,
	       "noise-words: only words that N or more rejections as noise share", NULL, 0),
	RV_OPT("format", OPT_CHOICE, format_k, "F", "tsv", 0, 0,
	       "export: tsv, turtle or ntriples", format_choices, 0),
	RV_OPT("since", OPT_STR, since, "WHEN", NULL, 0, 0,
	       "export: only decisions at or after WHEN, an ISO 8601 date (2026-12-02, from its "
	       "start in UTC) or UTC time (2026-12-02T09:30:00Z)", NULL, 0),
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

/* The subcommands: the options each takes besides --queue, --store and
 * --prefix, its operands and what it does (its own --help). */
static const struct {
	const char *sub, *opts, *operands, *what;
} subs[] = {
	{"add", " reopen-factor reopen-precision ", " [FILE...]",
	 "Takes the output of propose, overlap or trend (JSON Lines, or the TSV of\n"
	 "trend --tsv; standard input by default) into the queue.  Of trend's rows, a\n"
	 "rising title that is no label becomes a rising_title, a falling label a\n"
	 "fading_label; the others are no items (counted in a note)."},
	{"list", " status kind occupation lang sort limit json ", "",
	 "The suggestions, strongest first: TSV, or --json for the queue's own lines."},
	{"show", " json ", " ID...", "Suggestions with all their evidence and their history."},
	{"accept", " reviewer note overrule labels ", " ID...",
	 "Records an acceptance.  A label whose key is already a label of another\n"
	 "occupation (in --labels, or accepted in the queue) is refused, naming it,\n"
	 "unless --overrule."},
	{"reject", " reviewer note overrule noise ", " ID...",
	 "Records a rejection; --noise: for good (never reopens by itself)."},
	{"defer", " reviewer note overrule ", " ID...", "Records a deferral."},
	{"reopen", " reviewer note ", " ID...",
	 "Opens decided suggestions again; their history is kept."},
	{"decide", " reviewer overrule labels ", " FILE",
	 "A batch of decisions: TSV with id, decision, reviewer, and optionally note\n"
	 "and label (checked against the suggestion's); all or nothing.  Prints the\n"
	 "batch's number, for undo."},
	{"undo", " batch reviewer note ", "",
	 "Takes back the decisions of a batch of decide (--batch N), when nothing\n"
	 "happened to its suggestions since: each gets the status it had before."},
	{"export", " format since base case output ", "",
	 "The accepted suggestions as a label delta."},
	{"stats", " json ", "", "Counts per status, kind, language and reviewer."},
	{"noise-words", " labels min-rejections ", "",
	 "The words that rejections as noise share and no label holds, as candidate\n"
	 "lexicon lines (LANG TAB WORD TAB -, lexicons/README.md) for --lexicons DIR.\n"
	 "Candidates for a curator to check: the tool puts none into a lexicon."},
	{"repair", " ", "",
	 "Moves the queue file's unreadable lines to FILE.rejected (appended) and\n"
	 "rewrites the queue."},
};

static int sub_index(const char *sub)
{
	for (size_t i = 0; i < sizeof subs / sizeof *subs; i++)
		if (!strcmp(subs[i].sub, sub))
			return (int)i;
	return -1;
}

static const char *sub_opts(const char *sub)
{
	int i = sub_index(sub);
	return i < 0 ? NULL : subs[i].opts;
}

static int takes(const char *sub, const char *opt)
{
	char word[40];
	if (!strcmp(opt, "queue") || !strcmp(opt, "store") || !strcmp(opt, "prefix"))
		return 1;
	snprintf(word, sizeof word, " %s ", opt);
	return strstr(sub_opts(sub), word) != NULL;
}

static int admit(const opt_spec *s, void *ov)
{
	review_opts *o = ov;
	if (!strcmp(s->name, "queue"))
		o->queue_given = 1;
	if (takes(o->sub, s->name))
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
	"The curators' queue of suggestions from 'titlemill propose', 'overlap' and\n"
	"'trend'.\n"
	"\n"
	"  add [FILE...]              take propose, overlap or trend output into the queue\n"
	"  list                       the suggestions, strongest first (TSV, or --json)\n"
	"  show ID                    one suggestion with its evidence and history\n"
	"  accept|reject|defer ID...  record a decision (--reviewer, --note)\n"
	"  reopen ID...               open decided suggestions again\n"
	"  decide FILE                a batch of decisions: TSV with id, decision,\n"
	"                             reviewer, note, label; all or nothing\n"
	"  undo --batch N             take back a batch of decide\n"
	"  export                     the accepted suggestions as a label delta\n"
	"  stats                      counts per status, kind and language\n"
	"  noise-words                candidate lexicon lines from rejections as noise\n"
	"  repair                     move the queue file's unreadable lines to\n"
	"                             FILE.rejected (appended) and rewrite the queue\n"
	"\n"
	"'titlemill review SUBCOMMAND --help' shows a subcommand's own options.\n"
	"Times are UTC; TITLEMILL_NOW pins the clock (for tests and replays).\n"
	"Exit status: 0 done, 1 refused or failed (nothing changed), 2 usage.\n"
	"\n"
	"Options (each says the subcommands it applies to; the first three, all):\n",
	review_specs,
	admit,
};

/* The part of a meaning "a, b: what; c: other" that concerns sub, in
 * out (the whole meaning when no part names its subcommands). */
static const char *meaning_for(const char *sub, const char *help, char *out, size_t cap)
{
	static const char names[] = "abcdefghijklmnopqrstuvwxyz-, ";
	const char *p = help;
	while (p) {
		size_t pre = strspn(p, names);
		const char *next = strstr(p, "; ");
		while (next && !(strspn(next + 2, names) < strlen(next + 2) && next[2 + strspn(next + 2, names)] == ':'))
			next = strstr(next + 2, "; ");
		if (p[pre] == ':' && p[pre + 1] == ' ') {
			char list[200], word[40];
			snprintf(list, sizeof list, " %.*s ", (int)pre, p);
			for (char *c = list; *c; c++)
				if (*c == ',')
					*c = ' ';
			snprintf(word, sizeof word, " %s ", sub);
			if (strstr(list, word)) {
				size_t n = next ? (size_t)(next - p) - pre - 2 : strlen(p) - pre - 2;
				snprintf(out, cap, "%.*s", (int)n, p + pre + 2);
				return out;
			}
		}
		p = next ? next + 2 : NULL;
	}
	return help;
}

/* The options of review_specs that sub takes, ended by OPT_SPEC_END, each
 * meaning cut to what concerns sub (in text, cap bytes per option). */
static void sub_specs(const char *sub, opt_spec *out, size_t nout, char (*text)[400])
{
	size_t n = 0;
	for (const opt_spec *s = review_specs; s->name && n + 1 < nout; s++) {
		if (!takes(sub, s->name))
			continue;
		out[n] = *s;
		out[n].help = meaning_for(sub, s->help, text[n], sizeof text[n]);
		n++;
	}
	out[n] = (opt_spec)OPT_SPEC_END;
}

/* Whether argv[1..] asks for help: --help or -h before "--", options
 * that take a value skipping it (as getopt reads them). */
static int wants_help(int argc, char **argv)
{
	for (int i = 1; i < argc; i++) {
		const char *a = argv[i];
		if (!strcmp(a, "--"))
			return 0;
		if (!strcmp(a, "--help") || !strcmp(a, "-h"))
			return 1;
		if (a[0] != '-' || !a[1])
			continue;
		if (a[1] != '-') { /* -o FILE, or -oFILE */
			for (const opt_spec *s = review_specs; s->name; s++)
				if (s->letter == a[1] && s->kind != OPT_FLAG && !a[2])
					i++;
			continue;
		}
		size_t n = strcspn(a + 2, "=");
		const opt_spec *hit = NULL;
		int many = 0;
		for (const opt_spec *s = review_specs; s->name; s++)
			if (!strncmp(s->name, a + 2, n)) {
				if (strlen(s->name) == n) {
					hit = s, many = 0;
					break;
				}
				many += hit != NULL;
				hit = s;
			}
		if (hit && !many && hit->kind != OPT_FLAG && !a[2 + n])
			i++;
	}
	return 0;
}

static void sub_help(const char *sub)
{
	int k = sub_index(sub);
	opt_spec specs[48];
	static char text[48][400];
	char synopsis[1200];
	snprintf(synopsis, sizeof synopsis,
		 "usage: titlemill review %s [OPTIONS]%s\n\n%s\n\nOptions:\n", sub,
		 subs[k].operands, subs[k].what);
	sub_specs(sub, specs, sizeof specs / sizeof *specs, text);
	opt_cmd c = {"review", synopsis, specs, NULL};
	opt_help(&c, stdout);
}

/* Reads the options of subcommand sub (argv[0]) into o: 0 to run, 1
 * after --help (the subcommand's own), EXIT_USAGE after a misuse (said);
 * *first the index of the first operand. */
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
	if (wants_help(argc, argv)) {
		sub_help(sub);
		return 1;
	}
	char help_as[64];

	snprintf(help_as, sizeof help_as, "review %s", sub);
	switch (opt_parse_as(&review_cmd, help_as, o, argc, argv, first)) {
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
	if (o->since && rq_since(o->since) < 0)
		return rv_usage_error("--since wants an ISO 8601 date or UTC time like 2026-12-02 or "
				      "2026-12-02T09:30:00Z, not ", o->since);
	if (!strcmp(sub, "undo") && o->batch == UINT64_MAX)
		return rv_usage_error("undo wants --batch N (decide says the number of its batch)", NULL);
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
	/* getopt names the program as argv[0]: its messages then start as ours */
	static char prog[] = "titlemill review";
	argv[1] = prog;
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
	     !strcmp(sub, "repair") || !strcmp(sub, "undo") || !strcmp(sub, "noise-words")) && nargs)
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
	else if (!strcmp(sub, "reopen"))
		rc = rv_reopen(&o, &pl, nargs, args, now);
	else if (!strcmp(sub, "undo"))
		rc = rv_undo(&o, &pl, now);
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
		rc = rv_stats(&o, &q, now);
	else if (!strcmp(sub, "noise-words"))
		rc = rv_noise_words(&o, &q);
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


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
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli/cli.h"
#include "review/delta.h"
#include "io/fieldcheck.h"
#include "io/jsonr.h"
#include "io/outfile.h"
#include "io/reader.h"
#include "cli/cli_review.h"
#include "review/review.h"
#include "review/queue.h"
#include "review/review_time.h"
#include "count/store.h"

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
			return rv_usage_error(ch == ':' ? "this option wants a value: " : "unknown option: ",
					   opt);
		}
		if (ch >= O_REVIEWER || ch == 'o') {
			char c = (char)(ch == 'o' ? 'o' : ch - O_QUEUE + 'A');
			if (!strchr(ok, c)) {
				char m[128];
				snprintf(m, sizeof m, "%s does not apply to 'review %s'", argv[optind - 1], sub);
				return rv_usage_error(m, NULL);
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
			else if ((o->status = rv_pick(rq_status_names, RQ_NSTATUS, optarg)) < 0)
				return rv_usage_error("--status is open, accepted, rejected, deferred or all, not ", optarg);
			break;
		case O_KIND:
			if ((o->kind = rv_pick(rq_kind_names, RK_N, optarg)) < 0)
				return rv_usage_error("--kind is new_alt_label, new_hidden_label, rare_label or used_elsewhere, not ", optarg);
			break;
		case O_OCC: o->occ = optarg; break;
		case O_LANG: o->lang = optarg; break;
		case O_SORT:
			if (strcmp(optarg, "score") && strcmp(optarg, "postings") && strcmp(optarg, "added"))
				return rv_usage_error("--sort is score, postings or added, not ", optarg);
			o->sort = optarg;
			break;
		case O_LIMIT:
			errno = 0;
			o->limit = strtol(optarg, &e, 10);
			if (errno || e == optarg || *e || o->limit < 0)
				return rv_usage_error("--limit wants a whole number of 0 or more, not ", optarg);
			break;
		case O_REOPEN:
			errno = 0;
			o->reopen_factor = strtod(optarg, &e);
			if (errno || e == optarg || *e || !isfinite(o->reopen_factor) ||
			    o->reopen_factor < 1)
				return rv_usage_error("--reopen-factor wants a number of 1 or more, not ", optarg);
			break;
		case O_FORMAT:
			if ((o->format = rv_pick((const char *const[]){"tsv", "turtle", "ntriples"}, 3, optarg)) < 0)
				return rv_usage_error("--format is tsv, turtle or ntriples, not ", optarg);
			break;
		case O_SINCE:
			if (rq_time(optarg) < 0)
				return rv_usage_error("--since wants an ISO 8601 UTC time like 2026-12-02T09:30:00Z, not ", optarg);
			o->since = optarg;
			break;
		case O_BASE: o->base = optarg; break;
		case O_CASE:
			if (strcmp(optarg, "written") && strcmp(optarg, "clean"))
				return rv_usage_error("--case is written or clean, not ", optarg);
			o->clean_case = !strcmp(optarg, "clean");
			break;
		case 'o': o->out = optarg; break;
		}
	}
	if (o->prefix && !o->store)
		return rv_usage_error("--prefix goes with --store", NULL);
	return 0;
}

static int open_place(const review_opts *o, rq_place *pl)
{
	tm_buf err = {0};
	store_conf conf = {o->prefix, 2, 5000, 0};
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
		fputs(review_usage, argc < 2 ? stderr : stdout);
		return argc < 2 ? EXIT_USAGE : EXIT_OK;
	}
	const char *sub = argv[1];
	if (!allowed(sub))
		return rv_usage_error("unknown subcommand: ", sub);
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


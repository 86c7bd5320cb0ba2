/* cli_tally.c - titlemill tally (count title variants) and titlemill
 * counts (print counts tables summed). */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <sys/stat.h>
#include <unistd.h>

#include "cli/cli.h"
#include "norm/norm.h"
#include "io/outfile.h"
#include "io/postings.h"
#include "norm/setup.h"
#include "count/load.h"
#include "count/store.h"
#include "count/tally.h"
#include "match/code.h"
#include "rank/labels.h"

typedef struct tally_opts {
	int format;        /* 1 + the index in format_names */
	int strict, stats, progress, quiet, code_missing;
	double min_score;
	uint64_t memo_mib, chunk, retries, ttl_days; /* ttl_days: UINT64_MAX: none */
	uint64_t threads;  /* UINT64_MAX: the online processors */
	int period;        /* the kind of period the counts are kept by */
	const char *out, *store, *prefix;
	setup_opts setup;
} tally_opts;

static const char *const format_names[] = {"auto", "tsv", "jsonl", NULL};

static const opt_spec tally_specs[] = {
	OPT_SPEC_STORE(tally_opts, store,
		       "add the counts to a Redis server or a Redis Cluster: "
		       "redis://[user@]host:port[,host:port...][/db], [::1]:port for IPv6, or "
		       "unix:/path (no rediss://: this build has no TLS); give the password in "
		       "TITLEMILL_REDIS_PASSWORD, not in the URL (ps shows it as *, but a "
		       "shell's history keeps it); a file loaded again, or a load killed and "
		       "run again, counts once (within one run every input counts, as in memory)"),
	{"ttl", OPT_U64, offsetof(tally_opts, ttl_days), "DAYS", NULL, 1, 36500,
	 "the store's counting keys expire DAYS days after the last load that touched "
	 "them: a period no load counts in any more expires (not given: they stay)", NULL, 0},
	OPT_SPEC_PREFIX(tally_opts, prefix),
	{"chunk", OPT_U64, offsetof(tally_opts, chunk), "N", OPT_XSTR(STORE_CHUNK_DEFAULT),
	 1, 10000000, "postings per atomic chunk", NULL, 0},
	{"retries", OPT_U64, offsetof(tally_opts, retries), "N", OPT_XSTR(STORE_RETRIES_DEFAULT),
	 0, 1000, "reconnect attempts after a lost connection", NULL, 0},
	{"format", OPT_CHOICE, offsetof(tally_opts, format), "F", "auto", 0, 0,
	 "auto ('{' first means JSON Lines), tsv or jsonl", format_names, 0},
	OPT_SPEC_PERIOD(tally_opts, period,
			"count each posting in the period of its date: month, week (ISO 8601), "
			"day, or none (one count of all time); a posting without a date counts "
			"as undated"),
	OPT_SPEC_LABELS(tally_opts, setup.labels,
			"a labels TSV: labels are never cut down when cleaning"),
	OPT_SPEC_LEXICONS(tally_opts, setup),
	{"strict", OPT_FLAG, offsetof(tally_opts, strict), NULL, NULL, 0, 0,
	 "a malformed row is an error (status 1, nothing written)", NULL, 0},
	OPT_SPEC_MEMO(tally_opts, memo_mib),
	{"threads", OPT_U64, offsetof(tally_opts, threads), "N", NULL, 1, LOAD_THREADS_MAX,
	 "clean titles in N threads (not given: one per online processor); the "
	 "counts are the same bytes whatever N", NULL, 0},
	{"progress", OPT_FLAG, offsetof(tally_opts, progress), NULL, NULL, 0, 0,
	 "show progress on standard error even when it is not a terminal", NULL, 0},
	{"quiet", OPT_FLAG, offsetof(tally_opts, quiet), NULL, NULL, 0, 0,
	 "no progress display, even on a terminal", NULL, 0},
	{"output", OPT_STR, offsetof(tally_opts, out), "FILE", NULL, 0, 0,
	 "write the table to FILE (a file is replaced only when complete; a device or "
	 "FIFO is written into)", NULL, 'o'},
	{"stats", OPT_FLAG, offsetof(tally_opts, stats), NULL, NULL, 0, 0,
	 "say on standard error how much memory the counts took", NULL, 0},
	{"code-missing", OPT_FLAG, offsetof(tally_opts, code_missing), NULL, NULL, 0, 0,
	 "count a posting without occupations under its best match (titlemill match over "
	 "--labels and the coded postings) when it scores at least --min-score; the summary "
	 "says how many (coded_by_match)", NULL, 0},
	{"min-score", OPT_REAL, offsetof(tally_opts, min_score), "X", OPT_XSTR(MATCH_MIN_SCORE_CODE),
	 0, 1, "the score a match needs to code a posting (--code-missing)", NULL, 0},
	OPT_SPEC_END,
};

static const opt_cmd tally_cmd = {
	"tally",
	"usage: titlemill tally [--store URL [--prefix P] [--chunk N] [--retries N] [--ttl DAYS]]\n"
	"                       [--format auto|tsv|jsonl] [--period month|week|day|none]\n"
	"                       [--labels FILE] [--lexicons DIR]\n"
	"                       [--strict] [--threads N] [--progress|--quiet]\n"
	"                       [-o FILE] POSTINGS...\n"
	"\n"
	"Counts, per occupation, language and match key, how often each cleaned\n"
	"title is used, and writes a counts table (TSV) to standard output or FILE.\n"
	"POSTINGS are TSV files with a header (title and occupations required; id,\n"
	"date, lang optional) or JSON Lines with the same fields; '-' reads standard\n"
	"input.  A posting id counted once is not counted again.  With dated postings\n"
	"the table has a last column, period, and each period its own counts.\n"
	"\n",
	tally_specs,
	NULL,
};

typedef struct counts_opts {
	const char *out, *store, *prefix;
	int period;        /* SERIES_AS_READ when not given */
	opt_span from, to;
} counts_opts;

static const opt_spec counts_specs[] = {
	OPT_SPEC_STORE(counts_opts, store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(counts_opts, prefix),
	{"period", OPT_PERIOD, offsetof(counts_opts, period), "P", NULL, 0, 0,
	 "roll the periods up to months or weeks (from days), or sum them all (none); "
	 "not given: the periods stay as the tables have them", NULL, 0},
	OPT_SPEC_WINDOW(counts_opts, from, to),
	{"output", OPT_STR, offsetof(counts_opts, out), "FILE", NULL, 0, 0,
	 "write the table to FILE (a file is replaced only when complete; a device or "
	 "FIFO is written into)", NULL, 'o'},
	OPT_SPEC_END,
};

static const opt_cmd counts_cmd = {
	"counts",
	"usage: titlemill counts [--store URL [--prefix P]] [--period month|week|day|none]\n"
	"                        [--from DATE] [--to DATE] [-o FILE] [COUNTS...]\n"
	"\n"
	"Reads counts tables (from tally or counts; '-', or none without --store:\n"
	"standard input) and what a store holds, sums them period by period and\n"
	"prints one counts table.\n"
	"\n",
	counts_specs,
	NULL,
};

/* Writes m to standard output (path NULL) or to path by the rules of
 * outfile.h: a regular file replaced atomically, a device or FIFO
 * written into, "-" standard output. */
static int write_table(tally_series *s, const char *path, const char *cmd)
{
	of_file f;
	tm_buf err = {0};
	FILE *fp;
	int rc = EXIT_RUNTIME;

	if (of_open(&f, path ? path : "-", OF_DASH, &err) || !(fp = of_stream(&f, &err)))
		goto done;
	if (series_write(s, fp, s->seen_kind != PERIOD_NONE) != 0) {
		buf_reset(&err);
		buf_puts(&err, f.target ? f.target : "standard output");
		buf_puts(&err, ": write error: ");
		buf_puts(&err, strerror(errno));
		of_abort(&f);
		goto done;
	}
	if (f.warn.len)
		fprintf(stderr, "titlemill %s: note: %s", cmd, f.warn.data);
	if (of_commit(&f, &err) == 0)
		rc = EXIT_OK;
done:
	if (rc != EXIT_OK)
		fprintf(stderr, "titlemill %s: %s\n", cmd, err.data ? err.data : "cannot write");
	of_abort(&f);
	buf_free(&err);
	return rc;
}

/* Reports of malformed rows: the first few in full, then a count. */
typedef struct badlog {
	long n;
	char first[5][300];
} badlog;

static double now(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + (double)ts.tv_nsec / 1e9;
}

/* Seconds between two progress lines on a terminal (rewritten in place)
 * and on a pipe or file (one line each). */
#define PROGRESS_TTY_S 0.25
#define PROGRESS_PIPE_S 5.0

/* What the load tells the command as it goes. */
typedef struct tally_run {
	badlog bl;
	int progress;      /* 0 off, 1 on a terminal, 2 on a pipe */
	uint64_t total;    /* input bytes, 0 when unknown (standard input, a FIFO) */
	double t0, last;
	uint64_t postings, bytes; /* the latest figures */
	int shown;
	match_coder mc;    /* --code-missing: the postings without occupations */
} tally_run;

static int on_hold(void *ctx, const posting *p, const char *name)
{
	return mc_hold(&((tally_run *)ctx)->mc, p, name);
}

/* --code-missing, after the load: each held posting counted under its
 * best match (or as it came), through st.  0, or -1 after saying why. */
static int code_missing(tally_run *run, const tally_opts *o, const lexicon *lx,
			tally_series *s, store *st)
{
	tm_buf err = {0};
	labelset ls;
	normaliser *nm = norm_new(lx);
	tally_mem all; /* the coded postings of all periods: what matches learn from */
	int rc = 0;
	memset(&ls, 0, sizeof ls);
	tm_init(&all);
	if (!nm || series_merge_all(s, &all) != 0 ||
	    labels_read(&ls, o->setup.labels, nm, stderr, &err) != 0 ||
	    mc_code(&run->mc, &ls, &all, nm, o->min_score, st, &err) != TM_OK) {
		fprintf(stderr, "titlemill tally: --code-missing: %.*s\n", (int)err.len,
			err.data ? err.data : "out of memory");
		rc = -1;
	}
	labels_free(&ls);
	norm_free(nm);
	tm_free(&all);
	buf_free(&err);
	return rc;
}

static void on_skipped(void *ctx, const char *msg, size_t len)
{
	badlog *bl = &((tally_run *)ctx)->bl;
	if (bl->n < 5)
		snprintf(bl->first[bl->n], sizeof bl->first[0], "%.*s", (int)len, msg);
	bl->n++;
}

static void progress_clear(tally_run *t)
{
	if (t->shown && t->progress == 1)
		fputs("\r\033[K", stderr);
	t->shown = 0;
}

static void on_note(void *ctx, const char *msg, size_t len)
{
	progress_clear(ctx);
	fprintf(stderr, "titlemill tally: %.*s\n", (int)len, msg);
}

static const char *plural(uint64_t n, const char *one, const char *many)
{
	return n == 1 ? one : many;
}

/* Postings read, their rate, and with the inputs' size known the share
 * of their bytes read and the time left at the rate so far: at most
 * once per interval, or now (force). */
static void show_progress(tally_run *t, int force)
{
	double at = now(), el = at - t->t0;
	uint64_t postings = t->postings, bytes = t->bytes;
	char share[64] = "";

	if (!force && at - t->last < (t->progress == 1 ? PROGRESS_TTY_S : PROGRESS_PIPE_S))
		return;
	t->last = at;
	if (t->total && bytes) {
		double left = el * (double)(t->total > bytes ? t->total - bytes : 0) / (double)bytes;
		snprintf(share, sizeof share, ", %.0f %% of the input, %d:%02d left",
			 100.0 * (double)bytes / (double)t->total, (int)(left / 60),
			 (int)left % 60);
	}
	fprintf(stderr, "%stitlemill tally: %llu %s read, %.0f/s%s%s",
		t->progress == 1 ? "\r\033[K" : "", (unsigned long long)postings,
		plural(postings, "posting", "postings"), el > 0 ? (double)postings / el : 0.0,
		share, t->progress == 1 ? "" : "\n");
	t->shown = 1;
}

static void on_progress(void *ctx, uint64_t postings, uint64_t bytes)
{
	tally_run *t = ctx;
	t->postings = postings;
	t->bytes = bytes;
	show_progress(t, 0);
}

/* The bytes of every input, or 0 when one of them is not a regular file. */
static uint64_t input_bytes(char *const *paths, int n)
{
	uint64_t sum = 0;
	for (int i = 0; i < n; i++) {
		struct stat sb;
		if (!strcmp(paths[i], "-") || stat(paths[i], &sb) != 0 || !S_ISREG(sb.st_mode))
			return 0;
		sum += (uint64_t)sb.st_size;
	}
	return sum;
}

int cmd_tally(int argc, char **argv)
{
	tally_opts o;
	store *st = NULL;
	tm_buf err = {0};
	tally_series m;
	tally_run run;
	lexicon *lx;
	int first, rc = EXIT_OK;

	memset(&o, 0, sizeof o);
	memset(&run, 0, sizeof run);
	mc_init(&run.mc);
	switch (opt_parse(&tally_cmd, &o, argc, argv, &first)) {
	case OPT_HELP_SHOWN: return EXIT_OK;
	case OPT_MISUSE: return EXIT_USAGE;
	}
	store_conf sconf = STORE_CONF_INIT(o.prefix);
	sconf.retries = (int)o.retries;
	if (o.ttl_days != UINT64_MAX)
		sconf.ttl_s = (long long)o.ttl_days * 86400;
	sconf.period = o.period;
	enum pr_format format = o.format == 3 ? PR_JSONL : o.format == 2 ? PR_TSV : PR_AUTO;
	if (first >= argc) {
		fputs("titlemill tally: name the postings files ('-' for standard input)\n", stderr);
		opt_help(&tally_cmd, stderr);
		return EXIT_USAGE;
	}
	if (o.progress && o.quiet) {
		fputs("titlemill tally: --progress and --quiet contradict each other\n", stderr);
		return EXIT_USAGE;
	}
	if (o.store && o.out) {
		fputs("titlemill tally: -o writes a counts table; with --store the counts go to the store\n", stderr);
		return EXIT_USAGE;
	}
	if (o.code_missing && (o.store || !o.setup.labels)) {
		fputs(o.store ? "titlemill tally: --code-missing counts in memory (-o); run titlemill "
			"match over the store instead\n"
			: "titlemill tally: --code-missing needs --labels FILE\n", stderr);
		return EXIT_USAGE;
	}
	if (!(lx = setup_lexicon(&o.setup, &err))) {
		fprintf(stderr, "titlemill tally: %.*s\n", (int)err.len, err.data ? err.data : "");
		buf_free(&err);
		return EXIT_RUNTIME;
	}
	if (o.store && o.strict) {
		/* --strict with a store: every row is checked before anything
		 * is applied */
		for (int i = first; i < argc && rc == EXIT_OK; i++) {
			postings_reader pr;
			posting p;
			int r;
			pr_row row;
			if (!strcmp(argv[i], "-")) {
				fputs("titlemill tally: --strict --store cannot read standard input twice; name the files\n", stderr);
				rc = EXIT_USAGE;
				break;
			}
			if (pr_open(&pr, argv[i], format) != 0) {
				fprintf(stderr, "titlemill tally: %.*s\n", (int)pr.err.len, pr.err.data);
				rc = EXIT_RUNTIME;
			}
			while (rc == EXIT_OK && ((r = pr_next(&pr, &p, &row)) < 0 || row != PR_END))
				if (r < 0 || row == PR_SKIP) {
					fprintf(stderr, "titlemill tally: %.*s (--strict: nothing applied)\n",
						(int)pr.err.len, pr.err.data);
					rc = EXIT_RUNTIME;
				}
			pr_close(&pr);
		}
		if (rc != EXIT_OK) {
			lex_free(lx);
			return rc;
		}
	}
	/* the counts go to the store, or to memory and then the table */
	series_init(&m, o.period);
	st = o.store ? store_open(o.store, &sconf, &err) : store_mem_open(&m, &err);
	if (!st) {
		fprintf(stderr, "titlemill tally: %.*s\n", (int)err.len, err.data ? err.data : "");
		lex_free(lx);
		buf_free(&err);
		return EXIT_RUNTIME;
	}
	store_set_chunk(st, (long)o.chunk);
	run.progress = o.quiet ? 0 : o.progress ? (isatty(2) ? 1 : 2) : isatty(2) ? 1 : 0;
	run.total = input_bytes(argv + first, argc - first);
	run.t0 = run.last = now();
	load_conf lc = {
		.format = format,
		.threads = o.threads == UINT64_MAX ? load_online_cpus() : (int)o.threads,
		.memo_bytes = (size_t)o.memo_mib << 20,
		.strict = o.strict,
		.skipped = on_skipped,
		.note = on_note,
		.progress = run.progress ? on_progress : NULL,
		.hold = o.code_missing ? on_hold : NULL,
		.ctx = &run,
	};
	int lr = load_run(st, lx, &lc, argv + first, argc - first, &err);
	if (run.progress == 2 && lr == TM_OK)
		show_progress(&run, 1); /* a log ends with the whole load's figures */
	progress_clear(&run);
	if (lr != TM_OK) {
		fprintf(stderr, "titlemill tally: %.*s%s\n", (int)err.len, err.data ? err.data : "",
			lr == TM_EINPUT ? " (--strict: nothing written)" : "");
		rc = EXIT_RUNTIME;
	}
	if (rc == EXIT_OK && o.code_missing && code_missing(&run, &o, lx, &m, st) != 0)
		rc = EXIT_RUNTIME;
	if (rc == EXIT_OK && st->ops->finish(st) != 0) {
		/* chunks other loads left unfinished (killed, or still at work) */
		fprintf(stderr, "titlemill tally: %.*s; every input is counted, but chunks that "
			"earlier loads left unfinished are not: run the load again\n",
			(int)st->err.len, st->err.data);
		rc = EXIT_RUNTIME;
	}
	if (st->settled)
		fprintf(stderr, "titlemill tally: warning: the store held %llu %s that a load "
			"had begun and not finished (it was killed, or is still running); "
			"they are finished now as they were read then, %llu %s more counted: "
			"if their input changed since, its changed postings are counted as they were "
			"(compare the load's files; see README, Long runs)\n",
			(unsigned long long)st->settled, plural(st->settled, "chunk", "chunks"),
			(unsigned long long)st->settled_postings,
			plural(st->settled_postings, "posting", "postings"));
	if (o.store)
		fprintf(stderr, "titlemill tally: %llu %s applied, %llu already in the store; ",
			(unsigned long long)st->applied, plural(st->applied, "chunk", "chunks"),
			(unsigned long long)st->skipped);
	else if (rc == EXIT_OK) {
		if (o.stats) {
			size_t strs = m.ids.arena.len + m.index.arena.len, rows = 0, forms = 0, keys = 0;
			for (size_t i = 0; i < m.n; i++) {
				const tally_mem *x = &m.p[i]->m;
				strs += tm_string_bytes(x);
				rows += tm_ntriples(x);
				forms += x->forms.n;
				keys += x->keys.n;
			}
			fprintf(stderr, "titlemill tally: %zu distinct (occupation, language, key, period), "
				"%zu forms, %zu (language, key, period), %zu ids, %zu periods; engine %zu "
				"bytes, %.1f bytes per distinct (occupation, language, key, period) beyond "
				"the string bytes\n",
				rows, forms, keys, m.ids.n, m.n, series_bytes(&m),
				rows ? (double)(series_bytes(&m) - strs) / (double)rows : 0.0);
		}
		rc = write_table(&m, o.out, "tally");
	}
	fprintf(stderr, "%s%llu %s counted, %llu republished %s skipped, %ld malformed %s skipped",
		o.store ? "" : "titlemill tally: ", (unsigned long long)st->counted,
		plural(st->counted, "posting", "postings"), (unsigned long long)st->republished,
		plural(st->republished, "id", "ids"), run.bl.n,
		plural((uint64_t)run.bl.n, "row", "rows"));
	for (long k = 0; k < run.bl.n && k < 5; k++)
		fprintf(stderr, "%s %s", k ? ";" : ":", run.bl.first[k]);
	fprintf(stderr, "%s\n", run.bl.n > 5 ? "; ..." : "");
	uint64_t undated = o.store ? st->undated : m.undated;
	if (o.period != PERIOD_NONE && undated && rc == EXIT_OK)
		fprintf(stderr, "titlemill tally: %llu %s without a date, counted as undated (an "
			"empty period)\n", (unsigned long long)undated,
			plural(undated, "posting", "postings"));
	if (o.code_missing)
		fprintf(stderr, "titlemill tally: of them without occupations: coded_by_match %llu "
			"(best match scoring at least %.2f), %llu left without\n",
			(unsigned long long)run.mc.coded, o.min_score, (unsigned long long)run.mc.uncoded);
	mc_free(&run.mc);
	store_close(st);
	series_free(&m);
	lex_free(lx);
	buf_free(&err);
	return rc;
}

int cmd_counts(int argc, char **argv)
{
	counts_opts o;
	tm_buf err = {0};
	tally_series m;
	long wa, wb;
	int first, rc = EXIT_OK, win;

	memset(&o, 0, sizeof o);
	o.period = SERIES_AS_READ;
	switch (opt_parse(&counts_cmd, &o, argc, argv, &first)) {
	case OPT_HELP_SHOWN: return EXIT_OK;
	case OPT_MISUSE: return EXIT_USAGE;
	}
	if ((win = opt_window("counts", &o.from, &o.to, &wa, &wb)) < 0)
		return EXIT_USAGE;
	store_conf sc = STORE_CONF_INIT(o.prefix);
	series_init(&m, o.period);
	if (win)
		series_window(&m, wa, wb);
	if (o.store) {
		store *st = store_open(o.store, &sc, &err);
		if (!st || st->ops->dump(st, &m) != 0) {
			if (st) {
				buf_reset(&err);
				buf_append(&err, st->err.data, st->err.len);
			}
			rc = EXIT_RUNTIME;
		} else if (st->unfinished)
			fprintf(stderr, "titlemill counts: warning: %llu %s of a load %s not finished "
				"(killed, or still running), so the counts are not all in: the next tally "
				"with this store and prefix finishes them\n",
				(unsigned long long)st->unfinished,
				plural(st->unfinished, "chunk", "chunks"), st->unfinished == 1 ? "is" : "are");
		else if (!series_any(&m) && !m.dropped && !m.partial)
			fprintf(stderr, "titlemill counts: the store holds no counts under the "
				"prefix %s\n", o.prefix ? o.prefix : STORE_PREFIX_DEFAULT);
		store_close(st);
	} else if (first >= argc && series_read(&m, "-", &err) != 0)
		rc = EXIT_RUNTIME;
	for (int i = first; i < argc && rc == EXIT_OK; i++)
		if (series_read(&m, argv[i], &err) != 0)
			rc = EXIT_RUNTIME;
	if (rc != EXIT_OK)
		fprintf(stderr, "titlemill counts: %.*s\n", (int)err.len, err.data ? err.data : "");
	else {
		if (win)
			cli_window_note("counts", &m, series_any(&m));
		rc = write_table(&m, o.out, "counts");
	}
	series_free(&m);
	buf_free(&err);
	return rc;
}

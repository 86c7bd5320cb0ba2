/* cli_report.c - titlemill report: one self-contained HTML page of the
 * coverage, the labels' shares, the suggestions and the occupations the
 * postings cannot tell apart (report.h). */
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "cli/cli.h"
#include "cli/options.h"
#include "io/outfile.h"
#include "io/skos.h"
#include "rank/inputs.h"
#include "rank/propose.h"
#include "rank/trend.h"
#include "report/report.h"
#include "review/queue.h"

typedef struct report_cli {
	rank_opts in;
	const char *out, *queue, *groups, *level;
	opt_strs occ;
	uint64_t sections, min_postings, top, overlap_top, overlap_min;
	uint64_t group_prefix;   /* UINT64_MAX: not asked for */
	int stamp;
	cli_windows win;
	propose_bars bar;
} report_cli;

#define BAR_SPEC(type, kind, m, opt, arg, def, lo, hi, meaning) \
	{opt, kind, offsetof(report_cli, bar.m), arg, OPT_XSTR(def), lo, hi, meaning, NULL, 0},

static const opt_spec report_specs[] = {
	OPT_SPEC_LABELS(report_cli, in.setup.labels,
			"the taxonomy's labels: TSV (occupation, kind, lang, label) or SKOS"),
	{"output", OPT_STR, offsetof(report_cli, out), "FILE", NULL, 0, 0,
	 "write the page to FILE (required; '-' for standard output)", NULL, 'o'},
	{"queue", OPT_STR, offsetof(report_cli, queue), "FILE", NULL, 0, 0,
	 "show the decisions of this review queue (with --store: the store's queue "
	 "unless a FILE is given)", NULL, 0},
	{"occupation", OPT_STRS, offsetof(report_cli, occ), "ID", NULL, 0, 0,
	 "a section for this occupation (repeatable) instead of the weakest", NULL, 0},
	OPT_SPEC_LANG(report_cli, in.lang, "only this language"),
	RANK_SPEC_IDS(report_cli, in),
	RANK_SPEC_WINDOW(report_cli, in),
	{"sections", OPT_U64, offsetof(report_cli, sections), "N", "10", 0, 10000,
	 "without --occupation: sections for the N occupations with the lowest coverage", NULL,
	 0},
	{"min-postings", OPT_U64, offsetof(report_cli, min_postings), "N", "100", 1, 1e18,
	 "an occupation needs N postings in a language to count among the lowest covered",
	 NULL, 0},
	{"top", OPT_U64, offsetof(report_cli, top), "N", "100", 0, 1e18,
	 "list at most N suggestions of each kind (the strongest)", NULL, 0},
	{"overlap-top", OPT_U64, offsetof(report_cli, overlap_top), "N", "20", 0, 1e9,
	 "show the N closest pairs of occupations and at most N nearer another group "
	 "(0: no such section)", NULL, 0},
	{"overlap-min-postings", OPT_U64, offsetof(report_cli, overlap_min), "N",
	 OPT_XSTR(OVERLAP_MIN_POSTINGS), 1, 1e18,
	 "postings each occupation of a pair needs to be ranked (as overlap --min-postings)",
	 NULL, 0},
	{"groups", OPT_STR, offsetof(report_cli, groups), "FILE", NULL, 0, 0,
	 "the occupations' groups: TSV (occupation, group, optional level) or SKOS "
	 "(default: skos:broader of SKOS --labels)", NULL, 0},
	{"level", OPT_STR, offsetof(report_cli, level), "L", NULL, 0, 0,
	 "use this level of the groups TSV (default: the one with the most groups)", NULL, 0},
	{"group-prefix", OPT_U64, offsetof(report_cli, group_prefix), "N", NULL, 1, 64,
	 "group occupations by the first N characters of their code", NULL, 0},
	CLI_SPEC_WINDOWS(report_cli, win),
	{"stamp", OPT_FLAG, offsetof(report_cli, stamp), NULL, NULL, 0, 0,
	 "write the time the page was made (without it the same inputs give the same bytes)",
	 NULL, 0},
	PROPOSE_BARS(BAR_SPEC)
	OPT_SPEC_STORE(report_cli, in.store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(report_cli, in.prefix),
	OPT_SPEC_LEXICONS(report_cli, in.setup),
	OPT_SPEC_END,
};

static const opt_cmd report_cmd = {
	"report",
	"usage: titlemill report --labels FILE -o FILE [--queue FILE] [--lang L]\n"
	"                        [--occupation ID]... [--sections N] [--stamp]\n"
	"                        [--from DATE] [--to DATE] [--before FROM..TO]\n"
	"                        [--after FROM..TO] [--as-of DATE]\n"
	"                        [--groups FILE [--level L] | --group-prefix N]\n"
	"                        [--overlap-top N] [--overlap-min-postings N]\n"
	"                        [--ids local] [--id-map FILE] [--strict] [thresholds]\n"
	"                        (COUNTS|POSTINGS...|-|--store URL [--prefix P])\n"
	"\n"
	"One self-contained HTML page for curators: coverage overall, per language\n"
	"and per occupation with intervals, the labels' shares of the weakest\n"
	"occupations, the biggest unmatched titles, the suggestions with their\n"
	"evidence (and the queue's decisions), and the occupations whose postings\n"
	"use the same titles (as titlemill overlap); with counts by period, each\n"
	"section's preferred-label share over time and the titles rising and fading\n"
	"(as titlemill trend, its default windows).  It opens from a file with no\n"
	"network.  The thresholds are those of titlemill propose.\n"
	"\n",
	report_specs,
	NULL,
};

/* Loads the queue whose decisions the page shows: 0, or -1 after saying
 * why not. */
static int load_queue(const report_cli *o, rq_queue *q, int *have)
{
	tm_buf err = {0};
	rq_place pl;
	store_conf conf = STORE_CONF_INIT(o->in.prefix);
	rq_store *qs;
	int rc;
	*have = 0;
	if (!o->queue && !o->in.store)
		return 0;
	qs = o->queue ? rq_store_file_open(o->queue, &err) : rq_store_redis_open(o->in.store,
										 &conf, &err);
	rq_place_init(&pl, qs, o->queue);
	/* a store with no queue yet shows no decisions; a named file must exist */
	rc = qs ? rq_read(&pl, q, !o->queue, &err) : -1;
	if (rc)
		fprintf(stderr, "titlemill report: %s\n", err.data ? err.data : "cannot read the queue");
	else
		*have = 1;
	rq_place_close(&pl);
	buf_free(&err);
	return rc ? -1 : 0;
}

/* What the page shows of time, when the counts have periods: each
 * period's coverage for the occupations' charts, and the trend of the
 * default windows (trend.h). */
typedef struct report_time {
	report_periods ps;
	trend_list tl;
	trend_bars bars;
	tally_mem before, after;
	char wb[64], wa[64], span[64];
	int have_trend;
} report_time;

static int time_load(report_time *t, rank_inputs *in, const report_cli *o, report_opts *ro)
{
	size_t np;
	series_period **v;
	long b0, b1, a0, a1;
	const series_period *first = NULL, *last = NULL;

	if (!series_dated(&in->s))
		return 0;
	if (!(v = series_sorted(&in->s, &np)))
		return -1;
	for (size_t i = 0; i < np; i++) {
		if (!v[i]->len)
			continue; /* undated: no time */
		if (report_periods_add(&t->ps, v[i]->label, &v[i]->m, &in->ls, ro->lang) != 0) {
			free(v);
			return -1;
		}
		if (!first)
			first = v[i];
		last = v[i];
	}
	free(v);
	ro->periods = &t->ps;
	if (first && first != last)
		snprintf(t->span, sizeof t->span, "%s to %s", first->label, last->label);
	else if (first)
		snprintf(t->span, sizeof t->span, "%s", first->label);
	if (!o->in.from.given && !o->in.to.given && first)
		ro->window = t->span;
	if (!o->win.before.given && !o->win.after.given &&
	    trend_default_windows(&in->s, o->win.as_of.given ? o->win.as_of.first
							       : (long)(time(NULL) / 86400),
				  0, 0, &b0, &b1, &a0, &a1) != 0)
		return 0; /* no complete period: no trend, and nothing to say */
	int r = cli_windows_get("report", &o->win, &in->s, &b0, &b1, &a0, &a1);
	if (r)
		return r == EXIT_USAGE ? -2 : -3;
	trend_bars_default(&t->bars);
	if (series_sum(&in->s, b0, b1, &t->before) <= 0 || series_sum(&in->s, a0, a1, &t->after) <= 0)
		return 0; /* nothing before the latest period: nothing to compare */
	trend_filter f = {NULL, ro->lang};
	if (trend_run(&t->before, &t->after, &in->ls, &t->bars, &f, &t->tl) != 0 ||
	    trend_periods(&in->s, b0, b1, a0, a1, &t->bars, &t->tl, NULL) != 0)
		return -1;
	trend_window_used(&in->s, b0, b1, t->wb, sizeof t->wb);
	trend_window_used(&in->s, a0, a1, t->wa, sizeof t->wa);
	ro->trend = &t->tl;
	ro->trend_bars = &t->bars;
	ro->trend_before = t->wb;
	ro->trend_after = t->wa;
	return 0;
}

static void time_free(report_time *t)
{
	report_periods_free(&t->ps);
	trend_list_free(&t->tl);
	tm_free(&t->before);
	tm_free(&t->after);
}

/* Writes the page to path by the rules of outfile.h. */
static int write_page(const char *path, const tm_buf *page)
{
	of_file f;
	tm_buf err = {0};
	int rc = EXIT_RUNTIME;
	if (of_open(&f, path, OF_DASH, &err) || of_write(&f, page->data, page->len, &err))
		goto done;
	if (f.warn.len)
		fprintf(stderr, "titlemill report: note: %s", f.warn.data);
	if (of_commit(&f, &err) == 0)
		rc = EXIT_OK;
done:
	if (rc != EXIT_OK)
		fprintf(stderr, "titlemill report: %s\n", err.data ? err.data : "cannot write");
	of_abort(&f);
	buf_free(&err);
	return rc;
}

int cmd_report(int argc, char **argv)
{
	report_cli o;
	rank_inputs in;
	inputs_survey sv;
	rq_queue q;
	groupmap g;
	tm_buf page = {0}, err = {0}, notes = {0};
	int status, have_queue = 0;
	char stamp[32];
	report_time rt;

	memset(&o, 0, sizeof o);
	memset(&q, 0, sizeof q);
	memset(&g, 0, sizeof g);
	memset(&rt, 0, sizeof rt);
	tm_init(&rt.before);
	tm_init(&rt.after);
	o.in.by_period = 1; /* the periods, for the charts and the trend */
	o.in.period = SERIES_AS_READ;
	if (!cli_rank_start(&report_cmd, &o, &o.in, argc, argv, &in, &sv, &status))
		goto done;
	status = EXIT_USAGE;
	if (!o.out) {
		fprintf(stderr, "titlemill report: -o FILE is required (the page; '-' for standard "
				"output)\n");
		goto done;
	}
	status = EXIT_RUNTIME;
	if (load_queue(&o, &q, &have_queue))
		goto done;
	status = EXIT_USAGE;
	if (o.group_prefix != UINT64_MAX && o.groups) {
		fputs("titlemill report: --groups and --group-prefix exclude each other\n", stderr);
		goto done;
	}
	if (o.level && (!o.groups || skos_is_rdf_path(o.groups))) {
		fputs("titlemill report: --level applies to a groups TSV (--groups FILE)\n", stderr);
		goto done;
	}
	status = EXIT_RUNTIME;
	if (o.overlap_top && cli_load_groups("report", o.groups, o.level, o.group_prefix,
					     o.in.setup.labels, &g))
		goto done;
	if (o.stamp) {
		time_t t = time(NULL);
		struct tm tmv;
		strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", gmtime_r(&t, &tmv));
	}
	report_opts ro = {o.in.lang[0] ? o.in.lang : NULL, o.occ.n ? (char *const *)o.occ.v : NULL,
			  o.occ.n, o.sections, o.min_postings, &o.bar, o.top, have_queue ? &q : NULL,
			  NULL, o.stamp ? stamp : NULL, TM_VERSION, &notes, sv.distinct, NULL, 0,
			  NULL, NULL, NULL, NULL, NULL};
	overlap_opts oo = {o.overlap_min, OVERLAP_KEY_CAP, ro.lang, &g};
	int tr = time_load(&rt, &in, &o, &ro);
	if (tr != 0) {
		if (tr == -1)
			fputs("titlemill report: out of memory\n", stderr);
		status = tr == -2 ? EXIT_USAGE : EXIT_RUNTIME;
		goto done;
	}
	if (o.overlap_top) {
		ro.overlap = &oo;
		ro.overlap_top = o.overlap_top;
	}
	if (report_write(&in.m, &in.ls, &ro, &page, &err)) {
		fprintf(stderr, "titlemill report: %s\n", err.data);
		goto done;
	}
	for (const char *p = notes.data, *e = p + notes.len; p && p < e;) {
		const char *nl = memchr(p, '\n', (size_t)(e - p));
		fprintf(stderr, "titlemill report: note: %.*s\n", (int)(nl - p), p);
		p = nl + 1;
	}
	status = write_page(o.out, &page);
done:
	time_free(&rt);
	rq_free(&q);
	groups_free(&g);
	inputs_free(&in);
	buf_free(&page);
	buf_free(&err);
	buf_free(&notes);
	return status;
}

/* cli_trend.c - titlemill trend: the titles whose share of their
 * occupation's postings rose or fell between two windows of time, as
 * JSON Lines (or TSV).  The test and its bars are in rank/trend.h. */
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "cli/cli.h"
#include "cli/options.h"
#include "core/period.h"
#include "count/series.h"
#include "io/record.h"
#include "rank/inputs.h"
#include "rank/propose.h"
#include "rank/trend.h"

typedef struct trend_opts {
	rank_opts in;
	int tsv;
	cli_windows win;
	uint64_t top;      /* UINT64_MAX: all */
	int direction;     /* 1 + the index in trend_direction_names, 0 both */
	trend_bars bar;
} trend_opts;

#define BAR_SPEC(type, kind, m, opt, arg, def, lo, hi, meaning) \
	{opt, kind, offsetof(trend_opts, bar.m), arg, OPT_XSTR(def), lo, hi, meaning, NULL, 0},

static const char *const direction_names[] = {"rising", "falling", NULL};

static const opt_spec trend_specs[] = {
	OPT_SPEC_LABELS(trend_opts, in.setup.labels,
			"the taxonomy's labels: TSV (occupation, kind, lang, label) or SKOS"),
	CLI_SPEC_WINDOWS(trend_opts, win),
	{"period", OPT_PERIOD, offsetof(trend_opts, in.period), "P", NULL, 0, 0,
	 "count postings files by month (the default), week or day, or roll counts tables "
	 "by day up to weeks or months; not given: the tables' periods as they are", NULL, 0},
	{"tsv", OPT_FLAG, offsetof(trend_opts, tsv), NULL, NULL, 0, 0,
	 "a table instead of JSON Lines", NULL, 0},
	{"top", OPT_U64, offsetof(trend_opts, top), "N", NULL, 0, 1.8e19,
	 "at most N titles of each direction", NULL, 0},
	{"direction", OPT_CHOICE, offsetof(trend_opts, direction), "D", NULL, 0, 0,
	 "only rising or only falling titles", direction_names, 0},
	{"occupation", OPT_STR, offsetof(trend_opts, in.occ), "ID", NULL, 0, 0,
	 "only this occupation", NULL, 0},
	OPT_SPEC_LANG(trend_opts, in.lang, "only this language"),
	RANK_SPEC_IDS(trend_opts, in),
	TREND_BARS(BAR_SPEC)
	OPT_SPEC_STORE(trend_opts, in.store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(trend_opts, in.prefix),
	OPT_SPEC_LEXICONS(trend_opts, in.setup),
	OPT_SPEC_END,
};

static const opt_cmd trend_cmd = {
	"trend",
	"usage: titlemill trend --labels FILE [--before FROM..TO] [--after FROM..TO]\n"
	"                       [--as-of DATE] [--period P] [--tsv] [--top N]\n"
	"                       [--direction rising|falling] [--occupation ID] [--lang L]\n"
	"                       [thresholds] (COUNTS|POSTINGS...|-|--store URL [--prefix P])\n"
	"\n"
	"Compares two windows of time occupation by occupation and language by\n"
	"language, and reports the titles whose share of the occupation's postings\n"
	"changed beyond chance (Dunning's G2 on the 2x2 table, shares with Wilson\n"
	"intervals): rising (titles never seen before included) and falling (labels\n"
	"that vanished included), each ranked by G2.  By default the latest complete\n"
	"period is compared with the " OPT_XSTR(TREND_BEFORE_PERIODS) " before it.  The counts need periods:\n"
	"tally them with dated postings.  These are suggestions for a curator, who\n"
	"decides; 'titlemill review add' takes them (rising_title, fading_label).\n"
	"\n",
	trend_specs,
	NULL,
};

static const rec_field trend_fields[] = {
	{"direction", REC_BOTH}, {"occupation", REC_BOTH}, {"occupation_label", REC_BOTH},
	{"lang", REC_BOTH}, {"label", REC_BOTH}, {"key", REC_BOTH}, {"is_label", REC_BOTH},
	{"label_kind", REC_BOTH}, {"postings_before", REC_BOTH}, {"postings_after", REC_BOTH},
	{"occupation_postings_before", REC_BOTH}, {"occupation_postings_after", REC_BOTH},
	{"share_before", REC_BOTH}, {"share_before_low", REC_BOTH},
	{"share_before_high", REC_BOTH}, {"share_after", REC_BOTH},
	{"share_after_low", REC_BOTH}, {"share_after_high", REC_BOTH}, {"g2", REC_BOTH},
	{"first_seen", REC_BOTH}, {"before", REC_BOTH}, {"after", REC_BOTH},
	/* JSON: an array; TSV: one column each (raw titles hold any separator) */
	{"examples", REC_JSON}, {"example_1", REC_TSV}, {"example_2", REC_TSV},
	{"example_3", REC_TSV}, {NULL, 0},
};

_Static_assert(TALLY_EXAMPLES == 3, "trend --tsv has one column per example");

typedef struct trend_out {
	rec r;
	const labelset *ls;
	tally_mem *before, *after;
	const char **first;  /* first_seen of each row of l */
	const trend_list *l;
	char wb[64], wa[64];
	tm_buf k;
} trend_out;

static void write_row(trend_out *o, const trend_row *t)
{
	rec *r = &o->r;
	const char *ex[TALLY_EXAMPLES];
	size_t exl[TALLY_EXAMPLES];
	tally_mem *strong = t->direction == TREND_RISING ? o->after : o->before;
	int nex = tm_examples(strong, t->occ, t->ol, t->lang, t->key, t->kl, ex, exl);
	const char *first = o->first[t - o->l->v];

	rec_begin(r);
	rec_cstr(r, trend_direction_names[t->direction]);
	rec_str(r, t->occ, t->ol);
	cli_occupation_label(r, o->ls, t->occ, t->ol, t->lang);
	rec_cstr(r, t->lang);
	/* the label as the taxonomy writes it, else the display title as the
	 * postings write it (in mixed case, when an example shows it) */
	buf_reset(&o->k);
	if (t->lb)
		rec_str(r, lab_str(o->ls, t->lb->text), t->lb->textlen);
	else if (propose_as_written(ex, exl, nex, t->title, t->tl, &o->k) != 0)
		r->failed = 1;
	else if (o->k.len)
		rec_str(r, o->k.data, o->k.len);
	else
		rec_str(r, t->title, t->tl);
	rec_str(r, t->key, t->kl);
	rec_bool(r, t->lb != NULL);
	if (t->lb)
		rec_cstr(r, t->lb->kind == 'p' ? "pref" : t->lb->kind == 'a' ? "alt" : "hidden");
	else
		rec_null(r);
	rec_u64(r, t->before);
	rec_u64(r, t->after);
	rec_u64(r, t->occ_before);
	rec_u64(r, t->occ_after);
	rec_num(r, t->share_before);
	rec_num(r, t->lo_before);
	rec_num(r, t->hi_before);
	rec_num(r, t->share_after);
	rec_num(r, t->lo_after);
	rec_num(r, t->hi_after);
	rec_num(r, t->g2);
	if (first)
		rec_cstr(r, first);
	else
		rec_null(r);
	rec_cstr(r, o->wb);
	rec_cstr(r, o->wa);
	rec_list_begin(r, "");
	for (int i = 0; i < nex; i++)
		rec_str(r, ex[i], exl[i]);
	rec_list_end(r);
	for (int i = 0; i < TALLY_EXAMPLES; i++)
		if (i < nex)
			rec_str(r, ex[i], exl[i]);
		else
			rec_null(r);
	rec_end(r);
}

int cli_windows_get(const char *cmd, const cli_windows *w, tally_series *s, long *b0,
		    long *b1, long *a0, long *a1)
{
	long today = w->as_of.given ? w->as_of.first : (long)(time(NULL) / 86400);
	/* the given windows first: the earlier one by default is the
	 * periods before the later one, given or not */
	if (w->after.given) {
		*a0 = w->after.first;
		*a1 = w->after.last;
	}
	if (w->before.given) {
		*b0 = w->before.first;
		*b1 = w->before.last;
	}
	int r = trend_default_windows(s, today, w->before.given, w->after.given, b0, b1, a0, a1);
	if (r == -1) {
		fprintf(stderr, "titlemill %s: the counts have no periods (postings without dates, "
			"or a table tallied with --period none): give --before and --after, or "
			"tally dated postings\n", cmd);
		return EXIT_RUNTIME;
	}
	if (r == -2) {
		fprintf(stderr, "titlemill %s: no period of the counts ended before --as-of (today "
			"when not given): give --after\n", cmd);
		return EXIT_RUNTIME;
	}
	if (*b1 >= *a0) {
		fprintf(stderr, "titlemill %s: --before must end before --after starts\n", cmd);
		return EXIT_USAGE;
	}
	return 0;
}

int cmd_trend(int argc, char **argv)
{
	trend_opts o;
	rank_inputs in;
	inputs_survey sv;
	trend_list l = {0};
	tally_mem before, after;
	trend_out to;
	tm_buf out = {0};
	long b0, b1, a0, a1, nb, na;
	int rc;

	memset(&o, 0, sizeof o);
	memset(&to, 0, sizeof to);
	o.in.period = SERIES_AS_READ;
	o.in.by_period = 1;
	tm_init(&before);
	tm_init(&after);
	if (!cli_rank_start(&trend_cmd, &o, &o.in, argc, argv, &in, &sv, &rc)) {
		inputs_free(&in);
		return rc;
	}
	if ((rc = cli_windows_get("trend", &o.win, &in.s, &b0, &b1, &a0, &a1)) != 0)
		goto done;
	nb = series_sum(&in.s, b0, b1, &before);
	na = series_sum(&in.s, a0, a1, &after);
	if (nb < 0 || na < 0) {
		fputs("titlemill trend: out of memory, or the counts add up past 2^64 - 1\n", stderr);
		rc = EXIT_RUNTIME;
		goto done;
	}
	/* the windows as the periods summed cover them: a period partly
	 * inside a window given in another form (a week across two months)
	 * is left out, and said */
	long part = trend_window_used(&in.s, b0, b1, to.wb, sizeof to.wb) +
		    trend_window_used(&in.s, a0, a1, to.wa, sizeof to.wa);
	fprintf(stderr, "titlemill trend: before %s (%ld %s), after %s (%ld %s)\n", to.wb, nb,
		nb == 1 ? "period" : "periods", to.wa, na, na == 1 ? "period" : "periods");
	if (part)
		fprintf(stderr, "titlemill trend: %ld period%s partly inside a window left out\n",
			part, part == 1 ? "" : "s");
	if (!nb || !na) {
		fprintf(stderr, "titlemill trend: the %s window holds no counts: nothing to "
			"compare\n", !na ? "after" : "before");
		rc = EXIT_RUNTIME;
		goto done;
	}
	trend_filter f = {o.in.occ, o.in.lang[0] ? o.in.lang : NULL};
	to.ls = &in.ls;
	to.before = &before;
	to.after = &after;
	rec_init(&to.r, &out, o.tsv ? REC_TSV : REC_JSON, trend_fields);
	to.l = &l;
	if (trend_run(&before, &after, &in.ls, &o.bar, &f, &l) != 0 ||
	    !(to.first = calloc(l.n ? l.n : 1, sizeof *to.first)) ||
	    trend_periods(&in.s, b0, b1, a0, a1, &o.bar, &l, to.first) != 0)
		to.r.failed = 1;
	else {
		uint64_t per[2] = {0};
		rec_header(&to.r);
		for (size_t i = 0; i < l.n; i++) {
			const trend_row *t = &l.v[i];
			if ((o.direction && t->direction != o.direction - 1) ||
			    per[t->direction]++ >= o.top)
				continue;
			write_row(&to, t);
		}
		if (l.one_window)
			fprintf(stderr, "titlemill trend: %llu occupation%s (by language) counted in "
				"one window only: no share to compare\n",
				(unsigned long long)l.one_window, l.one_window == 1 ? "" : "s");
	}
	if (to.r.failed) {
		fputs("titlemill trend: out of memory\n", stderr);
		rc = EXIT_RUNTIME;
	} else
		rc = cli_write_stdout("trend", &out) ? EXIT_RUNTIME : EXIT_OK;
done:
	trend_list_free(&l);
	free(to.first);
	buf_free(&to.k);
	buf_free(&out);
	tm_free(&before);
	tm_free(&after);
	inputs_free(&in);
	return rc;
}

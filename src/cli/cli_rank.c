/* cli_rank.c - titlemill coverage (how much of each occupation's
 * postings its labels already match) and titlemill labels (a taxonomy's
 * labels with their keys): options, inputs, output. */
#include <errno.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli/cli.h"
#include "core/msg.h"
#include "rank/coverage.h"
#include "rank/inputs.h"
#include "cli/options.h"
#include "io/record.h"

typedef struct coverage_opts {
	rank_opts in;
	int json;
} coverage_opts;

const char *const rank_ids_names[] = {"exact", "local", NULL};

static const opt_spec coverage_specs[] = {
	OPT_SPEC_LABELS(coverage_opts, in.setup.labels,
			"the taxonomy's labels: TSV (occupation, kind, lang, label) or SKOS"),
	{"json", OPT_FLAG, offsetof(coverage_opts, json), NULL, NULL, 0, 0,
	 "JSON Lines instead of TSV", NULL, 0},
	{"by-period", OPT_FLAG, offsetof(coverage_opts, in.by_period), NULL, NULL, 0, 0,
	 "one row per occupation, language and period (a first column, period), and a "
	 "'*' row per period: the figures as a time series", NULL, 0},
	{"period", OPT_PERIOD, offsetof(coverage_opts, in.period), "P", NULL, 0, 0,
	 "with --by-period: count postings files by month (the default), week or day, or "
	 "roll counts tables by day up to weeks or months; not given: the tables' periods",
	 NULL, 0},
	{"occupation", OPT_STR, offsetof(coverage_opts, in.occ), "ID", NULL, 0, 0,
	 "only this occupation", NULL, 0},
	OPT_SPEC_LANG(coverage_opts, in.lang, "only this language"),
	RANK_SPEC_IDS(coverage_opts, in),
	RANK_SPEC_WINDOW(coverage_opts, in),
	OPT_SPEC_STORE(coverage_opts, in.store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(coverage_opts, in.prefix),
	OPT_SPEC_LEXICONS(coverage_opts, in.setup),
	OPT_SPEC_END,
};

static const opt_cmd coverage_cmd = {
	"coverage",
	"usage: titlemill coverage --labels FILE [--json] [--occupation ID] [--lang L]\n"
	"                          [--by-period [--period P]] [--from DATE] [--to DATE]\n"
	"                          [--ids local] [--id-map FILE] [--strict]\n"
	"                          (COUNTS|POSTINGS...|-|--store URL [--prefix P])\n"
	"\n"
	"Per occupation and language: its name (occupation_label), postings,\n"
	"postings whose key matches one of its labels (a share with its Wilson\n"
	"95 % interval), the share matched by the preferred label alone, labels\n"
	"never seen, and the top unmatched titles.  A last line '*' sums all\n"
	"occupations: its postings count posting-occupation pairs (a posting coded\n"
	"to two occupations counts twice), its distinct_postings each posting once.\n"
	"Inputs are counts tables (from tally or counts) or postings files (counted\n"
	"in memory first, with the labels protected), or what a store holds; '-'\n"
	"reads standard input, a counts table or postings as its header says.\n"
	"\n",
	coverage_specs,
	NULL,
};

/* A coverage row: the fields of both formats (by period: period first). */
#define COVERAGE_FIELDS \
	{"occupation", REC_BOTH}, {"occupation_label", REC_BOTH}, {"lang", REC_BOTH}, \
	{"postings", REC_BOTH}, {"distinct_postings", REC_BOTH}, {"matched", REC_BOTH}, \
	{"coverage", REC_BOTH}, {"coverage_low", REC_BOTH}, \
	{"coverage_high", REC_BOTH}, {"pref_matched", REC_BOTH}, {"pref_coverage", REC_BOTH}, \
	{"labels", REC_BOTH}, {"labels_unseen", REC_BOTH}, {"top_unmatched", REC_BOTH}, \
	{NULL, 0}
static const rec_field coverage_fields[] = {COVERAGE_FIELDS};
static const rec_field coverage_period_fields[] = {{"period", REC_BOTH}, COVERAGE_FIELDS};

typedef struct coverage_out {
	rec r;
	const labelset *ls;
	const series_period *period; /* --by-period: the period of the rows */
	uint64_t distinct;  /* of the '*' row */
	uint64_t rows;      /* occupation rows written */
} coverage_out;

/* The name of an occupation for curators (labels_pref), or null. */
void cli_occupation_label(rec *r, const labelset *ls, const char *occ, size_t ol,
			  const char *lang)
{
	const label *lb = labels_pref(ls, occ, ol, lang);
	if (lb)
		rec_str(r, lab_str(ls, lb->text), lb->textlen);
	else
		rec_null(r);
}

static int write_row(void *ctx, const coverage_row *row)
{
	coverage_out *co = ctx;
	rec *r = &co->r;
	int total = row->ol == 1 && row->occ[0] == '*' && !strcmp(row->lang, "*");
	rec_begin(r);
	if (co->period)
		rec_str(r, co->period->label, co->period->len);
	rec_str(r, row->occ, row->ol);
	if (total)
		rec_null(r);
	else
		cli_occupation_label(r, co->ls, row->occ, row->ol, row->lang);
	rec_cstr(r, row->lang);
	rec_u64(r, row->postings);
	rec_u64(r, total ? co->distinct : row->postings);
	co->rows += !total;
	rec_u64(r, row->matched);
	rec_num(r, row->share);
	rec_num(r, row->low);
	rec_num(r, row->high);
	rec_u64(r, row->pref_matched);
	rec_num(r, row->pref_share);
	rec_u64(r, row->labels);
	rec_u64(r, row->unseen);
	rec_list_begin(r, "; ");
	for (int i = 0; i < row->ntop; i++) {
		const coverage_title *t = &row->top[i];
		if (rec_is_json(r)) {
			rec_obj_begin(r);
			rec_member_str(r, "title", t->title, t->tl);
			rec_member_str(r, "key", t->key, t->kl);
			rec_member_u64(r, "postings", t->postings);
			rec_obj_end(r);
		} else
			rec_cell_counted(r, t->title, t->tl, t->postings);
	}
	rec_list_end(r);
	return rec_end(r);
}

/* Writes out to standard output: 0, or -1 after saying why not. */
int cli_write_stdout(const char *cmd, const tm_buf *out)
{
	if (fwrite(out->data ? out->data : "", 1, out->len, stdout) != out->len ||
	    fflush(stdout) != 0) {
		fprintf(stderr, "titlemill %s: write error: %s\n", cmd, strerror(errno));
		return -1;
	}
	return 0;
}

/* Warns when the labels' ids do not meet the postings' codes, and when
 * a filter matches nothing.  Returns 0, or -1 to stop (--strict). */
static int survey_say(const rank_opts *ro, const rank_inputs *in,
		      const inputs_survey *sv)
{
	const char *lang = ro->lang[0] ? ro->lang : NULL;
	if (inputs_ids_doubtful(sv)) {
		fprintf(stderr, "%s: only %llu of the %llu occupation%s of the postings ha%s labels "
			"in %s (none for", msg_prefix(), (unsigned long long)sv->labelled,
			(unsigned long long)sv->occupations, msg_plural(sv->occupations),
			sv->labelled == 1 ? "s" : "ve", ro->setup.labels);
		for (int i = 0; i < sv->nunmatched; i++)
			fprintf(stderr, "%s %.*s", i ? "," : "", (int)sv->unmatched_len[i],
				sv->unmatched[i]);
		if ((uint64_t)sv->nunmatched < sv->occupations - sv->labelled)
			fputs(", ...", stderr);
		fputs(")", stderr);
		if (in->ls.n)
			fprintf(stderr, "; the labels name occupations such as %s",
				lab_str(&in->ls, in->ls.v[0].occ));
		fprintf(stderr, ".  Do the ids match the codes?  --ids local matches on the "
			"last path segment or fragment of both, --id-map FILE maps codes to "
			"concepts%s\n", ro->strict ? " (--strict: stopped)" : "");
		if (ro->strict)
			return -1;
	}
	if (ro->occ && !sv->occ_seen)
		fprintf(stderr, "%s: --occupation %s: no postings of this occupation in the "
			"counts%s\n", msg_prefix(), ro->occ,
			labels_has_occ(&in->ls, ro->occ, strlen(ro->occ)) ? " (the labels know it)"
									   : "");
	if (lang && !sv->lang_seen)
		fprintf(stderr, "%s: --lang %s: no postings in this language in the counts\n",
			msg_prefix(), lang);
	if (ro->occ && lang && sv->occ_seen && sv->lang_seen && !sv->both_seen)
		fprintf(stderr, "%s: --occupation %s --lang %s: no postings of this occupation "
			"in this language\n", msg_prefix(), ro->occ, lang);
	return 0;
}

int cli_rank_start(const opt_cmd *cmd, void *o, const rank_opts *ro, int argc, char **argv,
		   rank_inputs *in, inputs_survey *sv, int *status)
{
	int first;
	tm_buf err = {0};

	memset(in, 0, sizeof *in);
	switch (opt_parse(cmd, o, argc, argv, &first)) {
	case OPT_HELP_SHOWN: *status = EXIT_OK; return 0;
	case OPT_MISUSE: *status = EXIT_USAGE; return 0;
	}
	*status = EXIT_USAGE;
	if (!ro->setup.labels) {
		fprintf(stderr, "titlemill %s: --labels FILE is required\n", cmd->name);
		return 0;
	}
	if (!ro->store && first >= argc) {
		fprintf(stderr, "titlemill %s: name a counts table or postings files, or --store\n",
			cmd->name);
		return 0;
	}
	int dashes = 0;
	for (int i = first; i < argc; i++)
		dashes += !strcmp(argv[i], "-");
	if (dashes > 1) {
		fprintf(stderr, "titlemill %s: '-' (standard input) can be read once\n", cmd->name);
		return 0;
	}
	rank_sources src = {&ro->setup, ro->store, ro->prefix, argv + first, argc - first,
			    (size_t)OPT_MEMO_MIB << 20, ro->ids == 2, ro->id_map,
			    ro->by_period ? ro->period : PERIOD_NONE, 0, 0, 0};
	if (!ro->by_period && ro->period != SERIES_AS_READ && ro->period != PERIOD_NONE) {
		fprintf(stderr, "titlemill %s: --period applies with --by-period\n", cmd->name);
		return 0;
	}
	if ((src.windowed = opt_window(cmd->name, &ro->from, &ro->to, &src.from, &src.to)) < 0)
		return 0;
	if (inputs_load(in, &src, stderr, &err) != 0) {
		fprintf(stderr, "titlemill %s: %.*s\n", cmd->name, (int)err.len,
			err.data ? err.data : "");
		*status = EXIT_RUNTIME;
	} else if (inputs_survey_run(in, ro->occ, ro->lang[0] ? ro->lang : NULL, sv) != 0) {
		fprintf(stderr, "titlemill %s: out of memory\n", cmd->name);
		*status = EXIT_RUNTIME;
	} else {
		if (src.windowed)
			cli_window_note(cmd->name, &in->s, in->m.occs.n || in->m.keys.n);
		*status = survey_say(ro, in, sv) ? EXIT_RUNTIME : EXIT_OK;
	}
	buf_free(&err);
	return *status == EXIT_OK;
}

void cli_window_note(const char *cmd, const tally_series *s, int any)
{
	size_t shown = 0;
	if (s->partial) {
		fprintf(stderr, "titlemill %s: note: %llu %s only partly inside --from..--to, "
			"left out:", cmd, (unsigned long long)s->partial,
			s->partial == 1 ? "period lies" : "periods lie");
		for (size_t i = 0; i < s->left.n && shown < 3; i++)
			if (s->left.ent[i].count == 2) {
				size_t n;
				const char *k = st_key(&s->left, i, &n);
				fprintf(stderr, "%s %.*s", shown++ ? "," : "", (int)n, k);
			}
		fprintf(stderr, "%s\n", s->partial > shown ? ", ..." : "");
	}
	if (!any && (s->dropped || s->partial))
		fprintf(stderr, "titlemill %s: warning: no counts lie within --from..--to "
			"(%llu %s outside it)\n", cmd, (unsigned long long)(s->dropped + s->partial),
			s->dropped + s->partial == 1 ? "period lies" : "periods lie");
}

int cmd_coverage(int argc, char **argv)
{
	coverage_opts o;
	rank_inputs in;
	inputs_survey sv;
	coverage_filter f = {NULL, NULL};
	tm_buf out = {0};
	coverage_out co;
	int rc;

	memset(&o, 0, sizeof o);
	o.in.period = SERIES_AS_READ; /* --period, only with --by-period */
	if (!cli_rank_start(&coverage_cmd, &o, &o.in, argc, argv, &in, &sv, &rc)) {
		inputs_free(&in);
		return rc;
	}
	f.occ = o.in.occ;
	f.lang = o.in.lang[0] ? o.in.lang : NULL;
	memset(&co, 0, sizeof co);
	co.ls = &in.ls;
	co.distinct = sv.distinct;
	rec_init(&co.r, &out, o.json ? REC_JSON : REC_TSV,
		 o.in.by_period ? coverage_period_fields : coverage_fields);
	rec_header(&co.r);
	if (!o.in.by_period)
		rc = coverage_run(&in.m, &in.ls, &f, write_row, &co);
	else {
		size_t np;
		series_period **v = series_sorted(&in.s, &np);
		rc = !v && in.s.n ? -1 : 0;
		for (size_t i = 0; i < np && rc == 0; i++) {
			inputs_survey ps;
			co.period = v[i];
			if ((rc = inputs_survey_counts(&v[i]->m, &in.ls, f.occ, f.lang, &ps)) == 0) {
				co.distinct = ps.distinct;
				rc = coverage_run(&v[i]->m, &in.ls, &f, write_row, &co);
			}
		}
		free(v);
	}
	if (rc != 0 || co.r.failed) {
		fputs("titlemill coverage: out of memory\n", stderr);
		rc = EXIT_RUNTIME;
	} else
		rc = cli_write_stdout("coverage", &out) ? EXIT_RUNTIME : EXIT_OK;
	buf_free(&out);
	inputs_free(&in);
	return rc;
}

static const rec_field label_fields[] = {
	{"occupation", REC_TSV}, {"kind", REC_TSV}, {"lang", REC_TSV}, {"label", REC_TSV},
	{"key", REC_TSV}, {NULL, 0},
};

/* titlemill labels: a taxonomy's labels (TSV or SKOS) as a labels TSV
 * with their match keys. */
int cmd_labels(int argc, char **argv)
{
	setup_opts so;
	tm_buf err = {0}, out = {0};
	rec r;
	int rc = EXIT_OK;

	memset(&so, 0, sizeof so);
	if (argc < 2 || !strcmp(argv[1], "--help") || !strcmp(argv[1], "-h")) {
		fputs("usage: titlemill labels FILE...\n\n"
		      "Prints the labels of labels TSVs or SKOS files (Turtle .ttl, N-Triples .nt:\n"
		      "skos:prefLabel, altLabel, hiddenLabel with a language tag) as one labels\n"
		      "TSV, with each label's match key; doubtful labels are reported.\n",
		      argc < 2 ? stderr : stdout);
		return argc < 2 ? EXIT_USAGE : EXIT_OK;
	}
	lexicon *lx = setup_lexicon(&so, &err);
	normaliser *nm = lx ? norm_new(lx) : NULL;
	if (!nm) {
		fprintf(stderr, "titlemill labels: %.*s\n", (int)err.len, err.data ? err.data : "out of memory");
		lex_free(lx);
		buf_free(&err);
		return EXIT_RUNTIME;
	}
	rec_init(&r, &out, REC_TSV, label_fields);
	rec_header(&r);
	for (int i = 1; i < argc && rc == EXIT_OK; i++) {
		labelset ls;
		if (labels_read(&ls, argv[i], nm, stderr, &err) != 0) {
			fprintf(stderr, "titlemill labels: %.*s\n", (int)err.len, err.data);
			rc = EXIT_RUNTIME;
		} else
			for (size_t k = 0; k < ls.n; k++) {
				const label *lb = &ls.v[k];
				rec_begin(&r);
				rec_str(&r, lab_str(&ls, lb->occ), lb->occlen);
				rec_cstr(&r, lb->kind == 'p' ? "pref" : lb->kind == 'a' ? "alt" : "hidden");
				rec_cstr(&r, lb->lang);
				rec_str(&r, lab_str(&ls, lb->text), lb->textlen);
				rec_str(&r, lab_str(&ls, lb->key), lb->keylen);
				rec_end(&r);
			}
		labels_free(&ls);
	}
	if (rc == EXIT_OK && r.failed) {
		fputs("titlemill labels: out of memory\n", stderr);
		rc = EXIT_RUNTIME;
	}
	if (rc == EXIT_OK && cli_write_stdout("labels", &out) != 0)
		rc = EXIT_RUNTIME;
	buf_free(&out);
	buf_free(&err);
	norm_free(nm);
	lex_free(lx);
	return rc;
}

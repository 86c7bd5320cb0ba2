/* cli_match.c - titlemill match: free text (raw titles, clean titles,
 * short descriptions) to the taxonomy's occupations, one answer per input
 * line (match.h scores them). */
#include <errno.h>
#include <stddef.h>
#include <stdio.h>
#include <string.h>
#include <time.h>

#include "cli/cli.h"
#include "cli/options.h"
#include "core/lang.h"
#include "io/decode.h"
#include "io/jsonw.h"
#include "io/reader.h"
#include "io/record.h"
#include "io/tsv.h"
#include "match/match.h"

typedef struct match_opts {
	rank_opts in;
	opt_strs counts;
	char lang[4];
	int json, tsv_input, stats;
	uint64_t top, min_postings;
	double min_score;
} match_opts;

static const opt_spec match_specs[] = {
	OPT_SPEC_LABELS(match_opts, in.setup.labels,
			"the taxonomy's labels: TSV (occupation, kind, lang, label) or SKOS"),
	{"counts", OPT_STRS, offsetof(match_opts, counts), "TABLE", NULL, 0, 0,
	 "the evidence of the market: a counts table (from tally or counts) or a postings "
	 "file (repeatable)", NULL, 0},
	OPT_SPEC_STORE(match_opts, in.store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(match_opts, in.prefix),
	{"top", OPT_U64, offsetof(match_opts, top), "K", "5", 1, MATCH_TOP_MAX,
	 "candidates per line with --json", NULL, 0},
	{"min-score", OPT_REAL, offsetof(match_opts, min_score), "X", OPT_XSTR(MATCH_MIN_SCORE_SHOW), 0, 1,
	 "only candidates scoring at least X (0 to 1)", NULL, 0},
	OPT_SPEC_LANG(match_opts, lang, "the texts' language (BCP 47): the normaliser's hint; "
		      "labels in it are preferred"),
	{"tsv-input", OPT_FLAG, offsetof(match_opts, tsv_input), NULL, NULL, 0, 0,
	 "the input is a TSV with a header: the text in column text (or title), "
	 "its language in column lang", NULL, 0},
	{"json", OPT_FLAG, offsetof(match_opts, json), NULL, NULL, 0, 0,
	 "one JSON object per line with up to --top candidates and their evidence", NULL, 0},
	{"min-postings", OPT_U64, offsetof(match_opts, min_postings), "N",
	 OPT_XSTR(MATCH_SIM_MIN_POSTINGS), 1, 1e18,
	 "counted titles with fewer postings are looked up exactly, not searched by similarity",
	 NULL, 0},
	OPT_SPEC_LEXICONS(match_opts, in.setup),
	{"stats", OPT_FLAG, offsetof(match_opts, stats), NULL, NULL, 0, 0,
	 "say on standard error what the index holds and how long loading, building "
	 "and matching took", NULL, 0},
	OPT_SPEC_END,
};

static const opt_cmd match_cmd = {
	"match",
	"usage: titlemill match --labels FILE [--counts TABLE]... [--store URL [--prefix P]]\n"
	"                       [--top K] [--min-score X] [--lang L] [--json] [--tsv-input]\n"
	"                       [FILE...]\n"
	"\n"
	"Finds, for each input line (a raw posting title, a clean title or a short\n"
	"description), the occupations of the taxonomy it names: by its match key\n"
	"on the labels (via label), on the counted titles with the share of their\n"
	"postings coded to each occupation (via title), the same ignoring separators\n"
	"and compounding (via variant), else by similarity (TF-IDF character 3-grams\n"
	"and word BM25, via similar), and a word such as RN or CSR as the initials of\n"
	"a label's or a title's words (via acronym).  Scores run from 0 to 1 (see README.md).  One\n"
	"line out per line in: TSV with a header, the best candidate (empty fields\n"
	"when none reaches --min-score), or with --json the --top best.  Reads the\n"
	"FILEs, or standard input ('-').\n"
	"\n",
	match_specs,
	NULL,
};

static const rec_field match_fields[] = {
	{"text", REC_TSV}, {"title", REC_TSV}, {"occupation", REC_TSV},
	{"occupation_label", REC_TSV}, {"score", REC_TSV}, {"via", REC_TSV},
	{"matched", REC_TSV}, {NULL, 0},
};

typedef struct run {
	const match_opts *o;
	rank_inputs *in;
	match_index *ix;
	match_work *w;
	tm_buf out, fix;
	rec r;
	int wfail;
	long repaired, cut, lines;
} run;

static double now(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + ts.tv_nsec / 1e9;
}

static const char *occ_label(const run *R, const match_cand *c, const char *lang, size_t *n)
{
	const label *lb = labels_pref(&R->in->ls, c->occ, c->ol, lang ? lang : "");
	if (!lb) {
		*n = 0;
		return "";
	}
	*n = lb->textlen;
	return lab_str(&R->in->ls, lb->text);
}

static void json_counts(tm_buf *b, const match_cand *c)
{
	buf_puts(b, "\"postings\":");
	json_u64(b, c->postings);
	if (!c->postings)
		return;
	buf_puts(b, ",\"occupation_postings\":");
	json_u64(b, c->occ_postings);
	buf_puts(b, ",\"share\":");
	json_num(b, c->share);
	buf_puts(b, ",\"share_low\":");
	json_num(b, c->low);
	buf_puts(b, ",\"share_high\":");
	json_num(b, c->high);
}

static void json_line(run *R, const char *text, size_t tn, const norm_result *res,
		      const char *lang, const match_cand *c, size_t nc)
{
	tm_buf *b = &R->out;
	buf_puts(b, "{\"text\":");
	json_str(b, text, tn);
	buf_puts(b, ",\"title\":");
	json_str(b, res->title, res->title_len);
	buf_puts(b, ",\"key\":");
	json_str(b, res->key, res->key_len);
	buf_puts(b, ",\"lang\":");
	if (lang)
		json_str(b, lang, strlen(lang));
	else
		buf_puts(b, "null");
	buf_puts(b, ",\"candidates\":[");
	for (size_t i = 0; i < nc; i++) {
		size_t ln;
		const char *lt = occ_label(R, &c[i], lang, &ln);
		buf_puts(b, i ? ",{\"occupation\":" : "{\"occupation\":");
		json_str(b, c[i].occ, c[i].ol);
		buf_puts(b, ",\"occupation_label\":");
		json_str(b, lt, ln);
		buf_puts(b, ",\"score\":");
		json_num(b, c[i].score);
		json_field(b, "via", match_via_name(c[i].via));
		buf_puts(b, ",\"matched\":");
		json_str(b, c[i].matched, c[i].ml);
		buf_puts(b, ",\"evidence\":{");
		if ((c[i].via == VIA_LABEL || c[i].via == VIA_VARIANT || c[i].via == VIA_ACRONYM) &&
		    c[i].lang[0]) {
			buf_puts(b, "\"label_lang\":");
			json_str(b, c[i].lang, strlen(c[i].lang));
			buf_putc(b, ',');
		}
		if (c[i].via == VIA_ACRONYM) {
			buf_puts(b, "\"fit\":");
			json_num(b, c[i].afit);
			buf_puts(b, ",\"acronym_share\":");
			json_num(b, c[i].ashare);
			buf_putc(b, ',');
		}
		if (c[i].via == VIA_SIMILAR) {
			buf_puts(b, "\"nearest\":[");
			for (int k = 0; k < c[i].nnear; k++) {
				buf_puts(b, k ? ",{\"text\":" : "{\"text\":");
				json_str(b, c[i].near[k].text, c[i].near[k].len);
				json_field(b, "kind", c[i].near[k].label ? "label" : "title");
				buf_puts(b, ",\"similarity\":");
				json_num(b, c[i].near[k].sim);
				buf_putc(b, '}');
			}
			buf_puts(b, "],");
		}
		json_counts(b, &c[i]);
		buf_puts(b, "}}");
	}
	buf_puts(b, "]}\n");
}

static void tsv_line(run *R, const char *text, size_t tn, const norm_result *res,
		     const char *lang, const match_cand *c, size_t nc)
{
	rec *r = &R->r;
	rec_begin(r);
	rec_str(r, text, tn);
	rec_str(r, res->title, res->title_len);
	if (nc) {
		size_t ln;
		const char *lt = occ_label(R, c, lang, &ln);
		rec_str(r, c->occ, c->ol);
		rec_str(r, lt, ln);
		rec_num(r, c->score);
		rec_cstr(r, match_via_name(c->via));
		rec_str(r, c->matched, c->ml);
	} else
		for (int i = 0; i < 5; i++)
			rec_str(r, "", 0);
	rec_end(r);
}

static int flush_out(run *R)
{
	if (R->out.len && fwrite(R->out.data, 1, R->out.len, stdout) != R->out.len) {
		fprintf(stderr, "titlemill match: write error: %s\n", strerror(errno));
		R->wfail = 1;
		return -1;
	}
	buf_reset(&R->out);
	return 0;
}

/* Matches one text and appends its line.  0, or -1 when memory ran out. */
static int one(run *R, const char *s, size_t n, const char *lang)
{
	norm_result res;
	const match_cand *c;
	size_t nc;
	const char *text = s;
	size_t tn = n;

	if (lang && !*lang)
		lang = NULL;
	R->lines++;
	if (norm_title(R->in->nm, s, n, lang, &res) != 0)
		return -1;
	if (res.repaired) {
		R->repaired++;
		buf_reset(&R->fix);
		if (dec_repair(s, n, &R->fix) < 0)
			return -1;
		text = R->fix.data ? R->fix.data : "";
		tn = R->fix.len;
	}
	if (match_find(R->ix, R->w, res.key, res.key_len, lang, R->o->json ? R->o->top : 1,
		       R->o->min_score, &c, &nc) != 0)
		return -1;
	if (R->o->json)
		json_line(R, text, tn, &res, lang, c, nc);
	else
		tsv_line(R, text, tn, &res, lang, c, nc);
	if (buf_status(&R->out) || R->r.failed)
		return -1;
	if (R->out.len >= (1 << 16) && flush_out(R) != 0)
		return -2;
	return 0;
}

static int run_lines(run *R, const char *path)
{
	line_reader lr;
	const char *s;
	size_t n;
	int r;

	if (lr_open(&lr, path) != 0) {
		fprintf(stderr, "titlemill match: %s: %s\n", path, strerror(errno));
		return EXIT_RUNTIME;
	}
	while ((r = lr_next(&lr, &s, &n)) > 0) {
		if (lr.cut)
			R->cut++;
		int k = one(R, s, n, R->o->lang);
		if (k) {
			if (k == -1)
				fprintf(stderr, "titlemill match: %s:%ld: out of memory\n", lr.name, lr.lineno);
			lr_close(&lr);
			return EXIT_RUNTIME;
		}
	}
	if (r < 0) {
		fprintf(stderr, "titlemill match: %s:%ld: %s%s\n", lr.name, lr.lineno + 1,
			lr.utf16 ? "" : "read error: ", lr_strerror(&lr));
		lr_close(&lr);
		return EXIT_RUNTIME;
	}
	lr_close(&lr);
	return EXIT_OK;
}

static int run_tsv(run *R, const char *path)
{
	tsv_reader t;
	int r, ct, cl;

	if (tsv_open(&t, path) != TM_OK) {
		fprintf(stderr, "titlemill match: %.*s\n", (int)t.err.len, t.err.data ? t.err.data : "");
		tsv_close(&t);
		return EXIT_RUNTIME;
	}
	ct = tsv_col(&t, "text");
	if (ct < 0)
		ct = tsv_col(&t, "title");
	cl = tsv_col(&t, "lang");
	if (ct < 0) {
		fprintf(stderr, "titlemill match: %s: no column text or title in the header\n",
			t.lr.name);
		tsv_close(&t);
		return EXIT_RUNTIME;
	}
	while ((r = tsv_next(&t)) > 0) {
		size_t n, ln;
		const char *s = tsv_field(&t, ct, &n), *lf = tsv_field(&t, cl, &ln);
		char tag[4] = "", raw[64];
		const char *lang = R->o->lang;
		if (ln) {
			if (ln >= sizeof raw || (memcpy(raw, lf, ln), raw[ln] = 0, lang_tag(raw, tag)) != 0) {
				fprintf(stderr, "titlemill match: %s:%ld: lang '%.*s' is not a BCP 47 "
					"language tag\n", t.lr.name, t.lr.lineno, (int)(ln < 64 ? ln : 64), lf);
				tsv_close(&t);
				return EXIT_RUNTIME;
			}
			lang = tag;
		}
		int k = one(R, s, n, lang);
		if (k) {
			if (k == -1)
				fprintf(stderr, "titlemill match: %s:%ld: out of memory\n", t.lr.name,
					t.lr.lineno);
			tsv_close(&t);
			return EXIT_RUNTIME;
		}
	}
	if (r < 0) {
		fprintf(stderr, "titlemill match: %.*s\n", (int)t.err.len, t.err.data ? t.err.data : "");
		tsv_close(&t);
		return EXIT_RUNTIME;
	}
	tsv_close(&t);
	return EXIT_OK;
}

int cmd_match(int argc, char **argv)
{
	match_opts o;
	rank_inputs in;
	run R;
	tm_buf err = {0};
	int first, rc = EXIT_OK;

	memset(&o, 0, sizeof o);
	memset(&R, 0, sizeof R);
	memset(&in, 0, sizeof in);
	switch (opt_parse(&match_cmd, &o, argc, argv, &first)) {
	case OPT_HELP_SHOWN: return EXIT_OK;
	case OPT_MISUSE: return EXIT_USAGE;
	}
	if (!o.in.setup.labels) {
		fputs("titlemill match: --labels FILE is required\n", stderr);
		return EXIT_USAGE;
	}
	rank_sources src = {&o.in.setup, o.in.store, o.in.prefix, (char *const *)o.counts.v,
			    o.counts.n, (size_t)OPT_MEMO_MIB << 20, 0, NULL, PERIOD_NONE, 0, 0, 0};
	match_conf conf = {o.min_postings};
	double t0 = now(), t1 = 0, t2 = 0;
	if (inputs_load(&in, &src, stderr, &err) != 0 ||
	    (t1 = now(), match_build(&R.ix, &in.ls, &in.m, &conf, &err)) != TM_OK) {
		fprintf(stderr, "titlemill match: %.*s\n", (int)err.len, err.data ? err.data : "");
		rc = EXIT_RUNTIME;
		goto done;
	}
	t2 = now();
	tm_free(&in.m); /* the index holds what it needs */
	tm_init(&in.m);
	if (!(R.w = match_work_new(R.ix))) {
		fputs("titlemill match: out of memory\n", stderr);
		rc = EXIT_RUNTIME;
		goto done;
	}
	R.o = &o;
	R.in = &in;
	rec_init(&R.r, &R.out, REC_TSV, match_fields);
	if (!o.json)
		rec_header(&R.r);
	if (first >= argc)
		rc = o.tsv_input ? run_tsv(&R, "-") : run_lines(&R, "-");
	for (int i = first; i < argc && rc == EXIT_OK; i++)
		rc = o.tsv_input ? run_tsv(&R, argv[i]) : run_lines(&R, argv[i]);
	if (!R.wfail && (flush_out(&R) != 0 || fflush(stdout) != 0)) {
		if (!R.wfail)
			fprintf(stderr, "titlemill match: write error: %s\n", strerror(errno));
		rc = EXIT_RUNTIME;
	}
	if (o.stats) {
		size_t docs, nsim, bytes;
		double t3 = now();
		match_stats(R.ix, &docs, &nsim, &bytes);
		fprintf(stderr, "titlemill match: loaded in %.3f s; index of %zu keys (%zu searched "
			"by similarity, %.1f MiB) built in %.3f s; %ld line%s matched in %.3f s "
			"(%.0f lines/s)\n", t1 - t0, docs, nsim, (double)bytes / 1048576.0, t2 - t1,
			R.lines, R.lines == 1 ? "" : "s", t3 - t2,
			t3 > t2 ? (double)R.lines / (t3 - t2) : 0.0);
	}
	if (R.repaired)
		fprintf(stderr, "titlemill match: %ld line%s with invalid UTF-8, NUL or a bad "
			"character reference (repaired)\n", R.repaired, R.repaired == 1 ? "" : "s");
	if (R.cut)
		fprintf(stderr, "titlemill match: %ld line%s longer than 1 MiB (cut; the rest of "
			"the line was not read)\n", R.cut, R.cut == 1 ? "" : "s");
done:
	match_work_free(R.w);
	match_free(R.ix);
	inputs_free(&in);
	buf_free(&R.out);
	buf_free(&R.fix);
	buf_free(&err);
	return rc;
}

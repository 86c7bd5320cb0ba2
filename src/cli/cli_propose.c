/* cli_propose.c - titlemill propose: the ranker's suggestions as JSON
 * Lines or TSV.  The bars and their defaults are in propose.h. */
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include "cli/cli.h"
#include "rank/inputs.h"
#include "cli/options.h"
#include "rank/propose.h"
#include "io/record.h"

typedef struct propose_opts {
	rank_opts in;
	int tsv, kind;     /* kind: 1 + the kind's index, 0 for all */
	uint64_t top;      /* UINT64_MAX: all */
	propose_bars bar;
} propose_opts;

#define BAR_SPEC(type, kind, m, opt, arg, def, lo, hi, meaning) \
	{opt, kind, offsetof(propose_opts, bar.m), arg, OPT_XSTR(def), lo, hi, meaning, NULL, 0},

static const opt_spec propose_specs[] = {
	OPT_SPEC_LABELS(propose_opts, in.setup.labels,
			"the taxonomy's labels: TSV (occupation, kind, lang, label) or SKOS"),
	{"tsv", OPT_FLAG, offsetof(propose_opts, tsv), NULL, NULL, 0, 0,
	 "a table instead of JSON Lines", NULL, 0},
	{"top", OPT_U64, offsetof(propose_opts, top), "N", NULL, 0, 1.8e19,
	 "at most N suggestions of each kind", NULL, 0},
	{"kind", OPT_CHOICE, offsetof(propose_opts, kind), "K", NULL, 0, 0, "only this kind",
	 propose_kind_names, 0},
	{"occupation", OPT_STR, offsetof(propose_opts, in.occ), "ID", NULL, 0, 0,
	 "only this occupation", NULL, 0},
	OPT_SPEC_LANG(propose_opts, in.lang, "only this language"),
	RANK_SPEC_IDS(propose_opts, in),
	RANK_SPEC_WINDOW(propose_opts, in),
	PROPOSE_BARS(BAR_SPEC)
	OPT_SPEC_STORE(propose_opts, in.store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(propose_opts, in.prefix),
	OPT_SPEC_LEXICONS(propose_opts, in.setup),
	OPT_SPEC_END,
};

static const opt_cmd propose_cmd = {
	"propose",
	"usage: titlemill propose --labels FILE [--tsv] [--top N] [--kind K]\n"
	"                         [--occupation ID] [--lang L] [thresholds]\n"
	"                         [--ids local] [--id-map FILE] [--strict]\n"
	"                         (COUNTS|POSTINGS...|-|--store URL [--prefix P])\n"
	"\n"
	"Scored suggestions for the taxonomy's curators, as JSON Lines (or TSV):\n"
	"new_alt_label, new_hidden_label, rare_label, used_elsewhere, each with\n"
	"its evidence and the occupation's name (occupation_label).  They inform a\n"
	"curator, who decides.  In TSV the examples are the columns example_1 to\n"
	"example_3.  '-' reads standard input, a counts table or postings as its\n"
	"header says.\n"
	"\n",
	propose_specs,
	NULL,
};

/* A suggestion: the fields of both formats. */
static const rec_field sugg_fields[] = {
	{"id", REC_BOTH}, {"kind", REC_BOTH}, {"occupation", REC_BOTH},
	{"occupation_label", REC_BOTH}, {"lang", REC_BOTH},
	{"label", REC_BOTH}, {"key", REC_JSON}, {"label_as_written", REC_JSON},
	{"label_kind", REC_JSON}, {"strength", REC_BOTH}, {"score", REC_BOTH},
	{"postings", REC_BOTH},
	{"occupation_postings", REC_BOTH}, {"key_postings", REC_BOTH},
	{"lang_postings", REC_JSON}, {"share", REC_BOTH}, {"share_low", REC_BOTH},
	{"share_high", REC_BOTH}, {"precision", REC_BOTH}, {"g2", REC_BOTH},
	{"competitor", REC_BOTH}, {"competitor_postings", REC_TSV}, {"variant_of", REC_BOTH}, {"variant", REC_JSON},
	/* JSON: an array; TSV: one column each (raw titles hold any separator) */
	{"examples", REC_JSON}, {"example_1", REC_TSV}, {"example_2", REC_TSV},
	{"example_3", REC_TSV}, {NULL, 0},
};

_Static_assert(TALLY_EXAMPLES == 3, "propose --tsv has one column per example");

static void write_sugg(rec *r, const propose_sugg *s, tally_mem *m, const labelset *ls,
		       tm_buf *scratch)
{
	double lo, hi, share = s->occ_postings ? (double)s->postings / (double)s->occ_postings : 0;
	const char *ex[TALLY_EXAMPLES];
	size_t exl[TALLY_EXAMPLES];
	int nex = tm_examples(m, s->occ, s->ol, s->lang, s->key, s->kl, ex, exl);

	wilson(s->postings, s->occ_postings, STATS_Z95, &lo, &hi);
	rec_begin(r);
	rec_cstr(r, s->id);
	rec_cstr(r, propose_kind_names[s->kind]);
	rec_str(r, s->occ, s->ol);
	cli_occupation_label(r, ls, s->occ, s->ol, s->lang);
	rec_cstr(r, s->lang);
	rec_str(r, s->text, s->tl);
	rec_str(r, s->key, s->kl);
	/* the title as the postings write it, when it differs */
	buf_reset(scratch);
	if (s->is_title && rec_is_json(r) &&
	    propose_as_written(ex, exl, nex, s->text, s->tl, scratch) != 0)
		r->failed = 1;
	if (scratch->len && (scratch->len != s->tl || memcmp(scratch->data, s->text, s->tl)))
		rec_str(r, scratch->data, scratch->len);
	else
		rec_omit(r);
	if ((s->kind == PROPOSE_RARE || s->kind == PROPOSE_ELSEWHERE) && s->lb)
		rec_cstr(r, s->lb->kind == 'p' ? "pref" : s->lb->kind == 'a' ? "alt" : "hidden");
	else
		rec_omit(r);
	rec_num(r, s->strength);
	rec_num(r, s->score);
	rec_u64(r, s->postings);
	rec_u64(r, s->occ_postings);
	rec_u64(r, s->key_postings);
	rec_u64(r, s->lang_postings);
	rec_num(r, share);
	rec_num(r, lo);
	rec_num(r, hi);
	rec_num(r, s->precision);
	rec_num(r, s->g2);
	/* JSON: an object; TSV: the occupation and its postings in two columns */
	if (!s->rival) {
		rec_null(r);
		rec_null(r);
	} else if (rec_is_json(r)) {
		rec_obj_begin(r);
		rec_member_str(r, "occupation", s->rival, s->rl);
		rec_member_u64(r, "postings", s->rival_postings);
		rec_member_num(r, "share", s->key_postings ? (double)s->rival_postings /
							     (double)s->key_postings : 0);
		rec_obj_end(r);
		rec_omit(r);
	} else {
		rec_str(r, s->rival, s->rl);
		rec_u64(r, s->rival_postings);
	}
	if (s->variant && s->lb) {
		rec_str(r, lab_str(ls, s->lb->text), s->lb->textlen);
		rec_cstr(r, s->variant);
	} else {
		rec_omit(r);
		rec_omit(r);
	}
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

int cmd_propose(int argc, char **argv)
{
	propose_opts o;
	rank_inputs in;
	inputs_survey sv;
	propose_list l = {0};
	tm_buf out = {0}, scratch = {0};
	rec r;
	int rc;

	memset(&o, 0, sizeof o);
	if (!cli_rank_start(&propose_cmd, &o, &o.in, argc, argv, &in, &sv, &rc)) {
		inputs_free(&in);
		return rc;
	}
	propose_filter f = {o.in.occ, o.in.lang[0] ? o.in.lang : NULL};
	rec_init(&r, &out, o.tsv ? REC_TSV : REC_JSON, sugg_fields);
	if (propose_run(&in.m, &in.ls, &o.bar, &f, &l) == 0) {
		uint64_t per[PROPOSE_NKINDS] = {0};
		rec_header(&r);
		for (size_t i = 0; i < l.n; i++) {
			if (o.kind && l.v[i].kind != o.kind - 1)
				continue;
			if (per[l.v[i].kind]++ >= o.top)
				continue;
			write_sugg(&r, &l.v[i], &in.m, &in.ls, &scratch);
		}
		if (l.joined)
			fprintf(stderr,
				"titlemill propose: %zu titles not proposed: each only joins "
				"labels of its occupation (its names in two languages)\n",
				l.joined);
	} else
		r.failed = 1;
	if (r.failed) {
		fputs("titlemill propose: out of memory\n", stderr);
		rc = EXIT_RUNTIME;
	} else
		rc = cli_write_stdout("propose", &out) ? EXIT_RUNTIME : EXIT_OK;
	propose_list_free(&l);
	buf_free(&out);
	buf_free(&scratch);
	inputs_free(&in);
	return rc;
}

/* cli_overlap.c - titlemill overlap: occupations whose postings use the
 * same titles, and occupations nearer another group than their own.
 * The measures, the bounds and the order of the rows are in
 * rank/overlap.h; the groups in rank/groups.h. */
#include <stddef.h>
#include <stdio.h>
#include <string.h>

#include "cli/cli.h"
#include "cli/options.h"
#include "core/digest.h"
#include "io/record.h"
#include "io/skos.h"
#include "rank/groups.h"
#include "rank/inputs.h"
#include "rank/overlap.h"

static const char *const show_names[] = {"findings", "groups", "occupations", NULL};
enum { SHOW_FINDINGS = 1, SHOW_GROUPS, SHOW_OCCUPATIONS };

typedef struct overlap_cli {
	rank_opts in;
	const char *groups, *level;
	uint64_t group_prefix;   /* UINT64_MAX: not asked for */
	uint64_t top;            /* UINT64_MAX: all */
	double max_div;
	uint64_t min_postings, key_cap;
	int json, tsv, show;
} overlap_cli;

static const opt_spec overlap_specs[] = {
	OPT_SPEC_LABELS(overlap_cli, in.setup.labels,
			"the taxonomy's labels: TSV (occupation, kind, lang, label) or SKOS "
			"(whose skos:broader gives the groups)"),
	{"groups", OPT_STR, offsetof(overlap_cli, groups), "FILE", NULL, 0, 0,
	 "the groups: TSV (occupation, group, optional level) or SKOS (skos:broader)", NULL, 0},
	{"level", OPT_STR, offsetof(overlap_cli, level), "L", NULL, 0, 0,
	 "use this level of the groups TSV (default: the one with the most groups)", NULL, 0},
	{"group-prefix", OPT_U64, offsetof(overlap_cli, group_prefix), "N", NULL, 1, 64,
	 "group occupations by the first N characters of their code", NULL, 0},
	{"show", OPT_CHOICE, offsetof(overlap_cli, show), "WHAT", "findings", 0, 0,
	 "findings (pairs, then nearer_other_group), groups, or occupations", show_names, 0},
	{"json", OPT_FLAG, offsetof(overlap_cli, json), NULL, NULL, 0, 0,
	 "JSON Lines (for review add) instead of TSV", NULL, 0},
	{"tsv", OPT_FLAG, offsetof(overlap_cli, tsv), NULL, NULL, 0, 0, "TSV (the default)", NULL, 0},
	{"top", OPT_U64, offsetof(overlap_cli, top), "N", NULL, 1, 1.8e19,
	 "at most N pairs and N nearer_other_group rows (or N rows of --show)", NULL, 0},
	{"max-divergence", OPT_REAL, offsetof(overlap_cli, max_div), "X", "1", 0, 1,
	 "only pairs whose divergence is at most X bits", NULL, 0},
	{"min-postings", OPT_U64, offsetof(overlap_cli, min_postings), "N",
	 OPT_XSTR(OVERLAP_MIN_POSTINGS), 1, 1e18,
	 "postings each occupation needs to be ranked", NULL, 0},
	{"key-cap", OPT_U64, offsetof(overlap_cli, key_cap), "N", OPT_XSTR(OVERLAP_KEY_CAP), 2, 1e9,
	 "a title held by more than N occupations does not make pairs (it still counts)", NULL, 0},
	OPT_SPEC_LANG(overlap_cli, in.lang, "only this language"),
	RANK_SPEC_IDS(overlap_cli, in),
	RANK_SPEC_WINDOW(overlap_cli, in),
	OPT_SPEC_STORE(overlap_cli, in.store, OPT_STORE_READ),
	OPT_SPEC_PREFIX(overlap_cli, in.prefix),
	OPT_SPEC_LEXICONS(overlap_cli, in.setup),
	OPT_SPEC_END,
};

static const opt_cmd overlap_cmd = {
	"overlap",
	"usage: titlemill overlap --labels FILE [--groups FILE [--level L] | --group-prefix N]\n"
	"                         [--show WHAT] [--lang L] [--top N] [--max-divergence X]\n"
	"                         [--json|--tsv] (COUNTS|POSTINGS...|--store URL [--prefix P])\n"
	"\n"
	"Pairs of occupations whose postings are named with the same titles, ranked\n"
	"by the Jensen-Shannon divergence of their distributions over match keys\n"
	"(bits: 0 the same titles in the same proportions, 1 none shared), with the\n"
	"shared mass and the titles that carry it; then, when occupations have\n"
	"groups (skos:broader of a SKOS --labels, --groups, or --group-prefix), the\n"
	"occupations whose titles sit nearer another group than their own.  Only\n"
	"occupations sharing a title are compared.  A summary goes to standard error.\n"
	"\n",
	overlap_specs,
	NULL,
};

/* Findings: pairs (overlapping_occupations) and nearer_other_group, one
 * field list; JSON omits what a kind does not have.  id, label,
 * label_kind, score and competitor make a row a suggestion for review
 * add. */
static const rec_field finding_fields[] = {
	{"id", REC_JSON}, {"kind", REC_BOTH}, {"occupation", REC_BOTH},
	{"occupation_label", REC_BOTH}, {"other_occupation", REC_BOTH},
	{"other_occupation_label", REC_BOTH}, {"lang", REC_BOTH}, {"divergence", REC_BOTH},
	{"shared", REC_BOTH}, {"postings", REC_BOTH}, {"other_postings", REC_BOTH},
	{"group", REC_BOTH}, {"other_group", REC_BOTH}, {"group_divergence", REC_BOTH},
	{"titles", REC_BOTH}, {"label", REC_JSON}, {"label_kind", REC_JSON}, {"score", REC_JSON},
	{"competitor", REC_JSON}, {NULL, 0},
};

static const rec_field group_fields[] = {
	{"group", REC_BOTH}, {"lang", REC_BOTH}, {"postings", REC_BOTH}, {"members", REC_BOTH},
	{"dispersion", REC_BOTH}, {"nearest_group", REC_BOTH}, {"nearest_divergence", REC_BOTH},
	{NULL, 0},
};

static const rec_field occ_fields[] = {
	{"occupation", REC_BOTH}, {"occupation_label", REC_BOTH}, {"lang", REC_BOTH},
	{"postings", REC_BOTH}, {"group", REC_BOTH}, {"group_divergence", REC_BOTH},
	{"nearest_group", REC_BOTH}, {"nearest_divergence", REC_BOTH},
	{"nearer_other_group", REC_BOTH}, {NULL, 0},
};

typedef struct wctx {
	rec r;
	const labelset *ls;
	const groupmap *g;
} wctx;

/* A string, or null when there is none. */
static void str_or_null(rec *r, const char *s, size_t n)
{
	if (s)
		rec_str(r, s, n);
	else
		rec_null(r);
}

/* occupation_label: the curators' name of occ. */
static const label *pref_of(const wctx *w, const char *occ, size_t ol, const char *lang)
{
	return labels_pref(w->ls, occ, ol, lang);
}

static void label_cell(rec *r, const wctx *w, const label *lb)
{
	if (lb)
		rec_str(r, lab_str(w->ls, lb->text), lb->textlen);
	else
		rec_null(r);
}

/* The stable id of a finding: its kind, occupation, the other side and
 * the language. */
static void finding_id(rec *r, const char *kind, const char *occ, size_t ol, const char *other,
		       size_t otl, const char *lang)
{
	char id[17];
	uint64_t h = dg_hash(kind, strlen(kind), 0x6f7665726c6170ULL);
	h = dg_hash(occ, ol, h);
	h = dg_hash("\x1F", 1, h);
	h = dg_hash(other, otl, h);
	h = dg_hash(lang, strlen(lang), h);
	snprintf(id, sizeof id, "%016llx", (unsigned long long)h);
	rec_cstr(r, id);
}

static void titles_cell(rec *r, const overlap_title *t, int n, int own)
{
	rec_list_begin(r, "; ");
	for (int i = 0; i < n; i++) {
		if (rec_is_json(r)) {
			rec_obj_begin(r);
			rec_member_str(r, "title", t[i].title, t[i].tl);
			rec_member_str(r, "key", t[i].key, t[i].kl);
			rec_member_u64(r, "postings", t[i].postings);
			rec_member_u64(r, "other_postings", t[i].other_postings);
			if (own)
				rec_member_u64(r, "own_postings", t[i].own_postings);
			rec_obj_end(r);
		} else {
			rec_cell_begin(r);
			rec_cell_str(r, t[i].title, t[i].tl);
			rec_cell_str(r, " (", 2);
			rec_cell_u64(r, t[i].postings);
			rec_cell_str(r, " / ", 3);
			rec_cell_u64(r, t[i].other_postings);
			if (own) {
				rec_cell_str(r, " / ", 3);
				rec_cell_u64(r, t[i].own_postings);
			}
			rec_cell_str(r, ")", 1);
			rec_cell_end(r);
		}
	}
	rec_list_end(r);
}

/* label, label_kind: what a review item points at (the occupation's
 * preferred label, else its id). */
static void review_label(rec *r, const wctx *w, const label *lb, const char *occ, size_t ol)
{
	if (lb) {
		rec_str(r, lab_str(w->ls, lb->text), lb->textlen);
		rec_cstr(r, "pref");
	} else {
		rec_str(r, occ, ol);
		rec_omit(r);
	}
}

static int write_pair(void *ctx, const overlap_pair *p)
{
	wctx *w = ctx;
	rec *r = &w->r;
	const label *la = pref_of(w, p->occ, p->ol, p->lang), *lb = pref_of(w, p->other, p->otl, p->lang);
	size_t gl = 0, hl = 0;
	const char *g = groups_of(w->g, p->occ, p->ol, &gl), *h = groups_of(w->g, p->other, p->otl, &hl);
	rec_begin(r);
	finding_id(r, "overlapping_occupations", p->occ, p->ol, p->other, p->otl, p->lang);
	rec_cstr(r, "overlapping_occupations");
	rec_str(r, p->occ, p->ol);
	label_cell(r, w, la);
	rec_str(r, p->other, p->otl);
	label_cell(r, w, lb);
	rec_cstr(r, p->lang);
	rec_num(r, p->divergence);
	rec_num(r, p->shared);
	rec_u64(r, p->postings);
	rec_u64(r, p->other_postings);
	str_or_null(r, g, gl);
	str_or_null(r, h, hl);
	rec_omit(r);
	titles_cell(r, p->titles, p->ntitles, 0);
	review_label(r, w, la, p->occ, p->ol);
	rec_num(r, 1 - p->divergence);
	if (rec_is_json(r)) {
		rec_obj_begin(r);
		rec_member_str(r, "occupation", p->other, p->otl);
		rec_member_u64(r, "postings", p->other_postings);
		rec_obj_end(r);
	} else
		rec_omit(r);
	return rec_end(r);
}

static int write_nearer(void *ctx, const overlap_occ *o)
{
	wctx *w = ctx;
	rec *r = &w->r;
	const label *la = pref_of(w, o->occ, o->ol, o->lang);
	rec_begin(r);
	finding_id(r, "nearer_other_group", o->occ, o->ol, o->nearest, o->nl, o->lang);
	rec_cstr(r, "nearer_other_group");
	rec_str(r, o->occ, o->ol);
	label_cell(r, w, la);
	rec_omit(r);
	rec_omit(r);
	rec_cstr(r, o->lang);
	rec_num(r, o->nearest_divergence);
	rec_omit(r);
	rec_u64(r, o->postings);
	rec_u64(r, o->nearest_postings);
	rec_str(r, o->group, o->gl);
	rec_str(r, o->nearest, o->nl);
	rec_num(r, o->own_divergence);
	titles_cell(r, o->titles, o->ntitles, 1);
	review_label(r, w, la, o->occ, o->ol);
	rec_num(r, o->own_divergence - o->nearest_divergence);
	rec_omit(r);
	return rec_end(r);
}

static int write_group(void *ctx, const overlap_group *g)
{
	rec *r = &((wctx *)ctx)->r;
	rec_begin(r);
	rec_str(r, g->group, g->gl);
	rec_cstr(r, g->lang);
	rec_u64(r, g->postings);
	rec_u64(r, g->members);
	rec_num(r, g->dispersion);
	str_or_null(r, g->nearest, g->nl);
	if (g->nearest)
		rec_num(r, g->nearest_divergence);
	else
		rec_null(r);
	return rec_end(r);
}

static int write_occ(void *ctx, const overlap_occ *o)
{
	wctx *w = ctx;
	rec *r = &w->r;
	rec_begin(r);
	rec_str(r, o->occ, o->ol);
	label_cell(r, w, pref_of(w, o->occ, o->ol, o->lang));
	rec_cstr(r, o->lang);
	rec_u64(r, o->postings);
	str_or_null(r, o->group, o->gl);
	if (o->has_own)
		rec_num(r, o->own_divergence);
	else
		rec_null(r);
	str_or_null(r, o->nearest, o->nl);
	if (o->nearest)
		rec_num(r, o->nearest_divergence);
	else
		rec_null(r);
	rec_u64(r, (uint64_t)o->nearer);
	return rec_end(r);
}

int cli_load_groups(const char *cmd, const char *groups, const char *level, uint64_t prefix,
		    const char *labels, groupmap *g)
{
	tm_buf err = {0};
	int rc = 0;
	memset(g, 0, sizeof *g);
	if (prefix != UINT64_MAX)
		groups_by_prefix(g, (size_t)prefix);
	else if (groups)
		rc = skos_is_rdf_path(groups) ? groups_read_skos(g, groups, &err)
				       : groups_read_tsv(g, groups, level, &err);
	else if (skos_is_rdf_path(labels))
		rc = groups_read_skos(g, labels, &err);
	if (rc) {
		fprintf(stderr, "titlemill %s: %.*s\n", cmd, (int)err.len, err.data ? err.data : "");
		rc = -1;
	} else {
		if (g->levels > 1 && !(level && *level))
			fprintf(stderr, "titlemill %s: %s has %d levels: the groups of level '%s' "
				"(the finest: the most groups); choose another with --level\n", cmd, groups,
				g->levels, g->level);
		if (g->several)
			fprintf(stderr, "titlemill %s: %ld occupation%s with more than one broader "
				"concept: each is put in the byte-smallest\n", cmd, g->several,
				g->several == 1 ? "" : "s");
	}
	buf_free(&err);
	return rc;
}

/* Decimals enough to show a share that is not zero as such: one from 1 % on,
 * more below, so that 3 pairs of 4,498,500 read 0.00007 %, not 0.0 %. */
static int pct_digits(double pct)
{
	int d = 1;

	while (d < 6 && pct > 0.0 && pct < 1.0) {
		pct *= 10.0;
		d++;
	}
	return d;
}

static void summary(const overlap_stats *s, const overlap_cli *o, const groupmap *g)
{
	double pct = s->pairs_all ? 100.0 * (double)s->pairs_compared / (double)s->pairs_all : 0.0;

	fprintf(stderr, "titlemill overlap: %llu occupation-language distribution%s; %llu pair%s "
		"compared of %llu (%.*f %%)",
		(unsigned long long)s->distributions, s->distributions == 1 ? "" : "s",
		(unsigned long long)s->pairs_compared, s->pairs_compared == 1 ? "" : "s",
		(unsigned long long)s->pairs_all, pct_digits(pct), pct);
	if (s->pairs_small)
		fprintf(stderr, "; %llu skipped (fewer than %llu postings on a side)",
			(unsigned long long)s->pairs_small, (unsigned long long)o->min_postings);
	if (s->keys_capped)
		fprintf(stderr, "; %llu title%s held by more than %llu occupations made no pairs",
			(unsigned long long)s->keys_capped, s->keys_capped == 1 ? "" : "s",
			(unsigned long long)o->key_cap);
	if (groups_any(g) && s->ungrouped)
		fprintf(stderr, "; %llu without a group", (unsigned long long)s->ungrouped);
	fputc('\n', stderr);
}

int cmd_overlap(int argc, char **argv)
{
	overlap_cli o;
	rank_inputs in;
	inputs_survey sv;
	groupmap g;
	overlap *ov = NULL;
	tm_buf out = {0}, err = {0};
	wctx w;
	int rc;

	memset(&o, 0, sizeof o);
	memset(&g, 0, sizeof g);
	if (!cli_rank_start(&overlap_cmd, &o, &o.in, argc, argv, &in, &sv, &rc)) {
		inputs_free(&in);
		return rc;
	}
	rc = EXIT_USAGE;
	if (o.json && o.tsv)
		fputs("titlemill overlap: --json and --tsv exclude each other\n", stderr);
	else if (o.group_prefix != UINT64_MAX && o.groups)
		fputs("titlemill overlap: --groups and --group-prefix exclude each other\n", stderr);
	else if (o.level && (!o.groups || skos_is_rdf_path(o.groups)))
		fputs("titlemill overlap: --level applies to a groups TSV (--groups FILE)\n", stderr);
	else if (cli_load_groups("overlap", o.groups, o.level, o.group_prefix, o.in.setup.labels,
				 &g) != 0)
		rc = EXIT_RUNTIME;
	else
		rc = EXIT_OK;
	if (rc != EXIT_OK)
		goto done;
	overlap_opts oo = {o.min_postings, o.key_cap, o.in.lang[0] ? o.in.lang : NULL, &g};
	if (overlap_build(&ov, &in.m, &oo, &err) != 0) {
		fprintf(stderr, "titlemill overlap: %.*s\n", (int)err.len, err.data ? err.data : "");
		rc = EXIT_RUNTIME;
		goto done;
	}
	uint64_t top = o.top == UINT64_MAX ? 0 : o.top;
	w.ls = &in.ls;
	w.g = &g;
	unsigned fmt = o.json ? REC_JSON : REC_TSV;
	if (o.show == SHOW_GROUPS) {
		rec_init(&w.r, &out, fmt, group_fields);
		rec_header(&w.r);
		rc = overlap_groups(ov, write_group, &w);
	} else if (o.show == SHOW_OCCUPATIONS) {
		rec_init(&w.r, &out, fmt, occ_fields);
		rec_header(&w.r);
		rc = overlap_occupations(ov, 0, top, write_occ, &w);
	} else {
		rec_init(&w.r, &out, fmt, finding_fields);
		rec_header(&w.r);
		rc = overlap_pairs(ov, o.max_div, top, write_pair, &w);
		if (!rc)
			rc = overlap_occupations(ov, 1, top, write_nearer, &w);
	}
	if (rc != 0 || w.r.failed) {
		fputs("titlemill overlap: out of memory\n", stderr);
		rc = EXIT_RUNTIME;
	} else {
		summary(overlap_get_stats(ov), &o, &g);
		rc = cli_write_stdout("overlap", &out) ? EXIT_RUNTIME : EXIT_OK;
	}
done:
	overlap_free(ov);
	groups_free(&g);
	buf_free(&out);
	buf_free(&err);
	inputs_free(&in);
	return rc;
}

/* cli_review_read.c - the subcommands of `titlemill review` that read
 * the queue: list, show, stats, export, noise-words. */
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "cli/cli.h"
#include "cli/cli_review.h"
#include "review/delta.h"
#include "io/jsonr.h"
#include "io/outfile.h"
#include "review/review_json.h"
#include "review/review_noise.h"
#include "review/review_time.h"
#include "review/review_trend.h"
#include "io/record.h"
#include "rank/labels.h"
#include "rank/stats.h"

/* ---- reading: list, show, stats, export ---- */

/* The evidence fields list and show print. */
typedef struct evid {
	jr_doc *d;
	uint64_t n, kt;
	double precision, share, lo, hi, g2;
	const char *rival, *variant_of, *label_kind, *as_written;
	const jr_val *v;         /* the evidence object */
	uint64_t rival_postings;
	double rival_share;
} evid;

static void evid_fill(evid *e, const jr_val *v)
{
	size_t l;
	e->n = (uint64_t)jr_vint(jr_get(v, "occupation_postings"));
	e->kt = (uint64_t)jr_vint(jr_get(v, "key_postings"));
	e->precision = jr_vnum(jr_get(v, "precision"));
	e->share = jr_vnum(jr_get(v, "share"));
	e->lo = jr_vnum(jr_get(v, "share_low"));
	e->hi = jr_vnum(jr_get(v, "share_high"));
	e->g2 = jr_vnum(jr_get(v, "g2"));
	e->variant_of = jr_vstr(jr_get(v, "variant_of"), &l);
	e->label_kind = jr_vstr(jr_get(v, "label_kind"), &l);
	e->as_written = jr_vstr(jr_get(v, "label_as_written"), &l);
	const jr_val *c = jr_get(v, "competitor");
	e->rival = jr_vstr(jr_get(c, "occupation"), &l);
	e->rival_postings = (uint64_t)jr_vint(jr_get(c, "postings"));
	e->rival_share = jr_vnum(jr_get(c, "share"));
	e->v = v;
}

/* The evidence of an evidence object's text (NULL: no figures). */
static void evid_read(const char *json, evid *e)
{
	char jerr[64];
	memset(e, 0, sizeof *e);
	if (!json)
		return;
	e->d = jr_parse(json, strlen(json), jerr, sizeof jerr);
	evid_fill(e, jr_root(e->d));
}

/* The latest evidence of an item, read straight from its queue line when
 * it has one (one parse instead of two). */
static void evid_item(const rq_item *it, evid *e)
{
	char jerr[64];
	if (it->evidence || !it->raw) {
		evid_read(rq_item_evidence(it), e);
		return;
	}
	memset(e, 0, sizeof *e);
	e->d = jr_parse(it->raw, it->rawlen, jerr, sizeof jerr);
	evid_fill(e, jr_get(jr_root(e->d), "evidence"));
}

static const rq_item **selected(const rq_queue *q, const review_opts *o, size_t *n)
{
	const rq_item **v = malloc((q->n + 1) * sizeof *v);
	*n = 0;
	if (!v)
		return NULL;
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if ((o->status >= 0 && it->status != o->status) || (o->kind >= 0 && it->kind != o->kind) ||
		    (o->occ && strcmp(o->occ, it->occ)) || (o->lang[0] && strcmp(o->lang, it->lang)))
			continue;
		v[(*n)++] = it;
	}
	return v;
}

static int by_score(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	if (x->score != y->score)
		return x->score > y->score ? -1 : 1;
	return strcmp(x->id, y->id);
}

/* Strongest first: strength in [0, 1] is comparable across kinds (an
 * item without one, from an older propose, comes after those with one),
 * then the score. */
static int by_strength(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	if (x->brief.strength != y->brief.strength)
		return x->brief.strength > y->brief.strength ? -1 : 1;
	return by_score(a, b);
}

static int by_postings(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	if (x->postings != y->postings)
		return x->postings > y->postings ? -1 : 1;
	return by_score(a, b);
}

static int by_seq(const void *a, const void *b)
{
	const rq_item *x = *(const rq_item *const *)a, *y = *(const rq_item *const *)b;
	return x->seq < y->seq ? -1 : x->seq > y->seq;
}


/* A line of list: its TSV (with --json, list prints the queue's own
 * lines instead, rq_item_json). */
static const rec_field list_fields[] = {
	{"id", REC_TSV}, {"status", REC_TSV}, {"kind", REC_TSV}, {"occupation", REC_TSV},
	{"occupation_label", REC_TSV}, {"lang", REC_TSV}, {"label", REC_TSV},
	{"strength", REC_TSV}, {"score", REC_TSV}, {"postings", REC_TSV},
	{"occupation_postings", REC_TSV}, {"precision", REC_TSV}, {"competitor", REC_TSV},
	{"competitor_postings", REC_TSV}, {"variant_of", REC_TSV}, {"added", REC_TSV},
	{"proposed", REC_TSV}, {"decided_by", REC_TSV}, {"decided_at", REC_TSV},
	{"note", REC_TSV}, {"share_before", REC_TSV}, {"share_after", REC_TSV}, {NULL, 0},
};

/* A figure, or an empty cell when the evidence has none (< 0). */
static void num_or_null(rec *r, double v)
{
	if (v >= 0)
		rec_num(r, v);
	else
		rec_null(r);
}

static void list_row(rec *r, const rq_item *it)
{
	const rq_event *dec = rq_last_decision(it);
	const rq_brief *e = &it->brief;
	rec_begin(r);
	rec_cstr(r, it->id);
	rec_cstr(r, rq_status_name(it));
	rec_cstr(r, rq_kind_names[it->kind]);
	rec_cstr(r, it->occ);
	rec_cstr(r, e->occ_label ? e->occ_label : "");
	rec_cstr(r, it->lang);
	rec_cstr(r, it->label);
	num_or_null(r, e->strength);
	rec_num(r, it->score);
	rec_u64(r, it->postings);
	rec_u64(r, e->occ_postings);
	num_or_null(r, e->precision);
	if (e->rival) {
		rec_cstr(r, e->rival);
		rec_u64(r, e->rival_postings);
	} else {
		rec_null(r);
		rec_null(r);
	}
	rec_cstr(r, e->variant_of ? e->variant_of : "");
	rec_cstr(r, it->added);
	rec_cstr(r, it->proposed);
	rec_cstr(r, dec ? dec->reviewer : "");
	rec_cstr(r, dec ? dec->at : "");
	rec_cstr(r, dec && dec->note ? dec->note : "");
	num_or_null(r, e->share_before);
	num_or_null(r, e->share_after);
	rec_end(r);
}

int rv_list(const review_opts *o, const rq_queue *q)
{
	size_t n;
	const rq_item **v = selected(q, o, &n);
	tm_buf b = {0};
	rec r;

	if (!v)
		return rv_fail("out of memory");
	tm_qsort(v, n, sizeof *v, !strcmp(o->sort, "added") ? by_seq
			       : !strcmp(o->sort, "postings") ? by_postings
			       : !strcmp(o->sort, "score") ? by_score : by_strength);
	if (o->limit < n)
		n = (size_t)o->limit;
	rec_init(&r, &b, REC_TSV, list_fields);
	if (!o->json)
		rec_header(&r);
	for (size_t i = 0; i < n; i++) {
		if (o->json)
			rq_item_json(v[i], &b);
		else
			list_row(&r, v[i]);
		if (b.len > 65536 && rv_flush(&b, stdout))
			break;
	}
	free(v);
	if (r.failed)
		return buf_free(&b), rv_fail("out of memory: the output is incomplete");
	return rv_finish(&b);
}

static void show_event(tm_buf *b, const rq_event *e, const rq_item *it, const rq_event *prev_dec)
{
	char line[160];
	snprintf(line, sizeof line, "  %s  %-9s ", e->at, rq_what_names[e->what]);
	buf_puts(b, line);
	if (e->reviewer) {
		buf_puts(b, "by ");
		buf_puts(b, e->reviewer);
		buf_puts(b, ", ");
	}
	snprintf(line, sizeof line, "on %llu postings, score %.4f", (unsigned long long)e->postings,
		 e->score);
	buf_puts(b, line);
	if (e->noise)
		buf_puts(b, ", as noise (for good)");
	if (e->batch) {
		snprintf(line, sizeof line, ", batch %llu", (unsigned long long)e->batch);
		buf_puts(b, line);
	}
	if (e->reason) {
		buf_puts(b, " (");
		buf_puts(b, e->reason);
		buf_putc(b, ')');
	} else if (e->what == RE_REOPENED && prev_dec && prev_dec->postings) {
		snprintf(line, sizeof line, " (%.1f times the %llu postings at the rejection)",
			 (double)e->postings / (double)prev_dec->postings,
			 (unsigned long long)prev_dec->postings);
		buf_puts(b, line);
	}
	if (e->note) {
		buf_puts(b, ": \"");
		buf_puts(b, e->note);
		buf_putc(b, '"');
	}
	buf_putc(b, '\n');
	(void)it;
}

/* The examples of an evidence object, a line each. */
static void show_examples(tm_buf *b, const jr_val *v)
{
	const jr_val *x = jr_get(v, "examples");
	for (size_t i = 0; i < jr_vlen(x); i++) {
		size_t l;
		const char *s = jr_vstr(jr_at(x, i), &l);
		if (!s)
			continue;
		buf_puts(b, "              example: ");
		buf_append(b, s, l);
		buf_putc(b, '\n');
	}
}

/* A row of trend: both windows, each share with its Wilson interval (95 %)
 * from the counts beside it, the G2 and the first period counted. */
static void show_trend(tm_buf *b, const char *title, const jr_val *v, const rq_trend_ev *t)
{
	const char *name[2] = {"before", "after"};
	uint64_t p[2] = {t->before, t->after}, o[2] = {t->occ_before, t->occ_after};
	size_t fl;
	const char *first = jr_vstr(jr_get(v, "first_seen"), &fl);
	buf_printf(b, "%s%s, G2 %.4f", title, t->falling ? "falling" : "rising", t->g2);
	if (first)
		buf_printf(b, ", first seen %.*s", (int)fl, first);
	buf_putc(b, '\n');
	for (int w = 0; w < 2; w++) {
		double lo, hi;
		wilson(p[w], o[w], STATS_Z95, &lo, &hi);
		buf_printf(b, "              %-6s %llu of %llu postings (share %.4f, 95 %% interval "
			      "%.4f-%.4f)\n", name[w], (unsigned long long)p[w],
			   (unsigned long long)o[w], o[w] ? (double)p[w] / (double)o[w] : 0.0, lo, hi);
	}
	show_examples(b, v);
}

static void show_evidence(tm_buf *b, const char *title, const char *json)
{
	evid e;
	char line[400];
	rq_trend_ev t;
	evid_read(json, &e);
	const jr_val *v = e.v;
	if (rq_trend_figures(v, &t)) {
		show_trend(b, title, v, &t);
		jr_free(e.d);
		return;
	}
	if (jr_get(v, "divergence")) { /* a finding of overlap */
		size_t gl = 0, hl = 0, ol = 0;
		const char *g = jr_vstr(jr_get(v, "group"), &gl), *h = jr_vstr(jr_get(v, "other_group"), &hl);
		const char *o = jr_vstr(jr_get(v, "other_occupation"), &ol);
		snprintf(line, sizeof line, "%sdivergence %.4f bits from %s %.*s (%llu postings; this "
			 "occupation %llu)", title, jr_vnum(jr_get(v, "divergence")),
			 o ? "occupation" : "group", (int)(o ? ol : hl), o ? o : h ? h : "",
			 (unsigned long long)jr_vint(jr_get(v, "other_postings")),
			 (unsigned long long)jr_vint(jr_get(v, "postings")));
		buf_puts(b, line);
		if (o)
			snprintf(line, sizeof line, ", shared mass %.4f\n", jr_vnum(jr_get(v, "shared")));
		else
			snprintf(line, sizeof line, "; %.4f bits from its own group %.*s\n",
				 jr_vnum(jr_get(v, "group_divergence")), (int)gl, g ? g : "");
		buf_puts(b, line);
		const jr_val *x = jr_get(v, "titles");
		for (size_t i = 0; i < jr_vlen(x); i++) {
			size_t l;
			const char *s = jr_vstr(jr_get(jr_at(x, i), "title"), &l);
			snprintf(line, sizeof line, "              title: %.*s (%llu / %llu)\n", (int)(s ? l : 0),
				 s ? s : "", (unsigned long long)jr_vint(jr_get(jr_at(x, i), "postings")),
				 (unsigned long long)jr_vint(jr_get(jr_at(x, i), "other_postings")));
			buf_puts(b, line);
		}
		jr_free(e.d);
		return;
	}
	snprintf(line, sizeof line,
		 "%s%llu postings of %llu (share %.4f, 95 %% interval %.4f-%.4f), "
		 "key postings %llu, precision %.4f, G2 %.4f\n",
		 title, (unsigned long long)jr_vint(jr_get(v, "postings")), (unsigned long long)e.n,
		 e.share, e.lo, e.hi, (unsigned long long)e.kt, e.precision, e.g2);
	buf_puts(b, line);
	if (e.rival) {
		snprintf(line, sizeof line, "              competitor %s: %llu postings (%.4f of the key's)\n",
			 e.rival, (unsigned long long)e.rival_postings, e.rival_share);
		buf_puts(b, line);
	}
	show_examples(b, v);
	jr_free(e.d);
}

int rv_show(const review_opts *o, const rq_queue *q, int n, char **ids)
{
	tm_buf b = {0};
	int rc = EXIT_OK;
	if (!n)
		return rv_usage_error("show wants the id of a suggestion", NULL);
	for (int k = 0; k < n; k++) {
		int many;
		const rq_item *it = rq_find(q, ids[k], strlen(ids[k]), &many);
		if (!it) {
			fprintf(stderr, "titlemill review: %s %s\n",
				many ? "more than one suggestion starts with" : "no suggestion in the queue is",
				ids[k]);
			rc = EXIT_RUNTIME;
			continue;
		}
		if (o->json) {
			rq_item_json(it, &b);
			continue;
		}
		evid e;
		evid_item(it, &e);
		if (k)
			buf_putc(&b, '\n');
		const char *head[][2] = {{"id", it->id},          {"status", rq_status_name(it)},
					 {"kind", rq_kind_names[it->kind]}, {"occupation", it->occ},
					 {"occ. label", it->brief.occ_label},
					 {"lang", it->lang},      {"label", it->label}};
		for (size_t j = 0; j < sizeof head / sizeof *head; j++)
			if (head[j][1])
				buf_printf(&b, "%s%-14s%s", j ? "\n" : "", head[j][0], head[j][1]);
		size_t wl;
		const char *wr = jr_vstr(jr_get(e.v, "label_as_written"), &wl);
		if (wr) {
			buf_puts(&b, "\nas written    ");
			buf_append(&b, wr, wl);
		}
		if (e.variant_of) {
			buf_puts(&b, "\nvariant of    ");
			buf_puts(&b, e.variant_of);
		}
		if (e.label_kind) {
			buf_puts(&b, "\nlabel kind    ");
			buf_puts(&b, e.label_kind);
		}
		if (it->kind == RK_FADING)
			buf_puts(&b, "\nquestion      keep it, demote it to a hidden label, or retire it? "
				     "(accepted: a review row of the export, never a deletion)");
		char line[64];
		if (it->brief.strength >= 0) {
			snprintf(line, sizeof line, "\nstrength      %.4f", it->brief.strength);
			buf_puts(&b, line);
		}
		snprintf(line, sizeof line, "\nscore         %.4f\n", it->score);
		buf_puts(&b, line);
		jr_free(e.d);
		show_evidence(&b, "evidence      ", rq_item_evidence(it));
		buf_puts(&b, "history\n");
		const rq_event *last_dec = NULL;
		for (size_t i = 0; i < it->nev; i++) {
			show_event(&b, &it->ev[i], it, last_dec);
			if (it->ev[i].what == RE_REOPENED && it->ev[i].evidence && last_dec &&
			    last_dec->evidence) {
				show_evidence(&b, "    before:   ", last_dec->evidence);
				show_evidence(&b, "    now:      ", it->ev[i].evidence);
			}
			if (rq_is_decision(it->ev[i].what))
				last_dec = &it->ev[i];
		}
	}
	int w = rv_finish(&b);
	return rc ? rc : w;
}

/* stats: one row per group */
static const rec_field stats_fields[] = {
	{"by", REC_BOTH}, {"value", REC_BOTH}, {"items", REC_BOTH}, {"open", REC_BOTH},
	{"accepted", REC_BOTH}, {"rejected", REC_BOTH}, {"deferred", REC_BOTH},
	{"acceptance_rate", REC_BOTH}, {"oldest_open_days", REC_BOTH}, {NULL, 0},
};

typedef struct srow {
	char by[12], value[80];
	uint64_t items, st[RQ_NSTATUS + 1]; /* the last: statuses unknown here */
	long long oldest; /* added time of the oldest open item, or -1 */
} srow;

/* The index of the row (by, value), added when new; -1 when out of memory. */
static long row_for(srow **v, size_t *n, size_t *cap, const char *by, const char *value)
{
	for (size_t i = 0; i < *n; i++)
		if (!strcmp((*v)[i].by, by) && !strcmp((*v)[i].value, value))
			return (long)i;
	srow *p = tm_grow(*v, cap, *n + 1, sizeof *p, 16);
	if (!p)
		return -1;
	*v = p;
	srow *r = &p[*n];
	memset(r, 0, sizeof *r);
	snprintf(r->by, sizeof r->by, "%s", by);
	snprintf(r->value, sizeof r->value, "%s", value);
	r->oldest = -1;
	return (long)(*n)++;
}

static int cmp_row(const void *a, const void *b)
{
	const srow *x = a, *y = b;
	static const char *const order[] = {"all", "kind", "lang", "reviewer"};
	int ox = 0, oy = 0;
	for (int i = 0; i < 4; i++) {
		if (!strcmp(x->by, order[i]))
			ox = i;
		if (!strcmp(y->by, order[i]))
			oy = i;
	}
	if (ox != oy)
		return ox - oy;
	if (ox == 1)
		return rv_pick(rq_kind_names, RK_N, x->value) - rv_pick(rq_kind_names, RK_N, y->value);
	return strcmp(x->value, y->value);
}

int rv_stats(const review_opts *o, const rq_queue *q, const char *now)
{
	srow *v = NULL;
	size_t n = 0, cap = 0;
	long long t_now = rq_time(now);
	tm_buf b = {0};

	if (row_for(&v, &n, &cap, "all", "*") < 0)
		return rv_fail("out of memory");
	for (int k = 0; k < RK_N; k++)
		if (row_for(&v, &n, &cap, "kind", rq_kind_names[k]) < 0)
			return rv_fail("out of memory");
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		const rq_event *dec = rq_last_decision(it);
		/* indices, not pointers: a new row moves the array */
		long rs[4] = {row_for(&v, &n, &cap, "all", "*"),
			      row_for(&v, &n, &cap, "kind", rq_kind_names[it->kind]),
			      row_for(&v, &n, &cap, "lang", it->lang),
			      dec ? row_for(&v, &n, &cap, "reviewer", dec->reviewer) : -2};
		for (int k = 0; k < 4; k++) {
			if (rs[k] == -1) {
				free(v);
				return rv_fail("out of memory");
			}
			if (rs[k] < 0)
				continue;
			srow *r = &v[rs[k]];
			r->items++;
			r->st[it->status]++;
			long long t = rq_time(it->added);
			if (it->status == RQ_OPEN && (r->oldest < 0 || t < r->oldest))
				r->oldest = t;
		}
	}
	tm_qsort(v, n, sizeof *v, cmp_row);
	rec r;
	rec_init(&r, &b, o->json ? REC_JSON : REC_TSV, stats_fields);
	rec_header(&r);
	for (size_t i = 0; i < n; i++) {
		const srow *w = &v[i];
		uint64_t decided = w->st[RQ_ACCEPTED] + w->st[RQ_REJECTED];
		rec_begin(&r);
		rec_cstr(&r, w->by);
		rec_cstr(&r, w->value);
		rec_u64(&r, w->items);
		for (int k = 0; k < RQ_NSTATUS; k++)
			rec_u64(&r, w->st[k]);
		if (decided)
			rec_num(&r, (double)w->st[RQ_ACCEPTED] / (double)decided);
		else
			rec_null(&r);
		if (w->oldest >= 0 && o->json)
			rec_num(&r, (double)(t_now - w->oldest) / 86400.0);
		else if (w->oldest >= 0) {
			char age[32];
			snprintf(age, sizeof age, "%.1f", (double)(t_now - w->oldest) / 86400.0);
			rec_cstr(&r, age);
		} else
			rec_null(&r);
		rec_end(&r);
	}
	if (r.failed) {
		free(v);
		buf_free(&b);
		return rv_fail("out of memory: the output is incomplete");
	}
	free(v);
	return rv_finish(&b);
}

/* export */

static int write_out(const char *path, const tm_buf *b)
{
	if (!path) {
		if (b->len && fwrite(b->data, 1, b->len, stdout) != b->len)
			return rv_fail("cannot write the output");
		return rv_finish_stdout();
	}
	of_file f;
	tm_buf err = {0};
	int ok = !of_open(&f, path, OF_DASH, &err) && !of_write(&f, b->data, b->len, &err);
	if (ok && f.warn.len)
		fprintf(stderr, "titlemill review: note: %s", f.warn.data);
	ok = ok && !of_commit(&f, &err);
	if (!ok)
		fprintf(stderr, "titlemill review: %s\n", err.data ? err.data : "cannot write");
	of_abort(&f);
	buf_free(&err);
	return ok ? EXIT_OK : EXIT_RUNTIME;
}

int rv_export(const review_opts *o, const rq_queue *q)
{
	dl_opts d = {o->format, o->since ? rq_since(o->since) : -1, o->base, o->clean_case};
	tm_buf b = {0}, err = {0};
	int rc = EXIT_OK;

	if (dl_export(q, &d, &b, &err)) {
		/* one message a line */
		for (char *p = err.data, *nl; p; p = nl ? nl + 1 : NULL) {
			nl = strchr(p, '\n');
			fprintf(stderr, "titlemill review: %.*s\n", (int)(nl ? nl - p : (long)strlen(p)), p);
		}
		rc = EXIT_RUNTIME;
	} else
		rc = write_out(o->out, &b);
	buf_free(&b);
	buf_free(&err);
	return rc;
}

/* noise-words */

typedef struct nw_out {
	tm_buf b;
	uint64_t n;
} nw_out;

static int print_word(const rq_noise_word *w, void *a0)
{
	nw_out *a = a0;
	if (!a->n++)
		buf_puts(&a->b, "# titlemill review noise-words: candidates for a curator, not rules:\n"
				"# check each before putting it into a lexicon folder (marketing/ for\n"
				"# noise words) given with --lexicons DIR.  Each line follows the\n"
				"# rejections as noise whose titles hold the word.\n");
	buf_printf(&a->b, "# %llu of %llu rejection%s as noise\n%s\t%s\t-\n",
		   (unsigned long long)w->items, (unsigned long long)w->of, w->of == 1 ? "" : "s",
		   w->lang, w->word);
	return buf_status(&a->b);
}

int rv_noise_words(const review_opts *o, const rq_queue *q)
{
	labelset ls;
	nw_out a = {{0}, 0};
	if (rv_labels(o, &ls))
		return EXIT_RUNTIME;
	int rc = rq_noise_words(q, o->labels ? &ls : NULL, o->min_rejections, print_word, &a);
	labels_free(&ls);
	if (rc) {
		buf_free(&a.b);
		return rv_fail("out of memory");
	}
	if (!a.n)
		fprintf(stderr, "titlemill review: no word is shared by %llu or more rejections as noise "
				"and absent from the labels\n", (unsigned long long)o->min_rejections);
	return rv_finish(&a.b);
}

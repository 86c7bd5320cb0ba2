/* delta.c - the accepted suggestions of a review queue as a label delta. */
#include "review/delta.h"

#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/fieldcheck.h"
#include "io/jsonr.h"
#include "review/review_json.h"
#include "review/review_time.h"
#include "review/review_trend.h"
#include "io/skos.h"
#include "rank/propose.h"
#include "io/tsv.h"

typedef struct delta {
	const rq_item *it;
	const rq_event *dec;
	jr_doc *ev;       /* the item's latest evidence, parsed */
	char *text;       /* the label to export */
	char kind;        /* 'a' 'h', or the existing label's kind for a review */
	int review;       /* a kind whose delta is a `review` row: a finding to look at */
} delta;

static int cmp_delta(const void *a, const void *b)
{
	const delta *x = a, *y = b;
	int c;
	if ((c = strcmp(x->it->occ, y->it->occ)) || (c = strcmp(x->it->lang, y->it->lang)))
		return c;
	if (x->review != y->review)
		return x->review - y->review;
	if (x->kind != y->kind)
		return x->kind - y->kind;
	if ((c = strcmp(x->text, y->text)))
		return c;
	return strcmp(x->it->id, y->it->id);
}

static const char *kind_word(char k)
{
	return k == 'p' ? "pref" : k == 'a' ? "alt" : "hidden";
}

/* An evidence field: a string (NULL unless one) or a count (0 unless
 * one). */
static const char *ev_str(const delta *x, const char *obj, const char *field)
{
	size_t n;
	const jr_val *v = jr_root(x->ev);
	if (obj)
		v = jr_get(v, obj);
	const char *s = jr_vstr(jr_get(v, field), &n);
	return s && n && !memchr(s, 0, n) ? s : NULL;
}

static double ev_num(const delta *x, const char *field)
{
	return jr_vnum(jr_get(jr_root(x->ev), field));
}

static unsigned long long ev_count(const delta *x, const char *obj, const char *field)
{
	const jr_val *v = jr_root(x->ev);
	if (obj)
		v = jr_get(v, obj);
	long long c = jr_vint(jr_get(v, field));
	return c > 0 ? (unsigned long long)c : 0;
}

/* An absolute IRI: a scheme (a letter, then letters, digits, + - .) and a
 * colon, and none of the characters an IRI reference may not hold. */
static int is_iri(const char *s)
{
	const char *p = s;
	if (!((*p >= 'a' && *p <= 'z') || (*p >= 'A' && *p <= 'Z')))
		return 0;
	while ((*p >= 'a' && *p <= 'z') || (*p >= 'A' && *p <= 'Z') || (*p >= '0' && *p <= '9') ||
	       *p == '+' || *p == '-' || *p == '.')
		p++;
	if (*p != ':')
		return 0;
	for (p = s; *p; p++)
		if ((unsigned char)*p <= 0x20 || strchr("<>\"{}|^`\\", *p))
			return 0;
	return 1;
}

/* Appends why x is to be reviewed; returns buf_status(b). */
static int reason(tm_buf *b, const delta *x)
{
	char line[300];
	rq_trend_ev t;
	if (x->it->kind == RK_FADING && rq_trend_figures(jr_root(x->ev), &t)) {
		snprintf(line, sizeof line, "fading: %llu of %llu postings before (share %.4f), %llu "
					    "of %llu after (share %.4f), G2 %.4f; keep, demote to "
					    "hidden or retire",
			 (unsigned long long)t.before, (unsigned long long)t.occ_before,
			 (double)t.before / (double)t.occ_before, (unsigned long long)t.after,
			 (unsigned long long)t.occ_after, (double)t.after / (double)t.occ_after, t.g2);
		return buf_puts(b, line);
	}
	if (x->it->kind != RK_RARE && x->it->kind != RK_ELSEWHERE && x->it->kind != RK_OVERLAP &&
	    x->it->kind != RK_NEARER) {
		/* a kind without a reason of its own: its name and its figures */
		snprintf(line, sizeof line, "%s: score %.4f on %llu postings",
			 rq_kind_names[x->it->kind], x->it->score, (unsigned long long)x->it->postings);
		return buf_puts(b, line);
	}
	if (x->it->kind == RK_RARE)
		snprintf(line, sizeof line, "rare: %llu of %llu postings of the occupation",
			 (unsigned long long)x->it->postings, ev_count(x, NULL, "occupation_postings"));
	else if (x->it->kind == RK_OVERLAP) {
		const char *other = ev_str(x, NULL, "other_occupation");
		buf_puts(b, "overlaps ");
		buf_puts(b, other ? other : "another occupation");
		snprintf(line, sizeof line, ": divergence %.4f bits, shared mass %.4f",
			 ev_num(x, "divergence"), ev_num(x, "shared"));
	} else if (x->it->kind == RK_NEARER) {
		const char *g = ev_str(x, NULL, "group"), *h = ev_str(x, NULL, "other_group");
		buf_puts(b, "nearer group ");
		buf_puts(b, h ? h : "another");
		snprintf(line, sizeof line, " (%.4f bits) than its own", ev_num(x, "divergence"));
		buf_puts(b, line);
		buf_puts(b, g ? " " : "");
		buf_puts(b, g ? g : "");
		snprintf(line, sizeof line, " (%.4f bits)", ev_num(x, "group_divergence"));
	} else {
		const char *rival = ev_str(x, "competitor", "occupation");
		/* the rival is checked (FC_OCC_MAX bytes) before it gets here */
		buf_puts(b, "used elsewhere: ");
		buf_puts(b, rival ? rival : "another occupation");
		snprintf(line, sizeof line, " has %llu of its %llu postings",
			 ev_count(x, "competitor", "postings"), ev_count(x, NULL, "key_postings"));
	}
	return buf_puts(b, line);
}

/* The field of x that no export may carry, or NULL when x is safe to
 * write in every format: the checks add and decide make, made again.  A
 * TSV field then holds no tab or line end, a Turtle comment no line end,
 * and serd gets an IRI of IRI characters and a well-formed tag. */
static const char *unsafe_field(const delta *x, char why[FC_WHY])
{
	const rq_item *it = x->it;
	const char *note = x->dec->note ? x->dec->note : "";
	const char *rival = x->review ? ev_str(x, "competitor", "occupation") : NULL;
	const char *other = ev_str(x, NULL, "other_occupation");
	const char *g = ev_str(x, NULL, "group"), *h = ev_str(x, NULL, "other_group");
	return fc_id(it->id, strlen(it->id), why) ? "id"
	       : fc_occupation(it->occ, strlen(it->occ), why) ? "occupation"
	       : fc_lang(it->lang, strlen(it->lang), why) ? "lang"
	       : fc_label(x->text, strlen(x->text), why) ? "label"
	       : fc_name(x->dec->reviewer, strlen(x->dec->reviewer), why) ? "reviewer"
	       : fc_note(note, strlen(note), why) ? "note"
	       : rival && fc_occupation(rival, strlen(rival), why) ? "competitor.occupation"
	       : it->brief.occ_label && fc_label(it->brief.occ_label, strlen(it->brief.occ_label), why)
		       ? "occupation_label"
	       : other && fc_occupation(other, strlen(other), why) ? "other_occupation"
	       : g && fc_label(g, strlen(g), why) ? "group"
	       : h && fc_label(h, strlen(h), why) ? "other_group"
		       : NULL;
}

static void say(tm_buf *err, const char *a, const char *b, const char *c)
{
	if (err->len)
		buf_putc(err, '\n');
	buf_puts(err, a);
	buf_puts(err, b ? b : "");
	buf_puts(err, c ? c : "");
}

/* TM_OK, or TM_ENOMEM when b failed (checked once: buf.h). */
static int write_tsv(const delta *v, size_t n, tm_buf *b)
{
	buf_puts(b, "occupation\tkind\tlang\tlabel\tchange\tid\treviewer\tdecided_at\tnote\treason\t"
		    "occupation_label\n");
	for (size_t i = 0; i < n; i++) {
		const delta *x = &v[i];
		const char *f[] = {x->it->occ, kind_word(x->kind), x->it->lang, x->text,
				   x->review ? "review" : "add", x->it->id, x->dec->reviewer,
				   x->dec->at, x->dec->note ? x->dec->note : ""};
		tsv_put_fields(b, f, sizeof f / sizeof *f);
		buf_putc(b, '\t');
		if (x->review)
			reason(b, x);
		buf_putc(b, '\t');
		if (x->it->brief.occ_label)
			buf_puts(b, x->it->brief.occ_label);
		buf_putc(b, '\n');
	}
	return buf_status(b);
}

static int write_skos(const delta *v, size_t n, size_t nadd, const dl_opts *o, tm_buf *b,
		      tm_buf *err)
{
	skos_writer *w = skos_writer_new(b, o->format == DL_NTRIPLES);
	tm_buf iri = {0}, c = {0};
	char head[200];
	int rc = 0;
	if (!w) {
		say(err, "out of memory", NULL, NULL);
		return -1;
	}
	snprintf(head, sizeof head, "titlemill review export: %zu label%s to add", nadd,
		 nadd == 1 ? "" : "s");
	if (skos_write_comment(w, head))
		rc = -1;
	for (size_t i = 0; i < n && !rc; i++) {
		const delta *x = &v[i];
		if (x->review)
			continue;
		buf_reset(&iri);
		if (!is_iri(x->it->occ)) {
			if (!o->base) {
				say(err, "occupation '", x->it->occ,
				    "' is not an IRI; give --base IRI to make one");
				rc = -2;
				break;
			}
			buf_puts(&iri, o->base);
		}
		if (buf_puts(&iri, x->it->occ)) {
			rc = -1;
			break;
		}
		if (!is_iri(iri.data)) {
			say(err, "'", iri.data, "' is not an IRI");
			rc = -2;
			break;
		}
		if (skos_write_label(w, iri.data, x->kind, x->it->lang, x->text))
			rc = -1;
	}
	/* labels to review are never deletions: a list for the curator */
	for (size_t i = 0; i < n && !rc; i++) {
		const delta *x = &v[i];
		if (!x->review)
			continue;
		buf_reset(&c);
		buf_puts(&c, "to review, not changed: ");
		buf_puts(&c, x->it->occ);
		buf_putc(&c, ' ');
		buf_puts(&c, kind_word(x->kind));
		buf_puts(&c, " \"");
		buf_puts(&c, x->text);
		buf_puts(&c, "\"@");
		buf_puts(&c, x->it->lang);
		buf_puts(&c, " - ");
		if (reason(&c, x) || skos_write_comment(w, c.data))
			rc = -1;
	}
	if (skos_writer_end(w) && !rc)
		rc = -1;
	if (rc == -1)
		say(err, "cannot write the SKOS export", NULL, NULL);
	buf_free(&iri);
	buf_free(&c);
	return rc ? -1 : 0;
}

/* The label of x as its evidence's examples write it, in aw (empty when
 * none shows it).  0, or -1 when memory ran out. */
static int as_written(const delta *x, tm_buf *aw)
{
	const jr_val *ex = jr_get(jr_root(x->ev), "examples");
	const char *e[3];
	size_t el[3];
	int ne = 0;
	for (size_t i = 0; i < jr_vlen(ex) && ne < 3; i++)
		if ((e[ne] = jr_vstr(jr_at(ex, i), &el[ne])) != NULL)
			ne++;
	buf_reset(aw);
	if (propose_as_written(e, el, ne, x->it->label, strlen(x->it->label), aw) ||
	    buf_putc(aw, 0))
		return -1;
	aw->len--; /* ended by a NUL that is not counted */
	return 0;
}

int dl_export(const rq_queue *q, const dl_opts *o, tm_buf *out, tm_buf *err)
{
	tm_buf aw = {0};
	delta *v = calloc(q->n + 1, sizeof *v);
	size_t n = 0, nadd = 0, nbad = 0, len0 = out->len;
	int rc = -1;

	buf_reset(err);
	if (!v) {
		say(err, "out of memory", NULL, NULL);
		return -1;
	}
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		const rq_event *dec = rq_last_decision(it);
		const char *ev = rq_item_evidence(it), *w;
		char jerr[64];
		if (it->status != RQ_ACCEPTED || !dec || (o->since >= 0 && rq_time(dec->at) < o->since))
			continue;
		delta *x = &v[n++];
		x->it = it;
		x->dec = dec;
		x->review = rq_kind_delta[it->kind] == 'r';
		/* the label as postings write it when propose found it so
		 * (label_as_written), else the clean title */
		if (!ev || !(x->ev = jr_parse(ev, strlen(ev), jerr, sizeof jerr))) {
			say(err, "out of memory", NULL, NULL);
			goto done;
		}
		w = o->clean_case ? NULL : ev_str(x, NULL, "label_as_written");
		if (!w && !o->clean_case && it->kind == RK_RISING) {
			/* trend gives the clean title and the raw ones: the
			 * title as they write it, as propose finds it */
			if (as_written(x, &aw)) {
				say(err, "out of memory", NULL, NULL);
				goto done;
			}
			w = aw.len ? aw.data : NULL;
		}
		if (!(x->text = strdup(w ? w : it->label))) {
			say(err, "out of memory", NULL, NULL);
			goto done;
		}
		if (!x->review) {
			x->kind = rq_kind_delta[it->kind];
			nadd++;
		} else {
			const char *lk = ev_str(x, NULL, "label_kind");
			x->kind = lk && !strcmp(lk, "pref") ? 'p' : lk && !strcmp(lk, "hidden") ? 'h' : 'a';
		}
	}
	/* all or nothing: each item that cannot be written safely is named */
	for (size_t i = 0; i < n; i++) {
		char why[FC_WHY], head[120];
		const char *field = unsafe_field(&v[i], why);
		if (!field)
			continue;
		if (fc_id(v[i].it->id, strlen(v[i].it->id), head))
			snprintf(head, sizeof head, "the accepted suggestion number %llu in the queue: \"",
				 (unsigned long long)v[i].it->seq);
		else
			snprintf(head, sizeof head, "accepted suggestion %s: \"", v[i].it->id);
		say(err, head, field, "\" ");
		buf_puts(err, why);
		nbad++;
	}
	if (nbad) {
		char m[300];
		snprintf(m, sizeof m, "export refused, nothing written: %zu accepted suggestion%s cannot "
				      "be written safely (reject %s with --overrule, or correct the queue, "
				      "and export again)",
			 nbad, nbad == 1 ? "" : "s", nbad == 1 ? "it" : "them");
		say(err, m, NULL, NULL);
		goto done;
	}
	tm_qsort(v, n, sizeof *v, cmp_delta);
	if (o->format == DL_TSV ? write_tsv(v, n, out) : write_skos(v, n, nadd, o, out, err)) {
		if (!err->len)
			say(err, "out of memory", NULL, NULL);
		goto done;
	}
	rc = 0;
done:
	if (rc)
		out->len = len0;
	for (size_t i = 0; i < n; i++) {
		free(v[i].text);
		jr_free(v[i].ev);
	}
	free(v);
	buf_free(&aw);
	return rc;
}

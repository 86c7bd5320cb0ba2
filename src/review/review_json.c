/* review_json.c - a queue item as a JSON line: reading a queue's lines
 * (rq_parse), writing an item back (rq_item_json), and the field readers
 * the changes share (review_int.h). */
#include "review/review_json.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/jsonr.h"
#include "io/jsonw.h"
#include "review/review_batch.h"
#include "review/review_int.h"
#include "review/review_time.h"
#include "review/review_trend.h"
#include "count/strtab.h"

const char *rq_item_evidence(const rq_item *c)
{
	rq_item *it = (rq_item *)c; /* the evidence is a cache */
	char jerr[64];
	tm_buf err = {0};
	if (it->evidence || !it->raw)
		return it->evidence;
	jr_doc *d = jr_parse(it->raw, it->rawlen, jerr, sizeof jerr);
	if (d)
		it->evidence = rqi_dump(jr_get(jr_root(d), "evidence"), NULL, &err);
	jr_free(d);
	buf_free(&err);
	return it->evidence;
}

char *rqi_item_key(const rq_item *it)
{
	const char *ev = rq_item_evidence(it);
	char jerr[64];
	size_t n;
	jr_doc *d = ev ? jr_parse(ev, strlen(ev), jerr, sizeof jerr) : NULL;
	const char *k = jr_vstr(jr_get(jr_root(d), "key"), &n);
	char *r = k && n && !memchr(k, 0, n) ? tm_dupn(k, n) : strdup(it->label);
	jr_free(d);
	return r;
}

int rq_item_json(const rq_item *it, tm_buf *b)
{
	size_t start = b->len;

	if (it->raw && !it->changed) {
		buf_append(b, it->raw, it->rawlen);
		buf_putc(b, '\n');
	} else if (!rq_item_evidence(it)) {
		return TM_ENOMEM;
	} else {
		buf_puts(b, "{\"id\":");
		json_str(b, it->id, strlen(it->id));
		buf_puts(b, ",\"seq\":");
		json_u64(b, it->seq);
		json_field(b, "status", rq_status_name(it));
		json_field(b, "kind", rq_kind_names[it->kind]);
		json_field(b, "occupation", it->occ);
		json_field(b, "lang", it->lang);
		json_field(b, "label", it->label);
		buf_puts(b, ",\"score\":");
		json_num(b, it->score);
		buf_puts(b, ",\"postings\":");
		json_u64(b, it->postings);
		json_field(b, "added", it->added);
		json_field(b, "proposed", it->proposed);
		buf_puts(b, ",\"evidence\":");
		buf_puts(b, it->evidence);
		buf_puts(b, ",\"history\":[");
		for (size_t i = 0; i < it->nev; i++) {
			const rq_event *e = &it->ev[i];
			buf_puts(b, i ? ",{\"event\":" : "{\"event\":");
			json_str(b, rq_what_names[e->what], strlen(rq_what_names[e->what]));
			json_field(b, "at", e->at);
			if (e->reviewer)
				json_field(b, "reviewer", e->reviewer);
			if (e->note)
				json_field(b, "note", e->note);
			buf_puts(b, ",\"postings\":");
			json_u64(b, e->postings);
			buf_puts(b, ",\"score\":");
			json_num(b, e->score);
			if (e->reason)
				json_field(b, "reason", e->reason);
			if (e->batch) {
				buf_puts(b, ",\"batch\":");
				json_u64(b, e->batch);
			}
			if (e->was >= 0 && e->was < RQ_NSTATUS)
				json_field(b, "was", rq_status_names[e->was]);
			if (e->noise)
				buf_puts(b, ",\"noise\":true");
			if (e->evidence) {
				buf_puts(b, ",\"evidence\":");
				buf_puts(b, e->evidence);
			}
			if (e->extra)
				buf_puts(b, e->extra);
			buf_putc(b, '}');
		}
		buf_putc(b, ']');
		if (it->extra)
			buf_puts(b, it->extra);
		buf_puts(b, "}\n");
	}
	if (buf_status(b)) {
		buf_truncate(b, start); /* no part of a line */
		return TM_ENOMEM;
	}
	return TM_OK;
}

/* A string field of v, copied; NULL (with a message) when it is missing,
 * not a string or empty. */
char *rqi_get_str(const jr_val *v, const char *field, const char *where, tm_buf *err)
{
	size_t n;
	const char *s = jr_vstr(jr_get(v, field), &n);
	if (!s || !n || memchr(s, 0, n)) {
		tm_fail(err, TM_EINPUT, where, "", NULL);
		buf_puts(err, "\"");
		buf_puts(err, field);
		buf_puts(err, s ? (n ? "\" holds a NUL byte" : "\" is empty")
				: "\" is missing or not a string");
		return NULL;
	}
	char *p = tm_dupn(s, n);
	if (!p)
		tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
	return p;
}

int rqi_get_count(const jr_val *v, const char *field, uint64_t *out, const char *where,
		     tm_buf *err)
{
	const jr_val *x = jr_get(v, field);
	if (jr_vtype(x) != JR_INT || jr_vint(x) < 0) {
		tm_fail(err, TM_EINPUT, where, "\"", field);
		buf_puts(err, "\" must be a whole number of 0 or more");
		return TM_EINPUT;
	}
	*out = (uint64_t)jr_vint(x);
	return TM_OK;
}

int rqi_get_score(const jr_val *v, const char *field, double *out, const char *where,
		     tm_buf *err)
{
	const jr_val *x = jr_get(v, field);
	if ((jr_vtype(x) != JR_INT && jr_vtype(x) != JR_REAL) || !isfinite(jr_vnum(x))) {
		tm_fail(err, TM_EINPUT, where, "\"", field);
		buf_puts(err, "\" must be a number");
		return TM_EINPUT;
	}
	*out = jr_vnum(x);
	return TM_OK;
}

int rqi_get_name(const jr_val *v, const char *field, const char *const *names, int n,
		    int *out, const char *where, tm_buf *err)
{
	size_t l;
	const char *s = jr_vstr(jr_get(v, field), &l);
	if (!s || (*out = rqi_name_index(names, n, s, l)) < 0) {
		tm_fail(err, TM_EINPUT, where, "\"", field);
		buf_puts(err, "\" must be one of");
		for (int i = 0; i < n; i++) {
			buf_puts(err, i ? ", " : " ");
			buf_puts(err, names[i]);
		}
		return TM_EINPUT;
	}
	return TM_OK;
}

static int rqi_get_time(const jr_val *v, const char *field, char **out, const char *where,
		    tm_buf *err)
{
	if (!(*out = rqi_get_str(v, field, where, err)))
		return TM_EINPUT;
	if (rq_time(*out) < 0) {
		free(*out);
		*out = NULL;
		tm_fail(err, TM_EINPUT, where, "\"", field);
		buf_puts(err, "\" is not an ISO 8601 UTC time like 2026-12-02T09:30:00Z");
		return TM_EINPUT;
	}
	return TM_OK;
}

char *rqi_dump(const jr_val *v, const char *where, tm_buf *err)
{
	tm_buf b = {0};
	if (jr_dump(v, &b) || buf_putc(&b, 0)) {
		buf_free(&b);
		tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
		return NULL;
	}
	return b.data;
}

int rqi_set_brief(rq_item *it, const jr_val *ev)
{
	size_t l;
	const char *s;
	rq_brief *b = &it->brief;
	free(b->rival);
	free(b->variant_of);
	free(b->occ_label);
	memset(b, 0, sizeof *b);
	b->occ_postings = (uint64_t)jr_vint(jr_get(ev, "occupation_postings"));
	const jr_val *pv = jr_get(ev, "precision");
	b->precision = jr_vtype(pv) == JR_INT || jr_vtype(pv) == JR_REAL ? jr_vnum(pv) : -1;
	const jr_val *sv = jr_get(ev, "strength");
	b->strength = jr_vtype(sv) == JR_INT || jr_vtype(sv) == JR_REAL ? jr_vnum(sv) : -1;
	rq_trend_ev t;
	b->share_before = b->share_after = -1;
	if (rq_trend_figures(ev, &t)) {
		b->occ_postings = t.falling ? t.occ_before : t.occ_after;
		b->share_before = t.occ_before ? (double)t.before / (double)t.occ_before : 0;
		b->share_after = t.occ_after ? (double)t.after / (double)t.occ_after : 0;
	}
	const jr_val *c = jr_get(ev, "competitor");
	b->rival_postings = (uint64_t)jr_vint(jr_get(c, "postings"));
	if ((s = jr_vstr(jr_get(c, "occupation"), &l)) && !memchr(s, 0, l) &&
	    !(b->rival = tm_dupn(s, l)))
		return TM_ENOMEM;
	if ((s = jr_vstr(jr_get(ev, "variant_of"), &l)) && !memchr(s, 0, l) &&
	    !(b->variant_of = tm_dupn(s, l)))
		return TM_ENOMEM;
	if ((s = jr_vstr(jr_get(ev, "occupation_label"), &l)) && l && !memchr(s, 0, l) &&
	    !(b->occ_label = tm_dupn(s, l)))
		return TM_ENOMEM;
	return TM_OK;
}

/* The members this version reads; others are kept as they are. */
static const char *const item_keys[] = {"id", "seq", "status", "kind", "occupation", "lang",
					"label", "score", "postings", "added", "proposed",
					"evidence", "history"};
static const char *const event_keys[] = {"event",  "at",    "reviewer", "note",
					 "postings", "score", "reason",   "batch",
					 "was",    "noise", "evidence"};

/* The members of v not among keys, for writing back (*out NULL when none). */
static int others(const jr_val *v, const char *const *keys, size_t nkeys, char **out,
		  const char *where, tm_buf *err)
{
	tm_buf b = {0};
	*out = NULL;
	if (jr_dump_others(v, keys, nkeys, &b)) {
		buf_free(&b);
		tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
		return TM_ENOMEM;
	}
	*out = b.data; /* NULL when nothing was appended */
	return TM_OK;
}

/* Whether v is the JSON literal lit (true, false). */
static int is_literal(const jr_val *v, const char *lit)
{
	tm_buf b = {0};
	int yes = jr_vtype(v) == JR_OTHER && !jr_dump(v, &b) && b.len == strlen(lit) &&
		  !memcmp(b.data, lit, b.len);
	buf_free(&b);
	return yes;
}

static int is_true(const jr_val *v)
{
	return is_literal(v, "true");
}

int rqi_get_bool(const jr_val *v, const char *field, int *out, const char *where, tm_buf *err)
{
	const jr_val *x = jr_get(v, field);
	if (is_literal(x, "true") || is_literal(x, "false")) {
		*out = is_literal(x, "true");
		return TM_OK;
	}
	tm_fail(err, TM_EINPUT, where, "\"", field);
	buf_puts(err, "\" must be true or false");
	return TM_EINPUT;
}

/* Reads one history entry into it: TM_OK, TM_EINPUT or TM_ENOMEM. */
static int parse_event(rq_item *it, const jr_val *v, const char *where, tm_buf *err)
{
	int what;
	char *at;
	if (jr_vtype(v) != JR_OBJECT) {
		tm_fail(err, TM_EINPUT, where, "a history entry must be an object", NULL);
		return TM_EINPUT;
	}
	if (rqi_get_name(v, "event", rq_what_names, RE_N, &what, where, err) ||
	    rqi_get_time(v, "at", &at, where, err))
		return TM_EINPUT;
	rq_event *e = rqi_new_event(it, what, at);
	free(at);
	if (!e) {
		tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
		return TM_ENOMEM;
	}
	if (rqi_get_count(v, "postings", &e->postings, where, err) ||
	    rqi_get_score(v, "score", &e->score, where, err))
		return TM_EINPUT;
	if ((rq_is_decision(what) || what == RE_UNDONE || jr_get(v, "reviewer")) &&
	    !(e->reviewer = rqi_get_str(v, "reviewer", where, err)))
		return TM_EINPUT;
	if (jr_get(v, "reason") && !(e->reason = rqi_get_str(v, "reason", where, err)))
		return TM_EINPUT;
	if (jr_get(v, "batch") && rqi_get_count(v, "batch", &e->batch, where, err))
		return TM_EINPUT;
	if (jr_get(v, "was") &&
	    rqi_get_name(v, "was", rq_status_names, RQ_NSTATUS, &e->was, where, err))
		return TM_EINPUT;
	e->noise = is_true(jr_get(v, "noise"));
	if (jr_get(v, "note") && !(e->note = rqi_get_str(v, "note", where, err)))
		return TM_EINPUT;
	if (jr_vtype(jr_get(v, "evidence")) == JR_OBJECT &&
	    !(e->evidence = rqi_dump(jr_get(v, "evidence"), where, err)))
		return TM_EINPUT;
	return others(v, event_keys, sizeof event_keys / sizeof *event_keys, &e->extra, where, err);
}

/* Reads one item line into q.  Returns TM_OK, TM_EINPUT when the line
 * cannot be read (the reason in err; q unchanged) or TM_ENOMEM.  An unknown
 * status is kept, with a note in q->notes. */
static int parse_item(rq_queue *q, const char *line, size_t n, const char *where, tm_buf *err)
{
	char jerr[200];
	jr_doc *d = jr_parse(line, n, jerr, sizeof jerr);
	const jr_val *v = jr_root(d);
	size_t idl, sl;
	const char *id, *sn;
	rq_item x = {0}, *it;
	int rc = TM_EINPUT;

	if (!d)
		return tm_fail(err, TM_EINPUT, where, "not a queue item: ", jerr);
	if (!(id = jr_vstr(jr_get(v, "id"), &idl)) || !idl || idl > RQ_ID_MAX || memchr(id, 0, idl)) {
		tm_fail(err, TM_EINPUT, where, "\"id\" is missing or not an id", NULL);
		goto done;
	}
	if (q->index && st_find(q->index, id, idl) >= 0) {
		tm_fail(err, TM_EINPUT, where, "the id appears twice in the queue", NULL);
		goto done;
	}
	if (rqi_get_count(v, "seq", &x.seq, where, err))
		goto done;
	sn = jr_vstr(jr_get(v, "status"), &sl);
	if (sn && sl && sl <= RQ_ID_MAX && rqi_name_index(rq_status_names, RQ_NSTATUS, sn, sl) < 0 &&
	    rq_plain_text(sn, sl)) {
		/* a status of a newer version: keep the item, decide nothing */
		x.status = RQ_NSTATUS;
		if (!(x.status_name = tm_dupn(sn, sl)))
			goto oom;
	} else if (rqi_get_name(v, "status", rq_status_names, RQ_NSTATUS, &x.status, where, err))
		goto done;
	if (rqi_get_name(v, "kind", rq_kind_names, RK_N, &x.kind, where, err) ||
	    !(x.occ = rqi_get_str(v, "occupation", where, err)) ||
	    !(x.lang = rqi_get_str(v, "lang", where, err)) ||
	    !(x.label = rqi_get_str(v, "label", where, err)) ||
	    rqi_get_score(v, "score", &x.score, where, err) ||
	    rqi_get_count(v, "postings", &x.postings, where, err) ||
	    rqi_get_time(v, "added", &x.added, where, err) ||
	    rqi_get_time(v, "proposed", &x.proposed, where, err))
		goto done;
	if (jr_vtype(jr_get(v, "evidence")) != JR_OBJECT) {
		tm_fail(err, TM_EINPUT, where, "\"evidence\" must be an object", NULL);
		goto done;
	}
	if (rqi_set_brief(&x, jr_get(v, "evidence")))
		goto oom;
	const jr_val *h = jr_get(v, "history");
	if (jr_vtype(h) != JR_ARRAY || !jr_vlen(h)) {
		tm_fail(err, TM_EINPUT, where, "\"history\" must be a list of events", NULL);
		goto done;
	}
	for (size_t i = 0; i < jr_vlen(h); i++)
		if ((rc = parse_event(&x, jr_at(h, i), where, err)) != TM_OK)
			goto done;
	rc = TM_EINPUT;
	if (others(v, item_keys, sizeof item_keys / sizeof *item_keys, &x.extra, where, err))
		goto oom;
	if (!(it = rqi_new_item(q, id, idl)))
		goto oom;
	x.id = it->id;
	*it = x;
	memset(&x, 0, sizeof x);
	it->raw = line;
	it->rawlen = n;
	it->nev_stored = it->nev;
	it->changed = 0;
	if (it->seq >= q->next_seq)
		q->next_seq = it->seq + 1;
	if (it->status_name) {
		buf_puts(&q->notes, where);
		buf_puts(&q->notes, ": the status \"");
		buf_puts(&q->notes, it->status_name);
		buf_puts(&q->notes, "\" is unknown to this version of titlemill: the item is kept as "
				    "it is and cannot be decided or refreshed here\n");
	}
	rc = TM_OK;
	goto done;
oom:
	rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
done:
	rqi_item_free(&x);
	jr_free(d);
	return rc;
}

static int cmp_seq(const void *a, const void *b)
{
	const rq_item *x = a, *y = b;
	return x->seq < y->seq ? -1 : x->seq > y->seq;
}

static int cmp_bad(const void *a, const void *b)
{
	const rq_badline *x = a, *y = b;
	if (x->after != y->after)
		return x->after < y->after ? -1 : 1;
	return x->line < y->line ? -1 : x->line > y->line;
}

/* Records an unreadable line (its reason in why) and a note of it. */
static int add_bad(rq_queue *q, const char *p, size_t len, long lineno, uint64_t after,
		   const tm_buf *why)
{
	rq_badline *b = tm_grow(q->bad, &q->badcap, q->nbad + 1, sizeof *b, 16);
	if (!b)
		return TM_ENOMEM;
	q->bad = b;
	b[q->nbad++] = (rq_badline){p, len, lineno, after};
	buf_append(&q->notes, why->data, why->len);
	return buf_putc(&q->notes, '\n');
}

int rq_parse(rq_queue *q, const char *text, size_t n, const char *name, tm_buf *err)
{
	const char *p, *end;
	long lineno = 0;
	char where[600];
	uint64_t last = 0;

	if (!text)
		text = "", n = 0;
	p = text, end = text + n;

	while (p < end) {
		const char *nl = memchr(p, '\n', (size_t)(end - p));
		const char *e = nl ? nl : end;
		size_t len = (size_t)(e - p);
		lineno++;
		if (len && p[len - 1] == '\r')
			len--;
		if (len) {
			snprintf(where, sizeof where, "%s:%ld", name, lineno);
			int r = parse_item(q, p, len, where, err);
			if (r == TM_ENOMEM)
				return r;
			if (r == TM_OK)
				last = q->it[q->n - 1].seq;
			else if (add_bad(q, p, len, lineno, last, err))
				return tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
		}
		p = nl ? nl + 1 : end;
	}
	/* unreadable lines in the order they are written back */
	if (q->nbad > 1)
		tm_qsort(q->bad, q->nbad, sizeof *q->bad, cmp_bad);
	/* a store hands its items in no order: arrival order is seq */
	if (q->n > 1)
		tm_qsort(q->it, q->n, sizeof *q->it, cmp_seq);
	for (size_t i = 0; i < q->n; i++) {
		long k = st_find(q->index, q->it[i].id, strlen(q->it[i].id));
		q->index->ent[k].count = i + 1;
	}
	if (!q->next_seq)
		q->next_seq = 1;
	if (buf_status(&q->notes))
		return tm_fail(err, TM_ENOMEM, name, "out of memory", NULL);
	return TM_OK;
}

/* review.c - the review queue: items, their history, the add and decision
 * rules (where the queue lives: queue.h). */
#include "review.h"

#include <errno.h>
#include <fcntl.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "decode.h"
#include "fieldcheck.h"
#include "jsonr.h"
#include "jsonw.h"
#include "outfile.h"
#include "strtab.h"
#include "tsv.h"

const char *const rq_status_names[RQ_NSTATUS] = {"open", "accepted", "rejected", "deferred"};
const char *const rq_kind_names[RK_N] = {"new_alt_label", "new_hidden_label", "rare_label",
					 "used_elsewhere"};
const char *const rq_what_names[RE_N] = {"added",    "refreshed", "reopened",
					 "accepted", "rejected",  "deferred"};
const char *const rq_decision_words[3] = {"accept", "reject", "defer"};

/* Longest id taken from propose output: ours are 16 hex digits. */
#define ID_MAX 64

static int name_index(const char *const *names, int n, const char *s, size_t len)
{
	for (int i = 0; i < n; i++)
		if (strlen(names[i]) == len && !memcmp(names[i], s, len))
			return i;
	return -1;
}

static char *dupn(const char *s, size_t n)
{
	char *p = malloc(n + 1);
	if (p) {
		memcpy(p, s, n);
		p[n] = 0;
	}
	return p;
}

static void event_free(rq_event *e)
{
	free(e->at);
	free(e->reviewer);
	free(e->note);
	free(e->evidence);
	free(e->extra);
}

static void item_free(rq_item *it)
{
	free(it->id);
	free(it->occ);
	free(it->lang);
	free(it->label);
	free(it->added);
	free(it->proposed);
	free(it->evidence);
	free(it->brief.rival);
	free(it->brief.variant_of);
	free(it->status_name);
	free(it->extra);
	for (size_t i = 0; i < it->nev; i++)
		event_free(&it->ev[i]);
	free(it->ev);
}

void rq_free(rq_queue *q)
{
	if (!q)
		return;
	for (size_t i = 0; i < q->n; i++)
		item_free(&q->it[i]);
	free(q->it);
	if (q->index) {
		st_free(q->index);
		free(q->index);
	}
	free(q->bad);
	buf_free(&q->notes);
	memset(q, 0, sizeof *q);
}

const char *rq_status_name(const rq_item *it)
{
	return it->status_name ? it->status_name : rq_status_names[it->status];
}

static void msg(tm_buf *err, const char *where, const char *what, const char *detail)
{
	buf_reset(err);
	if (where) {
		buf_puts(err, where);
		buf_puts(err, ": ");
	}
	buf_puts(err, what);
	if (detail) {
		buf_puts(err, detail);
	}
}

/* Appends a new item slot; returns it zeroed, or NULL. */
static rq_item *new_item(rq_queue *q, const char *id, size_t idl)
{
	size_t idx;
	if (!q->index && !(q->index = calloc(1, sizeof *q->index)))
		return NULL;
	if (q->n == q->cap) {
		size_t cap = q->cap ? q->cap * 2 : 64;
		rq_item *p = realloc(q->it, cap * sizeof *p);
		if (!p)
			return NULL;
		q->it = p;
		q->cap = cap;
	}
	if (st_add(q->index, id, idl, q->n + 1, &idx) != 1)
		return NULL; /* out of memory, or the id is there already */
	rq_item *it = &q->it[q->n++];
	memset(it, 0, sizeof *it);
	if (!(it->id = dupn(id, idl))) {
		q->n--;
		return NULL;
	}
	return it;
}

static rq_event *new_event(rq_item *it, int what, const char *at)
{
	if (it->nev == it->evcap) {
		size_t cap = it->evcap ? it->evcap * 2 : 4;
		rq_event *p = realloc(it->ev, cap * sizeof *p);
		if (!p)
			return NULL;
		it->ev = p;
		it->evcap = cap;
	}
	rq_event *e = &it->ev[it->nev];
	memset(e, 0, sizeof *e);
	e->what = what;
	e->postings = it->postings;
	e->score = it->score;
	if (!(e->at = strdup(at)))
		return NULL;
	it->nev++;
	it->changed = 1;
	return e;
}

rq_item *rq_find(const rq_queue *q, const char *id, size_t idlen, int *many)
{
	rq_item *hit = NULL;
	*many = 0;
	if (!q->index || !idlen)
		return NULL;
	long i = st_find(q->index, id, idlen);
	if (i >= 0)
		return &q->it[q->index->ent[i].count - 1];
	if (idlen < 6)
		return NULL;
	for (size_t k = 0; k < q->n; k++)
		if (!strncmp(q->it[k].id, id, idlen)) {
			if (hit) {
				*many = 1;
				return NULL;
			}
			hit = &q->it[k];
		}
	return hit;
}

const rq_event *rq_last_decision(const rq_item *it)
{
	for (size_t i = it->nev; i-- > 0;)
		if (it->ev[i].what >= RE_ACCEPTED)
			return &it->ev[i];
	return NULL;
}

/* ---- JSON ---- */

static char *dump(const jr_val *v, const char *where, tm_buf *err);

static void put_num(tm_buf *b, double v)
{
	char s[48];
	snprintf(s, sizeof s, "%.4f", isfinite(v) ? v : 0.0);
	buf_puts(b, s);
}

static void put_u64(tm_buf *b, uint64_t v)
{
	char s[24];
	snprintf(s, sizeof s, "%llu", (unsigned long long)v);
	buf_puts(b, s);
}

static void put_field(tm_buf *b, const char *key, const char *s)
{
	buf_putc(b, ',');
	json_key(b, key);
	json_str(b, s, strlen(s));
}

const char *rq_item_evidence(const rq_item *c)
{
	rq_item *it = (rq_item *)c; /* the evidence is a cache */
	char jerr[64];
	tm_buf err = {0};
	if (it->evidence || !it->raw)
		return it->evidence;
	jr_doc *d = jr_parse(it->raw, it->rawlen, jerr, sizeof jerr);
	if (d)
		it->evidence = dump(jr_get(jr_root(d), "evidence"), NULL, &err);
	jr_free(d);
	buf_free(&err);
	return it->evidence;
}

int rq_item_json(const rq_item *it, tm_buf *b)
{
	if (it->raw && !it->changed)
		return buf_append(b, it->raw, it->rawlen) || buf_putc(b, '\n') ? -1 : 0;
	if (!rq_item_evidence(it))
		return -1;
	buf_puts(b, "{\"id\":");
	json_str(b, it->id, strlen(it->id));
	buf_puts(b, ",\"seq\":");
	put_u64(b, it->seq);
	put_field(b, "status", rq_status_name(it));
	put_field(b, "kind", rq_kind_names[it->kind]);
	put_field(b, "occupation", it->occ);
	put_field(b, "lang", it->lang);
	put_field(b, "label", it->label);
	buf_puts(b, ",\"score\":");
	put_num(b, it->score);
	buf_puts(b, ",\"postings\":");
	put_u64(b, it->postings);
	put_field(b, "added", it->added);
	put_field(b, "proposed", it->proposed);
	buf_puts(b, ",\"evidence\":");
	buf_puts(b, it->evidence);
	buf_puts(b, ",\"history\":[");
	for (size_t i = 0; i < it->nev; i++) {
		const rq_event *e = &it->ev[i];
		buf_puts(b, i ? ",{\"event\":" : "{\"event\":");
		json_str(b, rq_what_names[e->what], strlen(rq_what_names[e->what]));
		put_field(b, "at", e->at);
		if (e->reviewer)
			put_field(b, "reviewer", e->reviewer);
		if (e->note)
			put_field(b, "note", e->note);
		buf_puts(b, ",\"postings\":");
		put_u64(b, e->postings);
		buf_puts(b, ",\"score\":");
		put_num(b, e->score);
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
	return buf_puts(b, "}\n");
}

/* A string field of v, copied; NULL (with a message) when it is missing,
 * not a string or empty. */
static char *get_str(const jr_val *v, const char *field, const char *where, tm_buf *err)
{
	size_t n;
	const char *s = jr_vstr(jr_get(v, field), &n);
	if (!s || !n || memchr(s, 0, n)) {
		msg(err, where, "", NULL);
		buf_puts(err, "\"");
		buf_puts(err, field);
		buf_puts(err, s ? (n ? "\" holds a NUL byte" : "\" is empty")
				: "\" is missing or not a string");
		return NULL;
	}
	char *p = dupn(s, n);
	if (!p)
		msg(err, where, "out of memory", NULL);
	return p;
}

static int get_count(const jr_val *v, const char *field, uint64_t *out, const char *where,
		     tm_buf *err)
{
	const jr_val *x = jr_get(v, field);
	if (jr_vtype(x) != JR_INT || jr_vint(x) < 0) {
		msg(err, where, "\"", field);
		buf_puts(err, "\" must be a whole number of 0 or more");
		return -1;
	}
	*out = (uint64_t)jr_vint(x);
	return 0;
}

static int get_score(const jr_val *v, const char *field, double *out, const char *where,
		     tm_buf *err)
{
	const jr_val *x = jr_get(v, field);
	if ((jr_vtype(x) != JR_INT && jr_vtype(x) != JR_REAL) || !isfinite(jr_vnum(x))) {
		msg(err, where, "\"", field);
		buf_puts(err, "\" must be a number");
		return -1;
	}
	*out = jr_vnum(x);
	return 0;
}

static int get_name(const jr_val *v, const char *field, const char *const *names, int n,
		    int *out, const char *where, tm_buf *err)
{
	size_t l;
	const char *s = jr_vstr(jr_get(v, field), &l);
	if (!s || (*out = name_index(names, n, s, l)) < 0) {
		msg(err, where, "\"", field);
		buf_puts(err, "\" must be one of");
		for (int i = 0; i < n; i++) {
			buf_puts(err, i ? ", " : " ");
			buf_puts(err, names[i]);
		}
		return -1;
	}
	return 0;
}

static int get_time(const jr_val *v, const char *field, char **out, const char *where,
		    tm_buf *err)
{
	if (!(*out = get_str(v, field, where, err)))
		return -1;
	if (rq_time(*out) < 0) {
		free(*out);
		*out = NULL;
		msg(err, where, "\"", field);
		buf_puts(err, "\" is not an ISO 8601 UTC time like 2026-12-02T09:30:00Z");
		return -1;
	}
	return 0;
}

static char *dump(const jr_val *v, const char *where, tm_buf *err)
{
	tm_buf b = {0};
	if (jr_dump(v, &b) || buf_putc(&b, 0)) {
		buf_free(&b);
		msg(err, where, "out of memory", NULL);
		return NULL;
	}
	return b.data;
}

/* The list's figures from an evidence object; -1 when out of memory. */
static int set_brief(rq_item *it, const jr_val *ev)
{
	size_t l;
	const char *s;
	rq_brief *b = &it->brief;
	free(b->rival);
	free(b->variant_of);
	memset(b, 0, sizeof *b);
	b->occ_postings = (uint64_t)jr_vint(jr_get(ev, "occupation_postings"));
	b->precision = jr_vnum(jr_get(ev, "precision"));
	const jr_val *c = jr_get(ev, "competitor");
	b->rival_postings = (uint64_t)jr_vint(jr_get(c, "postings"));
	if ((s = jr_vstr(jr_get(c, "occupation"), &l)) && !memchr(s, 0, l) &&
	    !(b->rival = dupn(s, l)))
		return -1;
	if ((s = jr_vstr(jr_get(ev, "variant_of"), &l)) && !memchr(s, 0, l) &&
	    !(b->variant_of = dupn(s, l)))
		return -1;
	return 0;
}

/* The members this version reads; others are kept as they are. */
static const char *const item_keys[] = {"id", "seq", "status", "kind", "occupation", "lang",
					"label", "score", "postings", "added", "proposed",
					"evidence", "history"};
static const char *const event_keys[] = {"event", "at", "reviewer", "note", "postings", "score",
					 "evidence"};

/* The members of v not among keys, for writing back (*out NULL when none). */
static int others(const jr_val *v, const char *const *keys, size_t nkeys, char **out,
		  const char *where, tm_buf *err)
{
	tm_buf b = {0};
	*out = NULL;
	if (jr_dump_others(v, keys, nkeys, &b)) {
		buf_free(&b);
		msg(err, where, "out of memory", NULL);
		return -1;
	}
	*out = b.data; /* NULL when nothing was appended */
	return 0;
}

static int parse_event(rq_item *it, const jr_val *v, const char *where, tm_buf *err)
{
	int what;
	char *at;
	if (jr_vtype(v) != JR_OBJECT) {
		msg(err, where, "a history entry must be an object", NULL);
		return -1;
	}
	if (get_name(v, "event", rq_what_names, RE_N, &what, where, err) ||
	    get_time(v, "at", &at, where, err))
		return -1;
	rq_event *e = new_event(it, what, at);
	free(at);
	if (!e) {
		msg(err, where, "out of memory", NULL);
		return -1;
	}
	if (get_count(v, "postings", &e->postings, where, err) ||
	    get_score(v, "score", &e->score, where, err))
		return -1;
	if (what >= RE_ACCEPTED && !(e->reviewer = get_str(v, "reviewer", where, err)))
		return -1;
	if (jr_get(v, "note") && !(e->note = get_str(v, "note", where, err)))
		return -1;
	if (jr_vtype(jr_get(v, "evidence")) == JR_OBJECT &&
	    !(e->evidence = dump(jr_get(v, "evidence"), where, err)))
		return -1;
	return others(v, event_keys, sizeof event_keys / sizeof *event_keys, &e->extra, where, err);
}

/* Reads one item line into q.  Returns 0, 1 when the line cannot be read
 * (the reason in err; q unchanged) or -1 when out of memory.  An unknown
 * status is kept, with a note in q->notes. */
static int parse_item(rq_queue *q, const char *line, size_t n, const char *where, tm_buf *err)
{
	char jerr[200];
	jr_doc *d = jr_parse(line, n, jerr, sizeof jerr);
	const jr_val *v = jr_root(d);
	size_t idl, sl;
	const char *id, *sn;
	rq_item x = {0}, *it;
	int rc = 1;

	if (!d) {
		msg(err, where, "not a queue item: ", jerr);
		return 1;
	}
	if (!(id = jr_vstr(jr_get(v, "id"), &idl)) || !idl || idl > ID_MAX || memchr(id, 0, idl)) {
		msg(err, where, "\"id\" is missing or not an id", NULL);
		goto done;
	}
	if (q->index && st_find(q->index, id, idl) >= 0) {
		msg(err, where, "the id appears twice in the queue", NULL);
		goto done;
	}
	if (get_count(v, "seq", &x.seq, where, err))
		goto done;
	sn = jr_vstr(jr_get(v, "status"), &sl);
	if (sn && sl && sl <= ID_MAX && name_index(rq_status_names, RQ_NSTATUS, sn, sl) < 0 &&
	    rq_plain_text(sn, sl)) {
		/* a status of a newer version: keep the item, decide nothing */
		x.status = RQ_NSTATUS;
		if (!(x.status_name = dupn(sn, sl)))
			goto oom;
	} else if (get_name(v, "status", rq_status_names, RQ_NSTATUS, &x.status, where, err))
		goto done;
	if (get_name(v, "kind", rq_kind_names, RK_N, &x.kind, where, err) ||
	    !(x.occ = get_str(v, "occupation", where, err)) ||
	    !(x.lang = get_str(v, "lang", where, err)) ||
	    !(x.label = get_str(v, "label", where, err)) ||
	    get_score(v, "score", &x.score, where, err) ||
	    get_count(v, "postings", &x.postings, where, err) ||
	    get_time(v, "added", &x.added, where, err) ||
	    get_time(v, "proposed", &x.proposed, where, err))
		goto done;
	if (jr_vtype(jr_get(v, "evidence")) != JR_OBJECT) {
		msg(err, where, "\"evidence\" must be an object", NULL);
		goto done;
	}
	if (set_brief(&x, jr_get(v, "evidence")))
		goto oom;
	const jr_val *h = jr_get(v, "history");
	if (jr_vtype(h) != JR_ARRAY || !jr_vlen(h)) {
		msg(err, where, "\"history\" must be a list of events", NULL);
		goto done;
	}
	for (size_t i = 0; i < jr_vlen(h); i++)
		if (parse_event(&x, jr_at(h, i), where, err))
			goto done;
	if (others(v, item_keys, sizeof item_keys / sizeof *item_keys, &x.extra, where, err))
		goto oom;
	if (!(it = new_item(q, id, idl)))
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
	rc = 0;
	goto done;
oom:
	msg(err, where, "out of memory", NULL);
	rc = -1;
done:
	item_free(&x);
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
	rq_badline *b = realloc(q->bad, (q->nbad + 1) * sizeof *b);
	if (!b)
		return -1;
	q->bad = b;
	b[q->nbad++] = (rq_badline){p, len, lineno, after};
	return buf_append(&q->notes, why->data, why->len) || buf_putc(&q->notes, '\n');
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
			if (r < 0)
				return -1;
			if (r == 0)
				last = q->it[q->n - 1].seq;
			else if (add_bad(q, p, len, lineno, last, err)) {
				msg(err, where, "out of memory", NULL);
				return -1;
			}
		}
		p = nl ? nl + 1 : end;
	}
	/* unreadable lines in the order they are written back */
	if (q->nbad > 1)
		qsort(q->bad, q->nbad, sizeof *q->bad, cmp_bad);
	/* a store hands its items in no order: arrival order is seq */
	if (q->n > 1)
		qsort(q->it, q->n, sizeof *q->it, cmp_seq);
	for (size_t i = 0; i < q->n; i++) {
		long k = st_find(q->index, q->it[i].id, strlen(q->it[i].id));
		q->index->ent[k].count = i + 1;
	}
	if (!q->next_seq)
		q->next_seq = 1;
	return 0;
}

/* ---- changes ---- */

static int set_evidence(rq_item *it, const jr_val *v, uint64_t postings, double score,
			const char *now, const char *where, tm_buf *err)
{
	char *ev = dump(v, where, err), *pr = strdup(now);
	if (!ev || !pr || set_brief(it, v)) {
		free(ev);
		free(pr);
		msg(err, where, "out of memory", NULL);
		return -1;
	}
	free(it->evidence);
	free(it->proposed);
	it->evidence = ev;
	it->proposed = pr;
	it->postings = postings;
	it->score = score;
	it->changed = 1;
	return 0;
}

int rq_add(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	   double reopen_factor, rq_addstat *st, tm_buf *err)
{
	char jerr[200];
	jr_doc *d = jr_parse(line, n, jerr, sizeof jerr);
	const jr_val *v = jr_root(d);
	const char *id;
	size_t idl;
	int kind, rc = -1;
	uint64_t postings;
	double score;
	char *occ = NULL, *lang = NULL, *label = NULL;

	if (!d) {
		msg(err, where, "not a suggestion: ", jerr);
		return -1;
	}
	if (!(id = jr_vstr(jr_get(v, "id"), &idl)) || !idl || idl > ID_MAX || memchr(id, 0, idl)) {
		msg(err, where, "\"id\" is missing or not an id (a string of 1 to 64 bytes)", NULL);
		goto done;
	}
	if (get_name(v, "kind", rq_kind_names, RK_N, &kind, where, err) ||
	    !(occ = get_str(v, "occupation", where, err)) ||
	    !(lang = get_str(v, "lang", where, err)) || !(label = get_str(v, "label", where, err)) ||
	    get_score(v, "score", &score, where, err) ||
	    get_count(v, "postings", &postings, where, err))
		goto done;
	/* every string that can reach an export, before anything changes */
	const char *field;
	char why[FC_WHY];
	if (fc_suggestion(v, &field, why)) {
		msg(err, where, "\"", field);
		buf_puts(err, "\" ");
		buf_puts(err, why);
		goto done;
	}

	long at = q->index ? st_find(q->index, id, idl) : -1;
	rq_item *it = at >= 0 ? &q->it[q->index->ent[at].count - 1] : NULL;
	if (!it) {
		if (!(it = new_item(q, id, idl))) {
			msg(err, where, "out of memory", NULL);
			goto done;
		}
		it->kind = kind;
		it->occ = occ, it->lang = lang, it->label = label;
		occ = lang = label = NULL;
		if (!q->next_seq)
			q->next_seq = 1;
		it->seq = q->next_seq++;
		it->status = RQ_OPEN;
		if (!(it->added = strdup(now)) ||
		    set_evidence(it, v, postings, score, now, where, err) ||
		    !new_event(it, RE_ADDED, now)) {
			msg(err, where, "out of memory", NULL);
			goto done;
		}
		st->added++;
		rc = 0;
		goto done;
	}
	if (it->kind != kind || strcmp(it->occ, occ) || strcmp(it->lang, lang)) {
		msg(err, where, "id ", it->id);
		buf_puts(err, " is in the queue for another suggestion (kind, occupation or language differ)");
		goto done;
	}
	rc = 0;
	if (it->status == RQ_NSTATUS) {
		st->unknown_status++;
		goto done;
	}
	if (it->status == RQ_ACCEPTED) {
		st->accepted_before++;
		goto done;
	}
	if (it->status == RQ_REJECTED) {
		const rq_event *dec = rq_last_decision(it);
		double base = dec ? (double)dec->postings : (double)it->postings;
		if ((double)postings < reopen_factor * base || postings == 0) {
			st->kept_closed++;
			goto done;
		}
		if (set_evidence(it, v, postings, score, now, where, err)) {
			rc = -1;
			goto done;
		}
		rq_event *e = new_event(it, RE_REOPENED, now);
		if (!e || !(e->evidence = strdup(it->evidence))) {
			msg(err, where, "out of memory", NULL);
			rc = -1;
			goto done;
		}
		it->status = RQ_OPEN;
		st->reopened++;
		goto done;
	}
	/* open or deferred: the newest evidence, and a note of it when the
	 * figures moved */
	int moved = postings != it->postings || fabs(score - it->score) >= 0.00005;
	if (set_evidence(it, v, postings, score, now, where, err)) {
		rc = -1;
		goto done;
	}
	if (moved) {
		if (!new_event(it, RE_REFRESHED, now)) {
			msg(err, where, "out of memory", NULL);
			rc = -1;
			goto done;
		}
		st->refreshed++;
	} else
		st->unchanged++;
done:
	free(occ);
	free(lang);
	free(label);
	jr_free(d);
	return rc;
}

int rq_decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
	      int overrule, tm_buf *m)
{
	static const int status_of[3] = {RQ_ACCEPTED, RQ_REJECTED, RQ_DEFERRED};
	static const int event_of[3] = {RE_ACCEPTED, RE_REJECTED, RE_DEFERRED};
	const rq_event *dec = rq_last_decision(it);
	int want = status_of[d];

	buf_reset(m);
	if (it->status == RQ_NSTATUS) {
		buf_puts(m, it->id);
		buf_puts(m, ": its status \"");
		buf_puts(m, it->status_name);
		buf_puts(m, "\" is unknown to this version of titlemill; not changed");
		return RD_CONFLICT;
	}
	if (it->status == want) {
		buf_puts(m, it->id);
		buf_puts(m, ": already ");
		buf_puts(m, rq_status_names[want]);
		if (dec) {
			buf_puts(m, " by ");
			buf_puts(m, dec->reviewer);
			buf_puts(m, " at ");
			buf_puts(m, dec->at);
		}
		return RD_SAME;
	}
	/* an open or deferred item takes any decision; a closed one only
	 * when the curator overrules on purpose */
	if ((it->status == RQ_ACCEPTED || it->status == RQ_REJECTED) && !overrule) {
		buf_puts(m, it->id);
		buf_puts(m, ": ");
		buf_puts(m, rq_status_names[it->status]);
		if (dec) {
			buf_puts(m, " by ");
			buf_puts(m, dec->reviewer);
			buf_puts(m, " at ");
			buf_puts(m, dec->at);
		}
		buf_puts(m, "; not changed to ");
		buf_puts(m, rq_status_names[want]);
		buf_puts(m, " (--overrule changes a decision on purpose)");
		return RD_CONFLICT;
	}
	if (!rq_item_evidence(it)) {
		buf_puts(m, "out of memory");
		return -1;
	}
	rq_event *e = new_event(it, event_of[d], now);
	if (!e || !(e->reviewer = strdup(reviewer)) || (note && *note && !(e->note = strdup(note))) ||
	    !(e->evidence = strdup(it->evidence))) {
		buf_puts(m, "out of memory");
		return -1;
	}
	it->status = want;
	return RD_APPLIED;
}

/* ---- batches of decisions ---- */

rq_decision *rq_decisions_push(rq_decisions *ds)
{
	rq_decision *p = realloc(ds->v, (ds->n + 1) * sizeof *p);
	if (!p)
		return NULL;
	ds->v = p;
	memset(&p[ds->n], 0, sizeof *p);
	return &p[ds->n++];
}

void rq_decisions_free(rq_decisions *ds)
{
	for (size_t i = 0; i < ds->n; i++) {
		free(ds->v[i].id);
		free(ds->v[i].reviewer);
		free(ds->v[i].note);
		free(ds->v[i].where);
	}
	free(ds->v);
	ds->v = NULL;
	ds->n = 0;
}

int rq_plain_text(const char *s, size_t n)
{
	char why[FC_WHY];
	return !n || fc_text(s, n, (size_t)-1, why) == 0;
}

long rq_decisions_read(const char *path, const char *reviewer, rq_decisions *ds, FILE *report,
		       tm_buf *err)
{
	tsv_reader t;
	long bad = 0;
	int r;

	if (tsv_open(&t, path) != 0) {
		msg(err, NULL, t.err.data, NULL);
		tsv_close(&t);
		return -1;
	}
	int ci = tsv_col(&t, "id"), cd = tsv_col(&t, "decision"), cr = tsv_col(&t, "reviewer"),
	    cn = tsv_col(&t, "note");
	if (ci < 0 || cd < 0 || (cr < 0 && (!reviewer || !*reviewer))) {
		msg(err, NULL, path, ":1: a decisions file needs the columns id, decision and "
				     "reviewer (or --reviewer), and may have note");
		tsv_close(&t);
		return -1;
	}
	while ((r = tsv_next(&t)) == 1) {
		size_t il, dl, rl, nl;
		const char *id = tsv_field(&t, ci, &il), *dw = tsv_field(&t, cd, &dl);
		const char *rv = tsv_field(&t, cr, &rl), *nt = tsv_field(&t, cn, &nl);
		char where[600];
		int d = -1;
		snprintf(where, sizeof where, "%s:%ld", path, t.lr.lineno);
		for (int k = 0; k < 3; k++)
			if (strlen(rq_decision_words[k]) == dl && !memcmp(rq_decision_words[k], dw, dl))
				d = k;
		if (!rl && reviewer) {
			rv = reviewer;
			rl = strlen(rv);
		}
		const char *why = !il ? "no id"
				  : il > ID_MAX || !rq_plain_text(id, il) ? "that is not an id"
				  : d < 0 ? NULL
				  : !rl ? "no reviewer" : "";
		char w[FC_WHY];
		const char *field = !why || *why ? NULL
				    : fc_name(rv, rl, w) ? "the reviewer"
				    : fc_note(nt, nl, w) ? "the note" : NULL;
		if (field) {
			fprintf(report, "titlemill review: %s: %s %s\n", where, field, w);
			bad++;
			continue;
		}
		if (!why) {
			fprintf(report, "titlemill review: %s: the decision is accept, reject or defer, not '%.*s'\n",
				where, (int)(dl > 40 ? 40 : dl), dw);
			bad++;
			continue;
		}
		if (*why) {
			fprintf(report, "titlemill review: %s: %s\n", where, why);
			bad++;
			continue;
		}
		rq_decision *x = rq_decisions_push(ds);
		if (!x || !(x->id = dupn(id, il)) || !(x->reviewer = dupn(rv, rl)) ||
		    (nl && !(x->note = dupn(nt, nl))) || !(x->where = strdup(where))) {
			msg(err, NULL, "out of memory", NULL);
			tsv_close(&t);
			return -1;
		}
		x->d = d;
	}
	if (r < 0) {
		msg(err, NULL, t.err.data, NULL);
		tsv_close(&t);
		return -1;
	}
	tsv_close(&t);
	return bad;
}

/* ---- time ---- */

static long long days_from_civil(long long y, unsigned m, unsigned d)
{
	y -= m <= 2;
	long long era = (y >= 0 ? y : y - 399) / 400;
	unsigned yoe = (unsigned)(y - era * 400);
	unsigned doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
	unsigned doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
	return era * 146097 + (long long)doe - 719468;
}

long long rq_time(const char *s)
{
	unsigned v[6];
	static const unsigned dim[12] = {31, 29, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
	static const char shape[] = "dddd-dd-ddTdd:dd:ddZ";

	if (strlen(s) != 20)
		return -1;
	for (int i = 0; i < 20; i++)
		if (shape[i] == 'd' ? (s[i] < '0' || s[i] > '9') : s[i] != shape[i])
			return -1;
	static const int at[6] = {0, 5, 8, 11, 14, 17};
	for (int i = 0; i < 6; i++) {
		v[i] = 0;
		for (int k = at[i]; k < (i ? at[i] + 2 : 4); k++)
			v[i] = v[i] * 10 + (unsigned)(s[k] - '0');
	}
	if (v[1] < 1 || v[1] > 12 || v[2] < 1 || v[2] > dim[v[1] - 1] || v[3] > 23 || v[4] > 59 ||
	    v[5] > 60)
		return -1;
	if (v[1] == 2 && v[2] == 29 && !(v[0] % 4 == 0 && (v[0] % 100 || v[0] % 400 == 0)))
		return -1;
	return days_from_civil(v[0], v[1], v[2]) * 86400 + v[3] * 3600 + v[4] * 60 + v[5];
}

int rq_now(char out[21], tm_buf *err)
{
	const char *env = getenv("TITLEMILL_NOW");
	if (env && *env) {
		if (rq_time(env) < 0) {
			msg(err, NULL, "TITLEMILL_NOW must be an ISO 8601 UTC time like 2026-12-02T09:30:00Z, not ", env);
			return -1;
		}
		memcpy(out, env, 21);
		return 0;
	}
	time_t t = time(NULL);
	struct tm tm;
	if (!gmtime_r(&t, &tm) || !strftime(out, 21, "%Y-%m-%dT%H:%M:%SZ", &tm)) {
		msg(err, NULL, "cannot read the clock", NULL);
		return -1;
	}
	return 0;
}

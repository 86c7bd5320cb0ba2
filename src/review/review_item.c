/* review_item.c - the queue in memory: items, their events, finding an
 * item by id. */
#include "review/review.h"

#include <stdlib.h>
#include <string.h>

#include "review/review_int.h"
#include "count/strtab.h"

const char *const rq_status_names[RQ_NSTATUS] = {"open", "accepted", "rejected", "deferred"};
const char *const rq_kind_names[RK_N] = {"new_alt_label", "new_hidden_label", "rare_label",
					 "used_elsewhere", "overlapping_occupations",
					 "nearer_other_group"};
const char *const rq_what_names[RE_N] = {"added",    "refreshed", "reopened",
					 "accepted", "rejected",  "deferred"};
const char *const rq_decision_words[3] = {"accept", "reject", "defer"};

int rqi_name_index(const char *const *names, int n, const char *s, size_t len)
{
	for (int i = 0; i < n; i++)
		if (strlen(names[i]) == len && !memcmp(names[i], s, len))
			return i;
	return -1;
}

void rqi_event_free(rq_event *e)
{
	free(e->at);
	free(e->reviewer);
	free(e->note);
	free(e->evidence);
	free(e->extra);
}

void rqi_item_free(rq_item *it)
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
		rqi_event_free(&it->ev[i]);
	free(it->ev);
}

void rq_free(rq_queue *q)
{
	if (!q)
		return;
	for (size_t i = 0; i < q->n; i++)
		rqi_item_free(&q->it[i]);
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

rq_item *rqi_new_item(rq_queue *q, const char *id, size_t idl)
{
	size_t idx;
	if (!q->index && !(q->index = calloc(1, sizeof *q->index)))
		return NULL;
	rq_item *p = tm_grow(q->it, &q->cap, q->n + 1, sizeof *p, 64);
	if (!p)
		return NULL;
	q->it = p;
	if (st_add(q->index, id, idl, q->n + 1, &idx) != 1)
		return NULL; /* out of memory, or the id is there already */
	rq_item *it = &q->it[q->n++];
	memset(it, 0, sizeof *it);
	if (!(it->id = tm_dupn(id, idl))) {
		q->n--;
		return NULL;
	}
	return it;
}

rq_event *rqi_new_event(rq_item *it, int what, const char *at)
{
	rq_event *p = tm_grow(it->ev, &it->evcap, it->nev + 1, sizeof *p, 4);
	if (!p)
		return NULL;
	it->ev = p;
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

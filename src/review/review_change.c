/* review_change.c - the changes to a queue: a suggestion from propose
 * taken in (added, refreshed, reopened or left alone), a decision
 * recorded. */
#include "review/review_change.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "io/fieldcheck.h"
#include "io/jsonr.h"
#include "review/review_int.h"
#include "review/review_json.h"
#include "review/review_trend.h"
#include "count/strtab.h"
#include "rank/stats.h"

static int set_evidence(rq_item *it, const jr_val *v, uint64_t postings, double score,
			const char *now, const char *where, tm_buf *err)
{
	char *ev = rqi_dump(v, where, err), *pr = strdup(now);
	if (!ev || !pr || rqi_set_brief(it, v)) {
		free(ev);
		free(pr);
		return tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
	}
	free(it->evidence);
	free(it->proposed);
	it->evidence = ev;
	it->proposed = pr;
	it->postings = postings;
	it->score = score;
	it->changed = 1;
	return TM_OK;
}

/* The figures the reopening rules compare, from an evidence object.  A
 * row of trend: the postings of the title and of its occupation in the
 * window "after", and whether the title falls. */
typedef struct figures {
	uint64_t postings, occ_postings;
	double precision; /* -1: none */
	int falling;
} figures;

static figures figures_of(const jr_val *ev, uint64_t postings)
{
	figures f = {postings, 0, -1, 0};
	const jr_val *p = jr_get(ev, "precision");
	long long o = jr_vint(jr_get(ev, "occupation_postings"));
	rq_trend_ev t;
	f.occ_postings = o > 0 ? (uint64_t)o : 0;
	if ((jr_vtype(p) == JR_INT || jr_vtype(p) == JR_REAL) && jr_vnum(p) >= 0 && jr_vnum(p) <= 1)
		f.precision = jr_vnum(p);
	if (rq_trend_figures(ev, &t)) {
		f.postings = t.after;
		f.occ_postings = t.occ_after;
		f.falling = t.falling;
	}
	return f;
}

/* Why a rejected item reopens with the evidence now (rq_reopen), written
 * in why; 0 when it stays closed. */
static int reopens(const rq_event *dec, const figures *now, const rq_reopen *r, char *why,
		   size_t wn)
{
	figures then = {dec->postings, 0, -1, 0};
	char jerr[64];
	jr_doc *d = dec->evidence ? jr_parse(dec->evidence, strlen(dec->evidence), jerr, sizeof jerr)
				  : NULL;
	if (d)
		then = figures_of(jr_root(d), dec->postings);
	jr_free(d);
	if (then.occ_postings && now->occ_postings && then.postings <= then.occ_postings &&
	    now->postings <= now->occ_postings) {
		double lo0, hi0, lo1, hi1;
		wilson(then.postings, then.occ_postings, STATS_Z95, &lo0, &hi0);
		wilson(now->postings, now->occ_postings, STATS_Z95, &lo1, &hi1);
		/* a rising share grew; a fading label kept by the rejection fell
		 * further */
		int moved = now->falling ? hi1 < lo0 : lo1 > hi0;
		if (moved) {
			snprintf(why, wn, "the share %s: %llu of %llu postings, %s bound %.4f %s %.4f, "
					  "the %s bound at the rejection (%llu of %llu)",
				 now->falling ? "fell" : "grew", (unsigned long long)now->postings,
				 (unsigned long long)now->occ_postings, now->falling ? "upper" : "lower",
				 now->falling ? hi1 : lo1, now->falling ? "below" : "above",
				 now->falling ? lo0 : hi0, now->falling ? "lower" : "upper",
				 (unsigned long long)then.postings, (unsigned long long)then.occ_postings);
			return 1;
		}
	}
	if (then.precision >= 0 && now->precision >= 0 &&
	    now->precision >= then.precision + r->precision_margin) {
		snprintf(why, wn, "the precision grew from %.4f to %.4f (by %.4f or more)",
			 then.precision, now->precision, r->precision_margin);
		return 1;
	}
	if (r->factor > 0 && !now->falling && now->postings &&
	    (double)now->postings >= r->factor * (double)then.postings) {
		snprintf(why, wn, "the postings grew from %llu to %llu (%.1f times)",
			 (unsigned long long)then.postings, (unsigned long long)now->postings,
			 then.postings ? (double)now->postings / (double)then.postings : 0.0);
		return 1;
	}
	return 0;
}

int rq_add(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	   double reopen_factor, rq_addstat *st, tm_buf *err)
{
	rq_reopen r = {reopen_factor, RQ_REOPEN_PRECISION};
	return rq_add_by(q, line, n, where, now, &r, st, err);
}

/* Reads a line of propose or overlap (their own id, kind, score and
 * postings) into s. */
static int read_sugg(const jr_val *v, rqi_sugg *s, const char *where, tm_buf *err)
{
	const char *id;
	size_t idl;
	memset(s, 0, sizeof *s);
	if (!(id = jr_vstr(jr_get(v, "id"), &idl)) || !idl || idl > RQ_ID_MAX || memchr(id, 0, idl))
		return tm_fail(err, TM_EINPUT, where,
			       "\"id\" is missing or not an id (a string of 1 to 64 bytes)", NULL);
	memcpy(s->id, id, idl);
	s->idl = idl;
	if (rqi_get_name(v, "kind", rq_kind_names, RK_N, &s->kind, where, err) ||
	    !(s->occ = rqi_get_str(v, "occupation", where, err)) ||
	    !(s->lang = rqi_get_str(v, "lang", where, err)) ||
	    !(s->label = rqi_get_str(v, "label", where, err)) ||
	    rqi_get_score(v, "score", &s->score, where, err) ||
	    rqi_get_count(v, "postings", &s->postings, where, err)) {
		rqi_sugg_free(s);
		return TM_EINPUT;
	}
	return TM_OK;
}

int rq_add_by(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	      const rq_reopen *reopen, rq_addstat *st, tm_buf *err)
{
	char jerr[200];
	jr_doc *d = jr_parse(line, n, jerr, sizeof jerr);
	const jr_val *v = jr_root(d);
	rqi_sugg s = {0};
	int what = RQI_ITEM, rc;

	if (!d) {
		return tm_fail(err, TM_EINPUT, where, "not a suggestion: ", jerr);
	}
	/* a row of trend has a direction and no id of its own */
	rc = jr_get(v, "direction") ? rqi_trend_sugg(v, &s, &what, where, err)
				    : read_sugg(v, &s, where, err);
	if (rc)
		goto done;
	if (what != RQI_ITEM) {
		if (what == RQI_RISING_LABEL)
			st->rising_labels++;
		else
			st->falling_titles++;
		goto done;
	}
	rc = TM_EINPUT;
	/* every string that can reach an export, before anything changes */
	const char *field;
	char why[FC_WHY];
	if (fc_suggestion(v, &field, why)) {
		tm_fail(err, TM_EINPUT, where, "\"", field);
		buf_puts(err, "\" ");
		buf_puts(err, why);
		goto done;
	}

	long at = q->index ? st_find(q->index, s.id, s.idl) : -1;
	rq_item *it = at >= 0 ? &q->it[q->index->ent[at].count - 1] : NULL;
	if (!it) {
		if (!(it = rqi_new_item(q, s.id, s.idl))) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
			goto done;
		}
		it->kind = s.kind;
		it->occ = s.occ, it->lang = s.lang, it->label = s.label;
		s.occ = s.lang = s.label = NULL;
		if (!q->next_seq)
			q->next_seq = 1;
		it->seq = q->next_seq++;
		it->status = RQ_OPEN;
		if (!(it->added = strdup(now)) ||
		    set_evidence(it, v, s.postings, s.score, now, where, err) ||
		    !rqi_new_event(it, RE_ADDED, now)) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
			goto done;
		}
		st->added++;
		rc = TM_OK;
		goto done;
	}
	if (it->kind != s.kind || strcmp(it->occ, s.occ) || strcmp(it->lang, s.lang)) {
		tm_fail(err, TM_EINPUT, where, "id ", it->id);
		buf_puts(err, " is in the queue for another suggestion (kind, occupation or language differ)");
		goto done;
	}
	rc = TM_OK;
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
		figures fnow = figures_of(v, s.postings);
		char because[300];
		if (dec && dec->noise) {
			st->noise++;
			st->kept_closed++;
			goto done;
		}
		if (!dec || !reopens(dec, &fnow, reopen, because, sizeof because)) {
			st->kept_closed++;
			goto done;
		}
		if ((rc = set_evidence(it, v, s.postings, s.score, now, where, err)) != TM_OK)
			goto done;
		rq_event *e = rqi_new_event(it, RE_REOPENED, now);
		if (!e || !(e->evidence = strdup(it->evidence)) || !(e->reason = strdup(because))) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
			goto done;
		}
		it->status = RQ_OPEN;
		st->reopened++;
		goto done;
	}
	/* open or deferred: the newest evidence, and a note of it when the
	 * figures moved */
	int moved = s.postings != it->postings || fabs(s.score - it->score) >= 0.00005;
	if ((rc = set_evidence(it, v, s.postings, s.score, now, where, err)) != TM_OK)
		goto done;
	if (moved) {
		if (!rqi_new_event(it, RE_REFRESHED, now)) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
			goto done;
		}
		st->refreshed++;
	} else
		st->unchanged++;
done:
	rqi_sugg_free(&s);
	jr_free(d);
	return rc;
}

/* The outcome RD_*, or -1 when memory ran out. */
static int decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
		  const rq_how *how, tm_buf *m)
{
	int overrule = how->overrule;
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
	/* a rejection marked as noise later is a new rejection */
	int mark_noise = want == RQ_REJECTED && how->noise && !(dec && dec->noise);
	if (it->status == want && !mark_noise) {
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
	if ((it->status == RQ_ACCEPTED || it->status == RQ_REJECTED) && it->status != want &&
	    !overrule) {
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
		return -1;
	}
	rq_event *e = rqi_new_event(it, event_of[d], now);
	if (!e || !(e->reviewer = strdup(reviewer)) || (note && *note && !(e->note = strdup(note))) ||
	    !(e->evidence = strdup(it->evidence))) {
		return -1;
	}
	e->noise = want == RQ_REJECTED && how->noise;
	if ((e->batch = how->batch) != 0)
		e->was = it->status;
	it->status = want;
	return RD_APPLIED;
}

int rq_decide_how(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
		  const rq_how *how, int *outcome, tm_buf *m)
{
	*outcome = decide(it, d, reviewer, note, now, how, m);
	if (*outcome < 0 || buf_status(m))
		return tm_fail(m, TM_ENOMEM, NULL, "out of memory", NULL);
	return TM_OK;
}

int rq_decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
	      int overrule, int *outcome, tm_buf *m)
{
	rq_how how = {overrule, 0, 0};
	return rq_decide_how(it, d, reviewer, note, now, &how, outcome, m);
}

int rq_reopen_item(rq_item *it, const char *reviewer, const char *note, const char *now,
		   int *outcome, tm_buf *m)
{
	buf_reset(m);
	*outcome = RD_CONFLICT;
	buf_puts(m, it->id);
	if (it->status == RQ_NSTATUS) {
		buf_puts(m, ": its status \"");
		buf_puts(m, it->status_name);
		buf_puts(m, "\" is unknown to this version of titlemill; not changed");
	} else if (it->status == RQ_OPEN) {
		buf_puts(m, ": already open");
		*outcome = RD_SAME;
	} else {
		buf_reset(m);
		rq_event *e = rq_item_evidence(it) ? rqi_new_event(it, RE_REOPENED, now) : NULL;
		if (!e || !(e->reviewer = strdup(reviewer)) || (note && *note && !(e->note = strdup(note))) ||
		    !(e->evidence = strdup(it->evidence)) || !(e->reason = strdup("reopened by a curator")))
			return tm_fail(m, TM_ENOMEM, NULL, "out of memory", NULL);
		it->status = RQ_OPEN;
		*outcome = RD_APPLIED;
	}
	if (buf_status(m))
		return tm_fail(m, TM_ENOMEM, NULL, "out of memory", NULL);
	return TM_OK;
}

uint64_t rq_next_batch(const rq_queue *q)
{
	uint64_t top = 0;
	for (size_t i = 0; i < q->n; i++)
		for (size_t k = 0; k < q->it[i].nev; k++)
			if (q->it[i].ev[k].batch > top)
				top = q->it[i].ev[k].batch;
	return top + 1;
}

/* The decision of batch b that stands on it (not undone), or NULL. */
static const rq_event *batch_decision(const rq_item *it, uint64_t b, int *last)
{
	*last = 0;
	for (size_t k = it->nev; k-- > 0;) {
		const rq_event *e = &it->ev[k];
		if (e->what == RE_UNDONE && e->batch == b)
			return NULL; /* undone already */
		if (rq_is_decision(e->what) && e->batch == b) {
			*last = k == it->nev - 1;
			return e;
		}
	}
	return NULL;
}

int rq_undo(rq_queue *q, uint64_t batch, const char *reviewer, const char *note,
	    const char *now, size_t *undone, tm_buf *err)
{
	size_t found = 0, late = 0;
	int last;
	*undone = 0;
	buf_reset(err);
	for (size_t i = 0; i < q->n; i++) {
		const rq_event *e = batch_decision(&q->it[i], batch, &last);
		if (!e)
			continue;
		found++;
		if (last && q->it[i].status != RQ_NSTATUS)
			continue;
		buf_puts(err, late++ ? "\n  " : "");
		buf_puts(err, q->it[i].id);
		buf_puts(err, ": changed after the batch; review reopen or a new decision instead");
	}
	if (late) {
		tm_buf all = {0};
		char head[120];
		snprintf(head, sizeof head, "batch %llu not undone:%s", (unsigned long long)batch,
			 late > 1 ? "\n  " : " ");
		buf_puts(&all, head);
		buf_append(&all, err->data, err->len);
		buf_reset(err);
		buf_append(err, all.data, all.len);
		buf_free(&all);
		return buf_status(err) ? TM_ENOMEM : TM_EINPUT;
	}
	if (!found) {
		char m[160];
		snprintf(m, sizeof m, "no decision of batch %llu stands in the queue (never applied, "
				      "or undone already)", (unsigned long long)batch);
		return tm_fail(err, TM_EINPUT, NULL, m, NULL);
	}
	for (size_t i = 0; i < q->n; i++) {
		rq_item *it = &q->it[i];
		const rq_event *d = batch_decision(it, batch, &last);
		if (!d)
			continue;
		int was = d->was >= 0 && d->was < RQ_NSTATUS ? d->was : RQ_OPEN;
		rq_event *e = rqi_new_event(it, RE_UNDONE, now);
		if (!e || !(e->reviewer = strdup(reviewer)) || (note && *note && !(e->note = strdup(note))))
			return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
		e->batch = batch;
		e->was = it->status;
		it->status = was;
		(*undone)++;
	}
	return TM_OK;
}

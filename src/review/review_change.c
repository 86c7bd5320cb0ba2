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
#include "count/strtab.h"

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

int rq_add(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	   double reopen_factor, rq_addstat *st, tm_buf *err)
{
	char jerr[200];
	jr_doc *d = jr_parse(line, n, jerr, sizeof jerr);
	const jr_val *v = jr_root(d);
	const char *id;
	size_t idl;
	int kind, rc = TM_EINPUT;
	uint64_t postings;
	double score;
	char *occ = NULL, *lang = NULL, *label = NULL;

	if (!d) {
		return tm_fail(err, TM_EINPUT, where, "not a suggestion: ", jerr);
	}
	if (!(id = jr_vstr(jr_get(v, "id"), &idl)) || !idl || idl > RQ_ID_MAX || memchr(id, 0, idl)) {
		tm_fail(err, TM_EINPUT, where, "\"id\" is missing or not an id (a string of 1 to 64 bytes)", NULL);
		goto done;
	}
	if (rqi_get_name(v, "kind", rq_kind_names, RK_N, &kind, where, err) ||
	    !(occ = rqi_get_str(v, "occupation", where, err)) ||
	    !(lang = rqi_get_str(v, "lang", where, err)) || !(label = rqi_get_str(v, "label", where, err)) ||
	    rqi_get_score(v, "score", &score, where, err) ||
	    rqi_get_count(v, "postings", &postings, where, err))
		goto done;
	/* every string that can reach an export, before anything changes */
	const char *field;
	char why[FC_WHY];
	if (fc_suggestion(v, &field, why)) {
		tm_fail(err, TM_EINPUT, where, "\"", field);
		buf_puts(err, "\" ");
		buf_puts(err, why);
		goto done;
	}

	long at = q->index ? st_find(q->index, id, idl) : -1;
	rq_item *it = at >= 0 ? &q->it[q->index->ent[at].count - 1] : NULL;
	if (!it) {
		if (!(it = rqi_new_item(q, id, idl))) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
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
		    !rqi_new_event(it, RE_ADDED, now)) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
			goto done;
		}
		st->added++;
		rc = TM_OK;
		goto done;
	}
	if (it->kind != kind || strcmp(it->occ, occ) || strcmp(it->lang, lang)) {
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
		double base = dec ? (double)dec->postings : (double)it->postings;
		if ((double)postings < reopen_factor * base || postings == 0) {
			st->kept_closed++;
			goto done;
		}
		if ((rc = set_evidence(it, v, postings, score, now, where, err)) != TM_OK)
			goto done;
		rq_event *e = rqi_new_event(it, RE_REOPENED, now);
		if (!e || !(e->evidence = strdup(it->evidence))) {
			rc = tm_fail(err, TM_ENOMEM, where, "out of memory", NULL);
			goto done;
		}
		it->status = RQ_OPEN;
		st->reopened++;
		goto done;
	}
	/* open or deferred: the newest evidence, and a note of it when the
	 * figures moved */
	int moved = postings != it->postings || fabs(score - it->score) >= 0.00005;
	if ((rc = set_evidence(it, v, postings, score, now, where, err)) != TM_OK)
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
	free(occ);
	free(lang);
	free(label);
	jr_free(d);
	return rc;
}

/* The outcome RD_*, or -1 when memory ran out. */
static int decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
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
		return -1;
	}
	rq_event *e = rqi_new_event(it, event_of[d], now);
	if (!e || !(e->reviewer = strdup(reviewer)) || (note && *note && !(e->note = strdup(note))) ||
	    !(e->evidence = strdup(it->evidence))) {
		return -1;
	}
	it->status = want;
	return RD_APPLIED;
}

int rq_decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
	      int overrule, int *outcome, tm_buf *m)
{
	*outcome = decide(it, d, reviewer, note, now, overrule, m);
	if (*outcome < 0 || buf_status(m))
		return tm_fail(m, TM_ENOMEM, NULL, "out of memory", NULL);
	return TM_OK;
}

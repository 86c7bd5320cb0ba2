/* review_change.h - the changes to a queue: suggestions taken in from
 * propose, decisions recorded.  Returns as err.h says: TM_OK or a
 * negative kind with the message in err; results through pointers. */
#ifndef TM_REVIEW_CHANGE_H
#define TM_REVIEW_CHANGE_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "review/review.h"

typedef struct rq_addstat {
	size_t added, refreshed, unchanged, reopened, kept_closed, accepted_before;
	size_t unknown_status; /* items left alone: their status is unknown */
	size_t noise;          /* rejected as noise: closed for good (also in kept_closed) */
	size_t rising_labels;  /* rows of trend that are no items: rising titles */
	size_t falling_titles; /* that are labels, falling ones that are not */
} rq_addstat;

/* When a rejected suggestion reopens: its evidence has changed, not
 * merely accumulated.  With cumulative counts the postings of a title
 * grow every week while its share of the occupation stays put, so the
 * share and the precision decide, and the raw postings only when asked:
 *  - the share (postings of the occupation's postings): the lower bound
 *    of its Wilson interval (95 %, stats.h) now is above the upper bound
 *    at the rejection;
 *  - the precision (the share of the title's postings coded to this
 *    occupation) is now at least precision_margin above the precision at
 *    the rejection;
 *  - factor > 0: the postings reach factor times those at the rejection.
 * The figures at the rejection are those of the evidence the rejection
 * event holds (postings, occupation_postings, precision).  For an item of
 * trend (review_trend.h) the share is that of the window "after": a
 * rising title reopens when it grew as above; a fading label, kept by a
 * rejection, when it fell: the upper bound of its interval now below the
 * lower bound at the rejection; the factor never reopens a fading label.
 * A rejection as noise never reopens by itself. */
typedef struct rq_reopen {
	double factor;           /* 0: off (the default) */
	double precision_margin; /* RQ_REOPEN_PRECISION by default */
} rq_reopen;
#define RQ_REOPEN_PRECISION 0.2

/* Takes one line of propose, overlap or trend output (JSON; a trend row
 * as review_trend.h says: a rising title that is a label and a falling
 * title that is not are counted in st and change nothing) into the
 * queue: new ids are added; open and deferred items get the new
 * evidence; a rejected item reopens by the rules of r (above) and stays
 * closed otherwise; an accepted item, or one whose status is unknown, is
 * left alone.
 * where is "file:line" for messages.
 * Returns TM_OK, TM_EINPUT (the line is not a suggestion, or its id is
 * another suggestion's; q unchanged) or TM_ENOMEM. */
int rq_add_by(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	      const rq_reopen *r, rq_addstat *st, tm_buf *err);
/* rq_add_by with r = {reopen_factor, RQ_REOPEN_PRECISION}. */
int rq_add(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	   double reopen_factor, rq_addstat *st, tm_buf *err);

enum { RD_APPLIED, RD_SAME, RD_CONFLICT };
/* Records decision d (0 accept, 1 reject, 2 defer) on it.  Sets *outcome
 * to RD_APPLIED, RD_SAME (the item already stands so: nothing changes)
 * or RD_CONFLICT (another decision stands; the message in msg says
 * whose; nothing changes unless overrule is set, when the decision is
 * recorded over it and RD_APPLIED set; an item whose status is unknown
 * is always RD_CONFLICT).  Returns TM_OK, or TM_ENOMEM (message in msg;
 * the item may hold a decision event without its status: drop the
 * queue). */
int rq_decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
	      int overrule, int *outcome, tm_buf *msg);

/* How a decision is recorded beyond rq_decide: noise (a rejection that
 * never reopens by itself; a rejected item can be marked so later) and
 * the batch of `decide` it belongs to (0: none), which stores the status
 * before it so that rq_undo can restore it. */
typedef struct rq_how {
	int overrule, noise;
	uint64_t batch;
} rq_how;
int rq_decide_how(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
		  const rq_how *how, int *outcome, tm_buf *msg);

/* A curator reopens a decided item (accepted, rejected or deferred): it
 * is open again, its history kept, with a "reopened" event naming the
 * reviewer.  *outcome as rq_decide (RD_SAME: already open; RD_CONFLICT:
 * an unknown status).  TM_OK or TM_ENOMEM. */
int rq_reopen_item(rq_item *it, const char *reviewer, const char *note, const char *now,
		   int *outcome, tm_buf *msg);

/* The number the next batch of decisions gets: 1 + the highest in q. */
uint64_t rq_next_batch(const rq_queue *q);

/* Takes back the decisions of batch `batch`: each item decided in it
 * gets an "undone" event and the status it had before.  Refused (TM_EINPUT,
 * q unchanged, each item named in err) when an item was changed after
 * the batch, or when no decision of the batch stands.  Sets *undone. */
int rq_undo(rq_queue *q, uint64_t batch, const char *reviewer, const char *note,
	    const char *now, size_t *undone, tm_buf *err);

#endif

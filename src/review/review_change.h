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
} rq_addstat;

/* Takes one line of propose output (JSON) into the queue: new ids are
 * added; open and deferred items get the new evidence; a rejected item
 * reopens when its postings reach reopen_factor times those at the
 * rejection and stays closed otherwise; an accepted item, or one whose
 * status is unknown, is left alone.
 * where is "file:line" for messages. */
/* Returns TM_OK, TM_EINPUT (the line is not a suggestion, or its id is
 * another suggestion's; q unchanged) or TM_ENOMEM. */
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

#endif

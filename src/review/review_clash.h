/* review_clash.h - whether accepting a label would give its match key to
 * two occupations: the key is already a label of another occupation in
 * the taxonomy, or of another occupation's accepted suggestion in the
 * queue.  The command warns and refuses (unless the curator overrules);
 * this module only finds the clash.
 *
 * Ownership: an rq_clashes owns its index and copies of every string it
 * names; it borrows nothing after rq_clashes_new returns.  Functions
 * return TM_OK or TM_ENOMEM (err.h). */
#ifndef TM_REVIEW_CLASH_H
#define TM_REVIEW_CLASH_H

#include "core/buf.h"
#include "rank/labels.h"
#include "review/review.h"

typedef struct rq_clashes rq_clashes;

/* The keys of the labels of ls (NULL: no taxonomy) and of the queue's
 * accepted label suggestions (kinds that add a label).  NULL when memory
 * runs out. */
rq_clashes *rq_clashes_new(const labelset *ls, const rq_queue *q);

/* Whether accepting it (a kind that adds a label) gives its key (the
 * evidence's "key", else its label) in its language to a second
 * occupation: *clash set, and msg holds "the key 'K' is already the
 * LABELKIND label 'TEXT' of OCC (in the taxonomy|accepted as ID)".  A
 * kind that adds no label never clashes. */
int rq_clash_find(rq_clashes *c, const rq_item *it, int *clash, tm_buf *msg);

/* Counts it as accepted from now on (a batch that accepts two clashing
 * items names the second). */
int rq_clash_note(rq_clashes *c, const rq_item *it);

void rq_clashes_free(rq_clashes *c);

#endif

/* review_json.h - a queue item as one JSON line: what the queue file (or
 * a store) holds.  Returns as err.h says: TM_OK or a negative kind with
 * the message in err. */
#ifndef TM_REVIEW_JSON_H
#define TM_REVIEW_JSON_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "review/review.h"

/* Reads item lines (a queue file, or what a store holds) into an empty
 * queue; name is used in messages.  Items are put in arrival order.  A
 * line that cannot be read goes to q->bad and a note of it (name:line:
 * why) to q->notes, as does an item with an unknown status; TM_ENOMEM
 * (the only failure) when memory runs out.  The items borrow text: it must outlive the queue. */
int rq_parse(rq_queue *q, const char *text, size_t n, const char *name, tm_buf *err);

/* Appends item it as one JSON line, newline included (an unchanged item
 * read from a queue: its line as it was).  TM_OK, or TM_ENOMEM when b
 * failed (now or before, buf.h): then no part of the line is in b, and
 * the caller must not write b out. */
int rq_item_json(const rq_item *it, tm_buf *b);

/* The item's latest evidence as compact JSON (read from its line the
 * first time and kept), or NULL when out of memory. */
const char *rq_item_evidence(const rq_item *it);

#endif

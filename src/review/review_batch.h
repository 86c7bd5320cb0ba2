/* review_batch.h - a batch of decisions read from a TSV file.  Returns
 * as err.h says: TM_OK or a negative kind with the message in err;
 * results through pointers. */
#ifndef TM_REVIEW_BATCH_H
#define TM_REVIEW_BATCH_H

#include <stddef.h>
#include <stdio.h>

#include "core/buf.h"

/* A decision to record: d is 0 accept, 1 reject, 2 defer; where is
 * "file:line" for a batch, or NULL. */
typedef struct rq_decision {
	char *id, *reviewer, *note, *where;
	char *label;      /* the sheet's label column, to check; NULL: none */
	int d;
} rq_decision;

typedef struct rq_decisions {
	rq_decision *v;
	size_t n, cap;
} rq_decisions;

/* Whether s[0..n) is empty or plain text by fieldcheck.h's fc_text:
 * valid UTF-8 without control characters or line separators (ids of a
 * decisions file; names and notes get fc_name and fc_note). */
int rq_plain_text(const char *s, size_t n);

/* Appends a zeroed decision; NULL when out of memory. */
rq_decision *rq_decisions_push(rq_decisions *ds);
void rq_decisions_free(rq_decisions *ds);

/* Reads a batch of decisions from a TSV file with the columns id,
 * decision (accept, reject, defer), reviewer (or the default reviewer
 * when the column or the field is empty), note and label (optional:
 * checked against the item's label when the batch is applied).  As
 * spreadsheets write them: column names and decision words are matched
 * whatever their case (ID, Accept), a field wholly in double quotes is
 * read without them, a doubled quote inside as one.  Each bad
 * line gets one message "file:line: what" on report, and *bad counts
 * them (0: all good).  Returns TM_OK; TM_EFAIL when the file cannot be
 * read or lacks the columns, TM_ENOMEM (message in err). */
int rq_decisions_read(const char *path, const char *reviewer, rq_decisions *ds, FILE *report,
		      long *bad, tm_buf *err);

#endif

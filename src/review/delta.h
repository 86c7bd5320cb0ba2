/* delta.h - the accepted suggestions of a review queue as a label delta:
 * a TSV (labels TSV columns first), Turtle or N-Triples.
 *
 * No field can end a row, a line or a statement early: each accepted
 * item is checked again with fieldcheck.h (a queue may have been edited
 * by hand or written by an older version) and when one cannot be written
 * safely, nothing is written.  Output is deterministic: sorted by
 * occupation, language, change, kind, label and id. */
#ifndef TM_DELTA_H
#define TM_DELTA_H

#include "core/buf.h"
#include "review/review.h"

enum { DL_TSV, DL_TURTLE, DL_NTRIPLES };

typedef struct dl_opts {
	int format;       /* DL_* */
	long long since;  /* keep decisions from then on (seconds); -1: all */
	const char *base; /* turns occupation ids into IRIs; NULL: none */
	int clean_case;   /* the clean label, not label_as_written */
} dl_opts;

/* Appends the delta of q to out.  Returns TM_OK, or TM_EFAIL (err.h) with err holding one
 * message a line (no trailing newline): each accepted item that cannot
 * be written safely, an occupation that is no IRI in a SKOS export, or
 * running out of memory.  On -1, out is left as it was. */
int dl_export(const rq_queue *q, const dl_opts *o, tm_buf *out, tm_buf *err);

#endif

/* review.h - the curators' review queue.
 *
 * A queue holds the suggestions of `propose` (items, in arrival order)
 * with their status and the history of what happened to them: added,
 * evidence refreshed, reopened, accepted, rejected, deferred, each with
 * when, who and on what evidence.  The queue lives in a JSON Lines file
 * (one item a line) or in a store (Redis); every change reads the whole
 * queue, changes it in memory and writes it back under a lock (file) or
 * in an optimistic transaction (store), so that two curators working at
 * once never lose an update and a killed process leaves the old or the
 * new queue, never a torn one.
 *
 * A queue written by a newer version is read as far as it can be: the
 * members of an item or event this version does not know are kept and
 * written back when the item changes; an item whose status is unknown is
 * kept, listed, and never changed or decided here; a line that cannot be
 * read is reported with its line number, kept as it is when the queue is
 * written again, and moved aside only by rq_repair.
 *
 * Ownership: a queue owns its items and their strings; rq_free releases
 * everything.  Functions return 0 on success and -1 on failure with a
 * message in err (naming file and line where there is one); a failed
 * operation leaves the queue as it was unless it says otherwise. */
#ifndef TM_REVIEW_H
#define TM_REVIEW_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "buf.h"

enum rq_status { RQ_OPEN, RQ_ACCEPTED, RQ_REJECTED, RQ_DEFERRED, RQ_NSTATUS };
enum rq_kind { RK_ALT, RK_HIDDEN, RK_RARE, RK_ELSEWHERE, RK_N };
enum rq_what { RE_ADDED, RE_REFRESHED, RE_REOPENED, RE_ACCEPTED, RE_REJECTED, RE_DEFERRED, RE_N };

extern const char *const rq_status_names[RQ_NSTATUS]; /* open accepted ... */
extern const char *const rq_kind_names[RK_N];         /* new_alt_label ... */
extern const char *const rq_what_names[RE_N];         /* added refreshed ... */
extern const char *const rq_decision_words[3];        /* accept reject defer */

typedef struct rq_event {
	int what;             /* RE_* */
	char *at;             /* ISO 8601 UTC, e.g. 2026-12-02T09:30:00Z */
	char *reviewer, *note; /* decisions; NULL otherwise */
	uint64_t postings;    /* the evidence at that moment */
	double score;
	char *evidence;       /* decisions and reopenings: the whole evidence
			       * (compact JSON); NULL otherwise */
	char *extra;          /* members this version does not know, as
			       * ,"key":value... (compact JSON); NULL when none */
} rq_event;

/* What a list shows of the latest evidence, taken when it is read. */
typedef struct rq_brief {
	uint64_t occ_postings, rival_postings;
	double precision;
	char *rival, *variant_of; /* NULL when absent */
} rq_brief;

typedef struct rq_item {
	char *id, *occ, *lang, *label;
	int kind, status;     /* status RQ_NSTATUS: unknown, named in status_name */
	char *status_name;    /* an unknown status as written; NULL otherwise */
	char *extra;          /* members this version does not know, as in
			       * rq_event; NULL when none */
	uint64_t seq;         /* arrival order, from 1 */
	uint64_t postings;    /* of the latest evidence */
	double score;
	char *added, *proposed; /* first and latest time propose gave it */
	char *evidence;       /* the latest propose object, compact JSON; NULL
			       * until needed for an item read from a queue
			       * (rq_item_evidence) */
	const char *raw;      /* an item read from a queue: its line, written
			       * back as it was while the item is unchanged */
	size_t rawlen;
	rq_brief brief;
	rq_event *ev;
	size_t nev, evcap;
	size_t nev_stored;    /* events already in the backend */
	int changed;          /* to be written back */
} rq_item;

/* A line of a queue that cannot be read as an item. */
typedef struct rq_badline {
	const char *text;     /* the line as it was, borrowed like an item's raw */
	size_t len;
	long line;            /* its line number */
	uint64_t after;       /* seq of the item before it in the file; 0: none */
} rq_badline;

typedef struct rq_queue {
	rq_item *it;
	size_t n, cap;
	uint64_t next_seq;
	struct strtab *index; /* id -> position + 1 */
	rq_badline *bad;      /* lines that cannot be read, in file order */
	size_t nbad;
	int drop_bad;         /* set: the next write leaves the bad lines out */
	tm_buf notes;         /* what rq_parse reports: "file:line: ...\n" each */
} rq_queue;

void rq_free(rq_queue *q);

/* The name of the item's status (an unknown one as written). */
const char *rq_status_name(const rq_item *it);

/* Reads item lines (a queue file, or what a store holds) into an empty
 * queue; name is used in messages.  Items are put in arrival order.  A
 * line that cannot be read goes to q->bad and a note of it (name:line:
 * why) to q->notes, as does an item with an unknown status; -1 only when
 * memory runs out.  The items borrow text: it must outlive the queue. */
int rq_parse(rq_queue *q, const char *text, size_t n, const char *name, tm_buf *err);

/* Writes item it as one JSON line, newline included (an unchanged item
 * read from a queue: its line as it was). */
int rq_item_json(const rq_item *it, tm_buf *b);

/* The item's latest evidence as compact JSON (read from its line the
 * first time and kept), or NULL when out of memory. */
const char *rq_item_evidence(const rq_item *it);

/* The item whose id is id, or whose id starts with id when that is
 * unique and at least 6 characters long.  NULL when there is none; *many
 * is set when a prefix fits more than one. */
rq_item *rq_find(const rq_queue *q, const char *id, size_t idlen, int *many);

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
int rq_add(rq_queue *q, const char *line, size_t n, const char *where, const char *now,
	   double reopen_factor, rq_addstat *st, tm_buf *err);

enum { RD_APPLIED, RD_SAME, RD_CONFLICT };
/* Records decision d (0 accept, 1 reject, 2 defer) on it.  Returns
 * RD_APPLIED, RD_SAME (the item already stands so: nothing changes) or
 * RD_CONFLICT (another decision stands; the message in msg says whose;
 * nothing changes unless overrule is set, when the decision is recorded
 * over it and RD_APPLIED returned; an item whose status is unknown is
 * always RD_CONFLICT). */
int rq_decide(rq_item *it, int d, const char *reviewer, const char *note, const char *now,
	      int overrule, tm_buf *msg);

/* The latest decision event of an item, or NULL. */
const rq_event *rq_last_decision(const rq_item *it);

/* A decision to record: d is 0 accept, 1 reject, 2 defer; where is
 * "file:line" for a batch, or NULL. */
typedef struct rq_decision {
	char *id, *reviewer, *note, *where;
	int d;
} rq_decision;

typedef struct rq_decisions {
	rq_decision *v;
	size_t n;
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
 * when the column or the field is empty) and note (optional).  Each bad
 * line gets one message "file:line: what" on report.  Returns the
 * number of bad lines (0: all good), or -1 when the file cannot be read
 * or lacks the columns (message in err). */
long rq_decisions_read(const char *path, const char *reviewer, rq_decisions *ds, FILE *report,
		       tm_buf *err);

/* The current time in ISO 8601 UTC (or TITLEMILL_NOW when set, checked);
 * returns 0 or -1 with a message. */
int rq_now(char out[21], tm_buf *err);
/* Seconds since 1970 of an ISO 8601 UTC time as rq_now writes it, or -1. */
long long rq_time(const char *iso);

#endif

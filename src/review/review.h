/* review.h - the curators' review queue.
 *
 * A queue holds the suggestions of `propose`, the findings of `overlap`
 * and the rising titles and fading labels of `trend` (items, in arrival
 * order) with their status and the history of what happened to them: added,
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
 * This header holds the queue in memory (items, events, finding one).
 * Beside it: queue.h (where the queue lives: rq_read, rq_transact,
 * rq_repair over the file or the store), review_json.h (an item as a
 * JSON line), review_change.h (adding suggestions, recording decisions),
 * review_batch.h (a TSV file of decisions), review_time.h (the times of
 * events).
 *
 * Ownership: a queue owns its items and their strings; rq_free releases
 * everything.  Functions return TM_OK (0) or a negative kind of err.h
 * with a message in err (naming file and line where there is one); a
 * failed operation leaves the queue as it was unless it says otherwise. */
#ifndef TM_REVIEW_H
#define TM_REVIEW_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "core/buf.h"

enum rq_status { RQ_OPEN, RQ_ACCEPTED, RQ_REJECTED, RQ_DEFERRED, RQ_NSTATUS };

/* The kinds of suggestion the queue takes, one line each: the name in
 * the enum, the kind as the engine that finds it writes it (propose,
 * overlap; trend's rows get theirs in review_trend.h), and what an accepted one becomes
 * in the delta: 'a' an alternative label to add, 'h' a hidden label to
 * add, 'r' a `review` row, a finding for the curator that never changes
 * the taxonomy.  Adding a kind is adding its line; the queue, its
 * options, stats and export take it from here. */
#define RQ_KINDS(X)                           \
	X(RK_ALT, "new_alt_label", 'a')       \
	X(RK_HIDDEN, "new_hidden_label", 'h') \
	X(RK_RARE, "rare_label", 'r')         \
	X(RK_ELSEWHERE, "used_elsewhere", 'r') \
	X(RK_OVERLAP, "overlapping_occupations", 'r') \
	X(RK_NEARER, "nearer_other_group", 'r') \
	X(RK_RISING, "rising_title", 'a')     \
	X(RK_FADING, "fading_label", 'r')     \
	/* a new kind goes above this line */

#define RQ_KIND_ENUM(e, name, delta) e,
enum rq_kind { RQ_KINDS(RQ_KIND_ENUM) RK_N };
#undef RQ_KIND_ENUM

/* What happened to an item.  A curator's own reopening (review reopen)
 * is a "reopened" event with a reviewer; "undone" takes back the
 * decision of a batch (review undo) and follows it directly. */
enum rq_what { RE_ADDED, RE_REFRESHED, RE_REOPENED, RE_ACCEPTED, RE_REJECTED, RE_DEFERRED,
	       RE_UNDONE, RE_N };

extern const char *const rq_status_names[RQ_NSTATUS]; /* open accepted ... */
extern const char *const rq_kind_names[RK_N];         /* new_alt_label ... */
extern const char rq_kind_delta[RK_N];                /* 'a' 'h' 'r', as above */
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
	char *reason;         /* a reopening: why (the share, the precision or
			       * the postings grew, or a curator's); NULL */
	uint64_t batch;       /* a decision of `decide`, and its undoing: the
			       * batch number; 0 otherwise */
	int was;              /* a decision of a batch: the status before it
			       * (RQ_*), -1 when not known */
	int noise;            /* a rejection as noise: never reopens by itself */
	char *extra;          /* members this version does not know, as
			       * ,"key":value... (compact JSON); NULL when none */
} rq_event;

/* What a list shows of the latest evidence, taken when it is read. */
typedef struct rq_brief {
	uint64_t occ_postings, rival_postings; /* a trend row: the occupation's
						* postings in the window of
						* the item's postings */
	double precision;     /* -1 when the evidence has none */
	double strength;      /* in [0, 1]; -1 when the evidence has none */
	double share_before, share_after; /* a trend row's; -1 otherwise */
	char *rival, *variant_of, *occ_label; /* NULL when absent */
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
	size_t nbad, badcap;
	int drop_bad;         /* set: the next write leaves the bad lines out */
	tm_buf notes;         /* what rq_parse reports: "file:line: ...\n" each */
} rq_queue;

void rq_free(rq_queue *q);

/* The name of the item's status (an unknown one as written). */
const char *rq_status_name(const rq_item *it);

/* The item whose id is id, or whose id starts with id when that is
 * unique and at least 6 characters long.  NULL when there is none; *many
 * is set when a prefix fits more than one. */
rq_item *rq_find(const rq_queue *q, const char *id, size_t idlen, int *many);

/* The latest decision event of an item that was not undone, or NULL. */
const rq_event *rq_last_decision(const rq_item *it);

/* Whether an event of kind what is a decision (accepted, rejected,
 * deferred). */
int rq_is_decision(int what);

#endif

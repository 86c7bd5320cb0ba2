/* review_int.h - what the review_*.c files share and nobody else uses:
 * making items and events, and reading the fields of a queue line or a
 * suggestion.  Not part of the queue's interface.
 *
 * Every function that takes where and err puts "where: why" in err when
 * it fails (where may be NULL). */
#ifndef TM_REVIEW_INT_H
#define TM_REVIEW_INT_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "io/jsonr.h"
#include "review/review.h"

/* Longest id taken from propose output: ours are 16 hex digits. */
#define RQ_ID_MAX 64

/* A suggestion as add takes it in, from a line of propose or overlap
 * (its own id, kind, score and postings) or of trend (derived:
 * review_trend.h).  The strings are malloc'd; rqi_sugg_free frees them. */
typedef struct rqi_sugg {
	char id[RQ_ID_MAX + 1];
	size_t idl;
	int kind;
	char *occ, *lang, *label;
	double score;
	uint64_t postings;
} rqi_sugg;
void rqi_sugg_free(rqi_sugg *s);

/* What a trend row is for the queue. */
enum { RQI_ITEM, RQI_RISING_LABEL, RQI_FALLING_TITLE };

/* Reads a trend row v (review_trend.h) into s and sets *what to RQI_ITEM,
 * or to what the row is when it is no queue item (s then empty).  TM_OK,
 * TM_EINPUT (a field missing or wrong, the counts at odds with the
 * direction) or TM_ENOMEM. */
int rqi_trend_sugg(const jr_val *v, rqi_sugg *s, int *what, const char *where, tm_buf *err);

/* Index of s[0..len) among names[0..n), or -1. */
int rqi_name_index(const char *const *names, int n, const char *s, size_t len);

void rqi_event_free(rq_event *e);
void rqi_item_free(rq_item *it);

/* Appends a new item with a copy of id (indexed in q->index); returns it,
 * zeroed but for the id, or NULL when memory runs out or the id is
 * there already (q unchanged). */
rq_item *rqi_new_item(rq_queue *q, const char *id, size_t idl);

/* Appends an event to it with the item's current figures and marks the
 * item changed; NULL when memory runs out (an event that lost only its
 * time is not counted, it unchanged). */
rq_event *rqi_new_event(rq_item *it, int what, const char *at);

/* Field readers of a JSON object v, the message in err on failure.
 * rqi_get_str: a malloc'd copy of a string field that is present, not
 * empty and free of NUL bytes, or NULL.  The others: TM_OK with the value
 * in *out, TM_EINPUT (missing or of the wrong type or value). */
char *rqi_get_str(const jr_val *v, const char *field, const char *where, tm_buf *err);
int rqi_get_count(const jr_val *v, const char *field, uint64_t *out, const char *where,
		  tm_buf *err);
int rqi_get_score(const jr_val *v, const char *field, double *out, const char *where,
		  tm_buf *err);
/* A JSON true or false: TM_OK with 1 or 0 in *out, or TM_EINPUT. */
int rqi_get_bool(const jr_val *v, const char *field, int *out, const char *where, tm_buf *err);
int rqi_get_name(const jr_val *v, const char *field, const char *const *names, int n,
		 int *out, const char *where, tm_buf *err);

/* v as compact JSON (malloc'd), or NULL with "out of memory" in err. */
char *rqi_dump(const jr_val *v, const char *where, tm_buf *err);

/* The item's match key: its evidence's "key", else its label; malloc'd,
 * NULL when memory runs out. */
char *rqi_item_key(const rq_item *it);

/* The list's figures (it->brief) from an evidence object; TM_ENOMEM when
 * memory runs out. */
int rqi_set_brief(rq_item *it, const jr_val *ev);

#endif

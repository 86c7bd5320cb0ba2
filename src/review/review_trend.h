/* review_trend.h - the rows of `titlemill trend` as items of the review
 * queue.
 *
 * trend reports the titles whose share of an occupation's postings
 * changed beyond chance between two windows of time (rank/trend.h).  Two
 * of its kinds of row are questions for a curator and become queue items:
 *
 *   rising_title  a rising title that is no label: it proposes the title
 *                 as an alternative label (accepted, an "add" row of the
 *                 delta, like new_alt_label);
 *   fading_label  a falling label: keep it, demote it to a hidden label,
 *                 or retire it?  Accepted, it is a `review` row of the
 *                 delta with the change it shows, never a deletion.
 *
 * A rising title that is a label already and a falling title that is no
 * label ask nothing: they are no queue items, and review add counts them.
 *
 * A trend row carries no id: an item's id is the digest of its kind,
 * occupation, language and match key (16 hex digits, rq_trend_id), so
 * that the same title in a later run of trend is the same item.  Its
 * score is the row's G2; its postings those of the window where its share
 * is higher (the one trend's --min-postings bar applies to: after for a
 * rising title, before for a fading label); its evidence the row as trend
 * wrote it.  Whether a rejected item reopens is judged on the share of the
 * window "after" (review_change.h).
 *
 * A row of `trend --tsv` is read as the JSON object trend writes for it
 * (rq_trend_tsv_row), so both formats give the same items.
 *
 * Returns as err.h says: TM_OK or a negative kind with "where: why" in
 * err. */
#ifndef TM_REVIEW_TREND_H
#define TM_REVIEW_TREND_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "io/jsonr.h"

/* The figures of a trend row (an item's evidence). */
typedef struct rq_trend_ev {
	int falling;                    /* 0 rising, 1 falling */
	uint64_t before, after;         /* postings of the title */
	uint64_t occ_before, occ_after; /* of the occupation (its language) */
	double g2;
} rq_trend_ev;

/* 1 with the figures in *t when ev is a trend row ("direction" rising or
 * falling, the four counts, each occupation count 1 or more and not below
 * the title's), else 0 (*t zeroed). */
int rq_trend_figures(const jr_val *ev, rq_trend_ev *t);

/* The id of the item of kind (RK_*) for occupation occ, language lang and
 * match key key: 16 lowercase hex digits and a NUL in id. */
void rq_trend_id(int kind, const char *occ, const char *lang, const char *key, size_t kl,
		 char id[17]);

/* The columns of a `trend --tsv` header. */
typedef struct rq_trend_tsv {
	int col[24]; /* per field of the row (review_trend.c), its column, or -1 */
} rq_trend_tsv;

/* Reads the header line of trend --tsv: columns found by name, in any
 * order, unknown ones ignored.  TM_EINPUT when a column that every trend
 * row has is missing or a column is named twice. */
int rq_trend_tsv_head(rq_trend_tsv *h, const char *line, size_t n, const char *where,
		      tm_buf *err);

/* Appends the TSV row line[0..n) as one JSON object (no newline) to out:
 * the fields in trend's order, counts as whole numbers, shares and G2 as
 * numbers, is_label as true or false, example_1..3 as "examples"; empty
 * optional cells left out.  TM_EINPUT (the field named, out as it was)
 * when a cell is not what its column holds, TM_ENOMEM. */
int rq_trend_tsv_row(const rq_trend_tsv *h, const char *line, size_t n, tm_buf *out,
		     const char *where, tm_buf *err);

#endif

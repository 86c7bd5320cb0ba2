/* match.h - matching free text to the taxonomy: an index over the labels
 * and the counted titles that answers a match key with scored, explained
 * candidate occupations.  The engine prints nothing.
 *
 * Documents.  Each distinct match key of a label or of a counted title is
 * one document, holding the labels with that key and, for each language
 * it was counted in, its postings and its postings per occupation.
 * Documents are numbered in byte order of their keys, so the answers do
 * not depend on the order the labels or counts were read in (the memory
 * engine and a store give the same bytes).
 *
 * A query key q (from the normaliser) is looked up in five ways; each
 * candidate occupation keeps the best score any of them gives it, with
 * that way as its `via` (ties between ways: the earlier one below):
 *
 *   label    q is the key of labels of the occupation:
 *            score = MATCH_LABEL_BASE + MATCH_LABEL_MARKET * p,
 *            p = P(occupation | q) from the counts (0 when q was not
 *            counted), so two occupations sharing a label are ordered by
 *            the market's coding.
 *   title    q was counted for the occupation (k of the n postings of q):
 *            score = MATCH_TITLE_BASE + MATCH_TITLE_SPAN * lo, lo the
 *            lower bound of the Wilson 95 % interval of k / n (Wilson
 *            1927): a share seen in many postings outranks the same share
 *            seen in few.
 *   variant  a document whose key equals q once separators are ignored
 *            (the compact key: the key without spaces and ASCII
 *            punctuation, so "gabelstapler fahrer" = "gabelstaplerfahrer"
 *            = "gabelstapler-fahrer"): its labels and titles scored as
 *            above, times MATCH_VARIANT.
 *   similar  the documents nearest to q by sim.h's similarity s (TF-IDF
 *            character 3-gram cosine and word BM25, combined), among the
 *            labels and the titles counted in at least
 *            conf.sim_min_postings postings: a neighbour d gives each of
 *            its occupations MATCH_SIM_SPAN * s(q, d) * w, w = 1 for a
 *            label of the occupation, w = P(occupation | d) for a counted
 *            title; an occupation's score is the largest over its
 *            neighbours (the MATCH_NEAR nearest are its evidence, among
 *            the MATCH_SIM_HITS nearest documents whose MATCH_SIM_SPAN * s
 *            reaches the query's min_score).  The exact and variant
 *            documents are not neighbours.
 *   acronym  the first word of q of ACRO_MIN to ACRO_MAX ASCII letters
 *            that no searched document holds as a word is read as an
 *            acronym (acro.h): each searched document with a run of
 *            words it abbreviates gives its occupations their label or
 *            title score e as above, times fit = (the run's words and
 *            the words the document shares with q outside it, over the
 *            document's words) x (the acronym and the words of q the
 *            document holds outside the run, over q's words); per
 *            occupation its best run; the occupations share the mass:
 *            score = MATCH_ACRO_SPAN * e * fit * fit / (the sum of the
 *            occupations' fits).  An acronym of more than MATCH_ACRO_RUNS
 *            runs is not looked up.
 *
 * Languages: with a hint L (a primary subtag), the counts of q in L are
 * used when q was counted in L, else its counts in all languages
 * together; a label in another language than L (and not "und") is worth
 * MATCH_OTHER_LANG times as much.  Without a hint, all languages count
 * alike.
 *
 * Calibration: every score lies in [0, 1] and means the same in every
 * language: a label match is at least MATCH_LABEL_BASE (0.9); a counted
 * title at most MATCH_TITLE_BASE + MATCH_TITLE_SPAN (0.9), about 0.5 for
 * a title seen once; a similar candidate at most MATCH_SIM_SPAN (0.9) times
 * sim.h's s: the query's weighted grams the neighbour shares, and the
 * words the two share as a share of each side's word evidence (cos and
 * bm25n are normalised by the query, dcov by the neighbour); an
 * acronym candidate at most MATCH_ACRO_SPAN (0.8) times the label or title
 * score, 0.72 for an acronym that abbreviates one label of one
 * occupation and nothing else, halved when it is the only word of two it
 * explains, or when two occupations share it.
 *
 * Ownership: a match_index copies what it needs from the labels and the
 * counts (both may be freed after match_build).  Candidates returned by
 * match_find point into the index and the work area, valid until the
 * next match_find with that work area.  One work area per thread; the
 * index is read-only once built. */
#ifndef TM_MATCH_H
#define TM_MATCH_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "count/tally.h"
#include "rank/labels.h"

#define MATCH_LABEL_BASE 0.90
#define MATCH_LABEL_MARKET 0.10
#define MATCH_TITLE_BASE 0.40
#define MATCH_TITLE_SPAN 0.50
#define MATCH_VARIANT 0.95
#define MATCH_OTHER_LANG 0.95
#define MATCH_SIM_SPAN 0.90
#define MATCH_NEAR 3           /* neighbours kept as a similar candidate's evidence */
#define MATCH_SIM_HITS 32      /* neighbours read per query */
#define MATCH_SIM_MIN_POSTINGS 2
#define MATCH_ACRO_SPAN 0.80
#define MATCH_ACRO_RUNS 64     /* an acronym abbreviating more runs is not looked up */
#define MATCH_TOP_MAX 100
/* The default bars: what match shows (--min-score), and what tally
 * --code-missing takes as a code (higher: a code changes the counts). */
#define MATCH_MIN_SCORE_SHOW 0.3
#define MATCH_MIN_SCORE_CODE 0.5

typedef enum match_via { VIA_LABEL = 1, VIA_VARIANT, VIA_TITLE, VIA_SIMILAR, VIA_ACRONYM } match_via;

const char *match_via_name(match_via v);

typedef struct match_conf {
	uint64_t sim_min_postings; /* counted titles with fewer postings are
				    * looked up exactly, never as neighbours */
} match_conf;

typedef struct match_index match_index;
typedef struct match_work match_work;

/* A neighbour: the text of the label or the key of the title, and s. */
typedef struct match_near {
	const char *text;
	size_t len;
	double sim;
	int label;       /* 1: a label of the occupation; 0: a counted title */
} match_near;

typedef struct match_cand {
	const char *occ;
	size_t ol;
	double score;
	match_via via;
	const char *matched;   /* the label (as written) or title key matched */
	size_t ml;
	/* label, variant, title: the counts of the matched key used */
	uint64_t postings;     /* postings of the key (0: not counted) */
	uint64_t occ_postings; /* of them, coded to this occupation */
	double share, low, high; /* occ_postings / postings, Wilson 95 % */
	const char *lang;      /* label: the label's language; "" otherwise */
	match_near near[MATCH_NEAR];
	int nnear;
	double afit, ashare;   /* acronym: the run's fit and its share */
	uint32_t id;           /* the occupation's number in the index */
} match_cand;

/* Builds the index from the labels ls and the counts m (NULL: labels
 * only).  TM_OK, or TM_ENOMEM with a message in err. */
int match_build(match_index **out, const labelset *ls, tally_mem *m, const match_conf *conf,
		tm_buf *err);
void match_free(match_index *ix);

/* Documents, documents searched by similarity, bytes held. */
void match_stats(const match_index *ix, size_t *docs, size_t *nsim, size_t *bytes);

match_work *match_work_new(const match_index *ix);
void match_work_free(match_work *w);

/* The candidates of key[0..kl) (a match key), best first (score
 * descending, then occupation id in byte order), at most top of them and
 * only those scoring at least min_score.  lang: a primary subtag or NULL.
 * TM_OK or TM_ENOMEM. */
int match_find(const match_index *ix, match_work *w, const char *key, size_t kl,
	       const char *lang, size_t top, double min_score,
	       const match_cand **cands, size_t *n);


#endif

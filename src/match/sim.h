/* sim.h - similarity search over short texts (match keys: lowercase words
 * separated by single spaces), by two published measures:
 *
 *   cos    the cosine of TF-IDF vectors of character 3-grams within words
 *          (Salton & Buckley 1988).  Each word is padded with one space on
 *          each side and cut into its 3-grams of code points ("lager" ->
 *          " la", "lag", "age", "ger", "er "); a padded word shorter than
 *          3 code points is one gram.  A term's weight is tf * idf with
 *          idf = ln((1 + N) / (1 + df)) + 1 (N documents, df of them
 *          holding the gram), and vectors are L2-normalised: the
 *          definition of scikit-learn's TfidfVectorizer(analyzer=
 *          "char_wb", ngram_range=(3, 3)) with its defaults, which the
 *          unit test checks against.  A gram of the query that no document
 *          holds counts in the query's norm with df = 0, so an unknown
 *          word lowers the similarity instead of vanishing.
 *   words  the query's words and the document's are aligned: two words
 *          are taken for one when equal; or two forms of one word (a
 *          shared start of at least SIM_STEM_MIN code points and at
 *          least SIM_STEM_SHARE of the longer, at most SIM_STEM_TAIL code
 *          points after it on each side); or one typing slip apart (one
 *          code point left out, added, changed, or two neighbours
 *          swapped: Damerau 1964; both at least SIM_TYPO_MIN code
 *          points); or a query word that no document holds, of
 *          SIM_CUT_MIN to SIM_CUT_MAX code points, starting a document
 *          word at most half its length (cut short: "rep").  When both
 *          sides have at most SIM_PIECE_WORDS words, a word that is the
 *          compound of two words of the other side (the first as it is,
 *          the second as it is, another form or cut short; pieces of at
 *          least SIM_PIECE_MIN bytes) aligns with both.  Only a
 *          document's first SIM_STEM_WORDS distinct words (by term
 *          number), each of at most SIM_STEM_BYTES bytes, are compared by
 *          form.
 *   bm25   Okapi BM25 over whole words (Robertson & Zaragoza 2009):
 *          sum over the query's distinct words t of
 *          idf(t) * f(t,d) (k1 + 1) / (f(t,d) + k1 (1 - b + b |d| / avgdl)),
 *          idf(t) = ln(1 + (N - df + 0.5) / (df + 0.5)), k1 = 1.2, b = 0.75;
 *          f(t,d) is 1 for a word d does not hold but aligns with.
 *          bm25n divides it by the score the query would reach against a
 *          document equal to itself (each word once, |d| = |q|), capped
 *          at 1: a share of the query's word evidence, comparable across
 *          languages and lengths.
 *   dcov   the share of the idf of the document's distinct words (those
 *          compared by form) that align with a query word: the
 *          document's side of the word evidence, so that a neighbour
 *          whose specific words the query never says ("femme de
 *          chambre" for "sage femme") is not taken for it.
 *
 * The combined similarity is s = SIM_W_CHAR cos + SIM_W_WORD bm25n dcov,
 * in [0, 1].  Character grams carry typos, inflections and compounds;
 * aligned words carry the weight of a word shared, a rare (specific) word
 * more than a common one, both ways.
 *
 * Search: the postings of the query's grams are read rarest first, at
 * most SIM_WORK postings in all, adding each gram's weight to the
 * documents holding it; the SIM_CANDIDATES documents with the largest sums
 * (ties: the lower document number) are then scored exactly.  So a query
 * costs at most SIM_WORK + SIM_CANDIDATES * (its terms + a document's
 * terms + its words * SIM_STEM_WORDS comparisons of at most
 * SIM_STEM_BYTES bytes), whatever the index holds; the query is cut to
 * SIM_QUERY_MAX bytes (at a word boundary when there is one) first.
 *
 * Documents are numbered 0, 1, ... in the order they are added.  An index
 * is read-only once sim_finish returned; a sim_work is one query's scratch
 * (one per thread). */
#ifndef TM_SIM_H
#define TM_SIM_H

#include <stddef.h>
#include <stdint.h>

#define SIM_BM25_K1 1.2
#define SIM_BM25_B 0.75
#define SIM_W_CHAR 0.5
#define SIM_W_WORD 0.5
#define SIM_WORK 8000
#define SIM_CANDIDATES 32
#define SIM_QUERY_MAX 256
#define SIM_STEM_MIN 4      /* code points two forms of a word share at least */
#define SIM_STEM_SHARE 0.6  /* ... and at least this share of the longer */
#define SIM_STEM_TAIL 4     /* code points each may have after the shared start */
#define SIM_STEM_WORDS 64   /* words of a document compared by form */
#define SIM_TYPO_MIN 6      /* code points of a word read with one slip */
#define SIM_CUT_MIN 3       /* code points of a word read as cut short ... */
#define SIM_CUT_MAX 5       /* ... up to this many, at most half the word */
#define SIM_STEM_BYTES 64   /* longer words are compared whole only */
#define SIM_PIECE_MIN 3     /* bytes of each piece of a compound */
#define SIM_PIECE_WORDS 8   /* compounds are sought when both sides have at most this many words */

typedef struct sim_index sim_index;
typedef struct sim_work sim_work;

typedef struct sim_hit {
	uint32_t doc;
	double cos, bm25, bm25n, dcov, s;
} sim_hit;

/* A new, empty index, or NULL when memory ran out. */
sim_index *sim_new(void);
void sim_free(sim_index *x);

/* Adds a document (the next number).  TM_OK or TM_ENOMEM. */
int sim_add(sim_index *x, const char *text, size_t n);

/* Computes the weights and the postings: TM_OK or TM_ENOMEM.  No
 * sim_add after it. */
int sim_finish(sim_index *x);

size_t sim_docs(const sim_index *x);
size_t sim_bytes(const sim_index *x);

/* Scratch for queries over x, or NULL when memory ran out. */
sim_work *sim_work_new(const sim_index *x);
void sim_work_free(sim_work *w);

/* The documents most similar to q[0..n): up to max hits, best first
 * (s descending, then document number), only those with s > 0.
 * TM_OK or TM_ENOMEM. */
int sim_query(const sim_index *x, sim_work *w, const char *q, size_t n,
	      sim_hit *hits, size_t max, size_t *nhits);

/* The exact measures between q and one document (no search): for tests
 * and explanations.  TM_OK or TM_ENOMEM. */
int sim_pair(const sim_index *x, sim_work *w, const char *q, size_t n, uint32_t doc,
	     sim_hit *hit);

#endif

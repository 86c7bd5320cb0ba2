/* propose.h - the ranker: scored suggestions for the taxonomy's
 * curators, from counts and labels.  Suggestions are evidence for a
 * human curator, who decides; the ranker never changes the taxonomy.
 *
 * Kinds (README.md, "Suggestions", explains each with its bars):
 *   new_alt_label     a cleaned title the occupation's postings use often
 *                     and specifically, matching none of its labels
 *   new_hidden_label  a recurrent spelling variant of one of its labels
 *                     (propose_variant says which variants count)
 *   rare_label        a label the occupation's postings hardly use
 *   used_elsewhere    a label whose postings mostly carry another
 *                     occupation
 *
 * Ownership: a propose_list owns its array; the strings of a suggestion
 * point into the counts (tally_mem) and the labels (labelset) it was
 * made from, which must outlive it. */
#ifndef TM_PROPOSE_H
#define TM_PROPOSE_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "rank/labels.h"
#include "rank/stats.h"
#include "count/tally.h"

enum { PROPOSE_ALT, PROPOSE_HIDDEN, PROPOSE_RARE, PROPOSE_ELSEWHERE, PROPOSE_NKINDS };

/* The kinds' names, by the enum; NULL after the last. */
extern const char *const propose_kind_names[PROPOSE_NKINDS + 1];

/* The evidence bars: each an option of titlemill propose with the same
 * name, its default, range and meaning.  This list is the one place
 * where they are defined (X: type, its option kind (options.h), member,
 * option, argument, default, low, high, meaning). */
#define PROPOSE_BARS(X) \
	X(uint64_t, OPT_U64, min_postings, "min-postings", "N", 5, 0, 1e18, \
	  "new_alt_label: postings of the title") \
	X(double, OPT_REAL, min_share, "min-share", "X", 0.01, 0, 1, \
	  "new_alt_label: lower Wilson bound of its share of the occupation's postings") \
	X(double, OPT_REAL, min_precision, "min-precision", "X", 0.6, 0, 1, \
	  "new_alt_label: share of the key's postings that carry the occupation") \
	X(double, OPT_REAL, min_g2, "min-g2", "X", STATS_CHI2_1DF_P001, 0, 1e12, \
	  "new_alt_label: Dunning's G2 above X (chi2 at p=0.001, 1 df)") \
	X(uint64_t, OPT_U64, hidden_min, "hidden-min", "N", 3, 0, 1e18, \
	  "new_hidden_label: postings of the variant") \
	X(double, OPT_REAL, hidden_precision, "hidden-precision", "X", 0.5, 0, 1, \
	  "new_hidden_label: precision of the variant") \
	X(double, OPT_REAL, hidden_share, "hidden-share", "X", 0.01, 0, 1, \
	  "new_hidden_label: lower Wilson bound of its share of the label's and its postings above X") \
	X(uint64_t, OPT_U64, rare_min, "rare-min", "N", 200, 0, 1e18, \
	  "rare_label: postings of the occupation") \
	X(double, OPT_REAL, rare_share, "rare-share", "X", 0.005, 0, 1, \
	  "rare_label: upper Wilson bound of the label's share below X") \
	X(double, OPT_REAL, elsewhere_share, "elsewhere-share", "X", 0.6, 0, 1, \
	  "used_elsewhere: share of the key's postings with another occupation") \
	X(uint64_t, OPT_U64, elsewhere_min, "elsewhere-min", "N", 5, 0, 1e18, \
	  "used_elsewhere: postings of the key")

#define PROPOSE_BAR_MEMBER(type, kind, m, opt, arg, def, lo, hi, meaning) type m;
typedef struct propose_bars {
	PROPOSE_BARS(PROPOSE_BAR_MEMBER)
} propose_bars;

/* The defaults. */
void propose_bars_default(propose_bars *b);

typedef struct propose_filter {
	const char *occ;   /* only this occupation, or NULL */
	const char *lang;  /* only this language, or NULL */
} propose_filter;

typedef struct propose_sugg {
	int kind;
	const char *occ, *key, *text; /* text: the title (alt, hidden) or the label */
	size_t ol, kl, tl;
	char lang[4];
	int is_title;                 /* text is a counted title (alt, hidden) */
	const label *lb;              /* the label (rare, elsewhere), the label
				       * varied (hidden), or NULL */
	uint64_t postings;            /* of the title, or of the label's key
				       * with the occupation */
	uint64_t occ_postings;        /* of the occupation in the language */
	uint64_t key_postings;        /* of the key in the language */
	uint64_t lang_postings;       /* of the language */
	double score, g2, precision;  /* precision: postings / key_postings */
	const char *rival;            /* the strongest other occupation of the
				       * key, or NULL */
	size_t rl;
	uint64_t rival_postings;
	double strength;              /* in [0, 1]: the mid-rank percentile of
				       * score among the run's suggestions of
				       * the same kind, before any filter */
	uint64_t label_postings;      /* hidden: postings of the label varied
				       * with the occupation */
	const char *variant;          /* hidden: "spacing", "typo" or "spelling" */
	char id[17];                  /* 16 hex digits of the hash of kind,
				       * occupation, language and key */
} propose_sugg;

typedef struct propose_list {
	propose_sugg *v;  /* by kind, then score (highest first), occupation,
			   * language, key */
	size_t n;
	size_t joined;    /* titles past new_alt_label's bars that only join
			   * labels of their occupation (two languages'
			   * names of it, "maurer bricklayer"): not proposed */
} propose_list;

/* Ranks the suggestions of m and ls passing bars b (filtered by f, which
 * may be NULL) into out.  Returns 0, or -1 when memory ran out (out is
 * then empty).  Deterministic: the same counts and labels give the same
 * list, and each suggestion the same strength whatever f.  Prints
 * nothing.  Cost: one sort of the counts' forms by occupation
 * (tm_each_triple), then linear in triples and labels (one hash table of
 * compact ids over the (language, key)s, the labels met in key order
 * beside each occupation's triples), plus, for each title that is none
 * of its labels, a cheap test against each label of its occupation and
 * language, and for each title past new_alt_label's bars at most
 * PROPOSE_JOIN_WORDS^2 lookups of its parts among the labels (is it a
 * join of them?). */
int propose_run(tally_mem *m, const labelset *ls, const propose_bars *b,
		const propose_filter *f, propose_list *out);

void propose_list_free(propose_list *l);

/* The most words of a key that is tried as a join of labels. */
#define PROPOSE_JOIN_WORDS 16

/* The word lengths (code points) for variants one and two edits apart. */
#define PROPOSE_TYPO_MIN 6
#define PROPOSE_SPELLING_MIN 7

/* Is key a spelling variant of label key lk?  "spacing": equal without
 * spaces and hyphens ("gabelstapler-fahrer", "gabelstaplerfahrer");
 * otherwise the same words but one, whose two forms both have
 * PROPOSE_TYPO_MIN code points or more and are "typo": one edit
 * (Levenshtein) apart ("schweiser"), or "spelling": two edits apart,
 * both inside one stretch of at most two code points of each, when the
 * longer has PROPOSE_SPELLING_MIN or more ("theater" / "theatre",
 * "dialog" / "dialogue"; not "technicien" / "mecanicien", whose edits
 * are apart).  NULL when none (or when they are equal). */
const char *propose_variant(const char *key, size_t kl, const char *lk, size_t ll);

/* The label as the postings write it: the first of the nex examples
 * holding text (lowercase) as whole words, in mixed case rather than
 * shouting capitals, appended to out; nothing when no example shows it.
 * 0, or -1 when memory ran out. */
int propose_as_written(const char *const *ex, const size_t *exl, int nex, const char *text,
		       size_t tl, tm_buf *out);

#endif

/* acro.h - acronym keys: the initials of runs of a match key's words, so
 * that a text saying `RN`, `CSR` or `chauffeur PL` finds `registered
 * nurse`, `customer service representative` or `chauffeur poids lourd`,
 * which share no character 3-gram with it.
 *
 * The keys of a document key k: for every run of 2 to ACRO_MAX
 * consecutive words among its first ACRO_WORDS words (words split at
 * spaces and ASCII punctuation), the first code point of each word of
 * the run ("all" form), and the first code point of each of its words
 * longer than ACRO_SHORT code points when at least two such words
 * remain and some word was left out ("long" form: `fachkraft für schutz
 * und sicherheit` gives `ffsus` and `fss`).  A run's words are its
 * first and last word and the words between; a key of ACRO_WORDS words
 * has at most ACRO_WORDS * (ACRO_WORDS - 1) runs of two forms each.
 *
 * A query word is looked up as an acronym when it is ACRO_MIN to ACRO_MAX
 * ASCII letters and no searched document holds it as a word (`it`, `hr`,
 * `hgv` are words of labels; `rn`, `csr` are not). */
#ifndef TM_ACRO_H
#define TM_ACRO_H

#include <stddef.h>
#include <stdint.h>

#define ACRO_MIN 2      /* letters of an acronym */
#define ACRO_MAX 5
#define ACRO_SHORT 3    /* words of at most this many code points: left
			 * out of the long form (de, und, für, of, and) */
#define ACRO_WORDS 8    /* a key's words read for its acronyms */
#define ACRO_BYTES (ACRO_MAX * 4) /* an acronym's bytes at most */
#define ACRO_KEYS_MAX (ACRO_WORDS * (ACRO_WORDS - 1))

/* One acronym of a key: its bytes, and the run it abbreviates (its
 * first word and how many words, counted among the key's words). */
typedef struct acro_key {
	char a[ACRO_BYTES];
	uint8_t len, first, nw;
} acro_key;

/* The acronym keys of key[0..n) into out (at most ACRO_KEYS_MAX),
 * distinct (the first run of each acronym kept); returns how many. */
size_t acro_keys(const char *key, size_t n, acro_key *out);

/* The words of key[0..n): their starts and lengths, at most max of them
 * (the first max).  Words are split at spaces and ASCII punctuation. */
size_t acro_words(const char *key, size_t n, const char **w, size_t *wl, size_t max);

/* A run of a document's words: its first word and how many. */
typedef struct acro_ent {
	uint32_t doc;
	uint8_t first, nw;
} acro_ent;

/* How much of a document's words and of the query's words the run r of
 * key[0..kl) explains, the query's words qw[0..nq) reading qw[qa] as the
 * acronym: (the run's words and the words the two share outside it, over
 * the document's words) x (the acronym and the query's words the document
 * holds outside the run, over the query's words).  Words as acro_words,
 * the first ACRO_WORDS of each. */
double acro_fit(const char *const *qw, const size_t *qwl, size_t nq, size_t qa,
		const char *key, size_t kl, const acro_ent *r);

/* The acronym table: acronym -> the runs of the documents it abbreviates,
 * and the words the documents hold.  Documents are added in their order
 * (numbers rising); acro_finish before any lookup. */
typedef struct acro_index acro_index;

acro_index *acro_new(void);
void acro_free(acro_index *a);
/* TM_OK or TM_ENOMEM. */
int acro_add(acro_index *a, uint32_t doc, const char *key, size_t n);
int acro_finish(acro_index *a);
/* The runs abbreviated by acronym s[0..n) (by document number, then
 * run), *cnt of them; NULL when none. */
const acro_ent *acro_find(const acro_index *a, const char *s, size_t n, size_t *cnt);
/* 1 when some added document holds word s[0..n). */
int acro_is_word(const acro_index *a, const char *s, size_t n);
size_t acro_bytes(const acro_index *a);
/* The chance that a string of n ASCII letters (ACRO_MIN <= n <= ACRO_MAX)
 * is an acronym of the table: the distinct acronyms of n ASCII letters it
 * holds over 26^n.  0 for other n. */
double acro_chance(const acro_index *a, size_t n);

/* 1 when word[0..n) has the shape of an acronym: ACRO_MIN to ACRO_MAX
 * ASCII letters. */
int acro_shape(const char *word, size_t n);

#endif

/* lexicon.h - the lexicons, loaded from text files and compiled into
 * one trie over the words of all phrases of all categories (see
 * lexicons/README.md for the file format).
 *
 * A lexicon is built once at start-up and read-only afterwards: any
 * number of normalisers may share it.  Every word of every phrase, in
 * its match-key fold, has an id in the lexicon's vocabulary; a phrase
 * (weak punctuation dropped) is a path of word ids from the root of the
 * trie, and the node it ends at holds its entries, of every category.
 * So the phrases starting at a word are found by walking from the root
 * one word at a time, one probe per step, however many categories and
 * entries there are. */
#ifndef TM_LEXICON_H
#define TM_LEXICON_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

enum lex_cat {
	LC_MARKER,    /* gender/markers*.txt */
	LC_SENIORITY,
	LC_SCHEDULE,
	LC_PAY,
	LC_REFERENCE,
	LC_MARKETING,
	LC_EMPLOYER,
	LC_LOCATION,
	LC_PLACE,
	LC_PROTECT,
	LC_UNIT,
	LC_OCCUPATION, /* head words, fields; endings (value suffix) apart */
	LC_BUSINESS,   /* kinds of business, legal forms, name articles */
	LC_NCAT
};

/* LW_ADJ (places only): a place adjective, a place only before a location
 * `after` word (im Münchner Norden). A place written LW_ANY is a location
 * wherever it stands (a case form: Helsingissä).  LW_CITY (places only):
 * a slot place that is a larger place, taken also in lower case at the
 * end of a title after the occupation (koch berlin). */
enum lex_where { LW_ANY, LW_EDGE, LW_ALONE, LW_SLOT, LW_STRONG, LW_OFF, LW_ADJ,
		 LW_CITY };

/* An entry holds no pointer: the lexicon's arrays are its cache image
 * as they are. */
typedef struct lex_entry {
	uint8_t cat;     /* enum lex_cat */
	uint8_t where;   /* enum lex_where */
	uint8_t amb;     /* applies only when the title's language matches */
	uint8_t off;     /* switched off by a later `off` line */
	uint8_t caps;    /* the phrase was written in capitals: NRW, DACH */
	char lang[4];    /* "" for `*` */
	char value[15];  /* "-" when unused (the longest value is 12 bytes) */
	uint32_t next;   /* next entry of the same phrase, 0 at the end */
} lex_entry;

typedef struct lex_pair {
	char lang[4];
	uint8_t amb;
	const char *masc; /* folded ending, "" for a pure suffix */
	const char *fem;
	uint8_t mlen, flen;
} lex_pair;

typedef struct lexicon lexicon;

/* The first member of every lexicon: what the inline readers below
 * (called for almost every word of every title) read without a call.
 * Owned by the lexicon; nobody else writes it. */
typedef struct lex_head {
	lex_entry *ent;  /* entries by index, ent[0] unused */
	uint32_t *root;  /* root[id]: the phrase trie's node of the one-word
			  * prefix, 0 none (the root's edges, by direct index) */
	uint8_t *wnext;  /* wnext[id]: 1 when the word follows another in
			  * some phrase (else no step below the root can
			  * take it, and none is probed) */
} lex_head;

static inline const lex_head *lex_head_of(const lexicon *lx)
{
	return (const lex_head *)(const void *)lx;
}

/* Returns an empty lexicon, or NULL when memory ran out. */
lexicon *lex_new(void);
void lex_free(lexicon *lx);

/* Reads every category folder of dir (in the fixed category order, the
 * files of a folder in name order).  Returns 0, or -1 with a message
 * naming file and line in err; the lexicon keeps what was read before
 * the error.  A missing category folder is not an error. */
int lex_load_dir(lexicon *lx, const char *dir, tm_buf *err);

/* One lexicon file, as lex_load_dir reads them. */
typedef struct lex_file {
	char *path;      /* malloc'd */
	int cat;         /* enum lex_cat */
	int gender_kind; /* for lex_load_file */
} lex_file;

/* Appends to *files (*n of them; the array grows by realloc) the files
 * lex_load_dir(dir) would read, in its order.  Returns 0, or -1 with a
 * message in err (a gender file badly named, memory), *files then
 * holding the files listed before the error.  The caller releases the
 * array with lex_files_free, also after an error. */
int lex_list_dir(const char *dir, lex_file **files, size_t *n, tm_buf *err);
void lex_files_free(lex_file *files, size_t n);

/* Reads a whole file into text (reset first), with one byte free after
 * its end.  Returns 0, or -1 with "path: why" in err. */
int lex_read_text(const char *path, tm_buf *text, tm_buf *err);

/* Parses one file of category cat (`gender` files are told apart by their
 * name: markers*, suffixes*, pairs*).  Same return convention. */
int lex_load_file(lexicon *lx, int cat, int gender_kind, const char *path,
		  tm_buf *err);
/* The same from the file's text in memory: text[0..len) is changed in
 * place (line and field ends become NULs) and text[len] must be
 * writable; path names the file in messages. */
int lex_load_text(lexicon *lx, int cat, int gender_kind, const char *path, char *text,
		  size_t len, tm_buf *err);

/* Adds one phrase.  lang is a primary subtag, "*" or with a trailing '?'.
 * Returns 0, 1 when the phrase folds to no token (nothing added), or -1
 * with a message in err. */
int lex_add(lexicon *lx, int cat, const char *lang, const char *phrase,
	    size_t plen, const char *value, int where, tm_buf *err);

/* The trie's root node. */
#define LEX_ROOT 0

/* The id of a word (its fold; h = tok_hash(fold, len)) in the
 * vocabulary, or 0 when no phrase holds that word. */
uint32_t lex_word(const lexicon *lx, const char *fold, size_t len, uint64_t h);

/* lex_step below the root, for a word that follows another somewhere. */
uint32_t lex_step_below(const lexicon *lx, uint32_t n, uint32_t word);

/* The node reached from node n by the word of id `word`, or 0 when no
 * phrase goes on that way (always 0 for word 0). */
static inline uint32_t lex_step(const lexicon *lx, uint32_t n, uint32_t word)
{
	const lex_head *h = lex_head_of(lx);
	if (!word)
		return 0;
	if (n == LEX_ROOT)
		return h->root[word];
	return h->wnext[word] ? lex_step_below(lx, n, word) : 0;
}

/* The first entry of the phrase ending at node n, or NULL when n only
 * starts longer phrases; *cats (when cats is not NULL) receives the
 * categories of all its entries (1 << cat). */
const lex_entry *lex_phrase(const lexicon *lx, uint32_t n, uint32_t *cats);

/* The entry of the longest occupational ending (occupation/, value
 * `suffix`) that the word fold[0..len) ends with, or NULL; *elen
 * receives the ending's length in bytes.  The word may be the ending
 * itself.  Costs at most one step per byte of the longest ending. */
const lex_entry *lex_ending(const lexicon *lx, const char *fold, size_t len,
			    size_t *elen);

/* Packs the trie of endings into flat arrays that lex_ending reads
 * faster, once the lexicon is loaded (a later lex_add of an ending
 * drops them; lex_ending answers the same either way).  Returns 0, or
 * -1 when memory ran out (nothing changed). */
int lex_freeze(lexicon *lx);

/* An entry's index, and the entry of an index (stable while no entry is
 * added). */
static inline size_t lex_entry_index(const lexicon *lx, const lex_entry *e)
{
	return (size_t)(e - lex_head_of(lx)->ent);
}

static inline const lex_entry *lex_entry_at(const lexicon *lx, size_t i)
{
	return &lex_head_of(lx)->ent[i];
}

/* The next entry of the same phrase, or NULL. */
static inline const lex_entry *lex_next(const lexicon *lx, const lex_entry *e)
{
	return e->next ? lex_entry_at(lx, e->next) : NULL;
}

const lex_pair *lex_pairs(const lexicon *lx, size_t *n);

/* The indices into lex_pairs() of the pairs whose feminine ending ends
 * with byte c (0..255; -1: the pairs with an empty ending), in file
 * order; *n of them.  Owned by the lexicon. */
const uint32_t *lex_pairs_fem_last(const lexicon *lx, int c, size_t *n);

/* The compiled image of a lexicon (the lexicon cache's content): its
 * arrays as they are in memory, behind a header with a format version,
 * the caller's key (what the lexicon was built from) and a checksum.
 * The format is described beside the code in lexicon_image.c; raise
 * LEX_IMAGE_VERSION whenever it or the meaning of its content changes. */
#define LEX_IMAGE_VERSION 2

/* Writes the image of lx under key into out (reset first).  Returns 0,
 * or -1 when memory ran out (out then empty). */
int lex_image_write(const lexicon *lx, const unsigned char key[16], tm_buf *out);

/* Builds a lexicon on image[0..n), which must carry key: its arrays
 * are read in place.  Nothing in the image is trusted: the checksum,
 * the counts and every index are checked before use.  Returns 0 with
 * the lexicon in *out (the caller frees it), which then owns the image:
 * a mapping (mapped: released with munmap; map it readable, private)
 * or malloc'd memory (free); the first lex_add copies the arrays out,
 * so the lexicon stays extendable.  Returns 1 when the image cannot be
 * used (another key, version or byte order, damaged, truncated), with
 * why in `why`, -1 when memory ran out; *out is then NULL and the image
 * still the caller's.  The image must be 8-byte aligned. */
int lex_image_use(void *image, size_t n, int mapped, const unsigned char key[16],
		  lexicon **out, tm_buf *why);

/* Writes the checksum of image[0..n) into its header: for tests that
 * change an image and want its indices checked, not its checksum. */
void lex_image_seal(void *image, size_t n);

/* The folder name of a category ("seniority"). */
const char *lex_cat_name(int cat);

#endif

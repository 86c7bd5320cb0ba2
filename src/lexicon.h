/* lexicon.h - the noise lexicons, loaded from text files and compiled
 * into hash tables over token sequences (see lexicons/README.md for the
 * file format).
 *
 * A lexicon is built once at start-up and read-only afterwards: any
 * number of normalisers may share it.  Phrases are stored in their
 * match-key fold, one token per unit (weak punctuation dropped), so a
 * lookup is one probe per candidate length. */
#ifndef TM_LEXICON_H
#define TM_LEXICON_H

#include <stddef.h>
#include <stdint.h>

#include "buf.h"

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
	LC_NCAT
};

enum lex_where { LW_ANY, LW_EDGE, LW_ALONE, LW_SLOT, LW_STRONG, LW_OFF };

typedef struct lex_entry {
	uint8_t cat;     /* enum lex_cat */
	uint8_t where;   /* enum lex_where */
	uint8_t amb;     /* applies only when the title's language matches */
	uint8_t off;     /* switched off by a later `off` line */
	uint8_t caps;    /* the phrase was written in capitals: NRW, DACH */
	char lang[4];    /* "" for `*` */
	const char *value; /* owned by the lexicon; "-" when unused */
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

/* Returns an empty lexicon, or NULL when memory ran out. */
lexicon *lex_new(void);
void lex_free(lexicon *lx);

/* Reads every category folder of dir (in the fixed category order, the
 * files of a folder in name order).  Returns 0, or -1 with a message
 * naming file and line in err; the lexicon keeps what was read before
 * the error.  A missing category folder is not an error. */
int lex_load_dir(lexicon *lx, const char *dir, tm_buf *err);

/* Parses one file of category cat (`gender` files are told apart by their
 * name: markers*, suffixes*, pairs*).  Same return convention. */
int lex_load_file(lexicon *lx, int cat, int gender_kind, const char *path,
		  tm_buf *err);

/* Adds one phrase.  lang is a primary subtag, "*" or with a trailing '?'.
 * Returns 0, 1 when the phrase folds to no token (nothing added), or -1
 * with a message in err. */
int lex_add(lexicon *lx, int cat, const char *lang, const char *phrase,
	    size_t plen, const char *value, int where, tm_buf *err);

/* The first entry of the phrase whose tokens have the given folds, or
 * NULL.  seq is the sequence hash (lex_seq_hash over the token hashes). */
const lex_entry *lex_find(const lexicon *lx, uint64_t seq, size_t ntok,
			  const char *const *fold, const uint32_t *flen);
const lex_entry *lex_next(const lexicon *lx, const lex_entry *e);
/* An entry's index, and the entry of an index (stable while no entry is
 * added). */
size_t lex_entry_index(const lexicon *lx, const lex_entry *e);
const lex_entry *lex_entry_at(const lexicon *lx, size_t i);

uint64_t lex_seq_step(uint64_t h, uint64_t th);
uint64_t lex_seq_final(uint64_t h, size_t ntok);
#define LEX_SEQ_SEED 0x243F6A8885A308D3ULL

/* Quick filters: 0 proves that no phrase starts with the token sequence
 * of hash seq (lex_seq_final over its tokens), or that no phrase is
 * exactly that sequence; 1 means maybe. */
int lex_maybe_prefix(const lexicon *lx, uint64_t seq);
int lex_maybe_phrase(const lexicon *lx, uint64_t seq);

const lex_pair *lex_pairs(const lexicon *lx, size_t *n);

/* The folder name of a category ("seniority"). */
const char *lex_cat_name(int cat);

#endif

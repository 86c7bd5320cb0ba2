/* tally.h - the frequency engine: what is counted, and the interface every
 * counting backend (memory, Redis) implements.
 *
 * Counted, for each posting (each distinct posting id once, when the
 * postings have ids):
 *   per (occupation, language, key): postings, per clean surface form
 *   (the display title is the most frequent form), and up to three raw
 *   example titles (the three with the smallest hash: a deterministic
 *   sample that merges exactly);
 *   per (language, key): postings, each posting once whatever its
 *   occupations;
 *   per (occupation, language): postings.
 * Fields are UTF-8 and never contain 0x1F (the separator of joined keys)
 * or other controls: the posting readers refuse such occupations, titles
 * come cleaned, and the counts-table reader refuses such fields. */
#ifndef TM_TALLY_H
#define TM_TALLY_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "core/buf.h"
#include "norm/norm.h"
#include "io/postings.h"
#include "count/idset.h"
#include "count/strtab.h"

#define TALLY_EXAMPLES 3

/* One normalised posting as the engines receive it.  Borrowed. */
typedef struct tally_posting {
	const char *id;  /* NULL: no id, always counted */
	size_t idlen;
	const char *date; /* YYYY-MM-DD, checked by the reader; NULL: undated
			   * (the backend counts it in its period) */
	size_t datelen;
	const char *lang; /* primary subtag, "und" when unknown */
	const char *key, *title, *example;
	size_t keylen, titlelen, examplelen;
	const char *const *occ;
	const size_t *occlen;
	size_t nocc;
} tally_posting;

/* ---- the memory engine (also the common currency: every store can be
 * read into one, and counts tables are written from one) ---- */

typedef struct tally_mem {
	/* keys are fields joined by 1F, filed under a hash of the fields'
	 * hashes (st_fields): look them up through the functions below */
	strtab forms;   /* occ 1F lang 1F key 1F title -> postings */
	strtab keys;    /* lang 1F key -> postings */
	strtab occs;    /* occ 1F lang -> postings */
	idset ids;      /* posting ids seen */
	/* the triples that have examples: occ 1F lang 1F key.  Triple i's
	 * first example is ex[i]; its count is 0, or the index + 1 of
	 * its second and third in exmore (most triples of a long tail have
	 * one).  The texts lie in exarena. */
	strtab triples;
	struct tm_ex { uint64_t h; uint32_t off, len; /* len 0: none (none is empty) */ } *ex;
	size_t excap;
	struct tm_exmore { struct tm_ex x[TALLY_EXAMPLES - 1]; } *exmore;
	size_t nmore, morecap;
	tm_buf exarena;
	uint64_t postings, republished;
	uint64_t added[3]; /* the counts added to forms, keys, occs: while
			    * each stays below 2^64, no count and no sum of
			    * counts of its table can overflow */
} tally_mem;

void tm_init(tally_mem *m);
void tm_free(tally_mem *m);

/* Counts one posting.  Returns 0, 1 when its id was counted before (the
 * posting is then skipped), -1 when memory ran out. */
int tm_add(tally_mem *m, const tally_posting *p);

/* The pieces a counts table holds, added one by one (merging tables).
 * Return 0, -1 when memory ran out, -2 when the counts would add up past
 * 2^64 - 1 (nothing is changed then). */
int tm_add_form(tally_mem *m, const char *occ, size_t ol, const char *lang,
		const char *key, size_t kl, const char *title, size_t tl, uint64_t n);
int tm_add_key(tally_mem *m, const char *lang, const char *key, size_t kl, uint64_t n);
int tm_add_occ(tally_mem *m, const char *occ, size_t ol, const char *lang, uint64_t n);
int tm_add_example(tally_mem *m, const char *occ, size_t ol, const char *lang,
		   const char *key, size_t kl, const char *text, size_t tl);

/* The counts table's header (its columns; a table by period has a last
 * column, period). */
#define TM_HEADER "kind\toccupation\tlang\tkey\ttext\tpostings"

/* Writes the counts table (TSV, header first, sorted; see README).
 * Returns 0, or -1 on a write error or when memory ran out. */
int tm_write(tally_mem *m, FILE *out);
/* Writes its rows only, each with a last field period[0..pn) when
 * period is not NULL. */
int tm_write_rows(tally_mem *m, FILE *out, const char *period, size_t pn);

/* Reads a counts table and adds it to m, whatever the periods of its
 * rows (they are checked).  Returns 0, or -1 with a message naming file
 * and line in err. */
int tm_read(tally_mem *m, const char *path, tm_buf *err);

/* Where the rows of one period go: 0 with *m the engine (NULL: the rows
 * are checked and left out), or -1 with the reason in err (tm_read_routed
 * adds the file and line).  period is "" (n 0) for a table without a
 * period column. */
typedef int (*tm_route)(void *ctx, const char *period, size_t n, tally_mem **m, tm_buf *err);
/* Reads a counts table, each row into the engine route gives for its
 * period (asked once for each run of rows of one period). */
int tm_read_routed(const char *path, tm_route route, void *ctx, tm_buf *err);

/* Adds what src holds to dst (not its posting ids).  Returns 0, -1 when
 * memory ran out, -2 when the counts would add up past 2^64 - 1. */
int tm_merge(tally_mem *dst, const tally_mem *src);

/* One (occupation, language, key) with its postings and display title;
 * strings point into the engine. */
typedef struct tm_triple {
	const char *occ, *lang, *key, *title;
	size_t ol, ll, kl, tl;
	uint64_t postings;
} tm_triple;

/* Calls fn for every triple, sorted by occupation, language, key (bytes).
 * Stops and returns fn's value when it is not 0; -1 when memory ran out. */
int tm_each_triple(tally_mem *m, int (*fn)(void *ctx, const tm_triple *t), void *ctx);

/* The examples of a triple (at most TALLY_EXAMPLES, byte order): their
 * texts and lengths; returns their number.  Pointers into the engine. */
int tm_examples(tally_mem *m, const char *occ, size_t ol, const char *lang,
		const char *key, size_t kl, const char **text, size_t *len);

/* Postings of a language and key whatever the occupation. */
uint64_t tm_key_postings(tally_mem *m, const char *lang, const char *key, size_t kl);

/* Postings of an occupation in a language (0 when unknown). */
uint64_t tm_occ_postings(tally_mem *m, const char *occ, size_t ol, const char *lang);

/* Bytes held by the engine, for measurements; the bytes of the strings
 * it holds (keys, titles, examples) among them. */
size_t tm_bytes(const tally_mem *m);
size_t tm_string_bytes(const tally_mem *m);

/* The triples that have examples, by index 0 .. tm_ntriples(m) - 1 in
 * no particular order: the joined key (occupation 1F language 1F key)
 * of triple i, and its examples (at most TALLY_EXAMPLES, in no
 * particular order): their texts, lengths and hashes (dg_fnv, the
 * order of the sample); the number is returned.  Pointers into the
 * engine, valid until it changes. */
static inline size_t tm_ntriples(const tally_mem *m)
{
	return m->triples.n;
}
static inline const char *tm_triple_key(const tally_mem *m, size_t i, size_t *n)
{
	return st_key(&m->triples, i, n);
}
int tm_triple_examples(const tally_mem *m, size_t i, const char **text, size_t *len,
		       uint64_t *h);

/* What the engines count of a posting once its title is cleaned: the
 * raw example is the prepared title with contact data masked.  Borrows
 * from p and r. */
static inline void tally_posting_of(tally_posting *tp, const posting *p,
				    const norm_result *r)
{
	memset(tp, 0, sizeof *tp);
	tp->id = p->id;
	tp->idlen = p->idlen;
	tp->date = p->date;
	tp->datelen = p->date ? p->datelen : 0;
	tp->lang = p->lang;
	tp->key = r->key;
	tp->keylen = r->key_len;
	tp->title = r->title;
	tp->titlelen = r->title_len;
	tp->example = r->masked;
	tp->examplelen = r->masked_len;
	tp->occ = p->occ;
	tp->occlen = p->occlen;
	tp->nocc = p->nocc;
}

#endif

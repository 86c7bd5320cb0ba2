/* labels.h - the taxonomy's labels: a labels TSV (columns occupation,
 * kind = pref|alt|hidden, lang, label; found by name).  Each label gets
 * its match key from the normaliser with nothing removed (a label is
 * never cut down).  A labelset owns its strings. */
#ifndef TM_LABELS_H
#define TM_LABELS_H

#include <stdio.h>

#include "core/buf.h"
#include "norm/norm.h"
#include "count/strtab.h"

typedef struct label {
	uint32_t occ, occlen, text, textlen, key, keylen; /* offsets in arena */
	char kind;    /* 'p' pref, 'a' alt, 'h' hidden */
	char lang[4];
	long line;
} label;

typedef struct labelset {
	label *v;
	size_t n, cap;
	tm_buf arena;
	strtab index;   /* occ 1F lang 1F key -> first label + 1 */
	strtab keys;    /* lang 1F key -> first label + 1 (collisions) */
	strtab perocc;  /* occ 1F lang -> distinct label keys */
	strtab prefs;   /* occ 1F lang 1F key of the preferred labels */
	strtab lits;    /* occ 1F tag 1F text -> first label + 1 (repeats) */
	strtab preftag; /* occ 1F tag -> first preferred label + 1 */
	strtab prefocc; /* occ -> first preferred label + 1, any language */
	long empty, collisions;
	long repeats;   /* a literal given again, or with two kinds; a second
			 * preferred label in one language tag */
} labelset;

/* Reads path into ls.  Problems that leave the labels usable (a label
 * that normalises to nothing, the same key under two occupations, a row
 * given twice, one literal as two kinds, two preferred labels in one
 * language: SKOS allows neither) are reported on warn with file:line;
 * an unreadable file or a bad row (unknown kind, bad lang, missing
 * column, more fields than the header, invalid UTF-8) is an error: -1
 * with a message in err. */
int labels_read(labelset *ls, const char *path, normaliser *nm, FILE *warn, tm_buf *err);

/* The label of occ and lang with this key, or NULL. */
/* Is key the key of a preferred label of occ in lang? */
int labels_is_pref(const labelset *ls, const char *occ, size_t ol, const char *lang,
		   const char *key, size_t kl);

/* Distinct label keys of an occupation in a language. */
uint64_t labels_count(const labelset *ls, const char *occ, size_t ol, const char *lang);

const label *labels_find(const labelset *ls, const char *occ, size_t ol,
			 const char *lang, const char *key, size_t kl);

static inline const char *lab_str(const labelset *ls, uint32_t off)
{
	return ls->arena.data + off;
}

/* The label that names occ to a curator: its preferred label in lang
 * (a primary subtag such as "de", or a full tag), else its first
 * preferred label in the file's order, whatever the language; NULL when
 * the occupation has no preferred label. */
const label *labels_pref(const labelset *ls, const char *occ, size_t ol, const char *lang);

void labels_free(labelset *ls);

#endif

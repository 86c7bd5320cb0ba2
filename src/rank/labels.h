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
	strtab occs;    /* occ -> first label + 1 */
	long empty, collisions;
	long repeats;   /* a literal given again, or with two kinds; a second
			 * preferred label in one language tag */
} labelset;

/* At most this many messages of each kind of problem below (a label
 * that normalises to nothing, a key under two occupations, a repeat) are
 * written per file; the rest are counted and said in one line, so that
 * a large taxonomy's known overlaps do not bury the run's output. */
#define LABELS_WARN_MAX 10

/* Reads path into ls.  Problems that leave the labels usable (a label
 * that normalises to nothing, the same key under two occupations, a row
 * given twice, one literal as two kinds, two preferred labels in one
 * language: SKOS allows neither) are reported on warn with file:line;
 * an unreadable file or a bad row (unknown kind, bad lang, missing
 * column, more fields than the header, invalid UTF-8) is an error: -1
 * with a message in err. */
int labels_read(labelset *ls, const char *path, normaliser *nm, FILE *warn, tm_buf *err);

/* How the taxonomy's ids (often IRIs: http://example.org/occ/0001) meet
 * the postings' codes (occ/0001) when they are not written alike.  The
 * labels are then read under the postings' codes, so that every engine
 * and every output names an occupation as the counts do:
 *   - an --id-map file (TSV, columns code and concept found by name)
 *     gives each code its concept; a concept is looked up as written;
 *   - local: a concept not in the map is matched on its local name (the
 *     part after the last '#', else after the last '/'), against the
 *     local names of the codes in the counts (labels_idmap_code).
 * A concept that finds no code keeps its own id.  The map owns its
 * strings. */
typedef struct labels_idmap {
	int local;
	strtab codes;       /* the codes; count: the line of the map, or 0 */
	strtab concepts;    /* concept -> code entry + 1 (the map file) */
	strtab locals;      /* local name of a code -> code entry + 1 */
	long shared;        /* codes whose local name an earlier code had */
	uint32_t shared_a, shared_b; /* the first such pair: code entries */
} labels_idmap;

/* The local name of an id: after the last '#', else after the last '/'
 * (a trailing '/' ignored); the whole id when it has neither or nothing
 * follows them (never an empty name, which would meet others).  Returns
 * its start in id and its length in *len. */
const char *labels_local_name(const char *id, size_t n, size_t *len);

/* Reads a map file into m (zeroed or already holding codes).  Returns 0,
 * or -1 with "file:line: what" in err: a missing column, an empty code
 * or concept, a code given twice, a concept given to two codes. */
int labels_idmap_read(labels_idmap *m, const char *path, tm_buf *err);

/* A code of the counts, for matching on local names (m->local): 0, or
 * -1 when memory ran out. */
int labels_idmap_code(labels_idmap *m, const char *code, size_t n);

void labels_idmap_free(labels_idmap *m);

/* labels_read with each label's occupation put through map (NULL: none). */
int labels_read_mapped(labelset *ls, const char *path, normaliser *nm,
		       const labels_idmap *map, FILE *warn, tm_buf *err);

/* Does occ have any label? */
int labels_has_occ(const labelset *ls, const char *occ, size_t ol);

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

/* groups.h - which group each occupation belongs to, for overlap: from
 * skos:broader in a SKOS taxonomy, from a groups TSV, or from the first
 * characters of the occupation's code.
 *
 *   SKOS     an occupation's group is its broader concept (skos:broader
 *            with an IRI object, or skos:narrower from the group's
 *            side); one with several broader concepts is
 *            put in the byte-smallest of them, and they are counted.
 *   TSV      columns occupation, group, and optionally level (found by
 *            name); with a level column the rows of one level are used:
 *            the one asked for, else the finest (the one with the most
 *            groups; a tie to the byte-smaller name), at most
 *            GROUPS_MAX_LEVELS.  An occupation given two groups in one
 *            level is a bad row.
 *   prefix   the code is the occupation's id after its last '/', '#'
 *            or ':' (an IRI, a prefixed id) or the whole id; its first N characters name the
 *            group.  Asked for by the user only: codes do not always
 *            carry the structure.
 *
 * A groupmap owns its strings; groups_free releases it (and accepts a
 * zeroed one). */
#ifndef TM_GROUPS_H
#define TM_GROUPS_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "count/strtab.h"

#define GROUPS_MAX_LEVELS 16

typedef struct groupmap {
	strtab occ;       /* occupation -> group name's index in names + 1 */
	strtab names;     /* the groups */
	size_t prefix;    /* > 0: groups by code prefix of this many characters */
	long several;     /* SKOS: occupations with more than one broader concept */
	long skipped;     /* TSV: rows of other levels */
	int levels;       /* TSV: the levels of the file (0: no level column) */
	char level[64];   /* TSV: the level used (cut to 63 bytes) */
} groupmap;

/* Reads skos:broader from a SKOS file.  TM_OK, or a status with a
 * message naming file and line in err. */
int groups_read_skos(groupmap *g, const char *path, tm_buf *err);

/* Reads a groups TSV; level NULL or "" takes the finest level.
 * TM_OK, or a status with file:line in err. */
int groups_read_tsv(groupmap *g, const char *path, const char *level, tm_buf *err);

/* Groups by the first n characters (UTF-8) of the occupation's code. */
void groups_by_prefix(groupmap *g, size_t n);

/* The group of occ, or NULL when it has none; *gl its length.  The
 * pointer lives as long as g and occ. */
const char *groups_of(const groupmap *g, const char *occ, size_t ol, size_t *gl);

/* Does g hold any group (or is it a prefix grouping)? */
int groups_any(const groupmap *g);

void groups_free(groupmap *g);

#endif

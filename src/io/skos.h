/* skos.h - reading SKOS labels from Turtle or N-Triples; the only module
 * that knows serd.  skos:prefLabel, skos:altLabel and skos:hiddenLabel
 * literals with a language tag are handed to a callback, with the
 * concept's IRI as the occupation; the writer below writes them. */
#ifndef TM_SKOS_H
#define TM_SKOS_H

#include <stddef.h>

#include "core/buf.h"

typedef int (*skos_label_fn)(void *ctx, const char *occ, size_t ol, char kind,
			     const char *lang, size_t ll, const char *text, size_t tl);

/* The limits of the reader (README, "Bad input"):
 * - brackets "[" and "(" nested deeper than SKOS_MAX_DEPTH refuse the
 *   file with its line, before the parser (which recurses once per
 *   bracket) sees them; SKOS labels need a depth of one or two;
 * - a label literal longer than SKOS_MAX_LABEL bytes is skipped and
 *   counted (the parser never holds more than that much of any literal). */
#define SKOS_MAX_DEPTH 64
#define SKOS_MAX_LABEL 4096

/* Labels skipped, each with the line of the first one: labels of
 * blank-node subjects ("_:b1", "[ ... ]": a concept needs an IRI to be
 * an occupation) and labels longer than SKOS_MAX_LABEL bytes. */
typedef struct skos_skipped {
	long blank, blank_line;
	long toolong, toolong_line;
} skos_skipped;

/* Reads path (N-Triples when it ends in .nt, Turtle otherwise).  The
 * occupation handed to fn is the subject's IRI: prefixed names expanded,
 * relative IRIs resolved against @base or, before any @base, the file's
 * own location (file:///...).  sk (may be NULL) receives what was
 * skipped.  Returns TM_OK, or TM_EFAIL (err.h) with a message "file:line[:col]: what" in
 * err (a syntax error, nesting too deep, or what the callback refused). */
int skos_read(const char *path, skos_label_fn fn, void *ctx, skos_skipped *sk, tm_buf *err);
/* skos_read, and the number of statements read, labels or not, in
 * *statements. */
int skos_read_count(const char *path, skos_label_fn fn, void *ctx, skos_skipped *sk,
		    size_t *statements, tm_buf *err);

/* Does path name an RDF file this reader takes (.ttl, .turtle, .nt)? */
int skos_is_rdf_path(const char *path);

/* The skos:broader statements of path whose subject and object are both
 * IRIs (expanded and resolved as above), each handed to fn as the
 * concept and its broader concept, in the file's order; a skos:narrower
 * statement is handed over turned round (G narrower C: C broader G).  Returns as
 * skos_read. */
typedef int (*skos_broader_fn)(void *ctx, const char *occ, size_t ol, const char *broader,
			       size_t bl);
int skos_read_broader(const char *path, skos_broader_fn fn, void *ctx, tm_buf *err);

/* Writing labels as SKOS: Turtle (with the skos: prefix) or N-Triples,
 * appended to out (borrowed until skos_writer_end).  A comment line is
 * written as "# text".  kind is 'p', 'a' or 'h'.  Return TM_OK or TM_EFAIL (err.h); TM_EFAIL
 * also when a string could break out of its place (fieldcheck.h: an
 * IRI that is not of IRI characters, a tag that is not BCP 47, a
 * control character or line separator in a label or a comment), and
 * then nothing is written. */
typedef struct skos_writer skos_writer;
skos_writer *skos_writer_new(tm_buf *out, int ntriples);
int skos_write_label(skos_writer *w, const char *iri, char kind, const char *lang,
		     const char *text);
int skos_write_comment(skos_writer *w, const char *text);
/* Finishes the document and frees w (NULL is accepted). */
int skos_writer_end(skos_writer *w);

#endif

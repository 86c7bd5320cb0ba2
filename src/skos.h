/* skos.h - reading SKOS labels from Turtle or N-Triples; the only module
 * that knows serd.  skos:prefLabel, skos:altLabel and skos:hiddenLabel
 * literals with a language tag are handed to a callback, with the
 * concept's IRI as the occupation. */
#ifndef TM_SKOS_H
#define TM_SKOS_H

#include <stddef.h>

#include "buf.h"

typedef int (*skos_label_fn)(void *ctx, const char *occ, size_t ol, char kind,
			     const char *lang, size_t ll, const char *text, size_t tl);

/* Reads path (N-Triples when it ends in .nt, Turtle otherwise).  Returns
 * 0, or -1 with a message "file:line:col: what" in err (a syntax error,
 * or what the callback refused). */
int skos_read(const char *path, skos_label_fn fn, void *ctx, tm_buf *err);

#endif

/* htmlw.h - writing HTML text that no input can turn into markup.
 *
 * Every string from the inputs (titles, labels, occupation ids) reaches
 * a page through html_text, in element content or in a double-quoted
 * attribute value alike: & < > " ' become references; control
 * characters (C0 but TAB and LF, DEL, C1), the bidirectional controls
 * (U+061C, U+200E, U+200F, U+202A-U+202E, U+2066-U+2069), and ill-formed
 * UTF-8 become U+FFFD, so that no text can reorder or hide what follows
 * it.  Each function appends to b and returns buf_status(b). */
#ifndef TM_HTMLW_H
#define TM_HTMLW_H

#include <stddef.h>

#include "core/buf.h"

/* s[0..n) escaped; at most max code points when max > 0, then an
 * ellipsis (U+2026). */
int html_text(tm_buf *b, const char *s, size_t n, size_t max);

/* The NUL-terminated s escaped, whole. */
int html_str(tm_buf *b, const char *s);

/* How many code points html_text would write of s[0..n) (each
 * ill-formed byte counts as one). */
size_t html_width(const char *s, size_t n);

#endif

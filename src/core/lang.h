/* lang.h - BCP 47 language tags. */
#ifndef TM_LANG_H
#define TM_LANG_H

#include <stddef.h>

/* Checks a BCP 47 tag (a primary subtag of 2-3 letters, then subtags of
 * 1-8 letters or digits) and copies its primary subtag, lowercased, into
 * out (4 bytes).  Returns 0, or -1 when the tag is malformed.  A lenient
 * check for reading taxonomies and options; lang_wellformed is the
 * strict one. */
int lang_tag(const char *tag, char out[4]);

/* True when s[0..n) is a well-formed language tag by the grammar of
 * RFC 5646 section 2.1 (Language-Tag: a langtag, a private-use tag or
 * one of the grandfathered tags), letters in any case.  Syntax only: the
 * subtags are not looked up in the IANA registry. */
int lang_wellformed(const char *s, size_t n);

#endif

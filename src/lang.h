/* lang.h - BCP 47 language tags. */
#ifndef TM_LANG_H
#define TM_LANG_H

/* Checks a BCP 47 tag (a primary subtag of 2-3 letters, then subtags of
 * 1-8 letters or digits) and copies its primary subtag, lowercased, into
 * out (4 bytes).  Returns 0, or -1 when the tag is malformed. */
int lang_tag(const char *tag, char out[4]);

#endif

/* jsonw.h - writing JSON strings.  Input must be valid UTF-8 (it is, after
 * decode.h); quotes, backslashes and control characters are escaped. */
#ifndef TM_JSONW_H
#define TM_JSONW_H

#include <stddef.h>

#include "buf.h"

int json_str(tm_buf *b, const char *s, size_t n);
int json_key(tm_buf *b, const char *key); /* "key": */

#endif

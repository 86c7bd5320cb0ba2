/* jsonw.h - writing JSON.  Strings must be valid UTF-8 (they are, after
 * decode.h); quotes, backslashes and control characters are escaped.
 *
 * Each function appends to b and returns buf_status(b) (buf.h): TM_OK, or
 * TM_ENOMEM when this or any earlier append since the last reset failed.
 * A writer may append a whole object and check only the last status. */
#ifndef TM_JSONW_H
#define TM_JSONW_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

int json_str(tm_buf *b, const char *s, size_t n);
int json_key(tm_buf *b, const char *key); /* "key": */
/* ,"key":"s" (s a NUL-terminated string) */
int json_field(tm_buf *b, const char *key, const char *s);
int json_u64(tm_buf *b, uint64_t v);
/* v with four decimals; a value that is not finite is written 0.0000 */
int json_num(tm_buf *b, double v);

#endif

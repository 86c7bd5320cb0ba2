/* jsonr.h - reading one JSON object per line; the only module that knows
 * jansson.  A jr_doc owns its parse; strings returned point into it and
 * live until jr_free.  Duplicate keys are refused (a posting must not say
 * two things), as is nesting deeper than jansson's limit. */
#ifndef TM_JSONR_H
#define TM_JSONR_H

#include <stddef.h>

#include "core/buf.h"

typedef struct jr_doc jr_doc;

enum jr_type { JR_MISSING, JR_NULL, JR_STRING, JR_INT, JR_ARRAY, JR_OTHER, JR_REAL, JR_OBJECT };

/* Parses s[0..n) as one JSON object.  Returns the document, or NULL with
 * a message (and the column) in err. */
jr_doc *jr_parse(const char *s, size_t n, char *err, size_t errlen);
void jr_free(jr_doc *d);

enum jr_type jr_type(const jr_doc *d, const char *field);
/* The string value of field (or NULL): length in *n. */
const char *jr_str(const jr_doc *d, const char *field, size_t *n);
/* The integer value of field. */
long long jr_int(const jr_doc *d, const char *field);
/* Array field: its length, and its element i as a string (NULL if that
 * element is not a string). */
size_t jr_len(const jr_doc *d, const char *field);
const char *jr_elem_str(const jr_doc *d, const char *field, size_t i, size_t *n);

/* Values at any depth.  A jr_val is borrowed from its document and lives
 * until jr_free; NULL stands for "absent" and every function accepts it. */
typedef struct jr_val jr_val;
const jr_val *jr_root(const jr_doc *d);
const jr_val *jr_get(const jr_val *obj, const char *field); /* NULL if absent */
const jr_val *jr_at(const jr_val *arr, size_t i);
enum jr_type jr_vtype(const jr_val *v);
size_t jr_vlen(const jr_val *arr);
const char *jr_vstr(const jr_val *v, size_t *n); /* NULL unless a string */
long long jr_vint(const jr_val *v);               /* 0 unless an integer */
double jr_vnum(const jr_val *v);                  /* an integer or a real */
/* Appends v as compact JSON (keys in their order, reals to 15 significant
 * digits) to b.  Returns 0, or -1 when out of memory. */
int jr_dump(const jr_val *v, tm_buf *b);
/* Appends the members of object obj whose keys are not among the nskip
 * keys of skip, in their order, each as ,"key":value (compact, as
 * jr_dump).  Nothing for an absent or non-object value.  Returns 0, or
 * -1 when out of memory. */
int jr_dump_others(const jr_val *obj, const char *const *skip, size_t nskip, tm_buf *b);

#endif

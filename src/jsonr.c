/* jsonr.c - JSON object reading over jansson. */
#include "jsonr.h"

#include <jansson.h>
#include <stdio.h>
#include <stdlib.h>

struct jr_doc {
	json_t *root;
};

jr_doc *jr_parse(const char *s, size_t n, char *err, size_t errlen)
{
	json_error_t e;
	json_t *root = json_loadb(s, n, JSON_REJECT_DUPLICATES | JSON_ALLOW_NUL, &e);
	jr_doc *d;

	if (!root) {
		snprintf(err, errlen, "column %d: %s", e.column, e.text);
		return NULL;
	}
	if (!json_is_object(root)) {
		snprintf(err, errlen, "not a JSON object");
		json_decref(root);
		return NULL;
	}
	d = malloc(sizeof *d);
	if (!d) {
		snprintf(err, errlen, "out of memory");
		json_decref(root);
		return NULL;
	}
	d->root = root;
	return d;
}

void jr_free(jr_doc *d)
{
	if (!d)
		return;
	json_decref(d->root);
	free(d);
}

enum jr_type jr_type(const jr_doc *d, const char *field)
{
	json_t *v = json_object_get(d->root, field);
	if (!v)
		return JR_MISSING;
	if (json_is_null(v))
		return JR_NULL;
	if (json_is_string(v))
		return JR_STRING;
	if (json_is_integer(v))
		return JR_INT;
	if (json_is_array(v))
		return JR_ARRAY;
	return JR_OTHER;
}

const char *jr_str(const jr_doc *d, const char *field, size_t *n)
{
	json_t *v = json_object_get(d->root, field);
	if (!json_is_string(v))
		return NULL;
	*n = json_string_length(v);
	return json_string_value(v);
}

long long jr_int(const jr_doc *d, const char *field)
{
	return (long long)json_integer_value(json_object_get(d->root, field));
}

size_t jr_len(const jr_doc *d, const char *field)
{
	return json_array_size(json_object_get(d->root, field));
}

const char *jr_elem_str(const jr_doc *d, const char *field, size_t i, size_t *n)
{
	json_t *v = json_array_get(json_object_get(d->root, field), i);
	if (!json_is_string(v))
		return NULL;
	*n = json_string_length(v);
	return json_string_value(v);
}

/* jsonr.c - JSON object reading over jansson. */
#include "io/jsonr.h"

#include <jansson.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

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

static enum jr_type vtype(const json_t *v);

enum jr_type jr_type(const jr_doc *d, const char *field)
{
	return vtype(json_object_get(d->root, field));
}

static enum jr_type vtype(const json_t *v)
{
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
	if (json_is_real(v))
		return JR_REAL;
	if (json_is_object(v))
		return JR_OBJECT;
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

/* A jr_val is a json_t seen through an opaque name. */
const jr_val *jr_root(const jr_doc *d)
{
	return d ? (const jr_val *)d->root : NULL;
}

const jr_val *jr_get(const jr_val *obj, const char *field)
{
	return (const jr_val *)json_object_get((const json_t *)obj, field);
}

const jr_val *jr_at(const jr_val *arr, size_t i)
{
	return (const jr_val *)json_array_get((const json_t *)arr, i);
}

enum jr_type jr_vtype(const jr_val *v)
{
	return vtype((const json_t *)v);
}

size_t jr_vlen(const jr_val *arr)
{
	return json_array_size((const json_t *)arr);
}

const char *jr_vstr(const jr_val *v, size_t *n)
{
	const json_t *j = (const json_t *)v;
	if (!json_is_string(j))
		return NULL;
	*n = json_string_length(j);
	return json_string_value(j);
}

long long jr_vint(const jr_val *v)
{
	return (long long)json_integer_value((const json_t *)v);
}

double jr_vnum(const jr_val *v)
{
	return json_number_value((const json_t *)v);
}

static int dump_cb(const char *s, size_t n, void *b)
{
	return buf_append(b, s, n);
}

int jr_dump(const jr_val *v, tm_buf *b)
{
	if (!v)
		return buf_puts(b, "null");
	return json_dump_callback((const json_t *)v, dump_cb, b,
				  JSON_COMPACT | JSON_PRESERVE_ORDER | JSON_REAL_PRECISION(15) |
				  JSON_ENCODE_ANY) ? -1 : 0;
}

int jr_dump_others(const jr_val *obj, const char *const *skip, size_t nskip, tm_buf *b)
{
	json_t *o = (json_t *)obj;
	if (!json_is_object(o))
		return 0;
	for (void *it = json_object_iter(o); it; it = json_object_iter_next(o, it)) {
		const char *k = json_object_iter_key(it);
		size_t i = 0;
		while (i < nskip && strcmp(k, skip[i]))
			i++;
		if (i < nskip)
			continue;
		json_t *key = json_string(k);
		int bad = !key || buf_putc(b, ',') ||
			  json_dump_callback(key, dump_cb, b, JSON_ENCODE_ANY) || buf_putc(b, ':') ||
			  jr_dump((const jr_val *)json_object_iter_value(it), b);
		json_decref(key);
		if (bad)
			return -1;
	}
	return 0;
}

/* record.c - TSV and JSON Lines records from one field list. */
#include <stdio.h>
#include <string.h>

#include "io/jsonw.h"
#include "io/record.h"

void rec_init(rec *r, tm_buf *out, unsigned fmt, const rec_field *fields)
{
	memset(r, 0, sizeof *r);
	r->out = out;
	r->fmt = fmt;
	r->fields = fields;
}

static void chk(rec *r, int status)
{
	if (status)
		r->failed = 1;
}

int rec_header(rec *r)
{
	int n = 0;
	if (r->fmt != REC_TSV)
		return r->failed ? -1 : 0;
	for (const rec_field *f = r->fields; f->name; f++) {
		if (!(f->in & REC_TSV))
			continue;
		if (n++)
			chk(r, buf_putc(r->out, '\t'));
		chk(r, buf_puts(r->out, f->name));
	}
	chk(r, buf_putc(r->out, '\n'));
	return r->failed ? -1 : 0;
}

void rec_begin(rec *r)
{
	r->next = 0;
	r->written = r->list = r->items = r->skip = r->obj = r->cell = 0;
	if (r->fmt == REC_JSON)
		chk(r, buf_putc(r->out, '{'));
}

int rec_end(rec *r)
{
	if (r->list || r->obj || r->cell || r->fields[r->next].name)
		r->failed = 1;
	chk(r, buf_puts(r->out, r->fmt == REC_JSON ? "}\n" : "\n"));
	return r->failed ? -1 : 0;
}

/* Before a value: the separator, and in JSON the field's name.  Returns
 * whether the value is to be written in this format. */
static int start(rec *r)
{
	if (r->obj) {
		r->failed = 1;
		return 0;
	}
	if (r->list) {
		if (r->skip)
			return 0;
		if (r->items++)
			chk(r, r->fmt == REC_JSON ? buf_putc(r->out, ',') : buf_puts(r->out, r->sep));
		return 1;
	}
	const rec_field *f = &r->fields[r->next];
	if (!f->name) {
		r->failed = 1;
		return 0;
	}
	r->next++;
	if (!(f->in & r->fmt))
		return 0;
	if (r->written++)
		chk(r, buf_putc(r->out, r->fmt == REC_JSON ? ',' : '\t'));
	if (r->fmt == REC_JSON)
		chk(r, json_key(r->out, f->name));
	return 1;
}

/* TSV text: a TAB, LF or CR would break the table. */
static void tsv_text(rec *r, const char *s, size_t n)
{
	size_t from = 0;
	for (size_t i = 0; i < n; i++)
		if (s[i] == '\t' || s[i] == '\n' || s[i] == '\r') {
			chk(r, buf_append(r->out, s + from, i - from));
			chk(r, buf_putc(r->out, ' '));
			from = i + 1;
		}
	chk(r, buf_append(r->out, s + from, n - from));
}

static void put_u64(rec *r, uint64_t v)
{
	char s[32];
	snprintf(s, sizeof s, "%llu", (unsigned long long)v);
	chk(r, buf_puts(r->out, s));
}

static void put_num(rec *r, double v)
{
	char s[48];
	snprintf(s, sizeof s, "%.4f", v);
	chk(r, buf_puts(r->out, s));
}

void rec_str(rec *r, const char *s, size_t n)
{
	if (!start(r))
		return;
	if (r->fmt == REC_JSON)
		chk(r, json_str(r->out, n ? s : "", n));
	else
		tsv_text(r, s, n);
}

void rec_cstr(rec *r, const char *s)
{
	rec_str(r, s, strlen(s));
}

void rec_u64(rec *r, uint64_t v)
{
	if (start(r))
		put_u64(r, v);
}

void rec_num(rec *r, double v)
{
	if (start(r))
		put_num(r, v);
}

void rec_null(rec *r)
{
	if (start(r) && r->fmt == REC_JSON)
		chk(r, buf_puts(r->out, "null"));
}

void rec_true(rec *r)
{
	if (start(r))
		chk(r, buf_puts(r->out, "true"));
}

void rec_bool(rec *r, int v)
{
	if (start(r))
		chk(r, buf_puts(r->out, v ? "true" : "false"));
}

void rec_omit(rec *r)
{
	const rec_field *f = &r->fields[r->next];
	if (r->list || r->obj || !f->name) {
		r->failed = 1;
		return;
	}
	if (r->fmt == REC_TSV && (f->in & REC_TSV)) {
		start(r);
		return;
	}
	r->next++;
}

void rec_list_begin(rec *r, const char *tsv_sep)
{
	if (r->list) {
		r->failed = 1;
		return;
	}
	int on = start(r);
	r->list = 1;
	r->items = 0;
	r->skip = !on;
	r->sep = tsv_sep;
	if (on && r->fmt == REC_JSON)
		chk(r, buf_putc(r->out, '['));
}

void rec_list_end(rec *r)
{
	if (!r->list) {
		r->failed = 1;
		return;
	}
	if (!r->skip && r->fmt == REC_JSON)
		chk(r, buf_putc(r->out, ']'));
	r->list = r->skip = 0;
}

void rec_obj_begin(rec *r)
{
	if (r->fmt != REC_JSON || !start(r)) {
		r->failed = r->failed || r->fmt != REC_JSON;
		return;
	}
	r->obj = 1;
	r->members = 0;
	chk(r, buf_putc(r->out, '{'));
}

static int member(rec *r, const char *name)
{
	if (!r->obj) {
		r->failed = 1;
		return 0;
	}
	if (r->members++)
		chk(r, buf_putc(r->out, ','));
	chk(r, json_key(r->out, name));
	return 1;
}

void rec_member_str(rec *r, const char *name, const char *s, size_t n)
{
	if (member(r, name))
		chk(r, json_str(r->out, n ? s : "", n));
}

void rec_member_u64(rec *r, const char *name, uint64_t v)
{
	if (member(r, name))
		put_u64(r, v);
}

void rec_member_num(rec *r, const char *name, double v)
{
	if (member(r, name))
		put_num(r, v);
}

void rec_obj_end(rec *r)
{
	if (!r->obj) {
		r->failed = 1;
		return;
	}
	r->obj = 0;
	chk(r, buf_putc(r->out, '}'));
}

void rec_cell_begin(rec *r)
{
	if (r->fmt != REC_TSV || r->cell)
		r->failed = 1;
	else
		r->cell = start(r) ? 1 : -1;
}

void rec_cell_str(rec *r, const char *s, size_t n)
{
	if (!r->cell)
		r->failed = 1;
	else if (r->cell > 0)
		tsv_text(r, s, n);
}

void rec_cell_u64(rec *r, uint64_t v)
{
	if (!r->cell)
		r->failed = 1;
	else if (r->cell > 0)
		put_u64(r, v);
}

void rec_cell_end(rec *r)
{
	if (!r->cell)
		r->failed = 1;
	r->cell = 0;
}

void rec_cell_counted(rec *r, const char *s, size_t n, uint64_t v)
{
	rec_cell_begin(r);
	rec_cell_str(r, s, n);
	rec_cell_str(r, " (", 2);
	rec_cell_u64(r, v);
	rec_cell_str(r, ")", 1);
	rec_cell_end(r);
}

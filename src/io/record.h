/* record.h - one writer for records in TSV and in JSON Lines, from one
 * field list.
 *
 * A record type is a static array of rec_field ending with {NULL}: each
 * field's name and the formats it appears in.  The TSV header is the
 * names of the TSV fields; a JSON object has the fields in the same
 * order under the same names.  A record is written by calling one value
 * function per field of the list, in its order, whatever the format: a
 * field absent from the format is consumed and not written.  So the
 * layout of both formats lives in the list, and the code that fills a
 * record is written once.
 *
 * Values: text (escaped in JSON; in TSV a TAB, LF or CR becomes a space,
 * so a cell never shifts the columns), whole numbers, fixed-point
 * numbers with four decimals, null (JSON null, TSV empty), omitted (JSON:
 * no member; TSV: empty), lists (a JSON array; TSV items joined by a
 * separator).  A value that has another shape in each format (an object
 * in JSON, a short text in TSV) is written by the caller under
 * rec_is_json(), with rec_obj_* and rec_cell_*.
 *
 * Errors: the first failed write (out of memory) or a call that does not
 * follow the field list makes the writer fail; it stays failed, and
 * rec_end and rec_header return -1.  The output buffer belongs to the
 * caller; the writer holds only a pointer to it and the field list. */
#ifndef TM_RECORD_H
#define TM_RECORD_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"

enum { REC_TSV = 1, REC_JSON = 2, REC_BOTH = 3 };

typedef struct rec_field {
	const char *name;
	unsigned in;       /* REC_TSV, REC_JSON or REC_BOTH */
} rec_field;

typedef struct rec {
	tm_buf *out;
	unsigned fmt;              /* REC_TSV or REC_JSON */
	const rec_field *fields;
	size_t next;               /* the field the next value fills */
	int written;               /* fields written in this record */
	int list, items, skip;     /* inside a list: items so far; skip:
				    * the list's field is not in this format */
	int obj, members;          /* inside a JSON object, members so far */
	int cell;                  /* inside a TSV cell that is written */
	const char *sep;           /* TSV separator of the list's items */
	int failed;
} rec;

/* A writer of records of type fields in format fmt, appending to out. */
void rec_init(rec *r, tm_buf *out, unsigned fmt, const rec_field *fields);

static inline int rec_is_json(const rec *r) { return r->fmt == REC_JSON; }

/* TSV: the header line (the names of the TSV fields); JSON: nothing.
 * 0, or -1 when the writer failed. */
int rec_header(rec *r);

void rec_begin(rec *r);
/* Ends the record: 0, or -1 when a write failed or the values did not
 * fill the field list exactly (the record is then incomplete). */
int rec_end(rec *r);

/* One value: the next field of the list, or the next item of a list. */
void rec_str(rec *r, const char *s, size_t n);
void rec_cstr(rec *r, const char *s);
void rec_u64(rec *r, uint64_t v);
void rec_num(rec *r, double v);        /* "%.4f" */
void rec_null(rec *r);
void rec_omit(rec *r);                 /* fields only */
void rec_true(rec *r);                 /* JSON true (for flags written only when set) */
void rec_bool(rec *r, int v);          /* true or false, in both formats */

/* A list: items are values (or objects / cells) up to rec_list_end. */
void rec_list_begin(rec *r, const char *tsv_sep);
void rec_list_end(rec *r);

/* JSON only: an object as the next value, with named members. */
void rec_obj_begin(rec *r);
void rec_member_str(rec *r, const char *name, const char *s, size_t n);
void rec_member_u64(rec *r, const char *name, uint64_t v);
void rec_member_num(rec *r, const char *name, double v);
void rec_obj_end(rec *r);

/* TSV only: a value made of several pieces, as one cell. */
void rec_cell_begin(rec *r);
void rec_cell_str(rec *r, const char *s, size_t n);
void rec_cell_u64(rec *r, uint64_t v);
void rec_cell_end(rec *r);
/* TSV only: "TEXT (N)" as one cell, a name with its count. */
void rec_cell_counted(rec *r, const char *s, size_t n, uint64_t v);

#endif

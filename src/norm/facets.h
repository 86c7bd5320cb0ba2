/* facets.h - what norm prints of a cleaned title beside the title and
 * key: the facets (seniority, gender marker, locations, schedule,
 * hours, workload, pay, reference) and every removed piece, as one JSON
 * object per line (--json) or TAB-separated without a header (--facets).
 * Both formats come from one field list (record.h).
 *
 * The rules: seniority is the highest step named (a title that says both
 * "senior" and "lead" is lead); a schedule value said twice is listed
 * once in JSON; the TSV's last field lists the other removed pieces as
 * kind:text. */
#ifndef TM_FACETS_H
#define TM_FACETS_H

#include "core/buf.h"
#include "norm/norm.h"

/* Appends the JSON line of r to b: raw is the (repaired) raw title, lang
 * the titles' language or NULL.  0, or -1 when memory ran out. */
int facets_json(tm_buf *b, const char *raw, size_t rawn, const norm_result *r,
		const char *lang);

/* Appends the TSV line of r to b.  0, or -1 when memory ran out. */
int facets_tsv(tm_buf *b, const norm_result *r);

#endif

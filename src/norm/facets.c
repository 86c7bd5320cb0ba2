/* facets.c - the facets of a cleaned title, in JSON Lines or TSV. */
#include <string.h>

#include "norm/facets.h"
#include "io/record.h"

static const rec_field facet_fields[] = {
	{"raw", REC_JSON}, {"title", REC_BOTH}, {"key", REC_JSON}, {"lang", REC_JSON},
	{"seniority", REC_BOTH}, {"gender", REC_BOTH}, {"location", REC_BOTH},
	{"schedule", REC_BOTH}, {"hours", REC_JSON}, {"workload", REC_JSON}, {"pay", REC_BOTH},
	{"reference", REC_BOTH}, {"other", REC_TSV}, {"removed", REC_JSON},
	{"repaired", REC_JSON}, {NULL, 0},
};

/* Seniority: the highest step named. */
static const char *seniority(const norm_result *r)
{
	static const char *const scale[] = {"entry", "junior", "mid", "senior", "lead"};
	int best = -1;
	for (size_t i = 0; i < r->npiece; i++) {
		if (r->piece[i].kind != NF_SENIORITY || !r->piece[i].value)
			continue;
		for (int s = 0; s < 5; s++)
			if (!strcmp(r->piece[i].value, scale[s]) && s > best)
				best = s;
	}
	return best < 0 ? NULL : scale[best];
}

static int is_other(int kind)
{
	return kind == NF_MARKETING || kind == NF_EMPLOYER || kind == NF_DATE ||
	       kind == NF_EMAIL || kind == NF_PHONE || kind == NF_URL ||
	       kind == NF_HOURS || kind == NF_WORKLOAD || kind == NF_SLOT;
}

/* The pieces of one kind (their values where values is set and they
 * have one): a list; with once, a value said twice is listed once. */
static void list(rec *w, const norm_result *r, int kind, int values, int once,
		 const char *sep)
{
	rec_list_begin(w, sep);
	for (size_t i = 0; i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		if (p->kind != kind)
			continue;
		if (values && p->value) {
			int dup = 0;
			for (size_t j = 0; once && j < i; j++)
				if (r->piece[j].kind == kind && r->piece[j].value &&
				    !strcmp(r->piece[j].value, p->value))
					dup = 1;
			if (!dup)
				rec_cstr(w, p->value);
		} else
			rec_str(w, p->text, p->len);
	}
	rec_list_end(w);
}

/* The first piece of one kind, or null; in TSV all of them. */
static void first(rec *w, const norm_result *r, int kind)
{
	if (!rec_is_json(w)) {
		list(w, r, kind, 0, 0, "; ");
		return;
	}
	for (size_t i = 0; i < r->npiece; i++)
		if (r->piece[i].kind == kind) {
			rec_str(w, r->piece[i].text, r->piece[i].len);
			return;
		}
	rec_null(w);
}

static int facets(tm_buf *b, unsigned fmt, const char *raw, size_t rawn, const norm_result *r,
		  const char *lang)
{
	const char *sen = seniority(r);
	rec w;

	rec_init(&w, b, fmt, facet_fields);
	rec_begin(&w);
	rec_str(&w, raw, rawn);
	rec_str(&w, r->title, r->title_len);
	rec_str(&w, r->key, r->key_len);
	if (lang)
		rec_cstr(&w, lang);
	else
		rec_omit(&w);
	if (sen)
		rec_cstr(&w, sen);
	else
		rec_null(&w);
	first(&w, r, NF_GENDER);
	list(&w, r, NF_LOCATION, 0, 0, "; ");
	list(&w, r, NF_SCHEDULE, 1, rec_is_json(&w), ",");
	first(&w, r, NF_HOURS);
	first(&w, r, NF_WORKLOAD);
	first(&w, r, NF_PAY);
	first(&w, r, NF_REFERENCE);
	rec_list_begin(&w, "; ");
	for (size_t i = 0; !rec_is_json(&w) && i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		const char *k = nf_kind_name(p->kind);
		if (!is_other(p->kind))
			continue;
		rec_cell_begin(&w);
		rec_cell_str(&w, k, strlen(k));
		rec_cell_str(&w, ":", 1);
		rec_cell_str(&w, p->text, p->len);
		rec_cell_end(&w);
	}
	rec_list_end(&w);
	rec_list_begin(&w, NULL);
	for (size_t i = 0; rec_is_json(&w) && i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		const char *k = nf_kind_name(p->kind);
		rec_obj_begin(&w);
		rec_member_str(&w, "kind", k, strlen(k));
		rec_member_str(&w, "text", p->text, p->len);
		rec_obj_end(&w);
	}
	rec_list_end(&w);
	if (r->repaired)
		rec_true(&w);
	else
		rec_omit(&w);
	return rec_end(&w);
}

int facets_json(tm_buf *b, const char *raw, size_t rawn, const norm_result *r,
		const char *lang)
{
	return facets(b, REC_JSON, raw, rawn, r, lang);
}

int facets_tsv(tm_buf *b, const norm_result *r)
{
	return facets(b, REC_TSV, "", 0, r, NULL);
}

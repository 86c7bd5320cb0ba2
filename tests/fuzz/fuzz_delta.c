/* libFuzzer target: suggestions through add, accept and export, with the
 * exports read back.
 *
 * The input is records separated by 0x1e, each of fields separated by
 * 0x1f: occupation, lang, label, label_as_written, competitor, reviewer,
 * note, kind (its first byte mod 3: new_alt_label, new_hidden_label,
 * used_elsewhere); occupation, lang and label get a plain value when the
 * record is too short, label_as_written and competitor are left out when
 * missing or empty.  The first byte of the input is flags
 * (bit 0: --case clean).  Each record becomes a propose line, its bytes
 * escaped as JSON writes them, and goes through rq_add; what is taken is
 * accepted by its reviewer (or "fuzz" when the name is refused, as the
 * command refuses it) with its note.  Then the delta is written in the
 * three formats in memory, and read back:
 *
 * - the TSV with our TSV reader: one row per accepted suggestion, ten
 *   fields, each exactly what the suggestion and its decision hold;
 * - the Turtle and the N-Triples through serd: exactly one statement per
 *   accepted new label, each the suggestion's IRI, kind, tag and text.
 *
 * Taken suggestions must always export; a mismatch traps. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "review/delta.h"
#include "io/fieldcheck.h"
#include "review/review.h"
#include "review/review_change.h"
#include "io/skos.h"
#include "io/tsv.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

#define NF 8
#define MAXREC 64
static const char now[] = "2026-12-02T09:30:00Z";
static const char base[] = "http://data.valdoria.example/occupation/";

typedef struct field {
	const char *s;
	size_t n;
} field;

typedef struct rec {
	field f[NF];
	int has[NF];
	char id[17];
	int kind;         /* 0 alt, 1 hidden, 2 used_elsewhere */
	const char *reviewer, *note;
	int taken, seen_tsv, seen_rdf[2];
} rec;

#define CHECK(c)                                                                    \
	do {                                                                        \
		if (!(c)) {                                                         \
			fprintf(stderr, "fuzz_delta: %s:%d: %s\n", __FILE__, __LINE__, #c); \
			__builtin_trap();                                           \
		}                                                                   \
	} while (0)

static void json_field(tm_buf *b, const char *key, const char *s, size_t n)
{
	static const char hex[] = "0123456789abcdef";
	buf_puts(b, ",\"");
	buf_puts(b, key);
	buf_puts(b, "\":\"");
	for (size_t i = 0; i < n; i++) {
		unsigned char c = (unsigned char)s[i];
		if (c == '"' || c == '\\') {
			buf_putc(b, '\\');
			buf_putc(b, (char)c);
		} else if (c < 0x20) {
			char e[7] = {'\\', 'u', '0', '0', hex[c >> 4], hex[c & 15], 0};
			buf_puts(b, e);
		} else
			buf_putc(b, (char)c);
	}
	buf_putc(b, '"');
}

static int eq(const char *a, size_t an, const char *b)
{
	return an == strlen(b) && !memcmp(a, b, an);
}

static int eqn(const char *a, size_t an, const char *b, size_t bn)
{
	return an == bn && !memcmp(a, b, an);
}

/* the label the delta carries */
static const field *text_of(const rec *r, int clean)
{
	return !clean && r->has[3] ? &r->f[3] : &r->f[2];
}

/* an absolute IRI starts with a scheme and a colon */
static int has_scheme(const char *s, size_t n)
{
	static const char more[] = "abcdefghijklmnopqrstuvwxyzABCDEFGHIJKLMNOPQRSTUVWXYZ0123456789+-.";
	size_t k = 0;
	while (k < n && s[k] && strchr(more, s[k]))
		k++;
	return k && ((*s | 32) >= 'a' && (*s | 32) <= 'z') && k < n && s[k] == ':';
}

static rec recs[MAXREC];
static size_t nrec;
static int clean;

typedef struct rdf_ctx {
	int which;
	size_t labels;
} rdf_ctx;

static int on_label(void *c0, const char *occ, size_t ol, char kind, const char *lang, size_t ll,
		    const char *text, size_t tl)
{
	rdf_ctx *c = c0;
	c->labels++;
	for (size_t i = 0; i < nrec; i++) {
		rec *r = &recs[i];
		const field *t = text_of(r, clean);
		size_t bl = strlen(base);
		int iri_ok = has_scheme(r->f[0].s, r->f[0].n)
				     ? eqn(occ, ol, r->f[0].s, r->f[0].n)
				     : ol == bl + r->f[0].n && !memcmp(occ, base, bl) &&
					       !memcmp(occ + bl, r->f[0].s, r->f[0].n);
		if (r->taken && r->kind < 2 && !r->seen_rdf[c->which] && iri_ok &&
		    kind == (r->kind ? 'h' : 'a') && eqn(lang, ll, r->f[1].s, r->f[1].n) &&
		    eqn(text, tl, t->s, t->n)) {
			r->seen_rdf[c->which] = 1;
			return 0;
		}
	}
	CHECK(!"a label read back that no accepted suggestion gave");
	return -1;
}

static void write_file(const char *path, const tm_buf *b)
{
	FILE *fp = fopen(path, "wb");
	CHECK(fp);
	CHECK(!b->len || fwrite(b->data, 1, b->len, fp) == b->len);
	CHECK(fclose(fp) == 0);
}

static void check_tsv(const char *path, size_t ntaken)
{
	static const char *const cols[] = {"occupation", "kind", "lang", "label", "change",
					   "id", "reviewer", "decided_at", "note", "reason",
					   "occupation_label"};
	enum { NCOL = sizeof cols / sizeof *cols };
	tsv_reader t;
	int c[NCOL], r;
	size_t rows = 0;
	CHECK(tsv_open(&t, path) == 0);
	CHECK(t.nhead == NCOL);
	for (int k = 0; k < NCOL; k++)
		CHECK((c[k] = tsv_col(&t, cols[k])) == k);
	while ((r = tsv_next(&t)) == 1) {
		size_t n[NCOL];
		const char *f[NCOL];
		rows++;
		CHECK(!t.over && t.nfield == NCOL);
		for (int k = 0; k < NCOL; k++)
			f[k] = tsv_field(&t, k, &n[k]);
		rec *x = NULL;
		for (size_t i = 0; i < nrec && !x; i++)
			if (recs[i].taken && eq(f[5], n[5], recs[i].id))
				x = &recs[i];
		CHECK(x && !x->seen_tsv);
		x->seen_tsv = 1;
		const field *txt = text_of(x, clean);
		char reason[FC_OCC_MAX + 100];
		if (x->kind == 2) {
			const field *rv = &x->f[4];
			snprintf(reason, sizeof reason, "used elsewhere: %.*s has 2 of its 5 postings",
				 (int)(x->has[4] ? rv->n : strlen("another occupation")),
				 x->has[4] ? rv->s : "another occupation");
		} else
			reason[0] = 0;
		CHECK(eqn(f[0], n[0], x->f[0].s, x->f[0].n));
		CHECK(eq(f[1], n[1], x->kind == 1 ? "hidden" : "alt"));
		CHECK(eqn(f[2], n[2], x->f[1].s, x->f[1].n));
		CHECK(eqn(f[3], n[3], txt->s, txt->n));
		CHECK(eq(f[4], n[4], x->kind == 2 ? "review" : "add"));
		CHECK(eq(f[6], n[6], x->reviewer));
		CHECK(eq(f[7], n[7], now));
		CHECK(eq(f[8], n[8], x->note ? x->note : ""));
		CHECK(eq(f[9], n[9], reason));
	}
	CHECK(r == 0);
	CHECK(rows == ntaken);
	tsv_close(&t);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	static char dir[64];
	static char *owned[MAXREC * 2];
	size_t nowned = 0, ntaken = 0, nadd = 0;
	rq_queue q = {0};
	tm_buf line = {0}, err = {0}, msg = {0};

	if (size < 1)
		return 0;
	clean = data[0] & 1;
	if (!dir[0])
		snprintf(dir, sizeof dir, "/dev/shm/tm-fuzz-delta-%ld", (long)getpid());
	memset(recs, 0, sizeof recs);
	nrec = 0;
	/* records and fields */
	const char *p = (const char *)data + 1, *end = (const char *)data + size;
	while (p <= end && nrec < MAXREC) {
		const char *re = memchr(p, 0x1e, (size_t)(end - p));
		if (!re)
			re = end;
		rec *r = &recs[nrec];
		const char *f = p;
		for (int k = 0; k < NF && f <= re; k++) {
			const char *fe = memchr(f, 0x1f, (size_t)(re - f));
			if (!fe)
				fe = re;
			r->f[k].s = f;
			r->f[k].n = (size_t)(fe - f);
			r->has[k] = 1;
			f = fe + 1;
		}
		static const char *const plain[] = {"occ:1", "de", "koch", "Koch"};
		for (int k = 0; k < 4; k++)
			if (!r->has[k]) {
				r->f[k].s = plain[k];
				r->f[k].n = strlen(plain[k]);
				r->has[k] = k < 3;
			}
		r->has[3] = r->has[3] && r->f[3].n;
		r->has[4] = r->has[4] && r->f[4].n;
		r->kind = r->has[7] && r->f[7].n ? (unsigned char)r->f[7].s[0] % 3 : 0;
		snprintf(r->id, sizeof r->id, "%016zx", nrec);
		nrec++;
		p = re + 1;
	}
	/* add, then accept what was taken */
	for (size_t i = 0; i < nrec; i++) {
		static const char *const kinds[] = {"new_alt_label", "new_hidden_label", "used_elsewhere"};
		rec *r = &recs[i];
		rq_addstat st = {0};
		char why[FC_WHY];
		buf_reset(&line);
		buf_puts(&line, "{\"id\":\"");
		buf_puts(&line, r->id);
		buf_puts(&line, "\",\"kind\":\"");
		buf_puts(&line, kinds[r->kind]);
		buf_puts(&line, "\",\"score\":9,\"postings\":9,\"occupation_postings\":20,\"key_postings\":5");
		json_field(&line, "occupation", r->f[0].s, r->f[0].n);
		json_field(&line, "lang", r->f[1].s, r->f[1].n);
		json_field(&line, "label", r->f[2].s, r->f[2].n);
		if (r->has[3])
			json_field(&line, "label_as_written", r->f[3].s, r->f[3].n);
		if (r->kind == 2 && r->has[4]) {
			buf_puts(&line, ",\"competitor\":{\"postings\":2");
			json_field(&line, "occupation", r->f[4].s, r->f[4].n);
			buf_putc(&line, '}');
		} else if (r->kind == 2)
			buf_puts(&line, ",\"competitor\":{\"postings\":2}");
		buf_putc(&line, '}');
		CHECK(!line.len || !memchr(line.data, '\n', line.len));
		if (rq_add(&q, line.data, line.len, "fuzz:1", now, 3, &st, &err) != 0) {
			CHECK(err.len && st.added == 0);
			continue;
		}
		CHECK(st.added == 1);
		r->taken = 1;
		ntaken++;
		nadd += r->kind < 2;
		/* the reviewer and note as the command takes them */
		char *who = r->has[5] ? strndup(r->f[5].s, r->f[5].n) : NULL;
		char *note = r->has[6] && r->f[6].n ? strndup(r->f[6].s, r->f[6].n) : NULL;
		CHECK((!r->has[5] || who) && (!r->has[6] || !r->f[6].n || note));
		if (who && (memchr(r->f[5].s, 0, r->f[5].n) || fc_name(who, strlen(who), why)))
			free(who), who = NULL;
		if (note && (memchr(r->f[6].s, 0, r->f[6].n) || fc_note(note, strlen(note), why)))
			free(note), note = NULL;
		r->reviewer = who ? who : "fuzz";
		r->note = note;
		if (who)
			owned[nowned++] = who;
		if (note)
			owned[nowned++] = note;
		rq_item *it = rq_find(&q, r->id, 16, &(int){0});
		int outcome = -1;
		CHECK(it && rq_decide(it, 0, r->reviewer, r->note, now, 0, &outcome, &msg) == TM_OK &&
		      outcome == RD_APPLIED);
	}
	/* export in the three formats, read back */
	char path[96];
	tm_buf out = {0};
	dl_opts o = {DL_TSV, -1, base, clean};
	CHECK(dl_export(&q, &o, &out, &err) == 0 || (fprintf(stderr, "%s\n", err.data), 0));
	snprintf(path, sizeof path, "%s.tsv", dir);
	write_file(path, &out);
	check_tsv(path, ntaken);
	for (int which = 0; which < 2; which++) {
		rdf_ctx c = {which, 0};
		size_t statements;
		buf_reset(&out);
		o.format = which ? DL_NTRIPLES : DL_TURTLE;
		CHECK(dl_export(&q, &o, &out, &err) == 0 || (fprintf(stderr, "%s\n", err.data), 0));
		snprintf(path, sizeof path, "%s.%s", dir, which ? "nt" : "ttl");
		write_file(path, &out);
		if (skos_read_count(path, on_label, &c, NULL, &statements, &err) != 0) {
			fprintf(stderr, "fuzz_delta: %s does not read back: %s\n", path, err.data);
			CHECK(0);
		}
		CHECK(statements == nadd && c.labels == nadd);
	}
	for (size_t i = 0; i < nrec; i++)
		CHECK(!recs[i].taken || recs[i].seen_tsv);
	if (getenv("FUZZ_DELTA_SAY")) /* what a seed reaches */
		fprintf(stderr, "fuzz_delta: %zu suggestions, %zu taken, %zu new labels\n", nrec,
			ntaken, nadd);
	for (size_t i = 0; i < nowned; i++)
		free(owned[i]);
	buf_free(&out);
	buf_free(&line);
	buf_free(&err);
	buf_free(&msg);
	rq_free(&q);
	return 0;
}

/* chunk.c - the chunks of a load: digest and byte format (see chunk.h). */
#include "count/chunk.h"

#include <stdio.h>
#include <string.h>

#include "core/digest.h"

uint64_t chunk_hash(const char *s, size_t n)
{
	return dg_fnv(s, n);
}

void chunk_digest_start(uint64_t dg[2], int kind)
{
	dg[0] = 0x84222325CBF29CE4ULL;
	dg[1] = 0x9E3779B97F4A7C15ULL;
	if (kind != PERIOD_NONE) {
		dg[0] = chunk_mix(dg[0], 0x7E110D00u + (unsigned)kind);
		dg[1] = chunk_mix(dg[1] ^ 0x7E110D, (uint64_t)kind);
	}
}

void chunk_digest_posting(uint64_t dg[2], const posting *p)
{
	const char *fv[4] = {p->id ? p->id : "", p->lang, p->title, p->date ? p->date : ""};
	size_t fl[4] = {p->id ? p->idlen : 0, strlen(p->lang), p->titlelen, p->date ? p->datelen : 0};
	for (int f = 0; f < 4; f++) {
		uint64_t h = chunk_hash(fv[f], fl[f]);
		dg[0] = chunk_mix(dg[0], h ^ (uint64_t)f);
		dg[1] = chunk_mix(dg[1] ^ 0x5555, h + fl[f]);
	}
	for (size_t q = 0; q < p->nocc; q++) {
		uint64_t h = chunk_hash(p->occ[q], p->occlen[q]);
		dg[0] = chunk_mix(dg[0], h);
		dg[1] = chunk_mix(dg[1] ^ 0xAAAA, h + q);
	}
	dg[1] = chunk_mix(dg[1], p->id ? 1 : 2);
}

void chunk_digest_next(uint64_t dg[2])
{
	dg[0] = chunk_mix(dg[0], 0x1234);
}

int chunk_run_digest(chunk_run *r, const uint64_t dg[2], uint64_t out[2])
{
	size_t i;
	out[0] = dg[0];
	out[1] = dg[1];
	if (st_add(&r->seen, (const char *)dg, 2 * sizeof *dg, 1, &i) < 0)
		return -1;
	uint64_t k = r->seen.ent[i].count - 1;
	if (k) {
		out[0] = chunk_mix(out[0] ^ 0xC0FFEE, k);
		out[1] = chunk_mix(out[1], k * 0x9E3779B97F4A7C15ULL);
	}
	return 0;
}

void chunk_run_free(chunk_run *r)
{
	st_free(&r->seen);
}

void chunk_hex(const uint64_t dg[2], char out[33])
{
	snprintf(out, 33, "%016llx%016llx", (unsigned long long)dg[0], (unsigned long long)dg[1]);
}

int chunk_unhex(const char *s, size_t n, uint64_t dg[2])
{
	if (n != 32)
		return -1;
	dg[0] = dg[1] = 0;
	for (size_t i = 0; i < 32; i++) {
		unsigned c = (unsigned char)s[i], v;
		if (c >= '0' && c <= '9')
			v = c - '0';
		else if (c >= 'a' && c <= 'f')
			v = c - 'a' + 10;
		else
			return -1;
		dg[i / 16] = dg[i / 16] << 4 | v;
	}
	return 0;
}

int chunk_put_str(tm_buf *b, const char *s, size_t n)
{
	uint32_t l = (uint32_t)n;
	return buf_append(b, &l, sizeof l) || buf_append(b, s, n) ? -1 : 0;
}

const char *chunk_get_str(const char **pos, size_t *n)
{
	uint32_t l;
	memcpy(&l, *pos, sizeof l);
	*pos += sizeof l;
	const char *s = *pos;
	*pos += l;
	*n = l;
	return s;
}

/* Writes the framed string s[0..n) at d; returns the end. */
static char *put_at(char *d, const char *s, size_t n)
{
	uint32_t l = (uint32_t)n;
	memcpy(d, &l, sizeof l);
	if (n)
		memcpy(d + sizeof l, s, n);
	return d + sizeof l + n;
}

int chunk_put(tm_buf *b, const tally_posting *p, const char *label, size_t n)
{
	/* the record's size first, so the buffer grows at most once and
	 * each field is one copy */
	uint32_t nocc = (uint32_t)p->nocc;
	size_t idl = p->id ? p->idlen : 0, ll = strlen(p->lang);
	size_t need = 7 * sizeof nocc + 1 + idl + ll + p->keylen + p->titlelen + p->examplelen + n;
	for (size_t i = 0; i < p->nocc; i++)
		need += sizeof nocc + p->occlen[i];
	if (buf_reserve(b, need + 1))
		return -1;
	char *d = put_at(b->data + b->len, p->id ? p->id : "", idl);
	*d++ = p->id ? 1 : 0;
	d = put_at(d, p->lang, ll);
	d = put_at(d, p->key, p->keylen);
	d = put_at(d, p->title, p->titlelen);
	d = put_at(d, p->example, p->examplelen);
	d = put_at(d, label, n);
	memcpy(d, &nocc, sizeof nocc);
	d += sizeof nocc;
	for (size_t i = 0; i < p->nocc; i++)
		d = put_at(d, p->occ[i], p->occlen[i]);
	b->len += need;
	b->data[b->len] = 0;
	return 0;
}

/* The framed string at *pos, checked against end: 0, or -1. */
static int get_checked(const char **pos, const char *end, const char **s, size_t *n)
{
	uint32_t l;
	if ((size_t)(end - *pos) < sizeof l)
		return -1;
	memcpy(&l, *pos, sizeof l);
	*pos += sizeof l;
	if ((size_t)(end - *pos) < l)
		return -1;
	*s = *pos;
	*n = l;
	*pos += l;
	return 0;
}

int chunk_next(const char **pos, const char *end, chunk_rec *rec)
{
	const char *p = *pos, *id, *lang;
	size_t idl, ll;
	uint32_t nocc;

	if (p >= end)
		return 0;
	memset(&rec->p, 0, sizeof rec->p);
	if (get_checked(&p, end, &id, &idl) || p >= end || (unsigned char)*p > 1)
		return -1;
	rec->p.id = *p++ ? id : NULL;
	rec->p.idlen = rec->p.id ? idl : 0;
	if (get_checked(&p, end, &lang, &ll) || get_checked(&p, end, &rec->p.key, &rec->p.keylen) ||
	    get_checked(&p, end, &rec->p.title, &rec->p.titlelen) ||
	    get_checked(&p, end, &rec->p.example, &rec->p.examplelen) ||
	    get_checked(&p, end, &rec->period, &rec->periodlen) || rec->periodlen >= PERIOD_MAX ||
	    (size_t)(end - p) < sizeof nocc)
		return -1;
	memcpy(&nocc, p, sizeof nocc);
	p += sizeof nocc;
	if (nocc > PR_MAXOCC)
		return -1;
	for (uint32_t k = 0; k < nocc; k++)
		if (get_checked(&p, end, &rec->occ[k], &rec->occlen[k]))
			return -1;
	memset(rec->lang, 0, sizeof rec->lang);
	memcpy(rec->lang, lang, ll < 3 ? ll : 3);
	rec->p.lang = rec->lang;
	rec->p.occ = rec->occ;
	rec->p.occlen = rec->occlen;
	rec->p.nocc = nocc;
	*pos = p;
	return 1;
}

int chunk_valid(const char *b, size_t n)
{
	const char *end = b + n;
	chunk_rec rec;
	int r;
	while ((r = chunk_next(&b, end, &rec)) == 1)
		;
	return r == 0;
}

/* acro.c - acronym keys and the acronym table (acro.h states them). */
#include <stdlib.h>
#include <string.h>

#include "core/buf.h"
#include "core/err.h"
#include "count/strtab.h"
#include "match/acro.h"

static int is_sep(unsigned char c)
{
	return c < 0x80 && !((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
			     (c >= '0' && c <= '9'));
}

size_t acro_words(const char *key, size_t n, const char **w, size_t *wl, size_t max)
{
	size_t k = 0, i = 0;
	while (i < n && k < max) {
		while (i < n && is_sep((unsigned char)key[i]))
			i++;
		size_t b = i;
		while (i < n && !is_sep((unsigned char)key[i]))
			i++;
		if (i > b) {
			w[k] = key + b;
			wl[k++] = i - b;
		}
	}
	return k;
}

/* Bytes of the code point starting s[0..n) (1 for a stray byte). */
static size_t cp_len(const char *s, size_t n)
{
	unsigned char c = (unsigned char)s[0];
	size_t l = c < 0x80 ? 1 : c >= 0xF0 ? 4 : c >= 0xE0 ? 3 : c >= 0xC0 ? 2 : 1;
	return l <= n ? l : 1;
}

static size_t cp_count(const char *s, size_t n)
{
	size_t k = 0;
	for (size_t i = 0; i < n; i += cp_len(s + i, n - i))
		k++;
	return k;
}

static size_t put(acro_key *out, size_t k, const char *a, size_t al, size_t first, size_t nw)
{
	for (size_t i = 0; i < k; i++)
		if (out[i].len == al && !memcmp(out[i].a, a, al))
			return k;
	memcpy(out[k].a, a, al);
	out[k].len = (uint8_t)al;
	out[k].first = (uint8_t)first;
	out[k].nw = (uint8_t)nw;
	return k + 1;
}

size_t acro_keys(const char *key, size_t n, acro_key *out)
{
	const char *w[ACRO_WORDS];
	size_t wl[ACRO_WORDS], k = 0;
	size_t nw = acro_words(key, n, w, wl, ACRO_WORDS);

	for (size_t f = 0; f < nw; f++)
		for (size_t e = f + 1; e < nw; e++) {
			char all[ACRO_BYTES * 2], lng[ACRO_BYTES * 2];
			size_t al = 0, ll = 0, na = 0, nl = 0;
			if (e - f + 1 > ACRO_WORDS)
				break;
			for (size_t i = f; i <= e; i++) {
				size_t c = cp_len(w[i], wl[i]);
				if (na < ACRO_MAX) {
					memcpy(all + al, w[i], c);
					al += c;
				}
				na++;
				if (cp_count(w[i], wl[i]) > ACRO_SHORT) {
					if (nl < ACRO_MAX) {
						memcpy(lng + ll, w[i], c);
						ll += c;
					}
					nl++;
				}
			}
			if (na <= ACRO_MAX)
				k = put(out, k, all, al, f, e - f + 1);
			if (nl >= ACRO_MIN && nl < na && nl <= ACRO_MAX)
				k = put(out, k, lng, ll, f, e - f + 1);
		}
	return k;
}

int acro_shape(const char *word, size_t n)
{
	if (n < ACRO_MIN || n > ACRO_MAX)
		return 0;
	for (size_t i = 0; i < n; i++) {
		unsigned char c = (unsigned char)word[i];
		if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z')))
			return 0;
	}
	return 1;
}

/* How much of the document's words and of the query's words an acronym
 * run explains: the run's words and the words the two share outside it
 * (the query's acronym word qa excluded), as a share of each side. */
double acro_fit(const char *const *qw, const size_t *qwl, size_t nq, size_t qa,
		       const char *key, size_t kl, const acro_ent *r)
{
	const char *dw[ACRO_WORDS];
	size_t dwl[ACRO_WORDS], nd = acro_words(key, kl, dw, dwl, ACRO_WORDS);
	size_t dx = r->nw, qx = 1;
	for (size_t i = 0; i < nd; i++) {
		if (i >= r->first && i < (size_t)r->first + r->nw)
			continue;
		for (size_t j = 0; j < nq; j++)
			if (j != qa && qwl[j] == dwl[i] && !memcmp(qw[j], dw[i], dwl[i])) {
				dx++;
				break;
			}
	}
	for (size_t j = 0; j < nq; j++) {
		if (j == qa)
			continue;
		for (size_t i = 0; i < nd; i++)
			if ((i < r->first || i >= (size_t)r->first + r->nw) && qwl[j] == dwl[i] &&
			    !memcmp(qw[j], dw[i], dwl[i])) {
				qx++;
				break;
			}
	}
	return (double)dx / (double)(nd ? nd : 1) * (double)qx / (double)nq;
}

/* ---- the table ---- */

typedef struct tmp_ent { uint32_t id; acro_ent e; } tmp_ent;

struct acro_index {
	strtab acro;    /* acronym -> id */
	strtab words;
	tmp_ent *tmp;
	size_t ntmp, captmp;
	size_t *start;  /* id -> its runs in ent; acro.n + 1 entries */
	acro_ent *ent;
	double chance[ACRO_MAX + 1];
};

acro_index *acro_new(void)
{
	return calloc(1, sizeof(acro_index));
}

void acro_free(acro_index *a)
{
	if (!a)
		return;
	st_free(&a->acro);
	st_free(&a->words);
	free(a->tmp);
	free(a->start);
	free(a->ent);
	free(a);
}

int acro_add(acro_index *a, uint32_t doc, const char *key, size_t n)
{
	acro_key k[ACRO_KEYS_MAX];
	size_t idx;
	size_t nk = acro_keys(key, n, k);

	for (size_t i = 0; i < n;) { /* every word, not only the first ACRO_WORDS */
		const char *w;
		size_t wl;
		if (!acro_words(key + i, n - i, &w, &wl, 1))
			break;
		if (st_add(&a->words, w, wl, 0, &idx) < 0)
			return TM_ENOMEM;
		i = (size_t)(w - key) + wl;
	}
	for (size_t i = 0; i < nk; i++) {
		if (st_add(&a->acro, k[i].a, k[i].len, 0, &idx) < 0 || idx >= UINT32_MAX)
			return TM_ENOMEM;
		if (a->ntmp == a->captmp) {
			tmp_ent *v = tm_grow(a->tmp, &a->captmp, a->ntmp + 1, sizeof *v, 256);
			if (!v)
				return TM_ENOMEM;
			a->tmp = v;
		}
		a->tmp[a->ntmp++] = (tmp_ent){(uint32_t)idx, {doc, k[i].first, k[i].nw}};
	}
	return TM_OK;
}

/* Counting sort by acronym: the runs of one acronym keep the order they
 * were added in (documents rising). */
int acro_finish(acro_index *a)
{
	size_t na = a->acro.n;
	a->start = calloc(na + 1, sizeof *a->start);
	a->ent = malloc((a->ntmp ? a->ntmp : 1) * sizeof *a->ent);
	size_t *fill = malloc((na ? na : 1) * sizeof *fill);
	if (!a->start || !a->ent || !fill) {
		free(fill);
		return TM_ENOMEM;
	}
	for (size_t i = 0; i < a->ntmp; i++)
		a->start[a->tmp[i].id + 1]++;
	for (size_t i = 0; i < na; i++)
		a->start[i + 1] += a->start[i];
	memcpy(fill, a->start, na * sizeof *fill);
	for (size_t i = 0; i < a->ntmp; i++)
		a->ent[fill[a->tmp[i].id]++] = a->tmp[i].e;
	free(fill);
	free(a->tmp);
	a->tmp = NULL;
	size_t by[ACRO_MAX + 1] = {0};
	for (size_t i = 0; i < na; i++) {
		size_t n;
		const char *s = st_key(&a->acro, i, &n);
		if (acro_shape(s, n))
			by[n]++;
	}
	for (size_t n = ACRO_MIN, all = 26 * 26; n <= ACRO_MAX; n++, all *= 26)
		a->chance[n] = by[n] >= all ? 1.0 : (double)by[n] / (double)all;
	a->ntmp = a->captmp = 0;
	return TM_OK;
}

const acro_ent *acro_find(const acro_index *a, const char *s, size_t n, size_t *cnt)
{
	long id = st_find(&a->acro, s, n);
	*cnt = 0;
	if (id < 0 || !a->start)
		return NULL;
	*cnt = a->start[id + 1] - a->start[id];
	return a->ent + a->start[id];
}

int acro_is_word(const acro_index *a, const char *s, size_t n)
{
	return st_find(&a->words, s, n) >= 0;
}

size_t acro_bytes(const acro_index *a)
{
	return st_bytes(&a->acro) + st_bytes(&a->words) +
	       (a->acro.n + 1) * sizeof *a->start +
	       (a->start ? a->start[a->acro.n] : 0) * sizeof *a->ent;
}

double acro_chance(const acro_index *a, size_t n)
{
	return n >= ACRO_MIN && n <= ACRO_MAX ? a->chance[n] : 0;
}

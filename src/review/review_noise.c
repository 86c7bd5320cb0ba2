/* review_noise.c - the words that rejections as noise share. */
#include "review/review_noise.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "core/lang.h"
#include "count/strtab.h"
#include "review/review_int.h"
#include "review/review_json.h"

typedef struct nw {
	const char *k;  /* lang 1F word, in the counts table (no insert after) */
	size_t kl;
	uint64_t items;
} nw;

static int cmp_nw(const void *a, const void *b)
{
	const nw *x = a, *y = b;
	if (x->items != y->items)
		return x->items > y->items ? -1 : 1;
	int c = memcmp(x->k, y->k, x->kl < y->kl ? x->kl : y->kl);
	return c ? c : (x->kl > y->kl) - (x->kl < y->kl);
}

/* Calls each(word, len, arg) for the words of s[0..n), split at spaces;
 * a word repeated in s is given once. */
static int words(const char *s, size_t n, int (*each)(const char *, size_t, void *), void *arg)
{
	for (size_t i = 0; i < n;) {
		while (i < n && s[i] == ' ')
			i++;
		size_t j = i;
		while (j < n && s[j] != ' ')
			j++;
		int again = 0;
		for (size_t k = 0; k < i && !again;) { /* the same word earlier? */
			size_t e = k;
			while (e < i && s[e] != ' ')
				e++;
			again = e - k == j - i && j > i && !memcmp(s + k, s + i, j - i);
			k = e + 1;
		}
		if (j > i && !again && each(s + i, j - i, arg))
			return TM_ENOMEM;
		i = j;
	}
	return TM_OK;
}

static int add_known(const char *w, size_t n, void *t)
{
	return st_add(t, w, n, 1, NULL) < 0;
}

typedef struct counting {
	strtab *counts;
	const char *lang;
	tm_buf b;
} counting;

static int add_count(const char *w, size_t n, void *a0)
{
	counting *a = a0;
	buf_reset(&a->b);
	if (buf_puts(&a->b, a->lang) || buf_putc(&a->b, '\x1F') || buf_append(&a->b, w, n))
		return -1;
	return st_add(a->counts, a->b.data, a->b.len, 1, NULL) < 0;
}

static int is_noise(const rq_item *it)
{
	const rq_event *d = rq_last_decision(it);
	return it->status == RQ_REJECTED && d && d->noise;
}

int rq_noise_words(const rq_queue *q, const labelset *ls, uint64_t floor,
		   int (*cb)(const rq_noise_word *w, void *arg), void *arg)
{
	strtab known = {0}, counts = {0}, per_lang = {0};
	counting c = {&counts, NULL, {0}};
	nw *v = NULL;
	size_t nv = 0;
	int rc = TM_ENOMEM;

	for (size_t i = 0; ls && i < ls->n; i++)
		if (words(lab_str(ls, ls->v[i].key), ls->v[i].keylen, add_known, &known))
			goto done;
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if (it->status != RQ_ACCEPTED && !is_noise(it))
			continue;
		char *k = rqi_item_key(it), prim[4];
		if (!k)
			goto done;
		if (lang_tag(it->lang, prim) != 0)
			snprintf(prim, sizeof prim, "%.3s", it->lang);
		c.lang = prim;
		int bad = it->status == RQ_ACCEPTED ? words(k, strlen(k), add_known, &known)
			  : words(k, strlen(k), add_count, &c) || st_add(&per_lang, prim, strlen(prim), 1, NULL) < 0;
		free(k);
		if (bad)
			goto done;
	}
	if (!(v = malloc((counts.n + 1) * sizeof *v)))
		goto done;
	for (size_t i = 0; i < counts.n; i++) {
		size_t n;
		const char *s = st_key(&counts, i, &n);
		const char *w = memchr(s, '\x1F', n);
		if (counts.ent[i].count < floor || st_find(&known, w + 1, n - (size_t)(w + 1 - s)) >= 0)
			continue;
		v[nv++] = (nw){s, n, counts.ent[i].count};
	}
	tm_qsort(v, nv, sizeof *v, cmp_nw);
	rc = TM_OK;
	for (size_t i = 0; i < nv && !rc; i++) {
		size_t n = v[i].kl;
		const char *s = v[i].k;
		const char *w = memchr(s, '\x1F', n);
		char lang[8], word[600];
		snprintf(lang, sizeof lang, "%.*s", (int)(w - s), s);
		snprintf(word, sizeof word, "%.*s", (int)(n - (size_t)(w + 1 - s)), w + 1);
		long pl = st_find(&per_lang, lang, strlen(lang));
		rq_noise_word x = {lang, word, v[i].items, pl >= 0 ? per_lang.ent[pl].count : 0};
		rc = cb(&x, arg);
	}
done:
	free(v);
	st_free(&known);
	st_free(&counts);
	st_free(&per_lang);
	buf_free(&c.b);
	return rc;
}

/* labkeys.c - the labels' keys by occupation, language and key
 * (labkeys.h).  One sort of the labels, then a pass that keeps the first
 * label of each key. */
#include <stdlib.h>
#include <string.h>

#include "rank/labkeys.h"

int labkeys_cmp(const char *a, size_t an, const char *b, size_t bn)
{
	int c = memcmp(a, b, an < bn ? an : bn);
	if (c)
		return c;
	return an < bn ? -1 : an > bn;
}

/* qsort has no context argument: the labelset being sorted. */
typedef struct lk_item {
	const labelset *ls;
	uint32_t lab;
} lk_item;

static int cmp_group(const labelset *ls, const label *x, const char *occ, size_t ol,
		     const char *lang)
{
	int c = labkeys_cmp(lab_str(ls, x->occ), x->occlen, occ, ol);
	return c ? c : strcmp(x->lang, lang);
}

static int cmp_item(const void *a, const void *b)
{
	const lk_item *p = a, *q = b;
	const labelset *ls = p->ls;
	const label *x = &ls->v[p->lab], *y = &ls->v[q->lab];
	int c = cmp_group(ls, x, lab_str(ls, y->occ), y->occlen, y->lang);
	if (!c)
		c = labkeys_cmp(lab_str(ls, x->key), x->keylen, lab_str(ls, y->key), y->keylen);
	return c ? c : (p->lab < q->lab ? -1 : p->lab > q->lab);
}

int labkeys_build(labkeys *lk, const labelset *ls)
{
	lk_item *it = malloc((ls->n ? ls->n : 1) * sizeof *it);
	memset(lk, 0, sizeof *lk);
	lk->v = malloc((ls->n ? ls->n : 1) * sizeof *lk->v);
	if (!it || !lk->v) {
		free(it);
		labkeys_free(lk);
		return -1;
	}
	for (size_t i = 0; i < ls->n; i++)
		it[i] = (lk_item){ls, (uint32_t)i};
	if (ls->n > 1)
		tm_qsort(it, ls->n, sizeof *it, cmp_item);
	for (size_t i = 0; i < ls->n; i++) {
		const label *x = &ls->v[it[i].lab];
		if (lk->n) {
			labkey *last = &lk->v[lk->n - 1];
			const label *y = &ls->v[last->lab];
			if (!cmp_group(ls, x, lab_str(ls, y->occ), y->occlen, y->lang) &&
			    !labkeys_cmp(lab_str(ls, x->key), x->keylen, lab_str(ls, y->key),
					 y->keylen)) {
				last->pref |= x->kind == 'p';
				continue;
			}
		}
		lk->v[lk->n++] = (labkey){it[i].lab, x->kind == 'p'};
	}
	free(it);
	return 0;
}

void labkeys_group(const labkeys *lk, const labelset *ls, const char *occ, size_t ol,
		   const char *lang, size_t *lo, size_t *hi)
{
	size_t a = 0, b = lk->n;
	while (a < b) { /* the first entry not before the group */
		size_t mid = a + (b - a) / 2;
		if (cmp_group(ls, &ls->v[lk->v[mid].lab], occ, ol, lang) < 0)
			a = mid + 1;
		else
			b = mid;
	}
	*lo = a;
	b = lk->n;
	while (a < b) { /* the first entry after it */
		size_t mid = a + (b - a) / 2;
		if (cmp_group(ls, &ls->v[lk->v[mid].lab], occ, ol, lang) <= 0)
			a = mid + 1;
		else
			b = mid;
	}
	*hi = a;
}

void labkeys_free(labkeys *lk)
{
	free(lk->v);
	memset(lk, 0, sizeof *lk);
}

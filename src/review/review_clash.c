/* review_clash.c - a label accepted under a key that another occupation
 * already has. */
#include "review/review_clash.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "core/lang.h"
#include "count/strtab.h"
#include "review/review_int.h"
#include "review/review_json.h"

/* The first two occupations that hold a key. */
typedef struct holder {
	char *occ, *text, *from; /* from: NULL for the taxonomy, else the item's id */
	char *name;              /* the occupation's preferred label, or NULL */
	char kind;
} holder;

typedef struct slot2 {
	holder h[2];
	int n;
} slot2;

struct rq_clashes {
	strtab keys; /* lang 1F key -> entry index = slot index */
	slot2 *v;
	size_t cap;
	tm_buf b;
};

static int join(tm_buf *b, const char *lang, const char *key, size_t kl)
{
	char prim[4];
	buf_reset(b);
	if (lang_tag(lang, prim) != 0)
		snprintf(prim, sizeof prim, "%.3s", lang);
	return buf_puts(b, prim) || buf_putc(b, '\x1F') || buf_append(b, key, kl);
}

static int hold(rq_clashes *c, const char *lang, const char *key, size_t kl, const char *occ,
		size_t ol, const char *text, size_t tl, char kind, const char *from, const char *name)
{
	size_t idx;
	/* room first: a key is never in the table without its slot */
	slot2 *v = tm_grow(c->v, &c->cap, c->keys.n + 1, sizeof *v, 64);
	if (!v)
		return TM_ENOMEM;
	c->v = v;
	int fresh = join(&c->b, lang, key, kl) ? -1 : st_add(&c->keys, c->b.data, c->b.len, 0, &idx);
	if (fresh < 0)
		return TM_ENOMEM;
	if (fresh)
		memset(&v[idx], 0, sizeof v[idx]);
	slot2 *s = &v[idx];
	for (int i = 0; i < s->n; i++)
		if (strlen(s->h[i].occ) == ol && !memcmp(s->h[i].occ, occ, ol))
			return TM_OK;
	if (s->n == 2)
		return TM_OK;
	holder *h = &s->h[s->n];
	if (!(h->occ = tm_dupn(occ, ol)) || !(h->text = tm_dupn(text, tl)) ||
	    (from && !(h->from = strdup(from))) || (name && !(h->name = strdup(name))))
		return TM_ENOMEM;
	h->kind = kind;
	s->n++;
	return TM_OK;
}

static int adds_label(const rq_item *it)
{
	return it->status != RQ_NSTATUS && it->kind < RK_N && rq_kind_delta[it->kind] != 'r';
}

int rq_clash_note(rq_clashes *c, const rq_item *it)
{
	if (!adds_label(it))
		return TM_OK;
	char *k = rqi_item_key(it);
	int rc = k ? hold(c, it->lang, k, strlen(k), it->occ, strlen(it->occ), it->label,
			  strlen(it->label), rq_kind_delta[it->kind], it->id, it->brief.occ_label)
		   : TM_ENOMEM;
	free(k);
	return rc;
}

rq_clashes *rq_clashes_new(const labelset *ls, const rq_queue *q)
{
	rq_clashes *c = calloc(1, sizeof *c);
	if (!c)
		return NULL;
	for (size_t i = 0; ls && i < ls->n; i++) {
		const label *lb = &ls->v[i];
		const label *pref = labels_pref(ls, lab_str(ls, lb->occ), lb->occlen, lb->lang);
		if (hold(c, lb->lang, lab_str(ls, lb->key), lb->keylen, lab_str(ls, lb->occ), lb->occlen,
			 lab_str(ls, lb->text), lb->textlen, lb->kind, NULL,
			 pref ? lab_str(ls, pref->text) : NULL))
			goto oom;
	}
	for (size_t i = 0; i < q->n; i++)
		if (q->it[i].status == RQ_ACCEPTED && rq_clash_note(c, &q->it[i]))
			goto oom;
	return c;
oom:
	rq_clashes_free(c);
	return NULL;
}

int rq_clash_find(rq_clashes *c, const rq_item *it, int *clash, tm_buf *msg)
{
	*clash = 0;
	buf_reset(msg);
	if (!adds_label(it))
		return TM_OK;
	char *k = rqi_item_key(it);
	if (!k || join(&c->b, it->lang, k, strlen(k))) {
		free(k);
		return TM_ENOMEM;
	}
	long at = st_find(&c->keys, c->b.data, c->b.len);
	const slot2 *s = at >= 0 ? &c->v[at] : NULL;
	for (int i = 0; s && i < s->n && !*clash; i++) {
		const holder *h = &s->h[i];
		if (!strcmp(h->occ, it->occ))
			continue;
		*clash = 1;
		buf_puts(msg, "the key '");
		buf_puts(msg, k);
		buf_puts(msg, "' is already ");
		buf_puts(msg, h->kind == 'p' ? "the preferred" : h->kind == 'a' ? "an alternative" : "a hidden");
		buf_puts(msg, " label '");
		buf_puts(msg, h->text);
		buf_puts(msg, "' of ");
		buf_puts(msg, h->occ);
		if (h->name && strcmp(h->name, h->text)) {
			buf_puts(msg, " '");
			buf_puts(msg, h->name);
			buf_puts(msg, "'");
		}
		if (h->from) {
			buf_puts(msg, " (accepted in the queue as ");
			buf_puts(msg, h->from);
			buf_puts(msg, ")");
		} else
			buf_puts(msg, " in the taxonomy");
	}
	free(k);
	return buf_status(msg) ? TM_ENOMEM : TM_OK;
}

void rq_clashes_free(rq_clashes *c)
{
	if (!c)
		return;
	for (size_t i = 0; i < c->keys.n; i++)
		for (int k = 0; k < c->v[i].n; k++) {
			free(c->v[i].h[k].occ);
			free(c->v[i].h[k].text);
			free(c->v[i].h[k].from);
			free(c->v[i].h[k].name);
		}
	free(c->v);
	st_free(&c->keys);
	buf_free(&c->b);
	free(c);
}

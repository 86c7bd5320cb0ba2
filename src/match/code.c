/* code.c - postings without an occupation coded by their best match. */
#include <stdlib.h>
#include <string.h>

#include "core/err.h"
#include "match/code.h"
#include "match/match.h"

void mc_init(match_coder *c)
{
	memset(c, 0, sizeof *c);
}

void mc_free(match_coder *c)
{
	free(c->v);
	buf_free(&c->arena);
	memset(c, 0, sizeof *c);
}

static size_t put(match_coder *c, const char *s, size_t n)
{
	size_t off = c->arena.len;
	buf_append(&c->arena, s ? s : "", n);
	return off;
}

int mc_hold(match_coder *c, const posting *p, const char *name)
{
	if (c->n == c->cap) {
		mc_held *v = tm_grow(c->v, &c->cap, c->n + 1, sizeof *v, 64);
		if (!v)
			return TM_ENOMEM;
		c->v = v;
	}
	mc_held *h = &c->v[c->n];
	size_t fl = strlen(name);
	if (p->idlen > UINT32_MAX || p->datelen > UINT32_MAX || p->titlelen > UINT32_MAX ||
	    fl > UINT32_MAX)
		return TM_ENOMEM;
	h->has_id = p->id != NULL;
	h->id = put(c, p->id, p->idlen);
	h->idlen = (uint32_t)p->idlen;
	h->date = put(c, p->date, p->datelen);
	h->datelen = (uint32_t)p->datelen;
	h->title = put(c, p->title, p->titlelen);
	h->titlelen = (uint32_t)p->titlelen;
	h->file = put(c, name, fl + 1);
	h->filelen = (uint32_t)fl;
	memcpy(h->lang, p->lang, sizeof h->lang);
	h->line = p->line;
	if (buf_status(&c->arena))
		return TM_ENOMEM;
	c->n++;
	return TM_OK;
}

int mc_code(match_coder *c, const labelset *ls, tally_mem *m, normaliser *nm,
	    double min_score, store *st, tm_buf *err)
{
	match_conf conf = {MATCH_SIM_MIN_POSTINGS};
	match_index *ix = NULL;
	match_work *w = NULL;
	int rc;

	if (!c->n)
		return TM_OK;
	if ((rc = match_build(&ix, ls, m, &conf, err)) != TM_OK)
		return rc;
	if (!(w = match_work_new(ix))) {
		match_free(ix);
		return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
	}
	for (size_t i = 0; i < c->n && rc == TM_OK; i++) {
		const mc_held *h = &c->v[i];
		const char *a = c->arena.data;
		const char *lang = strcmp(h->lang, "und") ? h->lang : NULL;
		const match_cand *cand;
		size_t nc;
		norm_result res;
		posting p;
		tally_posting tp;

		if (norm_title(nm, a + h->title, h->titlelen, lang, &res) != 0 ||
		    match_find(ix, w, res.key, res.key_len, lang, 1, min_score, &cand, &nc) != TM_OK) {
			rc = tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
			break;
		}
		memset(&p, 0, sizeof p);
		p.id = h->has_id ? a + h->id : NULL;
		p.idlen = h->idlen;
		p.date = a + h->date;
		p.datelen = h->datelen;
		p.title = a + h->title;
		p.titlelen = h->titlelen;
		memcpy(p.lang, h->lang, sizeof p.lang);
		p.line = h->line;
		if (nc) {
			p.occ[0] = cand[0].occ;
			p.occlen[0] = cand[0].ol;
			p.nocc = 1;
		}
		/* the result borrowed from nm stays valid: nothing is cleaned
		 * between here and the feed */
		tally_posting_of(&tp, &p, &res);
		if (store_feed(st, &p, &tp, a + h->file, h->line) != 0) {
			rc = tm_fail(err, TM_EFAIL, NULL, st->err.data ? st->err.data : "store", NULL);
			break;
		}
		if (nc)
			c->coded++;
		else
			c->uncoded++;
	}
	match_work_free(w);
	match_free(ix);
	return rc;
}

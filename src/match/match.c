/* match.c - the match index and its queries (match.h states the scoring). */
#include <stdlib.h>
#include <string.h>

#include "core/err.h"
#include "match/acro.h"
#include "match/match.h"
#include "match/sim.h"
#include "rank/stats.h"

typedef struct mlabel {
	uint32_t occ, off, len;
	char lang[4];
} mlabel;

typedef struct mcount {
	uint32_t occ, lang;
	uint64_t n;
} mcount;

typedef struct mtotal {
	uint32_t lang;
	uint64_t n;
} mtotal;

struct match_index {
	strtab occs, langs;
	strtab docs;            /* key -> entry; documents are ranked by key */
	uint32_t *rank;         /* entry -> document */
	uint32_t *entry;        /* document -> entry */
	size_t ndoc;
	size_t *lstart, *cstart, *tstart; /* per document, n + 1 entries */
	mlabel *lab;
	mcount *cnt;
	mtotal *tot;
	tm_buf text;            /* the labels as written */
	strtab compact;         /* compact key -> group */
	uint32_t *group;        /* document -> group */
	size_t *gstart;         /* group -> its documents in gdoc */
	uint32_t *gdoc;
	sim_index *sim;
	uint32_t *simdoc;       /* similarity document -> document */
	acro_index *acro;       /* acronyms of the searched documents */
};

struct match_work {
	const match_index *ix;
	sim_work *sw;
	int32_t *slot;          /* occupation -> index in cand, or -1 */
	match_cand *cand;
	size_t ncand, capcand;
	const match_cand **out;
	size_t capout;
	match_cand *top;        /* the answer, best first */
	size_t captop;
	uint64_t *kocc;         /* occupation -> postings of the loaded key */
	uint32_t *ktouch;
	size_t nktouch;
	uint64_t kn;            /* postings of the loaded key */
	sim_hit hits[MATCH_SIM_HITS];
	tm_buf cbuf;
	struct acro_occ { /* the acronym path's occupations, best run each */
		uint32_t occ;
		double fit, ev;
		const char *text, *lang;
		size_t len;
		uint64_t k, n;
	} aocc[MATCH_ACRO_RUNS];
};

const char *match_via_name(match_via v)
{
	switch (v) {
	case VIA_LABEL: return "label";
	case VIA_VARIANT: return "variant";
	case VIA_TITLE: return "title";
	case VIA_SIMILAR: return "similar";
	case VIA_ACRONYM: return "acronym";
	}
	return "";
}

/* ---- building ---- */

typedef struct tmp_lab { uint32_t e; mlabel l; } tmp_lab;
typedef struct tmp_cnt { uint32_t e; mcount c; } tmp_cnt;
typedef struct tmp_tot { uint32_t e; mtotal t; } tmp_tot;
typedef struct keyref { const char *p; uint32_t len, e; } keyref;

typedef struct builder {
	tmp_lab *lab;
	size_t nlab, caplab;
	tmp_cnt *cnt;
	size_t ncnt, capcnt;
	tmp_tot *tot;
	size_t ntot, captot;
	const uint32_t *rank;
} builder;

static int cmp_keyref(const void *a, const void *b)
{
	const keyref *x = a, *y = b;
	size_t n = x->len < y->len ? x->len : y->len;
	int c = memcmp(x->p, y->p, n);
	if (c)
		return c;
	return (x->len > y->len) - (x->len < y->len);
}

static int cmp_u32p(uint32_t a, uint32_t b)
{
	return (a > b) - (a < b);
}

/* Sorting the temporary rows by document needs the ranks: they are put
 * into each row's e before sorting (see rank_rows). */
static int cmp_tmp_lab(const void *a, const void *b)
{
	const tmp_lab *x = a, *y = b;
	int c = cmp_u32p(x->e, y->e);
	return c ? c : cmp_u32p(x->l.occ, y->l.occ) ? cmp_u32p(x->l.occ, y->l.occ)
						     : cmp_u32p(x->l.off, y->l.off);
}

static int cmp_tmp_cnt(const void *a, const void *b)
{
	const tmp_cnt *x = a, *y = b;
	int c = cmp_u32p(x->e, y->e);
	if (c)
		return c;
	c = cmp_u32p(x->c.occ, y->c.occ);
	return c ? c : cmp_u32p(x->c.lang, y->c.lang);
}

static int cmp_tmp_tot(const void *a, const void *b)
{
	const tmp_tot *x = a, *y = b;
	int c = cmp_u32p(x->e, y->e);
	return c ? c : cmp_u32p(x->t.lang, y->t.lang);
}

static int intern(strtab *t, const char *s, size_t n, uint32_t *id)
{
	size_t i;
	if (st_add(t, s, n, 0, &i) < 0 || i >= UINT32_MAX)
		return TM_ENOMEM;
	*id = (uint32_t)i;
	return TM_OK;
}

#define GROW(arr, n, cap) do { \
	void *g_ = tm_grow((arr), &(cap), (n) + 1, sizeof *(arr), 256); \
	if (!g_) return TM_ENOMEM; \
	(arr) = g_; } while (0)

static int add_labels(match_index *ix, builder *b, const labelset *ls)
{
	for (size_t i = 0; i < ls->n; i++) {
		const label *lb = &ls->v[i];
		tmp_lab t;
		if (!lb->keylen)
			continue;
		if (intern(&ix->docs, lab_str(ls, lb->key), lb->keylen, &t.e) ||
		    intern(&ix->occs, lab_str(ls, lb->occ), lb->occlen, &t.l.occ))
			return TM_ENOMEM;
		if (ix->text.len > UINT32_MAX - lb->textlen)
			return TM_ENOMEM;
		t.l.off = (uint32_t)ix->text.len;
		t.l.len = lb->textlen;
		if (buf_append(&ix->text, lab_str(ls, lb->text), lb->textlen))
			return TM_ENOMEM;
		memcpy(t.l.lang, lb->lang, sizeof t.l.lang);
		t.l.lang[3] = 0;
		GROW(b->lab, b->nlab, b->caplab);
		b->lab[b->nlab++] = t;
	}
	return TM_OK;
}

/* The fields of a joined key (0x1F between them): up to max of them. */
static size_t split_us(const char *s, size_t n, const char **f, size_t *fl, size_t max)
{
	size_t k = 0, b = 0;
	for (size_t i = 0; i <= n && k < max; i++)
		if (i == n || s[i] == 0x1F) {
			f[k] = s + b;
			fl[k++] = i - b;
			b = i + 1;
		}
	return k;
}

static int add_counts(match_index *ix, builder *b, tally_mem *m)
{
	const char *f[4];
	size_t fl[4];
	char last[2][64]; /* the last occupation and language, with their ids */
	size_t lastl[2] = {SIZE_MAX, SIZE_MAX};
	uint32_t lastid[2] = {0, 0};

	for (size_t i = 0; i < m->forms.n; i++) {
		size_t n;
		const char *s = st_key(&m->forms, i, &n);
		tmp_cnt t;
		if (split_us(s, n, f, fl, 4) < 3 || !fl[2])
			continue;
		/* the forms of one occupation and language often follow each other */
		for (int k = 0; k < 2; k++)
			if (fl[k] != lastl[k] || memcmp(f[k], last[k], fl[k])) {
				if (intern(k ? &ix->langs : &ix->occs, f[k], fl[k], &lastid[k]))
					return TM_ENOMEM;
				lastl[k] = fl[k] <= sizeof last[k] ? fl[k] : SIZE_MAX;
				if (lastl[k] != SIZE_MAX)
					memcpy(last[k], f[k], fl[k]);
			}
		t.c.occ = lastid[0];
		t.c.lang = lastid[1];
		if (intern(&ix->docs, f[2], fl[2], &t.e))
			return TM_ENOMEM;
		t.c.n = m->forms.ent[i].count;
		GROW(b->cnt, b->ncnt, b->capcnt);
		b->cnt[b->ncnt++] = t;
	}
	for (size_t i = 0; i < m->keys.n; i++) {
		size_t n;
		const char *s = st_key(&m->keys, i, &n);
		tmp_tot t;
		if (split_us(s, n, f, fl, 2) < 2 || !fl[1])
			continue;
		if (intern(&ix->langs, f[0], fl[0], &t.t.lang) ||
		    intern(&ix->docs, f[1], fl[1], &t.e))
			return TM_ENOMEM;
		t.t.n = m->keys.ent[i].count;
		GROW(b->tot, b->ntot, b->captot);
		b->tot[b->ntot++] = t;
	}
	return TM_OK;
}

/* Ranks the documents by key bytes. */
static int rank_docs(match_index *ix)
{
	size_t n = ix->docs.n;
	keyref *k = malloc((n ? n : 1) * sizeof *k);
	ix->rank = malloc((n ? n : 1) * sizeof *ix->rank);
	ix->entry = malloc((n ? n : 1) * sizeof *ix->entry);
	if (!k || !ix->rank || !ix->entry) {
		free(k);
		return TM_ENOMEM;
	}
	for (size_t i = 0; i < n; i++) {
		size_t len;
		k[i].p = st_key(&ix->docs, i, &len);
		k[i].len = (uint32_t)len;
		k[i].e = (uint32_t)i;
	}
	tm_qsort(k, n, sizeof *k, cmp_keyref);
	for (size_t r = 0; r < n; r++) {
		ix->rank[k[r].e] = (uint32_t)r;
		ix->entry[r] = k[r].e;
	}
	free(k);
	ix->ndoc = n;
	return TM_OK;
}

/* CSR starts of rows sorted by document: start[d] .. start[d + 1]. */
static size_t *starts(size_t ndoc, const void *rows, size_t nrows, size_t size)
{
	size_t *s = calloc(ndoc + 1, sizeof *s);
	if (!s)
		return NULL;
	for (size_t i = 0; i < nrows; i++)
		s[*(const uint32_t *)((const char *)rows + i * size) + 1]++;
	for (size_t d = 0; d < ndoc; d++)
		s[d + 1] += s[d];
	return s;
}

/* Sorts n rows of size bytes, each starting with its document number
 * (uint32_t, below ndoc), by document and then by cmp: a counting sort by
 * document, then cmp within each document's few rows.  *rows is replaced.
 * TM_OK or TM_ENOMEM. */
static int sort_by_doc(void **rows, size_t n, size_t size, size_t ndoc,
		       int (*cmp)(const void *, const void *))
{
	size_t *start = starts(ndoc, *rows, n, size);
	char *to = malloc((n ? n : 1) * size);
	if (!start || !to) {
		free(start);
		free(to);
		return TM_ENOMEM;
	}
	const char *from = *rows;
	for (size_t i = 0; i < n; i++) {
		uint32_t d = *(const uint32_t *)(from + i * size);
		memcpy(to + start[d]++ * size, from + i * size, size);
	}
	/* start[d] is now the end of document d's rows */
	for (size_t d = 0, b = 0; d < ndoc; b = start[d++])
		if (start[d] - b > 1)
			tm_qsort(to + b * size, start[d] - b, size, cmp);
	free(start);
	free(*rows);
	*rows = to;
	return TM_OK;
}

static int build_rows(match_index *ix, builder *b)
{
	size_t i, k;

	for (i = 0; i < b->nlab; i++)
		b->lab[i].e = ix->rank[b->lab[i].e];
	for (i = 0; i < b->ncnt; i++)
		b->cnt[i].e = ix->rank[b->cnt[i].e];
	for (i = 0; i < b->ntot; i++)
		b->tot[i].e = ix->rank[b->tot[i].e];
	void *rows[3] = {b->lab, b->cnt, b->tot};
	int rc = sort_by_doc(&rows[0], b->nlab, sizeof *b->lab, ix->ndoc, cmp_tmp_lab);
	b->lab = rows[0];
	if (!rc)
		rc = sort_by_doc(&rows[1], b->ncnt, sizeof *b->cnt, ix->ndoc, cmp_tmp_cnt);
	b->cnt = rows[1];
	if (!rc)
		rc = sort_by_doc(&rows[2], b->ntot, sizeof *b->tot, ix->ndoc, cmp_tmp_tot);
	b->tot = rows[2];
	if (rc)
		return rc;
	/* one row per (document, occupation, language): forms of one key add up */
	for (i = k = 0; i < b->ncnt; i++) {
		if (k && b->cnt[k - 1].e == b->cnt[i].e && b->cnt[k - 1].c.occ == b->cnt[i].c.occ &&
		    b->cnt[k - 1].c.lang == b->cnt[i].c.lang)
			b->cnt[k - 1].c.n += b->cnt[i].c.n;
		else
			b->cnt[k++] = b->cnt[i];
	}
	b->ncnt = k;
	for (i = k = 0; i < b->ntot; i++) {
		if (k && b->tot[k - 1].e == b->tot[i].e && b->tot[k - 1].t.lang == b->tot[i].t.lang)
			b->tot[k - 1].t.n += b->tot[i].t.n;
		else
			b->tot[k++] = b->tot[i];
	}
	b->ntot = k;
	ix->lstart = starts(ix->ndoc, b->lab, b->nlab, sizeof *b->lab);
	ix->cstart = starts(ix->ndoc, b->cnt, b->ncnt, sizeof *b->cnt);
	ix->tstart = starts(ix->ndoc, b->tot, b->ntot, sizeof *b->tot);
	ix->lab = malloc((b->nlab ? b->nlab : 1) * sizeof *ix->lab);
	ix->cnt = malloc((b->ncnt ? b->ncnt : 1) * sizeof *ix->cnt);
	ix->tot = malloc((b->ntot ? b->ntot : 1) * sizeof *ix->tot);
	if (!ix->lstart || !ix->cstart || !ix->tstart || !ix->lab || !ix->cnt || !ix->tot)
		return TM_ENOMEM;
	for (i = 0; i < b->nlab; i++)
		ix->lab[i] = b->lab[i].l;
	for (i = 0; i < b->ncnt; i++)
		ix->cnt[i] = b->cnt[i].c;
	for (i = 0; i < b->ntot; i++)
		ix->tot[i] = b->tot[i].t;
	return TM_OK;
}

/* The compact key of s: without spaces and ASCII punctuation. */
static int compact_key(tm_buf *out, const char *s, size_t n)
{
	buf_reset(out);
	for (size_t i = 0; i < n; i++) {
		unsigned char c = (unsigned char)s[i];
		if (c < 0x80 && !((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
				  (c >= '0' && c <= '9')))
			continue;
		buf_putc(out, (char)c);
	}
	return buf_status(out);
}

static int build_groups(match_index *ix)
{
	tm_buf c = {0};
	ix->group = malloc((ix->ndoc ? ix->ndoc : 1) * sizeof *ix->group);
	if (!ix->group)
		return TM_ENOMEM;
	for (size_t d = 0; d < ix->ndoc; d++) {
		size_t n;
		const char *s = st_key(&ix->docs, ix->entry[d], &n);
		if (compact_key(&c, s, n) || intern(&ix->compact, c.data ? c.data : "", c.len,
						    &ix->group[d])) {
			buf_free(&c);
			return TM_ENOMEM;
		}
	}
	buf_free(&c);
	size_t ng = ix->compact.n;
	ix->gstart = calloc(ng + 1, sizeof *ix->gstart);
	ix->gdoc = malloc((ix->ndoc ? ix->ndoc : 1) * sizeof *ix->gdoc);
	size_t *fill = malloc((ng ? ng : 1) * sizeof *fill);
	if (!ix->gstart || !ix->gdoc || !fill) {
		free(fill);
		return TM_ENOMEM;
	}
	for (size_t d = 0; d < ix->ndoc; d++)
		ix->gstart[ix->group[d] + 1]++;
	for (size_t g = 0; g < ng; g++)
		ix->gstart[g + 1] += ix->gstart[g];
	memcpy(fill, ix->gstart, ng * sizeof *fill);
	for (size_t d = 0; d < ix->ndoc; d++)
		ix->gdoc[fill[ix->group[d]]++] = (uint32_t)d;
	free(fill);
	return TM_OK;
}

static uint64_t doc_postings(const match_index *ix, size_t d)
{
	uint64_t n = 0;
	for (size_t i = ix->tstart[d]; i < ix->tstart[d + 1]; i++)
		n += ix->tot[i].n;
	return n;
}

static int build_sim(match_index *ix, const match_conf *conf)
{
	size_t ns = 0;
	if (!(ix->sim = sim_new()) || !(ix->acro = acro_new()))
		return TM_ENOMEM;
	ix->simdoc = malloc((ix->ndoc ? ix->ndoc : 1) * sizeof *ix->simdoc);
	if (!ix->simdoc)
		return TM_ENOMEM;
	for (size_t d = 0; d < ix->ndoc; d++) {
		if (ix->lstart[d] == ix->lstart[d + 1] && doc_postings(ix, d) < conf->sim_min_postings)
			continue;
		size_t n;
		const char *s = st_key(&ix->docs, ix->entry[d], &n);
		if (sim_add(ix->sim, s, n) || acro_add(ix->acro, (uint32_t)d, s, n))
			return TM_ENOMEM;
		ix->simdoc[ns++] = (uint32_t)d;
	}
	if (acro_finish(ix->acro))
		return TM_ENOMEM;
	return sim_finish(ix->sim);
}

int match_build(match_index **out, const labelset *ls, tally_mem *m, const match_conf *conf,
		tm_buf *err)
{
	builder b;
	int rc;
	match_index *ix = calloc(1, sizeof *ix);

	*out = NULL;
	memset(&b, 0, sizeof b);
	if (!ix)
		return tm_fail(err, TM_ENOMEM, NULL, "out of memory building the match index", NULL);
	rc = add_labels(ix, &b, ls);
	if (!rc && m)
		rc = add_counts(ix, &b, m);
	if (!rc && ix->docs.n >= UINT32_MAX)
		rc = TM_ENOMEM;
	if (!rc)
		rc = rank_docs(ix);
	if (!rc)
		rc = build_rows(ix, &b);
	if (!rc)
		rc = build_groups(ix);
	if (!rc)
		rc = build_sim(ix, conf);
	free(b.lab);
	free(b.cnt);
	free(b.tot);
	if (rc) {
		match_free(ix);
		return tm_fail(err, TM_ENOMEM, NULL, "out of memory building the match index", NULL);
	}
	*out = ix;
	return TM_OK;
}

void match_free(match_index *ix)
{
	if (!ix)
		return;
	st_free(&ix->occs);
	st_free(&ix->langs);
	st_free(&ix->docs);
	st_free(&ix->compact);
	free(ix->rank);
	free(ix->entry);
	free(ix->lstart);
	free(ix->cstart);
	free(ix->tstart);
	free(ix->lab);
	free(ix->cnt);
	free(ix->tot);
	buf_free(&ix->text);
	free(ix->group);
	free(ix->gstart);
	free(ix->gdoc);
	sim_free(ix->sim);
	free(ix->simdoc);
	acro_free(ix->acro);
	free(ix);
}

void match_stats(const match_index *ix, size_t *docs, size_t *nsim, size_t *bytes)
{
	*docs = ix->ndoc;
	*nsim = sim_docs(ix->sim);
	*bytes = st_bytes(&ix->occs) + st_bytes(&ix->langs) + st_bytes(&ix->docs) +
		 st_bytes(&ix->compact) + ix->ndoc * (4 * 4 + 3 * 8) +
		 ix->lstart[ix->ndoc] * sizeof *ix->lab + ix->cstart[ix->ndoc] * sizeof *ix->cnt +
		 ix->tstart[ix->ndoc] * sizeof *ix->tot + ix->text.cap + sim_bytes(ix->sim) +
		 acro_bytes(ix->acro);
}

/* ---- queries ---- */

match_work *match_work_new(const match_index *ix)
{
	match_work *w = calloc(1, sizeof *w);
	size_t no = ix->occs.n ? ix->occs.n : 1;
	if (!w)
		return NULL;
	w->ix = ix;
	w->sw = sim_work_new(ix->sim);
	w->slot = malloc(no * sizeof *w->slot);
	w->kocc = calloc(no, sizeof *w->kocc);
	w->ktouch = malloc(no * sizeof *w->ktouch);
	if (!w->sw || !w->slot || !w->kocc || !w->ktouch) {
		match_work_free(w);
		return NULL;
	}
	for (size_t i = 0; i < no; i++)
		w->slot[i] = -1;
	return w;
}

void match_work_free(match_work *w)
{
	if (!w)
		return;
	sim_work_free(w->sw);
	free(w->slot);
	free(w->cand);
	free(w->out);
	free(w->top);
	free(w->kocc);
	free(w->ktouch);
	buf_free(&w->cbuf);
	free(w);
}

/* Loads the counts of document d into w->kocc and w->kn: those of
 * language lang when d was counted in it, else of all languages. */
static void load_counts(match_work *w, size_t d, long lang)
{
	const match_index *ix = w->ix;
	int only = 0;

	w->kn = 0;
	if (lang >= 0)
		for (size_t i = ix->tstart[d]; i < ix->tstart[d + 1]; i++)
			if (ix->tot[i].lang == (uint32_t)lang)
				only = 1;
	for (size_t i = ix->tstart[d]; i < ix->tstart[d + 1]; i++)
		if (!only || ix->tot[i].lang == (uint32_t)lang)
			w->kn += ix->tot[i].n;
	for (size_t i = ix->cstart[d]; i < ix->cstart[d + 1]; i++) {
		const mcount *c = &ix->cnt[i];
		if (only && c->lang != (uint32_t)lang)
			continue;
		if (!w->kocc[c->occ])
			w->ktouch[w->nktouch++] = c->occ;
		w->kocc[c->occ] += c->n;
	}
}

static void clear_counts(match_work *w)
{
	for (size_t i = 0; i < w->nktouch; i++)
		w->kocc[w->ktouch[i]] = 0;
	w->nktouch = 0;
}

/* k of n with their share and Wilson interval, into c. */
static void put_counts(match_cand *c, uint64_t k, uint64_t n)
{
	if (n < k)
		n = k;
	c->postings = n;
	c->occ_postings = k;
	c->share = n ? (double)k / (double)n : 0;
	if (n)
		wilson(k, n, STATS_Z95, &c->low, &c->high);
	else
		c->low = c->high = 0;
}

/* The candidate of occupation occ, made when new; NULL when memory ran out. */
static match_cand *cand_of(match_work *w, uint32_t occ)
{
	if (w->slot[occ] >= 0)
		return &w->cand[w->slot[occ]];
	if (w->ncand == w->capcand) {
		match_cand *v = tm_grow(w->cand, &w->capcand, w->ncand + 1, sizeof *v, 16);
		if (!v)
			return NULL;
		w->cand = v;
	}
	match_cand *c = &w->cand[w->ncand];
	memset(c, 0, sizeof *c);
	c->occ = st_key(&w->ix->occs, occ, &c->ol);
	c->score = -1;
	c->lang = "";
	c->id = occ;
	w->slot[occ] = (int32_t)w->ncand++;
	return c;
}

static const char *doc_key(const match_index *ix, size_t d, size_t *n)
{
	return st_key(&ix->docs, ix->entry[d], n);
}

/* The score of label l of the document whose counts are loaded: the
 * base, plus the market's share of the document's postings that carry
 * l's occupation; a label of another language than lang (when given)
 * counts MATCH_OTHER_LANG of that. */
static double label_score(const match_work *w, const mlabel *l, const char *lang)
{
	double lam = lang && strcmp(l->lang, lang) && strcmp(l->lang, "und") ? MATCH_OTHER_LANG : 1.0;
	uint64_t k = w->kocc[l->occ];
	double p = w->kn ? (double)(k < w->kn ? k : w->kn) / (double)w->kn : 0;
	return lam * (MATCH_LABEL_BASE + MATCH_LABEL_MARKET * p);
}

/* The labels and counts of document d as exact (label, title) or
 * variant evidence.  TM_OK or TM_ENOMEM. */
static int exact_doc(match_work *w, size_t d, const char *lang, long lid, int variant)
{
	const match_index *ix = w->ix;
	double f = variant ? MATCH_VARIANT : 1.0;

	load_counts(w, d, lid);
	for (size_t i = ix->lstart[d]; i < ix->lstart[d + 1]; i++) {
		const mlabel *l = &ix->lab[i];
		double sc = f * label_score(w, l, lang);
		match_cand *c = cand_of(w, l->occ);
		if (!c)
			return TM_ENOMEM;
		if (sc > c->score) {
			c->score = sc;
			c->via = variant ? VIA_VARIANT : VIA_LABEL;
			c->matched = ix->text.data + l->off;
			c->ml = l->len;
			c->lang = l->lang;
			put_counts(c, w->kocc[l->occ], w->kn);
		}
	}
	for (size_t i = 0; i < w->nktouch; i++) {
		uint32_t occ = w->ktouch[i];
		match_cand *c = cand_of(w, occ);
		double lo, hi;
		uint64_t k = w->kocc[occ], n = w->kn < k ? k : w->kn;
		if (!c)
			return TM_ENOMEM;
		wilson(k, n, STATS_Z95, &lo, &hi);
		double sc = f * (MATCH_TITLE_BASE + MATCH_TITLE_SPAN * lo);
		if (sc > c->score) {
			c->score = sc;
			c->via = variant ? VIA_VARIANT : VIA_TITLE;
			c->matched = doc_key(ix, d, &c->ml);
			c->lang = "";
			put_counts(c, k, n);
		}
	}
	clear_counts(w);
	return TM_OK;
}

/* One neighbour's evidence for occupation occ. */
static int offer_near(match_work *w, uint32_t occ, double sc, double s, const char *text,
		      size_t len, int is_label, uint64_t k, uint64_t n)
{
	match_cand *c = cand_of(w, occ);
	if (!c)
		return TM_ENOMEM;
	if (c->nnear < MATCH_NEAR)
		c->near[c->nnear++] = (match_near){text, len, s, is_label};
	if (sc > c->score) {
		c->score = sc;
		c->via = VIA_SIMILAR;
		c->matched = text;
		c->ml = len;
		c->lang = "";
		if (is_label)
			c->postings = c->occ_postings = 0, c->share = c->low = c->high = 0;
		else
			put_counts(c, k, n);
	}
	return TM_OK;
}

static int similar(match_work *w, const char *key, size_t kl, const char *lang, long lid,
		   long exact, long group, double min_score)
{
	const match_index *ix = w->ix;
	size_t nh;

	if (sim_query(ix->sim, w->sw, key, kl, w->hits, MATCH_SIM_HITS, &nh))
		return TM_ENOMEM;
	for (size_t h = 0; h < nh; h++) {
		size_t d = ix->simdoc[w->hits[h].doc];
		double s = w->hits[h].s;
		if (MATCH_SIM_SPAN * s < min_score)
			break; /* hits come best first: none after gives a candidate */
		if ((long)d == exact || (long)ix->group[d] == group)
			continue;
		for (size_t i = ix->lstart[d]; i < ix->lstart[d + 1]; i++) {
			const mlabel *l = &ix->lab[i];
			double lam = lang && strcmp(l->lang, lang) && strcmp(l->lang, "und") ? MATCH_OTHER_LANG : 1.0;
			if (offer_near(w, l->occ, MATCH_SIM_SPAN * s * lam, s, ix->text.data + l->off,
				       l->len, 1, 0, 0))
				return TM_ENOMEM;
		}
		load_counts(w, d, lid);
		size_t kl2;
		const char *k2 = doc_key(ix, d, &kl2);
		for (size_t i = 0; i < w->nktouch; i++) {
			uint32_t occ = w->ktouch[i];
			uint64_t k = w->kocc[occ], n = w->kn < k ? k : w->kn;
			double share = n ? (double)k / (double)n : 0;
			if (offer_near(w, occ, MATCH_SIM_SPAN * s * share, s, k2, kl2, 0, k, n)) {
				clear_counts(w);
				return TM_ENOMEM;
			}
		}
		clear_counts(w);
	}
	return TM_OK;
}

/* The best acronym evidence of occupation occ so far, kept in w->aocc. */
static void acro_offer(match_work *w, size_t *na, uint32_t occ, double fit, double ev,
		       const char *text, size_t len, const char *lang, uint64_t k, uint64_t n)
{
	size_t i = 0;
	while (i < *na && w->aocc[i].occ != occ)
		i++;
	if (i == *na) {
		if (*na == MATCH_ACRO_RUNS)
			return;
		(*na)++;
		w->aocc[i].fit = -1;
	}
	if (fit * ev > w->aocc[i].fit * w->aocc[i].ev)
		w->aocc[i] = (struct acro_occ){occ, fit, ev, text, lang, len, k, n};
}

/* The acronym path (match.h): the first word of the key shaped like an
 * acronym that no searched document holds, and the runs it abbreviates. */
static int acronym(match_work *w, const char *key, size_t kl, const char *lang, long lid)
{
	const match_index *ix = w->ix;
	const char *qw[ACRO_WORDS];
	size_t qwl[ACRO_WORDS], nq = acro_words(key, kl, qw, qwl, ACRO_WORDS), qa = 0, nr, na = 0;
	double sum = 0;

	while (qa < nq && (!acro_shape(qw[qa], qwl[qa]) || acro_is_word(ix->acro, qw[qa], qwl[qa])))
		qa++;
	if (qa == nq)
		return TM_OK;
	const acro_ent *r = acro_find(ix->acro, qw[qa], qwl[qa], &nr);
	if (!nr || nr > MATCH_ACRO_RUNS)
		return TM_OK; /* none, or too many to mean anything */
	for (size_t j = 0; j < nr; j++) {
		size_t d = r[j].doc, dl;
		const char *dk = doc_key(ix, d, &dl);
		double fit = acro_fit(qw, qwl, nq, qa, dk, dl, &r[j]);
		load_counts(w, d, lid);
		for (size_t i = ix->lstart[d]; i < ix->lstart[d + 1]; i++) {
			const mlabel *l = &ix->lab[i];
			acro_offer(w, &na, l->occ, fit, label_score(w, l, lang),
				   ix->text.data + l->off, l->len, l->lang, w->kocc[l->occ], w->kn);
		}
		for (size_t i = 0; i < w->nktouch; i++) {
			uint32_t occ = w->ktouch[i];
			uint64_t k = w->kocc[occ], n = w->kn < k ? k : w->kn;
			double lo, hi;
			wilson(k, n, STATS_Z95, &lo, &hi);
			acro_offer(w, &na, occ, fit, MATCH_TITLE_BASE + MATCH_TITLE_SPAN * lo, dk, dl, "", k, n);
		}
		clear_counts(w);
	}
	for (size_t i = 0; i < na; i++)
		sum += w->aocc[i].fit;
	double chance = acro_chance(ix->acro, qwl[qa]);
	for (size_t i = 0; i < na; i++) {
		const struct acro_occ *a = &w->aocc[i];
		double sc = MATCH_ACRO_SPAN * (1 - chance) * a->ev * a->fit * (a->fit / sum);
		match_cand *c = cand_of(w, a->occ);
		if (!c)
			return TM_ENOMEM;
		if (sc > c->score) {
			c->score = sc;
			c->via = VIA_ACRONYM;
			c->matched = a->text;
			c->ml = a->len;
			c->lang = a->lang;
			c->afit = a->fit;
			c->ashare = a->fit / sum;
			put_counts(c, a->k, a->n);
		}
	}
	return TM_OK;
}

static int cmp_cand(const void *a, const void *b)
{
	const match_cand *x = *(const match_cand *const *)a, *y = *(const match_cand *const *)b;
	if (x->score != y->score)
		return x->score > y->score ? -1 : 1;
	size_t n = x->ol < y->ol ? x->ol : y->ol;
	int c = memcmp(x->occ, y->occ, n);
	return c ? c : (x->ol > y->ol) - (x->ol < y->ol);
}

int match_find(const match_index *ix, match_work *w, const char *key, size_t kl,
	       const char *lang, size_t top, double min_score,
	       const match_cand **cands, size_t *n)
{
	long exact = -1, group = -1, lid = -1;
	int rc = TM_OK;

	*n = 0;
	*cands = NULL;
	w->ncand = 0;
	if (!kl)
		return TM_OK;
	if (lang && !*lang)
		lang = NULL;
	if (lang)
		lid = st_find(&ix->langs, lang, strlen(lang));
	long e = st_find(&ix->docs, key, kl);
	if (e >= 0) {
		exact = ix->rank[e];
		rc = exact_doc(w, (size_t)exact, lang, lid, 0);
	}
	if (!rc && !compact_key(&w->cbuf, key, kl)) {
		group = st_find(&ix->compact, w->cbuf.data ? w->cbuf.data : "", w->cbuf.len);
		if (group >= 0)
			for (size_t i = ix->gstart[group]; !rc && i < ix->gstart[group + 1]; i++)
				if ((long)ix->gdoc[i] != exact)
					rc = exact_doc(w, ix->gdoc[i], lang, lid, 1);
	} else if (!rc)
		rc = TM_ENOMEM;
	if (!rc)
		rc = similar(w, key, kl, lang, lid, exact, group, min_score);
	if (!rc)
		rc = acronym(w, key, kl, lang, lid);
	if (!rc && w->capout < w->ncand) {
		size_t cap = w->capout;
		const match_cand **v = tm_grow(w->out, &cap, w->ncand, sizeof *v, 16);
		if (!v)
			rc = TM_ENOMEM;
		else {
			w->out = v;
			w->capout = cap;
		}
	}
	size_t k = 0;
	for (size_t i = 0; i < w->ncand; i++) {
		w->slot[w->cand[i].id] = -1;
		if (!rc && w->cand[i].score >= min_score)
			w->out[k++] = &w->cand[i];
	}
	if (rc)
		return rc;
	if (k > 1)
		tm_qsort(w->out, k, sizeof *w->out, cmp_cand);
	k = k < top ? k : top;
	if (k > w->captop) {
		size_t cap = w->captop;
		match_cand *v = tm_grow(w->top, &cap, k, sizeof *v, 8);
		if (!v)
			return TM_ENOMEM;
		w->top = v;
		w->captop = cap;
	}
	for (size_t i = 0; i < k; i++)
		w->top[i] = *w->out[i];
	*cands = w->top;
	*n = k;
	return TM_OK;
}

/* overlap.c - Jensen-Shannon divergence between the occupations'
 * distributions over match keys, found sparsely through an inverted
 * index; groups and the occupations nearer another group.
 *
 * The divergence from the shared keys alone.  With m = (p + q) / 2,
 *   JSD(P, Q) = 1/2 sum p log2(p / m) + 1/2 sum q log2(q / m).
 * A key only P holds (q = 0) adds 1/2 p log2(2) = p / 2; one only Q
 * holds adds q / 2.  Writing S for the shared keys,
 *   JSD = 1/2 (1 - sum_S p) + 1/2 (1 - sum_S q)
 *       + sum_S [1/2 p (1 + log2(p / (p + q))) + 1/2 q (1 + log2(q / (p + q)))]
 *       = 1 - 1/2 sum_S [p log2((p + q) / p) + q log2((p + q) / q)].
 * So a pair needs only the terms of the keys both hold (each term is in
 * [0, p + q], 2p when p = q): the inverted index visits exactly those.
 *
 * Cost.  Let R be the (occupation, language, key) rows.  Building:
 * O(R) plus sorting each group's keys.  Pairs: each row of occupation a
 * visits the later occupations holding its key, and a key held by more
 * than key_cap occupations is not visited, so the visits are at most
 * key_cap x R (in practice the sum over keys of df^2 / 2 for the keys
 * under the cap).  A capped key shared by a pair found through another
 * key is added in a second pass, costing the capped keys of the other
 * occupation per pair found.  Groups: O(R) for the pools, the same
 * inverted-index pass between occupations and group pools, then between
 * pools.  Memory: O(R + pairs kept + keys). */
#include "rank/overlap.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

#define NONE UINT32_MAX

typedef struct ent {
	uint32_t key, dist;
	uint64_t n;
	uint32_t toff, tlen;  /* the display title, in titles (occupations only) */
} ent;

typedef struct dist {
	uint32_t name, namelen;   /* in names */
	char lang[4];
	size_t start, end, split; /* entries; [split, end) hold capped keys */
	uint64_t total;
	uint32_t pool;            /* occupations: its group's pool, or NONE */
} dist;

typedef struct dset {
	dist *d;
	size_t n, cap;
	ent *e;
	size_t ne, ecap;
} dset;

typedef struct pair {
	uint32_t a, b;
	double jsd, shared;
} pair;

struct overlap {
	overlap_opts o;
	overlap_stats st;
	strtab keys;       /* lang 1F key -> key id (entry index) */
	tm_buf names, titles;
	dset occ, pool;
	uint32_t *members; /* occupations by pool */
	size_t *mstart;    /* pool i's members: members[mstart[i] .. mstart[i+1]) */
	pair *pairs;
	size_t np, pcap;
	double *own, *near;        /* per occupation */
	uint32_t *nearest;
	double *disp, *gnear;      /* per pool */
	uint32_t *gnearest;
	uint64_t *dense;           /* scratch over keys */
	uint32_t *kpos;            /* scratch over keys */
};

/* One shared key's term: p log2((p + q) / p) + q log2((p + q) / q). */
static double term(double p, double q)
{
	double s = p + q;
	return p * log2(s / p) + q * log2(s / q);
}

static double jsd_of(double sum)
{
	double d = 1.0 - sum / 2.0;
	return d < 0 ? 0 : d > 1 ? 1 : d;
}

void overlap_jsd_dense(const uint64_t *a, const uint64_t *b, size_t n, double *divergence,
		       double *shared)
{
	uint64_t ta = 0, tb = 0;
	double sum = 0, sh = 0;
	for (size_t i = 0; i < n; i++)
		ta += a[i], tb += b[i];
	for (size_t i = 0; i < n; i++)
		if (a[i] && b[i]) {
			double p = (double)a[i] / (double)ta, q = (double)b[i] / (double)tb;
			sum += term(p, q);
			sh += p < q ? p : q;
		}
	*divergence = ta && tb ? jsd_of(sum) : 1;
	*shared = sh;
}

static const char *name_of(const overlap *ov, const dist *d)
{
	return ov->names.data + d->name;
}

static int namecmp(const overlap *ov, const dist *x, const dist *y)
{
	size_t n = x->namelen < y->namelen ? x->namelen : y->namelen;
	int c = memcmp(name_of(ov, x), name_of(ov, y), n);
	return c ? c : (x->namelen > y->namelen) - (x->namelen < y->namelen);
}

static const char *key_text(const overlap *ov, uint32_t k, size_t *n)
{
	size_t l;
	const char *s = st_key(&ov->keys, k, &l);
	const char *sep = memchr(s, '\x1F', l);
	*n = l - (size_t)(sep + 1 - s);
	return sep + 1;
}

/* ---- building the occupations' distributions ---- */

typedef struct bctx {
	overlap *ov;
	tm_buf kb;
	int oom;
} bctx;

static int on_triple(void *c0, const tm_triple *t)
{
	bctx *c = c0;
	overlap *ov = c->ov;
	dset *s = &ov->occ;
	size_t ki;
	if (!t->kl || !t->postings || t->ll > 3)
		return 0; /* an all-noise title names nothing */
	if (ov->o.lang && (strlen(ov->o.lang) != t->ll || memcmp(ov->o.lang, t->lang, t->ll)))
		return 0;
	dist *d = s->n ? &s->d[s->n - 1] : NULL;
	if (!d || d->namelen != t->ol || memcmp(name_of(ov, d), t->occ, t->ol) ||
	    strlen(d->lang) != t->ll || memcmp(d->lang, t->lang, t->ll)) {
		dist *v = tm_grow(s->d, &s->cap, s->n + 1, sizeof *v, 256);
		if (!v || ov->names.len > UINT32_MAX - t->ol)
			return c->oom = -1;
		s->d = v;
		d = &s->d[s->n++];
		memset(d, 0, sizeof *d);
		d->name = (uint32_t)ov->names.len;
		d->namelen = (uint32_t)t->ol;
		memcpy(d->lang, t->lang, t->ll);
		d->start = d->end = s->ne;
		d->pool = NONE;
		if (buf_append(&ov->names, t->occ, t->ol) || buf_putc(&ov->names, 0))
			return c->oom = -1;
	}
	buf_reset(&c->kb);
	buf_append(&c->kb, t->lang, t->ll);
	buf_putc(&c->kb, '\x1F');
	buf_append(&c->kb, t->key, t->kl);
	if (buf_status(&c->kb) || st_add(&ov->keys, c->kb.data, c->kb.len, 0, &ki) < 0 ||
	    ov->titles.len > UINT32_MAX - t->tl || ki >= NONE)
		return c->oom = -1;
	ent *e = tm_grow(s->e, &s->ecap, s->ne + 1, sizeof *e, 1024);
	if (!e)
		return c->oom = -1;
	s->e = e;
	s->e[s->ne++] = (ent){(uint32_t)ki, (uint32_t)(s->n - 1), t->postings,
			      (uint32_t)ov->titles.len, (uint32_t)t->tl};
	if (buf_append(&ov->titles, t->title, t->tl))
		return c->oom = -1;
	d->end = s->ne;
	d->total += t->postings;
	return 0;
}

/* ---- the sparse join ---- */

typedef void (*join_fn)(overlap *ov, void *ctx, uint32_t a, uint32_t b, double sum, double shared);

/* Moves the entries of each distribution of s whose key is capped to its
 * end (split). */
static void partition(dset *s, const uint32_t *df, uint64_t cap)
{
	for (size_t i = 0; i < s->n; i++) {
		dist *d = &s->d[i];
		size_t lo = d->start, hi = d->end;
		while (lo < hi) {
			if (df[s->e[lo].key] <= cap) {
				lo++;
				continue;
			}
			ent t = s->e[lo];
			s->e[lo] = s->e[--hi];
			s->e[hi] = t;
		}
		d->split = lo;
	}
}

/* Compares each distribution a of A with the distributions b of B that
 * share an uncapped key with it (only b > a when tri, A == B), handing
 * fn the sum of the shared keys' terms and the shared mass. */
static int join(overlap *ov, dset *A, dset *B, int tri, join_fn fn, void *ctx, uint64_t *capped)
{
	size_t nk = ov->keys.n;
	uint32_t *df = calloc(nk + 1, sizeof *df), *cur = NULL, *list = NULL, *touched = NULL;
	size_t *off = calloc(nk + 2, sizeof *off);
	double *acc = calloc(B->n + 1, sizeof *acc), *accm = calloc(B->n + 1, sizeof *accm);
	double *pa = calloc(nk + 1, sizeof *pa);
	unsigned char *mark = calloc(B->n + 1, 1);
	int rc = TM_ENOMEM;

	if (!df || !off || !acc || !accm || !pa || !mark)
		goto done;
	for (size_t i = 0; i < B->ne; i++)
		df[B->e[i].key]++;
	if (capped)
		for (size_t k = 0; k < nk; k++)
			*capped += df[k] > ov->o.key_cap;
	partition(A, df, ov->o.key_cap);
	if (B != A)
		partition(B, df, ov->o.key_cap);
	/* the inverted index over B's uncapped entries, each key's list in
	 * B's order */
	for (size_t i = 0; i < B->n; i++)
		for (size_t j = B->d[i].start; j < B->d[i].split; j++)
			off[B->e[j].key + 2]++;
	for (size_t k = 0; k < nk; k++)
		off[k + 2] += off[k + 1];
	if (!(list = malloc((off[nk + 1] + 1) * sizeof *list)) ||
	    !(touched = malloc((B->n + 1) * sizeof *touched)) ||
	    !(cur = calloc(nk + 1, sizeof *cur)))
		goto done;
	for (size_t i = 0; i < B->n; i++)
		for (size_t j = B->d[i].start; j < B->d[i].split; j++)
			list[off[B->e[j].key + 1]++] = (uint32_t)j;
	/* off[k] is now the start of key k's list, off[k + 1] its end */
	for (size_t a = 0; a < A->n; a++) {
		const dist *da = &A->d[a];
		size_t nt = 0;
		if (!da->total)
			continue;
		for (size_t j = da->start; j < da->split; j++) {
			const ent *e = &A->e[j];
			double p = (double)e->n / (double)da->total;
			size_t from = off[e->key], to = off[e->key + 1];
			if (tri)
				from += cur[e->key]++ + 1; /* past a itself */
			for (size_t x = from; x < to; x++) {
				const ent *f = &B->e[list[x]];
				const dist *db = &B->d[f->dist];
				double q = (double)f->n / (double)db->total;
				if (!mark[f->dist]) {
					mark[f->dist] = 1;
					touched[nt++] = f->dist;
				}
				acc[f->dist] += term(p, q);
				accm[f->dist] += p < q ? p : q;
			}
		}
		if (da->split < da->end && nt) {
			/* the capped keys of a, exactly, for each pair found */
			for (size_t j = da->split; j < da->end; j++)
				pa[A->e[j].key] = (double)A->e[j].n / (double)da->total;
			for (size_t t = 0; t < nt; t++) {
				const dist *db = &B->d[touched[t]];
				for (size_t j = db->split; j < db->end; j++) {
					double p = pa[B->e[j].key];
					if (p > 0) {
						double q = (double)B->e[j].n / (double)db->total;
						acc[touched[t]] += term(p, q);
						accm[touched[t]] += p < q ? p : q;
					}
				}
			}
			for (size_t j = da->split; j < da->end; j++)
				pa[A->e[j].key] = 0;
		}
		for (size_t t = 0; t < nt; t++) {
			uint32_t b = touched[t];
			fn(ov, ctx, (uint32_t)a, b, acc[b], accm[b]);
			acc[b] = accm[b] = 0;
			mark[b] = 0;
		}
	}
	rc = TM_OK;
done:
	free(df);
	free(off);
	free(acc);
	free(accm);
	free(pa);
	free(mark);
	free(list);
	free(touched);
	free(cur);
	return rc;
}

/* ---- pairs ---- */

static void on_pair(overlap *ov, void *ctx, uint32_t a, uint32_t b, double sum, double shared)
{
	int *oom = ctx;
	const dist *x = &ov->occ.d[a], *y = &ov->occ.d[b];
	ov->st.pairs_compared++;
	if (x->total < ov->o.min_postings || y->total < ov->o.min_postings) {
		ov->st.pairs_small++;
		return;
	}
	pair *v = tm_grow(ov->pairs, &ov->pcap, ov->np + 1, sizeof *v, 1024);
	if (!v) {
		*oom = 1;
		return;
	}
	ov->pairs = v;
	if (namecmp(ov, x, y) > 0) {
		uint32_t t = a;
		a = b;
		b = t;
	}
	v[ov->np++] = (pair){a, b, jsd_of(sum), shared};
}

static const overlap *sort_ov; /* qsort has no context argument */

static int cmp_pair(const void *p, const void *q)
{
	const pair *x = p, *y = q;
	const dist *d = sort_ov->occ.d;
	int c;
	if (x->jsd != y->jsd)
		return x->jsd < y->jsd ? -1 : 1;
	if ((c = namecmp(sort_ov, &d[x->a], &d[y->a])) || (c = namecmp(sort_ov, &d[x->b], &d[y->b])))
		return c;
	return strcmp(d[x->a].lang, d[y->a].lang);
}

/* ---- groups ---- */

/* The pools: one per (group, language), summing their members' counts,
 * each pool's entries in key order. */
static int build_pools(overlap *ov, tm_buf *kb)
{
	dset *P = &ov->pool, *O = &ov->occ;
	strtab idx = {0};
	size_t *cnt = NULL, nk = ov->keys.n;
	uint32_t *tk = NULL;
	int rc = TM_ENOMEM;

	for (size_t i = 0; i < O->n; i++) {
		dist *d = &O->d[i];
		size_t gl, pi;
		const char *g = groups_of(ov->o.groups, name_of(ov, d), d->namelen, &gl);
		if (!g) {
			ov->st.ungrouped++;
			continue;
		}
		buf_reset(kb);
		buf_puts(kb, d->lang);
		buf_putc(kb, '\x1F');
		buf_append(kb, g, gl);
		int fresh = buf_status(kb) ? -1 : st_add(&idx, kb->data, kb->len, 0, &pi);
		if (fresh < 0)
			goto done;
		if (fresh) {
			dist *v = tm_grow(P->d, &P->cap, P->n + 1, sizeof *v, 64);
			if (!v || ov->names.len > UINT32_MAX - gl)
				goto done;
			P->d = v;
			memset(&P->d[P->n], 0, sizeof *P->d);
			P->d[P->n].name = (uint32_t)ov->names.len;
			P->d[P->n].namelen = (uint32_t)gl;
			memcpy(P->d[P->n].lang, d->lang, 4);
			P->d[P->n].pool = NONE;
			P->n++;
			/* g may point into names (a prefix of an occupation's id) */
			size_t goff = (size_t)(g - ov->names.data);
			int inside = g >= ov->names.data && g < ov->names.data + ov->names.len;
			if (buf_reserve(&ov->names, gl + 1))
				goto done;
			if (inside)
				g = ov->names.data + goff;
			buf_append(&ov->names, g, gl);
			buf_putc(&ov->names, 0);
		}
		d->pool = (uint32_t)pi;
	}
	/* members by pool (counting sort keeps the occupations' order) */
	if (!(ov->mstart = calloc(P->n + 2, sizeof *ov->mstart)) ||
	    !(ov->members = malloc((O->n + 1) * sizeof *ov->members)) ||
	    !(cnt = calloc(nk + 1, sizeof *cnt)) || !(tk = malloc((nk + 1) * sizeof *tk)))
		goto done;
	for (size_t i = 0; i < O->n; i++)
		if (O->d[i].pool != NONE)
			ov->mstart[O->d[i].pool + 2]++;
	for (size_t p = 0; p < P->n; p++)
		ov->mstart[p + 2] += ov->mstart[p + 1];
	for (size_t i = 0; i < O->n; i++)
		if (O->d[i].pool != NONE)
			ov->members[ov->mstart[O->d[i].pool + 1]++] = (uint32_t)i;
	/* each pool's entries: its members' counts summed, in key order */
	for (size_t p = 0; p < P->n; p++) {
		size_t nt = 0;
		for (size_t m = ov->mstart[p]; m < ov->mstart[p + 1]; m++) {
			const dist *d = &O->d[ov->members[m]];
			for (size_t j = d->start; j < d->end; j++) {
				uint32_t k = O->e[j].key;
				if (!ov->dense[k])
					tk[nt++] = k;
				ov->dense[k] += O->e[j].n;
			}
		}
		ent *e = tm_grow(P->e, &P->ecap, P->ne + nt + 1, sizeof *e, 1024);
		if (!e)
			goto done;
		P->e = e;
		P->d[p].start = P->ne;
		for (size_t t = 0; t < nt; t++) {
			P->e[P->ne++] = (ent){tk[t], (uint32_t)p, ov->dense[tk[t]], 0, 0};
			P->d[p].total += ov->dense[tk[t]];
			ov->dense[tk[t]] = 0;
		}
		P->d[p].end = P->d[p].split = P->ne;
	}
	rc = TM_OK;
done:
	st_free(&idx);
	free(cnt);
	free(tk);
	return rc;
}

static int cmp_ent_key(const void *p, const void *q)
{
	const ent *x = p, *y = q;
	return (x->key > y->key) - (x->key < y->key);
}

static void sort_pools(overlap *ov)
{
	for (size_t p = 0; p < ov->pool.n; p++)
		tm_qsort(ov->pool.e + ov->pool.d[p].start, ov->pool.d[p].end - ov->pool.d[p].start,
		      sizeof *ov->pool.e, cmp_ent_key);
}

/* The postings of key k in pool p (its entries in key order). */
static uint64_t pool_count(const overlap *ov, uint32_t p, uint32_t k)
{
	const dist *d = &ov->pool.d[p];
	size_t lo = d->start, hi = d->end;
	while (lo < hi) {
		size_t mid = lo + (hi - lo) / 2;
		if (ov->pool.e[mid].key < k)
			lo = mid + 1;
		else
			hi = mid;
	}
	return lo < d->end && ov->pool.e[lo].key == k ? ov->pool.e[lo].n : 0;
}

/* Each member's divergence from its pool without itself, and the
 * pools' dispersion. */
static void own_group(overlap *ov)
{
	const dset *P = &ov->pool, *O = &ov->occ;
	for (size_t p = 0; p < P->n; p++) {
		const dist *g = &P->d[p];
		double wsum = 0;
		for (size_t j = g->start; j < g->end; j++)
			ov->dense[P->e[j].key] = P->e[j].n;
		for (size_t m = ov->mstart[p]; m < ov->mstart[p + 1]; m++) {
			uint32_t o = ov->members[m];
			const dist *d = &O->d[o];
			double full = 0, loo = 0;
			uint64_t rest = g->total - d->total;
			if (!d->total)
				continue;
			for (size_t j = d->start; j < d->end; j++) {
				double pr = (double)O->e[j].n / (double)d->total;
				uint64_t c = ov->dense[O->e[j].key];
				full += term(pr, (double)c / (double)g->total);
				if (c > O->e[j].n)
					loo += term(pr, (double)(c - O->e[j].n) / (double)rest);
			}
			wsum += (double)d->total * jsd_of(full);
			ov->own[o] = rest ? jsd_of(loo) : -1;
		}
		ov->disp[p] = g->total ? wsum / (double)g->total : 0;
		for (size_t j = g->start; j < g->end; j++)
			ov->dense[P->e[j].key] = 0;
	}
}

/* Is pool x a nearer choice than the one held (divergence dv, pool
 * held)?  Ties go to the byte-smaller group. */
static int better(const overlap *ov, double jsd, uint32_t x, double dv, uint32_t held)
{
	if (held == NONE || jsd < dv)
		return 1;
	return jsd == dv && namecmp(ov, &ov->pool.d[x], &ov->pool.d[held]) < 0;
}

static void on_occ_pool(overlap *ov, void *ctx, uint32_t a, uint32_t b, double sum, double shared)
{
	(void)ctx;
	(void)shared;
	double j = jsd_of(sum);
	if (ov->occ.d[a].pool == b)
		return;
	if (better(ov, j, b, ov->near[a], ov->nearest[a])) {
		ov->near[a] = j;
		ov->nearest[a] = b;
	}
}

static void on_pool_pool(overlap *ov, void *ctx, uint32_t a, uint32_t b, double sum, double shared)
{
	(void)ctx;
	(void)shared;
	double j = jsd_of(sum);
	if (better(ov, j, b, ov->gnear[a], ov->gnearest[a])) {
		ov->gnear[a] = j;
		ov->gnearest[a] = b;
	}
	if (better(ov, j, a, ov->gnear[b], ov->gnearest[b])) {
		ov->gnear[b] = j;
		ov->gnearest[b] = a;
	}
}

static int cmp_u64(const void *p, const void *q)
{
	const uint64_t *x = p, *y = q;
	return (*x > *y) - (*x < *y);
}

int overlap_build(overlap **out, tally_mem *m, const overlap_opts *o, tm_buf *err)
{
	overlap *ov = calloc(1, sizeof *ov);
	bctx c = {0};
	int oom = 0, rc;

	*out = NULL;
	if (!ov)
		return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
	ov->o = *o;
	c.ov = ov;
	rc = tm_each_triple(m, on_triple, &c);
	if (rc || c.oom)
		goto oom;
	ov->st.distributions = ov->occ.n;
	/* n(n-1)/2 per language: the languages' sizes by sorting them */
	{
		uint64_t *lk = malloc((ov->occ.n + 1) * sizeof *lk);
		if (!lk)
			goto oom;
		for (size_t i = 0; i < ov->occ.n; i++) {
			uint64_t v = 0;
			memcpy(&v, ov->occ.d[i].lang, 4);
			lk[i] = v;
		}
		tm_qsort(lk, ov->occ.n, sizeof *lk, cmp_u64);
		for (size_t i = 0, j; i < ov->occ.n; i = j) {
			for (j = i; j < ov->occ.n && lk[j] == lk[i]; j++)
				;
			ov->st.pairs_all += (uint64_t)(j - i) * (j - i - 1) / 2;
		}
		free(lk);
	}
	if (!(ov->dense = calloc(ov->keys.n + 1, sizeof *ov->dense)) ||
	    !(ov->kpos = calloc(ov->keys.n + 1, sizeof *ov->kpos)))
		goto oom;
	if (join(ov, &ov->occ, &ov->occ, 1, on_pair, &oom, &ov->st.keys_capped) || oom)
		goto oom;
	sort_ov = ov;
	tm_qsort(ov->pairs, ov->np, sizeof *ov->pairs, cmp_pair);
	if (o->groups && groups_any(o->groups)) {
		size_t no = ov->occ.n + 1, np;
		if (build_pools(ov, &c.kb))
			goto oom;
		np = ov->pool.n + 1;
		if (!(ov->own = calloc(no, sizeof *ov->own)) || !(ov->near = calloc(no, sizeof *ov->near)) ||
		    !(ov->nearest = malloc(no * sizeof *ov->nearest)) ||
		    !(ov->disp = calloc(np, sizeof *ov->disp)) || !(ov->gnear = calloc(np, sizeof *ov->gnear)) ||
		    !(ov->gnearest = malloc(np * sizeof *ov->gnearest)))
			goto oom;
		for (size_t i = 0; i < no; i++)
			ov->nearest[i] = NONE, ov->own[i] = -1;
		for (size_t i = 0; i < np; i++)
			ov->gnearest[i] = NONE;
		own_group(ov);
		if (join(ov, &ov->occ, &ov->pool, 0, on_occ_pool, NULL, NULL) ||
		    join(ov, &ov->pool, &ov->pool, 1, on_pool_pool, NULL, NULL))
			goto oom;
		sort_pools(ov);
	}
	buf_free(&c.kb);
	*out = ov;
	return TM_OK;
oom:
	buf_free(&c.kb);
	overlap_free(ov);
	return tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
}

const overlap_stats *overlap_get_stats(const overlap *ov)
{
	return &ov->st;
}

/* ---- the titles of a row ---- */

typedef struct cand {
	double score;
	uint32_t key, ent;  /* ent: the occupation's entry */
	uint64_t other, own;
} cand;

/* Keeps the OVERLAP_TITLES best candidates: higher score first, ties by
 * the key's bytes. */
static void keep(const overlap *ov, cand *top, int *n, cand c)
{
	int pos = *n;
	while (pos > 0) {
		const cand *t = &top[pos - 1];
		size_t l1, l2;
		const char *k1 = key_text(ov, c.key, &l1), *k2 = key_text(ov, t->key, &l2);
		int cmp = memcmp(k1, k2, l1 < l2 ? l1 : l2);
		if (!cmp)
			cmp = (l1 > l2) - (l1 < l2);
		if (t->score > c.score || (t->score == c.score && cmp > 0))
			break;
		pos--;
	}
	if (pos >= OVERLAP_TITLES)
		return;
	if (*n < OVERLAP_TITLES)
		(*n)++;
	memmove(&top[pos + 1], &top[pos], (size_t)(*n - 1 - pos) * sizeof *top);
	top[pos] = c;
}

static int fill_titles(const overlap *ov, const cand *top, int n, overlap_title *out)
{
	for (int i = 0; i < n; i++) {
		const ent *e = &ov->occ.e[top[i].ent];
		out[i].title = ov->titles.data ? ov->titles.data + e->toff : "";
		out[i].tl = e->tlen;
		out[i].key = key_text(ov, e->key, &out[i].kl);
		out[i].postings = e->n;
		out[i].other_postings = top[i].other;
		out[i].own_postings = top[i].own;
	}
	return n;
}

int overlap_pairs(overlap *ov, double max_divergence, uint64_t top, overlap_pair_fn fn, void *ctx)
{
	const dset *O = &ov->occ;
	for (size_t i = 0; i < ov->np && (!top || i < top); i++) {
		const pair *p = &ov->pairs[i];
		const dist *a = &O->d[p->a], *b = &O->d[p->b];
		cand c[OVERLAP_TITLES];
		overlap_title t[OVERLAP_TITLES];
		int n = 0, rc;
		if (p->jsd > max_divergence)
			break;
		for (size_t j = a->start; j < a->end; j++)
			ov->kpos[O->e[j].key] = (uint32_t)j + 1;
		for (size_t j = b->start; j < b->end; j++) {
			uint32_t at = ov->kpos[O->e[j].key];
			if (!at)
				continue;
			double pa = (double)O->e[at - 1].n / (double)a->total;
			double pb = (double)O->e[j].n / (double)b->total;
			keep(ov, c, &n, (cand){pa < pb ? pa : pb, O->e[j].key, at - 1, O->e[j].n, 0});
		}
		for (size_t j = a->start; j < a->end; j++)
			ov->kpos[O->e[j].key] = 0;
		overlap_pair r = {name_of(ov, a), name_of(ov, b), a->namelen, b->namelen, a->lang,
				  p->jsd, p->shared, a->total, b->total, t, fill_titles(ov, c, n, t)};
		if ((rc = fn(ctx, &r)) != 0)
			return rc;
	}
	return 0;
}

static int cmp_pool(const void *p, const void *q)
{
	const uint32_t *x = p, *y = q;
	const dist *a = &sort_ov->pool.d[*x], *b = &sort_ov->pool.d[*y];
	int c = strcmp(a->lang, b->lang);
	return c ? c : namecmp(sort_ov, a, b);
}

int overlap_groups(overlap *ov, overlap_group_fn fn, void *ctx)
{
	size_t n = ov->pool.n;
	uint32_t *ord = malloc((n + 1) * sizeof *ord);
	int rc = 0;
	if (!ord)
		return TM_ENOMEM;
	for (size_t i = 0; i < n; i++)
		ord[i] = (uint32_t)i;
	sort_ov = ov;
	tm_qsort(ord, n, sizeof *ord, cmp_pool);
	for (size_t i = 0; i < n && !rc; i++) {
		const dist *g = &ov->pool.d[ord[i]];
		uint32_t h = ov->gnearest[ord[i]];
		const dist *nd = h != NONE ? &ov->pool.d[h] : NULL;
		overlap_group r = {name_of(ov, g), nd ? name_of(ov, nd) : NULL, g->namelen,
				   nd ? nd->namelen : 0, g->lang, g->total,
				   ov->mstart[ord[i] + 1] - ov->mstart[ord[i]], ov->disp[ord[i]],
				   nd ? ov->gnear[ord[i]] : 0};
		rc = fn(ctx, &r);
	}
	free(ord);
	return rc;
}

static int is_nearer(const overlap *ov, size_t o)
{
	return ov->occ.d[o].pool != NONE && ov->nearest[o] != NONE && ov->own[o] >= 0 &&
	       ov->occ.d[o].total >= ov->o.min_postings && ov->near[o] < ov->own[o];
}

static int cmp_nearer(const void *p, const void *q)
{
	const uint32_t *x = p, *y = q;
	double mx = sort_ov->own[*x] - sort_ov->near[*x], my = sort_ov->own[*y] - sort_ov->near[*y];
	if (mx != my)
		return mx > my ? -1 : 1;
	return (*x > *y) - (*x < *y); /* the occupations' order: id, then language */
}

/* The titles that pull occupation o to pool h: those whose mass shared
 * with h most exceeds the mass shared with its own pool without it. */
static int pull_titles(const overlap *ov, uint32_t o, overlap_title *t)
{
	const dist *d = &ov->occ.d[o], *g = &ov->pool.d[d->pool], *h = &ov->pool.d[ov->nearest[o]];
	uint64_t rest = g->total - d->total;
	cand c[OVERLAP_TITLES];
	int n = 0;
	for (size_t j = d->start; j < d->end; j++) {
		const ent *e = &ov->occ.e[j];
		double p = (double)e->n / (double)d->total;
		uint64_t ch = pool_count(ov, ov->nearest[o], e->key);
		uint64_t cg = pool_count(ov, d->pool, e->key) - e->n;
		double qh = (double)ch / (double)h->total, qg = rest ? (double)cg / (double)rest : 0;
		double s = (p < qh ? p : qh) - (p < qg ? p : qg);
		if (s > 0)
			keep(ov, c, &n, (cand){s, e->key, (uint32_t)j, ch, cg});
	}
	return fill_titles(ov, c, n, t);
}

int overlap_occupations(overlap *ov, int only_nearer, uint64_t top, overlap_occ_fn fn, void *ctx)
{
	size_t n = 0;
	uint32_t *ord;
	int rc = 0;
	if (!ov->own)
		return 0;
	if (!(ord = malloc((ov->occ.n + 1) * sizeof *ord)))
		return TM_ENOMEM;
	for (size_t i = 0; i < ov->occ.n; i++)
		if (!only_nearer || is_nearer(ov, i))
			ord[n++] = (uint32_t)i;
	sort_ov = ov;
	if (only_nearer)
		tm_qsort(ord, n, sizeof *ord, cmp_nearer);
	for (size_t i = 0; i < n && (!top || i < top) && !rc; i++) {
		uint32_t o = ord[i];
		const dist *d = &ov->occ.d[o];
		const dist *g = d->pool != NONE ? &ov->pool.d[d->pool] : NULL;
		const dist *h = ov->nearest[o] != NONE ? &ov->pool.d[ov->nearest[o]] : NULL;
		overlap_title t[OVERLAP_TITLES];
		int near = is_nearer(ov, o);
		overlap_occ r = {name_of(ov, d), g ? name_of(ov, g) : NULL, h ? name_of(ov, h) : NULL,
				 d->namelen, g ? g->namelen : 0, h ? h->namelen : 0, d->lang, d->total,
				 h ? h->total : 0, ov->own[o] >= 0, ov->own[o] >= 0 ? ov->own[o] : 0,
				 h ? ov->near[o] : 0, near, t, near ? pull_titles(ov, o, t) : 0};
		rc = fn(ctx, &r);
	}
	free(ord);
	return rc;
}

void overlap_free(overlap *ov)
{
	if (!ov)
		return;
	st_free(&ov->keys);
	buf_free(&ov->names);
	buf_free(&ov->titles);
	free(ov->occ.d);
	free(ov->occ.e);
	free(ov->pool.d);
	free(ov->pool.e);
	free(ov->members);
	free(ov->mstart);
	free(ov->pairs);
	free(ov->own);
	free(ov->near);
	free(ov->nearest);
	free(ov->disp);
	free(ov->gnear);
	free(ov->gnearest);
	free(ov->dense);
	free(ov->kpos);
	free(ov);
}

/* sim.c - TF-IDF character 3-gram cosine and word BM25 over an inverted
 * index (sim.h states the measures and the bounds). */
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "core/buf.h"
#include "core/err.h"
#include "io/decode.h"
#include "match/sim.h"

#define SEED_GRAM 0x736d6772616d3331ULL
#define SEED_WORD 0x736d776f72643331ULL

/* 64-bit hash -> term number, open addressing (a hash of 0 is stored as 1:
 * two texts whose hashes agree in 64 bits are taken for one term). */
typedef struct termmap {
	uint64_t *h;
	uint32_t *id;
	size_t nslot, n;
} termmap;

typedef struct u64v { uint64_t *v; size_t n, cap; } u64v;
typedef struct u32v { uint32_t *v; size_t n, cap; } u32v;
typedef struct szv { size_t *v; size_t n, cap; } szv;

struct sim_index {
	termmap grams, words;
	szv gstart, wstart;     /* per document: its first term; n + 1 entries */
	u32v gterm, wterm;      /* per document, term numbers sorted (repeats = tf) */
	uint32_t *gdf, *wdf;
	double *gidf, *widf;    /* the TF-IDF idf of a gram; the BM25 idf of a word */
	size_t *pstart;         /* postings of gram t: pdoc[pstart[t] .. pstart[t+1]) */
	uint32_t *pdoc;
	float *dnorm;           /* the L2 norm of a document's TF-IDF vector */
	tm_buf wtext;           /* the text of each word term, by number: */
	szv woff;               /* wtext[woff[t] .. woff[t] + wlen[t]) */
	u32v wlen;
	double avgdl;
	size_t ndoc;
	int finished;
	sim_work *scratch;      /* for sim_add's cutting */
};

typedef struct qterm {
	uint64_t h;
	uint32_t id, tf;  /* id UINT32_MAX: no document holds it */
	uint32_t off, len; /* a word: its text in the query */
} qterm;

typedef struct qtv { qterm *v; size_t n, cap; } qtv;

struct sim_work {
	const sim_index *x;
	float *acc;
	u32v touched;
	u64v gh, wh;
	u64v wseq;      /* the words' hashes in text order, */
	u32v woff, wlen; /* and their places in the (cut) query */
	const char *q;  /* the query being scored */
	qtv qg, qw;
	tm_buf pad;
	uint32_t *cand;
	sim_hit *exact;
	double qnorm;   /* the query's TF-IDF norm */
	double self;    /* the query's BM25 against itself */
	double kq;
};

static int push64(u64v *a, uint64_t x)
{
	if (a->n == a->cap) {
		uint64_t *v = tm_grow(a->v, &a->cap, a->n + 1, sizeof *v, 64);
		if (!v)
			return TM_ENOMEM;
		a->v = v;
	}
	a->v[a->n++] = x;
	return TM_OK;
}

static int push32(u32v *a, uint32_t x)
{
	if (a->n == a->cap) {
		uint32_t *v = tm_grow(a->v, &a->cap, a->n + 1, sizeof *v, 64);
		if (!v)
			return TM_ENOMEM;
		a->v = v;
	}
	a->v[a->n++] = x;
	return TM_OK;
}

static int pushsz(szv *a, size_t x)
{
	if (a->n == a->cap) {
		size_t *v = tm_grow(a->v, &a->cap, a->n + 1, sizeof *v, 64);
		if (!v)
			return TM_ENOMEM;
		a->v = v;
	}
	a->v[a->n++] = x;
	return TM_OK;
}

static size_t tm_home(uint64_t h, size_t nslot)
{
	return (size_t)((h * 0x9E3779B97F4A7C15ULL) >> 17) & (nslot - 1);
}

/* The number of h, or UINT32_MAX. */
static uint32_t tmap_find(const termmap *m, uint64_t h)
{
	if (!m->nslot)
		return UINT32_MAX;
	h = h ? h : 1;
	for (size_t j = tm_home(h, m->nslot);; j = (j + 1) & (m->nslot - 1)) {
		if (!m->h[j])
			return UINT32_MAX;
		if (m->h[j] == h)
			return m->id[j];
	}
}

/* The number of h, a new one when unknown: TM_OK or TM_ENOMEM. */
static int tmap_get(termmap *m, uint64_t h, uint32_t *id)
{
	h = h ? h : 1;
	if ((m->n + 1) * 4 > m->nslot * 3) {
		size_t ns = m->nslot ? m->nslot * 2 : 1024;
		uint64_t *nh = calloc(ns, sizeof *nh);
		uint32_t *ni = malloc(ns * sizeof *ni);
		if (!nh || !ni) {
			free(nh);
			free(ni);
			return TM_ENOMEM;
		}
		for (size_t i = 0; i < m->nslot; i++)
			if (m->h[i]) {
				size_t j = tm_home(m->h[i], ns);
				while (nh[j])
					j = (j + 1) & (ns - 1);
				nh[j] = m->h[i];
				ni[j] = m->id[i];
			}
		free(m->h);
		free(m->id);
		m->h = nh;
		m->id = ni;
		m->nslot = ns;
	}
	size_t j = tm_home(h, m->nslot);
	while (m->h[j] && m->h[j] != h)
		j = (j + 1) & (m->nslot - 1);
	if (!m->h[j]) {
		if (m->n >= UINT32_MAX - 1)
			return TM_ENOMEM;
		m->h[j] = h;
		m->id[j] = (uint32_t)m->n++;
	}
	*id = m->id[j];
	return TM_OK;
}

static void tmap_free(termmap *m)
{
	free(m->h);
	free(m->id);
}

/* FNV-1a (Fowler, Noll, Vo), 64 bits, from a seed: grams and words are
 * short, and this is the cheapest good spread for them. */
static inline uint64_t short_hash(const void *p, size_t n, uint64_t seed)
{
	const unsigned char *b = p;
	uint64_t h = 0xcbf29ce484222325ULL ^ seed;
	for (size_t i = 0; i < n; i++)
		h = (h ^ b[i]) * 0x100000001b3ULL;
	return h ^ (h >> 29);
}

/* The length of s[0..n) kept: all of it up to SIM_QUERY_MAX, else cut at
 * the last space before the limit, or at a code point boundary. */
static size_t kept_len(const char *s, size_t n)
{
	if (n <= SIM_QUERY_MAX)
		return n;
	size_t k = SIM_QUERY_MAX;
	while (k > 0 && s[k] != ' ')
		k--;
	if (k > 0)
		return k;
	k = SIM_QUERY_MAX;
	while (k > 0 && ((unsigned char)s[k] & 0xC0) == 0x80)
		k--;
	return k;
}

/* Cuts s into the hashes of its grams (w->gh) and words (w->wh), in text
 * order.  TM_OK or TM_ENOMEM. */
static int cut(sim_work *w, const char *s, size_t n)
{
	size_t off[SIM_QUERY_MAX + 3];

	w->gh.n = w->wh.n = w->wseq.n = w->woff.n = w->wlen.n = 0;
	n = kept_len(s, n);
	for (size_t i = 0; i < n;) {
		while (i < n && s[i] == ' ')
			i++;
		size_t b = i;
		while (i < n && s[i] != ' ')
			i++;
		if (i == b)
			break;
		uint64_t wh = short_hash(s + b, i - b, SEED_WORD);
		if (push64(&w->wh, wh) || push64(&w->wseq, wh) || push32(&w->woff, (uint32_t)b) ||
		    push32(&w->wlen, (uint32_t)(i - b)))
			return TM_ENOMEM;
		buf_reset(&w->pad);
		buf_putc(&w->pad, ' ');
		buf_append(&w->pad, s + b, i - b);
		buf_putc(&w->pad, ' ');
		if (buf_status(&w->pad))
			return TM_ENOMEM;
		const unsigned char *p = (const unsigned char *)w->pad.data;
		size_t np = w->pad.len, L = 0;
		for (size_t k = 0; k < np; k++)
			if ((p[k] & 0xC0) != 0x80)
				off[L++] = k;
		off[L] = np;
		if (L < 3) {
			if (push64(&w->gh, short_hash(p, np, SEED_GRAM)))
				return TM_ENOMEM;
		} else
			for (size_t k = 0; k + 3 <= L; k++)
				if (push64(&w->gh, short_hash(p + off[k], off[k + 3] - off[k], SEED_GRAM)))
					return TM_ENOMEM;
	}
	return TM_OK;
}

sim_index *sim_new(void)
{
	sim_index *x = calloc(1, sizeof *x);
	if (!x)
		return NULL;
	if (pushsz(&x->gstart, 0) || pushsz(&x->wstart, 0) || !(x->scratch = sim_work_new(x))) {
		sim_free(x);
		return NULL;
	}
	return x;
}

void sim_free(sim_index *x)
{
	if (!x)
		return;
	tmap_free(&x->grams);
	tmap_free(&x->words);
	free(x->gstart.v);
	free(x->wstart.v);
	free(x->gterm.v);
	free(x->wterm.v);
	free(x->gdf);
	free(x->wdf);
	free(x->gidf);
	free(x->widf);
	free(x->pstart);
	free(x->pdoc);
	free(x->dnorm);
	buf_free(&x->wtext);
	free(x->woff.v);
	free(x->wlen.v);
	sim_work_free(x->scratch);
	free(x);
}

/* Appends the numbers of hashes h to terms, sorted: TM_OK or TM_ENOMEM. */
static int add_terms(termmap *m, const u64v *h, u32v *terms)
{
	size_t from = terms->n;
	for (size_t i = 0; i < h->n; i++) {
		uint32_t id;
		if (tmap_get(m, h->v[i], &id) || push32(terms, id))
			return TM_ENOMEM;
	}
	/* a document's terms are few: insertion sort */
	uint32_t *v = terms->v + from;
	for (size_t i = 1; i < terms->n - from; i++) {
		uint32_t x = v[i];
		size_t j = i;
		while (j > 0 && v[j - 1] > x) {
			v[j] = v[j - 1];
			j--;
		}
		v[j] = x;
	}
	return TM_OK;
}

int sim_add(sim_index *x, const char *text, size_t n)
{
	if (x->finished || x->ndoc >= UINT32_MAX - 1)
		return TM_ENOMEM;
	sim_work *c = x->scratch;
	if (cut(c, text, n) || add_terms(&x->grams, &c->gh, &x->gterm) ||
	    add_terms(&x->words, &c->wh, &x->wterm) ||
	    pushsz(&x->gstart, x->gterm.n) || pushsz(&x->wstart, x->wterm.n))
		return TM_ENOMEM;
	/* the text of each word seen for the first time (numbers come in
	 * order, so a new one is the next of woff) */
	for (size_t i = 0; i < c->wseq.n && x->woff.n < x->words.n; i++) {
		uint32_t id = tmap_find(&x->words, c->wseq.v[i]);
		if (id != x->woff.n)
			continue;
		if (pushsz(&x->woff, x->wtext.len) || push32(&x->wlen, c->wlen.v[i]) ||
		    buf_append(&x->wtext, text + c->woff.v[i], c->wlen.v[i]))
			return TM_ENOMEM;
	}
	x->ndoc++;
	return TM_OK;
}

/* Document frequencies of the terms of one kind. */
static uint32_t *doc_freq(size_t nterm, const szv *start, const u32v *term, size_t ndoc)
{
	uint32_t *df = calloc(nterm ? nterm : 1, sizeof *df);
	if (!df)
		return NULL;
	for (size_t d = 0; d < ndoc; d++)
		for (size_t k = start->v[d]; k < start->v[d + 1]; k++)
			if (k == start->v[d] || term->v[k] != term->v[k - 1])
				df[term->v[k]]++;
	return df;
}

int sim_finish(sim_index *x)
{
	size_t ng = x->grams.n, nw = x->words.n, N = x->ndoc;

	x->gdf = doc_freq(ng, &x->gstart, &x->gterm, N);
	x->wdf = doc_freq(nw, &x->wstart, &x->wterm, N);
	x->gidf = malloc((ng ? ng : 1) * sizeof *x->gidf);
	x->widf = malloc((nw ? nw : 1) * sizeof *x->widf);
	x->pstart = calloc(ng + 1, sizeof *x->pstart);
	x->dnorm = malloc((N ? N : 1) * sizeof *x->dnorm);
	if (!x->gdf || !x->wdf || !x->gidf || !x->widf || !x->pstart || !x->dnorm)
		return TM_ENOMEM;
	for (size_t t = 0; t < ng; t++) {
		x->gidf[t] = log((1.0 + (double)N) / (1.0 + x->gdf[t])) + 1.0;
		x->pstart[t + 1] = x->pstart[t] + x->gdf[t];
	}
	for (size_t t = 0; t < nw; t++)
		x->widf[t] = log(1.0 + ((double)N - x->wdf[t] + 0.5) / (x->wdf[t] + 0.5));
	x->pdoc = malloc((x->pstart[ng] ? x->pstart[ng] : 1) * sizeof *x->pdoc);
	size_t *fill = malloc((ng ? ng : 1) * sizeof *fill);
	if (!x->pdoc || !fill) {
		free(fill);
		return TM_ENOMEM;
	}
	memcpy(fill, x->pstart, ng * sizeof *fill);
	for (size_t d = 0; d < N; d++) {
		double norm = 0;
		for (size_t k = x->gstart.v[d]; k < x->gstart.v[d + 1];) {
			uint32_t t = x->gterm.v[k];
			size_t e = k;
			while (e < x->gstart.v[d + 1] && x->gterm.v[e] == t)
				e++;
			double wt = (double)(e - k) * x->gidf[t];
			norm += wt * wt;
			x->pdoc[fill[t]++] = (uint32_t)d;
			k = e;
		}
		x->dnorm[d] = (float)sqrt(norm);
	}
	free(fill);
	x->avgdl = N ? (double)x->wterm.n / (double)N : 1.0;
	if (x->avgdl <= 0)
		x->avgdl = 1.0;
	x->finished = 1;
	return TM_OK;
}

size_t sim_docs(const sim_index *x)
{
	return x->ndoc;
}

size_t sim_bytes(const sim_index *x)
{
	size_t ng = x->grams.n, nw = x->words.n;
	return (x->grams.nslot + x->words.nslot) * 12 + (x->gstart.cap + x->wstart.cap) * 8 +
	       (x->gterm.cap + x->wterm.cap) * 4 + (ng + nw) * 12 + (ng + 1) * 8 +
	       (x->pstart ? x->pstart[ng] : 0) * 4 + x->ndoc * 4 + x->wtext.cap + x->woff.cap * 8 +
	       x->wlen.cap * 4;
}

sim_work *sim_work_new(const sim_index *x)
{
	sim_work *w = calloc(1, sizeof *w);
	if (!w)
		return NULL;
	w->x = x;
	w->cand = malloc(SIM_CANDIDATES * sizeof *w->cand);
	w->exact = malloc(SIM_CANDIDATES * sizeof *w->exact);
	if (!w->cand || !w->exact) {
		sim_work_free(w);
		return NULL;
	}
	return w;
}

void sim_work_free(sim_work *w)
{
	if (!w)
		return;
	free(w->acc);
	free(w->touched.v);
	free(w->gh.v);
	free(w->wh.v);
	free(w->wseq.v);
	free(w->woff.v);
	free(w->wlen.v);
	free(w->qg.v);
	free(w->qw.v);
	buf_free(&w->pad);
	free(w->cand);
	free(w->exact);
	free(w);
}

static int cmp_u64(const void *a, const void *b)
{
	uint64_t x = *(const uint64_t *)a, y = *(const uint64_t *)b;
	return (x > y) - (x < y);
}

static int cmp_qterm_id(const void *a, const void *b)
{
	const qterm *x = a, *y = b;
	return (x->id > y->id) - (x->id < y->id);
}

/* The distinct terms of hashes h with their counts and numbers, sorted by
 * number (unknown ones last).  TM_OK or TM_ENOMEM. */
static int query_terms(const termmap *m, u64v *h, qtv *out)
{
	out->n = 0;
	tm_qsort(h->v, h->n, sizeof *h->v, cmp_u64);
	for (size_t i = 0; i < h->n;) {
		size_t e = i;
		while (e < h->n && h->v[e] == h->v[i])
			e++;
		if (out->n == out->cap) {
			qterm *v = tm_grow(out->v, &out->cap, out->n + 1, sizeof *v, 64);
			if (!v)
				return TM_ENOMEM;
			out->v = v;
		}
		out->v[out->n++] = (qterm){h->v[i], tmap_find(m, h->v[i]), (uint32_t)(e - i), 0, 0};
		i = e;
	}
	tm_qsort(out->v, out->n, sizeof *out->v, cmp_qterm_id);
	return TM_OK;
}

static double gram_idf(const sim_index *x, uint32_t id)
{
	return id == UINT32_MAX ? log(1.0 + (double)x->ndoc) + 1.0 : x->gidf[id];
}

static double word_idf(const sim_index *x, uint32_t id)
{
	return id == UINT32_MAX ? log(1.0 + ((double)x->ndoc + 0.5) / 0.5) : x->widf[id];
}

/* Cuts the query, finds its terms and its own norm and BM25: TM_OK or
 * TM_ENOMEM. */
static int prepare(sim_work *w, const char *q, size_t n)
{
	const sim_index *x = w->x;
	if (cut(w, q, n) || query_terms(&x->grams, &w->gh, &w->qg) ||
	    query_terms(&x->words, &w->wh, &w->qw))
		return TM_ENOMEM;
	double qn = 0;
	for (size_t i = 0; i < w->qg.n; i++) {
		double v = w->qg.v[i].tf * gram_idf(x, w->qg.v[i].id);
		qn += v * v;
	}
	w->qnorm = sqrt(qn);
	w->q = q;
	for (size_t i = 0; i < w->qw.n; i++) {
		size_t j = 0;
		while (j + 1 < w->wseq.n && w->wseq.v[j] != w->qw.v[i].h)
			j++;
		w->qw.v[i].off = w->woff.v[j];
		w->qw.v[i].len = w->wlen.v[j];
	}
	w->kq = SIM_BM25_K1 * (1 - SIM_BM25_B + SIM_BM25_B * (double)w->wh.n / x->avgdl);
	w->self = 0;
	for (size_t i = 0; i < w->qw.n; i++)
		w->self += word_idf(x, w->qw.v[i].id) * (SIM_BM25_K1 + 1) / (1 + w->kq);
	return TM_OK;
}

/* Are two different words forms of one word (sim.h: SIM_STEM_*)? */
static int same_stem(const char *a, size_t al, const char *b, size_t bl)
{
	if (al < SIM_STEM_MIN || bl < SIM_STEM_MIN || al > SIM_STEM_BYTES || bl > SIM_STEM_BYTES ||
	    memcmp(a, b, SIM_STEM_MIN))
		return 0;
	size_t p = 0;
	while (p < al && p < bl && a[p] == b[p])
		p++;
	while (p > 0 && ((p < al && ((unsigned char)a[p] & 0xC0) == 0x80) ||
			 (p < bl && ((unsigned char)b[p] & 0xC0) == 0x80)))
		p--;
	size_t P = dec_cps(a, p), ta = dec_cps(a + p, al - p), tb = dec_cps(b + p, bl - p);
	size_t longer = P + (ta > tb ? ta : tb);
	return P >= SIM_STEM_MIN && ta <= SIM_STEM_TAIL && tb <= SIM_STEM_TAIL &&
	       (double)P >= SIM_STEM_SHARE * (double)longer;
}

/* A word of the query or of a document, for the alignment of words. */
typedef struct wview {
	const char *s;
	size_t n;
	uint32_t id;  /* its term number (UINT32_MAX: in no document) */
} wview;

/* The code points of s[0..n) into c (at most SIM_STEM_BYTES): their
 * number. */
static size_t decode_cps(const char *s, size_t n, uint32_t *c)
{
	size_t k = 0;
	for (size_t i = 0; i < n && k < SIM_STEM_BYTES;) {
		unsigned char b = (unsigned char)s[i];
		size_t l = b < 0x80 ? 1 : b < 0xE0 ? 2 : b < 0xF0 ? 3 : 4;
		uint32_t v = l == 1 ? b : b & (0xFF >> (l + 1));
		for (size_t j = 1; j < l && i + j < n; j++)
			v = v << 6 | ((unsigned char)s[i + j] & 0x3F);
		c[k++] = v;
		i += l;
	}
	return k;
}

/* Is b a with one typing slip (Damerau 1964): one code point left out,
 * added, changed, or two neighbours swapped?  Only words of at least
 * SIM_TYPO_MIN code points. */
static int one_slip(const char *as, size_t al, const char *bs, size_t bl)
{
	/* one slip leaves the first or the last code point as it was, and
	 * changes the length by at most one code point (4 bytes) */
	if (al > SIM_STEM_BYTES || bl > SIM_STEM_BYTES || al + 4 < bl || bl + 4 < al || !al || !bl ||
	    (as[0] != bs[0] && as[al - 1] != bs[bl - 1]))
		return 0;
	uint32_t a[SIM_STEM_BYTES], b[SIM_STEM_BYTES];
	size_t n = decode_cps(as, al, a), m = decode_cps(bs, bl, b);
	if (n < SIM_TYPO_MIN || m < SIM_TYPO_MIN || n + 1 < m || m + 1 < n)
		return 0;
	size_t p = 0;
	while (p < n && p < m && a[p] == b[p])
		p++;
	if (p == n && p == m)
		return 0;
	if (n == m) {
		if (!memcmp(a + p + 1, b + p + 1, (n - p - 1) * sizeof *a))
			return 1;
		return p + 1 < n && a[p] == b[p + 1] && a[p + 1] == b[p] &&
		       !memcmp(a + p + 2, b + p + 2, (n - p - 2) * sizeof *a);
	}
	if (n > m)
		return !memcmp(a + p + 1, b + p, (m - p) * sizeof *a);
	return !memcmp(a + p, b + p + 1, (n - p) * sizeof *a);
}

static int same_word(const wview *a, const wview *b)
{
	if (a->id != UINT32_MAX && a->id == b->id)
		return 1;
	return same_stem(a->s, a->n, b->s, b->n) || one_slip(a->s, a->n, b->s, b->n);
}

/* Is the query's word q the start of the document's word d, cut short
 * ("rep" of "representative", "kine" of "kinesitherapeute")?  Only a
 * word that no document holds whole, of SIM_CUT_MIN to SIM_CUT_MAX code
 * points, at most half of d. */
static int cut_short(const wview *q, const wview *d)
{
	if (q->id != UINT32_MAX || q->n > d->n || d->n > SIM_STEM_BYTES || memcmp(q->s, d->s, q->n))
		return 0;
	size_t a = dec_cps(q->s, q->n);
	return a >= SIM_CUT_MIN && a <= SIM_CUT_MAX && 2 * a <= dec_cps(d->s, d->n);
}

/* Is a the compound of two words of L, the first as it is and the second
 * as it is, in another form or cut short ("softwareentwickler" =
 * "software" + "entwickler", "reachtruck" = "reach" + "truck",
 * "maschinenbauingenieur" = "maschinenbau" + "ing")?  1 with their
 * places. */
static int compound_of(const wview *a, const wview *L, size_t n, size_t *pi, size_t *pj)
{
	for (size_t i = 0; i < n; i++) {
		if (L[i].n < SIM_PIECE_MIN || L[i].n + SIM_PIECE_MIN > a->n || memcmp(a->s, L[i].s, L[i].n))
			continue;
		wview r = {a->s + L[i].n, a->n - L[i].n, UINT32_MAX};
		for (size_t j = 0; j < n; j++)
			if ((r.n == L[j].n && !memcmp(r.s, L[j].s, r.n)) || same_stem(r.s, r.n, L[j].s, L[j].n) ||
			    cut_short(&L[j], &r)) {
				*pi = i;
				*pj = j;
				return 1;
			}
	}
	return 0;
}

/* Aligns the query's words with the first SIM_STEM_WORDS distinct words
 * of doc d: qm[i] (dm[j]) is 1 when query word i (document word j) has a
 * counterpart on the other side, the same word, another form of it, or
 * a compound of two words of the other side or a piece of one.  The
 * document's words go to dv; returns their number. */
static size_t align_words(const sim_work *w, uint32_t d, wview *dv, unsigned char *dm,
			  unsigned char *qm)
{
	const sim_index *x = w->x;
	wview qv[SIM_QUERY_MAX / 2 + 1];
	size_t nq = w->qw.n, nd = 0;
	size_t ws = x->wstart.v[d], we = x->wstart.v[d + 1];

	for (size_t j = ws; j < we && nd < SIM_STEM_WORDS; j++) {
		uint32_t u = x->wterm.v[j];
		if (j > ws && u == x->wterm.v[j - 1])
			continue;
		dv[nd] = (wview){x->wtext.data + x->woff.v[u], x->wlen.v[u], u};
		dm[nd++] = 0;
	}
	for (size_t i = 0; i < nq; i++) {
		const qterm *t = &w->qw.v[i];
		qv[i] = (wview){w->q + t->off, t->len, t->id};
		qm[i] = 0;
	}
	for (size_t i = 0; i < nq; i++)
		for (size_t j = 0; j < nd; j++)
			if (same_word(&qv[i], &dv[j]) || cut_short(&qv[i], &dv[j]))
				qm[i] = dm[j] = 1;
	if (nq > SIM_PIECE_WORDS || nd > SIM_PIECE_WORDS)
		return nd;
	size_t a, b;
	for (size_t j = 0; j < nd; j++)
		if (!dm[j] && compound_of(&dv[j], qv, nq, &a, &b))
			dm[j] = qm[a] = qm[b] = 1;
	for (size_t i = 0; i < nq; i++)
		if (!qm[i] && compound_of(&qv[i], dv, nd, &a, &b))
			qm[i] = dm[a] = dm[b] = 1;
	return nd;
}

/* Exact measures of the prepared query against doc d. */
static void score_doc(const sim_work *w, uint32_t d, sim_hit *hit)
{
	const sim_index *x = w->x;
	double dot = 0;

	size_t k = x->gstart.v[d], ke = x->gstart.v[d + 1];
	for (size_t i = 0; i < w->qg.n && w->qg.v[i].id != UINT32_MAX; i++) {
		uint32_t t = w->qg.v[i].id;
		while (k < ke && x->gterm.v[k] < t)
			k++;
		size_t e = k;
		while (e < ke && x->gterm.v[e] == t)
			e++;
		if (e > k)
			dot += (w->qg.v[i].tf * x->gidf[t]) * ((double)(e - k) * x->gidf[t]);
		k = e;
	}
	hit->doc = d;
	hit->cos = w->qnorm > 0 && x->dnorm[d] > 0 ? dot / (w->qnorm * x->dnorm[d]) : 0;
	if (hit->cos > 1)
		hit->cos = 1;

	wview dv[SIM_STEM_WORDS];
	unsigned char dm[SIM_STEM_WORDS], qm[SIM_QUERY_MAX / 2 + 1];
	size_t nd = align_words(w, d, dv, dm, qm);

	double dlen = (double)(x->wstart.v[d + 1] - x->wstart.v[d]);
	double bm = 0;
	double kd = SIM_BM25_K1 * (1 - SIM_BM25_B + SIM_BM25_B * dlen / x->avgdl);
	k = x->wstart.v[d];
	ke = x->wstart.v[d + 1];
	for (size_t i = 0; i < w->qw.n; i++) {
		uint32_t t = w->qw.v[i].id;
		size_t f = 0;
		if (t != UINT32_MAX) {
			while (k < ke && x->wterm.v[k] < t)
				k++;
			size_t e = k;
			while (e < ke && x->wterm.v[e] == t)
				e++;
			f = e - k;
			k = e;
		}
		if (!f && qm[i])
			f = 1;
		if (f)
			bm += word_idf(x, t) * (double)f * (SIM_BM25_K1 + 1) / ((double)f + kd);
	}
	hit->bm25 = bm;
	hit->bm25n = w->self > 0 ? bm / w->self : 0;
	if (hit->bm25n > 1)
		hit->bm25n = 1;
	double dall = 0, dhit = 0;
	for (size_t j = 0; j < nd; j++) {
		dall += x->widf[dv[j].id];
		dhit += dm[j] ? x->widf[dv[j].id] : 0;
	}
	hit->dcov = dall > 0 ? dhit / dall : 0;
	hit->s = SIM_W_CHAR * hit->cos + SIM_W_WORD * hit->bm25n * hit->dcov;
}

int sim_pair(const sim_index *x, sim_work *w, const char *q, size_t n, uint32_t doc,
	     sim_hit *hit)
{
	memset(hit, 0, sizeof *hit);
	if (!x->finished || doc >= x->ndoc)
		return TM_OK;
	if (prepare(w, q, n))
		return TM_ENOMEM;
	score_doc(w, doc, hit);
	return TM_OK;
}

/* Is document a a better candidate than b (larger sum, then lower number)? */
static int better(const float *acc, uint32_t a, uint32_t b)
{
	return acc[a] > acc[b] || (acc[a] == acc[b] && a < b);
}

static void sift_down(const float *acc, uint32_t *h, size_t n, size_t i)
{
	for (;;) {
		size_t l = 2 * i + 1, r = l + 1, m = i;
		if (l < n && better(acc, h[m], h[l]))
			m = l;
		if (r < n && better(acc, h[m], h[r]))
			m = r;
		if (m == i)
			return;
		uint32_t t = h[i];
		h[i] = h[m];
		h[m] = t;
		i = m;
	}
}

static int cmp_hit(const void *a, const void *b)
{
	const sim_hit *x = a, *y = b;
	if (x->s != y->s)
		return x->s > y->s ? -1 : 1;
	return (x->doc > y->doc) - (x->doc < y->doc);
}

typedef struct gorder { uint32_t df, i; } gorder;

static int cmp_gorder(const void *a, const void *b)
{
	const gorder *x = a, *y = b;
	if (x->df != y->df)
		return x->df < y->df ? -1 : 1;
	return (x->i > y->i) - (x->i < y->i);
}

int sim_query(const sim_index *x, sim_work *w, const char *q, size_t n,
	      sim_hit *hits, size_t max, size_t *nhits)
{
	*nhits = 0;
	if (!x->finished || !x->ndoc)
		return TM_OK;
	if (!w->acc && !(w->acc = calloc(x->ndoc, sizeof *w->acc)))
		return TM_ENOMEM;
	if (prepare(w, q, n))
		return TM_ENOMEM;
	gorder ord[SIM_QUERY_MAX + 8];
	size_t no = 0;
	for (size_t i = 0; i < w->qg.n && no < SIM_QUERY_MAX + 8; i++)
		if (w->qg.v[i].id != UINT32_MAX)
			ord[no++] = (gorder){x->gdf[w->qg.v[i].id], (uint32_t)i};
	tm_qsort(ord, no, sizeof *ord, cmp_gorder);

	size_t work = 0;
	/* each posting read touches at most one document: room for all of
	 * them once, then no check per posting */
	if (w->touched.cap < SIM_WORK) {
		uint32_t *v = tm_grow(w->touched.v, &w->touched.cap, SIM_WORK, sizeof *v, SIM_WORK);
		if (!v)
			return TM_ENOMEM;
		w->touched.v = v;
	}
	w->touched.n = 0;
	for (size_t j = 0; j < no; j++) {
		const qterm *t = &w->qg.v[ord[j].i];
		size_t len = x->pstart[t->id + 1] - x->pstart[t->id];
		if (work + len > SIM_WORK) {
			if (work > 0)
				break;
			len = SIM_WORK;
		}
		work += len;
		float qw = (float)(t->tf * x->gidf[t->id] * x->gidf[t->id]);
		const uint32_t *p = x->pdoc + x->pstart[t->id];
		for (size_t k = 0; k < len; k++) {
			uint32_t d = p[k];
			if (w->acc[d] == 0)
				w->touched.v[w->touched.n++] = d;
			w->acc[d] += x->dnorm[d] > 0 ? qw / x->dnorm[d] : 0;
		}
	}
	/* the SIM_CANDIDATES best sums: a heap whose root is the worst kept */
	size_t nc = 0;
	for (size_t i = 0; i < w->touched.n; i++) {
		uint32_t d = w->touched.v[i];
		if (nc < SIM_CANDIDATES) {
			w->cand[nc++] = d;
			if (nc == SIM_CANDIDATES)
				for (size_t k = nc / 2; k-- > 0;)
					sift_down(w->acc, w->cand, nc, k);
		} else if (better(w->acc, d, w->cand[0])) {
			w->cand[0] = d;
			sift_down(w->acc, w->cand, nc, 0);
		}
	}
	for (size_t i = 0; i < w->touched.n; i++)
		w->acc[w->touched.v[i]] = 0;
	size_t ne = 0;
	for (size_t i = 0; i < nc; i++) {
		score_doc(w, w->cand[i], &w->exact[ne]);
		if (w->exact[ne].s > 0)
			ne++;
	}
	tm_qsort(w->exact, ne, sizeof *w->exact, cmp_hit);
	for (size_t i = 0; i < ne && i < max; i++)
		hits[(*nhits)++] = w->exact[i];
	return TM_OK;
}

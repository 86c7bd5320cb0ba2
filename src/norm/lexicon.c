/* lexicon.c - the lexicon's tries, its vocabulary and the lookups the
 * normaliser makes per token (lexicon_read.c fills them, lexicon_image.c
 * writes and reads their compiled image). */
#include "norm/lexicon_impl.h"

#include <stddef.h>
#include <sys/mman.h>
#include <stdlib.h>
#include <string.h>

static inline size_t edge_slot(uint64_t key, size_t cap)
{
	key ^= key >> 33;
	key *= 0xFF51AFD7ED558CCDULL;
	key ^= key >> 33;
	return (size_t)key & (cap - 1);
}

static int trie_init(trie *t, size_t edgecap, size_t nodecap)
{
	t->edgecap = edgecap;
	t->edges = calloc(edgecap, sizeof *t->edges);
	t->nodecap = nodecap;
	t->nodes = calloc(nodecap, sizeof *t->nodes);
	t->nnode = 1;
	return t->edges && t->nodes ? 0 : -1;
}

/* The child of node n by symbol sym (not 0), or 0. */
static uint32_t trie_get(const trie *t, uint32_t n, uint32_t sym)
{
	uint64_t key = (uint64_t)n << 32 | sym;
	size_t j, m = t->edgecap - 1;

	for (j = edge_slot(key, t->edgecap); t->edges[j].key; j = (j + 1) & m)
		if (t->edges[j].key == key)
			return t->edges[j].child;
	return 0;
}

static int grow_edges(trie *t)
{
	size_t cap = t->edgecap * 2, i, j;
	edge *e = calloc(cap, sizeof *e);
	if (!e)
		return -1;
	for (i = 0; i < t->edgecap; i++) {
		if (!t->edges[i].key)
			continue;
		for (j = edge_slot(t->edges[i].key, cap); e[j].key; j = (j + 1) & (cap - 1))
			;
		e[j] = t->edges[i];
	}
	free(t->edges);
	t->edges = e;
	t->edgecap = cap;
	return 0;
}

/* A new node; 0 when memory ran out. */
uint32_t lex_trie_node(trie *t)
{
	if (t->nnode == t->nodecap) {
		node *p = tm_grow(t->nodes, &t->nodecap, t->nnode + 1, sizeof *p, 64);
		if (!p)
			return 0;
		t->nodes = p;
	}
	t->nodes[t->nnode].first = 0;
	t->nodes[t->nnode].cats = 0;
	return (uint32_t)t->nnode++;
}

/* The child of node n by symbol sym, made when missing; 0 when memory
 * ran out. */
uint32_t lex_trie_add(trie *t, uint32_t n, uint32_t sym)
{
	uint64_t key = (uint64_t)n << 32 | sym;
	uint32_t c = trie_get(t, n, sym);
	size_t j;

	if (c)
		return c;
	if ((t->nedge + 1) * 2 > t->edgecap && grow_edges(t) != 0)
		return 0;
	if (!(c = lex_trie_node(t)))
		return 0;
	for (j = edge_slot(key, t->edgecap); t->edges[j].key; j = (j + 1) & (t->edgecap - 1))
		;
	t->edges[j].key = key;
	t->edges[j].child = c;
	t->nedge++;
	return c;
}

lexicon *lex_new(void)
{
	lexicon *lx = calloc(1, sizeof *lx);
	if (!lx)
		return NULL;
	/* sized for the bundled lexicons (about 110,000 phrases over some
	 * 96,000 words, 44,000 edges below the root; tables at most half
	 * full), so loading them never rehashes */
	lx->voccap = 1 << 18;
	lx->voc = calloc(lx->voccap, sizeof *lx->voc);
	lx->wordcap = 1 << 17;
	lx->words = calloc(lx->wordcap, sizeof *lx->words);
	lx->h.root = calloc(lx->wordcap, sizeof *lx->h.root);
	lx->h.wnext = calloc(lx->wordcap, 1);
	lx->entcap = 1 << 17;
	lx->h.ent = calloc(lx->entcap, sizeof *lx->h.ent);
	lx->nent = 1;
	if (!lx->voc || !lx->words || !lx->h.root || !lx->h.wnext || !lx->h.ent ||
	    trie_init(&lx->ph, 1 << 17, 1 << 17) || trie_init(&lx->sfx, 1 << 14, 1 << 13) ||
	    buf_putc(&lx->strs, 0) != 0) {
		lex_free(lx);
		return NULL;
	}
	return lx;
}

/* The gendered pairs, the only arrays an image is not read into. */
void lex_free_pairs(lexicon *lx)
{
	for (size_t i = 0; i < lx->npairs; i++) {
		free((char *)lx->pairs[i].masc);
		free((char *)lx->pairs[i].fem);
	}
	free(lx->pairs);
	free(lx->byfem);
	lx->pairs = NULL;
	lx->byfem = NULL;
	lx->npairs = 0;
}

static void release_image(lexicon *lx)
{
	if (lx->mapped)
		munmap(lx->image, lx->imagelen);
	else
		free(lx->image);
	lx->image = NULL;
}

static void *dup_array(const void *p, size_t n, size_t size, size_t cap)
{
	void *m = malloc(cap * size);
	if (m)
		memcpy(m, p, n * size);
	return m;
}

/* Before the first change of a lexicon read in place from its image:
 * its arrays copied out into memory of its own (with room to grow as
 * lex_add expects) and the image released.  Returns 0 or -1 (memory;
 * the lexicon unchanged). */
int lex_own_image(lexicon *lx)
{
	wslot *v;
	wordrec *w;
	uint32_t *r;
	uint8_t *x;
	edge *pe, *se;
	node *pn, *sn;
	lex_entry *e;
	uint32_t *kb, *kd;
	tm_buf st = {0};

	if (!lx->image)
		return 0;
	kb = dup_array(lx->skbeg, lx->sfx.nnode + 1, sizeof *kb, lx->sfx.nnode + 1);
	kd = dup_array(lx->skid, lx->sfx.nedge, sizeof *kd, lx->sfx.nedge + 1);
	v = dup_array(lx->voc, lx->voccap, sizeof *v, lx->voccap);
	w = dup_array(lx->words, lx->nvoc + 1, sizeof *w, lx->wordcap);
	r = dup_array(lx->h.root, lx->nvoc + 1, sizeof *r, lx->wordcap);
	x = dup_array(lx->h.wnext, lx->nvoc + 1, 1, lx->wordcap);
	pe = dup_array(lx->ph.edges, lx->ph.edgecap, sizeof *pe, lx->ph.edgecap);
	pn = dup_array(lx->ph.nodes, lx->ph.nnode, sizeof *pn, lx->ph.nodecap);
	se = dup_array(lx->sfx.edges, lx->sfx.edgecap, sizeof *se, lx->sfx.edgecap);
	sn = dup_array(lx->sfx.nodes, lx->sfx.nnode, sizeof *sn, lx->sfx.nodecap);
	e = dup_array(lx->h.ent, lx->nent, sizeof *e, lx->entcap);
	if (!v || !w || !r || !x || !pe || !pn || !se || !sn || !e || !kb || !kd ||
	    buf_append(&st, lx->strs.data, lx->strs.len) != 0) {
		free(v), free(w), free(r), free(x), free(pe), free(pn), free(se), free(sn);
		free(e), free(kb), free(kd);
		buf_free(&st);
		return -1;
	}
	release_image(lx);
	lx->voc = v;
	lx->words = w;
	lx->h.root = r;
	lx->h.wnext = x;
	lx->ph.edges = pe;
	lx->ph.nodes = pn;
	lx->sfx.edges = se;
	lx->sfx.nodes = sn;
	lx->h.ent = e;
	lx->skbeg = kb;
	lx->skid = kd;
	lx->strs = st;
	return 0;
}

void lex_free(lexicon *lx)
{
	if (!lx)
		return;
	if (lx->image)
		release_image(lx);
	else {
		free(lx->voc);
		free(lx->words);
		free(lx->h.root);
		free(lx->h.wnext);
		free(lx->ph.edges);
		free(lx->ph.nodes);
		free(lx->sfx.edges);
		free(lx->sfx.nodes);
		free(lx->h.ent);
		free(lx->skbeg);
		free(lx->skid);
		buf_free(&lx->strs);
	}
	lex_free_pairs(lx);
	uni_ctx_free(&lx->u);
	tok_line_free(&lx->tl);
	buf_free(&lx->work);
	free(lx);
}

/* ---- the vocabulary and the phrase trie ---- */

uint32_t lex_word(const lexicon *lx, const char *fold, size_t len, uint64_t h)
{
	uint64_t m = word_mix(h);
	uint32_t fp = (uint32_t)(m >> 32);
	size_t mask = lx->voccap - 1, j = (size_t)m & mask;
	const wslot *v = lx->voc;

	for (; v[j].id; j = (j + 1) & mask)
		if (v[j].fp == fp) {
			const wordrec *w = &lx->words[v[j].id];
			if (w->len == len && !memcmp(lx->strs.data + w->str, fold, len))
				return v[j].id;
		}
	return 0;
}

int lex_grow_vocab(lexicon *lx)
{
	size_t cap = lx->voccap * 2, i, m = cap - 1;
	wslot *v = calloc(cap, sizeof *v);
	if (!v)
		return -1;
	for (i = 0; i < lx->voccap; i++) {
		const wordrec *w;
		size_t j;
		if (!lx->voc[i].id)
			continue;
		w = &lx->words[lx->voc[i].id];
		for (j = (size_t)word_mix(tok_hash(lx->strs.data + w->str, w->len)) & m; v[j].id;
		     j = (j + 1) & m)
			;
		v[j] = lx->voc[i];
	}
	free(lx->voc);
	lx->voc = v;
	lx->voccap = cap;
	return 0;
}

int lex_grow_words(lexicon *lx)
{
	/* the three arrays double alike from wordcap to cap */
	size_t cap = lx->wordcap, rcap = cap, xcap = cap;
	wordrec *w = tm_grow(lx->words, &cap, lx->wordcap + 1, sizeof *w, 64);
	uint32_t *r;
	uint8_t *x;
	if (!w)
		return -1;
	lx->words = w;
	if (!(r = tm_grow(lx->h.root, &rcap, cap, sizeof *r, 64)))
		return -1;
	memset(r + lx->wordcap, 0, (cap - lx->wordcap) * sizeof *r);
	lx->h.root = r;
	if (!(x = tm_grow(lx->h.wnext, &xcap, cap, 1, 64)))
		return -1;
	memset(x + lx->wordcap, 0, cap - lx->wordcap);
	lx->h.wnext = x;
	lx->wordcap = cap;
	return 0;
}

uint32_t lex_step_below(const lexicon *lx, uint32_t n, uint32_t id)
{
	return trie_get(&lx->ph, n, id);
}

static const lex_entry *node_entry(const lexicon *lx, const node *nd,
				   uint32_t *cats)
{
	if (!nd->first)
		return NULL;
	if (cats)
		*cats = nd->cats;
	return &lx->h.ent[nd->first];
}

const lex_entry *lex_phrase(const lexicon *lx, uint32_t n, uint32_t *cats)
{
	return n < lx->ph.nnode ? node_entry(lx, &lx->ph.nodes[n], cats) : NULL;
}

/* The ending trie's children packed by node (see skbeg): 0, or -1
 * (memory; too many nodes for 24 bits). */
int lex_pack_kids(const lexicon *lx, uint32_t **kbeg, uint32_t **kid)
{
	const trie *t = &lx->sfx;
	uint32_t *b, *k;

	*kbeg = *kid = NULL;
	if (t->nnode >= 1u << 24)
		return -1;
	b = calloc(t->nnode + 1, sizeof *b);
	k = malloc((t->nedge + 1) * sizeof *k);
	if (!b || !k) {
		free(b);
		free(k);
		return -1;
	}
	for (size_t i = 0; i < t->edgecap; i++)
		if (t->edges[i].key)
			b[(t->edges[i].key >> 32) + 1]++;
	for (size_t i = 0; i < t->nnode; i++)
		b[i + 1] += b[i];
	/* placed, then each node's run sorted by byte (insertion: runs are
	 * short) */
	{
		uint32_t *at = malloc((t->nnode + 1) * sizeof *at);
		if (!at) {
			free(b);
			free(k);
			return -1;
		}
		memcpy(at, b, (t->nnode + 1) * sizeof *at);
		for (size_t i = 0; i < t->edgecap; i++)
			if (t->edges[i].key)
				k[at[t->edges[i].key >> 32]++] =
					t->edges[i].child << 8 | (uint32_t)(t->edges[i].key & 255);
		free(at);
	}
	for (size_t n = 0; n < t->nnode; n++)
		for (uint32_t i = b[n] + 1; i < b[n + 1]; i++) {
			uint32_t v = k[i], j = i;
			for (; j > b[n] && (k[j - 1] & 255) > (v & 255); j--)
				k[j] = k[j - 1];
			k[j] = v;
		}
	*kbeg = b;
	*kid = k;
	return 0;
}

int lex_freeze(lexicon *lx)
{
	uint32_t *b, *k;

	if (lx->skbeg)
		return 0;
	if (lex_pack_kids(lx, &b, &k) != 0)
		return -1;
	lx->skbeg = b;
	lx->skid = k;
	memset(lx->skroot, 0, sizeof lx->skroot);
	for (uint32_t i = b[0]; i < b[1]; i++)
		lx->skroot[k[i] & 255] = k[i] >> 8;
	return 0;
}

const lex_entry *lex_ending(const lexicon *lx, const char *fold, size_t len,
			    size_t *elen)
{
	const node *best = NULL;
	uint32_t n = 0;

	if (!lx->sfx.nedge || !len)
		return NULL;
	/* most words end in no ending: told by one bit */
	{
		unsigned c = (unsigned char)fold[len - 1];
		if (!(lx->sfx1[c >> 6] >> (c & 63) & 1) &&
		    (len < 2 || !(lx->sfx2[(c << 8 | (unsigned char)fold[len - 2]) >> 6] >>
				  ((unsigned char)fold[len - 2] & 63) & 1)))
			return NULL;
	}
	/* backwards from the last byte while some ending goes on: at most
	 * as many steps as the longest ending has bytes; each step a scan of
	 * the node's packed children (a cache line or two) when they are
	 * built, a probe of the edge table otherwise */
	if (lx->skbeg) {
		size_t i = len - 1;
		/* the root's child by direct index: its run is every letter */
		if (!(n = lx->skroot[(unsigned char)fold[i]]))
			return NULL;
		if (lx->sfx.nodes[n].first) {
			best = &lx->sfx.nodes[n];
			*elen = 1;
		}
		while (i-- > 0) {
			uint32_t c = (unsigned char)fold[i], k = lx->skbeg[n], e = lx->skbeg[n + 1];
			/* halved while the run is long (the root's and its
			 * children's: every letter), then scanned */
			while (e - k > 8) {
				uint32_t m = k + (e - k) / 2;
				if ((lx->skid[m] & 255) <= c)
					k = m;
				else
					e = m;
			}
			while (k < e && (lx->skid[k] & 255) < c)
				k++;
			if (k == e || (lx->skid[k] & 255) != c)
				break;
			n = lx->skid[k] >> 8;
			if (lx->sfx.nodes[n].first) {
				best = &lx->sfx.nodes[n];
				*elen = len - i;
			}
		}
		return best ? node_entry(lx, best, NULL) : NULL;
	}
	for (size_t i = len; i-- > 0;) {
		if (!(n = trie_get(&lx->sfx, n, (unsigned char)fold[i])))
			break;
		if (lx->sfx.nodes[n].first) {
			best = &lx->sfx.nodes[n];
			*elen = len - i;
		}
	}
	return best ? node_entry(lx, best, NULL) : NULL;
}

const lex_pair *lex_pairs(const lexicon *lx, size_t *n)
{
	*n = lx->npairs;
	return lx->pairs;
}

const uint32_t *lex_pairs_fem_last(const lexicon *lx, int c, size_t *n)
{
	size_t g = c < 0 ? 256 : (unsigned char)c;
	*n = lx->femat[g + 1] - lx->femat[g];
	return lx->byfem + lx->femat[g];
}

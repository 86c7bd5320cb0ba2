/* lexicon.c - loading and compiling the noise lexicons. */
#include "norm/lexicon.h"

#include <dirent.h>
#include <stddef.h>
#include <sys/mman.h>
#include <sys/stat.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "core/digest.h"
#include "norm/token.h"
#include "norm/unicode.h"


/* The vocabulary: every token of every phrase, with its id (1-based).
 * An open-addressing table of 8-byte slots (eight to a cache line), each
 * a fingerprint of the word's hash beside its id, so that a probe for a
 * word the lexicon does not hold (most words of a title) reads one line
 * and compares no string; the table is at most half full.  The fold of
 * word id is words[id], an offset and length into lx->strs. */
typedef struct wslot {
	uint32_t fp;    /* the high half of the mixed hash */
	uint32_t id;    /* 0: empty slot */
} wslot;

typedef struct wordrec {
	uint32_t str;   /* offset of the fold in lx->strs */
	uint32_t len;
} wordrec;

/* A trie: nodes (0 is the root) and its edges (node, symbol) -> node in
 * one open-addressing table.  The phrase trie's symbols are word ids;
 * the ending trie's are the bytes of a word's fold, read backwards. */
typedef struct edge {
	uint64_t key;   /* node << 32 | symbol; 0: empty slot (no edge
			 * enters the root, and no symbol is 0) */
	uint32_t child;
	uint32_t pad;   /* 0: the slot is written to the cache as it is */
} edge;

/* A node: the entries of what ends there (index into lx->h.ent, 0 when
 * the node only leads on) and their categories. */
typedef struct node {
	uint32_t first;
	uint32_t cats;
} node;

typedef struct trie {
	edge *edges;     /* power-of-two size, at most half full */
	size_t edgecap, nedge;
	node *nodes;
	size_t nnode, nodecap;
} trie;

struct lexicon {
	lex_head h;      /* first: the inline readers of lexicon.h see it
			  * (entries; root and wnext by word id: see there) */
	wslot *voc;      /* open addressing, power-of-two size */
	size_t voccap, nvoc;
	wordrec *words;  /* words[id], ids 1..nvoc */
	size_t wordcap;  /* of words, root and wnext */
	trie ph;         /* the phrases, over word ids */
	trie sfx;        /* occupational endings, over reversed fold bytes */
	uint64_t sfx2[1024]; /* bit last << 8 | second last byte: some
			      * ending of two bytes or more ends so */
	uint64_t sfx1[4];    /* bit last byte: an ending of one byte */
	uint32_t *skbeg; /* the ending trie's children packed (lex_freeze):
			  * node n's are skid[skbeg[n]..skbeg[n+1]), each
			  * child << 8 | byte, by byte; NULL: not built */
	uint32_t *skid;
	uint32_t skroot[256]; /* the root's child by byte, 0 none (with skbeg) */
	size_t nent, entcap; /* of h.ent */
	tm_buf strs;
	lex_pair *pairs;
	size_t npairs, paircap;
	uint32_t *byfem;     /* pair indices grouped by the feminine ending's
			      * last byte (group 256: empty ending), in
			      * file order within a group */
	uint32_t femat[258]; /* group g: byfem[femat[g]..femat[g+1]) */
	void *image;     /* the image the arrays above are read from in place
			  * (lex_image_use), or NULL: they are malloc'd */
	size_t imagelen;
	int mapped;      /* the image is a mapping (munmap), else malloc'd */
	uni_ctx u;
	tok_line tl;
	tm_buf work;
};

static const char *const cat_names[LC_NCAT] = {
	"gender", "seniority", "schedule", "pay", "reference", "marketing",
	"employer", "location", "places", "protect", "units", "occupation",
	"business",
};

const char *lex_cat_name(int cat)
{
	return cat >= 0 && cat < LC_NCAT ? cat_names[cat] : "?";
}

static const char *const v_seniority[] = {"entry", "junior", "mid", "senior",
					  "lead", NULL};
static const char *const v_schedule[] = {
	"full_time", "part_time", "marginal", "temporary", "permanent",
	"freelance", "remote", "hybrid", "onsite", "shift", "night",
	"weekend", "seasonal", "student", "flexible", NULL};
static const char *const v_pay[] = {"phrase", "currency", "unit", "lead", NULL};
static const char *const v_reference[] = {"keyword", NULL};
static const char *const v_employer[] = {"marker", "legal", NULL};
static const char *const v_location[] = {"prep", "before", "after",
					 "country-code", NULL};
static const char *const v_unit[] = {"hours", "week", "month", "year", "day", "contact",
				     "workload", "fte",
				     "connector", "degree", "weekday", "post",
				     NULL};
static const char *const v_occupation[] = {"head", "suffix", "field", NULL};
static const char *const v_business[] = {"kind", "legal", "article", NULL};
static const char *const v_none[] = {"-", NULL};

static const char *const *allowed_values(int cat)
{
	switch (cat) {
	case LC_SENIORITY: return v_seniority;
	case LC_SCHEDULE: return v_schedule;
	case LC_PAY: return v_pay;
	case LC_REFERENCE: return v_reference;
	case LC_EMPLOYER: return v_employer;
	case LC_LOCATION: return v_location;
	case LC_UNIT: return v_unit;
	case LC_OCCUPATION: return v_occupation;
	case LC_BUSINESS: return v_business;
	case LC_PLACE: return NULL; /* country codes, checked apart */
	default: return v_none;
	}
}

/* The home slot of an edge: every bit of the node and of the symbol
 * mixed into the low bits (fmix64 of MurmurHash3). */
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
static uint32_t trie_node(trie *t)
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
static uint32_t trie_add(trie *t, uint32_t n, uint32_t sym)
{
	uint64_t key = (uint64_t)n << 32 | sym;
	uint32_t c = trie_get(t, n, sym);
	size_t j;

	if (c)
		return c;
	if ((t->nedge + 1) * 2 > t->edgecap && grow_edges(t) != 0)
		return 0;
	if (!(c = trie_node(t)))
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
static void lex_free_pairs(lexicon *lx)
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
static int own_image(lexicon *lx)
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

/* tok_hash mixed again (fmix64 of MurmurHash3): the slot from the low
 * bits, the fingerprint from the high half. */
static inline uint64_t word_mix(uint64_t h)
{
	h ^= h >> 33;
	h *= 0xFF51AFD7ED558CCDULL;
	h ^= h >> 33;
	h *= 0xC4CEB9FE1A85EC53ULL;
	h ^= h >> 33;
	return h;
}

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

static int grow_vocab(lexicon *lx)
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

static int grow_words(lexicon *lx)
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

/* The id of a word, added when new; 0 when memory ran out.  Ids stay
 * below wordcap, so words[] and root[] have a slot for each. */
static uint32_t add_word(lexicon *lx, const char *fold, size_t len, uint64_t h)
{
	uint32_t id = lex_word(lx, fold, len, h);
	uint64_t m;
	size_t j;

	if (id)
		return id;
	if ((lx->nvoc + 2) * 2 > lx->voccap && grow_vocab(lx) != 0)
		return 0;
	if (lx->nvoc + 2 > lx->wordcap && grow_words(lx) != 0)
		return 0;
	if (len > UINT32_MAX || lx->nvoc + 1 >= UINT32_MAX || buf_append(&lx->strs, fold, len) != 0)
		return 0;
	m = word_mix(h);
	for (j = (size_t)m & (lx->voccap - 1); lx->voc[j].id; j = (j + 1) & (lx->voccap - 1))
		;
	id = (uint32_t)++lx->nvoc;
	lx->words[id].str = (uint32_t)(lx->strs.len - len);
	lx->words[id].len = (uint32_t)len;
	lx->voc[j].fp = (uint32_t)(m >> 32);
	lx->voc[j].id = id;
	return id;
}

uint32_t lex_step_below(const lexicon *lx, uint32_t n, uint32_t id)
{
	return trie_get(&lx->ph, n, id);
}

/* The phrase trie's child of node n by word id, made when missing; 0
 * when memory ran out. */
static uint32_t add_step(lexicon *lx, uint32_t n, uint32_t id)
{
	uint32_t c;

	if (!id)
		return 0;
	if (n != LEX_ROOT) {
		lx->h.wnext[id] = 1;
		return trie_add(&lx->ph, n, id);
	}
	if (!lx->h.root[id] && (c = trie_node(&lx->ph)))
		lx->h.root[id] = c;
	return lx->h.root[id];
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
static int pack_kids(const lexicon *lx, uint32_t **kbeg, uint32_t **kid)
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
	if (pack_kids(lx, &b, &k) != 0)
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

static int parse_lang(const char *lang, char out[4], uint8_t *amb)
{
	size_t n = strlen(lang), i;

	*amb = 0;
	if (n && lang[n - 1] == '?') {
		*amb = 1;
		n--;
	}
	if (n == 1 && lang[0] == '*') {
		out[0] = 0;
		return *amb ? -1 : 0;
	}
	if (n < 2 || n > 3)
		return -1;
	for (i = 0; i < n; i++) {
		if (lang[i] < 'a' || lang[i] > 'z')
			return -1;
		out[i] = lang[i];
	}
	out[n] = 0;
	return 0;
}

static int err_printf(tm_buf *err, const char *fmt, const char *a,
		      const char *b)
{
	char msg[512];
	buf_reset(err);
	snprintf(msg, sizeof msg, fmt, a, b);
	buf_puts(err, msg);
	return -1;
}

/* Folds text into tokens in lx->tl; returns the number of units. */
static int fold_units(lexicon *lx, const char *s, size_t n,
		      const char **fold, uint32_t *flen, uint64_t *th, int max)
{
	size_t k;
	int nu = 0;

	buf_reset(&lx->work);
	if (uni_fold(&lx->u, s, n, &lx->work) != 0)
		return -1;
	/* one word of ASCII letters, most place names: one token, as the
	 * tokeniser would make it */
	{
		const char *w = lx->work.data;
		size_t wl = lx->work.len, i;
		for (i = 0; i < wl && w[i] >= 'a' && w[i] <= 'z'; i++)
			;
		if (wl && i == wl && max >= 1) {
			fold[0] = w;
			flen[0] = (uint32_t)wl;
			th[0] = tok_hash(w, wl);
			return 1;
		}
	}
	if (tok_split_folded(&lx->tl, &lx->u, lx->work.data, lx->work.len) != 0)
		return -1;
	for (k = 0; k < lx->tl.n; k++) {
		const tm_tok *t = &lx->tl.t[k];
		if (t->kind == TK_PUNCT)
			continue;
		if (nu == max)
			return max + 1;
		fold[nu] = tok_fold(&lx->tl, t);
		flen[nu] = t->flen;
		th[nu] = t->hash;
		nu++;
	}
	return nu;
}

#define MAXTOK 12

/* Adds an entry to the list of node nd (a duplicate line adds nothing
 * and switches an entry on again).  Returns 0 or -1 (memory). */
static int add_entry(lexicon *lx, trie *t, uint32_t n, int cat, const char *lg,
		     uint8_t amb, const char *value, int where, const char *ph,
		     size_t plen)
{
	lex_entry *e;

	if (strlen(value) >= sizeof e->value)
		return -1;
	for (uint32_t r = t->nodes[n].first; r; r = lx->h.ent[r].next) {
		lex_entry *o = &lx->h.ent[r];
		if (o->cat == cat && o->where == where && o->amb == amb &&
		    !strcmp(o->lang, lg) && !strcmp(o->value, value)) {
			o->off = 0;
			return 0;
		}
	}
	if (lx->nent == lx->entcap) {
		lex_entry *p = tm_grow(lx->h.ent, &lx->entcap, lx->nent + 1, sizeof *p, 64);
		if (!p)
			return -1;
		lx->h.ent = p;
	}
	size_t idx = lx->nent++;
	e = &lx->h.ent[idx];
	memset(e, 0, sizeof *e);
	e->cat = (uint8_t)cat;
	e->where = (uint8_t)where;
	e->amb = amb;
	memcpy(e->lang, lg, 4);
	memcpy(e->value, value, strlen(value) + 1);
	{
		size_t up = 0, low = 0;
		for (size_t q = 0; q < plen; q++) {
			unsigned char c = (unsigned char)ph[q];
			up += c >= 'A' && c <= 'Z';
			low += c >= 'a' && c <= 'z';
		}
		e->caps = up >= 2 && low == 0;
	}
	/* appended to the end of the list: the order of the files is the
	 * order of the entries */
	if (!t->nodes[n].first)
		t->nodes[n].first = (uint32_t)idx;
	else {
		uint32_t q = t->nodes[n].first;
		while (lx->h.ent[q].next)
			q = lx->h.ent[q].next;
		lx->h.ent[q].next = (uint32_t)idx;
	}
	t->nodes[n].cats |= 1u << cat;
	return 0;
}

/* An occupational ending: one word (a hyphen before it is allowed:
 * "-fachkraft"), stored backwards in the ending trie. */
static int add_ending(lexicon *lx, const char *lg, uint8_t amb, const char *ph,
		      size_t plen, tm_buf *err)
{
	const char *fold[2];
	uint32_t flen[2];
	uint64_t th[2];
	uint32_t n = 0;
	int nu;

	if (plen && ph[0] == '-') {
		ph++;
		plen--;
	}
	nu = fold_units(lx, ph, plen, fold, flen, th, 1);
	if (nu < 0)
		return err_printf(err, "out of memory%s%s", "", "");
	if (nu != 1)
		return err_printf(err, "an ending is one word, without spaces or punctuation%s%s", "", "");
	/* the packed children no longer hold every ending */
	free(lx->skbeg);
	free(lx->skid);
	lx->skbeg = lx->skid = NULL;
	if (flen[0] == 1)
		lx->sfx1[(unsigned char)fold[0][0] >> 6] |= 1ULL << ((unsigned char)fold[0][0] & 63);
	else if (flen[0] >= 2) {
		unsigned c = (unsigned char)fold[0][flen[0] - 1] << 8 |
			     (unsigned char)fold[0][flen[0] - 2];
		lx->sfx2[c >> 6] |= 1ULL << (c & 63);
	}
	for (size_t i = flen[0]; i-- > 0 && n != UINT32_MAX;)
		if (!(n = trie_add(&lx->sfx, n, (unsigned char)fold[0][i])))
			n = UINT32_MAX;
	if (n == UINT32_MAX ||
	    add_entry(lx, &lx->sfx, n, LC_OCCUPATION, lg, amb, "suffix", LW_ANY, ph, plen))
		return err_printf(err, "out of memory%s%s", "", "");
	return 0;
}

int lex_add(lexicon *lx, int cat, const char *lang, const char *ph,
	    size_t plen, const char *value, int where, tm_buf *err)
{
	const char *fold[MAXTOK + 1];
	uint32_t flen[MAXTOK + 1];
	uint64_t th[MAXTOK + 1];
	char lg[4] = {0};
	uint8_t amb;
	int nu, k;
	const char *const *allowed = allowed_values(cat);

	if (own_image(lx) != 0)
		return err_printf(err, "out of memory%s%s", "", "");
	if (cat < 0 || cat >= LC_NCAT)
		return err_printf(err, "no category %s%s", "", "");
	if (parse_lang(lang, lg, &amb) != 0)
		return err_printf(err, "bad language '%s'%s", lang,
				  " (want a subtag like de, *, or fr?)");
	if (!value || !*value)
		value = "-";
	if (allowed) {
		for (k = 0; allowed[k] && strcmp(allowed[k], value); k++)
			;
		if (!allowed[k])
			return err_printf(err, "unknown value '%s' for %s",
					  value, lex_cat_name(cat));
	} else if (strcmp(value, "-") &&
		   !(strlen(value) == 2 && value[0] >= 'A' && value[0] <= 'Z' &&
		     value[1] >= 'A' && value[1] <= 'Z'))
		return err_printf(err, "bad country code '%s'%s", value,
				  " (want two capitals or -)");
	if ((cat == LC_OCCUPATION || cat == LC_BUSINESS) && where != LW_ANY)
		return err_printf(err, "no WHERE in %s/ (write LANG, PHRASE and VALUE)%s",
				  lex_cat_name(cat), "");
	if (!dec_is_utf8(ph, plen) || memchr(ph, 0, plen))
		return err_printf(err, "phrase is not valid UTF-8%s%s", "", "");
	if (cat == LC_OCCUPATION && !strcmp(value, "suffix"))
		return add_ending(lx, lg, amb, ph, plen, err);
	nu = fold_units(lx, ph, plen, fold, flen, th, MAXTOK);
	if (nu < 0)
		return err_printf(err, "out of memory%s%s", "", "");
	if (nu == 0)
		return 1;
	if (nu > MAXTOK)
		return err_printf(err, "phrase longer than 12 tokens%s%s", "", "");
	/* the phrase's node: walked, and made only for a phrase added */
	uint32_t n = LEX_ROOT;
	for (k = 0; k < nu && (n || k == 0); k++)
		n = where == LW_OFF ? lex_step(lx, n, lex_word(lx, fold[k], flen[k], th[k]))
				    : add_step(lx, n, add_word(lx, fold[k], flen[k], th[k]));
	if (where == LW_OFF) {
		for (const lex_entry *f = lex_phrase(lx, n, NULL); f; f = lex_next(lx, f))
			if (f->cat == cat && !strcmp(f->lang, lg))
				((lex_entry *)f)->off = 1;
		return 0;
	}
	if (!n || add_entry(lx, &lx->ph, n, cat, lg, amb, value, where, ph, plen))
		return err_printf(err, "out of memory%s%s", "", "");
	return 0;
}

static int add_pair(lexicon *lx, const char *lang, const char *masc,
		    size_t mlen, const char *fem, size_t flen, tm_buf *err)
{
	const char *fold[MAXTOK + 1];
	uint32_t fl[MAXTOK + 1];
	uint64_t th[MAXTOK + 1];
	lex_pair *p;
	char lg[4] = {0};
	uint8_t amb;
	char *m, *f;
	int nu;

	if (own_image(lx) != 0)
		return err_printf(err, "out of memory%s%s", "", "");
	if (parse_lang(lang, lg, &amb) != 0)
		return err_printf(err, "bad language '%s'%s", lang, "");
	if (mlen == 1 && masc[0] == '-')
		mlen = 0;
	if (flen && fem[0] == '-') { /* "-frau" is written with a hyphen */
		fem++;
		flen--;
	}
	if (!flen)
		return err_printf(err, "empty feminine ending%s%s", "", "");
	m = NULL;
	if (mlen) {
		nu = fold_units(lx, masc, mlen, fold, fl, th, 1);
		if (nu != 1)
			return err_printf(err, "ending '%.*s' is not one word",
					  masc, "");
		m = strndup(fold[0], fl[0]);
	} else
		m = strdup("");
	nu = fold_units(lx, fem, flen, fold, fl, th, 1);
	if (nu != 1) {
		free(m);
		return err_printf(err, "ending is not one word%s%s", "", "");
	}
	f = strndup(fold[0], fl[0]);
	if (m && f && lx->npairs == lx->paircap) {
		/* pairs and byfem double alike from paircap to cap */
		size_t cap = lx->paircap, bcap = cap;
		uint32_t *bf = NULL;
		if ((p = tm_grow(lx->pairs, &cap, lx->npairs + 1, sizeof *p, 64))) {
			lx->pairs = p;
			bf = tm_grow(lx->byfem, &bcap, cap, sizeof *bf, 64);
		}
		if (bf) {
			lx->byfem = bf;
			lx->paircap = cap;
		}
	}
	if (!m || !f || lx->npairs == lx->paircap) {
		free(m);
		free(f);
		return err_printf(err, "out of memory%s%s", "", "");
	}
	{
		/* the new pair goes to the end of its group (the ending
		 * as stored: at most 255 bytes) */
		size_t fe = strlen(f) > 255 ? 255 : strlen(f);
		size_t c = fe ? (unsigned char)f[fe - 1] : 256;
		uint32_t at = lx->femat[c + 1];
		memmove(lx->byfem + at + 1, lx->byfem + at,
			(lx->npairs - at) * sizeof *lx->byfem);
		lx->byfem[at] = (uint32_t)lx->npairs;
		for (size_t g = c + 1; g <= 257; g++)
			lx->femat[g]++;
	}
	p = &lx->pairs[lx->npairs++];
	memcpy(p->lang, lg, sizeof lg);
	p->amb = amb;
	p->masc = m;
	p->fem = f;
	p->mlen = (uint8_t)(strlen(m) > 255 ? 255 : strlen(m));
	p->flen = (uint8_t)(strlen(f) > 255 ? 255 : strlen(f));
	return 0;
}

enum { GK_NONE, GK_MARKERS, GK_SUFFIXES, GK_PAIRS };

static int parse_where(const char *w, int cat)
{
	if (!w || !*w)
		return cat == LC_PLACE ? LW_SLOT : LW_ANY;
	if (!strcmp(w, "any")) return LW_ANY;
	if (!strcmp(w, "edge")) return LW_EDGE;
	if (!strcmp(w, "alone")) return LW_ALONE;
	if (!strcmp(w, "slot")) return LW_SLOT;
	if (!strcmp(w, "strong")) return LW_STRONG;
	if (!strcmp(w, "off")) return LW_OFF;
	if (!strcmp(w, "adjective") && cat == LC_PLACE) return LW_ADJ;
	return -1;
}

static int file_error(tm_buf *err, const char *path, long line)
{
	char head[600];
	char *msg = strndup(err->data ? err->data : "", err->len);
	snprintf(head, sizeof head, "%s:%ld: %s", path, line, msg ? msg : "");
	free(msg);
	buf_reset(err);
	buf_puts(err, head);
	return -1;
}

int lex_read_text(const char *path, tm_buf *text, tm_buf *err)
{
	FILE *fp = fopen(path, "rb");
	size_t got;
	struct stat st;

	buf_reset(text);
	if (!fp) {
		buf_reset(err);
		buf_puts(err, path);
		buf_puts(err, ": ");
		buf_puts(err, strerror(errno));
		return -1;
	}
	if (fstat(fileno(fp), &st) == 0 && st.st_size > 0 &&
	    buf_reserve(text, (size_t)st.st_size + 1) != 0) {
		fclose(fp);
		return err_printf(err, "%s: out of memory%s", path, "");
	}
	/* grown only when full: a file read whole at its size is not
	 * copied again, and the read that finds the end leaves a byte free
	 * for the last line's terminator */
	for (;;) {
		if (text->cap == text->len && buf_reserve(text, 65536) != 0) {
			fclose(fp);
			return err_printf(err, "%s: out of memory%s", path, "");
		}
		got = fread(text->data + text->len, 1, text->cap - text->len, fp);
		if (got == 0)
			break;
		text->len += got;
	}
	if (ferror(fp)) {
		fclose(fp);
		return err_printf(err, "%s: read error%s", path, "");
	}
	fclose(fp);
	if (text->cap == text->len && buf_reserve(text, 1) != 0)
		return err_printf(err, "%s: out of memory%s", path, "");
	return 0;
}

int lex_load_file(lexicon *lx, int cat, int gk, const char *path, tm_buf *err)
{
	tm_buf text = {0};
	int rc = lex_read_text(path, &text, err);

	if (rc == 0)
		rc = lex_load_text(lx, cat, gk, path, text.data, text.len, err);
	buf_free(&text);
	return rc;
}

int lex_load_text(lexicon *lx, int cat, int gk, const char *path, char *data,
		  size_t size, tm_buf *err)
{
	size_t pos = 0;
	long line = 0;
	int rc = 0;
	struct {
		char *data;
		size_t len;
	} text = {data, size};

	if (text.len >= 3 && !memcmp(text.data, "\xEF\xBB\xBF", 3))
		pos = 3;
	while (pos < text.len && rc == 0) {
		char *s = text.data + pos, *nl, *f[5];
		size_t len, nf = 0;

		nl = memchr(s, '\n', text.len - pos);
		len = nl ? (size_t)(nl - s) : text.len - pos;
		pos += len + 1;
		line++;
		if (len && s[len - 1] == '\r')
			len--;
		s[len] = 0;
		if (len == 0 || s[0] == '#')
			continue;
		f[nf++] = s;
		for (char *q = memchr(s, '\t', len); q && nf < 5;
		     q = memchr(q + 1, '\t', (size_t)(s + len - q - 1))) {
			*q = 0;
			f[nf++] = q + 1;
		}
		if (nf > 4 || nf < 2 || (gk == GK_PAIRS && nf != 3)) {
			buf_reset(err);
			buf_puts(err, gk == GK_PAIRS
				 ? "want LANG<TAB>MASCULINE<TAB>FEMININE"
				 : "want 2 to 4 TAB-separated fields");
			rc = file_error(err, path, line);
			break;
		}
		if (gk == GK_PAIRS) {
			if (add_pair(lx, f[0], f[1], strlen(f[1]), f[2],
				     strlen(f[2]), err) != 0)
				rc = file_error(err, path, line);
		} else if (gk == GK_SUFFIXES) {
			if (add_pair(lx, f[0], "-", 1, f[1], strlen(f[1]), err) != 0)
				rc = file_error(err, path, line);
		} else {
			int w = parse_where(nf > 3 ? f[3] : NULL, cat);
			int r;
			if (nf > 3 && (cat == LC_OCCUPATION || cat == LC_BUSINESS)) {
				err_printf(err, "no WHERE in %s/ (want LANG<TAB>PHRASE<TAB>VALUE)%s",
					   lex_cat_name(cat), "");
				rc = file_error(err, path, line);
				break;
			}
			if (w < 0) {
				err_printf(err, "unknown place restriction '%s'%s",
					   f[3], " (any, edge, alone, slot, strong, off; places: adjective)");
				rc = file_error(err, path, line);
				break;
			}
			if (nf > 2 && !strcmp(f[2], "-"))
				f[2] = "-";
			r = lex_add(lx, cat, f[0], f[1], strlen(f[1]),
				    nf > 2 ? f[2] : "-", w, err);
			if (r < 0)
				rc = file_error(err, path, line);
		}
	}
	return rc;
}

static int cmp_str(const void *a, const void *b)
{
	return strcmp(*(char *const *)a, *(char *const *)b);
}

void lex_files_free(lex_file *f, size_t n)
{
	for (size_t i = 0; i < n; i++)
		free(f[i].path);
	free(f);
}

int lex_list_dir(const char *dir, lex_file **files, size_t *nfiles, tm_buf *err)
{
	int cat, rc = 0;
	size_t fcap = *nfiles;

	for (cat = 0; cat < LC_NCAT && rc == 0; cat++) {
		char path[4096];
		char **names = NULL;
		size_t n = 0, cap = 0, i;
		struct dirent *de;
		DIR *d;

		snprintf(path, sizeof path, "%s/%s", dir, cat_names[cat]);
		if (!(d = opendir(path)))
			continue;
		while ((de = readdir(d))) {
			size_t l = strlen(de->d_name);
			if (l < 5 || strcmp(de->d_name + l - 4, ".txt") ||
			    de->d_name[0] == '.')
				continue;
			if (n == cap) {
				char **p = tm_grow(names, &cap, n + 1, sizeof *p, 16);
				if (!p) {
					rc = -1;
					break;
				}
				names = p;
			}
			if (!(names[n] = strdup(de->d_name))) {
				rc = -1;
				break;
			}
			n++;
		}
		closedir(d);
		if (rc)
			err_printf(err, "%s: out of memory%s", path, "");
		else
			qsort(names, n, sizeof *names, cmp_str);
		for (i = 0; i < n && rc == 0; i++) {
			char fpath[4096 + 256];
			int gk = GK_NONE;
			snprintf(fpath, sizeof fpath, "%s/%s", path, names[i]);
			if (cat == LC_MARKER) {
				if (!strncmp(names[i], "markers", 7))
					gk = GK_MARKERS;
				else if (!strncmp(names[i], "suffixes", 8))
					gk = GK_SUFFIXES;
				else if (!strncmp(names[i], "pairs", 5))
					gk = GK_PAIRS;
				else {
					err_printf(err, "%s: a gender file is named markers*, suffixes* or pairs*%s",
						   fpath, "");
					rc = -1;
					break;
				}
			}
			if (*nfiles == fcap) {
				lex_file *p = tm_grow(*files, &fcap, *nfiles + 1, sizeof *p, 64);
				if (!p) {
					rc = err_printf(err, "%s: out of memory%s", path, "");
					break;
				}
				*files = p;
			}
			if (!((*files)[*nfiles].path = strdup(fpath))) {
				rc = err_printf(err, "%s: out of memory%s", path, "");
				break;
			}
			(*files)[*nfiles].cat = cat;
			(*files)[*nfiles].gender_kind = gk;
			++*nfiles;
		}
		for (i = 0; i < n; i++)
			free(names[i]);
		free(names);
	}
	return rc;
}

int lex_load_dir(lexicon *lx, const char *dir, tm_buf *err)
{
	lex_file *f = NULL;
	size_t n = 0, i;
	int rc;

	/* the files listed before a listing error (a gender file badly
	 * named) are read first: an error in one of them is the first met */
	tm_buf lerr = {0};
	int lrc = lex_list_dir(dir, &f, &n, &lerr);

	rc = 0;
	for (i = 0; i < n && rc == 0; i++)
		rc = lex_load_file(lx, f[i].cat, f[i].gender_kind, f[i].path, err);
	if (rc == 0 && lrc != 0) {
		buf_reset(err);
		buf_append(err, lerr.data, lerr.len);
		rc = -1;
	}
	buf_free(&lerr);
	lex_files_free(f, n);
	return rc;
}


/* ---- the compiled image (the lexicon cache) ----
 *
 * A header (struct img_head), then these sections, each starting on a
 * multiple of 8 bytes, in the byte order of the machine that wrote it;
 * the arrays are the lexicon's own, as they are in memory, so that a
 * lexicon reads them in place:
 *   strs    the word folds (strslen bytes; byte 0 is 0)
 *   voc     voccap word slots (wslot), at most half full
 *   words   nvoc + 1 wordrec; root: nvoc + 1 uint32; wnext: nvoc + 1 bytes
 *   ph      phcap edges, then phnode nodes; sfx: sfxcap edges, sfxnode
 *           nodes, the bits sfx2 and sfx1, skbeg (sfxnode + 1 uint32)
 *           and skid (sfxedge uint32)
 *   ent     nent lex_entry (entry 0 unused)
 *   pairs   npairs img_pair (the endings as offsets into pstr); pstr
 *           (pstrlen bytes of NUL-terminated endings); byfem (npairs
 *           uint32); femat (258 uint32)
 * The checksum (dg_hash) covers every byte after the field `sum`. */

#define IMG_MAGIC "TMLEXIMG"
#define IMG_ORDER 0x01020304u
#define IMG_SUM_SEED 0x6C6578696D616765ULL

typedef struct img_head {
	char magic[8];
	uint32_t version, order;
	unsigned char key[16];
	uint64_t sum;
	uint64_t total;  /* bytes of the whole image */
	uint32_t sizes;  /* sizeof of the structures below, packed: another
			  * compiler's layout is another format */
	uint32_t nvoc, voccap, phcap, phedge, phnode, sfxcap, sfxedge, sfxnode;
	uint32_t nent, npairs, strslen, pstrlen, pad;
} img_head;

typedef struct img_pair {
	char lang[4];
	uint8_t amb, mlen, flen, pad;
	uint32_t masc, fem;
} img_pair;

#define PAD8(n) (((uint64_t)(n) + 7) & ~(uint64_t)7)

static uint32_t img_sizes(void)
{
	return (uint32_t)(sizeof(wslot) | sizeof(wordrec) << 5 | sizeof(edge) << 10 |
			  sizeof(node) << 15 | sizeof(lex_entry) << 20 |
			  sizeof(img_pair) << 26);
}

static int put(tm_buf *o, const void *p, size_t n)
{
	static const char zero[8];
	if (n && buf_append(o, p, n) != 0)
		return -1;
	return buf_append(o, zero, (size_t)(PAD8(n) - n));
}

int lex_image_write(const lexicon *lx, const unsigned char key[16], tm_buf *out)
{
	img_head h;
	tm_buf pv = {0}, ps = {0};
	uint32_t *kbo = NULL, *kdo = NULL;
	const uint32_t *kb, *kd;
	size_t i;
	int rc = -1;

	memset(&h, 0, sizeof h);
	memcpy(h.magic, IMG_MAGIC, 8);
	h.version = LEX_IMAGE_VERSION;
	h.order = IMG_ORDER;
	h.sizes = img_sizes();
	memcpy(h.key, key, 16);
	if (lx->strs.len > UINT32_MAX || lx->nent > UINT32_MAX || lx->ph.nnode > UINT32_MAX ||
	    lx->ph.edgecap > UINT32_MAX || lx->voccap > UINT32_MAX || lx->npairs > UINT32_MAX)
		return -1;
	h.nvoc = (uint32_t)lx->nvoc;
	h.voccap = (uint32_t)lx->voccap;
	h.phcap = (uint32_t)lx->ph.edgecap;
	h.phedge = (uint32_t)lx->ph.nedge;
	h.phnode = (uint32_t)lx->ph.nnode;
	h.sfxcap = (uint32_t)lx->sfx.edgecap;
	h.sfxedge = (uint32_t)lx->sfx.nedge;
	h.sfxnode = (uint32_t)lx->sfx.nnode;
	h.nent = (uint32_t)lx->nent;
	h.npairs = (uint32_t)lx->npairs;
	h.strslen = (uint32_t)lx->strs.len;
	for (i = 0; i < lx->npairs; i++) {
		const lex_pair *p = &lx->pairs[i];
		img_pair d;
		memset(&d, 0, sizeof d);
		memcpy(d.lang, p->lang, 4);
		d.amb = p->amb;
		d.mlen = p->mlen;
		d.flen = p->flen;
		d.masc = (uint32_t)ps.len;
		if (buf_append(&ps, p->masc, strlen(p->masc) + 1))
			goto done;
		d.fem = (uint32_t)ps.len;
		if (buf_append(&ps, p->fem, strlen(p->fem) + 1) || buf_append(&pv, &d, sizeof d))
			goto done;
	}
	h.pstrlen = (uint32_t)ps.len;
	if (lx->skbeg) {
		kb = lx->skbeg;
		kd = lx->skid;
	} else if (pack_kids(lx, &kbo, &kdo) != 0)
		goto done;
	else {
		kb = kbo;
		kd = kdo;
	}
	buf_reset(out);
	if (put(out, &h, sizeof h) || put(out, lx->strs.data, lx->strs.len) ||
	    put(out, lx->voc, lx->voccap * sizeof *lx->voc) ||
	    put(out, lx->words, (lx->nvoc + 1) * sizeof *lx->words) ||
	    put(out, lx->h.root, (lx->nvoc + 1) * sizeof *lx->h.root) ||
	    put(out, lx->h.wnext, lx->nvoc + 1) ||
	    put(out, lx->ph.edges, lx->ph.edgecap * sizeof *lx->ph.edges) ||
	    put(out, lx->ph.nodes, lx->ph.nnode * sizeof *lx->ph.nodes) ||
	    put(out, lx->sfx.edges, lx->sfx.edgecap * sizeof *lx->sfx.edges) ||
	    put(out, lx->sfx.nodes, lx->sfx.nnode * sizeof *lx->sfx.nodes) ||
	    put(out, lx->sfx2, sizeof lx->sfx2) || put(out, lx->sfx1, sizeof lx->sfx1) ||
	    put(out, kb, (lx->sfx.nnode + 1) * sizeof *kb) ||
	    put(out, kd, lx->sfx.nedge * sizeof *kd) ||
	    put(out, lx->h.ent, lx->nent * sizeof *lx->h.ent) || put(out, pv.data, pv.len) ||
	    put(out, ps.data, ps.len) || put(out, lx->byfem, lx->npairs * sizeof *lx->byfem) ||
	    put(out, lx->femat, sizeof lx->femat))
		goto done;
	h.total = out->len;
	memcpy(out->data, &h, sizeof h);
	lex_image_seal(out->data, out->len);
	rc = 0;
done:
	free(kbo);
	free(kdo);
	buf_free(&pv);
	buf_free(&ps);
	if (rc)
		buf_reset(out);
	return rc;
}

void lex_image_seal(void *p, size_t n)
{
	size_t at = offsetof(img_head, total);
	uint64_t sum;
	if (n < sizeof(img_head))
		return;
	sum = dg_hash((char *)p + at, n - at, IMG_SUM_SEED);
	memcpy((char *)p + offsetof(img_head, sum), &sum, sizeof sum);
}

/* The sections of an image, each taken in turn with its size. */
typedef struct img_rd {
	char *p;
	uint64_t at, n;
} img_rd;

static void *take(img_rd *r, uint64_t len)
{
	void *q = r->p + r->at;
	if (PAD8(len) > r->n - r->at)
		return NULL;
	r->at += PAD8(len);
	return q;
}

static int pow2(uint64_t x)
{
	return x >= 2 && (x & (x - 1)) == 0;
}

static int why_not(tm_buf *w, const char *s)
{
	buf_reset(w);
	buf_puts(w, s);
	return 1;
}

/* Every edge between the trie's nodes, by a symbol below lim; the
 * number of edges as counted, at least one slot empty (a probe ends);
 * every node's entries inside the entry array. */
static int check_trie(const trie *t, uint64_t nedge, uint64_t lim, uint64_t nent)
{
	uint64_t got = 0;
	for (size_t i = 0; i < t->edgecap; i++) {
		uint64_t k = t->edges[i].key;
		if (!k)
			continue;
		got++;
		if ((k >> 32) >= t->nnode || (uint32_t)k == 0 || (uint32_t)k >= lim ||
		    t->edges[i].child == 0 || t->edges[i].child >= t->nnode)
			return -1;
	}
	if (got != nedge || got >= t->edgecap)
		return -1;
	for (size_t i = 0; i < t->nnode; i++)
		if (t->nodes[i].first >= nent || t->nodes[i].cats >> LC_NCAT)
			return -1;
	return 0;
}

static int cstr_ok(const char *s, size_t n)
{
	return memchr(s, 0, n) != NULL;
}

int lex_image_use(void *image, size_t n, int mapped, const unsigned char key[16],
		  lexicon **out, tm_buf *w)
{
	img_head h;
	img_rd r = {image, sizeof h, n};
	lexicon *lx;
	const char *pstr;
	const img_pair *ip;
	const uint32_t *fa;
	const void *s1, *s2;
	size_t i;

	*out = NULL;
	if (n < sizeof h || ((uintptr_t)image & 7))
		return why_not(w, "shorter than its header");
	memcpy(&h, image, sizeof h);
	if (memcmp(h.magic, IMG_MAGIC, 8))
		return why_not(w, "not a lexicon image");
	if (h.version != LEX_IMAGE_VERSION || h.order != IMG_ORDER || h.sizes != img_sizes())
		return why_not(w, "another version, byte order or layout");
	if (memcmp(h.key, key, 16))
		return why_not(w, "made from other lexicon files or by another build");
	if (h.total != n)
		return why_not(w, "truncated or extended");
	if (dg_hash((const char *)image + offsetof(img_head, total),
		    n - offsetof(img_head, total), IMG_SUM_SEED) != h.sum)
		return why_not(w, "checksum mismatch");
	if (!pow2(h.voccap) || h.nvoc >= h.voccap || !pow2(h.phcap) || !pow2(h.sfxcap) ||
	    h.phnode < 1 || h.sfxnode < 1 || h.nent < 1 || h.strslen < 1)
		return why_not(w, "bad counts");
	if (!(lx = calloc(1, sizeof *lx)))
		return -1;
	lx->voccap = h.voccap;
	lx->nvoc = h.nvoc;
	lx->wordcap = (size_t)h.nvoc + 1;
	lx->ph.edgecap = h.phcap;
	lx->ph.nedge = h.phedge;
	lx->ph.nnode = lx->ph.nodecap = h.phnode;
	lx->sfx.edgecap = h.sfxcap;
	lx->sfx.nedge = h.sfxedge;
	lx->sfx.nnode = lx->sfx.nodecap = h.sfxnode;
	lx->entcap = lx->nent = h.nent;
	lx->strs.len = h.strslen;
	lx->strs.cap = h.strslen;
	if (!(lx->strs.data = take(&r, h.strslen)) ||
	    !(lx->voc = take(&r, (uint64_t)h.voccap * sizeof *lx->voc)) ||
	    !(lx->words = take(&r, (uint64_t)lx->wordcap * sizeof *lx->words)) ||
	    !(lx->h.root = take(&r, (uint64_t)lx->wordcap * sizeof *lx->h.root)) ||
	    !(lx->h.wnext = take(&r, lx->wordcap)) ||
	    !(lx->ph.edges = take(&r, (uint64_t)h.phcap * sizeof(edge))) ||
	    !(lx->ph.nodes = take(&r, (uint64_t)h.phnode * sizeof(node))) ||
	    !(lx->sfx.edges = take(&r, (uint64_t)h.sfxcap * sizeof(edge))) ||
	    !(lx->sfx.nodes = take(&r, (uint64_t)h.sfxnode * sizeof(node))) ||
	    !(s2 = take(&r, sizeof lx->sfx2)) || !(s1 = take(&r, sizeof lx->sfx1)) ||
	    !(lx->skbeg = take(&r, ((uint64_t)h.sfxnode + 1) * sizeof *lx->skbeg)) ||
	    !(lx->skid = take(&r, (uint64_t)h.sfxedge * sizeof *lx->skid)) ||
	    !(lx->h.ent = take(&r, (uint64_t)h.nent * sizeof *lx->h.ent)) ||
	    !(ip = take(&r, (uint64_t)h.npairs * sizeof *ip)) ||
	    !(pstr = take(&r, h.pstrlen)) ||
	    !(fa = take(&r, (uint64_t)h.npairs * sizeof(uint32_t))) ||
	    !take(&r, sizeof lx->femat) || r.at != r.n)
		goto bad;
	memcpy(lx->sfx2, s2, sizeof lx->sfx2);
	memcpy(lx->sfx1, s1, sizeof lx->sfx1);
	/* the vocabulary: as many ids as words, every fold inside strs */
	{
		uint64_t got = 0;
		for (i = 0; i < lx->voccap; i++)
			if (lx->voc[i].id) {
				if (lx->voc[i].id > lx->nvoc)
					goto bad;
				got++;
			}
		if (got != lx->nvoc || lx->h.root[0] != 0)
			goto bad;
		for (i = 1; i <= lx->nvoc; i++)
			if ((uint64_t)lx->words[i].str + lx->words[i].len > lx->strs.len ||
			    lx->h.root[i] >= lx->ph.nnode)
				goto bad;
	}
	if (check_trie(&lx->ph, h.phedge, (uint64_t)h.nvoc + 1, h.nent) ||
	    check_trie(&lx->sfx, h.sfxedge, 256, h.nent))
		goto bad;
	/* the packed children: runs in order inside skid, children inside
	 * the trie */
	if (lx->skbeg[0] != 0 || lx->skbeg[h.sfxnode] != h.sfxedge)
		goto bad;
	for (i = 0; i < h.sfxnode; i++)
		if (lx->skbeg[i] > lx->skbeg[i + 1])
			goto bad;
	for (i = 0; i < h.sfxedge; i++)
		if ((lx->skid[i] >> 8) == 0 || (lx->skid[i] >> 8) >= h.sfxnode)
			goto bad;
	for (i = lx->skbeg[0]; i < lx->skbeg[1]; i++)
		lx->skroot[lx->skid[i] & 255] = lx->skid[i] >> 8;
	/* the entries: known codes, terminated strings, and lists that only
	 * go forward (no cycle) */
	for (i = 1; i < lx->nent; i++) {
		const lex_entry *e = &lx->h.ent[i];
		if (e->cat >= LC_NCAT || e->where > LW_ADJ || e->amb > 1 || e->off > 1 ||
		    e->caps > 1 || e->lang[sizeof e->lang - 1] ||
		    e->value[sizeof e->value - 1] ||
		    (e->next && (e->next <= i || e->next >= lx->nent)))
			goto bad;
	}
	/* the gendered pairs (copied: they hold pointers) and their index by
	 * the feminine ending */
	memcpy(lx->femat, (const char *)fa + PAD8((uint64_t)h.npairs * sizeof(uint32_t)),
	       sizeof lx->femat);
	if (h.pstrlen && pstr[h.pstrlen - 1] != 0)
		goto bad;
	if (lx->femat[0] != 0 || lx->femat[257] != h.npairs)
		goto bad;
	for (i = 0; i < 257; i++)
		if (lx->femat[i] > lx->femat[i + 1])
			goto bad;
	if (!(lx->pairs = calloc((size_t)h.npairs + 1, sizeof *lx->pairs)) ||
	    !(lx->byfem = malloc(((size_t)h.npairs + 1) * sizeof *lx->byfem)))
		goto nomem;
	for (i = 0; i < h.npairs; i++) {
		img_pair d;
		lex_pair *p = &lx->pairs[i];
		memcpy(&d, &ip[i], sizeof d);
		if (!cstr_ok(d.lang, sizeof d.lang) || d.amb > 1 || d.masc >= h.pstrlen ||
		    d.fem >= h.pstrlen || fa[i] >= h.npairs)
			goto bad;
		memcpy(p->lang, d.lang, 4);
		p->amb = d.amb;
		p->mlen = d.mlen;
		p->flen = d.flen;
		lx->byfem[i] = fa[i];
		if (!(p->masc = strdup(pstr + d.masc)) || !(p->fem = strdup(pstr + d.fem)))
			goto nomem_pairs;
		lx->npairs = lx->paircap = i + 1;
		if (p->mlen != (strlen(p->masc) > 255 ? 255 : strlen(p->masc)) ||
		    p->flen != (strlen(p->fem) > 255 ? 255 : strlen(p->fem)))
			goto bad;
	}
	lx->image = image;
	lx->imagelen = n;
	lx->mapped = mapped;
	*out = lx;
	return 0;
nomem_pairs:
	free((char *)lx->pairs[i].masc);
nomem:
	lex_free_pairs(lx);
	free(lx);
	return -1;
bad:
	lex_free_pairs(lx);
	free(lx);
	return why_not(w, "inconsistent contents");
}

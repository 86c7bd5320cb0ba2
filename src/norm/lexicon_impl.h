/* lexicon_impl.h - the lexicon's representation, shared by the three
 * files that implement lexicon.h and included by no other: lexicon.c
 * (the tries, the vocabulary and the lookups), lexicon_read.c (parsing
 * phrases and pairs, reading the lexicon files and folders) and
 * lexicon_image.c (the compiled image the lexicon cache stores).
 *
 * A lexicon owns every array below: malloc'd, or read in place from its
 * image (lx->image non-NULL), and then lex_own_image copies them out
 * before the first change. */
#ifndef TM_LEXICON_IMPL_H
#define TM_LEXICON_IMPL_H

#include <stddef.h>
#include <stdint.h>

#include "core/buf.h"
#include "norm/lexicon.h"
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

/* The child of node n by symbol sym, made when missing; 0 when memory
 * ran out. */
uint32_t lex_trie_add(trie *t, uint32_t n, uint32_t sym);

/* A new node of t; 0 when memory ran out. */
uint32_t lex_trie_node(trie *t);

/* The vocabulary's table, and the arrays by word id, doubled: 0, or -1
 * (memory). */
int lex_grow_vocab(lexicon *lx);
int lex_grow_words(lexicon *lx);

/* The three below are inline: lex_add (lexicon_read.c) calls them for
 * every word of every phrase it loads, at every start without a cache.
 *
 * tok_hash mixed again (fmix64 of MurmurHash3): the slot from the low
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

/* The id of a word, added when new; 0 when memory ran out.  Ids stay
 * below wordcap, so words[] and root[] have a slot for each. */
static inline uint32_t lex_add_word(lexicon *lx, const char *fold, size_t len, uint64_t h)
{
	uint32_t id = lex_word(lx, fold, len, h);
	uint64_t m;
	size_t j;

	if (id)
		return id;
	if ((lx->nvoc + 2) * 2 > lx->voccap && lex_grow_vocab(lx) != 0)
		return 0;
	if (lx->nvoc + 2 > lx->wordcap && lex_grow_words(lx) != 0)
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

/* The phrase trie's child of node n by word id, made when missing; 0
 * when memory ran out. */
static inline uint32_t lex_add_step(lexicon *lx, uint32_t n, uint32_t id)
{
	uint32_t c;

	if (!id)
		return 0;
	if (n != LEX_ROOT) {
		lx->h.wnext[id] = 1;
		return lex_trie_add(&lx->ph, n, id);
	}
	if (!lx->h.root[id] && (c = lex_trie_node(&lx->ph)))
		lx->h.root[id] = c;
	return lx->h.root[id];
}

/* Before the first change of a lexicon read in place from its image:
 * its arrays copied into memory of its own.  Returns 0 or -1 (memory;
 * the lexicon unchanged). */
int lex_own_image(lexicon *lx);

/* Frees the gendered pairs (the only arrays an image is not read into)
 * and leaves none. */
void lex_free_pairs(lexicon *lx);

/* The ending trie's children packed by node (see skbeg), in new malloc'd
 * arrays the caller owns: 0, or -1 (memory; too many nodes for 24
 * bits). */
int lex_pack_kids(const lexicon *lx, uint32_t **kbeg, uint32_t **kid);

#endif

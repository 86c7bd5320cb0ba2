/* lexicon.c - loading and compiling the noise lexicons. */
#include "lexicon.h"

#include <dirent.h>
#include <sys/stat.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "decode.h"
#include "token.h"
#include "unicode.h"

#define VALSLOTS 4096

/* The vocabulary: every token of every phrase, with its id (1-based). */
typedef struct word {
	uint64_t h;     /* tok_hash of the fold */
	uint32_t str;   /* offset of the fold in lx->strs */
	uint32_t len;
	uint32_t id;    /* 0: empty slot */
} word;

/* A trie: nodes (0 is the root) and its edges (node, symbol) -> node in
 * one open-addressing table.  The phrase trie's symbols are word ids;
 * the ending trie's are the bytes of a word's fold, read backwards. */
typedef struct edge {
	uint64_t key;   /* node << 32 | symbol; 0: empty slot (no edge
			 * enters the root, and no symbol is 0) */
	uint32_t child;
} edge;

/* A node: the entries of what ends there (index into lx->ent, 0 when
 * the node only leads on) and their categories. */
typedef struct node {
	uint32_t first;
	uint32_t cats;
} node;

typedef struct trie {
	edge *edges;     /* power-of-two size, at most 3/4 full */
	size_t edgecap, nedge;
	node *nodes;
	size_t nnode, nodecap;
} trie;

struct lexicon {
	word *voc;       /* open addressing, power-of-two size */
	size_t voccap, nvoc;
	uint32_t *root;  /* root[id]: the phrase trie's node of the one-word
			  * prefix, 0 none (the root's edges, by direct index) */
	trie ph;         /* the phrases, over word ids */
	trie sfx;        /* occupational endings, over reversed fold bytes */
	lex_entry *ent;  /* ent[0] unused */
	size_t nent, entcap;
	tm_buf strs;
	lex_pair *pairs;
	size_t npairs, paircap;
	uint32_t *byfem;     /* pair indices grouped by the feminine ending's
			      * last byte (group 256: empty ending), in
			      * file order within a group */
	uint32_t femat[258]; /* group g: byfem[femat[g]..femat[g+1]) */
	char **values;   /* interned value strings */
	char *vslot[VALSLOTS];
	size_t nvalues, valcap;
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
		node *p = realloc(t->nodes, t->nodecap * 2 * sizeof *p);
		if (!p)
			return 0;
		t->nodes = p;
		t->nodecap *= 2;
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
	if ((t->nedge + 1) * 4 > t->edgecap * 3 && grow_edges(t) != 0)
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
	/* sized for the bundled lexicons (about 90,000 phrases over some
	 * 60,000 words at a load of at most 3/4), so loading them never
	 * rehashes */
	lx->voccap = 1 << 17;
	lx->voc = calloc(lx->voccap, sizeof *lx->voc);
	lx->root = calloc(lx->voccap, sizeof *lx->root);
	lx->entcap = 1 << 17;
	lx->ent = calloc(lx->entcap, sizeof *lx->ent);
	lx->nent = 1;
	if (!lx->voc || !lx->root || !lx->ent || trie_init(&lx->ph, 1 << 16, 1 << 17) ||
	    trie_init(&lx->sfx, 1 << 10, 1 << 9) || buf_putc(&lx->strs, 0) != 0) {
		lex_free(lx);
		return NULL;
	}
	return lx;
}

void lex_free(lexicon *lx)
{
	size_t i;

	if (!lx)
		return;
	free(lx->voc);
	free(lx->root);
	free(lx->ph.edges);
	free(lx->ph.nodes);
	free(lx->sfx.edges);
	free(lx->sfx.nodes);
	free(lx->ent);
	buf_free(&lx->strs);
	for (i = 0; i < lx->npairs; i++) {
		free((char *)lx->pairs[i].masc);
		free((char *)lx->pairs[i].fem);
	}
	free(lx->pairs);
	free(lx->byfem);
	for (i = 0; i < lx->nvalues; i++)
		free(lx->values[i]);
	free(lx->values);
	uni_ctx_free(&lx->u);
	tok_line_free(&lx->tl);
	buf_free(&lx->work);
	free(lx);
}

/* ---- the vocabulary and the phrase trie ---- */

uint32_t lex_word(const lexicon *lx, const char *fold, size_t len, uint64_t h)
{
	size_t m = lx->voccap - 1, j = h & m;
	const word *w;

	while ((w = &lx->voc[j])->id) {
		if (w->h == h && w->len == len && !memcmp(lx->strs.data + w->str, fold, len))
			return w->id;
		j = (j + 1) & m;
	}
	return 0;
}

static int grow_vocab(lexicon *lx)
{
	size_t cap = lx->voccap * 2, i, m = cap - 1;
	word *v = calloc(cap, sizeof *v);
	uint32_t *r = calloc(cap, sizeof *r);
	if (!v || !r) {
		free(v);
		free(r);
		return -1;
	}
	for (i = 0; i < lx->voccap; i++) {
		size_t j;
		if (!lx->voc[i].id)
			continue;
		for (j = lx->voc[i].h & m; v[j].id; j = (j + 1) & m)
			;
		v[j] = lx->voc[i];
	}
	memcpy(r, lx->root, lx->voccap * sizeof *r);
	free(lx->voc);
	free(lx->root);
	lx->voc = v;
	lx->root = r;
	lx->voccap = cap;
	return 0;
}

/* The id of a word, added when new; 0 when memory ran out.  Ids stay
 * below voccap, so root[] (as large) has a slot for each. */
static uint32_t add_word(lexicon *lx, const char *fold, size_t len, uint64_t h)
{
	uint32_t id = lex_word(lx, fold, len, h);
	size_t j;

	if (id)
		return id;
	if ((lx->nvoc + 2) * 4 > lx->voccap * 3 && grow_vocab(lx) != 0)
		return 0;
	for (j = h & (lx->voccap - 1); lx->voc[j].id; j = (j + 1) & (lx->voccap - 1))
		;
	if (len > UINT32_MAX || buf_append(&lx->strs, fold, len) != 0)
		return 0;
	lx->voc[j].h = h;
	lx->voc[j].str = (uint32_t)(lx->strs.len - len);
	lx->voc[j].len = (uint32_t)len;
	lx->voc[j].id = (uint32_t)++lx->nvoc;
	return lx->voc[j].id;
}

uint32_t lex_step(const lexicon *lx, uint32_t n, uint32_t id)
{
	if (!id)
		return 0;
	return n == LEX_ROOT ? lx->root[id] : trie_get(&lx->ph, n, id);
}

/* The phrase trie's child of node n by word id, made when missing; 0
 * when memory ran out. */
static uint32_t add_step(lexicon *lx, uint32_t n, uint32_t id)
{
	uint32_t c;

	if (!id)
		return 0;
	if (n != LEX_ROOT)
		return trie_add(&lx->ph, n, id);
	if (!lx->root[id] && (c = trie_node(&lx->ph)))
		lx->root[id] = c;
	return lx->root[id];
}

static const lex_entry *node_entry(const lexicon *lx, const node *nd,
				   uint32_t *cats)
{
	if (!nd->first)
		return NULL;
	if (cats)
		*cats = nd->cats;
	return &lx->ent[nd->first];
}

const lex_entry *lex_phrase(const lexicon *lx, uint32_t n, uint32_t *cats)
{
	return n < lx->ph.nnode ? node_entry(lx, &lx->ph.nodes[n], cats) : NULL;
}

const lex_entry *lex_ending(const lexicon *lx, const char *fold, size_t len,
			    size_t *elen)
{
	const node *best = NULL;
	uint32_t n = 0;

	if (!lx->sfx.nedge)
		return NULL;
	/* backwards from the last byte while some ending goes on: at most
	 * as many steps as the longest ending has bytes */
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

static const char *intern(lexicon *lx, const char *v)
{
	size_t h = (size_t)tok_hash(v, strlen(v)), i;
	char *c;

	for (i = h & (VALSLOTS - 1); lx->vslot[i]; i = (i + 1) & (VALSLOTS - 1))
		if (strcmp(lx->vslot[i], v) == 0)
			return lx->vslot[i];
	if (lx->nvalues >= VALSLOTS / 2)
		return NULL;
	if (lx->nvalues == lx->valcap) {
		size_t cap = lx->valcap ? lx->valcap * 2 : 32;
		char **p = realloc(lx->values, cap * sizeof *p);
		if (!p)
			return NULL;
		lx->values = p;
		lx->valcap = cap;
	}
	if (!(c = strdup(v)))
		return NULL;
	lx->values[lx->nvalues++] = c;
	lx->vslot[i] = c;
	return c;
}

const lex_entry *lex_next(const lexicon *lx, const lex_entry *e)
{
	return e->next ? &lx->ent[e->next] : NULL;
}

size_t lex_entry_index(const lexicon *lx, const lex_entry *e)
{
	return (size_t)(e - lx->ent);
}

const lex_entry *lex_entry_at(const lexicon *lx, size_t i)
{
	return &lx->ent[i];
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
	const char *v = intern(lx, value);
	lex_entry *e;

	if (!v)
		return -1;
	for (uint32_t r = t->nodes[n].first; r; r = lx->ent[r].next) {
		lex_entry *o = &lx->ent[r];
		if (o->cat == cat && o->where == where && o->amb == amb &&
		    !strcmp(o->lang, lg) && o->value == v) {
			o->off = 0;
			return 0;
		}
	}
	if (lx->nent == lx->entcap) {
		size_t cap = lx->entcap * 2;
		lex_entry *p = realloc(lx->ent, cap * sizeof *p);
		if (!p)
			return -1;
		lx->ent = p;
		lx->entcap = cap;
	}
	size_t idx = lx->nent++;
	e = &lx->ent[idx];
	memset(e, 0, sizeof *e);
	e->cat = (uint8_t)cat;
	e->where = (uint8_t)where;
	e->amb = amb;
	memcpy(e->lang, lg, 4);
	e->value = v;
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
		while (lx->ent[q].next)
			q = lx->ent[q].next;
		lx->ent[q].next = (uint32_t)idx;
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
	char lg[4];
	uint8_t amb;
	int nu, k;
	const char *const *allowed = allowed_values(cat);

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
	char lg[4];
	uint8_t amb;
	char *m, *f;
	int nu;

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
	if (!m || !f || (lx->npairs == lx->paircap &&
			 !(p = realloc(lx->pairs, (lx->paircap ? lx->paircap * 2 : 64) *
							  sizeof *p)))) {
		free(m);
		free(f);
		return err_printf(err, "out of memory%s%s", "", "");
	}
	if (lx->npairs == lx->paircap) {
		size_t cap = lx->paircap ? lx->paircap * 2 : 64;
		uint32_t *bf;
		lx->pairs = p;
		if (!(bf = realloc(lx->byfem, cap * sizeof *bf))) {
			free(m);
			free(f);
			return err_printf(err, "out of memory%s%s", "", "");
		}
		lx->byfem = bf;
		lx->paircap = cap;
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

int lex_load_file(lexicon *lx, int cat, int gk, const char *path, tm_buf *err)
{
	FILE *fp = fopen(path, "rb");
	tm_buf text = {0};
	size_t got, pos = 0;
	long line = 0;
	int rc = 0;
	struct stat st;

	if (!fp) {
		buf_reset(err);
		buf_puts(err, path);
		buf_puts(err, ": ");
		buf_puts(err, strerror(errno));
		return -1;
	}
	if (fstat(fileno(fp), &st) == 0 && st.st_size > 0 &&
	    buf_reserve(&text, (size_t)st.st_size + 1) != 0) {
		fclose(fp);
		return err_printf(err, "%s: out of memory%s", path, "");
	}
	/* grown only when full: a file read whole at its size is not
	 * copied again, and the read that finds the end leaves a byte free
	 * for the last line's terminator */
	for (;;) {
		if (text.cap == text.len && buf_reserve(&text, 65536) != 0) {
			fclose(fp);
			buf_free(&text);
			return err_printf(err, "%s: out of memory%s", path, "");
		}
		got = fread(text.data + text.len, 1, text.cap - text.len, fp);
		if (got == 0)
			break;
		text.len += got;
	}
	if (ferror(fp)) {
		fclose(fp);
		buf_free(&text);
		return err_printf(err, "%s: read error%s", path, "");
	}
	fclose(fp);
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
	buf_free(&text);
	return rc;
}

static int cmp_str(const void *a, const void *b)
{
	return strcmp(*(char *const *)a, *(char *const *)b);
}

int lex_load_dir(lexicon *lx, const char *dir, tm_buf *err)
{
	int cat, rc = 0;

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
				char **p = realloc(names, (cap = cap ? cap * 2 : 16) *
								  sizeof *p);
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
			int c = cat;
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
			rc = lex_load_file(lx, c, gk, fpath, err);
		}
		for (i = 0; i < n; i++)
			free(names[i]);
		free(names);
	}
	return rc;
}

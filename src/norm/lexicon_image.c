/* lexicon_image.c - the compiled image of a lexicon, which the lexicon
 * cache stores: writing it, sealing it, and reading a lexicon from it in
 * place after checking every offset and count. */
#include "norm/lexicon_impl.h"

#include <stddef.h>
#include <stdlib.h>
#include <string.h>

#include "core/digest.h"

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
	} else if (lex_pack_kids(lx, &kbo, &kdo) != 0)
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
		if (e->cat >= LC_NCAT || e->where > LW_CITY || e->amb > 1 || e->off > 1 ||
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

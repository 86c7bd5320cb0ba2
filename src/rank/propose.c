/* propose.c - the ranker: suggestions with their evidence (propose.h).
 *
 * One pass over the counts' triples finds each (language, key)'s two
 * strongest occupations; a second pass scores every counted title that
 * is none of its occupation's labels (new_alt_label, or new_hidden_label
 * when it is a spelling variant of one); a pass over the labels scores
 * rare_label and used_elsewhere.  Cost: linear in triples and labels
 * (hash lookups), plus the labels of one occupation and language per
 * title for the variants. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "rank/labkeys.h"
#include "rank/propose.h"
#include "count/strtab.h"
#include "core/digest.h"
#include "norm/token.h"
#include "norm/unicode.h"

const char *const propose_kind_names[PROPOSE_NKINDS + 1] = {
	"new_alt_label", "new_hidden_label", "rare_label", "used_elsewhere", NULL};

#define PROPOSE_BAR_DEFAULT(type, kind, m, opt, arg, def, lo, hi, meaning) b->m = (type)(def);
void propose_bars_default(propose_bars *b)
{
	PROPOSE_BARS(PROPOSE_BAR_DEFAULT)
}

/* A counted (occupation, language, key) with its display title (its
 * language is its group's): 56 bytes, a million of them a run. */
typedef struct trip {
	const char *occ, *key, *title;
	uint32_t ol, kl, tl;
	uint32_t kid;    /* its (language, key): index in keys[] */
	uint32_t lab;    /* the label with its key in its group: labkeys index + 1, or 0 */
	uint32_t grp;    /* its (occupation, language): index in grp[] */
	uint64_t k;
} trip;

/* A (language, key) over all occupations. */
typedef struct kinfo {
	const char *key; /* a triple's */
	uint32_t kl;
	char lang[4];
	uint32_t i1, i2; /* its two strongest triples: index + 1, 0 none */
	uint64_t postings; /* of the key in the language, whatever the occupation */
} kinfo;

/* An (occupation, language): its triples are t[first, first + n). */
typedef struct group {
	uint32_t first, n;
	size_t lo, hi;   /* its label keys: lk.v[lo, hi) */
	size_t at;       /* the first of them not passed yet by the triples */
	uint64_t postings;
	uint64_t lang_postings; /* of its language, whatever the occupation */
	char lang[4];
} group;

typedef struct ranker {
	tally_mem *m;
	const labelset *ls;
	const propose_bars *b;
	trip *t;
	size_t n, cap;
	kinfo *keys;
	size_t nkeys, keycap;
	uint64_t *slot;  /* open addressing over keys[]: the hash's high 32
			  * bits, then index + 1 (0: empty) */
	size_t nslot;
	group *grp;
	size_t ngrp, grpcap;
	labkeys lk;
	uint64_t *labsig;  /* per label key: variant_sig */
	uint8_t *labwide;  /* per label key: has_wide_word */
	uint32_t *labtrip; /* per label: the triple of its occupation, language
			    * and key, index + 1, or 0 */
	strtab nlang;    /* lang -> postings */
	strtab occkeys;  /* occ 1F key of every label, whatever its language */
	tm_buf part;     /* scratch: occ 1F a part of a title's key */
	propose_list *out;
	size_t outcap;
} ranker;

static int same(const char *a, size_t an, const char *b, size_t bn)
{
	return an == bn && !memcmp(a, b, an);
}

static uint64_t key_hash(const char *lang, const char *key, size_t kl)
{
	return tok_hash_mix(tok_hash(key, kl), tok_hash(lang, strlen(lang)));
}

/* The (language, key) of hash h: its entry in keys[], added when absent
 * and add is set; -1 when absent.  The table is sized once for every
 * triple (at most one key each): it never grows, and most lookups read
 * one slot (its hash's high bits tell most keys apart). */
static long key_id(ranker *c, uint64_t h, const char *lang, const char *key, size_t kl, int add)
{
	size_t mask = c->nslot - 1;
	uint64_t hi = h & 0xFFFFFFFF00000000ULL;
	for (size_t s = (size_t)h & mask;; s = (s + 1) & mask) {
		uint64_t e = c->slot[s];
		if (!e) {
			if (!add)
				return -1;
			kinfo *ki = &c->keys[c->nkeys];
			memset(ki, 0, sizeof *ki);
			ki->key = key;
			ki->kl = (uint32_t)kl;
			memcpy(ki->lang, lang, strlen(lang) + 1);
			c->slot[s] = hi | (uint32_t)++c->nkeys;
			return (long)c->nkeys - 1;
		}
		if ((e & 0xFFFFFFFF00000000ULL) != hi)
			continue;
		const kinfo *ki = &c->keys[(uint32_t)e - 1];
		if (same(ki->key, ki->kl, key, kl) && !strcmp(ki->lang, lang))
			return (long)(uint32_t)e - 1;
	}
}

static void key_prefetch(const ranker *c, uint64_t h)
{
	__builtin_prefetch(&c->slot[(size_t)h & (c->nslot - 1)]);
}

static int collect(void *c0, const tm_triple *x)
{
	ranker *c = c0;
	if (c->n >= UINT32_MAX - 1)
		return -1;
	trip *t = tm_grow(c->t, &c->cap, c->n + 1, sizeof *t, 4096);
	if (!t)
		return -1;
	c->t = t;
	t = &c->t[c->n];
	memset(t, 0, sizeof *t);
	t->occ = x->occ;
	t->ol = (uint32_t)x->ol;
	t->key = x->key;
	t->kl = (uint32_t)x->kl;
	t->title = x->title;
	t->tl = (uint32_t)x->tl;
	t->k = x->postings;
	char lang[4] = {0};
	memcpy(lang, x->lang, x->ll < 3 ? x->ll : 3);
	/* a new (occupation, language)? */
	group *g = c->ngrp ? &c->grp[c->ngrp - 1] : NULL;
	if (!g || !same(c->t[g->first].occ, c->t[g->first].ol, t->occ, t->ol) ||
	    strcmp(g->lang, lang)) {
		g = tm_grow(c->grp, &c->grpcap, c->ngrp + 1, sizeof *g, 256);
		if (!g)
			return -1;
		c->grp = g;
		g = &c->grp[c->ngrp++];
		memset(g, 0, sizeof *g);
		g->first = (uint32_t)c->n;
		memcpy(g->lang, lang, 4);
		labkeys_group(&c->lk, c->ls, t->occ, t->ol, lang, &g->lo, &g->hi);
		g->at = g->lo;
		g->postings = tm_occ_postings(c->m, t->occ, t->ol, lang);
	}
	t->grp = (uint32_t)(c->ngrp - 1);
	/* the triples of a group come in key order, as its label keys do:
	 * pass the label keys before this one */
	while (g->at < g->hi) {
		const label *lb = &c->ls->v[c->lk.v[g->at].lab];
		int cmp = labkeys_cmp(lab_str(c->ls, lb->key), lb->keylen, t->key, t->kl);
		if (cmp > 0)
			break;
		if (cmp == 0 && t->kl) {
			t->lab = (uint32_t)g->at + 1;
			c->labtrip[lb - c->ls->v] = (uint32_t)c->n + 1;
		}
		g->at++;
	}
	g->n++;
	c->n++;
	return 0;
}

/* Are a and b the same once their spaces and hyphens are dropped, and
 * not empty then? */
static int same_nosep(const char *a, size_t an, const char *b, size_t bn)
{
	size_t i = 0, j = 0, kept = 0;
	for (;;) {
		while (i < an && (a[i] == ' ' || a[i] == '-'))
			i++;
		while (j < bn && (b[j] == ' ' || b[j] == '-'))
			j++;
		if (i == an || j == bn)
			return i == an && j == bn && kept;
		if (a[i++] != b[j++])
			return 0;
		kept++;
	}
}

/* Do two words differ only inside one stretch of at most two code points
 * on each side ("re" / "er", "ue" / "")? */
static int one_stretch(const char *a, size_t an, const char *b, size_t bn)
{
	size_t p = 0, s = 0;
	while (p < an && p < bn && a[p] == b[p])
		p++;
	while (p > 0 && ((unsigned char)a[p] & 0xC0) == 0x80) /* to a code point's start */
		p--;
	while (s < an - p && s < bn - p && a[an - 1 - s] == b[bn - 1 - s])
		s++;
	while (s > 0 && ((unsigned char)a[an - s] & 0xC0) == 0x80)
		s--;
	return dec_cps(a + p, an - p - s) <= 2 && dec_cps(b + p, bn - p - s) <= 2;
}

const char *propose_variant(const char *key, size_t kl, const char *lk, size_t ll)
{
	if (same(key, kl, lk, ll))
		return NULL;
	if (same_nosep(key, kl, lk, ll))
		return "spacing";
	/* the other words the same, and one word a few edits from its
	 * counterpart, both long enough that the edits are slips or a
	 * spelling convention rather than another word: one edit when both
	 * have PROPOSE_TYPO_MIN code points ("schweisser" / "schweiser", not
	 * "tig" / "mig"), two inside one stretch of two code points when the
	 * longer has PROPOSE_SPELLING_MIN too ("theatre" / "theater",
	 * "dialogue" / "dialog", not "technicien" / "mecanicien") */
	const char *p = key, *q = lk, *pe = key + kl, *qe = lk + ll;
	int diff = 0, d = 0;
	while (p < pe && q < qe) {
		const char *a1 = memchr(p, ' ', (size_t)(pe - p)), *b1 = memchr(q, ' ', (size_t)(qe - q));
		size_t wa = a1 ? (size_t)(a1 - p) : (size_t)(pe - p), wb = b1 ? (size_t)(b1 - q) : (size_t)(qe - q);
		if (!same(p, wa, q, wb)) {
			size_t ca = dec_cps(p, wa), cb = dec_cps(q, wb);
			if (diff++ || ca < PROPOSE_TYPO_MIN || cb < PROPOSE_TYPO_MIN)
				return NULL;
			int max = (ca > cb ? ca : cb) >= PROPOSE_SPELLING_MIN ? 2 : 1;
			d = levenshtein(p, wa, q, wb, max);
			if (d < 1 || d > max || (d == 2 && !one_stretch(p, wa, q, wb)))
				return NULL;
		}
		p += wa + (a1 != NULL);
		q += wb + (b1 != NULL);
	}
	if (p < pe || q < qe || diff != 1)
		return NULL;
	return d == 1 ? "typo" : "spelling";
}

static int cmp_sugg(const void *a, const void *b)
{
	const propose_sugg *x = a, *y = b;
	int c;
	if (x->kind != y->kind)
		return x->kind - y->kind;
	if (x->score != y->score)
		return x->score > y->score ? -1 : 1;
	if ((c = memcmp(x->occ, y->occ, x->ol < y->ol ? x->ol : y->ol)) || x->ol != y->ol)
		return c ? c : (x->ol < y->ol ? -1 : 1);
	if ((c = strcmp(x->lang, y->lang)))
		return c;
	if ((c = memcmp(x->key, y->key, x->kl < y->kl ? x->kl : y->kl)) || x->kl != y->kl)
		return c ? c : (x->kl < y->kl ? -1 : 1);
	return 0;
}

static int wordish(unsigned char c)
{
	return c >= 0x80 || (c >= '0' && c <= '9') || ((c | 0x20) >= 'a' && (c | 0x20) <= 'z');
}

int propose_as_written(const char *const *ex, const size_t *exl, int nex, const char *text,
		       size_t tl, tm_buf *out)
{
	tm_buf low = {0}, cand = {0};
	size_t len0 = out->len;
	int rc = 0;
	for (int i = 0; i < nex && out->len == len0 && rc == 0; i++) {
		buf_reset(&low);
		if (uni_lower(ex[i], exl[i], &low) || low.len != exl[i] || tl == 0 || tl > exl[i])
			continue;
		for (size_t o = 0; o + tl <= low.len; o++) {
			if (memcmp(low.data + o, text, tl) ||
			    (o > 0 && wordish((unsigned char)low.data[o - 1])) ||
			    (o + tl < low.len && wordish((unsigned char)low.data[o + tl])))
				continue;
			/* all capitals says nothing about the usual casing (the
			 * test looks at Latin letters only) */
			int lower = 0;
			for (size_t k = o; k < o + tl; k++)
				lower |= ex[i][k] >= 'a' && ex[i][k] <= 'z';
			if (lower) {
				buf_reset(&cand);
				if (buf_append(&cand, ex[i] + o, tl))
					rc = -1;
				else if (dec_is_utf8(cand.data, cand.len) && !memchr(cand.data, 0, cand.len))
					rc = buf_append(out, cand.data, cand.len);
			}
			break;
		}
	}
	buf_free(&low);
	buf_free(&cand);
	return rc;
}

static int push(ranker *c, const propose_sugg *s)
{
	propose_list *l = c->out;
	propose_sugg *v = tm_grow(l->v, &c->outcap, l->n + 1, sizeof *v, 256);
	if (!v)
		return -1;
	l->v = v;
	l->v[l->n++] = *s;
	return 0;
}

/* Every (language, key)'s two strongest triples and its postings, and
 * the postings per language: one pass over the triples, one over the
 * counts' keys. */
static int index_keys(ranker *c)
{
	tally_mem *m = c->m;
	size_t need = c->n + 1;
	enum { AHEAD = 8 }; /* slots fetched ahead of their use */

	for (c->nslot = 16; c->nslot < need + need / 2; c->nslot *= 2)
		;
	c->slot = calloc(c->nslot, sizeof *c->slot);
	c->keys = malloc(need * sizeof *c->keys);
	if (!c->slot || !c->keys)
		return -1;
	tm_hugepages(c->slot, c->nslot * sizeof *c->slot);
	tm_hugepages(c->keys, need * sizeof *c->keys);
	/* the triples' (language, key)s, their hashes a few ahead */
	uint64_t th[AHEAD];
	for (size_t i = 0; i < c->n + AHEAD; i++) {
		if (i >= AHEAD) { /* triple q's turn, then its slot of th is i's */
			size_t q = i - AHEAD;
			trip *t = &c->t[q];
			long id = key_id(c, th[q % AHEAD], c->grp[t->grp].lang, t->key, t->kl, 1);
			kinfo *ki = &c->keys[id];
			uint32_t me = (uint32_t)q + 1;
			t->kid = (uint32_t)id;
			if (!ki->i1 || t->k > c->t[ki->i1 - 1].k) {
				ki->i2 = ki->i1;
				ki->i1 = me;
			} else if (!ki->i2 || t->k > c->t[ki->i2 - 1].k)
				ki->i2 = me;
		}
		if (i < c->n) {
			const trip *a = &c->t[i];
			th[i % AHEAD] = key_hash(c->grp[a->grp].lang, a->key, a->kl);
			key_prefetch(c, th[i % AHEAD]);
		}
	}
	/* the counts' keys (lang 1F key), their hashes a few ahead */
	uint64_t ring[AHEAD];
	char rlang[AHEAD][4];
	size_t li = 0, pll = 0;
	const char *plang = NULL;
	for (size_t i = 0; i < m->keys.n + AHEAD; i++) {
		if (i >= AHEAD) {
			size_t q = i - AHEAD, n;
			const char *k = st_key(&m->keys, q, &n);
			const char *lg = rlang[q % AHEAD];
			size_t ll = strlen(lg);
			long id = ll ? key_id(c, ring[q % AHEAD], lg, k + ll + 1, n - ll - 1, 0) : -1;
			if (id >= 0)
				c->keys[id].postings = m->keys.ent[q].count;
		}
		if (i >= m->keys.n)
			continue;
		size_t n;
		const char *k = st_key(&m->keys, i, &n);
		const char *sep = memchr(k, '\x1F', n);
		size_t ll = sep ? (size_t)(sep - k) : n;
		char *lg = rlang[i % AHEAD];
		memset(lg, 0, 4);
		if (sep && ll <= 3)
			memcpy(lg, k, ll);
		ring[i % AHEAD] = lg[0] ? key_hash(lg, sep + 1, n - ll - 1) : 0;
		key_prefetch(c, ring[i % AHEAD]);
		/* the keys of one language mostly follow each other */
		if (!plang || !same(plang, pll, k, ll)) {
			if (st_add(&c->nlang, k, ll, 0, &li) < 0)
				return -1;
			plang = k;
			pll = ll;
		}
		c->nlang.ent[li].count += m->keys.ent[i].count;
	}
	for (size_t g = 0; g < c->ngrp; g++) {
		long li2 = st_find(&c->nlang, c->grp[g].lang, strlen(c->grp[g].lang));
		c->grp[g].lang_postings = li2 < 0 ? 0 : c->nlang.ent[li2].count;
	}
	return 0;
}

static int filtered(const propose_filter *f, const char *occ, size_t ol, const char *lang)
{
	return f && ((f->occ && !same(f->occ, strlen(f->occ), occ, ol)) ||
		     (f->lang && strcmp(f->lang, lang)));
}

/* The code points of a key but spaces and hyphens, each as one of 64
 * bits.  When propose_variant finds a variant, the two keys' sets differ
 * by at most four bits (two edits, each dropping one code point and
 * adding one; spacing none): a cheap test that passes every variant of a
 * key short enough (VARIANT_SIG_MAX bytes) for levenshtein to see its
 * words whole. */
#define VARIANT_SIG_MAX 128
static uint64_t variant_sig(const char *s, size_t n)
{
	uint64_t sig = 0;
	for (size_t i = 0; i < n;) {
		uint32_t cp = (unsigned char)s[i++];
		while (i < n && ((unsigned char)s[i] & 0xC0) == 0x80)
			cp = cp << 6 | ((unsigned char)s[i++] & 0x3F);
		if (cp != ' ' && cp != '-')
			sig |= 1ULL << ((cp ^ cp >> 6 ^ cp >> 12) & 63);
	}
	return sig;
}

/* Has the key a word (between spaces) of PROPOSE_TYPO_MIN code points or
 * more?  A typo or spelling variant differs in one such word, and the
 * word it differs from is one too: when a key or a label has none, only
 * "spacing" can join them, and that keeps every code point but spaces
 * and hyphens (variant_sig equal). */
static int has_wide_word(const char *s, size_t n)
{
	size_t w = 0;
	for (size_t i = 0; i < n; i++) {
		if (s[i] == ' ')
			w = 0;
		else if (((unsigned char)s[i] & 0xC0) != 0x80 && ++w >= PROPOSE_TYPO_MIN)
			return 1;
	}
	return 0;
}

/* A spelling variant of one of the labels of t's group: the first such
 * label in the labels file, with how it varies; NULL when none. */
static const label *variant_of(const ranker *c, const trip *t, const char **how)
{
	const labelset *ls = c->ls;
	const group *g = &c->grp[t->grp];
	const label *var = NULL;
	int quick = t->kl <= VARIANT_SIG_MAX, wide = has_wide_word(t->key, t->kl);
	uint64_t sig = variant_sig(t->key, t->kl);
	for (size_t q = g->lo; q < g->hi; q++) {
		const label *lb = &ls->v[c->lk.v[q].lab];
		const char *h;
		if (var && lb > var)
			continue;
		if (quick && lb->keylen <= VARIANT_SIG_MAX &&
		    __builtin_popcountll(sig ^ c->labsig[q]) > 4)
			continue;
		if (!(wide && c->labwide[q]) && sig != c->labsig[q])
			continue;
		if ((h = propose_variant(t->key, t->kl, lab_str(ls, lb->key), lb->keylen))) {
			var = lb;
			*how = h;
		}
	}
	return var;
}

/* Is part [a, b) of a key a label of occupation occ: 0 none, 1 of its
 * language lang, 2 of another language only; -1 memory. */
static int label_part(ranker *c, const char *occ, size_t ol, const char *lang,
		      const char *p, size_t n)
{
	tm_buf *b = &c->part;
	buf_reset(b);
	if (buf_append(b, occ, ol) || buf_putc(b, '\x1F') || buf_append(b, p, n))
		return -1;
	if (st_find(&c->occkeys, b->data, b->len) < 0)
		return 0;
	buf_reset(b);
	if (buf_append(b, occ, ol) || buf_putc(b, '\x1F') || buf_puts(b, lang) ||
	    buf_putc(b, '\x1F') || buf_append(b, p, n))
		return -1;
	return st_find(&c->ls->index, b->data, b->len) >= 0 ? 1 : 2;
}

/* Does the key of t only join labels of its own occupation, whole words
 * each, one of them at least a label of another language only?  A
 * posting written in two languages ("Chemiker/in - Chemist", "Maurer |
 * Bricklayer") names its occupation by names the taxonomy already has:
 * proposing "chemiker chemist" as a new label would ask the curator to
 * add both again.  Two names of one language stay proposed
 * ("boulanger-patissier" beside Boulanger and Patissier is a title of
 * its own), and so does a key that is one label of another language
 * ("sales manager" in German postings beside the English label).  Keys
 * of more than PROPOSE_JOIN_WORDS words are not tried: the test is
 * quadratic in words, so it is bounded by that constant.  1 joins, 0
 * not, -1 memory. */
static int joins_labels(ranker *c, const trip *t)
{
	size_t start[PROPOSE_JOIN_WORDS + 1], nw = 0;
	/* per word boundary: 1 reached by labels of the language, 2 with
	 * one of another language among them (both bits may be set) */
	unsigned char reach[PROPOSE_JOIN_WORDS + 1] = {1};
	const char *lang = c->grp[t->grp].lang;

	for (size_t i = 0; i < t->kl; i++)
		if (i == 0 || t->key[i - 1] == ' ') {
			if (nw == PROPOSE_JOIN_WORDS)
				return 0;
			start[nw++] = i;
		}
	if (nw < 2)
		return 0;
	start[nw] = t->kl + 1; /* one past the end, as if a space followed */
	for (size_t b = 1; b <= nw; b++)
		for (size_t a = 0; a < b && !(reach[b] & 2); a++) {
			if (!reach[a] || (a == 0 && b == nw))
				continue;
			int k = label_part(c, t->occ, t->ol, lang, t->key + start[a],
					   start[b] - 1 - start[a]);
			if (k < 0)
				return -1;
			if (k == 1)
				reach[b] |= reach[a];
			else if (k == 2)
				reach[b] |= 2;
		}
	return (reach[nw] & 2) != 0;
}

/* new_alt_label and new_hidden_label: the counted titles that are none
 * of their occupation's labels. */
static int rank_titles(ranker *c)
{
	const labelset *ls = c->ls;
	const propose_bars *bar = c->b;

	for (size_t i = 0; i < c->n; i++) {
		const trip *t = &c->t[i];
		if (!t->kl || t->lab)
			continue;
		const kinfo *ki = &c->keys[t->kid];
		const group *g = &c->grp[t->grp];
		uint64_t n = g->postings, kt = ki->postings;
		uint64_t nl = g->lang_postings;
		double prec = kt ? (double)t->k / (double)kt : 0;
		propose_sugg s;
		memset(&s, 0, sizeof s);
		s.is_title = 1;
		s.text = t->title;
		s.tl = t->tl;
		s.occ = t->occ;
		s.ol = t->ol;
		s.key = t->key;
		s.kl = t->kl;
		memcpy(s.lang, g->lang, 4);
		s.postings = t->k;
		s.occ_postings = n;
		s.key_postings = kt;
		s.precision = prec;
		s.lang_postings = nl;
		if (kt >= t->k && nl >= kt + n - t->k)
			s.g2 = g2(t->k, kt - t->k, n - t->k, nl - kt - n + t->k);
		/* the rival: the strongest other occupation of the key */
		uint32_t r = ki->i1 && ki->i1 - 1 != i ? ki->i1 : ki->i2;
		if (r) {
			s.rival = c->t[r - 1].occ;
			s.rl = c->t[r - 1].ol;
			s.rival_postings = c->t[r - 1].k;
		}
		/* a spelling variant of one of its labels? */
		const char *how = NULL;
		const label *var = variant_of(c, t, &how);
		if (var) {
			/* a key that is some other occupation's label is no
			 * misspelling: "delta01 agent" is not a typo of
			 * "delta00 agent" when both are labels */
			tm_buf j = {0};
			long other = -1;
			if (buf_puts(&j, g->lang) || buf_putc(&j, '\x1F') || buf_append(&j, t->key, t->kl)) {
				buf_free(&j);
				return -1;
			}
			other = st_find(&ls->keys, j.data, j.len);
			buf_free(&j);
			/* recurrent, not a one-off slip: the variant's share of
			 * the postings of the label varied and the variant */
			uint32_t lt = c->labtrip[var - ls->v];
			uint64_t base = t->k + (lt ? c->t[lt - 1].k : 0);
			double lo, hi;
			wilson(t->k, base, STATS_Z95, &lo, &hi);
			if (other >= 0 || t->k < bar->hidden_min || prec < bar->hidden_precision ||
			    lo <= bar->hidden_share)
				continue;
			s.kind = PROPOSE_HIDDEN;
			s.lb = var;
			s.variant = how;
			s.label_postings = base - t->k;
			s.score = (double)t->k * prec;
		} else {
			double lo, hi;
			wilson(t->k, n, STATS_Z95, &lo, &hi);
			if (t->k < bar->min_postings || lo < bar->min_share ||
			    prec < bar->min_precision || s.g2 <= bar->min_g2)
				continue;
			int joins = joins_labels(c, t);
			if (joins < 0)
				return -1;
			if (joins) {
				c->out->joined++;
				continue;
			}
			s.kind = PROPOSE_ALT;
			s.score = s.g2;
		}
		if (push(c, &s) != 0)
			return -1;
	}
	return 0;
}

/* rare_label and used_elsewhere: the labels, one per distinct key of an
 * occupation and language (the first label with it). */
static int rank_labels(ranker *c)
{
	const labelset *ls = c->ls;
	const propose_bars *bar = c->b;

	for (size_t e = 0; e < c->lk.n; e++) {
		const label *lb = &ls->v[c->lk.v[e].lab];
		const char *occ = lab_str(ls, lb->occ), *key = lab_str(ls, lb->key);
		uint64_t n = tm_occ_postings(c->m, occ, lb->occlen, lb->lang);
		uint64_t kt = tm_key_postings(c->m, lb->lang, key, lb->keylen);
		uint32_t own = c->labtrip[c->lk.v[e].lab];
		uint64_t k = own ? c->t[own - 1].k : 0;
		const trip *rival = NULL;
		long id = key_id(c, key_hash(lb->lang, key, lb->keylen), lb->lang, key, lb->keylen, 0);
		if (id >= 0) {
			const kinfo *ki = &c->keys[id];
			for (uint32_t r = 0; r < 2 && !rival; r++) {
				uint32_t x = r ? ki->i2 : ki->i1;
				if (x && x != own)
					rival = &c->t[x - 1];
			}
		}
		propose_sugg s;
		memset(&s, 0, sizeof s);
		s.lb = lb;
		s.text = lab_str(ls, lb->text);
		s.tl = lb->textlen;
		s.occ = occ;
		s.ol = lb->occlen;
		s.key = key;
		s.kl = lb->keylen;
		memcpy(s.lang, lb->lang, 4);
		s.postings = k;
		s.occ_postings = n;
		s.key_postings = kt;
		s.precision = kt ? (double)k / (double)kt : 0;
		if (rival) {
			s.rival = rival->occ;
			s.rl = rival->ol;
			s.rival_postings = rival->k;
		}
		double lo, hi;
		wilson(k, n, STATS_Z95, &lo, &hi);
		/* hidden labels are there to catch misspellings, which are
		 * rare by nature: never rare_label */
		if (lb->kind != 'h' && n >= bar->rare_min && hi < bar->rare_share) {
			s.kind = PROPOSE_RARE;
			s.score = (double)n * (bar->rare_share - hi);
		} else if (rival && kt >= bar->elsewhere_min &&
			   (double)rival->k / (double)kt >= bar->elsewhere_share) {
			s.kind = PROPOSE_ELSEWHERE;
			s.score = (double)rival->k / (double)kt;
		} else
			continue;
		if (push(c, &s) != 0)
			return -1;
	}
	return 0;
}

/* Each suggestion's strength: the mid-rank percentile of its score among
 * the suggestions of its kind (v is sorted by kind, then score). */
static void strengths(propose_sugg *v, size_t n)
{
	for (size_t a = 0; a < n;) {
		size_t z = a;
		while (z < n && v[z].kind == v[a].kind)
			z++;
		/* [a, z): one kind, strongest first */
		for (size_t i = a; i < z;) {
			size_t j = i;
			while (j < z && v[j].score == v[i].score)
				j++;
			/* [i, j) tie; z - j suggestions score lower */
			double st = ((double)(z - j) + 0.5 * (double)(j - i)) / (double)(z - a);
			for (size_t q = i; q < j; q++)
				v[q].strength = st;
			i = j;
		}
		a = z;
	}
}

int propose_run(tally_mem *m, const labelset *ls, const propose_bars *b,
		const propose_filter *f, propose_list *out)
{
	ranker c;
	int rc = -1;
	tm_buf j = {0};

	memset(&c, 0, sizeof c);
	memset(out, 0, sizeof *out);
	c.m = m;
	c.ls = ls;
	c.b = b;
	c.out = out;
	c.labtrip = calloc(ls->n + 1, sizeof *c.labtrip);
	c.labsig = malloc((ls->n + 1) * sizeof *c.labsig);
	c.labwide = malloc(ls->n + 1);
	if (!c.labtrip || !c.labsig || !c.labwide || labkeys_build(&c.lk, ls) != 0)
		goto done;
	for (size_t q = 0; q < ls->n; q++) {
		const label *lb = &ls->v[q];
		buf_reset(&j);
		if (buf_append(&j, lab_str(ls, lb->occ), lb->occlen) || buf_putc(&j, '\x1F') ||
		    buf_append(&j, lab_str(ls, lb->key), lb->keylen) ||
		    st_add(&c.occkeys, j.data, j.len, 0, NULL) < 0)
			goto done;
	}
	for (size_t q = 0; q < c.lk.n; q++) {
		const label *lb = &ls->v[c.lk.v[q].lab];
		c.labsig[q] = variant_sig(lab_str(ls, lb->key), lb->keylen);
		c.labwide[q] = (uint8_t)has_wide_word(lab_str(ls, lb->key), lb->keylen);
	}
	/* a triple per distinct (occupation, language, key) of the forms at
	 * most: room for all at once, in big pages */
	c.cap = m->forms.n ? m->forms.n : 1;
	if (!(c.t = malloc(c.cap * sizeof *c.t)))
		goto done;
	tm_hugepages(c.t, c.cap * sizeof *c.t);
	if (tm_each_triple(m, collect, &c) != 0 ||
	    index_keys(&c) != 0 || rank_titles(&c) != 0 || rank_labels(&c) != 0)
		goto done;
	/* stable ids: the kind, occupation, language and key */
	for (size_t i = 0; i < out->n; i++) {
		propose_sugg *s = &out->v[i];
		buf_reset(&j);
		if (buf_puts(&j, propose_kind_names[s->kind]) || buf_putc(&j, '\x1F') ||
		    buf_append(&j, s->occ, s->ol) || buf_putc(&j, '\x1F') || buf_puts(&j, s->lang) ||
		    buf_putc(&j, '\x1F') || buf_append(&j, s->key, s->kl))
			goto done;
		snprintf(s->id, sizeof s->id, "%016llx", (unsigned long long)dg_fnv(j.data, j.len));
	}
	if (out->n > 1)
		tm_qsort(out->v, out->n, sizeof *out->v, cmp_sugg);
	/* strength over the whole run, then the filter: a suggestion's
	 * strength does not depend on what else is shown */
	strengths(out->v, out->n);
	size_t kept = 0;
	for (size_t i = 0; i < out->n; i++)
		if (!filtered(f, out->v[i].occ, out->v[i].ol, out->v[i].lang))
			out->v[kept++] = out->v[i];
	out->n = kept;
	rc = 0;
done:
	if (rc != 0)
		propose_list_free(out);
	free(c.t);
	free(c.keys);
	free(c.slot);
	free(c.grp);
	free(c.labtrip);
	free(c.labsig);
	free(c.labwide);
	labkeys_free(&c.lk);
	st_free(&c.nlang);
	st_free(&c.occkeys);
	buf_free(&c.part);
	buf_free(&j);
	return rc;
}

void propose_list_free(propose_list *l)
{
	free(l->v);
	memset(l, 0, sizeof *l);
}

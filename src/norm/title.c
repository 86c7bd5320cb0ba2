/* title.c - the annotated title: units and segments, the lexicon
 * phrases at each unit, removal marks and spans (see title.h). */
#include "norm/title.h"

#include <stdlib.h>
#include <string.h>

static const char *const kind_names[NF_NKIND] = {
	"gender", "seniority", "location", "schedule", "hours", "workload",
	"pay", "reference", "date", "marketing", "employer", "email",
	"phone", "url", "location-slot",
};

const char title_glue[] = "";

const char *nf_kind_name(int kind)
{
	return kind >= 0 && kind < NF_NKIND ? kind_names[kind] : "other";
}

/* Resizes the per-token array a to exactly n elements (overflow
 * checked); returns -1 from the caller when memory runs out. */
#define RESIZE(a, n)                                                     \
	do {                                                             \
		size_t c_ = 0;                                           \
		void *p_ = tm_grow((a), &c_, (n), sizeof *(a), (n));     \
		if (!p_)                                                 \
			return -1;                                       \
		(a) = p_;                                                \
	} while (0)

/* Room for ntok tokens in every per-token array; the capacity doubles
 * from 64.  Returns 0 or -1 (memory). */
static int grow_arrays(tm_title *ti, size_t ntok)
{
	if (ntok <= ti->tcap)
		return 0;
	size_t cap = ti->tcap;
	uint8_t *rm = tm_grow(ti->rm, &cap, ntok, 1, 64);
	if (!rm)
		return -1;
	ti->rm = rm;
	RESIZE(ti->prot, cap);
	RESIZE(ti->tseg, cap);
	RESIZE(ti->tunit, cap);
	RESIZE(ti->madd, cap);
	RESIZE(ti->mcut, cap);
	RESIZE(ti->unit, cap);
	RESIZE(ti->segs, cap);
	RESIZE(ti->aoff, cap + 1);
	RESIZE(ti->ucats, cap + 1);
	RESIZE(ti->uword, cap);
	RESIZE(ti->uend, cap);
	RESIZE(ti->nextk, cap + 1);
	ti->tcap = cap;
	return 0;
}

#undef RESIZE

int entry_applies_amb(const tm_title *ti, const lex_entry *e)
{
	return ti->lang && strcmp(e->lang, ti->lang) == 0;
}

/* The slot remembering token x's lookups, or NULL when x is not
 * remembered (too long, or no memory). */
static tm_wordmem *wordmem(tm_title *ti, const tm_tok *x)
{
	if (!ti->wmem || x->flen > TITLE_WORDMEM_FOLD || !x->flen)
		return NULL;
	tm_wordmem *m = &ti->wmem[x->hash & ((1u << TITLE_WORDMEM_BITS) - 1)];
	const char *f = tok_fold(&ti->tl, x);
	if (m->flen != x->flen || m->hash != x->hash || memcmp(m->fold, f, x->flen)) {
		m->hash = x->hash;
		m->flen = (uint8_t)x->flen;
		memcpy(m->fold, f, x->flen);
		m->word = lex_word(ti->lx, f, x->flen, x->hash);
		m->ended = 0;
	}
	return m;
}

/* The lexicon's answers for token x, remembered: its word id, and for a
 * word 1 + lex_entry_index of its occupational ending (lex_ending), 0
 * when none. */
static void look_up(tm_title *ti, const tm_tok *x, uint32_t *word, uint32_t *end)
{
	tm_wordmem *m = wordmem(ti, x);
	const lex_entry *e;
	size_t elen;

	*word = m ? m->word : lex_word(ti->lx, tok_fold(&ti->tl, x), x->flen, x->hash);
	*end = 0;
	if (x->kind != TK_WORD)
		return;
	if (m && m->ended) {
		*end = m->ending;
		return;
	}
	e = lex_ending(ti->lx, tok_fold(&ti->tl, x), x->flen, &elen);
	*end = e ? (uint32_t)lex_entry_index(ti->lx, e) + 1 : 0;
	if (m) {
		m->ending = *end;
		m->ended = 1;
	}
}

#define MAXPH 12 /* units of the longest phrase (lex_add's limit) */

/* Room for one more annotation; kept out of line, the rare path of
 * push_ann's loop. */
__attribute__((noinline)) static int grow_ann(tm_title *ti)
{
	tm_ann *p = tm_grow(ti->ann, &ti->anncap, ti->nann + 1, sizeof *p, 64);
	if (!p)
		return -1;
	ti->ann = p;
	return 0;
}

/* Records a phrase (or an ending) of `units` units at the current unit,
 * entries from e on.  Returns 0 or -1 (memory). */
static inline int push_ann(tm_title *ti, size_t k, uint32_t first, uint32_t cats,
			   size_t units)
{
	if (ti->nann == ti->anncap && grow_ann(ti) != 0)
		return -1;
	ti->ann[ti->nann].first = first;
	ti->ann[ti->nann].units = (uint32_t)units;
	ti->ann[ti->nann].cats = cats;
	ti->nann++;
	ti->ucats[k] |= cats;
	ti->lcats |= cats;
	return 0;
}

/* One scan from left to right: from each unit, the trie is walked one
 * word id at a time while a phrase can go on, so each unit costs at
 * most one step per word of the longest phrase, whatever the number of
 * categories and entries.  A word outside the vocabulary (id 0) ends
 * every walk.  A walk stays inside the unit's segment; units removed
 * by the gender rule are transparent ("Addetto/a alla
 * somministrazione"), and a phrase may go on across the segment end
 * right after them.  A word is also looked up backwards in the trie of
 * occupational endings (at most one step per byte of the longest). */
int title_scan(tm_title *ti)
{
	const lex_entry *hit[MAXPH];
	uint32_t hcats[MAXPH];
	size_t endu[MAXPH];

	ti->nann = 0;
	ti->lcats = 0;
	ti->peeled = 0; /* new annotations: pass_phrases looks again */
	ti->nextk[ti->nunit] = (uint32_t)ti->nunit;
	for (size_t k = ti->nunit; k-- > 0;)
		ti->nextk[k] = ti->rm[ti->unit[k]] == NF_GENDER ? ti->nextk[k + 1] : (uint32_t)k;
	for (size_t k = 0; k < ti->nunit; k++) {
		size_t n = 0, d = 1, j;
		uint32_t s = useg(ti, k), node = lex_step(ti->lx, LEX_ROOT, ti->uword[k]);

		ti->aoff[k] = (uint32_t)ti->nann;
		ti->ucats[k] = 0;
		for (j = k; node;) {
			uint32_t cats = 0;
			const lex_entry *e = lex_phrase(ti->lx, node, &cats);
			if (e) {
				hit[n] = e;
				hcats[n] = cats;
				endu[n++] = j + 1;
			}
			/* the next unit, past a run of removed markers at once
			 * (one by one, "(m/w/d) " x 10,000 was quadratic) */
			j++;
			if (j < ti->nunit && ti->rm[ti->unit[j]] == NF_GENDER)
				j = ti->nextk[j];
			if (j >= ti->nunit || d++ == MAXPH ||
			    (useg(ti, j) != s && ti->rm[ti->unit[j - 1]] != NF_GENDER))
				break;
			/* past the markers the walk is in the segment it
			 * went on into: "Chargé(e) de recrutement" */
			s = useg(ti, j);
			node = lex_step(ti->lx, node, ti->uword[j]);
		}
		/* longest first */
		while (n--)
			if (push_ann(ti, k, (uint32_t)lex_entry_index(ti->lx, hit[n]), hcats[n],
				     endu[n] - k))
				return -1;
		/* a word with an occupational ending: Lagerfachkraft */
		if (ti->uend[k] && push_ann(ti, k, ti->uend[k] - 1, 1u << LC_OCCUPATION, 1))
			return -1;
	}
	ti->aoff[ti->nunit] = (uint32_t)ti->nann;
	return 0;
}

/* Are the units of annotation i (at unit k) kept and unprotected, the
 * removed gender units inside it excepted? */
static inline int ann_kept(const tm_title *ti, size_t k, uint32_t i)
{
	size_t nu = ti->ann[i].units;
	for (size_t j = k; j < k + nu; j++) {
		uint32_t t = ti->unit[j];
		if (ti->rm[t] == NF_GENDER && j > k) {
			/* a run removed before the scan at once */
			if (ti->nextk[j] > j)
				j = ti->nextk[j] - 1;
			continue;
		}
		if (ti->rm[t] != RM_NONE || ti->prot[t])
			return 0;
	}
	return 1;
}

/* Inline in its three callers: each asks with a value or without one,
 * and the tests of the other kind go. */
__attribute__((always_inline)) static inline const lex_entry *
match_gen(tm_title *ti, size_t k, unsigned mask, const char *value, int kept,
	  size_t *len)
{
	if (k >= ti->nunit)
		return NULL;
	for (uint32_t i = ti->aoff[k]; i < ti->aoff[k + 1]; i++) {
		const lex_entry *e;
		if (!(ti->ann[i].cats & mask))
			continue;
		/* the phrase's first entry that answers, then whether its
		 * units are kept (most phrases asked have no such entry) */
		for (e = lex_entry_at(ti->lx, ti->ann[i].first); e; e = lex_next(ti->lx, e))
			if ((mask & (1u << e->cat)) &&
			    (!value || (e->value[0] == value[0] &&
					strcmp(e->value, value) == 0)) &&
			    entry_applies(ti, e))
				break;
		if (e && (!kept || ann_kept(ti, k, i))) {
			*len = ti->ann[i].units;
			return e;
		}
	}
	return NULL;
}

unsigned match_vals_(tm_title *ti, size_t k, int cat, const char *const *vals,
		     size_t nval, int kept)
{
	unsigned found = 0, all = (1u << nval) - 1;
	if (k >= ti->nunit)
		return 0;
	for (uint32_t i = ti->aoff[k]; i < ti->aoff[k + 1]; i++) {
		int tested = !kept;
		if (!(ti->ann[i].cats & (1u << cat)))
			continue;
		for (const lex_entry *e = lex_entry_at(ti->lx, ti->ann[i].first); e;
		     e = lex_next(ti->lx, e)) {
			if (e->cat != cat || !entry_applies(ti, e))
				continue;
			/* whether the units are kept, once an entry answers */
			if (!tested) {
				if (!ann_kept(ti, k, i))
					break;
				tested = 1;
			}
			for (size_t v = 0; v < nval; v++)
				if (e->value[0] == vals[v][0] && strcmp(e->value, vals[v]) == 0)
					found |= 1u << v;
			if (found == all || (found & 1))
				return found;
		}
	}
	return found;
}

const lex_entry *match_val_(tm_title *ti, size_t k, int cat,
			    const char *value, int kept, size_t *len)
{
	return match_gen(ti, k, 1u << cat, value, kept, len);
}

const lex_entry *match_mask_(tm_title *ti, size_t k, unsigned mask,
			     int kept, size_t *len)
{
	return match_gen(ti, k, mask, NULL, kept, len);
}

const lex_entry *match_cat_(tm_title *ti, size_t k, int cat, int kept,
			    size_t *len)
{
	return match_gen(ti, k, 1u << cat, NULL, kept, len);
}

int remove_toks(tm_title *ti, size_t t0, size_t t1, int kind,
		const char *value)
{
	size_t t, any = 0;

	for (t = t0; t <= t1 && t < ti->tl.n; t++)
		if (!ti->prot[t] && ti->rm[t] == RM_NONE) {
			ti->rm[t] = (uint8_t)kind;
			any++;
		}
	if (!any)
		return 0;
	ti->gen++;
	if (ti->nspan == ti->spcap) {
		tm_span *p = tm_grow(ti->spans, &ti->spcap, ti->nspan + 1, sizeof *p, 16);
		if (!p)
			return -1;
		ti->spans = p;
	}
	ti->spans[ti->nspan].t0 = (uint32_t)t0;
	ti->spans[ti->nspan].t1 = (uint32_t)t1;
	ti->spans[ti->nspan].kind = (uint8_t)kind;
	ti->spans[ti->nspan].value = value;
	ti->nspan++;
	return 0;
}

int remove_units(tm_title *ti, size_t k0, size_t k1, int kind,
		 const char *value)
{
	if (k1 <= k0)
		return 0;
	return remove_toks(ti, ti->unit[k0], ti->unit[k1 - 1], kind, value);
}

int units_free(tm_title *ti, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (!ukept(ti, k) || ti->prot[ti->unit[k]])
			return 0;
	return 1;
}

void seg_kept_(tm_title *ti, size_t s, size_t *k0, size_t *k1)
{
	tm_seg *g = &ti->segs[s];
	size_t a = g->u0, b = g->u1;

	/* units are only ever removed: go on from the last answer (from
	 * the segment's ends each time, peeling "ab sofort " x 10,000 off
	 * an edge was quadratic) */
	if (g->gen) {
		a = g->k0;
		b = g->k1;
	}
	while (a < b && !ukept(ti, a))
		a++;
	while (b > a && !ukept(ti, b - 1))
		b--;
	g->k0 = (uint32_t)a;
	g->k1 = (uint32_t)b;
	g->gen = ti->gen;
	*k0 = a;
	*k1 = b;
}

int glued(const tm_title *ti, size_t a, size_t b, const char *puncts)
{
	size_t t;
	for (t = ti->unit[a] + 1; t <= ti->unit[b]; t++) {
		const tm_tok *x = &ti->tl.t[t];
		if (x->sp)
			return 0;
		if (t == ti->unit[b])
			break;
		if (x->kind != TK_PUNCT || !x->ch || !strchr(puncts, x->ch))
			return 0;
	}
	return 1;
}

/* The bucket of a pair in title_pairs. */
static size_t pair_bucket(const lex_pair *q)
{
	unsigned fl = q->flen ? (unsigned char)q->fem[q->flen - 1] : 256;
	unsigned ml = q->mlen ? (unsigned char)q->masc[q->mlen - 1] : 256;
	return title_pair_bucket(fl, ml, (long)q->mlen - (long)q->flen);
}

/* Groups the lexicon's pairs by bucket (a counting sort: file order
 * kept within a bucket).  Returns 0 or -1 (memory; nothing changed). */
static int pairs_index(tm_title *ti)
{
	size_t n, b;
	const lex_pair *p = lex_pairs(ti->lx, &n);
	uint32_t *beg = calloc(TITLE_PAIR_BUCKETS + 1, sizeof *beg);
	uint32_t *idx = malloc((n ? n : 1) * sizeof *idx);

	if (!beg || !idx || n >= UINT32_MAX) {
		free(beg);
		free(idx);
		return -1;
	}
	for (size_t i = 0; i < n; i++)
		beg[pair_bucket(&p[i]) + 1]++;
	for (b = 0; b < TITLE_PAIR_BUCKETS; b++)
		beg[b + 1] += beg[b];
	for (size_t i = 0; i < n; i++)
		idx[beg[pair_bucket(&p[i])]++] = (uint32_t)i;
	/* each start went on to the next bucket's: shift them back */
	for (b = TITLE_PAIR_BUCKETS; b > 0; b--)
		beg[b] = beg[b - 1];
	beg[0] = 0;
	free(ti->pbeg);
	free(ti->pidx);
	ti->pbeg = beg;
	ti->pidx = idx;
	ti->npairs = n;
	return 0;
}

int title_build(tm_title *ti)
{
	tok_line *tl = &ti->tl;
	size_t t, depth = 0;
	uint32_t cur = 0;
	int newseg = 1, inbr = 0, outer = -1, resume = -1;

	if (grow_arrays(ti, tl->n + 1) != 0)
		return -1;
	size_t npairs;
	(void)lex_pairs(ti->lx, &npairs);
	if (ti->wmem_lx != ti->lx || !ti->pbeg || ti->npairs != npairs) {
		/* remembered for one lexicon: forget on a change */
		if (!ti->wmem && !(ti->wmem = malloc(sizeof *ti->wmem << TITLE_WORDMEM_BITS)))
			return -1;
		if (pairs_index(ti) != 0)
			return -1;
		for (size_t i = 0; i < (size_t)1 << TITLE_WORDMEM_BITS; i++)
			ti->wmem[i].flen = 0;
		ti->wmem_lx = ti->lx;
	}
	memset(ti->rm, RM_NONE, tl->n);
	memset(ti->prot, 0, tl->n);
	ti->nunit = ti->nseg = ti->nspan = 0;
	ti->gen++;
	ti->lflags = 0;
	ti->phrase_runs = 0;
	int head_seen = 0;
	size_t words = 0, caps = 0;
	for (t = 0; t < tl->n; t++) {
		tm_tok *x = &tl->t[t];
		ti->tunit[t] = UINT32_MAX;
		ti->madd[t] = NULL;
		ti->mcut[t] = 0;
		ti->tseg[t] = UINT32_MAX;
		if (x->kind != TK_PUNCT && x->flen == 0) {
			/* a lone mark or an ignorable: folds to nothing, is
			 * no word (the renderer never shows it) */
			ti->rm[t] = NF_SLOT;
			continue;
		}
		switch (x->kind) {
		case TK_NUM: ti->lflags |= LF_NUM; break;
		case TK_SYM: ti->lflags |= LF_SYM; break;
		case TK_WORD:
			if (x->flags & TF_DIGIT)
				ti->lflags |= LF_DIGITWORD;
			if (x->flags & TF_CAPSUF)
				ti->lflags |= LF_CAPSUF;
			if ((x->flen == 3 || x->flen == 4 || x->flen == 5) &&
			    (!memcmp(tok_fold(tl, x), "www", 3) ||
			     !memcmp(tok_fold(tl, x), "http", x->flen < 4 ? 3 : 4)))
				ti->lflags |= LF_URL;
			/* an address written "jobs(at)…" */
			if (x->flen == 2 && !memcmp(tok_fold(tl, x), "at", 2))
				ti->lflags |= LF_URL;
			break;
		default:
			switch (x->ch) {
			case '/': case '-': case '*': case ':': case '_':
			case '.': case '(': case ',': case '|': case TOK_MIDDOT:
				ti->lflags |= LF_JOIN;
				break;
			default:
				break;
			}
			if (x->ch == '=') /* a query: "…/jobs?ref=board" */
				ti->lflags |= LF_URL;
			break;
		}
		if (x->kind == TK_PUNCT) {
			if (x->flags & TF_OPEN) {
				/* the text after the bracket goes on with the
				 * segment before it, "Koch (m/w/d) Vollzeit" */
				if (depth == 0)
					outer = ti->nseg ? (int)ti->segs[cur].index : -1;
				depth++;
				inbr = 1;
				newseg = 1;
				resume = -1;
			} else if (x->flags & TF_CLOSE) {
				if (depth)
					depth--;
				inbr = depth > 0;
				newseg = 1;
				resume = depth == 0 ? outer : -1;
			} else if (x->flags & TF_STRONG) {
				newseg = 1;
				resume = -1;
			}
			continue;
		}
		if (newseg) {
			tm_seg *g = &ti->segs[ti->nseg];
			g->u0 = g->u1 = (uint32_t)ti->nunit;
			g->bracket = (uint8_t)inbr;
			/* 0 marks the head: the first segment outside
			 * brackets and what resumes it after a bracket */
			g->resumed = 0;
			if (inbr)
				g->index = 1;
			else if (!head_seen || resume == 0) {
				g->index = 0;
				g->resumed = head_seen;
			}
			else
				g->index = (uint8_t)(ti->nseg > 255 ? 255 : ti->nseg);
			if (!inbr)
				head_seen = 1;
			g->gen = 0;
			cur = (uint32_t)ti->nseg++;
			newseg = 0;
		}
		ti->tseg[t] = cur;
		ti->tunit[t] = (uint32_t)ti->nunit;
		look_up(ti, x, &ti->uword[ti->nunit], &ti->uend[ti->nunit]);
		ti->unit[ti->nunit++] = (uint32_t)t;
		ti->segs[cur].u1 = (uint32_t)ti->nunit;
		if (x->kind == TK_WORD && x->len >= 2) {
			words++;
			caps += (x->flags & TF_ALLCAPS) != 0;
		}
	}
	/* the units never change after this: all_caps_line answers from here */
	ti->caps = words >= 2 && caps * 5 >= words * 4;
	return 0;
}

/* Sorts the spans by their first token, stably (each rule adds its own
 * in title order).  Insertion for the few pieces of a title; a merge sort
 * for thousands ("(m/w/d) in Berlin - " repeated: insertion was
 * quadratic), or insertion still when memory for it ran out. */
void title_sort_spans(tm_title *ti)
{
	size_t n = ti->nspan;
	tm_span *v = ti->spans, *tmp;

	if (n <= 32 || !(tmp = malloc(n * sizeof *tmp))) {
		for (size_t i = 1, j; i < n; i++) {
			tm_span s = v[i];
			for (j = i; j > 0 && v[j - 1].t0 > s.t0; j--)
				v[j] = v[j - 1];
			v[j] = s;
		}
		return;
	}
	for (size_t w = 1; w < n; w *= 2) {
		for (size_t lo = 0; lo < n; lo += 2 * w) {
			size_t mid = lo + w < n ? lo + w : n, hi = lo + 2 * w < n ? lo + 2 * w : n;
			size_t i = lo, j = mid, k = lo;
			while (i < mid && j < hi)
				tmp[k++] = v[j].t0 < v[i].t0 ? v[j++] : v[i++];
			while (i < mid)
				tmp[k++] = v[i++];
			while (j < hi)
				tmp[k++] = v[j++];
		}
		memcpy(v, tmp, n * sizeof *v);
	}
	free(tmp);
}

void title_free(tm_title *ti)
{
	if (!ti)
		return;
	tok_line_free(&ti->tl);
	free(ti->rm);
	free(ti->prot);
	free(ti->tseg);
	free(ti->tunit);
	free(ti->madd);
	free(ti->mcut);
	free(ti->unit);
	free(ti->segs);
	free(ti->spans);
	free(ti->ann);
	free(ti->aoff);
	free(ti->ucats);
	free(ti->nextk);
	free(ti->uword);
	free(ti->uend);
	free(ti->wmem);
	free(ti->pbeg);
	free(ti->pidx);
	memset(ti, 0, sizeof *ti);
}

/* norm.c - the normaliser pipeline: decode, prepare, tokenise, segment,
 * run the lexicon passes, render the clean title and the match key. */
#include "norm.h"

#include <stdlib.h>
#include <string.h>

#include "decode.h"
#include "pass.h"

static const char *const kind_names[NF_NKIND] = {
	"gender", "seniority", "location", "schedule", "hours", "workload",
	"pay", "reference", "date", "marketing", "employer", "email",
	"phone", "url", "location-slot",
};

const char *nf_kind_name(int kind)
{
	return kind >= 0 && kind < NF_NKIND ? kind_names[kind] : "other";
}

normaliser *norm_new(const lexicon *lx)
{
	normaliser *nm = calloc(1, sizeof *nm);
	if (!nm)
		return NULL;
	nm->lx = lx;
	return nm;
}

void norm_free(normaliser *nm)
{
	if (!nm)
		return;
	uni_ctx_free(&nm->u);
	tok_line_free(&nm->tl);
	buf_free(&nm->dec);
	buf_free(&nm->work);
	buf_free(&nm->title);
	buf_free(&nm->key);
	buf_free(&nm->ptext);
	buf_free(&nm->again);
	buf_free(&nm->masked);
	free(nm->rm);
	free(nm->prot);
	free(nm->tseg);
	free(nm->tunit);
	free(nm->unit);
	free(nm->segs);
	free(nm->spans);
	free(nm->pieces);
	free(nm->mc);
	free(nm->moff);
	free(nm->ucats);
	free(nm->nextk);
	free(nm->ring);
	free(nm->slot);
	free(nm);
}

static int grow_arrays(normaliser *nm, size_t ntok)
{
	if (ntok <= nm->tcap)
		return 0;
	size_t cap = nm->tcap ? nm->tcap : 64;
	while (cap < ntok)
		cap *= 2;
	uint8_t *rm = realloc(nm->rm, cap);
	if (!rm)
		return -1;
	nm->rm = rm;
	uint8_t *pr = realloc(nm->prot, cap);
	if (!pr)
		return -1;
	nm->prot = pr;
	uint32_t *ts = realloc(nm->tseg, cap * sizeof *ts);
	if (!ts)
		return -1;
	nm->tseg = ts;
	uint32_t *tu = realloc(nm->tunit, cap * sizeof *tu);
	if (!tu)
		return -1;
	nm->tunit = tu;
	uint32_t *un = realloc(nm->unit, cap * sizeof *un);
	if (!un)
		return -1;
	nm->unit = un;
	seg *sg = realloc(nm->segs, cap * sizeof *sg);
	if (!sg)
		return -1;
	nm->segs = sg;
	uint32_t *mo = realloc(nm->moff, (cap + 1) * sizeof *mo);
	if (!mo)
		return -1;
	nm->moff = mo;
	uint16_t *uc = realloc(nm->ucats, (cap + 1) * sizeof *uc);
	if (!uc)
		return -1;
	nm->ucats = uc;
	uint32_t *nk = realloc(nm->nextk, (cap + 1) * sizeof *nk);
	if (!nk)
		return -1;
	nm->nextk = nk;
	nm->tcap = cap;
	return 0;
}

int entry_applies(const normaliser *nm, const lex_entry *e)
{
	if (e->off)
		return 0;
	if (!e->amb || nm->any_lang)
		return 1;
	return nm->lang && strcmp(e->lang, nm->lang) == 0;
}

#define MAXPH 12

/* Fills the phrase cache: for each unit, every phrase of the lexicon
 * that starts there, longest first.  Units removed by the gender pass
 * are transparent ("Addetto/a alla somministrazione"). */
static int cache_build(normaliser *nm)
{
	const char *fold[MAXPH];
	uint32_t fl[MAXPH];
	size_t endu[MAXPH];
	uint64_t seq[MAXPH];

	nm->nmc = 0;
	nm->lcats = 0;
	nm->nextk[nm->nunit] = (uint32_t)nm->nunit;
	for (size_t k = nm->nunit; k-- > 0;)
		nm->nextk[k] = nm->rm[nm->unit[k]] == NF_GENDER ? nm->nextk[k + 1] : (uint32_t)k;
	for (size_t k = 0; k < nm->nunit; k++) {
		size_t n = 0, j, L;
		uint64_t h = LEX_SEQ_SEED;
		uint32_t s = useg(nm, k);

		nm->moff[k] = (uint32_t)nm->nmc;
		nm->ucats[k] = 0;
		for (j = k; j < nm->nunit && n < MAXPH; j++) {
			if (j > k && nm->rm[nm->unit[j]] == NF_GENDER) {
				/* the whole run of removed markers at once: one by
				 * one, "(m/w/d) " x 10,000 was quadratic */
				j = nm->nextk[j] - 1;
				continue;
			}
			if (useg(nm, j) != s && !(j > k && nm->rm[nm->unit[j - 1]] == NF_GENDER))
				break;
			h = lex_seq_step(h, U(nm, j)->hash);
			seq[n] = lex_seq_final(h, n + 1);
			/* no phrase goes on like this: stop */
			if (!lex_maybe_prefix(nm->lx, seq[n]))
				break;
			fold[n] = ufold(nm, j, &fl[n]);
			endu[n] = j + 1;
			n++;
		}
		for (L = n; L >= 1; L--) {
			if (!lex_maybe_phrase(nm->lx, seq[L - 1]))
				continue;
			const lex_entry *e = lex_find(nm->lx, seq[L - 1], L, fold, fl);
			if (!e)
				continue;
			if (nm->nmc == nm->mccap) {
				size_t cap = nm->mccap ? nm->mccap * 2 : 64;
				struct mcache *p = realloc(nm->mc, cap * sizeof *p);
				if (!p)
					return -1;
				nm->mc = p;
				nm->mccap = cap;
			}
			nm->mc[nm->nmc].first = (uint32_t)lex_entry_index(nm->lx, e);
			nm->mc[nm->nmc].units = (uint32_t)(endu[L - 1] - k);
			uint16_t cats = 0;
			for (const lex_entry *f = e; f; f = lex_next(nm->lx, f))
				cats |= (uint16_t)(1u << f->cat);
			nm->mc[nm->nmc].cats = cats;
			nm->ucats[k] |= cats;
			nm->lcats |= cats;
			nm->nmc++;
		}
	}
	nm->moff[nm->nunit] = (uint32_t)nm->nmc;
	return 0;
}

static const lex_entry *match_gen(normaliser *nm, size_t k, unsigned mask,
				  const char *value, int kept, size_t *len)
{
	if (k >= nm->nunit)
		return NULL;
	for (uint32_t i = nm->moff[k]; i < nm->moff[k + 1]; i++) {
		size_t nu = nm->mc[i].units, j;
		int ok = 1;
		if (!(nm->mc[i].cats & mask))
			continue;
		if (kept)
			for (j = k; j < k + nu && ok; j++) {
				uint32_t t = nm->unit[j];
				if (nm->rm[t] == NF_GENDER && j > k) {
					/* a run of markers at once ("ab (m/w/d) x
					 * 300 sofort"): units only ever get removed,
					 * so the run of cache_build is still one */
					if (nm->nextk[j] > j)
						j = nm->nextk[j] - 1;
					continue;
				}
				if (nm->rm[t] != RM_NONE || nm->prot[t])
					ok = 0;
			}
		if (!ok)
			continue;
		for (const lex_entry *e = lex_entry_at(nm->lx, nm->mc[i].first); e;
		     e = lex_next(nm->lx, e))
			if ((mask & (1u << e->cat)) && entry_applies(nm, e) &&
			    (!value || (e->value[0] == value[0] &&
					strcmp(e->value, value) == 0))) {
				*len = nu;
				return e;
			}
	}
	return NULL;
}

const lex_entry *match_val_(normaliser *nm, size_t k, int cat,
			    const char *value, int kept, size_t *len)
{
	return match_gen(nm, k, 1u << cat, value, kept, len);
}

const lex_entry *match_mask_(normaliser *nm, size_t k, unsigned mask,
			     int kept, size_t *len)
{
	return match_gen(nm, k, mask, NULL, kept, len);
}

const lex_entry *match_cat_(normaliser *nm, size_t k, int cat, int kept,
			    size_t *len)
{
	return match_gen(nm, k, 1u << cat, NULL, kept, len);
}

int remove_toks(normaliser *nm, size_t t0, size_t t1, int kind,
		const char *value)
{
	size_t t, any = 0;

	for (t = t0; t <= t1 && t < nm->tl.n; t++)
		if (!nm->prot[t] && nm->rm[t] == RM_NONE) {
			nm->rm[t] = (uint8_t)kind;
			any++;
		}
	if (!any)
		return 0;
	nm->gen++;
	if (nm->nspan == nm->spcap) {
		size_t cap = nm->spcap ? nm->spcap * 2 : 16;
		span *p = realloc(nm->spans, cap * sizeof *p);
		if (!p)
			return -1;
		nm->spans = p;
		nm->spcap = cap;
	}
	nm->spans[nm->nspan].t0 = (uint32_t)t0;
	nm->spans[nm->nspan].t1 = (uint32_t)t1;
	nm->spans[nm->nspan].kind = (uint8_t)kind;
	nm->spans[nm->nspan].value = value;
	nm->nspan++;
	return 0;
}

int remove_units(normaliser *nm, size_t k0, size_t k1, int kind,
		 const char *value)
{
	if (k1 <= k0)
		return 0;
	return remove_toks(nm, nm->unit[k0], nm->unit[k1 - 1], kind, value);
}

int units_free(normaliser *nm, size_t k0, size_t k1)
{
	for (size_t k = k0; k < k1; k++)
		if (!ukept(nm, k) || nm->prot[nm->unit[k]])
			return 0;
	return 1;
}

void seg_kept(normaliser *nm, size_t s, size_t *k0, size_t *k1)
{
	seg *g = &nm->segs[s];
	size_t a = g->u0, b = g->u1;

	/* remembered until the next removal */
	if (g->gen == nm->gen) {
		*k0 = g->k0;
		*k1 = g->k1;
		return;
	}
	/* units are only ever removed: go on from the last answer (from
	 * the segment's ends each time, peeling "ab sofort " x 10,000 off
	 * an edge was quadratic) */
	if (g->gen) {
		a = g->k0;
		b = g->k1;
	}
	while (a < b && !ukept(nm, a))
		a++;
	while (b > a && !ukept(nm, b - 1))
		b--;
	g->k0 = (uint32_t)a;
	g->k1 = (uint32_t)b;
	g->gen = nm->gen;
	*k0 = a;
	*k1 = b;
}

int glued(normaliser *nm, size_t a, size_t b, const char *puncts)
{
	size_t t;
	for (t = nm->unit[a] + 1; t <= nm->unit[b]; t++) {
		const tm_tok *x = &nm->tl.t[t];
		if (x->sp)
			return 0;
		if (t == nm->unit[b])
			break;
		if (x->kind != TK_PUNCT || !x->ch || !strchr(puncts, x->ch))
			return 0;
	}
	return 1;
}

static int prepare(normaliser *nm, const char *s, size_t n)
{
	buf_reset(&nm->work);
	return uni_prepare(&nm->u, s, n, &nm->work);
}

static int build(normaliser *nm)
{
	tok_line *tl = &nm->tl;
	size_t t, depth = 0;
	uint32_t cur = 0;
	int newseg = 1, inbr = 0, outer = -1, resume = -1;

	if (grow_arrays(nm, tl->n + 1) != 0)
		return -1;
	memset(nm->rm, RM_NONE, tl->n);
	memset(nm->prot, 0, tl->n);
	nm->nunit = nm->nseg = nm->nspan = 0;
	nm->gen++;
	nm->lflags = 0;
	int head_seen = 0;
	for (t = 0; t < tl->n; t++) {
		tm_tok *x = &tl->t[t];
		nm->tunit[t] = UINT32_MAX;
		nm->tseg[t] = UINT32_MAX;
		if (x->kind != TK_PUNCT && x->flen == 0) {
			/* a lone mark or an ignorable: folds to nothing, is
			 * no word (the renderer never shows it) */
			nm->rm[t] = NF_SLOT;
			continue;
		}
		switch (x->kind) {
		case TK_NUM: nm->lflags |= LF_NUM; break;
		case TK_SYM: nm->lflags |= LF_SYM; break;
		case TK_WORD:
			if (x->flags & TF_DIGIT)
				nm->lflags |= LF_DIGITWORD;
			if (x->flags & TF_CAPSUF)
				nm->lflags |= LF_CAPSUF;
			if ((x->flen == 3 || x->flen == 4 || x->flen == 5) &&
			    (!memcmp(tok_fold(tl, x), "www", 3) ||
			     !memcmp(tok_fold(tl, x), "http", x->flen < 4 ? 3 : 4)))
				nm->lflags |= LF_URL;
			/* an address written "jobs(at)…" */
			if (x->flen == 2 && !memcmp(tok_fold(tl, x), "at", 2))
				nm->lflags |= LF_URL;
			break;
		default:
			if (x->ch && strchr("/-*:_.(,|\x01", x->ch))
				nm->lflags |= LF_JOIN;
			if (x->ch == '=') /* a query: "…/jobs?ref=board" */
				nm->lflags |= LF_URL;
			break;
		}
		if (x->kind == TK_PUNCT) {
			if (x->flags & TF_OPEN) {
				/* the text after the bracket goes on with the
				 * segment before it, "Koch (m/w/d) Vollzeit" */
				if (depth == 0)
					outer = nm->nseg ? (int)nm->segs[cur].index : -1;
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
			seg *g = &nm->segs[nm->nseg];
			g->u0 = g->u1 = (uint32_t)nm->nunit;
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
				g->index = (uint8_t)(nm->nseg > 255 ? 255 : nm->nseg);
			if (!inbr)
				head_seen = 1;
			g->gen = 0;
			cur = (uint32_t)nm->nseg++;
			newseg = 0;
		}
		nm->tseg[t] = cur;
		nm->tunit[t] = (uint32_t)nm->nunit;
		nm->unit[nm->nunit++] = (uint32_t)t;
		nm->segs[cur].u1 = (uint32_t)nm->nunit;
	}
	return 0;
}

static void protect(normaliser *nm)
{
	size_t k = 0, len;
	while (k < nm->nunit) {
		if (match_cat(nm, k, LC_PROTECT, 0, &len)) {
			for (size_t t = nm->unit[k]; t <= nm->unit[k + len - 1]; t++)
				nm->prot[t] = 1;
			k += len;
		} else
			k++;
	}
}

static int put_lower(normaliser *nm, tm_buf *b, const tm_tok *t)
{
	const char *p = nm->work.data + t->off;
	if (!(t->flags & TF_NONASCII) && (unsigned char)p[0] < 0x80) {
		if (buf_reserve(b, t->len) != 0)
			return -1;
		for (size_t i = 0; i < t->len; i++) {
			char c = p[i];
			b->data[b->len++] = (char)(c >= 'A' && c <= 'Z' ? c + 32 : c);
		}
		return 0;
	}
	return uni_lower(p, t->len, b);
}

static int is_kept_word(normaliser *nm, size_t k)
{
	return ukept(nm, k) && U(nm, k)->kind != TK_SYM;
}

/* A symbol unit is shown only for & and + standing between kept words. */
static int show_unit(normaliser *nm, size_t k)
{
	const tm_tok *t = U(nm, k);
	size_t j;

	if (!ukept(nm, k))
		return 0;
	if (t->kind != TK_SYM)
		return 1;
	if (t->ch != '&' && t->ch != '+')
		return 0;
	for (j = k; j > 0 && !ukept(nm, j - 1); j--)
		;
	if (j == 0 || !is_kept_word(nm, j - 1))
		return 0;
	for (j = k + 1; j < nm->nunit && !ukept(nm, j); j++)
		;
	return j < nm->nunit && is_kept_word(nm, j);
}

/* A dot right after word token a, then a space, then the kept word b
 * of the same segment with nothing removed between. */
static int abbrev_dot(normaliser *nm, size_t a, size_t b)
{
	const tm_tok *w = &nm->tl.t[a];
	if (w->kind != TK_WORD || a + 2 != b || nm->tseg[a] != nm->tseg[b])
		return 0;
	return w->len <= 6;
}

static int is_connector(normaliser *nm, size_t k)
{
	size_t len;
	return match_val(nm, k, LC_UNIT, "connector", 0, &len) != NULL;
}

static int render(normaliser *nm, norm_result *res)
{
	size_t k, prev = SIZE_MAX;
	tm_buf *ti = &nm->title, *ke = &nm->key;

	buf_reset(ti);
	buf_reset(ke);
	nm->hidden = 0;
	for (k = 0; k < nm->nunit; k++) {
		const tm_tok *t = U(nm, k);
		if (!show_unit(nm, k)) {
			nm->hidden += ukept(nm, k);
			continue;
		}
		if (prev != SIZE_MAX) {
			/* glue: the weak punctuation written between two kept
			 * units with no space and nothing removed between */
			size_t a = nm->unit[prev], b = nm->unit[k], x;
			int space = 0;
			for (x = a + 1; x <= b; x++) {
				const tm_tok *m = &nm->tl.t[x];
				if (m->sp || (x < b && (nm->rm[x] != RM_NONE ||
							(m->flags & TF_STRONG) ||
							m->kind != TK_PUNCT)))
					space = 1;
			}
			if (space || ((t->kind == TK_SYM || U(nm, prev)->kind == TK_SYM) &&
				      b != a + 1)) {
				/* an abbreviation's dot (Kfm. Sachbearbeiter) and a
				 * suspended hyphen (Energie- und Gebäudetechnik)
				 * stay with their word */
				const tm_tok *d = a + 1 < nm->tl.n ? &nm->tl.t[a + 1] : NULL;
				if (d && d->kind == TK_PUNCT && !d->sp && a + 1 < b &&
				    nm->rm[a + 1] == RM_NONE && nm->tl.t[a + 2].sp &&
				    ((d->ch == '.' && abbrev_dot(nm, a, b)) ||
				     (d->ch == '-' && is_connector(nm, k))))
					if (buf_putc(ti, (char)d->ch))
						return -1;
				/* Lagerist / Kommissionierer: a spaced slash alone
				 * between two kept words stays (spaced as written:
				 * "Job/&o" spaced would read as two segments) */
				if (b == a + 2 && nm->tl.t[a + 1].ch == '/' &&
				    nm->tl.t[a + 1].kind == TK_PUNCT && nm->rm[a + 1] == RM_NONE &&
				    (nm->tl.t[a + 1].sp || nm->tl.t[b].sp)) {
					if (buf_puts(ti, " / ") || buf_putc(ke, ' '))
						return -1;
				} else if (buf_putc(ti, ' ') || buf_putc(ke, ' '))
					return -1;
			} else if (b == a + 1) {
				/* directly adjacent: 75 + k, Linked + In */
			} else {
				for (x = a + 1; x < b; x++)
					if (put_lower(nm, ti, &nm->tl.t[x]))
						return -1;
				if (buf_putc(ke, ' '))
					return -1;
			}
		}
		if (put_lower(nm, ti, t) ||
		    buf_append(ke, tok_fold(&nm->tl, t), t->flen))
			return -1;
		prev = k;
	}
	res->title = ti->data ? ti->data : "";
	res->title_len = ti->len;
	res->key = ke->data ? ke->data : "";
	res->key_len = ke->len;
	return 0;
}

/* Sorts the spans by their first token, stably (each pass adds its own
 * in title order).  Insertion for the few pieces of a title; a merge sort
 * for thousands ("(m/w/d) in Berlin - " repeated: insertion was
 * quadratic), or insertion still when memory for it ran out. */
static void sort_spans(normaliser *nm)
{
	size_t n = nm->nspan;
	span *v = nm->spans, *tmp;

	if (n <= 32 || !(tmp = malloc(n * sizeof *tmp))) {
		for (size_t i = 1, j; i < n; i++) {
			span s = v[i];
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

static int pieces(normaliser *nm, norm_result *res)
{
	size_t i;

	sort_spans(nm);
	if (nm->nspan > nm->pcap) {
		nf_piece *p = realloc(nm->pieces, nm->nspan * sizeof *p);
		if (!p)
			return -1;
		nm->pieces = p;
		nm->pcap = nm->nspan;
	}
	for (i = 0; i < nm->nspan; i++) {
		const span *s = &nm->spans[i];
		const tm_tok *a = &nm->tl.t[s->t0], *b = &nm->tl.t[s->t1];
		nf_piece *p = &nm->pieces[i];
		p->kind = s->kind;
		p->value = s->value;
		p->text = nm->work.data + a->off;
		p->len = b->off + b->len - a->off;
	}
	res->piece = nm->pieces;
	res->npiece = nm->nspan;
	return 0;
}

/* One pass of the pipeline over well-formed text. */
static int norm_once(normaliser *nm, const char *src, size_t n, norm_result *res)
{
	if (prepare(nm, src, n) != 0)
		return -1;
	if (tok_split(&nm->tl, &nm->u, nm->work.data, nm->work.len) != 0)
		return -1;
	if (build(nm) != 0)
		return -1;
	if (cache_build(nm) != 0)
		return -1;
	unsigned f;
	if (HAS(nm, LC_PROTECT))
		protect(nm);
	f = nm->lflags;
	if (((f & (LF_NUM | LF_SYM | LF_URL)) && pass_pii(nm)) || pass_gender(nm))
		return -1;
	if (nm->nspan && cache_build(nm) != 0)
		return -1;
	/* each pass runs only where the line holds what it looks for */
	if (((f & (LF_NUM | LF_DIGITWORD | LF_SYM) || HAS(nm, LC_REFERENCE)) &&
	     pass_reference(nm)) ||
	    ((f & LF_NUM) && (pass_pay(nm) || pass_schedule(nm))) ||
	    ((f & LF_SYM) && pass_hashtags(nm)))
		return -1;
	int phrases = nm->lcats || (f & LF_NUM);
	if ((phrases && pass_phrases(nm)) ||
	    (HAS(nm, LC_EMPLOYER) && pass_employer(nm)) ||
	    ((HAS(nm, LC_PLACE) || HAS(nm, LC_LOCATION)) && pass_location(nm)) ||
	    (phrases && pass_phrases(nm)))
		return -1;
	return render(nm, res);
}

/* Did the pass join words that stood apart (removed pieces between
 * them, or several segments)?  Then the clean title, read afresh, may
 * hold a phrase the raw title did not. */
static int joined(normaliser *nm)
{
	size_t with = 0, a, b;
	if (nm->nspan || nm->hidden)
		return 1;
	/* punctuation the title does not show (a strong one, or one with
	 * a space beside it) may have kept apart what the title now joins */
	for (size_t t = 0; t < nm->tl.n; t++) {
		const tm_tok *x = &nm->tl.t[t];
		if (x->kind != TK_PUNCT)
			continue;
		if ((x->flags & TF_STRONG) || x->sp || t == 0 || t + 1 == nm->tl.n ||
		    nm->tl.t[t + 1].sp)
			return 1;
	}
	for (size_t s = 0; s < nm->nseg; s++) {
		seg_kept(nm, s, &a, &b);
		with += a < b;
	}
	return with > 1;
}

/* Copies the pieces found so far out of the pass's buffers (offsets into
 * ptext; pointers are set once all passes are done). */
static int keep_pieces(normaliser *nm, size_t *npiece)
{
	sort_spans(nm);
	for (size_t i = 0; i < nm->nspan; i++) {
		const span *s = &nm->spans[i];
		const tm_tok *a = &nm->tl.t[s->t0], *b = &nm->tl.t[s->t1];
		size_t len = b->off + b->len - a->off, off = nm->ptext.len;
		if (*npiece == nm->pcap) {
			size_t cap = nm->pcap ? nm->pcap * 2 : 16;
			nf_piece *p = realloc(nm->pieces, cap * sizeof *p);
			if (!p)
				return -1;
			nm->pieces = p;
			nm->pcap = cap;
		}
		if (buf_append(&nm->ptext, nm->work.data + a->off, len))
			return -1;
		nf_piece *p = &nm->pieces[(*npiece)++];
		p->kind = s->kind;
		p->value = s->value;
		p->text = (const char *)(uintptr_t)off; /* fixed up below */
		p->len = len;
	}
	return 0;
}

/* The prepared raw title with contact data masked, from the first pass
 * (before a second pass reuses the buffers). */
static int mask(normaliser *nm)
{
	size_t at = 0;
	buf_reset(&nm->masked);
	sort_spans(nm);
	for (size_t i = 0; i < nm->nspan; i++) {
		const span *s = &nm->spans[i];
		const char *what = s->kind == NF_EMAIL ? "<email>" : s->kind == NF_PHONE ? "<phone>"
				   : s->kind == NF_URL ? "<url>" : NULL;
		if (!what)
			continue;
		size_t a = nm->tl.t[s->t0].off, b = nm->tl.t[s->t1].off + nm->tl.t[s->t1].len;
		if (a < at)
			continue;
		if (buf_append(&nm->masked, nm->work.data + at, a - at) || buf_puts(&nm->masked, what))
			return -1;
		at = b;
	}
	/* trimmed, spaces as written otherwise */
	if (buf_append(&nm->masked, nm->work.data + at, nm->work.len - at))
		return -1;
	size_t b0 = 0, e = nm->masked.len;
	while (b0 < e && nm->masked.data[b0] == ' ')
		b0++;
	while (e > b0 && nm->masked.data[e - 1] == ' ')
		e--;
	if (e > b0 && b0)
		memmove(nm->masked.data, nm->masked.data + b0, e - b0);
	nm->masked.len = e - b0;
	return 0;
}

static uint64_t memo_hash(const char *s, size_t n, const char *lang);
static void memo_put(normaliser *nm, uint64_t h, const char *raw, size_t n,
		     const char *lang, const norm_result *res);
static int memo_stable(normaliser *nm, const char *t, size_t n,
		       const char *lang, norm_result *res);

static int compute(normaliser *nm, const char *raw, size_t n, const char *lang,
		   norm_result *res)
{
	const char *src = raw;
	size_t npiece = 0;
	int rep = 0;

	memset(res, 0, sizeof *res);
	nm->lang = lang && *lang ? lang : NULL;
	if (dec_valid_prefix(raw, n) != n) {
		buf_reset(&nm->dec);
		rep = dec_repair(raw, n, &nm->dec);
		if (rep < 0)
			return -1;
		src = nm->dec.data;
		n = nm->dec.len;
	}
	if (norm_once(nm, src, n, res) != 0 || mask(nm) != 0)
		return -1;
	if (!joined(nm)) {
		if (pieces(nm, res) != 0)
			return -1;
		res->repaired = rep;
		res->masked = nm->masked.data ? nm->masked.data : "";
		res->masked_len = nm->masked.len;
		return 0;
	}
	/* read the clean title again until nothing changes (norm is
	 * idempotent by construction); the pieces of every pass are kept */
	buf_reset(&nm->ptext);
	for (int round = 0; round < 4; round++) {
		/* a clean title already known to be its own clean title */
		if (memo_stable(nm, res->title, res->title_len, lang, res))
			break;
		if (keep_pieces(nm, &npiece) != 0)
			return -1;
		buf_reset(&nm->again);
		if (buf_append(&nm->again, res->title, res->title_len) != 0)
			return -1;
		if (norm_once(nm, nm->again.data, nm->again.len, res) != 0)
			return -1;
		if (res->title_len == nm->again.len &&
		    (res->title_len == 0 ||
		     memcmp(res->title, nm->again.data, res->title_len) == 0) &&
		    !nm->nspan) {
			norm_result st = *res;
			st.npiece = 0;
			st.repaired = 0;
			st.masked = res->title; /* the prepared form of a clean title */
			st.masked_len = res->title_len;
			if (nm->ring)
				memo_put(nm, memo_hash(res->title, res->title_len, lang),
					 res->title, res->title_len, lang, &st);
			break;
		}
	}
	if (keep_pieces(nm, &npiece) != 0)
		return -1;
	for (size_t i = 0; i < npiece; i++)
		nm->pieces[i].text = nm->ptext.data + (uintptr_t)nm->pieces[i].text;
	res->piece = nm->pieces;
	res->npiece = npiece;
	res->repaired = rep;
	res->masked = nm->masked.data ? nm->masked.data : "";
	res->masked_len = nm->masked.len;
	return 0;
}

int norm_key_only(normaliser *nm, const char *raw, size_t n,
		  norm_result *res)
{
	const char *src = raw;
	int rep = 0;

	memset(res, 0, sizeof *res);
	nm->lang = NULL;
	if (dec_valid_prefix(raw, n) != n) {
		buf_reset(&nm->dec);
		if ((rep = dec_repair(raw, n, &nm->dec)) < 0)
			return -1;
		src = nm->dec.data;
		n = nm->dec.len;
	}
	res->repaired = rep;
	if (prepare(nm, src, n) != 0 ||
	    tok_split(&nm->tl, &nm->u, nm->work.data, nm->work.len) != 0 ||
	    build(nm) != 0 || cache_build(nm) != 0)
		return -1;
	return render(nm, res);
}

/* ---- the memory of recent titles ---- */

int norm_memo(normaliser *nm, size_t bytes)
{
	free(nm->ring);
	free(nm->slot);
	nm->ring = NULL;
	nm->slot = NULL;
	nm->ring_cap = nm->ring_pos = 0;
	nm->ring_total = 0;
	nm->nslot = 0;
	if (bytes < 4096)
		return 0;
	size_t slots = 1024;
	while (slots * 256 < bytes)
		slots *= 2;
	nm->ring = malloc(bytes);
	nm->slot = calloc(slots, sizeof *nm->slot);
	if (!nm->ring || !nm->slot) {
		free(nm->ring);
		free(nm->slot);
		nm->ring = NULL;
		nm->slot = NULL;
		return -1;
	}
	nm->ring_cap = bytes;
	nm->nslot = slots;
	return 0;
}

void norm_memo_stats(const normaliser *nm, size_t *hits, size_t *calls)
{
	*hits = nm->hits;
	*calls = nm->calls;
}

/* A record: header, raw, lang, title, key, then the pieces. */
typedef struct memo_head {
	uint32_t raw, title, key, masked, npiece;
	int32_t repaired;
	char lang[4];
} memo_head;

typedef struct memo_piece {
	const char *value;
	uint32_t len;
	uint8_t kind;
} memo_piece;

static uint64_t memo_hash(const char *s, size_t n, const char *lang)
{
	uint64_t h = tok_hash(s, n);
	if (lang)
		h = tok_hash_mix(h, tok_hash(lang, strlen(lang)));
	return h | 1;
}

static int memo_get(normaliser *nm, uint64_t h, const char *raw, size_t n,
		    const char *lang, norm_result *res)
{
	struct memo_slot *sl = &nm->slot[h & (nm->nslot - 1)];
	const char *p;
	memo_head hd;

	/* intact while nothing was written over its first byte */
	if (sl->h != h || nm->ring_total > sl->at + nm->ring_cap)
		return 0;
	p = nm->ring + (sl->at % nm->ring_cap);
	memcpy(&hd, p, sizeof hd);
	if (hd.raw != n || memcmp(p + sizeof hd, raw, n) ||
	    strncmp(hd.lang, lang ? lang : "", 4))
		return 0;
	p += sizeof hd + n;
	res->title = p;
	res->title_len = hd.title;
	p += hd.title;
	res->key = p;
	res->key_len = hd.key;
	p += hd.key;
	res->masked = p;
	res->masked_len = hd.masked;
	p += hd.masked;
	if (hd.npiece > nm->pcap) {
		nf_piece *q = realloc(nm->pieces, hd.npiece * sizeof *q);
		if (!q)
			return 0;
		nm->pieces = q;
		nm->pcap = hd.npiece;
	}
	for (uint32_t i = 0; i < hd.npiece; i++) {
		memo_piece mp;
		memcpy(&mp, p, sizeof mp);
		p += sizeof mp;
		nm->pieces[i].kind = mp.kind;
		nm->pieces[i].value = mp.value;
		nm->pieces[i].text = p;
		nm->pieces[i].len = mp.len;
		p += mp.len;
	}
	res->piece = nm->pieces;
	res->npiece = hd.npiece;
	res->repaired = hd.repaired;
	return 1;
}

/* Is t a title the memory knows to be its own clean title, with no
 * piece removed?  Then res gets its key (copied: the ring moves on). */
static int memo_stable(normaliser *nm, const char *t, size_t n,
		       const char *lang, norm_result *res)
{
	struct memo_slot *sl;
	memo_head hd;
	const char *p;
	uint64_t h;

	if (!nm->ring || n > UINT32_MAX / 2)
		return 0;
	h = memo_hash(t, n, lang);
	sl = &nm->slot[h & (nm->nslot - 1)];
	if (sl->h != h || nm->ring_total > sl->at + nm->ring_cap)
		return 0;
	p = nm->ring + (sl->at % nm->ring_cap);
	memcpy(&hd, p, sizeof hd);
	if (hd.raw != n || hd.title != n || hd.npiece || memcmp(p + sizeof hd, t, n) ||
	    memcmp(p + sizeof hd + n, t, n) || strncmp(hd.lang, lang ? lang : "", 4))
		return 0;
	buf_reset(&nm->key);
	if (buf_append(&nm->key, p + sizeof hd + 2 * n, hd.key) != 0)
		return 0;
	res->key = nm->key.data ? nm->key.data : "";
	res->key_len = hd.key;
	return 1;
}

static void memo_put(normaliser *nm, uint64_t h, const char *raw, size_t n,
		     const char *lang, const norm_result *res)
{
	size_t need = sizeof(memo_head) + n + res->title_len + res->key_len + res->masked_len;
	memo_head hd;
	char *p;

	for (size_t i = 0; i < res->npiece; i++)
		need += sizeof(memo_piece) + res->piece[i].len;
	if (need > nm->ring_cap / 16)
		return; /* a giant line is not worth keeping */
	if (nm->ring_pos + need > nm->ring_cap) {
		nm->ring_total += nm->ring_cap - nm->ring_pos;
		nm->ring_pos = 0;
	}
	p = nm->ring + nm->ring_pos;
	memset(&hd, 0, sizeof hd);
	hd.raw = (uint32_t)n;
	hd.title = (uint32_t)res->title_len;
	hd.key = (uint32_t)res->key_len;
	hd.masked = (uint32_t)res->masked_len;
	hd.npiece = (uint32_t)res->npiece;
	hd.repaired = res->repaired;
	if (lang)
		memcpy(hd.lang, lang, strnlen(lang, sizeof hd.lang));
	memcpy(p, &hd, sizeof hd);
	p += sizeof hd;
	memcpy(p, raw, n);
	p += n;
	memcpy(p, res->title, res->title_len);
	p += res->title_len;
	memcpy(p, res->key, res->key_len);
	p += res->key_len;
	if (res->masked_len)
		memcpy(p, res->masked, res->masked_len);
	p += res->masked_len;
	for (size_t i = 0; i < res->npiece; i++) {
		memo_piece mp;
		memset(&mp, 0, sizeof mp);
		mp.value = res->piece[i].value;
		mp.len = (uint32_t)res->piece[i].len;
		mp.kind = res->piece[i].kind;
		memcpy(p, &mp, sizeof mp);
		p += sizeof mp;
		memcpy(p, res->piece[i].text, res->piece[i].len);
		p += res->piece[i].len;
	}
	struct memo_slot *sl = &nm->slot[h & (nm->nslot - 1)];
	sl->h = h;
	sl->at = nm->ring_total;
	sl->len = (uint32_t)need;
	nm->ring_pos += need;
	nm->ring_total += need;
}

int norm_title(normaliser *nm, const char *raw, size_t n, const char *lang,
	       norm_result *res)
{
	uint64_t h;

	nm->calls++;
	if (!nm->ring || n > UINT32_MAX / 2)
		return compute(nm, raw, n, lang, res);
	if (lang && !*lang)
		lang = NULL;
	h = memo_hash(raw, n, lang);
	if (memo_get(nm, h, raw, n, lang, res)) {
		nm->hits++;
		return 0;
	}
	if (compute(nm, raw, n, lang, res) != 0)
		return -1;
	memo_put(nm, h, raw, n, lang, res);
	return 0;
}

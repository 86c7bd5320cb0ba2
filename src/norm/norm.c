/* norm.c - the normaliser pipeline: decode (UTF-8, then HTML markup),
 * prepare, tokenise, segment,
 * annotate, run the rules, render the clean title and the match key;
 * the memory of recent titles. */
#include "norm/norm.h"

#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "norm/pass.h"
#include "norm/title.h"
#include "norm/unicode.h"

struct normaliser {
	tm_title ti;      /* the line the rules work on */
	uni_ctx u;
	tm_buf dec, markup, scratch, work, title, key, ptext, again, masked;
	size_t hidden;    /* kept units the renderer did not show */
	/* the memory of recent titles: a ring of records, a table of slots */
	char *ring;
	size_t ring_cap, ring_pos;
	uint64_t ring_total;  /* bytes ever written, for validity */
	struct memo_slot { uint64_t h, at; } *slot; /* 16 bytes: four to a cache line */
	size_t nslot, hits, calls;
	/* titles seen once lately: one bit per hash, nslot * 4 bits, all
	 * cleared once a quarter are set; a title enters the ring the
	 * second time it is cleaned, so the many seen only once are not
	 * copied into it */
	uint64_t *door;
	size_t ndoor;     /* set bits */
	nf_piece *pieces;
	size_t pcap;
};

normaliser *norm_new(const lexicon *lx)
{
	normaliser *nm = calloc(1, sizeof *nm);
	if (!nm)
		return NULL;
	nm->ti.lx = lx;
	return nm;
}

static void memo_free(normaliser *nm);

void norm_free(normaliser *nm)
{
	if (!nm)
		return;
	title_free(&nm->ti);
	uni_ctx_free(&nm->u);
	buf_free(&nm->dec);
	buf_free(&nm->markup);
	buf_free(&nm->scratch);
	buf_free(&nm->work);
	buf_free(&nm->title);
	buf_free(&nm->key);
	buf_free(&nm->ptext);
	buf_free(&nm->again);
	buf_free(&nm->masked);
	free(nm->pieces);
	memo_free(nm);
	free(nm);
}

static int prepare(normaliser *nm, const char *s, size_t n)
{
	buf_reset(&nm->work);
	return uni_prepare(&nm->u, s, n, &nm->work);
}

static void protect(tm_title *ti)
{
	size_t k = 0, len;
	while (k < ti->nunit) {
		if (match_cat(ti, k, LC_PROTECT, 0, &len)) {
			for (size_t t = ti->unit[k]; t <= ti->unit[k + len - 1]; t++)
				ti->prot[t] = 1;
			k += len;
		} else
			k++;
	}
}

/* uni_lower_word options for the title's language. */
static unsigned lower_opt(const tm_title *ti)
{
	return ti->lang && (!strcmp(ti->lang, "tr") || !strcmp(ti->lang, "az")) ? UNI_TURKIC : 0;
}

static int put_lower(const char *text, tm_buf *b, const tm_tok *t, unsigned opt)
{
	const char *p = text + t->off;
	if (!(t->flags & TF_NONASCII) && (unsigned char)p[0] < 0x80 && !opt) {
		/* the length in a local: a store through d may alias the
		 * token and would reload it at every byte */
		const unsigned char *q = (const unsigned char *)p;
		size_t len = t->len;
		if ((b->cap - b->len < len || !b->data) && buf_reserve(b, len) != 0)
			return -1;
		unsigned char *d = (unsigned char *)b->data + b->len;
		for (size_t i = 0; i < len; i++)
			d[i] = uni_ascii_lower[q[i]];
		b->len += len;
		return 0;
	}
	return uni_lower_word(p, t->len, opt, b);
}

static int is_kept_word(tm_title *ti, size_t k)
{
	return ukept(ti, k) && U(ti, k)->kind != TK_SYM;
}

/* A symbol unit is shown only for & and + standing between kept words. */
static int show_unit(tm_title *ti, size_t k)
{
	const tm_tok *t = U(ti, k);
	size_t j;

	if (!ukept(ti, k))
		return 0;
	if (t->kind != TK_SYM)
		return 1;
	if (t->ch != '&' && t->ch != '+')
		return 0;
	for (j = k; j > 0 && !ukept(ti, j - 1); j--)
		;
	if (j == 0 || !is_kept_word(ti, j - 1))
		return 0;
	for (j = k + 1; j < ti->nunit && !ukept(ti, j); j++)
		;
	return j < ti->nunit && is_kept_word(ti, j);
}

/* A dot right after word token a, then a space, then the kept word b
 * of the same segment with nothing removed between; or the dot of an
 * ordinal number of one or two digits before a word ("1. stupně", "3.
 * Lehrjahr"). */
static int abbrev_dot(tm_title *ti, size_t a, size_t b)
{
	const tm_tok *w = &ti->tl.t[a];
	if (a + 2 != b || ti->tseg[a] != ti->tseg[b])
		return 0;
	if (w->kind == TK_NUM)
		return w->len <= 2 && ti->tl.t[b].kind == TK_WORD;
	return w->kind == TK_WORD && w->len <= 6;
}

static int is_connector(tm_title *ti, size_t k)
{
	size_t len;
	return match_val(ti, k, LC_UNIT, "connector", 0, &len) != NULL;
}

static int render(normaliser *nm, norm_result *res)
{
	size_t k, prev = SIZE_MAX;
	tm_title *ti = &nm->ti;
	tm_buf *out = &nm->title, *ke = &nm->key;
	unsigned lo = lower_opt(ti);

	buf_reset(out);
	buf_reset(ke);
	nm->hidden = 0;
	for (k = 0; k < ti->nunit; k++) {
		const tm_tok *t = U(ti, k);
		if (!show_unit(ti, k)) {
			nm->hidden += ukept(ti, k);
			continue;
		}
		if (prev != SIZE_MAX) {
			/* glue: the weak punctuation written between two kept
			 * units with no space and nothing removed between */
			size_t a = ti->unit[prev], b = ti->unit[k], x;
			int space = 0;
			for (x = a + 1; x <= b; x++) {
				const tm_tok *m = &ti->tl.t[x];
				if (m->sp || (x < b && (ti->rm[x] != RM_NONE ||
							(m->flags & TF_STRONG) ||
							m->kind != TK_PUNCT)))
					space = 1;
			}
			if (ti->madd[a] == title_glue && b == a + 4) {
				/* the word's two parts around the removed
				 * "(st)": "medewerk" + "er" */
			} else if (space || ((t->kind == TK_SYM || U(ti, prev)->kind == TK_SYM) &&
				      b != a + 1)) {
				/* an abbreviation's dot (Kfm. Sachbearbeiter) and a
				 * suspended hyphen (Energie- und Gebäudetechnik)
				 * stay with their word */
				const tm_tok *d = a + 1 < ti->tl.n ? &ti->tl.t[a + 1] : NULL;
				if (d && d->kind == TK_PUNCT && !d->sp && a + 1 < b &&
				    ti->rm[a + 1] == RM_NONE && ti->tl.t[a + 2].sp &&
				    ((d->ch == '.' && abbrev_dot(ti, a, b)) ||
				     (d->ch == '-' && is_connector(ti, k))))
					if (buf_putc(out, (char)d->ch))
						return -1;
				/* Lagerist / Kommissionierer: a spaced slash alone
				 * between two kept words stays (spaced as written:
				 * "Job/&o" spaced would read as two segments) */
				if (b == a + 2 && ti->tl.t[a + 1].ch == '/' &&
				    ti->tl.t[a + 1].kind == TK_PUNCT && ti->rm[a + 1] == RM_NONE &&
				    (ti->tl.t[a + 1].sp || ti->tl.t[b].sp)) {
					if (buf_puts(out, " / ") || buf_putc(ke, ' '))
						return -1;
				} else if (buf_putc(out, ' ') || buf_putc(ke, ' '))
					return -1;
			} else if (b == a + 1) {
				/* directly adjacent: 75 + k, Linked + In */
			} else {
				for (x = a + 1; x < b; x++)
					if (put_lower(nm->work.data, out, &ti->tl.t[x], lo))
						return -1;
				if (buf_putc(ke, ' '))
					return -1;
			}
		}
		if (put_lower(nm->work.data, out, t, lo) ||
		    buf_append(ke, tok_fold(&ti->tl, t), t->flen))
			return -1;
		const char *add = ti->madd[ti->unit[k]];
		size_t cut = ti->mcut[ti->unit[k]];
		if (add && cut && out->len >= cut && ke->len >= cut) {
			out->len -= cut;
			ke->len -= cut;
		}
		if (add && (buf_puts(out, add) || buf_puts(ke, add)))
			return -1;
		prev = k;
	}
	res->title = out->data ? out->data : "";
	res->title_len = out->len;
	res->key = ke->data ? ke->data : "";
	res->key_len = ke->len;
	return 0;
}

static int pieces(normaliser *nm, norm_result *res)
{
	size_t i;

	title_sort_spans(&nm->ti);
	if (nm->ti.nspan > nm->pcap) {
		nf_piece *p = tm_grow(nm->pieces, &nm->pcap, nm->ti.nspan, sizeof *p, 16);
		if (!p)
			return -1;
		nm->pieces = p;
	}
	for (i = 0; i < nm->ti.nspan; i++) {
		const tm_span *s = &nm->ti.spans[i];
		const tm_tok *a = &nm->ti.tl.t[s->t0], *b = &nm->ti.tl.t[s->t1];
		nf_piece *p = &nm->pieces[i];
		p->kind = s->kind;
		p->value = s->value;
		p->text = nm->work.data + a->off;
		p->len = b->off + b->len - a->off;
	}
	res->piece = nm->pieces;
	res->npiece = nm->ti.nspan;
	return 0;
}

/* One pass of the pipeline over well-formed text. */
static int norm_once(normaliser *nm, const char *src, size_t n, norm_result *res)
{
	tm_title *ti = &nm->ti;
	unsigned f;

	if (prepare(nm, src, n) != 0)
		return -1;
	ti->text = nm->work.data;
	if (tok_split(&ti->tl, &nm->u, nm->work.data, nm->work.len) != 0 ||
	    title_build(ti) != 0 || title_scan(ti) != 0)
		return -1;
	if (HAS(ti, LC_PROTECT))
		protect(ti);
	f = ti->lflags;
	if ((f & (LF_NUM | LF_SYM | LF_URL)) && pass_pii(ti))
		return -1;
	size_t before = ti->nspan;
	if (pass_gender(ti))
		return -1;
	/* removed markers are transparent to the scan: a phrase written
	 * across them is found now */
	if (ti->nspan > before) {
		if (title_scan(ti) != 0)
			return -1;
		/* and a protected phrase written across them is protected
		 * now: "Chargé/e de recrutement" */
		if (HAS(ti, LC_PROTECT))
			protect(ti);
	}
	/* each rule runs only where the line holds what it looks for */
	if (((f & LF_NUM) && HAS(ti, LC_SCHEDULE) && pass_shifts(ti)) ||
	    ((f & (LF_NUM | LF_DIGITWORD | LF_SYM) || HAS(ti, LC_REFERENCE)) &&
	     pass_reference(ti)) ||
	    ((HAS(ti, LC_UNIT) || (f & LF_DIGITWORD)) && pass_days(ti)) ||
	    ((f & LF_NUM) && (pass_pay(ti) || pass_schedule(ti))) ||
	    ((f & LF_SYM) && pass_hashtags(ti)) ||
	    (HAS(ti, LC_PAY) && pass_grade(ti)))
		return -1;
	/* occupation/ and business/ are read by the segment roles alone */
	unsigned read = ti->lcats & ~(1u << LC_OCCUPATION | 1u << LC_BUSINESS);
	int phrases = read || (f & LF_NUM);
	/* roles: once the pieces every lexicon names are gone, what is
	 * left of each segment shows its role */
	int roles = ti->nseg > 1 || HAS(ti, LC_BUSINESS) || HAS(ti, LC_EMPLOYER) ||
		    HAS(ti, LC_LOCATION);
	if ((phrases && pass_phrases(ti)) ||
	    ((HAS(ti, LC_EMPLOYER) || HAS(ti, LC_BUSINESS)) && pass_employer(ti)) ||
	    ((HAS(ti, LC_PLACE) || HAS(ti, LC_LOCATION)) && pass_location(ti)) ||
	    (roles && pass_roles(ti)) ||
	    (HAS(ti, LC_PLACE) && pass_trailing_place(ti)) ||
	    (phrases && pass_phrases(ti)))
		return -1;
	return render(nm, res);
}

/* Did the pass join words that stood apart (removed pieces between
 * them, or several segments)?  Then the clean title, read afresh, may
 * hold a phrase the raw title did not. */
static int joined(normaliser *nm)
{
	size_t with = 0, a, b;
	if (nm->ti.nspan || nm->hidden)
		return 1;
	/* punctuation the title does not show (a strong one, or one with
	 * a space beside it) may have kept apart what the title now joins */
	for (size_t t = 0; t < nm->ti.tl.n; t++) {
		const tm_tok *x = &nm->ti.tl.t[t];
		if (x->kind != TK_PUNCT)
			continue;
		if ((x->flags & TF_STRONG) || x->sp || t == 0 || t + 1 == nm->ti.tl.n ||
		    nm->ti.tl.t[t + 1].sp)
			return 1;
	}
	for (size_t s = 0; s < nm->ti.nseg; s++) {
		seg_kept(&nm->ti, s, &a, &b);
		with += a < b;
	}
	return with > 1;
}

/* Copies the pieces found so far out of the pass's buffers (offsets into
 * ptext; pointers are set once all passes are done). */
static int keep_pieces(normaliser *nm, size_t *npiece)
{
	title_sort_spans(&nm->ti);
	for (size_t i = 0; i < nm->ti.nspan; i++) {
		const tm_span *s = &nm->ti.spans[i];
		const tm_tok *a = &nm->ti.tl.t[s->t0], *b = &nm->ti.tl.t[s->t1];
		size_t len = b->off + b->len - a->off, off = nm->ptext.len;
		if (*npiece == nm->pcap) {
			nf_piece *p = tm_grow(nm->pieces, &nm->pcap, *npiece + 1, sizeof *p, 16);
			if (!p)
				return -1;
			nm->pieces = p;
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
	title_sort_spans(&nm->ti);
	for (size_t i = 0; i < nm->ti.nspan; i++) {
		const tm_span *s = &nm->ti.spans[i];
		const char *what = s->kind == NF_EMAIL ? "<email>" : s->kind == NF_PHONE ? "<phone>"
				   : s->kind == NF_URL ? "<url>" : NULL;
		if (!what)
			continue;
		size_t a = nm->ti.tl.t[s->t0].off, b = nm->ti.tl.t[s->t1].off + nm->ti.tl.t[s->t1].len;
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
	nm->ti.lang = lang && *lang ? lang : NULL;
	if (dec_valid_prefix(raw, n) != n) {
		buf_reset(&nm->dec);
		rep = dec_repair(raw, n, &nm->dec);
		if (rep < 0)
			return -1;
		src = nm->dec.data;
		n = nm->dec.len;
	}
	if (dec_has_markup(src, n)) {
		int r;
		buf_reset(&nm->markup);
		if ((r = dec_markup(src, n, &nm->markup, &nm->scratch)) < 0)
			return -1;
		rep |= r;
		src = nm->markup.data ? nm->markup.data : "";
		n = nm->markup.len;
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
		    !nm->ti.nspan) {
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
	nm->ti.lang = NULL;
	if (dec_valid_prefix(raw, n) != n) {
		buf_reset(&nm->dec);
		if ((rep = dec_repair(raw, n, &nm->dec)) < 0)
			return -1;
		src = nm->dec.data;
		n = nm->dec.len;
	}
	res->repaired = rep;
	if (prepare(nm, src, n) != 0)
		return -1;
	nm->ti.text = nm->work.data;
	if (tok_split(&nm->ti.tl, &nm->u, nm->work.data, nm->work.len) != 0 ||
	    title_build(&nm->ti) != 0 || title_scan(&nm->ti) != 0)
		return -1;
	return render(nm, res);
}

/* ---- the memory of recent titles ---- */

/* Frees the memory of recent titles and leaves it empty (off). */
static void memo_free(normaliser *nm)
{
	free(nm->ring);
	free(nm->slot);
	free(nm->door);
	nm->ring = NULL;
	nm->slot = NULL;
	nm->door = NULL;
	nm->ring_cap = nm->ring_pos = 0;
	nm->ring_total = 0;
	nm->nslot = nm->ndoor = 0;
}

int norm_memo(normaliser *nm, size_t bytes)
{
	memo_free(nm);
	if (bytes < 4096)
		return 0;
	size_t slots = 1024;
	while (slots * 256 < bytes)
		slots *= 2;
	nm->ring = malloc(bytes);
	nm->slot = calloc(slots, sizeof *nm->slot);
	nm->door = calloc(slots / 16, sizeof *nm->door);
	if (!nm->ring || !nm->slot || !nm->door) {
		memo_free(nm);
		return -1;
	}
	/* a title's record and slot are anywhere in them: 2 MiB pages spare
	 * a page-table walk per title */
	tm_hugepages(nm->ring, bytes);
	tm_hugepages(nm->slot, slots * sizeof *nm->slot);
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

/* Eight bytes at a step (the memory only needs slots spread well: a
 * record is compared in full before use). */
static uint64_t memo_hash(const char *s, size_t n, const char *lang)
{
	uint64_t h = 0x9E3779B97F4A7C15ULL ^ n, w;
	size_t i = 0;

	for (; i + 8 <= n; i += 8) {
		memcpy(&w, s + i, 8);
		h = (h ^ w) * 0xFF51AFD7ED558CCDULL;
		h ^= h >> 29;
	}
	if (i < n) {
		w = 0;
		memcpy(&w, s + i, n - i);
		h = (h ^ w) * 0xFF51AFD7ED558CCDULL;
		h ^= h >> 29;
	}
	if (lang) {
		w = 0;
		memcpy(&w, lang, strnlen(lang, 8));
		h = (h ^ w ^ 0xA5) * 0xC4CEB9FE1A85EC53ULL;
	}
	h ^= h >> 33;
	h *= 0xC4CEB9FE1A85EC53ULL;
	h ^= h >> 33;
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
		nf_piece *q = tm_grow(nm->pieces, &nm->pcap, hd.npiece, sizeof *q, 16);
		if (!q)
			return 0;
		nm->pieces = q;
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
	nm->ring_pos += need;
	nm->ring_total += need;
}

/* Was a title of hash h cleaned lately?  Notes it when not. */
static int memo_admit(normaliser *nm, uint64_t h)
{
	size_t nbit = nm->nslot * 4, b = (size_t)(h >> 32) & (nbit - 1);
	uint64_t *w = &nm->door[b / 64], m = 1ULL << (b % 64);

	if (*w & m)
		return 1;
	if (++nm->ndoor > nbit / 4) {
		memset(nm->door, 0, nbit / 8);
		nm->ndoor = 1;
	}
	*w |= m;
	return 0;
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
	if (memo_admit(nm, h))
		memo_put(nm, h, raw, n, lang, res);
	return 0;
}

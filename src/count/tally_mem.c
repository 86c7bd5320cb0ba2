/* tally_mem.c - the memory engine and the counts table. */
#include "count/tally.h"

#include <errno.h>
#include <stdlib.h>
#include <string.h>

#include "core/digest.h"
#include "io/decode.h"
#include "core/period.h"
#include "norm/token.h"
#include "io/tsv.h"

#define SEP '\x1F'

void tm_init(tally_mem *m)
{
	memset(m, 0, sizeof *m);
}

void tm_free(tally_mem *m)
{
	st_free(&m->forms);
	st_free(&m->keys);
	st_free(&m->occs);
	ids_free(&m->ids);
	st_free(&m->triples);
	free(m->ex);
	free(m->exmore);
	buf_free(&m->exarena);
	memset(m, 0, sizeof *m);
}

size_t tm_bytes(const tally_mem *m)
{
	return st_bytes(&m->forms) + st_bytes(&m->keys) + st_bytes(&m->occs) +
	       ids_bytes(&m->ids) + st_bytes(&m->triples) +
	       m->excap * sizeof *m->ex + m->morecap * sizeof *m->exmore + m->exarena.cap;
}

size_t tm_string_bytes(const tally_mem *m)
{
	return m->forms.arena.len + m->keys.arena.len + m->occs.arena.len + m->ids.arena.len +
	       m->triples.arena.len + m->exarena.len;
}

/* The examples of triple i into e[0..TALLY_EXAMPLES) (len 0 past the
 * last); returns their number. */
static inline int ex_get(const tally_mem *m, size_t i, struct tm_ex *e)
{
	uint64_t more = m->triples.ent[i].count;
	e[0] = m->ex[i];
	if (!more)
		return e[0].len != 0;
	int n = 1;
	for (int a = 1; a < TALLY_EXAMPLES; a++) {
		e[a] = m->exmore[more - 1].x[a - 1];
		n += e[a].len != 0;
	}
	return n;
}

/* Sets example a of triple i to v, making room for the second and
 * third when they are first needed.  0 or -1 (out of memory). */
static int ex_put(tally_mem *m, size_t i, int a, struct tm_ex v)
{
	uint64_t *more = &m->triples.ent[i].count;
	if (a == 0) {
		m->ex[i] = v;
		return 0;
	}
	if (!*more) {
		struct tm_exmore *x = st_grow(m->exmore, &m->morecap, m->nmore + 1, sizeof *x, 256);
		if (!x)
			return -1;
		m->exmore = x;
		memset(&x[m->nmore], 0, sizeof *x);
		*more = ++m->nmore;
	}
	m->exmore[*more - 1].x[a - 1] = v;
	return 0;
}

int tm_triple_examples(const tally_mem *m, size_t i, const char **text, size_t *len,
		       uint64_t *h)
{
	struct tm_ex e[TALLY_EXAMPLES];
	int n = ex_get(m, i, e);
	for (int a = 0; a < n; a++) {
		text[a] = m->exarena.data + e[a].off;
		len[a] = e[a].len;
		if (h)
			h[a] = e[a].h;
	}
	return n;
}

/* The tables' keys are fields joined with SEP, filed under a hash made
 * of the fields' own hashes: a posting hashes its language, key, title
 * and each occupation once, and every key it counts under is derived
 * from those, never joined to be looked up.  A field's hash reads eight
 * bytes at a step (the examples keep dg_fnv, whose values never change:
 * which three are kept depends on it, here and in a store). */
static inline uint64_t fh(const char *s, size_t n)
{
	return dg_hash(s, n, 0);
}

static void fk_init(st_fields *k)
{
	k->k = 0;
	k->sep = SEP;
	k->h = 0x243F6A8885A308D3ULL;
}

static void fk_push(st_fields *k, const char *s, size_t n, uint64_t h)
{
	k->f[k->k] = s;
	k->n[k->k++] = n;
	k->h = tok_hash_mix(k->h, h);
}

/* Adds n to the entry of key in t, keeping *added a bound of every count
 * and sum of t (tables read from files can hold any 19-digit number). */
static int add_count(strtab *t, uint64_t *added, const st_fields *key, uint64_t n)
{
	if (n > UINT64_MAX - *added)
		return -2;
	if (st_add_fields(t, key, n, NULL) < 0)
		return -1;
	*added += n;
	return 0;
}

/* The key of an occupation and language; of a triple (occupation,
 * language, key); of a language and key. */
static void occ_key(st_fields *k, const char *occ, size_t ol, const char *lang)
{
	size_t ll = strlen(lang);
	fk_init(k);
	fk_push(k, occ, ol, fh(occ, ol));
	fk_push(k, lang, ll, fh(lang, ll));
}

static void triple_key(st_fields *k, const char *occ, size_t ol, const char *lang,
		       const char *key, size_t kl)
{
	occ_key(k, occ, ol, lang);
	fk_push(k, key, kl, fh(key, kl));
}

static void lang_key(st_fields *k, const char *lang, const char *key, size_t kl)
{
	size_t ll = strlen(lang);
	fk_init(k);
	fk_push(k, lang, ll, fh(lang, ll));
	fk_push(k, key, kl, fh(key, kl));
}

int tm_add_form(tally_mem *m, const char *occ, size_t ol, const char *lang,
		const char *key, size_t kl, const char *title, size_t tl, uint64_t n)
{
	st_fields k;
	triple_key(&k, occ, ol, lang, key, kl);
	fk_push(&k, title, tl, fh(title, tl));
	return add_count(&m->forms, &m->added[0], &k, n);
}

int tm_add_key(tally_mem *m, const char *lang, const char *key, size_t kl, uint64_t n)
{
	st_fields k;
	lang_key(&k, lang, key, kl);
	return add_count(&m->keys, &m->added[1], &k, n);
}

int tm_add_occ(tally_mem *m, const char *occ, size_t ol, const char *lang, uint64_t n)
{
	st_fields k;
	occ_key(&k, occ, ol, lang);
	return add_count(&m->occs, &m->added[2], &k, n);
}

/* Offers text (hash h) as an example of the triple k. */
static int add_example(tally_mem *m, const st_fields *k, const char *text, size_t tl, uint64_t h)
{
	size_t idx;
	int r;
	struct tm_ex e[TALLY_EXAMPLES];
	int worst = -1, en;
	const char *xa = m->exarena.data;

	if (tl == 0)
		return 0; /* an empty example is no evidence */
	if (tl > UINT32_MAX || m->exarena.len + tl > UINT32_MAX)
		return -1;
	/* room for a new triple's examples first: the table and ex keep
	 * the same indices */
	if (m->triples.n == m->excap) {
		struct tm_ex *ex = st_grow(m->ex, &m->excap, m->triples.n + 1, sizeof *ex, 1024);
		if (!ex)
			return -1;
		m->ex = ex;
	}
	r = st_add_fields(&m->triples, k, 0, &idx);
	if (r < 0)
		return -1;
	if (r == 1)
		m->ex[idx] = (struct tm_ex){0, 0, 0};
	en = ex_get(m, idx, e);
	/* keep the TALLY_EXAMPLES distinct texts of smallest hash */
	for (int i = 0; i < en; i++) {
		if (e[i].h == h && e[i].len == tl && !memcmp(xa + e[i].off, text, tl))
			return 0;
		if (worst < 0 || e[i].h > e[worst].h ||
		    (e[i].h == e[worst].h &&
		     memcmp(xa + e[i].off, xa + e[worst].off,
			    e[i].len < e[worst].len ? e[i].len : e[worst].len) > 0))
			worst = i;
	}
	int slot;
	if (en < TALLY_EXAMPLES)
		slot = en;
	else if (h < e[worst].h)
		slot = worst;
	else
		return 0;
	if (st_arena_reserve(&m->exarena, tl + 1) || buf_append(&m->exarena, text, tl))
		return -1;
	return ex_put(m, idx, slot, (struct tm_ex){h, (uint32_t)(m->exarena.len - tl), (uint32_t)tl});
}

int tm_add_example(tally_mem *m, const char *occ, size_t ol, const char *lang,
		   const char *key, size_t kl, const char *text, size_t tl)
{
	st_fields k;
	triple_key(&k, occ, ol, lang, key, kl);
	return add_example(m, &k, text, tl, dg_fnv(text, tl));
}

/* The keys occupation i of a posting counts under: (occupation,
 * language), the triple, and the triple's form. */
static void posting_keys(const tally_posting *p, size_t i, size_t ll, uint64_t hl, uint64_t hk,
			 uint64_t ht, st_fields *ok, st_fields *tk, st_fields *fk)
{
	fk_init(ok);
	fk_push(ok, p->occ[i], p->occlen[i], fh(p->occ[i], p->occlen[i]));
	fk_push(ok, p->lang, ll, hl);
	*tk = *ok;
	fk_push(tk, p->key, p->keylen, hk);
	*fk = *tk;
	fk_push(fk, p->title, p->titlelen, ht);
}

int tm_add(tally_mem *m, const tally_posting *p)
{
	size_t ll = strlen(p->lang);
	uint64_t hl, hk, ht, hx, hid = 0;
	st_fields lk, ok, tk, fk;

	/* every key hashed first and the home slots of the id and of the
	 * first occupation's keys asked for at once: their cache misses
	 * overlap instead of following each other */
	if (p->id) {
		hid = ids_hash(p->id, p->idlen);
		ids_prefetch(&m->ids, hid);
	}
	hl = fh(p->lang, ll);
	hk = fh(p->key, p->keylen);
	ht = fh(p->title, p->titlelen);
	fk_init(&lk);
	fk_push(&lk, p->lang, ll, hl);
	fk_push(&lk, p->key, p->keylen, hk);
	st_prefetch(&m->keys, lk.h);
	if (p->nocc) {
		posting_keys(p, 0, ll, hl, hk, ht, &ok, &tk, &fk);
		st_prefetch(&m->forms, fk.h);
		if (p->examplelen)
			st_prefetch(&m->triples, tk.h);
	}
	if (p->id) {
		int r = ids_add_h(&m->ids, p->id, p->idlen, hid);
		if (r < 0)
			return -1;
		if (r == 0) {
			m->republished++;
			return 1;
		}
	}
	m->postings++;
	hx = p->examplelen ? dg_fnv(p->example, p->examplelen) : 0;
	if (add_count(&m->keys, &m->added[1], &lk, 1))
		return -1;
	for (size_t i = 0; i < p->nocc; i++) {
		if (i)
			posting_keys(p, i, ll, hl, hk, ht, &ok, &tk, &fk);
		if (add_count(&m->occs, &m->added[2], &ok, 1))
			return -1;
		if (p->examplelen && add_example(m, &tk, p->example, p->examplelen, hx))
			return -1;
		if (add_count(&m->forms, &m->added[0], &fk, 1))
			return -1;
	}
	return 0;
}

/* ---- writing ---- */

typedef struct srt {
	const char *s;
	uint32_t n; /* keys are shorter than 2^32 bytes (strtab.c) */
	uint32_t i;
} srt;

static int cmp_bytes(const char *a, size_t an, const char *b, size_t bn)
{
	int c = memcmp(a, b, an < bn ? an : bn);
	if (c)
		return c;
	return an < bn ? -1 : an > bn;
}

static int cmp_srt(const void *a, const void *b)
{
	const srt *x = a, *y = b;
	return cmp_bytes(x->s, x->n, y->s, y->n);
}

/* The examples of triple i in byte order. */
static int examples_sorted(const tally_mem *m, size_t i, const char **text, size_t *len)
{
	int n = tm_triple_examples(m, i, text, len, NULL);
	for (int a = 0; a < n; a++)
		for (int b = a + 1; b < n; b++) {
			srt x = {text[a], len[a], 0}, y = {text[b], len[b], 0};
			if (cmp_srt(&x, &y) > 0) {
				const char *t = text[a];
				size_t l = len[a];
				text[a] = text[b];
				len[a] = len[b];
				text[b] = t;
				len[b] = l;
			}
		}
	return n;
}

static size_t prefix(const char *s, size_t n, int f);

static srt srt_of(const strtab *t, size_t i)
{
	size_t n;
	const char *s = st_key(t, i, &n);
	return (srt){s, (uint32_t)n, (uint32_t)i};
}

/* t's keys in byte order.  Keys already in that order (a table read from
 * a counts table as tally writes them) are found so in one pass and not
 * sorted.  Else one bucket per distinct first field (fields hold no
 * control, so SEP sorts before any of their bytes: the buckets in the
 * order of their first fields, then each sorted on its own, are the
 * order of one sort of all); a bucket's strings (an occupation's forms)
 * then fit in cache while they are sorted.  NULL when memory ran out. */
static srt *sorted(const strtab *t)
{
	size_t n = t->n, ng, g, pl = 0;
	srt *w = malloc((n ? n : 1) * sizeof *w), *fv = NULL;
	uint32_t *grp = NULL;
	size_t *at = NULL;
	strtab first = {0};
	const char *ps = NULL;
	int ok = w != NULL;

	size_t i = 1;
	while (ok && i < n) {
		size_t an, bn;
		const char *a = st_key(t, i - 1, &an), *b = st_key(t, i, &bn);
		if (cmp_bytes(a, an, b, bn) > 0)
			break;
		i++;
	}
	if (ok && i >= n) {
		for (i = 0; i < n; i++)
			w[i] = srt_of(t, i);
		return w;
	}
	grp = ok ? malloc(n * sizeof *grp) : NULL;
	ok = grp != NULL;
	for (i = 0; i < n && ok; i++) {
		size_t kn, fl;
		const char *k = st_key(t, i, &kn);
		fl = prefix(k, kn, 1);
		if (!ps || fl != pl || memcmp(k, ps, fl)) /* a run of one first field: once */
			ok = st_add(&first, k, fl, 0, &g) >= 0;
		grp[i] = (uint32_t)g;
		ps = t->arena.data + t->ent[i].off;
		pl = fl;
	}
	ng = first.n;
	if (ok) {
		fv = malloc((ng ? ng : 1) * sizeof *fv);
		at = calloc(ng + 1, sizeof *at);
		ok = fv && at;
	}
	if (ok) {
		for (g = 0; g < ng; g++)
			fv[g] = srt_of(&first, g);
		tm_qsort(fv, ng, sizeof *fv, cmp_srt);
		for (g = 0; g < ng; g++)
			first.ent[fv[g].i].count = g; /* each first field's rank */
		for (i = 0; i < n; i++)
			at[first.ent[grp[i]].count + 1]++;
		for (g = 0; g < ng; g++)
			at[g + 1] += at[g];
		for (i = 0; i < n; i++)
			w[at[first.ent[grp[i]].count]++] = srt_of(t, i);
		for (g = 0; g < ng; g++) { /* at[g]: the end of bucket g now */
			size_t b = g ? at[g - 1] : 0;
			tm_qsort(w + b, at[g] - b, sizeof *w, cmp_srt);
		}
	}
	if (!ok) {
		free(w);
		w = NULL;
	}
	free(fv);
	free(at);
	free(grp);
	st_free(&first);
	return w;
}

/* Length of the first f fields of a joined key. */
static size_t prefix(const char *s, size_t n, int f)
{
	for (size_t i = 0; i < n; i++)
		if (s[i] == SEP && --f == 0)
			return i;
	return n;
}

static void field(const char *s, size_t n, int k, const char **f, size_t *fl)
{
	size_t start = 0;
	for (size_t i = 0; i <= n; i++)
		if (i == n || s[i] == SEP) {
			if (k-- == 0) {
				*f = s + start;
				*fl = i - start;
				return;
			}
			start = i + 1;
		}
	*f = "";
	*fl = 0;
}

/* The forms of one triple: the run of form[j, n) (in byte order) that
 * starts with the triple of form[j], whose first three fields are tp
 * bytes long: a form is of it when it holds those bytes and a SEP after
 * them.  Returns the run's end; *sum receives its postings, *best the
 * first of its most frequent forms. */
static size_t triple_run(const tally_mem *m, const srt *form, size_t j, size_t n, size_t tp,
			 size_t *best, uint64_t *sum)
{
	const char *t = form[j].s;
	uint64_t top = m->forms.ent[form[j].i].count;
	size_t end = j + 1;
	*best = j;
	*sum = top;
	for (; end < n; end++) {
		const srt *f = &form[end];
		if (f->n <= tp || f->s[tp] != SEP || memcmp(f->s, t, tp))
			break;
		uint64_t c = m->forms.ent[f->i].count;
		*sum += c;
		if (c > top) { /* ties: the first in byte order */
			top = c;
			*best = end;
		}
	}
	return end;
}

/* kind, occupation, lang, key, text, postings */
static void row(FILE *out, const char *kind, const char *joined, size_t jn, int nf,
		const char *text, size_t tl, uint64_t n, int with_n, const char *period,
		size_t pn)
{
	const char *f;
	size_t fl;
	fputs(kind, out);
	if (nf == 2 && !strcmp(kind, "key")) {
		/* lang 1F key: no occupation */
		fputc('\t', out);
		for (int k = 0; k < 2; k++) {
			field(joined, jn, k, &f, &fl);
			fputc('\t', out);
			fwrite(f, 1, fl, out);
		}
	} else {
		for (int k = 0; k < 3; k++) {
			fputc('\t', out);
			if (k < nf) {
				field(joined, jn, k, &f, &fl);
				fwrite(f, 1, fl, out);
			}
		}
	}
	fputc('\t', out);
	fwrite(text, 1, tl, out);
	fputc('\t', out);
	if (with_n)
		fprintf(out, "%llu", (unsigned long long)n);
	if (period) {
		fputc('\t', out);
		fwrite(period, 1, pn, out);
	}
	fputc('\n', out);
}

int tm_write(tally_mem *m, FILE *out)
{
	fputs(TM_HEADER "\n", out);
	return tm_write_rows(m, out, NULL, 0);
}

int tm_write_rows(tally_mem *m, FILE *out, const char *period, size_t pn)
{
	srt *occ = sorted(&m->occs), *form = sorted(&m->forms), *ex = sorted(&m->triples),
	    *key = sorted(&m->keys);
	size_t io = 0, jf = 0, je = 0;
	int rc = 0;

	if (!occ || !form || !ex || !key) {
		rc = -1;
		goto done;
	}
	/* occupation rows, each followed by its titles, forms and examples */
	while (io < m->occs.n || jf < m->forms.n) {
		const srt *o = io < m->occs.n ? &occ[io] : NULL;
		size_t fp = jf < m->forms.n ? prefix(form[jf].s, form[jf].n, 2) : 0;
		int c;
		if (o && jf < m->forms.n) {
			srt a = {form[jf].s, fp, 0};
			c = cmp_srt(o, &a);
		} else
			c = o ? -1 : 1;
		if (c <= 0 && o) {
			row(out, "occupation", o->s, o->n, 2, "", 0, m->occs.ent[o->i].count, 1, period, pn);
			io++;
			if (c < 0)
				continue;
		}
		/* the triples under this occupation and language */
		const char *ol = form[jf].s;
		size_t oln = fp;
		while (jf < m->forms.n && prefix(form[jf].s, form[jf].n, 2) == oln &&
		       !memcmp(form[jf].s, ol, oln)) {
			size_t tp = prefix(form[jf].s, form[jf].n, 3), best;
			uint64_t sum;
			size_t end = triple_run(m, form, jf, m->forms.n, tp, &best, &sum);
			const char *t;
			size_t tl;
			field(form[best].s, form[best].n, 3, &t, &tl);
			row(out, "title", form[jf].s, tp, 3, t, tl, sum, 1, period, pn);
			for (size_t q = jf; q < end; q++) {
				field(form[q].s, form[q].n, 3, &t, &tl);
				row(out, "form", form[q].s, tp, 3, t, tl,
				    m->forms.ent[form[q].i].count, 1, period, pn);
			}
			/* its examples, in byte order */
			while (je < m->triples.n && cmp_srt(&ex[je], &(srt){form[jf].s, tp, 0}) < 0)
				je++;
			if (je < m->triples.n && !cmp_srt(&ex[je], &(srt){form[jf].s, tp, 0})) {
				const char *xt[TALLY_EXAMPLES];
				size_t xl[TALLY_EXAMPLES];
				int xn = examples_sorted(m, ex[je].i, xt, xl);
				for (int a = 0; a < xn; a++)
					row(out, "example", form[jf].s, tp, 3, xt[a], xl[a], 0, 0, period, pn);
				je++;
			}
			jf = end;
		}
	}
	for (size_t k = 0; k < m->keys.n; k++)
		row(out, "key", key[k].s, key[k].n, 2, "", 0, m->keys.ent[key[k].i].count, 1, period, pn);
	if (ferror(out))
		rc = -1;
done:
	free(occ);
	free(form);
	free(ex);
	free(key);
	return rc;
}

/* ---- reading ---- */

/* A count: every value tm_write can write (0 to 2^64 - 1) reads back.
 * Returns 0, -1 when s is not a whole number, -2 when it is past 2^64 - 1. */
static int parse_count(const char *s, size_t n, uint64_t *v)
{
	uint64_t x = 0;
	int big = 0;
	if (n == 0)
		return -1;
	for (size_t i = 0; i < n; i++) {
		if (s[i] < '0' || s[i] > '9')
			return -1;
		uint64_t d = (uint64_t)(s[i] - '0');
		if (x > (UINT64_MAX - d) / 10)
			big = 1;
		else
			x = x * 10 + d;
	}
	if (big)
		return -2;
	*v = x;
	return 0;
}

/* A field as the engine writes them: UTF-8 without control characters
 * (0x1F joins the engine's keys; TAB and newline would break the table). */
static int clean_field(const char *s, size_t n)
{
	for (size_t i = 0; i < n; i++)
		if ((unsigned char)s[i] < 0x20 || s[i] == 0x7F)
			return 0;
	return dec_is_utf8(s, n);
}

static int bad(tm_buf *err, const char *name, long line, const char *what)
{
	char m[512];
	snprintf(m, sizeof m, "%s:%ld: %s", name, line, what);
	buf_reset(err);
	buf_puts(err, m);
	return -1;
}

/* A table without routes: every period into one engine, the labels
 * checked all the same. */
static int route_one(void *ctx, const char *period, size_t n, tally_mem **m, tm_buf *err)
{
	long a, b;
	int kind;
	if (n && (period_span(period, n, &a, &b, &kind) != 0 || kind == PERIOD_QUARTER ||
		  kind == PERIOD_YEAR)) {
		buf_reset(err);
		buf_puts(err, "bad period (want a day 2026-03-01, a week 2026-W09, a month 2026-03, or empty)");
		return -1;
	}
	*m = ctx;
	return 0;
}

int tm_read(tally_mem *m, const char *path, tm_buf *err)
{
	return tm_read_routed(path, route_one, m, err);
}

int tm_read_routed(const char *path, tm_route route, void *ctx, tm_buf *err)
{
	tsv_reader t;
	int ck, co, cl, cy, ct, cp, cd, r;
	tally_mem *m = NULL;
	char last[PERIOD_MAX + 1];
	size_t lastn = (size_t)-1;

	if (tsv_open(&t, path) != 0) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
		tsv_close(&t);
		return -1;
	}
	ck = tsv_col(&t, "kind");
	co = tsv_col(&t, "occupation");
	cl = tsv_col(&t, "lang");
	cy = tsv_col(&t, "key");
	ct = tsv_col(&t, "text");
	cp = tsv_col(&t, "postings");
	cd = tsv_col(&t, "period");
	if (ck < 0 || co < 0 || cl < 0 || cy < 0 || ct < 0 || cp < 0) {
		r = bad(err, t.lr.name, 1,
			"not a counts table: want the columns kind, occupation, lang, key, text, postings");
		tsv_close(&t);
		return r;
	}
	while ((r = tsv_next(&t)) > 0) {
		size_t kn, on, ln, yn, tn, pn;
		const char *k = tsv_field(&t, ck, &kn), *o = tsv_field(&t, co, &on),
			   *l = tsv_field(&t, cl, &ln), *y = tsv_field(&t, cy, &yn),
			   *x = tsv_field(&t, ct, &tn), *p = tsv_field(&t, cp, &pn);
		char lang[8];
		uint64_t n = 0;
		long line = t.lr.lineno;
		int rc = 0;

		if (t.over) {
			r = bad(err, t.lr.name, line, "row has more fields than the header");
			break;
		}
		if (t.lr.noeol) {
			/* tables are written whole, every row with its line end */
			r = bad(err, t.lr.name, line, "the last row has no line end: the table was cut short");
			break;
		}
		int lok = ln >= 2 && ln <= 3;
		for (size_t q = 0; q < ln && lok; q++)
			lok = l[q] >= 'a' && l[q] <= 'z';
		if (!lok) {
			r = bad(err, t.lr.name, line, "bad lang (want a primary language subtag: de, fr, und)");
			break;
		}
		memcpy(lang, l, ln);
		lang[ln] = 0;
		{
			size_t dn = 0;
			const char *d = cd >= 0 ? tsv_field(&t, cd, &dn) : "";
			if (dn != lastn || memcmp(d, last, dn)) {
				if (dn > PERIOD_MAX) {
					r = bad(err, t.lr.name, line, "bad period (want a day 2026-03-01, "
						"a week 2026-W09, a month 2026-03, or empty)");
					break;
				}
				buf_reset(err);
				if (route(ctx, d, dn, &m, err) != 0) {
					char why[300];
					snprintf(why, sizeof why, "%.*s", (int)err->len,
						 err->data ? err->data : "out of memory");
					r = bad(err, t.lr.name, line, why);
					break;
				}
				memcpy(last, d, dn);
				lastn = dn;
			}
		}
		if (!clean_field(o, on) || !clean_field(y, yn) || !clean_field(x, tn)) {
			r = bad(err, t.lr.name, line, "a field holds a control character or invalid UTF-8");
			break;
		}
#define IS(w) (kn == strlen(w) && !memcmp(k, w, kn))
		if (!IS("example") && (rc = parse_count(p, pn, &n)) != 0) {
			r = bad(err, t.lr.name, line, rc == -2 ? "postings is past 18446744073709551615 (2^64 - 1)"
							       : "postings is not a whole number");
			break;
		}
		if (!m && (IS("occupation") || IS("key") || IS("form") || IS("example") || IS("title")))
			rc = 0; /* a period the caller leaves out: checked, not counted */
		else if (IS("occupation"))
			rc = on ? tm_add_occ(m, o, on, lang, n) : bad(err, t.lr.name, line, "no occupation");
		else if (IS("key"))
			rc = tm_add_key(m, lang, y, yn, n);
		else if (IS("form"))
			rc = on ? tm_add_form(m, o, on, lang, y, yn, x, tn, n)
				: bad(err, t.lr.name, line, "no occupation");
		else if (IS("example"))
			rc = on ? tm_add_example(m, o, on, lang, y, yn, x, tn)
				: bad(err, t.lr.name, line, "no occupation");
		else if (IS("title"))
			rc = 0; /* derived from the forms */
		else
			rc = bad(err, t.lr.name, line,
				 "unknown kind (want occupation, title, form, example or key)");
#undef IS
		if (rc) {
			if (rc == -2)
				bad(err, t.lr.name, line,
				    "the postings add up past 18446744073709551615 (2^64 - 1)");
			else if (!err->len)
				bad(err, t.lr.name, line, "out of memory");
			r = -1;
			break;
		}
	}
	if (r < 0 && !err->len) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
	}
	tsv_close(&t);
	return r < 0 ? -1 : 0;
}

/* ---- walking the triples ---- */

int tm_each_triple(tally_mem *m, int (*fn)(void *ctx, const tm_triple *t), void *ctx)
{
	srt *form = sorted(&m->forms);
	size_t jf = 0;
	int rc = 0;

	if (!form)
		return -1;
	while (jf < m->forms.n && rc == 0) {
		const char *s = form[jf].s;
		size_t tp = prefix(s, form[jf].n, 3), p1 = prefix(s, tp, 1), p2 = prefix(s, tp, 2),
		       best;
		tm_triple t;
		size_t end = triple_run(m, form, jf, m->forms.n, tp, &best, &t.postings);
		t.occ = s;
		t.ol = p1;
		t.lang = s + p1 + 1;
		t.ll = p2 - p1 - 1;
		t.key = s + p2 + 1;
		t.kl = tp - p2 - 1;
		t.title = form[best].s + tp + 1; /* the fourth and last field */
		t.tl = form[best].n - tp - 1;
		rc = fn(ctx, &t);
		jf = end;
	}
	free(form);
	return rc;
}

uint64_t tm_occ_postings(tally_mem *m, const char *occ, size_t ol, const char *lang)
{
	st_fields k;
	long i;
	occ_key(&k, occ, ol, lang);
	i = st_find_fields(&m->occs, &k);
	return i < 0 ? 0 : m->occs.ent[i].count;
}

int tm_examples(tally_mem *m, const char *occ, size_t ol, const char *lang,
		const char *key, size_t kl, const char **text, size_t *len)
{
	st_fields k;
	long i;
	triple_key(&k, occ, ol, lang, key, kl);
	i = st_find_fields(&m->triples, &k);
	return i < 0 ? 0 : examples_sorted(m, (size_t)i, text, len);
}

uint64_t tm_key_postings(tally_mem *m, const char *lang, const char *key, size_t kl)
{
	st_fields k;
	long i;
	lang_key(&k, lang, key, kl);
	i = st_find_fields(&m->keys, &k);
	return i < 0 ? 0 : m->keys.ent[i].count;
}

/* The language field of a joined key, NUL-terminated in lang. */
static void lang_of(const char *k, size_t n, char lang[8])
{
	const char *f;
	size_t fl;
	field(k, n, 1, &f, &fl);
	memset(lang, 0, 8);
	memcpy(lang, f, fl < 7 ? fl : 7);
}

int tm_merge(tally_mem *dst, const tally_mem *src)
{
	char lang[8];
	const char *f, *f2, *f3;
	size_t n, fl, fl2, fl3;
	int r = 0;

	for (size_t i = 0; i < src->forms.n && !r; i++) {
		const char *k = st_key(&src->forms, i, &n);
		lang_of(k, n, lang);
		field(k, n, 0, &f, &fl);
		field(k, n, 2, &f2, &fl2);
		field(k, n, 3, &f3, &fl3);
		r = tm_add_form(dst, f, fl, lang, f2, fl2, f3, fl3, src->forms.ent[i].count);
	}
	for (size_t i = 0; i < src->keys.n && !r; i++) {
		const char *k = st_key(&src->keys, i, &n);
		field(k, n, 0, &f, &fl);
		memset(lang, 0, sizeof lang);
		memcpy(lang, f, fl < 7 ? fl : 7);
		field(k, n, 1, &f2, &fl2);
		r = tm_add_key(dst, lang, f2, fl2, src->keys.ent[i].count);
	}
	for (size_t i = 0; i < src->occs.n && !r; i++) {
		const char *k = st_key(&src->occs, i, &n);
		lang_of(k, n, lang);
		field(k, n, 0, &f, &fl);
		r = tm_add_occ(dst, f, fl, lang, src->occs.ent[i].count);
	}
	for (size_t i = 0; i < tm_ntriples(src) && !r; i++) {
		const char *k = tm_triple_key(src, i, &n), *xt[TALLY_EXAMPLES];
		size_t xl[TALLY_EXAMPLES];
		int xn = tm_triple_examples(src, i, xt, xl, NULL);
		lang_of(k, n, lang);
		field(k, n, 0, &f, &fl);
		field(k, n, 2, &f2, &fl2);
		for (int q = 0; q < xn && !r; q++)
			r = tm_add_example(dst, f, fl, lang, f2, fl2, xt[q], xl[q]);
	}
	return r;
}

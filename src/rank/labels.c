/* labels.c - reading a taxonomy's labels. */
#include "rank/labels.h"

#include <stdlib.h>
#include <string.h>

#include "io/decode.h"
#include "core/lang.h"
#include "core/msg.h"
#include "io/skos.h"
#include "io/tsv.h"

static int fail(tm_buf *err, const char *name, long line, const char *what)
{
	char m[400];
	snprintf(m, sizeof m, "%s:%ld: %s", name, line, what);
	buf_reset(err);
	buf_puts(err, m);
	return -1;
}

/* Where a label stands: file:line in a TSV; in SKOS, where serd reports
 * no line for a statement, the n-th label statement of the file. */
static const char *at(char *w, size_t n, const char *name, long line, int skos)
{
	if (skos)
		snprintf(w, n, "%s: label statement %ld", name, line);
	else
		snprintf(w, n, "%s:%ld", name, line);
	return w;
}

static int fail_at(tm_buf *err, const char *where, const char *what)
{
	buf_reset(err);
	if (buf_puts(err, where) == 0 && buf_puts(err, ": ") == 0)
		buf_puts(err, what);
	return -1;
}

static int join3(tm_buf *b, const char *a, size_t al, const char *l, const char *k, size_t kl)
{
	buf_reset(b);
	if (a && (buf_append(b, a, al) || buf_putc(b, '\x1F')))
		return -1;
	return buf_puts(b, l) || buf_putc(b, '\x1F') || buf_append(b, k, kl);
}

const label *labels_find(const labelset *ls, const char *occ, size_t ol,
			 const char *lang, const char *key, size_t kl)
{
	tm_buf b = {0};
	long i;
	if (join3(&b, occ, ol, lang, key, kl)) {
		buf_free(&b);
		return NULL;
	}
	i = st_find(&ls->index, b.data, b.len);
	buf_free(&b);
	return i < 0 ? NULL : &ls->v[ls->index.ent[i].count - 1];
}

static const char *kind_name(char k)
{
	return k == 'p' ? "pref" : k == 'a' ? "alt" : "hidden";
}

/* Reports (on warn) what SKOS forbids and a labels file should not hold:
 * the same literal (occupation, language tag, text) twice or with two
 * kinds, and a second preferred label in one language tag.  lb is the
 * label just added, ls->v[ls->n - 1]; tag is its language tag.  Returns
 * 0, or -1 when memory ran out. */
static int check_repeats(labelset *ls, const label *lb, const char *tag, const char *where,
			 int skos, FILE *warn, tm_buf *jb)
{
	const char *o = lab_str(ls, lb->occ), *x = lab_str(ls, lb->text);
	const char *unit = skos ? "label statement" : "line";
	char low[64];
	size_t idx, tl = strlen(tag);
	int r;

	for (size_t i = 0; i <= tl && i < sizeof low; i++)
		low[i] = (char)(tag[i] >= 'A' && tag[i] <= 'Z' ? tag[i] + 32 : tag[i]);
	low[sizeof low - 1] = 0;
	if (join3(jb, o, lb->occlen, low, x, lb->textlen) ||
	    (r = st_add(&ls->lits, jb->data, jb->len, 0, &idx)) < 0)
		return -1;
	if (r == 1)
		ls->lits.ent[idx].count = ls->n;
	else {
		const label *f = &ls->v[ls->lits.ent[idx].count - 1];
		ls->repeats++;
		if (ls->repeats > LABELS_WARN_MAX)
			return 0;
		if (warn && f->kind == lb->kind)
			msg_warnf(warn, "%s: label '%s'@%s of %s repeats %s %ld\n", where, x,
				tag, o, unit, f->line);
		else if (warn)
			msg_warnf(warn, "%s: label '%s'@%s of %s is %s here and %s on %s %ld "
				"(SKOS: one kind per label)\n", where, x, tag, o, kind_name(lb->kind),
				kind_name(f->kind), unit, f->line);
		return 0;
	}
	if (lb->kind != 'p')
		return 0;
	buf_reset(jb);
	if (buf_append(jb, o, lb->occlen) || buf_putc(jb, '\x1F') || buf_puts(jb, low) ||
	    (r = st_add(&ls->preftag, jb->data, jb->len, 0, &idx)) < 0)
		return -1;
	if (r == 0) {
		const label *f = &ls->v[ls->preftag.ent[idx].count - 1];
		ls->repeats++;
		if (warn && ls->repeats <= LABELS_WARN_MAX)
			msg_warnf(warn, "%s: a second preferred label '%s'@%s for %s (the first: "
				"'%s', %s %ld; SKOS: one per language)\n", where, x, tag, o,
				lab_str(ls, f->text), unit, f->line);
		return 0;
	}
	ls->preftag.ent[idx].count = ls->n;
	if ((r = st_add(&ls->prefocc, o, lb->occlen, 0, &idx)) < 0)
		return -1;
	if (r == 1)
		ls->prefocc.ent[idx].count = ls->n;
	return 0;
}

/* The index of the last c in s[0..n), or n when there is none. */
static size_t last_of(const char *s, size_t n, char c)
{
	for (size_t i = n; i > 0; i--)
		if (s[i - 1] == c)
			return i - 1;
	return n;
}

const char *labels_local_name(const char *id, size_t n, size_t *len)
{
	size_t end = n, start = 0, at = last_of(id, n, '#');
	if (at < n)
		start = at + 1;
	else {
		if (end > 1 && id[end - 1] == '/')
			end--;
		at = last_of(id, end, '/');
		start = at < end ? at + 1 : 0;
	}
	if (end == start) { /* nothing after it: the whole id, never "" */
		*len = n;
		return id;
	}
	*len = end - start;
	return id + start;
}

/* The code a concept is read under: the map's, else the code of the same
 * local name (m->local), else the concept itself. */
static const char *map_occ(const labels_idmap *m, const char *o, size_t on, size_t *len)
{
	long i;
	*len = on;
	if (!m)
		return o;
	if ((i = st_find(&m->concepts, o, on)) >= 0)
		return st_key(&m->codes, m->concepts.ent[i].count - 1, len);
	if (m->local) {
		size_t ln;
		const char *l = labels_local_name(o, on, &ln);
		if ((i = st_find(&m->locals, l, ln)) >= 0)
			return st_key(&m->codes, m->locals.ent[i].count - 1, len);
	}
	return o;
}

int labels_idmap_code(labels_idmap *m, const char *code, size_t n)
{
	size_t ci, li, ln;
	const char *l;
	int r;
	if (st_add(&m->codes, code, n, 0, &ci) < 0)
		return -1;
	/* the arena may have moved: the local name from the caller's copy */
	l = labels_local_name(code, n, &ln);
	if ((r = st_add(&m->locals, l, ln, 0, &li)) < 0)
		return -1;
	if (r == 1)
		m->locals.ent[li].count = ci + 1;
	else if (m->locals.ent[li].count != ci + 1 && !m->shared++) {
		m->shared_a = (uint32_t)(m->locals.ent[li].count - 1);
		m->shared_b = (uint32_t)ci;
	}
	return 0;
}

int labels_idmap_read(labels_idmap *m, const char *path, tm_buf *err)
{
	tsv_reader t;
	int cc, cn, r;

	if (tsv_open(&t, path) != 0) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
		tsv_close(&t);
		return -1;
	}
	cc = tsv_col(&t, "code");
	cn = tsv_col(&t, "concept");
	if (cc < 0 || cn < 0) {
		r = fail(err, t.lr.name, 1, "an id map has the columns code and concept");
		tsv_close(&t);
		return r;
	}
	while ((r = tsv_next(&t)) > 0) {
		size_t cl, nl, ci, ni;
		const char *c = tsv_field(&t, cc, &cl), *x = tsv_field(&t, cn, &nl);
		long line = t.lr.lineno;
		char m2[600];
		int rc;
		if (t.over) {
			r = fail(err, t.lr.name, line, "row has more fields than the header");
			break;
		}
		if (!cl || !nl || memchr(c, '\x1F', cl) || memchr(x, '\x1F', nl) ||
		    !dec_is_utf8(c, cl) || !dec_is_utf8(x, nl) || memchr(c, 0, cl) || memchr(x, 0, nl)) {
			r = fail(err, t.lr.name, line, "a row names a code and its concept (UTF-8, "
				 "no control characters)");
			break;
		}
		if ((rc = st_add(&m->codes, c, cl, 0, &ci)) < 0)
			goto oom;
		if (rc == 0 && m->codes.ent[ci].count) {
			snprintf(m2, sizeof m2, "code '%.*s' is mapped on line %llu already",
				 (int)(cl > 200 ? 200 : cl), c,
				 (unsigned long long)m->codes.ent[ci].count);
			r = fail(err, t.lr.name, line, m2);
			break;
		}
		m->codes.ent[ci].count = (uint64_t)line;
		if ((rc = st_add(&m->concepts, x, nl, 0, &ni)) < 0)
			goto oom;
		if (rc == 0) {
			size_t ol;
			const char *other = st_key(&m->codes, m->concepts.ent[ni].count - 1, &ol);
			snprintf(m2, sizeof m2, "concept '%.*s' is the concept of code '%.*s' already "
				 "(one code per concept: the labels are read under it)",
				 (int)(nl > 200 ? 200 : nl), x, (int)(ol > 200 ? 200 : ol), other);
			r = fail(err, t.lr.name, line, m2);
			break;
		}
		m->concepts.ent[ni].count = ci + 1;
	}
	if (r < 0 && !err->len) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
	}
	tsv_close(&t);
	return r < 0 ? -1 : 0;
oom:
	tsv_close(&t);
	buf_reset(err);
	buf_puts(err, "out of memory");
	return -1;
}

void labels_idmap_free(labels_idmap *m)
{
	st_free(&m->codes);
	st_free(&m->concepts);
	st_free(&m->locals);
	memset(m, 0, sizeof *m);
}

int labels_has_occ(const labelset *ls, const char *occ, size_t ol)
{
	return st_find(&ls->occs, occ, ol) >= 0;
}

/* Adds one label (lb has kind, lang and line, or the statement number
 * when skos) with its key; tag is its language tag as written.  The
 * occupation o is put through map (NULL: taken as written). */
static int add_one(labelset *ls, normaliser *nm, label *lbp, const char *o, size_t on,
		   const char *x, size_t xn, const char *tag, const char *name, int skos,
		   const labels_idmap *map, FILE *warn, tm_buf *jb, tm_buf *err)
{
	label lb = *lbp;
	norm_result res;
	size_t idx;
	const char *lang = lb.lang;
	char w[400];
	const char *where = at(w, sizeof w, name, lb.line, skos);

	/* an occupation id must match the postings' byte for byte and a label
	 * is shown to curators: neither is repaired behind their back */
	if (!dec_is_utf8(o, on) || memchr(o, 0, on))
		return fail_at(err, where, "the occupation is not valid UTF-8 (or has a NUL byte)");
	if (!dec_is_utf8(x, xn) || memchr(x, 0, xn))
		return fail_at(err, where, "the label is not valid UTF-8 (or has a NUL byte)");
	o = map_occ(map, o, on, &on);
	if (norm_key_only(nm, x, xn, &res) != 0)
		return fail_at(err, where, "out of memory");
	if (!res.key_len) {
		ls->empty++;
		if (warn && ls->empty <= LABELS_WARN_MAX)
			msg_warnf(warn, "%s: label '%.*s' normalises to nothing; left out\n",
				where, (int)xn, x);
		return 0;
	}
	lb.occ = (uint32_t)ls->arena.len;
	lb.occlen = (uint32_t)on;
	if (buf_append(&ls->arena, o, on) || buf_putc(&ls->arena, 0))
		goto oom;
	lb.text = (uint32_t)ls->arena.len;
	lb.textlen = (uint32_t)xn;
	if (buf_append(&ls->arena, x, xn) || buf_putc(&ls->arena, 0))
		goto oom;
	lb.key = (uint32_t)ls->arena.len;
	lb.keylen = (uint32_t)res.key_len;
	if (buf_append(&ls->arena, res.key, res.key_len) || buf_putc(&ls->arena, 0))
		goto oom;
	label *v = tm_grow(ls->v, &ls->cap, ls->n + 1, sizeof *v, 256);
	if (!v)
		goto oom;
	ls->v = v;
	ls->v[ls->n++] = lb;
	if (check_repeats(ls, &ls->v[ls->n - 1], tag, where, skos, warn, jb) != 0)
		goto oom;
	if (st_add(&ls->occs, o, on, 0, &idx) < 0)
		goto oom;
	if (!ls->occs.ent[idx].count)
		ls->occs.ent[idx].count = ls->n;
	if (join3(jb, o, on, lang, lab_str(ls, lb.key), lb.keylen) ||
	    st_add(&ls->index, jb->data, jb->len, 0, &idx) < 0)
		goto oom;
	if (lb.kind == 'p' && st_add(&ls->prefs, jb->data, jb->len, 0, NULL) < 0)
		goto oom;
	if (!ls->index.ent[idx].count) {
		ls->index.ent[idx].count = ls->n;
		buf_reset(jb);
		if (buf_append(jb, o, on) || buf_putc(jb, '\x1F') || buf_puts(jb, lang) ||
		    st_add(&ls->perocc, jb->data, jb->len, 1, NULL) < 0)
			goto oom;
	}
	if (join3(jb, NULL, 0, lang, lab_str(ls, lb.key), lb.keylen) ||
	    st_add(&ls->keys, jb->data, jb->len, 0, &idx) < 0)
		goto oom;
	if (!ls->keys.ent[idx].count)
		ls->keys.ent[idx].count = ls->n;
	else {
		const label *f = &ls->v[ls->keys.ent[idx].count - 1];
		if (f->occlen != on || memcmp(lab_str(ls, f->occ), o, on)) {
			ls->collisions++;
			if (warn && ls->collisions <= LABELS_WARN_MAX)
				msg_warnf(warn, "%s: label '%.*s' of %.*s has the key '%s' of "
					"label '%s' of %s (%s %ld)\n",
					where, (int)xn, x, (int)on, o, lab_str(ls, lb.key),
					lab_str(ls, f->text), lab_str(ls, f->occ),
					skos ? "label statement" : "line", f->line);
		}
	}
	return 0;
oom:
	return fail_at(err, where, "out of memory");
}

/* SKOS: the callback of skos_read */
typedef struct skctx {
	labelset *ls;
	normaliser *nm;
	const char *path;
	const labels_idmap *map;
	FILE *warn;
	tm_buf *err, j;
	long n;
} skctx;

static int on_skos(void *c0, const char *occ, size_t ol, char kind, const char *lang,
		   size_t ll, const char *text, size_t tl)
{
	skctx *c = c0;
	label lb;
	char tag[64], w[400];
	memset(&lb, 0, sizeof lb);
	lb.kind = kind;
	lb.line = ++c->n; /* the n-th label statement */
	at(w, sizeof w, c->path, lb.line, 1);
	if (ll >= sizeof tag || memchr(lang, 0, ll) || memchr(occ, '\x1F', ol))
		return fail_at(c->err, w, "a label with a bad language tag or subject");
	memcpy(tag, lang, ll);
	tag[ll] = 0;
	if (lang_tag(tag, lb.lang) != 0) {
		char m[120];
		snprintf(m, sizeof m, "bad language tag '@%.40s'", tag);
		return fail_at(c->err, w, m);
	}
	return add_one(c->ls, c->nm, &lb, occ, ol, text, tl, tag, c->path, 1, c->map, c->warn,
		       &c->j, c->err);
}

static int is_rdf(const char *path)
{
	size_t n = strlen(path);
	return (n > 4 && !strcmp(path + n - 4, ".ttl")) || (n > 3 && !strcmp(path + n - 3, ".nt")) ||
	       (n > 7 && !strcmp(path + n - 7, ".turtle"));
}

/* Says, once per file, how many problems of each kind there were when
 * more than LABELS_WARN_MAX were (only the first are named). */
static void say_unnamed(const labelset *ls, const char *path, FILE *warn)
{
	static const char *const what[] = {
		"normalise to nothing and are left out",
		"have the key of another occupation's label",
		"repeat an earlier label or are a second preferred label",
	};
	const long n[] = {ls->empty, ls->collisions, ls->repeats};

	for (size_t i = 0; warn && i < sizeof n / sizeof n[0]; i++)
		if (n[i] > LABELS_WARN_MAX)
			msg_warnf(warn, "%s: %ld labels in all %s; only the first %d are named above\n",
				  path, n[i], what[i], LABELS_WARN_MAX);
}

int labels_read(labelset *ls, const char *path, normaliser *nm, FILE *warn, tm_buf *err)
{
	return labels_read_mapped(ls, path, nm, NULL, warn, err);
}

int labels_read_mapped(labelset *ls, const char *path, normaliser *nm,
		       const labels_idmap *map, FILE *warn, tm_buf *err)
{
	tsv_reader t;
	int co, ck, cl, cx, r;
	tm_buf j = {0};

	memset(ls, 0, sizeof *ls);
	if (is_rdf(path)) {
		skctx c = {ls, nm, path, map, warn, err, {0}, 0};
		/* serd would say "invalid UTF-8 start 0xFF": say what it is, as
		 * the line reader does for TSV */
		line_reader lr;
		const char *s;
		size_t n;
		if (lr_open(&lr, path) == 0) {
			int utf16 = lr_next(&lr, &s, &n) < 0 && lr.utf16;
			if (utf16) {
				buf_reset(err);
				buf_puts(err, path);
				buf_puts(err, ":1: ");
				buf_puts(err, lr_strerror(&lr));
			}
			lr_close(&lr);
			if (utf16)
				return -1;
		}
		skos_skipped sk;
		int rc = skos_read(path, on_skos, &c, &sk, err);
		buf_free(&c.j);
		if (rc == 0 && warn && sk.blank)
			msg_warnf(warn, "%s:%ld: %ld label%s of blank nodes skipped (a concept "
				"needs an IRI to be an occupation); the first on this line\n",
				path, sk.blank_line, sk.blank, sk.blank == 1 ? "" : "s");
		if (rc == 0 && warn && sk.toolong)
			msg_warnf(warn, "%s:%ld: %ld label%s longer than %d bytes skipped; "
				"the first on this line\n", path, sk.toolong_line, sk.toolong,
				sk.toolong == 1 ? "" : "s", SKOS_MAX_LABEL);
		if (rc == 0)
			say_unnamed(ls, path, warn);
		return rc;
	}
	if (tsv_open(&t, path) != 0) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
		tsv_close(&t);
		return -1;
	}
	co = tsv_col(&t, "occupation");
	ck = tsv_col(&t, "kind");
	cl = tsv_col(&t, "lang");
	cx = tsv_col(&t, "label");
	if (co < 0 || ck < 0 || cl < 0 || cx < 0) {
		r = fail(err, t.lr.name, 1, "a labels TSV has the columns occupation, kind, lang, label");
		tsv_close(&t);
		return r;
	}
	while ((r = tsv_next(&t)) > 0) {
		size_t on, kn, ln, xn;
		const char *o = tsv_field(&t, co, &on), *k = tsv_field(&t, ck, &kn),
			   *l = tsv_field(&t, cl, &ln), *x = tsv_field(&t, cx, &xn);
		long line = t.lr.lineno;
		char tag[64], lang[4];
		label lb;

		memset(&lb, 0, sizeof lb);
		lb.line = line;
		if (t.over) {
			r = fail(err, t.lr.name, line, "row has more fields than the header (a TAB inside a label?)");
			break;
		}
		if (!on || memchr(o, '\x1F', on)) {
			r = fail(err, t.lr.name, line, "no occupation");
			break;
		}
		if (kn == 4 && !memcmp(k, "pref", 4))
			lb.kind = 'p';
		else if (kn == 3 && !memcmp(k, "alt", 3))
			lb.kind = 'a';
		else if (kn == 6 && !memcmp(k, "hidden", 6))
			lb.kind = 'h';
		else {
			r = fail(err, t.lr.name, line, "kind is pref, alt or hidden");
			break;
		}
		if (ln == 0 || ln >= sizeof tag) {
			r = fail(err, t.lr.name, line, "no lang (want a BCP 47 tag)");
			break;
		}
		memcpy(tag, l, ln);
		tag[ln] = 0;
		if (memchr(l, 0, ln) || lang_tag(tag, lang) != 0) {
			r = fail(err, t.lr.name, line, "bad lang (want a BCP 47 tag such as de or fr-BE)");
			break;
		}
		memcpy(lb.lang, lang, sizeof lang);
		if (t.lr.noeol && warn)
			msg_warnf(warn, "%s:%ld: the last row has no line end: was the file cut "
				"short? (read as it is)\n", t.lr.name, line);
		if (add_one(ls, nm, &lb, o, on, x, xn, tag, t.lr.name, 0, map, warn, &j, err) != 0) {
			r = -1;
			break;
		}
	}
	buf_free(&j);
	if (r < 0 && !err->len) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
	}
	tsv_close(&t);
	if (r >= 0)
		say_unnamed(ls, path, warn);
	return r < 0 ? -1 : 0;
}

int labels_is_pref(const labelset *ls, const char *occ, size_t ol, const char *lang,
		   const char *key, size_t kl)
{
	tm_buf b = {0};
	long i = -1;
	if (!join3(&b, occ, ol, lang, key, kl))
		i = st_find(&ls->prefs, b.data, b.len);
	buf_free(&b);
	return i >= 0;
}

uint64_t labels_count(const labelset *ls, const char *occ, size_t ol, const char *lang)
{
	tm_buf b = {0};
	long i = -1;
	if (!buf_append(&b, occ, ol) && !buf_putc(&b, '\x1F') && !buf_puts(&b, lang))
		i = st_find(&ls->perocc, b.data, b.len);
	buf_free(&b);
	return i < 0 ? 0 : ls->perocc.ent[i].count;
}

const label *labels_pref(const labelset *ls, const char *occ, size_t ol, const char *lang)
{
	char b[256];
	long i = -1;
	size_t ll = strlen(lang);
	if (ol + 1 + ll <= sizeof b) {
		memcpy(b, occ, ol);
		b[ol] = '\x1F';
		for (size_t k = 0; k < ll; k++)
			b[ol + 1 + k] = (char)(lang[k] >= 'A' && lang[k] <= 'Z' ? lang[k] + 32 : lang[k]);
		i = st_find(&ls->preftag, b, ol + 1 + ll);
	}
	if (i >= 0)
		return &ls->v[ls->preftag.ent[i].count - 1];
	i = st_find(&ls->prefocc, occ, ol);
	return i < 0 ? NULL : &ls->v[ls->prefocc.ent[i].count - 1];
}

void labels_free(labelset *ls)
{
	free(ls->v);
	buf_free(&ls->arena);
	st_free(&ls->index);
	st_free(&ls->keys);
	st_free(&ls->perocc);
	st_free(&ls->prefs);
	st_free(&ls->lits);
	st_free(&ls->preftag);
	st_free(&ls->prefocc);
	st_free(&ls->occs);
	memset(ls, 0, sizeof *ls);
}

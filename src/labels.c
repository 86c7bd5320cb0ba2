/* labels.c - reading a taxonomy's labels. */
#include "labels.h"

#include <stdlib.h>
#include <string.h>

#include "lang.h"
#include "tsv.h"

static int fail(tm_buf *err, const char *name, long line, const char *what)
{
	char m[400];
	snprintf(m, sizeof m, "%s:%ld: %s", name, line, what);
	buf_reset(err);
	buf_puts(err, m);
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

int labels_read(labelset *ls, const char *path, normaliser *nm, FILE *warn, tm_buf *err)
{
	tsv_reader t;
	int co, ck, cl, cx, r;
	tm_buf j = {0};

	memset(ls, 0, sizeof *ls);
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
		norm_result res;

		memset(&lb, 0, sizeof lb);
		lb.line = line;
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
		if (lang_tag(tag, lang) != 0) {
			r = fail(err, t.lr.name, line, "bad lang (want a BCP 47 tag such as de or fr-BE)");
			break;
		}
		memcpy(lb.lang, lang, sizeof lang);
		if (norm_key_only(nm, x, xn, &res) != 0) {
			r = fail(err, t.lr.name, line, "out of memory");
			break;
		}
		if (!res.key_len) {
			ls->empty++;
			if (warn)
				fprintf(warn, "titlemill: %s:%ld: label '%.*s' normalises to nothing; left out\n",
					t.lr.name, line, (int)xn, x);
			continue;
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
		if (ls->n == ls->cap) {
			size_t cap = ls->cap ? ls->cap * 2 : 256;
			label *p = realloc(ls->v, cap * sizeof *p);
			if (!p)
				goto oom;
			ls->v = p;
			ls->cap = cap;
		}
		ls->v[ls->n++] = lb;
		size_t idx;
		if (join3(&j, o, on, lang, lab_str(ls, lb.key), lb.keylen) ||
		    st_add(&ls->index, j.data, j.len, 0, &idx) < 0)
			goto oom;
		if (lb.kind == 'p' && st_add(&ls->prefs, j.data, j.len, 0, NULL) < 0)
			goto oom;
		if (!ls->index.ent[idx].count) {
			ls->index.ent[idx].count = ls->n;
			buf_reset(&j);
			if (buf_append(&j, o, on) || buf_putc(&j, '\x1F') || buf_puts(&j, lang) ||
			    st_add(&ls->perocc, j.data, j.len, 1, NULL) < 0)
				goto oom;
		}
		/* the same key under another occupation */
		if (join3(&j, NULL, 0, lang, lab_str(ls, lb.key), lb.keylen) ||
		    st_add(&ls->keys, j.data, j.len, 0, &idx) < 0)
			goto oom;
		if (!ls->keys.ent[idx].count)
			ls->keys.ent[idx].count = ls->n;
		else {
			const label *f = &ls->v[ls->keys.ent[idx].count - 1];
			if (f->occlen != on || memcmp(lab_str(ls, f->occ), o, on)) {
				ls->collisions++;
				if (warn)
					fprintf(warn, "titlemill: %s:%ld: label '%.*s' of %.*s has the key '%s' of "
						"label '%s' of %s (line %ld)\n",
						t.lr.name, line, (int)xn, x, (int)on, o, lab_str(ls, lb.key),
						lab_str(ls, f->text), lab_str(ls, f->occ), f->line);
			}
		}
	}
	buf_free(&j);
	if (r < 0 && !err->len) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
	}
	tsv_close(&t);
	return r < 0 ? -1 : 0;
oom:
	buf_free(&j);
	tsv_close(&t);
	return fail(err, path, 0, "out of memory");
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

void labels_free(labelset *ls)
{
	free(ls->v);
	buf_free(&ls->arena);
	st_free(&ls->index);
	st_free(&ls->keys);
	st_free(&ls->perocc);
	st_free(&ls->prefs);
	memset(ls, 0, sizeof *ls);
}

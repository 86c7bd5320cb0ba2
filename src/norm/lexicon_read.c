/* lexicon_read.c - the lexicon files: their categories and values,
 * parsing a phrase or a gendered pair into the tries, reading a file and
 * a folder of them. */
#include "norm/lexicon_impl.h"

#include <dirent.h>
#include <stddef.h>
#include <sys/stat.h>
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "io/decode.h"

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
static const char *const v_employer[] = {"marker", "legal", "verb", NULL};
static const char *const v_location[] = {"prep", "before", "after",
					 "country-code", "subdivision", NULL};
static const char *const v_unit[] = {"hours", "week", "month", "year", "day", "contact",
				     "workload", "fte",
				     "connector", "degree", "weekday", "monthname", "post", "star",
				     "channel", "with", "work", "link", "need", NULL};
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
	lex_entry *e;

	if (strlen(value) >= sizeof e->value)
		return -1;
	for (uint32_t r = t->nodes[n].first; r; r = lx->h.ent[r].next) {
		lex_entry *o = &lx->h.ent[r];
		if (o->cat == cat && o->where == where && o->amb == amb &&
		    !strcmp(o->lang, lg) && !strcmp(o->value, value)) {
			o->off = 0;
			return 0;
		}
	}
	if (lx->nent == lx->entcap) {
		lex_entry *p = tm_grow(lx->h.ent, &lx->entcap, lx->nent + 1, sizeof *p, 64);
		if (!p)
			return -1;
		lx->h.ent = p;
	}
	size_t idx = lx->nent++;
	e = &lx->h.ent[idx];
	memset(e, 0, sizeof *e);
	e->cat = (uint8_t)cat;
	e->where = (uint8_t)where;
	e->amb = amb;
	memcpy(e->lang, lg, 4);
	memcpy(e->value, value, strlen(value) + 1);
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
		while (lx->h.ent[q].next)
			q = lx->h.ent[q].next;
		lx->h.ent[q].next = (uint32_t)idx;
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
	/* the packed children no longer hold every ending */
	free(lx->skbeg);
	free(lx->skid);
	lx->skbeg = lx->skid = NULL;
	if (flen[0] == 1)
		lx->sfx1[(unsigned char)fold[0][0] >> 6] |= 1ULL << ((unsigned char)fold[0][0] & 63);
	else if (flen[0] >= 2) {
		unsigned c = (unsigned char)fold[0][flen[0] - 1] << 8 |
			     (unsigned char)fold[0][flen[0] - 2];
		lx->sfx2[c >> 6] |= 1ULL << (c & 63);
	}
	for (size_t i = flen[0]; i-- > 0 && n != UINT32_MAX;)
		if (!(n = lex_trie_add(&lx->sfx, n, (unsigned char)fold[0][i])))
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
	char lg[4] = {0};
	uint8_t amb;
	int nu, k;
	const char *const *allowed = allowed_values(cat);

	if (lex_own_image(lx) != 0)
		return err_printf(err, "out of memory%s%s", "", "");
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
				    : lex_add_step(lx, n, lex_add_word(lx, fold[k], flen[k], th[k]));
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
	char lg[4] = {0};
	uint8_t amb;
	char *m, *f;
	int nu;

	if (lex_own_image(lx) != 0)
		return err_printf(err, "out of memory%s%s", "", "");
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
	if (m && f && lx->npairs == lx->paircap) {
		/* pairs and byfem double alike from paircap to cap */
		size_t cap = lx->paircap, bcap = cap;
		uint32_t *bf = NULL;
		if ((p = tm_grow(lx->pairs, &cap, lx->npairs + 1, sizeof *p, 64))) {
			lx->pairs = p;
			bf = tm_grow(lx->byfem, &bcap, cap, sizeof *bf, 64);
		}
		if (bf) {
			lx->byfem = bf;
			lx->paircap = cap;
		}
	}
	if (!m || !f || lx->npairs == lx->paircap) {
		free(m);
		free(f);
		return err_printf(err, "out of memory%s%s", "", "");
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
	if (!strcmp(w, "city") && cat == LC_PLACE) return LW_CITY;
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

int lex_read_text(const char *path, tm_buf *text, tm_buf *err)
{
	FILE *fp = fopen(path, "rb");
	size_t got;
	struct stat st;

	buf_reset(text);
	if (!fp) {
		buf_reset(err);
		buf_puts(err, path);
		buf_puts(err, ": ");
		buf_puts(err, strerror(errno));
		return -1;
	}
	if (fstat(fileno(fp), &st) == 0 && st.st_size > 0 &&
	    buf_reserve(text, (size_t)st.st_size + 1) != 0) {
		fclose(fp);
		return err_printf(err, "%s: out of memory%s", path, "");
	}
	/* grown only when full: a file read whole at its size is not
	 * copied again, and the read that finds the end leaves a byte free
	 * for the last line's terminator */
	for (;;) {
		if (text->cap == text->len && buf_reserve(text, 65536) != 0) {
			fclose(fp);
			return err_printf(err, "%s: out of memory%s", path, "");
		}
		got = fread(text->data + text->len, 1, text->cap - text->len, fp);
		if (got == 0)
			break;
		text->len += got;
	}
	if (ferror(fp)) {
		fclose(fp);
		return err_printf(err, "%s: read error%s", path, "");
	}
	fclose(fp);
	if (text->cap == text->len && buf_reserve(text, 1) != 0)
		return err_printf(err, "%s: out of memory%s", path, "");
	return 0;
}

int lex_load_file(lexicon *lx, int cat, int gk, const char *path, tm_buf *err)
{
	tm_buf text = {0};
	int rc = lex_read_text(path, &text, err);

	if (rc == 0)
		rc = lex_load_text(lx, cat, gk, path, text.data, text.len, err);
	buf_free(&text);
	return rc;
}

int lex_load_text(lexicon *lx, int cat, int gk, const char *path, char *data,
		  size_t size, tm_buf *err)
{
	size_t pos = 0;
	long line = 0;
	int rc = 0;
	struct {
		char *data;
		size_t len;
	} text = {data, size};

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
					   f[3], " (any, edge, alone, slot, strong, off; places: adjective, city)");
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
	return rc;
}

static int cmp_str(const void *a, const void *b)
{
	return strcmp(*(char *const *)a, *(char *const *)b);
}

void lex_files_free(lex_file *f, size_t n)
{
	for (size_t i = 0; i < n; i++)
		free(f[i].path);
	free(f);
}

int lex_list_dir(const char *dir, lex_file **files, size_t *nfiles, tm_buf *err)
{
	int cat, rc = 0;
	size_t fcap = *nfiles;

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
				char **p = tm_grow(names, &cap, n + 1, sizeof *p, 16);
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
			tm_qsort(names, n, sizeof *names, cmp_str);
		for (i = 0; i < n && rc == 0; i++) {
			char fpath[4096 + 256];
			int gk = GK_NONE;
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
			if (*nfiles == fcap) {
				lex_file *p = tm_grow(*files, &fcap, *nfiles + 1, sizeof *p, 64);
				if (!p) {
					rc = err_printf(err, "%s: out of memory%s", path, "");
					break;
				}
				*files = p;
			}
			if (!((*files)[*nfiles].path = strdup(fpath))) {
				rc = err_printf(err, "%s: out of memory%s", path, "");
				break;
			}
			(*files)[*nfiles].cat = cat;
			(*files)[*nfiles].gender_kind = gk;
			++*nfiles;
		}
		for (i = 0; i < n; i++)
			free(names[i]);
		free(names);
	}
	return rc;
}

int lex_load_dir(lexicon *lx, const char *dir, tm_buf *err)
{
	lex_file *f = NULL;
	size_t n = 0, i;
	int rc;

	/* the files listed before a listing error (a gender file badly
	 * named) are read first: an error in one of them is the first met */
	tm_buf lerr = {0};
	int lrc = lex_list_dir(dir, &f, &n, &lerr);

	rc = 0;
	for (i = 0; i < n && rc == 0; i++)
		rc = lex_load_file(lx, f[i].cat, f[i].gender_kind, f[i].path, err);
	if (rc == 0 && lrc != 0) {
		buf_reset(err);
		buf_append(err, lerr.data, lerr.len);
		rc = -1;
	}
	buf_free(&lerr);
	lex_files_free(f, n);
	return rc;
}

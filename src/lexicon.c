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
/* Bit filters over sequence hashes (2^20 bits each, 128 KiB: they stay
 * in cache where the tables do not): every prefix of a phrase, and every
 * whole phrase.  A clear bit proves absence. */
#define FBITS 20

typedef struct phrase {
	uint64_t h;
	uint32_t str;   /* offset of the folds in lx->strs, 0x1F between tokens */
	uint32_t slen;
	uint32_t first; /* index into lx->ent, 1-based */
	uint8_t ntok;
} phrase;

struct lexicon {
	phrase *ph;      /* open addressing, power-of-two size */
	size_t phcap, nph;
	lex_entry *ent;  /* ent[0] unused */
	size_t nent, entcap;
	tm_buf strs;
	lex_pair *pairs;
	size_t npairs, paircap;
	char **values;   /* interned value strings */
	char *vslot[VALSLOTS];
	size_t nvalues, valcap;
	uni_ctx u;
	tok_line tl;
	tm_buf work;
	uint64_t pre[(1u << FBITS) / 64], full[(1u << FBITS) / 64];
};

static inline size_t fbit(uint64_t h)
{
	return (size_t)((h * 0x9E3779B97F4A7C15ULL) >> (64 - FBITS));
}

int lex_maybe_prefix(const lexicon *lx, uint64_t seq)
{
	size_t b = fbit(seq);
	return (lx->pre[b >> 6] >> (b & 63)) & 1;
}

int lex_maybe_phrase(const lexicon *lx, uint64_t seq)
{
	size_t b = fbit(seq);
	return (lx->full[b >> 6] >> (b & 63)) & 1;
}

static const char *const cat_names[LC_NCAT] = {
	"gender", "seniority", "schedule", "pay", "reference", "marketing",
	"employer", "location", "places", "protect", "units",
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
				     "connector", NULL};
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
	case LC_PLACE: return NULL; /* country codes, checked apart */
	default: return v_none;
	}
}

lexicon *lex_new(void)
{
	lexicon *lx = calloc(1, sizeof *lx);
	if (!lx)
		return NULL;
	/* sized for the bundled lexicons (about 90,000 phrases at a load of
	 * at most 3/4), so loading them never rehashes */
	lx->phcap = 1 << 17;
	lx->ph = calloc(lx->phcap, sizeof *lx->ph);
	lx->entcap = 1 << 17;
	lx->ent = calloc(lx->entcap, sizeof *lx->ent);
	lx->nent = 1;
	if (!lx->ph || !lx->ent || buf_putc(&lx->strs, 0) != 0) {
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
	free(lx->ph);
	free(lx->ent);
	buf_free(&lx->strs);
	for (i = 0; i < lx->npairs; i++) {
		free((char *)lx->pairs[i].masc);
		free((char *)lx->pairs[i].fem);
	}
	free(lx->pairs);
	for (i = 0; i < lx->nvalues; i++)
		free(lx->values[i]);
	free(lx->values);
	uni_ctx_free(&lx->u);
	tok_line_free(&lx->tl);
	buf_free(&lx->work);
	free(lx);
}

uint64_t lex_seq_step(uint64_t h, uint64_t th) { return tok_hash_mix(h, th); }

uint64_t lex_seq_final(uint64_t h, size_t ntok)
{
	h ^= (uint64_t)ntok * 0x9E3779B97F4A7C15ULL;
	return h ^ (h >> 31);
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

static int rehash_ph(lexicon *lx)
{
	size_t cap = lx->phcap * 2, i;
	phrase *p = calloc(cap, sizeof *p);
	if (!p)
		return -1;
	for (i = 0; i < lx->phcap; i++) {
		if (!lx->ph[i].first)
			continue;
		size_t j = lx->ph[i].h & (cap - 1);
		while (p[j].first)
			j = (j + 1) & (cap - 1);
		p[j] = lx->ph[i];
	}
	free(lx->ph);
	lx->ph = p;
	lx->phcap = cap;
	return 0;
}

static int same_phrase(const lexicon *lx, const phrase *p, size_t ntok,
		       const char *const *fold, const uint32_t *flen)
{
	const char *s = lx->strs.data + p->str;
	size_t k, pos = 0;

	if (p->ntok != ntok)
		return 0;
	for (k = 0; k < ntok; k++) {
		if (pos + flen[k] > p->slen || memcmp(s + pos, fold[k], flen[k]))
			return 0;
		pos += flen[k];
		if (k + 1 < ntok) {
			if (pos >= p->slen || s[pos] != 0x1F)
				return 0;
			pos++;
		}
	}
	return pos == p->slen;
}

const lex_entry *lex_find(const lexicon *lx, uint64_t seq, size_t ntok,
			  const char *const *fold, const uint32_t *flen)
{
	size_t j = seq & (lx->phcap - 1);
	while (lx->ph[j].first) {
		const phrase *p = &lx->ph[j];
		if (p->h == seq && same_phrase(lx, p, ntok, fold, flen))
			return &lx->ent[p->first];
		j = (j + 1) & (lx->phcap - 1);
	}
	return NULL;
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

int lex_add(lexicon *lx, int cat, const char *lang, const char *ph,
	    size_t plen, const char *value, int where, tm_buf *err)
{
	const char *fold[MAXTOK + 1];
	uint32_t flen[MAXTOK + 1];
	uint64_t th[MAXTOK + 1], seq = LEX_SEQ_SEED;
	char lg[4];
	uint8_t amb;
	int nu, k;
	const char *const *allowed = allowed_values(cat);
	const char *v;
	lex_entry *e;

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
	if (!dec_is_utf8(ph, plen) || memchr(ph, 0, plen))
		return err_printf(err, "phrase is not valid UTF-8%s%s", "", "");
	nu = fold_units(lx, ph, plen, fold, flen, th, MAXTOK);
	if (nu < 0)
		return err_printf(err, "out of memory%s%s", "", "");
	if (nu == 0)
		return 1;
	if (nu > MAXTOK)
		return err_printf(err, "phrase longer than 12 tokens%s%s", "", "");
	for (k = 0; k < nu; k++) {
		seq = lex_seq_step(seq, th[k]);
		size_t b = fbit(lex_seq_final(seq, (size_t)k + 1));
		lx->pre[b >> 6] |= 1ULL << (b & 63);
	}
	seq = lex_seq_final(seq, (size_t)nu);
	{
		size_t b = fbit(seq);
		lx->full[b >> 6] |= 1ULL << (b & 63);
	}

	/* find or insert the phrase */
	const lex_entry *found = lex_find(lx, seq, (size_t)nu, fold, flen);
	if (where == LW_OFF) {
		for (const lex_entry *f = found; f; f = lex_next(lx, f))
			if (f->cat == cat && !strcmp(f->lang, lg))
				((lex_entry *)f)->off = 1;
		return 0;
	}
	if (lx->nent == lx->entcap) {
		size_t cap = lx->entcap * 2;
		lex_entry *p = realloc(lx->ent, cap * sizeof *p);
		if (!p)
			return err_printf(err, "out of memory%s%s", "", "");
		lx->ent = p;
		lx->entcap = cap;
		if (found)
			found = NULL; /* re-found below */
	}
	if (!(v = intern(lx, value)))
		return err_printf(err, "out of memory%s%s", "", "");
	size_t idx = lx->nent++;
	e = &lx->ent[idx];
	memset(e, 0, sizeof *e);
	e->cat = (uint8_t)cat;
	e->where = (uint8_t)where;
	e->amb = amb;
	memcpy(e->lang, lg, sizeof lg);
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

	size_t j = seq & (lx->phcap - 1);
	while (lx->ph[j].first) {
		phrase *p = &lx->ph[j];
		if (p->h == seq && same_phrase(lx, p, (size_t)nu, fold, flen)) {
			/* append to the end of its entry list */
			uint32_t q = p->first;
			while (lx->ent[q].next)
				q = lx->ent[q].next;
			/* a duplicate line adds nothing */
			for (uint32_t r = p->first; r; r = lx->ent[r].next) {
				lex_entry *o = &lx->ent[r];
				if (o->cat == cat && o->where == where &&
				    o->amb == amb && !strcmp(o->lang, lg) &&
				    o->value == v) {
					o->off = 0;
					lx->nent--;
					return 0;
				}
			}
			lx->ent[q].next = (uint32_t)idx;
			return 0;
		}
		j = (j + 1) & (lx->phcap - 1);
	}
	if ((lx->nph + 1) * 4 > lx->phcap * 3) {
		if (rehash_ph(lx) != 0)
			return err_printf(err, "out of memory%s%s", "", "");
		j = seq & (lx->phcap - 1);
		while (lx->ph[j].first)
			j = (j + 1) & (lx->phcap - 1);
	}
	phrase *p = &lx->ph[j];
	p->h = seq;
	p->ntok = (uint8_t)nu;
	p->first = (uint32_t)idx;
	p->str = (uint32_t)lx->strs.len;
	for (k = 0; k < nu; k++) {
		if (k && buf_putc(&lx->strs, 0x1F) != 0)
			return err_printf(err, "out of memory%s%s", "", "");
		if (buf_append(&lx->strs, fold[k], flen[k]) != 0)
			return err_printf(err, "out of memory%s%s", "", "");
	}
	p->slen = (uint32_t)(lx->strs.len - p->str);
	lx->nph++;
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
		lx->pairs = p;
		lx->paircap = lx->paircap ? lx->paircap * 2 : 64;
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
	for (;;) {
		if (text.cap - text.len < 65536 && buf_reserve(&text, 65536) != 0) {
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
			if (w < 0) {
				err_printf(err, "unknown place restriction '%s'%s",
					   f[3], " (any, edge, alone, slot, strong, off)");
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

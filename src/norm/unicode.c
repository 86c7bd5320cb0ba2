/* unicode.c - the Unicode layer over utf8proc. */
#include "norm/unicode.h"

#include <stddef.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>
#include <utf8proc.h>

void uni_ctx_free(uni_ctx *u)
{
	if (!u)
		return;
	free(u->cp);
	u->cp = NULL;
	u->cap = 0;
	buf_free(&u->safe);
	buf_free(&u->one);
}

const char *uni_version(void) { return utf8proc_unicode_version(); }

static int grow(uni_ctx *u, size_t need)
{
	int32_t *p = tm_grow(u->cp, &u->cap, need, sizeof *p, 256);
	if (!p)
		return -1;
	u->cp = p;
	return 0;
}

/* Dashes, quotes, spaces and symbols of a title, mapped before
 * decomposition.  data is non-NULL for the key form. */
static utf8proc_int32_t title_map(utf8proc_int32_t c, void *data)
{
	if (c < 0x80) {
		if (c < 0x20 || c == 0x7F)
			return ' ';
		if (c == '`')
			return '\'';
		return c;
	}
	switch (c) {
	case 0x2018: case 0x2019: case 0x201A: case 0x201B: case 0x2032:
	case 0x00B4: case 0x02BC: case 0x02B9: case 0xFF07:
		return '\'';
	case 0x201C: case 0x201D: case 0x201E: case 0x201F: case 0x2033:
	case 0x00AB: case 0x00BB: case 0x2039: case 0x203A: case 0xFF02:
		return '"';
	case 0x2212: case 0xFE63: case 0xFF0D:
		return '-';
	case 0x2022: case 0x2023: case 0x2043: case 0x25CF: case 0x25AA:
	case 0x25A0: case 0x25E6: case 0x2219: case 0x2981: case 0x00A6:
		return '|';
	case 0x2027: case 0x22C5: case 0x2E31:
		return 0x00B7; /* word-internal dots read as the middle dot */
	case 0x00B7:
		return c;
	default:
		break;
	}
	if (data) {
		switch (c) {
		case 0x0141: case 0x0142: return 'l';
		case 0x00D8: case 0x00F8: return 'o';
		case 0x0110: case 0x0111: return 'd';
		case 0x0126: case 0x0127: return 'h';
		case 0x0131: return 'i';
		default: break;
		}
	}
	switch (utf8proc_category(c)) {
	case UTF8PROC_CATEGORY_PD:
		return '-';
	case UTF8PROC_CATEGORY_ZS: case UTF8PROC_CATEGORY_ZL:
	case UTF8PROC_CATEGORY_ZP: case UTF8PROC_CATEGORY_CC:
		return ' ';
	case UTF8PROC_CATEGORY_SO: case UTF8PROC_CATEGORY_SK:
		/* emoji and dingbats part a title like a bullet:
		 * "Koch 📍 München"; the degree and numero signs write
		 * numbers ("N° d'offre: 2291", "30°C") */
		if (c == 0xB0 || c == 0x2116)
			return c;
		return c == 0xFFFD ? ' ' : '|';
	case UTF8PROC_CATEGORY_CO: case UTF8PROC_CATEGORY_CS:
	case UTF8PROC_CATEGORY_CN:
		return ' ';
	default:
		return c;
	}
}

/* Leading and trailing non-starters of the full (compatibility)
 * decomposition of cp; *all when it has no starter at all. */
static void nonstarters(int32_t cp, const utf8proc_property_t *p, size_t *lead,
			size_t *trail, int *all)
{
	utf8proc_int32_t d[32];
	utf8proc_ssize_t n, i;

	if (p->decomp_seqindex == UINT16_MAX) {
		*lead = *trail = p->combining_class != 0;
		*all = p->combining_class != 0;
		return;
	}
	n = utf8proc_decompose_char(cp, d, 32, UTF8PROC_DECOMPOSE | UTF8PROC_COMPAT, NULL);
	if (n <= 0 || n > 32) {
		*lead = *trail = 0;
		*all = 0;
		return;
	}
	for (i = 0; i < n && utf8proc_get_property(d[i])->combining_class; i++)
		;
	*lead = (size_t)i;
	*all = i == n;
	for (i = n; i > 0 && utf8proc_get_property(d[i - 1])->combining_class; i--)
		;
	*trail = (size_t)(n - i);
}

/* The Stream-Safe Text Format (unicode.h): *s and *n are replaced by a
 * copy in u->safe when non-starters had to be dropped.  One pass; ASCII
 * is a starter.  Returns 0, or -1 when memory ran out. */
static int stream_safe(uni_ctx *u, const char **s, size_t *n)
{
	const char *p = *s;
	size_t i = 0, from = 0, run = 0, lead, trail;
	int all, cut = 0;

	while (i < *n) {
		size_t at = i;
		if ((unsigned char)p[i] < 0x80) {
			i++;
			run = 0;
			continue;
		}
		int32_t cp = uni_next(p, *n, &i);
		const utf8proc_property_t *pr = utf8proc_get_property(cp);
		if (pr->ignorable)
			continue;
		nonstarters(cp, pr, &lead, &trail, &all);
		if (!all) {
			run = trail;
			continue;
		}
		if (run + lead <= UNI_MAX_NONSTARTERS) {
			run += lead;
			continue;
		}
		/* drop it */
		if (!cut)
			buf_reset(&u->safe);
		cut = 1;
		if (buf_append(&u->safe, p + from, at - from) != 0)
			return -1;
		from = i;
	}
	if (cut) {
		if (buf_append(&u->safe, p + from, *n - from) != 0)
			return -1;
		*s = u->safe.data;
		*n = u->safe.len;
	}
	return 0;
}

static int run(uni_ctx *u, const char *s, size_t n, tm_buf *out,
	       utf8proc_option_t opt, utf8proc_custom_func fn, void *data)
{
	utf8proc_ssize_t len;

	if (n == 0)
		return 0;
	if (stream_safe(u, &s, &n) != 0)
		return -1;
	if (n > (size_t)(PTRDIFF_MAX / 8))
		return -1;
	if (u->cap < n + 16 && grow(u, n + 16) != 0)
		return -1;
	for (;;) {
		len = utf8proc_decompose_custom((const utf8proc_uint8_t *)s,
						(utf8proc_ssize_t)n, u->cp,
						(utf8proc_ssize_t)u->cap, opt,
						fn, data);
		if (len < 0)
			return -1;
		if ((size_t)len <= u->cap)
			break;
		if (grow(u, (size_t)len) != 0)
			return -1;
	}
	len = utf8proc_normalize_utf32(u->cp, len, opt);
	if (len < 0)
		return -1;
	/* composition and compatibility mappings can make what the map
	 * turns away (o + U+0338 is ø, U+0374 is U+02B9): map once more */
	if (fn)
		for (utf8proc_ssize_t i = 0; i < len; i++)
			u->cp[i] = fn(u->cp[i], data);
	/* reencode writes UTF-8 over the code point array: 4 bytes a code
	 * point is always room enough. */
	len = utf8proc_reencode(u->cp, len, opt);
	if (len < 0)
		return -1;
	return buf_append(out, u->cp, (size_t)len);
}

int uni_normalize(uni_ctx *u, enum uni_form form, const char *s, size_t n,
		  tm_buf *out)
{
	utf8proc_option_t opt = UTF8PROC_STABLE;

	switch (form) {
	case UNI_NFC: opt |= UTF8PROC_COMPOSE; break;
	case UNI_NFD: opt |= UTF8PROC_DECOMPOSE; break;
	case UNI_NFKC: opt |= UTF8PROC_COMPOSE | UTF8PROC_COMPAT; break;
	case UNI_NFKD: opt |= UTF8PROC_DECOMPOSE | UTF8PROC_COMPAT; break;
	}
	return run(u, s, n, out, opt, NULL, NULL);
}

static int ascii_only(const char *s, size_t n)
{
	size_t i = 0;
	uint64_t w;
	for (; i + 8 <= n; i += 8) {
		memcpy(&w, s + i, 8);
		if (w & 0x8080808080808080ULL)
			return 0;
	}
	for (; i < n; i++)
		if ((unsigned char)s[i] >= 0x80)
			return 0;
	return 1;
}

/* The prepared form of each ASCII byte: controls become spaces, the
 * backtick an apostrophe (title_map does the same for the general path). */
static const unsigned char ascii_prep[128] = {
	0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20,
	0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20, 0x20,
	0x20, 0x21, 0x22, 0x23, 0x24, 0x25, 0x26, 0x27, 0x28, 0x29, 0x2A, 0x2B, 0x2C, 0x2D, 0x2E, 0x2F,
	0x30, 0x31, 0x32, 0x33, 0x34, 0x35, 0x36, 0x37, 0x38, 0x39, 0x3A, 0x3B, 0x3C, 0x3D, 0x3E, 0x3F,
	0x40, 0x41, 0x42, 0x43, 0x44, 0x45, 0x46, 0x47, 0x48, 0x49, 0x4A, 0x4B, 0x4C, 0x4D, 0x4E, 0x4F,
	0x50, 0x51, 0x52, 0x53, 0x54, 0x55, 0x56, 0x57, 0x58, 0x59, 0x5A, 0x5B, 0x5C, 0x5D, 0x5E, 0x5F,
	0x27, 0x61, 0x62, 0x63, 0x64, 0x65, 0x66, 0x67, 0x68, 0x69, 0x6A, 0x6B, 0x6C, 0x6D, 0x6E, 0x6F,
	0x70, 0x71, 0x72, 0x73, 0x74, 0x75, 0x76, 0x77, 0x78, 0x79, 0x7A, 0x7B, 0x7C, 0x7D, 0x7E, 0x20,
};

const unsigned char uni_ascii_lower[256] = {
	0x00, 0x01, 0x02, 0x03, 0x04, 0x05, 0x06, 0x07, 0x08, 0x09, 0x0A, 0x0B, 0x0C, 0x0D, 0x0E, 0x0F,
	0x10, 0x11, 0x12, 0x13, 0x14, 0x15, 0x16, 0x17, 0x18, 0x19, 0x1A, 0x1B, 0x1C, 0x1D, 0x1E, 0x1F,
	0x20, 0x21, 0x22, 0x23, 0x24, 0x25, 0x26, 0x27, 0x28, 0x29, 0x2A, 0x2B, 0x2C, 0x2D, 0x2E, 0x2F,
	0x30, 0x31, 0x32, 0x33, 0x34, 0x35, 0x36, 0x37, 0x38, 0x39, 0x3A, 0x3B, 0x3C, 0x3D, 0x3E, 0x3F,
	0x40, 0x61, 0x62, 0x63, 0x64, 0x65, 0x66, 0x67, 0x68, 0x69, 0x6A, 0x6B, 0x6C, 0x6D, 0x6E, 0x6F,
	0x70, 0x71, 0x72, 0x73, 0x74, 0x75, 0x76, 0x77, 0x78, 0x79, 0x7A, 0x5B, 0x5C, 0x5D, 0x5E, 0x5F,
	0x60, 0x61, 0x62, 0x63, 0x64, 0x65, 0x66, 0x67, 0x68, 0x69, 0x6A, 0x6B, 0x6C, 0x6D, 0x6E, 0x6F,
	0x70, 0x71, 0x72, 0x73, 0x74, 0x75, 0x76, 0x77, 0x78, 0x79, 0x7A, 0x7B, 0x7C, 0x7D, 0x7E, 0x7F,
	0x80, 0x81, 0x82, 0x83, 0x84, 0x85, 0x86, 0x87, 0x88, 0x89, 0x8A, 0x8B, 0x8C, 0x8D, 0x8E, 0x8F,
	0x90, 0x91, 0x92, 0x93, 0x94, 0x95, 0x96, 0x97, 0x98, 0x99, 0x9A, 0x9B, 0x9C, 0x9D, 0x9E, 0x9F,
	0xA0, 0xA1, 0xA2, 0xA3, 0xA4, 0xA5, 0xA6, 0xA7, 0xA8, 0xA9, 0xAA, 0xAB, 0xAC, 0xAD, 0xAE, 0xAF,
	0xB0, 0xB1, 0xB2, 0xB3, 0xB4, 0xB5, 0xB6, 0xB7, 0xB8, 0xB9, 0xBA, 0xBB, 0xBC, 0xBD, 0xBE, 0xBF,
	0xC0, 0xC1, 0xC2, 0xC3, 0xC4, 0xC5, 0xC6, 0xC7, 0xC8, 0xC9, 0xCA, 0xCB, 0xCC, 0xCD, 0xCE, 0xCF,
	0xD0, 0xD1, 0xD2, 0xD3, 0xD4, 0xD5, 0xD6, 0xD7, 0xD8, 0xD9, 0xDA, 0xDB, 0xDC, 0xDD, 0xDE, 0xDF,
	0xE0, 0xE1, 0xE2, 0xE3, 0xE4, 0xE5, 0xE6, 0xE7, 0xE8, 0xE9, 0xEA, 0xEB, 0xEC, 0xED, 0xEE, 0xEF,
	0xF0, 0xF1, 0xF2, 0xF3, 0xF4, 0xF5, 0xF6, 0xF7, 0xF8, 0xF9, 0xFA, 0xFB, 0xFC, 0xFD, 0xFE, 0xFF,
};

static inline unsigned char ascii_fold(unsigned char c)
{
	return uni_ascii_lower[ascii_prep[c]];
}

/* Fast-table index of a code point, or -1.  Letters of Latin-1 and
 * Latin Extended-A never combine with what follows them, so their NFKC
 * (and fold) is the same alone as in a line; the same holds for the
 * punctuation listed. */
static int fast_index(int32_t cp)
{
	static const int32_t extra[] = {0x2013, 0x2014, 0x2018, 0x2019, 0x201A,
					0x201C, 0x201D, 0x201E, 0x2022, 0x20AC,
					0x2026, 0x2010, 0x2011, 0x00B7, 0x2212, 0x200B};
	if (cp < 0x180)
		return cp;
	if (cp < 0x200B || cp > 0x2212)
		return -1;
	for (int i = 0; i < (int)(sizeof extra / sizeof extra[0]); i++)
		if (extra[i] == cp)
			return 0x180 + i;
	return -1;
}

static int slow_prepare(uni_ctx *u, const char *s, size_t n, tm_buf *out);
static int slow_fold(uni_ctx *u, const char *s, size_t n, tm_buf *out);

static int fill_tables(uni_ctx *u)
{
	static const int32_t extra[] = {0x2013, 0x2014, 0x2018, 0x2019, 0x201A,
					0x201C, 0x201D, 0x201E, 0x2022, 0x20AC,
					0x2026, 0x2010, 0x2011, 0x00B7, 0x2212, 0x200B};
	tm_buf b = {0};
	for (int i = 0; i < UNI_FAST; i++) {
		int32_t cp = i < 0x180 ? i : extra[i - 0x180];
		utf8proc_uint8_t enc[4];
		utf8proc_ssize_t l = utf8proc_encode_char(cp, enc);
		u->plen[i] = u->flen[i] = 0xFF; /* not usable */
		if (cp == 0)
			continue;
		buf_reset(&b);
		if (slow_prepare(u, (const char *)enc, (size_t)l, &b) == 0 && b.len <= 4) {
			memcpy(u->prep[i], b.data, b.len);
			u->plen[i] = (uint8_t)b.len;
		}
		buf_reset(&b);
		if (slow_fold(u, (const char *)enc, (size_t)l, &b) == 0 && b.len <= 4) {
			memcpy(u->fold[i], b.data, b.len);
			u->flen[i] = (uint8_t)b.len;
		}
	}
	buf_free(&b);
	for (int32_t cp = 0; cp < 0x180; cp++)
		u->cls[cp] = (uint8_t)(uni_classify(cp) | (uni_is_upper(cp) ? UNI_UP : 0) |
				       (uni_is_lower(cp) ? UNI_LOW : 0));
	u->ready = 1;
	return 0;
}

int uni_class_case(uni_ctx *u, int32_t cp)
{
	if (cp < 0x180) {
		if (!u->ready && fill_tables(u) != 0)
			return UNI_OTHER;
		return u->cls[cp];
	}
	return (int)uni_classify(cp) | (uni_is_upper(cp) ? UNI_UP : 0) |
	       (uni_is_lower(cp) ? UNI_LOW : 0);
}

/* Maps s code point by code point through a fast table; returns 1 when
 * every code point had an entry (out then holds the result), 0 when the
 * general algorithm is needed (out unchanged), -1 on memory. */
/* A code point outside the fast table that no normalisation joins to
 * what stands beside it: combining class 0, no decomposition, in no
 * canonical composition (neither first nor second: utf8proc's
 * comb_index is UINT16_MAX), not Hangul (composed by rule, not by
 * table).  Its prepared form and fold are then its own, whatever its
 * neighbours, as for the table's code points.  Returns them (computed
 * once with the general algorithm, then remembered), or NULL: the line
 * takes the general path. */
static const char *inert_map(uni_ctx *u, int32_t cp, int fold, uint8_t *l)
{
	struct uni_inert *e = &u->inert[(uint32_t)cp % UNI_INERT];

	if (e->cp != cp) {
		const utf8proc_property_t *p;
		utf8proc_uint8_t enc[4];
		utf8proc_ssize_t len;

		if (cp < 0x80 || cp > 0x10FFFF || (cp >= 0x1100 && cp <= 0x11FF) ||
		    (cp >= 0xA960 && cp <= 0xA97F) || (cp >= 0xAC00 && cp <= 0xD7FF))
			return NULL;
		p = utf8proc_get_property(cp);
		if (p->combining_class || p->comb_index != UINT16_MAX ||
		    p->decomp_seqindex != UINT16_MAX)
			return NULL;
		len = utf8proc_encode_char(cp, enc);
		e->cp = 0;
		for (int f = 0; f < 2; f++) {
			buf_reset(&u->one);
			if ((f ? slow_fold : slow_prepare)(u, (const char *)enc, (size_t)len,
							   &u->one) != 0 || u->one.len > 4)
				return NULL;
			memcpy(f ? e->fold : e->prep, u->one.data, u->one.len);
			*(f ? &e->flen : &e->plen) = (uint8_t)u->one.len;
		}
		e->cp = cp;
	}
	*l = fold ? e->flen : e->plen;
	return fold ? e->fold : e->prep;
}

static int fast_map(uni_ctx *u, const char *s, size_t n, tm_buf *out, int fold)
{
	size_t start = out->len, i = 0;

	if (!u->ready && fill_tables(u) != 0)
		return -1;
	if (buf_reserve(out, n * 2 + 8) != 0)
		return -1;
	while (i < n) {
		unsigned char b = (unsigned char)s[i];
		if (b < 0x80) {
			/* a run of ASCII at once, mapped as it is found: the
			 * tables hold the same as the ASCII path (room for
			 * the rest of the line, the longest the run can be) */
			if (out->cap - out->len < n - i && buf_reserve(out, n - i) != 0)
				return -1;
			char *d = out->data + out->len, *d0 = d;
			if (fold)
				for (; i < n && (b = (unsigned char)s[i]) < 0x80; i++)
					*d++ = (char)ascii_fold(b);
			else
				for (; i < n && (b = (unsigned char)s[i]) < 0x80; i++)
					*d++ = (char)ascii_prep[b];
			out->len += (size_t)(d - d0);
			continue;
		}
		size_t j = i;
		int32_t cp = uni_next(s, n, &j);
		int x = fast_index(cp);
		uint8_t l;
		const char *rep;
		if (x >= 0 && (l = fold ? u->flen[x] : u->plen[x]) != 0xFF)
			rep = fold ? u->fold[x] : u->prep[x];
		else if (!(rep = inert_map(u, cp, fold, &l))) {
			out->len = start;
			return 0;
		}
		if (out->cap - out->len < 4 && buf_reserve(out, 4) != 0)
			return -1;
		memcpy(out->data + out->len, rep, l);
		out->len += l;
		i = j;
	}
	return 1;
}

/* ASCII goes the general way (which has its own ASCII path); other text
 * through the per-code-point tables when they cover it. */
static int dispatch(uni_ctx *u, const char *s, size_t n, tm_buf *out, int fold)
{
	int r = 0;
	if (!ascii_only(s, n) && (r = fast_map(u, s, n, out, fold)) != 0)
		return r < 0 ? -1 : 0;
	return fold ? slow_fold(u, s, n, out) : slow_prepare(u, s, n, out);
}

int uni_prepare(uni_ctx *u, const char *s, size_t n, tm_buf *out)
{
	return dispatch(u, s, n, out, 0);
}

int uni_fold(uni_ctx *u, const char *s, size_t n, tm_buf *out)
{
	return dispatch(u, s, n, out, 1);
}

static int slow_prepare(uni_ctx *u, const char *s, size_t n, tm_buf *out)
{
	/* ASCII fast path: NFKC changes no ASCII text, and title_map only
	 * maps controls and the backtick */
	if (ascii_only(s, n)) {
		if (buf_reserve(out, n) != 0)
			return -1;
		char *d = out->data + out->len;
		for (size_t i = 0; i < n; i++)
			d[i] = (char)ascii_prep[(unsigned char)s[i]];
		out->len += n;
		return 0;
	}
	return run(u, s, n, out,
		   UTF8PROC_STABLE | UTF8PROC_COMPOSE | UTF8PROC_COMPAT |
			   UTF8PROC_IGNORE,
		   title_map, NULL);
}

static int slow_fold(uni_ctx *u, const char *s, size_t n, tm_buf *out)
{
	static const int key_form = 1;
	size_t start = out->len, i, j;

	if (ascii_only(s, n)) {
		if (buf_reserve(out, n) != 0)
			return -1;
		char *d = out->data + out->len;
		for (i = 0; i < n; i++)
			d[i] = (char)ascii_fold((unsigned char)s[i]);
		out->len += n;
		return 0;
	}

	if (run(u, s, n, out,
		UTF8PROC_STABLE | UTF8PROC_COMPOSE | UTF8PROC_COMPAT |
			UTF8PROC_IGNORE | UTF8PROC_CASEFOLD |
			UTF8PROC_STRIPMARK,
		title_map, (void *)&key_form) != 0)
		return -1;
	/* æ (C3 A6) and œ (C5 93) have no decomposition; spell them out.
	 * Both are two bytes, like their replacements. */
	for (i = j = start; i < out->len; i++) {
		unsigned char c = (unsigned char)out->data[i];
		if (i + 1 < out->len && c == 0xC3 &&
		    (unsigned char)out->data[i + 1] == 0xA6) {
			out->data[j++] = 'a';
			out->data[j++] = 'e';
			i++;
		} else if (i + 1 < out->len && c == 0xC5 &&
			   (unsigned char)out->data[i + 1] == 0x93) {
			out->data[j++] = 'o';
			out->data[j++] = 'e';
			i++;
		} else
			out->data[j++] = (char)c;
	}
	out->len = j;
	return 0;
}

int uni_lower(const char *s, size_t n, tm_buf *out)
{
	size_t i = 0;
	utf8proc_uint8_t enc[4];

	if (buf_reserve(out, n + 8) != 0)
		return -1;
	while (i < n) {
		unsigned char c = (unsigned char)s[i];
		if (c < 0x80) {
			if (buf_putc(out, (char)(c >= 'A' && c <= 'Z' ? c + 32 : c)))
				return -1;
			i++;
			continue;
		}
		int32_t cp = uni_next(s, n, &i);
		utf8proc_ssize_t l = utf8proc_encode_char(utf8proc_tolower(cp), enc);
		if (buf_append(out, enc, (size_t)l) != 0)
			return -1;
	}
	return 0;
}

static int is_mark(int32_t cp)
{
	utf8proc_category_t c = utf8proc_category(cp);
	return c == UTF8PROC_CATEGORY_MN || c == UTF8PROC_CATEGORY_MC ||
	       c == UTF8PROC_CATEGORY_ME;
}

int uni_lower_word(const char *s, size_t n, unsigned opt, tm_buf *out)
{
	size_t i = 0;
	int after_letter = 0; /* the code point before (marks aside) is a letter */
	utf8proc_uint8_t enc[4];

	if (buf_reserve(out, n + 8) != 0)
		return -1;
	while (i < n) {
		unsigned char c = (unsigned char)s[i];
		int32_t cp, lo;
		if (c < 0x80) {
			if (c == 'I' && (opt & UNI_TURKIC)) {
				if (buf_append(out, "\xC4\xB1", 2) != 0) /* ı */
					return -1;
			} else if (buf_putc(out, (char)(c >= 'A' && c <= 'Z' ? c + 32 : c)))
				return -1;
			after_letter = (c | 0x20) >= 'a' && (c | 0x20) <= 'z';
			i++;
			continue;
		}
		cp = uni_next(s, n, &i);
		if ((cp == 0x03A3 || cp == 0x03C3) && after_letter) {
			/* final unless a letter follows, marks aside; each mark
			 * is read here at most once more than by the main loop */
			int32_t next = -1;
			for (size_t j = i; j < n;) {
				next = uni_next(s, n, &j);
				if (!is_mark(next))
					break;
				next = -1;
			}
			lo = next >= 0 && uni_classify(next) == UNI_LETTER ? 0x03C3 : 0x03C2;
		} else
			lo = utf8proc_tolower(cp);
		utf8proc_ssize_t l = utf8proc_encode_char(lo, enc);
		if (buf_append(out, enc, (size_t)l) != 0)
			return -1;
		if (!is_mark(cp))
			after_letter = uni_classify(cp) == UNI_LETTER;
	}
	return 0;
}

enum uni_class uni_classify(int32_t cp)
{
	switch (utf8proc_category(cp)) {
	case UTF8PROC_CATEGORY_LU: case UTF8PROC_CATEGORY_LL:
	case UTF8PROC_CATEGORY_LT: case UTF8PROC_CATEGORY_LM:
	case UTF8PROC_CATEGORY_LO:
		return UNI_LETTER;
	case UTF8PROC_CATEGORY_MN: case UTF8PROC_CATEGORY_MC:
	case UTF8PROC_CATEGORY_ME:
		return UNI_MARK;
	case UTF8PROC_CATEGORY_ND: case UTF8PROC_CATEGORY_NL:
	case UTF8PROC_CATEGORY_NO:
		return UNI_DIGIT;
	case UTF8PROC_CATEGORY_ZS: case UTF8PROC_CATEGORY_ZL:
	case UTF8PROC_CATEGORY_ZP: case UTF8PROC_CATEGORY_CC:
		return UNI_SPACE;
	case UTF8PROC_CATEGORY_PC: case UTF8PROC_CATEGORY_PD:
	case UTF8PROC_CATEGORY_PS: case UTF8PROC_CATEGORY_PE:
	case UTF8PROC_CATEGORY_PI: case UTF8PROC_CATEGORY_PF:
	case UTF8PROC_CATEGORY_PO:
		return UNI_PUNCT;
	case UTF8PROC_CATEGORY_SC:
		return UNI_CURRENCY;
	case UTF8PROC_CATEGORY_SM: case UTF8PROC_CATEGORY_SK:
	case UTF8PROC_CATEGORY_SO:
		return UNI_SYMBOL;
	default:
		return UNI_OTHER;
	}
}

int uni_is_upper(int32_t cp)
{
	utf8proc_category_t c = utf8proc_category(cp);
	return c == UTF8PROC_CATEGORY_LU || c == UTF8PROC_CATEGORY_LT;
}

int uni_is_lower(int32_t cp)
{
	return utf8proc_category(cp) == UTF8PROC_CATEGORY_LL;
}

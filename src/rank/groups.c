/* groups.c - the group of each occupation: skos:broader, a groups TSV,
 * or a code prefix. */
#include "rank/groups.h"

#include <stdio.h>
#include <string.h>

#include "io/skos.h"
#include "io/tsv.h"

/* Puts occ in group grp; when it has one already, keeps the byte-smaller
 * (SKOS) or refuses (TSV: returns 1).  TM_OK, 1, or TM_ENOMEM. */
static int put(groupmap *g, const char *occ, size_t ol, const char *grp, size_t gl, int keep_min)
{
	size_t gi, oi;
	if (st_add(&g->names, grp, gl, 0, &gi) < 0)
		return TM_ENOMEM;
	int fresh = st_add(&g->occ, occ, ol, 0, &oi);
	if (fresh < 0)
		return TM_ENOMEM;
	st_entry *e = &g->occ.ent[oi];
	if (!fresh) {
		size_t had = (size_t)e->count - 1, hl, n;
		const char *h = st_key(&g->names, had, &hl);
		if (had == gi)
			return TM_OK;
		if (!keep_min)
			return 1;
		g->several++;
		n = hl < gl ? hl : gl;
		int c = memcmp(grp, h, n);
		if (c > 0 || (c == 0 && gl >= hl))
			return TM_OK;
	}
	e->count = gi + 1;
	return TM_OK;
}

typedef struct skctx {
	groupmap *g;
	tm_buf *err;
} skctx;

static int on_broader(void *c0, const char *occ, size_t ol, const char *b, size_t bl)
{
	skctx *c = c0;
	if (memchr(occ, '\x1F', ol) || memchr(b, '\x1F', bl))
		return 0; /* no occupation of the counts can hold one */
	if (put(c->g, occ, ol, b, bl, 1) < 0) {
		buf_reset(c->err);
		buf_puts(c->err, "out of memory");
		return -1;
	}
	return 0;
}

int groups_read_skos(groupmap *g, const char *path, tm_buf *err)
{
	skctx c = {g, err};
	memset(g, 0, sizeof *g);
	return skos_read_broader(path, on_broader, &c, err) ? TM_EFAIL : TM_OK;
}

static int bad(tm_buf *err, const char *path, long line, const char *what)
{
	return tm_failf(err, TM_EINPUT, "%s:%ld: %s", path, line, what);
}

/* The rows of one level of a groups TSV. */
typedef struct level_map {
	tm_buf name;
	groupmap m;
	long rows;
} level_map;

int groups_read_tsv(groupmap *g, const char *path, const char *level, tm_buf *err)
{
	tsv_reader t;
	level_map lv[GROUPS_MAX_LEVELS];
	int nlv = 0, r, pick = -1;
	long rows = 0;

	memset(g, 0, sizeof *g);
	memset(lv, 0, sizeof lv);
	if (tsv_open(&t, path) != 0) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
		tsv_close(&t);
		return TM_EFAIL;
	}
	int co = tsv_col(&t, "occupation"), cg = tsv_col(&t, "group"), cl = tsv_col(&t, "level");
	if (co < 0 || cg < 0) {
		tsv_close(&t);
		return bad(err, path, 1, "a groups TSV has the columns occupation and group "
					  "(and level, when it has several levels)");
	}
	if (level && !*level)
		level = NULL;
	if (level && cl < 0) {
		tsv_close(&t);
		return bad(err, path, 1, "--level is given but the file has no level column");
	}
	while ((r = tsv_next(&t)) > 0) {
		size_t on, gn, ln;
		const char *o = tsv_field(&t, co, &on), *gr = tsv_field(&t, cg, &gn);
		const char *ls = tsv_field(&t, cl, &ln);
		long line = t.lr.lineno;
		int i;
		if (t.over || !on || !gn || memchr(o, '\x1F', on) || memchr(gr, '\x1F', gn)) {
			r = bad(err, path, line, t.over ? "more fields than the header (a TAB inside a field?)"
							: "an empty occupation or group, or a control character");
			break;
		}
		for (i = 0; i < nlv; i++)
			if (lv[i].name.len == ln && !memcmp(lv[i].name.data, ls, ln))
				break;
		if (i == nlv) {
			if (nlv == GROUPS_MAX_LEVELS) {
				char m[120];
				snprintf(m, sizeof m, "more than %d levels", GROUPS_MAX_LEVELS);
				r = bad(err, path, line, m);
				break;
			}
			if (buf_append(&lv[nlv++].name, ls, ln)) {
				r = tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
				break;
			}
		}
		rows++;
		lv[i].rows++;
		int p = put(&lv[i].m, o, on, gr, gn, 0);
		if (p == 1) {
			r = bad(err, path, line, cl >= 0 ? "an occupation given a second group in one level"
							 : "an occupation given a second group");
			break;
		}
		if (p < 0) {
			r = tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
			break;
		}
	}
	if (r == TM_EFAIL) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
	}
	if (r == 0) {
		/* the level asked for; else the finest: the most groups, ties to
		 * the byte-smaller name */
		for (int i = 0; i < nlv; i++) {
			const tm_buf *n = &lv[i].name;
			if (level) {
				if (strlen(level) == n->len && !memcmp(level, n->data, n->len))
					pick = i;
				continue;
			}
			if (pick < 0 || lv[i].m.names.n > lv[pick].m.names.n ||
			    (lv[i].m.names.n == lv[pick].m.names.n &&
			     strcmp(n->data ? n->data : "", lv[pick].name.data ? lv[pick].name.data : "") < 0))
				pick = i;
		}
		if (level && pick < 0)
			r = bad(err, path, 1, "no row has the level given with --level");
	}
	if (r == 0 && pick >= 0) {
		*g = lv[pick].m;
		memset(&lv[pick].m, 0, sizeof lv[pick].m);
		g->skipped = rows - lv[pick].rows;
		g->levels = cl >= 0 ? nlv : 0;
		snprintf(g->level, sizeof g->level, "%.*s", (int)lv[pick].name.len,
			 lv[pick].name.data ? lv[pick].name.data : "");
	}
	for (int i = 0; i < nlv; i++) {
		groups_free(&lv[i].m);
		buf_free(&lv[i].name);
	}
	tsv_close(&t);
	return r < 0 ? r : TM_OK;
}

void groups_by_prefix(groupmap *g, size_t n)
{
	memset(g, 0, sizeof *g);
	g->prefix = n;
}

const char *groups_of(const groupmap *g, const char *occ, size_t ol, size_t *gl)
{
	if (g->prefix) {
		size_t start = ol, n = 0, i;
		while (start > 0 && !memchr("/#:", occ[start - 1], 3))
			start--;
		/* the first prefix characters: count the bytes that start one */
		for (i = start; i < ol; i++)
			if (((unsigned char)occ[i] & 0xC0) != 0x80 && n++ == g->prefix)
				break;
		if (n < g->prefix)
			return NULL; /* a code shorter than the prefix has no group */
		*gl = i - start;
		return occ + start;
	}
	long at = g->occ.n ? st_find(&g->occ, occ, ol) : -1;
	if (at < 0)
		return NULL;
	return st_key(&g->names, (size_t)g->occ.ent[at].count - 1, gl);
}

int groups_any(const groupmap *g)
{
	return g->prefix || g->occ.n;
}

void groups_free(groupmap *g)
{
	st_free(&g->occ);
	st_free(&g->names);
	memset(g, 0, sizeof *g);
}

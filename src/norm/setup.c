/* setup.c - finding and loading the lexicons. */
#include "norm/setup.h"

#include <limits.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "norm/lexcache.h"
#include "io/skos.h"
#include "io/tsv.h"

#ifndef TM_LEXDIR
#define TM_LEXDIR "/usr/local/share/titlemill/lexicons"
#endif

static int is_dir(const char *p)
{
	struct stat st;
	return stat(p, &st) == 0 && S_ISDIR(st.st_mode);
}

const char *setup_base_dir(void)
{
	static char found[PATH_MAX + 64];
	char exe[PATH_MAX];
	const char *env = getenv("TITLEMILL_LEXDIR");
	ssize_t n;

	if (env && *env)
		return env;
	n = readlink("/proc/self/exe", exe, sizeof exe - 1);
	if (n > 0) {
		char *slash;
		exe[n] = 0;
		if ((slash = strrchr(exe, '/')))
			*slash = 0;
		/* the build tree: lexicons/ beside the binary */
		snprintf(found, sizeof found, "%s/lexicons", exe);
		if (is_dir(found))
			return found;
		/* an installed tree: PREFIX/bin and PREFIX/share/titlemill */
		snprintf(found, sizeof found, "%s/../share/titlemill/lexicons", exe);
		if (is_dir(found))
			return found;
	}
	if (is_dir(TM_LEXDIR))
		return TM_LEXDIR;
	return NULL;
}

static int protect_one(void *ctx, const char *occ, size_t ol, char kind, const char *lang,
			size_t ll, const char *text, size_t tl)
{
	tm_buf err = {0};
	int r;
	(void)occ;
	(void)ol;
	(void)kind;
	(void)lang;
	(void)ll;
	r = lex_add(ctx, LC_PROTECT, "*", text, tl, "-", LW_ANY, &err);
	buf_free(&err);
	return r < 0 ? -1 : 0;
}

static int add_labels(lexicon *lx, const char *path, tm_buf *err)
{
	size_t pl = strlen(path);
	if ((pl > 4 && !strcmp(path + pl - 4, ".ttl")) || (pl > 3 && !strcmp(path + pl - 3, ".nt")) ||
	    (pl > 7 && !strcmp(path + pl - 7, ".turtle")))
		return skos_read(path, protect_one, lx, NULL, err);

	tsv_reader t;
	int col, lcol, r;
	char msg[600];

	if (tsv_open(&t, path) != 0) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
		tsv_close(&t);
		return -1;
	}
	col = tsv_col(&t, "label");
	lcol = tsv_col(&t, "lang");
	if (col < 0) {
		snprintf(msg, sizeof msg, "%s:1: no 'label' column in the header", path);
		buf_reset(err);
		buf_puts(err, msg);
		tsv_close(&t);
		return -1;
	}
	(void)lcol;
	while ((r = tsv_next(&t)) > 0) {
		size_t n;
		const char *s = tsv_field(&t, col, &n);
		if (n == 0)
			continue;
		if (lex_add(lx, LC_PROTECT, "*", s, n, "-", LW_ANY, err) < 0) {
			char *m = strndup(err->data, err->len);
			snprintf(msg, sizeof msg, "%s:%ld: %s", path, t.lr.lineno,
				 m ? m : "");
			free(m);
			buf_reset(err);
			buf_puts(err, msg);
			tsv_close(&t);
			return -1;
		}
	}
	if (r < 0) {
		buf_reset(err);
		buf_append(err, t.err.data, t.err.len);
	}
	tsv_close(&t);
	return r < 0 ? -1 : 0;
}

/* The files of every lexicon folder in reading order (the bundled
 * folder, TITLEMILL_LEXICONS, --lexicons); -1 when a folder is missing
 * or a file badly named (the reading without the cache then reports
 * it as it meets it). */
static int list_all(const char *base, const char *env, const setup_opts *o,
		    lex_file **f, size_t *n)
{
	tm_buf e = {0};
	int rc = lex_list_dir(base, f, n, &e);

	if (rc == 0 && env && *env) {
		char *copy = strdup(env), *save = NULL, *d;
		if (!copy)
			rc = -1;
		for (d = copy ? strtok_r(copy, ":", &save) : NULL; d && rc == 0;
		     d = strtok_r(NULL, ":", &save))
			rc = is_dir(d) ? lex_list_dir(d, f, n, &e) : -1;
		free(copy);
	}
	for (int i = 0; i < o->nextra && rc == 0; i++)
		rc = is_dir(o->extra[i]) ? lex_list_dir(o->extra[i], f, n, &e) : -1;
	buf_free(&e);
	return rc;
}

lexicon *setup_lexicon(const setup_opts *o, tm_buf *err)
{
	const char *base = o->base ? o->base : setup_base_dir();
	const char *env = getenv("TITLEMILL_LEXICONS");
	lexicon *lx;

	if (!base) {
		buf_puts(err, "no lexicon folder found (looked beside the binary, in "
			 TM_LEXDIR "; set TITLEMILL_LEXDIR)");
		return NULL;
	}
	if (!is_dir(base)) {
		buf_puts(err, base);
		buf_puts(err, ": not a lexicon folder");
		return NULL;
	}
	if (lc_enabled()) {
		lex_file *f = NULL;
		size_t n = 0;
		int r = list_all(base, env, o, &f, &n) == 0 ? lc_build(f, n, &lx, err) : 1;
		lex_files_free(f, n);
		if (r < 0)
			return NULL;
		if (r == 0)
			goto labels;
		buf_reset(err);
	}
	if (!(lx = lex_new())) {
		buf_puts(err, "out of memory");
		return NULL;
	}
	if (lex_load_dir(lx, base, err) != 0)
		goto fail;
	if (env && *env) {
		char *copy = strdup(env), *save = NULL, *d;
		if (!copy)
			goto fail;
		for (d = strtok_r(copy, ":", &save); d; d = strtok_r(NULL, ":", &save)) {
			if (!is_dir(d)) {
				buf_reset(err);
				buf_puts(err, d);
				buf_puts(err, ": not a folder (from TITLEMILL_LEXICONS)");
				free(copy);
				goto fail;
			}
			if (lex_load_dir(lx, d, err) != 0) {
				free(copy);
				goto fail;
			}
		}
		free(copy);
	}
	for (int i = 0; i < o->nextra; i++) {
		if (!is_dir(o->extra[i])) {
			buf_reset(err);
			buf_puts(err, o->extra[i]);
			buf_puts(err, ": not a folder");
			goto fail;
		}
		if (lex_load_dir(lx, o->extra[i], err) != 0)
			goto fail;
	}
labels:
	/* (when memory runs out the endings are read from the trie) */
	(void)lex_freeze(lx);
	if (o->labels && add_labels(lx, o->labels, err) != 0)
		goto fail;
	return lx;
fail:
	lex_free(lx);
	return NULL;
}

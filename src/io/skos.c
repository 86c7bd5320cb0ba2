/* skos.c - SKOS labels through serd. */
#include "io/skos.h"

#include <serd/serd.h>
#include <errno.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "io/fieldcheck.h"

#define SKOS "http://www.w3.org/2004/02/skos/core#"

/* The byte filter between the file and serd.  serd's Turtle reader
 * recurses once per "[" and "(" and keeps a whole literal in memory, so
 * every byte passes a small state machine first (linear, no look-ahead):
 * it tracks strings (short and long, both quotes, escapes), IRIs,
 * comments and escapes in names, and counts the lines; it refuses the
 * SKOS_MAX_DEPTH + 1-th open bracket before serd sees it, and it drops
 * the bytes of a literal beyond SKOS_MAX_LABEL (serd then reads a cut
 * literal, which on_statement skips and counts). */
enum { S_OUT, S_Q1, S_Q2, S_SHORT, S_LONG, S_IRI, S_COMMENT };

typedef struct rd {
	SerdEnv *env;
	skos_label_fn fn;
	skos_broader_fn broader; /* set: skos:broader is read, labels are not */
	void *ctx;
	tm_buf *err;
	const char *path;
	skos_skipped *sk;
	int failed;
	size_t statements;
	/* the filter */
	FILE *f;
	long line;          /* 1 + newlines read from the file */
	int state, q, esc;  /* q: the quote of the string; esc: after "\" */
	int qrun;           /* quotes in a row inside a long string */
	int swallow;        /* dropping the rest of an over-long literal */
	int cut;            /* the last literal read was cut */
	int pending;        /* closing quotes still to hand over */
	size_t litlen, depth;
} rd;

static void refuse(rd *r, const char *what)
{
	tm_failf(r->err, TM_EINPUT, "%s:%ld: %s", r->path, r->line, what);
	r->failed = 1;
}

/* Feeds byte c through the state machine: 1 when serd gets it, 0 when it
 * is dropped, -1 when the file is refused here. */
static int filter(rd *r, int c)
{
	switch (r->state) {
	case S_OUT:
		if (r->esc) {
			r->esc = 0; /* an escaped character of a name: ex:a\( ex:a\' */
		} else if (c == '"' || c == '\'') {
			r->state = S_Q1;
			r->q = c;
		} else if (c == '<') {
			r->state = S_IRI;
		} else if (c == '#') {
			r->state = S_COMMENT;
		} else if (c == '\\') {
			r->esc = 1;
		} else if (c == '[' || c == '(') {
			if (++r->depth > SKOS_MAX_DEPTH) {
				char m[120];
				snprintf(m, sizeof m, "brackets nested deeper than %d", SKOS_MAX_DEPTH);
				refuse(r, m);
				return -1;
			}
		} else if ((c == ']' || c == ')') && r->depth) {
			r->depth--;
		}
		return 1;
	case S_Q1: /* one quote: a long string, an empty one or a short one */
		if (c == r->q) {
			r->state = S_Q2;
			return 1;
		}
		r->state = S_SHORT;
		r->litlen = 0;
		r->esc = 0;
		r->swallow = 0;
		r->cut = 0;
		return filter(r, c);
	case S_Q2:
		if (c == r->q) {
			r->state = S_LONG;
			r->litlen = 0;
			r->esc = 0;
			r->qrun = 0;
			r->swallow = 0;
			r->cut = 0;
			return 1;
		}
		r->state = S_OUT; /* "" */
		r->cut = 0;
		return filter(r, c);
	case S_SHORT:
	case S_LONG: {
		int end = 0, keep, was_esc = r->esc;
		if (r->esc) {
			r->esc = 0;
		} else if (c == '\\') {
			r->esc = 1;
		} else if (c == r->q) {
			end = r->state == S_SHORT || ++r->qrun == 3;
		} else if (c == '\n' && r->state == S_SHORT) {
			end = 1; /* a syntax error: serd says so */
		}
		if (c != r->q)
			r->qrun = 0;
		if (!end && !r->swallow && r->litlen >= SKOS_MAX_LABEL && c != r->q &&
		    (c & 0xC0) != 0x80 && !was_esc)
			r->swallow = r->cut = 1; /* at a character, not inside an escape */
		if (end) {
			r->state = S_OUT;
			r->esc = 0;
			if (r->swallow && r->qrun == 3) {
				/* the two quotes before were dropped: serd gets the
				 * three closing quotes only now */
				r->swallow = 0;
				return 3;
			}
			r->swallow = 0;
			return 1;
		}
		keep = !r->swallow;
		r->litlen += keep;
		return keep;
	}
	case S_IRI:
		if (c == '>' || c == '\n')
			r->state = S_OUT;
		return 1;
	default: /* S_COMMENT */
		if (c == '\n' || c == '\r')
			r->state = S_OUT;
		return 1;
	}
}

/* serd's source: one byte per call (page size 1), so that the line count
 * above is the line serd is reading when it hands over a statement. */
static size_t source(void *buf, size_t size, size_t nmemb, void *h)
{
	rd *r = h;
	(void)size;
	(void)nmemb;
	if (r->pending) {
		*(char *)buf = (char)r->q;
		r->pending--;
		return 1;
	}
	for (;;) {
		int c = getc(r->f), k;
		if (c == EOF || r->failed)
			return 0;
		if (c == '\n')
			r->line++; /* the file's lines, dropped bytes too */
		k = filter(r, c);
		if (k < 0)
			return 0;
		if (k == 0)
			continue;
		r->pending = k - 1; /* closing quotes held back while dropping */
		*(char *)buf = (char)c;
		return 1;
	}
}

static int source_error(void *h)
{
	rd *r = h;
	return ferror(r->f);
}

static SerdStatus on_base(void *h, const SerdNode *uri)
{
	rd *r = h;
	return serd_env_set_base_uri(r->env, uri);
}

static SerdStatus on_prefix(void *h, const SerdNode *name, const SerdNode *uri)
{
	rd *r = h;
	return serd_env_set_prefix(r->env, name, uri);
}

static void skipped(long *n, long *first, long line)
{
	if (!(*n)++)
		*first = line;
}

/* A skos:broader (or skos:narrower, turned round) statement between two
 * IRIs, to r->broader. */
static SerdStatus on_broader(rd *r, const SerdNode *subject, const SerdNode *predicate,
			     const SerdNode *object)
{
	SerdStatus st = SERD_SUCCESS;
	if ((subject->type != SERD_URI && subject->type != SERD_CURIE) ||
	    (object->type != SERD_URI && object->type != SERD_CURIE))
		return SERD_SUCCESS;
	SerdNode p = serd_env_expand_node(r->env, predicate);
	int broader = p.buf && !strcmp((const char *)p.buf, SKOS "broader");
	int narrower = p.buf && !strcmp((const char *)p.buf, SKOS "narrower");
	serd_node_free(&p);
	if (!broader && !narrower)
		return SERD_SUCCESS;
	SerdNode s = serd_env_expand_node(r->env, subject), o = serd_env_expand_node(r->env, object);
	const SerdNode *sub = s.buf ? &s : subject, *obj = o.buf ? &o : object;
	if (narrower) { /* G skos:narrower C is C skos:broader G */
		const SerdNode *t = sub;
		sub = obj;
		obj = t;
	}
	if (r->broader(r->ctx, (const char *)sub->buf, sub->n_bytes, (const char *)obj->buf,
		       obj->n_bytes) != 0) {
		r->failed = 1;
		st = SERD_FAILURE;
	}
	serd_node_free(&s);
	serd_node_free(&o);
	return st;
}

static SerdStatus on_statement(void *h, SerdStatementFlags flags, const SerdNode *graph,
			       const SerdNode *subject, const SerdNode *predicate,
			       const SerdNode *object, const SerdNode *datatype,
			       const SerdNode *lang)
{
	rd *r = h;
	SerdNode p, s;
	char kind = 0;
	SerdStatus st = SERD_SUCCESS;
	int cut = r->cut;
	(void)flags;
	(void)graph;
	(void)datatype;
	r->statements++;

	if (object->type == SERD_LITERAL)
		r->cut = 0; /* this statement's literal was the last one read */
	if (r->broader)
		return on_broader(r, subject, predicate, object);
	if (object->type != SERD_LITERAL || !lang || !lang->n_bytes)
		return SERD_SUCCESS;
	p = serd_env_expand_node(r->env, predicate);
	if (p.buf) {
		const char *u = (const char *)p.buf;
		if (!strcmp(u, SKOS "prefLabel"))
			kind = 'p';
		else if (!strcmp(u, SKOS "altLabel"))
			kind = 'a';
		else if (!strcmp(u, SKOS "hiddenLabel"))
			kind = 'h';
	}
	serd_node_free(&p);
	if (!kind)
		return SERD_SUCCESS;
	if (cut) {
		skipped(&r->sk->toolong, &r->sk->toolong_line, r->line);
		return SERD_SUCCESS;
	}
	if (subject->type == SERD_BLANK) {
		/* a concept without an IRI cannot be an occupation */
		skipped(&r->sk->blank, &r->sk->blank_line, r->line);
		return SERD_SUCCESS;
	}
	/* prefixed names expanded; relative IRIs resolved against @base or
	 * the file's own location */
	s = serd_env_expand_node(r->env, subject);
	const SerdNode *sub = s.buf ? &s : subject;
	if (r->fn(r->ctx, (const char *)sub->buf, sub->n_bytes, kind, (const char *)lang->buf,
		  lang->n_bytes, (const char *)object->buf, object->n_bytes) != 0) {
		r->failed = 1;
		st = SERD_FAILURE;
	}
	serd_node_free(&s);
	return st;
}

static SerdStatus on_error(void *h, const SerdError *e)
{
	rd *r = h;
	char msg[300], full[700];
	va_list ap;
	va_copy(ap, *e->args);
	vsnprintf(msg, sizeof msg, e->fmt, ap);
	va_end(ap);
	size_t n = strlen(msg);
	while (n && (msg[n - 1] == '\n' || msg[n - 1] == ' '))
		msg[--n] = 0;
	snprintf(full, sizeof full, "%s:%u:%u: %s", r->path, e->line, e->col, msg);
	if (!r->err->len) {
		buf_reset(r->err);
		buf_puts(r->err, full);
	}
	r->failed = 1;
	return SERD_SUCCESS;
}

/* The file's own location as the base IRI (file:///...), when it can be
 * named; @base in the file replaces it. */
static void set_file_base(rd *r)
{
	tm_buf abs = {0};
	char cwd[4096];
	if (r->path[0] != '/') {
		if (!getcwd(cwd, sizeof cwd))
			return;
		buf_puts(&abs, cwd);
		if (abs.len && abs.data[abs.len - 1] != '/')
			buf_putc(&abs, '/');
	}
	if (buf_puts(&abs, r->path) == 0) {
		SerdNode base = serd_node_new_file_uri((const uint8_t *)abs.data, NULL, NULL, true);
		if (base.buf)
			serd_env_set_base_uri(r->env, &base);
		serd_node_free(&base);
	}
	buf_free(&abs);
}

int skos_read(const char *path, skos_label_fn fn, void *ctx, skos_skipped *sk, tm_buf *err)
{
	size_t n;
	return skos_read_count(path, fn, ctx, sk, &n, err);
}

static int read_file(const char *path, skos_label_fn fn, skos_broader_fn broader, void *ctx,
		     skos_skipped *sk, size_t *statements, tm_buf *err);

int skos_read_count(const char *path, skos_label_fn fn, void *ctx, skos_skipped *sk,
		    size_t *statements, tm_buf *err)
{
	return read_file(path, fn, NULL, ctx, sk, statements, err);
}

int skos_is_rdf_path(const char *path)
{
	size_t n = strlen(path);
	return (n > 4 && !strcmp(path + n - 4, ".ttl")) || (n > 3 && !strcmp(path + n - 3, ".nt")) ||
	       (n > 7 && !strcmp(path + n - 7, ".turtle"));
}

int skos_read_broader(const char *path, skos_broader_fn fn, void *ctx, tm_buf *err)
{
	size_t n;
	return read_file(path, NULL, fn, ctx, NULL, &n, err);
}

static int read_file(const char *path, skos_label_fn fn, skos_broader_fn broader, void *ctx,
		     skos_skipped *sk, size_t *statements, tm_buf *err)
{
	size_t n = strlen(path);
	SerdSyntax syn = n > 3 && !strcmp(path + n - 3, ".nt") ? SERD_NTRIPLES : SERD_TURTLE;
	rd r = {0};
	SerdReader *reader;
	SerdStatus st;
	skos_skipped none;

	*statements = 0;
	buf_reset(err);
	memset(sk ? sk : &none, 0, sizeof none);
	r.sk = sk ? sk : &none;
	r.f = fopen(path, "rb");
	if (!r.f) {
		return tm_failf(err, TM_EFAIL, "%s: %s", path, strerror(errno));
	}
	r.line = 1;
	r.env = serd_env_new(NULL);
	r.fn = fn;
	r.broader = broader;
	r.ctx = ctx;
	r.err = err;
	r.path = path;
	reader = serd_reader_new(syn, &r, NULL, on_base, on_prefix, on_statement, NULL);
	if (!reader || !r.env) {
		tm_fail(err, TM_ENOMEM, NULL, "out of memory", NULL);
		serd_reader_free(reader);
		serd_env_free(r.env);
		fclose(r.f);
		return -1;
	}
	set_file_base(&r);
	serd_reader_set_strict(reader, true);
	serd_reader_set_error_sink(reader, on_error, &r);
	st = serd_reader_read_source(reader, source, source_error, &r,
				     (const uint8_t *)path, 1);
	serd_reader_free(reader);
	serd_env_free(r.env);
	*statements = r.statements;
	if (ferror(r.f) && !r.failed) {
		tm_failf(err, TM_EFAIL, "%s: cannot be read", path);
		r.failed = 1;
	}
	fclose(r.f);
	if (st != SERD_SUCCESS || r.failed) {
		if (!err->len)
			tm_failf(err, TM_EFAIL, "%s: %s", path,
				 st == SERD_ERR_UNKNOWN ? "cannot be read" : (const char *)serd_strerror(st));
		return -1;
	}
	return 0;
}

/* ---- writing ---- */

struct skos_writer {
	SerdEnv *env;
	SerdWriter *w;
	tm_buf *out;
	int failed;
};

static size_t sink(const void *p, size_t n, void *h)
{
	skos_writer *sw = h;
	if (buf_append(sw->out, p, n)) {
		sw->failed = 1;
		return 0;
	}
	return n;
}

skos_writer *skos_writer_new(tm_buf *out, int ntriples)
{
	skos_writer *sw = calloc(1, sizeof *sw);
	if (!sw)
		return NULL;
	sw->out = out;
	sw->env = serd_env_new(NULL);
	if (!sw->env) {
		free(sw);
		return NULL;
	}
	sw->w = serd_writer_new(ntriples ? SERD_NTRIPLES : SERD_TURTLE,
				ntriples ? (SerdStyle)0
					 : (SerdStyle)(SERD_STYLE_ABBREVIATED | SERD_STYLE_CURIED),
				sw->env, NULL, sink, sw);
	if (!sw->w) {
		serd_env_free(sw->env);
		free(sw);
		return NULL;
	}
	if (!ntriples) {
		SerdNode name = serd_node_from_string(SERD_LITERAL, (const uint8_t *)"skos");
		SerdNode uri = serd_node_from_string(SERD_URI, (const uint8_t *)SKOS);
		serd_env_set_prefix(sw->env, &name, &uri);
		serd_writer_set_prefix(sw->w, &name, &uri);
	}
	return sw;
}

int skos_write_label(skos_writer *sw, const char *iri, char kind, const char *lang,
		     const char *text)
{
	const char *pred = kind == 'p' ? SKOS "prefLabel" : kind == 'a' ? SKOS "altLabel"
									: SKOS "hiddenLabel";
	char why[FC_WHY];
	/* serd writes a language tag and an IRI's characters as they come:
	 * what could end the statement early is refused here */
	if (fc_lang(lang, strlen(lang), why) || fc_occupation(iri, strlen(iri), why) ||
	    fc_text(text, strlen(text), (size_t)-1, why))
		return -1;
	SerdNode s = serd_node_from_string(SERD_URI, (const uint8_t *)iri);
	SerdNode p = serd_node_from_string(SERD_URI, (const uint8_t *)pred);
	SerdNode o = serd_node_from_string(SERD_LITERAL, (const uint8_t *)text);
	/* always a short string with its quotes escaped: serd 0.30 writes a
	 * label holding a quote as a long string, and its own reader refuses
	 * a long string in which a quote meets an escape (a label ending in
	 * two quotes is written """a"\"""" and read no more) */
	o.flags = 0;
	SerdNode l = serd_node_from_string(SERD_LITERAL, (const uint8_t *)lang);
	if (serd_writer_write_statement(sw->w, 0, NULL, &s, &p, &o, NULL, &l) || sw->failed)
		return -1;
	return 0;
}

int skos_write_comment(skos_writer *sw, const char *text)
{
	char why[FC_WHY];
	/* a comment ends at the line's end: one inside would start a statement */
	if (fc_text(text, strlen(text), (size_t)-1, why))
		return -1;
	/* serd 0.30 has no comment call: close the pending statement first */
	serd_writer_finish(sw->w);
	return buf_puts(sw->out, "# ") || buf_puts(sw->out, text) || buf_putc(sw->out, '\n') ? -1 : 0;
}

int skos_writer_end(skos_writer *sw)
{
	int rc;
	if (!sw)
		return 0;
	serd_writer_finish(sw->w);
	rc = sw->failed ? -1 : 0;
	serd_writer_free(sw->w);
	serd_env_free(sw->env);
	free(sw);
	return rc;
}

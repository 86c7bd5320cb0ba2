/* skos.c - SKOS labels through serd. */
#include "skos.h"

#include <serd/serd.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "fieldcheck.h"

#define SKOS "http://www.w3.org/2004/02/skos/core#"

typedef struct rd {
	SerdEnv *env;
	skos_label_fn fn;
	void *ctx;
	tm_buf *err;
	const char *path;
	int failed;
	size_t statements;
} rd;

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

static SerdStatus on_statement(void *h, SerdStatementFlags flags, const SerdNode *graph,
			       const SerdNode *subject, const SerdNode *predicate,
			       const SerdNode *object, const SerdNode *datatype,
			       const SerdNode *lang)
{
	rd *r = h;
	SerdNode p, s;
	char kind = 0;
	SerdStatus st = SERD_SUCCESS;
	(void)flags;
	(void)graph;
	(void)datatype;
	r->statements++;

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

int skos_read(const char *path, skos_label_fn fn, void *ctx, tm_buf *err)
{
	size_t n;
	return skos_read_count(path, fn, ctx, &n, err);
}

int skos_read_count(const char *path, skos_label_fn fn, void *ctx, size_t *statements,
		    tm_buf *err)
{
	size_t n = strlen(path);
	SerdSyntax syn = n > 3 && !strcmp(path + n - 3, ".nt") ? SERD_NTRIPLES : SERD_TURTLE;
	rd r = {0};
	SerdReader *reader;
	SerdStatus st;

	*statements = 0;
	buf_reset(err);
	r.env = serd_env_new(NULL);
	r.fn = fn;
	r.ctx = ctx;
	r.err = err;
	r.path = path;
	reader = serd_reader_new(syn, &r, NULL, on_base, on_prefix, on_statement, NULL);
	if (!reader || !r.env) {
		buf_puts(err, "out of memory");
		serd_reader_free(reader);
		serd_env_free(r.env);
		return -1;
	}
	serd_reader_set_strict(reader, true);
	serd_reader_set_error_sink(reader, on_error, &r);
	st = serd_reader_read_file(reader, (const uint8_t *)path);
	serd_reader_free(reader);
	serd_env_free(r.env);
	*statements = r.statements;
	if (st != SERD_SUCCESS || r.failed) {
		if (!err->len) {
			char m[600];
			snprintf(m, sizeof m, "%s: %s", path,
				 st == SERD_ERR_UNKNOWN ? "cannot be read" : (const char *)serd_strerror(st));
			buf_puts(err, m);
		}
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

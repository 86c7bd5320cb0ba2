/* libFuzzer target: the labels readers.  The first byte of the input
 * chooses the format (0 mod 3: a labels TSV, 1: Turtle, 2: N-Triples);
 * the rest is written to a file with the matching extension and read
 * with labels_read, which sends SKOS files through skos.c.
 *
 * Checks what holds for every input: a refusal says why and names the
 * file; an accepted labelset has, for every label, a kind of pref, alt or
 * hidden, a primary language subtag of 2-3 lowercase letters, an
 * occupation and a key that are not empty, occupation, text and key in
 * valid UTF-8 without NUL bytes, a key without TAB, newline or edge
 * spaces; every label is found again through the index; and reading the
 * same file twice gives the same labels.  (A key is not always its own
 * key: the fold drops combining marks, so "w#" + U+0301 + "rgd" keys as
 * "w#rgd", which the tokeniser then reads as "w" and a hashtag; nothing
 * keys a key again, and tests/cases/invariants.sh does not ask it of
 * random bytes either.) */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "io/decode.h"
#include "rank/labels.h"
#include "norm/setup.h"

int LLVMFuzzerInitialize(int *argc, char ***argv);
int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static lexicon *LX;
static normaliser *NM;
static FILE *WARN;
static char paths[3][64];

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
	setup_opts o;
	tm_buf err = {0};
	static const char *ext[3] = {"tsv", "ttl", "nt"};
	(void)argc;
	(void)argv;
	memset(&o, 0, sizeof o);
	o.base = getenv("TITLEMILL_LEXDIR");
	LX = setup_lexicon(&o, &err);
	if (!LX) {
		fprintf(stderr, "fuzz_labels: %.*s\n", (int)err.len, err.data);
		abort();
	}
	NM = norm_new(LX);
	WARN = fopen("/dev/null", "w");
	if (!NM || !WARN)
		abort();
	for (int i = 0; i < 3; i++)
		snprintf(paths[i], sizeof paths[i], "/dev/shm/tm-fuzz-l-%ld.%s", (long)getpid(),
			 ext[i]);
	buf_free(&err);
	return 0;
}

/* valid UTF-8 and no NUL byte */
static int clean(const char *s, size_t n)
{
	return dec_is_utf8(s, n) && !memchr(s, 0, n);
}

static void check_label(const labelset *ls, const label *lb)
{
	const char *occ = lab_str(ls, lb->occ), *text = lab_str(ls, lb->text),
		   *key = lab_str(ls, lb->key);
	size_t nl = strlen(lb->lang);

	if (lb->kind != 'p' && lb->kind != 'a' && lb->kind != 'h')
		abort();
	if (nl < 2 || nl > 3)
		abort();
	for (size_t i = 0; i < nl; i++)
		if (lb->lang[i] < 'a' || lb->lang[i] > 'z')
			abort();
	if (!lb->occlen || !lb->keylen)
		abort();
	if (!clean(occ, lb->occlen) || !clean(text, lb->textlen) || !clean(key, lb->keylen)) {
		fprintf(stderr, "label of line %ld: not valid UTF-8 or with a NUL byte\n", lb->line);
		abort();
	}
	if (memchr(key, '\t', lb->keylen) || memchr(key, '\n', lb->keylen) || key[0] == ' ' ||
	    key[lb->keylen - 1] == ' ')
		abort();
	const label *f = labels_find(ls, occ, lb->occlen, lb->lang, key, lb->keylen);
	if (!f || f->occlen != lb->occlen || memcmp(lab_str(ls, f->occ), occ, lb->occlen) ||
	    f->keylen != lb->keylen || memcmp(lab_str(ls, f->key), key, lb->keylen) ||
	    strcmp(f->lang, lb->lang))
		abort();
	if (labels_count(ls, occ, lb->occlen, lb->lang) < 1)
		abort();
	if (lb->kind == 'p' && !labels_is_pref(ls, occ, lb->occlen, lb->lang, key, lb->keylen))
		abort();
}

static int same(const labelset *a, const labelset *b)
{
	if (a->n != b->n || a->empty != b->empty || a->collisions != b->collisions)
		return 0;
	for (size_t i = 0; i < a->n; i++) {
		const label *x = &a->v[i], *y = &b->v[i];
		if (x->kind != y->kind || strcmp(x->lang, y->lang) || x->line != y->line ||
		    x->occlen != y->occlen || x->textlen != y->textlen || x->keylen != y->keylen ||
		    memcmp(lab_str(a, x->occ), lab_str(b, y->occ), x->occlen) ||
		    memcmp(lab_str(a, x->text), lab_str(b, y->text), x->textlen) ||
		    memcmp(lab_str(a, x->key), lab_str(b, y->key), x->keylen))
			return 0;
	}
	return 1;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	labelset ls, ls2;
	tm_buf err = {0}, err2 = {0};
	const char *path;
	FILE *fp;
	int r, r2;

	if (!size || size > 65536)
		return 0;
	path = paths[data[0] % 3];
	fp = fopen(path, "wb");
	if (!fp)
		abort();
	fwrite(data + 1, 1, size - 1, fp);
	fclose(fp);

	r = labels_read(&ls, path, NM, WARN, &err);
	if (r != 0 && r != -1)
		abort();
	if (r != 0) {
		/* a refusal always says why, naming the file */
		if (!err.len || !strstr(err.data, path)) {
			fprintf(stderr, "refusal without a message naming the file: [%.*s]\n",
				(int)err.len, err.data ? err.data : "");
			abort();
		}
	} else {
		for (size_t i = 0; i < ls.n; i++)
			check_label(&ls, &ls.v[i]);
	}
	/* the same file read again gives the same verdict and labels */
	r2 = labels_read(&ls2, path, NM, WARN, &err2);
	if (r2 != r || (r == 0 && !same(&ls, &ls2)))
		abort();
	labels_free(&ls);
	labels_free(&ls2);
	buf_free(&err);
	buf_free(&err2);
	return 0;
}

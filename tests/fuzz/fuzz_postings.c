/* libFuzzer target: the postings readers (TSV and JSON Lines, the format
 * chosen by the first byte of the input) and, through them, the memory
 * engine.  Checks that every row is a posting, a malformed row with a
 * message naming file and line, or the end; that postings have a title
 * and an occupation, and occupations no control character and no
 * invalid UTF-8; and that the counts table written for them reads
 * back to the same bytes. */
#define _GNU_SOURCE
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "io/decode.h"
#include "io/postings.h"
#include "count/tally.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static char path[64], path2[64];

static char *table(tally_mem *m, size_t *len)
{
	char *buf = NULL;
	FILE *fp = open_memstream(&buf, len);
	if (tm_write(m, fp) != 0)
		abort();
	fclose(fp);
	return buf;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	postings_reader pr;
	posting p;
	tally_mem m, m2;
	tm_buf err = {0};
	FILE *fp;
	int r;

	if (!path[0]) {
		snprintf(path, sizeof path, "/dev/shm/tm-fuzz-p-%ld", (long)getpid());
		snprintf(path2, sizeof path2, "/dev/shm/tm-fuzz-c-%ld", (long)getpid());
	}
	fp = fopen(path, "wb");
	fwrite(data, 1, size, fp);
	fclose(fp);
	tm_init(&m);
	if (pr_open(&pr, path, PR_AUTO) == 0) {
		pr_row row;
		while ((r = pr_next(&pr, &p, &row)) == 0 && row != PR_END) {
			if (row == PR_SKIP) {
				if (!pr.err.len || !memmem(pr.err.data, pr.err.len, path, strlen(path)))
					abort();
				continue;
			}
			if (row != PR_POSTING || !p.titlelen || !p.nocc)
				abort();
			/* count the posting with its raw title as its key */
			/* (titles reach the engine cleaned: UTF-8, no controls) */
			int bad = !dec_is_utf8(p.title, p.titlelen);
			for (size_t i = 0; i < p.titlelen; i++)
				if ((unsigned char)p.title[i] < 0x20 || p.title[i] == 0x7F)
					bad = 1;
			/* the reader refuses occupations with controls or
			 * invalid UTF-8: they would break the counts table */
			for (size_t k = 0; k < p.nocc; k++) {
				for (size_t i = 0; i < p.occlen[k]; i++)
					if ((unsigned char)p.occ[k][i] < 0x20 || p.occ[k][i] == 0x7F)
						abort();
				if (!dec_is_utf8(p.occ[k], p.occlen[k]))
					abort();
			}
			if (bad)
				continue;
			tally_posting tp = {0};
			tp.id = p.id;
			tp.idlen = p.idlen;
			tp.lang = p.lang;
			tp.key = p.title;
			tp.keylen = p.titlelen;
			tp.title = p.title;
			tp.titlelen = p.titlelen;
			tp.example = p.title;
			tp.examplelen = p.titlelen;
			tp.occ = p.occ;
			tp.occlen = p.occlen;
			tp.nocc = p.nocc;
			if (tm_add(&m, &tp) < 0)
				abort();
		}
	}
	pr_close(&pr);
	/* the table reads back to itself */
	size_t l1, l2;
	char *t1 = table(&m, &l1);
	fp = fopen(path2, "wb");
	fwrite(t1, 1, l1, fp);
	fclose(fp);
	tm_init(&m2);
	if (tm_read(&m2, path2, &err) != 0) {
		fprintf(stderr, "%.*s\n", (int)err.len, err.data);
		abort();
	}
	char *t2 = table(&m2, &l2);
	if (l1 != l2 || memcmp(t1, t2, l1))
		abort();
	free(t1);
	free(t2);
	tm_free(&m);
	tm_free(&m2);
	buf_free(&err);
	return 0;
}

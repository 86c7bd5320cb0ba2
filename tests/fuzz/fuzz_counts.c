/* libFuzzer target: the counts-table reader.  Arbitrary bytes are read as
 * a counts table; when they are accepted, the table written from them
 * reads back to the same bytes. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "count/tally.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static char path[64];

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	tally_mem m, m2;
	tm_buf err = {0};
	FILE *fp;

	if (!path[0])
		snprintf(path, sizeof path, "/dev/shm/tm-fuzz-k-%ld", (long)getpid());
	fp = fopen(path, "wb");
	fwrite(data, 1, size, fp);
	fclose(fp);
	tm_init(&m);
	if (tm_read(&m, path, &err) == 0) {
		char *t1 = NULL, *t2 = NULL;
		size_t l1, l2;
		fp = open_memstream(&t1, &l1);
		if (tm_write(&m, fp) != 0)
			abort();
		fclose(fp);
		fp = fopen(path, "wb");
		fwrite(t1, 1, l1, fp);
		fclose(fp);
		tm_init(&m2);
		if (tm_read(&m2, path, &err) != 0)
			abort();
		fp = open_memstream(&t2, &l2);
		tm_write(&m2, fp);
		fclose(fp);
		if (l1 != l2 || memcmp(t1, t2, l1))
			abort();
		free(t1);
		free(t2);
		tm_free(&m2);
	} else if (!err.len) {
		abort(); /* a refusal always says why */
	}
	tm_free(&m);
	buf_free(&err);
	return 0;
}

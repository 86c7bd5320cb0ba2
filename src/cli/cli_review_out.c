/* cli_review_out.c - what the subcommands of `titlemill review` share
 * for their messages and output (cli_review.h). */
#include <stdio.h>
#include <string.h>

#include "cli/cli.h"
#include "cli/cli_review.h"

int rv_usage_error(const char *what, const char *detail)
{
	fprintf(stderr, "titlemill review: %s%s\ntitlemill review: 'titlemill review --help' lists the "
			"subcommands, 'titlemill review SUBCOMMAND --help' their options\n",
		what, detail ? detail : "");
	return EXIT_USAGE;
}

/* A name from a list, or -1. */
int rv_pick(const char *const *names, int n, const char *s)
{
	for (int i = 0; i < n; i++)
		if (!strcmp(names[i], s))
			return i;
	return -1;
}

int rv_fail(const char *m)
{
	fprintf(stderr, "titlemill review: %s\n", m);
	return EXIT_RUNTIME;
}

int rv_flush(tm_buf *b, FILE *fp)
{
	if (buf_status(b))
		return TM_ENOMEM; /* never a part of what was to be written */
	if (b->len && fwrite(b->data, 1, b->len, fp) != b->len)
		return TM_EFAIL;
	buf_reset(b);
	return TM_OK;
}

int rv_finish(tm_buf *b)
{
	int rc = rv_flush(b, stdout);
	buf_free(b);
	if (rc == TM_ENOMEM)
		return rv_fail("out of memory: the output is incomplete");
	return rv_finish_stdout();
}

int rv_finish_stdout(void)
{
	if (fflush(stdout) != 0 || ferror(stdout))
		return rv_fail("cannot write the output"), EXIT_RUNTIME;
	return EXIT_OK;
}

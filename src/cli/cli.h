/* cli.h - the subcommands.  Each returns the process exit status: 0 on
 * success, 1 on a runtime failure, 2 on a usage error. */
#ifndef TM_CLI_H
#define TM_CLI_H

#include "rank/inputs.h"
#include "norm/norm.h"
#include "cli/options.h"
#include "io/postings.h"
#include "count/tally.h"

enum { EXIT_OK = 0, EXIT_RUNTIME = 1, EXIT_USAGE = 2 };

/* Writes out to standard output and flushes: 0, or -1 after saying on
 * standard error, as "titlemill CMD: write error: ...", why not. */
int cli_write_stdout(const char *cmd, const tm_buf *out);

/* The options every ranking command (coverage, propose) takes. */
typedef struct rank_opts {
	const char *store, *prefix;
	setup_opts setup;   /* the lexicons, and the labels (setup.labels) */
} rank_opts;

/* The start of a ranking command: parses argv by cmd into o (whose
 * rank_opts is ro), checks that --labels and counts (files or --store)
 * are given, and loads them into in.  Returns 1 to run; 0 to stop with
 * *status the exit status (after --help, a misuse, or a failed load,
 * each said on its stream).  in is for inputs_free whenever loading
 * began (*status EXIT_RUNTIME or 1 returned). */
int cli_rank_start(const opt_cmd *cmd, void *o, const rank_opts *ro, int argc, char **argv,
		   rank_inputs *in, int *status);

int cmd_norm(int argc, char **argv);
int cmd_tally(int argc, char **argv);
int cmd_counts(int argc, char **argv);
int cmd_coverage(int argc, char **argv);
int cmd_propose(int argc, char **argv);
int cmd_match(int argc, char **argv);
int cmd_labels(int argc, char **argv);
int cmd_review(int argc, char **argv);

#endif

/* cli.h - the subcommands.  Each returns the process exit status: 0 on
 * success, 1 on a runtime failure, 2 on a usage error. */
#ifndef TM_CLI_H
#define TM_CLI_H

enum { EXIT_OK = 0, EXIT_RUNTIME = 1, EXIT_USAGE = 2 };

int cmd_norm(int argc, char **argv);
int cmd_tally(int argc, char **argv);
int cmd_counts(int argc, char **argv);
int cmd_coverage(int argc, char **argv);
int cmd_propose(int argc, char **argv);
int cmd_labels(int argc, char **argv);

#endif

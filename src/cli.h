/* cli.h - the subcommands.  Each returns the process exit status: 0 on
 * success, 1 on a runtime failure, 2 on a usage error. */
#ifndef TM_CLI_H
#define TM_CLI_H

enum { EXIT_OK = 0, EXIT_RUNTIME = 1, EXIT_USAGE = 2 };

int cmd_norm(int argc, char **argv);

/* Checks a BCP 47 tag and copies its primary subtag, lowercased, into
 * out (4 bytes).  Returns 0, or -1 when the tag is malformed. */
int cli_lang(const char *tag, char out[4]);

#endif

/* options.h - the command line of every command: one table of options
 * per command, the options several commands share, and the defaults.
 *
 * An option is an opt_spec: its long name, the kind of value, where the
 * value goes in the command's options struct (an offset), the name of
 * its argument, its default as text, the range of a number, and its
 * meaning.  The default is written once, in the table: opt_parse sets
 * it by parsing that text as if it had been given, and --help prints it
 * (opt_help).  tests/cli/defaults.sh checks that README.md and
 * titlemill.1 state the defaults that --help prints.
 *
 * Value kinds and the struct member each one fills:
 *   OPT_FLAG    int, counts how often the option is given
 *   OPT_STR     const char *, borrowed from argv
 *   OPT_U64     uint64_t, a whole number in [lo, hi]; with no default,
 *               UINT64_MAX when not given
 *   OPT_REAL    double, a number in [lo, hi]
 *   OPT_LANG    char[4], a BCP 47 tag's language ("" when not given)
 *   OPT_CHOICE  int: 1 + the index of the value in choices, 0 when not
 *               given
 *   OPT_LEXDIR  setup_opts: appends to its extra folders (repeatable)
 *   OPT_PREFIX  const char *, a store key prefix (store_prefix_check)
 *   OPT_STRS    opt_strs: each value given, in order (repeatable),
 *               borrowed from argv
 *   OPT_STORE   const char *, a store URL of a scheme the store knows
 *               (store_url_check)
 *   OPT_PERIOD  int, the kind of period (core/period.h) named by month,
 *               week, day or none
 *   OPT_SPAN    opt_span: a stretch of days written as one period form
 *               (2026-03-01, 2026-W09, 2026-03, 2026-Q1, 2026) or as two
 *               joined by "..", the first to the last day of both
 * A real number's hi of OPT_UNBOUNDED or more means no upper bound
 * (still finite).  Numbers are parsed strictly: the whole argument, no sign on a whole
 * number, within the range. */
#ifndef TM_OPTIONS_H
#define TM_OPTIONS_H

#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "count/store.h"

typedef enum opt_kind {
	OPT_FLAG, OPT_STR, OPT_U64, OPT_REAL, OPT_LANG, OPT_CHOICE, OPT_LEXDIR, OPT_PREFIX,
	OPT_STRS, OPT_STORE, OPT_PERIOD, OPT_SPAN
} opt_kind;

/* A stretch of days (OPT_SPAN): given is 0 when the option was not. */
typedef struct opt_span {
	int given;
	long first, last;
} opt_span;

/* The values of a repeatable option. */
#define OPT_STRS_MAX 256
typedef struct opt_strs {
	const char *v[OPT_STRS_MAX];
	int n;
} opt_strs;

typedef struct opt_spec {
	const char *name;      /* without the leading "--"; NULL ends a table */
	opt_kind kind;
	size_t off;            /* offsetof the member in the options struct */
	const char *arg;       /* the argument in --help: "FILE", "N", "X" */
	const char *def;       /* the default as it would be written; NULL: none */
	double lo, hi;         /* the range of a number */
	const char *help;      /* the meaning, for --help */
	const char *const *choices; /* OPT_CHOICE: the values, NULL-terminated */
	int letter;            /* a one-letter form ('o' for -o), or 0 */
} opt_spec;

typedef struct opt_cmd {
	const char *name;      /* the command, as in "titlemill NAME" */
	const char *synopsis;  /* --help before the options: usage lines and
				* what the command does, ending in a blank line */
	const opt_spec *specs;
	/* NULL, or called before each option given on the command line is
	 * taken: 0 to take it, or OPT_MISUSE after saying why not on
	 * standard error (an option that does not apply here). */
	int (*admit)(const opt_spec *s, void *o);
} opt_cmd;

/* The memory of recent titles the normaliser keeps, in MiB, for every
 * command that cleans titles (0: clean every title afresh). */
#define OPT_MEMO_MIB 16
#define OPT_MEMO_MAX_MIB 4096

#define OPT_STR_(x) #x
#define OPT_XSTR(x) OPT_STR_(x)

/* The options several commands share, with one meaning each. */
#define OPT_SPEC_LABELS(type, m, meaning) \
	{"labels", OPT_STR, offsetof(type, m), "FILE", NULL, 0, 0, meaning, NULL, 0}
#define OPT_SPEC_LEXICONS(type, m) \
	{"lexicons", OPT_LEXDIR, offsetof(type, m), "DIR", NULL, 0, 0, \
	 "read the lexicons in DIR too (repeatable)", NULL, 0}
#define OPT_SPEC_LANG(type, m, meaning) \
	{"lang", OPT_LANG, offsetof(type, m), "L", NULL, 0, 0, meaning, NULL, 0}
#define OPT_SPEC_STORE(type, m, meaning) \
	{"store", OPT_STORE, offsetof(type, m), "URL", NULL, 0, 0, meaning, NULL, 0}
#define OPT_STORE_READ "read the counts of a Redis store (see tally)"
#define OPT_SPEC_PREFIX(type, m) \
	{"prefix", OPT_PREFIX, offsetof(type, m), "P", NULL, 0, 0, \
	 "the store's key prefix (default " STORE_PREFIX_DEFAULT ")", NULL, 0}
#define OPT_SPEC_MEMO(type, m) \
	{"memo", OPT_U64, offsetof(type, m), "MIB", OPT_XSTR(OPT_MEMO_MIB), 0, OPT_MEMO_MAX_MIB, \
	 "remember the results of recent distinct titles in MIB mebibytes " \
	 "(0: clean every title afresh)", NULL, 0}
#define OPT_SPEC_PERIOD(type, m, meaning) \
	{"period", OPT_PERIOD, offsetof(type, m), "P", "month", 0, 0, meaning, NULL, 0}
/* --from and --to: a window of periods (any period form; a period counts
 * when it lies wholly inside) */
#define OPT_SPEC_WINDOW(type, from, to) \
	{"from", OPT_SPAN, offsetof(type, from), "DATE", NULL, 0, 0, \
	 "sum only the periods from the one holding DATE (a day, 2026-W09, 2026-03, " \
	 "2026-Q1 or 2026: its first day) on", NULL, 0}, \
	{"to", OPT_SPAN, offsetof(type, to), "DATE", NULL, 0, 0, \
	 "sum only the periods up to DATE (its last day)", NULL, 0}
#define OPT_SPEC_END {NULL, OPT_FLAG, 0, NULL, NULL, 0, 0, NULL, NULL, 0}

#define OPT_UNBOUNDED 1e300

/* The window of --from and --to in *first..*last (an open end: the
 * widest days there are).  0 when neither was given, 1 when a window
 * applies, -1 after saying on standard error that it is empty. */
int opt_window(const char *cmd, const opt_span *from, const opt_span *to, long *first,
	       long *last);

enum { OPT_RUN, OPT_HELP_SHOWN, OPT_MISUSE };

/* Sets the defaults of cmd's options in o, then reads argv[1..] into o.
 * Returns OPT_RUN with *first the index of the first operand;
 * OPT_HELP_SHOWN after --help / -h printed the help on standard output;
 * OPT_MISUSE after saying on standard error, as "titlemill CMD: --OPT:
 * ...", what is wrong (an unknown or ambiguous option, a value missing
 * or given to a flag: one line that points to --help).  A command
 * returns EXIT_OK, EXIT_USAGE for the last two. */
int opt_parse(const opt_cmd *cmd, void *o, int argc, char **argv, int *first);
/* As opt_parse, for a command whose options a subcommand lists: a misuse
 * points to "titlemill HELP_AS --help" ("review add"). */
int opt_parse_as(const opt_cmd *cmd, const char *help_as, void *o, int argc, char **argv,
		 int *first);

/* The help of cmd: the synopsis, then one line per option with its
 * meaning and its default, then -h, --help. */
void opt_help(const opt_cmd *cmd, FILE *fp);

#endif

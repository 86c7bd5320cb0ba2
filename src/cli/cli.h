/* cli.h - the subcommands.  Each returns the process exit status: 0 on
 * success, 1 on a runtime failure, 2 on a usage error. */
#ifndef TM_CLI_H
#define TM_CLI_H

#include "rank/inputs.h"
#include "norm/norm.h"
#include "cli/options.h"
#include "io/postings.h"
#include "count/series.h"
#include "count/tally.h"
#include "io/record.h"
#include "rank/groups.h"

enum { EXIT_OK = 0, EXIT_RUNTIME = 1, EXIT_USAGE = 2 };

/* The version (the Makefile's VERSION; this only when built without it,
 * as the fuzz targets are). */
#ifndef TM_VERSION
#define TM_VERSION "0.1.0"
#endif

/* Writes out to standard output and flushes: 0, or -1 after saying on
 * standard error, as "titlemill CMD: write error: ...", why not. */
int cli_write_stdout(const char *cmd, const tm_buf *out);

/* The options every ranking command (coverage, propose) takes. */
typedef struct rank_opts {
	const char *store, *prefix;
	setup_opts setup;   /* the lexicons, and the labels (setup.labels) */
	const char *occ;    /* --occupation, or NULL */
	char lang[4];       /* --lang, or "" */
	int ids;            /* --ids: 1 exact, 2 local */
	const char *id_map; /* --id-map FILE, or NULL */
	int strict;         /* --strict: ids that do not match stop the run */
	opt_span from, to;  /* --from, --to: a window of periods */
	int by_period;      /* keep the counts by period too (rank_inputs.s) */
	int period;         /* their kind when by_period (SERIES_AS_READ: as
			     * the tables have them; set before cli_rank_start) */
} rank_opts;

/* --from and --to in the table of a command whose options struct holds
 * its rank_opts as m. */
#define RANK_SPEC_WINDOW(type, m) OPT_SPEC_WINDOW(type, m.from, m.to)

/* --ids, --id-map and --strict, in the table of a command whose options
 * struct holds its rank_opts as m. */
extern const char *const rank_ids_names[];
#define RANK_SPEC_IDS(type, m) \
	{"ids", OPT_CHOICE, offsetof(type, m.ids), "HOW", "exact", 0, 0, \
	 "how the labels' occupation ids meet the postings' codes: exact, or local " \
	 "(the last path segment or fragment of both: http://x/occ/0001 is 0001)", \
	 rank_ids_names, 0}, \
	{"id-map", OPT_STR, offsetof(type, m.id_map), "FILE", NULL, 0, 0, \
	 "a TSV with columns code and concept: read each concept's labels under " \
	 "the postings' code", NULL, 0}, \
	{"strict", OPT_FLAG, offsetof(type, m.strict), NULL, NULL, 0, 0, \
	 "stop (status 1) when fewer than half of the postings' occupations have " \
	 "labels", NULL, 0}

/* The start of a ranking command: parses argv by cmd into o (whose
 * rank_opts is ro), checks that --labels and counts (files or --store)
 * are given, loads them into in and surveys them into sv (inputs.h):
 * it warns when the labels' ids do not meet the postings' codes (and
 * stops under --strict) and when --occupation or --lang match nothing.
 * Returns 1 to run; 0 to stop with *status the exit status (after
 * --help, a misuse, or a failed load, each said on its stream).  in is
 * for inputs_free whenever loading began (*status EXIT_RUNTIME or 1
 * returned). */
int cli_rank_start(const opt_cmd *cmd, void *o, const rank_opts *ro, int argc, char **argv,
		   rank_inputs *in, inputs_survey *sv, int *status);

/* The two windows of time trend compares (trend and report). */
typedef struct cli_windows {
	opt_span before, after, as_of;
} cli_windows;

/* --before, --after and --as-of in the table of a command whose options
 * struct holds its cli_windows as m. */
#define CLI_SPEC_WINDOWS(type, m) \
	{"before", OPT_SPAN, offsetof(type, m.before), "FROM..TO", NULL, 1, 0, \
	 "the earlier window of the trend (any period forms: 2026-01..2026-02, 2025-Q4, " \
	 "2026-W01..2026-W04); not given: the 3 periods before the later window", NULL, 0}, \
	{"after", OPT_SPAN, offsetof(type, m.after), "FROM..TO", NULL, 1, 0, \
	 "the later window; not given: the latest complete period (one that ended before " \
	 "--as-of)", NULL, 0}, \
	{"as-of", OPT_SPAN, offsetof(type, m.as_of), "DATE", NULL, 0, 0, \
	 "the day the latest complete period ended before (not given: today, UTC)", NULL, 0}

/* The windows of w over the periods of s into *b0..*b1 and *a0..*a1:
 * those given, the rest by default (trend_default_windows).  0; or
 * EXIT_RUNTIME after saying that the counts have no (complete) periods,
 * or EXIT_USAGE that the windows overlap, as "titlemill CMD: ...". */
int cli_windows_get(const char *cmd, const cli_windows *w, tally_series *s, long *b0,
		    long *b1, long *a0, long *a1);

/* Says on standard error what a window of periods left out of s (the
 * periods partly inside it), and, when no counts are left (any 0), that
 * it left out everything. */
void cli_window_note(const char *cmd, const tally_series *s, int any);

/* occupation_label: the preferred label of occ in lang, else its first
 * (labels_pref), as the next value of r; null when it has none. */
void cli_occupation_label(rec *r, const labelset *ls, const char *occ, size_t ol,
			  const char *lang);

/* The occupations' groups for overlap and report (cli_overlap.c): by
 * the first prefix characters of the code (prefix not UINT64_MAX), else
 * from groups (TSV at level, or SKOS), else from the skos:broader of
 * the labels when they are SKOS, else none (g empty).  Returns 0, or -1
 * after saying why not as "titlemill CMD: ..."; notes on standard error
 * (several levels, several broader concepts).  g is for groups_free. */
int cli_load_groups(const char *cmd, const char *groups, const char *level, uint64_t prefix,
		    const char *labels, groupmap *g);

int cmd_norm(int argc, char **argv);
int cmd_tally(int argc, char **argv);
int cmd_counts(int argc, char **argv);
int cmd_coverage(int argc, char **argv);
int cmd_propose(int argc, char **argv);
int cmd_match(int argc, char **argv);
int cmd_labels(int argc, char **argv);
int cmd_review(int argc, char **argv);
int cmd_report(int argc, char **argv);
int cmd_overlap(int argc, char **argv);
int cmd_trend(int argc, char **argv);

#endif

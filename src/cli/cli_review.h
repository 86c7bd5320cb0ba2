/* cli_review.h - what the files of `titlemill review` share: the
 * options, the subcommands and their output helpers (cli_review_out.c).
 * Internal to cli_review*.c.
 *
 * A subcommand returns an exit status (cli.h: EXIT_OK, EXIT_RUNTIME,
 * EXIT_USAGE) and prints its own messages; only cmd_review returns it
 * to main. */
#ifndef TM_CLI_REVIEW_H
#define TM_CLI_REVIEW_H

#include <stdint.h>
#include <stdio.h>

#include "core/buf.h"
#include "review/queue.h"
#include "review/review.h"

typedef struct review_opts {
	const char *sub;         /* the subcommand */
	const char *queue, *store, *prefix;
	int queue_given;         /* --queue was given (else $TITLEMILL_QUEUE may say) */
	const char *reviewer, *note;
	int overrule, json;
	int status;              /* -1 all */
	int kind;                /* -1 any */
	const char *occ, *sort;
	char lang[4];            /* "" any */
	uint64_t limit;          /* UINT64_MAX: all */
	double reopen_factor;    /* 0: off */
	double reopen_precision;
	const char *labels;      /* the taxonomy, for accept's clashes and noise-words */
	int noise;               /* reject: as noise, for good */
	uint64_t batch;          /* undo: the batch; UINT64_MAX: not given */
	uint64_t min_rejections; /* noise-words: the floor */
	int format;              /* 0 tsv, 1 turtle, 2 ntriples */
	const char *since, *base, *out;
	int clean_case;          /* export the clean (lowercase) label */
	/* as opt_parse reads them: 1 + the index of the value given */
	int status_k, kind_k, sort_k, format_k, case_k;
} review_opts;

/* Prints the usage error "what detail" (detail may be NULL) and a
 * pointer to --help; returns EXIT_USAGE. */
int rv_usage_error(const char *what, const char *detail);
/* The index of s among names[0..n), or -1. */
int rv_pick(const char *const *names, int n, const char *s);
/* Prints "titlemill review: m" on standard error; returns EXIT_RUNTIME. */
int rv_fail(const char *m);
/* Writes b to fp and empties it: TM_OK, TM_EFAIL when the write failed,
 * TM_ENOMEM (nothing written) when an append to b failed. */
int rv_flush(tm_buf *b, FILE *fp);
/* Flushes b to standard output and frees it: EXIT_OK, or EXIT_RUNTIME
 * with a message when b or the output failed. */
int rv_finish(tm_buf *b);
/* Flushes standard output: EXIT_OK, or EXIT_RUNTIME with a message. */
int rv_finish_stdout(void);

/* cli_review_change.c: the subcommands that change the queue. */
int rv_add(const review_opts *o, rq_place *pl, int nfiles, char **files, const char *now);
int rv_decide_ids(const review_opts *o, rq_place *pl, int d, int n, char **ids,
		  const char *now);
int rv_decide_file(const review_opts *o, rq_place *pl, const char *path, const char *now);
int rv_repair(rq_place *pl);
int rv_reopen(const review_opts *o, rq_place *pl, int n, char **ids, const char *now);
int rv_undo(const review_opts *o, rq_place *pl, const char *now);
/* The taxonomy of --labels in *ls: 0, or -1 after saying why. */
struct labelset;
int rv_labels(const review_opts *o, struct labelset *ls);

/* cli_review_read.c: the subcommands that read it. */
int rv_list(const review_opts *o, const rq_queue *q);
int rv_show(const review_opts *o, const rq_queue *q, int n, char **ids);
int rv_stats(const review_opts *o, const rq_queue *q, const char *now);
int rv_noise_words(const review_opts *o, const rq_queue *q);
int rv_export(const review_opts *o, const rq_queue *q);

#endif

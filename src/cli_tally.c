/* cli_tally.c - titlemill tally (count title variants) and titlemill
 * counts (print counts tables summed). */
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "cli.h"
#include "norm.h"
#include "postings.h"
#include "setup.h"
#include "tally.h"

typedef struct tally_opts {
	enum pr_format format;
	int strict;
	long memo_mib;
	const char *out;
	setup_opts setup;
} tally_opts;

static const char tally_usage[] =
	"usage: titlemill tally [--format auto|tsv|jsonl] [--labels FILE] [--lexicons DIR]\n"
	"                       [--strict] [-o FILE] POSTINGS...\n"
	"\n"
	"Counts, per occupation, language and match key, how often each cleaned\n"
	"title is used, and writes a counts table (TSV) to standard output or FILE.\n"
	"POSTINGS are TSV files with a header (title and occupations required; id,\n"
	"date, lang optional) or JSON Lines with the same fields; '-' reads standard\n"
	"input.  A posting id counted once is not counted again.\n"
	"\n"
	"  --format F       auto (default: '{' first means JSON Lines), tsv or jsonl\n"
	"  --labels FILE    a labels TSV: labels are never cut down when cleaning\n"
	"  --lexicons DIR   read the lexicons in DIR too (repeatable)\n"
	"  --strict         a malformed row is an error (status 1, nothing written)\n"
	"  --memo MIB       memory of recent titles for the normaliser (default 16)\n"
	"  -o FILE          write the table to FILE (replaced only when complete)\n"
	"  -h, --help       show this help\n";

static const char counts_usage[] =
	"usage: titlemill counts [-o FILE] [COUNTS...]\n"
	"\n"
	"Reads counts tables (from tally or counts; '-' or none: standard input),\n"
	"sums them and prints one counts table.\n"
	"\n"
	"  -o FILE          write the table to FILE (replaced only when complete)\n"
	"  -h, --help       show this help\n";

/* Writes m to path atomically (a temporary file beside it, renamed), or
 * to standard output when path is NULL. */
static int write_table(tally_mem *m, const char *path, const char *cmd)
{
	char tmp[4096];
	FILE *fp;

	if (!path) {
		if (tm_write(m, stdout) != 0 || fflush(stdout) != 0) {
			fprintf(stderr, "titlemill %s: write error: %s\n", cmd, strerror(errno));
			return EXIT_RUNTIME;
		}
		return EXIT_OK;
	}
	snprintf(tmp, sizeof tmp, "%s.tmp-%ld", path, (long)getpid());
	if (!(fp = fopen(tmp, "w"))) {
		fprintf(stderr, "titlemill %s: %s: %s\n", cmd, tmp, strerror(errno));
		return EXIT_RUNTIME;
	}
	if (tm_write(m, fp) != 0 || fflush(fp) != 0 || fsync(fileno(fp)) != 0) {
		fprintf(stderr, "titlemill %s: %s: write error: %s\n", cmd, path, strerror(errno));
		fclose(fp);
		unlink(tmp);
		return EXIT_RUNTIME;
	}
	if (fclose(fp) != 0 || rename(tmp, path) != 0) {
		fprintf(stderr, "titlemill %s: %s: %s\n", cmd, path, strerror(errno));
		unlink(tmp);
		return EXIT_RUNTIME;
	}
	return EXIT_OK;
}

static int parse_memo(const char *arg, long *v)
{
	char *end;
	errno = 0;
	*v = strtol(arg, &end, 10);
	return errno || end == arg || *end || *v < 0 || *v > 4096 ? -1 : 0;
}

/* Reports of malformed rows: the first few in full, then a count. */
typedef struct badlog {
	long n;
	char first[5][300];
} badlog;

static double now(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + (double)ts.tv_nsec / 1e9;
}

int cmd_tally(int argc, char **argv)
{
	static const struct option longopts[] = {
		{"format", required_argument, NULL, 'F'},
		{"labels", required_argument, NULL, 'L'},
		{"lexicons", required_argument, NULL, 'x'},
		{"strict", no_argument, NULL, 's'},
		{"memo", required_argument, NULL, 'm'},
		{"output", required_argument, NULL, 'o'},
		{"help", no_argument, NULL, 'h'},
		{NULL, 0, NULL, 0},
	};
	tally_opts o;
	tm_buf err = {0};
	tally_mem m;
	badlog bl;
	lexicon *lx;
	normaliser *nm;
	int c, rc = EXIT_OK, tty = isatty(2);
	double t0 = now(), last = t0;

	memset(&o, 0, sizeof o);
	memset(&bl, 0, sizeof bl);
	o.memo_mib = 16;
	optind = 1;
	while ((c = getopt_long(argc, argv, "ho:", longopts, NULL)) != -1) {
		switch (c) {
		case 'F':
			if (!strcmp(optarg, "auto")) o.format = PR_AUTO;
			else if (!strcmp(optarg, "tsv")) o.format = PR_TSV;
			else if (!strcmp(optarg, "jsonl")) o.format = PR_JSONL;
			else {
				fprintf(stderr, "titlemill tally: --format: want auto, tsv or jsonl, not '%s'\n", optarg);
				return EXIT_USAGE;
			}
			break;
		case 'L': o.setup.labels = optarg; break;
		case 'x':
			if (o.setup.nextra == 16) {
				fputs("titlemill tally: at most 16 --lexicons folders\n", stderr);
				return EXIT_USAGE;
			}
			o.setup.extra[o.setup.nextra++] = optarg;
			break;
		case 's': o.strict = 1; break;
		case 'm':
			if (parse_memo(optarg, &o.memo_mib) != 0) {
				fprintf(stderr, "titlemill tally: --memo: want a whole number of MiB from 0 to 4096, not '%s'\n", optarg);
				return EXIT_USAGE;
			}
			break;
		case 'o': o.out = optarg; break;
		case 'h': fputs(tally_usage, stdout); return EXIT_OK;
		default: fputs(tally_usage, stderr); return EXIT_USAGE;
		}
	}
	if (optind >= argc) {
		fputs("titlemill tally: name the postings files ('-' for standard input)\n", stderr);
		fputs(tally_usage, stderr);
		return EXIT_USAGE;
	}
	if (!(lx = setup_lexicon(&o.setup, &err))) {
		fprintf(stderr, "titlemill tally: %.*s\n", (int)err.len, err.data ? err.data : "");
		buf_free(&err);
		return EXIT_RUNTIME;
	}
	nm = norm_new(lx);
	if (!nm || norm_memo(nm, (size_t)o.memo_mib << 20) != 0) {
		fputs("titlemill tally: out of memory\n", stderr);
		norm_free(nm);
		lex_free(lx);
		return EXIT_RUNTIME;
	}
	tm_init(&m);
	for (int i = optind; i < argc && rc == EXIT_OK; i++) {
		postings_reader pr;
		posting p;
		int r;

		if (pr_open(&pr, argv[i], o.format) != 0) {
			fprintf(stderr, "titlemill tally: %.*s\n", (int)pr.err.len, pr.err.data);
			pr_close(&pr);
			rc = EXIT_RUNTIME;
			break;
		}
		while ((r = pr_next(&pr, &p)) != 0) {
			norm_result res;
			tally_posting tp;
			if (r < 0) {
				fprintf(stderr, "titlemill tally: %.*s\n", (int)pr.err.len, pr.err.data);
				rc = EXIT_RUNTIME;
				break;
			}
			if (r == 2) {
				if (o.strict) {
					fprintf(stderr, "titlemill tally: %.*s (--strict: nothing written)\n",
						(int)pr.err.len, pr.err.data);
					rc = EXIT_RUNTIME;
					break;
				}
				if (bl.n < 5)
					snprintf(bl.first[bl.n], sizeof bl.first[0], "%.*s",
						 (int)pr.err.len, pr.err.data);
				bl.n++;
				continue;
			}
			if (norm_title(nm, p.title, p.titlelen,
				       strcmp(p.lang, "und") ? p.lang : NULL, &res) != 0) {
				fputs("titlemill tally: out of memory\n", stderr);
				rc = EXIT_RUNTIME;
				break;
			}
			memset(&tp, 0, sizeof tp);
			tp.id = p.id;
			tp.idlen = p.idlen;
			tp.lang = p.lang;
			tp.key = res.key;
			tp.keylen = res.key_len;
			tp.title = res.title;
			tp.titlelen = res.title_len;
			tp.example = res.masked;
			tp.examplelen = res.masked_len;
			tp.occ = p.occ;
			tp.occlen = p.occlen;
			tp.nocc = p.nocc;
			if (tm_add(&m, &tp) < 0) {
				fputs("titlemill tally: out of memory\n", stderr);
				rc = EXIT_RUNTIME;
				break;
			}
			if (tty && ((m.postings + m.republished) & 0x3FFF) == 0) {
				double t = now();
				if (t - last > 0.5) {
					fprintf(stderr, "\rtitlemill tally: %llu postings, %.0f/s ",
						(unsigned long long)(m.postings + m.republished),
						(double)(m.postings + m.republished) / (t - t0));
					last = t;
				}
			}
		}
		pr_close(&pr);
	}
	if (tty && last != t0)
		fputc('\n', stderr);
	if (rc == EXIT_OK)
		rc = write_table(&m, o.out, "tally");
	fprintf(stderr, "titlemill tally: %llu postings counted, %llu republished ids skipped, %ld malformed rows skipped",
		(unsigned long long)m.postings, (unsigned long long)m.republished, bl.n);
	for (long k = 0; k < bl.n && k < 5; k++)
		fprintf(stderr, "%s %s", k ? ";" : ":", bl.first[k]);
	fprintf(stderr, "%s\n", bl.n > 5 ? "; ..." : "");
	tm_free(&m);
	norm_free(nm);
	lex_free(lx);
	buf_free(&err);
	return rc;
}

int cmd_counts(int argc, char **argv)
{
	static const struct option longopts[] = {
		{"output", required_argument, NULL, 'o'},
		{"help", no_argument, NULL, 'h'},
		{NULL, 0, NULL, 0},
	};
	const char *out = NULL;
	tm_buf err = {0};
	tally_mem m;
	int c, rc = EXIT_OK;

	optind = 1;
	while ((c = getopt_long(argc, argv, "ho:", longopts, NULL)) != -1) {
		switch (c) {
		case 'o': out = optarg; break;
		case 'h': fputs(counts_usage, stdout); return EXIT_OK;
		default: fputs(counts_usage, stderr); return EXIT_USAGE;
		}
	}
	tm_init(&m);
	if (optind >= argc && tm_read(&m, "-", &err) != 0)
		rc = EXIT_RUNTIME;
	for (int i = optind; i < argc && rc == EXIT_OK; i++)
		if (tm_read(&m, argv[i], &err) != 0)
			rc = EXIT_RUNTIME;
	if (rc != EXIT_OK)
		fprintf(stderr, "titlemill counts: %.*s\n", (int)err.len, err.data ? err.data : "");
	else
		rc = write_table(&m, out, "counts");
	tm_free(&m);
	buf_free(&err);
	return rc;
}

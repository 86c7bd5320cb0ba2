/* options.c - parsing a command line by a table of options. */
#include <errno.h>
#include <limits.h>
#include <getopt.h>
#include <stdlib.h>
#include <string.h>

#include "core/buf.h"
#include "core/lang.h"
#include "core/msg.h"
#include "cli/options.h"
#include "core/period.h"
#include "norm/setup.h"
#include "count/store.h"

enum { MAX_SPECS = 48 };

enum { HELP_COL = 24, HELP_WIDTH = 79 };

/* One option's line: its name and argument, then its meaning wrapped
 * at HELP_WIDTH columns under HELP_COL. */
static void help_line(FILE *fp, const char *head, const char *text, const char *def)
{
	char buf[512];
	int col;
	snprintf(buf, sizeof buf, "%s%s%s%s", text, def ? " (default " : "", def ? def : "",
		 def ? ")" : "");
	col = fprintf(fp, "  %-*s", HELP_COL - 3, head);
	if (col > HELP_COL - 1) {
		fprintf(fp, "\n%*s", HELP_COL - 1, "");
		col = HELP_COL - 1;
	}
	for (const char *w = buf; *w;) {
		size_t n = strcspn(w, " ");
		if (col + 1 + (int)n > HELP_WIDTH && col > HELP_COL - 1) {
			fprintf(fp, "\n%*s", HELP_COL - 1, "");
			col = HELP_COL - 1;
		}
		col += fprintf(fp, " %.*s", (int)n, w);
		w += n;
		w += strspn(w, " ");
	}
	fputc('\n', fp);
}

void opt_help(const opt_cmd *cmd, FILE *fp)
{
	fputs(cmd->synopsis, fp);
	for (const opt_spec *s = cmd->specs; s->name; s++) {
		char head[64];
		char letter[8] = "";
		if (s->letter)
			snprintf(letter, sizeof letter, "-%c, ", s->letter);
		snprintf(head, sizeof head, "%s--%s%s%s", letter, s->name, s->arg ? " " : "",
			 s->arg ? s->arg : "");
		help_line(fp, head, s->help, s->def);
	}
	help_line(fp, "-h, --help", "show this help", NULL);
}

static int whole(const char *a, double lo, double hi, uint64_t *v)
{
	char *e;
	errno = 0;
	unsigned long long x = strtoull(a, &e, 10);
	if (errno || e == a || *e || a[0] < '0' || a[0] > '9' || (double)x < lo || (double)x > hi)
		return -1;
	*v = x;
	return 0;
}

static int real(const char *a, double lo, double hi, double *v)
{
	char *e;
	errno = 0;
	double x = strtod(a, &e);
	if (errno || e == a || *e || !(x >= lo && x <= hi))
		return -1;
	*v = x;
	return 0;
}

/* Stores arg as the value of s in o: 0, or -1 after saying why not. */
static int take(const opt_cmd *cmd, const opt_spec *s, void *o, const char *arg)
{
	char *at = (char *)o + s->off;
	switch (s->kind) {
	case OPT_FLAG:
		*(int *)at += 1;
		return 0;
	case OPT_STR:
		*(const char **)at = arg;
		return 0;
	case OPT_U64:
		if (whole(arg, s->lo, s->hi, (uint64_t *)at) == 0)
			return 0;
		fprintf(stderr, "titlemill %s: --%s: want a whole number from %.0f to %.0f, not '%s'\n",
			cmd->name, s->name, s->lo, s->hi, arg);
		return -1;
	case OPT_REAL:
		if (real(arg, s->lo, s->hi, (double *)at) == 0)
			return 0;
		if (s->hi >= OPT_UNBOUNDED)
			fprintf(stderr, "titlemill %s: --%s: want a number of %g or more, not '%s'\n",
				cmd->name, s->name, s->lo, arg);
		else
			fprintf(stderr, "titlemill %s: --%s: want a number from %g to %g, not '%s'\n",
				cmd->name, s->name, s->lo, s->hi, arg);
		return -1;
	case OPT_LANG:
		if (lang_tag(arg, at) == 0)
			return 0;
		fprintf(stderr, "titlemill %s: --%s: '%s' is not a BCP 47 language tag\n",
			cmd->name, s->name, arg);
		return -1;
	case OPT_CHOICE:
		for (int k = 0; s->choices[k]; k++)
			if (!strcmp(arg, s->choices[k])) {
				*(int *)at = k + 1;
				return 0;
			}
		fprintf(stderr, "titlemill %s: --%s: want one of", cmd->name, s->name);
		for (int k = 0; s->choices[k]; k++)
			fprintf(stderr, "%s %s", k ? "," : "", s->choices[k]);
		fprintf(stderr, ", not '%s'\n", arg);
		return -1;
	case OPT_LEXDIR: {
		setup_opts *so = (setup_opts *)at;
		if (so->nextra == (int)(sizeof so->extra / sizeof so->extra[0])) {
			fprintf(stderr, "titlemill %s: at most %zu --%s folders\n", cmd->name,
				sizeof so->extra / sizeof so->extra[0], s->name);
			return -1;
		}
		so->extra[so->nextra++] = arg;
		return 0;
	}
	case OPT_STRS: {
		opt_strs *l = (opt_strs *)at;
		if (l->n == OPT_STRS_MAX) {
			fprintf(stderr, "titlemill %s: --%s: at most %d of them\n", cmd->name, s->name,
				OPT_STRS_MAX);
			return -1;
		}
		l->v[l->n++] = arg;
		return 0;
	}
	case OPT_PERIOD: {
		int k = period_kind_of(arg);
		if (k >= 0) {
			*(int *)at = k;
			return 0;
		}
		fprintf(stderr, "titlemill %s: --%s: want month, week, day or none, not '%s'\n",
			cmd->name, s->name, arg);
		return -1;
	}
	case OPT_SPAN: {
		opt_span *sp = (opt_span *)at;
		const char *dots = strstr(arg, "..");
		long a, b, c, d;
		size_t n1 = dots ? (size_t)(dots - arg) : strlen(arg);
		if (n1 && period_span(arg, n1, &a, &b, NULL) == 0 &&
		    (!dots || (dots[2] && period_span(dots + 2, strlen(dots + 2), &c, &d, NULL) == 0))) {
			sp->given = 1;
			sp->first = a;
			sp->last = dots ? d : b;
			if (sp->first <= sp->last)
				return 0;
			fprintf(stderr, "titlemill %s: --%s: '%s' ends before it starts\n", cmd->name,
				s->name, arg);
			return -1;
		}
		fprintf(stderr, "titlemill %s: --%s: want a day (2026-03-01), a week (2026-W09), a "
			"month (2026-03), a quarter (2026-Q1) or a year (2026)%s, not '%s'\n",
			cmd->name, s->name, dots || s->lo > 0 ? ", or two joined by .." : "", arg);
		return -1;
	}
	case OPT_PREFIX:
	case OPT_STORE: {
		tm_buf err = {0};
		if ((s->kind == OPT_PREFIX ? store_prefix_check(arg, &err) : store_url_check(arg, &err)) == 0) {
			*(const char **)at = arg;
			return 0;
		}
		fprintf(stderr, "titlemill %s: --%s: %.*s\n", cmd->name, s->name, (int)err.len,
			err.data ? err.data : "");
		buf_free(&err);
		return -1;
	}
	}
	return -1;
}

/* Says on standard error what was wrong with argument bad (the one
 * getopt_long stopped at; letter: a short option's letter, else 0):
 * an option the command does not have, an abbreviation of several, a
 * value missing or given to a flag; then where the options are listed
 * (the whole help is not repeated: it would bury the message). */
static void misuse(const opt_cmd *cmd, const char *help_as, const struct option *lo,
		   const char *bad, int letter, int missing)
{
	char shortopt[3] = {'-', (char)letter, 0};
	const char *arg = letter ? shortopt : bad ? bad : "?";
	size_t nl = strcspn(arg, "=");
	int matches = 0, exact = -1;

	if (!letter && !strncmp(arg, "--", 2))
		for (int k = 0; lo[k].name; k++)
			if (!strncmp(lo[k].name, arg + 2, nl - 2)) {
				matches++;
				if (strlen(lo[k].name) == nl - 2)
					exact = k;
			}
	fprintf(stderr, "titlemill %s: ", cmd->name);
	if (missing)
		fprintf(stderr, "%s needs a value", arg);
	else if (exact >= 0 || (matches == 1 && arg[nl] == '='))
		fprintf(stderr, "%.*s takes no value", (int)nl, arg);
	else if (matches > 1) {
		fprintf(stderr, "%.*s could be any of", (int)nl, arg);
		for (int k = 0; lo[k].name; k++)
			if (!strncmp(lo[k].name, arg + 2, nl - 2))
				fprintf(stderr, " --%s", lo[k].name);
	} else
		fprintf(stderr, "unknown option '%s'", arg);
	fprintf(stderr, " (the options: titlemill %s --help)\n", help_as ? help_as : cmd->name);
}

int opt_parse(const opt_cmd *cmd, void *o, int argc, char **argv, int *first)
{
	return opt_parse_as(cmd, NULL, o, argc, argv, first);
}

int opt_parse_as(const opt_cmd *cmd, const char *help_as, void *o, int argc, char **argv,
		 int *first)
{
	struct option lo[MAX_SPECS + 2];
	char letters[2 * MAX_SPECS + 3] = ":h";
	size_t nl = 2;
	int n = 0, ch, idx = 0;

	msg_command(cmd->name);
	for (const opt_spec *s = cmd->specs; s->name; s++, n++) {
		if (n == MAX_SPECS)
			return OPT_MISUSE; /* a table larger than the parser: a build error in practice */
		lo[n].name = s->name;
		lo[n].has_arg = s->kind == OPT_FLAG ? no_argument : required_argument;
		lo[n].flag = NULL;
		lo[n].val = 0x100 + n;
		if (s->letter) {
			letters[nl++] = (char)s->letter;
			if (s->kind != OPT_FLAG)
				letters[nl++] = ':';
		}
		if (s->kind == OPT_U64 && !s->def)
			*(uint64_t *)((char *)o + s->off) = UINT64_MAX;
		if (s->def && take(cmd, s, o, s->def) != 0)
			return OPT_MISUSE;
	}
	lo[n] = (struct option){"help", no_argument, NULL, 'h'};
	lo[n + 1] = (struct option){NULL, 0, NULL, 0};
	/* 0: glibc starts afresh, whatever an earlier parse left (the unit
	 * tests parse many command lines in one process) */
	optind = 0;
	opterr = 0; /* misuse() says it, in our words */
	while ((ch = getopt_long(argc, argv, letters, lo, &idx)) != -1) {
		if (ch == 'h') {
			opt_help(cmd, stdout);
			return OPT_HELP_SHOWN;
		}
		if (ch == '?' || ch == ':') {
			misuse(cmd, help_as, lo, optind > 0 && optind <= argc ? argv[optind - 1] : NULL,
			       optopt > 0 && optopt < 0x100 ? optopt : 0, ch == ':');
			return OPT_MISUSE;
		}
		if (ch > 0 && ch < 0x100 && ch != '?' && ch != ':')
			for (int k = 0; k < n; k++)
				if (cmd->specs[k].letter == ch)
					ch = 0x100 + k;
		if (ch < 0x100 || ch >= 0x100 + n) {
			opt_help(cmd, stderr);
			return OPT_MISUSE;
		}
		const opt_spec *s = &cmd->specs[ch - 0x100];
		if ((cmd->admit && cmd->admit(s, o) != 0) || take(cmd, s, o, optarg) != 0)
			return OPT_MISUSE;
	}
	*first = optind;
	return OPT_RUN;
}

int opt_window(const char *cmd, const opt_span *from, const opt_span *to, long *first,
	       long *last)
{
	if (!from->given && !to->given)
		return 0;
	*first = from->given ? from->first : LONG_MIN / 2;
	*last = to->given ? to->last : LONG_MAX / 2;
	if (*first > *last) {
		fprintf(stderr, "titlemill %s: --from is after --to: the window holds no day\n", cmd);
		return -1;
	}
	return 1;
}

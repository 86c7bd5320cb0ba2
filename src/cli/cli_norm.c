/* cli_norm.c - titlemill norm: the title filter. */
#include <errno.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli/cli.h"
#include "core/msg.h"
#include "io/decode.h"
#include "norm/facets.h"
#include "core/lang.h"
#include "norm/norm.h"
#include "cli/options.h"
#include "io/reader.h"
#include "norm/setup.h"

enum out_mode { OUT_TITLE, OUT_KEY, OUT_JSON, OUT_FACETS };

typedef struct norm_opts {
	enum out_mode mode;
	char lang[4];
	int strict, stats;
	int key, json, facets;   /* each: how often given */
	uint64_t memo_mib;
	setup_opts setup;
} norm_opts;

static const opt_spec norm_specs[] = {
	{"key", OPT_FLAG, offsetof(norm_opts, key), NULL, NULL, 0, 0,
	 "print the match key instead of the clean title", NULL, 0},
	{"json", OPT_FLAG, offsetof(norm_opts, json), NULL, NULL, 0, 0,
	 "print one JSON object per line with the title, the key and the facets "
	 "(what was removed and why)", NULL, 0},
	{"facets", OPT_FLAG, offsetof(norm_opts, facets), NULL, NULL, 0, 0,
	 "print TAB-separated: title, seniority, gender, location, schedule, pay, "
	 "reference, other removed (no header)", NULL, 0},
	OPT_SPEC_LANG(norm_opts, lang, "the titles' language (BCP 47, e.g. de, fr-BE); "
		      "enables that language's ambiguous rules"),
	OPT_SPEC_LABELS(norm_opts, setup.labels, "a labels TSV: its labels are never cut down"),
	OPT_SPEC_LEXICONS(norm_opts, setup),
	{"strict", OPT_FLAG, offsetof(norm_opts, strict), NULL, NULL, 0, 0,
	 "stop with status 1 at the first line that needs repair", NULL, 0},
	OPT_SPEC_MEMO(norm_opts, memo_mib),
	{"stats", OPT_FLAG, offsetof(norm_opts, stats), NULL, NULL, 0, 0,
	 "say on standard error how many titles came from memory", NULL, 0},
	OPT_SPEC_END,
};

static const opt_cmd norm_cmd = {
	"norm",
	"usage: titlemill norm [--key|--json|--facets] [--lang L] [--labels FILE]\n"
	"                      [--lexicons DIR] [--strict] [FILE...]\n"
	"\n"
	"Cleans raw job-posting titles: one title per input line, exactly one\n"
	"clean title per output line, in the same order (an all-noise title\n"
	"gives an empty line).  Reads the FILEs, or standard input ('-').\n"
	"The lexicons: see lexicons/README.md; TITLEMILL_LEXICONS=DIR[:DIR] adds\n"
	"folders as --lexicons does, TITLEMILL_LEXDIR replaces the bundled one.\n"
	"\n",
	norm_specs,
	NULL,
};

/* Repairs noted for the end-of-run summary. */
typedef struct repair_log {
	long lines[5];           /* invalid UTF-8, NUL, cut, CR inside,
				  * bad character reference */
	char first[5][5][300];
	int nfirst[5];
	int wfail;               /* a write error was reported */
} repair_log;

static void note(repair_log *rl, int which, const char *name, long line)
{
	rl->lines[which]++;
	if (rl->nfirst[which] < 5)
		snprintf(rl->first[which][rl->nfirst[which]++], 300, "%s:%ld", name, line);
}

static void summary(const repair_log *rl)
{
	static const char *const what[5] = {
		"with invalid UTF-8 (replaced by U+FFFD)",
		"with NUL bytes (replaced by U+FFFD)",
		"longer than 1 MiB (cut; the rest of the line was not read)",
		"with a carriage return inside (read as a space: lines end at LF, "
		"CR-only line ends are not split)",
		"with a character reference to NUL, a surrogate or beyond U+10FFFF "
		"(replaced by U+FFFD)",
	};
	for (int w = 0; w < 5; w++) {
		if (!rl->lines[w])
			continue;
		fprintf(stderr, "titlemill norm: %ld line%s %s:", rl->lines[w],
			rl->lines[w] == 1 ? "" : "s", what[w]);
		for (int i = 0; i < rl->nfirst[w]; i++)
			fprintf(stderr, " %s", rl->first[w][i]);
		fprintf(stderr, "%s\n", rl->lines[w] > rl->nfirst[w] ? " ..." : "");
	}
}

static int flush(tm_buf *out)
{
	if (out->len && fwrite(out->data, 1, out->len, stdout) != out->len)
		return -1;
	out->len = 0;
	return 0;
}

static int run_file(const norm_opts *o, normaliser *nm, const char *path,
		    tm_buf *out, tm_buf *rawfix, repair_log *rl)
{
	line_reader lr;
	const char *s;
	size_t n;
	int r;

	if (lr_open(&lr, path) != 0) {
		fprintf(stderr, "titlemill norm: %s: %s\n", path, strerror(errno));
		return EXIT_RUNTIME;
	}
	while ((r = lr_next(&lr, &s, &n)) > 0) {
		norm_result res;
		if (norm_title(nm, s, n, o->lang[0] ? o->lang : NULL, &res) != 0) {
			fprintf(stderr, "titlemill norm: %s:%ld: out of memory\n",
				lr.name, lr.lineno);
			lr_close(&lr);
			return EXIT_RUNTIME;
		}
		if (res.repaired || lr.cut || lr.cr) {
			if (o->strict) {
				fprintf(stderr, "titlemill norm: %s:%ld: %s\n", lr.name,
					lr.lineno,
					lr.cut ? "line longer than 1 MiB"
					: res.repaired & DEC_INVALID ? "invalid UTF-8"
					: res.repaired & DEC_NUL     ? "NUL byte"
					: res.repaired & DEC_REF     ? "bad character reference"
								     : "carriage return inside the line");
				lr_close(&lr);
				return EXIT_RUNTIME;
			}
			if (res.repaired & DEC_INVALID)
				note(rl, 0, lr.name, lr.lineno);
			if (res.repaired & DEC_NUL)
				note(rl, 1, lr.name, lr.lineno);
			if (lr.cut)
				note(rl, 2, lr.name, lr.lineno);
			if (lr.cr)
				note(rl, 3, lr.name, lr.lineno);
			if (res.repaired & DEC_REF)
				note(rl, 4, lr.name, lr.lineno);
		}
		switch (o->mode) {
		case OUT_TITLE:
			if (buf_append(out, res.title, res.title_len) || buf_putc(out, '\n'))
				goto nomem;
			break;
		case OUT_KEY:
			if (buf_append(out, res.key, res.key_len) || buf_putc(out, '\n'))
				goto nomem;
			break;
		case OUT_JSON: {
			const char *raw = s;
			size_t rn = n;
			if (res.repaired) {
				buf_reset(rawfix);
				if (dec_repair(s, n, rawfix) < 0)
					goto nomem;
				raw = rawfix->data;
				rn = rawfix->len;
			}
			if (facets_json(out, raw, rn, &res, o->lang[0] ? o->lang : NULL))
				goto nomem;
			break;
		}
		case OUT_FACETS:
			if (facets_tsv(out, &res))
				goto nomem;
			break;
		}
		if (out->len >= (1 << 16) && flush(out) != 0) {
			fprintf(stderr, "titlemill norm: write error: %s\n", strerror(errno));
			out->len = 0; /* said once: nothing more is written */
			rl->wfail = 1;
			lr_close(&lr);
			return EXIT_RUNTIME;
		}
	}
	if (r < 0) {
		fprintf(stderr, "titlemill norm: %s:%ld: %s%s\n", lr.name, lr.lineno + 1,
			lr.utf16 ? "" : "read error: ", lr_strerror(&lr));
		lr_close(&lr);
		return EXIT_RUNTIME;
	}
	lr_close(&lr);
	return EXIT_OK;
nomem:
	fprintf(stderr, "titlemill norm: %s:%ld: out of memory\n", lr.name, lr.lineno);
	lr_close(&lr);
	return EXIT_RUNTIME;
}

int cmd_norm(int argc, char **argv)
{
	norm_opts o;
	tm_buf err = {0}, out = {0}, rawfix = {0};
	repair_log rl;
	lexicon *lx;
	normaliser *nm;
	int first, rc = EXIT_OK;

	memset(&o, 0, sizeof o);
	memset(&rl, 0, sizeof rl);
	switch (opt_parse(&norm_cmd, &o, argc, argv, &first)) {
	case OPT_HELP_SHOWN: return EXIT_OK;
	case OPT_MISUSE: return EXIT_USAGE;
	}
	if (o.key + o.json + o.facets > 1) {
		fputs("titlemill norm: choose one of --key, --json, --facets\n", stderr);
		return EXIT_USAGE;
	}
	o.mode = o.key ? OUT_KEY : o.json ? OUT_JSON : o.facets ? OUT_FACETS : OUT_TITLE;
	if (!(lx = setup_lexicon(&o.setup, &err))) {
		fprintf(stderr, "titlemill norm: %.*s\n", (int)err.len, err.data ? err.data : "");
		buf_free(&err);
		return EXIT_RUNTIME;
	}
	if (!(nm = norm_new(lx))) {
		fputs("titlemill norm: out of memory\n", stderr);
		lex_free(lx);
		return EXIT_RUNTIME;
	}
	if (norm_memo(nm, (size_t)o.memo_mib << 20) != 0) {
		fputs("titlemill norm: out of memory for --memo\n", stderr);
		norm_free(nm);
		lex_free(lx);
		return EXIT_RUNTIME;
	}
	if (first >= argc)
		rc = run_file(&o, nm, "-", &out, &rawfix, &rl);
	for (int i = first; i < argc && rc == EXIT_OK; i++)
		rc = run_file(&o, nm, argv[i], &out, &rawfix, &rl);
	if (!rl.wfail && (flush(&out) != 0 || fflush(stdout) != 0)) {
		fprintf(stderr, "titlemill norm: write error: %s\n", strerror(errno));
		rc = EXIT_RUNTIME;
	}
	summary(&rl);
	if (o.stats) {
		size_t hits, calls;
		norm_memo_stats(nm, &hits, &calls);
		fprintf(stderr, "titlemill norm: %zu title%s, %zu answered from memory (%.1f %%)\n",
			calls, msg_plural(calls), hits,
			calls ? 100.0 * (double)hits / (double)calls : 0.0);
	}
	norm_free(nm);
	lex_free(lx);
	buf_free(&err);
	buf_free(&out);
	buf_free(&rawfix);
	return rc;
}

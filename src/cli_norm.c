/* cli_norm.c - titlemill norm: the title filter. */
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "cli.h"
#include "decode.h"
#include "jsonw.h"
#include "lang.h"
#include "norm.h"
#include "reader.h"
#include "setup.h"

enum out_mode { OUT_TITLE, OUT_KEY, OUT_JSON, OUT_FACETS };

typedef struct norm_opts {
	enum out_mode mode;
	char lang[4];
	int strict, stats;
	long memo_mib;
	setup_opts setup;
} norm_opts;

static const char norm_usage[] =
	"usage: titlemill norm [--key|--json|--facets] [--lang L] [--labels FILE]\n"
	"                      [--lexicons DIR] [--strict] [FILE...]\n"
	"\n"
	"Cleans raw job-posting titles: one title per input line, exactly one\n"
	"clean title per output line, in the same order (an all-noise title\n"
	"gives an empty line).  Reads the FILEs, or standard input ('-').\n"
	"\n"
	"  --key            print the match key instead of the clean title\n"
	"  --json           print one JSON object per line with the title, the\n"
	"                   key and the facets (what was removed and why)\n"
	"  --facets         print TAB-separated: title, seniority, gender, location,\n"
	"                   schedule, pay, reference, other removed (no header)\n"
	"  --lang L         the titles' language (BCP 47, e.g. de, fr-BE); enables\n"
	"                   that language's ambiguous rules\n"
	"  --labels FILE    a labels TSV: its labels are never cut down\n"
	"  --lexicons DIR   read the lexicons in DIR too (repeatable); see\n"
	"                   lexicons/README.md.  TITLEMILL_LEXICONS=DIR[:DIR]\n"
	"                   does the same; TITLEMILL_LEXDIR replaces the bundled folder\n"
	"  --strict         stop with status 1 at the first line that needs repair\n"
	"  --memo MIB       remember the results of recent distinct titles in MIB\n"
	"                   mebibytes (default 16; 0: clean every line afresh)\n"
	"  --stats          say on standard error how many titles came from memory\n"
	"  -h, --help       show this help\n";

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

static int add_list(tm_buf *b, const norm_result *r, int kind, int values,
		    const char *sep)
{
	int n = 0;
	for (size_t i = 0; i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		if (p->kind != kind)
			continue;
		if (n++ && buf_puts(b, sep))
			return -1;
		if (values && p->value) {
			if (buf_puts(b, p->value))
				return -1;
		} else if (buf_append(b, p->text, p->len))
			return -1;
	}
	return 0;
}

static int json_list(tm_buf *b, const norm_result *r, int kind, int values)
{
	int n = 0;
	if (buf_putc(b, '['))
		return -1;
	for (size_t i = 0; i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		if (p->kind != kind)
			continue;
		/* a schedule value said twice is listed once */
		if (values && p->value) {
			int dup = 0;
			for (size_t j = 0; j < i; j++)
				if (r->piece[j].kind == kind && r->piece[j].value &&
				    !strcmp(r->piece[j].value, p->value))
					dup = 1;
			if (dup)
				continue;
		}
		if (n++ && buf_putc(b, ','))
			return -1;
		if (values && p->value ? json_str(b, p->value, strlen(p->value))
				       : json_str(b, p->text, p->len))
			return -1;
	}
	return buf_putc(b, ']');
}

static int json_first(tm_buf *b, const norm_result *r, int kind, int values)
{
	for (size_t i = 0; i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		if (p->kind != kind)
			continue;
		if (values && p->value)
			return json_str(b, p->value, strlen(p->value));
		return json_str(b, p->text, p->len);
	}
	return buf_puts(b, "null");
}

/* Seniority: the highest step named (a title that says both "senior" and
 * "lead" is lead). */
static const char *seniority(const norm_result *r)
{
	static const char *const scale[] = {"entry", "junior", "mid", "senior", "lead"};
	int best = -1;
	for (size_t i = 0; i < r->npiece; i++) {
		if (r->piece[i].kind != NF_SENIORITY || !r->piece[i].value)
			continue;
		for (int s = 0; s < 5; s++)
			if (!strcmp(r->piece[i].value, scale[s]) && s > best)
				best = s;
	}
	return best < 0 ? NULL : scale[best];
}

static int is_other(int kind)
{
	return kind == NF_MARKETING || kind == NF_EMPLOYER || kind == NF_DATE ||
	       kind == NF_EMAIL || kind == NF_PHONE || kind == NF_URL ||
	       kind == NF_HOURS || kind == NF_WORKLOAD || kind == NF_SLOT;
}

static int write_json(tm_buf *b, const char *raw, size_t rawn,
		      const norm_result *r, const char *lang)
{
	const char *sen = seniority(r);
	int n = 0;

	if (buf_putc(b, '{') || json_key(b, "raw") || json_str(b, raw, rawn) ||
	    buf_putc(b, ',') || json_key(b, "title") ||
	    json_str(b, r->title, r->title_len) || buf_putc(b, ',') ||
	    json_key(b, "key") || json_str(b, r->key, r->key_len))
		return -1;
	if (lang && (buf_putc(b, ',') || json_key(b, "lang") ||
		     json_str(b, lang, strlen(lang))))
		return -1;
	if (buf_putc(b, ',') || json_key(b, "seniority") ||
	    (sen ? json_str(b, sen, strlen(sen)) : buf_puts(b, "null")) ||
	    buf_putc(b, ',') || json_key(b, "gender") ||
	    json_first(b, r, NF_GENDER, 0) || buf_putc(b, ',') ||
	    json_key(b, "location") || json_list(b, r, NF_LOCATION, 0) ||
	    buf_putc(b, ',') || json_key(b, "schedule") ||
	    json_list(b, r, NF_SCHEDULE, 1) || buf_putc(b, ',') ||
	    json_key(b, "hours") || json_first(b, r, NF_HOURS, 0) ||
	    buf_putc(b, ',') || json_key(b, "workload") ||
	    json_first(b, r, NF_WORKLOAD, 0) || buf_putc(b, ',') ||
	    json_key(b, "pay") || json_first(b, r, NF_PAY, 0) ||
	    buf_putc(b, ',') || json_key(b, "reference") ||
	    json_first(b, r, NF_REFERENCE, 0) || buf_putc(b, ',') ||
	    json_key(b, "removed") || buf_putc(b, '['))
		return -1;
	for (size_t i = 0; i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		if (n++ && buf_putc(b, ','))
			return -1;
		if (buf_putc(b, '{') || json_key(b, "kind") ||
		    json_str(b, nf_kind_name(p->kind), strlen(nf_kind_name(p->kind))) ||
		    buf_putc(b, ',') || json_key(b, "text") ||
		    json_str(b, p->text, p->len) || buf_putc(b, '}'))
			return -1;
	}
	if (buf_putc(b, ']'))
		return -1;
	if (r->repaired && buf_puts(b, ",\"repaired\":true"))
		return -1;
	return buf_puts(b, "}\n");
}

static int write_facets(tm_buf *b, const norm_result *r)
{
	const char *sen = seniority(r);
	int n = 0;
	if (buf_append(b, r->title, r->title_len) || buf_putc(b, '\t') ||
	    (sen && buf_puts(b, sen)) || buf_putc(b, '\t') ||
	    add_list(b, r, NF_GENDER, 0, "; ") || buf_putc(b, '\t') ||
	    add_list(b, r, NF_LOCATION, 0, "; ") || buf_putc(b, '\t') ||
	    add_list(b, r, NF_SCHEDULE, 1, ",") || buf_putc(b, '\t') ||
	    add_list(b, r, NF_PAY, 0, "; ") || buf_putc(b, '\t') ||
	    add_list(b, r, NF_REFERENCE, 0, "; ") || buf_putc(b, '\t'))
		return -1;
	for (size_t i = 0; i < r->npiece; i++) {
		const nf_piece *p = &r->piece[i];
		if (!is_other(p->kind))
			continue;
		if ((n++ && buf_puts(b, "; ")) || buf_puts(b, nf_kind_name(p->kind)) ||
		    buf_putc(b, ':') || buf_append(b, p->text, p->len))
			return -1;
	}
	/* a TAB inside a removed text would shift the columns: none can be
	 * there, the tokeniser treats TAB as a space */
	return buf_putc(b, '\n');
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
			if (write_json(out, raw, rn, &res, o->lang[0] ? o->lang : NULL))
				goto nomem;
			break;
		}
		case OUT_FACETS:
			if (write_facets(out, &res))
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
	static const struct option longopts[] = {
		{"key", no_argument, NULL, 'k'},
		{"json", no_argument, NULL, 'j'},
		{"facets", no_argument, NULL, 'f'},
		{"lang", required_argument, NULL, 'l'},
		{"labels", required_argument, NULL, 'L'},
		{"lexicons", required_argument, NULL, 'x'},
		{"strict", no_argument, NULL, 's'},
		{"memo", required_argument, NULL, 'm'},
		{"stats", no_argument, NULL, 'S'},
		{"help", no_argument, NULL, 'h'},
		{NULL, 0, NULL, 0},
	};
	norm_opts o;
	tm_buf err = {0}, out = {0}, rawfix = {0};
	repair_log rl;
	lexicon *lx;
	normaliser *nm;
	int c, rc = EXIT_OK, modes = 0;

	memset(&o, 0, sizeof o);
	memset(&rl, 0, sizeof rl);
	o.memo_mib = 16;
	optind = 1;
	while ((c = getopt_long(argc, argv, "h", longopts, NULL)) != -1) {
		switch (c) {
		case 'k': o.mode = OUT_KEY; modes++; break;
		case 'j': o.mode = OUT_JSON; modes++; break;
		case 'f': o.mode = OUT_FACETS; modes++; break;
		case 'l':
			if (lang_tag(optarg, o.lang) != 0) {
				fprintf(stderr, "titlemill norm: --lang: '%s' is not a BCP 47 language tag\n",
					optarg);
				return EXIT_USAGE;
			}
			break;
		case 'L': o.setup.labels = optarg; break;
		case 'x':
			if (o.setup.nextra == 16) {
				fputs("titlemill norm: at most 16 --lexicons folders\n", stderr);
				return EXIT_USAGE;
			}
			o.setup.extra[o.setup.nextra++] = optarg;
			break;
		case 's': o.strict = 1; break;
		case 'S': o.stats = 1; break;
		case 'm': {
			char *end;
			errno = 0;
			o.memo_mib = strtol(optarg, &end, 10);
			if (errno || end == optarg || *end || o.memo_mib < 0 || o.memo_mib > 4096) {
				fprintf(stderr, "titlemill norm: --memo: want a whole number of MiB from 0 to 4096, not '%s'\n",
					optarg);
				return EXIT_USAGE;
			}
			break;
		}
		case 'h': fputs(norm_usage, stdout); return EXIT_OK;
		default: fputs(norm_usage, stderr); return EXIT_USAGE;
		}
	}
	if (modes > 1) {
		fputs("titlemill norm: choose one of --key, --json, --facets\n", stderr);
		return EXIT_USAGE;
	}
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
	if (optind >= argc)
		rc = run_file(&o, nm, "-", &out, &rawfix, &rl);
	for (int i = optind; i < argc && rc == EXIT_OK; i++)
		rc = run_file(&o, nm, argv[i], &out, &rawfix, &rl);
	if (!rl.wfail && (flush(&out) != 0 || fflush(stdout) != 0)) {
		fprintf(stderr, "titlemill norm: write error: %s\n", strerror(errno));
		rc = EXIT_RUNTIME;
	}
	summary(&rl);
	if (o.stats) {
		size_t hits, calls;
		norm_memo_stats(nm, &hits, &calls);
		fprintf(stderr, "titlemill norm: %zu titles, %zu answered from memory (%.1f %%)\n",
			calls, hits, calls ? 100.0 * (double)hits / (double)calls : 0.0);
	}
	norm_free(nm);
	lex_free(lx);
	buf_free(&err);
	buf_free(&out);
	buf_free(&rawfix);
	return rc;
}

/* Unit tests for the option tables (src/cli/options.c): defaults set from
 * their text, strict numbers and ranges, choices, repeated folders,
 * one-letter forms, the admit hook, and the generated help. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "cli/options.h"
#include "norm/setup.h"

typedef struct demo_opts {
	int flag;
	const char *name;
	uint64_t n, top, memo;
	double x;
	char lang[4];
	int kind;
	const char *out;
	setup_opts setup;
} demo_opts;

static const char *const kinds[] = {"alpha", "beta", NULL};

static const opt_spec demo_specs[] = {
	{"flag", OPT_FLAG, offsetof(demo_opts, flag), NULL, NULL, 0, 0, "a flag", NULL, 0},
	{"name", OPT_STR, offsetof(demo_opts, name), "S", NULL, 0, 0, "a name", NULL, 0},
	{"n", OPT_U64, offsetof(demo_opts, n), "N", "5", 1, 100, "a count", NULL, 0},
	{"top", OPT_U64, offsetof(demo_opts, top), "N", NULL, 0, 1e18, "no default", NULL, 0},
	{"x", OPT_REAL, offsetof(demo_opts, x), "X", "0.25", 0, 1, "a share", NULL, 0},
	{"kind", OPT_CHOICE, offsetof(demo_opts, kind), "K", NULL, 0, 0, "a kind", kinds, 0},
	OPT_SPEC_LANG(demo_opts, lang, "a language"),
	OPT_SPEC_MEMO(demo_opts, memo),
	OPT_SPEC_LEXICONS(demo_opts, setup),
	{"output", OPT_STR, offsetof(demo_opts, out), "FILE", NULL, 0, 0, "write FILE", NULL, 'o'},
	OPT_SPEC_END,
};

/* Refuses --flag after --name (a command whose options depend on each
 * other or on a subcommand). */
static int admit(const opt_spec *s, void *ov)
{
	const demo_opts *o = ov;
	return !strcmp(s->name, "flag") && o->name ? OPT_MISUSE : 0;
}

static const opt_cmd demo = {"demo", "usage: demo\n\n", demo_specs, admit};

/* Parses the words of line (space-separated) into o. */
static int parse(demo_opts *o, const char *line, int *first)
{
	static char buf[512];
	char *argv[64];
	int argc = 0;
	snprintf(buf, sizeof buf, "demo %s", line);
	for (char *t = strtok(buf, " "); t && argc < 63; t = strtok(NULL, " "))
		argv[argc++] = t;
	argv[argc] = NULL;
	memset(o, 0, sizeof *o);
	FILE *saved = stderr;
	stderr = fopen("/dev/null", "w");
	int r = opt_parse(&demo, o, argc, argv, first);
	fclose(stderr);
	stderr = saved;
	return r;
}

static void test_defaults(void **state)
{
	(void)state;
	demo_opts o;
	int first;
	assert_int_equal(parse(&o, "a b", &first), OPT_RUN);
	assert_int_equal(first, 1);
	assert_int_equal(o.n, 5);
	assert_true(o.top == UINT64_MAX);
	assert_float_equal(o.x, 0.25, 0);
	assert_int_equal(o.memo, OPT_MEMO_MIB);
	assert_int_equal(o.kind, 0);
	assert_string_equal(o.lang, "");
	assert_int_equal(o.flag, 0);
}

static void test_values(void **state)
{
	(void)state;
	demo_opts o;
	int first;
	assert_int_equal(parse(&o, "--flag --flag --name s --n 100 --top 0 --x 1 --kind beta "
				   "--lang fr-BE --memo 0 --lexicons d1 --lexicons d2 file",
			       &first),
			 OPT_RUN);
	assert_int_equal(o.flag, 2);
	assert_string_equal(o.name, "s");
	assert_int_equal(o.n, 100);
	assert_int_equal(o.top, 0);
	assert_float_equal(o.x, 1, 0);
	assert_int_equal(o.kind, 2);
	assert_string_equal(o.lang, "fr");
	assert_int_equal(o.memo, 0);
	assert_int_equal(o.setup.nextra, 2);
	assert_string_equal(o.setup.extra[1], "d2");
	assert_int_equal(first, 21);
}

static void test_refused(void **state)
{
	(void)state;
	demo_opts o;
	int first;
	static const char *const bad[] = {
		"--n 0", "--n 101", "--n -1", "--n +5", "--n 5x", "--n ''", "--n 1e1",
		"--x 1.5", "--x -0.1", "--x nan", "--x 0.5z", "--kind gamma", "--lang !!",
		"--memo 4097", "--unknown", "--n", "-o", "-x", "--name a --flag",
	};
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++)
		if (parse(&o, bad[i], &first) != OPT_MISUSE)
			fail_msg("accepted: %s", bad[i]);
	char many[400] = "";
	for (int i = 0; i < 17; i++)
		strcat(many, "--lexicons d ");
	assert_int_equal(parse(&o, many, &first), OPT_MISUSE);
}

static void test_letter_admit(void **state)
{
	(void)state;
	demo_opts o;
	int first;
	assert_int_equal(parse(&o, "-o f1 a", &first), OPT_RUN);
	assert_string_equal(o.out, "f1");
	assert_int_equal(first, 3);
	assert_int_equal(parse(&o, "--output f2 --flag --name s", &first), OPT_RUN);
	assert_string_equal(o.out, "f2");
	assert_int_equal(o.flag, 1);
	assert_string_equal(o.name, "s");
}

static void test_help(void **state)
{
	(void)state;
	char *text = NULL;
	size_t len = 0;
	FILE *fp = open_memstream(&text, &len);
	opt_help(&demo, fp);
	fclose(fp);
	assert_non_null(strstr(text, "usage: demo\n\n  --flag "));
	assert_non_null(strstr(text, "  --n N                 a count (default 5)\n"));
	assert_non_null(strstr(text, "(default " OPT_XSTR(OPT_MEMO_MIB) ")"));
	assert_null(strstr(text, "no default (default"));
	assert_non_null(strstr(text, "  -o, --output FILE     write FILE\n"));
	assert_non_null(strstr(text, "  -h, --help            show this help\n"));
	for (char *l = text; *l; l = strchr(l, '\n') + 1)
		assert_true(strcspn(l, "\n") <= 79);
	free(text);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_defaults),
		cmocka_unit_test(test_values),
		cmocka_unit_test(test_refused),
		cmocka_unit_test(test_letter_admit),
		cmocka_unit_test(test_help),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

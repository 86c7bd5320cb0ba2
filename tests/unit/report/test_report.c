/* test_report.c - the report's sections on time (src/report/report_trend.c):
 * the rising and fading titles of a trend list handed in, and an
 * occupation section's preferred-label share per period, on two small
 * hand-built windows (tests/unit/rank/trend_fixture.h).
 *
 * Outside reference: Python's html.parser (the python3 Debian ships),
 * through tests/cli/check_html.py, reads the page back: well nested,
 * every chart with its text alternative, every table with a header, and
 * the trend rows it finds are those of the list. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "count/tally.h"
#include "norm/lexicon.h"
#include "norm/norm.h"
#include "rank/labels.h"
#include "rank/propose.h"
#include "rank/trend.h"
#include "report/report.h"

#include "../rank/trend_fixture.h"

/* The text of b from the first occurrence of from up to the next until
 * (NUL-terminated in a static buffer; fails the test when absent). */
static const char *between(const tm_buf *b, const char *from, const char *until)
{
	static char out[1 << 16];
	const char *s = strstr(b->data, from);
	assert_non_null(s);
	const char *e = strstr(s, until);
	assert_non_null(e);
	size_t n = (size_t)(e - s);
	assert_true(n < sizeof out);
	memcpy(out, s, n);
	out[n] = 0;
	return out;
}

/* Runs tests/cli/check_html.py on page b (with mode, or NULL) and
 * returns what it prints. */
static const char *check_html(const tm_buf *b, const char *mode)
{
	char path[] = "/tmp/tm-report-page-XXXXXX";
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, b->data, b->len), (ssize_t)b->len);
	close(fd);
	char cmd[512];
	snprintf(cmd, sizeof cmd, "/usr/bin/python3 tests/cli/check_html.py %s %s", path,
		 mode ? mode : "");
	FILE *p = popen(cmd, "r");
	static char out[4096];
	assert_non_null(p);
	size_t n = fread(out, 1, sizeof out - 1, p);
	out[n] = 0;
	pclose(p);
	remove(path);
	return out;
}

/* One report over the two windows: the trend of B against A, a section
 * for occ:1, the periods x->ps (empty until added). */
typedef struct run {
	trend_bars tb;
	trend_list l;
	report_periods ps;
	propose_bars pb;
	report_opts o;
	tm_buf page, err;
} run;

static void run_start(run *x, const char *before, const char *after)
{
	static char *const occs[] = {"occ:1"};
	memset(x, 0, sizeof *x);
	trend_bars_default(&x->tb);
	assert_int_equal(trend_run(&B, &A, &LS, &x->tb, NULL, &x->l), 0);
	assert_true(x->l.n >= 2);
	propose_bars_default(&x->pb);
	x->o.occs = occs;
	x->o.nocc = 1;
	x->o.sections = 10;
	x->o.min_postings = 1;
	x->o.bars = &x->pb;
	x->o.top = 100;
	x->o.version = "test";
	x->o.trend = &x->l;
	x->o.trend_bars = &x->tb;
	x->o.trend_before = before;
	x->o.trend_after = after;
	x->o.periods = &x->ps;
}

/* Writes the page afresh (NUL-terminated); checks its structure. */
static void run_write(run *x)
{
	buf_reset(&x->page);
	assert_int_equal(report_write(&A, &LS, &x->o, &x->page, &x->err), 0);
	assert_int_equal(buf_putc(&x->page, 0), 0);
	x->page.len--;
	assert_string_equal(check_html(&x->page, NULL), "ok\n");
}

static void run_end(run *x)
{
	trend_list_free(&x->l);
	report_periods_free(&x->ps);
	report_periods_free(&x->ps); /* a freed list frees again */
	buf_free(&x->page);
	buf_free(&x->err);
}

static void test_time(void **state)
{
	(void)state;
	run x;
	run_start(&x, "January 2026", "February 2026");
	/* the later period first, and the undated postings: drawn in period
	 * order, the undated left out */
	assert_int_equal(report_periods_add(&x.ps, "2026-02", &A, &LS, NULL), 0);
	assert_int_equal(report_periods_add(&x.ps, "2026-01", &B, &LS, NULL), 0);
	assert_int_equal(report_periods_add(&x.ps, "", &A, &LS, NULL), 0);
	assert_int_equal(x.ps.n, 8);
	run_write(&x);

	/* the trend section: in the contents, both directions, the windows
	 * in words, the rows those of the list */
	assert_non_null(strstr(x.page.data, "<a href=\"#trend\">"));
	assert_non_null(strstr(x.page.data, "between January 2026 and February 2026"));
	const char *rising = between(&x.page, "id=\"trend-rising\"", "</table>");
	assert_non_null(strstr(rising, "lagerlogistiker"));
	assert_null(strstr(rising, "kuechenhilfe"));
	const char *falling = between(&x.page, "id=\"trend-falling\"", "</table>");
	/* a label as the taxonomy writes it */
	assert_non_null(strstr(falling, "Kuechenhilfe"));
	assert_non_null(strstr(falling, "alternative label"));
	tm_buf want = {0};
	for (size_t i = 0; i < x.l.n; i++) {
		const trend_row *t = &x.l.v[i];
		const char *title = t->lb ? lab_str(&LS, t->lb->text) : t->title;
		int tl = (int)(t->lb ? t->lb->textlen : t->tl);
		buf_printf(&want, "%s\t%.*s\t%s\t%.*s\t%llu\t%llu\t%.4f\n",
			   trend_direction_names[t->direction], (int)t->ol, t->occ, t->lang,
			   tl, title, (unsigned long long)t->before,
			   (unsigned long long)t->after, t->g2);
	}
	assert_int_equal(buf_putc(&want, 0), 0);
	assert_string_equal(check_html(&x.page, "trend"), want.data);
	buf_free(&want);

	/* occ:1's section draws its preferred label's share per period:
	 * lagerist 50 of 100 in January, 20 of 100 in February */
	const char *series = between(&x.page, "id=\"chart-time-1\"", "</figure>");
	const char *jan = strstr(series, "<td>2026-01</td><td>50.0\xC2\xA0%</td>");
	const char *feb = strstr(series, "<td>2026-02</td><td>20.0\xC2\xA0%</td>");
	assert_non_null(jan);
	assert_non_null(feb);
	assert_true(jan < feb);
	assert_null(strstr(series, "<tr><td></td>"));
	/* one section only, one series */
	assert_null(strstr(x.page.data, "id=\"chart-time-2\""));
	/* the bars in "How to read" */
	assert_non_null(strstr(x.page.data, "at least 10.83 (chance"));

	/* the same period added twice sums */
	assert_int_equal(report_periods_add(&x.ps, "2026-01", &B, &LS, NULL), 0);
	run_write(&x);
	series = between(&x.page, "id=\"chart-time-1\"", "</figure>");
	assert_non_null(strstr(series, "<td>2026-01</td><td>50.0\xC2\xA0%</td><td>"));
	assert_non_null(strstr(series, "</td><td>200</td></tr>"));

	/* without them: neither the section nor the chart */
	x.o.trend = NULL;
	x.o.periods = NULL;
	run_write(&x);
	assert_null(strstr(x.page.data, "id=\"trend\""));
	assert_null(strstr(x.page.data, "#trend"));
	assert_null(strstr(x.page.data, "chart-time"));

	run_end(&x);
}

/* Hostile text in a trend row (as a title, an occupation and a period
 * may hold it) is escaped: the page keeps its structure, no element of
 * the text survives, no bidirectional override reaches the page. */
static void test_hostile(void **state)
{
	(void)state;
	run x;
	static const char title[] = "<script>alert(1)</script> \"Lager\" & <img src=x onerror=y>"
				    "\xE2\x80\xAE" "gnal";
	static const char occ[] = "occ:<b onmouseover=z>";

	run_start(&x, "<u>before</u>", "after\xE2\x80\xAE");
	x.l.v[0].title = title;
	x.l.v[0].tl = sizeof title - 1;
	x.l.v[0].occ = occ;
	x.l.v[0].ol = sizeof occ - 1;
	assert_int_equal(report_periods_add(&x.ps, "2026-01\xE2\x80\xAE<i>", &B, &LS, NULL), 0);
	run_write(&x);
	const char *el = check_html(&x.page, "elements");
	assert_null(strstr(el, "img\n"));
	assert_null(strstr(el, "\nb\n"));
	assert_null(strstr(el, "\ni\n"));
	assert_null(strstr(el, "\nu\n"));
	assert_null(strstr(x.page.data, "\xE2\x80\xAE"));
	assert_non_null(strstr(x.page.data, "&lt;script&gt;alert(1)&lt;/script&gt;"));
	run_end(&x);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_time),
		cmocka_unit_test(test_hostile),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}

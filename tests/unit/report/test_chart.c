/* test_chart.c - HTML text that no input turns into markup (io/htmlw.h)
 * and the report's SVG charts (report/chart.h).
 *
 * Outside reference: Python's html.parser (the python3 Debian ships)
 * reads each chart back, run by the test: the elements it finds are
 * exactly those the chart draws, whatever the names hold. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include <cmocka.h>

#include "io/htmlw.h"
#include "report/chart.h"

static tm_buf EB;

static const char *esc(const char *s, size_t n, size_t max)
{
	buf_reset(&EB);
	assert_int_equal(html_text(&EB, s, n, max), TM_OK);
	assert_int_equal(buf_putc(&EB, 0), TM_OK);
	return EB.data;
}

static void test_escape(void **state)
{
	(void)state;
	assert_string_equal(esc("<script>alert('x')</script> & \"y\"", 33, 0),
			    "&lt;script&gt;alert(&#39;x&#39;)&lt;/script&gt; &amp; &quot;y&quot;");
	/* a right-to-left override, a first-strong isolate, a C1 control, an
	 * ill-formed byte and a NUL each become U+FFFD */
	assert_string_equal(esc("a\xE2\x80\xAE" "b\xE2\x81\xA8" "c\xC2\x85" "d\xFF" "e\0f", 16, 0),
			    "a\xEF\xBF\xBD" "b\xEF\xBF\xBD" "c\xEF\xBF\xBD" "d\xEF\xBF\xBD"
			    "e\xEF\xBF\xBD" "f");
	/* a cut counts code points, not bytes */
	assert_string_equal(esc("Bäckerin", 9, 4), "Bäck\xE2\x80\xA6");
	assert_string_equal(esc("Bäckerin", 9, 8), "Bäckerin");
	assert_int_equal(html_width("Bäckerin", 9), 8);
	assert_int_equal(html_width("\xE2\x82", 2), 2); /* a cut sequence: two bytes, two */
	assert_string_equal(esc("\xE2\x82", 2, 0), "\xEF\xBF\xBD\xEF\xBF\xBD");
	buf_free(&EB);
}

/* The start tags Python's html.parser finds in b, one per line, with
 * the attributes that could run code or fetch something flagged. */
static char *parse(const tm_buf *b)
{
	char path[] = "/tmp/tm-chart-XXXXXX";
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	assert_int_equal(write(fd, b->data, b->len), (ssize_t)b->len);
	close(fd);
	char cmd[512];
	snprintf(cmd, sizeof cmd,
		 "/usr/bin/python3 -c '\n"
		 "import sys\n"
		 "from html.parser import HTMLParser\n"
		 "class P(HTMLParser):\n"
		 "    def handle_starttag(self, t, a):\n"
		 "        bad = [k for k, v in a if k.startswith(\"on\") or k in (\"href\", \"src\")]\n"
		 "        print(t + (\" BAD\" if bad else \"\"))\n"
		 "p = P()\n"
		 "p.feed(open(sys.argv[1], encoding=\"utf-8\").read())\n"
		 "p.close()\n' %s | sort | uniq -c | tr -s ' ' | tr '\\n' ';'",
		 path);
	FILE *p = popen(cmd, "r");
	static char out[1024];
	assert_non_null(p);
	size_t n = fread(out, 1, sizeof out - 1, p);
	out[n] = 0;
	assert_int_equal(pclose(p), 0);
	remove(path);
	return out;
}

static void test_rows(void **state)
{
	(void)state;
	static const char evil[] = "<img src=x onerror=alert(1)>\"><script>x</script>";
	chart_row rows[] = {
		{"Lagerist", 8, 0.62, 0.55, 0.69, NULL},
		{evil, sizeof evil - 1, 0.10, 0.05, 0.2, "unseen"},
		{"Staplerfahrer", 13, 0.0 / 0.0, -1, 2, NULL}, /* drawn inside 0-100 % */
	};
	tm_buf b = {0};
	assert_int_equal(chart_rows(&b, "c1", CHART_BARS, "Labels of occ:1 <de>", "Each label's share",
				    "share", rows, 3), TM_OK);
	assert_non_null(strstr(b.data, "role=\"img\""));
	assert_non_null(strstr(b.data, "<title id=\"c1-t\">Labels of occ:1 &lt;de&gt;</title>"));
	assert_non_null(strstr(b.data, "62.0\xC2\xA0%</text>"));
	assert_non_null(strstr(b.data, "10.0\xC2\xA0% (unseen)"));
	assert_null(strstr(b.data, "nan"));
	/* three bars with their whiskers (three lines each) over a grid of
	 * five, three rows in the table, and nothing the names brought */
	assert_string_equal(parse(&b), " 1 caption; 1 desc; 1 details; 1 figcaption; 1 figure; 3 g;"
			    " 14 line; 3 rect; 1 summary; 1 svg; 1 table; 1 tbody; 12 td; 11 text;"
			    " 4 th; 1 thead; 1 title; 4 tr;");
	buf_reset(&b);
	assert_int_equal(chart_rows(&b, "c2", CHART_DOTS, "t", "d", "coverage", rows, 3), TM_OK);
	assert_non_null(strstr(parse(&b), " 3 circle;"));
	assert_null(strstr(parse(&b), " rect;"));
	/* shares without intervals: the bars, the grid's five lines and no
	 * whisker, a table of name, share and note */
	buf_reset(&b);
	assert_int_equal(chart_rows(&b, "c3", CHART_SHARES, "t", "d", "shared", rows, 3), TM_OK);
	assert_non_null(strstr(parse(&b), " 5 line; 3 rect;"));
	assert_non_null(strstr(parse(&b), " 3 th;"));
	assert_null(strstr(b.data, "interval"));
	buf_free(&b);
}

static void test_series(void **state)
{
	(void)state;
	chart_point p[30];
	char names[30][12];
	for (int i = 0; i < 30; i++) {
		snprintf(names[i], sizeof names[i], "2026-W%02d", i + 1);
		p[i] = (chart_point){names[i], i / 30.0, i / 40.0, i / 25.0, 100u + (unsigned)i};
	}
	tm_buf b = {0};
	assert_int_equal(chart_series(&b, "s1", "Share over weeks", "Rising", p, 30), TM_OK);
	/* 30 dots and a period name on every third (at most about twelve) and
	 * the last; the table keeps all 30 */
	const char *tags = parse(&b);
	assert_non_null(strstr(tags, " 30 circle;"));
	assert_non_null(strstr(tags, " 31 tr;"));
	assert_non_null(strstr(tags, " 1 polygon; 1 polyline;"));
	assert_non_null(strstr(b.data, ">2026-W30</text>"));
	assert_null(strstr(b.data, ">2026-W02</text>"));
	buf_reset(&b);
	assert_int_equal(chart_series(&b, "s2", "One", "One period", p, 1), TM_OK);
	assert_non_null(strstr(parse(&b), " 1 circle;"));
	buf_reset(&b);
	assert_int_equal(chart_series(&b, "s3", "None", "No period", p, 0), TM_OK);
	assert_null(strstr(parse(&b), "circle"));
	buf_free(&b);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_escape),
		cmocka_unit_test(test_rows),
		cmocka_unit_test(test_series),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

/* Unit tests for the meeting of the labels' ids and the postings' codes
 * (src/rank/labels.c): local names, and the id map's codes. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cmocka.h>

#include "rank/labels.h"

static void local_is(const char *id, const char *want)
{
	size_t n;
	const char *l = labels_local_name(id, strlen(id), &n);
	assert_int_equal(n, strlen(want));
	assert_memory_equal(l, want, n);
}

static void test_local_name(void **state)
{
	(void)state;
	local_is("http://taxonomy.example/occ/0001", "0001");
	local_is("http://taxonomy.example/occ/0001/", "0001");
	local_is("http://taxonomy.example/scheme#0001", "0001");
	local_is("http://taxonomy.example/a/b#frag/x", "frag/x"); /* a fragment may hold '/' */
	local_is("occ/0001", "0001");
	local_is("occ:0001", "occ:0001");  /* no '/' nor '#': the whole id */
	local_is("/", "/");
	local_is("a/", "a");
	local_is("x#", "x#");      /* never an empty name */
	local_is("http://x/#", "http://x/#");
}

static void test_codes_share_a_local_name(void **state)
{
	labels_idmap m;
	size_t n;
	(void)state;
	memset(&m, 0, sizeof m);
	m.local = 1;
	assert_int_equal(labels_idmap_code(&m, "occ/0001", 8), 0);
	assert_int_equal(labels_idmap_code(&m, "legacy/0001", 11), 0);
	assert_int_equal(labels_idmap_code(&m, "occ/0002", 8), 0);
	assert_int_equal(labels_idmap_code(&m, "occ/0001", 8), 0); /* again: no clash */
	assert_int_equal(m.shared, 1);
	const char *a = st_key(&m.codes, m.shared_a, &n);
	assert_memory_equal(a, "occ/0001", n);
	const char *b = st_key(&m.codes, m.shared_b, &n);
	assert_memory_equal(b, "legacy/0001", n);
	labels_idmap_free(&m);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_local_name),
		cmocka_unit_test(test_codes_share_a_local_name),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

/* test_chunk.c - the store's own hash and the chunks' digests stay what
 * stores already hold: an id claimed by an earlier load is looked up in
 * the shard chunk_hash gave it then, and a ledger or a journal names a
 * chunk by the digest it had then.  A change here would count an id or a
 * chunk a second time in a store written before it. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <string.h>

#include <cmocka.h>

#include "count/chunk.h"

/* FNV-1a, 64 bits, with its high bits folded in as chunk_hash does. */
static uint64_t folded(uint64_t h)
{
	return h ^ (h >> 29);
}

static void test_store_hash(void **state)
{
	(void)state;
	/* FNV-1a 64 of "", "a" and "foobar": the test vectors of the FNV
	 * authors' reference code (from memory; the same values from a
	 * separate Python computation) */
	assert_true(chunk_hash("", 0) == folded(0xCBF29CE484222325ULL));
	assert_true(chunk_hash("a", 1) == folded(0xAF63DC4C8601EC8CULL));
	assert_true(chunk_hash("foobar", 6) == folded(0x85944171F73967E8ULL));
	/* the shards of a posting id and of a (language, key) field, as
	 * stores hold them */
	assert_int_equal(chunk_hash("40100002", 8) % 64, 33);
	assert_int_equal(chunk_hash("de\x1fingenieur", 12) % 64, 25);
}

/* The digest of a one-posting input, without periods and by month: the
 * values every build has given since periods came (a store's ledgers
 * and journals hold them). */
static void test_digest_pinned(void **state)
{
	(void)state;
	posting p;
	memset(&p, 0, sizeof p);
	p.id = "40100002";
	p.idlen = 8;
	strcpy(p.lang, "fr");
	p.title = "Ingénieur télécoms H/F";
	p.titlelen = strlen(p.title);
	p.date = "2026-03-01";
	p.datelen = 10;
	p.occ[0] = "occ:2153";
	p.occlen[0] = 8;
	p.nocc = 1;
	const uint64_t want[2][2] = {{0xd709d8c2e32a86b1ULL, 0x7dc5eea59f137876ULL},
				     {0xccd904714c5d2dd9ULL, 0xa1b2712251a57bd0ULL}};
	for (int kind = 0; kind < 2; kind++) {
		uint64_t dg[2];
		chunk_digest_start(dg, kind ? PERIOD_MONTH : PERIOD_NONE);
		chunk_digest_posting(dg, &p);
		chunk_digest_next(dg);
		assert_true(dg[0] == want[kind][0]);
		assert_true(dg[1] == want[kind][1]);
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_store_hash),
		cmocka_unit_test(test_digest_pinned),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

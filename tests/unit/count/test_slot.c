/* Unit tests for the Redis Cluster hash slots (src/count/slot.c).
 *
 * The CRC16 check value is the one the Redis Cluster specification gives
 * for its CRC16 (XMODEM): "123456789" -> 0x31C3.  The hash tag cases are
 * the specification's own examples ({user1000}.following and
 * {user1000}.followers share a slot; foo{}{bar} hashes the whole key;
 * foo{{bar}}zap hashes "{bar"; foo{bar}{zap} hashes "bar").  The slots of
 * thousands of keys are checked against a server's CLUSTER KEYSLOT in
 * tests/cli/cluster.sh, through "test_slot --print". */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cmocka.h>

#include "count/slot.h"

static unsigned slot(const char *k)
{
	return slot_of(k, strlen(k));
}

static void test_check_value(void **state)
{
	(void)state;
	assert_int_equal(slot_crc16("123456789", 9), 0x31C3);
	assert_int_equal(slot_crc16("", 0), 0);
}

static void test_hash_tags(void **state)
{
	(void)state;
	assert_int_equal(slot("{user1000}.following"), slot("{user1000}.followers"));
	assert_int_equal(slot("{user1000}.following"), slot("user1000"));
	assert_int_equal(slot("foo{}{bar}"), slot_crc16("foo{}{bar}", 10) % 16384);
	assert_int_equal(slot("foo{{bar}}zap"), slot("{bar"));
	assert_int_equal(slot("foo{bar}{zap}"), slot("bar"));
	assert_int_equal(slot("{"), slot_crc16("{", 1) % 16384);
	assert_int_equal(slot("no}tag{"), slot_crc16("no}tag{", 7) % 16384);
	/* our own layout: one occupation's keys share a slot */
	assert_int_equal(slot("titlemill:{o:occ:5223}:f"), slot("titlemill:{o:occ:5223}:x"));
}

int main(int argc, char **argv)
{
	if (argc > 1 && !strcmp(argv[1], "--print")) {
		/* one key a line in, its slot out */
		char line[4096];
		while (fgets(line, sizeof line, stdin)) {
			size_t n = strcspn(line, "\n");
			printf("%u\n", slot_of(line, n));
		}
		return 0;
	}
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_check_value),
		cmocka_unit_test(test_hash_tags),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}

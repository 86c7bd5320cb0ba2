/* slot.c - CRC16 and the hash slot of a key. */
#include "count/slot.h"

#include <string.h>

uint16_t slot_crc16(const char *s, size_t n)
{
	uint16_t crc = 0;
	for (size_t i = 0; i < n; i++) {
		crc ^= (uint16_t)((unsigned char)s[i] << 8);
		for (int b = 0; b < 8; b++)
			crc = crc & 0x8000 ? (uint16_t)((crc << 1) ^ 0x1021) : (uint16_t)(crc << 1);
	}
	return crc;
}

unsigned slot_of(const char *key, size_t n)
{
	const char *open = memchr(key, '{', n);
	if (open) {
		const char *close = memchr(open + 1, '}', n - (size_t)(open + 1 - key));
		if (close && close > open + 1)
			return slot_crc16(open + 1, (size_t)(close - open - 1)) & (SLOT_COUNT - 1);
	}
	return slot_crc16(key, n) & (SLOT_COUNT - 1);
}

/* slot.h - Redis Cluster hash slots, as the Redis Cluster specification
 * defines them: CRC16 (XMODEM: polynomial 0x1021, initial value 0, no
 * reflection) of the key, or of its hash tag (the bytes between the
 * first '{' and the first '}' after it, when there is at least one),
 * modulo 16384. */
#ifndef TM_SLOT_H
#define TM_SLOT_H

#include <stddef.h>
#include <stdint.h>

#define SLOT_COUNT 16384

uint16_t slot_crc16(const char *s, size_t n);
unsigned slot_of(const char *key, size_t n);

#endif

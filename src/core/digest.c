/* digest.c - a fast 64-bit hash (four lanes of multiply-rotate over
 * 32-byte blocks, the shape of the xxHash family) and a digest of two. */
#include "core/digest.h"

#include <string.h>

#define P1 0x9E3779B185EBCA87ULL
#define P2 0xC2B2AE3D27D4EB4FULL
#define P3 0x165667B19E3779F9ULL
#define P4 0x85EBCA77C2B2AE63ULL
#define P5 0x27D4EB2F165667C5ULL

uint64_t dg_fnv(const void *p, size_t n)
{
	const unsigned char *s = p;
	uint64_t h = 0xCBF29CE484222325ULL;

	for (size_t i = 0; i < n; i++) {
		h ^= s[i];
		h *= 0x100000001B3ULL;
	}
	return h ^ (h >> 29);
}

static inline uint64_t rotl(uint64_t x, int r)
{
	return x << r | x >> (64 - r);
}

static inline uint64_t rd64(const unsigned char *p)
{
	uint64_t v;
	memcpy(&v, p, 8);
#if defined(__BYTE_ORDER__) && __BYTE_ORDER__ == __ORDER_BIG_ENDIAN__
	v = __builtin_bswap64(v);
#endif
	return v;
}

static inline uint64_t round64(uint64_t acc, uint64_t in)
{
	acc += in * P2;
	acc = rotl(acc, 31);
	return acc * P1;
}

static inline uint64_t merge(uint64_t acc, uint64_t v)
{
	acc ^= round64(0, v);
	return acc * P1 + P4;
}

uint64_t dg_hash(const void *data, size_t n, uint64_t seed)
{
	const unsigned char *p = data, *end = p + n;
	uint64_t h;

	if (n >= 32) {
		uint64_t v1 = seed + P1 + P2, v2 = seed + P2, v3 = seed, v4 = seed - P1;
		const unsigned char *lim = end - 32;
		do {
			v1 = round64(v1, rd64(p));
			v2 = round64(v2, rd64(p + 8));
			v3 = round64(v3, rd64(p + 16));
			v4 = round64(v4, rd64(p + 24));
			p += 32;
		} while (p <= lim);
		h = rotl(v1, 1) + rotl(v2, 7) + rotl(v3, 12) + rotl(v4, 18);
		h = merge(h, v1);
		h = merge(h, v2);
		h = merge(h, v3);
		h = merge(h, v4);
	} else
		h = seed + P5;
	h += (uint64_t)n;
	for (; p + 8 <= end; p += 8)
		h = rotl(h ^ round64(0, rd64(p)), 27) * P1 + P4;
	for (; p < end; p++)
		h = rotl(h ^ (*p * P5), 11) * P1;
	h ^= h >> 33;
	h *= P2;
	h ^= h >> 29;
	h *= P3;
	h ^= h >> 32;
	return h;
}

void dg_init(dg_state *d)
{
	d->a = 0x7469746C656D696CULL;
	d->b = 0x6C657863616368ULL;
}

void dg_add(dg_state *d, const void *p, size_t n)
{
	d->a = dg_hash(p, n, d->a) ^ rotl(d->a, 17);
	d->b = dg_hash(p, n, d->b ^ P3) ^ rotl(d->b, 29);
}

void dg_final(const dg_state *d, unsigned char out[16])
{
	for (int i = 0; i < 8; i++) {
		out[i] = (unsigned char)(d->a >> (8 * i));
		out[8 + i] = (unsigned char)(d->b >> (8 * i));
	}
}

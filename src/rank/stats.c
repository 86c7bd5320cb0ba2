/* stats.c - Wilson score intervals. */
#include "rank/stats.h"

#include <math.h>

void wilson(uint64_t k, uint64_t n, double z, double *lo, double *hi)
{
	double kn, nn, z2, c, d, r;

	if (n == 0 || k > n) {
		*lo = 0;
		*hi = 1;
		return;
	}
	kn = (double)k;
	nn = (double)n;
	z2 = z * z;
	c = 2 * kn + z2;
	r = z * sqrt(z2 + 4 * kn * (nn - kn) / nn);
	d = 2 * (nn + z2);
	*lo = k == 0 ? 0 : (c - r) / d;
	*hi = k == n ? 1 : (c + r) / d;
}

static double xlx(double k, double n, double r, double c)
{
	return k > 0 ? k * log(k * n / (r * c)) : 0;
}

double g2(uint64_t k11, uint64_t k12, uint64_t k21, uint64_t k22)
{
	double a = (double)k11, b = (double)k12, c = (double)k21, d = (double)k22;
	double n = a + b + c + d, r1 = a + b, r2 = c + d, c1 = a + c, c2 = b + d;
	double v;
	if (n == 0 || r1 == 0 || r2 == 0 || c1 == 0 || c2 == 0)
		return 0;
	v = 2 * (xlx(a, n, r1, c1) + xlx(b, n, r1, c2) + xlx(c, n, r2, c1) + xlx(d, n, r2, c2));
	return v < 0 ? 0 : v;
}

/* Code points of a UTF-8 string into out (at most cap); returns count. */
static size_t cps(const char *s, size_t n, uint32_t *out, size_t cap)
{
	size_t i = 0, k = 0;
	while (i < n && k < cap) {
		unsigned char c = (unsigned char)s[i];
		uint32_t cp;
		size_t l = c < 0x80 ? 1 : c < 0xE0 ? 2 : c < 0xF0 ? 3 : 4;
		if (i + l > n)
			l = n - i;
		cp = c;
		if (l > 1) {
			cp = c & (0xFF >> (l + 1));
			for (size_t j = 1; j < l; j++)
				cp = (cp << 6) | ((unsigned char)s[i + j] & 0x3F);
		}
		out[k++] = cp;
		i += l;
	}
	return k;
}

int levenshtein(const char *a, size_t an, const char *b, size_t bn, int max)
{
	uint32_t x[128], y[128];
	int row[129], prev[129];
	size_t n = cps(a, an, x, 128), m = cps(b, bn, y, 128);

	if ((n > m ? n - m : m - n) > (size_t)max)
		return max + 1;
	for (size_t j = 0; j <= m; j++)
		prev[j] = (int)j;
	for (size_t i = 1; i <= n; i++) {
		int best = row[0] = (int)i;
		for (size_t j = 1; j <= m; j++) {
			int del = prev[j] + 1, ins = row[j - 1] + 1,
			    sub = prev[j - 1] + (x[i - 1] != y[j - 1]);
			row[j] = del < ins ? (del < sub ? del : sub) : (ins < sub ? ins : sub);
			if (row[j] < best)
				best = row[j];
		}
		if (best > max)
			return max + 1;
		for (size_t j = 0; j <= m; j++)
			prev[j] = row[j];
	}
	return prev[m] > max ? max + 1 : prev[m];
}

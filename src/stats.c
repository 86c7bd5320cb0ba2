/* stats.c - Wilson score intervals. */
#include "stats.h"

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

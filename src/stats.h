/* stats.h - the statistics the ranker prints, by their published names.
 * Every function is pure. */
#ifndef TM_STATS_H
#define TM_STATS_H

#include <stdint.h>

/* z for a two-sided 95 % interval (the 0.975 quantile of the normal). */
#define STATS_Z95 1.959963984540054

/* Wilson score interval for k successes in n trials (Wilson 1927):
 * (2k + z^2 -+ z sqrt(z^2 + 4k(n-k)/n)) / (2(n + z^2)); the lower bound
 * is 0 when k = 0 and the upper 1 when k = n.  n = 0 gives [0, 1]. */
void wilson(uint64_t k, uint64_t n, double z, double *lo, double *hi);

#endif

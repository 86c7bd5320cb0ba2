/* stats.h - the statistics the ranker prints, by their published names.
 * Every function is pure. */
#ifndef TM_STATS_H
#define TM_STATS_H

#include <stddef.h>
#include <stdint.h>

/* z for a two-sided 95 % interval (the 0.975 quantile of the normal). */
#define STATS_Z95 1.959963984540054

/* Wilson score interval for k successes in n trials (Wilson 1927):
 * (2k + z^2 -+ z sqrt(z^2 + 4k(n-k)/n)) / (2(n + z^2)); the lower bound
 * is 0 when k = 0 and the upper 1 when k = n.  n = 0 gives [0, 1]. */
void wilson(uint64_t k, uint64_t n, double z, double *lo, double *hi);

/* Dunning's log-likelihood ratio G^2 for the 2x2 table (k11 k12 / k21
 * k22) (Dunning 1993): 2 sum k ln(k N / (row col)), with 0 ln 0 = 0. */
double g2(uint64_t k11, uint64_t k12, uint64_t k21, uint64_t k22);

/* The chi-square critical value with 1 degree of freedom at p = 0.001
 * (handbook tables; scipy chi2.isf(0.001, 1) = 10.827566). */
#define STATS_CHI2_1DF_P001 10.827566

/* Levenshtein edit distance between two strings of code points (UTF-8
 * in), stopping early when it passes max (returns max + 1 then). */
int levenshtein(const char *a, size_t an, const char *b, size_t bn, int max);

#endif

"""Writes random 2x2 tables with their G2 from scipy (Debian's
python3-scipy: chi2_contingency(t, correction=False,
lambda_="log-likelihood")) for tests/unit/rank/test_stats.c.  A fixed seed, so
the cases are the same on every run; tables with an empty row or column
are left out (scipy refuses them)."""
import random
import sys
from scipy.stats import chi2_contingency

rnd = random.Random(1993)
out = open(sys.argv[1], "w")
n = 0
while n < 500:
    scale = rnd.choice([10, 100, 1000, 100000])
    t = [[rnd.randrange(scale), rnd.randrange(scale)], [rnd.randrange(scale), rnd.randrange(scale * 10)]]
    if min(t[0][0] + t[0][1], t[1][0] + t[1][1], t[0][0] + t[1][0], t[0][1] + t[1][1]) == 0:
        continue
    g = chi2_contingency(t, correction=False, lambda_="log-likelihood")[0]
    out.write("%d %d %d %d %.10g\n" % (t[0][0], t[0][1], t[1][0], t[1][1], g))
    n += 1

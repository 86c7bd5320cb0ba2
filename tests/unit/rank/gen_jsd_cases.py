"""Writes pairs of count vectors with their Jensen-Shannon divergence in
bits from scipy (Debian's python3-scipy:
scipy.spatial.distance.jensenshannon(p, q, base=2), squared: scipy gives
the distance, the square root of the divergence) and their shared mass
sum(min(p, q)), for tests/unit/rank/test_overlap.c.  Random vectors,
identical ones (one a multiple of the other), disjoint ones, ones that
share a single key, and counts of very different sizes.  A fixed seed:
the same cases on every run.  Line: N a1..aN b1..bN divergence shared."""
import random
import sys
from scipy.spatial.distance import jensenshannon

rnd = random.Random(1991)
out = open(sys.argv[1], "w")
for i in range(400):
    n = rnd.randint(1, 40)
    shape = i % 5
    a = [rnd.choice([0, 0, rnd.randint(1, 10 ** rnd.randint(1, 6))]) for _ in range(n)]
    if not any(a):
        a[rnd.randrange(n)] = rnd.randint(1, 100)
    if shape == 0:                      # identical proportions
        m = rnd.randint(1, 50)
        b = [m * x for x in a]
    elif shape == 1:                    # disjoint
        b = [0 if x else rnd.randint(0, 1000) for x in a]
        if not any(b):
            a.append(0)
            b.append(rnd.randint(1, 9))
            n += 1
    elif shape == 2:                    # one key in common
        k = next(j for j, x in enumerate(a) if x)
        b = [0] * n
        b[k] = rnd.randint(1, 10 ** 6)
        a.append(0)
        b.append(rnd.randint(1, 10 ** 6))
        n += 1
    else:                               # random
        b = [rnd.choice([0, rnd.randint(1, 10 ** rnd.randint(1, 9))]) for _ in range(n)]
        if not any(b):
            b[rnd.randrange(n)] = 1
    ta, tb = sum(a), sum(b)
    d = jensenshannon(a, b, base=2) ** 2
    s = sum(min(x / ta, y / tb) for x, y in zip(a, b))
    out.write("%d %s %s %.17g %.17g\n" % (n, " ".join(map(str, a)), " ".join(map(str, b)), d, s))

"""Invariants of titlemill norm.

For 20,000 lines of random bytes (a fixed-seed generator, so a failure
can be replayed), for random mixes of the case table's words and
punctuation, and for every raw title of tests/cases/norm.tsv:
- as many lines come out as went in;
- every output line is valid UTF-8;
- norm of the output is the output itself (idempotence), for the
  default, --key and a --lang run (for random bytes, the title only).
"""
import subprocess
import sys

exe, here = sys.argv[1], sys.argv[2]
failures = 0


def run(args, data):
    r = subprocess.run([exe, "norm"] + args, input=data, capture_output=True)
    if r.returncode != 0:
        raise SystemExit("titlemill norm %s exited %d: %s" % (args, r.returncode, r.stderr[:300]))
    return r.stdout


def xorshift(seed):
    x = seed
    while True:
        x ^= (x << 13) & 0xFFFFFFFFFFFFFFFF
        x ^= x >> 7
        x ^= (x << 17) & 0xFFFFFFFFFFFFFFFF
        yield x


def check(label, lines, args, idem=True):
    global failures
    data = b"".join(l + b"\n" for l in lines)
    out = run(args, data)
    got = out.split(b"\n")[:-1]
    if len(got) != len(lines):
        print("  %s: %d lines in, %d out" % (label, len(lines), len(got)))
        failures += 1
        return
    bad = 0
    for g in got:
        try:
            g.decode("utf-8")
        except UnicodeDecodeError:
            bad += 1
    if bad:
        print("  %s: %d output lines are not UTF-8" % (label, bad))
        failures += 1
    if not idem:
        print("  %s: %d lines" % (label, len(lines)))
        return
    again = run(args, out).split(b"\n")[:-1]
    diff = [(a, b) for a, b in zip(got, again) if a != b]
    for a, b in diff[:10]:
        print("  %s: not idempotent: %r -> %r" % (label, a.decode(errors="replace"),
                                                  b.decode(errors="replace")))
    if diff:
        failures += 1
    print("  %s: %d lines, %d not idempotent" % (label, len(lines), len(diff)))


rnd = xorshift(0x9E3779B97F4A7C15)
random_lines = []
for i in range(20000):
    n = next(rnd) % 80
    b = bytes((next(rnd) >> 11) & 0xFF for _ in range(n))
    random_lines.append(b.replace(b"\n", b" "))

rows = open(here + "/norm.tsv", encoding="utf-8").read().split("\n")
head = rows[0].split("\t")
ri = head.index("raw")
raws = [r.split("\t")[ri].encode() for r in rows[1:] if r and not r.startswith("#")]

# random mixes of the table's own words and separators
words = sorted(set(w for r in raws for w in r.split()))
seps = [b" ", b" - ", b", ", b" / ", b"/", b"(", b")", b" | ", b"-", b"*", b":", b" & "]
mixes = []
for i in range(20000):
    n = 1 + next(rnd) % 8
    parts = []
    for _ in range(n):
        parts.append(words[next(rnd) % len(words)])
        parts.append(seps[next(rnd) % len(seps)])
    mixes.append(b"".join(parts))

check("random bytes", random_lines, [])
# the key of random bytes can glue symbols to letters the tokeniser then
# reads apart ("v#" + "ݐ"): only the line count and UTF-8 are checked
check("random bytes --key", random_lines, ["--key"], idem=False)
check("case table", raws, [])
check("case table --lang de", raws, ["--lang", "de"])
check("case table --key", raws, ["--key"])
check("word mixes", mixes, [])
check("word mixes --lang fr", mixes, ["--lang", "fr"])
sys.exit(1 if failures else 0)

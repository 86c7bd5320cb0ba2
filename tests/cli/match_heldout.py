#!/usr/bin/python3
"""Held-out coding test of titlemill match.

  match_heldout.py TITLEMILL WORKDIR [--count N] [--seed S]

Generates postings (tests/bench/gen_titles.py, every language it knows),
hides the occupations of 5 % of them (every posting whose running number
is 7 modulo 20), counts the rest with titlemill tally and codes the hidden
ones three ways:

  raw       the majority occupation of the same raw title among the
            counted postings (baseline 1)
  key       the majority occupation of the same match key (titlemill norm
            --key with the posting's language) among the counted postings
            (baseline 2)
  match     titlemill match --json --top 3 --min-score 0 with the counts
            and the demo taxonomy (examples/taxonomy.tsv)

A hidden posting is coded right when the occupation given is one of its
occupations; top-3 counts a right one among the first three.  The same is
done again on the hidden titles with one typo each (a letter of the
longest word dropped, doubled or swapped with the next, chosen by the
posting number): titles the counts have not seen.  Prints the table and
exits 1 when match does not beat the key baseline on top-1 with typos or
falls below it without them.
"""
import json
import os
import subprocess
import sys
from collections import Counter, defaultdict

here = os.path.dirname(os.path.abspath(__file__))
root = os.path.dirname(os.path.dirname(here))


def run(args, data=None):
    p = subprocess.run(args, input=data, stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    if p.returncode != 0:
        sys.stderr.write(p.stderr.decode("utf-8", "replace"))
        raise SystemExit("failed: %s" % " ".join(args[:3]))
    return p.stdout


def typo(t, n):
    words = t.split(" ")
    i = max(range(len(words)), key=lambda k: (len(words[k]), -k))
    w = words[i]
    if len(w) < 4:
        return t
    j = 1 + n % (len(w) - 2)
    kind = (n // 7) % 3
    if kind == 0:
        w = w[:j] + w[j + 1:]
    elif kind == 1:
        w = w[:j] + w[j] + w[j:]
    else:
        w = w[:j] + w[j + 1] + w[j] + w[j + 2:]
    words[i] = w
    return " ".join(words)


def majority(c):
    """The most frequent occupation, ties by id; None for no evidence."""
    if not c:
        return None
    return min(c.items(), key=lambda kv: (-kv[1], kv[0]))[0]


def main():
    tm, work = sys.argv[1], sys.argv[2]
    count, seed = 40000, 17
    a = sys.argv[3:]
    if "--count" in a:
        count = int(a[a.index("--count") + 1])
    if "--seed" in a:
        seed = int(a[a.index("--seed") + 1])
    gen = run(["/usr/bin/python3", os.path.join(root, "tests/bench/gen_titles.py"), "--postings",
               "--count", str(count), "--seed", str(seed)])
    lines = gen.decode("utf-8", "surrogateescape").split("\n")
    head, rows = lines[0], [l for l in lines[1:] if l]
    train, hidden = [head], []
    for n, l in enumerate(rows):
        f = l.split("\t")
        if len(f) < 5 or not f[4].strip():
            continue
        if n % 20 == 7:
            hidden.append((n, f[2], set(f[3].split("|")), f[4]))
        else:
            train.append(l)
    tr = os.path.join(work, "train.tsv")
    with open(tr, "wb") as fp:
        fp.write(("\n".join(train) + "\n").encode("utf-8", "surrogateescape"))
    counts = os.path.join(work, "train.counts.tsv")
    labels = os.path.join(root, "examples/taxonomy.tsv")
    run([tm, "tally", "--labels", labels, "-o", counts, tr])

    # the baselines: majority occupation of the raw title, of its key
    by_raw, by_key = defaultdict(Counter), defaultdict(Counter)
    trows = [l.split("\t") for l in train[1:]]

    def keys(items):
        """norm --key of (lang, title) pairs, one call per language."""
        out = [None] * len(items)
        bylang = defaultdict(list)
        for i, (lang, t) in enumerate(items):
            bylang[lang].append(i)
        for lang, idx in sorted(bylang.items()):
            data = "".join(items[i][1].replace("\n", " ") + "\n" for i in idx)
            ks = run([tm, "norm", "--key", "--labels", labels] + (["--lang", lang] if lang != "und" else []),
                     data.encode("utf-8", "surrogateescape")).decode("utf-8").split("\n")
            for i, k in zip(idx, ks):
                out[i] = (lang, k)
        return out

    tkeys = keys([(f[2], f[4]) for f in trows])
    for f, k in zip(trows, tkeys):
        for o in f[3].split("|"):
            by_raw[f[4]][o] += 1
            by_key[k][o] += 1

    results = {}
    for variant in ("seen", "typo"):
        items = [(lang, t if variant == "seen" else typo(t, n)) for n, lang, _, t in hidden]
        hkeys = keys(items)
        inp = "text\tlang\n" + "".join(t.replace("\t", " ").replace("\n", " ") + "\t" + lang + "\n"
                                       for lang, t in items)
        out = run([tm, "match", "--labels", labels, "--counts", counts, "--tsv-input", "--json",
                   "--top", "3", "--min-score", "0"], inp.encode("utf-8", "surrogateescape"))
        answers = [json.loads(l) for l in out.decode("utf-8").split("\n") if l]
        if len(answers) != len(items):
            raise SystemExit("match gave %d lines for %d" % (len(answers), len(items)))
        raw1 = key1 = m1 = m3 = 0
        for (n, lang, truth, _), (_, t), k, ans in zip(hidden, items, hkeys, answers):
            raw1 += majority(by_raw.get(t)) in truth
            key1 += majority(by_key.get(k)) in truth
            cands = [c["occupation"] for c in ans["candidates"]]
            m1 += bool(cands) and cands[0] in truth
            m3 += any(c in truth for c in cands[:3])
        N = len(items)
        results[variant] = (raw1 / N, key1 / N, m1 / N, m3 / N, N)
    print("  held-out coding (%d postings, 5 %% hidden):" % len(rows))
    print("  %-28s %8s %8s %8s %8s" % ("hidden titles", "raw", "key", "match@1", "match@3"))
    for v, label in (("seen", "as posted"), ("typo", "with one typo each")):
        r = results[v]
        print("  %-28s %7.1f%% %7.1f%% %7.1f%% %7.1f%%   (%d)" %
              (label, 100 * r[0], 100 * r[1], 100 * r[2], 100 * r[3], r[4]))
    ok = results["typo"][2] > results["typo"][1] and results["seen"][2] >= results["seen"][1]
    if not ok:
        print("  match does not beat the key baseline")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())

#!/usr/bin/python3
"""Benchmark inputs of titlemill match (tests/bench/match.sh).

  gen_match.py DIR [--labels N] [--titles N] [--queries N]

Writes DIR/labels.tsv (N labels of N/3 invented occupations in en, de, fr,
words made of syllables), DIR/counts.tsv (a counts table of N distinct
counted titles: each a label's words with one or two more words, coded
to one or two occupations) and DIR/queries.txt (raw titles: counted
titles, labels, and both with a typo or an unseen word).  Deterministic:
the same arguments give the same bytes.
"""
import os
import sys

MASK = (1 << 64) - 1


class Rng:
    """splitmix64 (Steele, Lea, Flood 2014)."""

    def __init__(self, seed):
        self.s = seed & MASK

    def next(self):
        self.s = z = (self.s + 0x9E3779B97F4A7C15) & MASK
        z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & MASK
        z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & MASK
        return z ^ (z >> 31)

    def below(self, n):
        return self.next() % n


SYL = ("ka ler ma to ri ste fa hr ber ge in ope ra tor man ag ent tech ni ci an kas "
       "sie rer ver kau fe lo gis ti chef cui si nier vo di re kt bau ar bei").split()
LANGS = ("en", "de", "fr")


def word(r):
    return "".join(SYL[r.below(len(SYL))] for _ in range(2 + r.below(3)))


def main():
    d = sys.argv[1]
    a = sys.argv[2:]
    nl = int(a[a.index("--labels") + 1]) if "--labels" in a else 30000
    nt = int(a[a.index("--titles") + 1]) if "--titles" in a else 1000000
    nq = int(a[a.index("--queries") + 1]) if "--queries" in a else 100000
    r = Rng(2026)
    vocab = sorted({word(r) for _ in range(20000)})
    nocc = max(1, nl // 3)
    labels = []
    with open(os.path.join(d, "labels.tsv"), "w", encoding="utf-8") as f:
        f.write("occupation\tkind\tlang\tlabel\n")
        for i in range(nl):
            occ = "occ:%05d" % (i % nocc)
            text = " ".join(vocab[r.below(len(vocab))] for _ in range(2 + r.below(2))).title()
            labels.append((occ, text))
            f.write("%s\t%s\t%s\t%s\n" % (occ, "pref" if i < nocc else "alt", LANGS[i % 3], text))
    seen, titles = set(), []
    with open(os.path.join(d, "counts.tsv"), "w", encoding="utf-8") as f:
        f.write("kind\toccupation\tlang\tkey\ttext\tpostings\n")
        rows = []
        while len(titles) < nt:
            occ, lab = labels[r.below(len(labels))]
            key = " ".join([lab.lower()] + [vocab[r.below(len(vocab))] for _ in range(1 + r.below(2))])
            lang = LANGS[r.below(3)]
            if (lang, key) in seen:
                continue
            seen.add((lang, key))
            n = 1 + r.below(5)
            titles.append(key)
            rows.append("title\t%s\t%s\t%s\t%s\t%d\n" % (occ, lang, key, key, n))
            rows.append("form\t%s\t%s\t%s\t%s\t%d\n" % (occ, lang, key, key, n))
            rows.append("key\t\t%s\t%s\t\t%d\n" % (lang, key, n))
            if len(rows) > 60000:
                f.write("".join(rows))
                rows = []
        f.write("".join(rows))
    with open(os.path.join(d, "queries.txt"), "w", encoding="utf-8") as f:
        out = []
        for i in range(nq):
            t = titles[r.below(len(titles))] if i % 2 else labels[r.below(len(labels))][1]
            if i % 3 == 0 and len(t) > 4:
                j = 1 + r.below(len(t) - 2)
                t = t[:j] + t[j + 1:]
            elif i % 3 == 1:
                t = t + " " + word(r)
            out.append(t.title() + (" (m/w/d)" if i % 5 == 0 else "") + "\n")
        f.write("".join(out))


if __name__ == "__main__":
    main()

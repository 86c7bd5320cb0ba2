#!/usr/bin/python3
"""A month of postings flooded with one-off typos, for the planted-truth
test of new_hidden_label (tests/cli/propose.sh).

Every occupation has one label, written by most of its postings; one
recurrent variant of it is planted at a few per cent of the label's
postings (compounding, hyphenation, a common misspelling, a spelling
convention two letters apart); then 1 % of all titles get one random
one-letter slip (a letter replaced, dropped, added or two swapped).
Seeded: the same files every run.

Writes DIR/labels.tsv, DIR/postings.tsv, DIR/variants.txt (the planted
variants' titles, one per line: lang TAB occupation TAB title) and
DIR/typos.txt (every slipped title: lang TAB occupation TAB title TAB
postings).
"""
import random
import sys

d = sys.argv[1]
rng = random.Random(20261205)

# occupation, lang, label, planted variant, its share of the label's postings
PLANTED = [
    ("occ:t01", "de", "gabelstaplerfahrer", "gabelstapler fahrer", 0.04),  # compounding
    ("occ:t02", "de", "lagerlogistiker", "lager-logistiker", 0.03),        # hyphenation
    ("occ:t03", "de", "elektroinstallateur", "elektroinstalateur", 0.03),  # misspelling
    ("occ:t04", "de", "schweisser", "schweiser", 0.05),                    # misspelling
    ("occ:t05", "en", "theatre technician", "theater technician", 0.05),   # two letters
    ("occ:t06", "en", "catalogue manager", "catalog manager", 0.03),       # two letters
    ("occ:t07", "en", "dialogue editor", "dialog editor", 0.02),           # two letters
    ("occ:t08", "en", "warehouse operative", "ware house operative", 0.02),  # compounding
    ("occ:t09", "en", "forklift driver", "fork-lift driver", 0.03),        # hyphenation
    ("occ:t10", "en", "receptionist", "receptionnist", 0.04),              # misspelling
]
LABEL_POSTINGS = 20000
TYPO_RATE = 0.01
LETTERS = "abcdefghijklmnopqrstuvwxyz"


def slip(title):
    """One random one-letter slip in one word of the title."""
    words = title.split(" ")
    i = rng.randrange(len(words))
    w = words[i]
    op = rng.randrange(4)
    p = rng.randrange(len(w))
    if op == 0:
        w = w[:p] + rng.choice(LETTERS.replace(w[p], "")) + w[p + 1:]
    elif op == 1 and len(w) > 1:
        w = w[:p] + w[p + 1:]
    elif op == 2:
        w = w[:p] + rng.choice(LETTERS) + w[p:]
    elif p + 1 < len(w) and w[p] != w[p + 1]:
        w = w[:p] + w[p + 1] + w[p] + w[p + 2:]
    else:
        w = w[:p] + rng.choice(LETTERS.replace(w[p], "")) + w[p + 1:]
    words[i] = w
    return " ".join(words)


planted = set()
for occ, lang, label, variant, share in PLANTED:
    planted.add((lang, occ, label))
    planted.add((lang, occ, variant))

rows = []
for occ, lang, label, variant, share in PLANTED:
    rows += [(lang, occ, label)] * LABEL_POSTINGS
    rows += [(lang, occ, variant)] * round(LABEL_POSTINGS * share)
rng.shuffle(rows)

typos = {}
with open(d + "/postings.tsv", "w", encoding="utf-8") as f:
    f.write("id\tlang\toccupations\ttitle\n")
    for n, (lang, occ, title) in enumerate(rows):
        if rng.random() < TYPO_RATE:
            t = slip(title)
            while (lang, occ, t) in planted or t == title:
                t = slip(title)
            typos[(lang, occ, t)] = typos.get((lang, occ, t), 0) + 1
            title = t
        f.write("p%07d\t%s\t%s\t%s\n" % (n, lang, occ, title))

with open(d + "/labels.tsv", "w", encoding="utf-8") as f:
    f.write("occupation\tkind\tlang\tlabel\n")
    for occ, lang, label, variant, share in PLANTED:
        f.write("%s\tpref\t%s\t%s\n" % (occ, lang, label))

with open(d + "/variants.txt", "w", encoding="utf-8") as f:
    for occ, lang, label, variant, share in PLANTED:
        f.write("%s\t%s\t%s\n" % (lang, occ, variant))

with open(d + "/typos.txt", "w", encoding="utf-8") as f:
    for (lang, occ, t), n in sorted(typos.items()):
        f.write("%s\t%s\t%s\t%d\n" % (lang, occ, t, n))

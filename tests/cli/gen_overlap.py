"""Generated postings with a planted truth for titlemill overlap.

Writes DIR/postings.tsv, DIR/groups.tsv (occupation, group, level: the
groups at level 2, their two halves at level 1), DIR/labels.tsv,
DIR/groups.ttl (the same groups as skos:broader) and DIR/truth.tsv:
  pair      OCC OTHER   two occupations whose postings share most titles
  misfiled  OCC GROUP   an occupation filed in one group, written like GROUP's

Each group has its own stock of words and of titles its members all use
now and then; an occupation's own titles are a word of its own with
words of its group ("ablor kelvan" ...); a few titles every trade uses
run through all groups.  Titles are drawn with Zipf-like weights.  The
planted pairs draw most postings from one common stock of titles; the
misfiled occupation draws its titles from another group's stock and its
shared titles.  Everything comes from random.Random(seed): the same seed
gives the same files.  Usage: gen_overlap.py DIR [SEED] [GROUPS] [PER_GROUP]"""
import os
import random
import sys

out = sys.argv[1]
seed = int(sys.argv[2]) if len(sys.argv) > 2 else 7
ngroups = int(sys.argv[3]) if len(sys.argv) > 3 else 6
per = int(sys.argv[4]) if len(sys.argv) > 4 else 6
rnd = random.Random(seed)
CONS = "bdfgklmnprstvz"
VOW = "aeiou"


def word(n=3):
    return "".join(rnd.choice(CONS) + rnd.choice(VOW) for _ in range(n)) + rnd.choice(CONS)


used = set()


def fresh():
    while True:
        w = word(rnd.choice((2, 3)))
        if w not in used:
            used.add(w)
            return w


groups = ["grp:%02d" % g for g in range(ngroups)]
gwords = {g: [fresh() for _ in range(8)] for g in groups}
occs = []  # (occ, group)
for gi, g in enumerate(groups):
    for k in range(per):
        occs.append(("occ:%02d%02d" % (gi, k), g))


def titles_of(group, n):
    head = fresh()
    return ["%s %s" % (head, w) for w in rnd.sample(gwords[group], n)] + [head]


gshared = {g: ["%s %s" % tuple(rnd.sample(gwords[g], 2)) for _ in range(5)] for g in groups}
everyone = [fresh() for _ in range(3)]
stock = {o: titles_of(g, 6) * 2 + gshared[g] + everyone[:1] for o, g in occs}
truth = []
# planted pairs: in three different groups, occupations 0 and 1 share a
# stock of titles for 85 % of their postings
for gi in (0, 2, 4):
    if gi >= ngroups:
        continue
    a, b = occs[gi * per][0], occs[gi * per + 1][0]
    common = titles_of(groups[gi], 6)
    stock[a] = common * 6 + stock[a]
    stock[b] = common * 6 + stock[b]
    truth.append(("pair", a, b))
# the misfiled occupation: filed in group 1, written like group 3's
moved = occs[1 * per + 2][0]
other = groups[3 % ngroups]
stock[moved] = (titles_of(other, 7) * 2 + gshared[other] + titles_of(groups[1], 2) +
                everyone[1:])
truth.append(("misfiled", moved, other))

langs = ["en", "de"]
with open(os.path.join(out, "postings.tsv"), "w", encoding="utf-8") as f:
    f.write("id\ttitle\toccupations\tlang\n")
    n = 0
    for o, g in occs:
        for lang in langs:
            titles = stock[o]
            weights = [1.0 / (i + 1) ** 0.7 for i in range(len(titles))]
            for _ in range(rnd.randint(150, 400)):
                n += 1
                t = rnd.choices(titles, weights)[0]
                deco = rnd.choice(["", "", " (m/w/d)", " - Vollzeit", " Valdoria"]) if lang == "de" else \
                    rnd.choice(["", "", " - full time", " Brennfeld Foods"])
                f.write("p%07d\t%s%s\t%s\t%s\n" % (n, t.capitalize(), deco, o, lang))
with open(os.path.join(out, "groups.tsv"), "w", encoding="utf-8") as f:
    f.write("occupation\tgroup\tlevel\n")
    for o, g in occs:
        f.write("%s\t%s\t2\n" % (o, g))
        f.write("%s\t%s-%d\t1\n" % (o, g, int(o[-2:]) % 2))
with open(os.path.join(out, "labels.tsv"), "w", encoding="utf-8") as f:
    f.write("occupation\tkind\tlang\tlabel\n")
    for o, g in occs:
        f.write("%s\tpref\ten\tOccupation %s\n" % (o, o[4:]))
with open(os.path.join(out, "groups.ttl"), "w", encoding="utf-8") as f:
    f.write("@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n@prefix occ: <occ:> .\n"
            "@prefix grp: <grp:> .\n\n")
    for o, g in occs:
        f.write('%s a skos:Concept ; skos:prefLabel "Occupation %s"@en ; skos:broader %s .\n'
                % (o, o[4:], g))
with open(os.path.join(out, "truth.tsv"), "w", encoding="utf-8") as f:
    for t in truth:
        f.write("\t".join(t) + "\n")

"""The demo's day of postings (make demo), on standard output as a postings TSV.

The bulk comes from the bench generator (tests/bench/gen_titles.py, seed
2026), kept to English, German and French, the languages of
examples/taxonomy.tsv.  Then a few postings are planted, as a curator
meets them in a real day, so that the demo shows every kind of
suggestion (the scenario is invented, employers included):

- rare_label: the taxonomy keeps the dated labels "Ladengehilfe" and
  "Shop Hand" for sales assistants (occ:5223); one posting each still
  uses them, among thousands of the occupation;
- used_elsewhere: "Forklift Operator", an alternative label of forklift
  drivers (occ:8344), is what warehouses post for their stores clerks
  (occ:4321), far more often than for forklift drivers.

Each planted posting gets an id of its own (demo-N).  Run:
/usr/bin/python3 examples/gen_day.py > day.tsv"""
import os
import subprocess
import sys

here = os.path.dirname(os.path.abspath(__file__))
gen = os.path.join(here, "..", "tests", "bench", "gen_titles.py")
LANGS = {"en", "de", "fr"}

# (postings, lang, occupations, titles used in turn)
PLANTED = [
    (1, "de", "occ:5223", ["Ladengehilfe (m/w/d) - Valdoria Markt GmbH"]),
    (1, "en", "occ:5223", ["Shop Hand - Saturdays - Brennfeld Foods"]),
    (40, "en", "occ:4321", ["Forklift Operator - Night Shift",
                            "Forklift Operator | Full Time",
                            "FORKLIFT OPERATOR (m/f/d)"]),
]


def main():
    out = sys.stdout
    p = subprocess.run([sys.executable, gen, "--postings", "--count", "140000", "--seed", "2026"],
                       check=True, stdout=subprocess.PIPE)
    lines = p.stdout.decode("utf-8", "surrogateescape").split("\n")
    head = lines[0].split("\t")
    lang = head.index("lang")
    keep = [lines[0]] + [l for l in lines[1:] if l and l.split("\t")[lang] in LANGS]
    n = 0
    for count, lg, occs, titles in PLANTED:
        for i in range(count):
            n += 1
            row = {"id": "demo-%d" % n, "date": "2026-03-%02d" % (1 + n % 28), "lang": lg,
                   "occupations": occs, "title": titles[i % len(titles)]}
            keep.append("\t".join(row[c] for c in head))
    out.buffer.write(("\n".join(keep) + "\n").encode("utf-8", "surrogateescape"))


if __name__ == "__main__":
    main()

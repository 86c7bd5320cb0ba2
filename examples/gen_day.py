"""The demo's month of postings (make demo), on standard output as a postings TSV.

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

And two changes in the second half of March (from Monday 16, ISO week
12), so that titlemill trend has something to find:

- the contact centres of the region rename their "Customer Service
  Advisor" (an alternative label of occ:4222) to "Customer Experience
  Agent": from the 16th the generator's postings of that title read the
  new one;
- installers start advertising "Solar PV Installer" for electricians
  (occ:7411), a few a day at first, more each day.

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


RENAMED = ("en", "occ:4222", "customer service advisor", "Customer Experience Agent")
RISING = ("en", "occ:7411", ["Solar PV Installer", "Solar PV Installer - Valdoria Sonnenwerk GmbH",
                             "Solar PV Installer (full time)"])
SECOND_HALF = "2026-03-16"


def main():
    out = sys.stdout
    p = subprocess.run([sys.executable, gen, "--postings", "--count", "140000", "--seed", "2026"],
                       check=True, stdout=subprocess.PIPE)
    lines = p.stdout.decode("utf-8", "surrogateescape").split("\n")
    head = lines[0].split("\t")
    lang = head.index("lang")
    keep = [lines[0]] + [l for l in lines[1:] if l and l.split("\t")[lang] in LANGS]
    date, occ, title = head.index("date"), head.index("occupations"), head.index("title")
    rl, ro, rt, rnew = RENAMED
    for i in range(1, len(keep)):
        f = keep[i].split("\t")
        at = f[title].lower().find(rt)
        if f[lang] == rl and f[occ] == ro and f[date] >= SECOND_HALF and at >= 0:
            f[title] = f[title][:at] + rnew + f[title][at + len(rt):]
            keep[i] = "\t".join(f)
    n = 0
    for count, lg, occs, titles in PLANTED:
        for i in range(count):
            n += 1
            row = {"id": "demo-%d" % n, "date": "2026-03-%02d" % (1 + n % 28), "lang": lg,
                   "occupations": occs, "title": titles[i % len(titles)]}
            keep.append("\t".join(row[c] for c in head))
    lg, occs, titles = RISING
    for day in range(16, 32):
        for i in range(2 + (day - 16)):
            n += 1
            row = {"id": "demo-%d" % n, "date": "2026-03-%02d" % day, "lang": lg,
                   "occupations": occs, "title": titles[n % len(titles)]}
            keep.append("\t".join(row[c] for c in head))
    out.buffer.write(("\n".join(keep) + "\n").encode("utf-8", "surrogateescape"))


if __name__ == "__main__":
    main()

#!/usr/bin/python3
"""Planted-truth postings over time for the trend tests.

  gen_trend.py --days 60 --seed S --out DIR

Writes DIR/postings.tsv (id, date, lang, occupations, title), DIR/labels.tsv
(occupation, kind, lang, label) and DIR/truth.tsv (direction, occupation,
lang, title): over DAYS days from 2026-01-05 (a Monday), 40 occupations
in German and English each post every day, fewer at weekends (day-of-week
variation), with three to five stable titles at fixed shares.  Planted:
  rising   in 8 occupations a new title appears on the first day of the
           second half and grows to about a third of the postings;
  falling  in 6 occupations a label used at a steady share stops being
           used in the second half (falling to nothing);
  stable   everything else keeps its share, with daily noise only.
All randomness from one seeded generator (splitmix64), so the same
arguments give the same bytes.  Titles are ordinary occupational words
with an invented qualifier so that no two occupations share a title."""
import argparse
import datetime
import os

MASK = (1 << 64) - 1


class Rng:
    def __init__(self, seed):
        self.s = seed & MASK

    def next(self):
        self.s = z = (self.s + 0x9E3779B97F4A7C15) & MASK
        z = ((z ^ (z >> 30)) * 0xBF58476D1CE4E5B9) & MASK
        z = ((z ^ (z >> 27)) * 0x94D049BB133111EB) & MASK
        return z ^ (z >> 31)

    def unit(self):
        return self.next() / 18446744073709551616.0

    def below(self, n):
        return self.next() % n


HEADS = {
    "de": ["Lagerist", "Koch", "Pflegekraft", "Elektriker", "Buchhalter", "Verkäufer", "Fahrer",
           "Mechaniker", "Reinigungskraft", "Erzieher", "Maler", "Tischler", "Bäcker", "Friseur",
           "Kassierer", "Gärtner", "Monteur", "Schweißer", "Kellner", "Hausmeister"],
    "en": ["Warehouse Operative", "Cook", "Care Assistant", "Electrician", "Bookkeeper",
           "Sales Assistant", "Driver", "Mechanic", "Cleaner", "Nursery Nurse", "Painter",
           "Joiner", "Baker", "Hairdresser", "Cashier", "Gardener", "Fitter", "Welder",
           "Waiter", "Caretaker"],
}
QUAL = {
    "de": ["Fach", "Service", "Betriebs", "Produktions", "Lebensmittel", "Werk", "Filial", "Klinik"],
    "en": ["Forklift", "Kitchen", "Site", "Maintenance", "Retail", "Vehicle", "Floor", "Stock"],
}
NEW = {"de": "Solar", "en": "Solar"}


def title(lang, head, q):
    if lang == "de":
        return (q + head.lower()) if q else head
    return (q + " " + head) if q else head


def main():
    ap = argparse.ArgumentParser()
    ap.add_argument("--days", type=int, default=60)
    ap.add_argument("--seed", type=int, default=1)
    ap.add_argument("--out", required=True)
    a = ap.parse_args()
    rng = Rng(a.seed)
    occs = []
    for li, lang in enumerate(("de", "en")):
        for h, head in enumerate(HEADS[lang]):
            occ = "occ:%02d%02d" % (li + 1, h)
            n = 3 + rng.below(3)
            quals = [None] + [QUAL[lang][(h + k) % len(QUAL[lang])] for k in range(1, n)]
            titles = [title(lang, head, q) for q in quals]
            weights = [4.0] + [1.0 + rng.unit() * 2 for _ in titles[1:]]
            occs.append({"occ": occ, "lang": lang, "titles": titles, "w": weights,
                         "volume": 20 + rng.below(60), "rise": None, "fall": None})
    order = sorted(range(len(occs)), key=lambda i: rng.next())
    for i in order[:8]:
        o = occs[i]
        o["rise"] = title(o["lang"], o["titles"][0].split()[-1] if o["lang"] == "en" else
                          o["titles"][0], NEW[o["lang"]])
    for i in order[8:14]:
        occs[i]["fall"] = 1  # the second title, a label, vanishes
    start = datetime.date(2026, 1, 5)
    half = a.days // 2
    os.makedirs(a.out, exist_ok=True)
    pid = 0
    with open(os.path.join(a.out, "postings.tsv"), "w", encoding="utf-8") as f:
        f.write("id\tdate\tlang\toccupations\ttitle\n")
        for d in range(a.days):
            day = start + datetime.timedelta(days=d)
            weekend = day.isoweekday() >= 6
            for o in occs:
                vol = o["volume"] * (0.3 if weekend else 1.0) * (0.8 + 0.4 * rng.unit())
                titles, w = list(o["titles"]), list(o["w"])
                if o["fall"] and d >= half:
                    w[o["fall"]] = 0.0
                if o["rise"] and d >= half:
                    titles.append(o["rise"])
                    w.append(sum(w) * 0.5 * (d - half + 1) / (a.days - half))
                tot = sum(w)
                for _ in range(int(vol)):
                    x, k = rng.unit() * tot, 0
                    while k < len(w) - 1 and x >= w[k]:
                        x -= w[k]
                        k += 1
                    pid += 1
                    f.write("p%07d\t%s\t%s\t%s\t%s\n" % (pid, day.isoformat(), o["lang"],
                                                          o["occ"], titles[k]))
    with open(os.path.join(a.out, "labels.tsv"), "w", encoding="utf-8") as f:
        f.write("occupation\tkind\tlang\tlabel\n")
        for o in occs:
            for k, t in enumerate(o["titles"][:3]):
                f.write("%s\t%s\t%s\t%s\n" % (o["occ"], "pref" if k == 0 else "alt", o["lang"], t))
    with open(os.path.join(a.out, "truth.tsv"), "w", encoding="utf-8") as f:
        f.write("direction\toccupation\tlang\ttitle\n")
        for o in occs:
            if o["rise"]:
                f.write("rising\t%s\t%s\t%s\n" % (o["occ"], o["lang"], o["rise"]))
            if o["fall"]:
                f.write("falling\t%s\t%s\t%s\n" % (o["occ"], o["lang"], o["titles"][o["fall"]]))


if __name__ == "__main__":
    main()

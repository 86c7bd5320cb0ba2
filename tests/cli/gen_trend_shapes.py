#!/usr/bin/python3
"""Planted-truth postings with shapes of time, and their scoring.

  gen_trend_shapes.py gen --seed S --out DIR
  gen_trend_shapes.py score DIR/truth.tsv KEYS.tsv SCENARIO ROWS.tsv DIR/postings.tsv

gen writes DIR/postings.tsv (id, date, lang, occupations, title),
DIR/labels.tsv, DIR/scenarios.tsv (name, how the postings are tallied,
the trend arguments) and DIR/truth.tsv.  Postings run daily from
2025-09-01 to 2026-03-01 in German, English and French; the change day
is 2026-01-01.  Each occupation has one shape:

  steady    titles at fixed shares (the control);
  grow      the occupation's volume four times larger after the change,
            shares unchanged (one of them gains a new title);
  shrink    the volume four times smaller (one of them loses an alt label);
  surge     one occupation eight times larger, shares unchanged;
  move      a title coded to occupation A before the change and to B
            after it (falling in A, rising in B);
  small     three postings a day (two of them lose a label);
  slow      a title whose share grows steadily (exponentially, 1 % to
            30 %) over the whole span;
  season    volume dips at weekends and peaks at month ends, and one title
            is a weekend title, another a month-end title;
  spike     a title at a small steady share that is mass-posted on two
            days (2025-12-10/11 or 2026-02-10/11), then back to normal;
  fade      an alt label and a hidden label (a misspelling) that fade to
            nothing after the change.

About 3 % of postings carry no date.  All randomness from one seeded
splitmix64, so the same arguments give the same bytes.

The truth is the model's own expectation, per scenario: for every
(occupation, language, title) the expected postings of the title and of
the occupation in each window (summed day by day from the model, spikes
left out as transient).  A title is
  rising/falling  when the expected shares differ at least threefold (or
                  one is zero), the higher window expects at least 20
                  postings and the expected G2 is at least 40: it must be
                  found, in that direction;
  stable          when the expected shares differ by less than 1.1 (and,
                  for a spike title, the spike lies in a window of at least
                  three periods, where a period without it can be told
                  apart): it must not be reported (a seasonal title whose
                  shares differ only because the windows' calendars do is
                  "either");
  either          otherwise (not scored).
"""
import argparse
import csv
import datetime
import math
import os
import sys

START = datetime.date(2025, 9, 1)
END = datetime.date(2026, 3, 1)
CHANGE = datetime.date(2026, 1, 1)
SPIKES = (datetime.date(2025, 12, 10), datetime.date(2026, 2, 10))
LANGS = ("de", "en", "fr")

# (name, tally period, trend arguments): windows given as months, weeks,
# days, days rolled up to weeks, the defaults (the latest complete week or
# month against the three before), months over counts by week.
SCENARIOS = [
    ("months", "month", ["--before", "2025-10..2025-12", "--after", "2026-01..2026-02"]),
    ("weeks", "week", ["--before", "2025-W45..2025-W52", "--after", "2026-W02..2026-W09"]),
    ("days", "day", ["--before", "2025-12-01..2025-12-28", "--after", "2026-02-02..2026-03-01"]),
    ("rollup", "day", ["--period", "week", "--before", "2025-W45..2025-W52",
                       "--after", "2026-W02..2026-W09"]),
    ("default", "week", ["--as-of", "2026-03-02"]),
    ("monthsdefault", "month", ["--as-of", "2026-03-02"]),
    ("weekmonths", "week", ["--before", "2025-10..2025-12", "--after", "2026-01..2026-02"]),
]
# the windows of each scenario as days, and how many periods each has
WINDOWS = {
    "months": ((datetime.date(2025, 10, 1), datetime.date(2025, 12, 31), 3),
               (datetime.date(2026, 1, 1), datetime.date(2026, 2, 28), 2)),
    "weeks": ((datetime.date(2025, 11, 3), datetime.date(2025, 12, 28), 8),
              (datetime.date(2026, 1, 5), datetime.date(2026, 3, 1), 8)),
    "days": ((datetime.date(2025, 12, 1), datetime.date(2025, 12, 28), 28),
             (datetime.date(2026, 2, 2), datetime.date(2026, 3, 1), 28)),
    "rollup": ((datetime.date(2025, 11, 3), datetime.date(2025, 12, 28), 8),
               (datetime.date(2026, 1, 5), datetime.date(2026, 3, 1), 8)),
    "default": ((datetime.date(2026, 2, 2), datetime.date(2026, 2, 22), 3),
                (datetime.date(2026, 2, 23), datetime.date(2026, 3, 1), 1)),
    "monthsdefault": ((datetime.date(2025, 11, 1), datetime.date(2026, 1, 31), 3),
                      (datetime.date(2026, 2, 1), datetime.date(2026, 2, 28), 1)),
    # the whole weeks inside the months
    "weekmonths": ((datetime.date(2025, 10, 6), datetime.date(2025, 12, 28), 12),
                   (datetime.date(2026, 1, 5), datetime.date(2026, 2, 22), 7)),
}


def _trend_module():
    """gen_trend.py beside this file, for its seeded generator (one
    definition of it)."""
    import importlib.util
    spec = importlib.util.spec_from_file_location(
        "gen_trend", os.path.join(os.path.dirname(os.path.abspath(__file__)), "gen_trend.py"))
    mod = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(mod)
    return mod


Rng = _trend_module().Rng  # splitmix64: the same seed gives the same bytes


# occupational heads, one per occupation, and qualifiers, one per title
HEADS = {
    "de": ["Lagerist", "Koch", "Pflegekraft", "Elektriker", "Buchhalter", "Verkäufer",
           "Fahrer", "Mechaniker", "Reinigungskraft", "Erzieher", "Maler", "Tischler",
           "Bäcker", "Friseur", "Kassierer", "Gärtner", "Monteur", "Schweißer", "Kellner",
           "Hausmeister", "Dachdecker", "Fliesenleger", "Metzger", "Optiker"],
    "en": ["Storeman", "Cook", "Carer", "Electrician", "Bookkeeper", "Shop Assistant",
           "Driver", "Mechanic", "Cleaner", "Nursery Nurse", "Painter", "Joiner", "Baker",
           "Hairdresser", "Cashier", "Gardener", "Fitter", "Welder", "Waiter", "Caretaker",
           "Roofer", "Tiler", "Butcher", "Optician"],
    "fr": ["Magasinier", "Cuisinier", "Aide-soignant", "Électricien", "Comptable",
           "Vendeur", "Chauffeur", "Mécanicien", "Agent d'entretien", "Éducateur",
           "Peintre", "Menuisier", "Boulanger", "Coiffeur", "Caissier", "Jardinier",
           "Monteur", "Soudeur", "Serveur", "Gardien", "Couvreur", "Carreleur",
           "Boucher", "Opticien"],
}
QUALS = {
    "de": ["", "Hafen", "Mühlen", "Brücken", "Kanal", "Obstgarten", "Steinbruch", "Deich"],
    "en": ["", "Harbour", "Mill", "Bridge", "Canal", "Orchard", "Quarry", "Dyke"],
    "fr": ["", "de port", "de moulin", "de pont", "de canal", "de verger", "de carrière",
           "de digue"],
}
# a posting's start date, written into a third of the titles as employers
# write it (the cleaning removes it): the examples show their window
START_DATE = {"de": " ab %d.%m.%Y", "en": ", from %d/%m/%Y", "fr": " - %d/%m/%Y"}
DECOR = {
    "de": ["", " (m/w/d)", " - Vollzeit", " (w/m/d) ab sofort"],
    "en": ["", " - Full Time", " (Permanent)", " - immediate start"],
    "fr": ["", " (H/F)", " - CDI", " (F/H) temps plein"],
}


def title(lang, head, q):
    if not q:
        return head
    if lang == "de":
        return q + head.lower()
    if lang == "fr":
        return head + " " + q
    return q + " " + head


def misspell(t):
    """A hidden label: two letters of the last word swapped."""
    i = len(t) - 3
    return t[:i] + t[i + 1] + t[i] + t[i + 2:]


def slow_share(d, span):
    return 0.01 * 30 ** ((d - START).days / span)


def days():
    d = START
    while d <= END:
        yield d
        d += datetime.timedelta(days=1)


class Occ:
    def __init__(self, occ, lang, shape, base, titles, weights):
        self.occ, self.lang, self.shape, self.base = occ, lang, shape, base
        self.titles = titles      # title -> (kind or None)
        self.weights = weights    # title -> function(day) -> weight
        self.seasonal = ()
        self.spike = None         # (title, first day, extra postings per day)
        self.volume = lambda d: 1.0

    def vol(self, d):
        return self.base * self.volume(d)

    def shares(self, d):
        w = {t: f(d) for t, f in self.weights.items()}
        tot = sum(w.values())
        return {t: x / tot for t, x in w.items() if x > 0}


def const(x):
    return lambda d: x


def after(x, y):
    return lambda d: y if d >= CHANGE else x


def build(rng):
    occs = []
    plan = ([("steady", 30)] * 2 + [("grow", 15)] * 2 + [("shrink", 40)] * 2 + [("surge", 6)]
            + [("moveA", 25), ("moveB", 25)] + [("small", 3)] * 4 + [("slow", 25)] * 2
            + [("season", 25)] * 2 + [("spike", 25)] * 2 + [("fade", 25)] * 2)
    for k, (shape, base) in enumerate(plan):
        for lang in LANGS:
            head = HEADS[lang][k]
            ts = [title(lang, head, QUALS[lang][q]) for q in range(4)]
            kinds = {ts[0]: "pref", ts[1]: "alt", ts[2]: None, ts[3]: None}
            w = {ts[0]: const(4.0), ts[1]: const(2.0), ts[2]: const(1.5), ts[3]: const(1.0)}
            o = Occ("occ:%02d" % (k + 1), lang, shape, base, kinds, w)
            if shape == "grow":
                o.volume = after(1.0, 4.0)
                if k % 2 == 0:
                    new = title(lang, head, QUALS[lang][5])
                    o.titles[new] = None
                    o.weights[new] = after(0.0, 3.0)
            elif shape == "shrink":
                o.volume = after(1.0, 0.25)
                if k % 2 == 0:
                    w[ts[1]] = after(3.0, 0.0)
            elif shape == "surge":
                o.volume = after(1.0, 8.0)
            elif shape == "moveA":
                w[ts[3]] = after(3.0, 0.0)
            elif shape == "small":
                if k % 2 == 0:
                    w[ts[1]] = after(3.0, 0.0)
            elif shape == "slow":
                # the title's share runs from 1 % to 30 %, the others keep theirs
                w[ts[3]] = (lambda d, s=(END - START).days:
                            7.5 * slow_share(d, s) / (1 - slow_share(d, s)))
            elif shape == "season":
                o.volume = (lambda d: (0.3 if d.isoweekday() >= 6 else 1.0) *
                            (2.5 if (d + datetime.timedelta(days=3)).month != d.month else 1.0))
                o.seasonal = (ts[2], ts[3])
                w[ts[2]] = lambda d: 4.0 if d.isoweekday() >= 6 else 0.5
                w[ts[3]] = (lambda d: 5.0 if (d + datetime.timedelta(days=3)).month != d.month
                            else 0.5)
            elif shape == "spike":
                o.spike = (ts[3], SPIKES[k % 2], 5 * base)
            elif shape == "fade":
                hid = misspell(ts[0])
                o.titles[hid] = "hidden"
                w[hid] = after(1.0, 0.0)
                w[ts[1]] = (lambda d: 2.0 if d < CHANGE else
                            max(0.0, 2.0 * (1 - (d - CHANGE).days / 21)))
            occs.append(o)
    # the moved title: occupation B (moveB) takes A's fourth title after the change
    for i, o in enumerate(occs):
        if o.shape == "moveB":
            a = next(x for x in occs if x.shape == "moveA" and x.lang == o.lang)
            moved = [t for t in a.titles if a.titles[t] is None][-1]
            o.titles[moved] = None
            o.weights[moved] = after(0.0, 3.0)
    return occs


def gen(a):
    rng = Rng(a.seed)
    occs = build(rng)
    os.makedirs(a.out, exist_ok=True)
    pid = 0
    with open(os.path.join(a.out, "postings.tsv"), "w", encoding="utf-8") as f:
        f.write("id\tdate\tlang\toccupations\ttitle\n")
        for d in days():
            for o in occs:
                sh = o.shares(d)
                n = int(o.vol(d) * (0.7 + 0.6 * rng.unit()) + rng.unit())
                picks = []
                for _ in range(n):
                    x = rng.unit()
                    for t, s in sh.items():
                        x -= s
                        if x < 0:
                            break
                    picks.append(t)
                if o.spike and o.spike[1] <= d <= o.spike[1] + datetime.timedelta(days=1):
                    picks += [o.spike[0]] * o.spike[2]
                for t in picks:
                    pid += 1
                    dec = DECOR[o.lang][int(rng.unit() * len(DECOR[o.lang]))]
                    if rng.unit() < 0.33:
                        dec = d.strftime(START_DATE[o.lang])
                    date = "" if rng.unit() < 0.03 else d.isoformat()
                    f.write("p%07d\t%s\t%s\t%s\t%s%s\n" % (pid, date, o.lang, o.occ, t, dec))
    with open(os.path.join(a.out, "labels.tsv"), "w", encoding="utf-8") as f:
        f.write("occupation\tkind\tlang\tlabel\n")
        for o in occs:
            for t, kind in o.titles.items():
                if kind:
                    f.write("%s\t%s\t%s\t%s\n" % (o.occ, kind, o.lang, t))
    with open(os.path.join(a.out, "scenarios.tsv"), "w", encoding="utf-8") as f:
        for name, period, args in SCENARIOS:
            f.write("%s\t%s\t%s\n" % (name, period, " ".join(args)))
    with open(os.path.join(a.out, "truth.tsv"), "w", encoding="utf-8") as f:
        f.write("scenario\tshape\toccupation\tlang\ttitle\tkind\texpect\t"
                "before\tafter\toccub\toccua\tg2\n")
        for name, _, _ in SCENARIOS:
            (b0, b1, bn), (a0, a1, an) = WINDOWS[name]
            for o in occs:
                exp = {}
                for t in o.titles:
                    exp[t] = [0.0, 0.0]
                tot = [0.0, 0.0]
                for d in days():
                    side = 0 if b0 <= d <= b1 else 1 if a0 <= d <= a1 else -1
                    if side < 0:
                        continue
                    v = o.vol(d)
                    tot[side] += v
                    for t, s in o.shares(d).items():
                        exp[t][side] += v * s
                for t, (eb, ea) in exp.items():
                    want = classify(eb, ea, tot[0], tot[1])
                    if o.shape == "season" and t in o.seasonal and want != "stable":
                        want = "either"  # the windows' calendars differ
                    if o.spike and t == o.spike[0]:
                        sd = o.spike[1]
                        if b0 <= sd <= b1 and bn < 3 or a0 <= sd <= a1 and an < 3:
                            want = "either"
                        if a0 <= sd <= a1:
                            want = "either"
                    f.write("%s\t%s\t%s\t%s\t%s\t%s\t%s\t%.1f\t%.1f\t%.1f\t%.1f\t%.1f\n" % (
                        name, o.shape.rstrip("AB"), o.occ, o.lang, t, o.titles[t] or "",
                        want, eb, ea, tot[0], tot[1], g2(eb, ea, tot[0], tot[1])))


def g2(a, b, na, nb):
    """Dunning's G2 on [[a, na - a], [b, nb - b]] (expected counts)."""
    cells = [a, na - a, b, nb - b]
    n = na + nb
    rows = [na, na, nb, nb]
    cols = [a + b, n - a - b, a + b, n - a - b]
    s = 0.0
    for c, r, k in zip(cells, rows, cols):
        if c > 0:
            s += c * math.log(c * n / (r * k))
    return 2 * s


def classify(eb, ea, nb, na):
    if nb <= 0 or na <= 0:
        return "either"
    sb, sa = eb / nb, ea / na
    lo, hi = min(sb, sa), max(sb, sa)
    if hi <= 0:
        return "either"
    if lo > 0 and hi / lo < 1.1:
        return "stable"
    high = ea if sa > sb else eb
    if (lo == 0 or hi / lo >= 3) and high >= 20 and g2(eb, ea, nb, na) >= 40:
        return "rising" if sa > sb else "falling"
    return "either"


def first_period(scenario):
    """The label of the period holding the change day, in the scenario's
    counts."""
    kind = dict((n, p) for n, p, _ in SCENARIOS)[scenario]
    if scenario == "rollup":
        kind = "week"
    if kind == "month":
        return CHANGE.strftime("%Y-%m")
    if kind == "week":
        y, w, _ = CHANGE.isocalendar()
        return "%04d-W%02d" % (y, w)
    return CHANGE.isoformat()


def score(a):
    """Per shape: planted, found, wrong direction, stable, reported, and
    found rows whose first_seen or examples are wrong; a line per miss,
    false report and wrong field on standard error."""
    (b0, b1, _), (a0, a1, _) = WINDOWS[a.scenario]
    when = {}
    with open(a.postings, encoding="utf-8") as f:
        next(f)
        for line in f:
            _, date, lang, occ, raw = line.rstrip("\n").split("\t")
            if date:
                when.setdefault((occ, lang, raw), set()).add(date)
    keys = {}
    with open(a.keys, encoding="utf-8") as f:
        for line in f:
            t, k = line.rstrip("\n").split("\t")
            keys[t] = k
    truth = [r for r in csv.DictReader(open(a.truth, encoding="utf-8"), delimiter="\t",
                                       quoting=csv.QUOTE_NONE) if r["scenario"] == a.scenario]
    rows = {}
    for r in csv.DictReader(open(a.rows, encoding="utf-8"), delimiter="\t",
                            quoting=csv.QUOTE_NONE):
        rows[(r["occupation"], r["lang"], r["key"])] = r
    seen = set()
    stats = {}
    for t in truth:
        st = stats.setdefault(t["shape"], [0, 0, 0, 0, 0, 0])
        k = (t["occupation"], t["lang"], keys[t["title"]])
        seen.add(k)
        r = rows.get(k)
        what = "%s %s %s %s %s (expected %s -> %s of %s -> %s)" % (
            a.scenario, t["shape"], t["occupation"], t["lang"], t["title"], t["before"],
            t["after"], t["occub"], t["occua"])
        if t["expect"] in ("rising", "falling"):
            st[0] += 1
            if r and r["direction"] == t["expect"]:
                st[1] += 1
                bad = []
                # a title new in the later window was first seen there,
                # never in the undated period
                if r["label_kind"] != t["kind"]:
                    bad.append("label_kind %s" % r["label_kind"])
                if float(t["before"]) == 0 and not (r["first_seen"] >= first_period(a.scenario)):
                    bad.append("first_seen %s" % r["first_seen"])
                # the examples: raw titles of the window where the share is higher
                w0, w1 = (a0, a1) if t["expect"] == "rising" else (b0, b1)
                for e in (r["example_1"], r["example_2"], r["example_3"]):
                    ds = when.get((t["occupation"], t["lang"], e), ())
                    if not any(w0.isoformat() <= x <= w1.isoformat() for x in ds):
                        bad.append("example %s" % e)
                if bad:
                    st[5] += 1
                    print("wrong fields: %s: %s" % (what, "; ".join(bad)), file=sys.stderr)
            elif r:
                st[2] += 1
                print("wrong direction: %s %s" % (r["direction"], what), file=sys.stderr)
            else:
                print("missed %s: %s" % (t["expect"], what), file=sys.stderr)
        elif t["expect"] == "stable":
            st[3] += 1
            if r:
                st[4] += 1
                print("false %s: %s (got %s -> %s of %s -> %s)" % (
                    r["direction"], what, r["postings_before"], r["postings_after"],
                    r["occupation_postings_before"], r["occupation_postings_after"]),
                    file=sys.stderr)
    for k, r in rows.items():
        if k not in seen:
            stats.setdefault("unplanted", [0, 0, 0, 0, 0, 0])[4] += 1
            print("unplanted %s: %s" % (r["direction"], " ".join(k)), file=sys.stderr)
    for shape in sorted(stats):
        print("\t".join([a.scenario, shape] + [str(x) for x in stats[shape]]))


def main():
    ap = argparse.ArgumentParser()
    sub = ap.add_subparsers(dest="cmd", required=True)
    g = sub.add_parser("gen")
    g.add_argument("--seed", type=int, default=1)
    g.add_argument("--out", required=True)
    s = sub.add_parser("score")
    s.add_argument("truth")
    s.add_argument("keys")
    s.add_argument("scenario")
    s.add_argument("rows")
    s.add_argument("postings")
    a = ap.parse_args()
    gen(a) if a.cmd == "gen" else score(a)


main()

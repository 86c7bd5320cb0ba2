"""Tables for make demo (examples/demo.sh): columns found by their header
names, aligned by display width (a wide character takes two columns, a
combining mark none), cells cut at a word boundary with an ellipsis.

  show.py titles RAW CLEAN N     the first N raw titles beside their clean ones
  show.py coverage COVERAGE.tsv  the total line and the five lowest
  show.py suggestions FILE.tsv   per kind: how many, and the three strongest
  show.py table FILE.tsv COLUMN...  those columns of a TSV, aligned"""
import sys
import unicodedata


def width(s):
    w = 0
    for c in s:
        if unicodedata.combining(c) or unicodedata.category(c) in ("Mn", "Me", "Cf"):
            continue
        w += 2 if unicodedata.east_asian_width(c) in ("W", "F") else 1
    return w


def fit(s, w):
    """s cut to at most w columns at a word boundary (… marks the cut),
    then padded with spaces to w columns."""
    if width(s) > w:
        words, out = s.split(" "), ""
        for x in words:
            t = (out + " " + x) if out else x
            if width(t) + 1 > w:
                break
            out = t
        if not out:  # one long word: cut it
            for c in s:
                if width(out + c) + 1 > w:
                    break
                out += c
        s = out.rstrip(" ,;:-–|/") + "…"
    return s + " " * (w - width(s))


def table(path):
    rows = [l.rstrip("\n").split("\t") for l in open(path, encoding="utf-8")]
    return [dict(zip(rows[0], r)) for r in rows[1:]]


def titles(raw, clean, n):
    a = open(raw, encoding="utf-8").read().split("\n")
    b = open(clean, encoding="utf-8").read().split("\n")
    for r, c in list(zip(a, b))[:n]:
        print("  %s -> %s" % (fit(r, 58), c))


def pct(x):
    return "%.1f %%" % (100 * float(x))


def coverage(path):
    rows = table(path)
    t = rows[-1]
    print("  all occupations: %s postings (%s posting-occupation pairs), %s of the pairs "
          "matched by a label (%s, 95 %% interval %s-%s), %s by the preferred label alone"
          % (t["distinct_postings"], t["postings"], t["matched"], pct(t["coverage"]),
             pct(t["coverage_low"]), pct(t["coverage_high"]), pct(t["pref_coverage"])))
    print("  the five occupations and languages with the lowest coverage (100 postings or more):")
    low = sorted((r for r in rows[:-1] if int(r["postings"]) >= 100),
                 key=lambda r: (float(r["coverage"]), r["occupation"], r["lang"]))[:5]
    for r in low:
        top = r["top_unmatched"].split("; ")[0]
        print("    %s %s %s  %7s of %5s  biggest unmatched: %s"
              % (fit(r["occupation"], 9), fit(r["occupation_label"], 26), r["lang"],
                 pct(r["coverage"]), r["postings"], top))


KINDS = ["new_alt_label", "new_hidden_label", "rare_label", "used_elsewhere"]


def suggestions(path):
    rows = table(path)
    for k in KINDS:
        mine = [r for r in rows if r["kind"] == k]
        print("  %s: %d" % (k, len(mine)))
        for r in mine[:3]:
            n = int(r["postings"])
            why = "%d posting%s of %s" % (n, "" if n == 1 else "s", r["occupation_postings"])
            if k == "used_elsewhere":
                why = "%s postings use it, %s of them for %s" % (
                    r["key_postings"], r["competitor_postings"], r["competitor"])
            elif k != "rare_label":
                why += ", precision %.2f" % float(r["precision"])
            if r.get("variant_of"):
                why += ', a variant of "%s"' % r["variant_of"]
            print("    %s %s %s  %s  %s" % (fit(r["occupation"], 9), fit(r["occupation_label"], 18),
                                          r["lang"], fit('"%s"' % r["label"], 26), why))


def aligned(path, cols):
    rows = [cols] + [[r[c] for c in cols] for r in table(path)]
    w = [max(width(r[i]) for r in rows) for i in range(len(cols))]
    for r in rows:
        print("    " + "  ".join(fit(x, w[i]) for i, x in enumerate(r)).rstrip())


def main():
    cmd = sys.argv[1]
    if cmd == "titles":
        titles(sys.argv[2], sys.argv[3], int(sys.argv[4]))
    elif cmd == "coverage":
        coverage(sys.argv[2])
    elif cmd == "suggestions":
        suggestions(sys.argv[2])
    elif cmd == "table":
        aligned(sys.argv[2], sys.argv[3:])
    else:
        sys.exit(__doc__)


if __name__ == "__main__":
    main()

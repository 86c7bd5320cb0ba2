#!/usr/bin/python3
"""Text match has never seen: titlemill match against an evaluation set
written apart from the code and from tests/bench/gen_titles.py
(tests/data/match-unseen: its README says how).

  match_unseen.py TITLEMILL DATADIR WORKDIR [--per-cause] [--queries FILE]
                  [--floors TOP1 TOP3 TOP1SHOWN NONE_P90 NONE_SHOWN]

Counts DATADIR/postings.tsv with titlemill tally, then matches each line
of DATADIR/queries.tsv (text, expect, cause) with --json --top 3
--min-score 0 and no language hint.  For the lines a curator codes
(expect an occupation id): top-1 and top-3, and top-1 among those whose
best score reaches the default --min-score (what the TSV output shows);
for the lines that name no occupation of the taxonomy (expect "-"): the
median, 90th percentile and largest best score, and how many reach the
default --min-score.  --floors exits 1 when top-1, top-3 or top-1 shown
falls below its floor, or the no-match 90th percentile or count shown
rises above its ceiling.  --per-cause adds the figures by cause and the
lines coded wrong.  --queries FILE reads the queries from FILE instead
(tests/data/match-acronym/queries.tsv: acronyms and short forms, against
the same labels and postings).
"""
import json
import subprocess
import sys


MIN_SCORE_SHOW = 0.3  # src/match/match.h MATCH_MIN_SCORE_SHOW


def run(tm, d, work, qfile):
    rows = []
    with open(qfile, encoding="utf-8") as f:
        next(f)
        for line in f:
            text, expect, cause = line.rstrip("\n").split("\t")
            rows.append((text, expect, cause))
    subprocess.run([tm, "tally", "--labels", f"{d}/labels.tsv", "-o", f"{work}/counts.tsv",
                    f"{d}/postings.tsv"], capture_output=True, check=True)
    inp = "".join(r[0] + "\n" for r in rows).encode()
    out = subprocess.run([tm, "match", "--labels", f"{d}/labels.tsv", "--counts", f"{work}/counts.tsv",
                          "--json", "--top", "3", "--min-score", "0"],
                         input=inp, capture_output=True, check=True).stdout.decode()
    res = [json.loads(l) for l in out.splitlines()]
    assert len(res) == len(rows)
    return rows, res


def main():
    tm, d, work = sys.argv[1], sys.argv[2], sys.argv[3]
    qfile = f"{d}/queries.tsv"
    if "--queries" in sys.argv:
        qfile = sys.argv[sys.argv.index("--queries") + 1]
    rows, res = run(tm, d, work, qfile)
    n = t1 = t3 = t1ok = 0
    none_scores = []
    causes = {}
    fails = []
    for (text, expect, cause), r in zip(rows, res):
        c = r["candidates"]
        if expect == "-":
            none_scores.append(c[0]["score"] if c else 0.0)
            continue
        n += 1
        occs = [x["occupation"] for x in c]
        h1 = bool(occs) and occs[0] == expect
        h3 = expect in occs[:3]
        t1 += h1
        t3 += h3
        t1ok += h1 and c[0]["score"] >= MIN_SCORE_SHOW
        s = causes.setdefault(cause, [0, 0, 0])
        s[0] += 1
        s[1] += h1
        s[2] += h3
        if not h1:
            fails.append((cause, text, expect, [(x["occupation"], round(x["score"], 3), x["via"], x["matched"]) for x in c[:2]]))
    none_scores.sort()
    m = len(none_scores)
    q = lambda p: none_scores[min(m - 1, int(p * m))]
    print(f"coded lines {n}: top-1 {t1 / n:.3f} ({t1}), top-3 {t3 / n:.3f} ({t3}), "
          f"top-1 shown (score >= {MIN_SCORE_SHOW}) {t1ok / n:.3f} ({t1ok})")
    shown = sum(s >= MIN_SCORE_SHOW for s in none_scores)
    print(f"no-match lines {m}: best score median {q(0.5):.3f}, p90 {q(0.9):.3f}, max {none_scores[-1]:.3f}, "
          f"shown (>= {MIN_SCORE_SHOW}): {shown}")
    if "--per-cause" in sys.argv:
        for k in sorted(causes):
            a, b, c3 = causes[k]
            print(f"  {k:12s} {a:3d}  top-1 {b / a:.2f}  top-3 {c3 / a:.2f}")
        for f in fails:
            print("FAIL", *f, sep="\t")
        for (text, expect, cause), r in zip(rows, res):
            if expect == "-" and r["candidates"] and r["candidates"][0]["score"] >= MIN_SCORE_SHOW:
                c = r["candidates"][0]
                print("NO-MATCH SHOWN", text, c["occupation"], round(c["score"], 3), c["via"], c["matched"], sep="\t")
    if "--floors" in sys.argv:
        i = sys.argv.index("--floors")
        f1, f3, fs, fp90, fshown = (float(x) for x in sys.argv[i + 1:i + 6])
        bad = []
        if t1 / n < f1:
            bad.append(f"top-1 {t1 / n:.3f} < {f1}")
        if t3 / n < f3:
            bad.append(f"top-3 {t3 / n:.3f} < {f3}")
        if t1ok / n < fs:
            bad.append(f"top-1 shown {t1ok / n:.3f} < {fs}")
        if q(0.9) > fp90:
            bad.append(f"no-match p90 {q(0.9):.3f} > {fp90}")
        if shown > fshown:
            bad.append(f"no-match shown {shown} > {fshown:.0f}")
        if bad:
            print("FAIL: " + "; ".join(bad))
            sys.exit(1)


if __name__ == "__main__":
    main()

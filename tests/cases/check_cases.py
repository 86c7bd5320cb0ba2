"""Checks tests/cases/norm.tsv and norm-facets.tsv against titlemill norm.

Each table is read by column name; cases are grouped by their lang
column so that one titlemill run per language checks them all."""
import json
import subprocess
import sys
from collections import defaultdict

exe, here = sys.argv[1], sys.argv[2]


def read(path):
    with open(path, encoding="utf-8", newline="\n") as f:
        lines = f.read().split("\n")
    head = lines[0].split("\t")
    rows = []
    for no, line in enumerate(lines[1:], start=2):
        if not line or line.startswith("#"):  # a comment names the kind below
            continue
        cells = line.split("\t")
        cells += [""] * (len(head) - len(cells))
        row = dict(zip(head, cells))
        row["_line"] = no
        rows.append(row)
    return rows


def run(rows, args):
    by_lang = defaultdict(list)
    for r in rows:
        by_lang[r["lang"] if r["lang"] not in ("", "-") else None].append(r)
    out = {}
    for lang, group in by_lang.items():
        cmd = [exe, "norm"] + args + (["--lang", lang] if lang else [])
        data = "".join(r["raw"] + "\n" for r in group).encode()
        res = subprocess.run(cmd, input=data, capture_output=True, check=True)
        got = res.stdout.decode().split("\n")
        assert len(got) == len(group) + 1, "line count differs for lang %s" % lang
        for r, g in zip(group, got):
            out[r["_line"]] = g
    return out


failed = 0
cases = read(here + "/norm.tsv")
got = run(cases, [])
for r in cases:
    if got[r["_line"]] != r["title"]:
        failed += 1
        if failed <= 200:
            print("  norm.tsv:%d [%s] %s\n      want [%s]\n      got  [%s]"
                  % (r["_line"], r["lang"], r["raw"], r["title"], got[r["_line"]]))
print("  norm.tsv: %d of %d cases differ" % (failed, len(cases)))

ffailed = 0
facets = read(here + "/norm-facets.tsv")
got = run(facets, ["--json"])
for r in facets:
    o = json.loads(got[r["_line"]])
    have = {
        "seniority": o["seniority"] or "",
        "schedule": ",".join(sorted(o["schedule"])),
        "location": "; ".join(o["location"]),
        "gender": "yes" if o["gender"] else "no",
    }
    for k in ("seniority", "schedule", "location", "gender"):
        if have[k] != r[k]:
            ffailed += 1
            if ffailed <= 40:
                print("  norm-facets.tsv:%d %s: %s want [%s] got [%s]"
                      % (r["_line"], r["raw"], k, r[k], have[k]))
print("  norm-facets.tsv: %d differences over %d cases" % (ffailed, len(facets)))
sys.exit(1 if failed or ffailed else 0)

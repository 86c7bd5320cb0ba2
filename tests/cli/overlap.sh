#!/bin/sh
# titlemill overlap: divergences against scipy, a planted truth (pairs
# that share most titles rank first, the misfiled occupation is listed),
# groups from a TSV, from skos:broader and from a code prefix, the same
# bytes from postings, a counts table and a store, the review loop, the
# bound on common titles, and bad or empty input.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(dirname "$0")

# ---- the divergence and shared mass against scipy ----
# Random distributions over a small vocabulary, some pairs identical
# (the same counts scaled) and some sharing one key only; every pair that
# shares a key must be listed, and nothing else.  Reference:
# scipy.spatial.distance.jensenshannon(p, q, base=2) squared (Debian's
# python3-scipy), and sum(min(p, q)).
/usr/bin/python3 - "$tmp" <<'PY'
import random, sys
rnd = random.Random(11)
out = sys.argv[1]
rows = []
dists = {}
for lang in ("en", "fr"):
    for i in range(40):
        occ = "occ:%03d" % i
        if i % 10 == 9:     # identical to the one before, counts x3
            d = {k: 3 * n for k, n in dists[(lang, "occ:%03d" % (i - 1))].items()}
        elif i % 10 == 8:   # keys of its own, and one shared word
            d = {"solo%s%d %d" % (lang, i, j): rnd.randint(1, 40) for j in range(5)}
            d["common"] = 1
        else:
            keys = rnd.sample(["k%02d" % k for k in range(30)], rnd.randint(1, 12))
            d = {k: rnd.randint(1, 200) for k in keys}
        dists[(lang, occ)] = d
with open(out + "/rand.tsv", "w") as f:
    f.write("kind\toccupation\tlang\tkey\ttext\tpostings\n")
    for (lang, occ), d in sorted(dists.items()):
        for k, n in sorted(d.items()):
            f.write("form\t%s\t%s\t%s\t%s\t%d\n" % (occ, lang, k, k, n))
import pickle
pickle.dump(dists, open(out + "/rand.pickle", "wb"))
PY
printf 'occupation\tkind\tlang\tlabel\n' > "$tmp/nolabels.tsv"
$T overlap --labels "$tmp/nolabels.tsv" --json --min-postings 1 "$tmp/rand.tsv" > "$tmp/rand.out" 2> "$tmp/rand.err"
check rand-status 0 $?
# a cap of 3 occupations per title: fewer pairs found, the same values
$T overlap --labels "$tmp/nolabels.tsv" --json --min-postings 1 --key-cap 3 "$tmp/rand.tsv" > "$tmp/rand.cap" 2> "$tmp/rand.caperr"
check rand-cap-status 0 $?
/usr/bin/python3 - "$tmp" <<'PY' > "$tmp/sc"
import json, pickle, sys
from itertools import combinations
from scipy.spatial.distance import jensenshannon
out = sys.argv[1]
dists = pickle.load(open(out + "/rand.pickle", "rb"))
def ref(a, b):
    keys = sorted(set(a) | set(b))
    p = [a.get(k, 0) for k in keys]
    q = [b.get(k, 0) for k in keys]
    sp, sq = sum(p), sum(q)
    shared = sum(min(x / sp, y / sq) for x, y in zip(p, q))
    return jensenshannon(p, q, base=2) ** 2, shared
bad = []
got = {}
for l in open(out + "/rand.out"):
    r = json.loads(l)
    got[(r["lang"], r["occupation"], r["other_occupation"])] = (r["divergence"], r["shared"])
want = {}
for lang in ("en", "fr"):
    occs = sorted(o for (l, o) in dists if l == lang)
    for a, b in combinations(occs, 2):
        if set(dists[(lang, a)]) & set(dists[(lang, b)]):
            want[(lang, a, b)] = ref(dists[(lang, a)], dists[(lang, b)])
if set(got) != set(want):
    bad.append("pairs differ: %d listed, %d share a key" % (len(got), len(want)))
for k in want:
    if k in got and (abs(got[k][0] - want[k][0]) > 6e-5 or abs(got[k][1] - want[k][1]) > 6e-5):
        bad.append("%s: got %s, scipy %s" % (k, got[k], want[k]))
# identical pairs are 0, and ranked first
ident = [k for k in want if want[k][0] < 1e-12]
rows = [json.loads(l) for l in open(out + "/rand.out")]
if not ident or any(r["divergence"] != 0 for r in rows[:len(ident)]):
    bad.append("identical pairs not first at 0")
divs = [r["divergence"] for r in rows]
if divs != sorted(divs):
    bad.append("not ranked by divergence")
if any(r["occupation"] >= r["other_occupation"] for r in rows):
    bad.append("the smaller id is not first")
# the capped run: a subset, with the same values
capped = {}
for l in open(out + "/rand.cap"):
    r = json.loads(l)
    capped[(r["lang"], r["occupation"], r["other_occupation"])] = (r["divergence"], r["shared"])
if not set(capped) < set(got):
    bad.append("the capped run is not a proper subset")
for k in capped:
    if capped[k] != got[k]:
        bad.append("capped %s: %s, uncapped %s" % (k, capped[k], got[k]))
print("\n".join(bad) if bad else "ok")
PY
check jsd-vs-scipy ok "$(cat "$tmp/sc")"
grep -q 'pairs compared of 1560 ' "$tmp/rand.err"; check rand-pairs-all 0 $?
grep -q 'held by more than 3 occupations made no pairs' "$tmp/rand.caperr"; check rand-capped-said 0 $?

# ---- a planted truth ----
mkdir -p "$tmp/pt"
/usr/bin/python3 "$here/gen_overlap.py" "$tmp/pt" 7
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 2 --json \
	"$tmp/pt/postings.tsv" > "$tmp/pt.out" 2> "$tmp/pt.err"
check planted-status 0 $?
/usr/bin/python3 - "$tmp/pt" "$tmp/pt.out" <<'PY' > "$tmp/pt.check"
import json, sys
truth = [l.rstrip("\n").split("\t") for l in open(sys.argv[1] + "/truth.tsv")]
rows = [json.loads(l) for l in open(sys.argv[2])]
pairs = [r for r in rows if r["kind"] == "overlapping_occupations"]
nearer = [r for r in rows if r["kind"] == "nearer_other_group"]
planted = {(t[1], t[2]) for t in truth if t[0] == "pair"}
moved = [(t[1], t[2]) for t in truth if t[0] == "misfiled"]
bad = []
# each planted pair in each of the two languages: the first 2 x 3 rows
first = {(r["occupation"], r["other_occupation"]) for r in pairs[:2 * len(planted)]}
if first != planted:
    bad.append("first pairs %s, planted %s" % (sorted(first), sorted(planted)))
# the misfiled occupation: listed first, towards the right group, with titles
for occ, grp in moved:
    hits = [r for r in nearer if r["occupation"] == occ]
    if len(hits) != 2 or any(r["other_group"] != grp or not r["titles"] for r in hits):
        bad.append("misfiled %s not listed towards %s: %s" % (occ, grp, hits))
    if {r["occupation"] for r in nearer[:2]} != {occ}:
        bad.append("misfiled %s not first" % occ)
    if any(r["group_divergence"] <= r["divergence"] for r in hits):
        bad.append("nearer, yet its own group is nearer")
print("\n".join(bad) if bad else "ok")
PY
check planted-truth ok "$(cat "$tmp/pt.check")"

# the same groups from skos:broader (labels in SKOS, or --groups FILE.ttl)
$T overlap --labels "$tmp/pt/groups.ttl" --json "$tmp/pt/postings.tsv" > "$tmp/pt.skos" 2>/dev/null
check skos-status 0 $?
cmp -s "$tmp/pt.out" "$tmp/pt.skos"; check skos-broader-equals-tsv 0 $?
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.ttl" --json "$tmp/pt/postings.tsv" > "$tmp/pt.skos2" 2>/dev/null
cmp -s "$tmp/pt.out" "$tmp/pt.skos2"; check groups-ttl-equals-tsv 0 $?
# skos:narrower from the groups' side gives the same groups
awk '/skos:broader/ { split($0, f, " "); print f[length(f) - 1] " skos:narrower " f[1] " ." } !/skos:broader/' \
	"$tmp/pt/groups.ttl" > "$tmp/pt/narrower.ttl"
grep -q 'grp:00 skos:narrower occ:0000 .' "$tmp/pt/narrower.ttl"; check narrower-made 0 $?
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/narrower.ttl" --json "$tmp/pt/postings.tsv" > "$tmp/pt.narrower" 2>/dev/null
cmp -s "$tmp/pt.out" "$tmp/pt.narrower"; check narrower-equals-broader 0 $?
# a code prefix: the ids occ:GGNN, prefix 2 = the groups
$T overlap --labels "$tmp/pt/labels.tsv" --group-prefix 2 --show groups "$tmp/pt/postings.tsv" > "$tmp/pt.pre" 2>/dev/null
check prefix-groups "00 01 02 03 04 05" "$(awk -F '\t' 'NR > 1 && $2 == "en" { printf "%s%s", s, $1; s = " " }' "$tmp/pt.pre")"
# level 1: the halves of each group
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 1 --show groups "$tmp/pt/postings.tsv" > "$tmp/pt.l1" 2>/dev/null
check level1-groups 24 "$(awk 'NR > 1' "$tmp/pt.l1" | wc -l)"
# dispersion in [0, 1]; members sum to the occupations
awk -F '\t' 'NR > 1 { m += $4; if ($5 < 0 || $5 > 1) bad++ } END { print m + 0, bad + 0 }' "$tmp/pt.l1" > "$tmp/x"
check level1-members "72 0" "$(cat "$tmp/x")"
# per occupation: own and nearest divergence, the flag agrees with the findings
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 2 --show occupations --tsv "$tmp/pt/postings.tsv" > "$tmp/pt.occ" 2>/dev/null
check occ-rows 72 "$(awk 'NR > 1' "$tmp/pt.occ" | wc -l)"
check occ-nearer "$(grep -c '"nearer_other_group"' "$tmp/pt.out")" "$(awk -F '\t' 'NR > 1 && $9 == 1' "$tmp/pt.occ" | wc -l)"
check occ-header "occupation	occupation_label	lang	postings	group	group_divergence	nearest_group	nearest_divergence	nearer_other_group" "$(head -1 "$tmp/pt.occ")"

# TSV: the fixed fields, every row as wide as the header
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 2 "$tmp/pt/postings.tsv" > "$tmp/pt.tsv" 2>/dev/null
check tsv-header "kind	occupation	occupation_label	other_occupation	other_occupation_label	lang	divergence	shared	postings	other_postings	group	other_group	group_divergence	titles" "$(head -1 "$tmp/pt.tsv")"
check tsv-width 14 "$(awk -F '\t' '{ print NF }' "$tmp/pt.tsv" | sort -u | tr '\n' ' ' | sed 's/ $//')"
check tsv-rows "$(wc -l < "$tmp/pt.out")" "$(($(wc -l < "$tmp/pt.tsv") - 1))"
# filters
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 2 --json --lang de --top 2 --max-divergence 0.5 "$tmp/pt/postings.tsv" > "$tmp/f" 2>/dev/null
check filter "de de nearer_other_group" "$(/usr/bin/python3 -c '
import json, sys
r = [json.loads(l) for l in open(sys.argv[1])]
p = [x for x in r if x["kind"] == "overlapping_occupations"]
assert all(x["divergence"] <= 0.5 for x in p)
print(" ".join([x["lang"] for x in p] + [x["kind"] for x in r if x["kind"] != "overlapping_occupations"]))' "$tmp/f")"
# deterministic; a counts table gives the same bytes as the postings
$T tally --labels "$tmp/pt/labels.tsv" -o "$tmp/pt.counts" "$tmp/pt/postings.tsv" 2>/dev/null
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 2 --json "$tmp/pt.counts" > "$tmp/pt.fromcounts" 2>/dev/null
cmp -s "$tmp/pt.out" "$tmp/pt.fromcounts"; check counts-equals-postings 0 $?

# ---- a store gives the same bytes ----
if command -v redis-server > /dev/null 2>&1; then
	redis_start "$tmp/r" --appendonly no || exit 1
	$T tally --labels "$tmp/pt/labels.tsv" --store "unix:$tmp/r/sock" "$tmp/pt/postings.tsv" 2>/dev/null
	$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --level 2 --json \
		--store "unix:$tmp/r/sock" > "$tmp/pt.store" 2>/dev/null
	check store-status 0 $?
	cmp -s "$tmp/pt.out" "$tmp/pt.store"; check store-equals-memory 0 $?
	redis_stop "$tmp/r"
else
	echo "  SKIPPED store check: redis-server is not installed"
fi

# ---- into the review queue: informational rows, never a change ----
q="$tmp/queue.jsonl"
$T review add --queue "$q" "$tmp/pt.out" > /dev/null 2>&1
check review-add 0 $?
n=$($T review list --queue "$q" 2>/dev/null | awk -F '\t' 'NR > 1 { print $3 }' | sort | uniq -c | awk '{ printf "%s:%s ", $2, $1 }')
check review-kinds "nearer_other_group:$(grep -c nearer_other_group "$tmp/pt.out") overlapping_occupations:$(grep -c overlapping_occupations "$tmp/pt.out") " "$n"
ids=$(head -1 "$tmp/pt.out" | cut -c8-23)" "$(grep nearer_other_group "$tmp/pt.out" | head -1 | cut -c8-23)
# shellcheck disable=SC2086
TITLEMILL_NOW=2026-12-01T10:00:00Z $T review accept --queue "$q" --reviewer mira $ids > /dev/null 2>&1
check review-accept 0 $?
$T review export --queue "$q" > "$tmp/delta" 2>/dev/null
check export-status 0 $?
check export-all-review "review review" "$(awk -F '\t' 'NR > 1 { printf "%s%s", s, $5; s = " " }' "$tmp/delta")"
grep -q 'overlaps occ:0401: divergence 0.0846 bits' "$tmp/delta"; check export-reason-pair 0 $?
grep -q 'nearer group grp:03 (' "$tmp/delta"; check export-reason-group 0 $?
# show gives the finding's own evidence
$T review show --queue "$q" "$(grep nearer_other_group "$tmp/pt.out" | head -1 | cut -c8-23)" > "$tmp/show" 2>&1
grep -q 'evidence      divergence [0-9.]* bits from group grp:03 ([1-9][0-9]* postings; this occupation [0-9]*); [0-9.]* bits from its own group grp:01' "$tmp/show"
check review-show-group 0 $?
grep -c '^              title: ' "$tmp/show" > "$tmp/x"; check review-show-titles 5 "$(cat "$tmp/x")"
# adding the same findings again changes nothing
$T review add --queue "$q" "$tmp/pt.out" 2>&1 | grep -q ' 0 new, 0 with new evidence'; check review-readd 0 $?

# ---- a title every occupation uses makes no pairs past the cap ----
/usr/bin/python3 - "$tmp/common.tsv" <<'PY'
import sys
with open(sys.argv[1], "w") as f:
    f.write("kind\toccupation\tlang\tkey\ttext\tpostings\n")
    for i in range(1500):
        f.write("form\tocc:%05d\ten\tstaff\tstaff\t60\n" % i)
        f.write("form\tocc:%05d\ten\town%d\town %d\t60\n" % (i, i, i))
    f.write("form\tocc:00000\ten\tshared pair\tshared pair\t60\n")
    f.write("form\tocc:00001\ten\tshared pair\tshared pair\t60\n")
PY
$T overlap --labels "$tmp/nolabels.tsv" --json "$tmp/common.tsv" > "$tmp/common.out" 2> "$tmp/common.err"
check common-status 0 $?
check common-pairs 1 "$(wc -l < "$tmp/common.out")"
grep -q '1 pairs\? compared of 1124250 .*1 title held by more than 1000 occupations made no pairs' "$tmp/common.err"
check common-said 0 $?
# a share under 1 % keeps the digits that show it (1 of 1,124,250 is 0.000089 %)
grep -q 'compared of 1124250 (0.000089 %)' "$tmp/common.err"; check small-share-shown 0 $?
# the capped title still counts in the pair found: 3 keys, 2 shared of 1/3 each
check common-exact "0.3333 0.6667" "$(/usr/bin/python3 -c '
import json, sys; r = json.loads(open(sys.argv[1]).readline()); print("%.4f %.4f" % (r["divergence"], r["shared"]))' "$tmp/common.out")"
# under the cap, every pair is compared
$T overlap --labels "$tmp/nolabels.tsv" --key-cap 2000 --max-divergence 0.5 "$tmp/common.tsv" > /dev/null 2> "$tmp/common2.err"
grep -q '1124250 pairs compared of 1124250 ' "$tmp/common2.err"; check uncapped-all 0 $?

# ---- too few postings: skipped and counted ----
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nform\tA\ten\tk\tk\t49\nform\tB\ten\tk\tk\t50\nform\tC\ten\tk\tk\t50\n' > "$tmp/small.tsv"
$T overlap --labels "$tmp/nolabels.tsv" "$tmp/small.tsv" > "$tmp/small.out" 2> "$tmp/small.err"
check small-rows 2 "$(wc -l < "$tmp/small.out")"
grep -q '; 2 skipped (fewer than 50 postings on a side)' "$tmp/small.err"; check small-said 0 $?
$T overlap --labels "$tmp/nolabels.tsv" --min-postings 49 "$tmp/small.tsv" > "$tmp/small.out" 2>/dev/null
check small-option 4 "$(wc -l < "$tmp/small.out")"

# ---- empty and bad input ----
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\n' > "$tmp/empty.tsv"
$T overlap --labels "$tmp/nolabels.tsv" "$tmp/empty.tsv" > "$tmp/e" 2>/dev/null
check empty-status 0 $?
check empty-output 1 "$(wc -l < "$tmp/e")"
printf 'title\toccupations\n' > "$tmp/emptyp.tsv"
$T overlap --labels "$tmp/nolabels.tsv" --json --group-prefix 2 "$tmp/emptyp.tsv" > "$tmp/e" 2>/dev/null
check empty-postings "0 0" "$? $(wc -c < "$tmp/e")"
$T overlap --labels "$tmp/nolabels.tsv" "$tmp/missing.tsv" > /dev/null 2> "$tmp/e"
check missing-file 1 $?
grep -q "missing.tsv" "$tmp/e"; check missing-named 0 $?
printf 'occupation\tgruppe\nocc:0000\tx\n' > "$tmp/g1.tsv"
$T overlap --labels "$tmp/nolabels.tsv" --groups "$tmp/g1.tsv" "$tmp/small.tsv" > /dev/null 2> "$tmp/e"
check groups-no-column 1 $?
grep -q "g1.tsv:1: a groups TSV has the columns occupation and group" "$tmp/e"; check groups-no-column-said 0 $?
printf 'occupation\tgroup\nA\tg1\nA\tg2\n' > "$tmp/g2.tsv"
$T overlap --labels "$tmp/nolabels.tsv" --groups "$tmp/g2.tsv" "$tmp/small.tsv" > /dev/null 2> "$tmp/e"
check groups-twice 1 $?
grep -q "g2.tsv:3: an occupation given a second group$" "$tmp/e"; check groups-twice-said 0 $?
# several levels, none chosen: the finest (level 1, twice the groups), said
$T overlap --labels "$tmp/pt/labels.tsv" --groups "$tmp/pt/groups.tsv" --show groups "$tmp/pt/postings.tsv" > "$tmp/e.out" 2> "$tmp/e"
check groups-levels 0 $?
cmp -s "$tmp/e.out" "$tmp/pt.l1"; check groups-levels-finest 0 $?
grep -q "groups.tsv has 2 levels: the groups of level '1' (the finest: the most groups); choose another with --level" "$tmp/e"
check groups-levels-said 0 $?
$T overlap --labels "$tmp/nolabels.tsv" --groups "$tmp/pt/groups.tsv" --level 3 "$tmp/small.tsv" > /dev/null 2> "$tmp/e"
check groups-level-none 1 $?
grep -q "groups.tsv:1: no row has the level given with --level" "$tmp/e"; check groups-level-none-said 0 $?
printf 'occupation\tgroup\tlevel\nA\tg\t1\tstray\n' > "$tmp/g3.tsv"
$T overlap --labels "$tmp/nolabels.tsv" --groups "$tmp/g3.tsv" "$tmp/small.tsv" > /dev/null 2> "$tmp/e"
grep -q "g3.tsv:2: more fields than the header" "$tmp/e"; check groups-wide 0 $?
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<a> skos:broader [ .\n' > "$tmp/bad.ttl"
$T overlap --labels "$tmp/nolabels.tsv" --groups "$tmp/bad.ttl" "$tmp/small.tsv" > /dev/null 2> "$tmp/e"
check groups-bad-ttl 1 $?
grep -q "bad.ttl:" "$tmp/e"; check groups-bad-ttl-named 0 $?
for bad in "--json --tsv" "--group-prefix 0" "--max-divergence 1.5" "--max-divergence x" \
	"--min-postings 0" "--key-cap 1" "--top 0" "--show pairs" "--level 1" \
	"--groups $tmp/g2.tsv --group-prefix 2" "--groups $tmp/pt/groups.ttl --level 2"; do
	# shellcheck disable=SC2086
	$T overlap --labels "$tmp/nolabels.tsv" $bad "$tmp/small.tsv" > /dev/null 2>&1
	check "usage $bad" 2 $?
done
$T overlap "$tmp/small.tsv" > /dev/null 2>&1; check no-labels 2 $?
$T overlap --labels "$tmp/nolabels.tsv" > /dev/null 2>&1; check no-input 2 $?
$T overlap --help | grep -q -- '--max-divergence X'; check help 0 $?

# hostile text in titles and ids: JSON stays valid, TSV stays in its columns
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nform\tocc:"q\\\\\ten\tk "x\tti"tle\\\\ \xe2\x80\xa8 z\t60\nform\tocc:b\ten\tk "x\tother\t60\n' > "$tmp/h.tsv"
$T overlap --labels "$tmp/nolabels.tsv" --json "$tmp/h.tsv" 2>/dev/null | /usr/bin/python3 -c '
import json, sys
rows = [json.loads(l) for l in sys.stdin]
assert len(rows) == 1 and rows[0]["divergence"] == 0, rows
'; check hostile-json 0 $?
check hostile-tsv 14 "$($T overlap --labels "$tmp/nolabels.tsv" "$tmp/h.tsv" 2>/dev/null | awk -F '\t' '{ print NF }' | sort -u)"

# ---- the README's example is what the demo gives ----
DEMO_OUT="$tmp/demo" sh "$here/../../examples/demo.sh" "$T" > "$tmp/demo.log" 2>&1
check demo-status 0 $?
/usr/bin/python3 - "$here/../../README.md" "$tmp/demo" "$T" <<'PY' > "$tmp/readme.check"
import subprocess, sys
readme, demo, t = sys.argv[1:4]
text = open(readme, encoding="utf-8").read()
start = text.index("$ titlemill overlap --labels examples/taxonomy.tsv --group-prefix 2")
block = text[start:text.index("```", start)].split("\n")
cmd = block[0][2:].replace("titlemill", t, 1).replace("out/", demo + "/")
got = subprocess.run(["sh", "-c", cmd], capture_output=True, cwd=sys.argv[1].rsplit("/", 1)[0]).stdout.decode()
print("ok" if got.rstrip("\n") == "\n".join(block[1:]).rstrip("\n") else "differs:\n" + got)
PY
check readme-example ok "$(cat "$tmp/readme.check")"

finish

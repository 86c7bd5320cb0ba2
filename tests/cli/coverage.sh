#!/bin/sh
# titlemill coverage: the same results from postings, a counts table made
# with the labels, and a store; the Wilson intervals it prints against
# scipy (Debian's python3-scipy: binomtest(k, n).proportion_ci, method
# "wilson"); filters, the total line, and bad labels.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
gen=$(dirname "$0")/../bench/gen_titles.py
vocab=$(dirname "$0")/../bench/vocab.tsv

/usr/bin/python3 "$gen" --postings --count 5000 --seed 21 > "$tmp/p.tsv"
# labels: the first title of each occupation and language is pref, the
# others alt, except a few left out so that something is unmatched
awk -F '\t' 'NR == 1 { print "occupation\tkind\tlang\tlabel"; next }
	NR % 9 == 0 { next }
	{ k = (($1, $2) in s) ? "alt" : "pref"; s[$1, $2] = 1; print $1 "\t" k "\t" $2 "\t" $3 }' \
	"$vocab" > "$tmp/labels.tsv"

$T coverage --labels "$tmp/labels.tsv" "$tmp/p.tsv" > "$tmp/from-postings" 2>/dev/null
check status 0 $?
$T tally --labels "$tmp/labels.tsv" "$tmp/p.tsv" > "$tmp/c.tsv" 2>/dev/null
$T coverage --labels "$tmp/labels.tsv" "$tmp/c.tsv" > "$tmp/from-counts" 2>/dev/null
cmp -s "$tmp/from-postings" "$tmp/from-counts"; check postings-equals-counts 0 $?
head -1 "$tmp/from-counts" | grep -q '^occupation	lang	postings	matched	coverage	coverage_low	coverage_high	pref_matched	pref_coverage	labels	labels_unseen	top_unmatched$'
check header 0 $?

# the total line sums the rows
awk -F '\t' 'NR > 1 && $1 != "*" { p += $3; m += $4 } $1 == "*" { tp = $3; tm = $4 }
	END { print (p == tp && m == tm) ? "ok" : "bad " p " " tp " " m " " tm }' "$tmp/from-counts" > "$tmp/x"
check total-line ok "$(cat "$tmp/x")"
n=$(awk -F '\t' 'NR > 1 && $1 != "*" && $4 < $3' "$tmp/from-counts" | wc -l)
[ "$n" -gt 10 ]; check some-unmatched 0 $?

# every interval printed, against scipy
/usr/bin/python3 - "$tmp/from-counts" <<'PY' > "$tmp/sc"
import sys
from scipy.stats import binomtest
bad = 0
rows = open(sys.argv[1], encoding="utf-8").read().split("\n")[1:]
for r in rows:
    if not r:
        continue
    f = r.split("\t")
    n, k, lo, hi = int(f[2]), int(f[3]), float(f[5]), float(f[6])
    if n == 0:
        continue
    ci = binomtest(k, n).proportion_ci(confidence_level=0.95, method="wilson")
    if abs(ci.low - lo) > 0.00006 or abs(ci.high - hi) > 0.00006:
        bad += 1
        print("differs:", r, ci.low, ci.high, file=sys.stderr)
print(bad, len(rows) - 1)
PY
set -- $(cat "$tmp/sc")
check wilson-vs-scipy 0 "$1"
[ "$2" -gt 100 ]; check wilson-rows 0 $?

# filters and JSON
$T coverage --labels "$tmp/labels.tsv" --occupation occ:2512 --lang de "$tmp/c.tsv" > "$tmp/f" 2>/dev/null
check filter-rows 3 "$(wc -l < "$tmp/f")"
$T coverage --labels "$tmp/labels.tsv" --json "$tmp/c.tsv" 2>/dev/null | /usr/bin/python3 -c '
import json, sys
rows = [json.loads(l) for l in sys.stdin]
assert rows[-1]["occupation"] == "*"
assert all(0 <= r["coverage_low"] <= r["coverage"] <= r["coverage_high"] <= 1 for r in rows)
assert any(r["top_unmatched"] for r in rows)
'; check json 0 $?

# the store gives the same as the table
if command -v redis-server > /dev/null 2>&1; then
	redis_start "$tmp/r" --appendonly no || exit 1
	$T tally --labels "$tmp/labels.tsv" --store "unix:$tmp/r/sock" "$tmp/p.tsv" 2>/dev/null
	$T coverage --labels "$tmp/labels.tsv" --store "unix:$tmp/r/sock" > "$tmp/from-store" 2>/dev/null
	cmp -s "$tmp/from-store" "$tmp/from-counts"; check store-equals-counts 0 $?
	redis_stop "$tmp/r"
else
	echo "  SKIPPED store check: redis-server is not installed"
fi

# bad labels
printf 'occupation\tkind\tlang\tlabel\nocc:1\tprefered\ten\tCook\n' > "$tmp/bad1"
$T coverage --labels "$tmp/bad1" "$tmp/c.tsv" > /dev/null 2> "$tmp/err"; check bad-kind 1 $?
grep -q 'bad1:2: kind is pref, alt or hidden' "$tmp/err"; check bad-kind-msg 0 $?
printf 'occupation\tkind\tlabel\nocc:1\tpref\tCook\n' > "$tmp/bad2"
$T coverage --labels "$tmp/bad2" "$tmp/c.tsv" > /dev/null 2> "$tmp/err"; check no-lang-column 1 $?
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\ten\tCook\nocc:2\talt\ten\tCOOK\nocc:3\tpref\ten\t!!! – ?\n' > "$tmp/warn"
$T coverage --labels "$tmp/warn" "$tmp/c.tsv" > /dev/null 2> "$tmp/err"; check warnings-status 0 $?
grep -q "warn:3: label 'COOK' of occ:2 has the key 'cook' of label 'Cook' of occ:1 (line 2)" "$tmp/err"; check collision-msg 0 $?
grep -q "warn:4: label '!!! – ?' normalises to nothing" "$tmp/err"; check empty-label-msg 0 $?
$T coverage "$tmp/c.tsv" > /dev/null 2>&1; check no-labels 2 $?
$T coverage --labels "$tmp/labels.tsv" > /dev/null 2>&1; check no-input 2 $?
finish

#!/bin/sh
# titlemill coverage: the same results from postings, a counts table made
# with the labels, standard input and a store; the Wilson intervals it
# prints against scipy (Debian's python3-scipy: binomtest(k, n)
# .proportion_ci, method "wilson"); the occupations' names; filters (and
# those that match nothing), the total line (posting-occupation pairs and
# distinct postings), and bad labels.
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
head -1 "$tmp/from-counts" | grep -q '^occupation	occupation_label	lang	postings	distinct_postings	matched	coverage	coverage_low	coverage_high	pref_matched	pref_coverage	labels	labels_unseen	top_unmatched$'
check header 0 $?

# standard input: a counts table or postings, as the header says
$T coverage --labels "$tmp/labels.tsv" - < "$tmp/c.tsv" > "$tmp/from-stdin-file" 2>/dev/null
cmp -s "$tmp/from-stdin-file" "$tmp/from-counts"; check stdin-counts-file 0 $?
cat "$tmp/c.tsv" | $T coverage --labels "$tmp/labels.tsv" - > "$tmp/from-stdin-pipe" 2>/dev/null
cmp -s "$tmp/from-stdin-pipe" "$tmp/from-counts"; check stdin-counts-pipe 0 $?
cat "$tmp/p.tsv" | $T coverage --labels "$tmp/labels.tsv" - > "$tmp/from-stdin-postings" 2>/dev/null
cmp -s "$tmp/from-stdin-postings" "$tmp/from-counts"; check stdin-postings-pipe 0 $?
$T coverage --labels "$tmp/labels.tsv" - - < "$tmp/c.tsv" > /dev/null 2>&1; check stdin-twice 2 $?

# the occupation's name: its preferred label in the row's language
awk -F '\t' 'FNR == 1 { next } FILENAME == ARGV[1] && $2 == "pref" && !(($1, $3) in p) { p[$1, $3] = $4; next }
	FILENAME == ARGV[2] && $1 != "*" { n++; if (($1, $3) in p ? $2 == p[$1, $3] : 1) ok++ }
	END { print (n > 100 && ok == n) ? "ok" : "bad " ok " of " n }' \
	"$tmp/labels.tsv" "$tmp/from-counts" > "$tmp/x"
check occupation-label ok "$(cat "$tmp/x")"

# the total line sums the rows: posting-occupation pairs; distinct
# postings counted apart (each posting of the generator carries one or
# two occupations)
awk -F '\t' 'NR > 1 && $1 != "*" { p += $4; m += $6; if ($5 != $4) d++ } $1 == "*" { tp = $4; tm = $6 }
	END { print (p == tp && m == tm && d == 0) ? "ok" : "bad " p " " tp " " m " " tm " " d }' "$tmp/from-counts" > "$tmp/x"
check total-line ok "$(cat "$tmp/x")"
/usr/bin/python3 - "$tmp/p.tsv" "$tmp/from-counts" <<'PY' > "$tmp/x"
import sys
rows = [l.rstrip("\n").split("\t") for l in open(sys.argv[1], encoding="utf-8", errors="surrogateescape")]
h = rows[0]
ids, pairs = set(), 0
for r in rows[1:]:
    r = dict(zip(h, r))
    if not r.get("title", "").strip() or not r.get("occupations") or r["id"] in ids:
        continue
    ids.add(r["id"])
    pairs += len(set(r["occupations"].split("|")))
tot = [l.rstrip("\n").split("\t") for l in open(sys.argv[2], encoding="utf-8")][-1]
print("ok" if (int(tot[3]), int(tot[4])) == (pairs, len(ids)) and pairs > len(ids)
      else "bad %s %s want %d %d" % (tot[3], tot[4], pairs, len(ids)))
PY
check total-pairs-and-distinct ok "$(cat "$tmp/x")"
n=$(awk -F '\t' 'NR > 1 && $1 != "*" && $6 < $4' "$tmp/from-counts" | wc -l)
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
    n, k, lo, hi = int(f[3]), int(f[5]), float(f[7]), float(f[8])
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
# filters that match nothing say so (and still give the table's frame)
$T coverage --labels "$tmp/labels.tsv" --occupation nope "$tmp/c.tsv" > "$tmp/f" 2> "$tmp/err"
check nothing-occ-status 0 $?
check nothing-occ-rows 2 "$(wc -l < "$tmp/f")"
grep -q '^titlemill coverage: --occupation nope: no postings of this occupation in the counts$' "$tmp/err"
check nothing-occ-msg 0 $?
$T coverage --labels "$tmp/labels.tsv" --lang xx "$tmp/c.tsv" > /dev/null 2> "$tmp/err"
grep -q '^titlemill coverage: --lang xx: no postings in this language in the counts$' "$tmp/err"
check nothing-lang-msg 0 $?
$T coverage --labels "$tmp/labels.tsv" --occupation occ:2512 --lang fi "$tmp/c.tsv" > /dev/null 2> "$tmp/err"
grep -q '^titlemill coverage: --lang fi: no postings in this language' "$tmp/err"; check nothing-lang2-msg 0 $?
$T coverage --labels "$tmp/labels.tsv" --occupation occ:2512 --lang de "$tmp/c.tsv" > /dev/null 2> "$tmp/err"
check filter-quiet "" "$(cat "$tmp/err")"
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
	# a prefix under which the store holds nothing is said
	$T counts --store "unix:$tmp/r/sock" --prefix nothere > "$tmp/out" 2> "$tmp/err"
	check empty-prefix-status 0 $?
	grep -q '^titlemill counts: the store holds no counts under the prefix nothere$' "$tmp/err"
	check empty-prefix-msg 0 $?
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
# a taxonomy with many shared keys: the first LABELS_WARN_MAX (10) of
# each kind are named, the rest counted in one line, and the labels
# still count
{ printf 'occupation\tkind\tlang\tlabel\n'
  for i in $(seq 1 25); do printf 'occ:%d\tpref\ten\tCook\nocc:%d\talt\ten\t?!\n' "$i" "$i"; done
} > "$tmp/many"
$T coverage --labels "$tmp/many" "$tmp/c.tsv" > "$tmp/out" 2> "$tmp/err"; check many-warnings-status 0 $?
test "$(grep -c "has the key 'cook' of label 'Cook' of occ:1" "$tmp/err")" = 10; check many-collisions-named 0 $?
test "$(grep -c "normalises to nothing" "$tmp/err")" = 10; check many-empty-named 0 $?
grep -q "many: 24 labels in all have the key of another occupation's label; only the first 10 are named above" "$tmp/err"
check many-collisions-counted 0 $?
grep -q "many: 25 labels in all normalise to nothing and are left out; only the first 10" "$tmp/err"
check many-empty-counted 0 $?
grep -q "warn:3: label 'COOK'" "$tmp/err"; check many-not-before 1 $?
# misused options: one line each, status 2
usage_msg() {
	name=$1 want=$2; shift 2
	$T coverage "$@" < /dev/null > /dev/null 2> "$tmp/err"; check "$name-status" 2 $?
	test "$(cat "$tmp/err")" = "titlemill coverage: $want (the options: titlemill coverage --help)"
	check "$name-msg" 0 $?
}
usage_msg unknown-opt "unknown option '--bogus'" --labels "$tmp/labels.tsv" --bogus "$tmp/c.tsv"
usage_msg unknown-letter "unknown option '-x'" -x "$tmp/c.tsv"
usage_msg flag-value "--json takes no value" --json=yes --labels "$tmp/labels.tsv" "$tmp/c.tsv"
usage_msg no-value "--labels needs a value" "$tmp/c.tsv" --labels
usage_msg ambiguous "--l could be any of --labels --lang --lexicons" --l x "$tmp/c.tsv"
$T coverage "$tmp/c.tsv" > /dev/null 2>&1; check no-labels 2 $?
$T coverage --labels "$tmp/labels.tsv" > /dev/null 2>&1; check no-input 2 $?
finish

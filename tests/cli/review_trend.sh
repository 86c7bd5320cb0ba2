#!/bin/sh
# titlemill review with the rows of titlemill trend, written here by hand
# as trend writes them (JSON Lines, and the TSV of trend --tsv): a rising
# title that is no label becomes a rising_title, a falling label a
# fading_label, the other rows are no items and a note counts them; both
# formats give the same items; a later run refreshes the evidence of the
# same item; a kept (rejected) fading label is asked again only when it
# fell further; list, show, stats and export give both kinds their place
# (export: an added altLabel, and a review row that is never a deletion:
# the SKOS export read back with rdflib, Debian's python3-rdflib); bad
# rows change nothing; a queue in a store the suite starts holds the same.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
export TITLEMILL_NOW=2026-12-01T09:00:00Z
Q="--queue $tmp/q.jsonl"

# trend's rows: Valdoria's warehouses, March against the three months before
row() { # direction label is_label label_kind pb pa ob oa g2 first_seen example
	lk=""; [ -n "$4" ] && lk=",\"label_kind\":\"$4\""
	ex=""; [ -n "${11}" ] && ex="\"${11}\""
	printf '{"direction":"%s","occupation":"occ:0042","occupation_label":"Kommissionierer","lang":"de","label":"%s","key":"%s","is_label":%s%s,"postings_before":%s,"postings_after":%s,"occupation_postings_before":%s,"occupation_postings_after":%s,"g2":%s,"first_seen":"%s","examples":[%s]}\n' \
		"$1" "$2" "$2" "$3" "$lk" "$5" "$6" "$7" "$8" "$9" "${10}" "$ex"
}
{
	row rising scan-picker false "" 0 41 900 1000 52.1234 2026-03 "Scan-Picker (m/w/d) Valdoria Logistik GmbH"
	row rising picker true alt 10 80 900 1000 60.5 2025-11 ""
	row falling lagerist true alt 100 30 1000 900 45.25 2025-11 "Lagerist (m/w/d)"
	row falling lagerjunge false "" 30 0 1000 900 40.5 2025-12 ""
} > "$tmp/march.jsonl"
# the same rows as trend --tsv writes them: columns by name, in its order
# (here shuffled), one example a column, an unknown column ignored
{
	printf 'g2\tdirection\toccupation\toccupation_label\tlang\tlabel\tkey\tis_label\tlabel_kind\tpostings_before\tpostings_after\toccupation_postings_before\toccupation_postings_after\tfirst_seen\texample_1\texample_2\texample_3\tcomment\n'
	printf '52.1234\trising\tocc:0042\tKommissionierer\tde\tscan-picker\tscan-picker\tfalse\t\t0\t41\t900\t1000\t2026-03\tScan-Picker (m/w/d) Valdoria Logistik GmbH\t\t\tnew\n'
	printf '60.5000\trising\tocc:0042\tKommissionierer\tde\tpicker\tpicker\ttrue\talt\t10\t80\t900\t1000\t2025-11\t\t\t\t\n'
	printf '45.2500\tfalling\tocc:0042\tKommissionierer\tde\tlagerist\tlagerist\ttrue\talt\t100\t30\t1000\t900\t2025-11\tLagerist (m/w/d)\t\t\t\n'
	printf '40.5000\tfalling\tocc:0042\tKommissionierer\tde\tlagerjunge\tlagerjunge\tfalse\t\t30\t0\t1000\t900\t2025-12\t\t\t\t\n'
} > "$tmp/march.tsv"

"$T" review add $Q "$tmp/march.jsonl" 2> "$tmp/e"
check "add trend rows: exit 0" 0 $?
check "add: the items" "titlemill review: add: 2 suggestions: 2 new, 0 with new evidence, 0 unchanged, 0 reopened, 0 rejected before and kept closed, 0 accepted before
titlemill review: add: note: 2 rows of trend are no queue items: 1 rising title that is a label already, 1 falling title that is no label" \
	"$(cat "$tmp/e")"

# list: the kinds, the postings of the strong window, both shares
"$T" review list $Q > "$tmp/list"
got=$(awk -F '\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
	{ print $c["kind"] "|" $c["label"] "|" $c["score"] "|" $c["postings"] "|" $c["occupation_postings"] "|" $c["precision"] "|" $c["share_before"] "|" $c["share_after"] }' "$tmp/list")
check "list: both kinds and their figures" "rising_title|scan-picker|52.1234|41|1000||0.0000|0.0410
fading_label|lagerist|45.2500|100|1000||0.1000|0.0333" "$got"
got=$("$T" review list $Q --kind fading_label | tail -n +2 | cut -f3,7)
check "list --kind fading_label" "fading_label	lagerist" "$got"

# the TSV of trend gives the same items, byte for byte in list and in the queue
"$T" review add --queue "$tmp/q_tsv.jsonl" "$tmp/march.tsv" 2> "$tmp/e"
check "add trend --tsv: exit 0" 0 $?
grep -q "note: 2 rows of trend are no queue items" "$tmp/e" || check "tsv: the note" note "$(cat "$tmp/e")"
"$T" review list --queue "$tmp/q_tsv.jsonl" > "$tmp/list_tsv"
cmp -s "$tmp/list" "$tmp/list_tsv" || check "list after JSON and after TSV" same "$(diff "$tmp/list" "$tmp/list_tsv")"
got=$(/usr/bin/python3 - "$tmp/q.jsonl" "$tmp/q_tsv.jsonl" <<'PY'
import json, sys
a, b = ([json.loads(l) for l in open(f, encoding="utf-8")] for f in sys.argv[1:3])
# the evidence as read by Python: equal numbers, equal strings (the TSV's
# unknown column left out)
print("same" if a == b else "differ: %r\n%r" % (a, b))
PY
)
check "queue after JSON and after TSV" same "$got"
# and through standard input
"$T" review add --queue "$tmp/q_stdin.jsonl" < "$tmp/march.tsv" 2> /dev/null
"$T" review list --queue "$tmp/q_stdin.jsonl" | cmp -s - "$tmp/list" || check "trend --tsv on standard input" same differ

RISE=$(awk -F '\t' '$3 == "rising_title" { print $1 }' "$tmp/list")
FADE=$(awk -F '\t' '$3 == "fading_label" { print $1 }' "$tmp/list")
[ "${#RISE}" = 16 ] && [ "${#FADE}" = 16 ] || check "ids of 16 hex digits" ok "$RISE $FADE"

# show: both windows with their intervals (Wilson 1927 at z = 1.96,
# computed here by the formula), the question a fading label asks
set -- $(/usr/bin/python3 -c '
from math import sqrt
z = 1.959963984540054
for k, n in ((100, 1000), (30, 900)):
    p = k / n; d = 1 + z * z / n; c = p + z * z / (2 * n); h = z * sqrt(p * (1 - p) / n + z * z / (4 * n * n))
    print("%.4f-%.4f" % ((c - h) / d, (c + h) / d))')
"$T" review show $Q "$FADE" > "$tmp/show"
grep -q "^question      keep it, demote it to a hidden label, or retire it?" "$tmp/show" &&
	grep -q "^evidence      falling, G2 45.2500, first seen 2025-11$" "$tmp/show" &&
	grep -q "^              before 100 of 1000 postings (share 0.1000, 95 % interval $1)$" "$tmp/show" &&
	grep -q "^              after  30 of 900 postings (share 0.0333, 95 % interval $2)$" "$tmp/show" &&
	grep -q "^label kind    alt$" "$tmp/show" ||
	check "show a fading label ($1, $2)" shown "$(cat "$tmp/show")"

# a later run: the same title rising further is the same item, new evidence
row rising scan-picker false "" 0 66 1000 1100 80.5 2026-03 "Scan-Picker Valdoria" > "$tmp/april.jsonl"
TITLEMILL_NOW=2026-12-08T09:00:00Z "$T" review add $Q "$tmp/april.jsonl" 2> "$tmp/e"
grep -q "1 suggestions: 0 new, 1 with new evidence" "$tmp/e" || check "later run: refreshed" refreshed "$(cat "$tmp/e")"
got=$("$T" review list $Q --kind rising_title | tail -n +2 | cut -f1,9,10)
check "later run: the same id, the new figures" "$RISE	80.5000	66" "$got"

# decisions: the rising title accepted, the fading label accepted (to review)
"$T" review accept $Q --reviewer ana --note "in every shop now" "$RISE" 2> /dev/null
"$T" review accept $Q --reviewer ana "$FADE" 2> /dev/null
"$T" review export $Q > "$tmp/delta.tsv"
check "export: exit 0" 0 $?
got=$(awk -F '\t' 'NR > 1 { print $1 "|" $2 "|" $4 "|" $5 "|" $10 }' "$tmp/delta.tsv")
check "export: an alt label to add, written as postings write it; a review row" "occ:0042|alt|Scan-Picker|add|
occ:0042|alt|lagerist|review|fading: 100 of 1000 postings before (share 0.1000), 30 of 900 after (share 0.0333), G2 45.2500; keep, demote to hidden or retire" "$got"
got=$(cut -f5 "$tmp/delta.tsv" | sort -u | tr '\n' ' ')
check "export: never a deletion" "add change review " "$got"
"$T" review export $Q --format turtle > "$tmp/delta.ttl"
got=$(/usr/bin/python3 - "$tmp/delta.ttl" <<'PY'
import sys
from rdflib import Graph
g = Graph()
g.parse(sys.argv[1], format="turtle")
print(sorted((str(s), str(p).split("#")[1], str(o), o.language) for s, p, o in g))
PY
)
check "SKOS export (rdflib): one label added, the fading one untouched" \
	"[('occ:0042', 'altLabel', 'Scan-Picker', 'de')]" "$got"
grep -q '^# to review, not changed: occ:0042 alt "lagerist"@de - fading:' "$tmp/delta.ttl" ||
	check "SKOS export: the fading label as a comment" comment "$(cat "$tmp/delta.ttl")"

# stats: a row per kind
got=$("$T" review stats $Q | awk -F '\t' '$1 == "kind" && ($2 == "rising_title" || $2 == "fading_label") { print $2, $3, $5 }' | tr '\n' ' ')
check "stats: both kinds" "rising_title 1 1 fading_label 1 1 " "$got"

# a fading label kept: asked again only when it fell further
Q2="--queue $tmp/q2.jsonl"
row falling lagerist true alt 100 30 1000 900 45.25 2025-11 "" > "$tmp/f1.jsonl"
"$T" review add $Q2 "$tmp/f1.jsonl" 2> /dev/null
"$T" review reject $Q2 --reviewer bo --note "still our word" "$FADE" 2> /dev/null
check "reject a fading label: kept" rejected "$("$T" review list $Q2 --status all | tail -n +2 | cut -f2)"
row falling lagerist true alt 100 32 1000 1000 44.0 2025-11 "" > "$tmp/f2.jsonl"
TITLEMILL_NOW=2026-12-08T09:00:00Z "$T" review add $Q2 --reopen-factor 1 "$tmp/f2.jsonl" 2> "$tmp/e"
grep -q "1 rejected before and kept closed" "$tmp/e" || check "about the same share: kept closed" closed "$(cat "$tmp/e")"
row falling lagerist true alt 100 4 1000 1000 140.0 2025-11 "" > "$tmp/f3.jsonl"
TITLEMILL_NOW=2026-12-15T09:00:00Z "$T" review add $Q2 "$tmp/f3.jsonl" 2> "$tmp/e"
grep -q "1 reopened" "$tmp/e" || check "fell further: reopened" reopened "$(cat "$tmp/e")"
"$T" review show $Q2 "$FADE" | grep -q "reopened  on 100 postings, score 140.0000 (the share fell: 4 of 1000 postings, upper bound 0.0102 below 0.0234" ||
	check "show: why it reopened" "the share fell" "$("$T" review show $Q2 "$FADE")"

# bad rows change nothing, and say where
cp "$tmp/q.jsonl" "$tmp/q.before"
{ head -1 "$tmp/march.jsonl"; row rising lagerhelfer false "" 50 10 1000 1000 20.0 2025-11 ""; } > "$tmp/bad.jsonl"
"$T" review add $Q "$tmp/bad.jsonl" 2> "$tmp/e"
check "a row at odds with its direction: exit 1" 1 $?
grep -q "bad.jsonl:2: \"direction\" is rising but the share after is not higher than before; nothing changed" "$tmp/e" ||
	check "the bad row named" "bad.jsonl:2" "$(cat "$tmp/e")"
cut -f1-6,8- "$tmp/march.tsv" > "$tmp/nokey.tsv"
"$T" review add $Q "$tmp/nokey.tsv" 2> "$tmp/e"
check "a TSV without trend's key: exit 1" "1 titlemill review: $tmp/nokey.tsv:1: no column \"key\": review add reads JSON Lines of propose, overlap or trend, or the TSV of trend --tsv; nothing changed" "$? $(cat "$tmp/e")"
sed '3s/\t80\t/\t8O\t/' "$tmp/march.tsv" > "$tmp/badcell.tsv"
"$T" review add $Q "$tmp/badcell.tsv" 2> "$tmp/e"
check "a TSV cell that is no number: exit 1" "1 titlemill review: $tmp/badcell.tsv:3: \"postings_after\" must be a whole number of 0 or more; nothing changed" "$? $(cat "$tmp/e")"
cmp -s "$tmp/q.jsonl" "$tmp/q.before" || check "bad rows: the queue unchanged" same differ

# the queue in a store holds the same items
if command -v redis-server > /dev/null; then
	redis_start "$tmp/redis" || failures=$((failures + 1))
	S="--store unix:$tmp/redis/sock"
	"$T" review add $S "$tmp/march.jsonl" 2> /dev/null
	"$T" review list $S | cmp -s - "$tmp/list" || check "store: the same list" same "$("$T" review list $S)"
	redis_stop "$tmp/redis"
fi
finish

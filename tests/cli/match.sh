#!/bin/sh
# titlemill match: the fixed output (header, N lines in and out, --json
# with --top candidates, ties by occupation id), each way of finding a
# candidate (label, variant, title, similar), --lang and a TSV input's lang
# column, the memory default against a store, hostile input (any bytes, a
# line of a megabyte, an empty or header-only labels file), and the
# held-out coding test against its two baselines (match_heldout.py), and
# text written apart from the code (match_unseen.py).
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")" && pwd)

# an invented taxonomy: two occupations share a label; one is named in
# two languages
printf 'occupation\tkind\tlang\tlabel\n' > "$tmp/labels.tsv"
printf 'occ:8344\tpref\ten\tForklift Driver\nocc:8344\tpref\tde\tGabelstaplerfahrer\n' >> "$tmp/labels.tsv"
printf 'occ:4321\tpref\ten\tStock Controller\nocc:4321\tpref\tde\tLagerist\n' >> "$tmp/labels.tsv"
printf 'occ:5230\tpref\ten\tCashier\nocc:5230\tpref\tde\tKassierer\n' >> "$tmp/labels.tsv"
printf 'occ:9333\tpref\ten\tWarehouse Operative\nocc:9333\talt\ten\tStock Controller\n' >> "$tmp/labels.tsv"
printf 'occ:2512\tpref\ten\tSoftware Developer\n' >> "$tmp/labels.tsv"
# postings: "lagermitarbeiter" is no label, coded 3 to 9333 and 1 to 4321
{
	printf 'id\tlang\toccupations\ttitle\n'
	i=0
	for t in "Lagermitarbeiter (m/w/d)" "Lagermitarbeiter" "Lagermitarbeiter Valdoria Logistik GmbH"; do
		i=$((i + 1)); printf '%d\tde\tocc:9333\t%s\n' $i "$t"
	done
	printf '10\tde\tocc:4321\tLagermitarbeiter\n'
	printf '11\ten\tocc:4321\tStock Controller\n12\ten\tocc:4321\tStock Controller\n'
	printf '13\ten\tocc:9333\tStock Controller\n'
	printf '14\tde\tocc:5230\tKassierer\n'
} > "$tmp/p.tsv"
$T tally --labels "$tmp/labels.tsv" -o "$tmp/c.tsv" "$tmp/p.tsv" 2>/dev/null

printf '%s\n' "Gabelstapler-Fahrer (m/w/d)" "Lagermitarbeiter" "Stock Controller" \
	"Lagerst" "" "xyzzy qwv" "Softwar Develper" > "$tmp/in.txt"
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" "$tmp/in.txt" > "$tmp/out.tsv" 2> "$tmp/err"
check exit 0 $?
check header "text	title	occupation	occupation_label	score	via	matched" "$(head -1 "$tmp/out.tsv")"
check lines-in-out 8 "$(wc -l < "$tmp/out.tsv")"
row() { sed -n "$(($1 + 1))p" "$tmp/out.tsv" | cut -f "$2"; }
check variant "occ:8344 variant Gabelstaplerfahrer" "$(row 1 3) $(row 1 6) $(row 1 7)"
check variant-score 0.8550 "$(row 1 5)"
check title "occ:9333 title lagermitarbeiter" "$(row 2 3) $(row 2 6) $(row 2 7)"
# a label shared by two occupations: the market's coding orders them
check shared-label "occ:4321 label" "$(row 3 3) $(row 3 6)"
check similar "occ:4321 similar Lagerist" "$(row 4 3) $(row 4 6) $(row 4 7)"
check empty-line "	" "$(row 5 1-2)"
check nothing-passes "xyzzy qwv	xyzzy qwv					" "$(row 6 1-7)"
check similar-typos "occ:2512 similar" "$(row 7 3) $(row 7 6)"
check label-name "Forklift Driver" "$(row 1 4)"

# --json: the candidates, best first, their evidence (the shared label is
# reported on standard error once per run: silenced from here on)
exec 3>&2 2>/dev/null
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" --json --top 2 "$tmp/in.txt" > "$tmp/out.jsonl"
check json-lines 7 "$(wc -l < "$tmp/out.jsonl")"
/usr/bin/python3 - "$tmp/out.jsonl" > "$tmp/j" <<'PY'
import json, sys
rows = [json.loads(l) for l in open(sys.argv[1], encoding="utf-8")]
r = rows[2]
c = r["candidates"]
print(len(c), c[0]["occupation"], c[0]["via"], c[1]["occupation"], c[1]["via"],
      c[0]["evidence"]["postings"], c[0]["evidence"]["occupation_postings"],
      c[0]["score"] >= c[1]["score"], r["key"], r["lang"])
s = rows[3]["candidates"][0]
print(s["via"], s["evidence"]["nearest"][0]["text"], 0 < s["evidence"]["nearest"][0]["similarity"] <= 1)
t = rows[1]["candidates"]
print(t[0]["via"], t[0]["evidence"]["postings"], t[0]["evidence"]["occupation_postings"],
      t[0]["evidence"]["share_low"] < t[0]["evidence"]["share"] < t[0]["evidence"]["share_high"])
print(all(0 <= c["score"] <= 1 for r in rows for c in r["candidates"]))
PY
check json-shared "2 occ:4321 label occ:9333 label 3 2 True stock controller None" "$(sed -n 1p "$tmp/j")"
check json-similar "similar Lagerist True" "$(sed -n 2p "$tmp/j")"
check json-title "title 4 3 True" "$(sed -n 3p "$tmp/j")"
check json-range True "$(sed -n 4p "$tmp/j")"

# via acronym: "FD" is no word of a label but the initials of Forklift
# Driver; TSV and --json with its fit and share
check acronym-tsv "occ:8344	Forklift Driver	acronym	Forklift Driver" \
	"$(echo FD | $T match --labels "$tmp/labels.tsv" | sed -n 2p | cut -f 3,4,6,7)"
check acronym-json "acronym en 1.0 1.0 True" "$(echo FD | $T match --labels "$tmp/labels.tsv" --json |
	/usr/bin/python3 -c 'import json, sys
c = json.loads(sys.stdin.read())["candidates"][0]
e = c["evidence"]
print(c["via"], e["label_lang"], e["fit"], e["acronym_share"], 0.3 < c["score"] < 0.8)')"

# ties are broken by occupation id: two occupations with the same label only
printf 'occupation\tkind\tlang\tlabel\nocc:b\tpref\ten\tTester\nocc:a\tpref\ten\tTester\n' > "$tmp/tie.tsv"
check tie "occ:a occ:b" "$(echo tester | $T match --labels "$tmp/tie.tsv" --json 2>/dev/null |
	/usr/bin/python3 -c 'import json,sys; print(" ".join(c["occupation"] for c in json.load(sys.stdin)["candidates"]))')"

# --lang and a lang column: a label in the hint's language is preferred
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tChef\nocc:2\tpref\ten\tChef\n' > "$tmp/lang.tsv"
check lang-de occ:1 "$(echo Chef | $T match --labels "$tmp/lang.tsv" --lang de | tail -1 | cut -f3)"
check lang-en occ:2 "$(echo Chef | $T match --labels "$tmp/lang.tsv" --lang en | tail -1 | cut -f3)"
printf 'id\ttext\tlang\n1\tChef\tde\n2\tChef\ten\n3\tChef\t\n' > "$tmp/in-tsv.tsv"
check tsv-input "occ:1 occ:2 occ:1" "$($T match --labels "$tmp/lang.tsv" --tsv-input "$tmp/in-tsv.tsv" |
	tail -n +2 | cut -f3 | tr '\n' ' ' | sed 's/ $//')"
printf 'text\tlang\nChef\tnot a tag!\n' > "$tmp/bad-lang.tsv"
$T match --labels "$tmp/lang.tsv" --tsv-input "$tmp/bad-lang.tsv" > /dev/null 2> "$tmp/err"
check bad-lang-exit 1 $?
check bad-lang-msg 1 "$(grep -c 'bad-lang.tsv:2: lang' "$tmp/err")"
printf 'x\ty\n1\t2\n' > "$tmp/no-text.tsv"
$T match --labels "$tmp/lang.tsv" --tsv-input "$tmp/no-text.tsv" > /dev/null 2>&1
check no-text-column 1 $?

# usage errors
$T match "$tmp/in.txt" > /dev/null 2>&1
check no-labels 2 $?
$T match --labels "$tmp/labels.tsv" --min-score 1.5 "$tmp/in.txt" > /dev/null 2>&1
check bad-min-score 2 $?
$T match --labels "$tmp/labels.tsv" --top 0 "$tmp/in.txt" > /dev/null 2>&1
check bad-top 2 $?
$T match --labels "$tmp/labels.tsv" --counts "$tmp/none.tsv" "$tmp/in.txt" > /dev/null 2>&1
check missing-counts 1 $?

# --min-score: a higher bar empties the line, never drops it
check min-score "1" "$($T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" --min-score 0.95 "$tmp/in.txt" 2>/dev/null |
	awk -F '\t' 'NR > 1 && $3 != ""' | wc -l | tr -d ' ')"

# hostile input: any bytes, NUL, a line of a megabyte, no final line end
head -c 200000 /dev/urandom > "$tmp/rnd.bin" 2>/dev/null ||
	/usr/bin/python3 -c 'import os,sys; sys.stdout.buffer.write(os.urandom(200000))' > "$tmp/rnd.bin"
n=$(/usr/bin/python3 -c 'import sys; d=open(sys.argv[1],"rb").read(); print(d.count(b"\n") + (1 if d and not d.endswith(b"\n") else 0))' "$tmp/rnd.bin")
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" "$tmp/rnd.bin" > "$tmp/rnd.out" 2>/dev/null
check bytes-exit 0 $?
check bytes-lines $((n + 1)) "$(wc -l < "$tmp/rnd.out")"
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" --json "$tmp/rnd.bin" 2>/dev/null |
	/usr/bin/python3 -c 'import json,sys; [json.loads(l) for l in sys.stdin.buffer]; print("ok")' > "$tmp/j" 2>&1
check bytes-json ok "$(cat "$tmp/j")"
# a megabyte line of many words against one of a single word: the work per
# line is bounded (a generous ratio, not a timing)
/usr/bin/python3 -c 'import sys; sys.stdout.write("lagerist kassierer " * 60000 + "\n")' > "$tmp/words.txt"
/usr/bin/python3 -c 'import sys; sys.stdout.write("x" * 1140000 + "\n")' > "$tmp/one.txt"
t0=$(date +%s%N)
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" "$tmp/one.txt" > "$tmp/one.out" 2>/dev/null
t1=$(date +%s%N)
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" "$tmp/words.txt" > "$tmp/words.out" 2> "$tmp/err"
t2=$(date +%s%N)
check long-line-lines 2 "$(wc -l < "$tmp/words.out")"
check long-line-linear 1 "$(( (t2 - t1) < 20 * (t1 - t0) + 500000000 ? 1 : 0 ))"
printf 'Kassierer' | $T match --labels "$tmp/labels.tsv" > "$tmp/noeol.out"
check no-final-newline "occ:5230" "$(tail -1 "$tmp/noeol.out" | cut -f3)"

# labels: an empty file is refused with its name; a header alone matches
# the counts only
: > "$tmp/empty.tsv"
echo Lagerist | $T match --labels "$tmp/empty.tsv" > /dev/null 2> "$tmp/err"
check empty-labels-exit 1 $?
check empty-labels-msg 1 "$(grep -c 'empty.tsv' "$tmp/err")"
printf 'occupation\tkind\tlang\tlabel\n' > "$tmp/head.tsv"
check header-only-labels "occ:9333 title" "$(echo Lagermitarbeiter | $T match --labels "$tmp/head.tsv" --counts "$tmp/c.tsv" | tail -1 | cut -f3,6 | tr '\t' ' ')"
check no-counts-no-labels "		" "$(echo Lagerist | $T match --labels "$tmp/head.tsv" | tail -1 | cut -f3-5)"

# the same answers whatever order the counts were read in, from postings
# or a counts table
$T match --labels "$tmp/labels.tsv" --counts "$tmp/p.tsv" --json "$tmp/in.txt" > "$tmp/from-postings" 2>/dev/null
$T match --labels "$tmp/labels.tsv" --counts "$tmp/c.tsv" --json "$tmp/in.txt" > "$tmp/from-table"
cmp -s "$tmp/from-postings" "$tmp/from-table"; check postings-equal-table 0 $?

# a store gives the same bytes as the memory default
if command -v redis-server > /dev/null 2>&1; then
	redis_start "$tmp/r" --appendonly no || exit 1
	$T tally --labels "$tmp/labels.tsv" --store "unix:$tmp/r/sock" "$tmp/p.tsv" 2>/dev/null
	$T match --labels "$tmp/labels.tsv" --store "unix:$tmp/r/sock" --json "$tmp/in.txt" > "$tmp/from-store" 2>/dev/null
	cmp -s "$tmp/from-store" "$tmp/from-table"; check store-equals-memory 0 $?
	redis_stop "$tmp/r"
else
	echo "  SKIPPED store check: redis-server is not installed"
fi

# tally --code-missing: a posting without occupations is counted under its
# best match when it scores at least --min-score, and the summary says how
# many; one that matches nothing stays without
{
	printf 'id\tlang\toccupations\ttitle\n'
	printf '1\tde\tocc:9333\tLagermitarbeiter\n2\tde\tocc:9333\tLagermitarbeiter\n'
	printf '3\tde\t\tLagermitarbeiter (m/w/d)\n4\tde\t\tGabelstapler-Fahrer\n5\tde\t\tqqqq zzzz\n'
} > "$tmp/un.tsv"
$T tally --labels "$tmp/labels.tsv" --code-missing -o "$tmp/un.counts" "$tmp/un.tsv" 2> "$tmp/err"
check code-missing-exit 0 $?
check code-missing-summary 1 "$(grep -c 'coded_by_match 2 (best match scoring at least 0.50), 1 left without' "$tmp/err")"
check code-missing-title "title	occ:9333	de	lagermitarbeiter	lagermitarbeiter	3" "$(grep '^title	occ:9333' "$tmp/un.counts")"
check code-missing-variant 1 "$(grep -c '^title	occ:8344	de	gabelstapler fahrer	' "$tmp/un.counts")"
check code-missing-left "key		de	qqqq zzzz		1" "$(grep '^key.*qqqq' "$tmp/un.counts")"
$T tally --labels "$tmp/labels.tsv" -o "$tmp/un0.counts" "$tmp/un.tsv" 2> "$tmp/err"
check without-code-missing 1 "$(grep -c '3 malformed rows skipped' "$tmp/err")"
$T tally --labels "$tmp/labels.tsv" --code-missing --min-score 0.99 -o "$tmp/un1.counts" "$tmp/un.tsv" 2> "$tmp/err"
check code-missing-bar 1 "$(grep -c 'coded_by_match 0 ' "$tmp/err")"
$T tally --code-missing -o "$tmp/x" "$tmp/un.tsv" 2>/dev/null
check code-missing-no-labels 2 $?
$T tally --labels "$tmp/labels.tsv" --code-missing --store "unix:$tmp/none.sock" "$tmp/un.tsv" 2>/dev/null
check code-missing-store 2 $?

# held-out coding: match against the raw-title and the key baselines
/usr/bin/python3 "$here/match_heldout.py" "$T" "$tmp" --count 20000 > "$tmp/heldout" 2>&1
check heldout 0 $?
sed 's/^/  /' "$tmp/heldout"

# text it has never seen (tests/data/match-unseen, written apart from the
# code and the bench generator): top-1 and top-3 of the lines a curator
# codes, top-1 among those the default --min-score shows, and the lines
# that name no occupation of the taxonomy kept under the default.  The
# build before word alignment showed 7 of the 56 no-match lines (p90 0.311).
mkdir -p "$tmp/unseen"
/usr/bin/python3 "$here/match_unseen.py" "$T" "$here/../data/match-unseen" "$tmp/unseen" \
	--floors 0.98 0.985 0.95 0.25 1 > "$tmp/unseen.out" 2>&1
check unseen 0 $?
sed 's/^/  /' "$tmp/unseen.out"

# acronyms and short forms (tests/data/match-acronym, against the labels
# and postings of match-unseen): RN, CSR, OSS, GuK, chauffeur PL, and
# capitals that name nothing (IT, HR, PA, CEO).  The build before the
# acronym path: top-1 0.439, top-3 0.463, shown 0.366; no-match p90 0.426,
# 3 shown (IT, HR, IT support, by similarity).
/usr/bin/python3 "$here/match_unseen.py" "$T" "$here/../data/match-unseen" "$tmp/unseen" \
	--queries "$here/../data/match-acronym/queries.tsv" \
	--floors 0.9 0.95 0.8 0.45 4 > "$tmp/acronym.out" 2>&1
check acronym 0 $?
sed 's/^/  /' "$tmp/acronym.out"

finish

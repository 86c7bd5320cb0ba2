#!/bin/sh
# Hostile and broken input, end to end, for norm, tally, counts,
# coverage, propose and labels: truncated files, invalid UTF-8, UTF-16
# with a BOM, NUL bytes, CR-only line ends, TSV with a missing or
# duplicated column or extra TABs, JSON Lines with deep nesting, huge
# numbers, wrong types and duplicate keys, labels with duplicate or
# contradictory entries, a Turtle syntax error on a known line, output
# to a full disk (a 64 KiB tmpfs, when mount is permitted) and into a
# closed pipe, and a Redis server that disappears, answers slowly or
# wants a password.  Each case checks the exit status (0 ok, 1 runtime
# failure, 2 usage), a message naming file and line where there is one,
# and that no partial output is left behind.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
ex=$(cd "$(dirname "$0")/../../examples" && pwd)
gen=$(dirname "$0")/../bench/gen_titles.py
L=$ex/taxonomy.tsv
full=$tmp/full
rd=$tmp/redis
cleanup() {
	[ -f "$rd/pid" ] && kill -CONT "$(cat "$rd/pid")" 2>/dev/null
	redis_stop "$rd" 2>/dev/null
	mountpoint -q "$full" 2>/dev/null && umount "$full"
	rm -rf "$tmp"
}
trap cleanup EXIT INT TERM

# run NAME STATUS CMD...: stdout to $tmp/out, stderr to $tmp/err
run() {
	name=$1 want=$2
	shift 2
	"$@" > "$tmp/out" 2> "$tmp/err"
	check "$name-status" "$want" $?
}
# msg NAME TEXT: standard error holds TEXT (a fixed string)
msg() {
	grep -qF -- "$2" "$tmp/err"; check "$1-msg" 0 $?
}
# no_out NAME: nothing on standard output
no_out() {
	check "$1-no-output" 0 "$(wc -c < "$tmp/out" | tr -d ' ')"
}
# prefixed NAME COMMAND: every line on standard error (at least one)
# starts with "titlemill COMMAND: ", including the messages of the
# modules several commands share (the labels and postings readers)
prefixed() {
	n=$(grep -c '' "$tmp/err")
	k=$(grep -c "^titlemill $2: " "$tmp/err")
	[ "$n" -gt 0 ] && [ "$n" = "$k" ]; check "$1-prefix" 0 $?
}
# counts as a TSV of postings in the columns title, occupations, lang, id
P() { printf 'title\toccupations\tlang\tid\n'; printf "$@"; }

/usr/bin/python3 "$gen" --postings --count 3000 --seed 21 > "$tmp/p.tsv"
$T tally "$tmp/p.tsv" > "$tmp/p.counts" 2>/dev/null
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tKoch\nocc:2\tpref\tde\tKellner\n' > "$tmp/l.tsv"

# ---- truncated files ----
head -c 1500 "$tmp/p.tsv" > "$tmp/cut.tsv"
cutline=$(wc -l < "$tmp/cut.tsv" | tr -d ' '); cutline=$((cutline + 1))
run cut-postings 0 $T tally "$tmp/cut.tsv"
msg cut-postings "cut.tsv:$cutline: the last row has no line end: was the file cut short?"
head -c 4000 "$tmp/p.counts" > "$tmp/cut.counts"
cutline=$(wc -l < "$tmp/cut.counts" | tr -d ' '); cutline=$((cutline + 1))
run cut-counts 1 $T counts -o "$tmp/cut.out" "$tmp/cut.counts"
msg cut-counts "cut.counts:$cutline: the last row has no line end: the table was cut short"
[ ! -e "$tmp/cut.out" ]; check cut-counts-no-file 0 $?
run cut-counts-coverage 1 $T coverage --labels "$L" "$tmp/cut.counts"
msg cut-counts-coverage "cut.counts:$cutline: the last row has no line end"
no_out cut-counts-coverage
run cut-counts-propose 1 $T propose --labels "$L" "$tmp/cut.counts"
no_out cut-counts-propose
printf '{"title":"Koch","occupations":"occ:1"}\n{"title":"Kell' > "$tmp/cut.jsonl"
run cut-jsonl 0 $T tally "$tmp/cut.jsonl"
msg cut-jsonl "cut.jsonl:2: bad JSON"
run cut-jsonl-strict 1 $T tally --strict -o "$tmp/strict.out" "$tmp/cut.jsonl"
msg cut-jsonl-strict "cut.jsonl:2: bad JSON"
[ ! -e "$tmp/strict.out" ]; check cut-jsonl-strict-no-file 0 $?
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tKo' > "$tmp/cut-labels.tsv"
run cut-labels 0 $T labels "$tmp/cut-labels.tsv"
msg cut-labels "cut-labels.tsv:2: the last row has no line end"
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<occ:1> skos:prefLabel "Koch"@de .\n<occ:2> skos:prefLabel "Kell' > "$tmp/cut.ttl"
run cut-ttl 1 $T labels "$tmp/cut.ttl"
msg cut-ttl "cut.ttl:3:"
no_out cut-ttl
: > "$tmp/empty"
run empty-tally 1 $T tally "$tmp/empty"
msg empty-tally "empty: empty input"
run empty-counts 1 $T counts "$tmp/empty"
msg empty-counts "empty: empty file, no header line"
run empty-labels 1 $T labels "$tmp/empty"
run empty-norm 0 $T norm "$tmp/empty"
no_out empty-norm

# ---- invalid UTF-8 ----
printf 'Koch\377 (m/w/d)\nVerk\344ufer\n' > "$tmp/latin1.txt"
run utf8-norm 0 $T norm "$tmp/latin1.txt"
check utf8-norm-lines 2 "$(wc -l < "$tmp/out" | tr -d ' ')"
msg utf8-norm "2 lines with invalid UTF-8 (replaced by U+FFFD): $tmp/latin1.txt:1 $tmp/latin1.txt:2"
run utf8-norm-strict 1 $T norm --strict "$tmp/latin1.txt"
msg utf8-norm-strict "latin1.txt:1: invalid UTF-8"
P 'Verk\344ufer\tocc:1\tde\t1\nKoch\t\377occ\tde\t2\n' > "$tmp/latin1.tsv"
run utf8-tally 0 $T tally "$tmp/latin1.tsv"
msg utf8-tally "latin1.tsv:3: an occupation holds a control character or invalid UTF-8"
# the title was repaired: the table is valid UTF-8 and reads back
iconv -f UTF-8 -t UTF-8 "$tmp/out" > /dev/null 2>&1; check utf8-tally-table-utf8 0 $?
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tVerk\344ufer\n' > "$tmp/latin1-labels.tsv"
run utf8-labels 1 $T labels "$tmp/latin1-labels.tsv"
msg utf8-labels "latin1-labels.tsv:2: the label is not valid UTF-8"
no_out utf8-labels
run utf8-labels-coverage 1 $T coverage --labels "$tmp/latin1-labels.tsv" "$tmp/p.counts"
msg utf8-labels-coverage "latin1-labels.tsv:2: "
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<occ:1> skos:prefLabel "Verk\344ufer"@de .\n' > "$tmp/latin1.ttl"
run utf8-ttl 1 $T labels "$tmp/latin1.ttl"
msg utf8-ttl "latin1.ttl:2:"
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nform\tocc:1\tde\tk\377ch\tkoch\t1\n' > "$tmp/latin1.counts"
run utf8-counts 1 $T counts "$tmp/latin1.counts"
msg utf8-counts "latin1.counts:2: a field holds a control character or invalid UTF-8"

# ---- UTF-16 with a byte order mark: refused, saying what it is ----
printf 'Koch\nKellner\n' | iconv -f UTF-8 -t UTF-16 > "$tmp/u16.txt"
run utf16-norm 1 $T norm "$tmp/u16.txt"
msg utf16-norm "u16.txt:1: the file is UTF-16"
no_out utf16-norm
iconv -c -f UTF-8 -t UTF-16 "$tmp/p.tsv" > "$tmp/u16.tsv" 2>/dev/null
run utf16-tally 1 $T tally -o "$tmp/u16.out" "$tmp/u16.tsv"
msg utf16-tally "u16.tsv:1: the file is UTF-16"
[ ! -e "$tmp/u16.out" ]; check utf16-tally-no-file 0 $?
iconv -c -f UTF-8 -t UTF-16BE "$tmp/p.counts" 2>/dev/null | { printf '\376\377'; cat; } > "$tmp/u16.counts"
run utf16-counts 1 $T counts "$tmp/u16.counts"
msg utf16-counts "u16.counts: the file is UTF-16"
iconv -f UTF-8 -t UTF-16 "$L" > "$tmp/u16-labels.tsv"
run utf16-labels 1 $T labels "$tmp/u16-labels.tsv"
msg utf16-labels "u16-labels.tsv: the file is UTF-16"
run utf16-coverage 1 $T coverage --labels "$tmp/u16-labels.tsv" "$tmp/p.counts"
msg utf16-coverage "the file is UTF-16"
no_out utf16-coverage
run utf16-propose 1 $T propose --labels "$L" "$tmp/u16.tsv"
msg utf16-propose "u16.tsv:1: the file is UTF-16"
no_out utf16-propose
iconv -f UTF-8 -t UTF-16 "$ex/taxonomy.ttl" > "$tmp/u16.ttl"
run utf16-ttl 1 $T labels "$tmp/u16.ttl"
msg utf16-ttl "u16.ttl:1: the file is UTF-16"

# ---- NUL bytes ----
printf 'Koch\000(m/w/d)\nKellner\n' > "$tmp/nul.txt"
run nul-norm 0 $T norm "$tmp/nul.txt"
check nul-norm-lines 2 "$(wc -l < "$tmp/out" | tr -d ' ')"
msg nul-norm "1 line with NUL bytes (replaced by U+FFFD): $tmp/nul.txt:1"
P 'Ko\000ch\tocc:1\tde\t1\nKoch\tocc\000:1\tde\t2\nKoch\tocc:1\tde\000xx\t3\n' > "$tmp/nul.tsv"
run nul-tally 0 $T tally "$tmp/nul.tsv"
msg nul-tally "nul.tsv:3: an occupation holds a control character or invalid UTF-8"
msg nul-tally-lang "nul.tsv:4: bad lang"
tr -d '\000' < "$tmp/out" | cmp -s - "$tmp/out"; check nul-tally-table-has-none 0 $?
printf 'occupation\tkind\tlang\tlabel\nocc\000:1\tpref\tde\tKoch\n' > "$tmp/nul-labels.tsv"
run nul-labels 1 $T labels "$tmp/nul-labels.tsv"
msg nul-labels "nul-labels.tsv:2: the occupation is not valid UTF-8 (or has a NUL byte)"
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\000xx\tKoch\n' > "$tmp/nul-lang.tsv"
run nul-labels-lang 1 $T labels "$tmp/nul-lang.tsv"
msg nul-labels-lang "nul-lang.tsv:2: bad lang"
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<occ:1> skos:prefLabel "Ko\\u0000ch"@de .\n' > "$tmp/nul.ttl"
run nul-ttl 1 $T labels "$tmp/nul.ttl"
msg nul-ttl "nul.ttl: label statement 1: the label is not valid UTF-8 (or has a NUL byte)"
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\noccupation\tocc\000:1\tde\t\t\t1\n' > "$tmp/nul.counts"
run nul-counts 1 $T counts "$tmp/nul.counts"
msg nul-counts "nul.counts:2: a field holds a control character"

# ---- CR-only line ends (old Mac files) ----
printf 'Koch\rKellner\rLagerist\r' > "$tmp/cr.txt"
run cr-norm 0 $T norm "$tmp/cr.txt"
check cr-norm-lines 1 "$(wc -l < "$tmp/out" | tr -d ' ')"
msg cr-norm "1 line with a carriage return inside (read as a space: lines end at LF"
run cr-norm-strict 1 $T norm --strict "$tmp/cr.txt"
msg cr-norm-strict "cr.txt:1: carriage return inside the line"
tr '\n' '\r' < "$tmp/p.tsv" > "$tmp/cr.tsv"
run cr-tally 1 $T tally "$tmp/cr.tsv"
msg cr-tally "cr.tsv:1: a carriage return inside the first line: lines must end in LF or CRLF"
no_out cr-tally
printf '{"title":"Koch","occupations":"occ:1"}\r{"title":"Koch","occupations":"occ:2"}\r' > "$tmp/cr.jsonl"
run cr-jsonl 1 $T tally "$tmp/cr.jsonl"
msg cr-jsonl "cr.jsonl:1: a carriage return inside the first line"
tr '\n' '\r' < "$tmp/p.counts" > "$tmp/cr.counts"
run cr-counts 1 $T counts "$tmp/cr.counts"
msg cr-counts "cr.counts:1: a carriage return inside the header line"
tr '\n' '\r' < "$L" > "$tmp/cr-labels.tsv"
run cr-labels 1 $T labels "$tmp/cr-labels.tsv"
msg cr-labels "cr-labels.tsv:1: a carriage return inside the header line"
run cr-coverage 1 $T coverage --labels "$tmp/cr-labels.tsv" "$tmp/p.counts"
no_out cr-coverage
# CRLF is fine everywhere
sed 's/$/\r/' "$tmp/p.tsv" > "$tmp/crlf.tsv"
$T tally "$tmp/crlf.tsv" 2>/dev/null | cmp -s - "$tmp/p.counts"; check crlf-tally-same 0 $?

# ---- TSV columns: missing, duplicated, extra TABs ----
printf 'title\tid\nKoch\t1\n' > "$tmp/nocol.tsv"
run missing-column-tally 1 $T tally "$tmp/nocol.tsv"
msg missing-column-tally "nocol.tsv:1: no 'occupations' column in the header"
no_out missing-column-tally
printf 'title\toccupations\ttitle\nKoch\tocc:1\tChef\n' > "$tmp/dupcol.tsv"
run dup-column-tally 1 $T tally "$tmp/dupcol.tsv"
msg dup-column-tally "dupcol.tsv:1: column 'title' appears twice in the header"
no_out dup-column-tally
run dup-column-propose 1 $T propose --labels "$L" "$tmp/dupcol.tsv"
msg dup-column-propose "dupcol.tsv:1: column 'title' appears twice"
printf 'kind\toccupation\tlang\tkey\ttext\nkey\t\tde\tkoch\t\n' > "$tmp/nocol.counts"
run missing-column-counts 1 $T counts "$tmp/nocol.counts"
msg missing-column-counts "nocol.counts:1: not a counts table"
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\tkey\n' > "$tmp/dupcol.counts"
run dup-column-counts 1 $T counts "$tmp/dupcol.counts"
msg dup-column-counts "dupcol.counts:1: column 'key' appears twice"
printf 'occupation\tkind\tlabel\nocc:1\tpref\tKoch\n' > "$tmp/nocol-labels.tsv"
run missing-column-labels 1 $T labels "$tmp/nocol-labels.tsv"
msg missing-column-labels "nocol-labels.tsv:1: a labels TSV has the columns occupation, kind, lang, label"
run missing-column-coverage 1 $T coverage --labels "$tmp/nocol-labels.tsv" "$tmp/p.counts"
msg missing-column-coverage "nocol-labels.tsv:1:"
printf 'occupation\tkind\tlang\tlabel\tlabel\nocc:1\tpref\tde\tKoch\tKoch\n' > "$tmp/dupcol-labels.tsv"
run dup-column-labels 1 $T labels "$tmp/dupcol-labels.tsv"
msg dup-column-labels "dupcol-labels.tsv:1: column 'label' appears twice"
# a TAB inside a title would move the occupation: the row is malformed;
# empty trailing fields are not
P 'Senior\tKoch\tocc:1\tde\t1\nKoch\tocc:1\tde\t2\t\t\n' > "$tmp/tabs.tsv"
run extra-tabs-tally 0 $T tally "$tmp/tabs.tsv"
msg extra-tabs-tally "tabs.tsv:2: row has more fields than the header (a TAB inside a field?)"
msg extra-tabs-tally-count "1 posting counted, 0 republished ids skipped, 1 malformed row skipped"
run extra-tabs-strict 1 $T tally --strict -o "$tmp/tabs.out" "$tmp/tabs.tsv"
[ ! -e "$tmp/tabs.out" ]; check extra-tabs-strict-no-file 0 $?
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tSenior\tKoch\n' > "$tmp/tabs-labels.tsv"
run extra-tabs-labels 1 $T labels "$tmp/tabs-labels.tsv"
msg extra-tabs-labels "tabs-labels.tsv:2: row has more fields than the header (a TAB inside a label?)"
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tkoch\t\t1\t7\n' > "$tmp/tabs.counts"
run extra-tabs-counts 1 $T counts "$tmp/tabs.counts"
msg extra-tabs-counts "tabs.counts:2: row has more fields than the header"

# ---- JSON Lines: deep nesting, huge numbers, wrong types, duplicate keys ----
/usr/bin/python3 - "$tmp/hostile.jsonl" <<'PY'
import sys
rows = [
    '{"title":"Koch","occupations":"occ:1","x":' + '[' * 100000 + ']' * 100000 + '}',
    '{"title":"Koch","occupations":"occ:1","id":123456789012345678901234567890}',
    '{"title":"Koch","occupations":"occ:1","id":1e400}',
    '{"title":"Koch","occupations":"occ:1","id":1.5}',
    '{"title":42,"occupations":"occ:1"}',
    '{"title":"Koch","occupations":{"occ:1":1}}',
    '{"title":"Koch","occupations":["occ:1",7]}',
    '{"title":"Koch","title":"Kellner","occupations":"occ:1"}',
    '[{"title":"Koch","occupations":"occ:1"}]',
    '{"title":"Koch","occupations":"occ:1","lang":["de"]}',
    '{"title":"Koch","occupations":["occ\\n1"]}',
    '{"title":"Koch","occupations":"occ:1","id":9223372036854775807}',
]
open(sys.argv[1], "w").write("\n".join(rows) + "\n")
PY
run json-tally 0 $T tally "$tmp/hostile.jsonl"
msg json-deep "hostile.jsonl:1: bad JSON"
msg json-huge-int "hostile.jsonl:2: bad JSON"
msg json-huge-real "hostile.jsonl:3: bad JSON"
msg json-count "1 posting counted, 0 republished ids skipped, 11 malformed rows skipped"
run json-strict 1 $T tally --strict "$tmp/hostile.jsonl"
msg json-strict "hostile.jsonl:1: bad JSON"
no_out json-strict
# every malformed row, one message each, with its line
$T propose --labels "$L" "$tmp/hostile.jsonl" > /dev/null 2> "$tmp/err"
check json-propose-messages 5 "$(grep -c 'hostile.jsonl:[0-9]*: .*(skipped)' "$tmp/err")"
grep -q 'hostile.jsonl: 11 malformed rows skipped in all' "$tmp/err"; check json-propose-total 0 $?

# ---- huge numbers in counts tables ----
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tkoch\t\t99999999999999999999\n' > "$tmp/huge.counts"
run huge-count 1 $T counts "$tmp/huge.counts"
msg huge-count "huge.counts:2: postings is past 18446744073709551615 (2^64 - 1)"
# every count a table can hold reads back: sums of 10^19 and more too
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tkoch\t\t6000000000000000000\n' > "$tmp/six.counts"
run sum-past-19-digits 0 $T counts -o "$tmp/twelve.counts" "$tmp/six.counts" "$tmp/six.counts"
grep -q '	12000000000000000000$' "$tmp/twelve.counts"; check sum-past-19-digits-written 0 $?
run reads-back-20-digits 0 $T counts "$tmp/twelve.counts"
cmp -s "$tmp/out" "$tmp/twelve.counts"; check reads-back-20-digits-same 0 $?
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tkoch\t\t18446744073709551615\n' > "$tmp/max.counts"
run max-count 0 $T counts "$tmp/max.counts"
run max-count-plus-one 1 $T counts "$tmp/max.counts" "$tmp/six.counts"
msg max-count-plus-one "six.counts:2: the postings add up past 18446744073709551615 (2^64 - 1)"
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tkoch\t\t18446744073709551616\n' > "$tmp/max1.counts"
run past-max 1 $T counts "$tmp/max1.counts"
msg past-max "max1.counts:2: postings is past 18446744073709551615"
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nkey\t\tde\tkoch\t\t9999999999999999999\n' > "$tmp/big.counts"
run big-count 0 $T counts "$tmp/big.counts"
run big-sum 1 $T counts -o "$tmp/big.out" "$tmp/big.counts" "$tmp/big.counts"
msg big-sum "big.counts:2: the postings add up past 18446744073709551615 (2^64 - 1)"
[ ! -e "$tmp/big.out" ]; check big-sum-no-file 0 $?

# ---- labels with duplicate or contradictory entries: reported, read ----
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tKoch\nocc:1\tpref\tde\tKoch\nocc:1\talt\tde\tKoch\nocc:1\tpref\tde\tKöchin\nocc:2\tpref\tde\tKOCH\nocc:1\tpref\tde-AT\tKoch\n' > "$tmp/dup-labels.tsv"
run dup-labels 0 $T labels "$tmp/dup-labels.tsv"
msg dup-labels-repeat "dup-labels.tsv:3: label 'Koch'@de of occ:1 repeats line 2"
msg dup-labels-kinds "dup-labels.tsv:4: label 'Koch'@de of occ:1 is alt here and pref on line 2"
msg dup-labels-pref "dup-labels.tsv:5: a second preferred label 'Köchin'@de for occ:1 (the first: 'Koch', line 2"
msg dup-labels-other "dup-labels.tsv:6: label 'KOCH' of occ:2 has the key 'koch' of label 'Koch' of occ:1 (line 2)"
check dup-labels-regional-ok 4 "$(grep -c 'dup-labels.tsv' "$tmp/err")"
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<occ:1> skos:prefLabel "Koch"@de ;\n  skos:altLabel "Koch"@DE ;\n  skos:prefLabel "Chefkoch"@de .\n' > "$tmp/dup.ttl"
run dup-ttl 0 $T labels "$tmp/dup.ttl"
msg dup-ttl-kinds "dup.ttl: label statement 2: label 'Koch'@DE of occ:1 is alt here and pref on label statement 1"
msg dup-ttl-pref "dup.ttl: label statement 3: a second preferred label 'Chefkoch'@de for occ:1"
run dup-labels-coverage 0 $T coverage --labels "$tmp/dup-labels.tsv" "$tmp/p.counts"
msg dup-labels-coverage "dup-labels.tsv:3: label 'Koch'@de of occ:1 repeats line 2"
prefixed dup-labels-coverage coverage
run dup-labels-propose 0 $T propose --labels "$tmp/dup-labels.tsv" "$tmp/p.counts"
prefixed dup-labels-propose propose
run dup-ttl-prefix 0 $T labels "$tmp/dup.ttl"
prefixed dup-ttl labels
# a malformed posting and a cut last row, read by propose: its messages
P 'Koch\tocc:1\tde\t1\n\tocc:1\tde\t2\nKoch\tocc:1\tde\t3' > "$tmp/bad-postings.tsv"
run bad-postings-propose 0 $T propose --labels "$tmp/dup-labels.tsv" "$tmp/bad-postings.tsv"
msg bad-postings-propose "bad-postings.tsv:3: no title (skipped)"
msg bad-postings-propose "bad-postings.tsv:4: the last row has no line end"
prefixed bad-postings-propose propose
# one title is "1 title"
printf 'Koch\n' | $T norm --stats > /dev/null 2> "$tmp/err"
msg one-title "titlemill norm: 1 title, 0 answered"

# ---- a Turtle syntax error on line 5: the message names it ----
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<occ:1> skos:prefLabel "Koch"@de .\n\n<occ:2> skos:prefLabel "Kellner"@de ;\n  skos:altLabel "Ober"@de ,, "x"@de .\n' > "$tmp/bad.ttl"
run ttl-labels 1 $T labels "$tmp/bad.ttl"
msg ttl-labels "bad.ttl:5:"
no_out ttl-labels
for c in coverage propose; do
	run "ttl-$c" 1 $T $c --labels "$tmp/bad.ttl" "$tmp/p.counts"
	msg "ttl-$c" "bad.ttl:5:"
	no_out "ttl-$c"
done
run ttl-tally 1 $T tally --labels "$tmp/bad.ttl" "$tmp/p.tsv"
msg ttl-tally "bad.ttl:5:"
no_out ttl-tally
run ttl-norm 1 sh -c "echo Koch | $T norm --labels $tmp/bad.ttl"
msg ttl-norm "bad.ttl:5:"
printf '<http://example.org/occ/1> <http://www.w3.org/2004/02/skos/core#prefLabel> "Koch"@de .\n<http://example.org/occ/2> <http://www.w3.org/2004/02/skos/core#prefLabel> Kellner .\n<http://example.org/occ/3> <http://www.w3.org/2004/02/skos/core#prefLabel> "Ober"@de .\n' > "$tmp/bad.nt"
run nt-labels 1 $T labels "$tmp/bad.nt"
msg nt-labels "bad.nt:2:"
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<occ:1> skos:prefLabel "Koch"@de .\n<occ:2> skos:prefLabel "Kellner"@x-y-toolongsubtag .\n' > "$tmp/badlang.ttl"
run ttl-badlang 1 $T labels "$tmp/badlang.ttl"
msg ttl-badlang "badlang.ttl: label statement 2: bad language tag"

# ---- output into a closed pipe: quiet, status 0 or SIGPIPE ----
/usr/bin/python3 "$gen" --count 50000 --seed 8 > "$tmp/big.txt"
/usr/bin/python3 "$gen" --postings --count 15000 --seed 8 > "$tmp/big.tsv"
$T tally "$tmp/big.tsv" > "$tmp/big.counts" 2>/dev/null
pipe() {
	name=$1
	shift
	{ "$@" 2> "$tmp/perr"; echo $? > "$tmp/pst"; } | head -1 > /dev/null
	st=$(cat "$tmp/pst")
	{ [ "$st" = 0 ] || [ "$st" = 141 ]; }; check "pipe-$name-status" 0 $?
	check "pipe-$name-stderr" "" "$(grep -v -e 'postings counted' -e 'titles not proposed' "$tmp/perr")"
	# with SIGPIPE ignored (as some shells and CI runners start us): one
	# line, status 1
	{ (trap '' PIPE; "$@" 2> "$tmp/perr"; echo $? > "$tmp/pst"); } | head -1 > /dev/null
	st=$(cat "$tmp/pst")
	{ [ "$st" = 0 ] || [ "$st" = 1 ]; }; check "pipe-$name-ignored-status" 0 $?
	n=$(grep -c 'write error' "$tmp/perr")
	[ "$n" -le 1 ]; check "pipe-$name-ignored-one-message" 0 $?
}
pipe norm $T norm "$tmp/big.txt"
pipe norm-json $T norm --json "$tmp/big.txt"
pipe norm-facets $T norm --facets "$tmp/big.txt"
pipe tally $T tally "$tmp/big.tsv"
pipe counts $T counts "$tmp/big.counts"
pipe coverage $T coverage --labels "$L" "$tmp/big.counts"
pipe propose $T propose --labels "$L" --min-postings 1 --min-share 0 --min-precision 0 --min-g2 0 "$tmp/big.counts"
pipe labels $T labels "$L" "$L" "$L" "$L" "$L" "$L" "$L" "$L"

# ---- output to a full disk (a 64 KiB tmpfs) ----
mkdir -p "$full"
if mount -t tmpfs -o size=64k tmpfs "$full" 2>/dev/null; then
	run full-tally 1 $T tally -o "$full/t.tsv" "$tmp/big.tsv"
	msg full-tally "full/t.tsv: write error: No space left on device"
	check full-tally-nothing-left "" "$(ls -A "$full")"
	run full-counts 1 $T counts -o "$full/c.tsv" "$tmp/big.counts"
	msg full-counts "full/c.tsv: write error: No space left on device"
	check full-counts-nothing-left "" "$(ls -A "$full")"
	# a table that was there is left as it was
	printf 'kind\toccupation\tlang\tkey\ttext\tpostings\n' > "$full/old.tsv"
	run full-replace 1 $T counts -o "$full/old.tsv" "$tmp/big.counts"
	check full-replace-kept "$(printf 'kind\toccupation\tlang\tkey\ttext\tpostings')" "$(cat "$full/old.tsv")"
	check full-replace-no-temp "old.tsv" "$(ls -A "$full")"
	rm -f "$full/old.tsv"
	for c in norm coverage propose; do
		case $c in
		norm) set -- norm "$tmp/big.txt" ;;
		coverage) set -- coverage --labels "$L" "$tmp/big.counts" ;;
		*) set -- propose --labels "$L" --min-postings 1 "$tmp/big.counts" ;;
		esac
		$T "$@" > "$full/$c.out" 2> "$tmp/err"
		check "full-$c-status" 1 $?
		msg "full-$c" "write error: No space left on device"
		check "full-$c-one-message" 1 "$(grep -c 'write error' "$tmp/err")"
		rm -f "$full/$c.out"
	done
	umount "$full"
else
	echo "  NOTICE: mount -t tmpfs not permitted here; the full-disk cases were skipped"
fi
# an output folder that does not exist: status 1, the path named
run no-dir 1 $T counts -o "$tmp/no/such/dir/c.tsv" "$tmp/p.counts"
msg no-dir "$tmp/no/such/dir/c.tsv"

# ---- Redis: a server that disappears, answers slowly, wants a password ----
if ! command -v redis-server > /dev/null 2>&1; then
	echo "  SKIPPED: redis-server is not installed (CI installs it)"
	finish
	exit
fi
redis_start "$rd" --appendonly no || exit 1
S=unix:$rd/sock
/usr/bin/python3 "$gen" --postings --count 10000 --seed 12 > "$tmp/r.tsv"
$T tally "$tmp/r.tsv" > "$tmp/r.mem" 2>/dev/null

# slow: the server sleeps 1 s (DEBUG SLEEP) during the load: still exact
redis-cli -s "$rd/sock" config set enable-debug-command yes > /dev/null 2>&1
$T tally --store "$S" --chunk 50 "$tmp/r.tsv" 2> "$tmp/err" &
pid=$!
sleep 0.3
redis-cli -s "$rd/sock" debug sleep 1 > /dev/null 2>&1
wait $pid; check slow-status 0 $?
$T counts --store "$S" | cmp -s - "$tmp/r.mem"; check slow-exact 0 $?
redis-cli -s "$rd/sock" flushall > /dev/null

# stopped for longer than the 5 s reply timeout (SIGSTOP): the load goes
# on or stops with status 1 naming the server; run again, it is exact
$T tally --store "$S" --chunk 50 "$tmp/r.tsv" 2> "$tmp/err" &
pid=$!
sleep 0.3
kill -STOP "$(cat "$rd/pid")"
sleep 6.5
kill -CONT "$(cat "$rd/pid")"
wait $pid; st=$?
{ [ "$st" = 0 ] || { [ "$st" = 1 ] && grep -q "$S" "$tmp/err"; }; }; check stopped-status-or-msg 0 $?
check stopped-few-lines 1 "$([ "$(wc -l < "$tmp/err")" -le 3 ] && echo 1)"
$T tally --store "$S" --chunk 50 "$tmp/r.tsv" 2>/dev/null; check stopped-rerun 0 $?
$T counts --store "$S" | cmp -s - "$tmp/r.mem"; check stopped-exact 0 $?
redis-cli -s "$rd/sock" flushall > /dev/null

# disappears in the middle of a load: status 1, the server and the way
# out named, a few lines (no storm); a reader of a gone server likewise
$T tally --store "$S" --chunk 20 --retries 1 "$tmp/r.tsv" 2> "$tmp/err" &
pid=$!
# (once the load has begun, however slow the build: ASan)
for i in $(seq 100); do
	[ "$(redis-cli -s "$rd/sock" dbsize 2>/dev/null)" -gt 0 ] 2>/dev/null && break
	sleep 0.05
done
redis-cli -s "$rd/sock" shutdown nosave > /dev/null 2>&1
wait $pid; check gone-status 1 $?
msg gone "$S"
msg gone-advice "run the same load again"
check gone-few-lines 1 "$([ "$(wc -l < "$tmp/err")" -le 3 ] && echo 1)"
run gone-counts 1 $T counts --store "$S"
msg gone-counts "$S"
no_out gone-counts
run gone-coverage 1 $T coverage --labels "$L" --store "$S"
msg gone-coverage "$S"
no_out gone-coverage
run gone-propose 1 $T propose --labels "$L" --store "$S"
no_out gone-propose

# a password the loader was not given, or a wrong one
rm -f "$rd/sock" "$rd/pid"
redis_start "$rd" --appendonly no --requirepass 'hostile-suite-pw' || exit 1
for c in tally counts coverage propose; do
	case $c in
	tally) set -- tally --store "$S" "$tmp/r.tsv" ;;
	counts) set -- counts --store "$S" ;;
	*) set -- "$c" --labels "$L" --store "$S" ;;
	esac
	run "nopass-$c" 1 env -u TITLEMILL_REDIS_PASSWORD $T "$@"
	msg "nopass-$c" "$S: the server requires a password: set TITLEMILL_REDIS_PASSWORD"
	no_out "nopass-$c"
done
run wrongpass 1 env TITLEMILL_REDIS_PASSWORD=wrong $T tally --store "$S" "$tmp/r.tsv"
msg wrongpass "$S"
run rightpass 0 env TITLEMILL_REDIS_PASSWORD=hostile-suite-pw $T tally --store "$S" "$tmp/r.tsv"
redis-cli -s "$rd/sock" -a hostile-suite-pw --no-auth-warning shutdown nosave > /dev/null 2>&1
rm -f "$rd/pid"
finish

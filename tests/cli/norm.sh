#!/bin/sh
# titlemill norm on the command line: exit codes, the one-line-in,
# one-line-out rule, input forms (CRLF, BOM, no final newline, NUL,
# invalid UTF-8, over-long lines), output modes and their shape.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL

# exit codes: --help 0 to stdout, misuse 2, unreadable file 1
$T norm --help > "$tmp/out" 2>&1; check help-status 0 $?
grep -q 'usage: titlemill norm' "$tmp/out"; check help-text 0 $?
$T norm --bogus > /dev/null 2>&1; check bad-option 2 $?
$T norm --lang 'x!' < /dev/null > /dev/null 2>&1; check bad-lang 2 $?
$T norm --key --json < /dev/null > /dev/null 2>&1; check two-modes 2 $?
$T norm "$tmp/missing" > /dev/null 2> "$tmp/err"; check missing-file 1 $?
grep -q "missing: No such file" "$tmp/err"; check missing-message 0 $?
$T > /dev/null 2>&1; check no-command 2 $?
$T frobnicate > /dev/null 2>&1; check unknown-command 2 $?

# N lines in, N lines out, whatever the bytes
printf 'Koch (m/w/d)\r\n\r\n(m/w/d)\nKoch\001in\000NUL\nbad \377 byte\nlast' > "$tmp/in"
n=$($T norm "$tmp/in" 2> "$tmp/err" | wc -l); check lines-out 6 "$n"
grep -q '1 line with invalid UTF-8 (replaced by U+FFFD): .*in:5' "$tmp/err"; check summary-utf8 0 $?
grep -q '1 line with NUL bytes (replaced by U+FFFD): .*in:4' "$tmp/err"; check summary-nul 0 $?
got=$($T norm "$tmp/in" 2>/dev/null | sed -n 1p); check crlf "koch" "$got"
got=$($T norm "$tmp/in" 2>/dev/null | sed -n 3p); check all-noise "" "$got"
got=$($T norm "$tmp/in" 2>/dev/null | sed -n 6p); check no-final-newline "last" "$got"
printf '\357\273\277Koch\n' | $T norm > "$tmp/out"; check bom "koch" "$(cat "$tmp/out")"
$T norm --strict "$tmp/in" > /dev/null 2> "$tmp/err"; check strict-status 1 $?
grep -q 'in:4: NUL byte' "$tmp/err"; check strict-message 0 $?

# a line over 1 MiB is cut, counted, and still one line out
head -c 1200000 /dev/zero | tr '\0' 'a' > "$tmp/long"
printf '\nKoch\n' >> "$tmp/long"
n=$($T norm "$tmp/long" 2> "$tmp/err" | wc -l); check long-lines 2 "$n"
grep -q 'longer than 1 MiB' "$tmp/err"; check long-summary 0 $?

# several files and standard input in order
printf 'A\n' > "$tmp/a"; printf 'B\n' > "$tmp/b"
got=$(printf 'C\n' | $T norm "$tmp/a" - "$tmp/b" | tr '\n' ' '); check order "a c b " "$got"

# output modes
got=$(printf 'Software-Entwickler (m/w/d)\n' | $T norm --key); check key "software entwickler" "$got"
printf 'Senior Koch (m/w/d) in Köln\n' | $T norm --json > "$tmp/j"
/usr/bin/python3 -c '
import json,sys
o=json.loads(open(sys.argv[1]).read())
assert o["title"]=="koch", o
assert o["key"]=="koch", o
assert o["seniority"]=="senior", o
assert o["gender"]=="m/w/d", o
assert o["location"]==["Köln"], o
assert o["raw"]=="Senior Koch (m/w/d) in Köln", o
' "$tmp/j"; check json 0 $?
got=$(printf 'Senior Koch (m/w/d) in Köln, Vollzeit\n' | $T norm --facets | awk -F'\t' '{print NF ":" $1 ":" $2 ":" $5}')
check facets "8:koch:senior:full_time" "$got"

# a closed pipe ends quietly
yes 'Koch (m/w/d)' | head -200000 > "$tmp/many"
$T norm "$tmp/many" 2> "$tmp/err" | head -1 > /dev/null
check pipe-quiet "" "$(cat "$tmp/err")"

# --labels protects a label from being cut down
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\ten\tsenior care assistant\n' > "$tmp/labels.tsv"
got=$(printf 'Senior Care Assistant (m/w/d)\n' | $T norm --labels "$tmp/labels.tsv"); check labels "senior care assistant" "$got"
got=$(printf 'Senior Care Assistant (m/w/d)\n' | $T norm); check no-labels "care assistant" "$got"
# a label is occupational evidence: it makes its segment the head, and
# the place before it is dropped (an unknown word alone is kept)
printf 'occupation\tkind\tlang\tlabel\nocc:2\tpref\tde\tXylograph\n' > "$tmp/l3.tsv"
got=$(printf 'Salzburg: Xylograph\n' | $T norm --labels "$tmp/l3.tsv"); check labels-head "xylograph" "$got"
got=$(printf 'Salzburg: Xylograph\n' | $T norm); check no-labels-head "salzburg xylograph" "$got"
# a protected label still loses a gendered ending (regression)
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\tde\tVerkäufer\n' > "$tmp/l2.tsv"
got=$(printf 'Verkäufer/in (m/w/d)\nVerkäuferIn\n' | $T norm --labels "$tmp/l2.tsv" | tr '\n' ' ')
check labels-gender "verkäufer verkäufer " "$got"

# the memory of recent titles changes nothing: same bytes with it off
# (a title enters the memory the second time it is cleaned: three
# copies, so that the third is answered from it)
grep -v "^#" "$(dirname "$0")/../cases/norm.tsv" | cut -f2 | tail -n +2 > "$tmp/raw"
cat "$tmp/raw" "$tmp/raw" "$tmp/raw" > "$tmp/raw2"
$T norm --json "$tmp/raw2" > "$tmp/m1"; $T norm --json --memo 0 "$tmp/raw2" > "$tmp/m0"
cmp -s "$tmp/m1" "$tmp/m0"; check memo-same 0 $?
hits=$($T norm --stats "$tmp/raw2" 2>&1 >/dev/null | sed -n 's/.* titles, \([0-9]*\) answered.*/\1/p')
rows=$(wc -l < "$tmp/raw")
[ "${hits:-0}" -ge $((rows / 2)) ]; check memo-hits 0 $?
$T norm --memo x < /dev/null > /dev/null 2>&1; check memo-bad 2 $?
finish

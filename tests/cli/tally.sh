#!/bin/sh
# titlemill tally and counts on the command line.
#
# Outside check: the per-(occupation, language, key) postings of a
# generated file equal what coreutils' sort | uniq -c counts over
# titlemill norm --key output (after awk drops republished ids, first
# one kept).  Then the merge property on a split by id, id
# de-duplication across two daily files, JSON Lines = TSV, and bad input.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
gen=$(dirname "$0")/../bench/gen_titles.py

/usr/bin/python3 "$gen" --postings --count 20000 --seed 7 > "$tmp/p.tsv"
$T tally "$tmp/p.tsv" > "$tmp/c.tsv" 2> "$tmp/err"; check tally-status 0 $?
# dated postings: by month, a last column period
head -1 "$tmp/c.tsv" | grep -q '^kind	occupation	lang	key	text	postings	period$'; check header 0 $?

# --- the coreutils cross-check (columns: id date lang occupations title)
awk -F '\t' 'NR > 1 && $5 != "" && !seen[$1]++' "$tmp/p.tsv" > "$tmp/dedup"
: > "$tmp/expect.raw"
for L in $(cut -f3 "$tmp/dedup" | sort -u); do
	awk -F '\t' -v L="$L" '$3 == L' "$tmp/dedup" > "$tmp/part"
	cut -f5 "$tmp/part" | $T norm --key --lang "$L" 2>/dev/null > "$tmp/keys"
	cut -f4 "$tmp/part" | paste - "$tmp/keys" |
		awk -F '\t' -v L="$L" '{ n = split($1, o, "|"); for (i = 1; i <= n; i++) print o[i] "\t" L "\t" $2 }' \
		>> "$tmp/expect.raw"
done
sort "$tmp/expect.raw" | uniq -c | awk '{ c = $1; sub(/^ *[0-9]+ /, ""); print $0 "\t" c }' |
	sort > "$tmp/expect"
awk -F '\t' '$1 == "title" { print $2 "\t" $3 "\t" $4 "\t" $6 }' "$tmp/c.tsv" | sort > "$tmp/got"
cmp -s "$tmp/expect" "$tmp/got"; check coreutils-cross-check 0 $?
n=$(wc -l < "$tmp/got"); [ "$n" -gt 1000 ]; check cross-check-size 0 $?

# occupation totals are the sums of their titles; key totals count each
# posting once
awk -F '\t' '$1 == "title" { s[$2 "\t" $3] += $6 } $1 == "occupation" { o[$2 "\t" $3] = $6 }
	END { for (k in o) if (o[k] != s[k]) bad++; print bad + 0 }' "$tmp/c.tsv" > "$tmp/x"
check occupation-sums 0 "$(cat "$tmp/x")"
want=$(cut -f3,5 "$tmp/dedup" | paste - /dev/null | wc -l)
got=$(awk -F '\t' '$1 == "key" { s += $6 } END { print s }' "$tmp/c.tsv")
check key-total "$want" "$got"

# --- merge: counts(tally(A), tally(B)) == tally(A B) when A and B share
# no id, on random splits (each id to one random part; five seeds)
for seed in 1 2 3 4 5; do
	awk -F '\t' -v S=$seed -v D="$tmp" 'BEGIN { srand(S) }
		NR == 1 { for (q = 0; q < 3; q++) print > (D "/p" q ".tsv"); next }
		{ if (!($1 in part)) part[$1] = int(rand() * 3); print > (D "/p" part[$1] ".tsv") }' "$tmp/p.tsv"
	for part in 0 1 2; do
		$T tally "$tmp/p$part.tsv" > "$tmp/c$part.tsv" 2>/dev/null
	done
	$T counts "$tmp/c0.tsv" "$tmp/c1.tsv" "$tmp/c2.tsv" > "$tmp/merged"
	$T tally "$tmp/p0.tsv" "$tmp/p1.tsv" "$tmp/p2.tsv" > "$tmp/whole" 2>/dev/null
	cmp -s "$tmp/merged" "$tmp/whole"; check "merge-seed-$seed" 0 $?
done
cmp -s "$tmp/whole" "$tmp/c.tsv"; check merge-equals-whole-file 0 $?
$T counts < "$tmp/c.tsv" | cmp -s - "$tmp/c.tsv"; check counts-identity 0 $?

# --- republished ids across two daily files count once
printf 'id\tdate\toccupations\ttitle\n7\t2026-03-01\tocc:1\tKoch (m/w/d)\n8\t2026-03-01\tocc:1\tKoch\n' > "$tmp/day1"
printf 'id\tdate\toccupations\ttitle\n7\t2026-03-02\tocc:1\tKoch (m/w/d)\n9\t2026-03-02\tocc:1|occ:2\tKoch\n' > "$tmp/day2"
$T tally "$tmp/day1" "$tmp/day2" > "$tmp/d" 2> "$tmp/err"
got=$(awk -F '\t' '$1 == "title" && $2 == "occ:1" { print $6 }' "$tmp/d"); check ids-once 3 "$got"
got=$(awk -F '\t' '$1 == "key" { print $6 }' "$tmp/d"); check key-once 3 "$got"
grep -q '3 postings counted, 1 republished id skipped' "$tmp/err"; check ids-summary 0 $?
printf 'date\toccupations\ttitle\n\tocc:1\tKoch\n\tocc:1\tKoch\n' > "$tmp/noid"
got=$($T tally "$tmp/noid" 2>/dev/null | awk -F '\t' '$1 == "title" { print $6 }'); check no-id-all-count 2 "$got"

# --- JSON Lines gives the same table as TSV
/usr/bin/python3 - "$tmp/p.tsv" > "$tmp/p.jsonl" <<'PY'
import json, sys
rows = open(sys.argv[1], encoding="utf-8", errors="surrogateescape").read().split("\n")
head = rows[0].split("\t")
for i, r in enumerate(rows[1:]):
    if not r:
        continue
    d = dict(zip(head, r.split("\t")))
    o = d["occupations"].split("|")
    d["occupations"] = o if i % 2 else d["occupations"]
    if i % 3 == 0 and d["id"].isdigit():
        d["id"] = int(d["id"])
    try:
        d["title"].encode("utf-8")
    except UnicodeEncodeError:
        continue  # JSON cannot carry invalid UTF-8: those rows are left out
    print(json.dumps(d, ensure_ascii=i % 2 == 0))
PY
grep -v -P '[\x80-\xff]' "$tmp/p.tsv" > /dev/null 2>&1
/usr/bin/python3 - "$tmp/p.tsv" > "$tmp/p.clean.tsv" <<'PY'
import sys
data = open(sys.argv[1], "rb").read().split(b"\n")
for r in data:
    try:
        r.decode("utf-8")
    except UnicodeDecodeError:
        continue
    sys.stdout.buffer.write(r + b"\n")
PY
$T tally "$tmp/p.jsonl" > "$tmp/cj" 2>/dev/null
$T tally "$tmp/p.clean.tsv" > "$tmp/ct" 2>/dev/null
cmp -s "$tmp/cj" "$tmp/ct"; check jsonl-equals-tsv 0 $?

# --- bad input: messages with file:line, status, no partial output
printf 'id\ttitle\n1\tKoch\n' > "$tmp/nocol"
$T tally "$tmp/nocol" > /dev/null 2> "$tmp/err"; check missing-column 1 $?
grep -q "nocol:1: no 'occupations' column" "$tmp/err"; check missing-column-msg 0 $?
printf 'id\ttitle\ttitle\toccupations\n' > "$tmp/dup"
$T tally "$tmp/dup" > /dev/null 2> "$tmp/err"; check dup-column 1 $?
printf 'id\tdate\toccupations\ttitle\n1\t2026-02-30\tocc:1\tKoch\n2\t2026-03-01\t\tKoch\n3\t2026-03-01\tocc:1\tKoch\n' > "$tmp/badrows"
$T tally "$tmp/badrows" > "$tmp/o" 2> "$tmp/err"; check bad-rows-status 0 $?
grep -q "badrows:2: bad date '2026-02-30'" "$tmp/err"; check bad-date-msg 0 $?
grep -q "badrows:3: no occupation" "$tmp/err"; check no-occ-msg 0 $?
grep -q "1 posting counted, 0 republished ids skipped, 2 malformed rows skipped" "$tmp/err"; check bad-summary 0 $?
$T tally --strict -o "$tmp/out.tsv" "$tmp/badrows" 2> "$tmp/err"; check strict-status 1 $?
[ ! -e "$tmp/out.tsv" ]; check strict-no-output 0 $?
ls "$tmp" | grep -q 'out.tsv.tmp'; check strict-no-temp 1 $?
printf '{"title": "Koch", "occupations": ["occ:1"]}\n{"title": 5, "occupations": "occ:1"}\n{bad json\n{"title":"Koch","title":"Chef","occupations":"occ:1"}\n' > "$tmp/bad.jsonl"
$T tally "$tmp/bad.jsonl" > /dev/null 2> "$tmp/err"
grep -q "bad.jsonl:2: 'title' is not a string" "$tmp/err"; check json-type-msg 0 $?
grep -q "bad.jsonl:3: bad JSON" "$tmp/err"; check json-syntax-msg 0 $?
grep -q "1 posting counted, 0 republished ids skipped, 3 malformed rows skipped" "$tmp/err"; check json-summary 0 $?
$T tally "$tmp/missing" > /dev/null 2> "$tmp/err"; check unreadable 1 $?
grep -q "missing: No such file" "$tmp/err"; check unreadable-msg 0 $?
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\nform\tocc:1\tde\tkoch\tkoch\tx12\n' > "$tmp/badcounts"
$T counts "$tmp/badcounts" > /dev/null 2> "$tmp/err"; check bad-counts 1 $?
grep -q "badcounts:2: postings is not a whole number" "$tmp/err"; check bad-counts-msg 0 $?
$T tally > /dev/null 2>&1; check tally-no-file 2 $?
$T tally --format xml "$tmp/p.tsv" > /dev/null 2>&1; check tally-bad-format 2 $?
$T tally --help | grep -q 'usage: titlemill tally'; check tally-help 0 $?

# --- examples are masked and at most three per title
printf 'id\toccupations\ttitle\n1\tocc:1\tKoch – Tel. 0176 1234567 – koch@example.org\n' > "$tmp/pii"
$T tally "$tmp/pii" 2>/dev/null | awk -F '\t' '$1 == "example" { print $5 }' > "$tmp/ex"
check masked-example "Koch - Tel. <phone> - <email>" "$(cat "$tmp/ex")"
n=$(awk -F '\t' '$1 == "example" { c[$2 $3 $4]++ } END { m = 0; for (k in c) if (c[k] > m) m = c[k]; print m }' "$tmp/c.tsv")
check examples-at-most-3 3 "$n"
# --- threads: the same load with 1, 2 and 5 cleaning threads (more than
# the processors) gives the same bytes: table and summary, over several
# inputs with republished ids across them, malformed rows, a last row
# without a line end, and with the memory of titles off
head -8001 "$tmp/p.tsv" > "$tmp/t1.tsv"
{ head -1 "$tmp/p.tsv"; sed -n '6001,14000p' "$tmp/p.tsv"; printf '9\t2026-03-02\tde\t\tno occupation\n'; } > "$tmp/t2.tsv"
{ head -1 "$tmp/p.tsv"; sed -n '14001,16000p' "$tmp/p.tsv"; } | head -c -1 > "$tmp/t3.tsv"
for n in 1 2 5; do
	$T tally --threads $n "$tmp/t1.tsv" "$tmp/t2.tsv" "$tmp/t3.tsv" > "$tmp/th$n.tsv" 2> "$tmp/th$n.err"
	check threads-$n-status 0 $?
	$T tally --threads $n --memo 0 "$tmp/t1.tsv" "$tmp/t2.tsv" - < "$tmp/t3.tsv" > "$tmp/thm$n.tsv" 2> "$tmp/thm$n.err"
	check threads-$n-memo0-status 0 $?
done
for n in 2 5; do
	cmp -s "$tmp/th1.tsv" "$tmp/th$n.tsv"; check threads-$n-table 0 $?
	cmp -s "$tmp/th1.err" "$tmp/th$n.err"; check threads-$n-summary 0 $?
	cmp -s "$tmp/th1.tsv" "$tmp/thm$n.tsv"; check threads-$n-memo0-table 0 $?
	cmp -s "$tmp/thm1.err" "$tmp/thm$n.err"; check threads-$n-memo0-summary 0 $?
done
grep -q 'malformed rows skipped: [^ ]*t1.tsv:[0-9]*: no title; ' "$tmp/th1.err"; check threads-skip-named 0 $?
grep -q 't3.tsv:2001: the last row has no line end' "$tmp/th1.err"; check threads-noeol-named 0 $?
$T tally "$tmp/t1.tsv" "$tmp/t2.tsv" "$tmp/t3.tsv" 2>/dev/null | cmp -s - "$tmp/th1.tsv"; check threads-default 0 $?
# a malformed row under --strict stops the load the same way, named
for n in 1 2 5; do
	$T tally --strict --threads $n "$tmp/t1.tsv" "$tmp/t2.tsv" "$tmp/t3.tsv" > /dev/null 2> "$tmp/ths$n.err"
	check threads-$n-strict-status 1 $?
done
grep -q '^titlemill tally: [^ ]*t1.tsv:[0-9]*: no title (--strict: nothing written)$' "$tmp/ths1.err"; check threads-strict-named 0 $?
cmp -s "$tmp/ths1.err" "$tmp/ths2.err"; check threads-2-strict-same 0 $?
cmp -s "$tmp/ths1.err" "$tmp/ths5.err"; check threads-5-strict-same 0 $?
$T tally --threads 0 "$tmp/t1.tsv" > /dev/null 2>&1; check threads-0-refused 2 $?
# one posting, in the singular
printf 'id\toccupations\ttitle\n1\tocc:1\tKoch\n' > "$tmp/one"
$T tally "$tmp/one" 2>&1 > /dev/null | grep -q 'tally: 1 posting counted, 0 republished ids skipped, 0 malformed rows skipped$'
check one-posting 0 $?

# long titles (a batch is cut by its bytes too): 60 rows of 100 KB
# among short ones, the same bytes with 1 and 3 threads
awk 'BEGIN { print "id\toccupations\ttitle"; s = "Koch ";
	for (i = 0; i < 17; i++) s = s s; # 5 * 2^17 bytes
	for (i = 0; i < 300; i++) printf "%d\tocc:%d\t%s\n", i, i % 7, (i % 5 ? "Koch " i : substr(s, 1, 100000 + i)) }' > "$tmp/long.tsv"
$T tally --threads 1 "$tmp/long.tsv" > "$tmp/long1" 2> "$tmp/long1.err"; check long-1-status 0 $?
$T tally --threads 3 "$tmp/long.tsv" > "$tmp/long3" 2> "$tmp/long3.err"; check long-3-status 0 $?
cmp -s "$tmp/long1" "$tmp/long3"; check long-threads-table 0 $?
cmp -s "$tmp/long1.err" "$tmp/long3.err"; check long-threads-summary 0 $?

# --- progress: --progress on a pipe ends with the whole load's figures
# (the share of the input when its size is known), --quiet and a pipe
# by default show none; the table is the same
$T tally --progress "$tmp/t1.tsv" "$tmp/t2.tsv" "$tmp/t3.tsv" 2> "$tmp/pg.err" | cmp -s - "$tmp/th1.tsv"
check progress-same-table 0 $?
grep -q "^titlemill tally: [0-9]* postings read, [0-9]*/s, 100 % of the input, 0:00 left$" "$tmp/pg.err"
check progress-final-line 0 $?
# postings read: those counted and those whose id was seen before
want=$(sed -n 's/.* \([0-9]*\) postings counted, \([0-9]*\) republished.*/\1 \2/p' "$tmp/pg.err" | awk '{ print $1 + $2 }')
got=$(sed -n 's/.* \([0-9]*\) postings read.*/\1/p' "$tmp/pg.err")
check progress-postings-read "$want" "$got"
$T tally --progress - < "$tmp/t1.tsv" 2>&1 > /dev/null | grep -q '^titlemill tally: [0-9]* postings read, [0-9]*/s$'
check progress-stdin-no-share 0 $?
n=$($T tally "$tmp/t1.tsv" 2>&1 > /dev/null | grep -c 'postings read')
check progress-pipe-default-off 0 "$n"
if command -v script > /dev/null 2>&1; then
	n=$(script -qc "$T tally --quiet $tmp/t1.tsv $tmp/t2.tsv $tmp/t3.tsv -o /dev/null" /dev/null | grep -c 'postings read')
	check progress-quiet-terminal 0 "$n"
fi
$T tally --progress --quiet "$tmp/t1.tsv" > /dev/null 2>&1; check progress-quiet-usage 2 $?

# --- into a store: 1 and 5 threads, chunks of 1,000 and 100,000, give
# the memory's table, and the chunks (their digests) are the same: a
# reload with another thread count finds every chunk in the store
if command -v redis-server > /dev/null 2>&1 && redis_start "$tmp/rd"; then
	U=unix:$tmp/rd/sock
	for c in 1000 100000; do
		for n in 1 5; do
			$T tally --store "$U" --prefix "th$c.$n" --chunk $c --threads $n \
				"$tmp/t1.tsv" "$tmp/t2.tsv" "$tmp/t3.tsv" 2> "$tmp/sto.err"
			check store-$c-$n-status 0 $?
			$T counts --store "$U" --prefix "th$c.$n" > "$tmp/sto.tsv"
			cmp -s "$tmp/th1.tsv" "$tmp/sto.tsv"; check store-$c-$n-table 0 $?
			m=$((6 - n))
			$T tally --store "$U" --prefix "th$c.$n" --chunk $c --threads $m \
				"$tmp/t1.tsv" "$tmp/t2.tsv" "$tmp/t3.tsv" 2> "$tmp/sto2.err"
			grep -q ' 0 chunks applied, ' "$tmp/sto2.err"; check store-$c-$n-reload-$m 0 $?
		done
	done
	redis_stop "$tmp/rd"
fi
finish

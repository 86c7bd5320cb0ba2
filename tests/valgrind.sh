#!/bin/sh
# valgrind memcheck over the normaliser and tally paths: every run must
# end with zero errors and zero definite or indirect leaks (valgrind's
# --error-exitcode makes either one a failure).  Run by `make valgrind`:
#   sh tests/valgrind.sh BINARY BUILD_DIR
# where BUILD_DIR holds the unit test binaries.  Prints one line per run
# and "valgrind: N runs, N failed"; exits 1 when any run failed.
set -u
T=$1 B=$2
here=$(cd "$(dirname "$0")" && pwd)
ex=$here/../examples
gen=$here/bench/gen_titles.py
tmp=$(mktemp -d "${TMPDIR:-/tmp}/tm-valgrind-XXXXXX")
trap 'rm -rf "$tmp"' EXIT INT TERM
V="valgrind --error-exitcode=1 --leak-check=full --errors-for-leak-kinds=definite,indirect --quiet"
runs=0 failed=0

# vg NAME CMD...: the command under memcheck, its output thrown away
# (its own status is not judged here: bad input may rightly give 1)
vg() {
	name=$1
	shift
	runs=$((runs + 1))
	$V --log-file="$tmp/vg.log" "$@" > /dev/null 2> "$tmp/err"
	st=$?
	if [ -s "$tmp/vg.log" ] || [ "$st" -gt 2 ]; then
		failed=$((failed + 1))
		echo "FAIL $name (status $st)"
		sed 's/^/  /' "$tmp/vg.log" | head -40
	else
		echo "ok   $name"
	fi
}

/usr/bin/python3 "$gen" --count 5000 --seed 3 > "$tmp/titles.txt"
/usr/bin/python3 "$gen" --postings --count 5000 --seed 3 > "$tmp/p.tsv"
/usr/bin/python3 "$gen" --postings --count 2000 --seed 4 > "$tmp/q.tsv"
printf '{"title":"Koch (m/w/d)","occupations":["occ:1","occ:2"],"id":7,"lang":"de"}\n{"title":"x","occupations":"a|b"}\n{bad\n' > "$tmp/p.jsonl"
printf 'Koch\377 (m/w/d)\nKo\000ch\nKoch\rKellner\n' > "$tmp/bad.txt"

vg norm-examples $T norm "$ex/titles.txt"
vg norm-generated $T norm "$tmp/titles.txt"
vg norm-memo0 $T norm --memo 0 "$tmp/titles.txt"
vg norm-json $T norm --json "$tmp/titles.txt"
vg norm-key $T norm --key --lang de "$tmp/titles.txt"
vg norm-facets $T norm --facets "$tmp/titles.txt"
vg norm-labels $T norm --labels "$ex/taxonomy.tsv" "$ex/titles.txt"
vg norm-bad-input $T norm "$tmp/bad.txt"
vg norm-strict $T norm --strict "$tmp/bad.txt"
vg tally-table $T tally -o "$tmp/p.counts" "$tmp/p.tsv"
vg tally-labels $T tally --labels "$ex/taxonomy.tsv" -o "$tmp/q.counts" "$tmp/q.tsv"
vg tally-jsonl $T tally "$tmp/p.jsonl"
vg counts-merge $T counts -o "$tmp/m.counts" "$tmp/p.counts" "$tmp/q.counts"
vg coverage $T coverage --labels "$ex/taxonomy.tsv" "$tmp/m.counts"
vg coverage-json $T coverage --json --labels "$ex/taxonomy.tsv" "$tmp/q.tsv"
vg propose $T propose --labels "$ex/taxonomy.tsv" "$tmp/m.counts"
vg propose-ttl $T propose --tsv --labels "$ex/taxonomy.ttl" "$tmp/q.counts"
vg labels $T labels "$ex/taxonomy.tsv" "$ex/taxonomy.ttl"

# the unit tests of those modules (test_unicode reads NormalizationTest.txt
# when NORMALIZATION_TEST names it; G2_CASES likewise for test_stats)
for t in test_decode test_unicode test_token test_lexicon test_title test_norm test_reader test_tally test_stats; do
	[ -x "$B/$t" ] || { echo "FAIL $t: $B/$t not built"; failed=$((failed + 1)); continue; }
	vg "$t" "$B/$t"
done

echo "valgrind: $runs runs, $failed failed"
[ "$failed" -eq 0 ]

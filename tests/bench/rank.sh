#!/bin/sh
# make bench, the ranker: coverage and propose over a counts table of N
# distinct (occupation, language, key) rows for 3,000 occupations with
# 30,000 labels (generated here, deterministic), at two sizes, against
# wc -l on the same table; wall time and peak memory (GNU time).
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
mkdir -p "$out"
gen() { # gen ROWS FILE
	awk -v R="$1" 'function w(x,   s, j) { s = ""; for (j = 0; j < 4; j++) { s = s sprintf("%c", 97 + x % 26); x = int(x / 26) } return s }
	BEGIN {
		print "kind\toccupation\tlang\tkey\ttext\tpostings"
		for (o = 0; o < 3000; o++) tot[o] = 0
		for (r = 0; r < R; r++) {
			o = r % 3000; c = 1 + (r * 7919) % 97; k = "title " w(int(r / 3000)) " " w(o)
			printf "form\tocc:%04d\tde\t%s\t%s\t%d\n", o, k, k, c
			tot[o] += c
			printf "key\t\tde\t%s\t\t%d\n", k, c
		}
		for (o = 0; o < 3000; o++) printf "occupation\tocc:%04d\tde\t\t\t%d\n", o, tot[o]
	}' > "$2"
}
labels=$out/rank-labels.tsv
awk 'function w(x,   s, j) { s = ""; for (j = 0; j < 4; j++) { s = s sprintf("%c", 97 + x % 26); x = int(x / 26) } return s }
	BEGIN { print "occupation\tkind\tlang\tlabel"
	for (o = 0; o < 3000; o++) for (l = 0; l < 10; l++)
		printf "occ:%04d\t%s\tde\ttitle %s %s\n", o, l ? "alt" : "pref", w(l * 11), w(o) }' > "$labels"
for rows in 500000 1000000; do
	c=$out/rank-counts-$rows.tsv
	[ -s "$c" ] || gen $rows "$c"
	t0=$(date +%s%N); wc -l "$c" > /dev/null; t1=$(date +%s%N)
	wc_s=$(awk -v a="$t0" -v z="$t1" 'BEGIN { printf "%.3f", (z - a) / 1e9 }')
	for cmd in coverage propose; do
		/usr/bin/time -f '%e %M' -o "$out/rank.time" "$T" $cmd --labels "$labels" "$c" > "$out/rank.$cmd.out" 2>/dev/null
		read -r s kib < "$out/rank.time"
		echo "$cmd over $rows distinct rows, 3000 occupations, 30000 labels: $s s, peak $kib KiB (wc -l: $wc_s s); $(wc -l < "$out/rank.$cmd.out") lines out"
	done
done

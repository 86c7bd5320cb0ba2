#!/bin/sh
# make bench, the ranker: coverage and propose over counts tables of N
# distinct (occupation, language, key) rows for 3,000 occupations with
# 30,000 labels (generated here, deterministic), N from 250,000 to
# 2,000,000 by doubling, beside wc -l on the same table.  Figures, not
# verdicts: the median of BENCH_RUNS (default 3) runs of wall and CPU
# (user + system) seconds and the peak memory (GNU time); the growth of
# the CPU median per doubling of the rows (2.0 is linear); and, given a
# baseline binary (second argument or BENCH_BASE), the same for it, run
# in turn with this one, and the ratio of their CPU medians.
#   sh tests/bench/rank.sh ./titlemill [BASELINE]
# BENCH_RANK_SIZES changes the sizes ("250000 500000 1000000 2000000").
set -eu
T=${1:-./titlemill}
B=${2:-${BENCH_BASE:-}}
runs=${BENCH_RUNS:-3}
sizes=${BENCH_RANK_SIZES:-250000 500000 1000000 2000000}
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
	}' > "$2.tmp" && mv "$2.tmp" "$2"
}
labels=$out/rank-labels.tsv
awk 'function w(x,   s, j) { s = ""; for (j = 0; j < 4; j++) { s = s sprintf("%c", 97 + x % 26); x = int(x / 26) } return s }
	BEGIN { print "occupation\tkind\tlang\tlabel"
	for (o = 0; o < 3000; o++) for (l = 0; l < 10; l++)
		printf "occ:%04d\t%s\tde\ttitle %s %s\n", o, l ? "alt" : "pref", w(l * 11), w(o) }' > "$labels"

# once BIN CMD TABLE: "wall cpu peak_kib" of one run
once() {
	/usr/bin/time -f '%e %U %S %M' -o "$out/rank.time" "$1" "$2" --labels "$labels" "$3" \
		> "$out/rank.$2.out" 2> /dev/null
	awk '{ printf "%s %.2f %s\n", $1, $2 + $3, $4 }' "$out/rank.time"
}
# med FILE: the medians of its columns (wall, cpu) and the largest peak
med() {
	awk '{ w[NR] = $1; c[NR] = $2; if ($3 > p) p = $3 }
	function m(a, n,   i, j, t) { for (i = 2; i <= n; i++) for (j = i; j > 1 && a[j - 1] > a[j]; j--) { t = a[j]; a[j] = a[j - 1]; a[j - 1] = t } return a[int((n + 1) / 2)] }
	END { printf "%.2f %.2f %d\n", m(w, NR), m(c, NR), p }' "$1"
}

echo "ranker: $runs runs each, medians (wall s, CPU s), peak KiB; growth: CPU per doubling of the rows"
for cmd in coverage propose; do
	prev=; bprev=
	for rows in $sizes; do
		c=$out/rank-counts-$rows.tsv
		[ -s "$c" ] || gen "$rows" "$c"
		: > "$out/rank.a"; : > "$out/rank.b"
		i=0
		while [ "$i" -lt "$runs" ]; do
			once "$T" $cmd "$c" >> "$out/rank.a"
			[ -z "$B" ] || once "$B" $cmd "$c" >> "$out/rank.b"
			i=$((i + 1))
		done
		t0=$(date +%s%N); wc -l "$c" > /dev/null; t1=$(date +%s%N)
		set -- $(med "$out/rank.a")
		line=$(printf '%-8s %8d rows: %6.2f s wall, %6.2f s CPU, peak %7d KiB' $cmd "$rows" "$1" "$2" "$3")
		[ -z "$prev" ] || line="$line, growth $(awk -v a="$prev" -v b="$2" 'BEGIN { printf "%.2f", (a > 0 ? b / a : 0) }')"
		prev=$2; cpu=$2
		if [ -n "$B" ]; then
			set -- $(med "$out/rank.b")
			line="$line | baseline $(printf '%6.2f s wall, %6.2f s CPU, peak %7d KiB' "$1" "$2" "$3")"
			[ -z "$bprev" ] || line="$line, growth $(awk -v a="$bprev" -v b="$2" 'BEGIN { printf "%.2f", (a > 0 ? b / a : 0) }')"
			line="$line | CPU ratio $(awk -v a="$cpu" -v b="$2" 'BEGIN { printf "%.2f", (b > 0 ? a / b : 0) }')"
			bprev=$2
		fi
		echo "$line (wc -l $(awk -v a="$t0" -v z="$t1" 'BEGIN { printf "%.3f", (z - a) / 1e9 }') s; $(wc -l < "$out/rank.$cmd.out") lines out)"
	done
done

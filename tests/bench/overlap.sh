#!/bin/sh
# make bench, overlap: 3,000 occupations and 1,000,000 distinct
# (occupation, language, key) rows in one language (generated here,
# deterministic): 30 groups of 100 (ids occ:GGNNN, --group-prefix 2);
# each occupation has 3 titles every occupation uses (held by 3,000:
# past the cap of 1,000), 200 of its group's 1,500, 30 of 3,000 titles
# drawn at random across the groups (about 30 occupations each), and
# titles of its own.  Wall time and peak
# memory (GNU time) of overlap without and with groups, against coverage
# on the same table (reading the table is common to both); the pairs
# compared against n(n-1)/2.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
mkdir -p "$out"
c=$out/overlap-counts.tsv
[ -s "$c" ] || awk 'BEGIN {
	print "kind\toccupation\tlang\tkey\ttext\tpostings"
	x = 2026 # MINSTD (Park and Miller 1988), exact in doubles
	for (o = 0; o < 3000; o++) {
		g = o % 30; id = sprintf("occ:%02d%03d", g, int(o / 30))
		nr = o < 1000 ? 334 : 333
		for (r = 0; r < nr; r++) {
			if (r < 3) k = "common " r
			else if (r < 203) k = "grp" g " w" (o * 17 + r * 13) % 1500
			else if (r < 233) { x = (x * 48271) % 2147483647; k = "mid " (x % 100) * 30 + r - 203 }
			else k = "own" o " " r
			printf "form\t%s\tde\t%s\t%s\t%d\n", id, k, k, 1 + (o * 7919 + r * 104729) % 97
		}
	}
}' > "$c"
printf 'occupation\tkind\tlang\tlabel\n' > "$out/overlap-labels.tsv"
rows=$(($(wc -l < "$c") - 1))
run() { # run NAME ARGS...
	name=$1; shift
	/usr/bin/time -f "%e %U %M" -o "$out/overlap.time" "$T" "$@" > "$out/overlap.$name.out" 2> "$out/overlap.$name.err"
	read -r s u kib < "$out/overlap.time"
	echo "$s $u $kib"
}
set -- $(run coverage coverage --labels "$out/overlap-labels.tsv" "$c")
cov_s=$1 cov_u=$2 cov_k=$3
echo "coverage (reading the table, the baseline): $cov_s s ($cov_u s CPU), peak $cov_k KiB"
for mode in pairs groups; do
	if [ $mode = pairs ]; then
		set -- $(run $mode overlap --labels "$out/overlap-labels.tsv" --top 1000 "$c")
	else
		set -- $(run $mode overlap --labels "$out/overlap-labels.tsv" --top 1000 --group-prefix 2 "$c")
	fi
	s=$1 u=$2 kib=$3
	summary=$(grep 'pairs compared' "$out/overlap.$mode.err" | sed 's/^titlemill overlap: //')
	echo "overlap ($mode) over $rows distinct rows, 3000 occupations: $s s ($u s CPU), peak $kib KiB" \
		"($(awk -v a="$u" -v b="$cov_u" -v m="$kib" -v n="$cov_k" 'BEGIN { printf "%.2f x the CPU time, %.2f x the memory of coverage", a / (b > 0 ? b : 0.01), m / n }'))"
	echo "  $summary"
done

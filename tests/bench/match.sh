#!/bin/sh
# make bench, titlemill match: the index over 30,000 labels and 1,000,000
# counted titles (tests/bench/gen_match.py, deterministic), then 100,000
# lines matched (counted titles, labels, and both with a typo or an
# unseen word), beside norm on the same lines (the cleaning every match
# starts with): the time to load the counts, to build the index, and
# lines/s (match --stats), and the ratio of norm's lines/s to match's.
# One thread: match is single-threaded.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}/match
mkdir -p "$out"
[ -s "$out/queries.txt" ] || /usr/bin/python3 "$here/gen_match.py" "$out"
q=$out/queries.txt
n=$(wc -l < "$q")
/usr/bin/time -f '%e %M' -o "$out/time" "$T" match --stats --labels "$out/labels.tsv" \
	--counts "$out/counts.tsv" "$q" 2> "$out/stats" > "$out/out.tsv"
read -r s kib < "$out/time"
stats=$(grep 'titlemill match: loaded' "$out/stats")
echo "match: $stats; $s s in all, peak $kib KiB"
t0=$(date +%s%N)
"$T" norm "$q" > /dev/null
t1=$(date +%s%N)
echo "$stats" | awk -v n="$n" -v a="$t0" -v z="$t1" '{
	for (i = 1; i <= NF; i++) if ($i == "lines/s)") m = substr($(i - 1), 2)
	norm = n / ((z - a) / 1e9)
	printf "norm on the same %d lines: %.0f lines/s; match: %.0f lines/s (norm / match %.1f)\n", n, norm, m, norm / m }'

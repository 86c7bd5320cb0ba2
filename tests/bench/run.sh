#!/bin/sh
# make bench: figures, not verdicts.  Times titlemill against cat and
# wc -l on the same generated file in the same run, so the ratios hold
# on a shared, noisy machine; peak memory from GNU time.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
count=${BENCH_TITLES:-1000000}
mkdir -p "$out"
titles=$out/titles-$count.txt
if [ ! -s "$titles" ]; then
	echo "generating $count titles (tests/bench/gen_titles.py, seed 1)..."
	/usr/bin/python3 "$here/gen_titles.py" --count "$count" --seed 1 > "$titles.tmp"
	mv "$titles.tmp" "$titles"
fi
bytes=$(wc -c < "$titles")
lines=$(wc -l < "$titles")

# best of 3 wall-clock seconds of a command (nanosecond clock), and the
# peak resident memory of its last run (GNU time); prints "seconds kib"
best() {
	b=""
	for i in 1 2 3; do
		t0=$(date +%s%N)
		sh -c "$1" > /dev/null 2>&1
		t1=$(date +%s%N)
		s=$(awk -v a="$t0" -v z="$t1" 'BEGIN { printf "%.4f", (z - a) / 1e9 }')
		if [ -z "$b" ] || awk "BEGIN{exit !($s < $b)}"; then b=$s; fi
	done
	/usr/bin/time -f '%M' -o "$out/time" sh -c "$1" > /dev/null 2>&1
	echo "$b $(tail -1 "$out/time")"
}

echo "file: $titles ($lines lines, $bytes bytes)"
set -- $(best "cat '$titles' > /dev/null"); cat_s=$1
set -- $(best "wc -l '$titles' > /dev/null"); wc_s=$1
set -- $(best "'$T' norm '$titles' > /dev/null"); norm_s=$1; norm_kib=$2
set -- $(best "'$T' norm --memo 0 '$titles' > /dev/null"); fresh_s=$1; fresh_kib=$2
hit=$("$T" norm --stats "$titles" 2>&1 > /dev/null | sed -n 's/.*(\(.*\) %).*/\1/p' | tail -1)
set -- $(best "'$T' norm --key '$titles' > /dev/null"); key_s=$1
set -- $(best "'$T' norm --json '$titles' > /dev/null"); json_s=$1; json_kib=$2
set -- $(best "'$T' norm < /dev/null"); start_s=$1; start_kib=$2

awk -v n="$lines" -v b="$bytes" -v c="$cat_s" -v w="$wc_s" -v s="$norm_s" \
    -v k="$key_s" -v j="$json_s" -v st="$start_s" -v m="$norm_kib" \
    -v jm="$json_kib" -v sm="$start_kib" -v fr="$fresh_s" -v fm="$fresh_kib" \
    -v hit="$hit" 'BEGIN {
	f = "%-26s %8.4f s %12.0f titles/s %8.1f MB/s\n"
	printf f, "cat", c, n / (c > 0 ? c : 0.001), b / 1e6 / (c > 0 ? c : 0.001)
	printf f, "wc -l", w, n / (w > 0 ? w : 0.001), b / 1e6 / (w > 0 ? w : 0.001)
	printf f, "titlemill norm", s, n / s, b / 1e6 / s
	printf f, "titlemill norm --memo 0", fr, n / fr, b / 1e6 / fr
	printf f, "titlemill norm --key", k, n / k, b / 1e6 / k
	printf f, "titlemill norm --json", j, n / j, b / 1e6 / j
	printf "norm / wc -l time ratio:   %.1f x\n", s / (w > 0 ? w : 0.001)
	printf "norm / cat time ratio:     %.1f x\n", s / (c > 0 ? c : 0.001)
	printf "norm --memo 0 / wc -l time ratio: %.1f x\n", fr / (w > 0 ? w : 0.001)
	printf "norm --memo 0 / cat time ratio:   %.1f x\n", fr / (c > 0 ? c : 0.001)
	printf "start-up (lexicon load, empty input): %.4f s, %d KiB peak\n", st, sm
	printf "memory of recent titles: %s %% of titles answered from it\n", hit
	printf "peak memory: norm %d KiB, norm --memo 0 %d KiB, norm --json %d KiB\n", m, fm, jm
	printf "norm on one core: %.0f titles/s (start-up included); %.0f titles/s with --memo 0\n", n / s, n / fr
	if (s > st && fr > st)
		printf "past start-up: %.0f titles/s; %.0f titles/s with --memo 0\n", n / (s - st), n / (fr - st)
}'

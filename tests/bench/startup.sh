#!/bin/sh
# make bench: start-up of `titlemill norm` on empty input (every lexicon
# loaded) with a warm lexicon cache, a cold one (the image removed before
# each run, so the run builds and writes it) and the cache off, beside
# `cat /dev/null` as the baseline, in the same run.  Figures, not
# verdicts: min and median of BENCH_RUNS (default 21) runs each, in
# milliseconds of wall time, and as ratios to the baseline's median.
set -eu
T=${1:-./titlemill}
runs=${BENCH_RUNS:-21}
dir=$(mktemp -d "${TMPDIR:-/tmp}/tm-startup.XXXXXX")
trap 'rm -rf "$dir"' EXIT INT TERM
cache=$dir/cache

# run CMD [PREP]: the wall times of $runs runs of CMD in ms, one a line
# (PREP, when given, runs untimed before each)
run() {
	i=0
	while [ "$i" -lt "$runs" ]; do
		[ -z "${2:-}" ] || sh -c "$2"
		t0=$(date +%s%N)
		sh -c "$1" < /dev/null > /dev/null 2>&1
		t1=$(date +%s%N)
		echo $(((t1 - t0) / 1000))
		i=$((i + 1))
	done | sort -n | awk '{ v[NR] = $1 } END { printf "%.2f %.2f\n", v[1] / 1000, v[int((NR + 1) / 2)] / 1000 }'
}

TITLEMILL_LEXCACHE=$cache "$T" norm < /dev/null > /dev/null
set -- $(run "cat /dev/null"); b_min=$1; b_med=$2
set -- $(run "TITLEMILL_LEXCACHE='$cache' '$T' norm"); w_min=$1; w_med=$2
set -- $(run "TITLEMILL_LEXCACHE='$cache' '$T' norm" "rm -f '$cache'/*.img"); c_min=$1; c_med=$2
set -- $(run "TITLEMILL_LEXCACHE=off '$T' norm"); o_min=$1; o_med=$2
/usr/bin/time -f '%M' -o "$dir/time" env TITLEMILL_LEXCACHE="$cache" "$T" norm < /dev/null > /dev/null
w_kib=$(tail -1 "$dir/time")
/usr/bin/time -f '%M' -o "$dir/time" env TITLEMILL_LEXCACHE=off "$T" norm < /dev/null > /dev/null
o_kib=$(tail -1 "$dir/time")
img=$(ls -l "$cache"/*.img 2> /dev/null | awk '{ s += $5 } END { print s + 0 }')

echo "start-up, $runs runs each (wall ms: min, median; ratio of medians to cat /dev/null)"
awk -v bm="$b_min" -v bd="$b_med" -v wm="$w_min" -v wd="$w_med" -v cm="$c_min" \
    -v cd="$c_med" -v om="$o_min" -v od="$o_med" -v wk="$w_kib" -v ok="$o_kib" \
    -v img="$img" 'BEGIN {
	f = "%-28s %8.2f %8.2f %7.1f x\n"
	printf f, "cat /dev/null", bm, bd, 1
	printf f, "norm, warm cache", wm, wd, wd / bd
	printf f, "norm, cold cache (builds)", cm, cd, cd / bd
	printf f, "norm, cache off", om, od, od / bd
	printf "cache off / warm cache: %.1f x; image %.1f MB; peak %d KiB warm, %d KiB off\n",
		od / wd, img / 1e6, wk, ok
}'

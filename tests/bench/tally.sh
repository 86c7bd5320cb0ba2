#!/bin/sh
# make bench, the frequency engine, on a deterministic file of 1,000,000
# postings (tests/bench/gen_titles.py --postings, seed 1): tally in memory
# with 1 and 2 threads, the counting stage alone (count_stage.c: cleaned
# postings counted, ids de-duplicated, forms and examples kept), and
# `cut | sort | uniq -c` over the titles as the floor, as rates and as
# ratios; memory per distinct (occupation, language, key) on a file of
# 1,000,000 distinct keys; then the Redis store beside redis-benchmark.
#
#   tests/bench/tally.sh TITLEMILL
#
# BENCH_BASE=BINARY adds a baseline build's tally (ratios this/baseline,
# each pair run in turn), BENCH_BASE_STAGE=PROGRAM its counting stage
# (count_stage.c built against the baseline tree's objects);
# COUNT_STAGE=PROGRAM is this build's (make bench passes it);
# BENCH_RUNS=N runs of each (default 3; medians); BENCH_POSTINGS=N.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
count=${BENCH_POSTINGS:-1000000}
runs=${BENCH_RUNS:-3}
base=${BENCH_BASE:-}
export TITLEMILL_LEXDIR=${TITLEMILL_LEXDIR:-$here/../../lexicons}
mkdir -p "$out"
p=$out/postings-$count.tsv
if [ ! -s "$p" ]; then
	echo "generating $count postings (seed 1)..."
	/usr/bin/python3 "$here/gen_titles.py" --postings --count "$count" --seed 1 > "$p.tmp"
	mv "$p.tmp" "$p"
fi

# wall seconds of one run of "$@" (output thrown away)
wall() {
	t0=$(date +%s%N)
	"$@" > /dev/null 2>&1
	t1=$(date +%s%N)
	awk -v a="$t0" -v z="$t1" 'BEGIN { printf "%.3f\n", (z - a) / 1e9 }'
}
median() { sort -n | awk '{ v[NR] = $1 } END { print v[int((NR + 1) / 2)] }'; }
floor_run() { LC_ALL=C cut -f5 "$p" | LC_ALL=C sort | uniq -c > /dev/null; }

# the commands in turn, run after run, so that a drift of the machine
# touches each alike; medians
: > "$out/t.floor"; : > "$out/t.one"; : > "$out/t.two"; : > "$out/t.base"
for i in $(seq "$runs"); do
	wall floor_run >> "$out/t.floor"
	wall "$T" tally --quiet --threads 1 "$p" -o /dev/null >> "$out/t.one"
	wall "$T" tally --quiet --threads 2 "$p" -o /dev/null >> "$out/t.two"
	[ -z "$base" ] || wall "$base" tally "$p" -o /dev/null >> "$out/t.base"
done
fl=$(median < "$out/t.floor"); one=$(median < "$out/t.one"); two=$(median < "$out/t.two")
echo "postings: $p ($count), $runs runs each, medians of wall time; machine: $(nproc) processors, load $(cut -d' ' -f1-3 /proc/loadavg)"
rate() { awk -v s="$2" -v n="$count" -v f="$fl" -v b="${3:-}" -v name="$1" 'BEGIN {
	printf "%-32s %7.3f s %10.0f postings/s  %5.2f x the floor'\''s time", name, s, n / s, s / f
	if (b != "") printf "  %5.2f x the baseline'\''s rate", b / s
	printf "\n" }'; }
rate "cut | sort | uniq -c (floor)" "$fl"
if [ -n "$base" ]; then
	bs=$(median < "$out/t.base")
	rate "baseline tally" "$bs" "$bs"
	rate "tally --threads 1" "$one" "$bs"
	rate "tally --threads 2" "$two" "$bs"
else
	rate "tally --threads 1" "$one"
	rate "tally --threads 2" "$two"
fi
awk -v a="$one" -v b="$two" 'BEGIN { printf "second thread: %.2f x the rate of one\n", a / b }'

# the counting stage alone, in processor time (count_stage.c)
if [ -n "${COUNT_STAGE:-}" ]; then
	cs=$("$COUNT_STAGE" "$p" "$runs")
	echo "counting stage: $cs" | awk '{ printf "counting stage alone: %s postings, %s rows, %s processor s, %.0f postings/s\n", $4, $6, $8, $10 }'
	if [ -n "${BENCH_BASE_STAGE:-}" ]; then
		bcs=$("$BENCH_BASE_STAGE" "$p" "$runs")
		echo "$cs $bcs" | awk '{ printf "baseline counting stage: %.0f postings/s; this one %.2f x its rate\n", $18, $8 / $18 }'
	fi
fi

# memory: the engine per distinct (occupation, language, key), and the
# peak of the whole process, on a file where every title is a new key
/usr/bin/time -f '%M' -o "$out/tally.time" "$T" tally --quiet --threads 1 --stats "$p" > "$out/counts.tsv" 2> "$out/tally.err"
echo "memory tally peak: $(cat "$out/tally.time") KiB"
grep 'distinct' "$out/tally.err" | sed 's/^titlemill tally: /memory engine: /'
hk=$out/postings-distinct.tsv
if [ ! -s "$hk" ]; then
	awk 'BEGIN { print "id\toccupations\ttitle"; srand(1);
		for (i = 0; i < 1000000; i++) { w = ""; x = i;
			for (j = 0; j < 5; j++) { w = w sprintf("%c", 97 + x % 26); x = int(x / 26) }
			printf "%d\tocc:%04d\tKoch %s\n", i, i % 3000, w } }' > "$hk"
fi
/usr/bin/time -f '%M' -o "$out/hk.time" "$T" tally --quiet --threads 1 --stats "$hk" > /dev/null 2> "$out/hk.err"
grep 'distinct' "$out/hk.err" | sed 's/^titlemill tally: /1,000,000 distinct keys: /'
echo "1,000,000 distinct keys: peak $(cat "$out/hk.time") KiB"
if [ -n "$base" ]; then
	/usr/bin/time -f '%M' -o "$out/hkb.time" "$base" tally --stats "$hk" > /dev/null 2> "$out/hkb.err"
	grep 'distinct' "$out/hkb.err" | sed 's/^titlemill tally: /baseline, 1,000,000 distinct keys: /'
	echo "baseline, 1,000,000 distinct keys: peak $(cat "$out/hkb.time") KiB"
fi

# Redis: a local server of our own
if ! command -v redis-server > /dev/null 2>&1; then
	echo "redis-server not installed: Redis figures skipped"
	exit 0
fi
rd=$(mktemp -d "${TMPDIR:-/tmp}/tm-bench-XXXXXX")
redis-server --port 0 --unixsocket "$rd/sock" --dir "$rd" --save "" --appendonly no \
	--daemonize yes --pidfile "$rd/pid" > /dev/null
trap 'kill "$(cat "$rd/pid")" 2>/dev/null; rm -rf "$rd"' EXIT
for i in 1 2 3 4 5 6 7 8 9 10; do [ -S "$rd/sock" ] && break; sleep 0.2; done
secs() { awk -v a="$1" -v z="$2" 'BEGIN { printf "%.3f", (z - a) / 1e9 }'; }
t0=$(date +%s%N); "$T" tally --quiet --store "unix:$rd/sock" "$p" 2> "$out/redis.err"; t1=$(date +%s%N)
red_s=$(secs "$t0" "$t1")
awk -v s="$red_s" -v n="$count" 'BEGIN { printf "Redis tally (ids de-duplicated, unix socket): %.3f s, %.0f postings/s\n", s, n / s }'
sed 's/^titlemill tally: /  /' "$out/redis.err"
t0=$(date +%s%N); "$T" tally --quiet --store "unix:$rd/sock" "$p" 2> /dev/null; t1=$(date +%s%N)
awk -v s="$(secs "$t0" "$t1")" -v n="$count" 'BEGIN { printf "Redis reload of the same file (all chunks in the ledger): %.3f s, %.0f postings/s\n", s, n / s }'
used=$(redis-cli -s "$rd/sock" info memory | awk -F: '/^used_memory:/ { print $2 + 0 }')
triples=$(awk -F '\t' '$1 == "title"' "$out/counts.tsv" | wc -l)
ids=$(awk -F '\t' 'NR > 1 { print $1 }' "$p" | sort -u | wc -l)
echo "Redis used_memory: $used bytes for $triples (occupation, language, key) and $ids posting ids"
t0=$(date +%s%N); "$T" counts --store "unix:$rd/sock" > "$out/counts.redis.tsv"; t1=$(date +%s%N)
echo "counts --store: $(secs "$t0" "$t1") s; same table as memory: $(cmp -s "$out/counts.tsv" "$out/counts.redis.tsv" && echo yes || echo NO)"
echo "the server's own ceiling (redis-benchmark -P 64 -t hset,incr -q, same socket):"
redis-benchmark -s "$rd/sock" -P 64 -t hset,incr -q -n 1000000 2>/dev/null | tr '\r' '\n' | grep -v '^$' | tail -2

#!/bin/sh
# make bench, the frequency engine: memory and Redis tally on a
# deterministic file of 2,000,000 postings (tests/bench/gen_titles.py
# --postings, seed 1), beside redis-benchmark's own ceiling on the same
# server; memory per distinct key on a file with 1,000,000 distinct keys.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
count=${BENCH_POSTINGS:-2000000}
mkdir -p "$out"
p=$out/postings-$count.tsv
if [ ! -s "$p" ]; then
	echo "generating $count postings (seed 1)..."
	/usr/bin/python3 "$here/gen_titles.py" --postings --count "$count" --seed 1 > "$p.tmp"
	mv "$p.tmp" "$p"
fi
secs() { awk -v a="$1" -v z="$2" 'BEGIN { printf "%.3f", (z - a) / 1e9 }'; }

t0=$(date +%s%N); wc -l "$p" > /dev/null; t1=$(date +%s%N); wc_s=$(secs "$t0" "$t1")
/usr/bin/time -f '%M' -o "$out/tally.time" "$T" tally --stats "$p" > "$out/counts.tsv" 2> "$out/tally.err"
t0=$(date +%s%N); "$T" tally "$p" > /dev/null 2>&1; t1=$(date +%s%N); mem_s=$(secs "$t0" "$t1")
echo "postings: $p ($count)"
echo "wc -l: $wc_s s"
awk -v s="$mem_s" -v n="$count" -v w="$wc_s" 'BEGIN { printf "memory tally: %.3f s, %.0f postings/s (%.0f x the time of wc -l)\n", s, n / s, s / (w > 0 ? w : 0.001) }'
echo "memory tally peak: $(cat "$out/tally.time") KiB"
grep 'distinct' "$out/tally.err" | sed 's/^titlemill tally: /memory engine: /'

# a million distinct keys: "<word> <code>" titles, one per posting
hk=$out/postings-distinct.tsv
if [ ! -s "$hk" ]; then
	awk 'BEGIN { print "id\toccupations\ttitle"; srand(1);
		for (i = 0; i < 1000000; i++) { w = ""; x = i;
			for (j = 0; j < 5; j++) { w = w sprintf("%c", 97 + x % 26); x = int(x / 26) }
			printf "%d\tocc:%04d\tKoch %s\n", i, i % 3000, w } }' > "$hk"
fi
/usr/bin/time -f '%M' -o "$out/hk.time" "$T" tally --stats "$hk" > /dev/null 2> "$out/hk.err"
grep 'distinct' "$out/hk.err" | sed 's/^titlemill tally: /1,000,000 distinct keys: /'
echo "1,000,000 distinct keys: peak $(cat "$out/hk.time") KiB"

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
t0=$(date +%s%N); "$T" tally --store "unix:$rd/sock" "$p" 2> "$out/redis.err"; t1=$(date +%s%N)
red_s=$(secs "$t0" "$t1")
awk -v s="$red_s" -v n="$count" 'BEGIN { printf "Redis tally (ids de-duplicated, unix socket): %.3f s, %.0f postings/s\n", s, n / s }'
sed 's/^titlemill tally: /  /' "$out/redis.err"
t0=$(date +%s%N); "$T" tally --store "unix:$rd/sock" "$p" 2> /dev/null; t1=$(date +%s%N)
awk -v s="$(secs "$t0" "$t1")" -v n="$count" 'BEGIN { printf "Redis reload of the same file (all chunks in the ledger): %.3f s, %.0f postings/s\n", s, n / s }'
used=$(redis-cli -s "$rd/sock" info memory | awk -F: '/^used_memory:/ { print $2 + 0 }')
triples=$(awk -F '\t' '$1 == "title"' "$out/counts.tsv" | wc -l)
ids=$(awk -F '\t' 'NR > 1 { print $1 }' "$p" | sort -u | wc -l)
echo "Redis used_memory: $used bytes for $triples (occupation, language, key) and $ids posting ids"
t0=$(date +%s%N); "$T" counts --store "unix:$rd/sock" > "$out/counts.redis.tsv"; t1=$(date +%s%N)
echo "counts --store: $(secs "$t0" "$t1") s; same table as memory: $(cmp -s "$out/counts.tsv" "$out/counts.redis.tsv" && echo yes || echo NO)"
echo "the server's own ceiling (redis-benchmark -P 64 -t hset,incr -q, same socket):"
redis-benchmark -s "$rd/sock" -P 64 -t hset,incr -q -n 1000000 2>/dev/null | tr '\r' '\n' | grep -v '^$' | tail -2

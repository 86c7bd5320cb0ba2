#!/bin/sh
# make bench, the store on one server and on a Redis Cluster of three
# masters (started here on free loopback ports): postings/s with one and
# with two loaders at once, beside the memory engine on the same file and
# redis-benchmark's own ceiling (SET, pipelined 64) on the same servers.
# On a 2-core machine the cluster shows that it is correct, not that it
# is faster: three servers and the loaders share the same two cores.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
N=${BENCH_CLUSTER:-200000}
mkdir -p "$out"
TITLEMILL=$T
. "$here/../cli/lib.inc"   # cluster_start, cluster_stop; sets tmp
trap 'cluster_stop "$tmp/c"; [ -f "$tmp/one/pid" ] && kill "$(cat "$tmp/one/pid")"; rm -rf "$tmp"' EXIT INT TERM
postings=$out/cluster-postings-$N.tsv
[ -s "$postings" ] || /usr/bin/python3 "$here/gen_titles.py" --postings --count "$N" --seed 21 > "$postings"
half=$((N / 2 + 1))
head -n "$half" "$postings" > "$tmp/h1.tsv"
{ head -1 "$postings"; tail -n +"$((half + 1))" "$postings"; } > "$tmp/h2.tsv"
secs() { awk -v a="$1" -v z="$2" 'BEGIN { printf "%.3f", (z - a) / 1e9 }'; }
run() { # run LABEL URL FILE...: one loader per file, all at once
	label=$1 url=$2; shift 2
	t0=$(date +%s%N)
	# shellcheck disable=SC2086
	for f in "$@"; do "$T" tally --store "$url" ${OPTS:-} "$f" 2>> "$tmp/load.err" & done
	wait
	t1=$(date +%s%N)
	s=$(secs "$t0" "$t1")
	awk -v l="$label" -v s="$s" -v n="$N" -v m="$mem" 'BEGIN { printf "%s: %.3f s, %.0f postings/s (%.2f x the memory engine)\n", l, s, n / s, s / m }'
}
t0=$(date +%s%N); "$T" tally "$postings" > "$tmp/mem.tsv" 2> /dev/null; t1=$(date +%s%N)
mem=$(secs "$t0" "$t1")
echo "memory tally, $N postings: $mem s"

mkdir -p "$tmp/one"
port=$(/usr/bin/python3 -c 'import socket; s = socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])')
redis-server --port "$port" --bind 127.0.0.1 --save "" --daemonize yes --pidfile "$tmp/one/pid" > /dev/null
sleep 0.5
one=redis://127.0.0.1:$port
run "one server, one loader" "$one" "$postings"
redis-cli -p "$port" flushall > /dev/null
run "one server, two loaders (half each)" "$one" "$tmp/h1.tsv" "$tmp/h2.tsv"
"$T" counts --store "$one" | cmp -s - "$tmp/mem.tsv" || echo "  (counts differ from memory!)"
echo "  redis-benchmark SET -P 64 on it: $(redis-benchmark -p "$port" -t set -n 300000 -P 64 -q 2> /dev/null | tr -d '\r' | sed -n 's/.*SET: \([0-9.]*\) requests.*/\1/p') requests/s"

cluster_start "$tmp/c" 3 0 > /dev/null
run "three-master cluster, one loader" "$CL_URL" "$postings"
grep -v "chunks applied" "$tmp/load.err" | head -3
for q in $CL_PORTS; do redis-cli -p "$q" flushall > /dev/null; done
run "three-master cluster, two loaders (half each)" "$CL_URL" "$tmp/h1.tsv" "$tmp/h2.tsv"
"$T" counts --store "$CL_URL" | cmp -s - "$tmp/mem.tsv" || echo "  (counts differ from memory!)"
# loaders of one cleaning thread each: two of them can use the two
# cores one leaves half idle, so their ratio shows whether the store
# lets loaders work side by side
for q in $CL_PORTS; do redis-cli -p "$q" flushall > /dev/null; done
OPTS="--threads 1" run "three-master cluster, one loader, one cleaning thread" "$CL_URL" "$postings"
single=$s
for q in $CL_PORTS; do redis-cli -p "$q" flushall > /dev/null; done
OPTS="--threads 1" run "three-master cluster, two loaders of one cleaning thread (half each)" "$CL_URL" "$tmp/h1.tsv" "$tmp/h2.tsv"
"$T" counts --store "$CL_URL" | cmp -s - "$tmp/mem.tsv" || echo "  (counts differ from memory!)"
awk -v a="$single" -v b="$s" 'BEGIN { printf "  two loaders of one thread: %.2f x the rate of one\n", a / b }'
echo "  redis-benchmark --cluster SET -P 64 on it: $(redis-benchmark -p "$(echo "$CL_PORTS" | cut -d' ' -f1)" --cluster -t set -n 300000 -P 64 -q 2> /dev/null | tr -d '\r' | sed -n 's/.*SET: \([0-9.]*\) requests.*/\1/p') requests/s"
echo "  (2 cores: the cluster shows correctness, not speed-up)"

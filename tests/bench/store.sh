#!/bin/sh
# make bench, the Redis store on one local server over a Unix socket:
# tally --store with chunks of 10,000 and 100,000 postings (ids
# de-duplicated) on a deterministic file (tests/bench/gen_titles.py
# --postings, seed 1), beside the memory engine on the same file and
# redis-benchmark's HSET (pipelined 64) on the same server as the floor.
# The server's CPU per posting comes from used_cpu (all of it) and from
# INFO commandstats (the usec of the scripts, where it spends nearly all
# of it; wall time inside the server, so a busy machine inflates it).  Medians
# of BENCH_RUNS runs (default 3); BENCH_STORE postings (default
# 1,000,000).  BENCH_BASELINE=/path/to/titlemill (an older build) runs
# the same loads with it, paired run by run, and prints the ratios.
# A day into a full store: the last fifth of the file loaded into a
# store that holds the rest, the server's figures of that load alone.
# The loader's own CPU with the titles already clean (norm's output put
# in their place).  Periods: the same file loaded by month (the default) and by day
# against --period none, paired run by run (the ratio of the times), and
# the server's memory (used_memory) per distinct (occupation, language,
# key, period) it holds.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
N=${BENCH_STORE:-1000000}
runs=${BENCH_RUNS:-3}
base=${BENCH_BASELINE:-}
mkdir -p "$out"
if ! command -v redis-server > /dev/null 2>&1; then
	echo "redis-server not installed: store figures skipped"
	exit 0
fi
p=$out/postings-$N.tsv
if [ ! -s "$p" ]; then
	echo "generating $N postings (seed 1)..."
	/usr/bin/python3 "$here/gen_titles.py" --postings --count "$N" --seed 1 > "$p.tmp"
	mv "$p.tmp" "$p"
fi
rd=$(mktemp -d "${TMPDIR:-/tmp}/tm-bench-XXXXXX")
redis-server --port 0 --unixsocket "$rd/sock" --dir "$rd" --save "" --appendonly no \
	--daemonize yes --pidfile "$rd/pid" > /dev/null
trap 'kill "$(cat "$rd/pid")" 2> /dev/null; rm -rf "$rd"' EXIT INT TERM
for i in $(seq 50); do redis-cli -s "$rd/sock" ping > /dev/null 2>&1 && break; sleep 0.1; done
R() { redis-cli -s "$rd/sock" "$@"; }
now() { date +%s%N; }
median() { sort -g | awk '{ v[NR] = $1 } END { print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2 }'; }
cpu() { R info cpu | tr -d '\r' | awk -F: '/^used_cpu_(user|sys):/ { s += $2 } END { printf "%.3f", s }'; }
# the usec of the scripts (the commands they call are inside them)
cmdusec() { R info commandstats | tr -d '\r' | awk -F'[=,:]' '/^cmdstat_evalsha:/ { s += $5 } END { print s + 0 }'; }

# memory: the client's own pace on this file
: > "$rd/mem"
for i in $(seq "$runs"); do
	t0=$(now); "$T" tally "$p" > "$rd/counts.tsv" 2> /dev/null; t1=$(now)
	echo $(((t1 - t0) / 1000000)) >> "$rd/mem"
done
mem=$(median < "$rd/mem")
counted=$("$T" tally "$p" 2>&1 > /dev/null | sed -n 's/.*: \([0-9]*\) postings counted.*/\1/p; s/^titlemill tally: \([0-9]*\) postings counted.*/\1/p' | head -1)
echo "store bench: $N postings ($counted counted, ids de-duplicated), $runs runs each, medians"
awk -v m="$mem" -v n="$N" 'BEGIN { printf "memory tally: %.2f s, %.0f postings/s\n", m / 1000, n / (m / 1000) }'

# one load of binary $1 with chunk $2 into an empty store: ms, server
# CPU s, commandstats usec
load() {
	R flushall > /dev/null
	R config resetstat > /dev/null
	c0=$(cpu)
	t0=$(now); "$1" tally --store "unix:$rd/sock" --chunk "$2" "$p" 2> "$rd/err"; t1=$(now)
	c1=$(cpu)
	echo "$(((t1 - t0) / 1000000)) $(awk -v a="$c0" -v b="$c1" 'BEGIN { print b - a }') $(cmdusec)"
}
for chunk in 10000 100000; do
	: > "$rd/this"
	: > "$rd/base"
	for i in $(seq "$runs"); do
		load "$T" "$chunk" >> "$rd/this"
		[ -z "$base" ] || load "$base" "$chunk" >> "$rd/base"
	done
	R flushall > /dev/null
	"$T" tally --store "unix:$rd/sock" --chunk "$chunk" "$p" 2> /dev/null
	same=$("$T" counts --store "unix:$rd/sock" | cmp -s - "$rd/counts.tsv" && echo yes || echo NO)
	ms=$(awk '{ print $1 }' "$rd/this" | median)
	cs=$(awk '{ print $2 }' "$rd/this" | median)
	us=$(awk '{ print $3 }' "$rd/this" | median)
	awk -v c="$chunk" -v ms="$ms" -v cs="$cs" -v us="$us" -v n="$N" -v k="$counted" -v m="$mem" -v same="$same" 'BEGIN {
		printf "store, chunk %d: %.2f s, %.0f postings/s (%.2f x the time of memory tally); server CPU %.2f us per posting (used_cpu %.2f s), scripts %.2f us per posting (commandstats); same table as memory: %s\n",
			c, ms / 1000, n / (ms / 1000), ms / m, cs * 1e6 / k, cs, us / k, same }'
	if [ -n "$base" ]; then
		bms=$(awk '{ print $1 }' "$rd/base" | median)
		bcs=$(awk '{ print $2 }' "$rd/base" | median)
		bus=$(awk '{ print $3 }' "$rd/base" | median)
		awk -v c="$chunk" -v ms="$ms" -v bms="$bms" -v cs="$cs" -v bcs="$bcs" -v us="$us" -v bus="$bus" -v n="$N" -v k="$counted" 'BEGIN {
			printf "  baseline, chunk %d: %.2f s, %.0f postings/s; server CPU %.2f us per posting, scripts %.2f us per posting; this build: %.2f x the speed, %.2f x the server CPU\n",
				c, bms / 1000, n / (bms / 1000), bcs * 1e6 / k, bus / k, bms / ms, cs / bcs }'
	fi
done
# a day's load into a store that holds the days before it: the first
# 80 % of the file loaded, then the last 20 % (chunk 100,000), the
# server's figures of the second load alone, per posting it counted: here
# most titles have three examples already, and the candidates meet them
full_a=$((N * 4 / 5))
head -n $((full_a + 1)) "$p" > "$rd/first.tsv"
{ head -1 "$p"; tail -n +$((full_a + 2)) "$p"; } > "$rd/last.tsv"
# binary $1: ms, server CPU s, commandstats usec, postings counted
full() {
	R flushall > /dev/null
	"$1" tally --store "unix:$rd/sock" --chunk 100000 "$rd/first.tsv" 2> /dev/null
	R config resetstat > /dev/null
	c0=$(cpu)
	t0=$(now); "$1" tally --store "unix:$rd/sock" --chunk 100000 "$rd/last.tsv" 2> "$rd/err"; t1=$(now)
	c1=$(cpu)
	echo "$(((t1 - t0) / 1000000)) $(awk -v a="$c0" -v b="$c1" 'BEGIN { print b - a }') $(cmdusec) $(sed -n 's/.*[;:] \([0-9]*\) postings counted.*/\1/p' "$rd/err" | head -1)"
}
: > "$rd/this"
: > "$rd/base"
for i in $(seq "$runs"); do
	full "$T" >> "$rd/this"
	[ -z "$base" ] || full "$base" >> "$rd/base"
done
# medians of file $1's columns: ms, server us per posting counted,
# scripts' us per posting counted, server CPU s
fullmed() {
	ms=$(awk '{ print $1 }' "$1" | median)
	awk '{ print $2 * 1e6 / $4, $3 / $4, $2 }' "$1" > "$1.per"
	echo "$ms $(awk '{ print $1 }' "$1.per" | median) $(awk '{ print $2 }' "$1.per" | median) $(awk '{ print $3 }' "$1.per" | median)"
}
set -- $(fullmed "$rd/this")
printf 'store, a day into a full store (the last %d postings into a store of the first %d, chunk 100000): %.2f s; server CPU %.2f us per posting counted (used_cpu %.2f s), scripts %.2f us (commandstats)\n' \
	"$((N - full_a))" "$full_a" "$(echo "$1" | awk '{ print $1 / 1000 }')" "$2" "$4" "$3"
if [ -n "$base" ]; then
	tu=$2
	set -- $(fullmed "$rd/base")
	printf '  baseline: %.2f s; server CPU %.2f us per posting counted, scripts %.2f us; this build: %.2f x the server CPU\n' \
		"$(echo "$1" | awk '{ print $1 / 1000 }')" "$2" "$3" "$(awk -v a="$tu" -v b="$2" 'BEGIN { print a / b }')"
fi

# the loader's own CPU per posting apart from cleaning: the file with
# its titles replaced by norm's output (the normaliser's memory answers
# each, as it would a title it has cleaned), loaded into an emptied store
# (chunk 100,000; user + system of the whole process, lexicons included)
# beside the memory tally of the same file
if [ -x /usr/bin/time ]; then
	tc=$(head -1 "$p" | tr '\t' '\n' | grep -n -x title | cut -d: -f1)
	tail -n +2 "$p" | cut -f "$tc" | "$T" norm 2> /dev/null > "$rd/titles"
	{ head -1 "$p"; tail -n +2 "$p" | awk -F '\t' -v OFS='\t' -v c="$tc" -v f="$rd/titles" '{ getline t < f; $c = t; print }'; } > "$rd/clean.tsv"
	# binary $1, store (1) or memory (0): CPU s
	cpuof() {
		R flushall > /dev/null
		if [ "$2" = 1 ]; then
			/usr/bin/time -f '%U %S' -o "$rd/time" "$1" tally --store "unix:$rd/sock" --chunk 100000 "$rd/clean.tsv" 2> /dev/null
		else
			/usr/bin/time -f '%U %S' -o "$rd/time" "$1" tally "$rd/clean.tsv" > /dev/null 2>&1
		fi
		awk '{ print $1 + $2 }' "$rd/time"
	}
	: > "$rd/cs"; : > "$rd/cm"; : > "$rd/bs"
	for i in $(seq "$runs"); do
		cpuof "$T" 1 >> "$rd/cs"
		cpuof "$T" 0 >> "$rd/cm"
		[ -z "$base" ] || cpuof "$base" 1 >> "$rd/bs"
	done
	awk -v s="$(median < "$rd/cs")" -v m="$(median < "$rd/cm")" -v n="$N" 'BEGIN {
		printf "the loader, titles already clean: store %.2f s of CPU, %.2f us per posting; memory tally %.2f s, %.2f us\n", s, s * 1e6 / n, m, m * 1e6 / n }'
	[ -z "$base" ] || awk -v s="$(median < "$rd/bs")" -v n="$N" 'BEGIN {
		printf "  baseline, titles already clean: store %.2f s of CPU, %.2f us per posting\n", s, s * 1e6 / n }'
fi

# periods: one load of binary $1 by period $2 (chunk 100,000) into an
# empty store: ms, then the server's used_memory after it
loadp() {
	R flushall > /dev/null
	t0=$(now); "$1" tally --store "unix:$rd/sock" --period "$2" "$p" 2> "$rd/err"; t1=$(now)
	echo "$(((t1 - t0) / 1000000)) $(R info memory | tr -d '\r' | sed -n 's/^used_memory://p')"
}
R flushall > /dev/null
empty=$(R info memory | tr -d '\r' | sed -n 's/^used_memory://p')
for per in none month day; do : > "$rd/per-$per"; done
for i in $(seq "$runs"); do
	for per in none month day; do loadp "$T" "$per" >> "$rd/per-$per"; done
done
for per in none month day; do
	R flushall > /dev/null
	"$T" tally --store "unix:$rd/sock" --period "$per" "$p" 2> /dev/null
	rows=$("$T" counts --store "unix:$rd/sock" | awk -F '\t' '$1 == "title"' | wc -l)
	# the counting keys' own bytes (MEMORY USAGE of each), the posting ids apart
	keyb=$(R --scan | grep -v ':{i:' | awk '{ gsub(/"/, "\\\""); print "MEMORY USAGE \"" $0 "\" SAMPLES 0" }' | R | awk '{ s += $1 } END { print s + 0 }')
	"$T" tally --period "$per" "$p" 2> /dev/null > "$rd/per.mem"
	same=$("$T" counts --store "unix:$rd/sock" | cmp -s - "$rd/per.mem" && echo yes || echo NO)
	ms=$(awk '{ print $1 }' "$rd/per-$per" | median)
	mem=$(awk '{ print $2 }' "$rd/per-$per" | median)
	paste "$rd/per-$per" "$rd/per-none" > "$rd/pair"
	ratio=$(awk '{ print $1 / $3 }' "$rd/pair" | median)
	awk -v per="$per" -v ms="$ms" -v r="$ratio" -v mem="$mem" -v e="$empty" -v rows="$rows" -v kb="$keyb" -v same="$same" 'BEGIN {
		printf "store by %s: %.2f s (%.2f x the time of --period none, paired); %d distinct (occupation, language, key, period): server used_memory %.0f bytes per row, the counting keys (ids apart) %.0f; same table as memory by %s: %s\n",
			per, ms / 1000, r, rows, (mem - e) / rows, kb / rows, per, same }'
done
R flushall > /dev/null
rps=$(redis-benchmark -s "$rd/sock" -P 64 -t hset -n 2000000 -q 2> /dev/null | tr '\r' '\n' |
	sed -n 's/^HSET: \([0-9.]*\) requests per second.*/\1/p' | tail -1)
awk -v r="${rps:-0}" 'BEGIN { if (r > 0) printf "redis-benchmark -P 64 -t hset, same server: %.0f requests/s (%.2f us per HSET, the floor)\n", r, 1e6 / r }'

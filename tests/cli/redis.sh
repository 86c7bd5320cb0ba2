#!/bin/sh
# The Redis store against a real redis-server that this suite starts on
# a Unix socket in a temporary folder (and stops): a file loaded twice, a
# loader killed with SIGKILL mid-load, the server killed mid-load, ids
# republished across days, two loaders at once, passwords, and the table
# read back equal to the memory engine's.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
if ! command -v redis-server > /dev/null 2>&1; then
	echo "  SKIPPED: redis-server is not installed (CI installs it)"
	exit 0
fi
gen=$(dirname "$0")/../bench/gen_titles.py
start() { redis_start "$tmp/$1" $(shift; echo "$@"); }
stop() { redis_stop "$tmp/$1"; }
trap 'stop a; stop b; stop c; rm -rf "$tmp"' EXIT INT TERM
start a --appendonly no || exit 1
S=unix:$tmp/a/sock

/usr/bin/python3 "$gen" --postings --count 30000 --seed 11 > "$tmp/p.tsv"
$T tally "$tmp/p.tsv" > "$tmp/mem.tsv" 2>/dev/null

# the same file twice counts once; the store reads back as the memory table
$T tally --store "$S" "$tmp/p.tsv" 2> "$tmp/err1"; check load-status 0 $?
$T tally --store "$S" "$tmp/p.tsv" 2> "$tmp/err2"; check reload-status 0 $?
grep -q '0 chunks applied, 3 already in the store' "$tmp/err2"; check reload-skipped 0 $?
$T counts --store "$S" > "$tmp/r.tsv"; check read-status 0 $?
cmp -s "$tmp/r.tsv" "$tmp/mem.tsv"; check store-equals-memory 0 $?

# prefixes keep taxonomies apart
$T tally --store "$S" --prefix other "$tmp/p.tsv" 2>/dev/null
$T counts --store "$S" --prefix other | cmp -s - "$tmp/mem.tsv"; check prefix-other 0 $?
$T counts --store "$S" | cmp -s - "$tmp/mem.tsv"; check prefix-default 0 $?
redis-cli -s "$tmp/a/sock" flushall > /dev/null

# a loader killed with SIGKILL in the middle, then run again: exact
$T tally --store "$S" --chunk 100 "$tmp/p.tsv" 2>/dev/null &
pid=$!
sleep 0.4
kill -9 $pid 2>/dev/null; wait $pid 2>/dev/null
# (part of the postings are in: the ids claimed so far, over the 64 shards)
part=0
for s in $(seq -w 0 63); do
	part=$((part + $(redis-cli -s "$tmp/a/sock" hlen "titlemill:{i:$s}:i")))
done
[ "$part" -gt 0 ] && [ "$part" -lt 30000 ]; check killed-mid-load 0 $?
$T tally --store "$S" --chunk 100 "$tmp/p.tsv" 2>/dev/null; check rerun-status 0 $?
$T counts --store "$S" | cmp -s - "$tmp/mem.tsv"; check rerun-exact 0 $?
redis-cli -s "$tmp/a/sock" flushall > /dev/null

# the server killed mid-load: status 1 with the server named; restarted
# (its append-only file keeps what was applied), run again: exact
start b --appendonly yes --appendfsync always || exit 1
B=unix:$tmp/b/sock
$T tally --store "$B" --chunk 100 --retries 0 "$tmp/p.tsv" 2> "$tmp/err" &
pid=$!
sleep 0.4
kill -9 "$(cat "$tmp/b/pid")"
wait $pid; check server-lost-status 1 $?
grep -q "unix:$tmp/b/sock: lost the connection" "$tmp/err"; check server-lost-msg 0 $?
grep -q 'run the same load again' "$tmp/err"; check server-lost-advice 0 $?
rm -f "$tmp/b/sock"
start b --appendonly yes --appendfsync always || exit 1
$T tally --store "$B" --chunk 100 "$tmp/p.tsv" 2>/dev/null; check server-back-status 0 $?
$T counts --store "$B" | cmp -s - "$tmp/mem.tsv"; check server-back-exact 0 $?
stop b

# posting ids republished across two daily files are counted once
awk -F '\t' 'NR == 1 || NR % 2 == 0' "$tmp/p.tsv" > "$tmp/day1"
awk -F '\t' 'NR == 1 || NR % 2 == 1 || NR % 5 == 0' "$tmp/p.tsv" > "$tmp/day2"
$T tally "$tmp/day1" "$tmp/day2" > "$tmp/days.mem" 2>/dev/null
$T tally --store "$S" "$tmp/day1" 2>/dev/null
$T tally --store "$S" "$tmp/day2" 2>/dev/null
$T counts --store "$S" | cmp -s - "$tmp/days.mem"; check days-once 0 $?
redis-cli -s "$tmp/a/sock" flushall > /dev/null

# two loaders at once, on files that share ids: no lost or double count
$T tally --store "$S" --chunk 200 "$tmp/day1" 2>/dev/null &
p1=$!
$T tally --store "$S" --chunk 200 "$tmp/day2" 2>/dev/null &
p2=$!
wait $p1; s1=$?; wait $p2; s2=$?
check two-loaders-status "0 0" "$s1 $s2"
$T counts --store "$S" | awk -F '\t' '$1 != "example"' > "$tmp/two.r"
awk -F '\t' '$1 != "example"' "$tmp/days.mem" > "$tmp/two.m"
cmp -s "$tmp/two.r" "$tmp/two.m"; check two-loaders-exact 0 $?

# unreachable server, password required
$T tally --store "unix:$tmp/none.sock" "$tmp/p.tsv" 2> "$tmp/err"; check unreachable 1 $?
grep -q "unix:$tmp/none.sock: cannot connect" "$tmp/err"; check unreachable-msg 0 $?
$T tally --store "redis://127.0.0.1:x" "$tmp/p.tsv" 2> "$tmp/err"; check bad-url 1 $?
start c --requirepass s3cret || exit 1
C=unix:$tmp/c/sock
$T tally --store "$C" "$tmp/day1" 2> "$tmp/err"; check no-password 1 $?
grep -q 'requires a password' "$tmp/err"; check no-password-msg 0 $?
TITLEMILL_REDIS_PASSWORD=s3cret $T tally --store "$C" "$tmp/day1" 2>/dev/null; check password-env 0 $?
TITLEMILL_REDIS_PASSWORD=wrong $T tally --store "$C" "$tmp/day1" 2> "$tmp/err"; check wrong-password 1 $?
grep -qi 'WRONGPASS\|invalid password' "$tmp/err"; check wrong-password-msg 0 $?

# a time to live: every counting key a load touches gets it (examples,
# the only personal data, included); without --ttl the keys stay
TITLEMILL_REDIS_PASSWORD=s3cret $T tally --store "$C" --prefix ttl --ttl 30 "$tmp/day1" 2>/dev/null; check ttl-load 0 $?
bad=0 n=0
for k in $(redis-cli -s "$tmp/c/sock" -a s3cret --no-auth-warning --scan --pattern 'ttl:*'); do
	t=$(redis-cli -s "$tmp/c/sock" -a s3cret --no-auth-warning ttl "$k")
	n=$((n + 1))
	[ "$t" -gt 2591000 ] && [ "$t" -le 2592000 ] || bad=$((bad + 1))
done
[ "$n" -gt 3 ]; check ttl-keys 0 $?
check ttl-every-key-30-days 0 "$bad"
k=$(redis-cli -s "$tmp/c/sock" -a s3cret --no-auth-warning --scan --pattern 'titlemill:{o:*}:x' | head -1)
check no-ttl-stays -1 "$(redis-cli -s "$tmp/c/sock" -a s3cret --no-auth-warning ttl "$k")"
$T tally --store "$C" --ttl 0 "$tmp/day1" 2>/dev/null; check ttl-zero-usage 2 $?
finish

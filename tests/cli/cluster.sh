#!/bin/sh
# The Redis store on Redis Cluster: a throwaway cluster of three masters
# the suite starts itself (and one of three masters with a replica each
# for the failover).  The routing against the servers' own CLUSTER
# KEYSLOT; the same postings give the same counts table from one server,
# from the cluster and from memory; reloads, two loaders at once, a
# SIGKILL of the loader (and one between a chunk's claims and its last
# share, rerun on a changed file), slots moved by redis-cli --cluster
# reshard during a load, a master lost with and without a replica; the reading commands
# and the review queue on the cluster.  Skipped with a notice where
# redis-server is absent.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
root=$(cd "$(dirname "$0")/../.." && pwd)
if ! command -v redis-server > /dev/null || ! command -v redis-cli > /dev/null; then
	echo "  notice: redis-server not found; the cluster suite is skipped"
	exit 0
fi
trap 'cluster_stop "$tmp/c"; cluster_stop "$tmp/f"; redis_stop "$tmp/one"; [ -n "${KEEP:-}" ] || rm -rf "$tmp"' EXIT INT TERM
cluster_start "$tmp/c" 3 0 || exit 1
C=$CL_URL
P1=$(echo "$CL_PORTS" | cut -d' ' -f1)
gen=$root/tests/bench/gen_titles.py
labels=$root/examples/taxonomy.tsv

# 1. the slot of every key, as the server computes it (Redis Cluster
# specification: CRC16 XMODEM of the key or its hash tag, mod 16384)
/usr/bin/python3 - > "$tmp/keys" <<'PY'
import random
r = random.Random(3)
alpha = "abcdefghijklmnopqrstuvwxyz0123456789:{}_-é"
for i in range(3000):
    k = "".join(r.choice(alpha) for _ in range(r.randint(1, 30)))
    if i % 3 == 0:
        k = "titlemill:{o:occ:%d}:%s" % (r.randint(0, 9999), "fnxL"[i % 4])
        if i % 2 == 0 and i % 4 != 3:
            k += ":2026-%02d" % r.randint(1, 12)  # a period's key
    print(k)
PY
ts=$root/build/test_slot
[ -x "$ts" ] || ts=$root/build-asan/test_slot
[ -x "$ts" ] || { echo "  build/test_slot is missing: run make unit first"; exit 1; }
slots=$("$ts" --print < "$tmp/keys" | md5sum)
server=$(sed 's/^/CLUSTER KEYSLOT "/; s/$/"/' "$tmp/keys" | redis-cli -p "$P1" | md5sum)
check "our slots equal CLUSTER KEYSLOT on 3000 keys" "$server" "$slots"

# the backends' own suite (tests/unit/count/test_backend.c) against the
# cluster: the same assertions as for memory and one server
tb=$root/build/test_backend
[ -x "$tb" ] || tb=$root/build-asan/test_backend
[ -x "$tb" ] || { echo "  build/test_backend is missing: run make unit first"; exit 1; }
TITLEMILL_TEST_REDIS=$C "$tb" > "$tmp/tb.out" 2>&1; check "backend suite on the cluster" 0 $?
grep -q 'PASSED.*7 test' "$tmp/tb.out"; check "backend suite ran every test" 0 $?

# 2. one file: memory, one server and the cluster give the same table
/usr/bin/python3 "$gen" --postings --count 30000 --seed 11 > "$tmp/a.tsv"
/usr/bin/python3 "$gen" --postings --count 20000 --seed 12 > "$tmp/b.tsv"
"$T" tally "$tmp/a.tsv" > "$tmp/mem.a" 2> /dev/null
"$T" tally "$tmp/a.tsv" "$tmp/b.tsv" > "$tmp/mem.ab" 2> /dev/null
redis_start "$tmp/one" || exit 1
"$T" tally --store "unix:$tmp/one/sock" "$tmp/a.tsv" 2> /dev/null
"$T" counts --store "unix:$tmp/one/sock" > "$tmp/one.a"
"$T" tally --store "$C" "$tmp/a.tsv" 2> "$tmp/e"
check "tally into the cluster" 0 $?
"$T" counts --store "$C" > "$tmp/cl.a"
cmp -s "$tmp/cl.a" "$tmp/one.a" || check "cluster = one server" same differ
cmp -s "$tmp/cl.a" "$tmp/mem.a" || check "cluster = memory" same differ
n=0
for p in $CL_PORTS; do
	k=$(redis-cli -p "$p" dbsize)
	[ "$k" -gt 0 ] && n=$((n + 1))
done
check "every master holds a share" 3 "$n"
# the same load with one and two cleaning threads, in chunks of 1,000
# (many, two in flight at a time) and of 100,000: the memory's bytes
for th in 1 2; do
	for chunk in 1000 100000; do
		for p in $CL_PORTS; do redis-cli -p "$p" flushall > /dev/null; done
		"$T" tally --store "$C" --threads "$th" --chunk "$chunk" "$tmp/a.tsv" 2> /dev/null
		check "load into the cluster [--threads $th --chunk $chunk]" 0 $?
		"$T" counts --store "$C" | cmp -s - "$tmp/mem.a"
		check "cluster = memory [--threads $th --chunk $chunk]" 0 $?
	done
done
# by day: every day's hashes under their occupation's tag, as memory by
# day, also after a loader killed half way through a chunk's shares
"$T" tally --period day "$tmp/a.tsv" > "$tmp/mem.day" 2> /dev/null
"$T" tally --store "$C" --prefix byday --period day "$tmp/a.tsv" 2> /dev/null
check "tally by day into the cluster" 0 $?
"$T" counts --store "$C" --prefix byday | cmp -s - "$tmp/mem.day" || check "cluster by day = memory by day" same differ
TITLEMILL_TEST_KILL=apply:7 "$T" tally --store "$C" --prefix bydayk --period day --chunk 500 "$tmp/a.tsv" 2> /dev/null
check "killed by day" 137 $?
"$T" tally --store "$C" --prefix bydayk --period day --chunk 500 "$tmp/a.tsv" 2> /dev/null
"$T" counts --store "$C" --prefix bydayk | cmp -s - "$tmp/mem.day" || check "killed by day, rerun: exact" same differ
# any node is a seed, and several seeds are fine
"$T" counts --store "redis://127.0.0.1:$(echo "$CL_PORTS" | cut -d' ' -f3),127.0.0.1:$P1" | cmp -s - "$tmp/mem.a" ||
	check "another seed reads the same" same differ
"$T" tally --store "$C" "$tmp/a.tsv" 2> "$tmp/e"
grep -q "0 chunks applied, 1 already in the store" "$tmp/e" || check "a reload counts nothing" "0 chunks applied" "$(cat "$tmp/e")"
"$T" counts --store "$C" | cmp -s - "$tmp/mem.a" || check "reload: still exact" same differ

# 3. two loaders at once, one of them the same file again: a and b once
"$T" tally --store "$C" --chunk 500 "$tmp/b.tsv" 2> /dev/null &
p1=$!
"$T" tally --store "$C" --chunk 500 "$tmp/a.tsv" "$tmp/b.tsv" 2> /dev/null &
p2=$!
wait $p1; r1=$?
wait $p2; r2=$?
check "two loaders: both done" "0 0" "$r1 $r2"
"$T" counts --store "$C" | cmp -s - "$tmp/mem.ab" || check "two loaders at once: exact" same differ

# the reading commands give the same bytes as from one server
"$T" tally --store "unix:$tmp/one/sock" "$tmp/b.tsv" 2> /dev/null
for cmd in coverage propose; do
	"$T" $cmd --labels "$labels" --store "$C" > "$tmp/cl.$cmd" 2> /dev/null
	"$T" $cmd --labels "$labels" --store "unix:$tmp/one/sock" > "$tmp/one.$cmd" 2> /dev/null
	[ -s "$tmp/cl.$cmd" ] && cmp -s "$tmp/cl.$cmd" "$tmp/one.$cmd" || check "$cmd: cluster = one server" same differ
done

# the review queue on the cluster: the same as in a queue file
"$T" propose --labels "$labels" "$tmp/mem.ab" > "$tmp/sugg" 2> /dev/null
id=$(head -1 "$tmp/sugg" | cut -c8-23)
for w in "--store $C" "--queue $tmp/q.jsonl"; do
	# shellcheck disable=SC2086
	TITLEMILL_NOW=2026-12-01T09:00:00Z "$T" review add $w "$tmp/sugg" 2> /dev/null &&
		TITLEMILL_NOW=2026-12-01T10:00:00Z "$T" review accept $w --reviewer ana "$id" 2> /dev/null &&
		"$T" review list $w --status all --json > "$tmp/rq.$(echo "$w" | cut -c3-7)"
done
[ -s "$tmp/rq.store" ] && cmp -s "$tmp/rq.store" "$tmp/rq.queue" || check "review: cluster = queue file" same differ

# 4. the loader killed mid-load, then run again: exact
for p in $CL_PORTS; do redis-cli -p "$p" flushall > /dev/null; done
/usr/bin/python3 "$gen" --postings --count 60000 --seed 13 > "$tmp/big.tsv"
"$T" tally "$tmp/big.tsv" > "$tmp/mem.big" 2> /dev/null
"$T" tally --store "$C" --chunk 100 "$tmp/big.tsv" 2> /dev/null &
pid=$!
sleep 1
kill -9 $pid 2> /dev/null
wait $pid 2> /dev/null
"$T" counts --store "$C" 2> /dev/null | cmp -s - "$tmp/mem.big" && check "the kill came mid-load" partial complete
"$T" tally --store "$C" --chunk 100 "$tmp/big.tsv" 2> /dev/null
check "rerun after SIGKILL" 0 $?
"$T" counts --store "$C" | cmp -s - "$tmp/mem.big" || check "SIGKILL, rerun: exact" same differ

# 4b. killed between a chunk's claims and its last share, then run again
# on a changed file (every digest changes): the cut-off chunk is
# finished from its journal, nothing lost, nothing twice
{ head -1 "$tmp/a.tsv"
  printf '99999901\t2026-03-09\tde\tocc:2512\tLagerist bei Valdoria Logistik GmbH\n'
  tail -n +2 "$tmp/a.tsv"; } > "$tmp/a2.tsv"
"$T" tally "$tmp/a2.tsv" > "$tmp/mem.a2" 2> /dev/null
for stage in claim apply; do
	for p in $CL_PORTS; do redis-cli -p "$p" flushall > /dev/null; done
	TITLEMILL_TEST_KILL=$stage:7 "$T" tally --store "$C" --chunk 500 "$tmp/a.tsv" 2> /dev/null
	check "killed at $stage" 137 $?
	"$T" tally --store "$C" --chunk 500 "$tmp/a2.tsv" 2> "$tmp/e"
	check "changed rerun after a kill at $stage" 0 $?
	grep -q 'the store held 1 chunk that a load had begun' "$tmp/e" || check "says a chunk was finished ($stage)" said "$(cat "$tmp/e")"
	"$T" counts --store "$C" | cmp -s - "$tmp/mem.a2" || check "killed at $stage, changed rerun: exact" same differ
done

# 5. slots moved back and forth by redis-cli --cluster reshard during a load
for p in $CL_PORTS; do redis-cli -p "$p" flushall > /dev/null; done
id2=$(redis-cli -p "$(echo "$CL_PORTS" | cut -d' ' -f2)" cluster myid)
id3=$(redis-cli -p "$(echo "$CL_PORTS" | cut -d' ' -f3)" cluster myid)
"$T" tally --store "$C" --chunk 100 "$tmp/big.tsv" 2> "$tmp/e" &
pid=$!
moves=0
sleep 0.3
while kill -0 $pid 2> /dev/null && [ $moves -lt 6 ]; do
	redis-cli --cluster reshard "127.0.0.1:$P1" --cluster-from "$id2" --cluster-to "$id3" \
		--cluster-slots 300 --cluster-yes > /dev/null 2>&1 &&
		redis-cli --cluster reshard "127.0.0.1:$P1" --cluster-from "$id3" --cluster-to "$id2" \
			--cluster-slots 300 --cluster-yes > /dev/null 2>&1 && moves=$((moves + 2))
done
wait $pid
check "load during resharding" 0 $?
[ $moves -ge 2 ] || check "slots moved during the load" ">= 2 reshards" "$moves"
"$T" counts --store "$C" | cmp -s - "$tmp/mem.big" || check "resharded during the load: exact ($moves reshards)" same differ

# 6. a master lost with no replica: a clear stop naming slots and node;
# the node back, the rerun completes exactly
for p in $CL_PORTS; do redis-cli -p "$p" flushall > /dev/null; done
P2=$(echo "$CL_PORTS" | cut -d' ' -f2)
"$T" tally --store "$C" --chunk 100 --retries 2 "$tmp/big.tsv" 2> "$tmp/e" &
pid=$!
sleep 1
kill -9 "$(cat "$tmp/c/$P2/pid")"
wait $pid
check "a master lost without replica: exit 1" 1 $?
grep -q "127.0.0.1:$P2: slots [0-9]*-[0-9]*: " "$tmp/e" || check "names the node and the slots" "127.0.0.1:$P2: slots" "$(cat "$tmp/e")"
grep -q "run the same load again" "$tmp/e" || check "says to run again" "run the same load again" "$(cat "$tmp/e")"
node_start "$tmp/c" "$P2"
for i in $(seq 100); do
	redis-cli -p "$P1" cluster info 2> /dev/null | grep -q 'cluster_state:ok' && break
	sleep 0.1
done
"$T" tally --store "$C" --chunk 100 "$tmp/big.tsv" 2> /dev/null
check "rerun once the node is back" 0 $?
"$T" counts --store "$C" | cmp -s - "$tmp/mem.big" || check "node lost, back, rerun: exact" same differ
cluster_stop "$tmp/c"

# 7. a master lost with a replica: the load waits for the failover
cluster_start "$tmp/f" 3 1 || exit 1
F=$CL_URL
m=$(redis-cli -p "$(echo "$CL_PORTS" | cut -d' ' -f1)" cluster nodes | awk '$3 ~ /master/ && $3 !~ /myself/ { split($2, a, "[:@]"); print a[2]; exit }')
"$T" tally --store "$F" --chunk 100 "$tmp/big.tsv" 2> "$tmp/e" &
pid=$!
sleep 1
kill -9 "$(cat "$tmp/f/$m/pid")"
wait $pid
check "a master lost with a replica: the load completes" 0 $?
"$T" counts --store "$F" | cmp -s - "$tmp/mem.big" || check "failover during the load: exact" same differ
promoted=$(redis-cli -p "$(echo "$CL_PORTS" | cut -d' ' -f1)" cluster nodes | grep -c 'master,fail\|fail,master')
check "the killed master is marked failed" 1 "$promoted"

finish

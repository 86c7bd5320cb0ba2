#!/bin/sh
# make bench, the review queue: a queue of N suggestions (generated from
# the shape of propose's output, deterministic) on a queue file and on a
# Redis store started here; add, one decision, a batch of 1,000, list
# and export, against cp of the queue file (a change rewrites the file,
# so cp is its floor).  Wall time and peak memory (GNU time).
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
N=${BENCH_QUEUE:-100000}
mkdir -p "$out"
s=$out/review-sugg-$N.jsonl
[ -s "$s" ] || /usr/bin/python3 - "$N" > "$s" <<'PY'
import json, random, sys
n = int(sys.argv[1])
rnd = random.Random(4)
kinds = ["new_alt_label"] * 8 + ["new_hidden_label", "rare_label"]
for i in range(n):
    k = rnd.choice(kinds)
    p = rnd.randint(5, 900)
    o = rnd.randint(50, 9000) + p
    print(json.dumps({"id": "%016x" % (0x5eed0000 + i), "kind": k, "occupation": "occ:%04d" % rnd.randint(0, 2999),
        "lang": rnd.choice(["de", "en", "fr", "pl", "es"]), "label": "title %d" % i, "key": "title %d" % i,
        "score": round(p * 3.7, 4), "postings": p, "occupation_postings": o, "key_postings": p,
        "lang_postings": 900000, "share": round(p / o, 4), "share_low": 0.01, "share_high": 0.2,
        "precision": 1.0, "g2": round(p * 3.7, 4), "competitor": None,
        "examples": ["Title %d (m/w/d) - Vollzeit" % i, "Senior Title %d" % i]}, ensure_ascii=False))
PY
timed() { # timed LABEL CMD...: prints LABEL, seconds and peak KiB
	label=$1; shift
	/usr/bin/time -f '%e %M' -o "$out/review.time" "$@" > /dev/null 2> "$out/review.err" || { cat "$out/review.err"; exit 1; }
	read -r sec kib < "$out/review.time"
	echo "$label: $sec s, peak $kib KiB"
}
ids() { sed -n "$1p" "$s" | cut -d '"' -f4; }
batch=$out/review-batch.tsv
{ printf 'id\tdecision\treviewer\n'; cut -d '"' -f4 "$s" | awk 'NR % 97 == 0 && n < 1000 { n++; print $0 "\taccept\tbench" }'; } > "$batch"
q=$out/review-queue.jsonl
rm -f "$q" "$q.lock"
export TITLEMILL_NOW=2026-12-01T09:00:00Z
timed "review add, $N suggestions into an empty queue file" "$T" review add --queue "$q" "$s"
bytes=$(wc -c < "$q")
t0=$(date +%s%N); cp "$q" "$out/review-copy"; t1=$(date +%s%N)
cp_s=$(awk -v a="$t0" -v z="$t1" 'BEGIN { printf "%.3f", (z - a) / 1e9 }')
echo "  queue file: $bytes bytes; cp of it: $cp_s s"
timed "review add, the same $N again (evidence unchanged)" "$T" review add --queue "$q" "$s"
timed "review accept, one id" "$T" review accept --queue "$q" --reviewer bench "$(ids 5)"
timed "review decide, a batch of 1000" "$T" review decide --queue "$q" "$batch"
timed "review list, all $N" "$T" review list --queue "$q" --status all
timed "review export" "$T" review export --queue "$q"
timed "review stats" "$T" review stats --queue "$q"
if command -v redis-server > /dev/null; then
	rd=$(mktemp -d)
	redis-server --port 0 --unixsocket "$rd/sock" --save "" --daemonize yes --pidfile "$rd/pid" > /dev/null
	sleep 0.5
	S="--store unix:$rd/sock"
	timed "store: review add, $N suggestions" "$T" review add $S "$s"
	timed "store: review accept, one id" "$T" review accept $S --reviewer bench "$(ids 5)"
	timed "store: review decide, a batch of 1000" "$T" review decide $S "$batch"
	timed "store: review list, all $N" "$T" review list $S --status all
	echo "  store used_memory: $(redis-cli -s "$rd/sock" info memory | awk -F: '/^used_memory:/ { print $2 }' | tr -d '\r') bytes"
	kill "$(cat "$rd/pid")"
	rm -rf "$rd"
fi

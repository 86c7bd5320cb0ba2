#!/bin/sh
# The examples a Redis store keeps for a title, merged load after load by
# the apply script (store_redis_apply.c), against the memory engine's
# choice (tally_mem.c: the three distinct texts of smallest hash): a load
# whose candidates all sort after the three stored (the script's
# shortcut: the stored value cannot change), loads with a candidate
# before the third, before the first and between them, and stored values
# the shortcut must not trust (out of order, a text twice).
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
if ! command -v redis-server > /dev/null 2>&1; then
	echo "  SKIPPED: redis-server is not installed (CI installs it)"
	exit 0
fi
trap 'redis_stop "$tmp/a"; rm -rf "$tmp"' EXIT INT TERM
redis_start "$tmp/a" --appendonly no || exit 1
S=unix:$tmp/a/sock
R() { redis-cli -s "$tmp/a/sock" "$@"; }

# 40 raw titles of one (occupation, language, key), each line its example
# as the store writes it (16 hex digits of the example hash, then the
# text), in the store's order: by hash.  The hash is the engines'
# (dg_fnv of core/digest.c: 64-bit FNV-1a, then h ^ h >> 29), written out
# again here; the first check below holds it to what the engine keeps.
/usr/bin/python3 - > "$tmp/ranked" << 'EOF'
def h(s):
    x = 0xCBF29CE484222325
    for b in s.encode():
        x = ((x ^ b) * 0x100000001B3) & (2 ** 64 - 1)
    return x ^ (x >> 29)
ts = ['Verkäufer (m/w/d) Ref. %d' % i for i in range(100, 140)]
for t in sorted(ts, key=lambda t: (h(t), t.encode())):
    print('%016x%s' % (h(t), t))
EOF
check ranked-titles 40 "$(wc -l < "$tmp/ranked")"
# post FILE RANK...: a postings file of those titles (ids of their own)
files=0
post() {
	f=$1; shift
	files=$((files + 1))
	printf 'id\tlang\toccupations\ttitle\n' > "$tmp/p-$f"
	for k in "$@"; do
		sed -n "${k}p" "$tmp/ranked" | awk -v k="$k" -v n="$files" -F '\t' '{ printf "%d\tde\tocc:1\t%s\n", 100 * n + k, substr($0, 17) }'
	done >> "$tmp/p-$f"
}
# val RANK...: the stored value of those examples, in that order
val() {
	for k in "$@"; do sed -n "${k}p" "$tmp/ranked"; done | awk '{ printf "%s%s", (NR > 1 ? "\036" : ""), $0 }'
}
X='titlemill:{o:occ:1}:x'
F=$(printf 'de\037verkaufer')
# load NAME FILE...: FILE loaded into the store by one tally; the store
# then reads back as the memory engine's table of all the files so far
loaded=
load() {
	name=$1; shift
	$T tally --store "$S" "$tmp/p-$1" 2> "$tmp/err"; check "$name-load" 0 $?
	loaded="$loaded $tmp/p-$1"
	# shellcheck disable=SC2086
	$T tally $loaded > "$tmp/mem" 2> /dev/null
	$T counts --store "$S" | cmp -s - "$tmp/mem"; check "$name-as-memory" 0 $?
}

# the memory engine keeps the three smallest of the hashes above
post all $(seq 40)
$T tally "$tmp/p-all" 2> /dev/null | awk -F '\t' '$1 == "example" { print $5 }' | sort > "$tmp/got"
sed -n '1,3p' "$tmp/ranked" | cut -c17- | sort | cmp -s - "$tmp/got"; check memory-keeps-smallest-hashes 0 $?

post a 5 7 9
load first a
check first-stored "$(val 5 7 9)" "$(R hget "$X" "$F")"
# every candidate after the three stored: the value stays as it is
post b $(seq 10 20)
load after-all b
check after-all-stored "$(val 5 7 9)" "$(R hget "$X" "$F")"
# one candidate after the first two and before the third: it takes the
# third's place
post c 8
load before-third c
check before-third-stored "$(val 5 7 8)" "$(R hget "$X" "$F")"
# one before all three (and one after all): it comes first
post d 30 1
load before-all d
check before-all-stored "$(val 1 5 7)" "$(R hget "$X" "$F")"
# one between the first and the second
post e 3 25 26
load between e
check between-stored "$(val 1 3 5)" "$(R hget "$X" "$F")"

# a stored value the merge did not write: three examples out of order,
# or a text twice, are sorted and made distinct even when every candidate
# comes after them
R hset "$X" "$F" "$(val 9 3 6)" > /dev/null
post f 31 32
$T tally --store "$S" "$tmp/p-f" 2> /dev/null; check unsorted-load 0 $?
check unsorted-stored-sorted "$(val 3 6 9)" "$(R hget "$X" "$F")"
R hset "$X" "$F" "$(val 3 6 6)" > /dev/null
post g 33
$T tally --store "$S" "$tmp/p-g" 2> /dev/null; check twice-load 0 $?
check twice-stored-distinct "$(val 3 6 33)" "$(R hget "$X" "$F")"

# one candidate put among one, two or three stored examples: before,
# between, after, or the same text again (STORED CANDIDATE WANT)
n=0
while read -r stored cand want; do
	n=$((n + 1))
	# shellcheck disable=SC2086
	R hset "$X" "$F" "$(val $(echo "$stored" | tr , ' '))" > /dev/null
	post "one$n" "$cand"
	$T tally --store "$S" "$tmp/p-one$n" 2> /dev/null; check "one-$stored+$cand-load" 0 $?
	# shellcheck disable=SC2086
	check "one-$stored+$cand" "$(val $(echo "$want" | tr , ' '))" "$(R hget "$X" "$F")"
done << 'EOF'
5 3 3,5
5 7 5,7
5 5 5
5,7 3 3,5,7
5,7 6 5,6,7
5,7 9 5,7,9
5,7 7 5,7
5,7 5 5,7
5,7,9 3 3,5,7
5,7,9 6 5,6,7
5,7,9 8 5,7,8
5,7,9 10 5,7,9
5,7,9 9 5,7,9
5,7,9 5 5,7,9
7,5 9 5,7,9
5,9,7 8 5,7,8
EOF
check one-cases 16 "$n"
finish

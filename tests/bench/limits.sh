#!/bin/sh
# Resource limits of titlemill norm on hostile shapes of input, measured
# (not pass/fail, not run in CI): wall time and peak memory
# (/usr/bin/time -f '%e %M') at two sizes of each shape, and the ratio
# of the times above start-up, which is the ratio of the sizes when the
# cost is linear.
#   sh tests/bench/limits.sh [BINARY]
# Shapes: one line of 1 GiB (and 256 MiB); 10^7 empty lines (and 10^6);
# and titles of N slashes, N opening brackets, N nested brackets,
# "(m/w/d) " x N, "a/" x N, "ab sofort " x N, "Senior " x N and
# "Koch (m/w/d) in Berlin - " x N/4, for N = 10,000 and 100,000 (every
# line under the 1 MiB cut), as files of the same size.
# --memo 0, so that repeated lines are cleaned every time.  Needs about
# 1.3 GB in TMPDIR.
set -eu
T=${1:-$(cd "$(dirname "$0")/../.." && pwd)/titlemill}
tmp=$(mktemp -d "${TMPDIR:-/tmp}/tm-limits-XXXXXX")
trap 'rm -rf "$tmp"' EXIT INT TERM

# measure FILE: prints "seconds peak-KiB"
measure() {
	/usr/bin/time -f '%e %M' -o "$tmp/time" "$T" norm --memo 0 "$1" > /dev/null 2> /dev/null
	cat "$tmp/time"
}
: > "$tmp/empty"
base=$(measure "$tmp/empty" | cut -d' ' -f1)
printf '%-34s %12s %9s %10s\n' shape size seconds 'peak KiB'
printf '%-34s %12s %9s %10s\n' 'start-up (empty input)' 0 $(measure "$tmp/empty")

# row NAME SIZE1 FILE1 SIZE2 FILE2: both sizes and the ratio of the times
# above start-up (the sizes' ratio when linear)
row() {
	m1=$(measure "$3") m2=$(measure "$5")
	printf '%-34s %12s %9s %10s\n' "$1" "$2" $m1
	printf '%-34s %12s %9s %10s\n' "" "$4" $m2
	t1=${m1%% *} t2=${m2%% *}
	awk -v a="$t1" -v b="$t2" -v z="$base" -v s1="$2" -v s2="$4" 'BEGIN {
		d1 = a - z; d2 = b - z; if (d1 < 0.01) d1 = 0.01
		printf "%-34s size x%.0f, time above start-up x%.1f\n", "", s2 / s1, d2 / d1 }'
}

# one line of 1 GiB and of 256 MiB (norm keeps the first MiB, reads the rest)
head -c 268435456 /dev/zero | tr '\0' 'a' > "$tmp/line256"
echo >> "$tmp/line256"
head -c 1073741824 /dev/zero | tr '\0' 'a' > "$tmp/line1g"
echo >> "$tmp/line1g"
row 'one line of 256 MiB / 1 GiB' 268435456 "$tmp/line256" 1073741824 "$tmp/line1g"
rm -f "$tmp/line256" "$tmp/line1g"

# 10^6 and 10^7 empty lines
head -c 1000000 /dev/zero | tr '\0' '\n' > "$tmp/e6"
head -c 10000000 /dev/zero | tr '\0' '\n' > "$tmp/e7"
row 'empty lines' 1000000 "$tmp/e6" 10000000 "$tmp/e7"
rm -f "$tmp/e6" "$tmp/e7"

# shape NAME PYTHON-EXPR-OF-n: the title at n = 10,000 (200 lines) and at
# n = 100,000 (20 lines): the same bytes, so that a linear cost takes the
# same time for both and ten times as long per title
shape() {
	for n in 10000 100000; do
		/usr/bin/python3 -c "import sys
n = $n
line = ($2) + '\n'
sys.stdout.write(line * (2000000 // n))" > "$tmp/s$n"
	done
	m1=$(measure "$tmp/s10000") m2=$(measure "$tmp/s100000")
	printf '%-34s %12s %9s %10s\n' "$1" "10000 x 200" $m1
	printf '%-34s %12s %9s %10s\n' "" "100000 x 20" $m2
	awk -v a="${m1%% *}" -v b="${m2%% *}" -v z="$base" 'BEGIN {
		d1 = a - z; d2 = b - z; if (d1 < 0.01) d1 = 0.01
		printf "%-34s title x10, time per title above start-up x%.1f\n", "", 10 * d2 / d1 }'
}
shape 'slashes' "'/' * n"
shape 'opening brackets' "'(' * n"
shape 'nested brackets' "'[' * (n // 2) + 'Koch' + ']' * (n // 2)"
shape '"(m/w/d) " x N' "'(m/w/d) ' * n + 'Koch'"
shape '"a/" x N' "'a/' * n + 'Koch'"
shape '"ab sofort " x N' "'ab sofort ' * n + 'Koch'"
shape '"Senior " x N' "'Senior ' * n + 'Koch'"
shape '"Koch (m/w/d) in Berlin - " x N' "'Koch (m/w/d) in Berlin - ' * (n // 4)"

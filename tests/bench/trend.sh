#!/bin/sh
# make bench, time: tally by period against tally without periods on the
# same 1,000,000 postings (tests/bench/gen_titles.py --postings, seed 1:
# the 31 days of March 2026), with the bytes each distinct row takes; then
# titlemill trend over a year of daily counts (generated here,
# deterministic: 365 days x 300 occupations x 10 titles, about 1.1 M
# distinct rows worth 10 M postings) against counts --period none over
# the same table (reading it and writing it summed) as the baseline.
#
#   tests/bench/trend.sh TITLEMILL        BENCH_RUNS=N runs each (default 3; medians)
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
runs=${BENCH_RUNS:-3}
export TITLEMILL_LEXDIR=${TITLEMILL_LEXDIR:-$here/../../lexicons}
mkdir -p "$out"
p=$out/postings-1000000.tsv
if [ ! -s "$p" ]; then
	/usr/bin/python3 "$here/gen_titles.py" --postings --count 1000000 --seed 1 > "$p.tmp"
	mv "$p.tmp" "$p"
fi

# median wall seconds and median peak KiB of RUNS runs of a command
timed() {
	for i in $(seq "$runs"); do
		/usr/bin/time -f '%e %M' -o "$out/trend.time" "$@" > /dev/null 2>&1
		cat "$out/trend.time"
	done | sort -n | awk '{ s[NR] = $1; m[NR] = $2 } END { printf "%s %s\n", s[int((NR + 1) / 2)], m[int((NR + 1) / 2)] }'
}

set -- "$T"
for period in none month week day; do
	r=$(timed "$T" tally --threads 2 --period $period -o /dev/null "$p")
	bpr=$("$T" tally --threads 2 --period $period --stats -o /dev/null "$p" 2>&1 |
		sed -n 's/.*, \([0-9.]*\) bytes per distinct.*/\1/p')
	rows=$("$T" tally --threads 2 --period $period --stats -o /dev/null "$p" 2>&1 |
		sed -n 's/.*tally: \([0-9]*\) distinct (occupation, language, key.*/\1/p')
	echo "$period $r $bpr $rows"
done > "$out/trend.tally"
awk 'NR == 1 { base = $2 } {
	printf "tally --period %-5s 1000000 postings: %.2f s (%.0f postings/s), %.2fx --period none; peak %d KiB; %d distinct rows, %.1f bytes per row beyond strings\n",
		$1, $2, ($2 > 0 ? 1000000 / $2 : 0), ($2 > 0 && base > 0 ? $2 / base : 0), $3, $5, $4 }' "$out/trend.tally"

y=$out/trend-year.counts
[ -s "$y" ] || awk 'BEGIN {
	print "kind\toccupation\tlang\tkey\ttext\tpostings\tperiod"
	split("31 28 31 30 31 30 31 31 30 31 30 31", md, " ")
	m = 1; d = 1
	for (day = 0; day < 365; day++) {
		per = sprintf("2025-%02d-%02d", m, d)
		for (o = 0; o < 300; o++) {
			tot = 0
			for (k = 0; k < 10; k++) {
				# a steady share, a title that grows through the year,
				# and a title that fades
				c = 2 + (o * 31 + k * 17 + day * 7) % 19
				if (k == 8) c = int(day / 30)
				if (k == 9) c = int((365 - day) / 30)
				if (c == 0) continue
				t = sprintf("title %d of %d", k, o)
				printf "form\tocc:%04d\tde\t%s\t%s\t%d\t%s\n", o, t, t, c, per
				printf "key\t\tde\t%s\t\t%d\t%s\n", t, c, per
				tot += c
			}
			printf "occupation\tocc:%04d\tde\t\t\t%d\t%s\n", o, tot, per
		}
		if (++d > md[m]) { d = 1; m++ }
	}
}' > "$y"
awk -F '\t' 'NR == 1 { next } $1 == "form" { rows++ } $1 == "occupation" { posts += $6 }
	END { printf "%d %d\n", rows, posts }' "$y" > "$out/trend.size"
read -r rows posts < "$out/trend.size"
printf 'occupation\tkind\tlang\tlabel\n' > "$out/trend-labels.tsv"
awk 'BEGIN { for (o = 0; o < 300; o++) printf "occ:%04d\tpref\tde\ttitle 0 of %d\n", o, o }' >> "$out/trend-labels.tsv"
b=$(timed "$T" counts --period none "$y")
t=$(timed "$T" trend --labels "$out/trend-labels.tsv" --before 2025-01..2025-06 --after 2025-07..2025-12 "$y")
echo "$b $t" | awk -v rows="$rows" -v posts="$posts" '{
	printf "trend over a year of daily counts (%d distinct rows, %d postings): %.2f s, peak %d KiB (%.0f bytes per row); counts --period none on the same table %.2f s, peak %d KiB (trend/counts %.2fx)\n",
		rows, posts, $3, $4, $4 * 1024 / rows, $1, $2, ($1 > 0 ? $3 / $1 : 0) }'

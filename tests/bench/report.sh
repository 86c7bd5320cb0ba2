#!/bin/sh
# make bench, the report: titlemill report over a counts table of 3,000
# occupations (300,000 distinct rows, 30,000 labels; generated here,
# deterministic), every occupation given a section, against coverage on
# the same table as the baseline: wall time, peak memory (GNU time) and
# the page's size (aims: under 2 s and under 10 MB), with the default
# ten sections and with a section for every occupation; and the cost of
# the section on occupations named alike (the default against
# --overlap-top 0, which leaves it out).
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${BENCH_DIR:-$here/../../build/bench}
mkdir -p "$out"
c=$out/report-counts.tsv
labels=$out/report-labels.tsv
awk 'function w(x,   s, j) { s = ""; for (j = 0; j < 4; j++) { s = s sprintf("%c", 97 + x % 26); x = int(x / 26) } return s }
	BEGIN { print "occupation\tkind\tlang\tlabel"
	for (o = 0; o < 3000; o++) for (l = 0; l < 10; l++)
		printf "occ:%04d\t%s\tde\ttitle %s %s\n", o, l ? "alt" : "pref", w(l * 11), w(o) }' > "$labels"
[ -s "$c" ] || awk 'function w(x,   s, j) { s = ""; for (j = 0; j < 4; j++) { s = s sprintf("%c", 97 + x % 26); x = int(x / 26) } return s }
	BEGIN {
		print "kind\toccupation\tlang\tkey\ttext\tpostings"
		for (r = 0; r < 300000; r++) {
			o = r % 3000; c = 1 + (r * 7919) % 97; k = "title " w(int(r / 3000) * 11 % 1000) " " w(o)
			printf "form\tocc:%04d\tde\t%s\t%s\t%d\n", o, k, k, c
			tot[o] += c
			printf "key\t\tde\t%s\t\t%d\n", k, c
		}
		for (o = 0; o < 3000; o++) printf "occupation\tocc:%04d\tde\t\t\t%d\n", o, tot[o]
	}' > "$c"
/usr/bin/time -f '%e %M' -o "$out/report.time" "$T" coverage --labels "$labels" "$c" > /dev/null 2>&1
read -r cs ckib < "$out/report.time"
for secs in 10 3000; do
	/usr/bin/time -f '%e %M' -o "$out/report.time" "$T" report --labels "$labels" --sections $secs \
		--min-postings 1 -o "$out/report.html" "$c" 2>/dev/null
	read -r rs rkib < "$out/report.time"
	[ "$secs" = 10 ] && rs10=$rs && rkib10=$rkib
	size=$(wc -c < "$out/report.html")
	awk -v cs="$cs" -v rs="$rs" -v rk="$rkib" -v sz="$size" -v n="$secs" 'BEGIN {
		printf "report of 3000 occupations (300000 rows, 30000 labels), %d sections: %.2f s, peak %d KiB, page %.1f MB; coverage on the same table %.2f s (report/coverage %.2fx)\n", n, rs, rk, sz / 1e6, cs, (cs > 0 ? rs / cs : 0) }'
done
/usr/bin/time -f '%e %M' -o "$out/report.time" "$T" report --labels "$labels" --overlap-top 0 \
	--min-postings 1 -o "$out/report.html" "$c" 2>/dev/null
read -r ns nkib < "$out/report.time"
awk -v rs="$rs10" -v rk="$rkib10" -v ns="$ns" -v nk="$nkib" 'BEGIN {
	printf "report, 10 sections, without the overlap section: %.2f s, peak %d KiB; with it %.2f s, peak %d KiB (%.2fx time, %.2fx memory)\n", ns, nk, rs, rk, (ns > 0 ? rs / ns : 0), (nk > 0 ? rk / nk : 0) }'

#!/bin/sh
# titlemill report: the page parses as well-nested HTML with nothing that
# reaches the network (tests/cli/check_html.py, Python's html.parser);
# its numbers are those of coverage, propose and overlap on the same
# inputs (the overlap rows on generated postings with planted pairs and
# a misfiled occupation, tests/cli/gen_overlap.py); the
# same inputs give the same bytes; hostile labels and titles are escaped
# (no element they bring survives); and, when Debian's chromium is
# installed (.ci/run installs it), a real browser renders it headless to
# a PNG and a PDF with no console error and the network disabled.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")" && pwd)
chk="/usr/bin/python3 $here/check_html.py"
gen=$here/../bench/gen_titles.py
vocab=$here/../bench/vocab.tsv

/usr/bin/python3 "$gen" --postings --count 6000 --seed 44 > "$tmp/p.tsv"
awk -F '\t' 'NR == 1 { print "occupation\tkind\tlang\tlabel"; next }
	NR % 7 == 0 { next }
	{ k = (($1, $2) in s) ? "alt" : "pref"; s[$1, $2] = 1; print $1 "\t" k "\t" $2 "\t" $3 }' \
	"$vocab" > "$tmp/labels.tsv"
$T tally --labels "$tmp/labels.tsv" -o "$tmp/c.tsv" "$tmp/p.tsv" 2>/dev/null
check tally 0 $?

$T report --labels "$tmp/labels.tsv" --min-postings 20 -o "$tmp/r.html" "$tmp/c.tsv" 2> "$tmp/err"
check status 0 $?
check quiet "" "$(cat "$tmp/err")"
check structure ok "$($chk "$tmp/r.html")"
# the same inputs, the same bytes; a stamp only when asked
$T report --labels "$tmp/labels.tsv" --min-postings 20 -o "$tmp/r2.html" "$tmp/c.tsv" 2>/dev/null
cmp -s "$tmp/r.html" "$tmp/r2.html"; check deterministic 0 $?
$T report --labels "$tmp/labels.tsv" --stamp -o "$tmp/r3.html" "$tmp/c.tsv" 2>/dev/null
grep -q 'Made 20[0-9][0-9]-[0-1][0-9]-[0-3][0-9]T' "$tmp/r3.html"; check stamp 0 $?
grep -q 'Made 20' "$tmp/r.html"; check no-stamp 1 $?

# the coverage table is coverage's output, row for row
$T coverage --labels "$tmp/labels.tsv" "$tmp/c.tsv" 2>/dev/null |
	awk -F '\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
		$1 != "*" { printf "%s\t%s\t%s\t%.4f\n", $c["occupation"], $c["lang"], $c["postings"],
			$c["coverage"] }' > "$tmp/want"
$chk "$tmp/r.html" coverage > "$tmp/got"
[ -s "$tmp/want" ]; check coverage-rows 0 $?
cmp -s "$tmp/want" "$tmp/got"; check coverage-equal 0 $?
# as many suggestions of each kind as propose gives
$T propose --labels "$tmp/labels.tsv" --tsv "$tmp/c.tsv" 2>/dev/null |
	awk -F '\t' 'NR > 1 { n[$2]++ } END { for (k in n) print k, n[k] }' | sort > "$tmp/want"
$chk "$tmp/r.html" kinds | awk '$2 > 0' | sort > "$tmp/got"
[ -s "$tmp/want" ]; check kinds-present 0 $?
cmp -s "$tmp/want" "$tmp/got"; check kinds-equal 0 $?

# the queue's decisions beside the suggestions
$T propose --labels "$tmp/labels.tsv" "$tmp/c.tsv" > "$tmp/s.jsonl" 2>/dev/null
$T review add --queue "$tmp/q.jsonl" "$tmp/s.jsonl" > /dev/null 2>&1
id=$($T review list --queue "$tmp/q.jsonl" --kind new_alt_label --limit 1 | tail -n +2 | cut -f1)
$T review accept --queue "$tmp/q.jsonl" --reviewer t "$id" > /dev/null 2>&1
$T report --labels "$tmp/labels.tsv" --min-postings 20 --queue "$tmp/q.jsonl" -o "$tmp/rq.html" \
	"$tmp/c.tsv" 2>/dev/null
check queue-status 0 $?
n=$(grep -c '<td>accepted</td>' "$tmp/rq.html")
[ "$n" -ge 1 ]; check queue-accepted 0 $?
grep -q '<td>open</td>' "$tmp/rq.html"; check queue-open 0 $?
grep -q '<th scope="col">queue</th>' "$tmp/r.html"; check no-queue-column 1 $?
$T report --labels "$tmp/labels.tsv" --queue "$tmp/none.jsonl" -o "$tmp/x.html" "$tmp/c.tsv" 2>/dev/null
check missing-queue 1 $?

# sections: the weakest by default, or those asked for; a note for one
# without postings
n=$(grep -c '<section class="tm-occ"' "$tmp/r.html"); check ten-sections 10 "$n"
occ=$(awk -F '\t' 'NR == 2 { print $4 }' "$tmp/p.tsv")
$T report --labels "$tmp/labels.tsv" --occupation "$occ" --occupation occ:none -o "$tmp/one.html" \
	"$tmp/c.tsv" 2> "$tmp/err"
check one-status 0 $?
grep -q "note: occupation 'occ:none' has no postings" "$tmp/err"; check note-none 0 $?
n=$(grep -c '<section class="tm-occ"' "$tmp/one.html")
[ "$n" -ge 1 ]; check asked-sections 0 $?
check asked-structure ok "$($chk "$tmp/one.html")"

# occupations the postings cannot tell apart: the pairs and the
# occupations nearer another group are overlap's rows, number for number
mkdir "$tmp/ov" && /usr/bin/python3 "$here/gen_overlap.py" "$tmp/ov" 7 > /dev/null
$T tally --labels "$tmp/ov/labels.tsv" -o "$tmp/ov/c.tsv" "$tmp/ov/postings.tsv" 2>/dev/null
check ov-tally 0 $?
$T report --labels "$tmp/ov/labels.tsv" --groups "$tmp/ov/groups.tsv" --level 2 \
	-o "$tmp/ov.html" "$tmp/ov/c.tsv" 2>/dev/null
check ov-status 0 $?
check ov-structure ok "$($chk "$tmp/ov.html")"
$T overlap --labels "$tmp/ov/labels.tsv" --groups "$tmp/ov/groups.tsv" --level 2 --top 20 \
	"$tmp/ov/c.tsv" 2>/dev/null > "$tmp/ov.tsv"
check ov-overlap 0 $?
awk -F '\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
	$c["kind"] == "overlapping_occupations" { print $c["occupation"] "\t" $c["other_occupation"] "\t" \
		$c["lang"] "\t" $c["divergence"] "\t" $c["shared"] "\t" $c["postings"] "\t" $c["other_postings"] }' \
	"$tmp/ov.tsv" > "$tmp/want"
$chk "$tmp/ov.html" overlap > "$tmp/got"
check ov-pairs 20 "$(wc -l < "$tmp/want" | tr -d ' ')"
cmp -s "$tmp/want" "$tmp/got"; check ov-pairs-equal 0 $?
# the chart of the shared mass has a bar for each pair of the table
n=$(sed -n '/id="chart-overlap"/,/<\/svg>/p' "$tmp/ov.html" | grep -c '<rect class="tm-bar')
check ov-chart-bars 20 "$n"
awk -F '\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
	$c["kind"] == "nearer_other_group" { print $c["occupation"] "\t" $c["lang"] "\t" $c["group"] "\t" \
		$c["group_divergence"] "\t" $c["other_group"] "\t" $c["divergence"] }' \
	"$tmp/ov.tsv" > "$tmp/want"
$chk "$tmp/ov.html" nearer > "$tmp/got"
[ -s "$tmp/want" ]; check ov-nearer-rows 0 $?
cmp -s "$tmp/want" "$tmp/got"; check ov-nearer-equal 0 $?
# the planted truth shows: the three planted pairs rank first (in each
# language), the misfiled occupation is nearer the group it is written like
$chk "$tmp/ov.html" overlap > "$tmp/rows"
head -n 6 "$tmp/rows" | cut -f1,2 | sort -u > "$tmp/got"
awk '$1 == "pair" { print $2 "\t" $3 }' "$tmp/ov/truth.tsv" | sort > "$tmp/want"
cmp -s "$tmp/want" "$tmp/got"; check ov-planted-pairs 0 $?
mis=$(awk '$1 == "misfiled" { print $2 "\t" $3 }' "$tmp/ov/truth.tsv")
$chk "$tmp/ov.html" nearer | cut -f1,5 | grep -qx "$mis"; check ov-planted-misfiled 0 $?
# groups from a SKOS file give the same rows as its TSV at the same level
$T report --labels "$tmp/ov/labels.tsv" --groups "$tmp/ov/groups.ttl" -o "$tmp/ov2.html" \
	"$tmp/ov/c.tsv" 2>/dev/null
check ov-skos-status 0 $?
$chk "$tmp/ov2.html" nearer | cut -f1,5 | grep -qx "$mis"; check ov-skos-misfiled 0 $?
# without groups the page says so; --overlap-top 0 leaves the section out
$T report --labels "$tmp/ov/labels.tsv" -o "$tmp/ov3.html" "$tmp/ov/c.tsv" 2>/dev/null
grep -q 'have no groups here' "$tmp/ov3.html"; check ov-no-groups 0 $?
grep -q 'id="nearer-table"' "$tmp/ov3.html"; check ov-no-groups-table 1 $?
$T report --labels "$tmp/ov/labels.tsv" --overlap-top 0 -o "$tmp/ov4.html" "$tmp/ov/c.tsv" \
	2>/dev/null
grep -q 'id="overlap"' "$tmp/ov4.html"; check ov-top-0 1 $?
$T report --labels "$tmp/ov/labels.tsv" --level 2 -o "$tmp/x.html" "$tmp/ov/c.tsv" 2>/dev/null
check ov-level-alone 2 $?
$T report --labels "$tmp/ov/labels.tsv" --groups "$tmp/ov/groups.tsv" --group-prefix 6 \
	-o "$tmp/x.html" "$tmp/ov/c.tsv" 2>/dev/null
check ov-groups-and-prefix 2 $?
# groups by the code's first two characters (the generator's groups at
# level 2): the misfiled occupation is listed there too
$T report --labels "$tmp/ov/labels.tsv" --group-prefix 2 -o "$tmp/ov5.html" "$tmp/ov/c.tsv" \
	2>/dev/null
check ov-prefix-status 0 $?
$chk "$tmp/ov5.html" nearer | cut -f1 | grep -qx "$(echo "$mis" | cut -f1)"
check ov-prefix-misfiled 0 $?
$T report --labels "$tmp/ov/labels.tsv" --groups "$tmp/ov/none.tsv" -o "$tmp/x.html" \
	"$tmp/ov/c.tsv" 2>/dev/null
check ov-groups-missing 1 $?

# usage: -o is required; a bad number is a usage error
$T report --labels "$tmp/labels.tsv" "$tmp/c.tsv" 2>/dev/null; check no-output 2 $?
$T report --labels "$tmp/labels.tsv" --sections x -o "$tmp/x.html" "$tmp/c.tsv" 2>/dev/null
check bad-number 2 $?
[ -e "$tmp/x.html" ]; check no-page-on-error 1 $?

# hostile text in labels and titles: markup, quotes, ampersands, a
# right-to-left override, a 10 KB title
long=$(/usr/bin/python3 -c 'print("Lagerist " * 1200)')
{
	printf 'occupation\tkind\tlang\tlabel\n'
	printf 'occ:x\tpref\ten\t<script>alert(1)</script> Welder\n'
	printf 'occ:x\talt\ten\tWelder "&amp;" <img src=x onerror=alert(2)>\n'
	printf 'occ:x\talt\ten\tFitter \342\200\256reversed\n'
} > "$tmp/evil-labels.tsv"
{
	printf 'id\tlang\toccupations\ttitle\n'
	i=0
	while [ $i -lt 150 ]; do
		i=$((i + 1))
		case $((i % 5)) in
		0) t='<script>alert(3)</script> Welder' ;;
		1) t='Welder <b onmouseover=alert(4)>night</b> & "day"' ;;
		2) t="Welder $long" ;;
		3) t='Welder \342\200\256 yllaer' ;;
		*) t='<iframe src=//x.invalid></iframe>Welder helper' ;;
		esac
		printf '%s\ten\tocc:x\t%b\n' "$i" "$t"
		printf 'y%s\ten\tocc:y\t%b\n' "$i" "$t"
	done
} > "$tmp/evil.tsv"
$T report --labels "$tmp/evil-labels.tsv" --min-postings 1 --overlap-min-postings 1 \
	-o "$tmp/evil.html" "$tmp/evil.tsv" 2>/dev/null
check evil-status 0 $?
# the hostile titles reach the overlap table (occ:x and occ:y share them)
$chk "$tmp/evil.html" overlap | grep -q '^occ:x	occ:y	en	0.0000	1.0000'
check evil-overlap 0 $?
check evil-structure ok "$($chk "$tmp/evil.html")"
# only the elements the report itself writes
$chk "$tmp/evil.html" elements | grep -qx -e iframe -e img -e b; check evil-no-element 1 $?
grep -q "$(printf '\342\200\256')" "$tmp/evil.html"; check evil-no-override 1 $?
grep -c '<script' "$tmp/evil.html" > "$tmp/n"; check evil-one-script 1 "$(cat "$tmp/n")"

# a real browser, when there is one: PNG and PDF, no console error, no
# network
browser=$(command -v chromium || true)
if [ -z "$browser" ] && [ -n "${TITLEMILL_NEED_BROWSER:-}" ]; then
	check chromium-installed yes no
fi
if [ -n "$browser" ]; then
	prof=$tmp/profile
	run() {
		timeout 120 "$browser" --headless --no-sandbox --disable-gpu --no-first-run \
			--user-data-dir="$prof" --disable-extensions --disable-background-networking \
			--proxy-server=127.0.0.1:9 --proxy-bypass-list='<-loopback>' \
			--host-resolver-rules='MAP * ~NOTFOUND' \
			--enable-logging=stderr --v=0 "$@" "file://$tmp/r.html" 2>> "$tmp/browser.log"
	}
	run --window-size=1200,2000 --screenshot="$tmp/r.png" > /dev/null
	run --print-to-pdf="$tmp/r.pdf" --no-pdf-header-footer > /dev/null
	[ -s "$tmp/r.png" ] && head -c 8 "$tmp/r.png" | od -c | grep -q 'P   N   G'
	check browser-png 0 $?
	[ -s "$tmp/r.pdf" ] && head -c 5 "$tmp/r.pdf" | grep -q '%PDF-'
	check browser-pdf 0 $?
	pages=$(/usr/bin/python3 -c 'import re, sys
print(len(re.findall(rb"/Type\s*/Page(?![s\w])", open(sys.argv[1], "rb").read())))' "$tmp/r.pdf")
	[ "${pages:-0}" -gt 1 ]; check browser-pdf-pages 0 $?
	grep -i 'CONSOLE\|Uncaught' "$tmp/browser.log" > "$tmp/console"
	check browser-console "" "$(cat "$tmp/console")"
fi
finish

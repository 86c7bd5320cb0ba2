#!/bin/sh
# make demo: the main job on the bundled example data, in memory, with no
# server.  The scenario is our own: examples/taxonomy.tsv holds the labels
# of 115 occupations in English, German and French (ordinary occupational
# words; ids on the ISCO-08 pattern), and a month of some 80,000 postings in
# those languages is generated deterministically by examples/gen_day.py
# (the bench generator, seed 2026, with a few postings planted so that
# every kind of suggestion shows): invented employers such as Valdoria
# Logistik or Brennfeld Foods, real places.  examples/titles.txt is a
# short list of messy titles.  The tables are laid out by
# examples/show.py.
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
top=$(cd "$here/.." && pwd)
out=${DEMO_OUT:-$top/out}
mkdir -p "$out"
out=$(cd "$out" && pwd)
py=/usr/bin/python3
show() { "$py" "$here/show.py" "$@"; }
# a path as the reader would type it: relative to the current folder when
# under it
rel() {
	case $1 in
	"$PWD"/*) printf '%s' "${1#"$PWD"/}" ;;
	*) printf '%s' "$1" ;;
	esac
}
ex=$(rel "$here")
o=$(rel "$out")

echo "== cleaning titles: titlemill norm $ex/titles.txt"
"$T" norm "$here/titles.txt" > "$out/titles.clean.txt"
"$T" norm --json "$here/titles.txt" > "$out/titles.jsonl"
show titles "$here/titles.txt" "$out/titles.clean.txt" 12
echo "  ... all $(wc -l < "$here/titles.txt") in $o/titles.clean.txt (facets: $o/titles.jsonl)"

echo
echo "== a month of postings in English, German and French: generated ($ex/gen_day.py)"
"$py" "$here/gen_day.py" > "$out/day.tsv"
# The taxonomy's structure, planted: Valdoria Logistik advertises packers
# (occ:9321) under the warehouse operatives' titles (occ:9333), and the
# graphic designers (occ:2166, filed with the engineers of group 21 by
# their code) are advertised like the marketing executives of group 24
# (occ:2431).
awk -F '\t' -v OFS='\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
	$c["occupations"] == "occ:9333" && ++w % 2 == 0 { $c["id"] = $c["id"] "-p"; $c["occupations"] = "occ:9321"; print }
	$c["occupations"] == "occ:2431" && ++k % 2 == 0 { $c["id"] = $c["id"] "-g"; $c["occupations"] = "occ:2166"; print }' \
	"$out/day.tsv" > "$out/day.planted"
cat "$out/day.planted" >> "$out/day.tsv"
"$T" tally --labels "$here/taxonomy.tsv" -o "$out/day.counts.tsv" "$out/day.tsv" 2>&1 |
	sed "s|$out/|$o/|g; s/^/  /"

echo
echo "== coverage: how much of each occupation's postings its labels match"
"$T" coverage --labels "$here/taxonomy.tsv" "$out/day.counts.tsv" > "$out/coverage.tsv" 2> "$out/labels.warnings"
show coverage "$out/coverage.tsv"
"$T" coverage --labels "$here/taxonomy.ttl" "$out/day.counts.tsv" > "$out/coverage.skos.tsv" 2>/dev/null
echo "  the same taxonomy in SKOS ($ex/taxonomy.ttl) gives the same coverage: $(cmp -s "$out/coverage.tsv" "$out/coverage.skos.tsv" && echo yes || echo NO)"

echo
echo "== suggestions for the curators: titlemill propose"
"$T" propose --labels "$here/taxonomy.tsv" "$out/day.counts.tsv" > "$out/suggestions.jsonl" 2>/dev/null
"$T" propose --labels "$here/taxonomy.tsv" --tsv "$out/day.counts.tsv" > "$out/suggestions.tsv" 2>/dev/null
show suggestions "$out/suggestions.tsv"
echo
echo "  These are suggestions for a curator, who decides; each comes with its evidence."
echo
echo "== occupations the postings cannot tell apart: titlemill overlap (groups: the first two digits of the code)"
"$T" overlap --labels "$here/taxonomy.tsv" --group-prefix 2 --json "$out/day.counts.tsv" > "$out/overlap.jsonl" 2> "$out/overlap.log"
"$T" overlap --labels "$here/taxonomy.tsv" --group-prefix 2 "$out/day.counts.tsv" > "$out/overlap.tsv" 2>/dev/null
sed 's/^titlemill overlap: /  /' "$out/overlap.log"
awk -F '\t' '$1 == "overlapping_occupations"' "$out/overlap.tsv" | head -4 |
	awk -F '\t' '{ printf "  %s %s %-22s ~ %s %-24s divergence %s, shared %s\n", $6, $2, $3, $4, $5, $7, $8 }'
awk -F '\t' '$1 == "nearer_other_group"' "$out/overlap.tsv" | head -2 |
	awk -F '\t' '{ ev = $14; if (length(ev) > 64) { ev = substr(ev, 1, 64); sub(/; [^;]*$/, "; ...", ev) }
		printf "  %s %s %s: filed in %s (%s bits), nearer %s (%s bits): %s\n", $6, $2, $3, $11, $13, $12, $7, ev }'
echo
echo "== what changed in March: titlemill trend (weeks 10-11 against weeks 12-13)"
"$T" tally --period week --labels "$here/taxonomy.tsv" -o "$out/weeks.counts.tsv" "$out/day.tsv" 2>/dev/null
"$T" trend --labels "$here/taxonomy.tsv" --before 2026-W10..2026-W11 --after 2026-W12..2026-W13 \
	"$out/weeks.counts.tsv" > "$out/trend.jsonl" 2>/dev/null
"$T" trend --labels "$here/taxonomy.tsv" --before 2026-W10..2026-W11 --after 2026-W12..2026-W13 \
	--tsv "$out/weeks.counts.tsv" > "$out/trend.tsv" 2>/dev/null
awk -F '\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
	{ printf "  %-7s %s %s %-26s %3d → %3d postings (share %4.1f %% → %4.1f %%), G2 %.1f%s\n",
		$c["direction"], $c["lang"], $c["occupation"], "\"" $c["label"] "\"", $c["postings_before"],
		$c["postings_after"], 100 * $c["share_before"], 100 * $c["share_after"], $c["g2"],
		$c["is_label"] == "true" ? " (a label)" : "" }' "$out/trend.tsv" | head -6
echo "  ($o/trend.jsonl; review add takes it: rising_title, fading_label)"
echo
echo "== the curators' queue: titlemill review (here a curator called 'demo' decides three)"
q=$out/queue.jsonl
rm -f "$q" "$q.lock"
"$T" review add --queue "$q" "$out/suggestions.jsonl" 2>&1 | sed 's/^/  /'
ids=$("$T" review list --queue "$q" --kind new_alt_label --limit 3 | tail -n +2 | cut -f1)
set -- $ids
"$T" review accept --queue "$q" --reviewer demo --note "common wording" "$1" "$2" 2>&1 | sed 's/^/  /'
"$T" review reject --queue "$q" --reviewer demo --note "already covered" "$3" 2>&1 | sed 's/^/  /'
"$T" review export --queue "$q" -o "$out/delta.tsv"
"$T" review export --queue "$q" --format turtle -o "$out/delta.ttl"
echo "  the label delta for the taxonomy ($o/delta.tsv, and .ttl in SKOS):"
show table "$out/delta.tsv" occupation kind lang label change id
"$T" review stats --queue "$q" | awk -F '\t' '$1 == "all" { printf "  queue: %s suggestions, %s open, %s accepted, %s rejected\n", $3, $4, $5, $6 }'
echo
echo "== a page to look at: titlemill report"
"$T" report --labels "$here/taxonomy.tsv" --group-prefix 2 --queue "$q" \
	--before 2026-W10..2026-W11 --after 2026-W12..2026-W13 -o "$out/report.html" "$out/weeks.counts.tsv" 2>&1 |
	sed 's/^/  /'
echo "  open $o/report.html in a browser: coverage, the weakest occupations' labels week by week, the suggestions with the queue's decisions, the occupations named alike, the titles rising and fading"
echo "  Full outputs: $o/coverage.tsv, $o/suggestions.jsonl (and .tsv), $o/day.counts.tsv, $o/queue.jsonl, $o/report.html"
[ -s "$out/labels.warnings" ] && echo "  Label warnings: $o/labels.warnings ($(wc -l < "$out/labels.warnings") lines)"
exit 0

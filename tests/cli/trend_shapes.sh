#!/bin/sh
# titlemill trend on shapes of time beside the one of trend.sh, against the
# planted truth of tests/cli/gen_trend_shapes.py (its head comment says the
# shapes and how the truth is derived from the model's expected counts):
# volume growing or shrinking fourfold, an occupation surging eightfold, a
# title moving between occupations, small occupations, a slow steady rise,
# weekly and month-end seasonality, a two-day mass posting, fading alt and
# hidden labels, undated postings, three languages; windows as months,
# weeks, days, days rolled up to weeks and the defaults.  Per scenario and
# shape: every planted title found in its direction, no stable title
# reported.  Also: a new title's first_seen is a period of its own
# counts, never the undated one; its examples come from the window where
# its share is higher; label_kind is the label's; windows given in months
# over counts by week are said as the weeks summed.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")" && pwd)
py=/usr/bin/python3
gen=$here/gen_trend_shapes.py

# two seeds: the noise of one (6) makes the titles a mass posting dilutes
# look rising against it
for seed in 3 6; do
	"$py" "$gen" gen --seed "$seed" --out "$tmp/g"
	check "gen-$seed" 0 $?
	P=$tmp/g/postings.tsv
	L=$tmp/g/labels.tsv
	# the truth's titles and the postings' raw titles meet on the match key
	tail -n +2 "$tmp/g/truth.tsv" | cut -f5 | sort -u > "$tmp/titles"
	$T norm --key "$tmp/titles" > "$tmp/tkeys"
	paste "$tmp/titles" "$tmp/tkeys" > "$tmp/keys.tsv"
	check "keys-distinct-$seed" "" "$(cut -f2 "$tmp/keys.tsv" | sort | uniq -d | head -3)"
	check "keys-raw-$seed" "$(wc -l < "$tmp/titles")" \
		"$(tail -n +2 "$P" | cut -f5 | sort -u | $T norm --key | sort -u | wc -l)"

	for p in month week day; do
		$T tally --period $p --labels "$L" -o "$tmp/c.$p" "$P" 2> /dev/null
		check "tally-$seed-$p" 0 $?
	done
	: > "$tmp/score"
	while IFS='	' read -r name period args; do
		# shellcheck disable=SC2086
		$T trend --labels "$L" --tsv $args "$tmp/c.$period" > "$tmp/r.$name" 2> "$tmp/e.$name"
		check "trend-$seed-$name" 0 $?
		"$py" "$gen" score "$tmp/g/truth.tsv" "$tmp/keys.tsv" "$name" "$tmp/r.$name" "$P" \
			>> "$tmp/score" 2> "$tmp/why.$name"
		check "score-$seed-$name" 0 $?
	done < "$tmp/g/scenarios.tsv"
	[ -n "${SHOW:-}" ] && cat "$tmp/score" "$tmp"/why.*

	# every planted title found in its direction, no stable one reported
	while IFS='	' read -r name shape planted found wrong stable fp fields; do
		check "$seed-$name-$shape-recall" "$planted" "$found"
		check "$seed-$name-$shape-wrong-direction" 0 "$wrong"
		check "$seed-$name-$shape-false-reports" 0 "$fp"
		check "$seed-$name-$shape-first-seen-examples" 0 "$fields"
	done < "$tmp/score"
	# windows in months over counts by week: the whole weeks inside are
	# summed, said as such, and the four weeks across a window's edge are said
	check "weekmonths-windows-$seed" "2025-W41..2025-W52 2026-W02..2026-W08" \
		"$(awk -F '\t' 'NR == 2 { print $21, $22 }' "$tmp/r.weekmonths")"
	check "weekmonths-partial-$seed" 1 "$(grep -c '4 periods partly inside a window left out' "$tmp/e.weekmonths")"
	check "scored-$seed" "$(wc -l < "$tmp/g/scenarios.tsv")" "$(cut -f1 "$tmp/score" | sort -u | wc -l)"
done

finish

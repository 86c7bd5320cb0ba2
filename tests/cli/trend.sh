#!/bin/sh
# titlemill tally/counts by period, the windows, coverage --by-period and
# titlemill trend, against outside references:
#   - periods: Python's datetime (date.isocalendar() for ISO 8601 weeks,
#     strftime for days and months), on every day from 2019-12-20 to
#     2021-01-10 (two year ends, the leap day 2020-02-29, ISO week 53 of
#     2020);
#   - G2: scipy.stats.chi2_contingency(..., correction=False,
#     lambda_="log-likelihood") on each reported 2x2 table;
#   - planted truth: tests/cli/gen_trend.py (60 days; titles that appear
#     in the second half and grow, labels that vanish, the rest stable
#     with day-of-week variation): every planted title found, no stable
#     one reported.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")" && pwd)
py=/usr/bin/python3

# ---- periods against Python's datetime ----
"$py" - "$tmp/days.tsv" <<'PY'
import datetime, sys
d = datetime.date(2019, 12, 20)
with open(sys.argv[1], "w") as f:
    f.write("id\tdate\tlang\toccupations\ttitle\n")
    i = 0
    while d <= datetime.date(2021, 1, 10):
        i += 1
        f.write(f"p{i}\t{d.isoformat()}\tde\tocc:{d.isoformat()}\tKoch\n")
        d += datetime.timedelta(days=1)
PY
for p in day week month; do
	$T tally --period $p -o "$tmp/days.$p" "$tmp/days.tsv" 2>/dev/null
	check "tally-$p-status" 0 $?
	"$py" - "$tmp/days.$p" $p > "$tmp/days.$p.bad" <<'PY'
import csv, datetime, sys
path, kind = sys.argv[1], sys.argv[2]
rows = list(csv.DictReader(open(path, encoding="utf-8"), delimiter="\t", quoting=csv.QUOTE_NONE))
seen = 0
for r in rows:
    if r["kind"] != "occupation":
        continue
    d = datetime.date.fromisoformat(r["occupation"][4:])
    if kind == "day":
        want = d.isoformat()
    elif kind == "month":
        want = d.strftime("%Y-%m")
    else:
        y, w, _ = d.isocalendar()
        want = f"{y:04d}-W{w:02d}"
    seen += 1
    if r["period"] != want:
        print(d, r["period"], want)
if seen != 388:
    print("days seen", seen)
PY
	check "periods-$p-vs-datetime" "" "$(head -3 "$tmp/days.$p.bad")"
done
# a table without dates keeps the table of before: no period column
printf 'id\tlang\toccupations\ttitle\nu1\tde\tocc:1\tKoch\n' > "$tmp/undated.tsv"
$T tally -o "$tmp/undated.counts" "$tmp/undated.tsv" 2>/dev/null
check undated-header "kind	occupation	lang	key	text	postings" "$(head -1 "$tmp/undated.counts")"
# dated and undated together: the undated in the empty period, said once
printf 'id\tdate\tlang\toccupations\ttitle\nu1\t\tde\tocc:1\tKoch\nu2\t2026-03-02\tde\tocc:1\tKoch\n' > "$tmp/mixed.tsv"
$T tally -o "$tmp/mixed.counts" "$tmp/mixed.tsv" 2> "$tmp/err"
check mixed-undated-said 1 "$(grep -c '1 posting without a date, counted as undated' "$tmp/err")"
check mixed-periods "$(printf '\n2026-03')" "$(awk -F '\t' 'NR > 1 && $1 == "occupation" { print $7 }' "$tmp/mixed.counts")"

# ---- counts by period: merging is one tally, windows are filters ----
"$py" "$here/gen_trend.py" --days 60 --seed 5 --out "$tmp/g"
check gen 0 $?
P=$tmp/g/postings.tsv
head -1 "$P" > "$tmp/a.tsv"
cp "$tmp/a.tsv" "$tmp/b.tsv"
awk 'NR > 1 && NR % 3 != 0' "$P" >> "$tmp/a.tsv"
awk 'NR > 1 && NR % 3 == 0' "$P" >> "$tmp/b.tsv"
for p in day week month; do
	$T tally --period $p -o "$tmp/all.$p" "$P" 2>/dev/null
	$T tally --period $p -o "$tmp/a.$p" "$tmp/a.tsv" 2>/dev/null
	$T tally --period $p -o "$tmp/b.$p" "$tmp/b.tsv" 2>/dev/null
	$T counts "$tmp/a.$p" "$tmp/b.$p" > "$tmp/ab.$p"
	cmp -s "$tmp/ab.$p" "$tmp/all.$p"; check "counts-merge-$p" 0 $?
done
# days roll up to weeks and months exactly as a tally by week or month
$T counts --period week "$tmp/all.day" | cmp -s - "$tmp/all.week"; check rollup-week 0 $?
$T counts --period month "$tmp/a.day" "$tmp/b.day" | cmp -s - "$tmp/all.month"; check rollup-month 0 $?
$T tally --period none -o "$tmp/all.none" "$P" 2>/dev/null
$T counts --period none "$tmp/all.week" | cmp -s - "$tmp/all.none"; check rollup-none 0 $?
# a week cannot be counted by month, nor weeks mixed with months
$T counts --period month "$tmp/all.week" > /dev/null 2> "$tmp/err"
check week-to-month-status 1 $?
check week-to-month-msg 1 "$(grep -c "all.week:2: period '2026-W02' is a week and cannot be counted by month" "$tmp/err")"
$T counts "$tmp/all.week" "$tmp/all.month" > /dev/null 2> "$tmp/err"
check mixed-kinds-status 1 $?
check mixed-kinds-msg 1 "$(grep -c "all.month:2: period '2026-01' is a month, and the counts before it are by week" "$tmp/err")"
# a window is the tally of the postings dated inside it
awk -F '\t' 'NR == 1 || ($2 >= "2026-01-19" && $2 <= "2026-02-15")' "$P" > "$tmp/win.tsv"
$T tally --period day -o "$tmp/win.day" "$tmp/win.tsv" 2>/dev/null
$T counts --from 2026-01-19 --to 2026-02-15 "$tmp/all.day" | cmp -s - "$tmp/win.day"
check window-days 0 $?
$T tally --period week -o "$tmp/win.week" "$tmp/win.tsv" 2>/dev/null
$T counts --from 2026-W04 --to 2026-W07 "$tmp/all.week" | cmp -s - "$tmp/win.week"
check window-weeks 0 $?
# a period partly inside is left out, and said
$T counts --from 2026-01-20 --to 2026-02-15 "$tmp/all.week" > "$tmp/part" 2> "$tmp/err"
check window-partial-said 1 "$(grep -c 'note: 1 period lies only partly inside --from..--to, left out: 2026-W04' "$tmp/err")"
check window-partial-left "" "$(awk -F '\t' '$7 == "2026-W04"' "$tmp/part" | head -1)"
$T counts --from 2027 "$tmp/all.week" > /dev/null 2> "$tmp/err"
check window-empty-said 1 "$(grep -c 'warning: no counts lie within --from..--to' "$tmp/err")"
$T counts --from 2026-03 --to 2026-02 "$tmp/all.week" > /dev/null 2>&1
check window-backwards-usage 2 $?
$T counts --from 2026-13 "$tmp/all.week" > /dev/null 2>&1
check window-bad-usage 2 $?
# a bad period in a table is named with its file and line
printf 'kind\toccupation\tlang\tkey\ttext\tpostings\tperiod\noccupation\tocc:1\tde\t\t\t3\t2026-02-30\n' > "$tmp/bad.counts"
$T counts "$tmp/bad.counts" > /dev/null 2> "$tmp/err"
check bad-period-status 1 $?
check bad-period-msg 1 "$(grep -c "bad.counts:2: bad period '2026-02-30'" "$tmp/err")"

# ---- coverage by period adds up to coverage of all time ----
L=$tmp/g/labels.tsv
$T coverage --labels "$L" "$tmp/all.none" > "$tmp/cov.all" 2>/dev/null
$T coverage --labels "$L" --by-period "$tmp/all.month" > "$tmp/cov.month" 2>/dev/null
check by-period-header period "$(head -1 "$tmp/cov.month" | cut -f1)"
check by-period-sums "" "$("$py" - "$tmp/cov.all" "$tmp/cov.month" <<'PY'
import csv, sys
def rows(p):
    return list(csv.DictReader(open(p, encoding="utf-8"), delimiter="\t", quoting=csv.QUOTE_NONE))
want = {(r["occupation"], r["lang"]): (int(r["postings"]), int(r["matched"])) for r in rows(sys.argv[1])}
got = {}
periods = set()
for r in rows(sys.argv[2]):
    periods.add(r["period"])
    k = (r["occupation"], r["lang"])
    p, m = got.get(k, (0, 0))
    got[k] = (p + int(r["postings"]), m + int(r["matched"]))
if periods != {"2026-01", "2026-02", "2026-03"}:
    print("periods", sorted(periods))
for k in want:
    if want[k] != got.get(k):
        print(k, want[k], got.get(k))
PY
)"
$T coverage --labels "$L" --from 2026-02 --to 2026-02 "$tmp/all.month" > "$tmp/cov.feb" 2>/dev/null
check window-coverage "$(awk -F '\t' '$1 == "2026-02" { $1 = ""; print }' OFS='\t' "$tmp/cov.month" | cut -f2- | md5sum)" \
	"$(tail -n +2 "$tmp/cov.feb" | md5sum)"

# propose over a window is propose over the postings dated inside it
$T propose --labels "$L" --from 2026-01-19 --to 2026-02-15 "$tmp/all.day" > "$tmp/prop.win" 2>/dev/null
$T propose --labels "$L" "$tmp/win.day" > "$tmp/prop.tally" 2>/dev/null
cmp -s "$tmp/prop.win" "$tmp/prop.tally"; check window-propose 0 $?
check window-propose-nonempty 1 "$([ -s "$tmp/prop.win" ] && echo 1)"

# ---- trend: the planted truth, the G2 values ----
half=$("$py" -c 'import datetime; print(datetime.date(2026, 1, 5) + datetime.timedelta(days=30))')
last=$("$py" -c 'import datetime; print(datetime.date(2026, 1, 5) + datetime.timedelta(days=59))')
$T trend --labels "$L" --before "2026-01-05..$half" --after "$half..$last" "$tmp/all.day" \
	> /dev/null 2>&1
check trend-overlapping-windows 2 $?
prev=$("$py" -c 'import datetime; print(datetime.date(2026, 1, 5) + datetime.timedelta(days=29))')
$T trend --labels "$L" --before "2026-01-05..$prev" --after "$half..$last" "$tmp/all.day" \
	> "$tmp/trend.jsonl" 2> "$tmp/err"
check trend-status 0 $?
check trend-windows-said 1 "$(grep -c "before 2026-01-05..$prev (30 periods), after $half..$last (30 periods)" "$tmp/err")"
# the same from the postings, counted by day
$T trend --labels "$L" --period day --before "2026-01-05..$prev" --after "$half..$last" "$P" \
	2>/dev/null | cmp -s - "$tmp/trend.jsonl"
check trend-postings-equal-counts 0 $?
"$py" - "$tmp/trend.jsonl" "$tmp/g/truth.tsv" "$half" > "$tmp/trend.check" <<'PY'
import csv, json, sys
from scipy.stats import chi2_contingency
rows = [json.loads(l) for l in open(sys.argv[1], encoding="utf-8")]
truth = {(r["direction"], r["occupation"], r["lang"], r["title"].lower())
         for r in csv.DictReader(open(sys.argv[2], encoding="utf-8"), delimiter="\t")}
got = {(r["direction"], r["occupation"], r["lang"], r["label"].lower()) for r in rows}
for t in sorted(truth - got):
    print("missed", t)
for t in sorted(got - truth):
    print("not planted", t)
fields = ["direction", "occupation", "occupation_label", "lang", "label", "key", "is_label",
          "label_kind", "postings_before", "postings_after", "occupation_postings_before",
          "occupation_postings_after", "share_before", "share_before_low", "share_before_high",
          "share_after", "share_after_low", "share_after_high", "g2", "first_seen", "before",
          "after", "examples"]
for r in rows:
    if list(r) != fields:
        print("fields", list(r))
        break
for r in rows:
    pb, pa = r["postings_before"], r["postings_after"]
    ob, oa = r["occupation_postings_before"], r["occupation_postings_after"]
    g2 = chi2_contingency([[pa, oa - pa], [pb, ob - pb]], correction=False,
                          lambda_="log-likelihood")[0]
    if abs(g2 - r["g2"]) > 1e-3 * max(1.0, g2):
        print("g2", r["occupation"], r["key"], r["g2"], g2)
    if r["direction"] == "rising":
        if not r["share_after"] > r["share_before"] or r["is_label"]:
            print("rising", r)
        if r["first_seen"] < sys.argv[3]:
            print("first_seen", r["key"], r["first_seen"])
    else:
        if not r["share_before"] > r["share_after"] or r["label_kind"] != "alt":
            print("falling", r)
        if r["first_seen"] != "2026-01-05":
            print("first_seen", r["key"], r["first_seen"])
    if not r["examples"]:
        print("no examples", r["key"])
print(len(rows), "rows")
PY
check trend-planted-truth "$(wc -l < "$tmp/g/truth.tsv" | awk '{ print $1 - 1 }') rows" "$(cat "$tmp/trend.check")"
# by week, defaults: the latest complete week against the three before
$T trend --labels "$L" --as-of 2026-03-06 --tsv "$tmp/all.week" > "$tmp/trend.tsv" 2> "$tmp/err"
# (2026-W10 runs to 2026-03-08: not complete on the 6th)
check trend-default-windows 1 "$(grep -c 'before 2026-W06..2026-W08 (3 periods), after 2026-W09 (1 period)' "$tmp/err")"
check trend-tsv-examples "example_1	example_2	example_3" "$(head -1 "$tmp/trend.tsv" | cut -f23-)"
# the later window given alone: the earlier is the three weeks before it
$T trend --labels "$L" --after 2026-W08 "$tmp/all.week" > /dev/null 2> "$tmp/err"
check trend-after-alone 1 "$(grep -c 'before 2026-W05..2026-W07 (3 periods), after 2026-W08 (1 period)' "$tmp/err")"
$T trend --labels "$L" --direction falling --top 2 --before 2026-W02..2026-W05 \
	--after 2026-W07..2026-W09 "$tmp/all.week" 2>/dev/null |
	grep -c '"direction":"falling"' > "$tmp/n"
check trend-top-direction 2 "$(cat "$tmp/n")"
# the report's rising and fading titles are trend's, read back from the page
$T report --labels "$L" --before 2026-W02..2026-W05 --after 2026-W07..2026-W09 \
	-o "$tmp/report.html" "$tmp/all.week" 2>/dev/null
check report-status 0 $?
"$py" "$here/check_html.py" "$tmp/report.html" trend > "$tmp/report.trend"
$T trend --labels "$L" --tsv --before 2026-W02..2026-W05 --after 2026-W07..2026-W09 \
	"$tmp/all.week" 2>/dev/null | awk -F '\t' -v OFS='\t' 'NR == 1 { for (i = 1; i <= NF; i++) c[$i] = i; next }
	{ print $c["direction"], $c["occupation"], $c["lang"], $c["label"], $c["postings_before"],
		$c["postings_after"], $c["g2"] }' > "$tmp/trend.rows"
cmp -s "$tmp/report.trend" "$tmp/trend.rows"; check report-trend-equals-trend 0 $?
check report-trend-rows "$(wc -l < "$tmp/trend.rows")" "$(wc -l < "$tmp/report.trend")"
check report-trend-some 1 "$([ -s "$tmp/trend.rows" ] && echo 1)"
# ... and each occupation section draws its periods
check report-period-chart 1 "$([ "$(grep -c 'id="chart-time-' "$tmp/report.html")" -ge 10 ] && echo 1)"

# no periods: said, and the windows asked for
$T trend --labels "$L" "$tmp/all.none" > /dev/null 2> "$tmp/err"
check trend-no-periods-status 1 $?
check trend-no-periods-msg 1 "$(grep -c 'the counts have no periods' "$tmp/err")"
finish

#!/bin/sh
# titlemill review over weeks, as curators meet it: a rejection that
# reopens only on changed evidence, a clash of keys refused at decision
# time, reopen and undo (in the history and the store's event log), a
# decisions sheet as spreadsheets write it, rejections as noise and the
# candidate lexicon lines they give (read back by titlemill norm), stats
# in JSON (read by Python's json), each subcommand's own --help, the
# fields occupation_label, strength and competitor, and every message of
# the command starting with "titlemill review:".
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
Q="--queue $tmp/q.jsonl"
export TITLEMILL_NOW=2026-12-01T09:00:00Z
err=$tmp/err.all   # every message of the suite, checked at the end
run() { "$T" review "$@" 2> "$tmp/e"; r=$?; cat "$tmp/e" >> "$err"; return $r; }

# an invented taxonomy: Valdoria's warehouses and kitchens
printf 'occupation\tkind\tlang\tlabel\n' > "$tmp/labels.tsv"
printf 'occ:0069\tpref\tde\tFachkraft für Lagerlogistik\nocc:0069\talt\tde\tLagerist\n' >> "$tmp/labels.tsv"
printf 'occ:0042\tpref\tde\tKommissionierer\nocc:0042\talt\tde\tPicker\nocc:0051\tpref\tde\tKoch\n' >> "$tmp/labels.tsv"

# suggestions of this round's propose (occupation_label, strength), and
# one of an older propose without them
s() { # id kind occ occ_label label postings occ_postings precision strength competitor
	ol=""; [ -n "$4" ] && ol=",\"occupation_label\":\"$4\""
	st=""; [ -n "$9" ] && st=",\"strength\":$9"
	co=""; [ -n "${10}" ] && co=",\"competitor\":{\"occupation\":\"${10}\",\"postings\":10,\"share\":0.1}"
	printf '{"id":"%s","kind":"%s","occupation":"%s"%s,"lang":"de","label":"%s","key":"%s","score":%s,"postings":%s,"occupation_postings":%s,"key_postings":%s,"precision":%s%s%s,"examples":["%s (m/w/d)"]}\n' \
		"$1" "$2" "$3" "$ol" "$5" "$5" "$6" "$6" "$7" "$6" "$8" "$st" "$co" "$5"
}
{
	s 00000000000000a1 new_alt_label occ:0042 Kommissionierer lagerist 40 1000 0.8 0.95 occ:0069
	s 00000000000000a2 new_alt_label occ:0042 Kommissionierer lagerhelfer 30 1000 0.5 0.40 ""
	s 00000000000000a3 new_hidden_label occ:0042 Kommissionierer kommisionierer 20 1000 0.9 0.70 ""
	s 00000000000000a4 new_alt_label occ:0051 Koch "zackzack koch" 12 500 0.6 0.30 ""
	s 00000000000000a5 new_alt_label occ:0051 Koch "zackzack beikoch" 11 500 0.6 0.20 ""
	s 00000000000000a6 new_alt_label occ:0069 "" "zackzack lagerist" 10 900 0.6 0.10 ""
	s 00000000000000a7 new_alt_label occ:0051 "" "jungkoch" 9 500 0.6 "" ""
	s 00000000000000a8 new_alt_label occ:0069 "" "lagerarbeiter" 30 900 0.9 0.60 ""
	s 00000000000000a9 rare_label occ:0069 "" "lagerist" 2 900 0.9 0.50 ""
} > "$tmp/week1.jsonl"
run add $Q "$tmp/week1.jsonl"
check "add exits 0" 0 $?

# --- fields: occupation_label, strength, the competitor in two columns
run list $Q > "$tmp/list"
check "list header" "id status kind occupation occupation_label lang label strength score postings occupation_postings precision competitor competitor_postings variant_of added proposed decided_by decided_at note share_before share_after" \
	"$(head -1 "$tmp/list" | tr '\t' ' ')"
got=$(awk -F '\t' '$1 == "00000000000000a1" { print $5 "|" $8 "|" $13 "|" $14 }' "$tmp/list")
check "list: occupation_label, strength, competitor, competitor_postings" "Kommissionierer|0.9500|occ:0069|10" "$got"
got=$(awk -F '\t' '$1 == "00000000000000a7" { print "[" $5 "|" $8 "|" $13 "|" $14 "]" }' "$tmp/list")
check "list: an older suggestion without them" "[|||]" "$got"
# strongest first by strength (the default), the one without strength last
got=$(tail -n +2 "$tmp/list" | cut -f1 | tr '\n' ' ')
check "list: sorted by strength" "00000000000000a1 00000000000000a3 00000000000000a8 00000000000000a9 00000000000000a2 00000000000000a4 00000000000000a5 00000000000000a6 00000000000000a7 " "$got"
got=$(run list $Q --sort score | sed -n 2p | cut -f1)
check "list --sort score" 00000000000000a1 "$got"
run show $Q 00000000000000a1 > "$tmp/show"
grep -q "^occ. label    Kommissionierer$" "$tmp/show" && grep -q "^strength      0.9500$" "$tmp/show" ||
	check "show: occupation label and strength" shown "$(cat "$tmp/show")"

# --- each subcommand's --help is its own
run list --help > "$tmp/h"
check "list --help: exit 0" 0 $?
grep -q "^usage: titlemill review list" "$tmp/h" && grep -q -- "--sort S" "$tmp/h" && ! grep -q -- "--reviewer" "$tmp/h" ||
	check "list --help shows list's options only" "list's" "$(cat "$tmp/h")"
run accept --reviewer ana --help > "$tmp/h"
grep -q -- "--labels FILE" "$tmp/h" && grep -q -- "--overrule" "$tmp/h" && ! grep -q -- "--sort" "$tmp/h" ||
	check "accept --help shows accept's options only" "accept's" "$(cat "$tmp/h")"
run noise-words --help | grep -q "Candidates for a curator" || check "noise-words --help says candidates" said not
run list --note --help $Q > /dev/null 2>&1
check "an option's value that reads --help is no help" 2 $?
got=$("$T" review list --bogus 2>&1 | head -1)
check "an unknown option: named as ours" "titlemill review: unknown option '--bogus' (the options: titlemill review list --help)" "$got"
got=$("$T" review list --bogus 2>&1 | wc -l)
check "an unknown option: one line, not the whole help" 1 "$got"

# --- a clash of keys at decision time: refused, naming the other
# occupation and its label; --overrule accepts it with a warning
cp "$tmp/q.jsonl" "$tmp/q.saved"
run accept $Q --reviewer ana --labels "$tmp/labels.tsv" 00000000000000a1
check "clash with the taxonomy: exit 1" 1 $?
grep -q "titlemill review: refused: 00000000000000a1: the key 'lagerist' is already an alternative label 'Lagerist' of occ:0069 'Fachkraft für Lagerlogistik' in the taxonomy; not accepted (--overrule accepts it all the same)" "$tmp/e" ||
	check "clash: names the occupation and its label" "occ:0069 'Lagerist'" "$(cat "$tmp/e")"
cmp -s "$tmp/q.jsonl" "$tmp/q.saved" || check "clash: nothing changed" same differ
run accept $Q --reviewer ana 00000000000000a1
check "without --labels the taxonomy is not known: accepted" 0 $?
run reject $Q --reviewer ana --overrule 00000000000000a1
run accept $Q --reviewer ana --labels "$tmp/labels.tsv" --overrule 00000000000000a1
check "clash --overrule: exit 0" 0 $?
grep -q "titlemill review: warning: 00000000000000a1: the key 'lagerist' is already .*; accepted all the same (--overrule)" "$tmp/e" ||
	check "clash --overrule: warns" warning "$(cat "$tmp/e")"
printf '%s\n' '{"id":"00000000000000b1","kind":"new_hidden_label","occupation":"occ:0051","lang":"de-AT","label":"lagerist","key":"lagerist","score":3,"postings":3}' > "$tmp/b1.jsonl"
run add $Q "$tmp/b1.jsonl"
run accept $Q --reviewer bo 00000000000000b1
check "clash with an accepted suggestion: exit 1" 1 $?
grep -q "00000000000000b1: the key 'lagerist' is already an alternative label 'lagerist' of occ:0042 'Kommissionierer' (accepted in the queue as 00000000000000a1)" "$tmp/e" ||
	check "clash in the queue: names it" "occ:0042 (accepted ...)" "$(cat "$tmp/e")"

# --- reopen: back to open, the history kept
run reject $Q --reviewer bo --note "too vague" 00000000000000a2
run reopen $Q --reviewer ana --note "second look" 00000000000000a2
check "reopen: exit 0" "0 titlemill review: 1 suggestion reopened" "$? $(cat "$tmp/e")"
got=$(run list $Q --status all | awk -F '\t' '$1 == "00000000000000a2" { print $2 }')
check "reopen: open again" open "$got"
run show $Q 00000000000000a2 | grep -c "rejected  by bo\|reopened  by ana.*(reopened by a curator): \"second look\"" > "$tmp/n"
check "reopen: the history holds the rejection and the reopening" 2 "$(cat "$tmp/n")"
run reopen $Q --reviewer ana 00000000000000a2
grep -q "already open; left as it is" "$tmp/e" || check "reopen of an open item: said" "already open" "$(cat "$tmp/e")"

# --- a decisions sheet as a spreadsheet exports it: quoted fields,
# doubled quotes, names and words in any case; a label column checked
printf '"ID"\t"Decision"\t"Reviewer"\t"Note"\t"Label"\n' > "$tmp/sheet.tsv"
printf '"00000000000000a2"\t"Accept"\t"cy"\t"said ""yes"" twice"\t"Lagerhelfer"\n' >> "$tmp/sheet.tsv"
printf '00000000000000a3\tREJECT\tcy\t\tkommisionierer\n' >> "$tmp/sheet.tsv"
printf '00000000000000a8\tdefer\tcy\t\t\n' >> "$tmp/sheet.tsv"
cp "$tmp/q.jsonl" "$tmp/q.saved"
sed '3s/kommisionierer/lagerhelfer/' "$tmp/sheet.tsv" > "$tmp/sorted.tsv"
run decide $Q "$tmp/sorted.tsv"
check "a sheet sorted differently: exit 1" 1 $?
grep -q "sorted.tsv:3: the label does not match suggestion 00000000000000a3 ('kommisionierer'): is the sheet sorted differently from the queue?" "$tmp/e" ||
	check "a label that does not match: file:line" "sorted.tsv:3" "$(cat "$tmp/e")"
cmp -s "$tmp/q.jsonl" "$tmp/q.saved" || check "a label that does not match: nothing changed" same differ
printf '"ID"\t"Decision"\n"00000000000000a2\taccept\n' > "$tmp/open.tsv"
run decide $Q --reviewer cy "$tmp/open.tsv"
grep -q 'open.tsv:2: a quoted field does not close on its line' "$tmp/e" || check "an unclosed quote: file:line" "open.tsv:2" "$(cat "$tmp/e")"
TITLEMILL_NOW=2026-12-02T10:00:00Z run decide $Q "$tmp/sheet.tsv"
check "the spreadsheet's sheet" "0 titlemill review: 3 decisions recorded as batch 1 (titlemill review undo --batch 1 takes them back)" "$? $(cat "$tmp/e")"
got=$(run list $Q --status all --json | /usr/bin/python3 -c '
import json, sys
for l in sys.stdin:
    it = json.loads(l)
    if it["id"] == "00000000000000a2":
        print(it["status"], it["history"][-1]["note"], it["history"][-1]["batch"], it["history"][-1]["was"])')
check "quotes read as a spreadsheet means them" 'accepted said "yes" twice 1 open' "$got"

# --- --since takes a date
got=$(run export $Q --since 2026-12-02 | tail -n +2 | cut -f6 | sort | tr '\n' ' ')
check "export --since DATE" "00000000000000a2 " "$got"
got=$(run export $Q | awk -F '\t' 'NR == 1 { print $11 } $6 == "00000000000000a1" { print $11 }' | tr '\n' '|')
check "the delta carries occupation_label" "occupation_label|Kommissionierer|" "$got"

# --- undo the batch: each item back to where it was, in the history
cp "$tmp/q.jsonl" "$tmp/q.before-undo"
TITLEMILL_NOW=2026-12-02T11:00:00Z run undo $Q --batch 1 --reviewer cy --note "wrong sheet"
check "undo: exit 0" "0 titlemill review: batch 1 undone: 3 decisions taken back" "$? $(cat "$tmp/e")"
got=$(run list $Q --status all | awk -F '\t' '$1 ~ /a[238]$/ { print $1 "=" $2 }' | sort | tr '\n' ' ')
check "undo: the statuses before the batch" "00000000000000a2=open 00000000000000a3=open 00000000000000a8=open " "$got"
run show $Q 00000000000000a3 | grep -q "undone    by cy, on .*batch 1: \"wrong sheet\"" ||
	check "undo: in the history" undone "$(run show $Q 00000000000000a3)"
run undo $Q --batch 1 --reviewer cy
check "undo twice: exit 1" 1 $?
grep -q "no decision of batch 1 stands" "$tmp/e" || check "undo twice: says why" "no decision" "$(cat "$tmp/e")"
run undo $Q --reviewer cy > /dev/null 2>&1
check "undo without --batch: usage" 2 $?

# --- rejections as noise: closed for good, and their words as lexicon lines
run reject $Q --reviewer bo --noise 00000000000000a4 00000000000000a5
run reject $Q --reviewer bo 00000000000000a6
run reject $Q --reviewer bo --noise 00000000000000a6
check "a rejection marked as noise later" 0 $?
sed 's/"postings":12,"occupation_postings":500/"postings":400,"occupation_postings":500/' "$tmp/week1.jsonl" > "$tmp/week2.jsonl"
run add $Q "$tmp/week2.jsonl"
grep -q "3 of those kept closed were rejected as noise" "$tmp/e" || check "noise: stays closed" "kept closed" "$(cat "$tmp/e")"
got=$(run list $Q --status rejected | cut -f1 | grep -c 00000000000000a4)
check "noise: a share that grew 30 times does not reopen it" 1 "$got"
run noise-words $Q --labels "$tmp/labels.tsv" --min-rejections 2 > "$tmp/words"
check "noise-words: exit 0" 0 $?
got=$(grep -v '^#' "$tmp/words" | tr '\t' ' ' | tr '\n' '|')
check "noise-words: shared words not in a label" "de zackzack -|" "$got"
grep -q "^# 3 of 3 rejections as noise$" "$tmp/words" || check "noise-words: the count" "3 of 3" "$(cat "$tmp/words")"
# the lines are a lexicon: the word goes from a title with --lexicons
mkdir -p "$tmp/lex/marketing"
cp "$tmp/words" "$tmp/lex/marketing/noise.txt"
got=$(printf 'Lagerhelfer zackzack (m/w/d)\n' | "$T" norm --lexicons "$tmp/lex" 2>> "$err")
check "noise-words lines read as a lexicon" lagerhelfer "$got"
before=$(printf 'Lagerhelfer zackzack (m/w/d)\n' | "$T" norm 2> /dev/null)
check "and the word is noise only with them" "lagerhelfer zackzack" "$before"

# --- stats --json: the same rows as the TSV, as JSON Lines
run stats $Q > "$tmp/stats.tsv"
run stats $Q --json > "$tmp/stats.jsonl"
got=$(/usr/bin/python3 - "$tmp/stats.tsv" "$tmp/stats.jsonl" <<'PY'
import csv, json, sys
rows = list(csv.DictReader(open(sys.argv[1], encoding="utf-8"), delimiter="\t"))
objs = [json.loads(l) for l in open(sys.argv[2], encoding="utf-8")]
ok = len(rows) == len(objs) and all(
    r["by"] == o["by"] and r["value"] == o["value"] and
    all(int(r[k]) == o[k] for k in ("items", "open", "accepted", "rejected", "deferred"))
    for r, o in zip(rows, objs))
print("ok" if ok else "differ %r %r" % (rows[:1], objs[:1]))
PY
)
check "stats --json: the TSV's rows" ok "$got"

# --- the store: reopen and undo in the event log too
if command -v redis-server > /dev/null; then
	redis_start "$tmp/r" || failures=$((failures + 1))
	S="--store unix:$tmp/r/sock --prefix rw"
	run add $S "$tmp/week1.jsonl"
	run reject $S --reviewer bo 00000000000000a2
	run reopen $S --reviewer ana 00000000000000a2
	printf 'id\tdecision\n00000000000000a3\taccept\n' > "$tmp/s.tsv"
	run decide $S --reviewer cy "$tmp/s.tsv"
	run undo $S --reviewer cy --batch 1
	check "store: undo" 0 $?
	got=$(redis-cli -s "$tmp/r/sock" XRANGE 'rw:{r}:log' - + | awk 'p == "event" && $0 != "added" { printf "%s ", $0 } { p = $0 }')
	check "store: the event log" "rejected reopened accepted undone " "$got"
	got=$(run list $S --status all | awk -F '\t' '$1 ~ /a[23]$/ { print $2 }' | tr '\n' ' ')
	check "store: open again" "open open " "$got"
	redis_stop "$tmp/r"
else
	echo "  notice: redis-server not found; the store checks of this suite are skipped"
fi

# every message starts with "titlemill review:" (a refusal's further
# lines are indented under it)
bad=$(grep -v '^titlemill review: \|^  ' "$err" | head -3)
check "every message starts with 'titlemill review:'" "" "$bad"
finish

#!/bin/sh
# titlemill review: the curators' queue, on a queue file and on a Redis
# store the suite starts itself.  The same sequence of commands runs on
# both and must give the same queue and the same exports; the SKOS export
# is read back with rdflib (Debian's python3-rdflib); the TSV delta, put
# into the labels, stops propose from suggesting what was accepted;
# rejections stay closed until the evidence changes (cumulative counts
# whose share stays put never reopen them); decisions made at
# once by several processes are all kept; a SIGKILL during a write
# leaves the old or the new queue; bad input changes nothing.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
root=$(cd "$(dirname "$0")/../.." && pwd)
labels=$root/examples/taxonomy.tsv

# a day of postings (the demo's generator, a smaller day) and its suggestions
/usr/bin/python3 "$root/tests/bench/gen_titles.py" --postings --count 40000 --seed 7 |
	awk -F '\t' 'NR == 1 || $3 == "en" || $3 == "de" || $3 == "fr"' > "$tmp/day.tsv"
"$T" tally --labels "$labels" -o "$tmp/day.counts.tsv" "$tmp/day.tsv" 2> /dev/null
"$T" propose --labels "$labels" "$tmp/day.counts.tsv" > "$tmp/sugg.jsonl" 2> /dev/null
nsugg=$(wc -l < "$tmp/sugg.jsonl")
[ "$nsugg" -ge 20 ] || check "enough suggestions to review" ">= 20" "$nsugg"
# the ids to decide on: the strongest new_alt_label and new_hidden_label
alt() { grep '"kind":"new_alt_label"' "$tmp/sugg.jsonl" | sed -n "$1p" | cut -c8-23; }
hid() { grep '"kind":"new_hidden_label"' "$tmp/sugg.jsonl" | sed -n "$1p" | cut -c8-23; }
A1=$(alt 1) A2=$(alt 2) A3=$(alt 3) A4=$(alt 4) A5=$(alt 5) A6=$(alt 6) A7=$(alt 7)
A8=$(alt 8) A9=$(alt 9) H1=$(hid 1) H2=$(hid 2)
[ "${#A1}" = 16 ] && [ "${#H2}" = 16 ] || check "ids of propose" "16 hex digits" "$A1 $H2"

# a week later, counts cumulative: every count three times what it was, so
# every share stays put, except A4's: its postings grow three times while
# its occupation's grow by half (its share doubles)
/usr/bin/python3 - "$tmp/sugg.jsonl" "$A4" > "$tmp/grown.jsonl" <<'PY'
import json, sys
src, a4 = sys.argv[1:3]
for line in open(src, encoding="utf-8"):
    s = json.loads(line)
    s["postings"] *= 3
    s["score"] *= 3
    for f in ("key_postings", "lang_postings"):
        if f in s:
            s[f] *= 3
    if s.get("competitor"):
        s["competitor"]["postings"] *= 3
    s["occupation_postings"] = s["occupation_postings"] * 3 // (2 if s["id"] == a4 else 1)
    s["share"] = s["postings"] / s["occupation_postings"]
    print(json.dumps(s, ensure_ascii=False))
PY

# sequence WHERE...: the same curators' week on a queue file or a store;
# writes its outputs to $tmp/$name.*
sequence() {
	name=$1; shift
	o=$tmp/$name
	TITLEMILL_NOW=2026-11-30T08:00:00Z "$T" review add "$@" "$tmp/sugg.jsonl" 2> "$o.add1"
	check "$name: add exits 0" 0 $?
	grep -q "$nsugg suggestions: $nsugg new" "$o.add1" || check "$name: all new" "$nsugg new" "$(cat "$o.add1")"
	# the same file again: nothing new, nothing duplicated
	TITLEMILL_NOW=2026-11-30T08:05:00Z "$T" review add "$@" "$tmp/sugg.jsonl" 2> "$o.add2"
	grep -q " 0 new, 0 with new evidence, $nsugg unchanged" "$o.add2" ||
		check "$name: the same suggestions again" "0 new, $nsugg unchanged" "$(cat "$o.add2")"
	n=$("$T" review list "$@" --status all | tail -n +2 | wc -l)
	check "$name: no duplicates" "$nsugg" "$n"

	export TITLEMILL_NOW=2026-12-01T09:00:00Z
	"$T" review accept "$@" --reviewer ana --note "seen in shops" "$A1" "$A2" "$A3" 2> "$o.e1"
	check "$name: accept" 0 $?
	"$T" review reject "$@" --reviewer bo --note "too generic" "$A4" "$(echo "$A5" | cut -c1-8)" 2> "$o.e2"
	check "$name: reject by a unique prefix" 0 $?
	"$T" review defer "$@" --reviewer bo "$A6" 2> /dev/null
	TITLEMILL_REVIEWER=cy "$T" review accept "$@" "$H1" "$H2" 2> /dev/null
	check "$name: reviewer from the environment" 0 $?
	printf 'id\tdecision\treviewer\tnote\n%s\taccept\tdu\tfrom the sheet\n%s\treject\tdu\t\n%s\tdefer\tdu\task the board\n' \
		"$A7" "$A8" "$A9" > "$tmp/batch.tsv"
	"$T" review decide "$@" "$tmp/batch.tsv" 2> "$o.e3"
	check "$name: batch" "0 titlemill review: 3 decisions recorded as batch 1 (titlemill review undo --batch 1 takes them back)" "$? $(cat "$o.e3")"

	# a second curator on a decided item is told, and nothing changes
	"$T" review list "$@" --status all --json > "$o.before"
	"$T" review reject "$@" --reviewer bo "$A1" 2> "$o.e4"
	check "$name: a decision on a decided item is refused" 1 $?
	grep -q "accepted by ana at 2026-12-01T09:00:00Z" "$o.e4" || check "$name: says who decided" "accepted by ana" "$(cat "$o.e4")"
	"$T" review list "$@" --status all --json | cmp -s - "$o.before" || check "$name: refused changes nothing" same differ
	"$T" review accept "$@" --reviewer bo "$A1" 2> "$o.e5"
	check "$name: the same decision again is fine" 0 $?
	grep -q "already accepted by ana" "$o.e5" || check "$name: and says so" "already accepted by ana" "$(cat "$o.e5")"
	TITLEMILL_NOW=2026-12-01T10:00:00Z "$T" review reject "$@" --overrule --reviewer ana --note "on second thought" "$A2" 2> /dev/null
	check "$name: overrule" 0 $?
	# a batch with an unknown id on line 3 or a bad word on line 2: all or nothing
	printf 'id\tdecision\treviewer\n%s\treject\tdu\t\nffffffffffffffff\taccept\tdu\n' "$A6" > "$tmp/bad1.tsv"
	"$T" review decide "$@" "$tmp/bad1.tsv" 2> "$o.e6"
	check "$name: unknown id refused" 1 $?
	grep -q "bad1.tsv:3: no suggestion ffffffffffffffff" "$o.e6" || check "$name: names the line" "bad1.tsv:3: no suggestion" "$(cat "$o.e6")"
	printf 'id\tdecision\treviewer\n%s\tapprove\tdu\n%s\treject\tdu\n' "$A6" "$A3" > "$tmp/bad2.tsv"
	"$T" review decide "$@" "$tmp/bad2.tsv" 2> "$o.e7"
	check "$name: bad decision word refused" 1 $?
	grep -q "bad2.tsv:2: the decision is accept, reject or defer, not 'approve'" "$o.e7" ||
		check "$name: names the word and line" "bad2.tsv:2 ... 'approve'" "$(cat "$o.e7")"
	"$T" review list "$@" --status all --json > "$o.after"
	st=$(grep -c "\"id\":\"$A6\",[^}]*\"status\":\"deferred\"" "$o.after")
	check "$name: the good line of a refused batch is not applied" 1 "$st"

	# next week: the rejected stay closed; with cumulative counts three
	# times larger they still do (the share has not moved), but A4, whose
	# share doubled, reopens
	TITLEMILL_NOW=2026-12-07T08:00:00Z "$T" review add "$@" "$tmp/sugg.jsonl" 2> "$o.add3"
	grep -q "4 rejected before and kept closed" "$o.add3" || check "$name: rejections stay closed" "4 kept closed" "$(cat "$o.add3")"
	TITLEMILL_NOW=2026-12-08T08:00:00Z "$T" review add "$@" "$tmp/grown.jsonl" 2> "$o.add4"
	grep -q "1 reopened, 3 rejected before and kept closed, 5 accepted before" "$o.add4" ||
		check "$name: only the share that grew reopens" "1 reopened, 3 kept closed, 5 accepted" "$(cat "$o.add4")"
	"$T" review show "$@" "$A4" > "$o.show"
	grep -q "reopened  on .* (the share grew: .* lower bound .* above .*, the upper bound at the rejection" "$o.show" &&
		grep -q "before: " "$o.show" && grep -q "now: " "$o.show" ||
		check "$name: show gives the old and the new evidence" "reopened, before, now" "$(cat "$o.show")"
	"$T" review list "$@" --status open --kind new_alt_label | cut -f1 | grep -qx "$A4" ||
		check "$name: reopened is open" open "not listed"

	"$T" review list "$@" --status all --json > "$o.queue"
	"$T" review list "$@" --status all > "$o.list"
	"$T" review export "$@" > "$o.delta.tsv"
	"$T" review export "$@" --format turtle > "$o.ttl"
	"$T" review export "$@" --format ntriples -o "$o.nt"
	"$T" review stats "$@" > "$o.stats"
	unset TITLEMILL_NOW
}

sequence file --queue "$tmp/q.jsonl"
st=$(awk -F '\t' '$1 == "all" { print $4, $5, $6, $7 }' "$tmp/file.stats")
check "stats: open accepted rejected deferred" "$((nsugg - 10)) 5 3 2" "$st"
rate=$(awk -F '\t' '$1 == "kind" && $2 == "new_hidden_label" { print $8 }' "$tmp/file.stats")
check "stats: acceptance rate of hidden labels" "1.0000" "$rate"

# the SKOS export holds exactly the accepted alternative and hidden labels
# (rdflib parses it; the expected set comes from the queue's JSON)
/usr/bin/python3 - "$tmp/file.queue" "$tmp/file.ttl" "$tmp/file.nt" <<'PY' > "$tmp/rdf.out" 2>&1
import json, sys
import rdflib
SKOS = "http://www.w3.org/2004/02/skos/core#"
want = set()
for line in open(sys.argv[1], encoding="utf-8"):
    it = json.loads(line)
    if it["status"] != "accepted" or it["kind"] not in ("new_alt_label", "new_hidden_label"):
        continue
    p = SKOS + ("altLabel" if it["kind"] == "new_alt_label" else "hiddenLabel")
    # the label as the postings write it, when propose found it so
    text = it["evidence"].get("label_as_written", it["label"])
    want.add((it["occupation"], p, text, it["lang"]))
for path, fmt in ((sys.argv[2], "turtle"), (sys.argv[3], "nt")):
    g = rdflib.Graph()
    g.parse(path, format=fmt)
    got = set((str(s), str(p), str(o), o.language) for s, p, o in g)
    if got != want or len(want) != 5:
        print(fmt, "want", sorted(want), "got", sorted(got))
        sys.exit(1)
print("ok", len(want))
PY
check "rdflib reads exactly the accepted labels" "ok 5" "$(cat "$tmp/rdf.out")"

# --case clean exports the clean titles, which are the queue's labels
"$T" review export --queue "$tmp/q.jsonl" --case clean | awk -F '\t' 'NR > 1 && $5 == "add" { print $6 "\t" $4 }' | sort > "$tmp/clean.tsv"
"$T" review list --queue "$tmp/q.jsonl" --status accepted | awk -F '\t' 'NR > 1 && $3 ~ /^new_/ { print $1 "\t" $7 }' | sort > "$tmp/clean.want"
cmp -s "$tmp/clean.tsv" "$tmp/clean.want" || check "--case clean: the clean titles" "$(cat "$tmp/clean.want")" "$(cat "$tmp/clean.tsv")"
grep -q "	Einzelhandelskaufmann	add	" "$tmp/file.delta.tsv" || check "the label as postings write it" Einzelhandelskaufmann "$(cut -f4 "$tmp/file.delta.tsv")"

# the delta's additions put into the labels: propose no longer suggests them
awk -F '\t' 'NR > 1 && $5 == "add" { print $1 "\t" $2 "\t" $3 "\t" $4 }' "$tmp/file.delta.tsv" > "$tmp/add.tsv"
check "delta: 5 additions" 5 "$(wc -l < "$tmp/add.tsv")"
check "delta: reviewer and note kept" 2 "$(grep -c "	ana	2026-12-01T09:00:00Z	seen in shops	" "$tmp/file.delta.tsv")"
cat "$labels" "$tmp/add.tsv" > "$tmp/labels2.tsv"
"$T" propose --labels "$tmp/labels2.tsv" "$tmp/day.counts.tsv" > "$tmp/sugg2.jsonl" 2> /dev/null
again=0
for id in $(awk -F '\t' 'NR > 1 && $5 == "add" { print $6 }' "$tmp/file.delta.tsv"); do
	grep -q "\"id\":\"$id\"" "$tmp/sugg2.jsonl" && again=$((again + 1))
done
check "accepted labels are not suggested again" 0 "$again"
others=$(grep -c . "$tmp/sugg2.jsonl")
[ "$others" -ge $((nsugg - 10)) ] || check "the other suggestions stay" ">= $((nsugg - 10))" "$others"

# the same week on a Redis store: the same queue, the same exports
if ! command -v redis-server > /dev/null; then
	echo "  notice: redis-server not found; the store half of this suite is skipped"
else
	redis_start "$tmp/r" || failures=$((failures + 1))
	S="--store unix:$tmp/r/sock --prefix rv"
	# shellcheck disable=SC2086
	sequence redis $S
	for x in queue list delta.tsv ttl nt stats show; do
		cmp -s "$tmp/file.$x" "$tmp/redis.$x" || check "file and store agree on $x" same differ
	done
	n=$(redis-cli -s "$tmp/r/sock" XLEN 'rv:{r}:log')
	# events: adds, 3+2+1+2+3 decisions, an overrule, the refreshes and
	# the reopening of the grown week
	fresh=$(sed -n 's/.* \([0-9]*\) with new evidence.*/\1/p' "$tmp/redis.add4")
	check "store: one stream entry per event" "$((nsugg + 13 + fresh))" "$n"
	re=$(redis-cli -s "$tmp/r/sock" XRANGE 'rv:{r}:log' - + | grep -cx reopened)
	check "store: the stream holds the reopening" 1 "$re"
fi

# several curators at once: every decision kept (file, then store)
concurrent() {
	name=$1; shift
	TITLEMILL_NOW=2026-11-30T08:00:00Z "$T" review add "$@" "$tmp/sugg.jsonl" 2> /dev/null
	grep -o '"id":"[0-9a-f]*"' "$tmp/sugg.jsonl" | cut -c7-22 | head -40 > "$tmp/ids"
	for w in 0 1 2 3; do
		(awk -v w=$w 'NR % 4 == w' "$tmp/ids" | while read -r id; do
			"$T" review accept "$@" --reviewer "r$w" "$id" 2> /dev/null || echo "fail $id"
		done) > "$tmp/w$w" &
	done
	wait
	check "$name: no worker failed" "" "$(cat "$tmp"/w0 "$tmp"/w1 "$tmp"/w2 "$tmp"/w3)"
	n=$("$T" review list "$@" --status accepted | tail -n +2 | wc -l)
	check "$name: 40 decisions by 4 processes at once, all kept" 40 "$n"
	# two curators on the same item at once: one wins, the other is told
	id=$(grep -o '"id":"[0-9a-f]*"' "$tmp/sugg.jsonl" | cut -c7-22 | sed -n 41p)
	"$T" review accept "$@" --reviewer ana "$id" 2> "$tmp/c1" & p1=$!
	"$T" review reject "$@" --reviewer bo "$id" 2> "$tmp/c2" & p2=$!
	wait $p1; r1=$?
	wait $p2; r2=$?
	check "$name: exactly one of two wins" "1" "$(( (r1 == 0) + (r2 == 0) ))"
	st=$("$T" review list "$@" --status all | awk -F '\t' -v id="$id" '$1 == id { print $2 }')
	want=$([ $r1 = 0 ] && echo accepted || echo rejected)
	check "$name: the winner's decision stands" "$want" "$st"
	grep -q "not changed to" "$tmp/c1" "$tmp/c2" || check "$name: the loser is told" told silent
}
concurrent file --queue "$tmp/qc.jsonl"
if command -v redis-server > /dev/null; then
	concurrent redis --store "unix:$tmp/r/sock" --prefix rc
	redis_stop "$tmp/r"
fi

# a SIGKILL at any moment of a write leaves the old queue or the new one
/usr/bin/python3 - "$tmp/sugg.jsonl" > "$tmp/many.jsonl" <<'PY'
import json, sys
base = [json.loads(l) for l in open(sys.argv[1], encoding="utf-8")]
for i in range(20000):
    s = dict(base[i % len(base)])
    s["id"] = "%016x" % (0x1000000 + i)
    s["label"] = "%s %d" % (s["label"], i)
    print(json.dumps(s, ensure_ascii=False))
PY
TITLEMILL_NOW=2026-11-30T08:00:00Z "$T" review add --queue "$tmp/k.jsonl" "$tmp/many.jsonl" 2> /dev/null
head -1 "$tmp/sugg.jsonl" > "$tmp/one.jsonl"
cp "$tmp/k.jsonl" "$tmp/before.jsonl"
cp "$tmp/k.jsonl" "$tmp/k2.jsonl"
TITLEMILL_NOW=2026-11-30T09:00:00Z "$T" review add --queue "$tmp/k2.jsonl" "$tmp/one.jsonl" 2> /dev/null
mv "$tmp/k2.jsonl" "$tmp/after.jsonl"
cmp -s "$tmp/before.jsonl" "$tmp/after.jsonl" && check "kill test: the write changes the file" differ same
torn=0 old=0 new=0
for d in 0.02 0.05 0.08 0.11 0.14 0.17 0.2 0.25 0.3 0.35 0.4 0.5; do
	TITLEMILL_NOW=2026-11-30T09:00:00Z "$T" review add --queue "$tmp/k.jsonl" "$tmp/one.jsonl" 2> /dev/null &
	pid=$!
	sleep $d
	kill -9 $pid 2> /dev/null
	wait $pid 2> /dev/null
	if cmp -s "$tmp/k.jsonl" "$tmp/before.jsonl"; then
		old=$((old + 1))
	elif cmp -s "$tmp/k.jsonl" "$tmp/after.jsonl"; then
		new=$((new + 1))
		cp "$tmp/before.jsonl" "$tmp/k.jsonl"
	else
		torn=$((torn + 1))
		cp "$tmp/before.jsonl" "$tmp/k.jsonl"
	fi
	"$T" review list --queue "$tmp/k.jsonl" --limit 1 > /dev/null 2>&1 || torn=$((torn + 1))
done
check "SIGKILL mid-write: never a torn queue (old $old, new $new)" 0 "$torn"

# bad input: a clear message with file:line, and nothing changed
q=$tmp/q.jsonl
cp "$q" "$tmp/q.saved"
{ head -2 "$tmp/sugg.jsonl"; echo '{"id":"abc", "kind":'; } > "$tmp/broken.jsonl"
"$T" review add --queue "$q" "$tmp/broken.jsonl" 2> "$tmp/e"
check "malformed propose line: exit 1" 1 $?
grep -q "broken.jsonl:3: not a suggestion" "$tmp/e" || check "malformed line named" "broken.jsonl:3" "$(cat "$tmp/e")"
# a queue line edited by hand with a TAB inside a field: list keeps its
# 22 columns (the TAB is written as a space)
head -1 "$q" | sed 's/"label":"[^"]*"/"label":"tab\\there"/' > "$tmp/tab.jsonl"
got=$("$T" review list --queue "$tmp/tab.jsonl" --status all | awk -F '\t' '{ print NF }' | sort -u)
check "a TAB inside a field does not shift list's columns" 22 "$got"
printf '{"id":"00000000000000aa","kind":"new_label","occupation":"x","lang":"en","label":"y","score":1,"postings":1}\n' > "$tmp/kind.jsonl"
"$T" review add --queue "$q" "$tmp/kind.jsonl" 2> "$tmp/e"
grep -q 'kind.jsonl:1: "kind" must be one of new_alt_label' "$tmp/e" || check "unknown kind named" "kind.jsonl:1" "$(cat "$tmp/e")"
printf '{"id":"00000000000000ab","kind":"rare_label","occupation":"x","lang":"en","label":"y","score":1,"postings":-4}\n' > "$tmp/neg.jsonl"
"$T" review add --queue "$q" "$tmp/neg.jsonl" 2> "$tmp/e"
grep -q 'neg.jsonl:1: "postings" must be a whole number' "$tmp/e" || check "negative count named" "neg.jsonl:1" "$(cat "$tmp/e")"
cmp -s "$q" "$tmp/q.saved" || check "bad suggestions change nothing" same differ
"$T" review accept --queue "$q" --reviewer ana 0123456789abcdef 2> "$tmp/e"
check "unknown id: exit 1" 1 $?
grep -q "no suggestion 0123456789abcdef in the queue" "$tmp/e" || check "unknown id named" "no suggestion" "$(cat "$tmp/e")"
"$T" review accept --queue "$q" "$A6" > /dev/null 2>&1
check "no reviewer: usage error" 2 $?
"$T" review list --queue "$q" --reviewer x > /dev/null 2>&1
check "an option of another subcommand: usage error" 2 $?
"$T" review list --queue "$tmp/none.jsonl" 2> "$tmp/e"
check "missing queue: exit 1" 1 $?
grep -q "none.jsonl: no review queue here" "$tmp/e" || check "missing queue named" "no review queue here" "$(cat "$tmp/e")"
# a queue written by a newer version: an unknown status is reported
# with file:line, the item kept as it was and never decided; the other
# items are read and decided as ever
sed '2s/"status":"[a-z]*"/"status":"maybe"/' "$tmp/q.saved" > "$q"
id2=$(sed -n '2s/^{"id":"\([0-9a-f]*\)".*/\1/p' "$q")
id3=$(sed -n '3s/^{"id":"\([0-9a-f]*\)".*/\1/p' "$q")
sed -n 2p "$q" > "$tmp/line2"
"$T" review list --queue "$q" --status all > "$tmp/l" 2> "$tmp/e"
check "unknown status: list exits 0" 0 $?
grep -q "q.jsonl:2: the status \"maybe\" is unknown to this version" "$tmp/e" ||
	check "unknown status: file and line" "q.jsonl:2" "$(cat "$tmp/e")"
check "unknown status: the item is listed with it" maybe "$(awk -F '\t' -v i="$id2" '$1 == i { print $2 }' "$tmp/l")"
"$T" review accept --queue "$q" --reviewer ana --overrule "$id2" 2> "$tmp/e"
check "unknown status: never decided" 1 $?
grep -q "unknown to this version of titlemill; not changed" "$tmp/e" ||
	check "unknown status: says why" "unknown" "$(cat "$tmp/e")"
"$T" review add --queue "$q" "$tmp/grown.jsonl" 2> "$tmp/e"
check "unknown status: add still works" 0 $?
grep -q "1 left alone: their status is unknown" "$tmp/e" || check "unknown status: add says so" "1 left alone" "$(cat "$tmp/e")"
sed -n 2p "$q" | cmp -s - "$tmp/line2" || check "unknown status: the item's line is kept as it was" same differ
"$T" review defer --queue "$q" --reviewer ana --overrule "$id3" 2> /dev/null
check "unknown status: the other items are decided" 0 $?
# members this version does not know survive a change of their item
cp "$tmp/q.saved" "$q"
sed "3s/}\$/,\"x_team\":{\"desk\":\"Nordhafen\"}}/; 3s/\"history\":\[{/\"history\":[{\"x_via\":\"board\",/" "$q" > "$tmp/q.x"
mv "$tmp/q.x" "$q"
"$T" review reject --queue "$q" --reviewer bo --overrule "$id3" 2> "$tmp/e"
check "unknown members: the item changes" 0 $?
grep "\"id\":\"$id3\"" "$q" | grep -q '"status":"rejected".*"x_via":"board".*,"x_team":{"desk":"Nordhafen"}}$' ||
	check "unknown members survive the change" kept "$(grep "\"id\":\"$id3\"" "$q" | cut -c1-300)"
# one line that cannot be read: reported with its line, kept, the rest
# of the queue read and changed; no export; repair moves it aside
cp "$tmp/q.saved" "$q"
sed -i '4a{"id":"00000000000000ff","seq":' "$q"
sed -n 5p "$q" > "$tmp/line5"
"$T" review list --queue "$q" > /dev/null 2> "$tmp/e"
check "unreadable line: list exits 0" 0 $?
grep -q "q.jsonl:5: not a queue item" "$tmp/e" || check "unreadable line: file and line" "q.jsonl:5" "$(cat "$tmp/e")"
grep -q "review repair" "$tmp/e" || check "unreadable line: repair is offered" "review repair" "$(cat "$tmp/e")"
"$T" review defer --queue "$q" --reviewer ana --overrule "$id3" 2> /dev/null
check "unreadable line: a decision is recorded" 0 $?
sed -n 5p "$q" | cmp -s - "$tmp/line5" || check "unreadable line: kept in its place" same differ
"$T" review export --queue "$q" > "$tmp/x" 2> "$tmp/e"
check "unreadable line: no export" 1 $?
"$T" review repair --queue "$q" 2> "$tmp/e"
check "repair: exit 0" 0 $?
grep -q "1 unreadable line moved to .*q.jsonl.rejected" "$tmp/e" || check "repair: says what" "moved" "$(cat "$tmp/e")"
cmp -s "$q.rejected" "$tmp/line5" || check "repair: the line is in the rejected file" same differ
grep -c '' "$q" > "$tmp/n"
check "repair: the queue lost only that line" "$(grep -c '' "$tmp/q.saved")" "$(cat "$tmp/n")"
"$T" review list --queue "$q" > /dev/null 2> "$tmp/e"
check "repair: the queue reads without a warning" "" "$(cat "$tmp/e")"
"$T" review export --queue "$q" > /dev/null 2>&1
check "repair: export works again" 0 $?
"$T" review repair --queue "$q" 2> "$tmp/e"
grep -q "nothing to do" "$tmp/e" || check "repair of a sound queue: nothing to do" "nothing to do" "$(cat "$tmp/e")"
echo 'not json' >> "$q"
"$T" review repair --queue "$q" 2> /dev/null
printf '%s\nnot json\n' "$(cat "$tmp/line5")" | cmp -s - "$q.rejected" ||
	check "repair appends to the rejected file" appended "$(cat "$q.rejected")"
printf 'id\tverdict\n' > "$tmp/nocol.tsv"
"$T" review decide --queue "$tmp/q.saved" --reviewer ana "$tmp/nocol.tsv" 2> "$tmp/e"
grep -q "nocol.tsv:1: a decisions file needs the columns id, decision" "$tmp/e" ||
	check "decisions without columns" "nocol.tsv:1" "$(cat "$tmp/e")"
TITLEMILL_NOW=yesterday "$T" review list --queue "$tmp/q.saved" > /dev/null 2>&1
check "a bad TITLEMILL_NOW: usage error" 2 $?
# a full disk: a clear message, exit 1, no queue and no temporary left
mkdir -p "$tmp/full"
if mount -t tmpfs -o size=64k tmpfs "$tmp/full" 2> /dev/null; then
	"$T" review add --queue "$tmp/full/q.jsonl" "$tmp/sugg.jsonl" 2> "$tmp/e"
	check "full disk: exit 1" 1 $?
	grep -q "q.jsonl: cannot write: No space left on device (the queue is unchanged)" "$tmp/e" ||
		check "full disk: says so" "No space left" "$(cat "$tmp/e")"
	check "full disk: nothing left behind" "q.jsonl.lock" "$(ls "$tmp/full")"
	umount "$tmp/full"
else
	echo "  notice: cannot mount a small tmpfs here; the full-disk check is skipped"
fi

# occupation ids that are not IRIs need --base for SKOS
printf '{"id":"00000000000000ac","kind":"new_alt_label","occupation":"5223","lang":"de","label":"verkäufer","score":9,"postings":9}\n' > "$tmp/plain.jsonl"
"$T" review add --queue "$tmp/p.jsonl" "$tmp/plain.jsonl" 2> /dev/null
"$T" review accept --queue "$tmp/p.jsonl" --reviewer ana 00000000000000ac 2> /dev/null
"$T" review export --queue "$tmp/p.jsonl" --format turtle > /dev/null 2> "$tmp/e"
check "a plain occupation id without --base: exit 1" 1 $?
grep -q "occupation '5223' is not an IRI; give --base" "$tmp/e" || check "and says why" "--base" "$(cat "$tmp/e")"
got=$("$T" review export --queue "$tmp/p.jsonl" --format ntriples --base "http://example.org/occ/" | grep -v '^#')
check "--base makes the IRI" '<http://example.org/occ/5223> <http://www.w3.org/2004/02/skos/core#altLabel> "verkäufer"@de .' "$got"

finish

#!/bin/sh
# titlemill review: what reaches the delta.  No string a suggestion, a
# decision or a hand-edited queue brings can add a row to the TSV delta
# or a statement to the Turtle and N-Triples exports: review add and the
# decisions refuse such fields with file:line and change nothing; export
# refuses to write an accepted item that holds one (a queue written by an
# older version or edited by hand) and writes nothing.  What is accepted
# comes back exactly: the TSV through Python's csv module, the SKOS
# through rdflib (Debian's python3-rdflib), here on chosen strings and in
# delta_hostile.py on a few hundred generated ones.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")" && pwd)
export TITLEMILL_NOW=2026-12-01T09:00:00Z
O=http://data.valdoria.example/occupation

# sugg ID FIELDS: one propose line with the given extra JSON fields
sugg() {
	printf '{"id":"%s","kind":"new_alt_label","score":9,"postings":9,%s}\n' "$1" "$2"
}
ok_fields="\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"lagerist\""

# refused NAME FIELD JSON-FIELDS: review add refuses the line, names
# file:1 and the field, and leaves no queue behind
refused() {
	name=$1 field=$2
	rm -f "$tmp/r.jsonl" "$tmp/r.jsonl.lock"
	sugg 00000000000000d1 "$3" > "$tmp/in.jsonl"
	"$T" review add --queue "$tmp/r.jsonl" "$tmp/in.jsonl" 2> "$tmp/e"
	check "$name: add exits 1" 1 $?
	grep -q "in.jsonl:1: \"$field\" .*; nothing changed" "$tmp/e" ||
		check "$name: file:line and field named" "in.jsonl:1: \"$field\"" "$(cat "$tmp/e")"
	[ ! -e "$tmp/r.jsonl" ] || check "$name: no queue written" "no queue" "$(head -c 300 "$tmp/r.jsonl")"
}

# a tab and a line end in the label: a forged row in the TSV delta
refused "label with a tab and a line end" label \
	"\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"koch\\t$O/666\\thidden\\nforged\""
# the label as postings write it, with a line end
refused "label_as_written with a line end" label_as_written \
	"$ok_fields,\"label_as_written\":\"Lagerist\\n$O/666\\talt\\tde\\tforged\""
# a line end in lang: statements of one's own in Turtle and N-Triples
refused "lang with a line end and a statement" lang \
	"\"occupation\":\"$O/5223\",\"label\":\"lagerist\",\"lang\":\"de .\\n<http://evil.example/s> <http://evil.example/p> <http://evil.example/o> .\\n#\""
refused "lang with a space" lang "\"occupation\":\"$O/5223\",\"label\":\"lagerist\",\"lang\":\"de AT\""
refused "lang not BCP 47" lang "\"occupation\":\"$O/5223\",\"label\":\"lagerist\",\"lang\":\"de-\""
# a tab in the occupation: a shifted row; a '>' and spaces: an IRI left early
refused "occupation with a tab" occupation "\"occupation\":\"$O/5223\\tx\",\"lang\":\"de\",\"label\":\"lagerist\""
refused "occupation that closes its IRI" occupation \
	"\"occupation\":\"$O/1> <http://evil.example/p> \\\"x\\\" . <$O/2\",\"lang\":\"de\",\"label\":\"lagerist\""
# line ends that are not ASCII: NEL, LINE SEPARATOR, PARAGRAPH SEPARATOR
refused "label with NEL" label "\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"a\\u0085b\""
refused "label with U+2028" label "\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"a\\u2028b\""
refused "label with U+2029" label "\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"a\\u2029b\""
refused "label with a carriage return" label "\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"a\\rb\""
# the competitor goes into the reason column and into a Turtle comment
refused "competitor with a line end" competitor.occupation \
	"$ok_fields,\"competitor\":{\"occupation\":\"$O/1\\n<http://evil.example/s> <http://evil.example/p> <http://evil.example/o> .\",\"postings\":3}"
# an id with a tab: the id column shifted
rm -f "$tmp/r.jsonl"
printf '{"id":"00000000000000d1\\tx","kind":"new_alt_label","score":9,"postings":9,%s}\n' "$ok_fields" > "$tmp/in.jsonl"
"$T" review add --queue "$tmp/r.jsonl" "$tmp/in.jsonl" 2> "$tmp/e"
grep -q 'in.jsonl:1: "id" holds a character other than printable ASCII; nothing changed' "$tmp/e" ||
	check "id with a tab: refused and named" 'in.jsonl:1: "id"' "$(cat "$tmp/e")"
long=$(printf '%0513d' 0)
refused "label of 513 bytes" label "\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"$long\""

# several bad lines: each named, nothing changed (all or nothing)
rm -f "$tmp/r.jsonl"
{ sugg 00000000000000d2 "$ok_fields"
  sugg 00000000000000d3 "\"occupation\":\"$O/5223\",\"lang\":\"de\\n\",\"label\":\"x\""
  sugg 00000000000000d4 "$ok_fields"
  sugg 00000000000000d5 "\"occupation\":\"$O/5223\",\"lang\":\"de\",\"label\":\"x\\ty\""; } > "$tmp/in.jsonl"
"$T" review add --queue "$tmp/r.jsonl" "$tmp/in.jsonl" 2> "$tmp/e"
check "two bad lines of four: exit 1" 1 $?
check "two bad lines of four: both named" "in.jsonl:2 in.jsonl:4" \
	"$(grep -o 'in.jsonl:[0-9]*' "$tmp/e" | tr '\n' ' ' | sed 's/ $//')"
grep -q "2 bad suggestions; nothing changed" "$tmp/e" || check "and counted" "2 bad suggestions" "$(cat "$tmp/e")"
[ ! -e "$tmp/r.jsonl" ] || check "two bad lines of four: no queue" "no queue" present

# decisions: reviewer names and notes with line ends are refused
q=$tmp/q.jsonl
{ sugg 00000000000000e1 "$ok_fields"; sugg 00000000000000e2 "\"occupation\":\"$O/7\",\"lang\":\"en\",\"label\":\"picker\""; } > "$tmp/in.jsonl"
"$T" review add --queue "$q" "$tmp/in.jsonl" 2> /dev/null
check "good suggestions: add exits 0" 0 $?
cp "$q" "$tmp/q.saved"
printf 'id\tdecision\treviewer\tnote\n00000000000000e1\taccept\tana\tfine\n00000000000000e2\taccept\tbo\342\200\250forged\t\n' > "$tmp/d.tsv"
"$T" review decide --queue "$q" "$tmp/d.tsv" 2> "$tmp/e"
check "reviewer with U+2028 in a batch: exit 1" 1 $?
grep -q "d.tsv:3: the reviewer holds U+2028" "$tmp/e" || check "and named" "d.tsv:3: the reviewer" "$(cat "$tmp/e")"
printf 'id\tdecision\treviewer\tnote\n00000000000000e1\taccept\tana\ta\302\205b\n' > "$tmp/d.tsv"
"$T" review decide --queue "$q" "$tmp/d.tsv" 2> "$tmp/e"
grep -q "d.tsv:2: the note holds U+0085" "$tmp/e" || check "note with NEL in a batch" "d.tsv:2: the note" "$(cat "$tmp/e")"
"$T" review accept --queue "$q" --reviewer ana --note "$(printf 'a\342\200\251b')" 00000000000000e1 2> "$tmp/e"
check "--note with U+2029: usage error" 2 $?
"$T" review accept --queue "$q" --reviewer "$(printf 'ana\302\205')" 00000000000000e1 2> "$tmp/e"
check "--reviewer with NEL: usage error" 2 $?
"$T" review accept --queue "$q" --reviewer "$(printf '%0129d' 0)" 00000000000000e1 2> "$tmp/e"
check "--reviewer of 129 bytes: usage error" 2 $?
cmp -s "$q" "$tmp/q.saved" || check "refused decisions change nothing" same differ

# a queue edited by hand (or written by an older version) with the same
# injections: export names each item, writes nothing, exits 1
"$T" review accept --queue "$q" --reviewer ana 00000000000000e1 00000000000000e2 2> /dev/null
/usr/bin/python3 - "$q" > "$tmp/hand.jsonl" <<'PY'
import json, sys
lines = [json.loads(l) for l in open(sys.argv[1], encoding="utf-8")]
evil = "<http://evil.example/s> <http://evil.example/p> <http://evil.example/o> ."
for it in lines:
    if it["id"] == "00000000000000e1":
        it["lang"] = "de .\n" + evil + "\n#"
    else:
        it["label"] = it["evidence"]["label"] = "picker\thttp://x\talt\ten\tforged\n"
    print(json.dumps(it, ensure_ascii=False))
PY
for f in tsv turtle ntriples; do
	rm -f "$tmp/out"
	"$T" review export --queue "$tmp/hand.jsonl" --format "$f" -o "$tmp/out" 2> "$tmp/e"
	check "hand-edited queue, $f: export exits 1" 1 $?
	grep -q 'accepted suggestion 00000000000000e1: "lang" ' "$tmp/e" &&
		grep -q 'accepted suggestion 00000000000000e2: "label" holds U+0009' "$tmp/e" &&
		grep -q "export refused, nothing written: 2 accepted suggestions" "$tmp/e" ||
		check "hand-edited queue, $f: each item named" "e1 lang, e2 label" "$(cat "$tmp/e")"
	[ ! -e "$tmp/out" ] || check "hand-edited queue, $f: nothing written" absent "$(cat "$tmp/out")"
done
# rejected with --overrule, the items leave the delta and export works again
TITLEMILL_NOW=2026-12-01T10:00:00Z "$T" review reject --queue "$tmp/hand.jsonl" --overrule \
	--reviewer ana --note "fields broken" 00000000000000e1 00000000000000e2 2> /dev/null
"$T" review export --queue "$tmp/hand.jsonl" > "$tmp/out" 2> "$tmp/e"
check "after the rejection: export exits 0" 0 $?
check "after the rejection: an empty delta" 1 "$(wc -l < "$tmp/out")"

# strings that are legal but special in the formats come back exactly
q=$tmp/legal.jsonl
/usr/bin/python3 - "$O" > "$tmp/legal-in.jsonl" <<'PY'
import json, sys
O = sys.argv[1]
labels = ['Koch "Chef"', 'back\\slash', '"""', "it's", "#1 @home", "<b>", "a ; b .", "x^^y",
          "K\u00f6chin", "\u202eevil", "\ufeffbom", "e\u0301", "\U0001F468\u200d\U0001F373", "a,b", "'''",
          'ata.valdor""', 'K "C"\\']
occs = [O + "/5223", O + "/K%C3%B6chin", O + "/a?x=1&y=[2]#f", "urn:x-valdoria:occ:7",
        O + "/K\u00f6chin", O + "/(1)!$*+,;=~@:"]
langs = ["de", "de-AT", "zh-Hant-TW", "sl-rozaj-biske", "en-US-x-twain", "i-klingon", "DE-at"]
for i, lab in enumerate(labels):
    s = {"id": "%016x" % (0xf00 + i), "kind": "new_hidden_label" if i % 3 == 0 else "new_alt_label",
         "occupation": occs[i % len(occs)], "lang": langs[i % len(langs)], "label": lab.lower(),
         "label_as_written": lab, "score": 9, "postings": 9}
    print(json.dumps(s, ensure_ascii=i % 2 == 0))
PY
"$T" review add --queue "$q" "$tmp/legal-in.jsonl" 2> "$tmp/e"
check "legal special strings: add exits 0" 0 $?
"$T" review accept --queue "$q" --reviewer "Ana \"Q\" O'Neil" --note 'a\tb "quoted" \\' \
	$(/usr/bin/python3 -c 'import json,sys; [print(json.loads(l)["id"]) for l in open(sys.argv[1])]' "$tmp/legal-in.jsonl") 2> /dev/null
check "legal special strings: accept exits 0" 0 $?
"$T" review export --queue "$q" > "$tmp/legal.tsv" &&
	"$T" review export --queue "$q" --format turtle > "$tmp/legal.ttl" &&
	"$T" review export --queue "$q" --format ntriples > "$tmp/legal.nt"
check "legal special strings: export exits 0" 0 $?
/usr/bin/python3 "$here/delta_hostile.py" --check "$q" "$tmp/legal.tsv" "$tmp/legal.ttl" "$tmp/legal.nt" > "$tmp/pb" 2>&1
check "legal special strings: csv and rdflib read back exactly the accepted items" "ok 17 rows 17 triples" "$(cat "$tmp/pb")"
# our own SKOS reader (serd) reads the Turtle export back, labels that
# end in two quotes included (serd reads no long string where a quote
# meets an escape, so the export writes short strings)
printf '%s\n' '{"id":"00000000000000f1","kind":"new_alt_label","occupation":"http://data.valdoria.example/occupation/1","lang":"de","label":"fahrer","label_as_written":"Fahrer \"\"","score":9,"postings":9}' \
	'{"id":"00000000000000f2","kind":"new_alt_label","occupation":"http://data.valdoria.example/occupation/2","lang":"de","label":"lagerist nord","label_as_written":"Lagerist \"Nord\"\"","score":9,"postings":9}' > "$tmp/quotes.jsonl"
"$T" review add --queue "$tmp/quotes.q" "$tmp/quotes.jsonl" 2> /dev/null &&
	"$T" review accept --queue "$tmp/quotes.q" --reviewer ana 00000000000000f1 00000000000000f2 2> /dev/null &&
	"$T" review export --queue "$tmp/quotes.q" --format turtle -o "$tmp/quotes.ttl"
check "labels ending in two quotes: exported" 0 $?
"$T" labels "$tmp/quotes.ttl" > "$tmp/quotes.back" 2> "$tmp/e"
check "labels ending in two quotes: the Turtle reads back through titlemill labels" '0 Fahrer ""|Lagerist "Nord""' \
	"$? $(tail -n +2 "$tmp/quotes.back" | cut -f4 | sort | paste -sd '|')"

# a few hundred generated hostile strings through add, accept and export
/usr/bin/python3 "$here/delta_hostile.py" --run "$T" "$tmp/hostile" --count 300 --seed 11 > "$tmp/h" 2>&1
check "generated hostile strings: add verdicts and exports as expected" ok "$(tail -1 "$tmp/h")"
[ "$(tail -1 "$tmp/h")" = ok ] || head -20 "$tmp/h"

finish

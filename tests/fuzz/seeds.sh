#!/bin/sh
# Seeds a fuzz corpus folder from the project's own test data: the raw
# titles of the case table and the example titles, one file each.
set -eu
target=$1 out=$2
here=$(cd "$(dirname "$0")" && pwd)
case $target in
fuzz_norm)
	i=0
	{ grep -v "^#" "$here/../cases/norm.tsv" | cut -f2 | tail -n +2; cat "$here/../../examples/titles.txt"; } |
	while IFS= read -r line; do
		i=$((i + 1))
		printf '%s' "$line" > "$out/seed-$i"
	done
	# shapes that once cost the square of their length, at 64 KiB
	# (tests/cases/check_linear.py times them all)
	/usr/bin/python3 - "$out" <<'PY'
import sys
shapes = {"at": "@", "word-at": "a@", "hash": "#", "ref-nr": "Nr.", "host": "(a.b",
          "phone": "00 ", "marks": "a\u0316\u0301", "gender": "Koch mit (m/w/d) "}
for name, unit in shapes.items():
    b = unit.encode("utf-8")
    with open("%s/seed-long-%s" % (sys.argv[1], name), "wb") as f:
        f.write((b * (65536 // len(b)))[:65536])
PY
	;;
fuzz_postings)
	/usr/bin/python3 "$here/../bench/gen_titles.py" --postings --count 30 --seed 5 > "$out/seed-tsv"
	printf '{"title":"Koch (m/w/d)","occupations":["occ:1","occ:2"],"id":7,"lang":"de"}\n{"title":"x","occupations":"a|b","date":"2026-03-01"}\n' > "$out/seed-jsonl"
	printf 'title\toccupations\nKoch\tocc:1\n' > "$out/seed-min"
	;;
fuzz_labels)
	# first byte: 0 a labels TSV, 1 Turtle, 2 N-Triples; whole example
	# files, and small pieces of them
	ex=$here/../../examples
	{ printf '\000'; cat "$ex/taxonomy.tsv"; } > "$out/seed-tsv"
	{ printf '\001'; cat "$ex/taxonomy.ttl"; } > "$out/seed-ttl"
	{ printf '\000'; head -12 "$ex/taxonomy.tsv"; } > "$out/seed-tsv-head"
	{ printf '\001'; sed -n '3,18p' "$ex/taxonomy.ttl"; } > "$out/seed-ttl-head"
	{ printf '\000'; printf 'label\tlang\tkind\toccupation\textra\n'
	  printf 'Koch\tde-AT\tpref\tocc:1\tx\nSenior Care Assistant\ten\talt\tocc:2\t\n'
	  printf 'Koch\tde\thidden\tocc:3\t\n(m/w/d)\tde\talt\tocc:1\t\n'; } > "$out/seed-tsv-cols"
	{ printf '\001'; sed -n '9,23p' "$here/../cli/skos.sh"; } > "$out/seed-ttl-escapes"
	{ printf '\002'
	  printf '<occ:1> <http://www.w3.org/2004/02/skos/core#prefLabel> "Koch"@de .\n'
	  printf '<occ:1> <http://www.w3.org/2004/02/skos/core#altLabel> "K\\u00f6chin"@de-AT .\n'
	  printf '<occ:2> <http://www.w3.org/2004/02/skos/core#hiddenLabel> "fork lift"@en .\n'
	  printf '_:b <http://www.w3.org/2004/02/skos/core#prefLabel> "x"@en .\n'; } > "$out/seed-nt"
	# the reader's limits: brackets nested to the limit (64) and past
	# it, both kinds; a blank node; a label past 4096 bytes
	/usr/bin/python3 - "$out" <<'PY'
import sys
pre = "\x01@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n"
lab = '<occ:1> skos:prefLabel "Koch"@de .\n'
seeds = {
    "deep-64": pre + "<occ:1> skos:related " + "[ skos:related " * 63 + "<occ:2>" + " ]" * 63 + " .\n" + lab,
    "deep-65": pre + lab + "<occ:1> skos:related " + "[ skos:related " * 65 + "<occ:2>" + " ]" * 65 + " .\n",
    "deep-lists": pre + lab + "<occ:1> skos:related " + "(" * 70 + ")" * 70 + " .\n",
    "deep-mixed": pre + lab + "<occ:1> skos:related " + "( [ skos:related " * 40 + "\n",
    "blank": pre + lab + "_:b1 skos:prefLabel \"Ober\"@de .\n[ skos:altLabel 'Kellner'@de ] .\n",
    "long-label": pre + '<occ:2> skos:prefLabel """' + "K\u00f6chin \\\" " * 600 + '"""@de .\n' + lab,
    "relative": pre + "<rel/1> skos:prefLabel \"Koch\"@de .\n@base <http://taxonomy.example/> .\n<rel/2> skos:altLabel \"Chef\"@de .\n",
}
for name, text in seeds.items():
    with open("%s/seed-%s" % (sys.argv[1], name), "wb") as f:
        f.write(text.encode("utf-8"))
PY
	;;
fuzz_review)
	# first byte: 0 a queue file, 1 propose output, 2 a decisions TSV
	ex=$here/../../examples
	d=$(mktemp -d)
	/usr/bin/python3 "$here/../bench/gen_titles.py" --postings --count 3000 --seed 3 > "$d/p.tsv"
	"$here/../../titlemill" propose --labels "$ex/taxonomy.tsv" --min-postings 2 "$d/p.tsv" 2> /dev/null |
		head -4 > "$d/s.jsonl" || true
	TITLEMILL_NOW=2026-12-01T09:00:00Z "$here/../../titlemill" review add --queue "$d/q" "$d/s.jsonl" 2> /dev/null || true
	id=$(cut -c8-23 "$d/s.jsonl" | head -1)
	TITLEMILL_NOW=2026-12-01T10:00:00Z "$here/../../titlemill" review reject --queue "$d/q" --reviewer ana --note "x" "$id" 2> /dev/null || true
	{ printf '\000'; cat "$d/q" 2> /dev/null; } > "$out/seed-queue"
	{ printf '\001'; cat "$d/s.jsonl"; } > "$out/seed-propose"
	{ printf '\002'; printf 'id\tdecision\treviewer\tnote\n00000000000000a1\taccept\tana\tfine\n00000000000000b2\treject\t\t\n'; } > "$out/seed-decisions"
	rm -rf "$d"
	;;
fuzz_counts)
	printf 'kind\toccupation\tlang\tkey\ttext\tpostings\noccupation\tocc:1\tde\t\t\t2\ntitle\tocc:1\tde\tkoch\tkoch\t2\nform\tocc:1\tde\tkoch\tkoch\t2\nexample\tocc:1\tde\tkoch\tKoch (m/w/d)\t\nkey\t\tde\tkoch\t\t2\n' > "$out/seed-table"
	;;
esac

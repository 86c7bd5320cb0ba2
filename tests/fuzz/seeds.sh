#!/bin/sh
# Seeds a fuzz corpus folder from the project's own test data: the raw
# titles of the case table and the example titles, one file each.
set -eu
target=$1 out=$2
here=$(cd "$(dirname "$0")" && pwd)
case $target in
fuzz_norm)
	i=0
	{ cut -f2 "$here/../cases/norm.tsv" | tail -n +2; cat "$here/../../examples/titles.txt"; } |
	while IFS= read -r line; do
		i=$((i + 1))
		printf '%s' "$line" > "$out/seed-$i"
	done
	;;
fuzz_postings)
	/usr/bin/python3 "$here/../bench/gen_titles.py" --postings --count 30 --seed 5 > "$out/seed-tsv"
	printf '{"title":"Koch (m/w/d)","occupations":["occ:1","occ:2"],"id":7,"lang":"de"}\n{"title":"x","occupations":"a|b","date":"2026-03-01"}\n' > "$out/seed-jsonl"
	printf 'title\toccupations\nKoch\tocc:1\n' > "$out/seed-min"
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

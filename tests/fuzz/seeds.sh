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
fuzz_counts)
	printf 'kind\toccupation\tlang\tkey\ttext\tpostings\noccupation\tocc:1\tde\t\t\t2\ntitle\tocc:1\tde\tkoch\tkoch\t2\nform\tocc:1\tde\tkoch\tkoch\t2\nexample\tocc:1\tde\tkoch\tKoch (m/w/d)\t\nkey\t\tde\tkoch\t\t2\n' > "$out/seed-table"
	;;
esac

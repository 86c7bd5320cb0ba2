#!/bin/sh
# titlemill norm gives a title the same clean title, key and facets
# whatever came before it: the normaliser's memories (of recent titles,
# of the lexicon's answers per word) are filled by the titles it read,
# and a title answered from them must read as one cleaned afresh.  The
# same generated titles (repeats and all) and the raw titles of the
# per-language tables, read forwards, backwards, shuffled, twice in a row
# (the second time warm), and with the memory of recent titles off.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")" && pwd)
N=${NORM_ORDER_TITLES:-10000}

python3 "$here/../bench/gen_titles.py" --postings --count "$N" --seed 3 |
	tail -n +2 | cut -f5 > "$tmp/titles"
for f in "$here"/../cases/lang/*.tsv; do
	tail -n +2 "$f" | cut -f2
done >> "$tmp/titles"
rows=$(wc -l < "$tmp/titles")
[ "$rows" -gt "$N" ]; check titles 0 $?

# a seeded permutation and its inverse (python3: the order, not a value)
python3 - "$tmp/titles" "$tmp/perm" <<'EOF'
import random, sys
n = sum(1 for _ in open(sys.argv[1], 'rb'))
p = list(range(n))
random.Random(11).shuffle(p)
open(sys.argv[2], 'w').write(''.join('%d\n' % i for i in p))
EOF
# permute FILE PERM: line PERM[i] of FILE as line i; unpermute undoes it
permute() {
	awk 'NR == FNR { line[NR - 1] = $0; next } { print line[$1] }' "$1" "$2"
}
unpermute() {
	awk 'NR == FNR { at[NR - 1] = $1; next } { line[at[FNR - 1]] = $0 }
	     END { for (i = 0; i < FNR; i++) print line[i] }' "$2" "$1"
}

for mode in --json --facets --key; do
	for lang in "" "--lang de" "--lang fr"; do
		# shellcheck disable=SC2086
		$T norm $mode $lang "$tmp/titles" > "$tmp/fwd" 2> /dev/null
		name="order${mode}${lang:+ $lang}"
		# backwards
		tac "$tmp/titles" | $T norm $mode $lang 2> /dev/null | tac > "$tmp/got"
		cmp -s "$tmp/fwd" "$tmp/got"; check "$name backwards" 0 $?
		# shuffled
		permute "$tmp/titles" "$tmp/perm" > "$tmp/shuf"
		$T norm $mode $lang "$tmp/shuf" 2> /dev/null > "$tmp/got.shuf"
		unpermute "$tmp/got.shuf" "$tmp/perm" > "$tmp/got"
		cmp -s "$tmp/fwd" "$tmp/got"; check "$name shuffled" 0 $?
		# cold, then warm: the second reading of the file as the first
		cat "$tmp/titles" "$tmp/titles" | $T norm $mode $lang 2> /dev/null > "$tmp/twice"
		tail -n "$rows" "$tmp/twice" > "$tmp/got"
		cmp -s "$tmp/fwd" "$tmp/got"; check "$name warm" 0 $?
		head -n "$rows" "$tmp/twice" > "$tmp/got"
		cmp -s "$tmp/fwd" "$tmp/got"; check "$name cold" 0 $?
		# no memory of recent titles
		$T norm $mode $lang --memo 0 "$tmp/titles" > "$tmp/got" 2> /dev/null
		cmp -s "$tmp/fwd" "$tmp/got"; check "$name memo-off" 0 $?
	done
done
finish

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
esac

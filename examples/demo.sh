#!/bin/sh
# make demo: the main job on the bundled example data, in memory, no
# server.  examples/titles.txt is invented (our own employers such as
# Nordwerk Logistik or Brennfeld Foods; the places are real).
set -eu
T=${1:-./titlemill}
here=$(cd "$(dirname "$0")" && pwd)
out=${DEMO_OUT:-$here/../out}
mkdir -p "$out"
"$T" norm "$here/titles.txt" > "$out/titles.clean.txt"
"$T" norm --json "$here/titles.txt" > "$out/titles.jsonl"
echo "raw title  ->  clean title"
paste -d '\t' "$here/titles.txt" "$out/titles.clean.txt" | head -25 |
	awk -F '\t' '{ printf "  %-66s -> %s\n", substr($1, 1, 66), $2 }'
n=$(wc -l < "$here/titles.txt")
echo "... $n titles cleaned; full output: $out/titles.clean.txt, facets as JSON Lines: $out/titles.jsonl"

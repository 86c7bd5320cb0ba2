#!/bin/sh
# The per-language case table tests/cases/lang/<lang>.tsv: first a check
# that every file is well formed, then every row through titlemill norm.
# A ratchet, not a pass mark: the suite fails only when a language passes
# fewer rows than its floor in lang/floor.tsv.  SHOW=1 prints the whole
# per-language and per-kind table.
here=$(dirname "$0")
py=/usr/bin/python3
exe=${TITLEMILL:-./titlemill}
"$py" "$here/score_lang.py" "$exe" "$here/lang" --check || exit 1
out=$("$py" "$here/score_lang.py" "$exe" "$here/lang" --floor "$here/lang/floor.tsv")
st=$?
if [ "${SHOW:-0}" = 1 ]; then
	printf '%s\n' "$out"
else
	# the failures and the total line only
	printf '%s\n' "$out" | grep -E '^  lang table|^all '
fi
exit $st

#!/bin/sh
# Runs the command-line suites against $TITLEMILL (default ./titlemill).
# Each suite is a shell script in tests/cli/ or tests/cases/ that exits 0
# when all its checks pass and prints one line per failure.  The closing
# line is "suites: N passed, N failed".
set -u
here=$(cd "$(dirname "$0")" && pwd)
TITLEMILL=${TITLEMILL:-$here/../titlemill}
export TITLEMILL
# a private lexicon cache for the run, unless one is given
if [ -z "${TITLEMILL_LEXCACHE:-}" ]; then
	TITLEMILL_LEXCACHE=$(mktemp -d "${TMPDIR:-/tmp}/tm-lexcache-XXXXXX")
	trap 'rm -rf "$TITLEMILL_LEXCACHE"' EXIT
fi
export TITLEMILL_LEXCACHE
pass=0 fail=0
for s in "$here"/cli/*.sh "$here"/cases/*.sh; do
	[ -f "$s" ] || continue
	name=${s#"$here"/}
	if sh "$s"; then
		echo "ok   $name"
		pass=$((pass + 1))
	else
		echo "FAIL $name"
		fail=$((fail + 1))
	fi
done
echo "suites: $pass passed, $fail failed"
[ "$fail" -eq 0 ]

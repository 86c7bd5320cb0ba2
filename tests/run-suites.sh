#!/bin/sh
# Runs the command-line suites against $TITLEMILL (default ./titlemill).
# Each suite is a shell script in tests/cli/ or tests/cases/ that exits 0
# when all its checks pass and prints one line per failure.  The closing
# line is "suites: N passed, N failed".
#
# TITLEMILL_TEST_JOBS=N runs N suites at a time (default 2: the Redis
# and cluster suites spend much of their time waiting on servers, kills
# and failovers).  Each suite's output is printed whole when it ends,
# then its "ok"/"FAIL" line.  With N=1 the suites run one after another
# with their output as it comes.  Suites that time one run against
# another (tests/cases/linear.sh) run alone, after the others.
set -u
here=$(cd "$(dirname "$0")" && pwd)
TITLEMILL=${TITLEMILL:-$here/../titlemill}
export TITLEMILL
jobs=${TITLEMILL_TEST_JOBS:-2}
case $jobs in
'' | *[!0-9]*) echo "TITLEMILL_TEST_JOBS: want a number, got '$jobs'" >&2; exit 2 ;;
esac
[ "$jobs" -ge 1 ] || jobs=1
work=$(mktemp -d "${TMPDIR:-/tmp}/tm-suites-XXXXXX")
# a private lexicon cache for the run, unless one is given
if [ -z "${TITLEMILL_LEXCACHE:-}" ]; then
	TITLEMILL_LEXCACHE=$work/lexcache
	mkdir -m 700 "$TITLEMILL_LEXCACHE"
fi
export TITLEMILL_LEXCACHE
pids=
trap 'for p in $pids; do kill "$p" 2> /dev/null; done; rm -rf "$work"' EXIT
trap 'exit 130' INT TERM

# the longest first, so that the workers end together; then the rest in
# name order; the timed suites last, alone
slow="cli/redis.sh cli/cluster.sh cli/lexcache.sh cli/hostile.sh cli/review.sh cli/report.sh"
alone="cases/linear.sh"
# untimed (the sanitizer build), the timed suite judges no time: it runs
# with the others
[ "${TITLEMILL_UNTIMED:-0}" = 1 ] && alone=
list=
for s in $slow; do
	[ -f "$here/$s" ] && list="$list $s"
done
for s in "$here"/cli/*.sh "$here"/cases/*.sh; do
	[ -f "$s" ] || continue
	name=${s#"$here"/}
	case " $slow $alone " in *" $name "*) continue ;; esac
	list="$list $name"
done

# runs suite number $1 ($2), printing its output and verdict under the
# print lock, and records the verdict
run_one() {
	if [ "$jobs" -eq 1 ]; then
		sh "$here/$2" && v=ok || v=FAIL
	else
		sh "$here/$2" > "$work/out.$1" 2>&1 && v=ok || v=FAIL
		until mkdir "$work/print" 2> /dev/null; do sleep 0.1; done
		cat "$work/out.$1"
	fi
	if [ "$v" = ok ]; then echo "ok   $2"; else echo "FAIL $2"; fi
	echo "$v" > "$work/verdict.$1"
	[ "$jobs" -eq 1 ] || rmdir "$work/print"
}

# a worker takes the next suite no other worker has claimed
worker() {
	i=0
	for s in $list; do
		i=$((i + 1))
		mkdir "$work/claim.$i" 2> /dev/null || continue
		run_one "$i" "$s"
	done
}

if [ "$jobs" -eq 1 ]; then
	worker
else
	w=0
	while [ "$w" -lt "$jobs" ]; do
		worker &
		pids="$pids $!"
		w=$((w + 1))
	done
	wait
	pids=
fi
jobs=1
i=1000
for s in $alone; do
	[ -f "$here/$s" ] || continue
	i=$((i + 1))
	run_one "$i" "$s"
done

pass=$(cat "$work"/verdict.* 2> /dev/null | grep -c '^ok$')
fail=$(cat "$work"/verdict.* 2> /dev/null | grep -c '^FAIL$')
all=$(echo $list $alone | wc -w)
# a suite that left no verdict (its worker was killed) is a failure
fail=$((fail + all - pass - fail))
echo "suites: $pass passed, $fail failed"
[ "$fail" -eq 0 ]

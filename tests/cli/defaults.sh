#!/bin/sh
# The documented defaults are the program's: every option whose --help
# line gives a default (the one table of options each command is read
# by, src/cli/options.h) must be stated with that same value in README.md,
# in a clause that names the option, and in titlemill.1 wherever the man
# page describes the option.
. "$(dirname "$0")/lib.inc"
top=$(dirname "$0")/../..
for cmd in norm tally counts coverage propose match report review overlap trend; do
	"$TITLEMILL" $cmd --help > "$tmp/help.$cmd" || check "$cmd --help status" 0 $?
done
/usr/bin/python3 - "$top/README.md" "$top/titlemill.1" "$tmp" <<'PY'
import re, sys
readme, man, tmp = sys.argv[1], sys.argv[2], sys.argv[3]
rd = open(readme, encoding="utf-8").read()
mn = open(man, encoding="utf-8").read()
fails = checked = 0

def options(cmd):
    """(option, default) from the --help lines that give one; a line's
    meaning may continue on the next lines."""
    out, cur = [], None
    for line in open("%s/help.%s" % (tmp, cmd), encoding="utf-8"):
        m = re.match(r"  (--[a-z0-9-]+)", line)
        if m:
            cur = [m.group(1), line]
            out.append(cur)
        elif cur and line.startswith("    "):
            cur[1] += line
        else:
            cur = None
    for opt, text in out:
        d = re.search(r"\(default ([^)\s]+)\)", " ".join(text.split()))
        if d:
            yield opt, d.group(1)

def has(text, value):
    return re.search(r"(?<![\w.])%s(?![\w.]|\.\d)" % re.escape(value), text) is not None

seen = set()
for cmd in ("norm", "tally", "counts", "coverage", "propose", "match", "report", "review", "overlap", "trend"):
    for opt, value in options(cmd):
        if (opt, value) in seen:
            continue
        seen.add((opt, value))
        checked += 1
        # README: a clause (a paragraph or table row cut at ; and |)
        # naming the option; 10,000 reads as 10000
        clauses = [c for para in re.split(r"\n\s*\n", rd)
                   for c in re.split(r"[;|]", re.sub(r"(?<=\d),(?=\d{3})", "", para))
                   if "`%s" % opt in c]
        if not any(has(c, value) for c in clauses):
            fails += 1
            print("  README.md: %s %s: default %s not stated beside the option (%d mentions)"
                  % (cmd, opt, value, len(clauses)))
        # titlemill.1: the paragraph (.TP to the next .TP/.SH) naming it
        mopt = opt.replace("-", r"\-")
        for para in re.split(r"\n\.(?:TP|SH)\b", mn):
            lines = para.strip("\n").split("\n")
            if lines and mopt in lines[0] and not has(para, value):
                fails += 1
                print("  titlemill.1: %s %s: default %s not stated" % (cmd, opt, value))
print("  defaults: %d checked, %d not stated" % (checked, fails))
sys.exit(1 if fails or checked == 0 else 0)
PY
r=$?
[ "$r" -eq 0 ] || failures=$((failures + 1))
finish

#!/bin/sh
# The README's examples are tested: in every ```console block, a line
# "$ command" is run (with this build's titlemill first on PATH) and the
# lines after it, up to the next "$ " or the end of the block, are its
# expected standard output.
. "$(dirname "$0")/lib.inc"
mkdir -p "$tmp/bin"
ln -s "$TITLEMILL" "$tmp/bin/titlemill"
readme=$(dirname "$0")/../../README.md
/usr/bin/python3 - "$readme" "$tmp" <<'PY'
import os, subprocess, sys
readme, tmp = sys.argv[1], sys.argv[2]
lines = open(readme, encoding="utf-8").read().split("\n")
env = dict(os.environ, PATH=tmp + "/bin:" + os.environ["PATH"])
inblock, cmd, want, fails, n = False, None, [], 0, 0
def run():
    global fails, n
    if cmd is None:
        return
    n += 1
    got = subprocess.run(["sh", "-c", cmd], capture_output=True, env=env).stdout.decode()
    if got.rstrip("\n") != "\n".join(want):
        fails += 1
        print("  README: %s\n    want %r\n    got  %r" % (cmd, "\n".join(want), got.rstrip("\n")))
for line in lines:
    if line.startswith("```console"):
        inblock, cmd, want = True, None, []
    elif line.startswith("```") and inblock:
        run(); inblock, cmd = False, None
    elif inblock and line.startswith("$ "):
        run(); cmd, want = line[2:], []
    elif inblock:
        want.append(line)
print("  README: %d examples, %d differ" % (n, fails))
sys.exit(1 if fails or n == 0 else 0)
PY
[ $? -eq 0 ] || failures=$((failures + 1))

# make demo, the README's first command after the set-up: clean paths,
# columns aligned by display width (unicodedata's east_asian_width and
# combining classes, Python's standard library), every kind of
# suggestion shown, "1 posting".
top=$(cd "$(dirname "$0")/../.." && pwd)
(cd "$top" && DEMO_OUT="$tmp/demo" sh examples/demo.sh "$TITLEMILL") > "$tmp/demo.out" 2>&1
check demo-status 0 $?
/usr/bin/python3 - "$tmp/demo.out" <<'PY' > "$tmp/demo.check"
import re, sys, unicodedata
def width(s):
    return sum(0 if unicodedata.combining(c) else 2 if unicodedata.east_asian_width(c) in "WF" else 1
               for c in s)
out = open(sys.argv[1], encoding="utf-8").read()
bad = []
if "/../" in out or "/./" in out:
    bad.append("unclean path")
arrows = set(width(l[:l.index(" -> ")]) for l in out.split("\n") if " -> " in l)
if len(arrows) != 1:
    bad.append("titles not aligned: %r" % sorted(arrows))
if not any(ord(c) > 127 for l in out.split("\n") if " -> " in l for c in l):
    bad.append("no title with non-ASCII letters to align")
for k in ("new_alt_label", "new_hidden_label", "rare_label", "used_elsewhere"):
    m = re.search(r"^  %s: (\d+)$" % k, out, re.M)
    if not m or int(m.group(1)) == 0:
        bad.append("no %s" % k)
if re.search(r"\b1 postings\b", out):
    bad.append("1 postings")
# the suggestion lines: the label column starts at one display column
cols = set(width(l[:l.index(' "')]) for l in out.split("\n") if re.match(r"    occ:\S+ +.* [a-z]{2}  \"", l))
if len(cols) != 1:
    bad.append("suggestions not aligned: %r" % sorted(cols))
print("; ".join(bad) or "ok")
PY
check demo-output ok "$(cat "$tmp/demo.check")"
# The README's first command works as root without sudo and as a user
# with sudo, and says why not as a user without it: .ci/deps run with
# stand-ins for id, sudo and apt-get (which log what they were asked),
# and nothing else on its PATH.
first=$(sed -n '/^```$/{n;p;q;}' "$top/README.md")
case $first in
"sh .ci/deps && make demo") check readme-first-command 0 0 ;;
*) check readme-first-command "sh .ci/deps && make demo" "$first" ;;
esac
fake() { # fake DIR UID WITH_SUDO
	rm -rf "$1"; mkdir -p "$1"
	for t in sh grep tr env dirname cat; do ln -s "$(command -v $t)" "$1/$t"; done
	printf '#!/bin/sh\necho %s\n' "$2" > "$1/id"
	printf '#!/bin/sh\necho "${AS:-direct} apt-get $*" >> "%s/log"\n' "$1" > "$1/apt-get"
	[ "$3" = yes ] && printf '#!/bin/sh\nAS=sudo exec "$@"\n' > "$1/sudo"
	chmod +x "$1"/id "$1"/apt-get "$1"/sudo 2>/dev/null
	: > "$1/log"
}
fake "$tmp/root" 0 no
(cd "$top" && PATH="$tmp/root" sh .ci/deps) > /dev/null 2>&1; check deps-root-status 0 $?
grep -c '^direct apt-get' "$tmp/root/log" > "$tmp/n"; check deps-root-direct 2 "$(cat "$tmp/n")"
grep -q '^direct apt-get install -y -qq .*libserd-dev' "$tmp/root/log"; check deps-root-packages 0 $?
fake "$tmp/user" 1000 yes
(cd "$top" && PATH="$tmp/user" sh .ci/deps) > /dev/null 2>&1; check deps-user-status 0 $?
grep -c '^sudo apt-get' "$tmp/user/log" > "$tmp/n"; check deps-user-sudo 2 "$(cat "$tmp/n")"
fake "$tmp/nosudo" 1000 no
(cd "$top" && PATH="$tmp/nosudo" sh .ci/deps) > /dev/null 2> "$tmp/err"; check deps-nosudo-status 1 $?
check deps-nosudo-nothing-run 0 "$(wc -l < "$tmp/nosudo/log")"
grep -q 'not root, and sudo is not installed: run it as root' "$tmp/err"; check deps-nosudo-msg 0 $?
finish

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

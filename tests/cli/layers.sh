#!/bin/sh
# The source's shape (DEVELOPERS.md, "Where things live"): the folders of
# src/ are the pipeline in the order of the Makefile's DIRS; a file
# includes only from its own folder or the folders before it, every
# project include names its folder, no header includes itself through
# others, and no two modules (a .c with its .h) depend on each other,
# directly or through others.  A header without a .c of its own (the
# private parts of a module, shared declarations) stands for what it
# includes.
set -u
here=$(cd "$(dirname "$0")/../.." && pwd)
exec /usr/bin/python3 - "$here" <<'PY'
import os, re, sys
root = sys.argv[1]
dirs = None
for line in open(os.path.join(root, "Makefile"), encoding="utf-8"):
    m = re.match(r"DIRS\s*=\s*(.*)", line)
    if m:
        dirs = m.group(1).split()
if not dirs:
    print("layers: no DIRS line in the Makefile"); sys.exit(1)
rank = {d: i for i, d in enumerate(dirs)}
inc = re.compile(r'^\s*#\s*include\s+"([^"]+)"')
bad = 0
edges = {}
for d in sorted(os.listdir(os.path.join(root, "src"))):
    p = os.path.join(root, "src", d)
    if not os.path.isdir(p):
        continue
    if d not in rank:
        print(f"layers: src/{d}/ is not in the Makefile's DIRS"); bad += 1; continue
    for f in sorted(os.listdir(p)):
        if not f.endswith((".c", ".h")):
            continue
        mod = f"{d}/{f.rsplit('.', 1)[0]}"
        for n, line in enumerate(open(os.path.join(p, f), encoding="utf-8"), 1):
            m = inc.match(line)
            if not m:
                continue
            t = m.group(1)
            if "/" not in t:
                if t.endswith(".inc") and os.path.exists(os.path.join(p, t)):
                    continue
                print(f"layers: src/{d}/{f}:{n}: include \"{t}\" does not name its folder"); bad += 1; continue
            td = t.split("/")[0]
            if td not in rank:
                print(f"layers: src/{d}/{f}:{n}: include \"{t}\": no such folder"); bad += 1; continue
            if rank[td] > rank[d]:
                print(f"layers: src/{d}/{f}:{n}: {d}/ includes {t}, from a later folder"); bad += 1
            edges.setdefault(f"src/{d}/{f}", set()).add(f"src/{t}")
def cycles(graph, what):
    global bad
    state, stack = {}, []
    def visit(u):
        global bad
        state[u] = 1; stack.append(u)
        for v in sorted(graph.get(u, ())):
            if state.get(v) == 1:
                print(f"layers: {what} cycle: " + " -> ".join(stack[stack.index(v):] + [v])); bad += 1
            elif v not in state:
                visit(v)
        stack.pop(); state[u] = 2
    for u in sorted(graph):
        if u not in state:
            visit(u)
sys.setrecursionlimit(10000)
cycles(edges, "include")
stem = lambda f: f.rsplit(".", 1)[0]
has_c = {stem(f) for f in edges if f.endswith(".c")}
def modules_of(h, seen):
    """The modules a header stands for: itself when it has a .c, else
    what it includes."""
    if stem(h) in has_c:
        return {stem(h)}
    if h in seen:
        return set()
    seen.add(h)
    out = set()
    for t in edges.get(h, ()):
        out |= modules_of(t, seen)
    return out
mods = {}
for f, ts in edges.items():
    if stem(f) not in has_c:
        continue
    for t in ts:
        for m in modules_of(t, set()):
            if m != stem(f):
                mods.setdefault(stem(f), set()).add(m)
cycles(mods, "module")
sys.exit(1 if bad else 0)
PY

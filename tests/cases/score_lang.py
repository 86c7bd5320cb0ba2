"""Scores titlemill norm on the per-language case table tests/cases/lang/.

    score_lang.py TITLEMILL DIR [--fail] [--check] [--floor FILE] [--raise-floor FILE]

DIR holds one file per language, <lang>.tsv, with the columns of
tests/cases/norm.tsv (lang, raw, title, note).  Every row goes through
`titlemill norm` (with `--lang L` when its lang column names one; one
process per file and lang value, one raw title per line) and passes when
the output line equals the title column byte for byte.

Prints, per language file: rows, passed, share; then per kind (the
category:detail tags of the note column, after its first item, which is
the language of the title text) across all languages, and per category.

--fail         also print every failing row: file:line, raw, expected, got.
--check        only check that the files are well formed (no titlemill run):
               UTF-8 without BOM, LF line ends, the header, four columns,
               a known language code (file name and lang column), a note
               with a language tag and at least one kind, a title in clean
               form (lowercase, single spaces, no edge spaces), no raw title
               twice in one file, at least MIN_ROWS rows per language.
--floor FILE   a ratchet: FILE lists (lang, floor) for every language; exit 1
               when a language passes fewer rows than its floor.  A language
               above its floor is reported so that the floor can be raised.
--raise-floor FILE  write FILE with each floor raised to today's passed count
               (never lowered).

Exit status: 0 when the run (and the floors, if given) hold, 1 when a file
is malformed or a floor is not met, 2 on a usage error or a titlemill run
that failed."""
import os
import signal
import subprocess
import sys
from collections import defaultdict

# The 24 official EU languages, Norwegian Bokmål and Turkish.
LANGS = ("bg cs da de el en es et fi fr ga hr hu it lt lv mt nb nl pl pt ro "
         "sk sl sv tr").split()
HEADER = ["lang", "raw", "title", "note"]
# Fewest rows a language file may hold.
MIN_ROWS = 58


def usage(msg):
    sys.stderr.write("score_lang.py: %s\n" % msg)
    sys.exit(2)


def parse_args(argv):
    opts = {"fail": False, "check": False, "floor": None, "raise": None}
    pos = []
    it = iter(argv)
    for a in it:
        if a == "--fail":
            opts["fail"] = True
        elif a == "--check":
            opts["check"] = True
        elif a in ("--floor", "--raise-floor"):
            val = next(it, None)
            if val is None:
                usage("%s needs a file" % a)
            opts["floor" if a == "--floor" else "raise"] = val
        elif a.startswith("--"):
            usage("unknown option %s" % a)
        else:
            pos.append(a)
    if len(pos) != 2:
        usage("usage: score_lang.py TITLEMILL DIR [--fail] [--check] "
              "[--floor FILE] [--raise-floor FILE]")
    return pos[0], pos[1], opts


def primary(tag):
    return tag.split("-")[0]


def read_table(path, lang, problems):
    """Rows of one language file; every defect goes to problems as
    'path:line: text'."""
    def bad(line, text):
        problems.append("%s:%d: %s" % (path, line, text))

    with open(path, "rb") as f:
        data = f.read()
    if data.startswith(b"\xef\xbb\xbf"):
        bad(1, "starts with a BOM")
        data = data[3:]
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError as e:
        line = data[:e.start].count(b"\n") + 1
        bad(line, "not UTF-8 (%s)" % e.reason)
        return []
    if "\r" in text:
        bad(text[:text.index("\r")].count("\n") + 1, "carriage return (lines end at LF)")
    if text and not text.endswith("\n"):
        bad(text.count("\n") + 1, "last line has no LF")
    lines = text.split("\n")
    if lines[-1] == "":
        lines.pop()
    if not lines or lines[0].split("\t") != HEADER:
        bad(1, "header must be: %s" % "\\t".join(HEADER))
        return []
    rows, seen = [], {}
    for no, line in enumerate(lines[1:], start=2):
        cells = line.split("\t")
        if len(cells) != 4:
            bad(no, "%d columns, want 4" % len(cells))
            continue
        l, raw, title, note = cells
        if l != "-" and primary(l) != lang:
            bad(no, "lang %r: want %r or '-' in %s.tsv" % (l, lang, lang))
        if raw in seen:
            bad(no, "raw title repeats line %d" % seen[raw])
        seen[raw] = no
        items = note.split()
        if len(items) < 2 or ":" in items[0]:
            bad(no, "note must start with the language tag and name a kind")
        elif primary(items[0]) not in (lang, "mul", "und"):
            bad(no, "note language %r in %s.tsv" % (items[0], lang))
        for k in items[1:]:
            if k.startswith("(") or k.endswith(")"):
                break  # the bracket comment ends the kinds
            if ":" not in k or k.startswith(":") or k.endswith(":"):
                bad(no, "kind %r is not category:detail" % k)
        if title != title.strip(" ") or "  " in title:
            bad(no, "title has edge or double spaces")
        if title != title.lower():
            bad(no, "title not lowercase")
        rows.append({"file": path, "line": no, "lang": l, "raw": raw,
                     "title": title, "kinds": kinds_of(items)})
    if len(rows) < MIN_ROWS:
        bad(len(lines), "%d rows, want at least %d" % (len(rows), MIN_ROWS))
    return rows


def kinds_of(items):
    out = []
    for k in items[1:]:
        if k.startswith("(") or k.endswith(")"):
            break
        out.append(k)
    return out


def run(exe, rows):
    """Sets row['got'] for every row: one titlemill norm per lang value."""
    groups = defaultdict(list)
    for r in rows:
        groups[r["lang"]].append(r)
    for lang, group in groups.items():
        cmd = [exe, "norm"] + (["--lang", lang] if lang != "-" else [])
        data = "".join(r["raw"] + "\n" for r in group).encode()
        try:
            res = subprocess.run(cmd, input=data, capture_output=True)
        except OSError as e:
            sys.stderr.write("score_lang.py: cannot run %s: %s\n" % (exe, e.strerror))
            sys.exit(2)
        if res.returncode != 0:
            sys.stderr.write("score_lang.py: %s exited %d: %s\n"
                             % (" ".join(cmd), res.returncode,
                                res.stderr.decode(errors="replace")[:300]))
            sys.exit(2)
        got = res.stdout.decode("utf-8", errors="replace").split("\n")
        if len(got) != len(group) + 1 or got[-1] != "":
            sys.stderr.write("score_lang.py: %s: %d lines in, %d out\n"
                             % (" ".join(cmd), len(group), len(got) - 1))
            sys.exit(2)
        for r, g in zip(group, got):
            r["got"] = g


def read_floor(path, problems):
    floors = {}
    try:
        with open(path, encoding="utf-8") as f:
            lines = f.read().split("\n")
    except (OSError, UnicodeDecodeError) as e:
        problems.append("%s: %s" % (path, e))
        return floors
    if not lines or lines[0] != "lang\tfloor":
        problems.append("%s:1: header must be: lang\\tfloor" % path)
        return floors
    for no, line in enumerate(lines[1:], start=2):
        if not line:
            continue
        cells = line.split("\t")
        if (len(cells) != 2 or cells[0] not in LANGS or not cells[1].isdigit()
                or cells[0] in floors):
            problems.append("%s:%d: want a known language, once, and a count" % (path, no))
            continue
        floors[cells[0]] = int(cells[1])
    for l in LANGS:
        if l not in floors:
            problems.append("%s: no floor for %s" % (path, l))
    return floors


def share(p, n):
    return "%5.1f%%" % (100.0 * p / n) if n else "    -"


def main():
    signal.signal(signal.SIGPIPE, signal.SIG_DFL)  # quiet under | head
    exe, here, opts = parse_args(sys.argv[1:])
    if not os.path.isdir(here):
        usage("%s is not a folder" % here)
    problems = []
    tables = {}
    for name in sorted(os.listdir(here)):
        if not name.endswith(".tsv") or name == "floor.tsv":
            continue
        lang = name[:-4]
        if lang not in LANGS:
            problems.append("%s/%s: unknown language code %r" % (here, name, lang))
            continue
        tables[lang] = read_table(os.path.join(here, name), lang, problems)
    for l in LANGS:
        if l not in tables:
            problems.append("%s: no %s.tsv" % (here, l))
    floors = read_floor(opts["floor"], problems) if opts["floor"] else None
    for p in problems:
        print("  " + p)
    if problems:
        print("  lang table: %d problems in the files" % len(problems))
        return 1
    if opts["check"]:
        n = sum(len(t) for t in tables.values())
        print("  lang table: %d rows in %d languages, well formed" % (n, len(tables)))
        return 0

    rows = [r for l in sorted(tables) for r in tables[l]]
    run(exe, rows)
    for r in rows:
        r["ok"] = r["got"] == r["title"]

    if opts["fail"]:
        for r in rows:
            if not r["ok"]:
                print("%s:%d [%s] %s\n    want [%s]\n    got  [%s]"
                      % (r["file"], r["line"], r["lang"], r["raw"], r["title"], r["got"]))
        print()

    print("%-6s %6s %6s %7s" % ("lang", "rows", "passed", "share"))
    passed = {}
    for l in sorted(tables):
        n = len(tables[l])
        p = sum(1 for r in tables[l] if r["ok"])
        passed[l] = p
        print("%-6s %6d %6d %7s" % (l, n, p, share(p, n)))
    n, p = len(rows), sum(passed.values())
    print("%-6s %6d %6d %7s" % ("all", n, p, share(p, n)))

    by_kind = defaultdict(lambda: [0, 0, set()])
    by_cat = defaultdict(lambda: [0, 0, set()])
    for r in rows:
        for k in set(r["kinds"]):
            for table, key in ((by_kind, k), (by_cat, k.split(":")[0])):
                table[key][0] += 1
                table[key][1] += r["ok"]
                table[key][2].add(primary(r["file"].rsplit("/", 1)[-1][:-4]))
    for title, table in (("category", by_cat), ("kind", by_kind)):
        print()
        print("%-34s %6s %6s %7s %6s" % (title, "rows", "passed", "share", "langs"))
        for k in sorted(table):
            c, ok, ls = table[k]
            print("%-34s %6d %6d %7s %6d" % (k, c, ok, share(ok, c), len(ls)))

    status = 0
    if floors is not None:
        print()
        for l in sorted(tables):
            if passed[l] < floors[l]:
                print("  lang table: %s passes %d rows, below its floor %d"
                      % (l, passed[l], floors[l]))
                status = 1
            elif passed[l] > floors[l]:
                print("  lang table: %s passes %d rows, above its floor %d: "
                      "raise it (--raise-floor)" % (l, passed[l], floors[l]))
    if opts["raise"]:
        old = {}
        if os.path.exists(opts["raise"]):
            old = read_floor(opts["raise"], [])
        tmp = opts["raise"] + ".tmp"
        with open(tmp, "w", encoding="utf-8") as f:
            f.write("lang\tfloor\n")
            for l in LANGS:
                f.write("%s\t%d\n" % (l, max(old.get(l, 0), passed.get(l, 0))))
        os.replace(tmp, opts["raise"])
    return status


if __name__ == "__main__":
    sys.exit(main())

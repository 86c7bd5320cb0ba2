#!/usr/bin/python3
"""Print the rows of the "Coverage by language" table of lexicons/README.md.

Usage: coverage.py [LEXDIR] [LANG ...]

Counts, per language and category, the entries whose LANG is that
language (with or without the ambiguity mark "?"); language-neutral "*"
entries and the generated place names are not counted.  With no LANG
given, every language found is printed, one row each, sorted by code.
"""
import os
import sys

CATS = ["occupation", "business", "gender", "seniority", "schedule", "pay",
        "marketing", "employer", "location", "reference", "protect"]


def main():
    args = sys.argv[1:]
    root = args.pop(0) if args and os.path.isdir(args[0]) else \
        os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
    counts = {}
    for cat in CATS:
        folder = os.path.join(root, cat)
        if not os.path.isdir(folder):
            continue
        for name in sorted(os.listdir(folder)):
            if not name.endswith(".txt"):
                continue
            with open(os.path.join(folder, name), encoding="utf-8") as f:
                for line in f:
                    if not line.strip() or line.startswith("#"):
                        continue
                    lang = line.split("\t", 1)[0].rstrip("?")
                    if lang == "*":
                        continue
                    row = counts.setdefault(lang, dict.fromkeys(CATS, 0))
                    row[cat] += 1
    langs = args or sorted(counts)
    print("| lang | " + " | ".join(CATS) + " |")
    print("|---" * (len(CATS) + 1) + "|")
    for lang in langs:
        row = counts.get(lang, dict.fromkeys(CATS, 0))
        print("| %s | %s |" % (lang, " | ".join(str(row[c]) for c in CATS)))
    return 0


if __name__ == "__main__":
    sys.exit(main())

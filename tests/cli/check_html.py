#!/usr/bin/python3
"""Reads an HTML page titlemill wrote and checks it with Python's
html.parser (the standard library of the python3 Debian ships).

  check_html.py PAGE            prints "ok", or one line per problem
  check_html.py PAGE coverage   prints the coverage table's rows:
                                occupation TAB lang TAB postings TAB coverage
  check_html.py PAGE overlap    prints the overlap table's rows: occupation TAB
                                other TAB lang TAB divergence TAB shared TAB
                                postings TAB other_postings
  check_html.py PAGE nearer     prints the nearer-another-group rows: occupation
                                TAB lang TAB group TAB its divergence TAB nearest
                                group TAB divergence from it
  check_html.py PAGE trend      prints the rising and fading rows: direction TAB
                                occupation TAB lang TAB title TAB postings before
                                TAB after TAB g2
  check_html.py PAGE kinds      prints each suggestion kind and its count
  check_html.py PAGE elements   prints every element name used, sorted

Checked: the page is well nested (every element but the void ones is
closed, in order), starts with <!DOCTYPE html>, has <html lang> and a
UTF-8 <meta charset>; nothing can reach the network or run from an
attribute (no src, no href but #anchors, no on* attribute, no
<link>/<iframe>/<object>/<embed>/<base>, one <script> only); every <svg>
is role="img" with aria-labelledby naming its <title> and <desc>; every
<img> has alt; every <table> has a header row of <th>; ids are unique."""
import sys
from html.parser import HTMLParser

VOID = {"area", "base", "br", "col", "embed", "hr", "img", "input", "link", "meta", "source",
        "track", "wbr"}
# SVG elements written as <x/>: self-closing, handled by handle_startendtag


class Page(HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.stack, self.problems, self.ids, self.elements = [], [], {}, set()
        self.doctype = None
        self.scripts = 0
        self.svg_refs = []      # (line, [ids])
        self.tables = []        # per table: has a th in thead
        self.rows, self.cell, self.row = {}, None, None   # table id -> rows of cells
        self.table_ids = []     # the ids of the open tables
        self.kinds, self.h3 = [], None
        self.titles_in = []     # ids of <title> elements

    def problem(self, what):
        self.problems.append("line %d: %s" % (self.getpos()[0], what))

    def handle_decl(self, decl):
        self.doctype = decl

    def attrs_check(self, tag, attrs):
        a = dict(attrs)
        self.elements.add(tag)
        for k, v in attrs:
            if k.startswith("on"):
                self.problem("<%s> has an event attribute %s" % (tag, k))
            if k in ("src", "srcset", "data", "action", "formaction", "xlink:href"):
                self.problem("<%s> fetches through %s" % (tag, k))
            if k == "href" and not (v or "").startswith("#"):
                self.problem("<%s> links out: %r" % (tag, v))
        if tag in ("link", "iframe", "object", "embed", "base", "frame", "applet"):
            self.problem("<%s> is not allowed" % tag)
        if "id" in a:
            if a["id"] in self.ids:
                self.problem("id %r used twice" % a["id"])
            self.ids[a["id"]] = tag
        if tag == "img" and not a.get("alt"):
            self.problem("<img> without alt")
        if tag == "svg":
            if a.get("role") != "img" or not a.get("aria-labelledby"):
                self.problem("<svg> without role=img and aria-labelledby")
            self.svg_refs.append((self.getpos()[0], (a.get("aria-labelledby") or "").split()))
        if tag == "script":
            self.scripts += 1
        if tag == "html" and not a.get("lang"):
            self.problem("<html> without lang")
        if tag == "meta" and "charset" in a and a["charset"].lower() != "utf-8":
            self.problem("charset is not UTF-8")
        return a

    def handle_starttag(self, tag, attrs):
        a = self.attrs_check(tag, attrs)
        if tag not in VOID:
            self.stack.append(tag)
        if tag == "table":
            self.tables.append({"th": 0, "thead": False, "line": self.getpos()[0],
                                "id": a.get("id")})
            self.table_ids.append(a.get("id"))
        if tag == "thead" and self.tables:
            self.tables[-1]["thead"] = True
        if tag == "th" and self.tables and "thead" in self.stack:
            self.tables[-1]["th"] += 1
        in_table = bool(self.table_ids and self.table_ids[-1])
        if in_table and tag == "tr" and "tbody" in self.stack:
            self.row = []
        if in_table and tag == "td" and self.row is not None:
            self.cell = {"v": a.get("data-v"), "text": ""}
        if tag == "h3":
            self.h3 = ""
        if tag == "title" and "svg" in self.stack:
            self.titles_in.append(a.get("id"))

    def handle_startendtag(self, tag, attrs):
        self.attrs_check(tag, attrs)

    def handle_endtag(self, tag):
        if tag in VOID:
            return
        if not self.stack or self.stack[-1] != tag:
            self.problem("</%s> closes <%s>" % (tag, self.stack[-1] if self.stack else "nothing"))
            if tag in self.stack:
                while self.stack and self.stack.pop() != tag:
                    pass
            return
        self.stack.pop()
        if tag == "table" and self.tables:
            t = self.tables.pop()
            if not t["thead"] or not t["th"]:
                self.problem("table at line %d has no header row" % t["line"])
            self.table_ids.pop()
        if tag == "td" and self.cell is not None:
            self.row.append(self.cell)
            self.cell = None
        if tag == "tr" and self.row:
            self.rows.setdefault(self.table_ids[-1], []).append(self.row)
            self.row = None
        if tag == "h3" and self.h3 is not None:
            self.kinds.append(self.h3)
            self.h3 = None

    def handle_data(self, data):
        if self.cell is not None:
            self.cell["text"] += data
        if self.h3 is not None:
            self.h3 += data


def main():
    text = open(sys.argv[1], encoding="utf-8").read()
    p = Page()
    p.feed(text)
    p.close()
    mode = sys.argv[2] if len(sys.argv) > 2 else "check"
    rows = p.rows.get
    if mode == "coverage":
        for r in rows("coverage-table", []):
            print("\t".join([r[0]["text"], r[2]["text"], r[3]["v"], "%.4f" % float(r[4]["v"])]))
        return 0
    if mode == "overlap":
        for r in rows("overlap-table", []):
            print("\t".join([r[1]["v"], r[2]["v"], r[3]["text"], "%.4f" % float(r[4]["v"]),
                             "%.4f" % float(r[5]["v"]), r[6]["v"], r[7]["v"]]))
        return 0
    if mode == "nearer":
        for r in rows("nearer-table", []):
            print("\t".join([r[0]["v"], r[1]["text"], r[3]["text"], "%.4f" % float(r[4]["v"]),
                             r[5]["text"], "%.4f" % float(r[6]["v"])]))
        return 0
    if mode == "trend":
        for d in ("rising", "falling"):
            for r in rows("trend-" + d, []):
                print("\t".join([d, r[0]["v"], r[1]["text"], r[2]["text"], r[4]["v"], r[5]["v"],
                                 "%.4f" % float(r[10]["v"])]))
        return 0
    if mode == "kinds":
        for h in p.kinds:
            w = h.split()
            if len(w) == 2 and w[1].startswith("(") and w[0].replace("_", "").isalpha():
                print(w[0], w[1].strip("()"))
        return 0
    if mode == "elements":
        print("\n".join(sorted(p.elements)))
        return 0
    if p.stack:
        p.problem("left open: " + " ".join(p.stack))
    if (p.doctype or "").lower() != "doctype html":
        p.problem("no <!DOCTYPE html>")
    if p.scripts > 1:
        p.problem("%d scripts" % p.scripts)
    for line, refs in p.svg_refs:
        if len(refs) < 1 or any(r not in p.ids for r in refs) or refs[0] not in p.titles_in:
            p.problems.append("line %d: <svg> aria-labelledby %r names no title of its own"
                              % (line, refs))
    if "charset" not in text[:400]:
        p.problem("no charset in the head")
    print("\n".join(p.problems) if p.problems else "ok")
    return 1 if p.problems else 0


sys.exit(main())

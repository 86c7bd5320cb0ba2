"""Writes examples/taxonomy.tsv as SKOS in Turtle (examples/taxonomy.ttl).

The occupation ids of the TSV (occ:NNNN) are kept as they are: the
prefix occ: is declared as the IRI scheme occ:, so each concept's IRI is
its id.  Run: /usr/bin/python3 examples/taxonomy-to-turtle.py"""
import os

here = os.path.dirname(os.path.abspath(__file__))
rows = open(os.path.join(here, "taxonomy.tsv"), encoding="utf-8").read().split("\n")
head = rows[0].split("\t")
by = {}
for r in rows[1:]:
    if not r:
        continue
    d = dict(zip(head, r.split("\t")))
    by.setdefault(d["occupation"], []).append(d)
kinds = {"pref": "skos:prefLabel", "alt": "skos:altLabel", "hidden": "skos:hiddenLabel"}
with open(os.path.join(here, "taxonomy.ttl"), "w", encoding="utf-8") as out:
    out.write("# The demo taxonomy of examples/taxonomy.tsv as SKOS (made by\n"
              "# examples/taxonomy-to-turtle.py; do not edit by hand).\n"
              "@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n"
              "@prefix occ: <occ:> .\n\n")
    for occ in sorted(by):
        out.write("%s a skos:Concept" % occ)
        for d in by[occ]:
            lit = d["label"].replace("\\", "\\\\").replace('"', '\\"')
            out.write(' ;\n    %s "%s"@%s' % (kinds[d["kind"]], lit, d["lang"]))
        out.write(" .\n\n")

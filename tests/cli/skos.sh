#!/bin/sh
# SKOS labels (Turtle and N-Triples, through serd) against Debian's
# python3-rdflib on a Turtle file with prefixes, a base IRI, language
# tags with regions, escapes and multi-line literals: the same labels per
# concept; a syntax error names its line.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
cat > "$tmp/t.ttl" <<'TTL'
@prefix skos: <http://www.w3.org/2004/02/skos/core#> .
@prefix occ: <http://taxonomy.example/occupation/> .
@base <http://taxonomy.example/> .
# an invented taxonomy for this test
occ:2512 a skos:Concept ;
    skos:prefLabel "Software developer"@en , "Softwareentwickler"@de ;
    skos:altLabel "Programmierer \"Java\""@de-AT , 'Développeur logiciel'@fr ;
    skos:hiddenLabel """Soft-
ware dev"""@en .
<occupation/5223> skos:prefLabel "Vendeur \u00e9tal"@fr ;
    skos:altLabel "no language tag, ignored" ;
    skos:note "a note, ignored"@en .
occ:8332 skos:prefLabel "Lkw-Fahrer"@de , "HGV driver"@en-GB ;
    skos:hiddenLabel "LKW Fahrer"@de .
TTL
$T labels "$tmp/t.ttl" > "$tmp/ours" 2> "$tmp/err"; check ttl-status 0 $?
/usr/bin/python3 - "$tmp/t.ttl" "$tmp/ours" "$tmp/t.nt" <<'PY' > "$tmp/cmp"
import sys
import rdflib
from rdflib.namespace import SKOS
g = rdflib.Graph()
g.parse(sys.argv[1], format="turtle")
kinds = {SKOS.prefLabel: "pref", SKOS.altLabel: "alt", SKOS.hiddenLabel: "hidden"}
want = set()
for s, p, o in g:
    if p in kinds and isinstance(o, rdflib.Literal) and o.language:
        want.add((str(s), kinds[p], o.language.split("-")[0].lower(), " ".join(str(o).split("\t")).replace("\n", " ")))
got = set()
for line in open(sys.argv[2], encoding="utf-8").read().split("\n")[1:]:
    if line:
        f = line.split("\t")
        got.add((f[0], f[1], f[2], f[3]))
g.serialize(destination=sys.argv[3], format="nt")
print("same" if got == want and len(want) == 9 else "differ %r %r" % (sorted(got ^ want), len(want)))
PY
check rdflib-turtle same "$(cat "$tmp/cmp")"
$T labels "$tmp/t.nt" | tail -n +2 | sort > "$tmp/nt"
tail -n +2 "$tmp/ours" | sort > "$tmp/ttl"
cmp -s "$tmp/nt" "$tmp/ttl"; check ntriples-equals-turtle 0 $?
printf '@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n<a> skos:prefLabel "x"@en .\n<b> skos:prefLabel "y"@en\n<c> skos:prefLabel "z"@en .\n' > "$tmp/bad.ttl"
$T labels "$tmp/bad.ttl" > /dev/null 2> "$tmp/err"; check syntax-status 1 $?
grep -q "bad.ttl:4:" "$tmp/err"; check syntax-line 0 $?
printf '<a> <http://www.w3.org/2004/02/skos/core#prefLabel> "x"@x-!! .\n' > "$tmp/badlang.nt"
$T labels "$tmp/badlang.nt" > /dev/null 2>&1; check bad-lang 1 $?
# the demo taxonomy in TSV and in Turtle: the same labels, the same
# coverage and suggestions (--labels takes either)
ex=$(dirname "$0")/../../examples
$T labels "$ex/taxonomy.ttl" | tail -n +2 | cut -f1-4 | sort > "$tmp/l.ttl"
tail -n +2 "$ex/taxonomy.tsv" | sort > "$tmp/l.tsv"
cmp -s "$tmp/l.ttl" "$tmp/l.tsv"; check demo-taxonomy-same-labels 0 $?
/usr/bin/python3 "$(dirname "$0")/../bench/gen_titles.py" --postings --count 3000 --seed 4 > "$tmp/p.tsv"
$T coverage --labels "$ex/taxonomy.ttl" "$tmp/p.tsv" > "$tmp/c1" 2>/dev/null
$T coverage --labels "$ex/taxonomy.tsv" "$tmp/p.tsv" > "$tmp/c2" 2>/dev/null
cmp -s "$tmp/c1" "$tmp/c2"; check coverage-ttl-equals-tsv 0 $?
$T propose --labels "$ex/taxonomy.ttl" "$tmp/p.tsv" > "$tmp/s1" 2>/dev/null
$T propose --labels "$ex/taxonomy.tsv" "$tmp/p.tsv" > "$tmp/s2" 2>/dev/null
cmp -s "$tmp/s1" "$tmp/s2"; check propose-ttl-equals-tsv 0 $?
finish

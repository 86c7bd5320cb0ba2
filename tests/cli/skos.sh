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
# Limits of the reader.  Brackets nested past the documented depth (64)
# are refused with the file and line by every command that reads labels,
# before the parser's recursion (20,000 levels overflowed its stack);
# 60 levels are read.
/usr/bin/python3 -c "
print('@prefix skos: <http://www.w3.org/2004/02/skos/core#> .')
print('<occ:1> skos:prefLabel \"Koch\"@de .')
print('<occ:1> skos:related ' + '[ skos:related ' * 20000)" > "$tmp/deep.ttl"
/usr/bin/python3 -c "
print('<occ:1> <http://www.w3.org/2004/02/skos/core#related> ' + '(' * 20000)" > "$tmp/deep.nt"
printf 'title\toccupations\nKoch\tocc:1\n' > "$tmp/one.tsv"
$T tally "$tmp/one.tsv" > "$tmp/one.counts" 2> /dev/null
for cmd in "labels $tmp/deep.ttl" "coverage --labels $tmp/deep.ttl $tmp/one.counts" \
	"propose --labels $tmp/deep.ttl $tmp/one.counts" "tally --labels $tmp/deep.ttl $tmp/one.tsv" \
	"norm --labels $tmp/deep.ttl $tmp/one.tsv"; do
	$T $cmd > "$tmp/out" 2> "$tmp/err" < /dev/null
	check "deep-status ${cmd%% *}" 1 $?
	grep -q "$f:3: brackets nested deeper than 64" "$tmp/err"; check "deep-message ${cmd%% *}" 0 $?
done
# (N-Triples has no brackets: the parser refuses the first one)
$T labels "$tmp/deep.nt" > /dev/null 2> "$tmp/err"; check deep-nt-status 1 $?
grep -q "deep.nt:1:" "$tmp/err"; check deep-nt-message 0 $?
/usr/bin/python3 -c "
print('@prefix skos: <http://www.w3.org/2004/02/skos/core#> .')
print('<occ:1> skos:related ' + '[ skos:related ' * 59 + '<occ:2>' + ' ]' * 59 + ' .')
print('<occ:1> skos:related ' + '(' * 60 + ')' * 60 + ' .')
print('<occ:1> skos:prefLabel \"Koch\"@de .')" > "$tmp/deep60.ttl"
$T labels "$tmp/deep60.ttl" > "$tmp/out" 2> "$tmp/err"; check deep60-status 0 $?
check deep60-label "occ:1 pref de Koch" "$(tail -n +2 "$tmp/out" | cut -f1-4 | tr '\t' ' ')"
# Brackets in strings, long strings, IRIs, comments and escaped names do
# not nest; relative IRIs resolve against the file's location, then
# @base (as rdflib resolves them); labels of blank nodes are skipped and
# counted with the first one's line; a label longer than 4096 bytes is
# skipped and counted, the labels after it are read.
/usr/bin/python3 - "$tmp/tricky.ttl" <<'PY'
import sys
b = "[[[[(((("
q3 = "'" * 3
with open(sys.argv[1], "w", encoding="utf-8") as f:
    f.write('@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n')
    f.write('@prefix ex: <http://taxonomy.example/x#> .\n')
    f.write('# a comment %s\n' % (b * 40))
    f.write('<rel/1> skos:prefLabel "Koch %s"@de , \'Kellner %s\'@de .\n' % (b * 20, b * 20))
    f.write('<http://taxonomy.example/a%%5B%s> skos:altLabel """long "" %s \\""" x"""@de .\n' % ("b" * 3, b * 20))
    f.write("ex:a\\(b\\'c\\#d skos:hiddenLabel %sit''s %s%s@en .\n" % (q3, b * 20, q3))
    f.write('_:b1 skos:prefLabel "Ober"@de .\n')
    f.write('[ skos:prefLabel "Page"@en ] .\n')
    f.write('<rel/2> skos:prefLabel "%s"@de .\n' % ("\u00e9" * 3000))
    f.write('<rel/2> skos:altLabel """%s"""@de .\n' % ("ab\\\"" * 2000))
    f.write('<rel/2> skos:hiddenLabel "B\u00e4cker"@de .\n')
    f.write('@base <http://taxonomy.example/base/> .\n')
    f.write('<rel/3> skos:prefLabel "Maurer"@de .\n')
PY
$T labels "$tmp/tricky.ttl" > "$tmp/ours" 2> "$tmp/err"; check tricky-status 0 $?
grep -q "tricky.ttl:7: 2 labels of blank nodes skipped" "$tmp/err"; check blank-node-skipped 0 $?
grep -q "tricky.ttl:9: 2 labels longer than 4096 bytes skipped" "$tmp/err"; check long-label-skipped 0 $?
/usr/bin/python3 - "$tmp/tricky.ttl" "$tmp/ours" <<'PY' > "$tmp/cmp"
import sys
import rdflib
from rdflib.namespace import SKOS
g = rdflib.Graph()
g.parse(sys.argv[1], format="turtle")
kinds = {SKOS.prefLabel: "pref", SKOS.altLabel: "alt", SKOS.hiddenLabel: "hidden"}
want = set()
for s, p, o in g:
    if p in kinds and isinstance(o, rdflib.Literal) and o.language and \
            isinstance(s, rdflib.URIRef) and len(str(o).encode()) <= 4096:
        want.add((str(s), kinds[p], o.language, str(o)))
got = set(tuple(l.split("\t")[:4]) for l in open(sys.argv[2], encoding="utf-8").read().split("\n")[1:] if l)
print("same" if got == want and len(want) == 6 else "differ %r %r" % (sorted(got ^ want), len(want)))
PY
check rdflib-relative-iris "same" "$(cat "$tmp/cmp")"
grep -q "^file://$tmp/rel/1	" "$tmp/ours"; check relative-iri-file-base 0 $?
# a literal of 10 MB is skipped without being held: the run fits in 100 MB
# of address space (it took 140 MB of memory when the label was read)
/usr/bin/python3 -c "
print('@prefix skos: <http://www.w3.org/2004/02/skos/core#> .')
print('<occ:1> skos:prefLabel \"' + 'x' * 10000000 + '\"@de .')
print('<occ:2> skos:prefLabel \"Koch\"@de .')" > "$tmp/big.ttl"
# (a sanitizer build reserves more address space than that to start:
# there the labels are checked without the limit)
starts=$( (ulimit -v 100000; $T labels --help > /dev/null 2>&1; echo $?) 2> /dev/null)
if [ "$starts" = 0 ]; then
	(ulimit -v 100000; $T labels "$tmp/big.ttl" > "$tmp/out" 2> "$tmp/err")
else
	echo "  big-literal: no address-space limit (the binary cannot start within 100 MB)"
	$T labels "$tmp/big.ttl" > "$tmp/out" 2> "$tmp/err"
fi
check big-literal-status 0 $?
check big-literal-labels "occ:2" "$(tail -n +2 "$tmp/out" | cut -f1)"
grep -q "big.ttl:2: 1 label longer than 4096 bytes skipped" "$tmp/err"; check big-literal-reported 0 $?
# ids that do not match: a taxonomy whose concepts are
# http://taxonomy.example/occ/NNNN against postings coded occ/NNNN.  The
# labels are the demo's; the suggestions from the SKOS file matched with
# --ids local, or with --id-map, are those from a labels TSV written with
# the postings' own codes, byte for byte.
top=$(dirname "$0")/../..
/usr/bin/python3 "$top/tests/bench/gen_titles.py" --postings --count 6000 --seed 15 > "$tmp/gen.tsv"
/usr/bin/python3 - "$top/examples/taxonomy.tsv" "$tmp/gen.tsv" "$tmp" <<'PY'
import sys
tax, gen, d = sys.argv[1], sys.argv[2], sys.argv[3]
rows = [l.rstrip("\n").split("\t") for l in open(tax, encoding="utf-8")]
h = rows[0]
iri = "http://taxonomy.example/occ/"
kinds = {"pref": "prefLabel", "alt": "altLabel", "hidden": "hiddenLabel"}
with open(d + "/iri.ttl", "w", encoding="utf-8") as ttl, \
        open(d + "/codes.tsv", "w", encoding="utf-8") as same, \
        open(d + "/iri.tsv", "w", encoding="utf-8") as itsv, \
        open(d + "/map.tsv", "w", encoding="utf-8") as m:
    ttl.write("@prefix skos: <http://www.w3.org/2004/02/skos/core#> .\n")
    same.write("occupation\tkind\tlang\tlabel\n")
    itsv.write("occupation\tkind\tlang\tlabel\n")
    m.write("concept\tcode\n")
    seen = set()
    for r in rows[1:]:
        r = dict(zip(h, r))
        n = r["occupation"].split(":")[1]
        lit = r["label"].replace("\\", "\\\\").replace('"', '\\"')
        ttl.write('<%s%s> skos:%s "%s"@%s .\n' % (iri, n, kinds[r["kind"]], lit, r["lang"]))
        same.write("occ/%s\t%s\t%s\t%s\n" % (n, r["kind"], r["lang"], r["label"]))
        itsv.write("%s%s\t%s\t%s\t%s\n" % (iri, n, r["kind"], r["lang"], r["label"]))
        if n not in seen:
            seen.add(n)
            m.write("%s%s\tocc/%s\n" % (iri, n, n))
with open(d + "/coded.tsv", "w", encoding="utf-8", errors="surrogateescape") as o:
    for i, l in enumerate(open(gen, encoding="utf-8", errors="surrogateescape")):
        f = l.rstrip("\n").split("\t")
        if i:
            f[3] = f[3].replace("occ:", "occ/")
        o.write("\t".join(f) + "\n")
PY
$T tally --labels "$tmp/codes.tsv" "$tmp/coded.tsv" > "$tmp/coded.counts" 2>/dev/null
$T propose --labels "$tmp/codes.tsv" "$tmp/coded.counts" > "$tmp/want" 2> "$tmp/err"
check ids-reference-quiet "" "$(grep 'have labels' "$tmp/err")"
[ "$(wc -l < "$tmp/want")" -gt 20 ]; check ids-reference-some 0 $?
# as they are: a warning naming unmatched codes and the way out
$T coverage --labels "$tmp/iri.ttl" "$tmp/coded.counts" > "$tmp/cov" 2> "$tmp/err"
check ids-mismatch-status 0 $?
grep -q "^titlemill coverage: only 0 of the [0-9]* occupations of the postings have labels in .*iri.ttl (none for occ/[0-9]*, occ/[0-9]*, occ/[0-9]*, ...); the labels name occupations such as http://taxonomy.example/occ/[0-9]*.  Do the ids match the codes?  --ids local .*--id-map FILE" "$tmp/err"
check ids-mismatch-warning 0 $?
$T propose --strict --labels "$tmp/iri.ttl" "$tmp/coded.counts" > "$tmp/out" 2> "$tmp/err"
check ids-mismatch-strict 1 $?
check ids-mismatch-strict-nothing-out 0 "$(wc -c < "$tmp/out")"
grep -q "(--strict: stopped)" "$tmp/err"; check ids-mismatch-strict-msg 0 $?
# matched on local names, from SKOS and from a TSV of IRIs alike
$T propose --ids local --strict --labels "$tmp/iri.ttl" "$tmp/coded.counts" > "$tmp/got" 2> "$tmp/err"
check ids-local-status 0 $?
cmp -s "$tmp/got" "$tmp/want"; check ids-local-skos-same 0 $?
check ids-local-quiet "" "$(grep 'have labels' "$tmp/err")"
$T propose --ids local --labels "$tmp/iri.tsv" "$tmp/coded.counts" > "$tmp/got" 2>/dev/null
cmp -s "$tmp/got" "$tmp/want"; check ids-local-tsv-same 0 $?
$T propose --ids local --labels "$tmp/iri.ttl" "$tmp/coded.tsv" > "$tmp/got" 2>/dev/null
cmp -s "$tmp/got" "$tmp/want"; check ids-local-from-postings 0 $?
$T coverage --ids local --labels "$tmp/iri.ttl" "$tmp/coded.counts" > "$tmp/cov" 2>/dev/null
$T coverage --labels "$tmp/codes.tsv" "$tmp/coded.counts" > "$tmp/cov-want" 2>/dev/null
cmp -s "$tmp/cov" "$tmp/cov-want"; check ids-local-coverage-same 0 $?
# an id map: code to concept
$T propose --id-map "$tmp/map.tsv" --labels "$tmp/iri.ttl" "$tmp/coded.counts" > "$tmp/got" 2>/dev/null
cmp -s "$tmp/got" "$tmp/want"; check id-map-same 0 $?
printf 'code\tidea\nocc/1\thttp://x/1\n' > "$tmp/badmap1.tsv"
$T coverage --id-map "$tmp/badmap1.tsv" --labels "$tmp/iri.ttl" "$tmp/coded.counts" > /dev/null 2> "$tmp/err"
check id-map-no-column 1 $?
grep -q "^titlemill coverage: .*badmap1.tsv:1: an id map has the columns code and concept$" "$tmp/err"
check id-map-no-column-msg 0 $?
printf 'code\tconcept\nocc/1\thttp://x/1\nocc/2\thttp://x/2\nocc/1\thttp://x/3\n' > "$tmp/badmap2.tsv"
$T coverage --id-map "$tmp/badmap2.tsv" --labels "$tmp/iri.ttl" "$tmp/coded.counts" > /dev/null 2> "$tmp/err"
check id-map-code-twice 1 $?
grep -q "badmap2.tsv:4: code 'occ/1' is mapped on line 2 already" "$tmp/err"; check id-map-code-twice-msg 0 $?
printf 'code\tconcept\nocc/1\thttp://x/1\nocc/2\thttp://x/1\n' > "$tmp/badmap3.tsv"
$T coverage --id-map "$tmp/badmap3.tsv" --labels "$tmp/iri.ttl" "$tmp/coded.counts" > /dev/null 2> "$tmp/err"
check id-map-concept-twice 1 $?
grep -q "badmap3.tsv:3: concept 'http://x/1' is the concept of code 'occ/1' already" "$tmp/err"
check id-map-concept-twice-msg 0 $?
$T coverage --ids iri --labels "$tmp/iri.ttl" "$tmp/coded.counts" > /dev/null 2>&1; check ids-bad-choice 2 $?
finish

#!/bin/sh
# titlemill propose: a planted-truth test (a generator of synthetic
# postings, separate from the demo's, plants per occupation an unlisted
# frequent title, a spacing variant of a label, an unused label and a
# label used for another occupation, among decoys: a generic title, rare
# one-offs, a label decorated with noise); every number printed against
# scipy; determinism, and the same suggestions from postings, a counts
# table and a store.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL

/usr/bin/python3 - "$tmp" <<'PY'
import sys
d = sys.argv[1]
N = 20
lab = open(d + "/labels.tsv", "w", encoding="utf-8")
lab.write("occupation\tkind\tlang\tlabel\n")
post = open(d + "/postings.tsv", "w", encoding="utf-8")
post.write("id\tlang\toccupations\ttitle\n")
truth = open(d + "/truth.tsv", "w", encoding="utf-8")
pid = 0
def p(occ, title, n):
    global pid
    for _ in range(n):
        pid += 1
        post.write("%d\ten\tocc:%02d\t%s\n" % (pid, occ, title))
for i in range(N):
    o = "occ:%02d" % i
    lab.write("%s\tpref\ten\tAlpha%02d Worker\n" % (o, i))
    lab.write("%s\talt\ten\tGamma%02d Clerk\n" % (o, i))   # never used: rare
    lab.write("%s\talt\ten\tDelta%02d Agent\n" % (o, i))   # used by the next one
    p(i, "Alpha%02d Worker" % i, 900)
    p(i, "Senior Alpha%02d Worker (m/w/d) - Berlin" % i, 5)  # decoy: the label with noise
    p(i, "Beta%02d Specialist" % i, 30)                      # planted: new_alt_label
    p(i, "Alpha%02dworker" % i, 30)                          # planted: new_hidden_label (3 % of the label's)
    p(i, "Assistant", 20)                                    # decoy: generic
    p(i, "Omega%02d Thing" % i, 1)                           # decoy: a one-off
    p(i, "Delta%02d Agent" % i, 2)
    p((i + 1) % N, "Delta%02d Agent" % i, 8)                 # planted: used_elsewhere
    truth.write("new_alt_label\t%s\tbeta%02d specialist\n" % (o, i))
    truth.write("new_hidden_label\t%s\talpha%02dworker\n" % (o, i))
    truth.write("rare_label\t%s\tgamma%02d clerk\n" % (o, i))
    truth.write("used_elsewhere\t%s\tdelta%02d agent\n" % (o, i))
PY

$T propose --labels "$tmp/labels.tsv" "$tmp/postings.tsv" > "$tmp/s1" 2>/dev/null; check status 0 $?
$T propose --labels "$tmp/labels.tsv" "$tmp/postings.tsv" > "$tmp/s2" 2>/dev/null
cmp -s "$tmp/s1" "$tmp/s2"; check deterministic 0 $?
$T tally --labels "$tmp/labels.tsv" "$tmp/postings.tsv" > "$tmp/c.tsv" 2>/dev/null
$T propose --labels "$tmp/labels.tsv" "$tmp/c.tsv" > "$tmp/s3" 2>/dev/null
cmp -s "$tmp/s1" "$tmp/s3"; check counts-equals-postings 0 $?

# precision and recall of each kind against the planted truth, no decoy
/usr/bin/python3 - "$tmp/s1" "$tmp/truth.tsv" > "$tmp/pr" <<'PY'
import json, sys
got = [json.loads(l) for l in open(sys.argv[1], encoding="utf-8")]
truth = set(tuple(l.rstrip("\n").split("\t")) for l in open(sys.argv[2], encoding="utf-8"))
kinds = ["new_alt_label", "new_hidden_label", "rare_label", "used_elsewhere"]
ok = True
for k in kinds:
    g = set((s["kind"], s["occupation"], s["key"]) for s in got if s["kind"] == k)
    t = set(x for x in truth if x[0] == k)
    tp = len(g & t)
    prec = tp / len(g) if g else 0
    rec = tp / len(t) if t else 0
    print("  %s: %d proposed, %d planted, precision %.2f, recall %.2f" % (k, len(g), len(t), prec, rec),
          file=sys.stderr)
    ok = ok and prec >= 0.9 and rec >= 0.9
decoys = [s for s in got if s["key"] in ("assistant",) or s["key"].startswith("omega")
          or s["key"].startswith("senior")]
print("  decoys proposed: %d" % len(decoys), file=sys.stderr)
print("ok" if ok and not decoys else "bad")
PY
check planted-truth ok "$(cat "$tmp/pr")"

# every number, from the counts printed beside it, against scipy
/usr/bin/python3 - "$tmp/s1" > "$tmp/sc" <<'PY'
import json, sys
from scipy.stats import binomtest, chi2_contingency
bad = n = 0
for l in open(sys.argv[1], encoding="utf-8"):
    s = json.loads(l)
    k, no, kt, nl = s["postings"], s["occupation_postings"], s["key_postings"], s["lang_postings"]
    if no:
        ci = binomtest(k, no).proportion_ci(method="wilson")
        if abs(ci.low - s["share_low"]) > 6e-5 or abs(ci.high - s["share_high"]) > 6e-5:
            bad += 1
    t = [[k, kt - k], [no - k, nl - kt - no + k]]
    if min(sum(t[0]), sum(t[1]), t[0][0] + t[1][0], t[0][1] + t[1][1]) > 0:
        g = chi2_contingency(t, correction=False, lambda_="log-likelihood")[0]
        if abs(g - s["g2"]) > 1e-3 * max(1, g):
            bad += 1
        n += 1
print(bad, n)
PY
set -- $(cat "$tmp/sc")
check g2-wilson-vs-scipy 0 "$1"
[ "$2" -gt 10 ]; check g2-checked 0 $?

# the typo flood: 1 % of the titles carry a random one-letter slip, many
# of them repeated 3 times or more by chance; recurrent variants
# (compounding, hyphenation, common misspellings, spellings two letters
# apart) at 2-5 % of their label's postings.  No slip is proposed, every
# planted variant is, as new_hidden_label.
f=$tmp/flood
mkdir "$f"
/usr/bin/python3 "$(dirname "$0")/gen_typos.py" "$f"
for lang in de en; do
	awk -F'\t' -v l=$lang '$1 == l { print $3 }' "$f/typos.txt" | $T norm --key --lang $lang > "$f/typokeys.$lang"
	awk -F'\t' -v l=$lang '$1 == l { print $3 }' "$f/variants.txt" | $T norm --key --lang $lang > "$f/varkeys.$lang"
done
$T propose --labels "$f/labels.tsv" "$f/postings.tsv" > "$f/s" 2>/dev/null; check flood-status 0 $?
/usr/bin/python3 - "$f" > "$f/verdict" <<'PY'
import json, sys
d = sys.argv[1]
typos, planted = set(), set()
for lang in ("de", "en"):
    for src, kf, dst in (("typos.txt", "typokeys", typos), ("variants.txt", "varkeys", planted)):
        rows = [l.rstrip("\n").split("\t") for l in open("%s/%s" % (d, src), encoding="utf-8")]
        rows = [r for r in rows if r[0] == lang]
        keys = [l.rstrip("\n") for l in open("%s/%s.%s" % (d, kf, lang), encoding="utf-8")]
        dst.update((r[1], lang, k) for r, k in zip(rows, keys))
repeated = sum(1 for l in open(d + "/typos.txt", encoding="utf-8") if int(l.split("\t")[3]) >= 3)
got = [json.loads(l) for l in open(d + "/s", encoding="utf-8")]
hidden = set((s["occupation"], s["lang"], s["key"]) for s in got if s["kind"] == "new_hidden_label")
slips = [s for s in got if (s["occupation"], s["lang"], s["key"]) in typos]
print("  typo flood: %d slips (%d repeated 3 times or more), %d proposed; %d of %d planted variants proposed, %d other hidden labels"
      % (len(typos), repeated, len(slips), len(hidden & planted), len(planted), len(hidden - planted)), file=sys.stderr)
print("ok" if repeated > 20 and not slips and hidden == planted and len(planted) == 10 else "bad")
PY
check typo-flood ok "$(cat "$f/verdict")"

# strength: the mid-rank percentile of the score within its kind, by
# scipy's percentileofscore(kind="mean"); in [0, 1]; the same whatever
# the --occupation or --lang filter
/usr/bin/python3 - "$tmp/s1" "$f/s" > "$tmp/st" <<'PY'
import json, sys
from scipy.stats import percentileofscore
bad = n = 0
for path in sys.argv[1:]:
    got = [json.loads(l) for l in open(path, encoding="utf-8")]
    for s in got:
        same = [x["score"] for x in got if x["kind"] == s["kind"]]
        want = percentileofscore(same, s["score"], kind="mean") / 100
        bad += not (0 <= s["strength"] <= 1) or abs(want - s["strength"]) > 6e-5
        n += 1
print(bad, n)
PY
set -- $(cat "$tmp/st")
check strength-vs-scipy 0 "$1"
[ "$2" -ge 90 ]; check strength-checked 0 $?
$T propose --labels "$f/labels.tsv" --occupation occ:t05 --lang en "$f/postings.tsv" > "$tmp/s5" 2>/dev/null
grep '^{"id":"[0-9a-f]*","kind":"[a-z_]*","occupation":"occ:t05"' "$f/s" > "$tmp/s6"
[ -s "$tmp/s6" ] && cmp -s "$tmp/s5" "$tmp/s6"; check strength-unfiltered 0 $?

# filters, TSV, bad options
$T propose --labels "$tmp/labels.tsv" --kind rare_label --top 3 "$tmp/c.tsv" 2>/dev/null > "$tmp/f"
check top-kind 3 "$(wc -l < "$tmp/f")"
$T propose --labels "$tmp/labels.tsv" --tsv --occupation occ:03 "$tmp/c.tsv" 2>/dev/null > "$tmp/t"
check tsv-rows 5 "$(wc -l < "$tmp/t")"
$T propose --labels "$tmp/labels.tsv" --lang xx --occupation occ:03 "$tmp/c.tsv" > "$tmp/t" 2> "$tmp/err"
check nothing-lang-rows 0 "$(wc -l < "$tmp/t")"
grep -q '^titlemill propose: --lang xx: no postings in this language in the counts$' "$tmp/err"
check nothing-lang-msg 0 $?
$T propose --labels "$tmp/labels.tsv" --occupation occ:99 "$tmp/c.tsv" > /dev/null 2> "$tmp/err"
grep -q '^titlemill propose: --occupation occ:99: no postings of this occupation in the counts$' "$tmp/err"
check nothing-occ-msg 0 $?
$T propose --labels "$tmp/labels.tsv" --kind bogus "$tmp/c.tsv" > /dev/null 2>&1; check bad-kind 2 $?
$T propose --labels "$tmp/labels.tsv" --min-share 2 "$tmp/c.tsv" > /dev/null 2>&1; check bad-share 2 $?

# each suggestion names its occupation by its preferred label
/usr/bin/python3 -c '
import json, sys
got = [json.loads(l) for l in open(sys.argv[1], encoding="utf-8")]
bad = [s for s in got if s["occupation_label"] != "Alpha%s Worker" % s["occupation"][4:]]
print("ok" if got and not bad else "bad %d of %d" % (len(bad), len(got)))' "$tmp/s1" > "$tmp/x"
check occupation-label ok "$(cat "$tmp/x")"

# TSV: examples in columns of their own, since a raw title holds any
# separator (" | " here); every row has the header's columns, and the
# columns are the JSON's examples
{
	printf 'id\tlang\toccupations\ttitle\n'
	for i in $(seq 1 40); do printf '%d\ten\tocc:1\tCook\n' "$i"; done
	for i in $(seq 41 60); do
		case $((i % 3)) in
		0) t='Line Cook | Full Time' ;;
		1) t='Line Cook | Part Time | Valdoria Gastro GmbH' ;;
		*) t='LINE COOK | Vollzeit' ;;
		esac
		printf '%d\ten\tocc:1\t%s\n' "$i" "$t"
	done
	for i in $(seq 61 100); do printf '%d\ten\tocc:2\tDriver\n' "$i"; done
} > "$tmp/pipes.tsv"
printf 'occupation\tkind\tlang\tlabel\nocc:1\tpref\ten\tCook\nocc:2\tpref\ten\tDriver\n' > "$tmp/pipes-labels.tsv"
$T propose --labels "$tmp/pipes-labels.tsv" "$tmp/pipes.tsv" > "$tmp/pj" 2>/dev/null
$T propose --labels "$tmp/pipes-labels.tsv" --tsv "$tmp/pipes.tsv" > "$tmp/pt" 2>/dev/null
# (the competitor too: its occupation and postings in two columns)
$T propose --labels "$tmp/labels.tsv" --tsv "$tmp/c.tsv" > "$tmp/t1" 2>/dev/null
/usr/bin/python3 - "$tmp/pj" "$tmp/pt" "$tmp/s1" "$tmp/t1" > "$tmp/x" <<'PY'
import json, sys
ok, piped, rivals = True, 0, 0
for jf, tf in ((sys.argv[1], sys.argv[2]), (sys.argv[3], sys.argv[4])):
    js = {s["id"]: s for s in map(json.loads, open(jf, encoding="utf-8"))}
    rows = [l.rstrip("\n").split("\t") for l in open(tf, encoding="utf-8")]
    h = rows[0]
    ok = ok and len(rows) == len(js) + 1 and all(len(r) == len(h) for r in rows)
    ok = ok and "examples" not in h
    for r in rows[1:]:
        r = dict(zip(h, r))
        j = js[r["id"]]
        ex = [r["example_%d" % i] for i in (1, 2, 3) if r["example_%d" % i]]
        ok = ok and ex == j["examples"] and r["occupation_label"] == j["occupation_label"]
        piped += any(" | " in e for e in ex)
        c = j.get("competitor")
        want = (c["occupation"], str(c["postings"])) if c else ("", "")
        ok = ok and (r["competitor"], r["competitor_postings"]) == want
        rivals += c is not None
print("ok" if ok and piped and rivals else "bad %s %d %d" % (ok, piped, rivals))
PY
check tsv-examples-competitor-columns ok "$(cat "$tmp/x")"

# a store gives the same suggestions
if command -v redis-server > /dev/null 2>&1; then
	redis_start "$tmp/r" --appendonly no || exit 1
	$T tally --labels "$tmp/labels.tsv" --store "unix:$tmp/r/sock" "$tmp/postings.tsv" 2>/dev/null
	$T propose --labels "$tmp/labels.tsv" --store "unix:$tmp/r/sock" > "$tmp/s4" 2>/dev/null
	cmp -s "$tmp/s1" "$tmp/s4"; check store-equals-postings 0 $?
	redis_stop "$tmp/r"
fi
finish

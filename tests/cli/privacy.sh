#!/bin/sh
# Personal data in raw titles: e-mail addresses (plain, "mailto:", and
# written "(at)" / "[at] … [dot]"), phone numbers (international, national,
# in pairs, with "(0)") and URLs (with a scheme, "www.", or bare with a
# query) are removed by norm, which says so in its facets, and masked as
# <email>, <phone>, <url> in every raw example tally keeps: the counts
# table (from TSV and from JSON Lines, and merged by counts), the Redis
# store (every field of every key), and the examples of propose's
# evidence from postings, from a counts table and from a store.
# Addresses and employers are invented; the UK numbers are from Ofcom's
# ranges for drama (01632 960xxx, 07700 900xxx), the others invented.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
ex=$(cd "$(dirname "$0")/../../examples" && pwd)

# raw title <TAB> the personal data in it (one piece per case) <TAB> kind
cat > "$tmp/cases.tsv" <<'EOF'
Koch (m/w/d) – Bewerbung an jobs@valdoria-gastro.example	jobs@valdoria-gastro.example	email
Koch (m/w/d) mailto:koch@valdoria-gastro.example	koch@valdoria-gastro.example	email
Koch (m/w/d) – bewerbung(at)valdoria-gastro.example	valdoria-gastro	email
Verkäufer (m/w/d) jobs [at] valdoria [dot] example	valdoria	email
Lagerist - m.muster@nordwerk-logistik.example	m.muster	email
Koch (m/w/d) Tel. +49 221 5550134	5550134	phone
Koch (m/w/d) Tel.: +49 (0) 221 5550134	5550134	phone
Lagerist - Tel. 0221/5550134	5550134	phone
Vendeur H/F – 06 39 98 12 34	39 98	phone
Cameriere/a – tel. 02 5550 1234	5550	phone
Electrician – call 01632 960123	960123	phone
Care Assistant – WhatsApp 07700 900456	900456	phone
Elektriker (m/w/d) – www.valdoria-jobs.example/stellen	valdoria-jobs	url
Vendeur H/F https://emplois.valdoria.example/offre/123?utm_source=board	utm_source	url
Lagerist valdoria-jobs.example/stellen?ref=board&uid=77aa	uid=77aa	url
EOF
cut -f1 "$tmp/cases.tsv" > "$tmp/raw.txt"
n=$(wc -l < "$tmp/raw.txt" | tr -d ' ')

# ---- norm: removed, and a facet that says what ----
$T norm "$tmp/raw.txt" > "$tmp/title" 2>/dev/null; check norm-status 0 $?
$T norm --key "$tmp/raw.txt" > "$tmp/key" 2>/dev/null
$T norm --json "$tmp/raw.txt" > "$tmp/json" 2>/dev/null
$T norm --facets "$tmp/raw.txt" > "$tmp/facets" 2>/dev/null
i=0
while IFS="$(printf '\t')" read -r raw piece kind; do
	i=$((i + 1))
	t=$(sed -n "${i}p" "$tmp/title")
	case $t in *"$piece"*) check "norm-$i-title-clean" "no [$piece]" "[$t]" ;; esac
	k=$(sed -n "${i}p" "$tmp/key")
	case $k in *[0-9][0-9][0-9][0-9]*|*@*) check "norm-$i-key-clean" "no digits or @" "[$k]" ;; esac
	sed -n "${i}p" "$tmp/json" | grep -q "{\"kind\":\"$kind\",\"text\":\"[^\"]*$piece"
	check "norm-$i-json-$kind" 0 $?
	sed -n "${i}p" "$tmp/facets" | cut -f8 | grep -q "$kind:[^;]*$piece"
	check "norm-$i-facets-$kind" 0 $?
done < "$tmp/cases.tsv"
check norm-lines "$n" "$(wc -l < "$tmp/title" | tr -d ' ')"
# dates are dates, not phone numbers; a dotted word with a slash is no URL
printf 'Saisonkraft (m/w/d) 01.03.2026 - 31.12.2026\nNode.js/React Entwickler (m/w/d)\n' |
	$T norm --json > "$tmp/j2"
grep -c '"kind":"date"' "$tmp/j2" > "$tmp/x"; check date-not-phone 1 "$(cat "$tmp/x")"
grep -q '"kind":"phone"' "$tmp/j2"; check date-no-phone 1 $?
sed -n 2p "$tmp/j2" | grep -q '"title":"node.js/react entwickler"'; check dotted-word-kept 0 $?

# ---- postings: every case twice, under two occupations ----
{
	printf 'id\ttitle\toccupations\tlang\n'
	i=0
	while IFS="$(printf '\t')" read -r raw piece kind; do
		i=$((i + 1))
		printf '%d\t%s\tocc:%d|occ:99\tde\n' "$i" "$raw" $((i % 4))
		printf 'b%d\t%s (Ref. %d)\tocc:%d\tde\n' "$i" "$raw" "$i" $((i % 4))
	done < "$tmp/cases.tsv"
} > "$tmp/p.tsv"
/usr/bin/python3 - "$tmp/p.tsv" "$tmp/p.jsonl" <<'PY'
import json, sys
rows = [l.rstrip("\n").split("\t") for l in open(sys.argv[1], encoding="utf-8")]
head = rows[0]
with open(sys.argv[2], "w", encoding="utf-8") as f:
    for r in rows[1:]:
        d = dict(zip(head, r))
        d["occupations"] = d["occupations"].split("|")
        f.write(json.dumps(d, ensure_ascii=False) + "\n")
PY

# no_pii NAME FILE: none of the pieces of personal data is in FILE
no_pii() {
	bad=0
	while IFS="$(printf '\t')" read -r raw piece kind; do
		if grep -qF -- "$piece" "$2"; then
			printf '  %s: [%s] found in %s\n' "$1" "$piece" "$2"
			bad=$((bad + 1))
		fi
	done < "$tmp/cases.tsv"
	check "$1-no-personal-data" 0 "$bad"
}
# masks NAME FILE: the three masks are in FILE
masks() {
	for m in '<email>' '<phone>' '<url>'; do
		grep -qF "$m" "$2"; check "$1-mask-$m" 0 $?
	done
}

# ---- the counts table: TSV and JSON Lines postings, and merged ----
$T tally --labels "$ex/taxonomy.tsv" "$tmp/p.tsv" > "$tmp/t.counts" 2>/dev/null; check tally-status 0 $?
no_pii table "$tmp/t.counts"
masks table "$tmp/t.counts"
check table-examples "$(awk -F '\t' '$1 == "example"' "$tmp/t.counts" | wc -l | tr -d ' ')" \
	"$(awk -F '\t' '$1 == "example" && $5 ~ /<(email|phone|url)>/' "$tmp/t.counts" | wc -l | tr -d ' ')"
$T tally --labels "$ex/taxonomy.tsv" "$tmp/p.jsonl" > "$tmp/j.counts" 2>/dev/null; check tally-jsonl-status 0 $?
cmp -s "$tmp/t.counts" "$tmp/j.counts"; check jsonl-same-table 0 $?
$T counts "$tmp/t.counts" "$tmp/j.counts" > "$tmp/m.counts"; check counts-status 0 $?
no_pii merged "$tmp/m.counts"
masks merged "$tmp/m.counts"

# ---- propose's evidence, from postings and from a counts table ----
low="--min-postings 1 --min-share 0 --min-precision 0 --min-g2 0"
$T propose --labels "$ex/taxonomy.tsv" $low "$tmp/p.tsv" > "$tmp/s1" 2>/dev/null
check propose-status 0 $?
grep -q '"examples":\[' "$tmp/s1"; check propose-has-examples 0 $?
no_pii propose-postings "$tmp/s1"
masks propose-postings "$tmp/s1"
$T propose --labels "$ex/taxonomy.tsv" $low "$tmp/t.counts" > "$tmp/s2" 2>/dev/null
no_pii propose-table "$tmp/s2"
cmp -s "$tmp/s1" "$tmp/s2"; check propose-table-same 0 $?
$T coverage --labels "$ex/taxonomy.tsv" "$tmp/t.counts" > "$tmp/cov" 2>/dev/null
no_pii coverage "$tmp/cov"

# ---- the Redis store: every field and value of every key ----
if ! command -v redis-server > /dev/null 2>&1; then
	echo "  SKIPPED: redis-server is not installed (CI installs it)"
	finish
	exit
fi
rd=$tmp/redis
trap 'redis_stop "$rd"; rm -rf "$tmp"' EXIT INT TERM
redis_start "$rd" --appendonly no || exit 1
S=unix:$rd/sock
$T tally --labels "$ex/taxonomy.tsv" --store "$S" "$tmp/p.tsv" 2>/dev/null; check store-status 0 $?
redis-cli -s "$rd/sock" --scan --pattern 'titlemill:*' > "$tmp/keys"
check store-has-keys 1 "$([ -s "$tmp/keys" ] && echo 1)"
while read -r k; do
	case $(redis-cli -s "$rd/sock" type "$k") in
	hash) redis-cli -s "$rd/sock" --raw hgetall "$k" ;;
	set) redis-cli -s "$rd/sock" --raw smembers "$k" ;;
	*) redis-cli -s "$rd/sock" --raw dump "$k" ;;
	esac
	echo "$k"
done < "$tmp/keys" > "$tmp/store.txt"
no_pii store "$tmp/store.txt"
masks store "$tmp/store.txt"
$T counts --store "$S" > "$tmp/r.counts"; check store-read-status 0 $?
cmp -s "$tmp/r.counts" "$tmp/t.counts"; check store-same-table 0 $?
$T propose --labels "$ex/taxonomy.tsv" $low --store "$S" > "$tmp/s3" 2>/dev/null
no_pii propose-store "$tmp/s3"
cmp -s "$tmp/s3" "$tmp/s1"; check propose-store-same 0 $?
finish

#!/bin/sh
# -o of tally, counts and review export: a regular file is replaced
# atomically (its mode kept, no temporary left), while a FIFO, a
# character device (one made with mknod in the suite's folder when run
# as root) and standard output ("-") are written into and stay what they
# were; a link of the user's is followed and stays a link, a link of
# another user's (made when root) is refused and its target untouched;
# a folder is refused.
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
gen=$(dirname "$0")/../bench/gen_titles.py

/usr/bin/python3 "$gen" --postings --count 300 --seed 11 > "$tmp/p.tsv"
"$T" tally "$tmp/p.tsv" > "$tmp/ref.tsv" 2> /dev/null
check "tally to standard output" 0 $?
[ -s "$tmp/ref.tsv" ]; check "a table to compare with" 0 $?
cat > "$tmp/q.jsonl" <<'EOF'
{"id":"00000000000000c3","seq":1,"status":"accepted","kind":"new_alt_label","occupation":"occ:1","lang":"de","label":"lagerhelfer","score":2.5,"postings":20,"added":"2026-12-01T09:00:00Z","proposed":"2026-12-01T09:00:00Z","evidence":{"postings":20},"history":[{"event":"added","at":"2026-12-01T09:00:00Z","postings":20,"score":2.5},{"event":"accepted","at":"2026-12-02T09:00:00Z","reviewer":"ana","postings":20,"score":2.5,"evidence":{"postings":20}}]}
EOF
"$T" review export --queue "$tmp/q.jsonl" > "$tmp/ref.delta" 2> /dev/null
check "export to standard output" 0 $?

# write WHAT TARGET: the command's output into TARGET
write() {
	case $1 in
	tally) "$T" tally -o "$2" "$tmp/p.tsv" 2> "$tmp/err" ;;
	counts) "$T" counts -o "$2" "$tmp/ref.tsv" 2> "$tmp/err" ;;
	export) "$T" review export --queue "$tmp/q.jsonl" -o "$2" 2> "$tmp/err" ;;
	esac
}
ref() { [ "$1" = export ] && echo "$tmp/ref.delta" || echo "$tmp/ref.tsv"; }

for w in tally counts export; do
	d=$tmp/$w
	mkdir "$d"
	# a regular file: replaced, its mode kept, nothing left beside it
	echo old > "$d/out"
	chmod 640 "$d/out"
	write $w "$d/out"; check "$w: -o a file" 0 $?
	cmp -s "$d/out" "$(ref $w)"; check "$w: the file holds the table" 0 $?
	check "$w: the file's mode kept" 640 "$(stat -c %a "$d/out")"
	# standard output
	(cd "$d" && write $w - > "$d/stdout"); check "$w: -o -" 0 $?
	cmp -s "$d/stdout" "$(ref $w)"; check "$w: - is standard output" 0 $?
	[ ! -e "$d/-" ]; check "$w: no file named -" 0 $?
	# a FIFO: written into, still a FIFO
	mkfifo "$d/fifo"
	# a reader that gives up when no writer ever comes (a FIFO replaced)
	timeout 20 cat "$d/fifo" > "$d/fifo.got" &
	reader=$!
	write $w "$d/fifo"; check "$w: -o a FIFO" 0 $?
	wait $reader
	[ -p "$d/fifo" ]; check "$w: the FIFO is still a FIFO" 0 $?
	cmp -s "$d/fifo.got" "$(ref $w)"; check "$w: the FIFO's reader got the table" 0 $?
	# a link of ours: followed, the link stays, its target holds the table
	mkdir "$d/real"
	echo old > "$d/real/table"
	chmod 600 "$d/real/table"
	ln -s real/table "$d/link"
	write $w "$d/link"; check "$w: -o a link of ours" 0 $?
	[ -L "$d/link" ]; check "$w: the link is still a link" 0 $?
	cmp -s "$d/real/table" "$(ref $w)"; check "$w: the link's target holds the table" 0 $?
	check "$w: the link's target keeps its mode" 600 "$(stat -c %a "$d/real/table")"
	# a folder: refused
	write $w "$d/real"; check "$w: -o a folder is refused" 1 $?
	[ -d "$d/real" ]; check "$w: the folder is still there" 0 $?
	# a character device: written into, still a device
	if [ "$(id -u)" = 0 ]; then
		mknod "$d/null" c 1 3 && chmod 666 "$d/null"
		write $w "$d/null"; check "$w: -o a character device" 0 $?
		[ -c "$d/null" ]; check "$w: the device is still a device" 0 $?
		# a link of another user's: refused, what it names untouched
		echo private > "$d/private"
		ln -s "$d/private" "$d/planted"
		chown -h 65534:65534 "$d/planted"
		write $w "$d/planted"; check "$w: a link of another user is refused" 1 $?
		grep -q 'belongs to another user' "$tmp/err"
		check "$w: and says why" 0 $?
		check "$w: what it names is untouched" private "$(cat "$d/private")"
	else
		[ $w = tally ] && echo "  (not root: no mknod device, no link of another user; written into /dev/null instead)"
		write $w /dev/null; check "$w: -o /dev/null" 0 $?
	fi
	left=$(find "$d" -name '*.tmp-*' | wc -l)
	check "$w: no temporary left" 0 "$left"
done
finish

#!/bin/sh
# The compiled lexicon cache (src/norm/lexcache.c): the normaliser's output is
# byte-identical with a warm cache, a cold one and the cache off (the
# case tables and 200,000 generated titles, plain, --key, --json, with
# --labels); an edited, added or removed lexicon file takes effect on the
# next run; a damaged, truncated, emptied or foreign image is rebuilt;
# a link, a file of another owner or one others may write in the cache
# folder is never used nor written through; a folder that cannot be used
# (read-only, another owner's, no HOME) never fails the run.  A run that
# used the image leaves the file as it was (same inode); a run that
# rebuilt it replaced it (rename: a new inode).
. "$(dirname "$0")/lib.inc"
T=$TITLEMILL
here=$(cd "$(dirname "$0")/.." && pwd)
C=$tmp/cache
export TITLEMILL_LEXCACHE="$C"

img() { ls "$C"/lexicon-*.img 2> /dev/null | head -1; }
ino() { stat -c %i "$1" 2> /dev/null; }

# the raw titles of the case tables, and generated ones
for f in "$here"/cases/norm.tsv "$here"/cases/norm-facets.tsv "$here"/cases/lang/*.tsv; do
	cut -f2 "$f" | tail -n +2
done > "$tmp/cases.txt"
/usr/bin/python3 "$here/bench/gen_titles.py" --count "${LEXCACHE_TITLES:-200000}" --seed 1 > "$tmp/gen.txt"

# out NAME ARGS...: the output of norm (stdout and stderr) into $tmp/NAME
out() {
	n=$1; shift
	for f in cases gen; do
		"$T" norm "$@" "$tmp/$f.txt" > "$tmp/$n.$f" 2>&1
		echo "status $?" >> "$tmp/$n.$f"
	done
}

TITLEMILL_LEXCACHE=off out off --memo 0
[ ! -e "$C" ]; check "off: no cache folder made" 0 $?
out cold --memo 0
i=$(img)
[ -n "$i" ]; check "cold: an image written" 0 $?
check "cold: the folder's mode" 700 "$(stat -c %a "$C")"
check "cold: the image's mode" 600 "$(stat -c %a "$i")"
n0=$(ino "$i")
out warm --memo 0
check "warm: the image used, not rewritten" "$n0" "$(ino "$i")"
for f in cases gen; do
	cmp -s "$tmp/off.$f" "$tmp/cold.$f"; check "$f: cold = off" 0 $?
	cmp -s "$tmp/off.$f" "$tmp/warm.$f"; check "$f: warm = off" 0 $?
done
for a in --key --json; do
	TITLEMILL_LEXCACHE=off "$T" norm $a "$tmp/gen.txt" > "$tmp/a.off" 2>&1
	"$T" norm $a "$tmp/gen.txt" > "$tmp/a.warm" 2>&1
	cmp -s "$tmp/a.off" "$tmp/a.warm"; check "norm $a: warm = off" 0 $?
done
# labels are added to the lexicon read from the image
for l in "$here"/../examples/taxonomy.tsv "$here"/../examples/taxonomy.ttl; do
	TITLEMILL_LEXCACHE=off "$T" norm --labels "$l" --json "$tmp/gen.txt" > "$tmp/l.off" 2>&1
	"$T" norm --labels "$l" --json "$tmp/gen.txt" > "$tmp/l.warm" 2>&1
	cmp -s "$tmp/l.off" "$tmp/l.warm"; check "--labels $(basename "$l"): warm = off" 0 $?
done
check "labels: the image left as it was" "$n0" "$(ino "$i")"
[ -s "$tmp/warm.gen" ]; check "a generated output to compare" 0 $?
cp "$i" "$tmp/good.img"

# a damaged, truncated, emptied or foreign image: rebuilt, same output
head -c 2000 "$tmp/cases.txt" > "$tmp/few.txt"
"$T" norm --json "$tmp/few.txt" > "$tmp/few.ref" 2>&1
damage() {
	/usr/bin/python3 - "$i" "$1" <<'PY'
import sys
p, how = sys.argv[1], sys.argv[2]
b = bytearray(open(p, 'rb').read())
if how == 'flip-middle': b[len(b) // 2] ^= 0x10
elif how == 'flip-end': b[-3] ^= 0x01
elif how == 'flip-header': b[20] ^= 0x80
elif how == 'version': b[8] ^= 0x7f
elif how == 'truncate': b = b[:len(b) // 3]
elif how == 'extend': b += b'\0' * 8
elif how == 'empty': b = b''
elif how == 'garbage': b = bytearray(b'\x17' * 4096)
open(p, 'wb').write(b)
PY
}
for how in flip-middle flip-end flip-header version truncate extend empty garbage; do
	cp "$tmp/good.img" "$i"
	damage $how
	n1=$(ino "$i")
	"$T" norm --json "$tmp/few.txt" > "$tmp/few.got" 2>&1
	check "$how: status" 0 $?
	cmp -s "$tmp/few.ref" "$tmp/few.got"; check "$how: same output" 0 $?
	cmp -s "$tmp/good.img" "$i"; check "$how: the image rebuilt" 0 $?
	[ "$(ino "$i")" != "$n1" ]; check "$how: replaced, not written in place" 0 $?
done

# a lexicon file edited, added, removed or renamed takes effect at once
L=$tmp/lex
mkdir -p "$L/schedule"
printf 'en\tcopper shift\tshift\n' > "$L/schedule/extra.txt"
echo "Lagerhelfer copper shift" > "$tmp/one.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/o1" 2>&1
check "extra file: read" "lagerhelfer" "$(cat "$tmp/o1")"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/o1" 2>&1
check "extra file: read from the image" "lagerhelfer" "$(cat "$tmp/o1")"
printf 'en\tkettle shift\tshift\n' > "$L/schedule/extra.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/o2" 2>&1
check "edited file: takes effect" "lagerhelfer copper shift" "$(cat "$tmp/o2")"
printf 'en\tcopper shift\tshift\n' > "$L/schedule/more.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/o3" 2>&1
check "added file: takes effect" "lagerhelfer" "$(cat "$tmp/o3")"
rm "$L/schedule/more.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/o4" 2>&1
check "removed file: takes effect" "lagerhelfer copper shift" "$(cat "$tmp/o4")"
# the same bytes, one byte changed in place with the same size and time
printf 'en\tcopper shifu\tshift\n' > "$L/schedule/extra.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > /dev/null 2>&1
t=$(stat -c %y "$L/schedule/extra.txt")
printf 'en\tcopper shift\tshift\n' > "$L/schedule/extra.txt"
touch -d "$t" "$L/schedule/extra.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/o5" 2>&1
check "a byte changed, size and time kept: takes effect" "lagerhelfer" "$(cat "$tmp/o5")"
# a lexicon error is reported as without the cache, and never cached
printf 'en\tbroken\n' > "$L/schedule/bad.txt"
printf 'xx\n' > "$L/schedule/bad.txt"
"$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/e1" 2>&1; s1=$?
TITLEMILL_LEXCACHE=off "$T" norm --lexicons "$L" "$tmp/one.txt" > "$tmp/e2" 2>&1; s2=$?
check "a bad lexicon file: the same status" "$s2" "$s1"
cmp -s "$tmp/e1" "$tmp/e2"; check "a bad lexicon file: the same message" 0 $?
grep -q "bad.txt:1:" "$tmp/e1"; check "a bad lexicon file: named with its line" 0 $?
rm "$L/schedule/bad.txt"

# a link in place of the image: never followed, replaced by a file
cp "$tmp/good.img" "$tmp/target.img"
rm -f "$i"
ln -s "$tmp/target.img" "$i"
"$T" norm --json "$tmp/few.txt" > "$tmp/few.got" 2>&1
check "link: status" 0 $?
cmp -s "$tmp/few.ref" "$tmp/few.got"; check "link: same output" 0 $?
[ -f "$i" ] && [ ! -L "$i" ]; check "link: replaced by a regular file" 0 $?
cmp -s "$tmp/good.img" "$tmp/target.img"; check "link: its target untouched" 0 $?
# an image others may write: not used
# (removed before the new one is written: its inode may come back, so
# the mode and owner tell the new file apart)
chmod 622 "$i"
"$T" norm "$tmp/few.txt" > /dev/null 2>&1
check "group-writable image: not used, replaced by one of mode 600" 600 "$(stat -c %a "$i")"

# folders that cannot be used: the run goes on without the cache
"$T" norm --json "$tmp/few.txt" > "$tmp/few.ref" 2>&1
for case in file readonly groupw nohome; do
	d=$tmp/bad-$case
	case $case in
	file) echo x > "$d" ;;
	readonly) mkdir -m 500 "$d" ;;
	groupw) mkdir -m 770 "$d" ;;
	esac
	if [ $case = nohome ]; then
		env -u TITLEMILL_LEXCACHE -u XDG_CACHE_HOME -u HOME "$T" norm --json "$tmp/few.txt" > "$tmp/few.got" 2>&1
	else
		TITLEMILL_LEXCACHE=$d "$T" norm --json "$tmp/few.txt" > "$tmp/few.got" 2>&1
	fi
	check "$case folder: status" 0 $?
	cmp -s "$tmp/few.ref" "$tmp/few.got"; check "$case folder: same output" 0 $?
done
[ "$(id -u)" = 0 ] || [ -z "$(ls "$tmp/bad-readonly")" ]; check "read-only folder: nothing written" 0 $?
[ -z "$(ls "$tmp/bad-groupw")" ]; check "group-writable folder: not used" 0 $?
# the default place: XDG_CACHE_HOME, else HOME/.cache
env -u TITLEMILL_LEXCACHE XDG_CACHE_HOME="$tmp/xdg" "$T" norm < /dev/null
ls "$tmp/xdg/titlemill"/lexicon-*.img > /dev/null 2>&1; check "XDG_CACHE_HOME/titlemill" 0 $?
mkdir "$tmp/home"
env -u TITLEMILL_LEXCACHE -u XDG_CACHE_HOME HOME="$tmp/home" "$T" norm < /dev/null
ls "$tmp/home/.cache/titlemill"/lexicon-*.img > /dev/null 2>&1; check "HOME/.cache/titlemill" 0 $?
check "HOME/.cache made private" 700 "$(stat -c %a "$tmp/home/.cache")"

# as root: an image or a folder of another user is not used (uid 65534,
# no account needed), and a user who runs with someone else's folder
# neither reads nor writes it
if [ "$(id -u)" = 0 ] && command -v setpriv > /dev/null; then
	cp "$tmp/good.img" "$i"
	chown 65534 "$i"
	chmod 600 "$i"
	"$T" norm "$tmp/few.txt" > /dev/null 2>&1
	check "another owner's image: not used, replaced by root's" 0 "$(stat -c %u "$i")"
	u=$tmp/user
	mkdir -m 755 "$u"
	chown 65534 "$u"
	chmod 755 "$tmp"
	n1=$(ino "$i")
	setpriv --reuid=65534 --regid=65534 --clear-groups env TITLEMILL_LEXCACHE="$C" \
		"$T" norm --json "$tmp/few.txt" > "$u/few.got" 2>&1
	check "root's folder, another user: status" 0 $?
	cmp -s "$tmp/few.ref" "$u/few.got"; check "root's folder, another user: same output" 0 $?
	check "root's folder, another user: the image untouched" "$n1" "$(ino "$i")"
	cp "$tmp/good.img" "$u/planted.img"
	mkdir -m 700 "$u/c"
	chown 65534 "$u/c"
	setpriv --reuid=65534 --regid=65534 --clear-groups env TITLEMILL_LEXCACHE="$u/c" \
		"$T" norm < /dev/null > /dev/null 2>&1
	j=$(ls "$u/c"/lexicon-*.img)
	check "another user: an image of its own" 65534 "$(stat -c %u "$j")"
	cp "$tmp/good.img" "$j"   # root's file, planted in the user's folder
	setpriv --reuid=65534 --regid=65534 --clear-groups env TITLEMILL_LEXCACHE="$u/c" \
		"$T" norm --json "$tmp/few.txt" > "$u/few.got" 2>&1
	cmp -s "$tmp/few.ref" "$u/few.got"; check "root's image in a user's folder: same output" 0 $?
	check "root's image in a user's folder: replaced by the user's" 65534 "$(stat -c %u "$j")"
fi
# at most four images stay in the folder: each new set of lexicon files
# (or build of the binary) writes an image of its own name and the oldest
# go; a link, a file that is not an image and the image in use stay
P=$tmp/prune
mkdir -p "$P/lex/schedule"
echo target > "$P/target"
for n in 1 2 3 4 5 6; do
	rm -f "$P/lex/schedule"/*.txt
	printf 'en\tcopper shift %s\tshift\n' $n > "$P/lex/schedule/extra$n.txt"
	TITLEMILL_LEXCACHE="$P/c" "$T" norm --lexicons "$P/lex" "$tmp/one.txt" > "$P/out" 2>&1
	if [ $n = 1 ]; then
		ln -s "$P/target" "$P/c/lexicon-0000000000000000.img"
		echo notes > "$P/c/notes.txt"
	fi
done
check "six file sets: four images kept" 4 \
	"$(find "$P/c" -maxdepth 1 -type f -name 'lexicon-*.img' | wc -l)"
[ -L "$P/c/lexicon-0000000000000000.img" ]; check "six file sets: a link left alone" 0 $?
check "six file sets: its target untouched" target "$(cat "$P/target")"
check "six file sets: another file left alone" notes "$(cat "$P/c/notes.txt")"
newest=$(ls -t "$P/c"/lexicon-*.img | head -1)
n6=$(ino "$newest")
TITLEMILL_LEXCACHE="$P/c" "$T" norm --lexicons "$P/lex" "$tmp/one.txt" > /dev/null 2>&1
check "six file sets: the newest image in use" "$n6" "$(ino "$newest")"
finish

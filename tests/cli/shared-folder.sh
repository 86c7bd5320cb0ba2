#!/bin/sh
# A review queue shared by a team: two curators (throwaway users made
# for the run, in a throwaway group) in a group folder with the setgid
# bit.  The queue keeps its mode and group on every rewrite; the lock
# follows the queue's mode so the second curator can take it; links and
# stale files planted by one member never make another member's command
# write through them (the planted temporary pointing at a curator's
# private file leaves that file as it was); unreadable lines go to a
# .rejected file with the queue's mode and group.  Needs root to make
# users (useradd, groupadd) and to run as them (setpriv); skipped
# otherwise.
. "$(dirname "$0")/lib.inc"

if [ "$(id -u)" != 0 ]; then
	echo "  shared-folder: skipped (needs root to make throwaway users and a group)"
	exit 0
fi
for c in useradd groupadd userdel groupdel setpriv; do
	command -v $c > /dev/null || { echo "  shared-folder: skipped (no $c)"; exit 0; }
done

# throwaway group and users, removed on every way out
sfx=$(od -An -N3 -tx1 /dev/urandom | tr -d ' \n')
G=tmg$sfx A=tma$sfx B=tmb$sfx
cleanup() {
	userdel "$A" 2> /dev/null
	userdel "$B" 2> /dev/null
	groupdel "$G" 2> /dev/null
	[ -n "${KEEP:-}" ] || rm -rf "$tmp"
}
trap cleanup EXIT
trap 'exit 1' INT TERM
groupadd "$G" || { echo "  groupadd failed"; exit 1; }
# primary group "users" (-N): the team group is a supplementary one
useradd -M -N -s /bin/sh -G "$G" "$A" || { echo "  useradd failed"; exit 1; }
useradd -M -N -s /bin/sh -G "$G" "$B" || { echo "  useradd failed"; exit 1; }

# the binary where the throwaway users may run it
chmod 755 "$tmp"
mkdir "$tmp/bin"
cp "$TITLEMILL" "$tmp/bin/titlemill"
chmod 755 "$tmp/bin" "$tmp/bin/titlemill"
T=$tmp/bin/titlemill

# as USER UMASK COMMAND...: run as USER (with its groups) under UMASK
as() {
	u=$1 m=$2
	shift 2
	setpriv --reuid="$u" --regid="$(id -g "$u")" --init-groups \
		sh -c 'umask "$0"; exec "$@"' "$m" "$@"
}
mode() { stat -c %a "$1"; }
group() { stat -c %G "$1"; }
owner() { stat -c %U "$1"; }

# the team folder: group-owned, setgid, writable by the group
team=$tmp/team
mkdir "$team"
chgrp "$G" "$team"
chmod 2770 "$team"
# a curator's private folder and file
home=$tmp/home-a
mkdir "$home"
echo "private notes of the first curator" > "$home/private.txt"
chown -R "$A" "$home"
chmod 700 "$home"
chmod 600 "$home/private.txt"

sugg() {
	printf '{"id":"%s","kind":"new_alt_label","occupation":"occ:%s","lang":"de","label":"%s","score":%s.5,"postings":%s,"examples":["%s (m/w/d)"]}\n' \
		"$1" "$2" "$3" "$4" "$4" "$3"
}
{
	sugg 00000000000000a1 1 lagerhelfer 40
	sugg 00000000000000b2 2 kommissionierer 30
	sugg 00000000000000c3 3 staplerfahrer 20
	sugg 00000000000000d4 4 disponent 10
} > "$tmp/sugg.jsonl"
chmod 644 "$tmp/sugg.jsonl"
q=$team/queue.jsonl
export TITLEMILL_NOW=2026-12-01T09:00:00Z

# --- one queue for the team, made under umask 022 and opened up later
as "$A" 022 "$T" review add --queue "$q" "$tmp/sugg.jsonl" 2> "$tmp/e"
check "the first curator makes the queue" 0 $?
check "a new queue takes the folder's group (setgid)" "$G" "$(group "$q")"
check "a new queue takes the umask's mode" 644 "$(mode "$q")"
as "$A" 022 chmod 660 "$q"
as "$A" 022 "$T" review accept --queue "$q" --reviewer ana 00000000000000a1 2> "$tmp/e"
check "the first curator decides" 0 $?
check "a rewrite keeps the mode (660)" 660 "$(mode "$q")"
check "a rewrite keeps the group" "$G" "$(group "$q")"
check "the lock follows the queue's mode" 660 "$(mode "$q.lock")"
as "$B" 022 "$T" review reject --queue "$q" --reviewer bo 00000000000000b2 2> "$tmp/e"
check "the second curator can take the lock and decide" 0 $?
grep -q 'cannot' "$tmp/e" && check "the second curator: no error" "" "$(cat "$tmp/e")"
check "after the second curator: the mode" 660 "$(mode "$q")"
check "after the second curator: the group" "$G" "$(group "$q")"
n=$(as "$A" 022 "$T" review list --queue "$q" --status all 2> /dev/null | grep -c -e accepted -e rejected)
check "both decisions are in the queue" 2 "$n"

# --- a curator's own link to the team's queue: followed, the lock taken
# beside the queue itself (so both curators lock the same file)
as "$A" 022 ln -s "$q" "$home/team-queue.jsonl"
as "$A" 022 "$T" review defer --queue "$home/team-queue.jsonl" --reviewer ana 00000000000000d4 2> "$tmp/e"
check "through one's own link: decided" 0 $?
[ -L "$home/team-queue.jsonl" ]; check "the link stays a link" 0 $?
[ ! -e "$home/team-queue.jsonl.lock" ]; check "no lock beside the link" 0 $?
as "$A" 022 "$T" review list --queue "$q" --status deferred 2> /dev/null | grep -q 00000000000000d4
check "the decision is in the team's queue" 0 $?
check "the team's queue keeps its mode" 660 "$(mode "$q")"

# --- a private queue stays private
p=$tmp/home-a/own.jsonl
as "$A" 022 "$T" review add --queue "$p" "$tmp/sugg.jsonl" 2> /dev/null
as "$A" 022 chmod 600 "$p"
as "$A" 022 "$T" review defer --queue "$p" --reviewer ana 00000000000000c3 2> /dev/null
check "a private queue stays 600 after a rewrite" 600 "$(mode "$p")"

# --- a group set by hand is kept in a folder without the setgid bit
plain=$tmp/plain
mkdir "$plain"
chown "$A" "$plain"
as "$A" 002 "$T" review add --queue "$plain/q.jsonl" "$tmp/sugg.jsonl" 2> /dev/null
as "$A" 002 chgrp "$G" "$plain/q.jsonl"
as "$A" 002 "$T" review defer --queue "$plain/q.jsonl" --reviewer ana 00000000000000d4 2> /dev/null
check "a group set by hand survives a rewrite" "$G" "$(group "$plain/q.jsonl")"

# --- a group the curator may not give: the write goes ahead and says so
q4=$team/fourth.jsonl
as "$A" 002 "$T" review add --queue "$q4" "$tmp/sugg.jsonl" 2> /dev/null
chgrp root "$q4"
as "$B" 002 "$T" review defer --queue "$q4" --reviewer bo 00000000000000d4 2> "$tmp/e"
check "a group that cannot be kept: the decision is recorded" 0 $?
grep -q "warning: .*fourth.jsonl: could not keep the group root (0): Operation not permitted; it is now $G" "$tmp/e" ||
	check "a group that cannot be kept: said so" "could not keep the group root" "$(cat "$tmp/e")"
check "a group that cannot be kept: the folder's group instead" "$G" "$(group "$q4")"

# --- a planted temporary: a link from the second curator to the first
# curator's private file; the first curator's next decision leaves that
# file as it was and the queue a regular file
before=$(cat "$home/private.txt")
as "$B" 002 ln -s "$home/private.txt" "$q.tmp"
as "$B" 002 sh -c 'for s in 1 2 3 4 5 6 7 8 9; do ln -s "$0" "$1.tmp-$s$s$s"; done' \
	"$home/private.txt" "$q"
as "$A" 002 "$T" review defer --queue "$q" --reviewer ana 00000000000000c3 2> "$tmp/e"
check "decide beside a planted temporary" 0 $?
check "the private file the planted link names is untouched" "$before" "$(cat "$home/private.txt")"
[ -f "$q" ] && [ ! -L "$q" ]; check "the queue is still a regular file" 0 $?
check "the queue still has its mode" 660 "$(mode "$q")"
as "$A" 002 "$T" review list --queue "$q" --status deferred > "$tmp/l" 2> /dev/null
grep -q 00000000000000c3 "$tmp/l"; check "the decision is in the queue" 0 $?
rm -f "$q.tmp" "$q".tmp-*

# --- stale files of a killed writer: a temporary and the lock, both the
# second curator's; the first curator works on
as "$B" 002 sh -c 'echo "half a queue" > "$0.tmp-K1lled"' "$q"
as "$A" 002 "$T" review add --queue "$q" "$tmp/sugg.jsonl" 2> "$tmp/e"
check "a stale temporary does not stop the next write" 0 $?
check "a stale temporary is left alone" "half a queue" "$(cat "$q.tmp-K1lled")"
rm -f "$q.tmp-K1lled"

# --- a planted lock: a link is never opened
q2=$team/second.jsonl
as "$A" 002 "$T" review add --queue "$q2" "$tmp/sugg.jsonl" 2> /dev/null
rm -f "$q2.lock"
as "$B" 002 ln -s "$home/private.txt" "$q2.lock"
as "$A" 002 "$T" review accept --queue "$q2" --reviewer ana 00000000000000a1 2> "$tmp/e"
check "a lock that is a link is refused" 1 $?
grep -q 'symbolic link' "$tmp/e"; check "and the message says so" 0 $?
check "the file the planted lock names is untouched" "$before" "$(cat "$home/private.txt")"
check "its mode too" 600 "$(mode "$home/private.txt")"

# --- a queue name that is another member's link: refused
as "$B" 002 ln -s "$home/private.txt" "$team/third.jsonl"
as "$A" 002 "$T" review add --queue "$team/third.jsonl" "$tmp/sugg.jsonl" 2> "$tmp/e"
check "a queue that is another member's link is refused" 1 $?
grep -q 'belongs to another user' "$tmp/e"; check "and the message says why" 0 $?
check "what that link names is untouched" "$before" "$(cat "$home/private.txt")"

# --- repair in the shared folder: the rejected lines keep the queue's
# mode and group, and are appended
echo '{"id":"00000000000000e5","seq":' >> "$q"
as "$B" 002 "$T" review repair --queue "$q" 2> "$tmp/e"
check "repair by the second curator" 0 $?
check "the rejected file takes the queue's mode" 660 "$(mode "$q.rejected")"
check "the rejected file takes the queue's group" "$G" "$(group "$q.rejected")"
check "the queue keeps its mode after repair" 660 "$(mode "$q")"
finish

/* store_redis_keys.c - the Redis store's key layout, and its prefix.
 *
 * Every key starts with the prefix P; the part in braces is the Redis
 * Cluster hash tag, so all keys of one tag share a slot:
 *   P:{o:OCC}:f   hash  LANG 1F KEY 1F TITLE -> postings of that form
 *   P:{o:OCC}:n   hash  LANG -> postings of the occupation
 *   P:{o:OCC}:x   hash  LANG 1F KEY -> up to three examples, each
 *                       16 hex digits of its hash then its text, joined
 *                       by 1E (kept: the smallest hashes)
 *   P:{o:OCC}:L   set   the ledger of this tag: digests of the chunks
 *                       whose share of this occupation is applied
 *   P:{k:NN}:k    hash  LANG 1F KEY -> postings whatever the occupation,
 *                       spread over 64 keys by the hash of the field
 *   P:{k:NN}:L    set   the ledger of that key-total shard
 *   P:{i:NN}:i    hash  posting id -> the chunk that counts it (16 hex
 *                       digits of its digest), spread over 64 keys; and
 *                       "" (no posting id) -> SR_ID_NOTE, a value long
 *                       enough that the server keeps the hash a hash
 *                       table (store_redis_apply.c)
 *   P:{j:D}:j     hash  the journal of chunk D (32 hex digits): its
 *                       postings, while it is being loaded
 *                       (store_redis_chunk.c)
 *   P:{j}:open    set   the digests of the journals there are
 *   P:{p}:kind    string the kind of period the store counts by (day,
 *                       week, month or none), set by its first load; a
 *                       store without it (written before periods, or
 *                       never loaded) holds undated counts only
 *   P:{r}:items   hash  review queue: suggestion id -> the item, one JSON
 *                       line (the same line as in a queue file)
 *   P:{r}:log     stream review events in the order they happened:
 *                       event, id, status, kind, occupation, lang, label,
 *                       at, and reviewer and note for decisions
 *
 * Periods.  The counts of a dated period (core/period.h: 2026-03-01,
 * 2026-W09, 2026-03) are hashes of the same form under the same tag, the
 * period's label after one more colon:
 *   P:{o:OCC}:f:LABEL, P:{o:OCC}:n:LABEL, P:{o:OCC}:x:LABEL,
 *   P:{k:NN}:k:LABEL
 * The undated period keeps the names above, so a store written before
 * periods reads as undated.  One tag, one slot, one ledger for all its
 * periods: a chunk's share of a tag (every period of it) is applied
 * atomically and once, and with a time to live the keys of a period no
 * load touches any more expire on their own.  A key is told apart from
 * its period by its end: an undated key ends in "}:" and its letter, a
 * dated one in a label, which ends in a digit.
 *
 * A tag's ledger is its key up to "}:", then L. */
#include "count/store_redis.h"

#include <stdio.h>
#include <string.h>

int store_prefix_check(const char *p, tm_buf *err)
{
	size_t n = strlen(p);
	char m[160];
	if (!n || n > STORE_PREFIX_MAX) {
		snprintf(m, sizeof m, "a key prefix has 1 to %d characters, not %zu", STORE_PREFIX_MAX, n);
		buf_puts(err, m);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		unsigned char c = (unsigned char)p[i];
		if (!((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') ||
		      c == '.' || c == '_' || c == ':' || c == '-')) {
			snprintf(m, sizeof m, "a key prefix is made of letters, digits and . _ : - "
				 "(character %zu is not)", i + 1);
			buf_puts(err, m);
			return -1;
		}
	}
	return 0;
}

int sr_match_pattern(const char *prefix, const char *rest, tm_buf *out)
{
	buf_reset(out);
	for (const char *c = prefix; *c; c++)
		if ((strchr("*?[]\\", *c) && buf_putc(out, '\\')) || buf_putc(out, *c))
			return -1;
	return buf_puts(out, rest);
}

int store_key_occ(const char *prefix, const char *occ, size_t ol, char suffix, tm_buf *kb)
{
	buf_reset(kb);
	if (buf_puts(kb, prefix) || buf_puts(kb, ":{o:") || buf_append(kb, occ, ol) ||
	    buf_puts(kb, "}:") || buf_putc(kb, suffix))
		return -1;
	return 0;
}

int sr_key_at(tm_buf *kb, const char *label, size_t n, size_t *taglen)
{
	*taglen = kb->len - 1;
	if (!n)
		return 0;
	return buf_putc(kb, ':') || buf_append(kb, label, n) ? -1 : 0;
}

size_t sr_key_period(const char *k, size_t kl, const char **label, size_t *n)
{
	*label = NULL;
	*n = 0;
	if (!kl || k[kl - 1] < '0' || k[kl - 1] > '9')
		return kl;
	/* back over the label (at most a day's length: digits, '-', 'W') to
	 * the colon after "}:X" */
	for (size_t i = kl; i > 0 && kl - i < PERIOD_MAX; i--) {
		char c = k[i - 1];
		if (c == ':') {
			if (i < 4 || k[i - 3] != ':' || k[i - 4] != '}')
				return kl;
			*label = k + i;
			*n = kl - i;
			return i - 1;
		}
		if (!((c >= '0' && c <= '9') || c == '-' || c == 'W'))
			return kl;
	}
	return kl;
}

int store_key_shard(const char *prefix, char kind, uint64_t h, tm_buf *kb)
{
	char t[64];
	snprintf(t, sizeof t, ":{%c:%02u}:%c", kind, (unsigned)(h % SR_SHARDS), kind);
	buf_reset(kb);
	if (buf_puts(kb, prefix) || buf_puts(kb, t))
		return -1;
	return 0;
}

int sr_key_journal(const char *prefix, const char *dg, tm_buf *kb)
{
	buf_reset(kb);
	return buf_puts(kb, prefix) || buf_puts(kb, ":{j:") || buf_append(kb, dg, 32) ||
			       buf_puts(kb, "}:j")
		       ? -1
		       : 0;
}

int sr_key_tagged(const char *prefix, const char *tag, const char *what, tm_buf *kb)
{
	buf_reset(kb);
	return buf_puts(kb, prefix) || buf_puts(kb, ":{") || buf_puts(kb, tag) ||
			       buf_puts(kb, "}:") || buf_puts(kb, what)
		       ? -1
		       : 0;
}

size_t sr_first_field(const char *s, size_t n)
{
	const char *x = memchr(s, SR_SEP, n);
	return x ? (size_t)(x - s) : n;
}

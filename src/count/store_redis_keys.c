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
 *                       digits of its digest), spread over 64 keys
 *   P:{j:D}:j     hash  the journal of chunk D (32 hex digits): its
 *                       postings, while it is being loaded
 *                       (store_redis_chunk.c)
 *   P:{j}:open    set   the digests of the journals there are
 *   P:{r}:items   hash  review queue: suggestion id -> the item, one JSON
 *                       line (the same line as in a queue file)
 *   P:{r}:log     stream review events in the order they happened:
 *                       event, id, status, kind, occupation, lang, label,
 *                       at, and reviewer and note for decisions
 * A tag's ledger is its key without the last letter, then L. */
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

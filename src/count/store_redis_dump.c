/* store_redis_dump.c - reading the Redis store's counts back into a
 * memory engine: every master's keys of the prefix (SCAN), each counting
 * hash read with HSCAN; a journal left behind counts as an unfinished
 * chunk. */
#include "count/store_redis.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static int scan_hash(rstore *r, const char *key, size_t kl, int kind, const char *occ,
		     size_t ol, tally_mem *m)
{
	char cursor[32] = "0";
	do {
		const char *av[5] = {"HSCAN", key, cursor, "COUNT", "1000"};
		size_t al[5] = {5, kl, strlen(cursor), 5, 4};
		redisReply *rep = sr_cmd(r, 5, av, al);
		if (!rep)
			return -1;
		if (rep->type != REDIS_REPLY_ARRAY || rep->elements != 2) {
			freeReplyObject(rep);
			sr_err(r, "unexpected reply to HSCAN", NULL);
			return -1;
		}
		snprintf(cursor, sizeof cursor, "%.*s", (int)rep->element[0]->len, rep->element[0]->str);
		redisReply *a = rep->element[1];
		for (size_t i = 0; i + 1 < a->elements; i += 2) {
			const char *f = a->element[i]->str, *v = a->element[i + 1]->str;
			size_t fl = a->element[i]->len, vl = a->element[i + 1]->len;
			uint64_t n = 0;
			if (kind != 'x') {
				/* a count: digits only, and no more than 64 bits hold */
				char *e;
				errno = 0;
				n = vl && v[0] >= '0' && v[0] <= '9' ? strtoull(v, &e, 10) : 0;
				if (!vl || v[0] < '0' || v[0] > '9' || errno || e != v + vl) {
					sr_err(r, "the store holds a count that is not a number", key);
					freeReplyObject(rep);
					return -1;
				}
			}
			char lang[4] = {0};
			size_t l1 = sr_first_field(f, fl);
			memcpy(lang, f, l1 < 3 ? l1 : 3);
			int bad = 0;
			if (kind == 'n')
				bad = tm_add_occ(m, occ, ol, lang, n);
			else if (kind == 'k')
				bad = tm_add_key(m, lang, f + l1 + 1, fl > l1 ? fl - l1 - 1 : 0, n);
			else if (kind == 'f') {
				const char *rest = f + l1 + 1;
				size_t rl = fl - l1 - 1, l2 = sr_first_field(rest, rl);
				bad = tm_add_form(m, occ, ol, lang, rest, l2, rest + l2 + 1,
						  rl > l2 ? rl - l2 - 1 : 0, n);
			} else if (kind == 'x') {
				size_t s = 0;
				for (size_t j = 0; j <= vl && !bad; j++)
					if (j == vl || v[j] == '\x1E') {
						if (j - s > 16)
							bad = tm_add_example(m, occ, ol, lang, f + l1 + 1,
									     fl - l1 - 1, v + s + 16, j - s - 16);
						s = j + 1;
					}
			}
			if (bad) {
				freeReplyObject(rep);
				sr_err(r, bad == -2 ? "the counts add up past 2^64 - 1" : "out of memory",
				     bad == -2 ? key : NULL);
				return -1;
			}
		}
		freeReplyObject(rep);
	} while (strcmp(cursor, "0"));
	return 0;
}

/* Calls fn(ctx, key, length) for every key of every master that is the
 * prefix followed by what the glob rest matches; stops at fn's first
 * non-zero value and returns it (-1 with the message set on failure). */
static int scan_keys(rstore *r, const char *rest,
		     int (*fn)(rstore *r, void *ctx, const char *k, size_t kl), void *ctx)
{
	tm_buf match = {0};
	size_t pl = strlen(r->prefix);
	int rc = 0;

	if (sr_match_pattern(r->prefix, rest, &match)) {
		sr_err(r, "out of memory", NULL);
		return -1;
	}
	/* every master holds its share of the keys */
	for (size_t mi = 0; !rc && rc_master(&r->k, mi); mi++) {
		size_t node = rc_master(&r->k, mi) - 1;
		char cursor[32] = "0";
		do {
			const char *av[6] = {"SCAN", cursor, "MATCH", match.data, "COUNT", "1000"};
			size_t al[6] = {4, strlen(cursor), 5, match.len, 5, 4};
			redisContext *c = rc_node_conn(&r->k, node);
			redisReply *rep = c ? rc_command(c, 6, av, al) : NULL;
			if (!rep) {
				if (c)
					sr_err(r, "lost the connection", c->errstr);
				else
					sr_kerr_up(r);
				rc = -1;
				break;
			}
			if (rep->type != REDIS_REPLY_ARRAY || rep->elements != 2) {
				sr_err(r, "unexpected reply to SCAN", rep->type == REDIS_REPLY_ERROR ? rep->str : NULL);
				freeReplyObject(rep);
				rc = -1;
				break;
			}
			snprintf(cursor, sizeof cursor, "%.*s", (int)rep->element[0]->len, rep->element[0]->str);
			redisReply *a = rep->element[1];
			for (size_t i = 0; i < a->elements && !rc; i++) {
				const char *k = a->element[i]->str;
				size_t kl = a->element[i]->len;
				/* (the pattern is escaped; the prefix checked all the same) */
				if (kl > pl && !memcmp(k, r->prefix, pl) && k[pl] == ':')
					rc = fn(r, ctx, k, kl);
			}
			freeReplyObject(rep);
		} while (!rc && strcmp(cursor, "0"));
	}
	buf_free(&match);
	return rc;
}

static int dump_key(rstore *r, void *ctx, const char *k, size_t kl)
{
	tally_mem *m = ctx;
	size_t pl = strlen(r->prefix);
	if (kl > pl + 7 && !memcmp(k + pl, ":{o:", 4) && k[kl - 3] == '}' &&
	    k[kl - 2] == ':' && strchr("fnx", k[kl - 1]))
		return scan_hash(r, k, kl, k[kl - 1], k + pl + 4, kl - pl - 7, m);
	if (kl == pl + 9 && !memcmp(k + pl, ":{k:", 4) && k[kl - 1] == 'k')
		return scan_hash(r, k, kl, 'k', NULL, 0, m);
	if (kl == pl + 39 && !memcmp(k + pl, ":{j:", 4))
		r->base.unfinished++;
	return 0;
}

/* The store keeps no periods yet: everything it holds is undated. */
int sr_dump(store *st, tally_series *s)
{
	tally_mem *m;
	int r = series_at(s, "", 0, &m, &st->err);
	if (r)
		return -1;
	if (!m) {
		/* a window leaves the undated counts out; the journals still
		 * say whether a load is unfinished */
		tally_mem none;
		tm_init(&none);
		r = scan_keys((rstore *)st, ":*", dump_key, &none) ? -1 : 0;
		tm_free(&none);
		return r;
	}
	return scan_keys((rstore *)st, ":*", dump_key, m) ? -1 : 0;
}

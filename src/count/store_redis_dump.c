/* store_redis_dump.c - reading the Redis store's counts back into a
 * series, period by period: every master's keys of the prefix (SCAN),
 * each counting hash read with HSCAN into its period's engine; a journal
 * left behind counts as an unfinished chunk. */
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

/* Where a dump goes: the series (series_at gives each key's engine;
 * the hashes of periods a window leaves out are not read). */
typedef struct dump_to {
	tally_series *s;
} dump_to;

static int dump_key(rstore *r, void *ctx, const char *k, size_t kl)
{
	dump_to *d = ctx;
	size_t pl = strlen(r->prefix), ln;
	const char *label;
	tally_mem *m;
	int kind = 0;

	if (kl == pl + 39 && !memcmp(k + pl, ":{j:", 4)) {
		r->base.unfinished++;
		return 0;
	}
	/* the key without its period (sr_key_period), then its kind */
	size_t bl = sr_key_period(k, kl, &label, &ln);
	if (bl > pl + 7 && !memcmp(k + pl, ":{o:", 4) && k[bl - 3] == '}' && k[bl - 2] == ':' &&
	    strchr("fnx", k[bl - 1]))
		kind = k[bl - 1];
	else if (bl == pl + 9 && !memcmp(k + pl, ":{k:", 4) && k[bl - 1] == 'k')
		kind = 'k';
	if (!kind)
		return 0;
	int rc = series_at(d->s, label ? label : "", ln, &m, &r->base.err);
	if (rc == -2) {
		sr_err(r, "out of memory", NULL);
		return -1;
	}
	if (rc) {
		tm_buf why = {0};
		buf_append(&why, r->base.err.data, r->base.err.len);
		buf_puts(&why, ": ");
		buf_append(&why, k, kl);
		sr_err(r, "the store's counts cannot be read here", why.data ? why.data : "");
		buf_free(&why);
		return -1;
	}
	if (!m)
		return 0; /* the window leaves it out */
	return kind == 'k' ? scan_hash(r, k, kl, 'k', NULL, 0, m)
			   : scan_hash(r, k, kl, kind, k + pl + 4, bl - pl - 7, m);
}

/* Can a store counting by kind (-1: none recorded) be read into s?  A
 * series by day, week or month takes its own kind and days (rolled up);
 * one of kind none, or as read, takes any.  0, or -1 with the message. */
static int kind_fits(rstore *r, int kind, const tally_series *s)
{
	char m[400];
	if (kind <= PERIOD_NONE || s->kind == SERIES_AS_READ || s->kind == PERIOD_NONE ||
	    kind == s->kind || kind == PERIOD_DAY)
		return 0;
	snprintf(m, sizeof m, "the store counts by %s, which cannot be read by %s (%s): read it by %s, "
		 "or with --period none for all time", period_kind_name(kind), period_kind_name(s->kind),
		 kind == PERIOD_WEEK && s->kind == PERIOD_MONTH ? "a week can straddle two months"
								  : "a period cannot be split",
		 period_kind_name(kind));
	sr_err(r, m, NULL);
	return -1;
}

int sr_dump(store *st, tally_series *s)
{
	rstore *r = (rstore *)st;
	dump_to d = {s};
	int kind;
	if (sr_kind_get(r, &kind) != 0 || kind_fits(r, kind, s) != 0)
		return -1;
	return scan_keys(r, ":*", dump_key, &d) ? -1 : 0;
}

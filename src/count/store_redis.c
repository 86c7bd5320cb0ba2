/* store_redis.c - the Redis store, one server or a Redis Cluster: opening
 * (the scripts loaded on every connection), closing, errors and routed
 * commands.  The store's other parts are listed in store_redis.h; with
 * its router (cluster.c), the only files that know hiredis. */
#include "count/store_redis.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "count/chunk.h"
#include "count/slot.h"

void sr_err(rstore *r, const char *what, const char *detail)
{
	char m[800];
	snprintf(m, sizeof m, "%s: %s%s%s", r->name, what, detail ? ": " : "",
		 detail ? detail : "");
	buf_reset(&r->base.err);
	buf_puts(&r->base.err, m);
}

/* The router's message as the store's. */
void sr_kerr_up(rstore *r)
{
	buf_reset(&r->base.err);
	buf_append(&r->base.err, r->k.err.data ? r->k.err.data : "", r->k.err.len);
	/* the server named once: a Unix socket's URL is its node's name */
	if (!strncmp(r->base.err.data, r->name, strlen(r->name)))
		return;
	if (r->k.cluster) {
		/* name the cluster too */
		tm_buf b = {0};
		buf_puts(&b, r->name);
		buf_puts(&b, ": ");
		buf_append(&b, r->base.err.data, r->base.err.len);
		buf_free(&r->base.err);
		r->base.err = b;
	}
}

/* Loads the scripts on a new connection: also where a server that wants
 * a password says so. */
static int load_scripts(void *ctx, redisContext *c, tm_buf *err)
{
	rstore *r = ctx;
	tm_buf apply = {0};
	char *sha[2] = {r->sha_claim, r->sha_apply};
	buf_reset(err);
	if (buf_puts(&apply, sr_apply_script) || buf_puts(&apply, sr_apply_examples)) {
		buf_free(&apply);
		buf_puts(err, "out of memory");
		return -1;
	}
	const char *src[2] = {sr_claim_script, apply.data};
	for (int i = 0; i < 2; i++) {
		const char *av[3] = {"SCRIPT", "LOAD", src[i]};
		size_t al[3] = {6, 4, strlen(src[i])};
		redisReply *rep = redisCommandArgv(c, 3, av, al);
		buf_reset(err);
		if (!rep) {
			buf_free(&apply);
			buf_puts(err, "lost the connection");
			return -1;
		}
		if (rep->type == REDIS_REPLY_ERROR) {
			if (strstr(rep->str, "NOAUTH"))
				buf_puts(err, "the server requires a password: set TITLEMILL_REDIS_PASSWORD "
					      "or put user:password@ in the URL");
			else {
				buf_puts(err, "the server refused the script: ");
				buf_puts(err, rep->str);
			}
			freeReplyObject(rep);
			buf_free(&apply);
			return -1;
		}
		if (rep->type != REDIS_REPLY_STRING || rep->len != 40) {
			freeReplyObject(rep);
			buf_free(&apply);
			buf_puts(err, "unexpected reply to SCRIPT LOAD");
			return -1;
		}
		memcpy(sha[i], rep->str, 40);
		sha[i][40] = 0;
		freeReplyObject(rep);
	}
	buf_free(&apply);
	return 0;
}

redisReply *sr_cmd(rstore *r, int argc, const char **argv, const size_t *len)
{
	rc_cmd c = {argc, argv, len, argc > 1 ? slot_of(argv[1], len[1]) : 0, NULL};
	if (rc_run(&r->k, &c, 1) != 0) {
		sr_kerr_up(r);
		return NULL;
	}
	if (c.reply->type == REDIS_REPLY_ERROR) {
		sr_err(r, "the server answered with an error", c.reply->str);
		freeReplyObject(c.reply);
		return NULL;
	}
	return c.reply;
}

int sr_kind_get(rstore *r, int *kind)
{
	tm_buf kb = {0};
	*kind = -1;
	if (sr_key_tagged(r->prefix, "p", "kind", &kb)) {
		sr_err(r, "out of memory", NULL);
		return -1;
	}
	const char *av[2] = {"GET", kb.data};
	size_t al[2] = {3, kb.len};
	redisReply *rep = sr_cmd(r, 2, av, al);
	int rc = rep ? 0 : -1;
	if (rep && rep->type == REDIS_REPLY_STRING) {
		char v[16];
		snprintf(v, sizeof v, "%.*s", (int)(rep->len < 15 ? rep->len : 15), rep->str);
		*kind = rep->len < 15 ? period_kind_of(v) : -1;
		if (*kind < 0 || *kind > PERIOD_MONTH) {
			*kind = -1;
			sr_err(r, "the store's kind of period is none of day, week, month or none", kb.data);
			rc = -1;
		}
	}
	if (rep)
		freeReplyObject(rep);
	buf_free(&kb);
	return rc;
}

/* The store's kind of period (P:{p}:kind) made the load's, before the
 * load's first chunk: set when the store has none, renewed with the time
 * to live, a load of another kind refused.  0 or -1. */
static int kind_claim(rstore *r)
{
	tm_buf kb = {0};
	const char *name = period_kind_name(r->period);
	int rc = -1, kind;
	if (sr_key_tagged(r->prefix, "p", "kind", &kb)) {
		sr_err(r, "out of memory", NULL);
		return -1;
	}
	const char *av[3] = {"SETNX", kb.data, name};
	size_t al[3] = {5, kb.len, strlen(name)};
	redisReply *rep = sr_cmd(r, 3, av, al);
	if (!rep)
		goto done;
	freeReplyObject(rep);
	if (sr_kind_get(r, &kind) != 0)
		goto done;
	if (kind < 0) {
		/* gone between the two commands: expired, or deleted */
		sr_err(r, "the store's kind of period vanished as it was set: run the load again",
		       kb.data);
		goto done;
	}
	if (kind != r->period) {
		char m[400];
		snprintf(m, sizeof m, "the store counts by %s, and this load by %s: load it with "
			 "--period %s, or into a store of its own (another --prefix)",
			 period_kind_name(kind), name, period_kind_name(kind));
		sr_err(r, m, NULL);
		goto done;
	}
	if (strcmp(r->ttl, "0")) {
		const char *ev[3] = {"EXPIRE", kb.data, r->ttl};
		size_t el[3] = {6, kb.len, strlen(r->ttl)};
		if (!(rep = sr_cmd(r, 3, ev, el)))
			goto done;
		freeReplyObject(rep);
	}
	r->kind_known = 1;
	rc = 0;
done:
	buf_free(&kb);
	return rc;
}

static int r_add(store *st, const tally_posting *p)
{
	rstore *r = (rstore *)st;
	size_t n = 0;
	long day;
	if (!r->kind_known && kind_claim(r) != 0)
		return -1;
	/* the posting's period (the readers check dates; one that is no
	 * day is refused, as in memory), worked out again only when the
	 * date is not the last one's */
	if (p->date && r->period != PERIOD_NONE) {
		if (!r->datelen || p->datelen != r->datelen || memcmp(p->date, r->date, p->datelen)) {
			if (period_date(p->date, p->datelen, &day) != 0) {
				buf_reset(&st->err);
				buf_puts(&st->err, "bad date '");
				buf_append(&st->err, p->date, p->datelen > 40 ? 40 : p->datelen);
				buf_puts(&st->err, "' (want YYYY-MM-DD, a day of the calendar)");
				return -1;
			}
			r->labellen = period_label(r->period, day, r->label);
			r->datelen = 0; /* kept only when it fits */
			if (p->datelen <= sizeof r->date) {
				memcpy(r->date, p->date, p->datelen);
				r->datelen = p->datelen;
			}
		}
		n = r->labellen;
	}
	if (chunk_put(&r->chunk, p, r->label, n)) {
		sr_err(r, "out of memory", NULL);
		return -1;
	}
	/* now and then, what waits to be sent goes out while we work */
	if ((++r->nchunk & 255) == 0)
		rc_pump(&r->k);
	return 0;
}

int sr_run_batch(rstore *r, rc_cmd *cmds, size_t n, long long *ints, const char *what)
{
	int rc = 0;
	if (rc_run(&r->k, cmds, n) != 0) {
		sr_kerr_up(r);
		return -1;
	}
	for (size_t i = 0; i < n; i++) {
		redisReply *x = cmds[i].reply;
		if (x->type == REDIS_REPLY_ERROR) {
			if (!rc)
				sr_err(r, what, x->str);
			rc = -1;
		} else if (ints)
			ints[i] = x->type == REDIS_REPLY_INTEGER ? x->integer : -1;
	}
	return rc;
}

static void r_close(store *st)
{
	rstore *r = (rstore *)st;
	if (!r)
		return;
	rc_close(&r->k);
	free(r->k.user);
	free(r->k.pass);
	free(r->k.name);
	free(r->name);
	buf_free(&r->chunk);
	st_free(&r->exbound);
	sr_flight_free(&r->fly[0]);
	sr_flight_free(&r->fly[1]);
	free(r);
}

static const store_ops redis_ops = {r_add, sr_commit, sr_finish, sr_dump, r_close};

store *store_open(const char *url, const store_conf *conf, tm_buf *err)
{
	rstore *r = calloc(1, sizeof *r);
	const char *env = getenv("TITLEMILL_REDIS_PASSWORD");
	sr_seeds sd = {0};
	store *out = NULL;

	if (!r) {
		buf_puts(err, "out of memory");
		return NULL;
	}
	r->period = conf ? conf->period : PERIOD_NONE;
	if (r->period == SERIES_AS_READ)
		r->period = PERIOD_MONTH; /* as series_add counts postings read as they come */
	if (r->period != PERIOD_NONE && r->period != PERIOD_DAY && r->period != PERIOD_WEEK &&
	    r->period != PERIOD_MONTH) {
		buf_puts(err, "a store counts by day, week, month or none");
		free(r);
		return NULL;
	}
	r->base.period = r->period;
	store_base_init(&r->base, &redis_ops, STORE_CHUNK_DEFAULT);
	r->k.retries = conf && conf->retries >= 0 ? conf->retries : STORE_RETRIES_DEFAULT;
	r->k.timeout_ms = conf && conf->timeout_ms > 0 ? conf->timeout_ms : STORE_TIMEOUT_MS_DEFAULT;
	r->k.on_connect = load_scripts;
	const char *kill = getenv("TITLEMILL_TEST_KILL");
	if (kill && (!strncmp(kill, "claim:", 6) || !strncmp(kill, "apply:", 6))) {
		r->kill_stage = kill[0] == 'c' ? 1 : 2;
		r->kill_at = strtol(kill + 6, NULL, 10);
	}
	r->k.ctx = r;
	const char *prefix = conf && conf->prefix ? conf->prefix : STORE_PREFIX_DEFAULT;
	if (store_prefix_check(prefix, err) != 0) {
		store_close(&r->base);
		return NULL;
	}
	memcpy(r->prefix, prefix, strlen(prefix) + 1);
	snprintf(r->ttl, sizeof r->ttl, "%lld", conf && conf->ttl_s > 0 ? conf->ttl_s : 0LL);
	if (sr_parse_url(r, url, &sd, err) != 0) {
		store_close(&r->base);
		goto done;
	}
	if (!r->k.pass && env && *env)
		r->k.pass = strdup(env);
	r->k.name = strdup(r->name);
	/* a short outage at the start is waited out like one later on */
	long wait = 100;
	for (int a = 0;; a++) {
		if (rc_open(&r->k, sd.host, sd.port, sd.path, sd.n) == 0)
			break;
		if (a >= r->k.retries || strstr(r->k.err.data, "password") ||
		    strstr(r->k.err.data, "not a Redis Cluster") || strstr(r->k.err.data, "database 0")) {
			sr_kerr_up(r);
			buf_append(err, r->base.err.data, r->base.err.len);
			store_close(&r->base);
			goto done;
		}
		rc_close(&r->k);
		struct timespec ts = {wait / 1000, (wait % 1000) * 1000000L};
		nanosleep(&ts, NULL);
		wait = wait * 2 > 2000 ? 2000 : wait * 2;
	}
	out = &r->base;
done:
	sr_seeds_free(&sd);
	return out;
}

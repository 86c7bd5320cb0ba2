/* store_redis_url.c - the Redis store's URL: redis://[user:password@]
 * host:port[,host:port...][/db] or unix:/path.  The name it gives for
 * messages never shows the password. */
#include "count/store_redis.h"

#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

/* redis://[user:password@]host:port[,host:port...][/db] or unix:/path;
 * several host:port are the seeds of a cluster (one is enough: the
 * router finds the others).  A host may be an IPv6 address in brackets,
 * [::1]:6379. */

static const char url_forms[] =
	"a store is redis://[user:password@]host:port[,host:port...][/db] or unix:/path";

/* Puts url into err for a message, its user-info (which may hold a
 * password) replaced by "...@". */
static void url_shown(const char *url, tm_buf *err)
{
	const char *at = strrchr(url, '@');
	if (!at) {
		buf_puts(err, url);
		return;
	}
	const char *sch = strstr(url, "://");
	if (sch && sch < at)
		buf_append(err, url, (size_t)(sch + 3 - url));
	buf_puts(err, "...");
	buf_puts(err, at);
}

int store_url_check(const char *url, tm_buf *err)
{
	if (!strncmp(url, "unix:", 5) || !strncasecmp(url, "redis://", 8) ||
	    !strncasecmp(url, "rediss://", 9))
		return 0;
	buf_puts(err, url_forms);
	buf_puts(err, ", not '");
	url_shown(url, err);
	buf_puts(err, "'");
	return -1;
}

int sr_parse_url(rstore *r, const char *url, sr_seeds *sd, tm_buf *err)
{
	const char *p;
	char *e;

	if (!strncmp(url, "unix:", 5)) {
		if (!url[5]) {
			buf_puts(err, "unix: wants a socket path, e.g. unix:/run/redis.sock");
			return -1;
		}
		sd->path[0] = strdup(url + 5);
		sd->n = 1;
		r->name = strdup(url);
		return sd->path[0] && r->name ? 0 : -1;
	}
	if (!strncasecmp(url, "rediss://", 9)) {
		/* hiredis 0.14 (Debian 12) has no TLS: better no store than a
		 * password and the counts sent in the clear */
		buf_puts(err, "rediss:// (TLS) is not supported by this build: reach the server over "
			      "a Unix socket or a TLS tunnel (e.g. stunnel) and give redis:// or unix: here");
		return -1;
	}
	if (strncasecmp(url, "redis://", 8))
		return store_url_check(url, err);
	p = url + 8;
	const char *at = strrchr(p, '@');
	if (at) {
		const char *colon = memchr(p, ':', (size_t)(at - p));
		if (colon) {
			if (colon > p)
				r->k.user = strndup(p, (size_t)(colon - p));
			r->k.pass = strndup(colon + 1, (size_t)(at - colon - 1));
		} else
			r->k.pass = strndup(p, (size_t)(at - p));
		p = at + 1;
	}
	const char *slash = strchr(p, '/');
	const char *hosts_end = slash ? slash : p + strlen(p);
	while (p < hosts_end) {
		const char *comma = memchr(p, ',', (size_t)(hosts_end - p));
		const char *he = comma ? comma : hosts_end;
		const char *colon = NULL, *hs = p, *hz;
		if (*p == '[') {
			/* [IPv6]:port */
			const char *rb = memchr(p, ']', (size_t)(he - p));
			if (!rb || rb == p + 1 || rb + 1 == he || rb[1] != ':') {
				buf_puts(err, "redis:// wants [IPv6 address]:port");
				return -1;
			}
			for (const char *q = p + 1; q < rb; q++)
				if (!strchr("0123456789abcdefABCDEF:.", *q)) {
					buf_puts(err, "redis:// wants an IPv6 address between [ and ]");
					return -1;
				}
			hs = p + 1;
			hz = rb;
			colon = rb + 1;
		} else {
			for (const char *q = p; q < he; q++)
				if (*q == ':')
					colon = q;
			hz = colon;
		}
		if (!colon || colon == p) {
			buf_puts(err, "redis:// wants host:port");
			return -1;
		}
		if (sd->n == 16) {
			buf_puts(err, "redis:// takes at most 16 seed nodes");
			return -1;
		}
		errno = 0;
		long port = strtol(colon + 1, &e, 10);
		if (errno || e == colon + 1 || port < 1 || port > 65535 || e != he) {
			buf_puts(err, "redis:// port must be a number from 1 to 65535");
			return -1;
		}
		sd->host[sd->n] = strndup(hs, (size_t)(hz - hs));
		sd->port[sd->n++] = (int)port;
		p = comma ? comma + 1 : hosts_end;
	}
	if (!sd->n) {
		buf_puts(err, "redis:// wants host:port");
		return -1;
	}
	if (slash) {
		char *e2;
		long db = strtol(slash + 1, &e2, 10);
		if (e2 == slash + 1 || *e2 || db < 0 || db > 1000000) {
			buf_puts(err, "redis:// database must be a number");
			return -1;
		}
		r->k.db = (int)db;
	}
	/* the name in messages never shows the password */
	char nm[300], db[16] = "";
	int v6 = strchr(sd->host[0], ':') != NULL;
	if (r->k.db)
		snprintf(db, sizeof db, "/%d", r->k.db);
	snprintf(nm, sizeof nm, "redis://%s%s%s:%d%s%s", v6 ? "[" : "", sd->host[0], v6 ? "]" : "",
		 sd->port[0], sd->n > 1 ? ",..." : "", db);
	r->name = strdup(nm);
	return r->name ? 0 : -1;
}

void sr_seeds_free(sr_seeds *sd)
{
	for (size_t i = 0; i < sd->n; i++)
		free(sd->host[i]);
	free(sd->path[0]);
}

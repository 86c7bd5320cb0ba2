/* cluster.c - routing Redis commands over one server or a Redis Cluster. */
#include "count/cluster.h"

#include <fcntl.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

/* ---- batches in flight ----
 * rc_send appends a batch's commands to its nodes' connections and
 * remembers, per command, the node and the connection (gen) it went to;
 * rc_drain reads the replies in the order sent, which on each connection
 * is the order the server answers in. */
struct rc_sent {
	rc_cmd *cmds;
	size_t n;
	long *node;           /* -1: not sent */
	unsigned *gen;
};

/* ---- SIGPIPE ----
 * A server that goes away must give an error, not kill the process:
 * SIGPIPE is held back while hiredis talks to a socket, and one raised
 * meanwhile is dropped.  (Standard output keeps the usual behaviour.) */

static void pipe_hold(sigset_t *old)
{
	sigset_t s;
	sigemptyset(&s);
	sigaddset(&s, SIGPIPE);
	sigprocmask(SIG_BLOCK, &s, old);
}

static void pipe_release(const sigset_t *old)
{
	sigset_t s, pend;
	struct timespec zero = {0, 0};
	sigemptyset(&s);
	sigaddset(&s, SIGPIPE);
	if (!sigismember(old, SIGPIPE) && sigpending(&pend) == 0 && sigismember(&pend, SIGPIPE))
		sigtimedwait(&s, NULL, &zero);
	sigprocmask(SIG_SETMASK, old, NULL);
}

static void sleep_ms(long ms)
{
	struct timespec ts = {ms / 1000, (ms % 1000) * 1000000L};
	nanosleep(&ts, NULL);
}

static void kerr(rcluster *k, const rc_node *nd, const char *what, const char *detail)
{
	char m[700], where[300];
	if (nd && nd->path)
		snprintf(where, sizeof where, "unix:%s", nd->path);
	else if (nd)
		snprintf(where, sizeof where, strchr(nd->host, ':') ? "[%s]:%d" : "%s:%d",
			 nd->host, nd->port);
	else
		snprintf(where, sizeof where, "%s", k->name ? k->name : "the store");
	snprintf(m, sizeof m, "%s: %s%s%s", where, what, detail ? ": " : "", detail ? detail : "");
	buf_reset(&k->err);
	buf_puts(&k->err, m);
}

/* One command on one connection, SIGPIPE held. */
static redisReply *command(redisContext *c, int argc, const char **argv, const size_t *argl)
{
	sigset_t old;
	pipe_hold(&old);
	redisReply *rep = redisCommandArgv(c, argc, argv, argl);
	pipe_release(&old);
	return rep;
}

redisReply *rc_command(redisContext *c, int argc, const char **argv, const size_t *argl)
{
	return command(c, argc, argv, argl);
}

int rc_get_reply(redisContext *c, void **reply)
{
	sigset_t old;
	pipe_hold(&old);
	int rc = redisGetReply(c, reply);
	pipe_release(&old);
	return rc;
}

static redisReply *command1(redisContext *c, const char *a, const char *b, const char *d)
{
	const char *v[3] = {a, b, d};
	size_t l[3] = {strlen(a), b ? strlen(b) : 0, d ? strlen(d) : 0};
	return command(c, d ? 3 : b ? 2 : 1, v, l);
}

static void node_lost(rc_node *nd)
{
	if (nd->c)
		redisFree(nd->c);
	nd->c = NULL;
	nd->gen++;
}

redisContext *rc_node_conn(rcluster *k, size_t i)
{
	rc_node *nd = &k->node[i];
	struct timeval tv = {k->timeout_ms / 1000, (k->timeout_ms % 1000) * 1000};
	redisReply *rep;

	if (nd->c)
		return nd->c;
	nd->c = nd->path ? redisConnectUnixWithTimeout(nd->path, tv)
			 : redisConnectWithTimeout(nd->host, nd->port, tv);
	if (!nd->c || nd->c->err) {
		kerr(k, nd, "cannot connect", nd->c ? nd->c->errstr : "out of memory");
		node_lost(nd);
		return NULL;
	}
	redisSetTimeout(nd->c, tv);
	if (k->pass) {
		rep = k->user ? command1(nd->c, "AUTH", k->user, k->pass)
			      : command1(nd->c, "AUTH", k->pass, NULL);
		if (!rep || rep->type == REDIS_REPLY_ERROR) {
			kerr(k, nd, "the server refused the password",
			     rep ? rep->str : nd->c->errstr);
			if (rep)
				freeReplyObject(rep);
			node_lost(nd);
			return NULL;
		}
		freeReplyObject(rep);
	}
	if (k->db && !k->cluster) {
		char db[16];
		snprintf(db, sizeof db, "%d", k->db);
		rep = command1(nd->c, "SELECT", db, NULL);
		int bad = !rep || rep->type == REDIS_REPLY_ERROR;
		if (bad)
			kerr(k, nd, "cannot select the database", rep ? rep->str : nd->c->errstr);
		if (rep)
			freeReplyObject(rep);
		if (bad) {
			node_lost(nd);
			return NULL;
		}
	}
	if (k->on_connect && k->on_connect(k->ctx, nd->c, &k->err) != 0) {
		/* the callback's message, with the node in front */
		char m[600];
		snprintf(m, sizeof m, "%.*s", (int)k->err.len, k->err.data ? k->err.data : "");
		kerr(k, nd, m, NULL);
		node_lost(nd);
		return NULL;
	}
	return nd->c;
}

/* The index of node host:port, added when new; -1 when out of memory. */
static long node_index(rcluster *k, const char *host, size_t hl, int port)
{
	for (size_t i = 0; i < k->nnode; i++)
		if (k->node[i].host && (int)strlen(k->node[i].host) == (int)hl &&
		    !memcmp(k->node[i].host, host, hl) && k->node[i].port == port)
			return (long)i;
	rc_node *p = tm_grow(k->node, &k->nodecap, k->nnode + 1, sizeof *p, 8);
	if (!p)
		return -1;
	k->node = p;
	memset(&p[k->nnode], 0, sizeof *p);
	if (!(p[k->nnode].host = strndup(host, hl)))
		return -1;
	p[k->nnode].port = port;
	return (long)k->nnode++;
}

/* Reads CLUSTER SLOTS from node i into the map.  1 done, 0 the node is
 * no cluster, -1 failure. */
static int read_slots(rcluster *k, size_t i)
{
	redisContext *c = rc_node_conn(k, i);
	redisReply *rep;
	if (!c)
		return -1;
	rep = command1(c, "CLUSTER", "SLOTS", NULL);
	if (!rep) {
		kerr(k, &k->node[i], "lost the connection", c->errstr);
		node_lost(&k->node[i]);
		return -1;
	}
	if (rep->type == REDIS_REPLY_ERROR) {
		int none = strstr(rep->str, "cluster support disabled") != NULL;
		if (!none)
			kerr(k, &k->node[i], "CLUSTER SLOTS failed", rep->str);
		freeReplyObject(rep);
		return none ? 0 : -1;
	}
	if (rep->type != REDIS_REPLY_ARRAY) {
		freeReplyObject(rep);
		kerr(k, &k->node[i], "unexpected reply to CLUSTER SLOTS", NULL);
		return -1;
	}
	for (size_t s = 0; s < SLOT_COUNT; s++)
		k->slot[s] = -1;
	for (size_t r = 0; r < rep->elements; r++) {
		redisReply *e = rep->element[r];
		if (e->type != REDIS_REPLY_ARRAY || e->elements < 3 ||
		    e->element[2]->type != REDIS_REPLY_ARRAY || e->element[2]->elements < 2)
			continue;
		long long a = e->element[0]->integer, b = e->element[1]->integer;
		redisReply *m = e->element[2];
		const char *host = m->element[0]->str;
		size_t hl = m->element[0]->len;
		if (!hl) /* "": the node we asked */
			host = k->node[i].host, hl = strlen(host);
		long ni = node_index(k, host, hl, (int)m->element[1]->integer);
		if (ni < 0) {
			freeReplyObject(rep);
			kerr(k, NULL, "out of memory", NULL);
			return -1;
		}
		for (long long s = a; s <= b && s < SLOT_COUNT; s++)
			if (s >= 0)
				k->slot[s] = (short)ni;
	}
	freeReplyObject(rep);
	return 1;
}

int rc_refresh(rcluster *k)
{
	if (!k->cluster)
		return 0;
	/* any node that answers will do; the map is the cluster's */
	for (size_t i = 0; i < k->nnode; i++)
		if (read_slots(k, i) == 1)
			return 0;
	return -1;
}

int rc_open(rcluster *k, char **hosts, const int *ports, char **paths, size_t nseeds)
{
	int rc = -1;
	for (size_t i = 0; i < nseeds; i++) {
		long ni;
		if (paths && paths[i]) {
			rc_node *p = tm_grow(k->node, &k->nodecap, k->nnode + 1, sizeof *p, 8);
			if (!p)
				return -1;
			k->node = p;
			memset(&p[k->nnode], 0, sizeof *p);
			p[k->nnode].path = strdup(paths[i]);
			k->nnode++;
		} else if ((ni = node_index(k, hosts[i], strlen(hosts[i]), ports[i])) < 0) {
			kerr(k, NULL, "out of memory", NULL);
			return -1;
		}
	}
	/* the first seed that answers says whether this is a cluster */
	for (size_t i = 0; i < k->nnode; i++) {
		k->cluster = 1; /* no SELECT before we know */
		rc = read_slots(k, i);
		if (rc >= 0)
			break;
	}
	if (rc < 0)
		return -1;
	if (rc == 0) {
		k->cluster = 0;
		if (k->nnode > 1) {
			kerr(k, NULL, "several servers were named, but they are not a Redis Cluster", NULL);
			return -1;
		}
		for (size_t s = 0; s < SLOT_COUNT; s++)
			k->slot[s] = 0;
		/* the connection was made before we knew: SELECT now */
		if (k->db) {
			node_lost(&k->node[0]);
			if (!rc_node_conn(k, 0))
				return -1;
		}
		return 0;
	}
	if (k->db) {
		kerr(k, NULL, "a Redis Cluster has only database 0", NULL);
		return -1;
	}
	return 0;
}

void rc_close(rcluster *k)
{
	for (size_t b = 0; b < k->nsent; b++) {
		free(k->sent[b].node);
		free(k->sent[b].gen);
	}
	free(k->sent);
	k->sent = NULL;
	k->nsent = k->sentcap = 0;
	for (size_t i = 0; i < k->nnode; i++) {
		node_lost(&k->node[i]);
		free(k->node[i].host);
		free(k->node[i].path);
	}
	free(k->node);
	k->node = NULL;
	k->nnode = 0;
	buf_free(&k->err);
	buf_free(&k->fmt);
}

redisContext *rc_conn(rcluster *k, unsigned s)
{
	short ni = k->slot[s % SLOT_COUNT];
	if (ni < 0 && (rc_refresh(k) != 0 || (ni = k->slot[s % SLOT_COUNT]) < 0)) {
		char m[80];
		snprintf(m, sizeof m, "no master serves slot %u", s);
		kerr(k, NULL, m, NULL);
		return NULL;
	}
	return rc_node_conn(k, (size_t)ni);
}

size_t rc_master(rcluster *k, size_t i)
{
	/* the nodes that own slots, in node order */
	for (size_t n = 0; n < k->nnode; n++) {
		int owns = 0;
		for (size_t s = 0; s < SLOT_COUNT && !owns; s++)
			owns = k->slot[s] == (short)n;
		if (owns && i-- == 0)
			return n + 1;
	}
	return 0;
}

/* "MOVED 3999 127.0.0.1:6381" or "ASK ...": the node named, or -1. */
static long redirect_node(rcluster *k, const char *msg)
{
	const char *sp = strchr(msg, ' ');
	sp = sp ? strchr(sp + 1, ' ') : NULL;
	if (!sp)
		return -1;
	const char *hp = sp + 1, *colon = strrchr(hp, ':');
	if (!colon)
		return -1;
	return node_index(k, hp, (size_t)(colon - hp), atoi(colon + 1));
}

static int starts(const char *s, const char *p)
{
	return !strncmp(s, p, strlen(p));
}

/* The slots around s that the same node serves, for messages. */
static void slot_range(const rcluster *k, unsigned s, unsigned *a, unsigned *b)
{
	short n = k->slot[s];
	*a = *b = s;
	while (*a > 0 && k->slot[*a - 1] == n)
		(*a)--;
	while (*b + 1 < SLOT_COUNT && k->slot[*b + 1] == n)
		(*b)++;
}

/* Puts cmd in the protocol's form (an array of bulk strings) and
 * appends it to c's output: what redisAppendCommandArgv does, without
 * its formatted print per argument (a chunk's claims and shares are
 * hundreds of thousands of arguments).  REDIS_OK or REDIS_ERR. */
static int append(rcluster *k, redisContext *c, const rc_cmd *cmd)
{
	size_t need = 16;
	for (int i = 0; i < cmd->argc; i++)
		need += cmd->argl[i] + 24;
	buf_reset(&k->fmt);
	if (buf_reserve(&k->fmt, need)) /* hiredis's way, which marks c failed if it fails */
		return redisAppendCommandArgv(c, cmd->argc, cmd->argv, cmd->argl);
	char *o = k->fmt.data;
	for (int i = -1; i < cmd->argc; i++) {
		/* "*argc" first, then "$len" and the bytes of each argument */
		size_t v = i < 0 ? (size_t)cmd->argc : cmd->argl[i];
		char d[24];
		int nd = 0;
		do
			d[nd++] = (char)('0' + v % 10);
		while ((v /= 10) > 0);
		*o++ = i < 0 ? '*' : '$';
		while (nd)
			*o++ = d[--nd];
		*o++ = '\r';
		*o++ = '\n';
		if (i >= 0) {
			memcpy(o, cmd->argv[i], cmd->argl[i]);
			o += cmd->argl[i];
			*o++ = '\r';
			*o++ = '\n';
		}
	}
	return redisAppendFormattedCommand(c, k->fmt.data, (size_t)(o - k->fmt.data));
}

/* rc_run waits for its replies, so it writes a large output as it
 * appends it (a chunk's journal is a dozen pieces of a mebibyte): the
 * connection's buffer stays near RC_WRITE_AT bytes instead of growing to
 * the whole batch, which hiredis would reallocate as it grows and move
 * down after every partial write to the socket. */
#define RC_WRITE_AT (1u << 20)

/* Writes c's output while it holds RC_WRITE_AT bytes or more, waiting
 * for the socket (c blocks); an error stays in c for the replies. */
static void write_big(redisContext *c)
{
	int done = 0;
	if (c->obuf && sdslen(c->obuf) >= RC_WRITE_AT)
		while (!done && redisBufferWrite(c, &done) == REDIS_OK)
			;
}

int rc_run(rcluster *k, rc_cmd *cmds, size_t n)
{
	char *done = calloc(n + 1, 1);
	long *target = malloc((n + 1) * sizeof *target);
	int attempts = 0, moves = 0, budget = k->cluster ? (k->retries > 12 ? k->retries : 12) : k->retries;
	long wait = 100;
	size_t left = n;
	char why[400] = "";
	long why_node = -1;
	unsigned why_slot = 0;

	if (!done || !target) {
		free(done);
		free(target);
		kerr(k, NULL, "out of memory", NULL);
		return -1;
	}
	for (size_t i = 0; i < n; i++)
		cmds[i].reply = NULL;
	/* replies of earlier batches come first on the connections */
	if (k->nsent && rc_drain(k) != 0) {
		free(done);
		free(target);
		return -1;
	}
	while (left) {
		int trouble = 0;
		for (size_t i = 0; i < n; i++)
			target[i] = done[i] ? -1 : k->slot[cmds[i].slot % SLOT_COUNT];
		for (size_t i = 0; i < n; i++)
			if (!done[i] && target[i] < 0) {
				trouble = 1;
				why_slot = cmds[i].slot;
				snprintf(why, sizeof why, "no master serves slot %u", cmds[i].slot);
			}
		/* node by node: append all, then read all */
		for (size_t nd = 0; nd < k->nnode; nd++) {
			size_t sent = 0;
			sigset_t old;
			redisContext *c = NULL;
			for (size_t i = 0; i < n; i++)
				sent += target[i] == (long)nd;
			if (!sent)
				continue;
			if (!(c = rc_node_conn(k, nd))) {
				/* the reason without the node's name, which comes first */
				const char *m = k->err.data ? k->err.data : "";
				const char *sep = strstr(m, ": ");
				trouble = 1;
				why_node = (long)nd;
				for (size_t i = 0; i < n; i++)
					if (target[i] == (long)nd)
						why_slot = cmds[i].slot;
				snprintf(why, sizeof why, "%s", sep ? sep + 2 : m);
				continue;
			}
			pipe_hold(&old);
			for (size_t i = 0; i < n; i++)
				if (target[i] == (long)nd) {
					append(k, c, &cmds[i]);
					write_big(c);
				}
			for (size_t i = 0; i < n; i++) {
				void *p = NULL;
				if (target[i] != (long)nd)
					continue;
				if (!c || redisGetReply(c, &p) != REDIS_OK || !p) {
					/* the node went away: what was not answered is sent
					 * again once the map is read anew */
					if (c) {
						trouble = 1;
						why_node = (long)nd;
						why_slot = cmds[i].slot;
						snprintf(why, sizeof why, "lost the connection: %s",
							 c->errstr[0] ? c->errstr : "no reply");
						node_lost(&k->node[nd]);
						c = NULL;
					}
					continue;
				}
				redisReply *rep = p;
				if (rep->type == REDIS_REPLY_ERROR &&
				    (starts(rep->str, "MOVED ") || starts(rep->str, "ASK "))) {
					long to = redirect_node(k, rep->str);
					int ask = starts(rep->str, "ASK ");
					freeReplyObject(rep);
					if (to < 0) {
						kerr(k, NULL, "out of memory", NULL);
						goto fail_held;
					}
					if (!ask) {
						k->slot[cmds[i].slot % SLOT_COUNT] = (short)to;
						moves++;
						continue;
					}
					/* ASK: this one command, once, on the node named */
					redisContext *c2 = rc_node_conn(k, (size_t)to);
					if (!c2) {
						trouble = 1;
						continue;
					}
					redisReply *a = command1(c2, "ASKING", NULL, NULL);
					if (a)
						freeReplyObject(a);
					rep = command(c2, cmds[i].argc, cmds[i].argv, cmds[i].argl);
					if (!rep) {
						node_lost(&k->node[to]);
						trouble = 1;
						continue;
					}
					if (rep->type == REDIS_REPLY_ERROR &&
					    (starts(rep->str, "MOVED ") || starts(rep->str, "ASK ") ||
					     starts(rep->str, "TRYAGAIN"))) {
						freeReplyObject(rep);
						moves++;
						continue;
					}
				} else if (rep->type == REDIS_REPLY_ERROR &&
					   (starts(rep->str, "TRYAGAIN") || starts(rep->str, "CLUSTERDOWN") ||
					    starts(rep->str, "LOADING") || starts(rep->str, "MASTERDOWN"))) {
					trouble = 1;
					why_node = (long)nd;
					why_slot = cmds[i].slot;
					snprintf(why, sizeof why, "%s", rep->str);
					freeReplyObject(rep);
					continue;
				} else if (rep->type == REDIS_REPLY_ERROR && starts(rep->str, "NOSCRIPT") &&
					   k->on_connect) {
					/* a node that lost its scripts (a promoted replica,
					 * a restart): load them and send again */
					freeReplyObject(rep);
					if (k->on_connect(k->ctx, c, &k->err) != 0)
						goto fail_held;
					moves++;
					continue;
				}
				cmds[i].reply = rep;
				done[i] = 1;
				left--;
			}
			pipe_release(&old);
			continue;
		fail_held:
			pipe_release(&old);
			goto fail;
		}
		if (!left)
			break;
		if (moves > 1000) {
			kerr(k, NULL, "the cluster kept redirecting the commands", NULL);
			goto fail;
		}
		if (trouble) {
			if (attempts++ >= budget) {
				if (why_node >= 0 && k->cluster) {
					unsigned a, b;
					char m[600];
					slot_range(k, why_slot % SLOT_COUNT, &a, &b);
					snprintf(m, sizeof m, "slots %u-%u: %s", a, b, why);
					kerr(k, &k->node[why_node], m, NULL);
				} else if (why_node >= 0)
					kerr(k, &k->node[why_node], why, NULL);
				else
					kerr(k, NULL, why, NULL);
				goto fail;
			}
			sleep_ms(wait);
			wait = wait * 2 > 2000 ? 2000 : wait * 2;
		}
		if (k->cluster)
			rc_refresh(k); /* a failed refresh is retried next round */
	}
	free(done);
	free(target);
	return 0;
fail:
	for (size_t i = 0; i < n; i++)
		if (cmds[i].reply) {
			freeReplyObject(cmds[i].reply);
			cmds[i].reply = NULL;
		}
	free(done);
	free(target);
	return -1;
}

/* ---- batches in flight (rc_send, rc_drain) ---- */

int rc_send(rcluster *k, rc_cmd *cmds, size_t n)
{
	struct rc_sent *v = tm_grow(k->sent, &k->sentcap, k->nsent + 1, sizeof *v, 4);
	if (!v) {
		kerr(k, NULL, "out of memory", NULL);
		return -1;
	}
	k->sent = v;
	struct rc_sent *b = &k->sent[k->nsent];
	b->cmds = cmds;
	b->n = n;
	b->node = malloc((n + 1) * sizeof *b->node);
	b->gen = malloc((n + 1) * sizeof *b->gen);
	if (!b->node || !b->gen) {
		free(b->node);
		free(b->gen);
		kerr(k, NULL, "out of memory", NULL);
		return -1;
	}
	k->nsent++;
	for (size_t i = 0; i < n; i++) {
		short nd = k->slot[cmds[i].slot % SLOT_COUNT];
		redisContext *c = nd >= 0 ? rc_node_conn(k, (size_t)nd) : NULL;
		cmds[i].reply = NULL;
		b->node[i] = -1;
		if (!c || append(k, c, &cmds[i]) != REDIS_OK)
			continue; /* rc_drain runs it */
		b->node[i] = nd;
		b->gen[i] = k->node[nd].gen;
	}
	rc_pump(k);
	return 0;
}

void rc_pump(rcluster *k)
{
	for (size_t i = 0; i < k->nnode; i++) {
		redisContext *c = k->node[i].c;
		int fl, done = 0;
		sigset_t old;
		if (!c || !c->obuf || !sdslen(c->obuf) || (fl = fcntl(c->fd, F_GETFL)) < 0)
			continue;
		/* as far as the socket takes it now: hiredis writes without
		 * waiting on a context it believes non-blocking */
		pipe_hold(&old);
		if (fcntl(c->fd, F_SETFL, fl | O_NONBLOCK) == 0) {
			c->flags &= ~REDIS_BLOCK;
			redisBufferWrite(c, &done); /* an error stays in c for rc_drain */
			c->flags |= REDIS_BLOCK;
			fcntl(c->fd, F_SETFL, fl);
		}
		pipe_release(&old);
	}
}

/* A reply that rc_run must handle (it redirects, waits or reloads). */
static int needs_run(const redisReply *rep)
{
	return rep->type == REDIS_REPLY_ERROR &&
	       (starts(rep->str, "MOVED ") || starts(rep->str, "ASK ") || starts(rep->str, "TRYAGAIN") ||
		starts(rep->str, "CLUSTERDOWN") || starts(rep->str, "LOADING") ||
		starts(rep->str, "MASTERDOWN") || starts(rep->str, "NOSCRIPT"));
}

int rc_drain(rcluster *k)
{
	struct rc_sent *sent = k->sent;
	size_t nsent = k->nsent;
	int rc = 0;
	sigset_t old;
	long lost = -1;         /* the first node whose connection was lost */
	char why[300] = "";

	k->sent = NULL;
	k->nsent = k->sentcap = 0;
	pipe_hold(&old);
	for (size_t b = 0; b < nsent; b++)
		for (size_t i = 0; i < sent[b].n; i++) {
			long nd = sent[b].node[i];
			void *p = NULL;
			if (nd < 0)
				continue;
			rc_node *node = &k->node[nd];
			sent[b].node[i] = -1;
			if (!node->c || node->gen != sent[b].gen[i])
				continue; /* its connection is gone: run again */
			if (redisGetReply(node->c, &p) != REDIS_OK || !p) {
				if (lost < 0) {
					lost = nd;
					snprintf(why, sizeof why, "lost the connection: %s",
						 node->c->errstr[0] ? node->c->errstr : "no reply");
				}
				node_lost(node);
				continue;
			}
			if (needs_run(p)) {
				freeReplyObject(p);
				continue;
			}
			sent[b].cmds[i].reply = p;
		}
	pipe_release(&old);
	/* what has no reply yet, batch by batch, through rc_run */
	for (size_t b = 0; b < nsent && !rc; b++) {
		rc_cmd *v = sent[b].cmds, *left = NULL;
		size_t nl = 0, j = 0;
		for (size_t i = 0; i < sent[b].n; i++)
			nl += !v[i].reply;
		if (!nl)
			continue;
		if (!(left = malloc(nl * sizeof *left))) {
			kerr(k, NULL, "out of memory", NULL);
			rc = -1;
			break;
		}
		for (size_t i = 0; i < sent[b].n; i++)
			if (!v[i].reply)
				left[j++] = v[i];
		rc = rc_run(k, left, nl);
		if (rc && lost >= 0 && !k->cluster) {
			/* one server: say first what happened, the connection was
			 * lost, then why it could not go on (the server named once;
			 * a cluster's message names the node and its slots) */
			char m[700];
			const char *e = k->err.data ? k->err.data : "", *sep = strstr(e, ": ");
			snprintf(m, sizeof m, "%s; then %s", why, sep ? sep + 2 : e);
			kerr(k, &k->node[lost], m, NULL);
		}
		for (size_t i = 0, q = 0; !rc && i < sent[b].n; i++)
			if (!v[i].reply)
				v[i].reply = left[q++].reply;
		free(left);
	}
	for (size_t b = 0; b < nsent; b++) {
		if (rc)
			for (size_t i = 0; i < sent[b].n; i++)
				if (sent[b].cmds[i].reply) {
					freeReplyObject(sent[b].cmds[i].reply);
					sent[b].cmds[i].reply = NULL;
				}
		free(sent[b].node);
		free(sent[b].gen);
	}
	free(sent);
	return rc;
}

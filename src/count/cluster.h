/* cluster.h - routing Redis commands: one server, or a Redis Cluster.
 *
 * The router holds one connection per node and, for a cluster, the map
 * from hash slot (slot.h) to master, read with CLUSTER SLOTS.  A batch
 * of commands is sent pipelined, node by node, and the replies come back
 * in the batch's order.  A MOVED reply refreshes the map and sends the
 * command again where it now belongs; ASK sends it once to the node
 * named, after ASKING; TRYAGAIN, CLUSTERDOWN, LOADING and a lost node
 * are waited out with back-off (a failover takes a few seconds), up to
 * the retry budget.  So every command of a batch runs once where its
 * slot lives, whatever moves meanwhile -- the callers' commands must be
 * safe to run again after a lost reply (ours are: the scripts check a
 * ledger).
 *
 * With the Redis store (store_redis*.c), the only module that knows
 * hiredis; only they include this header (through store_redis.h).
 * Errors: -1 or NULL with a message in k->err naming the node (and the
 * slots) concerned. */
#ifndef TM_CLUSTER_H
#define TM_CLUSTER_H

#include <hiredis/hiredis.h>
#include <stddef.h>

#include "core/buf.h"
#include "count/slot.h"

typedef struct rc_node {
	char *host, *path;    /* TCP host and port, or a Unix socket path */
	int port;
	redisContext *c;      /* NULL until first used */
	unsigned gen;         /* connections lost so far: a command sent on an
			       * earlier connection has no reply to wait for */
} rc_node;

typedef struct rc_cmd {
	int argc;
	const char **argv;
	const size_t *argl;
	unsigned slot;        /* of the command's keys */
	redisReply *reply;    /* filled by rc_run; the caller frees it */
} rc_cmd;

typedef struct rcluster {
	int cluster;          /* 0: one server (every slot on node 0) */
	rc_node *node;
	size_t nnode, nodecap;
	short slot[SLOT_COUNT]; /* node index, -1 when no master serves it */
	char *user, *pass;
	int db, timeout_ms, retries;
	/* run on each new connection after AUTH (e.g. SCRIPT LOAD); also
	 * when a node answers NOSCRIPT */
	int (*on_connect)(void *ctx, redisContext *c, tm_buf *err);
	void *ctx;
	char *name;           /* for messages: the URL without password */
	tm_buf err;
	tm_buf fmt;           /* a command being put in the protocol's form */
	/* batches sent by rc_send whose replies rc_drain has not read */
	struct rc_sent *sent;
	size_t nsent, sentcap;
} rcluster;

/* Opens the router on the seeds (host:port or a Unix socket path) and
 * finds out whether they are a cluster.  Returns 0 or -1. */
int rc_open(rcluster *k, char **hosts, const int *ports, char **paths, size_t nseeds);
void rc_close(rcluster *k);

/* Runs the batch; every cmds[i].reply is then set (error replies other
 * than redirections included).  Returns 0, or -1 when a command could
 * not be run (the replies set so far are freed). */
int rc_run(rcluster *k, rc_cmd *cmds, size_t n);

/* Sends the batch pipelined, without reading its replies, so that the
 * servers work while the caller does; rc_drain reads them.  The batch
 * (commands and arguments) must stay as it is until then.  Returns 0 or
 * -1 (out of memory): a command that cannot be sent now (no connection,
 * no master) is run by rc_drain. */
int rc_send(rcluster *k, rc_cmd *cmds, size_t n);
/* Writes what rc_send left in the connections' buffers as far as each
 * socket takes it without waiting (call it now and then while working). */
void rc_pump(rcluster *k);
/* Reads the replies of every batch sent, in the order sent; every
 * command left without its reply (a lost connection, MOVED, ASK,
 * TRYAGAIN, a failover, NOSCRIPT) then goes through rc_run.  As rc_run:
 * every reply set, or -1 with the replies freed.  rc_run drains first. */
int rc_drain(rcluster *k);

/* The connection of the master of slot s (connecting when needed), for
 * a transaction that must stay on one node; NULL on failure. */
redisContext *rc_conn(rcluster *k, unsigned s);
/* The masters, for commands every node must run (SCAN): 1 + the index of
 * the i-th master, or 0 past the last. */
size_t rc_master(rcluster *k, size_t i);
/* Connection of node i (connecting when needed), or NULL. */
redisContext *rc_node_conn(rcluster *k, size_t i);
/* One command on a connection, and one pipelined reply, with SIGPIPE
 * held back (a server gone away is an error, not the end). */
redisReply *rc_command(redisContext *c, int argc, const char **argv, const size_t *argl);
int rc_get_reply(redisContext *c, void **reply);
/* Reads the slot map again (after a failover or a reshard). */
int rc_refresh(rcluster *k);

#endif

/* queue.c - the review queue's read-change-write cycle over its storage
 * (queue.h), and repair of a queue file. */
#include "review/queue.h"

#include <errno.h>
#include <fcntl.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "io/outfile.h"

/* Commits that lost a race before a change gives up. */
#define RQ_ATTEMPTS 1000

void rq_store_msg(tm_buf *err, const char *where, const char *what, const char *detail)
{
	tm_fail(err, TM_EFAIL, where, what, detail);
}

/* Parses what pl->text holds; the queue's notes become the place's. */
static int parse_place(rq_place *pl, rq_queue *q, const char *name, tm_buf *err)
{
	int rc = rq_parse(q, pl->text.data, pl->text.len, name, err);
	pl->nbad = q->nbad;
	if (q->notes.len && buf_append(&pl->warn, q->notes.data, q->notes.len)) {
		rq_store_msg(err, name, "out of memory", NULL);
		return -1;
	}
	return rc;
}

void rq_place_init(rq_place *pl, rq_store *qs, const char *path)
{
	memset(pl, 0, sizeof *pl);
	pl->path = path;
	pl->qs = qs;
}

int rq_read(rq_place *pl, rq_queue *q, int missing_ok, tm_buf *err)
{
	buf_reset(&pl->warn);
	pl->nbad = 0;
	if (pl->qs->ops->load(pl->qs, 0, missing_ok, &pl->text, &pl->warn, err))
		return -1;
	return parse_place(pl, q, pl->qs->name, err);
}

int rq_transact(rq_place *pl, int (*change)(rq_queue *q, void *arg, tm_buf *err), void *arg,
		tm_buf *err)
{
	rq_store *s = pl->qs;

	for (int attempt = 0; attempt < RQ_ATTEMPTS; attempt++) {
		rq_queue q = {0};
		int conflict = 0, rc;
		buf_reset(&pl->warn);
		pl->nbad = 0;
		if (s->ops->load(s, 1, 1, &pl->text, &pl->warn, err))
			return -1;
		if (parse_place(pl, &q, s->name, err) || change(&q, arg, err)) {
			s->ops->release(s);
			rq_free(&q);
			return -1;
		}
		rc = s->ops->commit(s, &q, &conflict, &pl->warn, err);
		rq_free(&q);
		if (rc || !conflict)
			return rc;
		/* someone wrote first: wait a little, read again, decide again */
		struct timespec ts = {0, (long)(1000000L * (1 + rand() % 20))};
		nanosleep(&ts, NULL);
	}
	rq_store_msg(err, NULL, s->name, " kept changing under us; try again");
	return -1;
}

void rq_place_close(rq_place *pl)
{
	if (!pl)
		return;
	if (pl->qs)
		pl->qs->ops->close(pl->qs);
	pl->qs = NULL;
	buf_free(&pl->text);
	buf_free(&pl->warn);
}

typedef struct repair_arg {
	const char *rejected;
	struct stat like;
	int have_like;
	size_t moved;
	tm_buf *warn;
} repair_arg;

/* Appends the unreadable lines to the rejected file (flushed to the
 * disk before the queue drops them: a crash in between leaves a line in
 * both, never in neither); on a failed write the file is cut back to
 * what it held. */
static int repair_change(rq_queue *q, void *a0, tm_buf *err)
{
	repair_arg *a = a0;
	tm_buf out = {0};
	int rc = -1;

	a->moved = q->nbad;
	if (!q->nbad)
		return 0;
	for (size_t k = 0; k < q->nbad; k++)
		if (buf_append(&out, q->bad[k].text, q->bad[k].len) || buf_putc(&out, '\n')) {
			buf_free(&out);
			rq_store_msg(err, a->rejected, "out of memory", NULL);
			return -1;
		}
	int fd = of_open_beside(a->rejected, O_WRONLY | O_APPEND, a->have_like ? &a->like : NULL,
				a->warn, err);
	if (fd < 0)
		goto done;
	struct stat st;
	const char *p = out.data;
	size_t n = out.len;
	int e = fstat(fd, &st) ? errno : 0;
	while (!e && n) {
		ssize_t w = write(fd, p, n);
		if (w < 0 && errno != EINTR)
			e = errno;
		else if (w > 0)
			p += w, n -= (size_t)w;
	}
	if (!e && fsync(fd))
		e = errno;
	if (e) {
		if (ftruncate(fd, st.st_size)) {
			/* the failure reported below stands */
		}
		rq_store_msg(err, a->rejected, "cannot write: ", strerror(e));
		buf_puts(err, " (the queue is unchanged)");
		close(fd);
		goto done;
	}
	if (close(fd)) {
		rq_store_msg(err, a->rejected, "cannot write: ", strerror(errno));
		goto done;
	}
	q->drop_bad = 1;
	rc = 0;
done:
	buf_free(&out);
	return rc;
}

int rq_repair(rq_place *pl, tm_buf *rejected, size_t *moved, tm_buf *err)
{
	repair_arg a = {NULL, {0}, 0, 0, &pl->warn};
	char *target;
	int exists;

	*moved = 0;
	if (!pl->path) {
		rq_store_msg(err, NULL, "review repair works on a queue file, not on a store", NULL);
		return -1;
	}
	if (of_resolve(pl->path, &target, &a.like, &exists, err))
		return -1;
	buf_reset(rejected);
	int oom = buf_puts(rejected, target) || buf_puts(rejected, ".rejected");
	free(target);
	if (oom) {
		rq_store_msg(err, pl->path, "out of memory", NULL);
		return -1;
	}
	a.rejected = rejected->data;
	a.have_like = exists;
	int rc = rq_transact(pl, repair_change, &a, err);
	*moved = a.moved;
	return rc;
}

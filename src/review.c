/* review.c - where the queue lives: the queue file and the store behind
 * one read-change-write cycle.  (The queue in memory is review_item.c,
 * its lines review_json.c, its changes review_change.c.) */
#include "review.h"

#include <errno.h>
#include <fcntl.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "outfile.h"
#include "review_json.h"

static void msg(tm_buf *err, const char *where, const char *what, const char *detail)
{
	tm_fail(err, TM_EFAIL, where, what, detail);
}

/* ---- where the queue lives ---- */

static int read_file(const char *path, tm_buf *text, int missing_ok, tm_buf *err)
{
	FILE *fp = fopen(path, "rb");
	char chunk[65536];
	size_t n;

	buf_reset(text);
	if (!fp) {
		if (errno == ENOENT && missing_ok)
			return 0;
		msg(err, path, errno == ENOENT ? "no review queue here (titlemill review add makes one)"
					       : strerror(errno), NULL);
		return -1;
	}
	while ((n = fread(chunk, 1, sizeof chunk, fp)) > 0)
		if (buf_append(text, chunk, n)) {
			fclose(fp);
			msg(err, path, "out of memory", NULL);
			return -1;
		}
	if (ferror(fp)) {
		msg(err, path, "cannot read: ", strerror(errno));
		fclose(fp);
		return -1;
	}
	fclose(fp);
	return 0;
}

/* Parses what pl->text holds; the queue's notes become the place's. */
static int parse_place(rq_place *pl, rq_queue *q, const char *name, tm_buf *err)
{
	int rc = rq_parse(q, pl->text.data, pl->text.len, name, err);
	pl->nbad = q->nbad;
	if (q->notes.len && buf_append(&pl->warn, q->notes.data, q->notes.len)) {
		msg(err, name, "out of memory", NULL);
		return -1;
	}
	return rc;
}

/* The queue file's text: the items in arrival order, each unreadable
 * line kept after the item it followed (unless q->drop_bad). */
static int queue_text(const rq_queue *q, tm_buf *out)
{
	size_t k = 0;
	for (size_t i = 0; i <= q->n; i++) {
		uint64_t upto = i < q->n ? q->it[i].seq : UINT64_MAX;
		for (; k < q->nbad && q->bad[k].after < upto; k++)
			if (!q->drop_bad && (buf_append(out, q->bad[k].text, q->bad[k].len) ||
					     buf_putc(out, '\n')))
				return -1;
		if (i < q->n && rq_item_json(&q->it[i], out))
			return -1;
	}
	return 0;
}

int rq_read(rq_place *pl, rq_queue *q, int missing_ok, tm_buf *err)
{
	buf_reset(&pl->warn);
	pl->nbad = 0;
	if (pl->st) {
		buf_reset(&pl->text);
		if (pl->st->ops->rq_load(pl->st, &pl->text)) {
			msg(err, NULL, pl->st->err.data, NULL);
			return -1;
		}
		int c;
		pl->st->ops->rq_commit(pl->st, NULL, 0, NULL, 0, &c); /* unwatch */
		return parse_place(pl, q, "the store's review queue", err);
	}
	if (read_file(pl->path, &pl->text, missing_ok, err))
		return -1;
	return parse_place(pl, q, pl->path, err);
}

/* Locks the queue whose file (links resolved) is target: TARGET.lock,
 * never through a link, created with the queue's permission bits and
 * group (st when the queue exists) so that every curator who may write
 * the queue may take the lock. */
static int lock_file(rq_place *pl, const char *target, const struct stat *st, tm_buf *err)
{
	tm_buf lp = {0};
	struct flock fl = {0};

	if (buf_puts(&lp, target) || buf_puts(&lp, ".lock")) {
		buf_free(&lp);
		msg(err, target, "out of memory", NULL);
		return -1;
	}
	pl->lockfd = of_open_beside(lp.data, O_RDWR, st, &pl->warn, err);
	if (pl->lockfd < 0) {
		buf_puts(err, " (the lock of the queue)");
		buf_free(&lp);
		return -1;
	}
	fl.l_type = F_WRLCK;
	fl.l_whence = SEEK_SET;
	while (fcntl(pl->lockfd, F_SETLKW, &fl) < 0) {
		if (errno == EINTR)
			continue;
		msg(err, lp.data, "cannot lock: ", strerror(errno));
		buf_free(&lp);
		close(pl->lockfd);
		pl->lockfd = -1;
		return -1;
	}
	buf_free(&lp);
	return 0;
}

static void unlock_file(rq_place *pl)
{
	if (pl->lockfd >= 0)
		close(pl->lockfd); /* releases the lock */
	pl->lockfd = -1;
}

/* Writes the whole queue over target by the rules of outfile.h (a new
 * temporary beside it, flushed, renamed; the mode and group kept): a
 * reader or a crash sees the old queue or the new one. */
static int write_file(rq_place *pl, const char *target, const rq_queue *q, tm_buf *err)
{
	tm_buf out = {0};
	of_file f;
	int rc = -1;

	if (queue_text(q, &out)) {
		msg(err, target, "out of memory", NULL);
		goto done;
	}
	if (of_open(&f, target, OF_REGULAR, err) || of_write(&f, out.data, out.len, err)) {
		of_abort(&f);
		buf_puts(err, " (the queue is unchanged)");
		goto done;
	}
	buf_append(&pl->warn, f.warn.data, f.warn.len);
	if (of_commit(&f, err)) {
		buf_puts(err, " (the queue is unchanged)");
		goto done;
	}
	rc = 0;
done:
	buf_free(&out);
	return rc;
}

/* The store: the changed items and their new events. */
static int commit_store(rq_place *pl, rq_queue *q, int *conflict, tm_buf *err)
{
	store_rq_put *puts = NULL;
	store_rq_event *ev = NULL;
	tm_buf items = {0}, fv = {0};
	size_t np = 0, ne = 0, nput = 0, nevt = 0;
	size_t *ioff = NULL, *foff = NULL;
	int rc = -1;

	for (size_t i = 0; i < q->n; i++)
		if (q->it[i].changed) {
			nput++;
			nevt += q->it[i].nev - q->it[i].nev_stored;
		}
	puts = calloc(nput + 1, sizeof *puts);
	ev = calloc(nevt + 1, sizeof *ev);
	ioff = calloc(nput + 1, sizeof *ioff);
	foff = calloc(nevt + 1, sizeof *foff);
	if (!puts || !ev || !ioff || !foff)
		goto oom;
	for (size_t i = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if (!it->changed)
			continue;
		ioff[np++] = items.len;
		if (rq_item_json(it, &items))
			goto oom;
		items.len--; /* the newline */
		for (size_t k = it->nev_stored; k < it->nev; k++) {
			const rq_event *e = &it->ev[k];
			char num[32];
			const char *pairs[] = {"event", rq_what_names[e->what], "id", it->id,
					       "status", rq_status_name(it),
					       "kind", rq_kind_names[it->kind], "occupation", it->occ,
					       "lang", it->lang, "label", it->label, "at", e->at};
			foff[ne++] = fv.len;
			for (size_t j = 0; j < sizeof pairs / sizeof *pairs; j++)
				if (buf_append(&fv, pairs[j], strlen(pairs[j]) + 1))
					goto oom;
			snprintf(num, sizeof num, "%llu", (unsigned long long)e->postings);
			if (buf_append(&fv, "postings", 9) || buf_append(&fv, num, strlen(num) + 1))
				goto oom;
			if (e->reviewer && (buf_append(&fv, "reviewer", 9) ||
					    buf_append(&fv, e->reviewer, strlen(e->reviewer) + 1)))
				goto oom;
			if (e->note && (buf_append(&fv, "note", 5) ||
					buf_append(&fv, e->note, strlen(e->note) + 1)))
				goto oom;
		}
	}
	/* pointers only once the buffers stop moving */
	for (size_t i = 0, k = 0; i < q->n; i++) {
		const rq_item *it = &q->it[i];
		if (!it->changed)
			continue;
		puts[k].id = it->id;
		puts[k].idlen = strlen(it->id);
		puts[k].item = items.data + ioff[k];
		puts[k].itemlen = (k + 1 < np ? ioff[k + 1] : items.len) - ioff[k];
		k++;
	}
	for (size_t k = 0; k < ne; k++) {
		ev[k].fv = fv.data + foff[k];
		ev[k].len = (k + 1 < ne ? foff[k + 1] : fv.len) - foff[k];
	}
	if (pl->st->ops->rq_commit(pl->st, puts, np, ev, ne, conflict)) {
		msg(err, NULL, pl->st->err.data, NULL);
		goto done;
	}
	rc = 0;
	goto done;
oom:
	msg(err, NULL, "out of memory", NULL);
done:
	free(puts);
	free(ev);
	free(ioff);
	free(foff);
	buf_free(&items);
	buf_free(&fv);
	return rc;
}

int rq_transact(rq_place *pl, int (*change)(rq_queue *q, void *arg, tm_buf *err), void *arg,
		tm_buf *err)
{
	rq_queue q = {0};
	int rc = -1;

	if (!pl->st) {
		char *target;
		struct stat st;
		int exists;
		buf_reset(&pl->warn);
		pl->nbad = 0;
		if (of_resolve(pl->path, &target, &st, &exists, err))
			return -1;
		if (exists && !S_ISREG(st.st_mode)) {
			msg(err, target, "is not a regular file; a queue must be one", NULL);
			free(target);
			return -1;
		}
		if (lock_file(pl, target, exists ? &st : NULL, err))
			goto done;
		if (read_file(target, &pl->text, 1, err) || parse_place(pl, &q, pl->path, err) ||
		    change(&q, arg, err))
			goto done;
		int any = q.drop_bad && q.nbad;
		for (size_t i = 0; i < q.n; i++)
			any |= q.it[i].changed;
		rc = any ? write_file(pl, target, &q, err) : 0;
	done:
		unlock_file(pl);
		rq_free(&q);
		free(target);
		return rc;
	}
	for (int attempt = 0; attempt < 1000; attempt++) {
		int conflict = 0;
		buf_reset(&pl->text);
		buf_reset(&pl->warn);
		if (pl->st->ops->rq_load(pl->st, &pl->text)) {
			msg(err, NULL, pl->st->err.data, NULL);
			return -1;
		}
		if (parse_place(pl, &q, "the store's review queue", err) || change(&q, arg, err)) {
			pl->st->ops->rq_commit(pl->st, NULL, 0, NULL, 0, &conflict); /* unwatch */
			rq_free(&q);
			return -1;
		}
		rc = commit_store(pl, &q, &conflict, err);
		rq_free(&q);
		if (rc || !conflict)
			return rc;
		/* someone wrote first: wait a little, read again, decide again */
		struct timespec ts = {0, (long)(1000000L * (1 + rand() % 20))};
		nanosleep(&ts, NULL);
	}
	msg(err, NULL, "the store's review queue kept changing under us; try again", NULL);
	return -1;
}

void rq_place_close(rq_place *pl)
{
	if (!pl)
		return;
	unlock_file(pl);
	buf_free(&pl->text);
	buf_free(&pl->warn);
	store_close(pl->st);
	pl->st = NULL;
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
			msg(err, a->rejected, "out of memory", NULL);
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
		msg(err, a->rejected, "cannot write: ", strerror(e));
		buf_puts(err, " (the queue is unchanged)");
		close(fd);
		goto done;
	}
	if (close(fd)) {
		msg(err, a->rejected, "cannot write: ", strerror(errno));
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
	if (pl->st) {
		msg(err, NULL, "review repair works on a queue file, not on a store", NULL);
		return -1;
	}
	if (of_resolve(pl->path, &target, &a.like, &exists, err))
		return -1;
	buf_reset(rejected);
	int oom = buf_puts(rejected, target) || buf_puts(rejected, ".rejected");
	free(target);
	if (oom) {
		msg(err, pl->path, "out of memory", NULL);
		return -1;
	}
	a.rejected = rejected->data;
	a.have_like = exists;
	int rc = rq_transact(pl, repair_change, &a, err);
	*moved = a.moved;
	return rc;
}

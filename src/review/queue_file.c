/* queue_file.c - the review queue in a file (queue.h): JSON Lines, one
 * item a line, unreadable lines kept where they were; held by a lock on
 * FILE.lock beside it and written whole by the rules of outfile.h. */
#include "review/queue.h"

#include <errno.h>
#include <fcntl.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "io/outfile.h"

typedef struct qfile {
	rq_store base;
	const char *path;
	char *target;         /* the file, links resolved, while held */
	int lockfd;           /* -1 when not held */
} qfile;

static int read_file(const char *path, tm_buf *text, int missing_ok, tm_buf *err)
{
	FILE *fp = fopen(path, "rb");
	char chunk[65536];
	size_t n;

	buf_reset(text);
	if (!fp) {
		if (errno == ENOENT && missing_ok)
			return 0;
		rq_store_msg(err, path, errno == ENOENT ? "no review queue here (titlemill review add makes one)"
					       : strerror(errno), NULL);
		return -1;
	}
	while ((n = fread(chunk, 1, sizeof chunk, fp)) > 0)
		if (buf_append(text, chunk, n)) {
			fclose(fp);
			rq_store_msg(err, path, "out of memory", NULL);
			return -1;
		}
	if (ferror(fp)) {
		rq_store_msg(err, path, "cannot read: ", strerror(errno));
		fclose(fp);
		return -1;
	}
	fclose(fp);
	return 0;
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

/* Locks the queue whose file (links resolved) is target: TARGET.lock,
 * never through a link, created with the queue's permission bits and
 * group (st when the queue exists) so that every curator who may write
 * the queue may take the lock. */
static int lock_file(qfile *f, const char *target, const struct stat *st, tm_buf *warn, tm_buf *err)
{
	tm_buf lp = {0};
	struct flock fl = {0};

	if (buf_puts(&lp, target) || buf_puts(&lp, ".lock")) {
		buf_free(&lp);
		rq_store_msg(err, target, "out of memory", NULL);
		return -1;
	}
	f->lockfd = of_open_beside(lp.data, O_RDWR, st, warn, err);
	if (f->lockfd < 0) {
		buf_puts(err, " (the lock of the queue)");
		buf_free(&lp);
		return -1;
	}
	fl.l_type = F_WRLCK;
	fl.l_whence = SEEK_SET;
	while (fcntl(f->lockfd, F_SETLKW, &fl) < 0) {
		if (errno == EINTR)
			continue;
		rq_store_msg(err, lp.data, "cannot lock: ", strerror(errno));
		buf_free(&lp);
		close(f->lockfd);
		f->lockfd = -1;
		return -1;
	}
	buf_free(&lp);
	return 0;
}

static void unlock_file(qfile *f)
{
	if (f->lockfd >= 0)
		close(f->lockfd); /* releases the lock */
	f->lockfd = -1;
}

/* Writes the whole queue over target by the rules of outfile.h (a new
 * temporary beside it, flushed, renamed; the mode and group kept): a
 * reader or a crash sees the old queue or the new one. */
static int write_file(const char *target, const rq_queue *q, tm_buf *warn, tm_buf *err)
{
	tm_buf out = {0};
	of_file f;
	int rc = -1;

	if (queue_text(q, &out)) {
		rq_store_msg(err, target, "out of memory", NULL);
		goto done;
	}
	if (of_open(&f, target, OF_REGULAR, err) || of_write(&f, out.data, out.len, err)) {
		of_abort(&f);
		buf_puts(err, " (the queue is unchanged)");
		goto done;
	}
	buf_append(warn, f.warn.data, f.warn.len);
	if (of_commit(&f, err)) {
		buf_puts(err, " (the queue is unchanged)");
		goto done;
	}
	rc = 0;
done:
	buf_free(&out);
	return rc;
}

static void f_release(rq_store *s)
{
	qfile *f = (qfile *)s;
	unlock_file(f);
	free(f->target);
	f->target = NULL;
}

static int f_load(rq_store *s, int hold, int missing_ok, tm_buf *text, tm_buf *warn, tm_buf *err)
{
	qfile *f = (qfile *)s;
	struct stat st;
	int exists;

	if (!hold)
		return read_file(f->path, text, missing_ok, err);
	f_release(s);
	if (of_resolve(f->path, &f->target, &st, &exists, err))
		return -1;
	if (exists && !S_ISREG(st.st_mode)) {
		rq_store_msg(err, f->target, "is not a regular file; a queue must be one", NULL);
		f_release(s);
		return -1;
	}
	if (lock_file(f, f->target, exists ? &st : NULL, warn, err) ||
	    read_file(f->target, text, 1, err)) {
		f_release(s);
		return -1;
	}
	return 0;
}

static int f_commit(rq_store *s, const rq_queue *q, int *conflict, tm_buf *warn, tm_buf *err)
{
	qfile *f = (qfile *)s;
	int any = q->drop_bad && q->nbad, rc;

	*conflict = 0; /* the lock keeps everyone else out */
	for (size_t i = 0; i < q->n; i++)
		any |= q->it[i].changed;
	rc = any ? write_file(f->target, q, warn, err) : 0;
	f_release(s);
	return rc;
}

static void f_close(rq_store *s)
{
	f_release(s);
	free(s);
}

static const rq_store_ops file_ops = {f_load, f_commit, f_release, f_close};

rq_store *rq_store_file_open(const char *path, tm_buf *err)
{
	qfile *f = calloc(1, sizeof *f);
	if (!f) {
		rq_store_msg(err, path, "out of memory", NULL);
		return NULL;
	}
	f->base.ops = &file_ops;
	f->base.name = path;
	f->path = path;
	f->lockfd = -1;
	return &f->base;
}

/* outfile.c - writing a file so that a crash, a symbolic link or a
 * second user cannot corrupt it (the rules are in outfile.h). */
#include <errno.h>
#include <fcntl.h>
#include <grp.h>
#include <signal.h>
#include <limits.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "io/outfile.h"

enum { LINKS_MAX = 40, TMP_TRIES = 100 };

/* The temporary of the write in progress, for the signal handler: an
 * interrupted command (Ctrl-C, kill, a closed terminal) removes it before
 * it dies.  One write at a time, so one name. */
static const char *volatile live_tmp;
static const int fatal[] = {SIGINT, SIGTERM, SIGHUP, SIGQUIT};
static struct sigaction saved[sizeof fatal / sizeof *fatal];

static void on_fatal(int sig)
{
	const char *t = live_tmp;
	if (t)
		unlink(t);
	signal(sig, SIG_DFL);
	raise(sig);
}

static void watch_tmp(const char *tmp)
{
	struct sigaction sa;
	memset(&sa, 0, sizeof sa);
	sa.sa_handler = on_fatal;
	sigemptyset(&sa.sa_mask);
	for (size_t i = 0; i < sizeof fatal / sizeof *fatal; i++)
		sigaddset(&sa.sa_mask, fatal[i]);
	live_tmp = tmp;
	for (size_t i = 0; i < sizeof fatal / sizeof *fatal; i++)
		sigaction(fatal[i], &sa, &saved[i]);
}

static void unwatch_tmp(void)
{
	if (!live_tmp)
		return;
	for (size_t i = 0; i < sizeof fatal / sizeof *fatal; i++)
		sigaction(fatal[i], &saved[i], NULL);
	live_tmp = NULL;
}

static void fail(tm_buf *err, const char *path, const char *what, int e)
{
	buf_reset(err);
	buf_puts(err, path);
	buf_puts(err, ": ");
	buf_puts(err, what);
	if (e) {
		buf_puts(err, ": ");
		buf_puts(err, strerror(e));
	}
}

/* The folder part of path with its slash ("" for a bare name). */
static size_t dir_len(const char *path)
{
	const char *s = strrchr(path, '/');
	return s ? (size_t)(s - path) + 1 : 0;
}

int of_resolve(const char *path, char **target, struct stat *st, int *exists, tm_buf *err)
{
	char *cur = strdup(path);
	*target = NULL;
	*exists = 0;
	if (!cur) {
		fail(err, path, "out of memory", 0);
		return -1;
	}
	for (int hops = 0;; hops++) {
		if (lstat(cur, st)) {
			if (errno == ENOENT)
				break;
			fail(err, cur, "cannot look at it", errno);
			free(cur);
			return -1;
		}
		if (!S_ISLNK(st->st_mode)) {
			*exists = 1;
			break;
		}
		if (hops == LINKS_MAX) {
			fail(err, path, "too many symbolic links", 0);
			free(cur);
			return -1;
		}
		if (st->st_uid != geteuid() && st->st_uid != 0) {
			fail(err, cur, "is a symbolic link that belongs to another user; "
				       "refusing to write through it", 0);
			free(cur);
			return -1;
		}
		char to[PATH_MAX];
		ssize_t n = readlink(cur, to, sizeof to - 1);
		if (n < 0) {
			fail(err, cur, "cannot read the link", errno);
			free(cur);
			return -1;
		}
		to[n] = 0;
		size_t dl = to[0] == '/' ? 0 : dir_len(cur);
		char *next = malloc(dl + (size_t)n + 1);
		if (!next) {
			fail(err, path, "out of memory", 0);
			free(cur);
			return -1;
		}
		memcpy(next, cur, dl);
		memcpy(next + dl, to, (size_t)n + 1);
		free(cur);
		cur = next;
	}
	*target = cur;
	return 0;
}

/* Gives fd the permission bits and group of like (and its owner when we
 * may); a group that cannot be kept is a note, not an error. */
static int keep_owner(int fd, const char *path, const struct stat *like, tm_buf *warn,
		      tm_buf *err)
{
	struct stat now;
	if (fstat(fd, &now)) {
		fail(err, path, "cannot look at it", errno);
		return -1;
	}
	uid_t uid = geteuid() == 0 ? like->st_uid : (uid_t)-1;
	if ((uid != (uid_t)-1 && uid != now.st_uid) || like->st_gid != now.st_gid) {
		if (fchown(fd, uid, like->st_gid) && (uid == (uid_t)-1 || fchown(fd, (uid_t)-1, like->st_gid))) {
			int e = errno;
			struct group *g = getgrgid(like->st_gid), *h;
			char gn[64], hn[64];
			snprintf(gn, sizeof gn, "%s", g ? g->gr_name : "?");
			h = getgrgid(now.st_gid);
			snprintf(hn, sizeof hn, "%s", h ? h->gr_name : "?");
			char line[PATH_MAX + 300];
			snprintf(line, sizeof line,
				 "%s: could not keep the group %s (%ld): %s; it is now %s (%ld)\n", path,
				 gn, (long)like->st_gid, strerror(e), hn, (long)now.st_gid);
			buf_puts(warn, line);
		}
	}
	/* after fchown, which may clear set-id bits */
	if (fchmod(fd, like->st_mode & 0777)) {
		fail(err, path, "cannot set the permissions", errno);
		return -1;
	}
	return 0;
}

/* A new temporary beside target, never opening anything already there. */
static int make_temp(of_file *f, tm_buf *err)
{
	static const char abc[] = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789";
	static uint64_t counter;
	size_t tl = strlen(f->target);
	if (!(f->tmp = malloc(tl + 12))) {
		fail(err, f->target, "out of memory", 0);
		return -1;
	}
	for (int i = 0; i < TMP_TRIES; i++) {
		struct timespec ts;
		clock_gettime(CLOCK_REALTIME, &ts);
		uint64_t x = ((uint64_t)ts.tv_nsec << 20) ^ (uint64_t)ts.tv_sec ^
			     ((uint64_t)getpid() << 40) ^ (++counter * 0x9E3779B97F4A7C15ull);
		x ^= x >> 31, x *= 0xBF58476D1CE4E5B9ull, x ^= x >> 27, x *= 0x94D049BB133111EBull;
		memcpy(f->tmp, f->target, tl);
		memcpy(f->tmp + tl, ".tmp-", 5);
		for (int k = 0; k < 6; k++, x >>= 6)
			f->tmp[tl + 5 + k] = abc[x % 62];
		f->tmp[tl + 11] = 0;
		/* owner only until it has its final mode: nobody may open
		 * it on the way (and keep reading what a private file gets) */
		watch_tmp(f->tmp);
		f->fd = open(f->tmp, O_WRONLY | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC, 0600);
		if (f->fd >= 0)
			return 0;
		unwatch_tmp();
		if (errno != EEXIST)
			break;
	}
	fail(err, f->tmp, errno == EEXIST ? "cannot find a free temporary name"
					  : "cannot create the temporary file",
	     errno == EEXIST ? 0 : errno);
	free(f->tmp);
	f->tmp = NULL;
	return -1;
}

int of_open(of_file *f, const char *path, int flags, tm_buf *err)
{
	struct stat st;
	int exists;

	memset(f, 0, sizeof *f);
	f->fd = -1;
	if ((flags & OF_DASH) && !strcmp(path, "-")) {
		f->std = 1;
		f->fd = STDOUT_FILENO;
		return 0;
	}
	if (!*path) {
		buf_reset(err);
		buf_puts(err, "an empty name is not a file name");
		return -1;
	}
	if (of_resolve(path, &f->target, &st, &exists, err))
		return -1;
	if (exists && (S_ISCHR(st.st_mode) || S_ISFIFO(st.st_mode)) && !(flags & OF_REGULAR)) {
		/* write into it; it must still be what we looked at */
		struct stat now;
		f->fd = open(f->target, O_WRONLY | O_NOCTTY | O_NOFOLLOW | O_CLOEXEC);
		if (f->fd < 0) {
			fail(err, f->target, "cannot open", errno);
			goto bad;
		}
		if (fstat(f->fd, &now) || now.st_dev != st.st_dev || now.st_ino != st.st_ino) {
			fail(err, f->target, "changed while it was being opened", 0);
			goto bad;
		}
		return 0;
	}
	if (exists && !S_ISREG(st.st_mode)) {
		fail(err, f->target,
		     S_ISDIR(st.st_mode) ? "is a folder" :
		     (flags & OF_REGULAR) ? "is not a regular file" :
		     "is not a regular file, a character device or a FIFO", 0);
		goto bad;
	}
	f->atomic = 1;
	if (make_temp(f, err))
		goto bad;
	if (exists) {
		if (keep_owner(f->fd, f->target, &st, &f->warn, err))
			goto bad;
	} else {
		mode_t um = umask(0); /* read it: there is no other way */
		umask(um);
		if (fchmod(f->fd, 0666 & ~um)) {
			fail(err, f->tmp, "cannot set the permissions", errno);
			goto bad;
		}
	}
	return 0;
bad:
	of_abort(f);
	return -1;
}

FILE *of_stream(of_file *f, tm_buf *err)
{
	if (!f->fp) {
		f->fp = f->std ? stdout : fdopen(f->fd, "wb");
		if (!f->fp)
			fail(err, f->target ? f->target : "standard output", "cannot write", errno);
	}
	return f->fp;
}

int of_write(of_file *f, const void *p, size_t n, tm_buf *err)
{
	const char *s = p;
	if (f->fp) {
		if (n && fwrite(s, 1, n, f->fp) != n) {
			fail(err, f->target ? f->target : "standard output", "cannot write", errno);
			return -1;
		}
		return 0;
	}
	while (n) {
		ssize_t w = write(f->fd, s, n);
		if (w < 0) {
			if (errno == EINTR)
				continue;
			fail(err, f->target ? f->target : "standard output", "cannot write", errno);
			return -1;
		}
		s += w;
		n -= (size_t)w;
	}
	return 0;
}

/* Flushes the folder of path so that a rename in it survives a crash. */
static void sync_dir(const char *path)
{
	size_t dl = dir_len(path);
	char *d = malloc(dl + 2);
	if (!d)
		return;
	memcpy(d, path, dl);
	memcpy(d + dl, dl ? "" : ".", dl ? 1 : 2);
	int fd = open(d, O_RDONLY | O_DIRECTORY | O_CLOEXEC);
	if (fd >= 0) {
		fsync(fd);
		close(fd);
	}
	free(d);
}

static void release(of_file *f)
{
	if (f->tmp)
		unwatch_tmp();
	free(f->target);
	free(f->tmp);
	buf_free(&f->warn);
	memset(f, 0, sizeof *f);
	f->fd = -1;
}

int of_commit(of_file *f, tm_buf *err)
{
	const char *name = f->target ? f->target : "standard output";
	int e = 0;
	const char *why = NULL;

	if (f->std) {
		if (fflush(stdout) || ferror(stdout))
			why = "cannot write", e = errno;
		f->fp = NULL;
		f->fd = -1;
	} else {
		if (f->fp && fflush(f->fp))
			why = "cannot write", e = errno;
		if (!why && f->atomic && fsync(f->fd))
			why = "cannot flush to the disk", e = errno;
		if ((f->fp ? fclose(f->fp) : close(f->fd)) && !why)
			why = "cannot write", e = errno;
		f->fp = NULL;
		f->fd = -1;
		if (!why && f->atomic && rename(f->tmp, f->target))
			why = "cannot replace it", e = errno;
	}
	if (why) {
		fail(err, name, why, e);
		if (f->atomic)
			buf_puts(err, " (left as it was)");
		of_abort(f);
		return -1;
	}
	if (f->atomic)
		sync_dir(f->target);
	release(f);
	return 0;
}

void of_abort(of_file *f)
{
	if (f->fp && !f->std)
		fclose(f->fp);
	else if (f->fd >= 0 && !f->std)
		close(f->fd);
	if (f->tmp)
		unlink(f->tmp);
	release(f);
}

int of_open_beside(const char *path, int oflags, const struct stat *like, tm_buf *warn,
		   tm_buf *err)
{
	for (int tries = 0; tries < TMP_TRIES; tries++) {
		int created = 1;
		int fd = open(path, oflags | O_CREAT | O_EXCL | O_NOFOLLOW | O_CLOEXEC,
			      like ? (like->st_mode & 0777) : 0666);
		if (fd < 0 && errno == EEXIST) {
			created = 0;
			fd = open(path, oflags | O_NOFOLLOW | O_NOCTTY | O_NONBLOCK | O_CLOEXEC);
			if (fd < 0 && errno == ENOENT)
				continue; /* removed in between: create it */
		}
		if (fd < 0) {
			/* ENXIO: a FIFO nobody reads (opened without waiting) */
			int e = errno;
			fail(err, path, e == ELOOP ? "is a symbolic link; refusing to follow it" :
					e == ENXIO ? "is not a regular file; refusing to use it" :
					"cannot open", e == ELOOP || e == ENXIO ? 0 : e);
			return -1;
		}
		struct stat st;
		if (fstat(fd, &st) || !S_ISREG(st.st_mode)) {
			fail(err, path, "is not a regular file; refusing to use it", 0);
			close(fd);
			return -1;
		}
		/* back to blocking writes: O_NONBLOCK only kept a planted FIFO
		 * from stopping the open */
		int fl = fcntl(fd, F_GETFL);
		if (fl >= 0)
			fcntl(fd, F_SETFL, fl & ~O_NONBLOCK);
		/* a file of ours follows like when like changed (a queue made
		 * group-writable later: its lock must be too) */
		int differs = like && st.st_uid == geteuid() &&
			      ((st.st_mode & 0777) != (like->st_mode & 0777) ||
			       st.st_gid != like->st_gid);
		if ((created || differs) && like && keep_owner(fd, path, like, warn, err)) {
			close(fd);
			return -1;
		}
		return fd;
	}
	fail(err, path, "keeps appearing and disappearing", 0);
	return -1;
}

/* outfile.h - writing a file so that a crash, a symbolic link or a
 * second user cannot corrupt it.  The one place with the rules every
 * writer of a named file follows (-o of tally, counts and review export;
 * the review queue, its lock and its rejected lines):
 *
 *  - A regular file, or a name where nothing is yet, is replaced
 *    atomically: the content goes to a new temporary file in the same
 *    folder (PATH.tmp-XXXXXX, created with O_CREAT|O_EXCL|O_NOFOLLOW, so
 *    that nothing planted under that name is ever opened), is flushed to
 *    the disk and renamed over PATH, and the folder is flushed too.  A
 *    crash leaves the old file or the new one, never a torn one.  The
 *    temporary is readable by its owner only until it has its final mode
 *    and group, before anything is written to it.  A failure removes it,
 *    and so does SIGINT, SIGTERM, SIGHUP or SIGQUIT while it exists (a
 *    handler removes it and dies of the signal; the previous actions are
 *    back after of_commit or of_abort).  The replacement keeps the old
 *    file's permission bits and group (and its owner when run as root);
 *    a new file gets the umask's mode and the folder's group rules.
 *  - A character device (/dev/null, a terminal) or a FIFO is written
 *    into as it is, never replaced; so is standard output for "-" when
 *    the caller allows it.  A directory, a block device or a socket is
 *    refused.
 *  - A symbolic link is followed to what it names (up to 40 links) when
 *    it belongs to the user who runs the command or to root, and what it
 *    names is then written as above (the link stays a link); a link that
 *    belongs to anyone else is refused, so that a member of a shared
 *    folder cannot steer another curator's writes into that curator's
 *    own files.
 *
 * Functions return TM_OK (0) on success and TM_EFAIL (-1) with
 * "path: what" in err (err.h).
 * Ownership: an of_file owns its names, descriptor and stream; of_commit
 * and of_abort release them and leave the of_file zeroed (of_abort on a
 * zeroed or committed of_file does nothing).  Notes that are not errors
 * (a group that could not be kept) are appended to f->warn, one line
 * each, for the caller to show; of_commit and of_abort free it, so read
 * it before. */
#ifndef TM_OUTFILE_H
#define TM_OUTFILE_H

#include <stdio.h>
#include <sys/stat.h>

#include "core/buf.h"

enum {
	OF_DASH = 1,    /* "-" is standard output */
	OF_REGULAR = 2  /* only a regular file (or none yet): refuse devices and FIFOs */
};

typedef struct of_file {
	int fd;          /* where to write; -1 when closed */
	FILE *fp;        /* of_stream's stream over fd, or NULL */
	int atomic;      /* 1: fd is the temporary that of_commit renames */
	int std;         /* 1: standard output (never closed) */
	char *target;    /* the file written or replaced, links resolved */
	char *tmp;       /* the temporary, NULL unless atomic */
	tm_buf warn;     /* notes for the user, one line each */
} of_file;

/* Resolves the links of path's last component by the rule above.  Sets
 * *target (malloc'd, the caller frees) to the name links lead to and
 * *exists to whether something is there, with its lstat in *st. */
int of_resolve(const char *path, char **target, struct stat *st, int *exists, tm_buf *err);

/* Opens path for writing by the rules above (flags: OF_*).  On success
 * write through f->fd, of_write or of_stream, then of_commit or of_abort. */
int of_open(of_file *f, const char *path, int flags, tm_buf *err);

/* A stdio stream over f (made once, owned by f); NULL with a message
 * when out of memory. */
FILE *of_stream(of_file *f, tm_buf *err);

/* Writes n bytes (retrying short writes and EINTR). */
int of_write(of_file *f, const void *p, size_t n, tm_buf *err);

/* Finishes: flushes, and for an atomic write fsync, rename over the
 * target and fsync of the folder.  On failure the target is as it was
 * (for a device or FIFO: what reached it stays) and the temporary is
 * gone.  f is released either way. */
int of_commit(of_file *f, tm_buf *err);

/* Gives up: closes and removes the temporary; the target is unchanged. */
void of_abort(of_file *f);

/* Opens (creating if missing) a regular file beside the data, never
 * following a link: open flags oflags (O_RDWR, O_WRONLY|O_APPEND, ...)
 * with O_NOFOLLOW added.  A file it creates, or one of the user's own
 * whose permission bits or group differ from like's, gets like's (when
 * like is not NULL; a new file gets the umask's mode otherwise).
 * Something that is not a regular file is refused.  Returns the
 * descriptor, or -1 with a message; notes go to warn. */
int of_open_beside(const char *path, int oflags, const struct stat *like, tm_buf *warn,
		   tm_buf *err);

#endif

/* err.h - the one error convention of titlemill.
 *
 * A function that can fail returns an int status: TM_OK (0) on success,
 * a negative kind below on failure.  The message, ready to print, is in
 * the error buffer the caller passed (a tm_buf, named err by habit): it
 * names file and line where there are any ("queue.jsonl:12: ...").
 * Results come back through pointers, never mixed into the status.  A
 * caller may test `if (f(...))` or `< 0`; it compares with a kind only
 * when it acts on that kind (a bad line is skipped, running out of
 * memory stops the run).  Only main and the commands (cmd_*) turn a
 * status into an exit code.
 *
 * Writers need not check each append: a tm_buf remembers its first
 * failure (buf.h), so a long writer appends freely and asks buf_status
 * once at the end. */
#ifndef TM_ERR_H
#define TM_ERR_H

#include <stdarg.h>

struct tm_buf;

enum tm_status {
	TM_OK = 0,
	TM_EFAIL = -1,  /* failed: the message says why (file, store, clock) */
	TM_ENOMEM = -2, /* memory ran out, or a buffer reached its cap */
	TM_EINPUT = -3, /* the input is not what it must be (a bad line or
			 * field); the run may go on without it */
};

/* Sets err to "where: what" followed by detail (where and detail may be
 * NULL) and returns kind, so that a failure reads
 * `return tm_fail(err, TM_EINPUT, where, "not an item", NULL);`. */
int tm_fail(struct tm_buf *err, int kind, const char *where, const char *what,
	    const char *detail);

/* As tm_fail with a printf format for the message. */
int tm_failf(struct tm_buf *err, int kind, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));

#endif

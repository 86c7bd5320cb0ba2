/* msg.h - the one prefix of every diagnostic: "titlemill COMMAND: ".
 *
 * The command is named once, when the command line is read (main's
 * dispatch and the options layer call msg_command); every module that
 * reports on a FILE * it was handed writes through msg_warnf, so a
 * message from a module several commands share (the labels reader, the
 * inputs of the ranking commands) carries the name of the command that
 * runs it without a string threaded through every call.  The name is
 * the only state: one process runs one command. */
#ifndef TM_MSG_H
#define TM_MSG_H

#include <stdio.h>

/* Names the running command ("coverage", "review add"); NULL or "" for
 * none (the prefix is then "titlemill: ").  The text is copied (at most
 * 47 bytes). */
void msg_command(const char *name);

/* "titlemill COMMAND" or "titlemill": for messages written by hand. */
const char *msg_prefix(void);

/* Writes "titlemill COMMAND: " and the formatted text to fp (the text
 * ends in its own line end).  Nothing when fp is NULL. */
void msg_warnf(FILE *fp, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* "s" when n is not 1: "%llu posting%s", n, msg_plural(n). */
static inline const char *msg_plural(unsigned long long n)
{
	return n == 1 ? "" : "s";
}

#endif

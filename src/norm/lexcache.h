/* lexcache.h - the compiled lexicon cache: the lexicons' image
 * (lex_image_write) kept in a folder of the user's own, so that a run
 * whose lexicon files have not changed reads one image instead of
 * parsing and compiling every file.
 *
 * Where: $TITLEMILL_LEXCACHE when set to a folder ("off" switches the
 * cache off); else $XDG_CACHE_HOME/titlemill (an absolute
 * XDG_CACHE_HOME), else $HOME/.cache/titlemill; missing folders are made
 * with mode 0700.  The folder is used only when it is a folder (not a
 * link) owned by the user who runs the command and writable by no one
 * else; a cache file only when it is a regular file (not a link) owned
 * by that user and writable by no one else.
 *
 * Key: a digest of what the lexicon is built from - the image format's
 * version, the running binary (device, inode, size, modification time),
 * the Unicode version, and the category, name and content of every file
 * read, in reading order - so that editing, adding, removing or
 * renaming a file, or another build of the program, gives a new image.
 * One cache file per list of file names and binary path
 * (lexicon-HEX.img); an image of another key is replaced.
 *
 * The cache never fails a run: a folder that cannot be used, an image
 * that is missing, of another key, damaged or truncated, and a write
 * that fails all end in the lexicon built from the files, silently. */
#ifndef TM_LEXCACHE_H
#define TM_LEXCACHE_H

#include <stddef.h>

#include "core/buf.h"
#include "norm/lexicon.h"

/* Builds the lexicon of files[0..n) (in that order, as lex_load_dir
 * would read them) through the cache.  Returns 0 with the lexicon in
 * *out (the caller frees it); -1 with file:line in err when a lexicon
 * file is wrong (the same message as without the cache) or memory ran
 * out; 1 when a file could not be read (nothing built: the caller
 * reads the files itself and reports the error it meets first). */
int lc_build(const lex_file *files, size_t n, lexicon **out, tm_buf *err);

/* Whether the cache is switched on (TITLEMILL_LEXCACHE is not "off"). */
int lc_enabled(void);

/* The cache folder (made when missing), or NULL when none can be used.
 * The string is malloc'd; the caller frees it. */
char *lc_dir(void);

#endif

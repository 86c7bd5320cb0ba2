/* lexcache.c - the compiled lexicon cache: where it lives, its key, and
 * reading and writing it without trusting what another user could have
 * put there (see lexcache.h). */
/* MAP_ANONYMOUS */
#define _DEFAULT_SOURCE
#include "norm/lexcache.h"

#include <errno.h>
#include <fcntl.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/mman.h>
#include <dirent.h>
#include <sys/stat.h>
#include <unistd.h>

#include "core/buf.h"
#include "core/digest.h"
#include "io/outfile.h"
#include "norm/unicode.h"

/* An image larger than this is not read (the bundled lexicons' image is
 * about 12 MB). */
#define LC_MAX_IMAGE ((off_t)1 << 30)

/* Images kept in the folder: the newest, by modification time.  Each
 * build of the binary and each edit of a lexicon makes a new one (about
 * 11 MB), so the older ones go when a new one is written. */
#define LC_KEEP 4
/* Images looked at when pruning: more are left for the next write. */
#define LC_PRUNE_MAX 256


int lc_enabled(void)
{
	const char *e = getenv("TITLEMILL_LEXCACHE");
	return !(e && strcmp(e, "off") == 0);
}

/* A folder is safe when it is one (not a link), the user's own, and
 * writable by no one else.  Returns 0 when it is. */
static int safe_dir(const char *path)
{
	struct stat st;
	int fd = open(path, O_RDONLY | O_DIRECTORY | O_NOFOLLOW | O_CLOEXEC);
	int ok;

	if (fd < 0)
		return -1;
	ok = fstat(fd, &st) == 0 && S_ISDIR(st.st_mode) && st.st_uid == geteuid() &&
	     !(st.st_mode & (S_IWGRP | S_IWOTH));
	close(fd);
	return ok ? 0 : -1;
}

static char *join(const char *a, const char *b)
{
	size_t la = strlen(a), lb = strlen(b);
	char *s = malloc(la + lb + 2);
	if (!s)
		return NULL;
	memcpy(s, a, la);
	s[la] = '/';
	memcpy(s + la + 1, b, lb + 1);
	return s;
}

char *lc_dir(void)
{
	const char *env = getenv("TITLEMILL_LEXCACHE");
	const char *xdg = getenv("XDG_CACHE_HOME");
	const char *home = getenv("HOME");
	char *dir;

	if (env && *env) {
		if (!strcmp(env, "off"))
			return NULL;
		if (!(dir = strdup(env)))
			return NULL;
	} else {
		char *base;
		if (xdg && xdg[0] == '/')
			base = strdup(xdg);
		else if (home && home[0] == '/')
			base = join(home, ".cache");
		else
			return NULL;
		if (!base)
			return NULL;
		if (mkdir(base, 0700) != 0 && errno != EEXIST) {
			free(base);
			return NULL;
		}
		dir = join(base, "titlemill");
		free(base);
		if (!dir)
			return NULL;
	}
	if ((mkdir(dir, 0700) != 0 && errno != EEXIST) || safe_dir(dir) != 0) {
		free(dir);
		return NULL;
	}
	return dir;
}

/* The image at path, read into a mapping, when it is a regular file of the user's,
 * writable by no one else: 0 with the mapping in *img, *n; -1 otherwise. */
static int map_image(const char *path, void **img, size_t *n)
{
	struct stat st;
	int fd = open(path, O_RDONLY | O_NOFOLLOW | O_NONBLOCK | O_CLOEXEC);
	void *m;

	if (fd < 0)
		return -1;
	if (fstat(fd, &st) != 0 || !S_ISREG(st.st_mode) || st.st_uid != geteuid() ||
	    (st.st_mode & (S_IWGRP | S_IWOTH)) || st.st_size <= 0 ||
	    st.st_size > LC_MAX_IMAGE) {
		close(fd);
		return -1;
	}
	/* read into anonymous memory rather than mapped from the file: its
	 * pages can then be 2 MiB ones (tm_hugepages), and every title's
	 * words are looked up all over the image (a page-table walk per
	 * lookup with 4 KiB pages) */
	size_t len = (size_t)st.st_size, got = 0;
	m = mmap(NULL, len, PROT_READ | PROT_WRITE, MAP_PRIVATE | MAP_ANONYMOUS, -1, 0);
	if (m == MAP_FAILED) {
		close(fd);
		return -1;
	}
	tm_hugepages(m, len);
	while (got < len) {
		ssize_t r = read(fd, (char *)m + got, len - got);
		if (r < 0 && errno == EINTR)
			continue;
		if (r <= 0)
			break;
		got += (size_t)r;
	}
	close(fd);
	if (got != len || mprotect(m, len, PROT_READ) != 0) {
		munmap(m, len);
		return -1;
	}
	*img = m;
	*n = len;
	return 0;
}

/* Writes the image to path atomically; whatever stands under the name
 * and is not a regular file of the user's (a link, another user's file)
 * is removed first, never followed.  Failures are ignored: the cache is
 * an optimisation. */
static void write_image(const char *path, const tm_buf *img)
{
	struct stat st;
	of_file f;
	tm_buf err = {0};

	if (lstat(path, &st) == 0 &&
	    (!S_ISREG(st.st_mode) || st.st_uid != geteuid() ||
	     (st.st_mode & (S_IWGRP | S_IWOTH))) &&
	    unlink(path) != 0)
		return;
	if (of_open(&f, path, OF_REGULAR, &err) == 0) {
		if (fchmod(f.fd, 0600) != 0 || of_write(&f, img->data, img->len, &err) != 0)
			of_abort(&f);
		else
			of_commit(&f, &err);
	}
	buf_free(&err);
	buf_free(&f.warn);
}

/* Is name an image's name: lexicon-<16 hex digits>.img? */
static int image_name(const char *name)
{
	if (strncmp(name, "lexicon-", 8) != 0 || strlen(name) != 8 + 16 + 4 ||
	    strcmp(name + 24, ".img") != 0)
		return 0;
	for (int i = 8; i < 24; i++)
		if (!((name[i] >= '0' && name[i] <= '9') || (name[i] >= 'a' && name[i] <= 'f')))
			return 0;
	return 1;
}

typedef struct lc_old {
	char name[32];
	struct timespec mtime;
} lc_old;

static int newer_first(const void *a, const void *b)
{
	const struct timespec *x = &((const lc_old *)a)->mtime, *y = &((const lc_old *)b)->mtime;
	if (x->tv_sec != y->tv_sec)
		return x->tv_sec < y->tv_sec ? 1 : -1;
	return x->tv_nsec < y->tv_nsec ? 1 : x->tv_nsec > y->tv_nsec ? -1 : 0;
}

/* Removes all but the LC_KEEP newest images of dir (keep, the one just
 * written, always stays): only regular files of the user's with an
 * image's name, never through a link.  Failures are ignored. */
static void prune_images(const char *dir, const char *keep)
{
	DIR *d = opendir(dir);
	struct dirent *de;
	lc_old *v;
	size_t n = 0;

	if (!d)
		return;
	if (!(v = malloc(LC_PRUNE_MAX * sizeof *v))) {
		closedir(d);
		return;
	}
	while (n < LC_PRUNE_MAX && (de = readdir(d))) {
		struct stat st;
		if (!image_name(de->d_name) || !strcmp(de->d_name, keep) ||
		    fstatat(dirfd(d), de->d_name, &st, AT_SYMLINK_NOFOLLOW) != 0 ||
		    !S_ISREG(st.st_mode) || st.st_uid != geteuid())
			continue;
		memcpy(v[n].name, de->d_name, strlen(de->d_name) + 1);
		v[n++].mtime = st.st_mtim;
	}
	tm_qsort(v, n, sizeof *v, newer_first);
	for (size_t i = LC_KEEP - 1; i < n; i++)
		(void)unlinkat(dirfd(d), v[i].name, 0);
	free(v);
	closedir(d);
}

/* The running binary, as far as it decides what an image holds. */
static void add_build(dg_state *d, dg_state *name)
{
	struct stat st;
	char exe[4096];
	ssize_t n = readlink("/proc/self/exe", exe, sizeof exe - 1);
	uint64_t v[6] = {0};
	const char *uv = uni_version();

	if (n > 0)
		dg_add(name, exe, (size_t)n);
	if (stat("/proc/self/exe", &st) == 0) {
		v[0] = (uint64_t)st.st_dev;
		v[1] = (uint64_t)st.st_ino;
		v[2] = (uint64_t)st.st_size;
		v[3] = (uint64_t)st.st_mtim.tv_sec;
		v[4] = (uint64_t)st.st_mtim.tv_nsec;
	}
	v[5] = LEX_IMAGE_VERSION;
	dg_add(d, v, sizeof v);
	dg_add(d, uv, strlen(uv));
}

/* One file's part of the key: its category, name and content. */
static void key_file(dg_state *d, const lex_file *f, const tm_buf *text)
{
	uint32_t kind[2] = {(uint32_t)f->cat, (uint32_t)f->gender_kind};

	dg_add(d, kind, sizeof kind);
	dg_add(d, f->path, strlen(f->path));
	dg_add(d, text->data, text->len);
}

/* The key of the files' current contents (read into text, reused) and
 * the name of their cache file. */
static int file_key(const lex_file *f, size_t n, tm_buf *text, unsigned char key[16],
		    unsigned char nkey[16], tm_buf *err)
{
	dg_state d, nm;

	dg_init(&d);
	dg_init(&nm);
	add_build(&d, &nm);
	for (size_t i = 0; i < n; i++) {
		/* read into one buffer, reused: mapping each file costs more
		 * in page-table work than the copy */
		if (lex_read_text(f[i].path, text, err) != 0)
			return -1;
		key_file(&d, &f[i], text);
		dg_add(&nm, f[i].path, strlen(f[i].path));
	}
	dg_final(&d, key);
	dg_final(&nm, nkey);
	return 0;
}

int lc_build(const lex_file *files, size_t n, lexicon **out, tm_buf *err)
{
	tm_buf text = {0}, img = {0}, why = {0};
	dg_state d, nm;
	unsigned char key[16], nkey[16];
	char *dir = NULL, *path = NULL;
	lexicon *lx = NULL;
	void *map;
	size_t i, mlen;
	char name[64] = "";
	int rc = 1;

	*out = NULL;
	if (file_key(files, n, &text, key, nkey, err) != 0)
		goto done;
	if ((dir = lc_dir())) {
		snprintf(name, sizeof name, "lexicon-%016llx.img",
			 (unsigned long long)dg_hash(nkey, sizeof nkey, 0));
		path = join(dir, name);
	}
	if (path && map_image(path, &map, &mlen) == 0) {
		int r = lex_image_use(map, mlen, 1, key, &lx, &why);
		if (r == 0) {
			*out = lx;
			rc = 0;
			goto done;
		}
		munmap(map, mlen);
		if (r < 0) {
			buf_reset(err);
			buf_puts(err, "out of memory");
			rc = -1;
			goto done;
		}
	}
	/* built from the files, read again: the image is written under the
	 * key of the very texts it was built from */
	if (!(lx = lex_new())) {
		buf_reset(err);
		buf_puts(err, "out of memory");
		rc = -1;
		goto done;
	}
	dg_init(&d);
	dg_init(&nm);
	add_build(&d, &nm);
	for (i = 0; i < n; i++) {
		if (lex_read_text(files[i].path, &text, err) != 0) {
			lex_free(lx);
			goto done;
		}
		key_file(&d, &files[i], &text);
		if (lex_load_text(lx, files[i].cat, files[i].gender_kind, files[i].path,
				  text.data, text.len, err) != 0) {
			lex_free(lx);
			rc = -1;
			goto done;
		}
	}
	dg_final(&d, key);
	(void)lex_freeze(lx);
	if (path && lex_image_write(lx, key, &img) == 0) {
		write_image(path, &img);
		prune_images(dir, name);
	}
	*out = lx;
	rc = 0;
done:
	buf_free(&text);
	buf_free(&img);
	buf_free(&why);
	free(dir);
	free(path);
	return rc;
}

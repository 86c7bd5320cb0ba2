/* Unit tests for writing files (src/io/outfile.c): a regular file replaced
 * atomically with its mode kept, a new one with the umask's mode, no
 * temporary left behind after a commit, an abort or a failed rename; a
 * FIFO and a character device written into and still what they were; a
 * temporary removed when the command is killed in the middle; a
 * link of ours followed (and still a link), a link of another user's
 * refused (when run as root, which can make one); folders refused; the
 * lock-style open never following a link nor opening a FIFO. */
#define _DEFAULT_SOURCE /* mkdtemp, lchown */
#include <dirent.h>
#include <fcntl.h>
#include <signal.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmocka.h>

#include "io/outfile.h"

static char dir[64];

static const char *at(const char *name)
{
	static char p[4][128];
	static int k;
	k = (k + 1) % 4;
	snprintf(p[k], sizeof p[k], "%s/%s", dir, name);
	return p[k];
}

static void put(const char *path, const char *text)
{
	FILE *fp = fopen(path, "w");
	assert_non_null(fp);
	fputs(text, fp);
	fclose(fp);
}

static char *get(const char *path)
{
	static char b[256];
	FILE *fp = fopen(path, "r");
	assert_non_null(fp);
	size_t n = fread(b, 1, sizeof b - 1, fp);
	b[n] = 0;
	fclose(fp);
	return b;
}

/* Files in the folder whose name holds ".tmp-". */
static int temporaries(void)
{
	DIR *d = opendir(dir);
	struct dirent *e;
	int n = 0;
	assert_non_null(d);
	while ((e = readdir(d)))
		n += strstr(e->d_name, ".tmp-") != NULL;
	closedir(d);
	return n;
}

static int setup(void **state)
{
	(void)state;
	snprintf(dir, sizeof dir, "%s", "/tmp/tm-outfile-XXXXXX");
	return mkdtemp(dir) ? 0 : -1;
}

static int teardown(void **state)
{
	char cmd[128];
	(void)state;
	snprintf(cmd, sizeof cmd, "rm -rf '%s'", dir);
	return system(cmd) == 0 ? 0 : -1;
}

static void write_text(const char *path, int flags, const char *text)
{
	of_file f;
	tm_buf err = {0};
	int rc = of_open(&f, path, flags, &err);
	if (rc)
		fprintf(stderr, "%s\n", err.data);
	assert_int_equal(rc, 0);
	assert_int_equal(of_write(&f, text, strlen(text), &err), 0);
	assert_int_equal(of_commit(&f, &err), 0);
	buf_free(&err);
}

static void test_regular_replaced_mode_kept(void **state)
{
	struct stat a, b;
	mode_t um = umask(022);
	(void)state;

	/* new: the umask's mode */
	write_text(at("new.tsv"), 0, "one\n");
	assert_int_equal(stat(at("new.tsv"), &a), 0);
	assert_int_equal(a.st_mode & 0777, 0644);
	assert_string_equal(get(at("new.tsv")), "one\n");
	/* replaced: a new file (another inode) with the old one's mode */
	chmod(at("new.tsv"), 0604);
	write_text(at("new.tsv"), 0, "two\n");
	assert_int_equal(stat(at("new.tsv"), &b), 0);
	assert_int_equal(b.st_mode & 0777, 0604);
	assert_true(a.st_ino != b.st_ino);
	assert_string_equal(get(at("new.tsv")), "two\n");
	assert_int_equal(temporaries(), 0);
	umask(um);
}

static void test_abort_and_failure_leave_nothing(void **state)
{
	of_file f;
	tm_buf err = {0};
	(void)state;

	put(at("keep.tsv"), "old\n");
	assert_int_equal(of_open(&f, at("keep.tsv"), 0, &err), 0);
	assert_int_equal(temporaries(), 1);
	of_write(&f, "half", 4, &err);
	of_abort(&f);
	of_abort(&f); /* twice: nothing more */
	assert_string_equal(get(at("keep.tsv")), "old\n");
	assert_int_equal(temporaries(), 0);

	/* the rename fails (a non-empty folder took the name meanwhile) */
	assert_int_equal(of_open(&f, at("gone.tsv"), 0, &err), 0);
	mkdir(at("gone.tsv"), 0755);
	put(at("gone.tsv/x"), "x");
	of_write(&f, "new\n", 4, &err);
	assert_int_equal(of_commit(&f, &err), -1);
	assert_non_null(strstr(err.data, "gone.tsv: cannot replace it"));
	assert_int_equal(temporaries(), 0);
	buf_free(&err);
}

static void test_fifo_and_device_written_into(void **state)
{
	struct stat st;
	char b[16] = {0};
	(void)state;

	assert_int_equal(mkfifo(at("pipe"), 0600), 0);
	int rd = open(at("pipe"), O_RDONLY | O_NONBLOCK);
	assert_true(rd >= 0);
	write_text(at("pipe"), 0, "through\n");
	assert_int_equal(read(rd, b, sizeof b - 1), 8);
	assert_string_equal(b, "through\n");
	close(rd);
	assert_int_equal(lstat(at("pipe"), &st), 0);
	assert_true(S_ISFIFO(st.st_mode));

	write_text("/dev/null", 0, "nothing\n");
	assert_int_equal(lstat("/dev/null", &st), 0);
	assert_true(S_ISCHR(st.st_mode));

	/* a queue is a regular file: a device is refused */
	of_file f;
	tm_buf err = {0};
	assert_int_equal(of_open(&f, "/dev/null", OF_REGULAR, &err), -1);
	assert_non_null(strstr(err.data, "not a regular file"));
	/* a folder is refused */
	assert_int_equal(of_open(&f, dir, 0, &err), -1);
	assert_non_null(strstr(err.data, "is a folder"));
	/* "-" is standard output only when asked */
	assert_int_equal(of_open(&f, "-", OF_DASH, &err), 0);
	assert_true(f.std);
	of_abort(&f);
	assert_true(fcntl(STDOUT_FILENO, F_GETFD) >= 0); /* not closed */
	buf_free(&err);
}

static void test_links(void **state)
{
	struct stat st;
	char to[64];
	(void)state;

	/* a link of ours: followed, the link stays, its target is replaced */
	mkdir(at("sub"), 0755);
	put(at("sub/real.tsv"), "old\n");
	chmod(at("sub/real.tsv"), 0640);
	assert_int_equal(symlink("sub/real.tsv", at("link.tsv")), 0);
	write_text(at("link.tsv"), 0, "new\n");
	assert_int_equal(lstat(at("link.tsv"), &st), 0);
	assert_true(S_ISLNK(st.st_mode));
	ssize_t n = readlink(at("link.tsv"), to, sizeof to - 1);
	assert_true(n > 0);
	to[n] = 0;
	assert_string_equal(to, "sub/real.tsv");
	assert_string_equal(get(at("sub/real.tsv")), "new\n");
	assert_int_equal(stat(at("sub/real.tsv"), &st), 0);
	assert_int_equal(st.st_mode & 0777, 0640);
	/* a dangling link of ours: the file it names is made */
	assert_int_equal(symlink("sub/made.tsv", at("dangling.tsv")), 0);
	write_text(at("dangling.tsv"), 0, "made\n");
	assert_string_equal(get(at("sub/made.tsv")), "made\n");

	/* a link that belongs to another user: refused, its target untouched */
	if (geteuid() == 0) {
		of_file f;
		tm_buf err = {0};
		put(at("private.txt"), "mine\n");
		assert_int_equal(symlink(at("private.txt"), at("planted.tsv")), 0);
		assert_int_equal(lchown(at("planted.tsv"), 65534, 65534), 0);
		assert_int_equal(of_open(&f, at("planted.tsv"), 0, &err), -1);
		assert_non_null(strstr(err.data, "belongs to another user"));
		assert_string_equal(get(at("private.txt")), "mine\n");
		buf_free(&err);
	} else
		fprintf(stderr, "  (not root: the link of another user is not tried)\n");
	assert_int_equal(temporaries(), 0);
}

static void test_open_beside(void **state)
{
	struct stat like = {0}, st;
	tm_buf warn = {0}, err = {0};
	mode_t um = umask(077);
	(void)state;

	/* created with like's mode, whatever the umask */
	like.st_mode = S_IFREG | 0660;
	like.st_uid = geteuid();
	like.st_gid = getegid();
	int fd = of_open_beside(at("q.lock"), O_RDWR, &like, &warn, &err);
	assert_true(fd >= 0);
	close(fd);
	assert_int_equal(stat(at("q.lock"), &st), 0);
	assert_int_equal(st.st_mode & 0777, 0660);
	/* one of ours follows like again; without like it is left as it is */
	chmod(at("q.lock"), 0600);
	fd = of_open_beside(at("q.lock"), O_RDWR, NULL, &warn, &err);
	assert_true(fd >= 0);
	close(fd);
	assert_int_equal(stat(at("q.lock"), &st), 0);
	assert_int_equal(st.st_mode & 0777, 0600);
	fd = of_open_beside(at("q.lock"), O_RDWR, &like, &warn, &err);
	assert_true(fd >= 0);
	close(fd);
	assert_int_equal(stat(at("q.lock"), &st), 0);
	assert_int_equal(st.st_mode & 0777, 0660);
	umask(um);

	/* a link is never followed, a FIFO never opened */
	put(at("other.txt"), "other\n");
	assert_int_equal(symlink(at("other.txt"), at("l.lock")), 0);
	assert_int_equal(of_open_beside(at("l.lock"), O_RDWR, NULL, &warn, &err), -1);
	assert_non_null(strstr(err.data, "symbolic link"));
	assert_string_equal(get(at("other.txt")), "other\n");
	assert_int_equal(mkfifo(at("f.lock"), 0600), 0);
	assert_int_equal(of_open_beside(at("f.lock"), O_WRONLY | O_APPEND, NULL, &warn, &err), -1);
	assert_non_null(strstr(err.data, "not a regular file"));
	assert_int_equal(warn.len, 0);
	buf_free(&warn);
	buf_free(&err);
}

/* A command killed (SIGTERM) in the middle of a write removes its
 * temporary and still dies of that signal; after a commit the signal's
 * own action is back. */
static void test_killed_mid_write(void **state)
{
	int st;
	(void)state;

	put(at("sig.tsv"), "old\n");
	pid_t pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		of_file f;
		tm_buf err = {0};
		if (of_open(&f, at("sig.tsv"), 0, &err) || of_write(&f, "half", 4, &err))
			_exit(3);
		raise(SIGTERM);
		_exit(4); /* not reached */
	}
	assert_int_equal(waitpid(pid, &st, 0), pid);
	assert_true(WIFSIGNALED(st));
	assert_int_equal(WTERMSIG(st), SIGTERM);
	assert_int_equal(temporaries(), 0);
	assert_string_equal(get(at("sig.tsv")), "old\n");

	pid = fork();
	assert_true(pid >= 0);
	if (pid == 0) {
		signal(SIGTERM, SIG_IGN);
		write_text(at("sig.tsv"), 0, "new\n");
		raise(SIGTERM); /* ignored again after the write */
		_exit(5);
	}
	assert_int_equal(waitpid(pid, &st, 0), pid);
	assert_true(WIFEXITED(st));
	assert_int_equal(WEXITSTATUS(st), 5);
	assert_string_equal(get(at("sig.tsv")), "new\n");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_regular_replaced_mode_kept),
		cmocka_unit_test(test_abort_and_failure_leave_nothing),
		cmocka_unit_test(test_fifo_and_device_written_into),
		cmocka_unit_test(test_links),
		cmocka_unit_test(test_open_beside),
		cmocka_unit_test(test_killed_mid_write),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}

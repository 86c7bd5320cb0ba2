/* trend_fixture.h - two small hand-built windows of counts (before B,
 * after A) and their labels, for the tests of the trend engine
 * (test_trend.c) and of the report's time sections
 * (tests/unit/report/test_report.c).  Included once per test program;
 * setup and teardown are its cmocka group fixtures. */
#ifndef TM_TREND_FIXTURE_H
#define TM_TREND_FIXTURE_H

static lexicon *LX;
static normaliser *NM;
static labelset LS;
static tally_mem B, A;

static void form(tally_mem *m, const char *occ, const char *key, uint64_t n)
{
	assert_int_equal(tm_add_form(m, occ, strlen(occ), "de", key, strlen(key), key, strlen(key),
				     n), 0);
	assert_int_equal(tm_add_key(m, "de", key, strlen(key), n), 0);
}

static void occ(tally_mem *m, const char *o, uint64_t n)
{
	assert_int_equal(tm_add_occ(m, o, strlen(o), "de", n), 0);
}

/* occ:1 (100 postings in each window): lagerist 50 -> 20 (its label,
 * falling), kommissionierer 50 -> 40 (down by a fifth only),
 * lagerlogistiker 0 -> 40 (new, rising), lagerhelfer 0 -> 5 (too few).
 * occ:2 (60 each): koch 30 -> 60, kuechenhilfe 30 -> 0 (its label,
 * vanished).  occ:3 is counted after only. */
static int setup(void **state)
{
	(void)state;
	char path[] = "/tmp/tm-trend-XXXXXX";
	int fd = mkstemp(path);
	const char *labels = "occupation\tkind\tlang\tlabel\n"
			     "occ:1\tpref\tde\tLagerist\n"
			     "occ:2\tpref\tde\tKoch\n"
			     "occ:2\talt\tde\tKuechenhilfe\n";
	tm_buf err = {0};
	if (fd < 0 || write(fd, labels, strlen(labels)) != (ssize_t)strlen(labels))
		return -1;
	close(fd);
	LX = lex_new();
	NM = norm_new(LX);
	if (!NM || labels_read(&LS, path, NM, stderr, &err) != 0)
		return -1;
	remove(path);
	buf_free(&err);
	tm_init(&B);
	tm_init(&A);
	form(&B, "occ:1", "lagerist", 50);
	form(&B, "occ:1", "kommissionierer", 50);
	occ(&B, "occ:1", 100);
	form(&A, "occ:1", "lagerist", 20);
	form(&A, "occ:1", "kommissionierer", 35);
	form(&A, "occ:1", "lagerlogistiker", 40);
	form(&A, "occ:1", "lagerhelfer", 5);
	occ(&A, "occ:1", 100);
	form(&B, "occ:2", "koch", 30);
	form(&B, "occ:2", "kuechenhilfe", 30);
	occ(&B, "occ:2", 60);
	form(&A, "occ:2", "koch", 60);
	occ(&A, "occ:2", 60);
	form(&A, "occ:3", "baecker", 70);
	occ(&A, "occ:3", 70);
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	tm_free(&B);
	tm_free(&A);
	labels_free(&LS);
	norm_free(NM);
	lex_free(LX);
	return 0;
}

#endif

# titlemill - build, test, benchmark, install.
#
#   make              build ./titlemill
#   make test         unit tests (cmocka) and the command-line suites
#   make asan         the unit tests and suites built with ASan+UBSan
#   make valgrind     memcheck over the normaliser and tally paths
#   make bench        the benchmarks (not tests: figures, not verdicts)
#   make deps         install the Debian packages of .ci/packages (sudo unless root)
#   make demo         run the main job on the bundled example data
#   make install      PREFIX=/usr/local DESTDIR= : binary, lexicons, man page

PREFIX ?= /usr/local
BINDIR ?= $(PREFIX)/bin
DATADIR ?= $(PREFIX)/share/titlemill
MANDIR ?= $(PREFIX)/share/man/man1
VERSION = 0.1.0

CC ?= cc
PKG_CONFIG ?= pkg-config
LIBS_PC = libutf8proc jansson hiredis serd-0
PC_CFLAGS := $(shell $(PKG_CONFIG) --cflags $(LIBS_PC) 2>/dev/null)
PC_LIBS := $(shell $(PKG_CONFIG) --libs $(LIBS_PC) 2>/dev/null)
CMOCKA_CFLAGS := $(shell $(PKG_CONFIG) --cflags cmocka 2>/dev/null)
CMOCKA_LIBS := $(shell $(PKG_CONFIG) --libs cmocka 2>/dev/null)

WARN = -Wall -Wextra -Wpedantic -Wshadow -Wstrict-prototypes -Wmissing-prototypes
OPT ?= -O2 -g
override CFLAGS += -std=c11 -D_POSIX_C_SOURCE=200809L -pthread $(WARN) $(OPT) $(PC_CFLAGS) \
	-DTM_VERSION='"$(VERSION)"' -DTM_LEXDIR='"$(DATADIR)/lexicons"'
override LDLIBS += $(PC_LIBS) -lm -pthread

BUILD ?= build
# The sources, folder by folder in the order of the pipeline; a folder
# includes only from the folders before it (DEVELOPERS.md says what each
# holds).  Objects and unit tests go flat into $(BUILD): names are unique.
SRC_core = buf digest lang msg period
SRC_io = decode reader tsv jsonw jsonr htmlw postings skos record outfile fieldcheck
SRC_norm = unicode token lexicon lexicon_read lexicon_image lexcache setup title pass_gender pass_contact pass_pay pass_days pass_noise pass_place pass_employer pass_roles \
	norm facets
SRC_count = strtab idset tally_mem series chunk store load store_redis store_redis_url store_redis_keys store_redis_chunk \
	store_redis_apply store_redis_dump cluster slot
SRC_rank = stats labels labkeys inputs coverage propose trend groups overlap
SRC_match = sim match code acro
SRC_review = review_item review_json review_change review_batch review_time review_clash review_noise review_trend \
	queue queue_file \
	store_redis_queue delta
SRC_report = chart report report_page report_cov report_occ report_overlap report_trend
SRC_cli = options cli_norm cli_tally cli_rank cli_propose cli_match cli_review cli_review_change cli_review_read \
	cli_review_out cli_report cli_overlap cli_trend
DIRS = core io norm count rank match review report cli
vpath %.c $(DIRS:%=src/%) $(DIRS:%=tests/unit/%)
HEADERS = $(wildcard src/*/*.h src/*/*.inc)
# what the unit tests link: everything but main
CORE = $(foreach d,$(DIRS),$(SRC_$(d)))
CORE_SRC = $(foreach d,$(DIRS),$(SRC_$(d):%=src/$(d)/%.c))
CORE_OBJ = $(CORE:%=$(BUILD)/%.o)
CLI_OBJ = $(BUILD)/main.o
UNIT_SRC = $(sort $(wildcard tests/unit/*/test_*.c))
UNIT_TESTS = $(notdir $(UNIT_SRC:.c=))
UNIT_BIN = $(UNIT_TESTS:%=$(BUILD)/%)

all: titlemill

titlemill: $(CORE_OBJ) $(CLI_OBJ)
	$(CC) $(CFLAGS) $(LDFLAGS) -o $@ $^ $(LDLIBS)

$(BUILD)/%.o: %.c $(HEADERS) | $(BUILD)
	$(CC) $(CFLAGS) -Isrc -c -o $@ $<

$(BUILD)/test_%.o: test_%.c $(HEADERS) | $(BUILD)
	$(CC) $(CFLAGS) $(CMOCKA_CFLAGS) -Isrc -c -o $@ $<

$(BUILD)/test_%: $(BUILD)/test_%.o $(CORE_OBJ)
	$(CC) $(CFLAGS) $(LDFLAGS) -o $@ $^ $(LDLIBS) $(CMOCKA_LIBS)

$(BUILD):
	mkdir -p $(BUILD)

# The whole suite: unit tests, then the command-line and conformance suites.
NTEST = $(BUILD)/NormalizationTest.txt
$(NTEST): | $(BUILD)
	bzcat /usr/share/unicode/NormalizationTest.txt.bz2 > $@.tmp && mv $@.tmp $@

G2CASES = $(BUILD)/g2-cases.txt
$(G2CASES): tests/unit/rank/gen_g2_cases.py | $(BUILD)
	/usr/bin/python3 tests/unit/rank/gen_g2_cases.py $@.tmp && mv $@.tmp $@

JSDCASES = $(BUILD)/jsd-cases.txt
$(JSDCASES): tests/unit/rank/gen_jsd_cases.py | $(BUILD)
	/usr/bin/python3 tests/unit/rank/gen_jsd_cases.py $@.tmp && mv $@.tmp $@

unit: $(UNIT_BIN) $(NTEST) $(G2CASES) $(JSDCASES)
	@set -e; for t in $(UNIT_BIN); do \
		NORMALIZATION_TEST=$(NTEST) G2_CASES=$(CURDIR)/$(G2CASES) JSD_CASES=$(CURDIR)/$(JSDCASES) $$t; done

test: titlemill unit
	TITLEMILL=$(CURDIR)/titlemill sh tests/run-suites.sh

# Sanitizer build in its own folder, same tests (the timed suite judges
# no time there: TITLEMILL_UNTIMED=1, tests/cases/check_linear.py).
asan:
	$(MAKE) BUILD=build-asan OPT='-O1 -g -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=all' \
		LDFLAGS='-fsanitize=address,undefined' titlemill-asan-bin
titlemill-asan-bin: $(CORE_OBJ) $(CLI_OBJ) unit
	$(CC) $(CFLAGS) $(LDFLAGS) -o $(BUILD)/titlemill $(CORE_OBJ) $(CLI_OBJ) $(LDLIBS)
	TITLEMILL=$(CURDIR)/$(BUILD)/titlemill TITLEMILL_LEXDIR=$(CURDIR)/lexicons \
		TITLEMILL_UNTIMED=1 sh tests/run-suites.sh

# valgrind memcheck over the normaliser and tally paths and their unit
# tests: zero errors, zero definite or indirect leaks.
valgrind: titlemill $(UNIT_BIN) $(NTEST) $(G2CASES) $(JSDCASES)
	NORMALIZATION_TEST=$(CURDIR)/$(NTEST) G2_CASES=$(CURDIR)/$(G2CASES) JSD_CASES=$(CURDIR)/$(JSDCASES) \
		sh tests/valgrind.sh $(CURDIR)/titlemill $(CURDIR)/$(BUILD)

# libFuzzer targets (clang): FUZZ_SECONDS each, corpus in build-fuzz/;
# inputs up to FUZZ_MAX_LEN bytes (so that size-dependent costs are
# reachable), each within FUZZ_TIMEOUT seconds; a finding fails the run
# (its log is build-fuzz/TARGET.log).
FUZZ_SECONDS ?= 60
FUZZ_MAX_LEN ?= 65536
FUZZ_TIMEOUT ?= 10
FUZZ_TARGETS = fuzz_norm fuzz_postings fuzz_counts fuzz_labels fuzz_review fuzz_delta
FUZZ_CC ?= clang
FUZZ_FLAGS = -g -O1 -fsanitize=fuzzer,address,undefined -fno-sanitize-recover=all
fuzz-build:
	mkdir -p build-fuzz
	@set -e; for t in $(FUZZ_TARGETS); do \
		$(FUZZ_CC) -std=c11 -D_POSIX_C_SOURCE=200809L $(FUZZ_FLAGS) $(PC_CFLAGS) -Isrc \
			-DTM_LEXDIR='"$(DATADIR)/lexicons"' -o build-fuzz/$$t tests/fuzz/$$t.c \
			$(CORE_SRC) $(PC_LIBS) -pthread; done
fuzz: fuzz-build
	@set -e; for t in $(FUZZ_TARGETS); do \
		mkdir -p build-fuzz/corpus-$$t; \
		sh tests/fuzz/seeds.sh $$t build-fuzz/corpus-$$t; \
		if TITLEMILL_LEXDIR=$(CURDIR)/lexicons build-fuzz/$$t -max_total_time=$(FUZZ_SECONDS) \
			-max_len=$(FUZZ_MAX_LEN) -timeout=$(FUZZ_TIMEOUT) \
			-print_final_stats=1 build-fuzz/corpus-$$t tests/fuzz/seeds-$$t \
			> build-fuzz/$$t.log 2>&1; then tail -12 build-fuzz/$$t.log; \
		else tail -40 build-fuzz/$$t.log; echo "$$t: a finding (build-fuzz/$$t.log)"; exit 1; fi; done

# the counting stage of tally alone (tests/bench/count_stage.c)
$(BUILD)/count_stage: tests/bench/count_stage.c $(CORE_OBJ) $(HEADERS)
	$(CC) $(CFLAGS) -Isrc $(LDFLAGS) -o $@ tests/bench/count_stage.c $(CORE_OBJ) $(LDLIBS)

bench: titlemill $(BUILD)/count_stage
	sh tests/bench/run.sh $(CURDIR)/titlemill
	sh tests/bench/startup.sh $(CURDIR)/titlemill
	COUNT_STAGE=$(CURDIR)/$(BUILD)/count_stage sh tests/bench/tally.sh $(CURDIR)/titlemill
	sh tests/bench/review.sh $(CURDIR)/titlemill
	sh tests/bench/cluster.sh $(CURDIR)/titlemill
	sh tests/bench/store.sh $(CURDIR)/titlemill
	sh tests/bench/rank.sh $(CURDIR)/titlemill
	sh tests/bench/report.sh $(CURDIR)/titlemill
	sh tests/bench/overlap.sh $(CURDIR)/titlemill
	sh tests/bench/match.sh $(CURDIR)/titlemill
	sh tests/bench/trend.sh $(CURDIR)/titlemill

# The Debian 12 packages of .ci/packages: through sudo unless already root
# (.ci/deps, which a fresh machine runs before make is installed).
deps:
	sh .ci/deps

demo: titlemill
	sh examples/demo.sh $(CURDIR)/titlemill

install: titlemill
	install -d $(DESTDIR)$(BINDIR) $(DESTDIR)$(DATADIR) $(DESTDIR)$(MANDIR)
	install -m 755 titlemill $(DESTDIR)$(BINDIR)/titlemill
	cp -R lexicons $(DESTDIR)$(DATADIR)/
	rm -rf $(DESTDIR)$(DATADIR)/lexicons/tools
	install -m 644 titlemill.1 $(DESTDIR)$(MANDIR)/titlemill.1

uninstall:
	rm -f $(DESTDIR)$(BINDIR)/titlemill $(DESTDIR)$(MANDIR)/titlemill.1
	rm -rf $(DESTDIR)$(DATADIR)

clean:
	rm -rf build build-asan build-fuzz titlemill

.SECONDARY:

.PHONY: fuzz fuzz-build all unit test asan titlemill-asan-bin valgrind bench deps demo install uninstall clean

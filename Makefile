# Makefile — builds libbellcheck.a and the bellcheck command, runs the demo and the tests.
# SPDX-License-Identifier: GPL-3.0-or-later
# GNU Make; see DEVELOPERS.md.

CC      ?= cc
CFLAGS  ?= -O2 -g
WARN    := -Wall -Wextra -Wshadow -Wstrict-prototypes -Wmissing-prototypes
OPENMP  := -fopenmp
CPPFLAGS_ALL := -std=c11 -D_POSIX_C_SOURCE=200809L -Isrc -I/usr/include/suitesparse $(OPENMP) $(CPPFLAGS)
LIBS    := -lglpk -lumfpack -lamd -lcjson -lnettle -lflint -lgmp -lm $(OPENMP)
export BC_LIBS = $(LIBS) # for tests that link the library (tests/cli/library_example.sh)
PREFIX  ?= /usr/local
BUILD   := build

LIB_SRC := $(filter-out src/cli%.c,$(wildcard src/*.c)) $(wildcard formats/*.c) $(wildcard solvers/*.c)
CLI_SRC := $(wildcard src/cli*.c)
LIB_OBJ := $(LIB_SRC:%.c=$(BUILD)/obj/%.o)
CLI_OBJ := $(CLI_SRC:%.c=$(BUILD)/obj/%.o)
UNIT_SRC := $(wildcard tests/unit/test_*.c)
UNIT_BIN := $(UNIT_SRC:tests/unit/%.c=$(BUILD)/tests/%)
BENCH_BIN := $(BUILD)/bench/garnet $(BUILD)/bench/gridworld $(BUILD)/bench/probe \
             $(BUILD)/bench/formula_speed

# Checking builds, each in its own directory so they never mix with build/:
# `make test-sanitize` (gcc, AddressSanitizer + UndefinedBehaviorSanitizer),
# `make test-valgrind` (memcheck on the command-line tests) and `make fuzz`
# (clang + libFuzzer; the only target that needs clang).
SAN_BUILD    ?= build-asan
SAN_FLAGS    := -fsanitize=address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer
FUZZ_BUILD   ?= build-fuzz
FUZZ_SECONDS ?= 20
FUZZ_TARGETS ?=
FUZZ_HARNESS := $(patsubst tests/fuzz/%.c,$(BUILD)/fuzz/%,$(wildcard tests/fuzz/fuzz_*.c))

.PHONY: all deps deps-test test test-binaries demo install clean bench test-sanitize test-valgrind fuzz fuzz-harnesses test-browser

all: $(BUILD)/bellcheck

deps:
	@build-aux/deps.sh build

deps-test:
	@build-aux/deps.sh test

$(BUILD)/obj/%.o: %.c src/bellcheck.h $(wildcard src/*.h solvers/*.h formats/*.h)
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) $(CFLAGS) $(WARN) -c $< -o $@

# The interval verifier changes the rounding mode: the compiler must not fold
# or reorder its floating-point operations.
$(BUILD)/obj/solvers/interval.o: CFLAGS += -frounding-math

$(BUILD)/libbellcheck.a: $(LIB_OBJ)
	@mkdir -p $(BUILD)
	rm -f $@
	ar rcs $@ $^

$(BUILD)/bellcheck: $(CLI_OBJ) $(BUILD)/libbellcheck.a
	$(CC) $(CFLAGS) -o $@ $(CLI_OBJ) $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

$(BUILD)/tests/%: tests/unit/%.c $(wildcard tests/unit/*.h) $(BUILD)/libbellcheck.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) -Itests/unit $(CFLAGS) $(WARN) -o $@ $< $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

# The benchmark's generators are plain C; the probe links the library.
$(BUILD)/bench/%: tests/bench/%.c
	@mkdir -p $(dir $@)
	$(CC) -std=c11 -D_POSIX_C_SOURCE=200809L $(CFLAGS) $(WARN) -o $@ $<

$(BUILD)/bench/probe: tests/bench/probe.c $(BUILD)/libbellcheck.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) -Isolvers $(CFLAGS) $(WARN) -o $@ $< $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

# Formula steps per second of a task's dynamics (run: build/bench/formula_speed [TASK] [SECONDS]).
$(BUILD)/bench/formula_speed: tests/bench/formula_speed.c $(BUILD)/libbellcheck.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) $(CFLAGS) $(WARN) -o $@ $< $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

# The example pipeline's learner (models/rover-pipeline): plain C on the library's task API.
$(BUILD)/models/rover-qlearn: models/rover-pipeline/qlearn.c $(BUILD)/libbellcheck.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) $(CFLAGS) $(WARN) -o $@ $< $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

# Everything tests/run.sh needs, in $(BUILD) (also build-asan/ for test-sanitize).
TEST_BIN = $(BUILD)/bellcheck $(UNIT_BIN) $(BUILD)/bench/garnet $(BUILD)/bench/gridworld
test-binaries: $(TEST_BIN)

test: deps-test
	@$(MAKE) --no-print-directory test-binaries
	@tests/run.sh

# One run of the benchmark (tests/bench/run.py): table on stdout and in
# $(BUILD)/bench.md.  BENCH_QUICK=1: small models, under a minute;
# BENCH_BIG=1 adds the 10-million-state model.
bench: deps-test
	@$(MAKE) --no-print-directory $(BUILD)/bellcheck $(BENCH_BIN)
	@BUILD=$(BUILD) /usr/bin/python3 tests/bench/run.py
	@BUILD=$(BUILD) /usr/bin/python3 tests/bench/proofs.py

test-sanitize: deps-test
	@$(MAKE) --no-print-directory BUILD=$(SAN_BUILD) CFLAGS="-O1 -g $(SAN_FLAGS)" test-binaries
	@tests/memcheck.sh sanitize $(SAN_BUILD) "$(SAN_FLAGS)"

test-valgrind:
	@build-aux/deps.sh valgrind
	@$(MAKE) --no-print-directory test-binaries
	@tests/memcheck.sh valgrind $(BUILD)

# The HTML reports rendered by Debian's headless chromium, screenshots checked (tests/browser/).
test-browser:
	@build-aux/deps.sh browser
	@$(MAKE) --no-print-directory $(BUILD)/bellcheck
	@BELLCHECK=$(BUILD)/bellcheck tests/browser/run.sh

$(BUILD)/fuzz/%: tests/fuzz/%.c tests/fuzz/fuzz.h $(wildcard tests/unit/*.h) $(BUILD)/libbellcheck.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) $(CFLAGS) -fsanitize=fuzzer $(WARN) -o $@ $< $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

fuzz-harnesses: $(FUZZ_HARNESS)

fuzz:
	@build-aux/deps.sh fuzz
	@$(MAKE) --no-print-directory BUILD=$(FUZZ_BUILD) CC=clang \
	  CFLAGS="-O1 -g $(SAN_FLAGS) -fsanitize=fuzzer-no-link" fuzz-harnesses
	@tests/fuzz/run.sh $(FUZZ_BUILD) $(FUZZ_SECONDS) $(FUZZ_TARGETS)

demo: deps
	@$(MAKE) --no-print-directory $(BUILD)/bellcheck $(BUILD)/models/rover-qlearn
	@BUILD=$(BUILD) tests/demo.sh

install: $(BUILD)/bellcheck
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/lib $(DESTDIR)$(PREFIX)/include
	install -m 755 $(BUILD)/bellcheck $(DESTDIR)$(PREFIX)/bin/bellcheck
	install -m 644 $(BUILD)/libbellcheck.a $(DESTDIR)$(PREFIX)/lib/libbellcheck.a
	install -m 644 src/bellcheck.h $(DESTDIR)$(PREFIX)/include/bellcheck.h

clean:
	rm -rf $(BUILD) $(SAN_BUILD) $(FUZZ_BUILD)

# Makefile — builds libbellcheck.a and the bellcheck command, runs the demo and the tests.
# GNU Make; see DEVELOPERS.md.

CC      ?= cc
CFLAGS  ?= -O2 -g
WARN    := -Wall -Wextra -Wshadow -Wstrict-prototypes -Wmissing-prototypes
CPPFLAGS_ALL := -std=c11 -D_POSIX_C_SOURCE=200809L -Isrc -I/usr/include/suitesparse $(CPPFLAGS)
LIBS    := -lglpk -lumfpack -lamd -lcjson -lgmp -lm
PREFIX  ?= /usr/local
BUILD   := build

LIB_SRC := $(filter-out src/cli%.c,$(wildcard src/*.c)) $(wildcard formats/*.c) $(wildcard solvers/*.c)
CLI_SRC := $(wildcard src/cli*.c)
LIB_OBJ := $(LIB_SRC:%.c=$(BUILD)/obj/%.o)
CLI_OBJ := $(CLI_SRC:%.c=$(BUILD)/obj/%.o)
UNIT_SRC := $(wildcard tests/unit/test_*.c)
UNIT_BIN := $(UNIT_SRC:tests/unit/%.c=$(BUILD)/tests/%)

.PHONY: all deps deps-test test demo install clean bench

all: $(BUILD)/bellcheck

deps:
	@build-aux/deps.sh build

deps-test:
	@build-aux/deps.sh test

$(BUILD)/obj/%.o: %.c src/bellcheck.h $(wildcard src/*.h solvers/*.h formats/*.h)
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) $(CFLAGS) $(WARN) -c $< -o $@

$(BUILD)/libbellcheck.a: $(LIB_OBJ)
	@mkdir -p $(BUILD)
	rm -f $@
	ar rcs $@ $^

$(BUILD)/bellcheck: $(CLI_OBJ) $(BUILD)/libbellcheck.a
	$(CC) $(CFLAGS) -o $@ $(CLI_OBJ) $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

$(BUILD)/tests/%: tests/unit/%.c tests/unit/unit.h $(BUILD)/libbellcheck.a
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS_ALL) -Itests/unit $(CFLAGS) $(WARN) -o $@ $< $(BUILD)/libbellcheck.a $(LIBS) $(LDFLAGS)

test: deps-test
	@$(MAKE) --no-print-directory $(BUILD)/bellcheck $(UNIT_BIN)
	@tests/run.sh

demo: deps
	@$(MAKE) --no-print-directory $(BUILD)/bellcheck
	@tests/demo.sh

install: $(BUILD)/bellcheck
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/lib $(DESTDIR)$(PREFIX)/include
	install -m 755 $(BUILD)/bellcheck $(DESTDIR)$(PREFIX)/bin/bellcheck
	install -m 644 $(BUILD)/libbellcheck.a $(DESTDIR)$(PREFIX)/lib/libbellcheck.a
	install -m 644 src/bellcheck.h $(DESTDIR)$(PREFIX)/include/bellcheck.h

clean:
	rm -rf $(BUILD)

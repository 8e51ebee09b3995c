# haloledger - build, demo and tests.  `make demo` and `make test` run `make deps` first.
BUILD    ?= build
CC       ?= gcc
PKGS     := xlsxwriter libcjson
BASEFLAGS := -std=c11 -Wall -Wextra -Werror -O2 -D_POSIX_C_SOURCE=200809L -Iinclude -I$(BUILD)
EXTRA_CFLAGS ?=
CFLAGS_ALL = $(BASEFLAGS) $(EXTRA_CFLAGS) $(shell pkg-config --cflags $(PKGS) 2>/dev/null)
# libcsv ships no pkg-config file (docs/library-notes.md): named here.
LDLIBS_ALL = $(shell pkg-config --libs $(PKGS) 2>/dev/null) -lcsv -lm
CUNIT_LIBS = $(shell pkg-config --libs cunit 2>/dev/null)

LIB_SRC  := $(filter-out src/main.c,$(wildcard src/*.c))
LIB_OBJ  := $(patsubst src/%.c,$(BUILD)/obj/%.o,$(LIB_SRC)) $(BUILD)/obj/catalog_data.o
UNIT_SRC := $(wildcard tests/unit/test_*.c)
UNIT_BIN := $(patsubst tests/unit/%.c,$(BUILD)/%,$(UNIT_SRC))
TOOL_SRC := $(wildcard tests/tools/tool_*.c)
TOOL_BIN := $(patsubst tests/tools/%.c,$(BUILD)/%,$(TOOL_SRC))
SHIM_SRC := $(wildcard tests/tools/shim_*.c)
SHIM_BIN := $(patsubst tests/tools/%.c,$(BUILD)/%.so,$(SHIM_SRC))
HEADERS  := $(wildcard include/*.h) $(wildcard tests/unit/*.h)
# objects of the programs, kept between builds (make would delete them as intermediates)
.SECONDARY: $(BUILD)/obj/main.o $(patsubst tests/unit/%.c,$(BUILD)/obj/t_%.o,$(UNIT_SRC)) \
            $(patsubst tests/tools/%.c,$(BUILD)/obj/tt_%.o,$(TOOL_SRC))

.PHONY: all deps demo test unit sanitize valgrind fuzz mutate bench clean print-link-flags fresh-debian
all: $(BUILD)/haloledger

deps:
	@sh tools/deps.sh

# Every -l flag of every link line (tests/e2e/link_deps.sh checks that make deps installs each).
print-link-flags:
	@echo $(LDLIBS_ALL) $(CUNIT_LIBS)

# As root: the README's set-up, make demo and make test in a bare debootstrapped Debian 12 root.
fresh-debian:
	@sh tools/fresh-debian.sh

$(BUILD)/obj/%.o: src/%.c $(HEADERS) | $(BUILD)/obj
	$(CC) $(CFLAGS_ALL) -c $< -o $@

# The default container catalog is compiled in from templates/containers.json.
$(BUILD)/catalog_data.c: templates/containers.json tools/embed.sh | $(BUILD)/obj
	sh tools/embed.sh $< catalog_default_json > $@
$(BUILD)/obj/catalog_data.o: $(BUILD)/catalog_data.c
	$(CC) $(CFLAGS_ALL) -c $< -o $@

$(BUILD)/libhalo.a: $(LIB_OBJ)
	rm -f $@ && ar rcs $@ $^

# Programs are compiled to objects and linked apart, so a change in one library source
# relinks them without recompiling each (tools/mutate.sh rebuilds once per seeded error).
$(BUILD)/haloledger: $(BUILD)/obj/main.o $(BUILD)/libhalo.a
	$(CC) $(CFLAGS_ALL) $< $(BUILD)/libhalo.a $(LDLIBS_ALL) -o $@

$(BUILD)/obj/t_%.o: tests/unit/%.c $(HEADERS) | $(BUILD)/obj
	$(CC) $(CFLAGS_ALL) -Itests/unit -c $< -o $@
$(BUILD)/test_%: $(BUILD)/obj/t_test_%.o $(BUILD)/libhalo.a
	$(CC) $(CFLAGS_ALL) $< $(BUILD)/libhalo.a $(CUNIT_LIBS) $(LDLIBS_ALL) -o $@

# Test-only command-line probes that end-to-end scripts compare with RDKit/openpyxl.
$(BUILD)/obj/tt_%.o: tests/tools/%.c $(HEADERS) | $(BUILD)/obj
	$(CC) $(CFLAGS_ALL) -Itests/unit -c $< -o $@
$(BUILD)/tool_%: $(BUILD)/obj/tt_tool_%.o $(BUILD)/libhalo.a
	$(CC) $(CFLAGS_ALL) $< $(BUILD)/libhalo.a $(LDLIBS_ALL) -o $@

# LD_PRELOAD shims for fault injection: no EXTRA_CFLAGS, since a sanitizer-instrumented
# preload would have to come after the sanitizer runtime it needs.
$(BUILD)/shim_%.so: tests/tools/shim_%.c | $(BUILD)/obj
	$(CC) -std=c11 -Wall -Wextra -Werror -O2 -fPIC -shared $< -ldl -o $@

$(BUILD)/obj:
	mkdir -p $@

unit: $(UNIT_BIN) $(TOOL_BIN) $(SHIM_BIN) $(BUILD)/bench_floor

# The floors of `make bench`: bare libxlsxwriter, numeric cells or a workbook's own cells (bench/README.md).
$(BUILD)/bench_floor: bench/floor.c | $(BUILD)/obj
	$(CC) $(CFLAGS_ALL) $< $(LDLIBS_ALL) -o $@

# Time and memory on generated campaigns of 1e3..1e5 runs (BENCH_BIG=1 adds 1e6). Not a test.
bench: deps
	@$(MAKE) --no-print-directory all $(BUILD)/bench_floor
	@BUILD=$(BUILD) /usr/bin/python3 bench/bench.py

demo: deps
	@$(MAKE) --no-print-directory all
	@sh tools/demo.sh $(BUILD)/haloledger

test: deps
	@$(MAKE) --no-print-directory all unit
	@BUILD=$(BUILD) sh tests/run.sh

# ASan + UBSan build of everything, then the whole suite on it.
sanitize: deps
	@$(MAKE) --no-print-directory BUILD=build/san \
	  EXTRA_CFLAGS="-fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=all -O1" \
	  all unit
	@BUILD=build/san ASAN_OPTIONS=detect_leaks=1:abort_on_error=1 UBSAN_OPTIONS=halt_on_error=1:print_stacktrace=1 sh tests/run.sh

valgrind: deps
	@$(MAKE) --no-print-directory all unit
	@BUILD=$(BUILD) HL_WRAP="valgrind -q --leak-check=full --errors-for-leak-kinds=definite,indirect --error-exitcode=99" sh tests/run.sh

# Seeded errors (tests/mutations.txt) against the suite, in a scratch copy; slow, not in `make test`.
mutate: deps
	@sh tools/mutate.sh

FUZZ_SECONDS ?= 30
fuzz:
	@sh tools/fuzz.sh $(FUZZ_SECONDS)

clean:
	rm -rf build out

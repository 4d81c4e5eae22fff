# kphi - chemical equilibrium of high-pressure gas reactions with fugacity corrections.
# Targets: all check demo bench sanitize install uninstall clean deps
PREFIX     ?= /usr/local
DESTDIR    ?=
PKG_CONFIG ?= pkg-config
CC         ?= cc
CFLAGS     ?= -O2 -g
WERROR     ?= -Werror
WARN        = -Wall -Wextra -Wshadow -Wstrict-prototypes -Wmissing-prototypes $(WERROR)
PKGS        = gsl yaml-0.1 plplot
BUILD      ?= build
DEPS_OK     = $(BUILD)/.deps-ok

# pkg-config is asked only once the dependencies are known to be there.
PKG_CFLAGS  = $(shell $(PKG_CONFIG) --cflags $(PKGS) 2>/dev/null)
PKG_LIBS    = $(shell $(PKG_CONFIG) --libs $(PKGS) 2>/dev/null)
CHECK_CFLAGS = $(shell $(PKG_CONFIG) --cflags check 2>/dev/null)
CHECK_LIBS  = $(shell $(PKG_CONFIG) --libs check 2>/dev/null)
ALL_CFLAGS  = -std=c11 -D_POSIX_C_SOURCE=200809L $(WARN) -fopenmp -Iinclude -Isrc $(PKG_CFLAGS) $(CPPFLAGS) $(CFLAGS)
ALL_LDFLAGS = -fopenmp $(LDFLAGS)
ALL_LIBS    = $(PKG_LIBS) -lm $(LDLIBS)

LIB_SRC  = $(wildcard src/*.c)
CLI_SRC  = $(wildcard src/cli/*.c)
TEST_SRC = $(wildcard tests/test_*.c tests/validation_*.c)
LIB_OBJ  = $(LIB_SRC:src/%.c=$(BUILD)/obj/%.o)
CLI_OBJ  = $(CLI_SRC:src/cli/%.c=$(BUILD)/obj/cli/%.o)
TEST_BIN = $(TEST_SRC:tests/%.c=$(BUILD)/tests/%)
LIBA     = lib/libkphi.a
BIN      = bin/kphi
VERSION  = $(shell sed -n 's/^#define KPHI_VERSION "\(.*\)"/\1/p' src/version.h 2>/dev/null)

.PHONY: all check demo bench sanitize install uninstall clean deps test-bin fit-alpha
all: $(BIN) $(LIBA)

# Install missing Debian packages when run as root; otherwise say what to run.
deps: $(DEPS_OK)
$(DEPS_OK):
	@sh tools/deps.sh
	@mkdir -p $(BUILD) && touch $@

# The program's compiled-in data directory follows PREFIX (src/cli/datadir.c): the stamp
# holds the PREFIX it was built for and changes only when PREFIX does, so that
# `make install PREFIX=...` after a plain `make` rebuilds what depends on it.
PREFIX_STAMP = $(BUILD)/.prefix
.PHONY: FORCE
$(PREFIX_STAMP): FORCE
	@mkdir -p $(BUILD)
	@[ "$$(cat $@ 2>/dev/null)" = '$(PREFIX)' ] || echo '$(PREFIX)' > $@
$(BUILD)/obj/cli/datadir.o: $(PREFIX_STAMP)

$(BUILD)/obj/cli/%.o: src/cli/%.c | $(DEPS_OK)
	@mkdir -p $(dir $@)
	$(CC) $(ALL_CFLAGS) -DKPHI_DATADIR='"$(PREFIX)/share/kphi"' -MMD -MP -c $< -o $@

$(BUILD)/obj/%.o: src/%.c | $(DEPS_OK)
	@mkdir -p $(dir $@)
	$(CC) $(ALL_CFLAGS) -MMD -MP -c $< -o $@

$(LIBA): $(LIB_OBJ)
	@mkdir -p $(dir $@)
	rm -f $@
	ar rcs $@ $^

$(BIN): $(CLI_OBJ) $(LIBA)
	@mkdir -p $(dir $@)
	$(CC) $(ALL_CFLAGS) $(ALL_LDFLAGS) -o $@ $(CLI_OBJ) $(LIBA) $(ALL_LIBS)

$(BUILD)/tests/%: tests/%.c $(LIBA) tests/testutil.h | $(DEPS_OK)
	@mkdir -p $(dir $@)
	$(CC) $(ALL_CFLAGS) $(CHECK_CFLAGS) -MMD -MP -Itests $(ALL_LDFLAGS) -o $@ $< $(LIBA) $(CHECK_LIBS) $(ALL_LIBS)

test-bin: $(TEST_BIN) $(BIN)

# Every Check suite, then the catalogue of bad inputs (tests/bad/*.yaml beside *.err).
check: test-bin
	@sh tests/run_tests.sh $(BUILD)/tests $(BIN)

demo: $(BIN)
	./$(BIN) solve cases/ammonia_converter.yaml
	./$(BIN) solve cases/methanol_converter.yaml
	./$(BIN) flash cases/ammonia_separator.yaml
	./$(BIN) loop cases/ammonia_loop.yaml

bench: $(BIN) $(BUILD)/bench/kphi_bench
	@sh bench/run.sh $(BUILD)/bench/kphi_bench $(BIN)

$(BUILD)/bench/kphi_bench: bench/bench.c $(LIBA) | $(DEPS_OK)
	@mkdir -p $(dir $@)
	$(CC) $(ALL_CFLAGS) $(ALL_LDFLAGS) -o $@ $< $(LIBA) $(ALL_LIBS)

# The Mathias-Copeman alpha constants of reactions/species.yaml, fitted to published
# vapour pressures (tools/fit_alpha.c says which).
fit-alpha: $(BUILD)/tools/fit_alpha
	./$(BUILD)/tools/fit_alpha reactions/species.yaml

$(BUILD)/tools/fit_alpha: tools/fit_alpha.c $(LIBA) | $(DEPS_OK)
	@mkdir -p $(dir $@)
	$(CC) $(ALL_CFLAGS) $(ALL_LDFLAGS) -o $@ $< $(LIBA) $(ALL_LIBS)

SAN = -O1 -g -fsanitize=address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer
sanitize: | $(DEPS_OK)
	$(MAKE) BUILD=build-san CFLAGS="$(SAN)" LDFLAGS="$(SAN)" BIN=build-san/bin/kphi \
	    LIBA=build-san/lib/libkphi.a check

kphi.pc: Makefile $(PREFIX_STAMP)
	@printf 'prefix=%s\nincludedir=$${prefix}/include\nlibdir=$${prefix}/lib\n\nName: kphi\nDescription: chemical equilibrium of high-pressure gas reactions with fugacity corrections\nVersion: %s\nRequires.private: gsl yaml-0.1 plplot\nCflags: -I$${includedir}\nLibs: -L$${libdir} -lkphi\nLibs.private: -fopenmp -lm\n' '$(PREFIX)' '$(VERSION)' > $@

install: all kphi.pc
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/lib/pkgconfig \
	    $(DESTDIR)$(PREFIX)/include/kphi $(DESTDIR)$(PREFIX)/share/kphi/reactions
	install -m 755 $(BIN) $(DESTDIR)$(PREFIX)/bin/kphi
	install -m 644 $(LIBA) $(DESTDIR)$(PREFIX)/lib/libkphi.a
	install -m 644 include/kphi/*.h $(DESTDIR)$(PREFIX)/include/kphi/
	install -m 644 reactions/*.yaml $(DESTDIR)$(PREFIX)/share/kphi/reactions/
	install -m 644 kphi.pc $(DESTDIR)$(PREFIX)/lib/pkgconfig/kphi.pc

uninstall:
	rm -f $(DESTDIR)$(PREFIX)/bin/kphi $(DESTDIR)$(PREFIX)/lib/libkphi.a \
	    $(DESTDIR)$(PREFIX)/lib/pkgconfig/kphi.pc
	rm -rf $(DESTDIR)$(PREFIX)/include/kphi $(DESTDIR)$(PREFIX)/share/kphi

clean:
	rm -rf build build-san bin lib kphi.pc

-include $(LIB_OBJ:.o=.d) $(CLI_OBJ:.o=.d) $(TEST_BIN:=.d)

# Fuzz the species, reaction-set and case loaders and the override parsers with libFuzzer
# (clang): make fuzz SECONDS=60. Findings go to fuzz/findings/, the corpus grows in
# fuzz/corpus-work/; the target exits nonzero when the fuzzer found something.
SECONDS    ?= 60
FUZZ_CC    ?= clang
FUZZ_FLAGS  = -g -O1 -fno-omit-frame-pointer -fsanitize=fuzzer,address,undefined \
              -fno-sanitize-recover=all
FUZZ_SRC    = src/error.c src/units.c src/species.c src/thermo.c src/eos.c src/eos_bb.c \
              src/rxnset.c src/rxnset_parse.c src/rxnset_k.c src/case.c src/case_axis.c \
              src/case_loop.c src/species_kij.c src/yamlutil.c
FUZZ_BIN    = $(BUILD)/fuzz/fuzz_loaders
.PHONY: fuzz
fuzz: $(FUZZ_BIN)
	@sh fuzz/run.sh $(FUZZ_BIN) $(SECONDS)

$(BUILD)/.fuzz-deps-ok: | $(DEPS_OK)
	@sh tools/deps.sh fuzz
	@touch $@

$(FUZZ_BIN): fuzz/fuzz_loaders.c $(FUZZ_SRC) $(wildcard src/*.h include/kphi/*.h) | $(BUILD)/.fuzz-deps-ok
	@mkdir -p $(dir $@)
	$(FUZZ_CC) -std=c11 -D_POSIX_C_SOURCE=200809L $(WARN) -Iinclude -Isrc \
	    $(shell $(PKG_CONFIG) --cflags gsl yaml-0.1) $(FUZZ_FLAGS) \
	    -DKPHI_SOURCE_DIR='"$(CURDIR)"' -o $@ fuzz/fuzz_loaders.c $(FUZZ_SRC) \
	    $(shell $(PKG_CONFIG) --libs gsl yaml-0.1) -lm

# steep — build, test and install. `make help` lists the targets.

LUA        ?= lua5.4
PREFIX     ?= /usr/local
DESTDIR    ?=
LUA_LIBDIR  = $(PREFIX)/lib/lua/5.4
LUA_SHARE   = $(PREFIX)/share/lua/5.4

# Debian packages the build and the tests need (make deps installs the missing ones).
DEB_PACKAGES = gcc make pkg-config lua5.4 liblua5.4-dev libgsl-dev libcerf-dev lua-unit lua-cjson \
               valgrind clang libclang-rt-14-dev librsvg2-bin libgmp-dev

CC         ?= cc
WARN        = -std=c99 -Wall -Wextra -Werror
PKG_CFLAGS  = $(shell pkg-config --cflags lua5.4 gsl libcerf)
# The module does not link liblua: the host program (lua5.4 or an embedding
# application) provides the Lua API, as Lua's own C modules expect.
PKG_LIBS    = $(shell pkg-config --libs gsl libcerf)

SRC  = $(wildcard ext/*.c)
HDR  = $(wildcard ext/*.h)
MODULE      = lua/steep/core.so
ASAN_MODULE = ext/asan/steep/core.so
SAN_FLAGS   = -fsanitize=address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer
KERNEL_SRC  = ext/series.c ext/tape.c ext/problem.c ext/quad.c ext/geom.c ext/roots.c ext/path.c \
              ext/invmap.c ext/rings.c ext/airy.c ext/mjet.c ext/mexpand.c ext/mcrit.c
KERNEL_TESTS = tests/c/test_kernels.c tests/c/test_airy.c

.PHONY: all deps test asan memcheck fuzz bench demo install uninstall env clean help

all: $(MODULE)

$(MODULE): $(SRC) $(HDR)
	$(CC) $(WARN) -O2 -fPIC -shared $(PKG_CFLAGS) $(CFLAGS) -o $@ $(SRC) $(PKG_LIBS) -lm $(LDFLAGS)

$(ASAN_MODULE): $(SRC) $(HDR)
	@mkdir -p $(dir $@)
	$(CC) $(WARN) -O1 -g -fPIC -shared $(SAN_FLAGS) $(PKG_CFLAGS) -o $@ $(SRC) $(PKG_LIBS) -lm

# C-level tests of the numerical kernels (no Lua involved).
tests/c/test_kernels: $(KERNEL_TESTS) tests/c/kernel_check.h $(KERNEL_SRC) $(HDR)
	$(CC) $(WARN) -O2 -Iext -o $@ $(KERNEL_TESTS) $(KERNEL_SRC) -lm

tests/c/test_kernels_asan: $(KERNEL_TESTS) tests/c/kernel_check.h $(KERNEL_SRC) $(HDR)
	$(CC) $(WARN) -O1 -g $(SAN_FLAGS) -Iext -o $@ $(KERNEL_TESTS) $(KERNEL_SRC) -lm

# GSL, libcerf and exact-rational (GMP) reference values for the Lua tests (test-only,
# never installed; the plain build serves make asan too).
# (gnu11: its quadruple-precision Airy reference uses GCC's __float128)
tests/ref/gslref.so: tests/ref/gslref.c
	$(CC) $(WARN) -std=gnu11 -O2 -fPIC -shared $(PKG_CFLAGS) $(CFLAGS) -o $@ tests/ref/gslref.c $(PKG_LIBS) -lcerf -lgmp -lquadmath -lm $(LDFLAGS)

# A C program embedding Lua with the extension linked in, two threads with a lua_State
# each (tests/embed/host.c; tests/test_embed.lua runs it).
EMBED_LIBS = $(shell pkg-config --libs lua5.4) $(PKG_LIBS) -lm
tests/embed/host: tests/embed/host.c $(SRC) $(HDR)
	$(CC) $(WARN) -O2 -pthread $(PKG_CFLAGS) -Iext -o $@ tests/embed/host.c $(SRC) $(EMBED_LIBS)

tests/embed/host_asan: tests/embed/host.c $(SRC) $(HDR)
	$(CC) $(WARN) -O1 -g -pthread $(SAN_FLAGS) $(PKG_CFLAGS) -Iext -o $@ tests/embed/host.c $(SRC) $(EMBED_LIBS)

deps:
	@missing=$$(for p in $(DEB_PACKAGES); do \
	    dpkg-query -W -f='$${Status}\n' $$p 2>/dev/null | grep -q '^install ok installed' || echo $$p; \
	  done); \
	if [ -z "$$missing" ]; then exit 0; fi; \
	if [ "$$(id -u)" = 0 ]; then \
	  echo "installing: $$missing"; \
	  apt-get update -qq && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq $$missing; \
	else \
	  echo "missing packages; run as root:"; \
	  echo "  apt-get update && apt-get install -y $$missing"; exit 1; \
	fi

test: deps
	@$(MAKE) --no-print-directory $(MODULE) tests/c/test_kernels tests/ref/gslref.so tests/embed/host
	$(LUA) tests/run.lua

# The whole suite with AddressSanitizer and UndefinedBehaviorSanitizer. lua5.4 itself is
# not instrumented, so the ASan runtime is preloaded.
asan: deps
	@$(MAKE) --no-print-directory $(ASAN_MODULE) tests/c/test_kernels_asan tests/ref/gslref.so \
	  tests/embed/host_asan
	LD_PRELOAD=$$($(CC) -print-file-name=libasan.so) ASAN_OPTIONS=detect_leaks=1 \
	  STEEP_CPATH='ext/asan/?.so' STEEP_KERNEL_TESTS=tests/c/test_kernels_asan \
	  STEEP_EMBED_HOST=tests/embed/host_asan \
	  $(LUA) tests/run.lua

# The C kernel tests and a chosen part of the suite under valgrind's memcheck, plain
# build. A definite or indirect leak or any memory error fails it. Valgrind runs the suite
# some 35 times slower than natively (about 40 minutes whole), and make asan already runs
# all of it with leak detection; memcheck adds what ASan does not see (reads of
# uninitialized memory) on the classes below, chosen to reach the bindings and kernels
# widely and every bad-input path (about 8 minutes; STEEP_SLOWDOWN stretches the
# bad-input tests' limit on a case's time). `make memcheck MEMCHECK_CLASSES=`
# (empty) runs the whole suite.
VALGRIND = valgrind -q --leak-check=full --show-leak-kinds=definite,indirect \
           --errors-for-leak-kinds=definite,indirect --error-exitcode=1
MEMCHECK_CLASSES = TestBadInput TestComplex TestExprDag TestExprErrors TestSeriesBasics \
  TestSeriesErrors TestTapeEval TestJetsOrders TestSeriesRevert TestSeriesCompose \
  TestQuadAiry TestQuadBranchCut TestQuadCircle TestLandscapeValleys TestLandscapeErrors \
  TestLandscapeSaddles TestLandscapeSingularities TestExpandErrors \
  TestExpandDegenerateSaddle TestExpandAiry TestAiry TestInfinity TestPeriodic \
  TestStripQuadrature TestTrustSaddles TestTrustTails TestUniformAiry TestUniformPole \
  TestMultiJets TestMultiCritical TestMultiErrors TestSaddlepointBadInput \
  TestRoutesBadInput TestEmbed TestCuspParts TestResumInterface TestStokesAiry \
  TestCuspPearcey TestMultiLaplace TestResumGamma TestRecipesCoefficients \
  TestUniformCoalescence TestTrustPoles TestTrustEndpoints TestQuadDeformation \
  TestQuadLongPath TestExpandEndpoint TestExpandStirling
memcheck: deps
	@$(MAKE) --no-print-directory $(MODULE) tests/c/test_kernels tests/ref/gslref.so tests/embed/host
	STEEP_SLOWDOWN=30 STEEP_KERNEL_TESTS='$(VALGRIND) tests/c/test_kernels' \
	  $(VALGRIND) $(LUA) tests/run.lua \
	  $(foreach c,$(MEMCHECK_CLASSES),-p '^$(c)%.')

# libFuzzer harnesses of the C kernels (tests/fuzz/, no Lua) and of the bindings (through
# a Lua state, fuzz_bindings), with ASan and UBSan.
# `make fuzz SECONDS=N` runs each for N seconds from the seeds in tests/fuzz/corpus/<h>/;
# new inputs go to tests/fuzz/bin/corpus/<h>/ (not versioned). A crash, a sanitizer report
# or an input slower than FUZZ_TIMEOUT seconds fails it; the input is kept in
# tests/fuzz/bin/<h>-crash-* (or -timeout-*), the log in tests/fuzz/bin/<h>.log.
FUZZ_CC      = clang
FUZZ_FLAGS   = -std=c99 -Wall -Wextra -Werror -g -O1 -fsanitize=fuzzer,address,undefined \
               -fno-sanitize-recover=all -fno-omit-frame-pointer
FUZZ_SRC     = $(sort $(KERNEL_SRC) ext/invmap.c)
FUZZERS      = tape series paths bindings multi
SECONDS     ?= 60
FUZZ_TIMEOUT = 10

tests/fuzz/bin/fuzz_%: tests/fuzz/fuzz_%.c tests/fuzz/fuzz.h $(FUZZ_SRC) $(HDR)
	@mkdir -p $(dir $@)
	$(FUZZ_CC) $(FUZZ_FLAGS) -Iext -o $@ $< $(FUZZ_SRC) -lm

# The bindings' harness links the whole module and Lua, as an embedding host does.
tests/fuzz/bin/fuzz_bindings: tests/fuzz/fuzz_bindings.c tests/fuzz/fuzz.h $(SRC) $(HDR)
	@mkdir -p $(dir $@)
	$(FUZZ_CC) $(FUZZ_FLAGS) $(PKG_CFLAGS) -Iext -o $@ $< $(SRC) $(EMBED_LIBS)

fuzz: deps
	@$(MAKE) --no-print-directory $(FUZZERS:%=tests/fuzz/bin/fuzz_%)
	@for h in $(FUZZERS); do \
	  mkdir -p tests/fuzz/bin/corpus/$$h; \
	  echo "fuzz_$$h: $(SECONDS) s"; \
	  tests/fuzz/bin/fuzz_$$h -max_total_time=$(SECONDS) -timeout=$(FUZZ_TIMEOUT) \
	    -max_len=4096 -print_final_stats=1 -artifact_prefix=tests/fuzz/bin/$$h- \
	    tests/fuzz/bin/corpus/$$h tests/fuzz/corpus/$$h >tests/fuzz/bin/$$h.log 2>&1 \
	    || { tail -n 60 tests/fuzz/bin/$$h.log; echo "fuzz_$$h FAILED"; exit 1; }; \
	  grep -E '^(#[0-9]+[[:space:]]+DONE|stat::number_of_executed_units|stat::slowest_unit)' \
	    tests/fuzz/bin/$$h.log; \
	done

bench: deps $(MODULE) tests/bench/native.so tests/bench/qagi.so tests/ref/gslref.so
	$(LUA) tests/bench/run.lua
	$(LUA) tests/bench/speed.lua
	$(LUA) tests/bench/cold.lua

tests/bench/native.so: tests/bench/native.c ext/bind.h ext/steep.h
	$(CC) $(WARN) -O2 -fPIC -shared $(PKG_CFLAGS) -Iext -o $@ tests/bench/native.c -lm

# GSL's QAGI/QAGIU on the Airy integral, for comparison with J:quad (bench only).
tests/bench/qagi.so: tests/bench/qagi.c
	$(CC) $(WARN) -O2 -fPIC -shared $(PKG_CFLAGS) -o $@ tests/bench/qagi.c $(PKG_LIBS) -lm

demo: deps $(MODULE)
	$(LUA) -e 'package.path="lua/?.lua;lua/?/init.lua;"..package.path; package.cpath="lua/?.so;"..package.cpath' recipes/demo.lua

install: $(MODULE)
	install -d $(DESTDIR)$(LUA_LIBDIR)/steep $(DESTDIR)$(LUA_SHARE)/steep
	install -m 755 $(MODULE) $(DESTDIR)$(LUA_LIBDIR)/steep/core.so
	install -m 644 lua/steep/*.lua $(DESTDIR)$(LUA_SHARE)/steep/

uninstall:
	rm -rf $(DESTDIR)$(LUA_LIBDIR)/steep $(DESTDIR)$(LUA_SHARE)/steep

# `eval "$$(make -s env)"` lets a plain lua5.4 find the uninstalled tree.
env:
	@echo "export LUA_PATH='$(CURDIR)/lua/?.lua;$(CURDIR)/lua/?/init.lua;;'"
	@echo "export LUA_CPATH='$(CURDIR)/lua/?.so;;'"

clean:
	rm -rf $(MODULE) ext/asan tests/c/test_kernels tests/c/test_kernels_asan tests/bench/native.so \
	  tests/bench/qagi.so tests/ref/gslref.so tests/fuzz/bin \
	  tests/embed/host tests/embed/host_asan

help:
	@echo "make deps     install missing Debian packages (as root)"
	@echo "make          build the C module $(MODULE)"
	@echo "make test     run every test (Lua and C)"
	@echo "make asan     the test suite under ASan + UBSan"
	@echo "make memcheck the kernel tests and a part of the suite under valgrind memcheck"
	@echo "make fuzz     libFuzzer on the C kernels, SECONDS=N per harness (default 60)"
	@echo "make bench    benchmarks (figures printed, nothing asserted)"
	@echo "make demo     the demo analysis"
	@echo "make install  PREFIX=$(PREFIX) [DESTDIR=...]"
	@echo "make env      shell lines to use the tree uninstalled"

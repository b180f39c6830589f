# avow: build, test and demo.  See DEVELOPERS.md.
#
#   make            build build/avow and build/libavow.a
#   make check      every test (unit, diagnostics, formatting, reference checks)
#   make demo       the main example end to end, with its pictures and HTML report
#   make sanitize   AddressSanitizer + UndefinedBehaviorSanitizer build running every test
#   make install    install under PREFIX (default /usr/local; DESTDIR for staging)
#   make uninstall  remove exactly what make install put there
#   make fuzz       libFuzzer harnesses (clang), FUZZ_SECONDS each (default 60), then the
#                   regression inputs replayed (tests/fuzz/README.md)
#   make clean      remove build/

CC       ?= cc
B        ?= build
SANFLAGS ?=
OPT      ?= -O2
CFLAGS_ALL = -std=c11 -pthread -Wall -Wextra -Wpedantic -Werror -Wshadow -Wstrict-prototypes \
             -Wmissing-prototypes -Wno-unused-parameter -D_POSIX_C_SOURCE=200809L \
             $(OPT) -g $(SANFLAGS) -Iinclude -Isrc -I$(B)/gen $(CFLAGS)
LDLIBS_ALL = -lgsl -lgslcblas -lgmp -lcrypto -lm $(LDLIBS)

SRC      := $(sort $(wildcard src/*.c))
LIBSRC   := $(filter-out src/main.c,$(SRC))
LIBOBJ   := $(patsubst src/%.c,$(B)/obj/%.o,$(LIBSRC)) $(B)/obj/lexer.o $(B)/obj/parser.o
UNITSRC  := $(sort $(wildcard tests/unit/test_*.c))
UNITBIN  := $(patsubst tests/unit/%.c,$(B)/tests/%,$(UNITSRC))
TOOLSRC  := $(sort $(wildcard tests/tools/*.c))
TOOLBIN  := $(patsubst tests/tools/%.c,$(B)/tests/tools/%,$(TOOLSRC))
DEPSOK   := $(B)/.deps-ok
DEPSTEST := $(B)/.deps-test-ok

# Fuzz harnesses (tests/fuzz/fuzz_NAME.c): replayed without libFuzzer by `check`.
FUZZNAMES  := study data run
FUZZREPLAY := $(patsubst %,$(B)/tests/fuzz/replay-%,$(FUZZNAMES))
FUZZHDR    := tests/fuzz/fuzz_common.h

.PHONY: all check demo sanitize clean deps unit install uninstall fuzz fuzzers
all: $(B)/avow

deps: $(DEPSOK)
$(DEPSOK): mk/deps.sh
	@sh mk/deps.sh
	@mkdir -p $(B) && touch $@

# What only the tests need (the browser test of the HTML report).
$(DEPSTEST): mk/deps.sh | $(DEPSOK)
	@sh mk/deps.sh test
	@mkdir -p $(B) && touch $@

# Generated sources: never committed, always made here.
$(B)/gen/lexer.c: grammar/lexer.re $(B)/gen/parser.h | $(DEPSOK)
	@mkdir -p $(B)/gen
	re2c -W -Werror --no-generation-date -o $@ $<

$(B)/gen/parser.c $(B)/gen/parser.h: grammar/parser.y | $(DEPSOK)
	@mkdir -p $(B)/gen
	cp grammar/parser.y $(B)/gen/parser.y
	cd $(B)/gen && lemon -q -T/usr/share/lemon/lempar.c parser.y
	@test -f $(B)/gen/parser.h

$(B)/obj/lexer.o: $(B)/gen/lexer.c
	@mkdir -p $(B)/obj
	$(CC) $(CFLAGS_ALL) -c -o $@ $<

# Lemon's template has an unused-variable pattern in some configurations; keep -Werror.
$(B)/obj/parser.o: $(B)/gen/parser.c
	@mkdir -p $(B)/obj
	$(CC) $(CFLAGS_ALL) -Wno-missing-prototypes -c -o $@ $<

$(B)/obj/%.o: src/%.c $(B)/gen/parser.h | $(DEPSOK)
	@mkdir -p $(B)/obj
	$(CC) $(CFLAGS_ALL) -MMD -MP -c -o $@ $<

$(B)/libavow.a: $(LIBOBJ)
	rm -f $@
	ar rcs $@ $^

$(B)/avow: $(B)/obj/main.o $(B)/libavow.a
	$(CC) $(CFLAGS_ALL) -o $@ $^ $(LDLIBS_ALL)

$(B)/tests/%: tests/unit/%.c $(B)/libavow.a
	@mkdir -p $(B)/tests
	$(CC) $(CFLAGS_ALL) -o $@ $< $(B)/libavow.a -lcmocka $(LDLIBS_ALL)

# Helper programs for the reference checks (tests/ref/*.py), e.g. srange_probe.
$(B)/tests/tools/%: tests/tools/%.c $(B)/libavow.a
	@mkdir -p $(B)/tests/tools
	$(CC) $(CFLAGS_ALL) -o $@ $< $(B)/libavow.a $(LDLIBS_ALL)

# The fuzz harnesses with a plain main() that runs each input file once (tests/fuzz/replay.c).
$(B)/tests/fuzz/replay-%: tests/fuzz/fuzz_%.c tests/fuzz/replay.c $(FUZZHDR) $(B)/libavow.a
	@mkdir -p $(B)/tests/fuzz
	$(CC) $(CFLAGS_ALL) -o $@ tests/fuzz/replay.c $< $(B)/libavow.a $(LDLIBS_ALL)

# The libFuzzer binaries; built by `make fuzz` in build/fuzz with clang (see below).
$(B)/fuzz-%: tests/fuzz/fuzz_%.c $(FUZZHDR) $(B)/libavow.a
	$(CC) $(CFLAGS_ALL) -fsanitize=fuzzer -o $@ $< $(B)/libavow.a $(LDLIBS_ALL)

fuzzers: $(patsubst %,$(B)/fuzz-%,$(FUZZNAMES))

unit: $(UNITBIN)

check: $(B)/avow $(UNITBIN) $(TOOLBIN) $(FUZZREPLAY) | $(DEPSTEST)
	@sh tests/run-all.sh $(B)

demo: $(B)/avow
	$(B)/avow check examples/cure/cure.avow
	$(B)/avow run examples/cure/cure.avow
	$(B)/avow run examples/cure/cure.avow --plots $(B)/demo --format html -o $(B)/demo/report.html
	@echo
	@echo "demo pictures (SVG): $(B)/demo/means.svg, intervals.svg, residuals.svg, probability.svg, spread.svg"
	@echo "demo HTML report: $(B)/demo/report.html"

sanitize:
	$(MAKE) B=build/sanitize OPT=-O1 \
	  SANFLAGS="-fsanitize=address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer" check

# libFuzzer with AddressSanitizer and UndefinedBehaviorSanitizer: the library built by
# clang into build/fuzz, each harness run for FUZZ_SECONDS, then the regression inputs.
FUZZ_SECONDS ?= 60
fuzz:
	@sh mk/deps.sh fuzz
	$(MAKE) B=build/fuzz CC=clang OPT=-O1 \
	  SANFLAGS="-fsanitize=fuzzer-no-link,address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer" fuzzers
	sh tests/fuzz/run.sh build/fuzz $(FUZZ_SECONDS) $(FUZZNAMES)

clean:
	rm -rf build

# Installation. Every file make install writes is listed here, and make uninstall
# removes exactly these (and the two folders of avow's own, when left empty).
PREFIX       ?= /usr/local
DESTDIR      ?=
BINDIR       ?= $(PREFIX)/bin
LIBDIR       ?= $(PREFIX)/lib
INCLUDEDIR   ?= $(PREFIX)/include
DATADIR      ?= $(PREFIX)/share
MANDIR       ?= $(DATADIR)/man
PKGCONFIGDIR ?= $(LIBDIR)/pkgconfig
VIMDIR       ?= $(DATADIR)/vim/vimfiles
EMACSDIR     ?= $(DATADIR)/emacs/site-lisp
BASHCOMPDIR  ?= $(DATADIR)/bash-completion/completions
INSTALL      ?= install
VERSION    := $(shell sed -n 's/^\#define AVOW_VERSION "\(.*\)"/\1/p' include/avow/render.h)
HEADERS    := $(notdir $(sort $(wildcard include/avow/*.h)))
VIMFILES   := syntax/avow.vim ftdetect/avow.vim indent/avow.vim
TMFILES    := avow.tmLanguage.json language-configuration.json
D          := $(DESTDIR)

install: $(B)/avow $(B)/libavow.a
	$(INSTALL) -d $(D)$(BINDIR) $(D)$(LIBDIR) $(D)$(PKGCONFIGDIR) $(D)$(INCLUDEDIR)/avow \
	  $(D)$(MANDIR)/man1 $(D)$(MANDIR)/man5 $(addprefix $(D)$(VIMDIR)/,$(sort $(dir $(VIMFILES)))) \
	  $(D)$(EMACSDIR) $(D)$(DATADIR)/avow $(D)$(BASHCOMPDIR)
	$(INSTALL) -m 755 $(B)/avow $(D)$(BINDIR)/avow
	$(INSTALL) -m 644 $(B)/libavow.a $(D)$(LIBDIR)/libavow.a
	$(INSTALL) -m 644 $(addprefix include/avow/,$(HEADERS)) $(D)$(INCLUDEDIR)/avow
	sed -e 's|@PREFIX@|$(PREFIX)|' -e 's|@LIBDIR@|$(LIBDIR)|' -e 's|@INCLUDEDIR@|$(INCLUDEDIR)|' \
	  -e 's|@VERSION@|$(VERSION)|' mk/avow.pc.in >$(D)$(PKGCONFIGDIR)/avow.pc
	chmod 644 $(D)$(PKGCONFIGDIR)/avow.pc
	$(INSTALL) -m 644 doc/avow.1 $(D)$(MANDIR)/man1/avow.1
	$(INSTALL) -m 644 doc/avow.5 $(D)$(MANDIR)/man5/avow.5
	for f in $(VIMFILES); do $(INSTALL) -m 644 editor-support/vim/$$f $(D)$(VIMDIR)/$$f || exit 1; done
	$(INSTALL) -m 644 editor-support/emacs/avow-mode.el $(D)$(EMACSDIR)/avow-mode.el
	$(INSTALL) -m 644 $(addprefix editor-support/textmate/,$(TMFILES)) $(D)$(DATADIR)/avow
	$(INSTALL) -m 644 editor-support/bash/avow $(D)$(BASHCOMPDIR)/avow

uninstall:
	rm -f $(D)$(BINDIR)/avow $(D)$(LIBDIR)/libavow.a $(D)$(PKGCONFIGDIR)/avow.pc \
	  $(addprefix $(D)$(INCLUDEDIR)/avow/,$(HEADERS)) \
	  $(D)$(MANDIR)/man1/avow.1 $(D)$(MANDIR)/man5/avow.5 \
	  $(addprefix $(D)$(VIMDIR)/,$(VIMFILES)) $(D)$(EMACSDIR)/avow-mode.el \
	  $(addprefix $(D)$(DATADIR)/avow/,$(TMFILES)) $(D)$(BASHCOMPDIR)/avow
	for d in $(D)$(INCLUDEDIR)/avow $(D)$(DATADIR)/avow; do \
	  if [ -d $$d ] && [ -z "$$(ls -A $$d)" ]; then rmdir $$d; fi; done

-include $(wildcard $(B)/obj/*.d)

# The benchmark (bench/README.md); run by hand, not part of check. Phony: bench/ is a folder.
.PHONY: bench
bench: $(B)/avow
	sh bench/run.sh $(B)/avow

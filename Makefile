# avow: build, test and demo.  See DEVELOPERS.md.
#
#   make            build build/avow and build/libavow.a
#   make check      every test (unit, diagnostics, formatting, reference checks)
#   make demo       the main example end to end
#   make sanitize   AddressSanitizer + UndefinedBehaviorSanitizer build running every test
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

.PHONY: all check demo sanitize clean deps unit
all: $(B)/avow

deps: $(DEPSOK)
$(DEPSOK): mk/deps.sh
	@sh mk/deps.sh
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

unit: $(UNITBIN)

check: $(B)/avow $(UNITBIN) $(TOOLBIN)
	@sh tests/run-all.sh $(B)

demo: $(B)/avow
	$(B)/avow check examples/cure/cure.avow
	$(B)/avow run examples/cure/cure.avow

sanitize:
	$(MAKE) B=build/sanitize OPT=-O1 \
	  SANFLAGS="-fsanitize=address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer" check

clean:
	rm -rf build

-include $(wildcard $(B)/obj/*.d)

# The benchmark (bench/README.md); run by hand, not part of check. Phony: bench/ is a folder.
.PHONY: bench
bench: $(B)/avow
	sh bench/run.sh $(B)/avow

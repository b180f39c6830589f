#!/bin/sh
# make install and make uninstall, into a temporary DESTDIR with PREFIX=/usr/local: every
# file is there with its mode and nothing else; a small C program compiles and links
# against the installed libavow with `pkg-config --cflags --libs --static avow` and
# reviews an example exactly as the installed avow does; the installed avow runs an
# example; the installed pages, editor files and completion are the sources' own; after
# make uninstall no file is left.
set -u
AVOW=${AVOW:-build/avow}
B=$(dirname "$AVOW")
pass=0; fail=0
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
D=$tmp/dest
P=/usr/local
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL $*"; }
# make without the settings of a make that may have started this test
mk() { env -u MAKEFLAGS -u MAKELEVEL -u MFLAGS make -s --no-print-directory B="$B" PREFIX=$P DESTDIR="$D" "$@"; }

if mk install >"$tmp/install.log" 2>&1; then ok; else bad "make install"; cat "$tmp/install.log"; fi

# Every file, with its mode; and no other file.
{
    echo "755 bin/avow"
    echo "644 lib/libavow.a"
    echo "644 lib/pkgconfig/avow.pc"
    for h in include/avow/*.h; do echo "644 $h"; done
    echo "644 share/man/man1/avow.1"
    echo "644 share/man/man5/avow.5"
    echo "644 share/vim/vimfiles/syntax/avow.vim"
    echo "644 share/vim/vimfiles/ftdetect/avow.vim"
    echo "644 share/vim/vimfiles/indent/avow.vim"
    echo "644 share/emacs/site-lisp/avow-mode.el"
    echo "644 share/avow/avow.tmLanguage.json"
    echo "644 share/avow/language-configuration.json"
    echo "644 share/bash-completion/completions/avow"
} | LC_ALL=C sort -k2 >"$tmp/want"
(cd "$D$P" 2>/dev/null && find . ! -type d -exec stat -c '%a %n' {} + | sed 's| \./| |') | LC_ALL=C sort -k2 >"$tmp/got"
if [ "$(wc -l <"$tmp/want")" -ge 30 ] && cmp -s "$tmp/want" "$tmp/got"; then ok
else bad "the installed files (want, got):"; diff "$tmp/want" "$tmp/got"; fi
[ -z "$(cd "$D" && find . ! -type d ! -path "./${P#/}/*")" ] && ok || bad "files outside PREFIX: $(cd "$D" && find . ! -type d ! -path "./${P#/}/*")"

# The installed copies are the sources.
for pair in "doc/avow.1 share/man/man1/avow.1" "doc/avow.5 share/man/man5/avow.5" \
            "editor-support/vim/syntax/avow.vim share/vim/vimfiles/syntax/avow.vim" \
            "editor-support/vim/ftdetect/avow.vim share/vim/vimfiles/ftdetect/avow.vim" \
            "editor-support/vim/indent/avow.vim share/vim/vimfiles/indent/avow.vim" \
            "editor-support/emacs/avow-mode.el share/emacs/site-lisp/avow-mode.el" \
            "editor-support/textmate/avow.tmLanguage.json share/avow/avow.tmLanguage.json" \
            "editor-support/textmate/language-configuration.json share/avow/language-configuration.json" \
            "editor-support/bash/avow share/bash-completion/completions/avow" \
            "$B/libavow.a lib/libavow.a" "$B/avow bin/avow"; do
    set -- $pair
    if cmp -s "$1" "$D$P/$2"; then ok; else bad "$D$P/$2 is not a copy of $1"; fi
done

# pkg-config: the file names the prefix, the version, and the libraries libavow needs.
pc=$D$P/lib/pkgconfig/avow.pc
version=$(sed -n 's/^#define AVOW_VERSION "\(.*\)"/\1/p' include/avow/render.h)
export PKG_CONFIG_PATH="$D$P/lib/pkgconfig" PKG_CONFIG_SYSROOT_DIR="$D"
unset PKG_CONFIG_LIBDIR
if [ "$(pkg-config --modversion avow 2>&1)" = "$version" ] && grep -qx "prefix=$P" "$pc" \
   && grep -qx 'Libs.private: -lgsl -lgslcblas -lgmp -lcrypto -lm -pthread' "$pc"; then ok
else bad "avow.pc:"; cat "$pc"; pkg-config --modversion avow; fi
flags=$(pkg-config --cflags --libs --static avow 2>&1)
case " $flags " in
    *" -I$D$P/include "*"-L$D$P/lib "*"-lavow -lgsl -lgslcblas -lgmp -lcrypto -lm -pthread "*) ok ;;
    *) bad "pkg-config --cflags --libs --static avow: $flags" ;;
esac

# A program against the installed library: the plan review of an example, as the
# installed avow prints it. A library built with sanitizers needs them at link time.
cat >"$tmp/review.c" <<'EOF'
#include <stdio.h>
#include <string.h>

#include <avow/plan.h>
#include <avow/render.h>
#include <avow/syntax.h>

int main(int argc, char **argv)
{
    avow_ctx ctx;
    ast_study study;
    avow_plan plan;
    strbuf out = {0};
    if (argc != 2 || ctx_load(&ctx, argv[1]) != 0) return 2;
    memset(&plan, 0, sizeof plan);
    plan.path = argv[1];
    if (parse_study(&ctx, &study) != 0 || check_study(&ctx, &study, &plan) != 0) return 1;
    render_plan_text(&ctx, &plan, &out);
    if (out.failed) return 3;
    fwrite(out.s, 1, out.len, stdout);
    sb_free(&out);
    ctx_free(&ctx);
    return 0;
}
EOF
san=""
nm "$D$P/lib/libavow.a" 2>/dev/null | grep -q '__asan_' && san="-fsanitize=address,undefined"
if cc -std=c11 -Wall -Wextra -Werror $san -o "$tmp/review" "$tmp/review.c" $flags >"$tmp/cc.log" 2>&1; then ok
else bad "compiling and linking against the installed libavow:"; cat "$tmp/cc.log"; fi
"$D$P/bin/avow" check examples/cure/cure.avow >"$tmp/check.txt" 2>&1
if [ -x "$tmp/review" ] && "$tmp/review" examples/cure/cure.avow >"$tmp/review.txt" 2>&1 \
   && grep -q "plan review" "$tmp/review.txt" && cmp -s "$tmp/review.txt" "$tmp/check.txt"; then ok
else bad "the linked program does not review examples/cure/cure.avow as avow check does"; head -5 "$tmp/review.txt"; fi

# The installed command runs an example, and gives the report the built one gives.
"$AVOW" run examples/cure/cure.avow >"$tmp/run-built.txt" 2>&1
if "$D$P/bin/avow" run examples/cure/cure.avow >"$tmp/run.txt" 2>&1 && grep -q "Analysis of variance" "$tmp/run.txt" \
   && cmp -s "$tmp/run.txt" "$tmp/run-built.txt"; then ok
else bad "the installed avow run examples/cure/cure.avow"; head -5 "$tmp/run.txt"; fi
if MANPATH="$D$P/share/man" man -w avow 2>/dev/null | grep -q "$D$P/share/man/man1/avow.1" || ! command -v man >/dev/null; then ok
else bad "man -w avow does not find the installed page"; fi

# make uninstall leaves no file, and removes avow's own folders.
if mk uninstall >"$tmp/uninstall.log" 2>&1; then ok; else bad "make uninstall"; cat "$tmp/uninstall.log"; fi
left=$(cd "$D" && find . ! -type d)
if [ -z "$left" ]; then ok; else bad "files left after make uninstall: $left"; fi
for d in include/avow share/avow; do
    if [ ! -e "$D$P/$d" ]; then ok; else bad "$D$P/$d is left after make uninstall"; fi
done

echo "install: $pass passed, $fail failed"
[ "$fail" -eq 0 ]

#!/bin/sh
# Prints the words of the study language, one a line, for the editor tests. Run from the
# top of the source tree.
#   words.sh keywords     the keywords: the string rules of grammar/lexer.re before its
#                         identifier rule (the single source of the keyword list)
#   words.sh contextual   names that mean something in some places but are not keywords
#                         (the functions cell and interaction, `interactions all`,
#                         `variances equal`): the names the checker compares with
#                         name_eq in src/*.c, less the keywords
set -u
keywords() {
    awk '/^[ \t]*ident[ \t]*\{/ { exit }
         /^[ \t]*"[a-z0-9_]+"[ \t]*\{[ \t]*TOK\(TK_[A-Z0-9_]+\);[ \t]*\}/ {
             w = $1; gsub(/"/, "", w); print w }' grammar/lexer.re
}
case ${1:-} in
keywords) keywords ;;
contextual)
    kw=$(keywords)
    sed -n 's/.*name_eq([^;]*"\([a-z_][a-z0-9_]*\)").*/\1/p' src/*.c | sort -u |
        while read -r w; do
            case " $(echo $kw) " in *" $w "*) ;; *) echo "$w" ;; esac
        done ;;
*)
    echo "usage: tests/editors/words.sh keywords|contextual" >&2; exit 64 ;;
esac

#!/bin/sh
# Editor files. Vim: the syntax, ftdetect and indent files load on every example without
# an error and set the filetype; chosen places get the expected syntax groups; and
# re-indenting each example with its indentation removed gives the file back (the
# examples are in avow fmt's layout, blocks indented by four). Emacs: avow-mode.el
# byte-compiles without a warning, .avow files open in avow-mode, chosen places get the
# expected faces, and re-indenting gives the examples back.
set -u
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
pass=0; fail=0
ok() { pass=$((pass + 1)); }
bad() { fail=$((fail + 1)); echo "FAIL $*"; }
files="tests/editors/sample.avow $(ls examples/*/*.avow)"
# A file with braces inside strings and comments, and a one-line block.
cat >"$tmp/braces.avow" <<'EOF'
study "a { study"
response y  # no block {
factor f "levels {" {
    a "a } level"
    b  # }
}
factor g { x y }
plan {
    seed 1
}
EOF

# --- Vim ------------------------------------------------------------------------------
vimrun() { # vimrun FILE MESSAGES-FILE COMMANDS...: vim -es with the editor files
    vim_file=$1; vim_msg=$2; shift 2
    vim -u NONE -es -N --cmd "redir! > $vim_msg" --cmd 'set rtp^=editor-support/vim' \
        -c 'syntax on' -c 'filetype plugin indent on' -c "e $vim_file" \
        -c 'if &ft != "avow" | cquit | endif' "$@" -c 'redir END' -c 'qa!' </dev/null >/dev/null 2>&1
}
for f in $files "$tmp/braces.avow"; do
    if vimrun "$f" "$tmp/msg" && ! grep -qE '^E[0-9]+:|Error detected' "$tmp/msg"; then ok
    else bad "vim: loading $f"; cat "$tmp/msg"; fi
    sed 's/^[ 	]*//' "$f" >"$tmp/flat.avow"
    if vimrun "$tmp/flat.avow" "$tmp/msg" -c 'normal! gg=G' -c "w! $tmp/vim.avow" && cmp -s "$f" "$tmp/vim.avow"; then ok
    else bad "vim: re-indenting $f"; diff "$f" "$tmp/vim.avow" | head -10; fi
done
# Syntax groups at chosen places: LINE COL GROUP (in tests/editors/sample.avow).
cat >"$tmp/expect-vim" <<'EOF'
1 1 avowComment
3 1 avowStatement
3 7 avowString
3 36 avowEscape
5 37 avowKeyword
7 1 avowStatement
8 11 avowKeyword
8 14 avowNumber
12 35 avowNumber
25 7 avowNumber
26 8 avowMethod
29 17 avowLevelRef
29 40 avowOperator
29 45 avowComment
31 17 avowFunction
33 1 avowStatement
33 9 avowKeyword
EOF
sed 's/^\([0-9]*\) \([0-9]*\) .*/silent echo synIDattr(synID(\1, \2, 1), "name")/' "$tmp/expect-vim" >"$tmp/probe.vim"
vimrun tests/editors/sample.avow "$tmp/groups" -c "source $tmp/probe.vim"
grep -v '^$' "$tmp/groups" | grep -v '^"' >"$tmp/got-vim"
cut -d' ' -f3 "$tmp/expect-vim" >"$tmp/want-vim"
if cmp -s "$tmp/want-vim" "$tmp/got-vim"; then ok
else bad "vim: syntax groups in tests/editors/sample.avow (want, got):"; paste "$tmp/expect-vim" "$tmp/got-vim"; fi

# --- Emacs ----------------------------------------------------------------------------
cp editor-support/emacs/avow-mode.el "$tmp/"
if (cd "$tmp" && emacs -Q --batch --eval '(setq byte-compile-error-on-warn t)' \
        -f batch-byte-compile avow-mode.el) >"$tmp/compile" 2>&1 \
   && [ -f "$tmp/avow-mode.elc" ] && ! grep -qi 'warning' "$tmp/compile"; then ok
else bad "emacs: byte-compiling avow-mode.el"; cat "$tmp/compile"; fi
# Faces at chosen places: LINE COL FACE (in tests/editors/sample.avow).
cat >"$tmp/expect-emacs" <<'EOF'
1 1 font-lock-comment-delimiter-face
1 3 font-lock-comment-face
3 1 font-lock-keyword-face
3 7 font-lock-string-face
5 1 font-lock-keyword-face
5 10 font-lock-function-name-face
5 37 font-lock-keyword-face
7 8 font-lock-function-name-face
8 11 font-lock-keyword-face
8 14 font-lock-constant-face
12 35 font-lock-constant-face
25 7 font-lock-constant-face
26 8 font-lock-constant-face
29 10 font-lock-function-name-face
29 17 font-lock-type-face
29 22 nil
29 23 font-lock-variable-name-face
29 45 font-lock-comment-delimiter-face
29 47 font-lock-comment-face
31 17 font-lock-builtin-face
33 9 font-lock-keyword-face
33 15 nil
EOF
emacs -Q --batch -l "$tmp/avow-mode.elc" --eval "
(progn
  (dolist (f (split-string \"$files $tmp/braces.avow\"))
    (let ((orig (with-temp-buffer (insert-file-contents f) (buffer-string))))
      (let ((buf (find-file-noselect f)))
        (princ (format \"mode %s %s\\n\" f (buffer-local-value 'major-mode buf)))
        (kill-buffer buf))
      (with-temp-buffer
        (insert orig)
        (goto-char (point-min))
        (while (re-search-forward \"^[ \\t]+\" nil t) (replace-match \"\"))
        (avow-mode)
        (let ((inhibit-message t)) (indent-region (point-min) (point-max)))
        (princ (format \"indent %s %s\\n\" f (if (string= (buffer-string) orig) \"same\" \"changed\"))))))
  (let ((probes (with-temp-buffer
                  (insert-file-contents \"$tmp/expect-emacs\")
                  (mapcar #'split-string (split-string (buffer-string) \"\\n\" t)))))
    (with-temp-buffer
      (insert-file-contents \"tests/editors/sample.avow\")
      (avow-mode)
      (font-lock-ensure)
      (dolist (p probes)
        (goto-char (point-min))
        (forward-line (1- (string-to-number (nth 0 p))))
        (forward-char (1- (string-to-number (nth 1 p))))
        (let ((face (get-text-property (point) 'face)))
          (princ (format \"face %s %s %s\\n\" (nth 0 p) (nth 1 p)
                         (if (consp face) (car face) face))))))))" >"$tmp/emacs-out" 2>"$tmp/emacs-err"
for f in $files "$tmp/braces.avow"; do
    if grep -qxF "mode $f avow-mode" "$tmp/emacs-out"; then ok; else bad "emacs: $f does not open in avow-mode"; fi
    if grep -qxF "indent $f same" "$tmp/emacs-out"; then ok; else bad "emacs: re-indenting $f"; fi
done
sed 's/^/face /' "$tmp/expect-emacs" >"$tmp/want-emacs"
grep '^face ' "$tmp/emacs-out" >"$tmp/got-emacs"
if cmp -s "$tmp/want-emacs" "$tmp/got-emacs"; then ok
else bad "emacs: faces in tests/editors/sample.avow (want, got):"; paste "$tmp/want-emacs" "$tmp/got-emacs"; cat "$tmp/emacs-err"; fi

echo "editors: $pass passed, $fail failed"
[ "$fail" -eq 0 ]

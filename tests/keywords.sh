#!/bin/sh
# One keyword list. The keywords of the study language are the string rules of
# grammar/lexer.re before its identifier rule (tests/editors/words.sh); the editor files
# must agree with it: the Vim syntax file, the Emacs mode and the TextMate grammar each
# highlight every keyword, and nothing else but the few names that mean something in
# some places without being keywords (words.sh contextual). Vim and Emacs are also asked
# which words they highlight. The bash completion's commands, options and formats must be
# those of `avow --help` and `avow help COMMAND`.
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
sh tests/editors/words.sh keywords >"$tmp/keywords"
sh tests/editors/words.sh contextual >"$tmp/contextual"

# What Vim highlights: each keyword alone on a line, and the syntax group it gets.
vim -u NONE -es -N --cmd 'set rtp^=editor-support/vim' -c 'syntax on' -c 'filetype on' \
    -c "e $tmp/keywords" -c 'set ft=avow' \
    -c "redir! > $tmp/vim-groups" \
    -c 'for n in range(1, line("$")) | silent echo getline(n) synIDattr(synID(n, 1, 1), "name") | endfor' \
    -c 'redir END' -c 'qa!' </dev/null >/dev/null 2>&1
echo "exit $?" >>"$tmp/vim-groups"

# What Emacs highlights: each keyword alone in an avow-mode buffer, and its face.
emacs -Q --batch -l editor-support/emacs/avow-mode.el --eval "
(with-temp-buffer
  (insert-file-contents \"$tmp/keywords\")
  (let ((words (split-string (buffer-string))))
    (dolist (w words)
      (with-temp-buffer
        (insert w \"\\n\")
        (avow-mode)
        (font-lock-ensure)
        (princ (format \"%s %S\\n\" w (get-text-property 1 'face)))))))" >"$tmp/emacs-faces" 2>"$tmp/emacs-err"
echo "exit $?" >>"$tmp/emacs-faces"

# The bash completion's lists.
bash --norc --noprofile -c '
source editor-support/bash/avow
for v in commands global_options options_check options_run options_sheet options_fmt formats; do
    eval "echo $v: \$_avow_$v"
done' >"$tmp/bash-lists" 2>&1

# The help texts.
"$AVOW" --help >"$tmp/help-" 2>&1
for c in check run sheet fmt help; do "$AVOW" help "$c" >"$tmp/help-$c" 2>&1; done

TMP=$tmp "$PY" - <<'EOF'
import json, os, re, sys
tmp = os.environ["TMP"]
read = lambda name: open(os.path.join(tmp, name), encoding="utf-8").read()
keywords = read("keywords").split()
contextual = set(read("contextual").split())
kw = set(keywords)
allowed = kw | contextual
passed = failed = 0

def check(ok, what, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL " + what + (": " + detail if detail else ""))

def agree(name, words, every_keyword):
    """words: what the editor file highlights; every_keyword: the subset that must hold
    every keyword (the plain keyword lists)."""
    missing = sorted(kw - every_keyword)
    extra = sorted(set(words) - allowed)
    check(not missing, name + " highlights every keyword of grammar/lexer.re", "missing " + " ".join(missing))
    check(not extra, name + " highlights no word that is not a keyword", "extra " + " ".join(extra))

# The list itself: 36 keywords today; lexer.re's token_names must name the same ones.
lexer = open("grammar/lexer.re", encoding="utf-8").read()
named = set(re.findall(r'\[TK_[A-Z0-9_]+\]\s*=\s*"`([a-z0-9_]+)`"', lexer))
check(len(keywords) >= 30 and "study" in kw and "fdr" in kw, "words.sh finds the keywords of grammar/lexer.re",
      " ".join(keywords))
check(len(keywords) == len(kw), "no keyword rule is repeated in grammar/lexer.re")
check(named == kw, "token_names in grammar/lexer.re names exactly the keyword rules",
      "only in rules: %s; only in token_names: %s" % (" ".join(sorted(kw - named)), " ".join(sorted(named - kw))))
check({"cell", "interaction"} <= contextual, "words.sh finds the function names that are not keywords",
      " ".join(sorted(contextual)))

# Vim: the syn keyword lists, and words in \(a\|b\) alternatives of syn match patterns.
vim = open("editor-support/vim/syntax/avow.vim", encoding="utf-8").read()
vim_kw, vim_all = set(), set()
for line in vim.splitlines():
    m = re.match(r"\s*syn(?:tax)?\s+keyword\s+\w+\s+(.*)", line)
    if m:
        words = [w for w in m.group(1).split() if "=" not in w and w not in ("contained", "skipwhite", "skipnl")]
        vim_kw.update(words); vim_all.update(words)
    elif re.match(r"\s*syn(?:tax)?\s+match\b", line):
        for group in re.findall(r"\\\(((?:[a-z0-9_]+\\\|)+[a-z0-9_]+)\\\)", line):
            vim_all.update(group.split("\\|"))
agree("the Vim syntax file", vim_all, vim_kw)
groups = read("vim-groups")
check(groups.rstrip().endswith("exit 0"), "Vim loads the syntax file without errors", groups[-300:])
got = dict(l.split(None, 1) if " " in l.strip() else (l.strip(), "") for l in groups.splitlines() if l.strip() and not l.startswith("exit"))
bare = sorted(k for k in keywords if not got.get(k, "").strip().startswith("avow"))
check(not bare, "Vim gives every keyword, alone on a line, an avow syntax group", " ".join(bare))

# Emacs: the word lists of avow-mode.el.
el = open("editor-support/emacs/avow-mode.el", encoding="utf-8").read()
el_kw, el_all = set(), set()
for name, body in re.findall(r"\(defconst\s+avow-mode-([a-z-]+)\s+'\(([^()]*)\)", el):
    words = re.findall(r'"([^"]*)"', body)
    el_all.update(words)
    if name != "name-functions":
        el_kw.update(words)
agree("the Emacs mode", el_all, el_kw)
faces = read("emacs-faces")
check(faces.rstrip().endswith("exit 0"), "Emacs loads avow-mode.el", read("emacs-err")[-300:])
got = dict(l.split(None, 1) for l in faces.splitlines() if l.strip() and not l.startswith("exit"))
bare = sorted(k for k in keywords if got.get(k, "nil").strip() == "nil")
check(not bare, "Emacs gives every keyword, alone on a line, a face", " ".join(bare))

# TextMate: words in (a|b|c) groups of every match/begin/end pattern.
tm = json.load(open("editor-support/textmate/avow.tmLanguage.json", encoding="utf-8"))
tm_all, tm_kw = set(), set()
def walk(node):
    if isinstance(node, dict):
        for k, v in node.items():
            if k in ("match", "begin", "end") and isinstance(v, str):
                for group in re.findall(r"\((?:\?:)?((?:[a-z0-9_]+\|)*[a-z0-9_]+)\)", v):
                    words = group.split("|")
                    tm_all.update(words)
                    if "(?=" not in v:
                        tm_kw.update(words)
            else:
                walk(v)
    elif isinstance(node, list):
        for v in node:
            walk(v)
walk(tm)
agree("the TextMate grammar", tm_all, tm_kw)

# Bash completion against the help texts.
lists = {}
for line in read("bash-lists").splitlines():
    if ": " in line or line.endswith(":"):
        k, _, v = line.partition(":")
        lists[k.strip()] = v.split()
opt = re.compile(r"(?<![\w-])(--?[a-z][a-z-]*)")
usage = read("help-")
section = lambda text, head: re.search(r"^" + head + r":\n((?:  .*\n)+)", text, re.M)
cmds = section(usage, "commands")
commands = re.findall(r"^  ([a-z]+)\b", cmds.group(1), re.M) if cmds else []
opts = section(usage, "options")
check(commands and lists.get("commands") == commands,
      "the completion's commands are those of avow --help, in order",
      "completion %s, help %s" % (lists.get("commands"), commands))
check(opts and sorted(lists.get("global_options", [])) == sorted(set(opt.findall(opts.group(1)))),
      "the completion's global options are those of avow --help",
      "completion %s, help %s" % (lists.get("global_options"), opts and sorted(set(opt.findall(opts.group(1))))))
for c in commands:
    text = read("help-" + c)
    check(text.startswith("usage: avow"), "avow help %s describes the command" % c, text[:100])
    if c == "help":
        continue
    want = sorted(set(opt.findall(text)))
    have = sorted(lists.get("options_" + c, []))
    check(have == want, "the completion's options of %s are those of avow help %s" % (c, c),
          "completion %s, help %s" % (have, want))
found = set()
for c in commands:
    for a, b in re.findall(r"--format ([a-z]+)(?:\|([a-z]+))?", read("help-" + c)):
        found.update(x for x in (a, b) if x)
check(found and sorted(lists.get("formats", [])) == sorted(found), "the completion's formats are those of the help",
      "completion %s, help %s" % (lists.get("formats"), sorted(found)))

print("keywords: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
EOF

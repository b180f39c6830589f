#!/bin/sh
# The help texts fit 80 columns and agree with the manual, avow(1): the commands of
# `avow --help` are those of the SYNOPSIS and COMMANDS sections; each command's usage
# line is its SYNOPSIS line; every option a help text mentions has an entry in OPTIONS
# and every entry there is in a help text; an entry that says "With COMMAND:" belongs to
# exactly the commands whose help mentions it. The manual is read as `man` shows it
# (groff -Tascii, with long lines so that nothing is hyphenated).
set -u
AVOW=${AVOW:-build/avow}
PY=/usr/bin/python3
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
LC_ALL=C groff -man -Tascii -rLL=5000n -rIN=30n -P-cbou doc/avow.1 >"$tmp/man" 2>"$tmp/man-err"
"$AVOW" --help >"$tmp/top" 2>&1; echo "exit $?" >>"$tmp/top"
"$AVOW" -h >"$tmp/top-h" 2>&1; echo "exit $?" >>"$tmp/top-h"
"$AVOW" help >"$tmp/top-help" 2>&1; echo "exit $?" >>"$tmp/top-help"
"$AVOW" >/dev/null 2>"$tmp/top-none"; echo "exit $?" >>"$tmp/top-none"
for c in check run sheet fmt help; do
    "$AVOW" help "$c" >"$tmp/help-$c" 2>&1; echo "exit $?" >>"$tmp/help-$c"
    "$AVOW" "$c" --help >"$tmp/opt-$c" 2>&1; echo "exit $?" >>"$tmp/opt-$c"
done
TMP=$tmp "$PY" - <<'EOF'
import os, re, sys
tmp = os.environ["TMP"]
def read(name):
    text = open(os.path.join(tmp, name), encoding="utf-8").read()
    body, _, status = text.rpartition("exit ")
    return body, status.strip()
passed = failed = 0
def check(ok, what, detail=""):
    global passed, failed
    if ok:
        passed += 1
    else:
        failed += 1
        print("FAIL " + what + (": " + str(detail) if detail else ""))

opt_re = re.compile(r"(?<![\w-])(--?[a-z][a-z-]*)")
norm = lambda s: " ".join(s.split()).lower()

# 80 columns, and the same text by every way of asking.
top, st = read("top")
check(st == "0" and top.startswith("usage: avow"), "avow --help prints the usage", top[:80])
for name in ("top-h", "top-help"):
    text, st = read(name)
    check(st == "0" and text == top, "%s prints the same as avow --help" % name.replace("top-", "avow "))
none, st = read("top-none")
check(st == "64" and none == top, "avow without arguments prints the usage on standard error and exits 64")
texts = {"avow --help": top}
usage_cmds = re.search(r"^commands:\n((?:  .*\n)+)", top, re.M)
commands = re.findall(r"^  ([a-z]+)\b", usage_cmds.group(1), re.M) if usage_cmds else []
check(commands == ["check", "run", "sheet", "fmt", "help"], "avow --help lists the commands", commands)
helps = {}
for c in commands:
    text, st = read("help-" + c)
    other, st2 = read("opt-" + c)
    if c == "help":
        check(st == "0" and text == top, "avow help help prints the usage")
        continue
    check(st == "0" and text.startswith("usage: avow " + c + " "), "avow help %s describes %s" % (c, c), text[:80])
    check(st2 == "0" and other == text, "avow %s --help prints the same as avow help %s" % (c, c))
    helps[c] = text
    texts["avow help " + c] = text
for name, text in texts.items():
    for i, line in enumerate(text.splitlines(), 1):
        check(len(line) <= 80 and "\t" not in line, "%s, line %d fits 80 columns" % (name, i),
              "%d columns: %s" % (len(line), line))

# The manual as rendered: sections at the margin, tags at column 30, bodies at 60.
man = open(os.path.join(tmp, "man"), encoding="utf-8").read()
man_err = open(os.path.join(tmp, "man-err"), encoding="utf-8").read()
check(not man_err and "SYNOPSIS" in man, "groff renders avow(1)", man_err[:300])
sections, cur = {}, None
for line in man.splitlines():
    if re.match(r"^[A-Z][A-Z ]+$", line):
        cur = line.strip(); sections[cur] = []
    elif cur:
        sections[cur].append(line)
def entries(name):
    """(tag, body) of each tagged paragraph of a section."""
    out, lines = [], sections.get(name, [])
    for i, line in enumerate(lines):
        if re.match(r"^ {30}\S", line):
            m = re.match(r"^ {30}(\S.*?)(?: {2,}(\S.*))?$", line)
            tag, body = m.group(1), m.group(2)
            if body is None or line.index(body) != 60:
                nxt = next((l for l in lines[i + 1:] if l.strip()), "")
                if not re.match(r"^ {60}\S", nxt):
                    continue                  # a plain paragraph, not a tag
                tag, body = line.strip(), ""
            rest = []
            for l in lines[i + 1:]:
                if re.match(r"^ {30}\S", l):
                    break
                rest.append(l.strip())
            out.append((tag, " ".join([body] + rest)))
    return out

synopsis = [norm(l) for l in sections.get("SYNOPSIS", []) if l.strip()]
syn_cmds = [l.split()[1] for l in synopsis if len(l.split()) > 1 and not l.split()[1].startswith("-")]
check(syn_cmds == commands, "the SYNOPSIS has the commands of avow --help", syn_cmds)
cmd_tags = [t.split()[0] for t, _ in entries("COMMANDS")]
check(cmd_tags == commands, "the COMMANDS section describes the commands of avow --help", cmd_tags)
glob = re.search(r"^options:\n((?:  .*\n)+)", top, re.M)
glob_opts = sorted(set(opt_re.findall(glob.group(1)))) if glob else []
syn_glob = sorted(set(opt_re.findall(" ".join(l for l in synopsis if l.split()[1:2] and l.split()[1].startswith("-")))))
check(glob_opts and syn_glob == glob_opts, "the SYNOPSIS has the options of avow --help", (syn_glob, glob_opts))
for c, text in helps.items():
    usage = norm(text.split("\n\n")[0].replace("usage:", "", 1))
    line = next((l for l in synopsis if l.split()[1:2] == [c]), None)
    check(line == usage, "the SYNOPSIS line of %s is its usage line" % c, (line, usage))

opt_entries = entries("OPTIONS")
man_opts = {}
for tag, body in opt_entries:
    o = tag.split()[0]
    man_opts.setdefault(o, []).append(body)
help_opts = set(glob_opts)
for text in helps.values():
    help_opts |= set(opt_re.findall(text))
check(len(opt_entries) >= 8, "the OPTIONS section has its entries", [t for t, _ in opt_entries])
check(help_opts == set(man_opts), "the help texts and OPTIONS have the same options",
      "only in help: %s; only in the manual: %s" % (sorted(help_opts - set(man_opts)), sorted(set(man_opts) - help_opts)))
for o, bodies in sorted(man_opts.items()):
    said = set()
    for b in bodies:
        said |= set(re.findall(r"\bWith (check|run|sheet|fmt):", b))
    if not said:
        continue
    users = {c for c, text in helps.items() if o in opt_re.findall(text)}
    check(said == users, "OPTIONS gives %s to the commands whose help has it" % o,
          "manual: %s; help: %s" % (sorted(said), sorted(users)))
helpers = {c for c, text in helps.items() if "--help" in opt_re.findall(text)}
body = " ".join(man_opts.get("--help", []))
check(helpers == set(helps) and all(re.search(r"\b%s\b" % c, body) for c in helpers),
      "every command takes --help, and OPTIONS says so for each", (sorted(helpers), body[:200]))

print("help: %d passed, %d failed" % (passed, failed))
sys.exit(1 if failed else 0)
EOF

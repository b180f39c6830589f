#!/bin/sh
# The TextMate grammar (editor-support/textmate): every example and the fixture
# tests/editors/sample.avow are tokenized by vscode-textmate with vscode-oniguruma, the
# libraries editors use, and keywords, strings, numbers, comments and level references
# must get the expected scopes (tests/textmate/tokenize.js). The two npm packages, at
# the exact versions of tests/textmate/package-lock.json, are installed with `npm ci`
# into the build folder (BUILD/textmate-test), once per lock file.
set -u
AVOW=${AVOW:-build/avow}
B=$(dirname "$AVOW")
dir=$B/textmate-test
mkdir -p "$dir"
if ! cmp -s tests/textmate/package-lock.json "$dir/package-lock.json" || [ ! -d "$dir/node_modules/vscode-textmate" ]; then
    cp tests/textmate/package.json tests/textmate/package-lock.json "$dir/"
    if ! (cd "$dir" && npm ci --ignore-scripts --no-audit --no-fund --loglevel=error >npm.log 2>&1); then
        echo "FAIL npm ci in $dir:"; cat "$dir/npm.log"; rm -f "$dir/package-lock.json"
        echo "textmate: 0 passed, 1 failed"; exit 1
    fi
fi
node tests/textmate/tokenize.js "$dir" "$(sh tests/editors/words.sh keywords)" \
    "$(sh tests/editors/words.sh contextual)" tests/editors/sample.avow examples/*/*.avow

// Tokenizes study files with the TextMate grammar of editor-support/textmate and checks
// the scopes it gives (run by tests/textmate.sh).
//   node tokenize.js MODULES_DIR KEYWORDS CONTEXTUAL FILE...
// MODULES_DIR holds node_modules with vscode-textmate and vscode-oniguruma; KEYWORDS and
// CONTEXTUAL are space-separated lists (tests/editors/words.sh); FILE... are study files.
// Prints one line per failure and "textmate: N passed, N failed"; exits 1 on a failure.
'use strict';
const fs = require('fs');
const path = require('path');

const [modulesArg, keywordArg, contextualArg, ...files] = process.argv.slice(2);
const modulesDir = path.resolve(modulesArg);
const vsctm = require(path.join(modulesDir, 'node_modules', 'vscode-textmate'));
const onig = require(path.join(modulesDir, 'node_modules', 'vscode-oniguruma'));
const grammarPath = 'editor-support/textmate/avow.tmLanguage.json';
const configPath = 'editor-support/textmate/language-configuration.json';
const keywords = new Set(keywordArg.split(/\s+/).filter(Boolean));
const contextual = new Set(contextualArg.split(/\s+/).filter(Boolean));

let pass = 0, fail = 0;
function check(ok, what) {
    if (ok) pass++;
    else { fail++; console.log('FAIL ' + what); }
}

// The scopes a keyword may get, and whether a token is inside a string or a comment.
const keywordScope = /^(keyword\.control\.statement|keyword\.other|support\.function|constant\.language\.method)\.avow$/;
const isKeywordToken = (t) => t.scopes.some((s) => keywordScope.test(s));
const inStringOrComment = (t) => t.scopes.some((s) => /^(string|comment)\./.test(s));

function tokenizeText(grammar, text) {
    let stack = vsctm.INITIAL;
    return text.split('\n').map((line) => {
        const r = grammar.tokenizeLine(line, stack);
        stack = r.ruleStack;
        return r.tokens.map((t) => ({
            text: line.slice(t.startIndex, t.endIndex), start: t.startIndex, scopes: t.scopes,
        }));
    });
}

// The scopes of the token that covers `needle` (its nth occurrence) on a line.
function scopesAt(tokens, line, needle, nth) {
    let at = -1;
    for (let k = 0; k <= (nth || 0); k++) at = line.indexOf(needle, at + 1);
    if (at < 0) return null;
    for (const t of tokens) if (t.start <= at && at < t.start + t.text.length) return t.scopes;
    return null;
}

// Expectations on chosen lines: [file, line text (prefix), needle, scope, occurrence].
const expected = [
    ['tests/editors/sample.avow', '# A study with every kind', '# A study', 'comment.line.number-sign.avow'],
    ['tests/editors/sample.avow', '# A study with every kind', '#', 'punctuation.definition.comment.avow'],
    ['tests/editors/sample.avow', 'study "Spindle', 'study', 'keyword.control.statement.avow'],
    ['tests/editors/sample.avow', 'study "Spindle', 'Spindle speed', 'string.quoted.double.avow'],
    ['tests/editors/sample.avow', 'study "Spindle', '\\"', 'constant.character.escape.avow'],
    ['tests/editors/sample.avow', 'study "Spindle', 'trial', 'string.quoted.double.avow'],
    ['tests/editors/sample.avow', 'response finish', 'finish', 'entity.name.type.avow'],
    ['tests/editors/sample.avow', 'response finish', 'unit', 'keyword.other.avow'],
    ['tests/editors/sample.avow', 'response finish', 'um', 'string.quoted.double.avow'],
    ['tests/editors/sample.avow', 'factor speed', 'speed', 'entity.name.type.avow'],
    ['tests/editors/sample.avow', 'factor speed', '{', 'punctuation.section.block.begin.avow'],
    ['tests/editors/sample.avow', '    low   at 1000', 'at', 'keyword.other.avow'],
    ['tests/editors/sample.avow', '    low   at 1000', '1000', 'constant.numeric.avow'],
    ['tests/editors/sample.avow', '    high  at 2000', 'code', 'keyword.other.avow'],
    ['tests/editors/sample.avow', 'factor feed', '0.1', 'constant.numeric.avow'],
    ['tests/editors/sample.avow', 'factor feed', '2e-1', 'constant.numeric.avow'],
    ['tests/editors/sample.avow', 'factor feed', '}', 'punctuation.section.block.end.avow'],
    ['tests/editors/sample.avow', 'alpha 0.05', 'alpha', 'keyword.control.statement.avow'],
    ['tests/editors/sample.avow', 'alpha 0.05', '0.05', 'constant.numeric.avow'],
    ['tests/editors/sample.avow', 'adjust holm', 'holm', 'constant.language.method.avow'],
    ['tests/editors/sample.avow', 'contrast fast', 'fast', 'entity.name.function.contrast.avow'],
    ['tests/editors/sample.avow', 'contrast fast', 'speed', 'variable.other.factor.avow', 1],
    ['tests/editors/sample.avow', 'contrast fast', '.high', 'punctuation.accessor.avow'],
    ['tests/editors/sample.avow', 'contrast fast', 'high', 'variable.other.level.avow'],
    ['tests/editors/sample.avow', 'contrast fast', 'low', 'variable.other.level.avow'],
    ['tests/editors/sample.avow', 'contrast fast', '<', 'keyword.operator.avow'],
    ['tests/editors/sample.avow', 'contrast fast', '0', 'constant.numeric.avow'],
    ['tests/editors/sample.avow', 'contrast fast', '# a faster', 'comment.line.number-sign.avow'],
    ['tests/editors/sample.avow', 'contrast both', 'interaction', 'support.function.avow'],
    ['tests/editors/sample.avow', 'contrast both', 'feed', 'variable.other.factor.avow'],
    ['tests/editors/sample.avow', 'explore versus feed.low', 'versus', 'keyword.other.avow'],
    ['tests/editors/sample.avow', 'explore versus feed.low', 'low', 'variable.other.level.avow'],
    ['tests/editors/sample.avow', 'explore pairs speed within', 'within', 'keyword.other.avow'],
    ['tests/editors/sample.avow', '    seed 7', 'seed', 'keyword.other.avow'],
    ['examples/cure/cure.avow', 'contrast bend', 'trend', 'support.function.avow'],
    ['examples/cure/cure.avow', 'contrast bend', '2', 'constant.numeric.avow'],
    ['examples/cure/cure.avow', 'contrast bend', '# quadratic trend', 'comment.line.number-sign.avow'],
    ['examples/cure/cure.avow', 'contrast heat', 'mean', 'support.function.avow'],
    ['examples/cure/cure.avow', 'contrast heat', 'any oven cure', 'string.quoted.double.avow'],
    ['examples/cure/cure.avow', 'orthogonal', 'orthogonal', 'keyword.control.statement.avow'],
    ['examples/cure/cure.avow', '    uvflash', 'UV-F', 'string.quoted.double.avow'],
];
// Tokens that must not get a keyword scope: [file, line text (prefix), needle].
const plain = [
    ['tests/editors/sample.avow', 'contrast fast', 'fast'],            // a name, not a keyword
    ['tests/editors/sample.avow', 'interactions all', 'all'],          // contextual, not a keyword
    ['tests/editors/sample.avow', 'study "Spindle', 'speed'],          // inside a string
    ['tests/editors/sample.avow', 'contrast fast', 'faster'],          // inside a comment
    ['examples/cure/cure.avow', '    oven60', 'oven60'],               // a level name
];

async function main() {
    const wasm = fs.readFileSync(path.join(modulesDir, 'node_modules', 'vscode-oniguruma', 'release', 'onig.wasm'));
    await onig.loadWASM(wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength));
    const registry = new vsctm.Registry({
        onigLib: Promise.resolve({
            createOnigScanner: (patterns) => new onig.OnigScanner(patterns),
            createOnigString: (s) => new onig.OnigString(s),
        }),
        loadGrammar: async (scopeName) => scopeName === 'source.avow'
            ? vsctm.parseRawGrammar(fs.readFileSync(grammarPath, 'utf8'), grammarPath) : null,
    });
    const grammar = await registry.loadGrammar('source.avow');
    check(grammar !== null, 'the grammar source.avow loads');

    // Every file: no invalid token; every keyword outside strings and comments gets a
    // keyword scope, and only keywords (and the contextual names) get one; every number
    // outside strings and comments is constant.numeric.
    const tokensOf = {};
    for (const f of files) {
        const text = fs.readFileSync(f, 'utf8');
        const lines = text.split('\n');
        const toks = tokenizeText(grammar, text);
        tokensOf[f] = { lines, toks };
        let bad = 0;
        toks.forEach((lineToks, i) => {
            for (const t of lineToks) {
                const where = `${f}:${i + 1}: \`${t.text}\` (${t.scopes.join(' ')})`;
                if (t.scopes.some((s) => s.startsWith('invalid.'))) { bad++; console.log('  invalid token ' + where); }
                if (inStringOrComment(t)) continue;
                for (const m of t.text.matchAll(/[A-Za-z_][A-Za-z0-9_]*|[0-9][0-9.eE+-]*/g)) {
                    const w = m[0];
                    if (keywords.has(w) && !isKeywordToken(t)) { bad++; console.log('  keyword without a keyword scope ' + where); }
                    if (/^[A-Za-z_]/.test(w) && isKeywordToken(t) && !keywords.has(w) && !contextual.has(w)) {
                        bad++; console.log('  a keyword scope on a name ' + where);
                    }
                    if (/^[0-9]/.test(w) && !t.scopes.includes('constant.numeric.avow')) {
                        bad++; console.log('  a number without constant.numeric ' + where);
                    }
                }
            }
        });
        check(bad === 0, `${f}: every token scoped as expected`);
    }

    // Each keyword on a line of its own.
    for (const k of keywords) {
        const [toks] = tokenizeText(grammar, k);
        check(toks.length === 1 && toks[0].text === k && isKeywordToken(toks[0]),
              `keyword \`${k}\` alone gets a keyword scope (${toks.map((t) => t.scopes.join(' ')).join(' | ')})`);
    }

    for (const [f, prefix, needle, scope, nth] of expected) {
        const d = tokensOf[f];
        const i = d ? d.lines.findIndex((l) => l.startsWith(prefix)) : -1;
        const scopes = i >= 0 ? scopesAt(d.toks[i], d.lines[i], needle, nth) : null;
        check(scopes !== null && scopes.includes(scope),
              `${f}: line "${prefix}...": \`${needle}\` is ${scope} (got ${scopes ? scopes.join(' ') : 'no such line or token'})`);
    }
    for (const [f, prefix, needle] of plain) {
        const d = tokensOf[f];
        const i = d ? d.lines.findIndex((l) => l.startsWith(prefix)) : -1;
        const scopes = i >= 0 ? scopesAt(d.toks[i], d.lines[i], needle) : null;
        check(scopes !== null && !scopes.some((s) => keywordScope.test(s)),
              `${f}: line "${prefix}...": \`${needle}\` has no keyword scope (got ${scopes ? scopes.join(' ') : 'no such line or token'})`);
    }

    // language-configuration.json: comments, brackets, auto-closing pairs, and the
    // indentation rules agree with the files' own indentation.
    const conf = JSON.parse(fs.readFileSync(configPath, 'utf8'));
    check(conf.comments && conf.comments.lineComment === '#', 'configuration: line comments begin with #');
    const pairs = (list) => new Set((list || []).map((p) => (Array.isArray(p) ? p.join('') : p.open + p.close)));
    const brackets = pairs(conf.brackets), closing = pairs(conf.autoClosingPairs), surround = pairs(conf.surroundingPairs);
    for (const p of ['{}', '()']) check(brackets.has(p), `configuration: brackets ${p}`);
    for (const p of ['{}', '()', '""']) check(closing.has(p), `configuration: auto-closing pair ${p}`);
    for (const p of ['{}', '()', '""']) check(surround.has(p), `configuration: surrounding pair ${p}`);
    const inc = new RegExp(conf.indentationRules.increaseIndentPattern);
    const dec = new RegExp(conf.indentationRules.decreaseIndentPattern);
    for (const f of files) {
        const lines = tokensOf[f].lines;
        const indent = (l) => l.match(/^ */)[0].length;
        let bad = 0;
        lines.forEach((l, i) => {
            if (!l.trim()) return;
            let j = i + 1;
            while (j < lines.length && !lines[j].trim()) j++;
            const opens = j < lines.length && indent(lines[j]) > indent(l);
            if (inc.test(l) !== opens) { bad++; console.log(`  ${f}:${i + 1}: increaseIndentPattern ${opens ? 'misses' : 'wrongly matches'} this line`); }
            if (dec.test(l) !== /^\s*\}/.test(l)) { bad++; console.log(`  ${f}:${i + 1}: decreaseIndentPattern is wrong here`); }
        });
        check(bad === 0, `${f}: the indentation rules follow the file's blocks`);
    }
    check(inc.test('factor f "a { b" {  # note {') && !inc.test('factor f { a b }') && !inc.test('# {'),
          'configuration: braces in strings and comments do not open a block');

    console.log(`textmate: ${pass} passed, ${fail} failed`);
    process.exit(fail === 0 ? 0 : 1);
}

main().catch((e) => { console.log('FAIL ' + (e && e.stack ? e.stack : e)); process.exit(1); });

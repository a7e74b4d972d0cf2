// The TextMate grammar, tokenised by the same engine VS Code colours with
// (vscode-textmate and vscode-oniguruma, taken from code-server's embedded VS
// Code, so no extra dependency). Each line below is a netlist line of our own;
// the expected scope for a piece of it follows the grammar's design (scope
// names after the TextMate manual's naming conventions) and the SPICE3 user's
// manual (Quarles 1989) for what a line means: `*` comments, `+` continuations,
// `M` = milli and `MEG` = mega scale factors, element kind by first letter.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { embeddedVscodeFolder, log, repositoryRoot } from './setup.mjs';

const GRAMMAR_PATH = join(repositoryRoot, 'client/syntaxes/spice-netlist.tmLanguage.json');

/** [netlist text (line 1 is the title), the line to look at, a piece of that line, the scope it must carry]. */
const EXPECTATIONS = [
  ['Status LED board\nR1 a b 1k', 0, 'Status LED board', 'markup.heading.title'],
  ['t\n* a comment line', 1, 'a comment', 'comment.line.asterisk'],
  ['t\n*pnlint: rating DRED kind=led if=20m vrrm=5', 1, 'pnlint:', 'keyword.control.directive'],
  ['t\n*pnlint: rating DRED kind=led if=20m vrrm=5', 1, 'rating', 'keyword.other.directive-verb'],
  ['t\n*pnlint: rating DRED kind=led if=20m vrrm=5', 1, 'vrrm', 'variable.parameter.directive-key'],
  ['t\n*pnlint: ignore reversed-diode -- polarity protection', 1, '-- polarity', 'comment.line.reason'],
  ['t\nR1 a b 220 ; pnlint: ignore overdissipation', 1, 'pnlint:', 'keyword.control.directive'],
  ['t\nR1 a b 4.7k ; pull-up', 1, 'R1', 'entity.name.type.element.passive'],
  ['t\nR1 a b 4.7k ; pull-up', 1, '4.7', 'constant.numeric'],
  ['t\nR1 a b 4.7k ; pull-up', 1, 'k ', 'keyword.other.unit.scale-factor'],
  ['t\nR1 a b 4.7k ; pull-up', 1, '; pull-up', 'comment.line.semicolon'],
  ['t\nR1 a b 4.7k $ pull-up', 1, '$ pull-up', 'comment.line.dollar'],
  ['t\nR2 a b 2meg', 1, 'meg', 'keyword.other.unit.scale-factor'],
  ['t\nC1 a 0 100mF', 1, 'm', 'keyword.other.unit.scale-factor'],
  ['t\nC1 a 0 100uF', 1, 'F', 'keyword.other.unit'],
  ['t\nD1 a 0 DRED', 1, 'D1', 'entity.name.function.element.diode'],
  ['t\nV1 vcc 0 DC 5', 1, 'V1', 'support.function.element.source'],
  ['t\nV1 in 0 SIN(0 5 50)', 1, 'SIN', 'support.function.source-specification'],
  ['t\nQ1 c b e QNPN', 1, 'Q1', 'entity.name.class.element.transistor'],
  ['t\nX1 a b LAMP', 1, 'X1', 'entity.name.class.element.subcircuit-instance'],
  ['t\n.model DRED D (IS=1e-19 N=1.9)', 1, '.model', 'keyword.control.dot-command'],
  ['t\n.model DRED D (IS=1e-19 N=1.9)', 1, 'DRED', 'entity.name.type.model'],
  ['t\n.model DRED D (IS=1e-19 N=1.9)', 1, 'D (', 'storage.type.model-type'],
  ['t\n.model DRED D (IS=1e-19 N=1.9)', 1, 'IS', 'variable.parameter'],
  ['t\n.model DRED D (IS=1e-19 N=1.9)', 1, '1e-19', 'constant.numeric'],
  ['t\n.SUBCKT lamp a b', 1, 'lamp', 'entity.name.function.subcircuit'],
  ['t\n.frobnicate 3', 1, '.frobnicate', 'keyword.other.dot-command.unknown'],
  ['t\n.model DRED D\n+ IS=1e-19', 2, '+', 'punctuation.separator.continuation'],
  ['t\nR3 a b {rload*2}', 1, 'rload', 'variable.other.parameter'],
  ['t\nR3 a b {rload*2}', 1, '{', 'punctuation.section.expression.begin'],
  ["t\nR3 a b 'rload/2'", 1, 'rload', 'variable.other.parameter'],
  ['t\nR3 a b {max(rmin, 10)}', 1, 'max', 'support.function.math'],
  ['t\n.control\nop\n.endc', 2, 'op', 'meta.embedded.control'],
];

/** Pieces that must NOT carry a scope: a node name is not a number. */
const NOT_EXPECTED = [
  ['t\nR1 n1 n2 10', 1, 'n1', 'constant.numeric'],
  ['t\n.control\nop\n.endc', 2, 'op', 'keyword.control.dot-command'],
];

export function checkGrammar() {
  const require = createRequire(join(embeddedVscodeFolder, 'package.json'));
  const textmate = require('vscode-textmate');
  const oniguruma = require('vscode-oniguruma');
  const wasm = readFileSync(require.resolve('vscode-oniguruma/release/onig.wasm'));
  return oniguruma.loadWASM(wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength)).then(async () => {
    const registry = new textmate.Registry({
      onigLib: Promise.resolve({
        createOnigScanner: (patterns) => new oniguruma.OnigScanner(patterns),
        createOnigString: (text) => new oniguruma.OnigString(text),
      }),
      loadGrammar: async () => textmate.parseRawGrammar(readFileSync(GRAMMAR_PATH, 'utf8'), GRAMMAR_PATH),
    });
    const grammar = await registry.loadGrammar('source.spice-netlist');
    const scopesOf = (text, lineNumber, piece) => {
      let state = textmate.INITIAL;
      const lines = text.split('\n');
      for (let index = 0; index < lines.length; index++) {
        const result = grammar.tokenizeLine(lines[index], state);
        state = result.ruleStack;
        if (index !== lineNumber) continue;
        const column = lines[index].indexOf(piece);
        if (column < 0) throw new Error(`grammar check: ${JSON.stringify(piece)} is not in ${JSON.stringify(lines[index])}`);
        const token = result.tokens.find((t) => t.startIndex <= column && column < t.endIndex);
        return token?.scopes ?? [];
      }
      return [];
    };
    const failures = [];
    for (const [text, line, piece, scope] of EXPECTATIONS) {
      const scopes = scopesOf(text, line, piece);
      if (!scopes.some((s) => s.startsWith(scope))) failures.push(`${JSON.stringify(piece)} in ${JSON.stringify(text.split('\n')[line])}: expected ${scope}, got ${scopes.join(' ')}`);
    }
    for (const [text, line, piece, scope] of NOT_EXPECTED) {
      const scopes = scopesOf(text, line, piece);
      if (scopes.some((s) => s.startsWith(scope))) failures.push(`${JSON.stringify(piece)} in ${JSON.stringify(text.split('\n')[line])}: must not be ${scope}, got ${scopes.join(' ')}`);
    }
    if (failures.length > 0) throw new Error(`TextMate grammar check failed:\n  ${failures.join('\n  ')}`);
    log(`TextMate grammar: ${EXPECTATIONS.length + NOT_EXPECTED.length} scope checks passed`);
  });
}

if (import.meta.url === `file://${process.argv[1]}`) {
  await checkGrammar();
}

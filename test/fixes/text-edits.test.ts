// An edit never corrupts a file: CRLF line endings, continuation lines, inline comments,
// indentation, included files and subcircuits; new names never collide, whatever their
// case; every edit's line and column agree with its offset. And the ignore fix.
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import type { Fix } from '../../server/src/findings.js';
import { applyFix, checkWithFixes, expectFixHolds, findingOf, MAIN_URI, preferredFix, recheck } from './support.js';

const ngspiceRuns = declareNgspiceGate();

const RED_LED = '.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';

/** Line and column of an offset, counted independently of the code under test (LSP: \r\n, \n and \r end a line). */
function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  const before = text.slice(0, offset);
  const lines = before.split(/\r\n|\n|\r/);
  return { line: lines.length - 1, column: lines[lines.length - 1]!.length };
}

function expectConsistentRanges(files: Record<string, string>, fix: Fix): void {
  for (const edit of fix.edits) {
    const text = files[edit.uri]!;
    for (const position of [edit.range.start, edit.range.end]) {
      expect({ line: position.line, column: position.column }, fix.title).toEqual(lineAndColumn(text, position.offset));
    }
  }
}

/** The resistor-insertion fix for D1 of a netlist with an LED straight across a 5 V rail. */
function insertionFor(text: string, files: Record<string, string> = {}) {
  const checked = checkWithFixes(text, { files });
  const finding = findingOf(checked, 'led-current-unlimited');
  const fix = preferredFix(finding);
  expectConsistentRanges(checked.files, fix);
  const value = /^Insert (\S+) Ω/.exec(fix.title)?.[1];
  expect(value, fix.title).toBeDefined();
  return { checked, finding, fix, value: value! };
}

describe.runIf(ngspiceRuns)('edits keep the file intact', () => {
  it('keeps CRLF line endings, and changes no other line', () => {
    const lines = ['LED on a CRLF file', 'V1 vcc 0 5', '* the lamp', 'D1 vcc 0 LEDRED ; lamp', RED_LED, '.end', ''];
    const text = lines.join('\r\n');
    const { checked, finding, fix, value } = insertionFor(text);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]!.split('\r\n')).toEqual([...lines.slice(0, 3), 'D1 D1_anode 0 LEDRED ; lamp', `R_D1 vcc D1_anode ${value}`, ...lines.slice(4)]);
    expect(files[MAIN_URI]!.replace(/\r\n/g, '')).not.toMatch(/[\r\n]/); // no bare line ending slipped in
  });

  it('puts the new resistor after the last continuation line and keeps the inline comments', () => {
    const text = `LED written over two lines\nV1 vcc 0 5\nD1 vcc\n+ 0 LEDRED $ panel lamp\nR9 vcc 0 1k ; bleeder\n${RED_LED}\n.end\n`;
    const { checked, finding, fix, value } = insertionFor(text);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(text.replace('D1 vcc\n+ 0 LEDRED $ panel lamp\n', `D1 D1_anode\n+ 0 LEDRED $ panel lamp\nR_D1 vcc D1_anode ${value}\n`));
  });

  it('keeps the indentation of an LED inside a subcircuit, and one edit fixes every instance', () => {
    const text = `two indicator cells from one subcircuit
V1 vcc 0 5
X1 vcc cell
X2 vcc cell
.subckt cell p
  D1 p 0 LEDRED
.ends
${RED_LED}
.end
`;
    const checked = checkWithFixes(text);
    // One finding for the subcircuit line, naming the other instance.
    const first = findingOf(checked, 'led-current-unlimited', 'X1.D1');
    expect(first.message).toContain('The same holds for X2.D1');
    expect(checked.findings.filter((each) => each.element === 'X2.D1')).toEqual([]);
    const fix = preferredFix(first);
    const value = /^Insert (\S+) Ω/.exec(fix.title)?.[1];
    const { after, files } = expectFixHolds(checked, first, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toBe(text.replace('  D1 p 0 LEDRED\n', `  D1 D1_anode 0 LEDRED\n  R_D1 p D1_anode ${value}\n`));
    expect(after.findings.filter((each) => each.rule === 'led-current-unlimited')).toEqual([]);
  });

  it('writes into the included file that holds the LED, and leaves the main file alone', () => {
    const main = `board that includes its lamp\nV1 vcc 0 5\n.include lamp.inc\n${RED_LED}\n.end\n`;
    const lamp = '* the panel lamp\nD1 vcc 0 LEDRED\n';
    const files = { 'memory:/lamp.inc': lamp };
    const { checked, finding, fix, value } = insertionFor(main, files);
    expect(fix.edits.every((edit) => edit.uri === 'memory:/lamp.inc')).toBe(true);
    const fixed = expectFixHolds(checked, finding, fix, ngspiceRuns).files;
    expect(fixed[MAIN_URI]).toBe(main);
    expect(fixed['memory:/lamp.inc']).toBe(`* the panel lamp\nD1 D1_anode 0 LEDRED\nR_D1 vcc D1_anode ${value}\n`);
  });
});

describe.runIf(ngspiceRuns)('new names collide with nothing', () => {
  it('skips names already taken in any case, also in an untaken .if branch', () => {
    const text = `LED beside parts that already use the obvious names
.param fitted=0
V1 vcc 0 5
r_d1 vcc d1_ANODE 1k
RLOAD d1_anode 0 1k
.if (fitted == 1)
R_D1_2 vcc 0 1k
.endif
D1 vcc 0 LEDRED
${RED_LED}
.end
`;
    const { checked, finding, fix, value } = insertionFor(text);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toContain(`D1 D1_anode_2 0 LEDRED\nR_D1_3 vcc D1_anode_2 ${value}\n`);
  });

  it('gives a subcircuit’s new node a name none of its ports, nodes or the global nodes have', () => {
    const text = `LED in a subcircuit whose port is named like the new node
V1 vcc 0 5
.global D1_anode_2
X1 vcc cell
.subckt cell D1_anode
  D1 D1_anode 0 LEDRED
.ends
${RED_LED}
.end
`;
    const { checked, finding, fix } = insertionFor(text);
    const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
    expect(files[MAIN_URI]).toMatch(/ {2}D1 D1_anode_3 0 LEDRED\n {2}R_D1 D1_anode D1_anode_3 \d+\n/);
  });
});

describe.runIf(ngspiceRuns)('the ignore fix', () => {
  const text = `LED straight across a rail, written indented
V1 vcc 0 5
    D1 vcc 0 LEDRED
${RED_LED}
.end
`;
  it('is offered, never preferred, on every finding about an element; each finding has exactly one preferred fix at most', () => {
    const checked = checkWithFixes(text);
    for (const finding of checked.findings) {
      const ignores = finding.fixes.filter((fix) => fix.title.startsWith(`Ignore ${finding.rule} `));
      expect(ignores.length, finding.rule).toBe(finding.element === undefined ? 0 : 1);
      expect(ignores.every((fix) => !fix.preferred)).toBe(true);
      expect(finding.fixes.filter((fix) => fix.preferred).length).toBeLessThanOrEqual(1);
    }
    expect(checked.findings.some((finding) => finding.element !== undefined)).toBe(true);
  });

  it('inserts the directive above the element line with its indentation, and the finding is then suppressed', () => {
    const checked = checkWithFixes(text);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    const fix = finding.fixes.find((each) => each.title.startsWith('Ignore'))!;
    expect(fix.preferred).toBe(false);
    expectConsistentRanges(checked.files, fix);
    const files = applyFix(checked, fix);
    expect(files[MAIN_URI]).toBe(text.replace('    D1 vcc 0 LEDRED\n', '    *pnlint: ignore led-current-unlimited -- \n    D1 vcc 0 LEDRED\n'));
    const { check } = recheck(checked, files);
    expect(check.findings.filter((each) => each.rule === 'led-current-unlimited')).toEqual([]);
    expect(check.findings.filter((each) => each.rule === 'directive')).toEqual([]);
  });

  it('silences every instance of a subcircuit from one directive in its body', () => {
    const cells = `two lamps from one subcircuit
V1 vcc 0 5
X1 vcc cell
X2 vcc cell
.subckt cell p
  D1 p 0 LEDRED
.ends
${RED_LED}
.end
`;
    const checked = checkWithFixes(cells);
    const fix = findingOf(checked, 'led-current-unlimited', 'X1.D1').fixes.find((each) => each.title.startsWith('Ignore'))!;
    const files = applyFix(checked, fix);
    expect(files[MAIN_URI]).toBe(cells.replace('  D1 p 0 LEDRED\n', '  *pnlint: ignore led-current-unlimited -- \n  D1 p 0 LEDRED\n'));
    expect(recheck(checked, files).check.findings.filter((each) => each.rule === 'led-current-unlimited')).toEqual([]);
  });

  it('writes a CRLF line in a CRLF file', () => {
    const crlf = text.replace(/\n/g, '\r\n');
    const checked = checkWithFixes(crlf);
    const fix = findingOf(checked, 'led-current-unlimited', 'D1').fixes.find((each) => each.title.startsWith('Ignore'))!;
    expect(fix.edits.map((edit) => edit.newText)).toEqual(['    *pnlint: ignore led-current-unlimited -- \r\n']);
  });
});

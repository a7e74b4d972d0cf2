// No valid netlist line may be a syntax error. The corpus netlist is of the project's own
// invention; ngspice 39 is the judge of validity: it must read and solve the file with no
// error, and then pnlint must read it with no diagnostic at all. Without ngspice on PATH the
// ngspice half is skipped, except under CI.
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { parse } from '@pnlint/grammar';
import { allStatements } from './helpers.js';

const corpus = fileURLToPath(new URL('./netlists/valid-constructs.cir', import.meta.url));
const hasNgspice = !spawnSync('ngspice', ['--version'], { encoding: 'utf8' }).error;
if (!hasNgspice && process.env.CI) throw new Error('ngspice is not on PATH: under CI that is a failure');

describe('a netlist that ngspice 39 accepts', () => {
  test.skipIf(!hasNgspice)('ngspice 39 reads and solves the corpus without error', () => {
    const run = spawnSync('ngspice', ['-n', '-b', corpus], { encoding: 'utf8', env: { ...process.env, LC_ALL: 'C' }, timeout: 30_000 });
    const output = run.stdout ?? '';
    const between = output.slice(output.indexOf('@@BEGIN'), output.indexOf('@@END'));
    const values = Object.fromEntries([...between.matchAll(/^(\S+)\s+=\s+(\S+)/gm)].map((match) => [match[1], Number(match[2])]));
    expect(run.stderr ?? '').not.toMatch(/simulation\(s\) aborted|^Error|fatal error/m);
    expect(values['v(vcc)']).toBeCloseTo(5, 9); // ngspice 39: the 5 V rail
    // ngspice 39 read the TABLE and code-model lines as meant: 5 V on a 0..10 V to 0..1 V
    // table is 0.5 V; a summer of 5 V and 10 V with gains of 0.5 is 7.5 V.
    expect(values['v(e2)']).toBeCloseTo(0.5, 9);
    expect(values['v(a2)']).toBeCloseTo(7.5, 9);
    // An unbraced behavioural expression: (v(vcc)==5) ? 3 : 0 is 3 V at 5 V.
    expect(values['v(b3)']).toBeCloseTo(3, 9);
  });

  test('pnlint reads every line of it without a diagnostic', () => {
    const text = readFileSync(corpus, 'utf8');
    const result = parse(text);
    expect(result.diagnostics).toEqual([]);
    const statements = allStatements(result.statements);
    const kinds = new Set(statements.map((statement) => statement.kind));
    for (const kind of ['title', 'comment', 'param', 'func', 'global', 'dot', 'model', 'subckt', 'element', 'if', 'control', 'end']) {
      expect(kinds.has(kind as never), kind).toBe(true);
    }
    // Every element line of the file is an element statement (counted from the text:
    // lines that start with a letter, outside the .control block).
    const body = text.slice(0, text.indexOf('.control'));
    const elementLines = body.split('\n').filter((line) => /^[a-z]/i.test(line)).length - 1; // minus the title
    expect(statements.filter((statement) => statement.kind === 'element')).toHaveLength(elementLines);
  });
});

// pnlint's DC operating point against the reference engine, ngspice 39 (from
// Debian's packages), on netlists of the project's own invention in
// test/sim/reference/ and a generated 2,000-section resistor–diode ladder.
// Expected values: ngspice 39 at reltol=1e-9, abstol=1e-18, vntol=1e-12
// (shared/design/verification.md). Both engines read the very same deck.
//
// What is compared: every node voltage ngspice prints (top-level nodes and
// subcircuit nodes, which both name `x1.a`), and every branch current it prints
// (each diode's 0 V ammeter `VAMn`, and the currents of voltage sources,
// inductors and E/H sources), case-insensitively. Tolerances and their reasons:
// test/support/compare.ts. Kirchhoff's current law is checked on pnlint's own
// branch and terminal currents at every node.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, test } from 'vitest';
import { declareNgspiceGate, runNgspiceOperatingPoint, type NgspiceRun, type NgspiceTolerances } from '../support/ngspice.js';
import {
  allowedDifference,
  checkKirchhoff,
  compareWithNgspice,
  CURRENT_TOLERANCE,
  describeDisagreement,
  diodeAmmeters,
  VOLTAGE_TOLERANCE,
} from '../support/compare.js';
import { ngspiceBranchName, ngspiceNodeName } from '../support/ngspice.js';
import { resistorDiodeLadder } from '../support/ladder.mjs';
import { loadPnlintSolver, type PnlintSolve } from '../support/pnlint-solver.js';

const REFERENCE_FOLDER = fileURLToPath(new URL('./reference/', import.meta.url));

/** Issue 3 asks for at least 20; the task brief for at least 22. */
const MINIMUM_REFERENCE_CASES = 22;

/**
 * Cases where pnlint is known to disagree with ngspice, with the cause as
 * found. Such a case is still run, expecting the disagreement (`test.fails`),
 * so that the list cannot outlive the cause: once pnlint agrees, the test
 * fails and the entry must go.
 */
const KNOWN_MISMATCHES: Record<string, string> = {};

interface ReferenceCase {
  name: string;
  /** Where pnlint believes the deck lives, so that its includes resolve beside it. */
  uri: string;
  text: string;
  /** Files the deck includes, relative to it, for ngspice's temporary folder. */
  includes: Record<string, string>;
  tolerances?: NgspiceTolerances;
}

function filesUnder(folder: string): string[] {
  return readdirSync(folder).flatMap((name) => {
    const path = join(folder, name);
    return statSync(path).isDirectory() ? filesUnder(path) : [path];
  });
}

function referenceCases(): ReferenceCase[] {
  const files = filesUnder(REFERENCE_FOLDER);
  const includes: Record<string, string> = {};
  for (const path of files.filter((file) => !file.endsWith('.cir'))) {
    includes[relative(REFERENCE_FOLDER, path)] = readFileSync(path, 'utf8');
  }
  const cases: ReferenceCase[] = files
    .filter((file) => file.endsWith('.cir'))
    .sort()
    .map((path) => ({ name: relative(REFERENCE_FOLDER, path), uri: path, text: readFileSync(path, 'utf8'), includes }));
  cases.push({
    name: 'generated resistor-diode ladder, 2,000 sections',
    uri: join(REFERENCE_FOLDER, 'ladder-2000.cir'),
    text: resistorDiodeLadder(2000, { ammeters: true }),
    includes: {},
    // ngspice's current test is per branch, reltol·|i| + abstol, and the last
    // rungs carry about 2 nA: abstol=1e-18 A is below double-precision noise
    // there and ngspice aborts (seen with ngspice 39). 1e-15 A is still a
    // million times below the comparison's 1 nA.
    tolerances: { abstol: 1e-15 },
  });
  return cases;
}

/** ngspice and pnlint on the 2,000-section ladder, on a loaded 2-core machine: well beyond vitest's 10 s default for hooks. */
const SETUP_TIME_LIMIT_MILLISECONDS = 60_000;

const cases = referenceCases();
const ngspiceRuns = declareNgspiceGate();
const pnlint = await loadPnlintSolver();

test(`there are at least ${MINIMUM_REFERENCE_CASES} reference circuits`, () => {
  expect(cases.length).toBeGreaterThanOrEqual(MINIMUM_REFERENCE_CASES);
});

test('every reference netlist says what it is on its second line', () => {
  for (const referenceCase of cases) {
    expect(referenceCase.text.split('\n')[1], referenceCase.name).toMatch(/^\* What it is: /);
  }
});

if (!pnlint.available) {
  test.skip(`pnlint's side of the comparison: ${pnlint.reason}`, () => {});
}

describe.runIf(ngspiceRuns).each(cases)('$name', (referenceCase) => {
  let reference: NgspiceRun;
  let solved: PnlintSolve | undefined;

  beforeAll(() => {
    reference = runNgspiceOperatingPoint(referenceCase.text, {
      includes: referenceCase.includes,
      tolerances: referenceCase.tolerances,
    });
    if (pnlint.available && reference.ok) solved = pnlint.solve(referenceCase.uri, reference.deck);
  }, SETUP_TIME_LIMIT_MILLISECONDS);

  test('ngspice solves it and reports its diode ammeters', () => {
    expect(reference.failure).toBeUndefined();
    const ammeters = [...reference.values.keys()].filter((name) => /(^|\.)vam[^.#]*#branch$/.test(name));
    const diodeLines = referenceCase.text.split('\n').slice(1).filter((line) => /^\s*d\S*\s/i.test(line));
    expect(ammeters.length).toBeGreaterThanOrEqual(1);
    // In the hand-written netlists every diode line has its ammeter (a subcircuit's diode counts once per instance, hence >=).
    expect(ammeters.length).toBeGreaterThanOrEqual(diodeLines.length);
  });

  const knownMismatch = KNOWN_MISMATCHES[referenceCase.name];
  const agreement = knownMismatch ? test.fails : test;
  agreement.runIf(pnlint.available)(
    knownMismatch ? `KNOWN MISMATCH, expected to disagree with ngspice: ${knownMismatch}` : 'pnlint agrees with ngspice 39 on every node voltage and branch current',
    () => {
      expect(solved?.failure).toBeUndefined();
      const comparison = compareWithNgspice(reference.values, solved!.point!);
      expect(comparison.disagreements.map(describeDisagreement)).toEqual([]);
      expect(comparison.voltagesCompared).toBeGreaterThan(0);
      expect(comparison.currentsCompared).toBeGreaterThan(0);
    },
  );

  test.runIf(pnlint.available)("each diode's reported voltage and current match ngspice's node voltages and its ammeter", () => {
    expect(solved?.failure).toBeUndefined();
    const pairs = diodeAmmeters(solved!.circuit!);
    const diodes = solved!.circuit!.elements.filter((element) => element.type === 'D');
    expect(pairs.length).toBe(diodes.length);
    const ngspiceVoltage = (node: string) => (node === '0' ? 0 : reference.values.get(ngspiceNodeName(node)));
    const mismatches: string[] = [];
    for (const { diode, ammeter, sign } of pairs) {
      const reported = solved!.point!.diodes[diode];
      const element = diodes.find((candidate) => candidate.name === diode)!;
      const current = reference.values.get(ngspiceBranchName(ammeter))! * sign;
      const voltage = ngspiceVoltage(element.nodes[0])! - ngspiceVoltage(element.nodes[1])!;
      if (!reported) {
        mismatches.push(`${diode}: no operating point reported`);
        continue;
      }
      if (!(Math.abs(reported.current - current) <= allowedDifference(current, CURRENT_TOLERANCE))) {
        mismatches.push(`${diode}: current ${reported.current} A, ngspice's ${ammeter} ${current} A`);
      }
      // A difference of two node voltages: twice the node tolerance.
      if (!(Math.abs(reported.voltage - voltage) <= 2 * allowedDifference(voltage, VOLTAGE_TOLERANCE))) {
        mismatches.push(`${diode}: voltage ${reported.voltage} V, ngspice ${voltage} V`);
      }
    }
    expect(mismatches).toEqual([]);
  });

  test.runIf(pnlint.available)("Kirchhoff's current law holds on pnlint's branch and terminal currents", () => {
    expect(solved?.failure).toBeUndefined();
    const kirchhoff = checkKirchhoff(solved!.circuit!, solved!.point!);
    const violations = kirchhoff.residuals
      .filter((node) => !(Math.abs(node.residual) <= node.allowed))
      .map((node) => `${node.node}: sum ${node.residual.toExponential(3)} A (allowed ${node.allowed.toExponential(3)} A)`);
    expect(violations).toEqual([]);
    expect(kirchhoff.skipped.map((node) => `${node.node}: ${node.because}`)).toEqual([]);
    expect(kirchhoff.residuals.length).toBeGreaterThan(0);
  });
});

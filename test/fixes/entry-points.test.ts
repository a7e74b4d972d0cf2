// The two entry points (a provider for checkCircuit, and attachVerifiedFixes for a finished
// check), their budget and cancellation, what they cost, bad input, and every fix offered
// on the bundled demo netlists applied and checked again.
import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { elaborate } from '../../server/src/netlist/index.js';
import { checkCircuit } from '../../server/src/checks/index.js';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';
import { createFixProvider, FIX_BUDGET_MILLISECONDS, MAXIMUM_VERIFICATIONS } from '../../server/src/fixes/index.js';
import { checkWithFixes, expectFixHolds, findingOf, MAIN_URI, memoryReader, preferredFix } from './support.js';

const ngspiceRuns = declareNgspiceGate();

const RED_LED = '.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';
const bare = `LED straight across a 5 V rail\nV1 vcc 0 5\nD1 vcc 0 LEDRED\n${RED_LED}\n.end\n`;
const realFixes = (fixes: { title: string }[]) => fixes.filter((fix) => !fix.title.startsWith('Ignore'));

describe('budget and cancellation', () => {
  it('offers no re-simulated fix once the re-check budget is spent, and says so in its statistics', () => {
    const checked = checkWithFixes(bare, { fixes: { maximumVerifications: 0 } });
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    expect(realFixes(finding.fixes)).toEqual([]);
    expect(finding.fixes.some((fix) => fix.title.startsWith('Ignore'))).toBe(true); // needs no re-simulation
    expect(checked.statistics.verifications).toBe(0);
    expect(checked.statistics.skipped).toBeGreaterThan(0);
  });

  it('stops at once when the analysis is cancelled', () => {
    const checked = checkWithFixes(bare, { fixes: { cancellation: { isCancellationRequested: true } } });
    expect(realFixes(findingOf(checked, 'led-current-unlimited', 'D1').fixes)).toEqual([]);
    expect(checked.statistics.verifications).toBe(0);
  });

  it('keeps to its caps on a board with many unprotected LEDs, and reports what it cost', () => {
    const count = 60;
    const lines = ['sixty indicator LEDs, none with a resistor', 'V1 vcc 0 5'];
    for (let index = 1; index <= count; index++) lines.push(`D${index} vcc 0 LEDRED`);
    const started = performance.now();
    const checked = checkWithFixes([...lines, RED_LED, '.end', ''].join('\n'));
    const total = performance.now() - started;
    const { verifications, milliseconds, skipped } = checked.statistics;
    expect(verifications).toBeLessThanOrEqual(MAXIMUM_VERIFICATIONS);
    // Each re-check is one full check; the budget is looked at before each one starts.
    const perCheck = verifications > 0 ? milliseconds / verifications : 0;
    expect(milliseconds).toBeLessThanOrEqual(FIX_BUDGET_MILLISECONDS + 2 * perCheck + 50);
    expect(findingOf(checked, 'led-current-unlimited', 'D1').fixes.some((fix) => fix.preferred)).toBe(true);
    expect(skipped).toBeGreaterThan(0);
    console.log(`fixes for ${count} LEDs: ${verifications} re-checks in ${milliseconds.toFixed(0)} ms (${perCheck.toFixed(1)} ms each), ${skipped} requests past the budget; whole analysis ${total.toFixed(0)} ms`);
  });
});

describe.runIf(ngspiceRuns)('the provider for checkCircuit', () => {
  it('offers the same verified fixes as attachVerifiedFixes, with the ignore fix beside them', () => {
    const reader = memoryReader({ [MAIN_URI]: bare });
    const circuit = elaborate(MAIN_URI, bare, reader);
    const provider = createFixProvider(reader, undefined);
    const check = checkCircuit(circuit, DEFAULT_SETTINGS, undefined, { fixProvider: provider });
    const viaProvider = findingOf({ ...checkWithFixes(bare), findings: check.findings }, 'led-current-unlimited', 'D1');
    const viaAttach = findingOf(checkWithFixes(bare), 'led-current-unlimited', 'D1');
    expect(viaProvider.fixes.map((fix) => [fix.title, fix.preferred])).toEqual(viaAttach.fixes.map((fix) => [fix.title, fix.preferred]));
    expect(provider.statistics.verifications).toBeGreaterThan(0);
  });
});

describe('bad input', () => {
  it('never throws, for a netlist that does not parse or does not solve', () => {
    const broken = [
      `broken lines around an LED\nV1 vcc 0 5\nD1 vcc\nD2 vcc 0 LEDRED\n+ + +\n${RED_LED}\n.end\n`,
      `a loop of sources\nV1 a 0 5\nV2 a 0 3\nD1 a 0 LEDRED\n${RED_LED}\n.end\n`,
      `an LED on nothing\nD1 a b LEDRED\n${RED_LED}\n.end\n`,
      '',
      '\u0000\uffff.subckt',
    ];
    for (const text of broken) expect(() => checkWithFixes(text)).not.toThrow();
  });
});

describe.runIf(ngspiceRuns)('the bundled demo netlists', () => {
  const folder = new URL('../../server/examples/', import.meta.url);
  for (const name of readdirSync(folder).filter((file) => file.endsWith('.cir'))) {
    it(`${name}: every fix offered holds when applied`, () => {
      const checked = checkWithFixes(readFileSync(new URL(name, folder), 'utf8'));
      for (const finding of checked.findings) {
        for (const fix of finding.fixes) expectFixHolds(checked, finding, fix, ngspiceRuns && fix.preferred);
      }
      if (name.startsWith('clean')) expect(checked.findings.filter((finding) => finding.severity !== 'info')).toEqual([]);
      // The fix catalogue (product.md) has no fix for a rectifier's ratings: a bigger part is the user's choice.
      else if (name.startsWith('rectifier')) expect(checked.findings.flatMap((finding) => realFixes(finding.fixes))).toEqual([]);
      else expect(checked.findings.some((finding) => finding.fixes.some((fix) => fix.preferred)), `${name} offers no fix`).toBe(true);
    });
  }
});

describe.runIf(ngspiceRuns)('preferred fixes', () => {
  it('exactly one per finding that has a real fix', () => {
    const checked = checkWithFixes(bare);
    const finding = findingOf(checked, 'led-current-unlimited', 'D1');
    expect(finding.fixes.filter((fix) => fix.preferred)).toEqual([preferredFix(finding)]);
  });
});

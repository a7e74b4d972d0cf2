// The demo netlists in server/examples (scenarios of the project's own): each must raise the
// problem it was written to show, and the clean board nothing at warning or error (issue 4).
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate, runNgspiceOperatingPoint } from '../support/ngspice.js';
import { check, problems } from './support.js';

const ngspiceRuns = declareNgspiceGate();
const example = (name: string) => readFileSync(fileURLToPath(new URL(`../../server/examples/${name}`, import.meta.url)), 'utf8');
const rulesOf = (name: string) => problems(check(example(name))).map((finding) => `${finding.rule} ${finding.element}`);

describe.runIf(ngspiceRuns)('demo netlists', () => {
  it('an LED with no resistor', () => {
    expect(rulesOf('led-no-resistor.cir')).toContain('led-current-unlimited DSTATUS');
  });
  it('a reversed indicator lamp', () => {
    expect(rulesOf('reversed-lamp.cir')).toContain('reversed-diode DLAMP');
  });
  it('a starved zener reference', () => {
    expect(rulesOf('starved-zener.cir')).toEqual(['zener-underbiased DREF']);
  });
  it('a rectifier with too small a diode', () => {
    expect(rulesOf('rectifier-small-diode.cir')).toEqual(['reverse-overvoltage DRECT', 'forward-overcurrent DRECT']);
  });
  it('a relay with its clamp diode turned around', () => {
    expect(rulesOf('relay-clamp-reversed.cir')).toContain('reversed-diode DCLAMP');
  });
  it('a clean board: nothing at warning or error', () => {
    expect(rulesOf('clean-board.cir')).toEqual([]);
  });
  it('every example parses and elaborates without a netlist diagnostic', () => {
    for (const name of ['led-no-resistor.cir', 'reversed-lamp.cir', 'starved-zener.cir', 'rectifier-small-diode.cir', 'relay-clamp-reversed.cir', 'clean-board.cir']) {
      const result = check(example(name));
      expect(result.findings.filter((finding) => ['syntax', 'netlist', 'directive', 'ambiguous-value'].includes(finding.rule)), name).toEqual([]);
      // The reference engine reads the same file unchanged (directives are comments) and solves it: ngspice 39.
      expect(runNgspiceOperatingPoint(example(name).replace(/^\.op$/m, '')).ok, name).toBe(true);
    }
  });
});

describe('rule pages', () => {
  it('exist for every rule id a finding can carry (the diagnostics link to them)', async () => {
    const { RULE_IDS } = await import('../../server/src/rule-ids.js');
    for (const id of RULE_IDS) {
      const page = readFileSync(fileURLToPath(new URL(`../../server/docs/rules/${id}.md`, import.meta.url)), 'utf8');
      expect(page.startsWith(`# ${id}\n`), id).toBe(true);
    }
  });
});

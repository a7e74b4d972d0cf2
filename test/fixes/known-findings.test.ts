// What a re-check adds to the original check: the verdict "nothing new appears" that every
// fix must pass. A problem a fix makes milder is not new; one it makes graver, or a new one, is.
// The rule is product.md's ("Fixes"); the findings here are made by hand, so no number is checked.
import { describe, expect, it } from 'vitest';
import { FixSession } from '../../server/src/fixes/index.js';
import type { Finding } from '../../server/src/findings.js';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';
import { checkWithFixes, MAIN_URI, memoryReader } from './support.js';

const BOARD = ['two rectifier diodes', 'V1 a 0 DC 5', 'D1 a b DSIL', 'D2 b 0 DSIL', 'R1 b 0 1k', '.model DSIL D', '.end', ''].join('\n');

function finding(rule: string, severity: Finding['severity'], element: string): Finding {
  return { rule, severity, element, message: `${element} has a problem`, location: { uri: MAIN_URI, range: { start: { line: 2, column: 0, offset: 0 }, end: { line: 2, column: 1, offset: 1 } } }, related: [], fixes: [] };
}

describe('nothing new appears', () => {
  const checked = checkWithFixes(BOARD);
  const session = (baseline: Finding[]) => new FixSession(checked.circuit, baseline, memoryReader({ [MAIN_URI]: BOARD }), DEFAULT_SETTINGS, undefined, {});
  const after = (findings: Finding[]) => ({ circuit: checked.circuit, check: { ...checked.check, findings } });

  it('a finding that comes back milder (error to warning) is not new', () => {
    expect(session([finding('reverse-overvoltage', 'error', 'D2')]).bringsNew(after([finding('reverse-overvoltage', 'warning', 'D2')]))).toBe(false);
  });

  it('one that comes back graver (warning to error) is new', () => {
    expect(session([finding('reverse-overvoltage', 'warning', 'D2')]).bringsNew(after([finding('reverse-overvoltage', 'error', 'D2')]))).toBe(true);
  });

  it('the same rule about another element, or another rule about the same element, is new', () => {
    const baseline = [finding('reverse-overvoltage', 'error', 'D2')];
    expect(session(baseline).bringsNew(after([finding('reverse-overvoltage', 'warning', 'D1')]))).toBe(true);
    expect(session(baseline).bringsNew(after([finding('forward-overcurrent', 'info', 'D2')]))).toBe(true);
  });
});

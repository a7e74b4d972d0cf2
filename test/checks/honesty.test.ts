// Honesty diagnostics and cautions: what could not be checked says why (issue 4), and a
// circuit above the extra-low-voltage limits (50 V AC, 120 V DC: the usual ELV limits,
// product.md) gets the design-aid caution.
import { describe, expect, it } from 'vitest';
import { check, findingsOf } from './support.js';

const SIGNAL = '.model SIG D(IS=2.5n N=1.75 RS=0.5 BV=100 IBV=5u)';

describe('honesty diagnostics', () => {
  it('passes an unknown model through from the netlist, saying the diode is not checked', () => {
    const result = check('missing model\nV1 a 0 5\nR1 a b 1k\nD1 b 0 NOSUCH\n.end\n');
    const [unknown] = findingsOf(result, 'unknown-model');
    expect(unknown?.message).toContain('NOSUCH');
    expect(unknown?.message).toContain('not checked');
    expect(unknown?.element).toBe('D1');
    // One problem, one finding: the diode left open for want of its model is not also reported as unmodeled.
    expect(result.findings.filter((finding) => finding.element === 'D1' || finding.message.startsWith('D1 '))).toEqual([unknown]);
  });
  it('reports a missing subcircuit as unknown-model, and notes each diode its nodes reach as not checked', () => {
    const text = `motor board with an undefined driver
V1 vcc 0 12
XDRV vcc out 0 HBRIDGE
R1 out a 1k
D1 a 0 SIG
R2 vcc b 1k
D2 b 0 SIG
${SIGNAL}
.end
`;
    const result = check(text);
    const unknown = findingsOf(result, 'unknown-model');
    const driver = unknown.find((finding) => finding.element === 'XDRV');
    expect(driver?.severity).toBe('warning');
    expect(driver?.message).toContain('subcircuit HBRIDGE not found');
    expect(findingsOf(result, 'netlist')).toEqual([]);
    expect(findingsOf(result, 'unmodeled-element')).toEqual([]);
    // D1 hangs on the driver's output: not checked, and it says why. D2 sits across the rail only: checked.
    const note = unknown.find((finding) => finding.element === 'D1');
    expect(note?.severity).toBe('info');
    expect(note?.message).toContain('not checked');
    expect(note?.message).toContain('XDRV');
    expect(note?.message).toContain('HBRIDGE');
    expect(result.diodes.find((diode) => diode.element === 'D1')?.unchecked).toBeDefined();
    expect(result.diodes.find((diode) => diode.element === 'D2')?.unchecked).toBeUndefined();
    expect(unknown.some((finding) => finding.element === 'D2')).toBe(false);
  });
  it('skips a diode next to an unmodeled element, saying so', () => {
    const text = `diode beside a behavioural source
V1 vcc 0 5
B1 a 0 V=2.5
R1 vcc a 1k
D1 a 0 SIG
${SIGNAL}
.end
`;
    const result = check(text);
    expect(findingsOf(result, 'unmodeled-element').some((finding) => finding.element === 'D1' && finding.message.includes('not checked'))).toBe(true);
    // The unmodeled element's own finding names it too.
    expect(findingsOf(result, 'unmodeled-element').find((finding) => finding.message.startsWith('B1 '))?.element).toBe('B1');
    expect(result.diodes[0]!.unchecked).toContain('B1');
  });
  it('reports a floating node and a loop of voltage sources without throwing', () => {
    const floating = check(`floating\nV1 a 0 5\nR1 a 0 1k\nD1 x y SIG\nR2 x y 1k\n${SIGNAL}\n.end\n`);
    expect(floating.findings.some((finding) => finding.rule === 'floating-node' || finding.rule === 'unsolved-circuit')).toBe(true);
    const loop = check('loop\nV1 a 0 5\nV2 a 0 3\nR1 a b 1k\nD1 b 0 SIG\n' + SIGNAL + '\n.end\n');
    expect(findingsOf(loop, 'unsolved-circuit').length).toBeGreaterThan(0);
    expect(loop.diodes[0]!.unchecked).toBeDefined();
  });
});

describe('cautions', () => {
  it('cautions for a 230 V rms mains source, and not for a 24 V supply', () => {
    const mains = check('mains indicator\nV1 l 0 SIN(0 325 50)\nR1 l a 100k\nD1 a 0 SIG\nD2 0 a SIG\n' + SIGNAL + '\n.end\n');
    const [caution] = findingsOf(mains, 'hazardous-voltage');
    expect(caution?.severity).toBe('info');
    expect(caution?.message).toContain('design aid, not a safety approval');
    expect(caution?.message).toContain('local electrical codes');
    expect(findingsOf(check('low\nV1 a 0 24\nR1 a 0 1k\n.end\n'), 'hazardous-voltage')).toEqual([]);
  });
  it('cautions for DC above 120 V', () => {
    expect(findingsOf(check('bus\nV1 a 0 170\nR1 a 0 100k\n.end\n'), 'hazardous-voltage')).toHaveLength(1);
    expect(findingsOf(check('bus\nV1 a 0 110\nR1 a 0 100k\n.end\n', { settings: { supplyTolerance: 0 } }), 'hazardous-voltage')).toEqual([]);
  });
});

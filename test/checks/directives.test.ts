// Directives and ratings as product.md writes them: syntax, diagnostics for what cannot be
// understood, merge order (issue 4: library → BV → pnlint.json → directive on the model →
// on the instance), and suppression.
import { describe, expect, it } from 'vitest';
import { check, findingsOf } from './support.js';

const SIGNAL = '.model SIG D(IS=2.5n N=1.75 RS=0.5 BV=100 IBV=5u)';
const base = (directives: string, diode = 'D1 vin out SIG') => `diode into a load
V1 vin 0 5
${directives}
${diode}
RL out 0 1k
${SIGNAL}
.end
`;
const ratingText = (text: string, element = 'D1') => {
  const result = check(text);
  return result.diodes.find((diode) => diode.element === element)!.ratings.map((rating) => rating.text);
};

describe('directive diagnostics', () => {
  it('reports unknown commands, keys, kinds, bad values and unknown rule ids, each at its own word', () => {
    const text = base(
      ['*pnlint: ratng SIG vrrm=50', '*pnlint: rating SIG vrm=50', '*pnlint: rating SIG kind=laser', '*pnlint: rating SIG if=lots', '*pnlint: ignore no-such-rule'].join('\n'),
    );
    const messages = findingsOf(check(text), 'directive');
    expect(messages.map((finding) => finding.message)).toEqual([
      expect.stringContaining("Unknown pnlint directive 'ratng'"),
      expect.stringContaining("Unknown rating key 'vrm'"),
      expect.stringContaining("Unknown diode kind 'laser'"),
      expect.stringContaining('Bad value for if'),
      expect.stringContaining("Unknown rule id 'no-such-rule'"),
    ]);
    // "vrm=50" starts at column 20 of line 4 (0-based line 3): `*pnlint: rating SIG ` is 20 characters.
    expect(messages[1]!.location.range.start).toMatchObject({ line: 3, column: 20 });
    expect(messages[1]!.location.range.end).toMatchObject({ line: 3, column: 26 });
  });
  it('reports a target that names nothing, and a supply that is not a source', () => {
    const text = base('*pnlint: rating NOSUCH vrrm=50\n*pnlint: supply RL min=1');
    const messages = findingsOf(check(text), 'directive').map((finding) => finding.message);
    expect(messages[0]).toContain("'NOSUCH'");
    expect(messages[1]).toContain('No independent voltage or current source');
  });
  it('refuses a supply with both tol and min/max, or min above max, and a bare tolerance above 0.5', () => {
    const text = base('*pnlint: supply V1 tol=5% min=4\n*pnlint: supply V1 min=6 max=4\n*pnlint: rating RL tol=5');
    const messages = findingsOf(check(text), 'directive').map((finding) => finding.message);
    expect(messages).toHaveLength(3);
    expect(messages[2]).toContain('percentage');
  });
});

describe('ratings merge order (issue 4)', () => {
  it('starts from the part-class library, marked as typical', () => {
    expect(ratingText(base(''))).toContain('IF 200 mA (typical value for a small-signal diode)');
  });
  it('takes the model BV as the reverse limit', () => {
    expect(ratingText(base(''))).toContain('VRRM 100 V from BV of model SIG (line 6)');
  });
  it('lets pnlint.json override the BV, a model directive override pnlint.json, and an instance directive override both', () => {
    const config = JSON.stringify({ ratings: { SIG: { vrrm: 60, if: '300m' } } });
    expect(check(base(''), { config }).diodes[0]!.ratings.map((rating) => rating.text)).toContain('VRRM 60 V from pnlint.json');
    const onModel = base('*pnlint: rating SIG vrrm=40');
    expect(check(onModel, { config }).diodes[0]!.ratings.map((rating) => rating.text)).toEqual(
      expect.arrayContaining(['VRRM 40 V from directive on line 3', 'IF 300 mA from pnlint.json']),
    );
    const onInstance = base('*pnlint: rating SIG vrrm=40\n*pnlint: rating D1 vrrm=30');
    expect(check(onInstance, { config }).diodes[0]!.ratings.map((rating) => rating.text)).toContain('VRRM 30 V from directive on line 4');
  });
  it('takes the kind from a directive, over the classification', () => {
    const result = check(base('*pnlint: rating SIG kind=rectifier'));
    expect(result.diodes[0]!.kind).toBe('rectifier');
    expect(result.diodes[0]!.kindReason).toBe('from directive on line 3');
  });
  it('gives an unrated LED the trade rule of thumb: 20 mA, 5 V reverse (common practice, no source)', () => {
    const text = `led\nV1 vcc 0 5\nR1 vcc a 1k\nD1 a 0 LEDX\n.model LEDX D(IS=1e-20 N=1.8 RS=2)\n.end\n`;
    const ratings = check(text).diodes[0]!.ratings.map((rating) => rating.text);
    expect(ratings).toEqual(expect.arrayContaining(['IF 20 mA (rule of thumb for LEDs)', 'VRRM 5 V (rule of thumb for LEDs)']));
  });
});

describe('suppression (product.md)', () => {
  const reversedSeries = (directives: string, inline = '') => `series diode turned around
V1 vin 0 9
${directives}
D1 out vin SIG${inline}
RL out 0 1k
${SIGNAL}
.end
`;
  it('fires without a directive', () => {
    expect(findingsOf(check(reversedSeries('')), 'reversed-diode')).toHaveLength(1);
  });
  it('ignore applies to the next element line', () => {
    expect(findingsOf(check(reversedSeries('*pnlint: ignore reversed-diode -- blocks on purpose')), 'reversed-diode')).toEqual([]);
  });
  it('an inline ignore applies to its own line', () => {
    expect(findingsOf(check(reversedSeries('', ' ; pnlint: ignore reversed-diode')), 'reversed-diode')).toEqual([]);
  });
  it('ignore-file applies to the whole file; pnlint.json ignores apply by rule and element', () => {
    expect(findingsOf(check(reversedSeries('*pnlint: ignore-file reversed-diode')), 'reversed-diode')).toEqual([]);
    const config = JSON.stringify({ ignore: [{ rule: 'reversed-diode', elements: ['d1'] }] });
    expect(findingsOf(check(reversedSeries(''), { config }), 'reversed-diode')).toEqual([]);
    const other = JSON.stringify({ ignore: [{ rule: 'reversed-diode', elements: ['D9'] }] });
    expect(findingsOf(check(reversedSeries(''), { config: other }), 'reversed-diode')).toHaveLength(1);
  });
  it('an ignore of another rule leaves the finding', () => {
    expect(findingsOf(check(reversedSeries('*pnlint: ignore overdissipation')), 'reversed-diode')).toHaveLength(1);
  });
  it("a severity setting of 'off' hides a rule, another severity replaces the default", () => {
    expect(findingsOf(check(reversedSeries(''), { settings: { severities: { 'reversed-diode': 'off' } } }), 'reversed-diode')).toEqual([]);
    expect(findingsOf(check(reversedSeries(''), { settings: { severities: { 'reversed-diode': 'error' } } }), 'reversed-diode')[0]?.severity).toBe('error');
  });
});

describe('subcircuits', () => {
  const board = `two indicator cells from one subcircuit
.subckt INDICATOR vcc gnd rlim=1k
R1 vcc a {rlim}
*pnlint: rating D1 if=10m
D1 a gnd LEDRED
.ends
V1 rail 0 5
X1 rail 0 INDICATOR rlim=1k
X2 rail 0 INDICATOR rlim=100
.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)
.end
`;
  it('names the instance that fails by its hierarchical name, with the directive written inside the subcircuit', () => {
    const findings = findingsOf(check(board), 'led-current-unlimited');
    expect(findings.map((finding) => finding.element)).toEqual(['X2.D1']);
    expect(findings[0]!.message).toContain('rating IF 10 mA from directive on line 4');
  });
  it('lets an ignore inside the subcircuit silence every instance', () => {
    const ignored = board.replace('*pnlint: rating D1 if=10m', '*pnlint: rating D1 if=10m\n*pnlint: ignore led-current-unlimited');
    expect(findingsOf(check(ignored), 'led-current-unlimited')).toEqual([]);
  });
});

// Fixes on boards with many findings: flips and guard diodes in separate regions verified
// together, each still holding when applied alone; the budget and cancellation over the
// whole stage; and the line index that every edit's position comes from. Currents come from
// ngspice 39 solving the fixed netlists; the LED current limit is the trade's rule of thumb
// for an LED with no rating (20 mA; common practice, no source).
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { elaborate } from '../../server/src/netlist/index.js';
import { checkCircuit } from '../../server/src/checks/index.js';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';
import { createFixProvider, MAXIMUM_VERIFICATIONS } from '../../server/src/fixes/index.js';
import type { Finding } from '../../server/src/findings.js';
import { applyFix, atSource, checkWithFixes, expectFixHolds, MAIN_URI, memoryReader, ngspiceValue } from './support.js';

const ngspiceRuns = declareNgspiceGate();

const RED_LED = '.model LEDRED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)';
/** The trade's continuous-current rule of thumb for an LED with no rating (common practice, no source). */
const LED_RULE_OF_THUMB_AMPERES = 20e-3;

const realFixes = (finding: Finding) => finding.fixes.filter((fix) => !fix.title.startsWith('Ignore'));
const flipOf = (finding: Finding) => finding.fixes.find((fix) => fix.title.startsWith('Turn '));

/** A bench of panel lamps on one 5 V rail, each behind its own resistor and ammeter, every lamp wired backwards. */
function reversedBench(resistances: readonly number[]): string {
  const lines = ['bench of panel lamps, all wired backwards', 'V1 vcc 0 5'];
  resistances.forEach((resistance, index) => {
    const lamp = index + 1;
    lines.push(`R${lamp} vcc a${lamp} ${resistance}`, `VAM${lamp} a${lamp} b${lamp} 0`, `D${lamp} 0 b${lamp} LEDRED`);
  });
  return [...lines, RED_LED, '.end', ''].join('\n');
}

describe.runIf(ngspiceRuns)('flips verified together', () => {
  // Four lamps that a flip fixes, and one whose 47 Ω would let too much through once turned around.
  const resistances = [220, 270, 330, 390, 47];
  const bench = reversedBench(resistances);
  const checked = checkWithFixes(bench);

  it('offers each good flip, and each holds when applied alone, with the current ngspice 39 finds in its title', () => {
    for (let lamp = 1; lamp <= 4; lamp++) {
      const finding = checked.findings.find((each) => each.rule === 'reversed-diode' && each.element === `D${lamp}`)!;
      const flip = flipOf(finding);
      expect(flip, `D${lamp} has no flip`).toBeDefined();
      const { files } = expectFixHolds(checked, finding, flip!, ngspiceRuns);
      expect(files[MAIN_URI]).toBe(bench.replace(`D${lamp} 0 b${lamp} LEDRED`, `D${lamp} b${lamp} 0 LEDRED`));
      const current = ngspiceValue(atSource(files[MAIN_URI]!, 'V1', 5.25), `i(vam${lamp})`); // ngspice 39, max corner
      expect(flip!.title).toContain(`it then carries ${Number((current * 1e3).toPrecision(3))} mA`);
    }
  });

  it('offers no flip where turning the lamp around would put it over the LED rule of thumb', () => {
    const flipped = bench.replace('D5 0 b5 LEDRED', 'D5 b5 0 LEDRED');
    const current = ngspiceValue(atSource(flipped, 'V1', 5.25), 'i(vam5)'); // ngspice 39, max corner
    expect(current).toBeGreaterThan(LED_RULE_OF_THUMB_AMPERES);
    const finding = checked.findings.find((each) => each.rule === 'reversed-diode' && each.element === 'D5')!;
    expect(flipOf(finding)).toBeUndefined();
    expect(checked.statistics.rejected).toBeGreaterThan(0);
  });

  it('offers no guard diode across a reversed lamp: its reverse breakdown is the reversal\'s, and a guard would leave it dark', () => {
    const explained = checked.findings.filter((each) => each.rule === 'reverse-overvoltage');
    expect(explained).toHaveLength(resistances.length);
    for (const finding of explained) {
      expect(finding.message).toContain(`${finding.element} is reversed (reversed-diode)`);
      expect(realFixes(finding)).toEqual([]);
    }
  });

  it('shares re-checks: fewer than the fixes it offers', () => {
    const offered = checked.findings.reduce((count, finding) => count + realFixes(finding).length, 0);
    expect(offered).toBe(4); // the four good flips
    expect(checked.statistics.verifications).toBeLessThan(offered);
  });

  it('offers the same fixes as checking one fix at a time (the provider inside checkCircuit)', () => {
    const reader = memoryReader({ [MAIN_URI]: bench });
    const circuit = elaborate(MAIN_URI, bench, reader);
    const oneAtATime = checkCircuit(circuit, DEFAULT_SETTINGS, undefined, { fixProvider: createFixProvider(reader, undefined, { maximumVerifications: 100, budgetMilliseconds: 60_000 }) });
    const titles = (findings: readonly Finding[]) => findings.map((finding) => `${finding.rule} ${finding.element}: ${finding.fixes.map((fix) => fix.title).join(' | ')}`);
    expect(titles(checked.findings)).toEqual(titles(oneAtATime.findings));
  });
});

describe.runIf(ngspiceRuns)('flips that share a line or a region', () => {
  it('a lamp subcircuit used twice: one edit turns both instances, offered on each and holding alone', () => {
    const text = `two lamp modules wired backwards, and one loose lamp
V1 vcc 0 5
.subckt LAMP top
R1 top a 330
D1 0 a LEDRED
.ends
X1 vcc LAMP
X2 vcc LAMP
R9 vcc a9 390
D9 0 a9 LEDRED
${RED_LED}
.end
`;
    const checked = checkWithFixes(text);
    // The subcircuit line is told once, for its first instance, naming the other.
    const reversed = checked.findings.filter((each) => each.rule === 'reversed-diode');
    expect(reversed.map((each) => each.element)).toEqual(['X1.D1', 'D9']);
    expect(reversed[0]!.message).toContain('The same holds for X2.D1');
    // Its ignore directive goes above the subcircuit line, which every instance reads: the title says so.
    expect(reversed[0]!.fixes.map((fix) => fix.title)).toContain('Ignore reversed-diode for D1 in every instance of its subcircuit (add a pnlint directive above its line)');
    for (const element of ['X1.D1', 'D9']) {
      const finding = reversed.find((each) => each.element === element)!;
      const flip = flipOf(finding);
      expect(flip, `${element} has no flip`).toBeDefined();
      const { after } = expectFixHolds(checked, finding, flip!, ngspiceRuns);
      // One edit of the subcircuit line turns both instances.
      if (element !== 'D9') expect(after.findings.filter((each) => each.rule === 'reversed-diode').map((each) => each.element)).toEqual(['D9']);
    }
  });

  it('lamps behind one shared resistor (one region): each flip re-checked alone, each holding', () => {
    // A BV well above the supply, so that turning one lamp around moves no other lamp's reverse-voltage finding.
    const text = `three lamps behind one feed resistor, all backwards
V1 vcc 0 5
RFEED vcc bus 150
R1 bus a1 330
D1 0 a1 LEDTALL
R2 bus a2 330
D2 0 a2 LEDTALL
R3 bus a3 330
D3 0 a3 LEDTALL
.model LEDTALL D(IS=1e-20 N=1.8 RS=2 BV=20 IBV=10u)
.end
`;
    const checked = checkWithFixes(text);
    const flips = checked.findings.filter((each) => each.rule === 'reversed-diode' && flipOf(each));
    expect(flips.length).toBe(3);
    expect(checked.statistics.verifications).toBeGreaterThanOrEqual(3);
    for (const finding of flips) expectFixHolds(checked, finding, flipOf(finding)!, ngspiceRuns);
  });
});

/** A rack of `lamps` status lamps, each behind its own 390 Ω resistor on a 5 V rail; every `everyReversed`-th lamp wired backwards. */
function statusRack(lamps: number, everyReversed: number): string {
  const lines = [`rack of ${lamps} status lamps`, 'V1 vcc 0 5'];
  for (let lamp = 1; lamp <= lamps; lamp++) {
    lines.push(`R${lamp} vcc a${lamp} 390`, lamp % everyReversed === 0 ? `D${lamp} 0 a${lamp} LEDRED` : `D${lamp} a${lamp} 0 LEDRED`);
  }
  return [...lines, RED_LED, '.end', ''].join('\n');
}

describe('a rack of many lamps', () => {
  const rack = statusRack(300, 2);

  it.runIf(ngspiceRuns)('gets every flip within the default budget, in a few re-checks', () => {
    const checked = checkWithFixes(rack);
    const reversed = checked.findings.filter((each) => each.rule === 'reversed-diode');
    expect(reversed).toHaveLength(150);
    expect(reversed.every((finding) => flipOf(finding))).toBe(true);
    expect(checked.statistics.verifications).toBeLessThanOrEqual(4);
    // Two of them applied alone, from either end of the board.
    for (const finding of [reversed[0]!, reversed[reversed.length - 1]!]) expectFixHolds(checked, finding, flipOf(finding)!, ngspiceRuns);
  });

  it('past the budget, every finding still gets its ignore fix', () => {
    const checked = checkWithFixes(rack, { fixes: { maximumVerifications: 0 } });
    expect(checked.findings.length).toBeGreaterThan(150);
    for (const finding of checked.findings.filter((each) => each.element !== undefined)) {
      expect(realFixes(finding)).toEqual([]);
      expect(finding.fixes.filter((fix) => fix.title.startsWith('Ignore'))).toHaveLength(1);
    }
    expect(checked.statistics.verifications).toBe(0);
    expect(checked.statistics.skipped).toBeGreaterThanOrEqual(150);
  });

  it('an ignore fix past the budget does silence its finding', () => {
    const checked = checkWithFixes(rack, { fixes: { maximumVerifications: 0 } });
    const finding = checked.findings.find((each) => each.rule === 'reversed-diode' && each.element === 'D300')!;
    const files = applyFix(checked, finding.fixes.find((fix) => fix.title.startsWith('Ignore'))!);
    const after = checkWithFixes(files[MAIN_URI]!, { fixes: { maximumVerifications: 0 } });
    expect(after.findings.filter((each) => each.rule === 'reversed-diode' && each.element === 'D300')).toEqual([]);
  });

  it('cancelled part-way, it offers fewer fixes, and those it offers hold', () => {
    // A whole run's looks at the token counted, then the same run cancelled half-way through them.
    let polls = 0;
    const counting = { get isCancellationRequested() { polls++; return false; } };
    const whole = checkWithFixes(rack, { fixes: { cancellation: counting } });
    const halfway = polls >> 1;
    polls = 0;
    const cancellation = { get isCancellationRequested() { return ++polls > halfway; } };
    const checked = checkWithFixes(rack, { fixes: { cancellation } });
    expect(checked.statistics.verifications).toBeLessThanOrEqual(whole.statistics.verifications);
    expect(checked.findings.reduce((count, finding) => count + realFixes(finding).length, 0)).toBeLessThan(whole.findings.reduce((count, finding) => count + realFixes(finding).length, 0));
    const offered = checked.findings.flatMap((finding) => realFixes(finding).map((fix) => ({ finding, fix })));
    // The flips share their re-checks, so a cancelled run may offer none of them; any it offers hold.
    for (const each of [offered[0], offered.at(-1)]) if (each) expectFixHolds(checked, each.finding, each.fix, false);
  });

  it('cancelled before it starts, it builds nothing', () => {
    const checked = checkWithFixes(rack, { fixes: { cancellation: { isCancellationRequested: true } } });
    expect(checked.statistics.verifications).toBe(0);
    expect(checked.findings.every((finding) => finding.fixes.length === 0)).toBe(true);
  });
});

describe('a panel of many LEDs on too small resistors', () => {
  // Two hundred indicators, each on its own 10 Ω from the 5 V rail: every one far over the LED
  // rule of thumb. Each resistor search is independent of the others (the rail holds them apart).
  const lamps = 200;
  const lines = [`panel of ${lamps} indicators`, 'V1 vcc 0 5'];
  for (let lamp = 1; lamp <= lamps; lamp++) lines.push(`R${lamp} vcc a${lamp} 10`, `D${lamp} a${lamp} 0 LEDRED`);
  const panel = [...lines, RED_LED, '.end', ''].join('\n');
  const unlimited = (findings: readonly Finding[]) => findings.filter((each) => each.rule === 'led-current-unlimited');

  it.runIf(ngspiceRuns)('gets every resistor fix within the default budget, the searches sharing their re-checks', () => {
    const checked = checkWithFixes(panel);
    const found = unlimited(checked.findings);
    expect(found).toHaveLength(lamps);
    expect(found.every((finding) => finding.fixes.some((fix) => fix.preferred))).toBe(true);
    expect(checked.statistics.verifications).toBeLessThanOrEqual(4);
    // The two ends of the board, applied alone: ngspice 39 at the max corner finds the LED under the rule of thumb.
    for (const finding of [found[0]!, found[found.length - 1]!]) {
      const fix = finding.fixes.find((each) => each.preferred)!;
      const { files } = expectFixHolds(checked, finding, fix, ngspiceRuns);
      const lamp = finding.element!.slice(1);
      const probed = atSource(files[MAIN_URI]!, 'V1', 5.25).replace(`D${lamp} a${lamp} 0 LEDRED`, `VAM a${lamp} m${lamp} 0\nD${lamp} m${lamp} 0 LEDRED`);
      expect(ngspiceValue(probed, 'i(vam)')).toBeLessThan(LED_RULE_OF_THUMB_AMPERES);
    }
  });

  it('one at a time, the same budget runs out long before the last lamp', () => {
    // Each fix costs a re-check of its own then, and MAXIMUM_VERIFICATIONS caps them per analysis.
    const reader = memoryReader({ [MAIN_URI]: panel });
    const circuit = elaborate(MAIN_URI, panel, reader);
    const oneAtATime = checkCircuit(circuit, DEFAULT_SETTINGS, undefined, { fixProvider: createFixProvider(reader, undefined) });
    const fixed = unlimited(oneAtATime.findings).filter((finding) => finding.fixes.some((fix) => fix.preferred));
    expect(fixed.length).toBeLessThanOrEqual(MAXIMUM_VERIFICATIONS);
  });
});

describe('a board of many starved zener references', () => {
  // Sixty shunt references, each fed from 12 V through 4.7 kΩ into a 2 kΩ load: (12 − 5.1) V / 4.7 kΩ
  // = 1.47 mA, less than the load's 2.55 mA (Ohm's law), so each zener starves below its 1 mA knee.
  const references = 60;
  const lines = [`bias rails: ${references} zener references`, 'V12 v12 0 DC 12', '*pnlint: rating ZREF kind=zener vz=5.1 izk=1m pd=500m'];
  for (let each = 1; each <= references; each++) lines.push(`RF${each} v12 z${each} 4.7k`, `DZ${each} 0 z${each} ZREF`, `RL${each} z${each} 0 2k`);
  const board = [...lines, '.model ZREF D(IS=1e-14 N=1 RS=2 BV=5.1 IBV=5m)', '.end', ''].join('\n');
  const starved = (findings: readonly Finding[]) => findings.filter((each) => each.rule === 'zener-underbiased');

  it('gets every feed-resistor fix within the default budget, the searches sharing their re-checks', () => {
    const checked = checkWithFixes(board);
    const found = starved(checked.findings);
    expect(found).toHaveLength(references);
    expect(found.every((finding) => finding.fixes.some((fix) => fix.preferred))).toBe(true);
    expect(checked.statistics.verifications).toBeLessThanOrEqual(4);
    // The first and the last, applied alone, hold (and ngspice 39 still solves the board).
    for (const finding of [found[0]!, found[found.length - 1]!]) expectFixHolds(checked, finding, finding.fixes.find((fix) => fix.preferred)!, ngspiceRuns);
  });

  it('one at a time, the re-checks run out first', () => {
    const reader = memoryReader({ [MAIN_URI]: board });
    const oneAtATime = checkCircuit(elaborate(MAIN_URI, board, reader), DEFAULT_SETTINGS, undefined, { fixProvider: createFixProvider(reader, undefined) });
    expect(starved(oneAtATime.findings).filter((finding) => finding.fixes.some((fix) => fix.preferred)).length).toBeLessThanOrEqual(MAXIMUM_VERIFICATIONS);
  });
});

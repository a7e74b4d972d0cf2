// Correct board-level circuits (circuits/good/, scenarios of our own) must raise nothing at
// warning or error: an engineer stops trusting a checker after the first false alarm. Their
// operating points, as `pnlint op` prints them, must agree with the reference engine
// (ngspice 39); directives and pnlint.json must change the verdict the way product.md says.
import { beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { declareNgspiceGate, ngspiceBranchName, ngspiceNodeName, runNgspiceOperatingPoint } from '../support/ngspice.js';
import {
  CIRCUITS,
  LED_RULE_OF_THUMB_CURRENT,
  SETUP_TIMEOUT_MILLISECONDS,
  alarms,
  checkJson,
  near,
  pnlintAll,
  readCircuit,
  referenceDiodeCurrent,
  type CheckReport,
} from './support.js';

const GOOD = join(CIRCUITS, 'good');
const GOOD_FILES = readdirSync(GOOD).filter((name) => name.endsWith('.cir'));

/** Agreement asked of node voltages against ngspice 39 at tight tolerances: 10 µV + 1e-5 relative (what a user comparing with their simulator would accept; the solver's own tests ask for more). */
const VOLTAGE_RELATIVE = 1e-5;
const VOLTAGE_ABSOLUTE = 10e-6;
/** Branch currents: 1e-5 relative, 1 nA absolute. */
const CURRENT_RELATIVE = 1e-5;
const CURRENT_ABSOLUTE = 1e-9;

interface OperatingPointJson {
  corners: {
    name: string;
    solved: boolean;
    nodes: Record<string, number>;
    branches: Record<string, number>;
    diodes: Record<string, { voltage: number; current: number; kind: string }>;
  }[];
}

/** `pnlint op --format json` of every good file, run once, all at once. */
const operatingPoints = new Map<string, OperatingPointJson>();

function operatingPoint(relativePath: string): OperatingPointJson {
  const op = operatingPoints.get(relativePath);
  if (!op) throw new Error(`pnlint op ${relativePath} did not run`);
  return op;
}

/** DC-only good circuits whose nominal operating point is compared node by node. */
const COMPARED = [
  'g01-led-3v3-rail.cir',
  'g04-led-npn-switch.cir',
  'g05-led-nmos-switch.cir',
  'g06-led-current-source.cir',
  'g07-zener-reference.cir',
  'g10-relay-freewheel.cir',
  'g13-diode-or.cir',
  'g16-led-string.cir',
  'g18-subcircuit-channels.cir',
  'g19-params-include.cir',
  'g23-probed-clamps.cir',
  'g51-rd-snubber.cir',
  'g24-led-channel-params.cir',
  'g27-led-diode-sink.cir',
  'g28-led-string-sink-24v.cir',
  'g29-zener-shunt-load.cir',
  'g30-schottky-polarity.cir',
  'g31-pmos-oring.cir',
  'g33-totem-pole.cir',
  'g34-temp-sense.cir',
  'g35-opto-input.cir',
  'g36-pin-resistance.cir',
  'g37-kicad-export.cir',
  'g38-gate-zeners.cir',
  'g40-charlieplex.cir',
  'g41-zener-led-threshold.cir',
  'g43-zener-snubber.cir',
  'g44-fuse-resistor.cir',
  'g45-precision-rectifier.cir',
  'g46-global-rail-area.cir',
  'g48-photodiode-dark.cir',
  'g49-diode-and.cir',
  'g50-varicap-bias.cir',
];

let report: CheckReport;
let configReport: CheckReport;
beforeAll(async () => {
  report = checkJson(GOOD_FILES, GOOD);
  configReport = checkJson(['g21-config-ratings.cir'], join(GOOD, 'config-folder'));
  const files = [...new Set([...COMPARED, 'g14-esd-clamps.cir'])].map((file) => `good/${file}`);
  const runs = await pnlintAll(files.map((file) => ({ args: ['op', file, '--format', 'json'], cwd: CIRCUITS })));
  runs.forEach((run, index) => {
    if (run.code !== 0) throw new Error(`pnlint op ${files[index]} exited ${run.code}: ${run.stderr}`);
    operatingPoints.set(files[index], JSON.parse(run.stdout) as OperatingPointJson);
  });
}, SETUP_TIMEOUT_MILLISECONDS);

describe('no false alarm on a correct design', () => {
  it('exits 0 on the whole good set (product.md: 0 when nothing is at error)', () => {
    expect(report.code).toBe(0);
  });

  it.each(GOOD_FILES)('%s raises nothing at warning or error', (file) => {
    const findings = report.byFile.get(file);
    expect(findings, `${file} was not checked`).toBeDefined();
    expect(alarms(findings!)).toEqual([]);
  });

  it('g21, whose ratings come from the folder pnlint.json, raises nothing there', () => {
    expect(alarms(configReport.byFile.get('g21-config-ratings.cir')!)).toEqual([]);
  });
});

const ngspice = declareNgspiceGate();

describe.runIf(ngspice)('m= is that many parts in parallel, each within its own rating', () => {
  it('g22: two LEDs as one m=2 line share 33 mA at 5.25 V, 16.5 mA each, inside the 20 mA rule of thumb', () => {
    // ngspice 39 at the high corner (5 V + 5 %), with m=2 on the line as written.
    const total = referenceDiodeCurrent(readCircuit('good/g22-led-multiplier.cir'), 'D1', { V5: 'V5 v5 0 DC 5.25' });
    expect(total).toBeGreaterThan(LED_RULE_OF_THUMB_CURRENT);
    expect(total / 2).toBeLessThan(LED_RULE_OF_THUMB_CURRENT); // rule of thumb for LEDs, common practice
    expect(alarms(report.byFile.get('g22-led-multiplier.cir')!)).toEqual([]);
  });
});

describe.runIf(ngspice)('directives and pnlint.json decide the verdict', () => {
  it('g21 without its pnlint.json: the 20 mA rule of thumb applies and the LED is over it', () => {
    const netlist = readCircuit('good/config-folder/g21-config-ratings.cir');
    // ngspice 39 at 9.45 V (9 V + the default 5 %): above 20 mA (rule of thumb for LEDs,
    // common practice); at pnlint.json's 9.6 V max still below its 30 mA rating.
    const current = referenceDiodeCurrent(netlist, 'DAMB', { V9: 'V9 v9 0 DC 9.45' });
    expect(current).toBeGreaterThan(LED_RULE_OF_THUMB_CURRENT);
    expect(referenceDiodeCurrent(netlist, 'DAMB', { V9: 'V9 v9 0 DC 9.6' })).toBeLessThan(30e-3);

    const folder = mkdtempSync(join(tmpdir(), 'pnlint-acceptance-noconfig-'));
    writeFileSync(join(folder, 'g21.cir'), netlist);
    const alone = checkJson(['g21.cir'], folder);
    const found = alarms(alone.byFile.get('g21.cir')!);
    expect(found.map((f) => [f.rule, f.element, f.range.start.line])).toContainEqual(['led-current-unlimited', 'DAMB', 4]);
  });

  it('g20 without its LED rating directive: 21 mA at 16.5 V is over the 20 mA rule of thumb', () => {
    const netlist = readCircuit('good/g20-directives.cir');
    const withoutRating = netlist
      .split('\n')
      .filter((line) => !line.startsWith('*pnlint: rating DOUT'))
      .join('\n');
    // ngspice 39 at the supply directive's 16.5 V with ROUT at its 5 % low tolerance (646 Ω):
    // over 20 mA (rule of thumb), under the directive's 30 mA.
    const current = referenceDiodeCurrent(withoutRating, 'DOUT', { VOUT: 'VOUT out 0 DC 16.5', ROUT: 'ROUT out anode 646' });
    expect(current).toBeGreaterThan(LED_RULE_OF_THUMB_CURRENT);
    expect(current).toBeLessThan(30e-3);

    const folder = mkdtempSync(join(tmpdir(), 'pnlint-acceptance-norating-'));
    writeFileSync(join(folder, 'g20.cir'), withoutRating);
    const found = alarms(checkJson(['g20.cir'], folder).byFile.get('g20.cir')!);
    expect(found.map((f) => [f.rule, f.element])).toContainEqual(['led-current-unlimited', 'DOUT']);
  });
});


/** Every node voltage and every source and inductor current of pnlint's nominal corner, against ngspice 39's values. */
function expectAgreement(file: string, nominal: OperatingPointJson['corners'][number], reference: ReadonlyMap<string, number>): void {
  const nodes = Object.entries(nominal.nodes).filter(([name]) => name !== '0');
  expect(nodes.length).toBeGreaterThan(0);
  for (const [name, voltage] of nodes) {
    const expected = reference.get(ngspiceNodeName(name));
    expect(expected, `ngspice has no node ${name}`).toBeDefined();
    expect(near(voltage, expected!, VOLTAGE_RELATIVE, VOLTAGE_ABSOLUTE), `${file} node ${name}: pnlint ${voltage}, ngspice ${expected}`).toBe(true);
  }
  for (const [element, current] of Object.entries(nominal.branches)) {
    if (!/^[VL]/i.test(element.split('.').pop()!)) continue;
    const expected = reference.get(ngspiceBranchName(element));
    expect(expected, `ngspice has no branch ${element}`).toBeDefined();
    expect(near(current, expected!, CURRENT_RELATIVE, CURRENT_ABSOLUTE), `${file} ${element}: pnlint ${current}, ngspice ${expected}`).toBe(true);
  }
}

describe.runIf(ngspice)('pnlint op agrees with ngspice 39 at the nominal corner', () => {
  it.each(COMPARED)('%s: every node voltage and every source current', (file) => {
    const op = operatingPoint(`good/${file}`);
    const nominal = op.corners.find((corner) => corner.name === 'nominal')!;
    expect(nominal.solved).toBe(true);
    const includes = file === 'g19-params-include.cir' ? { 'lib/indicators.lib': readCircuit('good/lib/indicators.lib') } : undefined;
    const reference = runNgspiceOperatingPoint(readCircuit(`good/${file}`), includes ? { includes } : {});
    expect(reference.ok, reference.failure).toBe(true);
    expectAgreement(file, nominal, reference.values);
  });

  it('g06: the LED on a 15 mA source carries 15 mA (an ideal current source sets its current)', () => {
    const op = operatingPoint('good/g06-led-current-source.cir');
    const nominal = op.corners.find((corner) => corner.name === 'nominal')!;
    expect(nominal.diodes.DBACK.current).toBeCloseTo(15e-3, 9);
  });

  it('g07 at the supply directive’s 10.8 V and 13.2 V: the zener current within the textbook window', () => {
    const op = operatingPoint('good/g07-zener-reference.cir');
    const netlist = readCircuit('good/g07-zener-reference.cir');
    for (const [corner, volts] of [['VBAT min', 10.8], ['VBAT max', 13.2]] as const) {
      const solved = op.corners.find((c) => c.name === corner)!;
      // The zener line is anode first (DREF 0 ref): its reverse current is minus the probe's reading.
      const reverse = -referenceDiodeCurrent(netlist, 'DREF', { VBAT: `VBAT vbat 0 DC ${volts}` });
      expect(near(-solved.diodes.DREF.current, reverse, 1e-5)).toBe(true);
      // Textbook: (Vs − Vz)/R − Vz/RL with Vz ≈ 5.1 V, within the model's 5 Ω slope.
      const textbook = (volts - 5.1) / 1000 - 5.1 / 10_000;
      expect(near(reverse, textbook, 0.05)).toBe(true);
      // Above IZK 1 mA (the directive), so no zener-underbiased is right.
      expect(reverse).toBeGreaterThan(1e-3);
    }
  });
});

describe.runIf(ngspice)('classification from the model, as product.md describes it', () => {
  it('the LED models are taken for LEDs, the silicon signal diode for neither an LED nor a Schottky', () => {
    // Forward voltage at 5 mA from ngspice 39: above 1.5 V is an LED, below 0.45 V a Schottky (product.md).
    const probe = (model: string, card: string) =>
      runNgspiceOperatingPoint(['forward voltage of ' + model, 'I1 0 a DC 5m', `D1 a 0 ${model}`, card, '.end'].join('\n'), { vectors: ['v(a)'] }).values.get('v(a)')!;
    expect(probe('LEDRED', '.model LEDRED D(IS=2e-19 N=1.9 RS=3 BV=6 IBV=10u)')).toBeGreaterThan(1.5);
    expect(probe('SIL', '.model SIL D(IS=4n N=1.9 RS=0.6 BV=100 IBV=5u)')).toBeGreaterThan(0.45);
    expect(probe('SIL', '.model SIL D(IS=4n N=1.9 RS=0.6 BV=100 IBV=5u)')).toBeLessThan(1.5);
    expect(operatingPoint('good/g01-led-3v3-rail.cir').corners[0].diodes.DPWR.kind).toBe('led');
    const clamps = operatingPoint('good/g14-esd-clamps.cir').corners[0].diodes;
    expect(clamps.DUP.kind).toBe('signal');
    expect(clamps.DDN.kind).toBe('signal');
  });
});

describe('the pieces of a real netlist all reach the checks', () => {
  it('g18: each subcircuit channel is checked under its hierarchical name', () => {
    const op = operatingPoint('good/g18-subcircuit-channels.cir');
    expect(Object.keys(op.corners[0].diodes).sort()).toEqual(['X1.D1', 'X2.D1', 'X3.D1', 'X4.D1']);
  });

  it('g19: parameters are evaluated and the included models are found (no unknown-model)', () => {
    const findings = report.byFile.get('g19-params-include.cir')!;
    expect(findings.filter((f) => f.rule === 'unknown-model' || f.rule === 'netlist')).toEqual([]);
    const op = operatingPoint('good/g19-params-include.cir');
    // The resistor's value comes from .param: rcharge = (5 − 2)/8 mA = 375 Ω (hand arithmetic);
    // its current over its voltage must be that resistance.
    const nominal = op.corners[0];
    const drop = nominal.nodes.rail - nominal.nodes.chg;
    expect(nominal.branches.RCHG).toBeCloseTo(drop / 375, 9);
  });
});

/** DC-only good circuits that read their models from files beside them, with those files (relative path as the netlist writes it). */
const COMPARED_WITH_INCLUDES: Record<string, string[]> = {
  'g25-lib-sections.cir': ['lib/parts.lib'],
  'g26-export-probes.cir': ['lib/export-models.inc'],
};

describe.runIf(ngspice)('pnlint op agrees with ngspice 39 where the models come from .lib sections and .include files', () => {
  const included = new Map<string, OperatingPointJson>();
  beforeAll(async () => {
    const files = Object.keys(COMPARED_WITH_INCLUDES);
    const runs = await pnlintAll(files.map((file) => ({ args: ['op', `good/${file}`, '--format', 'json'], cwd: CIRCUITS })));
    runs.forEach((run, index) => {
      if (run.code !== 0) throw new Error(`pnlint op ${files[index]} exited ${run.code}: ${run.stderr}`);
      included.set(files[index], JSON.parse(run.stdout) as OperatingPointJson);
    });
  }, SETUP_TIMEOUT_MILLISECONDS);

  it.each(Object.keys(COMPARED_WITH_INCLUDES))('%s: every node voltage and every source current', (file) => {
    const nominal = included.get(file)!.corners.find((corner) => corner.name === 'nominal')!;
    expect(nominal.solved).toBe(true);
    const includes = Object.fromEntries(COMPARED_WITH_INCLUDES[file].map((path) => [path, readCircuit(`good/${path}`)]));
    const reference = runNgspiceOperatingPoint(readCircuit(`good/${file}`), { includes });
    expect(reference.ok, reference.failure).toBe(true);
    expectAgreement(file, nominal, reference.values);
  });

  it('g25 and g26: the section and include models are found (no unknown-model), and the zener ratings written in the library apply', () => {
    for (const file of Object.keys(COMPARED_WITH_INCLUDES)) {
      expect(report.byFile.get(file)!.filter((f) => f.rule === 'unknown-model' || f.rule === 'netlist')).toEqual([]);
    }
    expect(included.get('g25-lib-sections.cir')!.corners[0].diodes.DZ.kind).toBe('zener');
    expect(included.get('g26-export-probes.cir')!.corners[0].diodes.D_RECT_IN.kind).toBe('rectifier');
  });
});

describe.runIf(ngspice)('the designs hold at the supply corners, as ngspice 39 solves them', () => {
  it('g24: seven LED channels, nested and with params: on the instance line, each under its own hierarchical name', () => {
    const op = operatingPoint('good/g24-led-channel-params.cir');
    expect(Object.keys(op.corners[0].diodes).sort()).toEqual(['X1.D1', 'X2.D1', 'X3.D1', 'XP1.XA.D1', 'XP1.XB.D1', 'XP2.XA.D1', 'XP2.XB.D1']);
    // ngspice 39 at 12.6 V (12 V + 5 %): the brightest channel (680 ohm) stays under the 20 mA rule of thumb (common practice).
    const nodes = runNgspiceOperatingPoint(readCircuit('good/g24-led-channel-params.cir').replace('VRAIL rail 0 DC {vrail}', 'VRAIL rail 0 DC 12.6'), {
      vectors: ['v(x1.anode)', 'v(xp2.xb.anode)'],
    }).values;
    expect((12.6 - nodes.get('v(x1.anode)')!) / 680).toBeLessThan(LED_RULE_OF_THUMB_CURRENT);
    // XP2's second channel gets rsecond = {2*470} = 940 ohm (hand arithmetic): its current is the drop over 940 ohm.
    const xp2 = op.corners.find((corner) => corner.name === 'nominal')!;
    expect(xp2.branches['XP2.XB.RLED']).toBeCloseTo((xp2.nodes.rail - xp2.nodes['XP2.XB.anode']) / 940, 9);
  });

  it('g28: the sink holds the five-LED string at the same current from 22.8 V to 25.2 V', () => {
    const op = operatingPoint('good/g28-led-string-sink-24v.cir');
    const netlist = readCircuit('good/g28-led-string-sink-24v.cir');
    const low = referenceDiodeCurrent(netlist, 'D1', { V24: 'V24 v24 0 DC 22.8' });
    const high = referenceDiodeCurrent(netlist, 'D1', { V24: 'V24 v24 0 DC 25.2' });
    // A current sink: within 2 % over a 10 % supply swing (ours; the transistor's Early voltage is 80 V), under 20 mA (rule of thumb).
    expect(near(low, high, 0.02)).toBe(true);
    expect(high).toBeLessThan(LED_RULE_OF_THUMB_CURRENT);
    for (const [corner, expected] of [['V24 min', low], ['V24 max', high]] as const) {
      const solved = op.corners.find((c) => c.name === corner)!;
      expect(near(solved.diodes.D1.current, expected, 1e-5), `${corner}: pnlint ${solved.diodes.D1.current}, ngspice ${expected}`).toBe(true);
    }
  });

  it('g29: the 5.6 V shunt regulator keeps its zener above IZK 5 mA at 10.8 V, inside the textbook window', () => {
    const op = operatingPoint('good/g29-zener-shunt-load.cir');
    const netlist = readCircuit('good/g29-zener-shunt-load.cir');
    // Textbook window: Rmax = (10.8 − 5.6)/(5 mA + 5.6 V/270 Ω) = 202 Ω, Rmin = (13.2 − 5.6)/(1 W/5.6 V) = 42.6 Ω; RSH is 180 Ω.
    expect((10.8 - 5.6) / (5e-3 + 5.6 / 270)).toBeGreaterThan(180);
    expect((13.2 - 5.6) / (1 / 5.6)).toBeLessThan(180);
    for (const [corner, volts] of [['V12 min', 10.8], ['V12 max', 13.2]] as const) {
      // The zener line is anode first (DSH 0 reg): its reverse current is minus the probe's reading (ngspice 39).
      const reverse = -referenceDiodeCurrent(netlist, 'DSH', { V12: `V12 v12 0 DC ${volts}` });
      expect(reverse).toBeGreaterThan(5e-3);
      const solved = op.corners.find((c) => c.name === corner)!;
      expect(near(-solved.diodes.DSH.current, reverse, 1e-5)).toBe(true);
    }
  });

  it('g40: in the charlieplexed state only LED AB lights; its reversed partner is not called reversed', () => {
    const netlist = readCircuit('good/g40-charlieplex.cir');
    // ngspice 39: AB carries about 10 mA, every other LED under a microampere.
    expect(referenceDiodeCurrent(netlist, 'DAB')).toBeGreaterThan(5e-3);
    for (const other of ['DBA', 'DBC', 'DCB', 'DAC', 'DCA']) expect(Math.abs(referenceDiodeCurrent(netlist, other))).toBeLessThan(1e-6);
    expect(report.byFile.get('g40-charlieplex.cir')!.filter((f) => f.rule === 'reversed-diode')).toEqual([]);
  });
});
